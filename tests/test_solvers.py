"""The solver layer: HiGHS first, CBC (through PuLP) as the fallback, a clear error when no
solver can run. The same models must give the same optima on both solvers.

Reference: the worked solution of a University of Mumbai construction-management exam
question (ques10.com, indirect cost 80 a day): crash costs 40 at 22 days, 280 at 18 days,
420 at 17 days (published stages), 1,280 at the shortest finish of 12 days (independent
check in tests/data/examples/ques10_indirect80.json).
"""

from __future__ import annotations

import pytest

import hasten.solver_cbc as solver_cbc
import hasten.solver_highs as solver_highs
import hasten.solver_model as solver
from conftest import load_json, project_from_example
from hasten.errors import SolverError
from hasten.network import Network
from hasten.crash_model import CrashModel

QUES10 = {22: 40.0, 18: 280.0, 17: 420.0, 12: 1280.0}


@pytest.mark.parametrize("name", ["highs", "cbc"])
def test_both_solvers_give_the_published_crash_costs(name: str):
    network = Network(project_from_example(load_json("examples/ques10_indirect80.json")))
    model = CrashModel(network, solver=name)
    assert model.lp.solver == name
    assert model.shortest_finish() == 12
    for target, cost in QUES10.items():
        assert model.least_cost(target).added_cost == pytest.approx(cost)


def test_cbc_solves_the_milp_too():
    from hasten.project import Activity, Link, Option
    from conftest import make_project

    # two ways to save 4 days on a 10-day activity: an option (500) or crashing (4 x 150)
    acts = [Activity("A", 10, crash_duration=6, cost=0, crash_cost=600, options=(Option("crew", 6, 500),)),
            Activity("B", 3)]
    network = Network(make_project(acts, [Link("A", "B")]))
    for name in ("highs", "cbc"):
        sol = CrashModel(network, solver=name).least_cost(9)
        assert sol.added_cost == pytest.approx(500.0) and sol.choices[0] == 0


def test_no_solver_is_a_clear_error(monkeypatch):
    monkeypatch.setattr(solver_highs, "AVAILABLE", False)
    monkeypatch.setattr(solver_cbc.pulp.PULP_CBC_CMD, "available", lambda self: False)
    monkeypatch.setattr(solver_cbc.pulp.COIN_CMD, "available", lambda self: False)
    with pytest.raises(SolverError, match="install highspy"):
        solver.available_solver()
    with pytest.raises(SolverError, match="unknown solver"):
        solver.available_solver("gurobi")


def test_falls_back_to_cbc_without_highspy(monkeypatch):
    monkeypatch.setattr(solver_highs, "AVAILABLE", False)
    assert solver.available_solver() == "cbc"
