"""The folder form: ``project.toml``, ``activities.csv`` and optional ``links.csv``,
``crash_steps.csv`` and ``options.csv``.

``project.toml`` may have a ``[status]`` section with ``data_date``; ``activities.csv`` may
have the progress and date columns ``actual_start``, ``actual_finish``, ``remaining``,
``percent_complete``, ``not_before``, ``deadline`` and ``damages_per_day`` (dates as
``YYYY-MM-DD``; see :mod:`hasten.formats.parse` for their rules).

``project.toml`` may define further calendars as ``[calendars.NAME]`` tables with
``workdays`` and optional ``holidays`` (see :mod:`hasten.formats.settings`), which
activities name in an optional ``calendar`` column.

``options.csv`` lists discrete ways to perform an activity, one per row, with the columns
``id``, ``option``, ``duration``, ``added_cost`` and optional ``note``, ``crash_duration``,
``cost_per_day`` (the option's own linear shortening; both or neither).

CSV files are read as UTF-8 (a byte-order mark is allowed) with any line endings; every cell
is text. Row numbers in messages are CSV line numbers as a spreadsheet shows them: the
header is row 1, the first data row is row 2, blank lines are skipped but counted. Files are
written as UTF-8 without byte-order mark, with ``\\n`` line endings. A text cell that a
spreadsheet would run as a formula (starting ``=``, ``+``, ``-``, ``@``) is written with a
single quote in front, which reading removes again (see :mod:`hasten.formats.csvtext`).
"""

from __future__ import annotations

import csv
import difflib
import io
import re
import tomllib
from collections.abc import Iterator, Sequence
from itertools import repeat
from pathlib import Path

from hasten.errors import InputError
from hasten.formats.cells import CellRef
from hasten.formats.csvtext import csv_value, restored_text
from hasten.formats.document import Document
from hasten.formats.files import write_folder
from hasten.formats.columns import LINK_COLUMNS, OPTION_COLUMNS, STEP_COLUMNS
from hasten.formats.settings import flatten, nest
from hasten.formats.tables import ColumnRows, Settings, Table, Tables, column_names, table_from_grid
from hasten.formats.tomlwrite import toml_text

__all__ = ["FILES", "labels", "read", "write"]

FILES = {
    "settings": "project.toml",
    "activities": "activities.csv",
    "links": "links.csv",
    "crash_steps": "crash_steps.csv",
    "options": "options.csv",
}
_OPTIONAL = ("links", "crash_steps", "options")
_COLUMNS = {"links": LINK_COLUMNS, "crash_steps": STEP_COLUMNS, "options": OPTION_COLUMNS}
_TOML_PLACE = re.compile(r"\(at line (\d+), column (\d+)\)")


def labels(folder: Path) -> dict[str, str]:
    """How each table is named in messages: its file path."""
    return {key: str(folder / name) for key, name in FILES.items()}


def _decode(path: Path) -> str:
    """The file's text (UTF-8, optional BOM); unreadable files are input errors."""
    try:
        return path.read_bytes().decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise InputError("the file is not UTF-8 text", file=str(path), value=f"byte {exc.start}",
                         fix="save it as 'CSV UTF-8' / UTF-8 text") from None
    except OSError as exc:
        raise InputError(f"cannot read the file: {exc.strerror}", file=str(path),
                         fix="check the path and the file permissions") from None


class _Records:
    """(line number of the record's first line, cells) for each CSV record, remembering
    where the record being read starts (for the messages about broken quotes)."""

    def __init__(self, text: str):
        self.text = text
        self.rows = csv.reader(io.StringIO(text, newline=""))
        self.start = 1  # the first line of the record being read
        self.quoted = "'" in text  # some cell may carry the quote that keeps a formula text

    def __iter__(self) -> Iterator[tuple[int, Sequence[str]]]:
        for cells in self.rows:
            if self.quoted:
                cells = [restored_text(cell) for cell in cells]
            yield self.start, cells
            self.start = self.rows.line_num + 1

    def unclosed_quote(self, start: int) -> bool:
        """True when the record starting on line ``start`` opens a quote it never closes
        (the csv module then reads the rest of the file into one cell)."""
        lines = io.StringIO(self.text, newline="").readlines()
        tail = "".join(lines[start - 1:])
        try:
            for _ in csv.reader(io.StringIO(tail, newline=""), strict=True):
                pass
        except csv.Error as exc:
            return "end of data" in str(exc) or tail.count('"') % 2 == 1
        return False


_QUOTE_FIX = ('close the quote, or write a quote inside a text as two quotes, "like ""this"""')


# in a CSV text without quotes: a cell with white space around it, or starting with the
# quote that keeps a formula text (a line break ends a cell, so it is not white space here)
_TO_CLEAN = re.compile(r"(?:^|,)(?:[^\S\n]|')|[^\S\n](?:,|$)", re.MULTILINE)
_ASCII_SPACES = " \t\x0b\x0c\x1c\x1d\x1e\x1f"  # what str.isspace() calls a space, but "\n", "\r"


def _to_clean(text: str) -> bool:
    """True when some cell of ``text`` (CSV without quotes) has white space around it or
    starts with a quote (:data:`_TO_CLEAN`), found by plain substring searches in ASCII
    text, many times quicker than the pattern."""
    if not text.isascii():
        return _TO_CLEAN.search(text) is not None
    if "'" in text and (text[:1] == "'" or ",'" in text or "\n'" in text):
        return True
    spaces = [space for space in _ASCII_SPACES if space in text]
    if not spaces:
        return False
    flat = text.replace("\n", ",")  # a line break ends a cell as a comma does
    return any(text[:1] == space or text[-1:] == space or space + "," in flat
               or "," + space in flat for space in spaces)


def _plain_table(source: str, text: str) -> Table | None:
    """The table of a CSV text in its plainest form, or ``None`` for any other (the csv
    module then reads it): no quote, no carriage return or NUL, no cell to strip or to
    restore, no blank row after the header, every row one cell under each named column.

    Such a text is one record per line, its cells separated by commas, so the table is
    made without a Python-level loop per row, and kept by column (:class:`ColumnRows`);
    it is the table :func:`table_from_grid` makes of the csv module's records."""
    if ('"' in text or "\r" in text or "\0" in text or _to_clean(text)
            or len(text) > csv.field_size_limit()
            and max(map(len, text.split("\n"))) > csv.field_size_limit()):
        return None
    lines = text.split("\n")
    head = next((i for i, line in enumerate(lines) if line.strip(",")), None)
    if head is None:
        return None
    names = column_names(source, head + 1, lines[head].split(","))
    body = lines[head + 1:]
    if body and body[-1] == "":  # the line break that ends the last line
        body.pop()
    width = len(names)
    # one cell under each name on every line, and no line of empty cells only
    if (not body or not all(names) or set(map(str.count, body, repeat(","))) != {width - 1}
            or "," * (width - 1) in body):
        return None
    cells = ",".join(body).split(",")
    columns = {name: cells[i::width] for i, name in enumerate(names)}
    return Table(source, names, ColumnRows(head + 2, names, columns), head + 1)


def read_csv(path: Path) -> Table:
    """A CSV file as a table of text cells."""
    text = _decode(path)
    plain = _plain_table(str(path), text)
    if plain is not None:
        return plain
    records = _Records(text)
    try:
        table = table_from_grid(str(path), records)
    except csv.Error as exc:
        start = records.start
        if records.unclosed_quote(start):
            raise InputError("a quote opened here is never closed: the rest of the file is read "
                             "as one cell", file=str(path),
                             row=start, fix=_QUOTE_FIX) from None
        if "field larger than field limit" in str(exc):
            limit = csv.field_size_limit()
            raise InputError(f"a cell is longer than {limit:,} characters", file=str(path),
                             row=start, fix=f"shorten the text to at most {limit:,} characters"
                             ) from None
        raise InputError(f"cannot read the CSV: {exc}", file=str(path), row=records.rows.line_num,
                         fix="check the quotes on that line (a text with a quote inside "
                             "is written \"like \"\"this\"\"\")") from None
    if table.rows and '"' in records.text and records.unclosed_quote(table.rows[-1].line):
        row = table.rows[-1]
        column = next((c for c in reversed(table.columns) if row.cells.get(c)), None)
        raise InputError("a quote opened here is never closed: the rest of the file was read "
                         "into this cell", file=str(path), row=row.line, column=column,
                         fix=_QUOTE_FIX)
    return table


def read_toml(path: Path) -> Settings:
    """``project.toml`` as flat settings."""
    try:
        nested = tomllib.loads(_decode(path))
    except tomllib.TOMLDecodeError as exc:
        place = _TOML_PLACE.search(str(exc))
        problem = _TOML_PLACE.sub(lambda m: f"(column {m.group(2)})", str(exc))
        raise InputError(f"not valid TOML: {problem}", file=str(path),
                         row=int(place.group(1)) if place else None,
                         fix='text needs quotes (name = "Depot"), dates do not '
                             "(start = 2025-03-03), lists use brackets") from None
    except RecursionError:
        raise InputError("the TOML is nested too deeply to read", file=str(path),
                         fix="project settings nest only a few levels deep: check the "
                             "brackets") from None
    return Settings(str(path), flatten(nested, CellRef(str(path))))


def _need(folder: Path, key: str) -> Path:
    """The path of a table's file; a missing required file (or a misspelt optional one) is an error."""
    path = folder / FILES[key]
    if path.is_file():
        return path
    if path.is_dir():
        raise InputError("this is a folder, not a file", file=str(path),
                         fix=f"{FILES[key]} must be a file: move the folder away and put the "
                             "file in its place")
    others = [p.name for p in folder.iterdir()
              if p.is_file() and p.suffix == path.suffix and p.name not in FILES.values()]
    close = difflib.get_close_matches(FILES[key], others, n=1, cutoff=0.8)
    if key in _OPTIONAL and not close:
        return path
    hint = f"rename '{close[0]}' to '{FILES[key]}'" if close else f"create {FILES[key]}"
    raise InputError("file not found" if not close else f"found '{close[0]}' instead",
                     file=str(path), fix=hint)


def read(folder: Path) -> Tables:
    """Read a project folder into tables."""
    paths = {key: _need(folder, key) for key in FILES}
    optional = {key: read_csv(paths[key]) if paths[key].is_file() else None for key in _OPTIONAL}
    return Tables(
        settings=read_toml(paths["settings"]),
        activities=read_csv(paths["activities"]),
        **optional,
    )


def _csv_writer(columns: tuple[str, ...], records: list[dict[str, object]]):
    """A function writing ``records`` under ``columns`` as a UTF-8 CSV file."""
    def write(path: Path) -> None:
        with path.open("w", encoding="utf-8", newline="") as handle:
            out = csv.writer(handle, lineterminator="\n")
            out.writerow(columns)
            out.writerows([csv_value(r.get(c)) for c in columns] for r in records)
    return write


def write(document: Document, folder: Path) -> None:
    """Write the folder whole: project.toml, activities.csv and the tables that have rows."""
    text = toml_text(nest(document.settings))
    files = {
        FILES["settings"]: lambda path: path.write_text(text, encoding="utf-8", newline="\n"),
        FILES["activities"]: _csv_writer(document.activity_columns, document.activities),
    }
    for key, columns in _COLUMNS.items():
        records = getattr(document, key)
        if records:
            files[FILES[key]] = _csv_writer(columns, records)
    stale = [FILES[key] for key in _OPTIONAL if FILES[key] not in files]
    write_folder(folder, files, stale)
