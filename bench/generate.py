"""Random mixed-link project networks for benchmarks (invented data, for timing only)."""

from __future__ import annotations

import random
import shutil
import time
from datetime import date
from pathlib import Path

from hasten.formats import read_project, write_project
from hasten.project import Activity, Link, LinkType, Project

__all__ = ["random_project", "project_folder"]

_TYPES = [LinkType.FS] * 14 + [LinkType.SS] * 3 + [LinkType.FF] * 2 + [LinkType.SF]
_TRADES = ["earthworks", "concrete", "steel", "masonry", "mechanical", "electrical", "finishes"]


def random_project(n: int, seed: int = 1, window: int = 40, max_preds: int = 3) -> Project:
    """A layered random network of ``n`` activities, each linked to 1..``max_preds``
    earlier activities within ``window`` places, with mixed link types and lags."""
    rng = random.Random(seed)
    acts = []
    links = []
    for i in range(n):
        d = rng.randint(1, 30)
        c = d - rng.randint(0, d // 2)
        cost = float(rng.randint(5, 200) * 500)
        slope = float(rng.randint(2, 60) * 50)
        acts.append(Activity(id=f"T{i:05d}", duration=d, name=f"Task {i}", trade=rng.choice(_TRADES),
                             crash_duration=c, cost=cost, crash_cost=cost + slope * (d - c)))
        if i == 0:
            continue
        preds = rng.sample(range(max(0, i - window), i), min(i, rng.randint(1, max_preds)))
        for p in sorted(preds):
            t = rng.choice(_TYPES)
            lag = rng.choice([0, 0, 0, 0, 1, 2, 3, 5, -1]) if t is not LinkType.FS else rng.choice([0] * 6 + [1, 2, 5])
            links.append(Link(f"T{p:05d}", f"T{i:05d}", t, lag))
    return Project(name=f"random-{n}-{seed}", start=date(2027, 1, 4), activities=tuple(acts),
                   links=tuple(links))


def project_folder(project: Project, workdir: Path) -> tuple[Path, float | None]:
    """The project written as a folder with ``write_project``; returns (path, seconds to write).

    A folder written into ``workdir`` by an earlier run is reused when it reads back equal
    to ``project`` (then the seconds are ``None``).
    """
    path = workdir / project.name
    if path.is_dir():
        try:
            if read_project(path) == project:
                return path, None
        except Exception:  # noqa: BLE001 - a stale or broken folder is simply rewritten
            pass
        shutil.rmtree(path)
    workdir.mkdir(parents=True, exist_ok=True)
    t = time.perf_counter()
    write_project(project, path)
    return path, time.perf_counter() - t
