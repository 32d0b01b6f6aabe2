"""Crew data and the rules of the job: the inputs from which acceleration options are built.

Schedulers rarely know a crash cost per activity; they know the labour hours left, the crew,
the wage and the premium rules of the job. This module holds those inputs as plain frozen
dataclasses, checks them, and parses the list of acceleration measures to price
(``"5x10,6x10,2-shifts,+1-crew"``). Building the options is
:mod:`hasten.crew_options`; pay is :mod:`hasten.premium`; productivity losses are
:mod:`hasten.productivity`.

Every check raises :class:`~hasten.errors.InputError` naming the column (a column of the
activities table, or a dotted ``labour.*`` settings key), the value and the fix. ``file``
and ``row`` are not known here: a reader passes them in (the ``file`` and ``row`` fields,
which take no part in comparisons) and they appear in the message.

Defaults and their sources (the project's trade-facts notes, values marked READ):

* overtime at 1.5x for hours over 40 a week: US Fair Labor Standards Act and Contract Work
  Hours and Safety Standards Act (trade-facts 2.5);
* a daily overtime rule (over 8 hours a day) is available but off: some states (Alaska,
  California, Nevada) and some agreements have it (trade-facts 2.5);
* Saturday 1.5x, Sunday 2.0x: a collective-agreement example (trade-facts 2.5);
* at most double time, no pyramiding: the cement masons' agreement read in trade-facts 2.5
  ("double time is the maximum", "no pyramiding");
* second shift paid 8 hours for 7.5 worked (x1.0667, DERIVED): the same agreement, kept as an
  editable example (trade-facts 2.5 and 6);
* normal week 5 days x 8 hours: the 40-hour base of the overtime studies (Clark & Lorenzoni's
  0% norm, trade-facts 1.4).
"""

from __future__ import annotations

import math
import re
from collections.abc import Mapping
from dataclasses import dataclass, field

from hasten.errors import InputError
from hasten.productivity import CROWDING_LOSSES, DEFAULT_CROWDING, TABLES

__all__ = [
    "PremiumRules",
    "LabourRules",
    "CrewData",
    "Measure",
    "parse_measures",
    "wage_of",
    "DEFAULT_TABLE",
]

#: The productivity table used unless the rules name another (see hasten.productivity).
DEFAULT_TABLE = "clark-lorenzoni"


def _error(problem: str, column: str, value: object, fix: str, file: str | None,
           row: int | str | None) -> InputError:
    return InputError(problem, file=file, row=row, column=column, value=value, fix=fix)


def _number(value: object) -> bool:
    return (isinstance(value, (int, float)) and not isinstance(value, bool)
            and math.isfinite(value))


@dataclass(frozen=True)
class PremiumRules:
    """How hours are paid, as multipliers of the straight-time rate.

    ``overtime_after_week`` / ``overtime_after_day``: hours after which ``overtime_rate``
    applies (None: no such rule). ``saturday_rate`` / ``sunday_rate``: multipliers for work on
    the 6th and 7th day of a schedule (weeks start on Monday; None: paid like a weekday).
    Without pyramiding an hour is paid at the highest rate that applies to it; with it, the
    premiums add up. No hour is paid above ``cap``. A second-shift worker is paid
    ``shift_paid_hours`` for ``shift_worked_hours``, raised by ``shift_premium_percent`` and
    ``shift_premium_per_hour`` (money per hour worked).
    """

    overtime_after_week: float | None = 40.0  # FLSA / CWHSSA: over 40 h a week (trade-facts 2.5)
    overtime_after_day: float | None = None  # optional daily-8 rule: CA/AK/NV, agreements (2.5)
    overtime_rate: float = 1.5  # FLSA / CWHSSA: at least 1.5x (trade-facts 2.5)
    saturday_rate: float | None = 1.5  # agreement example: Saturday at 1.5x (trade-facts 2.5)
    sunday_rate: float | None = 2.0  # agreement example: Sunday at 2x (trade-facts 2.5)
    cap: float = 2.0  # cement masons' agreement: "double time is the maximum" (2.5)
    pyramiding: bool = False  # same agreement: "no pyramiding" (2.5)
    shift_worked_hours: float = 7.5  # same agreement: second shift 8 h pay for 7.5 h (2.5)
    shift_paid_hours: float = 8.0  # ... an editable example, x1.0667 (DERIVED, trade-facts 6)
    shift_premium_percent: float = 0.0
    shift_premium_per_hour: float = 0.0
    file: str | None = field(default=None, compare=False)

    def __post_init__(self) -> None:
        def bad(problem, key, value, fix):
            return _error(problem, f"labour.{key}", value, fix, self.file, None)

        for key, upper in (("overtime_after_week", 168), ("overtime_after_day", 24)):
            value = getattr(self, key)
            if value is not None and (not _number(value) or not 0 < value <= upper):
                raise bad(f"must be more than 0 and at most {upper} hours", key, value,
                          f"write the hours after which overtime is paid, e.g. "
                          f"{40 if upper == 168 else 8}, or leave it out for no such rule")
        for key in ("overtime_rate", "saturday_rate", "sunday_rate", "cap"):
            value = getattr(self, key)
            if value is None and key in ("saturday_rate", "sunday_rate"):
                continue
            if not _number(value) or value < 1:
                raise bad("a pay multiplier must be at least 1", key, value,
                          "write a multiplier of the straight-time rate, e.g. 1.5")
        if not isinstance(self.pyramiding, bool):
            raise bad("must be true or false", "pyramiding", self.pyramiding,
                      "write false (an hour is paid at its highest rate) or true (premiums add up)")
        if not _number(self.shift_worked_hours) or not 0 < self.shift_worked_hours <= 24:
            raise bad("the hours a second shift works must be more than 0 and at most 24",
                      "shift_worked_hours", self.shift_worked_hours, "write e.g. 7.5")
        if not _number(self.shift_paid_hours) or self.shift_paid_hours < self.shift_worked_hours:
            raise bad("a second shift must be paid at least the hours it works",
                      "shift_paid_hours", self.shift_paid_hours,
                      f"write {self.shift_worked_hours:g} or more, e.g. 8 (8 paid for 7.5 worked)")
        for key in ("shift_premium_percent", "shift_premium_per_hour"):
            value = getattr(self, key)
            if not _number(value) or value < 0:
                raise bad("must not be negative", key, value, "write 0 or more")


@dataclass(frozen=True)
class LabourRules:
    """The normal week, the pay rules, trade wage rates and the productivity data to use.

    ``wages`` maps a trade to its straight-time rate per hour, used when a crew gives none.
    ``table`` names a built-in productivity table (see :data:`hasten.productivity.TABLES`).
    ``crowding`` is the level of the MCAA factor "stacking of contractor's own forces"
    applied to extra crews (minor 10%, average 20%, severe 30%); ``crowding_loss`` replaces
    it with the user's own figure (a fraction, 0 <= loss < 1).
    """

    normal_days: int = 5  # the 40-hour base of the studies (trade-facts 1.4): 5 x 8
    normal_hours: float = 8.0
    premium: PremiumRules = field(default_factory=PremiumRules)
    wages: Mapping[str, float] = field(default_factory=dict, hash=False)
    table: str = DEFAULT_TABLE
    crowding: str = DEFAULT_CROWDING
    crowding_loss: float | None = None
    file: str | None = field(default=None, compare=False)

    def __post_init__(self) -> None:
        def bad(problem, key, value, fix):
            return _error(problem, f"labour.{key}", value, fix, self.file, None)

        if isinstance(self.normal_days, bool) or not isinstance(self.normal_days, int) \
                or not 1 <= self.normal_days <= 7:
            raise bad("a week has 1 to 7 working days", "normal_days", self.normal_days,
                      "write a whole number of days from 1 to 7, e.g. 5")
        if not _number(self.normal_hours) or not 0 < self.normal_hours <= 24:
            raise bad("a day has more than 0 and at most 24 working hours", "normal_hours",
                      self.normal_hours, "write the hours of a normal working day, e.g. 8")
        if self.normal_hours + self.premium.shift_worked_hours > 24:
            raise bad("a normal day and a second shift add up to more than 24 hours",
                      "shift_worked_hours", self.premium.shift_worked_hours,
                      f"write at most {24 - self.normal_hours:g} hours for the second shift")
        for trade, rate in self.wages.items():
            if not _number(rate) or rate <= 0:
                raise bad(f"the wage of trade '{trade}' must be more than 0",
                          f"wages.{trade}", rate, "write the straight-time rate per hour, e.g. 42.50")
        if self.table not in TABLES:
            raise bad("unknown productivity table", "table", self.table,
                      f"use one of {', '.join(TABLES)}, or give a table of your own")
        if self.crowding not in CROWDING_LOSSES:
            raise bad("unknown crowding level", "crowding", self.crowding,
                      f"use one of {', '.join(CROWDING_LOSSES)}, or give crowding_loss")
        if self.crowding_loss is not None and (not _number(self.crowding_loss)
                                               or not 0 <= self.crowding_loss < 1):
            raise bad("a loss of productivity is a fraction from 0 up to (not including) 1",
                      "crowding_loss", self.crowding_loss, "write e.g. 0.15 for 15%")

    @property
    def normal_week_hours(self) -> float:
        """Hours a worker works in a normal week (40 by default)."""
        return self.normal_days * self.normal_hours


@dataclass(frozen=True)
class CrewData:
    """What the scheduler knows about one activity's labour.

    ``labour_hours``: work-hours left at normal productivity; ``crew_size``: workers in one
    crew; ``wage``: straight-time rate per hour (None: the trade's rate from the rules);
    ``max_crews``: how many crews the area and trade can take at once; ``equipment_per_day``:
    plant cost for each day the activity is worked (shared by the crews and shifts);
    ``min_duration``: the physical minimum in working days (curing, lead times).
    """

    labour_hours: float
    crew_size: int
    wage: float | None = None
    max_crews: int = 1
    equipment_per_day: float = 0.0
    min_duration: int = 0
    trade: str = ""
    file: str | None = field(default=None, compare=False)
    row: int | str | None = field(default=None, compare=False)

    def __post_init__(self) -> None:
        def bad(problem, column, value, fix):
            return _error(problem, column, value, fix, self.file, self.row)

        if not _number(self.labour_hours) or self.labour_hours < 0:
            raise bad("labour hours must not be negative", "labour_hours", self.labour_hours,
                      "write the work-hours left at normal productivity, 0 or more, e.g. 640")
        for column in ("crew_size", "max_crews"):
            value = getattr(self, column)
            if isinstance(value, bool) or not isinstance(value, int) or value < 1:
                raise bad("must be a whole number, at least 1", column, value,
                          "write the number of workers in one crew, e.g. 4" if column == "crew_size"
                          else "write how many crews the area can take at once, e.g. 2")
        if self.wage is not None and (not _number(self.wage) or self.wage <= 0):
            raise bad("the wage must be more than 0", "wage", self.wage,
                      "write the straight-time rate per hour, or leave the cell empty for the trade rate")
        if not _number(self.equipment_per_day) or self.equipment_per_day < 0:
            raise bad("must not be negative", "equipment_per_day", self.equipment_per_day,
                      "write the plant cost per working day, 0 or more")
        if isinstance(self.min_duration, bool) or not isinstance(self.min_duration, int) \
                or self.min_duration < 0:
            raise bad("must be a whole number of working days, 0 or more", "min_duration",
                      self.min_duration, "write e.g. 7 for seven days of curing")


def wage_of(crew: CrewData, rules: LabourRules) -> float:
    """The crew's straight-time rate: its own, or its trade's from the rules."""
    if crew.wage is not None:
        return crew.wage
    if crew.trade in rules.wages:
        return rules.wages[crew.trade]
    known = ", ".join(sorted(rules.wages)) or "none"
    raise InputError(f"no wage for trade '{crew.trade}'", file=crew.file, row=crew.row,
                     column="wage", value=crew.wage,
                     fix=f"give the crew's wage, or the trade's rate under [labour.wages] "
                         f"(trades with a rate: {known})")


@dataclass(frozen=True)
class Measure:
    """One acceleration measure to price for an activity.

    ``kind`` is ``"overtime"`` (``days`` x ``hours`` a week, one crew), ``"shifts"`` (a
    second shift on the normal week) or ``"crews"`` (``crews - 1`` extra crews on the
    normal week). ``text`` is how it was written, normalised (``6x10``, ``2-shifts``,
    ``+1-crew``); it becomes the option's name.
    """

    text: str
    kind: str
    days: int = 0
    hours: float = 0.0
    crews: int = 1


_OVERTIME = re.compile(r"(\d+)\s*[xX×]\s*(\d+(?:\.\d+)?)")
_SHIFTS = re.compile(r"(\d+)-shifts?", re.IGNORECASE)
_CREWS = re.compile(r"\+(\d+)-crews?", re.IGNORECASE)
_MEASURES_FIX = ("write measures separated by commas: DAYSxHOURS for extended hours (6x10), "
                 "2-shifts for a second shift, +N-crew for N extra crews; e.g. 5x10,6x10,2-shifts,+1-crew")


def parse_measures(text: str, *, column: str = "schedules", file: str | None = None,
                   row: int | str | None = None) -> tuple[Measure, ...]:
    """Parse ``"5x10,6x10,6x12,2-shifts,+1-crew"`` into measures, in the order given.

    Refuses an empty list, an unknown item, a day of more than 24 hours, a week of more than
    7 days, more than two shifts and an item given twice.
    """
    def bad(problem, value, fix=_MEASURES_FIX):
        return _error(problem, column, value, fix, file, row)

    if not isinstance(text, str) or not text.strip():
        raise bad("no acceleration measures given", text)
    out: list[Measure] = []
    for item in (part.strip() for part in text.split(",")):
        if not item:
            raise bad("an empty item in the list of measures", text)
        if m := _OVERTIME.fullmatch(item):
            days, hours = int(m.group(1)), float(m.group(2))
            if not 1 <= days <= 7:
                raise bad("a week has at most 7 days", item, "write 1 to 7 days, e.g. 6x10")
            if not 0 < hours <= 24:
                raise bad("a day has at most 24 hours", item, "write 24 hours a day or fewer, e.g. 6x10")
            measure = Measure(f"{days}x{hours:g}", "overtime", days=days, hours=hours)
        elif m := _SHIFTS.fullmatch(item):
            if int(m.group(1)) != 2:
                raise bad("only a second shift can be priced", item,
                          "write 2-shifts: the shift-work study used (Hanna et al. 2008) covers a "
                          "second shift doing up to half of the hours")
            measure = Measure("2-shifts", "shifts", crews=2)
        elif m := _CREWS.fullmatch(item):
            extra = int(m.group(1))
            if extra < 1:
                raise bad("at least one extra crew", item, "write +1-crew or more")
            measure = Measure(f"+{extra}-crew{'s' if extra > 1 else ''}", "crews", crews=1 + extra)
        else:
            raise bad("unknown acceleration measure", item)
        if any(o.text == measure.text for o in out):
            raise bad("a measure is listed twice", item, "list each measure once")
        out.append(measure)
    return tuple(out)
