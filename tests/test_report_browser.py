"""The HTML report in a real browser (headless Chromium): it renders, its script runs, and the
chosen point of the interactive curve (read from the URL fragment ``#finish=N``) shows that
finish's plan.

Skipped with a reason when no Chromium is installed (Debian: ``apt-get install chromium``;
README, "Tests and sources"). Reference plans: the least-cost curve of the ques10.com worked
solution of a University of Mumbai exam question (tests/data/examples/ques10_indirect80.json,
the data authors' scipy linprog check): 18 days by C 1 and F 4; 14 days by C 1, F 5, G 4, H 3.
"""

from __future__ import annotations

import shutil
import subprocess
from html.parser import HTMLParser
from pathlib import Path

import pytest
from typer.testing import CliRunner

from conftest import load_json, project_from_example
from hasten.cli import app
from hasten.formats import write_project

BROWSER = next((shutil.which(b) for b in ("chromium", "chromium-browser", "google-chrome", "chrome")
                if shutil.which(b)), None)
pytestmark = pytest.mark.skipif(BROWSER is None, reason="no Chromium found: install it (Debian: apt-get install "
                                                        "chromium) to test the report in a browser")
QUES10 = load_json("examples/ques10_indirect80.json")
CURVE = {int(p["T"]): {k: int(v) for k, v in p["crashed_by"].items()}
         for p in QUES10["independent_check"]["least_cost_curve_integer_points"]}


def _browser(tmp_path: Path, *args: str) -> str:
    profile = tmp_path / f"profile-{len(list(tmp_path.glob('profile-*')))}"
    cmd = [BROWSER, "--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
           "--disable-component-update", "--disable-sync", "--no-first-run", f"--user-data-dir={profile}", *args]
    done = subprocess.run(cmd, capture_output=True, text=True, timeout=180)
    assert done.returncode == 0, done.stderr[-2000:]
    return done.stdout


class Shown(HTMLParser):
    """What the DOM shows after the script: the chosen finish, its plan rows, the curve points."""

    def __init__(self):
        super().__init__()
        self.script_ran = False
        self.shown = None
        self.plan: dict[str, str] = {}
        self.points = 0
        self._in_plan = False
        self._row: list[str] = []
        self._cell = None

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        if tag == "body" and a.get("data-script") == "ran":
            self.script_ran = True
        if a.get("id") == "chosen":
            self.shown = int(a["data-shown"])
        if a.get("id") == "chosen-plan":
            self._in_plan = True
        if tag == "a" and a.get("href", "").startswith("#finish=") and "data-finish" in a:
            self.points += 1
        if self._in_plan and tag == "tr":
            self._row = []
        if self._in_plan and tag == "td":
            self._cell = ""

    def handle_data(self, data):
        if self._cell is not None:
            self._cell += data

    def handle_endtag(self, tag):
        if tag == "td" and self._cell is not None:
            self._row.append(self._cell)
            self._cell = None
        elif tag == "tr" and self._in_plan and len(self._row) == 3:
            self.plan[self._row[0]] = self._row[2]
        elif tag == "tbody" and self._in_plan:
            self._in_plan = False


@pytest.fixture(scope="module")
def report(tmp_path_factory) -> Path:
    tmp = tmp_path_factory.mktemp("browser")
    folder = tmp / "ques10"
    write_project(project_from_example(QUES10, indirect=80), folder)
    out = CliRunner().invoke(app, ["report", str(folder), "--best", "-o", str(tmp / "report.html")])
    assert out.exit_code == 0, out.output
    return tmp / "report.html"


def _shown(report: Path, fragment: str = "") -> Shown:
    dom = _browser(report.parent, "--dump-dom", report.resolve().as_uri() + fragment)
    page = Shown()
    page.feed(dom)
    return page


def test_the_script_runs_and_shows_the_chosen_plan(report: Path):
    page = _shown(report)
    assert page.script_ran
    # 12 finishes from 23 down to 12 days (the example's independent check), each a link of
    # the list the script builds from the embedded data (the page without script has none)
    assert page.points == len(CURVE) == 12
    assert page.shown == 18  # the best finish of the worked solution
    assert {k: int(v) for k, v in page.plan.items()} == CURVE[18]


def test_another_point_shows_its_own_plan(report: Path):
    page = _shown(report, "#finish=14")
    assert page.script_ran and page.shown == 14
    assert {k: int(v) for k, v in page.plan.items()} == CURVE[14]


def test_the_page_renders(report: Path):
    from PIL import Image

    shot = report.parent / "shot.png"
    _browser(report.parent, f"--screenshot={shot}", "--window-size=1000,1400", report.resolve().as_uri())
    image = Image.open(shot).convert("L")
    colours = image.getcolors(maxcolors=1 << 16)
    assert colours is not None and len(colours) > 20  # text, tables and charts, not a blank page
    lo, hi = image.getextrema()
    assert hi - lo > 150  # dark ink on a light page
