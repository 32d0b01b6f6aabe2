"""Least-cost acceleration (crashing) against published and independently computed answers.

Sources (full citations in tests/data/*/README.md):
- ques10.com worked solution of a University of Mumbai construction-management exam question
  (indirect cost 80 a day): stages at 22, 18, 17 days and the optimum (verified text); the full
  curve 23..12 computed by the data authors with scipy linprog.
- Hillier & Lieberman, Introduction to Operations Research, Reliable Construction Co.
  (crash table and answer from memory, unverified).
- Gueret, Prins & Sevaux (2002), Applications of Optimization with Xpress-MP, section 7.1
  "Construction of a stadium": table from the book; curve computed by the dataset authors.
- Hand-worked examples of our own (reverse-critical network, equal-cost ties), cross-checked
  with our own scipy linprog formulation (conftest.linprog_least_cost).
"""

from __future__ import annotations

import csv
import dataclasses
from datetime import timedelta

import pytest

from conftest import (DATA, START, TOL, linprog_least_cost, linprog_min_finish, load_json,
                      make_project, project_from_example, project_from_stadium)
from hasten.planner import Planner
from hasten.project import Activity, Calendar, Contract, Link, LinkType
from hasten.cpm import schedule


def close(a: float, b: float) -> bool:
    return abs(a - b) <= TOL * max(1.0, abs(a), abs(b))


def cuts(plan) -> dict[str, int]:
    """Days taken off each shortened activity."""
    return {a.id: a.shortened_by for a in plan.activities if a.shortened_by}


def curve_costs(study: Planner) -> dict[int, float]:
    return {p.finish: p.added_cost for p in study.curve()}


# ---------------------------------------------------------------------------------------
# ques10.com / University of Mumbai exam question, indirect cost 80 a day
# ---------------------------------------------------------------------------------------

QUES10 = load_json("examples/ques10_indirect80.json")
QUES10_TEXT = QUES10["published_answers"]["VERIFIED_TEXT"]
QUES10_CHECK = QUES10["independent_check"]


@pytest.fixture(scope="module")
def ques10() -> Planner:
    # no contract: damages and bonus are 0; time costs are the 80 a day indirect cost only
    return Planner(project_from_example(QUES10, indirect=80))


def test_ques10_normal_plan(ques10):
    # ques10.com worked solution (verified text): normal 23 days, critical A-C-F-H, direct 3,900,
    # total 5,740; cost slopes per activity
    assert ques10.normal_finish == QUES10_TEXT["normal"]["duration"] == 23
    assert "-".join(ques10.normal.critical_paths[0]) == QUES10_TEXT["normal"]["critical_path"]
    assert ques10.project.normal_direct_cost == QUES10_TEXT["normal"]["direct_cost"] == 3900
    assert close(ques10.total_cost_point(23, 0.0).total_cost, QUES10_TEXT["normal"]["total_cost"])
    for act in ques10.project.activities:
        steps = act.segments()
        per_day = steps[0].cost_per_day if steps else 0
        assert close(per_day, QUES10_TEXT["cost_slopes"][act.id]), act.id


@pytest.mark.parametrize("stage", QUES10_TEXT["stages"], ids=lambda s: f"{s['duration']}d")
def test_ques10_published_stages(ques10, stage):
    # ques10.com worked solution (verified text): crash cost 40 / 280 / 420 and total
    # 5,700 / 5,620 / 5,680 at 22 / 18 / 17 days
    plan = ques10.plan(stage["duration"])
    assert plan.finish == stage["duration"]
    assert close(plan.added_cost, stage["crash_cost"])
    point = ques10.total_cost_point(plan.finish, plan.added_cost)
    assert close(point.total_cost, stage["total_cost"])


def test_ques10_best_finish(ques10):
    # ques10.com worked solution (verified text): optimum 18 days, total 5,620
    # = normal direct 3,900 + added 280 + 80 x 18
    best = ques10.best_finish()
    assert best.point.finish == QUES10_TEXT["optimum"]["duration"] == 18
    assert close(best.point.total_cost, QUES10_TEXT["optimum"]["total_cost"])
    assert close(best.point.total_cost, 3900 + best.point.added_cost + 80 * 18)
    assert best.point.time.damages == 0 and best.point.time.bonus == 0
    assert best.plan.finish == 18 and close(best.plan.added_cost, 280)


def test_ques10_full_curve_independent_check(ques10):
    # ques10 network; least cost at every day 23..12 as computed by the data authors with
    # scipy linprog (ques10_indirect80.json, "independent_check"), not printed in the solution
    expected = {int(p["T"]): p["crash_cost"] for p in QUES10_CHECK["least_cost_curve_integer_points"]}
    assert ques10.shortest_finish == int(QUES10_CHECK["shortest_duration"]) == 12
    got = curve_costs(ques10)
    assert sorted(got) == sorted(expected)
    for t in expected:
        assert close(got[t], expected[t]), t
    totals = {int(r["T"]): r["total"] for r in QUES10_CHECK["optimum_with_indirect"]["table"]}
    for row in ques10.best_finish().table:
        assert close(row.total_cost, totals[row.finish]), row.finish


def test_ques10_shortest_plan_is_cheaper_than_crashing_everything(ques10):
    # ques10 network: the printed all-crash row (direct 5,830, a transposition of 5,380) crashes
    # every activity; the least-cost 12-day plan costs 5,180 direct (data authors' linprog)
    plan = ques10.plan(12)
    assert close(plan.direct_cost, QUES10_CHECK["least_cost_at_shortest_duration"]["direct_cost"])
    assert sum(a.crash_cost for a in ques10.project.activities) == QUES10_CHECK[
        "all_activities_crashed_direct_cost"] == 5380


# ---------------------------------------------------------------------------------------
# Hillier & Lieberman, Reliable Construction Co. (from memory, unverified)
# ---------------------------------------------------------------------------------------

RELIABLE = load_json("examples/hillier_lieberman_reliable.json")
RELIABLE_BOOK = RELIABLE["published_answers"]["FROM_MEMORY_UNVERIFIED"]


@pytest.fixture(scope="module")
def reliable() -> Planner:
    return Planner(project_from_example(RELIABLE))  # crash table from memory


def test_reliable_normal_plan_from_memory(reliable):
    # Hillier & Lieberman, Reliable Construction Co.: 44 weeks, critical path A-B-C-E-F-J-L-N
    assert reliable.normal_finish == RELIABLE_BOOK["normal_duration"] == 44  # from memory
    assert reliable.normal.critical_paths == (tuple(RELIABLE_BOOK["critical_path"]),)  # from memory


def test_reliable_crash_to_40_weeks_from_memory(reliable):
    # Hillier & Lieberman, Reliable Construction Co.: 40 weeks for 140,000 (J and F by 2 weeks
    # each), less than the 150,000 bonus for finishing within 40 weeks
    plan = reliable.plan(40)
    assert close(plan.added_cost, RELIABLE_BOOK["crash_to_40_weeks"]["crash_cost"])  # from memory
    assert close(plan.added_cost, 140_000)  # from memory
    assert cuts(plan) == {"J": 2, "F": 2}  # from memory
    assert plan.added_cost < RELIABLE["bonus"]["amount"]  # from memory


def test_reliable_curve_on_a_crash_table_from_memory(reliable):
    # Reliable Construction Co. table (from memory); least cost at every week 44..28 as computed
    # by the data authors with scipy linprog (hillier_lieberman_reliable.json, "independent_check")
    expected = {int(p["T"]): p["crash_cost"] for p in RELIABLE["independent_check"]["least_cost_curve_integer_points"]}
    assert reliable.shortest_finish == int(RELIABLE["independent_check"]["shortest_duration"])
    got = curve_costs(reliable)
    assert sorted(got) == sorted(expected)
    for t in expected:
        assert close(got[t], expected[t]), t


# ---------------------------------------------------------------------------------------
# Gueret, Prins & Sevaux (2002), section 7.1 "Construction of a stadium"
# ---------------------------------------------------------------------------------------

STADIUM = load_json("stadium/stadium.json")
with (DATA / "stadium" / "expected_curve_computed.csv").open(newline="") as fh:
    STADIUM_CURVE = [{k: int(v) for k, v in row.items()} for row in csv.DictReader(fh)]


@pytest.fixture(scope="module")
def stadium() -> Planner:
    return Planner(project_from_stadium(STADIUM))


def test_stadium_normal_and_shortest(stadium):
    # Gueret, Prins & Sevaux 7.1 (Q1): 64 weeks with normal durations; all-crash length 52 weeks
    # (dataset README; computed by the dataset authors, confirmed by full enumeration)
    assert stadium.normal_finish == 64
    assert stadium.shortest_finish == 52


@pytest.mark.parametrize("row", STADIUM_CURVE, ids=lambda r: f"{r['deadline_weeks']}w")
def test_stadium_curve(stadium, row):
    # Gueret, Prins & Sevaux 7.1 table; expected_curve_computed.csv was computed by the dataset
    # authors with an LP (scipy/HiGHS) and confirmed by full enumeration of all 248,832 integer
    # reduction vectors; it is not printed in the book
    plan = stadium.plan(row["deadline_weeks"])
    assert close(plan.added_cost, row["min_crash_cost_k_usd"])
    assert plan.finish <= row["deadline_weeks"]


def test_stadium_bonus_question_from_the_curve(stadium):
    # Gueret, Prins & Sevaux 7.1 Q2: a bonus of 30 k$ per week finished before week 64; profit
    # 30 x (64 - T) - added cost(T) is at most 87 k$, reached at 54, 55, 56 and 57 weeks
    # (dataset README; computed by the dataset authors, not the book's printed answer)
    profit = {p.finish: 30 * (64 - p.finish) - p.added_cost for p in stadium.curve()}
    for row in STADIUM_CURVE:
        assert close(profit[row["deadline_weeks"]], row["profit_with_30k_bonus_per_week_k_usd"])
    best = max(profit.values())
    assert close(best, 87)
    assert sorted(t for t, v in profit.items() if close(v, best)) == [54, 55, 56, 57]


def test_stadium_bonus_question_as_a_contract_bonus():
    # Gueret, Prins & Sevaux 7.1 Q2 again, asked through Planner.best_finish(): every day a working day,
    # so one working day stands for one week; contract finish = last day of week 64 (START + 63
    # days); bonus 30 per day early. Best total = 0 normal direct + added - bonus = -87 (dataset
    # README); ties 54..57 go to the latest (our rule, planner.Planner.best_finish docstring)
    every_day = Calendar(workdays=tuple(range(7)), name="every day")
    project = dataclasses.replace(project_from_stadium(STADIUM), calendar=every_day,
                                  contract=Contract(finish=START + timedelta(days=63), bonus_per_day=30))
    best = Planner(project).best_finish()
    assert close(best.point.total_cost, -87)
    assert best.point.finish in (54, 55, 56, 57)
    assert best.point.finish == 57  # our tie rule: the later finish
    assert best.point.time.bonus == 30 * (64 - best.point.finish)
    assert best.point.time.damages == 0 and best.point.time.indirect == 0


@pytest.mark.parametrize("spend", [0, 14, 15, 122, 123, 296, 297, 10_000])
def test_stadium_budget(stadium, spend):
    # Gueret, Prins & Sevaux 7.1 table; expected_curve_computed.csv (dataset authors): the
    # earliest week whose least crash cost fits the spend
    expected = min(r["deadline_weeks"] for r in STADIUM_CURVE if r["min_crash_cost_k_usd"] <= spend)
    plan = stadium.earliest_within(spend)
    assert plan.target == expected
    assert plan.added_cost <= spend


# ---------------------------------------------------------------------------------------
# Hand-worked example of our own: shortening an activity can delay the project
# ---------------------------------------------------------------------------------------
#
#   A (10 days, crash 8, 100 a day)  -FF 0->  B (6 days, crash 2, 1 a day)  -SS 0->  C (10, crash 7, 50 a day)
#
# B must finish no earlier than A (FF) and C may start when B starts (SS). B's finish is pinned
# by A, so shortening B moves B's start later, and with it C: B is "reverse critical".
# Forward pass, normal durations: A 0-10; B starts 10-6 = 4, 4-10; C 4-14.     finish 14
# Every activity at its crash duration: A 0-8; B starts 8-2 = 6; C 6-13.       finish 13
# Least finish: C ends at S_B + d_C with S_B >= f_A - d_B, so take d_B = 6 (longest), d_A = 8,
# d_C = 7: S_B = 2, C 2-9.                                                     finish 9
# Least cost by finish (T = d_A - 6 + d_C): C first at 50 a day (3 days), then A at 100 a day:
#   14: 0   13: 50   12: 100   11: 150   10: 250   9: 350; B is never shortened (it only hurts).

REVERSE = make_project(
    [Activity("A", 10, crash_duration=8, cost=0, crash_cost=200),
     Activity("B", 6, crash_duration=2, cost=0, crash_cost=4),
     Activity("C", 10, crash_duration=7, cost=0, crash_cost=150)],
    [Link("A", "B", LinkType.FF, 0), Link("B", "C", LinkType.SS, 0)],
    name="reverse critical (hand-worked)")
REVERSE_CURVE = {14: 0, 13: 50, 12: 100, 11: 150, 10: 250, 9: 350}  # hand-worked, see above


def test_reverse_critical_crash_all_is_not_the_shortest():
    # hand-worked example of our own (above)
    study = Planner(REVERSE)
    all_crash = schedule(REVERSE, [a.shortest for a in REVERSE.activities]).finish
    assert study.normal_finish == 14
    assert all_crash == 13
    assert study.shortest_finish == 9 < all_crash
    assert round(linprog_min_finish(REVERSE)) == 9  # cross-check: our own linprog formulation


def test_reverse_critical_least_cost_plans():
    # hand-worked example of our own (above), cross-checked with our own linprog formulation
    study = Planner(REVERSE)
    got = curve_costs(study)
    assert got == pytest.approx(REVERSE_CURVE)
    for t, cost in REVERSE_CURVE.items():
        assert close(linprog_least_cost(REVERSE, t), cost)
    plan = study.plan(9)
    assert {a.id: a.duration for a in plan.activities} == {"A": 8, "B": 6, "C": 7}
    b = next(a for a in plan.activities if a.id == "B")
    assert b.duration > REVERSE.activity("B").shortest  # B is left longer than its crash duration
    # B costs only 1 a day but is never shortened anywhere on the curve
    assert all(act != "B" for point in study.curve() for act, _ in point.changes)


# ---------------------------------------------------------------------------------------
# Ties between plans of equal cost (hand-worked examples of our own)
# ---------------------------------------------------------------------------------------


def chain(room_x: int, room_y: int, per_day: float = 10.0):
    """X -> Y (FS), 5 days each, shortening at the same cost per day."""
    return make_project(
        [Activity("X", 5, crash_duration=5 - room_x, cost=0, crash_cost=per_day * room_x),
         Activity("Y", 5, crash_duration=5 - room_y, cost=0, crash_cost=per_day * room_y)],
        [Link("X", "Y")], name="equal-cost chain (hand-worked)")


def test_equal_cost_chain_least_cost_and_deterministic():
    # hand-worked: X -> Y, 10 a day each, 3 days of room each; finishing 2 days early (8 of 10)
    # costs 20 whichever days are taken; the same question always gets the same plan
    project = chain(3, 3)
    study = Planner(project)
    plan = study.plan(8)
    assert close(plan.added_cost, 20) and close(linprog_least_cost(project, 8), 20)
    assert plan.finish <= 8
    again = study.plan(8)
    fresh = Planner(project).plan(8)
    assert cuts(plan) == cuts(again) == cuts(fresh)


@pytest.mark.parametrize("room_x, room_y", [(3, 3), (1, 3), (3, 1)])
def test_equal_cost_chain_prefers_fewer_shortened_activities(room_x, room_y):
    # hand-worked: finishing 2 days early costs 20 either way; taking both days from the one
    # activity that has room for them touches one activity instead of two (our rule: ties go to
    # fewer shortened activities, optimise.CrashModel.least_cost)
    plan = Planner(chain(room_x, room_y)).plan(8)
    assert close(plan.added_cost, 20)
    assert len(cuts(plan)) == 1
    assert sum(cuts(plan).values()) == 2


def test_equal_cost_fewer_crash_days():
    # hand-worked: A and B in parallel (5 days, 10 a day) both before C (5 days, 20 a day);
    # one day off costs 20 as C by 1 or as A and B by 1 each: the tie goes to C alone (fewer
    # activities and fewer crash days)
    project = make_project(
        [Activity("A", 5, crash_duration=3, cost=0, crash_cost=20),
         Activity("B", 5, crash_duration=3, cost=0, crash_cost=20),
         Activity("C", 5, crash_duration=3, cost=0, crash_cost=40)],
        [Link("A", "C"), Link("B", "C")], name="parallel tie (hand-worked)")
    plan = Planner(project).plan(9)
    assert close(plan.added_cost, 20) and close(linprog_least_cost(project, 9), 20)
    assert cuts(plan) == {"C": 1}
