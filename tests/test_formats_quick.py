"""The quick paths of the reader give exactly what the full paths give, or step aside.

Reading a large project takes quick paths (:mod:`hasten.formats.quick`, the table of text
cells in :func:`hasten.formats.tables.table_from_grid`, the latest finish bound in
:mod:`hasten.formats.reach`, instances of :mod:`hasten.formats.instances`). Each is checked
here against the full path on random tables mixing plain cells with every kind of slip the
full path refuses or reads another way, and the latest finish bound against networkx's
longest path (``dag_longest_path_length``) on the same graph. The tables are invented for
these checks.
"""

from __future__ import annotations

import copy
import pickle
import random
from dataclasses import replace
from datetime import date

import networkx as nx
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from hasten.errors import InputError
from hasten.formats.activities import _activity
from hasten.formats.instances import instance, instances, plain_defaults
from hasten.formats.links import check_acyclic, column_links, resolve_links
from hasten.formats.quick import quick_activities, quick_links
from hasten.formats.reach import _in_a_row, _latest_finish, _longest, _span, _work
from hasten.formats.tables import Row, Table, table_from_grid
from hasten.project import Activity, Calendar, Link, LinkType, Option, Project

# cells: mostly plain, sometimes what the full path refuses or reads another way
_ID = st.one_of(st.sampled_from(["A", "B", "C", "D", "E", "F"]),
                st.sampled_from(["a b", "A;", "é", "A\u200b", "", " A", "A\n", "B"]))
_DAYS = st.one_of(st.from_regex(r"[0-9]{1,3}", fullmatch=True),
                  st.sampled_from(["", "5.0", "-1", "1,000", "5d", "1234567", "٣", "3\n4"]))
_MONEY = st.one_of(st.from_regex(r"[0-9]{1,5}(\.[0-9]{1,2})?", fullmatch=True),
                   st.sampled_from(["", "1e3", "-5", "1,250", "€5", ".5", "5.", "nan"]))
_TEXT = st.one_of(st.sampled_from(["", "Pour slab", "steel"]), st.text(max_size=4))
_PRED = st.one_of(st.sampled_from(["", "A", "B; C", "A:SS+2", "B:ff-1; A", "C:SF"]),
                  st.sampled_from(["A:XX", "A:SS+x", " ; B", "A;A", "A:SS;A:SS+1", "G",
                                   "é", ":FS", "A:FS+1234567890", "D:SS +2", "B\tC"]))
_ROW = st.fixed_dictionaries({"id": _ID, "duration": _DAYS, "crash_duration": _DAYS,
                              "cost": _MONEY, "crash_cost": _MONEY, "name": _TEXT,
                              "trade": _TEXT, "predecessors": _PRED})


def _table(rows: list[dict[str, str]], columns: tuple[str, ...]) -> Table:
    return Table("activities.csv", columns,
                 tuple(Row(line, {c: r[c].strip() for c in columns})
                       for line, r in enumerate(rows, start=2)))


@settings(max_examples=400, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.lists(_ROW, min_size=1, max_size=6),
       st.sets(st.sampled_from(["crash_duration", "cost", "crash_cost", "name", "trade"])))
def test_quick_activities_are_the_full_paths_or_none(rows, dropped):
    """Every activity of the quick path equals the full path's; a table the full path
    refuses (on any row) never passes the quick path."""
    columns = tuple(c for c in ("id", "name", "trade", "duration", "crash_duration", "cost",
                                "crash_cost", "predecessors") if c not in dropped)
    table = _table(rows, columns)
    quick = quick_activities(table)
    try:
        full = [_activity(row, table, False) for row in table.rows]
    except InputError:
        assert quick is None
        return
    assert quick is None or quick == full
    if quick is not None:
        assert [hash(a) for a in quick] == [hash(a) for a in full]


def test_quick_activities_take_a_plain_table_and_leave_the_rest():
    plain = _table([{"id": "A", "duration": "5", "crash_duration": "3", "cost": "100",
                     "crash_cost": "160.5", "name": "Pour slab", "trade": "concrete",
                     "predecessors": ""}], ("id", "name", "trade", "duration",
                                            "crash_duration", "cost", "crash_cost"))
    assert quick_activities(plain) == [Activity("A", 5, name="Pour slab", trade="concrete",
                                                crash_duration=3, cost=100.0,
                                                crash_cost=160.5)]
    # a progress or calendar column: the full path reads it
    other = Table("activities.csv", ("id", "duration", "calendar"),
                  (Row(2, {"id": "A", "duration": "5", "calendar": ""}),))
    assert quick_activities(other) is None
    # a cell holding a line break is no plain number, even if its lines are
    broken = Table("activities.csv", ("id", "duration", "crash_duration"),
                   (Row(2, {"id": "A", "duration": "5", "crash_duration": "3\n4"}),))
    assert quick_activities(broken) is None


def test_whole_numbers_read_as_one_list_only_in_their_plainest_form():
    """A column of whole numbers is read at once only where each cell is 1 to n ASCII
    digits without a leading zero; anything else is left to the patterns of the full
    path (which then read or refuse it cell by cell)."""
    from hasten.formats.quick import _whole

    assert _whole(["5", "0", "12", "999999"], 6) == [5, 0, 12, 999999]
    for column in (["05"], [""], ["5", ""], ["1000000"], ["1,2"], ["\u0663"], ["true"],
                   ["-1"], ["1e3"], ["5.0"], ["NaN"], [" 5"], ["9" * 5000]):
        assert _whole(column, 6) is None, column


@settings(max_examples=400, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.lists(_PRED, min_size=1, max_size=6))
def test_quick_links_are_the_full_paths_or_none(predecessors):
    """The links and their positions of the quick path equal the full path's (column links
    resolved and checked for loops); a column the full path refuses never passes."""
    ids = ["A", "B", "C", "D", "E", "F"][:len(predecessors)]
    table = _table([{"id": i, "predecessors": p} for i, p in zip(ids, predecessors)],
                   ("id", "predecessors"))
    quick = quick_links(table, ids)
    try:
        specs = resolve_links(column_links(table), ids)
        positions = check_acyclic(specs, ids)
    except InputError:
        assert quick is None
        return
    if quick is not None:
        links, pred_at, succ_at = quick
        assert links == [s.link for s in specs.values()]
        assert (pred_at.tolist(), succ_at.tolist()) == positions


def test_quick_links_leave_links_up_the_table_to_the_full_path():
    table = _table([{"id": "A", "predecessors": "B"}, {"id": "B", "predecessors": ""}],
                   ("id", "predecessors"))
    assert quick_links(table, ["A", "B"]) is None
    ok = _table([{"id": "A", "predecessors": ""}, {"id": "B", "predecessors": "A:SS+2; A"}],
                ("id", "predecessors"))
    links, pred_at, succ_at = quick_links(ok, ["A", "B"])
    assert (links, pred_at.tolist(), succ_at.tolist()) == (
        [Link("A", "B", LinkType.SS, 2), Link("A", "B")], [0, 0], [1, 1])


_CELL = st.one_of(st.sampled_from(["", " ", "A", " b ", "\t", "x\r\ny", "c\r"]),
                  st.text(max_size=3))


@settings(max_examples=300, deadline=None)
@given(st.lists(st.lists(_CELL, min_size=0, max_size=4), min_size=0, max_size=6))
def test_a_grid_of_text_reads_as_cell_by_cell(grid):
    """table_from_grid's joined-text path gives what the cell-by-cell functions give
    (rebuilt here from tables._is_blank and tables._row, which it skips for text rows)."""
    from hasten.formats import tables

    lines = list(enumerate(grid, start=1))
    try:
        quick = table_from_grid("t.csv", lines)
    except InputError as error:
        quick = error
    header, names, rows = None, (), []
    try:
        for line, cells in lines:
            if tables._is_blank(cells):
                continue
            if header is None:
                header, names = line, tables.column_names("t.csv", line, cells)
            else:
                rows.append(tables._row("t.csv", line, names, cells, all(names)))
        full = Table("t.csv", tuple(n for n in names if n), tuple(rows), header)
    except InputError as error:
        full = error
    if isinstance(full, InputError):
        assert isinstance(quick, InputError) and str(quick) == str(full)
    else:
        assert quick == full


def test_instances_are_the_values_the_constructor_makes():
    made = Activity("A1", 5, name="Pour", crash_duration=3, cost=1.0, crash_cost=2.0)
    defaults = plain_defaults(Activity, ("id", "duration"))
    quick = instance(Activity, {**defaults, "id": "A1", "duration": 5, "name": "Pour",
                                "crash_duration": 3, "cost": 1.0, "crash_cost": 2.0})
    assert quick == made and hash(quick) == hash(made) and repr(quick) == repr(made)
    assert pickle.loads(pickle.dumps(quick)) == made and copy.deepcopy(quick) == made
    assert replace(quick, duration=6) == replace(made, duration=6)
    assert instances(Link, [{"pred": "A", "succ": "B", "type": LinkType.FS, "lag": 0}]) == \
        [Link("A", "B")]
    assert plain_defaults(Link) is None  # pred and succ have no default: the caller gives them


_PROJECT = st.integers(2, 8).flatmap(lambda n: st.tuples(
    st.lists(st.tuples(st.integers(0, 40), st.booleans(), st.integers(0, 3)),
             min_size=n, max_size=n),
    st.lists(st.tuples(st.integers(0, n - 1), st.integers(0, n - 1), st.integers(-3, 30)),
             max_size=12)))


@settings(max_examples=300, deadline=None)
@given(_PROJECT, st.booleans())
def test_the_latest_finish_bound_is_the_longest_path(data, six_days):
    """The one-pass bound (links taken in their successors' order) equals the topological
    pass of check_reach and networkx's longest path through the same spans."""
    spec, edges = data
    cal = Calendar((0, 1, 2, 3, 4, 5) if six_days else (0, 1, 2, 3, 4))
    start = date(2027, 1, 4)
    acts = tuple(Activity(f"A{i}", d, not_before=date(2027, 1, 4 + late * 7) if nb else None)
                 for i, (d, nb, late) in enumerate(spec))
    links = {}
    for p, s, lag in edges:
        if p != s:
            p, s = min(p, s), max(p, s)  # down the table: no loop
            links[(p, s)] = Link(f"A{p}", f"A{s}", LinkType.FS, lag)
    # successors' order is what the reader gives; any other order is sorted first
    project = Project("p", start, acts, tuple(links.values()), calendar=cal)
    bound = _latest_finish(project, {"": cal}, start)
    base = {a.id: max(start, a.not_before or start).toordinal() for a in acts}
    work = {a.id: _span(_work(a)[0], cal) for a in acts}
    lags = [_span(k.lag, cal) + 7 for k in project.links]
    finish, _ = _longest(project, base, work, lags)
    assert bound == max(finish.values())
    graph = nx.DiGraph()
    for a in acts:
        graph.add_edge("origin", ("s", a.id), weight=base[a.id])
        graph.add_edge(("s", a.id), ("f", a.id), weight=work[a.id])
    for k, lag in zip(project.links, lags):
        graph.add_edge(("f", k.pred), ("s", k.succ), weight=lag)
    assert bound == nx.dag_longest_path_length(graph, weight="weight")


def _large(seed: int, chain: bool, shuffled: bool) -> tuple[Project, dict[str, Calendar]]:
    """3,000 activities with 6,000-odd links pointing down the table: each activity's
    predecessors drawn from all the activities above it, or (``chain``) mostly the one just
    above; some not_before dates, lags of both signs, calendars of their own, progress."""
    rng = random.Random(seed)
    cals = (Calendar((0, 1, 2, 3, 4, 5), name="six"), Calendar((0, 2, 4), name="three"))
    acts, links = [], {}
    for i in range(3000):
        acts.append(Activity(f"A{i}", rng.randint(0, 40),
                             not_before=date(2027, 3, 1) if rng.random() < 0.02 else None,
                             calendar=rng.choice(["", "", "six", "three"]),
                             actual_start=date(2027, 1, 4) if i < 5 else None,
                             remaining=3 if i < 3 else None))
        for _ in range(rng.randint(0, 3) if i else 0):
            p = i - 1 if chain and rng.random() < 0.9 else rng.randrange(i)
            links[(p, i)] = Link(f"A{p}", f"A{i}", LinkType.FS, rng.randint(-3, 12))
    order = list(links.values())
    if shuffled:
        rng.shuffle(order)
    project = Project("p", date(2027, 1, 4), tuple(acts), tuple(order), calendars=cals)
    return project, {"": project.calendar} | {c.name: c for c in cals}


@settings(max_examples=12, deadline=None,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(st.integers(0, 10**6), st.booleans(), st.booleans(), st.sampled_from([16, 512]))
def test_the_latest_finish_bound_of_thousands_of_links(monkeypatch, seed, chain, shuffled,
                                                        block):
    """With thousands of links, links across blocks of activities taken at once (or, for a
    chain of activities, one by one), the bound is still networkx's longest path through
    the same spans, and the topological pass of check_reach."""
    import numpy as np

    from hasten.formats import reach

    monkeypatch.setattr(reach, "_BLOCK", block)
    project, calendars = _large(seed, chain, shuffled)
    position = {a.id: i for i, a in enumerate(project.activities)}
    pred = np.array([position[k.pred] for k in project.links])
    succ = np.array([position[k.succ] for k in project.links])
    within = np.count_nonzero(pred >= succ - succ % block) / len(pred)
    assert (within <= 0.1) == (block == 16 and not chain)  # blocks taken at once, or not
    start = project.start
    calendar_of = {a.id: calendars.get(a.calendar, project.calendar) for a in project.activities}
    base = {a.id: max(start, a.not_before or start).toordinal() for a in project.activities}
    work = {a.id: _span(_work(a)[0], calendar_of[a.id]) for a in project.activities}
    lags = [_span(k.lag, calendar_of[k.succ]) + 7 for k in project.links]
    finish, _ = _longest(project, base, work, lags)
    assert _latest_finish(project, calendars, start) == max(finish.values())
    graph = nx.DiGraph()
    for a in project.activities:
        graph.add_edge("origin", ("s", a.id), weight=base[a.id])
        graph.add_edge(("s", a.id), ("f", a.id), weight=work[a.id])
    for k, lag in zip(project.links, lags):
        graph.add_edge(("f", k.pred), ("s", k.succ), weight=lag)
    assert max(finish.values()) == nx.dag_longest_path_length(graph, weight="weight")


def test_the_plain_bound_is_the_bound():
    """Where the reader knows there is no progress, option, not_before or calendar to look
    for (``plain``), the bound is the one found looking for them."""
    rng = random.Random(5)
    acts = tuple(Activity(f"A{i}", rng.randint(0, 40)) for i in range(3000))
    links = tuple(Link(f"A{p}", f"A{i}", LinkType.SS, rng.randint(-2, 9))
                  for i in range(1, 3000) for p in {rng.randrange(i), rng.randrange(i)})
    project = Project("p", date(2027, 1, 4), acts, links)
    calendars = {"": project.calendar}
    assert _latest_finish(project, calendars, project.start, plain=True) == \
        _latest_finish(project, calendars, project.start)


_KIND = st.sampled_from(["plain", "started", "remaining", "finished", "option", "six", "three"])


@settings(max_examples=300, deadline=None)
@given(_PROJECT, st.lists(_KIND, min_size=8, max_size=8), st.booleans())
def test_all_in_a_row_is_never_below_the_longest_path(data, kinds, data_date):
    """The bound taken first (every activity and link one after another) is never below
    the longest path that check_reach otherwise finds (its topological pass), with
    progress, slower options, calendars of their own, not_before dates and lags of any
    sign; networkx's longest path checks that pass above."""
    spec, edges = data
    start = date(2027, 1, 4)
    cals = (Calendar((0, 1, 2, 3, 4, 5), name="six"), Calendar((0, 2, 4), name="three"))
    acts = []
    for i, ((d, nb, late), kind) in enumerate(zip(spec, kinds)):
        fields = {"not_before": date(2027, 1, 4 + late * 7) if nb else None}
        if kind in ("started", "remaining", "finished"):
            fields["actual_start"] = date(2027, 1, 4)
            fields["remaining"] = d + 3 if kind == "remaining" else None
            fields["actual_finish"] = date(2027, 1, 5) if kind == "finished" else None
        elif kind == "option":
            fields["options"] = (Option("slow", d + 9, 0.0),)
        elif kind in ("six", "three"):
            fields["calendar"] = kind
        acts.append(Activity(f"A{i}", d, **fields))
    links = {(min(p, s), max(p, s)): Link(f"A{min(p, s)}", f"A{max(p, s)}", LinkType.FS, lag)
             for p, s, lag in edges if p != s}
    project = Project("p", start, tuple(acts), tuple(links.values()), calendars=cals,
                      data_date=date(2027, 1, 6) if data_date else None)
    calendars = {"": project.calendar} | {c.name: c for c in cals}
    floor = max(start, project.data_date or start)
    calendar_of = {a.id: calendars.get(a.calendar, project.calendar) for a in acts}
    base = {a.id: max(floor, a.not_before or floor).toordinal() for a in acts}
    work = {a.id: _span(_work(a)[0], calendar_of[a.id]) for a in acts}
    lags = [_span(k.lag, calendar_of[k.succ]) + 7 for k in project.links]
    finish, _ = _longest(project, base, work, lags)
    assert _in_a_row(project, calendars, floor) >= max(finish.values())
    assert _latest_finish(project, calendars, floor) == max(finish.values())


_CSV_CELL = st.one_of(st.sampled_from(["", "A", "12", "Pour slab", "x y", "'=1", "it's", " a",
                                       "b ", "\t", "\xa0c", "é", "d\x85"]),
                      st.text(alphabet=" ,ab'\t\n\"\r\x0b", max_size=3))


@settings(max_examples=400, deadline=None)
@given(st.lists(st.lists(_CSV_CELL, min_size=1, max_size=3), min_size=0, max_size=5),
       st.booleans())
def test_a_plain_csv_text_reads_as_the_csv_module_reads_it(lines, last_break):
    """folder._plain_table (split on line breaks and commas) gives the table the csv
    module's records give (folder._Records through table_from_grid), or steps aside."""
    from hasten.formats.folder import _plain_table, _Records

    text = "\n".join(",".join(cells) for cells in lines) + ("\n" if last_break else "")
    try:
        quick = _plain_table("t.csv", text)
    except InputError as error:
        quick = error
    try:
        full = table_from_grid("t.csv", _Records(text))
    except InputError as error:
        full = error
    if quick is None:
        return
    if isinstance(full, InputError):
        assert isinstance(quick, InputError) and str(quick) == str(full)
    else:
        assert quick == full


# -- tables kept by column, activities and links made column by column --------------------

def _parsed(text: str, quick: bool, monkeypatch) -> object:
    """The project (or the error's text) of an activities.csv ``text``: by the quick paths
    (the table kept by column) or by the full paths only (csv module, row by row)."""
    from hasten.formats import activities, folder, parse
    from hasten.formats.parse import parse_tables
    from hasten.formats.tables import Settings, Tables

    settings = Settings("project.toml", {"name": "p", "start": date(2027, 1, 4)})
    with monkeypatch.context() as patch:
        if not quick:
            patch.setattr(activities, "quick_activities", lambda table: None)
            patch.setattr(parse, "quick_links", lambda table, ids: None)
            table = table_from_grid("activities.csv", folder._Records(text))
        else:
            table = folder._plain_table("activities.csv", text)
            if table is None:
                return None
        try:
            return parse_tables(Tables(settings, table))
        except InputError as error:
            return str(error)


_PLAIN_ROW = st.fixed_dictionaries({
    "id": st.sampled_from(["A", "B", "C", "D", "E", "F"]),
    "duration": st.one_of(st.from_regex(r"[0-9]{1,2}", fullmatch=True), st.sampled_from(["", "x"])),
    "crash_duration": st.one_of(st.just(""), st.from_regex(r"[0-9]", fullmatch=True)),
    "cost": st.one_of(st.just(""), st.from_regex(r"[0-9]{1,3}(\.[0-9])?", fullmatch=True)),
    "crash_cost": st.one_of(st.just(""), st.from_regex(r"[0-9]{1,4}", fullmatch=True)),
    "name": st.sampled_from(["", "Pour slab", "Frame", "x y"]),
    "predecessors": st.sampled_from(["", "A", "B; C", "A:SS+2", "B:ff-1; A", "C:SF", "A;A",
                                     "A:XX", "A:", " ; B", "G", "E:FS+3; D", "B ;C"]),
})


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.too_slow,
                                                                  HealthCheck.function_scoped_fixture])
@given(st.lists(_PLAIN_ROW, min_size=1, max_size=6),
       st.sets(st.sampled_from(["crash_duration", "cost", "crash_cost", "name", "predecessors"])))
def test_a_plain_file_reads_as_the_full_path_reads_it(monkeypatch, rows, dropped):
    """A plain activities.csv read by the quick paths (table kept by column, activities
    and links made column by column) gives the project, or the error, the full paths give."""
    columns = [c for c in ("id", "name", "duration", "crash_duration", "cost", "crash_cost",
                           "predecessors") if c not in dropped]
    text = ",".join(columns) + "\n" + "".join(
        ",".join(r[c] for c in columns) + "\n" for r in rows)
    quick = _parsed(text, True, monkeypatch)
    full = _parsed(text, False, monkeypatch)
    if quick is not None:
        assert quick == full
        if isinstance(quick, Project):
            assert [hash(a) for a in quick.activities] == [hash(a) for a in full.activities]
            assert repr(quick) == repr(full)


def test_rows_kept_by_column_are_the_rows():
    from hasten.formats.tables import ColumnRows

    kept = ColumnRows(3, ("id", "duration"), {"id": ["A", "B"], "duration": ["5", ""]})
    rows = (Row(3, {"id": "A", "duration": "5"}), Row(4, {"id": "B", "duration": ""}))
    assert len(kept) == 2 and list(kept.lines) == [3, 4]
    assert kept == rows and rows == kept and tuple(kept) == rows and kept[-1] == rows[-1]
    assert kept != rows[:1] and Table("t", ("id", "duration"), kept) == Table(
        "t", ("id", "duration"), rows)
    assert ColumnRows(2, (), {}) == () and not ColumnRows(2, (), {})


def test_instances_by_column_are_the_values_the_constructor_makes():
    from hasten.formats.instances import instances_by_column

    made = instances_by_column(Activity, 2, {"id": ["A", "B"], "duration": [5, 0],
                                             "name": ["Pour", ""], "crash_cost": [2.0, None]})
    built = [Activity("A", 5, name="Pour", crash_cost=2.0), Activity("B", 0)]
    assert made == built and [hash(a) for a in made] == [hash(a) for a in built]
    assert [repr(a) for a in made] == [repr(a) for a in built]
    assert pickle.loads(pickle.dumps(made)) == built and copy.deepcopy(made) == built
    assert replace(made[0], cost=1.0) == replace(built[0], cost=1.0)
    assert made[1].steps == () and made[1].calendar == ""  # defaults read from the class
    links = instances_by_column(Link, 1, {"pred": ["A"], "succ": iter(["B"]),
                                          "type": [LinkType.SS], "lag": [2]})
    assert links == [Link("A", "B", LinkType.SS, 2)]
