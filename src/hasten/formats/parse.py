"""The one validation path: tables read from any form -> :class:`~hasten.project.Project`.

:func:`parse_tables` is pure: it takes :class:`~hasten.formats.tables.Tables` (text cells,
each row with the row number the user sees) and returns a Project or raises
:class:`~hasten.errors.InputError` (or :class:`~hasten.errors.CycleError`) naming the
file, row, column and value, and saying how to fix it.

Progress and date columns of the activities table (all optional):

* ``actual_start``, ``actual_finish`` (the last day worked): dates of work already done.
  They need the settings' data date (``[status] data_date``); an actual start must be on or
  before it, an actual finish before it and not before the actual start; an actual finish
  needs an actual start; no actual start of work may be before the project start (a
  milestone's may: a notice to proceed or an award dated before the first site day).
* ``remaining`` (whole working days, at most the duration) and ``percent_complete``
  (0 to 100, decimals allowed) describe a started activity, so they need an actual start.
  Both may be given: ``remaining`` wins and ``percent_complete`` is kept for the record
  (see :mod:`hasten.progress`). On a finished activity only ``remaining`` 0 and
  ``percent_complete`` 100 are accepted.
* ``not_before``: the activity starts on or after this date (a delivery, an access date).
* ``deadline``: the last day allowed for the activity's finish (an interim milestone);
  ``damages_per_day`` (>= 0, per calendar day late) is charged past it. A deadline without
  damages is allowed: it is reported, costs nothing and binds no plan. Damages above 0
  without a deadline are refused (there is no date to be late against); 0 is the same as
  empty.

``calendar`` (optional column): the name of one of the calendars defined in the settings
(``[calendars.NAME]``), on whose working days the activity is worked. An empty cell means
the project calendar; an undefined name is refused.
"""

from __future__ import annotations

import difflib
import math
import re
from collections.abc import Callable, Sequence
from dataclasses import dataclass, replace
from datetime import date
from typing import NamedTuple

from graphlib import CycleError as GraphCycle
from graphlib import TopologicalSorter

from hasten.errors import CycleError, InputError
from hasten.formats.cells import Where, date_value, number_value, text_value, whole_value
from hasten.formats.predecessors import COLUMN as PREDECESSORS, link_type, parse_predecessor_items
from hasten.formats.settings import CALENDARS, parse_settings
from hasten.formats.tables import Row, Table, Tables
from hasten.project import Activity, CrashStep, Link, LinkType, Option, Project

__all__ = [
    "ACTIVITY_COLUMNS",
    "PLAN_COLUMNS",
    "PROGRESS_COLUMNS",
    "CALENDAR_COLUMN",
    "LINK_COLUMNS",
    "STEP_COLUMNS",
    "OPTION_COLUMNS",
    "parse_tables",
]

PLAN_COLUMNS = ("id", "name", "trade", "duration", "crash_duration", "cost", "crash_cost",
                PREDECESSORS)
PROGRESS_COLUMNS = ("actual_start", "actual_finish", "remaining", "percent_complete",
                    "not_before", "deadline", "damages_per_day")
CALENDAR_COLUMN = "calendar"
ACTIVITY_COLUMNS = PLAN_COLUMNS + PROGRESS_COLUMNS + (CALENDAR_COLUMN,)
ACTIVITY_REQUIRED = ("id", "duration")
LINK_COLUMNS = ("predecessor", "successor", "type", "lag")
LINK_REQUIRED = ("predecessor", "successor")
STEP_COLUMNS = ("id", "days", "cost_per_day")
OPTION_COLUMNS = ("id", "option", "duration", "added_cost", "note", "crash_duration", "cost_per_day")
OPTION_REQUIRED = ("id", "option", "duration", "added_cost")
_ID_FORBIDDEN = re.compile(r"[\s;:,]")  # \s is exactly what str.isspace() calls a space
_ID_WITH_LAG = re.compile(r"(.+?)\s*([+-]\s*\d+)")


@dataclass(frozen=True)
class _ActivityRow:
    """An activity as read from one row, before crash steps are attached."""

    activity: Activity
    where: Where


class _LinkSpec(NamedTuple):
    """A link and the cells that gave it (the successor's cell only for the links table);
    a named tuple, as one is made per link."""

    link: Link
    where: Where
    text: str
    pred_text: str
    succ_where: Where | None = None


@dataclass(frozen=True)
class _OptionRow:
    """One discrete option and the row it came from."""

    id: str
    option: Option
    where: Where


@dataclass(frozen=True)
class _StepRow:
    """One crash step and the row it came from."""

    id: str
    step: CrashStep
    where: Where


def _place(where: Where) -> str:
    """``file row N`` for naming another place in a message."""
    return f"{where.file} row {where.row}"


# ---------------------------------------------------------------- columns and cells

def _check_columns(table: Table, allowed: Sequence[str], required: Sequence[str]) -> None:
    """Refuse unknown columns (typos matter) and missing required ones."""
    where = Where(table.source, table.header_line)
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


def _cell(row: Row, table: Table, column: str) -> tuple[str, Where]:
    """The text of one cell ("" if the column is absent) and where it is."""
    return row.cells.get(column, ""), Where(table.source, row.line, column)


_UNPLACED = Where(None)


def _required(row: Row, table: Table, column: str, parse: Callable[[str, Where], object],
              what: str) -> object:
    """A cell that must not be empty, parsed; ``what`` says what to write there."""
    text = row.cells.get(column, "")
    if not text:
        raise Where(table.source, row.line, column).error(f"the {column} is empty", text,
                                                          f"write {what}")
    return _optional(row, table, column, parse)


def _optional(row: Row, table: Table, column: str, parse: Callable[[str, Where], object],
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
    return parse(text, Where(table.source, row.line, column))


def _lag(text: str, where: Where) -> int:
    """A lag in whole working days; negative is a lead."""
    return whole_value(text, where, minimum=None)


def _step_days(text: str, where: Where) -> int:
    """The days of one crash step: a whole number, at least 1."""
    return whole_value(text, where, minimum=1)


def _activity_id(text: str, where: Where) -> str:
    """An id: any text without spaces or the separators ``; : ,``."""
    ident = text_value(text, where)
    if _ID_FORBIDDEN.search(ident):
        raise where.error("an id cannot contain spaces, ';', ':' or ','", text,
                          "use letters, digits, '-', '_' or '.', e.g. 'A10' or 'F-2.1'")
    return ident


def _unknown_id(ident: str, ids: Sequence[str], where: Where, value: str, role: str):
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


# ---------------------------------------------------------------- activities

_PLAIN_ID = re.compile(r"[A-Za-z0-9_.\-]+")
_PLAIN_DAYS = re.compile(r"[0-9]{1,6}")  # at most 999,999: within WHOLE_LIMIT
_PLAIN_MONEY = re.compile(r"[0-9]{1,15}(?:\.[0-9]{1,15})?")


def _plain_activity(cells) -> Activity | None:
    """The activity of a row whose cells are all in their plainest form (ASCII id, digits,
    plain decimals, printable text) and consistent; ``None`` for anything else, which then
    takes the full path of :func:`_activity` with all its checks and messages. Reading a
    large project spends most of its time here, so the common case is kept short. A row
    naming a calendar is not plain."""
    get = cells.get
    if get(CALENDAR_COLUMN):
        return None
    ident, duration, crash_duration = get("id", ""), get("duration", ""), get("crash_duration", "")
    cost, crash_cost = get("cost", ""), get("crash_cost", "")
    name, trade = get("name", ""), get("trade", "")
    if not (_PLAIN_ID.fullmatch(ident) and _PLAIN_DAYS.fullmatch(duration)
            and (not crash_duration or _PLAIN_DAYS.fullmatch(crash_duration))
            and (not cost or _PLAIN_MONEY.fullmatch(cost))
            and (not crash_cost or _PLAIN_MONEY.fullmatch(crash_cost))
            and name.isprintable() and trade.isprintable()
            and name == name.strip() and trade == trade.strip()):
        return None
    d = int(duration)
    c = int(crash_duration) if crash_duration else None
    money = float(cost) if cost else 0.0
    crash_money = float(crash_cost) if crash_cost else None
    if (c is not None and c > d) or (crash_money is not None and crash_money < money):
        return None
    return Activity(id=ident, duration=d, name=name, trade=trade, crash_duration=c, cost=money,
                    crash_cost=crash_money)


def _activity(row: Row, table: Table, with_progress: bool = True) -> Activity:
    """One activity from its row, with the checks that need only this row.

    ``with_progress`` False says the table has no progress column, so those fields keep
    their defaults (what :func:`_progress` gives for empty cells).
    """
    if not with_progress:
        plain = _plain_activity(row.cells)
        if plain is not None:
            return plain
    duration = _required(row, table, "duration", whole_value, "the normal duration in whole working days")
    crash_duration = _optional(row, table, "crash_duration", whole_value)
    cost = _optional(row, table, "cost", number_value, 0.0)
    crash_cost = _optional(row, table, "crash_cost", number_value)
    if crash_duration is not None and crash_duration > duration:
        raise _cell(row, table, "crash_duration")[1].error(
            f"the crash duration is longer than the duration ({duration})", row.cells["crash_duration"],
            f"write a crash duration of {duration} or less (the shortest possible duration)")
    if crash_cost is not None and crash_cost < cost:
        raise _cell(row, table, "crash_cost")[1].error(
            f"the crash cost is below the normal cost ({cost:g})", row.cells["crash_cost"],
            "write the total direct cost at crash duration, at least the normal cost")
    return Activity(
        id=_required(row, table, "id", _activity_id, "a unique id for every activity"),
        duration=duration,
        name=_optional(row, table, "name", text_value, ""),
        trade=_optional(row, table, "trade", text_value, ""),
        crash_duration=crash_duration,
        cost=cost,
        crash_cost=crash_cost,
        calendar=_optional(row, table, CALENDAR_COLUMN, text_value, ""),
        **(_progress(row, table, duration) if with_progress else {}),
    )


def _percent(text: str, where: Where) -> float:
    """A percentage of work done, 0 to 100."""
    number = number_value(text, where, minimum=None)
    if not 0 <= number <= 100:
        raise where.error("the percent complete is outside 0 to 100", text,
                          "write a number from 0 to 100 (without the % sign)")
    return number


def _progress(row: Row, table: Table, duration: int) -> dict[str, object]:
    """The progress and date fields of one row, with the checks that need only this row
    (those against the data date and the project start are in :func:`_check_progress`)."""
    fields = {
        "actual_start": _optional(row, table, "actual_start", date_value),
        "actual_finish": _optional(row, table, "actual_finish", date_value),
        "remaining": _optional(row, table, "remaining", whole_value),
        "percent_complete": _optional(row, table, "percent_complete", _percent),
        "not_before": _optional(row, table, "not_before", date_value),
        "deadline": _optional(row, table, "deadline", date_value),
        "damages_per_day": _optional(row, table, "damages_per_day", number_value, 0.0),
    }
    start, finish = fields["actual_start"], fields["actual_finish"]
    remaining, percent = fields["remaining"], fields["percent_complete"]
    if finish is not None and start is None:
        raise _cell(row, table, "actual_start")[1].error(
            f"the actual start is empty but the actual finish is given ({finish.isoformat()})", "",
            "write the date work started, or clear the actual finish")
    if finish is not None and finish < start:
        raise _cell(row, table, "actual_finish")[1].error(
            f"the actual finish is before the actual start ({start.isoformat()})",
            row.cells["actual_finish"], "check both actual dates (the finish is the last day worked)")
    for column, value in (("remaining", remaining), ("percent_complete", percent)):
        if value is not None and start is None:
            raise _cell(row, table, column)[1].error(
                f"progress needs an actual start: the {column.replace('_', ' ')} is given but the "
                "actual start is empty", row.cells[column],
                "write the date work started in actual_start, or clear this cell if work has not "
                "started")
    if remaining is not None and remaining > duration:
        raise _cell(row, table, "remaining")[1].error(
            f"more work remaining than the duration ({duration})", row.cells["remaining"],
            f"write {duration} or fewer working days, or raise the duration")
    if finish is not None and remaining not in (None, 0):
        raise _cell(row, table, "remaining")[1].error(
            "the activity is finished (it has an actual finish) but work is remaining",
            row.cells["remaining"], "write 0 or clear the cell, or clear the actual finish")
    if finish is not None and percent not in (None, 100):
        raise _cell(row, table, "percent_complete")[1].error(
            "the activity is finished (it has an actual finish) but is not 100 percent complete",
            row.cells["percent_complete"], "write 100 or clear the cell, or clear the actual finish")
    if fields["damages_per_day"] > 0 and fields["deadline"] is None:
        raise _cell(row, table, "damages_per_day")[1].error(
            "damages per day are given but the deadline is empty, so there is no date to be "
            "late against", row.cells["damages_per_day"],
            "write the activity's deadline (the last day allowed), or clear the damages")
    return fields


def _check_progress(rows: Sequence[_ActivityRow], table: Table, start: date,
                    data_date: date | None, settings_source: str) -> None:
    """Actual dates against the project start and the data date (the history before it)."""
    if "actual_start" not in table.columns:  # no actual dates at all
        return
    by_line = {r.line: r for r in table.rows}
    for item in rows:
        act, where = item.activity, item.where
        cells = by_line[where.row].cells
        if act.actual_start is None:
            continue
        if data_date is None:
            raise where.at("actual_start").error(
                f"actual dates need a data date, and {settings_source} has none",
                cells["actual_start"],
                "give [status] data_date (workbook key status.data_date, JSON "
                "project.status.data_date): the date of the progress update")
        if act.actual_start < start and act.duration > 0:  # (a milestone may: an award, a notice)
            raise where.at("actual_start").error(
                f"the actual start is before the project start ({start.isoformat()})",
                cells["actual_start"], "correct the date, or move the project start back")
        if act.actual_start > data_date:
            raise where.at("actual_start").error(
                f"the actual start is after the data date ({data_date.isoformat()}); actual "
                "dates are history", cells["actual_start"],
                "correct the date, or clear it if work has not started (or move the data date)")
        if act.actual_finish is not None and act.actual_finish >= data_date:
            raise where.at("actual_finish").error(
                f"the actual finish is on or after the data date ({data_date.isoformat()}); "
                "actual dates are history and the data date is the first day of remaining work",
                cells["actual_finish"],
                "correct the date, or clear it and give the remaining work if the activity is "
                "not finished (or move the data date)")


def _activity_rows(table: Table) -> list[_ActivityRow]:
    """All activities in order; at least one, ids unique."""
    if not table.rows:
        raise Where(table.source, table.header_line).error(
            "there are no activities" if table.columns else "the table is empty", None,
            f"add a header row ({', '.join(PLAN_COLUMNS)}) and one row per activity")
    _check_columns(table, ACTIVITY_COLUMNS, ACTIVITY_REQUIRED)
    with_progress = any(column in table.columns for column in PROGRESS_COLUMNS)
    rows = [_ActivityRow(_activity(r, table, with_progress), Where(table.source, r.line))
            for r in table.rows]
    first: dict[str, _ActivityRow] = {}
    for row in rows:
        ident = row.activity.id
        if ident in first:
            raise row.where.at("id").error(
                f"the id is used twice: rows {first[ident].where.row} and {row.where.row}",
                ident, "give each activity its own id")
        first[ident] = row
    return rows


def _define_calendar(source: str, name: str) -> str:
    """How to define the calendar ``name`` in the settings ``source`` (its form's syntax)."""
    if source.endswith("(sheet project)"):
        return f"define it with the key {CALENDARS}.{name}.workdays on {source}"
    if source.endswith("(project)"):
        return f'define it under "{CALENDARS}": {{"{name}": {{"workdays": ...}}}} in {source}'
    return f"define it under [{CALENDARS}.{name}] in {source}"


def _check_calendars(rows: Sequence[_ActivityRow], defined: Sequence[str],
                     settings_source: str) -> None:
    """Every calendar an activity names must be defined in the settings."""
    known = set(defined)
    for row in rows:
        name = row.activity.calendar
        if not name or name in known:
            continue
        close = [d for d in defined if d.lower() == name.lower()]
        close += [d for d in difflib.get_close_matches(name, defined, n=2) if d not in close]
        hint = f"did you mean {' or '.join(repr(d) for d in close)}? " if close else ""
        raise row.where.at(CALENDAR_COLUMN).error(
            f"unknown calendar '{name}'", row.activity.calendar,
            f"{hint}{_define_calendar(settings_source, name)}, or leave the cell empty for the "
            f"project calendar; defined: {', '.join(defined) or 'none'}")


# ---------------------------------------------------------------- links

def _column_links(table: Table) -> list[_LinkSpec]:
    """Links written in the predecessors column, in row order."""
    specs = []
    for row in table.rows:
        text = row.cells.get(PREDECESSORS)
        if not text:  # no predecessors: nothing to read
            continue
        where = Where(table.source, row.line, PREDECESSORS)
        succ = row.cells["id"]
        for item, (pred, kind, lag) in parse_predecessor_items(text, where):
            specs.append(_LinkSpec(Link(pred, succ, kind, lag), where, item, item))
    return specs


def _table_links(table: Table | None) -> list[_LinkSpec]:
    """Links written one per row in the links table."""
    if table is None or not table.rows:
        return []
    _check_columns(table, LINK_COLUMNS, LINK_REQUIRED)
    specs = []
    for row in table.rows:
        pred = _required(row, table, "predecessor", text_value, "the predecessor's id")
        succ = _required(row, table, "successor", text_value, "the successor's id")
        kind = _optional(row, table, "type", link_type, LinkType.FS)
        lag = _optional(row, table, "lag", _lag, 0)
        link = Link(pred, succ, kind, lag)
        specs.append(_LinkSpec(link, _cell(row, table, "predecessor")[1], link.text(), pred,
                               _cell(row, table, "successor")[1]))
    return specs


def _resolve_links(specs: list[_LinkSpec], ids: Sequence[str]) -> dict[tuple, _LinkSpec]:
    """Check ids, self-links and duplicates; the result keeps the given order."""
    known = set(ids)
    seen: dict[tuple, _LinkSpec] = {}
    for spec in specs:
        link = spec.link
        if link.pred not in known:
            raise _unknown_id(link.pred, ids, spec.where, spec.pred_text, "predecessor")
        if link.succ not in known:
            raise _unknown_id(link.succ, ids, spec.succ_where, link.succ, "successor")
        if link.pred == link.succ:
            raise spec.where.error(f"activity '{link.pred}' is linked to itself", spec.text,
                                   "remove this link; an activity cannot be its own predecessor")
        key = (link.pred, link.succ, link.type)
        if key in seen:
            first = seen[key].where
            raise spec.where.error(
                f"the link {link.pred} -> {link.succ} ({link.type.value}) is given twice: "
                f"{_place(first)} column '{first.column}' and here", spec.text,
                "keep one of them (change the lag there if needed)")
        seen[key] = spec
    return seen


def _points_forward(links: dict[tuple, _LinkSpec], ids: Sequence[str]) -> bool:
    """True when every link goes from an activity to one further down the table.

    Then there can be no loop (a loop would have to lead back up), which is how most
    schedules are written; it is checked far faster than sorting the graph.
    """
    position = {ident: i for i, ident in enumerate(ids)}
    return all(position[p] < position[s] for p, s, _ in links)


def _check_acyclic(links: dict[tuple, _LinkSpec], ids: Sequence[str]) -> None:
    """Refuse loops in the link graph, naming the ids around the loop in order."""
    if _points_forward(links, ids):
        return
    preds: dict[str, list[str]] = {}
    for p, s, _ in links:
        preds.setdefault(s, []).append(p)
    try:  # the common case, no loop, checked fast by the standard library
        TopologicalSorter(preds).prepare()
        return
    except GraphCycle:
        pass
    import networkx as nx  # only for a loop; importing it takes longer than most reading

    graph = nx.MultiDiGraph()  # a loop: networkx names its links in order
    graph.add_edges_from((p, s, k) for (p, s, k) in links)
    cycle = nx.find_cycle(graph)
    files = dict.fromkeys(links[(u, v, k)].where.file for u, v, k in cycle)
    raise CycleError([u for u, _, _ in cycle], file=" and ".join(files))


# ---------------------------------------------------------------- crash steps

def _step_rows(table: Table | None, ids: Sequence[str]) -> dict[str, list[_StepRow]]:
    """Crash steps grouped by activity id, each group in order of use."""
    if table is None or not table.rows:
        return {}
    _check_columns(table, STEP_COLUMNS, STEP_COLUMNS)
    groups: dict[str, list[_StepRow]] = {}
    for row in table.rows:
        ident = _required(row, table, "id", text_value, "the id of the activity")
        where = _cell(row, table, "id")[1]
        if ident not in ids:
            raise _unknown_id(ident, ids, where, ident, "activity")
        days = _required(row, table, "days", _step_days,
                         "the number of working days this step can save")
        cost = _required(row, table, "cost_per_day", number_value, "the added cost per day saved")
        groups.setdefault(ident, []).append(_StepRow(ident, CrashStep(days, cost), Where(table.source, row.line)))
    return groups


def _check_steps(row: _ActivityRow, steps: list[_StepRow]) -> None:
    """Steps must get dearer in order, fit in the duration and agree with the crash columns."""
    activity = row.activity
    for before, after in zip(steps, steps[1:]):
        if after.step.cost_per_day < before.step.cost_per_day:
            raise after.where.at("cost_per_day").error(
                f"this step of '{activity.id}' is cheaper per day than the step on row "
                f"{before.where.row}; the optimiser (a linear programme) would take the cheaper "
                "step first, so it cannot take them in this order",
                after.step.cost_per_day,
                "sort the steps by cost per day, cheapest first, or model them as discrete "
                "options (options table)")
    total = sum(s.step.days for s in steps)
    rows = ", ".join(str(s.where.row) for s in steps)
    if total > activity.duration:
        raise steps[-1].where.at("days").error(
            f"the steps of '{activity.id}' save {total} days in all but its duration is only "
            f"{activity.duration} ({_place(row.where)})", steps[-1].step.days,
            f"make the step days add up to at most {activity.duration}")
    shortest = activity.duration - total
    if activity.crash_duration is not None and activity.crash_duration != shortest:
        raise row.where.at("crash_duration").error(
            f"the crash duration does not match the crash steps of '{activity.id}' "
            f"({steps[0].where.file} rows {rows}): duration {activity.duration} minus "
            f"{total} step days is {shortest}", activity.crash_duration,
            f"write {shortest}, leave crash_duration empty, or change the steps")
    stepped = activity.cost + sum(s.step.days * s.step.cost_per_day for s in steps)
    if activity.crash_cost is not None and not math.isclose(activity.crash_cost, stepped,
                                                            rel_tol=1e-9, abs_tol=1e-6):
        raise row.where.at("crash_cost").error(
            f"the crash cost does not match the crash steps of '{activity.id}' "
            f"({steps[0].where.file} rows {rows}), which give {stepped:g}", activity.crash_cost,
            f"write {stepped:g} or leave crash_cost empty")


def _with_steps(row: _ActivityRow, steps: list[_StepRow]) -> Activity:
    """The activity with its crash steps; its crash cost must be known if it can be shortened."""
    activity = row.activity
    if steps:
        _check_steps(row, steps)
        return replace(activity, steps=tuple(s.step for s in steps))
    if activity.crash_cost is None and activity.shortest_normal < activity.duration:
        raise row.where.at("crash_cost").error(
            f"'{activity.id}' can be shortened to {activity.shortest_normal} days but its crash cost "
            "is empty, so the cost of crashing is unknown", "",
            "write the total direct cost at crash duration, or give crash steps for it")
    return activity


# ---------------------------------------------------------------- discrete options

def _added_cost(text: str, where: Where) -> float:
    """The added direct cost of an option; negative for a slower, cheaper method."""
    return number_value(text, where, minimum=None)


def _option(row: Row, table: Table) -> Option:
    """One option from its row, with the checks that need only this row."""
    name = _required(row, table, "option", text_value, "a name for this way of doing the work, "
                     "e.g. 'second crew'")
    duration = _required(row, table, "duration", whole_value,
                         "the option's duration in whole working days")
    added = _required(row, table, "added_cost", _added_cost,
                      "the direct cost the option adds to the activity's cost (0 if none, "
                      "negative if it saves money)")
    crash = _optional(row, table, "crash_duration", whole_value)
    per_day = _optional(row, table, "cost_per_day", number_value)
    if crash is not None and crash > duration:
        raise _cell(row, table, "crash_duration")[1].error(
            f"the crash duration is longer than the option's duration ({duration})",
            row.cells["crash_duration"],
            f"write a crash duration of {duration} or less, or leave it empty")
    if crash is not None and per_day is None:
        raise _cell(row, table, "cost_per_day")[1].error(
            "the option has a crash duration but no cost per day, so the cost of shortening "
            "it is unknown", "", "write the added cost per working day saved, or leave "
            "crash_duration empty")
    if per_day is not None and crash is None:
        raise _cell(row, table, "crash_duration")[1].error(
            "the option has a cost per day but no crash duration, so it is unknown how far "
            "it can be shortened", "", "write the shortest duration of the option, or leave "
            "cost_per_day empty")
    return Option(name=name, duration=duration, added_cost=added,
                  note=_optional(row, table, "note", text_value, ""),
                  crash_duration=crash, cost_per_day=0.0 if per_day is None else per_day)


def _option_rows(table: Table | None, activities: Sequence[_ActivityRow]) -> dict[str, list[_OptionRow]]:
    """Options grouped by activity id, each group in file order."""
    if table is None or not table.rows:
        return {}
    _check_columns(table, OPTION_COLUMNS, OPTION_REQUIRED)
    by_id = {r.activity.id: r for r in activities}
    ids = list(by_id)
    groups: dict[str, list[_OptionRow]] = {}
    for row in table.rows:
        ident = _required(row, table, "id", text_value, "the id of the activity")
        where = _cell(row, table, "id")[1]
        if ident not in by_id:
            raise _unknown_id(ident, ids, where, ident, "activity")
        owner = by_id[ident]
        if owner.activity.is_milestone:
            raise where.error(
                f"'{ident}' is a milestone (duration 0 at {_place(owner.where)}), so it has no "
                "other way of being done", ident,
                "remove this option, or give the activity its normal duration")
        option = _option(row, table)
        group = groups.setdefault(ident, [])
        for other in group:
            if other.option.name == option.name:
                raise _cell(row, table, "option")[1].error(
                    f"the option '{option.name}' of '{ident}' is given twice: rows "
                    f"{other.where.row} and {row.line}", option.name,
                    "give each option of an activity its own name")
        group.append(_OptionRow(ident, option, Where(table.source, row.line)))
    return groups


def _with_options(activity: Activity, options: list[_OptionRow] | None) -> Activity:
    """The activity with its discrete options (unchanged when it has none)."""
    if not options:
        return activity
    return replace(activity, options=tuple(o.option for o in options))


# ---------------------------------------------------------------- the whole project

def parse_tables(tables: Tables) -> Project:
    """Validate everything and build the Project (activity and link order as given)."""
    settings = parse_settings(tables.settings)
    rows = _activity_rows(tables.activities)
    _check_progress(rows, tables.activities, settings.start, settings.data_date,
                    tables.settings.source)
    _check_calendars(rows, [c.name for c in settings.calendars],
                     tables.settings.source)
    ids = [r.activity.id for r in rows]
    links = _resolve_links(_column_links(tables.activities) + _table_links(tables.links), ids)
    steps = _step_rows(tables.crash_steps, ids)
    options = _option_rows(tables.options, rows)
    activities = tuple(
        _with_options(_with_steps(r, steps.get(r.activity.id, [])), options.get(r.activity.id))
        for r in rows)
    _check_acyclic(links, ids)
    return Project(
        name=settings.name,
        start=settings.start,
        activities=activities,
        links=tuple(spec.link for spec in links.values()),
        calendar=settings.calendar,
        currency=settings.currency,
        costs=settings.costs,
        contract=settings.contract,
        data_date=settings.data_date,
        calendars=settings.calendars,
    )
