"""Extension of time, compensation and damages from the causation tables.

For each method (windows, impacted as-planned, time impact analysis, collapsed as-built) and
for the whole works and each section of sections.csv, :func:`assess` turns the method's
causation table (:mod:`delay.causation`) into the figures a contract administrator, an
adjudicator or a mediator asks for.

The figures (dates are calendar dates, days calendar days)
----------------------------------------------------------
- *Contract completion in force*: the contract completion date (``[project]
  contract_completion``; a section's own date from sections.csv) plus the extensions
  already granted (extensions_granted.csv), each in force from its ``granted_on`` date
  (:mod:`delay.contract`). A row with a ``section`` applies to that section only, a row
  without one to the whole works only; the section whose completion activity is the
  project's completion activity is the whole works, and its figures are the whole works'.
- *Completion with only excusable delays*: the planned completion (the baseline's
  completion, or the section milestone's finish in the baseline) plus the excusable days of
  the causation table.
- *Extension of time* = max(0, completion with only excusable delays - completion in
  force), and never more than the excusable days: a baseline that already finishes after
  the date in force gives no extension by itself (the contractor's own programme overran
  the contract date; those days stay culpable - common practice). Float is shared, first come, first served: the
  baseline's margin before the
  contract date (terminal float) is taken up by the first delays whatever their cause, and
  an extension already granted is not granted again: the extension is measured against
  the contract completion date then in force (SCL Delay and Disruption Protocol, 2nd
  edition (2017), core principles 4 and 7, as recalled; a contract that reserves terminal
  float to the contractor would measure from the planned completion instead). The
  *revised completion* is the completion in force plus the extension of time.
- *Days of liquidated damages* (``ld_days``) = max(0, actual or forecast completion -
  revised completion): the days liquidated damages may be levied for (not to be confused
  with the causation table's ``culpable_days``, the contractor's part of each row). The actual completion is the
  as-built record's;
  without one, the last update's forecast. Beside it, from the causation table
  (:func:`delay.causation.class_totals`): ``excusable_days`` (employer and neutral, net),
  ``culpable_delay_days`` (the contractor's net delay, when positive) and
  ``acceleration_days`` (the contractor's net gain: recovery it made, shown and never
  cutting the extension), with ``excusable + culpable delay - acceleration`` = the delay
  the method explains (the actual less the planned completion). An extension beyond the
  actual overrun past the completion in force is explained by that acceleration.
- *Liquidated damages* = ``ld_days`` x the rate (a section's own rate from sections.csv,
  else ``[commercial] liquidated_damages_per_day``), limited to ``liquidated_damages_cap``
  when that is above 0. The cap is applied to each figure (the whole works, each section)
  on its own; how a contract's cap aggregates sections is for the contract.
- *Compensable days* are the table's compensable days; their *prolongation cost* prices
  each row's compensable days at the rate of the period of prolongation_rates.csv that
  holds the date its delay arose (a window's last day, an event's start), else at
  ``[commercial] prolongation_cost_per_day``. Prolongation is priced when the delay was
  caused, not at the end of the overrun (SCL Protocol 2017, core principle 17 and Part B
  on compensation for prolongation, as recalled: the sum due is evaluated by reference to
  the period when the effect of the employer risk event was felt, not the extended period
  at the end of the contract). Compensable days follow core principle 10 (as recalled):
  only days every cause of which is employer risk (or, under ``apportion``, the employer's
  share of concurrent days). Sums already paid are not deducted.
- *Concurrent days*: days of the table with causes of more than one party.
- Beside each event of the register: its notification date and the days claimed, where the
  register gives them, and the days the method assesses for it.

Sections
--------
Each section's figures follow the same rules, measured at its completion milestone
(``completion_activity``), from the method's own trace of that milestone: the windows
analysis traces each milestone by the same ledger rules; the impacted as-planned and the
time impact analysis read each milestone's finish in every run of their events
(increments, impacts alone, residuals). The whole-works section's figures are the whole
works'. The collapsed as-built measures the whole works only: for another section its dates
in force, planned and actual are given, its entitlement is not.

The sections' figures overlap each other and the whole works' (a section's delay is
usually part of the works' delay): never add them.

References
----------
Society of Construction Law, Delay and Disruption Protocol, 2nd edition (2017): core
principles 4 (extension against the completion date in force), 7 and 8 (float), 9 and 10
(concurrency), 17 (period for evaluating prolongation) and Part B, as recalled. AACE
International Recommended Practice 29R-03, Forensic Schedule Analysis (2011), section 4
(concurrency, as recalled).

Examples
--------
>>> from delay.case import load_case
>>> result = assess(load_case("case_demo"), ["impacted"])
>>> result.summary[["method", "eot_days", "ld_days", "ld_exposure"]].values.tolist()
[['impacted', 0, 6, 27000.0]]
"""

from __future__ import annotations

import dataclasses
import datetime as dt
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from .causation import METHODS, Causation, causation, class_totals
from .contract import completion_in_force, grants, whole_works_section
from .convert import NO_DAY, day_to_date, iso_date, json_records, split_ids
from .cpm import ScheduleResult, calendars_of, prepare
from .errors import CaseError, Problem
from .events import completion_activity
from .memo import remembered
from .model import Case

__all__ = [
    "assess",
    "entitlement",
    "Entitlement",
    "EntitlementResult",
    "completion_in_force",
    "prolongation_rate",
    "prolongation_build_up",
    "prolongation_cost",
    "liquidated_damages",
    "SECTION_COLUMNS",
    "EVENT_COLUMNS",
]

SECTION_COLUMNS = [
    "section",
    "name",
    "completion_activity",
    "whole_works",
    "contract_completion",
    "granted_days",
    "completion_in_force",
    "planned_completion",
    "excusable_days",
    "completion_with_excusable_delays",
    "eot_days",
    "revised_completion",
    "actual_completion",
    "compensable_days",
    "prolongation_cost",
    "culpable_delay_days",
    "acceleration_days",
    "ld_days",
    "liquidated_damages_per_day",
    "ld_exposure",
    "ld_capped",
    "concurrent_days",
    "note",
]
EVENT_COLUMNS = [
    "event",
    "title",
    "party",
    "notified",
    "claimed_days",
    "assessed_days",
    "excusable_days",
    "compensable_days",
    "note",
]


# -- the contract's figures -------------------------------------------------------------------
def prolongation_rate(case: Case, day) -> float:
    """Give the time-related cost of a day of prolongation arising on ``day``.

    Parameters
    ----------
    case : Case
        The loaded case.
    day : date-like or None
        The date the delay arose; ``None`` (or a blank) for no date.

    Returns
    -------
    float
        The rate of the period of prolongation_rates.csv that holds ``day`` (its first
        such row), else the flat ``[commercial] prolongation_cost_per_day`` (also for no
        date), in the case's currency per calendar day.

    Examples
    --------
    >>> prolongation_rate(demo, dt.date(2025, 7, 1)), prolongation_rate(demo, None)
    (2800.0, 3100.0)
    """
    flat = float(case.settings.commercial.prolongation_cost_per_day)
    if day is None or pd.isna(day):
        return flat
    rates = case.prolongation_rates
    when = pd.Timestamp(day)
    inside = rates[(rates["from"] <= when) & (rates["to"] >= when)]
    return float(inside["cost_per_day"].iloc[0]) if len(inside) else flat


def prolongation_build_up(case: Case, rows: pd.DataFrame) -> pd.DataFrame:
    """Build up the prolongation cost: one row per rate applied.

    Each row says where the rate comes from, the compensable days priced at it and their
    cost; the rows add up to :func:`prolongation_cost`.

    Parameters
    ----------
    case : Case
        The loaded case.
    rows : pandas.DataFrame
        Rows of a causation table, with ``compensable_days`` and ``arose_on`` (the date
        each row's delay arose, or blank).

    Returns
    -------
    DataFrame
        ``from``, ``to`` (the rate's period, blank for the flat rate), ``source``
        (``prolongation_rates.csv row N`` or ``case.toml [commercial]
        prolongation_cost_per_day``), ``cost_per_day``, ``days``, ``cost`` (rounded to
        cents); the rates of prolongation_rates.csv in file order, then the flat rate.

    Examples
    --------
    >>> arose = [dt.date(2025, 7, 1), None, dt.date(2025, 7, 15)]
    >>> rows = pd.DataFrame({"compensable_days": [3, 2, 4], "arose_on": arose})
    >>> prolongation_build_up(demo, rows)[["source", "cost_per_day", "days", "cost"]].values.tolist()
    ... # doctest: +NORMALIZE_WHITESPACE
    [['prolongation_rates.csv row 2', 2800.0, 7, 19600.0],
     ['case.toml [commercial] prolongation_cost_per_day', 3100.0, 2, 6200.0]]
    """
    columns = ["from", "to", "source", "cost_per_day", "days", "cost"]
    rates = case.prolongation_rates.reset_index(drop=True)
    flat = float(case.settings.commercial.prolongation_cost_per_day)
    found: dict[int, int] = {}
    for days, day in zip(rows["compensable_days"], rows["arose_on"]) if len(rows) else ():
        if not int(days):
            continue
        key = -1
        if day is not None and not pd.isna(day):
            inside = np.flatnonzero(
                ((rates["from"] <= pd.Timestamp(day)) & (rates["to"] >= pd.Timestamp(day))).to_numpy()
            )
            key = int(inside[0]) if inside.size else -1
        found[key] = found.get(key, 0) + int(days)
    out = []
    for key in sorted(found, key=lambda k: (k < 0, k)):
        if key < 0:
            out.append(
                {
                    "from": None,
                    "to": None,
                    "source": "case.toml [commercial] prolongation_cost_per_day",
                    "cost_per_day": flat,
                    "days": found[key],
                    "cost": round(found[key] * flat, 2),
                }
            )
        else:
            rate = float(rates["cost_per_day"].iloc[key])
            out.append(
                {
                    "from": pd.Timestamp(rates["from"].iloc[key]).date(),
                    "to": pd.Timestamp(rates["to"].iloc[key]).date(),
                    "source": f"prolongation_rates.csv row {key + 2}",
                    "cost_per_day": rate,
                    "days": found[key],
                    "cost": round(found[key] * rate, 2),
                }
            )
    return pd.DataFrame(out, columns=columns)


def prolongation_cost(case: Case, rows: pd.DataFrame) -> float:
    """Price the compensable days of causation rows, each at the rate on its ``arose_on`` date.

    Parameters
    ----------
    case : Case
        The loaded case.
    rows : pandas.DataFrame
        Rows with ``compensable_days`` and ``arose_on``, as for :func:`prolongation_build_up`.

    Returns
    -------
    float
        The sum of each row's compensable days times its rate (:func:`prolongation_rate`),
        rounded to cents.

    Examples
    --------
    >>> arose = [dt.date(2025, 7, 1), None, dt.date(2025, 7, 15)]
    >>> rows = pd.DataFrame({"compensable_days": [3, 2, 4], "arose_on": arose})
    >>> prolongation_cost(demo, rows)  # 7 days at 2,800 and 2 at the flat 3,100
    25800.0
    """
    build_up = prolongation_build_up(case, rows)
    return round(float(build_up["cost"].sum()), 2) if len(build_up) else 0.0


def liquidated_damages(case: Case, ld_days: int, rate: float) -> tuple[float, bool]:
    """Compute liquidated damages: days of damages times the rate, within the case's cap.

    Parameters
    ----------
    case : Case
        The loaded case (its ``[commercial] liquidated_damages_cap``; 0 for no cap).
    ld_days : int
        Days of liquidated damages (calendar days; a negative number counts as 0).
    rate : float
        Liquidated damages per day.

    Returns
    -------
    tuple of (float, bool)
        ``(amount, capped)``: the amount rounded to cents, and whether the cap limited it.

    Examples
    --------
    >>> liquidated_damages(demo, 10, 4500.0)
    (45000.0, False)
    >>> liquidated_damages(demo, 1000, 4500.0)  # the demo's cap is 1,840,000
    (1840000.0, True)
    """
    amount = max(0, int(ld_days)) * float(rate)
    cap = float(case.settings.commercial.liquidated_damages_cap)
    if cap > 0 and amount > cap:
        return round(cap, 2), True
    return round(amount, 2), False


def _figures(
    case: Case, *, planned: dt.date, in_force: dt.date, actual: dt.date, rate: float, rows: pd.DataFrame
) -> dict:
    totals = class_totals(rows)
    excusable = totals["excusable_days"]
    with_excusable = planned + dt.timedelta(days=int(excusable))
    eot = max(0, min(int(excusable), (with_excusable - in_force).days))
    revised = in_force + dt.timedelta(days=eot)
    culpable = max(0, (actual - revised).days)
    amount, capped = liquidated_damages(case, culpable, rate)
    return {
        "planned_completion": planned,
        "excusable_days": int(excusable),
        "completion_with_excusable_delays": with_excusable,
        "eot_days": eot,
        "revised_completion": revised,
        "actual_completion": actual,
        "compensable_days": totals["compensable_days"],
        "prolongation_cost": prolongation_cost(case, rows) if len(rows) else 0.0,
        "culpable_delay_days": totals["culpable_delay_days"],
        "acceleration_days": totals["acceleration_days"],
        "ld_days": culpable,
        "liquidated_damages_per_day": float(rate),
        "ld_exposure": amount,
        "ld_capped": capped,
        "concurrent_days": int(rows["concurrent_days"].sum()) if len(rows) else 0,
    }


# -- results ----------------------------------------------------------------------------------------
@dataclass(frozen=True)
class Entitlement:
    """One method's entitlement for the whole works, its sections and its events.

    Made by :func:`entitlement`. Days are calendar days; money is in ``currency``. See the
    module docstring for every figure.

    Parameters
    ----------
    method : str
        ``windows``, ``impacted``, ``tia`` or ``collapsed``.
    currency : str
        ISO 4217 code of every amount.
    concurrency : str
        The concurrency rule applied: ``time_not_money`` or ``apportion``.
    contract_completion : datetime.date
        The contract completion date of the whole works.
    granted_days : int
        Days of extension already granted for the whole works.
    completion_in_force : datetime.date
        The contract completion date plus the days granted.
    planned_completion : datetime.date
        The planned completion the method measures from (the baseline's).
    excusable_days : int
        The employer's and neutral days of the causation table, net.
    completion_with_excusable_delays : datetime.date
        The planned completion plus the excusable days.
    eot_days : int
        The extension of time.
    revised_completion : datetime.date
        The completion in force plus the extension of time.
    actual_completion : datetime.date
        The completion the method compares with the revised one: the actual completion
        (the as-built record's), else the last update's forecast.
    compensable_days : int
        The compensable days of the causation table.
    prolongation_cost : float
        The compensable days priced at the rates of their periods.
    culpable_delay_days : int
        The contractor's net delay, when positive.
    acceleration_days : int
        The contractor's net gain (recovery), shown and never cutting the extension.
    ld_days : int
        Days of liquidated damages: the actual completion less the revised one, at least 0.
    liquidated_damages_per_day : float
        The rate of liquidated damages.
    ld_exposure : float
        ``ld_days`` times the rate, within the cap.
    ld_capped : bool
        Whether the cap limited ``ld_exposure``.
    concurrent_days : int
        Days of the table with causes of more than one party.
    causation : Causation
        The method's :class:`delay.causation.Causation`.
    sections : pandas.DataFrame
        :data:`SECTION_COLUMNS`, one row per section of sections.csv (figures ``None``
        where the method cannot give them, with the reason in ``note``).
    events : pandas.DataFrame
        :data:`EVENT_COLUMNS`, one row per event of the register.
    grants : pandas.DataFrame, optional
        The extensions already granted that apply to the whole works
        (extensions_granted.csv's rows, the grant's id as ``grant``).
    prolongation : pandas.DataFrame, optional
        The build-up of the prolongation cost (:func:`prolongation_build_up`).
    notes : tuple of str, optional
        What the reader should know about the figures, in words.

    Examples
    --------
    >>> found = entitlement(demo, "impacted")
    >>> found.completion_in_force, found.eot_days, found.revised_completion, found.overrun_days
    (datetime.date(2026, 6, 26), 0, datetime.date(2026, 6, 26), 6)
    """

    method: str
    currency: str
    concurrency: str
    contract_completion: dt.date
    granted_days: int
    completion_in_force: dt.date
    planned_completion: dt.date
    excusable_days: int
    completion_with_excusable_delays: dt.date
    eot_days: int
    revised_completion: dt.date
    actual_completion: dt.date
    compensable_days: int
    prolongation_cost: float
    culpable_delay_days: int
    acceleration_days: int
    ld_days: int
    liquidated_damages_per_day: float
    ld_exposure: float
    ld_capped: bool
    concurrent_days: int
    causation: Causation = field(repr=False)
    sections: pd.DataFrame = field(repr=False)
    events: pd.DataFrame = field(repr=False)
    grants: pd.DataFrame = field(default=None, repr=False)
    prolongation: pd.DataFrame = field(default=None, repr=False)
    notes: tuple[str, ...] = ()

    @property
    def overrun_days(self) -> int:
        """The actual (or forecast) completion less the completion in force."""
        return (self.actual_completion - self.completion_in_force).days

    def to_json(self) -> dict:
        """Give the entitlement as plain JSON values (dates as ISO text).

        Returns
        -------
        dict
            Every figure of the whole works, ``overrun_days``, the causation's explained
            days and table, and the sections, events, grants and prolongation tables as
            lists of records, with the notes.
        """
        return {
            "method": self.method,
            "eot_days": self.eot_days,
            "revised_completion": iso_date(self.revised_completion),
            "compensable_days": self.compensable_days,
            "prolongation_cost": self.prolongation_cost,
            "ld_days": self.ld_days,
            "ld_exposure": self.ld_exposure,
            "concurrent_days": self.concurrent_days,
            "excusable_days": self.excusable_days,
            "culpable_delay_days": self.culpable_delay_days,
            "acceleration_days": self.acceleration_days,
            "sections": json_records(self.sections),
            "contract_completion": iso_date(self.contract_completion),
            "granted_days": self.granted_days,
            "completion_in_force": iso_date(self.completion_in_force),
            "planned_completion": iso_date(self.planned_completion),
            "completion_with_excusable_delays": iso_date(self.completion_with_excusable_delays),
            "actual_completion": iso_date(self.actual_completion),
            "overrun_days": self.overrun_days,
            "liquidated_damages_per_day": self.liquidated_damages_per_day,
            "ld_capped": self.ld_capped,
            "explained_days": self.causation.explained_days,
            "explains": self.causation.explains,
            "causation": json_records(self.causation.table),
            "events": json_records(self.events),
            "grants": [] if self.grants is None else json_records(self.grants),
            "prolongation": [] if self.prolongation is None else json_records(self.prolongation),
            "notes": list(self.notes),
        }


@dataclass(frozen=True)
class EntitlementResult:
    """The entitlement of every method assessed, in the order asked for.

    Made by :func:`assess`.

    Parameters
    ----------
    methods : tuple of Entitlement
        One per method assessed.
    currency : str
        ISO 4217 code of every amount.
    concurrency : str
        The concurrency rule applied.
    """

    methods: tuple[Entitlement, ...]
    currency: str
    concurrency: str

    def method(self, name: str) -> Entitlement:
        """Give the entitlement of one method.

        Parameters
        ----------
        name : str
            ``windows``, ``impacted``, ``tia`` or ``collapsed``.

        Returns
        -------
        Entitlement
            The method's entitlement.

        Raises
        ------
        KeyError
            When the method was not assessed.

        Examples
        --------
        >>> assess(demo, ["impacted"]).method("impacted").ld_days
        6
        """
        for item in self.methods:
            if item.method == name:
                return item
        raise KeyError(f"no method '{name}' in the result")

    @property
    def summary(self) -> pd.DataFrame:
        """One row per method: the whole works' figures."""
        columns = [
            "method",
            "completion_in_force",
            "planned_completion",
            "excusable_days",
            "eot_days",
            "revised_completion",
            "actual_completion",
            "compensable_days",
            "prolongation_cost",
            "culpable_delay_days",
            "acceleration_days",
            "ld_days",
            "ld_exposure",
            "ld_capped",
            "concurrent_days",
        ]
        return pd.DataFrame([{c: getattr(m, c) for c in columns} for m in self.methods], columns=columns)

    def to_json(self) -> dict:
        """Give every method's entitlement as plain JSON values.

        Returns
        -------
        dict
            ``currency``, ``concurrency`` and ``methods`` (each :meth:`Entitlement.to_json`).
        """
        return {
            "currency": self.currency,
            "concurrency": self.concurrency,
            "methods": [m.to_json() for m in self.methods],
        }


# -- schedules used for sections and for the actual completion ------------------------------------
def _record_snapshot(case: Case):
    """The as-built record when there is one, else the last snapshot."""
    return case.asbuilt_snapshot if case.asbuilt_snapshot is not None else case.snapshots[-1]


def _finish_of(result: ScheduleResult, activity: str) -> dt.date | None:
    k = int(result.model.network.index_of([activity])[0])
    if k < 0 or result.finish_day[k] == NO_DAY:
        return None
    return day_to_date(int(result.finish_day[k]))


class _Schedules:
    """Schedules of the case's snapshots, each computed once."""

    def __init__(self, case: Case):
        self.case = case
        self.calendars = calendars_of(case)
        self._done: dict[str, ScheduleResult] = {}

    def of(self, snapshot) -> ScheduleResult:
        if snapshot.folder not in self._done:
            self._done[snapshot.folder] = prepare(self.case, snapshot, calendars=self.calendars).run()
        return self._done[snapshot.folder]


# -- sections -------------------------------------------------------------------------------------
def _section_base(case: Case, section) -> dict:
    contract, granted, in_force = completion_in_force(case, str(section["section"]))
    rate = section["liquidated_damages_per_day"]
    rate = float(rate) if pd.notna(rate) else float(case.settings.commercial.liquidated_damages_per_day)
    whole = whole_works_section(case) == str(section["section"])
    return {
        "section": section["section"],
        "name": section["name"],
        "completion_activity": section["completion_activity"],
        "whole_works": whole,
        "contract_completion": contract,
        "granted_days": granted,
        "completion_in_force": in_force,
        "liquidated_damages_per_day": rate,
    }


def _section_row(base: dict, **values) -> dict:
    row = {column: None for column in SECTION_COLUMNS}
    row.update(base)
    row.update(values)
    return row


def _sections(case: Case, method: str, result, rule: str, whole: Entitlement) -> pd.DataFrame:
    """Every section's figures: the whole-works section's are the whole works'; the others'
    come from the method's own trace of the section's milestone (see the module docstring)."""
    schedules = _Schedules(case)
    baseline = schedules.of(case.baseline)
    record = schedules.of(_record_snapshot(case))
    out = []
    for _, section in case.sections.iterrows():
        base = _section_base(case, section)
        name = str(section["section"])
        planned = _finish_of(baseline, section["completion_activity"])
        actual = _finish_of(record, section["completion_activity"])
        if base["whole_works"]:
            figures = {c: getattr(whole, c) for c in SECTION_COLUMNS if hasattr(whole, c) and c not in base}
            out.append(_section_row(base, **figures, note="the whole of the works: the whole works' figures"))
            continue
        traced = getattr(result, "sections", {}) or {}
        if method == "collapsed" or name not in traced:
            why = (
                "the collapsed as-built measures the whole works only: no entitlement for the section"
                if method == "collapsed"
                else "the section milestone is not in every programme: not assessed"
            )
            out.append(_section_row(base, planned_completion=planned, actual_completion=actual, note=why))
            continue
        table_of = causation(case, method, result, rule, section=name)
        figures = _figures(
            case,
            planned=table_of.planned_completion,
            in_force=base["completion_in_force"],
            actual=actual or table_of.planned_completion,
            rate=base["liquidated_damages_per_day"],
            rows=table_of.table,
        )
        out.append(_section_row(base, **figures, note=f"traced to {section['completion_activity']}"))
    return pd.DataFrame(out, columns=SECTION_COLUMNS, dtype=object)


# -- events ------------------------------------------------------------------------------------
def _event_table(case: Case, method: str, table: pd.DataFrame, collapsed_result=None) -> pd.DataFrame:
    register = case.events
    rows = []
    for event in register.itertuples(index=False):
        claimed = None if pd.isna(event.claimed_days) else int(event.claimed_days)
        notified = None if pd.isna(event.notified) else pd.Timestamp(event.notified).date()
        note = ""
        if method == "collapsed":
            found = collapsed_result.by_event[collapsed_result.by_event["event"] == event.id]
            value = found["days_earlier"].iloc[0] if len(found) else pd.NA
            assessed = None if pd.isna(value) else int(value)
            excusable = None if assessed is None else (assessed if event.party in ("employer", "neutral") else 0)
            compensable = None if assessed is None else (assessed if event.party == "employer" else 0)
            note = (
                "but-for days of the event alone: need not add up"
                if assessed is not None
                else ("not scored: " + str(found["note"].iloc[0]) if len(found) else "not scored")
            )
        else:
            mine = table[[event.id in split_ids(e) for e in table["event"]]] if len(table) else table
            assessed = int(mine["days"].sum()) if len(mine) else 0
            excusable = int(mine["excusable_days"].sum()) if len(mine) else 0
            compensable = int(mine["compensable_days"].sum()) if len(mine) else 0
            if method == "windows" and len(mine) and any(";" in str(e) for e in mine["event"]):
                note = "charges matched to several events are shown against each: need not add up"
        rows.append(
            {
                "event": event.id,
                "title": event.title,
                "party": event.party,
                "notified": notified,
                "claimed_days": claimed,
                "assessed_days": assessed,
                "excusable_days": excusable,
                "compensable_days": compensable,
                "note": note,
            }
        )
    return pd.DataFrame(rows, columns=EVENT_COLUMNS, dtype=object)


# -- the assessment -----------------------------------------------------------------------------
def _run_method(case: Case, method: str):
    if method == "windows":
        from .methods.windows import analyse
    elif method == "impacted":
        from .methods.impacted import analyse
    elif method == "tia":
        from .methods.tia import analyse
    elif method == "collapsed":
        from .methods.collapsed import analyse
    else:
        raise CaseError(
            Problem(
                file="--method", message=f"unknown method '{method}'", fix=f"choose among: {', '.join(METHODS)}, all"
            )
        )
    return analyse(case)


def _actual_completion(case: Case, method: str, result) -> dt.date:
    """The completion the method compares with the revised one: the completion activity's
    actual finish (the as-built record's, else the last update's forecast)."""
    if method == "windows":
        return result.last_completion
    if method == "collapsed":
        return result.actual_completion
    found = _finish_of(_Schedules(case).of(_record_snapshot(case)), completion_activity(case))
    return found if found is not None else result.actual_completion


def entitlement(case: Case, method: str, result=None, concurrency: str | None = None) -> Entitlement:
    """Assess the entitlement of one method for the whole works, each section and each event.

    Remembered per case, method, concurrency rule and result object
    (:func:`delay.memo.remembered`): asking again hands back the same object.

    Parameters
    ----------
    case : Case
        The loaded case.
    method : str
        ``windows``, ``impacted``, ``tia`` or ``collapsed``.
    result : object, optional
        The method's result, if already computed (else the method is run with its
        defaults).
    concurrency : str, optional
        Overrides the case's ``[analysis] concurrency`` (``time_not_money`` or
        ``apportion``).

    Returns
    -------
    Entitlement
        The method's figures (see the module docstring).

    Raises
    ------
    CaseError
        An unknown method, or what the method raises for bad input.
    ReconciliationError
        A causation table, or a section's, that does not add up.

    References
    ----------
    SCL Delay and Disruption Protocol, 2nd edition (2017), core principles 4, 7, 9, 10 and
    17 (as recalled).

    Examples
    --------
    >>> found = entitlement(demo, "impacted")
    >>> found.eot_days, found.ld_days, found.ld_exposure
    (0, 6, 27000.0)
    >>> entitlement(demo, "impacted") is found
    True
    """
    if result is None:
        result = _run_method(case, method)
    rule = concurrency or case.settings.analysis.concurrency
    found = remembered(
        case,
        ("entitlement", method, rule, id(result)),
        lambda: (result, _entitlement(case, method, result, concurrency)),
    )
    if found[0] is result:  # the same result object, not another that took its id
        return found[1]
    return _entitlement(case, method, result, concurrency)


def _entitlement(case: Case, method: str, result, concurrency: str | None) -> Entitlement:
    table_of = causation(case, method, result, concurrency)
    rule = table_of.concurrency
    table = table_of.table
    contract, granted, in_force = completion_in_force(case)
    commercial = case.settings.commercial
    actual = _actual_completion(case, method, result)
    figures = _figures(
        case,
        planned=table_of.planned_completion,
        in_force=in_force,
        actual=actual,
        rate=float(commercial.liquidated_damages_per_day),
        rows=table,
    )
    notes = list(table_of.notes)
    notes.append("Sections' figures overlap each other and the whole works': never add them.")
    if figures["acceleration_days"]:
        notes.append(
            f"The contractor's net recovery of {figures['acceleration_days']} days is acceleration: it "
            "is shown, and it does not cut the extension of time."
        )
    if method in ("impacted", "tia"):
        notes.append(
            "The actual completion is the as-built record's"
            if case.asbuilt_snapshot is not None
            else "The completion compared is the last update's forecast (no as-built record)"
        )
    prolongation = prolongation_build_up(case, table)
    whole = Entitlement(
        method=method,
        currency=commercial.currency,
        concurrency=rule,
        contract_completion=contract,
        granted_days=granted,
        completion_in_force=in_force,
        **figures,
        causation=table_of,
        sections=pd.DataFrame(columns=SECTION_COLUMNS),
        events=_event_table(case, method, table, result if method == "collapsed" else None),
        grants=grants(case).rename(columns={"id": "grant"}),
        prolongation=prolongation,
        notes=tuple(notes),
    )
    return dataclasses.replace(whole, sections=_sections(case, method, result, rule, whole))


def assess(
    case: Case,
    methods: Sequence[str] = METHODS,
    results: Mapping[str, object] | None = None,
    concurrency: str | None = None,
) -> EntitlementResult:
    """Assess the entitlement under each of ``methods`` (default all four).

    Parameters
    ----------
    case : Case
        The loaded case.
    methods : sequence of str, optional
        Names among ``windows``, ``impacted``, ``tia``, ``collapsed``, in the order wanted.
    results : Mapping of str to object, optional
        Method results already computed, by method name.
    concurrency : str, optional
        Overrides the case's ``[analysis] concurrency``.

    Returns
    -------
    EntitlementResult
        One :class:`Entitlement` per method, in the order of ``methods``.

    Raises
    ------
    CaseError
        An unknown method or bad input.
    ReconciliationError
        Figures that do not add up.

    Examples
    --------
    >>> assess(demo, ["impacted"]).summary[["method", "completion_in_force", "eot_days"]].values.tolist()
    [['impacted', datetime.date(2026, 6, 26), 0]]
    """
    results = dict(results or {})
    done = tuple(entitlement(case, m, results.get(m), concurrency) for m in methods)
    rule = done[0].concurrency if done else (concurrency or case.settings.analysis.concurrency)
    return EntitlementResult(done, case.settings.commercial.currency, rule)
