"""Safety and contract cautions that go with an acceleration plan.

Acceleration is bought with longer hours, more shifts, more crews in the same space and
faster cycles, and each can hurt someone. The wording defers to local codes, labour law
and licensed professionals; sources are cited in the README (section "Cautions").
"""

from __future__ import annotations

import re
from typing import Iterable

__all__ = ["plan_cautions", "cautions_for_rows", "GENERAL", "CURING", "HEAVY", "STACKING", "NO_REST_DAY"]

GENERAL = (
    "Acceleration usually means overtime, extra shifts or extra crews. Long hours raise "
    "injury risk (Dembe et al. 2005: overtime schedules +61%, 12-hour days +37%, 60-hour "
    "weeks +23% hazard) and lower productivity on every hour worked; night work adds its own "
    "risks. Check each measure against local codes, labour law and collective agreements, and "
    "have the site's safety professionals approve it before work starts. Give the notices the "
    "contract requires before claiming acceleration costs.")
CURING = (
    "Concrete work is shortened in this plan. Curing, form stripping and loading times are "
    "physical limits (e.g. ACI 347 minimum stripping times, 7-14 day curing in common "
    "specifications) that extra crews cannot shorten; only the structural engineer of record "
    "may approve earlier stripping or loading.")
HEAVY = (
    "Some activities are shortened by more than a quarter of their duration. That usually "
    "takes sustained overtime or shift work; productivity losses grow week by week, and long "
    "overtime can end up finishing later than normal hours.")
STACKING = (
    "Several trades are accelerated at once. Crowding crews into the same area (trade "
    "stacking) lowers productivity and raises accident risk; plan the work areas and "
    "supervision with the site safety lead.")

NO_REST_DAY = (
    "Some shortened work runs on a calendar with no weekly rest day. With overtime on top, "
    "fatigue builds from week to week; the Business Roundtable's study of scheduled overtime "
    "(1980) advises a periodic shutdown for a Sunday or weekend, and many labour laws require "
    "a weekly rest period. Check the crew rota against local labour law and collective "
    "agreements.")

_CONCRETE = re.compile(r"concrete|pour|slab|formwork|form work|curing|cure|footing|deck|shotcrete",
                       re.IGNORECASE)


def plan_cautions(project, timeline, changes) -> list[str]:
    """Cautions for a plan of ``project`` (its :class:`~hasten.calendar.Timeline` gives each
    activity's calendar) from its :class:`~hasten.results.ActivityChange` rows."""
    changed = [a for a in changes if a.shortened_by or a.option]
    pos = {a.id: k for k, a in enumerate(project.activities)}
    seven = [a.name or a.id for a in changed if a.duration < a.normal
             and len(timeline.clock_of(pos[a.id]).calendar.workdays) == 7]
    return cautions_for_rows(((a.name, a.trade, a.normal, a.duration) for a in changed), seven_day=seven)


def cautions_for_rows(shortened: Iterable[tuple[str, str, int, int]], *,
                      seven_day: Iterable[str] = ()) -> list[str]:
    """Cautions for a plan, from ``(name, trade, normal, new duration)`` of each
    shortened activity; ``seven_day``: names of shortened activities whose calendar
    works every day of the week. Empty when nothing is shortened."""
    rows = [r for r in shortened if r[3] < r[2]]
    if not rows:
        return []
    out = [GENERAL]
    if any(_CONCRETE.search(f"{name} {trade}") for name, trade, _, _ in rows):
        out.append(CURING)
    if any(normal - new > normal / 4 for _, _, normal, new in rows):
        out.append(HEAVY)
    if len({trade for _, trade, _, _ in rows if trade}) >= 3:
        out.append(STACKING)
    if any(True for _ in seven_day):
        out.append(NO_REST_DAY)
    return out
