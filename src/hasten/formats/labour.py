"""The ``[labour]`` settings: the normal week, the premium pay rules, trade wage rates and the
productivity data from which options are built for activities with crew data.

In ``project.toml``::

    [labour]
    normal_days = 5               # working days of a normal week
    normal_hours = 8              # hours of a normal working day
    overtime_after_week = 40      # overtime after so many hours a week ("none": no such rule)
    overtime_after_day = "none"   # overtime after so many hours a day, e.g. 8
    overtime_rate = 1.5
    saturday_rate = 1.5           # the 6th day of a week ("none": paid like a weekday)
    sunday_rate = 2               # the 7th day
    cap = 2                       # no hour paid above this multiplier
    pyramiding = false            # true: premiums add up
    shift_worked_hours = 7.5      # a second shift works ...
    shift_paid_hours = 8          # ... and is paid
    shift_premium_percent = 0
    shift_premium_per_hour = 0
    table = "clark-lorenzoni"     # or "plant-estimating-2019"
    crowding = "average"          # MCAA stacking of own forces: minor, average, severe
    crowding_loss = "none"        # or the job's own loss for extra crews, e.g. 0.15

    [labour.wages]                # straight-time rate per hour by trade
    concrete = 46.5

Every key is optional; an absent key takes the default of :class:`~hasten.labour.LabourRules`.
The workbook's project sheet writes the keys dotted (``labour.normal_hours``,
``labour.wages.concrete``), the JSON form nests them in ``project.labour``. A trade's name
may not contain ``.`` (it would split the dotted key). The text ``none`` stands for "no such
rule" where a rule may be switched off (the forms have no common way to write nothing).

A project without any ``labour`` key has no labour rules (None; the defaults apply where
options are built); one with the section is written back with every key, so that the
rules in force can be checked against the job's agreement.
"""

from __future__ import annotations

import difflib
from collections.abc import Mapping

from hasten.errors import InputError
from hasten.formats.cells import CellRef, number_value, text_value, whole_value
from hasten.formats.tables import Settings
from hasten.labour import LabourRules, PremiumRules

__all__ = ["LABOUR", "LABOUR_KEYS", "WAGES", "flatten_labour", "check_labour_key",
           "parse_labour", "labour_values"]

LABOUR = "labour"
WAGES = "wages"
_PREMIUM_KEYS = ("overtime_after_week", "overtime_after_day", "overtime_rate", "saturday_rate",
                 "sunday_rate", "cap", "pyramiding", "shift_worked_hours", "shift_paid_hours",
                 "shift_premium_percent", "shift_premium_per_hour")
LABOUR_KEYS = ("normal_days", "normal_hours") + _PREMIUM_KEYS + ("table", "crowding",
                                                                  "crowding_loss")
_MAY_BE_NONE = ("overtime_after_week", "overtime_after_day", "saturday_rate", "sunday_rate",
                "crowding_loss")
_NONE = "none"


def flatten_labour(value: object, where: CellRef) -> dict[str, object]:
    """``{"normal_hours": 8, "wages": {"concrete": 46.5}}`` -> ``{"labour.normal_hours": 8,
    "labour.wages.concrete": 46.5}``."""
    if not isinstance(value, Mapping):
        raise where.at(LABOUR).error(
            f"'{LABOUR}' must be a section of keys", value,
            "write it as [labour] followed by its keys, e.g. normal_hours = 8")
    flat: dict[str, object] = {}
    for key, inner in value.items():
        if key == WAGES:
            if not isinstance(inner, Mapping):
                raise where.at(f"{LABOUR}.{WAGES}").error(
                    "the wages must be a section of trade = rate per hour", inner,
                    "write [labour.wages] followed by lines such as concrete = 46.5")
            flat.update({f"{LABOUR}.{WAGES}.{trade}": rate for trade, rate in inner.items()})
        else:
            flat[f"{LABOUR}.{key}"] = inner
    return flat


def check_labour_key(settings: Settings, key: str) -> None:
    """A ``labour.*`` key must be one of the labour keys or ``labour.wages.TRADE``."""
    inner = key[len(LABOUR) + 1:]
    where = settings.where(key)
    if inner.startswith(f"{WAGES}."):
        trade = inner[len(WAGES) + 1:]
        if not trade.strip() or "." in trade:
            raise where.error("a wage needs the trade's name, without '.'", key,
                              f"write {LABOUR}.{WAGES}.TRADE with the trade as the activities' "
                              "trade column has it, e.g. labour.wages.concrete")
        return
    if inner not in LABOUR_KEYS:
        close = difflib.get_close_matches(inner, LABOUR_KEYS + (WAGES,), n=1)
        hint = f"did you mean '{LABOUR}.{close[0]}'? " if close else ""
        raise where.error("unknown key", key,
                          f"{hint}the labour keys are {', '.join(LABOUR_KEYS)} and "
                          f"{LABOUR}.{WAGES}.TRADE")


def _given(settings: Settings, key: str) -> object:
    value = settings.values.get(key)
    return None if isinstance(value, str) and not value.strip() else value


def _is_none(value: object) -> bool:
    return isinstance(value, str) and value.strip().lower() == _NONE


def _boolean(value: object, where: CellRef) -> bool:
    if isinstance(value, bool):
        return value
    if isinstance(value, str) and value.strip().lower() in ("true", "false"):
        return value.strip().lower() == "true"
    raise where.error("expected true or false", value,
                      "write false (an hour is paid at its highest rate) or true (premiums add up)")


def _value(settings: Settings, key: str, default: object) -> object:
    """The value of ``labour.KEY`` parsed, or ``default`` when absent."""
    flat = f"{LABOUR}.{key}"
    value = _given(settings, flat)
    if value is None:
        return default
    where = settings.where(flat)
    if key in _MAY_BE_NONE and _is_none(value):
        return None
    if key == "pyramiding":
        return _boolean(value, where)
    if key in ("table", "crowding"):
        return text_value(value, where)
    if key == "normal_days":
        return whole_value(value, where, minimum=None, unit="days")
    if key in _MAY_BE_NONE and isinstance(value, str) and not _looks_numeric(value):
        raise where.error("expected a number or 'none'", value,
                          f"write a number, or {_NONE} for no such rule")
    return number_value(value, where, minimum=None)


def _looks_numeric(text: str) -> bool:
    return any(c.isdigit() for c in text)


def _wages(settings: Settings) -> dict[str, float]:
    prefix = f"{LABOUR}.{WAGES}."
    return {key[len(prefix):]: number_value(value, settings.where(key), minimum=None)
            for key, value in settings.values.items()
            if key.startswith(prefix) and _given(settings, key) is not None}


def parse_labour(settings: Settings) -> LabourRules | None:
    """The labour rules, or None when no ``labour`` key is given. Errors name the file, the
    row (workbook), the key, the value and the fix."""
    if not any(key.startswith(f"{LABOUR}.") and _given(settings, key) is not None
               for key in settings.values):
        return None
    premium_defaults, defaults = PremiumRules(), LabourRules()
    try:
        premium = PremiumRules(
            **{k: _value(settings, k, getattr(premium_defaults, k)) for k in _PREMIUM_KEYS},
            file=settings.source)
        return LabourRules(
            normal_days=_value(settings, "normal_days", defaults.normal_days),
            normal_hours=_value(settings, "normal_hours", defaults.normal_hours),
            premium=premium, wages=_wages(settings),
            table=_value(settings, "table", defaults.table),
            crowding=_value(settings, "crowding", defaults.crowding),
            crowding_loss=_value(settings, "crowding_loss", defaults.crowding_loss),
            file=settings.source)
    except InputError as error:
        if error.row is not None or not error.column:
            raise
        raise settings.where(error.column).error(error.problem, error.value, error.fix) from None


def labour_values(rules: LabourRules | None) -> dict[str, object]:
    """The flat settings of ``rules`` for writing: every key (None as ``none``), then the
    wages; nothing for None."""
    if rules is None:
        return {}
    values: dict[str, object] = {}
    for key in LABOUR_KEYS:
        owner = rules.premium if key in _PREMIUM_KEYS else rules
        value = getattr(owner, key)
        values[f"{LABOUR}.{key}"] = _NONE if value is None else value
    values.update({f"{LABOUR}.{WAGES}.{trade}": rate for trade, rate in rules.wages.items()})
    return values
