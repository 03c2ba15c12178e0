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
    reachable from ``v`` by one link or more. Activities are visited in reverse
    topological order, so each one's successors are complete when it is reached.

    Parameters
    ----------
    order : numpy.ndarray
        ``int64``, shape ``(n,)``: the activity numbers in topological order.
    out_ptr : numpy.ndarray
        ``int64``, shape ``(n + 1,)``: where each activity's links start in ``out_succ``
        and ``out_link``.
    out_succ : numpy.ndarray
        ``int64``: the successor of each link searched, grouped by predecessor.
    target_column : numpy.ndarray
        ``int64``, shape ``(n,)``: each activity's target column, ``-1`` for an activity
        that is not a target.
    first_column : int
        The first target column of this chunk.
    words : int
        The chunk's width in 64-bit words.
    reach : numpy.ndarray
        ``uint64``, shape ``(n, words)``, zero on entry; filled in place.
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
    """Mark the links ``u -> w`` that a path through another successor of ``u`` implies.

    For a link whose successor ``w`` has a target column in this chunk, the link is implied
    when another successor ``x`` of ``u`` reaches ``w`` (its bit is set in ``reach[x]``).

    Parameters
    ----------
    n : int
        The number of activities.
    out_ptr : numpy.ndarray
        ``int64``, shape ``(n + 1,)``: where each activity's links start in ``out_succ``
        and ``out_link``.
    out_succ : numpy.ndarray
        ``int64``: the successor of each link searched, grouped by predecessor.
    out_link : numpy.ndarray
        ``int64``: the link number of each entry of ``out_succ``.
    target_column : numpy.ndarray
        ``int64``, shape ``(n,)``: each activity's target column, ``-1`` for none.
    first_column : int
        The first target column of this chunk.
    words : int
        The chunk's width in 64-bit words.
    reach : numpy.ndarray
        ``uint64``, shape ``(n, words)``: :func:`reach_chunk` of the same chunk.
    implied : numpy.ndarray
        ``bool``, one per link of the network; set in place for each link implied.
    via : numpy.ndarray
        ``int64``, one per link; set in place to ``x`` for each link implied.
    """
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
    Lags and durations are work days, added without regard to calendars.

    Parameters
    ----------
    order : numpy.ndarray
        ``int64``, shape ``(n,)``: the activity numbers in topological order.
    rank : numpy.ndarray
        ``int64``, shape ``(n,)``: each activity's position in ``order``.
    out_ptr : numpy.ndarray
        ``int64``, shape ``(n + 1,)``: where each activity's links start in ``out_succ``
        and ``out_link``.
    out_succ : numpy.ndarray
        ``int64``: the successor of each link searched, grouped by predecessor.
    out_link : numpy.ndarray
        ``int64``: the link number of each entry of ``out_succ``.
    lag : numpy.ndarray
        ``int64``, one per link: the lags in work days.
    duration : numpy.ndarray
        ``int64``, shape ``(n,)``: the planned durations in work days.
    targets : numpy.ndarray
        ``int64``: the successor activities of the links measured, each once.
    group_ptr : numpy.ndarray
        ``int64``, shape ``(targets.size + 1,)``: where each target's links start in
        ``group_links``.
    group_links : numpy.ndarray
        ``int64``: the link numbers measured, grouped by target.
    pred : numpy.ndarray
        ``int64``, one per link: the predecessor activity numbers.
    best : numpy.ndarray
        ``int64``, one per link, ``NO_PATH`` on entry; set in place.
    via : numpy.ndarray
        ``int64``, one per link; set in place to the successor of the link's predecessor
        through which the longest path runs (``-1`` when there is none).
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
    """Mark the links ``u -> y`` implied by a path of two links ``u -> x -> y``.

    A link is implied when the path's implied lag (lag + duration of ``x`` + lag, in work
    days) is at least the link's own lag.

    Parameters
    ----------
    out_ptr : numpy.ndarray
        ``int64``, shape ``(n + 1,)``: where each activity's links start in ``out_succ``
        and ``out_link``.
    out_succ : numpy.ndarray
        ``int64``: the successor of each link searched, grouped by predecessor.
    out_link : numpy.ndarray
        ``int64``: the link number of each entry of ``out_succ``.
    lag : numpy.ndarray
        ``int64``, one per link: the lags in work days.
    duration : numpy.ndarray
        ``int64``, shape ``(n,)``: the planned durations in work days.
    keys : numpy.ndarray
        ``int64``: the sorted ``u * n + y`` of the links searched.
    key_links : numpy.ndarray
        ``int64``: the link number of each key.
    n : int
        The number of activities.
    implied : numpy.ndarray
        ``bool``, one per link; set in place for each link implied.
    via : numpy.ndarray
        ``int64``, one per link; set in place to ``x`` for each link implied.
    """
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
