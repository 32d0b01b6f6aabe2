"""Terminal output that fits: every text table within 100 columns (``--wide`` lifts it), the
best finish against the current one, one meaning for ``total_cost``, the curve's changes in
words, option notes beside chosen options.

The cases/ projects are invented: they only exercise the layout here. Money figures are
checked against sums written out in the tests (the ques10.com worked solution of a
University of Mumbai exam question, tests/data/examples/ques10_indirect80.json, for best).
"""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest
from typer.testing import CliRunner

from conftest import load_json, make_project, project_from_example
from hasten.cli import app
from hasten.formats import write_project
from hasten.project import Activity, Link, Option

runner = CliRunner()
ROOT = Path(__file__).resolve().parents[1]
CASES = ROOT / "cases"


def run(*args):
    out = runner.invoke(app, [str(a) for a in args])
    assert out.exit_code == 0, out.output
    return out.output


def widest(text: str) -> int:
    return max(len(line) for line in text.splitlines())


@pytest.fixture(scope="module")
def proposal(tmp_path_factory) -> Path:
    path = tmp_path_factory.mktemp("prop") / "p.csv"
    path.write_text("id,shortened_by\nA310,2\nA030,1\n", encoding="utf-8")
    return path


@pytest.mark.parametrize("args", [
    ["schedule", CASES / "riverside-culvert"], ["schedule", CASES / "harbour-depot-late"],
    ["schedule", CASES / "ferry-canopy"], ["plan", CASES / "riverside-culvert", "--earlier", "2w"],
    ["plan", CASES / "ferry-canopy", "--earlier", "2w"], ["curve", CASES / "clinic-fitout"],
    ["curve", CASES / "harbour-depot-late"], ["best", CASES / "riverside-culvert"],
    ["budget", CASES / "clinic-fitout", "--spend", "20000"], ["recover", CASES / "harbour-depot-late"],
], ids=lambda a: " ".join(str(x) for x in a[:1]) if isinstance(a, list) else str(a))
def test_every_text_output_fits_100_columns(args):
    assert widest(run(*args)) <= 100


def test_price_fits_and_wide_shows_names_whole(proposal: Path):
    text = run("price", CASES / "riverside-culvert", "--proposal", proposal)
    assert widest(text) <= 100
    wide = run("schedule", CASES / "riverside-culvert", "--wide")
    assert widest(wide) > 100
    data = json.loads(run("schedule", CASES / "riverside-culvert", "--json"))
    longest = max((r["name"] for r in data["activities"]), key=len)
    assert longest in wide and longest not in run("schedule", CASES / "riverside-culvert")
    assert "…" in run("schedule", CASES / "riverside-culvert")


def test_best_states_the_saving_and_shows_the_current_finish(tmp_path: Path):
    # ques10 worked solution (verified text): normal 23 days at 5,740, optimum 18 days at 5,620:
    # a saving of 120.
    folder = tmp_path / "q"
    write_project(project_from_example(load_json("examples/ques10_indirect80.json"), indirect=80), folder)
    text = run("best", folder)
    assert "saves 120 against the current finish" in text
    rows = [line for line in text.splitlines() if re.match(r"^\s*\*?\s*23 now\b", line)]
    assert len(rows) == 1 and "5,740" in rows[0]
    data = json.loads(run("best", folder, "--json"))
    assert data["saving"] == 120 and data["current"]["total_cost"] == 5740
    # the current finish is shown even when it is far from the best one
    far = run("best", CASES / "riverside-culvert")
    best = json.loads(run("best", CASES / "riverside-culvert", "--json"))
    assert f"{best['current']['finish']} now" in far


def test_total_cost_is_the_same_sum_in_best_and_recover():
    late = CASES / "harbour-depot-late"
    best = json.loads(run("best", late, "--json"))
    rec = json.loads(run("recover", late, "--json"))
    course = next(c for c in rec["courses"] if c["course"] == "least total cost")
    assert course["finish"] == best["finish"]
    assert course["total_cost"] == best["total_cost"]
    # direct (normal + added) + indirect + damages (contract and milestones) - bonus, by hand
    for c in rec["courses"]:
        if c["possible"]:
            total = c["direct_cost"] + c["indirect_cost"] + c["contract_damages"] + c["milestone_damages"] - c["bonus"]
            assert abs(c["total_cost"] - total) <= 0.01


def test_curve_changes_are_worded():
    text = run("curve", CASES / "harbour-depot-late")
    assert not re.search(r"\bA\d{3} [+-]\d", text)  # no bare solver deltas such as 'A410 -1'
    assert "back to normal" in text and "shortened" in text
    data = json.loads(run("curve", CASES / "harbour-depot-late", "--json"))
    assert all("change" in p and "plan" in p for p in data["points"])


@pytest.fixture(scope="module")
def with_options(tmp_path_factory) -> Path:
    # A chain where the option is the cheapest way to the target (figures invented for layout)
    acts = [Activity("P", 10, name="Precast deck units", trade="precast", crash_duration=9, cost=0,
                     crash_cost=5000, options=(Option("second crane", 6, 1000, note="hire from the next site"),)),
            Activity("Q", 5, name="Deck finishes", trade="finishes")]
    folder = tmp_path_factory.mktemp("opt") / "p"
    write_project(make_project(acts, [Link("P", "Q")]), folder)
    return folder


def test_option_notes_beside_chosen_options(with_options: Path, tmp_path: Path):
    note = "hire from the next site"
    assert note in run("plan", with_options, "--finish", 11)
    assert note in run("plan", with_options, "--finish", 11, "--wide")
    data = json.loads(run("plan", with_options, "--finish", 11, "--json"))
    assert {a["id"]: a["option_note"] for a in data["activities"]}["P"] == note
    assert note in run("curve", with_options)
    curve = json.loads(run("curve", with_options, "--json"))
    assert any(x["option_note"] == note for p in curve["points"] for x in p["plan"])
    prop = tmp_path / "p.csv"
    prop.write_text("id,option\nP,second crane\n", encoding="utf-8")
    assert note in run("price", with_options, "--proposal", prop)
    html = tmp_path / "r.html"
    run("report", with_options, "--finish", 11, "-o", html)
    assert note in html.read_text(encoding="utf-8")
