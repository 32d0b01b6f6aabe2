"""The one validation path: tables read from any form -> :class:`~hasten.project.Project`.

:func:`parse_tables` is pure: it takes :class:`~hasten.formats.tables.Tables` (text cells,
each row with the row number the user sees) and returns a Project or raises
:class:`~hasten.errors.InputError` (or :class:`~hasten.errors.CycleError`) naming the
file, row, column and value, and saying how to fix it.

The tables are read by concern: the settings (:mod:`hasten.formats.settings`), the
activities with their progress and calendar cells (:mod:`hasten.formats.activities`), the
links (:mod:`hasten.formats.links`), and the crash steps and options
(:mod:`hasten.formats.shortening`); the column names are in :mod:`hasten.formats.columns`.
"""

from __future__ import annotations

from itertools import compress, repeat
from operator import attrgetter, is_, itemgetter

from hasten.formats.activities import (activity_rows, check_calendars, check_progress,
                                       percent_notes)
from hasten.formats.cells import one_line_errors
from hasten.formats.columns import CALENDAR_COLUMN, PLAN_COLUMNS
from hasten.formats.links import check_acyclic, column_links, resolve_links, table_links
from hasten.formats.quick import quick_links
from hasten.formats.reach import check_reach
from hasten.formats.risk import check_risk_trades
from hasten.formats.settings import parse_settings
from hasten.formats.shortening import option_rows, step_rows, with_options, with_steps
from hasten.formats.tables import Tables
from hasten.project import Project

__all__ = ["parse_tables", "parse_tables_with_notes"]


@one_line_errors
def parse_tables(tables: Tables) -> Project:
    """Validate everything and build the Project (activity and link order as given)."""
    return parse_tables_with_notes(tables)[0]


@one_line_errors
def parse_tables_with_notes(tables: Tables) -> tuple[Project, tuple[str, ...]]:
    """As :func:`parse_tables`, and the reading notes: one text per value that was read as
    written but is probably a slip (e.g. percentages written as fractions), naming the
    file, the column and what was assumed."""
    settings = parse_settings(tables.settings)
    rows = activity_rows(tables.activities)
    check_progress(rows, tables.activities, settings.start, settings.data_date,
                   tables.settings.source)
    if CALENDAR_COLUMN in tables.activities.columns:  # where activities name calendars
        check_calendars(rows, [c.name for c in settings.calendars], tables.settings.source)
    if settings.risk.trades or settings.risk.correlation:  # trades named in the settings
        check_risk_trades(list(map(attrgetter("activity.trade"), rows)), settings.risk,
                          tables.settings)
    by_id = dict(zip(map(attrgetter("activity.id"), rows), rows))
    ids = list(by_id)
    quick = (quick_links(tables.activities, ids)
             if tables.links is None or not tables.links.rows else None)
    if quick is None:
        links = resolve_links(column_links(tables.activities) + table_links(tables.links), ids)
    steps = step_rows(tables.crash_steps, by_id)
    options = option_rows(tables.options, by_id)
    if steps or options:
        activities = tuple(
            with_options(with_steps(r, steps.get(r.activity.id, [])), options.get(r.activity.id))
            for r in rows)
    else:  # the same, quicker: only an activity without a crash cost has anything to check
        activities = tuple(map(itemgetter(0), rows))
        for r in compress(rows, map(is_, map(attrgetter("crash_cost"), activities),
                                    repeat(None))):
            with_steps(r, [])
    if quick is None:
        positions = check_acyclic(links, ids)
        project_links = tuple(spec.link for spec in links.values())
    else:  # valid and without a loop: the places are found again only for a message
        project_links, positions = tuple(quick[0]), quick[1:]
        links = None
    project = Project(
        name=settings.name,
        start=settings.start,
        activities=activities,
        links=project_links,
        calendar=settings.calendar,
        currency=settings.currency,
        costs=settings.costs,
        contract=settings.contract,
        data_date=settings.data_date,
        calendars=settings.calendars,
        labour=settings.labour,
        risk=settings.risk,
    )

    def places():
        specs = links if links is not None else resolve_links(column_links(tables.activities), ids)
        return ({r.activity.id: r.where for r in rows},
                [s.succ_where.at("lag") if s.succ_where else s.where for s in specs.values()])

    # a table of the plan columns only, and no options: no progress, not_before date,
    # calendar or option to look for
    plain = set(tables.activities.columns) <= set(PLAN_COLUMNS) and not options
    check_reach(project, places, tables.settings.where, positions, plain)
    notes = []
    if "percent_complete" in tables.activities.columns:
        notes += percent_notes(tables.activities)
    return project, tuple(notes)
