"""Results as text a person reads: tables and sentences. Nothing here prints,
computes a schedule or solves: every figure comes from the result objects; the CLI prints.

Every table fits in 100 columns (:mod:`hasten.render_fit`): long names are shortened with an
ellipsis and long lists wrapped; ``wide=True`` shows them whole. Sentences are wrapped at
100 columns too.
"""

from __future__ import annotations

import textwrap
from datetime import date
from operator import attrgetter
from typing import TYPE_CHECKING

from .cpm import Schedule
from .project import Project
from .render_fit import WIDTH, columns_table, table
from .render_json import (SCHEDULE_COLUMNS, days, instructions, money, option_note, point_changes, point_plan,
                          revised_rows, schedule_columns)

if TYPE_CHECKING:  # the optimiser is imported only by the commands that use it
    from .price import PricedProposal
    from .quality import Measure, QualityReport
    from .recovery import Recovery
    from .results import BestFinish, Curve, Plan

__all__ = ["money", "schedule_text", "plan_text", "revised_text", "curve_text", "best_text",
           "recovery_text", "price_text", "quality_text", "para", "bullets", "way_text"]


def _d(day: date) -> str:
    return day.isoformat()


def _finish_line(label: str, finish: int, day: date) -> str:
    return f"{label}: {finish} working days ({_d(day)})"


def para(text: str, wide: bool = False, indent: str = "") -> str:
    """A sentence or paragraph wrapped at 100 columns (whole with ``wide``)."""
    if wide:
        return indent + text
    return textwrap.fill(text, WIDTH, initial_indent=indent, subsequent_indent=" " * len(indent),
                         break_on_hyphens=False, break_long_words=False)


def bullets(items, wide: bool = False) -> list[str]:
    """``- item`` lines, each wrapped with a hanging indent."""
    out = []
    for item in items:
        text = para(item, wide, "- ")
        out.append(text)
    return out


def way_text(option: str, note: str) -> str:
    """An option and its note from options.csv, as shown beside a chosen option."""
    if not option:
        return "normal"
    return f"{option} ({note})" if note else option


_STATE = {"finished": "done", "not started": "to do"}  # progress states, short in the text table


def schedule_text(project: Project, sched: Schedule, *, wide: bool = False) -> str:
    columns = dict(zip(SCHEDULE_COLUMNS, schedule_columns(project, sched)))
    progress = project.data_date is not None
    own = any(map(attrgetter("calendar"), project.activities))  # some have a calendar of their own
    head = ["id", "name", "trade"] + (["calendar"] if own else []) + (["status"] if progress else [])
    first = ["id", "name", "trade"] + (["calendar"] if own else [])
    states = list(columns["state"])
    body = columns_table(
        [list(columns[k]) for k in first] + ([list(map(_STATE.get, states, states))] if progress else [])
        + [list(columns[k]) for k in ("duration", "early_start", "early_finish", "late_start", "late_finish",
                                      "total_float", "free_float")]
        + [["yes" if c else "" for c in columns["critical"]]],
        head + [("days\nleft" if progress else "days"), "early\nstart", "early\nfinish", "late\nstart",
                "late\nfinish", "total\nfloat", "free\nfloat", "crit-\nical"],
        shorten=list(range(1, len(head))), optional=[2], wide=wide)
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
                                          "working days of the project calendar." if own else ".")]
    lines = [para(x, wide) for x in lines] + bullets([f"Warning: {w}" for w in sched.warnings], wide)
    lines += ["", body, ""]
    lines += _paths(sched, wide)
    return "\n".join(lines)


def _paths(sched: Schedule, wide: bool = False) -> list[str]:
    out = []
    for k, path in enumerate(sched.critical_paths, 1):
        out.append(para(f"Critical path {k}: " + " -> ".join(path), wide))
    if sched.paths_truncated:
        out.append(f"(only the first {len(sched.critical_paths)} critical paths are listed)")
    for k, path in enumerate(sched.longest_paths, 1):
        out.append(para(f"Longest path {k} (driving links back from the finish): " + " -> ".join(path), wide))
    return out


# -- plans ---------------------------------------------------------------------------
def plan_text(plan: Plan, *, title: str = "Least-cost plan", wide: bool = False) -> str:
    project = plan.project
    cur = project.currency
    lines = [para(f"{title} for {project.name}", wide),
             _finish_line("Current finish", plan.normal_finish, plan.normal_finish_date),
             _finish_line("Target", plan.target, plan.target_date),
             _finish_line("New finish", plan.finish, plan.finish_date)]
    lines += [para(x, wide) for x in _proof(plan, cur)]
    if not plan.changed:
        lines += ["No acceleration needed: the current plan already finishes by the target.",
                  f"Added direct cost: {money(0, cur)}"]
        return "\n".join(lines)
    lines += [f"Added direct cost: {money(plan.added_cost, cur)} "
              f"(direct cost {money(plan.normal_direct_cost, cur)} -> {money(plan.direct_cost, cur)})",
              "", changes_table(plan, wide), "", "By trade:",
              table([[t.trade, t.shortened_by, money(t.added_cost)] for t in plan.trades],
                    ["trade", "days shortened", "added cost"], shorten=[0], wide=wide),
              "", revised_text(plan, wide=wide), ""]
    lines += ["After acceleration:"] + _paths(plan.schedule, wide)
    if plan.next_day_cost is None and not plan.proven:
        lines.append("One more day: not priced, the solver was stopped by the time limit.")
    elif plan.next_day_cost is None:
        lines.append("One more day: not possible (or not proven in the time allowed).")
    else:
        lines.append(f"One more day earlier would cost {money(plan.next_day_cost, cur)} more.")
    if plan.cautions:
        lines += ["", "Cautions:"] + bullets(plan.cautions, wide)
    return "\n".join(lines)


def changes_table(plan: Plan, wide: bool = False) -> str:
    """The shortened activities (and those done by an option, with the option's note)."""
    with_options = any(a.option for a in plan.changed)
    own = bool(plan.project.calendars)
    rows = [[a.id, a.name, a.trade] + ([a.calendar] if own else [])
            + ([a.option or "normal"] if with_options else [])
            + [a.normal, a.duration, a.shortened_by, money(a.added_cost)] for a in plan.changed]
    headers = (["id", "name", "trade"] + (["calendar"] if own else []) + (["way"] if with_options else [])
               + ["normal\ndays", "new\ndays", "shortened\nby", "added\ncost"])
    texts = list(range(1, 3 + own + with_options))
    body = table(rows, headers, shorten=texts, wide=wide)
    notes = [f"{a.id} by '{a.option}': {a.option_note}" for a in plan.changed if a.option and a.option_note]
    return "\n".join([body] + (["Option notes:"] + bullets(notes, wide) if notes else []))


def revised_text(plan: Plan, *, wide: bool = False) -> str:
    """The changed activities with their first and last day worked before and after."""
    rows = [r for r in revised_rows(plan) if r["shortened_by"] or r["option"]]
    body = table([[r["id"], r["name"], f"{r['normal']} -> {r['duration']}",
                   r["early_start_before"] or "", r["early_start"], r["early_finish_before"] or "",
                   r["early_finish"]] for r in rows],
                 ["id", "name", "days", "start\nbefore", "start\nafter", "finish\nbefore", "finish\nafter"],
                 shorten=[1], wide=wide)
    return "Revised schedule of the changed activities (first and last day worked):\n" + body


def _proof(plan: Plan, cur: str) -> list[str]:
    """A plain statement when the plan is not proven optimal."""
    if plan.proven:
        return []
    return [f"NOT PROVEN OPTIMAL: the time limit stopped the solver. This is the best plan found "
            f"({money(plan.added_cost, cur)}); no plan can cost less than "
            f"{money(plan.bound if plan.bound is not None else float('nan'), cur)} "
            f"(gap {100 * (plan.gap or 0):.2f}%). Allow more time with --time-limit for a proof."]


# -- the curve -----------------------------------------------------------------------
def curve_text(curve: Curve, *, wide: bool = False) -> str:
    cur = curve.project.currency
    damages = curve.milestone_damages_apply  # interim milestones with damages: what is paid at each finish
    body = table([[p.finish, _d(p.finish_date), money(p.added_cost)]
                  + ([money(p.milestone_damages)] if damages else [])
                  + [money(p.day_cost), point_plan(p) if p.plan else "", point_changes(p)]
                  for p in curve],
                 ["finish\n(days)", "finish date", "added\ncost"] + (["milestone\ndamages"] if damages else [])
                 + ["cost of\nthis day", "shortened (days)", "change from the day before"],
                 wrap=[4 + damages, 5 + damages], wide=wide, least=16)
    shortest = ("" if curve.shortest_finish is None
                else f", shortest possible {curve.shortest_finish}")
    head = para(f"Least-cost curve for {curve.project.name}{f' ({cur})' if cur else ''}; "
                f"normal finish {curve.normal_finish}{shortest} working days"
                + ("; each point trades acceleration against milestone damages" if damages else ""), wide)
    notes = _curve_options(curve)
    return "\n".join([head, body] + (["", "Options used:"] + bullets(notes, wide) if notes else []))


def _curve_options(curve: Curve) -> list[str]:
    """Each option chosen somewhere on the curve, with its note."""
    seen: dict[tuple[str, str], str] = {}
    for p in curve:
        for i, _, way in p.plan:
            if way and (i, way) not in seen:
                seen[(i, way)] = option_note(curve.project, i, way)
    return [f"{i} by '{way}'" + (f": {note}" if note else "") for (i, way), note in seen.items()]


# -- best total cost -----------------------------------------------------------------
def best_text(best: BestFinish, *, around: int = 5, wide: bool = False) -> str:
    project = best.plan.project
    cur = project.currency
    contract = project.contract
    rows = list(best.table)
    k = next(i for i, r in enumerate(rows) if r.finish == best.point.finish)
    near = rows[max(0, k - around): k + around + 1]
    current = best.current
    if all(r.finish != current.finish for r in near):
        near.append(current)
    shown = near[:1]
    for before, r in zip(near, near[1:]):
        if r.finish != before.finish + 1:
            shown.append(None)  # a gap: days not shown, or not priced (they cost more)
        shown.append(r)
    body = table(
        [["...", "", "", "", "", "", ""] if r is None else
         [("* " if r.finish == best.point.finish else "  ") + str(r.finish)
          + (" now" if r.finish == current.finish else ""), _d(r.finish_date),
          money(r.added_cost), money(r.time.indirect), money(r.time.damages + r.milestone_damages),
          money(r.time.bonus), money(r.total_cost)] for r in shown],
        ["finish\n(days)", "finish date", "added\ndirect", "indirect", "damages", "bonus", "total cost"],
        wide=wide)
    lines = [para(f"Least total cost for {project.name}", wide),
             _finish_line("Current finish", current.finish, current.finish_date)
             + f", total cost {money(current.total_cost, cur)}"]
    if contract.finish:
        lines.append(para(f"Contract finish: {_d(contract.finish)}; damages "
                          f"{money(contract.damages_per_day, cur)} and bonus "
                          f"{money(contract.bonus_per_day, cur)} per calendar day", wide))
    saving = best.saving
    if best.point.finish == current.finish:
        verdict = "the current finish already costs the least"
    elif saving > 0:
        verdict = f"saves {money(saving, cur)} against the current finish"
    else:
        verdict = f"costs {money(-saving, cur)} more than the current finish"
    lines += [para(f"Best finish: {best.point.finish} working days ({_d(best.point.finish_date)}), "
                   f"total cost {money(best.point.total_cost, cur)}: {verdict}", wide),
              para("Total cost = direct (normal + added) + indirect + damages - bonus; "
                   "* marks the best finish, 'now' the current one"
                   + ("; '...': days not shown or not priced (none can cost less than the best)."
                      if None in shown else "."), wide),
              "", body, "", plan_text(best.plan, title="Plan at the best finish", wide=wide)]
    return "\n".join(lines)


# -- recovery ------------------------------------------------------------------------
def _course_row(c) -> list[str]:
    if not c.possible:
        return [c.label, "not possible", "", "", "", "", "", ""]
    return [c.label, f"{c.finish} ({_d(c.finish_date)})", money(c.added_cost),
            money(c.contract_damages + c.milestone_damages), money(c.damages_avoided),
            money(c.indirect_saved), money(c.bonus_gained), money(c.net_effect)]


def recovery_text(rec: Recovery, *, wide: bool = False) -> str:
    cur = rec.project.currency
    lines = [para(f"Recovery for {rec.project.name}", wide)]
    if rec.data_date:
        lines.append(f"Data date: {_d(rec.data_date)}")
    lines.append(f"Forecast finish: {rec.forecast_finish} working days ({_d(rec.forecast_date)})")
    if rec.contract_finish:
        state = (f"{rec.days_late} calendar day{'' if rec.days_late == 1 else 's'} late" if rec.days_late else "on time")
        lines.append(f"Contract finish: {_d(rec.contract_finish)}: forecast {state}")
    for m in rec.milestones:
        state = (f"{days(m.days_late).replace('day', 'calendar day')} late, damages {money(m.damages, cur)}"
                 if m.days_late else "on time")
        lines.append(para(f"Milestone {m.id} {m.name}: deadline {_d(m.deadline)}, "
                          f"forecast {_d(m.forecast)}: {state}", wide))
    lines += bullets([f"Warning: {w}" for w in rec.warnings], wide)
    lines += ["", table([_course_row(c) for c in rec.courses],
                        ["course", "finish\n(days, date)", "added\ncost", "damages", "damages\navoided",
                         "indirect\nsaved", "bonus\ngained", "net\neffect"], shorten=[0], wide=wide),
              para("Net effect = damages avoided + indirect saved + bonus gained - added cost, "
                   "against doing nothing; positive saves money.", wide)]
    for c in rec.courses:
        if not c.possible:
            lines += ["", para(f"{c.label}: {c.note}.", wide)]
        elif c.plan is not None and c.plan.changed:
            lines += ["", f"{c.label} ({c.note}):"] + bullets(instructions(c.plan), wide)
            if not c.plan.proven:
                lines += [para(x, wide) for x in _proof(c.plan, cur)]
            lines += ["", revised_text(c.plan, wide=wide)]
    plans = [c.plan for c in rec.courses if c.plan is not None and c.plan.changed]
    cautions = []
    for p in plans:
        for text in p.cautions:
            if text not in cautions:
                cautions.append(text)
    if cautions:
        lines += ["", "Cautions:"] + bullets(cautions, wide)
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
             table(rows, ["measure", "count", "of", "share", "threshold", "result"], shorten=[0])]
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


# -- a proposal priced ---------------------------------------------------------------
def price_text(priced: PricedProposal, *, wide: bool = False) -> str:
    plan = priced.plan
    project = priced.project
    cur = project.currency
    finish = priced.finish
    gained = plan.normal_finish - finish
    lines = [para(f"Proposal priced for {project.name}" + (f": {priced.source}" if priced.source else ""), wide),
             _finish_line("Current finish", plan.normal_finish, plan.normal_finish_date),
             _finish_line("Finish with the proposal", finish, priced.finish_date)
             + (f", {days(gained)} earlier" if gained > 0 else f", {days(-gained)} later" if gained < 0
                else ", no earlier")]
    asked = "" if priced.asked_cost is None else f"; asked {money(priced.asked_cost, cur)}"
    lines += [f"Proposal cost by the project's crash costs: {money(priced.proposal_cost, cur)}{asked}",
              f"Least-cost plan for the same finish: {money(priced.least_cost, cur)}",
              para(f"Money wasted: {money(priced.excess, cur)} (the proposal's cost less the least "
                   "cost for the same finish" + (", milestone damages included" if plan.milestone_damages
                                                  or priced.least_cost_plan.milestone_damages else "") + ")"
                   + ("" if priced.asked_excess is None else
                      f"; against what is asked: {money(priced.asked_excess, cur)}"), wide)]
    with_asked = priced.asked_cost is not None
    ways = any(x.option for x in priced.lines)
    rows = [[x.id, x.name] + ([x.option or "normal"] if ways else []) + [x.shortened_by,
                                                                                      money(x.added_cost)]
            + ([money(x.asked_cost)] if with_asked else []) + [_buys(x.buys(finish))] for x in priced.lines]
    lines += ["", "The lines of the proposal:",
              table(rows, ["id", "name"] + (["way"] if ways else []) + ["shortened\nby", "added\ncost"]
                    + (["asked"] if with_asked else []) + ["days it\nbuys"], shorten=[1, 2] if ways else [1],
                    wide=wide),
              para("(days it buys: how much later the job finishes with that line alone taken out)", wide)]
    notes = [f"{x.id} by '{x.option}': {x.option_note}" for x in priced.lines if x.option and x.option_note]
    if notes:
        lines += ["Option notes:"] + bullets(notes, wide)
    if priced.no_effect:
        lines += ["", para("Lines that buy no time (taking any one of them out alone leaves the finish "
                           f"at {finish} or earlier): " + ", ".join(priced.no_effect), wide)]
    lean = priced.leanest
    lines += ["", para(f"Leanest part of the proposal (only its lines, up to its amounts, same finish): "
                       f"{money(lean.added_cost, cur)}", wide)]
    if lean.changed:
        lines.append(changes_table(lean, wide))
    if priced.missed:
        lines += ["", "Activities the least-cost plan shortens that the proposal missed:",
                  table([[m.id, m.name, m.trade, m.proposed, m.shortened_by, money(m.added_cost)]
                         for m in priced.missed],
                        ["id", "name", "trade", "proposed", "least-cost\nplan", "added\ncost"], shorten=[1, 2],
                        wide=wide)]
    least = priced.least_cost_plan
    lines += ["", f"Least-cost plan for a finish of {finish} working days: {money(least.added_cost, cur)}"]
    if least.changed:
        lines.append(changes_table(least, wide))
    lines += ["", revised_text(plan, wide=wide)]
    if plan.cautions:
        lines += ["", "Cautions:"] + bullets(plan.cautions, wide)
    return "\n".join(lines)


def _buys(n: int) -> str:
    return str(n) if n > 0 else "none" if n == 0 else f"{n} (later with it)"
