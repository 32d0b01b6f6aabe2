"""CPM (forward and backward pass) against published worked examples, a public benchmark
library and networkx as an independent reference.

Sources (full citations in tests/data/*/README.md):
- Hendrickson & Au, Project Management for Construction, ch. 10, nine-activity example.
- Odeh, Columbia University course "Construction Scheduling": finish-to-start lags and
  start-to-start examples (numbers only).
- PSPLIB single-mode j30 instances, Kolisch & Sprecher (1997), EJOR 96(1):205-216.
- networkx (dag_longest_path_length, Bellman-Ford) on a start-time event graph.
"""

from __future__ import annotations

import pytest
from hypothesis import given
from hypothesis import strategies as st

from conftest import (DATA, PROPERTY, link_holds, load_json, nx_cpm, own_forward,
                      project_from_example, project_from_numbers, projects, read_psplib_sm)
from hasten.cpm import schedule

FIELDS = {"ES": "es", "EF": "ef", "LS": "ls", "LF": "lf", "TF": "total_float", "FF": "free_float"}


def dates(sched, field: str) -> dict[str, int]:
    return {a.id: getattr(a, FIELDS[field]) for a in sched.activities}


def as_int(values: dict) -> dict[str, int]:
    return {k: int(v) for k, v in values.items()}


# ---------------------------------------------------------------------------------------
# Hendrickson & Au, Project Management for Construction, ch. 10, nine-activity example
# ---------------------------------------------------------------------------------------

HENDRICKSON = load_json("examples/hendrickson_9act_cpm.json")


@pytest.fixture(scope="module")
def hendrickson():
    # activity data: verified in text (tutorsglobe copy of the book's table, see README)
    return schedule(project_from_example(HENDRICKSON))


def test_hendrickson_finish_and_critical_path_from_memory(hendrickson):
    # Hendrickson & Au ch. 10 (nine-activity example): 30 days, critical path A-C-F-I
    book = HENDRICKSON["published_answers"]["hendrickson_text_FROM_MEMORY_UNVERIFIED"]
    assert hendrickson.finish == book["project_duration"] == 30  # from memory
    assert hendrickson.critical_paths == (tuple(book["critical_path"]),)  # from memory
    assert hendrickson.critical_ids == book["critical_path"]  # from memory


@pytest.mark.parametrize("field, key", [("ES", "earliest_start"), ("LS", "latest_start")])
def test_hendrickson_early_and_late_starts_from_memory(hendrickson, field, key):
    # Hendrickson & Au ch. 10: per-activity starts implied by the book's event times
    # E = (0, 4, 12, 21, 24, 30), L = (0, 4, 12, 22, 24, 30)
    book = HENDRICKSON["published_answers"]["hendrickson_text_FROM_MEMORY_UNVERIFIED"][key]
    assert dates(hendrickson, field) == book  # from memory


@pytest.mark.parametrize("field, key", [("ES", "ES"), ("EF", "EF"), ("LS", "LS"), ("LF", "LF"),
                                        ("TF", "total_float"), ("FF", "free_float")])
def test_hendrickson_independent_check(hendrickson, field, key):
    # Hendrickson & Au ch. 10 data; answers: the data authors' own forward/backward pass with an
    # LP cross-check (hendrickson_9act_cpm.json, "independent_check"), not printed in the book
    check = HENDRICKSON["independent_check"]
    assert hendrickson.finish == int(check["project_duration"])
    assert dates(hendrickson, field) == as_int(check[key])
    assert hendrickson.critical_ids == check["critical"]


# ---------------------------------------------------------------------------------------
# Odeh, Columbia University course "Construction Scheduling" (numbers only)
# ---------------------------------------------------------------------------------------

ODEH = load_json("examples/odeh_lags_numbers.json")


def odeh_schedule(block: str):
    if block == "fs_no_lags":  # the same network as fs_lags with every lag 0
        return schedule(project_from_numbers(ODEH["fs_lags"]["activities"], lags=False))
    return schedule(project_from_numbers(ODEH[block]["activities"]))


@pytest.mark.parametrize("block", ["fs_lags", "fs_no_lags", "ss_no_lag", "ss_lags"])
def test_odeh_independent_check(block):
    # Odeh, "Construction Scheduling": the finish-to-start lag example (lags 4, 3, 1; 22 days),
    # the same network without lags (21 days) and the start-to-start example without lags and
    # with lags 6 and 1 (10 days). Answers: the data authors' own forward/backward pass with an
    # LP duration cross-check (odeh_lags_numbers.json, "independent_check")
    check = ODEH[block]["independent_check"]
    sched = odeh_schedule(block)
    assert sched.finish == check["project_duration"]
    assert sched.critical_ids == check["critical"]
    for field in FIELDS:
        assert dates(sched, field) == check[field], field


def test_odeh_fs_lags_verified_text():
    # Odeh, "Construction Scheduling", finish-to-start lag example: EF of A = 0 + 2 = 2
    # (verified text; the rest of that lecture's numbers were not in the stored text)
    sched = odeh_schedule("fs_lags")
    assert dates(sched, "EF")["A"] == ODEH["fs_lags"]["verified_text"]["EF"]["A"] == 2


def test_odeh_start_to_start_without_lag_verified_text():
    # Odeh, "Construction Scheduling", start-to-start example without lag (verified text):
    # duration 9, critical x, ES/EF/LS/LF of x, y, z
    text = ODEH["ss_no_lag"]["verified_text"]
    sched = odeh_schedule("ss_no_lag")
    assert sched.finish == text["project_duration"] == 9
    assert sched.critical_ids == text["critical"] == ["x"]
    for field in ("ES", "EF", "LS", "LF"):
        assert dates(sched, field) == text[field], field


# ---------------------------------------------------------------------------------------
# PSPLIB j30 single-mode instances: MPM-Time is the critical-path length
# ---------------------------------------------------------------------------------------

PSPLIB = sorted((DATA / "psplib_sm").glob("*.sm"))


def test_psplib_files_present():
    assert [p.name for p in PSPLIB] == ["j3010_1.sm", "j301_1.sm", "j301_2.sm"]


@pytest.mark.parametrize("path", PSPLIB, ids=lambda p: p.stem)
def test_psplib_critical_path_length_is_mpm_time(path):
    # PSPLIB (Kolisch & Sprecher 1997), header field MPM-Time of each .sm file
    project, mpm_time = read_psplib_sm(path)
    assert len(project.activities) == 32
    sched = schedule(project)
    assert sched.finish == mpm_time
    # and networkx agrees on every early and late start
    finish, es, ls = nx_cpm(project)
    assert finish == mpm_time
    assert dates(sched, "ES") == es
    assert dates(sched, "LS") == ls


# ---------------------------------------------------------------------------------------
# networkx as an independent reference on random networks with all four link types
# ---------------------------------------------------------------------------------------


@PROPERTY
@given(projects(min_n=1, max_n=10, crashable=False, max_links=18))
def test_random_networks_match_networkx(project):
    # reference: networkx dag_longest_path_length (finish) and Bellman-Ford (every ES, LS)
    sched = schedule(project)
    finish, es, ls = nx_cpm(project)
    assert sched.finish == finish
    assert dates(sched, "ES") == es
    assert dates(sched, "LS") == ls


@PROPERTY
@given(projects(min_n=1, max_n=10, crashable=False, max_links=18))
def test_float_properties(project):
    # common practice: the definitions of early/late dates and of total and free float
    sched = schedule(project)
    by_id = sched.by_id()
    d = {a.id: a.duration for a in project.activities}
    for a in sched.activities:
        assert a.ef == a.es + a.duration and a.lf == a.ls + a.duration
        assert a.es >= 0 and a.lf <= sched.finish
        assert a.total_float >= 0  # no deadline: float is never negative
        assert 0 <= a.free_float <= a.total_float
        assert a.critical == (a.total_float == 0)
    assert any(a.critical for a in sched.activities)
    assert sched.finish == max(a.ef for a in sched.activities)
    for k in project.links:  # every link holds for the early dates and for the late dates
        p, s = by_id[k.pred], by_id[k.succ]
        assert link_holds(k, p.es, d[k.pred], s.es, d[k.succ])
        assert link_holds(k, p.ls, d[k.pred], s.ls, d[k.succ])
    for path in sched.critical_paths:
        assert all(by_id[x].critical for x in path)


@PROPERTY
@given(projects(min_n=1, max_n=8, crashable=False, max_links=14), st.data())
def test_floats_mean_what_they_say(project, data):
    # common practice: free float = how far an activity can start later without moving any
    # other activity's early start or the project finish; total float = how far it can start
    # later without moving the project finish. Checked by re-running our own forward pass
    # (conftest.own_forward) with the activity held back.
    sched = schedule(project)
    d = {a.id: a.duration for a in project.activities}
    a = data.draw(st.sampled_from(sched.activities))
    es0 = dates(sched, "ES")
    others = {k: v for k, v in es0.items() if k != a.id}

    finish, es = own_forward(project, d, {a.id: a.es + a.free_float})
    assert finish == sched.finish and {k: v for k, v in es.items() if k != a.id} == others
    finish, es = own_forward(project, d, {a.id: a.es + a.free_float + 1})
    assert finish > sched.finish or {k: v for k, v in es.items() if k != a.id} != others

    assert own_forward(project, d, {a.id: a.es + a.total_float})[0] == sched.finish
    assert own_forward(project, d, {a.id: a.es + a.total_float + 1})[0] == sched.finish + 1


@PROPERTY
@given(projects(min_n=1, max_n=9, crashable=False), st.integers(-6, 10))
def test_deadline_shifts_every_total_float(project, shift):
    # common practice: a backward pass from a deadline `shift` days after the early finish
    # moves every late date and total float by `shift` (negative float when the deadline is
    # earlier); early dates do not move. networkx late starts from the same deadline agree.
    base = schedule(project)
    deadline = base.finish + shift
    late = schedule(project, deadline=deadline)
    _, _, ls = nx_cpm(project, deadline=deadline)
    assert late.finish == base.finish
    assert dates(late, "LS") == ls
    for a, b in zip(base.activities, late.activities):
        assert b.es == a.es and b.ef == a.ef
        assert b.ls == a.ls + shift and b.lf == a.lf + shift
        assert b.total_float == a.total_float + shift
        assert b.critical == a.critical
