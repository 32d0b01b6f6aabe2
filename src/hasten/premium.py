"""Paid hours for a week of work under the premium rules of the job.

A week is the hours worked on each day, Monday first (the 6th day is Saturday, the 7th
Sunday). Each stretch of hours is paid at a multiplier of the straight-time rate: overtime
after ``overtime_after_day`` hours in a day or ``overtime_after_week`` in the week (hours
counted in day order), the Saturday or Sunday rate on those days, a second shift's own rate.
Without pyramiding a stretch is paid at the highest multiplier that applies; with it the
premiums (multiplier - 1) add up. No stretch is paid above the cap. Hours already paid as
daily overtime do not count again towards the weekly limit (so 5 days of 10 hours with
overtime after 8 a day and after 40 a week are paid 55 hours, not 59).

Checks (tests/test_premium.py): the US Department of Labor example, 46 hours at $6 = $294
(trade-facts 2.5), and Mubarak's 10-hour days at 1.5x after 8 hours = 10% more per hour
worked, 11.67% more with a 10-hour Saturday at 1.5x (trade-facts 2.6).

Arithmetic is exact (:class:`fractions.Fraction`), so a paid-hours figure can be compared
with a hand calculation without a tolerance.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from fractions import Fraction

from hasten.errors import InputError
from hasten.labour import PremiumRules

__all__ = ["WeekPay", "exact", "week_pay", "schedule_pay", "shift_rate"]


def exact(value: float | int | Fraction | None) -> Fraction | None:
    """A number as an exact fraction, floats by their decimal text (0.1 -> 1/10)."""
    if value is None or isinstance(value, Fraction):
        return value
    return Fraction(str(value)) if isinstance(value, float) else Fraction(value)


@dataclass(frozen=True)
class WeekPay:
    """Hours worked and paid in one week; ``pieces`` are (multiplier, hours) pairs, lowest
    multiplier first, hours at the same multiplier merged."""

    worked: Fraction
    paid: Fraction
    pieces: tuple[tuple[Fraction, Fraction], ...]

    @property
    def ratio(self) -> Fraction:
        """Paid hours per hour worked (1 when nothing is worked)."""
        return self.paid / self.worked if self.worked else Fraction(1)

    @property
    def premium_hours(self) -> Fraction:
        """Hours paid above straight time."""
        return sum((h for m, h in self.pieces if m > 1), Fraction(0))

    def text(self) -> str:
        """``"70 paid for 60 h (40 h at 1x, 20 h at 1.5x)"``."""
        parts = ", ".join(f"{float(h):g} h at {float(m):g}x" for m, h in self.pieces)
        return f"{float(self.paid):g} paid for {float(self.worked):g} h ({parts})"


def _multiplier(base: Fraction, premiums: list[Fraction], rules: PremiumRules) -> Fraction:
    if rules.pyramiding:
        rate = base + sum((p - 1 for p in premiums), Fraction(0))
    else:
        rate = max([base] + premiums)
    return min(rate, exact(rules.cap))


def week_pay(day_hours: Sequence[float | Fraction], rules: PremiumRules, *,
             base: Fraction | float = 1) -> WeekPay:
    """Paid hours for a week of ``day_hours`` (Monday first, at most 7 days), each hour at
    least at ``base`` times the straight-time rate (1; a second shift's rate for its crew)."""
    if len(day_hours) > 7:
        raise InputError("a week has at most 7 days", column="schedules", value=len(day_hours),
                         fix="give the hours of 7 days or fewer")
    base = exact(base)
    after_week = exact(rules.overtime_after_week)
    after_day = exact(rules.overtime_after_day)
    overtime = exact(rules.overtime_rate)
    weekend = {5: exact(rules.saturday_rate), 6: exact(rules.sunday_rate)}
    pieces: dict[Fraction, Fraction] = {}
    before = Fraction(0)  # hours earlier in the week that count towards the weekly limit
    worked = Fraction(0)
    for day, hours in enumerate(day_hours):
        hours = exact(hours)
        if hours < 0 or hours > 24:
            raise InputError("a day has 0 to 24 working hours", column="schedules", value=float(hours),
                             fix="give at most 24 hours a day")
        cuts = {Fraction(0), hours}
        if after_day is not None and 0 < after_day < hours:
            cuts.add(after_day)
        if after_week is not None and 0 < after_week - before < hours:
            cuts.add(after_week - before)
        cuts = sorted(cuts)
        for start, end in zip(cuts, cuts[1:]):
            premiums = []
            if after_day is not None and start >= after_day:
                premiums.append(overtime)
            if after_week is not None and before + start >= after_week:
                premiums.append(overtime)
            if weekend.get(day) is not None:
                premiums.append(weekend[day])
            rate = _multiplier(base, premiums, rules)
            pieces[rate] = pieces.get(rate, Fraction(0)) + (end - start)
        before += hours if after_day is None else min(hours, after_day)
        worked += hours
    ordered = tuple(sorted(pieces.items()))
    return WeekPay(worked=worked, paid=sum((m * h for m, h in ordered), Fraction(0)), pieces=ordered)


def schedule_pay(days: int, hours: float | Fraction, rules: PremiumRules, *,
                 base: Fraction | float = 1) -> WeekPay:
    """Paid hours of a week of ``days`` days (Monday first) of ``hours`` each."""
    return week_pay([hours] * days, rules, base=base)


def shift_rate(rules: PremiumRules, wage: float | Fraction) -> Fraction:
    """The straight-time multiplier of a second-shift hour: paid hours per hour worked
    (8 for 7.5 by default), raised by the shift premium in per cent and per hour."""
    rate = exact(rules.shift_paid_hours) / exact(rules.shift_worked_hours)
    rate *= 1 + exact(rules.shift_premium_percent) / 100
    rate += exact(rules.shift_premium_per_hour) / exact(wage)
    return rate
