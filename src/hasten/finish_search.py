"""The least total cost of a finish, found without pricing every day (``best`` with linear
costs on one calendar): a branch and bound over whole-day finishes, used by
:meth:`hasten.planner.Planner.best_finish`."""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from .errors import InfeasibleTargetError
from .time_costs import net_time_costs

if TYPE_CHECKING:
    from .planner import Planner, Progress
    from .results import TotalCostPoint

__all__ = ["total_costs_by_bounds", "GROW"]

GROW = 3  # days priced at most this many times as deep as the deepest priced yet


def total_costs_by_bounds(planner: Planner, progress: Progress | None = None) -> tuple[TotalCostPoint, ...]:
    """Total cost points of the finishes that must be priced to know the least total:
    a branch and bound over whole-day finishes, exact for linear costs on one calendar.

    The least added cost ``D(t)`` is convex and never rises in ``t`` (a network LP with
    whole-day data, whose optimum at a whole-day target is a whole-day plan), so a line
    through two priced finishes ``a < b`` is a lower bound of ``D`` at every day outside
    ``(a, b)`` (at every day when ``b = a + 1``), and ``D(t) >= D(b)`` for ``t <= b``.
    The time costs (indirect, damages, bonus; not convex, calendar days per working day
    vary) are known at every day without a solve. A day is settled when its lower bound
    of total cost cannot beat the least found (ties go to the later finish); the open
    day with the least bound (plus, beyond the deepest pair of days priced, the last rise
    of a day's cost carried on: a guess that orders, never settles) is priced next with
    the day before it (two warm solves), never more than ``GROW`` times as far from the
    current finish as the deepest day priced (so that the part of the network solved
    grows in few steps). A day without a plan gives the shortest finish, and nothing
    before it is open.
    """
    n = planner.normal_finish
    direct = planner.normal_direct_cost
    time = net_time_costs(planner.project, planner.clock, n, floor=planner.network.finish_floor)
    days = np.arange(n + 1)
    rows: dict[int, TotalCostPoint] = {}
    lo = 0  # no plan finishes before this day

    def price(target: int) -> bool:
        nonlocal lo
        try:
            sol = planner._solve(target, tie_break=False)
        except InfeasibleTargetError as e:
            lo = max(lo, e.shortest)
            return False
        rows[target] = planner.total_cost_point(target, planner._checked(sol, target, finish=False).cost)
        return True

    price(n)  # the current finish: nothing added
    while True:
        known = sorted(rows)
        cost = np.array([rows[t].added_cost for t in known])
        bound = np.full(n + 1, -np.inf)
        nxt = np.searchsorted(known, days)  # the first priced day at or after each day
        bound[nxt < len(known)] = cost[nxt[nxt < len(known)]]  # never cheaper when tighter
        for (a, ca), (b, cb) in zip(zip(known, cost), zip(known[1:], cost[1:])):
            line = cb + (cb - ca) / (b - a) * (days - b)
            outside = (days <= a) | (days >= b)
            bound[outside] = np.maximum(bound[outside], line[outside])
        least = min(rows.values(), key=lambda r: (round(r.total_cost, 6), -r.finish))
        total, tol = least.total_cost, 1e-9 * max(1.0, abs(least.total_cost))
        lower = direct + bound + time
        settled = (lower > total + tol) | ((lower >= total - tol) & (days < least.finish))
        settled[:lo] = True
        settled[known] = True
        open_days = np.flatnonzero(~settled)
        if progress:
            progress(len(rows), len(rows) + len(open_days))
        if not len(open_days):
            break
        reach = max(GROW * (n - known[0]), 2)  # GROW times the deepest day priced
        near = open_days[open_days >= n - reach]
        if len(near):
            guess = lower + _deeper_guess(rows, days)
            target = int(near[np.lexsort((-near, guess[near]))[0]])  # least guess, later first
        else:
            target = int(open_days[-1])
        if target - 1 >= lo and target - 1 not in rows:  # the deeper day first: the part
            price(target - 1)  # of the network solved then holds both
        if target >= lo:
            price(target)
    return tuple(rows[t] for t in sorted(rows))

def _deeper_guess(rows: dict, days):
    """How much more than its lower bound the added cost of each day before the deepest
    priced pair of days may be: the last rise of the cost of a day, carried on (zero
    elsewhere). It only orders the days to price, never settles one."""
    pairs = sorted(t for t in rows if t + 1 in rows)  # (t, t + 1) both priced
    extra = np.zeros(len(days))
    if len(pairs) < 2:
        return extra
    k, j = pairs[0], pairs[1]
    mk = rows[k].added_cost - rows[k + 1].added_cost
    mj = rows[j].added_cost - rows[j + 1].added_cost
    rise = max((mk - mj) / (j - k), 0.0)  # per day, per day deeper
    deeper = np.maximum(k - days, 0)
    return 0.5 * rise * deeper * deeper
