"""Options built from crews as text (the summary of ``hasten options``) and as the rows of an
options table (``id, option, duration, added_cost, note``: the project's own options
file, so the output can be copied into a project folder as ``options.csv``)."""

from __future__ import annotations

from tabulate import tabulate

from .crew_options import labour_cautions, option_sources
from .crew_project import CrewBuild
from .project import Project
from .render_json import money

__all__ = ["OPTIONS_TABLE_COLUMNS", "options_rows", "options_text"]

#: The columns written: the required and the note column of the project's options table.
OPTIONS_TABLE_COLUMNS = ("id", "option", "duration", "added_cost", "note")


def options_rows(build: CrewBuild) -> list[dict[str, object]]:
    """One row per option built, activities in project order, options in the order asked."""
    return [{"id": r.activity_id, "option": o.name, "duration": o.duration,
             "added_cost": o.added_cost, "note": o.note}
            for r in build.results for o in r.options]


def options_text(project: Project, build: CrewBuild) -> str:
    """The summary: per activity the options built against normal working and the measures
    skipped with their reasons; the sources the options rest on; notes and cautions."""
    cur = project.currency
    names = {a.id: a.name for a in project.activities}
    rows, skipped = [], []
    for r in build.results:
        normal = r.normal
        head = [r.activity_id, names.get(r.activity_id, ""), f"{normal.duration}"]
        for k, option in enumerate(r.options):
            rows.append((head if k == 0 else ["", "", ""])
                        + [option.name, option.duration, money(option.added_cost)])
        if not r.options:
            rows.append(head + ["(none)", "", ""])
        skipped += [f"- {r.activity_id} {s.measure}: {s.reason}" for s in r.skipped]
    skipped += [f"- {ident}: {why}" for ident, why in build.passed]
    lines = [f"Options from crews ({build.schedules}) for {project.name}: {build.options} "
             f"options for {sum(1 for r in build.results if r.options)} of "
             f"{len(build.results) + len(build.passed)} activities with labour data"
             + (f" (amounts in {cur})" if cur else ""),
             "",
             tabulate(rows, headers=["id", "name", "normal days", "option", "days", "added cost"],
                      tablefmt="simple", disable_numparse=True)]
    if skipped:
        lines += ["", "Not offered:"] + skipped
    sources = option_sources(build.results)
    if sources:
        lines += ["", "The options rest on:"] + [f"- {s}" for s in sources]
    if build.notes:
        lines += ["", "Notes:"] + [f"- {n}" for n in build.notes]
    cautions = labour_cautions(build.results) if build.options else []
    if cautions:
        lines += ["", "Cautions:"] + [f"- {c}" for c in cautions]
    return "\n".join(lines)
