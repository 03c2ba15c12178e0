"""Compiled inner loops of the CPM engine (numba).

The forward and backward passes visit activities in topological order and their links
through compressed adjacency arrays. A level-at-a-time numpy formulation costs a fixed
overhead per level, which is ruinous on deep networks (a long chain of 60,000 activities has
60,000 levels); these loops cost a few nanoseconds per link whatever the shape. Everything
that is not a pass over the logic stays in numpy in :mod:`delay.cpm`.

Calendar look-ups inside the loops use the flat tables of
:class:`delay.calendars.CalendarSet`; a look-up outside the tables returns
:data:`TOO_EARLY` or :data:`TOO_LATE`, and the caller grows the tables on that side and runs
the pass again.
"""

from __future__ import annotations

import numpy as np
from numba import njit

OK = 0
TOO_EARLY = 1  # a look-up fell before the tables: grow them backwards and run again
TOO_LATE = 2  # a look-up fell after the tables: grow them forwards and run again
_LOW = np.iinfo(np.int64).min
_HIGH = np.iinfo(np.int64).max


@njit(cache=True)
def topological_order(n, out_ptr, out_link, succ):  # pragma: no cover - compiled
    """Kahn's algorithm with a first-in first-out queue; returns (order, count placed)."""
    indegree = np.zeros(n, dtype=np.int64)
    for e in range(succ.size):
        indegree[succ[e]] += 1
    order = np.empty(n, dtype=np.int64)
    head = 0
    tail = 0
    for v in range(n):
        if indegree[v] == 0:
            order[tail] = v
            tail += 1
    while head < tail:
        v = order[head]
        head += 1
        for j in range(out_ptr[v], out_ptr[v + 1]):
            w = succ[out_link[j]]
            indegree[w] -= 1
            if indegree[w] == 0:
                order[tail] = w
                tail += 1
    return order, tail


@njit(cache=True, inline="always")
def _day_of(c, k, work_days, work_offset, work_count, anchor_before):  # pragma: no cover
    position = k + anchor_before[c]
    if position < 0:
        return _LOW
    if position >= work_count[c]:
        return _HIGH
    return work_days[work_offset[c] + position]


@njit(cache=True, inline="always")
def _start_index(c, day, before, stride, first_day, anchor_before):  # pragma: no cover
    t = day - first_day
    if t < 0:
        return _LOW
    if t >= stride - 1:
        return _HIGH
    return before[c * stride + t] - anchor_before[c]


@njit(cache=True, inline="always")
def _bound_across(point, f, lag, lag_on_pred, from_calendar, to_calendar, before, stride, first_day,
                  work_days, work_offset, work_count, anchor_before):  # pragma: no cover
    """The boundary, on the successor's calendar, that a link sets from the predecessor's
    ``point`` (read as a finish when ``f`` is 1), lag included; ``_LOW``/``_HIGH`` when a
    look-up falls outside the tables."""
    shift = lag if lag_on_pred else 0
    day = _day_of(from_calendar, point + shift - f, work_days, work_offset, work_count, anchor_before)
    if day == _LOW or day == _HIGH:
        return day
    value = _start_index(to_calendar, day + f, before, stride, first_day, anchor_before)
    if value == _LOW or value == _HIGH or lag_on_pred:
        return value
    return value + lag


@njit(cache=True, inline="always")
def _latest_across(target, f, lag, lag_on_pred, successor_calendar, predecessor_calendar, before, stride,
                   first_day, work_days, work_offset, work_count, anchor_before):  # pragma: no cover
    """The latest predecessor point (its calendar, read as a finish when ``f`` is 1) for
    which the link still allows the successor's ``target``; ``_LOW``/``_HIGH`` as above."""
    g = 1 - f
    q = target if lag_on_pred else target - lag
    day = _day_of(successor_calendar, q, work_days, work_offset, work_count, anchor_before)
    if day == _LOW or day == _HIGH:
        return day
    value = _start_index(predecessor_calendar, day + g, before, stride, first_day, anchor_before)
    if value == _LOW or value == _HIGH:
        return value
    return value - g - lag if lag_on_pred else value - g


@njit(cache=True)
def forward_pass(order, in_ptr, in_link, pred, lag, link_reads_finish, read_as_finish, cross,
                 lag_on_pred, active, finish_adjust, lower, upper, duration, in_progress,
                 start_read_fixed, calendar, before, stride, first_day, work_days, work_offset,
                 work_count, anchor_before, start_read, remaining_start, early_finish):  # pragma: no cover
    """Early dates. Writes start_read, remaining_start, early_finish; returns a status code."""
    for i in range(order.size):
        v = order[i]
        bound = lower[v]
        for j in range(in_ptr[v], in_ptr[v + 1]):
            e = in_link[j]
            if not active[e]:
                continue
            p = pred[e]
            point = early_finish[p] if link_reads_finish[e] else start_read[p]
            if cross[e]:
                value = _bound_across(point, read_as_finish[e], lag[e], lag_on_pred, calendar[p], calendar[v],
                                      before, stride, first_day, work_days, work_offset, work_count, anchor_before)
                if value == _LOW:
                    return TOO_EARLY
                if value == _HIGH:
                    return TOO_LATE
            else:
                value = point + lag[e]
            value -= finish_adjust[e]
            if value > bound:
                bound = value
        if bound > upper[v]:
            bound = upper[v]
        remaining_start[v] = bound
        start_read[v] = start_read_fixed[v] if in_progress[v] else bound
        early_finish[v] = bound + duration[v]
    return OK


@njit(cache=True)
def backward_pass(order, out_ptr, out_link, succ, lag, link_bounds_finish, read_as_finish, cross,
                  lag_on_pred, use, start_adjust, late_upper, pinned, pin_late, duration, calendar,
                  before, stride, first_day, work_days, work_offset, work_count, anchor_before,
                  late_start, late_finish):  # pragma: no cover
    """Late dates. Writes late_start (of remaining work) and late_finish."""
    for i in range(order.size - 1, -1, -1):
        v = order[i]
        bound = late_upper[v]
        for j in range(out_ptr[v], out_ptr[v + 1]):
            e = out_link[j]
            if not use[e]:
                continue
            s = succ[e]
            q = late_finish[s] if link_bounds_finish[e] else late_start[s]
            if cross[e]:
                value = _latest_across(q, read_as_finish[e], lag[e], lag_on_pred, calendar[s], calendar[v],
                                       before, stride, first_day, work_days, work_offset, work_count, anchor_before)
                if value == _LOW:
                    return TOO_EARLY
                if value == _HIGH:
                    return TOO_LATE
            else:
                value = q - lag[e]
            value += start_adjust[e]
            if value < bound:
                bound = value
        if pinned[v]:
            bound = pin_late[v]
        late_finish[v] = bound
        late_start[v] = bound - duration[v]
    return OK


@njit(cache=True)
def mark_upstream(order, in_ptr, in_link, pred, usable, on):  # pragma: no cover - compiled
    """Marks every activity from which a chain of usable links reaches a marked one."""
    for i in range(order.size - 1, -1, -1):
        v = order[i]
        if not on[v]:
            continue
        for j in range(in_ptr[v], in_ptr[v + 1]):
            e = in_link[j]
            if usable[e]:
                on[pred[e]] = True


@njit(cache=True)
def compressed_rows(n, keys):  # pragma: no cover - compiled
    """Counting sort of link numbers by key: (ptr, links) with links of key v in
    links[ptr[v]:ptr[v + 1]], in input order."""
    ptr = np.zeros(n + 1, dtype=np.int64)
    for e in range(keys.size):
        ptr[keys[e] + 1] += 1
    for v in range(n):
        ptr[v + 1] += ptr[v]
    fill = ptr[:-1].copy()
    links = np.empty(keys.size, dtype=np.int64)
    for e in range(keys.size):
        k = keys[e]
        links[fill[k]] = e
        fill[k] += 1
    return ptr, links


@njit(cache=True)
def link_floats(pred, succ, lag, link_reads_finish, link_bounds_finish, read_as_finish, cross,
                lag_on_pred, active, counts_for_free_float, start_read, remaining_start,
                early_finish, calendar, before, stride, first_day, work_days, work_offset,
                work_count, anchor_before, relative_float, free_float):  # pragma: no cover
    """Relative float of every link (successor's work days; ``far`` for an ignored link)
    and each predecessor's free float over its links (``free_float`` holds the completion
    bound on entry and is lowered in place)."""
    far = np.int64(1) << 40
    for e in range(pred.size):
        if not active[e]:
            relative_float[e] = far
            continue
        p = pred[e]
        s = succ[e]
        point = early_finish[p] if link_reads_finish[e] else start_read[p]
        target = early_finish[s] if link_bounds_finish[e] else remaining_start[s]
        if cross[e]:
            bound = _bound_across(point, read_as_finish[e], lag[e], lag_on_pred, calendar[p], calendar[s],
                                  before, stride, first_day, work_days, work_offset, work_count, anchor_before)
            latest = _latest_across(target, read_as_finish[e], lag[e], lag_on_pred, calendar[s], calendar[p],
                                    before, stride, first_day, work_days, work_offset, work_count, anchor_before)
            if bound == _LOW or latest == _LOW:
                return TOO_EARLY
            if bound == _HIGH or latest == _HIGH:
                return TOO_LATE
            slack = latest - point
        else:
            bound = point + lag[e]
            slack = target - bound
        relative_float[e] = target - bound
        if counts_for_free_float[e] and slack < free_float[p]:
            free_float[p] = slack
    return OK
