"""Shared helpers for the reference tests: loaders for tests/data, independent reference
calculations (networkx, scipy linprog, a plain forward pass, brute force) and hypothesis
strategies for small random projects.

Everything here is written apart from src/hasten (network.py, crash_model.py, plan_check.py): the
references must not share code with what they check. Only the dataclasses of
hasten.project are used, to build projects.
"""

from __future__ import annotations

import itertools
import json
import os
import re
from datetime import date
from pathlib import Path
from typing import Sequence

import networkx as nx
import numpy as np
from hypothesis import HealthCheck, Phase, settings
from hypothesis import strategies as st
from scipy.optimize import linprog

from hasten.project import Activity, Costs, CrashStep, Link, LinkType, Project

DATA = Path(__file__).parent / "data"
START = date(2024, 1, 1)  # a Monday; any start date would do for working-day offsets
TOL = 1e-6  # the one float tolerance for money

if os.environ.get("HASTEN_NO_SHRINK"):  # set by tools/mutation.py: that a test fails is enough,
    # its smallest failing example is not needed (shrinking can take minutes per mutant)
    settings.register_profile("no-shrink", phases=[Phase.explicit, Phase.reuse, Phase.generate])
    settings.load_profile("no-shrink")

#: moderate hypothesis settings: the whole reference suite stays well under two minutes
#: (HASTEN_EXAMPLES=500 pytest ... for a longer search)
PROPERTY = settings(max_examples=int(os.environ.get("HASTEN_EXAMPLES", "50")), deadline=None,
                    suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])

# ---------------------------------------------------------------------------------------
# Building projects
# ---------------------------------------------------------------------------------------


def make_project(activities: Sequence[Activity], links: Sequence[Link], *, name: str = "test",
                 indirect: float = 0.0, **kwargs) -> Project:
    return Project(name=name, start=START, activities=tuple(activities), links=tuple(links),
                   costs=Costs(indirect_per_day=indirect), **kwargs)


def load_json(name: str) -> dict:
    return json.loads((DATA / name).read_text(encoding="utf-8"))


def project_from_example(example: dict, *, indirect: float = 0.0, lags: bool = True) -> Project:
    """A project from a tests/data/examples JSON file in the shared example schema
    (``activities`` with ``normal_duration``, ``crash_duration``, ``normal_cost``,
    ``crash_cost`` and ``predecessors`` of ``{id, type, lag}``); null costs count as 0."""
    acts, links = [], []
    for a in example["activities"]:
        cost = a.get("normal_cost") or 0
        crash_cost = a.get("crash_cost")
        crash_cost = cost if crash_cost is None else crash_cost
        crash = a.get("crash_duration")
        crash = a["normal_duration"] if crash is None else crash
        acts.append(Activity(id=str(a["id"]), duration=int(a["normal_duration"]),
                             crash_duration=int(crash), cost=float(cost), crash_cost=float(crash_cost)))
        for p in a["predecessors"]:
            links.append(Link(str(p["id"]), str(a["id"]), LinkType(p.get("type", "FS")),
                              int(p.get("lag", 0)) if lags else 0))
    return make_project(acts, links, indirect=indirect)


def project_from_numbers(activities: list[dict], *, lags: bool = True) -> Project:
    """A project from the numbers-only schema of odeh_lags_numbers.json (no costs)."""
    acts = [Activity(id=a["id"], duration=a["duration"]) for a in activities]
    links = [Link(k["pred"], a["id"], LinkType(k["type"]), k["lag"] if lags else 0)
             for a in activities for k in a["links"]]
    return make_project(acts, links)


def project_from_stadium(example: dict) -> Project:
    """The stadium table: linear crash cost ``cost_per_week`` for up to ``max_reduction`` weeks.
    Normal direct costs are not given in the book; they are taken as 0 (only added cost counts)."""
    acts, links = [], []
    for a in example["activities"]:
        d, r, c = a["duration"], a["max_reduction"], a["cost_per_week"]
        acts.append(Activity(id=str(a["id"]), duration=d, crash_duration=d - r, cost=0.0,
                             crash_cost=float(c * r)))
        links += [Link(str(p), str(a["id"])) for p in a["predecessors"]]
    return make_project(acts, links)


_SECTION = re.compile(r"^\*+\s*$")


def read_psplib_sm(path: Path) -> tuple[Project, int]:
    """A tiny test-local reader for PSPLIB single-mode .sm files: the PRECEDENCE RELATIONS
    (finish-to-start, no lag) and the durations of REQUESTS/DURATIONS; resources are ignored.
    Returns the project and the header's MPM-Time (the unconstrained critical-path length)."""
    lines = path.read_text(encoding="utf-8").splitlines()
    mpm = None
    succ: dict[int, list[int]] = {}
    dur: dict[int, int] = {}
    k = 0
    while k < len(lines):
        line = lines[k]
        if "MPM-Time" in line:
            head = line.split()
            values = lines[k + 1].split()
            mpm = int(values[head.index("MPM-Time")])
        elif line.startswith("PRECEDENCE RELATIONS"):
            k += 2  # skip the column header
            while not _SECTION.match(lines[k]):
                f = [int(x) for x in lines[k].split()]
                job, nsucc = f[0], f[2]
                succ[job] = f[3:3 + nsucc]
                k += 1
            continue
        elif line.startswith("REQUESTS/DURATIONS"):
            k += 3  # column header and the dashed rule
            while not _SECTION.match(lines[k]):
                f = [int(x) for x in lines[k].split()]
                dur[f[0]] = f[2]
                k += 1
            continue
        k += 1
    assert mpm is not None and succ and set(succ) == set(dur), f"could not read {path}"
    acts = [Activity(id=str(j), duration=dur[j]) for j in sorted(dur)]
    links = [Link(str(i), str(j)) for i in sorted(succ) for j in succ[i]]
    return make_project(acts, links, name=path.stem), mpm


# ---------------------------------------------------------------------------------------
# Independent references
# ---------------------------------------------------------------------------------------


def offset(link: Link, d_pred: int, d_succ: int) -> int:
    """The least ``S_succ - S_pred`` a link allows, in start-time form."""
    return {LinkType.FS: d_pred + link.lag, LinkType.SS: link.lag,
            LinkType.FF: d_pred + link.lag - d_succ, LinkType.SF: link.lag - d_succ}[link.type]


def link_holds(link: Link, s_pred: float, d_pred: float, s_succ: float, d_succ: float) -> bool:
    """Whether a link is met, written from the definition of each relationship."""
    f_pred, f_succ = s_pred + d_pred, s_succ + d_succ
    if link.type is LinkType.FS:
        return s_succ >= f_pred + link.lag
    if link.type is LinkType.SS:
        return s_succ >= s_pred + link.lag
    if link.type is LinkType.FF:
        return f_succ >= f_pred + link.lag
    return f_succ >= s_pred + link.lag


def topo_ids(project: Project) -> list[str]:
    g = nx.DiGraph()
    g.add_nodes_from(a.id for a in project.activities)
    g.add_edges_from((k.pred, k.succ) for k in project.links)
    return list(nx.lexicographical_topological_sort(g))


def own_forward(project: Project, durations: dict[str, int],
                release: dict[str, int] | None = None) -> tuple[int, dict[str, int]]:
    """A plain forward pass in networkx topological order: every start >= 0, >= each link's
    offset from its predecessor, and >= ``release[id]`` where given. Returns (finish, starts)."""
    into: dict[str, list[Link]] = {a.id: [] for a in project.activities}
    for k in project.links:
        into[k.succ].append(k)
    release = release or {}
    es: dict[str, int] = {}
    for j in topo_ids(project):
        es[j] = max([0, release.get(j, 0)]
                    + [es[k.pred] + offset(k, durations[k.pred], durations[j]) for k in into[j]])
    return max((es[a] + durations[a] for a in es), default=0), es


def own_finish(project: Project, durations: dict[str, int]) -> int:
    return own_forward(project, durations)[0]


def nx_event_graph(project: Project, durations: dict[str, int] | None = None) -> nx.DiGraph:
    """Start-time graph: a source with 0-weight edges to every activity, an edge per link
    weighted by its offset (parallel links keep the largest), and edges weight d_i to a sink."""
    d = durations or {a.id: a.duration for a in project.activities}
    g = nx.DiGraph()
    for a in project.activities:
        g.add_edge("source", a.id, weight=0)
        g.add_edge(a.id, "sink", weight=d[a.id])
    for k in project.links:
        w = offset(k, d[k.pred], d[k.succ])
        if g.has_edge(k.pred, k.succ):
            w = max(w, g[k.pred][k.succ]["weight"])
        g.add_edge(k.pred, k.succ, weight=w)
    return g


def nx_cpm(project: Project, durations: dict[str, int] | None = None,
           deadline: int | None = None) -> tuple[int, dict[str, int], dict[str, int]]:
    """Project finish by ``nx.dag_longest_path_length``; every early start by Bellman-Ford on
    negated weights from the source (longest path); every late start as the horizon (finish, or
    ``deadline``) less the longest path from the activity to the sink (Bellman-Ford on the
    reversed, negated graph). dag_longest_path restarts a path when its running length turns
    negative; the 0-weight source edges make that harmless for the project finish."""
    g = nx_event_graph(project, durations)
    finish = nx.dag_longest_path_length(g, weight="weight")
    neg = nx.DiGraph()
    neg.add_weighted_edges_from((u, v, -w) for u, v, w in g.edges(data="weight"))
    dist = nx.single_source_bellman_ford_path_length(neg, "source", weight="weight")
    assert -dist["sink"] == finish
    es = {a.id: -dist[a.id] for a in project.activities}
    to_sink = nx.single_source_bellman_ford_path_length(neg.reverse(copy=True), "sink",
                                                        weight="weight")
    horizon = finish if deadline is None else deadline
    ls = {a.id: horizon + to_sink[a.id] for a in project.activities}
    return finish, es, ls


def slope(act: Activity) -> float:
    """Cost per day of shortening for a linear-cost activity (0 if it cannot be shortened)."""
    crash = act.duration if act.crash_duration is None else act.crash_duration
    if crash == act.duration:
        return 0.0
    cc = act.cost if act.crash_cost is None else act.crash_cost
    return (cc - act.cost) / (act.duration - crash)


def own_cut_cost(act: Activity, cut: int) -> float:
    """Cost of shortening ``act`` by ``cut`` days: cost steps taken in their listed order, or
    the straight line from (duration, cost) to (crash duration, crash cost)."""
    if act.steps:
        total, left = 0.0, cut
        for step in act.steps:
            take = min(left, step.days)
            total += take * step.cost_per_day
            left -= take
        assert left == 0
        return total
    return slope(act) * cut


def _lp_rows(project: Project):
    """Rows of our own LP in start/duration form: x = (S_1..S_n, d_1..d_n)."""
    ids = [a.id for a in project.activities]
    n = len(ids)
    pos = {a: i for i, a in enumerate(ids)}
    rows, rhs = [], []
    for k in project.links:
        i, j = pos[k.pred], pos[k.succ]
        r = np.zeros(2 * n)
        # least start-time offset, moved to "<=" form: pred terms - succ terms <= -lag
        r[i] += 1
        r[j] -= 1
        if k.type in (LinkType.FS, LinkType.FF):
            r[n + i] += 1
        if k.type in (LinkType.FF, LinkType.SF):
            r[n + j] -= 1
        rows.append(r)
        rhs.append(-k.lag)
    bounds = [(0, None)] * n + [(a.shortest, a.duration) for a in project.activities]
    return n, rows, rhs, bounds


def linprog_least_cost(project: Project, target: int) -> float | None:
    """Least added direct cost to finish by ``target`` (scipy linprog, HiGHS); None if infeasible.

    Written independently of src/hasten/optimise.py: starts and durations are the variables,
    every activity finishes by the target, cost is sum(slope * (normal - duration))."""
    n, rows, rhs, bounds = _lp_rows(project)
    for i in range(n):
        r = np.zeros(2 * n)
        r[i] = r[n + i] = 1
        rows.append(r)
        rhs.append(target)
    slopes = np.array([slope(a) for a in project.activities])
    c = np.concatenate([np.zeros(n), -slopes])
    const = float(sum(s * a.duration for s, a in zip(slopes, project.activities)))
    res = linprog(c, A_ub=np.array(rows) if rows else None, b_ub=np.array(rhs) if rows else None,
                  bounds=bounds, method="highs")
    if res.status == 2:
        return None
    assert res.status == 0, res.message
    return float(res.fun + const)


def linprog_min_finish(project: Project) -> float:
    """The least finish any choice of durations and starts reaches (scipy linprog, HiGHS)."""
    n, rows, rhs, bounds = _lp_rows(project)
    rows = [np.append(r, 0.0) for r in rows]
    for i in range(n):
        r = np.zeros(2 * n + 1)
        r[i] = r[n + i] = 1
        r[2 * n] = -1
        rows.append(r)
        rhs.append(0)
    c = np.zeros(2 * n + 1)
    c[2 * n] = 1
    res = linprog(c, A_ub=np.array(rows), b_ub=np.array(rhs), bounds=bounds + [(0, None)],
                  method="highs")
    assert res.status == 0, res.message
    return float(res.fun)


def brute_force_curve(project: Project) -> dict[int, float]:
    """Least added cost for every reachable finish, by enumerating every whole-day duration
    vector (itertools.product) and a plain forward pass for each. Keys are finishes T; the
    value is the least cost of any vector whose early-start finish is <= T."""
    acts = project.activities
    ranges = [range(a.shortest, a.duration + 1) for a in acts]
    best_at: dict[int, float] = {}
    for ds in itertools.product(*ranges):
        d = {a.id: x for a, x in zip(acts, ds)}
        f = own_finish(project, d)
        cost = sum(own_cut_cost(a, a.duration - x) for a, x in zip(acts, ds))
        if cost < best_at.get(f, float("inf")):
            best_at[f] = cost
    out: dict[int, float] = {}
    running = float("inf")
    for t in range(min(best_at), max(best_at) + 1):
        running = min(running, best_at.get(t, float("inf")))
        out[t] = running
    return out


# ---------------------------------------------------------------------------------------
# Hypothesis strategies
# ---------------------------------------------------------------------------------------

LINK_TYPES = list(LinkType)


@st.composite
def projects(draw, min_n: int = 3, max_n: int = 9, max_duration: int = 12,
             max_cut: int | None = None, lag_range: tuple[int, int] = (-3, 5),
             max_links: int = 14, crashable: bool = True, stepped: bool = False,
             free_days: bool = False) -> Project:
    """A random small project: durations 0..max_duration, all four link types, lags in
    ``lag_range``, links only from a lower to a higher index (so never a loop; parallel
    links between a pair are allowed), crash durations and whole-number linear costs
    (``stepped``: some activities get 1..3 cost steps, cost per day never falling;
    ``free_days``: a crash day may cost nothing)."""
    n = draw(st.integers(min_n, max_n))
    acts = []
    for i in range(n):
        d = draw(st.integers(0, max_duration))
        room = 0 if not crashable else (d if max_cut is None else min(d, max_cut))
        cut = draw(st.integers(0, room))
        cost = draw(st.integers(0, 50)) * 10
        if stepped and cut and draw(st.booleans()):
            parts = draw(st.lists(st.integers(1, cut), min_size=1, max_size=3))
            days, left = [], cut
            for p in parts:
                if left:
                    days.append(min(p, left))
                    left -= days[-1]
            days[-1] += left
            rates = sorted(draw(st.lists(st.integers(1, 20), min_size=len(days), max_size=len(days))))
            acts.append(Activity(id=f"a{i}", duration=d, cost=float(cost),
                                 steps=tuple(CrashStep(k, float(r)) for k, r in zip(days, rates))))
            continue
        per_day = draw(st.integers(0 if free_days else 1, 20))
        acts.append(Activity(id=f"a{i}", duration=d, crash_duration=d - cut, cost=float(cost),
                             crash_cost=float(cost + per_day * cut)))
    pairs = st.tuples(st.integers(0, n - 1), st.integers(0, n - 1)).filter(lambda p: p[0] != p[1])
    raw = draw(st.lists(st.tuples(pairs, st.sampled_from(LINK_TYPES), st.integers(*lag_range)),
                        max_size=max_links))
    links = [Link(f"a{min(p)}", f"a{max(p)}", t, lag) for p, t, lag in raw]
    return make_project(acts, links, name="random")
