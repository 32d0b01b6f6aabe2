"""Charts drawn with matplotlib (the non-interactive Agg backend), from finished results.

- :func:`cost_chart` / :func:`curve_chart`: the cost of each finish date: total cost above;
  added direct cost, indirect cost and damages less bonus below; the best finish and the
  contract date marked.
- :func:`schedule_chart`: the schedule before and after acceleration, one row per activity.

The marks are chosen to read in greyscale and for colour-blind readers: critical work is
dark and other work light (a difference of lightness, not of hue), shortened work is hatched
and labelled with the days taken off, the schedule before is an outline above each bar.
A file's suffix chooses its form: .png, .svg or .pdf.
"""

from __future__ import annotations

import io
from datetime import date, timedelta
from pathlib import Path
from typing import TYPE_CHECKING, Sequence

from .errors import InputError

if TYPE_CHECKING:
    from .project import Project
    from .results import BestFinish, Curve, Plan, TotalCostPoint

__all__ = ["FORMATS", "chart_format", "cost_chart", "curve_chart", "schedule_chart", "save", "svg_markup",
           "MAX_ROWS"]

FORMATS = {".png": "png", ".svg": "svg", ".pdf": "pdf"}
#: a schedule chart shows at most this many activities (changed and critical work first)
MAX_ROWS = 80

# Our own palette: ink and paper tones, with lightness carrying the meaning
INK = "#1f2a36"  # critical work, text
PAPER = "#b8c4cc"  # other work
ACCENT = "#c26a1b"  # shortened work (edge and label); also legible as mid-grey
DATA = "#5b3f8c"  # the data date
CONTRACT = "#8a1c1c"  # the contract finish
LINES = {"total": (INK, "-", "o"), "added": (ACCENT, "--", "s"), "indirect": ("#4d7f99", "-.", "^"),
         "time": ("#7a7a7a", ":", "v")}


def chart_format(path: Path | str, option: str = "--plot") -> str:
    """The chart form a file's suffix asks for; any other suffix is refused with the list."""
    suffix = Path(path).suffix.lower()
    if suffix not in FORMATS:
        raise InputError(f"cannot draw a chart to {Path(path).name!r}", column=option, value=str(path),
                         fix="name the chart FILE.png, FILE.svg or FILE.pdf")
    return FORMATS[suffix]


def _pyplot():
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    plt.rcParams.update({"svg.hashsalt": "hasten", "svg.fonttype": "path", "font.size": 9})
    return plt


def save(fig, path, form: str) -> None:
    """Write ``fig`` to ``path`` in ``form`` and close it (no dates in the file's metadata)."""
    meta = {"Date": None} if form in ("svg", "pdf") else {}
    try:
        fig.savefig(path, format=form, metadata=meta, bbox_inches="tight")
    finally:
        _pyplot().close(fig)


def svg_markup(fig) -> str:
    """``fig`` as an inline ``<svg>`` element (no XML prolog), then closed."""
    buf = io.BytesIO()
    save(fig, buf, "svg")
    text = buf.getvalue().decode("utf-8")
    text = text[text.index("<svg"):]
    if "<metadata>" in text:  # the RDF block names outside vocabularies: not needed inline
        text = text[:text.index("<metadata>")] + text[text.index("</metadata>") + len("</metadata>"):]
    return text


def _money_axis(ax, currency: str) -> None:
    from matplotlib.ticker import FuncFormatter

    ax.yaxis.set_major_formatter(FuncFormatter(lambda v, _: f"{v:,.0f}"))
    ax.set_ylabel(currency or "money")


# -- the cost of each finish -------------------------------------------------------------
def cost_chart(project: Project, points: Sequence[TotalCostPoint], best: TotalCostPoint | None = None,
               *, title: str | None = None, current: int | None = None):
    """A figure: total cost against the finish date (above) and its parts (below)."""
    plt = _pyplot()
    pts = sorted(points, key=lambda r: r.finish)
    xs = [r.finish_date for r in pts]
    fig, (top, low) = plt.subplots(2, 1, sharex=True, figsize=(8.5, 6.2), height_ratios=(1, 1.15))
    cur = project.currency
    style = dict(markersize=3.5, linewidth=1.6)
    c, ls, m = LINES["total"]
    top.plot(xs, [r.total_cost for r in pts], color=c, linestyle=ls, marker=m, label="total cost", **style)
    for key, label, ys in (("added", "added direct cost", [r.added_cost for r in pts]),
                           ("indirect", "indirect cost", [r.time.indirect for r in pts]),
                           ("time", "damages less bonus", [r.time.damages + r.milestone_damages - r.time.bonus
                                                           for r in pts])):
        c, ls, m = LINES[key]
        low.plot(xs, ys, color=c, linestyle=ls, marker=m, label=label, **style)
    for ax in (top, low):
        ax.grid(True, color="#d9d9d9", linewidth=0.6)
        _money_axis(ax, cur)
        if project.contract.finish is not None:
            ax.axvline(project.contract.finish, color=CONTRACT, linestyle=(0, (2, 2)), linewidth=1.2,
                       label="contract finish" if ax is top else None)
    if best is not None:
        top.scatter([best.finish_date], [best.total_cost], s=120, marker="*", color=ACCENT, edgecolor=INK,
                    zorder=5, label=f"best finish: {best.finish_date.isoformat()}")
        top.annotate(f"{best.total_cost:,.0f}", (best.finish_date, best.total_cost), textcoords="offset points",
                     xytext=(0, 10), ha="center", color=INK)
    if current is not None:
        now = next((r for r in pts if r.finish == current), None)
        if now is not None:
            top.scatter([now.finish_date], [now.total_cost], s=40, marker="o", facecolor="white", edgecolor=INK,
                        zorder=5, label="current finish")
    top.set_ylabel(f"total cost ({cur})" if cur else "total cost")
    low.set_ylabel(f"parts of the cost ({cur})" if cur else "parts of the cost")
    low.set_xlabel("finish date (last day worked)")
    top.legend(loc="best", fontsize=8, frameon=False)
    low.legend(loc="best", fontsize=8, frameon=False)
    top.set_title(title or f"Cost of each finish date: {project.name}", fontsize=10)
    fig.autofmt_xdate()
    fig.tight_layout()
    return fig


def curve_chart(curve: Curve | BestFinish, path: Path | str | None = None):
    """The cost chart of a curve (or of ``best``'s table); written to ``path`` when given,
    else returned as a figure."""
    if hasattr(curve, "table"):  # BestFinish
        fig = cost_chart(curve.plan.project, curve.table, curve.point, current=curve.current.finish)
    else:
        fig = cost_chart(curve.project, curve.totals, curve.best, current=curve.normal_finish)
    if path is None:
        return fig
    save(fig, path, chart_format(path))
    return None


# -- the schedule before and after -------------------------------------------------------
def _rows(plan: Plan):
    """The rows to draw and a note of what was left out (long schedules)."""
    from .render_json import revised_rows

    rows = revised_rows(plan)
    by_id = {r["id"]: r for r in rows}
    if len(rows) <= MAX_ROWS:
        return rows, ""
    changed = {r["id"] for r in rows if r["shortened_by"] or r["option"]}
    critical = {r["id"] for r in rows if r["critical"]}
    near = set()
    for r in rows:
        if r["id"] in changed or r["id"] in critical:
            near.update(r["driving"])
    driven = {r["id"] for r in rows if set(r["driving"]) & changed}
    keep = changed | critical
    for extra in (near | driven):
        if len(keep) >= MAX_ROWS:
            break
        keep.add(extra)
    shown = [r for r in rows if r["id"] in keep]
    if len(shown) > MAX_ROWS:  # changed work first, then critical work, in schedule order
        rank = sorted(shown, key=lambda r: (r["id"] not in changed, r["id"] not in critical, r["es"]))
        keep = {r["id"] for r in rank[:MAX_ROWS]}
        shown = [r for r in rows if r["id"] in keep]
    left = len(rows) - len(shown)
    note = (f"{len(shown)} of {len(rows)} activities shown: the shortened and critical ones and the work "
            f"next to them; {left} others left out")
    return [by_id[r["id"]] for r in shown], note


def _span(first: str | None, last: str | None):
    """(start, width) in days of a bar from its first to its last day worked."""
    a, b = date.fromisoformat(first), date.fromisoformat(last)
    return a, max((b - a).days + 1, 1)


def schedule_chart(plan: Plan, path: Path | str | None = None, *, title: str | None = None):
    """The schedule before and after acceleration: a bar per activity on a date axis (the
    schedule before as an outline above), the days taken off hatched and labelled, critical
    work dark, milestones as diamonds, the data date and contract finish as lines."""
    import matplotlib.dates as mdates
    from matplotlib.lines import Line2D
    from matplotlib.patches import Patch

    plt = _pyplot()
    rows, note = _rows(plan)
    rows = sorted(rows, key=lambda r: (r["es"], r["ef"], r["id"]))
    n = len(rows)
    fig, ax = plt.subplots(figsize=(10, max(3.0, 1.6 + 0.24 * n)))
    for y, r in enumerate(rows):
        crit = r["critical"]
        shortened = r["shortened_by"] > 0 or bool(r["option"])
        face = INK if crit else PAPER
        if r["duration"] == 0 and (r["normal"] == 0):
            ax.scatter([date.fromisoformat(r["early_start"])], [y], marker="D", s=36, color=face, edgecolor=INK,
                       zorder=4)
            if r["early_start_before"]:
                ax.scatter([date.fromisoformat(r["early_start_before"])], [y - 0.3], marker="D", s=22,
                           facecolor="none", edgecolor=INK, linewidth=0.8, zorder=3)
            continue
        if r["early_start_before"]:
            a, w = _span(r["early_start_before"], r["early_finish_before"])
            ax.barh(y - 0.3, timedelta(days=w), left=a, height=0.18, facecolor="none", edgecolor=INK,
                    linewidth=0.7)
        a, w = _span(r["early_start"], r["early_finish"])
        ax.barh(y + 0.05, timedelta(days=w), left=a, height=0.5, color=face, edgecolor=ACCENT if shortened else INK,
                linewidth=1.4 if shortened else 0.4, hatch="////" if shortened else None)
        if shortened:
            label = f"−{r['shortened_by']} d" if r["shortened_by"] else ""
            if r["option"]:
                label = (label + " " if label else "") + f"by '{r['option']}'"
            ax.annotate(label, (a + timedelta(days=w), y + 0.05), xytext=(4, 0), textcoords="offset points",
                        va="center", fontsize=7, color=ACCENT, fontweight="bold")
    ax.set_yticks(range(n), [_label(r) for r in rows], fontsize=7 if n > 40 else 8)
    ax.set_ylim(n - 0.4, -0.8)
    ax.xaxis.set_major_formatter(mdates.ConciseDateFormatter(mdates.AutoDateLocator()))
    ax.grid(True, axis="x", color="#dddddd", linewidth=0.6)
    project = plan.project
    handles = [Patch(facecolor=INK, edgecolor=INK, label="critical work (after)"),
               Patch(facecolor=PAPER, edgecolor=INK, label="other work (after)"),
               Patch(facecolor="white", edgecolor=ACCENT, hatch="////", linewidth=1.4,
                     label="shortened (days taken off at the end)"),
               Patch(facecolor="none", edgecolor=INK, linewidth=0.7, label="before acceleration"),
               Line2D([], [], marker="D", linestyle="none", color=INK, label="milestone")]
    if project.data_date is not None:
        ax.axvline(project.data_date, color=DATA, linestyle=(0, (5, 2)), linewidth=1.2)
        handles.append(Line2D([], [], color=DATA, linestyle=(0, (5, 2)), label=f"data date {project.data_date}"))
    if project.contract.finish is not None:
        ax.axvline(project.contract.finish, color=CONTRACT, linestyle=(0, (2, 2)), linewidth=1.2)
        handles.append(Line2D([], [], color=CONTRACT, linestyle=(0, (2, 2)),
                              label=f"contract finish {project.contract.finish}"))
    ax.legend(handles=handles, loc="upper center", bbox_to_anchor=(0.5, -0.06 if n > 20 else -0.12), ncol=3,
              fontsize=7.5, frameon=False)
    ax.set_title(title or f"Schedule before and after: {plan.normal_finish_date} -> {plan.finish_date} "
                          f"({plan.normal_finish - plan.finish} working days earlier)", fontsize=10)
    if note:
        fig.text(0.01, 0.005, note, fontsize=7, color="#444444")
    fig.tight_layout()
    if path is None:
        return fig
    save(fig, path, chart_format(path))
    return None


def _label(r: dict) -> str:
    name = r["name"] or ""
    name = name if len(name) <= 34 else name[:33] + "…"
    return f"{r['id']}  {name}".strip()
