"""hasten: least-cost schedule acceleration for construction projects.

Read a project, then ask it a question; each answer is a plain dataclass with dates.

>>> import hasten
>>> p = hasten.read_project("cases/clinic-fitout")
>>> s = hasten.schedule(p)
>>> s.finish > 0 and len(s.critical_paths) >= 1
True
>>> result = hasten.plan(p, s.finish - 5)
>>> result.finish <= s.finish - 5
True

Functions: :func:`read_project`, :func:`schedule`, :func:`plan`, :func:`curve`,
:func:`best_finish`, :func:`earliest_within`, :func:`recover`; :class:`Planner` keeps one
project's model warm for many questions; :class:`Earlier` states a target before the current
finish. Errors derive from :class:`HastenError`; bad input raises :class:`InputError`.
Pricing a proposal and the bundle a report is written from are
:func:`hasten.questions.price` and :func:`hasten.questions.handover` (kept out of the top
level so that it stays small).
The names load on first use, so ``import hasten`` stays quick.
"""

from __future__ import annotations

from importlib import import_module

__all__ = [
    "read_project", "schedule", "plan", "curve", "best_finish", "earliest_within", "recover",
    "Planner", "Earlier", "Project", "HastenError", "InputError",
]

_WHERE = {
    "read_project": "formats", "schedule": "cpm", "plan": "questions", "curve": "questions",
    "best_finish": "questions", "earliest_within": "questions", "recover": "questions",
    "Planner": "planner", "Earlier": "questions", "Project": "project", "HastenError": "errors",
    "InputError": "errors",
}


def __getattr__(name: str):
    """Load a public name from its module on first use."""
    if name in _WHERE:
        value = getattr(import_module(f".{_WHERE[name]}", __name__), name)
        globals()[name] = value
        return value
    raise AttributeError(f"module 'hasten' has no attribute {name!r}")


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(__all__))


__version__ = "0.1.0"
