"""The report as one self-contained HTML file.

Styles are inline, the charts inline SVG, and the one small script is inline too: no network,
no external fonts or scripts. The interactive curve reads the chosen finish from the URL
fragment (``#finish=N``) and shows that finish's total cost and plan; the plans of every point
are embedded as data. Without script the page shows the plan of the answer's finish.
"""

from __future__ import annotations

import json
from html import escape
from pathlib import Path
from typing import TYPE_CHECKING

from .formats.files import write_file
from .render_json import money

if TYPE_CHECKING:
    from .report import Content
    from .results import Handover

__all__ = ["html_report", "write_html"]

_CSS = """
:root { --ink: #1f2a36; --paper: #fbfaf7; --rule: #d5d2ca; --accent: #a4531a; --soft: #eef0f2; }
* { box-sizing: border-box; }
body { margin: 0; background: var(--paper); color: var(--ink); font: 15px/1.45 system-ui, -apple-system,
  "Segoe UI", Roboto, "Helvetica Neue", Arial, sans-serif; }
main { max-width: 60rem; margin: 0 auto; padding: 1.5rem 1.2rem 3rem; }
h1 { font-size: 1.5rem; margin: 0 0 .3rem; } h2 { font-size: 1.15rem; margin: 2rem 0 .6rem;
  border-bottom: 2px solid var(--ink); padding-bottom: .2rem; }
h3 { font-size: 1rem; margin: 1.2rem 0 .4rem; }
.question { font-style: italic; } .answer { font-size: 1.15rem; font-weight: 600; border-left: 5px solid
  var(--accent); padding: .5rem .8rem; background: #fff; }
table { border-collapse: collapse; width: 100%; margin: .4rem 0 1rem; font-size: .88rem; background: #fff; }
th, td { border-bottom: 1px solid var(--rule); padding: .28rem .45rem; text-align: left; vertical-align: top; }
th { background: var(--soft); font-weight: 600; }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
td.date { white-space: nowrap; }
table.figures td:first-child { width: 55%; }
figure { margin: .8rem 0 1.4rem; } figure svg { max-width: 100%; height: auto; display: block; }
figcaption { font-size: .85rem; color: #4a4a4a; }
.muted { color: #555; font-size: .88rem; }
#curve-box { display: grid; grid-template-columns: minmax(0, 3fr) minmax(0, 2fr); gap: 1rem; align-items: start; }
#curve-svg circle { fill: #fff; stroke: var(--ink); stroke-width: 1.5; cursor: pointer; }
#curve-svg circle.on { fill: var(--accent); stroke: var(--accent); r: 6; }
#curve-svg text { font-size: 11px; fill: var(--ink); }
#curve-slider { width: 100%; } #chosen { background: #fff; border: 1px solid var(--rule); padding: .6rem .8rem; }
#curve-points { columns: 3; font-size: .85rem; padding-left: 1.2rem; }
#curve-points a.on { font-weight: 700; color: var(--accent); }
.hidden { display: none; }
@media (max-width: 700px) { #curve-box { grid-template-columns: 1fr; } #curve-points { columns: 2; } }
@page { margin: 14mm; }
@media print {
  body { background: #fff; font-size: 10.5pt; } main { max-width: none; padding: 0; }
  .no-print, #curve-slider, #curve-points { display: none !important; }
  h2 { break-after: avoid; } tr, figure, .answer, #chosen { break-inside: avoid; }
  table { font-size: 8.5pt; } a { color: inherit; text-decoration: none; }
  #curve-box { grid-template-columns: 1fr 1fr; }
}
"""

_SCRIPT = """
(function () {
  var data = JSON.parse(document.getElementById("curve-data").textContent);
  var byFinish = {};
  data.points.forEach(function (p, k) { byFinish[p.finish] = k; });
  function fmt(x) { return Math.abs(x - Math.round(x)) < 0.005 ? Math.round(x).toLocaleString("en-GB")
    : x.toLocaleString("en-GB", {minimumFractionDigits: 2, maximumFractionDigits: 2}); }
  function cur(x) { return fmt(x) + (data.currency ? " " + data.currency : ""); }
  var list = document.getElementById("curve-points");
  data.points.forEach(function (p) {
    var li = document.createElement("li"), a = document.createElement("a");
    a.href = "#finish=" + p.finish; a.setAttribute("data-finish", p.finish);
    a.textContent = p.finish + " days (" + p.finish_date + "): " + cur(p.total_cost);
    li.appendChild(a); list.appendChild(li);
  });
  var slider = document.getElementById("curve-slider");
  slider.max = data.points.length - 1; slider.classList.remove("hidden");
  function show(finish) {
    var k = byFinish[finish]; if (k === undefined) { k = byFinish[data.chosen]; }
    if (k === undefined) { return; }
    var p = data.points[k];
    document.getElementById("chosen-finish").textContent = p.finish;
    document.getElementById("chosen-date").textContent = p.finish_date;
    document.getElementById("chosen-total").textContent = cur(p.total_cost);
    document.getElementById("chosen-added").textContent = cur(p.added_cost);
    var body = document.getElementById("chosen-plan"); body.textContent = "";
    if (!p.plan.length) { var r0 = body.insertRow(); var c0 = r0.insertCell(); c0.colSpan = 3;
      c0.textContent = "nothing shortened"; }
    p.plan.forEach(function (x) {
      var r = body.insertRow(); r.setAttribute("data-id", x[0]);
      r.insertCell().textContent = x[0]; r.insertCell().textContent = data.names[x[0]] || "";
      var c = r.insertCell(); c.className = "num"; c.textContent = x[1] + (x[2] ? " by '" + x[2] + "'" : "");
    });
    document.querySelectorAll("[data-finish]").forEach(function (e) {
      e.classList.toggle("on", +e.getAttribute("data-finish") === p.finish); });
    slider.value = k; document.getElementById("chosen").setAttribute("data-shown", p.finish);
  }
  function fromHash() { var m = /finish=(\\d+)/.exec(location.hash); show(m ? +m[1] : data.chosen); }
  slider.addEventListener("input", function () {
    location.hash = "finish=" + data.points[+slider.value].finish; });
  window.addEventListener("hashchange", fromHash);
  fromHash();
  document.body.setAttribute("data-script", "ran");
})();
"""


def _e(x) -> str:
    return escape("" if x is None else str(x))


def _table(headers: list[str], rows: list[list], nums: set[int] = frozenset(), attrs: str = "") -> str:
    head = "".join(f'<th class="num">{_e(h)}</th>' if k in nums else f"<th>{_e(h)}</th>"
                   for k, h in enumerate(headers))
    body = "".join("<tr>" + "".join(f'<td class="num">{_e(c)}</td>' if k in nums else f"<td>{_e(c)}</td>"
                                    for k, c in enumerate(r)) + "</tr>" for r in rows)
    if not rows:
        body = f'<tr><td colspan="{len(headers)}">none</td></tr>'
    return f"<table{attrs}><thead><tr>{head}</tr></thead><tbody>{body}</tbody></table>"


def _activity_table(c: Content) -> str:
    ways = any(r["option"] for r in c.activities)
    head = ["id", "activity", "trade"] + (["way"] if ways else []) + ["days", "added cost", "start before",
                                                                      "start after", "finish before", "finish after"]
    rows = []
    for r in c.activities:
        way = [(r["option"] or "normal") + (f' ({r["option_note"]})' if r["option_note"] else "")] if ways else []
        cells = [_e(r["id"]), _e(r["name"]), _e(r["trade"])] + [_e(w) for w in way]
        cells += [f'{r["normal"]} &rarr; {r["duration"]}', _e(money(r["added_cost"]))]
        rows.append("<tr>" + "".join(f"<td>{x}</td>" for x in cells[:-2])
                    + "".join(f'<td class="num">{x}</td>' for x in cells[-2:])
                    + "".join(f'<td class="date">{_e(r[k])}</td>' for k in ("early_start_before", "early_start",
                                                                            "early_finish_before", "early_finish"))
                    + "</tr>")
    heads = "".join(f'<th class="num">{h}</th>' if h in ("days", "added cost") else f"<th>{h}</th>" for h in head)
    return f'<table id="activities"><thead><tr>{heads}</tr></thead><tbody>{"".join(rows)}</tbody></table>'


def _curve_svg(c: Content) -> str:
    """The curve drawn by hand as SVG: a point per finish, each a link to ``#finish=N``."""
    pts = sorted(c.points, key=lambda p: p["finish"])
    if not pts:
        return ""
    w, h, left, right, top, bottom = 560, 260, 78, 16, 14, 40
    lo_x, hi_x = pts[0]["finish"], pts[-1]["finish"]
    ys = [p["total_cost"] for p in pts]
    lo_y, hi_y = min(ys), max(ys)
    span_x, span_y = max(hi_x - lo_x, 1), max(hi_y - lo_y, 1e-9)

    def x(f):
        return left + (f - lo_x) / span_x * (w - left - right)

    def y(v):
        return top + (hi_y - v) / span_y * (h - top - bottom) if hi_y > lo_y else (h - bottom + top) / 2

    line = " ".join(f"{x(p['finish']):.1f},{y(p['total_cost']):.1f}" for p in pts)
    on = ' class="on"'
    dots = "".join(
        f'<a href="#finish={p["finish"]}"><circle data-finish="{p["finish"]}" cx="{x(p["finish"]):.1f}" '
        f'cy="{y(p["total_cost"]):.1f}" r="4"{on if p["finish"] == c.chosen else ""}>'
        f'<title>{p["finish"]} working days ({p["finish_date"]}): total {_e(money(p["total_cost"], c.currency))}'
        f"</title></circle></a>" for p in pts)
    labels = (f'<text x="{left}" y="{h - 22}">{pts[0]["finish_date"]}</text>'
              f'<text x="{w - right}" y="{h - 22}" text-anchor="end">{pts[-1]["finish_date"]}</text>'
              f'<text x="{(left + w - right) / 2}" y="{h - 6}" text-anchor="middle">finish date '
              f'(working days {lo_x} to {hi_x})</text>'
              f'<text x="{left - 6}" y="{y(hi_y) + 4:.1f}" text-anchor="end">{_e(money(hi_y))}</text>'
              f'<text x="{left - 6}" y="{y(lo_y) + 4:.1f}" text-anchor="end">{_e(money(lo_y))}</text>'
              f'<text x="12" y="{(h - bottom + top) / 2}" transform="rotate(-90 12 {(h - bottom + top) / 2})" '
              f'text-anchor="middle">total cost ({_e(c.currency or "money")})</text>')
    axes = (f'<line x1="{left}" y1="{h - bottom}" x2="{w - right}" y2="{h - bottom}" stroke="#888"/>'
            f'<line x1="{left}" y1="{top}" x2="{left}" y2="{h - bottom}" stroke="#888"/>')
    return (f'<svg id="curve-svg" viewBox="0 0 {w} {h}" role="img" aria-label="total cost of each finish">'
            f'{axes}<polyline points="{line}" fill="none" stroke="#1f2a36" stroke-width="1.6"/>{dots}{labels}</svg>')


def _chosen_panel(c: Content) -> str:
    p = next((q for q in c.points if q["finish"] == c.chosen), None)
    if p is None:
        return ""
    rows = "".join(f'<tr data-id="{_e(i)}"><td>{_e(i)}</td><td>{_e(c.names.get(i, ""))}</td>'
                   f'<td class="num">{d}{_e(f" by {way!r}") if way else ""}</td></tr>' for i, d, way in p["plan"])
    if not rows:
        rows = '<tr><td colspan="3">nothing shortened</td></tr>'
    return (f'<div id="chosen" data-shown="{p["finish"]}"><h3>Finish in <span id="chosen-finish">{p["finish"]}'
            f'</span> working days (<span id="chosen-date">{p["finish_date"]}</span>)</h3>'
            f'<p>Total cost <strong id="chosen-total">{_e(money(p["total_cost"], c.currency))}</strong>; added '
            f'direct cost <span id="chosen-added">{_e(money(p["added_cost"], c.currency))}</span>.</p>'
            f'<table><thead><tr><th>id</th><th>activity</th><th class="num">days shortened</th></tr></thead>'
            f'<tbody id="chosen-plan">{rows}</tbody></table></div>')


def _data(c: Content) -> str:
    data = {"currency": c.currency, "chosen": c.chosen, "names": c.names,
            "points": [{k: p[k] for k in ("finish", "finish_date", "added_cost", "total_cost", "plan")}
                       for p in c.points]}
    text = json.dumps(data, ensure_ascii=False, separators=(",", ":"))
    return text.replace("</", "<\\/").replace("<!--", "<\\!--")


def html_report(h: Handover, c: Content, charts: dict[str, str]) -> str:
    """The whole page; ``charts`` maps a caption to inline SVG markup."""
    cur = c.currency
    figs = "".join(f'<tr><td>{_e(f.label)}</td><td class="num" data-key="{_e(f.key)}" '
                   f'data-value="{_e(json.dumps(f.value))}">{_e(f.text(cur))}</td></tr>' for f in c.figures)
    parts = [f"<h1>{_e(c.title)}</h1>",
             f'<p class="muted">Prepared with hasten {_e(c.version)}. Money in {_e(cur or "the project currency")}; '
             "days are working days unless stated.</p>",
             "<h2>The question</h2>", f'<p class="question">{_e(c.question)}</p>',
             "<h2>The answer</h2>", f'<p class="answer" id="answer">{_e(c.answer)}</p>',
             f'<table class="figures" id="figures"><tbody>{figs}</tbody></table>']
    if c.courses:
        rows = [[r["course"], "not possible" if not r["possible"] else f'{r["finish"]} ({r["finish_date"]})',
                 money(r["added_cost"]) if r["possible"] else "", money(r["damages"]) if r["possible"] else "",
                 money(r["net_effect"]) if r["possible"] else "", money(r["total_cost"]) if r["possible"] else "",
                 r["note"]] for r in c.courses]
        parts += ["<h3>The courses</h3>",
                  _table(["course", "finish (days, date)", "added cost", "damages", "net effect", "total cost",
                          "note"], rows, {2, 3, 4, 5}, ' id="courses"')]
    for title, headers, rows in c.extra:
        parts += [f"<h3>{_e(title)}</h3>", _table(headers, rows, {k for k, x in enumerate(headers)
                                                                 if x in ("added cost", "asked", "shortened by",
                                                                          "days it buys", "proposed",
                                                                          "least-cost plan")})]
    if c.activities:
        parts += ["<h2>The plan</h2>", "<h3>By trade</h3>",
                  _table(["trade", "days shortened", "added cost"],
                         [[t["trade"], t["shortened_by"], money(t["added_cost"])] for t in c.trades], {1, 2},
                         ' id="trades"'),
                  "<h3>By activity, with the first and last day worked before and after</h3>",
                  _activity_table(c)]
    if charts:
        parts.append("<h2>Charts</h2>")
        for caption, svg in charts.items():
            parts.append(f"<figure>{svg}<figcaption>{_e(caption)}</figcaption></figure>")
    if c.points:
        parts += ["<h2>Every finish on the least-cost curve</h2>",
                  '<p class="no-print muted">Choose a finish on the curve (click a point, use the slider, or '
                  "add #finish=N to the address) to see its total cost and which activities are shortened "
                  "by how much.</p>",
                  f'<div id="curve-box"><div>{_curve_svg(c)}'
                  f'<input id="curve-slider" class="hidden" type="range" min="0" step="1" aria-label="finish">'
                  f"</div>{_chosen_panel(c)}</div>",
                  '<ol id="curve-points"></ol>',
                  _table(["finish (days)", "finish date", "added cost", "indirect", "damages", "bonus", "total cost"],
                         [[p["finish"], p["finish_date"], money(p["added_cost"]), money(p["indirect_cost"]),
                           money(p["damages"]), money(p["bonus"]), money(p["total_cost"])] for p in c.points],
                         {0, 2, 3, 4, 5, 6}, ' id="curve-table"')]
    parts += ["<h2>Assumptions</h2>", "<ul>" + "".join(f"<li>{_e(x)}</li>" for x in c.assumptions) + "</ul>",
              "<h2>Cautions</h2>", "<ul>" + ("".join(f"<li>{_e(x)}</li>" for x in c.cautions)
                                             or "<li>No work is shortened.</li>") + "</ul>",
              '<p class="muted">hasten prices schedules; it does not approve work methods. Local codes, labour '
              "law, collective agreements and licensed professionals decide.</p>",
              "<h2>How the answer was checked</h2>", "<ul>" + "".join(f"<li>{_e(x)}</li>" for x in c.checks) + "</ul>"]
    if c.notes:
        parts += ["<h2>Notes</h2>", "<ul>" + "".join(f"<li>{_e(x)}</li>" for x in c.notes) + "</ul>"]
    if c.schedule:
        parts += ["<h2>The revised schedule</h2>",
                  _table(["id", "activity", "days", "start", "finish", "total float", "critical"],
                         [[r["id"], r["name"], r["duration"], r["early_start"], r["early_finish"], r["total_float"],
                           "yes" if r["critical"] else ""] for r in c.schedule], {2, 5}, ' id="schedule"')]
    data = _data(c)
    return ("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
            '<meta name="viewport" content="width=device-width, initial-scale=1">'
            f"<title>{_e(c.title)}</title><style>{_CSS}</style></head>"
            f'<body data-kind="{_e(h.kind)}"><main>{"".join(parts)}</main>'
            f'<script type="application/json" id="curve-data">{data}</script>'
            f"<script>{_SCRIPT}</script></body></html>\n")


def _charts(h: Handover) -> dict[str, str]:
    from .charts import cost_chart, schedule_chart, svg_markup

    out = {}
    if len(h.curve):
        out["The cost of each finish date: total cost above, its parts below; the best finish starred."] = \
            svg_markup(cost_chart(h.project, h.curve.totals, h.curve.best, current=h.curve.normal_finish))
    if h.plan is not None and h.plan.changed:
        out["The schedule before (outline) and after (filled): critical work dark, shortened work hatched."] = \
            svg_markup(schedule_chart(h.plan))
    return out


def write_html(h: Handover, c: Content, path: Path) -> list[Path]:
    page = html_report(h, c, _charts(h))
    write_file(path.resolve(), lambda tmp: tmp.write_text(page, encoding="utf-8"))
    return [path]
