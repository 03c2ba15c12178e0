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


# The calendar look-ups read one packed table (CalendarSet.table): table[1] is the stride
# of the ``before`` tables, table[2] their first day; calendar c's row at 3 + 4c holds its
# anchor, where its ``before`` table and its work days start, and how many work days it has.
# One array, not several: numba counts references on every array handed to a helper, and
# on the cross-calendar links that cost more than the look-ups themselves.


@njit(cache=True, inline="always")
def _day_of(c, k, table):  # pragma: no cover - compiled
    """Day number of work-day index ``k`` on calendar ``c``."""
    row = 3 + 4 * c
    position = k + table[row]
    if position < 0:
        return _LOW
    if position >= table[row + 3]:
        return _HIGH
    return table[table[row + 2] + position]


@njit(cache=True, inline="always")
def _start_index(c, day, table):  # pragma: no cover - compiled
    """Index of the first work day on or after ``day`` on calendar ``c``."""
    t = day - table[2]
    if t < 0:
        return _LOW
    if t >= table[1] - 1:
        return _HIGH
    row = 3 + 4 * c
    return table[table[row + 1] + t] - table[row]


@njit(cache=True, inline="always")
def _bound_across(point, f, lag, lag_on_pred, from_calendar, to_calendar, table):  # pragma: no cover
    """The boundary, on the successor's calendar, that a link sets from the predecessor's
    ``point`` (read as a finish when ``f`` is 1), lag included; ``_LOW``/``_HIGH`` when a
    look-up falls outside the tables."""
    shift = lag if lag_on_pred else 0
    day = _day_of(from_calendar, point + shift - f, table)
    if day == _LOW or day == _HIGH:
        return day
    value = _start_index(to_calendar, day + f, table)
    if value == _LOW or value == _HIGH or lag_on_pred:
        return value
    return value + lag


@njit(cache=True, inline="always")
def _latest_across(target, f, lag, lag_on_pred, successor_calendar, predecessor_calendar, table):  # pragma: no cover
    """The latest predecessor point (its calendar, read as a finish when ``f`` is 1) for
    which the link still allows the successor's ``target``; ``_LOW``/``_HIGH`` as above."""
    g = 1 - f
    q = target if lag_on_pred else target - lag
    day = _day_of(successor_calendar, q, table)
    if day == _LOW or day == _HIGH:
        return day
    value = _start_index(predecessor_calendar, day + g, table)
    if value == _LOW or value == _HIGH:
        return value
    return value - g - lag if lag_on_pred else value - g


@njit(cache=True)
def pass_layout(order, rank, in_ptr, in_link, out_ptr, out_link, pred, succ, link_type, lag, f_ptr, f_pred,
                f_type, f_lag, f_link, b_ptr, b_succ, b_type, b_lag):  # pragma: no cover - compiled
    """Fills the links' layout for the passes, activities numbered by topological position.

    Position ``i`` stands for activity ``order[i]``. The forward stream lists, for each
    position in turn, the links into it (``f_ptr[i]:f_ptr[i + 1]``) with the position of
    their predecessor, type, lag and link number; the backward stream lists the links out
    of each position with the position of their successor. A pass then reads its links
    front to back and its activities' arrays in order, instead of jumping through them.
    """
    n = order.size
    k = 0
    h = 0
    for i in range(n):
        v = order[i]
        f_ptr[i] = k
        for j in range(in_ptr[v], in_ptr[v + 1]):
            e = in_link[j]
            f_pred[k] = rank[pred[e]]
            f_type[k] = link_type[e]
            f_lag[k] = lag[e]
            f_link[k] = e
            k += 1
        b_ptr[i] = h
        for j in range(out_ptr[v], out_ptr[v + 1]):
            e = out_link[j]
            b_succ[h] = rank[succ[e]]
            b_type[h] = link_type[e]
            b_lag[h] = lag[e]
            h += 1
    f_ptr[n] = k
    b_ptr[n] = h


@njit(cache=True, inline="always")
def _reads_as_finish(point_kind, reads_finish):  # pragma: no cover - compiled
    """Whether a link reads its predecessor's point as a finish (the end of its date): a
    milestone's own kind decides; a task's point is its finish for FS and FF links."""
    if point_kind == 0:
        return 1 if reads_finish else 0
    return 1 if point_kind == 2 else 0


@njit(cache=True, inline="always")
def _links_ignored(status, progress_override):  # pragma: no cover - compiled
    """Whether the links into an activity of this status are ignored: it is complete, or
    in progress when progress overrides logic."""
    return status == 2 or (progress_override and status == 1)


@njit(cache=True)
def forward_pass(f_ptr, f_pred, f_type, f_lag, f_link, progress_override, lag_on_pred, with_floats, status,
                 point_kind, lower, upper, duration, start_read_fixed, calendar, table, start_read,
                 remaining_start, early_finish, relative_float, link_free_float):  # pragma: no cover
    """Early dates, activities by topological position (see :func:`pass_layout`).

    Writes start_read (the point successors read as the start: the actual start of one in
    progress), remaining_start and early_finish; returns a status code.

    With ``with_floats`` it also writes each link's relative float (successor's work days,
    by link number; ``2**40`` for a link the pass ignores) and lowers each predecessor's
    ``link_free_float`` to the least slack over its links (predecessor's work days); the
    link's bound is at hand then, so this costs little more than the pass.
    """
    n = f_ptr.size - 1
    far = np.int64(1) << 40
    widest = 0
    for i in range(n):
        if f_ptr[i + 1] - f_ptr[i] > widest:
            widest = f_ptr[i + 1] - f_ptr[i]
    bounds = np.empty(widest, dtype=np.int64)  # each link's bound on the activity in hand
    for i in range(n):
        bound = lower[i]
        ignored = _links_ignored(status[i], progress_override)
        first = f_ptr[i]
        last = f_ptr[i + 1]
        c = calendar[i]
        if not ignored:
            for j in range(first, last):
                p = f_pred[j]
                t = f_type[j]
                reads_finish = t == 0 or t == 2
                point = early_finish[p] if reads_finish else start_read[p]
                if calendar[p] != c:
                    value = _bound_across(point, _reads_as_finish(point_kind[p], reads_finish), f_lag[j],
                                          lag_on_pred, calendar[p], c, table)
                    if value == _LOW:
                        return TOO_EARLY
                    if value == _HIGH:
                        return TOO_LATE
                else:
                    value = point + f_lag[j]
                if t >= 2:
                    value -= duration[i]
                bounds[j - first] = value
                if value > bound:
                    bound = value
        if bound > upper[i]:
            bound = upper[i]
        remaining_start[i] = bound
        start_read[i] = start_read_fixed[i] if status[i] == 1 else bound
        early_finish[i] = bound + duration[i]
        if not with_floats:
            continue
        for j in range(first, last):
            if ignored:
                relative_float[f_link[j]] = far
                continue
            # target - bound, on the finish for FF and SF: both sides carry the duration
            slack = bound - bounds[j - first]
            relative_float[f_link[j]] = slack
            p = f_pred[j]
            t = f_type[j]
            reads_finish = t == 0 or t == 2
            if status[p] == 2 or (status[p] == 1 and not reads_finish):
                continue  # the link reads an actual date: no float of the predecessor's
            if calendar[p] != c:
                as_finish = _reads_as_finish(point_kind[p], reads_finish)
                target = bound + duration[i] if t >= 2 else bound
                latest = _latest_across(target, as_finish, f_lag[j], lag_on_pred, c, calendar[p], table)
                if latest == _LOW:
                    return TOO_EARLY
                if latest == _HIGH:
                    return TOO_LATE
                slack = latest - (early_finish[p] if reads_finish else start_read[p])
            if slack < link_free_float[p]:
                link_free_float[p] = slack
    return OK


@njit(cache=True)
def backward_pass(b_ptr, b_succ, b_type, b_lag, progress_override, lag_on_pred, status, point_kind,
                  late_upper, pin_late, duration, calendar, table, late_start, late_finish):  # pragma: no cover
    """Late dates, activities by topological position. Writes late_start (of remaining
    work) and late_finish; ``pin_late`` above ``-2**40`` pins an activity's late finish."""
    n = b_ptr.size - 1
    unpinned = -(np.int64(1) << 40)
    for i in range(n - 1, -1, -1):
        bound = late_upper[i]
        c = calendar[i]
        started = status[i] == 1
        for j in range(b_ptr[i], b_ptr[i + 1]):
            s = b_succ[j]
            if _links_ignored(status[s], progress_override):
                continue
            t = b_type[j]
            reads_finish = t == 0 or t == 2
            if started and not reads_finish:
                continue  # the link reads the actual start, which is past
            q = late_finish[s] if t >= 2 else late_start[s]
            if calendar[s] != c:
                value = _latest_across(q, _reads_as_finish(point_kind[i], reads_finish), b_lag[j], lag_on_pred,
                                       calendar[s], c, table)
                if value == _LOW:
                    return TOO_EARLY
                if value == _HIGH:
                    return TOO_LATE
            else:
                value = q - b_lag[j]
            if not reads_finish:
                value += duration[i]
            if value < bound:
                bound = value
        if pin_late[i] > unpinned:
            bound = pin_late[i]
        late_finish[i] = bound
        late_start[i] = bound - duration[i]
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
def link_gaps(f_ptr, f_pred, f_type, f_lag, f_link, lag_on_pred, point_kind, start_read, early_finish,
              calendar, table, gaps):  # pragma: no cover - compiled
    """Per link (by link number), how far the successor's point (``start_read`` or
    ``early_finish``) lies after the bound the link sets, in the successor's work days;
    every link counts, whatever the activities' status."""
    n = f_ptr.size - 1
    for i in range(n):
        c = calendar[i]
        for j in range(f_ptr[i], f_ptr[i + 1]):
            p = f_pred[j]
            t = f_type[j]
            reads_finish = t == 0 or t == 2
            point = early_finish[p] if reads_finish else start_read[p]
            target = early_finish[i] if t >= 2 else start_read[i]
            if calendar[p] != c:
                bound = _bound_across(point, _reads_as_finish(point_kind[p], reads_finish), f_lag[j], lag_on_pred,
                                      calendar[p], c, table)
                if bound == _LOW:
                    return TOO_EARLY
                if bound == _HIGH:
                    return TOO_LATE
            else:
                bound = point + f_lag[j]
            gaps[f_link[j]] = target - bound
    return OK
