"""Interim milestones with their own deadlines and damages, strict plans and recovery.

Sources of the checks:

- brute force: every whole-day duration vector (itertools.product), the early-start schedule
  by our own forward pass (conftest.own_forward, networkx topological order), milestone
  dates by numpy.busday_offset called here, costs from the activity data
  (conftest.own_cut_cost), on random small projects (hypothesis);
- the definitions in src/hasten/costs.py and src/hasten/recovery.py (total cost =
  acceleration + damages + indirect - bonus; net effect against doing nothing), recomputed
  here from the finish dates;
- a hand-worked recovery example of our own (labelled so, arithmetic in comments).

Milestone date convention (the one hasten uses, stated here for the reference): a milestone
(duration 0) at finish offset ``f`` falls at the start of working day ``f``, i.e. at the end
of working day ``f - 1``; its date is the last working day before offset ``f``
(CalendarClock.project_finish_date(f)), and day 0 for ``f = 0``. It is late by
``(date - deadline).days`` calendar days when that is positive; damages are
``damages_per_day`` per calendar day late.
"""

from __future__ import annotations

import dataclasses
import itertools
from datetime import date, timedelta

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from conftest import PROPERTY, START, TOL, make_project, own_cut_cost, own_forward
from hasten.time_costs import time_costs
from hasten.planner import Planner
from hasten.errors import HastenError
from hasten.project import Activity, Contract, Costs, CrashStep, Link, LinkType
from hasten.recovery import recovery

FS, SS = LinkType.FS, LinkType.SS
MON_FRI = "1111100"
DAY0 = np.datetime64(START, "D")  # START (2024-01-01) is a Monday: weekends matter


def close(a: float, b: float) -> bool:
    return abs(a - b) <= TOL * max(1.0, abs(a), abs(b))


def np_date(k: int) -> date:
    """Date of working day ``k`` (mon-fri, no holidays; reference: numpy.busday_offset)."""
    return np.busday_offset(DAY0, int(k), roll="forward", weekmask=MON_FRI).item()


def milestone_date(f: int) -> date:
    """The convention of the module docstring: the last working day before offset ``f``."""
    return np_date(max(f - 1, 0))


def own_damages(project, finishes: dict[str, int]) -> float:
    """Milestone damages from the activity data: per calendar day past the deadline."""
    total = 0.0
    for a in project.activities:
        if a.deadline is not None and a.damages_per_day:
            total += a.damages_per_day * max(0, (milestone_date(finishes[a.id]) - a.deadline).days)
    return total


def own_time_costs(project, finish: int) -> float:
    """Indirect per working day plus contract damages less bonus per calendar day between
    the finish date (the last day worked) and the contract finish (costs.py docstring)."""
    total = project.costs.indirect_per_day * finish
    c = project.contract
    if c.finish is not None:
        delta = (np_date(max(finish - 1, 0)) - c.finish).days
        early = max(-delta, 0)
        if c.bonus_cap_days is not None:
            early = min(early, c.bonus_cap_days)
        total += c.damages_per_day * max(delta, 0) - c.bonus_per_day * early
    return total


def brute_force(project):
    """Every whole-day duration vector with its early-start schedule (own forward pass):
    a list of (finish, added crash cost, milestone damages, early finishes by id)."""
    acts = project.activities
    rows = []
    for ds in itertools.product(*[range(a.shortest, a.duration + 1) for a in acts]):
        d = {a.id: x for a, x in zip(acts, ds)}
        finish, es = own_forward(project, d)
        ef = {k: es[k] + d[k] for k in d}
        added = sum(own_cut_cost(a, a.duration - x) for a, x in zip(acts, ds))
        rows.append((finish, added, own_damages(project, ef), ef))
    return rows


@st.composite
def milestone_projects(draw):
    """3-5 work activities (durations 1..5, whole-number linear crash costs, up to 3 days of
    crashing) and 1-2 milestones (duration 0) with a deadline date and damages per day,
    FS/SS links with lags 0..2 from a lower to a higher index; every milestone has at least
    one predecessor. Deadlines are drawn around the milestone's possible dates, on any day
    of the week, so that weekends add calendar days of lateness."""
    n_work = draw(st.integers(3, 5))
    n_ms = draw(st.integers(1, 2))
    size = n_work + n_ms
    ms_at = set(draw(st.lists(st.integers(1, size - 1), min_size=n_ms, max_size=n_ms, unique=True)))
    acts = []
    for i in range(size):
        if i in ms_at:
            acts.append(Activity(f"m{i}", 0))
            continue
        d = draw(st.integers(1, 5))
        cut = draw(st.integers(0, min(d, 3)))
        cost = float(draw(st.integers(0, 20)) * 10)
        per_day = draw(st.integers(1, 30)) * 10
        acts.append(Activity(f"a{i}", d, crash_duration=d - cut, cost=cost, crash_cost=cost + per_day * cut))
    pairs = st.tuples(st.integers(0, size - 1), st.integers(0, size - 1)).filter(lambda p: p[0] != p[1])
    raw = draw(st.lists(st.tuples(pairs, st.sampled_from([FS, SS]), st.integers(0, 2)), max_size=8))
    links = [Link(acts[min(p)].id, acts[max(p)].id, t, lag) for p, t, lag in raw]
    for i in sorted(ms_at):
        links.append(Link(acts[draw(st.integers(0, i - 1))].id, acts[i].id, FS, 0))
    project = make_project(acts, links)
    # deadlines around the milestone's dates at crash and at normal durations
    _, es_normal = own_forward(project, {a.id: a.duration for a in acts})
    _, es_crash = own_forward(project, {a.id: a.shortest for a in acts})
    dated = []
    for a in acts:
        if a.duration == 0:
            lo, hi = es_crash[a.id], es_normal[a.id]
            q = draw(st.integers(max(lo - 2, 1), max(hi, 1)))
            deadline = milestone_date(q) + timedelta(days=draw(st.integers(0, 2)))
            a = dataclasses.replace(a, deadline=deadline,
                                    damages_per_day=float(draw(st.integers(1, 40)) * 10))
        dated.append(a)
    return make_project(dated, links)


def _least(rows, target, *, strict=False):
    """Least added + damages (strict: least added with no milestone late) over vectors
    finishing by ``target``; None when there is none."""
    vals = [added + dmg for f, added, dmg, _ in rows if f <= target and not (strict and dmg > 0)]
    return min(vals, default=None)


@PROPERTY
@given(milestone_projects())
def test_plan_with_milestone_damages_matches_brute_force(project):
    # reference: brute force over every duration vector (brute_force above), early-start
    # schedule by conftest.own_forward, damages by the module docstring's date convention
    rows = brute_force(project)
    study = Planner(project)
    normal = max(f for f, *_ in rows)
    shortest = min(f for f, *_ in rows)
    assert study.normal_finish == normal
    assert study.shortest_finish == shortest
    for target in range(normal, shortest - 1, -1):
        plan = study.plan(target)
        truth = _least(rows, target)
        assert close(plan.added_cost + plan.milestone_damages, truth), target
        assert plan.finish <= target
        # the plan's own penalty is the damages of its early dates
        ef = {a.id: a.ef for a in plan.schedule.activities}
        assert close(plan.milestone_damages, own_damages(project, ef)), target


@PROPERTY
@given(milestone_projects(), st.integers(0, 100), st.one_of(st.none(), st.integers(-3, 12)),
       st.integers(0, 50), st.integers(0, 30))
def test_best_matches_brute_force_total(project, indirect, contract_shift, damages, bonus):
    # reference: the least over every duration vector of added + milestone damages + time
    # costs at its finish; time costs by our own reading of costs.py's definition, and
    # compared with hasten.time_costs.time_costs at every finish
    contract = Contract()
    if contract_shift is not None:
        normal_date = milestone_date(own_forward(project, {a.id: a.duration for a in project.activities})[0])
        contract = Contract(finish=normal_date - timedelta(days=contract_shift),
                            damages_per_day=float(damages * 10), bonus_per_day=float(bonus * 10))
    project = dataclasses.replace(project, costs=Costs(indirect_per_day=float(indirect)), contract=contract)
    rows = brute_force(project)
    study = Planner(project)
    for f in {f for f, *_ in rows}:
        assert close(time_costs(project, study.clock, f).net, own_time_costs(project, f)), f
    truth = min(added + dmg + own_time_costs(project, f) for f, added, dmg, _ in rows)
    best = study.best_finish()
    assert close(best.point.total_cost - project.normal_direct_cost, truth)
    assert close(best.plan.added_cost + best.plan.milestone_damages + own_time_costs(project, best.point.finish), truth)


@PROPERTY
@given(milestone_projects())
def test_strict_plans_never_leave_a_milestone_late(project):
    # reference: brute force restricted to vectors with every milestone on time
    rows = brute_force(project)
    study = Planner(project)
    normal = max(f for f, *_ in rows)
    shortest = min(f for f, *_ in rows)
    for target in range(normal, shortest - 1, -1):
        truth = _least(rows, target, strict=True)
        if truth is None:  # no plan finishing by the target meets every deadline
            with pytest.raises(HastenError):
                study.plan(target, strict=True)
            continue
        plan = study.plan(target, strict=True)
        assert close(plan.added_cost, truth), target
        assert plan.milestone_damages == 0
        rows_by_id = plan.schedule.by_id()
        for a in project.activities:
            if a.deadline is not None:
                assert milestone_date(rows_by_id[a.id].ef) <= a.deadline, (target, a.id)


def test_best_reports_the_costs_of_its_own_plan():
    # hand-worked of our own: A (2 d, crash to 1 at 10 a day) with two milestones after it,
    # M1 (deadline Mon 01-01) and M2 (deadline Tue 01-02), 10 a calendar day each.
    #   A = 2: finish 2; M1, M2 at offset 2, dated day 1 = Tue 01-02: M1 1 day late = 10,
    #          M2 on time; added 0; total 10
    #   A = 1: finish 1; M1, M2 dated day 0 = Mon 01-01, on time; added 10; total 10
    # The least total is 10 at finish 2 either way (crashing.py: ties go to the later
    # finish); whichever plan best() returns, the added cost and damages it reports at its
    # best finish must be those of that plan.
    project = make_project([
        Activity("A", 2, crash_duration=1, cost=0.0, crash_cost=10.0),
        Activity("M1", 0, deadline=date(2024, 1, 1), damages_per_day=10.0),
        Activity("M2", 0, deadline=date(2024, 1, 2), damages_per_day=10.0),
    ], [Link("A", "M1"), Link("A", "M2")])
    best = Planner(project).best_finish()
    assert best.point.finish == 2 and close(best.point.total_cost, 10.0)
    ef = {a.id: a.ef for a in best.plan.schedule.activities}
    assert close(best.point.added_cost, best.plan.added_cost)
    assert close(best.point.milestone_damages, best.plan.milestone_damages)
    assert close(best.plan.milestone_damages, own_damages(project, ef))


def late_milestone_project(**kwargs):
    """A (5 d, crash to 3 at 10 a day) -> M (milestone, deadline Tue 2024-01-02, 100 a
    calendar day) -> B (2 d): the hand-worked project of the tests below (our own)."""
    return make_project([
        Activity("A", 5, crash_duration=3, cost=0.0, crash_cost=20.0),
        Activity("M", 0, deadline=date(2024, 1, 2), damages_per_day=100.0),
        Activity("B", 2),
    ], [Link("A", "M"), Link("M", "B")], **kwargs)


def test_strict_plan_raises_when_the_deadline_cannot_be_met():
    # hand-worked of our own: A (5 d, crash to 3) -> M (milestone) -> B (2 d).
    # At the shortest, A = 3: M at offset 3, dated day 2 = Wed 2024-01-03. A deadline of
    # Tue 2024-01-02 cannot be met by any plan (finish 5 is the shortest: 3 + 2), yet a
    # non-strict plan at that finish exists and pays 1 calendar day (01-03 - 01-02) x 100.
    project = late_milestone_project()
    study = Planner(project)
    assert study.shortest_finish == 5
    with pytest.raises(HastenError):
        study.plan(5, strict=True)
    with pytest.raises(HastenError):
        study.plan(7, strict=True)
    plan = study.plan(5)
    assert close(plan.added_cost, 20.0) and close(plan.milestone_damages, 100.0)


def test_a_failed_strict_plan_leaves_later_plans_alone():
    # hand-worked of our own (the project of the test above): A (5 d, crash to 3 at 10 a
    # day) -> M (deadline Tue 01-02, 100 a calendar day) -> B (2 d). Strict plans are
    # impossible; a non-strict plan asked afterwards must be the same as on a fresh study.
    # Least added + damages by A's duration (M at offset A, dated day A - 1):
    #   A = 5: 0 + M Fri 01-05, 3 days late x 100 = 300
    #   A = 4: 10 + M Thu 01-04, 2 days x 100 = 210
    #   A = 3: 20 + M Wed 01-03, 1 day x 100 = 120   <- least, by finish 5 and by finish 7
    project = late_milestone_project()
    study = Planner(project)
    with pytest.raises(HastenError):
        study.plan(5, strict=True)
    plan = study.plan(5)
    assert close(plan.added_cost, 20.0) and close(plan.milestone_damages, 100.0)
    plan = study.plan(7)
    assert close(plan.added_cost, 20.0) and close(plan.milestone_damages, 100.0)


def test_recovery_when_full_recovery_is_impossible():
    # hand-worked of our own: the project above with a contract finish Fri 01-05 (offset 5)
    # at 50 a calendar day, no indirect cost. Recover fully needs M by Tue 01-02: impossible.
    # Totals by A's duration (finish = A + 2, its date the last day worked; M at offset A):
    #   A = 5: finish 7 = Tue 01-09, 4 days late x 50 = 200; M Fri 01-05, 3 x 100 = 300; 500
    #   A = 4: cost 10; finish 6 = Mon 01-08, 3 x 50 = 150; M Thu 01-04, 2 x 100 = 200; 360
    #   A = 3: cost 20; finish 5 = Fri 01-05, on time;      M Wed 01-03, 1 x 100 = 100; 120
    # least total cost: A = 3, finish 5, total 120; do nothing 500; net effect 380.
    project = late_milestone_project(contract=Contract(finish=date(2024, 1, 5), damages_per_day=50.0))
    rec = recovery(Planner(project))
    courses = {c.label: c for c in rec.courses}
    assert not courses["recover fully"].possible
    assert close(courses["do nothing"].total_cost, 500.0)
    least = courses["least total cost"]
    assert least.finish == 5 and close(least.total_cost, 120.0) and close(least.net_effect, 380.0)


def test_strict_plan_meets_a_deadline_without_damages():
    # hand-worked of our own: A (5 d, crash to 3 at 10 a day) -> M (milestone) -> B (2 d).
    # M's deadline Wed 2024-01-03 (no damages given): M must sit at offset <= 3 (dated day
    # 2 = Wed 01-03), so A = 3 days, cost 2 x 10 = 20, finish 5. The normal plan puts M at
    # offset 5 = Fri 01-05, 2 days late. recovery.py and crashing.py: strict = "every
    # interim milestone must also meet its own deadline".
    project = make_project([
        Activity("A", 5, crash_duration=3, cost=0.0, crash_cost=20.0),
        Activity("M", 0, deadline=date(2024, 1, 3)),
        Activity("B", 2),
    ], [Link("A", "M"), Link("M", "B")])
    study = Planner(project)
    plan = study.plan(7, strict=True)
    assert milestone_date(plan.schedule.by_id()["M"].ef) <= date(2024, 1, 3)
    assert close(plan.added_cost, 20.0)
    # the same through recovery(): "recover fully" must meet M's deadline too
    full = {c.label: c for c in recovery(Planner(project)).courses}["recover fully"]
    assert full.possible
    assert milestone_date(full.plan.schedule.by_id()["M"].ef) <= date(2024, 1, 3)


# ---------------------------------------------------------------------------------------
# recovery()
# ---------------------------------------------------------------------------------------

def course_totals(project, course, plan_ef):
    """Our own total for a course: acceleration + contract damages + milestone damages +
    indirect - bonus (recovery.py docstring), from its finish and the plan's early dates."""
    return course.added_cost + own_time_costs(project, course.finish) + own_damages(project, plan_ef)


def check_recovery_relations(project, study, rec):
    courses = {c.label: c for c in rec.courses}
    nothing, full, least = courses["do nothing"], courses["recover fully"], courses["least total cost"]
    normal_ef = {a.id: a.ef for a in study.normal.activities}
    base_dmg = own_damages(project, normal_ef)
    # do nothing: no acceleration, the forecast damages
    assert nothing.added_cost == 0
    assert nothing.finish == study.normal_finish
    assert close(nothing.milestone_damages, base_dmg)
    contract_dmg = 0.0
    if project.contract.finish is not None:
        late = max(0, (milestone_date(study.normal_finish) - project.contract.finish).days)
        contract_dmg = project.contract.damages_per_day * late
    assert close(nothing.contract_damages, contract_dmg)
    base_total = own_time_costs(project, nothing.finish) + base_dmg
    assert close(nothing.total_cost, base_total)
    totals = {"do nothing": base_total}
    # recover fully: meets the contract finish and every milestone deadline
    if full.possible:
        ef = {a.id: a.ef for a in full.plan.schedule.activities}
        if project.contract.finish is not None:
            assert full.finish_date <= project.contract.finish
            assert milestone_date(full.finish) <= project.contract.finish
        for a in project.activities:
            if a.deadline is not None:
                assert milestone_date(ef[a.id]) <= a.deadline, a.id
        assert close(full.added_cost, full.plan.added_cost)
        totals["recover fully"] = course_totals(project, full, ef)
        assert close(full.total_cost, totals["recover fully"])
    # every course's money describes the plan it comes with
    for course in (full, least):
        if course.possible:
            ef = {a.id: a.ef for a in course.plan.schedule.activities}
            assert close(course.added_cost, course.plan.added_cost), course.label
            assert close(course.milestone_damages, own_damages(project, ef)), course.label
            assert course.plan.finish <= course.finish, course.label
    # least total cost: no more than the others
    ef = {a.id: a.ef for a in least.plan.schedule.activities}
    totals["least total cost"] = course_totals(project, least, ef)
    assert close(least.total_cost, totals["least total cost"])
    for label, total in totals.items():
        assert totals["least total cost"] <= total + TOL * max(1.0, abs(total)), label
    # net effect against doing nothing: its parts from our own numbers, and the whole as the
    # difference of the totals
    c = project.contract
    for course in (full, least):
        if not course.possible:
            continue
        ef = {a.id: a.ef for a in course.plan.schedule.activities}
        dmg = own_damages(project, ef)
        indirect = project.costs.indirect_per_day
        avoided = (contract_dmg + base_dmg) - (course.contract_damages + dmg)
        if c.finish is not None:
            late = max(0, (milestone_date(course.finish) - c.finish).days)
            assert close(course.contract_damages, c.damages_per_day * late)
        assert close(course.damages_avoided, avoided)
        assert close(course.indirect_saved, indirect * (nothing.finish - course.finish))
        assert close(course.net_effect, course.damages_avoided + course.indirect_saved
                     + course.bonus_gained - course.added_cost)
        assert close(course.net_effect, totals["do nothing"] - totals[course.label])
    return courses


def hand_worked_late_project():
    """Hand-worked recovery example of our own (invented data).

    mon-fri from Mon 2024-01-01. Offsets: Mon 01-22 = 15, Fri 01-26 = 19, Fri 02-02 = 24,
    Mon 02-05 = 25, Mon 02-12 = 30, Wed 02-14 = 32.
    A (10 d) finished late: Mon 01-01 .. Fri 01-19 (days 0..14, finish offset 15).
    B (10 d, waiting, FS after A) can lose 5 days at 400 a day.
    M milestone after B: deadline Fri 01-26, damages 500 per calendar day.
    C (8 d, FS after M): steps 2 days at 800, then 3 days at 5,000.
    Data date Mon 01-22 (day 15); contract finish Fri 02-02, damages 1,000 per calendar day;
    indirect 300 per working day.
    """
    return make_project([
        Activity("A", 10, actual_start=date(2024, 1, 1), actual_finish=date(2024, 1, 19)),
        Activity("B", 10, crash_duration=5, cost=10000.0, crash_cost=12000.0),
        Activity("M", 0, deadline=date(2024, 1, 26), damages_per_day=500.0),
        Activity("C", 8, cost=8000.0, steps=(CrashStep(2, 800.0), CrashStep(3, 5000.0))),
    ], [Link("A", "B"), Link("B", "M"), Link("M", "C")], indirect=300.0,
        data_date=date(2024, 1, 22),
        contract=Contract(finish=date(2024, 2, 2), damages_per_day=1000.0))


def test_recovery_hand_worked():
    # source: hand-worked example of our own (hand_worked_late_project); arithmetic:
    # forecast: B 15..25, M at 25 (dated day 24 = Fri 02-02), C 25..33; finish 33, last day
    #   worked day 32 = Wed 02-14.
    # do nothing: contract damages (02-14 - 02-02) = 12 days x 1,000 = 12,000;
    #   M late (02-02 - 01-26) = 7 days x 500 = 3,500; indirect 33 x 300 = 9,900;
    #   total 25,400.
    # recover fully: M by Fri 01-26 -> M offset <= 20 -> B = 5 (cut 5 x 400 = 2,000);
    #   finish by Fri 02-02 -> offset <= 25: C from 20 must take <= 5 days -> cut 3:
    #   2 x 800 + 1 x 5,000 = 6,600. Acceleration 8,600; no damages; indirect 25 x 300 = 7,500;
    #   total 16,100.
    # least total: the last C day (5,000) saves finish 26 -> 25, date Mon 02-05 -> Fri
    #   02-02 = 3 calendar days x 1,000 + 300 indirect = 3,300 < 5,000: not worth it.
    #   Each B day (400) saves 300 indirect + 500 milestone damages (+ contract damages)
    #   and each of the first two C days (800) saves 300 + >= 1,000: both worth it.
    #   Finish 26 (last day Mon 02-05, 3 days late): acceleration 2,000 + 1,600 = 3,600;
    #   damages 3,000; indirect 26 x 300 = 7,800; total 14,400.
    project = hand_worked_late_project()
    study = Planner(project)
    rec = recovery(study)
    assert study.normal_finish == 33
    assert rec.forecast_date == date(2024, 2, 14) and rec.days_late == 12
    (ms,) = rec.milestones
    assert ms.forecast == date(2024, 2, 2) and ms.days_late == 7 and close(ms.damages, 3500.0)
    courses = check_recovery_relations(project, study, rec)
    nothing, full, least = courses["do nothing"], courses["recover fully"], courses["least total cost"]
    assert close(nothing.contract_damages, 12000.0) and close(nothing.milestone_damages, 3500.0)
    assert close(nothing.indirect, 9900.0) and close(nothing.total_cost, 25400.0)
    assert full.possible and full.finish == 25 and close(full.added_cost, 8600.0)
    assert close(full.total_cost, 16100.0)
    assert least.finish == 26 and close(least.added_cost, 3600.0)
    assert close(least.contract_damages, 3000.0) and close(least.total_cost, 14400.0)
    # net effect, hand-worked: 25,400 - 14,400 = 11,000 for least total; 25,400 - 16,100 = 9,300
    assert close(least.net_effect, 11000.0) and close(full.net_effect, 9300.0)


@PROPERTY
@given(milestone_projects(), st.integers(0, 100), st.integers(-3, 14), st.integers(0, 50),
       st.integers(0, 30), st.one_of(st.none(), st.integers(0, 5)))
def test_recovery_relations_on_random_projects(project, indirect, shift, damages, bonus, cap):
    # definitions of recovery.py / costs.py recomputed here; least total cost checked also
    # against the brute-force least total
    normal_finish = own_forward(project, {a.id: a.duration for a in project.activities})[0]
    # a contract finish on or after the project start (an earlier one is meaningless)
    contract = Contract(finish=max(milestone_date(normal_finish) - timedelta(days=shift), START),
                        damages_per_day=float(damages * 10), bonus_per_day=float(bonus * 10),
                        bonus_cap_days=cap)
    project = dataclasses.replace(project, costs=Costs(indirect_per_day=float(indirect)), contract=contract)
    study = Planner(project)
    rec = recovery(study)
    courses = check_recovery_relations(project, study, rec)
    rows = brute_force(project)
    truth = min(added + dmg + own_time_costs(project, f) for f, added, dmg, _ in rows)
    assert close(courses["least total cost"].total_cost, truth)
    # recover fully is possible exactly when some vector meets the contract and every deadline
    meets = [r for r in rows if milestone_date(r[0]) <= contract.finish and r[2] == 0]
    assert courses["recover fully"].possible == bool(meets)
    if meets:
        full = courses["recover fully"]
        assert close(full.added_cost, min(r[1] for r in meets))


def test_a_deadline_before_the_first_working_day_is_missed_even_at_the_start():
    # hand-worked of our own: the project starts Tue 2024-01-02 (make_project starts Mon
    # 2024-01-01, moved a day here); milestone M opens the job (no predecessors) with a
    # deadline of Mon 2024-01-01 and 100 a calendar day. M is dated Tue 01-02, the first
    # working day: 1 day late whatever the plan, 100 of damages; and no strict plan exists.
    project = make_project([
        Activity("M", 0, deadline=date(2024, 1, 1), damages_per_day=100.0),
        Activity("A", 3, crash_duration=2, cost=0.0, crash_cost=10.0),
    ], [Link("M", "A")])
    project = dataclasses.replace(project, start=date(2024, 1, 2))
    study = Planner(project)
    for target in (3, 2):
        plan = study.plan(target)
        assert close(plan.milestone_damages, 100.0), target
    with pytest.raises(HastenError):
        study.plan(3, strict=True)
