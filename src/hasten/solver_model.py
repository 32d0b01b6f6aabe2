"""A linear / mixed-integer model kept as arrays, solved by one of two back-ends.

:class:`LinearModel` is the one model builder the optimiser uses: columns with bounds and
integrality, rows with bounds, named objectives. It is solved with HiGHS
(:mod:`hasten.solver_highs`: the model is passed to highspy in bulk and kept alive, so a
change of a bound, a row or the objective is re-solved warm from the previous basis) or,
where highspy is missing, with CBC through PuLP (:mod:`hasten.solver_cbc`: the same arrays
become a PuLP problem). Those two modules are the only ones that import a solver library.

Why arrays and not PuLP expressions for the main path: on a 10,000-activity network,
building the PuLP objects alone took longer than HiGHS needs to solve the whole LP
(see DEVELOPERS.md, "Benchmarks"); the arrays cost a few hundredths of a second.
The PuLP path stays, tested against HiGHS on the same models.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

import numpy as np

from .errors import SolverError

__all__ = ["LinearModel", "Result", "available_solver", "INF"]

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


def available_solver(prefer: str | None = None) -> str:
    """``"highs"`` when highspy imports, else ``"cbc"`` when PuLP's CBC runs, else an error."""
    if prefer not in (None, "highs", "cbc"):
        raise SolverError(f"unknown solver {prefer!r}; use highs or cbc")
    if prefer != "cbc":  # the solver libraries load on first use, PuLP only if it is needed
        from . import solver_highs

        if solver_highs.AVAILABLE:
            return "highs"
    from . import solver_cbc

    if solver_cbc.available():
        return "cbc"
    raise SolverError("no solver can run here: install highspy (pip install highspy), "
                      "or make PuLP's bundled CBC runnable")



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
            if self.solver == "highs":
                from .solver_highs import HighsBackend as Backend
            else:
                from .solver_cbc import CbcBackend as Backend
            self._backend = Backend(self)
        elif self._pending_cols or self._pending_rows:
            self._backend.add_structure(self, self._pending_cols, self._pending_rows)
        self._pending_cols = self._pending_rows = 0
        return self._backend.run(duals)
