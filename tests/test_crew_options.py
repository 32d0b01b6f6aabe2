"""Options built from crew data, checked against hand calculations written out here.

The losses and pay rules used are the published ones (see test_productivity.py and
test_premium.py for their sources); the crews, hours and wages below are small made-up
inputs whose results are worked by hand in each test, step by step.
"""

from __future__ import annotations

import math
from fractions import Fraction

import numpy as np
import pytest

from hasten.crew_options import (build_options, labour_cautions, normal_working, option_sources,
                                 project_days, with_options)
from hasten.errors import InputError
from hasten.labour import CrewData, LabourRules
from hasten.productivity import CLARK_LORENZONI, PLANT_ESTIMATING_2019, ProductivityTable
from hasten.project import Activity, Option

TOL = 0.005  # added costs are rounded to the cent
# 320 work-hours, 2 workers at 40 an hour, plant 150 a working day, room for 2 crews
SMALL = CrewData(labour_hours=320, crew_size=2, wage=40, max_crews=2, equipment_per_day=150)


def _by_name(built):
    return {o.name: (o, w) for o, w in zip(built.options, built.workings)}


def test_normal_working_by_hand():
    # 2 workers x 40 h = 80 h a week; 320 / 80 = 4 weeks = 20 days (5-day weeks);
    # cost 320 h x 40 + 20 days x 150 = 12,800 + 3,000 = 15,800
    normal = normal_working(SMALL, LabourRules(), 5)
    assert (normal.weeks, normal.crew_days, normal.duration) == (4, 20, 20)
    assert normal.cost == 15800 and normal.loss == 0


def test_options_for_a_small_activity_by_hand():
    built = build_options("A10", SMALL, LabourRules(), "5x10,6x10,2-shifts,+1-crew,+2-crews",
                          CLARK_LORENZONI, 5)
    got = _by_name(built)
    assert list(got) == ["5x10", "6x10", "2-shifts", "+1-crew"]

    # 5x10: Clark & Lorenzoni 7%: 2 x 50 x 0.93 = 93 productive h a week; 320 / 93 weeks;
    # days worked ceil(5 x 320 / 93 = 17.2) = 18 = 18 working days; pay 40 straight + 10 at
    # 1.5x = 55 per 50 h a worker; labour 320/93 x 2 x 55 x 40; plant 18 x 150
    option, work = got["5x10"]
    weeks = Fraction(320, 93)
    assert work.weeks == float(weeks) and (work.crew_days, option.duration) == (18, 18)
    cost = weeks * 2 * 55 * 40 + 18 * 150
    assert option.added_cost == pytest.approx(float(cost) - 15800, abs=TOL)
    assert option.added_cost == pytest.approx(2039.78, abs=0.01)

    # 6x10: 17%: 2 x 60 x 0.83 = 99.6 a week; 320 / 99.6 = 3.21 weeks; ceil(6 x 3.21 = 19.3) = 20
    # days worked = 3 six-day weeks + 2 days = 3 x 5 + 2 = 17 working days of a 5-day calendar;
    # pay 70 per 60 h (Friday and Saturday at 1.5x)
    option, work = got["6x10"]
    weeks = Fraction(320) / Fraction("99.6")
    assert (work.crew_days, option.duration) == (20, 17)
    assert work.productive_hours_per_week == pytest.approx(99.6)
    assert option.added_cost == pytest.approx(float(weeks * 2 * 70 * 40) + 20 * 150 - 15800, abs=TOL)

    # 2-shifts: day 2 x 40 = 80 h, second shift 2 x 5 x 7.5 = 75 h: 155 h a week; the second
    # shift does 75/155 = 48.4% of the hours; Hanna 2008: loss = 0.22052 + 0.07152 ln(75/155);
    # pay: day 80 + second shift 2 x 5 x 8 = 80 paid (8 for 7.5)
    option, work = got["2-shifts"]
    loss = 0.22052 + 0.07152 * math.log(75 / 155)
    weeks = 320 / (155 * (1 - loss))
    assert work.loss == pytest.approx(loss, abs=1e-12)
    assert (work.crew_days, option.duration) == (math.ceil(5 * weeks), 13)
    assert option.added_cost == pytest.approx(weeks * 160 * 40 + 13 * 150 - 15800, abs=TOL)

    # +1-crew: 2 crews x 80 h = 160 a week, MCAA "stacking of own forces", average 20%:
    # 128 productive a week; 320 / 128 = 2.5 weeks = 12.5 -> 13 days; paid 400 h x 40 = 16,000;
    # plant 13 x 150 = 1,950; added 16,000 + 1,950 - 15,800 = 2,150
    option, work = got["+1-crew"]
    assert (work.weeks, option.duration, option.added_cost) == (2.5, 13, 2150)
    assert "MCAA stacking of contractor's own forces, average" in option.note

    # +2-crews would put 3 crews in an area that takes 2
    assert [(s.measure, "max_crews" in s.reason) for s in built.skipped] == [("+2-crews", True)]


def test_the_note_traces_every_figure():
    built = build_options("A10", SMALL, LabourRules(), "6x10", CLARK_LORENZONI, 5)
    note = built.options[0].note
    for part in ("clark-lorenzoni 6x10", "loss 17.0% on all hours", "99.6 productive h a week of 120 worked",
                 "20 days worked = 17 working days", "70 paid for 60 h (40 h at 1x, 20 h at 1.5x)",
                 "against normal 12800.00 + 3000.00 (20 working days)"):
        assert part in note, part


def test_week_by_week_table_60_hours_for_8_weeks_by_hand():
    # Elsevier 2019 Table 9, 60 h column, weeks 1-8 sum to 1.75 (test_productivity). Rule: the
    # loss of each week falls on all its hours, so 4 workers x 60 h for 8 weeks do
    # 240 x (8 - 1.75) = 1,500 h of normal work: 1,500 labour hours take exactly 8 weeks, at an
    # average loss of 1.75 / 8 = 21.875%. Days worked 8 x 6 = 48 = 8 x 5 = 40 working days;
    # normal: 1,500 / 160 = 9.375 weeks -> ceil(46.875) = 47 days. Paid 8 x 4 x 70 = 2,240 h.
    crew = CrewData(labour_hours=1500, crew_size=4, wage=30)
    built = build_options("B20", crew, LabourRules(), "6x10,5x12", PLANT_ESTIMATING_2019, 5)
    assert built.normal.duration == 47
    six, five = built.workings
    assert (six.weeks, six.loss, six.crew_days, six.duration) == (8, 0.21875, 48, 40)
    assert six.paid_hours == 2240
    assert built.options[0].added_cost == 2240 * 30 - 1500 * 30
    assert (five.weeks, five.crew_days, five.duration) == (8, 40, 40)
    # week 8's own factor (0.36) on every week would give 1500 / (240 x 0.64) = 9.77 weeks,
    # slower than normal working; the average of weeks 1..8 is the honest figure
    assert 1500 / (240 * 0.64) > 9.375
    assert "average over the weeks worked" in built.options[0].note


def test_four_thousand_work_hours_through_the_options():
    # Zarenski 2018: 4,000 MH; 6x10 gives 50 productive hours of 60 -> 80 man-weeks (20% saved),
    # not 66.7 (33%). Crew of 10: normal 10 weeks (50 days); 6x10 8 weeks = 48 days worked =
    # 40 working days, 4,800 h worked = 80 man-weeks of 60 h.
    fifty = ProductivityTable("zarenski", "Zarenski 2018", "read", {"6x10": (Fraction(1, 6),)})
    crew = CrewData(labour_hours=4000, crew_size=10, wage=50)
    built = build_options("C30", crew, LabourRules(), "6x10", fifty, 5)
    work = built.workings[0]
    assert work.worked_hours / 60 == 80 and built.normal.worked_hours / 40 == 100
    assert (built.normal.duration, work.duration) == (50, 40)
    assert 1 - work.duration / built.normal.duration == pytest.approx(0.20)


@pytest.mark.parametrize("crew_days, calendar_days, expected", [(14, 5, 10), (14, 6, 12), (14, 7, 14)])
def test_two_weeks_of_every_day_work_in_project_days(crew_days, calendar_days, expected):
    # trade-facts 5 (legaliq.com, READ): 14 calendar days = 10 working days on a 5-day week, 12 on
    # a 6-day week
    assert project_days(crew_days, 7, calendar_days) == expected


def test_project_days_against_numpy_business_days():
    # numpy's business-day functions: the n-th working day of the crew's week from a Monday,
    # then the project calendar's working days up to and including it
    monday = np.datetime64("2024-01-01")
    for crew_week in range(1, 8):
        crew_mask = "1" * crew_week + "0" * (7 - crew_week)
        for calendar_days in range(1, 8):
            project_mask = "1" * calendar_days + "0" * (7 - calendar_days)
            for n in range(1, 40):
                last = np.busday_offset(monday, n - 1, roll="forward", weekmask=crew_mask)
                expected = int(np.busday_count(monday, last + 1, weekmask=project_mask))
                assert project_days(n, crew_week, calendar_days) == expected, (n, crew_week, calendar_days)


def test_a_measure_that_saves_no_time_is_skipped():
    # 16 h for 2 workers: 0.2 weeks = 1 day at normal working; no measure beats 1 day
    tiny = CrewData(labour_hours=16, crew_size=2, wage=40)
    built = build_options("D40", tiny, LabourRules(), "5x10,5x8", CLARK_LORENZONI, 5)
    assert built.options == ()
    assert [s.measure for s in built.skipped] == ["5x10", "5x8"]
    assert "no sooner than normal working (1)" in built.skipped[0].reason
    assert built.skipped[1].reason == "this is the normal week"


def test_the_physical_minimum_holds():
    # 6x10 (17 days) and 5x10 (18 days) are held at a minimum of 19; a minimum of 20 (normal) or
    # more leaves nothing to offer
    crew = CrewData(labour_hours=320, crew_size=2, wage=40, min_duration=19)
    built = build_options("E50", crew, LabourRules(), "5x10,6x10", CLARK_LORENZONI, 5)
    assert [o.duration for o in built.options] == [19, 19]
    assert all(w.held_at_minimum for w in built.workings)
    assert "held at the physical minimum" in built.options[0].note
    built = build_options("E50", SMALL, LabourRules(), "5x10,6x10", CLARK_LORENZONI, 5, min_duration=20)
    assert built.options == () and "physical minimum of 20" in built.skipped[0].reason


def test_long_overtime_can_finish_later_than_40_hour_weeks():
    # Business Roundtable 1980: 60+ hour weeks kept up beyond about two months can finish later
    # than 40-hour weeks. With the week-by-week plant table, 3,000 h for 4 workers (18.75 weeks
    # at 40 h) at 72 or 84 h a week lose so much that they finish after normal working.
    crew = CrewData(labour_hours=3000, crew_size=4, wage=30)
    built = build_options("H80", crew, LabourRules(), "6x12,6x14", PLANT_ESTIMATING_2019, 5)
    assert built.options == ()
    assert all("no sooner than normal working (94)" in s.reason for s in built.skipped)
    # the same crew on a short job gains from them
    short = build_options("H81", CrewData(600, 4, wage=30), LabourRules(), "6x12", PLANT_ESTIMATING_2019, 5)
    assert short.options[0].duration < short.normal.duration


def test_no_labour_hours_left():
    crew = CrewData(labour_hours=0, crew_size=2, wage=40)
    built = build_options("F60", crew, LabourRules(), "6x10", CLARK_LORENZONI, 5)
    assert built.options == () and built.skipped[0].reason == "no labour hours left"


def test_errors_name_the_column():
    with pytest.raises(InputError) as err:
        build_options("A", SMALL, LabourRules(), "6x9", CLARK_LORENZONI, 5, column="--crews")
    assert (err.value.column, err.value.value) == ("--crews", "6x9")
    with pytest.raises(InputError):  # refused even where there is nothing left to do
        build_options("A", CrewData(0, 2, wage=40), LabourRules(), "6x9", CLARK_LORENZONI, 5)
    # a second shift longer than the day shift would do more than half the hours (Hanna 2008)
    rules = LabourRules(normal_hours=7)
    with pytest.raises(InputError) as err:
        build_options("A", SMALL, rules, "2-shifts", CLARK_LORENZONI, 5)
    assert err.value.column == "labour.shift_worked_hours" and "50%" in str(err.value)
    with pytest.raises(InputError) as err:
        build_options("A", SMALL, LabourRules(), "6x10", CLARK_LORENZONI, 8)
    assert err.value.column == "calendar"


def test_the_users_crowding_loss():
    # the job's own figure replaces the MCAA level: 2 crews x 80 h x 0.9 = 144 a week;
    # 320 / 144 = 2.22 weeks = 11.1 -> 12 days
    built = build_options("G70", SMALL, LabourRules(crowding_loss=0.1), "+1-crew", CLARK_LORENZONI, 5)
    assert built.options[0].duration == 12 and "labour.crowding_loss" in built.options[0].note
    severe = build_options("G70", SMALL, LabourRules(crowding="severe"), "+1-crew", CLARK_LORENZONI, 5)
    assert "severe" in severe.options[0].note and severe.workings[0].loss == pytest.approx(0.3)


def test_with_options_adds_them_and_refuses_a_name_twice():
    built = build_options("A10", SMALL, LabourRules(), "6x10", CLARK_LORENZONI, 5)
    activity = Activity("A10", duration=20, options=(Option("precast", 15, 9000.0),))
    joined = with_options(activity, built)
    assert [o.name for o in joined.options] == ["precast", "6x10"]
    with pytest.raises(InputError):
        with_options(joined, built)


def test_cautions_name_the_activities():
    rules = LabourRules()
    long_run = build_options("L1", CrewData(1501, 4, wage=30), rules, "6x10", PLANT_ESTIMATING_2019, 5)
    eight = build_options("L2", CrewData(1500, 4, wage=30), rules, "6x10", PLANT_ESTIMATING_2019, 5)
    fourteen = build_options("L3", CrewData(1000, 4, wage=30), rules, "6x14", PLANT_ESTIMATING_2019, 5)
    shifts = build_options("S1", SMALL, rules, "2-shifts,+1-crew,+2-crews", CLARK_LORENZONI, 5)
    curing = build_options("K1", CrewData(320, 2, wage=40, min_duration=10), rules, "5x10", CLARK_LORENZONI, 5)
    text = labour_cautions([long_run, eight, fourteen, shifts, curing])

    def caution(word):
        found = [c for c in text if word in c]
        assert len(found) == 1, word
        return found[0]

    # Business Roundtable 1980: 60+ h a week beyond about eight weeks; exactly 8 weeks is not
    assert caution("Business Roundtable").startswith("L1:")
    assert caution("more than 12 hours a day").startswith("L3:")
    assert caution("Dembe").startswith("L1, L2, L3, K1:")  # every overtime option
    assert caution("night shifts").startswith("S1:")
    assert caution("Ibbs & Sun").startswith("S1:")
    assert caution("max_crews").startswith("S1:")
    assert caution("curing").startswith("K1:") and "ACI 347" in caution("curing")
    assert caution("collective agreements and the contract").startswith("L1, L2, L3, S1, K1:")
    assert labour_cautions([]) == []


def test_sources_of_the_options():
    shifts = build_options("S1", SMALL, LabourRules(), "6x10,2-shifts,+1-crew", CLARK_LORENZONI, 5)
    lines = option_sources([shifts])
    assert len(lines) == 3
    assert "Clark & Lorenzoni" in lines[0] and "Hanna" in lines[1] and "MCAA" in lines[2]
