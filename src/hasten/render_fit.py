"""Text tables that fit a terminal: at most :data:`WIDTH` columns.

Long texts (names, trades) are shortened with an ellipsis, long lists (the curve's
changes) are wrapped onto more lines; ``wide=True`` shows every text whole. JSON, CSV and
the report always carry the full texts.

Examples
--------
>>> print(table([["A1", "A very long activity name indeed", "12"]], ["id", "name", "days"],
...             shorten=[1], width=24))
id  name            days
--  --------------  ----
A1  A very long a…    12
"""

from __future__ import annotations

import re
import textwrap
from typing import Sequence

__all__ = ["WIDTH", "table", "columns_table", "cut", "wrap_lines"]

#: the widest line a text table may have (``--wide`` lifts it)
WIDTH = 100
_ELLIPSIS = "…"
_GAP = 2  # two spaces between columns
_NUMBER = re.compile(r"^-?[\d,]+(\.\d+)?$")
_NUMBERS = re.compile(r"-?[\d,]+(?:\.\d+)?(?:\n-?[\d,]+(?:\.\d+)?)*")  # one a line


def cut(text: str, width: int) -> str:
    """``text`` cut to ``width`` characters, the last one an ellipsis when cut."""
    text = str(text)
    if len(text) <= width:
        return text
    return text[: max(width - 1, 0)].rstrip() + _ELLIPSIS


def _longest_line(text: str) -> int:
    return max(map(len, text.split("\n")))


def _widths(columns: list[list[str]], headers: Sequence[str]) -> list[int]:
    """The widest line of each column, its title included (a column without line breaks
    is measured in one call)."""
    return [max(_longest_line(str(h)), _widest(c)) for h, c in zip(headers, columns)]


def _widest(column: Sequence[str]) -> int:
    """The longest line of the texts of ``column`` (0 for none)."""
    if not column:
        return 0
    if "\n" not in "".join(column):
        return max(map(len, column))
    return max(map(_longest_line, column))


def table(rows: Sequence[Sequence[object]], headers: Sequence[str], *, shorten: Sequence[int] = (),
          wrap: Sequence[int] = (), wide: bool = False, width: int = WIDTH, least: int = 8,
          optional: Sequence[int] = (), comfort: int = 24) -> str:
    """A plain text table no wider than ``width``.

    Parameters
    ----------
    rows, headers
        The cells (turned into text) and the column titles (``"\\n"`` for two lines).
    shorten
        Columns whose texts may be cut with an ellipsis, down to ``least`` characters.
    wrap
        Columns whose texts may be wrapped onto several lines (at spaces).
    wide
        Show every text whole, however wide the table gets.
    optional
        Columns left out, in this order, while the table is too wide with the texts cut to
        ``comfort`` characters (a line under the table names them).
    """
    return columns_table(list(zip(*rows)) if rows else [[] for _ in headers], headers, shorten=shorten,
                         wrap=wrap, wide=wide, width=width, least=least, optional=optional, comfort=comfort)


def columns_table(columns: Sequence[Sequence[object]], headers: Sequence[str], *, shorten: Sequence[int] = (),
                  wrap: Sequence[int] = (), wide: bool = False, width: int = WIDTH, least: int = 8,
                  optional: Sequence[int] = (), comfort: int = 24) -> str:
    """:func:`table` of the cells given column by column (each column a sequence of
    cells, top to bottom, all of one length), as ``table(list(zip(*columns)), headers, ...)``."""
    # the table column by column: each column turned into text, measured, cut and put
    # into the lines in one pass
    columns = [column if isinstance(column, list) else list(column) for column in columns]
    # columns of whole numbers are numbers (aligned right) without reading their texts
    whole = [bool(column) and type(column[0]) is int and set(map(type, column)) <= {int} for column in columns]
    columns = [list(map(str, column)) if known or None not in column else
               ["" if c is None else str(c) for c in column] for column, known in zip(columns, whole)]
    headers = [str(h) for h in headers]
    dropped: list[str] = []
    measured = None  # the widths of the columns, measured once (a column left out or cut
    # changes no other column's width)
    if not wide:
        measured = _widths(columns, headers)
        for k in optional:
            floor = [len(max(str(h).split("\n"), key=len)) if j not in (*shorten, *wrap) or j in optional
                     else max(comfort, len(max(str(h).split("\n"), key=len))) for j, h in enumerate(headers)]
            widths = [min(w, f) if j in (*shorten, *wrap) else w
                      for j, (w, f) in enumerate(zip(measured, floor))]
            if sum(widths) + _GAP * (len(widths) - 1) <= width:
                break
            gone = k - sum(1 for x in optional[: optional.index(k)] if x < k)  # positions move left
            dropped.append(headers[gone].replace("\n", " "))
            del headers[gone]
            del measured[gone]
            del columns[gone]
            del whole[gone]
            shorten = [j - (j > gone) for j in shorten if j != gone]
            wrap = [j - (j > gone) for j in wrap if j != gone]
        widths = list(measured)
        over = sum(widths) + _GAP * (len(widths) - 1) - width
        floors = {k: max(least, max(len(w) for w in str(headers[k]).split("\n")))
                  for k in (*shorten, *wrap)}
        limit = dict.fromkeys((*shorten, *wrap), None)
        while over > 0:
            room = [k for k in limit if (limit[k] or widths[k]) > floors[k]]
            if not room:
                break
            k = max(room, key=lambda j: (limit[j] or widths[j], j in wrap))
            limit[k] = (limit[k] or widths[k]) - 1
            over -= 1
        for k, cap in limit.items():
            if cap is None:
                continue
            columns[k] = [wrap_lines(x, cap) if k in wrap else cut(x, cap) for x in columns[k]]
            whole[k] = False
            measured[k] = max(_longest_line(headers[k]), _widest(columns[k]))
    note = f"\n({', '.join(dropped)} left out to fit {width} columns; --wide shows every column)" if dropped else ""
    return _render(columns, headers, measured, whole) + note


def _render(columns: list[list[str]], headers: list[str], widths: list[int] | None = None,
            whole: Sequence[bool] = ()) -> str:
    """Columns two spaces apart, titles over a dashed rule (titles of several lines sit on
    the rule), numbers aligned right, other texts left; cells may hold several lines.
    ``widths``: the columns' widths when the caller has measured them; ``whole``: the
    columns known to hold whole numbers (the texts of the others are read)."""
    if widths is None:
        widths = _widths(columns, headers)
    rows = bool(columns) and bool(columns[0])
    known = list(whole) + [False] * (len(headers) - len(whole))
    right = [rows and (known[k] or _numbers(columns[k])) for k in range(len(headers))]

    def block(cells: list[str], top: bool) -> list[str]:
        parts = [c.split("\n") for c in cells]
        height = max((len(p) for p in parts), default=1)
        parts = [([""] * (height - len(p)) + p) if top else (p + [""] * (height - len(p))) for p in parts]
        return [(" " * _GAP).join(x.rjust(w) if r else x.ljust(w) for x, w, r in zip(line, widths, right)).rstrip()
                for line in zip(*parts)]

    out = block(headers, True) + [(" " * _GAP).join("-" * w for w in widths)]
    # a row of one line each: its cells put in place by one format string (what block
    # does, without splitting each cell); without a line break in any cell, every row so
    # by one call over the columns
    line = (" " * _GAP).join(f"{{:{'>' if r else '<'}{w}}}" if w else "{}"
                             for w, r in zip(widths, right))
    if columns and not any("\n" in "".join(c) for c in columns):
        out += map(str.rstrip, map(line.format, *columns))
        return "\n".join(out)
    for r in zip(*columns):
        if "\n" in "".join(r):
            out += block(r, False)
        else:
            out.append(line.format(*r).rstrip())
    return "\n".join(out)


def _numbers(column: list[str]) -> bool:
    """Every non-empty cell a number (:data:`_NUMBER`), and one at least; a column of
    one-line cells is matched whole."""
    given = list(filter(None, column))
    if not given:
        return False
    if not _NUMBER.match(given[0]):  # (a column of texts: known by its first)
        return False
    if "\n" in "".join(given):
        return all(_NUMBER.match(text) for text in given)
    return _NUMBERS.fullmatch("\n".join(given)) is not None


def wrap_lines(text: str, width: int) -> str:
    """``text`` wrapped at spaces into lines of at most ``width`` characters."""
    return "\n".join(textwrap.wrap(text, width, break_on_hyphens=False)) or text

