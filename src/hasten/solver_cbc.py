"""The CBC back-end of :class:`hasten.solver_model.LinearModel`, through PuLP: the
fallback where highspy is missing. The only module that imports PuLP.
"""

from __future__ import annotations

from typing import TYPE_CHECKING
import warnings

import numpy as np
import pulp

from .errors import SolverError
from .solver_model import INF, Result

if TYPE_CHECKING:
    from .solver_model import LinearModel

__all__ = ["CbcBackend", "available"]


def _cbc(time_limit: float | None = None):
    """A CBC solver through PuLP: an installed CBC (COIN_CMD) or the one bundled with PuLP
    3.x (PULP_CBC_CMD, deprecated there for PuLP 4, still the only one on many machines)."""
    coin = pulp.COIN_CMD(msg=False, timeLimit=time_limit)
    if coin.available():
        return coin
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DeprecationWarning)
        return pulp.PULP_CBC_CMD(msg=False, timeLimit=time_limit)


def available() -> bool:
    """Whether PuLP's CBC can run here."""
    return _cbc().available()


class CbcBackend:
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

    def run(self, duals: bool = False):
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
