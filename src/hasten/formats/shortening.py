"""Ways to shorten an activity: the crash steps table and the discrete options table.

Crash steps (``id``, ``days``, ``cost_per_day``, in order of use) give a stepped crash cost;
each step must cost at least as much per day as the one before, fit in the duration and
agree with the activity's crash columns. Options (``id``, ``option``, ``duration``,
``added_cost`` and optional ``note``, ``crash_duration``, ``cost_per_day``) are all-or-nothing
ways of doing the work; an option's name is unique within its activity and a milestone has
none.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass, replace

from hasten.formats.activities import ActivityRow
from hasten.formats.cells import CellRef, number_value, text_value, whole_value
from hasten.formats.columns import (OPTION_COLUMNS, OPTION_REQUIRED, STEP_COLUMNS, cell_ref,
                                    check_columns, known_activity, optional, place, required)
from hasten.formats.tables import Row, Table
from hasten.project import Activity, CrashStep, Option

__all__ = ["step_rows", "with_steps", "option_rows", "with_options"]


@dataclass(frozen=True)
class _OptionRow:
    """One discrete option and the row it came from."""

    id: str
    option: Option
    where: CellRef


@dataclass(frozen=True)
class _StepRow:
    """One crash step and the row it came from."""

    id: str
    step: CrashStep
    where: CellRef


def _step_days(text: str, where: CellRef) -> int:
    """The days of one crash step: a whole number, at least 1."""
    return whole_value(text, where, minimum=1)


def step_rows(table: Table | None, ids: Mapping[str, object]) -> dict[str, list[_StepRow]]:
    """Crash steps grouped by activity id (``ids``: the activities' ids in table order),
    each group in order of use."""
    if table is None or not table.rows:
        return {}
    check_columns(table, STEP_COLUMNS, STEP_COLUMNS)
    groups: dict[str, list[_StepRow]] = {}
    for row in table.rows:
        ident = known_activity(row, table, ids)
        days = required(row, table, "days", _step_days,
                        "the number of working days this step can save")
        cost = required(row, table, "cost_per_day", number_value, "the added cost per day saved")
        groups.setdefault(ident, []).append(_StepRow(ident, CrashStep(days, cost), CellRef(table.source, row.line)))
    return groups


def _check_steps(row: ActivityRow, steps: list[_StepRow]) -> None:
    """Steps must get dearer in order, fit in the duration and agree with the crash columns."""
    activity = row.activity
    for before, after in zip(steps, steps[1:]):
        if after.step.cost_per_day < before.step.cost_per_day:
            raise after.where.at("cost_per_day").error(
                f"this step of '{activity.id}' is cheaper per day than the step on row "
                f"{before.where.row}; the optimiser (a linear programme) would take the cheaper "
                "step first, so it cannot take them in this order",
                after.step.cost_per_day,
                "sort the steps by cost per day, cheapest first, or model them as discrete "
                "options (options table)")
    total = sum(s.step.days for s in steps)
    rows = ", ".join(str(s.where.row) for s in steps)
    if total > activity.duration:
        raise steps[-1].where.at("days").error(
            f"the steps of '{activity.id}' save {total} days in all but its duration is only "
            f"{activity.duration} ({place(row.where)})", steps[-1].step.days,
            f"make the step days add up to at most {activity.duration}")
    shortest = activity.duration - total
    if shortest < activity.min_duration:
        raise steps[-1].where.at("days").error(
            f"the steps of '{activity.id}' take it to {shortest} days, below its physical "
            f"minimum (min_duration {activity.min_duration} at {place(row.where)})",
            steps[-1].step.days,
            f"make the step days add up to at most {activity.duration - activity.min_duration}")
    if activity.crash_duration is not None and activity.crash_duration != shortest:
        raise row.where.at("crash_duration").error(
            f"the crash duration does not match the crash steps of '{activity.id}' "
            f"({steps[0].where.file} rows {rows}): duration {activity.duration} minus "
            f"{total} step days is {shortest}", activity.crash_duration,
            f"write {shortest}, leave crash_duration empty, or change the steps")
    stepped = activity.cost + sum(s.step.days * s.step.cost_per_day for s in steps)
    if activity.crash_cost is not None and not math.isclose(activity.crash_cost, stepped,
                                                            rel_tol=1e-9, abs_tol=1e-6):
        raise row.where.at("crash_cost").error(
            f"the crash cost does not match the crash steps of '{activity.id}' "
            f"({steps[0].where.file} rows {rows}), which give {stepped:g}", activity.crash_cost,
            f"write {stepped:g} or leave crash_cost empty")


def with_steps(row: ActivityRow, steps: list[_StepRow]) -> Activity:
    """The activity with its crash steps; its crash cost must be known if it can be shortened."""
    activity = row.activity
    if steps:
        _check_steps(row, steps)
        return replace(activity, steps=tuple(s.step for s in steps))
    if activity.crash_cost is None and activity.shortest_normal < activity.duration:
        raise row.where.at("crash_cost").error(
            f"'{activity.id}' can be shortened to {activity.shortest_normal} days but its crash cost "
            "is empty, so the cost of crashing is unknown", "",
            "write the total direct cost at crash duration, or give crash steps for it")
    return activity


def _added_cost(text: str, where: CellRef) -> float:
    """The added direct cost of an option; negative for a slower, cheaper method."""
    return number_value(text, where, minimum=None)


def _option(row: Row, table: Table) -> Option:
    """One option from its row, with the checks that need only this row."""
    name = required(row, table, "option", text_value, "a name for this way of doing the work, "
                     "e.g. 'second crew'")
    duration = required(row, table, "duration", whole_value,
                         "the option's duration in whole working days")
    added = required(row, table, "added_cost", _added_cost,
                      "the direct cost the option adds to the activity's cost (0 if none, "
                      "negative if it saves money)")
    crash = optional(row, table, "crash_duration", whole_value)
    per_day = optional(row, table, "cost_per_day", number_value)
    if crash is not None and crash > duration:
        raise cell_ref(row, table, "crash_duration").error(
            f"the crash duration is longer than the option's duration ({duration})",
            row.cells["crash_duration"],
            f"write a crash duration of {duration} or less, or leave it empty")
    if crash is not None and per_day is None:
        raise cell_ref(row, table, "cost_per_day").error(
            "the option has a crash duration but no cost per day, so the cost of shortening "
            "it is unknown", "", "write the added cost per working day saved, or leave "
            "crash_duration empty")
    if per_day is not None and crash is None:
        raise cell_ref(row, table, "crash_duration").error(
            "the option has a cost per day but no crash duration, so it is unknown how far "
            "it can be shortened", "", "write the shortest duration of the option, or leave "
            "cost_per_day empty")
    return Option(name=name, duration=duration, added_cost=added,
                  note=optional(row, table, "note", text_value, ""),
                  crash_duration=crash, cost_per_day=0.0 if per_day is None else per_day)


def option_rows(table: Table | None,
                by_id: Mapping[str, ActivityRow]) -> dict[str, list[_OptionRow]]:
    """Options grouped by activity id (``by_id``: each activity's row by id, in table order),
    each group in file order."""
    if table is None or not table.rows:
        return {}
    check_columns(table, OPTION_COLUMNS, OPTION_REQUIRED)
    groups: dict[str, list[_OptionRow]] = {}
    for row in table.rows:
        ident = known_activity(row, table, by_id)
        where = cell_ref(row, table, "id")
        owner = by_id[ident]
        if owner.activity.is_milestone:
            raise where.error(
                f"'{ident}' is a milestone (duration 0 at {place(owner.where)}), so it has no "
                "other way of being done", ident,
                "remove this option, or give the activity its normal duration")
        option = _option(row, table)
        floor = owner.activity.min_duration
        for column, days in (("duration", option.duration),
                             ("crash_duration", option.crash_duration)):
            if days is not None and days < floor:
                raise cell_ref(row, table, column).error(
                    f"the option takes '{ident}' below its physical minimum (min_duration "
                    f"{floor} at {place(owner.where)})", row.cells[column],
                    f"write {floor} or more, or lower min_duration")
        group = groups.setdefault(ident, [])
        for other in group:
            if other.option.name == option.name:
                raise cell_ref(row, table, "option").error(
                    f"the option '{option.name}' of '{ident}' is given twice: rows "
                    f"{other.where.row} and {row.line}", option.name,
                    "give each option of an activity its own name")
        group.append(_OptionRow(ident, option, CellRef(table.source, row.line)))
    return groups


def with_options(activity: Activity, options: list[_OptionRow] | None) -> Activity:
    """The activity with its discrete options (unchanged when it has none)."""
    if not options:
        return activity
    return replace(activity, options=tuple(o.option for o in options))

