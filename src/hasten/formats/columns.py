"""The columns of every table, and reading cells out of rows with errors that point at them.

The helpers here are shared by the parsers of the activities, links, crash steps and options
tables (:mod:`hasten.formats.activities`, :mod:`hasten.formats.links`,
:mod:`hasten.formats.shortening`): unknown and missing columns, required and optional cells,
activity ids and the one look-up of an id in the activities table.
"""

from __future__ import annotations

import difflib
import re
from collections.abc import Callable, Mapping, Sequence

from hasten.errors import InputError
from hasten.formats.cells import CellRef, id_value
from hasten.formats.predecessors import COLUMN as PREDECESSORS
from hasten.formats.tables import Row, Table

__all__ = [
    "PLAN_COLUMNS",
    "PROGRESS_COLUMNS",
    "CALENDAR_COLUMN",
    "RISK_COLUMNS",
    "LABOUR_COLUMNS",
    "ACTIVITY_COLUMNS",
    "ACTIVITY_REQUIRED",
    "LINK_COLUMNS",
    "LINK_REQUIRED",
    "STEP_COLUMNS",
    "OPTION_COLUMNS",
    "OPTION_REQUIRED",
    "place",
    "check_columns",
    "cell_ref",
    "required",
    "optional",
    "unknown_id",
    "known_activity",
]

PLAN_COLUMNS = ("id", "name", "trade", "duration", "crash_duration", "cost", "crash_cost",
                PREDECESSORS)
PROGRESS_COLUMNS = ("actual_start", "actual_finish", "remaining", "percent_complete",
                    "not_before", "deadline", "damages_per_day")
CALENDAR_COLUMN = "calendar"
LABOUR_COLUMNS = ("labour_hours", "crew_size", "wage", "max_crews", "equipment_per_day",
                  "min_duration")
RISK_COLUMNS = ("optimistic", "pessimistic")  # duration ranges (hasten.formats.risk)
ACTIVITY_COLUMNS = PLAN_COLUMNS + PROGRESS_COLUMNS + (CALENDAR_COLUMN,) + LABOUR_COLUMNS + RISK_COLUMNS
ACTIVITY_REQUIRED = ("id", "duration")
LINK_COLUMNS = ("predecessor", "successor", "type", "lag")
LINK_REQUIRED = ("predecessor", "successor")
STEP_COLUMNS = ("id", "days", "cost_per_day")
OPTION_COLUMNS = ("id", "option", "duration", "added_cost", "note", "crash_duration", "cost_per_day")
OPTION_REQUIRED = ("id", "option", "duration", "added_cost")
_ID_WITH_LAG = re.compile(r"(.+?)\s*([+-]\s*\d+)")


def place(where: CellRef) -> str:
    """``file row N`` for naming another place in a message."""
    return f"{where.file} row {where.row}"


def check_columns(table: Table, allowed: Sequence[str], required: Sequence[str]) -> None:
    """Refuse unknown columns (typos matter) and missing required ones."""
    where = CellRef(table.source, table.header_line)
    for column in table.columns:
        if column not in allowed:
            close = difflib.get_close_matches(column, allowed, n=1)
            hint = f"did you mean '{close[0]}'? " if close else ""
            raise where.at(column).error("unknown column", column,
                                         f"{hint}allowed columns: {', '.join(allowed)}")
    for column in required:
        if column not in table.columns:
            raise where.at(column).error(
                f"the required column '{column}' is missing; columns found: "
                f"{', '.join(table.columns) or 'none'}", column,
                f"add a column named '{column}' (required columns: {', '.join(required)})")


def cell_ref(row: Row, table: Table, column: str) -> CellRef:
    """Where one cell of ``row`` is."""
    return CellRef(table.source, row.line, column)


_UNPLACED = CellRef(None)


def required(row: Row, table: Table, column: str, parse: Callable[[str, CellRef], object],
             what: str) -> object:
    """A cell that must not be empty, parsed; ``what`` says what to write there."""
    text = row.cells.get(column, "")
    if not text:
        raise cell_ref(row, table, column).error(f"the {column} is empty", text, f"write {what}")
    return optional(row, table, column, parse)


def optional(row: Row, table: Table, column: str, parse: Callable[[str, CellRef], object],
             default: object = None) -> object:
    """A cell parsed, or ``default`` when it is empty.

    The cell's place is built only for an error: parsing is pure and its result does not
    depend on the place, so a bad cell is simply parsed again with its place, which raises
    the very error it would have raised at once. (Building a place for every cell took
    longer than reading the plain numbers in it.)
    """
    text = row.cells.get(column, "")
    if not text:
        return default
    try:
        return parse(text, _UNPLACED)
    except InputError:
        pass
    return parse(text, cell_ref(row, table, column))


def unknown_id(ident: str, ids: Sequence[str], where: CellRef, value: str, role: str) -> InputError:
    """The error for an id that names no activity, with close ids and likely slips."""
    close = [i for i in ids if i.lower() == ident.lower() and i != ident]
    close += [i for i in difflib.get_close_matches(ident, ids, n=3) if i not in close]
    hints = [f"did you mean {' or '.join(repr(i) for i in close)}?"] if close else []
    if "," in ident:
        hints.append("separate predecessors with ';', e.g. 'A; B'")
    lagged = _ID_WITH_LAG.fullmatch(ident)
    if lagged and lagged.group(1) in ids:
        hints.append(f"a lag needs a link type: write '{lagged.group(1)}:FS{lagged.group(2)}'")
    hints.append("use the id of an activity in the activities table")
    return where.error(f"unknown {role} id '{ident}'", value, "; ".join(hints))


def known_activity(row: Row, table: Table, ids: Mapping[str, object], column: str = "id",
                   role: str = "activity") -> str:
    """The id in ``column`` of ``row``, which must be a key of ``ids`` (the activities' ids
    in table order, e.g. a dict from id to its row).

    The one look-up of an activity id by the tables that refer to activities (crash steps,
    options); an unknown id is refused with the close ids.
    """
    ident = required(row, table, column, id_value, f"the id of the {role}")
    if ident not in ids:
        raise unknown_id(ident, list(ids), cell_ref(row, table, column), ident, role)
    return ident
