"""Gaps a mutation run found in the passes, the network and progress (tools/mutation.py;
DEVELOPERS.md, "Mutation score"). Each test names the mutant it catches; every expected
value is hand-worked here from the rules of src/hasten/progress.py and src/hasten/passes.py
(their module notes are the spec).

Calendar mon-fri, no holidays, start Mon 2024-01-01 = day 0 (conftest.START): Fri 01-05 =
4, Mon 01-08 = 5, Tue 01-09 = 6, Wed 01-10 = 7, Thu 01-11 = 8, Fri 01-12 = 9, Mon 01-15 = 10.
"""

from __future__ import annotations

from datetime import date

from conftest import make_project
from hasten.cpm import schedule
from hasten.network import Network
from hasten.project import Activity, Link, LinkType

FS, SS, FF, SF = LinkType.FS, LinkType.SS, LinkType.FF, LinkType.SF
A_DONE = Activity("A", 5, actual_start=date(2024, 1, 1), actual_finish=date(2024, 1, 5))  # days 0..4


def test_an_ff_link_from_finished_work_bounds_the_successors_finish():
    # mutant passes-loop-finish-release. Hand-worked: A finished Mon 01-01..Fri 01-05, so
    # its finish is day 5. A -FF+6-> B (4 days, not started): B's finish >= 5 + 6 = 11, so
    # B may start at 11 - 4 = 7 (Wed 01-10), after the data date Mon 01-08 (day 5).
    p = make_project([A_DONE, Activity("B", 4)], [Link("A", "B", FF, 6)], data_date=date(2024, 1, 8))
    b = schedule(p).by_id()["B"]
    assert (b.es, b.ef) == (7, 11)


def test_an_ss_link_from_finished_work_counts_from_its_actual_start():
    # mutant network-done-from-start. Hand-worked: A started day 0; A -SS+2-> B allows B
    # from day 0 + 2 = 2; the data date Mon 01-08 (day 5) is later, so B starts at 5, not
    # at A's finish 5 + 2 = 7. Likewise A -SF+8-> C (2 days): C's finish >= 0 + 8 = 8, so
    # C starts at 8 - 2 = 6 (not 5 + 8 - 2 = 11).
    p = make_project([A_DONE, Activity("B", 3), Activity("C", 2)],
                     [Link("A", "B", SS, 2), Link("A", "C", SF, 8)], data_date=date(2024, 1, 8))
    rows = schedule(p).by_id()
    assert (rows["B"].es, rows["B"].ef) == (5, 8)
    assert (rows["C"].es, rows["C"].ef) == (6, 8)


def test_a_milestone_before_the_start_stays_on_its_date_in_a_wide_network():
    # mutant passes-vector-fixed. Rule (progress.py notes): a finished activity is fixed at
    # its actual dates, and milestones may carry actual dates before the project start. A
    # notice to proceed on Fri 2023-12-29 is day -1 (the working day before day 0); as a
    # milestone its finish is its start: -1. Forty further activities make the network wide
    # enough for the level-by-level (numpy) pass; the loop pass must agree.
    acts = [Activity("NTP", 0, actual_start=date(2023, 12, 29), actual_finish=date(2023, 12, 29)),
            Activity("SET", 5)] + [Activity(f"W{k}", 3) for k in range(40)]
    p = make_project(acts, [Link("NTP", "SET")], data_date=date(2024, 1, 1))
    net = Network(p)
    assert net._vector
    ntp = schedule(net).by_id()["NTP"]
    assert (ntp.es, ntp.ef) == (-1, -1)
    net._vector = False
    assert schedule(net).by_id()["NTP"] == ntp


def test_started_work_keeps_its_actual_start_as_its_late_start():
    # mutant cpm-late-start-started. Rule (README, Method, "Progress"): the actual dates
    # stand; a start that has happened cannot move, so its latest start is the actual one.
    # Hand-worked: C (6 days) started Tue 01-02 (day 1), 3 days remaining from the data date
    # Mon 01-08 (day 5): early dates 1 .. 5 + 3 = 8. C -> D (2 days) ends the job at 10, so
    # C has no float: late start 1 (shown), late finish 8.
    p = make_project([Activity("C", 6, actual_start=date(2024, 1, 2), remaining=3), Activity("D", 2)],
                     [Link("C", "D")], data_date=date(2024, 1, 8))
    c = schedule(p).by_id()["C"]
    assert (c.es, c.ef, c.ls, c.lf, c.total_float) == (1, 8, 1, 8, 0)
    # with a deadline 2 days later (day 12) the remaining work gets 2 days of float, but
    # the start shown stays the actual one
    c = schedule(p, deadline=12).by_id()["C"]
    assert (c.ls, c.lf, c.total_float) == (1, 10, 2)


def test_started_work_without_remaining_days_has_kept_the_normal_pace():
    # mutant progress-elapsed-ignored. The rule of src/hasten/progress.py (_one): with
    # neither remaining days nor a percentage, the working days since the actual start are
    # taken as done at the normal pace (# common practice). Hand-worked: A (10 days) started
    # Mon 01-01 (day 0); the data date Mon 01-08 is day 5: 5 days done, 5 left, early
    # finish 5 + 5 = 10.
    p = make_project([Activity("A", 10, actual_start=date(2024, 1, 1))], [], data_date=date(2024, 1, 8))
    net = Network(p)
    assert net.durations == [5]
    a = schedule(net).by_id()["A"]
    assert (a.es, a.ef) == (0, 10)


def test_the_least_float_is_that_of_work_still_to_do():
    # mutant cpm-least-with-finished. Rule (README, Method): critical activities have the
    # least total float; finished work has no float and is never critical (cpm.py), so the
    # least is taken over the work still to do. Hand-worked, with a calendar of its own:
    # A on a seven-day calendar finished Mon 01-01 .. Sun 01-14 (14 days, finish 14). B
    # (3 days, mon-fri) starts at the data date Mon 01-15 = day 10, early finish 13. Deadline
    # Tue 01-02 = project day 2: B's late start 2 - 3 = -1, total float -1 - 10 = -11; A's
    # own latest finish within day 2 is the evening of Tue 01-02, its seven-day position 2,
    # so A would have 2 - 14 = -12. B, the only work left, has the least float: critical.
    from hasten.project import Calendar, Project

    every_day = Calendar((0, 1, 2, 3, 4, 5, 6), (), "every day")
    acts = (Activity("A", 14, calendar="every day", actual_start=date(2024, 1, 1),
                     actual_finish=date(2024, 1, 14)), Activity("B", 3))
    p = Project("t", date(2024, 1, 1), acts, (Link("A", "B"),), calendars=(every_day,),
                data_date=date(2024, 1, 15))
    s = schedule(p, deadline=date(2024, 1, 2))
    b = s.by_id()["B"]
    assert (b.es, b.ls, b.total_float, b.critical) == (10, -1, -11, True)
    assert s.critical_paths == (("B",),)


def test_a_milestone_after_unfinished_work_happened_at_the_start_of_its_day():
    # mutant progress-started-as-done. Rule (progress.py notes): a milestone with an actual
    # date happened at the start of that day, or at its end when a predecessor it follows
    # ended that day. A (10 days) started Mon 01-01 and has not finished; M (after A) is
    # dated Wed 01-03 (day 2), out of sequence, so it happened at the start of day 2. C
    # follows M with FS+5: C may start at 2 + 5 = 7 (Wed 01-10); the data date Mon 01-08
    # is day 5.
    acts = [Activity("A", 10, actual_start=date(2024, 1, 1), remaining=4),
            Activity("M", 0, actual_start=date(2024, 1, 3), actual_finish=date(2024, 1, 3)),
            Activity("C", 2)]
    p = make_project(acts, [Link("A", "M"), Link("M", "C", FS, 5)], data_date=date(2024, 1, 8))
    s = schedule(p)
    assert len(s.warnings) == 1 and "A -> M" in s.warnings[0]  # out of sequence
    c = s.by_id()["C"]
    assert (c.es, c.ef) == (7, 9)
