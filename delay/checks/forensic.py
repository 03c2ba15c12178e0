"""Forensic checks of the records of one snapshot.

The quality metrics (:mod:`delay.checks.quality`) judge a programme as a plan; these
checks look for what a forensic reader of the records must know before relying on them:

``open_ends``
    Activities without any predecessor or without any successor, other than the project
    start and the project finish: of the activities without predecessors, a start
    milestone (the kind before a zero-duration task before a task; then the earliest to
    start), and of those without successors a finish milestone likewise (then the latest
    to finish); file order breaks a tie.
``dangling``
    Activities with logic whose start or finish the logic does not drive: a start with no
    finish-to-start or start-to-start link into it, or a finish with no finish-to-start or
    finish-to-finish link out of it (the project start's start and the project finish's
    finish are exempt). Milestones are one point that any link drives, so they are not
    listed; activities without any predecessor (or successor) are open ends instead.
``actual_date_changes``
    Actual dates reported in the previous snapshot that this one changes or clears (for
    the as-built snapshot: the as-built record against the last update).
``future_actuals``
    Actual dates on or after their own snapshot's data date: refused when the case is
    loaded, so reported as "checked at load".
``retrospective_edits``
    Actual dates in this snapshot that lie before the previous update's data date although
    that update did not report them (it gave another date, none, or did not hold the
    activity): work that update should have shown. Only a progress update counts as the
    previous report (the baseline reports no progress).
``out_of_sequence``
    Work started, at this snapshot, while a finish-to-start predecessor had not finished:
    the predecessor has no actual finish, or finished after the successor started (a
    successor starting on its predecessor's finish date counts; a start milestone is
    dated by the start of its day, a finish milestone by the end of its day). A positive
    lag is not considered; a link with a lead (negative lag) is left out, as the lead
    allows the overlap.
``redundant_links``
    Finish-to-start links implied by other links (:mod:`delay.checks.redundancy`).
``corrections``
    The analyst's disclosed corrections applied to this snapshot's records on load, each
    with the value it replaced.

Every check's ``items`` is a DataFrame with stable columns (:data:`ITEM_COLUMNS`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from ..convert import NO_DAY, json_records, table_dates
from ..cpm import COMPLETE, FINISH_MILESTONE, START_MILESTONE, STATUS_NAMES, TASK
from ..model import Case, Snapshot
from . import redundancy
from ._common import model_of, previous_snapshot, resolve, scheduled

__all__ = ["DataCheck", "data_checks", "DATA_CHECK_KEYS", "ITEM_COLUMNS"]

DATA_CHECK_KEYS = (
    "open_ends",
    "dangling",
    "actual_date_changes",
    "future_actuals",
    "retrospective_edits",
    "out_of_sequence",
    "redundant_links",
    "corrections",
)

#: Columns of each check's items.
ITEM_COLUMNS: dict[str, tuple[str, ...]] = {
    "open_ends": ("activity", "name", "status", "missing"),
    "dangling": ("activity", "name", "status", "dangling"),
    "actual_date_changes": ("activity", "column", "earlier_snapshot", "earlier_value", "later_value"),
    "future_actuals": ("activity", "column", "value"),
    "retrospective_edits": ("activity", "column", "value", "earlier_snapshot", "earlier_data_date", "earlier_value"),
    "out_of_sequence": ("pred", "succ", "lag", "succ_actual_start", "pred_actual_finish"),
    "redundant_links": ("pred", "succ", "lag", "via"),
    "corrections": ("table", "key", "column", "original", "corrected", "reason", "row"),
}

CHECKED, AT_LOAD, BOUNDED, LISTED = "checked", "checked at load", "bounded", "listed"


@dataclass(frozen=True)
class DataCheck:
    """One forensic check of a snapshot: what was found (``items``) and how far it looked.

    Parameters
    ----------
    key : str
        The check, one of :data:`DATA_CHECK_KEYS`.
    title : str
        Its title in plain words.
    status : str
        ``"checked"``, ``"checked at load"`` (the loader refuses the defect, so none can
        be present), ``"bounded"`` (the search was limited; ``note`` says how) or
        ``"listed"`` (a list for the reader, not a defect).
    items : pandas.DataFrame
        What was found, one row each, columns ``ITEM_COLUMNS[key]``.
    note : str, optional
        What the reader should know about the check's reach.

    Examples
    --------
    >>> import pandas as pd
    >>> check = DataCheck("open_ends", "Open ends", "checked", pd.DataFrame({"activity": ["A"]}))
    >>> check.count, check.to_json()["items"]
    (1, [{'activity': 'A'}])
    """

    key: str
    title: str
    status: str
    items: pd.DataFrame
    note: str = ""

    @property
    def count(self) -> int:
        """The number of items found."""
        return int(len(self.items))

    def to_json(self) -> dict:
        """The check as a dictionary ready for ``json.dumps`` (the form ``delay check`` prints).

        Returns
        -------
        dict
            ``key``, ``title``, ``status``, ``count``, ``note`` and ``items`` (one object
            per row).
        """
        return {
            "key": self.key,
            "title": self.title,
            "status": self.status,
            "count": self.count,
            "note": self.note,
            "items": json_records(self.items),
        }


def _frame(key: str, data: dict | pd.DataFrame | None) -> pd.DataFrame:
    columns = ITEM_COLUMNS[key]
    if data is None or (isinstance(data, dict) and not data):
        return pd.DataFrame({c: pd.Series([], dtype=object) for c in columns})
    return pd.DataFrame({c: data[c] for c in columns}).reset_index(drop=True)


def data_checks(case: Case, snapshot: str | Snapshot = "baseline") -> tuple[DataCheck, ...]:
    """The forensic checks of one snapshot, in :data:`DATA_CHECK_KEYS` order.

    Parameters
    ----------
    case : Case
        A loaded case.
    snapshot : str or Snapshot, optional
        Folder name, label, ``"asbuilt"``, or a :class:`~delay.model.Snapshot`. Checks that
        compare records (changes, retrospective edits) compare it with the snapshot before
        it (baseline, updates by data date, then the as-built snapshot).

    Returns
    -------
    tuple of DataCheck
        See the module docstring for what each finds.

    Raises
    ------
    CaseError
        For an unknown snapshot.
    """
    snap = resolve(case, snapshot)
    result = scheduled(case, snap)
    earlier = previous_snapshot(case, snap)
    start_number, finish_number = _project_ends(result)
    return (
        _open_ends(snap, result, start_number, finish_number),
        _dangling(snap, result, start_number, finish_number),
        _actual_date_changes(snap, earlier),
        DataCheck(
            "future_actuals",
            "Actual dates in the future of their data date",
            AT_LOAD,
            _frame("future_actuals", {}),
            "the loader refuses an actual date on or after its snapshot's data date",
        ),
        _retrospective_edits(snap, earlier),
        _out_of_sequence(snap, result),
        _redundant(case, snap),
        _corrections(case, snap),
    )


def _project_ends(result) -> tuple[int, int]:
    """Activity numbers of the project start and the project finish.

    Of the activities without predecessors, the start is a ``start_milestone`` before any
    other milestone before a task, then the earliest to start, then the first in the file;
    of those without successors, the finish is a ``finish_milestone`` before any other
    milestone before a task, then the latest to finish, then the first in the file.
    """
    net = result.model.network
    n = net.size
    if not n:
        return -1, -1
    no_pred = net.predecessor_count() == 0
    no_succ = net.successor_count() == 0
    start = result.day_array("early_start")
    finish = result.day_array("early_finish")
    kind = result.model.kind
    task = result.point == TASK
    start_rank = np.where(kind == START_MILESTONE, 0, np.where(task, 2, 1))
    finish_rank = np.where(kind == FINISH_MILESTONE, 0, np.where(task, 2, 1))
    rows = np.arange(n)
    starts = np.flatnonzero(no_pred)
    finishes = np.flatnonzero(no_succ)
    start_number = -1
    finish_number = -1
    if starts.size:
        start_number = int(starts[np.lexsort((rows[starts], start[starts], start_rank[starts]))[0]])
    if finishes.size:
        finish_number = int(finishes[np.lexsort((rows[finishes], -finish[finishes], finish_rank[finishes]))[0]])
    return start_number, finish_number


def _open_ends(snap: Snapshot, result, start_number: int, finish_number: int) -> DataCheck:
    net = result.model.network
    no_pred = net.predecessor_count() == 0
    no_succ = net.successor_count() == 0
    if start_number >= 0:
        no_pred[start_number] = False
    if finish_number >= 0:
        no_succ[finish_number] = False
    rows = np.flatnonzero(no_pred | no_succ)
    missing = np.where(
        no_pred[rows] & no_succ[rows], "predecessor and successor", np.where(no_pred[rows], "predecessor", "successor")
    ).astype(object)
    items = _frame(
        "open_ends",
        {
            "activity": net.ids[rows],
            "name": result.model.names[rows],
            "status": STATUS_NAMES[result.status[rows]],
            "missing": missing,
        },
    )
    ends = []
    if start_number >= 0:
        ends.append(f"project start {net.ids[start_number]}")
    if finish_number >= 0:
        ends.append(f"project finish {net.ids[finish_number]}")
    return DataCheck("open_ends", "Open ends", CHECKED, items, "taken as the ends of the logic: " + ", ".join(ends))


def _dangling(snap: Snapshot, result, start_number: int, finish_number: int) -> DataCheck:
    net = result.model.network
    n = net.size
    kind = net.link_type
    has_pred = net.predecessor_count() > 0
    has_succ = net.successor_count() > 0
    start_driven = np.bincount(net.succ[(kind == 0) | (kind == 1)], minlength=n) > 0
    finish_followed = np.bincount(net.pred[(kind == 0) | (kind == 2)], minlength=n) > 0
    task = result.point == TASK
    start_open = task & has_pred & ~start_driven
    finish_open = task & has_succ & ~finish_followed
    if start_number >= 0:
        start_open[start_number] = False
    if finish_number >= 0:
        finish_open[finish_number] = False
    rows = np.flatnonzero(start_open | finish_open)
    side = np.where(
        start_open[rows] & finish_open[rows], "start and finish", np.where(start_open[rows], "start", "finish")
    ).astype(object)
    items = _frame(
        "dangling",
        {
            "activity": net.ids[rows],
            "name": result.model.names[rows],
            "status": STATUS_NAMES[result.status[rows]],
            "dangling": side,
        },
    )
    return DataCheck(
        "dangling",
        "Dangling starts and finishes",
        CHECKED,
        items,
        "a start needs an FS or SS link into it, a finish an FS or FF link out of it",
    )


_ACTUAL_COLUMNS = ("actual_start", "actual_finish")


def _aligned_actuals(snap: Snapshot, earlier: Snapshot):
    """This snapshot's actual dates and the earlier snapshot's for the same ids
    (``NaT`` where the earlier one has no date or no such activity)."""
    now = snap.activities_table
    before = earlier.activities_table
    where = pd.Index(before["id"]).get_indexer(now["id"])
    present = where >= 0
    rows = np.maximum(where, 0)
    pairs = {}
    for column in _ACTUAL_COLUMNS:
        current = now[column].to_numpy(dtype="datetime64[D]")
        previous = (
            before[column].to_numpy(dtype="datetime64[D]")[rows]
            if len(before)
            else np.full(len(now), np.datetime64("NaT"), dtype="datetime64[D]")
        )
        previous = np.where(present, previous, np.datetime64("NaT"))
        pairs[column] = (current, previous)
    return now, present, pairs


def _actual_date_changes(snap: Snapshot, earlier: Snapshot | None) -> DataCheck:
    title = "Actual dates changed since the previous snapshot"
    if earlier is None:
        return DataCheck(
            "actual_date_changes",
            title,
            CHECKED,
            _frame("actual_date_changes", {}),
            "no earlier snapshot to compare with",
        )
    now, present, pairs = _aligned_actuals(snap, earlier)
    parts = []
    for column, (current, previous) in pairs.items():
        changed = present & ~np.isnat(previous) & (np.isnat(current) | (current != previous))
        rows = np.flatnonzero(changed)
        parts.append(
            pd.DataFrame(
                {
                    "activity": now["id"].to_numpy(dtype=object)[rows],
                    "column": column,
                    "earlier_snapshot": earlier.folder,
                    "earlier_value": table_dates(previous[rows]),
                    "later_value": table_dates(current[rows]),
                    "_row": rows,
                }
            )
        )
    items = pd.concat(parts, ignore_index=True).sort_values(["_row", "column"], kind="stable")
    note = f"against '{earlier.label}'"
    if snap.kind == "asbuilt":
        note = f"the as-built record against the last update '{earlier.label}'"
    return DataCheck("actual_date_changes", title, CHECKED, _frame("actual_date_changes", items), note)


def _retrospective_edits(snap: Snapshot, earlier: Snapshot | None) -> DataCheck:
    title = "Actual dates entered after their period (retrospective edits)"
    if earlier is None or earlier.kind != "update":
        return DataCheck(
            "retrospective_edits",
            title,
            CHECKED,
            _frame("retrospective_edits", {}),
            "no earlier progress update to compare with",
        )
    now, present, pairs = _aligned_actuals(snap, earlier)
    limit = np.datetime64(earlier.data_date, "D")
    parts = []
    for column, (current, previous) in pairs.items():
        entered = ~np.isnat(current) & (current < limit) & (np.isnat(previous) | (current != previous))
        rows = np.flatnonzero(entered)
        parts.append(
            pd.DataFrame(
                {
                    "activity": now["id"].to_numpy(dtype=object)[rows],
                    "column": column,
                    "value": table_dates(current[rows]),
                    "earlier_snapshot": earlier.folder,
                    "earlier_data_date": pd.Timestamp(earlier.data_date),
                    "earlier_value": table_dates(previous[rows]),
                    "_row": rows,
                }
            )
        )
    items = pd.concat(parts, ignore_index=True).sort_values(["_row", "column"], kind="stable")
    absent = int((~present).sum())
    note = f"dates before the data date {earlier.data_date} of '{earlier.label}' that it did not report"
    if absent:
        note += f"; {absent} activit{'y is' if absent == 1 else 'ies are'} not in '{earlier.label}'"
    return DataCheck("retrospective_edits", title, CHECKED, _frame("retrospective_edits", items), note)


def _out_of_sequence(snap: Snapshot, result) -> DataCheck:
    model = result.model
    net = model.network
    fs = np.flatnonzero((net.link_type == 0) & (net.lag >= 0))
    pred, succ = net.pred[fs], net.succ[fs]
    succ_start = model.actual_start[succ]
    started = succ_start != NO_DAY
    # The predecessor's finish and the successor's start as points in time: the start of
    # day D is 2D, the end of day D is 2D + 1.
    pred_finished = result.status[pred] == COMPLETE
    pred_date = np.where(pred_finished & (model.actual_finish[pred] != NO_DAY), model.actual_finish[pred], 0)
    pred_point = 2 * pred_date + (result.point[pred] != START_MILESTONE)
    succ_point = 2 * np.where(started, succ_start, 0) + (result.point[succ] == FINISH_MILESTONE)
    wrong = started & (~pred_finished | (pred_point > succ_point))
    rows = fs[wrong]
    finish = model.actual_finish[net.pred[rows]]
    items = _frame(
        "out_of_sequence",
        {
            "pred": net.ids[net.pred[rows]],
            "succ": net.ids[net.succ[rows]],
            "lag": net.lag[rows],
            "succ_actual_start": table_dates(model.actual_start[net.succ[rows]]),
            "pred_actual_finish": table_dates(finish),
        },
    )
    return DataCheck(
        "out_of_sequence",
        "Out-of-sequence progress",
        CHECKED,
        items,
        "successors started before a finish-to-start predecessor (lag >= 0) finished",
    )


def _redundant(case: Case, snap: Snapshot) -> DataCheck:
    model = model_of(case, snap)
    net = model.network
    limit = redundancy.EXACT_REDUNDANCY_LIMIT
    found = redundancy.redundant_links(net, model.duration, exact_limit=limit)
    rows = np.flatnonzero(found.redundant)
    items = _frame(
        "redundant_links",
        {
            "pred": net.ids[net.pred[rows]],
            "succ": net.ids[net.succ[rows]],
            "lag": net.lag[rows],
            "via": net.ids[found.via[rows]],
        },
    )
    if found.exact:
        return DataCheck(
            "redundant_links",
            "Redundant links",
            CHECKED,
            items,
            "finish-to-start links implied by a path of finish-to-start links with lags >= 0 "
            "(every path length searched)",
        )
    return DataCheck(
        "redundant_links",
        "Redundant links",
        BOUNDED,
        items,
        f"bounded: only paths of two links were searched, as the programme has {net.size} "
        f"activities (every path length is searched up to {limit})",
    )


def _corrections(case: Case, snap: Snapshot) -> DataCheck:
    name = "asbuilt" if snap.kind == "asbuilt" else snap.label
    own = [c for c in case.corrections if c.snapshot == name]
    items = _frame(
        "corrections",
        {
            "table": [c.table for c in own],
            "key": [c.key for c in own],
            "column": [c.column for c in own],
            "original": [c.original for c in own],
            "corrected": [c.corrected for c in own],
            "reason": [c.reason for c in own],
            "row": [c.row for c in own],
        }
        if own
        else {},
    )
    return DataCheck(
        "corrections",
        "Disclosed corrections applied on load",
        LISTED,
        items,
        "corrections.csv rows for this snapshot, with the value each replaced",
    )
