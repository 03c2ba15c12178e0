"""Extension of time, compensation and damages from the causation tables.

For each method (windows, impacted as-planned, time impact analysis, collapsed as-built) and
for the whole works and each section of sections.csv, :func:`assess` turns the method's
causation table (:mod:`delay.causation`) into the figures a contract administrator, an
adjudicator or a mediator asks for.

The figures (dates are calendar dates, days calendar days)
----------------------------------------------------------
- *Contract completion in force*: the contract completion date (``[project]
  contract_completion``; a section's own date from sections.csv) plus the extensions
  already granted (extensions_granted.csv). A row with a ``section`` applies to that section
  only, a row without one to the whole works only: under sectional completion each section
  has its own date and its own extensions (common practice; the contract governs).
- *Completion with only excusable delays*: the planned completion (the baseline's
  completion, or the section milestone's finish in the baseline) plus the excusable days of
  the causation table.
- *Extension of time* = max(0, completion with only excusable delays - completion in
  force), and never more than the excusable days: a baseline that already finishes after
  the date in force gives no extension by itself (the contractor's own programme overran
  the contract date; those days stay culpable - common practice). Float is shared, first come, first served: the baseline's margin before the
  contract date (terminal float) is taken up by the first delays whatever their cause, and
  an extension already granted is not granted again: the extension is measured against
  the contract completion date then in force (SCL Delay and Disruption Protocol, 2nd
  edition (2017), core principles 4 and 7, as recalled; a contract that reserves terminal
  float to the contractor would measure from the planned completion instead). The
  *revised completion* is the completion in force plus the extension of time.
- *Culpable days* = max(0, actual or forecast completion - revised completion): the days
  liquidated damages may be levied for. The actual completion is the as-built record's;
  without one, the last update's forecast (the windows analysis uses its own last
  boundary, the collapsed as-built its actual completion). ``culpable_delay_days`` beside
  it is the table's sum of culpable days, which the impacted methods (modelling only the
  register's events) need not reach.
- *Liquidated damages* = culpable days x the rate (a section's own rate from sections.csv,
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
(``completion_activity``):

- impacted as-planned and time impact analysis: the events are inserted again exactly as
  the method inserts them (:func:`delay.methods.impacted.apply_event`), and each run's
  finish of the milestone is read (``delay.cpm.prepare(...).run().finish_day``); the
  milestone's increments and impacts alone give a causation table of their own, by the
  rules of :mod:`delay.causation`. The runs' completions are checked against the method's
  own figures.
- windows: the windows analysis traces the driving path to project completion only, so no
  per-milestone charges exist. In each window the milestone's movement (its finish at the
  window's end less at its start) is split, by the largest remainder method, in proportion
  to the window's classified charges (compensable, excusable only, culpable; those of the
  same sign as the movement) on the milestone and the activities that lead to it (in the
  logic of either boundary programme). Where no charge lies on them, the movement is
  classified by the events under way in the window (started on or before its last day,
  finished on or after its first) that name one of those activities, else it is
  unexplained (contractor risk). Tied remainders go culpable first, then excusable, then
  compensable (a tied day is not given time or money). Concurrent days are not measured
  for a section by this method.
- collapsed as-built: the method measures project completion only; a section's dates in
  force, planned and actual are given, its entitlement is not.

The sections' figures overlap each other and the whole works' (a section's delay is
usually part of the works' delay): never add them.

References
----------
Society of Construction Law, Delay and Disruption Protocol, 2nd edition (2017): core
principles 4 (extension against the completion date in force), 7 and 8 (float), 9 and 10
(concurrency), 17 (period for evaluating prolongation) and Part B, as recalled. AACE
International Recommended Practice 29R-03, Forensic Schedule Analysis (2011), section 4
(concurrency, as recalled).

Example
-------
>>> result = assess(load_case("case_demo"), ["impacted"])      # doctest: +SKIP
>>> result.summary[["method", "eot_days", "ld_exposure"]]       # doctest: +SKIP
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass, field
from typing import Mapping, Sequence

import numpy as np
import pandas as pd

from .causation import (DEFAULT_RISK, METHODS, Causation, causation, causation_frame, classify_days,
                        event_activities, largest_remainder, reconcile, sequence_rows)
from .cpm import NO_DAY, ScheduleResult, calendars_of, prepare
from .errors import CaseError, Problem, ReconciliationError
from .model import Case

__all__ = [
    "assess",
    "entitlement",
    "Entitlement",
    "EntitlementResult",
    "completion_in_force",
    "prolongation_rate",
    "prolongation_cost",
    "liquidated_damages",
    "SECTION_COLUMNS",
    "EVENT_COLUMNS",
]

SECTION_COLUMNS = [
    "section", "name", "completion_activity", "contract_completion", "granted_days", "completion_in_force",
    "planned_completion", "excusable_days", "completion_with_excusable_delays", "eot_days", "revised_completion",
    "actual_completion", "compensable_days", "prolongation_cost", "culpable_delay_days", "culpable_days",
    "liquidated_damages_per_day", "ld_exposure", "ld_capped", "concurrent_days", "note",
]
EVENT_COLUMNS = ["event", "title", "party", "notified", "claimed_days", "assessed_days", "excusable_days",
                 "compensable_days", "note"]

_METHOD_NAMES = {"windows": "windows analysis", "impacted": "impacted as-planned",
                 "tia": "time impact analysis", "collapsed": "collapsed as-built"}


# -- the contract's figures -------------------------------------------------------------------
def completion_in_force(case: Case, section: str | None = None) -> tuple[dt.date, int, dt.date]:
    """``(contract completion, days granted, completion in force)`` for the whole works
    (``section=None``: extensions without a section) or one section.

    Raises
    ------
    KeyError: a section not in sections.csv.
    """
    granted = case.extensions_granted
    if section is None:
        contract = case.settings.project.contract_completion
        rows = granted[granted["section"].fillna("") == ""]
    else:
        sections = case.sections
        match = sections[sections["section"] == section]
        if not len(match):
            raise KeyError(f"no section '{section}' in sections.csv")
        contract = pd.Timestamp(match["contract_completion"].iloc[0]).date()
        rows = granted[granted["section"].fillna("") == section]
    days = int(rows["days"].sum()) if len(rows) else 0
    return contract, days, contract + dt.timedelta(days=days)


def prolongation_rate(case: Case, day) -> float:
    """Time-related cost of a day of prolongation arising on ``day``: the rate of the
    period of prolongation_rates.csv that holds it, else the flat
    ``[commercial] prolongation_cost_per_day`` (also for ``day=None``)."""
    flat = float(case.settings.commercial.prolongation_cost_per_day)
    if day is None or pd.isna(day):
        return flat
    rates = case.prolongation_rates
    when = pd.Timestamp(day)
    inside = rates[(rates["from"] <= when) & (rates["to"] >= when)]
    return float(inside["cost_per_day"].iloc[0]) if len(inside) else flat


def prolongation_cost(case: Case, rows: pd.DataFrame) -> float:
    """Sum of each row's ``compensable_days`` times the rate on its ``arose_on`` date."""
    total = 0.0
    for days, day in zip(rows["compensable_days"], rows["arose_on"]):
        if days:
            total += int(days) * prolongation_rate(case, day)
    return round(total, 2)


def liquidated_damages(case: Case, culpable_days: int, rate: float) -> tuple[float, bool]:
    """``(amount, capped)``: culpable days x rate, limited to the case's
    ``liquidated_damages_cap`` when that is above 0."""
    amount = max(0, int(culpable_days)) * float(rate)
    cap = float(case.settings.commercial.liquidated_damages_cap)
    if cap > 0 and amount > cap:
        return round(cap, 2), True
    return round(amount, 2), False


def _figures(case: Case, *, planned: dt.date, in_force: dt.date, excusable: int, actual: dt.date,
             rate: float, rows: pd.DataFrame) -> dict:
    with_excusable = planned + dt.timedelta(days=int(excusable))
    eot = max(0, min(int(excusable), (with_excusable - in_force).days))
    revised = in_force + dt.timedelta(days=eot)
    culpable = max(0, (actual - revised).days)
    amount, capped = liquidated_damages(case, culpable, rate)
    compensable = int(rows["compensable_days"].sum()) if len(rows) else 0
    return {
        "planned_completion": planned, "excusable_days": int(excusable),
        "completion_with_excusable_delays": with_excusable, "eot_days": eot, "revised_completion": revised,
        "actual_completion": actual, "compensable_days": compensable,
        "prolongation_cost": prolongation_cost(case, rows) if len(rows) else 0.0,
        "culpable_delay_days": int(rows["culpable_days"].sum()) if len(rows) else 0,
        "culpable_days": culpable, "liquidated_damages_per_day": float(rate), "ld_exposure": amount,
        "ld_capped": capped,
    }


# -- results ----------------------------------------------------------------------------------------
def _iso(value):
    if value is None or value is pd.NaT:
        return None
    if isinstance(value, pd.Timestamp):
        return value.date().isoformat()
    if isinstance(value, dt.datetime):
        return value.date().isoformat()
    if isinstance(value, dt.date):
        return value.isoformat()
    return None if pd.isna(value) else str(value)


def _plain(value):
    """A JSON value: dates as ISO text, numpy numbers as Python numbers, NA as null."""
    if isinstance(value, (dt.date, pd.Timestamp)):
        return _iso(value)
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, (int, np.integer)):
        return int(value)
    if isinstance(value, (float, np.floating)):
        return None if np.isnan(value) else float(value)
    if value is None or value is pd.NA or value is pd.NaT:
        return None
    return value


def _records(frame: pd.DataFrame) -> list[dict]:
    return [{k: _plain(v) for k, v in row.items()} for row in frame.to_dict("records")]


@dataclass(frozen=True)
class Entitlement:
    """One method's entitlement for the whole works, its sections and its events.

    Days are calendar days; money is in ``currency``. See the module docstring for every
    figure. ``causation`` is the method's :class:`delay.causation.Causation`; ``sections``
    has :data:`SECTION_COLUMNS` (figures ``None`` where the method cannot give them, with
    the reason in ``note``); ``events`` has :data:`EVENT_COLUMNS`.
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
    culpable_days: int
    liquidated_damages_per_day: float
    ld_exposure: float
    ld_capped: bool
    concurrent_days: int
    causation: Causation = field(repr=False)
    sections: pd.DataFrame = field(repr=False)
    events: pd.DataFrame = field(repr=False)
    notes: tuple[str, ...] = ()

    def to_json(self) -> dict:
        return {
            "method": self.method,
            "eot_days": self.eot_days,
            "revised_completion": _iso(self.revised_completion),
            "compensable_days": self.compensable_days,
            "prolongation_cost": self.prolongation_cost,
            "culpable_days": self.culpable_days,
            "ld_exposure": self.ld_exposure,
            "concurrent_days": self.concurrent_days,
            "sections": _records(self.sections),
            "contract_completion": _iso(self.contract_completion),
            "granted_days": self.granted_days,
            "completion_in_force": _iso(self.completion_in_force),
            "planned_completion": _iso(self.planned_completion),
            "excusable_days": self.excusable_days,
            "completion_with_excusable_delays": _iso(self.completion_with_excusable_delays),
            "actual_completion": _iso(self.actual_completion),
            "culpable_delay_days": self.culpable_delay_days,
            "liquidated_damages_per_day": self.liquidated_damages_per_day,
            "ld_capped": self.ld_capped,
            "explained_days": self.causation.explained_days,
            "explains": self.causation.explains,
            "causation": _records(self.causation.table),
            "events": _records(self.events),
            "notes": list(self.notes),
        }


@dataclass(frozen=True)
class EntitlementResult:
    """The entitlement of every method assessed, in the order asked for."""

    methods: tuple[Entitlement, ...]
    currency: str
    concurrency: str

    def method(self, name: str) -> Entitlement:
        for item in self.methods:
            if item.method == name:
                return item
        raise KeyError(f"no method '{name}' in the result")

    @property
    def summary(self) -> pd.DataFrame:
        """One row per method: the whole works' figures."""
        columns = ["method", "completion_in_force", "planned_completion", "excusable_days", "eot_days",
                   "revised_completion", "actual_completion", "compensable_days", "prolongation_cost",
                   "culpable_days", "ld_exposure", "ld_capped", "concurrent_days"]
        return pd.DataFrame([{c: getattr(m, c) for c in columns} for m in self.methods], columns=columns)

    def to_json(self) -> dict:
        return {"currency": self.currency, "concurrency": self.concurrency,
                "methods": [m.to_json() for m in self.methods]}


# -- schedules used for sections and for the actual completion ------------------------------------
def _record_snapshot(case: Case):
    """The as-built record when there is one, else the last snapshot."""
    return case.asbuilt_snapshot if case.asbuilt_snapshot is not None else case.snapshots[-1]


def _finish_of(result: ScheduleResult, activity: str) -> dt.date | None:
    k = int(result.model.network.index_of([activity])[0])
    if k < 0 or result.finish_day[k] == NO_DAY:
        return None
    return dt.date(1970, 1, 1) + dt.timedelta(days=int(result.finish_day[k]))


def _upstream(result: ScheduleResult, activity: str) -> set[str]:
    """The activity and every activity a chain of links leads from to it."""
    net = result.model.network
    k = int(net.index_of([activity])[0])
    if k < 0:
        return set()
    return {str(i) for i in net.ids[net.upstream([k])]}


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
    contract, granted, in_force = completion_in_force(case, section["section"])
    rate = section["liquidated_damages_per_day"]
    rate = float(rate) if pd.notna(rate) else float(case.settings.commercial.liquidated_damages_per_day)
    return {"section": section["section"], "name": section["name"],
            "completion_activity": section["completion_activity"], "contract_completion": contract,
            "granted_days": granted, "completion_in_force": in_force, "liquidated_damages_per_day": rate}


def _section_row(base: dict, **values) -> dict:
    row = {column: None for column in SECTION_COLUMNS}
    row.update(base)
    row.update(values)
    return row


def _section_frame(rows: list[dict]) -> pd.DataFrame:
    return pd.DataFrame(rows, columns=SECTION_COLUMNS, dtype=object)


def _section_entitlement(case: Case, base: dict, planned, actual, rows: pd.DataFrame, explained: int,
                         where: str, concurrent: int | None, note: str = "") -> dict:
    reconcile(rows, explained, where)
    excusable = int(rows["excusable_days"].sum()) if len(rows) else 0
    figures = _figures(case, planned=planned, in_force=base["completion_in_force"], excusable=excusable,
                       actual=actual, rate=base["liquidated_damages_per_day"], rows=rows)
    return _section_row(base, **figures, concurrent_days=concurrent, note=note)


def _milestone_runs(case: Case, folder: str, event_ids: Sequence[str], targets: Sequence[str]):
    """Insert ``event_ids`` into snapshot ``folder`` as the impacted method does, alone and
    cumulatively, reading each run's completion and the finish of each target.

    Returns ``(base completion, base finishes, alone finishes, cumulative finishes,
    cumulative completions)``: finishes are day numbers, shape ``(targets,)`` and
    ``(events, targets)``, :data:`NO_DAY` for a target not in the snapshot.
    """
    from .methods.impacted import apply_event

    snapshot = case.snapshot(folder)
    model = prepare(case, snapshot, calendars=calendars_of(case))
    where = model.network.index_of(list(targets))
    missing = where < 0
    safe = np.maximum(where, 0)

    def read(result: ScheduleResult) -> np.ndarray:
        return np.where(missing, NO_DAY, result.finish_day[safe])

    base = model.run()
    register = case.events.set_index("id", drop=False)
    present = set(snapshot.activities["id"])
    alone, cumulative_finish, completions = [], [], []
    cumulative = model
    for event_id in event_ids:
        event = register.loc[event_id]
        alone_model, _ = apply_event(model, case, event, present)
        alone.append(read(alone_model.run()))
        added = {str(i) for i in cumulative.network.ids[model.network.size:]}
        cumulative, _ = apply_event(cumulative, case, event, present | added)
        after = cumulative.run()
        cumulative_finish.append(read(after))
        completions.append(int(after.completion_day))
    shape = (len(event_ids), len(targets))
    return (int(base.completion_day), read(base), np.asarray(alone, dtype=np.int64).reshape(shape),
            np.asarray(cumulative_finish, dtype=np.int64).reshape(shape), np.asarray(completions, dtype=np.int64))


def _sequence_sections(case: Case, method: str, runs: list[tuple[str, pd.DataFrame]], concurrency: str,
                       expected_days: Mapping[str, Sequence[int]]) -> pd.DataFrame:
    """Sections of the impacted or time impact analysis: the events of each run inserted
    again, the section milestones' finishes read, and classified by the sequence rules."""
    sections = case.sections
    if not len(sections):
        return _section_frame([])
    targets = list(sections["completion_activity"])
    schedules = _Schedules(case)
    baseline = schedules.of(case.baseline)
    record = schedules.of(_record_snapshot(case))
    per_target: list[list[dict]] = [[] for _ in targets]
    absent: list[set[str]] = [set() for _ in targets]
    for folder, events in runs:
        ids = list(events["id"])
        base_completion, base_finish, alone, cumulative, completions = _milestone_runs(case, folder, ids, targets)
        increments = np.diff(np.concatenate([[base_completion], completions]))
        if list(increments) != list(expected_days[folder]):
            raise ReconciliationError(f"section runs of the {_METHOD_NAMES[method]} on {folder}", {
                "increments here": [int(x) for x in increments],
                "increments of the method": [int(x) for x in expected_days[folder]]})
        for t in range(len(targets)):
            if base_finish[t] == NO_DAY:
                absent[t].add(folder)
                continue
            finish = np.concatenate([[base_finish[t]], cumulative[:, t]])
            frame = pd.DataFrame({
                "event": ids, "party": list(events["party"]),
                "activities": [a if isinstance(a, str) else ";".join(a) for a in events["activities"]],
                "alone_days": (alone[:, t] - base_finish[t]).astype(np.int64),
                "days": np.diff(finish).astype(np.int64), "arose_on": pd.to_datetime(events["start"]).to_numpy(),
                "step": [f"insertion {k} into {folder}" for k in range(1, len(ids) + 1)], "snapshot": folder,
            })
            per_target[t] += sequence_rows(frame, concurrency, method)
    out = []
    for t, (_, section) in enumerate(sections.iterrows()):
        base = _section_base(case, section)
        planned = _finish_of(baseline, section["completion_activity"])
        actual = _finish_of(record, section["completion_activity"])
        if planned is None or actual is None or absent[t]:
            where = sorted(absent[t]) or ["the baseline or the record"]
            out.append(_section_row(base, planned_completion=planned, actual_completion=actual,
                                    note=f"the section milestone is not in {', '.join(where)}: not assessed"))
            continue
        rows = causation_frame(per_target[t])
        explained = int(rows["days"].sum()) if len(rows) else 0
        out.append(_section_entitlement(case, base, planned, actual, rows, explained,
                                        f"section {base['section']} ({_METHOD_NAMES[method]})",
                                        int(rows["concurrent_days"].sum()) if len(rows) else 0))
    return _section_frame(out)


def _windows_sections(case: Case, result, table: pd.DataFrame, concurrency: str) -> pd.DataFrame:
    """Sections of the windows analysis: each window's movement of the section milestone
    split in proportion to the window's classified charges on the activities leading to it
    (see the module docstring)."""
    sections = case.sections
    if not len(sections):
        return _section_frame([])
    schedules = _Schedules(case)
    named = event_activities(case)
    events = case.events
    out = []
    for _, section in sections.iterrows():
        base = _section_base(case, section)
        milestone = section["completion_activity"]
        snapshots = [case.snapshot(result.windows[0].start)] + [case.snapshot(w.end) for w in result.windows]
        finishes = [_finish_of(schedules.of(s), milestone) for s in snapshots]
        if any(f is None for f in finishes):
            lacking = [s.folder for s, f in zip(snapshots, finishes) if f is None]
            out.append(_section_row(base, planned_completion=finishes[0], actual_completion=finishes[-1],
                                    note=f"the section milestone is not in {', '.join(lacking)}: not assessed"))
            continue
        rows = []
        fallback = []
        for w, before, after in zip(result.windows, finishes[:-1], finishes[1:]):
            movement = (after - before).days
            if movement == 0:
                continue
            leading = (_upstream(schedules.of(case.snapshot(w.start)), milestone)
                       | _upstream(schedules.of(case.snapshot(w.end)), milestone))
            charged = table[table["window"] == w.number]
            on_path = [bool({p for a in str(acts).split(";") for p in a.split(">")} & leading)
                       for acts in charged["activities"]]
            charged = charged.loc[np.asarray(on_path, dtype=bool)]
            sign = 1 if movement > 0 else -1
            classes = {
                "culpable": max(0, sign * int(charged["culpable_days"].sum())),
                "excusable": max(0, sign * int((charged["excusable_days"] - charged["compensable_days"]).sum())),
                "compensable": max(0, sign * int(charged["compensable_days"].sum())),
            }
            last_day = w.end_data_date - dt.timedelta(days=1)
            if sum(classes.values()):
                shares = dict(zip(classes, largest_remainder(movement, list(classes.values()))))
                split = {"excusable": shares["excusable"] + shares["compensable"],
                         "compensable": shares["compensable"], "culpable": shares["culpable"]}
            else:
                under_way = [
                    party for event_id, party, start, finish in
                    zip(events["id"], events["party"], events["start"], events["finish"])
                    if pd.notna(start) and pd.Timestamp(start) <= pd.Timestamp(last_day)
                    and (pd.isna(finish) or pd.Timestamp(finish) >= pd.Timestamp(w.start_data_date))
                    and named.get(event_id, set()) & leading
                ]
                causes = [(p, 1) for p in dict.fromkeys(under_way)] or [(DEFAULT_RISK, 1)]
                split = classify_days(causes, movement, concurrency)
                fallback.append(str(w.number))
            rows.append({"days": movement, "excusable_days": split["excusable"],
                         "compensable_days": split["compensable"], "culpable_days": split["culpable"],
                         "arose_on": pd.Timestamp(last_day), "step": f"window {w.number}"})
        frame = pd.DataFrame(rows, columns=["days", "excusable_days", "compensable_days", "culpable_days",
                                            "arose_on", "step"])
        note = ("the milestone's movement in each window split in proportion to the window's classified charges "
                "on the activities leading to it")
        if fallback:
            note += (f"; in window(s) {', '.join(fallback)} no charge lay on them: classified by the events under "
                     "way that name them, else unexplained")
        explained = (finishes[-1] - finishes[0]).days
        out.append(_section_entitlement(case, base, finishes[0], finishes[-1], frame, explained,
                                        f"section {base['section']} (windows analysis)", None, note))
    return _section_frame(out)


def _collapsed_sections(case: Case) -> pd.DataFrame:
    schedules = _Schedules(case)
    baseline = schedules.of(case.baseline)
    record = schedules.of(_record_snapshot(case))
    out = []
    for _, section in case.sections.iterrows():
        base = _section_base(case, section)
        out.append(_section_row(
            base, planned_completion=_finish_of(baseline, section["completion_activity"]),
            actual_completion=_finish_of(record, section["completion_activity"]),
            note="the collapsed as-built measures project completion only: no entitlement for the section"))
    return _section_frame(out)


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
            note = "but-for days of the event alone: need not add up" if assessed is not None else (
                "not scored: " + str(found["note"].iloc[0]) if len(found) else "not scored")
        else:
            mine = table[[event.id in str(e).split(";") for e in table["event"]]] if len(table) else table
            assessed = int(mine["days"].sum()) if len(mine) else 0
            excusable = int(mine["excusable_days"].sum()) if len(mine) else 0
            compensable = int(mine["compensable_days"].sum()) if len(mine) else 0
            if method == "windows" and len(mine) and any(";" in str(e) for e in mine["event"]):
                note = "charges matched to several events are shown against each: need not add up"
        rows.append({"event": event.id, "title": event.title, "party": event.party, "notified": notified,
                     "claimed_days": claimed, "assessed_days": assessed, "excusable_days": excusable,
                     "compensable_days": compensable, "note": note})
    return pd.DataFrame(rows, columns=EVENT_COLUMNS, dtype=object)


# -- the assessment -----------------------------------------------------------------------------
def _run_method(case: Case, method: str):
    if method == "windows":
        from .methods.windows import analyse
    elif method == "impacted":
        from .methods.impacted import analyse
    elif method == "tia":
        from .methods.time_impact import analyse
    elif method == "collapsed":
        from .methods.collapsed import analyse
    else:
        raise CaseError(Problem(file="--method", message=f"unknown method '{method}'",
                                fix=f"choose among: {', '.join(METHODS)}, all"))
    return analyse(case)


def entitlement(case: Case, method: str, result=None, concurrency: str | None = None) -> Entitlement:
    """The entitlement of one method for the whole works, each section and each event.

    Parameters
    ----------
    case: the loaded case.
    method: ``windows``, ``impacted``, ``tia`` or ``collapsed``.
    result: the method's result, if already computed (else the method is run with its
        defaults).
    concurrency: overrides the case's ``[analysis] concurrency``.

    Returns
    -------
    Entitlement

    Raises
    ------
    CaseError: an unknown method, or what the method raises for bad input.
    ReconciliationError: a causation table, or a section's, that does not add up.
    """
    if result is None:
        result = _run_method(case, method)
    table_of = causation(case, method, result, concurrency)
    rule = table_of.concurrency
    table = table_of.table
    contract, granted, in_force = completion_in_force(case)
    commercial = case.settings.commercial
    if method == "windows":
        actual = result.last_completion
        sections = _windows_sections(case, result, table, rule)
    elif method == "collapsed":
        actual = result.actual_completion
        sections = _collapsed_sections(case)
    else:
        actual = _Schedules(case).of(_record_snapshot(case)).completion
        if method == "impacted":
            runs = [(result.base, result.events)]
            expected = {result.base: list(result.events["cumulative_days"])}
        else:
            runs, expected = [], {}
            if len(result.events):
                for folder in pd.unique(result.events["snapshot"]):
                    group = result.events[result.events["snapshot"] == folder].reset_index(drop=True)
                    runs.append((folder, group))
                    expected[folder] = list(group["cumulative_days"])
        sections = _sequence_sections(case, method, runs, rule, expected)
    figures = _figures(case, planned=table_of.planned_completion, in_force=in_force,
                       excusable=table_of.total("excusable_days"), actual=actual,
                       rate=float(commercial.liquidated_damages_per_day), rows=table)
    notes = list(table_of.notes)
    notes.append("Sections' figures overlap each other and the whole works': never add them.")
    if method in ("impacted", "tia"):
        notes.append("The actual completion is the as-built record's" if case.asbuilt_snapshot is not None
                     else "The completion compared is the last update's forecast (no as-built record)")
    return Entitlement(method=method, currency=commercial.currency, concurrency=rule, contract_completion=contract,
                       granted_days=granted, completion_in_force=in_force, **figures,
                       concurrent_days=table_of.total("concurrent_days"), causation=table_of, sections=sections,
                       events=_event_table(case, method, table, result if method == "collapsed" else None),
                       notes=tuple(notes))


def assess(case: Case, methods: Sequence[str] = METHODS, results: Mapping[str, object] | None = None,
           concurrency: str | None = None) -> EntitlementResult:
    """The entitlement under each of ``methods`` (default all four).

    Parameters
    ----------
    case: the loaded case.
    methods: names among ``windows``, ``impacted``, ``tia``, ``collapsed``.
    results: method results already computed, by method name.
    concurrency: overrides the case's ``[analysis] concurrency``.

    Returns
    -------
    EntitlementResult

    Raises
    ------
    CaseError: an unknown method or bad input. ReconciliationError: figures that do not add up.
    """
    results = dict(results or {})
    done = tuple(entitlement(case, m, results.get(m), concurrency) for m in methods)
    rule = done[0].concurrency if done else (concurrency or case.settings.analysis.concurrency)
    return EntitlementResult(done, case.settings.commercial.currency, rule)
