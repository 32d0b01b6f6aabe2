"""Benchmarks of the schedule risk simulation (hasten.simulation, hasten.cluster).

    python bench/bench_risk.py                 # both measurements
    python bench/bench_risk.py --only local    # 10,000 runs only
    python bench/bench_risk.py --only cluster  # 100,000 runs, in-process vs Dask
    python bench/bench_risk.py --only plans    # the confidence plan, 200 scenarios x 300 activities

Networks: bench/generate.py's random mixed-link projects (invented, timing only), 2,000
activities, window 200, seed 1; every activity ranged "-10%, +25%" (PERT-beta).

- **10,000 runs on 2,000 activities** in-process, best of ``--repeat``: independent
  durations; the same with a trade correlation of 0.5 on every trade; and with 10 % of the
  activities on a six-day or every-day calendar. **Target: under 10 s** (printed, not
  asserted).
- **100,000 runs on 2,000 activities**, in-process against a 2-worker local Dask cluster
  (the cluster's start-up shown apart); the figures must be equal (same seed); the speed-up
  is printed. Needs ``pip install "dask[distributed]"``.
- **The least-cost plan for 80 % confidence, 200 scenarios on 300 activities**
  (:func:`hasten.robust.risk_plans`; the same generator, seed 1, window 30, every activity
  ranged "-10%, +25%"), the target a third of the way from the normal to the shortest
  finish: the whole question (deterministic plan, scenarios, the sample-average model with
  its tie-break, 2 x 5,000 fresh runs) and the model's solve alone. **Target: under 60 s.**
"""

from __future__ import annotations

import argparse
import dataclasses
import os
import random
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

from generate import random_project  # noqa: E402
from hasten.network import Network  # noqa: E402
from hasten.project import Calendar, Project, Risk  # noqa: E402
from hasten.simulation import simulate  # noqa: E402
from hasten.uncertainty import duration_ranges  # noqa: E402

CALENDARS = (Calendar((0, 1, 2, 3, 4, 5, 6), (), "every-day"), Calendar((0, 1, 2, 3, 4, 5), (), "six-day"))
SPREAD = "-10%, +25%"


def with_calendars(project: Project, share: float, seed: int = 2) -> Project:
    rng = random.Random(seed)
    acts = tuple(dataclasses.replace(a, calendar=rng.choice(["every-day", "six-day"]))
                 if rng.random() < share else a for a in project.activities)
    return dataclasses.replace(project, activities=acts, calendars=CALENDARS)


def timed(fn, repeat: int = 1):
    best, out = float("inf"), None
    for _ in range(repeat):
        t = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t)
    return best, out


def local(n: int, runs: int, repeat: int) -> list[tuple[str, str, str]]:
    base = random_project(n, 1, max(n // 10, 5), 3)
    trades = sorted({a.trade for a in base.activities})
    rows = []
    for label, project, kw in (
            ("independent", base, {}),
            ("trade correlation 0.5", base, {"correlation": {t: 0.5 for t in trades}}),
            ("10% on other calendars", with_calendars(base, 0.10), {})):
        net = Network(project)
        ranges = duration_ranges(project, default=SPREAD, **kw)
        seconds, res = timed(lambda: simulate(net, ranges, runs, seed=1), repeat)
        print(f"{runs:,} runs, {n:,} activities ({len(net.pred):,} links), {label}: {seconds:.2f} s; "
              f"planned {res.planned_finish}, P(meet planned) {res.p_meet_planned:.3f}, "
              f"P50 {res.percentiles['p50']}, P80 {res.percentiles['p80']}, P90 {res.percentiles['p90']}")
        rows.append((f"{runs:,} runs x {n:,} activities, {label}", f"{seconds:.2f} s", "< 10 s"))
    return rows


def _cpu() -> float:
    """CPU seconds (user + system) of the calling process so far."""
    import resource
    r = resource.getrusage(resource.RUSAGE_SELF)
    return r.ru_utime + r.ru_stime


def cluster(n: int, runs: int, workers: int) -> list[tuple[str, str, str]]:
    try:
        from hasten.cluster import cluster_runner
        import dask.distributed  # noqa: F401
    except ImportError:
        print('the cluster benchmark needs Dask: pip install "dask[distributed]"')
        return []
    project = random_project(n, 1, max(n // 10, 5), 3)
    net = Network(project)
    ranges = duration_ranges(project, default=SPREAD)
    cpu = _cpu()
    here_s, here = timed(lambda: simulate(net, ranges, runs, seed=1))
    here_cpu = _cpu() - cpu
    print(f"{runs:,} runs, {n:,} activities, in-process: {here_s:.2f} s ({here_cpu:.1f} CPU s)")
    t = time.perf_counter()
    with cluster_runner(workers=workers) as runner:
        start = time.perf_counter() - t
        before, cpu = runner.client.run(_cpu), _cpu()
        there_s, there = timed(lambda: simulate(net, ranges, runs, seed=1, runner=runner))
        after, main_cpu = runner.client.run(_cpu), _cpu() - cpu
    total = time.perf_counter() - t
    worker_cpu = sum(after[w] - before[w] for w in before)
    print(f"{runs:,} runs, {n:,} activities, {workers}-worker local Dask cluster: {there_s:.2f} s "
          f"({worker_cpu:.1f} CPU s in the workers, {main_cpu:.1f} in this process; + {start:.2f} s to "
          f"start the cluster, {total:.2f} s with start and close); speed-up {here_s / there_s:.2f}x "
          f"({here_s / total:.2f}x counting the start); same figures: {here == there}")
    print(f"(CPU s per wall s: in-process {here_cpu / here_s:.2f}, cluster {(worker_cpu + main_cpu) / there_s:.2f}: "
          f"on a shared machine the kernel shares the cores between sessions, so the workers get no "
          f"more than this session's share)")
    return [(f"{runs:,} runs in-process", f"{here_s:.2f} s", ""),
            (f"{runs:,} runs on {workers} Dask workers", f"{there_s:.2f} s", ""),
            ("speed-up (start-up excluded)", f"{here_s / there_s:.2f}x", ""),
            ("CPU s: in-process / cluster", f"{here_cpu:.0f} / {worker_cpu + main_cpu:.0f}", ""),
            ("same figures as in-process", str(here == there), "True")]


def plans(n: int, scenarios: int) -> list[tuple[str, str, str]]:
    import math

    from hasten.planner import Planner
    from hasten.robust import risk_plans
    from hasten.robust import fewest_changes
    from hasten.scenario_model import ScenarioModel
    from hasten.simulation import BLOCK, RiskModel
    from hasten.uncertainty import project_ranges

    project = dataclasses.replace(random_project(n, 1, max(n // 10, 5), 3), risk=Risk(SPREAD))
    planner = Planner(project)
    target = planner.normal_finish - (planner.normal_finish - planner.shortest_finish) // 3
    seconds, out = timed(lambda: risk_plans(project, target=target, confidence=0.8, scenarios=scenarios, seed=1))
    det, ch = out.deterministic, out.chosen
    print(f"confidence plan, {scenarios} scenarios x {n} activities, target {target} (normal "
          f"{planner.normal_finish}, shortest {planner.shortest_finish}): {seconds:.1f} s in all; added cost "
          f"{det.added_cost:,.0f} -> {ch.added_cost:,.0f}; P(meet) sampled {ch.in_sample_meet:.3f}, fresh runs "
          f"{ch.p_meet:.3f} ({ch.interval[0]:.3f}-{ch.interval[1]:.3f}); deterministic plan {det.p_meet:.3f}; "
          f"proven {ch.proven}")
    net = planner.network
    drawn = RiskModel(net, project_ranges(planner.project), 1).durations(
        scenarios, 0, math.ceil(scenarios / BLOCK)).T

    def model_only():
        model = ScenarioModel(net, drawn, target=target, confidence=0.8)
        sol = model.solve()
        return fewest_changes(model, sol) or sol, model

    solve_s, (sol, model) = timed(model_only)
    print(f"  the sample-average model alone: {solve_s:.1f} s ({len(model._seen):,} path rows kept of "
          f"{scenarios * len(net.pred):,} link rows in the copies written whole)")
    return [(f"80% confidence plan, {scenarios} scenarios x {n} activities", f"{seconds:.1f} s", "< 60 s"),
            ("  the sample-average model alone (timed again)", f"{solve_s:.1f} s", "")]


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--only", choices=["local", "cluster", "plans"])
    parser.add_argument("--n", type=int, default=2_000)
    parser.add_argument("--repeat", type=int, default=2)
    parser.add_argument("--workers", type=int, default=2)
    args = parser.parse_args()
    print(f"hasten risk benchmark; load average {' '.join(f'{x:.2f}' for x in os.getloadavg())}; "
          f"{os.cpu_count()} cores")
    rows = []
    if args.only in (None, "local"):
        rows += local(args.n, 10_000, args.repeat)
    if args.only in (None, "cluster"):
        rows += cluster(args.n, 100_000, args.workers)
    if args.only in (None, "plans"):
        rows += plans(300, 200)
    width = max(len(r[0]) for r in rows) if rows else 0
    print()
    for what, value, target in rows:
        print(f"{what:<{width}}  {value:>9}  {target}")


if __name__ == "__main__":
    main()
