"""Turn results into what a person reads (text tables) or a program reads (JSON-ready
dicts, table rows). Nothing here prints; the CLI does.
"""

from __future__ import annotations

from datetime import date

from tabulate import tabulate

from typing import TYPE_CHECKING

from .calendar import CalendarClock, Timeline
from .cautions import plan_cautions
from .project import Project
from .cpm import Schedule

if TYPE_CHECKING:  # the optimiser is imported only by the commands that use it
    from .crashing import BestFinish, CurvePoint, Plan, Study

__all__ = [
    "money",
    "schedule_rows",
    "schedule_text",
    "schedule_json",
    "plan_text",
    "plan_json",
    "curve_text",
    "curve_json",
    "curve_rows",
    "best_text",
    "best_json",
    "instructions",
    "recovery_text",
    "recovery_json",
]


def money(x: float, currency: str = "") -> str:
    text = f"{x:,.0f}" if abs(x - round(x)) < 0.005 else f"{x:,.2f}"
    return f"{text} {currency}".rstrip()


def _r(x: float) -> float:
    """Money for JSON: two decimals, no float noise."""
    return round(x + 0.0, 2)


def _d(day: date) -> str:
    return day.isoformat()


def _dates(clock: CalendarClock, starts: list[int], finishes: list[int]) -> tuple[list[str], list[str]]:
    """First and last day worked for each (start, finish) pair, in two vectorised calls.

    A milestone (start == finish) is dated on the last working day before it, like the
    project finish: the day its predecessors end."""
    first = clock.iso_dates([f - 1 if f == s and s > 0 else s for s, f in zip(starts, finishes)])
    last = clock.iso_dates([max(f - 1, 0) if f > s else max(s - 1, 0) for s, f in zip(starts, finishes)])
    return first, last


def _row_dates(project: Project, timeline: Timeline, rs, clock: CalendarClock, field: str, other: str):
    """Dates of one (start, finish) pair of every row, each in its activity's own calendar."""
    starts = [getattr(r, field) for r in rs]
    finishes = [getattr(r, other) for r in rs]
    if not timeline.several:
        return _dates(clock, starts, finishes)
    pos = {a.id: k for k, a in enumerate(project.activities)}
    cal = [timeline.of[pos[r.id]] for r in rs]
    first, last = [""] * len(rs), [""] * len(rs)
    for c in sorted(set(cal)):
        mine = [k for k, x in enumerate(cal) if x == c]
        f, g = _dates(timeline.clocks[c], [starts[k] for k in mine], [finishes[k] for k in mine])
        for k, a, b in zip(mine, f, g):
            first[k], last[k] = a, b
    return first, last


def schedule_rows(project: Project, sched: Schedule, clock: CalendarClock) -> list[dict]:
    """One row per activity with offsets and the dates a person reads (each activity's
    offsets and dates in its own calendar)."""
    acts = {a.id: a for a in project.activities}
    rs = sched.activities
    timeline = Timeline(project)
    es, ef = _row_dates(project, timeline, rs, clock, "es", "ef")
    ls, lf = _row_dates(project, timeline, rs, clock, "ls", "lf")
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


def schedule_text(project: Project, sched: Schedule, clock: CalendarClock, warnings=()) -> str:
    rows = schedule_rows(project, sched, clock)
    progress = project.data_date is not None
    own = any(a.calendar for a in project.activities)  # some activities have their own calendar
    table = tabulate(
        [[r["id"], r["name"], r["trade"]] + ([r["calendar"]] if own else []) + ([r["state"]] if progress else [])
         + [r["duration"], r["early_start"], r["early_finish"], r["late_start"], r["late_finish"],
            r["total_float"], r["free_float"], "yes" if r["critical"] else ""] for r in rows],
        headers=["id", "name", "trade"] + (["calendar"] if own else []) + (["status"] if progress else [])
        + [("days left" if progress else "days"), "early start", "early finish", "late start",
           "late finish", "total float", "free float", "critical"],
        tablefmt="simple", disable_numparse=True)
    lines = [f"{project.name}: {sched.finish} working days, "
             f"{_d(clock.start_date(0))} to {_d(clock.project_finish_date(sched.finish))}"]
    if progress:
        lines.append(f"Data date {_d(project.data_date)}: finished work shows its actual dates; "
                     "started work its actual start and forecast finish.")
    lines += ["Dates are the first and last day worked (a milestone: the day its predecessors end); "
              "floats in working days" + (" of each activity's own calendar; the project finish in "
                                          "working days of the project calendar." if own else ".")] + [f"Warning: {w}" for w in warnings] + ["", table, ""]
    lines += _paths(sched)
    return "\n".join(lines)


def _paths(sched: Schedule) -> list[str]:
    out = []
    for k, path in enumerate(sched.critical_paths, 1):
        out.append(f"Critical path {k}: " + " -> ".join(path))
    if sched.paths_truncated:
        out.append(f"(only the first {len(sched.critical_paths)} critical paths are listed)")
    for k, path in enumerate(sched.longest_paths, 1):
        out.append(f"Longest path {k} (driving links back from the finish): " + " -> ".join(path))
    return out


def schedule_json(project: Project, sched: Schedule, clock: CalendarClock, warnings=()) -> dict:
    return {
        "project": project.name,
        "start_date": _d(clock.start_date(0)),
        "finish": sched.finish,
        "finish_date": _d(clock.project_finish_date(sched.finish)),
        "data_date": None if project.data_date is None else _d(project.data_date),
        "deadline": sched.deadline,
        "critical_paths": [list(p) for p in sched.critical_paths],
        "critical_paths_truncated": sched.paths_truncated,
        "longest_paths": [list(p) for p in sched.longest_paths],
        "warnings": list(warnings),
        "activities": schedule_rows(project, sched, clock),
    }


# -- plans ---------------------------------------------------------------------------
def _finish_line(study: Study, label: str, finish: int) -> str:
    return f"{label}: {finish} working days ({_d(study.clock.project_finish_date(finish))})"


def _cautions(plan: Plan, project: Project) -> list[str]:
    timeline = Timeline(project)
    pos = {a.id: k for k, a in enumerate(project.activities)}
    seven = [a.name or a.id for a in plan.changed if a.duration < a.normal
             and len(timeline.clock_of(pos[a.id]).calendar.workdays) == 7]
    return plan_cautions(((a.name, a.trade, a.normal, a.duration) for a in plan.changed), seven_day=seven)


def plan_text(study: Study, plan: Plan, *, title: str = "Least-cost plan") -> str:
    cur = study.project.currency
    lines = [f"{title} for {study.project.name}",
             _finish_line(study, "Current finish", plan.normal_finish),
             _finish_line(study, "Target", plan.target),
             _finish_line(study, "New finish", plan.finish)]
    lines += _proof(plan, cur)
    if not plan.changed:
        lines += ["No acceleration needed: the current plan already finishes by the target.",
                  f"Added direct cost: {money(0, cur)}"]
        return "\n".join(lines)
    with_options = any(a.option for a in plan.changed)
    own = {a.id: a.calendar for a in study.project.activities} if study.project.calendars else None
    rows = [[a.id, a.name, a.trade] + ([own[a.id] or study.project.calendar.name] if own else [])
            + ([a.option or "normal"] if with_options else [])
            + [a.normal, a.duration, a.shortened_by, money(a.added_cost)] for a in plan.changed]
    headers = (["id", "name", "trade"] + (["calendar"] if own else []) + (["way"] if with_options else [])
               + ["normal days", "new days", "shortened by", "added cost"])
    lines += [f"Added direct cost: {money(plan.added_cost, cur)} "
              f"(direct cost {money(plan.normal_direct_cost, cur)} -> {money(plan.direct_cost, cur)})",
              "",
              tabulate(rows, headers=headers, tablefmt="simple", disable_numparse=True),
              "",
              "By trade:",
              tabulate([[t.trade, t.shortened_days, money(t.added_cost)] for t in plan.trades],
                       headers=["trade", "days shortened", "added cost"], tablefmt="simple", disable_numparse=True),
              ""]
    lines += ["After acceleration:"] + _paths(plan.schedule)
    if plan.next_day_cost is None and not plan.proven:
        lines.append("One more day: not priced, the solver was stopped by the time limit.")
    elif plan.next_day_cost is None:
        lines.append("One more day: not possible (or not proven in the time allowed).")
    else:
        lines.append(f"One more day earlier would cost {money(plan.next_day_cost, cur)} more.")
    cautions = _cautions(plan, study.project)
    if cautions:
        lines += ["", "Cautions:"] + [f"- {c}" for c in cautions]
    return "\n".join(lines)


def _proof(plan: Plan, cur: str) -> list[str]:
    """A plain statement when the plan is not proven optimal."""
    if plan.proven:
        return []
    return [f"NOT PROVEN OPTIMAL: the time limit stopped the solver. This is the best plan found "
            f"({money(plan.added_cost, cur)}); no plan can cost less than "
            f"{money(plan.bound if plan.bound is not None else float('nan'), cur)} "
            f"(gap {100 * (plan.gap or 0):.2f}%). Allow more time with --time-limit for a proof."]


def plan_json(study: Study, plan: Plan) -> dict:
    own = {a.id: a.calendar for a in study.project.activities}  # "" = the project calendar
    default = study.project.calendar.name
    clock = study.clock
    return {
        "project": study.project.name,
        "currency": study.project.currency,
        "target": plan.target,
        "target_date": _d(clock.project_finish_date(plan.target)),
        "finish": plan.finish,
        "finish_date": _d(clock.project_finish_date(plan.finish)),
        "normal_finish": plan.normal_finish,
        "normal_finish_date": _d(clock.project_finish_date(plan.normal_finish)),
        "added_cost": _r(plan.added_cost),
        "direct_cost": _r(plan.direct_cost),
        "next_day_cost": None if plan.next_day_cost is None else _r(plan.next_day_cost),
        "proven_optimal": plan.proven,
        "lower_bound": None if plan.bound is None else _r(plan.bound),
        "gap": plan.gap,
        "activities": [{"id": a.id, "name": a.name, "trade": a.trade, "calendar": own.get(a.id) or default,
                        "normal": a.normal,
                        "duration": a.duration, "shortened_by": a.shortened_by,
                        "option": a.option or None, "added_cost": _r(a.added_cost)}
                       for a in plan.activities],
        "trades": [{"trade": t.trade, "shortened_days": t.shortened_days,
                    "added_cost": _r(t.added_cost)} for t in plan.trades],
        "critical_paths": [list(p) for p in plan.schedule.critical_paths],
        "cautions": _cautions(plan, study.project),
    }


# -- the curve -----------------------------------------------------------------------
def _changes(p: CurvePoint) -> str:
    text = [f"{i} {d:+d}" for i, d in p.changes]
    text += [f"{i} now {way or 'normal'}" for i, way in p.switches]
    return ", ".join(text) + ("" if p.proven else f" [not proven, gap {100 * (p.gap or 0):.1f}%]")


def curve_rows(study: Study, points: list[CurvePoint]) -> list[dict]:
    return [{"finish": p.finish, "finish_date": _d(study.clock.project_finish_date(p.finish)),
             "added_cost": _r(p.added_cost), "milestone_damages": _r(p.penalty), "day_cost": _r(p.day_cost),
             "changes": _changes(p)} for p in points]


def curve_text(study: Study, points: list[CurvePoint]) -> str:
    cur = study.project.currency
    damages = study.penalised  # interim milestones with damages: show what is paid at each finish
    table = tabulate([[p.finish, _d(study.clock.project_finish_date(p.finish)), money(p.added_cost)]
                      + ([money(p.penalty)] if damages else []) + [money(p.day_cost), _changes(p)]
                      for p in points],
                     headers=["finish (days)", "finish date", "added cost"]
                     + (["milestone damages"] if damages else []) + ["cost of this day", "changes (days)"],
                     tablefmt="simple", disable_numparse=True)
    return "\n".join([f"Least-cost curve for {study.project.name} ({cur or 'money'}); "
                      f"normal finish {study.normal_finish}, shortest possible {study.shortest_finish} "
                      "working days" + ("; each point trades acceleration against milestone damages"
                                        if damages else ""), table])


def curve_json(study: Study, points: list[CurvePoint]) -> dict:
    return {"normal_finish": study.normal_finish, "shortest_finish": study.shortest_finish,
            "points": [{"finish": p.finish, "added_cost": _r(p.added_cost), "milestone_damages": _r(p.penalty),
                        "day_cost": _r(p.day_cost),
                        "changes": [{"id": i, "days": d} for i, d in p.changes],
                        "switches": [{"id": i, "option": way or None} for i, way in p.switches],
                        "proven_optimal": p.proven, "gap": p.gap} for p in points]}


# -- best total cost -----------------------------------------------------------------
def best_text(study: Study, best: BestFinish, *, around: int = 5) -> str:
    cur = study.project.currency
    contract = study.project.contract
    rows = list(best.table)
    k = next(i for i, r in enumerate(rows) if r.finish == best.best.finish)
    shown = rows[max(0, k - around): k + around + 1]
    table = tabulate(
        [[("* " if r.finish == best.best.finish else "  ") + str(r.finish), _d(r.finish_date),
          money(r.added_cost), money(r.time.indirect), money(r.time.damages + r.milestone_damages),
          money(r.time.bonus), money(r.total_cost)] for r in shown],
        headers=["finish (days)", "finish date", "added direct", "indirect", "damages", "bonus",
                 "total cost"], tablefmt="simple", disable_numparse=True)
    lines = [f"Least total cost for {study.project.name}",
             _finish_line(study, "Current finish", study.normal_finish)]
    if contract.finish:
        lines.append(f"Contract finish: {_d(contract.finish)}; damages {money(contract.damages_per_day, cur)} "
                     f"and bonus {money(contract.bonus_per_day, cur)} per calendar day")
    lines += [f"Best finish: {best.best.finish} working days ({_d(best.best.finish_date)}), "
              f"total cost {money(best.best.total_cost, cur)}",
              "", table, "", plan_text(study, best.plan, title="Plan at the best finish")]
    return "\n".join(lines)


def best_json(study: Study, best: BestFinish) -> dict:
    b = best.best

    def row(r):
        return {"finish": r.finish, "finish_date": _d(r.finish_date), "total_cost": _r(r.total_cost),
                "direct_cost": _r(r.direct_cost), "added_cost": _r(r.added_cost),
                "indirect_cost": _r(r.time.indirect), "damages": _r(r.time.damages),
                "milestone_damages": _r(r.milestone_damages), "bonus": _r(r.time.bonus)}

    out = row(b)
    out["table"] = [row(r) for r in best.table]
    out["plan"] = plan_json(study, best.plan)
    return out


# -- recovery ------------------------------------------------------------------------
def instructions(plan: Plan | None, currency: str = "") -> list[str]:
    """Per-trade instructions: "electrical: shorten 'Level 3 rough-in' by 4 working days at 7,200"."""
    if plan is None:
        return []
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


def _course_row(c, cur: str) -> list[str]:
    if not c.possible:
        return [c.label, "not possible", "", "", "", "", "", ""]
    return [c.label, f"{c.finish} ({_d(c.finish_date)})", money(c.acceleration_cost),
            money(c.contract_damages + c.milestone_damages), money(c.damages_avoided),
            money(c.indirect_saved), money(c.bonus_gained), money(c.net_effect)]


def recovery_text(study: Study, rec) -> str:
    cur = study.project.currency
    lines = [f"Recovery for {study.project.name}"]
    if rec.data_date:
        lines.append(f"Data date: {_d(rec.data_date)}")
    lines.append(f"Forecast finish: {rec.forecast_finish} working days ({_d(rec.forecast_date)})")
    if rec.contract_finish:
        state = (f"{rec.days_late} calendar day{'' if rec.days_late == 1 else 's'} late" if rec.days_late else "on time")
        lines.append(f"Contract finish: {_d(rec.contract_finish)}: forecast {state}")
    for m in rec.milestones:
        state = f"{m.days_late} calendar day{'' if m.days_late == 1 else 's'} late, damages {money(m.damages, cur)}" if m.days_late else "on time"
        lines.append(f"Milestone {m.id} {m.name}: deadline {_d(m.deadline)}, forecast {_d(m.forecast)}: {state}")
    for w in rec.warnings:
        lines.append(f"Warning: {w}")
    lines += ["", tabulate([_course_row(c, cur) for c in rec.courses],
                           headers=["course", "finish (days, date)", "acceleration", "damages",
                                    "damages avoided", "indirect saved", "bonus gained", "net effect"],
                           tablefmt="simple", disable_numparse=True),
              "Net effect = damages avoided + indirect saved + bonus gained - acceleration cost, "
              "against doing nothing; positive saves money."]
    for c in rec.courses:
        if not c.possible:
            lines += ["", f"{c.label}: {c.note}."]
        elif c.plan is not None and c.plan.changed:
            lines += ["", f"{c.label} ({c.note}):"] + [f"- {t}" for t in instructions(c.plan, cur)]
            if not c.plan.proven:
                lines += _proof(c.plan, cur)
    plans = [c.plan for c in rec.courses if c.plan is not None and c.plan.changed]
    cautions = []
    for p in plans:
        for text in _cautions(p, study.project):
            if text not in cautions:
                cautions.append(text)
    if cautions:
        lines += ["", "Cautions:"] + [f"- {c}" for c in cautions]
    return "\n".join(lines)


def recovery_json(study: Study, rec) -> dict:
    def course(c):
        out = {"course": c.label, "possible": c.possible, "note": c.note}
        if c.possible:
            out.update({"finish": c.finish, "finish_date": _d(c.finish_date),
                        "acceleration_cost": _r(c.acceleration_cost), "contract_damages": _r(c.contract_damages),
                        "milestone_damages": _r(c.milestone_damages), "indirect_cost": _r(c.indirect),
                        "bonus": _r(c.bonus), "damages_avoided": _r(c.damages_avoided),
                        "indirect_saved": _r(c.indirect_saved), "bonus_gained": _r(c.bonus_gained),
                        "net_effect": _r(c.net_effect), "total_cost": _r(c.total_cost),
                        "instructions": instructions(c.plan, study.project.currency),
                        "plan": None if c.plan is None else plan_json(study, c.plan)})
        return out

    return {
        "project": study.project.name,
        "data_date": None if rec.data_date is None else _d(rec.data_date),
        "forecast_finish": rec.forecast_finish,
        "forecast_finish_date": _d(rec.forecast_date),
        "contract_finish": None if rec.contract_finish is None else _d(rec.contract_finish),
        "days_late": rec.days_late,
        "milestones": [{"id": m.id, "name": m.name, "deadline": _d(m.deadline), "forecast": _d(m.forecast),
                        "days_late": m.days_late, "damages": _r(m.damages)} for m in rec.milestones],
        "courses": [course(c) for c in rec.courses],
        "warnings": list(rec.warnings),
    }
