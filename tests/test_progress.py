"""Progress at the data date (hasten.progress applied through hasten.cpm.schedule).

Sources of the checks:

- a hand-worked status example of our own (labelled so, arithmetic in comments);
- the same network rebuilt by hand for the remaining work (finished work removed, started
  work cut to its remaining days), scheduled by a forward pass written in this file
  (independent of network.py and progress.py) on random networks (hypothesis);
- the rules written in the docstring of src/hasten/progress.py (the spec): out-of-sequence
  links broken by progress, the remaining share of the crash allowance (rounded down), the
  percent-complete rounding (rounded up), and the bad-data errors.
"""

from __future__ import annotations

import dataclasses
from datetime import date, timedelta

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from conftest import PROPERTY, START, TOL, make_project
from hasten.calendar import CalendarClock
from hasten.planner import Planner
from hasten.errors import InfeasibleTargetError, InputError
from hasten.plan_check import PlanChecker
from hasten.project import Activity, Calendar, CrashStep, Link, LinkType
from hasten.cpm import schedule
from hasten.network import Network

FS, SS, FF = LinkType.FS, LinkType.SS, LinkType.FF
MON_FRI = "1111100"  # numpy weekmask, Monday first
DAY0 = np.datetime64(START, "D")  # START (2024-01-01) is a Monday, a working day: day 0


def np_date(k: int) -> date:
    """Date of working day ``k`` on a mon-fri calendar without holidays from START
    (reference: numpy.busday_offset, called here directly)."""
    return np.busday_offset(DAY0, int(k), roll="forward", weekmask=MON_FRI).item()


def np_offset(day: date) -> int:
    """Working days from START up to (not including) ``day``: the offset of the first
    working day on or after ``day`` (reference: numpy.busday_count)."""
    return int(np.busday_count(DAY0, np.datetime64(day, "D"), weekmask=MON_FRI))


# ---------------------------------------------------------------------------------------
# 1. A hand-worked status example of our own
# ---------------------------------------------------------------------------------------

def hand_worked_project():
    """Hand-worked example of our own (invented data, arithmetic below in the test).

    Calendar mon-fri, no holidays, start Monday 2024-01-01 (day 0). Working-day offsets:
    Mon 01-01 = 0 ... Fri 01-05 = 4, Mon 01-08 = 5 ... Fri 01-12 = 9, Mon 01-15 = 10,
    Tue 01-16 = 11, Wed 01-17 = 12, ... Fri 01-19 = 14, Mon 01-22 = 15, Mon 01-29 = 20,
    Fri 02-02 = 24, Mon 02-05 = 25, Tue 02-06 = 26.
    """
    acts = [
        # finished, on plan: Mon 01-01 .. Fri 01-05
        Activity("A", 5, actual_start=date(2024, 1, 1), actual_finish=date(2024, 1, 5)),
        # finished, two days longer than planned: Mon 01-08 .. Mon 01-15
        Activity("B", 4, actual_start=date(2024, 1, 8), actual_finish=date(2024, 1, 15)),
        # started Tue 01-09, 3 working days remaining
        Activity("C", 6, actual_start=date(2024, 1, 9), remaining=3),
        # started Thu 01-11, 30 percent complete
        Activity("D", 8, actual_start=date(2024, 1, 11), percent_complete=30),
        Activity("E", 4),
        # not before Saturday 01-27: the first working day on or after it is Mon 01-29
        Activity("F", 5, not_before=date(2024, 1, 27)),
        Activity("G", 3),
        Activity("H", 2),
    ]
    links = [Link("A", "B"), Link("A", "C"), Link("B", "D", SS, 2), Link("B", "E"), Link("C", "E"),
             Link("D", "F"), Link("A", "G"), Link("C", "G", FF, 3), Link("E", "H"),
             Link("F", "H"), Link("G", "H")]
    return make_project(acts, links, data_date=date(2024, 1, 17))  # Wednesday


def test_hand_worked_status_example():
    # source: hand-worked example of our own (see hand_worked_project); arithmetic:
    #
    # data date Wed 2024-01-17 -> offset 12 (01-01..01-05 = 0..4, 01-08..01-12 = 5..9,
    #   01-15 = 10, 01-16 = 11, 01-17 = 12): remaining work starts on or after day 12.
    # A finished: actual start 01-01 -> es 0; last day worked Fri 01-05 = day 4 -> ef 4+1 = 5.
    # B finished: actual start 01-08 -> es 5; last day worked Mon 01-15 = day 10 -> ef 11.
    #   (A -> B FS holds: 5 >= 5; B is fixed at its actual dates, not at A's finish + 4.)
    # C started 01-09 = day 6 (A -> C FS holds: 6 >= 5): shown es = 6 (its actual start);
    #   remaining 3 resume at the data date: ef = 12 + 3 = 15.
    # D started 01-11 = day 8 (B -> D SS+2 holds: 8 >= 5 + 2); 30 % complete of 8 days:
    #   remaining = 8 * (100 - 30) / 100 = 5.6, rounded UP = 6 (not 5);
    #   shown es = 8, ef = 12 + 6 = 18.
    # E (4 d): B -> E FS: 11 + 0 = 11; C -> E FS: 15; data date 12
    #   es = max(12, 11, 15) = 15, ef = 15 + 4 = 19.
    # F (5 d): D -> F FS: 18; not before Sat 01-27 -> Mon 01-29 = day 20; data date 12
    #   es = max(12, 18, 20) = 20, ef = 20 + 5 = 25.
    # G (3 d): A -> G FS: 5; C -> G FF+3: G finish >= 15 + 3 = 18 -> es >= 18 - 3 = 15;
    #   data date 12: es = max(12, 5, 15) = 15, ef = 15 + 3 = 18.
    # H (2 d): E -> H FS 19; F -> H FS 25; G -> H FS 18; es = max(12, 19, 25, 18) = 25,
    #   ef = 25 + 2 = 27.
    # project finish = max(5, 11, 15, 18, 19, 25, 18, 27) = 27 working days;
    #   its last day worked is day 26 = Tue 2024-02-06.
    expected = {  # id: (es, ef, first day worked, last day worked)
        "A": (0, 5, date(2024, 1, 1), date(2024, 1, 5)),
        "B": (5, 11, date(2024, 1, 8), date(2024, 1, 15)),
        "C": (6, 15, date(2024, 1, 9), date(2024, 1, 19)),   # last day = day 14 = Fri 01-19
        "D": (8, 18, date(2024, 1, 11), date(2024, 1, 24)),  # last day = day 17 = Wed 01-24
        "E": (15, 19, date(2024, 1, 22), date(2024, 1, 25)),  # days 15..18 = Mon..Thu
        "F": (20, 25, date(2024, 1, 29), date(2024, 2, 2)),   # days 20..24 = Mon..Fri
        "G": (15, 18, date(2024, 1, 22), date(2024, 1, 24)),  # days 15..17 = Mon..Wed
        "H": (25, 27, date(2024, 2, 5), date(2024, 2, 6)),    # days 25..26 = Mon..Tue
    }
    states = {"A": "finished", "B": "finished", "C": "started", "D": "started",
              "E": "not started", "F": "not started", "G": "not started", "H": "not started"}
    project = hand_worked_project()
    net = Network(project)
    assert net.progress.data_offset == 12  # hand-worked: Wed 01-17 = day 12
    assert net.progress.warnings == ()  # all progress is in sequence
    sched = schedule(net)
    clock = CalendarClock(project.calendar, project.start)
    rows = sched.by_id()
    for act_id, (es, ef, first, last) in expected.items():
        row = rows[act_id]
        assert (row.es, row.ef) == (es, ef), act_id
        assert row.state == states[act_id], act_id
        assert clock.start_date(row.es) == first, act_id
        assert clock.finish_date(row.es, row.ef) == last, act_id
    assert sched.finish == 27
    assert clock.project_finish_date(sched.finish) == date(2024, 2, 6)
    # D's remaining days at the normal pace: 6 (rounded up), E..H the whole duration
    durations = dict(zip(net.ids, net.durations))
    assert durations["C"] == 3 and durations["D"] == 6


@pytest.mark.parametrize("duration, percent, remaining", [
    # hand-worked (the progress.py rule: remaining = duration * (100 - percent) / 100, rounded up)
    (8, 30, 6),     # 8 * 0.70 = 5.6 -> 6
    (8, 25, 6),     # 8 * 0.75 = 6.0 exactly -> 6 (no rounding up past a whole number)
    (10, 33, 7),    # 10 * 0.67 = 6.7 -> 7
    (3, 100 / 3, 2),  # 3 * 2/3 = 2.0 (with float error) -> 2
    (5, 99, 1),     # 5 * 0.01 = 0.05 -> 1: a day is left until it is reported finished
    (5, 100, 0),    # 5 * 0 = 0
    (5, 0, 5),      # 5 * 1 = 5
])
def test_percent_complete_rounds_remaining_days_up(duration, percent, remaining):
    # source: hand-worked of our own (arithmetic in each row's comment); rule from the
    # progress.py docstring ("percent_complete of the duration, rounded up")
    project = make_project([Activity("X", duration, actual_start=date(2024, 1, 2),
                                     percent_complete=percent)], [], data_date=date(2024, 1, 10))
    net = Network(project)
    assert net.durations == [remaining]
    row = schedule(net).by_id()["X"]
    # hand-worked: actual start Tue 01-02 = day 1; data date Wed 01-10 = day 7
    assert row.es == 1 and row.ef == 7 + remaining


def test_actual_start_on_a_weekend_project_start():
    # hand-worked of our own; rule from calendar.py ("The first working day on or after the
    # given start is day 0"; a non-working day read as a start is the next working day):
    # mon-fri, project start Sat 2024-01-06 -> day 0 = Mon 01-08. P (5 d) actually started
    # on the project start date, Sat 01-06 (weekend work), 2 days remaining; data date
    # Wed 01-10 = day 2. Read as a start, Sat 01-06 is Mon 01-08 = day 0: shown es = 0,
    # first day Mon 01-08 (never before the project start); ef = 2 + 2 = 4.
    project = dataclasses.replace(
        make_project([Activity("P", 5, actual_start=date(2024, 1, 6), remaining=2)], [],
                     data_date=date(2024, 1, 10)),
        start=date(2024, 1, 6))
    row = schedule(project).by_id()["P"]
    clock = CalendarClock(project.calendar, project.start)
    assert (row.es, row.ef) == (0, 4)
    assert clock.start_date(row.es) == date(2024, 1, 8)


# ---------------------------------------------------------------------------------------
# 2. Property: the same network rebuilt by hand for the remaining work
# ---------------------------------------------------------------------------------------

@st.composite
def progressed(draw):
    """A random network (FS/SS/FF, lags 0..3, links from a lower to a higher index) with a
    simulated history of actual dates that keeps every link (in sequence), a data date
    cutting through it, and some not-before dates on work not started.

    Returns the project and the facts in offsets the reference needs."""
    n = draw(st.integers(3, 8))
    durations = [draw(st.integers(1, 8)) for _ in range(n)]
    pairs = st.tuples(st.integers(0, n - 1), st.integers(0, n - 1)).filter(lambda p: p[0] != p[1])
    raw = draw(st.lists(st.tuples(pairs, st.sampled_from([FS, SS, FF]), st.integers(0, 3)),
                        max_size=12))
    links = [(min(p), max(p), t, lag) for p, t, lag in raw]
    # the history: actual spans (working days, may differ from the plan), actual starts by
    # a forward pass over the links plus random waiting; spans >= 1 day
    spans = [draw(st.integers(1, 10)) for _ in range(n)]
    waits = [draw(st.integers(0, 4)) for _ in range(n)]
    s: list[int] = []
    for j in range(n):
        lo = waits[j]
        for i, k, t, lag in links:
            if k != j:
                continue
            lo = max(lo, {FS: s[i] + spans[i] + lag, SS: s[i] + lag,
                          FF: s[i] + spans[i] + lag - spans[j]}[t])
        s.append(lo)
    f = [s[j] + spans[j] for j in range(n)]  # finish offset: last day worked is f - 1
    data = draw(st.integers(1, max(f)))
    # the data date: working day `data`, or a weekend day just before it (rolls forward)
    data_date = np_date(data) - timedelta(days=draw(st.integers(0, 2)))
    if np_offset(data_date) != data:
        data_date = np_date(data)
    state, remaining, not_before = [], {}, {}
    acts = []
    for j in range(n):
        kw = {}
        if f[j] <= data:  # last day worked f-1 is before the data date
            state.append("finished")
            kw = dict(actual_start=np_date(s[j]), actual_finish=np_date(f[j] - 1))
        elif s[j] < data:
            state.append("started")
            remaining[j] = draw(st.integers(0, durations[j]))
            kw = dict(actual_start=np_date(s[j]), remaining=remaining[j])
        else:
            state.append("not started")
            if draw(st.booleans()):
                nb = np_date(draw(st.integers(0, max(f) + 5))) + timedelta(days=draw(st.integers(0, 2)))
                not_before[j] = np_offset(nb)  # the first working day on or after it
                kw = dict(not_before=nb)
        acts.append(Activity(f"a{j}", durations[j], **kw))
    project = make_project(acts, [Link(f"a{i}", f"a{k}", t, lag) for i, k, t, lag in links],
                           data_date=data_date)
    facts = dict(n=n, durations=durations, links=links, s=s, f=f, data=data, state=state,
                 remaining=remaining, not_before=not_before)
    return project, facts


def rebuilt_forward(facts) -> tuple[int, dict[int, int]]:
    """Early finishes of the network rebuilt by hand for the remaining work, by a plain
    forward pass written here (independent of network.py and progress.py):

    - finished activities are removed; a link from one becomes an earliest start (FS: actual
      finish + lag, SS: actual start + lag) or an earliest finish (FF: actual finish + lag)
      of its successor;
    - a started activity becomes an activity of duration = remaining that starts no earlier
      than the data date; its start is history, so an SS link from it becomes an earliest
      start of the successor (actual start + lag), and FS/SS links into it are history
      (satisfied by the in-sequence actual dates) and dropped; FF links into it still hold
      its (future) finish;
    - every other activity starts no earlier than the data date and its not-before date.

    Index order is a topological order (links go from a lower to a higher index).
    Returns the project finish (including finished work) and the early finish of each
    activity not finished."""
    data, state, s, f = facts["data"], facts["state"], facts["s"], facts["f"]
    es: dict[int, int] = {}
    ef: dict[int, int] = {}
    for j in range(facts["n"]):
        if state[j] == "finished":
            continue
        d = facts["remaining"][j] if state[j] == "started" else facts["durations"][j]
        start_lo = max(data, facts["not_before"].get(j, 0))
        finish_lo = 0
        for i, k, t, lag in facts["links"]:
            if k != j:
                continue
            if state[j] == "started" and t in (FS, SS):
                continue  # history
            if state[i] == "finished":
                if t is FS:
                    start_lo = max(start_lo, f[i] + lag)
                elif t is SS:
                    start_lo = max(start_lo, s[i] + lag)
                else:
                    finish_lo = max(finish_lo, f[i] + lag)
            elif state[i] == "started" and t is SS:
                start_lo = max(start_lo, s[i] + lag)
            elif t is FS:
                start_lo = max(start_lo, ef[i] + lag)
            elif t is SS:
                start_lo = max(start_lo, es[i] + lag)
            else:
                finish_lo = max(finish_lo, ef[i] + lag)
        es[j] = max(start_lo, finish_lo - d)
        ef[j] = es[j] + d
    done = [f[j] for j in range(facts["n"]) if state[j] == "finished"]
    return max(list(ef.values()) + done, default=0), ef


@PROPERTY
@given(progressed())
def test_remaining_work_matches_the_network_rebuilt_by_hand(case):
    # reference: the network rebuilt by hand for the remaining work, scheduled by our own
    # forward pass (rebuilt_forward above); dates by numpy.busday_offset called here
    project, facts = case
    net = Network(project)
    assert net.progress.warnings == ()  # the generated history is in sequence
    sched = schedule(net)
    finish, ef = rebuilt_forward(facts)
    rows = sched.by_id()
    assert sched.finish == finish
    clock = CalendarClock(project.calendar, project.start)
    assert clock.project_finish_date(sched.finish) == np_date(finish - 1)
    for j, f in ef.items():
        row = rows[f"a{j}"]
        assert row.ef == f, f"a{j}"
        if facts["state"][j] == "started":
            assert row.es == facts["s"][j]  # a started activity shows its actual start
    for j, st_ in enumerate(facts["state"]):
        if st_ == "finished":  # finished work stays at its actual dates
            row = rows[f"a{j}"]
            assert (row.es, row.ef) == (facts["s"][j], facts["f"][j])
            assert clock.finish_date(row.es, row.ef) == np_date(facts["f"][j] - 1)


# ---------------------------------------------------------------------------------------
# 3. Out-of-sequence progress
# ---------------------------------------------------------------------------------------

def test_out_of_sequence_progress_warns_and_keeps_the_actual_start():
    # source: progress.py docstring; numbers hand-worked of our own:
    # mon-fri from Mon 2024-01-01; data date Wed 01-10 = day 7.
    # P (6 d) started Mon 01-01 = day 0, 2 days remaining: resumes day 7, ef = 7 + 2 = 9.
    # S (4 d) has P -> S FS but started Thu 01-04 = day 3 while P is not finished: out of
    #   sequence. S keeps its actual start (es shown = 3); 1 day remaining resumes at the
    #   data date: ef = 7 + 1 = 8 (the broken link no longer holds it back; were it kept,
    #   S could not resume before P's finish 9, ef = 10).
    # T (2 d) follows S (FS): es = 8, ef = 10. Finish = max(9, 8, 10) = 10.
    project = make_project([
        Activity("P", 6, actual_start=date(2024, 1, 1), remaining=2),
        Activity("S", 4, actual_start=date(2024, 1, 4), remaining=1),
        Activity("T", 2),
    ], [Link("P", "S"), Link("S", "T")], data_date=date(2024, 1, 10))
    net = Network(project)
    assert len(net.progress.warnings) == 1
    text = net.progress.warnings[0]
    assert "P" in text and "S" in text and "FS" in text
    assert "P -> S" in text  # the link named with both ids in order
    sched = schedule(net)  # still computes
    rows = sched.by_id()
    assert rows["S"].es == 3  # the actual start stands
    assert rows["P"].ef == 9 and rows["S"].ef == 8 and rows["T"].es == 8
    assert sched.finish == 10


def test_out_of_sequence_ss_link_is_named_with_its_type_and_lag():
    # source: progress.py docstring; hand-worked of our own: Q (5 d) not started,
    # R has Q -> R SS+1 but started Tue 01-02 = day 1; data date Mon 01-08 = day 5.
    project = make_project([
        Activity("Q", 5),
        Activity("R", 3, actual_start=date(2024, 1, 2), remaining=2),
    ], [Link("Q", "R", SS, 1)], data_date=date(2024, 1, 8))
    net = Network(project)
    assert len(net.progress.warnings) == 1
    text = net.progress.warnings[0]
    assert "Q -> R" in text and "SS" in text and "+1" in text
    rows = schedule(net).by_id()
    # R keeps its actual start (day 1) and resumes at the data date: ef = 5 + 2 = 7;
    # Q starts at the data date: 5..10
    assert rows["R"].es == 1 and rows["R"].ef == 7
    assert rows["Q"].es == 5 and rows["Q"].ef == 10



def test_work_with_no_working_day_between_its_actual_dates_stays_at_its_actual_start():
    # source: progress.py docstring (a milestone, duration 0, with an actual date may move to
    # the end of its day; work keeps its actual dates; out-of-sequence links are dropped) and
    # README "Method", "Calendars of their own"; hand-worked of our own:
    # project mon-fri from Mon 2024-01-01; calendar "mondays" works Mondays only, with a
    # holiday on Mon 01-01, so its day 0 is Mon 01-08 and its day 1 Mon 01-15.
    # N: milestone with no predecessor, happened Mon 01-01: at the start of project day 0.
    # W (1 d, "mondays") actually started and finished Mon 01-01, its holiday. Read as a
    #   start, 01-01 is the first Monday worked on or after it, Mon 01-08 = its day 0; read
    #   as the last day worked, no working day of "mondays" up to 01-01: finish 0. W is
    #   work (duration 1) that spans 0 working days, fixed at day 0; it is not a milestone.
    # N -> W FS+1: N happens at the boundary before Mon 01-01; the first "mondays" day not
    #   before it is day 0 (01-01 is a holiday), + 1 = day 1 (Mon 01-15). W started at 0 < 1:
    #   out of sequence, the link is dropped and W stays at day 0 (were W settled as a
    #   milestone it would move to day 1 and keep the link).
    mondays = Calendar((0,), (date(2024, 1, 1),), "mondays")
    project = make_project([
        Activity("N", 0, actual_start=date(2024, 1, 1), actual_finish=date(2024, 1, 1)),
        Activity("W", 1, actual_start=date(2024, 1, 1), actual_finish=date(2024, 1, 1),
                 calendar="mondays"),
    ], [Link("N", "W", FS, 1)], data_date=date(2024, 1, 2), calendars=(mondays,))
    net = Network(project)
    w = net.progress.activities[1]
    assert (w.duration, w.release, w.start) == (0, 0, 0)
    assert net.progress.dropped == {0}
    assert len(net.progress.warnings) == 1 and "N -> W" in net.progress.warnings[0]
    assert net.forward([0, 0]) == [0, 0]
    # the independent plan check reads the project the same way
    checker = PlanChecker(project)
    assert checker.dropped == net.progress.dropped and checker.forward([0, 0]) == [0, 0]

# ---------------------------------------------------------------------------------------
# 4. Only remaining work can be accelerated
# ---------------------------------------------------------------------------------------

@pytest.mark.parametrize("duration, crash_days, remaining", [
    (8, 5, 5),   # floor(5 * 5 / 8) = floor(3.125) = 3
    (10, 4, 3),  # floor(4 * 3 / 10) = floor(1.2) = 1
    (6, 3, 6),   # nothing done yet: floor(3 * 6 / 6) = 3, the whole allowance
    (7, 3, 2),   # floor(3 * 2 / 7) = floor(0.857) = 0: cannot be shortened at all
])
def test_started_activity_can_be_shortened_by_its_remaining_share(duration, crash_days, remaining):
    # source: progress.py docstring ("shortened by the unused part of its crash allowance in
    # proportion to the remaining work (rounded down)"); numbers hand-worked of our own:
    # P started Mon 01-01 (day 0), data date Thu 01-04 = day 3; P resumes at day 3 and ends
    # at 3 + R. Q (6 d, FS after P) can lose 4 days at 500 a day; P costs 200 a day.
    # Normal finish N = 3 + R + 6. P is the cheaper, so at target T the least-cost plan
    # shortens P by min(allowance, N - T) and Q by the rest; the shortest finish is
    # N - allowance - 4; below it no plan exists.
    allowance = (crash_days * remaining) // duration  # hand-worked values in the comments above
    project = make_project([
        Activity("P", duration, crash_duration=duration - crash_days, cost=1000.0,
                 crash_cost=1000.0 + 200.0 * crash_days, actual_start=date(2024, 1, 1),
                 remaining=remaining),
        Activity("Q", 6, crash_duration=2, cost=3000.0, crash_cost=3000.0 + 500.0 * 4),
    ], [Link("P", "Q")], data_date=date(2024, 1, 4))
    study = Planner(project)
    normal = 3 + remaining + 6
    assert study.normal_finish == normal
    assert study.shortest_finish == normal - allowance - 4
    for target in range(normal - 1, normal - allowance - 4 - 1, -1):
        plan = study.plan(target)
        p = plan.activities[0]
        q = plan.activities[1]
        assert p.shortened_by <= allowance
        assert p.shortened_by == min(allowance, normal - target)
        assert q.shortened_by == normal - target - p.shortened_by
        assert abs(p.added_cost - 200.0 * p.shortened_by) <= TOL
        assert abs(plan.added_cost - 200.0 * p.shortened_by - 500.0 * q.shortened_by) <= TOL
        assert plan.finish <= target
    with pytest.raises(InfeasibleTargetError):
        study.plan(normal - allowance - 4 - 1)


def test_started_activity_takes_its_crash_steps_in_order():
    # source: progress.py docstring ("taking its crash steps in order"); hand-worked of our own:
    # P (8 d) has steps 2 days at 100 then 3 days at 300 (allowance 5); started Mon 01-01,
    # data date Thu 01-04 = day 3, remaining 6: floor(5 * 6 / 8) = floor(3.75) = 3 days,
    # i.e. 2 at 100 and 1 at 300. P alone: normal finish 3 + 6 = 9, shortest 9 - 3 = 6.
    # Costs: finish 8 -> 100, 7 -> 200, 6 -> 200 + 300 = 500; finish 5 impossible.
    project = make_project([
        Activity("P", 8, cost=800.0, steps=(CrashStep(2, 100.0), CrashStep(3, 300.0)),
                 actual_start=date(2024, 1, 1), remaining=6),
    ], [], data_date=date(2024, 1, 4))
    study = Planner(project)
    assert study.normal_finish == 9
    assert study.shortest_finish == 6
    for target, cost in ((8, 100.0), (7, 200.0), (6, 500.0)):
        plan = study.plan(target)
        assert abs(plan.added_cost - cost) <= TOL, target
        assert plan.activities[0].shortened_by == 9 - target
    with pytest.raises(InfeasibleTargetError):
        study.plan(5)


# ---------------------------------------------------------------------------------------
# 5. Bad progress data (model level; file-level messages are tested elsewhere)
# ---------------------------------------------------------------------------------------

DATA_DATE = date(2024, 1, 17)  # a Wednesday


@pytest.mark.parametrize("activity, column", [
    # actual finish before actual start (both before the data date)
    (Activity("X", 5, actual_start=date(2024, 1, 10), actual_finish=date(2024, 1, 8)), "actual_finish"),
    # actual start after the data date
    (Activity("X", 5, actual_start=date(2024, 1, 18), remaining=2), "actual_start"),
    # actual finish after the data date
    (Activity("X", 5, actual_start=date(2024, 1, 10), actual_finish=date(2024, 1, 19)), "actual_finish"),
    # more work remaining than the duration
    (Activity("X", 5, actual_start=date(2024, 1, 10), remaining=6), "remaining"),
])
def test_bad_progress_data_raises_input_error(activity, column):
    # source: progress.py docstring and RULES.md ("Bad input: raise hasten.errors.InputError
    # naming ... column, value and fix")
    project = make_project([activity, Activity("Y", 2)], [Link("X", "Y")], data_date=DATA_DATE)
    with pytest.raises(InputError) as err:
        Network(project)
    assert err.value.column == column
    assert "activity X" in str(err.value)
    assert err.value.fix
