"""Least-cost acceleration questions: a target plan, the time-cost curve, the best
total-cost finish and the earliest finish within a budget.

:class:`Study` holds one project, its network, its calendar and one optimisation
model, built once and re-solved for every question asked of it.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from datetime import date
from typing import Callable

from .checks import PlanChecker
from .time_costs import TimeCosts, time_costs
from .errors import HastenError, InfeasibleTargetError
from .partial import PartialSolver, solvable_on_part
from .project import Project
from .cpm import Schedule, schedule
from .network import Network
from .crash_model import CrashModel, Solution

__all__ = [
    "ActivityChange",
    "TradeTotal",
    "Plan",
    "CurvePoint",
    "TotalCostPoint",
    "BestFinish",
    "Study",
    "parse_earlier",
]

Progress = Callable[[int, int], None]


@dataclass(frozen=True)
class ActivityChange:
    id: str
    name: str
    trade: str
    normal: int
    duration: int
    shortened_by: int
    added_cost: float
    option: str = ""  # the discrete option used, "" for the normal way


@dataclass(frozen=True)
class TradeTotal:
    trade: str
    shortened_days: int
    added_cost: float


@dataclass(frozen=True)
class Plan:
    """A least-cost plan, checked independently of the solver."""

    target: int
    finish: int
    normal_finish: int
    added_cost: float
    normal_direct_cost: float
    activities: tuple[ActivityChange, ...]  # every activity, in project order
    trades: tuple[TradeTotal, ...]
    schedule: Schedule  # early dates with the plan's durations
    next_day_cost: float | None  # least cost of finishing one more day earlier, None at the limit
    proven: bool = True  # False: a time limit stopped the solver; best plan found so far
    bound: float | None = None  # proven lower bound on the added cost, when not proven
    gap: float | None = None  # relative gap between the plan and the bound, when not proven
    penalty: float = 0.0  # damages of interim milestones (own deadlines) in this plan

    @property
    def direct_cost(self) -> float:
        return self.normal_direct_cost + self.added_cost

    @property
    def changed(self) -> tuple[ActivityChange, ...]:
        """Activities shortened or performed by a discrete option."""
        return tuple(a for a in self.activities if a.shortened_by or a.option)


@dataclass(frozen=True)
class CurvePoint:
    finish: int
    added_cost: float
    day_cost: float  # cost of this last day: added cost here less at one day later
    changes: tuple[tuple[str, int], ...]  # (activity id, change in days) from the point before
    switches: tuple[tuple[str, str], ...] = ()  # (activity id, option now used; "" = normal)
    proven: bool = True
    gap: float | None = None
    penalty: float = 0.0  # damages of interim milestones at this finish


@dataclass(frozen=True)
class TotalCostPoint:
    finish: int
    finish_date: date
    direct_cost: float
    added_cost: float
    time: TimeCosts
    milestone_damages: float = 0.0  # damages of interim milestones past their own deadlines

    @property
    def total_cost(self) -> float:
        return self.direct_cost + self.time.net + self.milestone_damages


@dataclass(frozen=True)
class BestFinish:
    best: TotalCostPoint
    table: tuple[TotalCostPoint, ...]  # every finish from shortest to normal
    plan: Plan


_EARLIER = re.compile(r"^\s*(\d+)\s*([dw])\s*$", re.IGNORECASE)


def parse_earlier(text: str) -> tuple[str, int]:
    """``'10d'`` -> ``('working', 10)``; ``'2w'`` -> ``('calendar', 14)``."""
    m = _EARLIER.match(text)
    if not m:
        raise HastenError(f"--earlier {text!r} is not understood; write working days as 10d "
                          "or calendar weeks as 2w")
    n = int(m.group(1))
    return ("working", n) if m.group(2).lower() == "d" else ("calendar", 7 * n)


class Study:
    """One project and everything needed to answer its acceleration questions."""

    def __init__(self, project: Project, *, time_limit: float | None = None):
        self.project = project
        self.network = Network(project)
        self.clock = self.network.clock
        self.normal_finish = self.network.forward_finish()
        self.checker = PlanChecker(self.network)
        self.discrete = any(self.network.options)  # some work still to do has discrete options
        # some work still to do has its own deadline with damages
        self.penalised = any(a.deadline is not None and a.damages_per_day and not fixed
                             for a, fixed in zip(project.activities, self.network.fixed))
        self._normal: Schedule | None = None
        self.time_limit = time_limit
        self._model: CrashModel | None = None
        self._shortest: int | None = None
        self._partial: PartialSolver | None = None
        self._partial_ok = solvable_on_part(self.network)  # plans may be solved on a part (hasten.partial)
        self._reach = 0  # least reach of the focused part (the curve widens it once)

    # -- basics ------------------------------------------------------------------------
    @property
    def model(self) -> CrashModel:
        if self._model is None:
            self._model = CrashModel(self.network, time_limit=self.time_limit)
        return self._model

    @property
    def normal(self) -> Schedule:
        """The CPM schedule at normal durations (with progress applied), built when needed."""
        if self._normal is None:
            self._normal = schedule(self.network)
        return self._normal

    @property
    def shortest_finish(self) -> int:
        """The LP's minimum finish. With SS/FF/SF links this can be shorter than a CPM pass
        with every activity at its crash duration (shortening some activities can delay
        the project), so it is never computed that way."""
        if self._shortest is None:
            self._shortest = min(self.model.shortest_finish(), self.normal_finish)
        return self._shortest

    def target_by_date(self, day: date) -> int:
        """Finish target (working days) to be done by ``day``, the last day worked."""
        return self.clock.offset_of(day, finish=True)

    def target_earlier(self, text: str) -> int:
        unit, n = parse_earlier(text)
        if unit == "working":
            return self.normal_finish - n
        return self.clock.shift_calendar_days(self.normal_finish, n)

    # -- plans -------------------------------------------------------------------------
    def _solve(self, target: int, *, tie_break: bool = True, strict: bool = False) -> Solution:
        deadlines = strict and any(a.deadline is not None for a in self.project.activities)
        if target >= self.normal_finish and not (self.discrete or self.penalised or deadlines):
            return Solution(tuple(self.network.durations), 0.0, 0.0)
        target = min(target, self.normal_finish) if self.penalised else target
        if self._model is None and self._partial_ok:  # solve on the part that can matter
            if self._partial is None:
                self._partial = PartialSolver(self.network, time_limit=self.time_limit)
            sol = self._partial.least_cost(target, reach=self._reach, tie_break=tie_break)
            if sol is not None:
                return sol
        sol = self.model.least_cost(target, tie_break=tie_break, strict=strict)
        if sol is None:
            if strict and target >= self.shortest_finish:
                raise HastenError("no plan meets every interim milestone deadline by this finish")
            raise InfeasibleTargetError(target, self.shortest_finish)
        return sol

    def _checked(self, sol: Solution, target: int, starts=None) -> tuple[int, float, float]:
        """Finish, added cost and damages of own deadlines (recomputed from the activity
        data) of a solution that has passed the independent check, on ``starts``, or else
        on the solver's own starts, or else on the early starts of its durations."""
        if starts is None:
            starts = sol.starts if sol.starts is not None else self.network.forward(sol.durations)
        return self.checker.check(sol.durations, starts, target=target, claimed_cost=sol.added_cost,
                                  choices=sol.choices or None, claimed_penalty=sol.penalty)

    def plan(self, target: int, *, next_day: bool = True, strict: bool = False) -> Plan:
        """The least-cost plan to finish by ``target`` working days; with ``strict`` every
        interim milestone must also meet its own deadline."""
        self._reach = max(self._reach, self.normal_finish - target + 1)  # and the next day
        sol = self._solve(target, strict=strict)
        sched = schedule(self.network, sol.durations)
        early = self.network.forward(sol.durations)
        finish, cost, penalty = self._checked(sol, target, early)  # the dates shown
        next_cost = None
        step = min(target, self.normal_finish)
        if next_day and step > 0:
            try:
                nxt = self._solve(step - 1, tie_break=False, strict=strict)
            except HastenError:
                pass  # this is the shortest possible finish
            else:
                if nxt.proven:  # an unproven difference is no marginal cost
                    _, next_added, next_penalty = self._checked(nxt, step - 1)
                    next_cost = next_added + next_penalty - cost - penalty
        return self._plan(target, finish, sol, cost, penalty, sched, next_cost)

    def _plan(self, target: int, finish: int, sol: Solution, added_cost: float, penalty: float,
              sched: Schedule, next_cost: float | None) -> Plan:
        changes = []
        trades: dict[str, list] = {}
        choices = sol.choices or (-1,) * len(sol.durations)
        costs = self.checker.added_costs(sol.durations, sol.choices or None)
        for act, normal, d, c, cost, options in zip(self.project.activities, self.network.durations,
                                                    sol.durations, choices, costs, self.network.options):
            cut = normal - d
            way = options[c].name if c >= 0 else ""
            changes.append(ActivityChange(act.id, act.name, act.trade, normal, d, cut, cost, way))
            if cut or way:
                t = trades.setdefault(act.trade or "(no trade)", [0, 0.0])
                t[0] += cut
                t[1] += cost
        trade_rows = tuple(TradeTotal(k, v[0], v[1])
                           for k, v in sorted(trades.items(), key=lambda kv: (-kv[1][1], kv[0])))
        return Plan(target, finish, self.normal_finish, added_cost, self.project.normal_direct_cost,
                    tuple(changes), trade_rows, sched, next_cost, sol.proven, sol.bound, sol.gap, penalty)

    # -- the curve ---------------------------------------------------------------------
    def curve(self, longest: int | None = None, shortest: int | None = None,
              progress: Progress | None = None) -> list[CurvePoint]:
        """Least added cost at every whole working day from ``longest`` (default: the
        normal finish) down to ``shortest`` (default: the shortest possible finish).

        Linear costs: traced downwards, each day re-solved warm from the last basis.
        With discrete options (not convex): each day solved exactly as a MILP from scratch
        (see :mod:`hasten.solver_model` on why the previous plan is not passed as a start).
        """
        hi = self.normal_finish if longest is None else min(longest, self.normal_finish)
        lo = self.shortest_finish if shortest is None else shortest
        if lo > hi:
            raise HastenError(f"the curve range is empty: {lo} is after {hi}")
        top = hi + 1 if hi < self.normal_finish else hi  # one day more, for the first day's cost
        self._reach = max(self._reach, self.normal_finish - lo)
        targets = list(range(top, lo - 1, -1))
        solved: dict[int, tuple[Solution, float, float]] = {}
        for k, target in enumerate(targets):
            sol = self._solve(target, tie_break=False)  # raises below the shortest finish
            solved[target] = (sol, *self._checked(sol, target)[1:])
            if progress:
                progress(k + 1, len(targets))
        ids = self.network.ids
        points: list[CurvePoint] = []
        for target in range(hi, lo - 1, -1):
            sol, cost, penalty = solved[target]
            before = solved.get(target + 1)
            if before is None:
                points.append(CurvePoint(target, cost, 0.0, (), (), sol.proven, sol.gap, penalty))
                continue
            prev, prev_cost, prev_penalty = before
            changes = tuple((ids[i], d - p) for i, (d, p) in enumerate(zip(sol.durations, prev.durations))
                            if d != p)
            switches = tuple((ids[i], self._way(i, c)) for i, (c, p) in
                             enumerate(zip(sol.choices, prev.choices or (-1,) * len(sol.choices))) if c != p)
            points.append(CurvePoint(target, cost, cost + penalty - prev_cost - prev_penalty, changes,
                                     switches, sol.proven, sol.gap, penalty))
        return points

    def _way(self, i: int, choice: int) -> str:
        return "" if choice < 0 else self.project.activities[i].options[choice].name

    # -- total cost --------------------------------------------------------------------
    def total_cost_point(self, finish: int, added_cost: float, penalty: float = 0.0) -> TotalCostPoint:
        return TotalCostPoint(finish, self.clock.project_finish_date(finish),
                              self.project.normal_direct_cost + added_cost, added_cost,
                              time_costs(self.project, self.clock, finish), penalty)

    def best(self, progress: Progress | None = None) -> BestFinish:
        """The finish with the least total cost (direct + indirect + damages - bonus).

        Ties go to the later finish: the same money for less acceleration.
        """
        points = self.curve(progress=progress)
        table = tuple(self.total_cost_point(p.finish, p.added_cost, p.penalty) for p in reversed(points))
        best = min(table, key=lambda r: (round(r.total_cost, 6), -r.finish))
        plan = self.plan(best.finish)
        # Report the plan's own figures: among plans of the same least cost the tie-break may
        # pick another mix of acceleration and milestone damages, or finish a day sooner.
        # Its total can only be lower than the table's, and the table's is the least.
        point = self.total_cost_point(plan.finish, plan.added_cost, plan.penalty)
        return BestFinish(point, table, plan)

    def budget(self, spend: float) -> Plan:
        """The earliest finish whose least added cost is within ``spend``, and its plan."""
        if spend < 0:
            raise HastenError(f"--spend {spend:g} is negative; give the most you would add, e.g. 50000")
        target = max(self.model.earliest_finish_within(spend), self.shortest_finish)
        return self.plan(min(target, self.normal_finish))

