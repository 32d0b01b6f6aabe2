"""The direction of imports (DEVELOPERS.md, "Architecture"): the core never imports the
CLI, file formats or printing, and PuLP / highspy are imported in one module only."""

from __future__ import annotations

import ast
from pathlib import Path

SRC = Path(__file__).resolve().parents[1] / "src" / "hasten"
# Every module of the package is listed here, as core or as an edge (DEVELOPERS.md,
# "Architecture"); a new module must be placed before the tests pass.
CORE = ["project", "errors", "calendar", "graph", "progress", "network", "passes", "cpm",
        "solver_model", "solver_highs", "solver_cbc", "crash_model", "crash_calendars", "crash_slim", "crash_ties",
        "partial", "finish_search", "plan_costs", "plan_check", "plan_check_progress", "time_costs", "dominated", "cautions", "results", "planner", "recovery",
        "questions", "labour", "productivity", "premium", "crew_options", "quality",
        "uncertainty", "simulation", "cluster", "accelerated", "price", "crew_project", "plan_days", "risk",
        "scenario_model", "scenario_paths", "robust"]
EDGES = ["__init__", "__main__", "launch", "cli", "cli_plans", "cli_project", "render", "render_json", "render_fit", "charts", "report",
         "report_html", "report_md", "report_xlsx", "report_files", "render_crews", "render_risk"]  # and formats/
EDGE = {"cli", "cli_plans", "cli_project", "formats", "render", "render_json", "render_fit", "render_crews", "render_risk", "charts", "report", "report_html",
        "report_md", "report_xlsx", "report_files", "typer", "tabulate", "pandas", "openpyxl", "matplotlib"}


def _imports(path: Path) -> set[str]:
    names = set()
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.Import):
            names |= {a.name.split(".")[0] for a in node.names}
        elif isinstance(node, ast.ImportFrom):
            if node.level:  # relative: from .x import y / from . import x
                if node.module:
                    names.add(node.module.split(".")[0])
                else:
                    names |= {a.name for a in node.names}
            elif node.module:
                parts = node.module.split(".")
                names.add(parts[1] if parts[0] == "hasten" and len(parts) > 1 else parts[0])
    return names


def test_every_module_is_placed():
    modules = {p.stem for p in SRC.glob("*.py")}
    assert modules == set(CORE) | set(EDGES), "place new modules in CORE or EDGES"


def test_core_never_imports_the_edges():
    for name in CORE:
        found = _imports(SRC / f"{name}.py") & EDGE
        assert not found, f"{name}.py imports {sorted(found)}"


def test_one_module_imports_the_solvers():
    def users(library):
        return {p.relative_to(SRC).as_posix() for p in SRC.rglob("*.py") if library in _imports(p)}

    assert users("pulp") == {"solver_cbc.py"}
    assert users("highspy") == {"solver_highs.py"}


def test_only_the_cli_prints():
    for path in SRC.rglob("*.py"):
        if path.name in ("cli.py", "cli_plans.py", "cli_project.py"):
            continue
        tree = ast.parse(path.read_text(encoding="utf-8"))
        calls = [n for n in ast.walk(tree) if isinstance(n, ast.Call) and isinstance(n.func, ast.Name)
                 and n.func.id in ("print", "exit")]
        assert not calls, f"{path.relative_to(SRC)} prints or exits"


def test_modules_declare_all():
    for path in SRC.rglob("*.py"):
        if path.name in ("__main__.py",) or (path.name == "__init__.py" and path.parent.name != "hasten"
                                             and path.parent.name != "formats"):
            continue
        assert "__all__" in path.read_text(encoding="utf-8"), f"{path.relative_to(SRC)} has no __all__"


def test_the_plan_check_is_independent_in_code():
    # the rule (DEVELOPERS.md, "Exactness"): the plan check recomputes each plan from the
    # Project alone; it never imports the network, progress, passes, model or costs it checks
    allowed = {"__future__", "math", "dataclasses", "datetime", "typing", "numpy",
               "project", "calendar", "errors", "plan_check_progress"}
    for name in ("plan_check", "plan_check_progress"):
        found = _imports(SRC / f"{name}.py") - allowed
        assert not found, f"{name}.py imports {sorted(found)}"
    calendar_names = set()
    for name in ("plan_check", "plan_check_progress"):
        for node in ast.walk(ast.parse((SRC / f"{name}.py").read_text(encoding="utf-8"))):
            if isinstance(node, ast.ImportFrom) and node.module == "calendar" and node.level:
                calendar_names |= {a.name for a in node.names}
    assert calendar_names <= {"CalendarClock"}  # dates only, never the Timeline's conversions
