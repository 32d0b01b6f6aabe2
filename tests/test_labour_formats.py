"""The reader of a user productivity table (``--productivity FILE.csv``): what it accepts and
the errors it gives (file, row, column, value, fix). The sample file's figures are published
ones (tests/data/labour/README.md)."""

from __future__ import annotations

from fractions import Fraction

import pytest

from hasten.crew_options import build_options
from hasten.errors import InputError
from hasten.formats.productivity import parse_productivity, read_productivity
from hasten.labour import CrewData, LabourRules
from hasten.productivity import schedule_losses, table_citation

from conftest import DATA

SAMPLE = DATA / "labour" / "user_table.csv"


def test_the_sample_table():
    table = read_productivity(SAMPLE)
    # Clark & Lorenzoni 6x10 = 0.17, flat; Elsevier 2019 Table 9, 50 h weeks 1-3
    assert table.losses == {"6x10": (Fraction("0.17"),),
                            "50h": (Fraction("0.05"), Fraction("0.07"), Fraction("0.08"))}
    assert schedule_losses(table, 5, 10) == (table.losses["50h"], "50h")
    line = table_citation(table)
    assert str(SAMPLE) in line and "Clark & Lorenzoni 1985" in line and "Table 9" in line


def test_the_users_table_replaces_the_built_in_one():
    table = read_productivity(SAMPLE)
    built = build_options("A", CrewData(320, 2, wage=40), LabourRules(), "6x10", table, 5)
    assert f"file {SAMPLE} 6x10" in built.options[0].note


def test_bom_windows_line_ends_any_case_and_blank_rows():
    text = "\ufeffSchedule,LOSS\r\n\r\n 6 x 10 ,0.17\r\n5x9.5,0.05\r\n"
    table = parse_productivity(text.lstrip("\ufeff"), "mine.csv")
    assert set(table.losses) == {"6x10", "5x9.5"}


def test_bom_through_the_file(tmp_path):
    path = tmp_path / "loss.csv"
    path.write_bytes("\ufeffschedule,loss\r\n60h,0.12\r\n".encode("utf-8"))
    assert read_productivity(path).losses == {"60h": (Fraction("0.12"),)}


def _error(text: str) -> InputError:
    with pytest.raises(InputError) as err:
        parse_productivity(text, "loss.csv")
    assert err.value.file == "loss.csv" and err.value.fix
    return err.value


@pytest.mark.parametrize("text, row, column, value", [
    ("schedule,loss\n6x10,1\n", 2, "loss", "1"),
    ("schedule,loss\n6x10,-0.1\n", 2, "loss", "-0.1"),
    ("schedule,loss\n6x10,17%\n", 2, "loss", "17%"),
    ("schedule,loss\n6x10,\n", 2, "loss", ""),
    ("schedule,loss\n6x10,abc\n", 2, "loss", "abc"),
    ("schedule,loss\n8x10,0.1\n", 2, "schedule", "8x10"),
    ("schedule,loss\n6x25,0.1\n", 2, "schedule", "6x25"),
    ("schedule,loss\nlong days,0.1\n", 2, "schedule", "long days"),
    ("schedule,loss\n200h,0.1\n", 2, "schedule", "200h"),
    ("schedule,week,loss\n60h,0,0.1\n", 2, "week", "0"),
    ("schedule,week,loss\n60h,1.5,0.1\n", 2, "week", "1.5"),
    ("schedule,week,loss\n60h,1,0.1\n60h,3,0.2\n", 3, "week", 3),
    ("schedule,week,loss\n60h,1,0.1\n60h,1,0.2\n", 3, "week", 1),
    ("schedule,week,loss\n60h,1,0.1\n60h,,0.2\n", 3, "week", ""),
    ("schedule,loss\n6x10,0.1\n6x10,0.2\n", 3, "schedule", "6x10"),
    ("schedule,losses\n6x10,0.1\n", 1, "losses", "losses"),
    ("schedule,week\n6x10,1\n", 1, "loss", None),
    ("schedule,loss\n6x10,0.1,extra\n", 2, "#3", "extra"),
])
def test_errors_name_file_row_column_and_value(text, row, column, value):
    err = _error(text)
    assert (err.row, err.column, err.value) == (row, column, value)


def test_suggestions_and_advice():
    assert "17% as 0.17" in _error("schedule,loss\n6x10,17%\n").fix
    assert "17% is 0.17" in _error("schedule,loss\n6x10,17\n").fix
    assert "did you mean 'loss'" in _error("schedule,losses\n6x10,0.1\n").fix


def test_an_empty_table_is_refused():
    assert "no rows" in str(_error("schedule,loss\n"))
    assert "no rows" in str(_error(""))


def test_a_missing_file_is_an_input_error(tmp_path):
    with pytest.raises(InputError) as err:
        read_productivity(tmp_path / "none.csv")
    assert err.value.file == str(tmp_path / "none.csv")
