"""Snapshot comparison on two snapshots that differ in every kind of change.

Sources: shared/case-format.md (time convention, scheduling rules, progress rules); the
driving path is the engine's (delay.cpm, tested against its own references), worked here
by hand for this case. Which changes a windows analysis applies, and in which order
(deletions, additions, durations, logic, calendars, constraints), is common practice of
the windows method as the toolkit's design fixes it.

5-day calendar, January 2025 (2025-01-06 is a Monday), work day k:
    k:  0  1  2  3  4 | 5  6  7  8  9 | 10 11 12 13 14 | 15 16 17 18 19 | 20
 date: 06 07 08 09 10 |13 14 15 16 17 | 20 21 22 23 24 | 27 28 29 30 31 | 02-03

Baseline (data date 2025-01-06), durations A5 B5 C5 D5 E4 F3 G2 H6:
  START -> A -> B -> C -> FINISH; START -> D -> FINISH; START -> E, A -> E, E -> FINISH;
  START -> F -> FINISH; START -> G -> H -> FINISH.
  A 0-5, B 5-10, C 10-15 (finishes 01-24), D 0-5, E 5-9, F 0-3, G 0-2, H 2-8: completion
  01-24 through C; driving path START, A, B, C, FINISH.

M, a zero-duration task START -> M -> FINISH (a finish milestone by the scheduling rules),
is given the kind finish_milestone in the update: a change of kind, with no change of dates.

Update u01 (data date 2025-01-13, k = 5): START and A done (A 01-06 .. 01-10); B renamed and
lengthened to 7; C re-estimated at 8 days remaining (not started); D deleted with its links;
N (3) added after B; E moved to the 7-day calendar; F given earliest_start 2025-01-20;
link A -> E deleted, E -> H added; B -> C lag 0 -> 1, G -> H FS 0 -> SS 1, H -> FINISH lag 0 -> 2.
  B 5-12 (01-13 .. 01-21); C starts at 12 + 1 = 13, 8 days: 13-21, finishing 02-03;
  N 12-15; E on 7 days 01-13 .. 01-16, so H starts 01-17 (k = 9) .. 01-24, FINISH >= k 17;
  F 10-13. Completion 02-03 through C; A is complete, so the driving path is B, C, FINISH.
"""

from __future__ import annotations

import pytest
from casewriter import write_case

from delay.case import load_case
from delay.checks import CHANGE_COLUMNS, CHANGE_KINDS, REVISION_ORDER, compare
from delay.cpm import schedule


def task(activity_id, duration, name=None, **extra):
    return {"id": activity_id, "name": name or f"Work {activity_id}", "duration": duration, **extra}


def link(pred, succ, kind="FS", lag=0):
    return {"pred": pred, "succ": succ, "type": kind, "lag": lag}


START = {"id": "START", "name": "Start", "duration": 0, "kind": "start_milestone"}
FINISH = {"id": "FINISH", "name": "Finish", "duration": 0, "kind": "finish_milestone"}

BASELINE = [
    START,
    task("A", 5),
    task("B", 5, "Foundations"),
    task("C", 5),
    task("D", 5),
    task("E", 4),
    task("F", 3),
    task("G", 2),
    task("H", 6),
    task("M", 0, "Handover"),
    FINISH,
]
BASELINE_LINKS = [
    link("START", "M"),
    link("M", "FINISH"),
    link("START", "A"),
    link("A", "B"),
    link("B", "C"),
    link("C", "FINISH"),
    link("START", "D"),
    link("D", "FINISH"),
    link("START", "E"),
    link("A", "E"),
    link("E", "FINISH"),
    link("START", "F"),
    link("F", "FINISH"),
    link("START", "G"),
    link("G", "H"),
    link("H", "FINISH"),
]
UPDATE = [
    dict(START, actual_start="2025-01-06"),
    task("A", 5, actual_start="2025-01-06", actual_finish="2025-01-10"),
    task("B", 7, "Foundations and ground beams"),
    task("C", 5, remaining=8),
    task("E", 4, calendar="7d"),
    task("F", 3, constraint="earliest_start", constraint_date="2025-01-20"),
    task("G", 2),
    task("H", 6),
    task("N", 3, "New works"),
    task("M", 0, "Handover", kind="finish_milestone"),
    FINISH,
]
UPDATE_LINKS = [
    link("START", "M"),
    link("M", "FINISH"),
    link("START", "A"),
    link("A", "B"),
    link("B", "C", lag=1),
    link("C", "FINISH"),
    link("START", "E"),
    link("E", "FINISH"),
    link("START", "F"),
    link("F", "FINISH"),
    link("START", "G"),
    link("G", "H", "SS", 1),
    link("H", "FINISH", lag=2),
    link("B", "N"),
    link("N", "FINISH"),
    link("E", "H"),
]

# kind, activity, pred, succ, field, before, after, end added or deleted, driving earlier, driving later
EXPECTED = [
    ("activity_deleted", "D", "", "", "", "Work D", "", False, False, False),
    ("activity_added", "N", "", "", "", "", "New works", False, False, False),
    ("name_changed", "B", "", "", "name", "Foundations", "Foundations and ground beams", False, True, True),
    ("duration_changed", "B", "", "", "duration", "5", "7", False, True, True),
    ("remaining_changed", "C", "", "", "remaining", "5", "8", False, True, True),
    ("kind_changed", "M", "", "", "kind", "task", "finish_milestone", False, False, False),
    ("calendar_changed", "E", "", "", "calendar", "5d", "7d", False, False, False),
    ("constraint_changed", "F", "", "", "constraint", "", "earliest_start 2025-01-20", False, False, False),
    ("link_deleted", "", "START", "D", "link", "FS 0", "", True, False, False),
    ("link_deleted", "", "D", "FINISH", "link", "FS 0", "", True, False, False),
    ("link_deleted", "", "A", "E", "link", "FS 0", "", False, False, False),
    ("link_added", "", "B", "N", "link", "", "FS 0", True, False, False),
    ("link_added", "", "N", "FINISH", "link", "", "FS 0", True, False, False),
    ("link_added", "", "E", "H", "link", "", "FS 0", False, False, False),
    # both ends of B -> C lie on both driving paths; H -> FINISH has one end on them only
    ("link_changed", "", "B", "C", "lag", "FS 0", "FS 1", False, True, True),
    ("link_changed", "", "G", "H", "type and lag", "FS 0", "SS 1", False, False, False),
    ("link_changed", "", "H", "FINISH", "lag", "FS 0", "FS 2", False, False, False),
    # a milestone's one actual date is both its start and its finish (case format)
    ("progress", "START", "", "", "actual_start", "", "2025-01-06", False, True, False),
    ("progress", "START", "", "", "actual_finish", "", "2025-01-06", False, True, False),
    ("progress", "A", "", "", "actual_start", "", "2025-01-06", False, True, False),
    ("progress", "A", "", "", "actual_finish", "", "2025-01-10", False, True, False),
]


@pytest.fixture
def case(tmp_path):
    root = write_case(
        tmp_path,
        activities=BASELINE,
        links=BASELINE_LINKS,
        snapshots={
            "u01": {"data_date": "2025-01-13", "activities": UPDATE, "links": UPDATE_LINKS, "label": "Update 01"}
        },
    )
    return load_case(root)


def test_the_hand_worked_driving_paths(case):
    # A guard on the hand working above (the engine's paths are tested with the engine).
    assert schedule(case, "baseline").driving_path() == ["START", "A", "B", "C", "FINISH"]
    later = schedule(case, "u01")
    assert later.driving_path() == ["B", "C", "FINISH"]
    assert str(later.completion) == "2025-02-03"


def test_every_kind_of_change(case):
    found = compare(case, "baseline", "u01")
    assert tuple(found.changes.columns) == CHANGE_COLUMNS
    got = [tuple(row[:-1]) for row in found.changes.itertuples(index=False)]
    assert got == EXPECTED
    touches = found.changes["touches_driving_path"].tolist()
    assert touches == [earlier or later for *_, earlier, later in EXPECTED]
    assert (found.earlier, found.later) == ("Baseline", "Update 01")


def test_counts_cover_every_kind(case):
    counts = compare(case, "baseline", "u01").counts()
    assert list(counts) == list(CHANGE_KINDS)
    expected = {kind: sum(1 for row in EXPECTED if row[0] == kind) for kind in CHANGE_KINDS}
    assert counts == expected
    assert all(counts[k] for k in CHANGE_KINDS)  # the case holds every kind


def test_revisions_one_step_at_a_time(case):
    found = compare(case, "baseline", "u01")
    steps = {step: found.revisions(step) for step in REVISION_ORDER}
    assert REVISION_ORDER == ("deletions", "additions", "durations", "logic", "calendars", "constraints")
    assert steps["deletions"]["activity"].tolist() == ["D"]
    assert steps["additions"]["activity"].tolist() == ["N"]
    assert list(zip(steps["durations"]["kind"], steps["durations"]["activity"])) == [
        ("duration_changed", "B"),
        ("remaining_changed", "C"),
        ("kind_changed", "M"),
    ]
    assert [f"{p}>{s}" for p, s in zip(steps["logic"]["pred"], steps["logic"]["succ"])] == [
        "START>D",
        "D>FINISH",
        "A>E",
        "B>N",
        "N>FINISH",
        "E>H",
        "B>C",
        "G>H",
        "H>FINISH",
    ]
    assert steps["calendars"]["activity"].tolist() == ["E"]
    assert steps["constraints"]["activity"].tolist() == ["F"]
    # Progress and names are not revisions.
    applied = set().union(*(set(frame["kind"]) for frame in steps.values()))
    assert "progress" not in applied and "name_changed" not in applied
    with pytest.raises(ValueError, match="unknown revision step"):
        found.revisions("weather")


def test_a_snapshot_compared_with_itself_has_no_change(case):
    assert len(compare(case, "u01", "u01").changes) == 0


def test_the_json_form(case):
    import json

    data = json.loads(json.dumps(compare(case, "baseline", "u01").to_json()))
    assert data["earlier_label"] == "Baseline" and data["later_label"] == "Update 01"
    assert (data["earlier_snapshot"], data["later_snapshot"]) == ("baseline", "u01")
    assert data["counts"]["link_changed"] == 3
    assert data["changes"][0] == {
        "kind": "activity_deleted",
        "activity": "D",
        "pred": "",
        "succ": "",
        "field": "",
        "before": "Work D",
        "after": "",
        "end_added_or_deleted": False,
        "driving_earlier": False,
        "driving_later": False,
        "touches_driving_path": False,
    }
