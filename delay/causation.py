"""From delay days on activities to delay events, the parties who carry their risk, and the
classification of every day of critical delay.

Every method charges days of delay to activities or events; this module, the one place that
does it, joins those charges with the delay event register and turns each method's result
into a *causation table*: one row per charge (windows), per event (impacted as-planned and
time impact analysis) or per party (collapsed as-built), with the days of delay to
completion it explains, what it was concurrent with and how its days are classified.

Matching charges to events
--------------------------
The rules live in :mod:`delay.events` (the methods apply them; this module only consumes
their results): an event matches a charge when it names the activity and its period overlaps
the charged period; with no match the activity's ``risk`` column decides, else
``[analysis] unexplained_risk`` (default contractor: the contractor carries the risk of its
own programme unless an event shifts it - common practice under most standard forms; the
contract governs).

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
  excusable only, a contractor share culpable). Whole days are kept by the largest remainder method (Hamilton's
  method): each
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
to a realistic planned completion earlier than the contract date; the contract governs). Every method below
honours it: the windows analysis charges only the driving path,
float absorbed off it is charged nothing; the impacted and time impact analyses take each
event's *increment* in the chronological cumulative run, so the earlier event consumes the
float first and a later one is charged only the delay left when the float is gone.

How each method's result becomes causation rows
-----------------------------------------------
Windows (:mod:`delay.methods.windows`):
  one row per *counted* progress charge and per revision charge that moves completion
  (calendar days from the method's work-day ledger). A charge's causes are the parties of
  its matching events, else its basis's party (the activity's risk, the unexplained risk or
  the analyst's attribution). A counted charge in a concurrency group whose other (parallel,
  not counted) members carry charges of the same sign is concurrent with them: their parties
  join its causes. For ``apportion`` its own parties weigh its days (shared equally when
  several), and each parallel party weighs the charges of its parallel members, scaled by
  this charge's part of the group's counted charges. A gain (negative charge) belongs to its
  own cause like any other and reduces the class it falls in.

Impacted as-planned and time impact analysis (:mod:`delay.methods.impacted`,
:mod:`delay.methods.tia`):
  one row per event, with its increment as its days. The increments of one cumulative run
  fill the days of delay in order: the first event's increment takes positions 1 .. i1,
  the next the following ones, and so on. Concurrency needs time (AACE RP 29R-03 section
  4.2 and the SCL Protocol's guidance on concurrent delay, as recalled: delays are
  concurrent when they are felt in the same period and each alone would have delayed
  completion): the day at position ``p`` has as causes the event whose increment covers
  it, and every other event of the run whose period overlaps that event's and whose impact
  alone is at least ``p``. Events months apart are never concurrent, however their impacts
  compare. Each event's row lists who its days were concurrent with. Then one row per
  programme for its *residual*: the next programme's completion (the as-built record's for
  the last) less the programme's impacted completion (for the impacted as-planned: the
  actual completion less the base impacted with every event). A positive residual is delay
  no event explains (``unexplained_risk``); a negative one is recovery, the contractor's,
  which offsets its culpable delay first and beyond that is acceleration. With the
  residuals the rows add up to the actual less the planned completion.

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

Classes over a table, and acceleration
--------------------------------------
Over a table: *excusable days* are the sum of its rows' excusable days (employer and
neutral: an employer omission, a negative charge, reduces them); the contractor's net days
are the sum of its culpable days: *culpable delay days* are those when positive, and a net
gain is *acceleration days*, shown and never cutting the extension of time. Identity:
``excusable_days + culpable_delay_days - acceleration_days`` = the delay the table explains.

Reconciliation
--------------
The classified days of a table (excusable + culpable, each day counted once: a concurrent
day sits in one row only) must equal the delay the method explains, and so must the
identity above: for the windows analysis the total movement of completion over the
windows; for the impacted as-planned and the time impact analysis, with their residual
rows, the actual less the planned completion; for the collapsed as-built the actual less
the planned completion. A table that does not add up raises
:class:`delay.errors.ReconciliationError`.

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
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from fractions import Fraction

import numpy as np
import pandas as pd

from .convert import join_ids
from .errors import CaseError, Problem, ReconciliationError
from .events import CONCURRENT, unexplained_risk
from .model import PARTIES, Case

__all__ = [
    "UNEXPLAINED",
    "RECOVERY",
    "CONCURRENT",
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
    "class_totals",
    "causation_frame",
    "causation",
]

UNEXPLAINED = "unexplained"
#: The ``party`` of a negative residual: recovery against what a modelled method predicted
#: (the contractor's: it counts against culpable delay, then as acceleration).
RECOVERY = "recovery"

#: The methods a causation table can be built from, by their command-line names.
METHODS = ("windows", "impacted", "tia", "collapsed")

#: The ``[analysis] concurrency`` settings.
CONCURRENCY_RULES = ("time_not_money", "apportion")

#: Columns of every causation table, in order.
CAUSATION_COLUMNS = [
    "method",
    "step",
    "window",
    "snapshot",
    "event",
    "party",
    "basis",
    "activities",
    "work_days",
    "days",
    "alone_days",
    "causes",
    "concurrent_with",
    "concurrent_days",
    "excusable_days",
    "compensable_days",
    "culpable_days",
    "classification",
    "arose_on",
]

_EXCUSING = {"employer", "neutral"}


# -- the result ---------------------------------------------------------------------------------
@dataclass(frozen=True)
class Causation:
    """One method's causation table.

    Made by :func:`causation` (or the function of each method). The properties
    ``excusable_days``, ``culpable_delay_days`` and ``acceleration_days`` give the
    table's :func:`class_totals`.

    Parameters
    ----------
    method : str
        ``windows``, ``impacted``, ``tia`` or ``collapsed``.
    table : pandas.DataFrame
        One row per charge, event, residual or party, columns :data:`CAUSATION_COLUMNS`:
        ``step`` (the window and source, or the insertion), ``window`` (windows only),
        ``snapshot`` (the programme), ``event`` (event ids, ``;`` separated; blank when
        none), ``party`` (the row's own party, ``concurrent``, ``unexplained``, or
        ``recovery`` for a negative residual), ``basis``
        (how the party was found: ``event``, ``risk``, ``unexplained``, ``analyst``,
        ``residual``, ``recovery``), ``activities`` (``;`` separated), ``work_days`` (ledger
        work days, windows only), ``days`` (days of delay to completion, calendar days; they
        add up), ``alone_days`` (impact alone or but-for days: need not add up),
        ``causes`` (the parties its days are caused by, ``;`` separated),
        ``concurrent_with`` (the other events or activities its days were concurrent with),
        ``concurrent_days`` (its days with causes of more than one party),
        ``excusable_days``, ``compensable_days`` (a part of the excusable days),
        ``culpable_days`` (excusable + culpable = days), ``classification``
        (``compensable``, ``excusable``, ``culpable``, ``apportioned`` when concurrent days
        were split, ``mixed`` when its days fall in several classes, ``no delay``),
        ``arose_on`` (the date the delay arose: a window's last day, an event's start; it
        prices prolongation).
    explained_days : int
        The delay the table explains, in calendar days (see "Reconciliation" in the module
        docstring).
    explains : str
        What that delay is, in words.
    planned_completion : datetime.date
        The planned (baseline) completion the method measures from.
    concurrency : str
        The rule applied: ``time_not_money`` or ``apportion``.
    notes : tuple of str, optional
        Statements that go with the figures.

    Examples
    --------
    >>> found = causation(demo, "impacted")
    >>> found.explained_days, found.planned_completion, found.excusable_days
    (44, datetime.date(2026, 5, 19), 34)
    """

    method: str
    table: pd.DataFrame
    explained_days: int
    explains: str
    planned_completion: dt.date
    concurrency: str
    notes: tuple[str, ...] = ()

    def total(self, column: str) -> int:
        """Sum one day column of the table.

        Parameters
        ----------
        column : str
            A column of whole days: ``days``, ``excusable_days``, ``compensable_days``,
            ``culpable_days`` or ``concurrent_days``.

        Returns
        -------
        int
            The sum; 0 for an empty table.

        Raises
        ------
        KeyError
            For a column the table does not have.

        Examples
        --------
        >>> found = causation(demo, "impacted")
        >>> found.total("days") == found.explained_days
        True
        """
        return int(self.table[column].sum()) if len(self.table) else 0

    @property
    def excusable_days(self) -> int:
        """Employer and neutral days, net of their gains."""
        return class_totals(self.table)["excusable_days"]

    @property
    def culpable_delay_days(self) -> int:
        """The contractor's net delay, when positive."""
        return class_totals(self.table)["culpable_delay_days"]

    @property
    def acceleration_days(self) -> int:
        """The contractor's net gain, when positive: recovery it made."""
        return class_totals(self.table)["acceleration_days"]


def class_totals(table: pd.DataFrame) -> dict[str, int]:
    """Total the classes of a causation table (see "Classes over a table" in the module docstring).

    Parameters
    ----------
    table : pandas.DataFrame
        A causation table, or any table with ``excusable_days``, ``compensable_days`` and
        ``culpable_days``.

    Returns
    -------
    dict of str to int
        ``excusable_days`` (the sum, net of gains), ``compensable_days`` (the sum, not
        below 0), ``culpable_delay_days`` (the contractor's net days when positive, else 0)
        and ``acceleration_days`` (its net gain when positive, else 0); all 0 for an empty
        table.

    Examples
    --------
    >>> frame = pd.DataFrame({"excusable_days": [10, 0], "compensable_days": [10, 0],
    ...                       "culpable_days": [0, -4]})
    >>> class_totals(frame)["acceleration_days"]
    4
    """
    if not len(table):
        return {"excusable_days": 0, "compensable_days": 0, "culpable_delay_days": 0, "acceleration_days": 0}
    contractor = int(table["culpable_days"].sum())
    return {
        "excusable_days": int(table["excusable_days"].sum()),
        "compensable_days": max(0, int(table["compensable_days"].sum())),
        "culpable_delay_days": max(0, contractor),
        "acceleration_days": max(0, -contractor),
    }


# -- classification ---------------------------------------------------------------------------
def largest_remainder(total: int, weights: Sequence) -> list[int]:
    """Split whole days ``total`` pro rata to ``weights`` by the largest remainder method.

    Each share takes the whole part of its quota ``total * w / sum(w)``; the days left over
    go one each to the largest fractional remainders, equal remainders to the earlier
    weight in the list. A negative ``total`` (a gain) is split as its size and negated.
    Weights of zero all round give equal shares. Arithmetic is exact (fractions).

    Parameters
    ----------
    total : int
        Whole days to split.
    weights : sequence of numbers
        Non-negative numbers (ints, floats or fractions), one per cause, earliest cause
        first.

    Returns
    -------
    list of int
        One share per weight, summing to ``total``.

    Raises
    ------
    ValueError
        A negative weight, or no weights for days other than zero.

    References
    ----------
    The largest remainder (Hamilton) method of apportionment; M. L. Balinski and H. P. Young,
    *Fair Representation* (1982), chapter 2 (as recalled).

    Examples
    --------
    Seven days split 1:1 give the extra day to the earlier cause; 4 days at 7:4 have
    quotas 2.55 and 1.45, so the left-over day goes to the larger remainder:

    >>> largest_remainder(7, [7, 7])
    [4, 3]
    >>> largest_remainder(4, [7, 4])
    [3, 1]
    >>> largest_remainder(-3, [1, 2])  # a gain, split as its size
    [-1, -2]
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
    causes : sequence of tuple of (str, number)
        ``(party, weight)`` pairs, earliest cause first; the weight (an impact alone) is
        used only to apportion. At least one; parties among ``employer``, ``contractor``,
        ``neutral``.
    days : int
        Whole days (negative for a gain).
    concurrency : str
        ``time_not_money`` or ``apportion``.

    Returns
    -------
    dict
        ``excusable``, ``compensable``, ``culpable`` (excusable + culpable = days),
        ``concurrent`` (the days when the causes are of more than one party, else 0) and
        ``apportioned`` (whether the days were split, by :func:`largest_remainder`).

    Raises
    ------
    ValueError
        An unknown concurrency rule or party, or no causes.

    References
    ----------
    SCL Delay and Disruption Protocol, 2nd edition (2017), core principles 9 and 10; AACE
    RP 29R-03 (2011), section 4.1 (both as recalled).

    Examples
    --------
    Four days caused by the employer and the contractor together are excusable but not
    compensable under "time but not money", and split 3:5 under apportionment:

    >>> classify_days([("employer", 3), ("contractor", 5)], 4, "time_not_money")
    {'excusable': 4, 'compensable': 0, 'culpable': 0, 'concurrent': 4, 'apportioned': False}
    >>> classify_days([("employer", 3), ("contractor", 5)], 4, "apportion")
    {'excusable': 2, 'compensable': 2, 'culpable': 2, 'concurrent': 4, 'apportioned': True}
    """
    if concurrency not in CONCURRENCY_RULES:
        raise ValueError(f"unknown concurrency rule '{concurrency}'")
    causes = list(causes)
    if not causes:
        raise ValueError("days of delay need at least one cause")
    for party, _ in causes:
        if party not in PARTIES:
            raise ValueError(f"unknown party '{party}'")
    parties = {party for party, _ in causes}
    concurrent = days if len(parties) > 1 else 0
    if len(parties) == 1 or concurrency == "time_not_money" or days == 0:
        excusable = days if parties & _EXCUSING else 0
        compensable = days if parties == {"employer"} else 0
        return {
            "excusable": excusable,
            "compensable": compensable,
            "culpable": days - excusable,
            "concurrent": concurrent,
            "apportioned": False,
        }
    shares = largest_remainder(days, [weight for _, weight in causes])
    compensable = sum(s for (party, _), s in zip(causes, shares) if party == "employer")
    excusable = sum(s for (party, _), s in zip(causes, shares) if party in _EXCUSING)
    return {
        "excusable": excusable,
        "compensable": compensable,
        "culpable": days - excusable,
        "concurrent": concurrent,
        "apportioned": True,
    }


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


def _row(method: str, step: str, days: int, split: dict, **values) -> dict:
    row = {column: None for column in CAUSATION_COLUMNS}
    row.update(
        method=method,
        step=step,
        days=int(days),
        excusable_days=int(split["excusable"]),
        compensable_days=int(split["compensable"]),
        culpable_days=int(split["culpable"]),
        concurrent_days=int(split["concurrent"]),
        classification=_label(days, split["excusable"], split["compensable"], split["culpable"], split["apportioned"]),
    )
    row.update(values)
    return row


def causation_frame(rows: list[dict]) -> pd.DataFrame:
    """Build a causation table from row dicts, its columns typed.

    Day columns become ``int64``; ``window``, ``alone_days`` and ``work_days`` nullable
    integers; ``arose_on`` ``datetime64[s]``; the text columns text, ``""`` for blank.

    Parameters
    ----------
    rows : list of dict
        One dict per row, keyed by the columns of :data:`CAUSATION_COLUMNS` (a missing key
        is blank).

    Returns
    -------
    pandas.DataFrame
        Columns :data:`CAUSATION_COLUMNS`, in order.

    Examples
    --------
    >>> table = causation_frame([])
    >>> list(table.columns) == CAUSATION_COLUMNS, str(table["days"].dtype)
    (True, 'int64')
    """
    frame = pd.DataFrame(rows, columns=CAUSATION_COLUMNS)
    for column in ("days", "concurrent_days", "excusable_days", "compensable_days", "culpable_days"):
        frame[column] = frame[column].astype(np.int64) if len(frame) else pd.Series([], dtype=np.int64)
    for column in ("window", "alone_days", "work_days"):
        frame[column] = frame[column].astype("Int64")
    frame["arose_on"] = pd.to_datetime(frame["arose_on"]).astype("datetime64[s]")
    for column in (
        "step",
        "snapshot",
        "event",
        "party",
        "basis",
        "activities",
        "causes",
        "concurrent_with",
        "classification",
    ):
        frame[column] = frame[column].fillna("").astype(object)
    return frame


def _concurrency_of(case: Case, concurrency: str | None) -> str:
    rule = concurrency or case.settings.analysis.concurrency
    if rule not in CONCURRENCY_RULES:
        raise CaseError(
            Problem(
                file="case.toml",
                column="concurrency",
                message=f"unknown concurrency rule '{rule}' in [analysis]",
                fix="use time_not_money or apportion",
            )
        )
    return rule


# -- reconciliation ---------------------------------------------------------------------------
def reconcile(table: pd.DataFrame, explained_days: int, where: str) -> None:
    """Check a causation table against the delay it explains.

    Every row must split exactly (excusable + culpable = days, compensable a part of the
    excusable days), the classified days, each counted once, must sum to
    ``explained_days``, and so must excusable + culpable delay - acceleration days
    (:func:`class_totals`).

    Parameters
    ----------
    table : pandas.DataFrame
        A causation table.
    explained_days : int
        The delay it explains, in calendar days.
    where : str
        What the table is, for the error (``causation of the windows analysis``).

    Raises
    ------
    ReconciliationError
        Naming ``where`` (and the row's step for a row that does not split) and the
        figures that disagree.

    Examples
    --------
    >>> table = causation(demo, "impacted").table
    >>> reconcile(table, 44, "the impacted as-planned")
    >>> reconcile(table, 45, "the impacted as-planned")
    Traceback (most recent call last):
    ...
    delay.errors.ReconciliationError: the impacted as-planned: the figures do not reconcile (classified days = 44, ...)
    """
    if not len(table):
        if explained_days:
            raise ReconciliationError(where, {"classified days": 0, "delay explained": int(explained_days)})
        return
    split = table["excusable_days"] + table["culpable_days"]
    broken = np.flatnonzero((split != table["days"]).to_numpy())
    if broken.size:
        row = table.iloc[int(broken[0])]
        raise ReconciliationError(
            f"{where}, {row['step']}",
            {"excusable + culpable": int(split.iloc[int(broken[0])]), "days": int(row["days"])},
        )
    excusable = table["excusable_days"].to_numpy()
    compensable = table["compensable_days"].to_numpy()
    outside = np.flatnonzero(np.abs(compensable) > np.abs(excusable))
    if outside.size:
        row = table.iloc[int(outside[0])]
        raise ReconciliationError(
            f"{where}, {row['step']}",
            {"compensable days": int(row["compensable_days"]), "excusable days": int(row["excusable_days"])},
        )
    classified = int(split.sum())
    if classified != int(explained_days) or int(table["days"].sum()) != int(explained_days):
        raise ReconciliationError(
            where,
            {
                "classified days": classified,
                "days charged": int(table["days"].sum()),
                "delay explained": int(explained_days),
            },
        )
    totals = class_totals(table)
    identity = totals["excusable_days"] + totals["culpable_delay_days"] - totals["acceleration_days"]
    if identity != int(explained_days):
        raise ReconciliationError(
            where, {"excusable + culpable delay - acceleration": identity, "delay explained": int(explained_days)}
        )


# -- windows ------------------------------------------------------------------------------------
def _charge_causes(parties: Sequence[str], size: int) -> list[tuple[str, Fraction]]:
    """A charge's own causes, sharing its size equally."""
    parties = list(parties) or [UNEXPLAINED]
    return [(party, Fraction(size, len(parties))) for party in parties]


def _parallel_causes(charges: pd.DataFrame, i: int, size: int) -> tuple[list[tuple[str, Fraction]], list[str]]:
    """The causes a counted charge gains from the parallel members of its concurrency group
    (charges of the same sign), each weighted by its days, scaled by this charge's part of
    the group's counted charges; and the members in words."""
    groups = charges["group"].astype("Int64")
    group = groups.iloc[i]
    if pd.isna(group):
        return [], []
    days = charges["days"].astype(np.int64).to_numpy()
    counted = charges["counted"].astype(bool).to_numpy()
    same = (groups == group).fillna(False).to_numpy()
    sign = np.sign(days[i])
    stretch = int(np.abs(days[same & counted & (np.sign(days) == sign)]).sum())
    causes, names = [], []
    for k in np.flatnonzero(same & ~counted & (np.sign(days) == sign) & (days != 0)):
        member = charges.iloc[int(k)]
        parties = list(member["parties"]) or [UNEXPLAINED]
        weight = Fraction(abs(int(member["days"])), len(parties)) * Fraction(size, max(stretch, 1))
        causes += [(party, weight) for party in parties]
        label = ", ".join(member["events"]) if len(member["events"]) else member["basis"]
        names.append(f"{member['activity']} ({label})")
    return causes, names


def _windows_rows(windows, rule: str) -> list[dict]:
    rows = []
    for w in windows:
        last_day = w.end_data_date - dt.timedelta(days=1)
        where = f"window {w.number} ({w.start} to {w.end})"
        charges = w.charges.reset_index(drop=True)
        days = charges["days"].astype(np.int64).to_numpy() if len(charges) else np.zeros(0, np.int64)
        counted = charges["counted"].astype(bool).to_numpy() if len(charges) else np.zeros(0, bool)
        for i in np.flatnonzero(counted & (days != 0)):
            charge = charges.iloc[int(i)]
            size = abs(int(charge["days"]))
            causes = _charge_causes(charge["parties"], size)
            parallel, names = _parallel_causes(charges, int(i), size)
            merged: dict[str, Fraction] = {}
            for party, weight in causes + parallel:
                merged[party] = merged.get(party, Fraction(0)) + weight
            split = classify_days(list(merged.items()), int(charge["days"]), rule)
            rows.append(
                _row(
                    "windows",
                    f"{where}: progress",
                    int(charge["days"]),
                    split,
                    window=w.number,
                    snapshot=w.end,
                    event=join_ids(charge["events"]),
                    party=charge["party"],
                    basis=charge["basis"],
                    activities=str(charge["activity"]),
                    work_days=int(charge["work_days"]),
                    causes=join_ids(merged),
                    concurrent_with=join_ids(names),
                    arose_on=last_day,
                )
            )
        for revision in w.revisions.itertuples(index=False):
            if int(revision.days) == 0:
                continue
            causes = [(p, 1) for p in revision.parties]
            split = classify_days(causes, int(revision.days), rule)
            rows.append(
                _row(
                    "windows",
                    f"{where}: revision ({revision.kind})",
                    int(revision.days),
                    split,
                    window=w.number,
                    snapshot=w.end,
                    event=join_ids(revision.events),
                    party=revision.party,
                    basis=revision.basis,
                    activities=join_ids(revision.activities),
                    work_days=int(revision.work_days),
                    causes=join_ids(revision.parties),
                    concurrent_with="",
                    arose_on=last_day,
                )
            )
    return rows


def windows_causation(case: Case, result, concurrency: str | None = None, section: str | None = None) -> Causation:
    """Build the causation table of a windows analysis (:class:`delay.methods.windows.WindowsResult`).

    See the module docstring, "How each method's result becomes causation rows". Rows are
    in window order; in each window the counted progress charges in path order, then the
    revisions in the order they were applied. The planned completion is the target's finish
    at the first boundary (the baseline's, by default); a row's ``arose_on`` is its window's
    last day.

    Parameters
    ----------
    case : Case
        The loaded case.
    result : WindowsResult
        The windows analysis (:func:`delay.methods.windows.analyse`).
    concurrency : str, optional
        Overrides the case's ``[analysis] concurrency``.
    section : str, optional
        A section of sections.csv: the table of its own trace to its completion milestone
        (default: the whole works).

    Returns
    -------
    Causation
        The table, explaining the total movement of completion over the windows.

    Raises
    ------
    CaseError
        An unknown concurrency rule.
    ReconciliationError
        When the classified days do not sum to the total movement.
    KeyError
        A section the result has no trace for.

    References
    ----------
    AACE RP 29R-03 (2011), MIP 3.3 and 3.4; SCL Delay and Disruption Protocol, 2nd edition
    (2017), Part B, windows analysis (both as recalled).
    """
    rule = _concurrency_of(case, concurrency)
    windows = result.windows if section is None else result.sections[section]
    table = causation_frame(_windows_rows(windows, rule))
    explained = (windows[-1].completion_end - windows[0].completion_start).days if windows else 0
    what = (
        "the total movement of completion over the windows"
        if section is None
        else (f"the total movement of section {section}'s completion over the windows")
    )
    reconcile(table, explained, "causation of the windows analysis" + (f", section {section}" if section else ""))
    notes = (
        "Charges on the driving chain only, in work days of the ledger calendar: float absorbed off it is "
        "charged nothing (float is shared, first come, first served), and an activity that only carried an "
        "earlier delay is charged nothing.",
        "Lateness is measured against late dates by logic alone: milestone constraints change no figure.",
        "A counted charge beside a parallel path of another party in a concurrency group is concurrent with it; "
        "charges no event explains go to the activity's risk, else the unexplained-risk setting.",
    )
    planned = windows[0].completion_start if windows else result.first_completion
    return Causation("windows", table, explained, what, planned, rule, notes)


# -- impacted as-planned and time impact analysis ---------------------------------------------
def _overlaps(starts: np.ndarray, finishes: np.ndarray) -> np.ndarray:
    """``overlap[i, j]``: the periods of events i and j overlap (both ends included)."""
    return (starts[:, None] <= finishes[None, :]) & (starts[None, :] <= finishes[:, None])


def sequence_rows(events: pd.DataFrame, concurrency: str, method: str) -> list[dict]:
    """Causation rows of one cumulative run of events (see the module docstring).

    Parameters
    ----------
    events : pandas.DataFrame
        The run's events in insertion order, with ``event``, ``party``, ``activities``
        (``;`` separated), ``alone_days``, ``days`` (the increment), ``arose_on`` (the
        event's start), ``until`` (its finish; optional, the start when absent or blank),
        ``step`` and ``snapshot``.
    concurrency : str
        ``time_not_money`` or ``apportion``.
    method : str
        The method's name for the rows.

    Returns
    -------
    list of dict
        Row dicts (columns :data:`CAUSATION_COLUMNS`), one per event, in order.

    Raises
    ------
    ValueError
        An unknown concurrency rule or party (:func:`classify_days`).

    Notes
    -----
    The days of delay are numbered 1, 2, ... in the order the increments take them (only
    positive increments take days; a negative one is classified by its own party). The day
    at position ``p``, taken by event ``i``, has as causes ``i`` and every other event ``m``
    whose period overlaps ``i``'s and whose impact alone is at least ``p``. The days of one
    event with the same causes form one segment, classified at once.

    References
    ----------
    AACE RP 29R-03 (2011), section 4.2 on concurrency; SCL Delay and Disruption Protocol,
    2nd edition (2017), guidance on concurrent delay (both as recalled).

    Examples
    --------
    An employer event takes days 1 to 5; a contractor event in the same period, whose
    impact alone is 4 days, adds nothing but is a cause of days 1 to 4 too:

    >>> events = pd.DataFrame({
    ...     "event": ["E1", "E2"], "party": ["employer", "contractor"], "activities": ["A", "B"],
    ...     "alone_days": [5, 4], "days": [5, 0], "arose_on": pd.to_datetime(["2025-06-01"] * 2),
    ...     "until": pd.to_datetime(["2025-06-20"] * 2), "step": ["insert E1", "insert E2"],
    ...     "snapshot": ["baseline"] * 2,
    ... })
    >>> rows = pd.DataFrame(sequence_rows(events, "time_not_money", "impacted"))
    >>> rows[["event", "days", "concurrent_days", "excusable_days", "compensable_days"]].values.tolist()
    [['E1', 5, 4, 5, 1], ['E2', 0, 0, 0, 0]]
    """
    count = len(events)
    parties = events["party"].to_numpy(dtype=object)
    names = events["event"].to_numpy(dtype=object)
    alone = events["alone_days"].astype(np.int64).to_numpy()
    increment = events["days"].astype(np.int64).to_numpy()
    starts = pd.to_datetime(events["arose_on"]).to_numpy(dtype="datetime64[D]")
    until = events["until"] if "until" in events else events["arose_on"]
    finishes = pd.to_datetime(until).to_numpy(dtype="datetime64[D]")
    finishes = np.where(np.isnat(finishes), starts, finishes)
    overlap = _overlaps(starts, finishes) if count else np.zeros((0, 0), bool)
    taken = np.maximum(increment, 0)
    first_day = np.concatenate([[0], np.cumsum(taken)])[:-1] if count else np.empty(0, np.int64)
    rows = []
    for i in range(count):
        days = int(increment[i])
        partners: list[int] = []
        if days <= 0:
            split = classify_days([(parties[i], max(int(alone[i]), 0))], days, concurrency)
            causes_seen = [i]
        else:
            split = {"excusable": 0, "compensable": 0, "culpable": 0, "concurrent": 0, "apportioned": False}
            causes_seen = [i]
            others = [m for m in range(count) if m != i and overlap[i, m]]
            position = int(first_day[i]) + 1
            stop = int(first_day[i]) + days + 1
            while position < stop:
                here = [m for m in others if alone[m] >= position]
                # the segment runs while the set of causes stays the same: it only loses
                # events, each once the position passes its impact alone
                reach = min([int(alone[m]) + 1 for m in here] + [stop])
                causes_here = [i] + here
                partners += [c for c in here if c not in partners]
                causes_seen += [c for c in here if c not in causes_seen]
                part = classify_days(
                    [(parties[c], max(int(alone[c]), 0)) for c in causes_here], reach - position, concurrency
                )
                for key in ("excusable", "compensable", "culpable", "concurrent"):
                    split[key] += part[key]
                split["apportioned"] |= part["apportioned"]
                position = reach
        # events whose own days this event's period and impact alone made concurrent
        for m in range(count):
            if m != i and m not in partners and overlap[i, m] and increment[m] > 0 and alone[i] > first_day[m]:
                partners.append(m)
        partners.sort()
        row = events.iloc[i]
        cause_parties = _ordered_parties(parties[c] for c in causes_seen)
        rows.append(
            _row(
                method,
                row["step"],
                days,
                split,
                snapshot=row["snapshot"],
                event=names[i],
                party=parties[i],
                basis="event",
                activities=row["activities"],
                alone_days=int(alone[i]),
                causes=join_ids(cause_parties),
                concurrent_with=join_ids(names[c] for c in partners),
                arose_on=row["arose_on"],
            )
        )
    return rows


def _run_frame(frame: pd.DataFrame, snapshot: str, label: str) -> pd.DataFrame:
    activities = [a if isinstance(a, str) else join_ids(a) for a in frame["activities"]]
    return pd.DataFrame(
        {
            "event": frame["event"].to_numpy(dtype=object),
            "party": frame["party"].to_numpy(dtype=object),
            "activities": activities,
            "alone_days": frame["alone_days"].to_numpy(dtype=np.int64),
            "days": frame["increment_days"].to_numpy(dtype=np.int64),
            "arose_on": pd.to_datetime(frame["start"]),
            "until": pd.to_datetime(frame["finish"]),
            "step": [f"insertion {k} into {label}" for k in range(1, len(frame) + 1)],
            "snapshot": snapshot,
        }
    )


def _residual_row(case: Case, method: str, snapshot: str, step: str, days: int, rule: str, arose_on) -> dict:
    """The row of a programme's residual: delay no event explains, or the contractor's
    recovery (see the module docstring)."""
    if days >= 0:
        party = unexplained_risk(case)
        split = classify_days([(party, 1)], days, rule)
        return _row(
            method,
            step,
            days,
            split,
            snapshot=snapshot,
            party=UNEXPLAINED,
            basis="residual",
            causes=party,
            arose_on=arose_on,
        )
    split = classify_days([("contractor", 1)], days, rule)
    return _row(
        method,
        step,
        days,
        split,
        snapshot=snapshot,
        party=RECOVERY,
        basis="recovery",
        causes="contractor",
        arose_on=arose_on,
    )


def impacted_causation(case: Case, result, concurrency: str | None = None, section: str | None = None) -> Causation:
    """Build the causation table of an impacted as-planned analysis.

    One row per event of :class:`delay.methods.impacted.ImpactedResult`, its increment as
    its days, concurrency in time (see the module docstring), and one row for the
    residual: the actual completion less the base impacted with every event.

    Parameters
    ----------
    case : Case
        The loaded case.
    result : ImpactedResult
        The impacted as-planned analysis (:func:`delay.methods.impacted.analyse`).
    concurrency : str, optional
        Overrides the case's ``[analysis] concurrency``.
    section : str, optional
        A section of sections.csv: the table of the run measured at its completion
        milestone (default: the whole works).

    Returns
    -------
    Causation
        The table, explaining the actual less the planned completion.

    Raises
    ------
    CaseError
        An unknown concurrency rule.
    ReconciliationError
        When the classified days do not sum to the actual less the planned completion.
    KeyError
        A section the result has no run for.

    References
    ----------
    AACE RP 29R-03 (2011), MIP 3.6 and section 4.2; SCL Delay and Disruption Protocol, 2nd
    edition (2017), Part B, impacted as-planned analysis (both as recalled).
    """
    rule = _concurrency_of(case, concurrency)
    run = result.run if section is None else result.sections[section]
    rows = sequence_rows(_run_frame(run.events, result.base, result.base), rule, "impacted")
    if run.residual_days:
        rows.append(
            _residual_row(
                case,
                "impacted",
                result.base,
                f"residual: {run.target} finished {run.actual_completion.isoformat()}, against "
                f"{run.completion_cumulative.isoformat()} with every event inserted",
                run.residual_days,
                rule,
                run.completion_cumulative,
            )
        )
    table = causation_frame(rows)
    explained = int(run.explained_days)
    reconcile(table, explained, f"causation of the impacted as-planned analysis on {result.base}, at {run.target}")
    notes = (
        "Each event's days are its increment in the chronological cumulative run: an earlier event "
        "consumes float first (float is shared, first come, first served).",
        "Events are concurrent only when their periods overlap and each alone would have delayed completion "
        "that far; impacts alone need not add up.",
        "The method measures the plan's response to the events, not what happened; the residual row is the "
        "difference from the actual completion.",
    )
    return Causation(
        "impacted",
        table,
        explained,
        f"the actual less the planned completion (the events' increments on {result.base} and the residual)",
        run.completion_base,
        rule,
        notes,
    )


def time_impact_causation(case: Case, result, concurrency: str | None = None, section: str | None = None) -> Causation:
    """Build the causation table of a time impact analysis.

    Per programme of :class:`delay.methods.tia.TimeImpactResult`, one row per event
    inserted into it (its increment), concurrency in time within the programme's run, and
    one row for its residual.

    Parameters
    ----------
    case : Case
        The loaded case.
    result : TimeImpactResult
        The time impact analysis (:func:`delay.methods.tia.analyse`).
    concurrency : str, optional
        Overrides the case's ``[analysis] concurrency``.
    section : str, optional
        A section of sections.csv: the table of the trace of its completion milestone
        (default: the whole works).

    Returns
    -------
    Causation
        The table, explaining the actual less the planned completion.

    Raises
    ------
    CaseError
        An unknown concurrency rule.
    ReconciliationError
        When the classified days do not sum to the actual less the planned completion.
    KeyError
        A section the result has no trace for.

    References
    ----------
    AACE RP 29R-03 (2011), MIP 3.7; SCL Delay and Disruption Protocol, 2nd edition (2017),
    Part B, time impact analysis (both as recalled).
    """
    rule = _concurrency_of(case, concurrency)
    rows: list[dict] = []
    trace = result.trace if section is None else result.sections[section]
    events = trace.events
    for update in trace.updates.itertuples(index=False):
        run = events[events["snapshot"] == update.snapshot].reset_index(drop=True) if len(events) else events
        if len(run):
            rows += sequence_rows(_run_frame(run, update.snapshot, update.snapshot), rule, "tia")
        if int(update.residual_days):
            rows.append(
                _residual_row(
                    case,
                    "tia",
                    update.snapshot,
                    f"residual of {update.snapshot}: {update.next_snapshot} finishes "
                    f"{update.next_completion.isoformat()}, against {update.completion_after.isoformat()} impacted",
                    int(update.residual_days),
                    rule,
                    update.next_data_date,
                )
            )
    table = causation_frame(rows)
    explained = int(trace.explained_days)
    reconcile(table, explained, f"causation of the time impact analysis, at {trace.target}")
    notes = (
        "Each event's days are its increment in the programme it was inserted into (the last before it "
        "began); events are concurrent only when their periods overlap and each alone would have delayed "
        "completion that far.",
        "Each programme's residual (the next programme's completion less its impacted one) is delay no event "
        "explains, or the contractor's recovery; with the residuals the rows add up to the actual delay.",
    )
    return Causation(
        "tia",
        table,
        explained,
        "the actual less the planned completion (increments and residuals)",
        trace.planned_completion,
        rule,
        notes,
    )


def _baseline_completion(case: Case) -> dt.date:
    """The planned finish of the project's completion activity (the baseline's)."""
    from .convert import day_to_date
    from .cpm import calendars_of, prepare
    from .events import completion_activity

    result = prepare(case, case.baseline, calendars=calendars_of(case)).run()
    k = int(result.model.network.index_of([completion_activity(case)])[0])
    return day_to_date(int(result.finish_day[k])) if k >= 0 else result.completion


# -- collapsed as-built -------------------------------------------------------------------------
def collapsed_causation(
    case: Case, result, concurrency: str | None = None, planned_completion: dt.date | None = None
) -> Causation:
    """Build the causation table of a collapsed as-built analysis.

    One row per party with events in :class:`delay.methods.collapsed.CollapsedResult`, a
    row of days concurrent between parties and a row of unexplained days (see the module
    docstring).

    Parameters
    ----------
    case : Case
        The loaded case.
    result : CollapsedResult
        The collapsed as-built analysis (:func:`delay.methods.collapsed.analyse`).
    concurrency : str, optional
        Overrides the case's ``[analysis] concurrency``.
    planned_completion : datetime.date, optional
        The completion measured from (default: the baseline's finish of the project's
        completion activity).

    Returns
    -------
    Causation
        The table, explaining the actual less the planned completion.

    Raises
    ------
    CaseError
        An unknown concurrency rule.
    ReconciliationError
        When the rows do not sum to the actual less the planned completion.

    References
    ----------
    AACE RP 29R-03 (2011), MIP 3.8; SCL Delay and Disruption Protocol, 2nd edition
    (2017), Part B, collapsed as-built analysis (both as recalled).
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
        rows.append(
            _row(
                "collapsed",
                f"but for the {p}'s events",
                sole[p],
                split,
                event=join_ids(events_of[p]),
                party=p,
                alone_days=but_for[p],
                causes=p,
                arose_on=earliest(events_of[p]),
            )
        )
    involved = [p for p in parties if events_of[p]]
    if concurrent_days:
        involved.sort(
            key=lambda p: (earliest(events_of[p]) is None, earliest(events_of[p]) or pd.Timestamp.max, PARTIES.index(p))
        )
        causes = [(p, 1) for p in involved] or [(unexplained_risk(case), 1)]
        split = classify_days(causes, concurrent_days, rule)
        events = [e for p in involved for e in events_of[p]]
        rows.append(
            _row(
                "collapsed",
                "but for every event, not for any one party's",
                concurrent_days,
                split,
                event=join_ids(events),
                party=CONCURRENT if len(involved) > 1 else (involved or [UNEXPLAINED])[0],
                causes=join_ids(p for p, _ in causes),
                concurrent_with=join_ids(involved),
                arose_on=earliest(events),
            )
        )
    if unexplained:
        split = classify_days([(unexplained_risk(case), 1)], unexplained, rule)
        rows.append(
            _row(
                "collapsed",
                "not taken out by any event",
                unexplained,
                split,
                party=UNEXPLAINED,
                basis="unexplained",
                causes=unexplained_risk(case),
            )
        )
    table = causation_frame(rows)
    reconcile(table, delay, "causation of the collapsed as-built analysis")
    notes = (
        "But-for days (alone_days) need not add up; the rows add up to the actual less the planned completion "
        "by construction: sole days, days concurrent between parties, and days no event explains.",
    )
    if not getattr(result, "reproduced", True):
        notes += (
            "The as-built model does not reproduce the actual dates; the difference is among the days no "
            "event explains.",
        )
    return Causation(
        "collapsed",
        table,
        delay,
        "the actual less the planned completion",
        planned,
        rule,
        notes + tuple(getattr(result, "notes", ()))[:1],
    )


# -- any method -----------------------------------------------------------------------------------
def causation(
    case: Case, method: str, result=None, concurrency: str | None = None, section: str | None = None
) -> Causation:
    """Build the causation table of one method, running the method when ``result`` is not given.

    Parameters
    ----------
    case : Case
        The loaded case.
    method : str
        One of :data:`METHODS`.
    result : object, optional
        The method's result (``analyse(case)`` of its module), if already computed.
    concurrency : str, optional
        Overrides the case's ``[analysis] concurrency``.
    section : str, optional
        A section of sections.csv: the table of the method's own trace of its completion
        milestone (windows, impacted, tia; the collapsed as-built measures the whole works
        only and passes it over); default the whole works.

    Returns
    -------
    Causation
        The method's causation table.

    Raises
    ------
    CaseError
        An unknown method or concurrency rule, or what the method raises for bad input.
    ReconciliationError
        A table that does not add up.

    Examples
    --------
    >>> table = causation(demo, "impacted").table
    >>> table[["event", "party", "days", "classification"]].head(3).values.tolist()
    [['EV01', 'neutral', 3, 'excusable'], ['EV02', 'employer', 10, 'compensable'], ['EV03', 'employer', 0, 'no delay']]
    """
    if method not in METHODS:
        raise CaseError(
            Problem(file="--method", message=f"unknown method '{method}'", fix=f"choose among: {', '.join(METHODS)}")
        )
    if result is None:
        from importlib import import_module

        result = import_module(f"delay.methods.{method}").analyse(case)
    if method == "windows":
        return windows_causation(case, result, concurrency, section)
    if method == "impacted":
        return impacted_causation(case, result, concurrency, section)
    if method == "tia":
        return time_impact_causation(case, result, concurrency, section)
    return collapsed_causation(case, result, concurrency)
