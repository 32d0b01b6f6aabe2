"""Links between two calendars in the crash model: step functions made exact where a
solve needs them.

An activity on a calendar of its own counts its events in its own working days. A link
between two calendars (and the project finish of work on another calendar) is then a step
function ``y >= g(x) + lag`` of the predecessor's event ``x`` (a Friday finish and a
Saturday finish both reach a weekday crew on Monday), which an LP cannot express exactly.

Each relation starts as its convex minorant over the values ``x`` can take (a few rows
``y >= a x + b`` under the steps, :func:`_minorant`): a relaxation. After a solve, the
plan's durations are scheduled exactly (:func:`holds`); if that schedule keeps every
promise of the solve, the plan is optimal. Otherwise the relations the solve broke are
made exact on a window of days around the solve's value (:class:`Relation`: 0/1 columns
taken in order inside the window, valid linear bounds outside it) and the model is solved
again (:func:`refine`); a window grows when a later solve leaves it.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

import numpy as np

from .progress import end_day
from .solver_model import INF, LinearModel

if TYPE_CHECKING:
    from .network import Network

__all__ = ["Relation", "calendar_rows", "refine", "holds", "event_bounds", "INT_TOL"]

_FS, _SS, _FF, _SF = 0, 1, 2, 3
INT_TOL = 1e-5  # whole-day test of solver values (HiGHS's MIP tolerances are 1e-6)


def _minorant(x: np.ndarray, y: np.ndarray) -> list[tuple[int, int, int]]:
    """The lower convex hull of the points ``(x, y)`` (``x`` increasing, whole numbers) as
    rows ``a * Y - b * X >= c`` with whole ``a > 0``, ``b``, ``c``: every point has
    ``Y = y`` on or above each row, and no convex function under the points is higher."""
    hull: list[tuple[int, int]] = []
    for p in zip(x.tolist(), y.tolist()):
        while len(hull) >= 2:
            (x1, y1), (x2, y2) = hull[-2], hull[-1]
            if (x2 - x1) * (p[1] - y1) - (y2 - y1) * (p[0] - x1) <= 0:  # hull[-1] not below the chord
                hull.pop()
            else:
                break
        hull.append(p)
    if len(hull) == 1:
        return [(1, 0, hull[0][1])]
    rows = []
    for (x1, y1), (x2, y2) in zip(hull, hull[1:]):
        a, b = x2 - x1, y2 - y1  # (Y - y1) / (X - x1) >= b / a on this piece
        rows.append((a, b, a * y1 - b * x1))
    return rows


class Relation:
    """``y >= g(x) + lag`` for a step function ``g`` given by its ``values`` at
    ``x = lo .. hi`` (whole days, nondecreasing), written exactly on a window ``wl .. wh``
    and by valid linear bounds outside it:

    - ``x = lo + d0 + sum_m z_m + dE``, with ``d0`` in ``[0, wl - lo]``, 0/1 columns
      ``z_m`` (``x >= wl + m``) taken in order after ``d0`` is full, and ``dE`` in
      ``[0, hi - wh]`` only when every ``z`` is 1;
    - ``y >= g(wl) - s0 (wl - lo) + s0 d0 + sum_m (g(wl + m) - g(wl + m - 1)) z_m + sE dE + lag``
      with ``s0`` the steepest slope from a point before the window to ``g(wl)`` and ``sE``
      the flattest slope from ``g(wh)`` to a point after it, so the bound is ``g`` on the
      window and below ``g`` elsewhere: a relaxation that is exact wherever ``x`` falls
      in the window. A window that a solve leaves is replaced by a wider one.
    """

    MARGIN = 7  # days each side of the solve's value when a window is made or widened

    def __init__(self, x: int, y: int, lo: int, values, lag: int, who: tuple[int, ...]):
        self.x, self.y, self.lo, self.lag, self.who = x, y, lo, lag, who
        self.values = np.asarray(values, dtype=np.int64)
        self.hi = lo + len(self.values) - 1
        self.window: tuple[int, int] | None = None
        self.rows: list[int] = []

    def g(self, x: int) -> int:
        return int(self.values[x - self.lo])

    def holds(self, values: np.ndarray) -> bool:
        x = int(np.clip(np.rint(values[self.x]), self.lo, self.hi))
        return values[self.y] + INT_TOL >= self.g(x) + self.lag

    def widen(self, lm: LinearModel, at: int) -> None:
        wl, wh = max(self.lo, at - self.MARGIN), min(self.hi, at + self.MARGIN)
        if self.window is not None:
            wl, wh = min(wl, self.window[0]), max(wh, self.window[1])
        if wh == wl and wh < self.hi:
            wh += 1
        elif wh == wl and wl > self.lo:
            wl -= 1
        for row in self.rows:  # the old window's rows no longer bind
            lm.set_row_bounds(row, -INF, INF)
        self.window, self.rows = (wl, wh), []
        lo, hi = self.lo, self.hi
        g = self.values - self.values[wl - lo]  # g relative to g(wl)
        if lo == hi:
            self.rows.append(lm.add_row([self.y], [1.0], float(self.values[0] + self.lag), INF))
            return
        rel = np.arange(lo, hi + 1)
        s0 = float(np.max(-g[: wl - lo] / (wl - rel[: wl - lo]))) if wl > lo else 0.0
        sE = float(np.min((g[wh - lo + 1:] - g[wh - lo]) / (rel[wh - lo + 1:] - wh))) if wh < hi else 0.0
        d0 = lm.add_columns([0.0], float(wl - lo))[0]
        z = lm.add_columns(np.zeros(wh - wl), 1.0, integer=True)
        dE = lm.add_columns([0.0], float(hi - wh))[0]
        rise = np.diff(g[wl - lo: wh - lo + 1]).astype(float)
        cols = np.concatenate([[self.x, d0], z, [dE]])
        self.rows.append(lm.add_row(cols, np.concatenate([[1.0, -1.0], -np.ones(len(z)), [-1.0]]),
                                    float(lo), float(lo)))
        base = float(self.values[wl - lo]) - s0 * (wl - lo) + self.lag
        cols = np.concatenate([[self.y, d0], z, [dE]])
        self.rows.append(lm.add_row(cols, np.concatenate([[1.0, -s0], -rise, [-sE]]), base, INF))
        if len(z):
            self.rows.append(lm.add_row([d0, z[0]], [1.0, -float(wl - lo)], 0.0, INF))  # d0 full first
            self.rows.append(lm.add_row([dE, z[-1]], [1.0, -float(hi - wh)], -INF, 0.0))  # dE after all z
            if len(z) > 1:
                m = len(z) - 1
                index = np.empty(2 * m, dtype=np.int64)
                index[0::2], index[1::2] = z[1:], z[:-1]
                first = lm.add_rows(np.arange(0, 2 * m, 2), index, np.tile([1.0, -1.0], m), -INF, 0.0)
                self.rows.extend(np.asarray(first).tolist())



def calendar_rows(model, net: Network, cross: np.ndarray, later: np.ndarray, earlier: np.ndarray,
                   implied: np.ndarray) -> None:
    """Links between two calendars, and the project finish of work on a calendar of
    its own: ``y >= g(x) + lag`` where ``g`` converts a position of one calendar to the
    next position of another (:class:`hasten.calendar.Timeline`), a step function.

    Each starts as its convex minorant over the values ``x`` can take (a few rows
    ``y >= a x + b`` under the steps, :func:`_minorant`): a relaxation. After a solve,
    the durations are scheduled exactly (:meth:`_holds`); if that schedule meets
    everything the solve promised, the plan is optimal. Otherwise the relations the
    solve broke are made exact on a window of days around the solve's value
    (:class:`Relation`) and the model is solved again; a window grows when a later
    solve leaves it. The event and shortening columns are integer (whole days).
    """
    lm, timeline = model.lp, net.timeline
    lm.set_integer(np.concatenate([model.start, model.end, model.cuts]), True)
    lo_s, lo_f, hi_s, hi_f = event_bounds(model, net)
    pred, succ, kind, lag = net.pred, net.succ, net.kind, net.lag
    rel = []
    for e in cross.tolist():
        i, j, k = pred[e], succ[e], kind[e]
        lo, hi = (lo_f[i], hi_f[i]) if k in (_FS, _FF) else (lo_s[i], hi_s[i])
        values = timeline.convert(net.cal[i], net.cal[j], np.arange(lo, max(hi, lo) + 1), k)
        rel.append(Relation(int(earlier[e]), int(later[e]), int(lo), values, lag[e], (i, j)))
    for i in np.flatnonzero(~implied & (np.asarray(net.cal) != 0)).tolist():
        values = timeline.to_project(net.cal[i], np.arange(lo_f[i], max(hi_f[i], lo_f[i]) + 1))
        rel.append(Relation(int(model.end[i]), model.finish, int(lo_f[i]), values, 0, (i,)))
    for r in rel:
        lm.set_col_bounds(r.x, float(r.lo), float(r.hi))
        for a, b, c in _minorant(np.arange(r.lo, r.hi + 1), r.values):
            lm.add_row([r.y, r.x], [float(a), float(-b)], float(c + a * r.lag), INF)  # a y - b x >= c + a lag
    model.relations = rel


def refine(model, values: np.ndarray, late: np.ndarray | None) -> int:
    """Make exact around the solve's values the relations that ``values`` break, first
    those among the activities ``late`` marks (negative float when the plan's durations
    are scheduled exactly against the promised finish); returns how many."""
    broken = [r for r in model.relations if not r.holds(values)]
    if late is not None:
        broken = [r for r in broken if all(late[k] for k in r.who)] or broken
    for r in broken:
        r.widen(model.lp, int(np.clip(np.rint(values[r.x]), r.lo, r.hi)))
    return len(broken)


def holds(model, result, objective: str, target: int | None, strict: bool):
    """Whether the durations of ``result``, scheduled exactly at their early dates,
    finish as early and cost as little in milestone damages as the solve promised;
    and, when they finish later, which activities have negative float in that
    schedule against the promised finish (else ``None``)."""
    sol = model.solution_of(result.values, result)
    if sol is None:
        return False, None
    d = list(sol.durations)
    es = model.net.forward(d)
    finish = model.net.finish_of(es, d)
    promised = math.ceil(result.values[model.finish] - INT_TOL)
    if objective == "cost" and target is not None:
        promised = min(target, model.horizon_finish) if model.horizon_finish is not None else target
    if finish > promised:
        late = np.asarray(model.net.backward(d, promised)) < np.asarray(es)
        return False, late
    damages = 0.0
    for i, clock, act, limit in model._deadlines:
        f = es[i] + d[i]
        if strict and f > limit:
            return False, None
        day = end_day(model.net.progress.activities[i], f)
        damages += act.damages_per_day * max(0, (clock.date_of(day) - act.deadline).days)
    return damages <= sol.milestone_damages + 1e-6 * max(1.0, abs(damages)), None


def event_bounds(model, net: Network):
    """Least and greatest start and finish of each activity over every plan that
    finishes by the horizon (durations anywhere between shortest and longest)."""
    n = len(net)
    dmin = np.asarray(net.shortest, dtype=np.int64)
    dmax = np.asarray([max([d] + [o.duration for o in opts]) for d, opts in zip(net.durations, net.options)],
                      dtype=np.int64)
    lo_s = np.asarray(net.release, dtype=np.int64).copy()
    lo_f = np.asarray(net.finish_release, dtype=np.int64).copy()
    for j in net.order:
        if net.fixed[j]:
            lo_s[j], lo_f[j] = net.release[j], net.release[j] + net.durations[j]
            continue
        for e in net.in_links[j]:
            i, k = net.pred[e], net.kind[e]
            at = lo_f[i] if k in (_FS, _FF) else lo_s[i]
            bound = net._convert(i, j, int(at), k) + net.lag[e]
            if k in (_FS, _SS):
                lo_s[j] = max(lo_s[j], bound)
            else:
                lo_f[j] = max(lo_f[j], bound)
        lo_f[j] = max(lo_f[j], lo_s[j] + dmin[j])
        lo_s[j] = max(lo_s[j], lo_f[j] - dmax[j])
    model.horizon_finish = horizon = max(net.forward_finish(), net.forward_finish(dmax.tolist()),
                                        net.finish_of(lo_s.tolist(), [0] * n), net.finish_of(lo_f.tolist(), [0] * n))
    hi_f = np.asarray(net.latest_finish(horizon), dtype=np.int64)
    hi_s = hi_f - dmin
    for i in reversed(net.order):
        if net.fixed[i]:
            hi_s[i], hi_f[i] = net.release[i], net.release[i] + net.durations[i]
            continue
        for e in net.out_links[i]:
            j, k = net.succ[e], net.kind[e]
            x = (hi_s[j] if k in (_FS, _SS) else hi_f[j]) - net.lag[e]
            bound = net._latest(i, j, int(x), k)
            if k in (_FS, _FF):
                hi_f[i] = min(hi_f[i], bound)
            else:
                hi_s[i] = min(hi_s[i], bound)
        hi_s[i] = min(hi_s[i], hi_f[i] - dmin[i])
        hi_f[i] = min(hi_f[i], hi_s[i] + dmax[i])
    return lo_s, lo_f, np.maximum(hi_s, lo_s), np.maximum(hi_f, lo_f)
