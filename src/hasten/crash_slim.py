"""The slim form of the least-cost LP (one calendar, no discrete options, no milestone
deadlines), written by :class:`hasten.crash_model.CrashModel`: no end columns and no
duration rows, each end written out where a row uses it."""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from .solver_model import INF

if TYPE_CHECKING:
    from .crash_model import CrashModel
    from .network import Network

__all__ = ["slim_rows", "linear_on_one_calendar"]

_FS, _FF, _SF = 0, 2, 3  # (link kinds, as in crash_model)


def linear_on_one_calendar(network: Network) -> bool:
    """Linear costs only (no discrete options), one calendar, and no activity with a
    deadline of its own: the model is built slim, and plans may be solved on a part
    (:func:`hasten.partial.solvable_on_part`)."""
    return (not network.several and not any(network.options)
            and not any(a.deadline is not None for a in network.project.activities))


def slim_rows(model: CrashModel, net: Network) -> None:
    """The rows of :meth:`CrashModel._rows` with each end ``f_i`` replaced by ``s_i + D_i - sum_k
    y_ik`` (the duration row solved for it): no end columns and no duration rows, a
    third fewer of each, and each warm re-solve that much quicker. The substitution is
    an affine one-to-one map between the two feasible sets, so vertices stay whole-day
    and the least cost is the same. Links ``later - earlier >= lag``, ends ``f_i <= T``
    (unless implied by a successor, as there) and ``f_i >= `` its earliest
    finish where that can bind."""
    n, lm = len(net), model.lp
    D = np.asarray(net.durations, dtype=float)
    per = np.bincount(model.cut_owner, minlength=n)
    ptr = np.concatenate([[0], np.cumsum(per)])
    by_owner = model.cuts[np.argsort(model.cut_owner, kind="stable")]
    room = np.bincount(model.cut_owner, weights=np.asarray(lm.col_upper, dtype=float)[model.cuts], minlength=n)

    def cuts_of(acts: np.ndarray, rows: np.ndarray, sign: float):
        """(row, column, value) of every shortening column of ``acts``, one row each."""
        lengths = per[acts]
        total = int(lengths.sum())
        first = np.cumsum(lengths) - lengths
        pos = np.repeat(ptr[acts] - first, lengths) + np.arange(total)
        return np.repeat(rows, lengths), by_owner[pos], np.full(total, sign)

    def add(parts, count: int, lower, upper) -> None:
        row = np.concatenate([p[0] for p in parts])
        col = np.concatenate([p[1] for p in parts]).astype(np.int64)
        val = np.concatenate([p[2] for p in parts]).astype(float)
        order = np.argsort(row, kind="stable")
        counts = np.bincount(row, minlength=count)
        lm.add_rows(np.concatenate([[0], np.cumsum(counts)[:-1]]), col[order], val[order], lower, upper)

    pred = np.asarray(net.pred, dtype=np.int64)
    succ = np.asarray(net.succ, dtype=np.int64)
    kind = np.asarray(net.kind, dtype=np.int64)
    lag = np.asarray(net.lag, dtype=float)
    m = len(pred)
    if m:  # later - earlier >= lag, an end written as s + D - sum y
        rows = np.arange(m)
        later_end = (kind == _FF) | (kind == _SF)
        earlier_end = (kind == _FS) | (kind == _FF)
        le, ee = np.flatnonzero(later_end), np.flatnonzero(earlier_end)
        add([(rows, model.start[succ], np.ones(m)), (rows, model.start[pred], -np.ones(m)),
             cuts_of(succ[le], le, -1.0), cuts_of(pred[ee], ee, 1.0)], m,
            lag + np.where(earlier_end, D[pred], 0.0) - np.where(later_end, D[succ], 0.0), INF)
    implied = np.zeros(n, dtype=bool)
    if m:
        implied[pred[((kind == _FS) | (kind == _FF)) & (lag >= 0)]] = True
    free = np.flatnonzero(~implied)
    rows = np.arange(len(free))
    add([(rows, model.start[free], np.ones(len(free))), cuts_of(free, rows, -1.0),
         (rows, np.full(len(free), model.finish), -np.ones(len(free)))], len(free), -INF, -D[free])
    # an end's earliest finish (links to finished work), where start and shortening
    # bounds do not imply it
    floor = np.asarray(net.finish_release, dtype=float) - D
    bind = np.flatnonzero(floor > np.asarray(net.release, dtype=float) - room)
    if len(bind):
        rows = np.arange(len(bind))
        add([(rows, model.start[bind], np.ones(len(bind))), cuts_of(bind, rows, -1.0)], len(bind), floor[bind], INF)
