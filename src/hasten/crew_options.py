"""Acceleration options built from crew data, with every figure traceable.

For each measure (extended hours ``6x10``, a second shift ``2-shifts``, extra crews
``+1-crew``) and for normal working:

* hours worked a week = crew size x the hours of each crew's week;
* each week's productive hours = hours worked x (1 - that week's loss); the loss falls on
  **all** hours worked, not only premium hours (see :mod:`hasten.productivity` for the
  tables and the week rule);
* weeks = the weeks until the productive hours reach the labour hours (fractional);
* days worked = ceil(weeks x days a week of the measure);
* duration = those days as working days of the project calendar (:func:`project_days`,
  counted from a week's first working day), never below the physical minimum;
* paid hours = weeks x the paid hours of a full week of each crew (:mod:`hasten.premium`),
  so a short last week is priced like a full one;
* cost = paid hours x wage + plant per day x days worked; the option's added cost is its
  cost minus the cost of normal working (the normal week at its pay, one crew, no loss),
  rounded to the cent.

A measure that would not finish sooner than normal working is not offered; it is listed in
``skipped`` with the reason, as is a measure needing more crews than the area takes.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, replace
from fractions import Fraction

from hasten.errors import InputError
from hasten.labour import CrewData, LabourRules, Measure, parse_measures, wage_of
from hasten.premium import exact, schedule_pay, shift_rate
from hasten.productivity import (CROWDING_CITATION, CROWDING_LOSSES, SHIFT_CITATION,
                                 ProductivityTable, average_loss, schedule_losses, shift_loss,
                                 table_citation, weeks_to_finish)
from hasten.project import Activity, Option

__all__ = [
    "Working",
    "Skipped",
    "CrewOptions",
    "build_options",
    "normal_working",
    "project_days",
    "with_options",
    "option_sources",
    "labour_cautions",
]

NORMAL = Measure("normal", "normal")


@dataclass(frozen=True)
class Working:
    """How one way of working was priced (normal working, or one option)."""

    measure: str  # "normal", "6x10", "2-shifts", "+1-crew"
    kind: str  # "normal", "overtime", "shifts", "crews"
    crews: int  # crews at work, counting a second shift's crew
    days_per_week: int
    hours_per_day: float  # a worker's longest day
    hours_per_worker_week: float  # a worker's longest week
    worked_hours_per_week: float  # all workers
    loss: float  # on all hours worked; over the weeks worked when the table is weekly
    loss_source: str
    productive_hours_per_week: float  # worked x (1 - loss)
    weeks: float
    crew_days: int  # days on which the activity is worked
    duration: int  # working days of the project calendar
    held_at_minimum: bool  # the physical minimum, not the labour, sets the duration
    worked_hours: float
    paid_hours: float
    pay: str  # a full week's pay, per crew
    labour_cost: float
    plant_cost: float
    added_cost: float  # against normal working

    @property
    def cost(self) -> float:
        return self.labour_cost + self.plant_cost


@dataclass(frozen=True)
class Skipped:
    """A measure that was not offered, and why."""

    measure: str
    reason: str


@dataclass(frozen=True)
class CrewOptions:
    """The options built for one activity, their workings (same order), normal working, the
    measures skipped, the productivity table used and the physical minimum applied."""

    activity_id: str
    normal: Working
    options: tuple[Option, ...]
    workings: tuple[Working, ...]
    skipped: tuple[Skipped, ...]
    table: ProductivityTable
    min_duration: int


def project_days(crew_days: int, days_per_week: int, calendar_days: int) -> int:
    """Working days of a calendar with ``calendar_days`` a week spanned by ``crew_days``
    worked at ``days_per_week``, both weeks starting on the same first working day.

    Days worked beyond the calendar's days of a week (a Saturday on a Monday-to-Friday
    calendar) add no working day; days the calendar works and the crew does not (a Saturday
    of a six-day calendar for a five-day crew) are counted once the crew works after them.
    For a crew working at least the calendar's days this is the longest span over the start
    weekday, so it never promises too much.
    """
    if crew_days <= 0:
        return 0
    week, day = divmod(crew_days - 1, days_per_week)
    return week * calendar_days + min(day + 1, calendar_days)


def _money(value: Fraction | float) -> str:
    return f"{float(value):.2f}"


def _hours(value: Fraction | float) -> str:
    return f"{round(float(value), 2):g}"


@dataclass(frozen=True)
class _Way:
    """A way of working: each crew's (days, hours a day, straight-time multiplier)."""

    measure: Measure
    crews: tuple[tuple[int, Fraction, Fraction], ...]
    losses: tuple[Fraction, ...]
    loss_source: str


def _way(measure: Measure, rules: LabourRules, table: ProductivityTable | None, wage: float,
         column: str) -> _Way:
    days, hours = rules.normal_days, exact(rules.normal_hours)
    if measure.kind == "normal":
        return _Way(measure, ((days, hours, Fraction(1)),), (Fraction(0),), "normal week, no loss")
    if measure.kind == "overtime":
        losses, key = schedule_losses(table, measure.days, measure.hours, column=column)
        source = f"{table.name} {key}" + (", average over the weeks worked" if len(losses) > 1 else "")
        return _Way(measure, ((measure.days, exact(measure.hours), Fraction(1)),), losses, source)
    if measure.kind == "shifts":
        second = exact(rules.premium.shift_worked_hours)
        share = second / (hours + second)
        loss = shift_loss(float(share), column="labour.shift_worked_hours",
                          value=rules.premium.shift_worked_hours)
        source = f"Hanna et al. 2008, second shift {float(share):.1%} of the hours"
        return _Way(measure, ((days, hours, Fraction(1)), (days, second, shift_rate(rules.premium, wage))),
                    (Fraction(loss),), source)
    if measure.kind == "crews":
        if rules.crowding_loss is not None:
            loss, source = exact(rules.crowding_loss), "the job's own crowding loss (labour.crowding_loss)"
        else:
            loss = CROWDING_LOSSES[rules.crowding]
            source = f"MCAA stacking of contractor's own forces, {rules.crowding}"
        return _Way(measure, ((days, hours, Fraction(1)),) * measure.crews, (loss,), source)
    raise ValueError(f"unknown measure kind {measure.kind!r}")  # pragma: no cover


def _price(way: _Way, crew: CrewData, rules: LabourRules, wage: float, calendar_days: int,
           floor: int) -> Working:
    size = crew.crew_size
    per_week = size * sum(d * h for d, h, _ in way.crews)
    days = max(d for d, _, _ in way.crews)
    labour = exact(crew.labour_hours)
    weeks = weeks_to_finish(labour, per_week, way.losses)
    loss = average_loss(way.losses, weeks)
    crew_days = math.ceil(weeks * days)
    span = project_days(crew_days, days, calendar_days)
    pays = [schedule_pay(d, h, rules.premium, base=base) for d, h, base in way.crews]
    paid = weeks * size * sum(p.paid for p in pays)
    labour_cost = paid * exact(wage)
    plant = crew_days * exact(crew.equipment_per_day)
    if way.measure.kind == "shifts":
        pay_text = f"day shift {pays[0].text()}, second shift {pays[1].text()}"
    else:
        pay_text = pays[0].text() + (" each crew" if len(pays) > 1 else "")
    return Working(
        measure=way.measure.text, kind=way.measure.kind, crews=len(way.crews), days_per_week=days,
        hours_per_day=float(max(h for _, h, _ in way.crews)),
        hours_per_worker_week=float(max(d * h for d, h, _ in way.crews)),
        worked_hours_per_week=float(per_week), loss=float(loss), loss_source=way.loss_source,
        productive_hours_per_week=float(per_week * (1 - loss)), weeks=float(weeks),
        crew_days=crew_days, duration=max(span, floor), held_at_minimum=floor > span,
        worked_hours=float(weeks * per_week), paid_hours=float(paid), pay=pay_text,
        labour_cost=float(labour_cost), plant_cost=float(plant), added_cost=0.0)


def _note(w: Working, normal: Working, crew: CrewData) -> str:
    if w.kind == "shifts":
        crews = f"a day crew and a second-shift crew of {crew.crew_size}, at most"
    else:
        crews = f"{w.crews} crews of {crew.crew_size}" if w.crews > 1 else f"1 crew of {crew.crew_size}"
    held = ", held at the physical minimum" if w.held_at_minimum else ""
    return (f"{w.measure}: {crews}, {_hours(w.hours_per_worker_week)} h a week each; "
            f"loss {w.loss:.1%} on all hours ({w.loss_source}); "
            f"{_hours(w.productive_hours_per_week)} productive h a week of "
            f"{_hours(w.worked_hours_per_week)} worked; {w.weeks:.2f} weeks, {w.crew_days} days "
            f"worked = {w.duration} working days{held}; pay {w.pay}; "
            f"labour {_money(w.labour_cost)} + plant {_money(w.plant_cost)} against normal "
            f"{_money(normal.labour_cost)} + {_money(normal.plant_cost)} "
            f"({normal.duration} working days)")


def _check_calendar_days(calendar_days: object) -> int:
    if isinstance(calendar_days, bool) or not isinstance(calendar_days, int) \
            or not 1 <= calendar_days <= 7:
        raise InputError("a calendar has 1 to 7 working days a week", column="calendar",
                         value=calendar_days, fix="give the working days a week of the activity's calendar, e.g. 5")
    return calendar_days


def normal_working(crew: CrewData, rules: LabourRules, calendar_days: int, *,
                   min_duration: int = 0) -> Working:
    """Normal working: the normal week, one crew, no loss, paid under the rules. Its
    ``duration`` is what the activity's duration should be."""
    wage = wage_of(crew, rules)
    way = _way(NORMAL, rules, None, wage, "labour")
    return _price(way, crew, rules, wage, _check_calendar_days(calendar_days),
                  max(crew.min_duration, min_duration))


def build_options(activity_id: str, crew: CrewData, rules: LabourRules,
                  schedules: str | Sequence[Measure], table: ProductivityTable,
                  calendar_days: int, *, min_duration: int = 0,
                  column: str = "schedules") -> CrewOptions:
    """Options for ``activity_id`` from its crew data, for the measures in ``schedules``
    (text such as ``"5x10,6x10,2-shifts,+1-crew"``, or parsed measures).

    ``table`` gives the overtime losses; ``calendar_days`` is the working days a week of the
    activity's calendar; ``min_duration`` (e.g. the activity's crash duration) joins the
    crew's own physical minimum as the shortest duration allowed. ``column`` names where the
    measures were written, for error messages.
    """
    calendar_days = _check_calendar_days(calendar_days)
    measures = parse_measures(schedules, column=column) if isinstance(schedules, str) else tuple(schedules)
    floor = max(crew.min_duration, min_duration)
    wage = wage_of(crew, rules)
    normal = _price(_way(NORMAL, rules, table, wage, column), crew, rules, wage, calendar_days, floor)
    # every measure is looked up first, so that a schedule the table lacks is refused
    # whatever the activity's own data
    ways = {m.text: _way(m, rules, table, wage, column) for m in measures
            if not (m.kind == "overtime" and m.days == rules.normal_days and m.hours == rules.normal_hours)}
    options, workings, skipped = [], [], []
    for measure in measures:
        if measure.text not in ways:
            skipped.append(Skipped(measure.text, "this is the normal week"))
            continue
        if crew.labour_hours == 0:
            skipped.append(Skipped(measure.text, "no labour hours left"))
            continue
        if measure.kind == "crews" and measure.crews > crew.max_crews:
            skipped.append(Skipped(measure.text, f"needs {measure.crews} crews at once; the area "
                                                 f"takes {crew.max_crews} (max_crews)"))
            continue
        work = _price(ways[measure.text], crew, rules, wage, calendar_days, floor)
        if work.duration >= normal.duration:
            why = "held at the physical minimum of" if work.held_at_minimum else "finishes in"
            skipped.append(Skipped(measure.text, f"{why} {work.duration} working days, no sooner "
                                                 f"than normal working ({normal.duration})"))
            continue
        work = replace(work, added_cost=round(work.cost - normal.cost, 2))  # to the cent
        workings.append(work)
        options.append(Option(name=measure.text, duration=work.duration,
                              added_cost=work.added_cost, note=_note(work, normal, crew)))
    return CrewOptions(activity_id=activity_id, normal=normal, options=tuple(options),
                       workings=tuple(workings), skipped=tuple(skipped), table=table,
                       min_duration=floor)


def with_options(activity: Activity, built: CrewOptions) -> Activity:
    """``activity`` with the built options added after its own; a name used twice is refused."""
    names = [o.name for o in activity.options]
    for option in built.options:
        if option.name in names:
            raise InputError(f"activity '{activity.id}' already has an option named '{option.name}'",
                             column="option", value=option.name,
                             fix="rename the option in options.csv or leave that measure out")
        names.append(option.name)
    return replace(activity, options=activity.options + built.options)


def option_sources(results: Iterable[CrewOptions]) -> list[str]:
    """The sources the offered options rest on, one line each, in a fixed order."""
    results = list(results)
    kinds = {w.kind for r in results for w in r.workings}
    lines = []
    for table in dict.fromkeys(r.table.name for r in results if any(w.kind == "overtime" for w in r.workings)):
        lines.append(table_citation(next(r.table for r in results if r.table.name == table)))
    if "shifts" in kinds:
        lines.append(f"Shift work: {SHIFT_CITATION}.")
    if "crews" in kinds:
        lines.append(f"Extra crews: {CROWDING_CITATION}.")
    return lines


def _ids(results: Sequence[CrewOptions], test) -> str:
    return ", ".join(dict.fromkeys(r.activity_id for r in results if test(r)))


def labour_cautions(results: Iterable[CrewOptions]) -> list[str]:
    """Safety and legal cautions for the options built, each naming the activity ids it
    concerns; empty when nothing was built."""
    results = list(results)
    if not results:
        return []

    def any_work(test):
        return lambda r: any(test(w) for w in r.workings)

    out = []
    long_run = any_work(lambda w: w.kind == "overtime" and w.hours_per_worker_week >= 60 and w.weeks > 8)
    if ids := _ids(results, long_run):
        flat = any(not r.table.weekly for r in results if long_run(r))
        out.append(
            f"{ids}: options of 60 or more hours a week run longer than about eight weeks. The "
            "Business Roundtable (Scheduled Overtime Effect on Construction Projects, 1980) found "
            "that such schedules can finish later than the same crew on 40-hour weeks, and advises "
            "an additional shift and periodic weekend shutdowns instead."
            + (" A productivity table with one loss per schedule understates long runs." if flat else ""))
    if ids := _ids(results, any_work(lambda w: w.hours_per_day > 12)):
        out.append(f"{ids}: options with more than 12 hours a day. Days over 12 hours carried 147% more "
                   "injuries than 8-hour days in Salminen's review (Ergonomics Open Journal, 2016).")
    normal_week = lambda r: r.normal.hours_per_worker_week  # noqa: E731
    if ids := _ids(results, lambda r: any(w.hours_per_worker_week > normal_week(r) for w in r.workings)):
        out.append(f"{ids}: options with long hours. Long hours raise injury risk: overtime schedules "
                   "+61%, 12-hour days +37%, 60-hour weeks +23% (Dembe, Erickson, Delbos & Banks, "
                   "2005, Occup. Environ. Med. 62(9):588-597), and productivity falls on every hour "
                   "worked, not only the premium hours.")
    if ids := _ids(results, any_work(lambda w: w.kind == "shifts")):
        out.append(f"{ids}: a second shift means evening or night work. NIOSH reports accident risk "
                   "15% higher on evening and 28% higher on night shifts than on day shifts (studies "
                   "differ); a second shift needs its own lighting, security, supervision and "
                   "coordination, and labour law may restrict night work.")
    if ids := _ids(results, any_work(lambda w: w.kind == "crews")):
        out.append(f"{ids}: extra crews in the same area. Stacking crews lowers productivity (each "
                   "option's note names the crowding loss applied) and raises accident risk. The MCAA "
                   "factors are generic: since 2001 courts accepted 2 of 9 claims resting on them "
                   "(Ibbs & Sun); prefer productivity measured on the job.")
    if ids := _ids(results, lambda r: any("max_crews" in s.reason for s in r.skipped)):
        out.append(f"{ids}: more crews were asked for than the area takes (max_crews); those "
                   "measures were not offered. Do not crowd more crews into an area than it can "
                   "take safely.")
    if ids := _ids(results, lambda r: r.min_duration > 0):
        out.append(f"{ids}: a physical minimum duration applies. Curing, form stripping and lead "
                   "times are not shortened by labour (ACI 347 minimum stripping times; 7 to 21 days "
                   "of curing in UFGS 03301A); only the structural engineer of record may approve "
                   "earlier stripping or loading.")
    out.append(f"{_ids(results, lambda r: True)}: labour law, collective agreements and the contract "
               "govern hours, rest and pay; the premium rules used are defaults to check against "
               "them. hasten defers to local codes, labour law and licensed professionals: it prices "
               "ways of working, it does not approve them.")
    return out
