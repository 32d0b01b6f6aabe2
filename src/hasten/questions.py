"""One function per question a scheduler asks, each named by what it returns.

Each builds a :class:`~hasten.planner.Planner` for the project and asks it once; to ask
several questions of one project, keep a :class:`~hasten.planner.Planner` instead (its model
is built once and re-solved warm). The command line calls these same functions, so a
notebook and ``hasten plan`` give the same answer.

A finish target is a whole number of working days from the start, a
:class:`datetime.date` (the last day worked), or :class:`Earlier` (so many working days or
calendar weeks before the current finish).

Examples
--------
>>> import hasten
>>> from datetime import date
>>> p = hasten.read_project("cases/riverside-culvert")
>>> result = hasten.plan(p, hasten.Earlier(weeks=2))
>>> result.finish < result.normal_finish and result.added_cost > 0
True
>>> hasten.plan(p, 10)
Traceback (most recent call last):
...
hasten.errors.InfeasibleTargetError: target finish 10 working days (2027-04-16) is below the shortest possible finish, ...
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import date

from .planner import Planner, Progress
from .project import Project
from .recovery import Recovery, recovery
from .results import BestFinish, Curve, Plan

__all__ = ["Earlier", "plan", "curve", "best_finish", "earliest_within", "recover", "target_offset"]


@dataclass(frozen=True)
class Earlier:
    """A finish target before the current finish: ``days`` working days, or ``weeks``
    calendar weeks (7 days each, to the last working day on or before that date)."""

    days: int = 0
    weeks: int = 0


Target = int | date | Earlier


def target_offset(planner: Planner, target: Target) -> int:
    """The finish target in working days from the start."""
    if isinstance(target, Earlier):
        if target.weeks:
            return planner.target_earlier(calendar_days=7 * target.weeks)
        return planner.target_earlier(working_days=target.days)
    if isinstance(target, date):
        return planner.target_by_date(target)
    return int(target)


def plan(project: Project, target: Target, *, strict: bool = False, time_limit: float | None = None) -> Plan:
    """The least-cost plan to finish by ``target``.

    Parameters
    ----------
    project : Project
    target : int, datetime.date or Earlier
        Working days from the start, the last day worked, or a time before the current finish.
    strict : bool
        Also meet every interim milestone's own deadline.
    time_limit : float, optional
        Seconds each mixed-integer solve may take.

    Returns
    -------
    Plan
        Checked independently of the solver; with the schedule after acceleration.
    """
    planner = Planner(project, time_limit=time_limit)
    return planner.plan(target_offset(planner, target), strict=strict)


def curve(project: Project, longest: int | None = None, shortest: int | None = None, *,
          time_limit: float | None = None, progress: Progress | None = None) -> Curve:
    """The least-cost curve: the least added cost at every whole working day from
    ``longest`` (default: the current finish) to ``shortest`` (default: the shortest
    possible finish)."""
    return Planner(project, time_limit=time_limit).curve(longest, shortest, progress=progress)


def best_finish(project: Project, *, time_limit: float | None = None,
                progress: Progress | None = None) -> BestFinish:
    """The finish with the least total cost (direct + indirect + damages - bonus) and its plan."""
    return Planner(project, time_limit=time_limit).best_finish(progress=progress)


def earliest_within(project: Project, budget: float, *, time_limit: float | None = None) -> Plan:
    """The earliest finish whose least added cost is within ``budget``, and its plan."""
    return Planner(project, time_limit=time_limit).earliest_within(budget)


def recover(project: Project, *, time_limit: float | None = None,
            progress: Progress | None = None) -> Recovery:
    """After a delay: do nothing, recover fully, or recover at the least total cost."""
    return recovery(Planner(project, time_limit=time_limit), progress=progress)
