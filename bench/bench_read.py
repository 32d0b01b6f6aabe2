"""Benchmark of ``read_project`` as the command line reads: one read in a fresh process.

Run from the repository root with the virtualenv active::

    python bench/bench_read.py --workdir /tmp/hb                 # 50,000 activities
    python bench/bench_read.py --n 200000 --workdir /tmp/hb200
    python bench/bench_read.py --workdir /tmp/hb --against ../main/src   # interleaved

The network is :func:`generate.random_project` (seed 1, ``window = n // 10``), written once
as a project folder (reused from ``--workdir``). Each measurement is one ``read_project``
in a new Python process, after its imports, with the cycle collector off as ``hasten``
turns it off at start: the process's first touch of the memory it reads into is timed, as
in a command, and neither a collection nor the freeing of an earlier project is
(``bench_cpm.py`` times reads one after another in one process, with both). With
``--against SRC`` the same runs alternate with the ``hasten`` package found in ``SRC``
(another worktree's ``src``), so that both see the same load. Least of ``--repeat`` runs:
wall time, CPU time (user + system), system time and page faults.

Target: under 0.4 s wall at 50,000 activities on the benchmark machine.
"""

from __future__ import annotations

import argparse
import json
import os
import subprocess
import sys
import tempfile
from pathlib import Path

HERE = Path(__file__).resolve().parent
SRC = HERE.parent / "src"
sys.path.insert(0, str(HERE))

from generate import project_folder, random_project  # noqa: E402

TARGET = 0.4  # seconds at 50,000 activities
_CHILD = r"""
import gc, json, resource, sys, time
from hasten.formats import read_project
gc.disable()
before = resource.getrusage(resource.RUSAGE_SELF)
wall = time.perf_counter()
project = read_project(sys.argv[1])
wall = time.perf_counter() - wall
after = resource.getrusage(resource.RUSAGE_SELF)
print(json.dumps([wall, after.ru_utime - before.ru_utime + after.ru_stime - before.ru_stime,
                  after.ru_stime - before.ru_stime, after.ru_minflt - before.ru_minflt,
                  len(project.activities)]))
"""


def read_once(src: Path, folder: Path) -> list[float]:
    """(wall, CPU, system seconds, page faults, activities) of one read in a new process."""
    env = dict(os.environ, PYTHONPATH=str(src))
    done = subprocess.run([sys.executable, "-c", _CHILD, str(folder)], env=env,
                          capture_output=True, text=True, check=False)
    if done.returncode != 0:
        raise RuntimeError(f"reading with {src} failed: {done.stderr[-2000:]}")
    return json.loads(done.stdout)


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description="read_project in a fresh process")
    parser.add_argument("--n", type=int, default=50_000, help="activities (default 50,000)")
    parser.add_argument("--repeat", type=int, default=5, help="runs (least reported)")
    parser.add_argument("--workdir", type=Path, default=None,
                        help="keep the generated project folder here and reuse it")
    parser.add_argument("--against", type=Path, default=None,
                        help="another hasten source folder to time in alternation")
    args = parser.parse_args(argv)
    with tempfile.TemporaryDirectory(prefix="hasten-bench-") as scratch:
        project = random_project(args.n, seed=1, window=max(10, args.n // 10))
        folder, _ = project_folder(project, args.workdir or Path(scratch))
        trees = {"this": SRC} | ({"against": args.against} if args.against else {})
        runs: dict[str, list[list[float]]] = {name: [] for name in trees}
        load = os.getloadavg()[0]
        for r in range(args.repeat):
            for name in (list(trees) if r % 2 == 0 else list(reversed(trees))):
                runs[name].append(read_once(trees[name], folder))
        print(f"read_project, {args.n:,} activities, {len(project.links):,} links; one read per "
              f"process, collector off; least of {args.repeat}; load average "
              f"{load:.2f} -> {os.getloadavg()[0]:.2f}")
        least = {}
        for name, found in runs.items():
            least[name] = [min(run[i] for run in found) for i in range(4)]
            wall, cpu, system, faults = least[name]
            print(f"  {name:8s} {trees[name]}: wall {wall:.3f} s, CPU {cpu:.3f} s "
                  f"(system {system:.3f} s), {faults:,.0f} page faults")
        if args.against:
            print(f"  this / against: wall {least['this'][0] / least['against'][0]:.2f}x, "
                  f"CPU {least['this'][1] / least['against'][1]:.2f}x")
        met = args.n != 50_000 or least["this"][0] < TARGET
        if args.n == 50_000:
            print(f"  target < {TARGET} s wall: {'PASS' if met else 'FAIL'}")
        return 0 if met else 1


if __name__ == "__main__":
    raise SystemExit(main())
