"""Least-cost plans solved on the part of the network that can matter.

To finish ``r`` working days before the normal finish, the least-cost plan rarely
touches an activity whose total float (at normal durations) exceeds ``r``: every path
through it has room to spare. :class:`PartialSolver` builds the same crashing model
(:class:`~hasten.crash_model.CrashModel`) for the activities with total float up to a
reach, plus everything already finished, and the links among them.

Why this is exact: the part's model has the same columns and costs for its activities
and only fewer rows (the links to the rest are left out), so it is a relaxation of the
whole model and its least cost is at most the whole model's. Its plan, with every
other activity at its normal duration (no added cost), is then scheduled on the whole
network by a forward pass. If that schedule finishes by the target, the plan is a plan
of the whole network costing the relaxation's least cost, so it is a least-cost plan of
the whole network. If not (shortening some activities can lengthen paths through others
when SS/FF/SF links are mixed), the reach is widened and the part solved again, up to
the whole network, where the caller's own model takes over.

Among several least-cost plans the part's tie-break (fewest activities shortened, then
fewest days) is also the whole network's: a plan of the whole network that shortens an
activity outside the part at a cost would cost more than the part's least cost.
Activities with a free shortening day are the exception; they are never shortened by
the tie-break either. Used only for the linear model without discrete options, interim
deadlines or damages (:func:`solvable_on_part`).
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from .network import Network
from .crash_model import CrashModel, Solution
from .crash_slim import linear_on_one_calendar

__all__ = ["PartialSolver", "solvable_on_part"]

WHOLE_SHARE = 0.6  # a part this large (share of activities) is solved as the whole network


def solvable_on_part(network: Network) -> bool:
    """True when plans of ``network`` may be solved on a part of it: linear costs only
    (no discrete options), one calendar, and no activity with a deadline of its own."""
    return linear_on_one_calendar(network)


class PartialSolver:
    """Solves least-cost plans of ``network`` on its smallest part that can matter."""

    def __init__(self, network: Network, *, time_limit: float | None = None):
        self.net = network
        d = np.asarray(network.durations, dtype=np.int64)
        self.normal_finish = network.forward_finish()
        es = np.asarray(network.forward(d), dtype=np.int64)
        ls = np.asarray(network.backward(d, self.normal_finish), dtype=np.int64)
        total_float = ls - es
        total_float[np.asarray(network.fixed, dtype=bool)] = -1  # finished work: always in
        self.total_float = total_float
        self.normal = d
        self.time_limit = time_limit
        self._reach = -1  # reach of the part built last
        self._part: tuple[CrashModel, np.ndarray] | None = None
        self.rounds = 0  # parts built, for the benchmarks and tests

    def _part_for(self, reach: int) -> tuple[CrashModel, np.ndarray] | None:
        """The model of the part within ``reach`` days of float, or ``None`` when that
        part is (nearly) the whole network."""
        if self._part is not None and reach <= self._reach:
            return self._part
        keep = np.flatnonzero(self.total_float <= reach)
        if len(keep) > WHOLE_SHARE * len(self.normal):
            return None
        project = self.net.project
        acts = tuple(project.activities[i] for i in keep.tolist())
        inside = {a.id for a in acts}
        links = tuple(k for k in project.links if k.pred in inside and k.succ in inside)
        part = replace(project, activities=acts, links=links)
        self._part = (CrashModel(Network(part), time_limit=self.time_limit), keep)
        self._reach = reach
        self.rounds += 1
        return self._part

    def least_cost(self, target: int, *, reach: int | None = None,
                   tie_break: bool = True) -> Solution | None:
        """The least-cost plan of the whole network to finish by ``target``, solved on a
        part covering at least ``reach`` days of float (default: the days to take off),
        with the early starts of the whole network. ``None`` when no part smaller than
        the whole network gives a plan that holds (the caller then solves the whole)."""
        reach = max(self.normal_finish - target, 0 if reach is None else reach)
        while True:
            part = self._part_for(reach)
            if part is None:
                return None
            model, keep = part
            sol = model.least_cost(target, tie_break=tie_break)
            if sol is None:  # the relaxation has no plan: let the whole model say why
                return None
            durations = self.normal.copy()
            durations[keep] = sol.durations
            starts = self.net.forward(durations)
            if self.net.finish_of(starts, durations.tolist()) <= target:
                return replace(sol, durations=tuple(durations.tolist()), starts=tuple(starts), early=True)
            reach = 2 * max(reach, self._reach) + 1
