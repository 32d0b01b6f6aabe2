"""Plans solved on the part of the network that can matter (hasten.partial) against
independent references:

- scipy.optimize.linprog (HiGHS) on our own start/duration LP of the WHOLE network
  (conftest.linprog_least_cost), at every whole-day target;
- brute force over every whole-day duration vector (conftest.brute_force_curve) on
  small networks, with zero-cost shortening allowed (where plans are least determined);
- hasten's own whole-network model for the tie-break counts (fewest activities
  shortened, then fewest days), which must not depend on where the plan was solved.

The random projects are invented test data; every expected value comes from the
references above.
"""

from __future__ import annotations

import dataclasses
import random
from contextlib import contextmanager

import pytest
from hypothesis import given
from hypothesis import strategies as st

import hasten.partial as focus
from conftest import (PROPERTY, TOL, brute_force_curve, link_holds, linprog_least_cost, make_project,
                      own_finish, projects)
from hasten.plan_check import check_plan
from hasten.planner import Planner
from hasten.project import Activity, Link, LinkType, Option
from hasten.network import Network
from hasten.crash_model import CrashModel


def close(a: float, b: float) -> bool:
    return abs(a - b) <= TOL * max(1.0, abs(a), abs(b))


@contextmanager
def any_part():
    """Let the focus solve parts of any size (by default a part over 60% of the network
    is left to the whole model), so small random networks go through it."""
    with pytest.MonkeyPatch.context() as mp:
        mp.setattr(focus, "WHOLE_SHARE", 2.0)
        yield


def _crashed(durations, normal):
    cuts = [n - d for d, n in zip(durations, normal)]
    return sum(1 for c in cuts if c), sum(cuts)


@PROPERTY
@given(projects(min_n=4, max_n=12, max_links=18))
def test_focused_least_cost_matches_linprog_on_the_whole_network(project):
    with any_part():
        _focused_matches_linprog(project)


def _focused_matches_linprog(project):
    net = Network(project)
    part = focus.PartialSolver(net)
    whole = CrashModel(net)
    lo = whole.shortest_finish()
    for target in range(part.normal_finish - 1, lo - 2, -1):
        expected = linprog_least_cost(project, target)  # reference: scipy, whole network
        sol = part.least_cost(target)
        if expected is None:
            assert sol is None, target
            continue
        assert sol is not None and close(sol.added_cost, expected), target
        # the plan holds on the whole network: its finish by our own pass (conftest.own_finish)
        # and the scipy cost, as the independent check (hasten.plan_check) finds them, and
        # the solver's own starts keep every link
        durations = dict(zip((x.id for x in project.activities), sol.durations))
        check_plan(project, list(sol.durations), target=target, claimed_finish=own_finish(project, durations),
                   claimed_cost=expected)
        starts = dict(zip((x.id for x in project.activities), sol.starts))
        assert all(link_holds(k, starts[k.pred], durations[k.pred], starts[k.succ], durations[k.succ])
                   for k in project.links)
        assert close(sol.added_cost, expected)
        # the same tie-break as the whole model
        full = whole.least_cost(target)
        assert _crashed(sol.durations, net.durations) == _crashed(full.durations, net.durations)


@PROPERTY
@given(projects(min_n=2, max_n=6, max_duration=6, max_cut=2, max_links=9), st.data())
def test_focused_curve_matches_brute_force_with_free_days(project, data):
    # some shortening days cost nothing: the LP may then take any of several vertices
    free = data.draw(st.sets(st.integers(0, len(project.activities) - 1)))
    acts = tuple(dataclasses.replace(a, crash_cost=a.cost) if k in free and a.crash_duration is not None
                 else a for k, a in enumerate(project.activities))
    project = dataclasses.replace(project, activities=acts)
    expected = brute_force_curve(project)  # reference: every whole-day duration vector
    study = Planner(project)
    assert study.shortest_finish == min(expected)
    study._model = None  # ask the curve of the focused parts, not of the whole model
    with any_part():
        points = study.curve(shortest=min(expected))
    assert study._partial is not None or min(expected) == study.normal_finish
    assert {p.finish: round(p.added_cost, 6) for p in points} == \
        {f: round(c, 6) for f, c in expected.items() if f <= study.normal_finish}


def _layered(n: int, seed: int):
    """A random mixed-link network in layers, ~n activities (test data of our own)."""
    rng = random.Random(seed)
    acts, links = [], []
    for i in range(n):
        d = rng.randint(1, 15)
        cut = rng.randint(0, d // 2)
        acts.append(Activity(f"t{i}", d, crash_duration=d - cut, cost=100.0,
                             crash_cost=100.0 + cut * rng.randint(1, 30)))
        for _ in range(rng.randint(1, 2) if i else 0):
            j = rng.randint(max(0, i - 25), i - 1)
            links.append(Link(f"t{j}", f"t{i}", rng.choice(list(LinkType)), rng.randint(-2, 4)))
    return make_project(acts, links, name="layered")


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_a_plan_on_a_larger_network_is_solved_on_a_part_and_matches_linprog(seed):
    project = _layered(300, seed)
    study = Planner(project)
    target = study.normal_finish - 8
    plan = study.plan(target)
    part_model, keep = study._partial._part  # solved on a part of the network
    assert len(keep) < len(project.activities)
    assert study._model is None  # the whole model was never needed
    assert close(plan.added_cost, linprog_least_cost(project, target))  # reference: scipy
    assert close(plan.next_day_cost,
                 linprog_least_cost(project, target - 1) - linprog_least_cost(project, target))
    durations = [a.duration for a in plan.activities]
    starts = [a.es for a in plan.schedule.activities]
    assert check_plan(project, durations, starts=starts, early=True, target=target, claimed_finish=plan.finish,
                      claimed_cost=linprog_least_cost(project, target)).finish == plan.finish <= target
    # same tie-break result as the whole model
    whole = CrashModel(Network(project)).least_cost(target)
    normal = [a.duration for a in project.activities]
    assert _crashed(durations, normal) == _crashed(whole.durations, normal)


def test_focus_is_not_used_with_discrete_options_or_deadlines():
    base = _layered(20, 4)
    net = Network(base)
    assert focus.solvable_on_part(net)
    first = base.activities[0]
    with_deadline = dataclasses.replace(base, activities=(
        dataclasses.replace(first, deadline=base.start),) + base.activities[1:])
    assert not focus.solvable_on_part(Network(with_deadline))
    with_option = dataclasses.replace(base, activities=(
        dataclasses.replace(first, options=(Option("second crew", max(first.duration - 1, 0), 500.0),)),)
        + base.activities[1:])
    assert not focus.solvable_on_part(Network(with_option))
