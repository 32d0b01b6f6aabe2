"""Duration ranges in the three forms (hasten.formats.risk): the ``optimistic`` /
``pessimistic`` columns and the ``[risk]`` section, read, written and converted without
loss, and refused with the file, row, column, value and fix when wrong.

All data here is invented for these tests (format checks, not reference checks); expected
values are written out by hand from the text of the files below.
"""

from __future__ import annotations

import json
from pathlib import Path

import openpyxl
import pytest

from hasten.errors import InputError
from hasten.formats import convert, read_project
from hasten.project import Risk
from hasten.uncertainty import project_ranges

TOML = """name = "Ranges test"
start = 2026-03-02

[risk]
default = "-10%, +25%"
distribution = "triangular"

[risk.trades]
concrete = "-5%, +40%"
"dry lining" = "-0%, +20%"

[risk.correlation]
concrete = 0.5
"""
CSV = """id,name,trade,duration,optimistic,pessimistic,predecessors
A,Slab,concrete,10,,,
B,Walls,dry lining,5,,,A
C,Doors,joinery,4,3,9,B
D,Handover,,0,,,C
E,Signs,,6,,8,A
"""


def folder(tmp_path: Path, toml: str = TOML, csv: str = CSV) -> Path:
    path = tmp_path / "p"
    path.mkdir()
    (path / "project.toml").write_text(toml, encoding="utf-8")
    (path / "activities.csv").write_text(csv, encoding="utf-8")
    return path


def error_of(path: Path) -> InputError:
    with pytest.raises(InputError) as err:
        read_project(path)
    return err.value


def test_ranges_and_the_risk_section_read_as_written(tmp_path):
    p = read_project(folder(tmp_path))
    assert p.risk == Risk("-10%, +25%", "triangular", (("concrete", "-5%, +40%"), ("dry lining", "-0%, +20%")),
                          (("concrete", 0.5),))
    got = {a.id: (a.optimistic, a.pessimistic) for a in p.activities}
    assert got == {"A": (None, None), "B": (None, None), "C": (3, 9), "D": (None, None), "E": (None, 8)}
    r = project_ranges(p)
    # by hand: A concrete 10 -> 9.5..14; B dry lining 5 -> 5..6; C own 3..9; D milestone;
    # E: optimistic from the default 6 * 0.9 = 5.4, pessimistic its own 8
    assert r.optimistic == (9.5, 5.0, 3.0, 0.0, 5.4)
    assert r.pessimistic == (14.0, 6.0, 9.0, 0.0, 8.0)
    assert r.distribution == "triangular" and r.trades == ("concrete",) and r.weights == (0.5,)


def test_ranges_convert_without_loss_through_every_form(tmp_path):
    src = folder(tmp_path)
    p = read_project(src)
    for target in ("p.xlsx", "p.json", "back"):
        convert(src, tmp_path / target)
        assert read_project(tmp_path / target) == p, target
    convert(tmp_path / "p.xlsx", tmp_path / "again.json")
    assert read_project(tmp_path / "again.json") == p


def test_written_layouts(tmp_path):
    src = folder(tmp_path)
    convert(src, tmp_path / "p.json")
    data = json.loads((tmp_path / "p.json").read_text(encoding="utf-8"))
    assert data["project"]["risk"] == {"default": "-10%, +25%", "distribution": "triangular",
                                       "trades": {"concrete": "-5%, +40%", "dry lining": "-0%, +20%"},
                                       "correlation": {"concrete": 0.5}}
    assert data["activities"][2]["optimistic"] == 3 and data["activities"][2]["pessimistic"] == 9
    convert(src, tmp_path / "p.xlsx")
    sheet = openpyxl.load_workbook(tmp_path / "p.xlsx")["project"]
    keys = {row[0]: row[1] for row in sheet.iter_rows(min_row=2, values_only=True)}
    assert keys["risk.default"] == "-10%, +25%" and keys["risk.trades.dry lining"] == "-0%, +20%"
    assert keys["risk.correlation.concrete"] == 0.5 and keys["risk.distribution"] == "triangular"
    convert(src, tmp_path / "back")
    text = (tmp_path / "back" / "project.toml").read_text(encoding="utf-8")
    assert '[risk.trades]\nconcrete = "-5%, +40%"\n"dry lining" = "-0%, +20%"' in text
    header = (tmp_path / "back" / "activities.csv").read_text(encoding="utf-8").splitlines()[0]
    assert header.endswith(",optimistic,pessimistic")


def test_a_project_without_ranges_keeps_its_layout(tmp_path):
    plain = folder(tmp_path, 'name = "Plain"\nstart = 2026-03-02\n', "id,duration\nA,3\n")
    convert(plain, tmp_path / "out")
    assert "risk" not in (tmp_path / "out" / "project.toml").read_text(encoding="utf-8")
    assert "optimistic" not in (tmp_path / "out" / "activities.csv").read_text(encoding="utf-8")


@pytest.mark.parametrize("cells, row, column, value, says", [
    ("C,Doors,joinery,4,5,9,B", 4, "optimistic", "5", "longer than the duration (4)"),
    ("C,Doors,joinery,4,3,3,B", 4, "pessimistic", "3", "shorter than the duration (4)"),
    ("C,Doors,joinery,4,2.5,9,B", 4, "optimistic", "2.5", "whole"),
    ("C,Doors,joinery,4,3,-9,B", 4, "pessimistic", "-9", ""),
    ("D,Handover,,0,,2,C", 5, "pessimistic", "2", "milestone"),
])
def test_a_bad_range_cell_names_its_place_and_fix(tmp_path, cells, row, column, value, says):
    lines = CSV.splitlines()
    ident = cells.split(",")[0]
    lines = [cells if ln.startswith(ident + ",") else ln for ln in lines]
    path = folder(tmp_path, csv="\n".join(lines) + "\n")
    e = error_of(path)
    assert e.file == str(path / "activities.csv") and e.row == row and e.column == column
    assert e.value == value and e.fix and says in str(e)


@pytest.mark.parametrize("old, new, key, says", [
    ('default = "-10%, +25%"', 'default = "+25%"', "risk.default", "not two percentages"),
    ('default = "-10%, +25%"', 'default = "+10%, -25%"', "risk.default", "shorter side first"),
    ('default = "-10%, +25%"', "default = 0.25", "risk.default", "two percentages"),
    ('distribution = "triangular"', 'distribution = "normal"', "risk.distribution", "unknown distribution"),
    ("concrete = 0.5", "concrete = 1.5", "risk.correlation.concrete", "outside 0 to 1"),
    ("concrete = 0.5", "roofing = 0.5", "risk.correlation.roofing", "no activity has the trade"),
    ('"dry lining" =', '"dry-lining" =', "risk.trades.dry-lining", "did you mean 'dry lining'"),
    ('distribution = "triangular"', 'distrbution = "pert"', "risk.distrbution", "did you mean 'risk.distribution'"),
])
def test_a_bad_risk_setting_names_its_key_and_fix(tmp_path, old, new, key, says):
    assert old in TOML
    path = folder(tmp_path, TOML.replace(old, new))
    e = error_of(path)
    assert e.file == str(path / "project.toml") and e.column == key and e.fix and says in str(e)


def test_risk_must_be_a_section(tmp_path):
    e = error_of(folder(tmp_path, 'name = "X"\nstart = 2026-03-02\nrisk = "-10%, +25%"\n', "id,duration\nA,3\n"))
    assert e.column == "risk" and "[risk]" in e.fix


def test_workbook_and_json_errors_name_their_place(tmp_path):
    src = folder(tmp_path)
    convert(src, tmp_path / "p.xlsx")
    book = openpyxl.load_workbook(tmp_path / "p.xlsx")
    sheet = book["project"]
    for row in sheet.iter_rows(min_row=2):
        if row[0].value == "risk.trades.concrete":
            row[1].value = "-5%"
            line = row[0].row
    book.save(tmp_path / "p.xlsx")
    e = error_of(tmp_path / "p.xlsx")
    assert e.row == line and e.column == "risk.trades.concrete" and "(sheet project)" in e.file
    convert(src, tmp_path / "p.json")
    data = json.loads((tmp_path / "p.json").read_text(encoding="utf-8"))
    data["activities"][4]["pessimistic"] = 2
    (tmp_path / "p.json").write_text(json.dumps(data), encoding="utf-8")
    e = error_of(tmp_path / "p.json")
    assert e.row == 5 and e.column == "pessimistic" and "shorter than the duration (6)" in str(e)
