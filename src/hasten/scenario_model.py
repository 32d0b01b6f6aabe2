"""The crash model with one copy of the schedule per sampled scenario (sample-average
approximation), for plans chosen for risk (:mod:`hasten.robust`).

**The model.** Shared by every scenario (first stage): the days shortened ``y`` (per crash
step, whole days), the discrete options ``x`` (0/1) and an option's own days ``w``, as in
:mod:`hasten.crash_model`; ``S_i = sum y_i + sum (D_i - d_o) x_io + sum w_io`` are the days
taken off activity ``i``. Each scenario ``k`` of ``N`` has its own starts ``s_k``, ends
``f_k`` and finish ``T_k``::

    f_ik - s_ik + S_i = D_ik          (D_ik: the working days drawn for i in scenario k)
    links as in the crash model, within each scenario;  f_ik - T_k <= 0

so a plan takes the same whole days off every scenario's drawn duration. It may not take so
many that some scenario's duration would fall below one working day (or below the shortest
duration, where that is less than a day): ``S_i <= min_k D_ik - 1``.

- **confidence** ``c`` with a target ``t``: one 0/1 column ``z_k`` per scenario ("this
  scenario may miss"), ``T_k - M_k z_k <= t`` with ``M_k`` a bound on ``T_k`` less ``t``, and
  ``sum z_k <= floor((1 - c) N)``; least added cost plus the average damages of interim
  milestones (the deterministic plan counts them too);
- **expected**: least added cost plus the average over the scenarios of the time costs of
  ``T_k`` (indirect per working day, damages and bonus per calendar day) and the milestone
  damages.

Time costs and milestone damages are step functions of a finish in whole working days (a
weekend makes one working day three calendar days), written per scenario as columns "late
by at least j days" taken in order, as the crash model writes milestone damages.

**How it is solved.** Written whole, the copies make ``N`` times the crash model's rows, and
a mixed-integer program of that size is slow. Given the first-stage columns, the least
``T_k`` is the finish of the early-start schedule of scenario ``k``, the longest path of
its event graph: a sum of durations (some with a minus sign: an FF or SF link counts back
from the successor's finish) and lags. So the scenario rows are projected out and only the
paths that bind are kept, as rows on the first-stage columns::

    sum_i a_i (D_ik - S_i) + lags <= t + M z_k      (confidence)     ... <= T_k  (expected)

with ``M`` the path's own greatest value over all plans less ``t`` (a tighter big M than the
scenario's, so a stronger relaxation).

Starting from the longest paths of the normal plan, each solve's plan is scheduled in every
scenario with the CPM passes; a scenario whose finish breaks its rows gets the path that
made it late, and the model is solved again, first with the integer columns relaxed, then
exact (Kelley's cutting planes, *J. SIAM* 8(4), 1960; the paths as Benders cuts, Benders,
*Numerische Mathematik* 4, 1962; both from memory). Step columns whose order is not convex
are made 0/1 only where the relaxed cost falls below the true one at the solution. When no
scenario breaks a row and every cost is true, the plan is optimal for the whole model: the
rows kept are a relaxation, and its optimum is feasible for all of them.

Calendars of their own are not modelled here (the links between calendars are step
functions of each scenario): such a project is refused.
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass, replace

import numpy as np

from .errors import HastenError, SolverError, TimeLimitError
from .network import Network
from .progress import end_day
from .scenario_paths import ScenarioPaths, finish_bounds
from .solver_model import INF, LinearModel
from .time_costs import time_costs

__all__ = ["ScenarioModel", "ScenarioSolution", "EXACT_SECONDS", "ONE_CALENDAR"]

_TOL = 1e-6
_ROUNDS = 400  # solves of one question at most (each adds the paths that bind)
#: Seconds the exact search of non-convex step costs may take before the better plan found
#: is returned with its gap (see ScenarioModel.solve).
EXACT_SECONDS = 30.0
ONE_CALENDAR = ("plans chosen for risk (--confidence, --expected) need one calendar for all the work; this "
                "project has activities on calendars of their own. Simulate a plan instead: hasten risk "
                "PROJECT --plan plan.json")


@dataclass(frozen=True)
class ScenarioSolution:
    """A plan chosen over the scenarios: durations (network order), options (-1: normal),
    the added direct cost, the objective (added cost plus the averaged costs modelled) and
    whether the solver proved it optimal."""

    durations: tuple[int, ...]
    choices: tuple[int, ...]
    added_cost: float
    objective: float
    proven: bool = True
    gap: float | None = None


@dataclass
class _Steps:
    """Step columns "at least j days past ``limit``" of one event of one scenario; ``gates``:
    a column per convex run of steps after the first, "this run is begun"."""

    cols: np.ndarray
    costs: np.ndarray
    limit: int
    gates: np.ndarray
    scenario: int
    activity: int  # whose end it is; -1: the project finish
    integer: bool = False

    def cost(self, event: float) -> float:
        """The true cost of the event at ``event`` (a whole day), above the cost at ``limit``."""
        return float(self.costs[: max(0, int(round(event)) - self.limit)].sum())


class ScenarioModel:
    """The sample-average crash model over scenario durations ``drawn`` (scenarios x
    activities, whole working days still to do, network order); see the module notes.

    ``target`` and ``confidence`` ask for the least-cost plan meeting the target in at
    least that share of the scenarios; ``expected=True`` for the plan with the least
    added cost plus average time costs.
    """

    def __init__(self, network: Network, drawn: np.ndarray, *, target: int | None = None,
                 confidence: float | None = None, expected: bool = False, solver: str | None = None,
                 time_limit: float | None = None):
        if network.several:
            raise HastenError(ONE_CALENDAR)
        if confidence is not None and target is None:
            raise HastenError("a confidence needs a target")
        self.net = net = network
        self.drawn = np.asarray(drawn, dtype=np.int64)
        self.runs, self.n = self.drawn.shape
        self.target, self.confidence, self.expected = target, confidence, expected
        self.lp = LinearModel(solver=solver, time_limit=time_limit)
        self._shared_columns()
        normal = np.asarray(net.durations, dtype=np.int64)
        shortest = np.asarray(net.shortest, dtype=np.int64)
        longest = np.asarray([max([d] + [o.duration for o in opts]) for d, opts in zip(net.durations, net.options)])
        floor = np.minimum(1, shortest)
        room = self.drawn.min(axis=0) - floor  # most days a plan may take off (see the module notes)
        for i in np.flatnonzero(room < normal - shortest).tolist():
            cols, coefs = self.shortening_terms[i]
            if room[i] < 0:
                raise HastenError(f"activity {net.ids[i]} is drawn shorter than it may take in some scenario")
            self.lp.add_row(cols, coefs, -INF, float(room[i]))
        self.s_least = np.minimum(normal - longest, 0).astype(float)  # a slower option: negative days
        self.s_most = np.minimum(normal - shortest, np.maximum(room, 0)).astype(float)
        low = np.maximum(self.drawn.T - (normal - shortest)[:, None], floor[:, None])
        high = self.drawn.T + np.maximum(longest - normal, 0)[:, None]
        self.least_end, self.greatest_end = finish_bounds(net, low, high)
        self.paths = ScenarioPaths(net)
        self.steps: list[_Steps] = []
        self.cost_cols = np.concatenate([self.cuts, self.opt_x, self.opt_w])
        self.cost_coef = np.concatenate([self.cut_cost, self.opt_cost, self.w_cost])
        self._objective = [(self.cost_cols, self.cost_coef)]
        self.time_base = 0.0  # the averaged costs at the least finishes (constant)
        self._events()
        self.lp.define_objective("risk", np.concatenate([c for c, _ in self._objective]),
                                 np.concatenate([v for _, v in self._objective]))
        self.lp.use_objective("risk")
        self._seen: set = set()

    # -- first stage -------------------------------------------------------------------
    def _shared_columns(self) -> None:
        net, lm = self.net, self.lp
        owner, days, per_day = [], [], []
        for i, steps in enumerate(net.steps):
            for a, b in zip(steps, steps[1:]):
                if b.cost_per_day < a.cost_per_day:
                    raise HastenError(f"activity {net.ids[i]}: crash steps get cheaper from one step to the "
                                      "next; sort them by cost per day, or model them as discrete options")
            for step in steps:
                owner.append(i)
                days.append(step.days)
                per_day.append(step.cost_per_day)
        self.cut_owner = np.asarray(owner, dtype=np.int64)
        self.cut_cost = np.asarray(per_day, dtype=float)
        self.cuts = lm.add_columns(np.zeros(len(owner)), np.asarray(days, dtype=float), integer=True)
        o_owner, o_index, o_delta, o_cost, w_of, w_room, w_cost = [], [], [], [], [], [], []
        for i, options in enumerate(net.options):
            for k, opt in enumerate(options):
                o_owner.append(i)
                o_index.append(k)
                o_delta.append(net.durations[i] - opt.duration)
                o_cost.append(opt.added_cost)
                if opt.shortest < opt.duration:
                    w_of.append(len(o_owner) - 1)
                    w_room.append(opt.duration - opt.shortest)
                    w_cost.append(opt.cost_per_day)
        self.opt_owner = np.asarray(o_owner, dtype=np.int64)
        self.opt_index = np.asarray(o_index, dtype=np.int64)
        self.opt_cost = np.asarray(o_cost, dtype=float)
        self.opt_x = lm.add_columns(np.zeros(len(o_owner)), 1.0, integer=True)
        self.w_of = np.asarray(w_of, dtype=np.int64)
        self.w_room = np.asarray(w_room, dtype=float)
        self.w_cost = np.asarray(w_cost, dtype=float)
        self.opt_w = lm.add_columns(np.zeros(len(w_of)), self.w_room, integer=True)
        terms: list[tuple[list[int], list[float]]] = [([], []) for _ in range(self.n)]
        for col, i in zip(self.cuts.tolist(), owner):
            terms[i][0].append(col)
            terms[i][1].append(1.0)
        for col, i, dl in zip(self.opt_x.tolist(), o_owner, o_delta):
            terms[i][0].append(col)
            terms[i][1].append(float(dl))
        for col, o in zip(self.opt_w.tolist(), w_of):
            terms[o_owner[o]][0].append(col)
            terms[o_owner[o]][1].append(1.0)
        self.shortening_terms = terms  # the days S_i taken off activity i, as (columns, coefficients)
        by_act: dict[int, list[int]] = {}
        for col, i in zip(self.opt_x.tolist(), o_owner):
            by_act.setdefault(i, []).append(col)
        upper = np.asarray(lm.col_upper)
        for i, cols in by_act.items():  # as in the crash model: one option at most, and alone
            if len(cols) > 1:
                lm.add_row(cols, [1.0] * len(cols), -INF, 1.0)
            mine = self.cuts[self.cut_owner == i]
            room = float(upper[mine].sum()) if len(mine) else 0.0
            if room > 0:
                lm.add_row(list(mine) + cols, [1.0] * len(mine) + [room] * len(cols), -INF, room)
        for w, o, r in zip(self.opt_w.tolist(), w_of, w_room):
            lm.add_row([w, int(self.opt_x[o])], [1.0, -r], -INF, 0.0)

    def shortening(self, values: np.ndarray) -> np.ndarray:
        """The days ``S_i`` taken off each activity by the column values."""
        out = np.zeros(self.n)
        for i, (cols, coefs) in enumerate(self.shortening_terms):
            if cols:
                out[i] = float(np.dot(values[cols], coefs))
        return out

    # -- second stage: events, their costs and the confidence ---------------------------
    def _events(self) -> None:
        net, lm, runs = self.net, self.lp, self.runs
        least = self.least_end.max(axis=0, initial=0)
        greatest = self.greatest_end.max(axis=0, initial=0)
        self.greatest = greatest
        self.z = np.full(runs, -1, dtype=np.int64)  # "scenario k may miss" (confidence)
        if self.confidence is not None:
            self.may_miss = math.floor((1.0 - self.confidence) * runs + 1e-9)
            late = np.flatnonzero(greatest > self.target)  # the others meet it whatever the plan
            if len(late):
                self.z[late] = lm.add_columns(np.zeros(len(late)), 1.0, integer=True)
                lm.add_row(self.z[late], np.ones(len(late)), -INF, float(self.may_miss))
        self.finish = np.full(runs, -1, dtype=np.int64)  # T_k (expected)
        if self.expected:
            project, clock, floor = net.project, net.clock, net.finish_floor
            self.finish = lm.add_columns(least.astype(float), INF)
            for k in range(runs):
                lo, hi = int(least[k]), int(greatest[k])
                values = [time_costs(project, clock, t, floor=floor).net for t in range(lo, hi + 1)]
                self.time_base += values[0] / runs
                self._add_steps(int(self.finish[k]), lo, values, k, -1)
        self.watched: list[tuple[int, np.ndarray]] = []  # (activity, its end column per scenario)
        for i, act in enumerate(net.project.activities):
            if act.deadline is None or not act.damages_per_day or net.fixed[i]:
                continue
            clock, state = net.timeline.clock_of(i), net.progress.activities[i]
            limit = clock.offset_of(act.deadline, finish=True)
            limit = limit if limit > state.floor else state.floor - 1
            cols = lm.add_columns(self.least_end[i].astype(float), INF)
            self.watched.append((i, cols))
            for k in range(runs):
                top = int(self.greatest_end[i, k])
                if top > limit:
                    values = [act.damages_per_day * max(0, (clock.date_of(end_day(state, f)) - act.deadline).days)
                              if f >= state.floor else 0.0 for f in range(limit, top + 1)]
                    self._add_steps(int(cols[k]), limit, values, k, i)

    def _add_steps(self, col: int, limit: int, values: list[float], scenario: int, activity: int) -> None:
        """Columns "at least j days past ``limit``" for the event column ``col``, whose cost at
        ``limit + j`` is ``values[j]``; the row ``col - sum b <= limit``.

        Steps that never get cheaper are taken in order by the LP itself. Otherwise the steps
        are cut into runs that never get cheaper (a week, say), and each run after the first
        has a gate column: its steps only when the gate is open, the gate only when the last
        (dearest) step of the run before is taken (the incremental formulation of a piecewise
        linear cost, Dantzig, *Econometrica* 28(1), 1960, from memory; locally ideal: Padberg,
        *Operations Research Letters* 27(1), 2000, from memory). Gates are made 0/1 only where
        the relaxed cost falls below the true one (see :meth:`_separate`)."""
        lm = self.lp
        costs = np.diff(np.asarray(values, dtype=float))
        if not len(costs):
            return
        b = lm.add_columns(np.zeros(len(costs)), 1.0)
        lm.add_row(np.concatenate([[col], b]), np.concatenate([[1.0], -np.ones(len(b))]), -INF, float(limit))
        cheaper = np.flatnonzero(np.diff(costs) < -_TOL) + 1  # where a new run begins
        gates = lm.add_columns(np.zeros(len(cheaper)), 1.0)
        bounds = np.concatenate([[0], cheaper, [len(costs)]])
        for g, (z, c) in enumerate(zip(bounds[1:-1], bounds[2:])):
            gate = int(gates[g])
            run = b[z:c]
            index = np.empty(2 * len(run), dtype=np.int64)
            index[0::2], index[1::2] = run, gate
            lm.add_rows(np.arange(0, len(index), 2), index, np.tile([1.0, -1.0], len(run)), -INF, 0.0)
            lm.add_row([gate, int(b[z - 1])], [1.0, -1.0], -INF, 0.0)  # the run before taken whole
        self.steps.append(_Steps(b, costs, limit, gates, scenario, activity, not len(gates)))
        self._objective.append((b, costs / self.runs))

    # -- the paths that bind -----------------------------------------------------------
    def _cut(self, k: int, a: dict[int, int], const: float, event: int, coef: float, rhs: float) -> bool:
        """The row ``sum_i a_i (D_ik - S_i) + const - coef * event <= rhs``; False if known."""
        key = (k, event, tuple(sorted(a.items())), const)
        if key in self._seen:
            return False
        self._seen.add(key)
        cols, vals = [], []
        fixed = const
        for i, ai in a.items():
            if ai:
                fixed += ai * float(self.drawn[k, i])
                c, v = self.shortening_terms[i]
                cols += c
                vals += [-ai * x for x in v]
        if event >= 0:
            cols.append(event)
            vals.append(-coef)
        self.lp.add_row(cols, vals, -INF, rhs - fixed)
        return True

    def _longest(self, k: int, a: dict[int, int], const: float) -> float:
        """The greatest value the path ``a`` of scenario ``k`` takes over all plans: each
        duration at its longest where it counts forward, at its shortest where backward."""
        total = const
        for i, ai in a.items():
            total += ai * (float(self.drawn[k, i]) - (self.s_least[i] if ai > 0 else self.s_most[i]))
        return total

    def _separate(self, values: np.ndarray) -> int:
        """Rows for the paths the solution ``values`` breaks; how many were added. With
        ``self.exact`` also the gates that must be 0/1 (see :meth:`_add_steps`)."""
        d = self.drawn.T - self.shortening(values)[:, None]
        es, why = self.paths.forward(d)
        ef = es + d
        end = ef.max(axis=0)
        self._ends = (ef, end)
        last = ef.argmax(axis=0)
        added = 0
        for k in range(self.runs):
            if self.z[k] >= 0 and end[k] > self.target + _TOL:
                a, const = self.paths.path(why, k, int(last[k]))
                big = self._longest(k, a, const) - self.target  # the path's own M
                if not self.lp.is_mip or end[k] > self.target + big * values[self.z[k]] + _TOL:
                    added += self._cut(k, a, const, int(self.z[k]), big, float(self.target))
            if self.finish[k] >= 0 and end[k] > values[self.finish[k]] + _TOL:
                a, const = self.paths.path(why, k, int(last[k]))
                added += self._cut(k, a, const, int(self.finish[k]), 1.0, 0.0)
            for i, cols in self.watched:
                if ef[i, k] > values[cols[k]] + _TOL:
                    a, const = self.paths.path(why, k, i)
                    added += self._cut(k, a, const, int(cols[k]), 1.0, 0.0)
        if added or not self.exact:
            return added
        for group in self.steps:  # a relaxed cost below the true one: the gates left open by half
            if group.integer:
                continue
            event = end[group.scenario] if group.activity < 0 else ef[group.activity, group.scenario]
            if float(np.dot(values[group.cols], group.costs)) < group.cost(event) - _TOL * max(1.0, group.costs.sum()):
                gate = values[group.gates]
                split = group.gates[(gate > _TOL) & (gate < 1 - _TOL)]
                self.lp.set_integer(split if len(split) else group.gates, True)
                group.integer = bool(np.all(np.asarray(self.lp.col_integer)[group.gates]))
                added += 1
        return added

    def true_objective(self, values: np.ndarray) -> float:
        """The objective of the plan in ``values`` with every step cost taken at its true value
        (after :meth:`_separate` has scheduled it)."""
        ef, end = self._ends
        total = float(np.dot(np.rint(values[self.cost_cols]), self.cost_coef)) + self.time_base
        for group in self.steps:
            event = end[group.scenario] if group.activity < 0 else ef[group.activity, group.scenario]
            total += group.cost(event) / self.runs
        return total

    def _feasible(self) -> bool:
        """The plan last scheduled (:meth:`_separate`) meets the confidence asked for."""
        if self.confidence is None:
            return True
        return int(np.sum(self._ends[1] > self.target + _TOL)) <= self.may_miss

    def rounds(self, deadline: float | None = None):
        """Solve, add the rows broken, and again, until none is broken; the last result
        (``stopped`` when the time limit or ``deadline`` ended the search first)."""
        lm = self.lp
        own = lm.time_limit
        for _ in range(_ROUNDS):
            solver = lm.copy() if lm.is_mip else lm  # (a MILP is solved fresh, see crash_model)
            if deadline is not None:
                left = max(1.0, deadline - time.monotonic())
                solver.time_limit = left if own is None else min(own, left)
            result = solver.solve()
            if result.status == "infeasible":
                return None
            if result.values is None:
                raise TimeLimitError(f"the solver's time limit ({lm.time_limit:g} s) ran out before any plan "
                                     "was found")
            if not self._separate(result.values):
                return result
            if deadline is not None and time.monotonic() > deadline:
                return replace(result, status="stopped")
        raise SolverError(f"the plan for risk did not settle within {_ROUNDS} solves")  # pragma: no cover

    def solution(self, values: np.ndarray, result, objective: float | None = None,
                 bound: float | None = None) -> ScenarioSolution:
        durations = np.asarray(self.net.durations, dtype=np.int64) - np.rint(self.shortening(values)).astype(np.int64)
        choices = np.full(self.n, -1, dtype=np.int64)
        chosen = np.flatnonzero(np.rint(values[self.opt_x]) > 0.5)
        choices[self.opt_owner[chosen]] = self.opt_index[chosen]
        added = float(np.dot(np.rint(values[self.cost_cols]), self.cost_coef))
        if objective is None:
            objective = float(result.objective) + self.time_base
        proven = result.status == "optimal"
        gap = None
        if not proven:
            gap = result.gap if bound is None else max(0.0, objective - bound) / max(abs(objective), 1e-9)
        return ScenarioSolution(tuple(durations.tolist()), tuple(choices.tolist()), added, objective, proven, gap)

    def solve(self, *, seconds: float = EXACT_SECONDS) -> ScenarioSolution | None:
        """The plan, or ``None`` when no plan satisfies the model (e.g. the confidence).

        First every integer column relaxed, then the plan's columns whole with the step
        costs at their convex envelope (a lower bound), then, if the plan found there costs
        more than that bound, exact; the exact search stops after ``seconds`` (or the
        model's time limit per solve), and the better plan found is returned with the gap to
        the bound."""
        lm = self.lp
        integer = np.flatnonzero(lm.col_integer)
        self.exact = False
        if len(integer):
            lm.set_integer(integer, False)
            try:
                if self.rounds() is None:
                    return None
            finally:
                lm.set_integer(integer, True)
        envelope = self.rounds()
        if envelope is None:
            return None
        bound = float(envelope.objective) + self.time_base
        true = self.true_objective(envelope.values)
        first = self.solution(envelope.values, envelope, true)
        if envelope.status == "optimal" and true <= bound + 1e-6 * max(1.0, abs(bound)):
            return first  # the envelope is the true cost at its optimum: optimal
        self.exact = True
        exact = self.rounds(deadline=time.monotonic() + seconds)
        if exact is not None and exact.status == "optimal":
            return self.solution(exact.values, exact)
        candidates = [first] if envelope.status == "optimal" else []
        if exact is not None and exact.values is not None and self._feasible():
            candidates.append(self.solution(exact.values, exact, self.true_objective(exact.values)))
        if not candidates:
            raise TimeLimitError("the solver's time limit ran out before a plan for risk was proven")
        best = min(candidates, key=lambda c: c.objective)
        low = max(bound, (exact.bound + self.time_base) if exact is not None and exact.bound is not None else bound)
        gap = max(0.0, best.objective - low) / max(abs(best.objective), 1e-9)
        return replace(best, proven=False, gap=gap)
