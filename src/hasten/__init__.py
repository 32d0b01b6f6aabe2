"""hasten: least-cost schedule acceleration for construction projects.

The library core: :mod:`hasten.project` (dataclasses), :mod:`hasten.network` (CPM),
:mod:`hasten.crash_model` (the LP builder), :mod:`hasten.crashing` (the questions),
:mod:`hasten.checks` (independent plan checks).
"""

from .errors import HastenError, InputError
from .project import Activity, Calendar, Contract, Costs, CrashStep, Link, LinkType, Project
from .cpm import Schedule, schedule


def __getattr__(name: str):
    """``Study`` and ``Plan`` load the optimiser (and its solvers) on first use only."""
    if name in ("Study", "Plan"):
        from . import crashing

        return getattr(crashing, name)
    raise AttributeError(f"module 'hasten' has no attribute {name!r}")

__all__ = [
    "Activity", "Calendar", "Contract", "Costs", "CrashStep", "Link", "LinkType", "Project",
    "Schedule", "schedule", "Study", "Plan", "HastenError", "InputError",
]

__version__ = "0.1.0"
