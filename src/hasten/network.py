"""The activity network and the critical path method (forward and backward pass).

Precedence relationships in start-time form, with ``S`` start, ``d`` duration, ``l`` lag::

    FS  S_j >= S_i + d_i + l        SS  S_j >= S_i + l
    FF  S_j + d_j >= S_i + d_i + l  SF  S_j + d_j >= S_i + l

and every start at or after the project start, day 0. Early dates are the least
solution of these difference constraints (the forward pass); late dates the greatest
solution that finishes every activity by the project finish or a deadline (the
backward pass).
"""

from __future__ import annotations

from dataclasses import dataclass
from graphlib import CycleError as _GraphCycle
from graphlib import TopologicalSorter
from typing import Sequence

from .errors import CycleError
from .model import LinkType, Project

__all__ = [
    "Network",
    "ActivityDates",
    "Schedule",
    "schedule",
    "early_finish",
    "MAX_PATHS",
]

#: At most this many critical paths are listed (a network can have exponentially many).
MAX_PATHS = 100

_FS, _SS, _FF, _SF = 0, 1, 2, 3
_KIND = {LinkType.FS: _FS, LinkType.SS: _SS, LinkType.FF: _FF, LinkType.SF: _SF}


class Network:
    """A project compiled to integer-indexed arrays, in topological order.

    Built once per project and shared by the CPM passes, the optimiser and the checks.
    """

    def __init__(self, project: Project):
        self.project = project
        self.ids: list[str] = [a.id for a in project.activities]
        self.index: dict[str, int] = {a: i for i, a in enumerate(self.ids)}
        self.durations: list[int] = [a.duration for a in project.activities]
        self.shortest: list[int] = [a.shortest for a in project.activities]
        n = len(self.ids)
        idx = self.index
        self.pred: list[int] = [idx[k.pred] for k in project.links]
        self.succ: list[int] = [idx[k.succ] for k in project.links]
        self.kind: list[int] = [_KIND[k.type] for k in project.links]
        self.lag: list[int] = [k.lag for k in project.links]
        self.in_links: list[list[int]] = [[] for _ in range(n)]
        self.out_links: list[list[int]] = [[] for _ in range(n)]
        for e, (i, j) in enumerate(zip(self.pred, self.succ)):
            self.out_links[i].append(e)
            self.in_links[j].append(e)
        self.order: list[int] = self._topological_order()

    def __len__(self) -> int:
        return len(self.ids)

    def _topological_order(self) -> list[int]:
        sorter = TopologicalSorter({j: [self.pred[e] for e in self.in_links[j]]
                                    for j in range(len(self.ids))})
        try:
            return list(sorter.static_order())
        except _GraphCycle as exc:
            loop = exc.args[1][:-1]  # graphlib repeats the first node at the end
            raise CycleError([self.ids[i] for i in reversed(loop)]) from None

    # -- the two passes ------------------------------------------------------------
    def forward(self, d: Sequence[int]) -> list[int]:
        """Early starts for durations ``d``."""
        es = [0] * len(self.ids)
        pred, kind, lag, in_links = self.pred, self.kind, self.lag, self.in_links
        for j in self.order:
            best = 0
            dj = d[j]
            for e in in_links[j]:
                i = pred[e]
                k = kind[e]
                if k == _FS:
                    b = es[i] + d[i] + lag[e]
                elif k == _SS:
                    b = es[i] + lag[e]
                elif k == _FF:
                    b = es[i] + d[i] + lag[e] - dj
                else:
                    b = es[i] + lag[e] - dj
                if b > best:
                    best = b
            es[j] = best
        return es

    def backward(self, d: Sequence[int], finish: int) -> list[int]:
        """Late starts for durations ``d`` when every activity must finish by ``finish``."""
        ls = [0] * len(self.ids)
        succ, kind, lag, out_links = self.succ, self.kind, self.lag, self.out_links
        for i in reversed(self.order):
            di = d[i]
            best = finish - di
            for e in out_links[i]:
                j = succ[e]
                k = kind[e]
                if k == _FS:
                    b = ls[j] - lag[e] - di
                elif k == _SS:
                    b = ls[j] - lag[e]
                elif k == _FF:
                    b = ls[j] + d[j] - lag[e] - di
                else:
                    b = ls[j] + d[j] - lag[e]
                if b < best:
                    best = b
            ls[i] = best
        return ls

    def link_slack(self, e: int, es: Sequence[int], d: Sequence[int]) -> int:
        """How far the successor of link ``e`` starts after the link allows (early dates)."""
        i, j, k, lg = self.pred[e], self.succ[e], self.kind[e], self.lag[e]
        if k == _FS:
            return es[j] - (es[i] + d[i] + lg)
        if k == _SS:
            return es[j] - (es[i] + lg)
        if k == _FF:
            return es[j] + d[j] - (es[i] + d[i] + lg)
        return es[j] + d[j] - (es[i] + lg)


@dataclass(frozen=True)
class ActivityDates:
    """CPM results for one activity, in working-day offsets."""

    id: str
    duration: int
    es: int
    ef: int
    ls: int
    lf: int
    total_float: int
    free_float: int
    critical: bool
    driving: tuple[str, ...]  # predecessors whose links control the early start


@dataclass(frozen=True)
class Schedule:
    """The result of a forward and backward pass."""

    finish: int
    activities: tuple[ActivityDates, ...]
    critical_paths: tuple[tuple[str, ...], ...]
    deadline: int | None = None
    paths_truncated: bool = False

    def by_id(self) -> dict[str, ActivityDates]:
        return {a.id: a for a in self.activities}

    @property
    def critical_ids(self) -> list[str]:
        return [a.id for a in self.activities if a.critical]


def early_finish(network: Network, durations: Sequence[int] | None = None) -> int:
    """Project finish (working days) of the early-start schedule, forward pass only."""
    d = network.durations if durations is None else durations
    es = network.forward(d)
    return max((es[i] + d[i] for i in range(len(d))), default=0)


def schedule(project_or_network: Project | Network, durations: Sequence[int] | None = None,
             deadline: int | None = None) -> Schedule:
    """Forward and backward pass.

    ``durations`` overrides the normal durations (in project activity order), e.g. for
    an accelerated plan. ``deadline`` (working days) replaces the project finish as the
    date the backward pass starts from, which can make float negative. Critical
    activities are those with the least total float (zero when there is no deadline).
    """
    net = project_or_network if isinstance(project_or_network, Network) else Network(project_or_network)
    d = list(net.durations if durations is None else durations)
    n = len(d)
    es = net.forward(d)
    finish = max((es[i] + d[i] for i in range(n)), default=0)
    horizon = finish if deadline is None else deadline
    ls = net.backward(d, horizon)
    tf = [ls[i] - es[i] for i in range(n)]
    least = min(tf, default=0)

    free = [finish - es[i] - d[i] for i in range(n)]
    driving: list[list[int]] = [[] for _ in range(n)]
    for e in range(len(net.pred)):
        s = net.link_slack(e, es, d)
        i, j = net.pred[e], net.succ[e]
        if s < free[i]:
            free[i] = s
        if s == 0:
            driving[j].append(i)
    critical = [t == least for t in tf]
    paths, truncated = _critical_paths(net, critical, driving, es, d, finish)
    acts = tuple(
        ActivityDates(net.ids[i], d[i], es[i], es[i] + d[i], ls[i], ls[i] + d[i], tf[i], free[i],
                      critical[i], tuple(net.ids[p] for p in driving[i]))
        for i in range(n))
    return Schedule(finish, acts, paths, deadline, truncated)


def _critical_paths(net: Network, critical: list[bool], driving: list[list[int]],
                    es: list[int], d: list[int], finish: int):
    """Chains of critical activities joined by driving links, from a start to the finish."""
    nxt: dict[int, list[int]] = {}
    has_pred: set[int] = set()
    for j, preds in enumerate(driving):
        if not critical[j]:
            continue
        for i in preds:
            if critical[i]:
                nxt.setdefault(i, []).append(j)
                has_pred.add(j)
    starts = [i for i in net.order if critical[i] and i not in has_pred]
    paths: list[tuple[str, ...]] = []
    truncated = False
    for s in starts:
        stack = [(s, [s])]
        while stack:
            node, path = stack.pop()
            succs = nxt.get(node)
            if not succs:
                paths.append(tuple(net.ids[k] for k in path))
                if len(paths) >= MAX_PATHS:
                    return tuple(paths), True
                continue
            for j in reversed(succs):
                stack.append((j, path + [j]))
    return tuple(paths), truncated
