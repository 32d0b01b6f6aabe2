"""What the user sees: the ``hasten`` commands run through typer's CliRunner.

Reference values come from published examples (named beside each check); the demo and
cases/ projects are invented and only show that the commands work on them.
"""

from __future__ import annotations

import json
from datetime import date, timedelta
from pathlib import Path

import pytest
from typer.testing import CliRunner

from conftest import load_json, make_project, project_from_example
from hasten.cli import app
from hasten.formats import read_project, write_project
from hasten.planner import Planner
from hasten.project import Activity, Calendar, Contract, Link

runner = CliRunner()
ROOT = Path(__file__).resolve().parents[1]


def run(*args: str):
    return runner.invoke(app, [str(a) for a in args])


@pytest.fixture()
def ques10(tmp_path: Path) -> Path:
    """Worked solution of a University of Mumbai construction-management exam question
    (ques10.com), indirect cost 80 per day: optimum 18 days at total cost 5,620."""
    folder = tmp_path / "ques10"
    write_project(project_from_example(load_json("examples/ques10_indirect80.json"), indirect=80), folder)
    return folder


@pytest.fixture()
def hendrickson(tmp_path: Path) -> Path:
    """Hendrickson & Au, Project Management for Construction, ch. 10, nine-activity example."""
    folder = tmp_path / "nine"
    write_project(project_from_example(load_json("examples/hendrickson_9act_cpm.json")), folder)
    return folder


def test_schedule_table_and_json_hendrickson_from_memory(hendrickson: Path):
    # Hendrickson & Au, ch. 10 nine-activity example: 30 days, critical path A-C-F-I
    # (from memory per the example file; the student worksheet there confirms it).
    out = run("schedule", hendrickson)
    assert out.exit_code == 0, out.output
    assert "30 working days" in out.output
    assert "Critical path 1: A -> C -> F -> I" in out.output
    data = json.loads(run("schedule", hendrickson, "--json").output)
    assert data["finish"] == 30
    assert data["critical_paths"] == [["A", "C", "F", "I"]]
    rows = {r["id"]: r for r in data["activities"]}
    assert set(rows["I"]) >= {"id", "es", "ef", "ls", "lf", "total_float", "free_float", "critical"}
    assert (rows["I"]["es"], rows["I"]["ef"]) == (24, 30)
    # dates: day 0 is the project start (a Monday in the test helpers), five-day week
    start = date.fromisoformat(data["start_date"])
    assert data["finish_date"] == (start + timedelta(days=39)).isoformat()  # Friday of week 6


def test_schedule_writes_csv_and_xlsx(hendrickson: Path, tmp_path: Path):
    import pandas as pd

    for name in ("cpm.csv", "cpm.xlsx"):
        out = run("schedule", hendrickson, "--out", tmp_path / name)
        assert out.exit_code == 0, out.output
        frame = pd.read_csv(tmp_path / name) if name.endswith("csv") else pd.read_excel(tmp_path / name)
        assert list(frame["id"]) == list("ABCDEFGHI")
        assert int(frame.loc[frame["id"] == "I", "lf"].iloc[0]) == 30
    bad = run("schedule", hendrickson, "--out", tmp_path / "cpm.txt")
    assert bad.exit_code == 2 and "cpm.csv or cpm.xlsx" in bad.output


def test_plan_finish_json(ques10: Path):
    # ques10 worked solution: crash C by 1 and F by 4 to reach 18 days, added cost 280.
    data = json.loads(run("plan", ques10, "--finish", 18, "--json").output)
    assert data["finish"] == 18 and data["normal_finish"] == 23
    assert data["added_cost"] == 280
    assert data["direct_cost"] == 3900 + 280
    cut = {a["id"]: a["shortened_by"] for a in data["activities"] if a["shortened_by"]}
    assert cut == {"C": 1, "F": 4}
    assert {t["trade"] for t in data["trades"]} == {"(no trade)"}
    assert sum(t["added_cost"] for t in data["trades"]) == 280
    # one more day (to 17) costs 420 - 280 in the same worked solution
    assert data["next_day_cost"] == 140


def test_plan_text_shows_table_trades_paths_and_cautions(ques10: Path):
    out = run("plan", ques10, "--finish", 18)
    assert out.exit_code == 0, out.output
    for text in ("Current finish: 23 working days", "New finish: 18 working days", "Added direct cost: 280",
                 "By trade:", "Critical path", "One more day earlier would cost 140 more", "Cautions:",
                 "labour law"):
        assert text in out.output


def test_plan_below_shortest_is_a_clear_error(ques10: Path):
    # ques10 worked solution: all-crash duration 12 days.
    out = run("plan", ques10, "--finish", 11)
    assert out.exit_code == 2
    assert "shortest possible finish, 12 working days" in out.output
    assert "Traceback" not in out.output


def test_plan_at_or_after_current_finish_needs_nothing(ques10: Path):
    out = run("plan", ques10, "--finish", 30)
    assert out.exit_code == 0
    assert "No acceleration needed" in out.output
    data = json.loads(run("plan", ques10, "--finish", 23, "--json").output)
    assert data["added_cost"] == 0 and all(a["shortened_by"] == 0 for a in data["activities"])


def test_plan_needs_exactly_one_target(ques10: Path):
    assert run("plan", ques10).exit_code == 2
    assert run("plan", ques10, "--finish", 20, "--earlier", "2d").exit_code == 2
    bad = run("plan", ques10, "--earlier", "two weeks")
    assert bad.exit_code == 2 and "10d" in bad.output


def _chain(tmp_path: Path, calendar: Calendar) -> Path:
    acts = [Activity(f"A{i}", 20, crash_duration=10, cost=1000, crash_cost=2000) for i in range(3)]
    links = [Link("A0", "A1"), Link("A1", "A2")]
    folder = tmp_path / calendar.name
    write_project(make_project(acts, links, calendar=calendar), folder)
    return folder


def test_earlier_two_weeks_counts_calendar_days(tmp_path: Path):
    # Trade facts, section 5 (legaliq.com, "Calendar Day"): two weeks = 14 calendar days,
    # which is 10 working days on a five-day week and 12 on a six-day week (no holidays).
    five = _chain(tmp_path, Calendar((0, 1, 2, 3, 4), (), "mon-fri"))
    six = _chain(tmp_path, Calendar((0, 1, 2, 3, 4, 5), (), "mon-sat"))
    for folder, days in ((five, 10), (six, 12)):
        data = json.loads(run("plan", folder, "--earlier", "2w", "--json").output)
        assert data["normal_finish"] - data["finish"] == days
        d10 = json.loads(run("plan", folder, "--earlier", "10d", "--json").output)
        assert d10["normal_finish"] - d10["finish"] == 10


def test_plan_by_date(ques10: Path):
    start = date.fromisoformat(json.loads(run("schedule", ques10, "--json").output)["start_date"])
    # working day 18 ends on the Wednesday of the fourth week (start is a Monday)
    by = start + timedelta(days=3 * 7 + 2)
    data = json.loads(run("plan", ques10, "--by", by.isoformat(), "--json").output)
    assert data["finish"] == 18 and data["finish_date"] == by.isoformat()
    bad = run("plan", ques10, "--by", "2027-13-01")
    assert bad.exit_code == 2 and "YYYY-MM-DD" in bad.output


def test_curve_json_csv_plot(ques10: Path, tmp_path: Path):
    # ques10 worked solution, published stages: 22 days +40, 18 days +280, 17 days +420.
    out = run("curve", ques10, "--json", "--csv", tmp_path / "c.csv", "--plot", tmp_path / "c.png")
    assert out.exit_code == 0, out.output
    points = {p["finish"]: p for p in json.loads(out.output)["points"]}
    assert (points[22]["added_cost"], points[18]["added_cost"], points[17]["added_cost"]) == (40, 280, 420)
    assert min(points) == 12 and max(points) == 23
    assert points[22]["changes"] == [{"id": "C", "days": -1}]
    assert points[17]["day_cost"] == 140
    assert (tmp_path / "c.csv").read_text().startswith("finish,finish_date,added_cost,milestone_damages,day_cost,changes")
    assert (tmp_path / "c.png").read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    part = json.loads(run("curve", ques10, "--from", 20, "--to", 18, "--json").output)
    assert [p["finish"] for p in part["points"]] == [20, 19, 18]
    assert part["points"][0]["day_cost"] == 60  # the day from 21 to 20 in the full curve


def test_curve_text(ques10: Path):
    out = run("curve", ques10)
    assert out.exit_code == 0
    assert "shortest possible 12 working days" in out.output
    assert "C shortened 1 day" in out.output and "C -1" not in out.output  # words, not solver deltas


def test_best_matches_published_optimum(ques10: Path):
    # ques10 worked solution: optimum 18 days, total cost 5,620 (indirect 80 per day).
    data = json.loads(run("best", ques10, "--json").output)
    assert data["finish"] == 18 and data["total_cost"] == 5620
    assert data["indirect_cost"] == 18 * 80 and data["damages"] == 0 and data["bonus"] == 0
    assert data["direct_cost"] == 3900 + 280
    text = run("best", ques10).output
    assert "Best finish: 18 working days" in text and "* 18" in text


def test_best_counts_damages_and_bonus(tmp_path: Path):
    # A three-activity chain (invented, demo data) with damages and a capped bonus:
    # only the bookkeeping is checked here, against time_costs recomputed by hand below.
    acts = [Activity(f"A{i}", 10, crash_duration=5, cost=0, crash_cost=5 * 300) for i in range(3)]
    links = [Link("A0", "A1"), Link("A1", "A2")]
    p = make_project(acts, links, calendar=Calendar((0, 1, 2, 3, 4, 5, 6), (), "all-days"),
                     contract=Contract(finish=date(2024, 1, 25), damages_per_day=1000, bonus_per_day=100,
                                       bonus_cap_days=3))
    write_project(p, tmp_path / "p")
    data = json.loads(run("best", tmp_path / "p", "--json").output)
    rows = {r["finish"]: r for r in data["table"]}  # the finishes priced
    # all-days calendar from 2024-01-01: finish 30 -> last day 2024-01-30, 5 days late
    assert rows[30]["damages"] == 5000 and rows[30]["bonus"] == 0
    for t, r in rows.items():  # finish t -> last day 2024-01-t: t - 25 days late (or early)
        assert r["damages"] == 1000 * max(t - 25, 0) and r["bonus"] == 100 * min(max(25 - t, 0), 3)
        assert r["added_cost"] == 300 * (30 - t)
    # finish 20 -> 2024-01-20, 5 days early, bonus capped at 3 days
    assert Planner(p).total_cost_point(20, 10 * 300).time.bonus == 300
    # each day cut costs 300 and saves 1000 until the contract date (finish 25), then earns
    # at most 100 for three days: the best is finish 25
    assert data["finish"] == 25


def test_budget(ques10: Path):
    # ques10 worked solution: 280 buys 18 days; 279 only 19 days (curve point 220).
    assert json.loads(run("budget", ques10, "--spend", 280, "--json").output)["finish"] == 18
    assert json.loads(run("budget", ques10, "--spend", 279, "--json").output)["finish"] == 19
    assert json.loads(run("budget", ques10, "--spend", 0, "--json").output)["finish"] == 23
    assert json.loads(run("budget", ques10, "--spend", 10 ** 9, "--json").output)["finish"] == 12
    assert run("budget", ques10, "--spend", -5).exit_code == 2


def test_check_valid_and_invalid(ques10: Path, tmp_path: Path):
    out = run("check", ques10)
    assert out.exit_code == 0 and "valid" in out.output and "8 activities" in out.output
    bad = tmp_path / "bad"
    bad.mkdir()
    (bad / "project.toml").write_text('name = "x"\nstart = 2027-01-04\ncalendar = "mon-fri"\n')
    (bad / "activities.csv").write_text("id,duration,predecessors\nA,5,\nB,-2,A\n")
    before = (bad / "activities.csv").read_bytes()
    out = run("check", bad)
    assert out.exit_code == 2
    assert "activities.csv" in out.output and "row 3" in out.output and "duration" in out.output
    assert "-2" in out.output and "Fix" in out.output and "Traceback" not in out.output
    assert (bad / "activities.csv").read_bytes() == before


def test_cycle_is_printed_as_ids(tmp_path: Path):
    bad = tmp_path / "loop"
    bad.mkdir()
    (bad / "project.toml").write_text('name = "x"\nstart = 2027-01-04\ncalendar = "mon-fri"\n')
    (bad / "activities.csv").write_text("id,duration,predecessors\nA,5,C\nB,2,A\nC,1,B\n")
    out = run("schedule", bad)
    assert out.exit_code == 2
    assert "A -> B -> C -> A" in out.output or "B -> C -> A -> B" in out.output or "C -> A -> B -> C" in out.output


def test_missing_project_is_a_clear_error(tmp_path: Path):
    out = run("schedule", tmp_path / "nowhere")
    assert out.exit_code == 2 and "nowhere" in out.output and "Traceback" not in out.output


def test_convert_round_trip(ques10: Path, tmp_path: Path):
    for target in ("p.xlsx", "p.json", "back"):
        out = run("convert", ques10 if target == "p.xlsx" else tmp_path / "p.xlsx", tmp_path / target)
        assert out.exit_code == 0, out.output
    assert read_project(tmp_path / "back") == read_project(ques10)
    assert read_project(tmp_path / "p.json") == read_project(ques10)
    again = run("convert", ques10, tmp_path / "p.json")
    assert again.exit_code == 2  # never overwrites


def test_demo_writes_and_runs(tmp_path: Path):
    out = run("demo", tmp_path / "demo")
    assert out.exit_code == 0, out.output
    assert (tmp_path / "demo" / "activities.csv").exists()
    assert "invented" in out.output and "Least total cost" in out.output
    assert read_project(tmp_path / "demo").name.endswith("(invented)")
    assert run("demo", tmp_path / "demo").exit_code == 2  # not over an existing project


@pytest.mark.parametrize("case", sorted(p.name for p in (ROOT / "cases").iterdir() if p.is_dir()))
def test_cases_are_valid_and_plannable(case: str):
    """Every bundled case reads, schedules and plans. Where an independent reference applies
    (one calendar, no progress, no options, no milestone damages) the CLI's least cost
    three days early equals scipy's linprog on the same network (conftest.linprog_least_cost);
    for the other cases (calendars of their own, progress) this is a smoke test only, their
    answers being checked on published and hand-worked examples elsewhere."""
    from conftest import linprog_least_cost
    from hasten.formats import read_project

    folder = ROOT / "cases" / case
    assert run("check", folder).exit_code == 0
    data = json.loads(run("best", folder, "--json").output)
    assert data["plan"]["finish"] == data["finish"]
    project = read_project(folder)
    plain = (not project.calendars and project.data_date is None
             and not any(a.options or a.deadline or a.steps for a in project.activities))
    if plain:
        normal = json.loads(run("schedule", folder, "--json").output)["finish"]
        plan = json.loads(run("plan", folder, "--finish", str(normal - 3), "--json").output)
        assert plan["added_cost"] == pytest.approx(linprog_least_cost(project, normal - 3))


def test_python_dash_m(tmp_path: Path):
    import subprocess
    import sys

    out = subprocess.run([sys.executable, "-m", "hasten", "--help"], capture_output=True, text=True)
    assert out.returncode == 0 and "schedule" in out.stdout


def _hand_calendar_project(folder: Path) -> Path:
    """The hand-worked three-calendar example of tests/test_calendars_per_activity.py
    (our own arithmetic there), written as a project folder."""
    from test_calendars_per_activity import hand_project

    write_project(hand_project(), folder)
    return folder


def test_schedule_shows_each_activity_in_its_own_calendar(tmp_path: Path):
    folder = _hand_calendar_project(tmp_path / "hand")
    checked = run("check", folder)
    assert checked.exit_code == 0 and "Calendars of their own: crane (1 activity), six-day (1 activity)" \
        in checked.output
    out = run("schedule", folder)
    assert out.exit_code == 0, out.output
    rows = {line.split()[0]: line.split() for line in out.output.splitlines()
            if line.split()[:1] and line.split()[0] in {"A", "B", "C", "D", "M"}}
    # B works to the every-day calendar: Sat 8 - Mon 10 March 2025 (hand-worked)
    assert rows["B"][1:4] == ["crane", "3", "2025-03-08"] and rows["B"][4] == "2025-03-10"
    assert rows["D"][1] == "six-day" and rows["A"][1] == "mon-fri"
    assert "own calendar" in out.output
    data = json.loads(run("schedule", folder, "--json").output)
    by = {a["id"]: a for a in data["activities"]}
    assert (by["B"]["calendar"], by["B"]["early_start"], by["B"]["early_finish"]) == ("crane", "2025-03-08", "2025-03-10")
    assert data["finish"] == 8 and data["finish_date"] == "2025-03-12"


def test_plan_across_calendars_and_the_rest_day_caution(tmp_path: Path):
    folder = _hand_calendar_project(tmp_path / "hand")
    data = json.loads(run("plan", folder, "--finish", "7", "--json").output)
    assert data["finish"] == 7 and data["added_cost"] == 200  # hand-worked: one day off A
    assert {a["id"]: a["calendar"] for a in data["activities"]}["B"] == "crane"
    assert not any("rest day" in c for c in data["cautions"])  # A works Mon-Fri
    # crash only B (every-day calendar): make A uncrashable and the target reachable by B
    import dataclasses

    from test_calendars_per_activity import hand_project

    p = hand_project()
    acts = (dataclasses.replace(p.activities[0], crash_duration=5, crash_cost=1000),) + p.activities[1:]
    write_project(dataclasses.replace(p, activities=acts), tmp_path / "b")
    out = run("plan", tmp_path / "b", "--finish", "7")
    # B on the crane shortened to Sat-Sun: C can start Mon 10 (hand-worked)
    assert out.exit_code == 0, out.output
    assert "no weekly rest day" in out.output
    row = next(line.split() for line in out.output.splitlines() if line.startswith("B "))
    assert row[:5] == ["B", "crane", "3", "2", "1"]  # calendar, normal, new days, shortened by
