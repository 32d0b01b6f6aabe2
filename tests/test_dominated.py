"""Tests of hasten.dominated.drop_dominated (dropping dominated discrete options).

Checks:

* the definition, on small hand cases: every expected value is written out by hand from the
  rule "p is as fast or faster and as cheap or cheaper, one of them strictly; both plain";
* the published PSPLIB instance j102_2.mm (R. Kolisch and A. Sprecher, "PSPLIB - A project
  scheduling problem library", EJOR 96(1):205-216, 1997; copy in tests/data/psplib_mm):
  the dominated modes, worked out by hand from the file's REQUESTS/DURATIONS table;
* a property: dropping dominated options never changes the least direct cost of any project
  finish, found by enumerating every choice of options with a forward pass written here
  (start-time form of FS/SS/FF/SF, Moder, Phillips & Davis, "Project Management with CPM,
  PERT and Precedence Diagramming", 3rd ed., 1983, ch. 4 -- the four relations, from memory).

The hand projects are invented to exercise the rule; they are not reference data.
"""

from __future__ import annotations

import itertools
from datetime import date
from pathlib import Path

from hypothesis import given, settings
from hypothesis import strategies as st

from hasten.formats.research import read_research
from hasten.project import Activity, Link, LinkType, Option, Project
from hasten.dominated import dominated_options, drop_dominated

PSPLIB_MM = Path(__file__).parent / "data" / "psplib_mm"
START = date(2025, 1, 6)


def project(*activities: Activity, links: tuple[Link, ...] = ()) -> Project:
    return Project("t", START, tuple(activities), links)


def names(activity: Activity) -> list[str]:
    return [o.name for o in activity.options]


# ---------------------------------------------------------------- the rule by hand

def test_note_wording_and_what_is_kept():
    a = Activity("A120", 14, options=(
        Option("night shift", 12, 9000.0),
        Option("second crew", 12, 7000.0),
        Option("third crew", 10, 7000.0),
        Option("slow and dear", 15, 1234.5),
    ))
    reduced, notes = drop_dominated(project(a))
    # 'second crew' stays: 'third crew' is faster at the same cost, and where its days are not
    # needed the slower way takes fewer days off at the same cost (the tie rule)
    assert names(reduced.activities[0]) == ["second crew", "third crew"]
    assert notes == [
        # dominated by 'second crew' and 'third crew'; the first undominated one is named
        "A120: option 'night shift' (12 days, 9,000) dropped: 'second crew' is as fast and cheaper",
        "A120: option 'slow and dear' (15 days, 1,234.50) dropped: the normal way is faster and cheaper",
    ]


def test_a_note_never_names_a_way_that_is_dropped_too():
    # a chain (by hand): 'dear' (12 days, 9,000) is beaten by 'less dear' (12, 8,000) and by
    # 'cheap' (12, 7,000); 'less dear' is itself beaten by 'cheap'. Both go, and both notes
    # name 'cheap', the way that stays (the rule in dominated_options' docstring).
    a = Activity("C7", 14, options=(Option("dear", 12, 9000.0), Option("less dear", 12, 8000.0),
                                    Option("cheap", 12, 7000.0)))
    reduced, notes = drop_dominated(project(a))
    assert names(reduced.activities[0]) == ["cheap"]
    assert notes == ["C7: option 'dear' (12 days, 9,000) dropped: 'cheap' is as fast and cheaper",
                     "C7: option 'less dear' (12 days, 8,000) dropped: 'cheap' is as fast and cheaper"]


def test_example_of_the_brief():
    a = Activity("A120", 14, options=(Option("night shift", 12, 9000.0),
                                      Option("second crew", 12, 7000.0)))
    assert drop_dominated(project(a))[1] == [
        "A120: option 'night shift' (12 days, 9,000) dropped: 'second crew' is as fast and cheaper"]


def test_undominated_options_stay_in_order():
    # faster and dearer, slower and cheaper (negative added cost), equal twins: none dominated
    a = Activity("B", 10, cost=500.0, options=(
        Option("fast", 7, 800.0), Option("cheap", 12, -200.0),
        Option("twin", 8, 300.0), Option("twin again", 8, 300.0), Option("free", 9, 0.0)))
    p = project(a)
    reduced, notes = drop_dominated(p)
    # 'free' (9 days, 0) beats nothing here: 'fast' and 'twin' are faster but dearer
    assert reduced == p and notes == []


def test_an_option_beating_the_normal_way_drops_nothing_normal():
    # the normal way is never dropped; a cheaper, faster option only beats other options
    a = Activity("C", 10, options=(Option("better", 8, -100.0), Option("worse", 9, 50.0)))
    reduced, notes = drop_dominated(project(a))
    assert names(reduced.activities[0]) == ["better"]
    assert notes == ["C: option 'worse' (9 days, 50) dropped: 'better' is faster and cheaper"]


def test_options_that_can_be_shortened_are_never_compared():
    crashable = Option("crew + overtime", 9, 500.0, crash_duration=7, cost_per_day=100.0)
    a = Activity("D", 10, options=(
        crashable,                          # dominated on its base point by 'quick', kept
        Option("quick", 8, 400.0),
        Option("dear", 9, 450.0),           # dominated by 'quick', dropped
    ))
    reduced, notes = drop_dominated(project(a))
    assert names(reduced.activities[0]) == ["crew + overtime", "quick"]
    assert notes == ["D: option 'dear' (9 days, 450) dropped: 'quick' is faster and cheaper"]
    # and a crashable option never drops a plain one
    b = Activity("E", 10, options=(Option("fast crashable", 5, 0.0, crash_duration=4,
                                          cost_per_day=10.0), Option("plain", 6, 10.0)))
    assert drop_dominated(project(b))[1] == []


def test_normal_way_that_can_be_crashed_is_not_a_dominator():
    linear = Activity("F", 10, crash_duration=8, cost=1000.0, crash_cost=1400.0,
                      options=(Option("slower", 11, 100.0),))
    assert drop_dominated(project(linear))[1] == []
    fixed = Activity("F", 10, cost=1000.0, options=(Option("slower", 11, 100.0),))
    assert drop_dominated(project(fixed))[1] == [
        "F: option 'slower' (11 days, 100) dropped: the normal way is faster and cheaper"]


def test_reverse_critical_activity_keeps_slower_options():
    """X has an incoming FF link, so a longer X may start earlier and let its SS successor
    start earlier. By hand: A (10 days) -FF-> X -SS-> B (10 days).
    X normal, 2 days: X starts 10 - 2 = 8, B starts 8, finish 18 at added cost 0.
    X option 'long', 6 days, +1: X starts 10 - 6 = 4, B starts 4, finish 14 at cost 1.
    'long' is slower and dearer than the normal way, yet the only way to finish by 14."""
    a = Activity("A", 10)
    x = Activity("X", 2, options=(Option("long", 6, 1.0), Option("long and dear", 6, 5.0)))
    b = Activity("B", 10)
    links = (Link("A", "X", LinkType.FF), Link("X", "B", LinkType.SS))
    reduced, notes = drop_dominated(project(a, x, b, links=links))
    assert names(reduced.activities[1]) == ["long"]  # same duration, dearer: still dropped
    assert notes == ["X: option 'long and dear' (6 days, 5) dropped: 'long' is as fast and cheaper"]
    inf = float("inf")  # by hand above: nothing by day 13, cost 1 from day 14, 0 from day 18
    assert least_cost_curve(project(a, x, b, links=links), range(13, 19)) == [inf, 1, 1, 1, 1, 0]
    assert least_cost_curve(reduced, range(13, 19)) == [inf, 1, 1, 1, 1, 0]
    # with a finish-to-start link the slower option is useless and goes
    fs = (Link("A", "X"), Link("X", "B", LinkType.SS))
    assert names(drop_dominated(project(a, x, b, links=fs))[0].activities[1]) == []


def test_an_sf_link_in_makes_an_activity_reverse_critical_too():
    """The same by hand with an SF link in: A (10 days) -SF+10-> X -SS-> B (10 days); X must
    finish by A's start 0 + 10 = day 10. X normal, 2 days: X 8-10, B 8-18, finish 18 at 0.
    X 'long', 6 days, +1: X 4-10, B 4-14, finish 14 at cost 1: the slower, dearer option is
    the only way to finish by 14 and must be kept."""
    a, b = Activity("A", 10), Activity("B", 10)
    x = Activity("X", 2, options=(Option("long", 6, 1.0),))
    links = (Link("A", "X", LinkType.SF, 10), Link("X", "B", LinkType.SS))
    reduced, notes = drop_dominated(project(a, x, b, links=links))
    assert names(reduced.activities[1]) == ["long"] and notes == []
    inf = float("inf")  # by hand above: nothing by day 13, cost 1 from day 14, 0 from day 18
    assert least_cost_curve(reduced, range(13, 19)) == [inf, 1, 1, 1, 1, 0]


def test_input_is_left_alone_and_rest_unchanged():
    a = Activity("G", 5, name="Formwork", trade="Carpentry", cost=10.0,
                 options=(Option("x", 6, 1.0), Option("y", 4, 1.0)))
    p = Project("kept", START, (a, Activity("H", 0)), (Link("G", "H"),), currency="EUR")
    reduced, _ = drop_dominated(p)
    assert p.activities[0].options == (Option("x", 6, 1.0), Option("y", 4, 1.0))
    assert reduced.activities[0] == Activity("G", 5, name="Formwork", trade="Carpentry",
                                             cost=10.0, options=(Option("y", 4, 1.0),))
    assert (reduced.name, reduced.links, reduced.currency, reduced.activities[1]) == (
        p.name, p.links, p.currency, p.activities[1])


# ---------------------------------------------------------------- a published instance

def test_psplib_j102_2_dominated_modes():
    """j102_2.mm, REQUESTS/DURATIONS (mode: duration, N1 + N2), worked out by hand:
    job 7: m1 3 days 10, m2 6 days 10, m3 8 days 10 -> normal m3; m2 kept (m1 faster at the same cost)
    job 8: m1 4 days 1, m2 10 days 10, m3 10 days 1 -> normal m3; m2 beaten by m3 (as fast, cheaper)
    job 9: m1 2 days 6, m2 7 days 8, m3 10 days 7 -> normal m3; m2 beaten by m1 (faster, cheaper)
    job 10: m1 1 day 4, m2 1 day 8, m3 9 days 5 -> normal m3; m2 beaten by m1 (as fast, cheaper)
    job 3: m1 1 day 8 and m2 1 day 8 are twins (neither strictly better): both kept."""
    p = read_research(PSPLIB_MM / "j102_2.mm")
    reduced, notes = drop_dominated(p)
    assert notes == [
        "J8: option 'mode 2' (10 days, 9) dropped: the normal way is as fast and cheaper",
        "J9: option 'mode 2' (7 days, 1) dropped: 'mode 1' is faster and cheaper",
        "J10: option 'mode 2' (1 day, 3) dropped: 'mode 1' is as fast and cheaper",
    ]
    assert names(reduced.activity("J3")) == ["mode 1", "mode 2"]
    assert sum(len(a.options) for a in reduced.activities) == \
        sum(len(a.options) for a in p.activities) - 3


def test_dominated_options_names_indices():
    a = Activity("K", 10, options=(Option("a", 10, 5.0), Option("b", 3, 1.0), Option("c", 3, 2.0)))
    # a: beaten by normal (as fast, cheaper) and b; c: beaten by b
    assert dominated_options(a) == [(0, -1), (2, 1)]
    assert dominated_options(a, equal_duration_only=True) == [(0, -1), (2, 1)]
    a2 = Activity("K", 10, options=(Option("a", 11, 5.0), Option("b", 3, 1.0), Option("c", 4, 2.0)))
    assert dominated_options(a2) == [(0, -1), (2, 1)]
    assert dominated_options(a2, equal_duration_only=True) == []


# ---------------------------------------------------------------- the property

OFFSET = {  # least S_succ - S_pred for a link with lag l (start-time form)
    LinkType.FS: lambda dp, ds, l: dp + l,
    LinkType.SS: lambda dp, ds, l: l,
    LinkType.FF: lambda dp, ds, l: dp + l - ds,
    LinkType.SF: lambda dp, ds, l: l - ds,
}


def finish_of(p: Project, durations: dict[str, int]) -> int:
    """Early-start forward pass (activities are listed in a topological order here)."""
    into: dict[str, list[Link]] = {a.id: [] for a in p.activities}
    for k in p.links:
        into[k.succ].append(k)
    es: dict[str, int] = {}
    for a in p.activities:
        es[a.id] = max([0] + [es[k.pred] + OFFSET[k.type](durations[k.pred], durations[a.id], k.lag)
                              for k in into[a.id]])
    return max(es[i] + durations[i] for i in es)


def finishes_and_costs(p: Project) -> dict[int, float]:
    """Least added cost of the choices (normal way or one plain option per activity) that
    finish exactly on each reachable day."""
    ways = [[(a.duration, 0.0)] + [(o.duration, o.added_cost) for o in a.options]
            for a in p.activities]
    best: dict[int, float] = {}
    for choice in itertools.product(*ways):
        f = finish_of(p, {a.id: d for a, (d, _) in zip(p.activities, choice)})
        best[f] = min(best.get(f, float("inf")), sum(c for _, c in choice))
    return best


def least_cost_curve(p: Project, days: range) -> list[float]:
    """Least added cost of finishing by each day of ``days`` (inf where no choice does)."""
    best = finishes_and_costs(p)
    return [min([c for f, c in best.items() if f <= t], default=float("inf")) for t in days]


@st.composite
def projects_with_options(draw) -> Project:
    n = draw(st.integers(2, 5))
    acts = []
    for i in range(n):
        d = draw(st.integers(0, 6))
        opts = () if d == 0 else tuple(
            Option(f"o{k}", draw(st.integers(0, 8)), float(draw(st.integers(-3, 6))))
            for k in range(draw(st.integers(0, 3))))
        acts.append(Activity(f"a{i}", d, options=opts))
    pairs = st.tuples(st.integers(0, n - 1), st.integers(0, n - 1)).filter(lambda q: q[0] < q[1])
    links = draw(st.lists(st.tuples(pairs, st.sampled_from(list(LinkType)), st.integers(-2, 3)),
                          max_size=6, unique_by=lambda t: (t[0], t[1])))
    return project(*acts, links=tuple(Link(f"a{i}", f"a{j}", t, lag) for (i, j), t, lag in links))


@st.composite
def reverse_critical_chains(draw) -> Project:
    """P -(FF or SF)-> X -(any)-> S with a long P and S and a short X: the pattern in which
    a slower X can finish the project earlier (random options on all three)."""
    def act(i: int, lo: int, hi: int) -> Activity:
        opts = tuple(Option(f"o{k}", draw(st.integers(0, 8)), float(draw(st.integers(-3, 6))))
                     for k in range(draw(st.integers(0, 3))))
        return Activity(f"a{i}", draw(st.integers(lo, hi)), options=opts)
    into = draw(st.sampled_from([LinkType.FF, LinkType.SF]))
    out = draw(st.sampled_from(list(LinkType)))
    links = (Link("a0", "a1", into, draw(st.integers(-2, 3))),
             Link("a1", "a2", out, draw(st.integers(-2, 3))))
    return project(act(0, 3, 8), act(1, 1, 4), act(2, 3, 8), links=links)


def check_same_least_costs(p: Project) -> None:
    reduced, notes = drop_dominated(p)
    assert len(notes) == sum(len(a.options) for a in p.activities) - \
        sum(len(a.options) for a in reduced.activities)
    reached = finishes_and_costs(p)
    days = range(min(reached), max(reached) + 1)
    assert least_cost_curve(reduced, days) == least_cost_curve(p, days)


@settings(max_examples=300, deadline=None)
@given(projects_with_options())
def test_dropping_never_changes_the_least_cost_of_any_finish(p):
    check_same_least_costs(p)


@settings(max_examples=300, deadline=None)
@given(reverse_critical_chains())
def test_dropping_keeps_slower_options_that_finish_earlier(p):
    check_same_least_costs(p)
