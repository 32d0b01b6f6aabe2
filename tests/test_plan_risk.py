"""Simulating a plan (hasten.simulation with ``shortening``, hasten.plan_days, hasten.risk).

Sources of the checks: exact distributions computed here with scipy.stats (a general-purpose
reference library): each drawn duration is ``ceil(X)``, ``P(D = k) = F(k) - F(k - 1)``; a
plan taking ``c`` days off makes it ``max(D - c, 1)``, and a chain finishes at the sum of its
durations (``numpy.convolve``); the one-sample Kolmogorov-Smirnov bound ``1.628 / sqrt(n)``
at the 1 % level (Smirnov 1948 table; # from memory) with fixed seeds. The added cost of a
plan is written out by hand from the activity data.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import stats

from conftest import make_project
from hasten.errors import InputError
from hasten.network import Network
from hasten.plan_days import added_cost, plan_days, plan_days_from_json
from hasten.project import Activity, CrashStep, Link, Option
from hasten.risk import schedule_risk
from hasten.simulation import simulate
from hasten.uncertainty import duration_ranges

KS_1PCT = 1.628


def pert_pmf(a: float, m: float, b: float, top: int) -> np.ndarray:
    """P(ceil(X) = k) for k = 0..top, X PERT-beta on [a, b] with mode m (scipy.stats.beta)."""
    ks = np.arange(0, top + 1, dtype=float)
    r = (m - a) / (b - a)
    f = stats.beta.cdf(ks, 1 + 4 * r, 1 + 4 * (1 - r), loc=a, scale=b - a)
    return np.diff(f, prepend=0.0)


def ks_distance(sample: np.ndarray, pmf: np.ndarray) -> float:
    counts = np.bincount(sample, minlength=len(pmf))
    assert len(counts) == len(pmf), "a finish fell outside the exact support"
    return float(np.abs(np.cumsum(counts) / len(sample) - np.cumsum(pmf)).max())


def finishes(result) -> np.ndarray:
    return np.repeat([f for f, _ in result.finish_counts], [n for _, n in result.finish_counts])


def test_a_plan_takes_its_days_off_every_draw():
    # A (2..9, most likely 4) then B (3..6, most likely 5); the plan cuts A by 1 and B by 2
    acts = [Activity("A", 4, crash_duration=2, cost=0, crash_cost=200),
            Activity("B", 5, crash_duration=3, cost=0, crash_cost=100)]
    project = make_project(acts, [Link("A", "B")])
    ranges = duration_ranges(project, ranges={"A": (2, 9), "B": (3, 6)})
    runs = 20_000
    res = simulate(project, ranges, runs, seed=8, shortening=[1, 2])
    a = pert_pmf(2, 4, 9, 9)
    b = pert_pmf(3, 5, 6, 6)
    a_cut = np.concatenate([a[1:], [0.0]])  # D - 1: no draw of A is below 3, so none is floored
    b_cut = np.concatenate([b[2:], [0.0, 0.0]])  # D - 2: draws of B are 4..6, so 2..4
    exact = np.convolve(a_cut, b_cut)
    exact = exact[: np.flatnonzero(exact > 0).max() + 1]
    assert ks_distance(finishes(res), exact) < KS_1PCT / math.sqrt(runs)
    assert res.planned_finish == 3 + 3  # the plan's durations at the most likely values


def test_a_draw_below_the_plans_days_keeps_one_working_day():
    # 3 days (1..6), the plan cuts 2 (crash duration 1): a draw of 2 days leaves max(0, 1) = 1
    project = make_project([Activity("A", 3, crash_duration=1, cost=0, crash_cost=10)], [])
    ranges = duration_ranges(project, ranges={"A": (1, 6)})
    runs = 20_000
    res = simulate(project, ranges, runs, seed=3, shortening=[2])
    d = pert_pmf(1, 3, 6, 6)
    exact = np.zeros(5)
    for k, p in enumerate(d):
        if p:
            exact[max(k - 2, 1)] += p
    assert ks_distance(finishes(res), exact) < KS_1PCT / math.sqrt(runs)
    assert res.finish_counts[0][0] == 1


def test_plan_days_reads_durations_and_options():
    acts = [Activity("A", 10, steps=(CrashStep(2, 100.0), CrashStep(2, 250.0))),
            Activity("B", 8, options=(Option("second crew", 5, 1200.0, crash_duration=4, cost_per_day=300.0),)),
            Activity("C", 6)]
    net = Network(make_project(acts, [Link("A", "B"), Link("B", "C")]))
    days = plan_days(net, {"A": 7, "B": 4}, {"B": "second crew"})
    assert days.shortening == (3, 4, 0) and days.choices == (-1, 0, -1) and days.changed == 2
    # by hand: A 2 days at 100 + 1 at 250 = 450; B the option 1,200 + 1 own day at 300 = 1,500
    assert added_cost(net, [7, 4, 6], days.choices) == pytest.approx(1950.0)
    with pytest.raises(InputError, match="cannot take 5 working days"):
        plan_days(net, {"A": 5})
    with pytest.raises(InputError, match="cannot take 3 working days by option 'second crew'"):
        plan_days(net, {"B": 3}, {"B": "second crew"})


def test_a_plan_from_json_names_the_file_and_row():
    net = Network(make_project([Activity("A", 5, crash_duration=3, cost=0, crash_cost=20)], []))
    good = {"target": 4, "activities": [{"id": "A", "normal": 5, "duration": 4, "option": None}]}
    days = plan_days_from_json(net, good, "plan.json")
    assert days.shortening == (1,) and days.target == 4
    with pytest.raises(InputError) as err:
        plan_days_from_json(net, {"activities": [{"id": "A", "normal": 6, "duration": 4}]}, "plan.json")
    assert err.value.file == "plan.json" and err.value.row == 1 and err.value.column == "normal"
    with pytest.raises(InputError, match="lists activity A twice"):
        plan_days_from_json(net, {"activities": [good["activities"][0]] * 2}, "plan.json")
    with pytest.raises(InputError, match="not a plan"):
        plan_days_from_json(net, [1, 2], "plan.json")


def test_schedule_risk_of_a_plan_counts_its_cost():
    acts = [Activity("A", 4, crash_duration=2, cost=0, crash_cost=200, optimistic=3, pessimistic=7),
            Activity("B", 5, crash_duration=3, cost=0, crash_cost=100)]
    project = make_project(acts, [Link("A", "B")], indirect=10.0)
    net = Network(project)
    report = schedule_risk(project, runs=500, seed=1, plan=plan_days(net, {"A": 3, "B": 4}), network=net)
    assert report.added_cost == pytest.approx(100 + 50)  # 1 day of A at 100, 1 of B at 50
    mean = sum(f * n for f, n in report.result.finish_counts) / 500
    assert report.expected_time_costs == pytest.approx(10 * mean)
    assert report.expected_total_cost == pytest.approx(150 + 10 * mean)
