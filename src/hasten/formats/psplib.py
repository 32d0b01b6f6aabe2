"""PSPLIB instances (``.mm`` multi-mode, ``.sm`` single-mode) as activities and successors.

R. Kolisch and A. Sprecher, "PSPLIB - A project scheduling problem library", European
Journal of Operational Research 96(1):205-216, 1997. See :mod:`hasten.formats.research` for
what an instance becomes.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from hasten.formats.research_lines import Lines, check_duration
from hasten.project import Activity, Option

__all__ = ["PSPLIB_FIX", "read_psplib"]

PSPLIB_FIX = ("use an unchanged PSPLIB file; its layout is described in Kolisch & Sprecher "
              "(1997) and on the PSPLIB pages")
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
    line: int = 0  # where the mode is given


@dataclass
class _Job:
    number: int
    modes_declared: int
    successors: tuple[int, ...]
    line: int
    modes: list[_Mode]



def _find(lines: Lines, title: str, start: int = 1) -> int:
    """The line number of the first line from ``start`` that starts with ``title``."""
    for n in range(start, len(lines.lines) + 1):
        if lines.text(n).strip().upper().startswith(title):
            return n
    raise lines.error(f"the section '{title}' is missing", None, None, None,
                      f"{PSPLIB_FIX}; every PSPLIB file has a line starting with '{title}'")


def _section(lines: Lines, title_line: int, header: str, title: str) -> list[int]:
    """Numbers of the data lines of a section: after its column header (and a dashed rule)
    up to a line of stars or the end of the file; blank lines are skipped."""
    n = title_line + 1
    while n <= len(lines.lines) and not lines.text(n).strip():
        n += 1
    if n > len(lines.lines) or not lines.text(n).strip().lower().startswith(header):
        shown = lines.text(n).strip() if n <= len(lines.lines) else "end of file"
        raise lines.error(f"expected the column header of {title} (starting '{header}')", n,
                          None, shown, PSPLIB_FIX)
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


def _job_count(lines: Lines) -> int:
    for n in range(1, len(lines.lines) + 1):
        found = _JOBS.search(lines.text(n))
        if found:
            if not found.group(1).isdigit() or int(found.group(1)) < 1:
                raise lines.error("expected the number of jobs", n, "jobs", found.group(1))
            return int(found.group(1))
    raise lines.error("the line 'jobs (incl. supersource/sink ): N' is missing", None, None,
                      None, f"{PSPLIB_FIX}; the number of jobs is needed to read the file")


def _resource_columns(lines: Lines, header_line: int) -> list[str]:
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
                header.strip(), PSPLIB_FIX)
    return kinds


def _precedence(lines: Lines, jobs: int, single: bool) -> dict[int, _Job]:
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
                          f"({jobs} jobs announced)", title, None, None, PSPLIB_FIX)
    return found


def _requests(lines: Lines, jobs: dict[int, _Job]) -> None:
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
        check_duration(lines, n, duration)
        if mode != len(current.modes) + 1:
            raise lines.error(f"expected mode {len(current.modes) + 1} of job {current.number}",
                              n, "mode", mode)
        if mode > current.modes_declared:
            raise lines.error(f"job {current.number} has {current.modes_declared} modes "
                              f"(line {current.line}) but more are listed", n, "mode", mode)
        costs = tuple(amounts[k] for k in nonrenewable)
        current.modes.append(_Mode(mode, duration, sum(costs), costs, n))
    for job in jobs.values():
        if len(job.modes) != job.modes_declared:
            raise lines.error(f"job {job.number} has {job.modes_declared} modes (line {job.line}) "
                              f"but REQUESTS/DURATIONS lists {len(job.modes)}", title, None,
                              None, PSPLIB_FIX)



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


def read_psplib(lines: Lines, multi: bool) -> tuple[list[Activity], dict[int, tuple[int, ...]],
                                                     dict[str, int]]:
    """The activities (``J1``, ``J2``, ...), each job's successors and the line of each
    activity's normal mode."""
    count = _job_count(lines)
    jobs = _precedence(lines, count, single=not multi)
    _requests(lines, jobs)
    ordered = [jobs[j] for j in range(1, count + 1)]
    activities = [_psplib_activity(j, multi) for j in ordered]
    return (activities, {j.number: j.successors for j in ordered},
            {a.id: next(m.line for m in j.modes if m.duration == a.longest)
             for a, j in zip(activities, ordered)})

