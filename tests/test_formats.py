"""Tests of the file-format layer (hasten.formats): reading, writing, converting, validating.

All data here is invented for these tests (tests/data/formats/hall is a made-up project,
tests/data/formats/yard a made-up project with a progress update); these are format checks,
not reference checks of any schedule or cost result. Expected values below are written out
by hand from the data files, never computed by our code.
"""

from __future__ import annotations

import gc
import json
import os
import re
import shutil
import string
import subprocess
import sys
import tempfile
from dataclasses import replace
from datetime import date, datetime, timedelta
from decimal import Decimal
from pathlib import Path

import openpyxl
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from hasten.errors import CycleError, InputError
from hasten.formats import (convert, parse_predecessors, parse_tables, read_project,
                            write_project)
from hasten.formats.cells import WHOLE_LIMIT, CellRef, number_value, whole_value
from hasten.formats.tables import Settings, Table, Tables, table_from_grid
from hasten.project import (Activity, Calendar, Contract, Costs, CrashStep, Link, LinkType,
                          Option, Project)

DATA = Path(__file__).parent / "data" / "formats"
HALL = DATA / "hall"
FS, SS, FF, SF = LinkType.FS, LinkType.SS, LinkType.FF, LinkType.SF

# The hall project written out by hand from tests/data/formats/hall.
HALL_PROJECT = Project(
    name="Gemeindesaal Nord – refurbishment",
    start=date(2025, 3, 3),
    activities=(
        Activity("010", 3, "Baustelle einrichten", "General", None, 4500.0, None),
        Activity("020", 5, "Abbruch Innenwände", "Demolition", 3, 9000.0, 12600.0,
                 options=(Option("Fertigteile", 4, 0.0),)),
        Activity("030", 8, "Dachdämmung – Süd", "Roofing", None, 21000.0, None, options=(
            Option("zweite Kolonne", 6, 2500.0, "second crew, from the sister site"),
            Option("Samstagsschicht", 7, 1200.5, 'Zuschlag "Samstag"', 6, 900.0),
            Option("Nachtschicht", 6, 3000.0),  # dominated, but readers keep every option
        )),
        Activity("040", 6, "Électricité", "Electrical", 4, 14000.0, 17000.0,
                 options=(Option("kleinere Kolonne", 8, -1500.0, "slower; one electrician less"),)),
        Activity("050", 4, "Estrich", "Screed", 4, 7600.0, 7600.0),
        Activity("060", 5, "Malerarbeiten", "Painting", None, 6500.0, None,
                 (CrashStep(1, 400.0), CrashStep(1, 650.25))),
        Activity("070", 0, "Übergabe", "", None, 0.0, None),
    ),
    links=(
        Link("010", "020"),
        Link("020", "030", SS, 2),
        Link("020", "040"),
        Link("040", "050", FF, -1),
        Link("020", "050"),
        Link("050", "060", FS, 3),
        Link("060", "070"),
        Link("030", "070", FF, 0),
        Link("040", "070", SF, -1),
    ),
    calendar=Calendar((0, 1, 2, 3, 4, 5), (date(2025, 4, 18), date(2025, 5, 1)), "mon-sat"),
    currency="EUR",
    costs=Costs(850.5),
    contract=Contract(date(2025, 6, 27), 1500.0, 500.0, 10),
)


# ---------------------------------------------------------------- helpers

@pytest.fixture
def hall(tmp_path: Path) -> Path:
    """A private copy of the hall folder."""
    return Path(shutil.copytree(HALL, tmp_path / "hall"))


def snapshot(folder: Path) -> dict[str, tuple[bytes, int]]:
    """Bytes and modification time of every file under ``folder``."""
    return {str(p.relative_to(folder)): (p.read_bytes(), p.stat().st_mtime_ns)
            for p in sorted(folder.rglob("*")) if p.is_file()}


def edit(path: Path, old: str, new: str) -> None:
    text = path.read_text(encoding="utf-8")
    assert text.count(old) == 1, f"{old!r} must occur once in {path}"
    path.write_text(text.replace(old, new), encoding="utf-8")


def read_error(path: Path, kind: type[InputError] = InputError) -> InputError:
    """Read ``path`` expecting ``kind``; the input files must be left untouched."""
    root = path if path.is_dir() else path.parent
    before = snapshot(root)
    with pytest.raises(kind) as caught:
        read_project(path)
    assert snapshot(root) == before
    return caught.value


def check_error(error: InputError, *, file: str, row: int | None, column: str | None,
                value: str | None, says: str = "") -> None:
    """The message names file, row, column and value, and has a fix."""
    message = str(error)
    assert file in error.file and file in message, message
    assert error.row == row, message
    if row is not None:
        assert f"row {row}," in message or f"row {row}:" in message, message
    assert error.column == column, message
    if column is not None:
        assert f"column '{column}'" in message, message
    if value is not None:
        assert repr(value) in message, message
    assert "Fix: " in message and error.fix, message
    assert says in message, message


# ---------------------------------------------------------------- reading the sample

def test_hall_folder_reads_as_written_by_hand():
    assert read_project(HALL) == HALL_PROJECT


def test_round_trip_folder_xlsx_json_folder(tmp_path):
    project = read_project(HALL)
    write_project(project, tmp_path / "hall.xlsx")
    from_xlsx = read_project(tmp_path / "hall.xlsx")
    write_project(from_xlsx, tmp_path / "hall.json")
    from_json = read_project(tmp_path / "hall.json")
    write_project(from_json, tmp_path / "again")
    again = read_project(tmp_path / "again")
    assert from_xlsx == project
    assert from_json == project
    assert again == HALL_PROJECT


def test_convert_returns_and_writes_the_project(tmp_path):
    assert convert(HALL, tmp_path / "hall.json") == HALL_PROJECT
    assert read_project(tmp_path / "hall.json") == HALL_PROJECT


def test_bom_and_crlf_read_identical_to_plain(tmp_path, hall):
    edit(hall / "activities.csv", "010,Baustelle einrichten,", '010,"Baustelle\neinrichten",')
    folder = tmp_path / "bom"
    folder.mkdir()
    for source in hall.iterdir():
        text = source.read_text(encoding="utf-8").replace("\n", "\r\n")
        (folder / source.name).write_bytes(b"\xef\xbb\xbf" + text.encode("utf-8"))
    raw = (folder / "activities.csv").read_bytes()
    assert raw.startswith(b"\xef\xbb\xbf") and b'"Baustelle\r\neinrichten"' in raw
    plain = read_project(hall)
    assert plain.activities[0].name == "Baustelle\neinrichten"
    assert read_project(folder) == plain
    assert read_project(folder).activities[1:] == HALL_PROJECT.activities[1:]


def test_multiline_quoted_name_keeps_row_numbers_of_later_rows(hall):
    edit(hall / "activities.csv", "010,Baustelle einrichten,", '010,"Baustelle\neinrichten",')
    edit(hall / "activities.csv", "030,Dachdämmung – Süd,Roofing,8", "030,Dachdämmung – Süd,Roofing,x")
    # the quoted cell spans lines 2-3, so 030 is now on line 5
    check_error(read_error(hall), file="activities.csv", row=5, column="duration", value="x")


def test_unknown_sections_and_status_keys_are_refused(hall):
    text = (hall / "project.toml").read_text(encoding="utf-8")
    (hall / "project.toml").write_text(text + "\n[stauts]\ndata_date = 2025-04-01\n",
                                       encoding="utf-8")
    check_error(read_error(hall), file="project.toml", row=None, column="stauts",
                value="stauts", says="unknown key")
    # [status] is read now: a key other than data_date is a typo, not a reserved note
    (hall / "project.toml").write_text(text + '\n[status]\nnote = "weekly update"\n',
                                       encoding="utf-8")
    check_error(read_error(hall), file="project.toml", row=None, column="status.note",
                value="status.note", says="did you mean 'status.data_date'")


def test_minimal_project_uses_defaults(tmp_path):
    (tmp_path / "project.toml").write_text('name = "Shed"\nstart = 2025-01-06\n', encoding="utf-8")
    (tmp_path / "activities.csv").write_text("id,duration\nA,2\nB,0\n", encoding="utf-8")
    assert read_project(tmp_path) == Project(
        "Shed", date(2025, 1, 6), (Activity("A", 2), Activity("B", 0)))


# ---------------------------------------------------------------- predecessor shorthand

@pytest.mark.parametrize("text, expected", [
    ("", []),
    ("B", [("B", FS, 0)]),
    ("B; C:SS+2; D:FF-1", [("B", FS, 0), ("C", SS, 2), ("D", FF, -1)]),
    ("  b : sf + 3 ;; 010:fs ; ", [("b", SF, 3), ("010", FS, 0)]),
    ("X:FS-0", [("X", FS, 0)]),
])
def test_parse_predecessors(text, expected):
    assert parse_predecessors(text) == expected


@pytest.mark.parametrize("text, says", [
    ("A:SS+x", "lag"),
    ("A:XX", "unknown link type"),
    ("A:SS2", "cannot read"),
    ("A:FS+1.5", "lag"),
    (":SS", "no id"),
])
def test_parse_predecessors_refuses(text, says):
    with pytest.raises(InputError) as caught:
        parse_predecessors(text, file="acts.csv", row=7)
    check_error(caught.value, file="acts.csv", row=7, column="predecessors", value=None, says=says)


def test_link_text_reads_back():
    for link in (Link("A", "B"), Link("A", "B", SS), Link("A", "B", FF, -2), Link("A", "B", FS, 4)):
        assert parse_predecessors(link.text()) == [(link.pred, link.type, link.lag)]


# ---------------------------------------------------------------- bad input, one case each
# (file, old text, new text, row, column, value, words the message must contain)

BAD_FOLDER_CASES = {
    "duplicate id": ("activities.csv", "040,Électricité", "030,Électricité",
                     5, "id", "030", "rows 4 and 5"),
    "unknown predecessor": ("activities.csv", "020:SS+2", "02O:SS+2",
                            4, "predecessors", "02O:SS+2", "did you mean '020'"),
    "self link": ("activities.csv", "020:SS+2", "030:SS+2", 4, "predecessors", "030:SS+2", "itself"),
    "duplicate link": ("links.csv", "040,070,SF,-1\n", "040,070,SF,-1\n020,050,FS,2\n",
                       6, "predecessor", "020:FS+2", "activities.csv row 7 column 'predecessors'"),
    "duration not a number": ("activities.csv", "Electrical,6,", "Electrical,six,",
                              5, "duration", "six", "not a plain number"),
    "duration not whole": ("activities.csv", "Electrical,6,", "Electrical,2.5,",
                           5, "duration", "2.5", "whole"),
    "duration negative": ("activities.csv", "Electrical,6,", "Electrical,-1,",
                          5, "duration", "-1", "negative"),
    "duration empty": ("activities.csv", "Electrical,6,", "Electrical,,",
                       5, "duration", "", "empty"),
    "crash duration above duration": ("activities.csv", "Demolition,5,3,", "Demolition,5,7,",
                                      3, "crash_duration", "7", "longer"),
    "crash cost below cost": ("activities.csv", "9000,12600", "9000,8000",
                              3, "crash_cost", "8000", "below"),
    "crash cost unknown": ("activities.csv", "6,4,14000,17000", "6,4,14000,",
                           5, "crash_cost", "", "unknown"),
    "unknown link type": ("activities.csv", "020:SS+2", "020:XX", 4, "predecessors", "020:XX",
                          "FS, SS, FF or SF"),
    "bad lag text": ("activities.csv", "020:SS+2", "020:SS+x", 4, "predecessors", "020:SS+x",
                     "lag"),
    "unknown link type in links.csv": ("links.csv", "030,070,FF,0", "030,070,XF,0",
                                       4, "type", "XF", "FS, SS, FF or SF"),
    "bad lag in links.csv": ("links.csv", "050,060,FS,3", "050,060,FS,3d", 2, "lag", "3d", ""),
    "unknown successor in links.csv": ("links.csv", "060,070,,", "060,007,,",
                                       3, "successor", "007", "successor"),
    "thousands separator": ("activities.csv", "General,3,,4500,", 'General,3,,"4,500",',
                            2, "cost", "4,500", "write plain numbers only: 4500"),
    "negative cost": ("activities.csv", "General,3,,4500,", "General,3,,-4500,",
                      2, "cost", "-4500", "negative"),
    "unknown column": ("activities.csv", "id,name,trade,duration,", "id,name,trade,duraton,",
                       1, "duraton", "duraton", "did you mean 'duration'"),
    "steps not convex": ("crash_steps.csv", "060,1,650.25", "060,1,300",
                         3, "cost_per_day", None, "sort the steps"),
    "steps and crash duration disagree": ("activities.csv", "Painting,5,,", "Painting,5,4,",
                                          8, "crash_duration", None, "crash_steps.csv rows 2, 3"),
    "step days zero": ("crash_steps.csv", "060,1,400", "060,0,400", 2, "days", "0", "at least 1"),
    "step days above duration": ("crash_steps.csv", "060,1,650.25", "060,9,650.25",
                                 3, "days", None, "duration is only 5"),
    "step for unknown id": ("crash_steps.csv", "060,1,400", "06O,1,400", 2, "id", "06O",
                            "did you mean '060'"),
    "step cost not a number": ("crash_steps.csv", "060,1,400", "060,1,€400",
                               2, "cost_per_day", "€400", "plain number"),
    "bad start date": ("project.toml", "start = 2025-03-03", 'start = "03/03/2025"',
                       None, "start", "03/03/2025", "YYYY-MM-DD"),
    "impossible date": ("project.toml", "start = 2025-03-03", 'start = "2025-02-30"',
                        None, "start", "2025-02-30", "no such date"),
    "unknown calendar": ("project.toml", 'calendar = ["mon", "tue", "wed", "thu", "fri", "sat"]',
                         'calendar = "mon-thu"', None, "calendar", "mon-thu", "mon-fri, mon-sat, all-days"),
    "unknown weekday": ("project.toml", '"fri", "sat"]', '"fri", "sam"]', None, "calendar", None,
                        "unknown calendar"),
    "holidays not dates": ("project.toml", "holidays = [2025-04-18,", 'holidays = ["Easter",',
                           None, "holidays", "Easter", "YYYY-MM-DD"),
    "negative indirect cost": ("project.toml", "indirect_per_day = 850.5",
                               "indirect_per_day = -850.5", None, "costs.indirect_per_day",
                               None, "negative"),
    "unknown key": ("project.toml", 'currency = "EUR"', 'curency = "EUR"', None, "curency",
                    "curency", "did you mean 'currency'"),
    "missing name": ("project.toml", 'name = "Gemeindesaal Nord – refurbishment"', "",
                     None, "name", None, "missing"),
    "option for unknown id": ("options.csv", "040,kleinere", "04O,kleinere", 6, "id", "04O",
                              "did you mean '040'"),
    "option name twice": ("options.csv", "030,Nachtschicht", "030,zweite Kolonne", 4, "option",
                          "zweite Kolonne", "rows 2 and 4"),
    "option name empty": ("options.csv", "020,Fertigteile", "020,", 7, "option", "", "empty"),
    "option duration not whole": ("options.csv", "zweite Kolonne,6,", "zweite Kolonne,6.5,",
                                  2, "duration", "6.5", "whole"),
    "option duration negative": ("options.csv", "zweite Kolonne,6,", "zweite Kolonne,-6,",
                                 2, "duration", "-6", "negative"),
    "option duration empty": ("options.csv", "zweite Kolonne,6,", "zweite Kolonne,,",
                              2, "duration", "", "empty"),
    "option added cost not a number": ("options.csv", "6,2500,", "6,2.500 €,", 2, "added_cost",
                                       "2.500 €", "a currency stands in the number"),
    "option added cost empty": ("options.csv", "6,2500,", "6,,", 2, "added_cost", "", "empty"),
    "option crash duration above duration": ("options.csv", ",6,900", ",8,900", 3,
                                             "crash_duration", "8", "longer than the option's"),
    "option crash duration negative": ("options.csv", ",6,900", ",-1,900", 3, "crash_duration",
                                       "-1", "negative"),
    "option cost per day without crash duration": ("options.csv", ",6,900", ",,900", 3,
                                                   "crash_duration", "", "no crash duration"),
    "option crash duration without cost per day": ("options.csv", ",6,900", ",6,", 3,
                                                   "cost_per_day", "", "no cost per day"),
    "option cost per day negative": ("options.csv", ",6,900", ",6,-900", 3, "cost_per_day",
                                     "-900", "negative"),
    "option on a milestone": ("options.csv", "020,Fertigteile", "070,Fertigteile", 7, "id",
                              "070", "milestone"),
    "option unknown column": ("options.csv", "added_cost,note", "add_cost,note", 1, "add_cost",
                              "add_cost", "did you mean 'added_cost'"),
}



def test_cycle_names_the_ids_in_order(hall):
    (hall / "links.csv").write_text(
        (hall / "links.csv").read_text(encoding="utf-8") + "070,020,FS,0\n", encoding="utf-8")
    error = read_error(hall, CycleError)
    links = {(l.pred, l.succ) for l in HALL_PROJECT.links} | {("070", "020")}
    loop = error.cycle + error.cycle[:1]
    assert all((a, b) in links for a, b in zip(loop, loop[1:])), error.cycle
    assert {"070", "020"} <= set(error.cycle)
    message = str(error)
    assert " -> ".join(loop) in message and "links.csv" in message and "Fix: " in message


def test_missing_file(hall):
    (hall / "activities.csv").unlink()
    check_error(read_error(hall), file="activities.csv", row=None, column=None, value=None,
                says="not found")


def test_misspelt_optional_file_is_not_ignored(hall):
    (hall / "links.csv").rename(hall / "link.csv")
    check_error(read_error(hall), file="links.csv", row=None, column=None, value=None,
                says="found 'link.csv'")


def test_missing_required_column(hall):
    (hall / "activities.csv").write_text("id,name\nA,Fence\n", encoding="utf-8")
    check_error(read_error(hall), file="activities.csv", row=1, column="duration",
                value="duration", says="columns found: id, name")


@pytest.mark.parametrize("text, says", [("", "the table is empty"),
                                        ("\n\n", "the table is empty"),
                                        ("id,duration\n", "there are no activities")])
def test_empty_activities(hall, text, says):
    (hall / "activities.csv").write_text(text, encoding="utf-8")
    error = read_error(hall)
    check_error(error, file="activities.csv", row=error.row, column=None, value=None, says=says)


def test_not_utf8(hall):
    (hall / "activities.csv").write_bytes("id,name,duration\nA,Süd,2\n".encode("latin-1"))
    check_error(read_error(hall), file="activities.csv", row=None, column=None, value=None,
                says="UTF-8")


def test_broken_toml_names_the_line(hall):
    edit(hall / "project.toml", 'currency = "EUR"', "currency = EUR")
    check_error(read_error(hall), file="project.toml", row=6, column=None, value=None,
                says="not valid TOML")


# ---------------------------------------------------------------- workbook and JSON input

def test_missing_sheet(tmp_path):
    write_project(HALL_PROJECT, tmp_path / "p.xlsx")
    book = openpyxl.load_workbook(tmp_path / "p.xlsx")
    del book["activities"]
    book.save(tmp_path / "p.xlsx")
    error = read_error(tmp_path / "p.xlsx")
    check_error(error, file="p.xlsx", row=None, column=None, value=None,
                says="the sheet 'activities' is missing (sheets found: project, crash_steps, "
                     "options)")


def test_workbook_rows_are_sheet_rows(tmp_path):
    write_project(HALL_PROJECT, tmp_path / "p.xlsx")
    book = openpyxl.load_workbook(tmp_path / "p.xlsx")
    book["activities"]["A5"] = "030"  # 040 on sheet row 5 becomes a second 030
    book.save(tmp_path / "p.xlsx")
    check_error(read_error(tmp_path / "p.xlsx"), file="p.xlsx (sheet activities)", row=5,
                column="id", value="030", says="rows 4 and 5")


def test_workbook_settings_errors_name_the_row(tmp_path):
    write_project(HALL_PROJECT, tmp_path / "p.xlsx")
    book = openpyxl.load_workbook(tmp_path / "p.xlsx")
    sheet = book["project"]
    assert sheet["A3"].value == "start"
    sheet["B3"] = "3.3.2025"
    book.save(tmp_path / "p.xlsx")
    check_error(read_error(tmp_path / "p.xlsx"), file="p.xlsx (sheet project)", row=3,
                column="start", value="3.3.2025", says="YYYY-MM-DD")


def test_workbook_typed_by_hand(tmp_path):
    """Number and date cells as a spreadsheet program stores them are read as text values."""
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.title = "project"
    for row in (("key", "value"), ("name", "Kiosk"), ("start", date(2025, 3, 3)),
                ("holidays", "2025-04-18, 2025-05-01"), ("calendar", "Mon, Tue, Wed"),
                ("costs.indirect_per_day", 120.5), ("notes", None)):
        sheet.append(row)
    sheet.delete_rows(7)
    acts = book.create_sheet("Activities")
    for row in (("ID", "Duration", "Cost", "Predecessors"), (10, 3, 1500, None),
                ("11", 2.0, None, "10:ss+1")):
        acts.append(row)
    book.save(tmp_path / "k.xlsx")
    assert read_project(tmp_path / "k.xlsx") == Project(
        "Kiosk", date(2025, 3, 3), (Activity("10", 3, cost=1500.0), Activity("11", 2)),
        (Link("10", "11", SS, 1),),
        Calendar((0, 1, 2), (date(2025, 4, 18), date(2025, 5, 1)), "mon,tue,wed"),
        costs=Costs(120.5))


def test_json_rows_are_list_positions(tmp_path):
    write_project(HALL_PROJECT, tmp_path / "p.json")
    data = json.loads((tmp_path / "p.json").read_text(encoding="utf-8"))
    data["activities"][2]["duration"] = -3
    (tmp_path / "p.json").write_text(json.dumps(data), encoding="utf-8")
    check_error(read_error(tmp_path / "p.json"), file="p.json (activities)", row=3,
                column="duration", value="-3", says="negative")


def test_options_errors_in_workbook_and_json(tmp_path):
    write_project(HALL_PROJECT, tmp_path / "p.xlsx")
    book = openpyxl.load_workbook(tmp_path / "p.xlsx")
    assert book["options"]["B5"].value == "Nachtschicht"
    book["options"]["B5"] = "zweite Kolonne"
    book.save(tmp_path / "p.xlsx")
    check_error(read_error(tmp_path / "p.xlsx"), file="p.xlsx (sheet options)", row=5,
                column="option", value="zweite Kolonne", says="rows 3 and 5")

    write_project(HALL_PROJECT, tmp_path / "p.json")
    data = json.loads((tmp_path / "p.json").read_text(encoding="utf-8"))
    data["options"][2]["crash_duration"] = 9
    (tmp_path / "p.json").write_text(json.dumps(data), encoding="utf-8")
    check_error(read_error(tmp_path / "p.json"), file="p.json (options)", row=3,
                column="crash_duration", value="9", says="longer than the option's duration (7)")


def test_options_may_be_left_out_of_json(tmp_path):
    write_project(HALL_PROJECT, tmp_path / "p.json")
    data = json.loads((tmp_path / "p.json").read_text(encoding="utf-8"))
    del data["options"]
    (tmp_path / "p.json").write_text(json.dumps(data), encoding="utf-8")
    assert read_project(tmp_path / "p.json") == Project(**{
        **HALL_PROJECT.__dict__,
        "activities": tuple(replace(a, options=()) for a in HALL_PROJECT.activities)})


def test_json_syntax_error_names_the_line(tmp_path):
    (tmp_path / "p.json").write_text('{"project": {"name": "x",\n "start": 2025-03-03}}',
                                     encoding="utf-8")
    check_error(read_error(tmp_path / "p.json"), file="p.json", row=2, column=None, value=None,
                says="not valid JSON")


def test_unknown_form_and_missing_path(tmp_path):
    (tmp_path / "p.csv").write_text("id,duration\n", encoding="utf-8")
    check_error(read_error(tmp_path / "p.csv"), file="p.csv", row=None, column=None,
                value=".csv", says="unknown project form")
    with pytest.raises(InputError, match="not found"):
        read_project(tmp_path / "nothing.json")


def test_parse_tables_is_the_shared_core():
    """The pure core takes tables directly (no files)."""
    grid = [(1, ["id", "duration", "predecessors"]), (2, ["A", "2", ""]), (3, ["B", "1", "A:FF"])]
    tables = Tables(Settings("mem", {"name": "T", "start": "2025-01-06"}),
                    table_from_grid("mem acts", grid))
    assert parse_tables(tables) == Project(
        "T", date(2025, 1, 6), (Activity("A", 2), Activity("B", 1)), (Link("A", "B", FF, 0),))
    with pytest.raises(InputError) as caught:
        parse_tables(Tables(tables.settings, Table("mem acts", ("id", "duration"), ())))
    assert "there are no activities" in str(caught.value)


# ---------------------------------------------------------------- progress and dates

YARD = DATA / "yard"

# The yard project written out by hand from tests/data/formats/yard.
YARD_PROJECT = Project(
    name="Lagerhalle Ost – progress update",
    start=date(2025, 3, 3),
    activities=(
        Activity("A", 3, "Site set-up", "General", None, 2000.0, None,
                 actual_start=date(2025, 3, 3), actual_finish=date(2025, 3, 5)),
        Activity("B", 10, "Groundworks", "Earthworks", 8, 15000.0, 19000.0,
                 actual_start=date(2025, 3, 6), actual_finish=date(2025, 3, 21), remaining=0,
                 percent_complete=100.0),
        Activity("C", 12, "Steel frame", "Steel", 10, 40000.0, 46000.0,
                 actual_start=date(2025, 3, 24), remaining=5, percent_complete=40.0,
                 not_before=date(2025, 3, 24)),
        Activity("D", 8, "Roof sheeting", "Roofing", 6, 22000.0, 26000.0,
                 actual_start=date(2025, 4, 1), percent_complete=62.5),
        Activity("E", 10, "Cladding", "Cladding", None, 18000.0, None,
                 not_before=date(2025, 4, 22)),
        Activity("F", 0, "Handover of the loading bay", "", None, 0.0, None,
                 deadline=date(2025, 5, 9), damages_per_day=1500.5),
        Activity("G", 7, "Fit-out", "Finishes", 5, 12000.0, 15000.0, deadline=date(2025, 5, 23)),
        Activity("H", 0, "Completion"),
    ),
    links=(
        Link("A", "B"),
        Link("B", "C"),
        Link("C", "D", SS, 4),
        Link("C", "E"),
        Link("D", "E", SS, 2),
        Link("E", "F"),
        Link("F", "G"),
        Link("G", "H"),
        Link("D", "H", FF, 0),
    ),
    calendar=Calendar((0, 1, 2, 3, 4), (date(2025, 4, 18),), "mon-fri"),
    currency="EUR",
    costs=Costs(400.0),
    contract=Contract(date(2025, 5, 30), 800.0),
    data_date=date(2025, 4, 7),
)
PROGRESS_HEADER = ["actual_start", "actual_finish", "remaining", "percent_complete",
                   "not_before", "deadline", "damages_per_day"]


@pytest.fixture
def yard(tmp_path: Path) -> Path:
    """A private copy of the yard folder."""
    return Path(shutil.copytree(YARD, tmp_path / "yard"))


def test_yard_folder_reads_as_written_by_hand():
    assert read_project(YARD) == YARD_PROJECT


def assert_round_trips(project, folder):
    """folder -> workbook -> JSON -> folder gives back an equal project at every step."""
    current = project
    for name in ("p.xlsx", "p.json", "again"):
        write_project(current, folder / name)
        current = read_project(folder / name)
        assert current == project, name


def test_progress_round_trip_folder_xlsx_json_folder(tmp_path):
    assert_round_trips(YARD_PROJECT, tmp_path)


def test_progress_written_layouts(tmp_path):
    write_project(YARD_PROJECT, tmp_path / "f")
    assert (tmp_path / "f" / "project.toml").read_text(encoding="utf-8").endswith(
        "\n[status]\ndata_date = 2025-04-07\n")
    lines = (tmp_path / "f" / "activities.csv").read_text(encoding="utf-8").splitlines()
    assert lines[0].split(",")[8:] == PROGRESS_HEADER
    assert lines[3] == "C,Steel frame,Steel,12,10,40000,46000,B,2025-03-24,,5,40,2025-03-24,,"
    assert lines[6] == "F,Handover of the loading bay,,0,,0,,E,,,,,,2025-05-09,1500.5"
    assert lines[7] == "G,Fit-out,Finishes,7,5,12000,15000,F,,,,,,2025-05-23,"

    write_project(YARD_PROJECT, tmp_path / "p.json")
    data = json.loads((tmp_path / "p.json").read_text(encoding="utf-8"))
    assert data["project"]["status"] == {"data_date": "2025-04-07"}
    assert {k: data["activities"][3][k] for k in PROGRESS_HEADER} == {
        "actual_start": "2025-04-01", "actual_finish": None, "remaining": None,
        "percent_complete": 62.5, "not_before": None, "deadline": None, "damages_per_day": None}

    write_project(YARD_PROJECT, tmp_path / "p.xlsx")
    book = openpyxl.load_workbook(tmp_path / "p.xlsx")
    settings = {row[0]: row[1] for row in book["project"].iter_rows(min_row=2, values_only=True)}
    assert settings["status.data_date"] == "2025-04-07"
    assert [c.value for c in book["activities"][1]][8:] == PROGRESS_HEADER
    assert [c.value for c in book["activities"][7]][8:] == [None] * 5 + ["2025-05-09", 1500.5]


def test_only_the_progress_columns_in_use_are_written(tmp_path):
    # a project without progress keeps the plan columns only; one with a single not_before
    # gains that column alone
    write_project(HALL_PROJECT, tmp_path / "plain")
    header = (tmp_path / "plain" / "activities.csv").read_text(encoding="utf-8").splitlines()[0]
    assert header == "id,name,trade,duration,crash_duration,cost,crash_cost,predecessors"
    assert "status" not in (tmp_path / "plain" / "project.toml").read_text(encoding="utf-8")
    acts = list(HALL_PROJECT.activities)
    acts[2] = replace(acts[2], not_before=date(2025, 3, 10))
    project = replace(HALL_PROJECT, activities=tuple(acts))
    write_project(project, tmp_path / "one")
    lines = (tmp_path / "one" / "activities.csv").read_text(encoding="utf-8").splitlines()
    assert lines[0].endswith(",predecessors,not_before")
    assert lines[3].endswith(",2025-03-10") and lines[2].endswith(",")
    assert read_project(tmp_path / "one") == project


def test_typed_date_cells_and_nulls_are_read(tmp_path):
    """Date cells in a workbook and nulls in JSON read like ISO text and empty cells."""
    write_project(YARD_PROJECT, tmp_path / "p.xlsx")
    book = openpyxl.load_workbook(tmp_path / "p.xlsx")
    settings = book["project"]
    row = next(r for r in range(1, settings.max_row + 1)
               if settings.cell(r, 1).value == "status.data_date")
    settings.cell(row, 2).value = datetime(2025, 4, 7)
    assert book["activities"]["I3"].value == "2025-03-06"  # B's actual start
    book["activities"]["I3"] = datetime(2025, 3, 6)
    assert book["activities"]["M4"].value == "2025-03-24"  # C's not_before (no blank row)
    book["activities"]["M4"] = date(2025, 3, 24)
    book.save(tmp_path / "p.xlsx")
    assert read_project(tmp_path / "p.xlsx") == YARD_PROJECT

    write_project(YARD_PROJECT, tmp_path / "p.json")
    data = json.loads((tmp_path / "p.json").read_text(encoding="utf-8"))
    for record in data["activities"][4:]:  # E.. have no actual dates: keys may go
        del record["actual_start"], record["actual_finish"]
    (tmp_path / "p.json").write_text(json.dumps(data), encoding="utf-8")
    assert read_project(tmp_path / "p.json") == YARD_PROJECT


def test_remaining_wins_over_percent_complete():
    # C gives remaining 5 and percent_complete 40; 40 percent of 12 days would leave 8
    # (ceil(12 * 0.6) = 8, hand arithmetic). Both are kept, and progress uses remaining.
    from hasten.calendar import CalendarClock
    from hasten.progress import apply_progress
    project = read_project(YARD)
    c = project.activity("C")
    assert (c.remaining, c.percent_complete) == (5, 40.0)
    status = apply_progress(project, CalendarClock(project.calendar, project.start))
    assert status.activities[2].duration == 5
    # D gives percent_complete 62.5 only: 8 * (100 - 62.5) / 100 = 3 days left (hand arithmetic)
    assert status.activities[3].duration == 3


def test_deadline_without_damages_and_zero_damages_without_deadline_are_allowed(yard):
    edit(yard / "activities.csv", "B,2025-03-24,,5,40,2025-03-24,,",
         "B,2025-03-24,,5,40,2025-03-24,,0")
    project = read_project(yard)
    assert project.activity("G").deadline == date(2025, 5, 23)
    assert project.activity("G").damages_per_day == 0.0
    assert project.activity("C").damages_per_day == 0.0 and project.activity("C").deadline is None


def test_actual_start_on_the_data_date_is_allowed(yard):
    # started on the data date itself: no work done yet, but it has begun
    edit(yard / "activities.csv", "C:SS+4,2025-04-01,", "C:SS+4,2025-04-07,")
    assert read_project(yard).activity("D").actual_start == date(2025, 4, 7)


# ---------------------------------------------------------------- named calendars
# An invented project with two named calendars, written out in the test (format checks only).

DEPOT_TOML = """# Invented demo data for format tests only (not a reference check).
name = "Depot canopy"
start = 2025-03-03
calendar = "mon-fri"
holidays = [2025-04-18, 2025-05-01]

[calendars.crane]
workdays = "all-days"
holidays = []

[calendars.six-day]
workdays = ["mon", "tue", "wed", "thu", "fri", "sat"]
"""
DEPOT_CSV = """id,name,duration,predecessors,calendar
A,Footings,4,,
B,Steel erection,3,A,crane
C,Roof deck,5,B,six-day
D,Handover,0,C,
"""
DEPOT_HOLIDAYS = (date(2025, 4, 18), date(2025, 5, 1))

# The depot project written out by hand from DEPOT_TOML and DEPOT_CSV: each calendar is named
# by its key (six-day, not mon-sat); crane lists no holidays, six-day takes the project's.
DEPOT_PROJECT = Project(
    name="Depot canopy",
    start=date(2025, 3, 3),
    activities=(
        Activity("A", 4, "Footings"),
        Activity("B", 3, "Steel erection", calendar="crane"),
        Activity("C", 5, "Roof deck", calendar="six-day"),
        Activity("D", 0, "Handover"),
    ),
    links=(Link("A", "B"), Link("B", "C"), Link("C", "D")),
    calendar=Calendar((0, 1, 2, 3, 4), DEPOT_HOLIDAYS, "mon-fri"),
    calendars=(Calendar((0, 1, 2, 3, 4, 5, 6), (), "crane"),
               Calendar((0, 1, 2, 3, 4, 5), DEPOT_HOLIDAYS, "six-day")),
)


@pytest.fixture
def depot(tmp_path: Path) -> Path:
    folder = tmp_path / "depot"
    folder.mkdir()
    (folder / "project.toml").write_text(DEPOT_TOML, encoding="utf-8")
    (folder / "activities.csv").write_text(DEPOT_CSV, encoding="utf-8")
    return folder


def test_named_calendars_read_as_written_by_hand(depot):
    assert read_project(depot) == DEPOT_PROJECT


def test_named_calendars_round_trip_folder_xlsx_json_folder(tmp_path):
    # a third calendar no activity names, with weekdays that match no named calendar
    project = replace(DEPOT_PROJECT, calendars=DEPOT_PROJECT.calendars + (
        Calendar((0, 2, 4), (date(2025, 6, 9),), "odd_days"),))
    assert_round_trips(project, tmp_path)


def test_named_calendars_written_layouts(tmp_path):
    write_project(DEPOT_PROJECT, tmp_path / "f")
    toml = (tmp_path / "f" / "project.toml").read_text(encoding="utf-8")
    assert toml.endswith('\n[calendars.crane]\nworkdays = "all-days"\nholidays = []\n\n'
                         '[calendars.six-day]\nworkdays = "mon-sat"\n'
                         'holidays = [2025-04-18, 2025-05-01]\n')
    assert "\n[calendars]\n" not in toml
    lines = (tmp_path / "f" / "activities.csv").read_text(encoding="utf-8").splitlines()
    assert lines[0] == "id,name,trade,duration,crash_duration,cost,crash_cost,predecessors,calendar"
    assert lines[1].endswith(",,") and lines[2].endswith(",A,crane")

    write_project(DEPOT_PROJECT, tmp_path / "p.json")
    data = json.loads((tmp_path / "p.json").read_text(encoding="utf-8"))
    assert data["project"]["calendars"] == {
        "crane": {"workdays": "all-days", "holidays": []},
        "six-day": {"workdays": "mon-sat", "holidays": ["2025-04-18", "2025-05-01"]}}
    assert [a["calendar"] for a in data["activities"]] == [None, "crane", "six-day", None]

    write_project(DEPOT_PROJECT, tmp_path / "p.xlsx")
    book = openpyxl.load_workbook(tmp_path / "p.xlsx")
    rows = list(book["project"].iter_rows(min_row=2, values_only=True))
    assert rows[-4:] == [("calendars.crane.workdays", "all-days"),
                         ("calendars.crane.holidays", "none"),
                         ("calendars.six-day.workdays", "mon-sat"),
                         ("calendars.six-day.holidays", "2025-04-18, 2025-05-01")]
    assert [c.value for c in book["activities"]["I"]] == ["calendar", None, "crane", "six-day", None]


def test_convert_command_keeps_named_calendars(depot, tmp_path):
    from typer.testing import CliRunner

    from hasten.cli import app

    runner = CliRunner()
    source = depot
    for target in ("p.xlsx", "p.json", "back"):
        out = runner.invoke(app, ["convert", str(source), str(tmp_path / target)])
        assert out.exit_code == 0, out.output
        assert read_project(tmp_path / target) == DEPOT_PROJECT, target
        source = tmp_path / target
    assert (tmp_path / "back" / "project.toml").read_text(encoding="utf-8").count("[calendars.") == 2


def test_calendar_holidays_absent_mean_the_projects_and_empty_means_none(depot, tmp_path):
    crane = DEPOT_PROJECT.calendars[0]
    # folder: holidays = [] gives none; without the key the project's holidays
    edit(depot / "project.toml", 'workdays = "all-days"\nholidays = []\n', 'workdays = "all-days"\n')
    assert read_project(depot).calendars[0] == replace(crane, holidays=DEPOT_HOLIDAYS)
    edit(depot / "project.toml", 'workdays = "all-days"\n',
         'workdays = "all-days"\nholidays = [2025-12-25]\n')
    assert read_project(depot).calendars[0] == replace(crane, holidays=(date(2025, 12, 25),))

    # workbook: "none" gives none; an empty cell or no row the project's holidays
    write_project(DEPOT_PROJECT, tmp_path / "p.xlsx")
    book = openpyxl.load_workbook(tmp_path / "p.xlsx")
    sheet = book["project"]
    row = next(r for r in range(1, sheet.max_row + 1)
               if sheet.cell(r, 1).value == "calendars.crane.holidays")
    assert sheet.cell(row, 2).value == "none"
    sheet.cell(row, 2).value = None
    book.save(tmp_path / "empty.xlsx")
    assert read_project(tmp_path / "empty.xlsx").calendars[0] == replace(crane, holidays=DEPOT_HOLIDAYS)
    sheet.delete_rows(row)
    book.save(tmp_path / "gone.xlsx")
    assert read_project(tmp_path / "gone.xlsx").calendars[0] == replace(crane, holidays=DEPOT_HOLIDAYS)

    # JSON: [] gives none; null or no key the project's holidays
    write_project(DEPOT_PROJECT, tmp_path / "p.json")
    data = json.loads((tmp_path / "p.json").read_text(encoding="utf-8"))
    assert data["project"]["calendars"]["crane"]["holidays"] == []
    assert read_project(tmp_path / "p.json").calendars[0] == crane
    data["project"]["calendars"]["crane"]["holidays"] = None
    (tmp_path / "p.json").write_text(json.dumps(data), encoding="utf-8")
    assert read_project(tmp_path / "p.json").calendars[0] == replace(crane, holidays=DEPOT_HOLIDAYS)
    del data["project"]["calendars"]["crane"]["holidays"]
    (tmp_path / "p.json").write_text(json.dumps(data), encoding="utf-8")
    assert read_project(tmp_path / "p.json").calendars[0] == replace(crane, holidays=DEPOT_HOLIDAYS)


# (file, old text, new text, row, column, value, words the message must contain)
BAD_CALENDAR_CASES = {
    "unknown calendar in the column": (
        "activities.csv", "A,crane", "A,crame", 3, "calendar", "crame",
        "unknown calendar 'crame'"),
    "unknown key in a calendar": (
        "project.toml", "holidays = []", "holliday = []", None, "calendars.crane.holliday",
        "calendars.crane.holliday", "did you mean 'calendars.crane.holidays'"),
    "other unknown key in a calendar": (
        "project.toml", "holidays = []", 'note = "tower crane"', None, "calendars.crane.note",
        "calendars.crane.note", "a calendar takes the keys workdays and holidays"),
    "unknown named calendar as workdays": (
        "project.toml", '"all-days"', '"all-day"', None, "calendars.crane.workdays", "all-day",
        "mon-fri, mon-sat, all-days"),
    "unknown weekday in workdays": (
        "project.toml", '"fri", "sat"]', '"fri", "sam"]', None, "calendars.six-day.workdays",
        None, "unknown calendar"),
    "no working weekdays": (
        "project.toml", '"all-days"', "[]", None, "calendars.crane.workdays", None,
        "no working weekdays"),
    "workdays missing": (
        "project.toml", 'workdays = "all-days"\n', "", None, "calendars.crane.workdays", None,
        "the calendar 'crane' has no working weekdays"),
    "holidays not dates": (
        "project.toml", "holidays = []", 'holidays = ["Easter"]', None,
        "calendars.crane.holidays", "Easter", "YYYY-MM-DD"),
    "calendar name with a space": (
        "project.toml", "[calendars.six-day]", '[calendars."six day"]', None,
        "calendars.six day.workdays", "six day",
        "a calendar name may contain only letters, digits, '-' and '_'"),
    "calendar name with a dot": (
        "project.toml", "[calendars.six-day]", '[calendars."six.day"]', None,
        "calendars.six.day.workdays", "six.day", "only letters, digits"),
    "empty calendar name": (
        "project.toml", "[calendars.six-day]", '[calendars.""]', None,
        "calendars..workdays", "", "the calendar name is empty"),
    "calendar not a section": (
        "project.toml", "[calendars.six-day]\nworkdays = ", "[calendars]\nsix-day = ", None,
        "calendars.six-day", None, "a calendar must be a section of keys"),
    "calendar without keys": (
        "project.toml", "\n[calendars.crane]\n", "\n[calendars.night]\n[calendars.crane]\n", None,
        "calendars.night", "night", "the calendar has no keys"),
}



def test_unknown_calendar_names_the_fix_and_the_defined_calendars(depot):
    edit(depot / "activities.csv", "B,six-day", "B,Six-Day")
    error = read_error(depot)
    check_error(error, file="activities.csv", row=4, column="calendar", value="Six-Day",
                says="unknown calendar 'Six-Day'")
    assert error.fix == (f"did you mean 'six-day'? define it under [calendars.Six-Day] in "
                         f"{depot / 'project.toml'}, or leave the cell empty for the project "
                         "calendar; defined: crane, six-day")


def test_calendar_column_without_calendars(hall):
    edit(hall / "activities.csv", ",predecessors\n", ",predecessors,calendar\n")
    assert read_project(hall) == HALL_PROJECT  # an empty column: the project calendar
    edit(hall / "activities.csv", "Übergabe,,0,,0,,\n", "Übergabe,,0,,0,,,night\n")  # 070
    error = read_error(hall)
    check_error(error, file="activities.csv", row=9, column="calendar", value="night",
                says="unknown calendar 'night'")
    assert error.fix.endswith("defined: none")


def test_calendar_errors_in_workbook_and_json(tmp_path):
    write_project(DEPOT_PROJECT, tmp_path / "p.xlsx")
    book = openpyxl.load_workbook(tmp_path / "p.xlsx")
    assert book["activities"]["I4"].value == "six-day"  # C on sheet row 4
    book["activities"]["I4"] = "sixday"
    book.save(tmp_path / "p.xlsx")
    error = read_error(tmp_path / "p.xlsx")
    check_error(error, file="p.xlsx (sheet activities)", row=4, column="calendar",
                value="sixday", says="unknown calendar 'sixday'")
    assert "define it with the key calendars.sixday.workdays on" in error.fix

    book = openpyxl.load_workbook(tmp_path / "p.xlsx")
    sheet = book["project"]
    row = next(r for r in range(1, sheet.max_row + 1)
               if sheet.cell(r, 1).value == "calendars.crane.workdays")
    sheet.cell(row, 1).value = "calendars.crane.workday"
    book.save(tmp_path / "p.xlsx")
    check_error(read_error(tmp_path / "p.xlsx"), file="p.xlsx (sheet project)", row=row,
                column="calendars.crane.workday", value="calendars.crane.workday",
                says="did you mean 'calendars.crane.workdays'")
    sheet.cell(row, 1).value = "calendars.crane"
    book.save(tmp_path / "p.xlsx")
    check_error(read_error(tmp_path / "p.xlsx"), file="p.xlsx (sheet project)", row=row,
                column="calendars.crane", value="calendars.crane",
                says="needs the calendar's name and a key")

    write_project(DEPOT_PROJECT, tmp_path / "p.json")
    data = json.loads((tmp_path / "p.json").read_text(encoding="utf-8"))
    data["project"]["calendars"]["crane"]["workdays"] = "weekdays"
    (tmp_path / "p.json").write_text(json.dumps(data), encoding="utf-8")
    check_error(read_error(tmp_path / "p.json"), file="p.json (project)", row=None,
                column="calendars.crane.workdays", value="weekdays", says="unknown calendar")
    data["project"]["calendars"] = ["crane"]
    (tmp_path / "p.json").write_text(json.dumps(data), encoding="utf-8")
    check_error(read_error(tmp_path / "p.json"), file="p.json (project)", row=None,
                column="calendars", value=None, says="must be a section of named calendars")


# (file, old text, new text, row, column, value, words the message must contain)
BAD_PROGRESS_CASES = {
    "data date not a date": ("project.toml", "data_date = 2025-04-07", 'data_date = "7.4.2025"',
                             None, "status.data_date", "7.4.2025", "YYYY-MM-DD"),
    "data date before the start": ("project.toml", "data_date = 2025-04-07",
                                   "data_date = 2025-02-28", None, "status.data_date",
                                   "2025-02-28", "before the project start (2025-03-03)"),
    "actual start not a date": ("activities.csv", "2000,,,2025-03-03,", "2000,,,03/03/2025,",
                                2, "actual_start", "03/03/2025", "not a date"),
    "actual finish no such date": ("activities.csv", "2025-03-06,2025-03-21,",
                                   "2025-03-06,2025-02-30,", 3, "actual_finish", "2025-02-30",
                                   "no such date"),
    "not before not a date": ("activities.csv", "5,40,2025-03-24,", "5,40,next week,",
                              4, "not_before", "next week", "YYYY-MM-DD"),
    "deadline not a date": ("activities.csv", ",2025-05-09,1500.5", ",9 May,1500.5",
                            8, "deadline", "9 May", "YYYY-MM-DD"),
    "actual finish without actual start": ("activities.csv", "2025-03-06,2025-03-21,",
                                           ",2025-03-21,", 3, "actual_start", "",
                                           "the actual start is empty but the actual finish "
                                           "is given (2025-03-21)"),
    "actual finish before actual start": ("activities.csv", "2025-03-06,2025-03-21,",
                                          "2025-03-06,2025-03-05,", 3, "actual_finish",
                                          "2025-03-05", "before the actual start (2025-03-06)"),
    "actual start after the data date": ("activities.csv", "C:SS+4,2025-04-01,",
                                         "C:SS+4,2025-04-08,", 6, "actual_start", "2025-04-08",
                                         "after the data date (2025-04-07)"),
    "actual start on the data date is fine, finish on it is not": (
        "activities.csv", "2025-03-06,2025-03-21,", "2025-04-07,2025-04-07,", 3,
        "actual_finish", "2025-04-07", "on or after the data date (2025-04-07)"),
    "actual finish after the data date": ("activities.csv", "2025-03-06,2025-03-21,",
                                          "2025-03-06,2025-04-09,", 3, "actual_finish",
                                          "2025-04-09", "on or after the data date"),
    "actual start before the project start": ("activities.csv", "2000,,,2025-03-03,",
                                              "2000,,,2025-02-28,", 2, "actual_start",
                                              "2025-02-28", "before the project start"),
    "remaining above duration": ("activities.csv", "2025-03-24,,5,40,", "2025-03-24,,13,40,",
                                 4, "remaining", "13", "more work remaining than the duration (12)"),
    "remaining not whole": ("activities.csv", "2025-03-24,,5,40,", "2025-03-24,,4.5,40,",
                            4, "remaining", "4.5", "whole"),
    "remaining negative": ("activities.csv", "2025-03-24,,5,40,", "2025-03-24,,-1,40,",
                           4, "remaining", "-1", "negative"),
    "remaining without actual start": ("activities.csv", "D:SS+2,,,,,2025-04-22",
                                       "D:SS+2,,,3,,2025-04-22", 7, "remaining", "3",
                                       "progress needs an actual start"),
    "percent without actual start": ("activities.csv", "D:SS+2,,,,,2025-04-22",
                                     "D:SS+2,,,,20,2025-04-22", 7, "percent_complete", "20",
                                     "progress needs an actual start"),
    "percent above 100": ("activities.csv", ",,62.5,,,", ",,100.5,,,", 6, "percent_complete",
                          "100.5", "outside 0 to 100"),
    "percent negative": ("activities.csv", ",,62.5,,,", ",,-5,,,", 6, "percent_complete",
                         "-5", "outside 0 to 100"),
    # (a % sign is allowed: 62.5% is 62.5; see test_formats_numbers.py)
    "percent with a per-mille sign": ("activities.csv", ",,62.5,,,", ",,62.5‰,,,", 6,
                                      "percent_complete", "62.5‰", "plain number"),
    "finished with work remaining": ("activities.csv", "2025-03-21,0,100,", "2025-03-21,2,100,",
                                     3, "remaining", "2", "finished"),
    "finished but not 100 percent": ("activities.csv", "2025-03-21,0,100,", "2025-03-21,0,90,",
                                     3, "percent_complete", "90", "finished"),
    "damages without deadline": ("activities.csv", "2025-03-24,,5,40,2025-03-24,,",
                                 "2025-03-24,,5,40,2025-03-24,,300", 4, "damages_per_day", "300",
                                 "the deadline is empty"),
    "negative damages": ("activities.csv", ",2025-05-09,1500.5", ",2025-05-09,-1500.5",
                         8, "damages_per_day", "-1500.5", "negative"),
    "damages not a number": ("activities.csv", ",2025-05-09,1500.5", ",2025-05-09,1'500",
                             8, "damages_per_day", "1'500", "thousands separator"),
    "misspelt progress column": ("activities.csv", ",percent_complete,", ",percent_completed,",
                                 1, "percent_completed", "percent_completed",
                                 "did you mean 'percent_complete'"),
}



# ---------------------------------------------------------------- bad input, one table
# Every case of the three tables above as one parametrised table: the sample folder it
# edits (a fixture), then (file, old text, new text, row, column, value, words).

BAD_INPUT_CASES = {
    **{f"hall: {k}": ("hall",) + v for k, v in BAD_FOLDER_CASES.items()},
    **{f"depot: {k}": ("depot",) + v for k, v in BAD_CALENDAR_CASES.items()},
    **{f"yard: {k}": ("yard",) + v for k, v in BAD_PROGRESS_CASES.items()},
}


@pytest.mark.parametrize("case", list(BAD_INPUT_CASES), ids=list(BAD_INPUT_CASES))
def test_bad_input(request, case):
    fixture, file, old, new, row, column, value, says = BAD_INPUT_CASES[case]
    folder = request.getfixturevalue(fixture)
    edit(folder / file, old, new)
    check_error(read_error(folder), file=file, row=row, column=column, value=value, says=says)


def test_actual_dates_without_a_data_date(yard):
    edit(yard / "project.toml", "[status]\ndata_date = 2025-04-07\n", "")
    error = read_error(yard)
    check_error(error, file="activities.csv", row=2, column="actual_start", value="2025-03-03",
                says="actual dates need a data date, and ")
    assert error.problem.endswith("project.toml has none")
    assert error.fix.startswith("give [status] data_date")


def test_status_must_be_a_section(tmp_path):
    write_project(YARD_PROJECT, tmp_path / "p.json")
    data = json.loads((tmp_path / "p.json").read_text(encoding="utf-8"))
    data["project"]["status"] = "2025-04-07"
    (tmp_path / "p.json").write_text(json.dumps(data), encoding="utf-8")
    check_error(read_error(tmp_path / "p.json"), file="p.json (project)", row=None,
                column="status", value="2025-04-07", says="must be a section")


def test_progress_errors_in_workbook_and_json(tmp_path):
    write_project(YARD_PROJECT, tmp_path / "p.xlsx")
    book = openpyxl.load_workbook(tmp_path / "p.xlsx")
    settings = book["project"]
    row = next(r for r in range(1, settings.max_row + 1)
               if settings.cell(r, 1).value == "status.data_date")
    settings.cell(row, 2).value = "2025-04-02"  # before D's actual start (2025-04-01 is fine)
    book["activities"]["I5"] = "2025-04-03"  # D on sheet row 5 (the sheet has no blank row)
    book.save(tmp_path / "p.xlsx")
    check_error(read_error(tmp_path / "p.xlsx"), file="p.xlsx (sheet activities)", row=5,
                column="actual_start", value="2025-04-03", says="after the data date (2025-04-02)")

    write_project(YARD_PROJECT, tmp_path / "p.json")
    data = json.loads((tmp_path / "p.json").read_text(encoding="utf-8"))
    data["project"]["status"]["data_date"] = "2025-4-7"
    (tmp_path / "p.json").write_text(json.dumps(data), encoding="utf-8")
    check_error(read_error(tmp_path / "p.json"), file="p.json (project)", row=None,
                column="status.data_date", value="2025-4-7", says="YYYY-MM-DD")
    data["project"]["status"]["data_date"] = "2025-04-07"
    data["activities"][5]["remaining"] = 1  # F, not started
    (tmp_path / "p.json").write_text(json.dumps(data), encoding="utf-8")
    check_error(read_error(tmp_path / "p.json"), file="p.json (activities)", row=6,
                column="remaining", value="1", says="progress needs an actual start")


# ---------------------------------------------------------------- writing

def test_written_layouts(tmp_path):
    write_project(HALL_PROJECT, tmp_path / "p.xlsx")
    book = openpyxl.load_workbook(tmp_path / "p.xlsx")
    assert book.sheetnames == ["project", "activities", "crash_steps", "options"]
    # options in activity order (020 before 030), each activity's in file order
    assert [c.value for c in book["options"][4]] == ["030", "Samstagsschicht", 7, 1200.5,
                                                     'Zuschlag "Samstag"', 6, 900]
    assert [c.value for c in book["options"][3]][5:] == [None, None]
    settings = {row[0]: row[1] for row in book["project"].iter_rows(min_row=2, values_only=True)}
    assert settings["holidays"] == "2025-04-18, 2025-05-01"
    assert settings["contract.finish"] == "2025-06-27"
    assert settings["costs.indirect_per_day"] == 850.5
    assert book["activities"]["A2"].value == "010"
    assert book["activities"]["H7"].value == "050:FS+3"

    write_project(HALL_PROJECT, tmp_path / "p.json")
    data = json.loads((tmp_path / "p.json").read_text(encoding="utf-8"))
    assert list(data) == ["project", "activities", "links", "crash_steps", "options"]
    assert data["options"][3] == {"id": "030", "option": "Nachtschicht", "duration": 6,
                                  "added_cost": 3000, "note": "", "crash_duration": None,
                                  "cost_per_day": None}
    assert data["options"][4]["added_cost"] == -1500
    assert data["project"]["contract"]["bonus_cap_days"] == 10
    assert data["activities"][6]["predecessors"] == "060; 030:FF; 040:SF-1"
    assert data["links"] == []
    assert data["crash_steps"][1] == {"id": "060", "days": 1, "cost_per_day": 650.25}

    write_project(HALL_PROJECT, tmp_path / "f")
    assert sorted(p.name for p in (tmp_path / "f").iterdir()) == [
        "activities.csv", "crash_steps.csv", "options.csv", "project.toml"]
    assert (tmp_path / "f" / "options.csv").read_text(encoding="utf-8").splitlines()[:3] == [
        "id,option,duration,added_cost,note,crash_duration,cost_per_day",
        "020,Fertigteile,4,0,,,",
        '030,zweite Kolonne,6,2500,"second crew, from the sister site",,']


def test_links_out_of_reading_order_go_to_links_table(tmp_path):
    reordered = Project(HALL_PROJECT.name, HALL_PROJECT.start, HALL_PROJECT.activities,
                        tuple(reversed(HALL_PROJECT.links)), HALL_PROJECT.calendar)
    write_project(reordered, tmp_path / "f")
    assert (tmp_path / "f" / "links.csv").is_file()
    assert read_project(tmp_path / "f") == reordered


def test_awkward_values_survive_every_form(tmp_path):
    project = Project(
        "=SUM(A1) #N/A", date(2025, 3, 3),
        (Activity("010", 4, "two\nlines, \"quoted\"", "#N/A", 2, 0.1 + 0.2, 1e20),
         Activity("A.1-x_2", 1, "=1+1", cost=123456789.12345679)),
        calendar=Calendar((0, 2, 4), (), "mon,wed,fri"), currency="€")
    for name in ("f", "p.xlsx", "p.json"):
        write_project(project, tmp_path / name)
        assert read_project(tmp_path / name) == project, name


def test_refuses_to_overwrite_unless_asked(tmp_path):
    target = tmp_path / "p.json"
    target.write_text("{}", encoding="utf-8")
    with pytest.raises(InputError, match="not empty"):
        write_project(HALL_PROJECT, target)
    assert target.read_text(encoding="utf-8") == "{}"
    write_project(HALL_PROJECT, target, overwrite=True)
    assert read_project(target) == HALL_PROJECT
    (tmp_path / "empty").mkdir()
    write_project(HALL_PROJECT, tmp_path / "empty")
    assert read_project(tmp_path / "empty") == HALL_PROJECT


def test_overwriting_a_folder_removes_stale_tables_only(hall):
    (hall / "notes.txt").write_text("keep me", encoding="utf-8")
    with pytest.raises(InputError, match="not empty"):
        write_project(HALL_PROJECT, hall)
    write_project(HALL_PROJECT, hall, overwrite=True)
    assert not (hall / "links.csv").exists()  # the links now sit in the predecessors column
    assert (hall / "notes.txt").read_text(encoding="utf-8") == "keep me"
    assert read_project(hall) == HALL_PROJECT
    assert sorted(p.name for p in hall.iterdir()) == [
        "README.md", "activities.csv", "crash_steps.csv", "notes.txt", "options.csv",
        "project.toml"]


def test_failed_write_leaves_nothing_behind(tmp_path, monkeypatch):
    def broken_save(self, filename):
        Path(filename).write_bytes(b"half a workbook")
        raise OSError(28, "No space left on device")
    monkeypatch.setattr(openpyxl.Workbook, "save", broken_save)
    with pytest.raises(InputError, match="cannot write"):
        write_project(HALL_PROJECT, tmp_path / "p.xlsx")
    assert list(tmp_path.iterdir()) == []


def test_failed_folder_write_leaves_old_files_alone(hall, monkeypatch):
    import hasten.formats.folder as folder

    def broken(columns, records):
        def write(path):
            path.write_text("partial", encoding="utf-8")
            raise OSError(13, "Permission denied")
        return write
    before = snapshot(hall)
    monkeypatch.setattr(folder, "_csv_writer", broken)
    with pytest.raises(InputError, match="cannot write"):
        write_project(HALL_PROJECT, hall, overwrite=True)
    assert snapshot(hall) == before
    with pytest.raises(InputError, match="cannot write"):
        write_project(HALL_PROJECT, hall.parent / "new")
    assert sorted(p.name for p in hall.parent.iterdir()) == ["hall"]


# ---------------------------------------------------------------- refused before writing
# (sample project, changed fields, words of the message): writing refuses a project that is
# invalid or would not read back equal, and leaves nothing behind.

@pytest.mark.parametrize("base, change, says", [
    (HALL_PROJECT, dict(name=" padded "), "project.name"),
    (HALL_PROJECT, dict(calendar=Calendar((0, 1, 2, 3, 4, 5), (), "mon-fri")),
     "project.calendar.name"),
    (HALL_PROJECT, dict(links=(Link("010", "020"), Link("020", "010"))), "loop"),
    (HALL_PROJECT, dict(links=(Link("010", "999"),)), "unknown"),
    (HALL_PROJECT, dict(links=(), activities=(Activity("010", 3, options=(
        Option(" padded ", 2, 10.0),)),)), r"project.activities\[0\].options\[0\].name"),
    (HALL_PROJECT, dict(links=(), activities=(Activity("010", 3, options=(
        Option("x", 2, 10.0, cost_per_day=5.0),)),)), "no crash duration"),
    (HALL_PROJECT, dict(links=(), activities=(Activity("010", 0, options=(
        Option("x", 2, 10.0),)),)), "milestone"),
    (HALL_PROJECT, dict(links=(), activities=(Activity("010", 3, options=(
        Option("x", 2, 1.0), Option("x", 1, 2.0))),)), "given twice"),
    (DEPOT_PROJECT, dict(calendars=()), "unknown calendar 'crane'"),
    (DEPOT_PROJECT, dict(calendars=(Calendar((0, 1, 2, 3, 4, 5, 6), (), "crane"),
                                    Calendar((0, 1, 2, 3, 4, 5), (), "six day"))),
     "calendar name"),
    (DEPOT_PROJECT, dict(calendars=(Calendar((0, 1, 2, 3, 4, 5, 6), (), "crane"),
                                    Calendar((5, 0), (), "six-day"))),
     r"project.calendars\[1\].workdays"),
    (YARD_PROJECT, dict(data_date=None), "actual dates need a data date"),
    (YARD_PROJECT, dict(data_date=date(2025, 3, 21)), "on or after the data date"),
    (YARD_PROJECT, dict(activities=(Activity("A", 3, damages_per_day=10.0),), links=()),
     "deadline is empty"),
    (YARD_PROJECT, dict(activities=(Activity("A", 3, remaining=2),), links=()),
     "needs an actual start"),
])
def test_refuses_projects_that_would_not_read_back(tmp_path, base, change, says):
    with pytest.raises(InputError, match=says):
        write_project(replace(base, **change), tmp_path / "p.json")
    assert list(tmp_path.iterdir()) == []


# ---------------------------------------------------------------- random round trips

ID = st.text(string.ascii_letters + string.digits + "-_.", min_size=1, max_size=5)
TEXT = st.text(st.characters(blacklist_categories=("Cs", "Cn", "Cc")) | st.sampled_from("\n\t"),
               max_size=15).map(str.strip)
CALENDAR_NAME = st.text(string.ascii_letters + string.digits + "-_äß", min_size=1, max_size=8)
MONEY = st.floats(min_value=0, max_value=1e12, allow_nan=False) | st.integers(0, 10**7).map(float)


@st.composite
def activity(draw, ident: str) -> Activity:
    duration = draw(st.integers(0, 40))
    cost = draw(MONEY)
    kind = draw(st.sampled_from(["fixed", "explicit", "linear", "steps"] if duration else
                                ["fixed", "explicit"]))
    common = dict(id=ident, duration=duration, name=draw(TEXT), trade=draw(TEXT), cost=cost)
    if kind == "fixed":
        return Activity(**common)
    if kind == "explicit":
        return Activity(**common, crash_duration=duration,
                        crash_cost=draw(st.sampled_from([None, cost])))
    if kind == "linear":
        return Activity(**common, crash_duration=draw(st.integers(0, duration - 1)),
                        crash_cost=cost + draw(MONEY))
    days = draw(st.lists(st.integers(1, 5), min_size=1, max_size=3).filter(
        lambda d: sum(d) <= duration))
    rates = sorted(draw(st.lists(MONEY, min_size=len(days), max_size=len(days))))
    steps = tuple(CrashStep(d, r) for d, r in zip(days, rates))
    crash = draw(st.sampled_from([None, duration - sum(days)]))
    return Activity(**common, crash_duration=crash, steps=steps)


@st.composite
def option(draw, name: str) -> Option:
    duration = draw(st.integers(0, 40))
    added = draw(MONEY | MONEY.map(lambda x: -x))  # an option may save money
    crash = draw(st.none() | st.integers(0, duration))
    return Option(name, duration, added, draw(TEXT), crash,
                  0.0 if crash is None else draw(MONEY))


@st.composite
def with_options(draw, activity: Activity) -> Activity:
    """Up to three options (none on a milestone), names unique per activity."""
    if activity.is_milestone:
        return activity
    names = draw(st.lists(TEXT.filter(bool), max_size=3, unique=True))
    return replace(activity, options=tuple(draw(option(n)) for n in names))


@st.composite
def with_progress(draw, activity: Activity, start: date, data_date: date | None) -> Activity:
    """Progress and date fields as the rules allow them: actual dates only with a data date,
    between the project start and the data date; remaining and percent only once started
    (0 and 100 when finished); damages above 0 only with a deadline."""
    fields: dict[str, object] = {}
    if draw(st.booleans()):
        fields["not_before"] = draw(st.dates())
    if draw(st.booleans()):
        fields["deadline"] = draw(st.dates())
        fields["damages_per_day"] = draw(st.just(0.0) | MONEY)
    states = ["waiting"]
    if data_date is not None:
        states.append("started")
        if data_date > start:
            states.append("finished")
    state = draw(st.sampled_from(states))
    if state == "started":
        fields["actual_start"] = draw(st.dates(start, data_date))
        fields["remaining"] = draw(st.none() | st.integers(0, activity.duration))
        fields["percent_complete"] = draw(st.none() | st.floats(0, 100) | st.integers(0, 100).map(float))
    elif state == "finished":
        last = data_date - timedelta(days=1)
        fields["actual_start"] = draw(st.dates(start, last))
        fields["actual_finish"] = draw(st.dates(fields["actual_start"], last))
        fields["remaining"] = draw(st.sampled_from([None, 0]))
        fields["percent_complete"] = draw(st.sampled_from([None, 100.0]))
    return replace(activity, **fields)


@st.composite
def project(draw) -> Project:
    ids = draw(st.lists(ID, min_size=1, max_size=7, unique=True))
    start = draw(st.dates(max_value=date(9000, 1, 1)))
    data_date = draw(st.none() | st.integers(0, 400).map(lambda days: start + timedelta(days=days)))
    activities = tuple(draw(activity(i).flatmap(with_options)
                            .flatmap(lambda a: with_progress(a, start, data_date))) for i in ids)
    pairs = [(a, b) for a in range(len(ids)) for b in range(a + 1, len(ids))]
    chosen = draw(st.lists(st.tuples(st.sampled_from(pairs), st.sampled_from(list(LinkType))),
                           unique=True, max_size=10)) if pairs else []
    links = [Link(ids[a], ids[b], kind, draw(st.integers(-5, 5))) for (a, b), kind in chosen]
    if draw(st.booleans()):  # the order reading the predecessors column gives
        links.sort(key=lambda link: ids.index(link.succ))
    workdays = tuple(sorted(draw(st.sets(st.integers(0, 6), min_size=1))))
    named = {(0, 1, 2, 3, 4): "mon-fri", (0, 1, 2, 3, 4, 5): "mon-sat",
             (0, 1, 2, 3, 4, 5, 6): "all-days"}
    day_names = ("mon", "tue", "wed", "thu", "fri", "sat", "sun")
    calendar = Calendar(workdays, tuple(draw(st.lists(st.dates(), unique=True, max_size=4))),
                        named.get(workdays, ",".join(day_names[d] for d in workdays)))
    # named calendars (any weekdays, none or some holidays), named by some activities
    names = draw(st.lists(CALENDAR_NAME, max_size=3, unique=True))
    calendars = tuple(
        Calendar(tuple(sorted(draw(st.sets(st.integers(0, 6), min_size=1)))),
                 tuple(draw(st.lists(st.dates(), unique=True, max_size=3))), name)
        for name in names)
    activities = tuple(replace(a, calendar=draw(st.sampled_from(["", *names])))
                       for a in activities)
    return Project(
        name=draw(TEXT.filter(bool)),
        start=start,
        activities=activities,
        links=tuple(links),
        calendar=calendar,
        currency=draw(TEXT),
        costs=Costs(draw(MONEY)),
        contract=Contract(draw(st.none() | st.dates()), draw(MONEY), draw(MONEY),
                          draw(st.none() | st.integers(0, 400))),
        data_date=data_date,
        calendars=calendars,
    )


@settings(max_examples=int(os.environ.get("HASTEN_EXAMPLES", "60")), deadline=None,
          suppress_health_check=[HealthCheck.too_slow])
@given(project())
def test_random_projects_round_trip_through_every_form(original):
    with tempfile.TemporaryDirectory() as tmp:
        current = original
        for name in ("folder", "p.xlsx", "p.json", "again"):
            write_project(current, Path(tmp) / name)
            current = read_project(Path(tmp) / name)
            assert current == original, name


# ---------------------------------------------------------------- quick paths of the reader
# The reader takes quick paths for the usual input (plain numbers, full rows, links that
# point down the table, no loop to name); these check that other input still reads right.

def shed(tmp_path: Path, activities: str) -> Path:
    """A minimal folder with the given activities.csv text."""
    (tmp_path / "project.toml").write_text('name = "Shed"\nstart = 2025-01-06\n', encoding="utf-8")
    (tmp_path / "activities.csv").write_text(activities, encoding="utf-8")
    return tmp_path


def test_links_pointing_up_the_table_are_read(tmp_path):
    folder = shed(tmp_path, "id,duration,predecessors\nC,2,B\nB,3,A:SS+1\nA,1,\n")
    assert read_project(folder) == Project(
        "Shed", date(2025, 1, 6), (Activity("C", 2), Activity("B", 3), Activity("A", 1)),
        (Link("B", "C"), Link("A", "B", SS, 1)))


def test_loop_pointing_up_the_table_is_refused(tmp_path):
    error = read_error(shed(tmp_path, "id,duration,predecessors\nA,1,C\nB,3,A\nC,2,B\n"),
                       CycleError)
    assert sorted(error.cycle) == ["A", "B", "C"] and "activities.csv" in error.file


def test_short_rows_and_empty_unnamed_columns(tmp_path):
    # a short row leaves its last cells empty; an empty column without a name is ignored
    folder = shed(tmp_path, "id,duration,name,\nA,1,Alpha,\nB,2\n")
    assert read_project(folder).activities == (Activity("A", 1, "Alpha"), Activity("B", 2))


def test_value_in_a_column_without_a_name_is_refused(tmp_path):
    folder = shed(tmp_path, "id,duration,name,\nA,1,Alpha,\nB,2,Beta,late\n")
    check_error(read_error(folder), file="activities.csv", row=3, column="#4", value="late",
                says="column without a name")


@settings(max_examples=300, deadline=None)
@given(st.text(alphabet="0123456789.\u0663", min_size=1, max_size=20))
def test_digits_read_as_the_decimal_module_reads_them(text):
    """Digits with at most one decimal point (ASCII or other decimal digits such as the
    Arabic-Indic three, any length) read as Python's standard decimal module reads them;
    anything else made of these characters is refused."""
    where = CellRef("activities.csv", 2, "cost")
    if not re.fullmatch(r"\d+(?:\.\d*)?|\.\d+", text):
        with pytest.raises(InputError, match="not a plain number"):
            number_value(text, where)
        return
    exact = Decimal(text)
    assert number_value(text, where) == float(exact)
    if exact == exact.to_integral_value() and int(exact) > WHOLE_LIMIT:
        with pytest.raises(InputError, match="more than"):
            whole_value(text, where)
    elif exact == exact.to_integral_value():
        assert whole_value(text, where) == int(exact)
    else:
        with pytest.raises(InputError, match="not a whole number"):
            whole_value(text, where)


@pytest.mark.parametrize("enabled", [True, False])
def test_reading_leaves_the_garbage_collector_as_it_was(hall, enabled):
    was = gc.isenabled()
    try:
        (gc.enable if enabled else gc.disable)()
        read_project(hall)
        assert gc.isenabled() == enabled
        edit(hall / "activities.csv", "Electrical,6,", "Electrical,six,")
        read_error(hall)
        assert gc.isenabled() == enabled
    finally:
        (gc.enable if was else gc.disable)()


def test_reading_a_folder_leaves_workbook_and_graph_libraries_unimported():
    # openpyxl and networkx take longer to import than most folders take to read: they are
    # imported only for a workbook or to name the activities around a loop
    code = ("import sys; from hasten.formats import read_project; read_project(sys.argv[1]); "
            "print(sorted(m for m in ('openpyxl', 'networkx') if m in sys.modules))")
    run = subprocess.run([sys.executable, "-c", code, str(HALL)], capture_output=True,
                         text=True, check=True)
    assert run.stdout.strip() == "[]"


def test_an_absurdly_large_whole_number_is_a_clear_error(tmp_path):
    """A duration of thousands of digits is a typing slip: a clear error, not a traceback
    when the number is later printed or written (Python limits int-to-text conversion)."""
    folder = tmp_path / "p"
    folder.mkdir()
    (folder / "project.toml").write_text('name = "x"\nstart = 2027-01-04\ncalendar = "mon-fri"\n')
    (folder / "activities.csv").write_text("id,duration\nA," + "9" * 5000 + "\n")
    with pytest.raises(InputError) as err:
        read_project(folder)
    assert err.value.row == 2 and err.value.column == "duration"
    assert "1,000,000" in str(err.value) and "5000 characters" in str(err.value)


@settings(max_examples=300, deadline=None)
@given(st.fixed_dictionaries({
    "id": st.from_regex(r"[A-Za-z0-9_.\-]{1,8}", fullmatch=True),
    "duration": st.from_regex(r"[0-9]{1,6}", fullmatch=True),
    "crash_duration": st.one_of(st.just(""), st.from_regex(r"[0-9]{1,6}", fullmatch=True)),
    "cost": st.one_of(st.just(""), st.from_regex(r"[0-9]{1,6}(\.[0-9]{1,4})?", fullmatch=True)),
    "crash_cost": st.one_of(st.just(""), st.from_regex(r"[0-9]{1,6}(\.[0-9]{1,4})?", fullmatch=True)),
    "name": st.text(max_size=12), "trade": st.text(max_size=6)}))
def test_the_quick_path_for_plain_rows_reads_as_the_full_path(cells):
    """Plain rows are read by a short path (hasten.formats.activities._plain_activity); it must give
    exactly what the full path with all its checks gives, and decline everything else."""
    from hasten.formats.activities import _activity, _plain_activity
    from hasten.formats.tables import Row, Table

    table = Table("activities.csv", tuple(cells), (), 1)
    row = Row(2, {k: v.strip() if isinstance(v, str) else v for k, v in cells.items()})
    quick = _plain_activity(row.cells)
    try:
        full = _activity(row, table, True)  # with_progress=True: the full path
    except InputError:
        assert quick is None
        return
    assert quick is None or quick == full


def test_the_quick_path_takes_plain_rows():
    from hasten.formats.activities import _plain_activity

    assert _plain_activity({"id": "A1", "duration": "5", "crash_duration": "3", "cost": "100",
                            "crash_cost": "160.5", "name": "Pour slab", "trade": "concrete"}) == \
        Activity("A1", 5, name="Pour slab", trade="concrete", crash_duration=3, cost=100.0, crash_cost=160.5)
    assert _plain_activity({"id": "A 1", "duration": "5"}) is None  # a space: the full path says why
    # a row naming a calendar takes the full path, which reads the calendar
    assert _plain_activity({"id": "A1", "duration": "5", "calendar": "crane"}) is None
    assert _plain_activity({"id": "A1", "duration": "5", "calendar": ""}) == Activity("A1", 5)
