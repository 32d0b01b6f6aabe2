"""The report as a workbook: sheets summary, plan, by trade, curve, revised schedule and
cautions, with real dates and money formatted in the project's currency."""

from __future__ import annotations

from datetime import date
from pathlib import Path
from typing import TYPE_CHECKING

from .render_json import DATE_COLUMNS, REVISED_COLUMNS
from .report_files import Sheet, write_workbook

if TYPE_CHECKING:
    from .report import Content
    from .results import Handover

__all__ = ["report_sheets", "write_xlsx"]


def report_sheets(h: Handover, c: Content) -> list[Sheet]:
    cur = c.currency
    summary = [{"item": "project", "value": c.project}, {"item": "question", "value": c.question},
               {"item": "answer", "value": c.answer}]
    for f in c.figures:
        value = date.fromisoformat(f.value) if f.kind == "date" and f.value else f.value
        summary.append({"item": f.label, "key": f.key, "value": value})
    for r in c.courses:
        summary.append({"item": f"course: {r['course']}", "value": r["total_cost"], "key": "total_cost"})
    sheets = [Sheet("summary", ("item", "key", "value"), summary, currency=cur, widths={"value": 60, "item": 40},
                    money_rows=frozenset(_money_rows(c)))]
    plan_rows = [{k: r.get(k) for k in REVISED_COLUMNS} for r in c.activities]
    sheets.append(Sheet("plan", REVISED_COLUMNS, plan_rows, DATE_COLUMNS, ("added_cost",), cur))
    sheets.append(Sheet("by trade", ("trade", "shortened_by", "added_cost"), c.trades, (), ("added_cost",), cur))
    curve_cols = ("finish", "finish_date", "added_cost", "indirect_cost", "damages", "bonus", "total_cost", "plan")
    curve = [{**p, "plan": ", ".join(f"{i} {d}" + (f" by '{w}'" if w else "") for i, d, w in p["plan"])}
             for p in c.points]
    sheets.append(Sheet("curve", curve_cols, curve, ("finish_date",),
                        ("added_cost", "indirect_cost", "damages", "bonus", "total_cost"), cur))
    sheets.append(Sheet("revised schedule", REVISED_COLUMNS, c.schedule, DATE_COLUMNS, ("added_cost",), cur))
    notes = [{"kind": "caution", "text": x} for x in c.cautions] + \
        [{"kind": "assumption", "text": x} for x in c.assumptions] + \
        [{"kind": "check", "text": x} for x in c.checks] + [{"kind": "note", "text": x} for x in c.notes]
    for title, headers, rows in c.extra:
        notes += [{"kind": title, "text": "; ".join(f"{h}: {v}" for h, v in zip(headers, r))} for r in rows]
    sheets.append(Sheet("cautions", ("kind", "text"), notes, widths={"text": 100}))
    return sheets


def write_xlsx(h: Handover, c: Content, path: Path) -> list[Path]:
    sheets = report_sheets(h, c)
    write_workbook(path, sheets)
    return [path]


def _money_rows(c: Content) -> set[int]:
    """Rows (1-based, header row 1) of the summary sheet that hold money."""
    rows, k = set(), 4  # project, question, answer are rows 2-4
    for f in c.figures:
        k += 1
        if f.kind == "money":
            rows.add(k)
    for _ in c.courses:
        k += 1
        rows.add(k)
    return rows
