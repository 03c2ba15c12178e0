"""Write the demo building's IFC model from the boxes of case_demo/elements.csv.

The Tessaly Wharf demo project is fictitious; so is this model. It stands for what the
design team would deliver: an IFC 4 file in millimetres with a site, a building and its
storeys (B1, 00 to 05, RF), every element as an IFC class that fits it (piles, footings,
walls, slabs, columns, stairs, doors, windows, coverings, furniture, lift cars, services
equipment, ...), each an extruded rectangle the size of its box, placed relative to its
storey (elements on the east and west elevations turned a quarter turn, so that their
placements are not all alike), the project's own classification (``Tessaly Wharf element
codes``), and the work breakdown code and asset tag in the project's property set
``TW_ProjectCodes``. Elements spanning several storeys are contained in the building and
referenced in their lowest and highest storeys; zones are ``IfcSpatialZone`` that reference
their elements. The planted
defects of the demo case are in the model too: the door DOR-03-02 three times in one
place, the column COL-02-B3 twice, and three elements whose code matches no activity.

The file is the same bytes on every run (GlobalIds derived from the asset tags, a fixed
header). ``import_options.json`` beside it tells ``delay demo`` how to read it.

Usage: python case_demo/model/make_model.py [--output FOLDER]   (needs ifcopenshell)
"""

from __future__ import annotations

import argparse
import csv
import importlib.util
import json
import os
import sys
import tempfile
import uuid
from pathlib import Path

HERE = Path(__file__).resolve().parent
ELEMENTS = HERE.parent / "elements.csv"
MODEL_NAME = "tessaly_wharf.ifc"
CLASSIFICATION = "Tessaly Wharf element codes"
PSET = "TW_ProjectCodes"
NAMESPACE = uuid.UUID("0b7e4c8e-2f6d-5a41-8c3e-7d9a51f04b22")  # the demo model's own
STOREYS = ["B1", "00", "01", "02", "03", "04", "05", "RF"]

# classification of the demo case -> (IFC class, PredefinedType or None)
IFC_CLASSES = {
    "SUB-PILE": ("IfcPile", "BORED"),
    "SUB-CAP": ("IfcFooting", "PILE_CAP"),
    "SUB-PIT": ("IfcFooting", "PAD_FOOTING"),
    "SUB-PILED-WALL": ("IfcWall", "NOTDEFINED"),
    "SUB-WALL": ("IfcWall", "SOLIDWALL"),
    "SUB-SLAB": ("IfcSlab", "BASESLAB"),
    "SUB-RAMP": ("IfcRamp", "STRAIGHT_RUN_RAMP"),
    "FRM-COLUMNS": ("IfcColumn", "COLUMN"),
    "FRM-CORE": ("IfcWall", "SHEAR"),
    "FRM-SLAB": ("IfcSlab", "FLOOR"),
    "FRM-STAIR": ("IfcStair", "STRAIGHT_RUN_STAIR"),
    "ENV-PANEL": ("IfcPlate", "CURTAIN_PANEL"),
    "ENV-PARAPET": ("IfcWall", "PARAPET"),
    "ENV-ROOF": ("IfcCovering", "ROOFING"),
    "ENV-SHOPFRONT": ("IfcCurtainWall", "NOTDEFINED"),
    "ENV-WINDOW": ("IfcWindow", "WINDOW"),
    "EXT-CROSSING": ("IfcCivilElement", None),
    "EXT-LIGHT": ("IfcLightFixture", "POINTSOURCE"),
    "EXT-MANHOLE": ("IfcDistributionChamberElement", "MANHOLE"),
    "EXT-PAVING": ("IfcCivilElement", None),
    "EXT-PLANTING": ("IfcGeographicElement", "TERRAIN"),
    "EXT-WALL": ("IfcWall", "NOTDEFINED"),
    "FIT-BARRIER": ("IfcBuildingElementProxy", "ELEMENT"),
    "FIT-CEILING": ("IfcCovering", "CEILING"),
    "FIT-DECK": ("IfcCovering", "FLOORING"),
    "FIT-DOOR": ("IfcDoor", "DOOR"),
    "FIT-KITCHEN": ("IfcFurniture", "NOTDEFINED"),
    "FIT-MARKING": ("IfcCovering", "FLOORING"),
    "FIT-PARTITION": ("IfcWall", "PARTITIONING"),
    "LFT-CAR": ("IfcTransportElement", "ELEVATOR"),
    "SRV-PLANT": ("IfcUnitaryEquipment", "AIRHANDLER"),
    "SRV-RISER": ("IfcDistributionElement", None),
    "SRV-SWITCH": ("IfcElectricDistributionBoard", "SWITCHBOARD"),
    "SRV-ZONE": ("IfcDistributionElement", None),
    "TMP-CRANE": ("IfcBuildingElementProxy", "ELEMENT"),
    "TMP-CRANEBASE": ("IfcFooting", "PAD_FOOTING"),
    "TMP-HOIST": ("IfcBuildingElementProxy", "ELEMENT"),
}


def millimetres(text: str) -> float:
    return round(float(text) * 1000.0, 3)


def build(elements_csv: Path = ELEMENTS):
    """The model as an ifcopenshell file."""
    import ifcopenshell
    import ifcopenshell.api.aggregate
    import ifcopenshell.api.classification
    import ifcopenshell.api.context
    import ifcopenshell.api.project
    import ifcopenshell.api.pset
    import ifcopenshell.api.root
    import ifcopenshell.api.spatial
    import ifcopenshell.api.unit
    import ifcopenshell.guid

    api = ifcopenshell.api
    with elements_csv.open(encoding="utf-8-sig", newline="") as handle:
        rows = list(csv.DictReader(handle))
    model = api.project.create_file(version="IFC4")
    header = model.header.file_name
    header.name = MODEL_NAME
    header.time_stamp = "2025-01-31T00:00:00"
    header.author = ("Tessaly Wharf design team (fictitious)",)
    header.organization = ("Varnhalt Architects (fictitious)",)
    header.originating_system = "Tessaly Wharf demo model generator (case_demo/model/make_model.py)"
    header.preprocessor_version = "IfcOpenShell"
    header.authorization = ""
    project = api.root.create_entity(model, ifc_class="IfcProject", name="Tessaly Wharf, Brennholm (fictitious)")
    api.unit.assign_unit(model)  # millimetres
    model_context = api.context.add_context(model, context_type="Model")
    body = api.context.add_context(
        model, context_type="Model", context_identifier="Body", target_view="MODEL_VIEW", parent=model_context
    )
    site = api.root.create_entity(model, ifc_class="IfcSite", name="Former harbour yard, Brennholm")
    building = api.root.create_entity(model, ifc_class="IfcBuilding", name="Tessaly Wharf")
    api.aggregate.assign_object(model, relating_object=project, products=[site])
    api.aggregate.assign_object(model, relating_object=site, products=[building])

    def point(*coordinates):
        return model.create_entity("IfcCartesianPoint", [float(c) for c in coordinates])

    def local(location, relative_to=None, turned=False):
        axes = {}
        if turned:  # a quarter turn about z: local x along world y
            axes = {
                "Axis": model.create_entity("IfcDirection", [0.0, 0.0, 1.0]),
                "RefDirection": model.create_entity("IfcDirection", [0.0, 1.0, 0.0]),
            }
        return model.create_entity(
            "IfcLocalPlacement",
            PlacementRelTo=relative_to,
            RelativePlacement=model.create_entity("IfcAxis2Placement3D", Location=point(*location), **axes),
        )

    site.ObjectPlacement = local((0, 0, 0))
    building.ObjectPlacement = local((0, 0, 0), site.ObjectPlacement)
    bases: dict[str, float] = {}
    for row in rows:
        if row["level"] in STOREYS and row["classification"] in ("FRM-SLAB", "SUB-SLAB", "ENV-ROOF"):
            bases[row["level"]] = min(bases.get(row["level"], 1e12), millimetres(row["z"]))
    storeys = {}
    for name in STOREYS:
        elevation = bases.get(name, min(millimetres(r["z"]) for r in rows if r["level"] == name))
        storey = api.root.create_entity(model, ifc_class="IfcBuildingStorey", name=name)
        storey.Elevation = elevation
        storey.ObjectPlacement = local((0, 0, elevation), building.ObjectPlacement)
        storeys[name] = storey
    api.aggregate.assign_object(model, relating_object=building, products=[storeys[n] for n in STOREYS])
    zones = {}
    for name in sorted({r["zone"] for r in rows if r["zone"]}):
        zones[name] = api.root.create_entity(model, ifc_class="IfcSpatialZone", name=name)
    system = api.classification.add_classification(model, classification=CLASSIFICATION)
    references = {}

    contained: dict[str, list] = {name: [] for name in STOREYS}
    in_building, referenced, zoned, classified = [], {name: [] for name in STOREYS}, {z: [] for z in zones}, {}
    for row in rows:
        ifc_class, predefined = IFC_CLASSES[row["classification"]]
        attributes = {"PredefinedType": predefined} if predefined else {}
        element = model.create_entity(
            ifc_class,
            GlobalId=ifcopenshell.guid.compress(uuid.uuid5(NAMESPACE, row["id"]).hex),
            Name=row["name"],
            Tag=row["id"],
            **attributes,
        )
        level = row["level"]
        spans = level not in storeys
        storey = storeys[level] if not spans else None
        x, y, z = millimetres(row["x"]), millimetres(row["y"]), millimetres(row["z"])
        dx, dy, dz = millimetres(row["dx"]), millimetres(row["dy"]), millimetres(row["dz"])
        base = storey.Elevation if storey is not None else 0.0
        turned = " east " in f" {row['name']} ".replace(",", " ") or " west " in f" {row['name']} ".replace(",", " ")
        if turned:  # local x runs along world y, local y along world -x: start from the box's far x edge
            placement = local((x + dx, y, z - base), (storey or building).ObjectPlacement, turned=True)
            size_x, size_y = dy, dx
        else:
            placement = local((x, y, z - base), (storey or building).ObjectPlacement)
            size_x, size_y = dx, dy
        profile = model.create_entity(
            "IfcRectangleProfileDef",
            ProfileType="AREA",
            XDim=size_x,
            YDim=size_y,
            Position=model.create_entity(
                "IfcAxis2Placement2D", Location=model.create_entity("IfcCartesianPoint", [size_x / 2, size_y / 2])
            ),
        )
        solid = model.create_entity(
            "IfcExtrudedAreaSolid",
            SweptArea=profile,
            Position=model.create_entity("IfcAxis2Placement3D", Location=point(0, 0, 0)),
            ExtrudedDirection=model.create_entity("IfcDirection", [0.0, 0.0, 1.0]),
            Depth=dz,
        )
        shape = model.create_entity(
            "IfcShapeRepresentation",
            ContextOfItems=body,
            RepresentationIdentifier="Body",
            RepresentationType="SweptSolid",
            Items=[solid],
        )
        element.ObjectPlacement = placement
        element.Representation = model.create_entity("IfcProductDefinitionShape", Representations=[shape])
        if spans:
            low, _, high = level.partition("-")
            in_building.append(element)
            referenced[low].append(element)
            referenced[high].append(element)
        else:
            contained[level].append(element)
        if row["zone"]:
            zoned[row["zone"]].append(element)
        classified.setdefault(row["classification"], []).append(element)
        pset = api.pset.add_pset(model, product=element, name=PSET)
        api.pset.edit_pset(model, pset=pset, properties={"WorkBreakdownCode": row["wbs"], "AssetTag": row["id"]})
    for name in STOREYS:
        if contained[name]:
            api.spatial.assign_container(model, relating_structure=storeys[name], products=contained[name])
        if referenced[name]:
            api.spatial.reference_structure(model, products=referenced[name], relating_structure=storeys[name])
    api.spatial.assign_container(model, relating_structure=building, products=in_building)
    for name, members in zoned.items():
        api.spatial.reference_structure(model, products=members, relating_structure=zones[name])
    for code, members in classified.items():
        references[code] = api.classification.add_reference(
            model, products=members, identification=code, name=code, classification=system
        )
    # GlobalIds of everything else, stable from run to run: class and order of creation.
    counts: dict[str, int] = {}
    for entity in model.by_type("IfcRoot"):
        if entity.is_a("IfcElement"):
            continue
        counts[entity.is_a()] = counts.get(entity.is_a(), 0) + 1
        entity.GlobalId = ifcopenshell.guid.compress(
            uuid.uuid5(NAMESPACE, f"{entity.is_a()}:{counts[entity.is_a()]}").hex
        )
    for history in model.by_type("IfcOwnerHistory"):
        history.CreationDate = 1738281600  # 2025-01-31
        history.LastModifiedDate = None
    return model


def write(output: Path) -> Path:
    """Write the model and its import options into ``output`` (each through a temporary name)."""
    output.mkdir(parents=True, exist_ok=True)
    model = build()
    handle, temporary = tempfile.mkstemp(prefix=".tessaly_wharf.", suffix=".part.ifc", dir=output)
    os.close(handle)
    try:
        model.write(temporary)
        os.replace(temporary, output / MODEL_NAME)
    finally:
        if os.path.exists(temporary):
            os.unlink(temporary)
    options = {"code_property": f"{PSET}.WorkBreakdownCode", "classification": CLASSIFICATION}
    (output / "import_options.json").write_text(json.dumps(options, indent=2) + "\n", encoding="utf-8")
    return output / MODEL_NAME


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--output", type=Path, default=HERE, help="folder to write into (default: this folder)")
    args = parser.parse_args(argv)
    if importlib.util.find_spec("ifcopenshell") is None:
        print("install the ifc extra: pip install .[ifc]", file=sys.stderr)
        return 2
    path = write(args.output)
    print(f"wrote {path} ({path.stat().st_size // 1024} KiB)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
