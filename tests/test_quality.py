"""The schedule-quality check (hasten.quality) and what ``hasten check`` shows of it.

Sources: the measures are those of the US Government Accountability Office, *Schedule
Assessment Guide: Best Practices for Project Schedules* (GAO-16-89G, December 2015); its
text could not be read here, so the thresholds tested are the commonly used values of the
widely taught 14-point assessment, written from memory (marked in src/hasten/quality.py):
missing logic 5%, leads 0%, lags 5%, finish-to-start at least 90%, hard constraints 5%,
total float over 44 working days 5%, negative float 0%, durations over 44 working days 5%,
invalid dates 0%, and the critical path test. Each project below is hand-worked of our own
(arithmetic in the comments); calendar mon-fri from Mon 2024-01-01 (conftest.START).
"""

from __future__ import annotations

import json
from datetime import date

import pytest
from typer.testing import CliRunner

from conftest import make_project
from hasten.cli import app
from hasten.errors import HastenError
from hasten.formats import write_project
from hasten.project import Activity, Contract, Link, LinkType
from hasten.quality import THRESHOLDS, assess

FS, SS = LinkType.FS, LinkType.SS
runner = CliRunner()


def measure(report, key):
    return next(m for m in report.measures if m.key == key)


def open_end_project():
    # A (5 d) -> B (3 d) ends the job at 8; C (2 d) after A has no successor: it ends at
    # 7 with a day of float, and however late it ran it would never be critical. A is the
    # first activity, B the last: the open end is C, 1 of 3 activities (33% > 5%).
    return make_project([Activity("A", 5), Activity("B", 3), Activity("C", 2, crash_duration=1, crash_cost=10.0)],
                        [Link("A", "B"), Link("A", "C")])


def test_open_ends_are_found_and_named():
    m = measure(assess(open_end_project()), "open_ends")
    assert (m.count, m.base, m.passed) == (1, 3, False)
    assert m.items == ("C (no successor)",)
    assert abs(m.share - 1 / 3) < 1e-12


def test_a_finish_that_drives_nothing_is_an_open_end():
    # A (5 d) -SS-> B (10 d): A's finish drives nothing (its only successor is SS);
    # B is the last activity, A the first: A's start is driven (it is the first), its
    # finish is open.
    report = assess(make_project([Activity("A", 5), Activity("B", 10)], [Link("A", "B", SS)]))
    assert measure(report, "open_ends").items == ("A (finish drives nothing (only SS/SF out))",)


def chain(n: int, links_extra=()):
    """A0 -> A1 -> ... -> A(n-1), 2 days each, finish-to-start."""
    acts = [Activity(f"A{k}", 2) for k in range(n)]
    links = [Link(f"A{k}", f"A{k + 1}") for k in range(n - 1)]
    return acts, links


def test_lags_leads_and_link_types_against_their_thresholds():
    # 11 activities, 10 links. One FS+2: lags 1/10 = 10% > 5%: fails; with the project's
    # own threshold of 10% it passes. One SS: 9/10 = 90% FS: passes (at least 90%); two
    # SS: 80%: fails. One FS-1: leads 1/10 > 0%: fails.
    acts, links = chain(11)
    links[3] = Link("A3", "A4", FS, 2)
    p = make_project(acts, links)
    assert (measure(assess(p), "lags").count, measure(assess(p), "lags").passed) == (1, False)
    assert measure(assess(p, {"lags": 0.10}), "lags").passed
    assert measure(assess(p), "lags").items == ("A3 -> A4 (FS+2)",)
    links[5] = Link("A5", "A6", SS)
    fs = measure(assess(make_project(acts, links)), "finish_to_start")
    assert (fs.count, fs.base, fs.passed) == (9, 10, True)
    links[7] = Link("A7", "A8", SS)
    fs = measure(assess(make_project(acts, links)), "finish_to_start")
    assert (fs.count, fs.passed) == (8, False)
    assert fs.items == ("A5 -> A6 (SS)", "A7 -> A8 (SS)")
    links[1] = Link("A1", "A2", FS, -1)
    leads = measure(assess(make_project(acts, links)), "leads")
    assert (leads.count, leads.passed, leads.items) == (1, False, ("A1 -> A2 (FS-1)",))


def test_deadlines_are_hard_constraints_and_not_before_dates_are_not():
    # 10 activities: one deadline (10% > 5%: fails); a not_before date is soft (not counted).
    acts, links = chain(10)
    acts[4] = Activity("A4", 2, deadline=date(2024, 3, 1))
    acts[6] = Activity("A6", 2, not_before=date(2024, 1, 10))
    m = measure(assess(make_project(acts, links)), "hard_constraints")
    assert (m.count, m.passed, m.items) == (1, False, ("A4 (deadline 2024-03-01)",))
    assert "1 not-before date" in m.note


def float_project():
    # S (0) -> L (50 d) -> E (0); S -> B (5 d) -> E; S -> C (6 d) -> E; S -> D (44 d) -> E.
    # Finish 50. Total floats: L 0, B 50 - 5 = 45 (> 44: high), C 44 (not over 44),
    # D 6. Durations: L 50 (> 44: long), D 44 (not over). 6 activities: 1/6 each, > 5%.
    acts = [Activity("S", 0), Activity("L", 50), Activity("B", 5), Activity("C", 6), Activity("D", 44),
            Activity("E", 0)]
    links = [Link("S", x) for x in "LBCD"] + [Link(x, "E") for x in "LBCD"]
    return make_project(acts, links)


def test_high_float_and_long_durations_count_days_over_44():
    report = assess(float_project())
    high = measure(report, "high_float")
    assert (high.count, high.base, high.items, high.passed) == (1, 6, ("B (float 45)",), False)
    long = measure(report, "high_duration")
    assert (long.count, long.items, long.passed) == (1, ("L (50 working days)",), False)
    # the thresholds in days are the project's to change
    relaxed = assess(float_project(), {"high_float_days": 45, "high_duration_days": 50})
    assert measure(relaxed, "high_float").count == 0 and measure(relaxed, "high_duration").count == 0


def test_negative_float_against_the_contract_finish():
    # A (10 d) -> B (5 d): finish 15. Contract finish Fri 01-12 = day 9 (offset 10): a
    # backward pass from 10 gives B ls = 5 (float 5 - 10 = -5) and A ls = -5 (float -5).
    p = make_project([Activity("A", 10), Activity("B", 5)], [Link("A", "B")],
                     contract=Contract(finish=date(2024, 1, 12)))
    m = measure(assess(p), "negative_float")
    assert (m.count, m.passed, m.items) == (2, False, ("A (float -5)", "B (float -5)"))
    assert not measure(assess(make_project([Activity("A", 1)], [])), "negative_float").assessed


def test_dates_that_contradict_progress():
    # data date Wed 01-10. X (5 d) started Tue 01-02 with 0 days remaining and no actual
    # finish: it is done but not reported so. S started Thu 01-04 though P (FS before it)
    # is not finished: out of sequence. 2 items; any is too many (0%).
    p = make_project([
        Activity("X", 5, actual_start=date(2024, 1, 2), remaining=0),
        Activity("P", 6, actual_start=date(2024, 1, 1), remaining=2),
        Activity("S", 4, actual_start=date(2024, 1, 4), remaining=1),
    ], [Link("P", "S")], data_date=date(2024, 1, 10))
    m = measure(assess(p), "invalid_dates")
    assert m.count == 2 and not m.passed
    assert any(i.startswith("X (started, nothing left") for i in m.items)
    assert any(i.startswith("S (out of sequence") for i in m.items)


def test_the_critical_path_test():
    # FS chain A (5) -> B (3): A made 20 days longer moves the finish 8 -> 28 (20): pass.
    ok = measure(assess(make_project([Activity("A", 5), Activity("B", 3)], [Link("A", "B")])),
                 "critical_path_test")
    assert ok.passed and ok.items == ("A made 20 working days longer: the finish moved 20",)
    # A (5) -SS-> B (10): A is critical (late start 0 through the SS link) but its finish
    # drives nothing: made 20 days longer it ends at 25, the finish moves 10 -> 25 (15).
    bad = measure(assess(make_project([Activity("A", 5), Activity("B", 10)], [Link("A", "B", SS)])),
                  "critical_path_test")
    assert not bad.passed and bad.items == ("A made 20 working days longer: the finish moved 15",)


def test_thresholds_are_checked_and_documented():
    with pytest.raises(HastenError, match="unknown schedule-check threshold 'lag'"):
        assess(open_end_project(), {"lag": 0.1})
    with pytest.raises(HastenError, match="must be a number"):
        assess(open_end_project(), {"lags": "ten"})
    # the defaults (from memory, see the module docstring)
    assert THRESHOLDS["open_ends"] == 0.05 and THRESHOLDS["leads"] == 0.0
    assert THRESHOLDS["finish_to_start"] == 0.90 and THRESHOLDS["high_float_days"] == 44


# -- what the user sees ----------------------------------------------------------------

def test_check_shows_the_open_end_instead_of_only_valid(tmp_path):
    write_project(open_end_project(), tmp_path / "p")
    out = runner.invoke(app, ["check", str(tmp_path / "p")])
    assert out.exit_code == 0, out.output
    assert "valid" in out.output
    assert "Schedule check: 1 of 8 measures fail (open ends)." in out.output
    assert "- C (no successor)" in out.output
    assert "Fix: link each to the work it really waits for" in out.output
    data = json.loads(runner.invoke(app, ["check", str(tmp_path / "p"), "--json"]).output)
    check = data["schedule_check"]
    assert not check["passed"]
    ends = next(m for m in check["measures"] if m["measure"] == "open_ends")
    assert ends["items"] == ["C (no successor)"] and ends["threshold"] == 0.05 and ends["count"] == 1


def test_plan_best_and_recover_print_one_line_when_a_measure_fails(tmp_path):
    write_project(open_end_project(), tmp_path / "p")
    line = "Schedule check: 1 of 8 measures fail (open ends); run hasten check for details"
    for args in (["plan", "--finish", "8"], ["best"], ["recover"]):
        out = runner.invoke(app, [args[0], str(tmp_path / "p")] + args[1:])
        assert out.exit_code == 0, out.output
        assert out.output.count("Schedule check:") == 1 and line in out.output, args
    data = json.loads(runner.invoke(app, ["plan", str(tmp_path / "p"), "--finish", "8", "--json"]).output)
    assert data["schedule_check"] == line
    # a clean FS chain: no line
    write_project(make_project([Activity("A", 5), Activity("B", 3)], [Link("A", "B")]), tmp_path / "q")
    out = runner.invoke(app, ["plan", str(tmp_path / "q"), "--finish", "8"])
    assert out.exit_code == 0 and "Schedule check" not in out.output


def test_an_ff_successor_drives_a_finish():
    # A (5 d) -FF-> B (10 d): A's finish drives B's finish, so A's finish is not open; B's
    # start has only an FF link in: not driven. A is the first activity (day 0), B the last
    # (B 0-10 ends the job): B's start is the one open end.
    report = assess(make_project([Activity("A", 5), Activity("B", 10)], [Link("A", "B", LinkType.FF)]))
    assert measure(report, "open_ends").items == ("B (start not driven (only FF/SF in))",)


def test_links_into_finished_work_are_history_not_counted():
    # data date Wed 01-10: A (2 d) ran Mon 01-01 - Tue 01-02, B (2 d) Fri 01-05 - Mon 01-08,
    # both finished; C (3 d) not started. Of the links, A -FS+2-> B ends in finished work
    # (history); only B -> C is counted: 0 lags of 1 link (not 1 of 2).
    p = make_project([
        Activity("A", 2, actual_start=date(2024, 1, 1), actual_finish=date(2024, 1, 2)),
        Activity("B", 2, actual_start=date(2024, 1, 5), actual_finish=date(2024, 1, 8)),
        Activity("C", 3),
    ], [Link("A", "B", FS, 2), Link("B", "C")], data_date=date(2024, 1, 10))
    m = measure(assess(p), "lags")
    assert (m.count, m.base, m.items) == (0, 1, ())
