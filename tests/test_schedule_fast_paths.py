"""The fast paths of ``hasten schedule`` against the straightforward ones they replace.

* the driving links of each activity (``cpm._driving_ids``, made per count of driving
  links) against a check of every link by the precedence formulas of
  :mod:`hasten.passes` (FS ``S_j >= S_i + d_i + l`` and the others), link by link;
* the critical paths (from the driving links sorted by successor) against the walk over
  one list of driving predecessors per activity that ``schedule`` used before;
* the text table of ``schedule`` (built column by column) against the table built from
  ``schedule_rows``, one dictionary per row, as before;
* ``render_fit.table`` (every row of one line by one format call, whole-number columns
  aligned right without reading them) against a plain renderer written here.

The projects are random and invented; no figure is checked, only that both ways agree.
"""

from __future__ import annotations

import re
from datetime import date

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from hasten.cpm import MAX_PATHS, schedule
from hasten.network import Network
from hasten.project import Activity, Link, LinkType, Project
from hasten.render import schedule_text
from hasten.render_fit import table
from hasten.render_json import schedule_rows

_SLACK = {  # how far the successor's event is after what the link allows (hasten.passes)
    LinkType.FS: lambda si, di, sj, dj, lag: sj - (si + di + lag),
    LinkType.SS: lambda si, di, sj, dj, lag: sj - (si + lag),
    LinkType.FF: lambda si, di, sj, dj, lag: sj + dj - (si + di + lag),
    LinkType.SF: lambda si, di, sj, dj, lag: sj + dj - (si + lag),
}

_PROJECT = st.tuples(
    st.lists(st.integers(0, 6), min_size=1, max_size=14),
    st.lists(st.tuples(st.integers(0, 13), st.integers(0, 13), st.sampled_from(list(LinkType)),
                       st.integers(-2, 3)), max_size=30),
    st.integers(-6, 3))


def _project(durations, edges) -> Project:
    ids = [f"A{k}" for k in range(len(durations))]
    links = {}
    for p, s, kind, lag in edges:
        p, s = min(p, s), max(p, s)
        if p != s and s < len(ids) and (p, s) not in links:
            links[(p, s)] = Link(ids[p], ids[s], kind, lag)
    return Project("fast paths", date(2025, 3, 3),
                   tuple(Activity(i, d, name=f"work {i}", trade="t" if k % 2 else "")
                         for k, (i, d) in enumerate(zip(ids, durations))),
                   tuple(links.values()))


def _old_critical_paths(order, ids, critical, driving):
    """The walk ``schedule`` made before (one list of driving predecessors per activity)."""
    nxt, has_pred = {}, set()
    for j, preds in enumerate(driving):
        if not critical[j]:
            continue
        for i in preds:
            if critical[i]:
                nxt.setdefault(i, []).append(j)
                has_pred.add(j)
    paths = []
    for s in [i for i in order if critical[i] and i not in has_pred]:
        stack = [(s, [s])]
        while stack:
            node, path = stack.pop()
            succs = nxt.get(node)
            if not succs:
                paths.append(tuple(ids[k] for k in path))
                if len(paths) >= MAX_PATHS:
                    return tuple(paths), True
                continue
            for j in reversed(succs):
                stack.append((j, path + [j]))
    return tuple(paths), False


@settings(max_examples=120, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(_PROJECT)
def test_driving_links_and_critical_paths_agree_with_a_check_of_every_link(case):
    durations, edges, early = case
    project = _project(durations, edges)
    for deadline in (None, None if early is None else max(schedule(project).finish + early, 0)):
        sched = schedule(project, deadline=deadline)
        rows = {a.id: a for a in sched.activities}
        ids = [a.id for a in project.activities]
        driving = {i: [] for i in ids}
        for link in project.links:  # in the project's order of links
            i, j = rows[link.pred], rows[link.succ]
            if _SLACK[link.type](i.es, i.duration, j.es, j.duration, link.lag) == 0:
                driving[link.succ].append(link.pred)
        assert {a.id: list(a.driving) for a in sched.activities} == driving
        index = {i: k for k, i in enumerate(ids)}
        old = _old_critical_paths(Network(project).order, ids, [rows[i].critical for i in ids],
                                  [[index[p] for p in driving[i]] for i in ids])
        assert (sched.critical_paths, sched.paths_truncated) == old


def _old_table_body(project, sched, wide=False):
    """The table of ``schedule_text`` as it was built: from one dictionary per row."""
    state = {"finished": "done", "not started": "to do"}
    progress = project.data_date is not None
    own = any(a.calendar for a in project.activities)
    head = ["id", "name", "trade"] + (["calendar"] if own else []) + (["status"] if progress else [])
    first = ["id", "name", "trade"] + (["calendar"] if own else [])
    dates = ["duration", "early_start", "early_finish", "late_start", "late_finish", "total_float",
             "free_float"]
    return table(
        [[r[k] for k in first] + ([state.get(r["state"], r["state"])] if progress else [])
         + [r[k] for k in dates] + ["yes" if r["critical"] else ""]
         for r in schedule_rows(project, sched)],
        head + [("days\nleft" if progress else "days"), "early\nstart", "early\nfinish", "late\nstart",
                "late\nfinish", "total\nfloat", "free\nfloat", "crit-\nical"],
        shorten=list(range(1, len(head))), optional=[2], wide=wide)


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(_PROJECT, st.booleans())
def test_the_schedule_table_is_the_table_of_its_rows(case, wide):
    durations, edges, _ = case
    project = _project(durations, edges)
    sched = schedule(project)
    assert "\n" + _old_table_body(project, sched, wide) + "\n" in schedule_text(project, sched, wide=wide)


_NUMBER = re.compile(r"^-?[\d,]+(\.\d+)?$")


def _plain_table(rows, headers):
    """Columns two spaces apart under a dashed rule, numbers right, texts left (one line each)."""
    texts = [["" if c is None else str(c) for c in r] for r in rows]
    widths = [max([len(h)] + [len(r[k]) for r in texts]) for k, h in enumerate(headers)]
    right = [bool(texts) and any(r[k] for r in texts) and all(_NUMBER.match(r[k]) for r in texts if r[k])
             for k in range(len(headers))]

    def line(cells):
        return "  ".join(c.rjust(w) if r else c.ljust(w) for c, w, r in zip(cells, widths, right)).rstrip()

    return "\n".join([line(headers), "  ".join("-" * w for w in widths)] + [line(r) for r in texts])


_CELL = st.one_of(st.integers(-10**6, 10**6), st.none(), st.sampled_from(["", "12", "-3", "1,200", "x", "4.5"]),
                  st.text(st.characters(blacklist_categories=("Cc", "Cs", "Zl", "Zp")), max_size=8))


@settings(max_examples=200, deadline=None)
@given(st.integers(1, 5).flatmap(lambda k: st.tuples(
    st.lists(st.text("abc", min_size=1, max_size=5), min_size=k, max_size=k),
    st.lists(st.lists(_CELL, min_size=k, max_size=k), max_size=6))))
def test_a_table_of_one_line_cells_is_the_plain_table(case):
    headers, rows = case
    assert table(rows, headers, wide=True) == _plain_table(rows, headers)


def test_a_long_text_is_printed_as_echo_prints_it(tmp_path, monkeypatch):
    """The command's JSON and text, printed by the path for long texts, are what
    ``typer.echo`` prints (the threshold lowered so that a small project takes that path)."""
    from typer.testing import CliRunner

    from hasten import cli
    from hasten.formats import write_project

    project = _project([3, 0, 2, 5], [(0, 1, LinkType.FS, 0), (1, 2, LinkType.SS, 1), (0, 3, LinkType.FF, 2)])
    folder = tmp_path / "p"
    write_project(project, folder)
    before = {args: CliRunner().invoke(cli.app, ["schedule", str(folder), *args]).output
              for args in (("--json",), ())}
    monkeypatch.setattr(cli, "_LONG", 0)
    for args, output in before.items():
        result = CliRunner().invoke(cli.app, ["schedule", str(folder), *args])
        assert result.exit_code == 0, result.output
        assert result.output == output and output.endswith("\n") and len(output) > 200
