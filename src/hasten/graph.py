"""Order and loops of a precedence graph given as parallel arrays of link ends.

The one place that finds a loop in the links: the network compiler, the readers and the
research-instance import all call :func:`find_cycle` and raise
:class:`~hasten.errors.CycleError` with what it returns.
"""

from __future__ import annotations

from typing import Sequence

import numpy as np

__all__ = ["levels", "find_cycle"]


def levels(n: int, pred: np.ndarray, succ: np.ndarray) -> np.ndarray | None:
    """The level of each of ``n`` nodes (the most links on a chain before it), found one
    level at a time with numpy (Kahn's algorithm); ``None`` when the links form a loop.

    >>> levels(3, np.array([0, 1]), np.array([1, 2])).tolist()
    [0, 1, 2]
    >>> levels(2, np.array([0, 1]), np.array([1, 0])) is None
    True
    """
    pred = np.asarray(pred, dtype=np.int64)
    succ = np.asarray(succ, dtype=np.int64)
    indeg = np.bincount(succ, minlength=n)
    order = np.argsort(pred, kind="stable")
    out_start = np.searchsorted(pred[order], np.arange(n + 1))
    level = np.full(n, -1, dtype=np.int64)
    frontier = np.flatnonzero(indeg == 0)
    depth, seen = 0, 0
    while len(frontier):
        level[frontier] = depth
        seen += len(frontier)
        starts, counts = out_start[frontier], out_start[frontier + 1] - out_start[frontier]
        total = int(counts.sum())
        if not total:
            break
        offsets = np.arange(total) - np.repeat(np.cumsum(counts) - counts, counts)
        targets, times = np.unique(succ[order[np.repeat(starts, counts) + offsets]], return_counts=True)
        indeg[targets] -= times  # (per level: no pass over every node)
        frontier = targets[indeg[targets] == 0]
        depth += 1
    return level if seen == n else None


def find_cycle(n: int, pred: Sequence[int], succ: Sequence[int]) -> list[int] | None:
    """The links of one loop, as positions in ``pred``/``succ`` in the order they are
    followed, or ``None`` when there is no loop.

    >>> find_cycle(3, [0, 1, 2], [1, 2, 0])
    [0, 1, 2]
    >>> find_cycle(3, [0, 1], [1, 2]) is None
    True
    """
    if levels(n, np.asarray(pred, dtype=np.int64), np.asarray(succ, dtype=np.int64)) is not None:
        return None
    out: list[list[int]] = [[] for _ in range(n)]
    for e, i in enumerate(pred):
        out[int(i)].append(e)
    state = [0] * n  # 0 unvisited, 1 on the current path, 2 done
    for root in range(n):
        if state[root]:
            continue
        path: list[int] = []  # links followed from root
        stack = [(root, iter(out[root]))]
        state[root] = 1
        while stack:
            node, links = stack[-1]
            for e in links:
                j = int(succ[e])
                if state[j] == 1:  # back to a node on the path: the loop closes here
                    nodes = [root] + [int(succ[x]) for x in path]
                    first = nodes.index(j)
                    return path[first:] + [e]
                if state[j] == 0:
                    state[j] = 1
                    path.append(e)
                    stack.append((j, iter(out[j])))
                    break
            else:
                state[node] = 2
                stack.pop()
                if path:
                    path.pop()
    return None  # pragma: no cover - levels() said there is a loop
