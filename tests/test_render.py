"""Rendering takes finished results only: with every solver and every planner question
made to fail, each text and JSON rendering of each kind of result still works (so no
renderer can solve or re-plan behind the caller's back)."""

from __future__ import annotations

from pathlib import Path

import pytest

from hasten import render, render_json
from hasten.formats import read_project
from hasten.planner import Planner
from hasten.recovery import recovery
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


def test_a_ranged_curve_does_not_ask_for_the_shortest_finish(results):
    ranged = results["ranged curve"]
    assert ranged.shortest_finish is None
    assert "shortest possible" not in render.curve_text(ranged)
    full = results["curve"]
    assert full.shortest_finish == full.points[-1].finish  # traced to the end: known
