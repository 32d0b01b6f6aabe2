"""Independent checks of a plan, written apart from the solver and the CPM passes.

Every plan is checked here before it is shown: durations are whole days within their
bounds, an early-start schedule built from the durations satisfies every link (each
checked from the project's own link list), the finish meets the target, and the added
cost recomputed from the activity data matches what the optimiser claimed.
"""

from __future__ import annotations

from datetime import timedelta
from typing import Sequence

import numpy as np

from .errors import PlanCheckError
from .project import LinkType, Option, Project
from .progress import DONE, end_day

__all__ = ["option_added_cost", "check_plan", "PlanChecker"]


def option_added_cost(option: Option, duration: int) -> float:
    """Added cost of performing an activity by ``option`` in ``duration`` days."""
    return option.added_cost + option.cost_per_day * (option.duration - duration)


def _link_arrays(project: Project, dropped=frozenset()):
    """Link endpoints, kinds and lags as arrays, from the project's own link list less the
    links that progress has overridden."""
    pos = {a.id: k for k, a in enumerate(project.activities)}
    links = [k for e, k in enumerate(project.links) if e not in dropped]
    pred = np.fromiter((pos[k.pred] for k in links), dtype=np.int64, count=len(links))
    succ = np.fromiter((pos[k.succ] for k in links), dtype=np.int64, count=len(links))
    lag = np.fromiter((k.lag for k in links), dtype=np.int64, count=len(links))
    code = {LinkType.FS: 0, LinkType.SS: 1, LinkType.FF: 2, LinkType.SF: 3}
    kind = np.fromiter((code[k.type] for k in links), dtype=np.int64, count=len(links))
    return links, pred, succ, kind, lag


def _step_cost(steps, cut: int) -> float:
    total, left = 0.0, cut
    for step in steps:
        take = min(left, step.days)
        total += take * step.cost_per_day
        left -= take
    return total


class PlanChecker:
    """Checks plans of one network (a project with its progress applied).

    The plan is checked on the whole timeline: each activity's start (its actual start
    when it has one) and finish; every link still in force must hold between them, work
    not started may not start before the data date or its not-before date, finished work
    must keep its actual dates, and the costs are recomputed from the activity data.
    """

    def __init__(self, network):
        self.net = network
        project = network.project
        self.project = project
        self.hi = np.asarray(network.durations, dtype=np.int64)
        # shortest without an option: the crash steps still available
        self.lo_normal = self.hi - np.array([sum(x.days for x in st) for st in network.steps], dtype=np.int64)
        self.deadlines = [k for k, a in enumerate(project.activities)
                          if a.deadline is not None and a.damages_per_day]
        self.links, self.pred, self.succ, self.kind, self.lag = _link_arrays(project, network.progress.dropped)
        status = network.progress
        # each activity's own calendar (the project calendar unless it names another)
        self.clocks = [network.timeline.clock_of(k) for k in range(len(project.activities))]
        self.several = network.timeline.several
        self.earliest = np.zeros(len(project.activities), dtype=np.int64)
        for k, (a, st) in enumerate(zip(project.activities, status.activities)):
            clock = self.clocks[k]
            if a.not_before is not None:
                self.earliest[k] = clock.offset_of(a.not_before, finish=False)
            if project.data_date is not None and st.state != DONE:
                self.earliest[k] = max(self.earliest[k], clock.offset_of(project.data_date, finish=False))
        self.done = np.array([st.state == DONE for st in status.activities], dtype=bool)
        self.actual = np.array([-1 if st.start is None else st.start for st in status.activities],
                               dtype=np.int64)
        self.done_finish = np.array([st.release + st.duration if st.state == DONE else -1
                                     for st in status.activities], dtype=np.int64)

    def check(self, durations: Sequence[int], starts: Sequence[int], *, target: int | None = None,
              claimed_cost: float | None = None, choices: Sequence[int] | None = None,
              claimed_damages: float | None = None) -> tuple[int, float, float]:
        """Check a plan given as durations and starts of the part still to schedule.

        Returns its finish, its added direct cost and the damages of activities past
        their own deadlines, all recomputed here, or raises :class:`PlanCheckError`.
        """
        acts = self.project.activities
        if len(durations) != len(acts) or len(starts) != len(acts):
            raise PlanCheckError("plan check: the plan does not cover every activity")
        d = np.asarray(durations, dtype=float)
        s = np.asarray(starts, dtype=float)
        bad = np.flatnonzero((d != np.rint(d)) | (s != np.rint(s)))
        if len(bad):
            k = int(bad[0])
            raise PlanCheckError(f"plan check: {acts[k].id} has a fractional duration or start ({d[k]}, {s[k]})")
        d, s = d.astype(np.int64), s.astype(np.int64)
        options = self.net.options
        lo, hi = self.lo_normal, self.hi
        chosen = [] if not choices else [k for k, c in enumerate(choices) if c >= 0]
        if chosen:
            lo, hi = lo.copy(), hi.copy()
            for k in chosen:
                c = choices[k]
                if not 0 <= c < len(options[k]):
                    raise PlanCheckError(f"plan check: {acts[k].id} has no option number {c}")
                lo[k], hi[k] = options[k][c].shortest, options[k][c].duration
        bad = np.flatnonzero((d < lo) | (d > hi))
        if len(bad):
            k = int(bad[0])
            raise PlanCheckError(f"plan check: {acts[k].id} duration {d[k]} is outside {lo[k]}..{hi[k]}")
        f = s + d
        bad = np.flatnonzero(self.done & ((s != self.actual) | (f != self.done_finish)))
        if len(bad):
            raise PlanCheckError(f"plan check: finished {acts[int(bad[0])].id} moved from its actual dates")
        bad = np.flatnonzero(~self.done & (s < self.earliest))
        if len(bad):
            raise PlanCheckError(f"plan check: {acts[int(bad[0])].id} starts before the data date "
                                 "or its not-before date")
        shown = np.where(self.actual >= 0, self.actual, s)  # an actual start stands
        pred, succ, kind = self.pred, self.succ, self.kind
        # the successor's constrained end (start for FS/SS, finish for FF/SF) against the
        # predecessor's end (finish for FS/FF, start for SS/SF) plus the lag
        later = np.where(kind <= 1, shown[succ], f[succ])
        earlier = np.where((kind == 0) | (kind == 2), f[pred], shown[pred])
        if self.several:
            earlier = self._across(earlier)
        broken = np.flatnonzero(later < earlier + self.lag)
        if len(broken):
            link = self.links[int(broken[0])]
            raise PlanCheckError(f"plan check: link {link.pred} -> {link.succ} ({link.text()}) is broken")
        finish = self._finish(f)
        if target is not None and finish > target:
            raise PlanCheckError(f"plan check: finish {finish} is after the target {target}")
        cost = sum(self.added_costs(d, choices, changed=np.flatnonzero(d < self.hi).tolist() + chosen))
        if claimed_cost is not None and abs(cost - claimed_cost) > 1e-6 * max(1.0, abs(cost)):
            raise PlanCheckError(f"plan check: added cost recomputed as {cost:.2f}, "
                                 f"the optimiser claimed {claimed_cost:.2f}")
        milestone_damages = self.milestone_damages(f)
        if claimed_damages is not None and milestone_damages > claimed_damages + 1e-6 * max(1.0, abs(milestone_damages)):
            raise PlanCheckError(f"plan check: damages recomputed as {milestone_damages:.2f}, "
                                 f"the optimiser claimed {claimed_damages:.2f}")
        return finish, cost, milestone_damages

    def _across(self, earlier: np.ndarray) -> np.ndarray:
        """Links between two calendars: the predecessor's event as a date (its finish on
        the evening of its last day, an SS start on the morning of its first day), then the
        first start (FS, SS) or finish (FF, SF) of the successor's calendar not before it."""
        out = earlier.copy()
        one = timedelta(days=1)
        for e, (i, j, k) in enumerate(zip(self.pred.tolist(), self.succ.tolist(), self.kind.tolist())):
            a, b = self.clocks[i], self.clocks[j]
            if a is b:
                continue
            p = int(earlier[e])
            moment = a.date_of(p) if k == 1 else a.date_of(p - 1) + one
            out[e] = (b.offset_of(moment, finish=False) if k <= 1
                      else b.offset_of(moment - one, finish=False) + 1)
        return out

    def _finish(self, f: np.ndarray) -> int:
        """The project finish in project working days: the end of the project working day
        on or after each activity's last day worked."""
        if not len(f):
            return 0
        if not self.several:
            return int(f.max())
        project = self.net.clock
        return max([0] + [int(x) if c is project else project.offset_of(c.date_of(int(x) - 1), finish=False) + 1
                          for x, c in zip(f.tolist(), self.clocks)])  # (never before the start)

    def added_costs(self, durations: Sequence[int], choices: Sequence[int] | None = None,
                    changed: Sequence[int] | None = None) -> list[float]:
        """Added direct cost of each activity: its option's cost, or its crash steps in order.
        With ``changed``, only those activities are priced (the others cost nothing)."""
        out = [0.0] * len(durations)
        for k in (range(len(durations)) if changed is None else changed):
            d = int(durations[k])
            c = -1 if not choices else choices[k]
            if c >= 0:
                out[k] = option_added_cost(self.net.options[k][c], d)
            elif d < self.hi[k]:
                out[k] = _step_cost(self.net.steps[k], int(self.hi[k] - d))
        return out

    def milestone_damages(self, finishes) -> float:
        """Damages of activities finishing after their own deadlines (per calendar day)."""
        total = 0.0
        for k in self.deadlines:
            a = self.project.activities[k]
            day = end_day(self.net.progress.activities[k], int(finishes[k]))
            late = (self.clocks[k].date_of(day) - a.deadline).days
            total += a.damages_per_day * max(0, late)
        return total


def check_plan(network, durations: Sequence[int], starts: Sequence[int], *,
               target: int | None = None, claimed_cost: float | None = None,
               choices: Sequence[int] | None = None) -> tuple[int, float, float]:
    """Check one plan (see :class:`PlanChecker`); ``network`` is a
    :class:`hasten.network.Network` or a project."""
    if isinstance(network, Project):
        from .network import Network

        network = Network(network)
    return PlanChecker(network).check(durations, starts, target=target, claimed_cost=claimed_cost,
                                      choices=choices)
