"""Computed dates stay within the dates the toolkit works with (1900-01-01 to 2200-12-31).

Every date a case gives is checked against these bounds when the case is loaded, and every
duration, lag and number of days against :data:`delay.model.LARGEST_DAYS`. A schedule can
still run past 2200 when long activities follow one another (a hundred activities of
36,500 work days each) or a what-if adds days to them. The engine then stops with one
:class:`~delay.errors.CaseError` that names the snapshot, the activity at the far end and
the largest durations and lags on the chain that drives it, instead of following the
dates for centuries or failing deep inside a date conversion.

The chain is found by a forward pass in plain work-day counts (calendars, data date and
progress set aside): that is enough to say which inputs make the dates run away, and it
is only run on the way to the error.
"""

from __future__ import annotations

import numpy as np

from .errors import DateBoundError, Problem
from .model import FIRST_DATE, LAST_DATE

__all__ = [
    "FIRST_DAY",
    "LAST_DAY",
    "grow_within_bounds",
    "check_finish_days",
    "check_late_days",
    "runaway_error",
    "driving_chain",
]

#: Day numbers (days since 1970-01-01) of the first and last date the toolkit computes.
FIRST_DAY = int(np.datetime64(FIRST_DATE, "D").astype(np.int64))
LAST_DAY = int(np.datetime64(LAST_DATE, "D").astype(np.int64))

_FS, _SS, _FF, _SF = 0, 1, 2, 3
_LISTED = 3  # the largest durations and lags named in the problem


def driving_chain(model) -> tuple[int, list[int], list[int]]:
    """Find the chain of activities and links that finishes furthest, counted in work days.

    A forward pass in plain work-day counts from 0: each activity starts at the latest
    point its links set (the strictly latest link drives it), durations are the remaining
    ones where given, milestones count 0, and calendars, the data date, constraints and
    actual dates are set aside.

    Parameters
    ----------
    model : ScheduleModel
        A :class:`delay.cpm.ScheduleModel` (its network, durations and remaining
        durations are read; calendars, the data date and actual dates are not).

    Returns
    -------
    (int, list of int, list of int)
        The activity at the far end, the activities of its driving chain from the first
        to the far end, and the links between them (activity and link numbers).

    Examples
    --------
    A chain A -> B -> C of 5, 10 and 2 work days with a 3-day lag on B -> C finishes C
    at 5 + 10 + 3 + 2 = 20: the far end is C and its chain runs through both links. The
    function reads only the model's network, durations, remaining durations and kinds:

    >>> from types import SimpleNamespace
    >>> from delay.network import build_network
    >>> network = build_network(np.array(["A", "B", "C"], dtype=object), [0, 1], [1, 2], [0, 0], [0, 3])
    >>> model = SimpleNamespace(
    ...     network=network, duration=np.array([5, 10, 2]), remaining=np.full(3, np.nan), kind=np.zeros(3)
    ... )
    >>> driving_chain(model)
    (2, [0, 1, 2], [0, 1])
    """
    net = model.network
    n = net.size
    remaining = np.asarray(model.remaining, dtype=np.float64)
    given = ~np.isnan(remaining)
    length = np.where(given, np.nan_to_num(remaining), model.duration).astype(np.int64)
    length = np.where(np.asarray(model.kind) != 0, 0, length).tolist()
    start = [0] * n
    driver = [-1] * n
    pred, kind, lag = net.pred.tolist(), net.link_type.tolist(), net.lag.tolist()
    in_ptr, in_link = net.in_ptr.tolist(), net.in_link.tolist()
    # Only on the way to an error: a plain loop over the logic in topological order.
    for v in net.order.tolist():
        best, best_link = 0, -1
        for at in range(in_ptr[v], in_ptr[v + 1]):
            link = in_link[at]
            p = pred[link]
            point = start[p] + (length[p] if kind[link] in (_FS, _FF) else 0) + lag[link]
            if kind[link] in (_FF, _SF):
                point -= length[v]
            if point > best:
                best, best_link = point, link
        start[v], driver[v] = best, best_link
    finish = np.asarray(start, dtype=np.int64) + np.asarray(length, dtype=np.int64)
    far = int(np.argmax(finish)) if n else 0
    activities, links = [far], []
    while n and driver[activities[-1]] >= 0:
        links.append(driver[activities[-1]])
        activities.append(pred[links[-1]])
    return far, activities[::-1], links[::-1]


def _largest(values: list[tuple[int, str]], unit: str) -> str:
    chosen = sorted((v for v in values if v[0] > 0), key=lambda v: -v[0])[:_LISTED]
    return ", ".join(f"{name} ({value:,} {unit})" for value, name in chosen)


def runaway_error(model, earlier: bool) -> DateBoundError:
    """Describe the problem of a schedule whose dates would leave 1900-01-01 .. 2200-12-31.

    Parameters
    ----------
    model : ScheduleModel
        The :class:`delay.cpm.ScheduleModel` being scheduled.
    earlier : bool
        ``True`` when a date would fall before 1900-01-01 (late dates behind a constraint),
        ``False`` when after 2200-12-31.

    Returns
    -------
    DateBoundError
        One problem naming the snapshot, the activity at the far end of the driving chain
        (:func:`driving_chain`), the chain's three largest durations and lags (work days)
        and what to check; the caller raises it.
    """
    net = model.network
    far, chain, links = driving_chain(model)
    ids = net.ids
    duration = np.asarray(model.duration)
    durations = _largest([(int(duration[v]), str(ids[v])) for v in chain], "work days")
    lags = _largest([(int(net.lag[k]), f"{ids[net.pred[k]]}>{ids[net.succ[k]]}") for k in links], "work days")
    total = sum(int(duration[v]) for v in chain) + sum(max(0, int(net.lag[k])) for k in links)
    where = f"snapshot '{model.label}'" if model.label else "the snapshot"
    side = "before 1900-01-01" if earlier else "after 2200-12-31"
    if earlier:
        message = (
            f"the late dates would fall {side}, outside the dates the toolkit works "
            f"with: the logic behind a finish constraint is too long"
        )
    else:
        message = (
            f"the schedule would run {side}, outside the dates the toolkit works with: "
            f"activity '{ids[far]}' ends a chain of {len(chain):,} "
            f"{'activity' if len(chain) == 1 else 'activities'} holding about "
            f"{total:,} work days"
        )
    if durations:
        message += f"; its longest durations are {durations}"
    if lags:
        message += f"; its longest lags are {lags}"
    fix = (
        "check these durations and lags (a value in the wrong unit or with an extra digit), "
        "or the days a what-if or an event adds to them"
    )
    column = "duration" if durations or not lags else "lag"
    return DateBoundError(earlier, Problem(file=where, message=message, fix=fix, column=column))


def grow_within_bounds(model, calendars, earlier: bool) -> None:
    """Grow ``calendars`` for a pass over ``model``, or raise :func:`runaway_error` at a bound.

    Parameters
    ----------
    model : ScheduleModel
        The model being scheduled (named in the error).
    calendars : CalendarSet
        The calendar set whose horizon is too short for the pass.
    earlier : bool
        ``True`` to grow the horizon backwards (a date before its first), ``False``
        forwards.

    Raises
    ------
    DateBoundError
        When the horizon is already at its bound on that side.
    """
    try:
        calendars.grow(earlier=earlier)
    except DateBoundError:
        raise runaway_error(model, earlier) from None


def check_finish_days(model, finish_day: np.ndarray) -> None:
    """Raise :func:`runaway_error` when an early finish falls after 2200-12-31.

    Parameters
    ----------
    model : ScheduleModel
        The model scheduled (named in the error).
    finish_day : numpy.ndarray
        The forward pass's finish day numbers (days since 1970-01-01).

    Raises
    ------
    DateBoundError
        When a finish day of the forward pass lies beyond :data:`LAST_DAY`.
    """
    if finish_day.size and int(finish_day.max()) > LAST_DAY:
        raise runaway_error(model, False)


def check_late_days(model, calendars, late_start: np.ndarray) -> None:
    """Raise :func:`runaway_error` when a late date of the backward pass falls before 1900-01-01.

    The earliest late boundary is turned into a date on every calendar of the set (a
    calendar's dates rise with its boundaries, so no activity's late date is earlier than
    that one on its own calendar); only when one of them falls before the bound are the
    activities' own calendars looked at. A few look-ups per run beside the passes.

    Parameters
    ----------
    model : ScheduleModel
        The model scheduled (its activities' calendars are read).
    calendars : CalendarSet
        The calendar set of the passes.
    late_start : numpy.ndarray
        The backward pass's late start boundaries (work-day indices on each activity's
        calendar).

    Raises
    ------
    DateBoundError
        When the earliest late date lies before :data:`FIRST_DAY`, or so far back that the
        calendars cannot reach it.
    """
    if not late_start.size:
        return
    every = np.arange(len(calendars), dtype=np.int64)
    # A milestone's date is read from the boundary before it: one work day earlier.
    lowest = int(late_start.min()) - 1
    try:
        if int(calendars.day_of(every, np.full(every.size, lowest)).min()) >= FIRST_DAY:
            return
    except DateBoundError:
        pass  # too early on some calendar: look at the activities' own calendars
    try:
        calendar = np.asarray(model.calendar)
        numbers = np.unique(calendar)
        own = [int(late_start[calendar == number].min()) - 1 for number in numbers]
        days = calendars.day_of(numbers, np.asarray(own, dtype=np.int64))
    except DateBoundError:
        raise runaway_error(model, True) from None
    if int(days.min()) < FIRST_DAY:
        raise runaway_error(model, True)
