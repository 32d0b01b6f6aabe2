"""Smaller things a user sees: help, the deadline header, recovery when full recovery is
impossible, the import wording and the demo.

Checks are hand-worked of our own (arithmetic in the comments; calendar mon-fri from Mon
2024-01-01, conftest.START) or the command line's own documented behaviour (README).
"""

from __future__ import annotations

import fnmatch
import json
from datetime import date
from pathlib import Path

from typer.testing import CliRunner

from conftest import TOL, make_project
from hasten.cli import app
from hasten.formats import write_project
from hasten.formats.research import read_research
from hasten.planner import Planner
from hasten.project import Activity, Contract, Link
from hasten.recovery import recovery

ROOT = Path(__file__).resolve().parents[1]
runner = CliRunner()


def run(*args):
    return runner.invoke(app, [str(a) for a in args], env={"COLUMNS": "120"})


def test_help_shows_flags_as_switches():
    out = run("plan", "--help")
    assert out.exit_code == 0
    assert "<bool>" not in out.output
    json_line = next(line for line in out.output.splitlines() if line.strip().startswith("--json"))
    assert json_line.split()[1] == "Print"  # the help text follows the flag directly
    assert "--finish <int>" in out.output  # options that take a value still say what kind
    assert "<bool>" not in run("check", "--help").output


def test_schedule_with_a_deadline_says_so(tmp_path):
    # A (10 d) -> B (5 d): finish 15. Deadline Fri 01-12 = offset 10: the backward pass
    # from 10 gives both activities total float 10 - 15 = -5.
    write_project(make_project([Activity("A", 10), Activity("B", 5)], [Link("A", "B")]), tmp_path / "p")
    out = run("schedule", tmp_path / "p", "--deadline", "2024-01-12")
    assert out.exit_code == 0, out.output
    assert ("Deadline applied: 2024-01-12 (10 working days); the backward pass starts there, so total "
            "float counts against it and is negative where the work is late (down to -5 working days).") \
        in " ".join(out.output.split())
    assert "Deadline applied" not in run("schedule", tmp_path / "p").output
    data = json.loads(run("schedule", tmp_path / "p", "--deadline", "2024-01-12", "--json").output)
    assert data["deadline"] == 10 and data["deadline_date"] == "2024-01-12"


def late_project(contract_finish: date):
    """A (5 d, crash to 3 at 10 a day) -> M (milestone, deadline Tue 01-02, 100 a calendar
    day) -> B (2 d); contract finish at 50 a calendar day."""
    return make_project([
        Activity("A", 5, crash_duration=3, cost=0.0, crash_cost=20.0),
        Activity("M", 0, name="Handover", deadline=date(2024, 1, 2), damages_per_day=100.0),
        Activity("B", 2),
    ], [Link("A", "M"), Link("M", "B")], contract=Contract(finish=contract_finish, damages_per_day=50.0))


def test_recover_says_which_milestone_cannot_be_met_and_how_far_it_can_go():
    # Contract finish Fri 01-05 (offset 5): the shortest finish, A = 3 then B = 2, is 5:
    # the contract can be met. M at its earliest is offset 3, dated Wed 01-03, after its
    # deadline Tue 01-02: that is the date that cannot be met.
    # Recover as much as possible: finish 5, A cut 2 days = 20, M 1 calendar day late =
    # 100; do nothing: finish 7 (Tue 01-09) 4 days late = 200, M Fri 01-05 3 days = 300:
    # net effect = (200 + 300) - (0 + 100) - 20 = 380.
    rec = recovery(Planner(late_project(date(2024, 1, 5))))
    courses = {c.label: c for c in rec.courses}
    full = courses["recover fully"]
    assert not full.possible
    assert full.note == ("not possible: the milestone deadline M Handover (deadline 2024-01-02, 2024-01-03 "
                         "at the earliest) cannot be met")
    most = courses["recover as much as possible"]
    assert most.finish == 5 and abs(most.added_cost - 20.0) <= TOL
    assert abs(most.milestone_damages - 100.0) <= TOL and abs(most.net_effect - 380.0) <= TOL


def test_recover_says_when_the_contract_finish_cannot_be_met(tmp_path):
    # Contract finish Wed 01-03 (offset 3): the shortest finish is 5 working days, Fri
    # 01-05, 2 calendar days later; the milestone cannot be met either.
    project = late_project(date(2024, 1, 3))
    rec = recovery(Planner(project))
    full = {c.label: c for c in rec.courses}["recover fully"]
    assert full.note.startswith("not possible: the contract finish 2024-01-03 cannot be met: the shortest "
                                "possible finish is 5 working days (2024-01-05, 2 calendar days later); and "
                                "the milestone deadline M Handover")
    write_project(project, tmp_path / "p")
    out = run("recover", tmp_path / "p")
    assert out.exit_code == 0, out.output
    assert "recover as much as possible  5 (2024-01-05)" in out.output
    assert "recover fully: not possible: the contract finish 2024-01-03 cannot be met" in out.output


def test_imported_instances_speak_of_periods_and_no_money_placeholder(tmp_path):
    # PSPLIB j1010_1.mm job 2, mode 1 lasts 1 period (the instance file)
    notes = [o.note for a in read_research(ROOT / "tests/data/psplib_mm/j1010_1.mm").activities for o in a.options]
    assert "PSPLIB mode 1 of job 2: 1 period; nonrenewable N1 7, N2 0" in notes
    assert not any(" 1 periods" in n for n in notes)
    assert run("import", ROOT / "tests/data/psplib_mm/j1010_1.mm", tmp_path / "j").exit_code == 0
    out = run("curve", tmp_path / "j", "--from", "43", "--to", "42")
    assert out.exit_code == 0, out.output
    assert "(money)" not in out.output
    assert "Least-cost curve for j1010_1 (PSPLIB multi-mode); normal finish 43" in out.output


def test_demo_folders_are_ignored_and_the_readme_says_what_the_demo_prints(tmp_path, monkeypatch):
    patterns = [ln.strip() for ln in (ROOT / ".gitignore").read_text().splitlines() if ln.strip()]
    for folder in ("hasten-demo/", "hasten-demo-2/"):
        assert any(fnmatch.fnmatch(folder, p) for p in patterns), folder
    monkeypatch.chdir(tmp_path)
    out = run("demo")
    assert out.exit_code == 0, out.output
    assert (tmp_path / "hasten-demo" / "activities.csv").exists()
    assert "Current schedule:" in out.output and "(every activity: hasten schedule hasten-demo)" in out.output
    assert "Dates are the first" not in out.output  # no table header without its table
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    assert "prints the current finish, the least-cost plan to meet the contract date and the finish" in readme
    assert "shows\nthe schedule" not in readme
