"""Dates within reach: refuse, when reading, a project whose work could run past 9999-12-31.

Python's dates end on 9999-12-31 (``datetime.date.max``), so a schedule that runs past it
cannot be dated; a chain of activities of 999,999 working days, or a data date late in
9999 with work left, would be read as valid and then fail when scheduled. This module
bounds the latest date any schedule of the project can reach and refuses the project up
front, naming the values that make it too long.

The bound, in calendar days from the earliest day each activity may start (the project
start, the data date, its ``not_before`` date): every activity adds its longest duration
(a slower option included; the remaining work of a started activity; nothing for a finished
one) and every link its lag when positive, each converted to calendar days on its own
calendar as ``ceil(n / working days per week) * 7 + 7`` (a full week more for the first
working day and for moving between calendars), plus a week for every holiday of every
calendar. The longest chain of these decides. Only projects within a few centuries of the
year 9999 are ever near the bound.
"""

from __future__ import annotations

from operator import attrgetter
from collections.abc import Callable, Mapping, Sequence
from datetime import date

import numpy as np

from hasten.formats.cells import CellRef
from hasten.project import Activity, Calendar, Project

__all__ = ["LAST_DATE", "check_reach"]

#: The last date a schedule may reach (Python's ``date.max``).
LAST_DATE = date.max
_EPOCH = date(2000, 1, 1)  # a late start counts as its distance from here, to be named


def _span(days: int, calendar: Calendar) -> int:
    """Most calendar days ``days`` working days of ``calendar`` can take, from any instant."""
    return _weeks_span(days, max(len(calendar.workdays), 1))


def _weeks_span(days: int, per_week: int) -> int:
    """Most calendar days ``days`` working days take at ``per_week`` working days a week."""
    return -(-days // per_week) * 7 + 7 if days > 0 else 0


def _work(activity: Activity) -> tuple[int, str]:
    """The working days still to do at the longest (and the column that says so)."""
    if activity.actual_finish is not None:
        return 0, "actual_finish"
    if activity.actual_start is not None and activity.remaining is not None:
        return activity.remaining, "remaining"
    return activity.longest, "duration"


def _durations_only(activities: Sequence[Activity]) -> bool:
    """No activity has progress or options: each one's work (:func:`_work`) is its duration."""
    return not (any(map(attrgetter("actual_start"), activities)) or any(
        map(attrgetter("actual_finish"), activities)) or any(map(attrgetter("options"), activities)))


Places = tuple[Mapping[str, CellRef], Sequence[CellRef]]


def check_reach(project: Project, places: Callable[[], Places],
                setting_where: Callable[[str], CellRef],
                positions: tuple[Sequence[int], Sequence[int]] | None = None,
                plain: bool = False) -> None:
    """Refuse ``project`` if its work could run past :data:`LAST_DATE`.

    ``places()`` gives each activity's row (by id) and each link's cell (in the order of
    ``project.links``), and ``setting_where`` a setting's place, for the message (they are
    asked for only then). ``positions``, when the caller has them, are the positions in
    ``project.activities`` of each link's predecessor and successor. ``plain``: the caller
    knows that no activity has progress, options, a ``not_before`` date or a calendar of
    its own (as for a table without those columns and without options).
    """
    calendars = {"": project.calendar} | {c.name: c for c in project.calendars}
    slack = 7 + 7 * sum(len(c.holidays) for c in calendars.values())
    limit = LAST_DATE.toordinal() - slack
    floor = max(project.start, project.data_date or project.start)
    bound = _latest_finish(project, calendars, floor, positions, plain)
    if bound is not None and bound <= limit:
        return
    # some link points up the table: the usual case at once, every activity and link one
    # after another staying in reach
    if bound is None and _in_a_row(project, calendars, floor) <= limit:
        return
    calendar_of = {a.id: calendars.get(a.calendar, project.calendar) for a in project.activities}
    work = {a.id: _span(_work(a)[0], calendar_of[a.id]) for a in project.activities}
    base = {a.id: max(floor, a.not_before or floor).toordinal() for a in project.activities}
    lags = [_span(link.lag, calendar_of.get(link.succ, project.calendar)) + 7
            for link in project.links]
    finish, came_from = _longest(project, base, work, lags)
    worst = max(finish, key=finish.get)
    if finish[worst] <= limit:
        return
    activity_where, link_where = places()
    raise _error(project, worst, came_from, work, lags, finish[worst] + slack,
                 activity_where, link_where, setting_where)


def _in_a_row(project: Project, calendars: Mapping[str, Calendar], floor: date) -> int:
    """A bound (a date ordinal) on every finish that needs no order: every activity and
    every link one after another from the latest earliest start, each activity's work and
    each positive lag at the calendar with the fewest working days a week. ``_weeks_span(n,
    k)`` is at most ``7 n / k + 14`` and a link adds ``_weeks_span(lag) + 7``, so this is
    never below :func:`_latest_finish` or :func:`_longest`. It needs no order of the
    links, so it is taken where some link points up the table and most projects are far
    enough from the year 9999 for it."""
    activities, links = project.activities, project.links
    latest = floor
    if any(map(attrgetter("not_before"), activities)):
        latest = max([floor] + [a.not_before for a in activities if a.not_before])
    slowest = max(min(len(c.workdays) for c in calendars.values()), 1)
    if _durations_only(activities):  # the usual case
        work = sum(map(attrgetter("duration"), activities))
    else:
        work = sum(_work(a)[0] for a in activities)
    days = work + sum(filter((0).__lt__, map(attrgetter("lag"), links)))
    return (latest.toordinal() + 7 * days // slowest + 7 + 14 * len(activities)
            + 21 * len(links))


def _latest_finish(project: Project, calendars: Mapping[str, Calendar], floor: date,
                   positions: tuple[Sequence[int], Sequence[int]] | None = None,
                   plain: bool = False) -> int | None:
    """The latest finish bound over all activities (a date ordinal), the same number
    :func:`_longest` finds, by one pass over arrays of positions; ``None`` when some link
    points from an activity to one further up the table (then :func:`_longest` decides).
    ``plain``: the caller knows that no activity has progress, options, a ``not_before``
    date or a calendar of its own (they are looked for otherwise).

    Links that all point down the table are taken in the order of their successor's
    position (:func:`_raised`): every link into an activity then comes before every link
    out of it. This is how most schedules are written, and takes a fraction of the time of
    :func:`_longest`.
    """
    activities, links = project.activities, project.links
    if positions is None:
        position = {a.id: i for i, a in enumerate(activities)}
        positions = [position[link.pred] for link in links], [position[link.succ] for link in links]
    pred, succ = np.asarray(positions[0], np.intp), np.asarray(positions[1], np.intp)
    if not (pred < succ).all():
        return None
    count = len(activities)
    if plain or _durations_only(activities):  # every activity's work: its duration
        work = np.fromiter(map(attrgetter("duration"), activities), np.int64, count)
    else:
        work = np.array([_work(a)[0] for a in activities], np.int64)
    first = floor.toordinal()
    if not plain and any(map(attrgetter("not_before"), activities)):
        start = np.array([max(floor, a.not_before).toordinal() if a.not_before else first
                          for a in activities], np.int64)
    else:
        start = np.full(count, first, np.int64)
    lag = np.fromiter(map(attrgetter("lag"), links), np.int64, len(links))
    if not plain and any(map(attrgetter("calendar"), activities)):
        days = np.array([max(len(calendars.get(a.calendar, project.calendar).workdays), 1)
                         for a in activities], np.int64)
        spans, lags = _weeks_spans(work, days), _weeks_spans(lag, days[succ]) + 7
    else:
        days = max(len(project.calendar.workdays), 1)
        spans, lags = _weeks_spans(work, days), _weeks_spans(lag, days) + 7
    return int((_raised(start, spans, pred, succ, lags) + spans).max(initial=first))


def _weeks_spans(days: np.ndarray, per_week: np.ndarray | int) -> np.ndarray:
    """:func:`_weeks_span` of each of ``days`` (whole days, at most 1,000,000 each)."""
    return np.where(days > 0, -(-days // per_week) * 7 + 7, 0)


_BLOCK = 512  # activities whose links in are taken together by :func:`_raised`


def _raised(start: np.ndarray, spans: np.ndarray, pred: np.ndarray, succ: np.ndarray,
            lags: np.ndarray) -> np.ndarray:
    """``start`` with each link ``p -> s`` (``p < s``) raising ``start[s]`` to at least
    ``start[p] + spans[p] + lags[e]``, links taken in their successors' order: every link
    into an activity then comes before every link out of it.

    The activities are taken in blocks of :data:`_BLOCK` in table order. The links into a
    block from activities above it (their starts are final by then) are taken at once by
    numpy; the few links within a block one by one. Where many links stay within their
    block (a chain of activities one after another), every link is taken one by one."""
    if (succ[1:] < succ[:-1]).any():
        order = np.argsort(succ, kind="stable")
        pred, succ, lags = pred[order], succ[order], lags[order]
    weight = spans[pred] + lags
    inside = pred >= succ - succ % _BLOCK  # the link stays within its successor's block
    if len(pred) < 4 * _BLOCK or np.count_nonzero(inside) * 10 > len(pred):
        raised = start.tolist()
        for p, s, w in zip(pred.tolist(), succ.tolist(), weight.tolist()):
            reach = raised[p] + w
            if reach > raised[s]:
                raised[s] = reach
        return np.array(raised, np.int64)
    raised = start.copy()
    across = ~inside
    a_pred, a_succ, a_weight = pred[across], succ[across], weight[across]
    i_pred, i_succ, i_weight = pred[inside].tolist(), succ[inside].tolist(), weight[inside].tolist()
    firsts = np.arange(0, len(start) + _BLOCK, _BLOCK)
    a_edges = np.searchsorted(a_succ, firsts).tolist()
    i_edges = np.searchsorted(succ[inside], firsts).tolist()
    for b, first in enumerate(firsts[:-1].tolist()):
        lo, hi = a_edges[b], a_edges[b + 1]
        if lo < hi:
            np.maximum.at(raised, a_succ[lo:hi], raised[a_pred[lo:hi]] + a_weight[lo:hi])
        lo, hi = i_edges[b], i_edges[b + 1]
        if lo < hi:
            block = raised[first:first + _BLOCK].tolist()
            for p, s, w in zip(i_pred[lo:hi], i_succ[lo:hi], i_weight[lo:hi]):
                reach = block[p - first] + w
                if reach > block[s - first]:
                    block[s - first] = reach
            raised[first:first + len(block)] = block
    return raised


def _longest(project: Project, base: dict[str, int], work: dict[str, int],
             lags: list[int]) -> tuple[dict[str, int], dict[str, int | None]]:
    """The latest finish bound of every activity (as a date ordinal) and the link (its
    position) that brings it, by one pass in topological order (the links have no loop)."""
    incoming: dict[str, list[int]] = {a.id: [] for a in project.activities}
    outgoing: dict[str, list[int]] = {a.id: [] for a in project.activities}
    for e, link in enumerate(project.links):
        incoming[link.succ].append(e)
        outgoing[link.pred].append(e)
    waiting = {ident: len(es) for ident, es in incoming.items()}
    ready = [ident for ident, n in waiting.items() if n == 0]
    start = dict(base)
    came_from: dict[str, int | None] = dict.fromkeys(base)
    finish: dict[str, int] = {}
    while ready:
        ident = ready.pop()
        finish[ident] = start[ident] + work[ident]
        for e in outgoing[ident]:
            succ = project.links[e].succ
            reach = finish[ident] + lags[e]
            if reach > start[succ]:
                start[succ], came_from[succ] = reach, e
            waiting[succ] -= 1
            if waiting[succ] == 0:
                ready.append(succ)
    return finish, came_from


def _error(project, worst, came_from, work, lags, bound, activity_where, link_where,
           setting_where):
    """The error naming the chain that ends at ``worst`` and its largest value."""
    by_id = {a.id: a for a in project.activities}
    chain: list[str] = [worst]
    links: list[int] = []
    while came_from[chain[-1]] is not None:
        links.append(came_from[chain[-1]])
        chain.append(project.links[links[-1]].pred)
    chain.reverse()
    first = by_id[chain[0]]
    # what each part adds, in calendar days, with its place and value
    parts: list[tuple[int, CellRef, object]] = [
        (project.start.toordinal() - _EPOCH.toordinal(), setting_where("start"),
         project.start.isoformat())]
    if project.data_date is not None and project.data_date > project.start:
        parts.append((project.data_date.toordinal() - project.start.toordinal(),
                      setting_where("status.data_date"), project.data_date.isoformat()))
    if first.not_before is not None:
        parts.append((first.not_before.toordinal() - max(project.start, project.data_date
                                                         or project.start).toordinal(),
                      activity_where[first.id].at("not_before"), first.not_before.isoformat()))
    for ident in chain:
        days, column = _work(by_id[ident])
        parts.append((work[ident], activity_where[ident].at(column), days))
    for e in links:
        parts.append((lags[e], link_where[e], project.links[e].lag))
    _, where, value = max(parts, key=lambda part: part[0])
    shown = [f"{ident} ({_work(by_id[ident])[0]} working days)" for ident in chain]
    if len(shown) > 8:
        shown = shown[:4] + [f"... {len(shown) - 7} more ..."] + shown[-3:]
    years = LAST_DATE.year + (bound - LAST_DATE.toordinal()) / 365.25
    late = (f"about the year {years:.0f}" if years >= LAST_DATE.year + 1
            else "early in the year 10000")
    floor = max(project.start, project.data_date or project.start)
    origin = (f"{first.id}'s not_before date {first.not_before.isoformat()}"
              if first.not_before is not None and first.not_before > floor else
              f"the data date {floor.isoformat()}" if floor > project.start else
              f"the project start {floor.isoformat()}")
    return where.error(
        f"the work can run past {LAST_DATE.isoformat()}, the last date hasten can handle: from "
        f"{origin} the chain {' -> '.join(shown)} can end as late as {late}", value,
        f"check this value for a typing slip, or shorten the chain: all work must end by "
        f"{LAST_DATE.isoformat()}")
