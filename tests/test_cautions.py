"""Cautions fire only where they apply and name what they are about (hasten.cautions).

The rules checked are those of src/hasten/cautions.py (module notes); the figures in the
concrete caution are read values of the trade facts (tests/data/cautions/README.md: ACI
347 stripping times, UFGS 03301A curing of 7, 14 or 21 days by cement type). Each project
is hand-worked of our own (arithmetic in the comments); calendar mon-fri from Mon
2024-01-01 (conftest.START): day 7 = Wed 01-10.
"""

from __future__ import annotations

import dataclasses
from datetime import date
from pathlib import Path

from conftest import make_project
from hasten.cautions import stacking
from hasten.planner import Planner
from hasten.project import Activity, Calendar, Link, Option

ROOT = Path(__file__).resolve().parents[1]


def crashable(id_, trade, name="", days=10, cut=2):
    """``days`` long, ``cut`` days off at 100 a day."""
    return Activity(id_, days, name=name or id_, trade=trade, crash_duration=days - cut, cost=0.0,
                    crash_cost=100.0 * cut)


def cautions(project, cut):
    planner = Planner(project)
    return planner.plan(planner.normal_finish - cut).cautions


def test_no_trade_stacking_when_the_shortened_work_is_months_apart():
    # A (electrical) -> W1 (60 d) -> B (drylining) -> W2 (60 d) -> C (painting): three
    # trades shortened by 2 days each (target 6 days earlier), months apart: no overlap, no
    # stacking caution (before: claimed whenever three trades were shortened).
    acts = [crashable("A", "electrical"), Activity("W1", 60), crashable("B", "drylining"), Activity("W2", 60),
            crashable("C", "painting")]
    links = [Link("A", "W1"), Link("W1", "B"), Link("B", "W2"), Link("W2", "C")]
    found = cautions(make_project(acts, links), 6)
    assert not any("trade stacking" in c for c in found)


def test_trade_stacking_names_the_overlapping_work_and_its_dates():
    # A (electrical) and B (drylining) in parallel from day 0, both 10 -> 8 days (target
    # 8): both are worked on days 0..7, Mon 01-01 to Wed 01-10.
    acts = [crashable("A", "electrical", "Level 2 first fix"), crashable("B", "drylining", "Level 2 boards")]
    (text,) = [c for c in cautions(make_project(acts, []), 2) if "trade stacking" in c]
    assert ("'Level 2 first fix' (A, electrical) and 'Level 2 boards' (B, drylining) from 2024-01-01 to "
            "2024-01-10") in text


def test_concrete_is_marked_by_the_trade_not_by_words_of_the_name():
    # "Metal deck to level 2" (trade steel): no curing caution (before: "deck" in the name
    # was read as concrete). "Level 2 slab" (trade concrete): the caution names it, with
    # the read figures.
    deck = make_project([crashable("D1", "steel", "Metal deck to level 2")], [])
    assert not any("Curing" in c for c in cautions(deck, 2))
    slab = make_project([crashable("S1", "concrete", "Level 2 slab")], [])
    (text,) = [c for c in cautions(slab, 2) if "Curing" in c]
    assert "'Level 2 slab' (S1)" in text
    assert "7, 14 or 21 days of curing" in text and "ACI 347" in text and "UFGS 03301A" in text
    assert "structural engineer of record" in text


def test_the_readme_gives_the_same_curing_figures_as_the_output():
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    assert "7, 14 or 21 days of curing" in readme


def test_a_method_change_is_not_called_heavy_overtime():
    # P (10 d) has the option "precast units" at 4 days (+100) and no crash steps; to finish
    # in 4 days the plan uses the option: 6 of 10 days off by a change of method, not by
    # overtime: no "more than a quarter" caution (before: it fired). Precast is erected
    # with a crane: the work-at-height caution names P.
    p = make_project([Activity("P", 10, name="Level 1 floor units", trade="precast",
                               options=(Option("precast units", 4, 100.0),))], [])
    found = cautions(p, 6)
    assert not any("more than a quarter" in c for c in found)
    (height,) = [c for c in found if "crane lifts" in c]
    assert "'Level 1 floor units' (P)" in height


def test_heavy_crashing_names_each_activity_and_its_days():
    # Q 8 -> 5 working days (3 > 8 / 4 = 2): named; R 8 -> 6 (2, not more than 2): not.
    acts = [crashable("Q", "joinery", days=8, cut=3), crashable("R", "joinery", days=8, cut=2)]
    links = [Link("Q", "R")]
    (text,) = [c for c in cautions(make_project(acts, links), 5) if "more than a quarter" in c]
    assert "'Q' (Q) from 8 to 5 working days" in text and "'R'" not in text


def test_physical_waits_labour_cannot_shorten():
    # one activity per kind, in a chain, each 10 -> 8 days (target 10 days earlier):
    # coatings, screed, roofing (weather and height), a steel erection by its name.
    acts = [crashable("C1", "painting", "Coat steelwork"), crashable("S1", "screed", "Level 1 screed"),
            crashable("R1", "roofing", "Roof covering"), crashable("E1", "steel", "Steel frame erection")]
    links = [Link("C1", "S1"), Link("S1", "R1"), Link("R1", "E1")]
    found = cautions(make_project(acts, links), 8)
    text = "\n".join(found)
    coat = next(c for c in found if c.startswith("Coating"))
    assert "'Coat steelwork' (C1)" in coat and "manufacturer's data sheet" in coat
    dry = next(c for c in found if c.startswith("Screed or plaster"))
    assert "'Level 1 screed' (S1)" in dry
    weather = next(c for c in found if c.startswith("Weather-dependent"))
    assert "'Roof covering' (R1)" in weather and "'Steel frame erection'" not in weather
    height = next(c for c in found if "crane lifts" in c)
    assert "'Roof covering' (R1)" in height and "'Steel frame erection' (E1)" in height
    assert "'Coat steelwork'" not in height
    # no invented figures: the only numbers are in the general caution and the concrete one
    assert "Curing" not in text


def test_work_of_two_trades_sharing_one_day_overlaps():
    # A's last day is B's first day, Fri 2027-06-04: they overlap on that one day (a day
    # worked by both is a day both crews are on site).
    rows = [("'A' (A1)", "electrical", date(2027, 6, 1), date(2027, 6, 4)),
            ("'B' (B1)", "drylining", date(2027, 6, 4), date(2027, 6, 8))]
    assert stacking(rows) == ["'A' (A1, electrical) and 'B' (B1, drylining) from 2027-06-04 to 2027-06-04"]
    # B a day later (Sat 06-05): no day in common, no overlap
    assert stacking(rows[:1] + [("'B' (B1)", "drylining", date(2027, 6, 5), date(2027, 6, 8))]) == []


def test_one_trade_written_in_two_cases_does_not_stack_with_itself():
    rows = [("'A' (A1)", "electrical", date(2027, 6, 1), date(2027, 6, 9)),
            ("'B' (B1)", "Electrical", date(2027, 6, 7), date(2027, 6, 20))]
    assert stacking(rows) == []


def test_trade_words_are_whole_words():
    # "plasterboard" (drylining) is not plaster: no drying caution; "plaster" is.
    board = make_project([crashable("P1", "plasterboard", "Level 2 partitions")], [])
    assert not any(c.startswith("Screed or plaster") for c in cautions(board, 2))
    wet = make_project([crashable("P2", "plaster", "Level 2 skim")], [])
    assert any(c.startswith("Screed or plaster") and "'Level 2 skim' (P2)" in c for c in cautions(wet, 2))


def test_a_concrete_method_change_is_not_called_shortened_curing():
    # S2 (concrete, 10 days) finishes in 6 only by the option "precast planks" (6 days,
    # +100): a change of method, no crash days, so no curing caution names it (the curing
    # caution is about work "shortened with crash days").
    p = make_project([Activity("S2", 10, name="Level 3 slab", trade="concrete",
                               options=(Option("precast planks", 6, 100.0),))], [])
    assert not any("Curing" in c for c in cautions(p, 4))


def test_a_six_day_calendar_has_its_weekly_rest_day():
    # W shortened on a six-day calendar (Mon-Sat): Sunday is its rest day, no caution; on an
    # every-day calendar the caution names it.
    for days, named in ((6, False), (7, True)):
        cal = Calendar(tuple(range(days)), (), "site")
        p = make_project([dataclasses.replace(crashable("W", "joinery"), calendar="site")], [], calendars=(cal,))
        assert any("no weekly rest day" in c and "'W' (W)" in c for c in cautions(p, 2)) is named, days
