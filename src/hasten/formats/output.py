"""Output files of the commands: checking a target before any computing, and writing result
tables (``.csv`` or ``.xlsx``) whole or not at all.

:func:`check_output_target` and :func:`check_output_folder` are called before the work, so
that a long computation never ends in "cannot write". :func:`write_table` is the one writer
of result tables, :func:`write_workbook` writes several tables as the sheets of one
workbook. Every problem is an :class:`~hasten.errors.InputError` naming the path and the fix.

CSV tables are UTF-8 (without byte-order mark) with ``\\n`` line endings; text cells that a
spreadsheet would run as formulas get a leading single quote (see
:mod:`hasten.formats.csvtext`), numbers are written as they are. Workbook tables hold
real dates in date columns (shown ``yyyy-mm-dd``), numbers with the currency in money
columns and text as text cells (never formulas).
"""

from __future__ import annotations

import csv
import os
import re
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, field
from datetime import date, datetime
from pathlib import Path

from hasten.errors import InputError
from hasten.formats.cells import cell_text, one_line_errors
from hasten.formats.csvtext import csv_value
from hasten.formats.files import name_limit, write_file

__all__ = [
    "TABLE_SUFFIXES",
    "TableSheet",
    "check_output_target",
    "check_output_folder",
    "write_table",
    "write_workbook",
]

TABLE_SUFFIXES = (".csv", ".xlsx")
_SHEET_FORBIDDEN = re.compile(r"[\[\]:*?/\\]")
_ISO_DATE = re.compile(r"\d{4}-\d{2}-\d{2}")


@dataclass(frozen=True)
class TableSheet:
    """One table for :func:`write_workbook`: the sheet's name (what it holds, at most 31
    characters), the column names, the rows (mappings by column name, or sequences in
    column order) and the columns holding dates or money."""

    name: str
    columns: Sequence[str]
    rows: Sequence[Mapping[str, object] | Sequence[object]]
    date_columns: Sequence[str] = ()
    money_columns: Sequence[str] = ()
    currency: str = ""
    widths: Mapping[str, int] = field(default_factory=dict)


# ---------------------------------------------------------------- checks before the work

def _resolved(path: str | os.PathLike[str]) -> Path:
    return Path(path).expanduser().resolve()


def _inside_input(target: Path, inputs: Iterable[str | os.PathLike[str]]) -> Path | None:
    """The input that ``target`` is, or lies inside, if any."""
    for given in inputs:
        source = _resolved(given)
        if target == source or source in target.parents:
            return source
    return None


def _existing_ancestor(path: Path) -> Path:
    for folder in path.parents:
        if folder.exists():
            return folder
    return Path(path.anchor or ".")


def _check_name(path: Path, shown: str) -> None:
    limit = name_limit(_existing_ancestor(path))
    size = len(path.name.encode())
    if size > limit:
        raise InputError(f"the name is {size} bytes long, longer than the file system takes "
                         f"({limit})", file=shown, fix="choose a shorter name")


def _check_writable(folder: Path, shown: str) -> None:
    if not os.access(folder, os.W_OK | os.X_OK):
        raise InputError(f"cannot write into the folder {folder}: it is read-only for you",
                         file=shown, fix="choose a folder you may write into, or change its "
                                         "permissions")


def _check_not_input(target: Path, inputs, shown: str) -> None:
    source = _inside_input(target, inputs)
    if source is not None:
        where = "is" if source == target else "is inside"
        raise InputError(f"this {where} the input project {source}; writing there could "
                         "overwrite what is being read", file=shown,
                         fix="write the output somewhere outside the input project")


@one_line_errors
def check_output_target(path: str | os.PathLike[str], *,
                        inputs: Iterable[str | os.PathLike[str]] = (),
                        force: bool = False) -> Path:
    """Check, before any computing, that ``path`` can be written; returns it resolved.

    A path with a suffix is a file to write; one without is a project folder. Refused, each
    with an :class:`~hasten.errors.InputError` naming the path and the fix: a path that is,
    or is inside, one of the ``inputs`` (always, even with ``force``); a name longer than
    the file system takes; a missing parent folder, or a parent that is a file; a folder
    where a file is to be written (and a file where a folder is); an existing file or
    non-empty folder unless ``force``; a folder that is read-only. The temporary name used
    while writing is always short enough (:func:`hasten.formats.files.temp_path`).
    """
    shown = str(path)
    target = _resolved(path)
    _check_not_input(target, inputs, shown)
    _check_name(target, shown)
    parent = target.parent
    if not parent.exists():
        raise InputError(f"the folder to write into does not exist: {parent}", file=shown,
                         fix="create the folder first, or choose another path")
    if not parent.is_dir():
        raise InputError(f"{parent} is a file, not a folder", file=shown,
                         fix="choose a path inside a folder")
    wants_folder = target.suffix == ""
    if target.exists():
        if target.is_dir() and not wants_folder:
            raise InputError("this is a folder, not a file", file=shown,
                             fix=f"give a file name, e.g. {Path(shown) / ('out' + target.suffix)}")
        if not target.is_dir() and wants_folder:
            raise InputError("this is a file, but a project folder is to be written here",
                             file=shown, fix="choose a new folder name, or give a file name "
                                             "ending .xlsx or .json")
        empty_folder = target.is_dir() and not any(target.iterdir())
        if not force and not empty_folder:
            raise InputError("the target already exists", file=shown,
                             fix="choose a new name, or allow overwriting it (--force)")
    _check_writable(parent, shown)
    if target.is_dir():
        _check_writable(target, shown)
    return target


@one_line_errors
def check_output_folder(path: str | os.PathLike[str], *,
                        inputs: Iterable[str | os.PathLike[str]] = ()) -> Path:
    """Check that a new or empty folder can be made at ``path`` and filled (the demo);
    returns it resolved. Missing parent folders may be created; the nearest existing one
    must be writable."""
    shown = str(path)
    target = _resolved(path)
    _check_not_input(target, inputs, shown)
    _check_name(target, shown)
    if target.exists():
        if not target.is_dir():
            raise InputError("this is a file, not a folder", file=shown,
                             fix="give the path of a new or empty folder")
        if any(target.iterdir()):
            raise InputError("the folder is not empty", file=shown,
                             fix="give a new or empty folder")
        _check_writable(target, shown)
    else:
        ancestor = _existing_ancestor(target)
        if not ancestor.is_dir():
            raise InputError(f"{ancestor} is a file, not a folder", file=shown,
                             fix="choose a path inside a folder")
        _check_writable(ancestor, shown)
    return target


# ---------------------------------------------------------------- writing tables

def _values(columns: Sequence[str], row: Mapping[str, object] | Sequence[object]) -> list:
    if isinstance(row, Mapping):
        return [row.get(c) for c in columns]
    values = list(row)
    if len(values) != len(columns):
        raise ValueError(f"a row has {len(values)} values for {len(columns)} columns")
    return values


def _plain(value: object) -> object:
    """Lists (e.g. driving predecessors) become text joined with '; '."""
    if isinstance(value, (list, tuple, set, frozenset)):
        return "; ".join(cell_text(v) for v in value)
    return value


def _check_suffix(path: Path, allowed: Sequence[str]) -> None:
    if path.suffix.lower() not in allowed:
        raise InputError(f"cannot write a table to a '{path.suffix or 'file without suffix'}' "
                         f"file", file=str(path), value=path.name,
                         fix=f"name the file with one of {', '.join(allowed)}, e.g. "
                             f"{path.with_suffix(allowed[0]).name}")


def _write_csv(path: Path, columns: Sequence[str], rows) -> None:
    def write(tmp: Path) -> None:
        with tmp.open("w", encoding="utf-8", newline="") as handle:
            out = csv.writer(handle, lineterminator="\n")
            out.writerow([csv_value(c) for c in columns])
            out.writerows([csv_value(_plain(v)) for v in _values(columns, row)] for row in rows)
    write_file(path, write)


def _os_error(path: Path, exc: OSError) -> InputError:
    return InputError(f"cannot write: {exc.strerror or exc}", file=str(path),
                      fix="check the permissions and the free space")


@one_line_errors
def write_table(path: str | os.PathLike[str], columns: Sequence[str],
                rows: Sequence[Mapping[str, object] | Sequence[object]], *, sheet_name: str,
                date_columns: Sequence[str] = (), money_columns: Sequence[str] = (),
                currency: str = "") -> None:
    """Write one result table whole to ``path``: ``.csv`` or ``.xlsx`` (any other suffix is
    refused, never renamed). ``rows`` are mappings by column name or sequences in column
    order; list values are joined with ``'; '``. ``sheet_name`` names the workbook's sheet
    (what it holds, e.g. ``schedule``); ``date_columns`` hold dates (``date`` objects or
    ISO text), ``money_columns`` amounts in ``currency``."""
    path = Path(path)
    _check_suffix(path, TABLE_SUFFIXES)
    if path.suffix.lower() == ".xlsx":
        write_workbook(path, [TableSheet(sheet_name, columns, rows, date_columns,
                                         money_columns, currency)])
        return
    try:
        _write_csv(path, columns, rows)
    except OSError as exc:
        raise _os_error(path, exc) from None


def _check_sheets(path: Path, sheets: Sequence[TableSheet]) -> None:
    seen: set[str] = set()
    for sheet in sheets:
        name = sheet.name
        if not name or len(name) > 31 or _SHEET_FORBIDDEN.search(name) or name.startswith("'"):
            raise InputError("not a possible sheet name", file=str(path), value=name,
                             fix="1 to 31 characters, none of [ ] : * ? / \\")
        if name.lower() in seen:
            raise InputError("two sheets have the same name", file=str(path), value=name,
                             fix="give every sheet its own name")
        seen.add(name.lower())


def _money_format(currency: str) -> str:
    unit = currency.replace('"', "").strip()
    return f'#,##0.00 "{unit}"' if unit else "#,##0.00"


def _as_date(value: object) -> object:
    """A date for a date column (ISO text read as a date); anything else unchanged."""
    if isinstance(value, datetime):
        return value
    if isinstance(value, date):
        return datetime(value.year, value.month, value.day)
    if isinstance(value, str) and _ISO_DATE.fullmatch(value):
        try:
            day = date.fromisoformat(value)
        except ValueError:
            return value
        return datetime(day.year, day.month, day.day)
    return value


def _fill(sheet, table: TableSheet) -> None:
    from openpyxl.styles import Font
    from openpyxl.utils import get_column_letter

    dates, money = set(table.date_columns), set(table.money_columns)
    money_format = _money_format(table.currency)
    for col, name in enumerate(table.columns, start=1):
        cell = sheet.cell(row=1, column=col, value=str(name))
        cell.data_type, cell.font = "s", Font(bold=True)
    widths = [len(str(name)) for name in table.columns]
    for r, row in enumerate(table.rows, start=2):
        for col, (name, value) in enumerate(zip(table.columns, _values(table.columns, row)),
                                            start=1):
            value = _plain(value)
            if value is None or value == "":
                continue
            if name in dates:
                value = _as_date(value)
            cell = sheet.cell(row=r, column=col)
            if isinstance(value, datetime):
                cell.value, cell.number_format = value, "yyyy-mm-dd"
                shown = 10
            elif isinstance(value, (int, float)) and not isinstance(value, bool):
                cell.value = value
                if name in money:
                    cell.number_format = money_format
                shown = len(cell_text(value)) + (len(table.currency) + 5 if name in money else 0)
            else:
                cell.value = cell_text(value)
                cell.data_type = "s"  # text stays text, even if it starts with '='
                shown = len(cell.value)
            widths[col - 1] = max(widths[col - 1], shown)
    for col, name in enumerate(table.columns, start=1):
        width = table.widths.get(name, min(widths[col - 1], 60) + 2)
        sheet.column_dimensions[get_column_letter(col)].width = width
    sheet.freeze_panes = "A2"


@one_line_errors
def write_workbook(path: str | os.PathLike[str], sheets: Sequence[TableSheet]) -> None:
    """Write ``sheets`` (at least one) as the sheets of one ``.xlsx`` workbook, whole."""
    import openpyxl

    path = Path(path)
    _check_suffix(path, (".xlsx",))
    if not sheets:
        raise ValueError("a workbook needs at least one sheet")
    _check_sheets(path, sheets)
    book = openpyxl.Workbook()
    book.active.title = sheets[0].name
    _fill(book.active, sheets[0])
    for table in sheets[1:]:
        _fill(book.create_sheet(table.name), table)
    try:
        write_file(path, book.save)
    except OSError as exc:
        raise _os_error(path, exc) from None
