"""Delay events as the methods see them: which activities an event names, which events
explain a charge on an activity, and who carries the risk of a charge no event explains.

The methods (:mod:`delay.methods`) charge days of delay to activities; this module states,
once, the rules that turn such a charge into causes. :mod:`delay.causation` then only
consumes the methods' results, so no module imports one that imports it back.

Matching a charge to events
---------------------------
- An event *names* an activity when its ``activities`` column lists it, or when one of its
  fragnet's links (fragnet_links.csv) ties into it as a programme activity.
- An event matches a charge on an activity in a period (a window: from the data date of
  the snapshot that starts it to the data date of the one that ends it, both included)
  when it names the activity and its own period (``start`` to ``finish``, both included)
  overlaps the charged period. An event that starts on the data date that ends a window
  matches that window: the update of that date may already show its effect.
- Several matching events share the charge as concurrent causes (``basis = "event"``).
- With no match, the charge goes to the activity's own ``risk`` column (``employer``,
  ``contractor`` or ``neutral``: for example employer-supplied information or free-issue
  items; ``basis = "risk"``), else to ``[analysis] unexplained_risk`` (default
  ``contractor``; ``basis = "unexplained"``). The contractor carries the risk of its own
  programme unless an event or the contract shifts it (common practice under most
  standard forms; the contract governs).
- The analyst may attribute one charge otherwise (attributions.csv: a window, an activity
  and an event or a party, with a reason): the attribution replaces the rule's answer
  (``basis = "analyst"``) and both are listed side by side, like a correction.

The project's completion activity
---------------------------------
``[project] completion_activity`` in case.toml, else the finish milestone that finishes last
in the baseline (else the activity that finishes last). Its calendar is the *ledger
calendar*: lateness and charges of the windows and as-built methods are counted in its
work days (:mod:`delay.ledger`).

References
----------
Society of Construction Law, Delay and Disruption Protocol, 2nd edition (2017), core
principle 3 (records) and Part B on identifying the causes of delay (as recalled). AACE
International Recommended Practice 29R-03 (2011), section 4.1 on the responsibility for a
delay (as recalled).
"""

from __future__ import annotations

import datetime as dt
import weakref
from collections.abc import Iterable, Sequence

import numpy as np
import pandas as pd

from .convert import split_ids
from .model import PARTIES, Case, Snapshot

__all__ = [
    "BASES",
    "CONCURRENT",
    "event_activities",
    "asbuilt_activities",
    "unexplained_risk",
    "activity_risk",
    "match_events",
    "events_naming",
    "attributions",
    "completion_activity",
]

#: How a charge's party was found: a matching event, the activity's risk column, the
#: unexplained-risk setting, or the analyst's attribution.
BASES = ("event", "risk", "unexplained", "analyst")
#: The ``party`` of a charge shared by events of several parties.
CONCURRENT = "concurrent"

MATCH_COLUMNS = ["activity", "events", "parties", "party", "basis"]


def event_activities(case: Case) -> dict[str, set[str]]:
    """Give the programme activity ids each event names.

    They are its ``activities`` and the programme activities its fragnet links tie into
    (a link end that is not one of the fragnet's own activities). Computed once per case
    (:func:`delay.memo.remembered`).

    Parameters
    ----------
    case : Case
        The loaded case.

    Returns
    -------
    dict of str to set of str
        Event id to a set of activity ids (every event of the register has an entry).

    Examples
    --------
    >>> sorted(event_activities(demo)["EV02"])  # a fragnet tied into SUB-PILE-TEST-B
    ['SUB-EXCAVATION-B', 'SUB-PILE-TEST-B', 'SUB-PILES-B']
    """
    from .memo import remembered

    return remembered(case, ("event activities",), lambda: _event_activities(case))


def _event_activities(case: Case) -> dict[str, set[str]]:
    events = case.events
    fragnet_links = case.fragnet_links
    fragnet_ids = set(case.fragnets["id"])
    named: dict[str, set[str]] = {}
    for event_id, activities in zip(events["id"].to_numpy(object), events["activities"].to_numpy(object)):
        named[event_id] = set(split_ids(activities))
    for event_id, pred, succ in zip(*(fragnet_links[c].to_numpy(object) for c in ("event", "pred", "succ"))):
        for activity in (pred, succ):
            if activity not in fragnet_ids:
                named.setdefault(event_id, set()).add(activity)
    return named


def asbuilt_activities(case: Case) -> dict[str, list[str]]:
    """The as-built activities in which each event shows, for the collapsed as-built.

    The event's ``asbuilt_activities`` column when given (case format v2: for example a
    fragnet the as-built record shows as one recorded activity of its own); else, for a
    fragnet event, its fragnet's activity ids; else its ``activities``.

    Parameters
    ----------
    case : Case
        The loaded case.

    Returns
    -------
    dict of str to list of str
        Event id to the list of activity ids, in the order given.

    Examples
    --------
    >>> found = asbuilt_activities(demo)
    >>> found["EV01"], found["EV02"]  # EV02's fragnet shows as one recorded activity
    (['SUB-EXCAVATION-A', 'SUB-EXCAVATION-B'], ['SUB-OBSTRUCTIONS'])
    """
    events = case.events
    given = events["asbuilt_activities"] if "asbuilt_activities" in events else pd.Series([""] * len(events))
    fragnets: dict[str, list[str]] = {}
    for event_id, activity in zip(case.fragnets["event"].to_numpy(object), case.fragnets["id"].to_numpy(object)):
        fragnets.setdefault(event_id, []).append(activity)
    found: dict[str, list[str]] = {}
    for event_id, impact, activities, shows in zip(events["id"], events["impact"], events["activities"], given):
        if split_ids(shows):
            found[event_id] = split_ids(shows)
        elif impact == "fragnet":
            found[event_id] = list(fragnets.get(event_id, []))
        else:
            found[event_id] = split_ids(activities)
    return found


def unexplained_risk(case: Case) -> str:
    """Tell who carries slippage that no event and no risk column explains.

    Parameters
    ----------
    case : Case
        The loaded case.

    Returns
    -------
    str
        ``[analysis] unexplained_risk`` of case.toml: ``employer``, ``contractor`` or
        ``neutral`` (``contractor`` when it is not set).

    Examples
    --------
    >>> unexplained_risk(demo)
    'contractor'
    """
    return getattr(case.settings.analysis, "unexplained_risk", None) or "contractor"


def activity_risk(snapshot: Snapshot, ids: Iterable[str]) -> list[str]:
    """Give each activity's ``risk`` column in a snapshot.

    The column is looked up once per snapshot and kept in ``snapshot.derived``.

    Parameters
    ----------
    snapshot : Snapshot
        The programme whose ``risk`` column is read.
    ids : iterable of str
        Activity ids.

    Returns
    -------
    list of str
        One party per id, in order: ``employer``, ``contractor`` or ``neutral``; ``""``
        when the cell is blank or not a party, the column absent or the id unknown.

    Examples
    --------
    >>> activity_risk(demo.baseline, ["ENV-DESIGN", "MEP-POWER-ON", "SET-HOARDING", "NOT-AN-ID"])
    ['employer', 'neutral', '', '']
    """
    risk = snapshot.derived.get("risk_by_id")
    if risk is None:  # looked up once per snapshot
        activities = snapshot.activities_table
        values = (
            activities["risk"].fillna("").astype(str).str.strip()
            if "risk" in activities
            else pd.Series([""] * len(activities))
        )
        values = values.where(values.isin(PARTIES), "")
        risk = snapshot.derived["risk_by_id"] = dict(zip(activities["id"].tolist(), values.tolist()))
    return [risk.get(activity, "") for activity in ids]


def _periods(events: pd.DataFrame) -> tuple[np.ndarray, np.ndarray]:
    """Each event's first and last day (its start when it has no finish)."""
    start = pd.to_datetime(events["start"]).to_numpy()
    finish = pd.to_datetime(events["finish"]).to_numpy()
    return start, np.where(pd.isna(finish), start, finish)


def _overlapping(case: Case, first: dt.date | None, last: dt.date | None) -> np.ndarray:
    """Which events' periods overlap ``first .. last`` (both included; None: open)."""
    from .memo import remembered

    start, finish = remembered(case, ("event periods",), lambda: _periods(case.events))
    keep = np.ones(start.size, dtype=bool)
    if last is not None:
        keep &= ~(start > np.datetime64(last, "D"))
    if first is not None:
        keep &= ~(finish < np.datetime64(first, "D"))
    return keep


def match_events(
    case: Case,
    activities: Sequence[str],
    first: dt.date | None,
    last: dt.date | None,
    snapshot: Snapshot | None = None,
    risks: Sequence[str] | None = None,
) -> pd.DataFrame:
    """The events that explain a charge on each activity in a period, and the charge's party.

    Parameters
    ----------
    case : Case
        The case with its event register.
    activities : sequence of str
        Activity ids charged.
    first : datetime.date or None
        The first day of the period charged, included (``None``: open at that end).
    last : datetime.date or None
        The last day of the period charged, included (``None``: open at that end).
    snapshot : Snapshot, optional
        The programme whose ``risk`` column decides a charge no event explains (default:
        none: unexplained).
    risks : sequence of str, optional
        Instead of ``snapshot``: each activity's risk, in order (``""`` for none).

    Returns
    -------
    DataFrame
        One row per activity given, in order: ``activity``, ``events`` (list of event ids,
        register order), ``parties`` (the matching events' parties, in the order of the
        parties), ``party`` (the one party, :data:`CONCURRENT` for several), ``basis``
        (``event``, ``risk`` or ``unexplained``).

    Examples
    --------
    Two events of different parties name FIT-B1-DECK in November 2025; nothing names
    SET-HOARDING, whose ``risk`` is blank:

    >>> found = match_events(demo, ["FIT-B1-DECK", "SET-HOARDING"], dt.date(2025, 10, 31),
    ...                      dt.date(2025, 11, 30), demo.snapshot("2025-10-31"))
    >>> found[["activity", "events", "party", "basis"]].values.tolist()
    [['FIT-B1-DECK', ['EV05', 'EV06'], 'concurrent', 'event'], ['SET-HOARDING', [], 'contractor', 'unexplained']]
    """
    events = case.events
    named = event_activities(case)
    live = _overlapping(case, first, last)
    by_activity: dict[str, list[tuple[str, str]]] = {}
    for event_id, party, alive in zip(events["id"], events["party"], live):
        if alive:
            for activity in named.get(event_id, ()):
                by_activity.setdefault(activity, []).append((event_id, party))
    ids = [str(a) for a in activities]
    if risks is None:
        risks = activity_risk(snapshot, ids) if snapshot is not None else ["" for _ in ids]
    default = unexplained_risk(case)
    columns: dict[str, list] = {name: [] for name in MATCH_COLUMNS}
    for activity, risk in zip(ids, risks):
        found = by_activity.get(activity)
        if found:
            present = {party for _, party in found}
            parties = [p for p in PARTIES if p in present]
            matched = [event_id for event_id, _ in found]
            party, basis = (parties[0] if len(parties) == 1 else CONCURRENT), "event"
        elif risk:
            matched, party, basis, parties = [], risk, "risk", [risk]
        else:
            matched, party, basis, parties = [], default, "unexplained", [default]
        for name, value in zip(MATCH_COLUMNS, (activity, matched, parties, party, basis)):
            columns[name].append(value)
    return pd.DataFrame(columns, columns=MATCH_COLUMNS)


def events_naming(case: Case, activities: Iterable[str], first: dt.date | None, last: dt.date | None) -> list[str]:
    """List the events whose period overlaps ``first .. last`` and that name any of ``activities``.

    These are the causes of a change to those activities, such as a window's revision of
    their durations or logic.

    Parameters
    ----------
    case : Case
        The case with its event register.
    activities : iterable of str
        Activity ids.
    first : datetime.date or None
        The first day of the period, included (``None``: open at that end).
    last : datetime.date or None
        The last day of the period, included (``None``: open at that end).

    Returns
    -------
    list of str
        Event ids, in register order.

    Examples
    --------
    >>> events_naming(demo, ["FIT-B1-DECK"], dt.date(2025, 10, 31), dt.date(2025, 11, 30))
    ['EV05', 'EV06']
    """
    wanted = set(activities)
    named = event_activities(case)
    live = _overlapping(case, first, last)
    return [e for e, alive in zip(case.events["id"], live) if alive and named.get(e, set()) & wanted]


def attributions(case: Case) -> pd.DataFrame:
    """Give the analyst's attributions (attributions.csv, case format v2), with the snapshot folder each names.

    Parameters
    ----------
    case : Case
        The loaded case.

    Returns
    -------
    pandas.DataFrame
        Columns ``window`` (as given), ``folder`` (the snapshot's folder; the window as
        given when no snapshot has that name), ``activity``, ``event``, ``party`` (the
        event's party when an event is named) and ``reason``; empty when the case has
        none.

    Examples
    --------
    >>> list(attributions(demo).columns), len(attributions(demo))
    (['window', 'folder', 'activity', 'event', 'party', 'reason'], 0)
    """
    columns = ["window", "folder", "activity", "event", "party", "reason"]
    table = getattr(case, "attributions", None)
    if table is None or not len(table):
        return pd.DataFrame(columns=columns)
    party_of = dict(zip(case.events["id"], case.events["party"]))
    rows = []
    for record in table.itertuples(index=False):
        window = str(record.window)
        try:
            folder = case.snapshot(window).folder
        except KeyError:
            folder = window
        event = str(getattr(record, "event", "") or "")
        party = party_of.get(event, "") if event else str(getattr(record, "party", "") or "")
        rows.append(
            {
                "window": window,
                "folder": folder,
                "activity": str(record.activity),
                "event": event,
                "party": party,
                "reason": str(getattr(record, "reason", "") or ""),
            }
        )
    return pd.DataFrame(rows, columns=columns)


_COMPLETION: weakref.WeakKeyDictionary[Case, str] = weakref.WeakKeyDictionary()


def completion_activity(case: Case) -> str:
    """Give the id of the project's completion activity.

    ``[project] completion_activity`` when case.toml gives it; else the finish milestone
    that finishes last in the baseline (the last in the baseline's order on a tie); else
    the activity that finishes last. Found once per case.

    Parameters
    ----------
    case : Case
        The loaded case.

    Returns
    -------
    str
        The activity's id.

    Raises
    ------
    CaseError
        When the baseline cannot be scheduled (a loop in its logic).

    Examples
    --------
    >>> completion_activity(demo)
    'MS-COMPLETION'
    """
    found = _COMPLETION.get(case)
    if found is not None:
        return found
    given = getattr(case.settings.project, "completion_activity", None)
    if given:
        _COMPLETION[case] = str(given)
        return str(given)
    from .cpm import FINISH_MILESTONE, calendars_of, prepare

    result = prepare(case, case.baseline, calendars=calendars_of(case)).run()
    finish = result.finish_day
    milestones = np.flatnonzero(result.point == FINISH_MILESTONE)
    pool = milestones if milestones.size else np.arange(finish.size)
    last = pool[finish[pool] == finish[pool].max()]
    found = str(result.ids[int(last[-1])])
    _COMPLETION[case] = found
    return found
