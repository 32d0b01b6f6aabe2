"""A project compiled for scheduling: integer-indexed arrays in topological order.

:class:`Network` is built once per project and shared by the CPM passes
(:mod:`hasten.passes`, mixed in), the schedule (:mod:`hasten.cpm`) and the optimiser. It
applies progress at the data date (:mod:`hasten.progress`): what is left to schedule of
each activity, its release (earliest start), and the links still in force; a link whose
predecessor event is already fixed by progress becomes a release of its successor.
Loops in the links are refused (:mod:`hasten.graph`).
"""

from __future__ import annotations

from operator import attrgetter

import numpy as np

from .calendar import Timeline
from .errors import CycleError, InputError
from .graph import find_cycle, levels
from .passes import CpmPasses
from .progress import DONE, STARTED, WAITING, apply_progress
from .project import Activity, LinkType, Option, Project

__all__ = ["Network"]

_FS, _SS, _FF, _SF = 0, 1, 2, 3
_KIND = {LinkType.FS: _FS, LinkType.SS: _SS, LinkType.FF: _FF, LinkType.SF: _SF}


def _floored(activity: Activity) -> tuple[Option, ...]:
    """The options of ``activity``, their own shortening stopped at its physical minimum;
    an option shorter than the minimum is refused (the formats refuse it when reading)."""
    floor, out = activity.min_duration, []
    for option in activity.options:
        if option.duration < floor:
            raise InputError(f"activity '{activity.id}': the option '{option.name}' takes "
                             f"{option.duration} working days, below the physical minimum of "
                             f"{floor}", column="duration", value=option.duration,
                             fix=f"give the option at least {floor} days, or lower min_duration")
        if option.shortest < floor:
            option = Option(option.name, option.duration, option.added_cost, option.note,
                            floor, option.cost_per_day)
        out.append(option)
    return tuple(out)


class Network(CpmPasses):
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
        self.options = [(_floored(a) if a.min_duration else a.options) if s.state == WAITING else ()
                        for a, s in zip(acts, states)]
        self._steps: list | None = None
        self._shortest: list[int] | None = None
        self.release: list[int] = [s.release for s in states]  # earliest start
        self.fixed: list[bool] = [s.state == DONE for s in states]  # start fixed at release
        self.finish_release: list[int] = [0] * n  # earliest finish, from links to fixed events
        self.shown_start: list[int | None] = [s.start for s in states]  # actual start, if any
        links = project.links
        every_pred = np.array(list(map(idx.__getitem__, map(attrgetter("pred"), links))),
                              dtype=np.int64).reshape(len(links))
        every_succ = np.array(list(map(idx.__getitem__, map(attrgetter("succ"), links))),
                              dtype=np.int64).reshape(len(links))
        levels = self._cycle_check(every_pred, every_succ)
        if self.progress.progressed:
            kept = [e for e, k in enumerate(links) if e not in self.progress.dropped
                    and self._compile_link(k, idx[k.pred], idx[k.succ], states)]
            every_pred, every_succ = every_pred[kept], every_succ[kept]
            levels = None  # fewer links: the levels are counted again
        else:  # without progress every link joins two events still to schedule
            kept = range(len(links))
        self.pred: list[int] = every_pred.tolist()
        self.succ: list[int] = every_succ.tolist()
        self.link_index: list[int] = list(kept)  # position of each link in project.links
        kept_links = links if len(kept) == len(links) else [links[e] for e in kept]
        self.kind: list[int] = list(map(_KIND.__getitem__, map(attrgetter("type"), kept_links)))
        self.lag: list[int] = list(map(attrgetter("lag"), kept_links))
        self._arrays(levels, every_pred, every_succ)
        self._in_links: list[list[int]] | None = None
        self._out_links: list[list[int]] | None = None
        # the project finish is dated no earlier than a milestone's first day (hasten.progress;
        # day 0 of another calendar may come after the project's day 0)
        self.finish_floor = 0
        for k, (a, st) in enumerate(zip(acts, states)):
            if a.duration:
                continue
            c = self.timeline.clock_of(k)
            day = st.floor if c is self.clock else self.clock.offset_of(c.date_of(st.floor), finish=False)
            self.finish_floor = max(self.finish_floor, day)

    def finish_date(self, finish: int):
        """The date of a project finish of ``finish`` working days: its last working day,
        or the day of a milestone that cannot happen before it (see hasten.progress)."""
        return self.clock.date_of(max(finish - 1, self.finish_floor, 0))

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

    def _arrays(self, level: np.ndarray | None, pred: np.ndarray, succ: np.ndarray) -> None:
        """Links as numpy arrays grouped by level, for the vectorised passes (``pred`` and
        ``succ``: the arrays of :attr:`pred` and :attr:`succ`)."""
        n = len(self.ids)
        self._p, self._s = pred, succ
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

    def _convert(self, i: int, j: int, at: int, kind: int) -> int:
        """Position in ``j``'s calendar that a link of ``kind`` from ``i``'s event at ``at``
        allows (before the lag); ``at`` itself when both share a calendar."""
        a, b = self.cal[i], self.cal[j]
        return at if a == b else int(self.timeline.convert(a, b, at, kind))

    def _latest(self, i: int, j: int, x: int, kind: int) -> int:
        """Latest event of ``i`` whose link of ``kind`` allows ``j``'s event at ``x``."""
        a, b = self.cal[i], self.cal[j]
        return x if a == b else int(self.timeline.latest(a, b, x, kind))
