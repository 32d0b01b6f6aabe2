"""Benchmarks for discrete acceleration options (the MILP).

    python bench/bench_discrete.py            # both
    python bench/bench_discrete.py psplib     # PSPLIB j30 multi-mode: the exact curve
    python bench/bench_discrete.py options    # 500 activities x 3 options, one target

Targets (issue "Discrete acceleration options"): the j30 curve at every deadline from
shortest to longest, each point proven optimal, in under 60 s; 500 activities with 3
options each at one target, proven optimal, in under 30 s.
"""

from __future__ import annotations

import random
import sys
import time
from pathlib import Path

from hasten.planner import Planner
from hasten.formats.research import read_research
from hasten.project import Activity, Link, LinkType, Option, Project
from hasten.dominated import drop_dominated

ROOT = Path(__file__).resolve().parents[1]


def psplib() -> list[tuple[str, str, str, str]]:
    path = ROOT / "tests" / "data" / "psplib_mm" / "j3010_1.mm"
    t0 = time.perf_counter()
    project, _ = drop_dominated(read_research(path))
    study = Planner(project)
    points = study.curve()
    seconds = time.perf_counter() - t0
    proven = all(p.proven for p in points)
    return [("j3010_1.mm exact curve", f"{len(points)} deadlines {points[-1].finish}..{points[0].finish}, "
             f"all proven: {proven}", f"{seconds:.2f} s", "PASS" if proven and seconds < 60 else "FAIL")]


def options_project(n: int = 500, seed: int = 3) -> Project:
    """Invented random network (timing only): n activities, 3 options each, FS/SS links."""
    rng = random.Random(seed)
    acts, links = [], []
    for i in range(n):
        d = rng.randint(6, 20)
        opts = []
        for k in range(3):
            od = max(1, d - rng.randint(1, d // 2))
            opts.append(Option(f"way {k + 1}", od, float(rng.randint(1, 40) * 250 * (d - od))))
        acts.append(Activity(f"T{i:04d}", d, cost=float(rng.randint(10, 90) * 1000), options=tuple(opts)))
        for p in sorted(rng.sample(range(max(0, i - 25), i), min(i, rng.randint(1, 2)))):
            kind = LinkType.FS if rng.random() < 0.85 else LinkType.SS
            links.append(Link(f"T{p:04d}", f"T{i:04d}", kind, rng.choice([0, 0, 1, 2])))
    from datetime import date

    return Project("options-500 (invented)", date(2027, 1, 4), tuple(acts), tuple(links))


def options() -> list[tuple[str, str, str, str]]:
    project, _ = drop_dominated(options_project())
    t0 = time.perf_counter()
    study = Planner(project)
    target = study.normal_finish - (study.normal_finish - study.shortest_finish) // 2
    plan = study.plan(target, next_day=False)
    seconds = time.perf_counter() - t0
    return [("500 x 3 options, one target", f"target {target} (normal {study.normal_finish}, "
             f"shortest {study.shortest_finish}), proven: {plan.proven}", f"{seconds:.2f} s",
             "PASS" if plan.proven and seconds < 30 else "FAIL")]


def main(argv: list[str]) -> None:
    which = argv[1] if len(argv) > 1 else "all"
    rows = []
    if which in ("all", "psplib"):
        rows += psplib()
    if which in ("all", "options"):
        rows += options()
    width = max(len(r[0]) for r in rows)
    for name, what, value, verdict in rows:
        print(f"{name:<{width}}  {value:>9}  {verdict}  ({what})")


if __name__ == "__main__":
    main(sys.argv)
