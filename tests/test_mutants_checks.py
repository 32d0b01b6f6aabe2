"""Gaps a mutation run found in the independent plan check (tools/mutation.py; DEVELOPERS.md,
"Mutation score"). The check only ever refuses plans when something else is wrong, so these
tests hand it broken plans directly. Each names the mutant it catches; the expected verdicts
are hand-worked from the link definitions of README, Method ("CPM with precedence links":
SS ``S_j >= S_i + l``) and the rule "the finish on or before the target".

(checks.py is being replaced by plan_check.py on another branch: move these tests to the
new module's API after the merge.)
"""

from __future__ import annotations

import pytest

from conftest import make_project
from hasten.checks import check_plan
from hasten.errors import PlanCheckError
from hasten.project import Activity, Link, LinkType


def test_a_broken_ss_link_is_refused():
    # mutant checks-later-kind. A (5 days) -SS+3-> B (4 days): B may start at 0 + 3 = 3 at
    # the earliest. Starts A = 0, B = 1 break it (1 < 3), although B's finish 5 is after 3.
    p = make_project([Activity("A", 5), Activity("B", 4)], [Link("A", "B", LinkType.SS, 3)])
    assert check_plan(p, [5, 4], [0, 3])[0] == 7  # held: finish max(5, 3 + 4) = 7
    with pytest.raises(PlanCheckError, match=r"link A -> B \(A:SS\+3\) is broken"):
        check_plan(p, [5, 4], [0, 1])


def test_a_plan_one_day_past_its_target_is_refused():
    # mutant checks-target-off-by-one. A (5) -> B (3): finish 8; a target of 8 holds, 7 not.
    p = make_project([Activity("A", 5), Activity("B", 3)], [Link("A", "B")])
    assert check_plan(p, [5, 3], [0, 5], target=8)[0] == 8
    with pytest.raises(PlanCheckError, match="finish 8 is after the target 7"):
        check_plan(p, [5, 3], [0, 5], target=7)
