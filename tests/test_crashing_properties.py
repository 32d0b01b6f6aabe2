"""Least-cost acceleration on random small networks (all four link types, lags -3..5,
linear costs) against independent references:

- scipy.optimize.linprog (HiGHS) on our own LP, written apart from src/hasten/optimise.py
  (start times and durations as variables; conftest.linprog_least_cost / linprog_min_finish);
- brute force: every whole-day duration vector (itertools.product) with a plain forward pass
  (conftest.brute_force_curve);
- properties that hold for any LP time-cost curve (monotone, convex) and the definitions of
  total cost and budget.
"""

from __future__ import annotations

import dataclasses
from datetime import timedelta

import pytest
from hypothesis import given
from hypothesis import strategies as st

from conftest import (PROPERTY, START, TOL, make_project, brute_force_curve, link_holds, linprog_least_cost,
                      linprog_min_finish, own_cut_cost, own_finish, projects, slope)
from hasten.plan_check import check_plan
from hasten.time_costs import net_time_costs, time_costs
from hasten.planner import Planner
from hasten.errors import InfeasibleTargetError
from hasten.project import Activity, Calendar, Contract, Costs, Link
from hasten.network import Network
from hasten.crash_model import CrashModel, Objective


def close(a: float, b: float) -> bool:
    return abs(a - b) <= TOL * max(1.0, abs(a), abs(b))


def assert_plan_sound(project, plan):
    """Our own reading of a plan: durations within bounds, links held by its early dates,
    finish by the target, cost recomputed from the activity slopes; and hasten's own check."""
    d = {c.id: c.duration for c in plan.activities}
    es = {a.id: a.es for a in plan.schedule.activities}
    for act in project.activities:
        assert act.shortest <= d[act.id] <= act.duration
    for k in project.links:
        assert link_holds(k, es[k.pred], d[k.pred], es[k.succ], d[k.succ])
    assert plan.finish == own_finish(project, d) <= plan.target
    assert close(plan.added_cost, sum(slope(a) * (a.duration - d[a.id]) for a in project.activities))
    durations = [d[a.id] for a in project.activities]
    starts = [es[a.id] for a in project.activities]
    # the independent check (hasten.plan_check) raises PlanCheckError unless the starts shown
    # are its own early starts and the finish and cost shown its own
    checked = check_plan(project, durations, starts=starts, early=True, target=plan.target,
                         claimed_finish=plan.finish, claimed_cost=plan.added_cost)
    assert checked.finish == plan.finish and close(checked.cost, plan.added_cost)


@PROPERTY
@given(projects(min_n=3, max_n=9))
def test_least_cost_matches_linprog_at_every_target(project):
    # reference: scipy.optimize.linprog (HiGHS) on our own start/duration formulation
    study = Planner(project)
    lp_shortest = linprog_min_finish(project)
    assert close(lp_shortest, round(lp_shortest))  # whole-day data: the LP minimum is whole
    assert study.shortest_finish == round(lp_shortest)
    for target in range(study.normal_finish, study.shortest_finish - 1, -1):
        plan = study.plan(target)
        expected = linprog_least_cost(project, target)
        assert close(plan.added_cost, expected), target
        assert_plan_sound(project, plan)
        if target > study.shortest_finish:
            assert close(plan.next_day_cost, linprog_least_cost(project, target - 1) - expected)
        else:
            assert plan.next_day_cost is None
    # below the shortest finish there is no plan, for linprog and for us
    assert linprog_least_cost(project, study.shortest_finish - 1) is None
    with pytest.raises(InfeasibleTargetError):
        study.plan(study.shortest_finish - 1)
    # a target after the normal finish needs no acceleration
    assert study.plan(study.normal_finish + 3).added_cost == 0


@PROPERTY
@given(projects(min_n=2, max_n=6, max_duration=8, max_cut=2, max_links=9))
def test_curve_matches_brute_force(project):
    # reference: enumeration of every whole-day duration vector (itertools.product) with a
    # plain forward pass; the least cost at T is the least over vectors finishing by T
    # (some vectors finish after the normal plan: shortening can delay an SS/FF/SF network)
    truth = brute_force_curve(project)
    study = Planner(project)
    assert truth[study.normal_finish] == 0
    assert study.normal_finish - 1 not in truth or truth[study.normal_finish - 1] > 0
    assert study.shortest_finish == min(truth)
    curve = study.curve()
    assert [p.finish for p in curve] == list(range(study.normal_finish, min(truth) - 1, -1))
    for point in curve:
        assert close(point.added_cost, truth[point.finish]), point.finish


@PROPERTY
@given(projects(min_n=2, max_n=5, max_duration=8, max_cut=3, max_links=8, stepped=True))
def test_stepped_costs_match_brute_force(project):
    # reference: the same enumeration with cost steps taken cheapest first
    # (conftest.own_cut_cost); convex steps let the LP take them in order by itself
    truth = brute_force_curve(project)
    study = Planner(project)
    assert study.shortest_finish == min(truth)
    for point in study.curve():
        assert close(point.added_cost, truth[point.finish]), point.finish
    plan = study.plan(study.shortest_finish)
    assert close(plan.added_cost, truth[study.shortest_finish])
    assert close(plan.added_cost, sum(own_cut_cost(a, c.shortened_by)
                                      for a, c in zip(project.activities, plan.activities)))


@PROPERTY
@given(projects(min_n=3, max_n=9))
def test_curve_is_monotone_and_convex(project):
    # any LP time-cost curve (least cost as a function of the finish bound) is non-increasing
    # and convex in the bound; with whole-day data its whole-day points are those of the LP
    study = Planner(project)
    curve = study.curve()
    normal = {a.id: a.duration for a in project.activities}
    durations = dict(normal)
    for before, point in zip(curve, curve[1:]):
        assert point.added_cost >= before.added_cost - TOL  # never cheaper when tighter
        assert close(point.day_cost, point.added_cost - before.added_cost)
        assert point.day_cost >= before.day_cost - TOL  # convex: each day costs at least the last
    # the listed changes, applied in turn from the normal durations, rebuild every point
    for point in curve:
        for act_id, change in point.changes:
            durations[act_id] += change
        assert own_finish(project, durations) <= point.finish
        assert close(point.added_cost,
                     sum(slope(a) * (a.duration - durations[a.id]) for a in project.activities))


@PROPERTY
@given(projects(min_n=3, max_n=8), st.integers(0, 40), st.integers(-4, 6), st.integers(0, 60),
       st.integers(0, 60), st.one_of(st.none(), st.integers(0, 5)))
def test_best_is_least_total_over_the_curve(project, indirect, contract_shift, damages, bonus, cap):
    # definition: total cost = normal direct + added + indirect + damages - bonus; the best
    # finish is the least total over every curve point (ties: the later finish, crashing.py)
    project = dataclasses.replace(project, costs=Costs(indirect_per_day=indirect))
    study = Planner(project)
    contract_day = study.clock.project_finish_date(study.normal_finish) - timedelta(days=contract_shift)
    project = dataclasses.replace(project, contract=Contract(
        finish=contract_day, damages_per_day=damages, bonus_per_day=bonus, bonus_cap_days=cap))
    study = Planner(project)
    best, totals = _best_is_least_total(project, study, Planner(project).curve())
    # the table: the finishes priced (a branch and bound over the convex added cost prices
    # only days that could still be the least), the current finish and the best among them
    finishes = [r.finish for r in best.table]
    assert finishes == sorted(set(finishes)) and set(finishes) <= set(totals)
    assert study.normal_finish in finishes
    for row in best.table:
        assert close(row.total_cost, totals[row.finish])
    assert close(best.plan.added_cost, best.point.added_cost)
    assert best.plan.finish <= best.point.finish


def _best_is_least_total(project, study, curve):
    """best_finish against the definition: the least of normal direct + added + time costs
    over every day of the curve, ties to the later finish. Returns it and the totals."""
    totals = {p.finish: project.normal_direct_cost + p.added_cost
              + time_costs(project, study.clock, p.finish).net for p in curve}
    least = min(totals.values())
    best = study.best_finish()
    assert close(best.point.total_cost, least)
    assert best.point.finish == max(t for t, v in totals.items() if close(v, least))
    return best, totals


@PROPERTY
@given(projects(min_n=3, max_n=9, max_duration=15), st.data())
def test_best_by_bounds_is_the_least_total_of_every_day(project, data):
    # definition again, on the path that prices only some days (linear costs, one calendar):
    # the least total over the whole curve (every day solved) plus the time costs of each day
    # (hasten.time_costs, day by day); contract dates weeks before the finish so that damages
    # and bonus both run, calendars with weekends and holidays (a working day spans 1 to 5
    # calendar days), indirect costs equal to a crash slope (flat stretches: ties)
    workdays = data.draw(st.sampled_from([(0, 1, 2, 3, 4), (0, 1, 2, 3, 4, 5), (0, 2, 4), tuple(range(7))]))
    holidays = tuple(sorted(set(START + timedelta(days=k) for k in data.draw(
        st.lists(st.integers(0, 90), max_size=8)))))
    project = dataclasses.replace(project, calendar=Calendar(workdays=workdays, holidays=holidays))
    slopes = [slope(a) for a in project.activities if a.duration > a.shortest]
    indirect = data.draw(st.one_of(st.integers(0, 60), st.sampled_from(slopes or [0])))
    study = Planner(project)
    shift = data.draw(st.integers(-25, 8))  # working days before (-) or after the current finish
    contract_day = study.clock.date_of(max(study.normal_finish + shift - 1, 0))
    project = dataclasses.replace(project, costs=Costs(indirect_per_day=indirect), contract=Contract(
        finish=contract_day, damages_per_day=data.draw(st.integers(0, 40)),
        bonus_per_day=data.draw(st.integers(0, 40)), bonus_cap_days=data.draw(st.one_of(st.none(), st.integers(0, 9)))))
    study = Planner(project)
    assert study._partial_ok  # the branch and bound, not the day-by-day trace
    best, totals = _best_is_least_total(project, study, Planner(project).curve())
    for row in best.table:
        assert close(row.total_cost, totals[row.finish])
        assert row.time == time_costs(project, study.clock, row.finish)
    assert study.normal_finish in [r.finish for r in best.table]
    # the time costs the bounds use, all days at once, are time_costs day by day
    assert net_time_costs(project, study.clock, study.normal_finish).tolist() == [
        time_costs(project, study.clock, t).net for t in range(study.normal_finish + 1)]


@PROPERTY
@given(projects(min_n=3, max_n=9), st.floats(0, 1.2))
def test_budget_is_the_earliest_finish_within_the_spend(project, share):
    # definition: the earliest whole-day finish whose least added cost (linprog) is within spend
    study = Planner(project)
    top = linprog_least_cost(project, study.shortest_finish)
    spend = round(share * top, 2)
    plan = study.earliest_within(spend)
    assert plan.added_cost <= spend + TOL
    assert close(plan.added_cost, linprog_least_cost(project, plan.target))
    if plan.target > study.shortest_finish:
        assert linprog_least_cost(project, plan.target - 1) > spend + TOL


@PROPERTY
@given(projects(min_n=3, max_n=9))
def test_lp_optimum_is_whole_days_without_integer_variables(project):
    # Integrality, tested on the code itself rather than on a formulation of our own: at every
    # whole-day target, CrashModel.solve's LP optimum (a simplex vertex) is already in whole
    # days, so it never has to make the shortening columns integer (its fallback for a
    # fractional optimum, the only call of LinearModel.set_integer in CrashModel.solve; we
    # record those calls). Each link row is a difference of two event times and each shortening
    # column sits in one row: a totally unimodular matrix, which optimise.py relies on.
    model = CrashModel(Network(project))
    switched = []
    real = model.lp.set_integer
    model.lp.set_integer = lambda cols, flag: (switched.append(flag), real(cols, flag))
    shortest = model.shortest_finish()
    assert shortest == round(linprog_min_finish(project))
    normal = Planner(project).normal_finish
    for target in range(normal, shortest - 1, -1):
        sol = model.solve(Objective.COST, target=target)
        assert sol is not None, target
        assert all(isinstance(d, int) for d in sol.durations)
        assert close(sol.added_cost, linprog_least_cost(project, target))
    assert switched == []


@PROPERTY
@given(projects(min_n=3, max_n=9), st.data())
def test_plans_are_deterministic(project, data):
    # the same question gives the same plan: asked twice of one study and of a fresh study
    study = Planner(project)
    target = data.draw(st.integers(study.shortest_finish, study.normal_finish))
    first = study.plan(target)
    study.curve()  # other solves in between must not change the answer
    again = study.plan(target)
    fresh = Planner(project).plan(target)
    key = [(a.id, a.duration) for a in first.activities]
    assert [(a.id, a.duration) for a in again.activities] == key
    assert [(a.id, a.duration) for a in fresh.activities] == key
    assert first.added_cost == again.added_cost == fresh.added_cost


@PROPERTY
@given(projects(), st.randoms(use_true_random=False), st.data())
def test_the_same_project_in_another_row_order_gives_the_same_plan(project, rnd, data):
    # Invariance (issue: the plan among equal-cost plans depended on the order of the rows):
    # the rows of activities and links shuffled, every plan is the same activity by activity.
    acts, links = list(project.activities), list(project.links)
    rnd.shuffle(acts)
    rnd.shuffle(links)
    shuffled = dataclasses.replace(project, activities=tuple(acts), links=tuple(links))
    a, b = Planner(project), Planner(shuffled)
    target = data.draw(st.integers(a.shortest_finish, a.normal_finish), label="target")
    pa, pb = a.plan(target), b.plan(target)
    assert {c.id: (c.duration, c.option) for c in pa.activities} == \
        {c.id: (c.duration, c.option) for c in pb.activities}
    assert [c.id for c in pb.activities] == [x.id for x in acts]  # shown in the order given


def test_ties_are_chosen_the_same_way_whatever_the_row_order():
    # Hand-worked tie: A -> B, each 4 days, each can lose 1 day at 100. One day off the
    # 8-day finish costs 100 whichever is shortened; the choice must not follow the rows.
    acts = [Activity("A", 4, crash_duration=3, cost=0, crash_cost=100),
            Activity("B", 4, crash_duration=3, cost=0, crash_cost=100)]
    forward = make_project(acts, [Link("A", "B")])
    backward = make_project(list(reversed(acts)), [Link("A", "B")])
    chosen = {tuple(c.id for c in Planner(p).plan(7).changed) for p in (forward, backward)}
    assert len(chosen) == 1 and len(next(iter(chosen))) == 1
