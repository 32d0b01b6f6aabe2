"""Results as JSON-ready dicts and table rows (what a program reads). Nothing here prints,
computes a schedule or solves: every figure comes from the result objects.
"""

from __future__ import annotations

from datetime import date
from typing import TYPE_CHECKING

import numpy as np

from .calendar import CalendarClock, Timeline
from .cpm import Schedule
from .progress import shown_days
from .project import Project

if TYPE_CHECKING:  # the optimiser is imported only by the commands that use it
    from .quality import QualityReport
    from .recovery import Recovery
    from .results import BestFinish, Curve, CurvePoint, Plan

__all__ = [
    "money_value", "iso", "schedule_rows", "schedule_json", "plan_json", "curve_rows", "curve_json",
    "best_json", "recovery_json", "instructions", "money", "quality_json",
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
    return clock.iso_dates(first), clock.iso_dates(last)


def _row_dates(project: Project, timeline: Timeline, rs, field: str, other: str, states=None,
               late: bool = False):
    """Dates of one (start, finish) pair of every row, each in its activity's own calendar."""
    starts = [getattr(r, field) for r in rs]
    finishes = [getattr(r, other) for r in rs]
    milestones = [r.duration == 0 and a.duration == 0 for r, a in zip(rs, project.activities)] \
        if states else None
    if not timeline.several:
        return _dates(timeline.project_clock, starts, finishes, milestones, states, late)
    pos = {a.id: k for k, a in enumerate(project.activities)}
    cal = [timeline.of[pos[r.id]] for r in rs]
    first, last = [""] * len(rs), [""] * len(rs)
    for c in sorted(set(cal)):
        mine = [k for k, x in enumerate(cal) if x == c]
        f, g = _dates(timeline.clocks[c], [starts[k] for k in mine], [finishes[k] for k in mine],
                      None if milestones is None else [milestones[k] for k in mine],
                      None if states is None else [states[k] for k in mine], late)
        for k, a, b in zip(mine, f, g):
            first[k], last[k] = a, b
    return first, last


def schedule_rows(project: Project, sched: Schedule) -> list[dict]:
    """One row per activity with offsets and the dates a person reads (each activity's
    offsets and dates in its own calendar)."""
    acts = {a.id: a for a in project.activities}
    rs = sched.activities
    timeline = Timeline(project)
    states = sched.states or None
    es, ef = _row_dates(project, timeline, rs, "es", "ef", states)
    ls, lf = _row_dates(project, timeline, rs, "ls", "lf", states, late=True)
    rows = []
    for k, r in enumerate(rs):
        a = acts[r.id]
        rows.append({
            "id": r.id, "name": a.name, "trade": a.trade, "calendar": a.calendar or project.calendar.name,
            "duration": r.duration, "state": r.state,
            "es": r.es, "ef": r.ef, "ls": r.ls, "lf": r.lf,
            "early_start": es[k], "early_finish": ef[k], "late_start": ls[k], "late_finish": lf[k],
            "total_float": r.total_float, "free_float": r.free_float, "critical": r.critical,
            "driving": list(r.driving),
        })
    return rows


def schedule_json(project: Project, sched: Schedule) -> dict:
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
        "activities": schedule_rows(project, sched),
    }


# -- plans ---------------------------------------------------------------------------
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
        "activities": [{"id": a.id, "name": a.name, "trade": a.trade, "calendar": a.calendar,
                        "normal": a.normal, "duration": a.duration, "shortened_by": a.shortened_by,
                        "option": a.option or None, "option_note": a.option_note or None,
                        "added_cost": money_value(a.added_cost)}
                       for a in plan.activities],
        "trades": [{"trade": t.trade, "shortened_by": t.shortened_by,
                    "added_cost": money_value(t.added_cost)} for t in plan.trades],
        "critical_paths": [list(p) for p in plan.schedule.critical_paths],
        "cautions": list(plan.cautions),
        "notes": list(plan.notes),
    }


# -- the curve -----------------------------------------------------------------------
def point_changes(p: CurvePoint) -> str:
    """The day-to-day changes of a curve point in words."""
    text = [f"{i} {d:+d}" for i, d in p.changes]
    text += [f"{i} now {way or 'normal'}" for i, way in p.switches]
    return ", ".join(text) + ("" if p.proven else f" [not proven, gap {100 * (p.gap or 0):.1f}%]")


def curve_rows(curve: Curve) -> list[dict]:
    return [{"finish": p.finish, "finish_date": iso(p.finish_date),
             "added_cost": money_value(p.added_cost), "milestone_damages": money_value(p.milestone_damages),
             "day_cost": money_value(p.day_cost), "changes": point_changes(p)} for p in curve]


def curve_json(curve: Curve) -> dict:
    return {"normal_finish": curve.normal_finish, "shortest_finish": curve.shortest_finish,
            "points": [{"finish": p.finish, "finish_date": iso(p.finish_date),
                        "added_cost": money_value(p.added_cost),
                        "milestone_damages": money_value(p.milestone_damages),
                        "day_cost": money_value(p.day_cost),
                        "plan": [{"id": i, "shortened_by": d, "option": way or None} for i, d, way in p.plan],
                        "changes": [{"id": i, "days": d} for i, d in p.changes],
                        "switches": [{"id": i, "option": way or None} for i, way in p.switches],
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
        out.append(f"{a.trade or '(no trade)'}: {verb} {what} {rest} at {money(a.added_cost, currency)}")
    return out


def recovery_json(rec: Recovery) -> dict:
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
                        "total_cost": money_value(c.total_cost),
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
