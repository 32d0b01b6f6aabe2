"""Reading honest numbers: cells whose meaning changes with spreadsheet formatting are read
correctly when that is unambiguous, refused with the fix otherwise, and a likely slip that
still reads as a valid value gets a reading note (read_project_with_notes).

All projects here are invented for these format checks. Spreadsheet facts used: a cell
formatted as a percentage stores 60 % as the number 0.6 and shows it with a '%' in its
number format (ECMA-376 Part 1, 18.8.30 numFmt, from memory); dates are stored as day
serial numbers, day 1 = 1900-01-01 in the 1900 date system, whose serial 45722 is
2025-03-06 (serials count from 1899-12-30 for dates after February 1900, from memory;
checked here by hand: 2025-03-06 - 1899-12-30 = 45,722 days); the 1904 date system counts
from 1904-01-01 instead, which makes a bare serial number ambiguous.
"""

from __future__ import annotations

from datetime import date, datetime
from pathlib import Path

import openpyxl
import pytest

from hasten.errors import InputError
from hasten.formats import read_project, read_project_with_notes, write_project

YARD = Path(__file__).parent / "data" / "formats" / "yard"


def shed(folder: Path, activities: str, settings: str = "") -> Path:
    folder.mkdir(parents=True, exist_ok=True)
    (folder / "project.toml").write_text('name = "Shed"\nstart = 2025-03-03\n' + settings,
                                         encoding="utf-8")
    (folder / "activities.csv").write_text(activities, encoding="utf-8")
    return folder


STATUS = "[status]\ndata_date = 2025-03-17\n"
STARTED = "id,duration,actual_start,percent_complete\n"


def refused(path: Path) -> InputError:
    with pytest.raises(InputError) as caught:
        read_project(path)
    assert "Fix: " in str(caught.value)
    return caught.value


# ---------------------------------------------------------------- C1 percentages

def test_a_percentage_cell_in_a_workbook_means_its_percent(tmp_path):
    write_project(read_project(shed(tmp_path / "f", STARTED + "A,10,2025-03-03,60\n", STATUS)),
                  tmp_path / "p.xlsx")
    book = openpyxl.load_workbook(tmp_path / "p.xlsx")
    sheet = book["activities"]
    column = [c.value for c in sheet[1]].index("percent_complete") + 1
    cell = sheet.cell(2, column)
    assert cell.value == 60
    cell.value, cell.number_format = 0.6, "0%"  # shown as 60% in a spreadsheet
    book.save(tmp_path / "p.xlsx")
    assert read_project(tmp_path / "p.xlsx").activities[0].percent_complete == 60
    cell.value, cell.number_format = 0.625, "0.0%"
    book.save(tmp_path / "p.xlsx")
    assert read_project(tmp_path / "p.xlsx").activities[0].percent_complete == 62.5


@pytest.mark.parametrize("text, percent", [("60%", 60), ("62.5 %", 62.5), ("0%", 0),
                                           ("100%", 100)])
def test_a_percent_sign_in_a_csv_cell_is_read(tmp_path, text, percent):
    project = read_project(shed(tmp_path, STARTED + f"A,10,2025-03-03,{text}\n", STATUS))
    assert project.activities[0].percent_complete == percent


def test_a_percentage_in_another_column_is_refused(tmp_path):
    error = refused(shed(tmp_path, "id,duration,cost\nA,10,60%\n"))
    assert error.column == "cost" and "percent" in error.problem


def test_percentages_all_between_0_and_1_get_a_note(tmp_path):
    folder = shed(tmp_path, STARTED + "A,10,2025-03-03,0.6\nB,10,2025-03-10,0.25\nC,4,,\n",
                  STATUS)
    project, notes = read_project_with_notes(folder)
    assert project.activities[0].percent_complete == 0.6  # read as written: 0.6 percent
    assert len(notes) == 1
    note = notes[0]
    assert "activities.csv" in note and "percent_complete" in note
    assert "between 0 and 1" in note and "0.6 % complete" in note and "write 60" in note
    assert read_project(folder) == project  # read_project still gives the project only


@pytest.mark.parametrize("values", [("0", "0"), ("0.6", "40"), ("60%", "0.5")])
def test_no_note_when_the_percentages_are_plainly_percent(tmp_path, values):
    rows = "".join(f"{x},10,2025-03-03,{v}\n" for x, v in zip("AB", values))
    assert read_project_with_notes(shed(tmp_path, STARTED + rows, STATUS))[1] == ()


def test_read_project_with_notes_of_a_plain_project_has_none():
    project, notes = read_project_with_notes(YARD)
    assert project == read_project(YARD) and notes == ()


# ---------------------------------------------------------------- C3 spreadsheet forms

@pytest.mark.parametrize("column, text, says, fix", [
    ("cost", "$1,200", "currency", "1200"),
    ("cost", "1.200,50 EUR", "currency", "1200.50"),
    ("cost", "EUR 400", "currency", "400"),
    ("cost", "1.200,50", "dot as thousands separator and a decimal comma", "1200.50"),
    ("cost", "1 200", "thousands separator", "1200"),
    ("cost", "1\u00a0200", "thousands separator", "1200"),
    ("cost", "1'200", "thousands separator", "1200"),
    ("cost", "(500)", "brackets", "-500"),
    ("cost", "\u2212500", "minus sign", "-500"),
    ("duration", "5d", "unit", "write 5"),
    ("duration", "5 days", "unit", "write 5"),
    ("duration", "2w", "weeks", "working days"),
    ("duration", "3 wks", "weeks", "working days"),
    ("duration", "1900-01-05", "a date stands where a number belongs", "5"),
])
def test_decorated_numbers_are_refused_with_the_plain_number(tmp_path, column, text, says, fix):
    cells = {"duration": "10", "cost": "100"} | {column: text}
    row = f'A,"{cells["duration"]}","{cells["cost"]}"'
    error = refused(shed(tmp_path, f"id,duration,cost\n{row}\n"))
    assert error.column == column and error.value == text
    assert says in error.problem and fix in error.fix, str(error)


@pytest.mark.parametrize("text, says, fix", [
    ("45722", "date serial number", "2025-03-06"),
    ("2025/03/06", "not a date written YYYY-MM-DD", "write 2025-03-06"),
    ("2025-3-6", "not a date written YYYY-MM-DD", "write 2025-03-06"),
    ("13/03/2025", "not a date written YYYY-MM-DD", "write 2025-03-13"),
    ("06/03/2025", "the order of day and month", "2025-03-06 or 2025-06-03"),
    ("2025-03-06 08:30", "a time of day", "write 2025-03-06"),
])
def test_dates_in_other_forms_are_refused_with_the_iso_date(tmp_path, text, says, fix):
    error = refused(shed(tmp_path, f"id,duration,not_before\nA,10,{text}\n"))
    assert error.column == "not_before" and error.value == text
    assert says in error.problem and fix in error.fix, str(error)


@pytest.mark.parametrize("text", ["2025-03-06 00:00:00", "2025-03-06T00:00:00", "2025-03-06T00:00"])
def test_a_date_at_midnight_is_the_date(tmp_path, text):
    project = read_project(shed(tmp_path, f"id,duration,not_before\nA,10,{text}\n"))
    assert project.activities[0].not_before == date(2025, 3, 6)


def test_a_date_serial_in_a_workbook_number_cell_is_refused(tmp_path):
    write_project(read_project(shed(tmp_path / "f", "id,duration,not_before\nA,10,2025-03-06\n")),
                  tmp_path / "p.xlsx")
    book = openpyxl.load_workbook(tmp_path / "p.xlsx")
    sheet = book["activities"]
    column = [c.value for c in sheet[1]].index("not_before") + 1
    sheet.cell(2, column).value = 45722  # the date lost its date format
    book.save(tmp_path / "p.xlsx")
    error = refused(tmp_path / "p.xlsx")
    assert "date serial number" in error.problem and "2025-03-06" in error.fix
    sheet.cell(2, column).value = datetime(2025, 3, 6)  # a real date cell is fine
    book.save(tmp_path / "p.xlsx")
    assert read_project(tmp_path / "p.xlsx").activities[0].not_before == date(2025, 3, 6)


# ---------------------------------------------------------------- any text: a value or an error

from hypothesis import given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402

from hasten.formats.cells import CellRef, date_value, number_value, whole_value  # noqa: E402

CELL_TEXT = (st.text(st.sampled_from("0123456789.,'() -+$€%/:Tdw\u2212\u00a0EUR"), max_size=14)
             | st.text(max_size=8))


@settings(max_examples=400, deadline=None)
@given(CELL_TEXT)
def test_any_cell_text_is_a_value_or_an_input_error(text):
    where = CellRef("activities.csv", 2, "cost")
    for read in (lambda t: number_value(t, where, minimum=None),
                 lambda t: whole_value(t, where, minimum=None), lambda t: date_value(t, where)):
        try:
            read(text)
        except InputError as error:
            assert error.fix and error.file == "activities.csv"
