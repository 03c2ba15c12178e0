"""Tracing the chain of activities that drives an activity, through early and actual dates.

The CPM engine marks driving links on early dates (relative float 0). A forensic trace has
to go further back than the data date, through work that has happened: there the driving
predecessor is the one whose recorded point, plus the link, lies closest to the activity's
actual start (or finish, for FF and SF links). :func:`driving_predecessors` applies the
right rule for each activity; :func:`explore` follows every tied predecessor back from a set
of activities to where the trace must stop.

Ties are ordered by least gap, then an FS link before the others, then input order; callers
that need one chain take the first.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .cpm import COMPLETE, IN_PROGRESS, NOT_STARTED, ScheduleResult

__all__ = ["DrivingGraph", "DrivingTable", "driving_predecessors", "driving_table", "explore"]


def driving_predecessors(result: ScheduleResult, activity: int) -> list[tuple[int, int, int]]:
    """Find the tied driving predecessors of one activity.

    - not started: the links with relative float 0 on early dates;
    - in progress: those driving its remaining work (retained logic); when none does, the
      links closest to its actual start (least absolute gap);
    - complete: the links closest to its actual dates (least absolute gap).

    An empty list means nothing in the logic drives the activity (it is driven by the data
    date, a constraint, or it is an open start).

    Parameters
    ----------
    result : ScheduleResult
        A scheduled snapshot.
    activity : int
        The activity's number in the result's network.

    Returns
    -------
    list of tuple of (int, int, int)
        ``(predecessor, link, gap)`` per tied predecessor: its activity number, the link's
        number and the gap (work days of the activity's calendar,
        :attr:`~delay.cpm.ScheduleResult.link_gaps`; 0 for a link driving on early dates),
        ordered by an FS link first, then input order.

    Examples
    --------
    >>> from delay.cpm import schedule
    >>> result = schedule(demo)
    >>> found = driving_predecessors(result, int(result.model.network.index_of("SUB-CLEARANCE")[0]))
    >>> [(str(result.ids[pred]), gap) for pred, link, gap in found]
    [('SET-HOARDING', 0)]
    """
    net = result.model.network
    links = net.in_link[net.in_ptr[activity] : net.in_ptr[activity + 1]]
    if not links.size:
        return []
    status = result.status[activity]
    order = result.model.link_order if result.model.link_order is not None else np.arange(net.link_count)
    if status != COMPLETE:
        driving = links[result.driving_link[links]]
        if status == IN_PROGRESS:
            reads_start = (net.link_type[driving] == 1) | (net.link_type[driving] == 3)
            driving = driving[~(reads_start & (result.status[net.pred[driving]] == IN_PROGRESS))]
        if driving.size or status == NOT_STARTED:
            ranked = driving[np.lexsort((order[driving], net.link_type[driving] != 0))]
            return [(int(net.pred[e]), int(e), 0) for e in ranked]
    gaps = result.link_gaps[links]
    closest = np.abs(gaps).min()
    tied = links[np.abs(gaps) == closest]
    ranked = tied[np.lexsort((order[tied], net.link_type[tied] != 0))]
    return [(int(net.pred[e]), int(e), int(result.link_gaps[e])) for e in ranked]


@dataclass(frozen=True)
class DrivingTable:
    """The tied driving predecessors of every activity of a schedule, on arrays.

    Made by :func:`driving_table`. The predecessors of activity ``v`` are the entries
    ``ptr[v]`` to ``ptr[v + 1]``, in tie order.

    Parameters
    ----------
    ptr : numpy.ndarray
        Offsets, shape ``(n + 1,)``.
    pred : numpy.ndarray
        Each entry's predecessor (its activity number).
    link : numpy.ndarray
        Each entry's link number.
    gap : numpy.ndarray
        Each entry's gap, as :func:`driving_predecessors` gives it.
    """

    ptr: np.ndarray
    pred: np.ndarray
    link: np.ndarray
    gap: np.ndarray

    def of(self, activity: int) -> list[tuple[int, int, int]]:
        """Give the entries of one activity, as :func:`driving_predecessors` gives them.

        Parameters
        ----------
        activity : int
            The activity's number in the schedule's network.

        Returns
        -------
        list of tuple of (int, int, int)
            ``(predecessor, link, gap)`` per tied predecessor, in tie order.
        """
        at = slice(int(self.ptr[activity]), int(self.ptr[activity + 1]))
        return list(zip(self.pred[at].tolist(), self.link[at].tolist(), self.gap[at].tolist()))


def driving_table(result: ScheduleResult) -> DrivingTable:
    """Find the tied driving predecessors of every activity at once, on arrays.

    The same rule as :func:`driving_predecessors`, applied to every link in a few whole-array
    operations instead of one activity at a time; :func:`explore` reads it. Computed once
    per schedule (:func:`delay.memo.remembered`).

    Parameters
    ----------
    result : ScheduleResult
        A scheduled snapshot.

    Returns
    -------
    DrivingTable
        Every activity's tied driving predecessors, in the order of
        :func:`driving_predecessors`.

    Examples
    --------
    >>> from delay.cpm import schedule
    >>> result = schedule(demo)
    >>> v = int(result.model.network.index_of("SUB-CLEARANCE")[0])
    >>> driving_table(result).of(v) == driving_predecessors(result, v)
    True
    """
    from .memo import remembered

    return remembered(result, ("driving table",), lambda: _driving_table(result))


def _driving_table(result: ScheduleResult) -> DrivingTable:
    net = result.model.network
    n = net.size
    links = np.asarray(net.in_link, dtype=np.int64)
    counts = np.diff(net.in_ptr)
    succ = np.repeat(np.arange(n), counts)  # the successor of each entry (in_link is grouped by it)
    status = result.status[succ]
    kind = net.link_type[links]
    pred = net.pred[links]
    order = result.model.link_order if result.model.link_order is not None else np.arange(net.link_count)
    reads_start = (kind == 1) | (kind == 3)
    # Not complete: the links driving on early dates; in progress, less those reading the
    # start of a predecessor in progress.
    early = (status != COMPLETE) & result.driving_link[links]
    early &= ~((status == IN_PROGRESS) & reads_start & (result.status[pred] == IN_PROGRESS))
    has_early = np.bincount(succ[early], minlength=n) > 0
    on_early = (status == NOT_STARTED) | ((status == IN_PROGRESS) & has_early[succ])
    # Else (complete, or in progress with no link driving its remaining work): the links
    # closest to the actual dates, least absolute gap.
    gaps = np.asarray(result.link_gaps[links], dtype=np.int64)
    distance = np.abs(gaps)
    closest = np.zeros(n, dtype=np.int64)
    some = counts > 0
    if links.size:
        closest[some] = np.minimum.reduceat(distance, net.in_ptr[:-1][some])
    keep = np.where(on_early, early, distance == closest[succ])
    chosen = np.flatnonzero(keep)
    chosen = chosen[np.lexsort((order[links[chosen]], kind[chosen] != 0, succ[chosen]))]
    ptr = np.zeros(n + 1, dtype=np.int64)
    np.cumsum(np.bincount(succ[chosen], minlength=n), out=ptr[1:])
    gap = np.where(on_early[chosen], 0, gaps[chosen])
    return DrivingTable(ptr, pred[chosen].astype(np.int64), links[chosen], gap)


@dataclass(frozen=True)
class DrivingGraph:
    """Activities reached backwards from the seeds through tied driving predecessors.

    Made by :func:`explore`.

    Parameters
    ----------
    seeds : tuple of int
        The activity numbers the trace started from.
    parents : dict of int to list of tuple of (int, int, int)
        For every activity explored, its :func:`driving_predecessors`:
        ``(predecessor, link, gap)`` in tie order.
    stopped : frozenset of int
        The activities where the trace ended because ``stop`` said so (not explored).
    capped : bool
        Whether the exploration reached its size limit before it was done.
    """

    seeds: tuple[int, ...]
    parents: dict[int, list[tuple[int, int, int]]]
    stopped: frozenset[int]
    capped: bool


def explore(result: ScheduleResult, seeds, stop: np.ndarray, limit: int = 20000) -> DrivingGraph:
    """Follow every tied driving predecessor back from ``seeds``.

    Parameters
    ----------
    result : ScheduleResult
        A scheduled snapshot.
    seeds : iterable of int
        Activity numbers to start from (those finishing at completion, usually).
    stop : numpy.ndarray
        Boolean array, shape ``(n,)``: the trace ends at these activities (they are
        recorded in ``stopped`` and not explored further).
    limit : int, default 20000
        At most this many activities are explored; the graph is ``capped`` beyond.

    Returns
    -------
    DrivingGraph
        The activities explored with their driving predecessors.

    Examples
    --------
    >>> from delay.cpm import schedule
    >>> result = schedule(demo)
    >>> ends = np.flatnonzero(result.finish_day == result.completion_day)
    >>> graph = explore(result, ends, stop=np.zeros(result.model.network.size, dtype=bool))
    >>> len(graph.parents) == len(result.driving_path()), graph.capped
    (True, False)
    """
    table = driving_table(result)
    parents: dict[int, list[tuple[int, int, int]]] = {}
    stopped: set[int] = set()
    pending = [int(s) for s in seeds]
    capped = False
    while pending:
        v = pending.pop()
        if v in parents or v in stopped:
            continue
        if stop[v]:
            stopped.add(v)
            continue
        if len(parents) >= limit:
            capped = True
            break
        found = table.of(v)
        parents[v] = found
        pending.extend(p for p, _, _ in found)
    return DrivingGraph(tuple(int(s) for s in seeds), parents, frozenset(stopped), capped)
