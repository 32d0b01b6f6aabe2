"""The plan applied: the revised schedule (--out, JSON) and the accelerated project (--save-as).

Sources:
- ques10.com worked solution of a University of Mumbai construction-management exam question
  (tests/data/examples/ques10_indirect80.json, verified text): 18 days for 280 (C 1, F 4),
  17 days for 420; so the 18th-to-17th day costs 140, and a plan on the project saved at 18
  days must price that day at 140.
- Hand calculations written out beside the others (stepped costs, progress, options).
- A property on random projects (conftest.projects): any plan on the saved project is a plan
  on the original costing the first plan more, so a further day on the saved project never
  costs less than the original curve's step, and the saved project finishes where the plan
  did.
"""

from __future__ import annotations

import json
from datetime import date
from pathlib import Path

import pytest
from hypothesis import given
from openpyxl import load_workbook
from typer.testing import CliRunner

from conftest import PROPERTY, TOL, load_json, make_project, project_from_example, projects
from hasten.accelerated import accelerated
from hasten.cli import app
from hasten.cpm import schedule
from hasten.errors import InfeasibleTargetError
from hasten.formats import read_project, write_project
from hasten.network import Network
from hasten.planner import Planner
from hasten.project import Activity, CrashStep, Link, Option

runner = CliRunner()
QUES10 = load_json("examples/ques10_indirect80.json")
STAGES = {s["duration"]: s["crash_cost"] for s in QUES10["published_answers"]["VERIFIED_TEXT"]["stages"]}


@pytest.fixture()
def ques10_folder(tmp_path: Path) -> Path:
    folder = tmp_path / "ques10"
    write_project(project_from_example(QUES10, indirect=80), folder)
    return folder


def run(*args):
    return runner.invoke(app, [str(a) for a in args])


def test_save_as_then_plan_prices_the_next_step_of_the_curve(ques10_folder: Path, tmp_path: Path):
    saved = tmp_path / "after18"
    out = run("plan", ques10_folder, "--finish", 18, "--save-as", saved)
    assert out.exit_code == 0, out.output
    data = json.loads(run("schedule", saved, "--json").output)
    assert data["finish"] == 18  # ques10: the 18-day plan
    p = read_project(saved)
    assert abs(p.normal_direct_cost - (3900 + STAGES[18])) <= TOL  # direct 3,900 + 280 (verified text)
    again = json.loads(run("plan", saved, "--finish", 17, "--json").output)
    assert again["added_cost"] == STAGES[17] - STAGES[18] == 140
    # the days the first plan bought are gone from the limits: C 6 -> 5 (crash 3), F 9 -> 5 (crash 4)
    acts = {a.id: a for a in p.activities}
    assert (acts["C"].duration, acts["C"].crash_duration, acts["F"].duration, acts["F"].crash_duration) == (5, 3, 5, 4)
    # nothing in the path is overwritten
    again = run("plan", ques10_folder, "--finish", 18, "--save-as", saved)
    assert again.exit_code == 2 and "nothing is overwritten" in again.output


def test_stepped_costs_lose_the_steps_used():
    # By hand: 7 days; steps 3 days at 100, then 2 at 300. Five days to finish in 3:
    # 3 x 100 + 1 x 300 = 600. Left: 1 day at 300.
    act = Activity("A", 7, cost=1000, steps=(CrashStep(3, 100.0), CrashStep(2, 300.0)))
    p = make_project([act], [])
    plan = Planner(p).plan(3)
    assert abs(plan.added_cost - 600) <= TOL
    after = accelerated(p, plan)
    a = after.activities[0]
    assert (a.duration, a.cost, a.steps) == (3, 1600, (CrashStep(1, 300.0),))
    assert abs(Planner(after).plan(2).added_cost - 300) <= TOL
    with pytest.raises(InfeasibleTargetError):
        Planner(after).plan(1)


def test_started_work_keeps_its_remaining_allowance():
    # By hand (README "Progress"): 10 days, crash 6 (4 days at 100); started, 5 days left, so
    # 4 x 5 // 10 = 2 days may still come off. A plan takes 1 off: 4 days left, 1 day still
    # available (and no more), at 100.
    act = Activity("A", 10, crash_duration=6, cost=0, crash_cost=400, actual_start=date(2024, 1, 1), remaining=5)
    p = make_project([act, Activity("B", 2)], [Link("A", "B")], data_date=date(2024, 1, 8))
    planner = Planner(p)
    plan = planner.plan(planner.normal_finish - 1)
    assert plan.added_cost == 100
    after = accelerated(p, plan)
    net = Network(after)
    assert net.durations[0] == 4 and sum(s.days for s in net.steps[0]) == 1
    assert schedule(after).finish == plan.finish
    assert abs(Planner(after).plan(plan.finish - 1).added_cost - 100) <= TOL
    with pytest.raises(InfeasibleTargetError):
        Planner(after).plan(plan.finish - 2)


def test_a_chosen_option_becomes_the_way_of_working():
    # By hand: P 10 days (crash to 8 at 300 a day) with 'second gang' (7 days for 900, which may
    # go to 6 at 200 a day) and 'far gang' (5 days for 2,500). For 6 days of P: 'second gang'
    # shortened once, 1,100. Applied: P is 6 days at cost + 1,100, no shortening left; 'far gang'
    # would now cost 2,500 - 1,100 = 1,400 more.
    act = Activity("P", 10, crash_duration=8, cost=0, crash_cost=600,
                   options=(Option("second gang", 7, 900, crash_duration=6, cost_per_day=200),
                            Option("far gang", 5, 2500)))
    p = make_project([act], [])
    plan = Planner(p).plan(6)
    assert plan.activities[0].option == "second gang" and abs(plan.added_cost - 1100) <= TOL
    a = accelerated(p, plan).activities[0]
    assert (a.duration, a.cost, a.max_shortening) == (6, 1100, 0)
    assert [(o.name, o.added_cost) for o in a.options] == [("far gang", 1400)]
    assert abs(Planner(accelerated(p, plan)).plan(5).added_cost - 1400) <= TOL


@PROPERTY
@given(projects(max_n=7))
def test_a_further_day_on_the_saved_project_never_costs_less(project):
    planner = Planner(project)
    if planner.shortest_finish >= planner.normal_finish - 1:
        return
    costs = {p.finish: p.added_cost for p in planner.curve()}
    target = planner.normal_finish - 1
    plan = planner.plan(target)
    after = accelerated(project, plan)
    assert schedule(after).finish == plan.finish
    assert abs(after.normal_direct_cost - project.normal_direct_cost - plan.added_cost) <= 1e-6 * max(1, plan.added_cost)
    again = Planner(after)
    if again.shortest_finish < plan.finish:
        step = again.plan(plan.finish - 1).added_cost
        assert step >= costs[plan.finish - 1] - costs[plan.finish] - 1e-6


def test_out_writes_the_revised_schedule_with_real_dates(ques10_folder: Path, tmp_path: Path):
    xlsx, csv = tmp_path / "rev.xlsx", tmp_path / "rev.csv"
    assert run("plan", ques10_folder, "--finish", 18, "--out", xlsx).exit_code == 0
    assert run("plan", ques10_folder, "--finish", 18, "--out", csv).exit_code == 0
    data = json.loads(run("plan", ques10_folder, "--finish", 18, "--json").output)
    rows = {r["id"]: r for r in data["schedule"]}
    # ques10: C 1 and F 4 at 18 days; the rows carry the schedule --json keys and the plan's
    assert (rows["F"]["normal"], rows["F"]["duration"], rows["F"]["shortened_by"]) == (9, 5, 4)
    assert {"es", "ef", "ls", "lf", "early_start", "late_finish", "total_float", "critical"} <= set(rows["F"])
    ws = load_workbook(xlsx)["revised schedule"]
    head = [c.value for c in ws[1]]
    f = next(r for r in ws.iter_rows(min_row=2) if r[0].value == "F")
    cell = f[head.index("early_start")]
    assert cell.is_date and cell.value.date().isoformat() == rows["F"]["early_start"]
    assert "yyyy" in cell.number_format
    money = f[head.index("added_cost")]
    assert money.value == 240 and "0.00" in money.number_format  # 4 x 60 (ques10 slope of F)
    assert csv.read_text(encoding="utf-8").splitlines()[0].startswith("id,name,trade")
    bad = run("plan", ques10_folder, "--finish", 18, "--out", tmp_path / "x.txt")
    assert bad.exit_code == 2 and "x.csv or x.xlsx" in bad.output
