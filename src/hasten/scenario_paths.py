"""The schedule of many scenarios at once, for the sample-average model
(:mod:`hasten.scenario_model`): bounds on every end over all plans, and early starts with
the path that sets each one.

The early start of an activity is the greatest of its release, its earliest finish less its
duration, and each link's bound (:mod:`hasten.passes`); the path behind an end follows the
bound that set each start back to a release. Its length is a sum of durations (plus for a
link from a finish and for the activity itself, minus for a link to a finish) and lags.
"""

from __future__ import annotations

import numpy as np

from .errors import SolverError
from .network import Network

__all__ = ["ScenarioPaths", "finish_bounds"]

_FS, _SS, _FF, _SF = 0, 1, 2, 3
_TOL = 1e-6


def finish_bounds(net: Network, low: np.ndarray, high: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Least and greatest end of every activity (activities x scenarios) over all durations
    between ``low`` and ``high``: each link term taken at its least (greatest) value, so
    the early schedule of any such durations lies between the two."""
    rel = np.asarray(net.release, dtype=np.int64)[:, None]
    frel = np.asarray(net.finish_release, dtype=np.int64)[:, None]
    lo_es = np.maximum(rel, frel - high).astype(np.int64)
    hi_es = np.maximum(rel, frel - low).astype(np.int64)
    fixed = np.asarray(net.fixed, dtype=bool)
    lo_es[fixed], hi_es[fixed] = np.broadcast_to(rel[fixed], lo_es[fixed].shape), \
        np.broadcast_to(rel[fixed], hi_es[fixed].shape)
    pred, kind, lag = net.pred, net.kind, net.lag
    for j in net.order:
        for e in net.in_links[j]:
            i, k = pred[e], kind[e]
            from_finish, to_finish = k in (_FS, _FF), k in (_FF, _SF)
            lo = lo_es[i] + (low[i] if from_finish else 0) + lag[e] - (high[j] if to_finish else 0)
            hi = hi_es[i] + (high[i] if from_finish else 0) + lag[e] - (low[j] if to_finish else 0)
            np.maximum(lo_es[j], lo, out=lo_es[j])
            np.maximum(hi_es[j], hi, out=hi_es[j])
    return lo_es + low, hi_es + high


class ScenarioPaths:
    """Early starts of every scenario (activities x scenarios) with the reason of each: -1 its
    release, -2 its earliest finish, or the link that drives it; and the path behind an end."""

    def __init__(self, net: Network):
        self.net = net
        self.release = np.asarray(net.release, dtype=float)
        self.finish_release = np.asarray(net.finish_release, dtype=float)
        self.fixed = np.asarray(net.fixed, dtype=bool)
        self.kind = np.asarray(net.kind, dtype=np.int64)
        self.from_finish = (self.kind == _FS) | (self.kind == _FF)
        self.to_finish = (self.kind == _FF) | (self.kind == _SF)

    def forward(self, d: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        net = self.net
        es = np.maximum(self.release[:, None], self.finish_release[:, None] - d)
        why = np.where(self.release[:, None] >= self.finish_release[:, None] - d, -1, -2)
        es[self.fixed], why[self.fixed] = self.release[self.fixed][:, None], -1
        pred, lag = net.pred, net.lag
        for j in net.order:
            for e in net.in_links[j]:
                i = pred[e]
                at = es[i] + (d[i] if self.from_finish[e] else 0.0) + lag[e] - (d[j] if self.to_finish[e] else 0.0)
                more = at > es[j] + _TOL
                if more.any():
                    es[j] = np.where(more, at, es[j])
                    why[j] = np.where(more, e, why[j])
        return es, why

    def path(self, why: np.ndarray, k: int, last: int) -> tuple[dict[int, int], float]:
        """The coefficients ``a_i`` of the durations and the constant (lags, releases) of the
        path that sets the end of ``last`` in scenario ``k``."""
        net = self.net
        a: dict[int, int] = {last: 1}
        const = 0.0
        cur = last
        for _ in range(len(net.ids) + 1):
            w = int(why[cur, k])
            if w == -1:
                return a, const + self.release[cur]
            if w == -2:
                a[cur] = a.get(cur, 0) - 1
                return a, const + self.finish_release[cur]
            i = net.pred[w]
            const += net.lag[w]
            if self.from_finish[w]:
                a[i] = a.get(i, 0) + 1
            if self.to_finish[w]:
                a[cur] = a.get(cur, 0) - 1
            cur = i
        raise SolverError("a path of the schedule does not end")  # pragma: no cover - the links are acyclic
