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

A malformed file raises :class:`~hasten.errors.InputError` naming the file, the line
(``row`` is the 1-based line number), what was expected there and the fix; a loop in the
successor lists raises :class:`~hasten.errors.CycleError`.
"""

from __future__ import annotations

import os
import re
from dataclasses import dataclass
from datetime import date
from pathlib import Path

from hasten.errors import CycleError, InputError
from hasten.formats.settings import NAMED_CALENDARS
from hasten.project import Activity, Calendar, Link, Option, Project

__all__ = ["read_research", "RESEARCH_SUFFIXES", "RESEARCH_START"]

RESEARCH_SUFFIXES = (".mm", ".sm", ".rcp")
RESEARCH_START = date(2027, 1, 4)
_KINDS = {".mm": "PSPLIB multi-mode", ".sm": "PSPLIB single-mode", ".rcp": "Patterson format"}
_PSPLIB_FIX = ("use an unchanged PSPLIB file; its layout is described in Kolisch & Sprecher "
               "(1997) and on the PSPLIB pages")
_RCP_FIX = ("use an unchanged Patterson-format file: line 1 'activities resources', line 2 "
            "the resource availabilities, then one line per activity: duration, one amount "
            "per resource, number of successors, the successors")
_INTEGER = re.compile(r"[+-]?\d+")
_STARS = re.compile(r"\*+")
_JOBS = re.compile(r"jobs\s*\(incl\.[^)]*\)\s*:\s*(\S+)", re.IGNORECASE)
_RESOURCE_COUNT = re.compile(r"-\s*(renewable|nonrenewable|doubly constrained)\s*:\s*(\S+)",
                             re.IGNORECASE)
_RESOURCE_COLUMN = re.compile(r"\b([RND])\s*(\d+)\b", re.IGNORECASE)


@dataclass(frozen=True)
class _Mode:
    number: int
    duration: int
    cost: int  # sum of the nonrenewable amounts
    amounts: tuple[int, ...]  # the nonrenewable amounts, for the note


@dataclass
class _Job:
    number: int
    modes_declared: int
    successors: tuple[int, ...]
    line: int
    modes: list[_Mode]


class _Lines:
    """The file's lines with 1-based numbers, and located errors."""

    def __init__(self, path: Path, text: str, fix: str):
        self.path = path
        self.lines = text.splitlines()
        self.fix = fix

    def error(self, problem: str, line: int | None = None, column: str | None = None,
              value: object = None, fix: str | None = None) -> InputError:
        return InputError(problem, file=str(self.path), row=line, column=column, value=value,
                          fix=fix or self.fix)

    def text(self, line: int) -> str:
        return self.lines[line - 1]

    def integers(self, line: int, names: list[str], minimum: int | None = 0) -> list[int]:
        """The whitespace-separated integers of a line; ``names`` names each position
        (the last name repeats) for the error message."""
        out = []
        for k, token in enumerate(self.text(line).split()):
            name = names[min(k, len(names) - 1)]
            if not _INTEGER.fullmatch(token):
                raise self.error(f"expected a whole number ({name})", line, name, token)
            number = int(token)
            if minimum is not None and number < minimum:
                raise self.error(f"expected a whole number of at least {minimum} ({name})",
                                 line, name, token)
            out.append(number)
        return out


def _decode(path: Path) -> str:
    try:
        return path.read_bytes().decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise InputError("the file is not plain text (UTF-8 or ASCII)", file=str(path),
                         value=f"byte {exc.start}", fix="use the instance file as published "
                         "(plain ASCII text)") from None
    except OSError as exc:
        raise InputError(f"cannot read the file: {exc.strerror or exc}", file=str(path),
                         fix="check the path and the file permissions") from None


# ---------------------------------------------------------------- PSPLIB (.mm, .sm)

def _find(lines: _Lines, title: str, start: int = 1) -> int:
    """The line number of the first line from ``start`` that starts with ``title``."""
    for n in range(start, len(lines.lines) + 1):
        if lines.text(n).strip().upper().startswith(title):
            return n
    raise lines.error(f"the section '{title}' is missing", None, None, None,
                      f"{_PSPLIB_FIX}; every PSPLIB file has a line starting with '{title}'")


def _section(lines: _Lines, title_line: int, header: str, title: str) -> list[int]:
    """Numbers of the data lines of a section: after its column header (and a dashed rule)
    up to a line of stars or the end of the file; blank lines are skipped."""
    n = title_line + 1
    while n <= len(lines.lines) and not lines.text(n).strip():
        n += 1
    if n > len(lines.lines) or not lines.text(n).strip().lower().startswith(header):
        shown = lines.text(n).strip() if n <= len(lines.lines) else "end of file"
        raise lines.error(f"expected the column header of {title} (starting '{header}')", n,
                          None, shown, _PSPLIB_FIX)
    n += 1
    data = []
    while n <= len(lines.lines):
        text = lines.text(n).strip()
        if _STARS.fullmatch(text):
            break
        if text and not re.fullmatch(r"-+", text):
            data.append(n)
        n += 1
    return data


def _job_count(lines: _Lines) -> int:
    for n in range(1, len(lines.lines) + 1):
        found = _JOBS.search(lines.text(n))
        if found:
            if not found.group(1).isdigit() or int(found.group(1)) < 1:
                raise lines.error("expected the number of jobs", n, "jobs", found.group(1))
            return int(found.group(1))
    raise lines.error("the line 'jobs (incl. supersource/sink ): N' is missing", None, None,
                      None, f"{_PSPLIB_FIX}; the number of jobs is needed to read the file")


def _resource_columns(lines: _Lines, header_line: int) -> list[str]:
    """The kind (R, N or D) of each resource column of REQUESTS/DURATIONS, checked against
    the resource counts in the file's header where they are given."""
    header = lines.text(header_line)
    after = re.split("duration", header, maxsplit=1, flags=re.IGNORECASE)
    kinds = [k.upper() for k, _ in _RESOURCE_COLUMN.findall(after[1] if len(after) > 1 else "")]
    counts = {}
    for n in range(1, header_line):
        found = _RESOURCE_COUNT.search(lines.text(n))
        if found:
            if not found.group(2).isdigit():
                raise lines.error("expected the number of resources", n, found.group(1),
                                  found.group(2))
            counts[{"renewable": "R", "nonrenewable": "N"}.get(found.group(1).lower(), "D")] = (
                int(found.group(2)), n)
    for kind, (count, n) in counts.items():
        if kinds.count(kind) != count:
            raise lines.error(
                f"line {n} announces {count} resources of kind {kind}, but the column header "
                f"of REQUESTS/DURATIONS has {kinds.count(kind)}", header_line, None,
                header.strip(), _PSPLIB_FIX)
    return kinds


def _precedence(lines: _Lines, jobs: int, single: bool) -> dict[int, _Job]:
    title = _find(lines, "PRECEDENCE RELATIONS")
    found: dict[int, _Job] = {}
    names = ["jobnr.", "#modes", "#successors", "successors"]
    for n in _section(lines, title, "jobnr", "PRECEDENCE RELATIONS"):
        values = lines.integers(n, names)
        if len(values) < 3:
            raise lines.error("expected: job number, number of modes, number of successors, "
                              "successors", n, None, lines.text(n).strip())
        job, modes, count, succ = values[0], values[1], values[2], tuple(values[3:])
        if not 1 <= job <= jobs:
            raise lines.error(f"expected a job number from 1 to {jobs}", n, "jobnr.", job)
        if job in found:
            raise lines.error(f"job {job} is listed twice (lines {found[job].line} and {n})", n,
                              "jobnr.", job)
        if modes < 1:
            raise lines.error("expected at least 1 mode", n, "#modes", modes)
        if single and modes != 1:
            raise lines.error("a single-mode (.sm) file has one mode per job", n, "#modes",
                              modes, "read a multi-mode instance from a .mm file")
        if len(succ) != count:
            raise lines.error(f"the line announces {count} successors but lists {len(succ)}",
                              n, "successors", lines.text(n).strip())
        for s in succ:
            if not 1 <= s <= jobs:
                raise lines.error(f"expected successor job numbers from 1 to {jobs}", n,
                                  "successors", s)
            if s == job:
                raise lines.error(f"job {job} is its own successor", n, "successors", s)
        if len(set(succ)) != len(succ):
            raise lines.error(f"job {job} lists a successor twice", n, "successors",
                              lines.text(n).strip())
        found[job] = _Job(job, modes, succ, n, [])
    missing = [j for j in range(1, jobs + 1) if j not in found]
    if missing:
        raise lines.error(f"job {missing[0]} is missing from PRECEDENCE RELATIONS "
                          f"({jobs} jobs announced)", title, None, None, _PSPLIB_FIX)
    return found


def _requests(lines: _Lines, jobs: dict[int, _Job]) -> None:
    title = _find(lines, "REQUESTS/DURATIONS")
    data = _section(lines, title, "jobnr", "REQUESTS/DURATIONS")
    header = title + 1
    while not lines.text(header).strip():
        header += 1
    kinds = _resource_columns(lines, header)
    nonrenewable = [k for k, kind in enumerate(kinds) if kind == "N"]
    width = len(kinds)
    names_first = ["jobnr.", "mode", "duration"] + [f"resource {k + 1}" for k in range(width)]
    names_more = names_first[1:]
    current: _Job | None = None
    for n in data:
        tokens = lines.text(n).split()
        if len(tokens) == 3 + width:
            values = lines.integers(n, names_first)
            job = values[0]
            if job not in jobs:
                raise lines.error(f"expected a job number from 1 to {len(jobs)}", n, "jobnr.", job)
            if jobs[job].modes:
                raise lines.error(f"the modes of job {job} are listed twice", n, "jobnr.", job)
            current = jobs[job]
            values = values[1:]
        elif len(tokens) == 2 + width and current is not None:
            values = lines.integers(n, names_more)
        else:
            expected = (f"{3 + width} numbers (job, mode, duration and {width} resource "
                        f"amounts)" if current is None else
                        f"{3 + width} numbers (job, mode, duration, {width} resource amounts) "
                        f"or {2 + width} (a further mode of job {current.number})")
            raise lines.error(f"expected {expected}, found {len(tokens)}", n, None,
                              lines.text(n).strip())
        mode, duration, amounts = values[0], values[1], values[2:]
        if mode != len(current.modes) + 1:
            raise lines.error(f"expected mode {len(current.modes) + 1} of job {current.number}",
                              n, "mode", mode)
        if mode > current.modes_declared:
            raise lines.error(f"job {current.number} has {current.modes_declared} modes "
                              f"(line {current.line}) but more are listed", n, "mode", mode)
        costs = tuple(amounts[k] for k in nonrenewable)
        current.modes.append(_Mode(mode, duration, sum(costs), costs))
    for job in jobs.values():
        if len(job.modes) != job.modes_declared:
            raise lines.error(f"job {job.number} has {job.modes_declared} modes (line {job.line}) "
                              f"but REQUESTS/DURATIONS lists {len(job.modes)}", title, None,
                              None, _PSPLIB_FIX)


def _note(job: _Job, mode: _Mode) -> str:
    amounts = ", ".join(f"N{k + 1} {a}" for k, a in enumerate(mode.amounts))
    return (f"PSPLIB mode {mode.number} of job {job.number}: {mode.duration} "
            f"period{'' if mode.duration == 1 else 's'}"
            + (f"; nonrenewable {amounts}" if amounts else ""))


def _psplib_activity(job: _Job, multi: bool) -> Activity:
    normal = max(job.modes, key=lambda m: (m.duration, -m.cost, -m.number))
    options = ()
    if multi and normal.duration > 0:
        options = tuple(
            Option(name=f"mode {m.number}", duration=m.duration,
                   added_cost=float(m.cost - normal.cost), note=_note(job, m))
            for m in job.modes
            if m is not normal and (m.duration, m.cost) != (normal.duration, normal.cost))
    return Activity(id=f"J{job.number}", duration=normal.duration, name=f"job {job.number}",
                    cost=float(normal.cost) if multi else 0.0, options=options)


def _psplib(lines: _Lines, multi: bool) -> tuple[list[Activity], dict[int, tuple[int, ...]]]:
    count = _job_count(lines)
    jobs = _precedence(lines, count, single=not multi)
    _requests(lines, jobs)
    ordered = [jobs[j] for j in range(1, count + 1)]
    return ([_psplib_activity(j, multi) for j in ordered],
            {j.number: j.successors for j in ordered})


# ---------------------------------------------------------------- Patterson (.rcp)

def _patterson(lines: _Lines) -> tuple[list[Activity], dict[int, tuple[int, ...]]]:
    numbered = [n for n in range(1, len(lines.lines) + 1) if lines.text(n).strip()]
    if not numbered:
        raise lines.error("the file is empty")
    first = numbered[0]
    head = lines.integers(first, ["activities", "resources"])
    if len(head) != 2 or head[0] < 1:
        raise lines.error("expected two numbers: the number of activities (at least 1) and "
                          "the number of resources", first, None, lines.text(first).strip())
    count, width = head
    if len(numbered) < 2:
        raise lines.error("expected the resource availabilities on the next line", first + 1)
    avail = numbered[1]
    if len(lines.integers(avail, ["availability"])) != width:
        raise lines.error(f"expected {width} resource availabilities (line {first})", avail,
                          None, lines.text(avail).strip())
    rows = numbered[2:]
    if len(rows) < count:
        raise lines.error(f"the file ends after {len(rows)} of the {count} activities that "
                          f"line {first} announces", len(lines.lines), None, None)
    if len(rows) > count:
        raise lines.error(f"more activity lines than the {count} that line {first} announces",
                          rows[count], None, lines.text(rows[count]).strip())
    names = ["duration"] + [f"resource {k + 1}" for k in range(width)] + ["#successors",
                                                                         "successors"]
    activities, successors = [], {}
    for job, n in enumerate(rows, start=1):
        values = lines.integers(n, names)
        if len(values) < width + 2:
            raise lines.error(f"expected the duration, {width} resource amounts and the number "
                              "of successors", n, None, lines.text(n).strip())
        duration, announced, succ = values[0], values[width + 1], tuple(values[width + 2:])
        if len(succ) != announced:
            raise lines.error(f"activity {job} announces {announced} successors but lists "
                              f"{len(succ)}", n, "successors", lines.text(n).strip())
        for s in succ:
            if not 1 <= s <= count:
                raise lines.error(f"expected successor numbers from 1 to {count}", n,
                                  "successors", s)
            if s == job:
                raise lines.error(f"activity {job} is its own successor", n, "successors", s)
        if len(set(succ)) != len(succ):
            raise lines.error(f"activity {job} lists a successor twice", n, "successors",
                              lines.text(n).strip())
        activities.append(Activity(id=f"J{job}", duration=duration, name=f"job {job}"))
        successors[job] = succ
    return activities, successors


# ---------------------------------------------------------------- the project

def _links(successors: dict[int, tuple[int, ...]], path: Path) -> tuple[Link, ...]:
    """Finish-to-start links ordered by successor, then predecessor; loops are refused."""
    import networkx as nx  # imported on use: importing it takes longer than reading a file

    pairs = sorted(((p, s) for p, succ in successors.items() for s in succ), key=lambda e: (e[1], e[0]))
    graph = nx.DiGraph(pairs)
    try:
        cycle = nx.find_cycle(graph)
    except nx.NetworkXNoCycle:
        return tuple(Link(f"J{p}", f"J{s}") for p, s in pairs)
    raise CycleError([f"J{u}" for u, _ in cycle], file=str(path))


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
    if not path.is_file():
        raise InputError("not found", file=str(path), fix="check the path")
    text = _decode(path)
    if suffix == ".rcp":
        activities, successors = _patterson(_Lines(path, text, _RCP_FIX))
    else:
        activities, successors = _psplib(_Lines(path, text, _PSPLIB_FIX), multi=suffix == ".mm")
    return Project(
        name=f"{path.stem} ({_KINDS[suffix]})",
        start=RESEARCH_START,
        activities=tuple(activities),
        links=_links(successors, path),
        calendar=Calendar(NAMED_CALENDARS["all-days"], (), "all-days"),
        currency="",
    )
