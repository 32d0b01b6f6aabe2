"""``hasten schedule --json`` is written as text from columns (render_json.schedule_json_text);
it must be byte for byte what the straightforward ``json.dumps`` of the same object gives.

The reference here is the standard library's own encoder over ``schedule_json`` (one
dictionary per row) with the notes appended, as the command printed before. The projects
are the bundled cases (invented, for demos) and projects built here with progress,
calendars of their own, milestones, negative float and ids, names and trades in other
scripts and with the characters JSON escapes; no figure is checked, only that the two
texts are the same.
"""

from __future__ import annotations

import json
from datetime import date
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from typer.testing import CliRunner

from hasten import render_json
from hasten.cli import app
from hasten.cpm import schedule
from hasten.formats import read_project, write_project
from hasten.project import Activity, Calendar, Link, LinkType, Project

CASES = sorted(p for p in (Path(__file__).parent.parent / "cases").iterdir() if p.is_dir())


def _reference(project: Project, sched, notes=()) -> str:
    return json.dumps(render_json.schedule_json(project, sched) | {"notes": list(notes)},
                      ensure_ascii=False)


@pytest.mark.parametrize("case", CASES, ids=[c.name for c in CASES])
def test_the_cases_are_written_as_json_dumps_writes_them(case):
    project = read_project(case)
    normal = schedule(project)
    assert render_json.schedule_json_text(project, normal, ["a note"]) == \
        _reference(project, normal, ["a note"])
    late = schedule(project, deadline=max(normal.finish - 15, 0))  # negative float
    assert any(a.total_float < 0 for a in late.activities) or normal.finish <= 15
    assert render_json.schedule_json_text(project, late) == _reference(project, late)


_TEXT = st.one_of(st.sampled_from(["", "Pour slab", 'say "hi"', "back\\slash", "tab\there",
                                   "Bétonnage", "基礎工事", "line\u2028sep", "emoji 🏗"]),
                  st.text(max_size=6))
_SIX_DAYS = Calendar((0, 1, 2, 3, 4, 5), (date(2025, 3, 10),), name="six-day")
_SEVEN = Calendar((0, 1, 2, 3, 4, 5, 6), (), name="seven-day")
_IDS = ["A1", "Bé-2", "基3", "Ω_4", "A.5", "x-6", "Z7", "ü8"]


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.lists(st.tuples(st.integers(0, 6), _TEXT, _TEXT,
                          st.sampled_from(["", "six-day", "seven-day"]),
                          st.sampled_from(["none", "finished", "started"])),
                min_size=1, max_size=8),
       st.lists(st.tuples(st.integers(0, 7), st.integers(0, 7),
                          st.sampled_from(list(LinkType)), st.integers(-2, 3)), max_size=12),
       st.booleans(), st.integers(-10, 5))
def test_built_projects_are_written_as_json_dumps_writes_them(rows, edges, progress, early):
    """Milestones (duration 0), calendars of their own, progress at a data date, a deadline
    before the finish (negative float), ids and texts JSON must escape or leaves as they are."""
    start, data_date = date(2025, 3, 3), date(2025, 3, 12)
    acts = []
    for k, (days, name, trade, calendar, done) in enumerate(rows):
        fields = {}
        if progress and k < 3 and done == "finished":
            fields = {"actual_start": date(2025, 3, 3), "actual_finish": date(2025, 3, 5)}
        elif progress and k < 3 and done == "started" and days > 1:
            fields = {"actual_start": date(2025, 3, 4), "remaining": 1}
        acts.append(Activity(_IDS[k], days, name=name, trade=trade, calendar=calendar,
                             **fields))
    links = {}
    for p, s, kind, lag in edges:
        p, s = min(p, s), max(p, s)
        if p != s and s < len(acts) and (p, s) not in links:
            links[(p, s)] = Link(_IDS[p], _IDS[s], kind, lag)
    project = Project("Bau \"Süd\"", start, tuple(acts), tuple(links.values()),
                      calendars=(_SIX_DAYS, _SEVEN), data_date=data_date if progress else None)
    normal = schedule(project)
    notes = ["percent complete read as written", "é \"quoted\""]
    assert render_json.schedule_json_text(project, normal, notes) == \
        _reference(project, normal, notes)
    late = schedule(project, deadline=normal.finish + early)
    assert render_json.schedule_json_text(project, late) == _reference(project, late)


def test_a_lone_milestone():
    project = Project("one", date(2025, 3, 3), (Activity("M", 0),))
    sched = schedule(project)
    text = render_json.schedule_json_text(project, sched)
    assert text == _reference(project, sched)
    assert json.loads(text)["activities"][0]["id"] == "M"


def test_the_command_prints_the_reference_text(tmp_path):
    """What `hasten schedule DIR --json` prints is the reference dump of the same project."""
    project = Project("Bau Süd", date(2025, 3, 3),
                      (Activity("基1", 3, name='say "hi"'), Activity("Bé-2", 0),
                       Activity("C3", 2, calendar="six-day")),
                      (Link("基1", "Bé-2"), Link("Bé-2", "C3", LinkType.SS, 1)),
                      calendars=(_SIX_DAYS,))
    folder = tmp_path / "p"
    write_project(project, folder)
    result = CliRunner().invoke(app, ["schedule", str(folder), "--json"])
    assert result.exit_code == 0, result.output
    read = read_project(folder)
    assert result.output == _reference(read, schedule(read)) + "\n"
