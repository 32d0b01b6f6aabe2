"""Working-day calendar arithmetic (hasten.calendar.CalendarClock).

Sources of the checks:

- numpy's business-day functions (numpy.busday_offset, numpy.busday_count), called here
  directly, and a day-by-day walk over the calendar written here, on random start dates,
  weekmasks and holiday sets (hypothesis);
- "two weeks" = 14 calendar days = 10 weekdays on a five-day week, 12 on a six-day week:
  legaliq.com, definition of 'calendar day', READ (via the team's trade-facts notes,
  section 5); the holiday case (one weekday holiday inside the two weeks leaves 10 - 1 = 9
  working days) is hand-worked of our own.
"""

from __future__ import annotations

import dataclasses
from datetime import date, timedelta

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from conftest import PROPERTY, make_project
from hasten.calendar import CalendarClock
from hasten.planner import Planner
from hasten.project import Activity, Calendar, Link

WEEKMASKS = {
    "mon-fri": (0, 1, 2, 3, 4),
    "mon-sat": (0, 1, 2, 3, 4, 5),
    "all days": (0, 1, 2, 3, 4, 5, 6),
}


@st.composite
def calendars(draw):
    """A start date, a weekmask (a named one, or a random one with at least one working
    day) and a random set of holidays around the start (some on non-working days, some
    repeated, some before the start)."""
    start = draw(st.dates(min_value=date(1990, 1, 1), max_value=date(2060, 12, 31)))
    if draw(st.booleans()):
        workdays = WEEKMASKS[draw(st.sampled_from(sorted(WEEKMASKS)))]
    else:
        workdays = tuple(sorted(draw(st.sets(st.integers(0, 6), min_size=1, max_size=7))))
    holidays = tuple(start + timedelta(days=k)
                     for k in draw(st.lists(st.integers(-40, 500), max_size=40)))
    return Calendar(workdays=workdays, holidays=holidays, name="random"), start


def np_args(cal: Calendar) -> dict:
    mask = "".join("1" if d in cal.workdays else "0" for d in range(7))
    return dict(weekmask=mask, holidays=np.array(cal.holidays, dtype="datetime64[D]"))


def working(cal: Calendar, day: date) -> bool:
    """Our own reading of the calendar: a listed weekday that is not a holiday."""
    return day.weekday() in cal.workdays and day not in set(cal.holidays)


def walk_day0(cal: Calendar, start: date) -> date:
    """The first working day on or after the start, by walking day by day."""
    day = start
    while not working(cal, day):
        day += timedelta(days=1)
    return day


def walk_date(cal: Calendar, day0: date, k: int) -> date:
    """Working day ``k`` counted from day 0 (negative: before it), by walking."""
    day, step, left = day0, (1 if k >= 0 else -1), abs(k)
    while left:
        day += timedelta(days=step)
        if working(cal, day):
            left -= 1
    return day


def np_count(kw: dict, a, b) -> int:
    """Signed number of working days in [a, b): numpy.busday_count(a, b) when a <= b, else
    -numpy.busday_count(b, a). (numpy.busday_count called with its end before its begin
    counts the days in (end, begin], including the begin day and excluding the end day, as
    its documentation says "not including the day of enddates"; that is not the count of
    [end, begin), so numpy is called here with begin <= end only.)"""
    a, b = np.datetime64(a, "D"), np.datetime64(b, "D")
    return int(np.busday_count(a, b, **kw)) if a <= b else -int(np.busday_count(b, a, **kw))


@PROPERTY
@given(calendars(), st.lists(st.integers(0, 300), min_size=1, max_size=12))
def test_date_of_and_offset_of_agree_with_numpy_and_round_trip(case, offsets):
    cal, start = case
    clock = CalendarClock(cal, start)
    kw = np_args(cal)
    # reference: numpy.busday_offset (roll forward to the first working day) and a walk
    day0 = np.busday_offset(np.datetime64(start, "D"), 0, roll="forward", **kw)
    assert day0.item() == walk_day0(cal, start)
    assert clock.date_of(0) == day0.item()
    for k in offsets:
        expected = np.busday_offset(day0, k, roll="forward", **kw).item()
        assert expected == walk_date(cal, day0.item(), k)  # the two references agree
        got = clock.date_of(k)
        assert got == expected, k
        assert working(cal, got)
        # round trip: read as a start, the date is working day k; read as the last day
        # worked, k + 1 working days have passed (numpy.busday_count agrees)
        assert clock.offset_of(got, finish=False) == k == np_count(kw, day0, got)
        assert clock.offset_of(got, finish=True) == k + 1 == np_count(kw, day0, got + timedelta(days=1))
        assert clock.start_date(k) == expected
        # a finish offset f means the last day worked is day f - 1
        assert clock.finish_date(k, k + 3) == np.busday_offset(day0, k + 2, roll="forward", **kw).item()
        if k > 0:
            assert clock.project_finish_date(k) == np.busday_offset(day0, k - 1, **kw).item()
    assert clock.dates_of(offsets) == [clock.date_of(k) for k in offsets]


@PROPERTY
@given(calendars(), st.lists(st.integers(-30, 0), min_size=1, max_size=6))
def test_negative_offsets_round_trip(case, offsets):
    # calendar.py: date_of "may be negative: before the start"; references as above
    cal, start = case
    clock = CalendarClock(cal, start)
    kw = np_args(cal)
    day0 = np.busday_offset(np.datetime64(start, "D"), 0, roll="forward", **kw)
    for k in offsets:
        got = clock.date_of(k)
        assert got == np.busday_offset(day0, k, roll="forward", **kw).item() == walk_date(cal, day0.item(), k)
        assert clock.offset_of(got, finish=False) == k == np_count(kw, day0, got)
        assert clock.offset_of(got, finish=True) == k + 1 == np_count(kw, day0, got + timedelta(days=1))


@PROPERTY
@given(calendars(), st.lists(st.integers(-40, 450), min_size=1, max_size=12))
def test_offset_of_any_date_agrees_with_numpy(case, shifts):
    cal, start = case
    clock = CalendarClock(cal, start)
    kw = np_args(cal)
    day0 = np.busday_offset(np.datetime64(start, "D"), 0, roll="forward", **kw)
    for s in shifts:
        day = start + timedelta(days=s)
        # reference: numpy.busday_count (working days in [day 0, day) or [day 0, day])
        assert clock.offset_of(day, finish=False) == np_count(kw, day0, day), day
        assert clock.offset_of(day, finish=True) == np_count(kw, day0, day + timedelta(days=1)), day
        # a non-working day read as a start is the next working day; read as a finish, the
        # working day before it (walk reference)
        nxt = day
        while not working(cal, nxt):
            nxt += timedelta(days=1)
        prev = day
        while not working(cal, prev):
            prev -= timedelta(days=1)
        assert clock.date_of(clock.offset_of(day, finish=False)) == nxt, day
        assert clock.date_of(clock.offset_of(day, finish=True) - 1) == prev, day
        # working days in an inclusive range (numpy.busday_count on [first, last + 1))
        last = day + timedelta(days=abs(s) % 20)
        assert clock.working_days_in(day, last) == np_count(kw, day, last + timedelta(days=1))


def test_offset_of_a_date_before_day_zero():
    # hand-worked of our own, mon-fri, start Mon 2024-01-08 (day 0): Fri 01-05 is day -1
    # (date_of(-1)); Thu 01-04 is day -2.
    #   read as a start:  Fri 01-05 -> -1; Sat 01-06 -> the next working day, Mon 01-08 = 0
    #   read as the last day worked: Fri 01-05 -> -1 + 1 = 0; Thu 01-04 -> -2 + 1 = -1;
    #   Sun 01-07 -> the working day before it, Fri = -1, so -1 + 1 = 0
    clock = CalendarClock(Calendar(), date(2024, 1, 8))
    assert clock.date_of(-1) == date(2024, 1, 5)
    assert clock.offset_of(date(2024, 1, 5), finish=False) == -1
    assert clock.offset_of(date(2024, 1, 6), finish=False) == 0
    assert clock.offset_of(date(2024, 1, 4), finish=True) == -1
    assert clock.offset_of(date(2024, 1, 5), finish=True) == 0
    assert clock.offset_of(date(2024, 1, 7), finish=True) == 0


# ---------------------------------------------------------------------------------------
# "Two weeks" in working days
# ---------------------------------------------------------------------------------------

START_MONDAY = date(2024, 3, 4)  # a Monday


def chain(length: int, calendar: Calendar):
    """A long chain project: 12 activities of 5 working days, then one of ``length``."""
    acts = [Activity(f"c{i}", 5) for i in range(12)] + [Activity("last", length)]
    links = [Link(a.id, b.id) for a, b in zip(acts, acts[1:])]
    return dataclasses.replace(make_project(acts, links, calendar=calendar), start=START_MONDAY)


@pytest.mark.parametrize("length", range(1, 8))  # the finish lands on every day of the week
@pytest.mark.parametrize("workdays, expected", [
    ((0, 1, 2, 3, 4), 10),     # five-day week: two weeks = 10 working days
    ((0, 1, 2, 3, 4, 5), 12),  # six-day week: 12
])
def test_two_weeks_earlier_counts_working_days(length, workdays, expected):
    # source: legaliq.com, definition of 'calendar day', READ: two weeks are 14 calendar
    # days, 10 or 12 weekdays by local usage (five- or six-day week); no holidays
    study = Planner(chain(length, Calendar(workdays=workdays)))
    target = study.target_earlier(calendar_days=14)
    assert study.normal_finish - target == expected
    # the new finish date is 14 calendar days before the normal one when that is a working
    # day (it always is here: the week repeats), by CalendarClock
    assert (study.clock.project_finish_date(study.normal_finish)
            - study.clock.project_finish_date(target)).days == 14


@pytest.mark.parametrize("length", range(1, 6))
def test_two_weeks_earlier_with_a_holiday_inside(length):
    # source: legaliq.com, definition of 'calendar day', READ (10 weekdays in two weeks on a
    # five-day week); hand-worked of our own: a weekday holiday inside the two weeks before
    # the finish leaves 10 - 1 = 9 working days.
    # The holiday is the weekday 7 calendar days before the finish date without holidays
    # (F0); with it the finish moves to the next working day F1 <= F0 + 3 days, and the
    # window (F1 - 14, F1] still holds F0 - 7 (F1 - 14 <= F0 - 11 < F0 - 7 < F1).
    plain = Planner(chain(length, Calendar()))
    f0 = plain.clock.project_finish_date(plain.normal_finish)
    holiday = f0 - timedelta(days=7)
    assert holiday.weekday() < 5
    study = Planner(chain(length, Calendar(holidays=(holiday,))))
    f1 = study.clock.project_finish_date(study.normal_finish)
    assert f1 - timedelta(days=14) < holiday < f1
    target = study.target_earlier(calendar_days=14)
    assert study.normal_finish - target == 9
