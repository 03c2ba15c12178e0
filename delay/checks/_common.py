"""What the check families share: finding snapshots, scheduling each once, JSON-ready values.

A check never reloads the case or rebuilds a snapshot's network twice: :func:`scheduled`
keeps, per loaded case, the compiled model and the schedule of every snapshot it has been
asked for. A loaded :class:`~delay.model.Case` never changes, so what is kept stays right
for as long as the case lives (the store is a weak mapping: it goes with the case).
"""

from __future__ import annotations

import datetime as dt
import weakref

import numpy as np

from ..contract import completion_in_force
from ..cpm import ScheduleModel, ScheduleResult, calendars_of, prepare
from ..errors import CaseError, Problem
from ..model import Case, Snapshot

__all__ = [
    "resolve",
    "ordered_snapshots",
    "previous_snapshot",
    "scheduled",
    "model_of",
    "contract_completion_in_force",
    "link_keys",
]

_MODELS: weakref.WeakKeyDictionary[Case, dict[str, ScheduleModel]] = weakref.WeakKeyDictionary()
_RESULTS: weakref.WeakKeyDictionary[Case, dict[str, ScheduleResult]] = weakref.WeakKeyDictionary()


def resolve(case: Case, snapshot: str | Snapshot) -> Snapshot:
    """The snapshot named by folder or label (``"asbuilt"`` for the as-built record).

    Parameters
    ----------
    case : Case
        The loaded case.
    snapshot : str or Snapshot
        A folder name under snapshots/, a snapshot's label, ``"asbuilt"``, or a
        :class:`Snapshot` (returned as it is).

    Returns
    -------
    Snapshot
        The snapshot; a folder name is matched before a label (see
        :meth:`delay.model.Case.snapshot`).

    Raises
    ------
    CaseError
        When the case has no snapshot of that name; the message lists the known folders.
    """
    if isinstance(snapshot, Snapshot):
        return snapshot
    try:
        return case.snapshot(str(snapshot))
    except KeyError as error:
        raise CaseError(
            Problem(
                file="snapshots/",
                message=str(error.args[0]),
                fix="name a folder under snapshots/, a snapshot's label, or asbuilt",
            )
        ) from None


def ordered_snapshots(case: Case) -> list[Snapshot]:
    """Baseline, updates by data date, then the as-built snapshot when the case has one.

    Parameters
    ----------
    case : Case
        The loaded case.

    Returns
    -------
    list of Snapshot
        The case's snapshots in that order.
    """
    snapshots = list(case.snapshots)
    if case.asbuilt_snapshot is not None:
        snapshots.append(case.asbuilt_snapshot)
    return snapshots


def previous_snapshot(case: Case, snap: Snapshot) -> Snapshot | None:
    """The snapshot just before ``snap`` in :func:`ordered_snapshots` order.

    Parameters
    ----------
    case : Case
        The loaded case.
    snap : Snapshot
        One of the case's snapshots (or its as-built snapshot).

    Returns
    -------
    Snapshot or None
        The one before (for the as-built snapshot, the last update); ``None`` for the
        first snapshot or a snapshot not of the case (matched by folder and kind).
    """
    snapshots = ordered_snapshots(case)
    for position, other in enumerate(snapshots):
        if other.folder == snap.folder and other.kind == snap.kind:
            return snapshots[position - 1] if position else None
    return None


def model_of(case: Case, snap: Snapshot) -> ScheduleModel:
    """The snapshot compiled once for scheduling (case settings, the case's calendars).

    The model is kept for as long as the case lives; asking again returns the same one.

    Parameters
    ----------
    case : Case
        The loaded case.
    snap : Snapshot
        One of the case's snapshots (or its as-built snapshot).

    Returns
    -------
    ScheduleModel
        :func:`delay.cpm.prepare` of the snapshot with the case's calendars.

    Raises
    ------
    CaseError
        When the snapshot's network cannot be compiled (a loop in its logic, an unknown
        calendar); a loaded case has been checked for both.
    """
    models = _MODELS.setdefault(case, {})
    key = _key(snap)
    if key not in models:
        models[key] = prepare(case, snap, calendars=calendars_of(case))
    return models[key]


def scheduled(case: Case, snap: Snapshot) -> ScheduleResult:
    """The schedule of a snapshot under the case's own settings, computed once per case.

    Parameters
    ----------
    case : Case
        The loaded case.
    snap : Snapshot
        One of the case's snapshots (or its as-built snapshot).

    Returns
    -------
    ScheduleResult
        ``model_of(case, snap).run()``, kept for as long as the case lives.

    Raises
    ------
    CaseError
        When the snapshot's network cannot be compiled (a loop in its logic, an unknown
        calendar); a loaded case has been checked for both.
    """
    results = _RESULTS.setdefault(case, {})
    key = _key(snap)
    if key not in results:
        results[key] = model_of(case, snap).run()
    return results[key]


def _key(snap: Snapshot) -> str:
    return f"{snap.kind}:{snap.folder}"


def contract_completion_in_force(case: Case, at: dt.date | None = None) -> dt.date:
    """The contract completion date in force for the whole of the works at ``at``.

    Parameters
    ----------
    case : Case
        The loaded case.
    at : datetime.date or None, optional
        Count the extensions granted on or before this date; ``None`` counts every grant.

    Returns
    -------
    datetime.date
        case.toml's ``contract_completion`` plus the calendar days of the extensions
        granted by then for the whole works (:func:`delay.contract.completion_in_force`).
    """
    return completion_in_force(case, at=at)[2]


def link_keys(pred: np.ndarray, succ: np.ndarray) -> list[str]:
    """Links written ``pred>succ``, the case format's key of a link (corrections.csv).

    Parameters
    ----------
    pred : numpy.ndarray
        The predecessors' activity ids.
    succ : numpy.ndarray
        The successors' activity ids, one per predecessor.

    Returns
    -------
    list of str
        One ``pred>succ`` key per link.

    Examples
    --------
    >>> import numpy as np
    >>> link_keys(np.array(["A", "B"]), np.array(["B", "C"]))
    ['A>B', 'B>C']
    """
    return [f"{p}>{s}" for p, s in zip(pred, succ)]
