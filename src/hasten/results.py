"""The answers hasten gives, as plain frozen dataclasses.

Every result carries what it takes to show it (the project, dates, the normal and the
shortest finish where known), so that rendering (:mod:`hasten.render`, :mod:`hasten.charts`)
never has to compute or solve anything. One name per quantity everywhere, in code, JSON
and the README: ``added_cost`` (direct cost added by acceleration), ``shortened_by``
(working days taken off), ``milestone_damages`` (damages of interim milestones past their
own deadlines).
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import date
from functools import cached_property
from typing import Iterator

from .calendar import CalendarClock
from .cpm import Schedule
from .project import Project
from .time_costs import TimeCosts, time_costs

__all__ = ["ActivityChange", "TradeTotal", "Plan", "CurvePoint", "Curve", "TotalCostPoint", "BestFinish",
           "Handover"]


@dataclass(frozen=True)
class ActivityChange:
    """One activity in a plan: its normal and new duration (working days still to do)."""

    id: str
    name: str
    trade: str
    calendar: str  # the calendar it works to (the project calendar's name by default)
    normal: int
    duration: int
    shortened_by: int  # normal - duration (negative: made longer on purpose, see README)
    added_cost: float
    option: str = ""  # the discrete option used, "" for the normal way
    option_note: str = ""  # the option's note from the project, if any


@dataclass(frozen=True)
class TradeTotal:
    trade: str
    shortened_by: int  # working days taken off this trade's activities in all
    added_cost: float


@dataclass(frozen=True)
class Plan:
    """A least-cost plan to finish by ``target``, checked independently of the solver.

    Examples
    --------
    >>> import hasten
    >>> from datetime import date
    >>> p = hasten.read_project("cases/riverside-culvert")
    >>> result = hasten.plan(p, date(2027, 9, 15))
    >>> result.finish_date <= date(2027, 9, 15)
    True
    """

    project: Project
    target: int  # working days from the start
    finish: int
    normal_finish: int
    added_cost: float
    activities: tuple[ActivityChange, ...]  # every activity, in project order
    trades: tuple[TradeTotal, ...]  # largest added cost first
    schedule: Schedule  # early and late dates with the plan's durations
    next_day_cost: float | None  # cost of one more day earlier; None at the limit or unproven
    start_date: date
    target_date: date
    finish_date: date
    normal_finish_date: date
    cautions: tuple[str, ...] = ()
    notes: tuple[str, ...] = ()  # what was done to the input first (options dropped, ...)
    proven: bool = True  # False: a time limit stopped the solver; best plan found so far
    bound: float | None = None  # proven lower bound on the added cost, when not proven
    gap: float | None = None  # relative gap between the plan and the bound, when not proven
    milestone_damages: float = 0.0
    before: Schedule | None = None  # the schedule at normal durations (with progress), for old dates

    @property
    def normal_direct_cost(self) -> float:
        return self.project.normal_direct_cost

    @property
    def direct_cost(self) -> float:
        return self.normal_direct_cost + self.added_cost

    @property
    def changed(self) -> tuple[ActivityChange, ...]:
        """Activities shortened or performed by a discrete option."""
        return tuple(a for a in self.activities if a.shortened_by or a.option)


@dataclass(frozen=True)
class CurvePoint:
    finish: int
    finish_date: date
    added_cost: float
    day_cost: float  # cost of this day: cost here less cost one day later
    plan: tuple[tuple[str, int, str], ...]  # (id, days shortened, option) of the changed activities
    changes: tuple[tuple[str, int], ...]  # (activity id, change in days) from the point before
    switches: tuple[tuple[str, str], ...] = ()  # (activity id, option now used; "" = normal)
    proven: bool = True
    gap: float | None = None
    milestone_damages: float = 0.0


@dataclass(frozen=True)
class Curve:
    """The least-cost curve: one point per whole working day, latest finish first."""

    project: Project
    points: tuple[CurvePoint, ...]
    normal_finish: int
    shortest_finish: int | None  # None when a range was asked and the shortest was not needed
    milestone_damages_apply: bool = False  # interim milestones with damages take part
    notes: tuple[str, ...] = ()

    def __iter__(self) -> Iterator[CurvePoint]:
        return iter(self.points)

    def __len__(self) -> int:
        return len(self.points)

    def __getitem__(self, k):
        return self.points[k]

    @cached_property
    def totals(self) -> tuple["TotalCostPoint", ...]:
        """Direct, indirect, damages and bonus at each point (latest finish first)."""
        clock = CalendarClock(self.project.calendar, self.project.start)
        direct = self.project.normal_direct_cost
        return tuple(TotalCostPoint(p.finish, p.finish_date, direct + p.added_cost, p.added_cost,
                                    time_costs(self.project, clock, p.finish), p.milestone_damages)
                     for p in self.points)

    @property
    def best(self) -> "TotalCostPoint | None":
        """The point with the least total cost (the later finish on a tie), as ``best`` picks."""
        return min(self.totals, key=lambda r: (round(r.total_cost, 6), -r.finish), default=None)


@dataclass(frozen=True)
class TotalCostPoint:
    finish: int
    finish_date: date
    direct_cost: float
    added_cost: float
    time: TimeCosts
    milestone_damages: float = 0.0

    @property
    def total_cost(self) -> float:
        """Direct + indirect + damages (contract and milestones) - bonus."""
        return self.direct_cost + self.time.net + self.milestone_damages


@dataclass(frozen=True)
class BestFinish:
    """The finish with the least total cost, the table it was chosen from, and its plan."""

    point: TotalCostPoint
    current: TotalCostPoint  # the current (normal) finish, for the saving
    table: tuple[TotalCostPoint, ...]  # the finishes priced, the current one among them (Planner.best_finish)
    plan: Plan
    notes: tuple[str, ...] = ()

    @property
    def saving(self) -> float:
        """Total cost saved against the current finish (positive saves money)."""
        return self.current.total_cost - self.point.total_cost


@dataclass(frozen=True)
class Handover:
    """Everything a report needs: the question, its answer, the plan it comes to, and the
    least-cost curve with the plan of every finish (for the interactive curve).

    ``kind`` is ``"plan"``, ``"budget"``, ``"best"``, ``"recover"`` or ``"price"``; ``answer`` is a
    :class:`Plan`, :class:`BestFinish`, :class:`~hasten.recovery.Recovery` or
    :class:`~hasten.price.PricedProposal`; ``plan`` the plan the answer comes to (for recovery
    the least-total-cost course's, for a proposal the proposal applied), or ``None``.
    """

    project: Project
    kind: str
    question: str  # the question in words
    answer: object
    plan: Plan | None
    curve: Curve
    notes: tuple[str, ...] = ()
