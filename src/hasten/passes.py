"""The forward and backward passes of the critical path method over a compiled network.

Precedence relationships in start-time form, with ``S`` start, ``d`` duration, ``l`` lag::

    FS  S_j >= S_i + d_i + l        SS  S_j >= S_i + l
    FF  S_j + d_j >= S_i + d_i + l  SF  S_j + d_j >= S_i + l

and every start at or after its release (day 0, the data date, a not-before date). Early
dates are the least solution of these difference constraints (the forward pass); late
dates the greatest solution that finishes every activity by the project finish or a
deadline (the backward pass). Networks with many activities per level are passed one
level at a time with numpy; long chains with plain loops.

:class:`CpmPasses` is the part of :class:`hasten.network.Network` that runs the passes; it
reads the arrays the network compiles (see there).
"""

from __future__ import annotations

from operator import add
from typing import Sequence

import numpy as np

__all__ = ["CpmPasses"]

_FS, _SS, _FF, _SF = 0, 1, 2, 3


class CpmPasses:
    """Forward and backward passes, mixed into :class:`hasten.network.Network`."""

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
            return max(map(add, es, d), default=0)
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
