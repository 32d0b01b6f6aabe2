"""Dropping dominated discrete options before optimising.

An activity's discrete options (:class:`~hasten.project.Option`) are alternatives to its
normal way of being done, which takes ``activity.duration`` days at added cost 0. A plain
option ``o`` (one that cannot be shortened further, ``crash_duration`` None) is *dominated*
by another plain way ``p`` of the same activity — another option or the normal way — when

    p.duration <= o.duration  and  p.added_cost < o.added_cost.

A way that is faster at the same cost does not drop a slower one: among plans of equal
cost hasten takes the fewest working days off (README, "Ties"), and the slower way is
then the one to choose wherever its days are not needed.

Options that allow further shortening are never dropped and never drop another; the normal
way takes part only when the activity itself cannot be shortened (no crash duration below
its duration, no crash steps).

One safeguard: in a precedence network with finish-to-finish or start-to-finish links, a
*shorter* duration can delay the project. An activity X with an incoming FF or SF link
(``S_X + d_X >= ...``) must start later the shorter it is, which can push back its
successors (a "reverse critical" activity, common practice). For such an activity a faster
way does not beat a slower one, so only equal durations are compared there (same duration,
lower cost). Elsewhere a shorter duration never delays anything, so dropping a dominated
option never changes the least cost of any finish date.

The readers keep every option (round trips are lossless); callers drop dominated options
with :func:`drop_dominated` before optimising and show its notes.
"""

from __future__ import annotations

from dataclasses import replace
from operator import attrgetter

from .project import Activity, LinkType, Option, Project

__all__ = ["drop_dominated", "dominated_options"]

def _money(value: float) -> str:
    """9000.0 -> '9,000'; 1234.5 -> '1,234.50'."""
    if float(value).is_integer():
        return f"{int(value):,}"
    return f"{value:,.2f}"


def _days(n: int) -> str:
    return f"{n} day" if n == 1 else f"{n} days"


def _plain_normal(activity: Activity) -> bool:
    """True when the normal way cannot be shortened (no crashing, no crash steps)."""
    return activity.shortest_normal == activity.duration


def _beats(p_duration: int, p_cost: float, o: Option, equal_duration_only: bool) -> bool:
    """Whether the way (p_duration, p_cost) dominates the plain option ``o``."""
    if equal_duration_only and p_duration != o.duration:
        return False
    return p_duration <= o.duration and p_cost < o.added_cost


def _why(p_duration: int, p_cost: float, o: Option) -> str:
    return "faster and cheaper" if p_duration < o.duration else "as fast and cheaper"


def dominated_options(activity: Activity, *, equal_duration_only: bool = False
                      ) -> list[tuple[int, int]]:
    """(index of the option, index of a kept way that dominates it) for each dominated
    option, in option order; the way's index is -1 for the normal way.

    The way named is the normal way when it dominates, otherwise the first option in order
    that dominates and is not dominated itself (one always exists: dominance is a strict
    partial order, so a chain of dominating ways ends at an undominated one).
    ``equal_duration_only`` compares ways of the same duration only (see the module text).
    """
    ways: list[tuple[int, float, bool]] = [(activity.duration, 0.0, _plain_normal(activity))]
    ways += [(o.duration, o.added_cost, o.crash_duration is None) for o in activity.options]

    def dominators(k: int) -> list[int]:
        o = activity.options[k - 1]
        if o.crash_duration is not None:
            return []
        return [j for j, (d, c, plain) in enumerate(ways)
                if j != k and plain and _beats(d, c, o, equal_duration_only)]

    beaten = {k: dominators(k) for k in range(1, len(ways))}
    out = []
    for k in range(1, len(ways)):
        if beaten[k]:
            kept = [j for j in beaten[k] if j == 0 or not beaten[j]]
            out.append((k - 1, kept[0] - 1))
    return out


def drop_dominated(project: Project) -> tuple[Project, list[str]]:
    """The project without dominated plain options, and one note per option dropped.

    Pure: ``project`` is not changed; activities, links and everything else stay as they
    are. Notes read like
    ``A120: option 'night shift' (12 days, 9,000) dropped: 'second crew' is as fast and cheaper``.
    """
    if not any(map(attrgetter("options"), project.activities)):
        return project, []  # no option to drop (the same project: it is frozen)
    reverse_risk = {k.succ for k in project.links if k.type in (LinkType.FF, LinkType.SF)}
    notes: list[str] = []
    activities = []
    for activity in project.activities:
        dropped = dominated_options(activity, equal_duration_only=activity.id in reverse_risk)
        if not dropped:
            activities.append(activity)
            continue
        for k, j in dropped:
            o = activity.options[k]
            if j < 0:
                p_duration, p_cost, who = activity.duration, 0.0, "the normal way"
            else:
                p = activity.options[j]
                p_duration, p_cost, who = p.duration, p.added_cost, f"'{p.name}'"
            notes.append(f"{activity.id}: option '{o.name}' ({_days(o.duration)}, "
                         f"{_money(o.added_cost)}) dropped: {who} is {_why(p_duration, p_cost, o)}")
        gone = {k for k, _ in dropped}
        activities.append(replace(activity, options=tuple(
            o for k, o in enumerate(activity.options) if k not in gone)))
    return replace(project, activities=tuple(activities)), notes
