"""The inner loops of the CPM engine: plain Python, compiled by numba on large networks.

The forward and backward passes visit activities in topological order and their links
through compressed adjacency arrays. A level-at-a-time numpy formulation costs a fixed
overhead per level, which is ruinous on deep networks (a long chain of 60,000 activities has
60,000 levels); compiled, these loops cost a few nanoseconds per link whatever the shape.
Everything that is not a pass over the logic stays in numpy in :mod:`delay.cpm`.

Each loop is one plain function wrapped in a :class:`delay._jit.Kernel`: it runs as Python
on a small network (no numba start-up for a six-activity case) and compiled, with numba's
on-disk cache, on a large one or in a long analysis (see :mod:`delay._jit`). The helpers it
calls are marked :func:`delay._jit.jitable` and compiled with it.

Calendar look-ups inside the loops use the flat tables of
:class:`delay.calendars.CalendarSet`; a look-up outside the tables returns
:data:`TOO_EARLY` or :data:`TOO_LATE`, and the caller grows the tables on that side and runs
the pass again.

Examples
--------
Links keyed by activity (here their successors 2, 0 and 2), as compressed rows:

>>> ptr, links = compressed_rows(3, np.array([2, 0, 2]))
>>> ptr.tolist(), links.tolist()
([0, 1, 1, 3], [1, 0, 2])
"""

from __future__ import annotations

import numpy as np

from ._jit import Kernel, jitable

__all__ = [
    "OK",
    "TOO_EARLY",
    "TOO_LATE",
    "order_and_layout",
    "forward_pass",
    "backward_pass",
    "mark_upstream",
    "compressed_rows",
    "link_gaps",
]

OK = 0
TOO_EARLY = 1  # a look-up fell before the tables: grow them backwards and run again
TOO_LATE = 2  # a look-up fell after the tables: grow them forwards and run again
_LOW = np.iinfo(np.int64).min
_HIGH = np.iinfo(np.int64).max


# The calendar look-ups read one packed table (CalendarSet.table): table[1] is the stride
# of the ``before`` tables, table[2] their first day; calendar c's row at 3 + 4c holds its
# anchor, where its ``before`` table and its work days start, and how many work days it has.
# One array, not several: numba counts references on every array handed to a helper, and
# on the cross-calendar links that cost more than the look-ups themselves. The passes test
# ``calendar[p] != c`` themselves before calling a helper: on one calendar a link needs no
# look-up, and evaluating the helper's arguments (the predecessor's point kind, read out of
# order) on every link was measured 5-8 % slower.


@jitable
def _day_of(c, k, table):
    """Day number of work-day index ``k`` on calendar ``c``."""
    row = 3 + 4 * c
    position = k + table[row]
    if position < 0:
        return _LOW
    if position >= table[row + 3]:
        return _HIGH
    return table[table[row + 2] + position]


@jitable
def _start_index(c, day, table):
    """Index of the first work day on or after ``day`` on calendar ``c``."""
    t = day - table[2]
    if t < 0:
        return _LOW
    if t >= table[1] - 1:
        return _HIGH
    row = 3 + 4 * c
    return table[table[row + 1] + t] - table[row]


@jitable
def _bound_across(point, f, lag, lag_on_pred, from_calendar, to_calendar, table):
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


@jitable
def _latest_across(target, f, lag, lag_on_pred, successor_calendar, predecessor_calendar, table):
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


@Kernel
def order_and_layout(
    n,
    pred,
    succ,
    link_type,
    lag,
    out_ptr,
    out_link,
    order,
    rank,
    f_ptr,
    f_pred,
    f_type,
    f_lag,
    f_link,
    b_ptr,
    b_succ,
    b_type,
    b_lag,
    b_link,
):
    """Find a topological order and lay the links out for the passes, in one sweep.

    Fills the arrays given and returns how many activities were placed (fewer than ``n``:
    the links form a loop). The order is Kahn's with a first-in first-out queue, taking the activities without
    predecessors in input order and each activity's links in input order (``out_ptr``,
    ``out_link``: links by predecessor). Position ``i`` stands for activity ``order[i]``.
    The backward stream lists the links out of each position in turn (``b_ptr[i]:b_ptr[i +
    1]``) with their successor's position, type, lag and link number; the forward stream the links into
    each position (``f_ptr``) with their predecessor's position, type, lag and link number.
    A pass then reads its links front to back and its activities' arrays in order.

    Parameters
    ----------
    n : int
        The number of activities.
    pred, succ : numpy.ndarray
        ``int64``, shape ``(m,)``: each link's predecessor and successor (activity numbers).
    link_type : numpy.ndarray
        ``int8``, shape ``(m,)``: FS 0, SS 1, FF 2, SF 3.
    lag : numpy.ndarray
        ``int64``, shape ``(m,)``: lags in work days.
    out_ptr : numpy.ndarray
        ``int64``, shape ``(n + 1,)``, all zero: filled with the row starts of the links by
        predecessor.
    out_link : numpy.ndarray
        Shape ``(m,)``: filled with the link numbers grouped by predecessor.
    order, rank : numpy.ndarray
        Shape ``(n,)``: filled with the activity at each position, and each activity's
        position (``rank`` only when every activity was placed).
    f_ptr, f_pred, f_type, f_lag, f_link : numpy.ndarray
        Filled with the forward stream (:class:`delay.network.PassLayout`).
    b_ptr, b_succ, b_type, b_lag, b_link : numpy.ndarray
        Filled with the backward stream.

    Returns
    -------
    int
        The number of activities placed: ``n``, or fewer when the links form a loop (the
        layout is then incomplete).

    References
    ----------
    A. B. Kahn, "Topological sorting of large networks", Communications of the ACM 5 (11),
    1962 (the order).
    """
    m = pred.size
    indegree = np.zeros(n, dtype=np.int64)
    for e in range(m):
        out_ptr[pred[e] + 1] += 1
        indegree[succ[e]] += 1
    for v in range(n):
        out_ptr[v + 1] += out_ptr[v]
    fill = out_ptr[:-1].copy()
    for e in range(m):
        v = pred[e]
        out_link[fill[v]] = e
        fill[v] += 1
    # forward stream extents: each position's in-degree, known once the order is
    remaining = indegree.copy()
    head = 0
    tail = 0
    for v in range(n):
        if remaining[v] == 0:
            order[tail] = v
            tail += 1
    h = 0
    while head < tail:
        v = order[head]
        b_ptr[head] = h
        head += 1
        for j in range(out_ptr[v], out_ptr[v + 1]):
            e = out_link[j]
            b_link[h] = e
            h += 1
            w = succ[e]
            remaining[w] -= 1
            if remaining[w] == 0:
                order[tail] = w
                tail += 1
    if tail < n:
        return tail
    b_ptr[n] = h
    for i in range(n):
        rank[order[i]] = i
    f_ptr[0] = 0
    for i in range(n):
        f_ptr[i + 1] = f_ptr[i] + indegree[order[i]]
    slot = f_ptr[:-1].copy()
    for i in range(n):
        for k in range(b_ptr[i], b_ptr[i + 1]):
            e = b_link[k]
            w = rank[succ[e]]
            b_succ[k] = w
            b_type[k] = link_type[e]
            b_lag[k] = lag[e]
            s = slot[w]
            slot[w] = s + 1
            f_pred[s] = i
            f_type[s] = link_type[e]
            f_lag[s] = lag[e]
            f_link[s] = e
    return n


@jitable
def _reads_as_finish(point_kind, reads_finish):
    """Whether a link reads its predecessor's point as a finish (the end of its date): a
    milestone's own kind decides; a task's point is its finish for FS and FF links."""
    if point_kind == 0:
        return 1 if reads_finish else 0
    return 1 if point_kind == 2 else 0


@jitable
def _links_ignored(status, progress_override):
    """Whether the links into an activity of this status are ignored: it is complete, or
    in progress when progress overrides logic."""
    return status == 2 or (progress_override and status == 1)


@Kernel
def forward_pass(
    f_ptr,
    f_pred,
    f_type,
    f_lag,
    f_link,
    order,
    progress_override,
    lag_on_pred,
    with_floats,
    status,
    point_kind,
    calendar,
    lower,
    upper,
    duration,
    start_read_fixed,
    known_finish,
    table,
    early_finish_t,
    start_read_t,
    early_finish,
    start_read,
    remaining_start,
    finish_day,
    relative_float,
    link_free_float,
    b_ptr,
    b_succ,
    changed,
    touched,
):
    """Compute early dates, activities by topological position (see :func:`order_and_layout`).

    By position ``i`` (activity ``order[i]``): ``status``, ``point_kind`` and ``calendar``
    in, ``early_finish_t`` and ``start_read_t`` out (what successors read). By activity
    number: ``lower``, ``upper``, ``duration``, ``start_read_fixed`` and ``known_finish``
    (the finish date of a complete activity, else ``_LOW``) in; ``early_finish``,
    ``start_read`` (the point successors read as the start: the actual start of one in
    progress), ``remaining_start`` and ``finish_day`` (the date of the finish) out.

    With ``with_floats`` it also writes each link's relative float (successor's work days,
    in the forward stream's order; ``2**40`` for a link the pass ignores) and lowers each predecessor's
    ``link_free_float`` (by position) to the least slack over its links (predecessor's work
    days); the link's bound is at hand then, so this costs little more than the pass.
    Boundaries are work-day indices on each activity's own calendar
    (:mod:`delay.cpm`, "How time is held").

    Parameters
    ----------
    f_ptr, f_pred, f_type, f_lag, f_link : numpy.ndarray
        The forward stream of :class:`delay.network.PassLayout`.
    order : numpy.ndarray
        The activity at each topological position.
    progress_override : bool
        Whether links into an activity in progress are ignored (progress override).
    lag_on_pred : bool
        Whether a lag counts on the predecessor's calendar (else the successor's).
    with_floats : bool
        Whether to write ``relative_float`` and ``link_free_float`` too.
    status, point_kind, calendar : numpy.ndarray
        By position: status codes (0 not started, 1 in progress, 2 complete), how the
        activity is scheduled (0 task, 1 start milestone, 2 finish milestone) and calendar
        numbers.
    lower, upper : numpy.ndarray
        By activity: the earliest and the latest boundary the start of its remaining work
        may take (the data date, an earliest-start constraint, a what-if's start bound;
        a fixed constraint and the actual dates of a complete activity pin both).
    duration : numpy.ndarray
        By activity: the work days scheduled.
    start_read_fixed : numpy.ndarray
        By activity: the boundary of the actual start of one in progress.
    known_finish : numpy.ndarray
        By activity: the finish day number of a complete activity, else ``_LOW``.
    table : numpy.ndarray
        The packed calendar tables (:meth:`delay.calendars.CalendarSet.table`).
    early_finish_t, start_read_t : numpy.ndarray
        By position, written: the early finish boundary and the boundary successors read
        as the start.
    early_finish, start_read, remaining_start : numpy.ndarray
        By activity, written: early finish, start as read, and early start of the
        remaining work (boundaries).
    finish_day : numpy.ndarray
        By activity, written: the finish day number (days since 1970-01-01).
    relative_float : numpy.ndarray
        Shape ``(m,)`` with floats (else empty), written in the forward stream's order.
    link_free_float : numpy.ndarray
        By position, filled with ``2**40`` by the caller; lowered with floats.
    b_ptr, b_succ : numpy.ndarray
        The backward stream's extents and successor positions (what lies downstream), read
        when ``changed`` is not empty.
    changed : numpy.ndarray
        Empty: every activity is computed. Else the topological positions of the
        activities whose inputs differ from those of a model whose dates the output arrays
        hold on entry (a what-if's parent): only those, and the activities downstream of a
        date that moves, are computed again, with the same rule, so the result equals a
        whole pass. The successors of a changed position are always visited, since its
        calendar or its kind, which they read, may have changed. (No floats then.)
    touched : numpy.ndarray
        Shape ``(n + 1,)`` when ``changed`` is not empty, written: ``touched[0]`` is how
        many activities were computed, ``touched[1:1 + touched[0]]`` their numbers.

    Returns
    -------
    int
        :data:`OK`, or :data:`TOO_EARLY` / :data:`TOO_LATE` when a calendar look-up fell
        outside the tables: the caller grows them on that side
        (:meth:`delay.calendars.CalendarSet.grow`) and runs the pass again (from the
        parent's dates again, when ``changed`` is given: the arrays are partly updated).
    """
    n = f_ptr.size - 1
    far = np.int64(1) << 40
    widest = 0
    for i in range(n):
        if f_ptr[i + 1] - f_ptr[i] > widest:
            widest = f_ptr[i + 1] - f_ptr[i]
    bounds = np.empty(widest, dtype=np.int64)  # each link's bound on the activity in hand
    update = changed.size > 0
    mark = np.zeros(n if update else 0, dtype=np.int8)  # 1: to compute again; 2: its own inputs changed
    pending = 0
    begin = n if update else 0
    for k in range(changed.size):
        i = changed[k]
        if mark[i] == 0:
            pending += 1
        mark[i] = 2
        if i < begin:
            begin = i
    count = 0
    before_finish = 0
    before_read = 0
    for i in range(begin, n):
        if update:
            if pending == 0:
                break
            if mark[i] == 0:
                continue
            pending -= 1
            before_finish = early_finish_t[i]
            before_read = start_read_t[i]
        v = order[i]
        bound = lower[v]
        length = duration[v]
        st = status[i]
        ignored = _links_ignored(st, progress_override)
        first = f_ptr[i]
        last = f_ptr[i + 1]
        c = calendar[i]
        if not ignored:
            for j in range(first, last):
                p = f_pred[j]
                t = f_type[j]
                reads_finish = t == 0 or t == 2
                point = early_finish_t[p] if reads_finish else start_read_t[p]
                if calendar[p] != c:
                    value = _bound_across(
                        point,
                        _reads_as_finish(point_kind[p], reads_finish),
                        f_lag[j],
                        lag_on_pred,
                        calendar[p],
                        c,
                        table,
                    )
                    if value == _LOW:
                        return TOO_EARLY
                    if value == _HIGH:
                        return TOO_LATE
                else:
                    value = point + f_lag[j]
                if t >= 2:
                    value -= length
                bounds[j - first] = value
                if value > bound:
                    bound = value
        if bound > upper[v]:
            bound = upper[v]
        remaining_start[v] = bound
        read = start_read_fixed[v] if st == 1 else bound
        start_read_t[i] = read
        start_read[v] = read
        finish = bound + length
        early_finish_t[i] = finish
        early_finish[v] = finish
        day = known_finish[v]
        if day == _LOW:
            day = _day_of(c, finish if point_kind[i] == 1 else finish - 1, table)
            if day == _LOW:
                return TOO_EARLY
            if day == _HIGH:
                return TOO_LATE
        finish_day[v] = day
        if update:
            count += 1
            touched[count] = v
            if mark[i] == 2 or finish != before_finish or read != before_read:
                for k in range(b_ptr[i], b_ptr[i + 1]):
                    w = b_succ[k]
                    if mark[w] == 0:
                        mark[w] = 1
                        pending += 1
        if not with_floats:
            continue
        for j in range(first, last):
            if ignored:
                relative_float[j] = far
                continue
            # target - bound, on the finish for FF and SF: both sides carry the duration
            slack = bound - bounds[j - first]
            relative_float[j] = slack
            p = f_pred[j]
            t = f_type[j]
            reads_finish = t == 0 or t == 2
            if status[p] == 2 or (status[p] == 1 and not reads_finish):
                continue  # the link reads an actual date: no float of the predecessor's
            if calendar[p] != c:
                as_finish = _reads_as_finish(point_kind[p], reads_finish)
                target = finish if t >= 2 else bound
                latest = _latest_across(target, as_finish, f_lag[j], lag_on_pred, c, calendar[p], table)
                if latest == _LOW:
                    return TOO_EARLY
                if latest == _HIGH:
                    return TOO_LATE
                slack = latest - (early_finish_t[p] if reads_finish else start_read_t[p])
            if slack < link_free_float[p]:
                link_free_float[p] = slack
    if update:
        touched[0] = count
    return OK


@Kernel
def backward_pass(
    b_ptr,
    b_succ,
    b_type,
    b_lag,
    order,
    progress_override,
    lag_on_pred,
    status,
    point_kind,
    calendar,
    late_upper,
    pin_late,
    duration,
    early_finish_t,
    link_free_float,
    end_bound,
    completion_bound,
    table,
    late_start_t,
    late_finish_t,
    late_start,
    late_finish,
    total_float,
    free_float,
):
    """Compute late dates, total and free float, activities by topological position.

    By position: ``status``, ``point_kind``, ``calendar``, ``early_finish_t`` and
    ``link_free_float`` (from :func:`forward_pass`) in, ``late_start_t`` and
    ``late_finish_t`` out. By activity number: ``late_upper`` (a latest-finish bound),
    ``pin_late`` (above ``-2**40``: a pinned late finish) and ``duration`` in;
    ``late_start`` (of remaining work), ``late_finish``, ``total_float`` and ``free_float``
    out. Per calendar: ``end_bound``, the last work day on or before the date the late
    dates run back from, and ``completion_bound``, that of the completion (free float).

    Parameters
    ----------
    b_ptr, b_succ, b_type, b_lag : numpy.ndarray
        The backward stream of :class:`delay.network.PassLayout`.
    order : numpy.ndarray
        The activity at each topological position.
    progress_override : bool
        Whether links into an activity in progress are ignored (progress override).
    lag_on_pred : bool
        Whether a lag counts on the predecessor's calendar (else the successor's).
    status, point_kind, calendar : numpy.ndarray
        By position: status codes, how each activity is scheduled and calendar numbers, as
        for :func:`forward_pass`.
    late_upper : numpy.ndarray
        By activity: a latest-finish boundary (``2**40`` for none).
    pin_late : numpy.ndarray
        By activity: a pinned late finish boundary, or ``-2**40`` for none.
    duration : numpy.ndarray
        By activity: the work days scheduled.
    early_finish_t, link_free_float : numpy.ndarray
        By position, from :func:`forward_pass`.
    end_bound, completion_bound : numpy.ndarray
        Per calendar, as above.
    table : numpy.ndarray
        The packed calendar tables (:meth:`delay.calendars.CalendarSet.table`).
    late_start_t, late_finish_t : numpy.ndarray
        By position, written.
    late_start, late_finish, total_float, free_float : numpy.ndarray
        By activity, written: boundaries, and floats in work days of the activity's
        calendar (free float not below 0).

    Returns
    -------
    int
        :data:`OK`, or :data:`TOO_EARLY` / :data:`TOO_LATE` when a calendar look-up fell
        outside the tables: the caller grows them on that side
        (:meth:`delay.calendars.CalendarSet.grow`) and runs the pass again.
    """
    n = b_ptr.size - 1
    unpinned = -(np.int64(1) << 40)
    for i in range(n - 1, -1, -1):
        v = order[i]
        c = calendar[i]
        past_finish = 0 if point_kind[i] == 1 else 1  # a finish is the end of its day
        bound = end_bound[c] + past_finish
        if late_upper[v] < bound:
            bound = late_upper[v]
        length = duration[v]
        started = status[i] == 1
        for j in range(b_ptr[i], b_ptr[i + 1]):
            s = b_succ[j]
            if _links_ignored(status[s], progress_override):
                continue
            t = b_type[j]
            reads_finish = t == 0 or t == 2
            if started and not reads_finish:
                continue  # the link reads the actual start, which is past
            q = late_finish_t[s] if t >= 2 else late_start_t[s]
            if calendar[s] != c:
                value = _latest_across(
                    q, _reads_as_finish(point_kind[i], reads_finish), b_lag[j], lag_on_pred, calendar[s], c, table
                )
                if value == _LOW:
                    return TOO_EARLY
                if value == _HIGH:
                    return TOO_LATE
            else:
                value = q - b_lag[j]
            if not reads_finish:
                value += length
            if value < bound:
                bound = value
        if pin_late[v] > unpinned:
            bound = pin_late[v]
        late_finish_t[i] = bound
        late_start_t[i] = bound - length
        late_finish[v] = bound
        late_start[v] = bound - length
        total_float[v] = bound - early_finish_t[i]
        free = completion_bound[c] + past_finish - early_finish_t[i]
        if link_free_float[i] < free:
            free = link_free_float[i]
        free_float[v] = free if free > 0 else 0
    return OK


@Kernel
def mark_upstream(f_ptr, f_pred, f_type, f_link, usable, driving_only, status, relative_float, on):
    """Mark every activity from which a chain of links reaches a marked one.

    The links followed are those where ``usable`` (by link number) is true or, with
    ``driving_only``, driving links a path from the data date can run through (relative
    float 0, in the forward stream's order; the predecessor not complete, and not reading
    the actual, past, start of one in progress; ``status`` by position). Positions are
    walked from the last back, so one sweep marks every chain.

    Parameters
    ----------
    f_ptr, f_pred, f_type, f_link : numpy.ndarray
        The forward stream of :class:`delay.network.PassLayout`.
    usable : numpy.ndarray
        Boolean by link number: the links to follow (read without ``driving_only``).
    driving_only : bool
        Follow the driving links instead of ``usable``.
    status : numpy.ndarray
        Status codes by position (read with ``driving_only``).
    relative_float : numpy.ndarray
        Relative float in the forward stream's order (read with ``driving_only``).
    on : numpy.ndarray
        Boolean by position: the marked activities, marked further in place.
    """
    for i in range(f_ptr.size - 2, -1, -1):
        if not on[i]:
            continue
        for j in range(f_ptr[i], f_ptr[i + 1]):
            e = f_link[j]
            p = f_pred[j]
            if driving_only:
                if relative_float[j] != 0 or status[p] == 2 or (status[p] == 1 and (f_type[j] == 1 or f_type[j] == 3)):
                    continue
            elif not usable[e]:
                continue
            on[p] = True


@Kernel
def compressed_rows(n, keys):
    """Sort link numbers by key with a counting sort (compressed rows).

    Parameters
    ----------
    n : int
        The number of keys (activities).
    keys : numpy.ndarray
        ``int64``, one key in ``0 .. n-1`` per link.

    Returns
    -------
    ptr : numpy.ndarray
        ``int64``, shape ``(n + 1,)``: the links of key ``v`` are ``links[ptr[v]:ptr[v + 1]]``.
    links : numpy.ndarray
        ``int64`` link numbers grouped by key, in input order within a key.

    Notes
    -----
    The module docstring has an example (doctests do not collect a :class:`Kernel`'s own
    docstring).
    """
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


@Kernel
def link_gaps(
    f_ptr, f_pred, f_type, f_lag, f_link, lag_on_pred, point_kind, start_read, early_finish, calendar, table, gaps
):
    """Measure per link how far the successor's point lies after the bound the link sets.

    The successor's point is its ``start_read`` or its ``early_finish`` (its finish for FF
    and SF links), in the successor's work days; every link counts, whatever the
    activities' status.

    Parameters
    ----------
    f_ptr, f_pred, f_type, f_lag, f_link : numpy.ndarray
        The forward stream of :class:`delay.network.PassLayout`.
    lag_on_pred : bool
        Whether a lag counts on the predecessor's calendar (else the successor's).
    point_kind, start_read, early_finish, calendar : numpy.ndarray
        By position: how each activity is scheduled, its start as read and early finish
        (boundaries), and its calendar number.
    table : numpy.ndarray
        The packed calendar tables (:meth:`delay.calendars.CalendarSet.table`).
    gaps : numpy.ndarray
        ``int64``, shape ``(m,)``: written by link number.

    Returns
    -------
    int
        :data:`OK`, or :data:`TOO_EARLY` / :data:`TOO_LATE` when a calendar look-up fell
        outside the tables: the caller grows them on that side
        (:meth:`delay.calendars.CalendarSet.grow`) and runs the pass again.
    """
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
                bound = _bound_across(
                    point, _reads_as_finish(point_kind[p], reads_finish), f_lag[j], lag_on_pred, calendar[p], c, table
                )
                if bound == _LOW:
                    return TOO_EARLY
                if bound == _HIGH:
                    return TOO_LATE
            else:
                bound = point + f_lag[j]
            gaps[f_link[j]] = target - bound
    return OK
