"""Pricing a proposal (hasten.price), checked against hand calculations and a published example.

Sources:
- ques10.com worked solution of a University of Mumbai construction-management exam question
  (tests/data/examples/ques10_indirect80.json): the network, the cost slopes (verified text)
  and the least-cost curve (the data authors' scipy linprog: 160 at 20 days by C 1 + F 2).
- Hand-worked small networks written out below; the SS/FF case is the one in README "Method"
  ("Shortening can lengthen the job").
- Random proposals on random networks against the references of tests/conftest.py (a plain
  forward pass, the crash costs, scipy's linprog).
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from hypothesis import given
from hypothesis import strategies as st
from typer.testing import CliRunner

from conftest import (PROPERTY, TOL, linprog_least_cost, load_json, make_project, own_cut_cost, own_finish,
                      project_from_example, projects)
from hasten.cli import app
from hasten.errors import InputError
from hasten.formats import write_project
from hasten.price import ProposalLine, price_proposal, proposal_lines
from hasten.project import Activity, Link, LinkType, Option
from hasten.questions import price

runner = CliRunner()
QUES10 = load_json("examples/ques10_indirect80.json")


@pytest.fixture(scope="module")
def ques10():
    return project_from_example(QUES10, indirect=80)


def test_a_wasteful_proposal_on_the_mumbai_exam_network(ques10):
    # ques10.com / University of Mumbai exam network, normal 23 days on A-C-F-H (verified text).
    # Slopes (verified text): B 100, C 40, D 50, F 60, G 80, H 70 a day.
    # The proposal: H by 3 (on the critical path), G by 2 and B by 1 (both off it).
    # By hand: A-C-F-H = 2 + 6 + 9 + 3 = 20; B-F-H = 6 + 9 + 3 = 18; A-C-E-G = 2 + 6 + 0 + 9 = 17;
    # A-D-G = 2 + 5 + 9 = 16: the finish is 20.
    # Cost by the slopes: 3 x 70 + 2 x 80 + 1 x 100 = 470; asked 300 + 150 + 120 = 570.
    # Least cost for 20 days: 160 (C 1 and F 2; the least-cost curve of the example's
    # independent check, T = 20). Excess 470 - 160 = 310; against what is asked 570 - 160 = 410.
    lines = [ProposalLine("H", 3, cost=300), ProposalLine("G", 2, cost=150), ProposalLine("B", 1, cost=120)]
    priced = price_proposal(ques10, lines)
    curve20 = next(p for p in QUES10["independent_check"]["least_cost_curve_integer_points"] if p["T"] == 20)
    assert priced.finish == 20
    assert abs(priced.proposal_cost - 470) <= TOL
    assert abs(priced.least_cost - curve20["crash_cost"]) <= TOL and abs(priced.least_cost - 160) <= TOL
    assert abs(priced.excess - 310) <= TOL
    assert priced.asked_cost == 570 and abs(priced.asked_excess - 410) <= TOL
    # Taking out G's line alone: A-C-E-G = 19, the job still ends at 20; B's alone: B-F-H =
    # 7 + 9 + 3 = 19, still 20; H's alone: A-C-F-H = 23. So G and B buy nothing, H 3 days.
    assert set(priced.no_effect) == {"G", "B"}
    assert {x.id: x.buys(priced.finish) for x in priced.lines} == {"H": 3, "G": 0, "B": 0}
    # The leanest part: only H (by 3, 210) reaches 20 among the proposal's lines.
    assert {a.id: a.shortened_by for a in priced.leanest.changed} == {"H": 3}
    assert abs(priced.leanest.added_cost - 210) <= TOL
    # What it missed: the least-cost plan's C 1 and F 2 (independent check, T = 20).
    assert {m.id: m.shortened_by for m in priced.missed} == {k: int(v) for k, v in curve20["crashed_by"].items()}


def _parallel():
    # Hand-worked: X and Y (5 days each, one day off at 10 a day) in parallel between two
    # milestones; Z (3 days, one day off at 5) beside them with 2 days of float.
    acts = [Activity("S", 0), Activity("X", 5, crash_duration=4, cost=0, crash_cost=10),
            Activity("Y", 5, crash_duration=4, cost=0, crash_cost=10),
            Activity("Z", 3, crash_duration=2, cost=0, crash_cost=5), Activity("E", 0)]
    links = [Link("S", "X"), Link("S", "Y"), Link("S", "Z"), Link("X", "E"), Link("Y", "E"), Link("Z", "E")]
    return make_project(acts, links)


def test_a_pair_that_only_together_buys_a_day_is_not_reported():
    # By hand: with X, Y and Z each one day shorter the finish is 4. Taking out X alone (or Y
    # alone) brings back 5: each buys a day, though neither alone would shorten the job. Taking
    # out Z leaves 4: Z buys nothing (it has float).
    priced = price_proposal(_parallel(), [ProposalLine("X", 1), ProposalLine("Y", 1), ProposalLine("Z", 1)])
    assert priced.finish == 4
    assert priced.no_effect == ("Z",)
    assert abs(priced.excess - 5) <= TOL  # Z's 5 wasted: the least cost for 4 days is X + Y = 20
    assert {a.id for a in priced.leanest.changed} == {"X", "Y"}


def test_a_line_that_makes_the_job_later():
    # README "Method": B must finish no earlier than A (FF), C starts after B starts (SS).
    # A 10 days; B 6 days (can lose 2 at 50 a day); C 10 days. By hand: B starts at 10 - 6 = 4,
    # C at 4, the job ends at 14. With B 2 days shorter, B starts at 6, C at 6: the job ends at 16.
    acts = [Activity("A", 10), Activity("B", 6, crash_duration=4, cost=0, crash_cost=100), Activity("C", 10)]
    links = [Link("A", "B", LinkType.FF), Link("B", "C", LinkType.SS)]
    priced = price_proposal(make_project(acts, links), [ProposalLine("B", 2)])
    assert priced.finish == 16
    assert priced.no_effect == ("B",) and priced.lines[0].buys(16) == -2
    assert priced.least_cost == 0 and abs(priced.excess - 100) <= TOL  # 16 days need nothing


def _with_options():
    # Hand-worked: one activity with two options (names and notes invented for the test).
    acts = [Activity("P", 10, crash_duration=8, cost=0, crash_cost=600,
                     options=(Option("second gang", 7, 900, note="two gangs in one area"),
                              Option("slow and dear", 9, 2000))),
            Activity("Q", 4)]
    return make_project(acts, [Link("P", "Q")])


def test_options_in_a_proposal():
    # By hand: 'second gang' makes P 7 days (finish 11) for 900. The least cost for 11 days is
    # 'second gang' too (crashing reaches only 8: finish 12), so nothing is wasted.
    project = _with_options()
    priced = price_proposal(project, [ProposalLine("P", option="second gang")])
    assert priced.finish == 11 and abs(priced.proposal_cost - 900) <= TOL and abs(priced.excess) <= TOL
    assert priced.lines[0].option_note == "two gangs in one area"
    # 'slow and dear' (9 days for 2,000) is beaten by crashing one day (300): it is kept for
    # pricing (a proposal may name it) and the excess is 2,000 - 300.
    dear = price_proposal(project, [ProposalLine("P", option="slow and dear")])
    assert dear.finish == 13 and abs(dear.excess - 1700) <= TOL


@pytest.mark.parametrize("line, column, words", [
    (ProposalLine("NOPE", 1), "id", "no activity has this id"),
    (ProposalLine("P", 3), "shortened_by", "at most 2 working days"),
    (ProposalLine("P", -1), "shortened_by", "at most 2 working days"),
    (ProposalLine("P", option="night shift"), "option", "has no option 'night shift'"),
    (ProposalLine("P", 4, option="second gang"), "shortened_by", "3 to 3 working days"),
    (ProposalLine("Q", 1), "shortened_by", "at most 0 working days"),
])
def test_each_bad_line_is_located(line, column, words):
    with pytest.raises(InputError) as err:
        price_proposal(_with_options(), [line], "prop.csv")
    e = err.value
    assert e.file == "prop.csv" and e.row == 2 and e.column == column and words in str(e) and e.fix


def test_costs_on_every_line_or_none_and_one_line_per_activity():
    with pytest.raises(InputError, match="some lines give a cost") as err:
        price_proposal(_parallel(), [ProposalLine("X", 1, cost=5), ProposalLine("Y", 1)])
    assert err.value.row == 3 and err.value.column == "cost"
    with pytest.raises(InputError, match="proposed twice"):
        price_proposal(_parallel(), [ProposalLine("X", 1), ProposalLine("X", 1)])


def test_reading_rows():
    rows = [{"id": "X", "shortened_by": "1", "cost": "12.5", "remark": "ignored"}, {"id": "", "shortened_by": ""},
            {"id": "Y", "shortened_by": "1", "cost": "10"}]
    lines = proposal_lines(rows, "p.csv")
    assert [(x.id, x.shortened_by, x.cost, x.row) for x in lines] == [("X", 1, 12.5, 2), ("Y", 1, 10.0, 4)]
    for bad, column in (({"id": "X", "shortened_by": "1.5"}, "shortened_by"), ({"id": "X", "shortened_by": "1",
                                                                              "cost": "1,200"}, "cost")):
        with pytest.raises(InputError) as err:
            proposal_lines([bad], "p.csv")
        assert err.value.column == column and err.value.row == 2
    with pytest.raises(InputError, match="no 'id' column"):
        proposal_lines([{"activity": "X", "shortened_by": "1"}], "p.csv")


def test_the_command(tmp_path: Path, ques10):
    folder = tmp_path / "ques10"
    write_project(ques10, folder)
    prop = tmp_path / "prop.csv"
    prop.write_text("\ufeffid,shortened_by,cost\r\nH,3,300\r\nG,2,150\r\nB,1,120\r\n", encoding="utf-8")
    out = runner.invoke(app, ["price", str(folder), "--proposal", str(prop), "--json"])
    assert out.exit_code == 0, out.output
    data = json.loads(out.output)
    # the same hand figures as test_a_wasteful_proposal_on_the_mumbai_exam_network
    assert (data["finish"], data["proposal_cost"], data["asked_cost"], data["least_cost"], data["excess"]) == \
        (20, 470, 570, 160, 310)
    assert set(data["no_effect"]) == {"G", "B"} and data["finish_date"]
    assert {a["id"]: a["shortened_by"] for a in data["leanest"] if a["shortened_by"]} == {"H": 3}
    assert {a["id"]: a["shortened_by"] for a in data["least_cost_plan"] if a["shortened_by"]} == {"C": 1, "F": 2}
    text = runner.invoke(app, ["price", str(folder), "--proposal", str(prop)]).output
    assert "Money wasted: 310" in text and "Lines that buy no time" in text and "G, B" in text
    assert max(len(x) for x in text.splitlines()) <= 100
    bad = tmp_path / "bad.csv"
    bad.write_text("id,shortened_by\nH,3\nF,9\n", encoding="utf-8")
    out = runner.invoke(app, ["price", str(folder), "--proposal", str(bad)])
    assert out.exit_code == 2 and "Traceback" not in out.output
    assert "bad.csv, row 3, column 'shortened_by'" in out.output and "value: 9" in out.output
    assert len(out.output.strip().splitlines()) == 1
    none = tmp_path / "none.csv"
    none.write_text("id,shortened_by\n", encoding="utf-8")
    assert runner.invoke(app, ["price", str(folder), "--proposal", str(none)]).exit_code == 2


def test_the_library_call_reads_a_file(tmp_path: Path, ques10):
    prop = tmp_path / "p.csv"
    prop.write_text("id,shortened_by\nC,1\nF,2\n", encoding="utf-8")
    priced = price(ques10, prop)
    # C 1 + F 2 is the least-cost plan for 20 days itself (example's independent check): no excess
    assert priced.finish == 20 and abs(priced.excess) <= TOL and priced.no_effect == ()
    assert priced.source == str(prop)


@PROPERTY
@given(st.data())
def test_random_proposals_against_references(data):
    # References written apart from hasten (tests/conftest.py): a plain forward pass over
    # networkx's topological order for the finish, the activity's own crash cost for the cost,
    # and scipy's linprog for the least cost of the same finish.
    project = data.draw(projects(max_n=7))
    cuts = {a.id: data.draw(st.integers(0, a.duration - a.shortest)) for a in project.activities
            if a.shortest < a.duration}
    if not cuts:
        return
    lines = [ProposalLine(i, k) for i, k in cuts.items()]
    priced = price_proposal(project, lines)
    durations = {a.id: a.duration - cuts.get(a.id, 0) for a in project.activities}
    assert priced.finish == own_finish(project, durations)
    cost = sum(own_cut_cost(a, cuts.get(a.id, 0)) for a in project.activities)
    assert abs(priced.proposal_cost - cost) <= TOL * max(1, cost)
    least = linprog_least_cost(project, priced.finish)
    assert least is not None and abs(priced.least_cost - least) <= 1e-6 * max(1, least)
    assert priced.excess >= -1e-6
    assert priced.least_cost - 1e-6 <= priced.leanest.added_cost <= priced.proposal_cost + 1e-6
    for a in priced.leanest.activities:  # the leanest part stays within the proposal's lines
        assert 0 <= a.shortened_by <= cuts.get(a.id, 0)
    for line in priced.lines:  # each line's effect, by the plain forward pass
        without = dict(durations, **{line.id: durations[line.id] + cuts[line.id]})
        assert line.finish_without == own_finish(project, without)
