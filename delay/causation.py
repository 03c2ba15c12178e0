"""From delay days on activities to delay events and the parties who carry their risk.

Every method charges days of delay to activities; this module, the one place that does
it, joins those charges with the delay event register.

Rules (the project's, stated once here)
---------------------------------------
- A charge on an activity matches every event of the register that names the activity
  (its ``activities`` column, or as a programme activity its fragnet ties into) and that
  starts on or before the last day of the period charged. A window's last day is the day
  before the data date of the snapshot that ends it (the data date is the first day not
  yet reported), so an event must start before that data date.
- Matching events of one party give that party. Events of several parties matching one
  charge make it concurrent between them.
- A charge that no event explains is "unexplained" and, by default, contractor risk (the
  contractor carries the risk of its own programme unless an event shifts it - common
  practice under most standard forms; the contract governs).

References
----------
SCL Delay and Disruption Protocol, 2nd edition (2017), core principles on causation and
on concurrent delay; AACE International RP 29R-03 (2011), section 4.2 (concurrency).
"""

from __future__ import annotations

import datetime as dt
from typing import Iterable

import pandas as pd

from .model import Case

__all__ = ["event_activities", "match_events", "UNEXPLAINED", "CONCURRENT", "DEFAULT_RISK"]

UNEXPLAINED = "unexplained"
CONCURRENT = "concurrent"
#: Who carries an unexplained delay.
DEFAULT_RISK = "contractor"


def event_activities(case: Case) -> dict[str, set[str]]:
    """Activity ids each event names: its ``activities`` and the programme activities its
    fragnet links tie into."""
    events = case.events
    fragnet_links = case.fragnet_links
    fragnet_ids = set(case.fragnets["id"])
    named: dict[str, set[str]] = {}
    for event_id, activities in zip(events["id"].to_numpy(object), events["activities"].to_numpy(object)):
        named[event_id] = {a.strip() for a in str(activities or "").split(";") if a.strip()}
    for event_id, pred, succ in zip(*(fragnet_links[c].to_numpy(object) for c in ("event", "pred", "succ"))):
        for activity in (pred, succ):
            if activity not in fragnet_ids:
                named.setdefault(event_id, set()).add(activity)
    return named


def match_events(case: Case, activities: Iterable[str], period_end: dt.date | None) -> pd.DataFrame:
    """The events that explain a charge on each activity.

    Parameters
    ----------
    case: the case with its event register.
    activities: activity ids charged.
    period_end: the last date of the period charged; events starting after it do not match
        (``None``: no limit).

    Returns
    -------
    DataFrame
        One row per activity given, in order: ``activity``, ``events`` (list of event ids,
        register order), ``parties`` (sorted list), ``party`` (the one party, ``"concurrent"``
        for several, ``"unexplained"`` for none), ``risk`` (the party, ``"shared"`` when
        concurrent, :data:`DEFAULT_RISK` when unexplained).
    """
    events = case.events
    named = event_activities(case)
    limit = pd.Timestamp(period_end) if period_end is not None else None
    by_activity: dict[str, list[tuple[str, str]]] = {}
    for event_id, party, start in zip(events["id"], events["party"], events["start"]):
        if limit is not None and pd.notna(start) and pd.Timestamp(start) > limit:
            continue
        for activity in named.get(event_id, ()):
            by_activity.setdefault(activity, []).append((event_id, party))
    rows = []
    for activity in activities:
        found = by_activity.get(activity, [])
        matched = [event_id for event_id, _ in found]
        parties = {party for _, party in found}
        if not matched:
            party, risk = UNEXPLAINED, DEFAULT_RISK
        elif len(parties) == 1:
            party = risk = next(iter(parties))
        else:
            party, risk = CONCURRENT, "shared"
        rows.append({"activity": activity, "events": matched, "parties": sorted(parties),
                     "party": party, "risk": risk})
    return pd.DataFrame(rows, columns=["activity", "events", "parties", "party", "risk"])
