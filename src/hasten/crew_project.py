"""Options from crews for a whole project: every activity with crew data, one call.

:func:`crew_options` prices the measures (``"5x10,6x10,2-shifts,+1-crew"``) for each
activity that has crew data (:attr:`~hasten.project.Activity.crew`) and has not started,
under the project's labour rules (``[labour]``, or the defaults of
:class:`~hasten.labour.LabourRules`) and the productivity table they name (or one given in
its place); :func:`with_crew_options` adds the options to the project (after the options it
already has; a name used twice for one activity is refused); :func:`crew_notes` gives the
lines every result built on them carries: what was built, the sources the options rest on
and the cautions.

A 6- or 7-day schedule is counted in the activity calendar's working days
(:func:`hasten.crew_options.project_days`): days worked beyond the calendar's week add no
working day, so the option's duration never promises more than the calendar can keep, and
the optimiser and the plan check see ordinary options.

Examples
--------
>>> from datetime import date
>>> from hasten.labour import CrewData
>>> from hasten.project import Activity, Project
>>> crew = CrewData(labour_hours=320, crew_size=2, wage=40)
>>> p = Project("walls", date(2027, 3, 1), (Activity("W1", 20, trade="masonry", crew=crew),))
>>> built = crew_options(p, "6x10,+1-crew")
>>> [(o.name, o.duration) for o in built.results[0].options]
[('6x10', 17)]
>>> built.results[0].skipped[0].reason
'needs 2 crews at once; the area takes 1 (max_crews)'
"""

from __future__ import annotations

from dataclasses import dataclass, replace

from hasten.crew_options import (CrewOptions, build_options, labour_cautions, option_sources,
                                 with_options)
from hasten.errors import InputError
from hasten.labour import LabourRules, parse_measures
from hasten.productivity import ProductivityTable, table_named
from hasten.project import Activity, Project

__all__ = ["DEFAULT_SCHEDULES", "CrewBuild", "crew_options", "with_crew_options", "crew_notes",
           "calendar_days"]

#: The measures priced when none are named: ten-hour days on five and on six days, a second
#: shift and one extra crew (each schedule is in both built-in productivity tables).
DEFAULT_SCHEDULES = "5x10,6x10,2-shifts,+1-crew"


@dataclass(frozen=True)
class CrewBuild:
    """Options built for a project: one :class:`~hasten.crew_options.CrewOptions` per
    activity priced; ``passed``: (activity id, why it was not priced); ``notes``: remarks
    on the input (an activity whose duration differs from its normal working)."""

    schedules: str
    table: ProductivityTable
    results: tuple[CrewOptions, ...]
    passed: tuple[tuple[str, str], ...] = ()
    notes: tuple[str, ...] = ()

    @property
    def options(self) -> int:
        """How many options were built in all."""
        return sum(len(r.options) for r in self.results)


def calendar_days(project: Project, activity: Activity) -> int:
    """Working days a week of the calendar ``activity`` works to."""
    calendar = next((c for c in project.calendars if c.name == activity.calendar),
                    project.calendar) if activity.calendar else project.calendar
    return len(calendar.workdays)


def crew_options(project: Project, schedules: str = DEFAULT_SCHEDULES,
                 table: ProductivityTable | None = None, *, column: str = "--crews") -> CrewBuild:
    """Price ``schedules`` for every activity of ``project`` with crew data.

    Parameters
    ----------
    project : Project
    schedules : str
        Measures separated by commas (see :func:`hasten.labour.parse_measures`).
    table : ProductivityTable, optional
        The overtime losses; default the table the labour rules name.
    column : str
        Where ``schedules`` was written, for error messages (the command's option).

    Raises
    ------
    InputError
        No activity has crew data; a measure is malformed or not in the table; a crew has
        no wage (naming the file and row of its activity).
    """
    crews = [a for a in project.activities if a.crew is not None]
    if not crews:
        raise InputError("no activity has labour data, so no options can be built from crews",
                         column=column, value=schedules,
                         fix="give activities labour_hours and crew_size (and a wage, or a trade "
                             "rate under [labour.wages]), or leave out the option")
    rules = project.labour or LabourRules()
    table = table_named(rules.table) if table is None else table
    measures = parse_measures(schedules, column=column)
    results, passed, notes = [], [], []
    for activity in crews:
        if activity.actual_start is not None:
            passed.append((activity.id, "work has started: options apply only to work not "
                                        "yet started"))
            continue
        crew = activity.crew if activity.crew.trade == activity.trade else \
            replace(activity.crew, trade=activity.trade)
        built = build_options(activity.id, crew, rules, measures, table,
                              calendar_days(project, activity),
                              min_duration=activity.min_duration, column=column)
        results.append(built)
        if built.normal.duration != activity.duration:
            notes.append(f"{activity.id}: its duration ({activity.duration} working days) is not "
                         f"what its labour data gives at normal working ({built.normal.duration}); "
                         "the options are priced against normal working")
    return CrewBuild(schedules=",".join(m.text for m in measures), table=table,
                     results=tuple(results), passed=tuple(passed), notes=tuple(notes))


def with_crew_options(project: Project, build: CrewBuild) -> Project:
    """``project`` with the options of ``build`` added after each activity's own; a name
    an activity already uses is refused."""
    by_id = {r.activity_id: r for r in build.results if r.options}
    if not by_id:
        return project
    return replace(project, activities=tuple(
        with_options(a, by_id[a.id]) if a.id in by_id else a for a in project.activities))


def crew_notes(build: CrewBuild) -> list[str]:
    """What was built, the sources the options rest on and the cautions, one text each."""
    built = [r.activity_id for r in build.results if r.options]
    head = (f"Options from crews ({build.schedules}): {build.options} built for "
            f"{len(built)} of {len(build.results) + len(build.passed)} activities with labour "
            "data" + (f" ({', '.join(built)})" if built else ""))
    return ([head] + option_sources(build.results) + list(build.notes)
            + [f"{ident}: not priced, {why}" for ident, why in build.passed]
            + (labour_cautions(build.results) if built else []))
