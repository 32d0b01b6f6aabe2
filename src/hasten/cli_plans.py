"""The commands that answer acceleration questions (plan, curve, best, budget, recover,
price, report, risk), registered on :data:`hasten.cli.app`. Each is one library call plus
rendering; the shared options and helpers are in :mod:`hasten.cli`.
"""

from __future__ import annotations

import math
from pathlib import Path
from typing import Annotated, Optional

import typer

from .errors import HastenError, InputError
from .cli import (  # the shared options and helpers
    app, ProjectArg, JsonOpt, ForceOpt, LimitOpt, WideOpt, OutOpt, SaveOpt, PlotOpt,
    CrewsOpt, ProductivityOpt, ScenariosOpt, SeedOpt, _echo, _errors, _emit, _outputs,
    _crews, _with_check, _date, _progress, _quality_notice, _write_outputs, _target, render,
    render_json, read_project_with_notes, read_project, write_table, write_file)

__all__: list[str] = []  # commands register themselves on hasten.cli.app


@app.command()
def plan(
    project: ProjectArg,
    finish: Annotated[Optional[int], typer.Option("--finish", help="Target finish in working days from the start.")] = None,
    by: Annotated[Optional[str], typer.Option("--by", help="Target finish date (last day worked), YYYY-MM-DD.")] = None,
    earlier: Annotated[Optional[str], typer.Option("--earlier", help="Finish earlier than now: 10d = working days, 2w = calendar weeks.")] = None,
    as_json: JsonOpt = False,
    time_limit: LimitOpt = None,
    wide: WideOpt = False,
    out: OutOpt = None,
    save_as: SaveOpt = None,
    plot: PlotOpt = None,
    force: ForceOpt = False,
    crews: CrewsOpt = None,
    productivity: ProductivityOpt = None,
    confidence: Annotated[Optional[float], typer.Option("--confidence", help="Least-cost plan meeting the target in at least this share of sampled scenarios, e.g. 0.8.")] = None,
    scenarios: ScenariosOpt = None,
    seed: SeedOpt = None,
) -> None:
    """The least-cost plan to finish by a target."""
    with _errors():
        from .questions import plan as least_cost_plan

        target = _target(finish, by, earlier)
        _outputs(project, force, tables=(out,), charts=(plot,), save_as=save_as)
        p, notes = _crews(project, crews, productivity)
        if _risk_plan(p, notes, as_json, time_limit, scenarios, seed, target=target, confidence=confidence,
                      outputs=(out, save_as, plot)):
            return
        result = least_cost_plan(p, target, time_limit=time_limit)
        _write_outputs(result, out=out, save_as=save_as, plot=plot, original=p)
        check = _quality_notice(p)
        _emit(as_json, lambda: _with_check(render_json.plan_json(result), check),
              lambda: render.plan_text(result, wide=wide), notes + check + result.notes)


@app.command()
def curve(
    project: ProjectArg,
    longest: Annotated[Optional[int], typer.Option("--from", help="Longest finish to start the trace at (default: the normal finish).")] = None,
    shortest: Annotated[Optional[int], typer.Option("--to", help="Shortest finish to trace to (default: the shortest possible).")] = None,
    as_json: JsonOpt = False,
    csv: Annotated[Optional[Path], typer.Option("--csv", help="Also write the points to FILE.csv.")] = None,
    plot: Annotated[Optional[Path], typer.Option("--plot", help="Also draw the cost of each finish to FILE.png, .svg or .pdf.")] = None,
    time_limit: LimitOpt = None,
    force: ForceOpt = False,
    wide: WideOpt = False,
) -> None:
    """The least-cost curve: added cost at every working day of compression."""
    with _errors():
        from .questions import curve as least_cost_curve

        if csv is not None and csv.suffix.lower() != ".csv":
            raise InputError("--csv writes a .csv file", value=str(csv), fix="name the output FILE.csv")
        _outputs(project, force, tables=(csv,), charts=(plot,))
        for flag, value in (("--to", shortest), ("--from", longest)):
            if value is not None and value < 0:
                raise InputError(f"{flag} is a finish in working days from the start, 0 or more",
                                 value=value, fix=f"give a finish such as {flag} 40")
        p, notes = read_project_with_notes(project)
        with _progress(not as_json) as tick:
            result = least_cost_curve(p, longest, shortest, time_limit=time_limit, progress=tick)
        if csv is not None:
            rows = render_json.curve_rows(result)
            write_table(csv, list(rows[0]) if rows else ["finish"], rows, sheet_name="cost curve",
                        date_columns=("finish_date",), money_columns=("added_cost", "milestone_damages", "day_cost"),
                        currency=p.currency)
        if plot is not None:
            from .charts import curve_chart

            write_file(plot.resolve(), lambda tmp: curve_chart(result, tmp))
        _emit(as_json, lambda: render_json.curve_json(result), lambda: render.curve_text(result, wide=wide),
              notes + result.notes)


@app.command()
def best(project: ProjectArg, as_json: JsonOpt = False, time_limit: LimitOpt = None, wide: WideOpt = False,
         out: OutOpt = None, save_as: SaveOpt = None,
         plot: Annotated[Optional[Path], typer.Option("--plot", help="Also draw the cost of each finish, the best one marked, to FILE.png, .svg or .pdf.")] = None,
         force: ForceOpt = False, crews: CrewsOpt = None, productivity: ProductivityOpt = None,
         expected: Annotated[bool, typer.Option("--expected", help="The plan with the least expected total cost over sampled scenarios.")] = False,
         scenarios: ScenariosOpt = None, seed: SeedOpt = None) -> None:
    """The finish with the least total cost: direct + indirect + damages - bonus."""
    with _errors():
        from .questions import best_finish

        _outputs(project, force, tables=(out,), charts=(plot,), save_as=save_as)
        p, notes = _crews(project, crews, productivity)
        if _risk_plan(p, notes, as_json, time_limit, scenarios, seed, expected=expected,
                      outputs=(out, save_as, plot)):
            return
        with _progress(not as_json) as tick:
            result = best_finish(p, time_limit=time_limit, progress=tick)
        _write_outputs(result.plan, out=out, save_as=save_as, original=p)
        if plot is not None:
            from .charts import curve_chart

            write_file(plot.resolve(), lambda tmp: curve_chart(result, tmp))
        check = _quality_notice(p)
        _emit(as_json, lambda: _with_check(render_json.best_json(result), check),
              lambda: render.best_text(result, wide=wide), notes + check + result.notes)


@app.command()
def budget(
    project: ProjectArg,
    spend: Annotated[float, typer.Option("--spend", help="Most added direct cost you will spend.")],
    as_json: JsonOpt = False,
    time_limit: LimitOpt = None,
    wide: WideOpt = False,
    out: OutOpt = None,
    save_as: SaveOpt = None,
    plot: PlotOpt = None,
    force: ForceOpt = False,
    crews: CrewsOpt = None,
    productivity: ProductivityOpt = None,
) -> None:
    """The earliest finish whose least added cost is within a budget."""
    with _errors():
        from .questions import earliest_within

        _outputs(project, force, tables=(out,), charts=(plot,), save_as=save_as)
        p, notes = _crews(project, crews, productivity)
        if not math.isfinite(spend) or spend < 0:
            raise InputError("--spend must be a number 0 or more", value=spend,
                             fix="give the most you would add to the direct cost, e.g. --spend 50000")
        result = earliest_within(p, spend, time_limit=time_limit)
        _write_outputs(result, out=out, save_as=save_as, plot=plot, original=p)
        title = f"Earliest finish within {render.money(spend, p.currency)}"
        _emit(as_json, lambda: render_json.plan_json(result),
              lambda: render.plan_text(result, title=title, wide=wide), notes + result.notes)


@app.command()
def recover(
    project: ProjectArg,
    as_json: JsonOpt = False,
    time_limit: LimitOpt = None,
    wide: WideOpt = False,
    out: Annotated[Optional[Path], typer.Option("--out", help="Also write the revised schedule of each course to FILE.csv or FILE.xlsx.")] = None,
    save_as: SaveOpt = None,
    plot: PlotOpt = None,
    course: Annotated[str, typer.Option("--course", help="The course --save-as and --plot use: 'least' (least total cost) or 'full' (recover fully).")] = "least",
    force: ForceOpt = False,
    crews: CrewsOpt = None,
    productivity: ProductivityOpt = None,
) -> None:
    """After a delay: do nothing, recover fully, or recover at the least total cost."""
    with _errors():
        from .questions import recover as recovery

        if course not in ("least", "full"):
            raise InputError("--course is not understood", value=course,
                             fix="write --course least (least total cost) or --course full (recover fully)")
        _outputs(project, force, tables=(out,), charts=(plot,), save_as=save_as)
        p, notes = _crews(project, crews, productivity)
        with _progress(not as_json) as tick:
            result = recovery(p, time_limit=time_limit, progress=tick)
        label = "least total cost" if course == "least" else "recover fully"
        chosen = next((c.plan for c in result.courses if c.label == label), None)
        if chosen is None and (save_as is not None or plot is not None):
            raise HastenError(f"the course '{label}' has no plan to save or draw; try the other --course")
        if out is not None:
            write_table(out, ("course",) + render_json.REVISED_COLUMNS, render_json.revised_course_rows(result),
                        sheet_name="revised schedules", date_columns=render_json.DATE_COLUMNS,
                        money_columns=("added_cost",), currency=p.currency)
        if chosen is not None:
            _write_outputs(chosen, save_as=save_as, plot=plot, original=p)
        check = _quality_notice(p)
        _emit(as_json, lambda: _with_check(render_json.recovery_json(result), check),
              lambda: render.recovery_text(result, wide=wide), notes + check + result.notes)


@app.command()
def price(
    project: ProjectArg,
    proposal: Annotated[Path, typer.Option("--proposal", help="The proposal: a CSV with columns id, shortened_by (working days) or option, and cost (optional).")],
    as_json: JsonOpt = False,
    time_limit: LimitOpt = None,
    wide: WideOpt = False,
    out: OutOpt = None,
    save_as: Annotated[Optional[Path], typer.Option("--save-as", help="Also write the project with the proposal applied to a new folder, .xlsx or .json.")] = None,
    plot: PlotOpt = None,
    force: ForceOpt = False,
) -> None:
    """Price a proposal: the finish it achieves, its cost, the least cost for that finish,
    the lines that buy no time, its leanest part and the cheaper activities it missed."""
    with _errors():
        from .questions import price as price_proposal

        _outputs(project, force, tables=(out,), charts=(plot,), save_as=save_as)
        p, notes = read_project_with_notes(project)
        result = price_proposal(p, proposal, time_limit=time_limit)
        _write_outputs(result.plan, out=out, save_as=save_as, plot=plot, original=p)
        _emit(as_json, lambda: render_json.price_json(result), lambda: render.price_text(result, wide=wide),
              notes + result.notes)


@app.command()
def report(
    project: ProjectArg,
    output: Annotated[Path, typer.Option("-o", "--output", help="The report: FILE.html (one self-contained page), FILE.md (charts beside it) or FILE.xlsx.")],
    finish: Annotated[Optional[int], typer.Option("--finish", help="Plan to finish in N working days from the start.")] = None,
    by: Annotated[Optional[str], typer.Option("--by", help="Plan to finish by this date (last day worked), YYYY-MM-DD.")] = None,
    earlier: Annotated[Optional[str], typer.Option("--earlier", help="Plan to finish earlier than now: 10d = working days, 2w = calendar weeks.")] = None,
    best_: Annotated[bool, typer.Option("--best", help="The finish with the least total cost.")] = False,
    budget_: Annotated[Optional[float], typer.Option("--budget", help="The earliest finish for at most this added direct cost.")] = None,
    recover_: Annotated[bool, typer.Option("--recover", help="The courses of recovery after a delay.")] = False,
    proposal: Annotated[Optional[Path], typer.Option("--proposal", help="A proposal to price (CSV: id, shortened_by or option, cost).")] = None,
    time_limit: LimitOpt = None,
) -> None:
    """Write a report for the owner: the question, the answer, the plan, the charts, an
    interactive curve (HTML), the assumptions, the cautions and how the answer was checked."""
    with _errors():
        from .questions import handover
        from .report import REPORT_SUFFIXES, write_report

        targets = [x is not None for x in (finish, by, earlier)]
        if sum(targets) + best_ + (budget_ is not None) + recover_ + (proposal is not None) != 1:
            raise HastenError("ask exactly one question: --finish N, --by DATE, --earlier 10d/2w, --best, "
                              "--budget AMOUNT, --recover or --proposal FILE.csv")
        if output.suffix.lower() not in REPORT_SUFFIXES:
            raise InputError(f"cannot write a report to {output.name!r}", column="-o", value=str(output),
                             fix="name the report FILE.html, FILE.md or FILE.xlsx")
        if budget_ is not None and not (math.isfinite(budget_) and budget_ >= 0):
            raise InputError("--budget must be a number 0 or more", value=budget_,
                             fix="give the most you would add to the direct cost, e.g. --budget 50000")
        target = _target(finish, by, earlier) if any(targets) else None
        p = read_project(project)
        with _progress(True) as tick:
            result = handover(p, target=target, best=best_, budget=budget_, recover=recover_, proposal=proposal,
                              time_limit=time_limit, progress=tick)
        written = write_report(result, output)
        for note in result.notes:
            _echo(f"Note: {note}")
        _echo("wrote " + ", ".join(str(w) for w in written))




def _risk_plan(p, notes, as_json: bool, time_limit, scenarios, seed, *, target=None,
               confidence: float | None = None, expected: bool = False, outputs=()) -> bool:
    """``plan --confidence`` and ``best --expected``: the plan chosen for risk beside the
    deterministic one. False (nothing done) when neither was asked for."""
    if confidence is None and not expected:
        if scenarios is not None or seed is not None:
            raise InputError("--scenarios and --seed choose a plan for risk", value=scenarios if seed is None else seed,
                             fix="add --confidence 0.8 to plan, or --expected to best")
        return False
    if any(path is not None for path in outputs):
        raise InputError("--out, --save-as and --plot write the deterministic plan, not a plan chosen for risk",
                         fix="leave them out with --confidence or --expected, or run without these options")
    from . import render_risk
    from .robust import SCENARIOS, risk_plans

    with _progress(not as_json, "checking the plans on fresh runs") as tick:
        result = risk_plans(p, target=target, confidence=confidence, expected=expected,
                            scenarios=SCENARIOS if scenarios is None else scenarios, seed=seed, time_limit=time_limit,
                            progress=tick)
    _emit(as_json, lambda: render_risk.risk_plans_json(result), lambda: render_risk.risk_plans_text(result),
          tuple(notes) + result.notes)
    return True


@app.command()
def risk(
    project: ProjectArg,
    finish: Annotated[Optional[int], typer.Option("--finish", help="Target finish in working days: plan for it, then simulate the plan.")] = None,
    by: Annotated[Optional[str], typer.Option("--by", help="Target finish date (last day worked), YYYY-MM-DD: plan for it, then simulate.")] = None,
    plan_file: Annotated[Optional[Path], typer.Option("--plan", help="Simulate a plan: the --json output of plan, best, budget or recover.")] = None,
    runs: Annotated[int, typer.Option("--runs", help="Number of simulated runs.")] = 5000,
    seed: SeedOpt = None,
    workers: Annotated[Optional[int], typer.Option("--workers", help="Run on a local Dask cluster of N worker processes.")] = None,
    scheduler: Annotated[Optional[str], typer.Option("--scheduler", help="Run on a running Dask cluster at ADDRESS (tcp://host:8786).")] = None,
    as_json: JsonOpt = False,
    time_limit: LimitOpt = None,
) -> None:
    """How sure is the finish? Simulate the schedule, a plan, or the plan for a target under the
    duration ranges (optimistic, pessimistic, [risk]): percentiles, chances, criticality."""
    with _errors():
        from contextlib import nullcontext

        from . import render_risk
        from .network import Network
        from .plan_days import plan_days_from_json
        from .risk import schedule_risk

        if finish is not None and by is not None:
            raise InputError("give one target: --finish N or --by YYYY-MM-DD", value=by,
                             fix="leave out one of them")
        target = finish if by is None else _date(by, "--by")
        if isinstance(target, int) and target < 0:
            raise InputError("--finish is a finish in working days from the start, 0 or more", value=target,
                             fix="give a finish such as --finish 120")
        p, notes = read_project_with_notes(project)
        net = Network(p)
        days = None
        if plan_file is not None:
            days = plan_days_from_json(net, _plan_data(plan_file), str(plan_file))
        if workers is not None or scheduler is not None:
            from .cluster import cluster_runner

            cluster = cluster_runner(workers=workers, scheduler=scheduler)
        else:
            cluster = nullcontext(None)
        with cluster as runner, _progress(not as_json, "simulating") as tick:
            report = schedule_risk(p, runs=runs, seed=seed, target=target, plan=days, plan_target=days is None,
                                   time_limit=time_limit, runner=runner, progress=tick, network=net)
        _emit(as_json, lambda: render_risk.risk_json(report), lambda: render_risk.risk_text(report),
              notes + report.notes)


def _plan_data(path: Path):
    """The JSON a plan was saved in (the --json output of a command)."""
    import json

    try:
        text = path.read_text(encoding="utf-8-sig")
    except OSError as exc:
        raise InputError(f"cannot read the plan: {exc.strerror or exc}", file=str(path),
                         fix="give the file the --json output of hasten plan was saved to") from None
    except UnicodeDecodeError:
        raise InputError("the plan is not UTF-8 text", file=str(path),
                         fix="save the --json output of hasten plan as UTF-8") from None
    try:
        return json.loads(text)
    except json.JSONDecodeError as exc:
        raise InputError(f"the plan is not valid JSON: {exc.msg}", file=str(path), row=exc.lineno,
                         fix="give the --json output of hasten plan, best, budget or recover unchanged") from None
