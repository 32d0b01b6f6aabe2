"""What a refused number or date cell probably meant, to say so in the error.

Spreadsheets show numbers and dates in the forms their formatting asks for, and exports
keep those forms: ``$1,200``, ``1.200,50 EUR``, ``(500)``, ``5d``, ``06/03/2025``, or a date
that lost its format and became its serial number ``45722``. hasten reads plain numbers and
ISO dates only, so that no cell changes meaning with the formatting of the program that
wrote it. A cell in one of these forms is refused; this module finds the form and the plain
value to write instead (when there is exactly one), for the message. The one form that is
read is a percentage in the ``percent_complete`` column (see
:mod:`hasten.formats.activities`).

Each function returns ``(problem, fix)`` or None when the text is in no known form.
"""

from __future__ import annotations

import re
import unicodedata
from datetime import date, timedelta

__all__ = ["number_advice", "days_advice", "date_advice", "serial_of", "SERIAL_EPOCH"]

#: Day 0 of the spreadsheet 1900 date system for dates after February 1900 (serial 1 is
#: 1900-01-01, and the system counts a 29 February 1900 that never was).
SERIAL_EPOCH = date(1899, 12, 30)

_DECORATED = re.compile(r"(?P<pre>[^\d\s(+\-\u2212.]*)\s*"
                        r"(?P<number>[(+\-\u2212]?[\d.,' \u00a0\u202f]*\d\)?)"
                        r"\s*(?P<post>[^\d\s)]*)")
_DOT_GROUPS = re.compile(r"[+-]?\d{1,3}(?:\.\d{3})+,\d+")
_COMMA_GROUPS = re.compile(r"[+-]?\d{1,3}(?:,\d{3})+(?:\.\d+)?")
_SPACE_GROUPS = re.compile(r"[+-]?\d{1,3}(?:[ \u00a0\u202f']\d{3})+(?:\.\d+)?")
_PLAIN = re.compile(r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)")
_DAYS = re.compile(r"(\d+)\s*(d|day|days|wd|working days?)", re.IGNORECASE)
_WEEKS = re.compile(r"(\d+)\s*(w|wk|wks|week|weeks)", re.IGNORECASE)
_ISO = re.compile(r"(\d{4})-(\d{2})-(\d{2})")


def _plain_of(text: str) -> str | None:
    """The plain number ``text`` stands for when its grouping is unambiguous."""
    text = text.strip()
    negative = text.startswith(("(", "\u2212")) or (text.startswith("-"))
    body = text.strip("()").lstrip("+-\u2212").strip()
    if re.fullmatch(r"\d{1,3}\.\d{3}", body):
        return None  # 2.500: two and a half, or two thousand five hundred?
    if _PLAIN.fullmatch(body):
        plain = body
    elif _COMMA_GROUPS.fullmatch(body):
        plain = body.replace(",", "")
    elif _DOT_GROUPS.fullmatch(body) or re.fullmatch(r"\d+,\d+", body):
        plain = body.replace(".", "").replace(",", ".")
    elif _SPACE_GROUPS.fullmatch(body):
        plain = re.sub(r"[ \u00a0\u202f']", "", body)
    else:
        return None
    return f"-{plain}" if negative else plain


def number_advice(text: str) -> tuple[str, str] | None:
    """The problem and fix for a number written with a currency, grouping, brackets,
    another minus sign, a percent sign, or a date where a number belongs."""
    text = text.strip()
    if _ISO.fullmatch(text):
        shown = date.fromisoformat(text) if _valid_iso(text) else None
        if shown is not None and shown >= date(1900, 1, 1):
            number = serial_of(shown)
            return ("a date stands where a number belongs (is the cell formatted as a date?)",
                    f"format the cell as a number: this date is how a spreadsheet shows the "
                    f"number {number}; write {number} if that is meant")
    if text.endswith("%") and _plain_of(text[:-1]) is not None:
        return ("a percentage stands where a plain number belongs",
                "write the number without the % sign (is the cell formatted as a percentage?)")
    match = _DECORATED.fullmatch(text)
    marks = [m for m in (match.group("pre"), match.group("post")) if m] if match else []
    if marks and all(map(_is_currency, marks)):
        plain = _plain_of(match.group("number"))
        number = (f": {plain}" if plain is not None else
                  ", with a decimal point and no thousands separator")
        return ("a currency stands in the number",
                f"write the plain number without the currency{number} (the project's "
                "currency is set once, in the settings)")
    if text.startswith("(") and text.endswith(")") and _plain_of(text) is not None:
        return ("a negative number in brackets (accounting style)",
                f"write it with a minus sign: {_plain_of(text)}")
    if text.startswith("\u2212") and _plain_of(text) is not None:
        return ("a typographic minus sign (\u2212) instead of the hyphen-minus (-)",
                f"write {_plain_of(text)}")
    if _DOT_GROUPS.fullmatch(text):
        return ("a dot as thousands separator and a decimal comma",
                f"write plain numbers with a decimal point: {_plain_of(text)}")
    if _SPACE_GROUPS.fullmatch(text):
        return ("a thousands separator (space or apostrophe) in the number",
                f"write plain numbers only: {_plain_of(text)}")
    return None


def _is_currency(mark: str) -> bool:
    """A currency sign ($, €, £ ...: Unicode category Sc) or a three-letter code (EUR)."""
    return (len(mark) == 3 and mark.isascii() and mark.isalpha() and mark.isupper()) or all(
        unicodedata.category(char) == "Sc" for char in mark)


def serial_of(day: date) -> int:
    """The spreadsheet serial number of ``day`` in the 1900 date system (serial 1 is
    1900-01-01; from March 1900 on one more, for the 29 February 1900 the system counts)."""
    return (day - SERIAL_EPOCH).days - (1 if day < date(1900, 3, 1) else 0)


def days_advice(text: str, unit: str) -> tuple[str, str] | None:
    """The problem and fix for a number of days written with a unit (``5d``, ``2w``)."""
    text = text.strip()
    days = _DAYS.fullmatch(text)
    if days:
        return (f"a unit stands in the number (the column counts {unit})",
                f"write {days.group(1)}")
    weeks = _WEEKS.fullmatch(text)
    if weeks:
        return (f"weeks stand where {unit} belong",
                f"write the number of {unit}, e.g. {int(weeks.group(1)) * 5} for "
                f"{weeks.group(1)} weeks of five working days")
    return None


def _valid_iso(text: str) -> bool:
    try:
        date.fromisoformat(text)
    except ValueError:
        return False
    return True


def date_advice(text: str) -> tuple[str, str] | None:
    """The problem and fix for a date written as a serial number, with slashes or dots,
    without leading zeros, or with a time of day."""
    text = text.strip()
    if re.fullmatch(r"\d{5}(?:\.0+)?", text):
        serial = int(float(text))
        day = SERIAL_EPOCH + timedelta(days=serial)
        return ("not a date but a spreadsheet date serial number, it seems (the cell lost its "
                "date format)", f"write the date as YYYY-MM-DD: in the 1900 date system "
                f"{serial} is {day.isoformat()} (check it: the 1904 system counts differently)")
    timed = re.fullmatch(r"(\d{4}-\d{2}-\d{2})[ T](\d{1,2}:\d{2}(?::\d{2}(?:\.\d+)?)?)", text)
    if timed and _valid_iso(timed.group(1)):
        return (f"a time of day ({timed.group(2)}) stands in the date; dates are whole days",
                f"write {timed.group(1)}")
    year_first = re.fullmatch(r"(\d{4})[-/.](\d{1,2})[-/.](\d{1,2})", text)
    if year_first:
        return _iso_fix(*(int(g) for g in year_first.groups()))
    day_first = re.fullmatch(r"(\d{1,2})[-/.](\d{1,2})[-/.](\d{4})", text)
    if day_first:
        a, b, year = (int(g) for g in day_first.groups())
        if a > 12 >= b:
            return _iso_fix(year, b, a)
        if b > 12 >= a:
            return _iso_fix(year, a, b)
        if a != b:
            first, second = _iso(year, b, a), _iso(year, a, b)
            if first and second:
                return ("not a date written YYYY-MM-DD, and the order of day and month is "
                        "ambiguous",
                        f"write the date as YYYY-MM-DD: {first} or {second}")
        return _iso_fix(year, a, b)
    return None


def _iso(year: int, month: int, day: int) -> str | None:
    try:
        return date(year, month, day).isoformat()
    except ValueError:
        return None


def _iso_fix(year: int, month: int, day: int) -> tuple[str, str] | None:
    iso = _iso(year, month, day)
    if iso is None:
        return None
    return "not a date written YYYY-MM-DD", f"write {iso}"
