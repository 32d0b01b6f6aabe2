"""Projects changed by a plan: the plan applied, or crashing limited to a proposal.

:func:`accelerated` gives the project as it will be once a plan is adopted: durations set to
the plan, what crashing was used taken off the crash limits and added to the direct cost,
chosen options applied. It can be scheduled, checked, saved and planned again like any
project, and a second plan on it costs only what is left: a further day costs what the
next step of shortening costs. It cannot give back shortening the plan bought (the new
normal is the plan's duration).

:func:`limited` gives the project whose crashing is limited to given days and options (each
activity at most so many days, by its own crash costs, or by one named option): the model of
"use only these lines of a proposal, up to their amounts" (:mod:`hasten.price`).

Both keep progress right: for started work the plan's durations are what is left to do, and
what may still be taken off it is the unused part of its crash allowance in proportion to the
work remaining (:mod:`hasten.progress`), so the new activity's allowance is written so that
this rule gives back exactly the days still available.
"""

from __future__ import annotations

import math
from dataclasses import replace

from .progress import DONE, STARTED, apply_progress
from .calendar import Timeline
from .project import Activity, CrashStep, Project

__all__ = ["accelerated", "limited", "steps_after", "steps_within"]


def steps_after(steps: tuple[CrashStep, ...], used: int) -> tuple[CrashStep, ...]:
    """Crash steps left once the first ``used`` days (in order of use) are spent.

    >>> steps_after((CrashStep(3, 100.0), CrashStep(4, 250.0)), 4)
    (CrashStep(days=3, cost_per_day=250.0),)
    """
    out, skip = [], used
    for s in steps:
        take = min(skip, s.days)
        skip -= take
        if s.days - take > 0:
            out.append(CrashStep(s.days - take, s.cost_per_day))
    return tuple(out)


def steps_within(steps: tuple[CrashStep, ...], days: int) -> tuple[CrashStep, ...]:
    """The first ``days`` days of crash steps, in order of use."""
    out, left = [], days
    for s in steps:
        if left <= 0:
            break
        out.append(CrashStep(min(s.days, left), s.cost_per_day))
        left -= min(s.days, left)
    return tuple(out)


def _with_steps(act: Activity, duration: int, cost: float, steps: tuple[CrashStep, ...]) -> Activity:
    """``act`` with a new duration, cost and crash steps, written the way ``act`` was: one
    linear crash cost when it had no steps and the steps are one rate, else steps."""
    days = sum(s.days for s in steps)
    if not act.steps and len(steps) <= 1:
        if not days:
            return replace(act, duration=duration, cost=cost, crash_duration=duration if act.crash_duration
                           is not None else None, crash_cost=cost if act.crash_cost is not None else None, steps=())
        return replace(act, duration=duration, cost=cost, crash_duration=duration - days,
                       crash_cost=cost + days * steps[0].cost_per_day, steps=())
    return replace(act, duration=duration, cost=cost, steps=steps,
                   crash_duration=None if act.crash_duration is None else duration - days,
                   crash_cost=None if act.crash_cost is None else cost + sum(s.days * s.cost_per_day for s in steps))


def _started(act: Activity, remaining: int, available: tuple[CrashStep, ...], duration: int,
             cost: float) -> Activity:
    """A started activity with ``remaining`` days left and exactly ``available`` crash steps
    usable on them under the rule of :mod:`hasten.progress` (allowance = shortening x
    remaining // duration): its whole shortening is ``ceil(a x duration / remaining)`` days,
    the first ``a`` of them the available steps, the rest (never usable) at the last rate."""
    a = sum(s.days for s in available)
    total = math.ceil(a * duration / remaining) if remaining else 0
    steps = available + ((CrashStep(total - a, available[-1].cost_per_day),) if total > a else ())
    out = _with_steps(act, duration, cost, steps)
    return replace(out, remaining=remaining, percent_complete=None)


def _states(project: Project):
    timeline = Timeline(project)
    return apply_progress(project, timeline.project_clock, timeline).activities


def accelerated(project: Project, plan) -> Project:
    """The project with ``plan`` applied (a :class:`~hasten.results.Plan` of this project).

    For each activity the plan changed (by its ``shortened_by`` and ``option``):

    - not started, the normal way: the duration is the plan's; the direct cost grows by the
      added cost; the crash limit stays (so fewer days are left) and the crash cost at it too
      (a linear crash cost keeps its rate); crash steps lose the days used, cheapest first;
    - not started, by an option: the option becomes the normal way (its duration, the cost
      grown by its added cost); its own further shortening becomes the crash cost; the other
      options stay, their added costs less what was spent (switching refunds it);
    - started: the days left are the plan's; the duration is shortened by the days taken off;
      the crash allowance left is what the plan did not use;
    - finished, or not changed: as it was.

    Examples
    --------
    >>> import hasten
    >>> p = hasten.read_project("cases/clinic-fitout")
    >>> result = hasten.plan(p, hasten.Earlier(days=3))
    >>> after = accelerated(p, result)
    >>> hasten.schedule(after).finish == result.finish
    True
    """
    states = _states(project)
    changes = {a.id: a for a in plan.activities}
    out = []
    for act, state in zip(project.activities, states):
        c = changes.get(act.id)
        if c is None or state.state == DONE or (not c.shortened_by and not c.option):
            out.append(act)
            continue
        cost = act.cost + c.added_cost
        if state.state == STARTED:
            steps = act.segments() if state.steps is None else state.steps
            cut = c.shortened_by
            out.append(_started(act, c.duration, steps_after(steps, cut), act.duration - cut, cost))
            continue
        others = tuple(replace(o, added_cost=o.added_cost - c.added_cost) for o in act.options if o.name != c.option)
        if c.option:
            way = next(o for o in act.options if o.name == c.option)
            room = c.duration - way.shortest
            base = replace(act, steps=(), crash_duration=None, crash_cost=None, options=others)
            steps = (CrashStep(room, way.cost_per_day),) if room > 0 else ()
            new = _with_steps(replace(base, crash_duration=c.duration, crash_cost=cost), c.duration, cost, steps)
            out.append(new)
            continue
        new = _with_steps(act, c.duration, cost, steps_after(act.segments(), c.shortened_by))
        out.append(replace(new, options=others))
    return replace(project, activities=tuple(out))


def limited(project: Project, limits: dict[str, tuple[int, str]]) -> Project:
    """The project whose crashing is limited to ``limits``: for each activity id, the most
    working days it may be shortened and the option it may use ("" for its own crash costs).
    Activities not named cannot be shortened; a named option is the only one left (the
    normal way, unshortened, stays possible). Costs per day are the activity's own."""
    states = _states(project)
    out = []
    for act, state in zip(project.activities, states):
        days, option = limits.get(act.id, (0, ""))
        if state.state == DONE:
            out.append(act)
        elif option:
            way = next(o for o in act.options if o.name == option)
            shortest = max(way.shortest, act.duration - days)
            keep = replace(way, crash_duration=None if shortest >= way.duration else shortest)
            out.append(_with_steps(replace(act, options=(keep,)), act.duration, act.cost, ()))
        elif state.state == STARTED:
            steps = act.segments() if state.steps is None else state.steps
            out.append(_started(act, state.duration, steps_within(steps, days), act.duration, act.cost))
        else:
            new = _with_steps(act, act.duration, act.cost, steps_within(act.segments(), days))
            out.append(replace(new, options=()))
    return replace(project, activities=tuple(out))
