"""Safety and contract cautions that go with an acceleration plan.

Acceleration is bought with longer hours, more shifts, more crews in the same space and
faster cycles, and each can hurt someone. Each caution fires only where it applies and
names the activities it is about:

- long hours (any plan that changes work);
- work shortened by more than a quarter of its duration with crash days (overtime or
  shifts; not a change of method, which a discrete option is);
- trade stacking: shortened work of different trades overlapping in time in the plan's
  schedule (hasten has no location of the work: whether they share an area is for the
  reader to check);
- physical waits that labour cannot shorten, marked by the activity's trade (words of the
  trade, not of the activity's name): concrete curing and stripping; coating recoat
  times; screed and plaster drying; weather-dependent roofing and external works;
- work at height and crane lifts when erection, precast or roofing work is accelerated
  (marked by the trade, or by "erection" or "crane" in the activity's name);
- shortened work on a calendar without a weekly rest day.

The wording gives no figure that is not read in a source (README, "Cautions") and defers to
manufacturers' data, the engineer, local codes, labour law and licensed professionals.
"""

from __future__ import annotations

from datetime import date
from typing import Iterable, Sequence

__all__ = ["plan_cautions", "GENERAL", "NO_REST_DAY", "TRADE_WORDS", "HEIGHT_NAME_WORDS", "stacking"]

GENERAL = (
    "Acceleration usually means overtime, extra shifts or extra crews. Long hours raise "
    "injury risk (Dembe et al. 2005: overtime schedules +61%, 12-hour days +37%, 60-hour "
    "weeks +23% hazard) and lower productivity on every hour worked; night work adds its own "
    "risks. Check each measure against local codes, labour law and collective agreements, and "
    "have the site's safety professionals approve it before work starts. Give the notices the "
    "contract requires before claiming acceleration costs.")

NO_REST_DAY = (
    "runs on a calendar with no weekly rest day. With overtime on top, fatigue builds from "
    "week to week; the Business Roundtable's study of scheduled overtime (1980) advises a "
    "periodic shutdown for a Sunday or weekend, and many labour laws require a weekly rest "
    "period. Check the crew rota against local labour law and collective agreements.")

#: Words of an activity's trade that mark each kind of physical wait or risk (whole words
#: or phrases of the trade, any case). The name of the activity is not read: "deck" in a
#: metal deck or a glazing activity is not concrete.
TRADE_WORDS: dict[str, tuple[str, ...]] = {
    "curing": ("concrete", "concreting", "formwork", "shotcrete"),
    "coating": ("painting", "painter", "painters", "decorating", "decorator", "decorators", "coating",
                "coatings"),
    "drying": ("screed", "screeding", "plaster", "plastering", "plasterer", "plasterers", "render",
               "rendering"),
    "weather": ("roofing", "roofer", "roofers", "external works", "externals", "landscaping",
                "surfacing", "paving", "asphalt", "earthworks"),
    "height": ("erection", "erector", "erectors", "precast", "roofing", "roofer", "roofers", "crane",
               "cranes", "hoisting", "cladding", "facade"),
}
#: Words of an activity's name that mark erection with a crane when the trade does not (a
#: "steel" trade both fabricates off site and erects on site).
HEIGHT_NAME_WORDS = ("erection", "erect", "crane", "cranes")

_WAITS = {
    "curing": (
        "Concrete work is shortened with crash days: {names}. Curing, form stripping and loading "
        "are physical waits that extra crews or hours cannot shorten: ACI 347 gives minimum times "
        "before forms and supports are removed, and a US federal guide specification (UFGS "
        "03301A) requires 7, 14 or 21 days of curing depending on the cement. Keep these waits "
        "as lags or separate activities that are not shortened; only the structural engineer of "
        "record may approve earlier stripping or loading."),
    "coating": (
        "Coating work is shortened with crash days: {names}. The time between coats and before "
        "handling or loading is set by the manufacturer's data sheet for the temperature and "
        "humidity on site; more painters cannot shorten it."),
    "drying": (
        "Screed or plaster work is shortened with crash days: {names}. Drying before the next "
        "layer or the floor finish depends on the mix, the thickness and the conditions; follow "
        "the manufacturer's data and measure the moisture before covering it."),
    "weather": (
        "Weather-dependent work is accelerated: {names}. Rain, wind and cold stop roofing and "
        "external works whatever the crew size; allow for lost days, and stop work at height in "
        "the wind speeds the site's safety rules and local codes set."),
}
_HEIGHT = (
    "Erection, precast or roofing work is accelerated: {names}. Faster erection means more "
    "crane lifts and more work at height in less time. The lift plans, exclusion zones, the "
    "crane's wind limits and fall protection must be reviewed by the person appointed for "
    "lifting operations and the site's safety professionals under local codes before the pace "
    "is raised.")
_HEAVY = (
    "Shortened by more than a quarter of its duration with crash days: {names}. That usually "
    "takes sustained overtime or shift work; productivity losses grow week by week, and long "
    "overtime can end up finishing later than normal hours (Business Roundtable, 1980).")
_STACKING = (
    "Shortened work of different trades overlaps in time (trade stacking): {pairs}. Crowding "
    "crews into the same area lowers productivity and raises accident risk; hasten does not "
    "know where work happens, so check whether the overlapping work shares an area and plan "
    "the work areas and supervision with the site safety lead.")


def _names(items: Sequence[str], most: int = 6) -> str:
    shown = list(items[:most])
    if len(items) > most:
        shown.append(f"and {len(items) - most} more")
    return ", ".join(shown)


def _label(change) -> str:
    return f"'{change.name or change.id}' ({change.id})"


def _has(trade: str, words: Iterable[str]) -> bool:
    text = f" {' '.join(trade.lower().replace('-', ' ').replace('/', ' ').split())} "
    return any(f" {w} " in text for w in words)


def stacking(rows: Sequence[tuple[str, str, date, date]], most: int = 5) -> list[str]:
    """Overlaps in time of work of different trades, from ``(label, trade, first day, last
    day)`` of each shortened activity: ``"'A' (electrical) and 'B' (drylining) from
    2027-06-01 to 2027-06-04"``, earliest first (at most ``most``, then how many more).

    >>> from datetime import date
    >>> stacking([("'A' (A1)", "electrical", date(2027, 6, 1), date(2027, 6, 9)),
    ...           ("'B' (B1)", "drylining", date(2027, 6, 7), date(2027, 6, 20)),
    ...           ("'C' (C1)", "painting", date(2027, 9, 1), date(2027, 9, 9))])
    ["'A' (A1, electrical) and 'B' (B1, drylining) from 2027-06-07 to 2027-06-09"]
    """
    order = sorted(rows, key=lambda r: (r[2], r[3]))
    found = []
    for k, (a, ta, fa, la) in enumerate(order):
        for b, tb, fb, lb in order[k + 1:]:
            if fb > la:
                break
            if ta and tb and ta.lower() != tb.lower():
                found.append((fb, min(la, lb), a, ta, b, tb))
    found.sort(key=lambda f: (f[0], f[1]))
    text = [f"{a[:-1]}, {ta}) and {b[:-1]}, {tb}) from {f.isoformat()} to {t.isoformat()}"
            for f, t, a, ta, b, tb in found[:most]]
    if len(found) > most:
        text.append(f"and {len(found) - most} more overlaps")
    return text


def plan_cautions(project, timeline, changes, schedule=None) -> list[str]:
    """Cautions for a plan of ``project`` from its :class:`~hasten.results.ActivityChange`
    rows; ``timeline`` (:class:`~hasten.calendar.Timeline`) gives each activity's calendar,
    ``schedule`` the plan's schedule after acceleration (its early dates, for overlaps)."""
    changed = [c for c in changes if c.shortened_by > 0 or c.option]
    if not changed:
        return []
    pos = {a.id: k for k, a in enumerate(project.activities)}
    acts = project.activities
    out = [GENERAL]
    crashed = []  # (change, days taken off by crash steps, the duration they were taken from)
    for c in changed:
        act = acts[pos[c.id]]
        option = next((o for o in act.options if o.name == c.option), None) if c.option else None
        basis = c.normal if option is None else option.duration
        if basis - c.duration > 0:
            crashed.append((c, basis - c.duration, basis))
    heavy = [f"{_label(c)} from {basis} to {c.duration} working days" for c, cut, basis in crashed
             if cut > basis / 4]
    if heavy:
        out.append(_HEAVY.format(names=_names(heavy)))
    if schedule is not None:
        rows = schedule.by_id()
        spans = []
        for c in changed:
            r = rows.get(c.id)
            if r is None or r.ef <= r.es or r.state == "finished":
                continue
            clock = timeline.clock_of(pos[c.id])
            spans.append((_label(c), c.trade, clock.date_of(r.es), clock.date_of(r.ef - 1)))
        pairs = stacking(spans)
        if pairs:
            out.append(_STACKING.format(pairs="; ".join(pairs)))
    for kind, text in _WAITS.items():
        pool = changed if kind == "weather" else [c for c, _, _ in crashed]
        names = [_label(c) for c in pool if _has(c.trade, TRADE_WORDS[kind])]
        if names:
            out.append(text.format(names=_names(names)))
    height = [_label(c) for c in changed if _has(c.trade, TRADE_WORDS["height"])
              or _has(c.name, HEIGHT_NAME_WORDS)]
    if height:
        out.append(_HEIGHT.format(names=_names(height)))
    seven = [_label(c) for c in changed if c.duration < c.normal
             and len(timeline.clock_of(pos[c.id]).calendar.workdays) == 7]
    if seven:
        out.append(f"Shortened work {_names(seven)} " + NO_REST_DAY)
    return out
