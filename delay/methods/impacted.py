"""Impacted as-planned: delay events inserted into a programme, one at a time.

Each event of the register is modelled in the base programme (by default the baseline) at
its real dates, and the programme is re-scheduled:

- ``extend`` lengthens each named activity by the event's ``days`` (work days; an activity
  already started gets them on its remaining duration);
- ``hold`` stops work on each named activity from the event's start to its finish, both
  included, whatever its status: its work days in that period (from the programme's data
  date on) become non-working for it alone (a calendar derived from its own), so work
  before the hold stands and the rest resumes after it. An activity that the programme has
  no work on in that period (planned to finish before the hold, to start after it, or
  complete) is not moved by it, and the result says so (a lag counted on the held
  activity's calendar across the period still waits for its work days);
- ``fragnet`` inserts the event's activities (fragnets.csv) and links (fragnet_links.csv);
  a fragnet activity with no predecessor in its fragnet starts no earlier than the event's
  start.

Two figures are reported for every event, measured at the project's completion activity
(and, for each section, at its completion milestone). Its impact *alone* is the movement
with that event only; these need not add up to anything, since events on parallel paths
overlap and one event can hide behind another. Its *increment* is the movement it adds in a
cumulative run, the events inserted one after another (by default in chronological order:
by start, then finish, then register row); the increments add up exactly to the cumulative
impact, and a failure to do so raises :class:`delay.errors.ReconciliationError`.

The method measures the plan's response to the events, not what happened. The *residual*,
the actual completion (the as-built record's, else the last update's forecast) less the
completion with every event inserted, is what the events do not explain: positive, delay
no event explains; negative, the works finished earlier than the impacted plan (the
contractor's recovery, or events modelled larger than they were). With no as-built record
and no programme later than the base, nothing says what happened: the analysis is
prospective and has no residual.

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
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from ..convert import NO_DAY, day_to_date, split_ids
from ..cpm import COMPLETE, ScheduleModel, calendars_of, prepare
from ..errors import CaseError, Problem, ReconciliationError
from ..events import completion_activity
from ..memo import remembered
from ..model import PARTIES, Case, Snapshot

__all__ = [
    "analyse",
    "ImpactedResult",
    "ImpactedRun",
    "event_changes",
    "order_events",
    "apply_event",
    "run_events",
    "EVENT_COLUMNS",
    "targets_of",
    "actual_finishes",
]

EVENT_COLUMNS = [
    "event",
    "title",
    "party",
    "impact",
    "start",
    "finish",
    "activities",
    "alone_days",
    "alone_work_days",
    "completion_alone",
    "increment_days",
    "increment_work_days",
    "completion_after",
    "applied",
    "effect",
]


def order_events(case: Case, events: Sequence[str] | None = None, order: str = "chronological") -> pd.DataFrame:
    """The register rows to insert, in insertion order.

    Parameters
    ----------
    case : delay.model.Case
        The loaded case; its event register is read.
    events : sequence of str, optional
        Event ids to keep; all of the register when ``None`` or empty.
    order : {"chronological", "as-listed"}, default "chronological"
        ``chronological``: by start, then finish, then register row; ``as-listed`` (or
        ``as_listed``): the order of ``events`` when given, else the register's.

    Returns
    -------
    pandas.DataFrame
        The chosen rows of the register, with its columns, in insertion order and with a
        fresh index.

    Raises
    ------
    delay.errors.CaseError
        An unknown event id (events.csv, column ``id``) or an unknown order (``--order``).
    """
    register = case.events.reset_index(drop=True).assign(_row=lambda f: np.arange(len(f)))
    if events:
        known = set(register["id"])
        unknown = [e for e in events if e not in known]
        if unknown:
            raise CaseError(
                Problem(
                    file="events.csv",
                    column="id",
                    message=f"no event '{unknown[0]}' in the register",
                    fix=f"choose among: {', '.join(register['id'])}",
                )
            )
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
        raise CaseError(
            Problem(file="--order", message=f"unknown order '{order}'", fix="use chronological or as-listed")
        )
    return register.drop(columns=["_row", "_listed"]).reset_index(drop=True)


def _hold_effects(event: Mapping, named: list[str], model: ScheduleModel) -> tuple[list[str], list[str]]:
    """Which named activities a hold applies to (every one not complete), and a sentence
    for each one that has no work planned in its period."""
    first = np.datetime64(pd.Timestamp(event["start"]).date(), "D").astype(np.int64)
    last = np.datetime64(pd.Timestamp(event["finish"]).date(), "D").astype(np.int64)
    status, start, finish = model.work_dates(model.network.index_of(named))
    data_day = model.data_day
    held, notes = [], []
    for k, activity in enumerate(named):
        if status[k] == COMPLETE:
            notes.append(f"{activity}: no effect on this programme: the work was complete before the hold")
            continue
        held.append(activity)
        begins = max(int(start[k]), data_day) if status[k] != 0 else int(start[k])
        if int(finish[k]) < first:
            notes.append(f"{activity}: no effect on this programme: the work is planned to finish before the hold")
        elif begins > last:
            notes.append(f"{activity}: no effect on this programme: the work is planned to start after the hold")
    return held, notes


def event_changes(case: Case, event: Mapping, present: set[str], model: ScheduleModel | None = None) -> dict:
    """The ``what_if`` arguments that model one event in a programme.

    An ``extend`` lengthens each named activity by the event's ``days`` (work days); a
    ``hold`` makes the event's start to finish, both included (from the programme's data
    date on), non-working for each named activity not complete; a ``fragnet`` adds the
    event's activities and the links among them and into ``present``, each fragnet activity
    without a predecessor in its fragnet starting no earlier than the event's start.

    Parameters
    ----------
    case : delay.model.Case
        The case (its fragnets.csv and fragnet_links.csv are read for a fragnet).
    event : Mapping
        One row of its event register (a ``pandas.Series`` or a record of
        ``DataFrame.to_dict("records")``).
    present : set of str
        The activity ids of the programme (fragnet activities already inserted included).
    model : delay.cpm.ScheduleModel, optional
        The programme before the event: a hold needs it, to tell which named activities
        have work in its period (and from which data date); without it every named
        activity is held from the event's start.

    Returns
    -------
    dict
        ``what_if`` keyword arguments, and ``missing`` (named activities not in the
        programme), ``notes`` (what the event leaves alone, in words) and, for a fragnet,
        ``touches`` (the programme activities it names).
    """
    impact = event["impact"]
    named = split_ids(event["activities"])
    missing = [a for a in named if a not in present]
    named = [a for a in named if a in present]
    changes: dict = {"missing": missing, "notes": []}
    if impact == "extend":
        days = int(event["days"]) if pd.notna(event["days"]) else 0
        changes["extend"] = {a: days for a in named}
    elif impact == "hold":
        if named and pd.notna(event["start"]) and pd.notna(event["finish"]):
            held, notes = _hold_effects(event, named, model) if model is not None else (named, [])
            first, last = pd.Timestamp(event["start"]).date(), pd.Timestamp(event["finish"]).date()
            if model is not None:  # the days before the data date are history, not a hold
                first = max(first, day_to_date(model.data_day))
            if first <= last:
                changes["hold"] = {a: [(first, last)] for a in held}
            changes["notes"] = notes
    elif impact == "fragnet":
        fragnet, links, ids, ends = _fragnets(case).get(event["id"], (None, None, None, None))
        if fragnet is None:
            return changes
        known = tuple((p in ids or p in present) and (q in ids or q in present) for p, q in ends)
        missing += sorted({a for pair in ends for a in pair if a not in ids and a not in present})

        def inserted() -> tuple[pd.DataFrame, pd.DataFrame]:
            usable = links[np.asarray(known, dtype=bool)] if len(links) else links
            has_pred = {q for q in usable["succ"] if q in ids}
            start = pd.Timestamp(event["start"]).date() if pd.notna(event["start"]) else None
            activities = fragnet.assign(start_no_earlier=[None if i in has_pred else start for i in fragnet["id"]])
            return activities, usable.reset_index(drop=True)

        # the same insertion alone, in the cumulative run and in a party's run: built once
        key = ("fragnet inserted", event["id"], known, event["start"])
        changes["add_activities"], changes["add_links"] = remembered(case, key, inserted)
        changes["touches"] = named
    return changes


def _fragnets(case: Case) -> dict[str, tuple[pd.DataFrame, pd.DataFrame, set, list]]:
    """Each fragnet event's activities (``id, name, duration, calendar``), links (``pred,
    succ, type, lag``), activity ids and link ends ``(pred, succ)``, grouped once per case."""

    def group() -> dict[str, tuple[pd.DataFrame, pd.DataFrame, set, list]]:
        activities = case.fragnets[["event", "id", "name", "duration", "calendar"]]
        links = case.fragnet_links[["event", "pred", "succ", "type", "lag"]]

        def split(table: pd.DataFrame) -> dict[str, pd.DataFrame]:
            """The rows of each event, without the event column: one selection each by
            the positions of a single grouping."""
            rest = table.drop(columns="event")
            groups = table.groupby("event", sort=True).indices
            return {e: rest.take(rows).reset_index(drop=True) for e, rows in groups.items()}

        by_event, linked = split(activities), split(links)
        empty = links.drop(columns="event").iloc[:0]
        found = {}
        for event, rows in by_event.items():
            links = linked.get(event, empty)
            ends = list(zip(links["pred"].tolist(), links["succ"].tolist()))
            found[event] = (rows, links, set(rows["id"].tolist()), ends)
        return found

    return remembered(case, ("fragnets by event",), group)


def apply_event(
    model: ScheduleModel, case: Case, event: Mapping, present: set[str]
) -> tuple[ScheduleModel, list[str], list[str]]:
    """``model`` with one event inserted (see :func:`event_changes`).

    Parameters
    ----------
    model : delay.cpm.ScheduleModel
        The programme to insert the event into; it is not changed.
    case : delay.model.Case
        The case the event belongs to.
    event : Mapping
        One row of the event register (a ``pandas.Series`` or a record).
    present : set of str
        The activity ids of ``model`` (fragnet activities already inserted included).

    Returns
    -------
    model : delay.cpm.ScheduleModel
        The programme with the event modelled (``model`` itself when the event changes
        nothing).
    missing : list of str
        The named activities it could not find in the programme.
    notes : list of str
        What the event leaves alone, in words.
    """
    changes = event_changes(case, event, present, model)
    missing = changes.pop("missing")
    notes = changes.pop("notes")
    changes.pop("touches", None)
    arguments = {k: v for k, v in changes.items() if v is not None and len(v)}
    if not arguments:
        return model, missing, notes
    return model.what_if(**arguments), missing, notes


def _apply_next(
    model: ScheduleModel, case: Case, event: Mapping, present: set[str]
) -> tuple[ScheduleModel, list[str], list[str]]:
    """:func:`apply_event` for the next event of a run of events inserted one after
    another: ``present`` (the ids of ``model``) takes the fragnet activities it adds."""
    size = model.network.size
    model, missing, notes = apply_event(model, case, event, present)
    present.update(str(i) for i in model.network.ids[size:])
    return model, missing, notes


def targets_of(case: Case) -> list[str]:
    """The activities the modelled methods measure.

    Parameters
    ----------
    case : delay.model.Case
        The loaded case.

    Returns
    -------
    list of str
        The project's completion activity, then each section's completion milestone, each
        once.
    """
    return list(dict.fromkeys([completion_activity(case), *case.sections["completion_activity"].astype(str)]))


def actual_finishes(case: Case, targets: Sequence[str]) -> np.ndarray:
    """Each target's actual finish: the as-built record's, else the last update's forecast.

    Parameters
    ----------
    case : delay.model.Case
        The loaded case; its as-built record (else its last snapshot) is scheduled.
    targets : sequence of str
        Activity ids.

    Returns
    -------
    numpy.ndarray
        ``int64`` day numbers (days since 1970-01-01) of each target's finish, in the order
        of ``targets``; :data:`delay.cpm.NO_DAY` where the record lacks the activity.
    """
    record = case.asbuilt_snapshot if case.asbuilt_snapshot is not None else case.snapshots[-1]
    result = prepare(case, record, calendars=calendars_of(case)).run()
    return _finish_of(result.finish_day, result.model.network.index_of(list(targets)))


def _finish_of(finish: np.ndarray, where: np.ndarray) -> np.ndarray:
    return np.where(where >= 0, finish[np.maximum(where, 0)], NO_DAY)


@dataclass(frozen=True)
class ImpactedRun:
    """One target's figures of a run of events.

    Parameters
    ----------
    target : str
        The activity measured (the project's completion activity or a section's milestone).
    completion_base : datetime.date
        Its finish in the base programme, before any event.
    completion_cumulative : datetime.date
        Its finish with every event inserted.
    actual_completion : datetime.date
        Its actual finish (the as-built record's, else the last update's forecast; the
        cumulative completion when the analysis is prospective).
    events : pandas.DataFrame
        One row per event, :data:`EVENT_COLUMNS`; days measured at the target's finish,
        calendar days (``*_work_days``: work days of the default calendar).
    """

    target: str
    completion_base: dt.date
    completion_cumulative: dt.date
    actual_completion: dt.date
    events: pd.DataFrame

    @property
    def total_days(self) -> int:
        """The cumulative impact: the increments' sum."""
        return (self.completion_cumulative - self.completion_base).days

    @property
    def residual_days(self) -> int:
        """The actual completion less the completion with every event inserted."""
        return (self.actual_completion - self.completion_cumulative).days

    @property
    def explained_days(self) -> int:
        """The actual less the planned completion: the increments plus the residual."""
        return (self.actual_completion - self.completion_base).days


@dataclass(frozen=True)
class ImpactedResult:
    """Per event: impact alone and increment in the cumulative run, per party likewise.

    Made by :func:`analyse`. The properties (``events``, ``total_days``, ...) are those of
    ``run``, the whole works.

    Parameters
    ----------
    base : str
        The folder of the programme impacted.
    run : ImpactedRun
        The whole works, measured at the project's completion activity.
    by_party : pandas.DataFrame
        ``party``, ``events``, ``alone_days`` (the party's events together, without the
        others) and ``increment_days`` (the sum of its events' increments), calendar days.
    order : str
        The order of insertion (``chronological`` or ``as-listed``).
    notes : tuple of str
        Statements that go with the figures.
    sections : dict, optional
        Section id to its :class:`ImpactedRun`, measured at its completion milestone.
    """

    base: str
    run: ImpactedRun
    by_party: pd.DataFrame
    order: str
    notes: tuple[str, ...]
    sections: dict = field(default_factory=dict, repr=False)

    @property
    def events(self) -> pd.DataFrame:
        """The whole works' event rows (:data:`EVENT_COLUMNS`)."""
        return self.run.events

    @property
    def completion_base(self) -> dt.date:
        """The whole works' completion in the base programme, before any event."""
        return self.run.completion_base

    @property
    def completion_cumulative(self) -> dt.date:
        """The whole works' completion with every event inserted."""
        return self.run.completion_cumulative

    @property
    def actual_completion(self) -> dt.date:
        """The whole works' actual completion (see :class:`ImpactedRun`)."""
        return self.run.actual_completion

    @property
    def total_days(self) -> int:
        """The cumulative impact in calendar days: the increments' sum."""
        return self.run.total_days

    @property
    def residual_days(self) -> int:
        """The actual less the impacted completion, in calendar days."""
        return self.run.residual_days

    @property
    def explained_days(self) -> int:
        """The actual less the planned completion, in calendar days."""
        return self.run.explained_days

    def to_json(self) -> dict:
        """The result as plain JSON values (dates as ISO text).

        Returns
        -------
        dict
            ``method`` (``"impacted"``), base, target, completions, the event rows, the
            totals, the same per section, and the notes.
        """
        return {
            "method": "impacted",
            "base": self.base,
            "target": self.run.target,
            "completion_base": self.completion_base.isoformat(),
            "completion_cumulative": self.completion_cumulative.isoformat(),
            "actual_completion": self.actual_completion.isoformat(),
            "events": _event_json(self.events),
            "total_days": self.total_days,
            "residual_days": self.residual_days,
            "explained_days": self.explained_days,
            "sections": [
                {
                    "section": section,
                    "target": run.target,
                    "events": _event_json(run.events),
                    "total_days": run.total_days,
                    "residual_days": run.residual_days,
                    "explained_days": run.explained_days,
                }
                for section, run in self.sections.items()
            ],
            "notes": list(self.notes),
        }


def _event_json(events: pd.DataFrame) -> list[dict]:
    return [
        {
            "event": r.event,
            "party": r.party,
            "alone_days": int(r.alone_days),
            "increment_days": int(r.increment_days),
            "completion_after": r.completion_after.isoformat(),
            "applied": r.applied,
            "effect": r.effect,
        }
        for r in events.itertuples(index=False)
    ]


def _work_days(model: ScheduleModel, a: int, b: int) -> int:
    cal = model.calendars[model.settings.default_calendar]
    days = cal.finish_index_days(np.array([a, b]))
    return int(days[1] - days[0])


@dataclass(frozen=True)
class _Runs:
    """The finishes of every target in a run: before any event, each event alone, and after
    each event in the cumulative run (day numbers; shapes ``(targets,)`` and
    ``(events, targets)``)."""

    base: np.ndarray
    alone: np.ndarray
    cumulative: np.ndarray
    applied: list[str]
    effect: list[str]
    model: ScheduleModel


def _insert(
    case: Case, base: Snapshot, model: ScheduleModel, register: pd.DataFrame, label: str, targets: Sequence[str]
) -> _Runs:
    """Insert ``register``'s events into ``model``, alone and cumulatively, reading the
    targets' finishes from forward passes."""
    where = model.network.index_of(list(targets))
    base_finish = _finish_of(model.finish_days(), where)
    present = set(base.activities["id"].tolist())
    in_cumulative = set(present)  # with the fragnet activities inserted so far
    alone, cumulative_finish, applied, effect = [], [], [], []
    cumulative = model
    for event in register.to_dict("records"):
        alone_model, missing, notes = apply_event(model, case, event, present)
        alone.append(_finish_of(alone_model.finish_days(), where))
        cumulative, _, cumulative_notes = _apply_next(cumulative, case, event, in_cumulative)
        cumulative_finish.append(_finish_of(cumulative.finish_days(), where))
        applied.append("" if not missing else f"not in {label}: {', '.join(missing)}")
        words = [f"alone: {n}" for n in notes if n not in cumulative_notes]
        words += [f"in the cumulative run: {n}" for n in cumulative_notes if n not in notes]
        words += [n for n in notes if n in cumulative_notes]
        effect.append("; ".join(words))
    shape = (len(register), len(targets))
    return _Runs(
        base_finish,
        np.asarray(alone, dtype=np.int64).reshape(shape),
        np.asarray(cumulative_finish, dtype=np.int64).reshape(shape),
        applied,
        effect,
        cumulative,
    )


def _frame(register: pd.DataFrame, runs: _Runs, t: int, model: ScheduleModel) -> pd.DataFrame:
    """The event rows of one target of a run."""
    base = int(runs.base[t])
    after = np.concatenate([[base], runs.cumulative[:, t]]) if len(register) else np.array([base])
    rows = []
    for i, event in enumerate(register.to_dict("records")):
        alone_day, before, now = int(runs.alone[i, t]), int(after[i]), int(after[i + 1])
        rows.append(
            {
                "event": event["id"],
                "title": event["title"],
                "party": event["party"],
                "impact": event["impact"],
                "start": event["start"],
                "finish": event["finish"],
                "activities": split_ids(event["activities"]),
                "alone_days": alone_day - base,
                "alone_work_days": _work_days(model, base, alone_day),
                "completion_alone": day_to_date(alone_day),
                "increment_days": now - before,
                "increment_work_days": _work_days(model, before, now),
                "completion_after": day_to_date(now),
                "applied": runs.applied[i],
                "effect": runs.effect[i],
            }
        )
    return pd.DataFrame(rows, columns=EVENT_COLUMNS)


def run_events(
    case: Case, base: Snapshot, model: ScheduleModel, register: pd.DataFrame, label: str, targets: Sequence[str]
) -> tuple[list[pd.DataFrame], np.ndarray, np.ndarray, ScheduleModel]:
    """Impacts alone and the cumulative run of ``register`` on ``model``, at each target.

    Parameters
    ----------
    case : delay.model.Case
        The case the events belong to.
    base : delay.model.Snapshot
        The programme ``model`` was prepared from (its activity ids are the ones present).
    model : delay.cpm.ScheduleModel
        The prepared programme to insert the events into.
    register : pandas.DataFrame
        The event rows to insert, in insertion order (see :func:`order_events`).
    label : str
        The programme's name, used in the ``applied`` column and in errors.
    targets : sequence of str
        The activities to measure (see :func:`targets_of`).

    Returns
    -------
    frames : list of pandas.DataFrame or None
        Per target a DataFrame with :data:`EVENT_COLUMNS` (``None`` for a target not in
        the programme).
    base_finish, final_finish : numpy.ndarray
        The targets' finishes before and after every event, by full schedules (day
        numbers, days since 1970-01-01; :data:`delay.cpm.NO_DAY` for a target not in the
        programme).
    cumulative_model : delay.cpm.ScheduleModel
        The model with every event inserted.

    Raises
    ------
    delay.errors.ReconciliationError
        When the increments do not add up to the cumulative impact measured by full
        schedules.
    """
    runs = _insert(case, base, model, register, label, targets)
    frames = [_frame(register, runs, t, model) if runs.base[t] != NO_DAY else None for t in range(len(targets))]
    # The increments come from forward passes alone; the cumulative impact they must add up
    # to is measured again by full schedules (both passes) of the base and of the programme
    # with every event inserted.
    where = model.network.index_of(list(targets))
    base_full = _finish_of(model.run().finish_day, where)
    final_full = _finish_of(runs.model.run().finish_day, runs.model.network.index_of(list(targets)))
    for t, frame in enumerate(frames):
        if frame is None:
            continue
        increments = int(frame["increment_days"].sum())
        if increments != int(final_full[t] - base_full[t]):
            raise ReconciliationError(
                f"events inserted into {label}, at {targets[t]}",
                {"sum of increments": increments, "cumulative impact": int(final_full[t] - base_full[t])},
            )
    return frames, base_full, final_full, runs.model


def analyse(
    case: Case, base: str = "baseline", events: Sequence[str] | None = None, order: str = "chronological"
) -> ImpactedResult:
    """Impacted as-planned analysis.

    Parameters
    ----------
    case : delay.model.Case
        The loaded case.
    base : str, default "baseline"
        The programme to impact (folder name or label), by default the baseline.
    events : sequence of str, optional
        Event ids to insert (default all of the register).
    order : {"chronological", "as-listed"}, default "chronological"
        ``chronological`` (start, finish, register row) or ``as-listed``.

    Returns
    -------
    ImpactedResult
        ``events``: one row per event with ``alone_days`` (need not add up) and
        ``increment_days`` (these add up to ``total_days``) and the completion after each
        step; ``residual_days`` (actual less impacted completion); ``by_party``: the same
        per party (alone: the party's events together, without the others); ``sections``:
        the same at each section's completion milestone.

    Raises
    ------
    delay.errors.CaseError
        Unknown base snapshot, event or order; a completion activity not in the base, or
        with no actual finish in the record.
    delay.errors.ReconciliationError
        Increments that do not add up.

    Examples
    --------
    A small random case with no delay events: nothing moves, and the residual is all of
    the actual less the planned completion:

    >>> import pathlib, tempfile
    >>> from delay.case import load_case
    >>> from delay.synth import synthesise
    >>> with tempfile.TemporaryDirectory() as folder:
    ...     case = load_case(synthesise(pathlib.Path(folder) / "case", 20, updates=2))
    >>> result = analyse(case)
    >>> result.total_days, len(result.events)
    (0, 0)
    >>> result.residual_days == result.explained_days
    True

    References
    ----------
    AACE RP 29R-03 (2011), MIP 3.6; SCL Delay and Disruption Protocol, 2nd edition (2017),
    Part B, impacted as-planned analysis.
    """
    try:
        snapshot = case.snapshot(base)
    except KeyError:
        raise CaseError(
            Problem(file="snapshots/", message=f"no snapshot '{base}'", fix="name a folder under snapshots/ or a label")
        ) from None
    register = order_events(case, events, order)
    key = ("impacted", snapshot.folder, tuple(register["id"]), order)
    return remembered(case, key, lambda: _analyse(case, snapshot, register, order))


def _analyse(case: Case, snapshot: Snapshot, register: pd.DataFrame, order: str) -> ImpactedResult:
    model = prepare(case, snapshot, calendars=calendars_of(case))
    targets = targets_of(case)
    frames, base_full, final_full, _ = run_events(case, snapshot, model, register, snapshot.folder, targets)
    if frames[0] is None:
        raise CaseError(
            Problem(
                file="case.toml",
                column="completion_activity",
                message=f"the completion activity '{targets[0]}' is not in snapshot '{snapshot.folder}'",
                fix="name an activity of the programme in [project] completion_activity",
            )
        )
    # Without an as-built record and without a later programme than the base, nothing says
    # what happened: the analysis is prospective, and the impacted completion stands as the
    # forecast (no residual).
    prospective = case.asbuilt_snapshot is None and snapshot.folder == case.snapshots[-1].folder
    actual = final_full if prospective else actual_finishes(case, targets)
    runs = [
        None
        if frame is None or actual[t] == NO_DAY
        else ImpactedRun(
            targets[t],
            day_to_date(int(base_full[t])),
            day_to_date(int(final_full[t])),
            day_to_date(int(actual[t])),
            frame,
        )
        for t, frame in enumerate(frames)
    ]
    whole = runs[0]
    if whole is None:
        raise CaseError(
            Problem(
                file="asbuilt.csv",
                message=f"the completion activity '{targets[0]}' has no actual finish",
                fix="give it actual dates in the as-built record",
            )
        )
    sections = {
        str(section): runs[targets.index(str(milestone))]
        for section, milestone in zip(case.sections["section"], case.sections["completion_activity"])
        if runs[targets.index(str(milestone))] is not None
    }
    present = set(snapshot.activities["id"].tolist())
    k = int(model.network.index_of([targets[0]])[0])
    parties = []
    for party in PARTIES:
        own = register[register["party"] == party]
        if not len(own):
            continue
        together, in_together = model, set(present)
        for event in own.to_dict("records"):
            together, _, _ = _apply_next(together, case, event, in_together)
        day = int(together.finish_days()[k])
        parties.append(
            {
                "party": party,
                "events": list(own["id"]),
                "alone_days": day - int(base_full[0]),
                "increment_days": int(whole.events.loc[whole.events["party"] == party, "increment_days"].sum()),
            }
        )
    by_party = pd.DataFrame(parties, columns=["party", "events", "alone_days", "increment_days"])
    notes = (
        "Impacts alone need not add up: events on parallel paths overlap and one event can hide another.",
        "Increments depend on the order of insertion; they add up exactly to the cumulative impact.",
        "The method measures the plan's response to the events at their real dates, not what happened; the "
        "residual is the actual completion less the impacted one.",
    ) + (
        (
            "No as-built record and no programme later than the base: the analysis is prospective, and the "
            "completion with every event is the forecast (no residual).",
        )
        if prospective
        else ()
    )
    return ImpactedResult(snapshot.folder, whole, by_party, order, notes, sections)
