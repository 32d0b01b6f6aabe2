"""Productivity losses: the built-in tables against independent copies in tests/data/labour,
the published worked examples, the week rule by hand, and the shift-work formula.

Sources (see tests/data/labour/README.md): Clark & Lorenzoni, Applied Cost Engineering
(1985), as read on E. Zarenski's pages (2016, 2018); Elsevier (2019) Industrial Process
Plant Construction Estimating and Man-Hour Analysis, Table 9; Hanna, Chang, Sullivan &
Lackney (2008), ASCE JCEM, shift-work formula as read at acslawyers.com; MCAA Bulletin PD2
factor table as reproduced in the Elsevier (2019) book, Table 11.
"""

from __future__ import annotations

import csv
import math
from fractions import Fraction

import pytest

from hasten.errors import InputError
from hasten.productivity import (CLARK_LORENZONI, CROWDING_LOSSES, DEFAULT_CROWDING,
                                 PLANT_ESTIMATING_2019, TABLES, ProductivityTable, average_loss,
                                 loss_in_week, schedule_losses, shift_loss, table_citation,
                                 table_named, weeks_to_finish)

from conftest import DATA

LABOUR = DATA / "labour"


def _rows(name: str) -> list[dict[str, str]]:
    with (LABOUR / name).open(encoding="utf-8", newline="") as handle:
        return list(csv.DictReader(handle))


# --- Clark & Lorenzoni (1985) --------------------------------------------------------------

def test_clark_lorenzoni_table_matches_the_source_copy():
    # Clark & Lorenzoni 1985, loss by schedule, via Zarenski (2016): tests/data copy
    rows = _rows("clark_lorenzoni_1985.csv")
    assert len(rows) == 8
    for row in rows:
        days, hours = (int(x) for x in row["schedule"].split("x"))
        losses, key = schedule_losses(CLARK_LORENZONI, days, hours)
        assert key == row["schedule"]
        assert losses == (Fraction(row["loss"]),)  # flat: one figure, no week dimension
        assert days * hours == int(row["hours_per_week"])
    # 5x8 = 0% is the norm (same source)
    assert schedule_losses(CLARK_LORENZONI, 5, 8)[0] == (0,)


@pytest.mark.parametrize("row", _rows("clark_lorenzoni_1985.csv"), ids=lambda r: r["schedule"])
def test_productive_hours_of_each_schedule(row):
    # Clark & Lorenzoni 1985 via Zarenski 2016: productive hours = hours x (1 - loss), the loss
    # on ALL hours; the page prints them rounded (6x10 -> 50, 7x12 -> 60.5)
    days, hours = (int(x) for x in row["schedule"].split("x"))
    losses, _ = schedule_losses(CLARK_LORENZONI, days, hours)
    productive = days * hours * (1 - losses[0])
    assert abs(float(productive) - float(row["productive_hours_page"])) <= 0.5
    weeks = weeks_to_finish(productive, Fraction(days * hours), losses)
    assert weeks == 1  # one week's productive hours take exactly one week


def test_six_tens_give_49_8_productive_hours():
    # trade-facts 6, DERIVED from Clark & Lorenzoni: 6x10 -> 60 x 0.83 = 49.8; 7x12 -> 60.48
    losses, _ = schedule_losses(CLARK_LORENZONI, 6, 10)
    assert 60 * (1 - losses[0]) == Fraction("49.8")
    losses, _ = schedule_losses(CLARK_LORENZONI, 7, 12)
    assert 84 * (1 - losses[0]) == Fraction("60.48")


def test_four_thousand_work_hours_save_20_not_33_percent():
    # Zarenski (2018), "Construction overtime: a common miscalculation": 4,000 MH left;
    # 40-h weeks -> 100 man-weeks; the naive 60-h plan 66.7 (33% saved); with 6x10 giving only
    # 50 productive hours, 80 man-weeks: 20% saved, not 33%.
    fifty = (Fraction(10, 60),)  # 50 productive hours of 60, as on that page
    assert weeks_to_finish(Fraction(4000), Fraction(60), fifty) == 80
    assert weeks_to_finish(Fraction(4000), Fraction(40), (Fraction(0),)) == 100
    assert weeks_to_finish(Fraction(4000), Fraction(60), (Fraction(0),)) == Fraction(200, 3)  # naive
    assert 1 - Fraction(80, 100) == Fraction(1, 5)
    # with the table's own 17% (49.8 productive hours): 80.3 man-weeks, still about 20%
    losses, _ = schedule_losses(CLARK_LORENZONI, 6, 10)
    assert float(weeks_to_finish(Fraction(4000), Fraction(60), losses)) == pytest.approx(4000 / 49.8)


def test_a_schedule_not_in_the_table_is_refused_with_the_list():
    with pytest.raises(InputError) as err:
        schedule_losses(CLARK_LORENZONI, 5, 9)
    assert err.value.value == "5x9"
    assert "5x10, 5x12, 6x8" in err.value.fix and "interpolate" in err.value.fix


# --- Elsevier (2019) Table 9 -----------------------------------------------------------------

def test_plant_table_matches_the_source_copy_verbatim():
    # Elsevier 2019, Table 9 "Project overtime labor factors", p. xl: tests/data copy
    rows = _rows("plant_estimating_2019_table9.csv")
    assert [int(r["week"]) for r in rows] == list(range(1, 17))
    for column in ("50h", "60h", "72h", "84h"):
        assert PLANT_ESTIMATING_2019.losses[column] == tuple(Fraction(r[column]) for r in rows)
    # kept as printed: the 50 h week 7 (0.24) is above week 8 (0.23)
    fifty = PLANT_ESTIMATING_2019.losses["50h"]
    assert (fifty[6], fifty[7]) == (Fraction("0.24"), Fraction("0.23"))
    assert PLANT_ESTIMATING_2019.weekly and not CLARK_LORENZONI.weekly


def test_plant_table_60_hours_week_8_is_past_break_even():
    # trade-facts 1.5, DERIVED: 60 h at week 8 loss 0.36 -> 38.4 productive hours (< 40)
    losses, key = schedule_losses(PLANT_ESTIMATING_2019, 6, 10)
    assert key == "60h"  # looked up by hours a week
    assert 60 * (1 - loss_in_week(losses, 8)) == Fraction("38.4")


def test_plant_table_refuses_hours_a_week_it_does_not_list():
    with pytest.raises(InputError) as err:
        schedule_losses(PLANT_ESTIMATING_2019, 6, 8)  # 48 h a week
    assert "48 hours a week" in str(err.value)
    assert "50h, 60h, 72h, 84h" in err.value.fix


def test_week_rule_average_of_weeks_one_to_n_by_hand():
    # Elsevier 2019 Table 9, 60 h column, weeks 1-8: 0.09 0.12 0.14 0.19 0.24 0.28 0.33 0.36.
    # By hand: losses sum to 1.75, so 8 weeks of 60 h give 60 x (8 - 1.75) = 375 productive
    # hours; the average loss over weeks 1..8 is 1.75 / 8 = 0.21875 (not week 8's 0.36).
    losses = PLANT_ESTIMATING_2019.losses["60h"]
    assert sum(Fraction(x) for x in ("0.09", "0.12", "0.14", "0.19", "0.24", "0.28", "0.33", "0.36")) \
        == Fraction("1.75")
    assert weeks_to_finish(Fraction(375), Fraction(60), losses) == 8
    assert average_loss(losses, Fraction(8)) == Fraction("0.21875")
    # a part week: 375 + half of week 9's 60 x 0.62 = 18.6 -> 8.5 weeks
    assert weeks_to_finish(Fraction("393.6"), Fraction(60), losses) == Fraction(17, 2)
    assert average_loss(losses, Fraction(17, 2)) == (Fraction("1.75") + Fraction("0.19")) / Fraction(17, 2)


def test_beyond_week_16_week_16_holds():
    # Elsevier 2019 Table 9 stops at week 16; the rule here: week 16's 0.47 (60 h) holds after
    losses = PLANT_ESTIMATING_2019.losses["60h"]
    sixteen = 60 * (16 - sum(losses))
    two_more = 2 * 60 * (1 - Fraction("0.47"))
    assert weeks_to_finish(sixteen + two_more, Fraction(60), losses) == 18
    assert loss_in_week(losses, 40) == Fraction("0.47")
    assert average_loss(losses, Fraction(18)) == (sum(losses) + 2 * Fraction("0.47")) / 18


# --- Hanna et al. (2008) shift work ----------------------------------------------------------

@pytest.mark.parametrize("share, loss", [(0.20, 0.1054), (0.50, 0.1710), (0.01, -0.1088)])
def test_hanna_shift_formula(share, loss):
    # Hanna, Chang, Sullivan & Lackney 2008: loss = 0.22052 + 0.07152 ln(x); the page gives
    # 0.1054 at x = 0.2; the abstract's range -11% .. 17% is x = 1% .. 50%
    assert shift_loss(share) == pytest.approx(loss, abs=5e-4)


def test_hanna_applied_to_12000_hours_is_1265_not_12600():
    # acslawyers.com applies 0.1054 to 12,000 hours and prints 12,600 hours lost: an arithmetic
    # slip; 12,000 x f(0.2) = 1,265 hours
    lost = 12000 * shift_loss(0.2)
    assert round(lost) == 1265
    assert abs(lost - 12600) > 10000


@pytest.mark.parametrize("share", [0.005, 0.60])
def test_hanna_refused_outside_one_to_fifty_percent(share):
    with pytest.raises(InputError) as err:
        shift_loss(share)
    assert "1% to 50%" in str(err.value)


# --- MCAA crowding, names and citations ------------------------------------------------------

def test_crowding_levels_are_the_mcaa_stacking_factor():
    # MCAA PD2 "stacking of contractor's own forces": minor 10%, average 20%, severe 30%
    # (Elsevier 2019, Table 11, p. xlii)
    assert CROWDING_LOSSES == {"minor": Fraction(1, 10), "average": Fraction(1, 5),
                               "severe": Fraction(3, 10)}
    assert DEFAULT_CROWDING == "average"


def test_unknown_table_name_is_refused_with_the_list():
    with pytest.raises(InputError) as err:
        table_named("brt-1980")
    assert err.value.column == "labour.table" and err.value.value == "brt-1980"
    assert "clark-lorenzoni, plant-estimating-2019" in err.value.fix
    assert set(TABLES) == {"clark-lorenzoni", "plant-estimating-2019"}


def test_every_table_says_where_it_comes_from():
    for table in TABLES.values():
        line = table_citation(table)
        assert table.citation in line and table.obtained in line
        assert "READ" in table.section
    assert "1985" in table_citation(CLARK_LORENZONI)
    assert "Table 9" in table_citation(PLANT_ESTIMATING_2019)


def test_a_flat_user_table_holds_its_figure_for_every_week():
    table = ProductivityTable("mine", "my data", "measured", {"6x10": (Fraction("0.1"),)})
    losses, _ = schedule_losses(table, 6, 10)
    assert weeks_to_finish(Fraction(540), Fraction(60), losses) == 10  # 54 productive h a week
    assert average_loss(losses, Fraction(10)) == Fraction("0.1")
    assert math.isclose(float(average_loss(losses, Fraction(3, 2))), 0.1)
