"""Plans chosen for risk: the least-cost plan that meets a target with a given confidence,
and the plan with the least expected total cost, each beside the deterministic plan.

Both solve the crash model over ``N`` sampled scenarios at once (the sample-average
approximation, :mod:`hasten.scenario_model`; Kleywegt, Shapiro & Homem-de-Mello, "The
sample average approximation method for stochastic discrete optimization", *SIAM J.
Optimization* 12(2), 2002). The scenarios are the first ``N`` runs the simulation draws
with the seed (:mod:`hasten.simulation`), so ``hasten risk`` with the same seed sees the
same durations.

A figure computed on the scenarios the plan was chosen on flatters it (the plan is fitted to
them), so each plan is also simulated on fresh runs drawn with another seed (``seed + 1``),
and the share of those runs meeting the target is given with its Wilson score interval
(Wilson, "Probable inference, the law of succession, and statistical inference", *J. Am.
Statistical Association* 22(158), 1927, pp. 209-212; recommended over the plain normal
interval by Agresti & Coull, "Approximate is better than 'exact' for interval estimation of
binomial proportions", *The American Statistician* 52(2), 1998).

When the deterministic plan already does what is asked on the scenarios (meets the
confidence at no more cost, or has no higher expected cost), it is kept: with no
uncertainty every scenario is the planned schedule and the two plans are the same.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from datetime import date

import numpy as np

from .errors import HastenError, InputError, SolverError, TimeLimitError
from .planner import Planner, Progress
from .plan_days import plan_cautions_of, plan_changes
from .progress import end_day
from .project import Project
from .questions import Target, target_offset
from .results import ActivityChange
from .scenario_model import EXACT_SECONDS, ONE_CALENDAR, ScenarioModel, ScenarioSolution
from .simulation import BLOCK, RiskModel, RiskResult, run_chunk, simulate
from .solver_model import INF
from .time_costs import time_costs
from .uncertainty import project_ranges

__all__ = ["PlanUnderRisk", "RiskPlans", "risk_plans", "wilson_interval", "fewest_changes", "SCENARIOS",
           "TIE_BREAK_NODES"]

#: Scenarios sampled by default.
SCENARIOS = 200


def wilson_interval(successes: int, n: int, z: float = 1.959963984540054) -> tuple[float, float]:
    """Wilson's score interval for a proportion (95 % by default): the ``p`` with
    ``|p_hat - p| <= z sqrt(p (1 - p) / n)``, i.e. ``(p_hat + z^2/2n -+ z sqrt(p_hat (1 -
    p_hat) / n + z^2/4n^2)) / (1 + z^2/n)`` (Wilson 1927; Agresti & Coull 1998, eq. 2).

    >>> [round(x, 4) for x in wilson_interval(8, 10)]
    [0.4902, 0.9433]
    """
    if n <= 0 or not 0 <= successes <= n:
        raise HastenError(f"a proportion of {successes} in {n} has no interval")
    p = successes / n
    z2 = z * z
    centre = (p + z2 / (2 * n)) / (1 + z2 / n)
    half = z * math.sqrt(p * (1 - p) / n + z2 / (4 * n * n)) / (1 + z2 / n)
    return max(0.0, centre - half), min(1.0, centre + half)


@dataclass(frozen=True)
class PlanUnderRisk:
    """One plan and what the scenarios and the fresh runs say about it."""

    label: str
    added_cost: float
    finish: int  # with the most likely durations
    finish_date: date
    activities: tuple[ActivityChange, ...]  # every activity, in project order
    cautions: tuple[str, ...]
    in_sample_meet: float | None  # share of the scenarios meeting the target (or contract)
    in_sample_total: float  # added cost + time costs + milestone damages, averaged on the scenarios
    check: RiskResult  # the fresh runs
    meets: int | None  # fresh runs meeting the target (or the contract finish)
    interval: tuple[float, float] | None  # Wilson 95 % interval of meets / runs
    expected_total: float  # added cost + time costs + milestone damages, averaged on the fresh runs
    proven: bool = True
    gap: float | None = None  # when not proven: how far above the least it may be, as a share

    @property
    def p_meet(self) -> float | None:
        return None if self.meets is None else self.meets / self.check.runs

    @property
    def changed(self) -> tuple[ActivityChange, ...]:
        return tuple(a for a in self.activities if a.shortened_by or a.option)


@dataclass(frozen=True)
class RiskPlans:
    """The deterministic plan and the plan chosen for risk, side by side."""

    project: Project
    question: str  # "confidence" or "expected"
    confidence: float | None
    target: int | None  # the finish tested: the target, or the contract finish (expected)
    target_date: date | None
    scenarios: int
    seed: int
    check_runs: int
    check_seed: int
    deterministic: PlanUnderRisk
    chosen: PlanUnderRisk
    same: bool  # the deterministic plan was kept
    notes: tuple[str, ...] = ()

    @property
    def extra_cost(self) -> float:
        return self.chosen.added_cost - self.deterministic.added_cost


def _whole(value, name: str, least: int, example: str) -> int:
    if isinstance(value, bool) or not isinstance(value, int) or value < least:
        raise InputError(f"the number of {name} must be a whole number, {least} or more", column=name,
                         value=value, fix=f"e.g. --{name} {example}")
    return value


class _Evaluator:
    """A plan's finish and costs in each of a set of runs (exact CPM passes)."""

    def __init__(self, planner: Planner, ranges, seed: int, runs: int):
        self.planner, self.ranges, self.seed, self.runs = planner, ranges, seed, runs

    def finishes(self, cut) -> tuple[np.ndarray, np.ndarray, RiskModel]:
        model = RiskModel(self.planner.network, self.ranges, self.seed, cut)
        part = run_chunk(model, self.runs, 0, math.ceil(self.runs / BLOCK))
        return part["finish"], part["watched"], model

    def totals(self, cut, added: float) -> tuple[np.ndarray, np.ndarray]:
        """Each run's finish and total (added + time costs + milestone damages)."""
        net = self.planner.network
        finish, watched, model = self.finishes(cut)
        project = net.project
        total = np.full(len(finish), added)
        cache: dict[int, float] = {}
        for k, f in enumerate(finish.tolist()):
            if f not in cache:
                cache[f] = time_costs(project, net.clock, f, floor=net.finish_floor).net
            total[k] += cache[f]
        for row, i in enumerate(model.watched.tolist()):
            act, state = project.activities[i], net.progress.activities[i]
            if not act.damages_per_day or net.fixed[i]:
                continue
            clock = net.timeline.clock_of(i)
            for k, f in enumerate(watched[row].tolist()):
                late = (clock.date_of(end_day(state, f)) - act.deadline).days
                total[k] += act.damages_per_day * max(0, late)
        return finish, total


def risk_plans(project: Project, *, target: Target | None = None, confidence: float | None = None,
               expected: bool = False, scenarios: int = SCENARIOS, seed: int | None = None,
               runs: int = 5000, time_limit: float | None = None,
               progress: Progress | None = None) -> RiskPlans:
    """The plan chosen for risk beside the deterministic one.

    Parameters
    ----------
    project : the project, with its ranges (``optimistic`` / ``pessimistic``, ``[risk]``).
    target, confidence : the least-cost plan finishing by ``target`` in at least
        ``confidence`` (0 < c <= 1) of the scenarios; the deterministic plan is
        :meth:`Planner.plan` for the target.
    expected : instead, the plan with the least added cost plus expected indirect cost,
        damages (contract and milestones) less bonus; the deterministic plan is
        :meth:`Planner.best_finish`'s.
    scenarios : how many scenarios to sample; ``seed`` for them (the fresh runs use
        ``seed + 1``), ``None`` picks one; ``runs`` fresh runs to check each plan.
    """
    if (confidence is None) == (not expected):
        raise HastenError("ask for either a confidence (with a target) or the least expected cost")
    if confidence is not None and (isinstance(confidence, bool) or not isinstance(confidence, (int, float))
                                   or not 0 < confidence <= 1):
        raise InputError("the confidence is a share above 0 and at most 1", column="confidence",
                         value=confidence, fix="e.g. --confidence 0.8 for 80 %")
    scenarios = _whole(scenarios, "scenarios", 1, "200")
    runs = _whole(runs, "runs", 1, "5000")
    if seed is None:
        seed = int(np.random.SeedSequence().entropy % (2 ** 62))
    _whole(seed, "seed", 0, "7")
    planner = Planner(project, time_limit=time_limit)
    net = planner.network
    if net.several:
        raise HastenError(ONE_CALENDAR)
    if confidence is not None:
        if target is None:
            raise HastenError("a confidence needs a target: --finish N, --by DATE or --earlier 10d")
        t = target_offset(planner, target)
        det = planner.plan(t)
        meet_by = t
    else:
        det = planner.best_finish().plan
        contract = project.contract.finish
        meet_by = None if contract is None else planner.target_by_date(contract)
    ranges = project_ranges(planner.project)
    base = RiskModel(net, ranges, seed)
    drawn = base.durations(scenarios, 0, math.ceil(scenarios / BLOCK)).T
    if not len(base.sampler.uncertain):
        drawn = drawn[:1]  # every scenario is the planned schedule
    by_id = {a.id: a for a in det.activities}
    det_d = tuple(by_id[i].duration for i in net.ids)
    det_c = tuple(([o.name for o in net.options[k]].index(by_id[i].option) if by_id[i].option else -1)
                  for k, i in enumerate(net.ids))
    inside = _Evaluator(planner, ranges, seed, len(drawn))
    normal = np.asarray(net.durations, dtype=np.int64)
    det_fin, det_tot = inside.totals(normal - np.asarray(det_d), det.added_cost)
    model = ScenarioModel(net, drawn, target=meet_by if confidence is not None else None,
                          confidence=confidence, expected=expected, time_limit=time_limit)
    sol = model.solve(seconds=EXACT_SECONDS if time_limit is None else time_limit)
    if sol is None:
        raise HastenError(f"no plan finishes by {meet_by} working days ({net.finish_date(meet_by).isoformat()}) "
                          f"in at least {confidence:.0%} of the {len(drawn)} scenarios: even the shortest "
                          "durations leave too many late; ask for a later target or a lower confidence")
    sol = fewest_changes(model, sol) or sol
    sol_fin, sol_tot = inside.totals(normal - np.asarray(sol.durations), sol.added_cost)
    tol = 1e-6 * max(1.0, abs(sol.objective))
    if confidence is not None:  # its objective: added cost and the milestone damages, averaged
        det_ok = float(np.mean(det_fin <= meet_by)) >= confidence - 1e-12
        same = det_ok and float(np.mean(det_tot - _time_costs(planner, det_fin))) <= sol.objective + tol
    else:
        same = float(det_tot.mean()) <= sol.objective + tol
    if same:
        sol_d, sol_c, sol_cost, sol_fin, sol_tot = det_d, det_c, det.added_cost, det_fin, det_tot
    else:
        sol_d, sol_c, sol_cost = sol.durations, sol.choices, sol.added_cost
    check_seed = seed + 1
    sims = []
    for k, cut in enumerate((normal - np.asarray(det_d), normal - np.asarray(sol_d))):
        tick = None if progress is None else (lambda done, total, k=k: progress(k * runs + done, 2 * runs))
        sims.append(simulate(net, ranges, runs, check_seed, target=meet_by, shortening=cut.tolist(),
                             progress=tick))
    outside = [_expected_total(planner, r, cost) for r, cost in zip(sims, (det.added_cost, sol_cost))]
    label = f"chosen for {confidence:.0%} confidence" if confidence is not None else "with the least expected cost"
    plans = []
    for name, d, c, cost, fin, tot, sim, total, proven, gap in (
            ("least-cost plan" if confidence is not None else "least total cost plan", det_d, det_c,
             det.added_cost, det_fin, det_tot, sims[0], outside[0], det.proven, det.gap),
            (label, sol_d, sol_c, sol_cost, sol_fin, sol_tot, sims[1], outside[1], sol.proven or same,
             None if same else sol.gap)):
        changes = plan_changes(net, d, c)
        finish = net.forward_finish(list(d))
        cautions = plan_cautions_of(net, d, c)
        meets = None if meet_by is None else sum(n for f, n in sim.finish_counts if f <= meet_by)
        order = {a.id: a for a in changes}
        plans.append(PlanUnderRisk(
            name, cost, finish, net.finish_date(finish), tuple(order[a.id] for a in planner.given.activities),
            cautions, None if meet_by is None else float(np.mean(fin <= meet_by)), float(tot.mean()), sim, meets,
            None if meets is None else wilson_interval(meets, runs), total, proven, gap))
    notes = planner.notes + (() if len(base.sampler.uncertain) else (
        "no activity has a range of durations (optimistic, pessimistic or [risk]): every scenario is the "
        "planned schedule",))
    return RiskPlans(planner.given, "confidence" if confidence is not None else "expected", confidence,
                     meet_by, None if meet_by is None else net.finish_date(meet_by), len(drawn), seed, runs,
                     check_seed, plans[0], plans[1], same, notes)


def _time_costs(planner: Planner, finish: np.ndarray) -> np.ndarray:
    """Indirect cost, damages and bonus of each finish."""
    net = planner.network
    return np.array([time_costs(net.project, net.clock, f, floor=net.finish_floor).net for f in finish.tolist()])


def _expected_total(planner: Planner, result: RiskResult, added: float) -> float:
    net = planner.network
    time = sum(n * time_costs(net.project, net.clock, f, floor=net.finish_floor).net for f, n in result.finish_counts)
    return added + time / result.runs + sum(m.expected_damages for m in result.milestones)


#: Branch-and-bound nodes the tie-break may search (as hasten.crash_ties).
TIE_BREAK_NODES = 2000


def fewest_changes(model: ScenarioModel, best: ScenarioSolution) -> ScenarioSolution | None:
    """Among plans whose objective is no more than ``best``'s, the one that changes the
    fewest activities, then takes the fewest days off (the rule of the deterministic plans,
    :mod:`hasten.crash_ties`): the model solved again with its objective held by a row, within
    a node limit so that the same input gives the same plan. ``None`` when it finds nothing
    better or is not proven. Changes the model (solve it no more afterwards)."""
    normal = model.net.durations
    changed = [i for i, (d, n, c) in enumerate(zip(best.durations, normal, best.choices)) if d != n or c >= 0]
    if not best.proven or not changed:
        return None
    lm = model.lp
    cols, coefs = lm.objectives["risk"]
    bound = best.objective - model.time_base
    lm.add_row(cols, coefs, -INF, bound + 1e-6 * max(1.0, abs(bound)))
    owners = [i for i, (c, _) in enumerate(model.shortening_terms) if c]
    u = lm.add_columns(np.zeros(len(owners)), 1.0, integer=True)
    upper = np.asarray(lm.col_upper)
    day_cols, day_coef, weight = [], [], 1.0
    for col_u, i in zip(u.tolist(), owners):
        mine, signs = model.shortening_terms[i]
        for col, coef in zip(mine, signs):  # a day or an option only if the activity counts as changed
            room = float(upper[col])
            lm.add_row([col, col_u], [1.0, -room], -INF, 0.0)
            day_cols.append(col)
            day_coef.append(coef)
            weight += abs(coef) * room
    lm.define_objective("fewest", np.concatenate([u, day_cols]), np.concatenate([np.full(len(u), weight), day_coef]))
    lm.use_objective("fewest")
    lm.node_limit = TIE_BREAK_NODES
    if lm.time_limit is None:
        lm.time_limit = 30.0
    try:
        out = model.rounds()
    except (TimeLimitError, SolverError):
        return None
    if out is None or out.status != "optimal":
        return None
    if model.true_objective(out.values) > best.objective + 1e-6 * max(1.0, abs(best.objective)):
        return None  # (step costs at their envelope can look cheaper than they are)
    sol = model.solution(out.values, out)
    fewer = sum(1 for d, n, c in zip(sol.durations, normal, sol.choices) if d != n or c >= 0)
    days = sum(n - d for d, n in zip(sol.durations, normal))
    if (fewer, days) >= (len(changed), sum(n - d for d, n in zip(best.durations, normal))):
        return None
    return ScenarioSolution(sol.durations, sol.choices, sol.added_cost, best.objective, True, None)
