"""From delay days on activities to delay events, the parties who carry their risk, and the
classification of every day of critical delay.

Every method charges days of delay to activities or events; this module, the one place that
does it, joins those charges with the delay event register and turns each method's result
into a *causation table*: one row per charge (windows), per event (impacted as-planned and
time impact analysis) or per party (collapsed as-built), with the days of delay to
completion it explains, what it was concurrent with and how its days are classified.

Matching charges to events (the project's rules, stated once here)
-------------------------------------------------------------------
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

Classifying a day of critical delay
-----------------------------------
A day of delay to completion is *excusable* (time) when any of its causes is employer or
neutral risk, *compensable* (time and money) only when every cause is employer risk, and
*culpable* otherwise (every cause contractor risk, unexplained delay included). Compensable
days are a part of the excusable days. This follows the SCL Delay and Disruption Protocol,
2nd edition (2017), core principles 9 and 10 and the guidance on concurrent delay in Part
B (as recalled: where employer delay and contractor delay to completion are concurrent, the
contractor's concurrent delay should not reduce the extension of time due (principle 9),
but the contractor recovers compensation only to the extent it can separate the costs the
employer delay caused from those it would have incurred anyway because of its own delay
(principle 10) - "time but not money"). Unexplained delay is contractor risk, so
concurrency with it counts the same way (common practice).

The case's ``[analysis] concurrency`` setting chooses how a concurrent day (one with causes
of more than one party) is treated:

- ``time_not_money`` (the default, as just stated): a concurrent day with any employer or
  neutral cause is excusable and, since not every cause is employer risk, not compensable.
- ``apportion``: the concurrent days are split between their causes pro rata to the causes'
  impacts alone (for the windows analysis, the charges each party's path carries; the
  collapsed as-built, which measures no impact alone, shares them equally), each share
  then classified by its cause's party (an employer share is compensable, a neutral share
  excusable only, a contractor share culpable). Whole days are kept by the largest remainder method (Hamilton's method): each
  cause takes the whole part of its quota, and the days left over go one each to the
  largest fractional remainders; equal remainders go to the *earlier cause* - the event
  inserted first in the chronological order (start, finish, register row), for the windows
  analysis the counted chain's own cause before a parallel path's, for the collapsed
  as-built the party whose events began first. Seven days split 1:1 thus give 4 to the
  earlier cause and 3 to the later. Apportionment is the approach of some jurisdictions
  (common practice; the contract and the applicable law decide which applies).

Float is shared, first come, first served: a delay that only consumes float is not a delay
to completion and gives no extension (SCL Protocol 2017, core principle 7, as recalled:
unless the contract says otherwise, where float remains when an employer risk event occurs,
an extension is granted only to the extent the employer delay is predicted to reduce the
total float on the paths it affects below zero; the float is not reserved to either
party). Compensable days are counted whether or not they reach beyond the completion date
in force (core principle 8, as recalled, allows the contractor the cost of employer delay
to a realistic planned completion earlier than the contract date; the contract governs). Every method below honours it: the windows analysis charges only the driving path,
float absorbed off it is charged nothing; the impacted and time impact analyses take each
event's *increment* in the chronological cumulative run, so the earlier event consumes the
float first and a later one is charged only the delay left when the float is gone.

How each method's result becomes causation rows
-----------------------------------------------
Windows (:mod:`delay.methods.windows`):
  one row per *counted* progress charge with days other than zero, and one per revision
  charge with days other than zero. A progress charge carries its matched events and their
  parties (none: unexplained, contractor risk). A counted charge in a concurrency group
  whose other (parallel, not counted) members carry charges of the same sign is concurrent
  with them: their parties (unexplained: contractor) join its causes. For ``apportion`` its
  own parties weigh its days (shared equally when several), and each parallel party weighs
  the charges of its parallel members, scaled by this charge's part of the group's counted
  charges. A revision charge's causes are the parties of the events naming its activities
  (both ends of a changed link) that started by the window's last day, else contractor
  (unexplained); several parties share it equally under ``apportion``. A gain (negative
  charge) is classified like a delay and reduces the class it falls in.

Impacted as-planned and time impact analysis (:mod:`delay.methods.impacted`,
:mod:`delay.methods.time_impact`):
  one row per event, with its increment as its days. The increments of one cumulative run
  fill the days of delay in order: the first event's increment takes days 1 .. i1, the
  next the following days, and so on. Concurrency is found from the impacts alone: an
  event whose impact alone ``a`` exceeds its increment ``i`` had ``a - i`` days of its own
  delay hidden behind delay that other events had already taken (for example an employer
  event and a later contractor event on parallel paths: the later one's increment is 0,
  its impact alone is not). Those days are the first days, up to day ``a``, that the event
  does not take itself; each is concurrent between the event that took it and every event
  hidden behind it. Each event's row lists who it was concurrent with; an event whose
  delay is wholly hidden has a row of 0 days naming the events it was concurrent with.
  In the time impact analysis each update's run is taken on its own: events are concurrent
  only with events inserted into the same update. The rule compares effects on completion
  (the days each event alone would have caused), not the dates the events happened: in an
  impacted as-planned run, events months apart can be concurrent by it. The SCL Protocol
  (2017) and AACE RP 29R-03 section 4 (as recalled) look for delays whose effects are felt
  at the same time; the time impact analysis, inserting each event into the update current
  when it began, comes closer to that, and the analyst should check the timing of every
  concurrency shown. The ``causes`` of a row are those of its own days; ``concurrent_with``
  also names the events whose days its own delay was hidden behind.

Collapsed as-built (:mod:`delay.methods.collapsed`):
  one row per party with events, plus at most two more. ``D`` = actual completion less the
  planned (baseline) completion, the delay explained. Taking out one party's events makes
  the works ``b_p`` days earlier (its but-for days: the days for which that party's events
  are necessary); taking out every event makes them ``b_all`` earlier. The ``D - b_all``
  days that remain with every event taken out are unexplained (contractor risk; where the
  as-built model does not reproduce the actual dates the difference sits here too). Of the
  ``b_all`` days the events explain, a party's *sole* days are ``b_p`` less the overlap
  ``max(0, sum(b_p) - b_all)`` (not below 0): days that more than one party's events are each
  necessary for belong to none of them alone. The rest, ``b_all - sum(sole)``, are
  concurrent between the parties whose events could be taken out (with parallel delays,
  taking out either party alone leaves the other's delay, so ``b_p`` is small and ``b_all``
  large: those days are true concurrency). Which of those parties' events were sufficient
  for the concurrent days the per-party collapses cannot tell: every party with an event
  taken out is named. The method measures no impact alone of a party, so under
  ``apportion`` the concurrent days are shared equally between those parties (the earlier
  party, by its first event's start, taking a tied day). Rows are dated by the earliest
  start of their events. The per-party but-for days (``alone_days``) need
  not add up; the rows do, by this construction, to ``D``.

Reconciliation
--------------
The classified days of a table (excusable + culpable, each day counted once: a concurrent
day sits in one row only) must equal the delay the method explains: for the windows
analysis the total movement of completion over the windows; for the impacted as-planned its
total (cumulative) impact; for the time impact analysis the sum over the updates of each
update's cumulative impact; for the collapsed as-built the actual less the planned
completion. A table that does not add up raises :class:`delay.errors.ReconciliationError`.

References
----------
Society of Construction Law, Delay and Disruption Protocol, 2nd edition (2017): core
principles 4 (procedure for granting an extension: to the extent the event is predicted to
prevent completion by the contract completion date then in force), 7 and 8 (float as it
relates to time and to compensation), 9 and 10 (concurrent delay: its effect on the
extension of time and on compensation for prolongation) and Part B on concurrency and on
the methods (all as recalled). AACE International Recommended Practice 29R-03, Forensic
Schedule Analysis (2011), section 4, analysis evaluation (as recalled): 4.1 on excusable
and compensable, excusable and non-compensable, and non-excusable delay - an employer
delay concurrent with a contractor delay being excusable but not compensable - and 4.2 on
concurrency and pacing (delays of more than one party in the same period, either of which
alone would have delayed completion; the "functional" concurrency of effects on the
critical path beside the "literal" concurrency of events in time).
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass
from fractions import Fraction
from typing import Iterable, Sequence

import numpy as np
import pandas as pd

from .errors import CaseError, Problem, ReconciliationError
from .model import PARTIES, Case

__all__ = [
    "event_activities",
    "match_events",
    "UNEXPLAINED",
    "CONCURRENT",
    "DEFAULT_RISK",
    "METHODS",
    "CAUSATION_COLUMNS",
    "CONCURRENCY_RULES",
    "Causation",
    "largest_remainder",
    "classify_days",
    "sequence_rows",
    "windows_causation",
    "impacted_causation",
    "time_impact_causation",
    "collapsed_causation",
    "reconcile",
    "causation_frame",
    "causation",
]

UNEXPLAINED = "unexplained"
CONCURRENT = "concurrent"
#: Who carries an unexplained delay.
DEFAULT_RISK = "contractor"

#: The methods a causation table can be built from, by their command-line names.
METHODS = ("windows", "impacted", "tia", "collapsed")

#: The ``[analysis] concurrency`` settings.
CONCURRENCY_RULES = ("time_not_money", "apportion")

#: Columns of every causation table, in order.
CAUSATION_COLUMNS = [
    "method", "step", "window", "snapshot", "event", "party", "activities", "days", "alone_days", "causes",
    "concurrent_with", "concurrent_days", "excusable_days", "compensable_days", "culpable_days",
    "classification", "arose_on",
]

_EXCUSING = {"employer", "neutral"}


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


# -- the result ---------------------------------------------------------------------------------
@dataclass(frozen=True)
class Causation:
    """One method's causation table.

    Attributes
    ----------
    method: ``windows``, ``impacted``, ``tia`` or ``collapsed``.
    table: one row per charge, event or party, columns :data:`CAUSATION_COLUMNS`:
        ``step`` (the window and source, or the insertion), ``window`` (windows only),
        ``snapshot`` (the programme the event was inserted into), ``event`` (event ids,
        ``;`` separated; blank when none), ``party`` (the row's own party, ``concurrent``
        or ``unexplained``), ``activities`` (``;`` separated), ``days`` (days of delay to
        completion, calendar days; they add up), ``alone_days`` (impact alone or but-for
        days: need not add up; blank for windows), ``causes`` (the parties its days are
        caused by, ``;`` separated), ``concurrent_with`` (the other events or activities
        its days were concurrent with, ``;`` separated), ``concurrent_days`` (its days with
        causes of more than one party), ``excusable_days``, ``compensable_days`` (a part of
        the excusable days), ``culpable_days`` (excusable + culpable = days),
        ``classification`` (``compensable``, ``excusable``, ``culpable``, ``apportioned``
        when concurrent days were split, ``mixed`` when its days fall in several classes,
        ``no delay``), ``arose_on`` (the date the delay arose: a window's last day, an
        event's start; it prices prolongation).
    explained_days: the delay the table explains (see Reconciliation above).
    explains: what that delay is, in words.
    planned_completion: the planned (baseline) completion the method measures from.
    concurrency: the rule applied.
    notes: statements that go with the figures.
    """

    method: str
    table: pd.DataFrame
    explained_days: int
    explains: str
    planned_completion: dt.date
    concurrency: str
    notes: tuple[str, ...] = ()

    def total(self, column: str) -> int:
        """The sum of one day column of the table."""
        return int(self.table[column].sum()) if len(self.table) else 0


# -- classification ---------------------------------------------------------------------------
def largest_remainder(total: int, weights: Sequence) -> list[int]:
    """Split whole days ``total`` pro rata to ``weights`` by the largest remainder method.

    Each share takes the whole part of its quota ``total * w / sum(w)``; the days left over
    go one each to the largest fractional remainders, equal remainders to the earlier
    weight in the list. A negative ``total`` (a gain) is split as its size and negated.
    Weights of zero all round give equal shares. Arithmetic is exact (fractions).

    Parameters
    ----------
    total: whole days to split.
    weights: non-negative numbers, one per cause, earliest cause first.

    Returns
    -------
    list of int, one per weight, summing to ``total``.

    Raises
    ------
    ValueError: a negative weight, or no weights for days other than zero.

    Example
    -------
    >>> largest_remainder(7, [7, 7])
    [4, 3]
    >>> largest_remainder(4, [7, 4])
    [3, 1]

    References
    ----------
    The largest remainder (Hamilton) method of apportionment; M. L. Balinski and H. P. Young,
    *Fair Representation* (1982), chapter 2 (as recalled).
    """
    count = len(weights)
    if count == 0:
        if total:
            raise ValueError("no causes to split the days between")
        return []
    exact = [w if isinstance(w, Fraction) else Fraction(w) for w in weights]
    if any(w < 0 for w in exact):
        raise ValueError("weights must not be negative")
    if sum(exact) == 0:
        exact = [Fraction(1)] * count
    whole = sum(exact)
    size = abs(int(total))
    quotas = [size * w / whole for w in exact]
    shares = [q.numerator // q.denominator for q in quotas]
    left = size - sum(shares)
    order = sorted(range(count), key=lambda i: (-(quotas[i] - shares[i]), i))
    for i in order[:left]:
        shares[i] += 1
    sign = -1 if total < 0 else 1
    return [sign * s for s in shares]


def classify_days(causes: Sequence[tuple[str, object]], days: int, concurrency: str) -> dict:
    """Classify ``days`` of delay with the given causes.

    Parameters
    ----------
    causes: ``(party, weight)`` pairs, earliest cause first; the weight (an impact alone)
        is used only to apportion. No causes: unexplained, :data:`DEFAULT_RISK`.
    days: whole days (negative for a gain).
    concurrency: ``time_not_money`` or ``apportion``.

    Returns
    -------
    dict with ``excusable``, ``compensable``, ``culpable`` (excusable + culpable = days),
    ``concurrent`` (the days when the causes are of more than one party, else 0) and
    ``apportioned`` (whether the days were split).

    Raises
    ------
    ValueError: an unknown concurrency rule or party.
    """
    if concurrency not in CONCURRENCY_RULES:
        raise ValueError(f"unknown concurrency rule '{concurrency}'")
    causes = list(causes) or [(DEFAULT_RISK, 1)]
    for party, _ in causes:
        if party not in PARTIES:
            raise ValueError(f"unknown party '{party}'")
    parties = {party for party, _ in causes}
    concurrent = days if len(parties) > 1 else 0
    if len(parties) == 1 or concurrency == "time_not_money" or days == 0:
        excusable = days if parties & _EXCUSING else 0
        compensable = days if parties == {"employer"} else 0
        return {"excusable": excusable, "compensable": compensable, "culpable": days - excusable,
                "concurrent": concurrent, "apportioned": False}
    shares = largest_remainder(days, [weight for _, weight in causes])
    compensable = sum(s for (party, _), s in zip(causes, shares) if party == "employer")
    excusable = sum(s for (party, _), s in zip(causes, shares) if party in _EXCUSING)
    return {"excusable": excusable, "compensable": compensable, "culpable": days - excusable,
            "concurrent": concurrent, "apportioned": True}


def _label(days: int, excusable: int, compensable: int, culpable: int, apportioned: bool) -> str:
    if days == 0 and excusable == 0 and culpable == 0:
        return "no delay"
    parts = {"compensable": compensable, "excusable": excusable - compensable, "culpable": culpable}
    present = [name for name, value in parts.items() if value != 0]
    if len(present) == 1:
        return present[0]
    return "apportioned" if apportioned else "mixed"


def _ordered_parties(parties: Iterable[str]) -> list[str]:
    seen: list[str] = []
    for party in parties:
        if party not in seen:
            seen.append(party)
    return seen


def _joined(values: Iterable) -> str:
    return ";".join(str(v) for v in values)


def _row(method: str, step: str, days: int, split: dict, **values) -> dict:
    row = {column: None for column in CAUSATION_COLUMNS}
    row.update(method=method, step=step, days=int(days), excusable_days=int(split["excusable"]),
               compensable_days=int(split["compensable"]), culpable_days=int(split["culpable"]),
               concurrent_days=int(split["concurrent"]),
               classification=_label(days, split["excusable"], split["compensable"], split["culpable"],
                                     split["apportioned"]))
    row.update(values)
    return row


def causation_frame(rows: list[dict]) -> pd.DataFrame:
    """A causation table (columns :data:`CAUSATION_COLUMNS`, typed) from row dicts."""
    frame = pd.DataFrame(rows, columns=CAUSATION_COLUMNS)
    for column in ("days", "concurrent_days", "excusable_days", "compensable_days", "culpable_days"):
        frame[column] = frame[column].astype(np.int64) if len(frame) else pd.Series([], dtype=np.int64)
    for column in ("window", "alone_days"):
        frame[column] = frame[column].astype("Int64")
    frame["arose_on"] = pd.to_datetime(frame["arose_on"]).astype("datetime64[s]")
    for column in ("step", "snapshot", "event", "party", "activities", "causes", "concurrent_with",
                   "classification"):
        frame[column] = frame[column].fillna("").astype(object)
    return frame


def _concurrency_of(case: Case, concurrency: str | None) -> str:
    rule = concurrency or case.settings.analysis.concurrency
    if rule not in CONCURRENCY_RULES:
        raise CaseError(Problem(file="case.toml", column="concurrency",
                                message=f"unknown concurrency rule '{rule}' in [analysis]",
                                fix="use time_not_money or apportion"))
    return rule


# -- reconciliation ---------------------------------------------------------------------------
def reconcile(table: pd.DataFrame, explained_days: int, where: str) -> None:
    """Check a causation table against the delay it explains.

    Every row must split exactly (excusable + culpable = days, compensable a part of the
    excusable days) and the classified days, each counted once, must sum to
    ``explained_days``.

    Raises
    ------
    ReconciliationError: naming ``where`` and the figures that disagree.
    """
    if not len(table):
        if explained_days:
            raise ReconciliationError(where, {"classified days": 0, "delay explained": int(explained_days)})
        return
    split = table["excusable_days"] + table["culpable_days"]
    broken = np.flatnonzero((split != table["days"]).to_numpy())
    if broken.size:
        row = table.iloc[int(broken[0])]
        raise ReconciliationError(f"{where}, {row['step']}", {
            "excusable + culpable": int(split.iloc[int(broken[0])]), "days": int(row["days"])})
    excusable = table["excusable_days"].to_numpy()
    compensable = table["compensable_days"].to_numpy()
    outside = np.flatnonzero(np.abs(compensable) > np.abs(excusable))
    if outside.size:
        row = table.iloc[int(outside[0])]
        raise ReconciliationError(f"{where}, {row['step']}", {
            "compensable days": int(row["compensable_days"]), "excusable days": int(row["excusable_days"])})
    classified = int(split.sum())
    if classified != int(explained_days) or int(table["days"].sum()) != int(explained_days):
        raise ReconciliationError(where, {"classified days": classified, "days charged": int(table["days"].sum()),
                                          "delay explained": int(explained_days)})


# -- windows ------------------------------------------------------------------------------------
def _party_of_event(case: Case) -> dict[str, str]:
    return dict(zip(case.events["id"], case.events["party"]))


def _charge_causes(events: Sequence[str], party_of: dict[str, str]) -> list[str]:
    parties = _ordered_parties(party_of[e] for e in events if e in party_of)
    return parties or [DEFAULT_RISK]


def _revision_activities(activities: Sequence[str]) -> list[str]:
    ids: list[str] = []
    for item in activities:
        for part in str(item).split(">"):
            part = part.strip()
            if part and part not in ids:
                ids.append(part)
    return ids


def windows_causation(case: Case, result, concurrency: str | None = None) -> Causation:
    """The causation table of a windows analysis (:class:`delay.methods.windows.WindowsResult`).

    See the module docstring, "How each method's result becomes causation rows". Rows are
    in window order; in each window the counted progress charges in chain order, then the
    revisions in the order they were applied. The planned completion is the first
    boundary's completion (the baseline's, by default); a row's ``arose_on`` is its window's
    last day.

    Raises
    ------
    ReconciliationError: when the classified days do not sum to the total movement.
    """
    rule = _concurrency_of(case, concurrency)
    party_of = _party_of_event(case)
    rows = []
    for w in result.windows:
        last_day = w.end_data_date - dt.timedelta(days=1)
        where = f"window {w.number} ({w.start} to {w.end})"
        charges = w.charges.reset_index(drop=True)
        if len(charges):
            counted = charges["counted"].astype(bool).to_numpy()
            days = charges["days"].astype(np.int64).to_numpy()
            groups = charges["group"].astype("Int64")
            for i in np.flatnonzero(counted & (days != 0)):
                charge = charges.iloc[int(i)]
                own_events = list(charge["events"])
                own = _charge_causes(own_events, party_of)
                size = abs(int(charge["days"]))
                causes = [(party, Fraction(size, len(own))) for party in own]
                parallel_names: list[str] = []
                group = groups.iloc[int(i)]
                if pd.notna(group):
                    same = (groups == group).fillna(False).to_numpy()
                    sign = np.sign(days[i])
                    stretch = int(np.abs(days[same & counted & (np.sign(days) == sign)]).sum())
                    members = np.flatnonzero(same & ~counted & (np.sign(days) == sign) & (days != 0))
                    for k in members:
                        member = charges.iloc[int(k)]
                        member_parties = _charge_causes(list(member["events"]), party_of)
                        weight = Fraction(abs(int(member["days"])), len(member_parties)) * Fraction(size, stretch)
                        for party in member_parties:
                            causes.append((party, weight))
                        label = ", ".join(member["events"]) if len(member["events"]) else UNEXPLAINED
                        parallel_names.append(f"{member['activity']} ({label})")
                merged: dict[str, Fraction] = {}
                for party, weight in causes:
                    merged[party] = merged.get(party, Fraction(0)) + weight
                causes = list(merged.items())
                split = classify_days(causes, int(charge["days"]), rule)
                rows.append(_row("windows", f"{where}: progress", int(charge["days"]), split,
                                 window=w.number, snapshot=w.end, event=_joined(own_events),
                                 party=charge["party"], activities=str(charge["activity"]),
                                 causes=_joined(p for p, _ in causes), concurrent_with=_joined(parallel_names),
                                 arose_on=last_day))
        for revision in w.revisions.itertuples(index=False):
            if int(revision.days) == 0:
                continue
            ids = _revision_activities(revision.activities)
            matched = match_events(case, ids, last_day) if ids else None
            events: list[str] = []
            if matched is not None:
                for listed in matched["events"]:
                    events += [e for e in listed if e not in events]
            parties = _ordered_parties(party_of[e] for e in events)
            if not parties:
                party = UNEXPLAINED
            elif len(parties) == 1:
                party = parties[0]
            else:
                party = CONCURRENT
            causes = [(p, 1) for p in (parties or [DEFAULT_RISK])]
            split = classify_days(causes, int(revision.days), rule)
            rows.append(_row("windows", f"{where}: revision ({revision.kind})", int(revision.days), split,
                             window=w.number, snapshot=w.end, event=_joined(events), party=party,
                             activities=_joined(revision.activities), causes=_joined(p for p, _ in causes),
                             concurrent_with="", arose_on=last_day))
    table = causation_frame(rows)
    explained = int(result.total_movement_days)
    reconcile(table, explained, "causation of the windows analysis")
    notes = ("Charges on the driving path only: float absorbed off it is charged nothing (float is shared, "
             "first come, first served).",
             "A counted charge beside a parallel path of another party in a concurrency group is concurrent with "
             "it; unexplained charges are contractor risk.")
    return Causation("windows", table, explained, "the total movement of completion over the windows",
                     result.first_completion, rule, notes)


# -- impacted as-planned and time impact analysis ---------------------------------------------
def sequence_rows(events: pd.DataFrame, concurrency: str, method: str) -> list[dict]:
    """Causation rows of one cumulative run of events (see the module docstring).

    Parameters
    ----------
    events: the run's events in insertion order, with ``event``, ``party``, ``activities``
        (``;`` separated), ``alone_days``, ``days`` (the increment), ``arose_on``, ``step``
        and ``snapshot``.
    concurrency: ``time_not_money`` or ``apportion``.
    method: the method's name for the rows.

    Returns
    -------
    list of row dicts (columns :data:`CAUSATION_COLUMNS`), one per event, in order.

    Notes
    -----
    The days of delay are numbered 1, 2, ... in the order the increments take them (only
    positive increments take days; a negative one, which cannot arise when events only add
    delay, is classified by its own party). ``owner[j]`` is the event that took day j;
    ``hidden[m, j]`` marks the days hidden behind other events' delay for event m: the first
    ``alone - increment`` days up to its impact alone that it did not take itself. The days
    of one event with the same hidden events form one segment, classified at once.
    """
    count = len(events)
    parties = events["party"].to_numpy(dtype=object)
    names = events["event"].to_numpy(dtype=object)
    alone = events["alone_days"].astype(np.int64).to_numpy()
    increment = events["days"].astype(np.int64).to_numpy()
    taken = np.maximum(increment, 0)
    total = int(taken.sum())
    owner = np.repeat(np.arange(count), taken)
    first_day = np.concatenate([[0], np.cumsum(taken)])[:-1] if count else np.empty(0, np.int64)
    hidden = np.zeros((count, total), dtype=bool)
    position = np.arange(total)
    for m in range(count):
        excess = int(alone[m]) - int(taken[m])
        if excess <= 0 or alone[m] <= 0:
            continue
        candidates = np.flatnonzero((position < alone[m]) & (owner != m))[:excess]
        hidden[m, candidates] = True
    rows = []
    for i in range(count):
        days = int(increment[i])
        start, stop = int(first_day[i]), int(first_day[i] + taken[i])
        partners: list[int] = []
        own_causes: list[int] = [i]
        if days <= 0:
            split = classify_days([(parties[i], max(int(alone[i]), 0))], days, concurrency)
        else:
            block = hidden[:, start:stop]
            split = {"excusable": 0, "compensable": 0, "culpable": 0, "concurrent": 0, "apportioned": False}
            j = 0
            while j < block.shape[1]:
                column = block[:, j]
                k = j + 1
                while k < block.shape[1] and np.array_equal(block[:, k], column):
                    k += 1
                causes_here = sorted({i, *np.flatnonzero(column).tolist()})
                partners += [c for c in causes_here if c != i and c not in partners]
                own_causes += [c for c in causes_here if c not in own_causes]
                causes = [(parties[c], max(int(alone[c]), 0)) for c in causes_here]
                part = classify_days(causes, k - j, concurrency)
                for key in ("excusable", "compensable", "culpable", "concurrent"):
                    split[key] += part[key]
                split["apportioned"] |= part["apportioned"]
                j = k
        # the events whose days this event's delay was hidden behind
        for c in _ordered_parties(owner[hidden[i]].tolist()):
            if c not in partners and c != i:
                partners.append(c)
        partners.sort()
        cause_parties = _ordered_parties(parties[c] for c in sorted(own_causes, key=lambda c: (c != i, c)))
        row = events.iloc[i]
        rows.append(_row(method, row["step"], days, split, snapshot=row["snapshot"], event=names[i],
                         party=parties[i], activities=row["activities"], alone_days=int(alone[i]),
                         causes=_joined(cause_parties), concurrent_with=_joined(names[c] for c in partners),
                         arose_on=row["arose_on"]))
    return rows


def _run_frame(frame: pd.DataFrame, snapshot: str, label: str) -> pd.DataFrame:
    activities = [a if isinstance(a, str) else _joined(a) for a in frame["activities"]]
    return pd.DataFrame({
        "event": frame["id"].to_numpy(dtype=object), "party": frame["party"].to_numpy(dtype=object),
        "activities": activities, "alone_days": frame["alone_days"].to_numpy(dtype=np.int64),
        "days": frame["cumulative_days"].to_numpy(dtype=np.int64), "arose_on": pd.to_datetime(frame["start"]),
        "step": [f"insertion {k} into {label}" for k in range(1, len(frame) + 1)], "snapshot": snapshot,
    })


def _baseline_completion(case: Case) -> dt.date:
    from .cpm import calendars_of, prepare

    return prepare(case, case.baseline, calendars=calendars_of(case)).run().completion


def impacted_causation(case: Case, result, concurrency: str | None = None) -> Causation:
    """The causation table of an impacted as-planned analysis
    (:class:`delay.methods.impacted.ImpactedResult`): one row per event, its increment as its
    days, concurrency from the impacts alone.

    Raises
    ------
    ReconciliationError: when the classified days do not sum to the total impact.
    """
    rule = _concurrency_of(case, concurrency)
    table = causation_frame(sequence_rows(_run_frame(result.events, result.base, result.base), rule, "impacted"))
    explained = int(result.total_days)
    reconcile(table, explained, f"causation of the impacted as-planned analysis on {result.base}")
    notes = ("Each event's days are its increment in the chronological cumulative run: an earlier event "
             "consumes float first (float is shared, first come, first served).",
             "Impacts alone need not add up; they decide only which events were concurrent.")
    return Causation("impacted", table, explained, f"the cumulative impact of the events on {result.base}",
                     result.completion_base, rule, notes)


def time_impact_causation(case: Case, result, concurrency: str | None = None) -> Causation:
    """The causation table of a time impact analysis
    (:class:`delay.methods.time_impact.TimeImpactResult`): one row per event, its increment in
    the update it was inserted into as its days; concurrency within each update's run.

    Raises
    ------
    ReconciliationError: when the classified days do not sum to the updates' cumulative
        impacts.
    """
    rule = _concurrency_of(case, concurrency)
    rows: list[dict] = []
    events = result.events
    if len(events):
        for snapshot in pd.unique(events["snapshot"]):
            run = events[events["snapshot"] == snapshot].reset_index(drop=True)
            rows += sequence_rows(_run_frame(run, snapshot, snapshot), rule, "tia")
    table = causation_frame(rows)
    explained = int(result.updates["cumulative_days"].sum()) if len(result.updates) else 0
    reconcile(table, explained, "causation of the time impact analysis")
    notes = ("Each event's days are its increment in the update current when it began; events are concurrent "
             "only with events inserted into the same update.",
             "Impacts alone need not add up; they decide only which events were concurrent.")
    return Causation("tia", table, explained, "the sum over the updates of each update's cumulative impact",
                     _baseline_completion(case), rule, notes)


# -- collapsed as-built -------------------------------------------------------------------------
def collapsed_causation(case: Case, result, concurrency: str | None = None,
                        planned_completion: dt.date | None = None) -> Causation:
    """The causation table of a collapsed as-built analysis
    (:class:`delay.methods.collapsed.CollapsedResult`): one row per party, a row of days
    concurrent between parties and a row of unexplained days (see the module docstring).

    Parameters
    ----------
    planned_completion: the completion measured from (default: the baseline's).

    Raises
    ------
    ReconciliationError: when the rows do not sum to the actual less the planned completion.
    """
    rule = _concurrency_of(case, concurrency)
    planned = planned_completion or _baseline_completion(case)
    actual = result.actual_completion
    delay = (actual - planned).days
    by_party = result.by_party
    by_event = result.by_event
    starts = dict(zip(case.events["id"], case.events["start"]))

    def days_of(value) -> int:
        return 0 if value is None or pd.isna(value) else int(value)

    all_rows = by_party[by_party["party"] == "all"]
    but_for_all = days_of(all_rows["days_earlier"].iloc[0]) if len(all_rows) else None
    parties = [p for p in PARTIES if p in set(by_party["party"])]
    but_for = {p: max(0, days_of(by_party.loc[by_party["party"] == p, "days_earlier"].iloc[0])) for p in parties}
    if but_for_all is None:  # no "all" row: the parties' figures taken as disjoint
        but_for_all = sum(but_for.values())
    overlap = max(0, sum(but_for.values()) - but_for_all)
    sole = {p: max(0, but_for[p] - overlap) for p in parties}
    concurrent_days = but_for_all - sum(sole.values())
    unexplained = delay - but_for_all

    scored = by_event[by_event["days_earlier"].notna()] if len(by_event) else by_event
    events_of = {p: list(scored.loc[scored["party"] == p, "event"]) for p in parties}

    def earliest(events: list[str]):
        dates = [starts[e] for e in events if e in starts and pd.notna(starts[e])]
        return min(dates) if dates else None

    rows = []
    for p in parties:
        split = classify_days([(p, 1)], sole[p], rule)
        rows.append(_row("collapsed", f"but for the {p}'s events", sole[p], split, event=_joined(events_of[p]),
                         party=p, alone_days=but_for[p], causes=p, arose_on=earliest(events_of[p])))
    involved = [p for p in parties if events_of[p]]
    if concurrent_days:
        involved.sort(key=lambda p: (earliest(events_of[p]) is None, earliest(events_of[p]) or pd.Timestamp.max,
                                     PARTIES.index(p)))
        causes = [(p, 1) for p in involved] or [(DEFAULT_RISK, 1)]
        split = classify_days(causes, concurrent_days, rule)
        events = [e for p in involved for e in events_of[p]]
        rows.append(_row("collapsed", "but for every event, not for any one party's", concurrent_days, split,
                         event=_joined(events), party=CONCURRENT if len(involved) > 1 else (involved or [UNEXPLAINED])[0],
                         causes=_joined(p for p, _ in causes), concurrent_with=_joined(involved),
                         arose_on=earliest(events)))
    if unexplained:
        split = classify_days([(DEFAULT_RISK, 1)], unexplained, rule)
        rows.append(_row("collapsed", "not taken out by any event", unexplained, split, party=UNEXPLAINED,
                         causes=DEFAULT_RISK))
    table = causation_frame(rows)
    reconcile(table, delay, "causation of the collapsed as-built analysis")
    notes = ("But-for days (alone_days) need not add up; the rows add up to the actual less the planned completion "
             "by construction: sole days, days concurrent between parties, and days no event explains.",)
    if not getattr(result, "reproduced", True):
        notes += ("The as-built model does not reproduce the actual dates; the difference is among the days no "
                  "event explains.",)
    return Causation("collapsed", table, delay, "the actual less the planned completion", planned, rule,
                     notes + tuple(getattr(result, "notes", ()))[:1])


# -- any method -----------------------------------------------------------------------------------
def causation(case: Case, method: str, result=None, concurrency: str | None = None) -> Causation:
    """The causation table of one method, running the method when ``result`` is not given.

    Parameters
    ----------
    case: the loaded case.
    method: one of :data:`METHODS`.
    result: the method's result (``analyse(case)`` of its module), if already computed.
    concurrency: overrides the case's ``[analysis] concurrency``.

    Raises
    ------
    CaseError: an unknown method, or what the method raises for bad input.
    ReconciliationError: a table that does not add up.

    Example
    -------
    >>> table = causation(load_case("case_demo"), "impacted").table   # doctest: +SKIP
    """
    if method == "windows":
        if result is None:
            from .methods.windows import analyse
            result = analyse(case)
        return windows_causation(case, result, concurrency)
    if method == "impacted":
        if result is None:
            from .methods.impacted import analyse
            result = analyse(case)
        return impacted_causation(case, result, concurrency)
    if method == "tia":
        if result is None:
            from .methods.time_impact import analyse
            result = analyse(case)
        return time_impact_causation(case, result, concurrency)
    if method == "collapsed":
        if result is None:
            from .methods.collapsed import analyse
            result = analyse(case)
        return collapsed_causation(case, result, concurrency)
    raise CaseError(Problem(file="--method", message=f"unknown method '{method}'",
                            fix=f"choose among: {', '.join(METHODS)}"))
