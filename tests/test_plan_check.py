"""The independent plan check (hasten.plan_check).

Sources of the checks:

- agreement of two independent implementations on random projects (hypothesis): the early
  starts, finish and finish date of hasten.network (Network.forward, finish_of,
  finish_date, progress applied by hasten.progress) and the added costs and milestone
  damages of hasten.plan_costs (the optimiser side), against plan_check's own reading of the
  project; every start moved a day earlier is refused;
- hand-worked examples of our own, arithmetic written beside each (working-day offsets on
  a Mon-Fri calendar from Mon 2024-01-01: Mon 01-01 = day 0 ... Fri 01-05 = 4, Mon 01-08 = 5,
  Tue 01-09 = 6, Wed 01-10 = 7, Thu 01-11 = 8, Fri 01-12 = 9, Mon 01-15 = 10, Mon 01-22 = 15);
- published worked examples (tests/data/examples, citations in its README.md): the ques10.com
  crashing stages (verified text), Hillier & Lieberman's Reliable Construction Co. (from
  memory, unverified), Odeh's lag examples (early starts by the data authors' own pass).
"""

from __future__ import annotations

import dataclasses
import random
import re
from datetime import date, timedelta

import pytest
from hypothesis import given
from hypothesis import strategies as st

from conftest import (PROPERTY, TOL, load_json, make_project, project_from_example,
                      project_from_numbers)
from hasten.errors import PlanCheckError
from hasten.network import Network
from hasten.plan_check import PlanChecker, check_plan
from hasten.plan_costs import PlanCosts
from hasten.project import Activity, Calendar, CrashStep, Link, LinkType, Option, Project

FS, SS, FF, SF = LinkType.FS, LinkType.SS, LinkType.FF, LinkType.SF
CRANE = Calendar(tuple(range(7)), (), "crane")  # every day
SIX = Calendar(tuple(range(6)), (), "six-day")


def close(a: float, b: float) -> bool:
    return abs(a - b) <= TOL * max(1.0, abs(a), abs(b))


def refused(text: str):
    """The check must refuse with a message containing ``text``."""
    return pytest.raises(PlanCheckError, match=re.escape(text))


# ---------------------------------------------------------------------------------------
# 1. Agreement with hasten.network / hasten.progress / hasten.plan_costs on random projects
# ---------------------------------------------------------------------------------------

@st.composite
def projects(draw):
    """Random small projects: all four link types with lags -3..5 (links from a lower to a
    higher index: no loop), linear or stepped crash costs, options, not-before dates,
    deadlines with damages, calendars of their own, and progress at a data date (actual
    dates drawn freely, so some progress is out of sequence)."""
    n = draw(st.integers(2, 9))
    start = date(2025, 3, 3) + timedelta(days=draw(st.integers(0, 6)))
    own_calendars = draw(st.booleans())
    names = ["", "crane", "six-day", "odd"] if own_calendars else [""]
    odd = Calendar(tuple(sorted(draw(st.sets(st.integers(0, 6), min_size=1)))),
                   (start + timedelta(days=draw(st.integers(0, 20))),), "odd")
    data_date = start + timedelta(days=draw(st.integers(1, 25))) if draw(st.booleans()) else None
    acts = []
    for i in range(n):
        d = draw(st.integers(0, 10))
        cut = draw(st.integers(0, d))
        kw = dict(calendar=draw(st.sampled_from(names)))
        if cut and draw(st.booleans()):
            days, left = [], cut
            while left:
                days.append(draw(st.integers(1, left)))
                left -= days[-1]
            rates = sorted(draw(st.lists(st.integers(1, 20), min_size=len(days), max_size=len(days))))
            kw["steps"] = tuple(CrashStep(k, float(r)) for k, r in zip(days, rates))
        else:
            kw.update(crash_duration=d - cut, crash_cost=float(cut * draw(st.integers(1, 20))))
        if draw(st.integers(0, 3)) == 0:
            opts = []
            for k in range(draw(st.integers(1, 2))):
                od = draw(st.integers(0, 12))
                crash = draw(st.one_of(st.none(), st.integers(0, od)))
                opts.append(Option(f"o{k}", od, float(draw(st.integers(0, 300))), crash_duration=crash,
                                   cost_per_day=float(draw(st.integers(0, 40)))))
            kw["options"] = tuple(opts)
        if draw(st.integers(0, 3)) == 0:
            kw["not_before"] = start + timedelta(days=draw(st.integers(0, 30)))
        if draw(st.integers(0, 3)) == 0:
            kw.update(deadline=start + timedelta(days=draw(st.integers(0, 30))),
                      damages_per_day=float(draw(st.integers(0, 50))))
        if data_date is not None:
            state = draw(st.sampled_from(["finished", "started", "not started"]))
            span = (data_date - start).days
            if state == "finished":
                first = start + timedelta(days=draw(st.integers(0, span - 1)))
                kw.update(actual_start=first,
                          actual_finish=first + timedelta(days=draw(st.integers(0, (data_date - first).days - 1))))
            elif state == "started":
                kw["actual_start"] = start + timedelta(days=draw(st.integers(0, span)))
                how = draw(st.sampled_from(["remaining", "percent", "elapsed"]))
                if how == "remaining":
                    kw["remaining"] = draw(st.integers(0, d))
                elif how == "percent":
                    kw["percent_complete"] = float(draw(st.integers(0, 100)))
        acts.append(Activity(f"a{i}", d, cost=0.0, **kw))
    pairs = st.tuples(st.integers(0, n - 1), st.integers(0, n - 1)).filter(lambda p: p[0] != p[1])
    raw = draw(st.lists(st.tuples(pairs, st.sampled_from([FS, SS, FF, SF]), st.integers(-3, 5)),
                        max_size=12))
    links = tuple(Link(f"a{min(p)}", f"a{max(p)}", t, lag) for p, t, lag in raw)
    return Project("random", start, tuple(acts), links, data_date=data_date,
                   calendars=(CRANE, SIX, odd) if own_calendars else ())


def draw_plan(net: Network, data) -> tuple[list[int], list[int]]:
    """Durations and option choices within the network's own bounds."""
    d, choices = [], []
    for k, normal in enumerate(net.durations):
        options = net.options[k]
        c = data.draw(st.integers(-1, len(options) - 1))
        if c >= 0:
            lo, hi = options[c].shortest, options[c].duration
        else:
            lo, hi = normal - sum(s.days for s in net.steps[k]), normal
        d.append(data.draw(st.integers(lo, hi)))
        choices.append(c)
    return d, choices


def reference(project: Project, net: Network, d: list[int], choices: list[int]):
    """Early starts, finish, added costs and damages by hasten.network and hasten.plan_costs."""
    es = net.forward(d)
    finish = net.finish_of(es, d)
    costs = PlanCosts(net).added_costs(d, choices)
    damages = PlanCosts(net).milestone_damages([s + x for s, x in zip(es, d)])
    return es, finish, costs, damages


@PROPERTY
@given(projects(), st.data())
def test_agrees_with_the_network_and_the_optimiser_costs(project, data):
    # two independent implementations: hasten.network (with hasten.progress and
    # hasten.calendar.Timeline) and hasten.plan_costs against plan_check's own reading
    net = Network(project)
    d, choices = draw_plan(net, data)
    es, finish, costs, damages = reference(project, net, d, choices)
    checker = PlanChecker(project)
    assert checker.dropped == net.progress.dropped
    got = checker.check(d, choices=choices, claimed_finish=finish, claimed_cost=sum(costs),
                        claimed_damages=damages)
    assert list(got.starts) == es
    assert got.finish == finish and got.finish_date == net.finish_date(finish)
    # plain Python numbers, never numpy scalars
    assert type(got.finish) is int and all(type(x) is int for x in got.starts)
    assert type(got.cost) is float and all(type(x) is float for x in got.added_costs)
    assert all(close(a, b) for a, b in zip(got.added_costs, costs))
    assert close(got.cost, sum(costs)) and close(got.damages, damages)
    # the network's early starts keep every link in force, the data date and not-before
    # dates, and are the check's own early starts; each figure claimed as the planner does
    again = checker.check(d, choices=choices, starts=es, early=True, claimed_finish=finish,
                          claimed_cost=sum(costs), claimed_costs=costs, claimed_damages=damages,
                          claimed_finish_date=net.finish_date(finish))
    assert again == got
    # the pass level by level (numpy, chosen for wide networks on one calendar) agrees too
    if not checker._h_cross.any():
        checker._vector = True
        assert checker.forward(d) == es


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_a_wide_network_is_passed_level_by_level_and_agrees(seed):
    # test data of our own: 8 layers of 60 activities, each linked to 1-3 activities of the
    # layer before (all four types, lags -2..4), some finished or started at a data date;
    # reference: hasten.network's forward pass (an independent implementation)
    rng = random.Random(seed)
    start, data_date = date(2025, 3, 3), date(2025, 3, 24)
    acts, links = [], []
    for layer in range(8):
        for k in range(60):
            d = rng.randint(0, 9)
            kw = {}
            if layer == 0 and rng.random() < 0.5:
                first = start + timedelta(days=rng.randint(0, 10))
                kw = dict(actual_start=first, actual_finish=first + timedelta(days=rng.randint(0, 7))) \
                    if rng.random() < 0.5 else dict(actual_start=first, remaining=rng.randint(0, d))
            acts.append(Activity(f"L{layer}-{k}", d, crash_duration=d // 2, cost=0.0, crash_cost=10.0 * d, **kw))
            if layer:
                for p in rng.sample(range(60), rng.randint(1, 3)):
                    links.append(Link(f"L{layer - 1}-{p}", f"L{layer}-{k}", rng.choice([FS, SS, FF, SF]),
                                      rng.randint(-2, 4)))
    project = Project("wide", start, tuple(acts), tuple(links), data_date=data_date)
    net = Network(project)
    checker = PlanChecker(project)
    assert checker._vector  # 480 activities on 8 levels: one numpy step per level
    for d in (net.durations, net.shortest):
        es = net.forward(d)
        assert checker.forward(d) == es
        checker.check(d, starts=es, early=True, claimed_finish=net.finish_of(es, d),
                      claimed_cost=sum(PlanCosts(net).added_costs(d)))


@PROPERTY
@given(projects(), st.data())
def test_every_start_moved_a_day_earlier_is_refused(project, data):
    # early starts are the least starts that keep every constraint, so one day earlier
    # breaks one (a link, the data date, a not-before date, day 0 or finished work's dates)
    net = Network(project)
    d, choices = draw_plan(net, data)
    es, finish, costs, damages = reference(project, net, d, choices)
    k = data.draw(st.integers(0, len(es) - 1))
    moved = list(es)
    moved[k] -= 1
    with pytest.raises(PlanCheckError, match=rf"{project.activities[k].id}|link .* -> {project.activities[k].id} "):
        check_plan(project, d, choices=choices, starts=moved, claimed_finish=finish,
                   claimed_cost=sum(costs), claimed_damages=damages)


@PROPERTY
@given(projects(), st.data())
def test_every_duration_a_day_outside_its_bounds_is_refused(project, data):
    # bounds of the network (progress applied by hasten.progress): finished work fixed,
    # started work within the share of its crash allowance left, an option within its range
    net = Network(project)
    d, choices = draw_plan(net, data)
    es, finish, costs, damages = reference(project, net, d, choices)
    k = data.draw(st.integers(0, len(d) - 1))
    c = choices[k]
    lo = net.options[k][c].shortest if c >= 0 else net.durations[k] - sum(s.days for s in net.steps[k])
    hi = net.options[k][c].duration if c >= 0 else net.durations[k]
    wrong = list(d)
    wrong[k] = data.draw(st.sampled_from([x for x in (lo - 1, hi + 1) if x >= 0] or [hi + 1]))
    with pytest.raises(PlanCheckError, match=rf"{project.activities[k].id}: {wrong[k]} working days"):
        check_plan(project, wrong, choices=choices, claimed_finish=finish, claimed_cost=sum(costs),
                   claimed_damages=damages)


# ---------------------------------------------------------------------------------------
# 2. Wrong plans of every kind, refused with the right message (hand-worked, our own)
# ---------------------------------------------------------------------------------------

def four_links() -> Project:
    """Hand-worked example of our own, one link of each type:

    A 4 days (crash 2 at 100 a day), A -FS+1-> B (3 days), A -SS+2-> C (5 days),
    B -FF+1-> D (2 days), C -SF+4-> E (3 days).
    Forward pass, normal durations: A 0-4; B >= 4 + 1 = 5: 5-8; C >= 0 + 2 = 2: 2-7;
    D finishes >= 8 + 1 = 9: 7-9; E finishes >= 2 + 4 = 6: 3-6. Finish 9 (D).
    """
    return make_project(
        [Activity("A", 4, crash_duration=2, cost=0, crash_cost=200),
         Activity("B", 3), Activity("C", 5), Activity("D", 2), Activity("E", 3)],
        [Link("A", "B", FS, 1), Link("A", "C", SS, 2), Link("B", "D", FF, 1), Link("C", "E", SF, 4)],
        name="four links (hand-worked)")


NORMAL = [4, 3, 5, 2, 3]
EARLY = [0, 5, 2, 7, 3]  # hand-worked in four_links


def test_four_links_hand_worked_plan_is_accepted():
    got = check_plan(four_links(), NORMAL, starts=EARLY, claimed_finish=9, claimed_cost=0.0, target=9)
    assert got.starts == tuple(EARLY) and got.finish == 9 and got.cost == 0 and got.damages == 0


@pytest.mark.parametrize("k, start, text", [
    # one start moved, every other link still held (hand-worked from four_links):
    (1, 4, "link A -> B (FS+1) is broken: B starts at day 4, the link needs day 5 or later"),
    (2, 1, "link A -> C (SS+2) is broken: C starts at day 1, the link needs day 2 or later"),
    # D at 6 finishes at 8; B finishes at 8, + 1 = 9
    (3, 6, "link B -> D (FF+1) is broken: D finishes at day 8, the link needs day 9 or later"),
    # E at 2 finishes at 5; C starts at 2, + 4 = 6
    (4, 2, "link C -> E (SF+4) is broken: E finishes at day 5, the link needs day 6 or later"),
])
def test_each_link_type_broken_by_the_starts_is_refused(k, start, text):
    starts = list(EARLY)
    starts[k] = start
    with refused(text):
        check_plan(four_links(), NORMAL, starts=starts, claimed_finish=9, claimed_cost=0.0)


def test_durations_outside_their_bounds_are_refused():
    # A: normal 4, crash limit 2
    with refused("A: 1 working days is below its crash limit of 2 days"):
        check_plan(four_links(), [1, 3, 5, 2, 3], claimed_finish=9, claimed_cost=300.0)
    with refused("A: 5 working days is above its normal duration of 4 days"):
        check_plan(four_links(), [5, 3, 5, 2, 3], claimed_finish=10, claimed_cost=0.0)
    with refused("B has a duration that is not a whole number: 2.5"):
        check_plan(four_links(), [4, 2.5, 5, 2, 3], claimed_finish=9, claimed_cost=0.0)


def test_a_cost_misstated_by_one_day_is_refused():
    # A at 3 days: one day at 100. A 0-3; B 4-7; D finishes >= 7 + 1 = 8: 6-8; C 2-7; E 3-6:
    # finish 8 (hand-worked)
    d = [3, 3, 5, 2, 3]
    assert close(check_plan(four_links(), d, claimed_finish=8, claimed_cost=100.0).cost, 100)
    for wrong in (0.0, 200.0):
        with refused(f"the added cost sums to 100.00, not {wrong:.2f} as claimed"):
            check_plan(four_links(), d, claimed_finish=8, claimed_cost=wrong)


def test_crash_steps_are_priced_in_order_and_a_step_used_in_part_by_its_days():
    # hand-worked: W 10 days, crash steps 2 days at 100 then 3 days at 250 (the cheaper days
    # first, as a piecewise-linear crash cost is used). Cut 3 days: 2 x 100 + 1 x 250 = 450;
    # cut 5: 2 x 100 + 3 x 250 = 950; cut 1: 1 x 100 = 100.
    project = make_project([Activity("W", 10, steps=(CrashStep(2, 100.0), CrashStep(3, 250.0)))], [])
    for days, cost in ((9, 100.0), (7, 450.0), (5, 950.0)):
        assert close(check_plan(project, [days], claimed_finish=days, claimed_cost=cost).cost, cost)
    with refused("the added cost sums to 450.00, not 950.00 as claimed"):
        check_plan(project, [7], claimed_finish=7, claimed_cost=950.0)


def test_a_finish_claimed_by_ignoring_an_ff_link_is_refused():
    # four_links without the B -FF+1-> D link would finish at 8 (B 5-8, C 2-7, D 0-2); the
    # link holds D to finish at 9 (hand-worked above)
    with refused("the plan finishes on day 9 by its forward pass, not on day 8 as claimed"):
        check_plan(four_links(), NORMAL, claimed_finish=8, claimed_cost=0.0)


def test_a_finish_claimed_by_ignoring_an_sf_link_is_refused():
    # hand-worked: X 2 days, Y 6 days, X -SF+10-> Y: Y finishes >= X's start 0 + 10 = 10,
    # so Y runs 4-10 and the project takes 10 days; ignoring the link it takes 6
    project = make_project([Activity("X", 2), Activity("Y", 6)], [Link("X", "Y", SF, 10)])
    assert check_plan(project, [2, 6], claimed_finish=10, claimed_cost=0.0).starts == (0, 4)
    with refused("the plan finishes on day 10 by its forward pass, not on day 6 as claimed"):
        check_plan(project, [2, 6], claimed_finish=6, claimed_cost=0.0)
    # starts that ignore the link are refused too
    with refused("link X -> Y (SF+10) is broken: Y finishes at day 6, the link needs day 10 or later"):
        check_plan(project, [2, 6], starts=[0, 0], claimed_finish=10, claimed_cost=0.0)


def test_a_finish_after_the_target_is_refused():
    with refused("the plan finishes on day 9, after the target, day 8"):
        check_plan(four_links(), NORMAL, claimed_finish=9, claimed_cost=0.0, target=8)


def test_starts_that_finish_after_the_claimed_finish_are_refused():
    # every link held, but E left to start at 7 finishes at 10 (hand-worked from four_links)
    with refused("the given starts finish on day 10, after the claimed finish, day 9"):
        check_plan(four_links(), NORMAL, starts=[0, 5, 2, 7, 7], claimed_finish=9, claimed_cost=0.0)


def progressed() -> Project:
    """Hand-worked example of our own, Mon-Fri from Mon 2024-01-01, data date Wed 01-10 =
    day 7:

    F 5 days, finished Mon 01-01 .. Fri 01-05: days 0-5 (fixed).
    G 10 days, crash 6 at 100 a day (4 days of allowance); started Mon 01-08 = day 5 after
      F (F -FS-> G holds: 5 >= 5), 5 days left: from the data date, 7-12; its allowance left
      is 4 x 5 / 10 = 2 days, so 3..5 days.
    H 3 days after G (FS), not before Mon 01-22 = day 15: 15-18.
    K 2 days after F (FS): F ends at 5, the data date is 7: 7-9.
    Finish 18.
    """
    acts = [Activity("F", 5, actual_start=date(2024, 1, 1), actual_finish=date(2024, 1, 5)),
            Activity("G", 10, crash_duration=6, cost=0, crash_cost=400, actual_start=date(2024, 1, 8),
                     remaining=5),
            Activity("H", 3, not_before=date(2024, 1, 22)),
            Activity("K", 2)]
    return make_project(acts, [Link("F", "G"), Link("G", "H"), Link("F", "K")], data_date=date(2024, 1, 10))


LEFT = [5, 5, 3, 2]  # F's actual span, G's days left, H and K whole
LEFT_EARLY = [0, 7, 15, 7]


def test_progress_hand_worked_plans_are_accepted():
    got = check_plan(progressed(), LEFT, starts=LEFT_EARLY, claimed_finish=18, claimed_cost=0.0)
    assert got.starts == tuple(LEFT_EARLY)
    # G shortened by its whole remaining allowance, 2 days at 100: 7-10; H still waits for day 15
    got = check_plan(progressed(), [5, 3, 3, 2], starts=LEFT_EARLY, claimed_finish=18, claimed_cost=200.0)
    assert close(got.cost, 200) and got.added_costs == (0.0, 200.0, 0.0, 0.0)


def test_started_work_shortened_beyond_its_remaining_allowance_is_refused():
    # G may lose 2 of its 5 days left (hand-worked in progressed), not 3
    with refused("G: 2 working days is below 3: started with 5 days left, it may be shortened by 2"):
        check_plan(progressed(), [5, 2, 3, 2], claimed_finish=18, claimed_cost=300.0)


@pytest.mark.parametrize("remaining, room", [
    # the progress.py rule: crash allowance x days left / duration, rounded down (hand-worked)
    (5, 2),  # 4 x 5 / 10 = 2
    (3, 1),  # 4 x 3 / 10 = 1.2 -> 1
    (4, 1),  # 4 x 4 / 10 = 1.6 -> 1
    (2, 0),  # 4 x 2 / 10 = 0.8 -> 0
])
def test_started_work_keeps_its_share_of_the_allowance_rounded_down(remaining, room):
    p = progressed()
    g = dataclasses.replace(p.activities[1], remaining=remaining)
    project = dataclasses.replace(p, activities=(p.activities[0], g) + p.activities[2:])
    # G from the data date (7) for its days left; H still waits for day 15: finish 18
    got = check_plan(project, [5, remaining - room, 3, 2], claimed_finish=18, claimed_cost=100.0 * room)
    assert close(got.cost, 100 * room)
    with refused(f"G: {remaining - room - 1} working days is below {remaining - room}"):
        check_plan(project, [5, remaining - room - 1, 3, 2], claimed_finish=18, claimed_cost=100.0 * (room + 1))


def test_a_plan_that_ignores_progress_is_refused():
    # G scheduled for its whole 10 days instead of the 5 left
    with refused("G: 10 working days is more than the 5 days it has left (it is started)"):
        check_plan(progressed(), [5, 10, 3, 2], claimed_finish=22, claimed_cost=0.0)
    # K started straight after F (day 5, Mon 01-08), before the data date (day 7)
    with refused("K starts on day 5 (2024-01-08), before the data date 2024-01-10 (day 7)"):
        check_plan(progressed(), LEFT, starts=[0, 7, 15, 5], claimed_finish=18, claimed_cost=0.0)
    # G's remaining work resumed before the data date
    with refused("G starts on day 6 (2024-01-09), before the data date 2024-01-10 (day 7)"):
        check_plan(progressed(), LEFT, starts=[0, 6, 15, 7], claimed_finish=18, claimed_cost=0.0)


def test_a_not_before_date_ignored_is_refused():
    # H straight after G (day 12, Wed 01-17), before its not-before date Mon 01-22 (day 15);
    # the forward pass then finishes on day 18, not 15
    with refused("H starts on day 12 (2024-01-17), before its not-before date 2024-01-22 (day 15)"):
        check_plan(progressed(), LEFT, starts=[0, 7, 12, 7], claimed_finish=18, claimed_cost=0.0)
    with refused("the plan finishes on day 18 by its forward pass, not on day 15 as claimed"):
        check_plan(progressed(), LEFT, claimed_finish=15, claimed_cost=0.0)


def test_finished_work_moved_is_refused():
    with refused("finished F moved from its actual dates: it starts on day 1, not on day 0"):
        check_plan(progressed(), LEFT, starts=[1, 7, 15, 7], claimed_finish=18, claimed_cost=0.0)
    with refused("F: 4 working days, but it is finished: its actual dates span 5 days"):
        check_plan(progressed(), [4, 5, 3, 2], claimed_finish=18, claimed_cost=0.0)


def test_an_out_of_sequence_link_no_longer_holds_back():
    # hand-worked of our own: P 4 days started Tue 01-09 (day 6), 2 days left; Q 3 days
    # after P (FS) actually started Mon 01-08 (day 5) with 1 day left: Q started before P
    # finished, so P -> Q no longer holds; data date Wed 01-10 = day 7: P 7-9, Q 7-8
    project = make_project(
        [Activity("P", 4, actual_start=date(2024, 1, 9), remaining=2),
         Activity("Q", 3, actual_start=date(2024, 1, 8), remaining=1)],
        [Link("P", "Q")], data_date=date(2024, 1, 10))
    checker = PlanChecker(project)
    assert checker.dropped == {0}
    got = checker.check([2, 1], starts=[7, 7], claimed_finish=9, claimed_cost=0.0)
    assert got.starts == (7, 7) and got.finish == 9


def late_milestone() -> Project:
    """four_links with a milestone M after D (FS), deadline Tue 01-09, 50 a calendar day.

    Hand-worked: D ends at 9, so M is at 9, dated (as a project finish) on day 8 = Thu 01-11:
    2 calendar days late, damages 100. With A at 3 days D ends at 8: M dated day 7 = Wed
    01-10, 1 day late, 50.
    """
    p = four_links()
    return dataclasses.replace(
        p, activities=p.activities + (Activity("M", 0, deadline=date(2024, 1, 9), damages_per_day=50.0),),
        links=p.links + (Link("D", "M"),))


def test_milestone_damages_are_summed_and_a_misstatement_refused():
    got = check_plan(late_milestone(), NORMAL + [0], claimed_finish=9, claimed_cost=0.0, claimed_damages=100.0)
    assert close(got.damages, 100) and got.starts[-1] == 9
    got = check_plan(late_milestone(), [3, 3, 5, 2, 3, 0], claimed_finish=8, claimed_cost=100.0,
                     claimed_damages=50.0)
    assert close(got.damages, 50)
    with refused("the milestone damages sum to 100.00, not 0.00 as claimed"):
        check_plan(late_milestone(), NORMAL + [0], claimed_finish=9, claimed_cost=0.0)
    with refused("the milestone damages sum to 100.00, not 150.00 as claimed"):
        check_plan(late_milestone(), NORMAL + [0], claimed_finish=9, claimed_cost=0.0, claimed_damages=150.0)


def test_a_missed_deadline_is_refused_when_strict():
    with refused("M reaches 2024-01-11, 2 calendar day(s) after its deadline 2024-01-09"):
        check_plan(late_milestone(), NORMAL + [0], claimed_finish=9, claimed_cost=0.0, claimed_damages=100.0,
                   strict=True)
    # a deadline over a weekend: W 6 days, Mon 01-01 .. Mon 01-08 (days 0-6); M at 6 is
    # dated on day 5 = Mon 01-08, 3 calendar days after Fri 01-05; a deadline without
    # damages costs nothing but binds a strict plan
    project = make_project([Activity("W", 6), Activity("M", 0, deadline=date(2024, 1, 5))], [Link("W", "M")])
    assert check_plan(project, [6, 0], claimed_finish=6, claimed_cost=0.0).damages == 0
    with refused("M reaches 2024-01-08, 3 calendar day(s) after its deadline 2024-01-05"):
        check_plan(project, [6, 0], claimed_finish=6, claimed_cost=0.0, strict=True)
    # W at 5 days ends Fri 01-05: M dated Fri 01-05, on time
    project = dataclasses.replace(project, activities=(Activity("W", 6, crash_duration=5, crash_cost=9.0),
                                                       project.activities[1]))
    assert check_plan(project, [5, 0], claimed_finish=5, claimed_cost=9.0, strict=True).finish == 5


def test_damages_are_those_of_the_dates_given():
    # four_links with a milestone N after E (FS), deadline Mon 01-08, 10 a calendar day.
    # Hand-worked: E ends at 6, so N's early date is 6, dated on day 5 = Mon 01-08: on time.
    # Held back to 7 (finish still 9), it is dated on day 6 = Tue 01-09: 1 day late, 10.
    p = four_links()
    project = dataclasses.replace(
        p, activities=p.activities + (Activity("N", 0, deadline=date(2024, 1, 8), damages_per_day=10.0),),
        links=p.links + (Link("E", "N"),))
    assert check_plan(project, NORMAL + [0], claimed_finish=9, claimed_cost=0.0).damages == 0
    got = check_plan(project, NORMAL + [0], starts=EARLY + [7], claimed_finish=9, claimed_cost=0.0,
                     claimed_damages=10.0)
    assert close(got.damages, 10) and got.starts[-1] == 6
    with refused("the milestone damages sum to 10.00, not 0.00 as claimed"):
        check_plan(project, NORMAL + [0], starts=EARLY + [7], claimed_finish=9, claimed_cost=0.0)


# -- milestones at a point in time (README "Method", "Milestones"; hand-worked, our own) --

def test_a_notice_to_proceed_and_work_the_same_day_are_in_sequence():
    # NTP happened on Mon 01-01: at the start of that day, day 0; SET (FS after it) started
    # the same day, 0 >= 0 + 0: the link holds. Data date Mon 01-08 = day 5: SET's 2 days
    # left run 5-7. (Under the old rule NTP sat at the end of its day, 1, and broke the link.)
    project = make_project([
        Activity("NTP", 0, actual_start=date(2024, 1, 1), actual_finish=date(2024, 1, 1)),
        Activity("SET", 5, actual_start=date(2024, 1, 1), remaining=2),
    ], [Link("NTP", "SET")], data_date=date(2024, 1, 8))
    checker = PlanChecker(project)
    assert checker.dropped == frozenset()
    got = checker.check([0, 2], starts=[0, 5], claimed_finish=7, claimed_cost=0.0)
    assert got.starts == (0, 5) and got.finish_date == date(2024, 1, 9)  # day 6
    with refused("finished NTP moved from its actual dates: it starts on day 1, not on day 0"):
        checker.check([0, 2], starts=[1, 5], claimed_finish=7, claimed_cost=0.0)


def test_a_milestone_dated_on_its_predecessors_last_day_happens_at_its_end():
    # ROOF worked Mon 01-08 .. Wed 01-10: days 5-7, finish 8. DRY (FS after ROOF) dated
    # 01-10 (day 7): ROOF ends after the start of that day (8 > 7), so DRY happened at its
    # end, 8. FIT (FS after DRY) started 01-10 = 7 < 8: out of sequence, the link (index 1)
    # no longer holds; GO (FS after DRY) started Thu 01-11 = 8 >= 8: in sequence. Data date
    # Mon 01-15 = day 10: FIT and GO run their 3 days left 10-13.
    project = make_project([
        Activity("ROOF", 3, actual_start=date(2024, 1, 8), actual_finish=date(2024, 1, 10)),
        Activity("DRY", 0, actual_start=date(2024, 1, 10), actual_finish=date(2024, 1, 10)),
        Activity("FIT", 5, actual_start=date(2024, 1, 10), remaining=3),
        Activity("GO", 5, actual_start=date(2024, 1, 11), remaining=3),
    ], [Link("ROOF", "DRY"), Link("DRY", "FIT"), Link("DRY", "GO")], data_date=date(2024, 1, 15))
    checker = PlanChecker(project)
    assert checker.dropped == {1}
    got = checker.check([3, 0, 3, 3], starts=[5, 8, 10, 10], claimed_finish=13, claimed_cost=0.0)
    assert got.starts == (5, 8, 10, 10)


def test_a_milestone_before_the_project_start_is_history():
    # NTP dated Fri 2023-12-29, the working day before day 0: position -1; SET (FS) started
    # Mon 01-01 = 0 >= -1. Data date Mon 01-08 = day 5: SET 5-7.
    project = make_project([
        Activity("NTP", 0, actual_start=date(2023, 12, 29), actual_finish=date(2023, 12, 29)),
        Activity("SET", 5, actual_start=date(2024, 1, 1), remaining=2),
    ], [Link("NTP", "SET")], data_date=date(2024, 1, 8))
    got = check_plan(project, [0, 2], starts=[-1, 5], claimed_finish=7, claimed_cost=0.0)
    assert got.starts == (-1, 5) and got.finish == 7


def delivery(order: int, deadline: date) -> Project:
    """ORD (``order`` days, one day of crashing at 10) -> DEL (not before Mon 01-15 =
    day 10; deadline; 50 a calendar day) -> ERE (2 days)."""
    return make_project([
        Activity("ORD", order, crash_duration=order - 1, cost=0.0, crash_cost=10.0),
        Activity("DEL", 0, not_before=date(2024, 1, 15), deadline=deadline, damages_per_day=50.0),
        Activity("ERE", 2),
    ], [Link("ORD", "DEL"), Link("DEL", "ERE")])


def test_a_delivery_held_by_its_not_before_date_is_dated_on_that_day():
    # ORD 3 days ends at 3; DEL may not happen before the start of day 10 (Mon 01-15): it is
    # dated Mon 01-15, 3 calendar days after its deadline Fri 01-12: 150, whether or not ORD
    # is shortened. ERE 10-12: finish 12, dated day 11 = Tue 01-16.
    for d, cost in (([3, 0, 2], 0.0), ([2, 0, 2], 10.0)):
        got = check_plan(delivery(3, date(2024, 1, 12)), d, claimed_finish=12, claimed_cost=cost,
                         claimed_damages=150.0)
        assert got.starts == (0, 10, 10) and got.finish_date == date(2024, 1, 16)
    with refused("the milestone damages sum to 150.00, not 0.00 as claimed"):
        check_plan(delivery(3, date(2024, 1, 12)), [3, 0, 2], claimed_finish=12, claimed_cost=0.0)
    # with its deadline on Mon 01-15 it is on time
    assert check_plan(delivery(3, date(2024, 1, 15)), [3, 0, 2], claimed_finish=12, claimed_cost=0.0,
                      strict=True).damages == 0


def test_a_delivery_driven_by_its_predecessor_is_dated_on_the_day_it_ends():
    # ORD 13 days ends at 13 (after day 10): DEL is dated on ORD's last day, 12 = Wed 01-17,
    # 1 calendar day after a deadline of Tue 01-16: 50; ORD at 12 days ends Tue 01-16: on time
    project = delivery(13, date(2024, 1, 16))
    assert close(check_plan(project, [13, 0, 2], claimed_finish=15, claimed_cost=0.0,
                            claimed_damages=50.0).damages, 50)
    assert check_plan(project, [12, 0, 2], claimed_finish=14, claimed_cost=10.0, strict=True).damages == 0


def test_a_job_ending_on_a_not_before_milestone_is_dated_on_its_day():
    # A (3 days) -> HAND (not before Mon 01-15 = day 10): finish 10; HAND happens at the
    # start of Mon 01-15, so the finish is dated 01-15, not Fri 01-12 (day 9)
    project = make_project([Activity("A", 3), Activity("HAND", 0, not_before=date(2024, 1, 15))],
                           [Link("A", "HAND")])
    assert check_plan(project, [3, 0], claimed_finish=10, claimed_cost=0.0).finish_date == date(2024, 1, 15)
    with refused("the plan's finish is dated 2024-01-15, not 2024-01-12 as claimed"):
        check_plan(project, [3, 0], claimed_finish=10, claimed_cost=0.0, claimed_finish_date=date(2024, 1, 12))


# -- figures shown with a plan, each compared ---------------------------------------------

def test_starts_shown_as_early_starts_must_be_the_early_starts():
    # four_links: E may start at 3 (hand-worked); shown at 4 it keeps every link and the
    # finish, but it is not E's early start
    starts = EARLY[:4] + [4]
    check_plan(four_links(), NORMAL, starts=starts, claimed_finish=9, claimed_cost=0.0)
    with refused("E is shown starting on day 4, but its early start is day 3"):
        check_plan(four_links(), NORMAL, starts=starts, early=True, claimed_finish=9, claimed_cost=0.0)


def test_a_cost_per_activity_misstated_is_refused():
    # A at 3 days adds 100 (hand-worked above); claimed on B instead, the sum still 100
    d = [3, 3, 5, 2, 3]
    check_plan(four_links(), d, claimed_finish=8, claimed_cost=100.0, claimed_costs=[100.0, 0, 0, 0, 0])
    with refused("A adds 100.00, not 0.00 as claimed"):
        check_plan(four_links(), d, claimed_finish=8, claimed_cost=100.0, claimed_costs=[0, 100.0, 0, 0, 0])


def options_project() -> Project:
    """Hand-worked of our own: S 6 days (crash 4 at 30 a day) with one option, a second
    crew: 3 days for 300, further down to 2 days at 50 a day; T 2 days started
    Tue 01-02 (day 1) with 1 day left, data date Wed 01-03 = day 2."""
    return make_project(
        [Activity("S", 6, crash_duration=4, cost=0, crash_cost=60,
                  options=(Option("second crew", 3, 300.0, crash_duration=2, cost_per_day=50.0),)),
         Activity("T", 2, actual_start=date(2024, 1, 2), remaining=1,
                  options=(Option("night shift", 1, 10.0),))],
        [], data_date=date(2024, 1, 3))


def test_an_option_is_priced_and_an_invalid_option_refused():
    # second crew at 2 days: 300 + 50 x (3 - 2) = 350; S from the data date: 2-4
    got = check_plan(options_project(), [2, 1], choices=[0, -1], claimed_finish=4, claimed_cost=350.0)
    assert close(got.cost, 350) and got.starts == (2, 2)
    with refused("S: 1 working days is outside its option 'second crew''s range 2..3"):
        check_plan(options_project(), [1, 1], choices=[0, -1], claimed_finish=3, claimed_cost=400.0)
    with refused("S has no option index 1; it has 1 option(s), numbered from 0 (-1: none)"):
        check_plan(options_project(), [6, 1], choices=[1, -1], claimed_finish=8, claimed_cost=0.0)
    with refused("S has no option index -2"):
        check_plan(options_project(), [6, 1], choices=[-2, -1], claimed_finish=8, claimed_cost=0.0)
    # options are for work not started
    with refused("T is started: no option can be chosen for it (option index 0)"):
        check_plan(options_project(), [6, 1], choices=[-1, 0], claimed_finish=8, claimed_cost=10.0)


def own_calendars() -> Project:
    """Hand-worked of our own, from Mon 3 Mar 2025: A (Mon-Fri) 5 days Mon 3 - Fri 7;
    B (every day) 3 days after A (FS): the first every-day morning after Fri 7's evening is
    Sat 8 = its day 5, Sat 8 - Mon 10 (5-8); C (Mon-Fri) 2 days after B: the first Mon-Fri
    morning after Mon 10's evening is Tue 11 = day 6, Tue 11 - Wed 12 (6-8). Finish: Wed 12
    evening = 8 Mon-Fri days. With B 2 days (Sat, Sun) and no C, B's last day Sun 9 finishes
    the project at the end of the next Mon-Fri day, Mon 10: 6 days."""
    acts = (Activity("A", 5), Activity("B", 3, crash_duration=2, cost=0, crash_cost=70, calendar="crane"),
            Activity("C", 2))
    return Project("calendars", date(2025, 3, 3), acts, (Link("A", "B"), Link("B", "C")), calendars=(CRANE,))


def test_links_between_calendars_through_dates():
    got = check_plan(own_calendars(), [5, 3, 2], starts=[0, 5, 6], claimed_finish=8, claimed_cost=0.0)
    assert got.starts == (0, 5, 6)
    with refused("link A -> B (FS) is broken: B starts at day 4, the link needs day 5 or later"):
        check_plan(own_calendars(), [5, 3, 2], starts=[0, 4, 6], claimed_finish=8, claimed_cost=0.0)
    with refused("link B -> C (FS) is broken: C starts at day 5, the link needs day 6 or later"):
        check_plan(own_calendars(), [5, 3, 2], starts=[0, 5, 5], claimed_finish=8, claimed_cost=0.0)
    # B at 2 days (70): ends Sun 9; C's first morning after is Mon 10 = day 5: 5-7
    got = check_plan(own_calendars(), [5, 2, 2], claimed_finish=7, claimed_cost=70.0)
    assert got.starts == (0, 5, 5)


@pytest.mark.parametrize("kind, x, not_before, y, starts, finish", [
    # Hand-worked of our own, from Mon 3 Mar 2025; X works every day (Mon 3 = its day 0,
    # Sat 8 = 5, Sun 9 = 6), Y Mon-Fri (Mon 3 = 0 ... Fri 7 = 4, Mon 10 = 5).
    # SS+1: X starts on the morning of Mon 3; Y's first Mon-Fri morning not before it is
    # Mon 3 (0), plus 1 of Y's days: Tue 4 (1). Both end Tue 4: finish 2.
    (SS, 2, None, 1, (0, 1), 2),
    # FF: X Mon 3 - Sat 8 ends on Saturday's evening; Y's first Mon-Fri day's end not before
    # it is Mon 10's (finish 6), so Y (2 days) starts on day 4, Fri 7. X's Saturday finish
    # ends the project at the end of Mon 10: finish 6.
    (FF, 6, None, 2, (0, 4), 6),
    # SF: X not before Sun 9 (its day 6); the boundary before its first day is Saturday's
    # evening; Y's first Mon-Fri day's end not before it is Mon 10's (finish 6): Y (1 day)
    # starts on day 5, Mon 10. X ends Sun 9: the project at the end of Mon 10, finish 6.
    (SF, 1, date(2025, 3, 9), 1, (6, 5), 6),
])
def test_each_link_type_between_calendars(kind, x, not_before, y, starts, finish):
    project = Project("across", date(2025, 3, 3), (Activity("X", x, calendar="crane", not_before=not_before),
                                                  Activity("Y", y)), (Link("X", "Y", kind, 1 if kind is SS else 0),),
                      calendars=(CRANE,))
    got = check_plan(project, [x, y], starts=starts, claimed_finish=finish, claimed_cost=0.0)
    assert got.starts == starts and got.finish == finish
    with refused(f"link X -> Y ({kind.value}{'+1' if kind is SS else ''}) is broken"):
        check_plan(project, [x, y], starts=(starts[0], starts[1] - 1), claimed_finish=finish, claimed_cost=0.0)


def test_an_sf_link_into_every_day_work_leaves_the_evening_before_the_start():
    # Hand-worked of our own, from Mon 3 Mar 2025: X (Mon-Fri) 1 day, not before Mon 10 (its
    # day 5); Y (every day, Fri 7 = its day 4) 1 day; X -SF-> Y. The boundary before X's first
    # day is Fri 7's evening (README "Method": an SF link leaves the evening before), so Y
    # must finish by the end of a day not before it: Fri 7's end (5); Y runs Fri 7 (day 4).
    # Taken at Mon 10's morning instead, Y would have to end Sun 9 (start day 6).
    # Finish: X ends Mon 10 = Mon-Fri day 6; Y's Friday ends day 5: finish 6.
    project = Project("sf across", date(2025, 3, 3), (Activity("X", 1, not_before=date(2025, 3, 10)),
                                                     Activity("Y", 1, calendar="crane")),
                      (Link("X", "Y", SF),), calendars=(CRANE,))
    got = check_plan(project, [1, 1], claimed_finish=6, claimed_cost=0.0)
    assert got.starts == (5, 4) and got.finish == 6
    with refused("link X -> Y (SF) is broken: Y finishes at day 4, the link needs day 5 or later"):
        check_plan(project, [1, 1], starts=(5, 3), claimed_finish=6, claimed_cost=0.0)
    assert Network(project).forward(Network(project).durations) == [5, 4]  # the optimiser side agrees


def test_weekend_work_finishes_the_project_on_the_next_working_day():
    p = own_calendars()
    project = dataclasses.replace(p, activities=p.activities[:2], links=p.links[:1])
    assert check_plan(project, [5, 2], claimed_finish=6, claimed_cost=70.0).finish == 6
    with refused("the plan finishes on day 6 by its forward pass, not on day 5 as claimed"):
        check_plan(project, [5, 2], claimed_finish=5, claimed_cost=70.0)


# ---------------------------------------------------------------------------------------
# 3. Published examples: the published plan is accepted with its published cost
# ---------------------------------------------------------------------------------------

QUES10 = load_json("examples/ques10_indirect80.json")


@pytest.mark.parametrize("finish, cuts, cost", [
    # ques10.com worked solution (verified text): 22 days: C by 1 for 40; 18 days: + F by 4,
    # 280; 17 days: + F by 1 and G by 1, 420 (slopes C 40, F 60, G 80)
    (23, {}, 0.0),
    (22, {"C": 1}, 40.0),
    (18, {"C": 1, "F": 4}, 280.0),
    (17, {"C": 1, "F": 5, "G": 1}, 420.0),
])
def test_ques10_published_stages_are_accepted(finish, cuts, cost):
    project = project_from_example(QUES10)
    d = [a.duration - cuts.get(a.id, 0) for a in project.activities]
    got = check_plan(project, d, claimed_finish=finish, claimed_cost=cost, target=finish)
    assert got.finish == finish and close(got.cost, cost)
    with refused(f"not on day {finish - 1} as claimed"):
        check_plan(project, d, claimed_finish=finish - 1, claimed_cost=cost)


def test_reliable_published_plan_is_accepted_from_memory():
    # Hillier & Lieberman, Reliable Construction Co. (from memory, unverified): 40 weeks by
    # crashing J and F 2 weeks each for 140,000 (J 30,000 a week, F 40,000 a week)
    project = project_from_example(load_json("examples/hillier_lieberman_reliable.json"))
    cuts = {"J": 2, "F": 2}
    d = [a.duration - cuts.get(a.id, 0) for a in project.activities]
    got = check_plan(project, d, claimed_finish=40, claimed_cost=140_000.0, target=40)
    assert got.finish == 40 and close(got.cost, 140_000)
    with refused("the added cost sums to 140000.00, not 110000.00 as claimed"):  # a week of J less
        check_plan(project, d, claimed_finish=40, claimed_cost=110_000.0)


def test_odeh_fs_lags_early_starts():
    # Odeh, Construction Scheduling, Example 3 (FS lags): early starts and duration 22 from
    # the data authors' own pass (odeh_lags_numbers.json, independent_check); EF of A = 2 verified
    example = load_json("examples/odeh_lags_numbers.json")["fs_lags"]
    project = project_from_numbers(example["activities"])
    expected = example["independent_check"]
    d = [a.duration for a in project.activities]
    got = check_plan(project, d, claimed_finish=expected["project_duration"], claimed_cost=0.0)
    assert dict(zip((a.id for a in project.activities), got.starts)) == expected["ES"]


def test_the_examples_in_the_docstrings_run():
    import doctest

    import hasten.plan_check

    assert doctest.testmod(hasten.plan_check).failed == 0


# ---------------------------------------------------------------------------------------
# 4. Wired into the planner: a wrong figure on the optimiser side stops the plan
# ---------------------------------------------------------------------------------------
# The ques10.com worked solution (verified text, above): 22 days by shortening C one day
# for 40. Each test makes one piece of the optimiser side misreport by one day (or move one
# day's cost) and Planner.plan must refuse with the check's own figure in the message.

def ques10_planner():
    from hasten.planner import Planner

    planner = Planner(project_from_example(QUES10))
    assert planner.normal_finish == 23
    plan = planner.plan(22)  # the honest plan passes
    assert plan.finish == 22 and close(plan.added_cost, 40.0)
    return planner


def test_the_planner_refuses_a_solver_cost_a_day_short(monkeypatch):
    planner = ques10_planner()
    solve = planner._solve

    def short(*args, **kwargs):
        sol = solve(*args, **kwargs)
        return dataclasses.replace(sol, added_cost=sol.added_cost - 40.0)  # one day of C left out
    monkeypatch.setattr(planner, "_solve", short)
    with refused("the added cost sums to 40.00, not 0.00 as claimed"):
        planner.plan(22)
    # every day of the curve is checked too: the first one solved (23 days, nothing added)
    with refused("the added cost sums to 0.00, not -40.00 as claimed"):
        planner.curve(longest=22, shortest=22)


def test_the_planner_refuses_a_network_finish_a_day_late(monkeypatch):
    planner = ques10_planner()
    finish_of = Network.finish_of
    monkeypatch.setattr(Network, "finish_of", lambda self, es, d: finish_of(self, es, d) + 1)
    with refused("the plan finishes on day 22 by its forward pass, not on day 23 as claimed"):
        planner.plan(22)


def test_the_planner_refuses_a_network_pass_that_starts_one_activity_a_day_late(monkeypatch):
    planner = ques10_planner()
    forward = Network.forward
    last = len(planner.project.activities) - 1

    def late(self, d):
        es = forward(self, d)
        es[last] += 1
        return es
    monkeypatch.setattr(Network, "forward", late)
    with refused(f"{planner.project.activities[last].id} is shown starting on day"):
        planner.plan(22)


def test_the_planner_refuses_a_finish_date_a_day_early(monkeypatch):
    planner = ques10_planner()
    finish_date = Network.finish_date
    monkeypatch.setattr(Network, "finish_date", lambda self, f: finish_date(self, f) - timedelta(days=1))
    with refused("the plan's finish is dated"):
        planner.plan(22)


def test_the_planner_refuses_costs_per_activity_on_the_wrong_activity(monkeypatch):
    planner = ques10_planner()
    c = [a.id for a in planner.project.activities].index("C")
    added_costs = PlanCosts.added_costs

    def moved(self, d, choices=None):
        out = added_costs(self, d, choices)
        out[c - 1], out[c] = out[c], out[c - 1]  # C's 40 shown on the activity before it
        return out
    monkeypatch.setattr(PlanCosts, "added_costs", moved)
    with refused("adds 0.00, not 40.00 as claimed"):
        planner.plan(22)


def test_the_planner_refuses_milestone_damages_misstated(monkeypatch):
    from hasten.planner import Planner

    # late_milestone (hand-worked above): at normal durations M is 2 calendar days late, 100
    planner = Planner(late_milestone())
    assert close(planner.plan(9).milestone_damages, 100)
    damages = PlanCosts.milestone_damages
    monkeypatch.setattr(PlanCosts, "milestone_damages", lambda self, f: damages(self, f) - 50.0)
    with refused("the milestone damages sum to 100.00, not 50.00 as claimed"):
        planner.plan(9)


def test_finished_work_past_its_deadline_does_not_stop_a_plan():
    # Hand-worked of our own: F (5 days) finished Mon 01-01 .. Fri 01-05, 2 calendar days
    # after its deadline Wed 01-03 (10 a day: history); G (5 days, down to 3 at 20 a day)
    # after F from the data date Mon 01-08 = day 5: normal finish 10. Finishing by 9 takes
    # a day off G for 20; the damages of work not finished are 0. (The old check priced F's
    # history and refused every plan of such a project.)
    from hasten.planner import Planner
    from hasten.recovery import recovery

    project = make_project([
        Activity("F", 5, actual_start=date(2024, 1, 1), actual_finish=date(2024, 1, 5),
                 deadline=date(2024, 1, 3), damages_per_day=10.0),
        Activity("G", 5, crash_duration=3, cost=0.0, crash_cost=40.0),
    ], [Link("F", "G")], data_date=date(2024, 1, 8))
    planner = Planner(project)
    plan = planner.plan(9)
    assert (plan.finish, plan.milestone_damages) == (9, 0.0) and close(plan.added_cost, 20)
    assert recovery(planner).courses[0].milestone_damages == 0.0


def test_a_plan_stopped_by_a_time_limit_is_checked_the_same_way(monkeypatch):
    # a plan the solver could not prove optimal (a MILP stopped by its time limit) is shown
    # as not proven, with its figures checked as any plan's; a wrong figure still stops it
    planner = ques10_planner()
    solve = planner._solve

    def unproven(*args, **kwargs):
        return dataclasses.replace(solve(*args, **kwargs), proven=False, bound=0.0, gap=1.0)
    monkeypatch.setattr(planner, "_solve", unproven)
    plan = planner.plan(22)
    assert not plan.proven and plan.next_day_cost is None and close(plan.added_cost, 40.0)

    def unproven_and_wrong(*args, **kwargs):
        sol = unproven(*args, **kwargs)
        return dataclasses.replace(sol, added_cost=sol.added_cost + 40.0)
    monkeypatch.setattr(planner, "_solve", unproven_and_wrong)
    with refused("the added cost sums to 40.00, not 80.00 as claimed"):
        planner.plan(22)


def test_a_day_of_a_curve_claims_no_finish_but_must_meet_its_day():
    # a curve day claims no finish (claimed_finish None), only that it finishes by its day.
    # Hand-worked: A (5 days, down to 3 for 20) then B (4 days). A at 4 days: A 0-4, B 4-8,
    # finish 8, added 10. By day 8 it passes; by day 7 it is refused.
    job = make_project([Activity("A", 5, crash_duration=3, crash_cost=20.0), Activity("B", 4)], [Link("A", "B")])
    checker = PlanChecker(job)
    assert checker.check([4, 4], target=8, claimed_finish=None, claimed_cost=10.0).finish == 8
    with pytest.raises(PlanCheckError, match="after the target, day 7"):
        checker.check([4, 4], target=7, claimed_finish=None, claimed_cost=10.0)
