"""Benchmarks for activities on calendars of their own.

    python bench/bench_calendars.py

No targets come with this feature; the figures go into DEVELOPERS.md so that a change
that slows it down shows. Networks: bench/generate.py's random mixed-link projects
(invented, timing only) with a share of the activities moved to a six-day calendar or an
every-day calendar (seeded):

- CPM (Network + schedule) on 50,000 activities, 10% on other calendars, against the same
  network on one calendar (ratio measured in the same run);
- one least-cost plan 10 working days early on 200 activities (20% on other calendars) and
  on 1,000 activities (10%): the MILP with relations between calendars made exact on
  windows only where a solve breaks them;
- ``budget`` on the same 1,000 activities: the earliest finish within the least cost of
  finishing 10 days early (one MILP with the cost capped, then its plan), from a new
  ``Planner`` (issue target: under 5 s).
"""

from __future__ import annotations

import dataclasses
import os
import random
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

from generate import random_project  # noqa: E402
from hasten.planner import Planner  # noqa: E402
from hasten.project import Calendar, Project  # noqa: E402
from hasten.cpm import schedule
from hasten.network import Network  # noqa: E402

CALENDARS = (Calendar((0, 1, 2, 3, 4, 5, 6), (), "every-day"), Calendar((0, 1, 2, 3, 4, 5), (), "six-day"))


def with_calendars(project: Project, share: float, seed: int = 2) -> Project:
    rng = random.Random(seed)
    acts = tuple(dataclasses.replace(a, calendar=rng.choice(["every-day", "six-day"]))
                 if rng.random() < share else a for a in project.activities)
    return dataclasses.replace(project, activities=acts, calendars=CALENDARS)


def best_of(k: int, fn) -> float:
    times = []
    for _ in range(k):
        t = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t)
    return min(times)


def main() -> None:
    print(f"hasten calendars benchmark; load average {' '.join(f'{x:.2f}' for x in os.getloadavg())}")
    base = random_project(50_000, 1, 5_000, 3)
    mixed = with_calendars(base, 0.10)
    one = best_of(3, lambda: schedule(Network(base)))
    several = best_of(3, lambda: schedule(Network(mixed)))
    print(f"CPM, 50,000 activities: one calendar {one:.2f} s; 10% on two other calendars "
          f"{several:.2f} s ({several / one:.2f}x), best of 3")
    for n, share in ((200, 0.2), (1_000, 0.1)):
        project = with_calendars(random_project(n, 1, max(n // 10, 5), 3), share)
        t = time.perf_counter()
        study = Planner(project)
        plan = study.plan(study.normal_finish - 10)
        seconds = time.perf_counter() - t
        print(f"plan, {n} activities, {share:.0%} on other calendars, normal finish "
              f"{study.normal_finish} - 10 days: {seconds:.2f} s (added cost {plan.added_cost:,.0f}, "
              f"proven {plan.proven})")
    spend = plan.added_cost
    t = time.perf_counter()
    found = Planner(project).earliest_within(spend)
    seconds = time.perf_counter() - t
    print(f"budget, {n} activities, spend {spend:,.0f} (the least cost 10 days early): {seconds:.2f} s "
          f"(finish {found.finish}, added cost {found.added_cost:,.0f}; target < 5 s)")


if __name__ == "__main__":
    main()
