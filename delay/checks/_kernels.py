"""The loops of the redundant-link check: plain Python, compiled by numba on large networks
(:class:`delay._jit.Kernel`).

The links searched are the finish-to-start links with a lag of zero or more, held as a
compressed adjacency by predecessor: the links out of activity ``v`` are
``out_link[out_ptr[v]:out_ptr[v + 1]]`` and lead to ``out_succ`` of the same positions.
Everything else stays in numpy in :mod:`delay.checks.redundancy`.
"""

from __future__ import annotations

import numpy as np

from .._jit import sized

__all__ = ["NO_PATH", "reach_chunk", "mark_implied", "longest_implied_lag", "two_link_paths"]

NO_PATH = np.int64(-(1 << 60))  # "no path" in the longest implied lag


# work: every link's words
@sized(lambda a: (a[0].size + a[2].size) * a[5])
def reach_chunk(order, out_ptr, out_succ, target_column, first_column, words, reach):
    """Descendants of every activity, restricted to ``words * 64`` target columns.

    ``reach[v]`` gets bit ``c - first_column`` for every target column ``c`` of an activity
    reachable from ``v`` by one link or more; ``reach`` is zero on entry, shape
    ``(n, words)``. Activities are visited in reverse topological order, so each one's
    successors are complete when it is reached.
    """
    width = words * 64
    for i in range(order.size - 1, -1, -1):
        v = order[i]
        for j in range(out_ptr[v], out_ptr[v + 1]):
            w = out_succ[j]
            for k in range(words):
                reach[v, k] |= reach[w, k]
            column = target_column[w] - first_column
            if column >= 0 and column < width:
                reach[v, column >> 6] |= np.uint64(1) << np.uint64(column & 63)


# work: links times successors, per word
@sized(lambda a: a[2].size * (1 + a[2].size // max(a[0], 1)) * a[6])
def mark_implied(n, out_ptr, out_succ, out_link, target_column, first_column, words, reach, implied, via):
    """Links ``u -> w`` (``w`` in this chunk of columns) for which another successor ``x``
    of ``u`` reaches ``w``: the link is implied by the path through ``x``."""
    width = words * 64
    for u in range(n):
        for j in range(out_ptr[u], out_ptr[u + 1]):
            w = out_succ[j]
            column = target_column[w] - first_column
            if column < 0 or column >= width:
                continue
            word = column >> 6
            bit = np.uint64(1) << np.uint64(column & 63)
            for j2 in range(out_ptr[u], out_ptr[u + 1]):
                x = out_succ[j2]
                if x == w:
                    continue
                if reach[x, word] & bit:
                    implied[out_link[j]] = True
                    via[out_link[j]] = x
                    break


# work: a stretch of the order per target
@sized(lambda a: a[0].size * (1 + a[7].size))
def longest_implied_lag(
    order, rank, out_ptr, out_succ, out_link, lag, duration, targets, group_ptr, group_links, pred, best, via
):
    """The longest implied lag of an alternative path, for links with a positive lag.

    For each target activity ``w = targets[t]`` and its links ``group_links[group_ptr[t]:
    group_ptr[t + 1]]`` (all into ``w``), the gap from the finish of ``v`` to the start of
    ``w`` along the longest path is found for every ``v`` ranked between the earliest
    predecessor and ``w``; ``best[link]`` is then the longest gap through a successor other
    than ``w`` itself (lag + duration of the successor + its gap), ``NO_PATH`` when none.
    """
    n = order.size
    gap = np.full(n, NO_PATH, dtype=np.int64)
    for t in range(targets.size):
        w = targets[t]
        low = rank[w]
        for g in range(group_ptr[t], group_ptr[t + 1]):
            r = rank[pred[group_links[g]]]
            if r < low:
                low = r
        for position in range(rank[w] - 1, low - 1, -1):
            v = order[position]
            value = NO_PATH
            for j in range(out_ptr[v], out_ptr[v + 1]):
                y = out_succ[j]
                if y == w:
                    candidate = lag[out_link[j]]
                elif gap[y] > NO_PATH:
                    candidate = lag[out_link[j]] + duration[y] + gap[y]
                else:
                    continue
                if candidate > value:
                    value = candidate
            gap[v] = value
        for g in range(group_ptr[t], group_ptr[t + 1]):
            link = group_links[g]
            u = pred[link]
            value = NO_PATH
            through = -1
            for j in range(out_ptr[u], out_ptr[u + 1]):
                y = out_succ[j]
                if y == w or gap[y] <= NO_PATH:
                    continue
                candidate = lag[out_link[j]] + duration[y] + gap[y]
                if candidate > value:
                    value = candidate
                    through = y
            best[link] = value
            via[link] = through
        for position in range(rank[w] - 1, low - 1, -1):
            gap[order[position]] = NO_PATH


# work: links times successors
@sized(lambda a: a[1].size * (1 + a[1].size // max(a[7], 1)))
def two_link_paths(out_ptr, out_succ, out_link, lag, duration, keys, key_links, n, implied, via):
    """Links ``u -> y`` implied by a path of two links ``u -> x -> y`` whose implied lag
    (lag + duration of ``x`` + lag) is at least the link's own lag. ``keys`` are the sorted
    ``u * n + y`` of the links searched, ``key_links`` their link numbers."""
    for u in range(n):
        for j in range(out_ptr[u], out_ptr[u + 1]):
            x = out_succ[j]
            first = lag[out_link[j]] + duration[x]
            for j2 in range(out_ptr[x], out_ptr[x + 1]):
                y = out_succ[j2]
                key = u * n + y
                at = np.searchsorted(keys, key)
                if at < keys.size and keys[at] == key:
                    link = key_links[at]
                    if not implied[link] and first + lag[out_link[j2]] >= lag[link]:
                        implied[link] = True
                        via[link] = x
