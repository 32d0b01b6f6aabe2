"""Patterson-format instances (``.rcp``) as activities and successors.

J.H. Patterson, "A comparison of exact approaches for solving the multiple constrained
resource, project scheduling problem", Management Science 30(7):854-867, 1984 (volume and
pages from memory); also the output format of the RanGen network generator. See
:mod:`hasten.formats.research` for what an instance becomes.
"""

from __future__ import annotations

from hasten.formats.research_lines import Lines, check_duration
from hasten.project import Activity

__all__ = ["RCP_FIX", "read_patterson"]

RCP_FIX = ("use an unchanged Patterson-format file: line 1 'activities resources', line 2 "
           "the resource availabilities, then one line per activity: duration, one amount "
           "per resource, number of successors, the successors")


def read_patterson(lines: Lines) -> tuple[list[Activity], dict[int, tuple[int, ...]],
                                            dict[str, int]]:
    """The activities (``J1``, ``J2``, ...), each job's successors and each activity's line."""
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
        check_duration(lines, n, duration)
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
    return activities, successors, {a.id: line for a, line in zip(activities, rows)}

