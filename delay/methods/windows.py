"""Windows analysis with half-steps.

The contemporaneous programmes cut the project into windows, one per pair of boundary
snapshots (by default every consecutive pair: baseline, each update, and the as-built record
where there is one). For each window from snapshot S to snapshot E the method measures how
far the project's completion activity moved (the *target*; each section's completion
milestone is traced the same way, on its own) and splits the movement in two with a
*half-step* H:

- H is S's programme (activities, durations, logic, constraints) brought to E's data date
  with E's progress (actual dates and remaining durations) for every activity of S that E
  shows as started. Not-started activities keep S's durations: a re-estimate is a revision,
  not progress. Activities deleted in E stay in H, unprogressed, and are flagged; activities
  added in E are not in H.
- progress effect = the target's finish in H less in S; revision effect = in E less in H.

The progress effect is charged along H's driving chain to the target by the work-day ledger
of :mod:`delay.ledger`: lateness against S's late finishes *by logic alone* (a backward pass
from the target's own finish in S, ignoring ``latest_finish`` and ``fixed_*`` constraints and
``float_to``), counted in work days of the ledger calendar (the target's own: for the whole
works, the project's completion activity's), traced back through actual dates to the first
activity already complete at S. Each activity on the chain is charged its lateness less its
driving predecessor's; an activity whose start gap behind that predecessor and whose
duration did not change only carried the delay and is charged nothing. Float absorbed off
the chain is not charged; a gain is a negative charge.

The revision effect is charged by applying E's changes to H one kind at a time, in the
fixed order deletions, additions, durations (planned and remaining durations, activity kind),
logic, calendars, constraints, and charging each kind the change in the target's finish it
makes, in ledger work days. A final step "other" takes whatever else differs (for example
progress S recorded that E no longer shows) so that the steps end exactly at E.

The window's movement in calendar days is then split among its counted charges in path
order and its revision kinds in their order, walking the ledger calendar from S's
completion date to E's (:func:`delay.ledger.split_days`), so that the calendar days add up
exactly and a charge carried across a weekend or a shutdown takes no days it did not cause.

Causes (:mod:`delay.events`): an event matches a charge when it names the activity (or a
fragnet into it) and its period overlaps the window (S's data date to E's, both included);
several matches are concurrent causes; with none, the activity's ``risk`` column decides,
else ``[analysis] unexplained_risk``. attributions.csv overrides the rule for one charge,
and the override is listed beside what the rule gave.

Reconciliation: in every window the counted progress charges plus the revision charges equal
the movement, in work days and in calendar days, and the windows add up to the movement
from the first snapshot to the last. A failure raises
:class:`delay.errors.ReconciliationError`.

References
----------
AACE International Recommended Practice 29R-03, Forensic Schedule Analysis (2011), MIP 3.3
(observational / dynamic / contemporaneous as-is) and MIP 3.4 (observational / dynamic /
contemporaneous split, the half-step or bifurcated analysis). Society of Construction Law
Delay and Disruption Protocol, 2nd edition (2017), Part B, time slice windows analysis, and
its guidance on float and on acceleration (as recalled).

Assumptions
-----------
The updates are the contemporaneous programmes as issued (after the analyst's disclosed
corrections); their logic is taken as the contractor's plan at the time. The half-step
isolates progress from revisions; it does not judge whether a revision was reasonable.
Milestone constraints do not change what is charged: lateness is measured against logic.
"""

from __future__ import annotations

import dataclasses
import datetime as dt
from collections.abc import Sequence
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from ..calendars import CalendarSet
from ..convert import NO_DAY, day_to_date, join_ids
from ..cpm import ACTIVITY_ARRAYS, COMPLETE, ScheduleModel, ScheduleResult, calendars_of, prepare
from ..errors import CaseError, Problem, ReconciliationError
from ..events import CONCURRENT, activity_risk, attributions, completion_activity, events_naming, match_events
from ..ledger import CHARGE_COLUMNS as TRACE_COLUMNS
from ..ledger import ledger_number, logic_late_finish, split_days, trace_charges
from ..memo import remembered
from ..model import PARTIES, Case, Snapshot
from ..network import build_network

__all__ = [
    "analyse",
    "Window",
    "WindowsResult",
    "REVISION_KINDS",
    "half_step_snapshot",
    "CHARGE_COLUMNS",
    "REVISION_COLUMNS",
]

#: The order in which a window's revisions are applied and charged.
REVISION_KINDS = ("deletions", "additions", "durations", "logic", "calendars", "constraints")

_PROGRESS_COLUMNS = ("actual_start", "actual_finish", "remaining")

#: Columns of a window's progress charges.
CHARGE_COLUMNS = TRACE_COLUMNS + [
    "days",
    "events",
    "parties",
    "party",
    "basis",
    "rule_party",
    "rule_basis",
    "rule_events",
    "reason",
]
#: Columns of a window's revision charges.
REVISION_COLUMNS = [
    "kind",
    "activities",
    "work_days",
    "days",
    "completion_after",
    "events",
    "parties",
    "party",
    "basis",
]


@dataclass(frozen=True)
class Window:
    """One window of the analysis for one target.

    The target is the project's completion activity or a section's completion milestone.
    Days are calendar days, work days those of the ledger calendar (the target's own);
    positive is delay. S is the window's start snapshot, H its half-step, E its end.

    Parameters
    ----------
    number : int
        The window's number, from 1.
    start, end : str
        The folders of the boundary snapshots S and E.
    start_label, end_label : str
        Their labels.
    start_data_date, end_data_date : datetime.date
        Their data dates.
    target : str
        The activity measured.
    completion_start : datetime.date
        The target's finish in S.
    completion_half : datetime.date or None
        Its finish in H; ``None`` without a half-step.
    completion_end : datetime.date
        Its finish in E.
    movement_days, movement_work_days : int
        E's finish less S's, in calendar days and in ledger work days.
    progress_days, progress_work_days : int
        The progress effect (H less S; without a half-step the whole movement), in calendar
        days and ledger work days.
    revision_days, revision_work_days : int
        The revision effect (E less H), in calendar days and ledger work days.
    charges : pandas.DataFrame
        :data:`CHARGE_COLUMNS`: the counted chain first (``counted``), whose ``work_days``
        and ``days`` add up to the progress effect, then the activities of tied paths
        beside it.
    revisions : pandas.DataFrame
        :data:`REVISION_COLUMNS`, in the order applied (:data:`REVISION_KINDS`, then
        ``other``).
    driving_start, driving_half, driving_end : tuple of str, optional
        The driving paths of S, H and E (filled in for the whole works' windows only;
        ``driving_half`` empty without a half-step).
    deleted_in_end : tuple of str, optional
        Activities of S that E no longer has.
    titles : dict, optional
        Event id to title, for :attr:`sentence`.
    """

    number: int
    start: str
    end: str
    start_label: str
    end_label: str
    start_data_date: dt.date
    end_data_date: dt.date
    target: str
    completion_start: dt.date
    completion_half: dt.date | None
    completion_end: dt.date
    movement_days: int
    movement_work_days: int
    progress_days: int
    progress_work_days: int
    revision_days: int
    revision_work_days: int
    charges: pd.DataFrame
    revisions: pd.DataFrame
    driving_start: tuple[str, ...] = ()
    driving_half: tuple[str, ...] = ()
    driving_end: tuple[str, ...] = ()
    deleted_in_end: tuple[str, ...] = ()
    titles: dict = field(default_factory=dict, repr=False)

    @property
    def joined_driving_path(self) -> tuple[str, ...]:
        """Activities on E's driving path that were not on S's."""
        before = set(self.driving_start)
        return tuple(a for a in self.driving_end if a not in before)

    @property
    def left_driving_path(self) -> tuple[str, ...]:
        """Activities on S's driving path that are not on E's."""
        after = set(self.driving_end)
        return tuple(a for a in self.driving_start if a not in after)

    @property
    def counted(self) -> pd.DataFrame:
        """The counted progress charges that move completion (days or work days other than 0)."""
        charges = self.charges
        return charges[charges["counted"].astype(bool) & ((charges["days"] != 0) | (charges["work_days"] != 0))]

    @property
    def by_party_days(self) -> dict[str, int]:
        """Calendar days of the window's movement by the party of each counted charge and
        revision (``concurrent`` where events of several parties share one)."""
        out: dict[str, int] = {}
        for party, days in zip(
            list(self.counted["party"]) + list(self.revisions["party"]),
            list(self.counted["days"]) + list(self.revisions["days"]),
        ):
            if int(days):
                out[party] = out.get(party, 0) + int(days)
        order = list(PARTIES) + [CONCURRENT]
        return {p: out[p] for p in sorted(out, key=lambda p: order.index(p) if p in order else len(order))}

    @property
    def sentence(self) -> str:
        """The window in one generated sentence, from its numbers."""
        return _sentence(self)

    def to_json(self) -> dict:
        """The window as plain JSON values (dates as ISO text).

        Returns
        -------
        dict
            Boundaries, target, completions, movement and its split, days by party, the
            sentence, the ``charged`` rows (those with days, work days or a tie group) and
            the ``revisions`` rows.
        """
        charges = self.charges[
            (self.charges["work_days"] != 0) | (self.charges["days"] != 0) | self.charges["group"].notna()
        ]
        return {
            "window": self.number,
            "start": self.start,
            "end": self.end,
            "target": self.target,
            "completion_start": self.completion_start.isoformat(),
            "completion_end": self.completion_end.isoformat(),
            "movement_days": self.movement_days,
            "movement_work_days": self.movement_work_days,
            "progress_days": self.progress_days,
            "progress_work_days": self.progress_work_days,
            "revision_days": self.revision_days,
            "revision_work_days": self.revision_work_days,
            "by_party_days": self.by_party_days,
            "sentence": self.sentence,
            "charged": [
                {
                    "activity": r.activity,
                    "work_days": int(r.work_days),
                    "days": int(r.days),
                    "counted": bool(r.counted),
                    "inherited": bool(r.inherited),
                    "events": list(r.events),
                    "party": r.party,
                    "basis": r.basis,
                    "concurrent_with": list(r.concurrent_with),
                }
                for r in charges.itertuples(index=False)
            ],
            "revisions": [
                {
                    "kind": r.kind,
                    "activities": list(r.activities),
                    "work_days": int(r.work_days),
                    "days": int(r.days),
                    "events": list(r.events),
                    "party": r.party,
                    "basis": r.basis,
                }
                for r in self.revisions.itertuples(index=False)
            ],
        }


@dataclass(frozen=True)
class WindowsResult:
    """All windows of one analysis, for the whole works and each section.

    Made by :func:`analyse`.

    Parameters
    ----------
    windows : tuple of Window
        The whole works' windows, traced to the project's completion activity.
    half_step : bool
        Whether each window was split into progress and revision effects.
    first_completion : datetime.date
        The completion activity's finish in the first boundary snapshot.
    last_completion : datetime.date
        Its finish in the last.
    target : str, optional
        The project's completion activity.
    ledger_calendar : str, optional
        The name of the calendar work days are counted on (the completion activity's).
    sections : dict, optional
        Section id to its tuple of windows, traced to its completion milestone (a section
        whose milestone is missing from a boundary is left out).
    attributions : pandas.DataFrame, optional
        Each attributions.csv override applied, beside what the rule gave.
    """

    windows: tuple[Window, ...]
    half_step: bool
    first_completion: dt.date
    last_completion: dt.date
    target: str = ""
    ledger_calendar: str = ""
    sections: dict = field(default_factory=dict, repr=False)
    attributions: pd.DataFrame = field(default=None, repr=False)

    @property
    def total_movement_days(self) -> int:
        """The last less the first completion, in calendar days: the windows' sum."""
        return (self.last_completion - self.first_completion).days

    @property
    def table(self) -> pd.DataFrame:
        """One row per window: boundaries, completions, movement and its split."""
        rows = [
            {
                "window": w.number,
                "start": w.start,
                "end": w.end,
                "start_data_date": w.start_data_date,
                "end_data_date": w.end_data_date,
                "completion_start": w.completion_start,
                "completion_half": w.completion_half,
                "completion_end": w.completion_end,
                "movement_days": w.movement_days,
                "movement_work_days": w.movement_work_days,
                "progress_days": w.progress_days,
                "progress_work_days": w.progress_work_days,
                "revision_days": w.revision_days,
                "revision_work_days": w.revision_work_days,
                **{f"{party}_days": w.by_party_days.get(party, 0) for party in (*PARTIES, CONCURRENT)},
                "sentence": w.sentence,
            }
            for w in self.windows
        ]
        return pd.DataFrame(rows)

    @property
    def charges(self) -> pd.DataFrame:
        """Every window's charges (progress and revisions) in one table, with a ``window``
        and a ``source`` column (``progress`` or the revision kind)."""
        frames = []
        for w in self.windows:
            frames.append(w.charges.assign(window=w.number, start=w.start, end=w.end, source="progress"))
            if len(w.revisions):
                frames.append(
                    pd.DataFrame(
                        {
                            "window": w.number,
                            "start": w.start,
                            "end": w.end,
                            "source": w.revisions["kind"],
                            "activity": [join_ids(a) for a in w.revisions["activities"]],
                            "work_days": w.revisions["work_days"],
                            "days": w.revisions["days"],
                            "counted": True,
                            "events": w.revisions["events"],
                            "party": w.revisions["party"],
                            "basis": w.revisions["basis"],
                        }
                    )
                )
        if not frames:
            return pd.DataFrame(columns=["window", "start", "end", "source", *CHARGE_COLUMNS])
        charges = pd.concat(frames, ignore_index=True)
        charges["level"] = charges["level"].astype("Int64")  # blank for a revision, which has no level
        return charges

    def to_json(self) -> dict:
        """The result as plain JSON values (dates as ISO text).

        Returns
        -------
        dict
            ``method`` (``"windows"``), target, ledger calendar, ``half_step``, each
            window's :meth:`Window.to_json`, the total movement, the same per section, and
            the attributions applied.
        """
        return {
            "method": "windows",
            "target": self.target,
            "ledger_calendar": self.ledger_calendar,
            "half_step": self.half_step,
            "windows": [w.to_json() for w in self.windows],
            "total_movement_days": self.total_movement_days,
            "sections": [
                {
                    "section": section,
                    "target": windows[0].target if windows else "",
                    "windows": [w.to_json() for w in windows],
                }
                for section, windows in self.sections.items()
            ],
            "attributions": []
            if self.attributions is None
            else [
                {k: (list(v) if isinstance(v, list) else v) for k, v in row.items()}
                for row in self.attributions.to_dict("records")
            ],
        }


# -- helpers ----------------------------------------------------------------------------------
def _snapshots(case: Case, names: Sequence[str] | None) -> list[Snapshot]:
    sequence = list(case.snapshots) + ([case.asbuilt_snapshot] if case.asbuilt_snapshot is not None else [])
    if not names:
        return sequence
    chosen = []
    for name in names:
        try:
            chosen.append(case.snapshot(name))
        except KeyError:
            known = ", ".join(s.folder for s in sequence)
            raise CaseError(
                Problem(
                    file="--windows", message=f"no snapshot '{name}'", fix=f"name boundary snapshots among: {known}"
                )
            ) from None
    positions = [sequence.index(s) for s in chosen]
    if len(chosen) < 2 or positions != sorted(set(positions)):
        raise CaseError(
            Problem(
                file="--windows",
                message="window boundaries must be two or more snapshots in data-date order",
                fix="list the boundary snapshots from the earliest to the latest",
            )
        )
    return chosen


def _started(activities: pd.DataFrame) -> np.ndarray:
    return (activities["actual_start"].notna() | activities["actual_finish"].notna()).to_numpy()


def _variant(
    base: Snapshot, tag: str, label: str, data_date: dt.date, activities: pd.DataFrame, links: pd.DataFrame
) -> Snapshot:
    return Snapshot(
        folder=f"{base.folder}~{tag}",
        label=label,
        data_date=data_date,
        kind="update",
        activities_table=activities.reset_index(drop=True),
        links_table=links.reset_index(drop=True),
    )


def half_step_snapshot(start: Snapshot, end: Snapshot) -> Snapshot:
    """S's programme with E's data date and E's progress for the activities E shows started.

    Parameters
    ----------
    start, end : delay.model.Snapshot
        The snapshots S and E that bound the window; neither is changed.

    Returns
    -------
    delay.model.Snapshot
        The half-step H (folder ``<S>~progress-to-<E>``, kind ``update``): S's activities
        and links, with E's ``actual_start``, ``actual_finish`` and ``remaining`` for every
        activity E shows started, and E's data date.
    """
    activities = start.activities
    progress = end.activities.set_index("id")
    started_in_end = set(progress.index[_started(progress.reset_index())])
    rows = activities["id"].isin(started_in_end).to_numpy()
    if rows.any():
        ids = activities.loc[rows, "id"]
        for column in _PROGRESS_COLUMNS:
            activities[column] = activities[column].astype(progress[column].dtype)
            activities.loc[rows, column] = progress.loc[ids, column].to_numpy()
    return _variant(
        start,
        f"progress-to-{end.folder}",
        f"{start.label} progressed to {end.label}",
        end.data_date,
        activities,
        start.links,
    )


def _half_step_model(start: ScheduleModel, end: ScheduleModel, in_end: np.ndarray) -> ScheduleModel:
    """:func:`half_step_snapshot` on the engine's arrays: S's compiled programme with E's
    data date and E's progress (actual dates, remaining durations) for the activities E
    shows started; nothing is compiled again. ``in_end`` gives each of S's activities its
    number in E (``-1`` when E lacks it)."""
    safe = np.maximum(in_end, 0)
    started = (in_end >= 0) & ((end.actual_start[safe] != NO_DAY) | (end.actual_finish[safe] != NO_DAY))
    arrays = {
        name: np.where(started, getattr(end, name)[safe], getattr(start, name))
        for name in ("actual_start", "actual_finish", "remaining")
    }
    return dataclasses.replace(start, data_day=end.data_day, label=f"{start.label} progressed to {end.label}", **arrays)


class _Scheduler:
    """Schedules snapshots of one case with shared calendars, each boundary once."""

    def __init__(self, case: Case):
        self.case = case
        self.calendars: CalendarSet = calendars_of(case)
        self.settings = case.settings.schedule
        self._done: dict[str, ScheduleResult] = {}

    def run(self, snapshot: Snapshot) -> ScheduleResult:
        return prepare(self.case, snapshot, self.settings, calendars=self.calendars).run()

    def of(self, snapshot: Snapshot) -> ScheduleResult:
        if snapshot.folder not in self._done:
            self._done[snapshot.folder] = self.run(snapshot)
        return self._done[snapshot.folder]


def _finishes(result: ScheduleResult, targets: Sequence[str]) -> np.ndarray:
    """Finish day numbers of the targets in a schedule; ``-1`` marks a target not in it."""
    where = result.model.network.index_of(list(targets))
    return np.where(where >= 0, result.finish_day[np.maximum(where, 0)], -1)


#: The model arrays each revision kind takes from E.
_KIND_ARRAYS = {
    "durations": ("duration", "remaining", "kind"),
    "calendars": ("calendar",),
    "constraints": ("constraint", "constraint_day"),
}


class _Programme:
    """A programme as the engine's arrays, its activities and links by code: what the
    revision steps change one kind at a time, with no tables rebuilt and no id looked up
    per step. A code numbers an activity of either programme of a window (E's activities
    first, in E's order, then H's activities that E does not have)."""

    def __init__(self, model: ScheduleModel, codes: np.ndarray, size: int):
        self.template = model
        net = model.network
        self.size = size  # the number of codes: every activity of both programmes
        self.codes = np.asarray(codes, dtype=np.int64)
        self.ids = np.asarray(net.ids, dtype=object)
        self.arrays = {name: np.asarray(getattr(model, name)) for name in ACTIVITY_ARRAYS}
        order = model.link_order if model.link_order is not None else np.arange(net.link_count)
        rows = np.argsort(order, kind="stable")  # links in their input order
        self.links = (self.codes[net.pred[rows]], self.codes[net.succ[rows]], net.link_type[rows], net.lag[rows])
        self._network = None  # compiled again only when the activities or the links change
        self._last: ScheduleModel | None = None  # the model made last, on the same network
        self._changed: list[np.ndarray] = []  # the activities whose arrays changed since

    def _has(self, codes: np.ndarray) -> np.ndarray:
        """Per code: whether this programme holds the activity."""
        found = np.zeros(self.size, dtype=bool)
        found[codes] = True
        return found

    def positions(self) -> np.ndarray:
        """Per code: the activity's number in this programme, ``-1`` where it has none."""
        found = np.full(self.size, -1, dtype=np.int64)
        found[self.codes] = np.arange(self.codes.size)
        return found

    def keep(self, mask: np.ndarray) -> None:
        self._network = None
        self.codes, self.ids = self.codes[mask], self.ids[mask]
        self.arrays = {name: values[mask] for name, values in self.arrays.items()}
        present = self._has(self.codes)
        kept = present[self.links[0]] & present[self.links[1]]
        self.links = tuple(values[kept] for values in self.links)

    def add(self, other: _Programme, rows: np.ndarray) -> None:
        """Take the activities ``rows`` of ``other``, with its links that touch one of them
        and join two activities this programme then holds."""
        self._network = None
        added = self._has(other.codes[rows])
        self.codes = np.concatenate([self.codes, other.codes[rows]])
        self.ids = np.concatenate([self.ids, other.ids[rows]])
        self.arrays = {name: np.concatenate([values, other.arrays[name][rows]]) for name, values in self.arrays.items()}
        present = self._has(self.codes)
        pred, succ = other.links[0], other.links[1]
        touching = (added[pred] | added[succ]) & present[pred] & present[succ]
        self.links = tuple(np.concatenate([mine, theirs[touching]]) for mine, theirs in zip(self.links, other.links))

    def relink(self, links) -> None:
        self._network = None
        self.links = links

    def reassign(self, name: str, values: np.ndarray, changed: np.ndarray) -> None:
        """Take one per-activity array, which differs from the current one at ``changed``."""
        self.arrays[name] = values
        self._changed.append(np.flatnonzero(changed))

    def model(self) -> ScheduleModel:
        if self._network is None:
            position = self.positions()
            pred, succ = position[self.links[0]], position[self.links[1]]
            self._network = build_network(self.ids, pred, succ, self.links[2], self.links[3])
            self._last = None
        network = self._network
        model = dataclasses.replace(
            self.template, network=network, link_order=np.arange(network.link_count), **self.arrays
        )
        if self._last is not None:  # the same logic: its forward dates are brought up to date from the last model's
            model.__dict__["_parent"] = self._last
            model.__dict__["_changed"] = np.concatenate(self._changed) if self._changed else np.empty(0, np.int64)
        self._last, self._changed = model, []
        return model

    def finishes(self, targets: np.ndarray) -> np.ndarray:
        """Finish day numbers of the target codes in the forward pass; ``-1`` for a target
        this programme does not hold (or a code of ``-1``)."""
        where = np.where(targets >= 0, self.positions()[np.maximum(targets, 0)], -1)
        return np.where(where >= 0, self.model().finish_days()[np.maximum(where, 0)], -1)


def _differs(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Element-wise ``a != b``, with NaN equal to NaN."""
    if a.dtype.kind == "f" or b.dtype.kind == "f":
        return ~((a == b) | (np.isnan(a.astype(float)) & np.isnan(b.astype(float))))
    return a != b


def _changed_links(before, after, names: np.ndarray) -> list[str]:
    """``pred>succ`` of every link that is in one of two link lists and not in the other
    (same ends, type and lag), each once, sorted; the ends are codes, ``names`` their ids."""
    width = np.int64(len(names) + 1)

    def keys(links) -> np.ndarray:
        pred, succ = np.asarray(links[0], dtype=np.int64), np.asarray(links[1], dtype=np.int64)
        return ((pred * width + succ) * 4 + np.asarray(links[2], dtype=np.int64)) * 200_003 + (
            np.asarray(links[3], dtype=np.int64) + 100_001
        )

    if all(len(b) == len(a) and np.array_equal(np.asarray(b), np.asarray(a)) for b, a in zip(before, after)):
        return []  # the same links in the same order: nothing to compare
    # A link is in a programme once (the loader refuses a repeated link), so the keys of
    # each side are distinct: sorted, each side's keys the other lacks are found by search.
    first, second = np.sort(keys(before)), np.sort(keys(after))
    moved = np.concatenate([_missing_from(first, second), _missing_from(second, first)])
    ends = moved // 200_003 // 4
    return sorted({f"{names[p]}>{names[q]}" for p, q in zip(ends // width, ends % width)})


def _missing_from(values: np.ndarray, other: np.ndarray) -> np.ndarray:
    """The values of a sorted array that a second sorted array lacks."""
    if not other.size:
        return values
    at = np.minimum(np.searchsorted(other, values), other.size - 1)
    return values[other[at] != values]


def _revision_steps(
    scheduler: _Scheduler,
    half_result: ScheduleResult,
    end_result: ScheduleResult,
    targets: Sequence[str],
    in_end: np.ndarray,
) -> list[tuple[str, list[str], np.ndarray]]:
    """E's changes applied to H one kind at a time, on the engine's arrays: ``(kind,
    changed, finishes of the targets after it)`` per kind that changed something, then
    ``other`` when the steps do not end exactly at E. ``in_end`` gives each of H's
    activities (S's) its number in E (``-1`` when E lacks it)."""
    end_net, half_net = end_result.model.network, half_result.model.network
    only_half = np.flatnonzero(in_end < 0)
    size = end_net.size + only_half.size
    half_codes = in_end.astype(np.int64)
    half_codes[only_half] = end_net.size + np.arange(only_half.size)
    names = np.concatenate([np.asarray(end_net.ids, dtype=object), np.asarray(half_net.ids, dtype=object)[only_half]])
    current = _Programme(half_result.model, half_codes, size)
    end = _Programme(end_result.model, np.arange(end_net.size), size)
    target_codes = end_net.index_of(list(targets))
    steps: list[tuple[str, list[str], np.ndarray]] = []

    def step(kind: str, changed) -> None:
        if len(changed):
            steps.append((kind, sorted(str(c) for c in changed), current.finishes(target_codes)))

    deleted = current.ids[in_end < 0]
    current.keep(in_end >= 0)
    step("deletions", deleted)
    added = np.flatnonzero(~current._has(current.codes)[end.codes])
    current.add(end, added)
    step("additions", end.ids[added])
    position = current.codes  # every current activity is in E now: its code is its number in E

    def reassign(kind: str) -> None:
        changed = np.zeros(current.ids.size, dtype=bool)
        for name in _KIND_ARRAYS[kind]:
            theirs = end.arrays[name][position]
            differs = _differs(current.arrays[name], theirs)
            current.reassign(name, theirs, differs)
            changed |= differs
        step(kind, current.ids[changed])

    reassign("durations")
    moved = _changed_links(current.links, end.links, names)
    if moved:
        current.relink(end.links)
    step("logic", moved)
    reassign("calendars")
    reassign("constraints")
    final = _finishes(end_result, targets)
    if not steps or not np.array_equal(steps[-1][2], final):
        steps.append(("other", [], final))
    return steps


def _risk_lookup(snapshots: Sequence[Snapshot], ids: Sequence[str]) -> list[str]:
    """Each activity's ``risk`` in the first of ``snapshots`` that gives one."""
    found = ["" for _ in ids]
    for snapshot in snapshots:
        for i, risk in enumerate(activity_risk(snapshot, ids)):
            found[i] = found[i] or risk
    return found


def _causes(case: Case, ids: Sequence[str], start: Snapshot, end: Snapshot) -> pd.DataFrame:
    """The rule's causes of charges on ``ids`` in the window from ``start`` to ``end``."""
    ids = [str(a) for a in ids]
    return match_events(case, ids, start.data_date, end.data_date, risks=_risk_lookup([end, start], ids))


def _charge_frame(
    case: Case, traced: pd.DataFrame, days: np.ndarray, start: Snapshot, end: Snapshot, overrides: pd.DataFrame
) -> pd.DataFrame:
    """The traced charges with their calendar days, causes and any analyst's attribution."""
    causes = _causes(case, traced["activity"].tolist(), start, end)
    cells = {name: traced[name].to_numpy() for name in traced.columns}  # one table built, not one column at a time
    cells["days"] = np.asarray(days)
    for name in ("events", "parties", "party", "basis"):
        cells[name] = causes[name].to_numpy()
    for name in ("party", "basis", "events"):  # what the rules gave, kept beside an analyst's attribution
        cells[f"rule_{name}"] = cells[name].copy()
    cells["reason"] = np.full(len(traced), "", dtype=object)
    frame = pd.DataFrame({name: cells[name] for name in CHARGE_COLUMNS})
    mine = overrides[overrides["folder"] == end.folder] if len(overrides) else overrides
    for record in mine.itertuples(index=False):
        rows = np.flatnonzero((frame["activity"] == record.activity).to_numpy())
        for i in rows:
            frame.at[int(i), "events"] = [record.event] if record.event else []
            frame.at[int(i), "parties"] = [record.party]
            frame.at[int(i), "party"] = record.party
            frame.at[int(i), "basis"] = "analyst"
            frame.at[int(i), "reason"] = record.reason
    return frame


def _revision_frame(
    case: Case, steps, work_days: np.ndarray, days: np.ndarray, start: Snapshot, end: Snapshot, overrides: pd.DataFrame
) -> pd.DataFrame:
    rows = []
    mine = overrides[overrides["folder"] == end.folder] if len(overrides) else overrides
    party_of = dict(zip(case.events["id"], case.events["party"]))
    for (kind, changed, finish), work, calendar_days in zip(steps, work_days, days):
        if not int(work) and not int(calendar_days):
            continue  # a kind that moved nothing for this target is not listed
        ids = list(dict.fromkeys(part.strip() for item in changed for part in str(item).split(">") if part.strip()))
        events = events_naming(case, ids, start.data_date, end.data_date) if ids else []
        parties = [p for p in PARTIES if p in {party_of[e] for e in events}]
        basis = "event" if parties else "unexplained"
        if not parties:
            parties = [_default_risk(case)]
        override = mine[mine["activity"].isin(ids)] if len(mine) else mine
        if len(override):
            record = override.iloc[0]
            events, parties, basis = ([record["event"]] if record["event"] else []), [record["party"]], "analyst"
        rows.append(
            {
                "kind": kind,
                "activities": changed,
                "work_days": int(work),
                "days": int(calendar_days),
                "completion_after": day_to_date(int(finish)) if finish >= 0 else None,
                "events": events,
                "parties": parties,
                "party": parties[0] if len(parties) == 1 else CONCURRENT,
                "basis": basis,
            }
        )
    frame = pd.DataFrame(rows, columns=REVISION_COLUMNS)
    return frame[(frame["work_days"] != 0) | (frame["days"] != 0)].reset_index(drop=True)


def _default_risk(case: Case) -> str:
    from ..events import unexplained_risk

    return unexplained_risk(case)


def _ledger_position(result: ScheduleResult, ledger: int, day: int) -> int:
    return int(result.model.calendars.finish_index_days(np.array([ledger]), np.array([day]))[0])


@dataclass
class _Boundary:
    """One boundary snapshot scheduled, with the logic-only late finishes of each target."""

    snapshot: Snapshot
    result: ScheduleResult
    late: dict = field(default_factory=dict)

    def late_finish(self, target: str) -> np.ndarray | None:
        if target not in self.late:
            k = int(self.result.model.network.index_of([target])[0])
            self.late[target] = None if k < 0 else logic_late_finish(self.result, k)
        return self.late[target]


def _window(
    case: Case,
    number: int,
    start: _Boundary,
    end: _Boundary,
    target: str,
    half_step: bool,
    traced: ScheduleResult,
    steps,
    overrides: pd.DataFrame,
    deleted: tuple[str, ...],
) -> Window | None:
    """One window for one target, or ``None`` when the target is missing from a boundary;
    ``deleted`` lists the ids of S's activities that E lacks."""
    s_result, e_result = start.result, end.result
    late = start.late_finish(target)
    finish_s = _finishes(s_result, [target])[0]
    finish_e = _finishes(e_result, [target])[0]
    finish_h = _finishes(traced, [target])[0]
    if late is None or min(finish_s, finish_e, finish_h) < 0:
        return None
    ledger = ledger_number(s_result, target)
    position = {
        name: _ledger_position(s_result, ledger, day)
        for name, day in (("s", finish_s), ("h", finish_h), ("e", finish_e))
    }
    in_start = s_result.model.network.index_of(traced.ids)  # complete at S: where the trace stops
    stop = (in_start >= 0) & (s_result.status[np.maximum(in_start, 0)] == COMPLETE)
    traced_charges = trace_charges(traced, s_result, late, target, stop, ledger)
    counted = traced_charges["counted"].astype(bool).to_numpy() if len(traced_charges) else np.zeros(0, bool)
    progress_work = position["h"] - position["s"]
    if int(traced_charges.loc[counted, "work_days"].sum()) != progress_work:
        raise ReconciliationError(
            f"window {number} ({start.snapshot.folder} to {end.snapshot.folder}), {target}",
            {
                "progress charges (work days)": int(traced_charges.loc[counted, "work_days"].sum()),
                "progress effect (work days)": progress_work,
            },
        )
    revision_finish = [finish for _, _, finish in steps]
    revision_work = []
    previous = position["h"]
    for finish in revision_finish:
        here = _ledger_position(s_result, ledger, int(finish)) if finish >= 0 else previous
        revision_work.append(here - previous)
        previous = here
    work_steps = list(traced_charges.loc[counted, "work_days"]) + revision_work
    days = split_days(int(finish_s), int(finish_e), work_steps, s_result, ledger)
    charge_days = np.zeros(len(traced_charges), dtype=np.int64)
    charge_days[counted] = days[: int(counted.sum())]
    off = np.flatnonzero(~counted)
    for i in off:  # a parallel path's work days, stepped alone from S's completion
        work = int(traced_charges["work_days"].iloc[int(i)])
        charge_days[i] = _alone_days(s_result, ledger, position["s"], int(finish_s), work)
    charges = _charge_frame(case, traced_charges, charge_days, start.snapshot, end.snapshot, overrides)
    revisions = _revision_frame(
        case,
        [(k, c, f) for k, c, f in steps],
        np.asarray(revision_work, dtype=np.int64),
        days[int(counted.sum()) :],
        start.snapshot,
        end.snapshot,
        overrides,
    )
    movement = int(finish_e - finish_s)
    progress = int(days[: int(counted.sum())].sum())
    if int(days.sum()) != movement:
        raise ReconciliationError(
            f"window {number}, {target}", {"calendar days charged": int(days.sum()), "movement": movement}
        )
    return Window(
        number=number,
        start=start.snapshot.folder,
        end=end.snapshot.folder,
        start_label=start.snapshot.label,
        end_label=end.snapshot.label,
        start_data_date=start.snapshot.data_date,
        end_data_date=end.snapshot.data_date,
        target=target,
        completion_start=day_to_date(int(finish_s)),
        completion_half=day_to_date(int(finish_h)) if half_step else None,
        completion_end=day_to_date(int(finish_e)),
        movement_days=movement,
        movement_work_days=position["e"] - position["s"],
        progress_days=progress,
        progress_work_days=progress_work,
        revision_days=movement - progress,
        revision_work_days=position["e"] - position["h"],
        charges=charges,
        revisions=revisions,
        deleted_in_end=deleted,
        titles=dict(zip(case.events["id"], case.events["title"])),
    )


def _alone_days(result: ScheduleResult, ledger: int, position: int, first_day: int, work: int) -> int:
    if not work:
        return 0
    day = int(result.model.calendars.day_of(np.array([ledger]), np.array([position + work]))[0])
    return day - first_day


def analyse(case: Case, windows: Sequence[str] | None = None, half_step: bool | None = None) -> WindowsResult:
    """Windows analysis of a case, for the whole works and each section.

    Parameters
    ----------
    case : delay.model.Case
        The loaded case.
    windows : sequence of str, optional
        Boundary snapshots (folder names or labels), earliest first; default every
        snapshot, with the as-built record last when there is one.
    half_step : bool, optional
        Split each window into progress and revision effects; ``None`` takes the case's
        ``[analysis] half_step`` setting. Without it, each window's whole movement is
        charged along E's driving chain and no revisions are listed.

    Returns
    -------
    WindowsResult
        The whole works' windows and each section's.

    Raises
    ------
    delay.errors.CaseError
        Unknown or misordered boundary snapshots, fewer than two of them; the project's
        completion activity missing from a boundary.
    delay.errors.ReconciliationError
        When a window's charges do not sum to its movement, or the windows do not sum to
        the whole movement.

    Examples
    --------
    A small random case with two monthly updates and an as-built record makes three
    windows, which add up to the whole movement of completion:

    >>> import pathlib, tempfile
    >>> from delay.case import load_case
    >>> from delay.synth import synthesise
    >>> with tempfile.TemporaryDirectory() as folder:
    ...     case = load_case(synthesise(pathlib.Path(folder) / "case", 20, updates=2))
    >>> result = analyse(case, half_step=True)
    >>> len(result.windows)
    3
    >>> sum(w.movement_days for w in result.windows) == result.total_movement_days
    True
    >>> all(w.progress_days + w.revision_days == w.movement_days for w in result.windows)
    True

    References
    ----------
    AACE RP 29R-03 (2011), MIP 3.3 and 3.4; SCL Delay and Disruption Protocol, 2nd edition
    (2017), Part B, time slice windows analysis.
    """
    if half_step is None:
        half_step = case.settings.analysis.half_step
    key = ("windows", tuple(windows) if windows else None, bool(half_step))
    return remembered(case, key, lambda: _analyse(case, windows, bool(half_step)))


def _analyse(case: Case, windows: Sequence[str] | None, half_step: bool) -> WindowsResult:
    boundaries = _snapshots(case, windows)
    if len(boundaries) < 2:
        raise CaseError(
            Problem(
                file="snapshots/",
                message="a windows analysis needs at least two snapshots",
                fix="add a progress update or an as-built record",
            )
        )
    scheduler = _Scheduler(case)
    target = completion_activity(case)
    sections = case.sections
    section_targets = dict(zip(sections["section"].astype(str), sections["completion_activity"].astype(str)))
    targets = list(dict.fromkeys([target, *section_targets.values()]))
    marks = [_Boundary(s, scheduler.of(s)) for s in boundaries]
    overrides = attributions(case)
    per_target: dict[str, list[Window]] = {t: [] for t in targets}
    for number, (start, end) in enumerate(zip(marks[:-1], marks[1:]), start=1):
        # the one look-up of ids per window (none when they are the same); H has S's activities
        in_end = end.result.model.network.index_of(start.result.model.network.ids)
        deleted = tuple(sorted(np.asarray(start.result.model.network.ids, dtype=object)[in_end < 0].tolist()))
        if half_step:
            traced = _half_step_model(start.result.model, end.result.model, in_end).run()
            steps = _revision_steps(scheduler, traced, end.result, targets, in_end)
        else:
            traced = end.result
            steps = []
        for t, name in enumerate(targets):
            own = [(kind, changed, finish[t]) for kind, changed, finish in steps]
            found = _window(case, number, start, end, name, half_step, traced, own, overrides, deleted)
            if found is None:
                if name == target:
                    raise CaseError(
                        Problem(
                            file="case.toml",
                            column="completion_activity",
                            message=f"the completion activity '{name}' is not in snapshot '{start.snapshot.folder}' "
                            f"or '{end.snapshot.folder}'",
                            fix="name an activity every programme has in [project] completion_activity",
                        )
                    )
                per_target[name] = None
                continue
            if per_target[name] is not None:
                if t == 0:
                    found = dataclasses.replace(
                        found,
                        driving_start=tuple(start.result.driving_path()),
                        driving_half=tuple(traced.driving_path()) if half_step else (),
                        driving_end=tuple(end.result.driving_path()),
                    )
                per_target[name].append(found)
    out = per_target[target]
    first, last = out[0].completion_start, out[-1].completion_end
    result = WindowsResult(
        tuple(out),
        bool(half_step),
        first,
        last,
        target=target,
        ledger_calendar=marks[0].result.model.calendars.names[ledger_number(marks[0].result, target)],
        sections={
            section: tuple(per_target[name]) for section, name in section_targets.items() if per_target.get(name)
        },
        attributions=_attribution_table(out, overrides),
    )
    if sum(w.movement_days for w in out) != result.total_movement_days:
        raise ReconciliationError(
            "all windows",
            {"sum of windows": sum(w.movement_days for w in out), "total movement": result.total_movement_days},
        )
    return result


def _attribution_table(windows: Sequence[Window], overrides: pd.DataFrame) -> pd.DataFrame:
    """Each attribution applied, beside what the rule gave."""
    columns = ["window", "end", "activity", "days", "rule_party", "rule_events", "party", "events", "reason"]
    rows = []
    for w in windows:
        analyst = np.flatnonzero(w.charges["basis"].to_numpy(dtype=object) == "analyst")
        if not analyst.size:  # most windows: nothing to look through
            continue
        for record in w.charges.iloc[analyst].itertuples(index=False):
            rows.append(
                {
                    "window": w.number,
                    "end": w.end,
                    "activity": record.activity,
                    "days": int(record.days),
                    "rule_party": record.rule_party,
                    "rule_events": list(record.rule_events),
                    "party": record.party,
                    "events": list(record.events),
                    "reason": record.reason,
                }
            )
    unused = []
    if len(overrides):
        used = {(r["end"], r["activity"]) for r in rows}
        for record in overrides.itertuples(index=False):
            if (record.folder, record.activity) not in used:
                unused.append(record)
    for record in unused:
        rows.append(
            {
                "window": None,
                "end": record.folder,
                "activity": record.activity,
                "days": 0,
                "rule_party": "",
                "rule_events": [],
                "party": record.party,
                "events": [record.event] if record.event else [],
                "reason": f"{record.reason} (no charge on this activity in that window: not applied)",
            }
        )
    return pd.DataFrame(rows, columns=columns)


def _sentence(w: Window) -> str:
    """Window 4 (Update 03 to Update 04): completion moved 12 days later; ... ."""
    direction = "later" if w.movement_days > 0 else "earlier"
    head = f"Window {w.number} ({w.start_label} to {w.end_label})"
    if w.movement_days == 0 and not len(w.counted) and not (w.revisions["days"] != 0).any():
        return f"{head}: completion did not move."
    moved = (
        f"completion moved {_days(w.movement_days)} {direction}"
        if w.movement_days
        else "completion did not move overall"
    )
    parts = []
    counted = w.counted.assign(size=lambda f: f["days"].abs()).sort_values("size", ascending=False, kind="stable")
    for record in counted.head(3).itertuples(index=False):
        if not int(record.days) and not int(record.work_days):
            continue
        cause = _cause_words(record.events, record.party, record.basis, w.titles)
        verb = "drove it" if record.days > 0 else "recovered"
        parts.append(f"{record.activity} {verb} by {_days(int(record.days))} ({cause})")
    if len(counted) > 3:
        parts.append(f"{len(counted) - 3} more charges")
    for record in w.revisions.itertuples(index=False):
        if int(record.days):
            cause = _cause_words(record.events, record.party, record.basis, w.titles)
            parts.append(
                f"re-planning ({record.kind}) {'added' if record.days > 0 else 'saved'} "
                f"{_days(int(record.days))} ({cause})"
            )
    return f"{head}: {moved}" + (f"; {'; '.join(parts)}." if parts else ".")


def _days(count: int) -> str:
    count = abs(int(count))
    return f"{count} day" if count == 1 else f"{count} days"


def _cause_words(events, party, basis, titles) -> str:
    if basis == "analyst":
        return f"{', '.join(events) + ', ' if events else ''}{party}, the analyst's attribution"
    if events:
        return f"{', '.join(events)}, {party}"
    if basis == "risk":
        return f"no event; the activity is {party} risk"
    return f"no event; unexplained, {party} risk"
