"""Results as JSON-ready dicts and table rows (what a program reads). Nothing here prints,
computes a schedule or solves: every figure comes from the result objects.
"""

from __future__ import annotations

import json
from collections.abc import Iterable, Sequence
from datetime import date
from itertools import chain, repeat
from operator import attrgetter
from typing import TYPE_CHECKING

import numpy as np

from .calendar import CalendarClock, Timeline
from .cpm import Schedule
from .progress import shown_days
from .project import Project

if TYPE_CHECKING:  # the optimiser is imported only by the commands that use it
    from .quality import QualityReport
    from .recovery import Recovery
    from .price import PricedProposal
    from .results import BestFinish, Curve, CurvePoint, Plan

__all__ = [
    "SCHEDULE_COLUMNS", "REVISED_COLUMNS", "DATE_COLUMNS", "money_value", "iso", "schedule_rows", "schedule_json",
    "schedule_json_text", "schedule_columns",
    "revised_rows", "plan_json", "point_plan", "point_changes", "curve_rows", "curve_json", "total_cost_row",
    "best_json", "recovery_json", "revised_course_rows", "instructions", "money", "option_note", "days",
    "plan_activities", "price_json", "quality_json",
]


def money(x: float, currency: str = "") -> str:
    """``12345.0`` -> ``'12,345'``; ``0.5`` -> ``'0.50'``; the currency after it."""
    text = f"{x:,.0f}" if abs(x - round(x)) < 0.005 else f"{x:,.2f}"
    return f"{text} {currency}".rstrip()


def money_value(x: float) -> float:
    """Money for JSON: two decimals, no float noise."""
    return round(x + 0.0, 2)


def iso(day: date | None) -> str | None:
    return None if day is None else day.isoformat()


def _dates(clock: CalendarClock, starts: list[int], finishes: list[int],
           milestones: list[bool] | None = None, states=None, late: bool = False) -> tuple[list[str], list[str]]:
    """First and last day worked for each (start, finish) pair, in two vectorised calls.

    A milestone is dated on one day (:func:`hasten.progress.shown_days`): a start
    milestone on the day it starts, another on the day its predecessors end, never before
    the first day it may happen. Late dates (``late``) are not held at the first day: against
    a deadline earlier than the early finish they fall before the project start, and are
    shown as those real dates, counted in working days of the calendar."""
    s = np.asarray(starts, dtype=np.int64)
    f = np.asarray(finishes, dtype=np.int64)
    first, last = s, np.where(f > s, f - 1, s - 1)
    if not late:
        last = np.maximum(last, 0)
    ms = np.flatnonzero(np.asarray(milestones, dtype=bool)) if milestones is not None and states else ()
    if len(ms):  # (as hasten.progress.shown_days, for the milestones only)
        if late:
            days = [int(s[k]) if states[k].opens else int(f[k]) - 1 for k in ms.tolist()]
        else:
            days = [shown_days(states[k], True, int(s[k]), int(f[k]))[0] for k in ms.tolist()]
        first, last = first.copy(), last.copy()
        first[ms] = last[ms] = days
    return _iso_dates(clock, first), _iso_dates(clock, last)


def _iso_dates(clock: CalendarClock, offsets: np.ndarray) -> list[str]:
    """``clock.iso_dates(offsets)``, each distinct day formatted once (a schedule's
    200,000 dates fall on a few thousand days)."""
    if not len(offsets):
        return []
    low, high = int(offsets.min()), int(offsets.max())
    if high - low <= len(offsets):  # every day from the first to the last, looked up by offset
        return list(map(clock.iso_dates(np.arange(low, high + 1)).__getitem__, (offsets - low).tolist()))
    days, where = np.unique(offsets, return_inverse=True)
    return list(map(clock.iso_dates(days).__getitem__, where.tolist()))


def _row_dates(project: Project, timeline: Timeline, ids: Sequence[str], milestones: list[bool] | None,
               starts: Sequence[int], finishes: Sequence[int], states=None, late: bool = False):
    """Dates of one (start, finish) pair of every row (``ids``, in the project's order, as
    a schedule has them), each in its activity's own calendar; ``milestones``: the rows
    dated as milestones when ``states`` are given."""
    if not timeline.several:
        return _dates(timeline.project_clock, starts, finishes, milestones, states, late)
    pos = {a.id: k for k, a in enumerate(project.activities)}
    cal = [timeline.of[pos[i]] for i in ids]
    first, last = [""] * len(ids), [""] * len(ids)
    for c in sorted(set(cal)):
        mine = [k for k, x in enumerate(cal) if x == c]
        f, g = _dates(timeline.clocks[c], [starts[k] for k in mine], [finishes[k] for k in mine],
                      None if milestones is None else [milestones[k] for k in mine],
                      None if states is None else [states[k] for k in mine], late)
        for k, a, b in zip(mine, f, g):
            first[k], last[k] = a, b
    return first, last


def schedule_columns(project: Project, sched: Schedule) -> tuple:
    """The values of each of :data:`SCHEDULE_COLUMNS`, top to bottom (iterables; the
    driving activities of each row as a tuple)."""
    rs = sched.activities
    if not rs:
        return ((),) * len(SCHEDULE_COLUMNS)
    # the fields of every row as columns at once (a row is a tuple of ActivityDates' fields)
    (ids, duration, es_, ef_, ls_, lf_, total, free, critical, driving, state) = zip(*rs)
    acts = project.activities
    own = acts if ids == tuple(map(attrgetter("id"), acts)) else list(map({a.id: a for a in acts}.__getitem__, ids))
    timeline = Timeline(project)
    states = sched.states or None
    milestones = (np.equal(duration, 0) & np.equal(list(map(attrgetter("duration"), acts)), 0)).tolist() \
        if states else None
    es, ef = _row_dates(project, timeline, ids, milestones, es_, ef_, states)
    ls, lf = _row_dates(project, timeline, ids, milestones, ls_, lf_, states, late=True)
    default = project.calendar.name
    calendars = map(attrgetter("calendar"), own)
    return (
        ids, map(attrgetter("name"), own), map(attrgetter("trade"), own),
        [c or default for c in calendars], duration, state, es_, ef_, ls_, lf_, es, ef, ls, lf,
        total, free, critical, driving)


def schedule_rows(project: Project, sched: Schedule) -> list[dict]:
    """One row per activity with offsets and the dates a person reads (each activity's
    offsets and dates in its own calendar)."""
    # column by column, then one dictionary per row (keys in SCHEDULE_COLUMNS order)
    *columns, driving = schedule_columns(project, sched)
    return list(map(dict, map(zip, repeat(SCHEDULE_COLUMNS), zip(*columns, map(list, driving)))))


def _schedule_head(project: Project, sched: Schedule) -> dict:
    """What ``schedule --json`` gives before the activities."""
    return {
        "project": project.name,
        "start_date": iso(sched.start_date),
        "finish": sched.finish,
        "finish_date": iso(sched.finish_date),
        "data_date": iso(project.data_date),
        "deadline": sched.deadline,
        "deadline_date": iso(sched.deadline_date),
        "critical_paths": [list(p) for p in sched.critical_paths],
        "critical_paths_truncated": sched.paths_truncated,
        "longest_paths": [list(p) for p in sched.longest_paths],
        "warnings": list(sched.warnings),
    }


def schedule_json(project: Project, sched: Schedule) -> dict:
    return _schedule_head(project, sched) | {"activities": schedule_rows(project, sched)}


_json_str = json.encoder.encode_basestring  # what json.dumps(..., ensure_ascii=False) uses
_JSON_ONE = json.JSONEncoder(ensure_ascii=False)  # json.dumps(..., ensure_ascii=False)
_JSON_BOOL = {False: "false", True: "true"}


def _json_texts(values: Iterable) -> Iterable[str]:
    """The JSON text of each value, as ``json.dumps(..., ensure_ascii=False)`` writes it
    inside a list or an object: texts, whole numbers, true/false and lists of texts by C
    functions mapped over the column, any other column value by value by the encoder."""
    values = values if isinstance(values, list) else list(values)
    kinds = set(map(type, values))
    if kinds <= {str}:
        distinct = set(values)
        if len(distinct) * 2 > len(values):
            return map(_json_str, values)
        text = dict(zip(distinct, map(_json_str, distinct)))  # dates, trades: a few values
        return map(text.__getitem__, values)
    if kinds <= {int}:
        return map(int.__repr__, values)
    if kinds <= {bool}:
        return map(_JSON_BOOL.__getitem__, values)
    if kinds <= {list, tuple} and set(map(type, chain.from_iterable(values))) <= {str}:
        return map("[{}]".format, map(", ".join, map(map, repeat(_json_str), values)))
    return map(_JSON_ONE.encode, values)


def _plain_json_text(values: list) -> bool:
    """Every value text that JSON writes as it is between quotes (nothing to escape)."""
    text = "".join(values)
    return text.isprintable() and '"' not in text and "\\" not in text


def _json_column(values: Iterable) -> tuple[str, Iterable]:
    """How one column goes into the row format: its conversion (``%s`` of a JSON text or
    of text between quotes that needs no escape, ``%d`` of whole numbers) and its values."""
    values = values if isinstance(values, list) else list(values)
    kinds = set(map(type, values))
    if kinds <= {str} and _plain_json_text(values):
        return '"%s"', values
    if kinds <= {int}:  # (not bool: its %d is 1, JSON's is true)
        return "%d", values
    if kinds <= {list, tuple} and set(map(type, chain.from_iterable(values))) <= {str} and \
            _plain_json_text(list(chain.from_iterable(values))):
        # the lists of the whole column in one text, then split into rows ("\0" is in no
        # plain text; an empty text in none of the lists: no id is empty)
        text = '["' + '"]\0["'.join(map('", "'.join, values)) + '"]'
        return "%s", text.replace('[""]', "[]").split("\0")
    return "%s", _json_texts(values)


def schedule_json_text(project: Project, sched: Schedule, notes: Sequence[str] = ()) -> str:
    """``json.dumps(schedule_json(project, sched) | {"notes": list(notes)},
    ensure_ascii=False)``, byte for byte, written from columns by one format per row: text
    that needs no escape and whole numbers go into the format as they are, other values
    as their JSON text (no dictionary per row: at 200,000 activities the dictionaries and
    their dump took 2.3 s of the command's 5.8)."""
    before = json.dumps(_schedule_head(project, sched), ensure_ascii=False)
    kinds, columns = zip(*map(_json_column, schedule_columns(project, sched)))
    row = "{" + ", ".join(f"{_json_str(name)}: {kind}"
                          for name, kind in zip(SCHEDULE_COLUMNS, kinds)) + "}"
    rows = ", ".join(map(row.__mod__, zip(*columns)))
    after = json.dumps(list(notes), ensure_ascii=False)
    return f'{before[:-1]}, "activities": [{rows}], "notes": {after}}}'


def days(n: int) -> str:
    """``1`` -> ``'1 day'``, ``3`` -> ``'3 days'``."""
    return f"{n} day" if abs(n) == 1 else f"{n} days"


def option_note(project: Project, activity_id: str, option: str) -> str:
    """The note options.csv gives an activity's option ("" when none)."""
    if not option:
        return ""
    try:
        act = project.activity(activity_id)
    except KeyError:
        return ""
    return next((o.note for o in act.options if o.name == option), "")


# -- plans ---------------------------------------------------------------------------
#: the columns of a schedule table (``schedule --out``), its dates and those of a revised one
SCHEDULE_COLUMNS = ("id", "name", "trade", "calendar", "duration", "state", "es", "ef", "ls", "lf",
                    "early_start", "early_finish", "late_start", "late_finish", "total_float", "free_float",
                    "critical", "driving")
REVISED_COLUMNS = ("id", "name", "trade", "calendar", "state", "normal", "duration", "shortened_by", "option",
                   "option_note", "added_cost", "early_start_before", "early_finish_before", "es", "ef", "ls",
                   "lf", "early_start", "early_finish", "late_start", "late_finish", "total_float",
                   "free_float", "critical", "driving")
DATE_COLUMNS = ("early_start", "early_finish", "late_start", "late_finish", "early_start_before",
                "early_finish_before", "finish_date")


def revised_rows(plan: Plan) -> list[dict]:
    """The schedule after acceleration: the rows of ``schedule --json`` with the plan's
    durations, each with its ``normal`` duration, ``shortened_by``, ``option`` (and its note),
    ``added_cost`` and the first and last day worked before (``early_start_before``,
    ``early_finish_before``)."""
    rows = schedule_rows(plan.project, plan.schedule)
    before = {r["id"]: r for r in schedule_rows(plan.project, plan.before)} if plan.before is not None else {}
    changes = {a.id: a for a in plan.activities}
    for r in rows:
        a = changes[r["id"]]
        b = before.get(r["id"], {})
        r.update({"normal": a.normal, "shortened_by": a.shortened_by, "option": a.option or None,
                  "option_note": a.option_note or None, "added_cost": money_value(a.added_cost),
                  "early_start_before": b.get("early_start"), "early_finish_before": b.get("early_finish")})
    return rows


def plan_activities(plan: Plan) -> list[dict]:
    """Every activity of a plan: normal and new duration, days taken off, option, added cost."""
    return [{"id": a.id, "name": a.name, "trade": a.trade, "calendar": a.calendar,
             "normal": a.normal, "duration": a.duration, "shortened_by": a.shortened_by,
             "option": a.option or None, "option_note": a.option_note or None,
             "added_cost": money_value(a.added_cost)}
            for a in plan.activities]


def plan_json(plan: Plan) -> dict:
    project = plan.project
    return {
        "project": project.name,
        "currency": project.currency,
        "target": plan.target,
        "target_date": iso(plan.target_date),
        "finish": plan.finish,
        "finish_date": iso(plan.finish_date),
        "normal_finish": plan.normal_finish,
        "normal_finish_date": iso(plan.normal_finish_date),
        "added_cost": money_value(plan.added_cost),
        "direct_cost": money_value(plan.direct_cost),
        "milestone_damages": money_value(plan.milestone_damages),
        "next_day_cost": None if plan.next_day_cost is None else money_value(plan.next_day_cost),
        "proven_optimal": plan.proven,
        "lower_bound": None if plan.bound is None else money_value(plan.bound),
        "gap": plan.gap,
        "activities": plan_activities(plan),
        "trades": [{"trade": t.trade, "shortened_by": t.shortened_by,
                    "added_cost": money_value(t.added_cost)} for t in plan.trades],
        "critical_paths": [list(p) for p in plan.schedule.critical_paths],
        "cautions": list(plan.cautions),
        "notes": list(plan.notes),
        "schedule": revised_rows(plan),
    }


# -- the curve -----------------------------------------------------------------------
def point_plan(p: CurvePoint) -> str:
    """The plan at a curve point: ``A030 1, A310 2, A120 4 by 'second crew'``."""
    return ", ".join(f"{i} {d}" + (f" by '{way}'" if way else "") for i, d, way in p.plan) or "none"


def point_changes(p: CurvePoint) -> str:
    """The change from the point one day later, in words a scheduler can act on:
    ``A410 one day more shortened``, ``A100 back to normal``, ``A120 now by 'second crew'``."""
    now = {i: (d, way) for i, d, way in p.plan}
    switched = dict(p.switches)
    text = []
    for i, delta in p.changes:
        if i in switched:
            continue
        d, way = now.get(i, (0, ""))
        if delta < 0:
            more = -delta
            text.append(f"{i} shortened {days(d)}" if d == more and not way
                        else f"{i} {'one day' if more == 1 else days(more)} more shortened")
        elif d == 0 and not way:
            text.append(f"{i} back to normal")
        else:
            text.append(f"{i} {'one day' if delta == 1 else days(delta)} less shortened")
    for i, way in p.switches:
        d, _ = now.get(i, (0, ""))
        if way:
            text.append(f"{i} now by '{way}'" + (f", shortened {days(d)}" if d else ""))
        else:
            text.append(f"{i} back to the normal way" + (f", shortened {days(d)}" if d else ""))
    return "; ".join(text) + ("" if p.proven else f" [not proven, gap {100 * (p.gap or 0):.1f}%]")


def curve_rows(curve: Curve) -> list[dict]:
    return [{"finish": p.finish, "finish_date": iso(p.finish_date),
             "added_cost": money_value(p.added_cost), "milestone_damages": money_value(p.milestone_damages),
             "day_cost": money_value(p.day_cost), "changes": point_changes(p), "plan": point_plan(p)}
            for p in curve]


def curve_json(curve: Curve) -> dict:
    project = curve.project
    return {"normal_finish": curve.normal_finish, "shortest_finish": curve.shortest_finish,
            "points": [{"finish": p.finish, "finish_date": iso(p.finish_date),
                        "added_cost": money_value(p.added_cost),
                        "milestone_damages": money_value(p.milestone_damages),
                        "day_cost": money_value(p.day_cost),
                        "plan": [{"id": i, "shortened_by": d, "option": way or None,
                                  "option_note": option_note(project, i, way) or None}
                                 for i, d, way in p.plan],
                        "changes": [{"id": i, "days": d} for i, d in p.changes],
                        "switches": [{"id": i, "option": way or None} for i, way in p.switches],
                        "change": point_changes(p),
                        "proven_optimal": p.proven, "gap": p.gap} for p in curve],
            "notes": list(curve.notes)}


# -- best total cost -----------------------------------------------------------------
def total_cost_row(r) -> dict:
    return {"finish": r.finish, "finish_date": iso(r.finish_date), "total_cost": money_value(r.total_cost),
            "direct_cost": money_value(r.direct_cost), "added_cost": money_value(r.added_cost),
            "indirect_cost": money_value(r.time.indirect), "damages": money_value(r.time.damages),
            "milestone_damages": money_value(r.milestone_damages), "bonus": money_value(r.time.bonus)}


def best_json(best: BestFinish) -> dict:
    out = total_cost_row(best.point)
    out["current"] = total_cost_row(best.current)
    out["saving"] = money_value(best.saving)
    out["table"] = [total_cost_row(r) for r in best.table]
    out["plan"] = plan_json(best.plan)
    out["notes"] = list(best.notes)
    return out


# -- recovery ------------------------------------------------------------------------
def instructions(plan: Plan | None) -> list[str]:
    """Per-trade instructions: "electrical: shorten 'Level 3 rough-in' (A190) by 4 working
    days at 7,200 GBP"."""
    if plan is None:
        return []
    currency = plan.project.currency
    out = []
    for a in sorted(plan.changed, key=lambda a: (a.trade or "(no trade)", a.id)):
        what = f"'{a.name or a.id}' ({a.id})"
        if a.option:
            how = f"use '{a.option}'" + (f" and shorten by {a.shortened_by} working days" if a.shortened_by > 0 else "")
        elif a.shortened_by > 0:
            how = f"shorten by {a.shortened_by} working day{'s' if a.shortened_by != 1 else ''}"
        else:
            how = f"lengthen by {-a.shortened_by} working days"
        verb, rest = how.split(" ", 1)
        note = f" (option note: {a.option_note})" if a.option and a.option_note else ""
        out.append(f"{a.trade or '(no trade)'}: {verb} {what} {rest} at {money(a.added_cost, currency)}{note}")
    return out


def revised_course_rows(rec: Recovery) -> list[dict]:
    """The revised schedule of every course that has a plan, one table with a ``course`` column."""
    return [{"course": c.label, **r} for c in rec.courses if c.plan is not None for r in revised_rows(c.plan)]


def recovery_json(rec: Recovery) -> dict:
    direct = rec.project.normal_direct_cost

    def course(c):
        out = {"course": c.label, "possible": c.possible, "note": c.note}
        if c.possible:
            out.update({"finish": c.finish, "finish_date": iso(c.finish_date),
                        "added_cost": money_value(c.added_cost),
                        "contract_damages": money_value(c.contract_damages),
                        "milestone_damages": money_value(c.milestone_damages),
                        "indirect_cost": money_value(c.indirect), "bonus": money_value(c.bonus),
                        "damages_avoided": money_value(c.damages_avoided),
                        "indirect_saved": money_value(c.indirect_saved),
                        "bonus_gained": money_value(c.bonus_gained), "net_effect": money_value(c.net_effect),
                        # the same sum as best's total_cost: direct (normal + added) + indirect
                        # + damages - bonus
                        "direct_cost": money_value(direct + c.added_cost),
                        "total_cost": money_value(direct + c.total_cost),
                        "instructions": instructions(c.plan),
                        "plan": None if c.plan is None else plan_json(c.plan)})
        return out

    return {
        "project": rec.project.name,
        "data_date": iso(rec.data_date),
        "forecast_finish": rec.forecast_finish,
        "forecast_finish_date": iso(rec.forecast_date),
        "contract_finish": iso(rec.contract_finish),
        "days_late": rec.days_late,
        "milestones": [{"id": m.id, "name": m.name, "deadline": iso(m.deadline), "forecast": iso(m.forecast),
                        "days_late": m.days_late, "damages": money_value(m.damages)} for m in rec.milestones],
        "courses": [course(c) for c in rec.courses],
        "warnings": list(rec.warnings),
        "notes": list(rec.notes),
    }


# -- the schedule check --------------------------------------------------------------
def quality_json(report: QualityReport) -> dict:
    """The schedule-quality check: a summary and every measure with its threshold."""
    return {
        "summary": report.summary(),
        "passed": not report.failed,
        "measures": [{"measure": m.key, "title": m.title, "assessed": m.assessed, "passed": m.passed,
                      "count": m.count, "of": m.base, "unit": m.unit,
                      "share": None if m.share is None else round(m.share, 4),
                      "threshold": m.limit, "at_least": m.at_least, "items": list(m.items),
                      "fix": m.fix, "note": m.note} for m in report.measures],
        "thresholds": dict(report.thresholds),
    }


# -- a proposal priced ---------------------------------------------------------------
def price_json(priced: PricedProposal) -> dict:
    """A priced proposal; ``leanest`` and ``least_cost_plan`` as a plan's ``activities``."""
    def opt(x):
        return None if x is None else money_value(x)

    plan = priced.plan
    return {
        "project": priced.project.name,
        "currency": priced.project.currency,
        "proposal": priced.source or None,
        "normal_finish": plan.normal_finish,
        "normal_finish_date": iso(plan.normal_finish_date),
        "finish": priced.finish,
        "finish_date": iso(priced.finish_date),
        "proposal_cost": money_value(priced.proposal_cost),
        "asked_cost": opt(priced.asked_cost),
        "least_cost": money_value(priced.least_cost),
        "excess": money_value(priced.excess),
        "asked_excess": opt(priced.asked_excess),
        "milestone_damages": money_value(plan.milestone_damages),
        "no_effect": list(priced.no_effect),
        "lines": [{"id": x.id, "name": x.name, "trade": x.trade, "shortened_by": x.shortened_by,
                   "option": x.option or None, "option_note": x.option_note or None,
                   "added_cost": money_value(x.added_cost), "asked_cost": opt(x.asked_cost),
                   "finish_without": x.finish_without, "buys": x.buys(priced.finish)} for x in priced.lines],
        "leanest": plan_activities(priced.leanest),
        "leanest_cost": money_value(priced.leanest.added_cost),
        "least_cost_plan": plan_activities(priced.least_cost_plan),
        "missed": [{"id": m.id, "name": m.name, "trade": m.trade, "proposed": m.proposed,
                    "shortened_by": m.shortened_by, "option": m.option or None,
                    "added_cost": money_value(m.added_cost)} for m in priced.missed],
        "cautions": list(plan.cautions),
        "notes": list(priced.notes),
        "schedule": revised_rows(plan),
    }
