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

from operator import add, attrgetter, le, lt
from collections.abc import Callable, Mapping, Sequence
from datetime import date

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


Places = tuple[Mapping[str, CellRef], Sequence[CellRef]]


def check_reach(project: Project, places: Callable[[], Places],
                setting_where: Callable[[str], CellRef],
                positions: tuple[Sequence[int], Sequence[int]] | None = None) -> None:
    """Refuse ``project`` if its work could run past :data:`LAST_DATE`.

    ``places()`` gives each activity's row (by id) and each link's cell (in the order of
    ``project.links``), and ``setting_where`` a setting's place, for the message (they are
    asked for only then). ``positions``, when the caller has them, are the positions in
    ``project.activities`` of each link's predecessor and successor.
    """
    calendars = {"": project.calendar} | {c.name: c for c in project.calendars}
    slack = 7 + 7 * sum(len(c.holidays) for c in calendars.values())
    limit = LAST_DATE.toordinal() - slack
    floor = max(project.start, project.data_date or project.start)
    if _in_a_row(project, calendars, floor) <= limit:
        return
    bound = _latest_finish(project, calendars, floor, positions)
    if bound is not None and bound <= limit:
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
    never below :func:`_latest_finish` or :func:`_longest`; it is taken first, as most
    projects are far enough from the year 9999 for it and its sums take no Python step
    per activity."""
    activities, links = project.activities, project.links
    latest = floor
    if any(map(attrgetter("not_before"), activities)):
        latest = max([floor] + [a.not_before for a in activities if a.not_before])
    slowest = max(min(len(c.workdays) for c in calendars.values()), 1)
    if any(map(attrgetter("actual_start"), activities)) or any(
            map(attrgetter("actual_finish"), activities)) or any(
            map(attrgetter("options"), activities)):
        work = sum(_work(a)[0] for a in activities)
    else:  # the usual case: every activity's work is its duration
        work = sum(map(attrgetter("duration"), activities))
    days = work + sum(filter((0).__lt__, map(attrgetter("lag"), links)))
    return (latest.toordinal() + 7 * days // slowest + 7 + 14 * len(activities)
            + 21 * len(links))


def _latest_finish(project: Project, calendars: Mapping[str, Calendar], floor: date,
                   positions: tuple[Sequence[int], Sequence[int]] | None = None) -> int | None:
    """The latest finish bound over all activities (a date ordinal), the same number
    :func:`_longest` finds, by one pass over lists of positions; ``None`` when some link
    points from an activity to one further up the table (then :func:`_longest` decides).

    Links that all point down the table are taken in the order of their successor's
    position: every link into an activity then comes before every link out of it. This
    is how most schedules are written, and takes a tenth of the time of :func:`_longest`.
    """
    activities, links = project.activities, project.links
    if positions is None:
        position = {a.id: i for i, a in enumerate(activities)}
        positions = [position[link.pred] for link in links], [position[link.succ] for link in links]
    preds, succs = positions
    if not all(map(lt, preds, succs)):
        return None
    if any(map(attrgetter("actual_start"), activities)) or any(
            map(attrgetter("actual_finish"), activities)) or any(
            map(attrgetter("options"), activities)):
        work = [0 if a.actual_finish is not None
                else a.remaining if a.actual_start is not None and a.remaining is not None
                else a.longest if a.options else a.duration
                for a in activities]
    else:  # the usual case: every activity's work is its duration
        work = list(map(attrgetter("duration"), activities))
    first = floor.toordinal()
    if any(map(attrgetter("not_before"), activities)):
        start = [max(floor, a.not_before).toordinal() if a.not_before else first
                 for a in activities]
    else:
        start = [first] * len(activities)
    if any(map(attrgetter("calendar"), activities)):
        days = [max(len(calendars.get(a.calendar, project.calendar).workdays), 1)
                for a in activities]
        spans = list(map(_weeks_span, work, days))
        lags = [_weeks_span(link.lag, days[s]) + 7 for link, s in zip(links, succs)]
    else:  # one calendar: each distinct number of days converted once
        k = max(len(project.calendar.workdays), 1)
        span_of = {w: _weeks_span(w, k) for w in set(work)}
        spans = list(map(span_of.__getitem__, work))
        link_lags = list(map(attrgetter("lag"), links))
        lag_of = {lag: _weeks_span(lag, k) + 7 for lag in set(link_lags)}
        lags = list(map(lag_of.__getitem__, link_lags))
    if all(map(le, succs, succs[1:])):
        ordered = zip(preds, succs, lags)
    else:
        order = sorted(range(len(links)), key=succs.__getitem__)
        ordered = zip(map(preds.__getitem__, order), map(succs.__getitem__, order),
                      map(lags.__getitem__, order))
    for p, s, lag in ordered:
        reach = start[p] + spans[p] + lag
        if reach > start[s]:
            start[s] = reach
    return max(map(add, start, spans), default=first)


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
