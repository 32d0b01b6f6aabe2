"""When a milestone happens: the rule of README "Method" ("Milestones") in the model, the
progress rules and the dates shown.

The rule (src/hasten/progress.py, module notes): a milestone is a point in time, the
boundary between two working days. A start milestone (no predecessors) happens at the start
of its day; any other milestone at the end of the day its predecessors end, but never before
the start of the first day it may happen (the project start, its ``not_before`` date, the
data date). A milestone with an actual date happened at the start of that day, or at its end
when a predecessor it follows ended that day.

Every check is hand-worked of our own (arithmetic in the comments). Calendar: mon-fri, no
holidays, start Mon 2024-01-01 = day 0 (conftest.START). Working days: Fri 01-05 = 4,
Mon 01-08 = 5, Tue 01-09 = 6, Wed 01-10 = 7, Thu 01-11 = 8, Fri 01-12 = 9, Mon 01-15 = 10, Tue 01-16 = 11, Wed 01-17 = 12,
Thu 01-18 = 13, Fri 01-19 = 14, Mon 01-22 = 15.
"""

from __future__ import annotations

import dataclasses
from datetime import date

import pytest

from conftest import TOL, make_project
from hasten.cpm import schedule
from hasten.network import Network
from hasten.planner import Planner
from hasten.project import Activity, Contract, Link
from hasten.recovery import recovery
from hasten.render_json import schedule_rows


def rows_of(project) -> dict[str, dict]:
    return {r["id"]: r for r in schedule_rows(project, schedule(project))}


# -- progress: a milestone and the work that follows it on the same day -----------------

def test_notice_to_proceed_and_work_starting_the_same_day_are_in_sequence():
    # NTP (no predecessors) happened on Mon 01-01; site set-up (FS after it) started the
    # same day. A start milestone happens at the start of its day: day 0, and work may
    # start at day 0: the link holds (0 >= 0 + 0). Before the rule the NTP was put at the
    # end of its day (offset 1) and the link was reported as broken.
    project = make_project([
        Activity("NTP", 0, actual_start=date(2024, 1, 1), actual_finish=date(2024, 1, 1)),
        Activity("SET", 5, actual_start=date(2024, 1, 1), remaining=2),
    ], [Link("NTP", "SET")], data_date=date(2024, 1, 8))
    net = Network(project)
    assert net.progress.warnings == ()
    rows = rows_of(project)
    assert rows["NTP"]["early_start"] == rows["NTP"]["early_finish"] == "2024-01-01"


def test_delivery_with_a_predecessor_and_erection_starting_the_same_day():
    # FAB finished Fri 01-05 (last day worked; its finish is offset 5). The delivery DEL
    # (FS after FAB) happened on Wed 01-10 = day 7 and erection ERE (FS after DEL) started
    # that day. FAB ended before 01-10, so DEL happened at the start of 01-10 (offset 7):
    # FAB -> DEL holds (7 >= 5) and DEL -> ERE holds (7 >= 7).
    project = make_project([
        Activity("FAB", 5, actual_start=date(2024, 1, 1), actual_finish=date(2024, 1, 5)),
        Activity("DEL", 0, actual_start=date(2024, 1, 10), actual_finish=date(2024, 1, 10)),
        Activity("ERE", 4, actual_start=date(2024, 1, 10), remaining=3),
    ], [Link("FAB", "DEL"), Link("DEL", "ERE")], data_date=date(2024, 1, 12))
    assert Network(project).progress.warnings == ()
    assert rows_of(project)["DEL"]["early_start"] == "2024-01-10"


def test_a_finish_milestone_on_its_predecessors_last_day_happens_at_the_end_of_it():
    # ROOF finished Wed 01-10 (day 7; finish offset 8). DRY (FS after ROOF) is dated
    # 01-10 too: it happened at the end of that day (offset 8), so the link holds (8 >= 8)
    # and DRY is still shown on 01-10. FIT (FS after DRY) started 01-10 as well: that is
    # before DRY happened (7 < 8): out of sequence, reported once.
    # GO (FS after DRY) started Thu 01-11 = day 8: in sequence (8 >= 8).
    project = make_project([
        Activity("ROOF", 3, actual_start=date(2024, 1, 8), actual_finish=date(2024, 1, 10)),
        Activity("DRY", 0, actual_start=date(2024, 1, 10), actual_finish=date(2024, 1, 10)),
        Activity("FIT", 5, actual_start=date(2024, 1, 10), remaining=3),
        Activity("GO", 5, actual_start=date(2024, 1, 11), remaining=3),
    ], [Link("ROOF", "DRY"), Link("DRY", "FIT"), Link("DRY", "GO")], data_date=date(2024, 1, 15))
    warnings = Network(project).progress.warnings
    assert len(warnings) == 1 and "DRY -> FIT" in warnings[0]
    assert rows_of(project)["DRY"]["early_start"] == "2024-01-10"


def test_a_milestone_dated_before_its_predecessor_finished_is_reported_in_words():
    # WALL finished Wed 01-10; TOP (FS after WALL) is dated Tue 01-09, before it: the
    # milestone happened before WALL allowed it (out of sequence).
    project = make_project([
        Activity("WALL", 3, actual_start=date(2024, 1, 8), actual_finish=date(2024, 1, 10)),
        Activity("TOP", 0, actual_start=date(2024, 1, 9), actual_finish=date(2024, 1, 9)),
    ], [Link("WALL", "TOP")], data_date=date(2024, 1, 15))
    (text,) = Network(project).progress.warnings
    assert "WALL -> TOP" in text and "TOP happened before WALL allowed it" in text


# -- dates shown: not_before, the start of the day ---------------------------------------

def test_a_delivery_dated_by_its_not_before_date_is_shown_on_that_date():
    # ORD (3 d) ends Wed 01-03 (offset 3). DEL (FS after ORD) has not_before Mon 01-15 =
    # day 10: it happens at the start of 01-15 (offset 10); ERE (FS after DEL) starts
    # that day. Before the rule DEL was shown on Fri 01-12 (the day before offset 10).
    project = make_project([
        Activity("ORD", 3),
        Activity("DEL", 0, not_before=date(2024, 1, 15)),
        Activity("ERE", 2),
    ], [Link("ORD", "DEL"), Link("DEL", "ERE")])
    rows = rows_of(project)
    assert (rows["DEL"]["es"], rows["DEL"]["ef"]) == (10, 10)
    assert rows["DEL"]["early_start"] == rows["DEL"]["early_finish"] == "2024-01-15"
    assert rows["ERE"]["early_start"] == "2024-01-15"


def test_a_delivery_driven_by_its_predecessor_is_shown_on_the_day_that_ends():
    # ORD (13 d) ends Wed 01-17 (day 12; offset 13), after the not_before date Mon 01-15:
    # DEL happens at the end of 01-17 and is shown on 01-17; ERE starts Thu 01-18.
    project = make_project([
        Activity("ORD", 13),
        Activity("DEL", 0, not_before=date(2024, 1, 15)),
        Activity("ERE", 2),
    ], [Link("ORD", "DEL"), Link("DEL", "ERE")])
    rows = rows_of(project)
    assert rows["DEL"]["early_start"] == "2024-01-17"
    assert rows["ERE"]["early_start"] == "2024-01-18"


def test_a_start_milestone_with_float_shows_its_late_date_at_the_start_of_a_day():
    # KEY (no predecessors) -> FIT (2 d); A (10 d) runs alongside. Finish 10 (Fri 01-12).
    # FIT's late start is offset 8 (Thu 01-11), so KEY's late date is offset 8: a start
    # milestone happens at the start of its day, shown Thu 01-11 (not Wed 01-10).
    project = make_project([Activity("KEY", 0), Activity("FIT", 2), Activity("A", 10)],
                           [Link("KEY", "FIT")])
    rows = rows_of(project)
    assert rows["KEY"]["early_start"] == "2024-01-01"
    assert (rows["KEY"]["ls"], rows["KEY"]["late_start"]) == (8, "2024-01-11")
    # a finish milestone with the same float is shown on the day before its offset:
    # END (FS after FIT) early offset 2 -> Tue 01-02; late offset 10 -> Fri 01-12
    project = make_project([Activity("FIT", 2), Activity("END", 0), Activity("A", 10)],
                           [Link("FIT", "END")])
    rows = rows_of(project)
    assert rows["END"]["early_start"] == "2024-01-02" and rows["END"]["late_start"] == "2024-01-12"


def test_a_milestone_not_yet_happened_is_not_dated_before_the_data_date():
    # WORK finished Fri 01-05; HAND (FS after WORK) has no actual date at the data date
    # Wed 01-10 (day 7): it has not happened, so it happens on the data date at the
    # earliest: offset 7, shown Wed 01-10 (not Tue 01-09). It ends the job: the project
    # finish is dated 01-10 too.
    project = make_project([
        Activity("WORK", 5, actual_start=date(2024, 1, 1), actual_finish=date(2024, 1, 5)),
        Activity("HAND", 0),
    ], [Link("WORK", "HAND")], data_date=date(2024, 1, 10))
    sched = schedule(project)
    assert sched.finish == 7
    assert rows_of(project)["HAND"]["early_start"] == "2024-01-10"
    assert sched.finish_date == date(2024, 1, 10)


def test_the_project_finish_of_a_job_ending_on_a_not_before_milestone():
    # A (3 d) -> HAND (not before Mon 01-15 = day 10): the finish offset is 10; the job
    # ends when HAND happens, at the start of Mon 01-15, so the finish date is 01-15 (the
    # last working day before offset 10 would be Fri 01-12). Contract finish Fri 01-12 at
    # 100 a calendar day: 3 calendar days late = 300.
    project = make_project([Activity("A", 3), Activity("HAND", 0, not_before=date(2024, 1, 15))],
                           [Link("A", "HAND")],
                           contract=Contract(finish=date(2024, 1, 12), damages_per_day=100.0))
    sched = schedule(project)
    assert (sched.finish, sched.finish_date) == (10, date(2024, 1, 15))
    planner = Planner(project)
    point = planner.total_cost_point(planner.normal_finish, 0.0)
    assert point.finish_date == date(2024, 1, 15)
    assert abs(point.time.damages - 300.0) <= TOL


# -- deadlines count the same dates ------------------------------------------------------

def test_a_not_before_milestone_past_its_deadline_pays_damages():
    # DEL (FS after ORD 3 d) not before Mon 01-15, deadline Fri 01-12, 50 a calendar day.
    # It happens at the start of 01-15: 3 calendar days late = 150, whatever the plan
    # (ORD can be shortened, DEL cannot move earlier); no strict plan exists. Before the
    # rule it was dated Fri 01-12 and counted on time.
    project = make_project([
        Activity("ORD", 3, crash_duration=2, cost=0.0, crash_cost=10.0),
        Activity("DEL", 0, not_before=date(2024, 1, 15), deadline=date(2024, 1, 12), damages_per_day=50.0),
        Activity("ERE", 2),
    ], [Link("ORD", "DEL"), Link("DEL", "ERE")])
    planner = Planner(project)
    plan = planner.plan(planner.normal_finish)
    assert abs(plan.milestone_damages - 150.0) <= TOL
    (ms,) = recovery(planner).milestones
    assert ms.forecast == date(2024, 1, 15) and ms.days_late == 3
    with pytest.raises(Exception):
        planner.plan(planner.normal_finish, strict=True)


def test_a_not_before_milestone_on_its_deadline_day_is_on_time():
    # the same with deadline Mon 01-15: on time, no damages; a strict plan exists.
    project = make_project([
        Activity("ORD", 3),
        Activity("DEL", 0, not_before=date(2024, 1, 15), deadline=date(2024, 1, 15), damages_per_day=50.0),
        Activity("ERE", 2),
    ], [Link("ORD", "DEL"), Link("DEL", "ERE")])
    planner = Planner(project)
    assert planner.plan(planner.normal_finish, strict=True).milestone_damages == 0


# -- actual dates before the project start -----------------------------------------------

def test_a_notice_to_proceed_before_the_project_start_is_history():
    # NTP dated Fri 2023-12-29, the working day before the first site day Mon 01-01
    # (offset -1). SET starts 01-01 (FS after NTP: 0 >= -1 holds). NTP is shown on its
    # own date, and the job still starts on 01-01.
    project = make_project([
        Activity("NTP", 0, actual_start=date(2023, 12, 29), actual_finish=date(2023, 12, 29)),
        Activity("SET", 5, actual_start=date(2024, 1, 1), remaining=2),
    ], [Link("NTP", "SET")], data_date=date(2024, 1, 8))
    assert Network(project).progress.warnings == ()
    sched = schedule(project)
    rows = {r["id"]: r for r in schedule_rows(project, sched)}
    assert rows["NTP"]["early_start"] == "2023-12-29"
    assert sched.start_date == date(2024, 1, 1)
    # the data date Mon 01-08 is day 5: SET resumes there for 2 days
    assert rows["SET"]["ef"] == 7


def test_the_reader_accepts_a_milestone_before_the_start_but_not_work(tmp_path):
    # the rule of README "The project format" (Progress): milestones may carry actual
    # dates before the project start, work may not.
    from hasten.errors import InputError
    from hasten.formats import read_project, write_project

    ok = make_project([
        Activity("NTP", 0, actual_start=date(2023, 12, 29), actual_finish=date(2023, 12, 29)),
        Activity("SET", 5, actual_start=date(2024, 1, 1), remaining=2),
    ], [Link("NTP", "SET")], data_date=date(2024, 1, 8))
    write_project(ok, tmp_path / "ok")
    assert read_project(tmp_path / "ok").activities[0].actual_start == date(2023, 12, 29)
    bad = dataclasses.replace(ok, activities=(ok.activities[0], dataclasses.replace(
        ok.activities[1], actual_start=date(2023, 12, 29))))
    with pytest.raises(InputError) as err:  # (the writer reads back what it wrote)
        write_project(bad, tmp_path / "bad")
    assert "before the project start" in str(err.value)


def test_a_start_milestone_on_a_later_calendar_dates_the_finish():
    # Hand-worked of our own: from Mon 2025-03-03, A (Mon-Fri, 2 days) Mon 3 - Tue 4 Mar;
    # M (no predecessors) works to a Mondays-only calendar whose Mon 3 Mar is a holiday:
    # its day 0 is Mon 10 Mar, where it happens (at the start of the day). The job is not
    # over before M: the finish is dated 10 Mar, not Tue 4 Mar (project day 1). Found by the
    # independent plan check (hasten.plan_check), which dates the finish by its own means.
    from hasten.calendar import CalendarClock
    from hasten.plan_check import check_plan
    from hasten.project import Calendar, Project

    mondays = Calendar((0,), (date(2025, 3, 3),), "mondays")
    project = Project("later", date(2025, 3, 3), (Activity("A", 2), Activity("M", 0, calendar="mondays")),
                      calendars=(mondays,))
    sched = schedule(project)
    assert CalendarClock(mondays, project.start).date_of(0) == date(2025, 3, 10)
    assert sched.finish_date == date(2025, 3, 10)
    assert check_plan(project, [2, 0], claimed_finish=sched.finish, claimed_cost=0.0,
                      claimed_finish_date=sched.finish_date).finish_date == date(2025, 3, 10)
