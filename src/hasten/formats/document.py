"""The canonical written form of a Project, shared by the three writers.

Canonical choices:

* every optional setting that is None is left out; all other settings are written;
* activities are written in order with all plan columns; a crash column that is None stays
  empty; of the progress and date columns (``actual_start`` ... ``damages_per_day``) only
  those that some activity uses are written (a project without progress keeps the plan
  layout), empty where an activity has no value; ``damages_per_day`` 0 stays empty;
* the data date goes into the ``status`` section when it is given;
* named calendars go into ``calendars.NAME.workdays`` (a named calendar's name when the
  weekdays match one, else the list of weekday names) and ``calendars.NAME.holidays``
  (always written, ``[]`` for none, so that reading back does not give the project's
  holidays), in the project's order; the ``calendar`` column is written after the progress
  columns only when some activity names a calendar, empty for the project calendar;
* the labour columns (``labour_hours`` ... ``min_duration``) come last, each only when some
  activity has a value in it: an activity's crew data in full (``max_crews`` and
  ``equipment_per_day`` too, a ``wage`` of None empty), ``min_duration`` empty when 0;
  labour rules go into ``labour.*`` with every key (None as ``none``) and the wages;
* the ``optimistic`` and ``pessimistic`` columns come last, each only when some activity
  has a value in it; the ``[risk]`` section (``risk.*`` keys) is written when given, with
  its distribution whenever some range is given;
* links go into the ``predecessors`` column (``Link.text()``, joined with ``"; "``) when the
  project's link order is the order reading gives back (grouped by successor in activity
  order); otherwise all links go into the links table, in order, and the column stays empty;
* crash steps go into the crash steps table, in activity order, each activity's steps in order;
* discrete options go into the options table, in activity order, each activity's options in
  order; an option's ``crash_duration`` and ``cost_per_day`` stay empty when it cannot be
  shortened (``cost_per_day`` is written whenever ``crash_duration`` is);
* whole-valued money amounts are written as integers (``12000``, not ``12000.0``).
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field, fields, is_dataclass

from hasten.formats.cells import plain_number as _plain
from hasten.formats.columns import (CALENDAR_COLUMN, LABOUR_COLUMNS, LINK_COLUMNS, OPTION_COLUMNS,
                                    PLAN_COLUMNS, PROGRESS_COLUMNS, RISK_COLUMNS, STEP_COLUMNS)
from hasten.formats.settings import settings_values
from hasten.formats.tables import Settings, Tables, table_from_grid
from hasten.project import Activity, Link, Option, Project

__all__ = ["Document", "to_document", "document_tables", "first_difference"]


@dataclass(frozen=True)
class Document:
    """Plain values ready for a writer: flat settings and one list of dicts per table.

    Every activity record has the same keys: the plan columns, the progress columns in use
    and the calendar column if some activity names a calendar.
    Dates are ``date`` objects; each writer turns them into its own form.
    """

    settings: dict[str, object]
    activities: list[dict[str, object]]
    links: list[dict[str, object]]
    crash_steps: list[dict[str, object]]
    options: list[dict[str, object]] = field(default_factory=list)

    @property
    def activity_columns(self) -> tuple[str, ...]:
        """The columns to write: the plan columns, then the progress columns, the calendar
        column and the labour columns in use."""
        used = {key for record in self.activities for key in record}
        optional = PROGRESS_COLUMNS + (CALENDAR_COLUMN,) + LABOUR_COLUMNS + RISK_COLUMNS
        return PLAN_COLUMNS + tuple(c for c in optional if c in used)


def _in_reading_order(project: Project) -> bool:
    """True when reading the predecessors column would give the links in their current order."""
    index = {a.id: i for i, a in enumerate(project.activities)}
    if any(link.succ not in index for link in project.links):
        return False  # only the links table can carry (and report) such a link
    return tuple(sorted(project.links, key=lambda link: index[link.succ])) == project.links


def _progress_cells(activity: Activity) -> dict[str, object]:
    """The progress and date cells of one activity (None = empty)."""
    return {
        "actual_start": activity.actual_start,
        "actual_finish": activity.actual_finish,
        "remaining": activity.remaining,
        "percent_complete": _plain(activity.percent_complete),
        "not_before": activity.not_before,
        "deadline": activity.deadline,
        # 0 is the default and reads back from an empty cell
        "damages_per_day": _plain(activity.damages_per_day) or None,
    }


def _labour_cells(activity: Activity) -> dict[str, object]:
    """The labour cells of one activity (None = empty)."""
    crew = activity.crew
    cells: dict[str, object] = dict.fromkeys(LABOUR_COLUMNS)
    if crew is not None:
        cells.update(labour_hours=_plain(crew.labour_hours), crew_size=crew.crew_size,
                     wage=_plain(crew.wage), max_crews=crew.max_crews,
                     equipment_per_day=_plain(crew.equipment_per_day))
    cells["min_duration"] = activity.min_duration or None
    return cells


def _activity_row(activity: Activity, links: list[Link]) -> dict[str, object]:
    """The activity's cells; ``links`` are its own incoming links (for the predecessors column)."""
    return {
        "id": activity.id,
        "name": activity.name,
        "trade": activity.trade,
        "duration": activity.duration,
        "crash_duration": activity.crash_duration,
        "cost": _plain(activity.cost),
        "crash_cost": _plain(activity.crash_cost),
        "predecessors": "; ".join(link.text() for link in links),
    }


def _option_row(activity: Activity, option: Option) -> dict[str, object]:
    plain = option.crash_duration is None and option.cost_per_day == 0
    return {
        "id": activity.id,
        "option": option.name,
        "duration": option.duration,
        "added_cost": _plain(option.added_cost),
        "note": option.note,
        "crash_duration": option.crash_duration,
        # a cost per day without a crash duration is written too, so that the check before
        # writing refuses it instead of losing it
        "cost_per_day": None if plain else _plain(option.cost_per_day),
    }


def to_document(project: Project) -> Document:
    """The canonical written form of ``project``."""
    in_column = _in_reading_order(project)
    column_links = list(project.links) if in_column else []
    incoming: dict[str, list[Link]] = {}
    for link in column_links:
        incoming.setdefault(link.succ, []).append(link)
    table_links = [] if in_column else [
        {"predecessor": l.pred, "successor": l.succ, "type": l.type.value, "lag": l.lag}
        for l in project.links]
    settings = {k: [_plain(x) for x in v] if isinstance(v, list) else _plain(v)
                for k, v in settings_values(project).items()}
    progress = [_progress_cells(a) for a in project.activities]
    used = [c for c in PROGRESS_COLUMNS if any(cells[c] is not None for cells in progress)]
    calendars = any(a.calendar for a in project.activities)
    labour = [_labour_cells(a) for a in project.activities]
    crews = [c for c in LABOUR_COLUMNS if any(cells[c] is not None for cells in labour)]
    ranges = [c for c in RISK_COLUMNS if any(getattr(a, c) is not None for a in project.activities)]
    return Document(
        settings=settings,
        activities=[_activity_row(a, incoming.get(a.id, [])) | {c: cells[c] for c in used}
                    | ({CALENDAR_COLUMN: a.calendar or None} if calendars else {})
                    | {c: own[c] for c in crews}
                    | {c: getattr(a, c) for c in ranges}
                    for a, cells, own in zip(project.activities, progress, labour)],
        links=table_links,
        crash_steps=[{"id": a.id, "days": s.days, "cost_per_day": _plain(s.cost_per_day)}
                     for a in project.activities for s in a.steps],
        options=[_option_row(a, o) for a in project.activities for o in a.options],
    )


def _grid(columns: tuple[str, ...], records: list[dict[str, object]]):
    """Header on row 1, records from row 2, as a spreadsheet would have them."""
    yield 1, columns
    for line, record in enumerate(records, start=2):
        yield line, [record.get(c) for c in columns]


def document_tables(document: Document, labels: Mapping[str, str]) -> Tables:
    """The tables a reader would build from ``document`` (for checking before writing)."""
    def table(key, columns, records):
        return table_from_grid(labels[key], _grid(columns, records))
    return Tables(
        settings=Settings(labels["settings"], document.settings),
        activities=table("activities", document.activity_columns, document.activities),
        links=table("links", LINK_COLUMNS, document.links),
        crash_steps=table("crash_steps", STEP_COLUMNS, document.crash_steps),
        options=table("options", OPTION_COLUMNS, document.options),
    )


def first_difference(expected: object, got: object, path: str = "project") -> str | None:
    """The path of the first field where two dataclass trees differ (None if equal)."""
    if expected == got:
        return None
    if is_dataclass(expected) and type(expected) is type(got):
        for f in fields(expected):
            found = first_difference(getattr(expected, f.name), getattr(got, f.name),
                                     f"{path}.{f.name}")
            if found:
                return found
    if isinstance(expected, tuple) and isinstance(got, tuple) and len(expected) == len(got):
        for i, (a, b) in enumerate(zip(expected, got)):
            found = first_difference(a, b, f"{path}[{i}]")
            if found:
                return found
    return f"{path}: {expected!r} would read back as {got!r}"
