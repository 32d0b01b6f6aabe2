"""Text cells of the CSV files hasten writes, kept from being run as spreadsheet formulas.

A spreadsheet program opening a CSV file runs a cell starting with ``=``, ``+``, ``-`` or
``@`` (and, in some programs, a tab or carriage return) as a formula; a task name such as
``=HYPERLINK(...)`` could then act on the reader's machine. Following the OWASP guidance
on "CSV Injection", hasten writes such a TEXT cell with a single quote in front, which
spreadsheets show as text. Numbers are never changed: a lag of ``-2`` is the number -2.

The rule, chosen so that reading undoes exactly what writing did (``convert`` stays
lossless), with T the characters ``= + - @``, tab and carriage return:

* writing a text cell adds one ``'`` in front when the text starts with a character of T,
  or starts with ``'`` followed by a character of T or by another ``'``;
* reading a cell of a project's CSV file removes one ``'`` in front when it is followed by
  a character of T or by another ``'``.

So ``=SUM(A1)`` is written ``'=SUM(A1)``, a name that really starts with a quote, ``'=x``,
is written ``''=x``, and ``'Tis`` (a quote before an ordinary character) is written and
read unchanged.
"""

from __future__ import annotations

from hasten.formats.cells import cell_text

__all__ = ["FORMULA_STARTS", "neutral_text", "csv_value", "restored_text"]

#: Characters that make a spreadsheet read a cell as a formula (OWASP, "CSV Injection").
FORMULA_STARTS = frozenset("=+-@\t\r")
_ESCAPED = FORMULA_STARTS | {"'"}


def neutral_text(text: str) -> str:
    """A text cell as written: ``'`` in front when a spreadsheet would run it, or when
    reading would otherwise take its own leading quote away."""
    if text and (text[0] in FORMULA_STARTS
                 or (text[0] == "'" and len(text) > 1 and text[1] in _ESCAPED)):
        return "'" + text
    return text


def csv_value(value: object) -> str:
    """The text of one CSV cell: text neutralised (:func:`neutral_text`), numbers, dates and
    empty cells as :func:`~hasten.formats.cells.cell_text` writes them."""
    return neutral_text(value) if isinstance(value, str) else cell_text(value)


def restored_text(cell: str) -> str:
    """A cell as read: undoes :func:`neutral_text` (one ``'`` before a character of
    :data:`FORMULA_STARTS` or another ``'`` is removed)."""
    if len(cell) > 1 and cell[0] == "'" and cell[1] in _ESCAPED:
        return cell[1:]
    return cell
