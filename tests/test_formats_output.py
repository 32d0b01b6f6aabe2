"""Output files of the commands (hasten.formats.output and hasten.formats.files): checks
before any computing, result tables as CSV or workbook, whole-or-nothing writing.

The tables here are invented for these format checks; expected cells are written out by
hand. The CSV text rule follows the OWASP "CSV Injection" guidance (a leading single
quote before = + - @); Excel's sheet-name rules (at most 31 characters, none of
[ ] : * ? / \\) are from memory of its documentation.
"""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import textwrap
from datetime import date, datetime
from pathlib import Path

import openpyxl
import pytest

from hasten.errors import InputError
from hasten.formats.files import temp_path, write_file
from hasten.formats.output import (TableSheet, check_output_folder, check_output_target,
                                   write_table, write_workbook)

SRC = Path(__file__).resolve().parents[1] / "src"
COLUMNS = ("id", "name", "early_start", "cost", "driving", "float")
ROWS = [
    {"id": "A", "name": "=HYPERLINK(\"x\")", "early_start": "2025-03-03", "cost": 1250.5,
     "driving": [], "float": 0},
    {"id": "B", "name": "-ground slab", "early_start": date(2025, 3, 10), "cost": 800,
     "driving": ["A", "C"], "float": -2},
]


# ---------------------------------------------------------------- checks before the work

def test_an_existing_target_needs_force(tmp_path):
    target = tmp_path / "plan.csv"
    target.write_text("old", encoding="utf-8")
    with pytest.raises(InputError) as caught:
        check_output_target(target)
    assert caught.value.file == str(target) and "already exists" in caught.value.problem
    assert "--force" in caught.value.fix
    assert check_output_target(target, force=True) == target.resolve()


@pytest.mark.parametrize("where", ["the input file", "inside the input folder",
                                   "the input folder"])
def test_a_target_in_the_input_is_always_refused(tmp_path, where, monkeypatch):
    project = tmp_path / "site"
    project.mkdir()
    (project / "activities.csv").write_text("id,duration\n", encoding="utf-8")
    monkeypatch.chdir(tmp_path)
    inputs = {"the input file": [tmp_path / "site.json"], "inside the input folder": ["site"],
              "the input folder": ["site"]}[where]
    target = {"the input file": tmp_path / "site.json",
              "inside the input folder": project / "activities.csv",
              "the input folder": Path("site")}[where]
    for force in (False, True):
        with pytest.raises(InputError) as caught:
            check_output_target(target, inputs=inputs, force=force)
        assert caught.value.file == str(target) and "the input project" in caught.value.problem
        assert "outside the input project" in caught.value.fix


def test_a_missing_parent_folder_is_named(tmp_path):
    with pytest.raises(InputError) as caught:
        check_output_target(tmp_path / "nope" / "plan.csv")
    assert "the folder to write into does not exist" in caught.value.problem
    assert "create the folder first" in caught.value.fix


def test_a_folder_as_the_file_target_is_named(tmp_path):
    (tmp_path / "plan.csv").mkdir()
    with pytest.raises(InputError) as caught:
        check_output_target(tmp_path / "plan.csv", force=True)
    assert "this is a folder, not a file" in caught.value.problem
    assert "plan.csv/out.csv" in caught.value.fix


def test_a_read_only_folder_is_named(tmp_path, monkeypatch):
    # the tests may run as root, for whom permissions do not apply: the check asks os.access
    monkeypatch.setattr("hasten.formats.output.os.access", lambda path, mode: False)
    with pytest.raises(InputError) as caught:
        check_output_target(tmp_path / "plan.csv")
    assert "read-only" in caught.value.problem
    with pytest.raises(InputError) as caught:
        check_output_folder(tmp_path / "demo" / "inner")
    assert "read-only" in caught.value.problem


def test_a_name_too_long_for_the_file_system_is_named(tmp_path):
    with pytest.raises(InputError) as caught:
        check_output_target(tmp_path / ("x" * 300 + ".csv"))
    assert "304 bytes long" in caught.value.problem and "shorter name" in caught.value.fix


def test_a_legal_250_character_name_is_written(tmp_path):
    # the temporary name ('.' + name + '.1a2b3c4d.part.csv') would pass 255 bytes
    target = tmp_path / ("x" * 246 + ".csv")
    assert len(target.name) == 250
    check_output_target(target)
    assert len(temp_path(target).name.encode()) <= 255
    write_table(target, COLUMNS, ROWS, sheet_name="schedule")
    assert target.read_text(encoding="utf-8").startswith("id,name,")
    assert [p.name for p in tmp_path.iterdir()] == [target.name]


def test_check_output_folder_for_the_demo(tmp_path):
    assert check_output_folder(tmp_path / "new" / "demo") == (tmp_path / "new" / "demo").resolve()
    (tmp_path / "full").mkdir()
    (tmp_path / "full" / "x").write_text("", encoding="utf-8")
    with pytest.raises(InputError, match="the folder is not empty"):
        check_output_folder(tmp_path / "full")
    with pytest.raises(InputError, match="this is a file, not a folder"):
        check_output_folder(tmp_path / "full" / "x")
    with pytest.raises(InputError, match="input project"):
        check_output_folder(tmp_path / "full" / "demo", inputs=[tmp_path / "full"])


# ---------------------------------------------------------------- result tables

def test_csv_table(tmp_path):
    write_table(tmp_path / "t.csv", COLUMNS, ROWS, sheet_name="schedule")
    assert (tmp_path / "t.csv").read_text(encoding="utf-8") == (
        "id,name,early_start,cost,driving,float\n"
        "A,\"'=HYPERLINK(\"\"x\"\")\",2025-03-03,1250.5,,0\n"
        "B,'-ground slab,2025-03-10,800,A; C,-2\n")


def test_workbook_table(tmp_path):
    write_table(tmp_path / "t.xlsx", COLUMNS, ROWS, sheet_name="schedule",
                date_columns=("early_start",), money_columns=("cost",), currency="EUR")
    book = openpyxl.load_workbook(tmp_path / "t.xlsx")
    assert book.sheetnames == ["schedule"]
    sheet = book["schedule"]
    assert [c.value for c in sheet[1]] == list(COLUMNS)
    assert sheet["C2"].value == datetime(2025, 3, 3) and sheet["C2"].number_format == "yyyy-mm-dd"
    assert sheet["C3"].value == datetime(2025, 3, 10) and sheet["C3"].is_date
    assert sheet["D2"].value == 1250.5 and sheet["D2"].number_format == '#,##0.00 "EUR"'
    assert sheet["B2"].value == '=HYPERLINK("x")' and sheet["B2"].data_type == "s"
    assert sheet["E3"].value == "A; C" and sheet["F3"].value == -2 and sheet["F3"].data_type == "n"


@pytest.mark.parametrize("name", ["x.txt", "x", "x.xls"])
def test_other_suffixes_are_refused_never_renamed(tmp_path, name):
    with pytest.raises(InputError) as caught:
        write_table(tmp_path / name, COLUMNS, ROWS, sheet_name="schedule")
    assert ".csv, .xlsx" in caught.value.fix
    assert list(tmp_path.iterdir()) == []


def test_workbook_of_several_sheets(tmp_path):
    write_workbook(tmp_path / "r.xlsx", [
        TableSheet("schedule", COLUMNS, ROWS, ("early_start",)),
        TableSheet("cost curve", ("finish", "added_cost"), [(40, 0), (39, 450.0)],
                   money_columns=("added_cost",), currency="$")])
    book = openpyxl.load_workbook(tmp_path / "r.xlsx")
    assert book.sheetnames == ["schedule", "cost curve"]
    assert book["cost curve"]["B3"].value == 450 and "$" in book["cost curve"]["B3"].number_format
    with pytest.raises(InputError, match="not a possible sheet name"):
        write_workbook(tmp_path / "s.xlsx", [TableSheet("a/b", ("x",), [])])


# ---------------------------------------------------------------- whole or nothing

def test_sigterm_while_writing_leaves_no_part_file(tmp_path):
    script = textwrap.dedent(f"""
        import sys, time
        from pathlib import Path
        sys.path.insert(0, {str(SRC)!r})
        from hasten.formats.files import write_file

        def slow(tmp):
            tmp.write_text("half a table", encoding="utf-8")
            print("writing", flush=True)
            time.sleep(60)

        write_file(Path({str(tmp_path / 'plan.csv')!r}), slow)
    """)
    run = subprocess.Popen([sys.executable, "-c", script], stdout=subprocess.PIPE, text=True)
    assert run.stdout.readline().strip() == "writing"
    assert any(p.name.endswith(".part.csv") for p in tmp_path.iterdir())
    run.send_signal(signal.SIGTERM)
    assert run.wait(timeout=30) == 128 + signal.SIGTERM
    assert list(tmp_path.iterdir()) == []


def test_the_sigterm_handler_is_restored_after_writing(tmp_path):
    before = signal.getsignal(signal.SIGTERM)
    write_file(tmp_path / "x.txt", lambda tmp: tmp.write_text("x", encoding="utf-8"))
    assert signal.getsignal(signal.SIGTERM) is before
    assert (tmp_path / "x.txt").read_text(encoding="utf-8") == "x"
    assert os.listdir(tmp_path) == ["x.txt"]
