"""Chunks of the simulation on Dask (hasten.cluster).

Sources of the checks: the in-process run of hasten.simulation itself (a cluster must give
the very same figures for the same seed: each block of runs has its own random stream);
the import rules of DEVELOPERS.md ("Architecture": optional dependencies are imported in one
module only, and only when asked), checked by walking the imports with ``ast`` and in a fresh
interpreter. Tests that need Dask skip when it is not installed.
"""

from __future__ import annotations

import ast
import subprocess
import sys
from pathlib import Path

import pytest

from conftest import START
from hasten.errors import HastenError, InputError
from hasten.project import Activity, Calendar, Link, LinkType, Project
from hasten.simulation import simulate
from hasten.uncertainty import duration_ranges

SRC = Path(__file__).resolve().parents[1] / "src" / "hasten"
EDGE = {"cli", "formats", "render", "charts", "typer", "tabulate", "pandas", "openpyxl", "matplotlib",
        "pulp", "highspy"}


def _project() -> Project:
    crane = Calendar((0, 1, 2, 3, 4, 5, 6), (), "crane")
    acts = tuple(Activity(f"T{k}", 3 + k % 5, trade=("steel", "concrete")[k % 2],
                          calendar="crane" if k % 4 == 0 else "") for k in range(12))
    links = tuple(Link(f"T{k}", f"T{k + 1 + k % 3}", (LinkType.FS, LinkType.SS, LinkType.FF)[k % 3], k % 2)
                  for k in range(10))
    return Project("cluster", START, acts, links, calendars=(crane,))


def _imports(path: Path) -> set[str]:
    names = set()
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.Import):
            names |= {a.name.split(".")[0] for a in node.names}
        elif isinstance(node, ast.ImportFrom) and node.module and not node.level:
            names.add(node.module.split(".")[0])
        elif isinstance(node, ast.ImportFrom) and node.level and node.module:
            names.add(node.module.split(".")[0])
    return names


def test_dask_is_imported_in_the_cluster_module_only():
    users = {p.name for p in SRC.rglob("*.py") if _imports(p) & {"dask", "distributed"}}
    assert users <= {"cluster.py"}
    for name in ("uncertainty.py", "simulation.py", "cluster.py"):  # core modules: no edges
        assert not _imports(SRC / name) & EDGE, name


def test_importing_the_simulation_does_not_load_dask():
    code = ("import sys, hasten.simulation, hasten.cluster, hasten.uncertainty; "
            "print('dask' in sys.modules or 'distributed' in sys.modules)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True,
                         env={"PYTHONPATH": str(SRC.parent), "PATH": ""})
    assert out.stdout.strip() == "False"


def test_without_dask_the_error_says_what_to_install(monkeypatch):
    from hasten.cluster import cluster_runner
    monkeypatch.setitem(sys.modules, "dask", None)  # as if Dask were not installed
    with pytest.raises(HastenError, match=r'pip install "hasten\[cluster\]"'):
        with cluster_runner(workers=2):
            pass


@pytest.mark.parametrize("kwargs, column", [({}, "scheduler"), ({"workers": 2, "scheduler": "tcp://x:1"}, "workers"),
                                            ({"workers": 0}, "workers"), ({"workers": "two"}, "workers")])
def test_workers_or_a_scheduler(kwargs, column):
    from hasten.cluster import cluster_runner
    with pytest.raises(InputError) as err:
        with cluster_runner(**kwargs):
            pass
    assert err.value.column == column and "--workers" in err.value.fix


def test_an_unreachable_scheduler_is_a_clear_error():
    pytest.importorskip("dask.distributed")
    from hasten.cluster import cluster_runner
    with pytest.raises(HastenError, match="could not start or reach the scheduler at tcp://127.0.0.1:1"):
        with cluster_runner(scheduler="tcp://127.0.0.1:1", timeout=1):
            pass


def test_two_local_workers_give_the_in_process_figures():
    pytest.importorskip("dask.distributed")
    from hasten.cluster import simulate_on_cluster
    project = _project()
    ranges = duration_ranges(project, default="-20%, +50%", by_trade={"steel": "-10%, +80%"},
                             correlation={"concrete": 0.6})
    here = simulate(project, ranges, 1_500, seed=12, target=20)
    seen = []
    there = simulate_on_cluster(project, ranges, 1_500, 12, workers=2, target=20, chunk=300,
                                progress=lambda done, total: seen.append((done, total)))
    assert there == here
    assert len(seen) == 5 and seen[-1] == (1_500, 1_500)


def test_a_running_scheduler_gives_the_in_process_figures():
    distributed = pytest.importorskip("dask.distributed")
    from hasten.cluster import simulate_on_cluster
    project = _project()
    ranges = duration_ranges(project, default="-20%, +50%", distribution="triangular")
    here = simulate(project, ranges, 700, seed=3)
    with distributed.LocalCluster(n_workers=1, threads_per_worker=2, processes=False,
                                  dashboard_address=None) as running:
        there = simulate_on_cluster(project, ranges, 700, 3, scheduler=running.scheduler_address, chunk=200)
    assert there == here


def _needs_a_missing_module(model, *task):
    import hasten_not_installed_anywhere  # noqa: F401  (as on a worker without hasten)


def test_a_worker_that_cannot_import_says_so():
    distributed = pytest.importorskip("dask.distributed")
    from hasten.cluster import DaskRunner
    with distributed.LocalCluster(n_workers=1, threads_per_worker=1, processes=False,
                                  dashboard_address=None) as running, distributed.Client(running) as client:
        with pytest.raises(HastenError, match="install the same hasten on every worker"):
            list(DaskRunner(client)(_needs_a_missing_module, None, [(1, 0, 1)]))
