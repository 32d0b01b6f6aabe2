"""Bad input found by an adversarial review of the file formats: each case is a clear
:class:`~hasten.errors.InputError` (exit code 2 in the CLI) naming the file, the place and
the fix, never a traceback or a silent misreading.

All projects here are invented for these format checks; the expected messages are written
out by hand. The date limit is Python's: ``datetime.date.max`` is 9999-12-31 (Python
documentation, datetime module).
"""

from __future__ import annotations

import shutil
from datetime import date
from pathlib import Path

import pytest

from hasten.errors import InputError
from hasten.formats import read_project, read_research
from hasten.network import Network
from hasten.cpm import schedule as cpm

DATA = Path(__file__).parent / "data"
HALL = DATA / "formats" / "hall"
J102 = DATA / "psplib_mm" / "j102_2.mm"


def shed(folder: Path, activities: str, settings: str = "") -> Path:
    """A small folder project with the given activities.csv text."""
    folder.mkdir(parents=True, exist_ok=True)
    (folder / "project.toml").write_text('name = "Shed"\nstart = 2025-01-06\n' + settings,
                                         encoding="utf-8")
    (folder / "activities.csv").write_text(activities, encoding="utf-8", newline="")
    return folder


def refused(path: Path) -> InputError:
    with pytest.raises(InputError) as caught:
        read_project(path)
    error = caught.value
    assert "Fix: " in str(error) and error.fix, str(error)
    assert "\n" not in str(error)
    return error


# ---------------------------------------------------------------- B1 huge lags

def test_a_huge_lag_in_the_predecessors_shorthand_is_refused(tmp_path):
    # links.csv already refuses a lag over 1,000,000 working days; the shorthand must too
    lag = "1" + "0" * 30
    error = refused(shed(tmp_path, f"id,duration,predecessors\nA,1,\nB,1,A:FS+{lag}\n"))
    assert error.file.endswith("activities.csv") and error.row == 3
    assert error.column == "predecessors"
    assert "more than 1,000,000 working days" in error.problem


def test_a_lag_of_5000_digits_is_a_clear_error(tmp_path):
    # Python refuses to convert text of more than 4,300 digits to int (sys.int_info)
    error = refused(shed(tmp_path, "id,duration,predecessors\nA,1,\nB,1,A:SS-" + "9" * 5000 + "\n"))
    assert error.row == 3 and "more than 1,000,000 working days" in error.problem
    assert len(str(error)) < 600  # the value is shortened, not printed whole


# ---------------------------------------------------------------- B2 dates past 9999

def test_a_chain_running_past_the_year_9999_is_refused_when_read(tmp_path):
    # four activities of 999,999 working days one after another: about 4 million working
    # days on a mon-fri calendar, about 15,000 years after 2025
    rows = "".join(f"{x},999999,{p}\n" for x, p in zip("ABCD", ["", "A", "B", "C"]))
    error = refused(shed(tmp_path, "id,duration,predecessors\n" + rows))
    assert error.file.endswith("activities.csv") and error.column == "duration"
    assert "past 9999-12-31" in error.problem
    assert "A (999999 working days)" in error.problem and "D (999999" in error.problem


def test_the_same_durations_side_by_side_are_fine(tmp_path):
    # the chain, not the sum, decides: four parallel activities of 999,999 days end in
    # about year 5900 (999,999 working days x 7/5 calendar days, from 2025)
    rows = "".join(f"{x},999999,\n" for x in "ABCD")
    project = read_project(shed(tmp_path, "id,duration,predecessors\n" + rows))
    net = Network(project)
    finish = cpm(net).finish
    assert net.clock.project_finish_date(finish).year < 9999


def test_a_data_date_in_9999_with_work_left_is_refused(tmp_path):
    folder = shed(tmp_path, "id,duration,actual_start,remaining\nA,30,2025-01-06,20\n",
                  "[status]\ndata_date = 9999-12-20\n")
    error = refused(folder)
    assert error.column == "status.data_date" and "past 9999-12-31" in error.problem


def test_a_not_before_date_late_in_9999_is_refused(tmp_path):
    error = refused(shed(tmp_path, "id,duration,not_before\nA,30,9999-12-20\n"))
    assert error.row == 2 and error.column == "not_before"
    assert "past 9999-12-31" in error.problem


# ---------------------------------------------------------------- B3 deep JSON

def test_json_nested_100000_levels_deep_is_a_clear_error(tmp_path):
    path = tmp_path / "deep.json"
    path.write_text('{"project": ' + "[" * 100_000 + "]" * 100_000 + "}", encoding="utf-8")
    error = refused(path)
    assert error.file == str(path) and "nested" in error.problem


def test_toml_nested_deeply_is_a_clear_error(tmp_path):
    folder = shed(tmp_path, "id,duration\nA,1\n")
    (folder / "project.toml").write_text('name = "x"\nstart = 2025-01-06\nholidays = '
                                         + "[" * 100_000 + "]" * 100_000 + "\n")
    error = refused(folder)
    assert error.file.endswith("project.toml") and "nested" in error.problem


# ---------------------------------------------------------------- B4 non-ASCII digits

def test_psplib_count_in_arabic_indic_digits_is_refused(tmp_path):
    # Python's int() reads '١٢' (ARABIC-INDIC DIGIT ONE, TWO) as 12; PSPLIB files are ASCII
    text = J102.read_text(encoding="ascii")
    assert "jobs (incl. supersource/sink ):  12" in text
    path = tmp_path / J102.name
    path.write_text(text.replace("jobs (incl. supersource/sink ):  12",
                                 "jobs (incl. supersource/sink ):  \u0661\u0662"), encoding="utf-8")
    with pytest.raises(InputError) as caught:
        read_research(path)
    error = caught.value
    assert error.file == str(path) and error.row == text[:text.index("jobs (incl.")].count("\n") + 1
    assert "not plain ASCII: U+0661 ARABIC-INDIC DIGIT ONE" in error.problem


# ---------------------------------------------------------------- B5 errors name the source

SM = sorted((DATA / "psplib_sm").glob("*.sm"))[0]


def test_import_of_a_too_long_duration_names_the_source_line(tmp_path):
    from hasten.formats import import_research

    lines = SM.read_text(encoding="ascii").splitlines(keepends=True)
    at = next(i for i, line in enumerate(lines) if line.startswith("REQUESTS/DURATIONS")) + 4
    fields = lines[at].split()  # job 2, mode 1, its duration, the resource amounts
    lines[at] = "  ".join(fields[:2] + ["2000000"] + fields[3:]) + "\n"
    source = tmp_path / SM.name
    source.write_text("".join(lines), encoding="ascii")
    target = tmp_path / "out"
    with pytest.raises(InputError) as caught:
        import_research(source, target)
    error = caught.value
    assert error.file == str(source) and error.row == at + 1 and error.column == "duration"
    assert "out" not in str(error).replace(str(tmp_path), "") and not target.exists()


def test_import_of_a_chain_past_9999_names_the_source(tmp_path):
    from hasten.formats import import_research

    lines = SM.read_text(encoding="ascii").splitlines(keepends=True)
    first = next(i for i, line in enumerate(lines) if line.startswith("REQUESTS/DURATIONS")) + 3
    for i in range(first + 1, first + 40):  # every job lasts 999,999 periods
        fields = lines[i].split()
        if len(fields) < 3 or not fields[0].isdigit():
            break
        lines[i] = "  ".join(fields[:2] + ["999999"] + fields[3:]) + "\n"
    source = tmp_path / SM.name
    source.write_text("".join(lines), encoding="ascii")
    with pytest.raises(InputError) as caught:
        import_research(source, tmp_path / "out.xlsx")
    assert caught.value.file == str(source) and "past 9999-12-31" in str(caught.value)
    assert not (tmp_path / "out.xlsx").exists()


def test_writing_an_invalid_project_never_names_the_target(tmp_path):
    from hasten.formats import write_project
    from hasten.project import Activity, Project

    bad = Project("Shed", date(2025, 1, 6), (Activity("A", 3, crash_duration=2),))
    target = tmp_path / "out"
    with pytest.raises(InputError) as caught:
        write_project(bad, target, source="in.json")
    error = caught.value
    assert error.file == "in.json"
    assert error.problem.startswith("the project read from here cannot be written (activity A, "
                                    "column 'crash_cost'): 'A' can be shortened to 2 days but "
                                    "its crash cost is empty")
    assert str(target) not in str(error) and not target.exists()
    with pytest.raises(InputError) as caught:
        write_project(bad, target)
    assert caught.value.file is None and str(target) not in str(caught.value)
    assert str(caught.value).startswith("the project cannot be written")


# ---------------------------------------------------------------- B6, B11 CSV quotes and cells

def test_an_unclosed_quote_is_named_not_an_empty_duration(tmp_path):
    folder = shed(tmp_path, 'id,name,duration\nA,Site office,3\nB,"Formwork,4\nC,Pour,5\n')
    error = refused(folder)
    assert error.file.endswith("activities.csv") and error.row == 3 and error.column == "name"
    assert "a quote opened here is never closed" in error.problem
    assert "duration is empty" not in str(error)


def test_an_unclosed_quote_in_a_long_file_is_named_not_a_too_long_cell(tmp_path):
    rows = "".join(f"X{i},Pour,5\n" for i in range(30_000))  # more than the field limit
    error = refused(shed(tmp_path, 'id,name,duration\nA,"Site office,3\n' + rows))
    assert error.row == 2 and "never closed" in error.problem


def test_a_cell_over_the_csv_field_limit_is_named_as_too_long(tmp_path):
    # Python's csv module refuses fields over csv.field_size_limit(), 131,072 by default
    folder = shed(tmp_path, 'id,name,duration\nA,Site office,3\nB,"' + "x" * 200_000 + '",4\n')
    error = refused(folder)
    assert error.row == 3 and "longer than 131,072 characters" in error.problem
    assert "quote" not in error.problem and len(str(error)) < 600


# ---------------------------------------------------------------- B7 JSON keys

def json_project(tmp_path: Path, activities_text: str, project_text: str = "") -> Path:
    path = tmp_path / "p.json"
    path.write_text('{"project": {"name": "Shed", "start": "2025-01-06"' + project_text + '}, '
                    '"activities": [' + activities_text + ']}', encoding="utf-8")
    return path


def test_json_record_with_a_duplicate_key_is_refused(tmp_path):
    # json.loads keeps the last of two equal keys without a word
    path = json_project(tmp_path, '{"id": "A", "duration": 3}, '
                                  '{"id": "B", "duration": 4, "duration": 5}')
    error = refused(path)
    assert error.file.endswith("p.json (activities)") and error.row == 2
    assert error.column == "duration" and "the key appears twice" in error.problem


def test_json_keys_differing_only_in_case_are_refused(tmp_path):
    path = json_project(tmp_path, '{"id": "A", "ID": "B", "duration": 3}')
    error = refused(path)
    assert error.row == 1 and error.column == "id"
    assert "'id' and 'ID'" in error.problem


def test_json_settings_with_a_duplicate_key_are_refused(tmp_path):
    path = json_project(tmp_path, '{"id": "A", "duration": 3}', ', "name": "Barn"')
    error = refused(path)
    assert error.file.endswith("p.json (project)") and error.column == "name"
    assert "the key appears twice" in error.problem


# ---------------------------------------------------------------- B8 formulas never calculated

def test_a_formula_without_a_saved_value_is_named(tmp_path):
    import openpyxl

    from hasten.formats import write_project

    write_project(read_project(HALL), tmp_path / "p.xlsx")
    book = openpyxl.load_workbook(tmp_path / "p.xlsx")
    assert book["activities"]["D3"].value == 5  # 020's duration
    book["activities"]["D3"] = "=2+3"  # openpyxl stores the formula without a value
    book.save(tmp_path / "p.xlsx")
    error = refused(tmp_path / "p.xlsx")
    assert error.file.endswith("p.xlsx (sheet activities)") and error.row == 3
    assert error.column == "duration" and error.value == "=2+3"
    assert "a formula that was never calculated" in error.problem
    assert "open the workbook in a spreadsheet program and save it" in error.fix


# ---------------------------------------------------------------- B9 folders and files

def test_a_folder_named_like_a_json_file_is_named_as_a_folder(tmp_path):
    (tmp_path / "p.json").mkdir()
    error = refused(tmp_path / "p.json")
    assert error.file == str(tmp_path / "p.json") and "is a folder" in error.problem
    assert "not found" not in str(error)


@pytest.mark.parametrize("name", ["project.toml", "activities.csv", "links.csv"])
def test_a_folder_where_a_project_file_belongs_is_named(tmp_path, name):
    folder = Path(shutil.copytree(HALL, tmp_path / "hall"))
    target = folder / name
    target.unlink()
    target.mkdir()
    error = refused(folder)
    assert error.file == str(target) and "is a folder, not a file" in error.problem


def test_a_research_path_that_is_a_folder_is_named(tmp_path):
    (tmp_path / "j30.sm").mkdir()
    with pytest.raises(InputError) as caught:
        read_research(tmp_path / "j30.sm")
    assert "is a folder, not a file" in caught.value.problem


def test_a_file_where_a_project_folder_belongs_is_named(tmp_path):
    (tmp_path / "hall").write_text("not a folder", encoding="utf-8")
    error = refused(tmp_path / "hall")
    assert "found a file" in error.problem and "not found" not in str(error)  # already so


# ---------------------------------------------------------------- B10 a weekday twice

@pytest.mark.parametrize("settings, key", [
    ('calendar = ["mon", "mon"]\n', "calendar"),
    ('[calendars.crane]\nworkdays = ["mon", "tue", "Mon"]\n', "calendars.crane.workdays"),
])
def test_a_weekday_listed_twice_is_named(tmp_path, settings, key):
    error = refused(shed(tmp_path, "id,duration\nA,1\n", settings))
    assert error.column == key and "the weekday 'mon' is listed twice" in error.problem
    assert "unknown calendar" not in error.problem


# ---------------------------------------------------------------- B12 ids that look alike

def test_an_id_with_a_zero_width_space_is_refused(tmp_path):
    # 'A' and 'A' + ZERO WIDTH SPACE (U+200B, Unicode category Cf) look the same on screen
    error = refused(shed(tmp_path, "id,duration,predecessors\nA,1,\nA\u200b,2,A\n"))
    assert error.row == 3 and error.column == "id"
    assert "invisible character U+200B ZERO WIDTH SPACE" in error.problem


def test_a_predecessor_with_an_invisible_character_is_named(tmp_path):
    error = refused(shed(tmp_path, "id,duration,predecessors\nA,1,\nB,2,\u2060A\n"))
    assert error.row == 3 and error.column == "predecessors"
    assert "invisible character U+2060 WORD JOINER" in error.problem


def test_ids_compare_after_unicode_normalisation(tmp_path):
    # 'é' as one code point (U+00E9) and as 'e' + COMBINING ACUTE ACCENT (U+0301) are the
    # same text in Unicode normal form C (Unicode Standard Annex #15)
    project = read_project(shed(tmp_path / "one",
                                "id,duration,predecessors\n\u00e9,1,\nB,2,e\u0301:SS\n"))
    assert [a.id for a in project.activities] == ["\u00e9", "B"]
    assert project.links[0].pred == "\u00e9"
    error = refused(shed(tmp_path / "two", "id,duration\n\u00e9,1\ne\u0301,2\n"))
    assert error.row == 3 and "the id is used twice: rows 2 and 3" in error.problem


def test_crash_steps_and_links_tables_refer_to_ids_after_normalisation(tmp_path):
    folder = shed(tmp_path, "id,duration,crash_duration,cost,crash_cost\n\u00e9,4,,100,\nB,2,,,\n")
    (folder / "crash_steps.csv").write_text("id,days,cost_per_day\ne\u0301,1,50\n",
                                            encoding="utf-8")
    (folder / "links.csv").write_text("predecessor,successor\ne\u0301,B\n", encoding="utf-8")
    project = read_project(folder)
    assert project.activities[0].steps[0].days == 1 and project.links[0].pred == "\u00e9"


# ---------------------------------------------------------------- B13 one line per message

def test_a_line_break_in_a_predecessor_stays_escaped_in_the_message(tmp_path):
    error = refused(shed(tmp_path, 'id,duration,predecessors\nA,1,\nB,2,"A\nC"\n'))
    assert "unknown predecessor id 'A\\nC'" in str(error)


def test_a_line_break_in_an_option_name_stays_escaped(tmp_path):
    folder = shed(tmp_path, "id,duration\nA,5\n")
    (folder / "options.csv").write_text('id,option,duration,added_cost\nA,"two\ncrews",3,10\n'
                                        'A,"two\ncrews",4,5\n', encoding="utf-8")
    error = refused(folder)
    assert "the option 'two\\ncrews' of 'A' is given twice" in str(error)


def test_control_characters_in_a_path_stay_escaped(tmp_path):
    folder = tmp_path / "site\nB\x1b[31m"
    shed(folder, "id,duration\nA,1\n")
    (folder / "activities.csv").unlink()
    error = refused(folder)
    assert "site\\nB\\x1b[31m" in str(error)


def test_a_line_break_in_a_header_stays_escaped(tmp_path):
    error = refused(shed(tmp_path, 'id,duration,"na\nme"\nA,1,x\n'))
    assert "na\\nme" in str(error)


# ---------------------------------------------------------------- B14 formula injection
# OWASP, "CSV Injection": cells starting with = + - @ (tab, carriage return) are run as
# formulas by spreadsheet programs; a leading single quote makes them text.

from hypothesis import given  # noqa: E402
from hypothesis import strategies as st  # noqa: E402

from hasten.formats.csvtext import neutral_text, restored_text  # noqa: E402

ODD_NAMES = ["=HYPERLINK(\"http://x\";\"y\")", "+1 crane", "-ground floor", "@home", "'Tis",
             "'=quoted on purpose", "''", "'", "'-", "plain", "a=b"]


@given(st.text(max_size=8) | st.sampled_from(ODD_NAMES))
def test_reading_undoes_exactly_what_writing_did(text):
    assert restored_text(neutral_text(text)) == text
    assert not neutral_text(text)[:1] in ("=", "+", "-", "@", "\t", "\r")


def test_csv_text_cells_are_neutralised_and_read_back(tmp_path):
    from hasten.formats import convert, write_project
    from hasten.project import Activity, Link, LinkType, Option, Project

    project = Project("=cmd|' /C calc'!A0", date(2025, 1, 6), tuple(
        Activity(f"=A{i}" if i == 0 else f"-A{i}", 3, name, "+trade", options=(
            Option("@second crew", 2, -150.0, "'=note"),)) for i, name in enumerate(ODD_NAMES)),
        links=(Link("=A0", "-A1", LinkType.SS, -2),))
    write_project(project, tmp_path / "p")
    text = (tmp_path / "p" / "activities.csv").read_text(encoding="utf-8")
    assert "'=HYPERLINK" in text and ",'+trade," in text and "\n'=A0," in text
    assert "\n'-A1," in text and ",'=A0:SS-2" in text  # ids and the predecessors text
    assert ",''=quoted on purpose," in text and ",'Tis," in text
    options = (tmp_path / "p" / "options.csv").read_text(encoding="utf-8")
    assert ",'@second crew,2,-150,''=note," in options  # the number -150 unchanged
    assert read_project(tmp_path / "p") == project
    convert(tmp_path / "p", tmp_path / "p.xlsx")
    convert(tmp_path / "p.xlsx", tmp_path / "q")
    assert read_project(tmp_path / "q") == project


def test_workbook_text_starting_with_an_equals_sign_is_a_text_cell(tmp_path):
    # already so before this review: openpyxl cells of data type "s" are never formulas
    import openpyxl

    from hasten.formats import write_project
    from hasten.project import Activity, Project

    write_project(Project("P", date(2025, 1, 6), (Activity("A", 1, "=1+1"),)), tmp_path / "p.xlsx")
    cell = openpyxl.load_workbook(tmp_path / "p.xlsx")["activities"]["B2"]
    assert cell.value == "=1+1" and cell.data_type == "s"
