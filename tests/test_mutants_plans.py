"""Gaps a mutation run found in plans, costs and recovery (tools/mutation.py; DEVELOPERS.md,
"Mutation score"). Each test names the mutant it catches; every expected value is
hand-worked here (arithmetic in the comments) from the rules in README ("Method",
"Recovery") and the module notes they cite.

Calendar mon-fri, no holidays, start Mon 2024-01-01 = day 0 (conftest.START): Thu 01-04 =
3, Fri 01-05 = 4, Mon 01-08 = 5, Fri 01-12 = 9, Mon 01-15 = 10, Mon 01-22 = 15, Fri 01-26 = 19.
"""

from __future__ import annotations

from datetime import date

from conftest import make_project
from hasten.planner import Planner
from hasten.project import Activity, Contract, Link, LinkType, Option
from hasten.recovery import recovery


def test_why_recovery_fails_counts_an_options_own_shortening():
    # mutant network-shortest-options. A (10 days) can be done by "two crews" in 6 days and
    # that option shortened further to 4 days (Option.shortest). M (after A, deadline Thu
    # 01-04, 100 a day) is met at the shortest: A = 4 puts M at the end of day 3 = Thu
    # 01-04. B (20 days, parallel) makes the contract finish Fri 01-12 (day 9, a finish of
    # 10) impossible: the shortest finish is 20, last day 19 = Fri 01-26, 14 calendar days
    # later. So only the contract finish is named, not M.
    acts = [Activity("A", 10, options=(Option("two crews", 6, 600.0, crash_duration=4, cost_per_day=100.0),)),
            Activity("M", 0, deadline=date(2024, 1, 4), damages_per_day=100.0),
            Activity("B", 20)]
    p = make_project(acts, [Link("A", "M")], contract=Contract(finish=date(2024, 1, 12)))
    rec = recovery(Planner(p))
    full = next(c for c in rec.courses if c.label == "recover fully")
    assert not full.possible
    assert full.note == ("not possible: the contract finish 2024-01-12 cannot be met: the shortest "
                         "possible finish is 20 working days (2024-01-26, 14 calendar days later)")


def test_the_earliest_finish_within_a_budget_buys_only_whole_days_it_can_pay_for():
    # mutant lp-budget-round-down. A (10 days, crash to 6 at 100 a day) -> B (5 days):
    # normal finish 15. A budget of 150 buys one day (100), not two (200): earliest finish
    # 14. M, a milestone with a deadline far ahead (no damages), makes the question go to
    # the one-solve path (Planner.earliest_within: no convexity assumed with deadlines).
    acts = [Activity("A", 10, crash_duration=6, cost=0.0, crash_cost=400.0), Activity("B", 5),
            Activity("M", 0, deadline=date(2024, 12, 31))]
    p = make_project(acts, [Link("A", "B"), Link("B", "M")])
    planner = Planner(p)
    assert planner.normal_finish == 15
    plan = planner.earliest_within(150.0)
    assert (plan.finish, plan.added_cost) == (14, 100.0)


def test_a_budget_spent_to_the_cent_buys_its_days():
    # mutant planner-budget-strict. The same A (10 days, crash to 6 at 100 a day) -> B (5
    # days), normal finish 15: a budget of exactly 200 buys two days (finish 13) and 100 one
    # (14), on the bisection path (linear costs, one calendar) and, with the far milestone
    # M, on the one-solve path; 199.99 buys only one.
    acts = [Activity("A", 10, crash_duration=6, cost=0.0, crash_cost=400.0), Activity("B", 5)]
    linear = Planner(make_project(acts, [Link("A", "B")]))
    capped = Planner(make_project(acts + [Activity("M", 0, deadline=date(2024, 12, 31))],
                                  [Link("A", "B"), Link("B", "M")]))
    for planner in (linear, capped):
        for budget, finish, cost in ((200.0, 13, 200.0), (100.0, 14, 100.0), (199.99, 14, 100.0)):
            plan = planner.earliest_within(budget)
            assert (plan.finish, plan.added_cost) == (finish, cost), budget


def test_the_tie_break_of_options_never_spends_more():
    # mutant ties-mip-slack. A (4 days) -> B (4 days) -> C (4 days), finish 12, target 10.
    # B and C can each lose a day at 500; A has an option "second crew", 2 days at 1,005.
    # Least cost: B and C one day each, 1,000 (two changes); the option changes one
    # activity but costs 1,005, and the fewest changes are sought only among plans of equal
    # cost (README, Method, "Ties").
    acts = [Activity("A", 4, options=(Option("second crew", 2, 1005.0),)),
            Activity("B", 4, crash_duration=3, cost=0.0, crash_cost=500.0),
            Activity("C", 4, crash_duration=3, cost=0.0, crash_cost=500.0)]
    p = make_project(acts, [Link("A", "B"), Link("B", "C")])
    plan = Planner(p).plan(10)
    assert plan.added_cost == 1000.0
    assert {c.id: c.duration for c in plan.activities} == {"A": 4, "B": 3, "C": 3}


def test_the_tie_break_prefers_fewer_activities_to_fewer_days():
    # mutant ties-weight-days. A (3 days, to 1 at 40 a day) is followed by B (7 days, to 1
    # at 40 a day) and by C (8 days, to 2 at no cost). Normal finish 3 + 8 = 11; target 6
    # needs dA + dB <= 6 and dA + dC <= 6. A and B cost the same per day, so every plan
    # with cut(A) + cut(B) = 4 costs 160, the least:
    #   cut A 0: B 4, C 5 (free)  -> 2 activities, 9 days
    #   cut A 1: A 1, B 3, C 4    -> 3 activities, 8 days
    #   cut A 2: A 2, B 2, C 3    -> 3 activities, 7 days
    # The rule (README, Method, "Ties"): the fewest shortened activities, then the fewest
    # days: the first, whatever the days.
    acts = [Activity("A", 3, crash_duration=1, cost=0.0, crash_cost=80.0),
            Activity("B", 7, crash_duration=1, cost=0.0, crash_cost=240.0),
            Activity("C", 8, crash_duration=2, cost=0.0, crash_cost=0.0)]
    plan = Planner(make_project(acts, [Link("A", "B"), Link("A", "C")])).plan(6)
    assert plan.added_cost == 160.0
    assert [c.duration for c in plan.activities] == [3, 3, 3]


def test_an_option_of_the_normal_duration_counts_as_a_change():
    # mutant ties-mip-option-changed. README, Method, "Ties": the tie-break of a MILP
    # "counts the activities changed (shortened, or performed by an option)". An option
    # that keeps the normal 4 days still changes how A is done: 1 activity, 0 days.
    from hasten.crash_model import CrashModel, Solution
    from hasten.crash_ties import changes
    from hasten.network import Network

    acts = [Activity("A", 4, options=(Option("other supplier", 4, -50.0),)), Activity("B", 3)]
    model = CrashModel(Network(make_project(acts, [Link("A", "B")])))
    assert changes(model, Solution((4, 3), 0.0, -50.0, choices=(0, -1))) == (1, 0)
    assert changes(model, Solution((4, 2), 0.0, 0.0, choices=(-1, -1))) == (1, 1)
    assert changes(model, Solution((4, 3), 0.0, 0.0, choices=(-1, -1))) == (0, 0)


def test_a_link_from_finished_work_bounds_a_shortened_end():
    # mutant slim-end-floor-dropped. A is finished (Mon 01-01 to Wed 01-03: it ends with day
    # 2, offset 3); the data date is Thu 01-04 (day 3), so B (5 days, down to 2 at 100 a day)
    # starts on day 3 at the earliest and ends by 8. FF A -> B lag 4: B cannot end before
    # 3 + 4 = 7. B at 4 days ends at 3 + 4 = 7; shorter, it still ends at 7 (it starts later).
    # So the shortest finish is 7 for 100, and no plan finishes by 6.
    acts = [Activity("A", 3, actual_start=date(2024, 1, 1), actual_finish=date(2024, 1, 3)),
            Activity("B", 5, crash_duration=2, cost=500.0, crash_cost=800.0)]
    p = make_project(acts, [Link("A", "B", LinkType.FF, 4)], data_date=date(2024, 1, 4))
    planner = Planner(p)
    assert planner.normal_finish == 8
    assert planner.shortest_finish == 7
    points = {pt.finish: pt.added_cost for pt in Planner(p).curve()}
    assert points == {8: 0.0, 7: 100.0}


def test_best_settles_a_straight_curve_from_one_line():
    # mutant planner-best-line (the line through two priced days drawn from the wrong end:
    # a weaker bound, so days are priced that need not be). A chain of six activities of
    # 10 days, each down to 4 at 100 a day: the least added cost falls 100 a day from 60
    # down to 24, one straight line. Indirect cost 100 a day: every finish costs the same in
    # total (6,000 + 100 x 60), ties go to the later finish, so the current finish is best;
    # the line through the current finish and the day before bounds every earlier day at
    # exactly that total, so nothing else needs a solve (issue 12: breakpoints and the
    # days the time costs change slope, not every day).
    acts = [Activity(f"A{i}", 10, crash_duration=4, cost=1000.0, crash_cost=1600.0) for i in range(6)]
    p = make_project(acts, [Link(f"A{i}", f"A{i + 1}") for i in range(5)], indirect=100.0)
    best = Planner(p).best_finish()
    assert best.point.finish == 60
    assert best.point.total_cost == 6000.0 + 100.0 * 60
    assert len(best.table) <= 4, [r.finish for r in best.table]


def test_a_lead_counts_in_a_plan_with_options():
    # mutant lp-leads-dropped (leads, i.e. negative lags, taken as zero in the MILP's rows;
    # the slim LP of linear costs is another code path). A takes 10 days; B may start 3 days
    # before A ends (FS lag -3) and takes 5 days, or 3 with "two crews" for 100. Normal: B
    # from day 7 to 12. Finishing by day 10 takes the option: B from 7 to 10, for 100.
    acts = [Activity("A", 10), Activity("B", 5, options=(Option("two crews", 3, 100.0),))]
    p = make_project(acts, [Link("A", "B", LinkType.FS, -3)])
    planner = Planner(p)
    assert planner.normal_finish == 12
    plan = planner.plan(10)
    assert plan.finish == 10 and plan.added_cost == 100.0


def test_the_tie_break_of_options_finds_a_plan_one_day_better():
    # mutant ties-mip-better-row. A (4 days, shortened at no extra cost down to 2) -> B (3
    # days, option "extra crew": 1 day for 900). Normal finish 7, target 6: one day off A
    # costs nothing, the least. Handed a least-cost plan that takes two free days off A
    # (1 activity changed, 2 days), the tie-break must find one day off A (1 activity, 1
    # day): the same count and one day fewer (README, Method, "Ties").
    from dataclasses import replace

    from hasten.crash_model import CrashModel, Objective
    from hasten.crash_ties import fewest_changed_mip
    from hasten.network import Network

    acts = [Activity("A", 4, crash_duration=2, cost=100.0, crash_cost=100.0),
            Activity("B", 3, options=(Option("extra crew", 1, 900.0),))]
    model = CrashModel(Network(make_project(acts, [Link("A", "B")])))
    best = model.solve(Objective.COST, target=6)
    assert best.added_cost == 0.0
    two_days = replace(best, durations=(2, 3), choices=(-1, -1))
    better = fewest_changed_mip(model, two_days, 6, False)
    assert better is not None and better.durations == (3, 3)


def test_the_tie_break_counts_an_activity_changed_by_an_option():
    # mutant ties-mip-option-uncounted. A (4 days) -> B (4 days), finish 8, target 6: two
    # days off. A can lose two days at 500 a day, or take "extra crew" (3 days, 500); B can
    # take "extra crew" (3 days, 500). Every way costs 1,000: two days off A (1 activity
    # changed, 2 days), both options (2 activities, 2 days), a day off A and B's option (2
    # activities). Handed the plan with both options, the tie-break must find two days off
    # A alone (README, Method, "Ties": the fewest activities changed, options included).
    from dataclasses import replace

    from hasten.crash_model import CrashModel, Objective
    from hasten.crash_ties import fewest_changed_mip
    from hasten.network import Network

    acts = [Activity("A", 4, crash_duration=2, cost=0.0, crash_cost=1000.0,
                     options=(Option("extra crew", 3, 500.0),)),
            Activity("B", 4, options=(Option("extra crew", 3, 500.0),))]
    model = CrashModel(Network(make_project(acts, [Link("A", "B")])))
    best = model.solve(Objective.COST, target=6)
    assert best.added_cost == 1000.0
    both_options = replace(best, durations=(3, 3), choices=(0, 0))
    better = fewest_changed_mip(model, both_options, 6, False)
    assert better is not None and better.durations == (2, 4) and better.choices == (-1, -1)
