"""Gaps a mutation run found in plans, costs and recovery (tools/mutation.py; DEVELOPERS.md,
"Mutation score"). Each test names the mutant it catches; every expected value is
hand-worked here (arithmetic in the comments) from the rules in README ("Method",
"Recovery") and the module notes they cite.

Calendar mon-fri, no holidays, start Mon 2024-01-01 = day 0 (conftest.START): Thu 01-04 =
3, Fri 01-05 = 4, Mon 01-08 = 5, Fri 01-12 = 9, Mon 01-15 = 10, Mon 01-22 = 15, Fri 01-26 = 19.
"""

from __future__ import annotations

from datetime import date

from conftest import make_project
from hasten.planner import Planner
from hasten.project import Activity, Contract, Link, Option
from hasten.recovery import recovery


def test_why_recovery_fails_counts_an_options_own_shortening():
    # mutant network-shortest-options. A (10 days) can be done by "two crews" in 6 days and
    # that option shortened further to 4 days (Option.shortest). M (after A, deadline Thu
    # 01-04, 100 a day) is met at the shortest: A = 4 puts M at the end of day 3 = Thu
    # 01-04. B (20 days, parallel) makes the contract finish Fri 01-12 (day 9, a finish of
    # 10) impossible: the shortest finish is 20, last day 19 = Fri 01-26, 14 calendar days
    # later. So only the contract finish is named, not M.
    acts = [Activity("A", 10, options=(Option("two crews", 6, 600.0, crash_duration=4, cost_per_day=100.0),)),
            Activity("M", 0, deadline=date(2024, 1, 4), damages_per_day=100.0),
            Activity("B", 20)]
    p = make_project(acts, [Link("A", "M")], contract=Contract(finish=date(2024, 1, 12)))
    rec = recovery(Planner(p))
    full = next(c for c in rec.courses if c.label == "recover fully")
    assert not full.possible
    assert full.note == ("not possible: the contract finish 2024-01-12 cannot be met: the shortest "
                         "possible finish is 20 working days (2024-01-26, 14 calendar days later)")
