"""The workbook form (``.xlsx``): sheets ``project``, ``activities``, ``links``, ``crash_steps``,
``options``.

Layout:

* ``project`` has the columns ``key`` and ``value``, one setting per row. Section keys are
  dotted: ``costs.indirect_per_day``, ``contract.finish``, ``contract.damages_per_day``,
  ``contract.bonus_per_day``, ``contract.bonus_cap_days``, ``status.data_date``.
  ``holidays`` is ONE cell with the dates separated by commas (``2025-12-25, 2025-12-26``);
  a key may appear only once.
  ``calendar`` is a name (``mon-fri``) or the working weekdays separated by commas.
  A named calendar takes two rows: ``calendars.NAME.workdays`` (as ``calendar``) and
  ``calendars.NAME.holidays`` (dates separated by commas; ``none`` for no holidays; the row
  left out or its cell empty: the project's holidays).
* ``activities``, ``links``, ``crash_steps`` and ``options`` have the same columns as the
  CSV files (the progress, date and ``calendar`` columns of ``activities`` included); ``links``,
  ``crash_steps`` and ``options`` are optional (written only when they have rows).

Dates are written as ISO text (``2025-03-03``); date cells typed in a spreadsheet are read
too. Ids and names are written as text cells. Numbers are written as number cells unless a
number cell would round the value (the format keeps 16 significant digits); such values are
written as text cells holding the exact number. Row numbers in messages are the sheet's
row numbers (header = row 1). Other sheets are ignored.
"""

from __future__ import annotations

import re
import zipfile
from collections.abc import Mapping
from datetime import date
from decimal import Decimal
from pathlib import Path

from hasten.errors import InputError
from hasten.formats.cells import CellRef, cell_text
from hasten.formats.document import Document
from hasten.formats.files import write_file
from hasten.formats.columns import LINK_COLUMNS, OPTION_COLUMNS, STEP_COLUMNS
from hasten.formats.settings import CALENDARS
from hasten.formats.tables import Settings, Table, Tables, table_from_grid

__all__ = ["SHEETS", "labels", "read", "write"]

SHEETS = {"settings": "project", "activities": "activities", "links": "links",
          "crash_steps": "crash_steps", "options": "options"}
_OPTIONAL = ("links", "crash_steps", "options")
_SETTINGS_COLUMNS = ("key", "value")


def labels(path: Path) -> dict[str, str]:
    """How each table is named in messages: the file and the sheet."""
    return {key: f"{path} (sheet {name})" for key, name in SHEETS.items()}


def _grid(sheet):
    """(row number, cell values) of every row; a number in a cell formatted as a percentage
    becomes its text with the % sign (60 % is stored as 0.6: ``0.6`` -> ``"60%"``), so that it
    keeps the meaning the spreadsheet shows."""
    for line, cells in enumerate(sheet.iter_rows(min_row=1, max_row=sheet.max_row), start=1):
        yield line, [_percent_text(c.value) if type(c.value) in (int, float)
                     and "%" in (c.number_format or "") else c.value for c in cells]


def _percent_text(value: int | float) -> str:
    """``0.6`` -> ``"60%"``: the exact decimal of the stored number, times 100."""
    shown = Decimal(repr(value)) * 100
    return f"{shown.normalize():f}%" if shown else "0%"


def _settings(sheet, source: str) -> Settings:
    """The project sheet: one key and value per row."""
    table = table_from_grid(source, _grid(sheet))
    header = CellRef(source, table.header_line)
    if table.columns != _SETTINGS_COLUMNS:
        raise header.error("the project sheet needs exactly the columns key and value",
                           ", ".join(table.columns) or "no columns",
                           "put 'key' in A1 and 'value' in B1, one setting per row below")
    values: dict[str, object] = {}
    lines: dict[str, int] = {}
    for row in table.rows:
        key = row.cells["key"]
        if not key:
            raise CellRef(source, row.line, "key").error(
                "a value has no key", row.cells["value"], "write the setting's name in column A")
        if key in values:
            raise CellRef(source, row.line, "key").error(
                f"the key is given twice: rows {lines[key]} and {row.line}", key,
                "keep one row (several holidays go into one cell, separated by commas)")
        values[key], lines[key] = row.cells["value"], row.line
    return Settings(source, values, lines)


def _load(path: Path):
    import openpyxl  # imported on use: importing it takes longer than reading most folders
    from openpyxl.utils.exceptions import InvalidFileException

    try:
        return openpyxl.load_workbook(path, data_only=True)
    except (InvalidFileException, zipfile.BadZipFile, KeyError, ValueError, OSError) as exc:
        raise InputError(f"cannot open the workbook: {exc}", file=str(path),
                         fix="save it from the spreadsheet program as an .xlsx workbook") from None


_FORMULA = re.compile(rb"<(?:\w+:)?f[ >/]")


def _has_formulas(path: Path) -> bool:
    """True when some sheet of the workbook holds a formula (a quick look at its XML)."""
    try:
        with zipfile.ZipFile(path) as archive:
            return any(_FORMULA.search(archive.read(name)) for name in archive.namelist()
                       if name.startswith("xl/worksheets/") and name.endswith(".xml"))
    except (zipfile.BadZipFile, OSError, KeyError):
        return False


def _check_calculated(path: Path, sheets: dict, tables: dict[str, Table | None],
                      names: dict[str, str]) -> None:
    """Refuse a formula cell whose value was never calculated and saved.

    Files written by programs that do not calculate (scripts, some converters) hold the
    formula without its value; read with its values only, the cell looks empty.
    """
    if not _has_formulas(path):
        return
    import openpyxl

    formulas = openpyxl.load_workbook(path, data_only=False)
    try:
        for key, name in SHEETS.items():
            table = tables.get(key)
            if table is None or name not in sheets:
                continue
            values, cells = sheets[name], formulas[sheets[name].title]
            header = [cell_text(c.value).strip().lower() for c in values[table.header_line or 1]]
            for row in cells.iter_rows():
                for cell in row:
                    text = cell.value  # a formula is text starting '=' (or an array formula)
                    text = text if isinstance(text, str) else getattr(text, "text", None)
                    if (isinstance(text, str) and text.startswith("=")
                            and values.cell(cell.row, cell.column).value is None):
                        named = cell.column <= len(header) and header[cell.column - 1]
                        label = header[cell.column - 1] if named else f"#{cell.column}"
                        raise CellRef(names[key], cell.row, label).error(
                            "the cell holds a formula that was never calculated, so it has no "
                            "value to read", text,
                            "open the workbook in a spreadsheet program and save it (that "
                            "stores the calculated values), or type the value instead of the "
                            "formula")
    finally:
        formulas.close()


def read(path: Path) -> Tables:
    """Read a workbook into tables."""
    names = labels(path)
    book = _load(path)
    try:
        sheets = {s.title.strip().lower(): s for s in book.worksheets}
        found = ", ".join(s.title for s in book.worksheets)
        tables: dict[str, Table | None] = {}
        for key, name in SHEETS.items():
            if name in sheets:
                tables[key] = table_from_grid(names[key], _grid(sheets[name]))
            elif key in _OPTIONAL:
                tables[key] = None
            else:
                raise InputError(f"the sheet '{name}' is missing (sheets found: {found})",
                                 file=str(path), fix=f"add a sheet named '{name}'")
        settings = _settings(sheets[SHEETS["settings"]], names["settings"])
        _check_calculated(path, sheets, tables | {"settings": table_from_grid(
            names["settings"], _grid(sheets[SHEETS["settings"]]))}, names)
    finally:
        book.close()
    return Tables(settings, tables["activities"], tables["links"], tables["crash_steps"],
                  tables["options"])


def _cell_value(value: object) -> object:
    """What to put in a cell: numbers stay numbers only if the cell keeps them exactly."""
    if isinstance(value, bool) or value is None or isinstance(value, str):
        return value
    if isinstance(value, (int, float)):
        return value if float("%.16g" % value) == value and abs(value) < 2**53 else cell_text(value)
    if isinstance(value, date):
        return value.isoformat()
    if isinstance(value, list):
        return ", ".join(cell_text(_cell_value(v)) for v in value)
    return cell_text(value)


def _put(sheet, row: int, column: int, value: object) -> None:
    """Write one cell; text stays text even if it starts with '=' or looks like an error code."""
    cell = sheet.cell(row=row, column=column)
    cell.value = _cell_value(value)
    if isinstance(cell.value, str):
        cell.data_type = "s"


def _fill(sheet, columns: tuple[str, ...], records: list[Mapping[str, object]]) -> None:
    for col, name in enumerate(columns, start=1):
        _put(sheet, 1, col, name)
    for row, record in enumerate(records, start=2):
        for col, name in enumerate(columns, start=1):
            if record.get(name) is not None:
                _put(sheet, row, col, record[name])
    sheet.freeze_panes = "A2"


def _setting(key: str, value: object) -> object:
    """A setting's cell value: a named calendar without holidays says ``none`` (an empty cell
    would read back as the project's holidays)."""
    if value == [] and key.startswith(f"{CALENDARS}.") and key.endswith(".holidays"):
        return "none"
    return value


def write(document: Document, path: Path) -> None:
    """Write the workbook whole (temporary file, then rename)."""
    import openpyxl  # imported on use, see _load

    book = openpyxl.Workbook()
    book.active.title = SHEETS["settings"]
    _fill(book.active, _SETTINGS_COLUMNS,
          [{"key": k, "value": _setting(k, v)} for k, v in document.settings.items()])
    for key, columns in (("activities", document.activity_columns), ("links", LINK_COLUMNS),
                         ("crash_steps", STEP_COLUMNS), ("options", OPTION_COLUMNS)):
        records = getattr(document, key)
        if records or key == "activities":
            _fill(book.create_sheet(SHEETS[key]), columns, records)
    write_file(path, book.save)
