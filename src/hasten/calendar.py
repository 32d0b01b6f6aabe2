"""Working-day offsets <-> calendar dates, with numpy's business-day functions.

Offset ``k`` is the ``k``-th working day counted from the project start (day 0). A start
offset names the first day worked; a finish offset ``f`` (start-of-day convention) means
the last day worked is day ``f - 1``.
"""

from __future__ import annotations

from datetime import date, timedelta

import numpy as np

from .model import Calendar

__all__ = [
    "CalendarClock",
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
