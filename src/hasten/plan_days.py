"""A plan as the working days it takes off each activity, to simulate or compare it.

A plan comes from :class:`~hasten.results.Plan` (the library) or from the JSON that ``hasten
plan``, ``best``, ``budget`` and ``recover`` print with ``--json`` (read by the CLI and
passed here as a dict). Each activity's ``normal`` days (what was left to do when the plan
was made) must still be the project's, and its ``duration`` one the activity can take: the
plan was made for this project as it stands. An option's change of duration counts as
shortening like crash days; a slower option is a negative shortening.

From ``recover`` output the course with the least total cost is taken (the last course
that has a plan), and a note says so.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Mapping, Sequence

from .errors import InputError
from .network import Network
from .results import ActivityChange

__all__ = ["PlanDays", "plan_days", "plan_days_from_json", "added_cost", "activity_added_cost", "plan_changes",
           "plan_cautions_of"]

_REMAKE = "make the plan again for the project as it stands now (hasten plan ... --json > plan.json)"


@dataclass(frozen=True)
class PlanDays:
    """Working days taken off each activity of a network (in its order), the option used
    (-1: the normal way), and what the plan said of itself."""

    shortening: tuple[int, ...]
    choices: tuple[int, ...]
    target: int | None = None
    finish: int | None = None
    note: str = ""

    @property
    def changed(self) -> int:
        return sum(1 for d, c in zip(self.shortening, self.choices) if d or c >= 0)


def activity_added_cost(normal: int, duration: int, choice: int, steps, options) -> float:
    """The direct cost one activity adds at ``duration`` days: its crash steps taken in
    order of use (cheapest first), or option ``choice``'s added cost and its own days at
    its cost per day."""
    if choice >= 0:
        option = options[choice]
        return option.added_cost + option.cost_per_day * (option.duration - duration)
    total, left = 0.0, normal - duration
    for step in steps:
        take = min(left, step.days)
        total += take * step.cost_per_day
        left -= take
    return total


def added_cost(network: Network, durations: Sequence[int], choices: Sequence[int]) -> float:
    """The direct cost a plan adds, from the activity data (:func:`activity_added_cost`)."""
    return sum(activity_added_cost(*row) for row in zip(network.durations, durations, choices, network.steps,
                                                         network.options))


def plan_changes(network: Network, durations: Sequence[int], choices: Sequence[int]) -> list[ActivityChange]:
    """One row per activity (network order) of the plan ``durations`` / ``choices``."""
    project = network.project
    names = {c.name for c in project.calendars}
    rows = []
    for act, normal, d, c, steps, options in zip(project.activities, network.durations, durations, choices,
                                                 network.steps, network.options):
        way = options[c] if c >= 0 else None
        rows.append(ActivityChange(act.id, act.name, act.trade,
                                   act.calendar if act.calendar in names else project.calendar.name,
                                   normal, d, normal - d, activity_added_cost(normal, d, c, steps, options),
                                   way.name if way else "", way.note if way else ""))
    return rows


def plan_cautions_of(network: Network, durations: Sequence[int], choices: Sequence[int]) -> tuple[str, ...]:
    """The cautions of a plan (:func:`hasten.cautions.plan_cautions`, on its own schedule)."""
    from .cautions import plan_cautions
    from .cpm import schedule

    changes = plan_changes(network, durations, choices)
    return tuple(plan_cautions(network.project, network.timeline, changes, schedule(network, list(durations))))


def plan_days(network: Network, durations: Mapping[str, int], options: Mapping[str, str] | None = None, *,
              source: str | None = None, rows: Mapping[str, int] | None = None,
              normals: Mapping[str, int] | None = None) -> PlanDays:
    """A plan given as ``{activity id: duration}`` (and ``{id: option name}``), checked
    against ``network``; activities not named keep their duration. ``source``, ``rows`` and
    ``normals`` (the normal days the plan itself states) locate and check a plan read from
    a file."""
    options = options or {}
    rows = rows or {}
    cut = [0] * len(network.ids)
    choice = [-1] * len(network.ids)
    for ident, d in durations.items():
        row = rows.get(ident)
        i = network.index.get(ident)
        if i is None:
            raise InputError(f"the plan names activity {ident!r}, which the project does not have", file=source,
                             row=row, column="id", value=ident, fix=_REMAKE)
        normal = network.durations[i]
        if normals is not None and ident in normals and normals[ident] != normal:
            raise InputError(f"the plan was made when activity {ident} had {normals[ident]} working days to "
                             f"do; the project now gives {normal}", file=source, row=row, column="normal",
                             value=normals[ident], fix=_REMAKE)
        if isinstance(d, bool) or not isinstance(d, int) or d < 0:
            raise InputError(f"activity {ident}: the duration is not a whole number of working days",
                             file=source, row=row, column="duration", value=d, fix=_REMAKE)
        way = options.get(ident)
        ways = [o.name for o in network.options[i]]
        if way:
            if way not in ways:
                raise InputError(f"activity {ident} has no option {way!r} the plan could use", file=source,
                                 row=row, column="option", value=way,
                                 fix=f"use one of: {', '.join(ways) or 'none (the normal way)'}; or {_REMAKE}")
            choice[i] = ways.index(way)
            option = network.options[i][choice[i]]
            low, high = option.shortest, option.duration
        else:
            low, high = normal - sum(s.days for s in network.steps[i]), normal
        if not low <= d <= high:
            raise InputError(f"activity {ident} cannot take {d} working days"
                             + (f" by option {way!r}" if way else "") + f" (from {low} to {high})",
                             file=source, row=row, column="duration", value=d, fix=_REMAKE)
        if network.fixed[i] and d != normal:
            raise InputError(f"activity {ident} is finished; the plan cannot change it", file=source, row=row,
                             column="duration", value=d, fix=_REMAKE)
        cut[i] = normal - d
    return PlanDays(tuple(cut), tuple(choice))


def _int_or_none(value) -> int | None:
    return value if isinstance(value, int) and not isinstance(value, bool) else None


def plan_days_from_json(network: Network, data: object, source: str) -> PlanDays:
    """The plan in the JSON output of ``plan``, ``budget``, ``best`` or ``recover``."""
    note = ""
    plan = data
    if isinstance(data, dict) and isinstance(data.get("courses"), list):
        courses = [c for c in data["courses"] if isinstance(c, dict) and isinstance(c.get("plan"), dict)]
        if not courses:
            raise InputError("the recovery has no course with a plan", file=source, column="courses",
                             fix="give the --json output of hasten plan, best, budget or recover")
        plan = courses[-1]["plan"]
        note = f"the course '{courses[-1].get('course', 'least total cost')}' of the recovery in {source}"
    elif isinstance(data, dict) and isinstance(data.get("plan"), dict):
        plan = data["plan"]  # best
    elif isinstance(data, dict) and isinstance(data.get("chosen"), dict):
        plan = dict(data["chosen"], target=data.get("target"))  # plan --confidence, best --expected
        note = f"the plan {data['chosen'].get('label', 'chosen for risk')} in {source}"
    if not isinstance(plan, dict) or not isinstance(plan.get("activities"), list):
        raise InputError("this is not a plan: no list of activities", file=source, column="activities",
                         fix="give the --json output of hasten plan, best, budget or recover")
    durations, options, rows, normals = {}, {}, {}, {}
    for k, item in enumerate(plan["activities"], start=1):
        if not isinstance(item, dict) or not isinstance(item.get("id"), str) or "duration" not in item:
            raise InputError("an activity of the plan has no id or duration", file=source, row=k,
                             column="activities", value=item if not isinstance(item, dict) else None,
                             fix="give the --json output of hasten plan, best, budget or recover unchanged")
        ident = item["id"]
        if ident in durations:
            raise InputError(f"the plan lists activity {ident} twice", file=source, row=k, column="id",
                             value=ident, fix=_REMAKE)
        durations[ident] = item["duration"]
        rows[ident] = k
        if item.get("option"):
            options[ident] = item["option"]
        if _int_or_none(item.get("normal")) is not None:
            normals[ident] = item["normal"]
    days = plan_days(network, durations, options, source=source, rows=rows, normals=normals)
    return PlanDays(days.shortening, days.choices, _int_or_none(plan.get("target")),
                    _int_or_none(plan.get("finish")), note)
