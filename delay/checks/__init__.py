"""Is each programme fit to use, and what changed between them?

Four families of checks, run before any delay method is trusted:

- :func:`quality_metrics` - the fourteen-point schedule assessment of one snapshot
  (DCMA-EA PAM 200.1, October 2012, section 4, thresholds as recalled), each metric with
  its count, denominator, percentage, threshold, verdict and offending activities;
- :func:`data_checks` - forensic checks of the records: open ends, dangling starts and
  finishes, actual dates that change between updates or are entered after their period,
  out-of-sequence progress, redundant links, and the analyst's disclosed corrections;
- :func:`compare` - every change from one snapshot to another, with the order in which a
  windows analysis applies the revisions (:data:`REVISION_ORDER`);
- :func:`element_checks` - model elements against the programme: unlinked elements,
  unmodelled activities, suspected duplicate elements.

:func:`check_snapshot` gathers the first, second and fourth for one snapshot in the JSON form
of ``delay check``; :func:`run_all` does it for every snapshot and compares each snapshot
with the one before.

Example
-------
On the demo case (``demo``, loaded from case_demo/ for the doctests):

>>> from delay.checks import quality_metrics, compare
>>> quality_metrics(demo, "2025-06-30")[["key", "passed"]].head(3)
     key  passed
0  logic    True
1  leads   False
2   lags   False
>>> counts = compare(demo, "2025-05-31", "2025-06-30").counts()
>>> counts["activity_added"], counts["link_added"], counts["progress"]
(1, 2, 10)
"""

from __future__ import annotations

from typing import Any

from ..model import Case, Snapshot
from ._common import contract_completion_in_force, ordered_snapshots, resolve, scheduled
from .changes import CHANGE_COLUMNS, CHANGE_KINDS, REVISION_KINDS, REVISION_ORDER, Comparison, compare
from .elements import ElementChecks, element_checks
from .forensic import DATA_CHECK_KEYS, DataCheck, data_checks
from .quality import METRIC_COLUMNS, METRIC_KEYS, Metric, metric_list, quality_metrics
from .redundancy import Redundancy, redundant_links

__all__ = [
    "quality_metrics",
    "metric_list",
    "data_checks",
    "compare",
    "element_checks",
    "check_snapshot",
    "run_all",
    "adopt_checks",
    "contract_completion_in_force",
    "Metric",
    "DataCheck",
    "Comparison",
    "ElementChecks",
    "Redundancy",
    "redundant_links",
    "METRIC_KEYS",
    "METRIC_COLUMNS",
    "DATA_CHECK_KEYS",
    "CHANGE_KINDS",
    "CHANGE_COLUMNS",
    "REVISION_ORDER",
    "REVISION_KINDS",
]


def check_snapshot(case: Case, snapshot: str | Snapshot = "baseline") -> dict[str, Any]:
    """Every check of one snapshot, ready for ``json.dumps`` (the form ``delay check`` prints).

    Parameters
    ----------
    case : Case
        A loaded case.
    snapshot : str or Snapshot, optional
        Folder name, label, ``"asbuilt"``, or a Snapshot.

    Returns
    -------
    dict
        ``snapshot`` (the folder), ``label``, ``kind``, ``data_date``, ``completion`` (forecast),
        ``completion_in_force`` (at its data date), ``metrics`` (one object per metric of
        :data:`METRIC_KEYS`: ``key, title, count, denominator, percent, threshold, passed,
        activities, unit, note``), ``data_checks`` (one object per check of
        :data:`DATA_CHECK_KEYS`: ``key, title, status, count, note, items``) and
        ``elements`` (``unlinked_elements``, ``unmodelled_activities``, ``duplicates``).

    Raises
    ------
    CaseError
        For an unknown snapshot, or one that cannot be scheduled.

    Examples
    --------
    >>> import tempfile
    >>> from pathlib import Path
    >>> from delay.synth import synthesise
    >>> folder = tempfile.TemporaryDirectory()
    >>> from delay.case import load_case
    >>> case = load_case(synthesise(Path(folder.name) / "case", activities=12, updates=1))
    >>> checks = check_snapshot(case, "u01")
    >>> checks["kind"], len(checks["metrics"]), [c["key"] for c in checks["data_checks"]][:2]
    ('update', 14, ['open_ends', 'dangling'])
    >>> folder.cleanup()
    """
    snap = resolve(case, snapshot)
    result = scheduled(case, snap)
    return {
        "snapshot": snap.folder,
        "label": snap.label,
        "kind": snap.kind,
        "data_date": snap.data_date.isoformat(),
        "completion": result.completion.isoformat(),
        "completion_in_force": contract_completion_in_force(case, at=snap.data_date).isoformat(),
        "metrics": [m.to_json() for m in metric_list(case, snap)],
        "data_checks": [c.to_json() for c in data_checks(case, snap)],
        "elements": element_checks(case, snap).to_json(),
    }


def run_all(case: Case) -> dict[str, Any]:
    """Every check of every snapshot, and each snapshot compared with the one before.

    Parameters
    ----------
    case : Case
        A loaded case.

    Returns
    -------
    dict
        Ready for ``json.dumps``: ``project``, ``completion_in_force`` (every grant),
        ``snapshots`` (a :func:`check_snapshot` object per snapshot: baseline, updates by
        data date, then the as-built snapshot when there is one) and ``comparisons`` (the
        :meth:`Comparison.to_json` of each snapshot against the one before it). Computed
        once per loaded case (``delay demo`` and the report both ask for it); each call
        hands out its own copy.

    Raises
    ------
    CaseError
        When a snapshot cannot be scheduled.

    Examples
    --------
    >>> import tempfile
    >>> from pathlib import Path
    >>> from delay.synth import synthesise
    >>> folder = tempfile.TemporaryDirectory()
    >>> from delay.case import load_case
    >>> case = load_case(synthesise(Path(folder.name) / "case", activities=12, updates=1))
    >>> everything = run_all(case)
    >>> [s["snapshot"] for s in everything["snapshots"]], len(everything["comparisons"])
    (['baseline', 'u01', 'asbuilt'], 2)
    >>> folder.cleanup()
    """
    import copy

    from ..memo import remembered

    return copy.deepcopy(remembered(case, ("checks",), lambda: _run_all(case)))


def adopt_checks(case: Case, found: dict[str, Any]) -> None:
    """Take the result of :func:`run_all` made in another process as this case's.

    ``delay demo`` runs the checks on its second core from the same case files: the checks
    are pure functions of the case, so the result is the one this process would compute.
    A result already known for the case is kept.

    Parameters
    ----------
    case : Case
        A loaded case.
    found : dict
        What :func:`run_all` gave for the same case in the other process.

    Raises
    ------
    ValueError
        When ``found`` is not a result of :func:`run_all`.
    """
    from ..memo import remembered

    if set(found) != {"project", "completion_in_force", "snapshots", "comparisons"}:
        raise ValueError(f"not a result of the checks: {sorted(found)}")
    remembered(case, ("checks",), lambda: found)


def _run_all(case: Case) -> dict[str, Any]:
    snapshots = ordered_snapshots(case)
    return {
        "project": case.settings.project.name,
        "completion_in_force": contract_completion_in_force(case).isoformat(),
        "snapshots": [check_snapshot(case, snap) for snap in snapshots],
        "comparisons": [compare(case, earlier, later).to_json() for earlier, later in zip(snapshots, snapshots[1:])],
    }
