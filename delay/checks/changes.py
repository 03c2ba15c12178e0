"""What changed from one snapshot to another.

Changes hidden in an update - a shortened duration, a deleted link, a moved constraint -
are where many delay disputes turn, and a windows analysis applies the revisions of each
window one kind at a time. :func:`compare` lists every change between two snapshots as one
DataFrame with a ``kind`` column; :meth:`Comparison.revisions` hands out the revisions of one
step in the fixed order :data:`REVISION_ORDER` (deletions, additions, durations, logic,
calendars, constraints), and :meth:`Comparison.of` any kinds.

Kinds of change (:data:`CHANGE_KINDS`):

- ``activity_deleted``, ``activity_added``: an id in one snapshot only.
- ``name_changed``: the description.
- ``duration_changed``: the planned (original) duration.
- ``remaining_changed``: a re-estimate of work not started in either snapshot: its
  remaining duration (the planned duration where none is given) differs, and at least one
  of the snapshots gives a remaining duration (otherwise the change is a duration change).
- ``kind_changed``: task, start milestone or finish milestone (applied with the durations).
- ``calendar_changed``, ``constraint_changed`` (the constraint or its date).
- ``link_deleted``, ``link_added``, ``link_changed`` (type or lag); a link is keyed by its
  predecessor and successor. ``end_added_or_deleted`` marks a link whose end activity is
  itself added or deleted (it comes and goes with that activity).
- ``progress``: progress recorded between the two: an actual start or finish that is new or
  different (``field`` says which), and the remaining duration of work in progress in the
  later snapshot. Progress is not a revision.

``before`` and ``after`` are text (``""`` for none): durations in work days, dates ISO, a
link as ``TYPE LAG``, a constraint as ``kind date``. Each change also says whether it
touches the driving path (:meth:`delay.cpm.ScheduleResult.driving_path`) of the earlier
snapshot, of the later one, or either: an activity change when the activity lies on that
path, a link change when both its ends do (a link with one end on the path, such as every
link into the finish milestone, does not lie along it).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from ..convert import json_records, text_cell
from ..model import Case, Snapshot
from ._common import resolve, scheduled

__all__ = ["Comparison", "compare", "CHANGE_KINDS", "CHANGE_COLUMNS", "REVISION_ORDER", "REVISION_KINDS"]

CHANGE_KINDS = (
    "activity_deleted",
    "activity_added",
    "name_changed",
    "duration_changed",
    "remaining_changed",
    "kind_changed",
    "calendar_changed",
    "constraint_changed",
    "link_deleted",
    "link_added",
    "link_changed",
    "progress",
)
#: The steps in which a windows analysis applies a window's revisions, in order.
REVISION_ORDER = ("deletions", "additions", "durations", "logic", "calendars", "constraints")
#: The kinds of change each revision step applies.
REVISION_KINDS: dict[str, tuple[str, ...]] = {
    "deletions": ("activity_deleted",),
    "additions": ("activity_added",),
    "durations": ("duration_changed", "remaining_changed", "kind_changed"),
    "logic": ("link_deleted", "link_added", "link_changed"),
    "calendars": ("calendar_changed",),
    "constraints": ("constraint_changed",),
}
CHANGE_COLUMNS = (
    "kind",
    "activity",
    "pred",
    "succ",
    "field",
    "before",
    "after",
    "end_added_or_deleted",
    "driving_earlier",
    "driving_later",
    "touches_driving_path",
)


@dataclass(frozen=True)
class Comparison:
    """Every change from snapshot ``earlier`` to snapshot ``later``, as :func:`compare` finds them.

    Parameters
    ----------
    earlier : str
        The earlier snapshot's label.
    later : str
        The later snapshot's label.
    earlier_folder : str
        The earlier snapshot's folder name.
    later_folder : str
        The later snapshot's folder name.
    changes : pandas.DataFrame
        Columns :data:`CHANGE_COLUMNS`, one row per change, grouped by kind in
        :data:`CHANGE_KINDS` order (see the module docstring).

    Examples
    --------
    >>> import pandas as pd
    >>> rows = [("link_added", "", "A", "B", "link", "", "FS 0", False, False, True, True)]
    >>> found = Comparison("Baseline", "June", "baseline", "2025-06", pd.DataFrame(rows, columns=CHANGE_COLUMNS))
    >>> found.counts()["link_added"], len(found.revisions("logic")), len(found.of("activity_added"))
    (1, 1, 0)
    """

    earlier: str
    later: str
    earlier_folder: str
    later_folder: str
    changes: pd.DataFrame

    def of(self, *kinds: str) -> pd.DataFrame:
        """The changes of the given kinds (a copy; index renumbered).

        Parameters
        ----------
        *kinds : str
            Kinds of change, each one of :data:`CHANGE_KINDS`.

        Returns
        -------
        pandas.DataFrame
            The rows of :attr:`changes` of those kinds, in their order there.

        Raises
        ------
        ValueError
            When a kind is not one of :data:`CHANGE_KINDS`.
        """
        unknown = set(kinds) - set(CHANGE_KINDS)
        if unknown:
            raise ValueError(f"unknown kind(s) of change: {', '.join(sorted(unknown))}")
        return self.changes[self.changes["kind"].isin(kinds)].reset_index(drop=True)

    def revisions(self, step: str) -> pd.DataFrame:
        """The revisions a windows analysis applies at ``step``.

        Parameters
        ----------
        step : str
            One of :data:`REVISION_ORDER`; its kinds are :data:`REVISION_KINDS`.

        Returns
        -------
        pandas.DataFrame
            The changes of the step's kinds (see :meth:`of`).

        Raises
        ------
        ValueError
            When ``step`` is not one of :data:`REVISION_ORDER`.
        """
        if step not in REVISION_KINDS:
            raise ValueError(f"unknown revision step '{step}' (use one of: {', '.join(REVISION_ORDER)})")
        return self.of(*REVISION_KINDS[step])

    def counts(self) -> dict[str, int]:
        """Number of changes of each kind (every kind listed, zero included).

        Returns
        -------
        dict of str to int
            The count of each kind of :data:`CHANGE_KINDS`, in that order.
        """
        found = self.changes["kind"].value_counts()
        return {kind: int(found.get(kind, 0)) for kind in CHANGE_KINDS}

    def to_json(self) -> dict:
        """The comparison as a dictionary ready for ``json.dumps``.

        Returns
        -------
        dict
            ``earlier_snapshot`` and ``later_snapshot`` (folders), ``earlier_label`` and
            ``later_label``, ``counts`` (:meth:`counts`) and ``changes`` (one object per
            row of :attr:`changes`).
        """
        return {
            "earlier_snapshot": self.earlier_folder,
            "earlier_label": self.earlier,
            "later_snapshot": self.later_folder,
            "later_label": self.later,
            "counts": self.counts(),
            "changes": json_records(self.changes),
        }


def _text(values) -> np.ndarray:
    return np.asarray([text_cell(v) for v in values], dtype=object)


def compare(case: Case, earlier: str | Snapshot, later: str | Snapshot) -> Comparison:
    """Every change from snapshot ``earlier`` to snapshot ``later``.

    Parameters
    ----------
    case : Case
        A loaded case.
    earlier : str or Snapshot
        The earlier snapshot: a folder name, a label, ``"asbuilt"``, or a
        :class:`~delay.model.Snapshot`.
    later : str or Snapshot
        The later snapshot, in the same forms.

    Returns
    -------
    Comparison
        See the module docstring for the kinds of change and the columns. Durations are
        in work days; each snapshot is scheduled once (and kept) to find its driving path.

    Raises
    ------
    CaseError
        For an unknown snapshot.

    Examples
    --------
    >>> changes = compare(demo, "baseline", "2025-06-30")  # the demo case
    >>> changes.revisions("additions")["activity"].tolist()
    ['SUB-OBSTRUCTIONS']
    """
    first, second = resolve(case, earlier), resolve(case, later)
    path_before = pd.Index(scheduled(case, first).driving_path())
    path_after = pd.Index(scheduled(case, second).driving_path())
    a, b = first.activities_table, second.activities_table
    in_b = pd.Index(b["id"]).get_indexer(a["id"])
    in_a = pd.Index(a["id"]).get_indexer(b["id"])
    parts: list[pd.DataFrame] = []

    def activity_rows(kind: str, ids, field: str, before, after) -> None:
        parts.append(
            pd.DataFrame(
                {
                    "kind": kind,
                    "activity": np.asarray(ids, dtype=object),
                    "pred": "",
                    "succ": "",
                    "field": field,
                    "before": _text(before),
                    "after": _text(after),
                    "end_added_or_deleted": False,
                }
            )
        )

    deleted = np.flatnonzero(in_b < 0)
    added = np.flatnonzero(in_a < 0)
    activity_rows(
        "activity_deleted",
        a["id"].to_numpy(dtype=object)[deleted],
        "",
        a["name"].to_numpy()[deleted],
        [""] * deleted.size,
    )
    activity_rows(
        "activity_added", b["id"].to_numpy(dtype=object)[added], "", [""] * added.size, b["name"].to_numpy()[added]
    )

    # Activities in both, in the later snapshot's order.
    later_rows = np.flatnonzero(in_a >= 0)
    earlier_rows = in_a[later_rows]
    ids = b["id"].to_numpy(dtype=object)[later_rows]

    def pair(column: str):
        return a[column].to_numpy()[earlier_rows], b[column].to_numpy()[later_rows]

    for kind, column in (("name_changed", "name"), ("duration_changed", "duration")):
        before, after = pair(column)
        changed = before != after
        activity_rows(kind, ids[changed], column, before[changed], after[changed])

    start_a, start_b = pair("actual_start")
    finish_a, finish_b = pair("actual_finish")
    remaining_a, remaining_b = pair("remaining")
    duration_a, duration_b = pair("duration")
    not_started_a = pd.isna(start_a) & pd.isna(finish_a)
    not_started_b = pd.isna(start_b) & pd.isna(finish_b)
    left_a = np.where(np.isnan(remaining_a.astype(float)), duration_a, remaining_a)
    left_b = np.where(np.isnan(remaining_b.astype(float)), duration_b, remaining_b)
    given = ~np.isnan(remaining_a.astype(float)) | ~np.isnan(remaining_b.astype(float))
    re_estimated = not_started_a & not_started_b & given & (left_a != left_b)
    activity_rows("remaining_changed", ids[re_estimated], "remaining", left_a[re_estimated], left_b[re_estimated])

    before, after = pair("kind")
    changed = before != after
    activity_rows("kind_changed", ids[changed], "kind", before[changed], after[changed])

    before, after = pair("calendar")
    changed = before != after
    activity_rows("calendar_changed", ids[changed], "calendar", before[changed], after[changed])

    kind_a, kind_b = pair("constraint")
    date_a, date_b = pair("constraint_date")
    kind_a = pd.Series(kind_a, dtype=object).fillna("").to_numpy()
    kind_b = pd.Series(kind_b, dtype=object).fillna("").to_numpy()
    same_date = (pd.isna(date_a) & pd.isna(date_b)) | (date_a == date_b)
    changed = np.flatnonzero((kind_a != kind_b) | ~same_date)
    activity_rows(
        "constraint_changed",
        ids[changed],
        "constraint",
        [_constraint(kind_a[i], date_a[i]) for i in changed],
        [_constraint(kind_b[i], date_b[i]) for i in changed],
    )

    parts.extend(_link_changes(first, second, set(a["id"].to_numpy()[deleted]) | set(b["id"].to_numpy()[added])))
    parts.append(_progress(a, b, in_a))

    changes = pd.concat(parts, ignore_index=True)
    changes["kind"] = pd.Categorical(changes["kind"], categories=list(CHANGE_KINDS))
    changes = changes.sort_values("kind", kind="stable").reset_index(drop=True)
    changes["kind"] = changes["kind"].astype(str)
    changes["end_added_or_deleted"] = changes["end_added_or_deleted"].astype(bool)
    is_link = (changes["pred"] != "").to_numpy()
    for column, path in (("driving_earlier", path_before), ("driving_later", path_after)):
        activity_on = path.get_indexer(changes["activity"].to_numpy(dtype=object)) >= 0
        pred_on = path.get_indexer(changes["pred"].to_numpy(dtype=object)) >= 0
        succ_on = path.get_indexer(changes["succ"].to_numpy(dtype=object)) >= 0
        changes[column] = np.where(is_link, pred_on & succ_on, activity_on)
    changes["touches_driving_path"] = changes["driving_earlier"] | changes["driving_later"]
    return Comparison(first.label, second.label, first.folder, second.folder, changes[list(CHANGE_COLUMNS)].copy())


def _constraint(kind, date) -> str:
    kind = "" if kind is None or (isinstance(kind, float) and np.isnan(kind)) else str(kind)
    if not kind:
        return ""
    return f"{kind} {text_cell(date)}".strip()


def _link_numbers(first: Snapshot, second: Snapshot) -> tuple[np.ndarray, np.ndarray]:
    """One integer key per link of each snapshot, ``pred * N + succ`` over the activity
    numbers of both snapshots together (``N`` of them)."""
    ids_a = first.activities_table["id"]
    ids_b = second.activities_table["id"]
    together = pd.Index(pd.concat([ids_a, ids_b], ignore_index=True).unique())
    size = np.int64(len(together))
    keys = []
    for snap, ids in ((first, ids_a), (second, ids_b)):
        number = together.get_indexer(ids).astype(np.int64)
        pred, succ = snap.link_numbers
        keys.append(number[pred] * size + number[succ])
    return keys[0], keys[1]


def _link_text(frame: pd.DataFrame, where: np.ndarray) -> np.ndarray:
    kinds = frame["type"].to_numpy(dtype=object)[where]
    lags = frame["lag"].to_numpy()[where]
    return np.asarray([f"{k} {int(g)}" for k, g in zip(kinds, lags)], dtype=object)


def _link_changes(first: Snapshot, second: Snapshot, changed_activities: set) -> list[pd.DataFrame]:
    la, lb = first.links_table, second.links_table
    key_a, key_b = _link_numbers(first, second)
    in_b = pd.Index(key_b).get_indexer(key_a)
    in_a = pd.Index(key_a).get_indexer(key_b)

    def rows(kind, frame, where, before, after, field):
        pred = frame["pred"].to_numpy(dtype=object)[where]
        succ = frame["succ"].to_numpy(dtype=object)[where]
        ends = np.asarray([p in changed_activities or s in changed_activities for p, s in zip(pred, succ)], dtype=bool)
        return pd.DataFrame(
            {
                "kind": kind,
                "activity": "",
                "pred": pred,
                "succ": succ,
                "field": field,
                "before": before,
                "after": after,
                "end_added_or_deleted": ends,
            }
        )

    deleted = np.flatnonzero(in_b < 0)
    added = np.flatnonzero(in_a < 0)
    both = np.flatnonzero(in_a >= 0)
    earlier_rows = in_a[both]
    type_changed = la["type"].to_numpy(dtype=object)[earlier_rows] != lb["type"].to_numpy(dtype=object)[both]
    lag_changed = la["lag"].to_numpy()[earlier_rows] != lb["lag"].to_numpy()[both]
    changed = type_changed | lag_changed
    field = np.where(type_changed & lag_changed, "type and lag", np.where(type_changed, "type", "lag")).astype(object)
    return [
        rows("link_deleted", la, deleted, _link_text(la, deleted), np.full(deleted.size, "", dtype=object), "link"),
        rows("link_added", lb, added, np.full(added.size, "", dtype=object), _link_text(lb, added), "link"),
        rows(
            "link_changed",
            lb,
            both[changed],
            _link_text(la, earlier_rows[changed]),
            _link_text(lb, both[changed]),
            field[changed],
        ),
    ]


def _progress(a: pd.DataFrame, b: pd.DataFrame, in_a: np.ndarray) -> pd.DataFrame:
    """Progress recorded between the snapshots, one row per field, in the later order."""
    present = in_a >= 0
    rows = np.maximum(in_a, 0)
    ids = b["id"].to_numpy(dtype=object)
    frames = []
    positions = []
    for column in ("actual_start", "actual_finish"):
        after = b[column].to_numpy(dtype="datetime64[D]")
        before = np.where(
            present, a[column].to_numpy(dtype="datetime64[D]")[rows] if len(a) else after, np.datetime64("NaT")
        )
        new = ~np.isnat(after) & (np.isnat(before) | (after != before))
        cleared = np.isnat(after) & ~np.isnat(before)
        where = np.flatnonzero(new | cleared)
        frames.append(
            pd.DataFrame(
                {
                    "kind": "progress",
                    "activity": ids[where],
                    "pred": "",
                    "succ": "",
                    "field": column,
                    "before": _text(before[where]),
                    "after": _text(after[where]),
                    "end_added_or_deleted": False,
                }
            )
        )
        positions.append(where)
    in_progress = ~pd.isna(b["actual_start"].to_numpy()) & pd.isna(b["actual_finish"].to_numpy())
    remaining_b = b["remaining"].to_numpy(dtype=float)
    started_a = ~pd.isna(a["actual_start"].to_numpy())[rows] if len(a) else np.zeros(len(b), bool)
    remaining_a = a["remaining"].to_numpy(dtype=float)[rows] if len(a) else np.full(len(b), np.nan)
    duration_a = a["duration"].to_numpy()[rows] if len(a) else np.zeros(len(b))
    left_a = np.where(present, np.where(np.isnan(remaining_a) & ~started_a, duration_a, remaining_a), np.nan)
    changed = in_progress & ~(left_a == remaining_b)
    where = np.flatnonzero(changed)
    frames.append(
        pd.DataFrame(
            {
                "kind": "progress",
                "activity": ids[where],
                "pred": "",
                "succ": "",
                "field": "remaining",
                "before": _text(left_a[where]),
                "after": _text(remaining_b[where]),
                "end_added_or_deleted": False,
            }
        )
    )
    positions.append(where)
    frame = pd.concat(frames, ignore_index=True)
    order = np.argsort(np.concatenate(positions), kind="stable")
    return frame.iloc[order].reset_index(drop=True)
