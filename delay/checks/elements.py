"""Checks of the link between the building model's elements and the programme.

An element is linked to the activities that share its ``wbs`` code (case-format v1,
elements.csv). Three things spoil an element timeline:

- *unlinked elements*: an element whose ``wbs`` matches no activity of any snapshot (a
  typing slip, a work package that does not exist);
- *unmodelled activities*: an activity with a ``wbs`` that no element carries;
- *suspected duplicates*: elements of the same classification whose boxes agree within
  :data:`DUPLICATE_TOLERANCE_METRES` (1 mm) on every one of ``x, y, z, dx, dy, dz`` - the
  common-practice case of one element copied into the same place several times. Copies are
  grouped: elements are joined when two agree within the tolerance, and a group holds all
  that are joined directly or through others. Elements without a complete box are not
  compared. The same id given twice is refused when the case is loaded ("checked at load").

The tolerance search is exact: boxes agreeing within 1 mm on every coordinate share a cell
of at least one of 64 grids of 2.5 mm cells (each coordinate's grid either as is or shifted
by half a cell), and every pair sharing a cell is measured.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from ..convert import json_records
from ..memo import remembered
from ..model import Case, Snapshot
from ._common import ordered_snapshots, resolve

__all__ = ["ElementChecks", "element_checks", "DUPLICATE_TOLERANCE_METRES", "BOX_COLUMNS"]

#: Boxes that agree within this distance on every coordinate are the same place.
DUPLICATE_TOLERANCE_METRES = 0.001
BOX_COLUMNS = ("x", "y", "z", "dx", "dy", "dz")
_CELL_MILLIMETRES = 2.5  # at least twice the tolerance, so a half-cell shift catches every pair
_MEASURE_SLACK = 1e-9  # metres: the decimal-to-binary error of coordinates read from text


@dataclass(frozen=True)
class ElementChecks:
    """Findings of the element checks.

    Parameters
    ----------
    unlinked_elements : pandas.DataFrame
        ``element, name, wbs, classification`` of elements whose wbs matches no activity
        of any snapshot, in elements.csv order.
    unmodelled_activities : pandas.DataFrame
        ``activity, name, wbs, snapshot`` (the folder) of activities with a wbs that no
        element carries (the snapshot where the pair is first seen).
    duplicates : pandas.DataFrame
        ``group, element, name, classification, x, y, z, dx, dy, dz`` (box in metres):
        one row per element of each group of suspected duplicates (groups numbered from 1
        in file order of their first element, which is taken as the original).
    note : str, optional
        What the checks could not do (no elements in the case); ``""`` otherwise.

    Examples
    --------
    >>> import pandas as pd
    >>> box = dict(x=0.0, y=0.0, z=0.0, dx=1.0, dy=1.0, dz=3.0)
    >>> copies = pd.DataFrame([dict(group=1, element="C1", name="column", classification="IfcColumn", **box),
    ...                        dict(group=1, element="C1b", name="column", classification="IfcColumn", **box)])
    >>> found = ElementChecks(pd.DataFrame(), pd.DataFrame(), copies)
    >>> found.duplicate_groups()
    [['C1', 'C1b']]
    """

    unlinked_elements: pd.DataFrame
    unmodelled_activities: pd.DataFrame
    duplicates: pd.DataFrame
    note: str = ""

    def duplicate_groups(self) -> list[list[str]]:
        """The ids of each group of suspected duplicates, original first.

        Returns
        -------
        list of list of str
            One list of element ids per group, groups in number order.
        """
        return [list(group["element"]) for _, group in self.duplicates.groupby("group", sort=True)]

    def to_json(self) -> dict:
        """The findings as a dictionary ready for ``json.dumps`` (the form ``delay check`` prints).

        Returns
        -------
        dict
            ``unlinked_elements`` and ``unmodelled_activities`` (each ``count``, ``items``
            and ``note``) and ``duplicates`` (``count`` of groups, ``copies`` beyond each
            group's original, ``groups`` with their ``elements``, ``classification`` and
            ``box``, and ``note``).
        """
        groups = []
        for _, group in self.duplicates.groupby("group", sort=True):
            first = group.iloc[0]
            groups.append(
                {
                    "elements": [str(i) for i in group["element"]],
                    "classification": str(first["classification"]),
                    "box": [float(first[c]) for c in BOX_COLUMNS],
                }
            )
        return {
            "unlinked_elements": {
                "count": len(self.unlinked_elements),
                "items": json_records(self.unlinked_elements),
                "note": "elements whose wbs matches no activity of any snapshot",
            },
            "unmodelled_activities": {
                "count": len(self.unmodelled_activities),
                "items": json_records(self.unmodelled_activities),
                "note": self.note or "activities with a wbs that no element carries",
            },
            "duplicates": {
                "count": len(groups),
                "copies": int(len(self.duplicates) - len(groups)),
                "groups": groups,
                "duplicate_ids": "checked at load",
                "note": "same classification and the same box within 1 mm",
            },
        }


def element_checks(case: Case, snapshot: str | Snapshot | None = None) -> ElementChecks:
    """Check the model elements against the programme.

    Parameters
    ----------
    case : Case
        A loaded case.
    snapshot : str or Snapshot or None, optional
        Whose activities are checked for a model element (folder, label, ``"asbuilt"`` or
        a Snapshot); ``None`` checks every snapshot's. Unlinked elements are always judged
        against the activities of every snapshot.

    Returns
    -------
    ElementChecks
        The unlinked elements, the unmodelled activities and the suspected duplicates.

    Raises
    ------
    CaseError
        For an unknown snapshot.
    """
    elements = case.elements
    snapshots = ordered_snapshots(case)
    chosen = [resolve(case, snapshot)] if snapshot is not None else snapshots
    wbs = elements["wbs"].astype(str)
    unlinked, duplicates = remembered(case, ("element checks of the case",), lambda: _of_the_case(case, snapshots))

    note = ""
    rows = []
    if len(elements):
        carried = pd.Index(wbs.unique())
        for snap in chosen:
            table = snap.activities_table
            codes = table["wbs"].astype(str)
            missing = (codes != "").to_numpy() & (carried.get_indexer(codes) < 0)
            found = table.loc[missing, ["id", "name", "wbs"]].rename(columns={"id": "activity"})
            found["snapshot"] = snap.folder
            rows.append(found)
    else:
        note = "not applicable: the case has no model elements"
    if rows:
        unmodelled = pd.concat(rows, ignore_index=True).drop_duplicates(["activity", "wbs"], keep="first")
    else:
        unmodelled = pd.DataFrame({c: pd.Series([], dtype=object) for c in ("activity", "name", "wbs", "snapshot")})
    return ElementChecks(unlinked.copy(), unmodelled.reset_index(drop=True), duplicates.copy(), note)


def _of_the_case(case: Case, snapshots) -> tuple[pd.DataFrame, pd.DataFrame]:
    """What does not depend on the snapshot checked, found once per case: the elements whose
    wbs no activity of any snapshot carries, and the suspected duplicates."""
    elements = case.elements
    programme_codes = set()
    for snap in snapshots:
        programme_codes.update(snap.activities_table["wbs"].to_numpy(dtype=object))
    programme_codes.discard("")
    wbs = elements["wbs"].astype(str)
    unlinked = elements.loc[~wbs.isin(programme_codes).to_numpy(), ["id", "name", "wbs", "classification"]]
    unlinked = unlinked.rename(columns={"id": "element"}).reset_index(drop=True)
    return unlinked, _duplicates(elements)


def _duplicates(elements: pd.DataFrame) -> pd.DataFrame:
    columns = ["group", "element", "name", "classification", *BOX_COLUMNS]
    n = len(elements)
    if n < 2:
        return pd.DataFrame({c: pd.Series([], dtype=object) for c in columns})
    box = elements[list(BOX_COLUMNS)].to_numpy(dtype=np.float64)
    complete = np.isfinite(box).all(axis=1)
    classification = elements["classification"].astype(str).to_numpy(dtype=object)
    rows = np.flatnonzero(complete)
    parent = np.arange(n)

    def find(i: int) -> int:
        while parent[i] != i:
            parent[i] = parent[parent[i]]
            i = parent[i]
        return i

    def join(i: int, j: int) -> None:
        ri, rj = find(i), find(j)
        if ri != rj:
            parent[max(ri, rj)] = min(ri, rj)

    # Exact copies first: one representative each.
    codes = pd.factorize(classification[rows])[0]
    exact = pd.DataFrame(box[rows], columns=list(BOX_COLUMNS)).assign(_class=codes)
    same = exact.groupby(["_class", *BOX_COLUMNS], sort=False).ngroup().to_numpy()
    first_of = pd.Series(rows).groupby(same).transform("min").to_numpy()
    for i, j in zip(rows[first_of != rows], first_of[first_of != rows]):
        join(int(i), int(j))
    representatives = rows[first_of == rows]
    rep_codes = pd.factorize(classification[representatives])[0].astype(np.int64)
    millimetres = box[representatives] * 1000.0
    multipliers = np.array(
        [
            0x9E3779B97F4A7C15,
            0xC2B2AE3D27D4EB4F,
            0x165667B19E3779F9,
            0x27D4EB2F165667C5,
            0x85EBCA77C2B2AE63,
            0xFF51AFD7ED558CCD,
            0xC4CEB9FE1A85EC53,
        ],
        dtype=np.uint64,
    )
    cells = [
        np.floor(millimetres / _CELL_MILLIMETRES).astype(np.int64),
        np.floor(millimetres / _CELL_MILLIMETRES + 0.5).astype(np.int64),
    ]
    limit = DUPLICATE_TOLERANCE_METRES + _MEASURE_SLACK
    with np.errstate(over="ignore"):
        base = rep_codes.astype(np.uint64) * multipliers[6]
        for shifts in range(64):
            key = base.copy()
            for d in range(6):
                cell = cells[(shifts >> d) & 1][:, d].astype(np.uint64)
                key ^= (cell + np.uint64(d + 1)) * multipliers[d]
                key = (key << np.uint64(13)) | (key >> np.uint64(51))
            repeated = pd.Series(key).duplicated(keep=False).to_numpy()
            if not repeated.any():
                continue
            # Elements sharing a cell of this grid: measure every pair of them.
            for members in pd.Series(representatives[repeated]).groupby(key[repeated]).agg(list):
                for a in range(len(members)):
                    for b in range(a + 1, len(members)):
                        i, j = int(members[a]), int(members[b])
                        if classification[i] == classification[j] and (np.abs(box[i] - box[j]) <= limit).all():
                            join(i, j)
    roots = np.asarray([find(i) for i in range(n)])
    sizes = np.bincount(roots, minlength=n)
    grouped = np.flatnonzero(sizes[roots] > 1)
    if not grouped.size:
        return pd.DataFrame({c: pd.Series([], dtype=object) for c in columns})
    first_rows = roots[grouped]  # the root is the group's first row
    numbers = pd.factorize(first_rows, sort=True)[0] + 1
    frame = elements.iloc[grouped][["id", "name", "classification", *BOX_COLUMNS]].reset_index(drop=True)
    frame = frame.rename(columns={"id": "element"})
    frame.insert(0, "group", numbers)
    return frame.sort_values(["group"], kind="stable").reset_index(drop=True)
