"""How sure is a finish date? Monte Carlo simulation of the schedule under duration ranges.

A least-cost plan shortens paths until several are critical at once; with uncertain
durations the finish is the latest of those paths, and the more paths end together the more
likely one of them runs late (the merge bias of PERT: MacCrimmon & Ryavec, "An analytical
study of the PERT assumptions", *Operations Research* 12(1), 1964). Each run draws every
uncertain duration (:mod:`hasten.uncertainty`) and schedules the project exactly as the CPM
engine does: the same link and lag semantics, each activity in its own calendar, links
between calendars converted by :class:`~hasten.calendar.Timeline`, finished work fixed,
started work resuming at the data date with its remaining duration uncertain.

The runs are arrays (activities x runs) and each pass goes one level of the network at a
time, every run at once. The criticality index of an activity is the share of runs in which
it has the least total float (zero without a deadline), as the CPM engine marks critical
work; the drivers of the finish's spread are ranked by Spearman's rank correlation of their
duration with the finish (Spearman, "The proof and measurement of association between two
things", *Am. J. Psychology* 15, 1904; ties take mid-ranks), computed exactly from whole-day
counts in a second, draws-only pass.

**A plan.** Given the working days a plan takes off each activity (``shortening``; an
option's change of duration counts the same way, and a slower option is a negative
shortening), each run takes those days off the duration it drew, never below one working
day (or the planned duration, where the plan itself leaves less than a day): the spread of
each activity stays what its range says, moved by the days the plan buys. The drivers are
still ranked by the durations drawn.

**Reproducible.** Runs are drawn in blocks of :data:`BLOCK`; block ``b`` has its own stream
``SeedSequence(seed).spawn(...)[b]`` (``spawn_key=(b,)``), so the figures depend only on
``seed`` and ``runs``, never on how the blocks are grouped into chunks or spread over
workers. Every merged figure is an integer count or sum, merged in block order.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from datetime import date
from typing import Callable, Iterator, Sequence

import numpy as np

from .calendar import Timeline
from .errors import HastenError, InputError
from .graph import levels as _levels
from .network import Network
from .progress import DONE, STARTED
from .project import Project
from .time_costs import time_costs
from .uncertainty import DurationSampler, Ranges

__all__ = [
    "BLOCK",
    "PERCENTILES",
    "MilestoneRisk",
    "Driver",
    "RiskResult",
    "RiskModel",
    "run_chunk",
    "rank_chunk",
    "in_process",
    "simulate",
]

#: Runs per random stream (the unit of reproducibility).
BLOCK = 100
#: Working days in the (activities x runs) arrays: 32 bits halve the memory traffic and
#: hold offsets of millions of years.
_DAYS = np.int32
#: Percentiles of the finish reported.
PERCENTILES = (10, 50, 80, 90)

Runner = Callable[[Callable, "RiskModel", list], Iterator[tuple[int, dict]]]


@dataclass(frozen=True)
class MilestoneRisk:
    """An activity with a deadline of its own: how often it meets it, and the damages."""

    id: str
    name: str
    deadline: date
    damages_per_day: float
    p_meet: float
    expected_damages: float


@dataclass(frozen=True)
class Driver:
    """An activity whose duration moves the finish: Spearman's rank correlation ``rho``."""

    id: str
    name: str
    rho: float
    criticality: float


@dataclass(frozen=True)
class RiskResult:
    """What the runs say about the finish (offsets in project-calendar working days)."""

    runs: int
    seed: int
    planned_finish: int  # the CPM finish with the most likely durations
    p_meet_planned: float  # share of runs finishing by it
    target: int | None
    p_meet_target: float | None
    contract_finish: date | None
    p_meet_contract: float | None
    mean_finish: float
    percentiles: dict[str, int]  # {"p10": offset, ...}: the least finish reached by that share
    percentile_dates: dict[str, date]
    criticality: dict[str, float]  # share of runs in which each activity is critical
    sensitivity: dict[str, float]  # Spearman rho of duration with finish, uncertain activities
    drivers: tuple[Driver, ...]  # the strongest positive rho first
    expected_damages: float  # contract damages, averaged over the runs
    milestones: tuple[MilestoneRisk, ...]
    finish_counts: tuple[tuple[int, int], ...]  # (finish, runs) in order of finish


class _Level:
    """The links of one level, sorted by the activity they bound, as index arrays."""

    def __init__(self, links: np.ndarray, key: np.ndarray, p, s, kind, lag, cal, several):
        links = links[np.argsort(key[links], kind="stable")]
        self.i, self.j, self.lag = p[links], s[links], lag[links][:, None].astype(_DAYS)
        k = kind[links]
        self.ff = np.flatnonzero((k == 0) | (k == 2))  # from the predecessor's finish
        self.tf = np.flatnonzero((k == 2) | (k == 3))  # to the successor's finish
        bound = key[links]
        self.starts = np.flatnonzero(np.r_[True, bound[1:] != bound[:-1]])
        self.at = bound[self.starts]  # the activity each segment bounds
        self.cross = []  # (positions, predecessor's calendar, successor's, kind)
        if several:
            a, b = cal[self.i], cal[self.j]
            for ca, cb, kk in sorted({(int(x), int(y), int(z)) for x, y, z in zip(a, b, k) if x != y}):
                self.cross.append((np.flatnonzero((a == ca) & (b == cb) & (k == kk)), ca, cb, kk))


class RiskModel:
    """A network and its ranges compiled for the simulation: plain arrays, picklable (it
    is shipped to the workers of a cluster), and the draws of any block of runs."""

    def __init__(self, network: Network, ranges: Ranges, seed: int, shortening: Sequence[int] | None = None):
        project = network.project
        n = len(network.ids)
        if len(ranges.likely) != n or list(ranges.likely) != [a.duration for a in project.activities]:
            raise HastenError("the duration ranges were made for another project; make them again "
                              "with hasten.uncertainty.duration_ranges(project)")
        self.seed = seed
        self.n = n
        self.base = np.asarray(network.durations, dtype=_DAYS)
        self.release = np.asarray(network.release, dtype=_DAYS)
        self.finish_release = np.asarray(network.finish_release, dtype=_DAYS)
        self.fixed = np.asarray(network.fixed, dtype=bool)
        self.cal = np.asarray(network.cal, dtype=np.int64)
        self.several = bool(network.several)
        self.calendars = np.unique(self.cal).tolist()
        self._shell = replace(project, activities=(), links=())  # for the Timeline on a worker
        self._timeline: Timeline | None = network.timeline
        # ranges of what is left: none for finished work, scaled for work in progress
        low, high = np.asarray(ranges.optimistic, float), np.asarray(ranges.pessimistic, float)
        mode = self.base.astype(float)
        for k, st in enumerate(network.progress.activities):
            if st.state == DONE:
                low[k] = high[k] = mode[k]
            elif st.state == STARTED:
                whole = project.activities[k].duration
                scale = st.duration / whole if whole else 0.0
                low[k], high[k] = round(low[k] * scale, 9), round(high[k] * scale, 9)
        self.sampler = DurationSampler(low, mode, high, ranges.distribution,
                                       ranges.group or None, ranges.weights)
        p, s = np.asarray(network.pred, dtype=np.int64), np.asarray(network.succ, dtype=np.int64)
        kind, lag = np.asarray(network.kind, dtype=np.int64), np.asarray(network.lag, dtype=np.int64)
        level = _levels(n, p, s) if n else np.zeros(0, dtype=np.int64)
        top = int(level.max()) + 1 if n else 0
        by_succ, by_pred = level[s], level[p]
        self.forward_levels = [_Level(np.flatnonzero(by_succ == v), s, p, s, kind, lag, self.cal, self.several)
                               for v in range(1, top) if np.any(by_succ == v)]
        self.backward_levels = [_Level(np.flatnonzero(by_pred == v), p, p, s, kind, lag, self.cal, self.several)
                                for v in reversed(range(top)) if np.any(by_pred == v)]
        self.watched = np.asarray([k for k, a in enumerate(project.activities) if a.deadline is not None],
                                  dtype=np.int64)
        self.cut = None  # working days a plan takes off each activity (see the module notes)
        if shortening is not None:
            cut = np.asarray(shortening, dtype=np.int64)
            if cut.shape != (n,) or np.any(cut[self.fixed] != 0) or np.any(cut > self.base):
                raise HastenError("a plan's shortening must give each activity's working days taken off: "
                                  "none for finished work, never more than the duration left")
            self.cut = cut.astype(_DAYS)
            self.least = np.minimum(1, self.base - self.cut).astype(_DAYS)

    def __getstate__(self):
        state = self.__dict__.copy()
        state["_timeline"] = None  # numpy's busday calendars do not pickle: built again on use
        return state

    @property
    def timeline(self) -> Timeline:
        if self._timeline is None:
            self._timeline = Timeline(self._shell)
        return self._timeline

    # -- draws ------------------------------------------------------------------------
    def block_runs(self, runs: int, block: int) -> int:
        return min(BLOCK, runs - block * BLOCK)

    def durations(self, runs: int, first: int, stop: int) -> np.ndarray:
        """Durations (activities x runs) of blocks ``first`` to ``stop - 1`` of ``runs``."""
        scores = []
        for b in range(first, stop):
            seq = np.random.SeedSequence(self.seed, spawn_key=(b,))
            scores.append(self.sampler.scores(np.random.Generator(np.random.PCG64(seq)), self.block_runs(runs, b)))
        count = sum(x.shape[1] for x in scores)
        d = np.repeat(self.base[:, None], count, axis=1)
        if len(self.sampler.uncertain):
            d[self.sampler.uncertain] = self.sampler.durations(np.concatenate(scores, axis=1))  # (to _DAYS)
        return d

    def planned(self, d: np.ndarray) -> np.ndarray:
        """The durations drawn ``d`` with the plan's days taken off (the drawn ones without a plan)."""
        if self.cut is None:
            return d
        return np.maximum(d - self.cut[:, None], self.least[:, None])

    # -- the passes ---------------------------------------------------------------------
    def forward(self, d: np.ndarray) -> np.ndarray:
        """Early starts (activities x runs)."""
        es = np.maximum(self.release[:, None], self.finish_release[:, None] - d)
        es[self.fixed] = self.release[self.fixed][:, None]
        for lv in self.forward_levels:
            at = es[lv.i]
            at[lv.ff] += d[lv.i[lv.ff]]
            for pos, a, b, k in lv.cross:
                at[pos] = self.timeline.convert(a, b, at[pos], k)
            at += lv.lag
            at[lv.tf] -= d[lv.j[lv.tf]]
            es[lv.at] = np.maximum(es[lv.at], np.maximum.reduceat(at, lv.starts, axis=0))
        return es

    def finish(self, ef: np.ndarray) -> np.ndarray:
        """Project finish of each run (project-calendar working days)."""
        if not self.several:
            return ef.max(axis=0, initial=0)
        out = np.zeros(ef.shape[1], dtype=_DAYS)
        for c in self.calendars:
            last = ef[self.cal == c].max(axis=0)
            out = np.maximum(out, self.timeline.to_project(c, last).astype(_DAYS))
        return out

    def backward(self, d: np.ndarray, finish: np.ndarray) -> np.ndarray:
        """Late starts (activities x runs) within each run's own finish."""
        if self.several:
            lf = np.empty_like(d)
            for c in self.calendars:
                lf[self.cal == c] = self.timeline.from_project(c, finish)
            ls = lf - d
        else:
            ls = finish[None, :] - d
        for lv in self.backward_levels:
            x = ls[lv.j]
            x[lv.tf] += d[lv.j[lv.tf]]
            x -= lv.lag
            for pos, a, b, k in lv.cross:
                x[pos] = self.timeline.latest(a, b, x[pos], k)
            x[lv.ff] -= d[lv.i[lv.ff]]
            ls[lv.at] = np.minimum(ls[lv.at], np.minimum.reduceat(x, lv.starts, axis=0))
        return ls


def run_chunk(model: RiskModel, runs: int, first: int, stop: int) -> dict:
    """Blocks ``first`` to ``stop - 1``: each run's finish, how often each activity is
    critical, the finishes of activities with deadlines, and counts of each drawn duration.
    The same function runs in-process and on a cluster's workers."""
    drawn = model.durations(runs, first, stop)
    d = model.planned(drawn)
    es = model.forward(d)
    ef = es + d
    finish = model.finish(ef)
    ls = model.backward(d, finish)
    tf = ls - es
    live = ~model.fixed
    critical = np.zeros(model.n, dtype=np.int64)
    if live.any():
        least = tf[live].min(axis=0)
        critical[live] = (tf[live] == least).sum(axis=1)
    s = model.sampler
    offs = drawn[s.uncertain] - s.first[:, None]
    rows = np.arange(len(s.uncertain))[:, None]
    counts = np.bincount((rows * s.width + offs).ravel(), minlength=len(s.uncertain) * s.width)
    return {"finish": finish, "critical": critical, "watched": ef[model.watched],
            "counts": counts.reshape(len(s.uncertain), s.width)}


def rank_chunk(model: RiskModel, runs: int, first: int, stop: int, finish: np.ndarray, finish_rank: np.ndarray,
               low: int, duration_rank: np.ndarray) -> np.ndarray:
    """Sum over the runs of these blocks of (2 x mid-rank of each uncertain duration) times
    (2 x mid-rank of the finish): whole numbers, so any grouping of blocks adds up the same."""
    s = model.sampler
    offs = model.durations(runs, first, stop)[s.uncertain] - s.first[:, None]
    rx = np.take_along_axis(duration_rank, offs, axis=1)
    return rx @ finish_rank[finish - low]


def in_process(fn: Callable, model: RiskModel, tasks: list) -> Iterator[tuple[int, dict]]:
    """Run the chunks one after another in this process."""
    for k, task in enumerate(tasks):
        yield k, fn(model, *task)


def _mid_ranks(counts: np.ndarray) -> np.ndarray:
    """Twice the mid-rank of each value given its counts (last axis): whole numbers."""
    before = np.cumsum(counts, axis=-1) - counts
    return 2 * before + counts + 1


def simulate(network: Network | Project, ranges: Ranges, runs: int, seed: int | None = None, *,
             target: int | date | None = None, chunk: int = 500,
             progress: Callable[[int, int], None] | None = None, runner: Runner | None = None,
             drivers: int = 10, shortening: Sequence[int] | None = None) -> RiskResult:
    """Simulate ``runs`` schedules with durations drawn from ``ranges``.

    Parameters
    ----------
    network : the project, or its :class:`~hasten.network.Network`.
    ranges : from :func:`hasten.uncertainty.duration_ranges` for the same project.
    runs : number of runs (at least 1).
    seed : the same seed gives the same figures; ``None`` picks one (reported back).
    target : a finish to test, in working days or as the date of the last day worked.
    chunk : runs per chunk of work (rounded up to whole blocks of :data:`BLOCK`); it sets
        memory and how work is spread, never the figures.
    progress : called ``(runs done, runs)`` after each chunk.
    runner : runs the chunks (:func:`in_process` by default; a cluster's, see
        :mod:`hasten.cluster`).
    drivers : how many of the strongest drivers of the finish to list.
    shortening : working days a plan takes off each activity (network order, see the module
        notes); ``None`` simulates the durations as they are.
    """
    net = network if isinstance(network, Network) else Network(network)
    if isinstance(runs, bool) or not isinstance(runs, int) or runs < 1:
        raise InputError("the number of runs must be a whole number, 1 or more", column="runs", value=runs,
                         fix="ask for e.g. 10000 runs")
    if seed is None:
        seed = int(np.random.SeedSequence().entropy % (2 ** 63))
    if isinstance(seed, bool) or not isinstance(seed, int) or seed < 0:
        raise InputError("the seed must be a whole number, 0 or more", column="seed", value=seed,
                         fix="give any whole number, e.g. 1")
    model = RiskModel(net, ranges, seed, shortening)
    blocks = math.ceil(runs / BLOCK)
    step = max(1, math.ceil(chunk / BLOCK))
    tasks = [(runs, b, min(b + step, blocks)) for b in range(0, blocks, step)]
    run = runner or in_process
    parts: dict[int, dict] = {}
    done = 0
    for k, part in run(run_chunk, model, tasks):
        parts[k] = part
        done += len(part["finish"])
        if progress is not None:
            progress(done, runs)
    ordered = [parts[k] for k in range(len(tasks))]
    finish = np.concatenate([p["finish"] for p in ordered])
    critical = sum(p["critical"] for p in ordered)
    watched = np.concatenate([p["watched"] for p in ordered], axis=1)
    counts = sum(p["counts"] for p in ordered)
    sensitivity = _sensitivity(model, run, tasks, finish, counts, runs)
    return _result(net, model, runs, seed, target, finish, critical, watched, sensitivity, drivers)


def _sensitivity(model: RiskModel, run: Runner, tasks: list, finish: np.ndarray, counts: np.ndarray,
                 runs: int) -> np.ndarray:
    """Spearman's rho of each uncertain duration with the finish, from mid-ranks."""
    if not len(model.sampler.uncertain):
        return np.zeros(0)
    low = int(finish.min())
    finish_counts = np.bincount(finish - low)
    finish_rank = _mid_ranks(finish_counts)
    duration_rank = _mid_ranks(counts)
    starts = np.cumsum([0] + [min(t[2] * BLOCK, runs) - t[1] * BLOCK for t in tasks])
    rank_tasks = [t + (finish[starts[k]:starts[k + 1]], finish_rank, low, duration_rank)
                  for k, t in enumerate(tasks)]
    parts = [part.tolist() for _, part in sorted(run(rank_chunk, model, rank_tasks), key=lambda kv: kv[0])]
    # Pearson's r of the mid-ranks, in whole numbers (Python's: no overflow) until the last
    # division: with R = 2 x rank, N cov = sum Rx Rf - N (N + 1)^2, N var = sum R^2 - N (N + 1)^2
    centre = runs * (runs + 1) ** 2
    cov = np.array([sum(col) - centre for col in zip(*parts)], dtype=float)
    var_x = np.array([sum(c * r * r for c, r in zip(cs, rs)) - centre
                      for cs, rs in zip(counts.tolist(), duration_rank.tolist())], dtype=float)
    var_f = float(sum(c * r * r for c, r in zip(finish_counts.tolist(), finish_rank.tolist())) - centre)
    with np.errstate(divide="ignore", invalid="ignore"):
        rho = cov / np.sqrt(var_x * var_f)
    return np.where((var_x > 0) & (var_f > 0), rho, 0.0)


def _share(hits: int, runs: int) -> float:
    return hits / runs


def _result(net: Network, model: RiskModel, runs: int, seed: int, target, finish: np.ndarray,
            critical: np.ndarray, watched: np.ndarray, rho: np.ndarray, drivers: int) -> RiskResult:
    project, clock = net.project, net.clock
    values, counts = np.unique(finish, return_counts=True)
    values, counts = values.tolist(), counts.tolist()
    cum = np.cumsum(counts).tolist()
    percentiles = {}
    for p in PERCENTILES:
        percentiles[f"p{p}"] = next(v for v, c in zip(values, cum) if c * 100 >= p * runs)
    dates = {k: clock.project_finish_date(v) for k, v in percentiles.items()}
    planned = net.forward_finish(None if model.cut is None else (model.base - model.cut).tolist())
    if isinstance(target, date):
        target = clock.offset_of(target, finish=True)
    p_target = None if target is None else _share(sum(c for v, c in zip(values, counts) if v <= target), runs)
    contract = project.contract.finish
    p_contract = None
    damages = 0.0
    if contract is not None:
        p_contract = _share(sum(c for v, c in zip(values, counts) if clock.project_finish_date(v) <= contract),
                            runs)
        damages = sum(c * time_costs(project, clock, v).damages for v, c in zip(values, counts)) / runs
    milestones = []
    for row, k in enumerate(model.watched.tolist()):
        act = project.activities[k]
        own = net.timeline.clock_of(k)
        meet, cost = 0, 0.0
        for v, c in zip(*(x.tolist() for x in np.unique(watched[row], return_counts=True))):
            late = (own.project_finish_date(v) - act.deadline).days
            meet += c if late <= 0 else 0
            cost += c * act.damages_per_day * max(0, late)
        milestones.append(MilestoneRisk(act.id, act.name, act.deadline, act.damages_per_day,
                                        _share(meet, runs), cost / runs))
    crit = {i: _share(int(c), runs) for i, c in zip(net.ids, critical.tolist())}
    ids = [net.ids[k] for k in model.sampler.uncertain.tolist()]
    sens = {i: float(r) for i, r in zip(ids, rho.tolist())}
    ranked = sorted((k for k in range(len(ids)) if rho[k] > 0), key=lambda k: (-rho[k], k))[:drivers]
    names = {a.id: a.name for a in project.activities}
    top = tuple(Driver(ids[k], names[ids[k]], float(rho[k]), crit[ids[k]]) for k in ranked)
    return RiskResult(runs, seed, planned, _share(sum(c for v, c in zip(values, counts) if v <= planned), runs),
                      target, p_target, contract, p_contract, float(np.mean(finish)), percentiles, dates, crit,
                      sens, top, damages, tuple(milestones), tuple(zip(values, counts)))
