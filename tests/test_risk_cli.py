"""What the user sees of the risk commands (``hasten risk``, ``plan --confidence``, ``best
--expected``), run through typer's CliRunner.

Sources of the checks: a one-activity project whose finish is ``ceil(X)`` with ``X``
triangular, so ``P(finish <= k) = F(k)`` from scipy.stats.triang (a general-purpose
reference library), within 4 binomial standard errors # common practice; the library
functions themselves (the CLI must print what they return); the deterministic planner for
zero uncertainty. The cases/ projects are invented and only show that the commands work.
"""

from __future__ import annotations

import json
import sys
from dataclasses import replace
from pathlib import Path

import pytest
from scipy import stats
from typer.testing import CliRunner

from conftest import START, make_project
from hasten.cli import app
from hasten.formats import read_project, write_project
from hasten.project import Activity, Contract, Risk

runner = CliRunner()
ROOT = Path(__file__).resolve().parents[1]
PUMP = ROOT / "cases" / "hillside-pump-station"
CLINIC = ROOT / "cases" / "clinic-fitout"
KEYS = {"runs", "seed", "p_meet_target", "p_meet_contract", "percentiles", "percentile_dates", "criticality",
        "expected_damages", "milestones"}


def run(*args):
    return runner.invoke(app, [str(a) for a in args])


def ok_json(*args) -> dict:
    out = run(*args, "--json")
    assert out.exit_code == 0, out.output
    return json.loads(out.stdout)


def refused(*args) -> str:
    out = run(*args)
    assert out.exit_code == 2, out.output
    lines = out.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: ") and "Traceback" not in out.output
    return lines[0]


# -- hasten risk ----------------------------------------------------------------------------

def test_risk_json_has_the_documented_keys():
    data = ok_json("risk", PUMP, "--runs", 600, "--seed", 3)
    assert KEYS <= set(data)
    assert data["runs"] == 600 and data["seed"] == 3
    p = data["percentiles"]
    assert set(p) == {"p10", "p50", "p80", "p90"} and p["p10"] <= p["p50"] <= p["p80"] <= p["p90"]
    assert set(data["percentile_dates"]) == set(p)
    ids = {a.id for a in read_project(PUMP).activities}
    assert set(data["criticality"]) == ids and all(0 <= v <= 1 for v in data["criticality"].values())
    assert [m["id"] for m in data["milestones"]] == ["P060"] and 0 <= data["milestones"][0]["p_meet"] <= 1
    assert data["p_meet_target"] is None and 0 <= data["p_meet_contract"] <= 1
    assert data["expected_damages"] >= 0


def test_the_same_seed_gives_the_same_figures():
    assert ok_json("risk", PUMP, "--runs", 300, "--seed", 9) == ok_json("risk", PUMP, "--runs", 300, "--seed", 9)


def test_risk_text_fits_100_columns():
    out = run("risk", PUMP, "--runs", 400, "--seed", 1, "--finish", 55)
    assert out.exit_code == 0, out.output
    assert max(len(line) for line in out.stdout.splitlines()) <= 100
    assert "P80" in out.stdout and "the target (55 working days" in out.stdout and "Cautions" in out.stdout


def test_one_triangular_activity_against_scipy(tmp_path):
    # one activity, most likely 10, range 8..16, triangular: finish = ceil(X) and
    # P(finish <= k) = F(k), the triangular distribution function (scipy.stats.triang)
    project = make_project([Activity("A", 10, optimistic=8, pessimistic=16)], [])
    project = replace(project, risk=Risk(distribution="triangular"))
    write_project(project, tmp_path / "one")
    runs = 20_000
    for k in (10, 12, 14):
        data = ok_json("risk", tmp_path / "one", "--runs", runs, "--seed", 5, "--finish", k)
        exact = stats.triang.cdf(k, (10 - 8) / (16 - 8), loc=8, scale=8)
        assert abs(data["p_meet_target"] - exact) < 4 * (exact * (1 - exact) / runs) ** 0.5


def test_a_target_plans_first_and_the_plan_file_gives_the_same(tmp_path):
    plan = run("plan", PUMP, "--finish", 54, "--json")
    assert plan.exit_code == 0, plan.output
    (tmp_path / "plan.json").write_text(plan.stdout, encoding="utf-8")
    by_target = ok_json("risk", PUMP, "--finish", 54, "--runs", 500, "--seed", 2)
    by_file = ok_json("risk", PUMP, "--plan", tmp_path / "plan.json", "--runs", 500, "--seed", 2)
    assert by_target["simulated"] == "the least-cost plan for the target"
    assert by_file["simulated"] == "the plan given"
    for key in ("percentiles", "p_meet_target", "criticality", "added_cost", "target"):
        assert by_target[key] == by_file[key], key
    assert by_file["added_cost"] == json.loads(plan.stdout)["added_cost"]
    assert by_file["planned_finish"] == json.loads(plan.stdout)["finish"]


def test_best_and_recover_output_are_plans_too(tmp_path):
    best = run("best", PUMP, "--json")
    (tmp_path / "best.json").write_text(best.stdout, encoding="utf-8")
    data = ok_json("risk", PUMP, "--plan", tmp_path / "best.json", "--runs", 200, "--seed", 1)
    assert data["added_cost"] == json.loads(best.stdout)["plan"]["added_cost"]


@pytest.mark.parametrize("change, words", [
    (lambda d: d["activities"][0].update(id="P999"), "does not have"),
    (lambda d: d["activities"][3].update(duration=1), "cannot take 1 working days"),
    (lambda d: d["activities"][3].update(normal=13), "had 13 working days"),
    (lambda d: d["activities"][3].update(option="night shift"), "has no option 'night shift'"),
    (lambda d: d.pop("activities"), "not a plan"),
])
def test_a_bad_plan_file_is_refused_with_its_place(tmp_path, change, words):
    plan = json.loads(run("plan", PUMP, "--finish", 56, "--json").stdout)
    change(plan)
    (tmp_path / "p.json").write_text(json.dumps(plan), encoding="utf-8")
    line = refused("risk", PUMP, "--plan", tmp_path / "p.json", "--runs", 10)
    assert str(tmp_path / "p.json") in line and words in line and "Fix:" in line


@pytest.mark.parametrize("args, words", [
    (("--runs", 0), "runs"), (("--seed", -2), "seed"), (("--finish", 50, "--by", "2027-05-01"), "one target"),
    (("--by", "05/01/2027"), "not a date"), (("--plan", "no-such-plan.json"), "cannot read the plan"),
    (("--finish", 10), "below the shortest possible finish")])
def test_bad_risk_input_is_one_line_and_exit_2(args, words):
    assert words in refused("risk", PUMP, *args)


def test_workers_without_dask_say_what_to_install(monkeypatch):
    monkeypatch.setitem(sys.modules, "dask", None)  # as if Dask were not installed
    assert 'pip install "hasten[cluster]"' in refused("risk", PUMP, "--runs", 10, "--workers", 2)


def test_a_project_without_ranges_says_so():
    out = run("risk", CLINIC, "--runs", 50, "--seed", 1)
    assert out.exit_code == 0 and "No activity has a range" in out.stdout
    data = ok_json("risk", CLINIC, "--runs", 50, "--seed", 1)
    assert data["p_meet_planned"] == 1.0 and data["percentiles"]["p10"] == data["percentiles"]["p90"]


# -- plan --confidence and best --expected ----------------------------------------------------

PLAN_KEYS = {"label", "added_cost", "finish", "p_meet_sampled", "p_meet", "p_meet_interval", "p80", "p80_date",
             "expected_total_cost", "expected_total_cost_sampled", "activities", "cautions", "proven_optimal"}


def test_plan_with_a_confidence(tmp_path):
    data = ok_json("plan", PUMP, "--by", "2027-05-25", "--confidence", 0.8, "--scenarios", 60, "--seed", 4)
    assert data["question"] == "confidence" and data["confidence"] == 0.8 and data["scenarios"] == 60
    assert PLAN_KEYS <= set(data["deterministic"]) and PLAN_KEYS <= set(data["chosen"])
    chosen = data["chosen"]
    assert chosen["p_meet_sampled"] >= 0.8 and chosen["added_cost"] >= data["deterministic"]["added_cost"]
    low, high = chosen["p_meet_interval"]
    assert low <= chosen["p_meet"] <= high
    (tmp_path / "risky.json").write_text(json.dumps(data), encoding="utf-8")  # a plan for hasten risk too
    again = ok_json("risk", PUMP, "--plan", tmp_path / "risky.json", "--runs", 5000, "--seed", data["check_seed"])
    assert again["p_meet_target"] == chosen["p_meet"] and again["percentiles"]["p80"] == chosen["p80"]
    text = run("plan", PUMP, "--by", "2027-05-25", "--confidence", 0.8, "--scenarios", 60, "--seed", 4)
    assert text.exit_code == 0 and max(len(x) for x in text.stdout.splitlines()) <= 100
    assert "chosen for 80% confidence" in text.stdout and "fresh runs" in text.stdout


def test_without_ranges_the_confidence_plan_is_the_plan():
    plain = ok_json("plan", CLINIC, "--earlier", "3d")
    risky = ok_json("plan", CLINIC, "--earlier", "3d", "--confidence", 0.9, "--seed", 1)
    assert risky["same_plan"] is True
    assert [(a["id"], a["duration"]) for a in risky["chosen"]["activities"]] == \
        [(a["id"], a["duration"]) for a in plain["activities"]]
    assert risky["chosen"]["added_cost"] == plain["added_cost"]


def test_best_expected(tmp_path):
    project = make_project([Activity("A", 10, crash_duration=8, cost=0, crash_cost=180, optimistic=9, pessimistic=14),
                            Activity("B", 9, crash_duration=7, cost=0, crash_cost=80, optimistic=8, pessimistic=13)],
                           [], indirect=50.0)
    project = replace(project, contract=Contract(START.replace(day=12), 200.0))
    write_project(project, tmp_path / "two")
    data = ok_json("best", tmp_path / "two", "--expected", "--scenarios", 40, "--seed", 3)
    assert data["question"] == "expected" and PLAN_KEYS <= set(data["chosen"])
    assert data["chosen"]["expected_total_cost_sampled"] <= data["deterministic"]["expected_total_cost_sampled"] + 1e-6


@pytest.mark.parametrize("args, words", [
    (("plan", PUMP, "--finish", 55, "--confidence", 1.5), "confidence"),
    (("plan", PUMP, "--finish", 55, "--scenarios", 10), "--scenarios and --seed choose a plan for risk"),
    (("best", PUMP, "--seed", 3), "--scenarios and --seed choose a plan for risk"),
    (("plan", PUMP, "--finish", 55, "--confidence", 0.8, "--scenarios", 0), "scenarios"),
    (("plan", ROOT / "cases" / "ferry-canopy", "--earlier", "2d", "--confidence", 0.8), "calendars of their own"),
    (("best", PUMP, "--expected", "--save-as", "never-written.json"), "write the deterministic plan"),
])
def test_bad_risk_plan_input_is_one_line_and_exit_2(args, words):
    assert words in refused(*args)


def test_local_workers_give_the_same_figures():
    pytest.importorskip("dask.distributed")
    here = ok_json("risk", PUMP, "--runs", 700, "--seed", 4)
    there = ok_json("risk", PUMP, "--runs", 700, "--seed", 4, "--workers", 2)
    assert here == there
