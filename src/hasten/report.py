"""The proposal report: one question, its answer and what an owner needs to trust it.

:func:`report_content` turns a finished :class:`~hasten.results.Handover` into plain content
(sentences, key figures, tables, the curve's points with their plans, the assumptions, the
cautions and how the answer was checked); :mod:`hasten.report_html`,
:mod:`hasten.report_md` and :mod:`hasten.report_xlsx` lay it out, and :func:`write_report`
picks one by the file's suffix. Nothing here solves: every figure comes from the result.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING

from . import __version__
from .errors import InputError
from .project import WEEKDAY_NAMES
from .render import way_text
from .render_json import days, iso, money, money_value, revised_rows

if TYPE_CHECKING:
    from .results import Handover, Plan

__all__ = ["Figure", "Content", "report_content", "write_report", "REPORT_SUFFIXES"]

REPORT_SUFFIXES = (".html", ".md", ".xlsx")


@dataclass(frozen=True)
class Figure:
    """A key figure: its JSON key (the same key as the command's ``--json``), a label, the
    value (money, days, a date or text) and how to show it."""

    key: str
    label: str
    value: object
    kind: str = "money"  # money, days, date, text

    def text(self, currency: str) -> str:
        if self.value is None:
            return "none"
        if self.kind == "money":
            return money(float(self.value), currency)
        return str(self.value)


@dataclass(frozen=True)
class Content:
    title: str
    project: str
    currency: str
    question: str
    answer: str
    figures: list[Figure]
    courses: list[dict]  # recovery: one row per course
    trades: list[dict]
    activities: list[dict]  # the changed activities, with old and new dates
    schedule: list[dict]  # the revised schedule, every activity
    points: list[dict]  # the curve: every finish, its costs and its plan
    chosen: int | None  # the finish the answer comes to
    names: dict[str, str]
    assumptions: list[str]
    cautions: list[str]
    checks: list[str]
    notes: list[str] = field(default_factory=list)
    extra: list[tuple[str, list[str], list[list[str]]]] = field(default_factory=list)  # (title, headers, rows)
    version: str = __version__


def _plan_rows(plan: Plan | None) -> tuple[list[dict], list[dict], list[dict]]:
    if plan is None:
        return [], [], []
    schedule = revised_rows(plan)
    changed = [r for r in schedule if r["shortened_by"] or r["option"]]
    trades = [{"trade": t.trade, "shortened_by": t.shortened_by, "added_cost": money_value(t.added_cost)}
              for t in plan.trades]
    return trades, changed, schedule


def _answer(h: Handover) -> tuple[str, list[Figure], list[dict], list]:
    cur = h.project.currency
    a = h.answer
    extra: list = []
    courses: list[dict] = []
    if h.kind in ("plan", "budget"):
        gained = a.normal_finish - a.finish
        sentence = (f"Finish on {a.finish_date} ({a.finish} working days, {days(gained)} earlier than now) by "
                    f"shortening {len(a.changed)} activit{'y' if len(a.changed) == 1 else 'ies'} in "
                    f"{len(a.trades)} trade{'s' if len(a.trades) != 1 else ''}, for "
                    f"{money(a.added_cost, cur)} of added direct cost." if a.changed else
                    f"Nothing needs to change: the current schedule finishes on {a.finish_date}.")
        figs = [Figure("normal_finish", "current finish (working days)", a.normal_finish, "days"),
                Figure("normal_finish_date", "current finish date", iso(a.normal_finish_date), "date"),
                Figure("finish", "new finish (working days)", a.finish, "days"),
                Figure("finish_date", "new finish date", iso(a.finish_date), "date"),
                Figure("added_cost", "added direct cost", money_value(a.added_cost)),
                Figure("direct_cost", "direct cost with the plan", money_value(a.direct_cost)),
                Figure("next_day_cost", "one more day earlier would cost",
                       None if a.next_day_cost is None else money_value(a.next_day_cost))]
        if a.milestone_damages:
            figs.append(Figure("milestone_damages", "milestone damages", money_value(a.milestone_damages)))
    elif h.kind == "best":
        p, now = a.point, a.current
        verdict = (f"saving {money(a.saving, cur)} against the current finish" if a.saving > 0 else
                   "the current finish already costs the least" if p.finish == now.finish else
                   f"{money(-a.saving, cur)} more than the current finish")
        sentence = (f"Finish on {p.finish_date} ({p.finish} working days) for a total cost of "
                    f"{money(p.total_cost, cur)}, {verdict}.")
        figs = [Figure("finish", "best finish (working days)", p.finish, "days"),
                Figure("finish_date", "best finish date", iso(p.finish_date), "date"),
                Figure("total_cost", "total cost at the best finish", money_value(p.total_cost)),
                Figure("saving", "saving against the current finish", money_value(a.saving)),
                Figure("added_cost", "added direct cost", money_value(p.added_cost)),
                Figure("indirect_cost", "indirect cost", money_value(p.time.indirect)),
                Figure("damages", "damages", money_value(p.time.damages)),
                Figure("bonus", "bonus", money_value(p.time.bonus)),
                Figure("current.total_cost", "total cost at the current finish", money_value(now.total_cost)),
                Figure("current.finish_date", "current finish date", iso(now.finish_date), "date")]
    elif h.kind == "recover":
        late = f", {a.days_late} calendar days late" if a.days_late else ""
        possible = [c for c in a.courses if c.possible]
        best = max(possible, key=lambda c: c.net_effect)
        sentence = (f"The forecast finish is {a.forecast_date}{late}. The course that costs the least in all is "
                    f"'{best.label}': finish on {best.finish_date}, net effect {money(best.net_effect, cur)} "
                    f"against doing nothing.")
        figs = [Figure("forecast_finish", "forecast finish (working days)", a.forecast_finish, "days"),
                Figure("forecast_finish_date", "forecast finish date", iso(a.forecast_date), "date"),
                Figure("contract_finish", "contract finish", iso(a.contract_finish), "date"),
                Figure("days_late", "calendar days late", a.days_late, "days")]
        direct = h.project.normal_direct_cost
        for c in a.courses:
            courses.append({"course": c.label, "possible": c.possible, "note": c.note,
                            "finish": c.finish, "finish_date": iso(c.finish_date),
                            "added_cost": money_value(c.added_cost) if c.possible else None,
                            "damages": money_value(c.contract_damages + c.milestone_damages) if c.possible else None,
                            "net_effect": money_value(c.net_effect) if c.possible else None,
                            "total_cost": money_value(direct + c.total_cost) if c.possible else None})
    else:  # price
        asked = "" if a.asked_cost is None else f" (asked: {money(a.asked_cost, cur)})"
        sentence = (f"The proposal finishes on {a.finish_date} ({a.finish} working days) for "
                    f"{money(a.proposal_cost, cur)} by the project's crash costs{asked}; the least-cost plan for "
                    f"that finish costs {money(a.least_cost, cur)}, so {money(a.excess, cur)} is wasted.")
        figs = [Figure("finish", "finish with the proposal (working days)", a.finish, "days"),
                Figure("finish_date", "finish date with the proposal", iso(a.finish_date), "date"),
                Figure("proposal_cost", "proposal cost by the project's crash costs", money_value(a.proposal_cost)),
                Figure("asked_cost", "cost asked", None if a.asked_cost is None else money_value(a.asked_cost)),
                Figure("least_cost", "least cost for the same finish", money_value(a.least_cost)),
                Figure("excess", "money wasted", money_value(a.excess)),
                Figure("no_effect", "lines that buy no time", ", ".join(a.no_effect) or "none", "text")]
        extra.append(("The lines of the proposal", ["id", "name", "way", "shortened by", "added cost", "asked",
                                                   "days it buys"],
                      [[x.id, x.name, way_text(x.option, x.option_note), str(x.shortened_by),
                        money(x.added_cost), "" if x.asked_cost is None else money(x.asked_cost),
                        str(x.buys(a.finish))] for x in a.lines]))
        extra.append((f"The leanest part of the proposal ({money(a.leanest.added_cost, cur)})",
                      ["id", "name", "shortened by", "added cost"],
                      [[c.id, c.name, str(c.shortened_by), money(c.added_cost)] for c in a.leanest.changed]))
        extra.append(("Activities the least-cost plan shortens that the proposal missed",
                      ["id", "name", "trade", "proposed", "least-cost plan", "added cost"],
                      [[m.id, m.name, m.trade, str(m.proposed), str(m.shortened_by), money(m.added_cost)]
                       for m in a.missed]))
    return sentence, figs, courses, extra


def _assumptions(h: Handover) -> list[str]:
    p = h.project
    cal = p.calendar
    work = ", ".join(WEEKDAY_NAMES[d] for d in cal.workdays)
    out = [f"Calendar: {cal.name} (working days {work}); the project starts on {p.start}.",
           "Holidays: " + (", ".join(d.isoformat() for d in cal.holidays) if cal.holidays else "none") + "."]
    for c in p.calendars:
        out.append(f"Calendar '{c.name}' for the activities that name it: working days "
                   + ", ".join(WEEKDAY_NAMES[d] for d in c.workdays)
                   + (f"; holidays {', '.join(d.isoformat() for d in c.holidays)}" if c.holidays else "") + ".")
    out += ["A day of duration, lag or shortening is a working day. Dates are the first and last day worked.",
            f"Site overhead (indirect cost) runs per working day of the project's duration: "
            f"{money(p.costs.indirect_per_day, p.currency)} a day."]
    k = p.contract
    if k.finish is not None:
        cap = "" if k.bonus_cap_days is None else f", for at most {k.bonus_cap_days} days"
        out.append(f"Damages and bonus run per calendar day between the finish date (the last day worked) and "
                   f"the contract finish {k.finish}: damages {money(k.damages_per_day, p.currency)} a day late, "
                   f"bonus {money(k.bonus_per_day, p.currency)} a day early{cap}.")
    else:
        out.append("No contract finish is given: no damages or bonus are counted.")
    for a in p.activities:
        if a.deadline is not None and a.damages_per_day:
            out.append(f"Milestone {a.id} ({a.name}) has its own deadline {a.deadline} with damages "
                       f"{money(a.damages_per_day, p.currency)} per calendar day late.")
    out.append(f"Data date: {p.data_date}: finished work keeps its actual dates, started work resumes on it."
               if p.data_date else "No data date: the schedule is the plan before any progress.")
    out.append("Crash costs are linear between the normal and the crash duration of each activity unless "
               "crash steps or discrete options are given; durations and days shortened are whole working days.")
    return out


def _checks(h: Handover) -> list[str]:
    plans = [h.plan] if h.plan is not None else []
    a = h.answer
    if h.kind == "price":
        plans += [a.least_cost_plan, a.leanest]
    proven = all(p.proven for p in plans)
    out = ["Every plan in this report passed an independent check written apart from the solver: each "
           "duration a whole number within its limits, every link satisfied by the plan's early dates, the "
           "finish on or before the target, and the added cost recomputed from the activity data equal to "
           "the solver's.",
           "Least costs come from a linear (or mixed-integer) program solved to optimality with HiGHS; "
           + ("every one was proven optimal." if proven else
              "SOME WERE NOT PROVEN OPTIMAL within the time limit (see the notes)."),
           "Every point of the curve is the least added cost of finishing by that day, re-solved for each day.",
           "The method is tested against published worked examples and independent references (see the "
           "README's 'Tests and sources')."]
    if h.kind == "price":
        out.append("The proposal's finish comes from scheduling it (forward pass), and each line's effect from "
                   "scheduling the proposal without that line alone.")
    return out


def report_content(h: Handover) -> Content:
    """The report's content from a finished handover (no solving)."""
    project = h.project
    sentence, figures, courses, extra = _answer(h)
    trades, changed, schedule = _plan_rows(h.plan)
    totals = {t.finish: t for t in h.curve.totals}
    points = []
    for p in h.curve:
        t = totals[p.finish]
        points.append({"finish": p.finish, "finish_date": iso(p.finish_date), "added_cost": money_value(p.added_cost),
                       "total_cost": money_value(t.total_cost), "indirect_cost": money_value(t.time.indirect),
                       "damages": money_value(t.time.damages + t.milestone_damages),
                       "bonus": money_value(t.time.bonus),
                       "plan": [[i, d, way] for i, d, way in p.plan]})
    finishes = {p["finish"] for p in points}
    chosen = h.plan.finish if h.plan is not None and h.plan.finish in finishes else None
    if chosen is None and points:
        chosen = points[0]["finish"]
    cautions = list(h.plan.cautions) if h.plan is not None else []
    if h.kind == "recover":
        for c in h.answer.courses:
            for text in (c.plan.cautions if c.plan is not None else ()):
                if text not in cautions:
                    cautions.append(text)
    warnings = list(getattr(h.answer, "warnings", ()))
    return Content(
        title=f"Acceleration report: {project.name}", project=project.name, currency=project.currency,
        question=h.question, answer=sentence, figures=figures, courses=courses, trades=trades,
        activities=changed, schedule=schedule, points=points, chosen=chosen,
        names={a.id: a.name for a in project.activities}, assumptions=_assumptions(h), cautions=cautions,
        checks=_checks(h), notes=list(h.notes) + [f"Warning: {w}" for w in warnings], extra=extra)


def write_report(h: Handover, path: Path | str) -> list[Path]:
    """Write the report in the form the suffix asks for (.html, .md, .xlsx); returns the
    files written (a Markdown report writes its charts beside it)."""
    path = Path(path)
    suffix = path.suffix.lower()
    if suffix not in REPORT_SUFFIXES:
        raise InputError(f"cannot write a report to {path.name!r}", column="-o", value=str(path),
                         fix="name the report FILE.html, FILE.md or FILE.xlsx")
    content = report_content(h)
    if suffix == ".html":
        from .report_html import write_html

        return write_html(h, content, path)
    if suffix == ".md":
        from .report_md import write_markdown

        return write_markdown(h, content, path)
    from .report_xlsx import write_xlsx

    return write_xlsx(h, content, path)
