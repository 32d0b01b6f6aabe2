"""What a plan costs, as the optimiser side counts it on the compiled network.

The added direct cost of each activity (its crash steps still available, taken in order, or
the discrete option chosen) and the damages of interim milestones: work not yet finished
that passes its own deadline, per calendar day from the deadline to the day its end is
dated on (:func:`hasten.progress.end_day`). The planner shows these figures with each plan;
the independent check (:mod:`hasten.plan_check`) recomputes them from the project alone
and must agree.

Examples
--------
>>> from datetime import date
>>> from hasten.network import Network
>>> from hasten.project import Activity, Link, Project
>>> net = Network(Project("two", date(2024, 1, 1), (Activity("A", 5, crash_duration=3, crash_cost=20.0),
...                       Activity("B", 0, deadline=date(2024, 1, 3), damages_per_day=7.0)),
...                       (Link("A", "B"),)))
>>> added_costs(net, [4, 0])
[10.0, 0.0]
>>> milestone_damages(net, [4, 4])  # B dated Thu 4 Jan, the day A ends: 1 day late
7.0
"""

from __future__ import annotations

from typing import Sequence

from .network import Network
from .progress import end_day
from .project import Option

__all__ = ["option_added_cost", "added_costs", "milestone_damages"]


def option_added_cost(option: Option, duration: int) -> float:
    """Added cost of performing an activity by ``option`` in ``duration`` days."""
    return option.added_cost + option.cost_per_day * (option.duration - duration)


def added_costs(net: Network, durations: Sequence[int], choices: Sequence[int] | None = None) -> list[float]:
    """Added direct cost of each activity (in network order) at ``durations``: its option's
    cost, or its crash steps still available, cheapest first as they come."""
    out = [0.0] * len(durations)
    normal = net.durations
    for k, d in enumerate(durations):
        c = -1 if not choices else choices[k]
        if c >= 0:
            out[k] = option_added_cost(net.options[k][c], int(d))
        elif d < normal[k]:
            total, left = 0.0, normal[k] - int(d)
            for step in net.steps[k]:
                take = min(left, step.days)
                total += take * step.cost_per_day
                left -= take
            out[k] = total
    return out


def milestone_damages(net: Network, finishes: Sequence[int]) -> float:
    """Damages of unfinished work past its own deadline (per calendar day) at ``finishes``
    (in each activity's own calendar); finished work's dates are history."""
    total = 0.0
    states = net.progress.activities
    for k, a in enumerate(net.project.activities):
        if a.deadline is None or not a.damages_per_day or net.fixed[k]:
            continue
        day = net.timeline.clock_of(k).date_of(end_day(states[k], int(finishes[k])))
        total += a.damages_per_day * max(0, (day - a.deadline).days)
    return total
