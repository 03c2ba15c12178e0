"""``delay export-ifc``: a snapshot's schedule as an IFC 4 work schedule, and back again.

Checks:
- the file is valid IFC 4 by the schema (ifcopenshell.validate, which checks every entity
  against the EXPRESS schema of ISO 16739-1:2018, WHERE rules included);
- IfcTaskTime holds the early and late dates and floats worked by hand below;
- the tasks are assigned to the elements they build by IfcRelAssignsToProduct (RelatingProduct
  the element), placeholders carry the boxes of elements.csv (read back to the millimetre),
  and an imported model's elements are referenced by their GlobalIds;
- round trip: the file read back with ``import-ifc-schedule`` gives the same activities,
  durations, links, lags, progress, constraints and calendars, and delay.cpm gives the same
  dates and floats for it.
"""

from __future__ import annotations

import shutil

import ifcopenshell
import ifcopenshell.validate
import numpy as np
import pandas as pd
import pytest
from casewriter import write_case
from click.testing import CliRunner

from delay.case import load_case
from delay.commands.ifc import export_ifc
from delay.cpm import schedule
from delay.ifc import export_schedule, import_model, import_work_schedule, read_model

# Hand-worked (5-day calendar from Monday 2025-01-06): A 3 days 01-06..01-08, B 2 days FS
# 01-09..01-10 (critical), C 1 day from the start 01-06, free until B's finish: open end to
# completion (boundary 5): TF = 5 - 1 = 4, FF 4; F dated 01-10.
SMALL = [
    {"id": "S", "name": "Start", "duration": 0, "kind": "start_milestone", "wbs": "1"},
    {"id": "A", "name": "Walls", "duration": 3, "wbs": "3.1"},
    {"id": "B", "name": "Roof", "duration": 2, "wbs": "3.2"},
    {"id": "C", "name": "Drainage", "duration": 1, "wbs": "8.1"},
    {"id": "F", "name": "Finish", "duration": 0, "kind": "finish_milestone", "wbs": "1"},
]
SMALL_LINKS = [
    {"pred": "S", "succ": "A", "type": "FS", "lag": 0},
    {"pred": "A", "succ": "B", "type": "FS", "lag": 0},
    {"pred": "S", "succ": "C", "type": "FS", "lag": 0},
    {"pred": "B", "succ": "F", "type": "FS", "lag": 0},
]
ELEMENTS = [  # boxes in metres; W-2 spans storeys 00 to 01
    {
        "id": "W-1",
        "name": "Wall 1",
        "wbs": "3.1",
        "classification": "WALL",
        "x": 0,
        "y": 0,
        "z": 0,
        "dx": 6,
        "dy": 0.2,
        "dz": 3,
        "level": "00",
        "zone": "A",
    },
    {
        "id": "W-2",
        "name": "Wall 2",
        "wbs": "3.1",
        "classification": "WALL",
        "x": 5.8,
        "y": 0,
        "z": 0,
        "dx": 0.2,
        "dy": 4,
        "dz": 6.5,
        "level": "00-01",
        "zone": "A",
    },
    {
        "id": "R-1",
        "name": "Roof slab",
        "wbs": "3.2",
        "classification": "SLAB",
        "x": 0,
        "y": 0,
        "z": 3.25,
        "dx": 6,
        "dy": 4,
        "dz": 0.3,
        "level": "01",
        "zone": "",
    },
    {
        "id": "P-1",
        "name": "Gully",
        "wbs": "8.1",
        "classification": "DRAIN",
        "x": 2.5,
        "y": -1.25,
        "z": -0.6,
        "dx": 0.45,
        "dy": 0.45,
        "dz": 0.6,
        "level": "",
        "zone": "external",
    },
]


def small_case(root):
    return write_case(root, activities=SMALL, links=SMALL_LINKS, files={"elements.csv": ELEMENTS})


def task_times(model):
    return {t.Identification: t.TaskTime for t in model.by_type("IfcTask")}


def test_exported_file_is_valid_ifc4_with_dates_floats_and_assignments(tmp_path):
    case = load_case(small_case(tmp_path / "case"))
    result = export_schedule(case, "baseline", tmp_path / "out.ifc")
    assert (result.tasks, result.links, result.placeholders, result.assignments) == (5, 4, 4, 4)
    model = ifcopenshell.open(str(tmp_path / "out.ifc"))
    assert model.schema == "IFC4"
    log = ifcopenshell.validate.json_logger()
    ifcopenshell.validate.validate(model, log, express_rules=True)
    assert log.statements == []
    times = task_times(model)
    a, c = times["A"], times["C"]
    assert (a.ScheduleStart[:10], a.ScheduleFinish[:10], a.LateStart[:10], a.LateFinish[:10]) == (
        "2025-01-06",
        "2025-01-08",
        "2025-01-06",
        "2025-01-08",
    )
    assert (a.TotalFloat, a.FreeFloat, a.IsCritical, a.ScheduleDuration, a.DurationType) == (
        "P0D",
        "P0D",
        True,
        "P3D",
        "WORKTIME",
    )
    assert (c.TotalFloat, c.FreeFloat, c.IsCritical, c.LateStart[:10]) == ("P4D", "P4D", False, "2025-01-10")
    assert (c.EarlyStart, c.EarlyFinish) == (c.ScheduleStart, c.ScheduleFinish)
    milestone = [t for t in model.by_type("IfcTask") if t.Identification == "F"][0]
    assert milestone.IsMilestone and milestone.TaskTime.ScheduleStart[:10] == "2025-01-10"
    sequences = {
        (r.RelatingProcess.Identification, r.RelatedProcess.Identification): r.SequenceType
        for r in model.by_type("IfcRelSequence")
    }
    assert sequences[("A", "B")] == "FINISH_START" and len(sequences) == 4
    # each element is the output of the tasks sharing its wbs (IfcRelAssignsToProduct)
    builds = {
        r.RelatingProduct.Tag: sorted(t.Identification for t in r.RelatedObjects)
        for r in model.by_type("IfcRelAssignsToProduct")
    }
    assert builds == {"W-1": ["A"], "W-2": ["A"], "R-1": ["B"], "P-1": ["C"]}
    assert all(
        p.is_a("IfcBuildingElementProxy") for p in (r.RelatingProduct for r in model.by_type("IfcRelAssignsToProduct"))
    )
    schedules = model.by_type("IfcWorkSchedule")
    assert len(schedules) == 1 and schedules[0].PredefinedType == "BASELINE"


def test_placeholders_carry_the_boxes_levels_and_zones(tmp_path):
    case = load_case(small_case(tmp_path / "case"))
    export_schedule(case, "baseline", tmp_path / "out.ifc")
    read = read_model(tmp_path / "out.ifc", code_property="DelayToolkit_Element.WorkBreakdownCode")
    back = read.elements.set_index("name")
    for element in ELEMENTS:
        row = back.loc[element["name"]]
        np.testing.assert_allclose(
            [row[c] for c in ("x", "y", "z", "dx", "dy", "dz")],
            [element[c] for c in ("x", "y", "z", "dx", "dy", "dz")],
            atol=0.001,
        )
        assert (row["wbs"], row["classification"], row["level"], row["zone"]) == (
            element["wbs"],
            element["classification"],
            element["level"],
            element["zone"],
        ), element["id"]


def test_an_imported_model_is_referenced_by_global_id(tmp_path):
    from test_ifc_import import ACTIVITIES, LINKS, build_model

    ids = build_model(tmp_path / "model.ifc")
    root = write_case(tmp_path / "case", activities=ACTIVITIES, links=LINKS)
    import_model(tmp_path / "model.ifc", root, code_property="TestCodes.WorkPackage", classification="Uniclass 2015")
    result = export_schedule(load_case(root), "baseline", tmp_path / "scheduled.ifc")
    assert (
        result.model == (tmp_path / "model.ifc").resolve() and result.placeholders == 0 and result.model_elements == 8
    )
    model = ifcopenshell.open(str(tmp_path / "scheduled.ifc"))
    builds = {}
    for rel in model.by_type("IfcRelAssignsToProduct"):
        builds.setdefault(rel.RelatingProduct.GlobalId, set()).update(t.Identification for t in rel.RelatedObjects)
    assert builds[ids["door"]] == {"DOORS-00"} and builds[ids["door_copy"]] == {"DOORS-00"}
    assert builds[ids["column_1"]] == {"COLS-00"} and builds[ids["south"]] == {"WALLS-00"}
    assert builds[ids["slab"]] == {"SLAB-01"}  # the model's own task and the exported one
    assert ids["beam"] not in builds  # not imported: it has no code
    assert model.by_guid(ids["south"]).is_a("IfcWall")  # the model's own element, not a placeholder
    assert not model.by_type("IfcBuildingElementProxy")
    log = ifcopenshell.validate.json_logger()
    ifcopenshell.validate.validate(model, log)
    assert log.statements == []


ROUND_TRIP = [
    {"id": "S", "name": "Start", "duration": 0, "kind": "start_milestone", "wbs": "1", "party": "employer"},
    {"id": "A", "name": "Excavate", "duration": 4, "calendar": "5d", "wbs": "2.1", "party": "contractor"},
    {
        "id": "B",
        "name": "Cure",
        "duration": 3,
        "calendar": "7d",
        "wbs": "2.2",
        "constraint": "earliest_start",
        "constraint_date": "2025-01-15",
    },
    {"id": "C", "name": "Backfill", "duration": 2, "wbs": "2.3"},
    {
        "id": "D",
        "name": "Slab",
        "duration": 5,
        "wbs": "3.1",
        "constraint": "latest_finish",
        "constraint_date": "2025-02-28",
    },
    {"id": "Z", "name": "Inspection", "duration": 0, "wbs": "9"},  # a zero-duration task: a finish milestone
    {"id": "F", "name": "Complete", "duration": 0, "kind": "finish_milestone", "wbs": "1"},
]
ROUND_TRIP_LINKS = [
    {"pred": "S", "succ": "A", "type": "FS", "lag": 0},
    {"pred": "A", "succ": "B", "type": "SS", "lag": 2},
    {"pred": "A", "succ": "C", "type": "FS", "lag": -1},
    {"pred": "B", "succ": "D", "type": "FF", "lag": 3},
    {"pred": "C", "succ": "D", "type": "SF", "lag": 4},
    {"pred": "D", "succ": "F", "type": "FS", "lag": 0},
    {"pred": "C", "succ": "Z", "type": "FS", "lag": 0},
    {"pred": "Z", "succ": "F", "type": "FS", "lag": 0},
]
PROGRESS = [dict(r) for r in ROUND_TRIP]
for _row in PROGRESS:
    if _row["id"] in ("S", "A"):
        _row.update(actual_start="2025-01-06", actual_finish="2025-01-06" if _row["id"] == "S" else "2025-01-09")
    if _row["id"] == "B":
        _row.update(actual_start="2025-01-15", remaining=2)
    if _row["id"] == "C":
        _row.update(remaining=3)  # a re-estimate of a task not started
EXCEPTIONS = [
    {"calendar": "5d", "date": "2025-01-20", "working": "no", "reason": "Test holiday"},
    {"calendar": "5d", "date": "2025-01-21", "working": "no", "reason": "Test holiday"},
    {"calendar": "5d", "date": "2025-01-25", "working": "yes", "reason": "Saturday working"},
    {"calendar": "7d", "date": "2025-01-19", "working": "no", "reason": "Site closed"},
]


@pytest.mark.parametrize("folder", ["baseline", "update_01"])
def test_round_trip_gives_the_same_schedule(tmp_path, folder):
    root = write_case(
        tmp_path / "case",
        activities=ROUND_TRIP,
        links=ROUND_TRIP_LINKS,
        exceptions=EXCEPTIONS,
        snapshots={"update_01": {"data_date": "2025-01-17", "activities": PROGRESS}},
    )
    original = load_case(root)
    export_schedule(original, folder, tmp_path / "programme.ifc")
    again = tmp_path / "again"
    shutil.copytree(root, again)
    result = import_work_schedule(tmp_path / "programme.ifc", again, folder, replace=True)
    assert result.calendars_added == ()  # both calendars found equal to the case's
    assert [f for f in result.findings.itertuples() if f.kind != "dates_differ"] == []
    assert not (result.findings["kind"] == "dates_differ").any()  # the file's dates are the toolkit's
    read_back = load_case(again)
    first, second = original.snapshot(folder), read_back.snapshot(folder)
    assert (second.label, second.data_date, second.kind) == (first.label, first.data_date, first.kind)
    pd.testing.assert_frame_equal(second.activities, first.activities)
    pd.testing.assert_frame_equal(second.links, first.links)
    pd.testing.assert_frame_equal(schedule(read_back, folder).activities, schedule(original, folder).activities)
    assert schedule(read_back, folder).completion == schedule(original, folder).completion


def test_command_writes_the_file_and_refuses_an_unknown_snapshot(tmp_path):
    root = small_case(tmp_path / "case")
    runner = CliRunner()
    done = runner.invoke(export_ifc, [str(root), str(tmp_path / "out.ifc")], catch_exceptions=False)
    assert done.exit_code == 0, done.output
    assert "5 tasks" in done.output and (tmp_path / "out.ifc").is_file()
    failed = runner.invoke(
        export_ifc, [str(root), str(tmp_path / "other.ifc"), "--snapshot", "nope"], catch_exceptions=False
    )
    assert failed.exit_code == 2 and "nope" in failed.output and "Traceback" not in failed.output
    assert not (tmp_path / "other.ifc").exists()
    assert not [p for p in tmp_path.iterdir() if p.name.endswith(".part.ifc")]
