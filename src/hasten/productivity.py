"""Published losses of labour productivity under overtime, shift work and crowding.

A loss is a fraction of every hour worked (not only the premium hours): a crew working
``H`` hours a week at loss ``L`` does ``H x (1 - L)`` hours of normal-productivity work.
The values come from the project's trade-facts notes, only where marked READ there:

* :data:`CLARK_LORENZONI`: loss by schedule (days x hours a day), one figure per schedule
  with no week dimension (trade-facts 1.4).
* :data:`PLANT_ESTIMATING_2019`: loss by hours a week (50, 60, 72, 84) and week of extended
  overtime, weeks 1 to 16, kept verbatim, including the 50-hour weeks 7 and 8 (0.24, then
  0.23) as printed (trade-facts 1.5).
* :func:`shift_loss`: Hanna et al. (2008), loss = 0.22052 + 0.07152 ln(x), x the share of
  all hours worked on the second shift, valid for 1% to 50% (trade-facts 2.1).
* :data:`CROWDING_LOSSES`: the MCAA factor "stacking of contractor's own forces" (trade-facts
  2.3). No overmanning model is used: its coefficients were not readable.

**Week rule.** A table row lists the loss of week 1, 2, ...; the last figure holds for every
later week (a flat table has one figure; beyond week 16 the plant table uses week 16). A crew
runs week after week, each week at its own loss, until the work is done
(:func:`weeks_to_finish`); so an activity running N whole weeks does the work of the average
productivity over weeks 1..N, on all hours of those weeks (:func:`average_loss`), not the
week-N figure.

A schedule that is not in a table is refused with the list of those that are: hasten does
not interpolate between published values.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from fractions import Fraction

from hasten.errors import InputError

__all__ = [
    "ProductivityTable",
    "CLARK_LORENZONI",
    "PLANT_ESTIMATING_2019",
    "TABLES",
    "table_named",
    "table_citation",
    "schedule_key",
    "week_hours_key",
    "schedule_losses",
    "loss_in_week",
    "weeks_to_finish",
    "average_loss",
    "shift_loss",
    "SHIFT_SHARE_RANGE",
    "SHIFT_CITATION",
    "CROWDING_LOSSES",
    "DEFAULT_CROWDING",
    "CROWDING_CITATION",
]


@dataclass(frozen=True)
class ProductivityTable:
    """Losses of productivity by schedule and week.

    ``losses`` maps a schedule key, ``"6x10"`` (days x hours a day) or ``"60h"`` (hours a
    week, on any days), to the loss in week 1, 2, ... as exact fractions; the last figure holds
    for every later week. ``citation`` names the source; ``obtained`` says how the values were
    obtained (where they were read); ``section`` is the section of the project's trade-facts
    notes that records them as READ.
    """

    name: str
    citation: str
    obtained: str
    losses: Mapping[str, tuple[Fraction, ...]] = field(hash=False)
    section: str = ""  # where the project's trade-facts notes record the values (READ)

    @property
    def weekly(self) -> bool:
        """True when some schedule's loss changes from week to week."""
        return any(len(v) > 1 for v in self.losses.values())

    @property
    def schedules(self) -> tuple[str, ...]:
        """The schedule keys in the table, in the order given."""
        return tuple(self.losses)


def _losses(*values: str) -> tuple[Fraction, ...]:
    return tuple(Fraction(v) for v in values)


#: Clark & Lorenzoni (1985), loss by schedule; 5x8 = 0% is the norm (trade-facts 1.4, READ).
CLARK_LORENZONI = ProductivityTable(
    name="clark-lorenzoni",
    citation=("Clark & Lorenzoni, Applied Cost Engineering (Marcel Dekker, 1985): loss of "
              "productivity by schedule (days x hours), one figure per schedule"),
    obtained=("read in a secondary copy: E. Zarenski, 'Overtime isn't always what it seems' "
              "(edzarenski.com, 2016)"),
    section="trade-facts 1.4 (READ)",
    losses={
        "5x8": _losses("0"),
        "5x10": _losses("0.07"),
        "5x12": _losses("0.12"),
        "6x8": _losses("0.03"),
        "6x10": _losses("0.17"),
        "6x12": _losses("0.25"),
        "7x8": _losses("0.07"),
        "7x10": _losses("0.20"),
        "7x12": _losses("0.28"),
    },
)

#: Elsevier (2019) process-plant estimating book, Table 9 (trade-facts 1.5, READ), verbatim.
PLANT_ESTIMATING_2019 = ProductivityTable(
    name="plant-estimating-2019",
    citation=("Industrial Process Plant Construction Estimating and Man-Hour Analysis "
              "(Elsevier, 2019), Introduction, Table 9 'Project overtime labor factors', p. xl: "
              "loss by hours a week and week of extended overtime"),
    obtained=("read in a copy of the book (digilib.universitaspertamina.ac.id, page 25); "
              "values kept as printed"),
    section="trade-facts 1.5 (READ)",
    losses={
        "50h": _losses("0.05", "0.07", "0.08", "0.09", "0.15", "0.16", "0.24", "0.23",
                       "0.26", "0.28", "0.28", "0.29", "0.31", "0.32", "0.33", "0.34"),
        "60h": _losses("0.09", "0.12", "0.14", "0.19", "0.24", "0.28", "0.33", "0.36",
                       "0.38", "0.39", "0.40", "0.41", "0.44", "0.45", "0.46", "0.47"),
        "72h": _losses("0.14", "0.20", "0.27", "0.32", "0.37", "0.42", "0.46", "0.49",
                       "0.50", "0.51", "0.52", "0.53", "0.54", "0.55", "0.56", "0.57"),
        "84h": _losses("0.25", "0.30", "0.35", "0.40", "0.45", "0.50", "0.53", "0.56",
                       "0.57", "0.58", "0.59", "0.60", "0.61", "0.62", "0.63", "0.64"),
    },
)

TABLES: dict[str, ProductivityTable] = {t.name: t for t in (CLARK_LORENZONI, PLANT_ESTIMATING_2019)}


def table_named(name: str, *, column: str = "labour.table") -> ProductivityTable:
    """The built-in table called ``name``; an unknown name is refused with the list."""
    if name not in TABLES:
        raise InputError("unknown productivity table", column=column, value=name,
                         fix=f"use one of {', '.join(TABLES)}, or give a table of your own")
    return TABLES[name]


def table_citation(table: ProductivityTable) -> str:
    """One line naming the source every option built on ``table`` rests on."""
    return f"Overtime productivity: {table.citation} ({table.obtained})."


def _hours_text(hours: float | Fraction) -> str:
    value = Fraction(str(hours)) if isinstance(hours, float) else Fraction(hours)
    return str(value.numerator) if value.denominator == 1 else f"{float(value):g}"


def schedule_key(days: int, hours: float | Fraction) -> str:
    """``6, 10 -> "6x10"``; ``5, 9.5 -> "5x9.5"``."""
    return f"{days}x{_hours_text(hours)}"


def week_hours_key(hours: float | Fraction) -> str:
    """``60 -> "60h"``."""
    return f"{_hours_text(hours)}h"


def schedule_losses(table: ProductivityTable, days: int, hours: float | Fraction, *,
                    column: str = "schedules") -> tuple[tuple[Fraction, ...], str]:
    """The weekly losses of ``days`` x ``hours`` and the key they were found under.

    The schedule itself (``"6x10"``) is looked up first, then its hours a week (``"60h"``).
    A schedule in neither form is refused with the list of the table's schedules.
    """
    key = schedule_key(days, hours)
    weekly = week_hours_key(days * (Fraction(str(hours)) if isinstance(hours, float) else hours))
    for found in (key, weekly):
        if found in table.losses:
            return table.losses[found], found
    raise InputError(
        f"the schedule {key} ({weekly[:-1]} hours a week) is not in the productivity table "
        f"'{table.name}'", column=column, value=key,
        fix=f"choose one of {', '.join(table.schedules)}, or give a productivity table of your "
            f"own (hasten does not interpolate between published values)")


def loss_in_week(losses: Sequence[Fraction], week: int) -> Fraction:
    """The loss in week ``week`` (1-based); after the last listed week the last figure holds."""
    return losses[min(week, len(losses)) - 1]


def weeks_to_finish(work_hours: Fraction, hours_per_week: Fraction,
                    losses: Sequence[Fraction]) -> Fraction:
    """Weeks (exact, fractional) for ``work_hours`` of normal-productivity work when
    ``hours_per_week`` are worked each week, week ``k`` at loss ``losses[k-1]`` (the last
    figure holding for later weeks)."""
    if work_hours <= 0:
        return Fraction(0)
    done = Fraction(0)
    for week, loss in enumerate(losses, start=1):
        per_week = hours_per_week * (1 - loss)
        if week == len(losses) or done + per_week >= work_hours:
            return (week - 1) + (work_hours - done) / per_week
        done += per_week
    raise AssertionError("unreachable: the last week always returns")  # pragma: no cover


def average_loss(losses: Sequence[Fraction], weeks: Fraction) -> Fraction:
    """The loss over all hours of ``weeks`` weeks of work: the mean of the weekly losses,
    a part week counting in proportion (for N whole weeks, the mean of weeks 1..N)."""
    if weeks <= 0:
        return loss_in_week(losses, 1)
    whole = math.floor(weeks)
    total = sum((loss_in_week(losses, w) for w in range(1, min(whole, len(losses)) + 1)), Fraction(0))
    if whole > len(losses):
        total += (whole - len(losses)) * losses[-1]
    total += (weeks - whole) * loss_in_week(losses, whole + 1)
    return total / weeks


#: The share of hours on the second shift for which Hanna et al.'s formula was fitted.
SHIFT_SHARE_RANGE = (0.01, 0.50)
SHIFT_CITATION = ("Hanna, Chang, Sullivan & Lackney (2008), 'Impact of Shift Work on Labor "
                  "Productivity for Labor Intensive Contractor', ASCE J. Constr. Eng. Manage.: "
                  "loss = 0.22052 + 0.07152 ln(x), x = share of hours on the second shift, 1% to 50%")


def shift_loss(share: float, *, column: str = "schedules", value: object = None) -> float:
    """Hanna et al. (2008): the loss on all hours when ``share`` of them are worked on a
    second shift; refused outside 1% to 50%, where the formula was not fitted."""
    low, high = SHIFT_SHARE_RANGE
    if not low <= share <= high:
        raise InputError(
            f"the shift-work formula of Hanna et al. (2008) holds for a second shift doing 1% to "
            f"50% of the hours; here it would do {share:.1%}", column=column,
            value=share if value is None else value,
            fix="give the second shift at most as many hours a day as the day shift "
                "(labour.shift_worked_hours)")
    return 0.22052 + 0.07152 * math.log(share)


#: MCAA factor "stacking of contractor's own forces" by level (trade-facts 2.3, READ).
CROWDING_LOSSES: dict[str, Fraction] = {
    "minor": Fraction("0.10"),
    "average": Fraction("0.20"),
    "severe": Fraction("0.30"),
}
#: An estimator who has not assessed the area should not assume the mildest level; the
#: middle of the published range is the default, and the option note says which was applied.
DEFAULT_CROWDING = "average"
CROWDING_CITATION = ("MCAA, Factors Affecting Labor Productivity (Bulletin PD2, rev. 2011), "
                     "'stacking of contractor's own forces' (minor 10%, average 20%, severe 30%), "
                     "as reproduced in the Elsevier 2019 process-plant estimating book, Table 11")
