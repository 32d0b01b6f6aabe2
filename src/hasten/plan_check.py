"""An independent check of an acceleration plan, recomputed from the project alone.

The optimiser compiles a project into a network (progress applied, links converted between
calendars) and plans on it. This module shares none of that code: it reads the
:class:`~hasten.project.Project` again and works out, by its own means,

- each activity's state at the data date from its actual dates (finished, started, not
  started), the working days left of started work (``remaining``; else
  ``percent_complete`` of the duration, rounded up; else the duration less the working
  days since the actual start), the crash allowance left to it (the share of its
  allowance for the work left, rounded down; crash steps taken in order), and the earliest
  start of what is left (the data date and the not-before date, in its own calendar);
- the links that progress broke (the successor's constrained event already in the past and
  the actual dates not satisfying the link): the actual dates stand and the link no longer
  holds the successor back;
- its own forward pass over the plan's durations (FS/SS/FF/SF links with lags; a link
  between two calendars taken at the moment the predecessor's event happens, the lag
  counted in the successor's calendar), and the project finish in the project calendar;
- its own sum of the added direct cost and of the damages of interim milestones.

Durations and starts are those of the part still to schedule, per activity in project
order: the working days left of started work (and the start of that part), the actual span
of finished work (at its actual start), the whole activity otherwise.

Examples
--------
>>> from datetime import date
>>> from hasten.project import Activity, Link, Project
>>> job = Project("two", date(2024, 1, 1), (Activity("A", 5, crash_duration=3, crash_cost=20.0),
...               Activity("B", 4)), (Link("A", "B"),))
>>> check_plan(job, [4, 4], claimed_finish=8, claimed_cost=10.0).finish
8
>>> check_plan(job, [2, 4], claimed_finish=6, claimed_cost=30.0)
Traceback (most recent call last):
...
hasten.errors.PlanCheckError: plan check: A: 2 working days is below its crash limit of 3 days
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from datetime import timedelta
from typing import Sequence

import numpy as np

from .calendar import CalendarClock
from .errors import CycleError, InputError, PlanCheckError
from .project import Activity, LinkType, Project

__all__ = ["CheckedPlan", "PlanChecker", "check_plan"]

_DONE, _STARTED, _WAITING = "finished", "started", "not started"
_ONE_DAY = timedelta(days=1)
_FROM_FINISH = (LinkType.FS, LinkType.FF)  # the link leaves the predecessor's finish
_ON_START = (LinkType.FS, LinkType.SS)  # it holds the successor's start
_TOL = 1e-6  # relative tolerance for money


@dataclass(frozen=True)
class CheckedPlan:
    """What the check recomputed for a plan it accepted.

    ``starts`` are the early starts of the part still to schedule (each in its activity's
    own calendar; finished work at its actual start), ``finish`` the project finish in
    project working days, ``cost`` the added direct cost (``added_costs`` per activity) and
    ``damages`` those of unfinished work past its own deadline, at the dates checked (the
    starts given, else the early starts).
    """

    starts: tuple[int, ...]
    finish: int
    cost: float
    damages: float
    added_costs: tuple[float, ...]


@dataclass(frozen=True)
class _State:
    state: str
    normal: int  # working days to schedule at the normal pace (finished: the actual span)
    room: int  # working days the crash steps may still take off
    earliest: int  # earliest start of what is left (finished: its actual start)
    actual: int | None  # actual start position, if any


def _link_text(link) -> str:
    lag = f"{link.lag:+d}" if link.lag else ""
    return f"{link.pred} -> {link.succ} ({link.type.value}{lag})"


def _money(x: float, y: float) -> bool:
    return abs(x - y) <= _TOL * max(1.0, abs(x), abs(y))


class PlanChecker:
    """Checks plans of one project; what depends only on the project is worked out once.

    Parameters
    ----------
    project : Project
        The project, with its progress (actual dates and the data date) if any.

    Attributes
    ----------
    dropped : frozenset of int
        Positions in ``project.links`` of the links progress broke (no longer in force).

    Raises
    ------
    InputError
        Progress data that cannot be read (an actual finish without a start, actual dates
        on or after the data date, percent complete outside 0-100, more work remaining
        than the duration) or an activity naming a calendar the project does not define.
    CycleError
        The links form a loop.
    """

    def __init__(self, project: Project):
        self.project = project
        acts, links = project.activities, project.links
        self._ids = [a.id for a in acts]
        pos = {a: k for k, a in enumerate(self._ids)}
        self._conversions: dict = {}
        self._cal = self._own_calendars(project)  # index into self._clocks; 0: the project's
        data = [None if project.data_date is None else c.offset_of(project.data_date, finish=False)
                for c in self._clocks]
        self._states = [self._state(a, self._clocks[c], data[c]) for a, c in zip(acts, self._cal)]
        for k in links:
            if k.pred not in pos or k.succ not in pos:
                raise InputError(f"link {_link_text(k)} names an activity the project does not have",
                                 value=k.pred if k.pred not in pos else k.succ, fix="check the activity ids")
        self._pred = [pos[k.pred] for k in links]
        self._succ = [pos[k.succ] for k in links]
        self._order = self._topological_order()
        self.dropped = frozenset(self._broken_by_progress())
        st = self._states
        # the links in force into events still to schedule (the others are history)
        held = [e for e in range(len(links)) if e not in self.dropped and not (
            st[self._succ[e]].state == _DONE or st[self._succ[e]].state == _STARTED and links[e].type in _ON_START)]
        self._into: list[list[tuple]] = [[] for _ in acts]
        for e in held:
            i, j, link = self._pred[e], self._succ[e], links[e]
            cross = None if self._cal[i] == self._cal[j] else (self._cal[i], self._cal[j])
            self._into[j].append((i, link.type in _FROM_FINISH, link.type in _ON_START, link.lag, link.type, cross))
        self._held = np.asarray(held, dtype=np.int64)
        self._normal = np.array([x.normal for x in st], dtype=np.int64)
        self._shortest = np.array([x.normal if x.state == _DONE else max(x.normal - x.room, 0) for x in st],
                                 dtype=np.int64)
        self._earliest = np.array([x.earliest for x in st], dtype=np.int64)
        self._done = np.array([x.state == _DONE for x in st], dtype=bool)
        self._started = np.array([x.actual is not None for x in st], dtype=bool)
        self._actual = np.array([x.actual or 0 for x in st], dtype=np.int64)
        steps = [a.segments() for a in acts]
        self._first_days = np.array([x[0].days if x else 0 for x in steps], dtype=np.int64)
        self._first_rate = np.array([x[0].cost_per_day if x else 0.0 for x in steps], dtype=float)
        self._deadlines = [k for k, a in enumerate(acts) if a.deadline is not None and st[k].state != _DONE]

    # -- per project ---------------------------------------------------------------------
    def _own_calendars(self, project: Project) -> list[int]:
        """Each activity's clock (as an index); calendars on the same days share one."""
        def days(cal):
            return cal.weekmask, tuple(sorted(set(cal.holidays)))
        self._clocks = [CalendarClock(project.calendar, project.start)]
        same, by_name = {days(project.calendar): 0}, {}
        for cal in project.calendars:
            if days(cal) not in same:
                same[days(cal)] = len(self._clocks)
                self._clocks.append(CalendarClock(cal, project.start))
            by_name[cal.name] = same[days(cal)]
        out = []
        for a in project.activities:
            if a.calendar and a.calendar not in by_name:
                raise InputError(f"activity {a.id} names the calendar {a.calendar!r}, which the project "
                                 "does not define", column="calendar", value=a.calendar,
                                 fix=f"use one of: {', '.join(by_name) or 'none defined'}")
            out.append(by_name[a.calendar] if a.calendar else 0)
        return out

    def _state(self, act: Activity, clock: CalendarClock, data: int | None) -> _State:
        """The activity at the data date (see the module docstring)."""
        data_date = self.project.data_date
        earliest = 0 if act.not_before is None else max(0, clock.offset_of(act.not_before, finish=False))
        room = sum(s.days for s in act.segments())
        if data is None or (act.actual_start is None and act.actual_finish is None):
            return _State(_WAITING, act.duration, room, earliest if data is None else max(earliest, data), None)
        if act.actual_start is None:
            raise InputError(f"activity {act.id} has an actual finish but no actual start",
                             column="actual_start", fix="give the date work started")
        last = act.actual_finish or act.actual_start
        if act.actual_start > data_date or (act.actual_finish is not None and act.actual_finish >= data_date):
            raise InputError(f"activity {act.id} has actual dates on or after the data date {data_date}",
                             column="actual_finish" if act.actual_finish else "actual_start",
                             value=str(last), fix="keep actual dates before the data date")
        if act.duration == 0:  # a milestone: at the end of the day it was reached
            at = clock.offset_of(last, finish=True)
            return _State(_DONE, 0, 0, at, at)
        start = clock.offset_of(act.actual_start, finish=False)
        if act.actual_finish is not None:
            if act.actual_finish < act.actual_start:
                raise InputError(f"activity {act.id} finishes before it starts", column="actual_finish",
                                 value=str(act.actual_finish), fix="check both actual dates")
            return _State(_DONE, max(clock.offset_of(act.actual_finish, finish=True) - start, 0), 0, start, start)
        if act.remaining is not None:
            left = act.remaining
        elif act.percent_complete is not None:
            if not 0 <= act.percent_complete <= 100:
                raise InputError(f"activity {act.id} has percent complete outside 0-100",
                                 column="percent_complete", value=act.percent_complete,
                                 fix="give a percentage from 0 to 100")
            left = math.ceil(round(act.duration * (100 - act.percent_complete) / 100, 9))
        else:
            left = max(act.duration - max(data - start, 0), 0)
        if left > act.duration:
            raise InputError(f"activity {act.id} has more work remaining ({left} days) than its duration "
                             f"({act.duration})", column="remaining", value=left,
                             fix="lower the remaining days or raise the duration")
        return _State(_STARTED, left, max(room, 0) * left // act.duration, max(earliest, data), start)

    def _topological_order(self) -> list[int]:
        """Activities in an order with every predecessor first (Kahn), over every link."""
        n = len(self._ids)
        out = [[] for _ in range(n)]
        need = [0] * n
        for i, j in zip(self._pred, self._succ):
            out[i].append(j)
            need[j] += 1
        order = [k for k in range(n) if need[k] == 0]
        for i in order:  # (the list grows while it is read)
            for j in out[i]:
                need[j] -= 1
                if need[j] == 0:
                    order.append(j)
        if len(order) < n:  # walk back along links between activities left: it closes a loop
            back = {j: i for i, j in zip(self._pred, self._succ) if need[j] and need[i]}
            seen, k = [], next(k for k in range(n) if need[k])
            while k not in seen:
                seen.append(k)
                k = back[k]
            raise CycleError([self._ids[x] for x in seen[seen.index(k):][::-1]])
        return order

    def _broken_by_progress(self):
        """Links whose successor's event is already in the past at dates that break them."""
        st = self._states
        for e, link in enumerate(self.project.links):
            i, j = self._pred[e], self._succ[e]
            on_start = link.type in _ON_START
            if on_start and st[j].actual is None or not on_start and st[j].state != _DONE:
                continue  # the successor's event is still to come
            later = st[j].actual if on_start else st[j].earliest + st[j].normal
            if link.type in _FROM_FINISH:
                earlier = st[i].earliest + st[i].normal if st[i].state == _DONE else None
            else:
                earlier = st[i].actual
            if earlier is None or later < self._across(self._cal[i], self._cal[j], earlier, link.type) + link.lag:
                yield e

    # -- dates across calendars ---------------------------------------------------------
    def _across(self, a: int, b: int, at: int, kind: LinkType) -> int:
        """Least position of calendar ``b`` (before the lag) that a link of ``kind`` allows
        after an event at position ``at`` of calendar ``a``, found through dates."""
        if a == b:
            return at
        key = (a, b, kind, at)
        got = self._conversions.get(key)
        if got is None:
            one, other = self._clocks[a], self._clocks[b]
            # the moment: a start on the morning of its day; a finish (and the boundary an SF
            # link leaves) on the evening of the day before, written as the next morning
            moment = one.date_of(at) if kind is LinkType.SS else one.date_of(at - 1) + _ONE_DAY
            if kind in _ON_START:  # b's first working day not before the moment
                got = other.offset_of(moment, finish=False)
            else:  # b's first day's end not before the moment
                got = other.offset_of(moment - _ONE_DAY, finish=False) + 1
            self._conversions[key] = got
        return got

    def _project_finish(self, finishes: np.ndarray) -> int:
        """The end of the project working day on or after the last day worked of each
        activity, in project working days (never before day 0)."""
        if not len(finishes):
            return 0
        cal = np.asarray(self._cal)
        return max([0] + [self._across(c, 0, int(finishes[cal == c].max()), LinkType.FF)
                          for c in np.unique(cal).tolist()])

    # -- per plan ------------------------------------------------------------------------
    def forward(self, durations: Sequence[int]) -> list[int]:
        """Early starts of what is left to schedule, for whole-day ``durations``."""
        d = [int(x) for x in durations]
        es, start_at = [0] * len(d), [0] * len(d)  # start_at: an actual start stands
        earliest, done, states, across = self._earliest.tolist(), self._done.tolist(), self._states, self._across
        for j in self._order:
            best = earliest[j]
            if not done[j]:
                dj = d[j]
                for i, from_finish, on_start, lag, kind, cross in self._into[j]:
                    at = es[i] + d[i] if from_finish else start_at[i]
                    if cross is not None:
                        at = across(cross[0], cross[1], at, kind)
                    at += lag if on_start else lag - dj
                    if at > best:
                        best = at
            es[j] = best
            start_at[j] = best if states[j].actual is None else states[j].actual
        return es

    def check(self, durations: Sequence[int], *, choices: Sequence[int] | None = None,
              starts: Sequence[int] | None = None, target: int | None = None, claimed_finish: int,
              claimed_cost: float, claimed_damages: float = 0.0, strict: bool = False) -> CheckedPlan:
        """Check one plan; see :func:`check_plan`."""
        d = self._whole(durations, "duration")
        c = np.full(len(d), -1, dtype=np.int64) if choices is None else self._whole(choices, "option index")
        lo, hi = self._bounds(c)
        bad = np.flatnonzero((d < lo) | (d > hi))
        if len(bad):
            k = int(bad[0])
            self._out_of_bounds(k, int(d[k]), int(c[k]), int(lo[k]), int(hi[k]))
        es = self.forward(d)
        early = np.asarray(es, dtype=np.int64)
        finish = self._project_finish(early + d)
        if starts is not None:
            s = self._whole(starts, "start")
            self._check_starts(s, d)
            given = self._project_finish(s + d)
            if given > claimed_finish:
                raise PlanCheckError(f"plan check: the given starts finish on day {given}, "
                                     f"after the claimed finish, day {claimed_finish}")
        if finish != claimed_finish:
            raise PlanCheckError(f"plan check: the plan finishes on day {finish} by its forward pass, "
                                 f"not on day {claimed_finish} as claimed")
        if target is not None and finish > target:
            raise PlanCheckError(f"plan check: the plan finishes on day {finish}, after the target, day {target}")
        costs = self._costs(d, c)
        cost = math.fsum(costs)
        if not _money(cost, claimed_cost):
            raise PlanCheckError(f"plan check: the added cost sums to {cost:.2f}, not {claimed_cost:.2f} as claimed")
        damages = self._damages((early if starts is None else s) + d, strict)
        if not _money(damages, claimed_damages):
            raise PlanCheckError(f"plan check: the milestone damages sum to {damages:.2f}, "
                                 f"not {claimed_damages:.2f} as claimed")
        return CheckedPlan(tuple(es), finish, cost, damages, tuple(costs))

    def _whole(self, values: Sequence, what: str) -> np.ndarray:
        x = np.asarray(values, dtype=float)
        if x.shape != (len(self._ids),):
            raise PlanCheckError(f"plan check: {len(x)} {what} values for {len(self._ids)} activities")
        bad = np.flatnonzero(~np.isfinite(x) | (x != np.rint(x)))
        if len(bad):
            k = int(bad[0])
            raise PlanCheckError(f"plan check: {self._ids[k]} has a {what} that is not a whole number: {x[k]}")
        return x.astype(np.int64)

    def _bounds(self, c: np.ndarray):
        lo, hi = self._shortest.copy(), self._normal.copy()
        for k in np.flatnonzero(c != -1).tolist():
            act, st = self.project.activities[k], self._states[k]
            if st.state != _WAITING:
                raise PlanCheckError(f"plan check: {act.id} is {st.state}: no option can be chosen "
                                     f"for it (option index {c[k]})")
            if not 0 <= c[k] < len(act.options):
                raise PlanCheckError(f"plan check: {act.id} has no option index {c[k]}; it has "
                                     f"{len(act.options)} option(s), numbered from 0 (-1: none)")
            lo[k], hi[k] = act.options[c[k]].shortest, act.options[c[k]].duration
        return lo, hi

    def _out_of_bounds(self, k: int, dk: int, ck: int, lo: int, hi: int):
        act, st = self.project.activities[k], self._states[k]
        head = f"plan check: {act.id}: {dk} working days"
        if st.state == _DONE:
            raise PlanCheckError(f"{head}, but it is finished: its actual dates span {st.normal} days")
        if ck >= 0:
            raise PlanCheckError(f"{head} is outside its option {act.options[ck].name!r}'s range {lo}..{hi}")
        if st.state == _STARTED:
            if dk > hi:
                raise PlanCheckError(f"{head} is more than the {hi} days it has left (it is started)")
            raise PlanCheckError(f"{head} is below {lo}: started with {hi} days left, it may be shortened "
                                 f"by {hi - lo} (its crash allowance for the work left)")
        if dk > hi:
            raise PlanCheckError(f"{head} is above its normal duration of {hi} days")
        raise PlanCheckError(f"{head} is below its crash limit of {lo} days")

    def _check_starts(self, s: np.ndarray, d: np.ndarray) -> None:
        bad = np.flatnonzero(self._done & (s != self._earliest))
        if len(bad):
            k = int(bad[0])
            raise PlanCheckError(f"plan check: finished {self._ids[k]} moved from its actual dates: it "
                                 f"starts on day {s[k]}, not on day {self._earliest[k]}")
        bad = np.flatnonzero(~self._done & (s < self._earliest))
        if len(bad):
            k, sk = int(bad[0]), int(s[bad[0]])
            clock, act, data_date = self._clocks[self._cal[k]], self.project.activities[k], self.project.data_date
            why = []
            if data_date is not None and sk < clock.offset_of(data_date, finish=False):
                why.append(f"the data date {data_date}")
            if act.not_before is not None and sk < clock.offset_of(act.not_before, finish=False):
                why.append(f"its not-before date {act.not_before}")
            raise PlanCheckError(f"plan check: {act.id} starts on day {sk} ({clock.date_of(sk)}), before "
                                 f"{' and '.join(why) or 'day 0'} (day {self._earliest[k]})")
        if not len(self._held):
            return
        links = self.project.links
        shown = np.where(self._started, self._actual, s)  # an actual start stands
        pred, succ = np.asarray(self._pred)[self._held], np.asarray(self._succ)[self._held]
        from_finish = np.array([links[e].type in _FROM_FINISH for e in self._held.tolist()])
        on_start = np.array([links[e].type in _ON_START for e in self._held.tolist()])
        need = np.where(from_finish, s[pred] + d[pred], shown[pred])
        cal = np.asarray(self._cal)
        for x in np.flatnonzero(cal[pred] != cal[succ]).tolist():
            need[x] = self._across(self._cal[pred[x]], self._cal[succ[x]], int(need[x]), links[self._held[x]].type)
        need += np.array([links[e].lag for e in self._held.tolist()], dtype=np.int64)
        later = np.where(on_start, s[succ], s[succ] + d[succ])
        bad = np.flatnonzero(later < need)
        if len(bad):
            x = int(bad[0])
            link = links[int(self._held[x])]
            raise PlanCheckError(f"plan check: link {_link_text(link)} is broken: {link.succ} "
                                 f"{'starts' if on_start[x] else 'finishes'} at day {later[x]}, "
                                 f"the link needs day {need[x]} or later")

    def _costs(self, d: np.ndarray, c: np.ndarray) -> list[float]:
        """Added direct cost of each activity: its option's, or its crash steps' in order."""
        cut = self._normal - d
        out = np.where((c < 0) & (cut > 0), np.minimum(cut, self._first_days) * self._first_rate, 0.0).tolist()
        acts = self.project.activities
        for k in np.flatnonzero((c < 0) & (cut > self._first_days)).tolist():
            total, left = 0.0, int(cut[k])
            for step in acts[k].segments():
                take = min(left, step.days)
                total += take * step.cost_per_day
                left -= take
            out[k] = total
        for k in np.flatnonzero(c >= 0).tolist():
            o = acts[k].options[c[k]]
            out[k] = o.added_cost + o.cost_per_day * (o.duration - int(d[k]))
        return out

    def _damages(self, finishes: np.ndarray, strict: bool) -> float:
        """Damages of unfinished work past its own deadline, per calendar day."""
        total = 0.0
        for k in self._deadlines:
            act, f = self.project.activities[k], int(finishes[k])
            day = self._clocks[self._cal[k]].date_of(f - 1 if f > 0 else 0)  # dated as a project finish is
            late = (day - act.deadline).days
            if late > 0 and strict:
                raise PlanCheckError(f"plan check: {act.id} reaches {day}, {late} calendar day(s) after "
                                     f"its deadline {act.deadline}")
            total += act.damages_per_day * max(late, 0)
        return total


def check_plan(project: Project, durations: Sequence[int], *, choices: Sequence[int] | None = None,
               starts: Sequence[int] | None = None, target: int | None = None, claimed_finish: int,
               claimed_cost: float, claimed_damages: float = 0.0, strict: bool = False) -> CheckedPlan:
    """Check a plan against the project alone and return what the check recomputed.

    Parameters
    ----------
    project : Project
    durations : sequence of int
        Per activity in project order, the working days of the part still to schedule:
        the days left of started work, the actual span of finished work, the whole
        duration otherwise.
    choices : sequence of int, optional
        Per activity the index of its chosen option, or -1 for none.
    starts : sequence of int, optional
        Starts of the part still to schedule, each in its activity's own calendar; every
        link still in force must hold between them.
    target : int, optional
        The finish asked for, in project working days.
    claimed_finish, claimed_cost, claimed_damages
        The finish (project working days), added direct cost and damages claimed for the
        plan. The damages are those of work not yet finished that passes its own deadline,
        per calendar day from the deadline to its date (its last day worked, dated as the
        project finish is), at the starts given or else at the early starts; finished
        work's damages are history and not counted.
    strict : bool
        Refuse a plan in which unfinished work passes its own deadline (with or without
        damages).

    Returns
    -------
    CheckedPlan

    Raises
    ------
    PlanCheckError
        Naming the activity or link and the figures, when a duration or option is out of
        bounds, a given start breaks a link, the data date, a not-before date or moves
        finished work, or the finish, cost or damages differ from what the check finds.
    """
    return PlanChecker(project).check(durations, choices=choices, starts=starts, target=target,
                                      claimed_finish=claimed_finish, claimed_cost=claimed_cost,
                                      claimed_damages=claimed_damages, strict=strict)
