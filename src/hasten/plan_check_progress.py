"""The project as the plan check reads it: calendars, progress, milestones, broken links.

Part of the independent plan check (:mod:`hasten.plan_check`). It reads the
:class:`~hasten.project.Project` again, by its own means (only :mod:`hasten.project`,
:class:`~hasten.calendar.CalendarClock` for dates and :mod:`hasten.errors`), and works out:

- each activity's calendar (calendars on the same days are one) and its state at the data
  date: finished, started (the working days left: ``remaining``; else ``percent_complete``
  of the duration, rounded up; else the duration less the working days since the actual
  start; and the share of its crash allowance for the work left, rounded down) or not
  started (from the data date and its not-before date, in its own calendar);
- when each milestone happens (README "Method", "Milestones"): a point in time, the boundary
  before a working day. One not yet happened is dated on the day its predecessors end but
  never before the first day it may happen (the project start, its not-before date, the
  data date); one with an actual date happened at the start of that day, or at its end
  when a link from a predecessor needs it later (a predecessor that ended that day);
- the links progress broke: the successor's constrained event (its start for FS and SS,
  its finish for FF and SF) is already in the past and the actual dates do not satisfy the
  link; the actual dates stand and the link no longer holds the successor back;
- a link between two calendars, taken at the moment the predecessor's event happens (a
  finish on the evening of its last day, an SS start on the morning of its first day, the
  boundary an SF link leaves on the evening before), to the successor's first working day
  (or day's end, for an FF or SF link) not before that moment.

Positions count working days of an activity's own calendar from the project start: work at
``s`` for ``d`` days is worked on days ``s`` to ``s + d - 1``; a milestone at ``m`` happens
at the boundary before day ``m``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from datetime import timedelta

from .calendar import CalendarClock
from .errors import CycleError, InputError
from .project import Activity, LinkType, Project

__all__ = ["DONE", "STARTED", "WAITING", "FROM_FINISH", "ON_START", "State", "Reading", "link_text"]

DONE, STARTED, WAITING = "finished", "started", "not started"
FROM_FINISH = (LinkType.FS, LinkType.FF)  # the link leaves the predecessor's finish
ON_START = (LinkType.FS, LinkType.SS)  # it holds the successor's start
_ONE_DAY = timedelta(days=1)


@dataclass(frozen=True)
class State:
    """One activity at the data date, in positions of its own calendar."""

    state: str  # DONE, STARTED or WAITING
    normal: int  # working days to schedule at the normal pace (finished: the actual span)
    room: int  # working days the crash steps may still take off
    earliest: int  # earliest start of what is left (finished: its fixed start)
    actual: int | None  # actual start position (a finished milestone: when it happened)
    floor: int | None = None  # a milestone: the first position it may be dated on


def link_text(link) -> str:
    """A link as the messages name it: ``A -> B (FS+2)``."""
    lag = f"{link.lag:+d}" if link.lag else ""
    return f"{link.pred} -> {link.succ} ({link.type.value}{lag})"


class Reading:
    """A project read for the plan check (see the module notes).

    Attributes
    ----------
    ids : list of str
    clocks : list of CalendarClock
        One per distinct calendar; ``clocks[0]`` is the project calendar's.
    cal : list of int
        Each activity's clock, as an index into ``clocks``.
    states : list of State
    steps : list of tuple of CrashStep
        Each activity's crash steps, in order of use.
    pred, succ : list of int
        Each link's activities, as positions in ``project.activities``.
    order : list of int
        The activities with every predecessor first (over every link).
    dropped : frozenset of int
        Positions in ``project.links`` of the links progress broke.
    finish_floor : int
        The first project working day the project finish may be dated on: the latest
        first day of a milestone (0 without one).

    Raises
    ------
    InputError
        Progress that cannot be read (see :meth:`_state`), a calendar or an activity that
        the project does not have.
    CycleError
        The links form a loop.
    """

    def __init__(self, project: Project):
        self.project = project
        acts, links = project.activities, project.links
        self.ids = [a.id for a in acts]
        pos = {a: k for k, a in enumerate(self.ids)}
        for k in links:
            if k.pred not in pos or k.succ not in pos:
                raise InputError(f"link {link_text(k)} names an activity the project does not have",
                                 value=k.pred if k.pred not in pos else k.succ, fix="check the activity ids")
        self.pred = [pos[k.pred] for k in links]
        self.succ = [pos[k.succ] for k in links]
        self._conversions: dict = {}
        self.cal = self._own_calendars(project)
        self.order = self._topological_order()
        data = [None if project.data_date is None else c.offset_of(project.data_date, finish=False)
                for c in self.clocks]
        self.steps = [a.segments() for a in acts]
        self._waiting: dict[tuple, State] = {}  # one shared state per kind of activity not started
        self.states = [self._state(a, sum(x.days for x in steps), self.clocks[c], data[c])
                       for a, steps, c in zip(acts, self.steps, self.cal)]
        self._settle_milestones()
        self.dropped = frozenset(self._broken_by_progress())
        project_clock, floor = self.clocks[0], 0
        for k, st in enumerate(self.states):
            if st.floor is not None:
                c = self.cal[k]
                day = st.floor if c == 0 else project_clock.offset_of(self.clocks[c].date_of(st.floor), finish=False)
                floor = max(floor, day)
        self.finish_floor = floor

    # -- calendars and order ------------------------------------------------------------
    def _own_calendars(self, project: Project) -> list[int]:
        """Each activity's clock (as an index); calendars on the same days share one."""
        def days(cal):
            return cal.weekmask, tuple(sorted(set(cal.holidays)))
        self.clocks = [CalendarClock(project.calendar, project.start)]
        same, by_name = {days(project.calendar): 0}, {}
        for cal in project.calendars:
            if days(cal) not in same:
                same[days(cal)] = len(self.clocks)
                self.clocks.append(CalendarClock(cal, project.start))
            by_name[cal.name] = same[days(cal)]
        out = []
        for a in project.activities:
            if a.calendar and a.calendar not in by_name:
                raise InputError(f"activity {a.id} names the calendar {a.calendar!r}, which the project "
                                 "does not define", column="calendar", value=a.calendar,
                                 fix=f"use one of: {', '.join(by_name) or 'none defined'}")
            out.append(by_name[a.calendar] if a.calendar else 0)
        return out

    def _topological_order(self) -> list[int]:
        """Activities in an order with every predecessor first (Kahn), over every link."""
        n = len(self.ids)
        out = [[] for _ in range(n)]
        need = [0] * n
        for i, j in zip(self.pred, self.succ):
            out[i].append(j)
            need[j] += 1
        order = [k for k in range(n) if need[k] == 0]
        for i in order:  # (the list grows while it is read)
            for j in out[i]:
                need[j] -= 1
                if need[j] == 0:
                    order.append(j)
        if len(order) < n:  # walk back along links between activities left: it closes a loop
            back = {j: i for i, j in zip(self.pred, self.succ) if need[j] and need[i]}
            seen, k = [], next(k for k in range(n) if need[k])
            while k not in seen:
                seen.append(k)
                k = back[k]
            raise CycleError([self.ids[x] for x in seen[seen.index(k):][::-1]])
        return order

    def across(self, a: int, b: int, at: int, kind: LinkType) -> int:
        """Least position of calendar ``b`` (before the lag) that a link of ``kind`` allows
        after an event at position ``at`` of calendar ``a``, found through dates."""
        if a == b:
            return at
        key = (a, b, kind, at)
        got = self._conversions.get(key)
        if got is None:
            one, other = self.clocks[a], self.clocks[b]
            # the moment: a start on the morning of its day; a finish (and the boundary an SF
            # link leaves) on the evening of the day before, written as the next morning
            moment = one.date_of(at) if kind is LinkType.SS else one.date_of(at - 1) + _ONE_DAY
            if kind in ON_START:  # b's first working day not before the moment
                got = other.offset_of(moment, finish=False)
            else:  # b's first day's end not before the moment
                got = other.offset_of(moment - _ONE_DAY, finish=False) + 1
            self._conversions[key] = got
        return got

    # -- progress -----------------------------------------------------------------------
    def _state(self, act: Activity, room: int, clock: CalendarClock, data: int | None) -> State:
        """The activity at the data date (see the module notes).

        Raises InputError for an actual finish without a start, actual dates on or after
        the data date, work finishing before it starts, percent complete outside 0-100 or
        more work remaining than the duration."""
        data_date = self.project.data_date
        earliest = 0 if act.not_before is None else max(0, clock.offset_of(act.not_before, finish=False))
        milestone = act.duration == 0
        if data is None or (act.actual_start is None and act.actual_finish is None):
            earliest = earliest if data is None else max(earliest, data)
            key = (act.duration, room, earliest)
            got = self._waiting.get(key)
            if got is None:
                got = self._waiting[key] = State(WAITING, act.duration, room, earliest, None,
                                                 earliest if milestone else None)
            return got
        if act.actual_start is None:
            raise InputError(f"activity {act.id} has an actual finish but no actual start",
                             column="actual_start", fix="give the date work started")
        last = act.actual_finish or act.actual_start
        if act.actual_start > data_date or (act.actual_finish is not None and act.actual_finish >= data_date):
            raise InputError(f"activity {act.id} has actual dates on or after the data date {data_date}",
                             column="actual_finish" if act.actual_finish else "actual_start",
                             value=str(last), fix="keep actual dates before the data date")
        if milestone:  # at the start of its day (_settle_milestones may move it to the end)
            at = clock.offset_of(last, finish=False)
            return State(DONE, 0, 0, at, at, at)
        start = clock.offset_of(act.actual_start, finish=False)
        if act.actual_finish is not None:
            if act.actual_finish < act.actual_start:
                raise InputError(f"activity {act.id} finishes before it starts", column="actual_finish",
                                 value=str(act.actual_finish), fix="check both actual dates")
            return State(DONE, max(clock.offset_of(act.actual_finish, finish=True) - start, 0), 0, start, start)
        if act.remaining is not None:
            left = act.remaining
        elif act.percent_complete is not None:
            if not 0 <= act.percent_complete <= 100:
                raise InputError(f"activity {act.id} has percent complete outside 0-100",
                                 column="percent_complete", value=act.percent_complete,
                                 fix="give a percentage from 0 to 100")
            left = math.ceil(round(act.duration * (100 - act.percent_complete) / 100, 9))
        else:
            left = max(act.duration - max(data - start, 0), 0)
        if left > act.duration:
            raise InputError(f"activity {act.id} has more work remaining ({left} days) than its duration "
                             f"({act.duration})", column="remaining", value=left,
                             fix="lower the remaining days or raise the duration")
        return State(STARTED, left, max(room, 0) * left // act.duration, max(earliest, data), start)

    def _needs(self, e: int) -> int | None:
        """Where the actual dates put the least event link ``e`` allows its successor (lag
        included), in the successor's calendar; None while the predecessor's event is to
        come."""
        link, i, j = self.project.links[e], self.pred[e], self.succ[e]
        before = self.states[i]
        if link.type in FROM_FINISH:
            earlier = before.earliest + before.normal if before.state == DONE else None
        else:
            earlier = before.actual
        if earlier is None:
            return None
        return self.across(self.cal[i], self.cal[j], earlier, link.type) + link.lag

    def _settle_milestones(self) -> None:
        """A milestone with an actual date happened at the start of that day, or at its end
        when a link from a predecessor needs it later. Predecessors first: a chain of
        milestones on one day settles in one pass."""
        into: list[list[int]] = [[] for _ in self.ids]
        for e, j in enumerate(self.succ):
            into[j].append(e)
        for j in self.order:
            st = self.states[j]
            if st.state != DONE or st.floor is None or not into[j]:
                continue
            if any((x := self._needs(e)) is not None and x > st.floor for e in into[j]):
                self.states[j] = replace(st, earliest=st.floor + 1, actual=st.floor + 1)

    def _broken_by_progress(self):
        """Links whose successor's event is already in the past at dates that break them."""
        st = self.states
        for e, link in enumerate(self.project.links):
            j = st[self.succ[e]]
            on_start = link.type in ON_START
            if on_start and j.actual is None or not on_start and j.state != DONE:
                continue  # the successor's event is still to come
            later = j.actual if on_start else j.earliest + j.normal
            least = self._needs(e)
            if least is None or later < least:
                yield e
