"""One exception hierarchy for the whole package.

The CLI catches :class:`HastenError` once, prints its message and exits with code 2.
"""

from __future__ import annotations

__all__ = [
    "HastenError",
    "InputError",
    "CycleError",
    "InfeasibleTargetError",
    "SolverError",
    "TimeLimitError",
    "PlanCheckError",
]


class HastenError(Exception):
    """Base class of every error hasten raises on purpose."""


class InputError(HastenError):
    """Bad input data, located as precisely as we can.

    ``file``, ``row`` (the row number a spreadsheet shows: header row 1, first data row 2;
    for JSON the 1-based position in its list),
    ``column``, ``value`` and ``fix`` are kept as attributes so tests and callers
    can inspect them; ``str(error)`` is the whole human message.
    """

    def __init__(self, problem: str, *, file: str | None = None, row: int | str | None = None,
                 column: str | None = None, value: object = None, fix: str | None = None):
        self.problem = problem
        self.file = file
        self.row = row
        self.column = column
        self.value = value
        self.fix = fix
        super().__init__(self._message())

    def _message(self) -> str:
        where = []
        if self.file:
            where.append(str(self.file))
        if self.row is not None:
            where.append(f"row {self.row}")
        if self.column:
            where.append(f"column '{self.column}'")
        head = ", ".join(where)
        text = f"{head}: {self.problem}" if head else self.problem
        if self.value is not None:
            text += f" (value: {self.value!r})"
        if self.fix:
            text += f". Fix: {self.fix}"
        return text

    def located(self, file: str) -> "InputError":
        """The same error with ``file`` filled in when it was not known yet."""
        if self.file:
            return self
        return InputError(self.problem, file=file, row=self.row, column=self.column,
                          value=self.value, fix=self.fix)


class CycleError(InputError):
    """The links form a loop; ``cycle`` lists the activity ids around it."""

    def __init__(self, cycle: list[str], *, file: str | None = None):
        self.cycle = list(cycle)
        loop = " -> ".join(self.cycle + self.cycle[:1])
        super().__init__(f"the links form a loop: {loop}", file=file,
                         fix="remove or reverse one of these links so that no activity depends on itself")

    def located(self, file: str) -> "CycleError":
        return self if self.file else CycleError(self.cycle, file=file)


class InfeasibleTargetError(HastenError):
    """A finish target that no plan can meet; carries the shortest possible finish."""

    def __init__(self, target: int, shortest: int, target_date=None, shortest_date=None):
        self.target = target
        self.shortest = shortest
        self.target_date = target_date
        self.shortest_date = shortest_date

        def days(n, day):
            return f"{n} working days" + (f" ({day.isoformat()})" if day is not None else "")

        super().__init__(f"target finish {days(target, target_date)} is below the shortest possible "
                         f"finish, {days(shortest, shortest_date)}")


class SolverError(HastenError):
    """No solver could run, or the solver failed in an unexpected way."""


class TimeLimitError(SolverError):
    """The solver's time limit ran out before any answer could be given."""


class PlanCheckError(HastenError):
    """A plan failed the independent check (a bug, never the user's fault)."""
