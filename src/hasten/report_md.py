"""The report as Markdown: the same content as the HTML report, the charts as SVG files
beside it (``REPORT-cost.svg``, ``REPORT-schedule.svg``) and the curve as a table of every
finish with its plan."""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING

from .formats.files import write_file
from .render_json import money

if TYPE_CHECKING:
    from .report import Content
    from .results import Handover

__all__ = ["markdown_report", "write_markdown"]


def _cell(x) -> str:
    return ("" if x is None else str(x)).replace("|", "\\|").replace("\n", " ")


def _table(headers: list[str], rows: list[list], right: set[int] = frozenset()) -> list[str]:
    if not rows:
        return ["(none)", ""]
    out = ["| " + " | ".join(_cell(h) for h in headers) + " |",
           "|" + "|".join(" ---: " if k in right else " --- " for k in range(len(headers))) + "|"]
    out += ["| " + " | ".join(_cell(c) for c in r) + " |" for r in rows]
    return out + [""]


def markdown_report(h: Handover, c: Content, charts: dict[str, str]) -> str:
    """The page; ``charts`` maps a caption to the chart file's name (beside the report)."""
    cur = c.currency
    lines = [f"# {c.title}", "", f"Prepared with hasten {c.version}. Money in {cur or 'the project currency'}; "
             "days are working days unless stated.", "", "## The question", "", f"*{c.question}*", "",
             "## The answer", "", f"**{c.answer}**", ""]
    lines += _table(["figure", "value"], [[f.label, f.text(cur)] for f in c.figures], {1})
    if c.courses:
        lines += ["### The courses", ""] + _table(
            ["course", "finish (days, date)", "added cost", "damages", "net effect", "total cost", "note"],
            [[r["course"], f'{r["finish"]} ({r["finish_date"]})' if r["possible"] else "not possible",
              money(r["added_cost"]) if r["possible"] else "", money(r["damages"]) if r["possible"] else "",
              money(r["net_effect"]) if r["possible"] else "", money(r["total_cost"]) if r["possible"] else "",
              r["note"]] for r in c.courses], {2, 3, 4, 5})
    for title, headers, rows in c.extra:
        lines += [f"### {title}", ""] + _table(headers, rows)
    if c.activities:
        lines += ["## The plan", "", "### By trade", ""]
        lines += _table(["trade", "days shortened", "added cost"],
                        [[t["trade"], t["shortened_by"], money(t["added_cost"])] for t in c.trades], {1, 2})
        lines += ["### By activity, with the first and last day worked before and after", ""]
        lines += _table(["id", "activity", "trade", "way", "normal days", "new days", "shortened by", "added cost",
                         "start before", "start after", "finish before", "finish after"],
                        [[r["id"], r["name"], r["trade"], (r["option"] or "normal")
                          + (f' ({r["option_note"]})' if r["option_note"] else ""), r["normal"], r["duration"],
                          r["shortened_by"], money(r["added_cost"]), r["early_start_before"], r["early_start"],
                          r["early_finish_before"], r["early_finish"]] for r in c.activities], {4, 5, 6, 7})
    if charts:
        lines += ["## Charts", ""]
        for caption, name in charts.items():
            lines += [f"![{caption}]({name})", "", f"*{caption}*", ""]
    if c.points:
        lines += ["## Every finish on the least-cost curve", "",
                  f"The answer comes to the finish in {c.chosen} working days.", ""]
        lines += _table(["finish (days)", "finish date", "added cost", "total cost", "shortened (days)"],
                        [[("**" + str(p["finish"]) + "**") if p["finish"] == c.chosen else p["finish"],
                          p["finish_date"], money(p["added_cost"]), money(p["total_cost"]),
                          ", ".join(f"{i} {d}" + (f" by '{w}'" if w else "") for i, d, w in p["plan"]) or "none"]
                         for p in c.points], {0, 2, 3})
    lines += ["## Assumptions", ""] + [f"- {x}" for x in c.assumptions] + [""]
    lines += ["## Cautions", ""] + ([f"- {x}" for x in c.cautions] or ["- No work is shortened."]) + [""]
    lines += ["hasten prices schedules; it does not approve work methods. Local codes, labour law, collective "
              "agreements and licensed professionals decide.", ""]
    lines += ["## How the answer was checked", ""] + [f"- {x}" for x in c.checks] + [""]
    if c.notes:
        lines += ["## Notes", ""] + [f"- {x}" for x in c.notes] + [""]
    if c.schedule:
        lines += ["## The revised schedule", ""] + _table(
            ["id", "activity", "days", "start", "finish", "total float", "critical"],
            [[r["id"], r["name"], r["duration"], r["early_start"], r["early_finish"], r["total_float"],
              "yes" if r["critical"] else ""] for r in c.schedule], {2, 5})
    return "\n".join(lines).rstrip() + "\n"


def write_markdown(h: Handover, c: Content, path: Path) -> list[Path]:
    from .charts import cost_chart, save, schedule_chart

    figures = {}
    if len(h.curve):
        figures[("The cost of each finish date: total cost above, its parts below; the best finish starred.",
                 path.with_name(f"{path.stem}-cost.svg"))] = lambda: cost_chart(
            h.project, h.curve.totals, h.curve.best, current=h.curve.normal_finish)
    if h.plan is not None and h.plan.changed:
        figures[("The schedule before (outline) and after (filled): critical work dark, shortened work hatched.",
                 path.with_name(f"{path.stem}-schedule.svg"))] = lambda: schedule_chart(h.plan)
    written: list[Path] = []
    try:
        for (_, file), draw in figures.items():
            write_file(file.resolve(), lambda tmp, draw=draw: save(draw(), tmp, "svg"))
            written.append(file)
        text = markdown_report(h, c, {caption: file.name for caption, file in figures})
        write_file(path.resolve(), lambda tmp: tmp.write_text(text, encoding="utf-8"))
    except BaseException:
        for file in written:
            file.unlink(missing_ok=True)
        raise
    return written + [path]
