"""The HiGHS back-end of :class:`hasten.solver_model.LinearModel` (through highspy).

The model is passed to highspy in bulk once and kept alive, so later changes of bounds,
rows or the objective are re-solved warm from the previous basis. The only module that
imports highspy.
"""

from __future__ import annotations

from typing import TYPE_CHECKING
import contextlib
import os
import sys

import numpy as np

from .errors import SolverError
from .solver_model import Result

if TYPE_CHECKING:
    from .solver_model import LinearModel

__all__ = ["HighsBackend", "AVAILABLE", "quiet_stdout"]

try:
    import highspy

    AVAILABLE = True
except ImportError:  # pragma: no cover - depends on the machine
    highspy = None
    AVAILABLE = False


@contextlib.contextmanager
def quiet_stdout():
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


class HighsBackend:
    """highspy, built once from the arrays and kept alive for warm re-solves."""

    def __init__(self, model: LinearModel):
        with quiet_stdout():
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

    def run(self, duals: bool = False):
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
