"""Ties among least-cost plans: the one that changes the fewest activities, then the
fewest working days.

For the LP (:func:`fewest_crashed`), the least-cost plans form the optimal face: fix every
column with a non-zero reduced cost at its value and every row with a non-zero dual at its
bound (complementary slackness) and search the face with a small MILP. For a MILP
(discrete options, calendars of their own; :func:`fewest_changed_mip`) a second MILP holds
the cost at its least and counts the activities changed, within a node limit so that the
same input always gives the same plan. Before it runs, the options no plan of the least
cost can take or drop are fixed by reduced costs (:func:`fix_by_reduced_costs`), and a
row on its own score keeps only plans better than the least-cost plan found.
"""

from __future__ import annotations

from dataclasses import replace
from typing import TYPE_CHECKING

import numpy as np

from .crash_calendars import holds
from .solver_model import INF

if TYPE_CHECKING:
    from .crash_model import Solution

__all__ = ["fewest_crashed", "fewest_changed_mip", "fix_by_reduced_costs", "changes", "TIE_BREAK_NODES"]

#: Branch-and-bound nodes the tie-break of a MILP may search (see fewest_changed_mip).
TIE_BREAK_NODES = 2000


def changes(model, sol: Solution) -> tuple[int, int]:
    """(activities changed: shortened or by an option, working days taken off in all)."""
    normal = model.net.durations
    changed = sum(1 for k, (d, n) in enumerate(zip(sol.durations, normal))
                  if d != n or (sol.choices and sol.choices[k] >= 0))
    return changed, sum(n - d for d, n in zip(sol.durations, normal))


def fewest_changed_mip(model, best: Solution, target: int, strict: bool) -> Solution | None:
    """The tie-break of a MILP (discrete options, several calendars): among plans
    costing no more than ``best`` (acceleration and milestone damages), the one that
    changes the fewest activities (shortened, or performed by an option), then takes
    the fewest working days off. A second MILP on a copy, with the cost held by a row
    and 0/1 "changed" columns; ``None`` when it finds nothing better or its plan does
    not hold exactly (relations between calendars are relaxed in the copy).

    Not given the least-cost plan as a start: HiGHS 1.16, given it, called it optimal
    where a plan with fewer changes existed (tests/test_discrete.py,
    ``test_the_tie_break_is_not_fooled_by_a_start``). What speeds it up instead is exact
    by construction and goes through no special solver path: columns fixed by reduced
    costs, and an ordinary row that only a better plan can satisfy (when none exists the
    MILP is infeasible, which HiGHS proves at the root far sooner than it finds and
    proves an incumbent)."""
    before = changes(model, best)
    if not best.proven or before[0] == 0:
        return None
    n = len(model.net)
    lm = model.lp.copy()
    cols, coefs = model.lp.objectives["cost"]
    total = best.added_cost + best.milestone_damages
    cap = total + 1e-6 * max(1.0, abs(total))
    lm.add_row(cols, coefs, -INF, cap)
    # An activity changed by an option is counted by its option columns themselves (at
    # most one per activity); one 0/1 column per activity that can be shortened counts
    # shortening. The same count as one "changed" column per activity bounded by each of
    # its columns, with a tighter relaxation (three options at a third each count one
    # change, not a third).
    owners = np.unique(model.cut_owner)
    z = lm.add_columns(np.zeros(len(owners)), 1.0, integer=True)
    z_of = np.full(n, -1, dtype=np.int64)
    z_of[owners] = z
    days = np.asarray(lm.col_upper, dtype=float)[model.cuts]
    m = len(model.cuts)
    if m:  # a shortening day only if the activity counts as shortened
        index = np.empty(2 * m, dtype=np.int64)
        index[0::2], index[1::2] = model.cuts, z_of[model.cut_owner]
        value = np.empty(2 * m)
        value[0::2], value[1::2] = 1.0, -days
        lm.add_rows(np.arange(0, 2 * m, 2), index, value, -INF, 0.0)
    # days taken off (shortening, an option's change of duration, an option's own days)
    # and, weighing more than all of them, the activities changed
    weight = float(np.abs(days).sum() + np.abs(model.opt_delta).sum() + model.w_room.sum()) + 1.0
    tie_cols = np.concatenate([z, model.cuts, model.opt_x, model.opt_w])
    tie_coef = np.concatenate([np.full(len(z), weight), np.ones(m), weight + model.opt_delta,
                               np.ones(len(model.opt_w))])
    lm.define_objective("fewest_changed", tie_cols, tie_coef)
    # Only plans better than the least-cost plan found are of interest: a whole-day plan
    # with fewer changes, or as many and fewer days, scores at least one less. As a row
    # (not a start or a cutoff given to the solver), this bound lets HiGHS prune from the
    # root: 500 activities x 3 options, about a third of the time.
    lm.add_row(tie_cols, tie_coef, -INF, weight * before[0] + before[1] - 0.5)
    lm.use_objective("fewest_changed")
    if model.horizon_finish is not None:
        target = min(target, model.horizon_finish)
    lm.set_col_bounds(model.finish, 0.0, float(target))
    lm.set_row_bounds(model.cost_cap, -INF, INF)
    if len(model.late):
        lm.set_cols_bounds(model.late, 0.0, 0.0 if strict else 1.0)
    fix_by_reduced_costs(lm, cap)
    # Only a proven tie-break is used, so that the same input gives the same plan: the
    # search is bounded by a number of nodes (the same on every run), and by time only
    # as a last resort. Stopped early, the plan stays the least-cost one first found.
    lm.node_limit = TIE_BREAK_NODES
    if lm.time_limit is None:
        lm.time_limit = 30.0
    out = lm.solve()
    if out.values is None or out.status != "optimal":
        return None
    values = out.values[: model.lp.num_cols]
    sol = model.solution_of(values, out)
    if sol is None:
        # The cost row's tolerance lets continuous shortening trade a few hundred-thousandths
        # of a day between activities (1.000015 and 0.999985 days, hypothesis found it):
        # read as fractional, the better plan was lost. Solve again, on a fresh copy, with
        # whole shortening days (slower, so only when needed).
        spare = lm.copy()  # (a copy has no solver attached)
        spare.set_integer(np.concatenate([model.cuts, model.opt_w]), True)
        out = spare.solve()
        if out.values is None or out.status != "optimal":
            return None
        values = out.values[: model.lp.num_cols]
        sol = model.solution_of(values, out)
    if sol is None or changes(model, sol) >= before:
        return None
    if model.relations and not holds(model, out, "cost", target, strict)[0]:
        return None
    return replace(sol, objective=best.objective, proven=True, bound=None, gap=None)


def fix_by_reduced_costs(lm, cap: float) -> int:
    """Fix the 0/1 and integer columns of ``lm`` that no plan costing at most ``cap``
    can move from where the LP relaxation's least cost leaves them; returns how many.

    Reduced-cost fixing (e.g. Nemhauser & Wolsey, *Integer and Combinatorial
    Optimization*, 1988, section II.5.1; Wolsey, *Integer Programming*, 1998,
    section 7.4): with ``L`` the least cost of the relaxation and ``r`` the reduced
    costs of its optimum ``v``, every plan ``x`` of the relaxation costs at least
    ``L + sum(r * (x - v))``, each term at least zero. A column at its lower bound with
    ``r > cap - L`` cannot rise by a whole unit in any plan costing at most ``cap``
    (nor one at its upper bound with ``-r > cap - L`` fall), so it is fixed there.
    The tie-break searches only plans costing at most the least cost: most options
    are settled before its MILP starts (500 activities x 3 options: 845 of 1,016)."""
    relaxed = lm.copy()
    relaxed.col_integer = [False] * relaxed.num_cols
    relaxed.use_objective("cost")
    out = relaxed.solve(duals=True)
    if out.status != "optimal" or out.col_dual is None:
        return 0  # (CBC gives no reduced costs: nothing is fixed)
    # a margin well above the solver's tolerances on the bound and on the duals
    room = cap - out.objective + 1e-6 * max(1.0, abs(cap)) + 1e-6
    ints = np.flatnonzero(np.asarray(lm.col_integer))
    rc, at = out.col_dual[ints], out.values[ints]
    low, up = np.asarray(lm.col_lower)[ints], np.asarray(lm.col_upper)[ints]
    down = (rc > room) & (at <= low + 1e-7)
    high = (-rc > room) & (at >= up - 1e-7)
    if down.any():
        lm.set_cols_bounds(ints[down], low[down], low[down])
    if high.any():
        lm.set_cols_bounds(ints[high], up[high], up[high])
    return int(down.sum() + high.sum())


def fewest_crashed(model, result, target: int) -> Solution | None:
    """Among the least-cost plans, the one shortening the fewest activities, then
    the fewest days.

    The least-cost plans form the optimal face of the LP: fix every column with a
    non-zero reduced cost at its value and every row with a non-zero dual at its
    bound (complementary slackness), and any plan left costs the least. Over that
    face a small MILP counts shortened activities. Needs duals (HiGHS); returns
    ``None`` when there is no choice to make or the solver gives no duals.
    """
    if result is None or result.col_dual is None:
        return None
    tol = 1e-7
    free = np.abs(result.col_dual[model.cuts]) <= tol
    if not free.any() or not np.any(result.values[model.cuts[free]] > tol):
        # every shortening this plan uses is forced on all least-cost plans (fixed by
        # its reduced cost) and the others are unused: nothing to improve
        return None
    values = result.values
    cols = np.flatnonzero(np.abs(result.col_dual) > tol)
    rows = np.flatnonzero(np.abs(result.row_dual) > tol)
    full = model.lp.copy()  # leave the live model and its warm start alone
    rlow, rup = np.asarray(full.row_lower)[rows], np.asarray(full.row_upper)[rows]
    act = result.row_values[rows]
    at = np.where(np.abs(act - rlow) <= np.abs(act - rup), rlow, rup)
    full.set_rows_bounds(rows, at, at)
    # only the face is searched: fixed columns are taken out of a small model
    lm, keep = full.reduced(cols, values[cols])
    where = np.full(model.lp.num_cols, -1, dtype=np.int64)
    where[keep] = np.arange(len(keep))
    # one 0/1 column per activity free to change on the face: "it is shortened"
    owners = np.unique(model.cut_owner[free])
    room = np.bincount(model.cut_owner, weights=np.asarray(model.lp.col_upper)[model.cuts],
                       minlength=len(model.net))[owners]
    z = lm.add_columns(np.zeros(len(owners)), 1.0, integer=True)
    free_cuts = model.cuts[free]
    terms: dict[int, list[tuple[int, float]]] = {int(o): [(int(z[k]), -float(room[k]))]
                                                 for k, o in enumerate(owners)}
    for col, owner in zip(free_cuts.tolist(), model.cut_owner[free].tolist()):
        terms[owner].append((int(where[col]), 1.0))
    index = [c for o in owners.tolist() for c, _ in terms[o]]
    value = [v for o in owners.tolist() for _, v in terms[o]]
    starts = np.concatenate([[0], np.cumsum([len(terms[o]) for o in owners.tolist()])[:-1]])
    lm.add_rows(starts, index, value, -INF, 0.0)
    lm.set_integer(where[free_cuts], True)
    weight = float(room.sum()) + 1.0  # one activity more outweighs any number of days
    lm.define_objective("fewest_crashed", np.concatenate([z, where[free_cuts]]),
                        np.concatenate([np.full(len(z), weight), np.ones(len(free_cuts))]))
    lm.use_objective("fewest_crashed")
    if lm.time_limit is None:
        lm.time_limit = 10.0
    out = lm.solve()
    if out.values is None or out.status not in ("optimal", "stopped"):
        return None
    back = values.copy()
    back[keep] = out.values[: len(keep)]
    return model.solution_of(back, out)
