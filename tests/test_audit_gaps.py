"""Tests for bugs a mutation audit planted and the suite did not catch (issue: "Tests that
catch the next bug"). Each expected value comes from a definition, a hand calculation
written here, or a published example."""

from __future__ import annotations

from datetime import date

import pytest
from hypothesis import given
from hypothesis import strategies as st

from conftest import PROPERTY, TOL, linprog_least_cost, load_json, make_project, project_from_example
from hasten.cpm import schedule
from hasten.planner import Planner
from hasten.project import Activity, Contract, CrashStep, Link, Project

START = date(2027, 1, 4)  # a Monday


@pytest.fixture(scope="module")
def monkeypatch_part():
    """Solve on a part however large it is (small random projects would else be solved
    whole: a part over 60% of the activities is)."""
    mp = pytest.MonkeyPatch()
    mp.setattr("hasten.partial.WHOLE_SHARE", 1.0)
    yield
    mp.undo()


def test_free_float_with_a_deadline_is_measured_to_the_early_dates():
    # Definition (README, Method): free float is how far an activity can slip without
    # delaying any successor's early date or the project (early) finish; a deadline moves
    # the backward pass only. A(5) -> B(3): early finish 8. Deadline 11: B's total float
    # 11 - 8 = +3; deadline 6: 6 - 8 = -2; B's free float 0 both times (hand-worked).
    p = make_project([Activity("A", 5), Activity("B", 3)], [Link("A", "B")])
    for deadline, total in ((11, 3), (6, -2)):
        b = schedule(p, deadline=deadline).by_id()["B"]
        assert (b.total_float, b.free_float) == (total, 0), deadline
        a = schedule(p, deadline=deadline).by_id()["A"]
        assert (a.total_float, a.free_float) == (total, 0), deadline


def test_next_day_cost_is_measured_from_the_plans_own_finish():
    # University of Mumbai exam solution (ques10.com; tests/data/examples/ques10_indirect80.json):
    # normal 23 days; the first day (23 -> 22) costs 40. A target past the normal finish is
    # met at 23 days, and one more day from there costs 40, not 0.
    planner = Planner(project_from_example(load_json("examples/ques10_indirect80.json"), indirect=80))
    assert planner.normal_finish == 23
    for target in (23, 24, 30):
        plan = planner.plan(target)
        assert plan.finish == 23 and plan.next_day_cost == pytest.approx(40.0), target


def test_next_day_cost_counts_the_milestone_damages_it_saves():
    # Hand-worked: A (5 days, 2 crash days at 100) -> M (milestone, due Thu 7 Jan 2027, 50 a
    # calendar day late) -> B (5 days, 1 crash day at 30); from Mon 4 Jan, normal finish 10.
    # M is dated the day A ends: Fri 8 (1 day late, 50); A a day shorter: Thu 7 (0).
    # By 9 days: B's day (30 + damages 50 = 80) beats A's (100 + 0). By 8 days: B and A a day
    # each (130 + 0) beats A two days (200). One more day from 9 therefore costs
    # (130 + 0) - (30 + 50) = 50: the added cost rises 100 and the damages fall 50.
    acts = [Activity("A", 5, crash_duration=3, cost=0, crash_cost=200),
            Activity("M", 0, deadline=date(2027, 1, 7), damages_per_day=50),
            Activity("B", 5, crash_duration=4, cost=0, crash_cost=30)]
    planner = Planner(Project("damages", START, tuple(acts), (Link("A", "M"), Link("M", "B"))))
    plan = planner.plan(9)
    assert (plan.finish, plan.added_cost, plan.milestone_damages) == (9, pytest.approx(30), pytest.approx(50))
    assert plan.next_day_cost == pytest.approx(50.0)


def test_each_day_of_the_curve_counts_the_milestone_damages_it_saves():
    # The same hand-worked project: least added cost + damages by finish (working days):
    # 10: nothing, M 1 day late: 0 + 50; 9: B's day, 30 + 50; 8: B and A a day, 130 + 0;
    # 7: B and A two days, 230 + 0. Each day costs the total less the total a day later:
    # 9: 30, 8: 50 (100 more added, 50 less damages), 7: 100.
    acts = [Activity("A", 5, crash_duration=3, cost=0, crash_cost=200),
            Activity("M", 0, deadline=date(2027, 1, 7), damages_per_day=50),
            Activity("B", 5, crash_duration=4, cost=0, crash_cost=30)]
    curve = Planner(Project("damages", START, tuple(acts), (Link("A", "M"), Link("M", "B")))).curve()
    got = {p.finish: (p.added_cost, p.milestone_damages, p.day_cost) for p in curve.points}
    assert got[9] == (pytest.approx(30), pytest.approx(50), pytest.approx(30))
    assert got[8] == (pytest.approx(130), pytest.approx(0), pytest.approx(50))
    assert got[7] == (pytest.approx(230), pytest.approx(0), pytest.approx(100))


def test_a_milestone_forecast_early_is_zero_days_late():
    # Hand-worked: M (a milestone after A, 5 days from Mon 4 Jan 2027) is dated Fri 8 Jan;
    # its deadline Fri 15 Jan is a week later, so it is 0 days late and owes 0, never -7 and
    # -700 at 100 a day.
    from hasten.recovery import recovery

    acts = [Activity("A", 5), Activity("M", 0, deadline=date(2027, 1, 15), damages_per_day=100)]
    p = Project("early", START, tuple(acts), (Link("A", "M"),), data_date=START,
                contract=Contract(finish=date(2027, 1, 29), damages_per_day=10))
    rec = recovery(Planner(p))
    (m,) = rec.milestones
    assert m.forecast == date(2027, 1, 8) and (m.days_late, m.damages) == (0, 0)
    assert rec.days_late == 0 and all(c.milestone_damages == 0 for c in rec.courses if c.possible)


def test_trade_totals_come_largest_spend_first():
    # The stated rule (README, plan output: "the totals per trade"; results.Plan.trades):
    # largest added cost first, ties by trade name. Three parallel chains ending together,
    # each must lose 1 day: concrete at 300, roofing at 100, electrical at 200 (hand-worked).
    acts = [Activity("C", 5, trade="concrete", crash_duration=4, cost=0, crash_cost=300),
            Activity("R", 5, trade="roofing", crash_duration=4, cost=0, crash_cost=100),
            Activity("E", 5, trade="electrical", crash_duration=4, cost=0, crash_cost=200),
            Activity("X", 5, trade="drywall", crash_duration=4, cost=0, crash_cost=100)]
    p = make_project(acts, [Link("E", "X")])  # E -> X is 10 days; C and R 5
    # to finish in 9: only the E -> X chain is long; it loses 1 day at the cheaper X (100)
    plan = Planner(p).plan(9)
    assert [t.trade for t in plan.trades] == ["drywall"]
    # without the link every activity must lose 1 day to finish in 4
    p2 = make_project(acts, [])
    plan = Planner(p2).plan(4)
    assert [(t.trade, t.added_cost) for t in plan.trades] == [
        ("concrete", 300), ("electrical", 200), ("drywall", 100), ("roofing", 100)]


@PROPERTY
@given(st.data())
def test_plans_solved_on_a_part_hold_on_the_whole_network_with_free_days(monkeypatch_part, data):
    # Against scipy's linprog on the whole network (conftest.linprog_least_cost): projects of
    # at least 10 activities with mixed links and crash days that cost nothing, where the
    # part's plan can fail on the whole network and must be widened.
    from conftest import projects

    project = data.draw(projects(min_n=10, max_n=14, free_days=True, lag_range=(0, 4)), label="project")
    planner = Planner(project)
    # the curve takes no tie-break, so free crash days may be used anywhere in the part
    for point in planner.curve():
        expected = linprog_least_cost(project, point.finish)
        assert abs(point.added_cost - expected) <= TOL * max(1.0, expected), point.finish
    plan = planner.plan(planner.shortest_finish)
    expected = linprog_least_cost(project, planner.shortest_finish)
    assert abs(plan.added_cost - expected) <= TOL * max(1.0, expected)


# A network found by random search (random.Random(11): 8 activities, 11-12 mixed links with
# lags 0-4, about a third of the activities with crash days that cost nothing; the first
# network and target where the check below fails) where the plan of the part within the
# reach, with every other activity at normal duration, finishes after the target on the
# whole network: shortening work whose crash days cost nothing pushes work outside the part
# later through SF/FF/SS links. The whole-network check must catch it and widen the part.
# (The search depends on which of several least-cost vertices the LP returns, so it was run
# again when the model's rows changed.)
COUNTEREXAMPLE = {
    "acts": [["a0", 10, 1, 39.0], ["a1", 5, 1, 0.0], ["a2", 4, 1, 0.0], ["a3", 5, 3, 0.0],
             ["a4", 9, 1, 22.0], ["a5", 8, 2, 1.0], ["a6", 10, 9, 28.0], ["a7", 6, 1, 0.0]],
    "links": [["a1", "a5", "FS", 1], ["a1", "a3", "SF", 4], ["a2", "a3", "FF", 2], ["a1", "a2", "SF", 1],
              ["a0", "a4", "FF", 4], ["a5", "a6", "FF", 1], ["a1", "a7", "SF", 4], ["a3", "a6", "SS", 1],
              ["a4", "a7", "SS", 4], ["a2", "a6", "FF", 2], ["a0", "a1", "FF", 1]],
    "target": 19,
}


def test_a_part_whose_plan_fails_on_the_whole_network_is_widened(monkeypatch_part):
    from hasten.network import Network
    from hasten.partial import PartialSolver
    from hasten.project import LinkType

    acts = [Activity(i, d, crash_duration=c, cost=0.0, crash_cost=k) for i, d, c, k in COUNTEREXAMPLE["acts"]]
    links = [Link(p, s, LinkType(t), lag) for p, s, t, lag in COUNTEREXAMPLE["links"]]
    project = make_project(acts, links)
    target = COUNTEREXAMPLE["target"]
    # the part alone really does fail here (what the check is for) ...
    part = PartialSolver(Network(project))
    model, keep = part._part_for(part.normal_finish - target)
    sol = model.least_cost(target, tie_break=False)
    durations = part.normal.copy()
    durations[keep] = sol.durations
    net = Network(project)
    assert net.finish_of(net.forward(durations), durations.tolist()) > target
    # ... and the planner's answers still equal scipy linprog on the whole network
    planner = Planner(project)
    for point in planner.curve(planner.normal_finish, target):
        expected = linprog_least_cost(project, point.finish)
        assert abs(point.added_cost - expected) <= TOL * max(1.0, expected), point.finish


def test_a_physical_minimum_keeps_the_linear_cost_per_day():
    # The linear crash cost per day is (crash cost - normal cost) / (normal - crash
    # duration) (# common practice: the cost slope): A 10 days, crash 4 days for 600 more:
    # 100 a day. A physical minimum of 6 days stops crashing at 4 days off but keeps the
    # slope: 4 days at 100 (not 600 / 4 = 150). Three days off cost 300.
    a = Activity("A", 10, crash_duration=4, cost=0.0, crash_cost=600.0, min_duration=6)
    assert a.segments() == (CrashStep(4, 100.0),)
    plan = Planner(Project("slope", START, (a,), ())).plan(7)
    assert plan.added_cost == pytest.approx(300.0)


def test_a_physical_minimum_cuts_the_last_crash_step_short():
    # S 10 days, steps 2 days at 100 then 3 at 250; a physical minimum of 7 days leaves 3
    # days: 2 at 100, then 1 (not 3) at 250. The shortest plan is 7 days at 450.
    s = Activity("S", 10, steps=(CrashStep(2, 100.0), CrashStep(3, 250.0)), min_duration=7)
    assert s.segments() == (CrashStep(2, 100.0), CrashStep(1, 250.0))
    planner = Planner(Project("minimum", START, (s,), ()))
    assert planner.shortest_finish == 7
    assert planner.plan(7).added_cost == pytest.approx(450.0)
