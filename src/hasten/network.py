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
from typing import NamedTuple, Sequence

import numpy as np

from .calendar import Timeline
from .errors import CycleError
from .graph import find_cycle, levels
from .project import LinkType, Project
from .progress import DONE, STARTED, WAITING, apply_progress

__all__ = [
    "Network",
    "ActivityDates",
    "Schedule",
    "schedule",
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
        self.timeline = Timeline(project)
        self.clock = self.timeline.project_clock  # the project calendar's
        self.several = self.timeline.several  # some activities work to calendars of their own
        self.cal: list[int] = self.timeline.of  # calendar of each activity (0: the project's)
        self.progress = apply_progress(project, self.clock, self.timeline)
        acts, states = project.activities, self.progress.activities
        self.ids: list[str] = [a.id for a in acts]
        self.index: dict[str, int] = {a: i for i, a in enumerate(self.ids)}
        n = len(self.ids)
        idx = self.index
        # what is left to schedule: durations at normal pace, crash steps, options
        self.durations: list[int] = [s.duration for s in states]
        self.options = [a.options if s.state == WAITING else () for a, s in zip(acts, states)]
        self._steps: list | None = None
        self._shortest: list[int] | None = None
        self.release: list[int] = [s.release for s in states]  # earliest start
        self.fixed: list[bool] = [s.state == DONE for s in states]  # start fixed at release
        self.finish_release: list[int] = [0] * n  # earliest finish, from links to fixed events
        self.shown_start: list[int | None] = [s.start for s in states]  # actual start, if any
        links = project.links
        every_pred = np.fromiter((idx[k.pred] for k in links), dtype=np.int64, count=len(links))
        every_succ = np.fromiter((idx[k.succ] for k in links), dtype=np.int64, count=len(links))
        levels = self._cycle_check(every_pred, every_succ)
        if self.progress.progressed:
            kept = [e for e, k in enumerate(links) if e not in self.progress.dropped
                    and self._compile_link(k, idx[k.pred], idx[k.succ], states)]
            self.pred: list[int] = every_pred[kept].tolist()
            self.succ: list[int] = every_succ[kept].tolist()
            levels = None  # fewer links: the levels are counted again
        else:  # without progress every link joins two events still to schedule
            kept = range(len(links))
            self.pred, self.succ = every_pred.tolist(), every_succ.tolist()
        self.link_index: list[int] = list(kept)  # position of each link in project.links
        self.kind: list[int] = [_KIND[links[e].type] for e in kept]
        self.lag: list[int] = [links[e].lag for e in kept]
        self._arrays(levels)
        self._in_links: list[list[int]] | None = None
        self._out_links: list[list[int]] | None = None

    @property
    def in_links(self) -> list[list[int]]:
        """Links into each activity (for the loop passes), built on first use."""
        if self._in_links is None:
            self._in_links = [[] for _ in self.ids]
            for e, j in enumerate(self.succ):
                self._in_links[j].append(e)
        return self._in_links

    @property
    def out_links(self) -> list[list[int]]:
        """Links out of each activity (for the loop passes), built on first use."""
        if self._out_links is None:
            self._out_links = [[] for _ in self.ids]
            for e, i in enumerate(self.pred):
                self._out_links[i].append(e)
        return self._out_links

    def _compile_link(self, link, i: int, j: int, states) -> bool:
        """Keep a link between two schedulable events; a link whose predecessor event is
        already fixed by progress becomes an earliest start or finish of the successor;
        a link into an event already in the past is history. Returns True to keep it."""
        si, sj = states[i].state, states[j].state
        on_start = link.type in (LinkType.FS, LinkType.SS)
        if sj == DONE or (sj == STARTED and on_start):
            return False
        from_finish = link.type in (LinkType.FS, LinkType.FF)
        if si == DONE:
            at = states[i].release + (states[i].duration if from_finish else 0)
        elif si == STARTED and not from_finish:
            at = states[i].start
        else:
            return True
        at = self._convert(i, j, at, _KIND[link.type])
        if on_start:
            self.release[j] = max(self.release[j], at + link.lag)
        else:
            self.finish_release[j] = max(self.finish_release[j], at + link.lag)
        return False

    def _cycle_check(self, pred: np.ndarray, succ: np.ndarray) -> np.ndarray:
        """Refuse a loop in the links (all of them, also those progress has overridden);
        returns the level of each activity."""
        level = levels(len(self.ids), pred, succ)
        if level is not None:
            return level
        loop = find_cycle(len(self.ids), pred, succ)
        raise CycleError([self.ids[int(pred[e])] for e in loop])

    @property
    def steps(self) -> list:
        """Crash steps still available per activity, in order of use (built on first use)."""
        if self._steps is None:
            self._steps = [a.segments() if st.steps is None else st.steps
                           for a, st in zip(self.project.activities, self.progress.activities)]
        return self._steps

    @property
    def shortest(self) -> list[int]:
        """Shortest possible duration of what is left, over crash steps and options."""
        if self._shortest is None:
            self._shortest = [min([d - sum(x.days for x in st)] + [o.shortest for o in opts])
                              for d, st, opts in zip(self.durations, self.steps, self.options)]
        return self._shortest

    def _arrays(self, level: np.ndarray | None) -> None:
        """Links as numpy arrays grouped by level, for the vectorised passes."""
        n = len(self.ids)
        self._p = np.asarray(self.pred, dtype=np.int64)
        self._s = np.asarray(self.succ, dtype=np.int64)
        kind = np.asarray(self.kind, dtype=np.int64)
        self._lag = np.asarray(self.lag, dtype=np.int64)
        self._from_finish = (kind == _FS) | (kind == _FF)  # the link leaves the predecessor's finish
        self._to_finish = (kind == _FF) | (kind == _SF)  # it constrains the successor's finish
        if level is None:
            level = levels(n, self._p, self._s)
        self.order: list[int] = np.argsort(level, kind="stable").tolist()
        top = int(level.max()) + 1 if n else 0
        # many nodes per level: numpy passes one level at a time; long chains: plain loops
        self._vector = n > 0 and top * 20 <= n
        cal = np.asarray(self.cal, dtype=np.int64)
        self._cross = cal[self._p] != cal[self._s]  # links between two calendars
        # links between calendars grouped by (predecessor's calendar, successor's, kind)
        ncal = len(self.timeline.clocks)
        self._group = (cal[self._p] * ncal + cal[self._s]) * 4 + kind
        self._groups = {int(key): (int(key) // 4 // ncal, int(key) // 4 % ncal, int(key) % 4)
                        for key in np.unique(self._group[self._cross]).tolist()}
        by_succ = np.argsort(level[self._s], kind="stable")
        self._in_level = np.split(by_succ, np.searchsorted(level[self._s][by_succ], np.arange(1, top)))
        by_pred = np.argsort(level[self._p], kind="stable")
        self._out_level = np.split(by_pred, np.searchsorted(level[self._p][by_pred], np.arange(1, top)))
        self._release = np.asarray(self.release, dtype=np.int64)
        self._finish_release = np.asarray(self.finish_release, dtype=np.int64)
        self._fixed = np.asarray(self.fixed, dtype=bool)

    def __len__(self) -> int:
        return len(self.ids)

    # -- the two passes ------------------------------------------------------------
    def forward(self, d: Sequence[int]) -> list[int]:
        """Early starts (of what is left to schedule) for durations ``d``."""
        if self._vector:
            return self._forward_levels(np.asarray(d, dtype=np.int64)).tolist()
        return self._forward_loop(d)

    def _forward_levels(self, d: np.ndarray) -> np.ndarray:
        es = np.maximum(self._release, self._finish_release - d)
        es[self._fixed] = self._release[self._fixed]  # (a finished activity has no links in)
        p, s, lag, ff, tf = self._p, self._s, self._lag, self._from_finish, self._to_finish
        for links in self._in_level[1:]:  # predecessors are on earlier levels: already final
            i, j = p[links], s[links]
            at = es[i] + np.where(ff[links], d[i], 0)
            if self.several:
                at = self._across(links, at)
            bound = at + lag[links] - np.where(tf[links], d[j], 0)
            np.maximum.at(es, j, bound)
        return es

    def _across(self, links: np.ndarray, at: np.ndarray, inverse: bool = False) -> np.ndarray:
        """Positions ``at`` of the predecessors of ``links`` in their successors' calendars
        (``inverse``: successors' positions back in the predecessors' calendars), for the
        links between two calendars; the others are left as they are."""
        cross = self._cross[links]
        if not cross.any():
            return at
        at = at.copy()
        group = self._group[links]
        move = self.timeline.latest if inverse else self.timeline.convert
        for key in np.unique(group[cross]).tolist():
            a, b, k = self._groups[key]
            sel = group == key
            at[sel] = move(a, b, at[sel], k)
        return at

    def _backward_levels(self, d: np.ndarray, finish: int) -> np.ndarray:
        ls = (np.asarray(self.latest_finish(finish), dtype=np.int64) if self.several else finish) - d
        p, s, lag, ff, tf = self._p, self._s, self._lag, self._from_finish, self._to_finish
        for links in reversed(self._out_level):  # successors are on later levels: already final
            if not len(links):
                continue
            i, j = p[links], s[links]
            x = ls[j] + np.where(tf[links], d[j], 0) - lag[links]
            if self.several:
                x = self._across(links, x, inverse=True)
            bound = x - np.where(ff[links], d[i], 0)
            np.minimum.at(ls, i, bound)
        return ls

    def _convert(self, i: int, j: int, at: int, kind: int) -> int:
        """Position in ``j``'s calendar that a link of ``kind`` from ``i``'s event at ``at``
        allows (before the lag); ``at`` itself when both share a calendar."""
        a, b = self.cal[i], self.cal[j]
        return at if a == b else int(self.timeline.convert(a, b, at, kind))

    def _latest(self, i: int, j: int, x: int, kind: int) -> int:
        """Latest event of ``i`` whose link of ``kind`` allows ``j``'s event at ``x``."""
        a, b = self.cal[i], self.cal[j]
        return x if a == b else int(self.timeline.latest(a, b, x, kind))

    def _forward_loop(self, d: Sequence[int]) -> list[int]:
        es = [0] * len(self.ids)
        pred, kind, lag, in_links = self.pred, self.kind, self.lag, self.in_links
        release, finish_release, fixed = self.release, self.finish_release, self.fixed
        cross = self._cross.tolist() if self.several else None
        for j in self.order:
            dj = d[j]
            if fixed[j]:
                es[j] = release[j]
                continue
            best = release[j]
            if finish_release[j] - dj > best:
                best = finish_release[j] - dj
            for e in in_links[j]:
                i = pred[e]
                k = kind[e]
                at = es[i] + d[i] if k == _FS or k == _FF else es[i]
                if cross is not None and cross[e]:
                    at = self._convert(i, j, at, k)
                b = at + lag[e] if k == _FS or k == _SS else at + lag[e] - dj
                if b > best:
                    best = b
            es[j] = best
        return es

    def finish_of(self, es: Sequence[int], d: Sequence[int]) -> int:
        """Project finish (project-calendar working days) of early starts ``es``."""
        if not self.several:
            return max((es[i] + d[i] for i in range(len(d))), default=0)
        ef = np.asarray(es, dtype=np.int64) + np.asarray(d, dtype=np.int64)
        cal = np.asarray(self.cal, dtype=np.int64)
        out = 0
        for c in np.unique(cal).tolist():
            mine = ef[cal == c]
            if len(mine):
                out = max(out, int(self.timeline.to_project(c, mine.max())))
        return out

    def latest_finish(self, finish: int) -> list[int]:
        """Latest finish of each activity, in its own calendar, within project finish ``finish``."""
        if not self.several:
            return [finish] * len(self.ids)
        by_cal = {c: int(self.timeline.from_project(c, finish)) for c in set(self.cal)}
        return [by_cal[c] for c in self.cal]

    def forward_finish(self, d: Sequence[int] | None = None) -> int:
        """Finish of the early-start schedule (normal durations by default)."""
        d = self.durations if d is None else d
        return self.finish_of(self.forward(d), d)

    def backward(self, d: Sequence[int], finish: int) -> list[int]:
        """Late starts for durations ``d`` when every activity must finish by ``finish``."""
        if self._vector:
            return self._backward_levels(np.asarray(d, dtype=np.int64), finish).tolist()
        ls = [0] * len(self.ids)
        succ, kind, lag, out_links = self.succ, self.kind, self.lag, self.out_links
        cap = self.latest_finish(finish)
        cross = self._cross.tolist() if self.several else None
        for i in reversed(self.order):
            di = d[i]
            best = cap[i] - di
            for e in out_links[i]:
                j = succ[e]
                k = kind[e]
                x = ls[j] - lag[e] if k == _FS or k == _SS else ls[j] + d[j] - lag[e]
                if cross is not None and cross[e]:
                    x = self._latest(i, j, x, k)
                b = x - di if k == _FS or k == _FF else x
                if b < best:
                    best = b
            ls[i] = best
        return ls

    def link_slacks(self, es: Sequence[int], d: Sequence[int]) -> np.ndarray:
        """For every link, how far its successor's event is after the link allows (early dates)."""
        es = np.asarray(es, dtype=np.int64)
        d = np.asarray(d, dtype=np.int64)
        p, s = self._p, self._s
        later = es[s] + np.where(self._to_finish, d[s], 0)
        earlier = es[p] + np.where(self._from_finish, d[p], 0)
        if self.several:
            earlier = self._across(np.arange(len(p)), earlier)
        return later - earlier - self._lag


class ActivityDates(NamedTuple):
    """CPM results for one activity, in working-day offsets of its own calendar.

    A named tuple rather than a frozen dataclass: a schedule makes one per activity, and
    50,000 of them are built in a fifth of the time."""

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
    state: str = WAITING  # progress at the data date: finished, started or not started


@dataclass(frozen=True)
class Schedule:
    """The result of a forward and backward pass."""

    finish: int
    activities: tuple[ActivityDates, ...]
    critical_paths: tuple[tuple[str, ...], ...]
    deadline: int | None = None
    paths_truncated: bool = False
    # with calendars of their own: chains of driving links back from the work that ends at
    # the project finish (float counts in each activity's own calendar, so a seven-day
    # activity can drive the finish with a weekend of float and not be critical)
    longest_paths: tuple[tuple[str, ...], ...] = ()

    def by_id(self) -> dict[str, ActivityDates]:
        return {a.id: a for a in self.activities}

    @property
    def critical_ids(self) -> list[str]:
        return [a.id for a in self.activities if a.critical]


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
    finish = net.finish_of(es, d)
    horizon = finish if deadline is None else deadline
    ls = net.backward(d, horizon)
    tf = [ls[i] - es[i] for i in range(n)]
    live = [not f for f in net.fixed]  # finished work has no float and is never critical
    least = min((t for t, a in zip(tf, live) if a), default=0)

    slack = net.link_slacks(es, d)
    free_a = np.asarray(net.latest_finish(finish), dtype=np.int64) - np.asarray(es, dtype=np.int64) \
        - np.asarray(d, dtype=np.int64)
    if len(slack):
        np.minimum.at(free_a, net._p, slack)
    free = free_a.tolist()
    driving: list[list[int]] = [[] for _ in range(n)]
    tight = np.flatnonzero(slack == 0)
    for i, j in zip(net._p[tight].tolist(), net._s[tight].tolist()):
        driving[j].append(i)
    critical = [t == least and a for t, a in zip(tf, live)]
    paths, truncated = _critical_paths(net, critical, driving, es, d, finish)
    longest = _longest_paths(net, driving, es, d, finish) if net.several else ()
    states = net.progress.activities
    rows = []
    for i in range(n):
        shown = net.shown_start[i]
        start = es[i] if shown is None else shown
        if net.fixed[i]:
            rows.append(ActivityDates(net.ids[i], d[i], start, es[i] + d[i], start, es[i] + d[i], 0, 0,
                                      False, (), states[i].state))
            continue
        late_start = ls[i] if shown is None else start
        rows.append(ActivityDates(net.ids[i], d[i], start, es[i] + d[i], late_start, ls[i] + d[i], tf[i],
                                  free[i], critical[i], tuple(net.ids[p] for p in driving[i]),
                                  states[i].state))
    return Schedule(finish, tuple(rows), paths, deadline, truncated, longest)


def _longest_paths(net: Network, driving: list[list[int]], es: list[int], d: list[int], finish: int):
    """Chains of driving links from a start to the work that ends at the project finish."""
    cap = net.latest_finish(finish)
    ends = [i for i in range(len(d)) if not net.fixed[i] and es[i] + d[i] >= cap[i]]
    on = [False] * len(d)
    stack = list(ends)
    while stack:
        j = stack.pop()
        if on[j]:
            continue
        on[j] = True
        stack.extend(i for i in driving[j] if not on[i] and not net.fixed[i])
    return _critical_paths(net, on, driving, es, d, finish)[0]


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
