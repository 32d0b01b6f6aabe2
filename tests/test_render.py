"""Rendering takes finished results only: with every solver and every planner question
made to fail, each text and JSON rendering of each kind of result still works (so no
renderer can solve or re-plan behind the caller's back)."""

from __future__ import annotations

from pathlib import Path

import pytest

from hasten import charts, render, render_json
from hasten.formats import read_project
from hasten.planner import Planner
from hasten.price import ProposalLine, price_proposal
from hasten.questions import handover
from hasten.recovery import recovery
from hasten.report import report_content
from hasten.report_html import html_report
from hasten.report_md import markdown_report
from hasten.report_xlsx import report_sheets
from hasten.solver_model import LinearModel

ROOT = Path(__file__).resolve().parents[1]


def _refuse(*args, **kwargs):
    raise AssertionError("rendering asked for a solve or a plan")


@pytest.fixture(scope="module")
def results():
    clinic = Planner(read_project(ROOT / "cases" / "clinic-fitout"))
    late = Planner(read_project(ROOT / "cases" / "harbour-depot-late"))
    normal = clinic.normal_finish
    return {
        "plan": clinic.plan(normal - 3),
        "ranged curve": clinic.curve(normal, normal - 2),  # the shortest finish is not asked
        "curve": clinic.curve(),
        "best": clinic.best_finish(),
        "budget": clinic.earliest_within(20000),
        "recovery": recovery(late),
        "price": price_proposal(clinic.project, [ProposalLine("A320", 1), ProposalLine("A030", 1)]),
        "report": handover(read_project(ROOT / "cases" / "clinic-fitout"), best=True),
        "recovery report": handover(read_project(ROOT / "cases" / "harbour-depot-late"), recover=True),
    }


def test_rendering_never_solves(results, monkeypatch):
    monkeypatch.setattr(LinearModel, "solve", _refuse)
    for name in ("plan", "curve", "best_finish", "earliest_within", "_solve"):
        monkeypatch.setattr(Planner, name, _refuse)
    monkeypatch.setattr(Planner, "shortest_finish", property(_refuse))
    plan, curve, ranged = results["plan"], results["curve"], results["ranged curve"]
    assert "Least-cost plan" in render.plan_text(plan) and render_json.plan_json(plan)["finish"] == plan.finish
    for c in (curve, ranged):
        assert render.curve_text(c) and render_json.curve_json(c)["points"] and render_json.curve_rows(c)
    assert render.best_text(results["best"]) and render_json.best_json(results["best"])
    assert render.plan_text(results["budget"]) and render_json.plan_json(results["budget"])
    assert render.recovery_text(results["recovery"]) and render_json.recovery_json(results["recovery"])
    priced = results["price"]
    assert render.price_text(priced) and render_json.price_json(priced)["finish"] == priced.finish
    assert render_json.revised_rows(plan) and render_json.revised_course_rows(results["recovery"])
    assert charts.svg_markup(charts.schedule_chart(plan)).startswith("<svg")
    assert charts.svg_markup(charts.curve_chart(curve)).startswith("<svg")
    assert charts.svg_markup(charts.curve_chart(results["best"])).startswith("<svg")
    for name in ("report", "recovery report"):
        h = results[name]
        content = report_content(h)
        assert html_report(h, content, {"chart": "<svg></svg>"}).startswith("<!DOCTYPE html>")
        assert markdown_report(h, content, {"chart": "chart.svg"}) and report_sheets(h, content)


def test_a_ranged_curve_does_not_ask_for_the_shortest_finish(results):
    ranged = results["ranged curve"]
    assert ranged.shortest_finish is None
    assert "shortest possible" not in render.curve_text(ranged)
    full = results["curve"]
    assert full.shortest_finish == full.points[-1].finish  # traced to the end: known
