"""Docs that cannot drift: every ``$ hasten`` line of README.md runs, every output the
README shows is the program's own output, the docstring examples of the package run as
doctests, and the public API is what the README and DEVELOPERS.md say it is."""

from __future__ import annotations

import doctest
import importlib
import pkgutil
import re
import shlex
import shutil
from pathlib import Path

import pytest
from typer.testing import CliRunner

import hasten
from hasten.cli import app

ROOT = Path(__file__).resolve().parents[1]
README = (ROOT / "README.md").read_text(encoding="utf-8")
runner = CliRunner()


@pytest.fixture
def cases_copy(tmp_path: Path, monkeypatch) -> Path:
    """A copy of cases/ (and the research instance the README imports), so that nothing is
    written into the working tree."""
    shutil.copytree(ROOT / "cases", tmp_path / "cases")
    shutil.copytree(ROOT / "tests" / "data" / "psplib_mm", tmp_path / "tests" / "data" / "psplib_mm")
    monkeypatch.chdir(tmp_path)
    return tmp_path


def _run(line: str) -> str:
    out = runner.invoke(app, shlex.split(line)[1:])
    assert out.exit_code == 0, f"{line}\n{out.output}"
    return out.output


def test_readme_examples_run(cases_copy):
    lines = [ln.strip()[2:] for ln in README.splitlines() if ln.strip().startswith("$ hasten ")]
    assert len(lines) >= 10, "README.md shows too few '$ hasten' examples"
    for line in lines:
        _run(line)


def _shown_outputs() -> list[tuple[str, list[str]]]:
    """Fenced blocks of the README that start with a ``$ hasten`` line: the command and the
    lines shown after it."""
    blocks = re.findall(r"```[a-z]*\n(.*?)```", README, flags=re.S)
    out = []
    for block in blocks:
        lines = block.rstrip("\n").split("\n")
        if lines and lines[0].startswith("$ hasten "):
            out.append((lines[0][2:], lines[1:]))
    return out


def test_readme_shows_real_output(cases_copy):
    """Each shown block appears in the program's output as it is shown; a line ``...``
    stands for lines left out."""
    shown = _shown_outputs()
    assert shown, "README.md shows no command output"
    for command, expected in shown:
        actual = [ln.rstrip() for ln in _run(command).splitlines()]
        at = 0
        for part in "\n".join(expected).split("..."):
            want = [ln.rstrip() for ln in part.strip("\n").split("\n") if part.strip("\n")]
            if not want:
                continue
            found = next((k for k in range(at, len(actual) - len(want) + 1)
                          if actual[k:k + len(want)] == want), None)
            assert found is not None, f"README output of `{command}` differs:\n" + "\n".join(want)
            at = found + len(want)


def _modules():
    return [m.name for m in pkgutil.walk_packages(hasten.__path__, "hasten.") if m.name not in ("hasten.__main__", "hasten.launch")]


@pytest.mark.parametrize("name", _modules())
def test_docstring_examples_run(name: str, monkeypatch):
    monkeypatch.chdir(ROOT)  # the examples read the invented projects in cases/
    module = importlib.import_module(name)
    result = doctest.testmod(module, optionflags=doctest.ELLIPSIS | doctest.NORMALIZE_WHITESPACE)
    assert result.failed == 0


def test_public_api_is_small_and_documented():
    assert 8 <= len(hasten.__all__) <= 14
    assert set(hasten.__all__) <= set(dir(hasten))  # lazily loaded names are listed too
    for name in hasten.__all__:
        obj = getattr(hasten, name)
        assert obj.__doc__, f"hasten.{name} has no docstring"
    for name in ("plan", "schedule", "Planner", "read_project"):
        doc = getattr(hasten, name).__doc__
        assert ">>>" in doc or "Returns" in doc or "Parameters" in doc, name


def test_notebook_and_cli_give_the_same_plan(cases_copy):
    """A plan from the library (three lines) equals the plan the CLI prints as JSON."""
    import json

    p = hasten.read_project("cases/clinic-fitout")
    lib = hasten.plan(p, hasten.Earlier(days=3))
    cli = json.loads(_run("hasten plan cases/clinic-fitout --earlier 3d --json"))
    assert cli["finish"] == lib.finish and cli["added_cost"] == round(lib.added_cost, 2)
    assert {a["id"]: a["shortened_by"] for a in cli["activities"]} == \
        {a.id: a.shortened_by for a in lib.activities}
