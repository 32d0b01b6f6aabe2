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

Cost steps must be convex (cost per day not falling from one step to the next); the
LP then takes the cheaper step first by itself.

Activities on calendars of their own: each counts its events in its own working days, so
the rows above hold within one calendar; a link between two calendars (and the project
finish of work on another calendar) is a step function of the predecessor's event and
makes the model a MILP (:meth:`CrashModel._calendar_rows`, :class:`_Relation`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from enum import Enum

import numpy as np

from .errors import HastenError, SolverError
from .network import Network
from .solver_model import INF, LinearModel

__all__ = ["CrashModel", "Objective", "Solution"]

_FS, _SS, _FF, _SF = 0, 1, 2, 3
_INT_TOL = 1e-5  # whole-day test of solver values (HiGHS's MIP tolerances are 1e-6)
#: Branch-and-bound nodes the tie-break of a MILP may search (see _fewest_changed_mip).
TIE_BREAK_NODES = 2000


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
    penalty: float = 0.0  # damages of activities past their own deadlines, as solved
    proven: bool = True  # False when a time limit stopped the solver first
    bound: float | None = None  # proven lower bound on the objective when not proven
    gap: float | None = None  # relative gap when not proven
    starts: tuple[int, ...] | None = None  # the solver's own starts (what is left to schedule)


def _convex(network: Network) -> None:
    for act, steps in zip(network.project.activities, network.steps):
        for a, b in zip(steps, steps[1:]):
            if b.cost_per_day < a.cost_per_day:
                raise HastenError(
                    f"activity {act.id}: crash steps get cheaper ({a.cost_per_day:g} then "
                    f"{b.cost_per_day:g} per day); an LP cannot take them in order. Sort the "
                    "steps by cost per day, or model them as discrete options")


def _minorant(x: np.ndarray, y: np.ndarray) -> list[tuple[int, int, int]]:
    """The lower convex hull of the points ``(x, y)`` (``x`` increasing, whole numbers) as
    rows ``a * Y - b * X >= c`` with whole ``a > 0``, ``b``, ``c``: every point has
    ``Y = y`` on or above each row, and no convex function under the points is higher."""
    hull: list[tuple[int, int]] = []
    for p in zip(x.tolist(), y.tolist()):
        while len(hull) >= 2:
            (x1, y1), (x2, y2) = hull[-2], hull[-1]
            if (x2 - x1) * (p[1] - y1) - (y2 - y1) * (p[0] - x1) <= 0:  # hull[-1] not below the chord
                hull.pop()
            else:
                break
        hull.append(p)
    if len(hull) == 1:
        return [(1, 0, hull[0][1])]
    rows = []
    for (x1, y1), (x2, y2) in zip(hull, hull[1:]):
        a, b = x2 - x1, y2 - y1  # (Y - y1) / (X - x1) >= b / a on this piece
        rows.append((a, b, a * y1 - b * x1))
    return rows


class _Relation:
    """``y >= g(x) + lag`` for a step function ``g`` given by its ``values`` at
    ``x = lo .. hi`` (whole days, nondecreasing), written exactly on a window ``wl .. wh``
    and by valid linear bounds outside it:

    - ``x = lo + d0 + sum_m z_m + dE``, with ``d0`` in ``[0, wl - lo]``, 0/1 columns
      ``z_m`` (``x >= wl + m``) taken in order after ``d0`` is full, and ``dE`` in
      ``[0, hi - wh]`` only when every ``z`` is 1;
    - ``y >= g(wl) - s0 (wl - lo) + s0 d0 + sum_m (g(wl + m) - g(wl + m - 1)) z_m + sE dE + lag``
      with ``s0`` the steepest slope from a point before the window to ``g(wl)`` and ``sE``
      the flattest slope from ``g(wh)`` to a point after it, so the bound is ``g`` on the
      window and below ``g`` elsewhere: a relaxation that is exact wherever ``x`` falls
      in the window. A window that a solve leaves is replaced by a wider one.
    """

    MARGIN = 7  # days each side of the solve's value when a window is made or widened

    def __init__(self, x: int, y: int, lo: int, values, lag: int, who: tuple[int, ...]):
        self.x, self.y, self.lo, self.lag, self.who = x, y, lo, lag, who
        self.values = np.asarray(values, dtype=np.int64)
        self.hi = lo + len(self.values) - 1
        self.window: tuple[int, int] | None = None
        self.rows: list[int] = []

    def g(self, x: int) -> int:
        return int(self.values[x - self.lo])

    def holds(self, values: np.ndarray) -> bool:
        x = int(np.clip(np.rint(values[self.x]), self.lo, self.hi))
        return values[self.y] + _INT_TOL >= self.g(x) + self.lag

    def widen(self, lm: LinearModel, at: int) -> None:
        wl, wh = max(self.lo, at - self.MARGIN), min(self.hi, at + self.MARGIN)
        if self.window is not None:
            wl, wh = min(wl, self.window[0]), max(wh, self.window[1])
        if wh == wl and wh < self.hi:
            wh += 1
        elif wh == wl and wl > self.lo:
            wl -= 1
        for row in self.rows:  # the old window's rows no longer bind
            lm.set_row_bounds(row, -INF, INF)
        self.window, self.rows = (wl, wh), []
        lo, hi = self.lo, self.hi
        g = self.values - self.values[wl - lo]  # g relative to g(wl)
        if lo == hi:
            self.rows.append(lm.add_row([self.y], [1.0], float(self.values[0] + self.lag), INF))
            return
        rel = np.arange(lo, hi + 1)
        s0 = float(np.max(-g[: wl - lo] / (wl - rel[: wl - lo]))) if wl > lo else 0.0
        sE = float(np.min((g[wh - lo + 1:] - g[wh - lo]) / (rel[wh - lo + 1:] - wh))) if wh < hi else 0.0
        d0 = lm.add_columns([0.0], float(wl - lo))[0]
        z = lm.add_columns(np.zeros(wh - wl), 1.0, integer=True)
        dE = lm.add_columns([0.0], float(hi - wh))[0]
        rise = np.diff(g[wl - lo: wh - lo + 1]).astype(float)
        cols = np.concatenate([[self.x, d0], z, [dE]])
        self.rows.append(lm.add_row(cols, np.concatenate([[1.0, -1.0], -np.ones(len(z)), [-1.0]]),
                                    float(lo), float(lo)))
        base = float(self.values[wl - lo]) - s0 * (wl - lo) + self.lag
        cols = np.concatenate([[self.y, d0], z, [dE]])
        self.rows.append(lm.add_row(cols, np.concatenate([[1.0, -s0], -rise, [-sE]]), base, INF))
        if len(z):
            self.rows.append(lm.add_row([d0, z[0]], [1.0, -float(wl - lo)], 0.0, INF))  # d0 full first
            self.rows.append(lm.add_row([dE, z[-1]], [1.0, -float(hi - wh)], -INF, 0.0))  # dE after all z
            if len(z) > 1:
                m = len(z) - 1
                index = np.empty(2 * m, dtype=np.int64)
                index[0::2], index[1::2] = z[1:], z[:-1]
                first = lm.add_rows(np.arange(0, 2 * m, 2), index, np.tile([1.0, -1.0], m), -INF, 0.0)
                self.rows.extend(np.asarray(first).tolist())


class CrashModel:
    """Least-cost acceleration model for one network.

    >>> model = CrashModel(network)            # doctest: +SKIP
    >>> model.shortest_finish()                # the LP's minimum finish
    >>> model.least_cost(120)                  # least added cost to finish by day 120
    """

    def __init__(self, network: Network, *, solver: str | None = None,
                 time_limit: float | None = None):
        _convex(network)
        self.net = network
        lm = LinearModel(solver=solver, time_limit=time_limit)
        self.lp = lm
        release = np.asarray(network.release, dtype=float)
        self.start = lm.add_columns(release, np.where(network.fixed, release, INF))
        self.end = lm.add_columns(np.asarray(network.finish_release, dtype=float), INF)
        self.finish = int(lm.add_columns([0.0], INF)[0])
        self.horizon_finish: int | None = None  # latest finish modelled (several calendars)
        self._relations: list[_Relation] = []  # relations between calendars (see _calendar_rows)
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
        self._penalty_columns(network)
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

    def _penalty_columns(self, net: Network) -> None:
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
            self._deadlines.append((i, clock, act, limit))
            # A deadline before the first working day (limit <= 0) is missed even at offset
            # 0: the steps then start from a virtual offset -1 that costs nothing.
            limit = limit if limit > 0 else -1
            g = [act.damages_per_day * max(0, (clock.project_finish_date(f) - act.deadline).days)
                 if f >= 0 else 0.0 for f in range(limit, horizon + 1)]
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
            self._calendar_rows(net, np.flatnonzero(cross), later, earlier, implied)
            implied |= cal != 0  # (their finish rows are steps too)
        free = np.flatnonzero(~implied)
        index = np.empty(2 * len(free), dtype=np.int64)
        index[0::2], index[1::2] = self.end[free], self.finish
        lm.add_rows(np.arange(0, 2 * len(free), 2), index, np.tile([1.0, -1.0], len(free)),
                    -INF, 0.0)

    def _calendar_rows(self, net: Network, cross: np.ndarray, later: np.ndarray, earlier: np.ndarray,
                       implied: np.ndarray) -> None:
        """Links between two calendars, and the project finish of work on a calendar of
        its own: ``y >= g(x) + lag`` where ``g`` converts a position of one calendar to the
        next position of another (:class:`hasten.calendar.Timeline`), a step function.

        Each starts as its convex minorant over the values ``x`` can take (a few rows
        ``y >= a x + b`` under the steps, :func:`_minorant`): a relaxation. After a solve,
        the durations are scheduled exactly (:meth:`_holds`); if that schedule meets
        everything the solve promised, the plan is optimal. Otherwise the relations the
        solve broke are made exact on a window of days around the solve's value
        (:class:`_Relation`) and the model is solved again; a window grows when a later
        solve leaves it. The event and shortening columns are integer (whole days).
        """
        lm, timeline = self.lp, net.timeline
        lm.set_integer(np.concatenate([self.start, self.end, self.cuts]), True)
        lo_s, lo_f, hi_s, hi_f = self._event_bounds(net)
        pred, succ, kind, lag = net.pred, net.succ, net.kind, net.lag
        rel = []
        for e in cross.tolist():
            i, j, k = pred[e], succ[e], kind[e]
            lo, hi = (lo_f[i], hi_f[i]) if k in (_FS, _FF) else (lo_s[i], hi_s[i])
            values = timeline.convert(net.cal[i], net.cal[j], np.arange(lo, max(hi, lo) + 1), k)
            rel.append(_Relation(int(earlier[e]), int(later[e]), int(lo), values, lag[e], (i, j)))
        for i in np.flatnonzero(~implied & (np.asarray(net.cal) != 0)).tolist():
            values = timeline.to_project(net.cal[i], np.arange(lo_f[i], max(hi_f[i], lo_f[i]) + 1))
            rel.append(_Relation(int(self.end[i]), self.finish, int(lo_f[i]), values, 0, (i,)))
        for r in rel:
            lm.set_col_bounds(r.x, float(r.lo), float(r.hi))
            for a, b, c in _minorant(np.arange(r.lo, r.hi + 1), r.values):
                lm.add_row([r.y, r.x], [float(a), float(-b)], float(c + a * r.lag), INF)  # a y - b x >= c + a lag
        self._relations = rel

    def _refine(self, values: np.ndarray, late: np.ndarray | None) -> int:
        """Make exact around the solve's values the relations that ``values`` break, first
        those among the activities ``late`` marks (negative float when the plan's durations
        are scheduled exactly against the promised finish); returns how many."""
        broken = [r for r in self._relations if not r.holds(values)]
        if late is not None:
            broken = [r for r in broken if all(late[k] for k in r.who)] or broken
        for r in broken:
            r.widen(self.lp, int(np.clip(np.rint(values[r.x]), r.lo, r.hi)))
        return len(broken)

    def _holds(self, result, objective: Objective, target: int | None, strict: bool):
        """Whether the durations of ``result``, scheduled exactly at their early dates,
        finish as early and cost as little in milestone damages as the solve promised;
        and, when they finish later, which activities have negative float in that
        schedule against the promised finish (else ``None``)."""
        sol = self._solution(result.values, result)
        if sol is None:
            return False, None
        d = list(sol.durations)
        es = self.net.forward(d)
        finish = self.net.finish_of(es, d)
        promised = math.ceil(result.values[self.finish] - _INT_TOL)
        if objective is Objective.COST and target is not None:
            promised = min(target, self.horizon_finish) if self.horizon_finish is not None else target
        if finish > promised:
            late = np.asarray(self.net.backward(d, promised)) < np.asarray(es)
            return False, late
        damages = 0.0
        for i, clock, act, limit in self._deadlines:
            f = es[i] + d[i]
            if strict and f > limit:
                return False, None
            damages += act.damages_per_day * max(0, (clock.project_finish_date(f) - act.deadline).days)
        return damages <= sol.penalty + 1e-6 * max(1.0, abs(damages)), None

    def _event_bounds(self, net: Network):
        """Least and greatest start and finish of each activity over every plan that
        finishes by the horizon (durations anywhere between shortest and longest)."""
        n = len(net)
        dmin = np.asarray(net.shortest, dtype=np.int64)
        dmax = np.asarray([max([d] + [o.duration for o in opts]) for d, opts in zip(net.durations, net.options)],
                          dtype=np.int64)
        lo_s = np.asarray(net.release, dtype=np.int64).copy()
        lo_f = np.asarray(net.finish_release, dtype=np.int64).copy()
        for j in net.order:
            if net.fixed[j]:
                lo_s[j], lo_f[j] = net.release[j], net.release[j] + net.durations[j]
                continue
            for e in net.in_links[j]:
                i, k = net.pred[e], net.kind[e]
                at = lo_f[i] if k in (_FS, _FF) else lo_s[i]
                bound = net._convert(i, j, int(at), k) + net.lag[e]
                if k in (_FS, _SS):
                    lo_s[j] = max(lo_s[j], bound)
                else:
                    lo_f[j] = max(lo_f[j], bound)
            lo_f[j] = max(lo_f[j], lo_s[j] + dmin[j])
            lo_s[j] = max(lo_s[j], lo_f[j] - dmax[j])
        self.horizon_finish = horizon = max(net.forward_finish(), net.forward_finish(dmax.tolist()),
                                            net.finish_of(lo_s.tolist(), [0] * n), net.finish_of(lo_f.tolist(), [0] * n))
        hi_f = np.asarray(net.latest_finish(horizon), dtype=np.int64)
        hi_s = hi_f - dmin
        for i in reversed(net.order):
            if net.fixed[i]:
                hi_s[i], hi_f[i] = net.release[i], net.release[i] + net.durations[i]
                continue
            for e in net.out_links[i]:
                j, k = net.succ[e], net.kind[e]
                x = (hi_s[j] if k in (_FS, _SS) else hi_f[j]) - net.lag[e]
                bound = net._latest(i, j, int(x), k)
                if k in (_FS, _FF):
                    hi_f[i] = min(hi_f[i], bound)
                else:
                    hi_s[i] = min(hi_s[i], bound)
            hi_s[i] = min(hi_s[i], hi_f[i] - dmin[i])
            hi_f[i] = min(hi_f[i], hi_s[i] + dmax[i])
        return lo_s, lo_f, np.maximum(hi_s, lo_s), np.maximum(hi_f, lo_f)

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
            if result is None or not self._relations:
                return result
            holds, late = self._holds(result, objective, target, strict)
            if holds or not self._refine(result.values, late):
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
            raise SolverError("the time limit ran out before any plan was found; "
                              "allow more time with --time-limit")
        return result

    def _solution(self, values: np.ndarray, result=None) -> Solution | None:
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
        added = float(y @ self.cut_cost + x @ self.opt_cost + w @ self.w_cost)
        late = values[self.late]
        late = np.where(np.abs(late - np.rint(late)) <= _INT_TOL, np.rint(late), late)
        penalty = float(late @ self.late_cost) if len(self.late) else 0.0
        proven = result is None or result.status == "optimal"
        s = values[self.start]
        starts = tuple(np.rint(s).astype(np.int64).tolist()) if np.all(np.abs(s - np.rint(s)) <= _INT_TOL) else None
        if self.net.several:  # (relations between calendars may be relaxed in the solve)
            starts = tuple(self.net.forward(durations))
        objective = float(values[: self.lp.num_cols] @ self.lp._objective_vector())  # (copies add columns)
        return Solution(durations, objective, added,
                        tuple(choices.tolist()) if self.discrete else (), penalty, proven,
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
        sol = self._solution(result.values, result)
        if sol is None:
            shortening = np.concatenate([self.cuts, self.opt_w])
            self.lp.set_integer(shortening, True)
            try:
                result = self._run(objective, target, cap, strict=strict)
            finally:
                self.lp.set_integer(shortening, False)
            sol = None if result is None else self._solution(result.values, result)
        self._last = result
        return sol

    # -- the questions -----------------------------------------------------------------
    def shortest_finish(self) -> int:
        """The least finish any plan can reach (the LP's minimum, not a CPM pass at crash)."""
        result = self._run(Objective.FINISH, None, None, aside=True)
        if result is None:  # pragma: no cover - starts >= 0 always leave a solution
            raise SolverError("the acceleration model has no solution at all")
        if result.status != "optimal":
            raise SolverError("the time limit ran out before the shortest possible finish was "
                              "proven; allow more time with --time-limit")
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
            fewer = self._fewest_changed_mip(best, target, strict)
            return best if fewer is None else fewer
        if best.added_cost == 0:
            return best
        fewer = self._fewest_crashed(self._last, target)
        total = best.added_cost + best.penalty
        if fewer is not None and fewer.added_cost + fewer.penalty <= total + 1e-6 * max(1.0, abs(total)):
            return fewer
        return best

    def _changes(self, sol: Solution) -> tuple[int, int]:
        """(activities changed: shortened or by an option, working days taken off in all)."""
        normal = self.net.durations
        changed = sum(1 for k, (d, n) in enumerate(zip(sol.durations, normal))
                      if d != n or (sol.choices and sol.choices[k] >= 0))
        return changed, sum(n - d for d, n in zip(sol.durations, normal))

    def _fewest_changed_mip(self, best: Solution, target: int, strict: bool) -> Solution | None:
        """The tie-break of a MILP (discrete options, several calendars): among plans
        costing no more than ``best`` (acceleration and milestone damages), the one that
        changes the fewest activities (shortened, or performed by an option), then takes
        the fewest working days off. A second MILP on a copy, with the cost held by a row
        and 0/1 "changed" columns; ``None`` when it finds nothing better or its plan does
        not hold exactly (relations between calendars are relaxed in the copy)."""
        if not best.proven or self._changes(best)[0] == 0:
            return None
        n = len(self.net)
        lm = self.lp.copy()
        cols, coefs = self.lp.objectives[Objective.COST.value]
        total = best.added_cost + best.penalty
        lm.add_row(cols, coefs, -INF, total + 1e-6 * max(1.0, abs(total)))
        owners = np.unique(np.concatenate([self.cut_owner, self.opt_owner]))
        z = lm.add_columns(np.zeros(len(owners)), 1.0, integer=True)
        z_of = np.full(n, -1, dtype=np.int64)
        z_of[owners] = z
        days = np.asarray(lm.col_upper, dtype=float)[self.cuts]
        m = len(self.cuts)
        if m:  # a shortening day only if the activity counts as changed
            index = np.empty(2 * m, dtype=np.int64)
            index[0::2], index[1::2] = self.cuts, z_of[self.cut_owner]
            value = np.empty(2 * m)
            value[0::2], value[1::2] = 1.0, -days
            lm.add_rows(np.arange(0, 2 * m, 2), index, value, -INF, 0.0)
        k = len(self.opt_x)
        if k:  # an option only if the activity counts as changed
            index = np.empty(2 * k, dtype=np.int64)
            index[0::2], index[1::2] = self.opt_x, z_of[self.opt_owner]
            lm.add_rows(np.arange(0, 2 * k, 2), index, np.tile([1.0, -1.0], k), -INF, 0.0)
        # days taken off: shortening columns, option duration changes, an option's own days
        day_cols = np.concatenate([self.cuts, self.opt_x, self.opt_w])
        day_coef = np.concatenate([np.ones(m), self.opt_delta, np.ones(len(self.opt_w))])
        weight = float(np.abs(days).sum() + np.abs(self.opt_delta).sum() + self.w_room.sum()) + 1.0
        lm.define_objective("fewest_changed", np.concatenate([z, day_cols]),
                            np.concatenate([np.full(len(z), weight), day_coef]))
        lm.use_objective("fewest_changed")
        if self.horizon_finish is not None:
            target = min(target, self.horizon_finish)
        lm.set_col_bounds(self.finish, 0.0, float(target))
        lm.set_row_bounds(self.cost_cap, -INF, INF)
        if len(self.late):
            lm.set_cols_bounds(self.late, 0.0, 0.0 if strict else 1.0)
        # Only a proven tie-break is used, so that the same input gives the same plan: the
        # search is bounded by a number of nodes (the same on every run), and by time only
        # as a last resort. Stopped early, the plan stays the least-cost one first found.
        lm.node_limit = TIE_BREAK_NODES
        if lm.time_limit is None:
            lm.time_limit = 30.0
        out = lm.solve()
        if out.values is None or out.status != "optimal":
            return None
        values = out.values[: self.lp.num_cols]
        sol = self._solution(values, out)
        if sol is None or self._changes(sol) >= self._changes(best):
            return None
        if self._relations and not self._holds(out, Objective.COST, target, strict)[0]:
            return None
        return replace(sol, objective=best.objective, proven=True, bound=None, gap=None)

    def _fewest_crashed(self, result, target: int) -> Solution | None:
        """Among the least-cost plans, the one shortening the fewest activities, then
        the fewest days.

        The least-cost plans form the optimal face of the LP: fix every column with a
        non-zero reduced cost at its value and every row with a non-zero dual at its
        bound (complementary slackness), and any plan left costs the least. Over that
        face a small MILP counts shortened activities. Needs duals (HiGHS); returns
        ``None`` when there is no choice to make or the solver gives no duals.
        """
        if result is None or result.col_dual is None:
            return None
        tol = 1e-7
        free = np.abs(result.col_dual[self.cuts]) <= tol
        if not free.any() or not np.any(result.values[self.cuts[free]] > tol):
            # every shortening this plan uses is forced on all least-cost plans (fixed by
            # its reduced cost) and the others are unused: nothing to improve
            return None
        values = result.values
        cols = np.flatnonzero(np.abs(result.col_dual) > tol)
        rows = np.flatnonzero(np.abs(result.row_dual) > tol)
        full = self.lp.copy()  # leave the live model and its warm start alone
        rlow, rup = np.asarray(full.row_lower)[rows], np.asarray(full.row_upper)[rows]
        act = result.row_values[rows]
        at = np.where(np.abs(act - rlow) <= np.abs(act - rup), rlow, rup)
        full.set_rows_bounds(rows, at, at)
        # only the face is searched: fixed columns are taken out of a small model
        lm, keep = full.reduced(cols, values[cols])
        where = np.full(self.lp.num_cols, -1, dtype=np.int64)
        where[keep] = np.arange(len(keep))
        # one 0/1 column per activity free to change on the face: "it is shortened"
        owners = np.unique(self.cut_owner[free])
        room = np.bincount(self.cut_owner, weights=np.asarray(self.lp.col_upper)[self.cuts],
                           minlength=len(self.net))[owners]
        z = lm.add_columns(np.zeros(len(owners)), 1.0, integer=True)
        free_cuts = self.cuts[free]
        terms: dict[int, list[tuple[int, float]]] = {int(o): [(int(z[k]), -float(room[k]))]
                                                     for k, o in enumerate(owners)}
        for col, owner in zip(free_cuts.tolist(), self.cut_owner[free].tolist()):
            terms[owner].append((int(where[col]), 1.0))
        index = [c for o in owners.tolist() for c, _ in terms[o]]
        value = [v for o in owners.tolist() for _, v in terms[o]]
        starts = np.concatenate([[0], np.cumsum([len(terms[o]) for o in owners.tolist()])[:-1]])
        lm.add_rows(starts, index, value, -INF, 0.0)
        lm.set_integer(where[free_cuts], True)
        weight = float(room.sum()) + 1.0  # one activity more outweighs any number of days
        lm.define_objective("fewest_crashed", np.concatenate([z, where[free_cuts]]),
                            np.concatenate([np.full(len(z), weight), np.ones(len(free_cuts))]))
        lm.use_objective("fewest_crashed")
        if lm.time_limit is None:
            lm.time_limit = 10.0
        out = lm.solve()
        if out.values is None or out.status not in ("optimal", "stopped"):
            return None
        back = values.copy()
        back[keep] = out.values[: len(keep)]
        return self._solution(back, out)

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
