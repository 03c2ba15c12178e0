"""Time impact analysis: each event inserted into the programme current before it began.

For every event of the register, the *current* programme is the last snapshot (baseline or
progress update, not the as-built record) whose data date is strictly before the event's
start: the contemporaneous plan the event interrupted, which cannot yet show the event's own
effect. The event register's ``tia_update`` column (case format v2) may name another
programme; that is the analyst's choice and is disclosed beside the figures. The event is
modelled in that programme as the impacted as-planned models it
(:mod:`delay.methods.impacted`: ``extend``, ``hold``, ``fragnet``) and measured at the
project's completion activity (and each section's milestone). The events of one programme
are inserted cumulatively in chronological order (start, finish, register row); each event's
*increment* is the completion after its insertion less the completion before. Its impact
alone is also given; it need not add up.

Where the event's activities in the chosen programme already slipped against the previous
programme by as much as the event, the programme may already show the event: a warning
says so, because inserting it again would count its delay twice.

Reconciliation: per programme, the *residual* is the next programme's completion (the
as-built record's for the last, else the last update's own) less the programme's impacted
completion. A positive residual is delay no event explains (``[analysis]
unexplained_risk``); a negative one is recovery (the contractor's: it offsets culpable delay
first, then shows as acceleration). The increments plus the residuals add up exactly to the
actual less the planned completion (``explained_days``); a failure raises
:class:`delay.errors.ReconciliationError`.

References
----------
AACE International Recommended Practice 29R-03, Forensic Schedule Analysis (2011), MIP 3.7
(modelled / additive / multiple base). Society of Construction Law Delay and Disruption
Protocol, 2nd edition (2017), Part B, time impact analysis, prospective and retrospective
use (as recalled).

Assumptions
-----------
Each update is a reasonable statement of the plan and progress at its data date; the
fragnets and modelled changes represent the events fairly; the effect on the forecast
completion of the programme current at the time is the measure of each event's delay.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from ..convert import NO_DAY, day_to_date, split_ids
from ..cpm import calendars_of, prepare
from ..errors import CaseError, Problem, ReconciliationError
from ..memo import remembered
from ..model import Case, Snapshot
from .impacted import EVENT_COLUMNS, actual_finishes, event_changes, order_events, run_events, targets_of

__all__ = ["analyse", "TimeImpactResult", "TimeImpactTrace", "current_programmes", "UPDATE_COLUMNS"]

UPDATE_COLUMNS = [
    "snapshot",
    "label",
    "data_date",
    "events",
    "completion_before",
    "completion_after",
    "increment_days",
    "next_snapshot",
    "next_data_date",
    "next_completion",
    "residual_days",
]


@dataclass(frozen=True)
class TimeImpactTrace:
    """One target's time impact analysis.

    Parameters
    ----------
    target : str
        The activity measured (the project's completion activity or a section's milestone).
    events : pandas.DataFrame
        :data:`delay.methods.impacted.EVENT_COLUMNS` plus ``snapshot`` (the folder of the programme the
        event was inserted into), ``completion_before`` and ``warnings``; calendar days.
    updates : pandas.DataFrame
        One row per programme, :data:`UPDATE_COLUMNS`: its completion before and after its
        events, the next programme's completion and the residual, in calendar days.
    planned_completion : datetime.date
        The target's finish in the first programme, before any event.
    actual_completion : datetime.date
        The last programme's ``next_completion``: the as-built record's finish, else the
        last update's own (with the events inserted into it, when there are any).
    """

    target: str
    events: pd.DataFrame
    updates: pd.DataFrame
    planned_completion: dt.date
    actual_completion: dt.date

    @property
    def explained_days(self) -> int:
        """The actual less the planned completion: the increments plus the residuals."""
        return (self.actual_completion - self.planned_completion).days

    @property
    def increment_days(self) -> int:
        """The events' increments summed, in calendar days."""
        return int(self.events["increment_days"].sum()) if len(self.events) else 0

    @property
    def residual_days(self) -> int:
        """The programmes' residuals summed, in calendar days."""
        return int(self.updates["residual_days"].sum()) if len(self.updates) else 0

    def to_json(self) -> dict:
        """The trace as plain JSON values (dates as ISO text).

        Returns
        -------
        dict
            ``target``, the ``updates`` and ``events`` rows, the completions and the
            increment, residual and explained days.
        """
        return {
            "target": self.target,
            "updates": [
                {
                    "snapshot": r.snapshot,
                    "label": r.label,
                    "data_date": r.data_date.isoformat(),
                    "events": list(r.events),
                    "completion_before": r.completion_before.isoformat(),
                    "completion_after": r.completion_after.isoformat(),
                    "increment_days": int(r.increment_days),
                    "next_snapshot": r.next_snapshot,
                    "next_completion": r.next_completion.isoformat(),
                    "residual_days": int(r.residual_days),
                }
                for r in self.updates.itertuples(index=False)
            ],
            "events": [
                {
                    "event": r.event,
                    "party": r.party,
                    "snapshot": r.snapshot,
                    "increment_days": int(r.increment_days),
                    "alone_days": int(r.alone_days),
                    "completion_after": r.completion_after.isoformat(),
                    "applied": r.applied,
                    "effect": r.effect,
                    "warnings": list(r.warnings),
                }
                for r in self.events.itertuples(index=False)
            ],
            "planned_completion": self.planned_completion.isoformat(),
            "actual_completion": self.actual_completion.isoformat(),
            "increment_days": self.increment_days,
            "residual_days": self.residual_days,
            "explained_days": self.explained_days,
        }


@dataclass(frozen=True)
class TimeImpactResult:
    """The time impact analysis for the whole works and each section.

    Made by :func:`analyse`. The properties (``events``, ``updates``, ...) are those of
    ``trace``, the whole works.

    Parameters
    ----------
    trace : TimeImpactTrace
        The whole works, measured at the project's completion activity.
    by_party : pandas.DataFrame
        ``party``, ``alone_days`` and ``increment_days`` summed over the party's events,
        calendar days.
    notes : tuple of str
        Statements that go with the figures.
    sections : dict, optional
        Section id to its :class:`TimeImpactTrace`, measured at its completion milestone.
    """

    trace: TimeImpactTrace
    by_party: pd.DataFrame
    notes: tuple[str, ...]
    sections: dict = field(default_factory=dict, repr=False)

    @property
    def events(self) -> pd.DataFrame:
        """The whole works' event rows."""
        return self.trace.events

    @property
    def updates(self) -> pd.DataFrame:
        """The whole works' rows per programme (:data:`UPDATE_COLUMNS`)."""
        return self.trace.updates

    @property
    def planned_completion(self) -> dt.date:
        """The completion in the first programme, before any event."""
        return self.trace.planned_completion

    @property
    def actual_completion(self) -> dt.date:
        """The as-built record's completion, else the last update's (its events inserted)."""
        return self.trace.actual_completion

    @property
    def explained_days(self) -> int:
        """The actual less the planned completion, in calendar days."""
        return self.trace.explained_days

    @property
    def total_days(self) -> int:
        """The increments' sum over the programmes (without the residuals)."""
        return self.trace.increment_days

    def to_json(self) -> dict:
        """The result as plain JSON values (dates as ISO text).

        Returns
        -------
        dict
            ``method`` (``"tia"``), the whole works' trace (see
            :meth:`TimeImpactTrace.to_json`), the same per section, and the notes.
        """
        return {
            "method": "tia",
            **self.trace.to_json(),
            "sections": [{"section": section, **trace.to_json()} for section, trace in self.sections.items()],
            "notes": list(self.notes),
        }


def current_programmes(case: Case, register: pd.DataFrame) -> list[str]:
    """The folder of the programme each event is inserted into.

    Parameters
    ----------
    case : delay.model.Case
        The loaded case; its snapshots (not the as-built record) are the candidates.
    register : pandas.DataFrame
        Rows of the event register (``start`` and, optionally, ``tia_update``).

    Returns
    -------
    list of str
        Per row, the folder of the last snapshot whose data date is strictly before the
        event's start (the first snapshot, the baseline, for an event before every update
        or with no start), or of the snapshot its ``tia_update`` names.

    Raises
    ------
    KeyError
        A ``tia_update`` that names no snapshot (from :meth:`delay.model.Case.snapshot`);
        the case loader checks the column, so a loaded case does not raise it.
    """
    snapshots = list(case.snapshots)
    chosen = []
    named = register["tia_update"] if "tia_update" in register else pd.Series([""] * len(register))
    for start, override in zip(register["start"], named):
        if isinstance(override, str) and override.strip():
            chosen.append(case.snapshot(override.strip()).folder)
            continue
        current = snapshots[0]
        for snap in snapshots:
            if pd.notna(start) and pd.Timestamp(snap.data_date) < pd.Timestamp(start):
                current = snap
        chosen.append(current.folder)
    return chosen


def _event_size(case: Case, event: pd.Series, activity: str, snapshot: Snapshot, model) -> int:
    """The work days an event adds to one activity: its days (extend), its held work days
    (hold), or its fragnet's longest duration (fragnet)."""
    impact = event["impact"]
    if impact == "extend":
        return int(event["days"]) if pd.notna(event["days"]) else 0
    if impact == "hold":
        k = int(model.network.index_of([activity])[0])
        calendar = model.calendars.calendars[int(model.calendar[k])]
        days = pd.date_range(event["start"], event["finish"]).to_numpy(dtype="datetime64[D]")
        return int(calendar.is_workday(days).sum()) if days.size else 0
    fragnet = case.fragnets[case.fragnets["event"] == event["id"]]
    return int(fragnet["duration"].max()) if len(fragnet) else 0


def _warnings(case: Case, event: pd.Series, current: Snapshot, previous: Snapshot | None, schedules) -> list[str]:
    """Warnings that ``current`` may already show the event (its activities slipped against
    ``previous`` by as much as the event adds)."""
    if previous is None:
        return []
    now, before = schedules(current), schedules(previous)
    names = split_ids(event["activities"])
    if event["impact"] == "fragnet":
        names = sorted(event_changes(case, event, set(current.activities["id"])).get("touches", []))
    found = []
    for activity in names:
        k_now = int(now.model.network.index_of([activity])[0])
        k_before = int(before.model.network.index_of([activity])[0])
        if k_now < 0 or k_before < 0:
            continue
        calendar = now.model.calendars
        which = np.array([int(now.model.calendar[k_now])] * 2)
        days = np.array([before.finish_day[k_before], now.finish_day[k_now]])
        slip = int(np.diff(calendar.finish_index_days(which, days))[0])
        size = _event_size(case, event, activity, current, now.model)
        if size > 0 and slip >= size:
            found.append(
                f"{current.label} already shows {activity} {slip} work days later than {previous.label} "
                f"(the event adds {size}): inserting the event there may count its delay twice; "
                "tia_update can name the programme to insert it into"
            )
    return found


def analyse(case: Case) -> TimeImpactResult:
    """Time impact analysis of every event of the register.

    Parameters
    ----------
    case : delay.model.Case
        The loaded case: its snapshots, event register and, where there is one, its
        as-built record.

    Returns
    -------
    TimeImpactResult
        ``events`` (impact columns of :data:`delay.methods.impacted.EVENT_COLUMNS` plus
        ``update``, ``completion_before`` and ``warnings``), ``updates`` (one row per
        programme: its completion before and after its events, the next programme's
        completion and the residual), ``by_party`` (increments summed per party), and the
        same per section.

    Raises
    ------
    delay.errors.ReconciliationError
        When the increments and residuals do not add up to the actual less the planned
        completion.

    Examples
    --------
    A small random case with no delay events: no increments, and the residuals are the
    whole movement of completion:

    >>> import pathlib, tempfile
    >>> from delay.case import load_case
    >>> from delay.synth import synthesise
    >>> with tempfile.TemporaryDirectory() as folder:
    ...     case = load_case(synthesise(pathlib.Path(folder) / "case", 20, updates=2))
    >>> result = analyse(case)
    >>> result.total_days, result.trace.residual_days == result.explained_days
    (0, True)

    References
    ----------
    AACE RP 29R-03 (2011), MIP 3.7; SCL Delay and Disruption Protocol, 2nd edition (2017),
    Part B, time impact analysis.
    """
    return remembered(case, ("tia",), lambda: _analyse(case))


def _analyse(case: Case) -> TimeImpactResult:
    register = order_events(case)
    register = register.assign(_current=current_programmes(case, register))
    snapshots = list(case.snapshots)
    calendars = calendars_of(case)
    targets = targets_of(case)
    done: dict[str, object] = {}

    def schedules(snap: Snapshot):
        if snap.folder not in done:
            done[snap.folder] = prepare(case, snap, calendars=calendars).run()
        return done[snap.folder]

    per_target_events: list[list[pd.DataFrame]] = [[] for _ in targets]
    per_target_updates: list[list[dict]] = [[] for _ in targets]
    record = case.asbuilt_snapshot
    following = snapshots[1:] + ([record] if record is not None else [None])
    actual = actual_finishes(case, targets)
    for position, (snap, after) in enumerate(zip(snapshots, following)):
        group = register[register["_current"] == snap.folder].drop(columns="_current").reset_index(drop=True)
        model = prepare(case, snap, calendars=calendars)
        frames, base_full, final_full, _ = run_events(case, snap, model, group, snap.folder, targets)
        previous = snapshots[position - 1] if position else None
        warnings = [_warnings(case, event, snap, previous, schedules) for _, event in group.iterrows()]
        nxt = schedules(after) if after is not None else None
        next_finish = (
            nxt.finish_day[np.maximum(nxt.model.network.index_of(targets), 0)] if nxt is not None else final_full
        )
        for t in range(len(targets)):
            if frames[t] is None:
                continue
            before = day_to_date(int(base_full[t]))
            per_target_events[t].append(
                frames[t].assign(snapshot=snap.folder, completion_before=before, warnings=warnings)
            )
            next_day = int(next_finish[t]) if after is not None else int(final_full[t])
            if after is None:  # no as-built record: the last update's own forecast is the end
                next_day = int(base_full[t]) if not len(group) else int(final_full[t])
            per_target_updates[t].append(
                {
                    "snapshot": snap.folder,
                    "label": snap.label,
                    "data_date": snap.data_date,
                    "events": list(group["id"]),
                    "completion_before": before,
                    "completion_after": day_to_date(int(final_full[t])),
                    "increment_days": int(final_full[t] - base_full[t]),
                    "next_snapshot": after.folder if after is not None else snap.folder,
                    "next_data_date": after.data_date if after is not None else snap.data_date,
                    "next_completion": day_to_date(next_day),
                    "residual_days": next_day - int(final_full[t]),
                }
            )
    traces = []
    for t, target in enumerate(targets):
        if not per_target_updates[t] or actual[t] == NO_DAY:
            traces.append(None)
            continue
        columns = EVENT_COLUMNS + ["snapshot", "completion_before", "warnings"]
        events = (
            pd.concat(per_target_events[t], ignore_index=True)
            if per_target_events[t]
            else pd.DataFrame(columns=columns)
        )
        updates = pd.DataFrame(per_target_updates[t], columns=UPDATE_COLUMNS)
        planned = updates["completion_before"].iloc[0]
        ended = updates["next_completion"].iloc[-1]
        trace = TimeImpactTrace(target, events, updates, planned, ended)
        if trace.increment_days + trace.residual_days != trace.explained_days:
            raise ReconciliationError(
                f"time impact analysis at {target}",
                {
                    "increments + residuals": trace.increment_days + trace.residual_days,
                    "actual less planned completion": trace.explained_days,
                },
            )
        traces.append(trace)
    whole = traces[0]
    if whole is None:
        raise CaseError(_no_completion_problem(case, targets[0]))
    sections = {
        str(section): traces[targets.index(str(milestone))]
        for section, milestone in zip(case.sections["section"], case.sections["completion_activity"])
        if traces[targets.index(str(milestone))] is not None
    }
    events = whole.events
    by_party = (
        events.groupby("party", sort=False)[["alone_days", "increment_days"]].sum().reset_index()
        if len(events)
        else pd.DataFrame(columns=["party", "alone_days", "increment_days"])
    )
    notes = (
        "Each event is inserted into the last programme before it began (or the one tia_update names) and "
        "measured against that programme's completion; increments add up within each programme, impacts "
        "alone need not add up.",
        "Each programme's residual, the next programme's completion less its impacted completion, reconciles "
        "the increments with what happened.",
    )
    return TimeImpactResult(whole, by_party, notes, sections)


def _no_completion_problem(case: Case, completion: str) -> Problem:
    """Why the whole works cannot be traced: the record holds no finish of the completion
    activity (the as-built record, else the last update), or no update comes after the
    baseline."""
    if not case.updates:
        return Problem(
            file="snapshots",
            message="the time impact analysis needs a progress update after the baseline",
            fix="add an update under snapshots/, or use the impacted as-planned analysis",
        )
    if case.asbuilt_snapshot is not None:
        return Problem(
            file="asbuilt.csv",
            message=f"the as-built record has no finish of the completion activity '{completion}'",
            fix=f"add '{completion}' with its actual finish to asbuilt.csv, or name the completion activity "
            "with [project] completion_activity in case.toml",
        )
    last = case.snapshots[-1]
    return Problem(
        file=f"snapshots/{last.folder}/activities.csv",
        message=f"the last update '{last.label}' has no completion activity '{completion}' to forecast the finish",
        fix="add the completion activity to the update, or name it with [project] completion_activity in case.toml",
    )
