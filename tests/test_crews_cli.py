"""Options from crews end to end: ``hasten options`` and ``--crews`` on plan, best, budget and
recover, through typer's CliRunner and the library.

The crew (320 work-hours, 2 workers at 40 an hour, plant 150 a working day, room for 2
crews) is the one whose options are worked out by hand in tests/test_crew_options.py; the
hand results are repeated here where they are used:

* normal working: 320 / (2 x 40) = 4 weeks = 20 days; cost 320 x 40 + 20 x 150 = 15,800;
* 5x10 (Clark & Lorenzoni 1985, 7% loss): 320 / 93 weeks, 18 days worked = 18 working days,
  pay 55 per 50 h: 320/93 x 2 x 55 x 40 + 18 x 150 - 15,800 = 2,039.78;
* 6x10 (17%): 320 / 99.6 weeks, 20 days worked = 3 x 5 + 2 = 17 working days (a Saturday
  adds no working day of a Monday-to-Friday calendar), pay 70 per 60 h:
  320/99.6 x 2 x 70 x 40 + 20 x 150 - 15,800 = 5,191.97;
* 2-shifts (Hanna et al. 2008, loss 0.22052 + 0.07152 ln(75/155)): 13 working days,
  2.48318 weeks x 160 paid h x 40 + 13 x 150 - 15,800 = 2,042.37;
* +1-crew (MCAA stacking of own forces, average 20%): 2.5 weeks = 13 days, 400 h x 40 +
  13 x 150 - 15,800 = 2,150.
"""

from __future__ import annotations

import csv
import json
import shutil
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from typer.testing import CliRunner

from conftest import DATA
from hasten import plan
from hasten.cli import app
from hasten.crew_project import crew_options, with_crew_options
from hasten.formats import read_project

runner = CliRunner()
ROOT = Path(__file__).resolve().parents[1]
TOML = 'name = "Walls (test)"\nstart = 2027-03-01\ncurrency = "USD"\n'
# S -> A -> B and S -> C -> B: normal finish 5 + 20 + 10 = 35 working days
ACTIVITIES = """id,name,trade,duration,crash_duration,cost,crash_cost,predecessors,labour_hours,crew_size,wage,max_crews,equipment_per_day
S,Set-up,general,5,4,5000,6000,,,,,,
A,Walls,masonry,20,,15800,,S,320,2,40,2,150
C,Roof steel,steel,18,,30000,,S,,,,,
B,Finishes,finishes,10,7,20000,22400,A; C,,,,,
"""
# the options of the crew, worked by hand (module docstring)
BY_HAND = [("A", "5x10", 18, 2039.78), ("A", "6x10", 17, 5191.97),
           ("A", "2-shifts", 13, 2042.37), ("A", "+1-crew", 13, 2150)]
ALL = "5x10,6x10,2-shifts,+1-crew"


def run(*args):
    return runner.invoke(app, [str(a) for a in args])


def _folder(path: Path, options: list[tuple] | None = None) -> Path:
    path.mkdir()
    (path / "project.toml").write_text(TOML, encoding="utf-8")
    (path / "activities.csv").write_text(ACTIVITIES, encoding="utf-8")
    if options is not None:
        lines = ["id,option,duration,added_cost"] + [",".join(map(str, o)) for o in options]
        (path / "options.csv").write_text("\n".join(lines) + "\n", encoding="utf-8")
    return path


@pytest.fixture
def walls(tmp_path: Path) -> Path:
    return _folder(tmp_path / "walls")


def _one_line_error(out) -> str:
    assert out.exit_code == 2, out.output
    assert "Traceback" not in out.output
    lines = out.output.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: "), out.output
    return lines[0]


def _plan_summary(data: dict) -> tuple:
    return (data["finish"], data["added_cost"],
            sorted((a["id"], a["duration"], a["option"]) for a in data["activities"]
                   if a["shortened_by"] or a["option"]))


# ------------------------------------------------------------------ the same answer

def test_options_from_crews_match_the_same_options_typed_in(walls, tmp_path):
    typed = read_project(_folder(tmp_path / "typed", BY_HAND))
    built = crew_options(read_project(walls), ALL)
    assert [(r.activity_id, o.name, o.duration, o.added_cost)
            for r in built.results for o in r.options] == BY_HAND
    from_crews = with_crew_options(read_project(walls), built)
    # the same activities and options but for the options' notes (the typed ones have none)
    unnoted = tuple(replace(a, options=tuple(replace(o, note="") for o in a.options))
                    for a in from_crews.activities)
    assert unnoted == typed.activities
    a, b = plan(from_crews, 30), plan(typed, 30)
    # least cost for 5 days off 35, by hand: C (18) binds A at 18, so A gains at most 2 days,
    # by its cheapest option below 20 days, 5x10 at 2,039.78; B gives 3 at 800, S 1 at 1,000.
    # A 2 + B 3 = 4,439.78; A 2 + B 2 + S 1 = 4,639.78; B 3 + S 1 + A 1 = 5,439.78
    assert a.finish == b.finish == 30
    assert a.added_cost == pytest.approx(4439.78) and b.added_cost == pytest.approx(4439.78)
    assert [(c.id, c.duration, c.option) for c in a.changed] == \
        [(c.id, c.duration, c.option) for c in b.changed] == [("A", 18, "5x10"), ("B", 7, "")]


def test_the_options_output_read_back_gives_the_plan_of_crews(walls, tmp_path):
    out = run("options", walls, "-o", tmp_path / "crew-options.csv")
    assert out.exit_code == 0, out.output
    copy = tmp_path / "copy"
    shutil.copytree(walls, copy)
    shutil.copyfile(tmp_path / "crew-options.csv", copy / "options.csv")
    typed = json.loads(run("plan", copy, "--finish", 30, "--json").output)
    crews = json.loads(run("plan", walls, "--finish", 30, "--crews", ALL, "--json").output)
    assert _plan_summary(typed) == _plan_summary(crews) == (30, 4439.78, [("A", 18, "5x10"), ("B", 7, None)])


def test_the_invented_case_gives_the_same_plan_either_way(tmp_path):
    case = ROOT / "cases" / "orchard-pump-station"
    out = run("options", case, "--schedules", "6x10,2-shifts", "-o", tmp_path / "o.csv")
    assert out.exit_code == 0, out.output
    copy = tmp_path / "case"
    shutil.copytree(case, copy)
    shutil.copyfile(tmp_path / "o.csv", copy / "options.csv")
    typed = json.loads(run("plan", copy, "--earlier", "2w", "--json").output)
    crews = json.loads(run("plan", case, "--earlier", "2w", "--crews", "6x10,2-shifts", "--json").output)
    assert _plan_summary(typed) == _plan_summary(crews)


def test_six_day_weeks_count_in_project_working_days(tmp_path):
    # S (5) -> A (20 at normal working); 6x10 takes A to 17 project working days (module
    # docstring): the plan finishing by day 22 uses it, and the plan check (run on every
    # plan) and the schedule treat it as an ordinary 17-day option. Counting the 20 days the
    # crew works (Saturdays included) would make day 22 impossible.
    folder = _folder(tmp_path / "chain")
    (folder / "activities.csv").write_text(
        "id,trade,duration,predecessors,labour_hours,crew_size,wage,max_crews,equipment_per_day\n"
        "S,general,5,,,,,,\nA,masonry,20,S,320,2,40,2,150\n", encoding="utf-8")
    data = json.loads(run("plan", folder, "--finish", 22, "--crews", "6x10", "--json").output)
    chosen = {a["id"]: (a["duration"], a["option"]) for a in data["activities"]}
    assert data["finish"] == 22 and chosen["A"] == (17, "6x10")
    assert data["added_cost"] == 5191.97
    # the last day worked: working day 22 counted from Monday 2027-03-01 (numpy business days)
    last = np.busday_offset(np.datetime64("2027-03-01"), 21, roll="forward", weekmask="1111100")
    assert data["finish_date"] == str(last)


# ------------------------------------------------------------------ hasten options

def test_options_writes_the_options_table(walls, tmp_path):
    target = tmp_path / "crew-options.csv"
    out = run("options", walls, "-o", target)
    assert out.exit_code == 0, out.output
    with target.open(encoding="utf-8", newline="") as handle:
        rows = list(csv.DictReader(handle))
    assert list(rows[0]) == ["id", "option", "duration", "added_cost", "note"]
    # "+1-crew" is written with a leading quote (formula guard); reading a project removes it
    assert [(r["id"], r["option"].lstrip("'"), int(r["duration"]), float(r["added_cost"])) for r in rows] == BY_HAND
    assert "clark-lorenzoni 5x10" in rows[0]["note"] and "loss 7.0% on all hours" in rows[0]["note"]


def test_options_summary_sources_and_cautions(walls, tmp_path):
    out = run("options", walls, "--schedules", "5x10,6x12,2-shifts,+1-crew,+2-crews")
    assert out.exit_code == 0, out.output
    text = out.output
    assert "Options from crews (5x10,6x12,2-shifts,+1-crew,+2-crews) for Walls (test): 4 options" in text
    assert "A     Walls   20             5x10      18      2,039.78" in text
    assert "- A +2-crews: needs 3 crews at once; the area takes 2 (max_crews)" in text
    # the sources the options rest on, one line each
    assert "- Overtime productivity: Clark & Lorenzoni, Applied Cost Engineering" in text
    assert "- Shift work: Hanna, Chang, Sullivan & Lackney (2008)" in text
    assert "- Extra crews: MCAA, Factors Affecting Labor Productivity" in text
    # cautions: 6x12 is 72 h a week; a second shift; crews stacked; the law
    for part in ("Dembe, Erickson, Delbos & Banks", "night shifts", "Ibbs & Sun", "max_crews",
                 "hasten defers to local codes, labour law and licensed professionals"):
        assert part in text, part
    assert "Wrote" not in text  # nothing written without -o


def test_options_with_the_users_productivity_table(walls):
    table = DATA / "labour" / "user_table.csv"
    out = run("options", walls, "--schedules", "6x10", "--productivity", table)
    assert out.exit_code == 0, out.output
    assert f"the user's productivity table {table}" in out.output
    assert "Clark & Lorenzoni 1985" in out.output  # the source named in the file


def test_options_default_measures(walls):
    out = run("options", walls)
    assert out.exit_code == 0 and f"Options from crews ({ALL})" in out.output


@pytest.mark.parametrize("args, says", [
    (["--schedules", "6x9"], "column '--schedules': the schedule 6x9"),
    (["--schedules", "3-shifts"], "only a second shift"),
    (["--schedules", "6x25"], "a day has at most 24 hours"),
    (["--schedules", ""], "no acceleration measures"),
    (["--productivity", "none.csv"], "none.csv: cannot read the file"),
])
def test_options_bad_measures(walls, args, says):
    assert says in _one_line_error(run("options", walls, *args))


def test_options_refuses_targets_before_any_work(walls, tmp_path):
    target = tmp_path / "o.csv"
    target.write_text("keep\n", encoding="utf-8")
    assert "already exists" in _one_line_error(run("options", walls, "-o", target))
    assert target.read_text(encoding="utf-8") == "keep\n"
    assert run("options", walls, "-o", target, "--force").exit_code == 0
    assert "input project" in _one_line_error(run("options", walls, "-o", walls / "options.csv"))
    assert not (walls / "options.csv").exists()
    assert "o.txt" in _one_line_error(run("options", walls, "-o", tmp_path / "o.txt"))


def test_options_without_labour_data(tmp_path):
    line = _one_line_error(run("options", ROOT / "cases" / "clinic-fitout"))
    assert "no activity has labour data" in line and "Fix: give activities labour_hours" in line


def test_a_crew_without_a_wage_names_its_row(walls):
    text = (walls / "activities.csv").read_text(encoding="utf-8")
    (walls / "activities.csv").write_text(text.replace(",320,2,40,2,150", ",320,2,,2,150"), encoding="utf-8")
    line = _one_line_error(run("options", walls))
    assert f"{walls / 'activities.csv'}, row 3, column 'wage': no wage for trade 'masonry'" in line
    assert "[labour.wages]" in line


# ------------------------------------------------------------------ --crews

def test_crews_and_options_file_together(tmp_path):
    folder = _folder(tmp_path / "both", [("A", "precast", 15, 9000)])
    data = json.loads(run("plan", folder, "--finish", 30, "--crews", "5x10", "--json").output)
    assert data["added_cost"] == 4439.78  # as above: precast does not beat 5x10 here
    p = read_project(folder)
    union = with_crew_options(p, crew_options(p, "5x10"))
    assert [o.name for o in union.activity("A").options] == ["precast", "5x10"]


def test_crews_refuses_an_option_name_used_twice(tmp_path):
    folder = _folder(tmp_path / "twice", [("A", "6x10", 17, 5000)])
    line = _one_line_error(run("plan", folder, "--finish", 30, "--crews", "5x10,6x10"))
    assert "activity 'A' already has an option named '6x10'" in line and str(folder) in line


@pytest.mark.parametrize("command", [["plan", "--finish", "30"], ["best"], ["budget", "--spend", "3000"],
                                     ["recover"]])
def test_every_result_built_on_crews_names_its_sources(walls, command):
    name, *rest = command
    data = json.loads(run(name, walls, *rest, "--crews", ALL, "--json").output)
    notes = data["notes"]
    assert notes[0].startswith(f"Options from crews ({ALL}): 4 built for 1 of 1 activities")
    assert any(n.startswith("Overtime productivity: Clark & Lorenzoni") for n in notes)
    assert any(n.startswith("Shift work: Hanna") for n in notes)
    assert any("labour law, collective agreements" in n for n in notes)
    text = run(name, walls, *rest, "--crews", ALL).output
    assert "Note: Extra crews: MCAA" in text


def test_crews_bad_input(walls):
    assert "column '--crews'" in _one_line_error(run("plan", walls, "--finish", 30, "--crews", "6x11"))
    assert "--productivity" in _one_line_error(
        run("best", walls, "--productivity", DATA / "labour" / "user_table.csv"))
    assert "no activity has labour data" in _one_line_error(
        run("best", ROOT / "cases" / "clinic-fitout", "--crews", "6x10"))


def test_without_crews_nothing_changes(walls):
    data = json.loads(run("plan", walls, "--finish", 32, "--json").output)
    # 3 days without options: B 3 x 800 = 2,400 (S costs 1,000 a day)
    assert data["added_cost"] == 2400 and not any("crews" in n for n in data["notes"])


def test_started_work_and_calendars_of_their_own(walls):
    from datetime import date

    from hasten.crew_project import calendar_days, crew_notes
    from hasten.project import Calendar

    p = read_project(walls)
    six = Calendar((0, 1, 2, 3, 4, 5), (), "six-day")
    a = replace(p.activity("A"), calendar="six-day")
    on_six = replace(p, calendars=(six,), activities=tuple(a if x.id == "A" else x for x in p.activities))
    assert (calendar_days(on_six, a), calendar_days(p, p.activity("A"))) == (6, 5)
    built = crew_options(on_six, "6x10")
    # 20 days worked at six a week on a six-day calendar: 3 x 6 + 2 = 20 working days (the
    # Saturdays count); normal working, 20 days at five a week: 3 x 6 + 5 = 23 working days
    # (project_days, checked against numpy business days in test_crew_options.py)
    assert (built.results[0].options[0].duration, built.results[0].normal.duration) == (20, 23)
    assert any("its duration (20 working days) is not what its labour data gives at normal "
               "working (23)" in n for n in crew_notes(built))
    # work already started is not priced: the optimiser offers options to work not started
    started = replace(p, data_date=date(2027, 3, 15), activities=tuple(
        replace(x, actual_start=date(2027, 3, 8)) if x.id == "A" else x for x in p.activities))
    built = crew_options(started, "6x10")
    assert built.results == () and built.passed[0][0] == "A"
    assert "A: not priced, work has started" in " ".join(crew_notes(built))
