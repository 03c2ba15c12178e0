"""Windows analysis with half-steps.

The contemporaneous programmes cut the project into windows, one per pair of boundary
snapshots (by default every consecutive pair: baseline, each update, and the as-built record
where there is one). For each window from snapshot S to snapshot E the method measures how
far the forecast completion moved and splits the movement in two with a *half-step* H:

- H is S's programme (activities, durations, logic, constraints) brought to E's data date
  with E's progress (actual dates and remaining durations) for every activity of S that E
  shows as started. Not-started activities keep S's durations: a re-estimate is a revision,
  not progress. Activities deleted in E stay in H, unprogressed, and are flagged; activities
  added in E are not in H.
- progress effect = completion(H) - completion(S); revision effect = completion(E) -
  completion(H).

The progress effect is charged to the activities on H's driving path, traced back through
actual dates to the first activity already complete at S (or the project start). Each is
charged its lateness (its finish in H less its late finish in S, calendar days) less the
lateness of its driving predecessor; lateness below ``min(0, progress effect)`` counts as
that minimum and the path's origin counts as zero, so the charges telescope exactly to the
progress effect: float absorbed off the critical path is not charged, a gain is a negative
charge, and successors that only inherit a delay are charged nothing - except that, the
charges being in calendar days, a shift that carries a successor across a different number
of non-working days shows as a small charge or credit on it (a five-day calendar's weekends;
the charges along the path still add up exactly). Late finishes in S are
taken from a backward pass from S's own completion, whatever ``float_to`` says, and the
activity that finishes at completion in H is taken as late by exactly the progress effect
(its late finish in S is S's completion whenever it has no successor).

Where several paths drive at once (tied driving predecessors), the chain counted in the
reconciliation takes, at each tie, the predecessor with the greatest lateness, then an FS
link, then input order; the activities of the other tied paths are listed with their own
charges as a concurrent group beside the stretch of the counted chain they run parallel to,
and the group counts once, at its largest charge (the counted chain's).

The revision effect is charged by applying E's changes to H one kind at a time, in the
fixed order deletions, additions, durations (planned and remaining durations, activity kind),
logic, calendars, constraints, and charging each kind the change in completion it makes. A
final step "other" takes whatever else differs (for example progress S recorded that E no
longer shows) so that the steps end exactly at E.

Reconciliation: in every window the counted progress charges plus the revision charges equal
the movement, to the day, and the windows add up to the movement from the first snapshot to
the last. A failure raises :class:`delay.errors.ReconciliationError`.

References
----------
AACE International Recommended Practice 29R-03, Forensic Schedule Analysis (2011), MIP 3.3
(observational / dynamic / contemporaneous as-is) and MIP 3.4 (observational / dynamic /
contemporaneous split, the half-step or bifurcated analysis). Society of Construction Law
Delay and Disruption Protocol, 2nd edition (2017), Part B, time slice windows analysis.

Assumptions
-----------
The updates are the contemporaneous programmes as issued (after the analyst's disclosed
corrections); their logic is taken as the contractor's plan at the time. The half-step
isolates progress from revisions; it does not judge whether a revision was reasonable.
"""

from __future__ import annotations

import dataclasses
import datetime as dt
from dataclasses import dataclass
from typing import Sequence

import numpy as np
import pandas as pd

from ..calendars import CalendarSet
from ..causation import match_events
from ..cpm import COMPLETE, NO_DAY, ScheduleResult, calendars_of, prepare
from ..errors import CaseError, Problem, ReconciliationError
from ..model import Case, Snapshot
from ..tracing import explore

__all__ = ["analyse", "Window", "WindowsResult", "REVISION_KINDS", "progress_charges", "half_step_snapshot"]

#: The order in which a window's revisions are applied and charged.
REVISION_KINDS = ("deletions", "additions", "durations", "logic", "calendars", "constraints")

_DURATION_COLUMNS = ("duration", "remaining", "kind")
_CONSTRAINT_COLUMNS = ("constraint", "constraint_date")
_PROGRESS_COLUMNS = ("actual_start", "actual_finish", "remaining")

CHARGE_COLUMNS = ["activity", "name", "days", "lateness", "counted", "group", "concurrent_with",
                  "events", "parties", "party", "risk"]
REVISION_COLUMNS = ["kind", "activities", "days", "completion_after"]


@dataclass(frozen=True)
class Window:
    """One window of the analysis. Days are calendar days; positive is delay."""

    number: int
    start: str
    end: str
    start_label: str
    end_label: str
    start_data_date: dt.date
    end_data_date: dt.date
    completion_start: dt.date
    completion_half: dt.date | None
    completion_end: dt.date
    movement_days: int
    movement_work_days: int
    progress_days: int
    revision_days: int
    charges: pd.DataFrame
    revisions: pd.DataFrame
    driving_start: tuple[str, ...]
    driving_half: tuple[str, ...]
    driving_end: tuple[str, ...]
    deleted_in_end: tuple[str, ...]

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

    def to_json(self) -> dict:
        charged = self.charges[(self.charges["days"] != 0) | self.charges["group"].notna()]
        return {
            "start": self.start,
            "end": self.end,
            "completion_start": self.completion_start.isoformat(),
            "completion_end": self.completion_end.isoformat(),
            "movement_days": self.movement_days,
            "movement_work_days": self.movement_work_days,
            "progress_days": self.progress_days,
            "revision_days": self.revision_days,
            "charged": [
                {"activity": r.activity, "days": int(r.days), "concurrent_with": list(r.concurrent_with),
                 "events": list(r.events), "party": r.party}
                for r in charged.itertuples(index=False)
            ],
            "revisions": [
                {"kind": r.kind, "activities": list(r.activities), "days": int(r.days)}
                for r in self.revisions.itertuples(index=False)
            ],
        }


@dataclass(frozen=True)
class WindowsResult:
    """All windows of one analysis."""

    windows: tuple[Window, ...]
    half_step: bool
    first_completion: dt.date
    last_completion: dt.date

    @property
    def total_movement_days(self) -> int:
        return (self.last_completion - self.first_completion).days

    @property
    def table(self) -> pd.DataFrame:
        """One row per window: boundaries, completions, movement and its split."""
        rows = [{
            "window": w.number, "start": w.start, "end": w.end, "start_data_date": w.start_data_date,
            "end_data_date": w.end_data_date, "completion_start": w.completion_start,
            "completion_half": w.completion_half, "completion_end": w.completion_end,
            "movement_days": w.movement_days, "movement_work_days": w.movement_work_days,
            "progress_days": w.progress_days, "revision_days": w.revision_days,
        } for w in self.windows]
        return pd.DataFrame(rows)

    @property
    def charges(self) -> pd.DataFrame:
        """Every window's charges (progress and revisions) in one table, with a ``window``
        and a ``source`` column (``progress`` or the revision kind)."""
        frames = []
        for w in self.windows:
            progress = w.charges.assign(window=w.number, start=w.start, end=w.end, source="progress")
            frames.append(progress)
            if len(w.revisions):
                revisions = pd.DataFrame({
                    "window": w.number, "start": w.start, "end": w.end, "source": w.revisions["kind"],
                    "activity": [", ".join(a) for a in w.revisions["activities"]], "days": w.revisions["days"],
                    "counted": True,
                })
                frames.append(revisions)
        if not frames:
            return pd.DataFrame(columns=["window", "start", "end", "source", *CHARGE_COLUMNS])
        return pd.concat(frames, ignore_index=True)

    def to_json(self) -> dict:
        return {"windows": [w.to_json() for w in self.windows], "total_movement_days": self.total_movement_days}


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
            raise CaseError(Problem(file="--windows", message=f"no snapshot '{name}'",
                                    fix=f"name boundary snapshots among: {known}")) from None
    positions = [sequence.index(s) for s in chosen]
    if len(chosen) < 2 or positions != sorted(set(positions)):
        raise CaseError(Problem(file="--windows", message="window boundaries must be two or more snapshots in data-date order",
                                fix="list the boundary snapshots from the earliest to the latest"))
    return chosen


def _date(day: int) -> dt.date:
    return dt.date(1970, 1, 1) + dt.timedelta(days=int(day))


def _started(activities: pd.DataFrame) -> np.ndarray:
    return (activities["actual_start"].notna() | activities["actual_finish"].notna()).to_numpy()


def _variant(base: Snapshot, tag: str, label: str, data_date: dt.date, activities: pd.DataFrame,
             links: pd.DataFrame) -> Snapshot:
    return Snapshot(folder=f"{base.folder}~{tag}", label=label, data_date=data_date, kind="update",
                    activities_table=activities.reset_index(drop=True), links_table=links.reset_index(drop=True))


def half_step_snapshot(start: Snapshot, end: Snapshot) -> Snapshot:
    """S's programme with E's data date and E's progress for the activities E shows started."""
    activities = start.activities
    progress = end.activities.set_index("id")
    started_in_end = set(progress.index[_started(progress.reset_index())])
    rows = activities["id"].isin(started_in_end).to_numpy()
    if rows.any():
        ids = activities.loc[rows, "id"]
        for column in _PROGRESS_COLUMNS:
            activities[column] = activities[column].astype(progress[column].dtype)
            activities.loc[rows, column] = progress.loc[ids, column].to_numpy()
    return _variant(start, f"progress-to-{end.folder}", f"{start.label} progressed to {end.label}",
                    end.data_date, activities, start.links)


def progress_charges(result: ScheduleResult, lateness: np.ndarray, stop: np.ndarray, effect: int) -> pd.DataFrame:
    """Charges of a delay (or gain) of ``effect`` calendar days along the driving path.

    Parameters
    ----------
    result: the schedule whose completion moved (the half-step, usually).
    lateness: calendar days per activity (aligned with ``result``): finish in ``result`` less
        the late finish before; ``NaN`` where unknown (the activity then passes on its driving
        predecessor's lateness and is charged nothing).
    stop: activities where the trace ends (complete before the window): they count as zero.
    effect: the movement to explain.

    Returns
    -------
    DataFrame with ``activity, name, days, lateness, counted, group, concurrent_with`` (one
    row per activity explored; ``counted`` marks the chain whose charges sum to ``effect``).
    """
    net = result.model.network
    finish = result.finish_day
    seeds = np.flatnonzero(finish == result.completion_day)
    empty = pd.DataFrame(columns=["activity", "name", "days", "lateness", "counted", "group", "concurrent_with"])
    if not seeds.size:
        return empty
    graph = explore(result, seeds, stop)
    floor = min(0, effect)
    nodes = sorted(set(graph.parents) | set(graph.stopped), key=lambda v: net.rank[v])
    level: dict[int, float] = {}
    best_parent: dict[int, int | None] = {}
    for v in nodes:
        if v in graph.stopped:
            level[v] = 0.0
            best_parent[v] = None
            continue
        parents = [p for p, _, _ in graph.parents[v] if p in level]
        chosen = None
        if parents:  # the greatest lateness; among equals the first in tie order
            top = max(level[p] for p in parents)
            chosen = next(p for p in parents if level[p] == top)
        best_parent[v] = chosen
        if np.isnan(lateness[v]):
            level[v] = level[chosen] if chosen is not None else 0.0
        else:
            level[v] = float(max(lateness[v], floor))
    seed = int(max(seeds, key=lambda v: (net.rank[v], -v)))
    level[seed] = float(effect)
    chain = [seed]
    while best_parent.get(chain[-1]) is not None:
        chain.append(best_parent[chain[-1]])
    chain.reverse()
    counted = set(chain)
    charge: dict[int, float] = {}
    previous = 0.0
    for v in chain:
        charge[v] = level[v] - previous
        previous = level[v]
    for v in nodes:
        if v not in counted:
            parent = best_parent.get(v)
            charge[v] = level[v] - (level[parent] if parent is not None else 0.0)
    # concurrent groups: connected stretches of activities off the counted chain
    position = {v: i for i, v in enumerate(chain)}
    group_of: dict[int, int] = {}
    groups: list[list[int]] = []
    off = [v for v in nodes if v not in counted and v not in graph.stopped]
    neighbours: dict[int, set[int]] = {v: set() for v in off}
    for v in off:
        for p, _, _ in graph.parents.get(v, []):
            if p in neighbours:
                neighbours[v].add(p)
                neighbours[p].add(v)
    for v in off:
        if v in group_of:
            continue
        members, pending = [], [v]
        while pending:
            x = pending.pop()
            if x in group_of:
                continue
            group_of[x] = len(groups)
            members.append(x)
            pending.extend(neighbours[x] - set(group_of))
        groups.append(members)
    concurrent: dict[int, set[int]] = {v: set() for v in nodes}
    group_number: dict[int, int] = {}
    diverge: list[list[int]] = [[] for _ in groups]
    merge: list[list[int]] = [[] for _ in groups]
    for v in off:
        for p, _, _ in graph.parents.get(v, []):
            if p in position:
                diverge[group_of[v]].append(position[p])
    for v in chain:
        for p, _, _ in graph.parents.get(v, []):
            if p in group_of:
                merge[group_of[p]].append(position[v])
    seed_set = set(int(x) for x in seeds)
    reported = 0
    for number, members in enumerate(groups):
        if any(v in seed_set for v in members):
            merge[number].append(len(chain))
        low = max(diverge[number]) + 1 if diverge[number] else 0
        high = min(merge[number]) if merge[number] else len(chain)
        stretch = chain[low:high] if high > low else []
        everyone = members + stretch
        if all(charge[v] == 0 for v in everyone):
            continue
        reported += 1
        for v in everyone:
            group_number[v] = reported
            concurrent[v] |= set(everyone) - {v}
    ids = net.ids
    rows = []
    for v in chain + [v for v in nodes if v not in counted]:
        rows.append({
            "activity": str(ids[v]), "name": result.model.names[v], "days": int(round(charge[v])),
            "lateness": int(round(level[v])), "counted": v in counted,
            "group": group_number.get(v), "concurrent_with": sorted(str(ids[x]) for x in concurrent[v]),
        })
    frame = pd.DataFrame(rows, columns=empty.columns)
    frame["group"] = frame["group"].astype("Int64")
    return frame


class _Scheduler:
    """Schedules snapshots of one case with shared calendars."""

    def __init__(self, case: Case):
        self.case = case
        self.calendars: CalendarSet = calendars_of(case)
        self.settings = case.settings.schedule

    def run(self, snapshot: Snapshot, **changes) -> ScheduleResult:
        settings = dataclasses.replace(self.settings, **changes) if changes else self.settings
        return prepare(self.case, snapshot, settings, calendars=self.calendars).run()


def _lateness(result: ScheduleResult, start_ids: np.ndarray, start_late_finish: np.ndarray) -> np.ndarray:
    """Finish in ``result`` less the late finish in S (calendar days), by id; NaN if absent."""
    late = pd.Series(start_late_finish, index=pd.Index(start_ids))
    aligned = late.reindex(result.ids).to_numpy(dtype=np.float64)
    aligned[aligned == float(NO_DAY)] = np.nan
    return result.finish_day - aligned


def _apply_revisions(scheduler: _Scheduler, half: Snapshot, end: Snapshot, half_result: ScheduleResult,
                     end_result: ScheduleResult) -> pd.DataFrame:
    """Charge each kind of revision its change in completion, H -> ... -> E."""
    activities = half.activities
    links = half.links
    end_acts = end.activities
    end_links = end.links
    end_ids = set(end_acts["id"])
    half_ids = set(activities["id"])
    rows = []
    completion = half_result.completion_day

    def step(kind: str, changed: list[str], new_acts: pd.DataFrame, new_links: pd.DataFrame):
        nonlocal completion, activities, links
        activities, links = new_acts.reset_index(drop=True), new_links.reset_index(drop=True)
        if not changed:
            return
        snapshot = _variant(end, kind, f"{end.label}: {kind} applied", end.data_date, activities, links)
        result = scheduler.run(snapshot)
        rows.append({"kind": kind, "activities": sorted(changed), "days": int(result.completion_day - completion),
                     "completion_after": _date(result.completion_day)})
        completion = result.completion_day

    deleted = sorted(half_ids - end_ids)
    keep = activities["id"].isin(end_ids)
    step("deletions", deleted, activities[keep],
         links[links["pred"].isin(end_ids) & links["succ"].isin(end_ids)])

    added = sorted(end_ids - half_ids)
    new_rows = end_acts[end_acts["id"].isin(added)]
    present = set(activities["id"]) | set(added)
    touching = end_links[(end_links["pred"].isin(added) | end_links["succ"].isin(added))
                         & end_links["pred"].isin(present) & end_links["succ"].isin(present)]
    step("additions", added, pd.concat([activities, new_rows], ignore_index=True),
         pd.concat([links, touching], ignore_index=True))

    def reassign(columns, kind):
        current = activities.set_index("id")
        target = end_acts.set_index("id").reindex(current.index)
        changed = []
        for column in columns:
            a, b = current[column], target[column]
            differs = ~((a == b) | (a.isna() & b.isna())).to_numpy()
            changed += list(current.index[differs])
            current[column] = b.to_numpy() if len(b) else current[column]
        step(kind, sorted(set(changed)), current.reset_index(), links)

    reassign(_DURATION_COLUMNS, "durations")

    def link_keys(frame):
        return set(zip(*(frame[c].to_numpy(dtype=object) for c in ("pred", "succ", "type", "lag"))))

    before, after = link_keys(links), link_keys(end_links)
    changed_links = sorted({f"{p}>{s}" for p, s, _, _ in before ^ after})
    step("logic", changed_links, activities, end_links)
    reassign(("calendar",), "calendars")
    reassign(_CONSTRAINT_COLUMNS, "constraints")
    if completion != end_result.completion_day:
        rows.append({"kind": "other", "activities": [], "days": int(end_result.completion_day - completion),
                     "completion_after": _date(end_result.completion_day)})
    return pd.DataFrame(rows, columns=REVISION_COLUMNS)


def analyse(case: Case, windows: Sequence[str] | None = None, half_step: bool | None = None) -> WindowsResult:
    """Windows analysis of a case.

    Parameters
    ----------
    case: the loaded case.
    windows: boundary snapshots (folder names or labels), earliest first; default every
        snapshot, with the as-built record last when there is one.
    half_step: split each window into progress and revision effects; ``None`` takes the
        case's ``[analysis] half_step`` setting. Without it, each window's whole movement is
        charged along E's driving path and no revisions are listed.

    Returns
    -------
    WindowsResult

    Raises
    ------
    CaseError: unknown or misordered boundary snapshots.
    ReconciliationError: when a window's charges do not sum to its movement.

    Examples
    --------
    >>> result = analyse(load_case("case_demo"))      # doctest: +SKIP
    >>> result.table[["start", "end", "movement_days"]]   # doctest: +SKIP
    """
    if half_step is None:
        half_step = case.settings.analysis.half_step
    boundaries = _snapshots(case, windows)
    if len(boundaries) < 2:
        raise CaseError(Problem(file="snapshots/", message="a windows analysis needs at least two snapshots",
                                fix="add a progress update or an as-built record"))
    scheduler = _Scheduler(case)
    default = scheduler.calendars[case.settings.schedule.default_calendar]
    results = {s.folder: scheduler.run(s) for s in boundaries}
    lateness_base = {}
    for s in boundaries[:-1]:
        own = results[s.folder]
        if scheduler.settings.float_to != "project_finish":
            own = scheduler.run(s, float_to="project_finish")
        lateness_base[s.folder] = (own.ids, own.day_array("late_finish"))
    out = []
    for number, (start, end) in enumerate(zip(boundaries[:-1], boundaries[1:]), start=1):
        s_result, e_result = results[start.folder], results[end.folder]
        movement = int(e_result.completion_day - s_result.completion_day)
        work_days = int(default.finish_index_days(np.array([e_result.completion_day]))[0]
                        - default.finish_index_days(np.array([s_result.completion_day]))[0])
        start_done = set(start.activities["id"][s_result.status == COMPLETE])
        ids, late_finish = lateness_base[start.folder]
        if half_step:
            half = half_step_snapshot(start, end)
            h_result = scheduler.run(half)
            progress = int(h_result.completion_day - s_result.completion_day)
            traced = h_result
        else:
            half = None
            h_result = None
            progress = movement
            traced = e_result
        stop = np.isin(traced.ids, list(start_done))
        charges = progress_charges(traced, _lateness(traced, ids, late_finish), stop, progress)
        if len(charges):
            linked = match_events(case, charges["activity"], end.data_date - dt.timedelta(days=1))
            charges = pd.concat([charges.reset_index(drop=True), linked.drop(columns="activity")], axis=1)
        else:
            charges = pd.DataFrame(columns=CHARGE_COLUMNS)
        if half_step:
            revisions = _apply_revisions(scheduler, half, end, h_result, e_result)
        else:
            revisions = pd.DataFrame(columns=REVISION_COLUMNS)
        revision = movement - progress
        counted = int(charges.loc[charges["counted"].astype(bool), "days"].sum()) if len(charges) else 0
        revision_sum = int(revisions["days"].sum()) if len(revisions) else 0
        where = f"window {number} ({start.folder} to {end.folder})"
        if counted != progress:
            raise ReconciliationError(where, {"progress charges": counted, "progress effect": progress})
        if revision_sum != revision:
            raise ReconciliationError(where, {"revision charges": revision_sum, "revision effect": revision})
        deleted = tuple(sorted(set(start.activities["id"]) - set(end.activities["id"])))
        out.append(Window(
            number=number, start=start.folder, end=end.folder, start_label=start.label, end_label=end.label,
            start_data_date=start.data_date, end_data_date=end.data_date,
            completion_start=s_result.completion, completion_half=h_result.completion if h_result else None,
            completion_end=e_result.completion, movement_days=movement, movement_work_days=work_days,
            progress_days=progress, revision_days=revision, charges=charges[CHARGE_COLUMNS].reset_index(drop=True),
            revisions=revisions, driving_start=tuple(s_result.driving_path()),
            driving_half=tuple(h_result.driving_path()) if h_result else (),
            driving_end=tuple(e_result.driving_path()), deleted_in_end=deleted,
        ))
    first, last = results[boundaries[0].folder], results[boundaries[-1].folder]
    result = WindowsResult(tuple(out), bool(half_step), first.completion, last.completion)
    if sum(w.movement_days for w in out) != result.total_movement_days:
        raise ReconciliationError("all windows", {"sum of windows": sum(w.movement_days for w in out),
                                                  "total movement": result.total_movement_days})
    return result

