"""Plans chosen for risk (hasten.scenario_model, hasten.robust).

Sources of the checks:

- a hand-worked sample-average case with 3 equally likely scenarios (written out below),
  checked by brute force over every whole-day plan in the test;
- the literal sample-average model of the issue (one copy of the schedule per scenario,
  ``f - s + cut = drawn duration``, a 0/1 "may miss" column per scenario with a big M),
  written here with scipy.optimize.milp (a general-purpose reference library) on small
  random networks: hasten solves the same model by adding the binding paths only, and must
  reach the same optimum;
- zero uncertainty: the deterministic planner (hasten.planner.Planner.plan and
  best_finish), whose own answers are checked against published examples in
  test_crashing_references.py: with every scenario the planned schedule the plans must be
  the same;
- Wilson's score interval: the formula of Wilson (1927), JASA 22(158):209-212, as written
  in Agresti & Coull (1998), The American Statistician 52(2):119-126, eq. 2, computed by
  hand in the test; scipy.stats.binomtest(...).proportion_ci(method="wilson"); and the
  worked values of Newcombe (1998), Statistics in Medicine 17:857-872, Table II
  (# from memory).
"""

from __future__ import annotations

import itertools
import math
from dataclasses import replace
from datetime import timedelta

import numpy as np
import pytest
from scipy import stats
from scipy.optimize import Bounds, LinearConstraint, milp

from conftest import START, make_project
from hasten.errors import HastenError, InputError
from hasten.formats import read_project
from hasten.network import Network
from hasten.planner import Planner
from hasten.project import Activity, Calendar, Contract, Costs, Link, LinkType, Project, Risk
from hasten.robust import fewest_changes, risk_plans, wilson_interval
from hasten.scenario_model import ScenarioModel

ALL_DAYS = Calendar((0, 1, 2, 3, 4, 5, 6), (), "all-days")
FS, SS, FF = LinkType.FS, LinkType.SS, LinkType.FF


# -- the hand-worked case -----------------------------------------------------------------
#
# A and B run side by side from day 0 on a calendar that works every day. A is 10 days,
# crashable to 8 at 90 a day; B is 9 days, crashable to 7 at 40 a day. Three equally likely
# scenarios draw (A, B) = (10, 9), (10, 11), (12, 9); the finish of a plan cutting a days
# off A and b off B is max(A_k - a, B_k - b) in scenario k.
#
# Confidence 2/3 for a target of 10 days: at most one scenario may miss. Cutting B by one
# day (40) meets scenarios 1 and 2; cutting A by two (180) meets 1 and 3. The least is b = 1,
# while the deterministic plan (most likely A = 10, B = 9) needs no cut at all.
#
# Expected cost with indirect 50 a day and damages 200 a calendar day after day 10 (the
# contract finish is the 10th day): (a, b) = (2, 1) gives finishes 8, 10, 10, so
# 180 + 40 + (400 + 500 + 500) / 3 = 686.67, the least of the nine plans (brute force below);
# the deterministic best is (0, 0) at 500 (finish 10 with the most likely durations).

DRAWN = np.array([[10, 9], [10, 11], [12, 9]])


def _pair() -> Project:
    acts = (Activity("A", 10, crash_duration=8, cost=0, crash_cost=180),
            Activity("B", 9, crash_duration=7, cost=0, crash_cost=80))
    return Project("pair", START, acts, (), calendar=ALL_DAYS, costs=Costs(50.0),
                   contract=Contract(START + timedelta(days=9), 200.0))


def _brute(question):
    """Every whole-day plan (a, b) with its cost, each scenario's finish written out."""
    out = {}
    for a, b in itertools.product(range(3), range(3)):
        finish = [max(x - a, y - b) for x, y in DRAWN.tolist()]
        out[(a, b)] = question(a, b, finish)
    return out


def test_the_hand_worked_confidence_plan_differs_from_the_deterministic_one():
    def cost(a, b, finish):  # None: fewer than 2 of 3 scenarios meet day 10
        return 90 * a + 40 * b if sum(f <= 10 for f in finish) >= 2 else None

    table = {k: v for k, v in _brute(cost).items() if v is not None}
    least = min(table.values())
    assert least == 40 and [k for k, v in table.items() if v == least] == [(0, 1)]
    net = Network(_pair())
    model = ScenarioModel(net, DRAWN, target=10, confidence=2 / 3)
    sol = model.solve()
    assert sol.added_cost == least and sol.durations == (10, 8) and sol.proven
    det = Planner(_pair()).plan(10)
    assert det.added_cost == 0  # the deterministic plan changes nothing
    # every scenario: a = 2 and b = 1 are needed (180 + 40 = 220)
    full = min(v for k, v in _brute(lambda a, b, f: 90 * a + 40 * b if max(f) <= 10 else None).items()
               if v is not None)
    assert ScenarioModel(net, DRAWN, target=10, confidence=1.0).solve().added_cost == full == 220


def test_the_hand_worked_expected_cost_plan():
    def total(a, b, finish):
        return 90 * a + 40 * b + sum(50 * f + 200 * max(0, f - 10) for f in finish) / 3

    table = _brute(total)
    best = min(table, key=table.get)
    assert best == (2, 1) and table[best] == pytest.approx(686.6667, abs=1e-3)
    assert sorted(table.values())[1] > table[best] + 1  # no tie
    model = ScenarioModel(Network(_pair()), DRAWN, expected=True)
    sol = model.solve()
    assert sol.durations == (8, 8) and sol.objective == pytest.approx(table[best]) and sol.proven
    assert Planner(_pair()).best_finish().plan.added_cost == 0


# -- against the literal model, written with scipy ----------------------------------------

def _random_case(seed: int):
    rng = np.random.default_rng(seed)
    n = int(rng.integers(4, 7))
    acts, links = [], []
    for i in range(n):
        d = int(rng.integers(2, 9))
        c = d - int(rng.integers(0, min(3, d - 1) + 1))
        acts.append(Activity(f"T{i}", d, crash_duration=c, cost=0.0, crash_cost=float(rng.integers(1, 9) * 10 * (d - c))))
        for j in sorted(set(rng.integers(0, i, size=int(rng.integers(1, 3))).tolist())) if i else []:
            kind = [FS, FS, SS, FF][int(rng.integers(0, 4))]
            links.append(Link(f"T{j}", f"T{i}", kind, int(rng.integers(0, 3)) if kind is not FS else 0))
    project = make_project(acts, links, indirect=30.0)
    project = replace(project, calendar=ALL_DAYS)
    runs = int(rng.integers(3, 7))
    normal = np.array([a.duration for a in acts])
    drawn = np.maximum(normal + rng.integers(-1, 4, size=(runs, n)), 1)
    return project, drawn


def _literal(project: Project, drawn: np.ndarray, *, target=None, confidence=None, damages=0.0, deadline=0):
    """The sample-average model written whole (one copy of the schedule per scenario) and
    solved with scipy's MILP solver. Columns: y (days cut, whole), then per scenario s, f,
    T, late days L (expected) or the 0/1 column z (confidence)."""
    acts = project.activities
    n, runs = len(acts), len(drawn)
    room = [a.duration - a.crash_duration for a in acts]
    slope = [(a.crash_cost - a.cost) / r if r else 0.0 for a, r in zip(acts, room)]
    idx = {a.id: k for k, a in enumerate(acts)}
    per = 2 * n + 3
    nv = n + runs * per
    s = lambda k, i: n + k * per + i  # noqa: E731
    f = lambda k, i: n + k * per + n + i  # noqa: E731
    T = lambda k: n + k * per + 2 * n  # noqa: E731
    x = lambda k: n + k * per + 2 * n + 1  # noqa: E731 - late days, or z
    rows, lo, hi = [], [], []

    def row(entries, low, high):
        r = np.zeros(nv)
        for col, v in entries:
            r[col] += v
        rows.append(r)
        lo.append(low)
        hi.append(high)

    big = drawn.sum(axis=1).max() + 10
    for k in range(runs):
        for i in range(n):
            row([(f(k, i), 1), (s(k, i), -1), (i, 1)], drawn[k, i], drawn[k, i])  # f - s + cut = drawn
            row([(f(k, i), 1), (T(k), -1)], -np.inf, 0)
        for link in project.links:
            i, j = idx[link.pred], idx[link.succ]
            later = s(k, j) if link.type in (FS, SS) else f(k, j)
            earlier = f(k, i) if link.type in (FS, FF) else s(k, i)
            row([(later, 1), (earlier, -1)], link.lag, np.inf)
        if confidence is not None:
            row([(T(k), 1), (x(k), -big)], -np.inf, target)
        else:
            row([(x(k), 1), (T(k), -1)], -deadline, np.inf)  # L >= T - deadline
    if confidence is not None:
        row([(x(k), 1) for k in range(runs)], -np.inf, math.floor((1 - confidence) * runs + 1e-9))
    for i in range(n):  # never below one working day in any scenario
        row([(i, 1)], -np.inf, drawn[:, i].min() - 1)
    c = np.zeros(nv)
    c[:n] = slope
    if confidence is None:
        for k in range(runs):
            c[T(k)] = project.costs.indirect_per_day / runs
            c[x(k)] = damages / runs
    upper = np.full(nv, np.inf)
    upper[:n] = room
    integrality = np.zeros(nv)
    integrality[:n] = 1
    if confidence is not None:
        for k in range(runs):
            upper[x(k)] = 1
            integrality[x(k)] = 1
    res = milp(c, constraints=LinearConstraint(np.array(rows), lo, hi), bounds=Bounds(np.zeros(nv), upper),
               integrality=integrality)
    return None if res.status == 2 else res.fun


@pytest.mark.parametrize("seed", range(12))
def test_the_confidence_plan_is_the_optimum_of_the_literal_model(seed):
    project, drawn = _random_case(seed)
    net = Network(project)
    finishes = sorted(net.forward_finish(list(d)) for d in drawn)
    target = finishes[len(finishes) // 2] - 1
    for confidence in (0.5, 0.75, 1.0):
        want = _literal(project, drawn, target=target, confidence=confidence)
        sol = ScenarioModel(net, drawn, target=target, confidence=confidence).solve()
        if want is None:
            assert sol is None
        else:
            assert sol is not None and sol.added_cost == pytest.approx(want, abs=1e-6)
            ends = [net.forward_finish([d - c for d, c in zip(row, np.subtract(net.durations, sol.durations))])
                    for row in drawn]
            assert sum(e > target for e in ends) <= math.floor((1 - confidence) * len(drawn) + 1e-9)


@pytest.mark.parametrize("seed", range(12))
def test_the_expected_cost_plan_is_the_optimum_of_the_literal_model(seed):
    project, drawn = _random_case(seed)
    net = Network(project)
    deadline = net.forward_finish()
    project = replace(project, contract=Contract(START + timedelta(days=deadline - 1), 120.0))
    net = Network(project)
    want = _literal(project, drawn, damages=120.0, deadline=deadline)
    sol = ScenarioModel(net, drawn, expected=True).solve()
    assert sol.proven and sol.objective == pytest.approx(want, abs=1e-6)


# -- zero uncertainty: the deterministic plans ----------------------------------------------

@pytest.mark.parametrize("case, earlier", [("riverside-culvert", 3), ("riverside-culvert", 8),
                                           ("clinic-fitout", 5), ("harbour-depot-late", 6)])
def test_without_uncertainty_the_confidence_plan_is_the_deterministic_plan(case, earlier):
    project = read_project(f"cases/{case}")
    planner = Planner(project)
    target = planner.normal_finish - earlier
    det = planner.plan(target)
    five = np.tile(np.asarray(planner.network.durations), (5, 1))  # five identical scenarios
    model = ScenarioModel(planner.network, five, target=target, confidence=0.8)
    sol = model.solve()
    assert sol.objective == pytest.approx(det.added_cost + det.milestone_damages)
    sol = fewest_changes(model, sol) or sol
    changed = sum(1 for d, n in zip(sol.durations, planner.network.durations) if d != n)
    assert changed == len(det.changed)
    out = risk_plans(project, target=target, confidence=0.8, scenarios=20, seed=1, runs=200)
    assert out.same and out.scenarios == 1
    assert [a.duration for a in out.chosen.activities] == [a.duration for a in det.activities]
    assert out.chosen.added_cost == det.added_cost and out.chosen.p_meet == 1.0


@pytest.mark.parametrize("case", ["clinic-fitout", "harbour-depot-late", "riverside-culvert"])
def test_without_uncertainty_the_expected_cost_plan_is_the_best_finish(case):
    project = read_project(f"cases/{case}")
    planner = Planner(project)
    best = planner.best_finish()
    model = ScenarioModel(planner.network, np.tile(np.asarray(planner.network.durations), (3, 1)), expected=True)
    sol = model.solve()
    assert sol.proven and sol.objective == pytest.approx(best.point.total_cost - project.normal_direct_cost)
    out = risk_plans(project, expected=True, scenarios=10, seed=1, runs=200)
    assert out.same
    assert [a.duration for a in out.chosen.activities] == [a.duration for a in best.plan.activities]


# -- the Wilson interval -------------------------------------------------------------------

def _by_hand(x: int, n: int, z: float = 1.959963984540054):
    # Agresti & Coull 1998, eq. 2: (p + z^2/2n -+ z sqrt(p(1-p)/n + z^2/4n^2)) / (1 + z^2/n)
    p = x / n
    root = z * math.sqrt(p * (1 - p) / n + z * z / (4 * n * n))
    return (p + z * z / (2 * n) - root) / (1 + z * z / n), (p + z * z / (2 * n) + root) / (1 + z * z / n)


@pytest.mark.parametrize("x, n, low, high", [
    # Newcombe 1998, Table II, method 3 (score interval without continuity correction)
    # from memory
    (81, 263, 0.2553, 0.3662), (15, 148, 0.0624, 0.1605), (0, 20, 0.0, 0.1611), (1, 29, 0.0061, 0.1718)])
def test_wilson_interval_against_published_values(x, n, low, high):
    got = wilson_interval(x, n)
    assert got == pytest.approx((low, high), abs=1e-4)
    assert got == pytest.approx(_by_hand(x, n), abs=1e-12)
    ci = stats.binomtest(x, n).proportion_ci(confidence_level=0.95, method="wilson")
    assert got == pytest.approx((ci.low, ci.high), abs=1e-9)


def test_wilson_interval_refuses_nonsense():
    with pytest.raises(HastenError):
        wilson_interval(3, 0)
    with pytest.raises(HastenError):
        wilson_interval(5, 4)


# -- the question's input -------------------------------------------------------------------

@pytest.mark.parametrize("kwargs, column", [({"confidence": 1.5}, "confidence"), ({"confidence": 0}, "confidence"),
                                            ({"confidence": 0.8, "scenarios": 0}, "scenarios"),
                                            ({"confidence": 0.8, "runs": 2.5}, "runs"),
                                            ({"confidence": 0.8, "seed": -1}, "seed")])
def test_bad_questions_are_refused(kwargs, column):
    project = read_project("cases/clinic-fitout")
    with pytest.raises(InputError) as err:
        risk_plans(project, target=60, **kwargs)
    assert err.value.column == column and err.value.fix


def test_calendars_of_their_own_are_refused_with_the_way_out():
    project = read_project("cases/ferry-canopy")
    with pytest.raises(HastenError, match="calendars of their own.*hasten risk"):
        risk_plans(replace(project, risk=Risk("-10%, +25%")), target=30, confidence=0.8, scenarios=5, runs=50)


def test_an_unreachable_confidence_says_what_to_do():
    project = replace(read_project("cases/clinic-fitout"), risk=Risk("-10%, +60%"))
    planner = Planner(project)
    with pytest.raises(HastenError, match="later target or a lower confidence"):
        risk_plans(project, target=planner.shortest_finish, confidence=1.0, scenarios=30, seed=2, runs=50)
