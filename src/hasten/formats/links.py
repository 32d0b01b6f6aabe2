"""The links of a project: the ``predecessors`` column, the links table, and their checks.

Links may be written in the activities' ``predecessors`` column (the shorthand of
:mod:`hasten.formats.predecessors`), one per row in the links table, or both. Every link
must join two different, known activities; a link (same predecessor, successor and type)
given twice is refused, naming both places; a loop is refused naming the ids around it in
order (:func:`hasten.graph.find_cycle`, the one cycle finder of the package).
"""

from __future__ import annotations

from collections.abc import Sequence
from operator import lt
from typing import NamedTuple

from hasten.errors import CycleError
from hasten.formats.cells import CellRef, id_key, id_value, whole_value
from hasten.formats.columns import (LINK_COLUMNS, LINK_REQUIRED, cell_ref, check_columns,
                                    optional, place, required, unknown_id)
from hasten.formats.predecessors import COLUMN as PREDECESSORS, link_type, parse_predecessor_items
from hasten.formats.tables import Table
from hasten.project import Link, LinkType

__all__ = ["LinkSpec", "column_links", "table_links", "resolve_links", "check_acyclic"]


class LinkSpec(NamedTuple):
    """A link and the cells that gave it (the successor's cell only for the links table);
    a named tuple, as one is made per link."""

    link: Link
    where: CellRef
    text: str
    pred_text: str
    succ_where: CellRef | None = None


def _lag(text: str, where: CellRef) -> int:
    """A lag in whole working days; negative is a lead."""
    return whole_value(text, where, minimum=None)


def column_links(table: Table) -> list[LinkSpec]:
    """Links written in the predecessors column, in row order."""
    specs = []
    for row in table.rows:
        text = row.cells.get(PREDECESSORS)
        if not text:  # no predecessors: nothing to read
            continue
        where = CellRef(table.source, row.line, PREDECESSORS)
        succ = id_key(row.cells["id"])
        for item, (pred, kind, lag) in parse_predecessor_items(text, where):
            specs.append(LinkSpec(Link(pred, succ, kind, lag), where, item, item))
    return specs


def table_links(table: Table | None) -> list[LinkSpec]:
    """Links written one per row in the links table."""
    if table is None or not table.rows:
        return []
    check_columns(table, LINK_COLUMNS, LINK_REQUIRED)
    specs = []
    for row in table.rows:
        pred = required(row, table, "predecessor", id_value, "the predecessor's id")
        succ = required(row, table, "successor", id_value, "the successor's id")
        kind = optional(row, table, "type", link_type, LinkType.FS)
        lag = optional(row, table, "lag", _lag, 0)
        link = Link(pred, succ, kind, lag)
        specs.append(LinkSpec(link, cell_ref(row, table, "predecessor"), link.text(), pred,
                              cell_ref(row, table, "successor")))
    return specs


def resolve_links(specs: list[LinkSpec], ids: Sequence[str]) -> dict[tuple, LinkSpec]:
    """Check ids, self-links and duplicates; the result keeps the given order."""
    known = set(ids)
    keys = [(spec.link.pred, spec.link.succ, spec.link.type) for spec in specs]
    if (known.issuperset(key[0] for key in keys) and known.issuperset(key[1] for key in keys)
            and all(key[0] != key[1] for key in keys) and len(set(keys)) == len(keys)):
        return dict(zip(keys, specs))  # every id known, no self-link, no link twice
    seen: dict[tuple, LinkSpec] = {}
    for spec in specs:
        link = spec.link
        if link.pred not in known:
            raise unknown_id(link.pred, ids, spec.where, spec.pred_text, "predecessor")
        if link.succ not in known:
            raise unknown_id(link.succ, ids, spec.succ_where, link.succ, "successor")
        if link.pred == link.succ:
            raise spec.where.error(f"activity '{link.pred}' is linked to itself", spec.text,
                                   "remove this link; an activity cannot be its own predecessor")
        key = (link.pred, link.succ, link.type)
        if key in seen:
            first = seen[key].where
            raise spec.where.error(
                f"the link {link.pred} -> {link.succ} ({link.type.value}) is given twice: "
                f"{place(first)} column '{first.column}' and here", spec.text,
                "keep one of them (change the lag there if needed)")
        seen[key] = spec
    return seen


def check_acyclic(links: dict[tuple, LinkSpec], ids: Sequence[str]) -> tuple[list[int], list[int]]:
    """Refuse loops in the link graph, naming the ids around the loop in order; return the
    positions in ``ids`` of each link's predecessor and successor (for
    :func:`hasten.formats.reach.check_reach`).

    When every link goes from an activity to one further down the table there can be no
    loop (a loop would have to lead back up), which is how most schedules are written and
    is checked far faster than sorting the graph; otherwise :func:`hasten.graph.find_cycle`
    decides.
    """
    position = {ident: i for i, ident in enumerate(ids)}
    pred = [position[p] for p, _, _ in links]
    succ = [position[s] for _, s, _ in links]
    if all(map(lt, pred, succ)):
        return pred, succ
    from hasten.graph import find_cycle  # numpy: imported only when a link points up

    loop = find_cycle(len(ids), pred, succ)
    if loop is None:
        return pred, succ
    specs = list(links.values())
    files = dict.fromkeys(specs[e].where.file for e in loop)
    raise CycleError([specs[e].link.pred for e in loop], file=" and ".join(files))
