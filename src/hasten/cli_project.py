"""The commands about the project itself (check, schedule, options, convert, import,
demo), registered on :data:`hasten.cli.app`; the shared options and helpers are in
:mod:`hasten.cli`.
"""

from __future__ import annotations

from pathlib import Path
from typing import Annotated, Optional

import typer

from .cli import (  # the shared options and helpers
    app, ProjectArg, JsonOpt, ForceOpt, WideOpt, ProductivityOpt, _echo, _json, _errors, _keep,
    _emit, _outputs, _date, render, render_json, cpm, check_output_folder,
    check_output_target, import_research, read_project_with_notes, convert_project,
    read_project, write_table)

__all__: list[str] = []  # commands register themselves on hasten.cli.app


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
        _keep(p, sched)
        if out is not None:
            rows = render_json.schedule_rows(p, sched)
            write_table(out, render_json.SCHEDULE_COLUMNS, rows, sheet_name="schedule",
                        date_columns=render_json.DATE_COLUMNS)
        if as_json:  # the JSON text written whole, as _emit would dump schedule_json's dict
            _echo(render_json.schedule_json_text(p, sched, notes))
            return
        _emit(False, None, lambda: render.schedule_text(p, sched, wide=wide), notes)




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
