"""Activities on calendars of their own (hasten.calendar.Timeline, the CPM passes, the
optimiser and the plan check).

Sources of the checks:

- the definitions written out here with Python dates and linear scans (no numpy):
  each calendar's working days listed day by day; a predecessor's finish happens on the
  evening of its last day, an SS start on the morning of its first day; the successor
  takes the first of its own working days (or day ends, for a finish) not before that
  moment, then counts the lag in its own working days; the project finish is the end of
  the project working day on or after the last day worked. These are the rules of
  DEVELOPERS.md / hasten.calendar.Timeline ("links and lags count in the successor's
  calendar", as the issue asks), checked here by an implementation of our own;
- a hand-worked example of our own (arithmetic in the test);
- brute force over every whole-day duration vector for the least cost (as in
  tests/test_crashing_properties.py) on random small projects with mixed calendars;
- networkx: with every activity on one calendar the schedule is unchanged.
"""

from __future__ import annotations

import itertools
from datetime import date, timedelta

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from conftest import PROPERTY, TOL, make_project, nx_cpm, slope
from hasten.calendar import Timeline
from hasten.plan_check import check_plan
from hasten.planner import Planner
from hasten.project import Activity, Calendar, Link, LinkType, Project
from hasten.cpm import schedule
from hasten.network import Network
from hasten.crash_calendars import Relation as _Relation

START = date(2025, 3, 3)  # a Monday
ONE = timedelta(days=1)
FS, SS, FF, SF = LinkType.FS, LinkType.SS, LinkType.FF, LinkType.SF


# -- the reference: working days listed one by one -------------------------------------
class Days:
    """Working days of one calendar as a list; position k = index into it (day 0 = the
    first working day on or after the project start)."""

    def __init__(self, cal: Calendar, start: date, before: int = 80, after: int = 400):
        back, day = [], start - ONE
        while len(back) < before:
            if day.weekday() in cal.workdays and day not in cal.holidays:
                back.append(day)
            day -= ONE
        ahead, day = [], start
        while len(ahead) < after:
            if day.weekday() in cal.workdays and day not in cal.holidays:
                ahead.append(day)
            day += ONE
        self.days = back[::-1] + ahead
        self.zero = len(back)

    def S(self, k: int) -> date:  # morning of working day k
        return self.days[self.zero + k]

    def F(self, k: int) -> date:  # evening of working day k - 1, as the next morning
        return self.days[self.zero + k - 1] + ONE

    def first_start(self, moment: date) -> int:
        return next(k for k in range(-self.zero, len(self.days) - self.zero) if self.S(k) >= moment)

    def first_finish(self, moment: date) -> int:
        return next(k for k in range(-self.zero + 1, len(self.days) - self.zero) if self.F(k) >= moment)


def reference_forward(project: Project, durations: dict[str, int],
                      release: dict[str, int] | None = None) -> tuple[dict, int]:
    """Early starts (each in its own calendar) and the project finish, by the rules above;
    ``release``: starts no earlier than these positions."""
    days = {"": Days(project.calendar, project.start)}
    for cal in project.calendars:
        days[cal.name] = Days(cal, project.start)
    own = {a.id: days[a.calendar] for a in project.activities}
    preds = {a.id: [k for k in project.links if k.succ == a.id] for a in project.activities}
    es: dict[str, int] = {}
    left = [a.id for a in project.activities]
    while left:
        j = next(x for x in left if all(k.pred in es for k in preds[x]))
        left.remove(j)
        best = (release or {}).get(j, 0)
        for k in preds[j]:
            i, di = k.pred, durations[k.pred]
            if k.type is SS:
                moment = own[i].S(es[i])
            else:  # FS, FF: the predecessor's finish; SF: the boundary before its first day
                moment = own[i].F(es[i] + di if k.type in (FS, FF) else es[i])
            if k.type in (FS, SS):
                best = max(best, own[j].first_start(moment) + k.lag)
            else:
                best = max(best, own[j].first_finish(moment) + k.lag - durations[j])
        es[j] = best
    finish = max([0] + [days[""].first_finish(own[a.id].F(es[a.id] + durations[a.id]))
                        for a in project.activities])  # (never before the start)
    return es, finish


# -- conversions -------------------------------------------------------------------------
@PROPERTY
@given(st.lists(st.sets(st.integers(0, 6), min_size=1), min_size=3, max_size=3),
       st.lists(st.integers(0, 40), max_size=4), st.integers(0, 6), st.data())
def test_conversions_follow_the_definitions(workdays, holiday_days, shift, data):
    holidays = tuple(sorted({START + timedelta(days=h) for h in holiday_days}))
    cals = [Calendar(tuple(sorted(w)), holidays if n else (), name)
            for n, (w, name) in enumerate(zip(workdays, ("p", "a", "b")))]
    project = Project("t", START + timedelta(days=shift), (Activity("x", 1, calendar="a"),
                                                           Activity("y", 1, calendar="b")),
                      calendar=cals[0], calendars=tuple(cals[1:]))
    timeline = Timeline(project)
    a, b = timeline.of
    da, db = Days(cals[1], project.start), Days(cals[2], project.start)
    for kind, first in ((0, db.first_start), (1, db.first_start), (2, db.first_finish),
                        (3, db.first_finish)):
        for k in data.draw(st.lists(st.integers(-5, 40), min_size=1, max_size=6)):
            moment = da.S(k) if kind == 1 else da.F(k)
            assert int(timeline.convert(a, b, k, kind)) == first(moment), (kind, k)
        # the inverse: the greatest position whose conversion stays within x
        for x in data.draw(st.lists(st.integers(0, 30), min_size=1, max_size=4)):
            latest = int(timeline.latest(a, b, x, kind))
            assert int(timeline.convert(a, b, latest, kind)) <= x < int(timeline.convert(a, b, latest + 1, kind))


# -- a hand-worked example of our own ----------------------------------------------------
CRANE = Calendar((0, 1, 2, 3, 4, 5, 6), (), "crane")  # works every day
SIX = Calendar((0, 1, 2, 3, 4, 5), (), "six-day")


def hand_project() -> Project:
    acts = (Activity("A", 5, crash_duration=3, cost=1000, crash_cost=1400),  # 200 a day
            Activity("B", 3, crash_duration=2, cost=500, crash_cost=800, calendar="crane"),
            Activity("C", 2, cost=100),
            Activity("D", 4, crash_duration=2, cost=100, crash_cost=300, calendar="six-day"),
            Activity("M", 0))
    links = (Link("A", "B"), Link("B", "C"), Link("A", "D", SS, 2), Link("D", "M"), Link("C", "M"))
    return Project("hand", START, acts, links, calendars=(CRANE, SIX))


def test_hand_worked_schedule_on_three_calendars():
    # A (Mon-Fri) Mon 3 - Fri 7 Mar. B (every day) starts the morning after: Sat 8, Sun 9,
    # Mon 10. C (Mon-Fri) Tue 11 - Wed 12. D (six-day) SS+2 after A's start Mon 3: Mon 3
    # plus 2 of its days = Wed 5; 4 days Wed 5 - Sat 8. M after C and D: end of Wed 12.
    # Project: Mon 3 .. Wed 12 = 8 working days of Mon-Fri. D may finish as late as Wed 12:
    # Mon 10, Tue 11, Wed 12 = 3 six-day days of float.
    project = hand_project()
    net = Network(project)
    sched = schedule(net)
    by = sched.by_id()
    assert sched.finish == 8
    clock = {a.id: net.timeline.clock_of(k) for k, a in enumerate(project.activities)}
    assert [clock["B"].date_of(by["B"].es), clock["B"].date_of(by["B"].ef - 1)] == [date(2025, 3, 8), date(2025, 3, 10)]
    assert [clock["C"].date_of(by["C"].es), clock["C"].date_of(by["C"].ef - 1)] == [date(2025, 3, 11), date(2025, 3, 12)]
    assert [clock["D"].date_of(by["D"].es), clock["D"].date_of(by["D"].ef - 1)] == [date(2025, 3, 5), date(2025, 3, 8)]
    assert by["D"].total_float == 3 and not by["D"].critical
    assert sched.critical_paths == (("A", "B", "C", "M"),)


def test_hand_worked_crashing_meets_the_weekend():
    # One day off A (200): A Mon-Thu, B Fri-Sun, C Mon 10 - Tue 11: 7 working days.
    # Two days off A, or a day off B as well: B still ends on a weekend day, C still starts
    # Mon 10: 7 is the shortest, for 200.
    study = Planner(hand_project())
    assert (study.normal_finish, study.shortest_finish) == (8, 7)
    plan = study.plan(7)
    assert abs(plan.added_cost - 200) <= TOL
    assert {c.id: c.shortened_by for c in plan.changed} == {"A": 1}


# -- random projects against the reference ----------------------------------------------
@st.composite
def calendar_projects(draw, max_n: int = 5):
    n = draw(st.integers(2, max_n))
    names = ["", "crane", "six-day", "odd"]
    odd = Calendar(tuple(sorted(draw(st.sets(st.integers(0, 6), min_size=1)))),
                   (START + timedelta(days=draw(st.integers(0, 20))),), "odd")
    acts = []
    for i in range(n):
        d = draw(st.integers(0, 6))
        cut = draw(st.integers(0, min(d, 2)))
        acts.append(Activity(f"a{i}", d, crash_duration=d - cut, cost=10.0,
                             crash_cost=10.0 + cut * draw(st.integers(1, 9)),
                             calendar=draw(st.sampled_from(names))))
    pairs = st.tuples(st.integers(0, n - 1), st.integers(0, n - 1)).filter(lambda p: p[0] != p[1])
    raw = draw(st.lists(st.tuples(pairs, st.sampled_from(list(LinkType)), st.integers(-2, 3)),
                        max_size=7))
    links = [Link(f"a{min(p)}", f"a{max(p)}", t, lag) for p, t, lag in raw]
    project = make_project(acts, links, name="cals")
    return Project(project.name, START + timedelta(days=draw(st.integers(0, 6))), project.activities,
                   project.links, calendars=(CRANE, SIX, odd))


@PROPERTY
@given(calendar_projects(max_n=7))
def test_early_dates_and_finish_match_the_reference(project):
    net = Network(project)
    normal = {a.id: a.duration for a in project.activities}
    es, finish = reference_forward(project, normal)
    sched = schedule(net)
    assert {a.id: a.es for a in sched.activities} == es
    assert sched.finish == finish
    # late start: the latest start of each activity in any schedule that keeps the finish,
    # i.e. the greatest s whose reference forward pass with that activity held to s still
    # finishes by the finish
    for a in sched.activities:
        assert reference_forward(project, normal, {a.id: a.ls})[1] <= finish, a.id
        assert reference_forward(project, normal, {a.id: a.ls + 1})[1] > finish, a.id


@PROPERTY
@given(calendar_projects(max_n=5))
def test_least_cost_matches_brute_force(project):
    least_cost_matches_brute_force(project)


@PROPERTY
@given(calendar_projects(max_n=5))
def test_least_cost_matches_brute_force_with_narrow_windows(project):
    # the exact windows of the relations between calendars start at two days and must grow
    with pytest.MonkeyPatch.context() as mp:
        mp.setattr(_Relation, "MARGIN", 0)
        least_cost_matches_brute_force(project)


def least_cost_matches_brute_force(project):
    # and ties: among the least-cost plans the fewest shortened activities, then fewest days
    acts = project.activities
    combos = []
    for combo in itertools.product(*[range(a.shortest, a.duration + 1) for a in acts]):
        durations = dict(zip((a.id for a in acts), combo))
        _, finish = reference_forward(project, durations)
        cost = sum(slope(a) * (a.duration - durations[a.id]) for a in acts)
        cuts = [a.duration - durations[a.id] for a in acts]
        combos.append((finish, cost, sum(1 for c in cuts if c), sum(cuts)))
    study = Planner(project)
    assert study.normal_finish == reference_forward(project, {a.id: a.duration for a in acts})[1]
    assert study.shortest_finish == min(f for f, _, _, _ in combos)
    for target in range(study.shortest_finish, study.normal_finish + 1):
        expected = min(c for f, c, _, _ in combos if f <= target)
        fewest = min((n, k) for f, c, n, k in combos if f <= target and c <= expected + TOL)
        plan = study.plan(target)
        assert abs(plan.added_cost - expected) <= TOL * max(1.0, expected), target
        assert (len(plan.changed), sum(c.shortened_by for c in plan.activities)) == fewest, target
        durations = {c.id: c.duration for c in plan.activities}
        assert reference_forward(project, durations)[1] == plan.finish <= target
        starts = [a.es for a in plan.schedule.activities]
        # the independent check: the starts shown are its own early starts, finish and cost its own
        check_plan(project, [durations[a.id] for a in acts], starts=starts, early=True, target=target,
                   claimed_finish=plan.finish, claimed_cost=expected)


def test_one_calendar_under_another_name_changes_nothing():
    # a calendar with the project's own days is the project calendar (reference: networkx)
    acts = (Activity("A", 3), Activity("B", 2, calendar="same"), Activity("C", 4, calendar="same"))
    links = (Link("A", "B"), Link("A", "C", SS, 1), Link("B", "C", FF, 2))
    project = Project("t", START, acts, links, calendars=(Calendar((0, 1, 2, 3, 4), (), "same"),))
    assert not Network(project).several
    finish_nx, es_nx, _ = nx_cpm(project)
    sched = schedule(project)
    assert sched.finish == finish_nx
    assert {a.id: a.es for a in sched.activities} == es_nx


@PROPERTY
@given(st.lists(st.integers(0, 3), min_size=2, max_size=40), st.integers(-3, 3), st.data())
def test_a_window_is_exact_inside_and_below_the_steps_outside(rises, lag, data):
    # y >= g(x) + lag for a nondecreasing step function g (random rises); minimise y with x
    # held at each value: inside the window the bound is g(x) + lag, outside it is never
    # above g(x) + lag, and a widened window covers the old one and the new value
    from hasten.solver_model import INF, LinearModel

    lo = data.draw(st.integers(-5, 20))
    values = lo // 2 + np.concatenate([[0], np.cumsum(rises)])
    hi = lo + len(values) - 1
    lm = LinearModel()
    x, y = lm.add_columns([lo, -INF], [hi, INF], integer=True)
    lm.define_objective("y", [y], [1.0])
    lm.use_objective("y")
    rel = _Relation(int(x), int(y), lo, values, lag, (0,))
    for at in data.draw(st.lists(st.integers(lo, hi), min_size=1, max_size=3)):
        before = rel.window
        rel.widen(lm, at)
        wl, wh = rel.window
        assert wl <= at <= wh and (before is None or (wl <= before[0] and before[1] <= wh))
        for v in range(lo, hi + 1):
            lm.set_col_bounds(int(x), v, v)
            least = lm.solve().objective
            g = int(values[v - lo]) + lag
            assert least <= g + 1e-6
            if wl <= v <= wh:
                assert abs(least - g) <= 1e-6, (v, rel.window)


@pytest.mark.parametrize("seed", [1, 2])
def test_a_wide_network_on_mixed_calendars_matches_the_reference(seed):
    # wide enough for the numpy passes (one level of the network at a time); early dates
    # and finish against the reference, late dates against the plain loop passes
    import random

    rng = random.Random(seed)
    acts, links = [], []
    for k in range(240):
        acts.append(Activity(f"t{k}", rng.randint(0, 9), calendar=rng.choice(["", "", "crane", "six-day", "odd"])))
        if k >= 40:
            for i in rng.sample(range(k - 40, k - 20), rng.randint(1, 2)):
                links.append(Link(f"t{i}", f"t{k}", rng.choice(list(LinkType)), rng.randint(-2, 3)))
    odd = Calendar((1, 3, 5), (START + timedelta(days=9),), "odd")
    project = Project("wide", START, tuple(acts), tuple(links), calendars=(CRANE, SIX, odd))
    net = Network(project)
    assert net._vector and net.several
    es, finish = reference_forward(project, {a.id: a.duration for a in acts})
    sched = schedule(net)
    assert {a.id: a.es for a in sched.activities} == es and sched.finish == finish
    d = net.durations
    net._vector = False
    assert net.backward(d, finish) == [a.ls for a in sched.activities]
    assert net.forward(d) == [a.es for a in sched.activities]


def test_progress_counts_in_each_activity_s_own_calendar():
    # Hand-worked (our own): start Mon 3 Mar 2025, data date Sat 8 Mar (remaining work from
    # that day on). P (six-day) started Mon 3, 3 days left: Sat 8, Mon 10, Tue 11. Q (Mon-Fri)
    # after P: Wed 12 - Thu 13. R (Mon-Fri, not started): first Mon-Fri day from Sat 8 = Mon 10.
    # S (every day, not started): Sat 8. T (six-day) finished Mon 3 - Wed 5, fixed.
    acts = (Activity("P", 8, calendar="six-day", actual_start=date(2025, 3, 3), remaining=3),
            Activity("Q", 2),
            Activity("R", 1),
            Activity("S", 2, calendar="crane"),
            Activity("T", 3, calendar="six-day", actual_start=date(2025, 3, 3),
                     actual_finish=date(2025, 3, 5)))
    project = Project("progress", START, acts, (Link("P", "Q"), Link("T", "S")), calendars=(CRANE, SIX),
                      data_date=date(2025, 3, 8))
    net = Network(project)
    sched = schedule(net)
    dates = {}
    for k, a in enumerate(sched.activities):
        clock = net.timeline.clock_of(k)
        dates[a.id] = (clock.date_of(a.es), clock.date_of(a.ef - 1))
    assert dates["P"] == (date(2025, 3, 3), date(2025, 3, 11))  # its actual start stands
    assert dates["Q"] == (date(2025, 3, 12), date(2025, 3, 13))
    assert dates["R"][0] == date(2025, 3, 10)
    assert dates["S"] == (date(2025, 3, 8), date(2025, 3, 9))
    assert dates["T"] == (date(2025, 3, 3), date(2025, 3, 5))
    assert sched.finish == 9  # Mon 3 .. Thu 13 on Mon-Fri


@PROPERTY
@given(calendar_projects(max_n=4), st.data())
def test_a_milestone_on_its_own_calendar_prices_its_damages_like_brute_force(project, data):
    # one activity becomes a milestone with its own deadline and damages per calendar day;
    # its date is the last day of its own calendar before its position (the day its
    # predecessors end); reference: every whole-day duration vector, least of acceleration
    # plus milestone damages at each target
    acts = list(project.activities)
    m = data.draw(st.integers(0, len(acts) - 1))
    deadline = START + timedelta(days=data.draw(st.integers(0, 20)))
    rate = float(data.draw(st.integers(1, 30)) * 10)
    acts[m] = Activity(acts[m].id, 0, crash_duration=0, cost=acts[m].cost, calendar=acts[m].calendar,
                       deadline=deadline, damages_per_day=rate)
    project = Project(project.name, project.start, tuple(acts), project.links, calendars=project.calendars)
    days = {"": Days(project.calendar, project.start)} | {c.name: Days(c, project.start) for c in project.calendars}
    own = days[acts[m].calendar]
    rows = []
    for combo in itertools.product(*[range(a.shortest, a.duration + 1) for a in acts]):
        durations = dict(zip((a.id for a in acts), combo))
        es, finish = reference_forward(project, durations)
        f = es[acts[m].id]
        day = own.S(f - 1) if f > 0 else own.S(0)
        damages = rate * max(0, (day - deadline).days)
        rows.append((finish, sum(slope(a) * (a.duration - durations[a.id]) for a in acts) + damages))
    study = Planner(project)
    for target in range(study.shortest_finish, study.normal_finish + 1):
        expected = min(c for f, c in rows if f <= target)
        plan = study.plan(target, next_day=False)
        assert abs(plan.added_cost + plan.milestone_damages - expected) <= TOL * max(1.0, expected), target


def test_an_undefined_calendar_is_a_clear_error_for_library_users():
    from hasten.errors import HastenError

    project = Project("t", START, (Activity("A", 1, calendar="night"),), calendars=(SIX,))
    with pytest.raises(HastenError, match="'night'.*defined: six-day"):
        Network(project)


def test_the_longest_path_shows_work_that_drives_the_finish_with_weekend_float():
    # Hand-worked (our own): A (Mon-Fri, 3 days) Mon 3 - Wed 5 Mar 2025; B (every day, 2
    # days) Thu 6 - Fri 7; C (Mon-Fri, 2 days) Mon 10 - Tue 11, the finish (7 working days).
    # B could end on Sunday without delaying C: 2 days of float (its own calendar), and A
    # then 2 days too; only C is critical. The driving links still run A -> B -> C.
    project = Project("drive", START, (Activity("A", 3), Activity("B", 2, calendar="crane"), Activity("C", 2)),
                      (Link("A", "B"), Link("B", "C")), calendars=(CRANE,))
    sched = schedule(project)
    by = sched.by_id()
    assert sched.finish == 7
    assert (by["A"].total_float, by["B"].total_float, by["C"].total_float) == (2, 2, 0)
    assert sched.critical_paths == (("C",),)
    assert sched.longest_paths == (("A", "B", "C"),)
