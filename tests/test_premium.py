"""Premium pay against published worked examples and hand calculations.

Sources: US Department of Labor overtime example as quoted in the Work and Family Researchers
Network glossary ("overtime"): $6 an hour x 46 hours = $294; Mubarak, Construction Project
Scheduling and Control, p. 245: 10-hour days with 1.5x after 8 hours cost 10% more, adding
Saturdays at 1.5x "+17%" (70 paid for 60 worked, reconstructed in trade-facts 2.6); the cement
masons' agreement of South Bend IN (second shift 8 hours pay for 7.5 worked; no pyramiding;
double time the maximum).
"""

from __future__ import annotations

from fractions import Fraction

import pytest

from hasten.errors import InputError
from hasten.labour import PremiumRules
from hasten.premium import schedule_pay, shift_rate, week_pay

FLSA = PremiumRules(saturday_rate=None, sunday_rate=None)  # over 40 a week at 1.5x, nothing else
DAILY_ONLY = PremiumRules(overtime_after_week=None, overtime_after_day=8,
                          saturday_rate=None, sunday_rate=None)


def test_dol_46_hours_at_6_is_294():
    # US DOL: $6/h x 46 h = 40 x $6 + 6 x $9 = $294
    pay = week_pay([10, 10, 10, 8, 8], FLSA)
    assert pay.worked == 46
    assert pay.pieces == ((1, 40), (Fraction(3, 2), 6))
    assert pay.paid * 6 == 294


def test_ten_hour_days_with_overtime_after_8_cost_10_percent_more():
    # Mubarak p. 245: 8 x 1 + 2 x 1.5 = 11 paid hours for 10 worked -> +10%
    pay = schedule_pay(5, 10, DAILY_ONLY)
    assert pay.ratio == Fraction(11, 10)
    # the same with the weekly rule as well: hours paid as daily overtime do not count again
    # towards the 40 (5 x 8 straight hours = 40), so still 55 paid, not 59
    both = PremiumRules(overtime_after_day=8)
    assert schedule_pay(5, 10, both).paid == 55


def test_a_ten_hour_saturday_at_1_5_makes_it_1_1667():
    # Mubarak p. 245 "+17%"; DERIVED in trade-facts 2.6: 5 x 11 + 10 x 1.5 = 70 paid / 60 worked
    rules = PremiumRules(overtime_after_week=None, overtime_after_day=8, sunday_rate=None)
    pay = schedule_pay(6, 10, rules)
    assert pay.paid == 70 and pay.worked == 60
    assert float(pay.ratio) == pytest.approx(1.1667, abs=1e-4)
    # the defaults (1.5x over 40 a week, Saturday 1.5x, no daily rule) pay 6x10 the same:
    # 40 straight + Friday 10 and Saturday 10 at 1.5x = 70
    assert schedule_pay(6, 10, PremiumRules()).paid == 70


def test_sunday_double_time_without_pyramiding_and_the_cap():
    # agreement example (trade-facts 2.5): Sunday 2x; no pyramiding: an hour is paid at its
    # highest rate; double time the maximum. By hand, 7 x 12 under the defaults: Mon-Wed 36
    # straight, Thu 4 straight + 8 over 40, Fri 12 over 40, Sat 12 (over 40, Saturday) at 1.5x,
    # Sun 12 at 2x: 40 x 1 + 32 x 1.5 + 12 x 2 = 112
    pay = schedule_pay(7, 12, PremiumRules())
    assert pay.pieces == ((1, 40), (Fraction(3, 2), 32), (2, 12))
    assert pay.paid == 112
    # with pyramiding premiums add: Saturday 1 + 0.5 + 0.5 = 2x, Sunday 1 + 0.5 + 1 = 2.5x,
    # held at the 2x cap: Saturday 12 h move from 1.5x to 2x -> 112 + 6 = 118
    pyramid = PremiumRules(pyramiding=True)
    assert schedule_pay(7, 12, pyramid).paid == 118
    # with a cap of 3 the Sunday is 2.5x as well: 118 + 12 x 0.5 = 124
    assert schedule_pay(7, 12, PremiumRules(pyramiding=True, cap=3)).paid == 124


def test_second_shift_8_for_7_5():
    # South Bend cement masons: second shift 8 hours pay for 7.5 worked: x1.0667 (DERIVED)
    rules = PremiumRules()
    assert shift_rate(rules, wage=40) == Fraction(16, 15)
    pay = schedule_pay(5, Fraction(15, 2), rules, base=shift_rate(rules, 40))
    assert pay.paid == 40 and pay.worked == Fraction(75, 2)
    # a shift premium per cent and per hour on top, by hand: 16/15 x 1.10 + 2/40 = 1.223...
    extra = PremiumRules(shift_premium_percent=10, shift_premium_per_hour=2)
    assert shift_rate(extra, wage=40) == Fraction(16, 15) * Fraction(11, 10) + Fraction(1, 20)


def test_second_shift_overtime_hours_get_the_higher_rate_only():
    # no pyramiding: a second-shift hour over 40 a week is paid 1.5x, not 1.5 x 1.0667
    rules = PremiumRules()
    pay = week_pay([9] * 5, rules, base=shift_rate(rules, 40))
    assert pay.pieces == ((Fraction(16, 15), 40), (Fraction(3, 2), 5))


def test_a_week_of_more_than_7_days_or_24_hours_is_refused():
    with pytest.raises(InputError):
        week_pay([8] * 8, PremiumRules())
    with pytest.raises(InputError):
        week_pay([25], PremiumRules())
