"""The two ways the CPM passes run give the same dates.

Wide networks (many activities per level) are passed level by level with numpy; long
chains with plain loops. Both are checked here against networkx longest paths (the
independent reference of tests/conftest.py, ``nx_cpm``) on random wide networks with all
four link types and lags, and against each other.
"""

from __future__ import annotations

import random

import pytest

from conftest import make_project, nx_cpm
from hasten.project import Activity, Link, LinkType
from hasten.cpm import schedule
from hasten.network import Network


def _wide(seed: int, n: int = 300, layers: int = 6):
    """Invented random layered network: ``layers`` levels of n/layers activities."""
    rng = random.Random(seed)
    per = n // layers
    acts = [Activity(f"A{k}", rng.randint(0, 9)) for k in range(per * layers)]
    links = []
    for k in range(per, per * layers):
        layer = k // per
        for p in rng.sample(range((layer - 1) * per, layer * per), rng.randint(1, 3)):
            kind = rng.choice(list(LinkType))
            links.append(Link(f"A{p}", f"A{k}", kind, rng.randint(-2, 4)))
    return make_project(acts, links)


@pytest.mark.parametrize("seed", range(6))
def test_level_passes_match_networkx_and_the_loops(seed: int):
    project = _wide(seed)
    net = Network(project)
    assert net._vector, "a wide network must take the level-by-level path"
    finish, es_ref, ls_ref = nx_cpm(project)
    sched = schedule(net)
    assert sched.finish == finish
    for row in sched.activities:
        assert row.es == es_ref[row.id] and row.ls == ls_ref[row.id]
    d = net.durations
    assert net.forward(d) == net._forward_loop(d)
    # the loop version of the backward pass, forced
    net._vector = False
    assert schedule(net) == sched
