"""Speed against the floors: a curve day against a warm re-solve, a plan against one raw
HiGHS solve, on two networks (invented data, timing only).

Run from the repository root with the virtualenv active::

    python bench/bench_speed.py curve --n 2000      # curve per day / warm_trace
    python bench/bench_speed.py plan --n 10000      # Planner.plan / highs_raw
    python bench/bench_speed.py all                 # both, at 2,000 and 10,000 activities

Networks: ``layered`` (:func:`floors.network`: about 2*sqrt(n) activities wide, 60 days of
compression at 10,000 activities touch about 58 % of the activities) and ``generated``
(:func:`generate.random_project`, seed 1, window n // 10, about 7 %).

* ``curve``: ``Planner(p).curve(normal, normal - 60)`` (Planner built in the timing) against
  :func:`floors.warm_trace` (the same LP built from arrays, the finish bound moved a day at
  a time, each re-solved from the previous basis); per day = total / 60. Median of
  ``--repeat`` runs, interleaved. **Target: at most 1.3x.**
* ``plan``: ``Planner(p).plan(normal - 60)`` against :func:`floors.highs_raw` (one build
  and solve of the whole LP), wall time in this process, median, interleaved.
  **Target: at most 1.5x.** The least costs must agree.

Both sides run with Python's cycle collector off, as the command line runs them
(``hasten.cli.main`` turns it off); ``--gc`` keeps it on (a program using the library).

While HiGHS runs, the BLAS threads numpy may have started must not spin: the table shows
the threads each BLAS library has (threadpoolctl) and the process's CPU time over its wall
time during the curve (about 1.0: one core; near 2.0 on two: something spins beside HiGHS).
"""

from __future__ import annotations

import argparse
import gc
import os
import statistics
import sys
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

import floors  # noqa: E402
from generate import random_project  # noqa: E402
from hasten.planner import Planner  # noqa: E402
from hasten.project import Activity, Link, LinkType, Project  # noqa: E402

COMPRESS = 60
CURVE_TARGET = 1.3
PLAN_TARGET = 1.5
FULL_CURVE_TARGET = 2.0


def layered(n: int) -> tuple[Project, list[dict]]:
    """floors.network(n) as a Project, and as the floors' dicts."""
    acts = floors.network(n)
    from datetime import date

    activities = tuple(Activity(a["id"], a["normal_duration"], crash_duration=a["crash_duration"],
                                cost=float(a["normal_cost"]), crash_cost=float(a["crash_cost"]))
                       for a in acts)
    links = tuple(Link(p["id"], a["id"], LinkType(p["type"]), p["lag"])
                  for a in acts for p in a["predecessors"])
    return Project(f"layered-{n}", date(2027, 1, 4), activities, links), acts


def generated(n: int) -> tuple[Project, list[dict]]:
    """generate.random_project(n) and the same network as the floors' dicts."""
    project = random_project(n, seed=1, window=max(10, n // 10))
    preds: dict[str, list[dict]] = {a.id: [] for a in project.activities}
    for k in project.links:
        preds[k.succ].append({"id": k.pred, "type": k.type.value, "lag": k.lag})
    acts = [{"id": a.id, "predecessors": preds[a.id], "normal_duration": a.duration,
             "crash_duration": a.crash_duration, "normal_cost": a.cost, "crash_cost": a.crash_cost}
            for a in project.activities]
    return project, acts


def blas_threads() -> str:
    try:
        from threadpoolctl import threadpool_info
    except ImportError:
        return "threadpoolctl not installed"
    return ", ".join(f"{i['internal_api']} {i['num_threads']}" for i in threadpool_info()) or "none"


def _timed(fn):
    wall, cpu = time.perf_counter(), time.process_time()
    out = fn()
    return out, time.perf_counter() - wall, time.process_time() - cpu


def _against_warm_trace(project: Project, acts: list[dict], repeat: int, longest=None, shortest=None):
    """Planner(project).curve(longest, shortest) and floors.warm_trace over the same days,
    ``repeat`` times interleaved: (curve, medians ours / floor, ratio, cpu/wall, floor's
    cost at the last day, whether the two agree there)."""
    ours, floor, load = [], [], []
    for _ in range(repeat):
        curve, wall, cpu = _timed(lambda: Planner(project).curve(longest, shortest))
        ours.append(wall)
        load.append(cpu / wall)
        normal, last_day = curve.normal_finish, curve.points[-1].finish
        (cost, t), _, _ = _timed(lambda: floors.warm_trace(acts, normal, last_day))
        floor.append(t)
    mine, theirs = statistics.median(ours), statistics.median(floor)
    last = curve.points[-1].added_cost
    agree = abs(last - cost) <= 1e-6 * max(1.0, abs(cost))
    return curve, mine, theirs, mine / theirs, statistics.median(load), cost, agree


def bench_curve(name: str, project: Project, acts: list[dict], repeat: int) -> bool:
    normal = Planner(project).normal_finish
    curve, mine, theirs, ratio, load, cost, agree = _against_warm_trace(
        project, acts, repeat, normal, normal - COMPRESS)
    ok = ratio <= CURVE_TARGET and agree
    print(f"{name:<22} curve {COMPRESS} days  {mine:7.3f} s ({1000 * mine / COMPRESS:6.1f} ms/day)  warm_trace "
          f"{theirs:7.3f} s  ratio {ratio:5.2f}x (<= {CURVE_TARGET}x)  cpu/wall {load:.2f}  "
          f"cost {curve.points[-1].added_cost:,.0f}/{cost:,.0f}  {'PASS' if ok else 'FAIL'}", flush=True)
    return ok


def bench_fullcurve(name: str, project: Project, acts: list[dict], repeat: int) -> bool:
    """The whole curve, normal finish to the shortest, against floors.warm_trace over the
    same days (its build and first solve included, as ours includes Planner())."""
    curve, mine, theirs, ratio, load, cost, agree = _against_warm_trace(project, acts, repeat)
    ok = ratio <= FULL_CURVE_TARGET and agree
    print(f"{name:<22} whole curve {len(curve.points)} points  {mine:7.3f} s  warm_trace {theirs:7.3f} s  "
          f"ratio {ratio:5.2f}x (<= {FULL_CURVE_TARGET}x)  cpu/wall {load:.2f}  "
          f"cost {curve.points[-1].added_cost:,.0f}/{cost:,.0f}  {'PASS' if ok else 'FAIL'}", flush=True)
    return ok


def bench_plan(name: str, project: Project, acts: list[dict], repeat: int) -> bool:
    normal = Planner(project).normal_finish
    target = normal - COMPRESS
    ours, floor = [], []
    for _ in range(repeat):
        plan, wall, _ = _timed(lambda: Planner(project).plan(target))
        ours.append(wall)
        (cost, t), _, _ = _timed(lambda: floors.highs_raw(acts, target))
        floor.append(t)
    ratio = statistics.median(ours) / statistics.median(floor)
    agree = abs(plan.added_cost - cost) <= 1e-6 * max(1.0, abs(cost))
    ok = ratio <= PLAN_TARGET and agree
    print(f"{name:<22} plan {COMPRESS} days early  {statistics.median(ours):7.3f} s  highs_raw "
          f"{statistics.median(floor):7.3f} s  ratio {ratio:5.2f}x (<= {PLAN_TARGET}x)  "
          f"cost {plan.added_cost:,.0f}/{cost:,.0f}  {'PASS' if ok else 'FAIL'}", flush=True)
    return ok


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("what", choices=["curve", "plan", "fullcurve", "all"])
    parser.add_argument("--n", type=int, action="append", help="activities (repeatable)")
    parser.add_argument("--net", choices=["layered", "generated", "both"], default="both")
    parser.add_argument("--repeat", type=int, default=3)
    parser.add_argument("--gc", action="store_true", help="keep the cycle collector on")
    args = parser.parse_args(argv)
    if not args.gc:
        gc.disable()
    print(f"load average {' '.join(f'{x:.2f}' for x in os.getloadavg())}; {os.cpu_count()} CPUs; "
          f"BLAS threads: {blas_threads()}; cycle collector {'on' if args.gc else 'off'}",
          flush=True)
    sizes = args.n or {"plan": [10000], "fullcurve": [2000]}.get(args.what, [2000, 10000])
    nets = ["layered", "generated"] if args.net == "both" else [args.net]
    ok = True
    for n in sizes:
        for net in nets:
            project, acts = (layered if net == "layered" else generated)(n)
            label = f"{net} {n:,}"
            if args.what in ("curve", "all"):
                ok &= bench_curve(label, project, acts, args.repeat)
            if args.what == "fullcurve" or (args.what == "all" and n <= 2000):
                ok &= bench_fullcurve(label, project, acts, args.repeat)
            if args.what in ("plan", "all") and (args.what == "plan" or n >= 10000):
                ok &= bench_plan(label, project, acts, args.repeat)
    return 0 if ok else 1


if __name__ == "__main__":
    sys.exit(main())
