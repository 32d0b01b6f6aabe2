"""Benchmark of the critical path method end to end on a 50,000-activity network.

Run from the repository root with the virtualenv active::

    python bench/bench_cpm.py                      # writes the project to a new temp folder
    python bench/bench_cpm.py --workdir /tmp/hb    # keeps the folder and reuses it next time

The network comes from :func:`generate.random_project` (seed 1, links to up to 3 of the
previous n//10 activities, mixed FS/SS/FF/SF links with lags): invented data for timing.
It is written once as a project folder with ``write_project``; then

* end to end: ``hasten schedule DIR --json > /dev/null`` as a subprocess (Python start,
  imports, reading and validating the folder, both CPM passes, JSON output), best of N;
* in-process, best of N each, to show where the time goes: the start-up alone
  (``python -c "import hasten.cli"``), ``read_project``, ``schedule()`` (and the two passes
  inside it alone), the JSON rendering, and read + schedule + JSON with the cyclic garbage
  collector on and off (a diagnostic: how much of the time is collection).

Targets: end to end under 2 s on the 2-core benchmark machine; with ``--n 200000``, under 5 s
with ``--json`` and under 8 s as text, each command under 1 GiB of memory.
"""

from __future__ import annotations

import argparse
import cProfile
import gc
import io
import os
import pstats
import resource
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

from generate import project_folder, random_project  # noqa: E402
from hasten.formats import read_project  # noqa: E402
from hasten.project import Project  # noqa: E402
from hasten.cpm import schedule
from hasten.network import Network  # noqa: E402
from hasten import render_json  # noqa: E402

N = 50_000
SEED = 1
TARGET = 2.0  # seconds, end to end
#: activities -> (seconds with --json, seconds as text), end to end
TARGETS = {50_000: (2.0, None), 200_000: (5.0, 8.0)}


def hasten_command() -> list[str]:
    """The installed ``hasten`` console script next to this Python, else ``python -m hasten``."""
    script = Path(sys.executable).with_name("hasten")
    return [str(script)] if script.exists() else [sys.executable, "-m", "hasten"]


def best_of(repeat: int, fn) -> tuple[float, object]:
    """Least wall time of ``repeat`` calls, and the last result."""
    best, out = float("inf"), None
    for _ in range(repeat):
        t = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t)
    return best, out


def run(cmd: list[str], **kwargs) -> None:
    done = subprocess.run(cmd, stderr=subprocess.PIPE, check=False, **kwargs)
    if done.returncode != 0:
        raise RuntimeError(f"{' '.join(cmd)} failed ({done.returncode}): {done.stderr.decode()[-2000:]}")


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description="CPM end-to-end benchmark (50,000 activities)")
    parser.add_argument("--n", type=int, default=N, help="activities (default 50,000)")
    parser.add_argument("--repeat", type=int, default=3, help="runs per measurement (best reported)")
    parser.add_argument("--workdir", type=Path, default=None,
                        help="keep the generated project folder here and reuse it on the next run")
    parser.add_argument("--profile", action="store_true",
                        help="print a cProfile of read_project + schedule + JSON")
    args = parser.parse_args(argv)
    n, window = args.n, max(10, args.n // 10)

    print(f"hasten CPM benchmark; load average {' '.join(f'{x:.2f}' for x in os.getloadavg())}; "
          f"{os.cpu_count()} CPUs")
    t = time.perf_counter()
    project = random_project(n, seed=SEED, window=window)
    t_gen = time.perf_counter() - t
    with tempfile.TemporaryDirectory(prefix="hasten-bench-") as scratch:
        return measure(args, project, args.workdir or Path(scratch), t_gen)


def measure(args, project: Project, workdir: Path, t_gen: float) -> int:
    """Write (or reuse) the project folder, time everything, print the table."""
    n, window = len(project.activities), max(10, len(project.activities) // 10)
    folder, t_write = project_folder(project, workdir)
    size = sum(p.stat().st_size for p in folder.iterdir())
    print(f"network: {n} activities, {len(project.links)} links, window {window} "
          f"(generated in {t_gen:.1f} s); folder {folder} ({size / 1e6:.1f} MB"
          + ("" if t_write is None else f", write_project {t_write:.1f} s") + ")")

    cli = hasten_command() + ["schedule", str(folder), "--json"]
    with open(os.devnull, "wb") as null:
        t_cli, _ = best_of(args.repeat, lambda: run(cli, stdout=null))
        t_text, _ = best_of(args.repeat, lambda: run(cli[:-1], stdout=null))
    peak = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss * 1024  # the largest child
    t_start, _ = best_of(args.repeat, lambda: run([sys.executable, "-c", "import hasten.cli"]))
    t_read, read = best_of(args.repeat, lambda: read_project(folder))
    if read != project:
        raise RuntimeError("the project read back differs from the one written")
    t_cpm, sched = best_of(args.repeat, lambda: schedule(read))
    net = Network(read)
    t_passes, _ = best_of(args.repeat, lambda: net.backward(net.durations, max(
        e + d for e, d in zip(net.forward(net.durations), net.durations))))

    def to_json(p, s):  # what the command writes (render_json.schedule_json_text)
        return render_json.schedule_json_text(p, s, [])

    t_json, text = best_of(args.repeat, lambda: to_json(read, sched))

    def in_process():
        p = read_project(folder)
        return to_json(p, schedule(p))

    gc.collect()
    t_gc_on, _ = best_of(args.repeat, in_process)
    gc.disable()  # diagnostic only: how much of the in-process time is the cyclic garbage collector
    try:
        t_gc_off, _ = best_of(args.repeat, in_process)
    finally:
        gc.enable()

    json_target, text_target = TARGETS.get(n, (TARGET, None))
    rows = [
        ("hasten schedule DIR --json > /dev/null", t_cli, f"< {json_target:g} s",
         "PASS" if t_cli < json_target else "FAIL"),
        ("hasten schedule DIR > /dev/null (text)", t_text,
         f"< {text_target:g} s" if text_target else "", "" if text_target is None else
         "PASS" if t_text < text_target else "FAIL"),
        ("  peak memory of a command (MiB)", peak / 2**20, "< 1024",
         "PASS" if peak < 2**30 else "FAIL"),
        ("  Python start + import hasten.cli", t_start, "", ""),
        ("  read_project (read + validate)", t_read, "", ""),
        ("  schedule(): Network, passes, floats, paths", t_cpm, "", ""),
        ("    of which the forward + backward passes", t_passes, "", ""),
        ("  JSON rendering (schedule_json_text)", t_json, "", ""),
        ("in-process read + schedule + JSON, gc on", t_gc_on, "", ""),
        ("in-process read + schedule + JSON, gc off", t_gc_off, "", ""),
    ]
    print(f"\nnormal finish {sched.finish} working days, {sum(a.critical for a in sched.activities)} "
          f"critical activities, JSON {len(text) / 1e6:.1f} MB; best of {args.repeat} runs:")
    width = max(len(r[0]) for r in rows)
    print(f"  {'measurement':<{width}}  {'seconds':>8}  {'target':<7}  result")
    print(f"  {'-' * width}  {'-' * 8}  {'-' * 7}  ------")
    for name, seconds, target, result in rows:
        print(f"  {name:<{width}}  {seconds:8.3f}  {target:<7}  {result}".rstrip())

    if args.profile:
        prof = cProfile.Profile()
        prof.enable()
        p = read_project(folder)
        s = schedule(p)
        render_json.schedule_json_text(p, s, [])
        prof.disable()
        out = io.StringIO()
        pstats.Stats(prof, stream=out).sort_stats("cumulative").print_stats(30)
        print(out.getvalue())
    return 0 if all(r[3] != "FAIL" for r in rows) else 1


if __name__ == "__main__":
    sys.exit(main())
