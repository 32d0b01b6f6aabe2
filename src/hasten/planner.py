"""Least-cost acceleration questions: a target plan, the time-cost curve, the best
total-cost finish and the earliest finish within a budget.

:class:`Planner` holds one project, its network, its calendar and one optimisation model,
built once and re-solved for every question asked of it. The figures shown with a plan
come from the optimiser side (the network's CPM pass of the plan, the solver's added cost,
:mod:`hasten.plan_costs`); the independent check (:mod:`hasten.plan_check`) recomputes each
from the project alone and must agree before the plan is returned.
"""

from __future__ import annotations

import math
from dataclasses import replace
from functools import cached_property
from datetime import date
from typing import Callable, NamedTuple

from .cautions import plan_cautions
from .cpm import Schedule, schedule
from .crash_model import CrashModel, Solution
from .dominated import drop_dominated
from .errors import HastenError, InfeasibleTargetError, PlanCheckError
from .network import Network
from .partial import PartialSolver, solvable_on_part
from .plan_check import PlanChecker
from .plan_costs import PlanCosts
from .project import Project
from .results import ActivityChange, BestFinish, Curve, CurvePoint, Plan, TotalCostPoint, TradeTotal
from .finish_search import total_costs_by_bounds
from .time_costs import time_costs

__all__ = ["Planner", "Progress"]


#: A progress callback: ``(done, total)`` after each solve of a long trace.
Progress = Callable[[int, int], None]


class _Figures(NamedTuple):
    """What is shown with a plan, as the optimiser side has it (and the check agreed)."""

    finish: int  # project working days, by the network's own CPM pass (a curve day: its target)
    cost: float  # added direct cost, the solver's
    damages: float  # of own deadlines missed at the early dates (hasten.plan_costs)
    costs: list[float] | None  # added direct cost of each activity, for a plan shown (hasten.plan_costs)


def _empty_range(lo: int, hi: int) -> HastenError:
    return HastenError(f"the curve range is empty: the shortest finish asked ({lo} working "
                       f"days) is after the longest ({hi})")


class Planner:
    """One project prepared for acceleration questions, its optimisation model built once
    and re-solved warm for every question asked of it (a session for a notebook or a
    server: the module functions :func:`plan`, :func:`curve` and the others build one per
    call).

    Discrete options beaten on time and cost by another way of the same activity are
    dropped first (:mod:`hasten.dominated`); ``notes`` says which.

    Parameters
    ----------
    project : Project
        The project, with its progress at the data date if any.
    time_limit : float, optional
        Seconds each mixed-integer solve may take; a plan stopped by it is reported as not
        proven optimal, with its bound and gap.
    keep_dominated : bool
        Keep every option (to price a given plan that uses a dominated one, :meth:`evaluate`).

    Examples
    --------
    >>> import hasten
    >>> planner = hasten.Planner(hasten.read_project("cases/clinic-fitout"))
    >>> a, b = planner.plan(planner.normal_finish - 1), planner.plan(planner.normal_finish - 2)
    >>> a.added_cost <= b.added_cost
    True
    """

    def __init__(self, project: Project, *, time_limit: float | None = None, solver: str | None = None,
                 keep_dominated: bool = False):
        if time_limit is not None and not (time_limit > 0 and math.isfinite(time_limit)):
            raise HastenError(f"the time limit {time_limit!r} must be a positive number of seconds")
        project, notes = (project, []) if keep_dominated else drop_dominated(project)
        self.given = project  # as given: results list activities in this order
        # The model is built on the activities sorted by id (and the links sorted), so that
        # among plans of equal cost the one chosen never depends on the order of the rows.
        project = replace(project, activities=tuple(sorted(project.activities, key=lambda a: a.id)),
                          links=tuple(sorted(project.links, key=lambda k: (k.pred, k.succ, k.type.value, k.lag))))
        self.project = project
        self.notes: tuple[str, ...] = tuple(notes)
        self.solver = solver
        self.network = Network(project)
        self.clock = self.network.clock
        self.normal_finish = self.network.forward_finish()
        self.costs = PlanCosts(self.network)  # the figures shown, on the optimiser side
        self.checker = PlanChecker(project)  # independent of the network (hasten.plan_check)
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
            self._model = CrashModel(self.network, time_limit=self.time_limit, solver=self.solver)
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

    def target_earlier(self, *, working_days: int = 0, calendar_days: int = 0) -> int:
        """Finish target ``working_days`` working days before the current finish, or
        ``calendar_days`` calendar days before its date (to the last working day on or
        before it, in the project calendar)."""
        if calendar_days:
            try:
                return self.clock.shift_calendar_days(self.normal_finish, calendar_days)
            except (OverflowError, ValueError):
                raise HastenError(f"{calendar_days:,} calendar days before the current finish is before "
                                  "the first date a calendar can count (the year 1)") from None
        return self._datable(self.normal_finish - working_days)

    def _datable(self, target: int) -> int:
        """``target`` itself, when the project calendar can date it."""
        try:
            self.clock.project_finish_date(target)
        except (OverflowError, ValueError):
            raise HastenError(f"a finish of {target:,} working days from the start cannot be dated with "
                              "the project calendar (it falls outside the years 1 to 9999)") from None
        return target

    def contract_target(self) -> int | None:
        """The target that meets the contract finish, or the shortest possible finish when
        it cannot be met; ``None`` when there is no contract finish or the current schedule
        already meets it."""
        contract = self.project.contract.finish
        if contract is None or self.target_by_date(contract) >= self.normal_finish:
            return None
        return max(self.target_by_date(contract), self.shortest_finish)

    # -- plans -------------------------------------------------------------------------
    def _solve(self, target: int, *, tie_break: bool = True, strict: bool = False,
               or_none: bool = False) -> Solution | None:
        deadlines = strict and any(a.deadline is not None for a in self.project.activities)
        if target >= self.normal_finish and not (self.discrete or self.penalised or deadlines):
            return Solution(tuple(self.network.durations), 0.0, 0.0)
        target = min(target, self.normal_finish) if self.penalised else target
        if self._partial_ok:  # solve on the part that can matter (whatever was asked before)
            if self._partial is None:
                self._partial = PartialSolver(self.network, time_limit=self.time_limit)
            sol = self._partial.least_cost(target, reach=self._reach, tie_break=tie_break)
            if sol is not None:
                return sol
        sol = self.model.least_cost(target, tie_break=tie_break, strict=strict)
        if sol is None:
            if or_none:  # (the caller knows what to make of it: no solve for the message)
                return None
            if strict and target >= self.shortest_finish:
                raise HastenError(f"no plan meets every interim milestone deadline by a finish of "
                                  f"{target} working days")
            shortest = self.shortest_finish
            raise InfeasibleTargetError(target, shortest, self.network.finish_date(target) if target > 0 else None,
                                        self.network.finish_date(shortest))
        return sol

    def _checked(self, sol: Solution, target: int | None, shown: list[int] | None = None, *,
                 strict: bool = False, solved: bool = True, finish: bool = True) -> _Figures:
        """The figures of a solution, from the optimiser side: its finish (and the finish
        date) by the network's CPM pass, the solver's added cost, the milestone damages at
        the early dates and, for a plan shown (``shown``: the early starts its schedule
        shows), each activity's added cost (:mod:`hasten.plan_costs`). The independent
        check recomputes each from the project alone, and the starts shown, and must
        agree (with ``strict``: no own deadline missed), else :class:`PlanCheckError`.
        ``solved``: the damages the solver counted must cover those of the dates too."""
        net, d, choices = self.network, sol.durations, sol.choices or None
        if not finish and shown is None and not sol.early and not self.costs.owes_damages:
            # a day of a curve (``finish`` False): only its cost is shown, and the check
            # that it finishes by the target; no forward pass of our own for a finish
            self.checker.check(d, choices=choices, target=target, claimed_finish=None,
                               claimed_cost=sol.added_cost, strict=strict)
            return _Figures(target, sol.added_cost, 0.0, None)
        early = shown if shown is not None else sol.starts if sol.early else net.forward(d)
        finish = net.finish_of(early, d)
        costs = None if shown is None else self.costs.added_costs(d, choices)
        damages = self.costs.milestone_damages([s + x for s, x in zip(early, d)]) if self.costs.owes_damages else 0.0
        self.checker.check(d, choices=choices, starts=shown, early=True, target=target, claimed_finish=finish,
                           claimed_cost=sol.added_cost, claimed_costs=costs, claimed_damages=damages,
                           claimed_finish_date=net.finish_date(finish), strict=strict)
        if solved and damages > sol.milestone_damages + 1e-6 * max(1.0, damages):
            raise PlanCheckError(f"plan check: the solver counted {sol.milestone_damages:.2f} of milestone "
                                 f"damages, the plan's dates give {damages:.2f}")
        return _Figures(finish, sol.added_cost, damages, costs)

    @property
    def normal_damages(self) -> float:
        """Milestone damages of the current schedule (every activity at its normal pace),
        checked as a plan's are."""
        return self._checked(Solution(tuple(self.network.durations), 0.0, 0.0), None, solved=False).damages

    def plan(self, target: int, *, next_day: bool = True, strict: bool = False) -> Plan:
        """The least-cost plan to finish by ``target`` working days; with ``strict`` every
        interim milestone must also meet its own deadline. Among plans of equal cost, the
        one that changes the fewest activities, then the fewest days.

        Raises
        ------
        InfeasibleTargetError
            When no plan finishes by ``target`` (it carries the shortest possible finish).
        """
        self._datable(target)
        self._reach = max(self._reach, self.normal_finish - target + 1)  # and the next day
        sol = self._solve(target, strict=strict)
        sched = schedule(self.network, sol.durations)
        shown = [r.ef - r.duration for r in sched.activities]  # early starts of what is left
        figures = self._checked(sol, target, shown, strict=strict)
        next_cost = None
        step = figures.finish  # one day before the plan's own finish (it may be earlier than the target)
        if next_day and step > 0:
            try:
                nxt = self._solve(step - 1, tie_break=False, strict=strict)
            except HastenError:
                pass  # this is the shortest possible finish
            else:
                if nxt.proven:  # an unproven difference is no marginal cost
                    after = self._checked(nxt, step - 1, strict=strict)
                    next_cost = after.cost + after.damages - figures.cost - figures.damages
        return self._plan(target, figures, sol, sched, next_cost)

    def evaluate(self, durations, choices=None) -> Plan:
        """The plan of given durations (and option choices, -1 for none) of what is left to
        schedule, checked and scheduled without solving; its target is its own finish."""
        durations = tuple(int(d) for d in durations)
        choices = tuple(choices) if choices is not None and any(c >= 0 for c in choices) else ()
        cost = float(sum(self.costs.added_costs(durations, choices or None)))
        sol = Solution(durations, cost, cost, choices)
        sched = schedule(self.network, durations)
        shown = [r.ef - r.duration for r in sched.activities]  # early starts of what is left
        figures = self._checked(sol, None, shown, solved=False)
        return self._plan(figures.finish, figures, sol, sched, None)

    def _plan(self, target: int, figures: _Figures, sol: Solution, sched: Schedule,
              next_cost: float | None) -> Plan:
        changes = []
        trades: dict[str, list] = {}
        choices = sol.choices or (-1,) * len(sol.durations)
        names = {c.name for c in self.project.calendars}
        default = self.project.calendar.name
        for act, normal, d, c, cost, options in zip(self.project.activities, self.network.durations,
                                                    sol.durations, choices, figures.costs, self.network.options):
            cut = normal - d
            way = options[c] if c >= 0 else None
            calendar = act.calendar if act.calendar in names else default
            changes.append(ActivityChange(act.id, act.name, act.trade, calendar, normal, d, cut, cost,
                                          way.name if way else "", way.note if way else ""))
            if cut or way:
                t = trades.setdefault(act.trade or "(no trade)", [0, 0.0])
                t[0] += cut
                t[1] += cost
        trade_rows = tuple(TradeTotal(k, v[0], v[1])
                           for k, v in sorted(trades.items(), key=lambda kv: (-kv[1][1], kv[0])))
        clock, day, finish = self.clock, self.network.finish_date, figures.finish
        cautions = plan_cautions(self.project, self.network.timeline, changes, sched)
        changes, sched = self._as_given(changes), self._as_given_schedule(sched)
        return Plan(self.given, target, finish, self.normal_finish, figures.cost, tuple(changes), trade_rows,
                    sched, next_cost, clock.start_date(0), day(target), day(finish), day(self.normal_finish),
                    tuple(cautions), self.notes, sol.proven, sol.bound, sol.gap, figures.damages,
                    self._as_given_schedule(self.normal))

    def _as_given(self, rows: list) -> list:
        """Rows (one per activity, in the model's order) in the order the project gave them."""
        by_id = {r.id: r for r in rows}
        return [by_id[a.id] for a in self.given.activities]

    def _as_given_schedule(self, sched: Schedule) -> Schedule:
        return replace(sched, activities=tuple(self._as_given(list(sched.activities))))

    # -- the curve ---------------------------------------------------------------------
    def curve(self, longest: int | None = None, shortest: int | None = None,
              progress: Progress | None = None) -> Curve:
        """Least added cost at every whole working day from ``longest`` (default: the
        normal finish) down to ``shortest`` (default: the shortest possible finish).

        Linear costs: traced downwards, each day re-solved warm from the last basis.
        With discrete options or calendars of their own (not convex): each day solved
        exactly as a MILP from scratch (see :mod:`hasten.solver_model`).
        """
        hi = self.normal_finish if longest is None else min(longest, self.normal_finish)
        # Down to the shortest finish, with linear costs: traced until a day has no plan (the
        # warm re-solve finds that at once), not found first by a cold solve of its own
        to_the_end = shortest is None and self._shortest is None and self._partial_ok
        lo = 0 if to_the_end else self.shortest_finish if shortest is None else shortest
        if lo > hi:
            raise _empty_range(lo, hi)
        top = hi + 1 if hi < self.normal_finish else hi  # one day more, for the first day's cost
        self._reach = max(self._reach, self.normal_finish - lo)
        targets = list(range(top, lo - 1, -1))
        solved: dict[int, tuple[Solution, float, float]] = {}
        for k, target in enumerate(targets):
            sol = self._solve(target, tie_break=False, or_none=to_the_end)  # (else raises)
            if sol is None:  # the day before was the shortest finish
                self._shortest = lo = min(target + 1, self.normal_finish)
                break
            figures = self._checked(sol, target, finish=False)
            solved[target] = (sol, figures.cost, figures.damages)
            if progress:
                progress(k + 1, k + 2 if to_the_end else len(targets))
        if to_the_end and self._shortest is None:
            self._shortest = lo  # (day 0: nothing takes time)
        if lo > hi:  # (traced: the shortest finish found is after the longest asked)
            raise _empty_range(lo, hi)
        import numpy as np  # (loaded with the network already)

        ids = self.network.ids
        normal = self.network.durations
        normal_days = np.asarray(normal)
        days = {t: np.asarray(sol.durations) for t, (sol, _, _) in solved.items()}  # (once each)
        points: list[CurvePoint] = []
        for target in range(hi, lo - 1, -1):
            sol, cost, damages = solved[target]
            changed = days[target] != normal_days
            if sol.choices:
                changed |= np.asarray(sol.choices) >= 0
            choices = sol.choices or (-1,) * len(sol.durations)
            changed = np.flatnonzero(changed).tolist()  # few of them
            plan = tuple((ids[i], normal[i] - sol.durations[i], self._way(i, choices[i]))
                         for i in changed)
            date_ = self.network.finish_date(target)
            before = solved.get(target + 1)
            if before is None:
                points.append(CurvePoint(target, date_, cost, 0.0, plan, (), (), sol.proven, sol.gap, damages))
                continue
            prev, prev_cost, prev_damages = before
            changes = tuple((ids[i], sol.durations[i] - prev.durations[i]) for i in
                            np.flatnonzero(days[target] != days[target + 1]).tolist())
            switches = tuple((ids[i], self._way(i, c)) for i, (c, p) in
                             enumerate(zip(sol.choices, prev.choices or (-1,) * len(sol.choices))) if c != p)
            points.append(CurvePoint(target, date_, cost, cost + damages - prev_cost - prev_damages, plan,
                                     changes, switches, sol.proven, sol.gap, damages))
        known = self._shortest if self._shortest is not None else (lo if shortest is None else None)
        return Curve(self.given, tuple(points), self.normal_finish, known, self.penalised, self.notes)

    def _way(self, i: int, choice: int) -> str:
        return "" if choice < 0 else self.network.options[i][choice].name

    # -- total cost --------------------------------------------------------------------
    @cached_property
    def normal_direct_cost(self) -> float:
        """The project's direct cost at normal durations (summed once)."""
        return self.project.normal_direct_cost

    def total_cost_point(self, finish: int, added_cost: float, milestone_damages: float = 0.0) -> TotalCostPoint:
        """Direct, indirect, damages and bonus of finishing at ``finish`` with ``added_cost``."""
        return TotalCostPoint(finish, self.network.finish_date(finish),
                              self.normal_direct_cost + added_cost, added_cost,
                              time_costs(self.project, self.clock, finish, floor=self.network.finish_floor),
                              milestone_damages)

    def best_finish(self, progress: Progress | None = None) -> BestFinish:
        """The finish with the least total cost (direct + indirect + damages - bonus).

        Ties go to the later finish: the same money for less acceleration. With linear
        costs on one calendar (no discrete options, no milestone deadlines) the added cost
        is convex in the finish: a branch and bound prices only the finishes whose total
        could still be the least (lines through priced days bound the added cost of every
        other day from below; the time costs of every day are known without a solve), so
        ``table`` holds the finishes priced, the current finish among them, not every day.
        With discrete options, calendars of their own or milestone deadlines (no convexity)
        every finish from the shortest to the current one is solved and priced, and
        ``table`` holds them all.
        """
        if self._partial_ok:
            table = total_costs_by_bounds(self, progress)
        else:
            points = self.curve(progress=progress)
            table = tuple(self.total_cost_point(p.finish, p.added_cost, p.milestone_damages)
                          for p in reversed(points.points))
        best = min(table, key=lambda r: (round(r.total_cost, 6), -r.finish))
        plan = self.plan(best.finish)
        # Report the plan's own figures: among plans of the same least cost the tie-break may
        # pick another mix of acceleration and milestone damages, or finish a day sooner.
        # Its total can only be lower than the table's, and the table's is the least.
        point = self.total_cost_point(plan.finish, plan.added_cost, plan.milestone_damages)
        current = next(r for r in table if r.finish == self.normal_finish)
        return BestFinish(point, current, table, plan, self.notes)

    def earliest_within(self, budget: float) -> Plan:
        """The earliest finish whose least added cost is within ``budget``, and its plan.

        With linear costs on one calendar the least added cost is convex and never rises as
        the finish grows, so the earliest finish within a budget is found by a few solves:
        days doubled back from the current finish until the cost passes the budget, then
        bisection (each solve warm, on the part of the network that can matter). Otherwise
        (discrete options, calendars of their own, milestone deadlines: no convexity) one
        solve asks for the earliest finish with the cost capped at the budget.
        """
        if not math.isfinite(budget) or budget < 0:
            raise HastenError(f"a budget of {budget:g} cannot be spent; give the most you would add, "
                              "a number 0 or more")
        if not self._partial_ok:
            target = self.model.earliest_finish_within(budget)  # never before the shortest finish
            return self.plan(min(target, self.normal_finish))
        within = budget + 1e-9 * max(1.0, abs(budget))

        def affordable(target: int) -> bool:
            if target < 0:
                return False
            try:
                return self._solve(target, tie_break=False).added_cost <= within
            except InfeasibleTargetError:
                return False

        good, step = self.normal_finish, 1  # the current finish costs nothing
        while affordable(self.normal_finish - step):
            good, step = self.normal_finish - step, 2 * step
        bad = self.normal_finish - step
        while good - bad > 1:
            mid = (good + bad) // 2
            good, bad = (mid, bad) if affordable(mid) else (good, mid)
        return self.plan(good)
