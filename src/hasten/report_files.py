"""Tables written to .csv or .xlsx, whole or not at all.

In a workbook dates are real Excel dates (date cells with a date format, not text), money
cells carry a number format with the project's currency, and each sheet is named for what it
holds. CSV keeps ISO dates and plain numbers.

(A private writer of the report and the ``--out`` options; it has the signatures of the
shared output helpers planned in :mod:`hasten.formats` and should give way to them.)
"""

from __future__ import annotations

import csv
from dataclasses import dataclass, field
from datetime import date
from pathlib import Path
from typing import Iterable, Sequence

from .errors import InputError
from .formats.files import write_file

__all__ = ["Sheet", "write_table", "write_workbook", "table_suffix"]

_SUFFIXES = (".csv", ".xlsx")


@dataclass(frozen=True)
class Sheet:
    """One sheet: its name, its columns (keys of the row dicts, in order) and its rows."""

    name: str
    columns: Sequence[str]
    rows: Sequence[dict]
    date_columns: Iterable[str] = ()
    money_columns: Iterable[str] = ()
    currency: str = ""
    widths: dict = field(default_factory=dict)
    money_rows: frozenset = frozenset()  # rows (header row 1) whose numbers are all money


def table_suffix(path: Path, option: str = "--out") -> str:
    """The suffix of a table file, refused unless .csv or .xlsx."""
    suffix = path.suffix.lower()
    if suffix not in _SUFFIXES:
        raise InputError(f"cannot write a table to {path.name!r}", column=option, value=str(path),
                         fix="name the output FILE.csv or FILE.xlsx")
    return suffix


def _cell(value):
    if isinstance(value, (list, tuple)):
        return "; ".join(str(v) for v in value)
    return value


def write_table(path: Path, columns: Sequence[str], rows: Sequence[dict], *, sheet_name: str = "table",
                date_columns: Iterable[str] = (), money_columns: Iterable[str] = (), currency: str = "") -> None:
    """Write rows (dicts) to ``path``: .csv, or .xlsx with one sheet named ``sheet_name``."""
    path = Path(path)
    if table_suffix(path) == ".csv":
        def write(tmp: Path) -> None:
            with open(tmp, "w", newline="", encoding="utf-8") as f:
                out = csv.writer(f)
                out.writerow(columns)
                for r in rows:
                    out.writerow(["" if r.get(c) is None else _cell(r.get(c)) for c in columns])

        write_file(path.resolve(), write)
        return
    write_workbook(path, [Sheet(sheet_name, columns, rows, date_columns, money_columns, currency)])


def money_format(currency: str) -> str:
    """An Excel number format with thousands separators, two decimals and the currency."""
    return '#,##0.00' + (f' "{currency}"' if currency else "")


def write_workbook(path: Path, sheets: Sequence[Sheet]) -> None:
    """Write sheets to an .xlsx workbook, whole or not at all."""
    from openpyxl import Workbook
    from openpyxl.styles import Font
    from openpyxl.utils import get_column_letter

    path = Path(path)
    book = Workbook()
    book.remove(book.active)
    for sheet in sheets:
        ws = book.create_sheet(_sheet_name(sheet.name))
        dates, money = set(sheet.date_columns), set(sheet.money_columns)
        ws.append(list(sheet.columns))
        for cell in ws[1]:
            cell.font = Font(bold=True)
        fmt = money_format(sheet.currency)
        for r in sheet.rows:
            values = []
            for c in sheet.columns:
                v = _cell(r.get(c))
                if c in dates and isinstance(v, str) and v:
                    v = date.fromisoformat(v)
                values.append(v)
            ws.append(values)
            row = ws.max_row
            for k, c in enumerate(sheet.columns, start=1):
                cell = ws.cell(row=row, column=k)
                if (c in dates and cell.value is not None) or isinstance(cell.value, date):
                    cell.number_format = "yyyy-mm-dd"
                elif (c in money or row in sheet.money_rows) and isinstance(cell.value, (int, float)) \
                        and not isinstance(cell.value, bool):
                    cell.number_format = fmt
        for k, c in enumerate(sheet.columns, start=1):
            longest = max([len(str(c))] + [len(str(_cell(r.get(c)) or "")) for r in sheet.rows[:200]])
            ws.column_dimensions[get_column_letter(k)].width = min(sheet.widths.get(c, longest + 2), 60)
        ws.freeze_panes = "A2"
    write_file(path.resolve(), lambda tmp: book.save(tmp))


def _sheet_name(name: str) -> str:
    """Excel's limits: 31 characters, none of ``[]:*?/\\``."""
    for ch in "[]:*?/\\":
        name = name.replace(ch, " ")
    return name[:31]
