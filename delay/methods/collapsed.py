"""Collapsed as-built (but-for) analysis.

The method builds a model of the works as they were built, checks that it reproduces the
actual dates, then takes out the delay of one party's events (or of one event) and
reschedules: "but for the employer's events the works would have finished on ...".

The as-built model
------------------
- Activities are those of the as-built record (the last update with the record's actual
  dates) with their *actual* durations: the work days of the activity's calendar from
  its actual start to its actual finish, both included (a milestone has none). Nothing
  carries an actual date: the model is scheduled afresh from a data date equal to the
  project's actual start (the earliest actual start of any activity). The programme's
  constraints are not applied: the actual dates already show their effect.
- The logic is the as-built logic, the links of the last update (after the analyst's
  disclosed corrections), with their lags.
- The *gap* of a link is how far its successor's actual start (or finish, for FF and SF
  links) lies after the date the link allows on its predecessor's actual dates, in work
  days of the successor's calendar. An activity's *driving links* are the links into it
  with the least gap; that gap is kept as extra lag on each of them, so the successor
  starts on its actual date and, like the as-built record, not earlier. Links with a
  larger gap keep their lag: they did not hold the activity back.
- An activity with no predecessor in the as-built logic that started after the project's
  actual start is held to its actual start by a *start-no-earlier bound* (there is no link
  to carry a lag); the bound counts as its gap.
- An activity that started earlier than its logic allows (a negative least gap: progress
  out of sequence) keeps the as-built logic unchanged, so the model starts it later than it
  actually started; it and whatever that pushes are listed as *mismatches*, each with its
  reason. So is an activity whose actual dates are not work days of its calendar. The
  model *reproduces* the as-built record when there is no mismatch.

Taking out the delay of an event
--------------------------------
- ``extend``: each named activity's actual duration is shortened by the event's days (not
  below zero).
- ``hold``: a hold stops work on the activity from the event's start to its finish, both
  included. The work days of that period that fall within the activity's actual dates (a
  suspension of work in progress) come off its actual duration; those that fall in its gap
  (the work days before its actual start that its driving links kept as lag, or its
  start-no-earlier bound kept) come off the gap. Days of the gap after the event's finish
  (remobilisation, say) or before its start are not the hold's and stay. Several holds on
  one activity take out the work days they cover together, each day once. (Where a driving
  link crosses calendars and its lag counts in the predecessor's work days, that many of
  those days come off it.)
- The activities an event shows in are its ``asbuilt_activities`` when the register gives
  them (case format v2: for example a fragnet that the as-built record shows as one
  recorded activity of its own), else its ``activities`` (for a fragnet, its fragnet's
  activities).
- ``fragnet``: the activities it shows in that are in the as-built record are removed:
  their duration becomes zero, the links into them (and between them) lose their lags,
  including any gap kept on them, and the links from them to the programme's activities
  lose their own lags; the gap a successor kept after the fragnet stays with the
  successor (it is the successor's wait, which another event may explain). A fragnet none
  of whose activities are in the as-built record cannot be collapsed: it is reported, with
  no figure (it is not scored zero).
- Everything else is unchanged, and the model is scheduled again. The figure for a set of
  events is ``days_earlier``: the modelled as-built completion less the but-for completion,
  in calendar days (with the same difference in work days of the default calendar beside
  it). Where the model reproduces the as-built record its completion is the actual
  completion.

Figures are given for each party (all its events taken out together), for all events
together (``party = "all"``), and for each event alone, measured at the project's completion
activity.
**But-for figures need not add up**: where two delays run on parallel paths, taking out
either alone may move completion little or not at all, while taking out both moves it a
lot; and float on another path can absorb part of any of them. A party's but-for figure is therefore not the sum of its
events' figures, nor are the parties' figures a split of the total.

References
----------
AACE International Recommended Practice 29R-03, Forensic Schedule Analysis (2011), MIP 3.8
(modelled / subtractive / single simulation: the collapsed as-built). Society of
Construction Law Delay and Disruption Protocol, 2nd edition (2017), Part B, collapsed
as-built analysis (the "but-for" method).

Assumptions
-----------
- The as-built record is complete and accurate (after disclosed corrections).
- The as-built logic (the last update's links) is how the work was actually sequenced;
  a missing or wrong link shows as a mismatch and should be corrected in corrections.csv.
- The gaps are delay: time an activity waited after its driving predecessors allowed it
  to start. A gap stays in every but-for run unless an event explains it.
- An activity's actual duration, less the days an event added, is the duration it would
  have had but for the event; the event register's days and dates are right.
- Taking out an event's delay does not change how the rest of the works were resourced
  or sequenced (the method cannot see acceleration or pacing).
"""

from __future__ import annotations

import dataclasses
import datetime as dt
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from ..convert import NO_DAY, day_to_date, iso_date, json_int, table_dates
from ..cpm import FINISH_MILESTONE, ScheduleResult, calendars_of, prepare
from ..errors import CaseError, Problem
from ..events import asbuilt_activities, completion_activity
from ..memo import remembered
from ..model import PARTIES, Case

__all__ = ["analyse", "CollapsedResult", "BUT_FOR_NOTE", "ALL_PARTIES"]

#: The ``party`` of the row of :attr:`CollapsedResult.by_party` that takes out every event.
ALL_PARTIES = "all"

#: Stated with every result: but-for figures are not a split of the delay.
BUT_FOR_NOTE = (
    "But-for figures need not add up: each is the completion with only that party's (or that "
    "event's) delay taken out, so delays concurrent on parallel paths, or absorbed by float on "
    "another path, make the figures of the parts differ from the figure of the whole."
)

MISMATCH_COLUMNS = ["activity", "actual_start", "actual_finish", "modelled_start", "modelled_finish", "reason"]
PARTY_COLUMNS = ["party", "but_for_completion", "days_earlier", "work_days_earlier", "events", "not_scored"]
EVENT_COLUMNS = [
    "event",
    "title",
    "party",
    "impact",
    "but_for_completion",
    "days_earlier",
    "work_days_earlier",
    "found_in_as_built",
    "removed",
    "note",
]
ACTIVITY_COLUMNS = [
    "activity",
    "name",
    "calendar",
    "actual_start",
    "actual_finish",
    "actual_duration",
    "held_by",
    "gap_work_days",
    "start_no_earlier",
    "modelled_start",
    "modelled_finish",
]
LINK_COLUMNS = ["pred", "succ", "type", "lag", "gap_work_days", "driving", "model_lag"]
_TYPE_NAMES = np.array(["FS", "SS", "FF", "SF"], dtype=object)


@dataclass(frozen=True)
class CollapsedResult:
    """The collapsed as-built model, its check against the actual dates, the but-for completions.

    Made by :func:`analyse`. Days are calendar days (``work_days_earlier``: work days of the
    default calendar); positive ``days_earlier`` means the works would have finished earlier.

    Parameters
    ----------
    reproduced : bool
        The model places every activity on its actual dates.
    mismatches : pandas.DataFrame
        The activities it does not, with the reason (columns ``MISMATCH_COLUMNS``).
    actual_completion : datetime.date
        The completion activity's actual finish in the as-built record.
    modelled_completion : datetime.date
        The as-built model's completion (the actual completion when it reproduces); every
        ``days_earlier`` is measured from it.
    by_party : pandas.DataFrame
        One row per party with events in the register (employer, contractor, neutral, in
        that order) and a last row ``"all"``: ``but_for_completion``, ``days_earlier``,
        ``work_days_earlier``, ``events`` (taken out), ``not_scored`` (events of the party
        that could not be taken out). ``NaT``/``<NA>`` when none could be.
    by_event : pandas.DataFrame
        One row per event of the register, in register order: ``but_for_completion``,
        ``days_earlier`` (``<NA>`` when not scored), ``found_in_as_built``, ``removed``
        (what was taken out, in words) and ``note`` (why it was not scored, or a caveat).
    activities : pandas.DataFrame
        The model, per activity: actual dates and duration, what holds it to its actual
        start (``link``, ``start_no_earlier``, ``out_of_sequence`` or ``""``), its gap, its
        start-no-earlier date, and its modelled dates.
    links : pandas.DataFrame
        The as-built logic with each link's gap, whether it is driving and the lag the
        model gives it.
    notes : tuple of str, optional
        Statements that go with the figures (``BUT_FOR_NOTE`` first).
    """

    reproduced: bool
    mismatches: pd.DataFrame
    actual_completion: dt.date
    modelled_completion: dt.date
    by_party: pd.DataFrame
    by_event: pd.DataFrame
    activities: pd.DataFrame = field(repr=False)
    links: pd.DataFrame = field(repr=False)
    notes: tuple[str, ...] = ()

    def but_for(self, party: str) -> dt.date | None:
        """The but-for completion of one party (or ``"all"``).

        Parameters
        ----------
        party : str
            ``"employer"``, ``"contractor"``, ``"neutral"`` or ``"all"`` (:data:`ALL_PARTIES`).

        Returns
        -------
        datetime.date or None
            The completion with that party's events taken out; ``None`` when the party has
            no row or none of its events could be taken out.
        """
        rows = self.by_party[self.by_party["party"] == party]
        if not len(rows) or pd.isna(rows["but_for_completion"].iloc[0]):
            return None
        return pd.Timestamp(rows["but_for_completion"].iloc[0]).date()

    def to_json(self) -> dict:
        """The result as plain JSON values (dates as ISO text, ``None`` for no value).

        Returns
        -------
        dict
            ``method`` (``"collapsed"``), ``reproduced``, the completions, and the
            ``mismatches``, ``by_party`` and ``by_event`` rows and the ``notes``.
        """
        return {
            "method": "collapsed",
            "reproduced": bool(self.reproduced),
            "actual_completion": self.actual_completion.isoformat(),
            "modelled_completion": self.modelled_completion.isoformat(),
            "mismatches": [
                {
                    "activity": r.activity,
                    "actual_start": iso_date(r.actual_start),
                    "actual_finish": iso_date(r.actual_finish),
                    "modelled_start": iso_date(r.modelled_start),
                    "modelled_finish": iso_date(r.modelled_finish),
                    "reason": r.reason,
                }
                for r in self.mismatches.itertuples(index=False)
            ],
            "by_party": [
                {
                    "party": r.party,
                    "but_for_completion": iso_date(r.but_for_completion),
                    "days_earlier": json_int(r.days_earlier),
                    "work_days_earlier": json_int(r.work_days_earlier),
                    "events": list(r.events),
                    "not_scored": list(r.not_scored),
                }
                for r in self.by_party.itertuples(index=False)
            ],
            "by_event": [
                {
                    "event": r.event,
                    "title": r.title,
                    "party": r.party,
                    "impact": r.impact,
                    "but_for_completion": iso_date(r.but_for_completion),
                    "days_earlier": json_int(r.days_earlier),
                    "work_days_earlier": json_int(r.work_days_earlier),
                    "found_in_as_built": bool(r.found_in_as_built),
                    "removed": r.removed,
                    "note": r.note,
                }
                for r in self.by_event.itertuples(index=False)
            ],
            "notes": list(self.notes),
        }


# -- what one event takes out ---------------------------------------------------------------
@dataclass
class _Removal:
    """What taking out one or more events changes in the model (activity numbers)."""

    shorten: dict[int, int] = field(default_factory=dict)  # activity -> work days off its duration
    holds: dict[int, list[tuple[int, int]]] = field(default_factory=dict)  # activity -> gap days covered
    suspended: dict[int, list[tuple[int, int]]] = field(default_factory=dict)  # activity -> held work days
    fragnet: set[int] = field(default_factory=set)  # fragnet activities to remove

    def add(self, other: _Removal) -> None:
        for v, days in other.shorten.items():
            self.shorten[v] = self.shorten.get(v, 0) + days
        for v, spans in other.holds.items():
            self.holds.setdefault(v, []).extend(spans)
        for v, spans in other.suspended.items():
            self.suspended.setdefault(v, []).extend(spans)
        self.fragnet |= other.fragnet

    @property
    def empty(self) -> bool:
        return not (self.shorten or self.holds or self.suspended or self.fragnet)


def _covered(spans: list[tuple[int, int]]) -> int:
    """Work days covered by inclusive index ranges, each day once."""
    total, reach = 0, None
    for low, high in sorted(spans):
        if reach is not None and low <= reach:
            low = reach + 1
        if high >= low:
            total += high - low + 1
        reach = high if reach is None else max(reach, high)
    return total


class _AsBuiltModel:
    """The as-built model on arrays, and its but-for re-schedules."""

    def __init__(self, case: Case):
        snapshot = case.asbuilt_snapshot
        self.calendars = calendars = calendars_of(case)
        recorded = prepare(case, snapshot, calendars=calendars).run()
        self.recorded = recorded
        base = recorded.model
        net = base.network
        n, m = net.size, net.link_count
        self.network = net
        self.cal = base.calendar
        # Actual dates and boundaries (every activity of the as-built snapshot is complete).
        self.actual_start = recorded.day_array("early_start")
        self.actual_finish = recorded.day_array("early_finish")
        self.start_boundary = recorded.early_start_read.copy()
        self.actual_duration = recorded.duration.astype(np.int64).copy()
        project_start = int(self.actual_start.min())

        # Gaps on the actual dates, least gap per activity, driving links.
        gaps = recorded.link_gaps.astype(np.int64)
        self.gaps = gaps
        has_pred = np.bincount(net.succ, minlength=n) > 0
        least = np.full(n, np.iinfo(np.int64).max, dtype=np.int64)
        if m:
            np.minimum.at(least, net.succ, gaps)
        self.least_gap = np.where(has_pred, least, 0)
        self.has_pred = has_pred
        self.out_of_sequence = has_pred & (self.least_gap < 0)
        driving = (gaps == self.least_gap[net.succ]) & ~self.out_of_sequence[net.succ] if m else np.zeros(0, bool)
        self.driving = driving
        self.original_lag = net.lag.copy()
        lag = net.lag.copy()
        lag[driving] += gaps[driving]

        # Across calendars with lags counted in the predecessor's work days a gap (successor's
        # work days) is not a lag of the same size: correct the kept lag until the driving
        # links meet the actual dates, or give up and report the activity.
        self.unfitted = np.zeros(m, dtype=bool)
        cross = self.cal[net.pred] != self.cal[net.succ] if m else np.zeros(0, bool)
        if base.settings.lag_calendar == "predecessor" and (driving & cross).any():
            for _ in range(6):
                check = dataclasses.replace(base, network=net.with_lags(lag)).run()
                residual = check.link_gaps
                wrong = driving & (residual != 0)
                if not wrong.any():
                    break
                lag[wrong] += residual[wrong]
            else:
                check = dataclasses.replace(base, network=net.with_lags(lag)).run()
                self.unfitted = driving & (check.link_gaps != 0)
        self.fitted_lag = lag

        model = dataclasses.replace(
            base,
            network=net.with_lags(lag),
            duration=self.actual_duration,
            remaining=np.full(n, np.nan),
            actual_start=np.full(n, NO_DAY, dtype=np.int64),
            actual_finish=np.full(n, NO_DAY, dtype=np.int64),
            constraint=np.zeros(n, dtype=np.int8),
            constraint_day=np.full(n, NO_DAY, dtype=np.int64),
            start_bound=np.full(n, NO_DAY, dtype=np.int64),
            data_day=project_start,
            label="Collapsed as-built",
        )
        # Open starts that started after the project's actual start: a start-no-earlier
        # bound at the actual start (in boundaries, so that it is exact on any calendar).
        point = model.run().point
        self.finish_point = (point == FINISH_MILESTONE).astype(np.int64)  # it sits after its day
        self.open_start = ~has_pred
        data_boundary = calendars.start_index_days(self.cal, np.full(n, project_start, np.int64)) + self.finish_point
        self.bound_gap = np.where(self.open_start, np.maximum(self.start_boundary - data_boundary, 0), 0)
        bounded = np.flatnonzero(self.open_start & (self.bound_gap > 0))
        bound = np.full(n, NO_DAY, dtype=np.int64)
        if bounded.size:
            bound[bounded] = calendars.day_of(
                self.cal[bounded], self.start_boundary[bounded] - self.finish_point[bounded]
            )
        self.start_bound = bound
        self.model = dataclasses.replace(model, start_bound=bound)
        self.result = self.model.run()

    # -- gaps ---------------------------------------------------------------------------------
    def gap_of(self, v: int) -> int:
        """Work days of gap an event may explain before activity ``v``'s actual start."""
        if self.open_start[v]:
            return int(self.bound_gap[v])
        if self.out_of_sequence[v]:
            return 0
        return int(self.least_gap[v])

    def gap_days(self, v: int, start_day: int, finish_day: int) -> tuple[int, int] | None:
        """The work-day indices of ``v``'s gap between two dates (inclusive), or None."""
        gap = self.gap_of(v)
        if gap <= 0:
            return None
        cal = self.cal[v : v + 1]
        first = int(self.calendars.start_index_days(cal, np.array([start_day]))[0])
        last = int(self.calendars.finish_index_days(cal, np.array([finish_day]))[0])
        boundary = int(self.start_boundary[v])
        low, high = max(boundary - gap, first), min(boundary - 1, last)
        return (low, high) if low <= high else None

    def work_days_held(self, v: int, start_day: int, finish_day: int) -> tuple[int, int] | None:
        """The work-day indices of ``v``'s own work (actual start to actual finish) between
        two dates (inclusive), or None (a milestone has no work to hold)."""
        if self.actual_duration[v] <= 0:
            return None
        cal = self.cal[v : v + 1]
        first = int(self.calendars.start_index_days(cal, np.array([start_day]))[0])
        last = int(self.calendars.finish_index_days(cal, np.array([finish_day]))[0])
        low = max(int(self.calendars.start_index_days(cal, np.array([self.actual_start[v]]))[0]), first)
        high = min(int(self.calendars.finish_index_days(cal, np.array([self.actual_finish[v]]))[0]), last)
        return (low, high) if low <= high else None

    # -- but-for runs ---------------------------------------------------------------------------
    def run(self, removal: _Removal) -> ScheduleResult:
        net = self.network
        duration = self.actual_duration.copy()
        lag = self.fitted_lag.copy()
        bound = self.start_bound.copy()
        if removal.shorten:
            where = np.fromiter(removal.shorten.keys(), dtype=np.int64)
            days = np.fromiter(removal.shorten.values(), dtype=np.int64)
            duration[where] = np.maximum(duration[where] - days, 0)
        if removal.suspended:
            where = np.fromiter(removal.suspended.keys(), dtype=np.int64)
            days = np.asarray([_covered(spans) for spans in removal.suspended.values()], dtype=np.int64)
            duration[where] = np.maximum(duration[where] - days, 0)
        if removal.holds:
            where = np.fromiter(removal.holds.keys(), dtype=np.int64)
            days = np.asarray([_covered(spans) for spans in removal.holds.values()], dtype=np.int64)
            off = np.zeros(net.size, dtype=np.int64)
            off[where] = days
            lag -= np.where(self.driving, off[net.succ], 0)
            moved = where[self.open_start[where] & (bound[where] != NO_DAY)]
            if moved.size:
                bound[moved] = self.calendars.day_of(
                    self.cal[moved], self.start_boundary[moved] - off[moved] - self.finish_point[moved]
                )
        if removal.fragnet:
            removed = np.zeros(net.size, dtype=bool)
            removed[list(removal.fragnet)] = True
            duration[removed] = 0
            bound[removed] = NO_DAY
            into = removed[net.succ]
            out_of = removed[net.pred] & ~into
            lag[into] = 0
            lag[out_of] -= self.original_lag[out_of]
        model = dataclasses.replace(self.model, duration=duration, start_bound=bound, network=net.with_lags(lag))
        return model.run()


# -- helpers --------------------------------------------------------------------------------
def _plural(count: int, word: str) -> str:
    return f"{count} {word}{'' if count == 1 else 's'}"


def _link_words(net, link: int) -> str:
    kind = _TYPE_NAMES[int(net.link_type[link])]
    lag = int(net.lag[link])
    return f"{net.ids[net.pred[link]]}>{net.ids[net.succ[link]]} ({kind}{f'{lag:+d}' if lag else ''})"


def _mismatches(built: _AsBuiltModel) -> tuple[pd.DataFrame, np.ndarray]:
    net = built.network
    result = built.result
    cals = built.calendars
    cal = built.cal
    modelled_start = result.day_array("early_start")
    modelled_finish = result.day_array("early_finish")
    wrong = (modelled_start != built.actual_start) | (modelled_finish != built.actual_finish)
    milestone = (result.point != 0) | (built.model.kind != 0)
    start_off = cals.start_index_days(cal, built.actual_start) != cals.finish_index_days(cal, built.actual_start)
    finish_off = cals.start_index_days(cal, built.actual_finish) != cals.finish_index_days(cal, built.actual_finish)
    rows = []
    order = built.model.link_order if built.model.link_order is not None else np.arange(net.link_count)
    for v in np.flatnonzero(wrong)[np.argsort(net.rank[np.flatnonzero(wrong)])]:
        calendar_name = cals.names[int(cal[v])]
        links = net.in_link[net.in_ptr[v] : net.in_ptr[v + 1]]
        if start_off[v] or (finish_off[v] and not milestone[v]):
            which, day = ("start", built.actual_start[v]) if start_off[v] else ("finish", built.actual_finish[v])
            if milestone[v]:
                which = "date"
            reason = (
                f"its actual {which} {day_to_date(day).isoformat()} is not a work day of calendar "
                f"'{calendar_name}', so no schedule on that calendar can place it there"
            )
        elif built.out_of_sequence[v]:
            tied = links[built.gaps[links] == built.least_gap[v]]
            link = int(tied[np.lexsort((order[tied], net.link_type[tied] != 0))][0])
            reason = (
                f"out of sequence: it started {_plural(-int(built.least_gap[v]), 'work day')} before its "
                f"link {_link_words(net, link)} allows; the as-built logic is kept, so the model places it "
                f"later (a missing or wrong link? correct the logic in corrections.csv)"
            )
        else:
            pushed = links[result.driving_link[links] & wrong[net.pred[links]]]
            unfitted = links[built.unfitted[links]]
            if pushed.size:
                link = int(pushed[np.lexsort((order[pushed], net.link_type[pushed] != 0))][0])
                reason = (
                    f"it follows {net.ids[net.pred[link]]} (link {_link_words(net, link)}), which the model "
                    f"cannot place on its actual dates"
                )
            elif unfitted.size:
                reason = (
                    f"the gap on its link {_link_words(net, int(unfitted[0]))} cannot be kept exactly as a "
                    f"lag counted in the predecessor's work days (lag_calendar = predecessor)"
                )
            else:
                reason = "the model places it on other dates than the as-built record; check its links"
        rows.append(
            {
                "activity": str(net.ids[v]),
                "actual_start": built.actual_start[v],
                "actual_finish": built.actual_finish[v],
                "modelled_start": modelled_start[v],
                "modelled_finish": modelled_finish[v],
                "reason": reason,
            }
        )
    frame = pd.DataFrame(rows, columns=MISMATCH_COLUMNS)
    for column in MISMATCH_COLUMNS[1:5]:
        frame[column] = (
            table_dates(frame[column].to_numpy(dtype=np.int64)) if len(frame) else pd.Series([], dtype="datetime64[s]")
        )
    return frame, wrong


def _event_removal(built: _AsBuiltModel, shows: dict[str, list[str]], event) -> tuple[_Removal | None, bool, str, str]:
    """(removal or None when not scored, found in the as-built, removed in words, note)."""
    net = built.network
    index = pd.Index(net.ids)
    impact = event.impact
    removal = _Removal()
    activities = list(shows.get(event.id, []))
    given = "asbuilt_activities" in event._fields and bool(str(event.asbuilt_activities or "").strip())
    if impact == "fragnet":
        if not activities:
            return None, False, "", "the event has no activities in fragnets.csv, so there is nothing to take out"
        numbers = index.get_indexer(pd.Index(activities))
        present = [a for a, k in zip(activities, numbers) if k >= 0]
        absent = [a for a, k in zip(activities, numbers) if k < 0]
        what = "the activities it shows in (asbuilt_activities)" if given else "its fragnet activities"
        if not present:
            return (
                None,
                False,
                "",
                (
                    f"{what} ({', '.join(activities)}) are not in the as-built record: the collapsed as-built can take "
                    "out only work that was recorded, so the event is reported, not scored (asbuilt_activities in "
                    "events.csv can name the recorded activities where it shows)"
                ),
            )
        removal.fragnet = {int(k) for k in numbers if k >= 0}
        note = f"not in the as-built record, not taken out: {', '.join(absent)}" if absent else ""
        removed = "recorded activities removed (asbuilt_activities): " if given else "fragnet activities removed: "
        return removal, True, removed + ", ".join(present), note
    if impact not in ("extend", "hold"):
        return None, False, "", "the event gives no impact (extend, hold or fragnet), so there is nothing to take out"
    numbers = index.get_indexer(pd.Index(activities)) if activities else np.empty(0, np.int64)
    present = [(a, int(k)) for a, k in zip(activities, numbers) if k >= 0]
    absent = [a for a, k in zip(activities, numbers) if k < 0]
    notes = []
    if absent:
        notes.append(f"not in the as-built record: {', '.join(absent)}")
    if not present:
        return None, False, "", "none of its activities is in the as-built record; " + "; ".join(notes)
    words = []
    if impact == "extend":
        days = int(event.days) if pd.notna(event.days) else 0
        for activity, v in present:
            before = int(built.actual_duration[v])
            after = max(before - days, 0)
            removal.shorten[v] = days
            words.append(f"{activity} {before} to {after} work days")
        return removal, True, "durations shortened: " + ", ".join(words), "; ".join(notes)
    start_day = int(np.datetime64(event.start, "D").astype(np.int64))
    finish_day = int(np.datetime64(event.finish, "D").astype(np.int64))
    for activity, v in present:
        inside = built.work_days_held(v, start_day, finish_day)
        span = built.gap_days(v, start_day, finish_day)
        if inside is None and span is None:
            notes.append(f"{activity}: the hold overlaps neither its actual work nor the gap before its actual start")
            continue
        if inside is not None:
            removal.suspended[v] = [inside]
            held = inside[1] - inside[0] + 1
            words.append(
                f"{activity} {int(built.actual_duration[v])} to {int(built.actual_duration[v]) - held} work "
                "days (work suspended)"
            )
        if span is not None:
            removal.holds[v] = [span]
            held = "start-no-earlier bound" if built.open_start[v] else "gap"
            words.append(
                f"{activity} {held} {built.gap_of(v)} to {built.gap_of(v) - (span[1] - span[0] + 1)} work days"
            )
    return removal, True, ("shortened: " + ", ".join(words)) if words else "", "; ".join(notes)


# -- the method -----------------------------------------------------------------------------------
def analyse(case: Case) -> CollapsedResult:
    """Collapsed as-built (but-for) analysis of a case.

    Parameters
    ----------
    case : delay.model.Case
        A loaded case with an as-built record (asbuilt.csv) and, for figures, an event
        register (events.csv, with fragnets.csv for fragnet events).

    Returns
    -------
    CollapsedResult
        ``reproduced`` and ``mismatches`` (the check of the as-built model against the
        actual dates), ``actual_completion`` and ``modelled_completion``, ``by_party`` and
        ``by_event`` (but-for completions and days earlier), ``activities`` and ``links``
        (the model itself), ``notes`` (including that but-for figures need not add up).

    Raises
    ------
    delay.errors.CaseError
        The case has no as-built record, the completion activity is not in it, or its
        logic has a loop.

    Notes
    -----
    A but-for completion later than the modelled one (or taking out every event finishing
    later than taking out one party's) is possible with start-to-start and finish-to-finish
    logic, where a shorter activity can hold its successors later; it is reported in
    ``notes`` and shows as negative days earlier, never hidden.

    Examples
    --------
    A small random case (it has no delay events, so only the ``"all"`` row is there, and
    nothing could be taken out):

    >>> import pathlib, tempfile
    >>> from delay.case import load_case
    >>> from delay.synth import synthesise
    >>> with tempfile.TemporaryDirectory() as folder:
    ...     case = load_case(synthesise(pathlib.Path(folder) / "case", 20, updates=2))
    >>> result = analyse(case)
    >>> list(result.by_party["party"]), result.but_for("all")
    (['all'], None)
    >>> result.notes[0] == BUT_FOR_NOTE
    True

    References
    ----------
    AACE International RP 29R-03 (2011), MIP 3.8; SCL Delay and Disruption Protocol, 2nd
    edition (2017), Part B, collapsed as-built analysis.
    """
    if case.asbuilt_snapshot is None:
        raise CaseError(
            Problem(
                file="asbuilt.csv",
                message="the case has no as-built record",
                fix="add asbuilt.csv with the actual dates of every activity",
            )
        )
    return remembered(case, ("collapsed",), lambda: _analyse(case))


class _ButFor:
    """But-for runs of the as-built model measured at the completion activity: the
    but-for completion, the days and work days earlier; a run that finishes later than the
    model (possible with start-to-start and finish-to-finish logic) is noted in ``later``."""

    def __init__(self, built: _AsBuiltModel, target: int, default):
        self.built, self.target, self.default = built, target, default
        self.modelled_day = int(built.result.finish_day[target])
        self.modelled_index = int(default.finish_index_days(np.array([self.modelled_day]))[0])
        self.later: list[str] = []

    def __call__(self, removal: _Removal | None, where: str):
        if removal is None:
            return pd.NaT, pd.NA, pd.NA
        day = int(self.built.run(removal).finish_day[self.target]) if not removal.empty else self.modelled_day
        if day > self.modelled_day:
            # possible with start-to-start and finish-to-finish logic: a shorter activity can
            # hold its successors later (the reverse effect); reported, not hidden
            self.later.append(
                f"but for {where}: completion {day_to_date(day).isoformat()}, later than the modelled "
                f"{day_to_date(self.modelled_day).isoformat()} (start-to-start / finish-to-finish logic "
                "lets a shorter activity hold its successors later)"
            )
        work = self.modelled_index - int(self.default.finish_index_days(np.array([day]))[0])
        return pd.Timestamp(day_to_date(day)), self.modelled_day - day, work


def _typed(frame: pd.DataFrame) -> pd.DataFrame:
    frame["but_for_completion"] = pd.to_datetime(frame["but_for_completion"]).astype("datetime64[s]")
    for column in ("days_earlier", "work_days_earlier"):
        frame[column] = frame[column].astype("Int64")
    return frame


def _by_event(case: Case, built: _AsBuiltModel, figures: _ButFor):
    """Each event taken out alone, and what each party's events (and all) take out."""
    shows = asbuilt_activities(case)
    rows = []
    by_party: dict[str, _Removal] = {}
    scored: dict[str, list[str]] = {}
    unscored: dict[str, list[str]] = {}
    everything = _Removal()
    for event in case.events.itertuples(index=False):
        removal, found, removed, note = _event_removal(built, shows, event)
        but_for, earlier, work = figures(removal, f"but for event {event.id}")
        if removal is not None:
            by_party.setdefault(event.party, _Removal()).add(removal)
            everything.add(removal)
            scored.setdefault(event.party, []).append(event.id)
        else:
            unscored.setdefault(event.party, []).append(event.id)
        rows.append(
            {
                "event": event.id,
                "title": event.title,
                "party": event.party,
                "impact": event.impact,
                "but_for_completion": but_for,
                "days_earlier": earlier,
                "work_days_earlier": work,
                "found_in_as_built": found,
                "removed": removed,
                "note": note,
            }
        )
    frame = _typed(pd.DataFrame(rows, columns=EVENT_COLUMNS))
    frame["found_in_as_built"] = frame["found_in_as_built"].astype(bool)
    return frame, by_party, scored, unscored, everything


def _by_party(
    case: Case, figures: _ButFor, removals: dict, scored: dict, unscored: dict, everything: _Removal
) -> pd.DataFrame:
    """But for each party's events together, then for every event (``party = "all"``)."""
    rows = []
    parties = [p for p in PARTIES if p in set(case.events["party"])]
    for party in parties:
        but_for, earlier, work = figures(removals.get(party), f"but for the {party}'s events")
        rows.append(
            {
                "party": party,
                "but_for_completion": but_for,
                "days_earlier": earlier,
                "work_days_earlier": work,
                "events": scored.get(party, []),
                "not_scored": unscored.get(party, []),
            }
        )
    any_scored = bool(scored)
    but_for, earlier, work = figures(everything if any_scored else None, "but for every event")
    rows.append(
        {
            "party": ALL_PARTIES,
            "but_for_completion": but_for,
            "days_earlier": earlier,
            "work_days_earlier": work,
            "events": [e for p in parties for e in scored.get(p, [])],
            "not_scored": [e for p in parties for e in unscored.get(p, [])],
        }
    )
    frame = _typed(pd.DataFrame(rows, columns=PARTY_COLUMNS))
    if any_scored:
        overall = frame["but_for_completion"].iloc[-1]
        for row in frame.iloc[:-1].itertuples(index=False):
            if pd.notna(row.but_for_completion) and overall > row.but_for_completion:
                figures.later.append(
                    f"but for every event the works finish {pd.Timestamp(overall).date().isoformat()}, later than "
                    f"but for the {row.party}'s events alone "
                    f"({pd.Timestamp(row.but_for_completion).date().isoformat()}): "
                    "the reverse effect of start-to-start / finish-to-finish logic"
                )
    return frame


def _model_tables(built: _AsBuiltModel) -> tuple[pd.DataFrame, pd.DataFrame]:
    """The as-built model itself, for the reader: per activity and per link."""
    net, result = built.network, built.result
    held_by = np.full(net.size, "", dtype=object)
    held_by[built.has_pred & ~built.out_of_sequence & (built.least_gap > 0)] = "link"
    held_by[built.open_start & (built.bound_gap > 0)] = "start_no_earlier"
    held_by[built.out_of_sequence] = "out_of_sequence"
    gap = np.where(built.open_start, built.bound_gap, built.least_gap)
    activities = pd.DataFrame(
        {
            "activity": net.ids.astype(object),
            "name": built.model.names,
            "calendar": np.asarray(built.calendars.names, dtype=object)[built.cal],
            "actual_start": table_dates(built.actual_start),
            "actual_finish": table_dates(built.actual_finish),
            "actual_duration": built.actual_duration,
            "held_by": held_by,
            "gap_work_days": gap,
            "start_no_earlier": table_dates(built.start_bound),
            "modelled_start": table_dates(result.day_array("early_start")),
            "modelled_finish": table_dates(result.day_array("early_finish")),
        },
        columns=ACTIVITY_COLUMNS,
    )
    links = pd.DataFrame(
        {
            "pred": net.ids[net.pred].astype(object),
            "succ": net.ids[net.succ].astype(object),
            "type": _TYPE_NAMES[net.link_type],
            "lag": built.original_lag,
            "gap_work_days": built.gaps,
            "driving": built.driving,
            "model_lag": built.fitted_lag,
        },
        columns=LINK_COLUMNS,
    )
    return activities, links


def _notes(
    mismatches: pd.DataFrame, by_event: pd.DataFrame, modelled_day: int, actual_day: int, later: list[str]
) -> list[str]:
    notes = [
        BUT_FOR_NOTE,
        "Each activity's gap after its driving predecessors is kept as lag on its driving links; an "
        "activity with no predecessor that started after the project's actual start is held by a "
        "start-no-earlier bound at its actual start instead.",
        "Days earlier are measured from the modelled as-built completion, in calendar days.",
    ]
    if len(mismatches):
        notes.append(
            f"The as-built model does not reproduce the actual dates of {len(mismatches)} "
            f"{'activity' if len(mismatches) == 1 else 'activities'}"
            f" (modelled completion {day_to_date(modelled_day).isoformat()}, "
            f"actual {day_to_date(actual_day).isoformat()}); "
            "the but-for figures carry that error."
        )
    if not_found := by_event.loc[~by_event["found_in_as_built"], "event"].tolist():
        notes.append(
            "Events reported but not scored (nothing of theirs in the as-built record to take out): "
            + ", ".join(not_found)
            + "."
        )
    return notes + later


def _analyse(case: Case) -> CollapsedResult:
    built = _AsBuiltModel(case)
    target = completion_activity(case)
    k = int(built.network.index_of([target])[0])
    if k < 0:
        raise CaseError(
            Problem(
                file="asbuilt.csv",
                message=f"the completion activity '{target}' is not in the as-built record",
                fix="name an activity of the as-built record in [project] completion_activity",
            )
        )
    figures = _ButFor(built, k, built.calendars[case.settings.schedule.default_calendar])
    actual_day = int(built.recorded.finish_day[k])
    mismatches, _ = _mismatches(built)
    by_event, removals, scored, unscored, everything = _by_event(case, built, figures)
    by_party = _by_party(case, figures, removals, scored, unscored, everything)
    activities, links = _model_tables(built)
    notes = _notes(mismatches, by_event, figures.modelled_day, actual_day, figures.later)
    return CollapsedResult(
        reproduced=not len(mismatches),
        mismatches=mismatches,
        actual_completion=day_to_date(actual_day),
        modelled_completion=day_to_date(figures.modelled_day),
        by_party=by_party,
        by_event=by_event,
        activities=activities,
        links=links,
        notes=tuple(notes),
    )
