"""The ``hasten`` command line. The only module that prints or exits.

Each command is one call into the library plus rendering; every error hasten raises on
purpose becomes a one-line message on standard error and exit code 2.
"""

from __future__ import annotations

import gc
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


#: a text at least this long is written by :func:`_echo` without ``typer.echo``'s copies
_LONG = 1 << 20


def _echo(text: str) -> None:
    """``typer.echo(text)``. A long text (a schedule's JSON at 200,000 activities is 73 MB)
    without an escape character goes to the same stream without the copies echo makes of
    it (the line end added, the search for terminal colour codes it cannot hold)."""
    if len(text) < _LONG or "\x1b" in text:
        typer.echo(text)
        return
    stream = typer.get_text_stream("stdout", errors=None)  # (the stream echo writes to)
    stream.write(text)
    stream.write("\n")
    stream.flush()


#: big results of the command of a console-script run, kept until the process ends (see
#: :func:`main`); None otherwise (tests, a program calling the app), where they are freed
_KEPT: list | None = None


def _keep(*results) -> None:
    """Keep ``results`` alive to the end of a console-script run: :func:`main` ends the
    process without freeing them (at 200,000 activities, freeing the project and its
    schedule one object at a time when the command returns took a quarter of a second)."""
    if _KEPT is not None:
        _KEPT.append(results)


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


def _quality_notice(project) -> tuple[str, ...]:
    """The one line plan, best and recover print when the schedule check fails a measure."""
    from .quality import assess

    notice = assess(project, getattr(project, "quality", None)).notice()
    return () if notice is None else (notice,)


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


# the commands register themselves on ``app`` when their modules load
from . import cli_project, cli_plans  # noqa: E402,F401  (in this order in --help)


def main() -> None:  # pragma: no cover - the console script
    # A short-lived command builds many small objects and frees them at exit: the cyclic
    # garbage collector only costs time here (about a third of a 50,000-activity run), and
    # so does tearing the objects down one by one at exit. Every file hasten writes is
    # closed by then; the streams are flushed before the process ends.
    global _KEPT
    gc.disable()
    _KEPT = []
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
