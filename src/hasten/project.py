"""The shared vocabulary: plain frozen dataclasses for a project and its parts.

Durations, lags and offsets are whole working days. Day 0 is the project's first
working day; an activity with early start 0 and duration 5 has early finish 5
(offsets count the start of a day, so it is worked on days 0..4).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import date
from enum import Enum

from hasten.labour import CrewData, LabourRules

__all__ = [
    "LinkType",
    "Link",
    "CrashStep",
    "Option",
    "Activity",
    "Calendar",
    "Costs",
    "Contract",
    "Project",
    "Risk",
    "WEEKDAY_NAMES",
]

WEEKDAY_NAMES = ("mon", "tue", "wed", "thu", "fri", "sat", "sun")


class LinkType(str, Enum):
    """The four precedence relationships of the precedence diagramming method."""

    FS = "FS"  # successor starts after predecessor finishes
    SS = "SS"  # successor starts after predecessor starts
    FF = "FF"  # successor finishes after predecessor finishes
    SF = "SF"  # successor finishes after predecessor starts

    def __str__(self) -> str:  # pragma: no cover - trivial
        return self.value


@dataclass(frozen=True)
class Link:
    """``pred`` -TYPE+lag-> ``succ``; a negative lag is a lead."""

    pred: str
    succ: str
    type: LinkType = LinkType.FS
    lag: int = 0

    def text(self) -> str:
        """The predecessor shorthand as written in activities.csv (``A``, ``A:SS+2``)."""
        if self.type is LinkType.FS and self.lag == 0:
            return self.pred
        if self.lag == 0:
            return f"{self.pred}:{self.type.value}"
        return f"{self.pred}:{self.type.value}{self.lag:+d}"


@dataclass(frozen=True)
class CrashStep:
    """Up to ``days`` working days of shortening at ``cost_per_day`` each."""

    days: int
    cost_per_day: float


@dataclass(frozen=True)
class Option:
    """A discrete way to perform an activity (a second crew, a Saturday shift, a faster
    material): its own duration and added direct cost, all or nothing.

    ``crash_duration`` and ``cost_per_day`` optionally allow further linear shortening of
    the option, down to ``crash_duration`` at ``cost_per_day`` per working day.
    """

    name: str
    duration: int
    added_cost: float
    note: str = ""
    crash_duration: int | None = None
    cost_per_day: float = 0.0

    @property
    def shortest(self) -> int:
        return self.duration if self.crash_duration is None else self.crash_duration


@dataclass(frozen=True)
class Activity:
    """One activity. ``crash_duration`` equal to ``duration`` means it cannot be shortened.

    ``steps`` is empty for the default linear cost between (duration, cost) and
    (crash_duration, crash_cost); otherwise it lists the stepped crash costs in order of use.
    """

    id: str
    duration: int
    name: str = ""
    trade: str = ""
    crash_duration: int | None = None
    cost: float = 0.0
    crash_cost: float | None = None
    steps: tuple[CrashStep, ...] = ()
    options: tuple[Option, ...] = ()  # at most one is chosen, or none (normal)
    # progress at the data date (see hasten.progress)
    actual_start: date | None = None
    actual_finish: date | None = None  # the last day worked
    remaining: int | None = None  # working days left; derived from percent_complete if absent
    percent_complete: float | None = None
    # dates and constraints
    not_before: date | None = None  # start no earlier than this date (delivery, access)
    deadline: date | None = None  # an interim milestone's own deadline (last day allowed)
    damages_per_day: float = 0.0  # damages per calendar day the milestone is late
    calendar: str = ""  # name of one of Project.calendars; "" = the project calendar
    # the physical minimum in working days (curing, lead times): no way of working, crash
    # steps or option, takes the activity below it (0: none)
    min_duration: int = 0
    # labour data from which acceleration options are built (see hasten.crew_options);
    # its own min_duration is not used here: the activity's min_duration is the minimum
    crew: CrewData | None = None
    # duration uncertainty (see hasten.uncertainty): the shortest and longest working days the
    # activity may take; the duration is the most likely. None: from Project.risk, or none
    optimistic: int | None = None
    pessimistic: int | None = None

    @property
    def shortest_normal(self) -> int:
        """Shortest duration without a discrete option (crash steps or linear crashing),
        never below the physical minimum ``min_duration`` (nor above the duration)."""
        if self.steps:
            shortest = self.duration - sum(s.days for s in self.steps)
        else:
            shortest = self.duration if self.crash_duration is None else self.crash_duration
        return max(shortest, min(self.min_duration, self.duration))

    @property
    def shortest(self) -> int:
        """Shortest possible duration in working days, over every option, never below the
        physical minimum (an option's own shortening stops there too)."""
        return min([self.shortest_normal] + [max(o.shortest, min(self.min_duration, o.duration))
                                             for o in self.options])

    @property
    def longest(self) -> int:
        """Longest possible duration: normal, or a slower option."""
        return max([self.duration] + [o.duration for o in self.options])

    @property
    def max_shortening(self) -> int:
        """Most working days the crash steps (not the options) can take off."""
        return self.duration - self.shortest_normal

    @property
    def is_milestone(self) -> bool:
        return self.duration == 0

    def segments(self) -> tuple[CrashStep, ...]:
        """The crash cost as steps in order of use (one step for a linear cost), taking
        the activity no shorter than :attr:`shortest_normal` (the physical minimum cuts the
        last steps short; a linear cost keeps its cost per day)."""
        if self.steps:
            left = self.max_shortening
            if left >= sum(s.days for s in self.steps):
                return self.steps
            out = []
            for step in self.steps:
                if left <= 0:
                    break
                out.append(step if step.days <= left else CrashStep(left, step.cost_per_day))
                left -= step.days
            return tuple(out)
        days = self.max_shortening
        if days <= 0:
            return ()
        crash = self.duration if self.crash_duration is None else self.crash_duration
        extra = (self.crash_cost if self.crash_cost is not None else self.cost) - self.cost
        return (CrashStep(days, extra / (self.duration - crash)),)


@dataclass(frozen=True)
class Calendar:
    """Working weekdays (0 = Monday) and non-working holiday dates."""

    workdays: tuple[int, ...] = (0, 1, 2, 3, 4)
    holidays: tuple[date, ...] = ()
    name: str = "mon-fri"

    @property
    def weekmask(self) -> str:
        """numpy busday weekmask, e.g. ``'1111100'``."""
        return "".join("1" if d in self.workdays else "0" for d in range(7))


@dataclass(frozen=True)
class Costs:
    """Time-related (indirect) cost per working day of project duration."""

    indirect_per_day: float = 0.0


@dataclass(frozen=True)
class Contract:
    """Contract completion terms. Damages and bonus run per calendar day."""

    finish: date | None = None
    damages_per_day: float = 0.0
    bonus_per_day: float = 0.0
    bonus_cap_days: int | None = None


@dataclass(frozen=True)
class Risk:
    """The ``[risk]`` settings: ranges of durations for activities without their own
    ``optimistic`` / ``pessimistic`` days (see :mod:`hasten.uncertainty`).

    ``default`` and each trade's range are written as text such as ``"-10%, +25%"``;
    ``correlation`` gives a trade the weight of one shared factor (0 to 1).
    """

    default: str | None = None
    distribution: str = "pert"  # "pert" or "triangular"
    trades: tuple[tuple[str, str], ...] = ()  # (trade, range text), in the order given
    correlation: tuple[tuple[str, float], ...] = ()  # (trade, weight), in the order given


@dataclass(frozen=True)
class Project:
    name: str
    start: date
    activities: tuple[Activity, ...]
    links: tuple[Link, ...] = ()
    calendar: Calendar = field(default_factory=Calendar)
    currency: str = ""
    costs: Costs = field(default_factory=Costs)
    contract: Contract = field(default_factory=Contract)
    data_date: date | None = None  # [status] data_date: progress is reported up to this date
    # further calendars activities may name (Activity.calendar), each under its own name
    calendars: tuple[Calendar, ...] = ()
    # [labour]: the normal week, pay rules, trade wages and productivity data from which
    # options are built for activities with crew data (None: no section; defaults apply)
    labour: LabourRules | None = None
    risk: Risk = field(default_factory=Risk)  # [risk]: duration ranges by default and by trade

    def activity(self, activity_id: str) -> Activity:
        for a in self.activities:
            if a.id == activity_id:
                return a
        raise KeyError(activity_id)

    @property
    def normal_direct_cost(self) -> float:
        return sum(a.cost for a in self.activities)
