"""The risk results as text a person reads and as JSON-ready dicts: ``hasten risk`` and the
plans chosen for risk (``plan --confidence``, ``best --expected``). Nothing here prints or
computes a schedule; lines fit 100 columns.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from tabulate import tabulate

from .render_json import iso, money, money_value

if TYPE_CHECKING:
    from .risk import RiskReport
    from .robust import PlanUnderRisk, RiskPlans

__all__ = ["risk_text", "risk_json", "risk_plans_text", "risk_plans_json"]

_WIDTH = 100
_METHOD = ("Durations are drawn from each activity's range ({dist}) and rounded up to whole working days "
           "(part of a day occupies the day), which makes each uncertain activity about half a day longer on "
           "average.")


def _pct(p: float | None) -> str:
    return "-" if p is None else f"{100 * p:.1f}%"


def _cut(text: str, width: int) -> str:
    return text if len(text) <= width else text[: width - 3] + "..."


def _wrap(text: str, indent: str = "") -> list[str]:
    """Words on lines of at most 100 columns."""
    lines, line = [], ""
    for word in text.split():
        if line and len(line) + 1 + len(word) > _WIDTH - len(indent):
            lines.append(indent + line if lines else line)
            line = word
        else:
            line = f"{line} {word}" if line else word
    if line:
        lines.append(indent + line if lines else line)
    return lines


def _distribution(name: str) -> str:
    return {"pert": "PERT-beta", "triangular": "triangular"}.get(name, name)


# -- hasten risk -----------------------------------------------------------------------
def risk_text(report: RiskReport, *, shown: int = 10) -> str:
    r, project = report.result, report.project
    cur = project.currency
    lines = _wrap(f"Schedule risk for {project.name}: {r.runs:,} runs, seed {r.seed}.")
    what = report.what
    if report.added_cost or report.changed:
        what += f" ({report.changed} activities changed, added cost {money(report.added_cost, cur)})"
    lines += _wrap(f"Simulated: {what}; planned finish {r.planned_finish} working days "
                   f"({iso(report.planned_date)}).")
    lines += _wrap(f"{report.uncertain} of {len(project.activities)} activities have a range of durations. "
                   + _METHOD.format(dist=_distribution(report.distribution)))
    if not report.uncertain:
        lines += _wrap("No activity has a range (optimistic, pessimistic or a [risk] default): every run is "
                       "the planned schedule.")
    lines.append("")
    rows = [[f"P{k[1:]}", v, iso(r.percentile_dates[k])] for k, v in r.percentiles.items()]
    rows.append(["mean", f"{r.mean_finish:.1f}", ""])
    lines.append(tabulate(rows, headers=["finish", "working days", "date"], tablefmt="simple",
                          disable_numparse=True))
    lines.append("")
    meet = [[f"the planned finish ({r.planned_finish} working days)", _pct(r.p_meet_planned)]]
    if r.target is not None:
        meet.append([f"the target ({r.target} working days, {iso(report.target_date)})", _pct(r.p_meet_target)])
    if r.contract_finish is not None:
        meet.append([f"the contract finish ({iso(r.contract_finish)})", _pct(r.p_meet_contract)])
    for m in r.milestones:
        meet.append([_cut(f"milestone {m.id} {m.name}".rstrip(), 60) + f" ({iso(m.deadline)})", _pct(m.p_meet)])
    lines.append(tabulate(meet, headers=["probability of finishing by", "share of runs"], tablefmt="simple",
                          disable_numparse=True))
    lines.append("")
    damages = f"Expected contract damages {money(r.expected_damages, cur)}"
    if r.milestones:
        damages += f", milestone damages {money(report.expected_milestone_damages, cur)}"
    lines += _wrap(damages + f"; expected total cost of time and acceleration (added cost + indirect cost + "
                   f"damages - bonus) {money(report.expected_total_cost, cur)}.")
    lines.append("")
    names = {a.id: a.name for a in project.activities}
    top = sorted(r.criticality.items(), key=lambda kv: (-kv[1], kv[0]))[:shown]
    lines.append(f"Most often critical (share of runs in which the activity is critical), top {len(top)}:")
    lines.append(tabulate([[i, _cut(names.get(i, ""), 60), _pct(c)] for i, c in top],
                          headers=["id", "name", "critical"], tablefmt="simple", disable_numparse=True))
    lines.append("")
    if r.drivers:
        lines += _wrap("What drives the spread of the finish (Spearman's rank correlation of the activity's "
                       "duration with the finish):")
        lines.append(tabulate([[d.id, _cut(d.name, 55), f"{d.rho:.2f}", _pct(d.criticality)] for d in r.drivers],
                              headers=["id", "name", "rho", "critical"], tablefmt="simple", disable_numparse=True))
    else:
        lines.append("No activity's duration moves the finish.")
    if report.cautions:
        lines += ["", "Cautions (the plan simulated accelerates work):"]
        for c in report.cautions:
            lines += _wrap(f"- {c}", "  ")
    return "\n".join(lines)


def risk_json(report: RiskReport) -> dict:
    r = report.result
    return {
        "project": report.project.name,
        "simulated": report.what,
        "runs": r.runs,
        "seed": r.seed,
        "distribution": report.distribution,
        "uncertain_activities": report.uncertain,
        "planned_finish": r.planned_finish,
        "p_meet_planned": r.p_meet_planned,
        "target": r.target,
        "target_date": iso(report.target_date),
        "p_meet_target": r.p_meet_target,
        "contract_finish": iso(r.contract_finish),
        "p_meet_contract": r.p_meet_contract,
        "mean_finish": r.mean_finish,
        "percentiles": dict(r.percentiles),
        "percentile_dates": {k: iso(v) for k, v in r.percentile_dates.items()},
        "criticality": dict(r.criticality),
        "drivers": [{"id": d.id, "name": d.name, "rho": d.rho, "criticality": d.criticality} for d in r.drivers],
        "sensitivity": dict(r.sensitivity),
        "expected_damages": money_value(r.expected_damages),
        "expected_milestone_damages": money_value(report.expected_milestone_damages),
        "expected_time_costs": money_value(report.expected_time_costs),
        "added_cost": money_value(report.added_cost),
        "expected_total_cost": money_value(report.expected_total_cost),
        "milestones": [{"id": m.id, "name": m.name, "deadline": iso(m.deadline), "p_meet": m.p_meet,
                        "expected_damages": money_value(m.expected_damages)} for m in r.milestones],
        "finish_counts": [[f, n] for f, n in r.finish_counts],
        "cautions": list(report.cautions),
    }


# -- plans chosen for risk -----------------------------------------------------------------
def _interval(p: PlanUnderRisk) -> str:
    if p.interval is None:
        return "-"
    lo, hi = p.interval
    return f"{_pct(p.p_meet)} ({100 * lo:.1f}-{100 * hi:.1f})"


def risk_plans_text(rp: RiskPlans) -> str:
    project, cur = rp.project, rp.project.currency
    det, ch = rp.deterministic, rp.chosen
    if rp.question == "confidence":
        head = (f"Least-cost plan that finishes {project.name} by {rp.target} working days "
                f"({iso(rp.target_date)}) in at least {rp.confidence:.0%} of sampled scenarios")
        meet = "the target"
    else:
        head = (f"Plan with the least expected total cost (added cost + indirect cost + damages - bonus) "
                f"for {project.name}")
        meet = "the contract finish"
    lines = _wrap(head + ".")
    lines += _wrap(f"Sampled {rp.scenarios} scenario{'s' if rp.scenarios != 1 else ''} (seed {rp.seed}); each plan "
                   f"checked on {rp.check_runs:,} "
                   f"fresh runs (seed {rp.check_seed}), with the 95% Wilson interval.")
    lines.append("")
    rows = [
        ["added cost", money(det.added_cost, cur), money(ch.added_cost, cur)],
        ["finish with most likely durations", f"{det.finish} ({iso(det.finish_date)})",
         f"{ch.finish} ({iso(ch.finish_date)})"],
    ]
    if rp.target is not None:
        rows += [[f"P(meet {meet}), sampled", _pct(det.in_sample_meet), _pct(ch.in_sample_meet)],
                 [f"P(meet {meet}), fresh runs", _interval(det), _interval(ch)]]
    rows += [
        ["P80 finish, fresh runs", f"{det.check.percentiles['p80']} ({iso(det.check.percentile_dates['p80'])})",
         f"{ch.check.percentiles['p80']} ({iso(ch.check.percentile_dates['p80'])})"],
        ["expected total cost, sampled", money(det.in_sample_total, cur), money(ch.in_sample_total, cur)],
        ["expected total cost, fresh runs", money(det.expected_total, cur), money(ch.expected_total, cur)],
    ]
    lines.append(tabulate(rows, headers=["", det.label, ch.label], tablefmt="simple", disable_numparse=True))
    lines.append("")
    lines += _wrap(_in_words(rp))
    if not ch.proven:
        gap = "" if ch.gap is None else f", at most {100 * ch.gap:.2f}% above the least"
        lines += _wrap(f"The search stopped at its time limit (--time-limit): the plan chosen is the best found{gap} "
                       "on the sampled scenarios, not proven the least.")
    changed = ch.changed
    lines.append("")
    if changed:
        lines.append(f"The plan {ch.label}: {len(changed)} activities changed")
        lines.append(tabulate([[a.id, _cut(a.name, 34), _cut(a.trade, 14), a.normal, a.duration, _cut(a.option, 14),
                                money(a.added_cost, cur)] for a in changed],
                              headers=["id", "name", "trade", "days", "new", "option", "added cost"],
                              tablefmt="simple", disable_numparse=True))
    else:
        lines.append(f"The plan {ch.label} changes no activity.")
    if ch.cautions:
        lines += ["", "Cautions:"]
        for c in ch.cautions:
            lines += _wrap(f"- {c}", "  ")
    return "\n".join(lines)


def _in_words(rp: RiskPlans) -> str:
    det, ch = rp.deterministic, rp.chosen
    cur = rp.project.currency
    if rp.same:
        return ("The least-cost plan already does what is asked on the sampled scenarios, so it is kept: "
                "no extra money is needed.")
    extra = rp.extra_cost
    spend = (f"The plan chosen for risk costs {money(abs(extra), cur)} "
             + ("more" if extra >= 0 else "less") + " in acceleration")
    parts = []
    if det.p_meet is not None and ch.p_meet is not None:
        parts.append(f"moves the chance of meeting {('the target' if rp.question == 'confidence' else 'the contract finish')} "
                     f"from {_pct(det.p_meet)} to {_pct(ch.p_meet)} on fresh runs")
    p80 = det.check.percentiles["p80"] - ch.check.percentiles["p80"]
    if p80:
        parts.append(f"brings the P80 finish {abs(p80)} working day{'s' if abs(p80) != 1 else ''} "
                     + ("earlier" if p80 > 0 else "later"))
    saving = det.expected_total - ch.expected_total
    parts.append(f"and {'lowers' if saving >= 0 else 'raises'} the expected total cost by {money(abs(saving), cur)}")
    text = spend + ": it " + ", ".join(parts) + "."
    if ch.in_sample_meet is not None and ch.p_meet is not None and ch.p_meet + 1e-12 < ch.in_sample_meet:
        text += (f" On the scenarios it was chosen on it met the target in {_pct(ch.in_sample_meet)}: a plan fitted "
                 "to its sample looks better there than on fresh runs; more scenarios (--scenarios) narrow the gap.")
    return text


def _plan_json(p: PlanUnderRisk) -> dict:
    return {
        "label": p.label,
        "added_cost": money_value(p.added_cost),
        "finish": p.finish,
        "finish_date": iso(p.finish_date),
        "p_meet_sampled": p.in_sample_meet,
        "p_meet": p.p_meet,
        "p_meet_interval": None if p.interval is None else list(p.interval),
        "p80": p.check.percentiles["p80"],
        "p80_date": iso(p.check.percentile_dates["p80"]),
        "percentiles": dict(p.check.percentiles),
        "expected_total_cost_sampled": money_value(p.in_sample_total),
        "expected_total_cost": money_value(p.expected_total),
        "proven_optimal": p.proven,
        "gap": p.gap,
        "activities": [{"id": a.id, "name": a.name, "trade": a.trade, "normal": a.normal, "duration": a.duration,
                        "shortened_by": a.shortened_by, "option": a.option or None,
                        "added_cost": money_value(a.added_cost)} for a in p.activities],
        "cautions": list(p.cautions),
    }


def risk_plans_json(rp: RiskPlans) -> dict:
    return {
        "project": rp.project.name,
        "currency": rp.project.currency,
        "question": rp.question,
        "confidence": rp.confidence,
        "target": rp.target,
        "target_date": iso(rp.target_date),
        "scenarios": rp.scenarios,
        "seed": rp.seed,
        "check_runs": rp.check_runs,
        "check_seed": rp.check_seed,
        "same_plan": rp.same,
        "extra_cost": money_value(rp.extra_cost),
        "in_words": _in_words(rp),
        "deterministic": _plan_json(rp.deterministic),
        "chosen": _plan_json(rp.chosen),
        "notes": list(rp.notes),
    }
