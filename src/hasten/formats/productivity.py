"""A productivity table of the user's own (``--productivity FILE.csv``), replacing the
built-in overtime table.

Columns (names in any case, in any order):

* ``schedule`` (required): ``6x10`` (days a week x hours a day) or ``60h`` (hours a week,
  on any days). A schedule is looked up by days x hours first, then by its hours a week.
* ``week`` (optional): the week of extended hours the loss belongs to, 1, 2, ...; the last
  week given holds for later weeks. Empty: one loss for every week.
* ``loss`` (required): the fraction of every hour worked that is lost, from 0 up to (not
  including) 1: ``0.17`` for 17%.
* ``source`` (optional): where the figure comes from; every distinct text is quoted in the
  table's citation.

A schedule has either one row with no week, or rows for weeks 1, 2, ... with none missing
or repeated. Bad input raises :class:`~hasten.errors.InputError` naming the file, the row
(header row 1), the column, the value and the fix. :func:`parse_productivity` is pure (text
in, table out); :func:`read_productivity` reads the file.
"""

from __future__ import annotations

import csv
import difflib
import io
import re
from fractions import Fraction
from pathlib import Path

from hasten.errors import InputError
from hasten.formats.cells import CellRef, number_value, whole_value
from hasten.productivity import ProductivityTable, schedule_key, week_hours_key

__all__ = ["PRODUCTIVITY_COLUMNS", "parse_productivity", "read_productivity"]

PRODUCTIVITY_COLUMNS = ("schedule", "week", "loss", "source")
_REQUIRED = ("schedule", "loss")
_DAYS_HOURS = re.compile(r"(\d+)\s*[xX×]\s*(\d+(?:\.\d+)?)")
_WEEK_HOURS = re.compile(r"(\d+(?:\.\d+)?)\s*[hH]")
_SCHEDULE_FIX = "write days x hours a day, e.g. 6x10, or hours a week, e.g. 60h"


def _schedule(text: str, where: CellRef) -> str:
    if m := _DAYS_HOURS.fullmatch(text):
        days, hours = int(m.group(1)), Fraction(m.group(2))
        if not 1 <= days <= 7:
            raise where.error("a week has at most 7 days", text, _SCHEDULE_FIX)
        if not 0 < hours <= 24:
            raise where.error("a day has more than 0 and at most 24 hours", text, _SCHEDULE_FIX)
        return schedule_key(days, hours)
    if m := _WEEK_HOURS.fullmatch(text):
        hours = Fraction(m.group(1))
        if not 0 < hours <= 168:
            raise where.error("a week has more than 0 and at most 168 hours", text, _SCHEDULE_FIX)
        return week_hours_key(hours)
    raise where.error("not a schedule" if text else "the schedule is empty", text, _SCHEDULE_FIX)


def _loss(text: str, where: CellRef) -> Fraction:
    if text.endswith("%"):
        raise where.error("write the loss as a fraction, not a percentage", text,
                          f"write {text[:-1].strip()}% as a fraction, e.g. 17% as 0.17")
    if not text:
        raise where.error("the loss is empty", text, "write the loss as a fraction, e.g. 0.17")
    value = number_value(text, where, minimum=None)
    if not 0 <= value < 1:
        fix = (f"write a fraction: {value:g}% is {value / 100:g}" if 1 <= value < 100
               else "write a fraction from 0 up to (not including) 1, e.g. 0.17 for 17%")
        raise where.error("a loss is a fraction from 0 up to (not including) 1", text, fix)
    return Fraction(text)


def _rows(text: str, source: str):
    reader = csv.reader(io.StringIO(text, newline=""))
    line = 1
    try:
        for cells in reader:
            yield line, [c.strip() for c in cells]
            line = reader.line_num + 1
    except csv.Error as exc:
        raise InputError(f"cannot read the CSV: {exc}", file=source, row=reader.line_num,
                         fix='check the quotes on that line') from None


def parse_productivity(text: str, source: str) -> ProductivityTable:
    """The productivity table in the CSV ``text``; ``source`` names it in messages and in
    the table's citation (normally the file's path)."""
    header: list[str] | None = None
    rows: dict[str, list[tuple[int, int | None, Fraction]]] = {}
    sources: list[str] = []
    for line, cells in _rows(text, source):
        if not any(cells):
            continue
        if header is None:
            header = [c.lower() for c in cells]
            for i, name in enumerate(header):
                where = CellRef(source, line, name or f"#{i + 1}")
                if name not in PRODUCTIVITY_COLUMNS:
                    close = difflib.get_close_matches(name, PRODUCTIVITY_COLUMNS, n=1)
                    hint = f"did you mean '{close[0]}'? " if close else ""
                    raise where.error("unknown column", name,
                                      f"{hint}use the columns {', '.join(PRODUCTIVITY_COLUMNS)}")
                if name in header[:i]:
                    raise where.error("the column name appears twice", name, f"keep one column '{name}'")
            for name in _REQUIRED:
                if name not in header:
                    raise CellRef(source, line, name).error(
                        "a required column is missing", None,
                        f"add the column '{name}'; the columns are {', '.join(PRODUCTIVITY_COLUMNS)}")
            continue
        if len(cells) > len(header):
            raise CellRef(source, line, f"#{len(header) + 1}").error(
                "a value stands in a column without a name", cells[len(header)],
                "remove it, or name the column in the header row")
        cell = dict(zip(header, cells + [""] * (len(header) - len(cells))))
        key = _schedule(cell["schedule"], CellRef(source, line, "schedule"))
        week = None
        if cell.get("week", ""):
            week = whole_value(cell["week"], CellRef(source, line, "week"), minimum=1, unit="weeks")
        loss = _loss(cell["loss"], CellRef(source, line, "loss"))
        if cell.get("source") and cell["source"] not in sources:
            sources.append(cell["source"])
        earlier = rows.setdefault(key, [])
        if earlier and (week is None) != (earlier[0][1] is None):
            raise CellRef(source, line, "week").error(
                f"schedule {key} has rows with and without a week", cell.get("week", ""),
                "give either one row with an empty week (one loss for every week) or a row "
                "for each week 1, 2, ...")
        if any(w == week for _, w, _ in earlier):
            raise CellRef(source, line, "week" if week else "schedule").error(
                f"schedule {key} is given twice" + (f" for week {week}" if week else ""),
                week or cell["schedule"], "keep one row for each schedule and week")
        earlier.append((line, week, loss))
    if header is None or not rows:
        raise InputError("the productivity table has no rows", file=source,
                         fix="write a header row 'schedule,week,loss' and a row per schedule "
                             "(and week), e.g. 6x10,,0.17")
    losses = {}
    for key, entries in rows.items():
        if entries[0][1] is None:
            losses[key] = (entries[0][2],)
            continue
        entries.sort(key=lambda e: e[1])
        for expected, (line, week, _) in enumerate(entries, start=1):
            if week != expected:
                raise CellRef(source, line, "week").error(
                    f"schedule {key} has no row for week {expected}", week,
                    f"add a row for week {expected}: weeks run 1, 2, ... with none missing")
        losses[key] = tuple(e[2] for e in entries)
    quoted = f"; sources given: {'; '.join(sources)}" if sources else ""
    return ProductivityTable(
        name=f"file {source}", citation=f"the user's productivity table {source}{quoted}",
        obtained=f"read from {source}", losses=losses)


def read_productivity(path: Path | str) -> ProductivityTable:
    """Read a productivity table CSV (UTF-8, optional byte-order mark)."""
    path = Path(path)
    try:
        text = path.read_bytes().decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise InputError("the file is not UTF-8 text", file=str(path), value=f"byte {exc.start}",
                         fix="save it as 'CSV UTF-8' / UTF-8 text") from None
    except OSError as exc:
        raise InputError(f"cannot read the file: {exc.strerror}", file=str(path),
                         fix="check the path and the file permissions") from None
    return parse_productivity(text, str(path))
