"""Single values: reading them out of cells with located errors, and writing them as text.

Every table cell reaches the parser as text; :func:`cell_text` turns the values that
spreadsheets and JSON hold (numbers, dates, None) into that text, and :func:`number_text`
writes numbers so that reading them back gives the very same value.
"""

from __future__ import annotations

import functools
import math
import re
import unicodedata
from collections.abc import Callable
from dataclasses import dataclass, replace
from datetime import date, datetime, time
from decimal import Decimal, InvalidOperation
from typing import ParamSpec, TypeVar

from hasten.errors import CycleError, InputError
from hasten.formats.advice import date_advice, days_advice, number_advice

__all__ = [
    "CellRef",
    "one_line",
    "one_line_errors",
    "cell_text",
    "number_text",
    "plain_number",
    "clean_text",
    "text_value",
    "id_key",
    "id_value",
    "number_value",
    "whole_value",
    "date_value",
    "shortened",
    "WHOLE_LIMIT",
]

_PLAIN_NUMBER = re.compile(r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?")
_THOUSANDS = re.compile(r"[+-]?\d{1,3}(?:,\d{3})+(?:\.\d*)?")
_DECIMAL_COMMA = re.compile(r"[+-]?\d+,\d+")
_ISO_DATE = re.compile(r"\d{4}-\d{2}-\d{2}")
_MIDNIGHT = re.compile(r"(\d{4}-\d{2}-\d{2})[ T]00:00(?::00(?:\.0+)?)?")
# control characters other than tab and newline cannot be stored in every form
_CONTROL = re.compile(r"[\x00-\x08\x0b-\x1f\x7f-\x9f]")
P = ParamSpec("P")
R = TypeVar("R")
_NUMBER_FIX = "write a plain number: digits with an optional decimal point, no currency sign, e.g. 1250.50"


@dataclass(frozen=True)
class CellRef:
    """A reference to a cell: the file (or sheet, or JSON key), row and column a value came
    from, to build an :class:`InputError` that points at it. Settings use the key as the
    column."""

    file: str | None
    row: int | None = None
    column: str | None = None

    def at(self, column: str) -> CellRef:
        """The same place, another column (or settings key)."""
        return replace(self, column=column)

    def error(self, problem: str, value: object = None, fix: str | None = None) -> InputError:
        """An error located here; its texts are kept on one line (see :func:`one_line`)."""
        return InputError(one_line(problem), file=one_line(self.file), row=self.row,
                          column=one_line(self.column), value=value, fix=one_line(fix))


def one_line(text: str | None) -> str | None:
    """``text`` with line breaks, control and other invisible characters written as escapes
    (``\\n``, ``\\x1b``, ``\\u200b``, as ``repr`` writes them), so that a message quoting a
    cell or a path stays one line and shows what is really there."""
    if text is None or text.isprintable():
        return text
    return "".join(char if char.isprintable() else repr(char)[1:-1] for char in text)


def one_line_errors(function: Callable[P, R]) -> Callable[P, R]:
    """Decorate a public reader or writer: every :class:`InputError` it raises has its texts
    on one line (errors built by :meth:`CellRef.error` already have)."""
    @functools.wraps(function)
    def wrapper(*args: P.args, **kwargs: P.kwargs) -> R:
        try:
            return function(*args, **kwargs)
        except InputError as error:
            texts = (error.problem, error.file, error.column, error.fix)
            if all(one_line(t) == t for t in texts):
                raise
            if isinstance(error, CycleError):
                raise CycleError(error.cycle, file=one_line(error.file)) from None
            raise InputError(one_line(error.problem), file=one_line(error.file), row=error.row,
                             column=one_line(error.column), value=error.value,
                             fix=one_line(error.fix)) from None
    return wrapper


def plain_number(value: object) -> object:
    """12000.0 -> 12000 (whole floats below 1e15 become int); anything else unchanged."""
    if isinstance(value, float) and value.is_integer() and abs(value) < 1e15:
        return int(value)
    return value


def number_text(value: int | float) -> str:
    """Text that reads back as exactly ``value``: ``12000`` for 12000.0, shortest repr otherwise."""
    return str(plain_number(value))


def cell_text(value: object) -> str:
    """The text of a spreadsheet or JSON cell value (None is an empty cell)."""
    if value is None:
        return ""
    if isinstance(value, str):
        return value
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, (int, float)):
        return number_text(value)
    if isinstance(value, datetime):
        if value.time() == time(0, 0):
            return value.date().isoformat()
        return value.isoformat(sep=" ")
    if isinstance(value, (date, time)):
        return value.isoformat()
    return str(value)


def clean_text(text: str) -> str:
    """Strip surrounding whitespace and turn Windows/old-Mac line breaks into ``\\n``."""
    if "\r" not in text:  # the usual case: nothing to replace
        return text.strip()
    return text.replace("\r\n", "\n").replace("\r", "\n").strip()


def text_value(value: object, where: CellRef) -> str:
    """A text setting or cell; numbers and dates in a text field are refused."""
    if not isinstance(value, str):
        raise where.error("expected text", value, 'put the text in quotes, e.g. "Site office"')
    if value.isprintable():  # no control character, no line break: only spaces to strip
        return value.strip()
    text = clean_text(value)
    if _CONTROL.search(text):
        raise where.error("the text contains a control character", value,
                          "remove the invisible control character (only tab and line break are allowed)")
    return text


def id_key(text: str) -> str:
    """An id as ids are compared and kept: in Unicode normal form C (so that 'é' typed as
    one character and as 'e' plus an accent are one id); ASCII text is returned at once."""
    return text if text.isascii() else unicodedata.normalize("NFC", text)


def id_value(value: object, where: CellRef) -> str:
    """An id, or a reference to one: text without invisible characters (Unicode format
    characters such as the zero-width space, and other non-printing ones), normalised by
    :func:`id_key`."""
    text = text_value(value, where)
    if text.isascii() and text.isprintable():
        return text
    hidden = next((char for char in text if not char.isprintable() and not char.isspace()),
                  None)
    if hidden is not None:
        name = unicodedata.name(hidden, "without a name")
        raise where.error(f"the id holds the invisible character U+{ord(hidden):04X} {name}",
                          value, "retype the id without it (ids that look the same must be "
                          "the same)")
    return id_key(text)


def _unsigned_text(value: object) -> bool:
    """True for short text of ASCII digits with at most one decimal point (``12``, ``12.50``,
    ``.5``): a plain number that both ``int`` or ``float`` and :class:`Decimal` read alike.

    The number readers take a quick path for it; anything else goes through
    :func:`_plain_decimal` and its checks.
    """
    return (type(value) is str and len(value) <= 15 and value.isascii()
            and value.replace(".", "", 1).isdigit())


def _plain_decimal(value: object, where: CellRef, unit: str | None = None) -> Decimal:
    """Parse a plain number (int, float or text) exactly; refuse grouped or decorated numbers
    (saying what they probably meant, see :mod:`hasten.formats.advice`); ``unit`` names what
    a whole number counts, for numbers written with a unit (``5d``)."""
    if isinstance(value, bool) or not isinstance(value, (int, float, str)):
        raise where.error("expected a number", value, _NUMBER_FIX)
    if isinstance(value, (int, float)):
        if isinstance(value, float) and not math.isfinite(value):
            raise where.error("the number is not finite", value, _NUMBER_FIX)
        return Decimal(value)
    text = value.strip()
    if _THOUSANDS.fullmatch(text):
        raise where.error("thousands separators are not allowed", value,
                          f"write plain numbers only: {text.replace(',', '')}")
    if _DECIMAL_COMMA.fullmatch(text):
        raise where.error("a decimal comma is not allowed", value,
                          f"use a decimal point: {text.replace(',', '.')}")
    if not _PLAIN_NUMBER.fullmatch(text):
        advice = (unit and days_advice(text, unit)) or number_advice(text)
        problem, fix = advice or ("not a plain number", _NUMBER_FIX)
        raise where.error(problem, value, fix)
    try:
        return Decimal(text)
    except InvalidOperation:  # pragma: no cover - the pattern admits only valid decimals
        raise where.error("not a plain number", value, _NUMBER_FIX) from None


def number_value(value: object, where: CellRef, *, minimum: float | None = 0.0) -> float:
    """A plain number (money per unit etc.), at least ``minimum`` unless that is None."""
    number = float(value) if _unsigned_text(value) else float(_plain_decimal(value, where))
    if not math.isfinite(number):
        raise where.error("the number is too large", value, _NUMBER_FIX)
    if minimum is not None and number < minimum:
        raise where.error("must not be negative" if minimum == 0 else f"must be at least {minimum}",
                          value, f"write {number_text(minimum)} or more")
    return number


def whole_value(value: object, where: CellRef, *, minimum: int | None = 0,
                unit: str = "working days") -> int:
    """A whole number (``5`` or ``5.0``), at least ``minimum`` unless that is None."""
    if _unsigned_text(value) and value.isdigit():
        number = int(value)
    else:
        exact = _plain_decimal(value, where, unit)
        if exact != exact.to_integral_value():
            raise where.error(f"not a whole number of {unit}", value,
                              f"round to whole {unit}, e.g. {int(exact.to_integral_value())}")
        number = int(exact)
    if minimum is not None and number < minimum:
        raise where.error("must not be negative" if minimum == 0 else f"must be at least {minimum}",
                          value, f"write {minimum} or more")
    if abs(number) > WHOLE_LIMIT:
        raise where.error(f"more than {WHOLE_LIMIT:,} {unit}", shortened(value),
                          f"write a number of {unit} up to {WHOLE_LIMIT:,}")
    return number


def shortened(value: object, limit: int = 40) -> object:
    """``value`` as it is, or its text cut to its first characters when it is longer than
    ``limit`` (a value of thousands of characters would drown the message)."""
    text = str(value)
    if len(text) <= limit:
        return value
    return f"{text[:limit // 2]}... ({len(text)} characters)"


#: The largest whole number of days accepted (a thousand years of working days is plenty;
#: far larger numbers are typing slips, and Python refuses to print numbers of thousands
#: of digits).
WHOLE_LIMIT = 1_000_000


def date_value(value: object, where: CellRef) -> date:
    """A calendar date: a date object or ISO text ``YYYY-MM-DD`` (a time of exactly midnight
    after it, as exports of date cells write, is allowed)."""
    if isinstance(value, date) and not isinstance(value, datetime):
        return value
    if isinstance(value, datetime) and value.time() == time(0, 0):
        return value.date()
    fix = "write the date as YYYY-MM-DD, e.g. 2025-03-03"
    if not isinstance(value, str):
        raise where.error("not a date", value, fix)
    text = value.strip()
    midnight = _MIDNIGHT.fullmatch(text)
    if midnight:  # a date exported with its time, which is midnight: the date itself
        text = midnight.group(1)
    if not _ISO_DATE.fullmatch(text):
        problem, fix = date_advice(text) or ("not a date", fix)
        raise where.error(problem, value, fix)
    try:
        return date.fromisoformat(text)
    except ValueError:
        raise where.error("no such date", value, fix) from None
