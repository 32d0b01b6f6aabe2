"""A linear / mixed-integer model kept as arrays, and the solvers that run it.

This is the only module that imports PuLP or highspy. :class:`LinearModel` is the one
model builder the optimiser uses: columns with bounds and integrality, rows with
bounds, named objectives. It is solved with HiGHS (the model is passed to highspy in
bulk and kept alive, so a change of a bound, a row or the objective is re-solved warm
from the previous basis) or, where highspy is missing, with CBC through PuLP (the same
arrays become a PuLP problem).

Why arrays and not PuLP expressions for the main path: on a 10,000-activity network,
building the PuLP objects alone took longer than HiGHS needs to solve the whole LP
(see DEVELOPERS.md, "Benchmarks"); the arrays cost a few hundredths of a second.
The PuLP path stays, tested against HiGHS on the same models.
"""

from __future__ import annotations

import contextlib
import os
import sys
import warnings
from dataclasses import dataclass
from typing import Sequence

import numpy as np
import pulp

from .errors import SolverError

__all__ = ["LinearModel", "Result", "available_solver", "INF"]

try:
    import highspy

    _HAVE_HIGHS = True
except ImportError:  # pragma: no cover - depends on the machine
    highspy = None
    _HAVE_HIGHS = False

INF = float("inf")


@dataclass(frozen=True)
class Result:
    """A solve's outcome.

    ``status`` is ``"optimal"``, ``"infeasible"`` or ``"stopped"`` (a time limit ended a
    MILP before optimality was proven: ``values`` is the best plan found, if any,
    ``bound`` the proven lower bound and ``gap`` the relative gap).
    """

    status: str
    values: np.ndarray | None = None
    objective: float | None = None
    bound: float | None = None
    gap: float | None = None
    col_dual: np.ndarray | None = None  # reduced costs (LP optimum with HiGHS only)
    row_dual: np.ndarray | None = None
    row_values: np.ndarray | None = None


def _cbc(time_limit: float | None = None):
    """A CBC solver through PuLP: an installed CBC (COIN_CMD) or the one bundled with PuLP
    3.x (PULP_CBC_CMD, deprecated there for PuLP 4, still the only one on many machines)."""
    coin = pulp.COIN_CMD(msg=False, timeLimit=time_limit)
    if coin.available():
        return coin
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DeprecationWarning)
        return pulp.PULP_CBC_CMD(msg=False, timeLimit=time_limit)


def available_solver(prefer: str | None = None) -> str:
    """``"highs"`` when highspy imports, else ``"cbc"`` when PuLP's CBC runs, else an error."""
    if prefer not in (None, "highs", "cbc"):
        raise SolverError(f"unknown solver {prefer!r}; use highs or cbc")
    if prefer != "cbc" and _HAVE_HIGHS:
        return "highs"
    if _cbc().available():
        return "cbc"
    raise SolverError("no solver can run here: install highspy (pip install highspy), "
                      "or make PuLP's bundled CBC runnable")


@contextlib.contextmanager
def _quiet_stdout():
    """Silence file descriptor 1 briefly: HiGHS prints a banner when a model is made."""
    sys.stdout.flush()
    try:
        saved = os.dup(1)
    except OSError:  # pragma: no cover - no descriptor 1 at all
        yield
        return
    try:
        with open(os.devnull, "wb") as null:
            os.dup2(null.fileno(), 1)
            yield
    finally:
        os.dup2(saved, 1)
        os.close(saved)


class LinearModel:
    """Columns, rows and named objectives as arrays; minimisation.

    Structure is added in bulk (:meth:`add_columns`, :meth:`add_rows`); bounds, row
    bounds and the active objective can change between solves.
    """

    def __init__(self, *, solver: str | None = None, time_limit: float | None = None):
        self.solver = available_solver(solver)
        self.time_limit = time_limit
        self.node_limit: int | None = None  # a MILP stops after this many branch-and-bound nodes
        self.col_lower: list[float] = []
        self.col_upper: list[float] = []
        self.col_integer: list[bool] = []
        self.row_lower: list[float] = []
        self.row_upper: list[float] = []
        self._row_start: list[int] = []
        self._row_index: list[np.ndarray] = []
        self._row_value: list[np.ndarray] = []
        self._nnz = 0
        self.objectives: dict[str, tuple[np.ndarray, np.ndarray]] = {}
        self.objective: str | None = None
        self._backend = None
        self._pending_cols = 0  # structure added since the backend was built
        self._pending_rows = 0

    @property
    def num_cols(self) -> int:
        return len(self.col_lower)

    @property
    def num_rows(self) -> int:
        return len(self.row_lower)

    def copy(self) -> "LinearModel":
        """An independent copy of the model with no solver attached yet: change and solve
        it without disturbing this model's warm start."""
        other = LinearModel.__new__(LinearModel)
        other.__dict__.update(self.__dict__)
        for name in ("col_lower", "col_upper", "col_integer", "row_lower", "row_upper", "_row_start",
                     "_row_index", "_row_value"):
            setattr(other, name, list(getattr(self, name)))
        other.objectives = dict(self.objectives)
        other._backend = None
        other._pending_cols = other._pending_rows = 0
        return other

    def reduced(self, fixed, values) -> tuple["LinearModel", np.ndarray]:
        """A new model (no solver attached) with the columns ``fixed`` set to ``values`` and
        taken out: their part of each row moves into the row's bounds, and rows left with
        no column are dropped. Returns it and, for each of its columns, the column of this
        model it stands for. Used to search a small face of a large model."""
        n = self.num_cols
        fixed = np.asarray(fixed, dtype=np.int64)
        is_fixed = np.zeros(n, dtype=bool)
        is_fixed[fixed] = True
        at = np.zeros(n)
        at[fixed] = np.asarray(values, dtype=float)
        keep = np.flatnonzero(~is_fixed)
        new_index = np.full(n, -1, dtype=np.int64)
        new_index[keep] = np.arange(len(keep))
        starts, index, value = self.matrix()
        lengths = np.diff(np.append(starts, len(index)))
        row_of = np.repeat(np.arange(self.num_rows), lengths)
        moved = np.bincount(row_of, weights=value * at[index], minlength=self.num_rows)
        live = ~is_fixed[index]
        counts = np.bincount(row_of[live], minlength=self.num_rows)
        rows = np.flatnonzero(counts > 0)
        other = LinearModel.__new__(LinearModel)
        other.__dict__.update(self.__dict__)
        other.col_lower = [self.col_lower[j] for j in keep.tolist()]
        other.col_upper = [self.col_upper[j] for j in keep.tolist()]
        other.col_integer = [self.col_integer[j] for j in keep.tolist()]
        other.row_lower, other.row_upper = [], []
        other._row_start, other._row_index, other._row_value = [], [], []
        other._nnz = 0
        other._backend = None
        other._pending_cols = len(keep)
        other._pending_rows = 0
        other.objectives = {}
        for name, (cols, coefs) in self.objectives.items():
            mask = ~is_fixed[cols]
            other.objectives[name] = (new_index[cols[mask]], coefs[mask])
        if len(rows):
            sel = live & np.isin(row_of, rows)
            row_counts = counts[rows]
            other.add_rows(np.concatenate([[0], np.cumsum(row_counts)[:-1]]), new_index[index[sel]], value[sel],
                           np.asarray(self.row_lower)[rows] - moved[rows],
                           np.asarray(self.row_upper)[rows] - moved[rows])
        return other, keep

    # -- structure ---------------------------------------------------------------------
    def add_columns(self, lower, upper, *, integer: bool = False) -> np.ndarray:
        """Add columns with the given bounds (arrays or scalars broadcast to ``len``)."""
        lower = np.atleast_1d(np.asarray(lower, dtype=float))
        upper = np.broadcast_to(np.asarray(upper, dtype=float), lower.shape)
        first = self.num_cols
        self.col_lower.extend(lower.tolist())
        self.col_upper.extend(upper.tolist())
        self.col_integer.extend([integer] * len(lower))
        self._pending_cols += len(lower)
        return np.arange(first, first + len(lower))

    def add_rows(self, starts, index, value, lower, upper) -> np.ndarray:
        """Add rows in compressed form: row ``r`` has entries ``index[starts[r]:starts[r+1]]``."""
        starts = np.asarray(starts, dtype=np.int64)
        index = np.asarray(index, dtype=np.int64)
        value = np.asarray(value, dtype=float)
        lower = np.broadcast_to(np.asarray(lower, dtype=float), starts.shape)
        upper = np.broadcast_to(np.asarray(upper, dtype=float), starts.shape)
        first = self.num_rows
        self._row_start.extend((starts + self._nnz).tolist())
        self._row_index.append(index)
        self._row_value.append(value)
        self._nnz += len(index)
        self.row_lower.extend(lower.tolist())
        self.row_upper.extend(upper.tolist())
        self._pending_rows += len(lower)
        return np.arange(first, first + len(lower))

    def add_row(self, cols: Sequence[int], coefs: Sequence[float], lower: float, upper: float) -> int:
        return int(self.add_rows([0], cols, coefs, [lower], [upper])[0])

    def define_objective(self, name: str, cols, coefs) -> None:
        self.objectives[name] = (np.asarray(cols, dtype=np.int64), np.asarray(coefs, dtype=float))
        if self.objective == name and self._backend is not None:
            self._backend.set_objective(self._objective_vector())

    # -- changes between solves -----------------------------------------------------------
    def use_objective(self, name: str) -> None:
        if name != self.objective:
            self.objective = name
            if self._backend is not None:
                self._backend.set_objective(self._objective_vector())

    def set_col_bounds(self, col: int, lower: float, upper: float) -> None:
        self.set_cols_bounds([col], lower, upper)

    def set_row_bounds(self, row: int, lower: float, upper: float) -> None:
        self.set_rows_bounds([row], lower, upper)

    def set_cols_bounds(self, cols, lower, upper) -> None:
        """New bounds for columns (scalars are broadcast)."""
        changed = self._set_bounds(self.col_lower, self.col_upper, cols, lower, upper,
                                   self.num_cols - self._pending_cols)
        if changed is not None:
            self._backend.set_cols_bounds(*changed)

    def set_rows_bounds(self, rows, lower, upper) -> None:
        """New bounds for rows (scalars are broadcast)."""
        changed = self._set_bounds(self.row_lower, self.row_upper, rows, lower, upper,
                                   self.num_rows - self._pending_rows)
        if changed is not None:
            self._backend.set_rows_bounds(*changed)

    def _set_bounds(self, lows: list, ups: list, index, lower, upper, in_solver: int):
        """Store new bounds; return what the live solver must be told, or None.

        Bounds that do not change are not passed on: telling HiGHS anyway costs its warm
        start. Entries added since the solver was built reach it with the structure."""
        index = np.atleast_1d(np.asarray(index, dtype=np.int64))
        lower = np.broadcast_to(np.asarray(lower, dtype=float), index.shape)
        upper = np.broadcast_to(np.asarray(upper, dtype=float), index.shape)
        push = []
        for k, (i, lo, up) in enumerate(zip(index.tolist(), lower.tolist(), upper.tolist())):
            if (lows[i], ups[i]) != (lo, up):
                lows[i], ups[i] = lo, up
                if i < in_solver:
                    push.append(k)
        if self._backend is None or not push:
            return None
        return index[push], lower[push], upper[push]

    def set_integer(self, cols, integer: bool = True) -> None:
        cols = np.asarray(cols, dtype=np.int64)
        for c in cols.tolist():
            self.col_integer[c] = integer
        if self._backend is not None:
            self._backend.set_integer(cols, integer)

    def set_time_limit(self, seconds: float | None) -> None:
        self.time_limit = seconds
        if self._backend is not None:
            self._backend.set_time_limit(seconds)

    # -- arrays -------------------------------------------------------------------------
    def _objective_vector(self) -> np.ndarray:
        c = np.zeros(self.num_cols)
        if self.objective is not None:
            cols, coefs = self.objectives[self.objective]
            np.add.at(c, cols, coefs)
        return c

    def matrix(self):
        """Row-wise compressed matrix: ``(starts, index, value)``."""
        index = np.concatenate(self._row_index) if self._row_index else np.zeros(0, dtype=np.int64)
        value = np.concatenate(self._row_value) if self._row_value else np.zeros(0)
        return np.asarray(self._row_start, dtype=np.int64), index, value

    @property
    def is_mip(self) -> bool:
        return any(self.col_integer)

    # -- solving ------------------------------------------------------------------------
    def solve(self, *, duals: bool = False) -> Result:
        """Solve. ``duals``: also return reduced costs, duals and row values of an LP
        optimum (HiGHS only).

        A MILP is not given the previous plan as a start: with HiGHS 1.16 a MILP re-solved
        after a bound change with the previous plan as a start (whole or only its integer
        columns) ended "optimal" on a worse plan (PSPLIB j1012_10 at deadlines 11-12)."""
        if self.objective is None:
            raise SolverError("no objective chosen")
        if self._backend is None:
            self._backend = (_HighsBackend if self.solver == "highs" else _PulpBackend)(self)
        elif self._pending_cols or self._pending_rows:
            self._backend.add_structure(self, self._pending_cols, self._pending_rows)
        self._pending_cols = self._pending_rows = 0
        return self._backend.run(duals)


class _HighsBackend:
    """highspy, built once from the arrays and kept alive for warm re-solves."""

    def __init__(self, model: LinearModel):
        with _quiet_stdout():
            self.h = highspy.Highs()
        self.h.setOptionValue("output_flag", False)
        # A MILP is solved to its optimum, not to HiGHS's default 0.01% relative gap (which
        # could call a plan costing 28 more in 286,000 "optimal")
        self.h.setOptionValue("mip_rel_gap", 0.0)
        self.h.setOptionValue("mip_abs_gap", 1e-6)
        if model.time_limit is not None:
            self.h.setOptionValue("time_limit", float(model.time_limit))
        if model.node_limit is not None:  # (a work limit: unlike time, the same on every run)
            self.h.setOptionValue("mip_max_nodes", int(model.node_limit))
        self.model = model
        self._warm = False
        self._added(model, 0, 0)
        self.set_objective(model._objective_vector())

    def _added(self, model: LinearModel, col0: int, row0: int) -> None:
        h, inf = self.h, highspy.kHighsInf
        ncol = model.num_cols - col0
        if ncol:
            lo = np.asarray(model.col_lower[col0:], dtype=float)
            up = np.asarray(model.col_upper[col0:], dtype=float)
            h.addCols(ncol, np.zeros(ncol), np.where(np.isinf(lo), -inf, lo), np.where(np.isinf(up), inf, up),
                      0, np.zeros(0, dtype=np.int32), np.zeros(0, dtype=np.int32), np.zeros(0))
            ints = [c for c in range(col0, model.num_cols) if model.col_integer[c]]
            if ints:
                self.set_integer(np.array(ints), True)
        nrow = model.num_rows - row0
        if nrow:
            starts, index, value = model.matrix()
            first = starts[row0]
            lo = np.asarray(model.row_lower[row0:], dtype=float)
            up = np.asarray(model.row_upper[row0:], dtype=float)
            h.addRows(nrow, np.where(np.isinf(lo), -inf, lo), np.where(np.isinf(up), inf, up),
                      len(index) - first, (starts[row0:] - first).astype(np.int32),
                      index[first:].astype(np.int32), value[first:])

    def add_structure(self, model: LinearModel, ncols: int, nrows: int) -> None:
        self._added(model, model.num_cols - ncols, model.num_rows - nrows)
        self.set_objective(model._objective_vector())

    def set_objective(self, c: np.ndarray) -> None:
        n = len(c)
        self.h.changeColsCost(n, np.arange(n, dtype=np.int32), c)

    def set_time_limit(self, seconds: float | None) -> None:
        self.h.setOptionValue("time_limit", highspy.kHighsInf if seconds is None else float(seconds))

    def set_cols_bounds(self, cols, lower, upper) -> None:
        inf = highspy.kHighsInf
        self.h.changeColsBounds(len(cols), np.asarray(cols, dtype=np.int32),
                                np.where(np.isinf(lower), -inf, lower), np.where(np.isinf(upper), inf, upper))

    def set_rows_bounds(self, rows, lower, upper) -> None:
        inf = highspy.kHighsInf
        self.h.changeRowsBounds(len(rows), np.asarray(rows, dtype=np.int32),
                                np.where(np.isinf(lower), -inf, lower), np.where(np.isinf(upper), inf, upper))

    def set_integer(self, cols: np.ndarray, integer: bool) -> None:
        kind = highspy.HighsVarType.kInteger if integer else highspy.HighsVarType.kContinuous
        self.h.changeColsIntegrality(len(cols), np.asarray(cols, dtype=np.int32),
                                     np.array([kind] * len(cols)))

    def run(self, duals: bool = False) -> Result:
        h = self.h
        mip = self.model.is_mip
        h.run()
        status = h.getModelStatus()
        S = highspy.HighsModelStatus
        if not mip and status == S.kOptimal and not self._warm:
            # later LP solves start from this basis: presolve would only cost time (about a
            # third of a warm re-solve on 10,000 activities). Set once: setting an option
            # again before each run was seen to slow the warm re-solves down.
            h.setOptionValue("presolve", "off")
            self._warm = True
        if status in (S.kSolveError, S.kPostsolveError):
            # Seen with HiGHS 1.16 on small MILPs that presolve reduces to nothing: "solution
            # has untransformed violations" and a solve error. Solve again without presolve.
            h.setOptionValue("presolve", "off")
            try:
                h.run()
            finally:
                if mip:
                    h.setOptionValue("presolve", "choose")
            status = h.getModelStatus()
        info = h.getInfo()
        if status == S.kOptimal:
            sol = h.getSolution()
            if mip or not duals or not sol.dual_valid:
                return Result("optimal", np.asarray(sol.col_value), info.objective_function_value)
            return Result("optimal", np.asarray(sol.col_value), info.objective_function_value,
                          col_dual=np.asarray(sol.col_dual), row_dual=np.asarray(sol.row_dual),
                          row_values=np.asarray(sol.row_value))
        if status in (S.kInfeasible, S.kUnboundedOrInfeasible):
            return Result("infeasible")
        if status in (S.kTimeLimit, S.kIterationLimit, S.kInterrupt, S.kSolutionLimit):
            has = info.primal_solution_status == 2  # feasible
            values = np.asarray(h.getSolution().col_value) if has else None
            return Result("stopped", values, info.objective_function_value if has else None,
                          info.mip_dual_bound if mip else None, info.mip_gap if (mip and has) else None)
        raise SolverError(f"HiGHS stopped with status '{h.modelStatusToString(status)}'")


class _PulpBackend:
    """CBC through PuLP. CBC re-solves from scratch anyway, so the PuLP problem is built
    afresh from the arrays at every run; changes between runs need no bookkeeping."""

    def __init__(self, model: LinearModel):
        self.model = model

    def add_structure(self, model, ncols, nrows) -> None:
        pass

    def set_objective(self, c) -> None:
        pass

    def set_cols_bounds(self, cols, lower, upper) -> None:
        pass

    def set_time_limit(self, seconds) -> None:
        pass


    def set_rows_bounds(self, rows, lower, upper) -> None:
        pass

    def set_integer(self, cols, integer) -> None:
        pass

    def _problem(self) -> tuple[pulp.LpProblem, list]:
        m = self.model
        prob = pulp.LpProblem("hasten", pulp.LpMinimize)
        xs = [prob.add_variable(f"x{c:07d}", None if lo == -INF else lo, None if up == INF else up,
                                pulp.LpInteger if integer else pulp.LpContinuous)
              for c, (lo, up, integer) in enumerate(zip(m.col_lower, m.col_upper, m.col_integer))]
        starts, index, value = m.matrix()
        ends = np.append(starts[1:], len(index)).astype(np.int64)
        for r, (lo, up) in enumerate(zip(m.row_lower, m.row_upper)):
            terms = [(xs[int(j)], float(v)) for j, v in zip(index[starts[r]:ends[r]], value[starts[r]:ends[r]])]
            if lo == up:
                prob.addConstraint(pulp.LpConstraint(pulp.LpAffineExpression(terms), pulp.LpConstraintEQ, f"e{r}", lo))
                continue
            if up != INF:
                prob.addConstraint(pulp.LpConstraint(pulp.LpAffineExpression(terms), pulp.LpConstraintLE, f"u{r}", up))
            if lo != -INF:
                prob.addConstraint(pulp.LpConstraint(pulp.LpAffineExpression(terms), pulp.LpConstraintGE, f"l{r}", lo))
        c = m._objective_vector()
        prob.setObjective(pulp.LpAffineExpression([(xs[j], float(c[j])) for j in np.flatnonzero(c)]))
        return prob, xs

    def run(self, duals: bool = False) -> Result:
        prob, xs = self._problem()
        status = prob.solve(_cbc(self.model.time_limit))
        values = np.array([v.varValue or 0.0 for v in xs])
        if status == pulp.LpStatusOptimal and prob.sol_status == pulp.LpSolutionOptimal:
            return Result("optimal", values, pulp.value(prob.objective) or 0.0)
        if status == pulp.LpStatusInfeasible:
            return Result("infeasible")
        if prob.sol_status == pulp.LpSolutionIntegerFeasible:
            return Result("stopped", values, pulp.value(prob.objective) or 0.0, None, None)
        raise SolverError(f"CBC stopped with status '{pulp.LpStatus[status]}'")
