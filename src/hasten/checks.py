"""Independent checks of a plan, written apart from the solver and the CPM passes.

Every plan is checked here before it is shown: durations are whole days within their
bounds, an early-start schedule built from the durations satisfies every link (each
checked from the project's own link list), the finish meets the target, and the added
cost recomputed from the activity data matches what the optimiser claimed.
"""

from __future__ import annotations

from typing import Sequence

import numpy as np

from .errors import PlanCheckError
from .model import Activity, LinkType, Option, Project

__all__ = ["activity_added_cost", "option_added_cost", "plan_added_cost", "check_plan", "PlanChecker"]


def activity_added_cost(act: Activity, cut: int) -> float:
    """Cost of shortening ``act`` by ``cut`` days, from its raw data."""
    if cut == 0:
        return 0.0
    if act.steps:
        total, left = 0.0, cut
        for step in act.steps:
            take = min(left, step.days)
            total += take * step.cost_per_day
            left -= take
        return total
    crash = act.crash_duration if act.crash_duration is not None else act.duration
    crash_cost = act.crash_cost if act.crash_cost is not None else act.cost
    return (crash_cost - act.cost) * cut / (act.duration - crash)


def option_added_cost(option: Option, duration: int) -> float:
    """Added cost of performing an activity by ``option`` in ``duration`` days."""
    return option.added_cost + option.cost_per_day * (option.duration - duration)


def plan_added_cost(project: Project, durations: Sequence[int],
                    choices: Sequence[int] | None = None) -> float:
    """Added direct cost of running the activities for ``durations`` days, each the normal
    way (choice -1) or by the option of that index."""
    if choices is None:
        choices = [-1] * len(durations)
    return sum(activity_added_cost(a, a.duration - d) if c < 0 else option_added_cost(a.options[c], d)
               for a, d, c in zip(project.activities, durations, choices))


def _link_arrays(project: Project):
    """Link endpoints, kinds and lags as arrays, from the project's own link list."""
    pos = {a.id: k for k, a in enumerate(project.activities)}
    links = project.links
    pred = np.fromiter((pos[k.pred] for k in links), dtype=np.int64, count=len(links))
    succ = np.fromiter((pos[k.succ] for k in links), dtype=np.int64, count=len(links))
    lag = np.fromiter((k.lag for k in links), dtype=np.int64, count=len(links))
    code = {LinkType.FS: 0, LinkType.SS: 1, LinkType.FF: 2, LinkType.SF: 3}
    kind = np.fromiter((code[k.type] for k in links), dtype=np.int64, count=len(links))
    return pred, succ, kind, lag


class PlanChecker:
    """Checks plans of one project; the project's link arrays are built once."""

    def __init__(self, project: Project):
        self.project = project
        acts = project.activities
        self.lo = np.fromiter((a.shortest_normal for a in acts), dtype=np.int64, count=len(acts))
        self.hi = np.fromiter((a.duration for a in acts), dtype=np.int64, count=len(acts))
        self.pred, self.succ, self.kind, self.lag = _link_arrays(project)

    def check(self, durations: Sequence[int], starts: Sequence[int], *, target: int | None = None,
              claimed_cost: float | None = None, choices: Sequence[int] | None = None) -> tuple[int, float]:
        """Check a plan; returns its finish in working days and its added cost,
        recomputed from the activity data, or raises :class:`PlanCheckError`."""
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
        lo, hi = self.lo, self.hi
        if choices is not None and any(c >= 0 for c in choices):
            lo, hi = lo.copy(), hi.copy()
            for k, c in enumerate(choices):
                if c >= 0:
                    if not 0 <= c < len(acts[k].options):
                        raise PlanCheckError(f"plan check: {acts[k].id} has no option number {c}")
                    lo[k], hi[k] = acts[k].options[c].shortest, acts[k].options[c].duration
        bad = np.flatnonzero((d < lo) | (d > hi))
        if len(bad):
            k = int(bad[0])
            raise PlanCheckError(f"plan check: {acts[k].id} duration {d[k]} is outside {lo[k]}..{hi[k]}")
        bad = np.flatnonzero(s < 0)
        if len(bad):
            raise PlanCheckError(f"plan check: {acts[int(bad[0])].id} starts before the project start")
        pred, succ, kind = self.pred, self.succ, self.kind
        f = s + d
        # the successor's constrained end (start for FS/SS, finish for FF/SF) against the
        # predecessor's end (finish for FS/FF, start for SS/SF) plus the lag
        later = np.where(kind <= 1, s[succ], f[succ])
        earlier = np.where((kind == 0) | (kind == 2), f[pred], s[pred])
        broken = np.flatnonzero(later < earlier + self.lag)
        if len(broken):
            link = self.project.links[int(broken[0])]
            raise PlanCheckError(f"plan check: link {link.pred} -> {link.succ} ({link.text()}) is broken")
        finish = int(f.max()) if len(f) else 0
        if target is not None and finish > target:
            raise PlanCheckError(f"plan check: finish {finish} is after the target {target}")
        cost = plan_added_cost(self.project, durations, choices)
        if claimed_cost is not None and abs(cost - claimed_cost) > 1e-6 * max(1.0, abs(cost)):
            raise PlanCheckError(f"plan check: added cost recomputed as {cost:.2f}, "
                                 f"the optimiser claimed {claimed_cost:.2f}")
        return finish, cost


def check_plan(project: Project, durations: Sequence[int], starts: Sequence[int], *,
               target: int | None = None, claimed_cost: float | None = None,
               choices: Sequence[int] | None = None) -> tuple[int, float]:
    """Check one plan of ``project`` (see :class:`PlanChecker`)."""
    return PlanChecker(project).check(durations, starts, target=target, claimed_cost=claimed_cost,
                                      choices=choices)
