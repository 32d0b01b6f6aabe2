"""Crew data, labour rules and the list of measures: defaults with their sources, and the
errors a user sees for bad input (column, value and fix; file and row passed through)."""

from __future__ import annotations

import ast
from pathlib import Path

import pytest

from hasten.errors import InputError
from hasten.labour import CrewData, LabourRules, Measure, PremiumRules, parse_measures, wage_of

SRC = Path(__file__).resolve().parents[1] / "src" / "hasten"
EDGE = {"cli", "formats", "render", "charts", "typer", "tabulate", "pandas", "openpyxl",
        "matplotlib", "pulp", "highspy"}


def test_labour_modules_are_core():
    # DEVELOPERS.md layering: the core never imports the CLI, formats, printing or solvers
    for name in ("labour", "productivity", "premium", "crew_options"):
        tree = ast.parse((SRC / f"{name}.py").read_text(encoding="utf-8"))
        found = set()
        for node in ast.walk(tree):
            if isinstance(node, ast.Import):
                found |= {a.name.split(".")[0] for a in node.names}
            elif isinstance(node, ast.ImportFrom) and node.module:
                parts = node.module.split(".")
                found.add(parts[1] if parts[0] == "hasten" and len(parts) > 1 else parts[0])
        assert not found & EDGE, f"{name}.py imports {sorted(found & EDGE)}"


def test_default_premium_rules_and_their_sources():
    rules = PremiumRules()
    # FLSA / CWHSSA: 1.5x over 40 hours a week (trade-facts 2.5, READ)
    assert (rules.overtime_after_week, rules.overtime_rate) == (40, 1.5)
    # the daily-8 rule exists (CA, AK, NV, some agreements) but is off by default
    assert rules.overtime_after_day is None
    # collective-agreement example: Saturday 1.5x, Sunday 2x (trade-facts 2.5, READ)
    assert (rules.saturday_rate, rules.sunday_rate) == (1.5, 2.0)
    # cement masons' agreement: double time the maximum, no pyramiding, 8 paid for 7.5
    assert (rules.cap, rules.pyramiding) == (2.0, False)
    assert (rules.shift_paid_hours, rules.shift_worked_hours) == (8.0, 7.5)
    labour = LabourRules()
    assert (labour.normal_days, labour.normal_hours, labour.normal_week_hours) == (5, 8.0, 40.0)
    assert labour.table == "clark-lorenzoni" and labour.crowding == "average"


def _error(make) -> InputError:
    with pytest.raises(InputError) as err:
        make()
    assert err.value.fix, "every error says how to fix it"
    return err.value


def test_negative_hours_are_refused_with_file_and_row():
    err = _error(lambda: CrewData(labour_hours=-5, crew_size=4, file="activities.csv", row=7))
    assert (err.column, err.value, err.file, err.row) == ("labour_hours", -5, "activities.csv", 7)
    assert str(err).startswith("activities.csv, row 7, column 'labour_hours'")


def test_zero_crew_is_refused():
    err = _error(lambda: CrewData(labour_hours=100, crew_size=0))
    assert (err.column, err.value) == ("crew_size", 0)
    err = _error(lambda: CrewData(labour_hours=100, crew_size=3, max_crews=0))
    assert err.column == "max_crews"


@pytest.mark.parametrize("values, column", [
    ({"wage": 0}, "wage"),
    ({"equipment_per_day": -1}, "equipment_per_day"),
    ({"min_duration": 2.5}, "min_duration"),
    ({"labour_hours": float("nan")}, "labour_hours"),
])
def test_other_bad_crew_values(values, column):
    base = {"labour_hours": 100, "crew_size": 3}
    assert _error(lambda: CrewData(**(base | values))).column == column


def test_more_than_24_hours_a_day_is_refused():
    assert _error(lambda: LabourRules(normal_hours=25)).column == "labour.normal_hours"
    err = _error(lambda: LabourRules(normal_hours=10, premium=PremiumRules(shift_worked_hours=15,
                                                                          shift_paid_hours=16)))
    assert err.column == "labour.shift_worked_hours" and "24" in err.problem
    err = _error(lambda: parse_measures("5x10,6x25", file="project.toml"))
    assert (err.column, err.value, err.file) == ("schedules", "6x25", "project.toml")


def test_more_than_7_days_a_week_is_refused():
    assert _error(lambda: LabourRules(normal_days=8)).value == 8
    assert _error(lambda: parse_measures("8x8")).value == "8x8"


def test_unknown_table_name_is_refused():
    err = _error(lambda: LabourRules(table="brt", file="project.toml"))
    assert (err.column, err.value, err.file) == ("labour.table", "brt", "project.toml")
    assert "clark-lorenzoni" in err.fix


@pytest.mark.parametrize("rules, column", [
    (lambda: PremiumRules(overtime_rate=0.5), "labour.overtime_rate"),
    (lambda: PremiumRules(overtime_after_week=0), "labour.overtime_after_week"),
    (lambda: PremiumRules(overtime_after_day=30), "labour.overtime_after_day"),
    (lambda: PremiumRules(shift_paid_hours=7), "labour.shift_paid_hours"),
    (lambda: PremiumRules(shift_premium_percent=-1), "labour.shift_premium_percent"),
    (lambda: LabourRules(crowding="heavy"), "labour.crowding"),
    (lambda: LabourRules(crowding_loss=1.0), "labour.crowding_loss"),
    (lambda: LabourRules(wages={"carpentry": 0}), "labour.wages.carpentry"),
])
def test_bad_rules(rules, column):
    assert _error(rules).column == column


def test_measures_are_parsed_in_order():
    measures = parse_measures(" 5x10, 6X10 ,6x12,2-shifts,+1-crew,+2-crews, 5x9.5")
    assert [m.text for m in measures] == ["5x10", "6x10", "6x12", "2-shifts", "+1-crew",
                                          "+2-crews", "5x9.5"]
    assert measures[1] == Measure("6x10", "overtime", days=6, hours=10)
    assert measures[3].kind == "shifts" and measures[3].crews == 2
    assert measures[5].kind == "crews" and measures[5].crews == 3


@pytest.mark.parametrize("text, value", [
    ("", ""), ("5x10,,6x10", "5x10,,6x10"), ("overtime", "overtime"), ("3-shifts", "3-shifts"),
    ("+0-crew", "+0-crew"), ("6x10,6x10", "6x10"), ("5x0", "5x0"),
])
def test_bad_measures(text, value):
    err = _error(lambda: parse_measures(text, column="--crews"))
    assert (err.column, err.value) == ("--crews", value)


def test_wage_from_the_crew_or_the_trade():
    rules = LabourRules(wages={"carpentry": 42.5})
    assert wage_of(CrewData(100, 4, wage=50, trade="carpentry"), rules) == 50
    assert wage_of(CrewData(100, 4, trade="carpentry"), rules) == 42.5
    err = _error(lambda: wage_of(CrewData(100, 4, trade="masonry", row=3), rules))
    assert (err.column, err.row) == ("wage", 3) and "carpentry" in err.fix
