"""The recovery question: the job is late at its data date; what is it worth to recover?

Three courses side by side (four when full recovery is impossible), each priced against
doing nothing:

- do nothing: the forecast with progress applied; pay the damages;
- recover fully: the least-cost plan that meets the contract finish and every interim
  milestone deadline (if any plan can; if not, which date cannot be met, and a fourth
  course: recover as much as possible, the least-cost plan at the shortest possible finish);
- least total cost: the finish and plan with the least direct + indirect + damages - bonus,
  which may recover only part of the delay.
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import date

from .planner import Planner
from .results import Plan, TotalCostPoint
from .errors import HastenError
from .progress import end_day
from .project import Project

__all__ = ["MilestoneForecast", "Course", "Recovery", "recovery"]


@dataclass(frozen=True)
class MilestoneForecast:
    id: str
    name: str
    deadline: date
    forecast: date
    days_late: int  # calendar days; 0 when on time
    damages: float


@dataclass(frozen=True)
class Course:
    """One course of action, priced against doing nothing."""

    label: str
    possible: bool
    finish: int | None
    finish_date: date | None
    added_cost: float
    contract_damages: float
    milestone_damages: float
    indirect: float
    bonus: float
    damages_avoided: float
    indirect_saved: float
    bonus_gained: float
    plan: Plan | None
    note: str = ""

    @property
    def net_effect(self) -> float:
        """Money saved (positive) or lost against doing nothing."""
        return self.damages_avoided + self.indirect_saved + self.bonus_gained - self.added_cost

    @property
    def total_cost(self) -> float:
        return self.added_cost + self.contract_damages + self.milestone_damages + self.indirect - self.bonus


@dataclass(frozen=True)
class Recovery:
    project: Project
    data_date: date | None
    forecast_finish: int
    forecast_date: date
    contract_finish: date | None
    days_late: int  # calendar days past the contract finish (0 when on time)
    milestones: tuple[MilestoneForecast, ...]
    courses: tuple[Course, ...]
    warnings: tuple[str, ...]
    notes: tuple[str, ...] = ()


def _course(planner: Planner, label: str, point: TotalCostPoint, plan: Plan | None, base: TotalCostPoint,
            note: str = "") -> Course:
    t = point.time
    damages = t.damages + point.milestone_damages
    base_damages = base.time.damages + base.milestone_damages
    return Course(label, True, point.finish, point.finish_date, point.added_cost, t.damages,
                  point.milestone_damages, t.indirect, t.bonus, base_damages - damages,
                  base.time.indirect - t.indirect, t.bonus - base.time.bonus, plan, note)


def _why_not(planner: Planner) -> str:
    """Which date cannot be met: the contract finish (the shortest possible finish is
    after it) and/or the milestone deadlines that even every activity at its shortest
    misses (a forward pass at the shortest durations)."""
    project, net = planner.project, planner.network
    reasons = []
    contract = project.contract.finish
    shortest = planner.shortest_finish
    if contract is not None and shortest > planner.target_by_date(contract):
        day = net.finish_date(shortest)
        reasons.append(f"the contract finish {contract.isoformat()} cannot be met: the shortest possible finish "
                       f"is {shortest} working days ({day.isoformat()}, {(day - contract).days} calendar days later)")
    d = net.shortest
    es = net.forward(d)
    missed = []
    for k, a in enumerate(project.activities):
        if a.deadline is None or net.fixed[k]:  # (work done is history)
            continue
        day = net.timeline.clock_of(k).date_of(end_day(net.progress.activities[k], es[k] + d[k]))
        if day > a.deadline:
            missed.append(f"{a.id} {a.name or ''}".rstrip() + f" (deadline {a.deadline.isoformat()}, "
                          f"{day.isoformat()} at the earliest)")
    if missed:
        reasons.append("the milestone deadline" + ("s " if len(missed) > 1 else " ") + "; ".join(missed)
                       + (" cannot be met" if len(missed) > 1 else " cannot be met"))
    if not reasons:  # each date can be met alone, but not all of them together
        reasons.append("the contract finish and the milestone deadlines cannot all be met together")
    return "; and ".join(reasons)


def recovery(planner: Planner, progress=None) -> Recovery:
    """Price the courses for a project with its progress applied."""
    project, net = planner.project, planner.network
    normal = planner.normal
    finishes = [a.ef for a in normal.activities]
    milestones = []
    for k, (a, f) in enumerate(zip(project.activities, finishes)):
        if a.deadline is None:
            continue
        forecast = net.timeline.clock_of(k).date_of(end_day(net.progress.activities[k], f))  # own calendar
        late = max(0, (forecast - a.deadline).days)
        milestones.append(MilestoneForecast(a.id, a.name, a.deadline, forecast, late, late * a.damages_per_day))
    base = planner.total_cost_point(planner.normal_finish, 0.0, planner.normal_damages)
    courses = [Course("do nothing", True, base.finish, base.finish_date, 0.0, base.time.damages,
                      base.milestone_damages, base.time.indirect, base.time.bonus, 0.0, 0.0, 0.0, None,
                      "pay the damages")]
    # recover fully: meet the contract finish and every milestone deadline
    contract = project.contract.finish
    target = planner.normal_finish if contract is None else min(planner.target_by_date(contract),
                                                              planner.normal_finish)
    try:
        full = planner.plan(target, strict=True)
    except HastenError:
        courses.append(Course("recover fully", False, None, None, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0,
                              None, "not possible: " + _why_not(planner)))
        shortest = planner.plan(planner.shortest_finish)
        point = planner.total_cost_point(shortest.finish, shortest.added_cost, shortest.milestone_damages)
        courses.append(_course(planner, "recover as much as possible", point, shortest, base,
                               "the shortest possible finish"))
    else:
        point = planner.total_cost_point(full.finish, full.added_cost, full.milestone_damages)
        courses.append(_course(planner, "recover fully", point, full, base, "meets every date"))
    best = planner.best_finish(progress=progress)
    courses.append(_course(planner, "least total cost", best.point, best.plan, base,
                           "may recover only part of the delay"))
    days_late = 0 if contract is None else max(0, (base.finish_date - contract).days)
    return Recovery(planner.given, project.data_date, planner.normal_finish, base.finish_date, contract, days_late,
                    tuple(milestones), tuple(courses), net.progress.warnings, planner.notes)
