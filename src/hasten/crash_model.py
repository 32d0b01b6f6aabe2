"""The least-cost acceleration model, built once per network and re-solved.

:class:`CrashModel` writes the time-cost trade-off into a :class:`~hasten.solver_model.LinearModel`
and answers: the shortest possible finish, the least added cost for a target finish
(ties to fewer crash days), and the earliest finish within a budget. The curve, budget
mode and the plan all re-solve the same model with another bound or objective; later
features extend it (discrete options, milestone penalties, scenario copies).

Formulation, per activity ``i`` with normal duration ``D_i``::

    start s_i >= 0, end f_i >= 0, shortening y_ik in [0, days_k] for each cost step k
    f_i - s_i + sum_k y_ik = D_i                         (duration between crash and normal)
    FS: s_j - f_i >= lag   SS: s_j - s_i >= lag   FF: f_j - f_i >= lag   SF: f_j - s_i >= lag
    f_i - T <= 0                                         (every activity finishes by T)
    minimise sum_ik cost_per_day_k * y_ik                 (added direct cost)

Every row but the first kind is a difference of two event times, and each shortening
column appears in one row only, so the matrix is totally unimodular: with whole-day
data every vertex is integral and the simplex method returns whole-day plans (the
tests show it on random networks). Solutions are still rounded and checked; should
one ever come out fractional, the shortening columns are made integer and the model
is solved again.

On one calendar without discrete options or milestone deadlines the model is built slim
(:func:`hasten.crash_slim.slim_rows`): each end is written as ``s_i + D_i - sum_k y_ik`` in the
rows that use it, so there are no end columns and no duration rows. That is an affine
one-to-one map of the feasible set above, so its vertices are the same whole-day plans;
each warm re-solve has a third fewer rows and columns.

Cost steps must be convex (cost per day not falling from one step to the next); the
LP then takes the cheaper step first by itself.

Activities on calendars of their own: each counts its events in its own working days, so
the rows above hold within one calendar; a link between two calendars (and the project
finish of work on another calendar) is a step function of the predecessor's event and
makes the model a MILP (:mod:`hasten.crash_calendars`). Ties among least-cost plans are
broken in :mod:`hasten.crash_ties`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from enum import Enum

import numpy as np

from . import crash_calendars, crash_slim, crash_ties
from .crash_calendars import INT_TOL as _INT_TOL
from .errors import HastenError, SolverError, TimeLimitError
from .network import Network
from .progress import end_day
from .solver_model import INF, LinearModel

__all__ = ["CrashModel", "Objective", "Solution"]

_FS, _SS, _FF, _SF = 0, 1, 2, 3


def _dot(a: np.ndarray, b: np.ndarray) -> float:
    """Sum of products without BLAS: a matrix product starts the multi-threaded BLAS, whose
    threads then spin and take the second core from HiGHS during the next solve."""
    return float(np.multiply(a, b).sum())


class Objective(str, Enum):
    COST = "cost"  # least added direct cost
    FINISH = "finish"  # earliest finish


@dataclass(frozen=True)
class Solution:
    """One solve: durations in whole working days, the objective value and the added
    direct cost as the solver computed it (checked independently by the caller)."""

    durations: tuple[int, ...]
    objective: float
    added_cost: float
    choices: tuple[int, ...] = ()  # per activity: index of the chosen option, -1 for none
    milestone_damages: float = 0.0  # damages of activities past their own deadlines, as solved
    proven: bool = True  # False when a time limit stopped the solver first
    bound: float | None = None  # proven lower bound on the objective when not proven
    gap: float | None = None  # relative gap when not proven
    starts: tuple[int, ...] | None = None  # the solver's own starts (what is left to schedule)
    early: bool = False  # True when ``starts`` are the network's early starts (a forward pass)


def _convex(network: Network) -> None:
    for act, steps in zip(network.project.activities, network.steps):
        for a, b in zip(steps, steps[1:]):
            if b.cost_per_day < a.cost_per_day:
                raise HastenError(
                    f"activity {act.id}: crash steps get cheaper ({a.cost_per_day:g} then "
                    f"{b.cost_per_day:g} per day); an LP cannot take them in order. Sort the "
                    "steps by cost per day, or model them as discrete options")


class CrashModel:
    """Least-cost acceleration model for one network (the LP, or a MILP with discrete
    options, milestone damages or calendars of their own).

    Examples
    --------
    Two activities in a chain, each 5 days that can be cut to 3 at 100 a day (A) and 40 a
    day (B): the shortest finish is 6 days, and finishing by day 8 cuts B by 2 days.

    >>> from datetime import date
    >>> from hasten.network import Network
    >>> from hasten.project import Activity, Link, Project
    >>> acts = (Activity("A", 5, crash_duration=3, cost=0, crash_cost=200),
    ...         Activity("B", 5, crash_duration=3, cost=0, crash_cost=80))
    >>> model = CrashModel(Network(Project("chain", date(2027, 1, 4), acts, (Link("A", "B"),))))
    >>> model.shortest_finish()
    6
    >>> sol = model.least_cost(8)
    >>> sol.durations, sol.added_cost
    ((5, 3), 80.0)
    """

    def __init__(self, network: Network, *, solver: str | None = None,
                 time_limit: float | None = None):
        _convex(network)
        self.net = network
        lm = LinearModel(solver=solver, time_limit=time_limit)
        self.lp = lm
        release = np.asarray(network.release, dtype=float)
        self.start = lm.add_columns(release, np.where(network.fixed, release, INF))
        # Linear costs on one calendar without milestone deadlines (the common case, and
        # every curve and plan solved on a part): no end columns, see crash_slim
        self.slim = crash_slim.linear_on_one_calendar(network)
        self.end = None if self.slim else lm.add_columns(np.asarray(network.finish_release, dtype=float), INF)
        self.finish = int(lm.add_columns([0.0], INF)[0])
        self.horizon_finish: int | None = None  # latest finish modelled (several calendars)
        self.relations: list[crash_calendars.Relation] = []  # relations between calendars (see _calendar_rows)
        owner, days, per_day = [], [], []
        for i, steps in enumerate(network.steps):
            for step in steps:
                owner.append(i)
                days.append(step.days)
                per_day.append(step.cost_per_day)
        self.cut_owner = np.asarray(owner, dtype=np.int64)
        self.cut_cost = np.asarray(per_day, dtype=float)
        self.cuts = lm.add_columns(np.zeros(len(owner)), np.asarray(days, dtype=float))
        self._option_columns(network)
        self._rows(network)
        cost_cols = np.concatenate([self.cuts, self.opt_x, self.opt_w])
        cost_coef = np.concatenate([self.cut_cost, self.opt_cost, self.w_cost])
        self.cost_cap = lm.add_row(cost_cols, cost_coef, -INF, INF)  # acceleration spend only
        self._milestone_columns(network)
        lm.define_objective(Objective.COST.value, np.concatenate([cost_cols, self.late]),
                            np.concatenate([cost_coef, self.late_cost]))
        lm.define_objective(Objective.FINISH.value, [self.finish], [1.0])
        self._last = None
        self._strict = False

    def _option_columns(self, net: Network) -> None:
        """Discrete options: a 0/1 column ``x`` per option ("chosen") and, for an option
        that can be shortened further, a column ``w`` for its extra days."""
        owner, index, delta, cost = [], [], [], []
        w_of, w_room, w_cost = [], [], []
        for i, options in enumerate(net.options):
            for k, opt in enumerate(options):
                owner.append(i)
                index.append(k)
                delta.append(net.durations[i] - opt.duration)
                cost.append(opt.added_cost)
                if opt.shortest < opt.duration:
                    w_of.append(len(owner) - 1)
                    w_room.append(opt.duration - opt.shortest)
                    w_cost.append(opt.cost_per_day)
        lm = self.lp
        self.opt_owner = np.asarray(owner, dtype=np.int64)
        self.opt_index = np.asarray(index, dtype=np.int64)
        self.opt_delta = np.asarray(delta, dtype=float)
        self.opt_cost = np.asarray(cost, dtype=float)
        self.opt_x = lm.add_columns(np.zeros(len(owner)), 1.0, integer=True)
        self.w_of = np.asarray(w_of, dtype=np.int64)  # which option each w belongs to
        self.w_room = np.asarray(w_room, dtype=float)
        self.w_cost = np.asarray(w_cost, dtype=float)
        self.opt_w = lm.add_columns(np.zeros(len(w_of)), self.w_room)

    def _milestone_columns(self, net: Network) -> None:
        """Damages of activities with a deadline (interim milestones): per calendar day late.

        For a finish offset ``f`` the damages are ``g(f) = rate * max(0, calendar days from
        the deadline to the finish date)``, a step function of ``f``. Column ``b_k`` in
        [0, 1] stands for "late by at least k working days" and costs the k-th step
        ``g(M + k) - g(M + k - 1)``; the row ``f - sum_k b_k <= M`` lets the finish pass the
        deadline offset ``M`` only by paying. Steps that grow (or stay) make a convex
        function and the LP is exact; otherwise (a weekend adds three calendar days at
        once) the columns become 0/1 and must be taken in order.
        """
        lm = self.lp
        self.horizon = max(net.forward_finish(), 1)
        own_horizon = net.latest_finish(self.horizon)  # in each activity's own calendar
        cols, costs, self.penalised = [], [], []
        self._deadlines: list = []  # (activity, its clock, the activity, deadline offset)
        for i, act in enumerate(net.project.activities):
            if act.deadline is None or net.fixed[i]:
                continue  # (a deadline without damages costs nothing but binds strict plans)
            clock, horizon = net.timeline.clock_of(i), max(own_horizon[i], 1)
            limit = clock.offset_of(act.deadline, finish=True)
            if limit >= horizon:
                continue
            # The end is dated on end_day (hasten.progress): never before the activity's
            # floor (0; a milestone's first day). A deadline before that day is missed
            # whatever the plan: the steps then start from a virtual offset floor - 1 that
            # costs nothing (the finish is never before the floor).
            state = net.progress.activities[i]
            floor = state.floor
            limit = limit if limit > floor else floor - 1
            self._deadlines.append((i, clock, act, limit))
            g = [act.damages_per_day * max(0, (clock.date_of(end_day(state, f)) - act.deadline).days)
                 if f >= floor else 0.0 for f in range(limit, horizon + 1)]
            steps = np.diff(g)
            b = lm.add_columns(np.zeros(len(steps)), 1.0)
            lm.add_row(np.concatenate([[self.end[i]], b]), np.concatenate([[1.0], -np.ones(len(b))]),
                       -INF, float(limit))
            if np.any(np.diff(steps) < 0):
                lm.set_integer(b, True)
                for k in range(len(b) - 1):  # late by k+1 days only if late by k days
                    lm.add_row([b[k + 1], b[k]], [1.0, -1.0], -INF, 0.0)
            cols.append(b)
            costs.append(steps)
            self.penalised.append(i)
        self.late = np.concatenate(cols) if cols else np.zeros(0, dtype=np.int64)
        self.late_cost = np.concatenate(costs) if costs else np.zeros(0)

    @property
    def discrete(self) -> bool:
        """True when the model has option columns (a MILP)."""
        return len(self.opt_x) > 0

    def _rows(self, net: Network) -> None:
        if self.slim:
            crash_slim.slim_rows(self, net)
            return
        n, lm = len(net), self.lp
        # duration rows: f_i - s_i + sum_k y_ik + sum_o (D_i - d_o) x_io + sum_o w_io = D_i
        per = np.bincount(self.cut_owner, minlength=n)
        durations = np.asarray(net.durations, dtype=float)
        if not self.discrete:  # the common case, built without a Python loop
            starts = np.concatenate([[0], np.cumsum(2 + per)[:-1]])
            index = np.empty(int((2 + per).sum()), dtype=np.int64)
            value = np.ones(len(index))
            index[starts] = self.end
            index[starts + 1] = self.start
            value[starts + 1] = -1.0
            order = np.argsort(self.cut_owner, kind="stable")
            slot = np.repeat(starts + 2, per) + (np.arange(len(order)) - np.repeat(np.cumsum(per) - per, per))
            index[slot] = self.cuts[order]
            lm.add_rows(starts, index, value, durations, durations)
        else:
            self._duration_rows_with_options(net, durations)
        # links: later - earlier >= lag
        pred = np.asarray(net.pred, dtype=np.int64)
        succ = np.asarray(net.succ, dtype=np.int64)
        kind = np.asarray(net.kind, dtype=np.int64)
        lag = np.asarray(net.lag, dtype=float)
        cal = np.asarray(net.cal, dtype=np.int64)
        cross = cal[pred] != cal[succ]  # links between two calendars: see _calendar_rows
        later = np.where((kind == _FS) | (kind == _SS), self.start[succ], self.end[succ])
        earlier = np.where((kind == _FS) | (kind == _FF), self.end[pred], self.start[pred])
        plain = np.flatnonzero(~cross)
        m = len(plain)
        if m:
            index = np.empty(2 * m, dtype=np.int64)
            index[0::2], index[1::2] = later[plain], earlier[plain]
            value = np.tile([1.0, -1.0], m)
            lm.add_rows(np.arange(0, 2 * m, 2), index, value, lag[plain], INF)
        # every activity finishes by T, unless an FS/FF successor with lag >= 0 on the same
        # calendar implies it
        implied = np.zeros(n, dtype=bool)
        if len(pred):
            implied[pred[((kind == _FS) | (kind == _FF)) & (lag >= 0) & ~cross]] = True
        if net.several:
            crash_calendars.calendar_rows(self, net, np.flatnonzero(cross), later, earlier, implied)
            implied |= cal != 0  # (their finish rows are steps too)
        free = np.flatnonzero(~implied)
        index = np.empty(2 * len(free), dtype=np.int64)
        index[0::2], index[1::2] = self.end[free], self.finish
        lm.add_rows(np.arange(0, 2 * len(free), 2), index, np.tile([1.0, -1.0], len(free)),
                    -INF, 0.0)

    def _duration_rows_with_options(self, net: Network, durations: np.ndarray) -> None:
        n, lm = len(net), self.lp
        terms: list[list[tuple[int, float]]] = [[(int(self.end[i]), 1.0), (int(self.start[i]), -1.0)]
                                                for i in range(n)]
        for col, i in zip(self.cuts.tolist(), self.cut_owner.tolist()):
            terms[i].append((col, 1.0))
        for col, i, dl in zip(self.opt_x.tolist(), self.opt_owner.tolist(), self.opt_delta.tolist()):
            terms[i].append((col, dl))
        for col, o in zip(self.opt_w.tolist(), self.w_of.tolist()):
            terms[int(self.opt_owner[o])].append((col, 1.0))
        self._add_term_rows(terms, durations, durations)
        # at most one option per activity; crash steps only without an option; an option's
        # extra days only when it is chosen
        choose, exclusive = [], []
        room = np.bincount(self.cut_owner, weights=np.asarray(lm.col_upper)[self.cuts], minlength=n)
        by_act: dict[int, list[int]] = {}
        for col, i in zip(self.opt_x.tolist(), self.opt_owner.tolist()):
            by_act.setdefault(i, []).append(col)
        for i, cols in by_act.items():
            if len(cols) > 1:
                choose.append([(c, 1.0) for c in cols])
            if room[i] > 0:
                exclusive.append([(int(c), 1.0) for c, o in zip(self.cuts.tolist(), self.cut_owner.tolist())
                                  if o == i] + [(c, float(room[i])) for c in cols])
        self._add_term_rows(choose, -INF, 1.0)
        self._add_term_rows(exclusive, -INF, [room[i] for i in by_act if room[i] > 0])
        self._add_term_rows([[(int(w), 1.0), (int(self.opt_x[o]), -float(r))]
                             for w, o, r in zip(self.opt_w, self.w_of, self.w_room)], -INF, 0.0)

    def _add_term_rows(self, terms: list[list[tuple[int, float]]], lower, upper) -> None:
        if not terms:
            return
        starts = np.concatenate([[0], np.cumsum([len(t) for t in terms])[:-1]])
        index = [c for t in terms for c, _ in t]
        value = [v for t in terms for _, v in t]
        self.lp.add_rows(starts, index, value, lower, upper)

    # -- solving -----------------------------------------------------------------------
    def _run(self, objective: Objective, target: int | None, cap: float | None, *,
             aside: bool = False, strict: bool = False, duals: bool = False):
        """Solve (see :meth:`_run_once`); with relations between calendars still relaxed,
        until the plan holds exactly (:meth:`_calendar_rows`)."""
        while True:
            result = self._run_once(objective, target, cap, aside=aside, strict=strict, duals=duals)
            if result is None or not self.relations:
                return result
            holds, late = crash_calendars.holds(self, result, objective, target, strict)
            if holds or not crash_calendars.refine(self, result.values, late):
                return result  # (a plan that does not hold always breaks a pending relation)

    def _run_once(self, objective: Objective, target: int | None, cap: float | None, *,
                  aside: bool = False, strict: bool = False, duals: bool = False):
        """Solve; with ``aside`` on a copy, so the live model keeps its warm start for the
        least-cost questions that are asked over and over."""
        # A MILP gets a fresh solver each time: re-running a MILP in the same HiGHS object
        # after a bound change was seen to end "optimal" on a worse plan (HiGHS 1.16,
        # PSPLIB j1012_10 at 11-12 days; tests/test_discrete.py)
        lm = self.lp.copy() if (aside or self.lp.is_mip) else self.lp
        lm.use_objective(objective.value)
        if target is not None and self.horizon_finish is not None:
            target = min(target, self.horizon_finish)  # (the calendar steps reach this far)
        lm.set_col_bounds(self.finish, 0.0, INF if target is None else float(target))
        lm.set_row_bounds(self.cost_cap, -INF, INF if cap is None else float(cap))
        current = self._strict if lm is self.lp else None  # a fresh copy: set its bounds anyway
        if len(self.late) and strict != current:
            lm.set_cols_bounds(self.late, 0.0, 0.0 if strict else 1.0)  # strict: no milestone late
            if lm is self.lp:
                self._strict = strict
        result = lm.solve(duals=duals)
        if result.status == "infeasible":
            return None
        if result.values is None:
            raise TimeLimitError(f"the solver's time limit ({lm.time_limit:g} s) ran out before any "
                                 "plan was found")
        return result

    def solution_of(self, values: np.ndarray, result=None) -> Solution | None:
        """The solution in whole days, or ``None`` if it is fractional."""
        n = len(self.net)
        y = values[self.cuts]
        x = values[self.opt_x]
        w = values[self.opt_w]
        cut = np.bincount(self.cut_owner, weights=y, minlength=n).astype(float)
        if self.discrete:
            cut += np.bincount(self.opt_owner, weights=self.opt_delta * x, minlength=n)
            cut += np.bincount(self.opt_owner[self.w_of], weights=w, minlength=n)
        whole = np.rint(cut)
        if np.any(np.abs(cut - whole) > _INT_TOL) or np.any(np.abs(x - np.rint(x)) > _INT_TOL):
            return None
        durations = tuple((np.asarray(self.net.durations) - whole.astype(np.int64)).tolist())
        choices = np.full(n, -1, dtype=np.int64)
        chosen = np.flatnonzero(x > 0.5)
        choices[self.opt_owner[chosen]] = self.opt_index[chosen]
        # the cost of the whole-day plan: solver values within its tolerances, rounded
        x = np.rint(x)
        y = np.where(np.abs(y - np.rint(y)) <= _INT_TOL, np.rint(y), y)
        w = np.where(np.abs(w - np.rint(w)) <= _INT_TOL, np.rint(w), w)
        added = _dot(y, self.cut_cost) + _dot(x, self.opt_cost) + _dot(w, self.w_cost)
        late = values[self.late]
        late = np.where(np.abs(late - np.rint(late)) <= _INT_TOL, np.rint(late), late)
        milestone_damages = _dot(late, self.late_cost) if len(self.late) else 0.0
        proven = result is None or result.status == "optimal"
        s = values[self.start]
        starts = tuple(np.rint(s).astype(np.int64).tolist()) if np.all(np.abs(s - np.rint(s)) <= _INT_TOL) else None
        if self.net.several:  # (relations between calendars may be relaxed in the solve)
            starts = tuple(self.net.forward(durations))
        objective = _dot(values[: self.lp.num_cols], self.lp._objective_vector())  # (copies add columns)
        return Solution(durations, objective, added,
                        tuple(choices.tolist()) if self.discrete else (), milestone_damages, proven,
                        None if proven else result.bound, None if proven else result.gap, starts)

    def solve(self, objective: Objective, *, target: int | None = None, cap: float | None = None,
              strict: bool = False, duals: bool = False) -> Solution | None:
        """Solve for ``objective`` with finish <= ``target`` and added cost <= ``cap``.

        Returns ``None`` when no plan meets the target and cap. A fractional optimum
        (not expected, see the module notes) is solved again with integer shortening.
        """
        result = self._run(objective, target, cap, strict=strict, duals=duals)
        if result is None:
            return None
        sol = self.solution_of(result.values, result)
        if sol is None:
            shortening = np.concatenate([self.cuts, self.opt_w])
            self.lp.set_integer(shortening, True)
            try:
                result = self._run(objective, target, cap, strict=strict)
            finally:
                self.lp.set_integer(shortening, False)
            sol = None if result is None else self.solution_of(result.values, result)
        self._last = result
        return sol

    # -- the questions -----------------------------------------------------------------
    def shortest_finish(self) -> int:
        """The least finish any plan can reach (the LP's minimum, not a CPM pass at crash)."""
        result = self._run(Objective.FINISH, None, None, aside=True)
        if result is None:  # pragma: no cover - starts >= 0 always leave a solution
            raise SolverError("the acceleration model has no solution at all")
        if result.status != "optimal":
            raise TimeLimitError(f"the solver's time limit ({self.lp.time_limit:g} s) ran out before "
                                 "the shortest possible finish was proven")
        return math.ceil(result.values[self.finish] - _INT_TOL)

    def least_cost(self, target: int, *, tie_break: bool = True, strict: bool = False) -> Solution | None:
        """Least added direct cost to finish by ``target``.

        With ``tie_break``, among the plans of that least cost the one with the fewest
        shortened activities, then the fewest crash days (see :meth:`_fewest_crashed`, and
        :meth:`_fewest_changed_mip` for a MILP).
        With ``strict`` no activity may pass its own deadline. Returns ``None`` when no
        plan meets the target (and, if strict, every deadline).
        """
        best = self.solve(Objective.COST, target=target, strict=strict, duals=tie_break)
        if best is None or not tie_break:
            return best
        if self.lp.is_mip:
            fewer = crash_ties.fewest_changed_mip(self, best, target, strict)
            return best if fewer is None else fewer
        if best.added_cost == 0:
            return best
        fewer = crash_ties.fewest_crashed(self, self._last, target)
        total = best.added_cost + best.milestone_damages
        if fewer is not None and fewer.added_cost + fewer.milestone_damages <= total + 1e-6 * max(1.0, abs(total)):
            return fewer
        return best

    def relaxed_cost(self, target: int) -> float | None:
        """The LP relaxation's least cost at ``target`` (options taken fractionally): a
        lower bound on the MILP optimum. Solved on a copy; ``None`` if infeasible."""
        lm = self.lp.copy()
        lm.col_integer = [False] * lm.num_cols
        lm.use_objective(Objective.COST.value)
        lm.set_col_bounds(self.finish, 0.0, float(target))
        result = lm.solve()
        return None if result.status == "infeasible" else float(result.objective)

    def earliest_finish_within(self, budget: float) -> int:
        """The earliest whole-day finish whose least added cost is within ``budget``.

        The least cost rises with every day taken off, so the LP's earliest finish under
        the budget, rounded up to a whole day, is that finish.
        """
        result = self._run(Objective.FINISH, None, budget + 1e-9 * max(1.0, abs(budget)), aside=True)
        if result is None:  # pragma: no cover - a zero budget allows the normal plan
            raise SolverError("no plan within the budget")
        return math.ceil(result.values[self.finish] - _INT_TOL)
