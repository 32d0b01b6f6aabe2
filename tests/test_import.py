"""The research instance importers (hasten.formats.research.read_research).

References (full citations in tests/data/*/README.md):
- PSPLIB multi-mode (.mm) and single-mode (.sm) instances, R. Kolisch and A. Sprecher,
  "PSPLIB - A project scheduling problem library", EJOR 96(1):205-216, 1997: the header's
  job count, the successor counts of PRECEDENCE RELATIONS and the header's MPM-Time (the
  critical-path length with every job in its shortest mode).
- Patterson-format (.rcp) networks, RG30 (Vanhoucke et al. 2008, made with RanGen,
  Demeulemeester, Vanhoucke & Herroelen 2003) and Patterson (1984): counts from the file and
  the longest path by networkx (dag_longest_path_length) built from the raw file here.
- dtctp_curves_enumerated.csv: least total mode cost for every deadline of the four j10 files,
  computed by the dataset authors by full enumeration of all 3^10 mode choices (not published).

Every expected value is read from the raw files by the few lines of parsing in this module
(regular expressions and split), never through the importer.
"""

from __future__ import annotations

import csv
import itertools
import re
from pathlib import Path

import networkx as nx
import numpy as np
import pytest

from hasten.errors import CycleError, InputError
from hasten.formats import read_project, write_project
from hasten.formats.research import read_research
from hasten.project import Calendar, LinkType, Project
from hasten.cpm import schedule
from hasten.dominated import drop_dominated

DATA = Path(__file__).parent / "data"
MM = sorted((DATA / "psplib_mm").glob("*.mm"))
SM = sorted((DATA / "psplib_sm").glob("*.sm"))
RCP = sorted((DATA / "rcp").glob("*.rcp"))
J10 = [p for p in MM if p.name.startswith("j10")]


def test_the_data_is_there():
    assert [p.name for p in MM] == ["j1010_1.mm", "j1012_10.mm", "j1024_1.mm", "j102_2.mm",
                                    "j3010_1.mm"]
    assert len(SM) == 3 and len(RCP) == 3


# ---------------------------------------------------------------- raw readers for the checks

def raw_psplib(path: Path) -> dict:
    """Header counts, MPM-Time, successor lists and modes (duration, N1 + N2, mode number)."""
    text = path.read_text(encoding="ascii")
    jobs = int(re.search(r"jobs \(incl\. supersource/sink \):\s*(\d+)", text).group(1))
    mpm = int(re.search(r"MPM-Time\s*\n\s*(?:\d+\s+){5}(\d+)", text).group(1))
    prec = text.split("PRECEDENCE RELATIONS:")[1].split("****")[0].splitlines()[2:]
    succ = {}
    for line in filter(str.strip, prec):
        f = [int(x) for x in line.split()]
        assert len(f) == 3 + f[2]
        succ[f[0]] = f[3:]
    req = text.split("REQUESTS/DURATIONS:")[1].split("****")[0].splitlines()
    head = req[1].split("duration")[1].split()
    kinds = head[0::2]  # "R 1  R 2  N 1  N 2" or "R 1 .. R 4"
    modes: dict[int, list[tuple[int, int, int]]] = {}
    job = None
    for line in req[3:]:
        f = [int(x) for x in line.split()]
        if not f:
            continue
        if len(f) == 3 + len(kinds):
            job, f = f[0], f[1:]
        cost = sum(a for a, k in zip(f[2:], kinds) if k == "N")
        modes.setdefault(job, []).append((f[1], cost, f[0]))
    return {"jobs": jobs, "mpm": mpm, "succ": succ, "modes": modes,
            "links": sum(len(s) for s in succ.values())}


def raw_rcp(path: Path) -> dict:
    rows = [[int(x) for x in line.split()] for line in path.read_text().splitlines() if line.strip()]
    n, r = rows[0]
    acts = rows[2:]
    assert len(acts) == n
    durations = {i: a[0] for i, a in enumerate(acts, start=1)}
    succ = {i: a[r + 2:] for i, a in enumerate(acts, start=1)}
    assert all(len(succ[i]) == acts[i - 1][r + 1] for i in succ)
    return {"jobs": n, "durations": durations, "succ": succ,
            "links": sum(len(s) for s in succ.values())}


def pairs(project: Project) -> set[tuple[str, str]]:
    assert all(k.type is LinkType.FS and k.lag == 0 for k in project.links)
    return {(k.pred, k.succ) for k in project.links}


def raw_pairs(succ: dict[int, list[int]]) -> set[tuple[str, str]]:
    return {(f"J{i}", f"J{j}") for i, js in succ.items() for j in js}


# ---------------------------------------------------------------- PSPLIB

@pytest.mark.parametrize("path", MM + SM, ids=lambda p: p.name)
def test_psplib_counts_match_the_header(path):
    raw = raw_psplib(path)
    project = read_research(path)
    assert len(project.activities) == raw["jobs"]
    assert len(project.links) == raw["links"]
    assert [a.id for a in project.activities] == [f"J{i}" for i in range(1, raw["jobs"] + 1)]
    assert [a.name for a in project.activities][:2] == ["job 1", "job 2"]
    assert pairs(project) == raw_pairs(raw["succ"])
    assert project.activities[0].is_milestone and project.activities[-1].is_milestone


@pytest.mark.parametrize("path", MM + SM, ids=lambda p: p.name)
def test_psplib_shortest_modes_give_the_mpm_time(path):
    # PSPLIB header: MPM-Time = critical-path length with every job in its shortest mode
    raw = raw_psplib(path)
    project = read_research(path)
    assert schedule(project, [a.shortest for a in project.activities]).finish == raw["mpm"]


@pytest.mark.parametrize("path", MM, ids=lambda p: p.name)
def test_mm_modes_become_the_normal_way_and_options(path):
    raw = raw_psplib(path)
    project = read_research(path)
    normal_cost = 0
    for i, a in enumerate(project.activities, start=1):
        modes = raw["modes"][i]
        # normal: longest duration, then lowest cost, then lowest mode number
        longest = max(d for d, _, _ in modes)
        normal = min((c, m) for d, c, m in modes if d == longest)
        normal_cost += normal[0]
        assert (a.duration, a.cost) == (longest, normal[0])
        assert a.crash_duration is None and not a.steps
        ways = {(a.duration, a.cost)} | {(o.duration, a.cost + o.added_cost) for o in a.options}
        assert ways == {(d, c) for d, c, _ in modes}
        others = [m for d, c, m in modes if m != normal[1] and (d, c) != (longest, normal[0])]
        assert [o.name for o in a.options] == [f"mode {m}" for m in others]
        assert all(o.crash_duration is None for o in a.options)
    assert project.normal_direct_cost == normal_cost


def test_mm_example_job_by_hand():
    """j102_2.mm job 2 (REQUESTS/DURATIONS): mode 1 3 periods N 9+0, mode 2 9 periods N 0+8,
    mode 3 10 periods N 0+6 -> normal mode 3 (10, cost 6), options mode 1 (+3), mode 2 (+2)."""
    a = read_research(DATA / "psplib_mm" / "j102_2.mm").activity("J2")
    assert (a.duration, a.cost, a.name) == (10, 6.0, "job 2")
    assert [(o.name, o.duration, o.added_cost) for o in a.options] == [
        ("mode 1", 3, 3.0), ("mode 2", 9, 2.0)]
    assert "mode 1" in a.options[0].note and "N1 9" in a.options[0].note


def test_sm_has_no_cost_and_no_options():
    for path in SM:
        project = read_research(path)
        assert project.normal_direct_cost == 0
        assert all(not a.options and a.shortest == a.duration for a in project.activities)


def test_project_settings():
    project = read_research(DATA / "psplib_mm" / "j102_2.mm")
    assert project.name == "j102_2 (PSPLIB multi-mode)"
    assert project.start.isoformat() == "2027-01-04"
    assert project.calendar == Calendar((0, 1, 2, 3, 4, 5, 6), (), "all-days")
    assert project.currency == ""
    assert read_research(SM[0]).name == f"{SM[0].stem} (PSPLIB single-mode)"
    assert read_research(RCP[0]).name == f"{RCP[0].stem} (Patterson format)"


# ---------------------------------------------------------------- the enumerated j10 curves

CURVES: dict[str, dict[int, int]] = {}
with (DATA / "psplib_mm" / "dtctp_curves_enumerated.csv").open(newline="") as handle:
    for row in csv.DictReader(handle):
        CURVES.setdefault(row["instance"], {})[int(row["deadline"])] = int(row["min_cost"])


def curve_by_enumeration(project: Project) -> dict[int, float]:
    """Least total direct cost by each deadline over every choice of the normal way or one
    option per activity (numpy forward pass over all choices at once; FS links, lag 0)."""
    ways = [[(a.duration, a.cost)] + [(o.duration, a.cost + o.added_cost) for o in a.options]
            for a in project.activities]
    choice = np.array(list(itertools.product(*[range(len(w)) for w in ways])))
    dur = np.stack([np.array([d for d, _ in w])[choice[:, i]] for i, w in enumerate(ways)], axis=1)
    cost = sum(np.array([c for _, c in w])[choice[:, i]] for i, w in enumerate(ways))
    index = {a.id: i for i, a in enumerate(project.activities)}
    graph = nx.DiGraph([(index[k.pred], index[k.succ]) for k in project.links])
    graph.add_nodes_from(range(len(ways)))
    es = np.zeros_like(dur)
    for j in nx.topological_sort(graph):
        for i in graph.predecessors(j):
            es[:, j] = np.maximum(es[:, j], es[:, i] + dur[:, i])
    finish = (es + dur).max(axis=1)
    return {t: float(cost[finish <= t].min()) for t in range(finish.min(), finish.max() + 1)}


@pytest.mark.parametrize("path", J10, ids=lambda p: p.name)
def test_j10_curve_ends_at_our_normal_finish(path):
    curve = CURVES[path.name]
    project = read_research(path)
    assert max(curve) == schedule(project).finish  # all jobs in their longest (normal) mode
    assert min(curve) == raw_psplib(path)["mpm"]
    assert curve[max(curve)] <= project.normal_direct_cost  # the normal plan is one choice


@pytest.mark.parametrize("path", J10, ids=lambda p: p.name)
def test_j10_options_reproduce_the_enumerated_curve(path):
    """Every mode is there as the normal way or an option: enumerating our choices gives the
    dataset authors' curve; so does the project without its dominated options."""
    expected = {t: float(c) for t, c in CURVES[path.name].items()}
    project = read_research(path)
    assert curve_by_enumeration(project) == expected
    reduced, notes = drop_dominated(project)
    assert notes  # every j10 file here has dominated modes
    assert curve_by_enumeration(reduced) == expected


# ---------------------------------------------------------------- Patterson format

@pytest.mark.parametrize("path", RCP, ids=lambda p: p.name)
def test_rcp_counts_durations_and_links(path):
    raw = raw_rcp(path)
    project = read_research(path)
    assert len(project.activities) == raw["jobs"]
    assert len(project.links) == raw["links"]
    assert {a.id: a.duration for a in project.activities} == {
        f"J{i}": d for i, d in raw["durations"].items()}
    assert pairs(project) == raw_pairs(raw["succ"])
    assert project.normal_direct_cost == 0 and all(not a.options for a in project.activities)


@pytest.mark.parametrize("path", RCP, ids=lambda p: p.name)
def test_rcp_cpm_length_equals_networkx_longest_path(path):
    raw = raw_rcp(path)
    graph = nx.DiGraph()
    for i, js in raw["succ"].items():
        graph.add_edge(i, "end", weight=raw["durations"][i])
        for j in js:
            graph.add_edge(i, j, weight=raw["durations"][i])
    longest = nx.dag_longest_path_length(graph, weight="weight")
    assert schedule(read_research(path)).finish == longest


def test_patterson_pat1_cpm_length():
    # tests/data/rcp/README.md (from the shared data README): pat1's CPM length is 18
    assert schedule(read_research(DATA / "rcp" / "patterson_pat1.rcp")).finish == 18


# ---------------------------------------------------------------- writing imported projects

@pytest.mark.parametrize("name", ["j102_2.mm", "j3010_1.mm"])
def test_imported_project_round_trips_through_every_form(tmp_path, name):
    project = read_research(DATA / "psplib_mm" / name)
    for target in ("folder", "p.xlsx", "p.json"):
        write_project(project, tmp_path / target)
        assert read_project(tmp_path / target) == project, target
    # the links are in successor order, so the folder lists them in the predecessors column
    assert not (tmp_path / "folder" / "links.csv").exists()
    assert (tmp_path / "folder" / "options.csv").is_file()


def test_rcp_round_trips(tmp_path):
    project = read_research(RCP[0])
    write_project(project, tmp_path / "p.json")
    assert read_project(tmp_path / "p.json") == project


# ---------------------------------------------------------------- malformed files

def snapshot(folder: Path) -> dict[str, bytes]:
    return {p.name: p.read_bytes() for p in folder.iterdir()}


def broken(tmp_path: Path, source: Path, old: str | None, new: str = "", *,
           name: str | None = None) -> Path:
    """A copy of ``source`` with ``old`` (which must occur once) replaced by ``new``."""
    target = tmp_path / (name or source.name)
    text = source.read_text(encoding="ascii")
    if old is not None:
        assert text.count(old) == 1, old
        text = text.replace(old, new)
    target.write_text(text, encoding="ascii")
    return target


def line_of(path: Path, text: str) -> int:
    """The number of the one line that is ``text`` (or else contains it)."""
    lines = path.read_text().splitlines()
    found = [n for n, line in enumerate(lines, start=1) if line == text]
    found = found or [n for n, line in enumerate(lines, start=1) if text in line]
    assert len(found) == 1, text
    return found[0]


def import_error(path: Path, kind: type[InputError] = InputError) -> InputError:
    before = snapshot(path.parent)
    with pytest.raises(kind) as caught:
        read_research(path)
    assert snapshot(path.parent) == before
    message = str(caught.value)
    assert path.name in message and caught.value.file == str(path)
    assert "Fix: " in message and caught.value.fix
    return caught.value


J102 = DATA / "psplib_mm" / "j102_2.mm"
PRECEDENCE_2 = "   2        3          2           5   6\n"
REQUEST_4_2 = "         2     5       7    0    2    0\n"


@pytest.mark.parametrize("old, new, mark, column, says", [
    (PRECEDENCE_2, "   2        3          3           5   6\n", "   2        3          3",
     "successors", "announces 3 successors but lists 2"),
    (PRECEDENCE_2, "   2        3          2           5  13\n", "5  13", "successors",
     "from 1 to 12"),
    (PRECEDENCE_2, "   2        3          2           5   2\n", "5   2\n", "successors",
     "its own successor"),
    (PRECEDENCE_2, "   2        3          2           5   x\n", "5   x", "successors",
     "whole number"),
    (REQUEST_4_2, "         2     5       7    0    2\n", "   5       7    0    2", None,
     "expected 7 numbers"),
    (REQUEST_4_2, "         2    -5       7    0    2    0\n", "-5", "duration",
     "at least 0"),
    (REQUEST_4_2, "         3     5       7    0    2    0\n", "3     5       7    0    2",
     "mode", "expected mode 2 of job 4"),
])
def test_malformed_psplib_names_the_line(tmp_path, old, new, mark, column, says):
    path = broken(tmp_path, J102, old, new)
    error = import_error(path)
    assert error.row == line_of(path, mark.rstrip("\n")), str(error)
    assert error.column == column and says in str(error), str(error)
    assert f"row {error.row}" in str(error)


def test_missing_mode_line(tmp_path):
    path = broken(tmp_path, J102, "         3     8       6    0    0    7\n")
    error = import_error(path)
    assert error.row == line_of(path, "REQUESTS/DURATIONS")
    assert "job 4 has 3 modes" in str(error) and "lists 2" in str(error)


def test_missing_section(tmp_path):
    text = J102.read_text()
    path = tmp_path / "cut.mm"
    path.write_text(text[:text.index("REQUESTS/DURATIONS")])
    assert "the section 'REQUESTS/DURATIONS' is missing" in str(import_error(path))


def test_missing_job_count(tmp_path):
    path = broken(tmp_path, J102, "jobs (incl. supersource/sink ):  12", "jobs: 12")
    assert "jobs (incl. supersource/sink ): N" in str(import_error(path))


def test_loop_in_successors(tmp_path):
    path = broken(tmp_path, J102, "   9        3          1          12\n",
                  "   9        3          2          12   2\n")
    error = import_error(path, CycleError)
    raw = raw_pairs(raw_psplib(J102)["succ"]) | {("J9", "J2")}
    loop = error.cycle + error.cycle[:1]
    assert all(pair in raw for pair in zip(loop, loop[1:])), error.cycle
    assert {"J2", "J9"} <= set(error.cycle) and "loop" in str(error)


def test_sm_with_several_modes(tmp_path):
    path = broken(tmp_path, J102, None, name="j102_2.sm")
    error = import_error(path)
    assert error.row == line_of(path, "   2        3          2") and error.column == "#modes"


def test_unknown_suffix_and_missing_file(tmp_path):
    path = broken(tmp_path, J102, None, name="j102_2.txt")
    assert "unknown research instance format" in str(import_error(path))
    with pytest.raises(InputError, match="not found"):
        read_research(tmp_path / "nothing.mm")


PAT1 = DATA / "rcp" / "patterson_pat1.rcp"


@pytest.mark.parametrize("old, new, mark, says", [
    ("6\t1\t0\t0\t2\t9\t10\t", "6\t1\t0\t0\t3\t9\t10\t", "6\t1\t0\t0\t3", "announces 3 successors"),
    ("6\t1\t0\t0\t2\t9\t10\t", "6\t1\t0\t0\t2\t9\t15\t", "9\t15", "from 1 to 14"),
    ("6\t1\t0\t0\t2\t9\t10\t", "6\t1\t0\t0\t2\t9\tten\t", "9\tten", "whole number"),
    ("2\t1\t2\t", "2\t1\t", "2\t1\t", "expected 3 resource availabilities"),
])
def test_malformed_rcp_names_the_line(tmp_path, old, new, mark, says):
    path = broken(tmp_path, PAT1, old, new)
    error = import_error(path)
    assert error.row == line_of(path, mark) and says in str(error), str(error)


def test_rcp_too_few_and_too_many_lines(tmp_path):
    text = PAT1.read_text()
    short = tmp_path / "short.rcp"
    short.write_text(text.replace("14\t3", "15\t3", 1))
    assert "ends after 14 of the 15 activities" in str(import_error(short))
    long = tmp_path / "long.rcp"
    long.write_text(text.replace("14\t3", "13\t3", 1))
    error = import_error(long)
    assert "more activity lines than the 13" in str(error)
    last = max(n for n, line in enumerate(text.splitlines(), start=1) if line.strip())
    assert error.row == last  # the 14th activity line is one too many
