"""Progress at the data date, and the date constraints of each activity.

With a data date, work done is history and only remaining work can move:

- finished (actual start and actual finish): fixed at its actual dates, cannot be shortened;
- started (actual start, no actual finish): starts at its actual start; its remaining
  working days (``remaining``, or ``percent_complete`` of the duration, rounded up) run
  from the data date; it can be shortened by the unused part of its crash allowance in
  proportion to the remaining work (rounded down), taking its crash steps in order;
- not started: starts on or after the data date.

An activity with ``not_before`` starts on or after that date too.

Milestones (duration 0) happen at a point in time, the boundary between two working days:

- a *start milestone* (no predecessors: a notice to proceed, a delivery that stands on its
  own date) happens at the start of its day, so work that follows it may start that day;
- any other milestone happens at the end of the day its predecessors end, but never before
  the start of the first day it may happen (the project start, its ``not_before`` date,
  the data date when it has not happened yet): a delivery with predecessors dated by its
  ``not_before`` happens at the start of that day.

:func:`end_day` gives the working day an activity's end is dated on, ``floor`` in
:class:`ActivityProgress` the first day a milestone may be dated on. A milestone with an
actual date happened at the start of that day, or at its end when a predecessor it follows
ended that day (the earliest of the two its links allow), so a notice to proceed and the
work that starts the same day are in sequence. Milestones may carry actual dates before
the project start (an award, a notice to proceed); work may not.

Each activity's dates are counted in its own calendar (:class:`~hasten.calendar.Timeline`):
its actual dates, the data date and its not-before date become positions of that calendar.

Out-of-sequence progress: a link whose successor's constrained event is already fixed in
the past (the start of a started or finished successor, the finish of a finished one) is
kept only if the actual dates satisfy it. Otherwise it is dropped with a warning that names
it: the actual dates stand and the successor's remaining work is not
held back by it. Links that constrain a started successor's finish (FF, SF) are kept.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from operator import attrgetter

from .calendar import CalendarClock, Timeline
from .errors import InputError
from .project import Activity, CrashStep, LinkType, Project

__all__ = ["ActivityProgress", "Progress", "apply_progress", "end_day", "shown_days", "DONE", "STARTED",
           "WAITING"]

DONE, STARTED, WAITING = "finished", "started", "not started"
_KIND = {LinkType.FS: 0, LinkType.SS: 1, LinkType.FF: 2, LinkType.SF: 3}


@dataclass(frozen=True)
class ActivityProgress:
    """What is left to schedule of one activity.

    ``duration`` and ``release`` describe the part still to be scheduled: for a finished
    activity its actual span (fixed at ``release``); for a started one its remaining work,
    resuming on or after the data date; otherwise the whole activity.
    """

    state: str  # DONE, STARTED or WAITING
    duration: int  # working days still to schedule, at normal pace (actual span when finished)
    release: int  # earliest (for finished: the fixed) start of that part
    start: int | None  # actual start offset of a finished or started activity
    steps: tuple[CrashStep, ...] | None  # crash steps still available, in order of use;
    # None: all of the activity's own (Activity.segments())
    floor: int = 0  # a milestone: the first working day it may be dated on (its release, or
    # the day of its actual date); work: 0
    opens: bool = False  # a start milestone (no predecessors): dated on the day it starts


@dataclass(frozen=True)
class Progress:
    data_offset: int | None  # working-day offset of the data date (first day of remaining work)
    activities: tuple[ActivityProgress, ...]
    dropped: frozenset[int]  # indexes of project.links no longer in force
    warnings: tuple[str, ...]

    @property
    def progressed(self) -> bool:
        return self.data_offset is not None


def _truncate(steps: tuple[CrashStep, ...], days: int) -> tuple[CrashStep, ...]:
    out, left = [], days
    for s in steps:
        if left <= 0:
            break
        out.append(CrashStep(min(s.days, left), s.cost_per_day))
        left -= s.days
    return tuple(out)


def end_day(state: ActivityProgress, finish: int) -> int:
    """The working day (of the activity's own calendar) whose date the end of an activity
    at ``finish`` is dated on: its last day worked; for a milestone the day its
    predecessors end, never before its ``floor`` (the start of the day it may first happen).

    >>> end_day(ActivityProgress(WAITING, 5, 0, None, None), 7)  # worked on days 2..6
    6
    >>> end_day(ActivityProgress(WAITING, 0, 10, None, None, floor=10), 10)  # not before day 10
    10
    >>> end_day(ActivityProgress(WAITING, 0, 10, None, None, floor=10), 14)  # after work ending day 13
    13
    """
    return max(finish - 1, state.floor)


def shown_days(state: ActivityProgress, milestone: bool, start: int, finish: int) -> tuple[int, int]:
    """First and last working day shown for an activity from ``start`` to ``finish``
    (early or late dates): a milestone on one day, a start milestone on the day it
    starts (see the module notes)."""
    if milestone:
        day = start if state.opens else max(finish - 1, state.floor)
        return day, day
    return start, max(finish - 1 if finish > start else start - 1, 0)


def _one(act: Activity, clock: CalendarClock, data: int | None, data_date) -> ActivityProgress:
    release = 0
    if act.not_before is not None:
        release = max(release, clock.offset_of(act.not_before, finish=False))
    if data is None or (act.actual_start is None and act.actual_finish is None):
        if data is not None:
            release = max(release, data)
        return ActivityProgress(WAITING, act.duration, release, None, None,
                                floor=release if act.duration == 0 else 0)
    if act.actual_start is None:
        raise InputError(f"activity {act.id} has an actual finish but no actual start",
                         column="actual_start", value=None, fix="give the date work started")
    if act.actual_start > data_date or (act.actual_finish and act.actual_finish >= data_date):
        raise InputError(f"activity {act.id} has actual dates on or after the data date {data_date}",
                         column="actual_finish" if act.actual_finish else "actual_start",
                         value=str(act.actual_finish or act.actual_start),
                         fix="actual dates are history: keep them before the data date, or move the data date")
    if act.duration == 0:  # at the start of its day (apply_progress may move it to the end)
        at = clock.offset_of(act.actual_finish or act.actual_start, finish=False)
        return ActivityProgress(DONE, 0, at, at, (), floor=at)
    start = clock.offset_of(act.actual_start, finish=False)
    if act.actual_finish is not None:
        if act.actual_finish < act.actual_start:
            raise InputError(f"activity {act.id} finishes before it starts", column="actual_finish",
                             value=str(act.actual_finish), fix="check both actual dates")
        finish = max(clock.offset_of(act.actual_finish, finish=True), start)
        return ActivityProgress(DONE, finish - start, start, start, ())
    elapsed = max(data - start, 0)  # working days since the actual start
    if act.remaining is not None:
        remaining = act.remaining
    elif act.percent_complete is not None:
        if not 0 <= act.percent_complete <= 100:
            raise InputError(f"activity {act.id} has percent complete outside 0-100",
                             column="percent_complete", value=act.percent_complete,
                             fix="give a percentage from 0 to 100")
        remaining = math.ceil(act.duration * (100.0 - act.percent_complete) / 100.0 - 1e-9)
    else:
        remaining = max(act.duration - elapsed, 0)
    if remaining > act.duration:
        raise InputError(f"activity {act.id} has more work remaining ({remaining} days) than its "
                         f"duration ({act.duration})", column="remaining", value=remaining,
                         fix="lower the remaining days or raise the duration")
    allowance = (act.max_shortening * remaining) // act.duration if act.duration else 0
    return ActivityProgress(STARTED, remaining, max(release, data), start,
                          _truncate(act.segments(), allowance))


def apply_progress(project: Project, clock: CalendarClock, timeline: Timeline | None = None) -> Progress:
    """Progress and date constraints of every activity, and the links still in force.

    ``clock`` is the project calendar's; ``timeline`` (when activities have calendars of
    their own) gives each activity's clock and converts links between calendars."""
    data = None if project.data_date is None else clock.offset_of(project.data_date, finish=False)
    # the milestones with a predecessor (only milestones are asked about)
    zero = {a.id for a in project.activities if not a.duration}
    followers = zero.intersection(map(attrgetter("succ"), project.links)) if zero else zero
    if data is None and not any(map(attrgetter("not_before"), project.activities)):
        # no progress, no dates: everything waits to start at day 0 at its normal pace (one
        # shared, immutable status per duration: large projects have few distinct ones)
        durations = list(map(attrgetter("duration"), project.activities))
        shared = {d: ActivityProgress(WAITING, d, 0, None, None) for d in set(durations)}
        out = list(map(shared.__getitem__, durations))
        if zero - followers:  # start milestones (no predecessor)
            opening = ActivityProgress(WAITING, 0, 0, None, None, opens=True)
            for k, a in enumerate(project.activities):
                if not a.duration and a.id not in followers:
                    out[k] = opening
        return Progress(None, tuple(out), frozenset(), ())
    several = timeline is not None and timeline.several
    if several:  # the data date in each activity's own calendar
        clocks = [timeline.clock_of(k) for k in range(len(project.activities))]
        at = {id(c): None if data is None else c.offset_of(project.data_date, finish=False)
              for c in timeline.clocks}
        states = [_one(a, c, at[id(c)], project.data_date) for a, c in zip(project.activities, clocks)]
    else:
        states = [_one(a, clock, data, project.data_date) for a in project.activities]
    pos = {a.id: k for k, a in enumerate(project.activities)}
    for k, a in enumerate(project.activities):
        if a.duration == 0 and a.id not in followers:
            states[k] = replace(states[k], opens=True)

    def bound(link, i: ActivityProgress, j: ActivityProgress) -> int | None:
        """Where the actual dates put the link's earliest allowed event of the successor
        (its lag included); None when the predecessor's event has not happened."""
        from_finish = link.type in (LinkType.FS, LinkType.FF)
        if from_finish:
            earlier = i.release + i.duration if i.state == DONE else None
        else:
            earlier = i.start
        if earlier is None:
            return None
        if several:
            earlier = int(timeline.convert(timeline.of[pos[link.pred]], timeline.of[pos[link.succ]],
                                           earlier, _KIND[link.type]))
        return earlier + link.lag

    if data is not None:
        _settle_milestones(project, states, pos, bound)
    dropped, warnings = set(), []
    if data is not None:
        for e, link in enumerate(project.links):
            i, j = states[pos[link.pred]], states[pos[link.succ]]
            on_start = link.type in (LinkType.FS, LinkType.SS)
            later_fixed = (j.start is not None) if on_start else (j.state == DONE)
            if not later_fixed:
                continue
            later = j.start if on_start else j.release + j.duration
            least = bound(link, i, j)
            if least is not None and later >= least:
                continue  # satisfied by the actual dates
            dropped.add(e)
            what = "start" if on_start else "finish"
            event = ("happened" if j.duration == 0 and j.state == DONE
                     else f"has an actual {what}")
            warnings.append(
                f"out-of-sequence progress: link {link.pred} -> {link.succ} ({link.type.value}"
                f"{'' if not link.lag else f'{link.lag:+d}'}) does not hold: {link.succ} {event} "
                f"before {link.pred} allowed it. The actual dates stand and the link no longer "
                f"holds back {link.succ}")
    return Progress(data, tuple(states), frozenset(dropped), tuple(warnings))


def _settle_milestones(project: Project, states: list, pos: dict, bound) -> None:
    """A milestone with an actual date happened at the start of that day, or at its end
    when a predecessor it follows ended that day (or later: out of sequence, reported by
    the caller). Predecessors are settled first (a chain of milestones on one day)."""
    into: dict[int, list] = {}
    for link in project.links:
        into.setdefault(pos[link.succ], []).append(link)
    # milestones only (duration 0 in the project): finished work whose actual dates fall on
    # days its calendar does not work also spans 0 working days, but is work, not a point
    # in time, and stays at its actual start
    done = [k for k, s in enumerate(states)
            if s.state == DONE and project.activities[k].duration == 0 and k in into]
    for _ in range(len(done) + 1):  # each pass can only move a milestone to the end of its day
        moved = False
        for k in done:
            s = states[k]
            least = [bound(link, states[pos[link.pred]], s) for link in into[k]]
            if s.release == s.floor and any(b is not None and b > s.floor for b in least):
                states[k] = replace(s, release=s.floor + 1, start=s.floor + 1)
                moved = True
        if not moved:
            break
