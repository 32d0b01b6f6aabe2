"""The activities table: one activity per row, with its progress, date and calendar cells.

Progress and date columns (all optional):

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

Labour columns (all optional), from which acceleration options are built
(:mod:`hasten.crew_options`):

* ``labour_hours``: work-hours left at normal productivity (0 or more). Given, it makes the
  row's crew data, and then ``crew_size`` (workers in one crew, at least 1) is required;
  ``wage`` (straight-time rate per hour, more than 0; empty: the trade's rate under
  ``[labour.wages]``), ``max_crews`` (crews the area takes at once, at least 1, default 1)
  and ``equipment_per_day`` (plant cost per working day, default 0) are optional. Any of
  them without ``labour_hours`` is refused.
* ``min_duration``: the physical minimum in working days (curing, lead times), with or
  without crew data: at most the duration, and no crash duration below it.

``optimistic`` and ``pessimistic`` (optional columns, whole working days): the activity's
own range of durations (see :mod:`hasten.formats.risk`).
"""

from __future__ import annotations

import difflib
import re
from collections.abc import Sequence
from itertools import repeat
from operator import attrgetter
from typing import NamedTuple
from dataclasses import replace
from datetime import date

from hasten.formats.cells import (CellRef, date_value, id_value, number_value, text_value,
                                  whole_value)
from hasten.formats.columns import (ACTIVITY_COLUMNS, ACTIVITY_REQUIRED, CALENDAR_COLUMN,
                                    LABOUR_COLUMNS, PLAN_COLUMNS, PROGRESS_COLUMNS, RISK_COLUMNS,
                                    cell_ref, check_columns, optional, required)
from hasten.formats.instances import instance, plain_defaults
from hasten.formats.quick import quick_activities
from hasten.formats.risk import range_cells
from hasten.formats.settings import CALENDARS
from hasten.formats.tables import ColumnRows, Row, Table
from hasten.labour import CrewData
from hasten.project import Activity

__all__ = ["ActivityRow", "activity_rows", "check_progress", "check_calendars", "percent_notes"]

_ID_FORBIDDEN = re.compile(r"[\s;:,]")  # \s is exactly what str.isspace() calls a space


class ActivityRow(NamedTuple):
    """An activity as read from one row, before crash steps are attached: the activity, the
    table's source and the row's number (a named tuple, as one is made per row; its place
    is built when asked for, which is mostly for a message)."""

    activity: Activity
    source: str
    line: int

    @property
    def where(self) -> CellRef:
        """The row's place."""
        return CellRef(self.source, self.line)


def _activity_id(text: str, where: CellRef) -> str:
    """An id: any text without spaces or the separators ``; : ,``."""
    ident = id_value(text, where)
    if _ID_FORBIDDEN.search(ident):
        raise where.error("an id cannot contain spaces, ';', ':' or ','", text,
                          "use letters, digits, '-', '_' or '.', e.g. 'A10' or 'F-2.1'")
    return ident


_PLAIN_ID = re.compile(r"[A-Za-z0-9_.\-]+")
_PLAIN_DAYS = re.compile(r"[0-9]{1,6}")  # at most 999,999: within WHOLE_LIMIT
_PLAIN_MONEY = re.compile(r"[0-9]{1,15}(?:\.[0-9]{1,15})?")


#: An activity's fields at their defaults, for :func:`_new_activity` (None: use Activity())
_DEFAULTS = plain_defaults(Activity, ("id", "duration"))


def _new_activity(ident: str, duration: int, name: str, trade: str, crash_duration: int | None,
                  cost: float, crash_cost: float | None) -> Activity:
    """``Activity(id=ident, duration=duration, ...)`` with the other fields at their
    defaults, three times faster than the constructor (see :mod:`hasten.formats.instances`)."""
    if _DEFAULTS is None:  # pragma: no cover - Activity as it is today takes the dictionary
        return Activity(id=ident, duration=duration, name=name, trade=trade,
                        crash_duration=crash_duration, cost=cost, crash_cost=crash_cost)
    values = _DEFAULTS.copy()
    values.update(id=ident, duration=duration, name=name, trade=trade,
                  crash_duration=crash_duration, cost=cost, crash_cost=crash_cost)
    return instance(Activity, values)


def _plain_activity(cells) -> Activity | None:
    """The activity of a row whose cells are all in their plainest form (ASCII id, digits,
    plain decimals, printable text) and consistent; ``None`` for anything else, which then
    takes the full path of :func:`_activity` with all its checks and messages. Reading a
    large project spends most of its time here, so the common case is kept short. A row
    naming a calendar is not plain."""
    get = cells.get
    if get(CALENDAR_COLUMN) or any(get(c) for c in RISK_COLUMNS):
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
    return _new_activity(ident, d, name, trade, c, money, crash_money)


def _activity(row: Row, table: Table, with_progress: bool = True) -> Activity:
    """One activity from its row, with the checks that need only this row.

    ``with_progress`` False says the table has no progress column, so those fields keep
    their defaults (what :func:`_progress` gives for empty cells).
    """
    if not with_progress:
        plain = _plain_activity(row.cells)
        if plain is not None:
            return plain
    duration = required(row, table, "duration", whole_value, "the normal duration in whole working days")
    crash_duration = optional(row, table, "crash_duration", whole_value)
    cost = optional(row, table, "cost", number_value, 0.0)
    crash_cost = optional(row, table, "crash_cost", number_value)
    if crash_duration is not None and crash_duration > duration:
        raise cell_ref(row, table, "crash_duration").error(
            f"the crash duration is longer than the duration ({duration})", row.cells["crash_duration"],
            f"write a crash duration of {duration} or less (the shortest possible duration)")
    if crash_cost is not None and crash_cost < cost:
        raise cell_ref(row, table, "crash_cost").error(
            f"the crash cost is below the normal cost ({cost:g})", row.cells["crash_cost"],
            "write the total direct cost at crash duration, at least the normal cost")
    return Activity(
        id=required(row, table, "id", _activity_id, "a unique id for every activity"),
        duration=duration,
        name=optional(row, table, "name", text_value, ""),
        trade=optional(row, table, "trade", text_value, ""),
        crash_duration=crash_duration,
        cost=cost,
        crash_cost=crash_cost,
        calendar=optional(row, table, CALENDAR_COLUMN, text_value, ""),
        **(_progress(row, table, duration) if with_progress else {}),
        **range_cells(row, table, duration),
    )


def _at_least_one(text: str, where: CellRef) -> int:
    return whole_value(text, where, minimum=1, unit="crews or workers")


def _labour(row: Row, table: Table, activity: Activity) -> Activity:
    """The activity with the physical minimum and the crew data of its row."""
    minimum = optional(row, table, "min_duration", whole_value, 0)
    if minimum > activity.duration:
        raise cell_ref(row, table, "min_duration").error(
            f"the physical minimum is longer than the duration ({activity.duration})",
            row.cells["min_duration"],
            f"write {activity.duration} or less, or raise the duration")
    if activity.crash_duration is not None and activity.crash_duration < minimum:
        raise cell_ref(row, table, "crash_duration").error(
            f"the crash duration is below the physical minimum (min_duration {minimum})",
            row.cells["crash_duration"],
            f"write a crash duration of {minimum} or more, or lower min_duration")
    hours = optional(row, table, "labour_hours", number_value)
    if hours is None:
        given = next((c for c in LABOUR_COLUMNS[1:-1] if row.cells.get(c)), None)
        if given is not None:
            raise cell_ref(row, table, given).error(
                "crew data without labour hours", row.cells[given],
                "write the work-hours left at normal productivity in labour_hours, or clear "
                "this cell")
        return replace(activity, min_duration=minimum) if minimum else activity
    if hours > 0 and activity.is_milestone:
        raise cell_ref(row, table, "labour_hours").error(
            "a milestone (duration 0) has no work to do", row.cells["labour_hours"],
            "clear the labour data, or give the activity its normal duration")
    crew = CrewData(
        labour_hours=hours,
        crew_size=required(row, table, "crew_size", _at_least_one,
                           "the number of workers in one crew, e.g. 4"),
        wage=optional(row, table, "wage", number_value),
        max_crews=optional(row, table, "max_crews", _at_least_one, 1),
        equipment_per_day=optional(row, table, "equipment_per_day", number_value, 0.0),
        trade=activity.trade, file=table.source, row=row.line)
    return replace(activity, min_duration=minimum, crew=crew)


def _percent(text: str, where: CellRef) -> float:
    """A percentage of work done, 0 to 100; a % sign after the number is allowed (``60%``
    is 60, as is a workbook cell formatted as a percentage holding 0.6)."""
    plain = text[:-1].rstrip() if text.endswith("%") else text
    number = number_value(plain, where, minimum=None) if plain else number_value(text, where)
    if not 0 <= number <= 100:
        raise where.error("the percent complete is outside 0 to 100", text,
                          "write a number from 0 to 100 (60 or 60% for 60 percent)")
    return number


def percent_notes(table: Table) -> list[str]:
    """A reading note when every ``percent_complete`` lies between 0 and 1, not all are 0
    and none has a % sign: they are probably fractions (0.6 for 60 %), which are read as
    percent (0.6 %). Only called for a table that was read without error."""
    given = [(row.line, row.cells.get("percent_complete", "")) for row in table.rows]
    given = [(line, text) for line, text in given if text]
    if not given or any(text.endswith("%") for _, text in given):
        return []  # a % sign says these are percent
    values = [(line, text, float(text)) for line, text in given]
    if not all(0 <= v <= 1 for _, _, v in values) or not any(v for _, _, v in values):
        return []
    line, text, value = next(item for item in values if item[2] > 0)
    meant = f"{value * 100:g}"
    return [f"{table.source}, column 'percent_complete': every value is between 0 and 1 "
            f"(e.g. {text} on row {line}); they are read as percent, so {text} means "
            f"{text} % complete. If they are fractions of the whole, write {meant} (or "
            f"{meant}%) for {meant} percent"]


def _progress(row: Row, table: Table, duration: int) -> dict[str, object]:
    """The progress and date fields of one row, with the checks that need only this row
    (those against the data date and the project start are in :func:`check_progress`)."""
    fields = {
        "actual_start": optional(row, table, "actual_start", date_value),
        "actual_finish": optional(row, table, "actual_finish", date_value),
        "remaining": optional(row, table, "remaining", whole_value),
        "percent_complete": optional(row, table, "percent_complete", _percent),
        "not_before": optional(row, table, "not_before", date_value),
        "deadline": optional(row, table, "deadline", date_value),
        "damages_per_day": optional(row, table, "damages_per_day", number_value, 0.0),
    }
    start, finish = fields["actual_start"], fields["actual_finish"]
    remaining, percent = fields["remaining"], fields["percent_complete"]
    if finish is not None and start is None:
        raise cell_ref(row, table, "actual_start").error(
            f"the actual start is empty but the actual finish is given ({finish.isoformat()})", "",
            "write the date work started, or clear the actual finish")
    if finish is not None and finish < start:
        raise cell_ref(row, table, "actual_finish").error(
            f"the actual finish is before the actual start ({start.isoformat()})",
            row.cells["actual_finish"], "check both actual dates (the finish is the last day worked)")
    for column, value in (("remaining", remaining), ("percent_complete", percent)):
        if value is not None and start is None:
            raise cell_ref(row, table, column).error(
                f"progress needs an actual start: the {column.replace('_', ' ')} is given but the "
                "actual start is empty", row.cells[column],
                "write the date work started in actual_start, or clear this cell if work has not "
                "started")
    if remaining is not None and remaining > duration:
        raise cell_ref(row, table, "remaining").error(
            f"more work remaining than the duration ({duration})", row.cells["remaining"],
            f"write {duration} or fewer working days, or raise the duration")
    if finish is not None and remaining not in (None, 0):
        raise cell_ref(row, table, "remaining").error(
            "the activity is finished (it has an actual finish) but work is remaining",
            row.cells["remaining"], "write 0 or clear the cell, or clear the actual finish")
    if finish is not None and percent not in (None, 100):
        raise cell_ref(row, table, "percent_complete").error(
            "the activity is finished (it has an actual finish) but is not 100 percent complete",
            row.cells["percent_complete"], "write 100 or clear the cell, or clear the actual finish")
    if fields["damages_per_day"] > 0 and fields["deadline"] is None:
        raise cell_ref(row, table, "damages_per_day").error(
            "damages per day are given but the deadline is empty, so there is no date to be "
            "late against", row.cells["damages_per_day"],
            "write the activity's deadline (the last day allowed), or clear the damages")
    return fields


def check_progress(rows: Sequence[ActivityRow], table: Table, start: date,
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


def activity_rows(table: Table) -> list[ActivityRow]:
    """All activities in order; at least one, ids unique."""
    if not table.rows:
        raise CellRef(table.source, table.header_line).error(
            "there are no activities" if table.columns else "the table is empty", None,
            f"add a header row ({', '.join(PLAN_COLUMNS)}) and one row per activity")
    check_columns(table, ACTIVITY_COLUMNS, ACTIVITY_REQUIRED)
    with_progress = any(column in table.columns for column in PROGRESS_COLUMNS)
    source = table.source
    quick = None if with_progress else quick_activities(table)
    if quick is not None:
        lines = (table.rows.lines if isinstance(table.rows, ColumnRows)
                 else map(attrgetter("line"), table.rows))
        # (tuple.__new__ makes each named tuple without a Python-level call)
        rows = list(map(tuple.__new__, repeat(ActivityRow), zip(quick, repeat(source), lines)))
    else:
        rows = [ActivityRow(_activity(r, table, with_progress), source, r.line)
                for r in table.rows]
    if any(column in table.columns for column in LABOUR_COLUMNS):
        rows = [ActivityRow(_labour(r, table, row.activity), source, row.line)
                for r, row in zip(table.rows, rows)]
    if len(set(map(attrgetter("activity.id"), rows))) == len(rows):
        return rows
    first: dict[str, ActivityRow] = {}
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


def check_calendars(rows: Sequence[ActivityRow], defined: Sequence[str],
                    settings_source: str) -> None:
    """Every calendar an activity names must be defined in the settings."""
    if not any(map(attrgetter("activity.calendar"), rows)):
        return
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

