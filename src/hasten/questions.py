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

import os
from typing import Sequence

from .planner import Planner, Progress
from .price import PricedProposal, ProposalLine, price_proposal, read_proposal
from .project import Project
from .recovery import Recovery, recovery
from .results import BestFinish, Curve, Handover, Plan

__all__ = ["Earlier", "plan", "curve", "best_finish", "earliest_within", "recover", "price", "handover",
           "target_offset"]


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
    """The finish with the least total cost (direct + indirect + damages - bonus) and its plan;
    ``table`` holds the finishes priced (see :meth:`Planner.best_finish`)."""
    return Planner(project, time_limit=time_limit).best_finish(progress=progress)


def earliest_within(project: Project, budget: float, *, time_limit: float | None = None) -> Plan:
    """The earliest finish whose least added cost is within ``budget``, and its plan."""
    return Planner(project, time_limit=time_limit).earliest_within(budget)


def recover(project: Project, *, time_limit: float | None = None,
            progress: Progress | None = None) -> Recovery:
    """After a delay: do nothing, recover fully, or recover at the least total cost."""
    return recovery(Planner(project, time_limit=time_limit), progress=progress)


def price(project: Project, proposal: str | os.PathLike[str] | Sequence[ProposalLine], *,
          time_limit: float | None = None) -> PricedProposal:
    """Price a proposal: what it buys, what it costs, what the least-cost plan for the same
    finish costs, the lines that buy nothing and the leanest part of it
    (:mod:`hasten.price`).

    Parameters
    ----------
    project : Project
    proposal : path or sequence of ProposalLine
        A CSV file with columns ``id``, ``shortened_by`` and/or ``option``, and optionally
        ``cost``; or the lines themselves.

    Examples
    --------
    >>> import hasten
    >>> from hasten.questions import price
    >>> from hasten.price import ProposalLine
    >>> priced = price(hasten.read_project("cases/riverside-culvert"), [ProposalLine("A310", 2)])
    >>> priced.excess >= 0 and priced.finish == priced.least_cost_plan.finish
    True
    """
    if isinstance(proposal, (str, os.PathLike)):
        return price_proposal(project, read_proposal(proposal), str(proposal), time_limit=time_limit)
    return price_proposal(project, list(proposal), time_limit=time_limit)


def _target_words(planner: Planner, target: Target, offset: int) -> str:
    day = planner.clock.project_finish_date(offset).isoformat()
    if isinstance(target, Earlier):
        ahead = (f"{target.weeks} calendar week{'s' if target.weeks != 1 else ''}" if target.weeks
                 else f"{target.days} working day{'s' if target.days != 1 else ''}")
        return f"finish {ahead} earlier than now, by {day}"
    return f"finish by {day} ({offset} working days from the start)"


def handover(project: Project, *, target: Target | None = None, best: bool = False, budget: float | None = None,
             recover: bool = False, proposal=None, time_limit: float | None = None,
             progress: Progress | None = None) -> Handover:
    """One question answered for a report, with the least-cost curve (every finish and its
    plan) beside it. Ask exactly one: ``target`` (a plan), ``best``, ``budget``, ``recover``
    or ``proposal`` (a path or lines, see :func:`price`).

    Examples
    --------
    >>> import hasten
    >>> from hasten.questions import handover
    >>> h = handover(hasten.read_project("cases/clinic-fitout"), best=True)
    >>> h.kind, h.plan.finish == h.answer.point.finish, len(h.curve) > 1
    ('best', True, True)
    """
    asked = [target is not None, best, budget is not None, recover, proposal is not None]
    if sum(asked) != 1:
        from .errors import HastenError

        raise HastenError("ask exactly one question: a target, the best finish, a budget, recovery "
                          "or a proposal")
    planner = Planner(project, time_limit=time_limit)
    currency = f" {project.currency}" if project.currency else ""
    if target is not None:
        offset = target_offset(planner, target)
        answer = planner.plan(offset)
        kind, question, chosen = "plan", ("What is the least added cost to "
                                          + _target_words(planner, target, offset) + "?"), answer
    elif best:
        answer = planner.best_finish(progress=progress)
        kind, question, chosen = "best", ("Which finish date costs the least in all (direct cost, site "
                                          "overhead, damages and bonus), and how is it reached?"), answer.plan
    elif budget is not None:
        answer = planner.earliest_within(budget)
        kind, question, chosen = "budget", (f"How early can the job finish for at most {budget:,.0f}{currency} "
                                            "of added direct cost?"), answer
    elif recover:
        answer = recovery(planner, progress=progress)
        kind, question = "recover", ("The job is late: what does each way of recovering cost against doing "
                                     "nothing?")
        chosen = next((c.plan for c in reversed(answer.courses) if c.plan is not None), None)
    else:
        answer = price(project, proposal, time_limit=time_limit)
        where = f" ({answer.source})" if answer.source else ""
        kind, question, chosen = "price", (f"What does the proposal{where} buy, what should it cost, and what "
                                           "does it waste?"), answer.plan
    trace = planner.curve(progress=progress)
    return Handover(project, kind, question, answer, chosen, trace, tuple(planner.notes))
