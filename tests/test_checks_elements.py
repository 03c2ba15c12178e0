"""Model-link checks of elements, and the demo case's planted record defects.

Sources: shared/case-format.md, elements.csv ("two elements with the same box and
classification are a suspected duplicate"; an element belongs to the activities sharing its
wbs). One element copied several times into the same place is the common-practice defect
the duplicate check exists for. The demo case lists its planted defects in
case_demo/KNOWN_DEFECTS.json; the checks must find those and no others.
"""

from __future__ import annotations

import itertools
import json
import subprocess
import sys
from pathlib import Path

import pytest
from casewriter import write_case

from delay.case import load_case
from delay.checks import data_checks, element_checks

DEMO = Path(__file__).resolve().parent.parent / "case_demo"


def element(element_id, wbs, classification, x, y=0.0, z=0.0, dx=0.9, dy=0.1, dz=2.1):
    return {
        "id": element_id,
        "name": f"Element {element_id}",
        "wbs": wbs,
        "classification": classification,
        "x": x,
        "y": y,
        "z": z,
        "dx": dx,
        "dy": dy,
        "dz": dz,
    }


ELEMENTS = [
    element("E1", "W1", "door", 5.0),
    element("E2", "W1", "door", 5.0),  # an exact copy of E1
    element("E3", "W1", "door", 5.0008),  # 0.8 mm off: the same place
    element("E4", "W1", "door", 5.0020),  # 1.2 mm from E3, 2 mm from E1: apart
    element("E5", "W1", "window", 5.0),  # same box, another classification
    element("E6", "W9", "door", 20.0),  # wbs W9: no activity has it
    element("E7", "W1", "column", 0.00249),  # 0.02 mm either side of 2.5 mm,
    element("E8", "W1", "column", 0.00251),  # a cell boundary of the search grid
    element("E9", "W1", "slab", 10.0),  # E9 ~ E10 ~ E11, each 0.9 mm from the
    element("E10", "W1", "slab", 10.0009),  # next: one group, although E9 and E11
    element("E11", "W1", "slab", 10.0018),  # are 1.8 mm apart
    {**element("E12", "W1", "door", 5.0), "dz": ""},  # no complete box: not compared
]


@pytest.fixture
def case(tmp_path):
    activities = [
        {"id": "A", "name": "Doors", "duration": 2, "wbs": "W1"},
        {"id": "B", "name": "Roof", "duration": 2, "wbs": "W2"},  # no element carries W2
        {"id": "C", "name": "Handover", "duration": 0, "wbs": ""},  # no wbs: not judged
    ]
    root = write_case(
        tmp_path, activities=activities, links=[{"pred": "A", "succ": "B"}], files={"elements.csv": ELEMENTS}
    )
    return load_case(root)


def brute_force_groups(rows):
    """Groups of elements joined by 'same classification, every coordinate within 1 mm',
    by comparing every pair and joining transitively (plain Python, the definition)."""
    boxes = [r for r in rows if all(r[c] != "" for c in ("x", "y", "z", "dx", "dy", "dz"))]
    group = {r["id"]: {r["id"]} for r in boxes}
    for a, b in itertools.combinations(boxes, 2):
        if a["classification"] == b["classification"] and all(
            abs(float(a[c]) - float(b[c])) <= 0.001 + 1e-9 for c in ("x", "y", "z", "dx", "dy", "dz")
        ):
            merged = group[a["id"]] | group[b["id"]]
            for member in merged:
                group[member] = merged
    return sorted({tuple(sorted(g, key=lambda i: int(i[1:]))) for g in group.values() if len(g) > 1})


def test_duplicates_within_one_millimetre(case):
    found = element_checks(case)
    groups = sorted(tuple(g) for g in found.duplicate_groups())
    assert groups == brute_force_groups(ELEMENTS)
    assert groups == [("E1", "E2", "E3"), ("E7", "E8"), ("E9", "E10", "E11")]
    # The original (first in file order) leads each group.
    assert found.duplicates.groupby("group")["element"].first().tolist() == ["E1", "E7", "E9"]
    data = found.to_json()["duplicates"]
    assert (data["count"], data["copies"], data["duplicate_ids"]) == (3, 5, "checked at load")


def test_unlinked_elements_and_unmodelled_activities(case):
    found = element_checks(case)
    assert found.unlinked_elements["element"].tolist() == ["E6"]
    assert found.unmodelled_activities["activity"].tolist() == ["B"]


def test_no_elements_is_not_applicable(tmp_path):
    root = write_case(tmp_path, activities=[{"id": "A", "name": "Doors", "duration": 2, "wbs": "W1"}])
    found = element_checks(load_case(root))
    assert len(found.unlinked_elements) == len(found.unmodelled_activities) == len(found.duplicates) == 0
    assert "not applicable" in found.to_json()["unmodelled_activities"]["note"]


# -- the demo case ---------------------------------------------------------------------------


@pytest.fixture(scope="module")
def demo(tmp_path_factory):
    """The demo case folder: case_demo/ when it has been generated, else generated from
    case_demo/generate.py into a temporary folder (the generator is deterministic)."""
    if (DEMO / "case.toml").exists() and (DEMO / "KNOWN_DEFECTS.json").exists():
        return DEMO
    script = DEMO / "generate.py"
    if not script.exists():
        pytest.skip("the demo case and its generator are not there yet")
    out = tmp_path_factory.mktemp("demo") / "case"
    subprocess.run(
        [sys.executable, str(script), "--output", str(out), "--no-self-check"], check=True, capture_output=True
    )
    return out


def test_demo_element_defects_exactly(demo):
    known = json.loads((demo / "KNOWN_DEFECTS.json").read_text(encoding="utf-8"))
    found = element_checks(load_case(demo))
    assert sorted(sorted(g) for g in found.duplicate_groups()) == sorted(sorted(g) for g in known["duplicate_elements"])
    # The original is the first of each planted group.
    assert sorted(g[0] for g in found.duplicate_groups()) == sorted(g[0] for g in known["duplicate_elements"])
    unlinked = known["unlinked_elements"]
    unlinked_ids = [u["id"] if isinstance(u, dict) else u for u in unlinked]
    assert sorted(found.unlinked_elements["element"]) == sorted(unlinked_ids)


def test_demo_retrospective_edits_exactly(demo):
    # Between progress updates the planted edit is the only changed actual date and the
    # only retrospective one; the as-built record restores the first reported date.
    known = json.loads((demo / "KNOWN_DEFECTS.json").read_text(encoding="utf-8"))["retrospective_edits"]
    case = load_case(demo)
    changes, edits = [], []
    for snap in case.updates:
        checks = {c.key: c for c in data_checks(case, snap)}
        for row in checks["actual_date_changes"].items.itertuples(index=False):
            changes.append(
                (
                    row.activity,
                    row.column,
                    row.earlier_snapshot,
                    snap.folder,
                    str(row.earlier_value.date()),
                    str(row.later_value.date()),
                )
            )
        for row in checks["retrospective_edits"].items.itertuples(index=False):
            edits.append((row.activity, row.column, snap.folder, str(row.value.date())))
    assert changes == [
        (k["activity"], k["column"], k["first_reported_in"], k["changed_in"], k["first_value"], k["changed_value"])
        for k in known
    ]
    assert edits == [(k["activity"], k["column"], k["changed_in"], k["changed_value"]) for k in known]
    if case.asbuilt_snapshot is not None:
        checks = {c.key: c for c in data_checks(case, "asbuilt")}
        restored = [
            (r.activity, r.column, str(r.later_value.date()))
            for r in checks["actual_date_changes"].items.itertuples(index=False)
        ]
        assert restored == [(k["activity"], k["column"], k["asbuilt_value"]) for k in known]
