"""The ``[risk]`` section of the settings and the ``optimistic`` / ``pessimistic`` cells.

``project.toml``::

    [risk]
    default = "-10%, +25%"        # every activity without a range of its own
    distribution = "pert"         # or "triangular"

    [risk.trades]                 # a range per trade, before the default
    concrete = "-5%, +40%"

    [risk.correlation]            # one shared factor per trade, with its weight (0 to 1)
    concrete = 0.5

Flat keys (the workbook's project sheet): ``risk.default``, ``risk.distribution``,
``risk.trades.NAME``, ``risk.correlation.NAME``; JSON: ``project.risk`` with the same
layout as the TOML. A trade named here must be the trade of some activity.

Activity columns ``optimistic`` and ``pessimistic`` (optional, whole working days) give an
activity its own range: at most the duration and at least the duration; a milestone
(duration 0) has none. The formulas, the rounding to whole days and the correlation model
are in :mod:`hasten.uncertainty`.
"""

from __future__ import annotations

import difflib
from collections.abc import Mapping, Sequence

from hasten.errors import InputError
from hasten.formats.cells import CellRef, number_value, text_value, whole_value
from hasten.formats.columns import cell_ref, optional
from hasten.formats.tables import Row, Settings, Table
from hasten.project import Project, Risk
from hasten.uncertainty import DISTRIBUTIONS, parse_spread

__all__ = ["RISK", "RISK_KEYS", "RISK_TABLES", "is_risk_key", "flatten_risk", "nest_key",
           "check_risk_key", "parse_risk", "risk_values", "check_risk_trades", "range_cells"]

RISK = "risk"
RISK_KEYS = ("default", "distribution")
RISK_TABLES = ("trades", "correlation")
_SECTION_FIX = ('write [risk] with default = "-10%, +25%" and distribution = "pert", and '
                'optionally [risk.trades] and [risk.correlation] with one line per trade')


def is_risk_key(key: str) -> bool:
    return key == RISK or key.startswith(f"{RISK}.")


def flatten_risk(value: object, where: CellRef) -> dict[str, object]:
    """``{"default": d, "trades": {"concrete": r}}`` -> ``{"risk.default": d,
    "risk.trades.concrete": r}``."""
    if not isinstance(value, Mapping):
        raise where.at(RISK).error(f"'{RISK}' must be a section of keys", value, _SECTION_FIX)
    flat: dict[str, object] = {}
    for key, inner in value.items():
        if key in RISK_TABLES:
            if not isinstance(inner, Mapping):
                raise where.at(f"{RISK}.{key}").error(
                    f"'{RISK}.{key}' must be a section with one key per trade", inner,
                    f'write [{RISK}.{key}] followed by one line per trade, e.g. concrete = '
                    + ('"-5%, +40%"' if key == "trades" else "0.5"))
            flat.update({f"{RISK}.{key}.{trade}": v for trade, v in inner.items()})
        else:
            flat[f"{RISK}.{key}"] = inner
    return flat


def nest_key(key: str) -> list[str] | None:
    """The sections and the inner key of a ``risk.trades.NAME`` key (a trade's name may hold
    dots); None for any other key."""
    for table in RISK_TABLES:
        head = f"{RISK}.{table}."
        if key.startswith(head):
            return [RISK, table, key[len(head):]]
    return None


def check_risk_key(settings: Settings, key: str) -> None:
    """A key of the risk section: one of its keys, or a trade under one of its tables."""
    parts = nest_key(key)
    where = settings.where(key)
    if parts is not None:
        if not parts[2].strip():
            raise where.error("the trade's name is empty", key,
                              f"write {RISK}.{parts[1]}.TRADE with the trade as the activities name it")
        return
    inner = key[len(RISK) + 1:]
    if inner in RISK_KEYS:
        return
    allowed = RISK_KEYS + RISK_TABLES
    close = difflib.get_close_matches(inner, allowed, n=1)
    hint = f"did you mean '{RISK}.{close[0]}'? " if close else ""
    raise where.error("unknown key", key, f"{hint}the risk section takes {', '.join(allowed)}")


def _given(settings: Settings, key: str) -> object:
    value = settings.values.get(key)
    return None if isinstance(value, str) and not value.strip() else value


def _spread_text(value: object, where: CellRef) -> str:
    """A range written as two percentages, checked, kept as written (without outer spaces)."""
    text = text_value(value, where) if isinstance(value, str) else value
    if not isinstance(text, str):
        raise where.error("a range is text of two percentages", value,
                          'write it in quotes, e.g. "-10%, +25%"')
    try:
        parse_spread(text, column=where.column)
    except InputError as error:
        raise where.error(error.problem, value, error.fix) from None
    return text


def _weight(value: object, where: CellRef) -> float:
    weight = number_value(value, where)
    if not 0 <= weight <= 1:
        raise where.error("the correlation weight is outside 0 to 1", value,
                          "give a weight from 0 (independent) to 1 (the trade's activities move together)")
    return weight


def parse_risk(settings: Settings) -> Risk:
    """The risk settings, each value checked where it is written."""
    default = _given(settings, f"{RISK}.default")
    key = f"{RISK}.distribution"
    distribution = _given(settings, key)
    if distribution is None:
        distribution = "pert"
    else:
        distribution = text_value(distribution, settings.where(key)) if isinstance(distribution, str) \
            else distribution
        if distribution not in DISTRIBUTIONS:
            raise settings.where(key).error("unknown distribution", distribution,
                                            f"use one of: {', '.join(DISTRIBUTIONS)}")
    trades, weights = [], []
    for key, value in settings.values.items():
        parts = nest_key(key)
        if parts is None or _given(settings, key) is None:
            continue
        where = settings.where(key)
        if parts[1] == "trades":
            trades.append((parts[2], _spread_text(value, where)))
        else:
            weights.append((parts[2], _weight(value, where)))
    return Risk(None if default is None else _spread_text(default, settings.where(f"{RISK}.default")),
                distribution, tuple(trades), tuple(weights))


def risk_values(project: Project) -> dict[str, object]:
    """The flat keys of the risk section (none for a project without risk settings; the
    distribution is written whenever some range is given, so that a reader sees it)."""
    risk = project.risk
    ranged = any(a.optimistic is not None or a.pessimistic is not None for a in project.activities)
    values: dict[str, object] = {}
    if risk.default is not None:
        values[f"{RISK}.default"] = risk.default
    if risk.default is not None or risk.trades or risk.correlation or ranged or risk.distribution != "pert":
        values[f"{RISK}.distribution"] = risk.distribution
    values.update({f"{RISK}.trades.{t}": text for t, text in risk.trades})
    values.update({f"{RISK}.correlation.{t}": w for t, w in risk.correlation})
    return values


def check_risk_trades(trades_used: Sequence[str], risk: Risk, settings: Settings) -> None:
    """Every trade the risk section names must be the trade of some activity."""
    known = sorted(set(trades_used) - {""})
    for table, pairs in (("trades", risk.trades), ("correlation", risk.correlation)):
        for trade, _ in pairs:
            if trade in known:
                continue
            close = difflib.get_close_matches(trade, known, n=2)
            hint = f"did you mean {' or '.join(repr(c) for c in close)}? " if close else ""
            raise settings.where(f"{RISK}.{table}.{trade}").error(
                f"no activity has the trade '{trade}'", trade,
                f"{hint}name a trade of the activities table: {', '.join(known) or 'none'}")


def range_cells(row: Row, table: Table, duration: int) -> dict[str, int | None]:
    """The ``optimistic`` and ``pessimistic`` days of one row, checked against its duration."""
    low = optional(row, table, "optimistic", whole_value)
    high = optional(row, table, "pessimistic", whole_value)
    if duration == 0:
        for column, value in (("optimistic", low), ("pessimistic", high)):
            if value:
                raise cell_ref(row, table, column).error(
                    "a milestone (duration 0) takes no time, so it has no range", row.cells[column],
                    "leave optimistic and pessimistic empty for a milestone")
    if low is not None and low > duration:
        raise cell_ref(row, table, "optimistic").error(
            f"the optimistic duration is longer than the duration ({duration})", row.cells["optimistic"],
            f"write at most {duration}: the optimistic duration is the shortest the work may take, "
            "the duration the most likely")
    if high is not None and high < duration:
        raise cell_ref(row, table, "pessimistic").error(
            f"the pessimistic duration is shorter than the duration ({duration})", row.cells["pessimistic"],
            f"write at least {duration}: the pessimistic duration is the longest the work may take, "
            "the duration the most likely")
    return {"optimistic": low, "pessimistic": high}
