"""Impacted as-planned: delay events inserted into a programme, one at a time.

Each event of the register is modelled in the base programme and the programme is
re-scheduled:

- ``extend`` lengthens each named activity by the event's ``days`` (work days; an activity
  already started gets them on its remaining duration);
- ``hold`` keeps each named activity from starting before the day after the event's finish;
- ``fragnet`` inserts the event's activities (fragnets.csv) and links (fragnet_links.csv);
  a fragnet activity with no predecessor in its fragnet starts no earlier than the event's
  start.

Two figures are reported for every event. Its impact *alone* is the movement of completion
with that event only; these need not add up to anything, since events on parallel paths
overlap and one event can hide behind another. Its *increment* is the movement it adds in a
cumulative run, the events inserted one after another (by default in chronological order:
by start, then finish, then register row); the increments add up exactly to the cumulative
impact, and a failure to do so raises :class:`delay.errors.ReconciliationError`.

References
----------
AACE International Recommended Practice 29R-03, Forensic Schedule Analysis (2011), MIP 3.6
(modelled / additive / single base). Society of Construction Law Delay and Disruption
Protocol, 2nd edition (2017), Part B, impacted as-planned analysis.

Assumptions
-----------
The base programme is a reasonable, achievable plan; the events are modelled as the register
describes them; progress and the contractor's own delays are not modelled (the method shows
what the events would have done to the plan, not what happened).
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass
from typing import Sequence

import numpy as np
import pandas as pd

from ..cpm import ScheduleModel, calendars_of, prepare
from ..errors import CaseError, Problem, ReconciliationError
from ..model import Case, Snapshot

__all__ = ["analyse", "ImpactedResult", "event_changes", "order_events", "apply_event", "run_events", "EVENT_COLUMNS"]

EVENT_COLUMNS = ["id", "title", "party", "impact", "start", "finish", "activities", "alone_days",
                 "alone_work_days", "completion_alone", "cumulative_days", "cumulative_work_days",
                 "completion_after", "applied"]


def _split(text) -> list[str]:
    return [a.strip() for a in str(text or "").split(";") if a.strip()]


def order_events(case: Case, events: Sequence[str] | None = None, order: str = "chronological") -> pd.DataFrame:
    """The register rows to insert, in insertion order.

    ``chronological``: by start, then finish, then register row; ``as-listed``: the order of
    ``events`` when given, else the register's.

    Raises
    ------
    CaseError: an unknown event id or order.
    """
    register = case.events.reset_index(drop=True).assign(_row=lambda f: np.arange(len(f)))
    if events:
        known = set(register["id"])
        unknown = [e for e in events if e not in known]
        if unknown:
            raise CaseError(Problem(file="events.csv", column="id", message=f"no event '{unknown[0]}' in the register",
                                    fix=f"choose among: {', '.join(register['id'])}"))
        position = {e: i for i, e in enumerate(events)}
        register = register[register["id"].isin(known & set(events))]
        register = register.assign(_listed=register["id"].map(position))
    else:
        register = register.assign(_listed=register["_row"])
    if order == "chronological":
        register = register.sort_values(["start", "finish", "_row"], kind="stable")
    elif order in ("as-listed", "as_listed"):
        register = register.sort_values("_listed", kind="stable")
    else:
        raise CaseError(Problem(file="--order", message=f"unknown order '{order}'",
                                fix="use chronological or as-listed"))
    return register.drop(columns=["_row", "_listed"]).reset_index(drop=True)


def event_changes(case: Case, event: pd.Series, present: set[str]) -> dict:
    """The ``what_if`` arguments that model one event in a programme whose activity ids are
    ``present``; names of affected activities missing from it are listed under ``missing``."""
    impact = event["impact"]
    named = _split(event["activities"])
    missing = [a for a in named if a not in present]
    named = [a for a in named if a in present]
    changes: dict = {"missing": missing}
    if impact == "extend":
        days = int(event["days"]) if pd.notna(event["days"]) else 0
        changes["extend"] = {a: days for a in named}
    elif impact == "hold":
        release = (pd.Timestamp(event["finish"]) + pd.Timedelta(days=1)).date()
        changes["start_no_earlier"] = {a: release for a in named}
    elif impact == "fragnet":
        fragnet = case.fragnets[case.fragnets["event"] == event["id"]]
        links = case.fragnet_links[case.fragnet_links["event"] == event["id"]]
        ids = set(fragnet["id"])
        usable = links[(links["pred"].isin(ids | present)) & (links["succ"].isin(ids | present))]
        missing += sorted((set(links["pred"]) | set(links["succ"])) - ids - present)
        has_pred = set(usable["succ"][usable["succ"].isin(ids)])
        start = pd.Timestamp(event["start"]).date() if pd.notna(event["start"]) else None
        added = pd.DataFrame({
            "id": fragnet["id"].to_numpy(), "name": fragnet["name"].to_numpy(),
            "duration": fragnet["duration"].to_numpy(), "calendar": fragnet["calendar"].to_numpy(),
            "start_no_earlier": [None if i in has_pred else start for i in fragnet["id"]],
        })
        changes["add_activities"] = added
        changes["add_links"] = usable[["pred", "succ", "type", "lag"]].reset_index(drop=True)
        changes["touches"] = named
    return changes


def apply_event(model: ScheduleModel, case: Case, event: pd.Series, present: set[str]) -> tuple[ScheduleModel, list[str]]:
    """``model`` with one event inserted, and the named activities it could not find."""
    changes = event_changes(case, event, present)
    missing = changes.pop("missing")
    changes.pop("touches", None)
    arguments = {k: v for k, v in changes.items() if v is not None and len(v)}
    if not arguments:
        return model, missing
    return model.what_if(**arguments), missing


@dataclass(frozen=True)
class ImpactedResult:
    """Per event: impact alone and increment in the cumulative run; per party likewise."""

    base: str
    completion_base: dt.date
    completion_cumulative: dt.date
    events: pd.DataFrame
    by_party: pd.DataFrame
    order: str
    notes: tuple[str, ...]

    @property
    def total_days(self) -> int:
        return (self.completion_cumulative - self.completion_base).days

    def to_json(self) -> dict:
        return {
            "base": self.base,
            "completion_base": self.completion_base.isoformat(),
            "events": [
                {"id": r.id, "party": r.party, "alone_days": int(r.alone_days), "cumulative_days": int(r.cumulative_days),
                 "completion_after": r.completion_after.isoformat()}
                for r in self.events.itertuples(index=False)
            ],
            "total_days": self.total_days,
        }


def _work_days(model: ScheduleModel, a: int, b: int) -> int:
    cal = model.calendars[model.settings.default_calendar]
    days = cal.finish_index_days(np.array([a, b]))
    return int(days[1] - days[0])


def _date(day: int) -> dt.date:
    return dt.date(1970, 1, 1) + dt.timedelta(days=int(day))


def run_events(case: Case, base: Snapshot, model: ScheduleModel, register: pd.DataFrame, label: str):
    """Impacts alone and the cumulative run of ``register`` on ``model``.

    Returns ``(frame, base_day, final_day, cumulative_model)``: a DataFrame with
    EVENT_COLUMNS, the completion days of the base and of the cumulative run (both measured
    by full schedules), and the model with every event inserted.

    Raises ReconciliationError when the increments do not add up to the cumulative impact.
    """
    base_day = model.completion_day()
    present = set(base.activities["id"])
    rows = []
    cumulative = model
    previous = base_day
    for _, event in register.iterrows():
        alone_model, missing = apply_event(model, case, event, present)
        alone_day = alone_model.completion_day()
        cumulative, _ = apply_event(cumulative, case, event, present | set(_added_so_far(cumulative, model)))
        after = cumulative.completion_day()
        rows.append({
            "id": event["id"], "title": event["title"], "party": event["party"], "impact": event["impact"],
            "start": event["start"], "finish": event["finish"], "activities": _split(event["activities"]),
            "alone_days": int(alone_day - base_day), "alone_work_days": _work_days(model, base_day, alone_day),
            "completion_alone": _date(alone_day), "cumulative_days": int(after - previous),
            "cumulative_work_days": _work_days(model, previous, after), "completion_after": _date(after),
            "applied": "" if not missing else f"not in {label}: {', '.join(missing)}",
        })
        previous = after
    frame = pd.DataFrame(rows, columns=EVENT_COLUMNS)
    # The increments come from forward passes alone; the cumulative impact they must add up
    # to is measured again by full schedules (both passes) of the base and of the programme
    # with every event inserted.
    base_full = model.run().completion_day
    final_full = cumulative.run().completion_day
    increments = int(frame["cumulative_days"].sum())
    if increments != int(final_full - base_full):
        raise ReconciliationError(f"impacted as-planned on {label}",
                                  {"sum of increments": increments, "cumulative impact": int(final_full - base_full)})
    return frame, base_full, final_full, cumulative


def _added_so_far(model: ScheduleModel, base: ScheduleModel) -> list[str]:
    return [str(i) for i in model.network.ids[base.network.size:]]


def analyse(case: Case, base: str = "baseline", events: Sequence[str] | None = None,
            order: str = "chronological") -> ImpactedResult:
    """Impacted as-planned analysis.

    Parameters
    ----------
    case: the loaded case.
    base: the programme to impact (folder name or label), by default the baseline.
    events: event ids to insert (default all of the register).
    order: ``chronological`` (start, finish, register row) or ``as-listed``.

    Returns
    -------
    ImpactedResult
        ``events``: one row per event with ``alone_days`` (need not add up) and
        ``cumulative_days`` (the increment; these add up to ``total_days``) and the
        completion after each step; ``by_party``: the same per party (alone: the party's
        events together, without the others).

    Raises
    ------
    CaseError: unknown base snapshot or event. ReconciliationError: increments that do not
    add up.

    Examples
    --------
    >>> result = analyse(load_case("case_demo"))   # doctest: +SKIP
    >>> result.events[["id", "alone_days", "cumulative_days"]]   # doctest: +SKIP
    """
    try:
        snapshot = case.snapshot(base)
    except KeyError:
        raise CaseError(Problem(file="snapshots/", message=f"no snapshot '{base}'",
                                fix="name a folder under snapshots/ or a label")) from None
    register = order_events(case, events, order)
    model = prepare(case, snapshot, calendars=calendars_of(case))
    frame, base_day, final_day, _ = run_events(case, snapshot, model, register, snapshot.folder)
    present = set(snapshot.activities["id"])
    parties = []
    for party in ("employer", "contractor", "neutral"):
        own = register[register["party"] == party]
        if not len(own):
            continue
        together = model
        for _, event in own.iterrows():
            together, _ = apply_event(together, case, event, present | set(_added_so_far(together, model)))
        day = together.completion_day()
        parties.append({"party": party, "events": list(own["id"]), "alone_days": int(day - base_day),
                        "cumulative_days": int(frame.loc[frame["party"] == party, "cumulative_days"].sum())})
    by_party = pd.DataFrame(parties, columns=["party", "events", "alone_days", "cumulative_days"])
    notes = (
        "Impacts alone need not add up: events on parallel paths overlap and one event can hide another.",
        "Increments depend on the order of insertion; they add up exactly to the cumulative impact.",
    )
    return ImpactedResult(snapshot.folder, _date(base_day), _date(final_day), frame, by_party, order, notes)
