"""Labour input in all three forms: the activity columns ``labour_hours``, ``crew_size``,
``wage``, ``max_crews``, ``equipment_per_day``, ``min_duration`` and the ``[labour]``
settings; read as written, converted without loss (folder -> xlsx -> json -> folder, also
through the ``convert`` command), and bad input refused naming file, row, column, value and
the fix. The project below is typed by hand here; the expected objects are the same values
typed again, so each check is "what was written is what was read"."""

from __future__ import annotations

import json
from dataclasses import replace
from datetime import date
from pathlib import Path

import openpyxl
import pytest
from typer.testing import CliRunner

from hasten.cli import app
from hasten.errors import InputError
from hasten.formats import read_project, write_project
from hasten.labour import CrewData, LabourRules, PremiumRules
from hasten.project import Activity, CrashStep, Link, Option, Project

TOML = """name = "Pump house (test)"
start = 2027-03-01
currency = "USD"

[labour]
normal_hours = 8
overtime_after_day = 8
saturday_rate = "none"
pyramiding = true
shift_premium_percent = 10
table = "plant-estimating-2019"
crowding = "severe"

[labour.wages]
concrete = 46.5
"steel fixing" = 50
"""
CSV = """id,name,trade,duration,crash_duration,cost,crash_cost,predecessors,labour_hours,crew_size,wage,max_crews,equipment_per_day,min_duration
A,Base slab,concrete,10,,1000,,,320,4,,2,150,
B,Rebar cages,steel fixing,5,4,800,900,A,160,4,44.25,,,4
C,Curing,,7,,0,,B,,,,,,7
D,Handover,,0,,0,,C,,,,,,
"""
RULES = LabourRules(
    normal_hours=8.0,
    premium=PremiumRules(overtime_after_day=8.0, saturday_rate=None, pyramiding=True,
                         shift_premium_percent=10.0),
    wages={"concrete": 46.5, "steel fixing": 50.0}, table="plant-estimating-2019",
    crowding="severe")
PROJECT = Project(
    name="Pump house (test)", start=date(2027, 3, 1), currency="USD", labour=RULES,
    activities=(
        Activity("A", 10, name="Base slab", trade="concrete", cost=1000.0,
                 crew=CrewData(320.0, 4, None, 2, 150.0, trade="concrete")),
        Activity("B", 5, name="Rebar cages", trade="steel fixing", crash_duration=4, cost=800.0,
                 crash_cost=900.0, min_duration=4,
                 crew=CrewData(160.0, 4, 44.25, 1, 0.0, trade="steel fixing")),
        Activity("C", 7, name="Curing", min_duration=7),
        Activity("D", 0, name="Handover")),
    links=(Link("A", "B"), Link("B", "C"), Link("C", "D")))


@pytest.fixture
def folder(tmp_path: Path) -> Path:
    path = tmp_path / "pump"
    path.mkdir()
    (path / "project.toml").write_text(TOML, encoding="utf-8")
    (path / "activities.csv").write_text(CSV, encoding="utf-8")
    return path


def test_read_as_written(folder):
    assert read_project(folder) == PROJECT
    crew = read_project(folder).activities[1].crew
    assert (crew.file, crew.row) == (str(folder / "activities.csv"), 3)  # kept for messages


def test_round_trip_folder_xlsx_json_folder(folder, tmp_path):
    current = read_project(folder)
    for name in ("p.xlsx", "p.json", "again"):
        write_project(current, tmp_path / name)
        current = read_project(tmp_path / name)
        assert current == PROJECT, name


def test_round_trip_through_the_convert_command(folder, tmp_path):
    runner = CliRunner()
    source = folder
    for name in ("c.xlsx", "c.json", "back"):
        out = runner.invoke(app, ["convert", str(source), str(tmp_path / name)])
        assert out.exit_code == 0, out.output
        assert read_project(tmp_path / name) == PROJECT, name
        source = tmp_path / name


def test_defaults_and_no_labour_section_round_trip(tmp_path):
    plain = replace(PROJECT, labour=None)
    defaults = replace(PROJECT, labour=LabourRules())
    for project, name in ((plain, "plain"), (defaults, "defaults")):
        for form in ("x.xlsx", "x.json", "f"):
            target = tmp_path / name / form
            target.parent.mkdir(exist_ok=True)
            write_project(project, target)
            assert read_project(target) == project, (name, form)
    assert "[labour]" not in (tmp_path / "plain" / "f" / "project.toml").read_text(encoding="utf-8")


def test_written_layouts(tmp_path):
    write_project(PROJECT, tmp_path / "f")
    toml = (tmp_path / "f" / "project.toml").read_text(encoding="utf-8")
    # every key is written, None as "none", so the rules in force can be checked
    assert ('\n[labour]\nnormal_days = 5\nnormal_hours = 8\novertime_after_week = 40\n'
            'overtime_after_day = 8\novertime_rate = 1.5\nsaturday_rate = "none"\n') in toml
    assert 'crowding_loss = "none"\n\n[labour.wages]\nconcrete = 46.5\n"steel fixing" = 50\n' in toml
    lines = (tmp_path / "f" / "activities.csv").read_text(encoding="utf-8").splitlines()
    assert lines[0].endswith(",predecessors,labour_hours,crew_size,wage,max_crews,"
                             "equipment_per_day,min_duration")
    assert lines[1].endswith(",320,4,,2,150,") and lines[2].endswith(",160,4,44.25,1,0,4")
    assert lines[3].endswith(",,,,,,7")

    write_project(PROJECT, tmp_path / "p.json")
    data = json.loads((tmp_path / "p.json").read_text(encoding="utf-8"))
    assert data["project"]["labour"]["wages"] == {"concrete": 46.5, "steel fixing": 50}
    assert data["project"]["labour"]["pyramiding"] is True
    assert data["activities"][0]["labour_hours"] == 320 and data["activities"][0]["wage"] is None

    write_project(PROJECT, tmp_path / "p.xlsx")
    rows = dict(openpyxl.load_workbook(tmp_path / "p.xlsx")["project"].iter_rows(min_row=2, values_only=True))
    assert rows["labour.normal_hours"] == 8 and rows["labour.wages.steel fixing"] == 50
    assert rows["labour.pyramiding"] is True and rows["labour.saturday_rate"] == "none"


def test_only_the_labour_columns_in_use_are_written(tmp_path):
    minimum_only = replace(PROJECT, activities=(Activity("A", 7, min_duration=5),), links=())
    write_project(minimum_only, tmp_path / "f")
    header = (tmp_path / "f" / "activities.csv").read_text(encoding="utf-8").splitlines()[0]
    assert header.endswith(",predecessors,min_duration")


def test_workbook_and_json_typed_by_hand(tmp_path):
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.title = "project"
    for row in (("key", "value"), ("name", "W"), ("start", "2027-03-01"),
                ("labour.normal_hours", 9), ("labour.pyramiding", "false"),
                ("labour.overtime_after_week", "none"), ("labour.wages.masonry", 41)):
        sheet.append(row)
    acts = book.create_sheet("activities")
    acts.append(("id", "trade", "duration", "labour_hours", "crew_size"))
    acts.append(("W1", "masonry", 10, 360, 4))
    book.save(tmp_path / "w.xlsx")
    project = read_project(tmp_path / "w.xlsx")
    assert project.labour == LabourRules(normal_hours=9.0, premium=PremiumRules(overtime_after_week=None),
                                         wages={"masonry": 41.0})
    assert project.activities[0].crew == CrewData(360.0, 4, trade="masonry")

    data = {"project": {"name": "W", "start": "2027-03-01",
                        "labour": {"normal_days": 6, "wages": {"masonry": 41}}},
            "activities": [{"id": "W1", "trade": "masonry", "duration": 10, "labour_hours": 360,
                            "crew_size": 4, "min_duration": 3}]}
    (tmp_path / "w.json").write_text(json.dumps(data), encoding="utf-8")
    project = read_project(tmp_path / "w.json")
    assert project.labour == LabourRules(normal_days=6, wages={"masonry": 41.0})
    assert project.activities[0].min_duration == 3


# ------------------------------------------------------------------------- bad input

def _error(path: Path) -> InputError:
    with pytest.raises(InputError) as caught:
        read_project(path)
    error = caught.value
    assert error.fix and "Fix: " in str(error) and "\n" not in str(error)
    return error


def _edit(path: Path, old: str, new: str) -> None:
    text = path.read_text(encoding="utf-8")
    assert text.count(old) == 1, old
    path.write_text(text.replace(old, new), encoding="utf-8")


@pytest.mark.parametrize("old, new, row, column, value, says", [
    (",320,4,,2,150,", ",-320,4,,2,150,", 2, "labour_hours", "-320", "must not be negative"),
    (",320,4,,2,150,", ",320,0,,2,150,", 2, "crew_size", "0", "at least 1"),
    (",320,4,,2,150,", ",320,,,2,150,", 2, "crew_size", "", "empty"),
    (",320,4,,2,150,", ",320,4,,0,150,", 2, "max_crews", "0", "at least 1"),
    (",320,4,,2,150,", ",320,4,0,2,150,", 2, "wage", 0.0, "more than 0"),
    (",320,4,,2,150,", ",320,4,,2,-1,", 2, "equipment_per_day", "-1", "must not be negative"),
    (",320,4,,2,150,", ",320,4.5,,2,150,", 2, "crew_size", "4.5", "not a whole number"),
    (",320,4,,2,150,", ",,4,,2,150,", 2, "crew_size", "4", "without labour hours"),
    (",,,,,,7", ",,,,,,8", 4, "min_duration", "8", "longer than the duration"),
    ("5,4,800,900,A,160,4,44.25,,,4", "5,3,800,900,A,160,4,44.25,,,4", 3, "crash_duration", "3",
     "below the physical minimum"),
    ("D,Handover,,0,,0,,C,,,,,,", "D,Handover,,0,,0,,C,8,2,,,,", 5, "labour_hours", "8", "milestone"),
])
def test_bad_activity_cells(folder, old, new, row, column, value, says):
    _edit(folder / "activities.csv", old, new)
    error = _error(folder)
    assert (error.file, error.row, error.column, error.value) == \
        (str(folder / "activities.csv"), row, column, value)
    assert says in error.problem


@pytest.mark.parametrize("old, new, column, value, says", [
    ("normal_hours = 8", "normal_hours = 25", "labour.normal_hours", 25, "at most 24"),
    ("normal_hours = 8", "normal_hours = 8\nshift_worked_hours = 17\nshift_paid_hours = 17",
     "labour.shift_worked_hours", 17, "more than 24 hours"),
    ('table = "plant-estimating-2019"', 'table = "my-table"', "labour.table", "my-table",
     "unknown productivity table"),
    ('crowding = "severe"', 'crowding = "heavy"', "labour.crowding", "heavy", "unknown crowding"),
    ("pyramiding = true", 'pyramiding = "yes"', "labour.pyramiding", "yes", "true or false"),
    ('saturday_rate = "none"', 'saturday_rate = "nil"', "labour.saturday_rate", "nil", "or 'none'"),
    ("concrete = 46.5", "concrete = -46.5", "labour.wages.concrete", -46.5, "more than 0"),
    ("normal_hours = 8", "normal_hour = 8", "labour.normal_hour", "labour.normal_hour", "unknown key"),
    ('"steel fixing" = 50', '"steel.fixing" = 50', "labour.wages.steel.fixing",
     "labour.wages.steel.fixing", "without '.'"),
    ("[labour.wages]", "[labour.wage]", "labour.wage", "labour.wage", "unknown key"),
])
def test_bad_labour_settings(folder, old, new, column, value, says):
    _edit(folder / "project.toml", old, new)
    error = _error(folder)
    assert (error.file, error.column, error.value) == (str(folder / "project.toml"), column, value)
    assert says in error.problem


def test_close_keys_are_suggested(folder):
    _edit(folder / "project.toml", "normal_hours = 8", "normal_hour = 8")
    assert "did you mean 'labour.normal_hours'" in _error(folder).fix
    _edit(folder / "project.toml", "normal_hour = 8", "normal_hours = 8")
    _edit(folder / "project.toml", "[labour.wages]", "[labour.wage]")
    assert "did you mean 'labour.wages'" in _error(folder).fix


def test_workbook_errors_name_the_row(folder, tmp_path):
    write_project(read_project(folder), tmp_path / "p.xlsx")
    book = openpyxl.load_workbook(tmp_path / "p.xlsx")
    sheet = book["project"]
    row = next(r for r in range(1, sheet.max_row + 1) if sheet.cell(r, 1).value == "labour.normal_hours")
    sheet.cell(row, 2).value = 30
    book["activities"]["J2"].value = 0  # crew_size of A (column J)
    book.save(tmp_path / "p.xlsx")
    error = _error(tmp_path / "p.xlsx")
    assert (error.row, error.column, error.value) == (row, "labour.normal_hours", 30.0)
    assert "(sheet project)" in error.file
    sheet.cell(row, 2).value = 8
    book.save(tmp_path / "p.xlsx")
    error = _error(tmp_path / "p.xlsx")
    assert (error.row, error.column, error.value) == (2, "crew_size", "0")
    assert "(sheet activities)" in error.file


def test_json_errors_name_the_position(folder, tmp_path):
    write_project(read_project(folder), tmp_path / "p.json")
    data = json.loads((tmp_path / "p.json").read_text(encoding="utf-8"))
    data["activities"][1]["labour_hours"] = -1
    (tmp_path / "p.json").write_text(json.dumps(data), encoding="utf-8")
    error = _error(tmp_path / "p.json")
    assert (error.row, error.column, error.value) == (2, "labour_hours", "-1")
    data["activities"][1]["labour_hours"] = 160
    data["project"]["labour"]["wages"] = 40
    (tmp_path / "p.json").write_text(json.dumps(data), encoding="utf-8")
    assert "wages must be a section" in _error(tmp_path / "p.json").problem


def test_options_and_steps_below_the_physical_minimum(folder):
    (folder / "options.csv").write_text("id,option,duration,added_cost\nB,precast,3,500\n",
                                        encoding="utf-8")
    error = _error(folder)
    assert (error.file, error.row, error.column) == (str(folder / "options.csv"), 2, "duration")
    assert "physical minimum" in error.problem and "row 3" in error.problem
    (folder / "options.csv").write_text(
        "id,option,duration,added_cost,crash_duration,cost_per_day\nB,precast,5,500,3,100\n",
        encoding="utf-8")
    assert _error(folder).column == "crash_duration"
    (folder / "options.csv").unlink()
    _edit(folder / "activities.csv", "5,4,800,900,A", "5,,800,,A")
    (folder / "crash_steps.csv").write_text("id,days,cost_per_day\nB,1,100\nB,1,200\n",
                                            encoding="utf-8")
    error = _error(folder)
    assert (error.file, error.row, error.column) == (str(folder / "crash_steps.csv"), 3, "days")
    assert "below its physical minimum" in error.problem


def test_a_project_built_in_code_with_bad_labour_data_is_not_written(tmp_path):
    # the crew's own min_duration is not a column: the activity's min_duration is written
    odd = replace(PROJECT, activities=(Activity("A", 10, crew=CrewData(320, 4, wage=40, min_duration=3)),),
                  links=())
    with pytest.raises(InputError) as caught:
        write_project(odd, tmp_path / "odd")
    assert "cannot be saved without loss" in str(caught.value)
    assert not (tmp_path / "odd").exists()


def test_steps_and_options_built_in_code_are_cut_at_the_minimum():
    # hand calculation: steps 2 + 3 days from 10 with a minimum of 7 leave 3 days: 2 at 10,
    # then 1 of the 3 at 20; the linear crash 10 -> 5 at (600 - 100) / 5 = 100 a day stops at 7
    stepped = Activity("S", 10, steps=(CrashStep(2, 10.0), CrashStep(3, 20.0)), min_duration=7)
    assert stepped.segments() == (CrashStep(2, 10.0), CrashStep(1, 20.0))
    assert (stepped.shortest_normal, stepped.shortest, stepped.max_shortening) == (7, 7, 3)
    linear = Activity("L", 10, crash_duration=5, cost=100.0, crash_cost=600.0, min_duration=7)
    assert linear.segments() == (CrashStep(3, 100.0),)
    option = Option("second crew", 8, 400.0, crash_duration=4, cost_per_day=50.0)
    assert Activity("O", 10, options=(option,), min_duration=6).shortest == 6
    # without a minimum nothing changes
    assert Activity("L", 10, crash_duration=5, cost=100.0, crash_cost=600.0).segments() == (CrashStep(5, 100.0),)


def test_the_optimiser_and_the_plan_check_keep_the_minimum():
    from hasten import plan
    from hasten.plan_check import PlanChecker
    from hasten.errors import InfeasibleTargetError, PlanCheckError
    from hasten.network import Network

    # A: 10 days, linear crash to 5 at (600 - 100) / 5 = 100 a day, physical minimum 7.
    # B: 6 days; option 'fast' 4 days for 300, itself shortened to 2 at 50 a day, minimum 3.
    # By hand: shortest finish 7 + 3 = 10 (not 5 + 2 = 7); at 10 the least cost is
    # A 3 days x 100 + 'fast' 300 + 1 day x 50 = 650.
    project = Project("minimum", date(2027, 3, 1), (
        Activity("A", 10, crash_duration=5, cost=100.0, crash_cost=600.0, min_duration=7),
        Activity("B", 6, options=(Option("fast", 4, 300.0, crash_duration=2, cost_per_day=50.0),),
                 min_duration=3)), (Link("A", "B"),))
    best = plan(project, 10)
    assert (best.finish, best.added_cost) == (10, 650)
    with pytest.raises(InfeasibleTargetError) as caught:
        plan(project, 9)
    assert caught.value.shortest == 10
    checker = PlanChecker(project)  # the independent check, from the project alone
    # claims as the plan would give them: finish, added cost (A: 100 a day; 'fast' 300 + 50 a day)
    with pytest.raises(PlanCheckError):
        checker.check([6, 4], choices=[-1, 0], claimed_finish=10, claimed_cost=700.0)  # A below its minimum
    with pytest.raises(PlanCheckError):
        checker.check([7, 2], choices=[-1, 0], claimed_finish=9, claimed_cost=700.0)  # 'fast' below B's minimum
    assert checker.check([7, 3], choices=[-1, 0], claimed_finish=10, claimed_cost=650.0).finish == 10
    # an option shorter than the minimum, built in code, is refused by name
    shorter = replace(project, activities=(project.activities[0], replace(
        project.activities[1], options=(Option("fast", 2, 300.0),))))
    with pytest.raises(InputError) as caught:
        Network(shorter)
    assert "'fast'" in str(caught.value) and "physical minimum of 3" in str(caught.value)
