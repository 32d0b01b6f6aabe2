"""Floors for hasten's speed targets, measured the same way the targets are (copied from the
project's shared bench notes; benchmarks do not read outside bench/).

- network(n): a layered network shaped like a large job (about 2*sqrt(n) activities wide,
  1-3 links each from the layer before, FS 70 % / SS 15 % / FF 12 % / SF 3 %, durations 2-25,
  crash to 55-95 %, linear costs). 60 days of compression at 10,000 activities touch about
  58 % of it.
- highs_raw(acts, T): the same LP built from numpy arrays and solved once in highspy (the
  floor for one plan).
- warm_trace(acts, L, T): one model, the finish bound moved a day at a time from L-1 to T,
  each re-solved from the previous basis (the floor for a curve).
- naive_day(acts, T): what a user would script: a fresh PuLP model solved with CBC.

Copy into bench/ if a benchmark needs it (tests and benchmarks must not read ../shared).
"""

from __future__ import annotations

import random
import time
import warnings

import numpy as np


def network(n: int, seed: int = 7):
    """Layered network shaped like a large job: ~sqrt(n)/2 activities wide, 1-3 links each."""
    rnd = random.Random(seed)
    width = max(4, int(n ** 0.5) * 2)
    acts = []
    for i in range(n):
        layer = i // width
        preds = []
        if layer:
            lo = (layer - 1) * width
            for p in sorted(set(rnd.randrange(lo, lo + width) for _ in range(rnd.randint(1, 3)))):
                t = rnd.choices(["FS", "SS", "FF", "SF"], [70, 15, 12, 3])[0]
                lag = rnd.randint(0, 3) if t != "FS" else rnd.choice([0, 0, 0, 1, 2])
                preds.append({"id": f"A{p}", "type": t, "lag": lag})
        dn = rnd.randint(2, 25)
        dc = max(1, int(dn * rnd.uniform(0.55, 0.95)))
        cn = rnd.randint(5, 400) * 100
        slope = rnd.randint(2, 80) * 25
        acts.append({"id": f"A{i}", "predecessors": preds, "normal_duration": dn, "crash_duration": dc,
                     "normal_cost": cn, "crash_cost": cn + slope * (dn - dc)})
    return acts


def cpm_finish(acts, dur=None):
    idx = {a["id"]: k for k, a in enumerate(acts)}
    d = [a["normal_duration"] if dur is None else dur[k] for k, a in enumerate(acts)]
    es = [0.0] * len(acts)
    for k, a in enumerate(acts):
        v = 0.0
        for p in a["predecessors"]:
            j, t, lag = idx[p["id"]], p["type"], p["lag"]
            v = max(v, {"FS": es[j] + d[j] + lag, "SS": es[j] + lag,
                        "FF": es[j] + d[j] + lag - d[k], "SF": es[j] + lag - d[k]}[t])
        es[k] = v
    return max(es[k] + d[k] for k in range(len(acts)))


def _rows(acts):
    """Rows over columns S_0..S_n-1, y_0..y_n-1 (days shortened), F (project finish)."""
    n = len(acts)
    idx = {a["id"]: k for k, a in enumerate(acts)}
    rows = []  # (coefs dict, lower bound)
    for k, a in enumerate(acts):
        dk = a["normal_duration"]
        for p in a["predecessors"]:
            j, t, lag = idx[p["id"]], p["type"], p["lag"]
            dj = acts[j]["normal_duration"]
            # successor start/finish minus predecessor start/finish >= lag
            if t == "FS":
                rows.append(({k: 1, j: -1, n + j: 1}, dj + lag))
            elif t == "SS":
                rows.append(({k: 1, j: -1}, lag))
            elif t == "FF":
                rows.append(({k: 1, n + k: -1, j: -1, n + j: 1}, dj + lag - dk))
            else:
                rows.append(({k: 1, n + k: -1, j: -1}, lag - dk))
    # every activity ends by F: implied through an FS or FF successor (lags >= 0 here), stated
    # otherwise (no successor, or only SS/SF successors, which do not bound its finish)
    bounded = {p["id"] for a in acts for p in a["predecessors"] if p["type"] in ("FS", "FF") and p["lag"] >= 0}
    for k, a in enumerate(acts):
        if a["id"] not in bounded:
            rows.append(({2 * n: 1, k: -1, n + k: 1}, a["normal_duration"]))
    return rows


def highs_raw(acts, T):
    """Build from arrays and solve once; returns (objective, seconds for build+solve)."""
    import highspy
    t0 = time.perf_counter()
    n = len(acts)
    inf = highspy.kHighsInf
    slopes = np.array([(a["crash_cost"] - a["normal_cost"]) / max(1, a["normal_duration"] - a["crash_duration"])
                       for a in acts])
    h = highspy.Highs()
    h.setOptionValue("output_flag", False)
    lb = np.zeros(2 * n + 1)
    ub = np.concatenate([np.full(n, inf), [a["normal_duration"] - a["crash_duration"] for a in acts], [T]])
    cost = np.concatenate([np.zeros(n), slopes, [0.0]])
    h.addVars(2 * n + 1, lb, ub)
    h.changeColsCost(2 * n + 1, np.arange(2 * n + 1, dtype=np.int32), cost)
    rows = _rows(acts)
    starts, index, value, lo = [], [], [], []
    for coefs, b in rows:
        starts.append(len(index))
        index += list(coefs)
        value += list(coefs.values())
        lo.append(b)
    h.addRows(len(rows), np.array(lo, float), np.full(len(rows), inf), len(index),
              np.array(starts, np.int32), np.array(index, np.int32), np.array(value, float))
    h.run()
    return h.getInfo().objective_function_value, time.perf_counter() - t0


def warm_trace(acts, L, T):
    """The floor for a curve: one model built from arrays, then the bound on F moved one day
    at a time from L-1 down to T, each re-solved from the previous basis. Returns (objective at
    T, seconds for build + every solve)."""
    import highspy
    t0 = time.perf_counter()
    n = len(acts)
    inf = highspy.kHighsInf
    slopes = np.array([(a["crash_cost"] - a["normal_cost"]) / max(1, a["normal_duration"] - a["crash_duration"])
                       for a in acts])
    h = highspy.Highs()
    h.setOptionValue("output_flag", False)
    ub = np.concatenate([np.full(n, inf), [a["normal_duration"] - a["crash_duration"] for a in acts], [L]])
    h.addVars(2 * n + 1, np.zeros(2 * n + 1), ub)
    h.changeColsCost(2 * n + 1, np.arange(2 * n + 1, dtype=np.int32), np.concatenate([np.zeros(n), slopes, [0.0]]))
    starts, index, value, lo = [], [], [], []
    for coefs, b in _rows(acts):
        starts.append(len(index)); index += list(coefs); value += list(coefs.values()); lo.append(b)
    h.addRows(len(lo), np.array(lo, float), np.full(len(lo), inf), len(index),
              np.array(starts, np.int32), np.array(index, np.int32), np.array(value, float))
    h.run()
    for t in range(L - 1, T - 1, -1):
        h.changeColBounds(2 * n, 0, t)
        h.run()
    return h.getInfo().objective_function_value, time.perf_counter() - t0


def naive_day(acts, T):
    """What a user would write: a fresh PuLP model solved with CBC for one target."""
    import pulp
    warnings.filterwarnings("ignore")
    t0 = time.perf_counter()
    n = len(acts)
    m = pulp.LpProblem("naive", pulp.LpMinimize)
    x = [m.add_variable(f"s{k}", 0) for k in range(n)]
    y = [m.add_variable(f"y{k}", 0, a["normal_duration"] - a["crash_duration"]) for k, a in enumerate(acts)]
    x.extend(y)
    x.append(m.add_variable("F", 0, T))
    slopes = [(a["crash_cost"] - a["normal_cost"]) / max(1, a["normal_duration"] - a["crash_duration"]) for a in acts]
    m += pulp.lpSum(s * v for s, v in zip(slopes, y))
    for coefs, b in _rows(acts):
        m += pulp.lpSum(c * x[i] for i, c in coefs.items()) >= b
    m.solve(pulp.PULP_CBC_CMD(msg=0))
    return pulp.value(m.objective), time.perf_counter() - t0
