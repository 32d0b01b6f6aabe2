"""The schedule of a project: early and late dates, floats, driving links, critical paths.

:func:`schedule` runs the forward and backward passes (:mod:`hasten.passes`) over the
compiled network (:mod:`hasten.network`) and returns a :class:`Schedule`. Critical
activities have the least total float (zero without a deadline); critical paths are chains
of critical activities joined by driving links (a link with no gap at the early dates).
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import date
from itertools import repeat
from operator import add, attrgetter
from typing import NamedTuple, Sequence

import numpy as np

from .network import Network
from .progress import WAITING
from .project import Project

__all__ = ["ActivityDates", "Schedule", "schedule", "MAX_PATHS"]

#: At most this many critical paths are listed (a network can have exponentially many).
MAX_PATHS = 100


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
    warnings: tuple[str, ...] = ()  # about the input, e.g. out-of-sequence progress
    start_date: date | None = None  # the project's first working day
    finish_date: date | None = None  # the last day worked (or the day of the last milestone)
    states: tuple = ()  # hasten.progress.ActivityProgress of each activity: how its dates are shown
    deadline_date: date | None = None  # the last day of the deadline, when one was given

    def by_id(self) -> dict[str, ActivityDates]:
        return {a.id: a for a in self.activities}

    @property
    def critical_ids(self) -> list[str]:
        return [a.id for a in self.activities if a.critical]


def schedule(project_or_network: Project | Network, durations: Sequence[int] | None = None,
             deadline: int | date | None = None) -> Schedule:
    """Forward and backward pass: early and late dates, floats, critical paths.

    Parameters
    ----------
    project_or_network : Project or Network
    durations : sequence of int, optional
        Durations (in project activity order) instead of the normal ones, e.g. a plan's.
    deadline : int or datetime.date, optional
        Working days from the start, or the last day allowed: the backward pass starts
        there instead of at the early finish, so float can go negative. Critical activities
        are those with the least total float (zero when there is no deadline).

    Examples
    --------
    >>> from datetime import date
    >>> from hasten.project import Activity, Link, Project
    >>> p = Project("two", date(2027, 1, 4), (Activity("A", 5), Activity("B", 3)), (Link("A", "B"),))
    >>> s = schedule(p)
    >>> s.finish, s.critical_paths, s.finish_date
    (8, (('A', 'B'),), datetime.date(2027, 1, 13))
    >>> [a.total_float for a in schedule(p, deadline=6).activities]
    [-2, -2]
    >>> schedule(Project("loop", date(2027, 1, 4), (Activity("A", 1), Activity("B", 1)),
    ...                  (Link("A", "B"), Link("B", "A"))))
    Traceback (most recent call last):
    ...
    hasten.errors.CycleError: the links form a loop: A -> B -> A. Fix: remove or reverse one of these links so that no activity depends on itself
    """
    net = project_or_network if isinstance(project_or_network, Network) else Network(project_or_network)
    deadline_date = None
    if isinstance(deadline, date):
        deadline_date, deadline = deadline, net.clock.offset_of(deadline, finish=True)
    elif deadline is not None:
        deadline_date = net.clock.project_finish_date(deadline)
    d = list(net.durations if durations is None else durations)
    n = len(d)
    es = net.forward(d)
    finish = net.finish_of(es, d)
    horizon = finish if deadline is None else deadline
    ls = net.backward(d, horizon)
    es_a, ls_a, d_a = (np.asarray(x, dtype=np.int64) for x in (es, ls, d))
    tf_a = ls_a - es_a
    live = ~net._fixed  # finished work has no float and is never critical
    least = int(tf_a[live].min()) if live.any() else 0
    tf = tf_a.tolist()
    critical = ((tf_a == least) & live).tolist()

    slack = net.link_slacks(es, d)
    free_a = np.asarray(net.latest_finish(finish), dtype=np.int64) - es_a - d_a
    if len(slack):
        np.minimum.at(free_a, net._p, slack)
    free = free_a.tolist()
    # the driving links (no gap at the early dates), grouped by successor in link order
    tight = np.flatnonzero(slack == 0)
    by_succ = tight[np.argsort(net._s[tight], kind="stable")]
    tp, ts = net._p[by_succ], net._s[by_succ]
    drives = _driving_ids(net.ids, tp, ts)
    paths, truncated = _critical_paths(net, critical, tp, ts)
    longest = _longest_paths(net, tp, ts, es, d, finish) if net.several else ()
    states = net.progress.activities
    if not any(net.fixed) and list(net.shown_start).count(None) == n:
        # nothing started or finished: every row from the passes, made without a loop
        ids = net.ids
        rows = tuple(map(tuple.__new__, repeat(ActivityDates), zip(
            ids, d, es, map(add, es, d), ls, map(add, ls, d), tf, free, critical, drives,
            map(attrgetter("state"), states))))
        return Schedule(finish, rows, paths, deadline, truncated, longest, net.progress.warnings,
                        net.clock.start_date(0), net.finish_date(finish), states, deadline_date)
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
                                  free[i], critical[i], drives[i],
                                  states[i].state))
    return Schedule(finish, tuple(rows), paths, deadline, truncated, longest, net.progress.warnings,
                    net.clock.start_date(0), net.finish_date(finish), states, deadline_date)


def _driving_ids(ids: list[str], tp: np.ndarray, ts: np.ndarray) -> list[tuple[str, ...]]:
    """The ids of each activity's driving predecessors (a tuple, in link order), from the
    driving links ``tp -> ts`` sorted by successor: the tuples of the activities with
    ``c`` driving links made at once for each ``c``, then put in place by one look-up."""
    made: list[tuple[str, ...]] = [()]
    where = np.zeros(len(ids), dtype=np.int64)  # position in made of each activity's tuple
    if not len(ts):
        return made * len(ids)
    first = np.flatnonzero(np.r_[True, ts[1:] != ts[:-1]])
    counts = np.diff(np.r_[first, len(ts)])
    names = list(map(ids.__getitem__, tp.tolist()))
    for c in np.unique(counts).tolist():
        at = first[counts == c]
        where[ts[at]] = np.arange(len(made), len(made) + len(at))
        made += zip(*(map(names.__getitem__, (at + k).tolist()) for k in range(c)))
    return list(map(made.__getitem__, where.tolist()))


def _longest_paths(net: Network, tp: np.ndarray, ts: np.ndarray, es: list[int], d: list[int], finish: int):
    """Chains of driving links from a start to the work that ends at the project finish."""
    driving: list[list[int]] = [[] for _ in range(len(d))]
    for i, j in zip(tp.tolist(), ts.tolist()):
        driving[j].append(i)
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
    return _critical_paths(net, on, tp, ts)[0]


def _critical_paths(net: Network, critical: list[bool], tp: np.ndarray, ts: np.ndarray):
    """Chains of critical activities joined by driving links (``tp -> ts``, sorted by
    successor in link order), from a start to the finish."""
    nxt: dict[int, list[int]] = {}
    has_pred: set[int] = set()
    on = np.asarray(critical, dtype=bool)
    both = on[tp] & on[ts] if len(tp) else np.zeros(0, dtype=bool)
    for i, j in zip(tp[both].tolist(), ts[both].tolist()):
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
