"""The quick path for large plain tables: activities and their predecessors column read
column by column.

Each function here either gives exactly what the full path (:mod:`hasten.formats.activities`,
:mod:`hasten.formats.links`) gives for the same table, or ``None`` when anything in it is not
in its plainest form; the full path then reads the table and says what, if anything, is
wrong. Whole columns are checked at once (one pattern over a column's cells joined by line
breaks, or for whole numbers one character class and one JSON list), and each activity and
link is made from a dictionary of its fields, given whole
(:func:`hasten.formats.instances.instances`). Reading a project of 50,000 activities and
100,000 links spends most of its time here.
"""

from __future__ import annotations

import json
import re
from collections.abc import Sequence
from operator import attrgetter, gt, itemgetter, lt

import numpy as np

from hasten.formats.columns import PLAN_COLUMNS
from hasten.formats.instances import instances, plain_defaults
from hasten.formats.predecessors import (COLUMN as PREDECESSORS, KNOWN_TYPES_AND_LAGS,
                                         known_type_and_lag)
from hasten.formats.tables import ColumnRows, Table
from hasten.project import Activity, Link, LinkType

__all__ = ["quick_activities", "quick_links"]

# the patterns of hasten.formats.activities._plain_activity, over a whole column
_ID = r"[A-Za-z0-9_.\-]+"
_DAYS = r"[0-9]{1,6}"
_MONEY = r"[0-9]{1,15}(?:\.[0-9]{1,15})?"
_IDS = re.compile(rf"{_ID}(?:\n{_ID})*")
_ALL_DAYS = re.compile(rf"{_DAYS}(?:\n{_DAYS})*")
_SOME_DAYS = re.compile(rf"(?:{_DAYS})?(?:\n(?:{_DAYS})?)*")
_SOME_MONEY = re.compile(rf"(?:{_MONEY})?(?:\n(?:{_MONEY})?)*")
_DIGITS_AND_COMMAS = re.compile(r"[0-9,]*")

_ACTIVITY = plain_defaults(Activity, ("id", "duration"))
_GIVEN = ("id", "duration", "name", "trade", "crash_duration", "cost", "crash_cost")
_LINK = plain_defaults(Link, ("pred", "succ"))


def _columns(table: Table, names: Sequence[str]) -> list[Sequence[str]]:
    """The cells of each column in ``names``, top to bottom ("" for a column the table
    lacks; every row holds every column of its table)."""
    if isinstance(table.rows, ColumnRows):  # kept by column already
        empty = [""] * len(table.rows)
        return [table.rows.columns.get(name, empty) for name in names]
    given = [name for name in names if name in table.columns]
    if not given:
        return [[""] * len(table.rows) for _ in names]
    cells = map(attrgetter("cells"), table.rows)
    found = dict(zip(given, zip(*map(itemgetter(*given), cells)) if len(given) > 1
                     else [list(map(itemgetter(given[0]), cells))]))
    empty = [""] * len(table.rows)
    return [found.get(name, empty) for name in names]


def _every(pattern: re.Pattern, column: list[str]) -> bool:
    """Every cell of ``column`` matches ``pattern`` (written for cells joined by line
    breaks), and none holds a line break of its own."""
    text = "\n".join(column)
    return text.count("\n") == len(column) - 1 and pattern.fullmatch(text) is not None


def _plain_text(column: list[str]) -> bool:
    """Every cell printable text without white space around it (in printable text a space
    is the only white space :meth:`str.strip` takes away)."""
    if not "".join(column).isprintable():
        return False
    text = "\n".join(column)
    return not (text[:1] == " " or text[-1:] == " " or " \n" in text or "\n " in text)


def _numbers(column: list[str], kind: type, empty: object) -> list:
    """The cells as numbers of ``kind``; ``empty`` for an empty cell. Each distinct text is
    converted once (a column of durations or costs repeats a few values)."""
    texts = set(column)
    value = dict(zip(texts, map(kind, texts))) if "" not in texts else {
        text: kind(text) if text else empty for text in texts}
    return list(map(value.__getitem__, column))


def _whole(column: list[str], digits: int) -> list[int] | None:
    """The cells as whole numbers when each is 1 to ``digits`` ASCII digits without a
    leading zero (``0`` itself is one), checked and read as one JSON list (which refuses
    an empty cell and a leading zero); ``None`` otherwise."""
    text = ",".join(column)
    if _DIGITS_AND_COMMAS.fullmatch(text) is None or not text:
        return None
    try:
        values = json.loads(f"[{text}]")
    except ValueError:  # an empty cell, a leading zero, thousands of digits
        return None
    return values if len(values) == len(column) and max(values) < 10 ** digits else None


def _days(column: list[str], empty: bool) -> list | None:
    """The cells as whole working days (``None`` for an empty cell where ``empty``), or
    ``None`` unless each is 1 to 6 digits (or empty where allowed)."""
    values = _whole(column, 6)
    if values is not None:
        return values
    if not _every(_SOME_DAYS if empty else _ALL_DAYS, column):
        return None
    return _numbers(column, int, None) if empty else list(map(int, column))


def _money(column: list[str], empty: float | None) -> list | None:
    """The cells as amounts (``empty`` for an empty cell), or ``None`` unless each is 1 to
    15 digits with at most 15 decimals, or empty. Whole amounts of up to 15 digits are
    below 2**53, so ``float`` of their number is ``float`` of their text."""
    values = _whole(column, 15)
    if values is not None:
        return list(map(float, values))
    return _numbers(column, float, empty) if _every(_SOME_MONEY, column) else None


def quick_activities(table: Table) -> list[Activity] | None:
    """The activities of a table with only the plan columns (no progress, calendar or
    labour column) whose every row :func:`hasten.formats.activities._plain_activity` takes;
    ``None`` otherwise. Call it after the table's columns are checked."""
    if _ACTIVITY is None or not table.rows or not set(table.columns) <= set(PLAN_COLUMNS):
        return None
    ids, durations, names, trades, crash_durations, costs, crash_costs = _columns(table, _GIVEN)
    if not (_every(_IDS, ids) and _plain_text(names) and _plain_text(trades)):
        return None
    durations = _days(durations, False)
    crash_durations = _days(crash_durations, True)
    costs = _money(costs, 0.0)
    crash_costs = _money(crash_costs, None)
    if durations is None or crash_durations is None or costs is None or crash_costs is None:
        return None
    if None in crash_durations:
        longer = any(c is not None and c > d for c, d in zip(crash_durations, durations))
    else:
        longer = any(map(gt, crash_durations, durations))
    if None in crash_costs:
        cheaper = any(c is not None and c < m for c, m in zip(crash_costs, costs))
    else:
        cheaper = any(map(lt, crash_costs, costs))
    if longer or cheaper:
        return None
    # a dictionary of the given fields each, given whole (the other fields read their
    # defaults from the class): quicker than setting each field on all of them, and as
    # quick to read afterwards (see hasten.formats.instances)
    return instances(Activity, [
        {"id": ident, "duration": duration, "name": name, "trade": trade,
         "crash_duration": crash_duration, "cost": cost, "crash_cost": crash_cost}
        for ident, duration, name, trade, crash_duration, cost, crash_cost
        in zip(ids, durations, names, trades, crash_durations, costs, crash_costs)])


def _items(texts: list[str], ids: Sequence[str]) -> tuple[list[dict], list[int], list[int]] | None:
    """Each link of a predecessors column (``ids``: the id of each row): the fields of its
    :class:`~hasten.project.Link` (a dictionary, naming its predecessor by the very text of
    that activity's id), and the rows of its predecessor and successor (empty items
    skipped, as the full path skips them); ``None`` when an item has no id, an id no row
    has, or a type and lag that do not read. (This loop takes fewer instructions than one
    pattern over the whole column, or split, strip and partition mapped over all items,
    with their results taken apart again.)"""
    made: list[dict] = []
    pred_at: list[int] = []
    succ_at: list[int] = []  # the successor is the row's activity: its position is the row's
    fs, known = LinkType.FS, KNOWN_TYPES_AND_LAGS.get
    at = dict(zip(ids, range(len(ids)))).get
    for row, text in enumerate(texts):
        if not text:
            continue
        succ = ids[row]
        for raw in text.split(";"):
            item = raw.strip()
            if not item:
                continue
            ident, colon, rest = item.partition(":")
            if colon:
                ident = ident.strip()
                found = known(rest) or known_type_and_lag(rest)  # (a look-up mostly)
                pred = at(ident)
                if found is None or pred is None:
                    return None
                made.append({"pred": ids[pred], "succ": succ, "type": found[0], "lag": found[1]})
            else:  # the whole item is the id
                pred = at(ident)
                if pred is None:
                    return None
                made.append({"pred": ids[pred], "succ": succ, "type": fs, "lag": 0})
            pred_at.append(pred)
            succ_at.append(row)
    return made, pred_at, succ_at


def quick_links(table: Table, ids: Sequence[str]) -> tuple[list[Link], np.ndarray, np.ndarray] | None:
    """The links of the predecessors column of a table whose ids (``ids``, the activities'
    ids in table order) and predecessors are plain ASCII, every link known, pointing down
    the table (so there is no loop and no self-link) and given once; with the positions in
    ``ids`` of each link's predecessor and successor (arrays). ``None`` otherwise."""
    if _LINK is None:  # pragma: no cover - Link as it is today takes the dictionary
        return None
    if PREDECESSORS not in table.columns:
        return [], np.zeros(0, np.intp), np.zeros(0, np.intp)
    (texts,) = _columns(table, (PREDECESSORS,))
    joined = "".join(texts)
    if len(ids) != len(texts) or not (joined.isascii() and joined.isprintable()):
        return None
    items = _items(texts, ids)
    if items is None:
        return None
    # (four fields: a dictionary each, given whole, is quicker here than field by field)
    made, pred_list, succ_list = items
    pred_at, succ_at = np.array(pred_list, np.intp), np.array(succ_list, np.intp)
    if not (pred_at < succ_at).all():
        return None
    pairs = np.sort(succ_at * len(ids) + pred_at)
    if (pairs[1:] == pairs[:-1]).any():
        # two links join the same activities: refused only when of the same type too
        kinds = list(map(itemgetter("type"), made))
        if len(set(zip(pred_list, succ_list, kinds))) != len(kinds):
            return None
    return instances(Link, made), pred_at, succ_at
