"""The tables every form is read into before parsing, and how grids and records become them.

A :class:`Table` holds text cells only, keyed by lower-case column name, each row with the
row number the user sees: for CSV files and sheets that is the spreadsheet row number
(header = row 1, first data row = row 2, blank rows still counted); for JSON lists it is
the 1-based position of the item in its list.
"""

from __future__ import annotations

from collections.abc import Iterable, Iterator, Mapping, Sequence
from dataclasses import dataclass, field
from itertools import repeat

from hasten.formats.cells import CellRef, cell_text, clean_text

__all__ = ["Row", "ColumnRows", "Table", "Settings", "Tables", "RepeatedKeys", "column_names",
           "table_from_grid", "table_from_records"]


@dataclass(frozen=True)
class Row:
    """One data row: its row number and its cells (column -> stripped text, "" if empty)."""

    line: int
    cells: Mapping[str, str]


class ColumnRows(Sequence):
    """The rows of a table kept by column: ``columns[name]`` holds that column's cells top to
    bottom, the first row has number ``first_line`` and the next rows follow one a line.

    It is the sequence of :class:`Row` those cells make (equal to the tuple of them), each
    row made when the rows are first asked for one by one (for a message or the full
    path); the quick path (:mod:`hasten.formats.quick`) reads the columns as they are. A
    large plain CSV file is read this way: making a dictionary per row and reading it
    again by column took a sixth of reading a 50,000-activity project.
    """

    __slots__ = ("names", "columns", "first_line", "_rows")
    __hash__ = None  # type: ignore[assignment]  # as a tuple of rows (their cells) is not

    def __init__(self, first_line: int, names: tuple[str, ...],
                 columns: Mapping[str, Sequence[str]]):
        self.names, self.columns, self.first_line = names, columns, first_line
        self._rows: tuple[Row, ...] | None = None

    @property
    def lines(self) -> range:
        """The row numbers, top to bottom."""
        return range(self.first_line, self.first_line + len(self))

    def _made(self) -> tuple[Row, ...]:
        if self._rows is None:
            cells = map(dict, map(zip, repeat(self.names),
                                  zip(*(self.columns[name] for name in self.names))))
            self._rows = tuple(map(Row, self.lines, cells))
        return self._rows

    def __len__(self) -> int:
        return len(self.columns[self.names[0]]) if self.names else 0

    def __getitem__(self, index):
        return self._made()[index]

    def __iter__(self) -> Iterator[Row]:
        return iter(self._made())

    def __eq__(self, other: object) -> bool:
        if isinstance(other, ColumnRows):
            return (self.first_line, self.names, len(self)) == (
                other.first_line, other.names, len(other)) and all(
                list(self.columns[n]) == list(other.columns[n]) for n in self.names)
        if isinstance(other, (tuple, list)):
            return self._made() == tuple(other)
        return NotImplemented

    def __repr__(self) -> str:
        return f"ColumnRows({self._made()!r})"


@dataclass(frozen=True)
class Table:
    """A table as read; ``source`` labels it in error messages (file, sheet or JSON key)."""

    source: str
    columns: tuple[str, ...] = ()
    rows: Sequence[Row] = ()  # a tuple, or ColumnRows for a large plain CSV file
    header_line: int | None = 1

    @property
    def is_empty(self) -> bool:
        """True when there is not even a header."""
        return not self.columns


@dataclass(frozen=True)
class Settings:
    """Project settings as flat keys (``contract.finish``) with their values.

    Values are text or, from TOML/JSON, numbers, dates and lists. ``lines`` gives the row
    of each key where the form has rows (the workbook's project sheet).
    """

    source: str
    values: Mapping[str, object] = field(default_factory=dict)
    lines: Mapping[str, int] = field(default_factory=dict)

    def where(self, key: str) -> CellRef:
        """The location of ``key`` for error messages."""
        return CellRef(self.source, self.lines.get(key), key)


@dataclass(frozen=True)
class Tables:
    """Everything one project is read from, in any form."""

    settings: Settings
    activities: Table
    links: Table | None = None
    crash_steps: Table | None = None
    options: Table | None = None


class RepeatedKeys(dict):
    """A record (JSON object) in which some keys were given more than once; ``repeated``
    lists them (the dict keeps the last value of each, as ``json`` does)."""

    def __init__(self, values: dict, repeated: list[str]):
        super().__init__(values)
        self.repeated = tuple(repeated)


def _has_text(cell: object) -> bool:
    """True for a cell with more than white space in it."""
    return cell_text(cell).strip() != ""


def _is_blank(cells: Sequence[object]) -> bool:
    """True for a row without any text (blank CSV line, empty sheet row, ``,,,``)."""
    return not any(map(_has_text, cells))


def column_names(source: str, line: int, cells: Sequence[object]) -> tuple[str, ...]:
    """Normalised column names; duplicates are refused."""
    names = tuple(cell_text(c).strip().lower() for c in cells)
    for i, name in enumerate(names):
        if name and name in names[:i]:
            raise CellRef(source, line, name).error(
                "the column name appears twice", name, f"keep one column named '{name}'")
    return names


def _cell_value(cell: object) -> str:
    """The stripped text of one cell as a row holds it."""
    if isinstance(cell, str) and "\r" not in cell:  # plain text, as CSV cells mostly are
        return cell.strip()
    return clean_text(cell_text(cell))


def _row(source: str, line: int, names: tuple[str, ...], cells: Sequence[object],
         all_named: bool = False) -> Row:
    """Cells of one data row keyed by column name; stray cells are refused.
    ``all_named``: every column has a name (the caller checks it once per table)."""
    if all_named and len(cells) == len(names):  # the usual row: one cell under each name
        return Row(line, dict(zip(names, map(_cell_value, cells))))
    values = {name: "" for name in names if name}
    for i, cell in enumerate(cells):
        text = _cell_value(cell)
        if i < len(names) and names[i]:
            values[names[i]] = text
        elif text:
            column = f"#{i + 1}"
            raise CellRef(source, line, column).error(
                "a value stands in a column without a name", text,
                "give the column a name in the header row, or remove the value "
                "(text containing commas must be quoted)")
    return Row(line, values)


def table_from_grid(source: str, lines: Iterable[tuple[int, Sequence[object]]]) -> Table:
    """Build a table from (row number, cells) pairs: the first non-blank row is the header.

    Blank rows are skipped but keep their row numbers; a grid without any non-blank row
    gives an empty table (no columns).

    A row of text cells (every CSV row) is looked at once as one joined text: blank when
    that is only white space, and, without a carriage return in it and with one cell under
    each named column, its cells are simply stripped (what :func:`_cell_value` does to such
    a cell). Other rows (sheet cells holding numbers or dates) take :func:`_row`.
    """
    header_line, names, rows, all_named, width = None, (), [], False, -1
    strip, append = str.strip, rows.append
    for line, cells in lines:
        try:
            joined = "".join(cells)
        except TypeError:  # not all text: a sheet row
            joined = None
        if joined is not None and "\r" not in joined and len(cells) == width:
            if joined.strip():
                append(Row(line, dict(zip(names, map(strip, cells)))))
            continue
        if (not joined.strip()) if joined is not None else _is_blank(cells):
            continue
        if header_line is None:
            header_line, names = line, column_names(source, line, cells)
            all_named = all(names)
            width = len(names) if all_named else -1
        else:
            append(_row(source, line, names, cells, all_named))
    columns = tuple(n for n in names if n)
    return Table(source, columns, tuple(rows), header_line)


def table_from_records(source: str, records: object) -> Table:
    """Build a table from a JSON list of objects; row numbers are 1-based list positions."""
    if not isinstance(records, list):
        raise CellRef(source).error("expected a list of objects", type(records).__name__,
                                  'write a list: [{"id": "A", ...}, ...]')
    columns: dict[str, None] = {}
    keyed = []
    for number, record in enumerate(records, start=1):
        if not isinstance(record, dict):
            raise CellRef(source, number).error("expected an object", record,
                                              'write each item as {"column": value, ...}')
        for key in getattr(record, "repeated", ()):
            raise CellRef(source, number, key.strip().lower()).error(
                "the key appears twice in one object", key, "keep one of them")
        item = {}
        spelt: dict[str, str] = {}
        for key, value in record.items():
            name = key.strip().lower()
            if name in spelt:
                raise CellRef(source, number, name).error(
                    f"the keys '{spelt[name]}' and '{key}' name the same column (case and "
                    "spaces around a name do not count)", key, f"keep one key named '{name}'")
            spelt[name] = key
            if isinstance(value, (list, dict)):
                raise CellRef(source, number, name).error(
                    "expected a single value", value, "write text, a number or null")
            item[name] = clean_text(cell_text(value))
            columns.setdefault(name)
        keyed.append((number, item))
    names = tuple(columns)
    rows = tuple(Row(n, {c: item.get(c, "") for c in names}) for n, item in keyed)
    return Table(source, names, rows, header_line=None)
