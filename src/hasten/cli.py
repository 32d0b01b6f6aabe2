"""The ``hasten`` command line. The only module that prints or exits.

Each command is one call into the library plus rendering; every error hasten raises on
purpose becomes a one-line message on standard error and exit code 2.
"""

from __future__ import annotations

import gc
import math
import os
import re
import sys
from contextlib import contextmanager
from datetime import date
from importlib import import_module
from pathlib import Path
from typing import Annotated, Optional

import typer

from .errors import HastenError, InfeasibleTargetError, InputError, TimeLimitError

__all__ = ["app", "main"]


# Start-up imports only typer and what every command needs: the library (numpy, the
# readers, the optimiser, the renderers) is imported by the command that uses it, when it
# first uses it. `hasten --help` and a command's checks of its options start at once.
class _Later:
    """A module of hasten imported on first use of one of its names."""

    def __init__(self, name: str):
        self._name = name

    def __getattr__(self, attr: str):
        return getattr(import_module(self._name, __package__), attr)


def _later(module: str, name: str):
    """The function ``name`` of ``module``, imported when first called."""
    def call(*args, **kwargs):
        return getattr(import_module(module, __package__), name)(*args, **kwargs)
    call.__name__ = name
    return call


render = _Later(".render")
render_json = _Later(".render_json")
cpm = _later(".cpm", "schedule")
check_output_folder = _later(".formats", "check_output_folder")
check_output_target = _later(".formats", "check_output_target")
import_research = _later(".formats", "import_research")
read_project_with_notes = _later(".formats", "read_project_with_notes")
convert_project = _later(".formats", "convert")
read_project = _later(".formats", "read_project")
write_project = _later(".formats", "write_project")
write_table = _later(".formats", "write_table")
write_file = _later(".formats.files", "write_file")

app = typer.Typer(
    add_completion=False,
    no_args_is_help=True,
    # plain help: typer's boxed (rich) help shows "<bool>" beside a flag such as --json, as
    # if it took a value; the plain form shows flags as switches and values as <int>, <str>
    rich_markup_mode=None,
    help="Least-cost schedule acceleration for construction projects: CPM, the time-cost "
         "curve, target plans, the best total-cost finish.",
)

ProjectArg = Annotated[Path, typer.Argument(help="Project folder, .xlsx workbook or .json file.")]
JsonOpt = Annotated[bool, typer.Option("--json", help="Print one JSON object instead of tables.")]
ForceOpt = Annotated[bool, typer.Option("--force", help="Replace an existing output file (never an input).")]
LimitOpt = Annotated[Optional[float], typer.Option("--time-limit", help="Seconds each mixed-integer solve may use.")]
WideOpt = Annotated[bool, typer.Option("--wide", help="Show long names whole (tables may pass 100 columns).")]
OutOpt = Annotated[Optional[Path], typer.Option("--out", help="Also write the revised schedule to FILE.csv or FILE.xlsx.")]
SaveOpt = Annotated[Optional[Path], typer.Option("--save-as", help="Also write the accelerated project to a new folder, .xlsx or .json.")]
PlotOpt = Annotated[Optional[Path], typer.Option("--plot", help="Also draw the schedule before and after to FILE.png, .svg or .pdf.")]
CrewsOpt = Annotated[Optional[str], typer.Option("--crews", help="Also offer options built from the activities' crew data: measures such as 5x10,6x10,2-shifts,+1-crew (see hasten options).")]
ProductivityOpt = Annotated[Optional[Path], typer.Option("--productivity", help="Your own overtime productivity table (CSV: schedule,week,loss) in place of the built-in one.")]
ScenariosOpt = Annotated[Optional[int], typer.Option("--scenarios", help="Scenarios sampled to choose a plan for risk (default 200).")]
SeedOpt = Annotated[Optional[int], typer.Option("--seed", help="Seed of the random draws (the same seed gives the same figures).")]


def _echo(text: str) -> None:
    typer.echo(text)


def _json(obj) -> None:
    """One JSON object on one line: compact, and fast for big schedules (an indented dump
    uses the slow pure-Python encoder). Pipe it to ``python -m json.tool`` to read it."""
    import json

    typer.echo(json.dumps(obj, ensure_ascii=False))


@contextmanager
def _errors():
    """Turn hasten's own errors into a message and exit code 2; add what to type next."""
    try:
        yield
    except InfeasibleTargetError as exc:
        typer.echo(f"error: {exc}; ask for --finish {exc.shortest} or later", err=True)
        raise typer.Exit(2) from None
    except TimeLimitError as exc:
        typer.echo(f"error: {exc}; allow more time with --time-limit SECONDS", err=True)
        raise typer.Exit(2) from None
    except HastenError as exc:
        typer.echo(f"error: {exc}", err=True)
        raise typer.Exit(2) from None


def _emit(as_json: bool, as_dict, as_text, notes=()) -> None:
    """Print a result as one JSON object (with its notes), or as text after its notes."""
    if as_json:
        _json(as_dict() | {"notes": list(notes)})
        return
    for note in notes:
        _echo(render.para(f"Note: {note}"))
    _echo(as_text())


def _outputs(project: Path, force: bool, *paths: Path | None, tables: tuple[Path | None, ...] = (),
             charts: tuple[Path | None, ...] = (), save_as: Path | None = None) -> None:
    """Check every output path before any work: never an input, never an existing file
    without --force (a saved project: never an existing one), a folder that exists and can
    be written, and the form a table, a chart or a saved project is told by its suffix."""
    from .formats.output import TABLE_SUFFIXES

    for path in tables:
        if path is not None and path.suffix.lower() not in TABLE_SUFFIXES:
            raise InputError(f"cannot write a table to a {path.suffix or 'suffix-less'!r} file", file=str(path),
                             fix=f"name the file {path.stem}.csv or {path.stem}.xlsx")
    for path in charts:
        if path is not None:
            from .charts import chart_format

            chart_format(path)
    if save_as is not None:
        if save_as.suffix.lower() not in ("", ".xlsx", ".json"):
            raise InputError("cannot save a project in this form", column="--save-as", value=str(save_as),
                             fix="give a new folder, a FILE.xlsx or a FILE.json")
        if save_as.exists() and (save_as.is_file() or any(save_as.iterdir())):
            raise InputError("already exists; nothing is overwritten", column="--save-as", value=str(save_as),
                             fix="give a new path (or an empty folder)")
        check_output_target(save_as, inputs=[project], force=False)
    for path in paths + tables + charts:
        if path is not None:
            check_output_target(path, inputs=[project], force=force)


def _crews(project: Path, crews: str | None, productivity: Path | None):
    """The project and its reading notes, with the options built from crews added when
    ``--crews`` is given (after the project's own options; a name used twice is refused);
    the notes then also say what was built, what the options rest on and the cautions."""
    p, notes = read_project_with_notes(project)
    if crews is None:
        if productivity is not None:
            raise InputError("--productivity replaces the overtime table of options built from "
                             "crews, and no --crews was given", value=str(productivity),
                             fix="add --crews 6x10 (or other measures), or leave out "
                                 "--productivity")
        return p, notes
    from .crew_project import crew_notes, crew_options, with_crew_options
    from .formats.productivity import read_productivity

    table = None if productivity is None else read_productivity(productivity)
    build = crew_options(p, crews, table)
    try:
        return with_crew_options(p, build), tuple(notes) + tuple(crew_notes(build))
    except InputError as exc:
        raise exc.located(str(project)) from None


def _with_check(obj: dict, check: tuple[str, ...]) -> dict:
    """A JSON result with the schedule-check notice (None when every measure passes)."""
    obj["schedule_check"] = check[0] if check else None
    return obj


def _date(text: str, option: str) -> date:
    try:
        return date.fromisoformat(text)
    except ValueError:
        raise InputError(f"{option} {text!r} is not a date", fix="write it as YYYY-MM-DD, e.g. 2027-06-30") from None


@contextmanager
def _progress(enabled: bool, label: str = "tracing the curve"):
    """A progress bar on a terminal for long traces; yields the callback (or None)."""
    if not enabled or not sys.stderr.isatty():
        yield None
        return
    with typer.progressbar(length=1, label=label, file=sys.stderr) as bar:
        state = {"done": 0}

        def tick(done: int, total: int) -> None:
            bar.length = total
            bar.update(done - state["done"])
            state["done"] = done

        yield tick


# -- commands ------------------------------------------------------------------------
@app.command()
def check(project: ProjectArg, as_json: JsonOpt = False) -> None:
    """Validate a project and check its schedule's quality. Exit 0 when the project is
    valid (failing measures are reported, not refused), 2 when not."""
    with _errors():
        from .network import Network
        from .quality import assess

        p = read_project(project)
        net = Network(p)
        sched = cpm(net)
        report = assess(p, getattr(p, "quality", None), network=net)
        shortened = sum(1 for a in p.activities if a.max_shortening > 0)
        if as_json:
            _json({"project": p.name, "valid": True, "activities": len(p.activities), "links": len(p.links),
                   "can_be_shortened": shortened, "normal_finish": sched.finish,
                   "finish_date": sched.finish_date.isoformat(), "warnings": list(sched.warnings),
                   "schedule_check": render_json.quality_json(report)})
            return
        _echo(f"{project}: valid. {len(p.activities)} activities, {len(p.links)} links, "
              f"{shortened} can be shortened; normal finish {sched.finish} working days.")
        used = [(c.name, sum(1 for a in p.activities if a.calendar == c.name)) for c in p.calendars]
        if used:
            _echo("Calendars of their own: " + ", ".join(
                f"{name} ({n} activit{'y' if n == 1 else 'ies'})" for name, n in used)
                  + f"; the others work to the project calendar ({p.calendar.name}).")
        for w in sched.warnings:
            _echo(f"Warning: {w}")
        _echo("")
        _echo(render.quality_text(report))


def _quality_notice(project) -> tuple[str, ...]:
    """The one line plan, best and recover print when the schedule check fails a measure."""
    from .quality import assess

    notice = assess(project, getattr(project, "quality", None)).notice()
    return () if notice is None else (notice,)


@app.command()
def schedule(
    project: ProjectArg,
    as_json: JsonOpt = False,
    out: Annotated[Optional[Path], typer.Option("--out", help="Also write the table to FILE.csv or FILE.xlsx.")] = None,
    deadline: Annotated[Optional[str], typer.Option("--deadline", help="Backward pass from this date (YYYY-MM-DD) instead of the early finish; float may go negative.")] = None,
    force: ForceOpt = False,
    wide: WideOpt = False,
) -> None:
    """Forward and backward pass: dates, floats, critical paths."""
    with _errors():
        _outputs(project, force, tables=(out,))
        p, notes = read_project_with_notes(project)
        sched = cpm(p, deadline=None if deadline is None else _date(deadline, "--deadline"))
        if out is not None:
            rows = render_json.schedule_rows(p, sched)
            write_table(out, render_json.SCHEDULE_COLUMNS, rows, sheet_name="schedule",
                        date_columns=render_json.DATE_COLUMNS)
        _emit(as_json, lambda: render_json.schedule_json(p, sched),
              lambda: render.schedule_text(p, sched, wide=wide), notes)


def _write_outputs(plan, *, out: Path | None = None, save_as: Path | None = None,
                   plot: Path | None = None, original=None) -> None:
    """The files a plan command was asked for: the revised schedule, the accelerated project,
    the chart of the schedule before and after."""
    if out is not None:
        write_table(out, render_json.REVISED_COLUMNS, render_json.revised_rows(plan),
                    sheet_name="revised schedule", date_columns=render_json.DATE_COLUMNS,
                    money_columns=("added_cost",), currency=plan.project.currency)
    if save_as is not None:
        from .accelerated import accelerated

        write_project(accelerated(original if original is not None else plan.project, plan), save_as)
    if plot is not None:
        from .charts import schedule_chart

        write_file(plot.resolve(), lambda tmp: schedule_chart(plan, tmp))


_EARLIER = re.compile(r"^\s*(\d+)\s*([dw])\s*$", re.IGNORECASE)


def _earlier(text: str):
    """``'10d'`` -> 10 working days; ``'2w'`` -> 2 calendar weeks (a questions.Earlier)."""
    from .questions import Earlier

    m = _EARLIER.match(text)
    if not m:
        raise InputError("--earlier is not understood", value=text,
                         fix="write working days as 10d or calendar weeks as 2w")
    n = int(m.group(1))
    return Earlier(days=n) if m.group(2).lower() == "d" else Earlier(weeks=n)


def _target(finish: int | None, by: str | None, earlier: str | None):
    """The finish target given by exactly one of --finish, --by and --earlier."""
    given = [x is not None for x in (finish, by, earlier)]
    if sum(given) != 1:
        raise HastenError("give exactly one target: --finish N (working days), --by YYYY-MM-DD, "
                          "or --earlier 10d / 2w")
    if finish is not None:
        return finish
    if by is not None:
        return _date(by, "--by")
    return _earlier(earlier)


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


@app.command()
def options(
    project: ProjectArg,
    out: Annotated[Optional[Path], typer.Option("--out", "-o", help="Write the options to FILE.csv (or .xlsx) in the layout of a project's options.csv.")] = None,
    schedules: Annotated[Optional[str], typer.Option("--schedules", help="Measures to price, separated by commas: DAYSxHOURS (6x10), 2-shifts, +N-crew. Default: 5x10,6x10,2-shifts,+1-crew.")] = None,
    productivity: ProductivityOpt = None,
    force: ForceOpt = False,
) -> None:
    """Acceleration options built from crew data (labour hours, crew, wage, [labour] rules):
    extended hours, a second shift, extra crews, each priced against normal working."""
    with _errors():
        from .crew_project import DEFAULT_SCHEDULES, crew_options
        from .formats.productivity import read_productivity
        from .render_crews import OPTIONS_TABLE_COLUMNS, options_rows, options_text

        _outputs(project, force, tables=(out,))
        if out is not None and productivity is not None:
            check_output_target(out, inputs=[productivity], force=force)
        p, notes = read_project_with_notes(project)
        table = None if productivity is None else read_productivity(productivity)
        build = crew_options(p, DEFAULT_SCHEDULES if schedules is None else schedules, table,
                             column="--schedules")
        if out is not None:
            write_table(out, OPTIONS_TABLE_COLUMNS, options_rows(build), sheet_name="options",
                        money_columns=("added_cost",), currency=p.currency)
        for note in notes:
            _echo(f"Note: {note}")
        _echo(options_text(p, build))
        if out is not None:
            _echo(f"\nWrote {out}: {build.options} options (copy it into a project folder as "
                  "options.csv, or use --crews on plan, best, budget and recover)")


@app.command()
def convert(
    source: Annotated[Path, typer.Argument(help="Project folder, .xlsx or .json to read.")],
    target: Annotated[Path, typer.Argument(help="Folder, .xlsx or .json to write (must not exist).")],
) -> None:
    """Convert a project between its folder, workbook and JSON forms."""
    with _errors():
        check_output_target(target, inputs=[source])
        convert_project(source, target)
        _echo(f"wrote {target}")


@app.command("import")
def import_(
    source: Annotated[Path, typer.Argument(help="A research instance: PSPLIB .mm or .sm, or Patterson .rcp.")],
    target: Annotated[Path, typer.Argument(help="Project folder, .xlsx or .json to write (must not exist).")],
) -> None:
    """Import a research instance (PSPLIB multi- or single-mode, Patterson format) as a project.

    Multi-mode jobs: the longest mode is the normal way, the other modes become options
    costing the difference in nonrenewable resources; renewable resources are ignored.
    """
    with _errors():
        check_output_target(target, inputs=[source])
        project = import_research(source, target)
        options = sum(len(a.options) for a in project.activities)
        _echo(f"wrote {target}: {len(project.activities)} activities, {len(project.links)} links, "
              f"{options} options")


@app.command()
def demo(
    folder: Annotated[Optional[Path], typer.Argument(help="Where to write the demo project (default: a new folder here).")] = None,
) -> None:
    """Write the bundled demo project and run the main job on it."""
    with _errors():
        if folder is None:
            folder = Path("hasten-demo")
            k = 2
            while folder.exists():
                folder = Path(f"hasten-demo-{k}")
                k += 1
        check_output_folder(folder)
        folder.mkdir(parents=True, exist_ok=True)
        import shutil
        from importlib import resources

        source = resources.files("hasten") / "demo"
        for item in source.iterdir():
            if item.is_file() and not item.name.startswith((".", "_")):
                with resources.as_file(item) as path:
                    shutil.copyfile(path, folder / item.name)
        from .planner import Planner

        planner = Planner(read_project(folder))
        _echo(f"Demo project written to {folder}/ (an invented job).")
        sched = planner.normal
        _echo(f"Current schedule: {sched.finish} working days, {sched.start_date.isoformat()} to "
              f"{sched.finish_date.isoformat()} (every activity: hasten schedule {folder}).")
        target = planner.contract_target()
        if target is not None:
            _echo("")
            _echo(render.plan_text(planner.plan(target), title="Least-cost plan to meet the contract finish"))
        b = planner.best_finish().point
        _echo("")
        _echo(f"Least total cost (direct + overhead + damages - bonus): finish at {b.finish} working days "
              f"({b.finish_date.isoformat()}), total {render.money(b.total_cost, planner.project.currency)}.")
        _echo(f"Next: hasten best {folder}   |   hasten curve {folder}   |   hasten schedule {folder}")


# -- risk --------------------------------------------------------------------------------
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


def main() -> None:  # pragma: no cover - the console script
    # A short-lived command builds many small objects and frees them at exit: the cyclic
    # garbage collector only costs time here (about a third of a 50,000-activity run), and
    # so does tearing the objects down one by one at exit. Every file hasten writes is
    # closed by then; the streams are flushed before the process ends.
    gc.disable()
    try:
        app()
        code = 0
    except KeyboardInterrupt:  # interrupted before typer's own handling began
        sys.stderr.write("hasten: interrupted\n")
        code = 130
    except SystemExit as exc:
        code = exc.code if isinstance(exc.code, int) else (0 if exc.code is None else 1)
    sys.stdout.flush()
    sys.stderr.flush()
    os._exit(code)
