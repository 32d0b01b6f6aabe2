"""The command line never destroys a file and never ends in a traceback (issue: "Never
destroy a file, never crash on input"). Each case was found by an adversarial review; the
expected behaviour is the project's rule (README: "Bad input stops with one message ...
exit code 2; input files are never changed, and outputs are written whole or not at all")."""

from __future__ import annotations

import shutil
import signal
import subprocess
import sys
from pathlib import Path

import pytest
from typer.testing import CliRunner

from hasten.cli import app

ROOT = Path(__file__).resolve().parents[1]
runner = CliRunner()


def run(*args):
    return runner.invoke(app, [str(a) for a in args])


@pytest.fixture
def clinic(tmp_path: Path) -> Path:
    shutil.copytree(ROOT / "cases" / "clinic-fitout", tmp_path / "clinic")
    return tmp_path / "clinic"


def _one_line_error(out) -> str:
    assert out.exit_code == 2, out.output
    assert "Traceback" not in out.output and out.exception is None or isinstance(out.exception, SystemExit)
    lines = [ln for ln in out.output.splitlines() if ln.strip()]
    assert len(lines) == 1 and lines[0].startswith("error: "), out.output
    return lines[0]


def test_curve_csv_writes_exactly_the_path_given_or_refuses(clinic: Path, tmp_path: Path):
    existing = tmp_path / "x.csv"
    existing.write_text("keep me", encoding="utf-8")
    text = _one_line_error(run("curve", clinic, "--from", 67, "--to", 66, "--csv", tmp_path / "x.txt"))
    assert "--csv" in text and existing.read_text(encoding="utf-8") == "keep me"
    assert not (tmp_path / "x.txt").exists()


def test_outputs_never_replace_an_input_or_an_existing_file_without_force(clinic: Path, tmp_path: Path):
    before = (clinic / "activities.csv").read_bytes()
    for args in (("schedule", clinic, "--out", clinic / "activities.csv"),
                 ("schedule", clinic, "--out", clinic / "activities.csv", "--force"),
                 ("curve", clinic, "--from", 67, "--to", 66, "--plot", clinic / "project.toml", "--force")):
        _one_line_error(run(*args))
    assert (clinic / "activities.csv").read_bytes() == before
    as_json = tmp_path / "q.json"
    assert run("convert", clinic, as_json).exit_code == 0
    kept = as_json.read_bytes()
    _one_line_error(run("curve", as_json, "--from", 67, "--to", 66, "--plot", as_json, "--force"))
    assert as_json.read_bytes() == kept
    out = tmp_path / "s.csv"
    out.write_text("old", encoding="utf-8")
    assert "--force" in _one_line_error(run("schedule", clinic, "--out", out))
    assert out.read_text(encoding="utf-8") == "old"
    assert run("schedule", clinic, "--out", out, "--force").exit_code == 0
    assert out.read_text(encoding="utf-8").startswith("id,")


@pytest.mark.parametrize("args", [
    ("plan", "--finish", str(10 ** 30)),
    ("plan", "--earlier", "200000w"),
    ("budget", "--spend", "nan"),
    ("budget", "--spend", "inf"),
    ("plan", "--finish", "60", "--time-limit", "-1"),
    ("plan", "--finish", "60", "--time-limit", "nan"),
])
def test_out_of_range_numbers_are_clear_errors(clinic: Path, args):
    _one_line_error(run(args[0], clinic, *args[1:]))


def test_curve_to_a_negative_finish_names_the_option(clinic: Path):
    text = _one_line_error(run("curve", clinic, "--to", -5))
    assert "--to" in text and "-5" in text


def test_output_target_problems_are_found_before_computing(clinic: Path, tmp_path: Path):
    for target in (tmp_path / "missing" / "c.csv", tmp_path):  # a missing folder; a folder
        _one_line_error(run("curve", clinic, "--csv", target))


def test_interrupt_while_starting_prints_no_traceback():
    # SIGINT while the command line is still loading: `-X importtime` reports each import
    # as it ends, so the signal is sent as soon as the launcher is in, before the rest loads
    proc = subprocess.Popen([sys.executable, "-X", "importtime", "-m", "hasten", "schedule",
                             str(ROOT / "cases" / "clinic-fitout")],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    seen = []
    for line in proc.stderr:
        seen.append(line)
        if line.rstrip().endswith("hasten.launch"):
            proc.send_signal(signal.SIGINT)
            break
    out, err = proc.communicate(timeout=60)
    err = "".join(seen) + err
    assert "hasten.launch" in err
    assert "Traceback" not in err and proc.returncode == 130, (proc.returncode, err[-600:])
    assert "interrupted" in err
