"""Project settings (``project.toml``, the workbook's project sheet, the JSON ``project`` object).

Keys are flat and dotted here (``contract.finish``); :func:`flatten` and :func:`nest` convert
from and to the sectioned TOML/JSON layout. Unknown keys are refused.

``[status] data_date`` is the data date of a progress update (see :mod:`hasten.progress`):
the first day of remaining work; actual dates must lie before it. It may not be before the
project start.

Further named calendars, which activities name in their ``calendar`` column, go under
``[calendars.NAME]`` (flat keys ``calendars.NAME.workdays`` and ``calendars.NAME.holidays``)::

    [calendars.crane]
    workdays = "all-days"         # as the project's calendar key: a name or a list of weekdays
    holidays = []                 # optional; absent (or an empty cell): the project's holidays

``workdays`` is required; ``holidays`` given as ``[]`` (or the text ``none``, the workbook's
spelling of an empty list) means no holidays. A calendar's name is its key: letters, digits,
``-`` or ``_``. Calendars keep the order they are given in.

Duration ranges go under ``[risk]`` (``risk.default``, ``risk.distribution``,
``risk.trades.NAME``, ``risk.correlation.NAME``; see :mod:`hasten.formats.risk`).
"""

from __future__ import annotations

import difflib
import re
from collections.abc import Mapping
from dataclasses import dataclass
from datetime import date

from hasten.formats.cells import CellRef, date_value, number_value, text_value, whole_value
from hasten.formats.labour import (LABOUR, LABOUR_KEYS, check_labour_key, flatten_labour,
                                   labour_values, parse_labour)
from hasten.formats.risk import (RISK, check_risk_key, flatten_risk, is_risk_key, nest_key, parse_risk,
                                 risk_values)
from hasten.formats.tables import Settings
from hasten.labour import LabourRules
from hasten.project import WEEKDAY_NAMES, Calendar, Contract, Costs, Project, Risk

__all__ = [
    "SETTING_KEYS",
    "SECTIONS",
    "CALENDARS",
    "CALENDAR_KEYS",
    "NAMED_CALENDARS",
    "ProjectSettings",
    "parse_settings",
    "settings_values",
    "flatten",
    "nest",
]

SETTING_KEYS = (
    "name", "start", "calendar", "holidays", "currency",
    "costs.indirect_per_day",
    "contract.finish", "contract.damages_per_day", "contract.bonus_per_day",
    "contract.bonus_cap_days",
    "status.data_date",
)
REQUIRED_KEYS = ("name", "start")
SECTIONS = ("costs", "contract", "status")
CALENDARS = "calendars"  # the section of named calendars: calendars.NAME.KEY
CALENDAR_KEYS = ("workdays", "holidays")
_CALENDAR_NAME = re.compile(r"[\w-]+")  # \w: letters, digits and '_'
_CALENDAR_NAME_FIX = ("rename the calendar using letters, digits, '-' or '_' only, e.g. "
                      "'night-shift', and use that name in the activities' calendar column")
NAMED_CALENDARS = {
    "mon-fri": (0, 1, 2, 3, 4),
    "mon-sat": (0, 1, 2, 3, 4, 5),
    "all-days": (0, 1, 2, 3, 4, 5, 6),
}
_CALENDAR_FIX = (f"use one of {', '.join(NAMED_CALENDARS)} or a list of working weekdays "
                 f"from {', '.join(WEEKDAY_NAMES)}, e.g. [\"mon\", \"tue\", \"wed\"]")


@dataclass(frozen=True)
class ProjectSettings:
    """The parsed settings: every Project field except activities and links."""

    name: str
    start: date
    calendar: Calendar
    currency: str
    costs: Costs
    contract: Contract
    data_date: date | None = None
    calendars: tuple[Calendar, ...] = ()
    labour: LabourRules | None = None
    risk: Risk = Risk()


def _flatten_calendars(value: object, where: CellRef) -> dict[str, object]:
    """``{"crane": {"workdays": w}}`` -> ``{"calendars.crane.workdays": w}``."""
    if not isinstance(value, Mapping):
        raise where.at(CALENDARS).error(
            f"'{CALENDARS}' must be a section of named calendars", value,
            'write each calendar as [calendars.NAME] followed by workdays = "mon-fri" '
            "(and optionally holidays = [...])")
    flat: dict[str, object] = {}
    for name, table in value.items():
        key = f"{CALENDARS}.{name}"
        if not isinstance(table, Mapping):
            raise where.at(key).error(
                "a calendar must be a section of keys", table,
                f'write it as [{key}] followed by workdays = "mon-fri" (and optionally '
                "holidays = [...])")
        if not table:
            raise where.at(key).error(
                "the calendar has no keys", name,
                f'give it its working weekdays: [{key}] workdays = "mon-fri"')
        flat.update({f"{key}.{inner}": v for inner, v in table.items()})
    return flat


def flatten(nested: Mapping[str, object], where: CellRef) -> dict[str, object]:
    """``{"contract": {"finish": d}}`` -> ``{"contract.finish": d}`` for the known sections,
    ``{"calendars": {"crane": {"workdays": w}}}`` -> ``{"calendars.crane.workdays": w}``."""
    flat: dict[str, object] = {}
    for key, value in nested.items():
        if key == CALENDARS:
            flat.update(_flatten_calendars(value, where))
        elif key == RISK:
            flat.update(flatten_risk(value, where))
        elif key == LABOUR:
            flat.update(flatten_labour(value, where))
        elif key in SECTIONS:
            if not isinstance(value, Mapping):
                raise where.at(key).error(f"'{key}' must be a section of keys", value,
                                          f"write it as [{key}] followed by its keys")
            flat.update({f"{key}.{inner}": v for inner, v in value.items()})
        else:
            flat[key] = value
    return flat


def nest(flat: Mapping[str, object]) -> dict[str, object]:
    """The inverse of :func:`flatten`: dotted keys go into their sections (and a calendar's
    keys into its table within ``calendars``)."""
    nested: dict[str, object] = {}
    for key, value in flat.items():
        *sections, inner = nest_key(key) or key.split(".")
        table = nested
        for section in sections:
            table = table.setdefault(section, {})
        table[inner] = value
    return nested


def _calendar_parts(key: str) -> tuple[str, str] | None:
    """(name, inner key) of a ``calendars.NAME.KEY`` key; None for any other key."""
    section, dot, rest = key.partition(".")
    if section != CALENDARS:
        return None
    name, dot, inner = rest.rpartition(".")
    return (name, inner) if dot else (rest, "")


def _check_calendar_key(settings: Settings, key: str) -> None:
    """A key of a named calendar: a valid name and one of the calendar keys."""
    name, inner = _calendar_parts(key)
    where = settings.where(key)
    if not inner:
        raise where.error(
            "a calendar setting needs the calendar's name and a key", key,
            f"write {CALENDARS}.{name or 'NAME'}.workdays (and optionally "
            f"{CALENDARS}.{name or 'NAME'}.holidays)")
    if not _CALENDAR_NAME.fullmatch(name):
        raise where.error("a calendar name may contain only letters, digits, '-' and '_'"
                          if name else "the calendar name is empty", name, _CALENDAR_NAME_FIX)
    if inner not in CALENDAR_KEYS:
        close = difflib.get_close_matches(inner, CALENDAR_KEYS, n=1)
        hint = f"did you mean '{CALENDARS}.{name}.{close[0]}'? " if close else ""
        raise where.error("unknown key", key,
                          f"{hint}a calendar takes the keys {' and '.join(CALENDAR_KEYS)}")


def _check_keys(settings: Settings) -> None:
    """Refuse unknown keys (with a close match if there is one) and missing required keys."""
    for key in settings.values:
        if key in SETTING_KEYS:
            continue
        if _calendar_parts(key) is not None:
            _check_calendar_key(settings, key)
            continue
        if is_risk_key(key):
            check_risk_key(settings, key)
            continue
        if key.startswith(f"{LABOUR}."):
            check_labour_key(settings, key)
            continue
        close = difflib.get_close_matches(
            key, SETTING_KEYS + tuple(f"{LABOUR}.{k}" for k in LABOUR_KEYS), n=1)
        hint = f"did you mean '{close[0]}'? " if close else ""
        raise settings.where(key).error(
            "unknown key", key, f"{hint}allowed keys: {', '.join(SETTING_KEYS)}, and the "
                                f"sections {CALENDARS}.NAME, {LABOUR} and {RISK}")
    for key in REQUIRED_KEYS:
        if _given(settings, key) is None:
            raise CellRef(settings.source, None, key).error(
                f"the required key '{key}' is missing", None,
                f"add it, e.g. {key} = " + ('"Depot extension"' if key == "name" else "2025-03-03"))


def _given(settings: Settings, key: str) -> object:
    """The value of ``key``, or None when absent or an empty cell."""
    value = settings.values.get(key)
    return None if isinstance(value, str) and not value.strip() else value


def _weekday_names(value: object, where: CellRef) -> list[str]:
    """The weekday names of a list or of comma-separated text."""
    items = value.split(",") if isinstance(value, str) else value
    if not isinstance(items, list) or not all(isinstance(i, str) for i in items):
        raise where.error("unknown calendar", value, _CALENDAR_FIX)
    return [i.strip().lower() for i in items]


def parse_calendar(value: object, holidays: tuple[date, ...], where: CellRef) -> Calendar:
    """A named calendar or a list of working weekdays; the name is canonical."""
    if value is None:
        return Calendar(holidays=holidays)
    if isinstance(value, str) and value.strip().lower() in NAMED_CALENDARS:
        name = value.strip().lower()
        return Calendar(NAMED_CALENDARS[name], holidays, name)
    names = _weekday_names(value, where)
    if not names or any(n not in WEEKDAY_NAMES for n in names):
        raise where.error("unknown calendar" if names else "no working weekdays", value, _CALENDAR_FIX)
    twice = next((n for i, n in enumerate(names) if n in names[:i]), None)
    if twice:
        raise where.error(f"the weekday '{twice}' is listed twice", value,
                          "list each working weekday once, e.g. [\"mon\", \"tue\", \"wed\"]")
    workdays = tuple(sorted(WEEKDAY_NAMES.index(n) for n in names))
    for name, days in NAMED_CALENDARS.items():
        if days == workdays:
            return Calendar(workdays, holidays, name)
    return Calendar(workdays, holidays, ",".join(WEEKDAY_NAMES[d] for d in workdays))


def parse_holidays(value: object, where: CellRef) -> tuple[date, ...]:
    """A list of dates, or comma-separated dates in one cell; each date once."""
    if value is None:
        return ()
    items = [i for i in value.split(",") if i.strip()] if isinstance(value, str) else value
    if isinstance(items, date):
        items = [items]
    if not isinstance(items, list):
        raise where.error("holidays must be a list of dates", value,
                          "write holidays = [2025-12-25, 2025-12-26]")
    days = tuple(date_value(i, where) for i in items)
    for i, day in enumerate(days):
        if day in days[:i]:
            raise where.error("a holiday is listed twice", day.isoformat(), "list each holiday once")
    return days


def _calendar_holidays(value: object, where: CellRef) -> tuple[date, ...]:
    """A named calendar's holidays: as :func:`parse_holidays`, and the text ``none`` for no
    holidays (an empty workbook cell means the key is absent: the project's holidays)."""
    if isinstance(value, str) and value.strip().lower() == "none":
        return ()
    return parse_holidays(value, where)


def parse_calendars(settings: Settings, holidays: tuple[date, ...]) -> tuple[Calendar, ...]:
    """The named calendars in the order given; each is named by its key, takes the project's
    ``holidays`` unless it lists its own, and must give its working weekdays."""
    names = dict.fromkeys(parts[0] for parts in map(_calendar_parts, settings.values) if parts)
    calendars = []
    for name in names:
        key = f"{CALENDARS}.{name}.workdays"
        workdays = _given(settings, key)
        if workdays is None:
            raise settings.where(key).error(
                f"the calendar '{name}' has no working weekdays: the key '{key}' is missing or "
                "empty", None,
                f'add it, e.g. [{CALENDARS}.{name}] workdays = "mon-fri" (one of '
                f"{', '.join(NAMED_CALENDARS)} or a list of weekdays)")
        own = _optional(settings, f"{CALENDARS}.{name}.holidays", _calendar_holidays, holidays)
        calendar = parse_calendar(workdays, own, settings.where(key))
        calendars.append(Calendar(calendar.workdays, own, name))
    return tuple(calendars)


def _optional(settings: Settings, key: str, parse, default):
    """Parse ``key`` with ``parse(value, where)`` or return ``default`` when it is absent."""
    value = _given(settings, key)
    return default if value is None else parse(value, settings.where(key))


def parse_settings(settings: Settings) -> ProjectSettings:
    """Validate the settings and turn them into model values."""
    _check_keys(settings)
    holidays = _optional(settings, "holidays", parse_holidays, ())
    name = _required_text(settings)
    start = date_value(_given(settings, "start"), settings.where("start"))
    data_date = _optional(settings, "status.data_date", date_value, None)
    if data_date is not None and data_date < start:
        raise settings.where("status.data_date").error(
            f"the data date is before the project start ({start.isoformat()})",
            data_date.isoformat(), "write the date of the progress update, on or after the start")
    return ProjectSettings(
        name=name,
        start=start,
        calendar=parse_calendar(_given(settings, "calendar"), holidays, settings.where("calendar")),
        currency=_optional(settings, "currency", text_value, ""),
        costs=Costs(_optional(settings, "costs.indirect_per_day", number_value, 0.0)),
        contract=Contract(
            finish=_optional(settings, "contract.finish", date_value, None),
            damages_per_day=_optional(settings, "contract.damages_per_day", number_value, 0.0),
            bonus_per_day=_optional(settings, "contract.bonus_per_day", number_value, 0.0),
            bonus_cap_days=_optional(settings, "contract.bonus_cap_days", _days, None),
        ),
        data_date=data_date,
        calendars=parse_calendars(settings, holidays),
        labour=parse_labour(settings),
        risk=parse_risk(settings),
    )


def _days(value: object, where: CellRef) -> int:
    """A whole number of calendar days (the bonus cap)."""
    return whole_value(value, where, unit="days")


def _required_text(settings: Settings) -> str:
    """The project name: non-empty text."""
    return text_value(_given(settings, "name"), settings.where("name"))


def _workdays_value(workdays: tuple[int, ...], name: str | None) -> object:
    """The named calendar ``name`` if it has these weekdays, else the list of weekday names."""
    if name is not None and NAMED_CALENDARS.get(name) == workdays:
        return name
    return [WEEKDAY_NAMES[d] if 0 <= d < len(WEEKDAY_NAMES) else d for d in workdays]


def _calendars_values(calendars: tuple[Calendar, ...]) -> dict[str, object]:
    """The flat keys of the named calendars; holidays always written, so that an empty list
    does not read back as the project's holidays."""
    values: dict[str, object] = {}
    for calendar in calendars:
        named = next((n for n, days in NAMED_CALENDARS.items() if days == calendar.workdays), None)
        values[f"{CALENDARS}.{calendar.name}.workdays"] = _workdays_value(calendar.workdays, named)
        values[f"{CALENDARS}.{calendar.name}.holidays"] = list(calendar.holidays)
    return values


def settings_values(project: Project) -> dict[str, object]:
    """The canonical flat settings of ``project`` for writing (absent optional values left out)."""
    calendar = project.calendar
    values: dict[str, object] = {
        "name": project.name,
        "start": project.start,
        "calendar": _workdays_value(calendar.workdays, calendar.name),
        "holidays": list(calendar.holidays),
        "currency": project.currency,
        "costs.indirect_per_day": project.costs.indirect_per_day,
        "contract.finish": project.contract.finish,
        "contract.damages_per_day": project.contract.damages_per_day,
        "contract.bonus_per_day": project.contract.bonus_per_day,
        "contract.bonus_cap_days": project.contract.bonus_cap_days,
        "status.data_date": project.data_date,
    }
    given = {k: v for k, v in values.items() if v is not None}
    return given | _calendars_values(project.calendars) | labour_values(project.labour) | risk_values(project)
