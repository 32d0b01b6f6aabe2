"""How sure is the finish? The simulation of the normal schedule, of a plan, or of the
least-cost plan for a target, with what it costs on average.

The ranges of durations come from the project itself (:func:`hasten.uncertainty.project_ranges`:
the ``optimistic`` / ``pessimistic`` columns and the ``[risk]`` section); the simulation is
:func:`hasten.simulation.simulate`, a plan's days taken off each run's drawn durations.
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import date

from .network import Network
from .plan_days import PlanDays, added_cost, plan_cautions_of, plan_days
from .project import Project
from .simulation import RiskResult, simulate
from .time_costs import time_costs
from .uncertainty import project_ranges

__all__ = ["RiskReport", "schedule_risk", "SIMULATED"]

#: What was simulated.
SIMULATED = ("the normal schedule", "the plan given", "the least-cost plan for the target")


@dataclass(frozen=True)
class RiskReport:
    """The runs of one schedule, with what was simulated and its average costs."""

    project: Project
    result: RiskResult
    what: str  # one of SIMULATED
    uncertain: int  # activities with a range
    distribution: str
    added_cost: float  # of the plan simulated (0 for the normal schedule)
    changed: int  # activities the plan changes
    expected_time_costs: float  # indirect + contract damages - bonus, averaged over the runs
    expected_milestone_damages: float
    target_date: date | None
    planned_date: date  # of the planned finish (the most likely durations, the plan's days taken off)
    cautions: tuple[str, ...] = ()  # of the plan simulated
    notes: tuple[str, ...] = ()

    @property
    def expected_total_cost(self) -> float:
        """Added direct cost + expected indirect cost, damages (contract and milestones) - bonus."""
        return self.added_cost + self.expected_time_costs + self.expected_milestone_damages


def schedule_risk(project: Project, *, runs: int = 5000, seed: int | None = None, target: int | date | None = None,
                  plan: PlanDays | None = None, plan_target: bool = False, time_limit: float | None = None,
                  runner=None, progress=None, network: Network | None = None) -> RiskReport:
    """Simulate ``project``'s schedule ``runs`` times.

    Parameters
    ----------
    target : a finish to test (working days or the last day worked). With ``plan_target``
        the least-cost plan for it is made first (:meth:`hasten.planner.Planner.plan`) and
        simulated.
    plan : a plan to simulate (:mod:`hasten.plan_days`, on ``network``); its own target is
        tested when no ``target`` is given.
    runner, progress : as :func:`hasten.simulation.simulate`.
    """
    net = network if network is not None else Network(project)
    ranges = project_ranges(project)
    what = SIMULATED[0]
    notes: tuple[str, ...] = ()
    if plan is None and plan_target and target is not None:
        from .planner import Planner  # the optimiser only when a plan is asked for
        from .questions import target_offset

        planner = Planner(project, time_limit=time_limit)
        made = planner.plan(target_offset(planner, target))
        plan = plan_days(net, {a.id: a.duration for a in made.activities},
                         {a.id: a.option for a in made.activities if a.option})
        target = made.target
        what, notes = SIMULATED[2], made.notes
    elif plan is not None:
        what = SIMULATED[1]
        notes = (plan.note,) if plan.note else ()
        if target is None:
            target = plan.target
    if isinstance(target, date):
        target = net.clock.offset_of(target, finish=True)
    result = simulate(net, ranges, runs, seed, target=target, runner=runner, progress=progress,
                      shortening=None if plan is None else plan.shortening)
    added = 0.0 if plan is None else added_cost(net, [d - c for d, c in zip(net.durations, plan.shortening)],
                                                 plan.choices)
    times = sum(n * time_costs(project, net.clock, f, floor=net.finish_floor).net
                for f, n in result.finish_counts) / result.runs
    uncertain = sum(1 for lo, hi in zip(ranges.optimistic, ranges.pessimistic) if hi > lo)
    cautions = () if plan is None else plan_cautions_of(
        net, [d - c for d, c in zip(net.durations, plan.shortening)], plan.choices)
    return RiskReport(project, result, what, uncertain, ranges.distribution, added,
                      0 if plan is None else plan.changed, times,
                      sum(m.expected_damages for m in result.milestones),
                      None if target is None else net.finish_date(target),
                      net.finish_date(result.planned_finish), cautions, notes)
