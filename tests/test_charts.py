"""Charts: the form follows the suffix (PNG, SVG, PDF; anything else refused with the list),
the cost chart and the schedule before and after are drawn from finished results, long
schedules are cut to the work that matters with a note, and the marks read in greyscale.

Reference plan: the ques10.com worked solution of a University of Mumbai exam question
(tests/data/examples/ques10_indirect80.json, verified text): 18 days by C 1 and F 4.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from typer.testing import CliRunner

from conftest import load_json, make_project, project_from_example
from hasten import charts
from hasten.cli import app
from hasten.errors import InputError
from hasten.formats import write_project
from hasten.planner import Planner
from hasten.project import Activity, Link

runner = CliRunner()
MAGIC = {".png": b"\x89PNG\r\n\x1a\n", ".pdf": b"%PDF", ".svg": b"<?xml"}


@pytest.fixture(scope="module")
def ques10():
    return Planner(project_from_example(load_json("examples/ques10_indirect80.json"), indirect=80))


@pytest.mark.parametrize("suffix", [".png", ".svg", ".pdf"])
def test_the_suffix_chooses_the_form(ques10, tmp_path: Path, suffix: str):
    charts.curve_chart(ques10.curve(), tmp_path / f"c{suffix}")
    charts.schedule_chart(ques10.plan(18), tmp_path / f"s{suffix}")
    for name in ("c", "s"):
        assert (tmp_path / f"{name}{suffix}").read_bytes().startswith(MAGIC[suffix])


def test_other_suffixes_are_refused_with_the_list(ques10, tmp_path: Path):
    with pytest.raises(InputError) as err:
        charts.schedule_chart(ques10.plan(18), tmp_path / "s.jpg")
    assert "FILE.png, FILE.svg or FILE.pdf" in str(err.value)
    folder = tmp_path / "q"
    write_project(ques10.project, folder)
    out = runner.invoke(app, ["plan", str(folder), "--finish", "18", "--plot", str(tmp_path / "s.gif")])
    assert out.exit_code == 2 and "FILE.png, FILE.svg or FILE.pdf" in out.output


def test_the_schedule_chart_marks_the_days_taken_off(ques10):
    svg = charts.svg_markup(charts.schedule_chart(ques10.plan(18)))
    # ques10: C 1 and F 4 at 18 days, each labelled with the days taken off
    assert svg.startswith("<svg") and "<metadata>" not in svg
    fig = charts.schedule_chart(ques10.plan(18))
    labels = [t.get_text() for t in fig.axes[0].texts]
    assert sorted(labels) == ["−1 d", "−4 d"]
    legend = [t.get_text() for t in fig.axes[0].get_legend().get_texts()]
    assert {"critical work (after)", "other work (after)", "before acceleration", "milestone"} <= set(legend)


def test_the_cost_chart_marks_the_best_finish_and_the_contract(ques10):
    curve = ques10.curve()
    fig = charts.cost_chart(curve.project, curve.totals, curve.best, current=curve.normal_finish)
    top, low = fig.axes
    assert curve.best.finish == 18  # ques10 worked solution: the optimum is 18 days
    assert "best finish" in " ".join(t.get_text() for t in top.get_legend().get_texts())
    assert {"added direct cost", "indirect cost", "damages less bonus"} <= {t.get_text() for t in low.get_legend().get_texts()}
    assert "finish date" in low.get_xlabel() and top.get_ylabel()


def _luminance(hex_colour: str) -> float:
    """Relative luminance (WCAG 2.1 definition) of an sRGB colour."""
    def lin(c):
        c = c / 255
        return c / 12.92 if c <= 0.04045 else ((c + 0.055) / 1.055) ** 2.4
    r, g, b = (int(hex_colour[k:k + 2], 16) for k in (1, 3, 5))
    return 0.2126 * lin(r) + 0.7152 * lin(g) + 0.0722 * lin(b)


def test_marks_read_in_greyscale():
    # WCAG 2.1 contrast ratio (L1 + 0.05) / (L2 + 0.05): critical against other work, and
    # critical work against the white page, at least 3:1 (the WCAG minimum for graphics).
    def ratio(a, b):
        la, lb = sorted((_luminance(a), _luminance(b)), reverse=True)
        return (la + 0.05) / (lb + 0.05)

    assert ratio(charts.INK, charts.PAPER) >= 3
    assert ratio(charts.INK, "#ffffff") >= 3
    assert ratio(charts.ACCENT, "#ffffff") >= 3


def test_a_long_schedule_keeps_the_work_that_matters(tmp_path: Path):
    # 300 activities: a critical chain of 100 and 200 short side activities hanging off it
    acts = [Activity(f"C{k:03d}", 5, crash_duration=3, cost=0, crash_cost=200 + k) for k in range(100)]
    acts += [Activity(f"S{k:03d}", 2) for k in range(200)]
    links = [Link(f"C{k:03d}", f"C{k + 1:03d}") for k in range(99)]
    links += [Link(f"C{k // 2:03d}", f"S{k:03d}") for k in range(200)]
    planner = Planner(make_project(acts, links))
    plan = planner.plan(planner.normal_finish - 3)
    fig = charts.schedule_chart(plan)
    shown = len(fig.axes[0].get_yticks())
    assert shown == charts.MAX_ROWS
    note = " ".join(t.get_text() for t in fig.texts)
    assert f"{shown} of 300 activities shown" in note and "left out" in note
    assert {a.id for a in plan.changed} <= {t.get_text().split()[0] for t in fig.axes[0].get_yticklabels()}
    charts.save(fig, tmp_path / "long.png", "png")
    assert (tmp_path / "long.png").stat().st_size > 0


def test_plot_on_each_command(ques10, tmp_path: Path):
    folder = tmp_path / "q"
    write_project(ques10.project, folder)
    prop = tmp_path / "p.csv"
    prop.write_text("id,shortened_by\nH,3\n", encoding="utf-8")
    for args in (["curve"], ["plan", "--finish", "18"], ["best"], ["budget", "--spend", "300"],
                 ["price", "--proposal", str(prop)], ["recover"]):
        target = tmp_path / f"{args[0]}.svg"
        out = runner.invoke(app, [args[0], str(folder), *args[1:], "--plot", str(target)])
        assert out.exit_code == 0, out.output
        assert target.read_bytes().startswith(MAGIC[".svg"])
