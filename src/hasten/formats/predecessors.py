"""The predecessor shorthand of the activities table: ``B; C:SS+2; D:FF-1``.

Items are separated by ``;``. Each item is ``ID`` (finish-to-start, lag 0), ``ID:TYPE`` or
``ID:TYPE+LAG`` / ``ID:TYPE-LAG`` with TYPE one of FS, SS, FF, SF (any case) and LAG a
whole number of working days (a negative lag is a lead). Spaces around the parts are allowed.
"""

from __future__ import annotations

import re

from hasten.errors import InputError
from hasten.formats.cells import WHOLE_LIMIT, CellRef, id_value, one_line_errors, shortened
from hasten.project import LinkType

__all__ = ["parse_predecessors", "parse_predecessor_items", "known_type_and_lag", "link_type",
           "LINK_TYPE_FIX", "KNOWN_TYPES_AND_LAGS"]

_TYPE_AND_LAG = re.compile(r"\s*([A-Za-z]+)\s*(?:([+-])\s*(\S.*?))?\s*")
_WHOLE = re.compile(r"\d+")
LINK_TYPE_FIX = "use FS, SS, FF or SF"
COLUMN = "predecessors"
_LINK_TYPES = {kind.value: kind for kind in LinkType}  # a dict look-up is quicker than LinkType()


def link_type(text: str, where: CellRef, shown: str | None = None) -> LinkType:
    """A link type from its two letters in any case; ``shown`` is the value to name on error."""
    kind = _LINK_TYPES.get(text.strip().upper())
    if kind is None:
        raise where.error("unknown link type", text if shown is None else shown, LINK_TYPE_FIX)
    return kind


def _type_and_lag(text: str, item: str, where: CellRef) -> tuple[LinkType, int]:
    """Parse ``SS+2`` (the part after the colon)."""
    match = _TYPE_AND_LAG.fullmatch(text)
    if not match:
        raise where.error("cannot read the link type and lag", shortened(item),
                          f"write ID:TYPE+LAG, e.g. 'A:SS+2'; {LINK_TYPE_FIX}")
    kind = link_type(match.group(1), where, item)
    sign, lag = match.group(2), match.group(3)
    if sign is None:
        return kind, 0
    if not _WHOLE.fullmatch(lag):
        raise where.error("the lag is not a whole number of working days", shortened(item),
                          f"write the lag as whole days after + or -, e.g. "
                          f"'{item.split(':')[0].strip()}:{kind.value}+2'")
    # the length first: Python refuses to turn text of thousands of digits into a number
    days = int(lag) if len(lag) <= 9 else WHOLE_LIMIT + 1
    if days > WHOLE_LIMIT:
        raise where.error(f"the lag is more than {WHOLE_LIMIT:,} working days", shortened(item),
                          f"write a lag of up to {WHOLE_LIMIT:,} working days")
    return kind, days if sign == "+" else -days


#: type-and-lag texts already read (``"SS+2"``), a few distinct ones in any project;
#: only texts that read without error are kept
_known: dict[str, tuple[LinkType, int]] = {}
KNOWN_TYPES_AND_LAGS = _known  # to look up before calling known_type_and_lag (read only)


def known_type_and_lag(text: str) -> tuple[LinkType, int] | None:
    """The type and lag of ``text`` (the part after the colon, ``SS+2``), or ``None`` when
    it does not read (:func:`parse_predecessor_items` then says why)."""
    found = _known.get(text)
    if found is None:
        try:
            found = _type_and_lag(text, text, CellRef(None))
        except InputError:
            return None
        if len(_known) < 1024:
            _known[text] = found
    return found


def parse_predecessor_items(text: str, where: CellRef) -> list[tuple[str, tuple[str, LinkType, int]]]:
    """Each non-empty item as (item text, (predecessor id, type, lag))."""
    found = []
    for raw in text.split(";"):
        item = raw.strip()
        if not item:
            continue
        ident, colon, rest = item.partition(":")
        ident = ident.strip()
        if not ident:
            raise where.error("a predecessor has no id", item,
                              "write the predecessor's id before the colon, e.g. 'A:SS+2'")
        if not (ident.isascii() and ident.isprintable()):
            ident = id_value(ident, where)
        if not colon:
            kind, lag = LinkType.FS, 0
        else:
            kind, lag = _known.get(rest) or _type_and_lag(rest, item, where)
            if len(_known) < 1024:
                _known[rest] = (kind, lag)
        found.append((item, (ident, kind, lag)))
    return found


@one_line_errors
def parse_predecessors(text: str, *, file: str | None = None,
                       row: int | None = None) -> list[tuple[str, LinkType, int]]:
    """Parse the shorthand into (predecessor id, link type, lag) triples, in order.

    Pure: it does not check that the ids exist. ``file`` and ``row`` only locate errors.
    """
    return [triple for _, triple in parse_predecessor_items(text, CellRef(file, row, COLUMN))]
