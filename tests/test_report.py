"""The report (hasten report): its figures equal the JSON of the same question, the HTML is one
self-contained file, the Markdown and the workbook carry the same content.

Reference values come from the ques10.com worked solution of a University of Mumbai
construction-management exam question (tests/data/examples/ques10_indirect80.json, verified
text): 18 days for 280 of added cost, the optimum at 18 days with a total of 5,620 at 80 a day
of indirect cost. The cases/ projects are invented and only show that each question works.
"""

from __future__ import annotations

import json
import re
from html.parser import HTMLParser
from pathlib import Path

import pytest
from openpyxl import load_workbook
from typer.testing import CliRunner

from conftest import load_json, project_from_example
from hasten.cli import app
from hasten.formats import write_project

runner = CliRunner()
ROOT = Path(__file__).resolve().parents[1]


def run(*args):
    out = runner.invoke(app, [str(a) for a in args])
    assert out.exit_code == 0, out.output
    return out.output


class Page(HTMLParser):
    """The key figures (data-key, data-value, shown text), the ids present, every URL used."""

    def __init__(self):
        super().__init__()
        self.figures: dict[str, tuple[object, str]] = {}
        self.ids: set[str] = set()
        self.urls: list[str] = []
        self.tags: list[str] = []
        self._key = None
        self._value = None
        self._text = ""

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        self.tags.append(tag)
        if "id" in a:
            self.ids.add(a["id"])
        for k in ("src", "href", "xlink:href", "action"):
            if a.get(k):
                self.urls.append(a[k])
        if "data-key" in a:
            self._key, self._value, self._text = a["data-key"], json.loads(a["data-value"]), ""

    def handle_data(self, data):
        if self._key is not None:
            self._text += data

    def handle_endtag(self, tag):
        if self._key is not None and tag == "td":
            self.figures[self._key] = (self._value, self._text)
            self._key = None


def parse(path: Path) -> Page:
    page = Page()
    page.feed(path.read_text(encoding="utf-8"))
    return page


@pytest.fixture()
def ques10(tmp_path: Path) -> Path:
    folder = tmp_path / "ques10"
    write_project(project_from_example(load_json("examples/ques10_indirect80.json"), indirect=80), folder)
    return folder


def _dig(data: dict, key: str):
    for part in key.split("."):
        data = data[part]
    return data


def test_plan_report_figures_equal_the_json(ques10: Path, tmp_path: Path):
    html = tmp_path / "plan.html"
    run("report", ques10, "--finish", 18, "-o", html)
    data = json.loads(run("plan", ques10, "--finish", 18, "--json"))
    page = parse(html)
    assert page.figures, "the report shows no key figures"
    for key, (value, text) in page.figures.items():
        assert value == _dig(data, key), key
    # ques10 worked solution (verified text): 18 days for 280
    assert page.figures["finish"][0] == 18 and page.figures["added_cost"] == (280, "280")
    assert {"answer", "activities", "trades", "curve-data", "curve-svg", "chosen", "curve-table"} <= page.ids
    # one self-contained file: no stylesheet links, no external scripts, fonts or images
    assert "link" not in page.tags and "img" not in page.tags
    assert not [u for u in page.urls if u.startswith(("http:", "https:", "//")) or u.endswith((".js", ".css"))]
    text = html.read_text(encoding="utf-8")
    assert "@media print" in text and "@font-face" not in text and "<svg" in text


def test_best_report_and_the_curve_data(ques10: Path, tmp_path: Path):
    html = tmp_path / "best.html"
    run("report", ques10, "--best", "-o", html)
    data = json.loads(run("best", ques10, "--json"))
    page = parse(html)
    for key, (value, _) in page.figures.items():
        assert value == _dig(data, key), key
    # ques10 worked solution (verified text): optimum 18 days, total 5,620
    assert page.figures["finish"][0] == 18 and page.figures["total_cost"][0] == 5620
    text = html.read_text(encoding="utf-8")
    raw = text.split('id="curve-data">', 1)[1].split("</script>", 1)[0]
    curve = json.loads(raw.replace("<\\/", "</"))
    assert curve["chosen"] == 18
    totals = {r["finish"]: r["total_cost"] for r in data["table"]}
    # the report traces every finish; best's table stops where no earlier day can pay off
    assert totals.items() <= {p["finish"]: p["total_cost"] for p in curve["points"]}.items()
    plans = {p["finish"]: {i: d for i, d, _ in p["plan"]} for p in curve["points"]}
    assert plans[18] == {"C": 1, "F": 4}  # ques10: crash C by 1 and F by 4 for 18 days (verified text)


def test_recover_and_price_reports(tmp_path: Path):
    late = ROOT / "cases" / "harbour-depot-late"
    html = tmp_path / "rec.html"
    run("report", late, "--recover", "-o", html)
    data = json.loads(run("recover", late, "--json"))
    page = parse(html)
    for key in ("forecast_finish", "forecast_finish_date", "days_late"):
        assert page.figures[key][0] == data[key]
    text = html.read_text(encoding="utf-8")
    for course in data["courses"]:
        if course["possible"]:
            assert f'{course["total_cost"]:,.0f}' in text
    prop = tmp_path / "p.csv"
    prop.write_text("id,shortened_by,cost\nA310,2,40000\nA030,1,5000\n", encoding="utf-8")
    culvert = ROOT / "cases" / "riverside-culvert"
    out = tmp_path / "price.html"
    run("report", culvert, "--proposal", prop, "-o", out)
    data = json.loads(run("price", culvert, "--proposal", prop, "--json"))
    figures = parse(out).figures
    for key in ("finish", "finish_date", "proposal_cost", "asked_cost", "least_cost", "excess"):
        assert figures[key][0] == data[key], key
    assert figures["no_effect"][1] == ", ".join(data["no_effect"])


def test_markdown_and_workbook(ques10: Path, tmp_path: Path):
    md = tmp_path / "r.md"
    out = run("report", ques10, "--finish", 18, "-o", md)
    assert (tmp_path / "r-cost.svg").exists() and (tmp_path / "r-schedule.svg").exists()
    assert "r-cost.svg" in out
    text = md.read_text(encoding="utf-8")
    for part in ("## The question", "## The answer", "## The plan", "![", "## Assumptions", "## Cautions",
                 "## How the answer was checked", "| **18** |"):
        assert part in text, part
    book = tmp_path / "r.xlsx"
    run("report", ques10, "--finish", 18, "-o", book)
    wb = load_workbook(book)
    assert wb.sheetnames == ["summary", "plan", "by trade", "curve", "revised schedule", "cautions"]
    summary = {r[1].value: r[2] for r in wb["summary"].iter_rows(min_row=2) if r[1].value}
    assert summary["added_cost"].value == 280 and "0.00" in summary["added_cost"].number_format
    assert summary["finish_date"].is_date
    curve = wb["curve"]
    head = [c.value for c in curve[1]]
    row18 = next(r for r in curve.iter_rows(min_row=2) if r[0].value == 18)
    assert row18[head.index("finish_date")].is_date and row18[head.index("added_cost")].value == 280
    plan = wb["plan"]
    head = [c.value for c in plan[1]]
    assert {r[0].value: r[head.index("shortened_by")].value for r in plan.iter_rows(min_row=2)} == {"C": 1, "F": 4}


def test_report_needs_one_question_and_a_known_form(ques10: Path, tmp_path: Path):
    for args in (["--best", "--finish", "18"], []):
        out = runner.invoke(app, ["report", str(ques10), *args, "-o", str(tmp_path / "r.html")])
        assert out.exit_code == 2 and "exactly one question" in out.output
    out = runner.invoke(app, ["report", str(ques10), "--best", "-o", str(tmp_path / "r.pdf")])
    assert out.exit_code == 2 and "FILE.html, FILE.md or FILE.xlsx" in out.output
    assert not list(tmp_path.glob("r.*"))


def test_the_page_never_needs_the_network(ques10: Path, tmp_path: Path):
    html = tmp_path / "r.html"
    run("report", ques10, "--best", "-o", html)
    text = re.sub(r'xmlns(:\w+)?="[^"]*"', "", html.read_text(encoding="utf-8"))  # names, never fetched
    assert "http://" not in text and "https://" not in text
    assert not re.findall(r"url\((?!#)", text)  # only references inside the page (SVG clip paths)
