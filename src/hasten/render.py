"""Results as text a person reads: tables (tabulate) and sentences. Nothing here prints,
computes a schedule or solves: every figure comes from the result objects; the CLI prints.
"""

from __future__ import annotations

from datetime import date
from typing import TYPE_CHECKING

from tabulate import tabulate

from .cpm import Schedule
from .project import Project
from .render_json import instructions, money, point_changes, schedule_rows

if TYPE_CHECKING:  # the optimiser is imported only by the commands that use it
    from .quality import Measure, QualityReport
    from .recovery import Recovery
    from .results import BestFinish, Curve, Plan

__all__ = ["money", "schedule_text", "plan_text", "curve_text", "best_text", "recovery_text", "quality_text"]


def _d(day: date) -> str:
    return day.isoformat()


def _finish_line(label: str, finish: int, day: date) -> str:
    return f"{label}: {finish} working days ({_d(day)})"


def schedule_text(project: Project, sched: Schedule) -> str:
    rows = schedule_rows(project, sched)
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
             f"{_d(sched.start_date)} to {_d(sched.finish_date)}"]
    if sched.deadline is not None:
        late = min((r.total_float for r in sched.activities if r.state != "finished"), default=0)
        lines.append(f"Deadline applied: {_d(sched.deadline_date)} ({sched.deadline} working days); the backward "
                     "pass starts there, so total float counts against it"
                     + (f" and is negative where the work is late (down to {late} working days)."
                        if late < 0 else "."))
    if progress:
        lines.append(f"Data date {_d(project.data_date)}: finished work shows its actual dates; "
                     "started work its actual start and forecast finish.")
    lines += ["Dates are the first and last day worked (a milestone: the day it happens, see README \"Method\"); "
              "floats in working days" + (" of each activity's own calendar; the project finish in "
                                          "working days of the project calendar." if own else ".")] + [f"Warning: {w}" for w in sched.warnings] + ["", table, ""]
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


# -- plans ---------------------------------------------------------------------------
def plan_text(plan: Plan, *, title: str = "Least-cost plan") -> str:
    project = plan.project
    cur = project.currency
    lines = [f"{title} for {project.name}",
             _finish_line("Current finish", plan.normal_finish, plan.normal_finish_date),
             _finish_line("Target", plan.target, plan.target_date),
             _finish_line("New finish", plan.finish, plan.finish_date)]
    lines += _proof(plan, cur)
    if not plan.changed:
        lines += ["No acceleration needed: the current plan already finishes by the target.",
                  f"Added direct cost: {money(0, cur)}"]
        return "\n".join(lines)
    with_options = any(a.option for a in plan.changed)
    own = bool(project.calendars)
    rows = [[a.id, a.name, a.trade] + ([a.calendar] if own else [])
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
              tabulate([[t.trade, t.shortened_by, money(t.added_cost)] for t in plan.trades],
                       headers=["trade", "days shortened", "added cost"], tablefmt="simple", disable_numparse=True),
              ""]
    lines += ["After acceleration:"] + _paths(plan.schedule)
    if plan.next_day_cost is None and not plan.proven:
        lines.append("One more day: not priced, the solver was stopped by the time limit.")
    elif plan.next_day_cost is None:
        lines.append("One more day: not possible (or not proven in the time allowed).")
    else:
        lines.append(f"One more day earlier would cost {money(plan.next_day_cost, cur)} more.")
    if plan.cautions:
        lines += ["", "Cautions:"] + [f"- {c}" for c in plan.cautions]
    return "\n".join(lines)


def _proof(plan: Plan, cur: str) -> list[str]:
    """A plain statement when the plan is not proven optimal."""
    if plan.proven:
        return []
    return [f"NOT PROVEN OPTIMAL: the time limit stopped the solver. This is the best plan found "
            f"({money(plan.added_cost, cur)}); no plan can cost less than "
            f"{money(plan.bound if plan.bound is not None else float('nan'), cur)} "
            f"(gap {100 * (plan.gap or 0):.2f}%). Allow more time with --time-limit for a proof."]


# -- the curve -----------------------------------------------------------------------
def curve_text(curve: Curve) -> str:
    cur = curve.project.currency
    damages = curve.milestone_damages_apply  # interim milestones with damages: what is paid at each finish
    table = tabulate([[p.finish, _d(p.finish_date), money(p.added_cost)]
                      + ([money(p.milestone_damages)] if damages else []) + [money(p.day_cost), point_changes(p)]
                      for p in curve],
                     headers=["finish (days)", "finish date", "added cost"]
                     + (["milestone damages"] if damages else []) + ["cost of this day", "changes (days)"],
                     tablefmt="simple", disable_numparse=True)
    shortest = ("" if curve.shortest_finish is None
                else f", shortest possible {curve.shortest_finish}")
    return "\n".join([f"Least-cost curve for {curve.project.name}{f' ({cur})' if cur else ''}; "
                      f"normal finish {curve.normal_finish}{shortest} "
                      "working days" + ("; each point trades acceleration against milestone damages"
                                        if damages else ""), table])


# -- best total cost -----------------------------------------------------------------
def best_text(best: BestFinish, *, around: int = 5) -> str:
    project = best.plan.project
    cur = project.currency
    contract = project.contract
    rows = list(best.table)
    k = next(i for i, r in enumerate(rows) if r.finish == best.point.finish)
    shown = rows[max(0, k - around): k + around + 1]
    table = tabulate(
        [[("* " if r.finish == best.point.finish else "  ") + str(r.finish), _d(r.finish_date),
          money(r.added_cost), money(r.time.indirect), money(r.time.damages + r.milestone_damages),
          money(r.time.bonus), money(r.total_cost)] for r in shown],
        headers=["finish (days)", "finish date", "added direct", "indirect", "damages", "bonus",
                 "total cost"], tablefmt="simple", disable_numparse=True)
    lines = [f"Least total cost for {project.name}",
             _finish_line("Current finish", best.current.finish, best.current.finish_date)]
    if contract.finish:
        lines.append(f"Contract finish: {_d(contract.finish)}; damages {money(contract.damages_per_day, cur)} "
                     f"and bonus {money(contract.bonus_per_day, cur)} per calendar day")
    lines += [f"Best finish: {best.point.finish} working days ({_d(best.point.finish_date)}), "
              f"total cost {money(best.point.total_cost, cur)}",
              "", table, "", plan_text(best.plan, title="Plan at the best finish")]
    return "\n".join(lines)


# -- recovery ------------------------------------------------------------------------
def _course_row(c, cur: str) -> list[str]:
    if not c.possible:
        return [c.label, "not possible", "", "", "", "", "", ""]
    return [c.label, f"{c.finish} ({_d(c.finish_date)})", money(c.added_cost),
            money(c.contract_damages + c.milestone_damages), money(c.damages_avoided),
            money(c.indirect_saved), money(c.bonus_gained), money(c.net_effect)]


def recovery_text(rec: Recovery) -> str:
    cur = rec.project.currency
    lines = [f"Recovery for {rec.project.name}"]
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
                           headers=["course", "finish (days, date)", "added cost", "damages",
                                    "damages avoided", "indirect saved", "bonus gained", "net effect"],
                           tablefmt="simple", disable_numparse=True),
              "Net effect = damages avoided + indirect saved + bonus gained - added cost, "
              "against doing nothing; positive saves money."]
    for c in rec.courses:
        if not c.possible:
            lines += ["", f"{c.label}: {c.note}."]
        elif c.plan is not None and c.plan.changed:
            lines += ["", f"{c.label} ({c.note}):"] + [f"- {t}" for t in instructions(c.plan)]
            if not c.plan.proven:
                lines += _proof(c.plan, cur)
    plans = [c.plan for c in rec.courses if c.plan is not None and c.plan.changed]
    cautions = []
    for p in plans:
        for text in p.cautions:
            if text not in cautions:
                cautions.append(text)
    if cautions:
        lines += ["", "Cautions:"] + [f"- {c}" for c in cautions]
    return "\n".join(lines)


# -- the schedule check --------------------------------------------------------------
def _limit(m: Measure) -> str:
    if m.unit == "test":
        return "finish moves by the delay"
    return f"{'at least' if m.at_least else 'at most'} {100 * m.limit:g}%"


def quality_text(report: QualityReport, *, shown: int = 10) -> str:
    """The schedule-quality check as a table of measures, then what each failing measure
    concerns and how to fix it (at most ``shown`` items each)."""
    rows = []
    for m in report.measures:
        if not m.assessed:
            rows.append([m.title, "", "", "", _limit(m), "not assessed"])
        elif m.unit == "test":
            rows.append([m.title, "", "", "", _limit(m), "pass" if m.passed else "FAIL"])
        else:
            rows.append([m.title, m.count, f"{m.base} {m.unit}", f"{100 * m.share:.1f}%", _limit(m),
                         "pass" if m.passed else "FAIL"])
    lines = [f"Schedule check: {report.summary()}.",
             "Thresholds: the commonly used values of a published schedule assessment (from memory; "
             "README \"Schedule check\").", "",
             tabulate(rows, headers=["measure", "count", "of", "share", "threshold", "result"],
                      tablefmt="simple", disable_numparse=True)]
    for m in report.measures:
        if not m.assessed:
            lines += ["", f"{m.title}: {m.note}."]
            continue
        if m.passed and not (m.items and m.key == "open_ends"):
            continue
        head = f"{m.title} ({'FAIL' if not m.passed else 'within the threshold'})"
        lines += ["", head + (f": {m.note}" if m.note else "")]
        items = list(m.items[:shown]) + ([f"... and {len(m.items) - shown} more"] if len(m.items) > shown else [])
        lines += [f"- {item}" for item in items if m.unit != "test" or item != m.note]
        if not m.passed:
            lines.append(f"Fix: {m.fix}.")
    return "\n".join(lines)
