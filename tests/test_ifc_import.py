"""``delay import-ifc``: model elements from an IFC 4 file into elements.csv.

The models are built here with ifcopenshell's own API (ifcopenshell.api: root, unit,
context, aggregate, spatial, geometry, classification, pset, sequence), so every expected
box is the geometry the test places, worked by hand in the comments:

- ifcopenshell.api.geometry takes lengths in metres and writes them in the file's unit
  (its documented behaviour); ``assign_unit`` with no units makes a millimetre model;
- a wall representation (add_wall_representation) is a profile from (0, 0) to
  (length, thickness) in the wall's local x and y, extruded by the height along local z;
- a slab representation (add_slab_representation) is the given polyline extruded by the
  depth along +z;
- an IfcRectangleProfileDef without a Position is centred on its origin (ISO 16739-1:2018,
  IfcRectangleProfileDef); the column profiles below are written in file units (mm) on
  purpose, so that the file's unit scale is checked independently of the API.

The duplicate door is found by the toolkit's element checks (delay.checks.element_checks:
same classification, boxes within 1 mm).
"""

from __future__ import annotations

import hashlib
from pathlib import Path

import ifcopenshell
import ifcopenshell.api
import ifcopenshell.api.aggregate
import ifcopenshell.api.classification
import ifcopenshell.api.context
import ifcopenshell.api.feature
import ifcopenshell.api.geometry
import ifcopenshell.api.project
import ifcopenshell.api.pset
import ifcopenshell.api.root
import ifcopenshell.api.sequence
import ifcopenshell.api.spatial
import ifcopenshell.api.type
import ifcopenshell.api.unit
import numpy as np
import pandas as pd
import pytest
from casewriter import write_case, write_csv
from click.testing import CliRunner

from delay.case import load_case
from delay.checks import element_checks
from delay.commands.ifc import import_ifc
from delay.ifc import import_model, read_model

MILLIMETRE = 0.001  # metres: the tolerance of every box check ("to the millimetre")

ACTIVITIES = [
    {"id": "START", "name": "Start", "duration": 0, "kind": "start_milestone", "wbs": "1"},
    {"id": "WALLS-00", "name": "Walls level 00", "duration": 5, "wbs": "3.00.1"},
    {"id": "COLS-00", "name": "Columns level 00", "duration": 3, "wbs": "3.00.3"},
    {"id": "DOORS-00", "name": "Doors level 00", "duration": 2, "wbs": "3.00.4"},
    {"id": "FLOOR-00", "name": "Floor finish level 00", "duration": 2, "wbs": "3.00.5"},
    {"id": "SLAB-01", "name": "Slab level 01", "duration": 4, "wbs": "3.01.2"},
]
LINKS = [{"pred": "START", "succ": a["id"], "type": "FS", "lag": 0} for a in ACTIVITIES[1:]]


def placement(x, y, z, rotation_degrees=0.0):
    """A 4x4 placement matrix in metres: a rotation about z, then the origin."""
    angle = np.radians(rotation_degrees)
    matrix = np.eye(4)
    matrix[:2, :2] = [[np.cos(angle), -np.sin(angle)], [np.sin(angle), np.cos(angle)]]
    matrix[:3, 3] = [x, y, z]
    return matrix


class ModelBuilder:
    """A small IFC 4 building, millimetre units, made with ifcopenshell.api."""

    def __init__(self):
        api = ifcopenshell.api
        self.model = api.project.create_file(version="IFC4")
        self.project = api.root.create_entity(self.model, ifc_class="IfcProject", name="Test project")
        api.unit.assign_unit(self.model)  # millimetres (the API's default length unit)
        model_context = api.context.add_context(self.model, context_type="Model")
        self.body = api.context.add_context(
            self.model, context_type="Model", context_identifier="Body", target_view="MODEL_VIEW", parent=model_context
        )
        site = api.root.create_entity(self.model, ifc_class="IfcSite", name="Site")
        self.building = api.root.create_entity(self.model, ifc_class="IfcBuilding", name="Building")
        api.aggregate.assign_object(self.model, relating_object=self.project, products=[site])
        api.aggregate.assign_object(self.model, relating_object=site, products=[self.building])
        self.storeys = {}
        for name, elevation in (("00", 0.0), ("01", 3000.0)):
            storey = api.root.create_entity(self.model, ifc_class="IfcBuildingStorey", name=name)
            storey.Elevation = elevation
            api.aggregate.assign_object(self.model, relating_object=self.building, products=[storey])
            self.storeys[name] = storey
        self.uniclass = api.classification.add_classification(self.model, classification="Uniclass 2015")
        self.groups = api.classification.add_classification(self.model, classification="Project element groups")

    def element(
        self, ifc_class, name, storey="00", matrix=None, representation=None, code=None, uniclass=None, group=None
    ):
        api = ifcopenshell.api
        element = api.root.create_entity(self.model, ifc_class=ifc_class, name=name)
        api.geometry.edit_object_placement(
            self.model, product=element, matrix=matrix if matrix is not None else np.eye(4)
        )
        if representation is not None:
            api.geometry.assign_representation(self.model, product=element, representation=representation)
        api.spatial.assign_container(self.model, relating_structure=self.storeys[storey], products=[element])
        if code is not None:
            pset = api.pset.add_pset(self.model, product=element, name="TestCodes")
            api.pset.edit_pset(self.model, pset=pset, properties={"WorkPackage": code})
        if uniclass:
            api.classification.add_reference(
                self.model, products=[element], identification=uniclass, name=uniclass, classification=self.uniclass
            )
        if group:
            api.classification.add_reference(
                self.model, products=[element], identification=group, name=group, classification=self.groups
            )
        return element

    def wall(self, length, height, thickness):
        return ifcopenshell.api.geometry.add_wall_representation(
            self.model, context=self.body, length=length, height=height, thickness=thickness
        )

    def column_shape(self, width_mm, depth_mm, height_mm):
        """An extruded rectangle written directly in file units (mm), centred on the origin."""
        f = self.model
        profile = f.create_entity("IfcRectangleProfileDef", ProfileType="AREA", XDim=width_mm, YDim=depth_mm)
        solid = f.create_entity(
            "IfcExtrudedAreaSolid",
            SweptArea=profile,
            Position=f.create_entity(
                "IfcAxis2Placement3D", Location=f.create_entity("IfcCartesianPoint", [0.0, 0.0, 0.0])
            ),
            ExtrudedDirection=f.create_entity("IfcDirection", [0.0, 0.0, 1.0]),
            Depth=height_mm,
        )
        return f.create_entity(
            "IfcShapeRepresentation",
            ContextOfItems=self.body,
            RepresentationIdentifier="Body",
            RepresentationType="SweptSolid",
            Items=[solid],
        )


def build_model(path: Path) -> dict[str, str]:
    """The test building; returns GlobalIds by a short key."""
    b = ModelBuilder()
    api = ifcopenshell.api
    ids = {}
    # Wall along x from the origin: box x 0..6, y 0..0.2, z 0..3.
    south = b.element(
        "IfcWall",
        "South wall",
        matrix=placement(0, 0, 0),
        representation=b.wall(6.0, 3.0, 0.2),
        code="3.00.1",
        uniclass="EF_25_10",
        group="WALL",
    )
    # Wall rotated 90 degrees about z at (6, 0, 0): local x runs along world +y, local y along
    # world -x, so the 4.0 x 0.2 profile covers x 5.8..6.0, y 0..4.0; z 0..3.
    east = b.element(
        "IfcWall",
        "East wall",
        matrix=placement(6, 0, 0, 90),
        representation=b.wall(4.0, 3.0, 0.2),
        code="3.00.1",
        uniclass="EF_25_10",
        group="WALL",
    )
    # Slab on level 01: the 6 x 4 polyline at z = 3.0, 0.25 deep upwards: box z 3.0..3.25.
    slab_shape = api.geometry.add_slab_representation(
        b.model, context=b.body, depth=0.25, polyline=[(0, 0), (6, 0), (6, 4), (0, 4), (0, 0)]
    )
    slab = b.element(
        "IfcSlab",
        "Slab level 01",
        storey="01",
        matrix=placement(0, 0, 3.0),
        representation=slab_shape,
        uniclass="SS_20_05",
    )
    # Columns of a type that carries the code: 400 x 400 mm centred on (2, 2) and (4, 2),
    # 3000 mm high: boxes x 1.8..2.2 / 3.8..4.2, y 1.8..2.2, z 0..3.
    column_type = api.root.create_entity(b.model, ifc_class="IfcColumnType", name="C400")
    type_pset = api.pset.add_pset(b.model, product=column_type, name="TestCodes")
    api.pset.edit_pset(b.model, pset=type_pset, properties={"WorkPackage": "3.00.3"})
    columns = []
    for key, x in (("column_1", 2.0), ("column_2", 4.0)):
        column = b.element(
            "IfcColumn",
            f"Column {key[-1]}",
            matrix=placement(x, 2.0, 0.0),
            representation=b.column_shape(400.0, 400.0, 3000.0),
            uniclass="EF_20_10",
        )
        columns.append(column)
        ids[key] = column.GlobalId
    api.type.assign_type(b.model, related_objects=columns, relating_type=column_type)
    # A door and its copy in the same place: box x 1.0..1.9, y 0.075..0.125, z 0..2.1.
    for key in ("door", "door_copy"):
        door = b.element(
            "IfcDoor",
            "Door D1",
            matrix=placement(1.0, 0.075, 0.0),
            representation=b.wall(0.9, 2.1, 0.05),
            code="3.00.4",
            uniclass="EF_25_30",
        )
        ids[key] = door.GlobalId
    # A beam with geometry and no code, a covering with a code and no geometry, an opening.
    beam = b.element("IfcBeam", "Beam without a code", matrix=placement(0, 0, 2.8), representation=b.wall(6, 0.2, 0.2))
    covering = b.element("IfcCovering", "Floor finish", code="3.00.5")
    opening = api.root.create_entity(b.model, ifc_class="IfcOpeningElement", name="Opening")
    # The slab is built by the task SLAB-01 (IfcRelAssignsToProduct): its code comes from the baseline.
    work_schedule = api.sequence.add_work_schedule(b.model, name="Construction")
    task = api.sequence.add_task(
        b.model,
        work_schedule=work_schedule,
        name="Slab level 01",
        identification="SLAB-01",
        predefined_type="CONSTRUCTION",
    )
    api.sequence.assign_product(b.model, relating_product=slab, related_object=task)
    # A spatial zone referencing the two walls.
    zone = api.root.create_entity(b.model, ifc_class="IfcSpatialZone", name="Zone A")
    api.spatial.reference_structure(b.model, products=[south, east], relating_structure=zone)
    api.feature.add_feature(b.model, feature=opening, element=south)  # an opening has a host (IfcRelVoidsElement)
    ids.update(
        south=south.GlobalId, east=east.GlobalId, slab=slab.GlobalId, beam=beam.GlobalId, covering=covering.GlobalId
    )
    b.model.write(str(path))
    return ids


@pytest.fixture
def built(tmp_path):
    path = tmp_path / "model.ifc"
    ids = build_model(path)
    case = write_case(tmp_path / "case", activities=ACTIVITIES, links=LINKS)
    return path, case, ids


def box_of(table, global_id):
    row = table.set_index("id").loc[global_id]
    return np.array([row[c] for c in ("x", "y", "z", "dx", "dy", "dz")], dtype=float)


EXPECTED_BOXES = {  # x, y, z, dx, dy, dz in metres, as worked in build_model's comments
    "south": (0.0, 0.0, 0.0, 6.0, 0.2, 3.0),
    "east": (5.8, 0.0, 0.0, 0.2, 4.0, 3.0),
    "slab": (0.0, 0.0, 3.0, 6.0, 4.0, 0.25),
    "column_1": (1.8, 1.8, 0.0, 0.4, 0.4, 3.0),
    "column_2": (3.8, 1.8, 0.0, 0.4, 0.4, 3.0),
    "door": (1.0, 0.075, 0.0, 0.9, 0.05, 2.1),
    "door_copy": (1.0, 0.075, 0.0, 0.9, 0.05, 2.1),
}


def test_boxes_codes_storeys_and_classifications(built):
    path, case, ids = built
    baseline = load_case(case).baseline.activities
    read = read_model(
        path,
        code_property="TestCodes.WorkPackage",
        classification="Uniclass 2015",
        activity_wbs=dict(zip(baseline["id"], baseline["wbs"])),
    )
    assert read.schema == "IFC4"
    assert read.length_unit_in_metres == pytest.approx(0.001)  # the API's default: millimetres
    table = read.elements
    for key, expected in EXPECTED_BOXES.items():
        np.testing.assert_allclose(box_of(table, ids[key]), expected, atol=MILLIMETRE, err_msg=key)
    rows = table.set_index("id")
    expected_codes = {
        "south": ("3.00.1", "property"),
        "east": ("3.00.1", "property"),
        "column_1": ("3.00.3", "property"),
        "column_2": ("3.00.3", "property"),  # from the type
        "door": ("3.00.4", "property"),
        "door_copy": ("3.00.4", "property"),
        "slab": ("3.01.2", "task"),  # the baseline's wbs of SLAB-01
        "covering": ("3.00.5", "property"),
    }
    for key, (wbs, source) in expected_codes.items():
        assert (rows.loc[ids[key], "wbs"], rows.loc[ids[key], "code_source"]) == (wbs, source), key
    assert rows.loc[ids["slab"], "level"] == "01" and rows.loc[ids["south"], "level"] == "00"
    assert rows.loc[ids["south"], "classification"] == "EF_25_10"
    assert rows.loc[ids["south"], "zone"] == "Zone A" and rows.loc[ids["column_1"], "zone"] == ""
    assert rows.loc[ids["door"], "ifc_class"] == "IfcDoor" and rows.loc[ids["slab"], "ifc_class"] == "IfcSlab"
    # the other classification system, when chosen
    other = read_model(path, code_property="TestCodes.WorkPackage", classification="Project element groups")
    assert other.elements.set_index("id").loc[ids["east"], "classification"] == "WALL"
    # a classification system as the source of the code: the walls carry WALL in it
    by_class = read_model(path, code_classification="Project element groups").elements.set_index("id")
    assert (by_class.loc[ids["east"], "wbs"], by_class.loc[ids["east"], "code_source"]) == ("WALL", "classification")
    # the beam has no code: not written, a finding; the covering has no geometry: written without a box
    assert ids["beam"] not in set(table["id"])
    assert np.isnan(box_of(table, ids["covering"])).all()
    kinds = {(f.kind, f.global_id) for f in read.findings.itertuples()}
    assert ("no_code", ids["beam"]) in kinds and ("no_geometry", ids["covering"]) in kinds
    # the opening element is not a physical element: 2 walls, slab, 2 columns, 2 doors, beam, covering
    assert read.physical_elements == 9


def test_the_element_checks_find_the_duplicated_door(built):
    path, case, ids = built
    import_model(path, case, code_property="TestCodes.WorkPackage", classification="Uniclass 2015")
    checks = element_checks(load_case(case))
    assert checks.duplicate_groups() == [[ids["door"], ids["door_copy"]]]
    # every imported element is linked: all codes are the programme's
    assert checks.unlinked_elements.empty


def test_merge_keeps_other_rows_and_replaces_same_ids(built):
    path, case, ids = built
    write_csv(
        case / "elements.csv",
        [
            {
                "id": "OLD-1",
                "name": "Kept from before",
                "wbs": "3.00.1",
                "classification": "X",
                "x": "1.5",
                "y": "",
                "z": "",
                "dx": "",
                "dy": "",
                "dz": "",
                "level": "00",
                "zone": "",
                "note": "analyst's note",
            },
            {
                "id": ids["south"],
                "name": "Stale row",
                "wbs": "9.9",
                "classification": "",
                "x": "99",
                "y": "99",
                "z": "99",
                "dx": "1",
                "dy": "1",
                "dz": "1",
                "level": "",
                "zone": "",
                "note": "replaced",
            },
        ],
    )
    result = import_model(path, case, code_property="TestCodes.WorkPackage", classification="Uniclass 2015")
    assert (result.replaced, result.added) == (1, 7)  # 8 elements with a code, one already there
    table = pd.read_csv(case / "elements.csv", dtype=str, keep_default_na=False)
    assert list(table["id"][:2]) == ["OLD-1", ids["south"]]  # order kept, replaced in place
    old = table.iloc[0]
    assert (old["name"], old["x"], old["note"]) == ("Kept from before", "1.5", "analyst's note")
    south = table.iloc[1]
    assert (south["name"], south["wbs"], south["note"]) == ("South wall", "3.00.1", "")
    assert float(south["dx"]) == pytest.approx(6.0, abs=MILLIMETRE)
    assert len(table) == 9 and table["id"].is_unique
    loaded = load_case(case)
    assert len(loaded.elements) == 9
    findings = pd.read_csv(case / "elements_findings.csv", dtype=str, keep_default_na=False)
    assert {"no_code", "no_geometry"} <= set(findings["kind"])
    assert (case / "elements_source.json").is_file()


def test_unit_scale_of_a_model_in_feet(tmp_path):
    # One foot is exactly 0.3048 m (international yard and pound agreement, 1959). The box is
    # written directly in feet: a 10 x 2 ft rectangle whose corner is at the origin of the
    # profile, extruded 12 ft, placed at (5, 1, 0) ft -> x 1.524 m, y 0.3048 m, z 0,
    # dx 3.048 m, dy 0.6096 m, dz 3.6576 m.
    api = ifcopenshell.api
    model = api.project.create_file(version="IFC4")
    api.root.create_entity(model, ifc_class="IfcProject", name="Imperial")
    foot = api.unit.add_conversion_based_unit(model, name="foot")
    api.unit.assign_unit(model, units=[foot])
    context = api.context.add_context(model, context_type="Model")
    body = api.context.add_context(
        model, context_type="Model", context_identifier="Body", target_view="MODEL_VIEW", parent=context
    )
    storey = api.root.create_entity(model, ifc_class="IfcBuildingStorey", name="Ground")
    wall = api.root.create_entity(model, ifc_class="IfcWall", name="Imperial wall")
    profile = model.create_entity(
        "IfcRectangleProfileDef",
        ProfileType="AREA",
        XDim=10.0,
        YDim=2.0,
        Position=model.create_entity(
            "IfcAxis2Placement2D", Location=model.create_entity("IfcCartesianPoint", [5.0, 1.0])
        ),
    )
    solid = model.create_entity(
        "IfcExtrudedAreaSolid",
        SweptArea=profile,
        Position=model.create_entity(
            "IfcAxis2Placement3D", Location=model.create_entity("IfcCartesianPoint", [0.0, 0.0, 0.0])
        ),
        ExtrudedDirection=model.create_entity("IfcDirection", [0.0, 0.0, 1.0]),
        Depth=12.0,
    )
    shape = model.create_entity(
        "IfcShapeRepresentation",
        ContextOfItems=body,
        RepresentationIdentifier="Body",
        RepresentationType="SweptSolid",
        Items=[solid],
    )
    wall.Representation = model.create_entity("IfcProductDefinitionShape", Representations=[shape])
    wall.ObjectPlacement = model.create_entity(
        "IfcLocalPlacement",
        RelativePlacement=model.create_entity(
            "IfcAxis2Placement3D", Location=model.create_entity("IfcCartesianPoint", [5.0, 1.0, 0.0])
        ),
    )
    api.spatial.assign_container(model, relating_structure=storey, products=[wall])
    pset = api.pset.add_pset(model, product=wall, name="Codes")
    api.pset.edit_pset(model, pset=pset, properties={"WBS": "1.1"})
    model.write(str(tmp_path / "feet.ifc"))
    read = read_model(tmp_path / "feet.ifc", code_property="Codes.WBS")
    assert read.length_unit_in_metres == pytest.approx(0.3048)
    np.testing.assert_allclose(
        box_of(read.elements, wall.GlobalId), (1.524, 0.3048, 0.0, 3.048, 0.6096, 3.6576), atol=MILLIMETRE
    )
    assert read.elements.iloc[0]["level"] == "Ground"


def _digest(folder: Path) -> dict[str, str]:
    return {
        str(p.relative_to(folder)): hashlib.sha256(p.read_bytes()).hexdigest()
        for p in sorted(folder.rglob("*"))
        if p.is_file()
    }


def test_command_prints_findings_and_refuses_a_broken_file(built, tmp_path):
    path, case, ids = built
    runner = CliRunner()
    done = runner.invoke(
        import_ifc,
        [str(path), str(case), "--code-property", "TestCodes.WorkPackage", "--classification", "Uniclass 2015"],
        catch_exceptions=False,
    )
    assert done.exit_code == 0, done.output
    assert "no_code" in done.output and "8 written" in done.output
    before = _digest(case)
    broken = tmp_path / "broken.ifc"
    broken.write_text("this is not a STEP file\n", encoding="utf-8")
    failed = runner.invoke(import_ifc, [str(broken), str(case)], catch_exceptions=False)
    assert failed.exit_code == 2
    lines = [line for line in failed.output.splitlines() if line.strip()]
    assert lines[0].startswith("error: ") and "broken.ifc" in lines[0] and "Traceback" not in failed.output
    assert _digest(case) == before  # nothing written, nothing changed
