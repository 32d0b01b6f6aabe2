"""Working-day offsets <-> calendar dates, with numpy's business-day functions.

Offset ``k`` is the ``k``-th working day counted from the project start (day 0). A start
offset names the first day worked; a finish offset ``f`` (start-of-day convention) means
the last day worked is day ``f - 1``.
"""

from __future__ import annotations

from datetime import date, timedelta

import numpy as np

from .errors import HastenError
from .project import Calendar

__all__ = [
    "CalendarClock",
    "Timeline",
]


class CalendarClock:
    """Converts between working-day offsets and dates for one calendar and start date."""

    def __init__(self, calendar: Calendar, start: date):
        self.calendar = calendar
        self._cal = np.busdaycalendar(weekmask=calendar.weekmask,
                                      holidays=np.array(calendar.holidays, dtype="datetime64[D]"))
        # The first working day on or after the given start is day 0.
        self.day0 = np.busday_offset(np.datetime64(start, "D"), 0, roll="forward", busdaycal=self._cal)

    def date_of(self, offset: int) -> date:
        """The date of working day ``offset`` (may be negative: before the start)."""
        return np.busday_offset(self.day0, int(offset), roll="forward", busdaycal=self._cal).item()

    def dates_of(self, offsets) -> list[date]:
        """Vectorised :meth:`date_of`."""
        arr = np.asarray(offsets, dtype=np.int64)
        out = np.busday_offset(self.day0, arr, roll="forward", busdaycal=self._cal)
        return [d.item() for d in out]

    def iso_dates(self, offsets) -> list[str]:
        """Vectorised :meth:`date_of`, as ISO text (for tables and JSON)."""
        arr = np.asarray(offsets, dtype=np.int64)
        out = np.busday_offset(self.day0, arr, roll="forward", busdaycal=self._cal)
        return np.datetime_as_string(out, unit="D").tolist()

    def start_date(self, offset: int) -> date:
        """First day worked for an activity starting at ``offset``."""
        return self.date_of(offset)

    def finish_date(self, start: int, finish: int) -> date:
        """Last day worked for an activity from ``start`` to ``finish``.

        A milestone (``finish == start``) is dated on the day it falls at the start of.
        """
        return self.date_of(finish - 1 if finish > start else start)

    def project_finish_date(self, finish: int) -> date:
        """Last working day of a project lasting ``finish`` working days."""
        return self.date_of(max(finish - 1, 0)) if finish > 0 else self.date_of(0)

    def offset_of(self, day: date, *, finish: bool = True) -> int:
        """Working-day offset for a date.

        With ``finish=True`` the date is read as the last day worked, so the offset is the
        number of working days from the start up to and including ``day``. A non-working
        day counts as the working day before it. With ``finish=False`` it is read as a start.
        """
        end = np.datetime64(day, "D") + (1 if finish else 0)
        if end >= self.day0:
            return int(np.busday_count(self.day0, end, busdaycal=self._cal))
        return -int(np.busday_count(end, self.day0, busdaycal=self._cal))  # working days in [end, day0)

    def working_days_in(self, first: date, last: date) -> int:
        """Number of working days from ``first`` to ``last`` inclusive."""
        return int(np.busday_count(np.datetime64(first, "D"), np.datetime64(last, "D") + 1,
                                   busdaycal=self._cal))

    def shift_calendar_days(self, finish: int, days: int) -> int:
        """The finish offset whose last working day is on or before the date ``days``
        calendar days before the finish date of ``finish`` (``days`` > 0 = earlier)."""
        target = self.project_finish_date(finish) - timedelta(days=days)
        return self.offset_of(target, finish=True)


#: Link kinds, as numbered in hasten.network and hasten.passes.
_FS, _SS, _FF, _SF = 0, 1, 2, 3


class Timeline:
    """Working-day positions of several calendars on one axis of calendar days.

    Every activity counts its own dates in its own calendar (the project calendar unless
    it names another); the project finish is counted in the project calendar. Position
    ``k`` of calendar ``c`` names the boundary before its working day ``k``: work starting
    at ``k`` starts on the morning of that day, ``S_c(k)``, and work finishing at ``k``
    ends on the evening of day ``k - 1``, ``F_c(k) = S_c(k - 1) + 1`` (in calendar days).

    A link between activities on different calendars is converted at the instant the
    predecessor's event happens (its finish ``F``, or for SS its start ``S``; an SF link
    compares the boundary ``F`` before the predecessor's first day, as CPM on one calendar
    does), to the first position of the successor's calendar not before it; the lag then
    counts working days of the successor's calendar. On one calendar every conversion is
    the identity, so a project without its own calendars is scheduled exactly as before.
    """

    def __init__(self, project):
        self.project = project
        self.clocks: list[CalendarClock] = [CalendarClock(project.calendar, project.start)]
        index = {"": 0}
        for cal in project.calendars:
            index[cal.name] = len(self.clocks)
            self.clocks.append(CalendarClock(cal, project.start))
        try:
            self.of: list[int] = [index[a.calendar] for a in project.activities]
        except KeyError as exc:
            raise HastenError(f"an activity names the calendar {exc.args[0]!r}, which the project "
                              f"does not define; defined: {', '.join(list(index)[1:]) or 'none'}") from None
        # calendars that fall on exactly the same days are one calendar here
        same = {}
        for k, clock in enumerate(self.clocks):
            key = (clock.calendar.weekmask, tuple(sorted(set(clock.calendar.holidays))), clock.day0)
            same.setdefault(key, k)
        self._alias = [same[(c.calendar.weekmask, tuple(sorted(set(c.calendar.holidays))), c.day0)]
                       for c in self.clocks]
        self.of = [self._alias[k] for k in self.of]
        self.several = any(k != 0 for k in self.of)

    @property
    def project_clock(self) -> CalendarClock:
        return self.clocks[0]

    def clock_of(self, i: int) -> CalendarClock:
        return self.clocks[self.of[i]]

    # -- positions <-> instants (whole calendar days since 1970, numpy's day count) -----------
    def _start(self, c: int, k):
        clock = self.clocks[c]
        return np.busday_offset(clock.day0, np.asarray(k, dtype=np.int64), roll="forward",
                                busdaycal=clock._cal).astype(np.int64)

    def _count(self, c: int, t):
        """Working days of calendar ``c`` from its day 0 up to (not incl.) instant ``t``."""
        clock = self.clocks[c]
        t = np.asarray(t, dtype=np.int64).astype("datetime64[D]")
        ahead = np.busday_count(clock.day0, np.maximum(t, clock.day0), busdaycal=clock._cal)
        behind = np.busday_count(np.minimum(t, clock.day0), clock.day0, busdaycal=clock._cal)
        return (ahead - behind).astype(np.int64)  # (numpy counts a reversed range differently)

    def _instant(self, c: int, k, kind: int):
        """Instant of the predecessor's event at position ``k`` for a link of ``kind``."""
        k = np.asarray(k, dtype=np.int64)
        return self._start(c, k) if kind == _SS else self._start(c, k - 1) + 1

    def _position(self, c: int, t, kind: int):
        """First position of calendar ``c`` whose (start or finish) event is not before ``t``."""
        t = np.asarray(t, dtype=np.int64)
        return self._count(c, t) if kind in (_FS, _SS) else self._count(c, t - 1) + 1

    def convert(self, a: int, b: int, k, kind: int):
        """Least position of calendar ``b`` (before the lag) that a link of ``kind`` allows
        after the predecessor's event at position ``k`` of calendar ``a``."""
        if a == b:
            return np.asarray(k, dtype=np.int64)
        return self._position(b, self._instant(a, k, kind), kind)

    def latest(self, a: int, b: int, x, kind: int):
        """Greatest position ``k`` of calendar ``a`` with ``convert(a, b, k, kind) <= x``."""
        if a == b:
            return np.asarray(x, dtype=np.int64)
        x = np.asarray(x, dtype=np.int64)
        if kind == _FS:
            return self._count(a, self._start(b, x))
        if kind == _SS:
            return self._count(a, self._start(b, x) + 1) - 1
        return self._count(a, self._start(b, x - 1) + 1)  # FF, SF: the finish F_b(x)

    def to_project(self, c: int, finish):
        """Project finish (project-calendar position) of work finishing at ``finish`` of
        calendar ``c``: the end of the project working day on or after its last day."""
        return self.convert(c, 0, finish, _FF)

    def from_project(self, c: int, finish):
        """Latest finish position of calendar ``c`` within project finish ``finish``."""
        return self.latest(c, 0, finish, _FF)
