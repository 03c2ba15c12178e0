"""The work-day ledger: delay charged along a driving chain in work days of one calendar,
and the movement of completion split into calendar days.

The windows analysis (:mod:`delay.methods.windows`) and the as-planned versus as-built
comparison (:mod:`delay.methods.asbuilt`) both ask the same question of two schedules of
the works, *before* and *after*: which activities on the chain that drives a target
activity (the project's completion activity, or a section's completion milestone) in
*after* made it move, and by how much. This module answers it once for both.

Lateness
--------
Each activity's late finish in *before* comes from a backward pass over logic alone from the
target's own finish in *before* (:func:`logic_late_finish`): ``latest_finish`` and ``fixed_*``
constraints and the ``float_to`` setting are ignored, so a milestone constraint (which moves
no forward date) moves no figure, and an activity that does not lead to the target has no
late date for it. An activity's *level* in *after* is counted in work days of the *ledger
calendar* (that of the project's completion activity):

- its finish in *after* past its late finish in *before*: delay beyond its float;
- less, where it finishes before its early finish in *before*, the work days it gained;
- zero in between: slipping into its own float is neither delay nor gain.

So the target's level is exactly its movement in ledger work days, and float that an
activity off the driving chain absorbs is charged nothing (float is shared, first come, first
served: SCL Delay and Disruption Protocol, 2nd edition (2017), core principle 7, as
recalled).

Charges
-------
The chain is traced back from the target through driving predecessors (on early dates, then
on actual dates: :func:`delay.tracing.explore`) to an activity where the trace must stop (in
a window: one complete before it started), whose level counts as zero. At a tie the
predecessor with the greatest level is taken, then an FS link, then input order. Each
activity of the chain is charged its level less its driving predecessor's, so the charges
telescope exactly to the target's movement. An activity whose start gap behind its driving
predecessor (the same link, in *before* and in *after*) and whose duration (work days of its
own calendar from start to finish) did not change only carried an earlier delay: it is
charged nothing, and what its level differs by (non-working days of another calendar, a
weekend, a shutdown) goes to the nearest activity upstream on the chain that did change (or,
failing one, the nearest downstream). Activities of tied driving paths beside the chain are
listed with their own charges as concurrency groups; they are not counted.

Calendar days
-------------
A movement in calendar days is split among ordered steps of work days (the counted charges
in path order, then, in a window, its revision kinds) by walking the ledger calendar: from
the first completion date, each step moves the position by its work days and takes the
calendar days between the dates of its two positions; the first and last positions are the
two completion dates themselves, so the split adds up exactly (:func:`split_days`).

References
----------
AACE International Recommended Practice 29R-03, Forensic Schedule Analysis (2011), MIP 3.1 to
3.4 (observational methods: as-planned versus as-built and contemporaneous windows) and
section 4 on float and the critical path (as recalled); SCL Delay and Disruption Protocol,
2nd edition (2017), Part B, time slice windows and as-planned versus as-built windows
analysis (as recalled). Counting delay on the critical path in work days is common practice.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from .convert import NO_DAY
from .cpm import TASK, ScheduleResult
from .errors import ReconciliationError
from .tracing import explore

__all__ = [
    "CHARGE_COLUMNS",
    "Levels",
    "logic_late_finish",
    "levels",
    "trace_charges",
    "split_days",
    "ledger_number",
]

#: Columns of a traced chain's charges (:func:`trace_charges`).
CHARGE_COLUMNS = [
    "activity",
    "name",
    "work_days",
    "level",
    "counted",
    "inherited",
    "driving_predecessor",
    "group",
    "concurrent_with",
]


def ledger_number(result: ScheduleResult, activity: str) -> int:
    """Give the number of the ledger calendar in ``result``'s calendar set.

    The ledger calendar is the base calendar of ``activity`` (the calendar it was derived
    from, when a hold gave it one of its own), or the default calendar when the activity
    is absent.

    Parameters
    ----------
    result : ScheduleResult
        A scheduled snapshot.
    activity : str
        The id of the target activity (the project's completion activity, usually).

    Returns
    -------
    int
        A calendar number of ``result.model.calendars``.

    Examples
    --------
    >>> from delay.cpm import schedule
    >>> result = schedule(demo)
    >>> number = ledger_number(result, "MS-COMPLETION")
    >>> result.model.calendars.names[number]
    'site5'
    """
    model = result.model
    k = int(model.network.index_of([activity])[0])
    if k < 0:
        return int(model.calendars.number[model.settings.default_calendar])
    return int(model.calendars.base_of(int(model.calendar[k]))[0])


def logic_late_finish(result: ScheduleResult, target: int) -> np.ndarray:
    """Compute late finish and late start day numbers by logic alone, from the finish of ``target``.

    The activities from which a chain of links leads to ``target`` are scheduled again
    without the ``latest_finish`` and ``fixed_*`` constraints, their backward pass starting
    from ``target``'s finish in ``result`` (:meth:`delay.cpm.ScheduleModel.logic_only`).

    Parameters
    ----------
    result : ScheduleResult
        A scheduled snapshot.
    target : int
        Activity number whose finish in ``result`` the backward pass starts from.

    Returns
    -------
    numpy.ndarray
        ``int64`` day numbers, shape ``(2, n)``: late finishes, then late starts;
        :data:`delay.cpm.NO_DAY` for an activity that is complete or from which no chain of
        links leads to ``target`` (for every activity when ``target`` is complete).

    Examples
    --------
    >>> from delay.cpm import schedule
    >>> result = schedule(demo)
    >>> target = int(result.model.network.index_of("MS-COMPLETION")[0])
    >>> late = logic_late_finish(result, target)
    >>> late.shape, bool(late[0, target] == result.finish_day[target])
    ((2, 263), True)
    """
    model = result.model
    net = model.network
    late = np.full((2, net.size), NO_DAY, dtype=np.int64)
    if result.status[target] == 2:  # complete: nothing is late for it any more
        return late
    keep = net.upstream([target])
    sub = model.restricted(keep).logic_only(int(result.finish_day[target])).run()
    late[0, np.flatnonzero(keep)] = sub.day_array("late_finish")
    late[1, np.flatnonzero(keep)] = sub.day_array("late_start")
    return late


@dataclass(frozen=True)
class Levels:
    """Each activity's levels in *after* against *before*, made by :func:`levels`.

    A link that reads a predecessor's start (SS, SF) passes on its start level; the other
    links its level at its finish.

    Parameters
    ----------
    level : numpy.ndarray
        Per activity of *after*: its level at its finish, in ledger work days (``NaN``
        where *before* gives no late date).
    start_level : numpy.ndarray
        Its level at its start, likewise.
    before_number : numpy.ndarray
        Its activity number in *before* (``-1`` when absent).
    span_change : numpy.ndarray
        Its duration's growth against *before*, in work days of its own calendar from
        start to finish (0 when the same; 0 for a milestone).
    """

    level: np.ndarray
    start_level: np.ndarray
    before_number: np.ndarray
    span_change: np.ndarray


def _ledger_index(result: ScheduleResult, ledger: int, days: np.ndarray, start: bool = False) -> np.ndarray:
    """Work-day indices on the ledger calendar: of the last work day on or before each day
    (a finish), or with ``start`` of the first on or after it; 0 for :data:`NO_DAY`."""
    days = np.asarray(days, dtype=np.int64)
    out = np.zeros(days.size, dtype=np.int64)
    known = days != NO_DAY
    if known.any():
        cals = result.model.calendars
        convert = cals.start_index_days if start else cals.finish_index_days
        out[known] = convert(np.full(int(known.sum()), ledger), days[known])
    return out


def _spans(result: ScheduleResult, rows: np.ndarray) -> np.ndarray:
    """Work days of the own calendar of each activity of ``rows`` from its start to its
    finish (0 for a milestone)."""
    model = result.model
    start = result.day_array("early_start")[rows]
    finish = result.day_array("early_finish")[rows]
    known = np.flatnonzero((start != NO_DAY) & (finish != NO_DAY))
    span = np.zeros(start.size, dtype=np.int64)
    if known.size:
        cals = model.calendars
        calendar = model.calendar[rows[known]]
        span[known] = (
            cals.finish_index_days(calendar, finish[known]) + 1 - cals.start_index_days(calendar, start[known])
        )
    return np.where((result.point[rows] == TASK) & (model.kind[rows] == TASK), np.maximum(span, 0), 0)


def _level(
    after: ScheduleResult, ledger: int, now: np.ndarray, late: np.ndarray, early: np.ndarray, start: bool
) -> np.ndarray:
    """``max(0, now - late) + min(0, now - early)`` in ledger work days; NaN without a late
    date."""
    known = late != NO_DAY
    here = _ledger_index(after, ledger, now, start)
    past_late = here - _ledger_index(after, ledger, late, start)
    past_early = here - _ledger_index(after, ledger, early, start)
    return np.where(known, np.maximum(past_late, 0) + np.minimum(past_early, 0), np.nan).astype(np.float64)


def levels(
    after: ScheduleResult, before: ScheduleResult, late_before: np.ndarray, ledger: int, rows: np.ndarray | None = None
) -> Levels:
    """Compute each activity's levels in ``after`` against ``before`` (see the module docstring).

    Parameters
    ----------
    after : ScheduleResult
        The later of two schedules of the works (for example a window's half-step, or the
        as-built record).
    before : ScheduleResult
        The earlier (the window's first snapshot, or the baseline).
    late_before : numpy.ndarray
        Late finish and late start day numbers in ``before`` by logic alone
        (:func:`logic_late_finish`), aligned with ``before``'s activities.
    ledger : int
        Number of the ledger calendar in ``after``'s calendar set (the same number in
        ``before``'s: derived sets keep every calendar's number).
    rows : numpy.ndarray, optional
        Compute the levels of these activities of ``after`` only (the others get no level,
        ``NaN``, and no duration's growth, 0); by default of every activity.

    Returns
    -------
    Levels
        The levels, aligned with ``after``'s activities.

    Examples
    --------
    The completion activity's level is its movement in ledger work days:

    >>> from delay.cpm import schedule
    >>> before, after = schedule(demo, "baseline"), schedule(demo, "2025-06-30")
    >>> late = logic_late_finish(before, int(before.model.network.index_of("MS-COMPLETION")[0]))
    >>> found = levels(after, before, late, ledger_number(before, "MS-COMPLETION"))
    >>> before.completion, after.completion, float(found.level[after.model.network.index_of("MS-COMPLETION")[0]])
    (datetime.date(2026, 5, 19), datetime.date(2026, 6, 1), 8.0)
    """
    position = before.model.network.index_of(after.ids)
    every = rows is None
    rows = np.arange(position.size) if every else np.asarray(rows, dtype=np.int64)
    present = position[rows] >= 0
    safe = np.maximum(position[rows], 0)

    def aligned(values: np.ndarray) -> np.ndarray:
        return np.where(present, values[safe], NO_DAY)

    finish = _level(after, ledger, after.finish_day[rows], aligned(late_before[0]), aligned(before.finish_day), False)
    start = _level(
        after,
        ledger,
        after.day_array("early_start")[rows],
        aligned(late_before[1]),
        aligned(before.day_array("early_start")),
        True,
    )
    change = np.where(present, _spans(after, rows) - _spans(before, safe), 0)
    if every:
        return Levels(finish, start, position, change)
    whole = {"finish": np.full(position.size, np.nan), "start": np.full(position.size, np.nan)}
    whole["finish"][rows], whole["start"][rows] = finish, start
    whole["change"] = np.zeros(position.size, dtype=np.int64)
    whole["change"][rows] = change
    return Levels(whole["finish"], whole["start"], position, whole["change"])


def _gap_changes(
    after: ScheduleResult, before: ScheduleResult, links: np.ndarray, before_number: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """How much the gap of each of ``links`` of ``after`` grew against the same link (same
    ends and type) in ``before``, in work days of the successor's calendar, and whether
    ``before`` has such a link; on arrays, each link's successor's links in ``before``
    searched together."""
    net, other = after.model.network, before.model.network
    links = np.asarray(links, dtype=np.int64)
    succ = before_number[net.succ[links]]
    pred = before_number[net.pred[links]]
    asked = np.flatnonzero((succ >= 0) & (pred >= 0))
    first = other.in_ptr[succ[asked]]
    counts = other.in_ptr[succ[asked] + 1] - first
    query = np.repeat(np.arange(asked.size), counts)  # one row per link of a successor in before
    offset = np.arange(query.size) - np.repeat(np.cumsum(counts) - counts, counts)
    candidate = other.in_link[first[query] + offset]
    same = (other.pred[candidate] == pred[asked][query]) & (
        other.link_type[candidate] == net.link_type[links[asked]][query]
    )
    match = np.full(links.size, -1, dtype=np.int64)
    hit = np.flatnonzero(same)[::-1]  # assigned last to first, so that the first match stays
    match[asked[query[hit]]] = candidate[hit]
    known = match >= 0
    change = np.zeros(links.size, dtype=np.int64)
    change[known] = after.link_gaps[links[known]] - before.link_gaps[match[known]]
    return change, known


def trace_charges(
    after: ScheduleResult, before: ScheduleResult, late_before: np.ndarray, target: str, stop: np.ndarray, ledger: int
) -> pd.DataFrame:
    """Charge the movement of ``target`` along its driving chain in ``after``.

    Parameters
    ----------
    after : ScheduleResult
        The later schedule, as for :func:`levels`.
    before : ScheduleResult
        The earlier schedule.
    late_before : numpy.ndarray
        Late finish and late start day numbers in ``before`` by logic alone
        (:func:`logic_late_finish`).
    target : str
        The id of the activity whose movement is explained; no charges (an empty table)
        when it is not in ``after`` or ``stop`` holds it.
    stop : numpy.ndarray
        Boolean array over ``after``'s activities: the trace ends at these (their level
        counts as zero).
    ledger : int
        Number of the ledger calendar, as for :func:`levels`.

    Returns
    -------
    DataFrame
        Columns :data:`CHARGE_COLUMNS`, one row per activity explored: the counted chain
        first, in path order (its ``work_days`` add up to the target's level, its
        movement), then the activities of tied paths beside it. ``inherited`` marks an
        activity that only carried an earlier delay (charged nothing); ``group`` numbers a
        concurrency group (``<NA>`` outside one), ``concurrent_with`` lists its other
        members.

    Raises
    ------
    ReconciliationError
        When the counted charges do not add up to the target's level.

    References
    ----------
    AACE International Recommended Practice 29R-03 (2011), MIP 3.1 to 3.4; SCL Delay and
    Disruption Protocol, 2nd edition (2017), core principle 7 on float (both as recalled).

    Examples
    --------
    From the baseline to the update of 2025-06-30 the completion moved 8 work days, all
    charged to the facade design information (ENV-DESIGN):

    >>> from delay.cpm import schedule
    >>> before, after = schedule(demo, "baseline"), schedule(demo, "2025-06-30")
    >>> late = logic_late_finish(before, int(before.model.network.index_of("MS-COMPLETION")[0]))
    >>> nothing_stops = np.zeros(after.model.network.size, dtype=bool)
    >>> charges = trace_charges(after, before, late, "MS-COMPLETION", nothing_stops, 0)
    >>> charges[charges["counted"] & (charges["work_days"] != 0)][["activity", "work_days"]].values.tolist()
    [['ENV-DESIGN', 8]]
    >>> int(charges.loc[charges["counted"], "work_days"].sum())
    8
    """
    net = after.model.network
    k = int(net.index_of([target])[0])
    empty = pd.DataFrame(columns=CHARGE_COLUMNS)
    if k < 0 or stop[k]:
        return empty
    graph = explore(after, [k], stop)
    at = np.asarray(list(set(graph.parents) | set(graph.stopped)), dtype=np.int64)
    at = at[np.argsort(net.rank[at], kind="stable")]  # in rank order: predecessors first
    nodes = at.tolist()
    found = levels(after, before, late_before, ledger, rows=at)  # of the activities explored only
    own_level = dict(zip(nodes, found.level[at].tolist()))  # NaN: no level of its own
    own_start_level = dict(zip(nodes, found.start_level[at].tolist()))
    graph_links = sorted({link for found_v in graph.parents.values() for _, link, _ in found_v})
    reads_start = dict(zip(graph_links, np.isin(net.link_type[graph_links], (1, 3)).tolist()))
    level: dict[int, float] = {}  # at the finish
    start_level: dict[int, float] = {}
    parent: dict[int, tuple[int, int] | None] = {}

    def passed(p: int, link: int) -> float:
        """What ``p`` passes on through ``link``: its start level through a link that reads
        its start (SS, SF), else its finish level."""
        return start_level[p] if reads_start[link] else level[p]

    for v in nodes:
        if v in graph.stopped:
            level[v] = start_level[v] = 0.0
            parent[v] = None
            continue
        options = [(p, link) for p, link, _ in graph.parents[v] if p in level]
        chosen = None
        if options:  # the greatest level passed on; among equals the first in tie order
            top = max(passed(p, link) for p, link in options)
            chosen = next(option for option in options if passed(*option) == top)
        parent[v] = chosen
        carried_in = passed(*chosen) if chosen is not None else 0.0
        own, own_start = own_level[v], own_start_level[v]
        level[v] = carried_in if own != own else own  # own != own: NaN
        start_level[v] = carried_in if own_start != own_start else own_start
    chain = [k]
    while parent.get(chain[-1]) is not None:
        chain.append(parent[chain[-1]][0])
    chain.reverse()
    chain = [v for v in chain if v not in graph.stopped]
    out = {v: level[v] for v in nodes}  # what each passes on along the chain
    for v, after_v in zip(chain[:-1], chain[1:]):
        out[v] = passed(v, parent[after_v][1])

    # The work days each activity itself added (its gap behind its driving predecessor and
    # its duration, against *before*); None when *before* cannot tell.
    driven = [v for v in nodes if parent.get(v) is not None and found.before_number[v] >= 0]
    changes: dict[int, int | None] = dict.fromkeys(nodes)
    if driven:
        gap, known = _gap_changes(after, before, [parent[v][1] for v in driven], found.before_number)
        span = found.span_change[np.asarray(driven, dtype=np.int64)]
        changes.update({v: int(g + c) if ok else None for v, g, c, ok in zip(driven, gap, span, known)})

    def own_change(v: int) -> int | None:
        return changes[v]

    def inherited(v: int) -> bool:
        return own_change(v) == 0

    raw = {v: out[v] - (passed(*parent[v]) if parent.get(v) is not None else 0.0) for v in nodes}
    carried = {v: inherited(v) for v in chain}
    charge = _absorb(chain, _redistribute(chain, raw, carried), {v: own_change(v) for v in chain})
    counted = set(chain)
    total = sum(charge[v] for v in chain)
    if chain and round(total) != round(level[k]):
        raise ReconciliationError(
            f"the driving chain of {target}", {"charges": round(total), "movement": round(level[k])}
        )
    off = [v for v in nodes if v not in counted and v not in graph.stopped]
    for v in off:
        charge[v] = 0.0 if inherited(v) else raw[v]
    group_number, concurrent = _groups(chain, off, graph, charge, k, net.ids)
    ids = net.ids
    rows = []
    for v in chain + off:
        chosen = parent.get(v)
        rows.append(
            {
                "activity": str(ids[v]),
                "name": after.model.names[v],
                "work_days": int(round(charge[v])),
                "level": int(round(out[v])),
                "counted": v in counted,
                "inherited": bool(carried.get(v, inherited(v))),
                "driving_predecessor": str(ids[chosen[0]]) if chosen is not None else "",
                "group": group_number.get(v),
                "concurrent_with": concurrent.get(v, []),
            }
        )
    frame = pd.DataFrame(rows, columns=CHARGE_COLUMNS)
    frame["group"] = frame["group"].astype("Int64")
    return frame


def _absorb(chain: list[int], charge: dict[int, float], own: dict[int, int | None]) -> dict[int, float]:
    """Float taken up along the chain cancels the delays it absorbed.

    A negative charge on an activity that did not itself gain (its gap and duration did not
    shrink) is float it had that took up an earlier delay: it cancels the latest positive
    charges upstream on the chain, and only what they cannot take stays. An activity's own
    gain (its gap and duration shrank) stays a negative charge, up to what it gained."""
    charge = dict(charge)
    open_delays: list[int] = []
    for v in chain:
        value = charge[v]
        if value > 0:
            open_delays.append(v)
            continue
        if value >= 0:
            continue
        gained = min(0, own[v]) if own[v] is not None else 0
        kept = max(value, gained)
        absorbed = kept - value  # > 0: float, not a gain
        while absorbed > 0 and open_delays:
            u = open_delays[-1]
            take = min(absorbed, charge[u])
            charge[u] -= take
            absorbed -= take
            if charge[u] <= 0:
                open_delays.pop()
        charge[v] = kept - absorbed
    return charge


def _redistribute(chain: list[int], raw: dict[int, float], carried: dict[int, bool]) -> dict[int, float]:
    """Charges along the chain: an activity that only carried a delay is charged nothing;
    its difference goes to the nearest activity upstream that did change, else the nearest
    downstream one, else (none changed) the first of the chain."""
    charge = {v: (0.0 if carried[v] else raw[v]) for v in chain}
    owners = [i for i, v in enumerate(chain) if not carried[v]]
    for i, v in enumerate(chain):
        if not carried[v] or not raw[v]:
            continue
        upstream = [j for j in owners if j < i]
        downstream = [j for j in owners if j > i]
        home = upstream[-1] if upstream else (downstream[0] if downstream else 0)
        charge[chain[home]] += raw[v]
    return charge


def _groups(chain: list[int], off: list[int], graph, charge: dict[int, float], seed: int, ids):
    """Concurrency groups: connected stretches of activities off the counted chain, with the
    stretch of the chain they run beside (from where they leave it to where they join).
    Gives each member's group number and the sorted ids of the other members of its groups."""
    position = {v: i for i, v in enumerate(chain)}
    neighbours: dict[int, set[int]] = {v: set() for v in off}
    for v in off:
        for p, _, _ in graph.parents.get(v, []):
            if p in neighbours:
                neighbours[v].add(p)
                neighbours[p].add(v)
    group_of: dict[int, int] = {}
    groups: list[list[int]] = []
    for v in off:
        if v in group_of:
            continue
        members, pending = [], [v]
        while pending:
            x = pending.pop()
            if x in group_of:
                continue
            group_of[x] = len(groups)
            members.append(x)
            pending.extend(y for y in neighbours[x] if y not in group_of)
        groups.append(members)
    diverge: list[list[int]] = [[] for _ in groups]
    merge: list[list[int]] = [[] for _ in groups]
    for v in off:
        for p, _, _ in graph.parents.get(v, []):
            if p in position:
                diverge[group_of[v]].append(position[p])
    for v in chain:
        for p, _, _ in graph.parents.get(v, []):
            if p in group_of:
                merge[group_of[p]].append(position[v])
    group_number: dict[int, int] = {}
    member_of: dict[int, list[list[int]]] = {}  # each activity's reported groups
    reported = 0
    for number, members in enumerate(groups):
        if seed in members:
            merge[number].append(len(chain))
        low = max(diverge[number]) + 1 if diverge[number] else 0
        high = min(merge[number]) if merge[number] else len(chain)
        stretch = chain[low:high] if high > low else []
        everyone = members + stretch
        if all(round(charge.get(v, 0.0)) == 0 for v in everyone):
            continue
        reported += 1
        for v in everyone:
            group_number[v] = reported
            member_of.setdefault(v, []).append(everyone)
    named: dict[int, list[str]] = {}  # each group's ids, sorted once
    concurrent: dict[int, list[str]] = {}
    for v, found in member_of.items():
        if len(found) == 1:  # one group: its sorted ids but v's own
            key = id(found[0])
            if key not in named:
                named[key] = sorted(str(ids[x]) for x in set(found[0]))
            own = str(ids[v])
            concurrent[v] = [x for x in named[key] if x != own]
        else:
            concurrent[v] = sorted(str(ids[x]) for x in set().union(*found) - {v})
    return group_number, concurrent


def split_days(first_day: int, last_day: int, steps, result: ScheduleResult, ledger: int) -> np.ndarray:
    """Calendar days of each step of work days, walking the ledger calendar.

    Parameters
    ----------
    first_day : int
        The completion date (day number) the steps lead from.
    last_day : int
        The completion date (day number) the steps lead to.
    steps : iterable of int
        Work days of each step, in order (positive: later).
    result : ScheduleResult
        A schedule whose calendar set holds the ledger calendar (only
        ``result.model.calendars`` is read).
    ledger : int
        The ledger calendar's number.

    Returns
    -------
    numpy.ndarray
        ``int64`` calendar days per step, adding up to ``last_day - first_day``.

    Raises
    ------
    ReconciliationError
        When the steps do not add up to the work days between the two dates.

    Examples
    --------
    Two steps of 1 and 2 work days from a Friday on a Monday-to-Friday calendar take 3 and
    2 calendar days (to Monday, then to Wednesday):

    >>> from types import SimpleNamespace
    >>> from delay.calendars import CalendarSet, WorkCalendar
    >>> from delay.convert import to_days
    >>> week = CalendarSet({"5d": WorkCalendar.from_weekdays("5d", anchor="2025-01-06")})
    >>> result = SimpleNamespace(model=SimpleNamespace(calendars=week))
    >>> friday, wednesday = (int(day) for day in to_days(["2025-01-10", "2025-01-15"]))
    >>> split_days(friday, wednesday, [1, 2], result, 0).tolist()
    [3, 2]
    """
    steps = np.asarray(list(steps), dtype=np.int64)
    cals = result.model.calendars
    start, end = (int(x) for x in cals.finish_index_days(np.array([ledger, ledger]), np.array([first_day, last_day])))
    if int(steps.sum()) != end - start:
        raise ReconciliationError(
            "the work-day ledger",
            {"work days of the steps": int(steps.sum()), "work days between the completions": end - start},
        )
    if not steps.size:
        return steps
    positions = start + np.cumsum(steps)
    dates = cals.day_of(np.full(positions.size, ledger), positions).astype(np.int64)
    dates = np.where(positions == start, first_day, np.where(positions == end, last_day, dates))
    dates[-1] = last_day
    return np.diff(np.concatenate([[first_day], dates]))
