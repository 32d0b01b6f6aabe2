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
>>> costs = PlanCosts(net)
>>> costs.added_costs([4, 0])
[10.0, 0.0]
>>> costs.milestone_damages([4, 4])  # B dated Thu 4 Jan, the day A ends: 1 day late
7.0
"""

from __future__ import annotations

from typing import Sequence

import numpy as np

from .network import Network
from .progress import end_day
from .project import Option

__all__ = ["option_added_cost", "PlanCosts"]


def option_added_cost(option: Option, duration: int) -> float:
    """Added cost of performing an activity by ``option`` in ``duration`` days."""
    return option.added_cost + option.cost_per_day * (option.duration - duration)


class PlanCosts:
    """The costs of plans on one network; what depends only on the network is found once.

    Parameters
    ----------
    net : Network
        The project compiled, with its progress applied.
    """

    def __init__(self, net: Network):
        self.net = net
        self._normal = np.asarray(net.durations, dtype=np.int64)
        # work not yet finished with its own deadline and damages (finished work's are history)
        self._deadlines = [k for k, a in enumerate(net.project.activities)
                           if a.deadline is not None and a.damages_per_day and not net.fixed[k]]

    @property
    def owes_damages(self) -> bool:
        """True when some unfinished work has a deadline of its own with damages."""
        return bool(self._deadlines)

    def added_costs(self, durations: Sequence[int], choices: Sequence[int] | None = None) -> list[float]:
        """Added direct cost of each activity (in network order) at ``durations``: its
        option's cost, or its crash steps still available, taken in order."""
        d = np.asarray(durations, dtype=np.int64)
        out = [0.0] * len(d)
        changed = set(np.flatnonzero(d != self._normal).tolist())
        if choices:
            changed.update(np.flatnonzero(np.asarray(choices) >= 0).tolist())
        for k in sorted(changed):
            c = -1 if not choices else choices[k]
            if c >= 0:
                out[k] = option_added_cost(self.net.options[k][c], int(d[k]))
                continue
            total, left = 0.0, int(self._normal[k] - d[k])
            left_steps = self.net.progress.activities[k].steps  # (started work: what is left of them)
            for step in self.net.project.activities[k].segments() if left_steps is None else left_steps:
                take = min(left, step.days)
                total += take * step.cost_per_day
                left -= take
            out[k] = total
        return out

    def milestone_damages(self, finishes: Sequence[int]) -> float:
        """Damages of unfinished work past its own deadline (per calendar day) at
        ``finishes`` (each in its activity's own calendar)."""
        total = 0.0
        net, states = self.net, self.net.progress.activities
        for k in self._deadlines:
            a = net.project.activities[k]
            day = net.timeline.clock_of(k).date_of(end_day(states[k], int(finishes[k])))
            total += a.damages_per_day * max(0, (day - a.deadline).days)
        return total
