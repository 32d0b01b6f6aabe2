"""The budget and best-finish questions against one plan, and at 200,000 activities (invented
data, timing only).

Run from the repository root with the virtualenv active::

    python bench/bench_best.py --n 20000            # plan, budget, best: ratios in one run
    python bench/bench_best.py --n 200000           # the same at 200,000 activities

Network: ``generate.random_project(n, 1, window=n // 10)`` with indirect cost 3,000 a
working day and damages 2,000 a calendar day from a contract finish 40 working days
before the current finish.

* ``plan``: ``Planner(p).plan(normal - 60)`` (Planner built in the timing).
* ``budget``: ``Planner(p).earliest_within(spend)``, spend = the least added cost 60 days
  early (found beforehand, not timed). **Target: at most 3x one plan.**
* ``best``: ``Planner(p).best_finish()``. **Target: at most 3x one plan.**

With ``--cli DIR`` the project is also written to ``DIR`` (reused when it reads back equal)
and the three commands run end to end (``hasten plan DIR --earlier 60d --json``, ``hasten
budget DIR --spend S --json``, ``hasten best DIR --json``, output to /dev/null) under
``/usr/bin/time -v``: wall time and peak resident memory of each, reading included.

At 200,000 activities the targets are under 2 minutes and under 2 GB for each of budget
and best. Each measurement runs in a child process of its own (``--one``), so its peak
resident memory (``resource.getrusage``, the child's ``ru_maxrss``) is its own: it
includes building the project, which every command does too. Wall time in the child,
median of ``--repeat`` runs of the measured call, interleaved by question; the cycle
collector off, as the command line runs.
"""

from __future__ import annotations

import argparse
import gc
import json
import os
import resource
import statistics
import subprocess
import sys
import time
from dataclasses import replace
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

from generate import project_folder, random_project  # noqa: E402
from hasten.planner import Planner  # noqa: E402
from hasten.project import Contract, Costs  # noqa: E402

COMPRESS = 60
RATIO_TARGET = 3.0
BIG_SECONDS = 120.0
BIG_BYTES = 2 * 1024 ** 3


def project_for(n: int):
    project = random_project(n, 1, window=max(10, n // 10))
    planner = Planner(project)
    contract = planner.clock.date_of(planner.normal_finish - 40 - 1)
    return replace(project, costs=Costs(3000.0), contract=Contract(contract, damages_per_day=2000.0))


def one(what: str, n: int, spend: float | None) -> dict:
    gc.disable()
    project = project_for(n)
    t = time.perf_counter()
    planner = Planner(project)
    if what == "plan":
        out = planner.plan(planner.normal_finish - COMPRESS)
        figures = {"finish": out.finish, "cost": out.added_cost}
    elif what == "spend":
        out = planner.plan(planner.normal_finish - COMPRESS)
        figures = {"spend": out.added_cost}
    elif what == "budget":
        out = planner.earliest_within(spend)
        figures = {"finish": out.finish, "cost": out.added_cost}
    else:
        out = planner.best_finish()
        figures = {"finish": out.point.finish, "total": out.point.total_cost, "priced": len(out.table),
                   "normal": planner.normal_finish}
    seconds = time.perf_counter() - t
    rss = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024  # kilobytes on Linux
    return {"seconds": seconds, "rss": rss, **figures}


def child(what: str, n: int, spend: float | None = None) -> dict:
    cmd = [sys.executable, __file__, "--one", what, "--n", str(n)]
    if spend is not None:
        cmd += ["--spend", repr(spend)]
    out = subprocess.run(cmd, check=True, capture_output=True, text=True).stdout
    return json.loads(out.strip().splitlines()[-1])


def cli(n: int, workdir: Path, spend: float) -> None:
    """The three commands end to end under /usr/bin/time -v."""
    folder, written = project_folder(project_for(n), workdir)
    print(f"project folder {folder} ({'reused' if written is None else f'written in {written:.1f} s'})",
          flush=True)
    hasten = [sys.executable, "-m", "hasten"]
    for name, args in [("plan", ["plan", str(folder), "--earlier", f"{COMPRESS}d", "--json"]),
                       ("budget", ["budget", str(folder), "--spend", repr(spend), "--json"]),
                       ("best", ["best", str(folder), "--json"])]:
        done = subprocess.run(["/usr/bin/time", "-v", *hasten, *args], stdout=subprocess.DEVNULL,
                              stderr=subprocess.PIPE, text=True)
        stats = dict(line.strip().rsplit(": ", 1) for line in done.stderr.splitlines() if ": " in line)
        rss = int(stats.get("Maximum resident set size (kbytes)", 0)) * 1024
        print(f"  hasten {name:<7} exit {done.returncode}  wall {stats.get('Elapsed (wall clock) time (h:mm:ss or m:ss)')}"
              f"  user {stats.get('User time (seconds)')} s  peak {rss / 2 ** 20:,.0f} MiB", flush=True)


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--n", type=int, default=20000)
    parser.add_argument("--repeat", type=int, default=1)
    parser.add_argument("--one", choices=["plan", "spend", "budget", "best"], help=argparse.SUPPRESS)
    parser.add_argument("--spend", type=float, help=argparse.SUPPRESS)
    parser.add_argument("--only", choices=["budget", "best"], help="measure one question (and the plan)")
    parser.add_argument("--cli", type=Path, metavar="DIR", help="also run the commands end to end on a folder in DIR")
    args = parser.parse_args(argv)
    if args.one:
        print(json.dumps(one(args.one, args.n, args.spend)))
        return 0
    print(f"load average {' '.join(f'{x:.2f}' for x in os.getloadavg())}; {os.cpu_count()} CPUs; "
          f"{args.n:,} activities", flush=True)
    spend = child("spend", args.n)["spend"]
    questions = ["plan"] + ([args.only] if args.only else ["budget", "best"])
    runs: dict[str, list[dict]] = {q: [] for q in questions}
    for _ in range(args.repeat):
        for q in questions:
            r = child(q, args.n, spend if q == "budget" else None)
            runs[q].append(r)
            print(f"  {q:<7} {r['seconds']:8.2f} s  peak {r['rss'] / 2 ** 20:7.0f} MiB  "
                  + "  ".join(f"{k} {v:,.0f}" for k, v in r.items() if k not in ("seconds", "rss")), flush=True)
    if args.cli:
        cli(args.n, args.cli, spend)
    plan = statistics.median(r["seconds"] for r in runs["plan"])
    ok = True
    for q in questions[1:]:
        s = statistics.median(r["seconds"] for r in runs[q])
        rss = max(r["rss"] for r in runs[q])
        ratio = s / plan
        met = ratio <= RATIO_TARGET if args.n <= 20000 else (s < BIG_SECONDS and rss < BIG_BYTES)
        ok &= met
        target = f"<= {RATIO_TARGET}x" if args.n <= 20000 else "< 120 s, < 2 GiB"
        print(f"{q:<7} {s:8.2f} s / plan {plan:.2f} s = {ratio:5.2f}x  peak {rss / 2 ** 20:,.0f} MiB  "
              f"({target})  {'PASS' if met else 'FAIL'}", flush=True)
    return 0 if ok else 1


if __name__ == "__main__":
    sys.exit(main())
