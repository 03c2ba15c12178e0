"""The critical path method on arrays.

:func:`schedule` computes early and late dates, total and free float, critical and driving
flags of one snapshot of a case, following the time convention and scheduling rules of the
case format (shared/case-format.md) to the letter. :func:`prepare` compiles a snapshot once
into a :class:`ScheduleModel`; the model re-schedules what-ifs (longer durations, later
start bounds, added activities and links) without touching the case tables again, which is
what the delay methods do hundreds of times.

How time is held
----------------
Each activity's times are work-day *boundaries* on its own calendar: boundary ``k`` is the
start of work day ``k`` and the end of work day ``k - 1``. A task of duration ``d`` that
starts on day ``s`` has early start ``ES = s`` and early finish ``EF = s + d``; its finish
date is the date of day ``EF - 1``. A milestone sits on one boundary: a start milestone is
dated by the day it precedes (``date_of(b)``), a finish milestone by the day it follows
(``date_of(b - 1)``). For every point of an activity we therefore know whether it is read
as a *start* (the start of its date) or a *finish* (the end of its date); a link between
different calendars goes through that date (rule 2 of the format).

The two passes over the logic run as compiled loops over arrays in topological order
(:mod:`delay._kernels`); everything else is whole-array numpy. No Python object is made per
activity.

References
----------
J. E. Kelley and M. R. Walker, "Critical-path planning and scheduling", Proceedings of the
Eastern Joint Computer Conference, 1959 (the forward and backward passes). J. W. Fondahl,
"A non-computer approach to the critical path method for the construction industry",
Stanford University, 1961 (precedence relationships with lags).
"""

from __future__ import annotations

import dataclasses
import datetime as dt
import json
import weakref
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from functools import cached_property
from typing import NamedTuple

import numpy as np
import pandas as pd

from .bounds import check_finish_days, check_late_days, grow_within_bounds
from .calendars import CalendarSet, build_calendars
from .convert import (
    NO_DAY,
    day_to_date,
    iso_dates,
    json_bool_cells,
    json_date_cells,
    json_int_cells,
    json_rows_text,
    json_text_cells,
    table_dates,
    to_days,
)
from .errors import CaseError, Problem
from .model import ACTIVITY_KINDS, CONSTRAINTS, Case, ScheduleSettings, Snapshot
from .network import LINK_CODES, Network, build_network, compile_network

__all__ = [
    "schedule",
    "prepare",
    "calendars_of",
    "ScheduleModel",
    "ScheduleResult",
    "ACTIVITY_ARRAYS",
    "NEAR_CRITICAL_DAYS",
    "NOT_STARTED",
    "IN_PROGRESS",
    "COMPLETE",
    "TASK",
    "START_MILESTONE",
    "FINISH_MILESTONE",
    "STATUS_NAMES",
]

#: Total float (work days) at or below which an activity is near-critical.
NEAR_CRITICAL_DAYS = 10

NOT_STARTED, IN_PROGRESS, COMPLETE = 0, 1, 2
STATUS_NAMES = np.array(["not_started", "in_progress", "complete"], dtype=object)
TASK, START_MILESTONE, FINISH_MILESTONE = 0, 1, 2
NO_CONSTRAINT, EARLIEST_START, LATEST_FINISH, FIXED_START, FIXED_FINISH = 0, 1, 2, 3, 4
CONSTRAINT_CODES = {"": 0, "earliest_start": 1, "latest_finish": 2, "fixed_start": 3, "fixed_finish": 4}
KIND_CODES = {"task": TASK, "start_milestone": START_MILESTONE, "finish_milestone": FINISH_MILESTONE}

# Engine codes by position in the case format's lists (model.ACTIVITY_KINDS and
# model.CONSTRAINTS; position -1, no constraint, maps through the first entry).
_KIND_BY_POSITION = np.array([KIND_CODES[k] for k in ACTIVITY_KINDS], dtype=np.int8)
_CONSTRAINT_BY_POSITION = np.array([0] + [CONSTRAINT_CODES[c] for c in CONSTRAINTS], dtype=np.int8)

_FAR = np.int64(1) << 40  # beyond any boundary; "no bound"


def _days_or_none(column: pd.Series) -> np.ndarray:
    """Day numbers of a date column, :data:`NO_DAY` for a blank."""
    values = column.to_numpy()
    if values.dtype.kind == "M":  # the loader's date columns: integer arithmetic, no copy to days
        unit, count = np.datetime_data(values.dtype)
        per_day = int(np.timedelta64(1, "D") / np.timedelta64(count, unit))
        ticks = values.view(np.int64)  # NaT is the least int64, which is NO_DAY
        return np.where(ticks == NO_DAY, NO_DAY, np.floor_divide(ticks, per_day))
    values = column.to_numpy(dtype="datetime64[D]", na_value=np.datetime64("NaT"))
    days = values.astype(np.int64)
    days[np.isnat(values)] = NO_DAY
    return days


#: The per-activity arrays of a :class:`ScheduleModel` (network order) that a what-if may
#: change or a sub-network keeps.
ACTIVITY_ARRAYS = (
    "names",
    "calendar",
    "duration",
    "remaining",
    "actual_start",
    "actual_finish",
    "kind",
    "constraint",
    "constraint_day",
    "start_bound",
)


@dataclass(frozen=True, eq=False)
class ScheduleModel:
    """One snapshot compiled for scheduling; immutable, cheap to vary.

    Per-activity arrays have shape ``(n,)`` in the network's activity order. Day numbers are
    ``int64`` days since 1970-01-01, :data:`NO_DAY` where there is no date. Made by
    :func:`prepare`; use :meth:`run` to schedule it, :meth:`what_if` for a variant.

    Parameters
    ----------
    network : Network
        The activities and links as arrays (:mod:`delay.network`).
    calendars : CalendarSet
        The work calendars the activities' ``calendar`` numbers refer to.
    names : numpy.ndarray
        Activity names (object).
    calendar : numpy.ndarray
        Each activity's calendar number in ``calendars`` (int64).
    duration : numpy.ndarray
        Planned (original) durations in work days of the activity's calendar (int64).
    remaining : numpy.ndarray
        Remaining durations in work days (float64), NaN where none is given.
    actual_start : numpy.ndarray
        Actual start day numbers, :data:`NO_DAY` for none.
    actual_finish : numpy.ndarray
        Actual finish day numbers, :data:`NO_DAY` for none.
    kind : numpy.ndarray
        Activity kind as given (int8): :data:`TASK`, :data:`START_MILESTONE` or
        :data:`FINISH_MILESTONE`.
    constraint : numpy.ndarray
        Constraint code (int8): none, earliest start, latest finish, fixed start, fixed
        finish.
    constraint_day : numpy.ndarray
        The constraint's day number, :data:`NO_DAY` for none.
    start_bound : numpy.ndarray
        An extra "start no earlier than" day number of a what-if hold, :data:`NO_DAY`
        for none.
    data_day : int
        The snapshot's data date as a day number.
    contract_completion_day : int
        The contract completion date as a day number (where the backward pass starts
        under ``float_to = "contract_completion"``).
    settings : ScheduleSettings
        The scheduling settings (progress rule, lag calendar, where float is measured to).
    label : str, default ""
        The snapshot's label.
    folder : str, default ""
        The snapshot's folder under snapshots/ (``"asbuilt"`` for the as-built record).
    link_order : numpy.ndarray or None, optional
        The input row of each link, used to break ties; ``None`` means link order.

    Examples
    --------
    >>> model = prepare(demo, "baseline")
    >>> model.network.size, model.completion()
    (263, datetime.date(2026, 5, 19))
    """

    network: Network
    calendars: CalendarSet
    names: np.ndarray
    calendar: np.ndarray
    duration: np.ndarray  # planned (original) duration, work days
    remaining: np.ndarray  # float64, NaN when not given
    actual_start: np.ndarray  # day numbers
    actual_finish: np.ndarray
    kind: np.ndarray  # int8: task, start milestone, finish milestone (as given)
    constraint: np.ndarray  # int8 constraint code
    constraint_day: np.ndarray
    start_bound: np.ndarray  # extra "no earlier than" day (a what-if hold), NO_DAY when none
    data_day: int
    contract_completion_day: int
    settings: ScheduleSettings
    label: str = ""
    folder: str = ""  # the snapshot's folder under snapshots/ ("asbuilt" for the as-built record)
    link_order: np.ndarray | None = None  # input row of each link (for tie-breaks)

    # -- variants ------------------------------------------------------------------------
    def what_if(
        self,
        *,
        extend: Mapping[str, int] | None = None,
        start_no_earlier: Mapping[str, object] | None = None,
        hold: Mapping[str, Sequence[tuple[object, object]]] | None = None,
        add_activities: pd.DataFrame | None = None,
        add_links: pd.DataFrame | None = None,
        settings: ScheduleSettings | None = None,
    ) -> ScheduleModel:
        """Make a variant of this model; the model itself does not change.

        Parameters
        ----------
        extend : Mapping of str to int, optional
            Work days (of the activity's own calendar) added to activities' durations (to
            the remaining duration of a started or re-estimated activity), by id.
        start_no_earlier : Mapping of str to date-like, optional
            A date before which the activity may not start, by id (the later bound wins
            when there is one already).
        hold : Mapping of str to sequence of (date-like, date-like), optional
            Periods in which an activity does no work, by id: ``(first, last)`` dates, both
            included. The activity's work days in them become non-working for it alone (a
            calendar derived from its own, :meth:`delay.calendars.CalendarSet.with_held_days`),
            whatever its status: work before a period stands and the rest resumes after it.
            A lag counted on the activity's calendar skips the held days too.
        add_activities : DataFrame, optional
            New activities, not started: columns ``id``, ``duration`` (work days) and
            optionally ``name`` (default: the id), ``calendar`` (default calendar when
            absent or blank) and ``start_no_earlier``.
        add_links : DataFrame, optional
            New links: ``pred``, ``succ``, ``type`` (default FS), ``lag`` (work days,
            default 0); ids may name existing or added activities.
        settings : ScheduleSettings, optional
            Other scheduling settings.

        Returns
        -------
        ScheduleModel
            The variant; arrays it does not change are shared with this model. With the
            same settings it keeps this model, so that its forward dates
            (:meth:`finish_days`, :meth:`work_dates`) are brought up to date from this
            model's: only the activities it changes, and those downstream of a date that
            moves, are computed again (the same dates as a whole pass, in a fraction of
            its time). It lets go of this model once they are.

        Raises
        ------
        KeyError
            For an id that is in neither the model nor ``add_activities``.
        CaseError
            When added links close a logic loop.

        Examples
        --------
        >>> model = prepare(demo, "baseline")
        >>> model.completion()
        datetime.date(2026, 5, 19)
        >>> model.what_if(extend={"SET-HOARDING": 10}).completion()  # on the driving path
        datetime.date(2026, 6, 2)
        """
        changes: dict[str, object] = {}
        changed: list[np.ndarray] = []  # the activities whose arrays change
        net = self.network
        arrays = {name: getattr(self, name) for name in ACTIVITY_ARRAYS}
        new_ids: list = []
        if add_activities is not None and len(add_activities):
            new_ids, extra = _added_activities(add_activities, self.calendars, self.settings.default_calendar)
            arrays = {name: np.concatenate([arrays[name], extra[name]]) for name in arrays}
        added = {name: net.size + k for k, name in enumerate(new_ids)}

        def numbers(ids) -> np.ndarray:
            found = net.numbers_of([str(i) for i in ids], added)
            if (found < 0).any():
                bad = [str(i) for i, f in zip(ids, found) if f < 0]
                raise KeyError(f"unknown activity id(s): {', '.join(bad)}")
            return found

        if extend:
            where = numbers(list(extend))
            days = np.asarray(list(extend.values()), dtype=np.int64)
            duration = arrays["duration"].copy()
            remaining = arrays["remaining"].copy()
            has_remaining = ~np.isnan(remaining[where])
            np.add.at(duration, where, days)
            np.add.at(remaining, where[has_remaining], days[has_remaining].astype(float))
            arrays["duration"], arrays["remaining"] = duration, remaining
            changed.append(where)
        if start_no_earlier:
            where = numbers(list(start_no_earlier))
            days = to_days(np.asarray([np.datetime64(v, "D") for v in start_no_earlier.values()]))
            bound = arrays["start_bound"].copy()
            np.maximum.at(bound, where, days)
            arrays["start_bound"] = bound
            changed.append(where)
        if hold:
            where = numbers(list(hold))
            requests = []
            for v, periods in zip(where, hold.values()):
                days = [
                    np.arange(int(to_days(np.datetime64(first, "D"))), int(to_days(np.datetime64(last, "D"))) + 1)
                    for first, last in periods
                ]
                requests.append((int(arrays["calendar"][v]), np.concatenate(days) if days else np.empty(0, np.int64)))
            calendars, held = self.calendars.with_held_days(requests)
            if calendars is not self.calendars:
                changes["calendars"] = calendars
            calendar = np.array(arrays["calendar"], dtype=np.int64)
            calendar[where] = held
            arrays["calendar"] = calendar
            changed.append(where)
        if new_ids or (add_links is not None and len(add_links)):
            links = add_links if add_links is not None else pd.DataFrame(columns=["pred", "succ"])
            count = len(links)
            pred = numbers(links["pred"].tolist()) if count else np.empty(0, np.int64)
            succ = numbers(links["succ"].tolist()) if count else np.empty(0, np.int64)
            types = links["type"].tolist() if "type" in links else ["FS"] * count
            type_codes = np.asarray([LINK_CODES[_given(t, "FS").upper() or "FS"] for t in types], dtype=np.int8)
            lags = [int(_given(v, 0)) for v in links["lag"].tolist()] if "lag" in links else [0] * count
            lags = np.asarray(lags, dtype=np.int64)
            changes["network"] = net.extended(new_ids, pred, succ, type_codes, lags)
            order = self.link_order if self.link_order is not None else np.arange(net.link_count)
            changes["link_order"] = np.concatenate([order, order.size + np.arange(len(links))])
            changed += [net.size + np.arange(len(new_ids)), succ]  # what the new logic touches
        changes.update(arrays)
        if settings is not None:
            changes["settings"] = settings
        variant = dataclasses.replace(self, **changes)
        if settings is None or settings == self.settings:
            # the same logic, or more of it: its forward dates are brought up to date from this model's
            variant.__dict__["_parent"] = self
            variant.__dict__["_changed"] = np.concatenate(changed) if changed else np.empty(0, np.int64)
        return variant

    def restricted(self, keep: np.ndarray) -> ScheduleModel:
        """Make the model of some of its activities and the links between them.

        Parameters
        ----------
        keep : numpy.ndarray
            Boolean mask, shape ``(n,)``: the activities to keep (their order is kept).

        Returns
        -------
        ScheduleModel
            The model of the activities kept, its network rebuilt; this model itself when
            every activity is kept.
        """
        keep = np.asarray(keep, dtype=bool)
        if keep.all():
            return self
        net = self.network
        number = np.cumsum(keep) - 1
        links = keep[net.pred] & keep[net.succ]
        network = build_network(
            net.ids[keep], number[net.pred[links]], number[net.succ[links]], net.link_type[links], net.lag[links]
        )
        arrays = {name: getattr(self, name)[keep] for name in ACTIVITY_ARRAYS}
        order = self.link_order if self.link_order is not None else np.arange(net.link_count)
        return dataclasses.replace(self, network=network, link_order=order[links], **arrays)

    def logic_only(self, end_day: int) -> ScheduleModel:
        """The model for late dates by logic alone, its backward pass starting from ``end_day``.

        The ``latest_finish``, ``fixed_start`` and ``fixed_finish`` constraints are taken out
        (``earliest_start``, which bounds early dates only, stays) and ``float_to`` no longer
        applies: every incomplete activity's late finish is the latest its logic allows for
        the works to finish by ``end_day``. The windows and as-built methods measure
        lateness against these dates, so that a milestone constraint, which changes no
        forward date, changes no figure.

        Parameters
        ----------
        end_day : int
            Day number (days since 1970-01-01) the backward pass starts from.

        Returns
        -------
        ScheduleModel
            The variant, with ``float_to = "contract_completion"`` and
            ``contract_completion_day = end_day``.
        """
        code = self.constraint.copy()
        code[(code == LATEST_FINISH) | (code == FIXED_START) | (code == FIXED_FINISH)] = NO_CONSTRAINT
        settings = dataclasses.replace(self.settings, float_to="contract_completion")
        return dataclasses.replace(self, constraint=code, contract_completion_day=int(end_day), settings=settings)

    # -- scheduling ------------------------------------------------------------------------
    def run(self) -> ScheduleResult:
        """Schedule the model: forward and backward passes, floats and driving links.

        See the module docstring for how time is held.

        Returns
        -------
        ScheduleResult
            Early and late dates, total and free float, critical and driving flags.

        Raises
        ------
        DateBoundError
            When a computed date would fall outside 1900-01-01 .. 2200-12-31
            (:mod:`delay.bounds` names the durations and lags that drive it there).

        Examples
        --------
        >>> result = prepare(demo, "baseline").run()
        >>> result.completion, result.data_date
        (datetime.date(2026, 5, 19), datetime.date(2025, 3, 3))
        """
        return _schedule(self)

    def completion_day(self) -> int:
        """Compute the completion from the forward pass alone.

        What a what-if that only asks "when would the works finish?" needs, without late
        dates or floats: the latest finish date of any activity (the data date when there
        are no activities).

        Returns
        -------
        int
            The completion as a day number (days since 1970-01-01).

        Raises
        ------
        DateBoundError
            When a computed date would fall after 2200-12-31.

        Examples
        --------
        >>> model = prepare(demo, "baseline")
        >>> model.completion_day(), str(np.datetime64(model.completion_day(), "D"))
        (20592, '2026-05-19')
        """
        return _forward_completion(self)

    def completion(self) -> dt.date:
        """Compute the completion date from the forward pass alone.

        Returns
        -------
        datetime.date
            The date of :meth:`completion_day`.

        Raises
        ------
        DateBoundError
            When a computed date would fall after 2200-12-31.
        """
        return day_to_date(self.completion_day())

    def work_dates(self, where: np.ndarray | None = None) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Give activities' status, start and finish from the forward pass alone.

        The forward pass runs once per model (brought up to date from the model a what-if
        was made from, see :meth:`what_if`) and is kept with it.

        Parameters
        ----------
        where : numpy.ndarray, optional
            Activity numbers (network order) to give the dates of; every activity when
            ``None``.

        Returns
        -------
        status : numpy.ndarray
            Status codes (int8): :data:`NOT_STARTED`, :data:`IN_PROGRESS`,
            :data:`COMPLETE`.
        start_day : numpy.ndarray
            The day its work starts: the actual start once started, else the early start
            (day numbers).
        finish_day : numpy.ndarray
            The day it finishes: the actual finish once complete, else the early finish
            (day numbers).

        Raises
        ------
        DateBoundError
            When a computed date would fall after 2200-12-31.

        Examples
        --------
        >>> model = prepare(demo, "baseline")
        >>> status, start, finish = model.work_dates(model.network.index_of(["SET-HOARDING"]))
        >>> status.tolist(), str(np.datetime64(int(start[0]), "D")), str(np.datetime64(int(finish[0]), "D"))
        ([0], '2025-03-03', '2025-03-07')
        """
        state = _forward_state(self)
        rows = slice(None) if where is None else np.asarray(where, dtype=np.int64)
        has_start = state.st.has_start[rows]
        start_read = state.dates.start_read[rows]
        start_day = np.where(has_start, self.actual_start[rows], self.calendars.day_of(self.calendar[rows], start_read))
        return state.st.status[rows], start_day, state.dates.finish_day[rows]

    def finish_days(self) -> np.ndarray:
        """Give every activity's finish date from the forward pass alone.

        What a what-if that asks when some activities (a section's milestone, the project's
        completion activity) would finish needs. Computed once per model, with
        :meth:`work_dates`.

        Returns
        -------
        numpy.ndarray
            Finish day numbers (days since 1970-01-01), network order.

        Raises
        ------
        DateBoundError
            When a computed date would fall after 2200-12-31.
        """
        return _forward_state(self).dates.finish_day


def _given(value, default):
    """``value``, or ``default`` for a blank cell (None, NaN, NaT)."""
    return default if value is None or (not isinstance(value, str) and pd.isna(value)) else value


def _added_activities(add: pd.DataFrame, calendars: CalendarSet, default_calendar: str) -> tuple[list, dict]:
    """The ids and the per-activity arrays (:data:`ACTIVITY_ARRAYS`) of a what-if's added
    activities, not started (see :meth:`ScheduleModel.what_if`); a few rows, read as lists."""
    new_ids = [str(i) for i in add["id"].tolist()]
    k = len(new_ids)
    given_calendars = add["calendar"].tolist() if "calendar" in add else [""] * k
    cal_numbers = [calendars.number[c if isinstance(c, str) and c else default_calendar] for c in given_calendars]
    bounds = np.full(k, NO_DAY, dtype=np.int64)
    if "start_no_earlier" in add:
        for row, value in enumerate(add["start_no_earlier"].tolist()):
            if _given(value, None) is not None:
                bounds[row] = int(to_days(np.datetime64(value, "D")))
    names = [str(v) for v in add["name"].tolist()] if "name" in add else new_ids
    extra = {
        "names": np.asarray(names, dtype=object),
        "calendar": np.asarray(cal_numbers, dtype=np.int64),
        "duration": np.asarray(add["duration"].tolist(), dtype=np.int64),
        "remaining": np.full(k, np.nan),
        "actual_start": np.full(k, NO_DAY, dtype=np.int64),
        "actual_finish": np.full(k, NO_DAY, dtype=np.int64),
        "kind": np.zeros(k, dtype=np.int8),
        "constraint": np.zeros(k, dtype=np.int8),
        "constraint_day": np.full(k, NO_DAY, dtype=np.int64),
        "start_bound": bounds,
    }
    return new_ids, extra


class _Status(NamedTuple):
    """What progress and the activity kinds make of each activity (network order)."""

    status: np.ndarray  # NOT_STARTED, IN_PROGRESS or COMPLETE
    has_start: np.ndarray  # an actual start is recorded
    has_finish: np.ndarray  # an actual finish is recorded
    given_milestone: np.ndarray  # the case calls it a milestone
    point: np.ndarray  # the engine's kind: a task, or a start or finish milestone (a zero-duration task too)
    duration: np.ndarray  # effective duration in work days: remaining when given, else planned; 0 for milestones

    @property
    def complete(self) -> np.ndarray:
        return self.status == COMPLETE

    @property
    def start_ms(self) -> np.ndarray:
        return self.point == START_MILESTONE

    @property
    def finish_ms(self) -> np.ndarray:
        return self.point == FINISH_MILESTONE


class _Bounds(NamedTuple):
    """Boundaries (calendar-table indices) the passes respect, per activity."""

    lower: np.ndarray  # the earliest start boundary (the data date, actual dates, start constraints)
    upper: np.ndarray  # the latest start boundary (actual or pinned dates; _FAR for none)
    duration: np.ndarray  # boundaries spanned: the effective duration, an actual span when complete
    start_read_fixed: np.ndarray  # in progress: the boundary of its actual start
    late_upper_extra: np.ndarray  # a latest finish (or a started fixed finish) for the backward pass
    pin_late: np.ndarray  # a fixed date's finish boundary for the backward pass (-_FAR for none)


def _status(model: ScheduleModel) -> _Status:
    """Status and effective durations: complete with an actual finish (a milestone with
    either actual date), in progress with an actual start only, else not started; a task of
    no duration is a finish milestone when it has a predecessor, else a start milestone."""
    has_start = model.actual_start != NO_DAY
    has_finish = model.actual_finish != NO_DAY
    given_milestone = model.kind != TASK
    status = np.full(model.network.size, NOT_STARTED, dtype=np.int8)
    status[has_start] = IN_PROGRESS
    status[has_finish | (given_milestone & has_start)] = COMPLETE
    incomplete = status != COMPLETE
    remaining_given = ~np.isnan(model.remaining)
    effective = np.where(remaining_given & incomplete, np.nan_to_num(model.remaining).astype(np.int64), model.duration)
    effective = np.where(given_milestone, 0, effective)
    has_pred = model.network.has_predecessor
    point = model.kind.astype(np.int8).copy()
    zero_task = (point == TASK) & (effective == 0)
    point[zero_task & has_pred] = FINISH_MILESTONE
    point[zero_task & ~has_pred] = START_MILESTONE
    return _Status(status, has_start, has_finish, given_milestone, point, effective.astype(np.int64))


def _bounds(model: ScheduleModel, st: _Status) -> _Bounds:
    """The boundaries of every activity from the data date, progress and constraints.

    A point is read as a finish (the end of its date) when it is a task's finish or a
    finish milestone, as a start otherwise; "on or after a day" is the first boundary of
    that day's work, "on or before" the last.
    """
    cals, cal = model.calendars, model.calendar
    n = model.network.size
    start_ms, finish_ms = st.start_ms, st.finish_ms

    def lower_of(days: np.ndarray, where: np.ndarray) -> np.ndarray:
        """Boundary of 'dated on or after day' for each activity's start point."""
        return cals.start_index_days(cal[where], days[where]) + finish_ms[where]

    def upper_of(days: np.ndarray, where: np.ndarray) -> np.ndarray:
        """Boundary of 'dated on or before day' for each activity's finish point."""
        return cals.finish_index_days(cal[where], days[where]) + (~start_ms[where])

    every_calendar = np.arange(len(cals))
    data_day = np.full(every_calendar.size, model.data_day)
    lower = cals.start_index_days(every_calendar, data_day)[cal] + finish_ms
    upper = np.full(n, _FAR, dtype=np.int64)
    duration = st.duration.copy()
    start_read_fixed = np.zeros(n, dtype=np.int64)
    _progress_bounds(model, st, lower, upper, duration, start_read_fixed)

    not_started = st.status == NOT_STARTED
    incomplete = st.status != COMPLETE
    bound_rows = np.flatnonzero(not_started & (model.start_bound != NO_DAY))
    if bound_rows.size:
        lower[bound_rows] = np.maximum(lower[bound_rows], lower_of(model.start_bound, bound_rows))
    late_upper_extra = np.full(n, _FAR, dtype=np.int64)
    pin_late = np.full(n, -_FAR, dtype=np.int64)
    code = model.constraint
    rows = np.flatnonzero(not_started & (code == EARLIEST_START))
    if rows.size:
        lower[rows] = np.maximum(lower[rows], lower_of(model.constraint_day, rows))
    in_progress = st.status == IN_PROGRESS
    rows = np.flatnonzero(incomplete & ((code == LATEST_FINISH) | (in_progress & (code == FIXED_FINISH))))
    if rows.size:
        late_upper_extra[rows] = upper_of(model.constraint_day, rows)
    for pinned_code in (FIXED_START, FIXED_FINISH):
        rows = np.flatnonzero(not_started & (code == pinned_code))
        if not rows.size:
            continue
        if pinned_code == FIXED_START:
            pin = lower_of(model.constraint_day, rows)
        else:
            pin = upper_of(model.constraint_day, rows) - duration[rows]
        pin = np.maximum(pin, lower[rows])
        lower[rows] = pin
        upper[rows] = pin
        pin_late[rows] = pin + duration[rows]
    return _Bounds(lower, upper, duration, start_read_fixed, late_upper_extra, pin_late)


def _progress_bounds(model, st: _Status, lower, upper, duration, start_read_fixed) -> None:
    """Progress as boundaries, in place: a complete activity is held to its actual dates
    (a milestone to its one date), an activity in progress reads its actual start."""
    cals, cal = model.calendars, model.calendar
    rows = np.flatnonzero(st.complete)
    if rows.size:
        has_start, has_finish = st.has_start[rows], st.has_finish[rows]
        started = np.where(has_start, model.actual_start[rows], model.actual_finish[rows])
        finished = np.where(has_finish, model.actual_finish[rows], model.actual_start[rows])
        is_ms = st.start_ms[rows] | st.finish_ms[rows] | st.given_milestone[rows]
        ms_day = np.where(has_finish, model.actual_finish[rows], model.actual_start[rows])
        s_bound = cals.start_index_days(cal[rows], started)
        f_bound = cals.finish_index_days(cal[rows], finished) + 1
        ms_bound = np.where(
            st.finish_ms[rows] | (model.kind[rows] == FINISH_MILESTONE),
            cals.finish_index_days(cal[rows], ms_day) + 1,
            cals.start_index_days(cal[rows], ms_day),
        )
        s_bound = np.where(is_ms, ms_bound, s_bound)
        f_bound = np.where(is_ms, ms_bound, np.maximum(f_bound, s_bound))
        lower[rows] = s_bound
        upper[rows] = s_bound
        duration[rows] = f_bound - s_bound
    rows = np.flatnonzero(st.status == IN_PROGRESS)
    if rows.size:
        start_read_fixed[rows] = cals.start_index_days(cal[rows], model.actual_start[rows])


class _Forward(NamedTuple):
    """What the forward pass leaves: per activity in network order unless ``_t`` (by
    topological position)."""

    early_finish_t: np.ndarray
    start_read: np.ndarray
    early_finish: np.ndarray
    remaining_start: np.ndarray
    finish_day: np.ndarray  # the early finish as a day number
    relative_float: np.ndarray  # per link (only with floats)
    link_free_float_t: np.ndarray  # per activity by position (only with floats)
    start_read_t: np.ndarray  # the start as successors read it, by position


_EVERY = np.empty(0, dtype=np.int64)  # no positions named: the forward pass computes every activity
#: The arrays of :class:`_Forward` that a forward pass brings up to date.
_UPDATED = ("early_finish_t", "start_read", "early_finish", "remaining_start", "finish_day", "start_read_t")


def _known_finish(model, st: _Status) -> np.ndarray:
    """The finish day of each complete activity (its actual finish; a milestone's one
    date), :data:`NO_DAY` for the others."""
    known_finish = np.full(st.status.size, NO_DAY, dtype=np.int64)
    rows = np.flatnonzero(st.complete)
    known_finish[rows] = np.where(st.has_finish[rows], model.actual_finish[rows], model.actual_start[rows])
    return known_finish


def _by_position(model, st: _Status) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Status, point and calendar of each activity by topological position (as the
    forward pass reads them)."""
    order = model.network.order
    return st.status[order], st.point[order], model.calendar[order]


def _forward(
    model: ScheduleModel,
    st: _Status,
    bounds: _Bounds,
    with_floats: bool,
    known_finish: np.ndarray | None = None,
    by_position: tuple | None = None,
) -> _Forward:
    """The forward pass over the activities in topological order, reading each one's links
    front to back (:attr:`Network.passes`); the calendar horizon grows and the pass runs
    again when a date falls outside it. ``known_finish`` and ``by_position`` are found here
    unless the caller has them (:func:`_known_finish`, :func:`_by_position`)."""
    from . import _kernels

    net = model.network
    n = net.size
    known_finish = _known_finish(model, st) if known_finish is None else known_finish
    by_position = _by_position(model, st) if by_position is None else by_position
    empty = np.empty(0, dtype=np.int64)
    dates = _Forward(
        *(np.empty(n, dtype=np.int64) for _ in range(5)),
        relative_float=np.empty(net.link_count, dtype=np.int64) if with_floats else empty,
        link_free_float_t=np.empty(n, dtype=np.int64) if with_floats else empty,
        start_read_t=np.empty(n, dtype=np.int64),
    )
    while True:
        dates.link_free_float_t.fill(_FAR)
        code = _forward_pass(model, by_position, bounds, known_finish, dates, with_floats, _EVERY, _EVERY)
        if code == _kernels.OK:
            break
        grow_within_bounds(model, model.calendars, code == _kernels.TOO_EARLY)
    check_finish_days(model, dates.finish_day)
    return dates


def _forward_pass(
    model: ScheduleModel,
    by_position: tuple,
    bounds: _Bounds,
    known_finish: np.ndarray,
    dates: _Forward,
    with_floats: bool,
    changed: np.ndarray,
    touched: np.ndarray,
) -> int:
    """One call of :func:`delay._kernels.forward_pass` writing into ``dates``: every
    activity when ``changed`` is empty, else those positions and what lies downstream of a
    date that moves (``dates`` holding the parent's dates on entry). Gives the kernel's
    code."""
    from . import _kernels

    net, settings = model.network, model.settings
    layout = net.passes
    return _kernels.forward_pass(
        *layout.forward,
        layout.f_link,
        net.order,
        settings.progress == "progress_override",
        settings.lag_calendar == "predecessor",
        with_floats,
        *by_position,
        bounds.lower,
        bounds.upper,
        bounds.duration,
        bounds.start_read_fixed,
        known_finish,
        model.calendars.table(),
        dates.early_finish_t,
        dates.start_read_t,
        dates.early_finish,
        dates.start_read,
        dates.remaining_start,
        dates.finish_day,
        dates.relative_float,
        dates.link_free_float_t,
        layout.b_ptr,
        layout.b_succ,
        changed,
        touched,
    )


def _backward(model: ScheduleModel, st: _Status, bounds: _Bounds, fwd: _Forward, completion_day: int):
    """The backward pass to the float end (the completion, or the contract completion
    date under ``float_to = "contract_completion"``): late start and finish, total and
    free float (work days)."""
    from . import _kernels

    net, cals, settings = model.network, model.calendars, model.settings
    n, order = net.size, net.order
    every_calendar = np.arange(len(cals))

    def finish_index_on(day: int) -> np.ndarray:
        """Per calendar: index of the last work day on or before the day."""
        return cals.finish_index_days(every_calendar, np.full(every_calendar.size, day))

    end_day = completion_day if settings.float_to == "project_finish" else model.contract_completion_day
    late_start, late_finish, total_float, free_float = (np.empty(n, dtype=np.int64) for _ in range(4))
    late_start_t, late_finish_t = np.empty(n, dtype=np.int64), np.empty(n, dtype=np.int64)
    end_bound, completion_bound = finish_index_on(end_day), finish_index_on(completion_day)
    while True:
        code = _kernels.backward_pass(
            *net.passes.backward,
            order,
            settings.progress == "progress_override",
            settings.lag_calendar == "predecessor",
            st.status[order],
            st.point[order],
            model.calendar[order],
            bounds.late_upper_extra,
            bounds.pin_late,
            bounds.duration,
            fwd.early_finish_t,
            fwd.link_free_float_t,
            end_bound,
            completion_bound,
            cals.table(),
            late_start_t,
            late_finish_t,
            late_start,
            late_finish,
            total_float,
            free_float,
        )
        if code == _kernels.OK:
            break
        grow_within_bounds(model, cals, code == _kernels.TOO_EARLY)
    check_late_days(model, cals, late_start)
    return late_start, late_finish, total_float, free_float


def _completion_of(model: ScheduleModel, fwd: _Forward) -> int:
    """The completion day: the latest early finish (the data date of an empty network)."""
    return int(fwd.finish_day.max()) if model.network.size else model.data_day


def _schedule(model: ScheduleModel) -> ScheduleResult:
    """Both passes: the dates, floats and driving links of :meth:`ScheduleModel.run`."""
    st = _status(model)
    bounds = _bounds(model, st)
    fwd = _forward(model, st, bounds, with_floats=True)
    completion_day = _completion_of(model, fwd)
    late_start, late_finish, total_float, free_float = _backward(model, st, bounds, fwd, completion_day)
    return ScheduleResult(
        model=model,
        status=st.status,
        point=st.point,
        duration=bounds.duration,
        early_start_read=fwd.start_read,
        remaining_start=fwd.remaining_start,
        early_finish=fwd.early_finish,
        late_start=late_start,
        late_finish=late_finish,
        total_float=total_float,
        free_float=free_float,
        stream_float=fwd.relative_float,
        completion_day=completion_day,
        finish_day=fwd.finish_day,
    )


def _forward_completion(model: ScheduleModel) -> int:
    """The completion day from the forward pass alone (no floats)."""
    st = _status(model)
    return _completion_of(model, _forward(model, st, _bounds(model, st), with_floats=False))


class _ForwardState(NamedTuple):
    """What a forward pass alone leaves of a model, kept so that a variant of it
    (:meth:`ScheduleModel.what_if`) is brought up to date instead of scheduled again."""

    st: _Status
    bounds: _Bounds
    known_finish: np.ndarray
    by_position: tuple  # status, point and calendar by topological position
    dates: _Forward  # without floats


def _forward_state(model: ScheduleModel) -> _ForwardState:
    """The forward state of ``model``, computed once: brought up to date from the model
    it was made from when only some activities' inputs changed (:func:`_updated_state`),
    else by a whole forward pass. Each model of a chain of what-ifs keeps its own state
    and lets go of the model it came from."""
    chain = []
    while "_forward_state" not in model.__dict__:
        chain.append(model)
        parent = model.__dict__.get("_parent")
        if parent is None:
            break
        model = parent
    for variant in reversed(chain):
        parent = variant.__dict__.pop("_parent", None)
        changed = variant.__dict__.pop("_changed", None)
        if parent is not None:
            state = _updated_state(variant, parent.__dict__["_forward_state"], changed)
        else:
            state = _whole_state(variant)
        variant.__dict__["_forward_state"] = state
    return chain[0].__dict__["_forward_state"] if chain else model.__dict__["_forward_state"]


def _whole_state(model: ScheduleModel) -> _ForwardState:
    st = _status(model)
    bounds = _bounds(model, st)
    known_finish, by_position = _known_finish(model, st), _by_position(model, st)
    fwd = _forward(model, st, bounds, False, known_finish, by_position)
    return _ForwardState(st, bounds, known_finish, by_position, fwd)


class _Rows:
    """Some activities of a model, with the attributes :func:`_status` and
    :func:`_bounds` read, so that they compute those activities alone."""

    def __init__(self, model: ScheduleModel, rows: np.ndarray):
        for name in ACTIVITY_ARRAYS:
            setattr(self, name, getattr(model, name)[rows])
        self.calendars = model.calendars
        self.data_day = model.data_day
        self.network = _RowsNetwork(rows.size, model.network.has_predecessor[rows])


class _RowsNetwork(NamedTuple):
    size: int
    has_predecessor: np.ndarray


def _put(values: np.ndarray, rows: np.ndarray, new: np.ndarray) -> np.ndarray:
    """``values`` with ``new`` at ``rows``: a copy, or ``values`` itself when they are there
    already (the arrays of a forward state are never written once made)."""
    if values[rows].tolist() == new.tolist():  # a few rows: compared as lists, cheaper than in numpy
        return values
    values = values.copy()
    values[rows] = new
    return values


def _extended_state(base: _ForwardState, model: ScheduleModel) -> _ForwardState:
    """``base`` for the network it was computed on extended by activities (numbered after
    the others) and links, ``model``'s: the new activities get placeholders, to be
    computed, and the arrays by topological position are laid out in the extended
    network's order."""
    added = model.network.size - base.st.status.size

    def longer(values: np.ndarray) -> np.ndarray:
        return np.concatenate([values, np.zeros(added, dtype=values.dtype)])

    st = _Status(*(longer(a) for a in base.st))
    bounds = _Bounds(*(longer(a) for a in base.bounds))
    dates = base.dates
    dates = dates._replace(
        start_read=longer(dates.start_read),
        early_finish=longer(dates.early_finish),
        remaining_start=longer(dates.remaining_start),
        finish_day=longer(dates.finish_day),
    )
    order = model.network.order
    dates = dates._replace(early_finish_t=dates.early_finish[order], start_read_t=dates.start_read[order])
    return _ForwardState(st, bounds, longer(base.known_finish), _by_position(model, st), dates)


def _updated_state(model: ScheduleModel, base: _ForwardState, changed: np.ndarray) -> _ForwardState:
    """The forward state of a what-if whose network, settings and data date are those of
    the model with state ``base``, and whose activity arrays differ at ``changed`` at
    most: status and bounds are computed for those activities alone, and the forward pass
    visits them and what lies downstream of a date that moves (the kernel
    :func:`delay._kernels.forward_pass` given the changed positions). The dates equal a whole forward pass's."""
    from . import _kernels

    rows = np.asarray(sorted(set(np.asarray(changed).tolist())), dtype=np.int64)
    if not rows.size:
        return base
    net = model.network
    if base.st.status.size != net.size:
        base = _extended_state(base, model)
    part = _Rows(model, rows)
    st_rows = _status(part)
    st = _Status(*(_put(a, rows, b) for a, b in zip(base.st, st_rows)))
    bounds = _Bounds(*(_put(a, rows, b) for a, b in zip(base.bounds, _bounds(part, st_rows))))
    known_finish = _put(base.known_finish, rows, _known_finish(part, st_rows))
    positions = net.rank[rows]
    by_position = tuple(
        _put(a, positions, b) for a, b in zip(base.by_position, (st_rows.status, st_rows.point, part.calendar))
    )
    touched = np.empty(net.size + 1, dtype=np.int64)
    while True:  # from the parent's dates, again after the tables grow
        dates = base.dates._replace(
            **{name: getattr(base.dates, name).copy() for name in _UPDATED},
            relative_float=_EVERY,
            link_free_float_t=_EVERY,
        )
        code = _forward_pass(model, by_position, bounds, known_finish, dates, False, positions, touched)
        if code == _kernels.OK:
            break
        grow_within_bounds(model, model.calendars, code == _kernels.TOO_EARLY)
    check_finish_days(model, dates.finish_day[touched[1 : 1 + touched[0]]])  # only these moved
    return _ForwardState(st, bounds, known_finish, by_position, dates)


@dataclass(frozen=True, eq=False)
class ScheduleResult:
    """Dates and floats of one scheduled snapshot.

    Made by :meth:`ScheduleModel.run`. The arrays are in the network's activity order;
    boundaries are work-day boundaries on each activity's own calendar, per the module
    docstring. Most users want :attr:`activities`, :attr:`links`, :attr:`completion`,
    :meth:`driving_path` and :meth:`longest_path`.

    Parameters
    ----------
    model : ScheduleModel
        The model scheduled.
    status : numpy.ndarray
        Status codes (int8): :data:`NOT_STARTED`, :data:`IN_PROGRESS`, :data:`COMPLETE`.
    point : numpy.ndarray
        How each activity was scheduled (int8): a task, or a start or finish milestone (a
        task of zero duration becomes a finish milestone when it has predecessors, a start
        milestone otherwise).
    duration : numpy.ndarray
        The duration scheduled in work days (remaining work for one in progress).
    early_start_read : numpy.ndarray
        The boundary the activity's start is read at on the forward pass.
    remaining_start : numpy.ndarray
        Early boundary of the start of the remaining work.
    early_finish : numpy.ndarray
        Early finish boundary.
    late_start : numpy.ndarray
        Late start boundary.
    late_finish : numpy.ndarray
        Late finish boundary.
    total_float : numpy.ndarray
        Total float in work days of the activity's calendar.
    free_float : numpy.ndarray
        Free float in work days of the activity's calendar.
    stream_float : numpy.ndarray
        Relative float of each link in the passes' link order (see
        :attr:`relative_float` for link order).
    completion_day : int, default 0
        The completion as a day number: the latest finish date of any activity.
    finish_day : numpy.ndarray, optional
        Every activity's finish day number.
    near_critical_days : int, default NEAR_CRITICAL_DAYS
        Total float (work days) at or below which an incomplete activity that is not
        critical is near-critical.
    """

    model: ScheduleModel = field(repr=False)
    status: np.ndarray = field(repr=False)
    point: np.ndarray = field(repr=False)
    duration: np.ndarray = field(repr=False)
    early_start_read: np.ndarray = field(repr=False)
    remaining_start: np.ndarray = field(repr=False)
    early_finish: np.ndarray = field(repr=False)
    late_start: np.ndarray = field(repr=False)
    late_finish: np.ndarray = field(repr=False)
    total_float: np.ndarray = field(repr=False)
    free_float: np.ndarray = field(repr=False)
    stream_float: np.ndarray = field(repr=False)  # relative float by the passes' link order
    completion_day: int = 0
    finish_day: np.ndarray = field(default=None, repr=False)
    near_critical_days: int = NEAR_CRITICAL_DAYS

    # -- headline --------------------------------------------------------------------------
    @property
    def completion(self) -> dt.date:
        """The latest early finish date over all activities."""
        return day_to_date(self.completion_day)

    @property
    def data_date(self) -> dt.date:
        """The snapshot's data date."""
        return day_to_date(self.model.data_day)

    @property
    def settings(self) -> ScheduleSettings:
        """The scheduling settings the snapshot was scheduled with."""
        return self.model.settings

    @property
    def snapshot(self) -> str:
        """The snapshot's label."""
        return self.model.label

    @property
    def ids(self) -> np.ndarray:
        """The activity ids, network order (``object`` array)."""
        return self.model.network.ids

    @cached_property
    def relative_float(self) -> np.ndarray:
        """Relative float of each link (link order), in work days of the successor's
        calendar; ``2**40`` for a link the passes ignore (into a complete activity, or into
        one in progress when progress overrides logic)."""
        layout = self.model.network.passes
        found = np.empty(self.stream_float.size, dtype=np.int64)
        found[layout.f_link] = self.stream_float
        return found

    @cached_property
    def driving_link(self) -> np.ndarray:
        """Whether each link drives its successor (relative float 0)."""
        return self.relative_float == 0  # an ignored link's relative float is 2**40

    @cached_property
    def critical(self) -> np.ndarray:
        """Incomplete activities with total float <= 0."""
        return (self.status != COMPLETE) & (self.total_float <= 0)

    # -- dates ------------------------------------------------------------------------------
    @cached_property
    def _days(self) -> dict[str, np.ndarray]:
        model = self.model
        cals = model.calendars
        cal = model.calendar
        start_ms = self.point == START_MILESTONE
        finish_ms = self.point == FINISH_MILESTONE
        complete = self.status == COMPLETE
        in_progress = self.status == IN_PROGRESS

        def start_days(start, finish):
            day_start = cals.day_of(cal, start)
            day_finish_ms = cals.day_of(cal, finish - 1)
            return np.where(finish_ms, day_finish_ms, day_start)

        def finish_days(start, finish):
            return np.where(start_ms, cals.day_of(cal, start), cals.day_of(cal, finish - 1))

        early_start = start_days(self.remaining_start, self.early_finish)
        early_finish = finish_days(self.remaining_start, self.early_finish)
        late_start = start_days(self.late_start, self.late_finish)
        late_finish = finish_days(self.late_start, self.late_finish)
        actual_start = model.actual_start
        actual_finish = model.actual_finish
        early_start = np.where(in_progress, actual_start, early_start)
        late_start = np.where(in_progress, actual_start, late_start)
        one_date = np.where(actual_finish != NO_DAY, actual_finish, actual_start)
        milestone_done = complete & (start_ms | finish_ms | (model.kind != TASK))
        early_start = np.where(complete, np.where(milestone_done, one_date, actual_start), early_start)
        early_finish = np.where(complete, np.where(milestone_done, one_date, actual_finish), early_finish)
        late_start = np.where(complete, NO_DAY, late_start)
        late_finish = np.where(complete, NO_DAY, late_finish)
        return {
            "early_start": early_start,
            "early_finish": early_finish,
            "late_start": late_start,
            "late_finish": late_finish,
        }

    def day_array(self, name: str) -> np.ndarray:
        """Give the day numbers of one date column.

        Parameters
        ----------
        name : str
            ``"early_start"``, ``"early_finish"``, ``"late_start"`` or ``"late_finish"``.

        Returns
        -------
        numpy.ndarray
            Day numbers (days since 1970-01-01), network order; :data:`NO_DAY` for none
            (the late dates of a complete activity).

        Raises
        ------
        KeyError
            For another name.

        Examples
        --------
        >>> result = schedule(demo)
        >>> int(result.day_array("early_finish").max()) == result.completion_day
        True
        """
        return self._days[name]

    @cached_property
    def activities(self) -> pd.DataFrame:
        """One row per activity, network order.

        Columns: ``id, name, calendar, status, duration, early_start, early_finish,
        late_start, late_finish, total_float, free_float, critical, near_critical,
        driving``. Dates are ``datetime64``; floats are nullable integers (``<NA>`` for a
        complete activity); ``duration`` is the duration scheduled (remaining work for an
        activity in progress).
        """
        complete = self.status == COMPLETE
        on_path = np.zeros(self.ids.size, dtype=bool)
        on_path[self._driving_numbers] = True
        frame = pd.DataFrame(
            {
                "id": self.ids,
                "name": self.model.names,
                "calendar": np.asarray(self.model.calendars.names, dtype=object)[self.model.calendar],
                "status": STATUS_NAMES[self.status],
                "duration": self.duration,
            }
        )
        for name, days in self._days.items():
            frame[name] = table_dates(days)
        frame["total_float"] = pd.array(np.where(complete, 0, self.total_float), dtype="Int64")
        frame.loc[complete, "total_float"] = pd.NA
        frame["free_float"] = pd.array(np.where(complete, 0, self.free_float), dtype="Int64")
        frame.loc[complete, "free_float"] = pd.NA
        frame["critical"] = self.critical
        frame["near_critical"] = (~complete) & ~self.critical & (self.total_float <= self.near_critical_days)
        frame["driving"] = on_path
        return frame

    @cached_property
    def links(self) -> pd.DataFrame:
        """One row per link: ``pred, succ, type, lag, relative_float, driving`` (relative
        float in work days of the successor's calendar; ``<NA>`` for an ignored link)."""
        net = self.model.network
        ignored = self.relative_float >= _FAR
        relative = pd.array(np.where(ignored, 0, self.relative_float), dtype="Int64")
        relative[ignored] = pd.NA
        return pd.DataFrame(
            {
                "pred": net.ids[net.pred],
                "succ": net.ids[net.succ],
                "type": np.asarray(["FS", "SS", "FF", "SF"], dtype=object)[net.link_type],
                "lag": net.lag,
                "relative_float": relative,
                "driving": self.driving_link,
            }
        )

    @cached_property
    def link_gaps(self) -> np.ndarray:
        """Per link, how far the successor's point lies after the bound the link sets, in
        work days of the successor's calendar, on the dates as recorded: actual dates where
        there are some, early dates elsewhere. Unlike the relative float, every link counts
        (links into complete activities too); a negative gap is progress out of sequence.
        """
        from . import _kernels

        model = self.model
        net = model.network
        cals = model.calendars
        order = net.order
        layout = net.passes
        gaps = np.empty(net.link_count, dtype=np.int64)
        while True:
            code = _kernels.link_gaps(
                *layout.forward,
                layout.f_link,
                self.settings.lag_calendar == "predecessor",
                self.point[order],
                self.early_start_read[order],
                self.early_finish[order],
                model.calendar[order],
                cals.table(),
                gaps,
            )
            if code == _kernels.OK:
                return gaps
            cals.grow(earlier=code == _kernels.TOO_EARLY)

    # -- paths --------------------------------------------------------------------------------
    @cached_property
    def _traceable_links(self) -> np.ndarray:
        """Driving links a path from the data date can run through: the predecessor is not
        complete, and the link does not read the actual (past) start of one in progress."""
        net = self.model.network
        reads_start = (net.link_type == 1) | (net.link_type == 3)
        status = self.status[net.pred]
        return self.driving_link & (status == NOT_STARTED) | self.driving_link & (status == IN_PROGRESS) & ~reads_start

    @cached_property
    def _driving_numbers(self) -> np.ndarray:
        net = self.model.network
        incomplete = self.status != COMPLETE
        seeds = np.flatnonzero(incomplete & (self.finish_day == self.completion_day))
        on = np.zeros(net.size, dtype=bool)
        on[net.rank[seeds]] = True
        from ._kernels import mark_upstream

        layout = net.passes
        mark_upstream(
            layout.f_ptr,
            layout.f_pred,
            layout.f_type,
            layout.f_link,
            on,
            True,
            self.status[net.order],
            self.stream_float,
            on,
        )
        return net.order[np.flatnonzero(on)]  # by position: in logic order

    def driving_path(self) -> list[str]:
        """List every activity on a chain of driving links from the data date to the completion.

        A link drives when its relative float is 0. Where several chains drive at once,
        all are listed.

        Returns
        -------
        list of str
            Activity ids in logic (topological) order.

        Examples
        --------
        >>> schedule(demo).driving_path()[:3]
        ['MS-START', 'SET-HOARDING', 'SUB-CLEARANCE']
        """
        return [str(i) for i in self.ids[self._driving_numbers]]

    def longest_path(self) -> list[str]:
        """One chain of driving links from the data date to the completion.

        Walking back from the activity that finishes at completion (the first in input order
        where several do), each step takes the driving predecessor by least relative float,
        then an FS link, then input order.

        Returns
        -------
        list of str
            Activity ids from the start of the chain to the activity finishing at
            completion; empty when every activity is complete.

        Examples
        --------
        >>> path = schedule(demo).longest_path()
        >>> path[0], path[-1]
        ('MS-START', 'MS-COMPLETION')
        """
        net = self.model.network
        incomplete = self.status != COMPLETE
        seeds = np.flatnonzero(incomplete & (self.finish_day == self.completion_day))
        if not seeds.size:
            return []
        order = self.model.link_order if self.model.link_order is not None else np.arange(net.link_count)
        candidates = np.flatnonzero(self._traceable_links)
        by_succ: dict[int, list[int]] = {}
        for link in candidates[np.lexsort((order[candidates], net.link_type[candidates] != 0))]:
            by_succ.setdefault(int(net.succ[link]), []).append(int(link))
        chain = [int(seeds[np.argmax(net.rank[seeds])])]
        seen = {chain[0]}
        while True:
            options = by_succ.get(chain[-1], [])
            if not options:
                break
            nxt = int(net.pred[options[0]])
            if nxt in seen:
                break
            chain.append(nxt)
            seen.add(nxt)
        return [str(self.ids[i]) for i in reversed(chain)]

    def _json_cells(self, text: bool) -> dict[str, object]:
        """The columns of the JSON form, whole: as JSON text (``text``) or as values."""
        complete = self.status == COMPLETE
        days = self._days
        names = ("early_start", "early_finish", "late_start", "late_finish")
        if text:
            cells: dict[str, object] = {"activity": json_text_cells(self.ids.tolist())}
            cells.update((name, json_date_cells(days[name])) for name in names)
            cells["total_float"] = json_int_cells(self.total_float, complete)
            cells["free_float"] = json_int_cells(self.free_float, complete)
            cells["critical"] = json_bool_cells(self.critical)
            return cells
        cells = {"activity": self.ids.tolist()}
        cells.update((name, iso_dates(days[name]).tolist()) for name in names)
        for name, values in (("total_float", self.total_float), ("free_float", self.free_float)):
            column = np.asarray(values, dtype=object)
            column[complete] = None
            cells[name] = column.tolist()
        cells["critical"] = self.critical.tolist()
        return cells

    def _json_head(self) -> dict:
        return {
            "snapshot": self.model.folder,
            "label": self.snapshot,
            "data_date": self.data_date.isoformat(),
            "completion": self.completion.isoformat(),
        }

    def to_json(self) -> dict:
        """Give the JSON form of the ``delay schedule`` command.

        Returns
        -------
        dict
            ``snapshot`` (the folder), ``label``, ``data_date``, ``completion`` and
            ``activities``: per activity (network order) its id (``activity``), early and
            late start and finish (ISO dates; ``None`` where there is none),
            ``total_float`` and ``free_float`` (work days; ``None`` for a complete
            activity) and ``critical``.

        Examples
        --------
        >>> form = schedule(demo).to_json()
        >>> form["completion"], form["activities"][0]["activity"]
        ('2026-05-19', 'MS-START')
        """
        cells = self._json_cells(text=False)
        keys = list(cells)
        rows = [dict(zip(keys, values)) for values in zip(*cells.values())]
        return {**self._json_head(), "activities": rows}

    def to_json_text(self, indent: int = 2) -> str:
        """Write :meth:`to_json` as JSON text, made from whole columns.

        The same text to the byte as ``json.dumps(self.to_json(), indent=indent)``, made
        from whole columns (each distinct date formatted once) instead of per-activity
        objects: what ``delay schedule --format json`` prints.

        Parameters
        ----------
        indent : int
            Spaces per level.

        Returns
        -------
        str
            The JSON text.

        Examples
        --------
        >>> result = schedule(demo)
        >>> result.to_json_text() == json.dumps(result.to_json(), indent=2)
        True
        """
        head = json.dumps(self._json_head(), indent=indent)
        rows = json_rows_text(self._json_cells(text=True), indent=indent, level=1)
        return head[:-2] + ",\n" + " " * indent + '"activities": ' + rows + "\n}"


# -- from the case ----------------------------------------------------------------------------
def prepare(
    case: Case,
    snapshot: str | Snapshot = "baseline",
    settings: ScheduleSettings | None = None,
    calendars: CalendarSet | None = None,
) -> ScheduleModel:
    """Compile one snapshot of a case for scheduling.

    The snapshot's arrays are compiled once and kept with it (``Snapshot.derived``,
    read-only), so preparing the same snapshot again costs almost nothing.

    Parameters
    ----------
    case : Case
        The loaded case.
    snapshot : str or Snapshot, default "baseline"
        A folder name or label (``"asbuilt"`` for the as-built snapshot), or a Snapshot.
    settings : ScheduleSettings, optional
        Scheduling settings overriding the case's (``dataclasses.replace`` them).
    calendars : CalendarSet, optional
        A calendar set to share between snapshots of the same case; by default the case's
        own (:func:`calendars_of`).

    Returns
    -------
    ScheduleModel
        The snapshot compiled, not yet scheduled.

    Raises
    ------
    CaseError
        For an unknown snapshot, an unknown calendar or a logic loop.

    Examples
    --------
    >>> model = prepare(demo, "Update 01")
    >>> model.folder, model.label
    ('2025-03-31', 'Update 01')
    """
    snap = snapshot if isinstance(snapshot, Snapshot) else _find(case, snapshot)
    settings = settings or case.settings.schedule
    calendars = calendars or calendars_of(case)
    arrays = snap.derived.get("schedule_arrays")
    if arrays is None or arrays["calendar_names"] != calendars.names:
        arrays = snap.derived["schedule_arrays"] = _compile_snapshot(snap, calendars)
    return ScheduleModel(
        network=arrays["network"],
        calendars=calendars,
        names=arrays["names"],
        calendar=arrays["calendar"],
        duration=arrays["duration"],
        remaining=arrays["remaining"],
        actual_start=arrays["actual_start"],
        actual_finish=arrays["actual_finish"],
        kind=arrays["kind"],
        constraint=arrays["constraint"],
        constraint_day=arrays["constraint_day"],
        start_bound=np.full(arrays["network"].size, NO_DAY, dtype=np.int64),
        data_day=int(to_days(np.datetime64(snap.data_date, "D"))),
        contract_completion_day=int(to_days(np.datetime64(case.settings.project.contract_completion, "D"))),
        settings=settings,
        label=snap.label,
        folder=snap.folder,
        link_order=arrays["link_order"],
    )


def _compile_snapshot(snap: Snapshot, calendars: CalendarSet) -> dict:
    """The engine's arrays of one snapshot: computed once, kept in ``snap.derived``.

    The arrays are made read-only, so that no variant (``what_if`` copies what it changes)
    can alter them for the next use.
    """
    activities = snap.activities_table
    links = snap.links_table
    given = snap.derived  # codes the case loader found while checking the tables, if any
    source = f"snapshots/{snap.folder}/links.csv" if snap.kind != "asbuilt" else "asbuilt.csv"
    network = given.get("network")  # compiled by the loader's loop check
    if network is None:
        network = compile_network(
            activities, links, source=source, link_numbers=snap.link_numbers, type_codes=given.get("type_codes")
        )
    names, cal = given.get("calendar_codes", (None, None))
    if names == calendars.names:
        cal = np.asarray(cal, dtype=np.int64)
    else:
        cal = pd.Index(calendars.names).get_indexer(activities["calendar"]).astype(np.int64)
    if (cal < 0).any():
        row = int(np.flatnonzero(cal < 0)[0])
        raise CaseError(
            Problem(
                file=f"snapshots/{snap.folder}/activities.csv",
                row=row + 2,
                column="calendar",
                message=f"unknown calendar '{activities['calendar'].iloc[row]}'",
                fix="define it in calendars.csv",
            )
        )
    if "kind_codes" in given:
        kind = _KIND_BY_POSITION[np.maximum(given["kind_codes"], 0)]
    else:
        kind = np.maximum(pd.Index(list(KIND_CODES)).get_indexer(activities["kind"]), 0).astype(np.int8)
    if "constraint_codes" in given:
        constraint = _CONSTRAINT_BY_POSITION[given["constraint_codes"] + 1]
    else:
        constraint = np.maximum(
            pd.Index(list(CONSTRAINT_CODES)).get_indexer(activities["constraint"].fillna("")), 0
        ).astype(np.int8)
    arrays = {
        "network": network,
        "calendar_names": calendars.names,
        "names": activities["name"].to_numpy(dtype=object),
        "calendar": cal,
        "duration": activities["duration"].to_numpy(dtype=np.int64),
        "remaining": activities["remaining"].to_numpy(dtype=np.float64),
        "actual_start": _days_or_none(activities["actual_start"]),
        "actual_finish": _days_or_none(activities["actual_finish"]),
        "kind": kind,
        "constraint": constraint,
        "constraint_day": _days_or_none(activities["constraint_date"]),
        "link_order": np.arange(len(links)),
    }
    for value in arrays.values():
        if isinstance(value, np.ndarray):
            value.flags.writeable = False
    return arrays


_CALENDARS: weakref.WeakKeyDictionary[Case, CalendarSet] = weakref.WeakKeyDictionary()


def calendars_of(case: Case) -> CalendarSet:
    """Give the case's calendars as one :class:`CalendarSet`, built once per loaded case.

    Parameters
    ----------
    case : Case
        The loaded case.

    Returns
    -------
    CalendarSet
        The same set on every call for the same case (kept while the case lives).

    Examples
    --------
    >>> calendars_of(demo) is calendars_of(demo)
    True
    """
    found = _CALENDARS.get(case)
    if found is None:
        found = _CALENDARS[case] = CalendarSet(build_calendars(case))
    return found


def _find(case: Case, name: str) -> Snapshot:
    try:
        return case.snapshot(name)
    except KeyError as error:
        raise CaseError(
            Problem(
                file="snapshots/",
                message=str(error.args[0]),
                fix="name a folder under snapshots/ or a snapshot's label",
            )
        ) from None


def schedule(
    case: Case, snapshot: str | Snapshot = "baseline", settings: ScheduleSettings | None = None
) -> ScheduleResult:
    """Schedule one snapshot of a case by the critical path method.

    Parameters
    ----------
    case : Case
        A loaded :class:`delay.model.Case`.
    snapshot : str or Snapshot, default "baseline"
        Folder name under ``snapshots/`` or label; ``"asbuilt"`` for the as-built record.
    settings : ScheduleSettings, optional
        A :class:`delay.model.ScheduleSettings` overriding the case's, for example
        ``dataclasses.replace(case.settings.schedule, progress="progress_override")``.

    Returns
    -------
    ScheduleResult
        ``.activities`` (DataFrame of dates and floats), ``.completion``, ``.data_date``,
        ``.settings``, ``.driving_path()``, ``.longest_path()``.

    Raises
    ------
    CaseError
        Unknown snapshot, unknown calendar, logic loop.
    DateBoundError
        When a computed date would fall outside 1900-01-01 .. 2200-12-31.

    References
    ----------
    Kelley and Walker (1959); Fondahl (1961); the scheduling rules of the case format
    (shared/case-format.md, "Scheduling rules").

    Examples
    --------
    >>> result = schedule(demo, "baseline")
    >>> result.completion
    datetime.date(2026, 5, 19)
    >>> result.activities.loc[0, ["id", "early_start", "total_float", "critical"]].astype(str).tolist()
    ['MS-START', '2025-03-03 00:00:00', '0', 'True']
    """
    return prepare(case, snapshot, settings).run()
