"""An independent check of an acceleration plan, recomputed from the project alone.

The optimiser compiles a project into a network (progress applied, links converted between
calendars), plans on it and reports the plan's finish, cost and damages. This module shares
none of that code: it imports only :mod:`hasten.project`,
:class:`~hasten.calendar.CalendarClock`, :mod:`hasten.errors`, the standard library and
numpy. It reads the :class:`~hasten.project.Project` again
(:mod:`hasten.plan_check_progress`: calendars, progress at the data date, when milestones
happen, the links progress broke) and works out by its own means

- each duration a whole number within its bounds (finished work at its actual span,
  started work within the share of its crash allowance left, an option within its range);
- its own forward pass over the plan's durations (FS/SS/FF/SF links with lags; a link
  between two calendars taken at the moment the predecessor's event happens, the lag
  counted in the successor's calendar), the project finish in the project calendar and
  its date (its last working day, or the day of a milestone that cannot happen before it);
- every link in force held by the starts shown, none before the data date, a not-before
  date or day 0, finished work at its actual dates, and, for starts shown as the early
  starts, each equal to its own;
- its own sum of the added direct cost (crash steps in order, or the option chosen) and of
  the damages of unfinished work past its own deadline, per calendar day from the deadline
  to its date: the last day worked; for a milestone the day its predecessors end, never
  before the first day it may happen (README "Method", "Milestones").

Every figure claimed for the plan must agree with the check's own, else
:class:`~hasten.errors.PlanCheckError` names the activity, link or figure.

Durations and starts are those of the part still to schedule, per activity in project
order: the working days left of started work (and the start of that part), the actual span
of finished work (at its actual start), the whole activity otherwise.

Examples
--------
>>> from datetime import date
>>> from hasten.project import Activity, Link, Project
>>> job = Project("two", date(2024, 1, 1), (Activity("A", 5, crash_duration=3, crash_cost=20.0),
...               Activity("B", 4)), (Link("A", "B"),))
>>> check_plan(job, [4, 4], claimed_finish=8, claimed_cost=10.0).finish_date
datetime.date(2024, 1, 10)
>>> check_plan(job, [2, 4], claimed_finish=6, claimed_cost=30.0)
Traceback (most recent call last):
...
hasten.errors.PlanCheckError: plan check: A: 2 working days is below its crash limit of 3 days
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from datetime import date
from typing import Sequence

import numpy as np

from .errors import PlanCheckError
from .plan_check_progress import DONE, FROM_FINISH, ON_START, STARTED, WAITING, Reading, link_text
from .project import LinkType, Project

__all__ = ["CheckedPlan", "PlanChecker", "check_plan"]

_TOL = 1e-6  # relative tolerance for money


@dataclass(frozen=True)
class CheckedPlan:
    """What the check recomputed for a plan it accepted.

    ``starts`` are the early starts of the part still to schedule (each in its activity's
    own calendar; finished work at its actual start), ``finish`` the project finish in
    project working days and ``finish_date`` its date, ``cost`` the added direct cost
    (``added_costs`` per activity) and ``damages`` those of unfinished work past its own
    deadline, at the dates checked (the starts given, else the early starts).
    """

    starts: tuple[int, ...]
    finish: int
    finish_date: date
    cost: float
    damages: float
    added_costs: tuple[float, ...]


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
        r = self._reading = Reading(project)
        self._ids, self.dropped, st, links = r.ids, r.dropped, r.states, project.links
        # the links in force into events still to schedule (the others are history)
        held = [e for e in range(len(links)) if e not in self.dropped and not (
            st[r.succ[e]].state == DONE or st[r.succ[e]].state == STARTED and links[e].type in ON_START)]
        self._held = np.asarray(held, dtype=np.int64)
        self._hp = np.asarray(r.pred, dtype=np.int64)[self._held]
        self._hs = np.asarray(r.succ, dtype=np.int64)[self._held]
        kinds = [links[e].type for e in held]
        self._h_from_finish = np.array([k in FROM_FINISH for k in kinds], dtype=bool)
        self._h_on_start = np.array([k in ON_START for k in kinds], dtype=bool)
        self._h_lag = np.array([links[e].lag for e in held], dtype=np.int64)
        self._cal = np.asarray(r.cal, dtype=np.int64)
        self._h_cross = self._cal[self._hp] != self._cal[self._hs]
        self._into: list[list[tuple]] | None = None  # links in force into each activity, when needed
        self._normal = np.array([x.normal for x in st], dtype=np.int64)
        self._shortest = np.array([x.normal if x.state == DONE else max(x.normal - x.room, 0) for x in st],
                                  dtype=np.int64)
        self._earliest = np.array([x.earliest for x in st], dtype=np.int64)
        self._done = np.array([x.state == DONE for x in st], dtype=bool)
        self._started = np.array([x.actual is not None for x in st], dtype=bool)
        self._actual = np.array([x.actual or 0 for x in st], dtype=np.int64)
        self._steps = r.steps
        self._first_days = np.array([x[0].days if x else 0 for x in self._steps], dtype=np.int64)
        self._first_rate = np.array([x[0].cost_per_day if x else 0.0 for x in self._steps], dtype=float)
        self._deadlines = [k for k, a in enumerate(project.activities)
                           if a.deadline is not None and st[k].state != DONE]
        self._levels()

    def _levels(self) -> None:
        """Links in force grouped by the depth of their successor, for a forward pass one
        level at a time with numpy (many activities per level, one calendar); else the
        pass runs activity by activity."""
        n = len(self._ids)
        rank = np.empty(n, dtype=np.int64)
        rank[self._reading.order] = np.arange(n)
        by = np.argsort(rank[self._hs], kind="stable")  # links into earlier activities first
        level = [0] * n
        for i, j in zip(self._hp[by].tolist(), self._hs[by].tolist()):
            if level[i] >= level[j]:
                level[j] = level[i] + 1
        top = max(level, default=0)
        self._vector = not self._h_cross.any() and n >= 20 * (top + 1)
        at = np.asarray(level, dtype=np.int64)[self._hs]
        by = np.argsort(at, kind="stable")
        by_level = [g for g in np.split(by, np.searchsorted(at[by], np.arange(1, top + 1))) if len(g)]
        # each level's arrays taken out once (a curve checks a plan every day): predecessor,
        # successor, from its finish (0/1), lag, onto the successor's finish (0/1), and
        # where an actual start stands instead of the early one (None: nowhere on the level)
        self._level_arrays = []
        for g in by_level:
            i, from_finish = self._hp[g], self._h_from_finish[g]
            actual = ~from_finish & self._started[i]
            self._level_arrays.append((i, self._hs[g], from_finish.astype(np.int64), self._h_lag[g],
                                       (~self._h_on_start[g]).astype(np.int64),
                                       (actual, self._actual[i]) if actual.any() else None))

    def _links_into(self) -> list[list[tuple]]:
        """Per activity, the links in force into it: (predecessor, from its finish, onto
        the start, lag, kind, (calendars) when they differ), built on first use."""
        if self._into is None:
            r, links = self._reading, self.project.links
            self._into = [[] for _ in self._ids]
            for x, e in enumerate(self._held.tolist()):
                i, j, kind = r.pred[e], r.succ[e], links[e].type
                cross = (r.cal[i], r.cal[j]) if self._h_cross[x] else None
                self._into[j].append((i, kind in FROM_FINISH, kind in ON_START, links[e].lag, kind, cross))
        return self._into

    def _project_finish(self, finishes: np.ndarray) -> int:
        """The end of the project working day on or after the last day worked of each
        activity, in project working days (never before day 0)."""
        if not len(finishes):
            return 0
        across, cal = self._reading.across, self._cal
        return max([0] + [across(c, 0, int(finishes[cal == c].max()), LinkType.FF)
                          for c in np.unique(cal).tolist()])

    # -- the forward pass ------------------------------------------------------------------
    def forward(self, durations: Sequence[int]) -> list[int]:
        """Early starts of what is left to schedule, for whole-day ``durations``."""
        return self._forward(np.asarray(durations, dtype=np.int64)).tolist()

    def _forward(self, d: np.ndarray) -> np.ndarray:
        if self._vector:
            es = self._earliest.copy()
            for i, j, from_finish, lag, to_finish, stands in self._level_arrays:
                at = es[i] + d[i] * from_finish  # predecessors are on earlier levels: already final
                if stands is not None:  # an actual start stands
                    at = np.where(stands[0], stands[1], at)
                np.maximum.at(es, j, at + lag - d[j] * to_finish)
            return es
        dl = d.tolist()
        es, start_at = self._earliest.tolist(), [0] * len(dl)  # start_at: an actual start stands
        done, actual, started, across = self._done.tolist(), self._actual.tolist(), self._started.tolist(), \
            self._reading.across
        into = self._links_into()
        for j in self._reading.order:
            best = es[j]
            if not done[j]:
                dj = dl[j]
                for i, from_finish, on_start, lag, kind, cross in into[j]:
                    at = es[i] + dl[i] if from_finish else start_at[i]
                    if cross is not None:
                        at = across(cross[0], cross[1], at, kind)
                    at += lag if on_start else lag - dj
                    if at > best:
                        best = at
            es[j] = best
            start_at[j] = actual[j] if started[j] else best
        return np.asarray(es, dtype=np.int64)

    # -- one plan --------------------------------------------------------------------------
    def check(self, durations: Sequence[int], *, choices: Sequence[int] | None = None,
              starts: Sequence[int] | None = None, early: bool = False, target: int | None = None,
              claimed_finish: int | None, claimed_cost: float, claimed_costs: Sequence[float] | None = None,
              claimed_damages: float = 0.0, claimed_finish_date: date | None = None,
              strict: bool = False) -> CheckedPlan:
        """Check one plan; see :func:`check_plan`. ``claimed_finish`` ``None``: no finish
        is claimed, only that the plan finishes by ``target`` (a day of a curve)."""
        d = self._whole(durations, "duration")
        c = np.full(len(d), -1, dtype=np.int64) if choices is None else self._whole(choices, "option index")
        lo, hi = self._bounds(c)
        bad = np.flatnonzero((d < lo) | (d > hi))
        if len(bad):
            k = int(bad[0])
            self._out_of_bounds(k, int(d[k]), int(c[k]), int(lo[k]), int(hi[k]))
        early_starts = self._forward(d)
        finish = self._project_finish(early_starts + d)
        s = early_starts
        if starts is not None:
            s = self._whole(starts, "start")
            if early:
                bad = np.flatnonzero(s != early_starts)
                if len(bad):
                    k = int(bad[0])
                    raise PlanCheckError(f"plan check: {self._ids[k]} is shown starting on day {s[k]}, but its "
                                         f"early start is day {early_starts[k]}")
            self._check_starts(s, d)
            given = self._project_finish(s + d)
            if claimed_finish is not None and given > claimed_finish:
                raise PlanCheckError(f"plan check: the given starts finish on day {given}, "
                                     f"after the claimed finish, day {claimed_finish}")
        if claimed_finish is not None and finish != claimed_finish:
            raise PlanCheckError(f"plan check: the plan finishes on day {finish} by its forward pass, "
                                 f"not on day {claimed_finish} as claimed")
        finish_date = self._reading.clocks[0].date_of(max(finish - 1, self._reading.finish_floor, 0))
        if claimed_finish_date is not None and finish_date != claimed_finish_date:
            raise PlanCheckError(f"plan check: the plan's finish is dated {finish_date}, not "
                                 f"{claimed_finish_date} as claimed")
        if target is not None and finish > target:
            raise PlanCheckError(f"plan check: the plan finishes on day {finish}, after the target, day {target}")
        costs = self._costs(d, c)
        cost = math.fsum(costs)
        if not _money(cost, claimed_cost):
            raise PlanCheckError(f"plan check: the added cost sums to {cost:.2f}, not {claimed_cost:.2f} as claimed")
        if claimed_costs is not None:
            if len(claimed_costs) != len(costs):
                raise PlanCheckError(f"plan check: {len(claimed_costs)} added costs for {len(costs)} activities")
            x, y = np.asarray(costs), np.asarray(claimed_costs, dtype=float)
            bad = np.flatnonzero(~(np.abs(x - y) <= _TOL * np.maximum(1.0, np.maximum(np.abs(x), np.abs(y)))))
            if len(bad):
                k = int(bad[0])
                raise PlanCheckError(f"plan check: {self._ids[k]} adds {x[k]:.2f}, not {y[k]:.2f} as claimed")
        damages = self._damages(s + d, strict)
        if not _money(damages, claimed_damages):
            raise PlanCheckError(f"plan check: the milestone damages sum to {damages:.2f}, "
                                 f"not {claimed_damages:.2f} as claimed")
        return CheckedPlan(tuple(early_starts.tolist()), finish, finish_date, cost, damages, tuple(costs))

    def _whole(self, values: Sequence, what: str) -> np.ndarray:
        x = np.asarray(values)
        if x.shape != (len(self._ids),):
            raise PlanCheckError(f"plan check: {x.size} {what} values for {len(self._ids)} activities")
        if x.dtype.kind in "iu":  # whole numbers already
            return x.astype(np.int64)
        x = x.astype(float)
        bad = np.flatnonzero(~np.isfinite(x) | (x != np.rint(x)))
        if len(bad):
            k = int(bad[0])
            raise PlanCheckError(f"plan check: {self._ids[k]} has a {what} that is not a whole number: {x[k]}")
        return x.astype(np.int64)

    def _bounds(self, c: np.ndarray):
        lo, hi = self._shortest.copy(), self._normal.copy()
        for k in np.flatnonzero(c != -1).tolist():
            act, st = self.project.activities[k], self._reading.states[k]
            if st.state != WAITING:
                raise PlanCheckError(f"plan check: {act.id} is {st.state}: no option can be chosen "
                                     f"for it (option index {c[k]})")
            if not 0 <= c[k] < len(act.options):
                raise PlanCheckError(f"plan check: {act.id} has no option index {c[k]}; it has "
                                     f"{len(act.options)} option(s), numbered from 0 (-1: none)")
            lo[k], hi[k] = max(act.options[c[k]].shortest, act.min_duration), act.options[c[k]].duration
        return lo, hi

    def _out_of_bounds(self, k: int, dk: int, ck: int, lo: int, hi: int):
        act, st = self.project.activities[k], self._reading.states[k]
        head = f"plan check: {act.id}: {dk} working days"
        if st.state == DONE:
            raise PlanCheckError(f"{head}, but it is finished: its actual dates span {st.normal} days")
        if ck >= 0:
            raise PlanCheckError(f"{head} is outside its option {act.options[ck].name!r}'s range {lo}..{hi}")
        if st.state == STARTED:
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
            clock = self._reading.clocks[self._cal[k]]
            act, data_date = self.project.activities[k], self.project.data_date
            why = []
            if data_date is not None and sk < clock.offset_of(data_date, finish=False):
                why.append(f"the data date {data_date}")
            if act.not_before is not None and sk < clock.offset_of(act.not_before, finish=False):
                why.append(f"its not-before date {act.not_before}")
            raise PlanCheckError(f"plan check: {act.id} starts on day {sk} ({clock.date_of(sk)}), before "
                                 f"{' and '.join(why) or 'day 0'} (day {self._earliest[k]})")
        if not len(self._held):
            return
        pred, succ, on_start = self._hp, self._hs, self._h_on_start
        shown = np.where(self._started, self._actual, s)  # an actual start stands
        need = np.where(self._h_from_finish, s[pred] + d[pred], shown[pred])
        links = self.project.links
        for x in np.flatnonzero(self._h_cross).tolist():
            need[x] = self._reading.across(int(self._cal[pred[x]]), int(self._cal[succ[x]]), int(need[x]),
                                           links[int(self._held[x])].type)
        need += self._h_lag
        later = np.where(on_start, s[succ], s[succ] + d[succ])
        bad = np.flatnonzero(later < need)
        if len(bad):
            x = int(bad[0])
            link = links[int(self._held[x])]
            raise PlanCheckError(f"plan check: link {link_text(link)} is broken: {link.succ} "
                                 f"{'starts' if on_start[x] else 'finishes'} at day {later[x]}, "
                                 f"the link needs day {need[x]} or later")

    def _costs(self, d: np.ndarray, c: np.ndarray) -> list[float]:
        """Added direct cost of each activity: its option's, or its crash steps' in order."""
        cut = self._normal - d
        out = np.where((c < 0) & (cut > 0), np.minimum(cut, self._first_days) * self._first_rate, 0.0).tolist()
        for k in np.flatnonzero((c < 0) & (cut > self._first_days)).tolist():
            total, left = 0.0, int(cut[k])
            for step in self._steps[k]:
                take = min(left, step.days)
                total += take * step.cost_per_day
                left -= take
            out[k] = total
        acts = self.project.activities
        for k in np.flatnonzero(c >= 0).tolist():
            o = acts[k].options[c[k]]
            out[k] = o.added_cost + o.cost_per_day * (o.duration - int(d[k]))
        return out

    def _damages(self, finishes: np.ndarray, strict: bool) -> float:
        """Damages of unfinished work past its own deadline, per calendar day, at its date:
        the last day worked; a milestone's, the day its predecessors end but never before
        the first day it may happen."""
        total = 0.0
        r = self._reading
        for k in self._deadlines:
            act, f, floor = self.project.activities[k], int(finishes[k]), r.states[k].floor
            day = r.clocks[self._cal[k]].date_of(max(f - 1, 0 if floor is None else floor))
            late = (day - act.deadline).days
            if late > 0 and strict:
                raise PlanCheckError(f"plan check: {act.id} reaches {day}, {late} calendar day(s) after "
                                     f"its deadline {act.deadline}")
            total += act.damages_per_day * max(late, 0)
        return total


def check_plan(project: Project, durations: Sequence[int], *, choices: Sequence[int] | None = None,
               starts: Sequence[int] | None = None, early: bool = False, target: int | None = None,
               claimed_finish: int, claimed_cost: float, claimed_costs: Sequence[float] | None = None,
               claimed_damages: float = 0.0, claimed_finish_date: date | None = None,
               strict: bool = False) -> CheckedPlan:
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
    early : bool
        The ``starts`` are shown as the early starts: each must equal the check's own.
    target : int, optional
        The finish asked for, in project working days.
    claimed_finish, claimed_cost, claimed_damages
        The finish (project working days), added direct cost and damages claimed for the
        plan. The damages are those of work not yet finished that passes its own deadline,
        per calendar day from the deadline to its date (see the module notes), at the
        starts given or else at the early starts; finished work's damages are history and
        not counted.
    claimed_costs : sequence of float, optional
        The added direct cost claimed for each activity.
    claimed_finish_date : datetime.date, optional
        The date claimed for the finish.
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
        bounds, a given start breaks a link, the data date, a not-before date, moves
        finished work or differs from the early start it is shown as, or the finish, its
        date, the costs or damages differ from what the check finds.
    """
    return PlanChecker(project).check(durations, choices=choices, starts=starts, early=early, target=target,
                                      claimed_finish=claimed_finish, claimed_cost=claimed_cost,
                                      claimed_costs=claimed_costs, claimed_damages=claimed_damages,
                                      claimed_finish_date=claimed_finish_date, strict=strict)
