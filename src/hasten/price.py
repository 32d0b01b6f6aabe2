"""Pricing a proposal: what a given set of shortenings buys, what it costs, and what it wastes.

A proposal (from a contractor, a trade, a colleague) lists activities with the working days
to take off each (``shortened_by``) or a discrete option to use (``option``, a name from
options.csv; with ``shortened_by`` too, the option shortened to that many days below the
normal duration), and optionally what the proposer asks for each line (``cost``).

:func:`price_proposal` checks every line against the activity's limits, applies the lines,
schedules the result and answers:

- the finish the proposal actually achieves (scheduling decides, not the sum of the days:
  lines off the critical path buy nothing, and with SS/FF/SF links a shorter activity can even
  delay the job);
- its cost by the project's crash costs (and by the asked costs where given);
- the least-cost plan for that same finish, and the difference (``excess``: money wasted);
- the lines that buy no time: lines whose removal alone does not make the finish later,
  found by scheduling the proposal without each line in turn (a pair of lines that only
  together buy a day is kept: removing either alone makes the finish later);
- the leanest part of the proposal: the least-cost plan that uses only the proposal's lines,
  up to their amounts, and reaches the same finish (the crash model with each activity's
  shortening bounded by the proposal, :func:`hasten.accelerated.limited`);
- the activities the least-cost plan shortens more than the proposal does (what it missed).

Examples
--------
>>> import hasten
>>> from hasten.price import ProposalLine, price_proposal
>>> p = hasten.read_project("cases/riverside-culvert")
>>> priced = price_proposal(p, [ProposalLine("A310", 2), ProposalLine("A030", 1)])
>>> priced.finish, priced.no_effect
(125, ('A030',))
>>> price_proposal(p, [ProposalLine("A999", 1)])
Traceback (most recent call last):
...
hasten.errors.InputError: row 2, column 'id': no activity has this id (value: 'A999'). Fix: ...
"""

from __future__ import annotations

import csv
import math
import os
import re
from dataclasses import dataclass
from datetime import date
from pathlib import Path
from typing import Iterable, Sequence

from .accelerated import limited
from .errors import InputError
from .planner import Planner
from .progress import DONE, STARTED
from .project import Project
from .results import Plan

__all__ = ["ProposalLine", "LinePrice", "Missed", "PricedProposal", "read_proposal", "proposal_lines",
           "price_proposal"]

COLUMNS = ("id", "shortened_by", "option", "cost")


@dataclass(frozen=True)
class ProposalLine:
    """One line of a proposal: an activity, the working days to take off it or an option to
    use (or both: the option shortened to ``shortened_by`` days below the normal duration),
    and what the proposer asks for it."""

    id: str
    shortened_by: int | None = None
    option: str = ""
    cost: float | None = None
    row: int | None = None  # where it was read: the spreadsheet row (header row 1)


@dataclass(frozen=True)
class LinePrice:
    """A line of the proposal as priced."""

    id: str
    name: str
    trade: str
    shortened_by: int  # working days taken off what is left of the activity
    option: str
    option_note: str
    added_cost: float  # by the project's crash costs
    asked_cost: float | None
    finish_without: int  # the finish with this line alone taken out

    def buys(self, finish: int) -> int:
        """Working days this line alone buys (0: none; negative: taking it out finishes sooner)."""
        return self.finish_without - finish


@dataclass(frozen=True)
class Missed:
    """An activity the least-cost plan for the same finish shortens more than the proposal."""

    id: str
    name: str
    trade: str
    proposed: int  # days the proposal takes off it
    shortened_by: int  # days the least-cost plan takes off it
    option: str
    added_cost: float  # its added cost in the least-cost plan


@dataclass(frozen=True)
class PricedProposal:
    """A proposal priced against the project's crash costs and the least-cost plan."""

    project: Project
    source: str  # the proposal file, or "" when given in code
    lines: tuple[LinePrice, ...]
    plan: Plan  # the proposal applied: its schedule, cost and cautions (target = its finish)
    least_cost_plan: Plan  # the least-cost plan for the same finish
    leanest: Plan  # the least-cost plan using only the proposal's lines, up to their amounts
    asked_cost: float | None  # the sum of the asked costs; None when the proposal asks none
    missed: tuple[Missed, ...]
    notes: tuple[str, ...] = ()

    @property
    def finish(self) -> int:
        return self.plan.finish

    @property
    def finish_date(self) -> date:
        return self.plan.finish_date

    @property
    def proposal_cost(self) -> float:
        """The proposal's added direct cost by the project's crash costs."""
        return self.plan.added_cost

    @property
    def least_cost(self) -> float:
        return self.least_cost_plan.added_cost

    @property
    def excess(self) -> float:
        """Money wasted: the proposal's added cost (and milestone damages) less the least-cost
        plan's for the same finish."""
        return (self.plan.added_cost + self.plan.milestone_damages
                - self.least_cost_plan.added_cost - self.least_cost_plan.milestone_damages)

    @property
    def asked_excess(self) -> float | None:
        """The asked cost (and milestone damages) less the least-cost plan's, when asked."""
        if self.asked_cost is None:
            return None
        return (self.asked_cost + self.plan.milestone_damages
                - self.least_cost_plan.added_cost - self.least_cost_plan.milestone_damages)

    @property
    def no_effect(self) -> tuple[str, ...]:
        """Ids of the lines whose removal alone does not make the finish later."""
        return tuple(line.id for line in self.lines if line.buys(self.finish) <= 0)


# -- reading ------------------------------------------------------------------------------
_WHOLE = re.compile(r"^[+-]?\d+$")
_MONEY = re.compile(r"^[+-]?(\d+(\.\d*)?|\.\d+)$")


def proposal_lines(rows: Iterable[dict], file: str = "") -> list[ProposalLine]:
    """Proposal lines from rows of text (``csv.DictReader`` rows: keys are the column
    titles), the first data row being spreadsheet row 2; empty rows are skipped."""
    out = []
    rows = list(rows)
    titles = {str(k).strip().lower() for r in rows[:1] for k in r if k is not None}
    if rows and "id" not in titles:
        raise InputError("the proposal has no 'id' column", file=file, row=1,
                         fix="name the columns id, shortened_by (working days) or option, and cost (optional)")
    if rows and not {"shortened_by", "option"} & titles:
        raise InputError("the proposal has neither a 'shortened_by' nor an 'option' column", file=file, row=1,
                         fix="add shortened_by (working days to take off) or option (a name from options.csv)")
    for k, raw in enumerate(rows, start=2):
        r = {str(key).strip().lower(): ("" if v is None else str(v).strip()) for key, v in raw.items() if key is not None}
        if not any(r.get(c, "") for c in COLUMNS):
            continue
        ident = r.get("id", "")
        if not ident:
            raise InputError("the id is empty", file=file, row=k, column="id", fix="give the activity's id")
        days = r.get("shortened_by", "")
        if days and not _WHOLE.match(days):
            raise InputError("shortened_by is not a whole number of working days", file=file, row=k,
                             column="shortened_by", value=days, fix="write whole working days, e.g. 2")
        cost = r.get("cost", "")
        if cost and not _MONEY.match(cost):
            raise InputError("the cost is not a plain number", file=file, row=k, column="cost", value=cost,
                             fix="write the amount without separators or currency, e.g. 12500")
        option = r.get("option", "")
        if not days and not option:
            raise InputError(f"the line for {ident} gives neither shortened_by nor an option", file=file,
                             row=k, column="shortened_by",
                             fix="give the working days to take off, or an option name from options.csv")
        out.append(ProposalLine(ident, int(days) if days else None, option, float(cost) if cost else None, k))
    return out


def read_proposal(path: str | os.PathLike[str]) -> list[ProposalLine]:
    """Read a proposal CSV (UTF-8, with or without a byte-order mark): columns ``id``,
    ``shortened_by`` and/or ``option``, optionally ``cost``; other columns are ignored."""
    path = Path(path)
    if path.suffix.lower() != ".csv":
        raise InputError("a proposal is read from a .csv file", file=str(path), value=path.suffix,
                         fix="save the proposal as CSV with columns id, shortened_by or option, cost")
    try:
        with open(path, newline="", encoding="utf-8-sig") as f:
            return proposal_lines(csv.DictReader(f), str(path))
    except FileNotFoundError:
        raise InputError("not found", file=str(path), fix="check the path of the proposal") from None
    except UnicodeDecodeError:
        raise InputError("the file is not UTF-8 text", file=str(path), fix="save it as CSV UTF-8") from None


# -- checking and applying ----------------------------------------------------------------
def _resolve(planner: Planner, lines: Sequence[ProposalLine], file: str):
    """(index, new duration, option index or -1) of each line, checked against the limits."""
    net = planner.network
    states = net.progress.activities
    seen: dict[str, int | None] = {}
    out = []
    for k, line in enumerate(lines):
        row = line.row if line.row is not None else k + 2
        i = net.index.get(line.id)

        def bad(problem: str, column: str, value, fix: str) -> InputError:
            return InputError(problem, file=file or None, row=row, column=column, value=value, fix=fix)

        if i is None:
            raise bad("no activity has this id", "id", line.id, "use an id from the project's activities")
        if line.id in seen:
            raise bad(f"{line.id} is proposed twice (rows {seen[line.id]} and {row})", "id", line.id,
                      "give one line per activity")
        seen[line.id] = row
        if line.cost is not None and not math.isfinite(line.cost):
            raise bad("the cost is not a number", "cost", line.cost, "write the amount asked, e.g. 12500")
        state = states[i].state
        if state == DONE:
            raise bad(f"{line.id} is finished at the data date and cannot be shortened", "id", line.id,
                      "leave finished work out of the proposal")
        normal = net.durations[i]
        left = "working days left" if state == STARTED else "working days"
        if line.option:
            names = [o.name for o in net.options[i]]
            if line.option not in names:
                what = ", ".join(f"'{n}'" for n in names) if names else "none"
                fix = ("write one of the activity's options" if names else
                       "give shortened_by instead, or add the option to options.csv")
                if state == STARTED:
                    fix = "a started activity cannot change its way of working; give shortened_by"
                raise bad(f"{line.id} has no option '{line.option}' (its options: {what})", "option",
                          line.option, fix)
            c = names.index(line.option)
            way = net.options[i][c]
            d = way.duration if line.shortened_by is None else normal - line.shortened_by
            if not way.shortest <= d <= way.duration:
                lo, hi = normal - way.duration, normal - way.shortest
                raise bad(f"with option '{way.name}' {line.id} can be shortened by {lo} to {hi} working days",
                          "shortened_by", line.shortened_by, f"write a number from {lo} to {hi}, or leave it "
                          "empty for the option's own duration")
            out.append((i, d, c))
            continue
        room = sum(s.days for s in net.steps[i])
        if not 0 <= line.shortened_by <= room:
            raise bad(f"{line.id} can be shortened by at most {room} {left} (normal {normal}, "
                      f"shortest {normal - room})", "shortened_by", line.shortened_by,
                      f"write a whole number from 0 to {room}")
        out.append((i, normal - line.shortened_by, -1))
    asked = [line.cost is not None for line in lines]
    if any(asked) and not all(asked):
        k = asked.index(False)
        raise InputError("some lines give a cost and this one does not", file=file or None,
                         row=lines[k].row if lines[k].row is not None else k + 2, column="cost",
                         fix="give what is asked on every line, or on none")
    return out


def price_proposal(project: Project, lines: Sequence[ProposalLine], source: str = "", *,
                   time_limit: float | None = None) -> PricedProposal:
    """Price a proposal (see the module notes). Raises :class:`InputError` naming the row,
    column, value and fix for a line outside an activity's limits."""
    lines = list(lines)
    if not lines:
        raise InputError("the proposal has no lines", file=source or None,
                         fix="list the activities to shorten: id, shortened_by or option, cost")
    raw = Planner(project, keep_dominated=True, time_limit=time_limit)  # every option can be proposed
    net = raw.network
    resolved = _resolve(raw, lines, source)
    durations, choices = list(net.durations), [-1] * len(net.durations)
    for i, d, c in resolved:
        durations[i], choices[i] = d, c
    proposal = raw.evaluate(durations, choices)
    changes = {a.id: a for a in proposal.activities}
    priced = []
    for line, (i, d, c) in zip(lines, resolved):
        without, ways = list(durations), list(choices)
        without[i], ways[i] = net.durations[i], -1
        finish_without = net.finish_of(net.forward(without), without)  # by scheduling
        a = changes[line.id]
        priced.append(LinePrice(a.id, a.name, a.trade, a.shortened_by, a.option, a.option_note, a.added_cost,
                                line.cost, finish_without))
    planner = Planner(project, time_limit=time_limit)
    least = planner.plan(proposal.finish)
    limits = {net.ids[i]: (net.durations[i] - d, net.options[i][c].name if c >= 0 else "") for i, d, c in resolved}
    leanest = Planner(limited(project, limits), time_limit=time_limit).plan(proposal.finish)
    proposed = {a.id: a for a in proposal.changed}
    missed = []
    for a in least.changed:
        p = proposed.get(a.id)
        if p is None or a.shortened_by > p.shortened_by or (a.option and a.option != p.option):
            missed.append(Missed(a.id, a.name, a.trade, 0 if p is None else p.shortened_by, a.shortened_by,
                                 a.option, a.added_cost))
    asked = None if lines[0].cost is None else sum(line.cost for line in lines)
    return PricedProposal(project, source, tuple(priced), proposal, least, leanest, asked, tuple(missed),
                          tuple(planner.notes))
