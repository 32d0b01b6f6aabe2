"""Importers for research benchmark instances: PSPLIB ``.mm`` / ``.sm`` and Patterson ``.rcp``.

Sources of the formats:

* PSPLIB: R. Kolisch and A. Sprecher, "PSPLIB - A project scheduling problem library",
  European Journal of Operational Research 96(1):205-216, 1997. ``.sm`` files hold
  single-mode instances, ``.mm`` files multi-mode instances (each job has several modes,
  each with its own duration and resource amounts).
* The Patterson format (``.rcp``): J.H. Patterson, "A comparison of exact approaches for
  solving the multiple constrained resource, project scheduling problem", Management
  Science 30(7):854-867, 1984 (volume and pages from memory); also the output format of
  the RanGen network generator (E. Demeulemeester, M. Vanhoucke and W. Herroelen, "A random
  network generator for activity-on-the-node networks", Journal of Scheduling 6:13-34,
  2003), used for the RG30 set (M. Vanhoucke, J. Coelho, D. Debels, B. Maenhout and
  L.V. Tavares, "An evaluation of the adequacy of project network generators with
  systematically sampled networks", European Journal of Operational Research
  187(2):511-524, 2008; pages from memory).

What an instance becomes:

* Jobs become activities with ids ``J1``, ``J2``, ... (the job numbers) and names
  ``job 1``, ``job 2``, ...; the dummy supersource and supersink (duration 0) become
  milestones. Each successor gives a finish-to-start link with lag 0. Links are ordered by
  successor, then predecessor (so that a written project lists them in the predecessors
  column).
* Renewable resources (and PSPLIB's doubly constrained ones) are ignored: hasten schedules
  without resource limits, so resource availabilities and renewable amounts are read only
  to check the file's layout.
* ``.sm`` and ``.rcp``: one duration per job, cost 0, no shortening.
* ``.mm``: a mode's cost is the sum of its nonrenewable resource amounts (N1 + N2 + ...).
  The normal way of a job is its mode with the longest duration (ties: the lowest cost,
  then the lowest mode number); the activity's ``cost`` is that mode's cost. Every other
  mode becomes an :class:`~hasten.project.Option` named ``mode M`` with its duration and
  ``added_cost = cost of mode M - cost of the normal mode`` (negative when the faster mode
  uses fewer nonrenewable units). Modes equal to the normal one in duration and cost are
  left out, as are other modes of a job whose longest mode lasts 0 periods (a milestone
  has no other way of being done). Dominated modes are kept;
  :func:`hasten.dominated.drop_dominated` removes them before optimising.
* The project is named after the file (``j102_2 (PSPLIB multi-mode)``), starts on
  2027-01-04 and uses the ``all-days`` calendar: the instances count periods, not working
  days, so every day is a period. The currency is empty (costs are resource units).

The file formats are read by :mod:`hasten.formats.psplib` and
:mod:`hasten.formats.patterson`, line by line (:mod:`hasten.formats.research_lines`).
A malformed file raises :class:`~hasten.errors.InputError` naming the file, the line
(``row`` is the 1-based line number), what was expected there and the fix; a loop in the
successor lists raises :class:`~hasten.errors.CycleError`.
"""

from __future__ import annotations

import os
from datetime import date
from pathlib import Path

from hasten.errors import CycleError, InputError
from hasten.formats.cells import CellRef, one_line_errors
from hasten.formats.patterson import RCP_FIX, read_patterson
from hasten.formats.psplib import PSPLIB_FIX, read_psplib
from hasten.formats.reach import check_reach
from hasten.formats.research_lines import Lines, decode
from hasten.formats.settings import NAMED_CALENDARS
from hasten.project import Calendar, Link, Project

__all__ = ["read_research", "RESEARCH_SUFFIXES", "RESEARCH_START"]

RESEARCH_SUFFIXES = (".mm", ".sm", ".rcp")
RESEARCH_START = date(2027, 1, 4)
_KINDS = {".mm": "PSPLIB multi-mode", ".sm": "PSPLIB single-mode", ".rcp": "Patterson format"}


def _links(successors: dict[int, tuple[int, ...]], path: Path) -> tuple[Link, ...]:
    """Finish-to-start links ordered by successor, then predecessor; loops are refused,
    naming the jobs around the loop in order (:func:`hasten.graph.find_cycle`)."""
    from hasten.graph import find_cycle  # numpy: imported on use, as in formats.links

    pairs = sorted(((p, s) for p, succ in successors.items() for s in succ), key=lambda e: (e[1], e[0]))
    loop = find_cycle(len(successors) + 1, [p for p, _ in pairs], [s for _, s in pairs])
    if loop is not None:
        raise CycleError([f"J{pairs[e][0]}" for e in loop], file=str(path))
    return tuple(Link(f"J{p}", f"J{s}") for p, s in pairs)


@one_line_errors
def read_research(path: str | os.PathLike[str]) -> Project:
    """Read a PSPLIB ``.mm`` / ``.sm`` or Patterson ``.rcp`` instance as a Project.

    The file is only read, never changed. Raises InputError for a malformed file or an
    unknown suffix (see the module text for what the instance becomes).
    """
    path = Path(path)
    suffix = path.suffix.lower()
    if suffix not in RESEARCH_SUFFIXES:
        raise InputError("unknown research instance format", file=str(path), value=path.suffix,
                         fix="import a PSPLIB .mm or .sm file or a Patterson-format .rcp file")
    if path.is_dir():
        raise InputError("this is a folder, not a file", file=str(path),
                         fix="give the path of the instance file itself")
    if not path.is_file():
        raise InputError("not found", file=str(path), fix="check the path")
    text = decode(path)
    if suffix == ".rcp":
        activities, successors, lines = read_patterson(Lines(path, text, RCP_FIX))
    else:
        activities, successors, lines = read_psplib(Lines(path, text, PSPLIB_FIX),
                                                multi=suffix == ".mm")
    project = Project(
        name=f"{path.stem} ({_KINDS[suffix]})",
        start=RESEARCH_START,
        activities=tuple(activities),
        links=_links(successors, path),
        calendar=Calendar(NAMED_CALENDARS["all-days"], (), "all-days"),
        currency="",
    )
    check_reach(project, lambda: ({ident: CellRef(str(path), line) for ident, line in lines.items()},
                                  [CellRef(str(path))] * len(project.links)),
                lambda key: CellRef(str(path)))
    return project

