"""Benchmarks of the least-cost acceleration LP (invented random networks, timing only).

Run from the repository root with the virtualenv active::

    python bench/bench_lp.py plan        # one target plan on 10,000 activities
    python bench/bench_lp.py curve       # 60 days of the curve on 10,000 activities vs naive PuLP
    python bench/bench_lp.py fullcurve   # the whole curve on 2,000 activities
    python bench/bench_lp.py memory      # peak RSS, 20,000 activities, fresh process
    python bench/bench_lp.py all

Options: ``--repeat N`` (default 3; the median is reported), ``--naive-days K`` (default 4),
``--workdir DIR`` (where the generated project folder for ``plan`` is kept and reused),
``--profile`` (print a cProfile of the measured call after the table).

Every network comes from :func:`generate.random_project` with a fixed seed, so every run
measures the same problems. The machine may be shared: compare ratios measured in the same
run, and note the load (printed at the start).
"""

from __future__ import annotations

import argparse
import cProfile
import io
import json
import os
import pstats
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from dataclasses import replace
from importlib import metadata
from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

import highspy  # noqa: E402
import pulp  # noqa: E402

from generate import project_folder, random_project  # noqa: E402
from hasten.solver_highs import quiet_stdout  # noqa: E402  (the banner silencer hasten uses)
from hasten.planner import Planner  # noqa: E402
from hasten.project import LinkType, Project  # noqa: E402
from hasten import crash_ties  # noqa: E402
from hasten.crash_model import Objective  # noqa: E402

SEED = 1
COMPRESS = 60  # working days taken off the normal finish for the plan and the curve

# targets (seconds, bytes, or ratios)
PLAN_RATIO_TARGET = 1.5
PLAN_CLI_TARGET = 5.0
CURVE_SPEEDUP_TARGET = 50.0
CURVE_TOTAL_TARGET = 10.0
FULLCURVE_TARGET = 10.0
MEMORY_TARGET = 2 * 1024**3


# ------------------------------------------------------------------------ helpers

def network(n: int) -> Project:
    """The benchmark network of ``n`` activities (window n//10 keeps the finish moderate)."""
    return random_project(n, seed=SEED, window=max(10, n // 10))


def timed(fn, *args, **kwargs):
    """(seconds, result) of one call."""
    t = time.perf_counter()
    out = fn(*args, **kwargs)
    return time.perf_counter() - t, out


def median(xs) -> float:
    return statistics.median(xs)


def load() -> str:
    """The 1, 5 and 15 minute load averages."""
    return " ".join(f"{x:.2f}" for x in os.getloadavg())


def table(title: str, rows: list[tuple]) -> None:
    """Rows of (measurement, value, target, verdict) as a plain-text table."""
    print(f"\n{title}")
    head = ("measurement", "value", "target", "result")
    cells = [head] + [tuple("" if c is None else str(c) for c in r) for r in rows]
    width = [max(len(r[k]) for r in cells) for k in range(4)]
    for k, r in enumerate(cells):
        print("  " + "  ".join(c.ljust(w) for c, w in zip(r, width)).rstrip())
        if k == 0:
            print("  " + "  ".join("-" * w for w in width))


def verdict(ok: bool) -> str:
    return "PASS" if ok else "FAIL"


def hasten_command() -> list[str]:
    """The installed ``hasten`` console script next to this Python, else ``python -m hasten``."""
    script = Path(sys.executable).with_name("hasten")
    return [str(script)] if script.exists() else [sys.executable, "-m", "hasten"]


def profile(fn, top: int = 25) -> None:
    """Print the functions with the most cumulative time in one call of ``fn``."""
    prof = cProfile.Profile()
    prof.enable()
    fn()
    prof.disable()
    out = io.StringIO()
    stats = pstats.Stats(prof, stream=out).sort_stats("cumulative")
    stats.print_stats(top)
    print(out.getvalue())


# ------------------------------------------------------------------------ the reference LP

class Arrays:
    """The project's numbers as numpy arrays (extracted once, outside the timing)."""

    _CODE = {LinkType.FS: 0, LinkType.SS: 1, LinkType.FF: 2, LinkType.SF: 3}

    def __init__(self, project: Project):
        acts = project.activities
        index = {a.id: i for i, a in enumerate(acts)}
        self.n = len(acts)
        self.duration = np.array([a.duration for a in acts], dtype=float)
        owner, days, per_day = [], [], []
        for i, a in enumerate(acts):
            for s in a.segments():
                owner.append(i)
                days.append(s.days)
                per_day.append(s.cost_per_day)
        self.step_owner = np.array(owner, dtype=np.int64)
        self.step_days = np.array(days, dtype=float)
        self.step_cost = np.array(per_day, dtype=float)
        self.pred = np.array([index[k.pred] for k in project.links], dtype=np.int64)
        self.succ = np.array([index[k.succ] for k in project.links], dtype=np.int64)
        self.kind = np.array([self._CODE[k.type] for k in project.links], dtype=np.int64)
        self.lag = np.array([k.lag for k in project.links], dtype=float)


def reference_lp(a: Arrays, target: float) -> highspy.HighsLp:
    """The least-cost LP built directly from arrays, column-wise, for ``highspy``.

    Columns: s_i (n), f_i (n), T, then one shortening column y_k per cost step.
    Rows: f_i - s_i + sum_k y_ik = D_i; per link ``later - earlier >= lag`` (FS s_j - f_i,
    SS s_j - s_i, FF f_j - f_i, SF f_j - s_i); f_i - T <= 0. Objective: sum cost_k y_k.
    T has upper bound ``target``.
    """
    n, m, k = a.n, len(a.pred), len(a.step_owner)
    s = np.arange(n)
    f = n + s
    t_col = 2 * n
    y = 2 * n + 1 + np.arange(k)
    later = np.where(a.kind <= 1, s[a.succ], f[a.succ])  # FS, SS constrain the successor's start
    earlier = np.where((a.kind == 0) | (a.kind == 2), f[a.pred], s[a.pred])  # FS, FF the pred's finish
    link_rows = n + np.arange(m)
    fin_rows = n + m + s
    rows = np.concatenate([s, s, a.step_owner, link_rows, link_rows, fin_rows, fin_rows])
    cols = np.concatenate([f, s, y, later, earlier, f, np.full(n, t_col)])
    vals = np.concatenate([np.ones(n), -np.ones(n), np.ones(k), np.ones(m), -np.ones(m),
                           np.ones(n), -np.ones(n)])
    order = np.argsort(cols, kind="stable")
    num_col, num_row = 2 * n + 1 + k, 2 * n + m
    inf = highspy.kHighsInf

    lp = highspy.HighsLp()
    lp.num_col_, lp.num_row_ = num_col, num_row
    lp.col_cost_ = np.concatenate([np.zeros(2 * n + 1), a.step_cost])
    lp.col_lower_ = np.zeros(num_col)
    lp.col_upper_ = np.concatenate([np.full(2 * n, inf), [float(target)], a.step_days])
    lp.row_lower_ = np.concatenate([a.duration, a.lag, np.full(n, -inf)])
    lp.row_upper_ = np.concatenate([a.duration, np.full(m, inf), np.zeros(n)])
    lp.a_matrix_.format_ = highspy.MatrixFormat.kColwise
    lp.a_matrix_.num_col_, lp.a_matrix_.num_row_ = num_col, num_row
    lp.a_matrix_.start_ = np.concatenate([[0], np.cumsum(np.bincount(cols, minlength=num_col))]).astype(np.int32)
    lp.a_matrix_.index_ = rows[order].astype(np.int32)
    lp.a_matrix_.value_ = vals[order]
    return lp


def reference_solve(a: Arrays, target: float) -> tuple[float, float, float, float]:
    """Build, pass and run the reference LP; (build, pass, run seconds, optimum)."""
    t0 = time.perf_counter()
    lp = reference_lp(a, target)
    t1 = time.perf_counter()
    with quiet_stdout():  # HiGHS prints a banner on its first model
        h = highspy.Highs()
    h.setOptionValue("output_flag", False)
    h.passModel(lp)
    t2 = time.perf_counter()
    h.run()
    t3 = time.perf_counter()
    if h.getModelStatus() != highspy.HighsModelStatus.kOptimal:
        raise RuntimeError(f"reference LP: {h.modelStatusToString(h.getModelStatus())}")
    return t1 - t0, t2 - t1, t3 - t2, h.getInfo().objective_function_value


def reference_trace(a: Arrays, normal: int, days: int) -> tuple[float, dict[int, float]]:
    """The reference LP traced with raw highspy: built once at ``normal - 1``, then each
    following day only T's bound is changed and HiGHS re-solves warm. Returns the seconds
    for all ``days`` days and the least cost of each finish: the floor of "one warm
    re-solve per day" on this machine, with no bookkeeping around it."""
    t = time.perf_counter()
    lp = reference_lp(a, normal - 1)
    with quiet_stdout():
        h = highspy.Highs()
    h.setOptionValue("output_flag", False)
    h.passModel(lp)
    costs = {}
    for day in range(1, days + 1):
        if day > 1:
            h.changeColBounds(2 * a.n, 0.0, float(normal - day))
        h.run()
        if h.getModelStatus() != highspy.HighsModelStatus.kOptimal:
            raise RuntimeError(f"reference LP at {normal - day}: {h.modelStatusToString(h.getModelStatus())}")
        costs[normal - day] = h.getInfo().objective_function_value
    return time.perf_counter() - t, costs


# ------------------------------------------------------------------------ the naive PuLP way

def naive_pulp_cost(a: Arrays, target: int) -> float:
    """The same LP rebuilt from scratch as a PuLP problem and solved with CBC: the way a
    first attempt would trace a curve, one fresh model per day."""
    prob = pulp.LpProblem("naive", pulp.LpMinimize)
    s = [prob.add_variable(f"s{i}", 0) for i in range(a.n)]
    f = [prob.add_variable(f"f{i}", 0) for i in range(a.n)]
    finish = prob.add_variable("T", 0, target)
    y = [prob.add_variable(f"y{k}", 0, float(d)) for k, d in enumerate(a.step_days.tolist())]
    terms: list[list] = [[(f[i], 1.0), (s[i], -1.0)] for i in range(a.n)]
    for k, i in enumerate(a.step_owner.tolist()):
        terms[i].append((y[k], 1.0))
    for i in range(a.n):
        prob.addConstraint(pulp.LpConstraint(pulp.LpAffineExpression(terms[i]), pulp.LpConstraintEQ,
                                             f"d{i}", float(a.duration[i])))
    for e, (i, j, kind, lag) in enumerate(zip(a.pred.tolist(), a.succ.tolist(), a.kind.tolist(),
                                              a.lag.tolist())):
        later = s[j] if kind <= 1 else f[j]
        earlier = f[i] if kind in (0, 2) else s[i]
        prob.addConstraint(pulp.LpConstraint(pulp.LpAffineExpression([(later, 1.0), (earlier, -1.0)]),
                                             pulp.LpConstraintGE, f"l{e}", lag))
    for i in range(a.n):
        prob.addConstraint(pulp.LpConstraint(pulp.LpAffineExpression([(f[i], 1.0), (finish, -1.0)]),
                                             pulp.LpConstraintLE, f"t{i}", 0.0))
    prob.setObjective(pulp.LpAffineExpression(list(zip(y, a.step_cost.tolist()))))
    status = prob.solve(pulp.PULP_CBC_CMD(msg=False))
    if status != pulp.LpStatusOptimal:
        raise RuntimeError(f"naive PuLP model: {pulp.LpStatus[status]}")
    return float(pulp.value(prob.objective) or 0.0)


# ------------------------------------------------------------------------ plan

def plan_breakdown(project: Project, target: int) -> dict[str, float]:
    """Where the time of ``Planner(project).plan(target)`` goes, step by step as ``Planner.plan``
    does it on the part of the network that can matter (hasten.partial; uses internal names)."""
    from hasten.partial import PartialSolver
    from hasten.cpm import schedule

    out: dict[str, float] = {}
    out["Planner(): network, normal CPM, checker"], st = timed(Planner, project)
    out["total floats at normal durations"], focus = timed(PartialSolver, st.network)
    reach = st.normal_finish - target + 1  # the plan's day and the next
    out["part: sub-network and model build"], (model, keep) = timed(focus._part_for, reach)
    out[f"  (part: {len(keep)} of {len(project.activities)} activities)"] = 0.0
    out["first least-cost solve (pass to HiGHS + run)"], sol = timed(model.solve, Objective.COST, target=target,
                                                                     duals=True)
    out["tie-break MILP (fewest activities crashed)"], better = timed(crash_ties.fewest_crashed, model, model._last, target)
    if better is not None and better.added_cost <= sol.added_cost + 1e-6 * max(1.0, sol.added_cost):
        sol = better
    durations = np.asarray(st.network.durations)
    durations[keep] = sol.durations
    out["whole network: forward pass of the plan"], starts = timed(st.network.forward, durations)
    whole = replace(sol, durations=tuple(durations.tolist()), starts=tuple(starts))
    out["check of the plan"], _ = timed(st._checked, whole, target)
    out["next day: warm re-solve (part)"], nxt = timed(model.solve, Objective.COST, target=target - 1)
    out["CPM of the plan"], _ = timed(schedule, st.network, whole.durations)
    return out


def whole_model_plan(project: Project, target: int):
    """``Planner.plan`` on the whole network's model: once the whole model is built the study
    no longer solves on parts (hasten.partial)."""
    st = Planner(project)
    st.model  # noqa: B018 - build it
    return st.plan(target)


def bench_plan(args) -> bool:
    n = 10_000
    project = network(n)
    t_arrays, arrays = timed(Arrays, project)
    folder, t_write = project_folder(project, args.workdir)
    st = Planner(project)
    normal = st.normal_finish
    target = normal - COMPRESS
    print(f"\n[plan] {n} activities, {len(project.links)} links, window {n // 10}; normal finish "
          f"{normal} working days, target {target}; folder {folder}"
          + ("" if t_write is None else f" (write_project: {t_write:.1f} s)"))

    ref, ref_parts, full, whole, parts, cli = [], [], [], [], [], []
    ref_cost = plan_cost = cli_cost = None
    for _ in range(args.repeat):  # interleaved, so that load changes hit all alike
        b, p, r, ref_cost = reference_solve(arrays, target)
        ref.append(b + p + r)
        ref_parts.append((b, p, r))
        seconds, plan = timed(lambda: Planner(project).plan(target))
        full.append(seconds)
        plan_cost = plan.added_cost
        seconds, whole_plan = timed(whole_model_plan, project, target)
        whole.append(seconds)
        whole_cost = whole_plan.added_cost
        try:
            parts.append(plan_breakdown(project, target))
        except (AttributeError, TypeError) as exc:  # the internals it follows have changed
            print(f"  (no breakdown: {exc!r})")
        t = time.perf_counter()
        done = subprocess.run(hasten_command() + ["plan", str(folder), "--finish", str(target), "--json"],
                              stdout=subprocess.PIPE, stderr=subprocess.PIPE, check=False)
        cli.append(time.perf_counter() - t)
        if done.returncode != 0:
            raise RuntimeError(f"hasten plan failed ({done.returncode}): {done.stderr.decode()[-2000:]}")
        cli_cost = json.loads(done.stdout)["added_cost"]

    same = (abs(ref_cost - plan_cost) <= 1e-6 * max(1.0, abs(ref_cost)) and abs(cli_cost - plan_cost) <= 0.01
            and abs(whole_cost - plan_cost) <= 1e-6 * max(1.0, abs(ref_cost)))
    ratio = median(full) / median(ref)
    b, p, r = (median(x[k] for x in ref_parts) for k in range(3))
    table("[plan] medians of %d runs" % args.repeat, [
        ("(a) reference: build+pass+run (highspy)", f"{median(ref):.3f} s", None, None),
        ("    build arrays / passModel / run", f"{b:.3f} / {p:.3f} / {r:.3f} s", None, None),
        ("    (extracting arrays from Project, untimed)", f"{t_arrays:.3f} s", None, None),
        ("(b) Planner(project).plan(target)", f"{median(full):.3f} s", None, None),
        ("(b)/(a)", f"{ratio:.2f}x", f"<= {PLAN_RATIO_TARGET}x", verdict(ratio <= PLAN_RATIO_TARGET)),
        ("(b') the same plan on the whole model (no part)", f"{median(whole):.3f} s", None, None),
        ("(b')/(a), for comparison", f"{median(whole) / median(ref):.2f}x", None, None),
        ("(c) hasten plan DIR --finish T --json", f"{median(cli):.3f} s", f"< {PLAN_CLI_TARGET:g} s",
         verdict(median(cli) < PLAN_CLI_TARGET)),
        ("least added cost (a) / (b) / (b') / (c)",
         f"{ref_cost:.2f} / {plan_cost:.2f} / {whole_cost:.2f} / {cli_cost:.2f}",
         "equal", verdict(same)),
    ])
    print("\n  where (b) goes (medians, a separate fresh Planner per run):")
    total = median(full)
    for key in (parts[0] if parts else ()):
        v = median(x[key] for x in parts)
        print(f"    {key:<48} {v:7.3f} s  {100 * v / total:5.1f}%")
    if args.profile:
        print("\n[plan] cProfile of Planner(project).plan(target):")
        profile(lambda: Planner(project).plan(target))
    return ratio <= PLAN_RATIO_TARGET and median(cli) < PLAN_CLI_TARGET and same


# ------------------------------------------------------------------------ curve

def naive_days(k: int) -> list[int]:
    """``k`` days taken off, spread evenly over 1..COMPRESS (so the naive sample covers shallow
    and deep compression alike; its time per day hardly depends on the depth)."""
    return sorted({int(round(x)) for x in np.linspace(1, COMPRESS, max(1, k))})


def bench_curve(args) -> bool:
    n = 10_000
    project = network(n)
    arrays = Arrays(project)
    normal = Planner(project).normal_finish
    print(f"\n[curve] {n} activities, {len(project.links)} links, window {n // 10}; normal finish "
          f"{normal}; warm curve {normal} .. {normal - COMPRESS}; naive PuLP+CBC at "
          f"{', '.join(str(normal - d) for d in naive_days(args.naive_days))}")

    warm, raw, points, raw_costs = [], [], None, None
    for _ in range(args.repeat):  # interleaved with the raw highspy trace
        seconds, points = timed(lambda: Planner(project).curve(longest=normal, shortest=normal - COMPRESS))
        warm.append(seconds)
        seconds, raw_costs = reference_trace(arrays, normal, COMPRESS)
        raw.append(seconds)
    by_finish = {p.finish: p.added_cost for p in points}
    raw_agree = all(abs(c - by_finish[f]) <= 1e-6 * max(1.0, c) for f, c in raw_costs.items())

    naive, agree = [], True
    for day in naive_days(args.naive_days):
        seconds, cost = timed(naive_pulp_cost, arrays, normal - day)
        naive.append(seconds)
        agree &= abs(cost - by_finish[normal - day]) <= 1e-6 * max(1.0, cost)
        print(f"  naive day {normal - day}: {seconds:.2f} s, cost {cost:.2f} "
              f"(curve {by_finish[normal - day]:.2f})")

    total = median(warm)
    warm_day = total / COMPRESS
    raw_day = median(raw) / COMPRESS
    naive_day = statistics.mean(naive)
    speedup = naive_day / warm_day
    table(f"[curve] warm and raw: median of {args.repeat} runs; naive: mean of {len(naive)} days", [
        (f"warm curve, {COMPRESS} days (incl. Planner())", f"{total:.3f} s", f"< {CURVE_TOTAL_TARGET:g} s",
         verdict(total < CURVE_TOTAL_TARGET)),
        ("warm, per day", f"{warm_day:.4f} s", None, None),
        ("naive PuLP rebuild + CBC, per day", f"{naive_day:.3f} s", None, None),
        ("speed-up per day", f"{speedup:.0f}x", f">= {CURVE_SPEEDUP_TARGET:g}x",
         verdict(speedup >= CURVE_SPEEDUP_TARGET)),
        ("costs agree on the naive days", str(agree), "True", verdict(agree)),
        ("(floor) raw highspy warm trace of the reference LP, per day", f"{raw_day:.4f} s", None, None),
        ("(floor) speed-up per day of the raw trace", f"{naive_day / raw_day:.0f}x", None, None),
        (f"(floor) raw trace costs agree with the curve, {COMPRESS} days", str(raw_agree), "True",
         verdict(raw_agree)),
    ])
    if args.profile:
        print("\n[curve] cProfile of the warm curve:")
        profile(lambda: Planner(project).curve(longest=normal, shortest=normal - COMPRESS))
    return total < CURVE_TOTAL_TARGET and speedup >= CURVE_SPEEDUP_TARGET and agree and raw_agree


# ------------------------------------------------------------------------ full curve

def bench_fullcurve(args) -> bool:
    n = 2_000
    project = network(n)
    times, points = [], None
    for _ in range(args.repeat):
        seconds, points = timed(lambda: Planner(project).curve())
        times.append(seconds)
    print(f"\n[fullcurve] {n} activities, {len(project.links)} links, window {n // 10}; curve "
          f"{points[0].finish} .. {points[-1].finish}")
    t = median(times)
    table(f"[fullcurve] median of {args.repeat} runs", [
        ("whole curve, normal to shortest (incl. Planner())", f"{t:.3f} s", f"< {FULLCURVE_TARGET:g} s",
         verdict(t < FULLCURVE_TARGET)),
        ("points", str(len(points)), None, None),
        ("per point", f"{t / len(points):.4f} s", None, None),
        ("added cost at the shortest finish", f"{points[-1].added_cost:.2f}", None, None),
    ])
    if args.profile:
        print("\n[fullcurve] cProfile:")
        profile(lambda: Planner(project).curve())
    return t < FULLCURVE_TARGET


# ------------------------------------------------------------------------ memory

def high_water() -> int | None:
    """Peak RSS of this process's own memory map (``VmHWM``, Linux), in bytes.

    ``ru_maxrss`` also counts the parent's size at the moment it started this process
    (Linux keeps the larger of the two across fork and exec), so it can only overstate
    the peak; ``VmHWM`` starts afresh at exec. Both are reported."""
    try:
        for line in Path("/proc/self/status").read_text().splitlines():
            if line.startswith("VmHWM:"):
                return int(line.split()[1]) * 1024
    except OSError:
        pass
    return None


def memory_child() -> None:
    """Run in a fresh process: print the peak RSS after generating the project and after
    the work, as JSON."""
    n = 20_000
    project = network(n)
    base = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024  # Linux: kilobytes
    base_hwm = high_water()
    study = Planner(project)
    normal = study.normal_finish
    plan = study.plan(normal - COMPRESS)
    points = study.curve(longest=normal, shortest=normal - 10)
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024
    print(json.dumps({"n": n, "links": len(project.links), "normal": normal, "base": base, "peak": peak,
                      "base_hwm": base_hwm, "peak_hwm": high_water(),
                      "plan_cost": plan.added_cost, "points": len(points)}))


def bench_memory(args) -> bool:
    t = time.perf_counter()
    done = subprocess.run([sys.executable, __file__, "_memory_child"], capture_output=True, text=True, check=False)
    seconds = time.perf_counter() - t
    if done.returncode != 0:
        raise RuntimeError(f"memory child failed: {done.stderr[-2000:]}")
    r = json.loads(done.stdout.strip().splitlines()[-1])
    print(f"\n[memory] {r['n']} activities, {r['links']} links, window {r['n'] // 10}; normal finish "
          f"{r['normal']}; plan at {r['normal'] - COMPRESS} + curve of 10 days; fresh process, "
          f"{seconds:.1f} s wall")
    mib = 1024**2

    def size(x):
        return "n/a" if x is None else f"{x / mib:.0f} MiB"

    table("[memory] peak resident set size", [
        ("ru_maxrss after generating the project", size(r["base"]), None, None),
        ("ru_maxrss peak: Planner + plan + 10-day curve", size(r["peak"]), f"< {MEMORY_TARGET / mib:.0f} MiB",
         verdict(r["peak"] < MEMORY_TARGET)),
        ("VmHWM after generating / peak (own memory map)", f"{size(r['base_hwm'])} / {size(r['peak_hwm'])}",
         None, None),
    ])
    return r["peak"] < MEMORY_TARGET


# ------------------------------------------------------------------------ main

# memory first: its child process starts while this one is still small (see high_water)
BENCHES = {"memory": bench_memory, "plan": bench_plan, "curve": bench_curve, "fullcurve": bench_fullcurve}


def main(argv=None) -> int:
    if argv is None and sys.argv[1:2] == ["_memory_child"]:
        memory_child()
        return 0
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("which", choices=[*BENCHES, "all"])
    parser.add_argument("--repeat", type=int, default=3, help="runs per measurement (median reported)")
    parser.add_argument("--naive-days", type=int, default=4, help="days solved the naive way (curve)")
    parser.add_argument("--workdir", type=Path, default=None,
                        help="keep the generated project folder here and reuse it on the next run")
    parser.add_argument("--profile", action="store_true", help="print a cProfile of the measured call")
    args = parser.parse_args(argv)
    print(f"hasten LP benchmarks; load average {load()}; {os.cpu_count()} CPUs; "
          f"highspy {metadata.version('highspy')}, pulp {pulp.__version__}, numpy {np.__version__}")
    names = list(BENCHES) if args.which == "all" else [args.which]
    with tempfile.TemporaryDirectory(prefix="hasten-bench-") as scratch:
        args.workdir = args.workdir or Path(scratch)  # the generated project folder lives here
        results = {name: BENCHES[name](args) for name in names}
    print("\nsummary: " + ", ".join(f"{k} {verdict(v)}" for k, v in results.items()))
    return 0 if all(results.values()) else 1


if __name__ == "__main__":
    sys.exit(main())
