"""Benchmark: importing a 20,000-element IFC model into a case.

Builds a synthetic IFC 4 model with ifcopenshell (20,000 elements - walls, slabs, columns,
beams, doors, coverings, on 10 storeys - each a simple extruded box, each with a classification
reference and a property set holding its work breakdown code), then times
:func:`delay.ifc.import_model` (geometry, codes, storeys, merge into elements.csv, check and
write). Peers run in the same process on the same file:

- ifcopenshell's own geometry iteration over the same elements, world coordinates, the same
  geometry library, doing nothing but reading the vertices (what any bounding-box reader must
  at least do);
- ``pandas.read_csv`` of the elements.csv the import wrote (the cost of the same elements
  given as a table of boxes).

Run: ``/work/venv/bin/python bench/bench_ifc.py [--elements N]``  (needs the ifc extra)
"""

from __future__ import annotations

import argparse
import importlib.util
import shutil
import sys
import tempfile
import time
import uuid
from pathlib import Path

import numpy as np
import pandas as pd

sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "tests"))
from casewriter import write_case

CLASSES = ("IfcWall", "IfcSlab", "IfcColumn", "IfcBeam", "IfcDoor", "IfcCovering")
STOREYS = 10


def build_model(path: Path, count: int, seed: int = 3) -> None:
    """A synthetic model of ``count`` boxes, written with ifcopenshell's entity API (fast)."""
    import ifcopenshell
    import ifcopenshell.guid

    rng = np.random.default_rng(seed)
    f = ifcopenshell.file(schema="IFC4")

    def guid(*key):
        return ifcopenshell.guid.compress(uuid.uuid5(uuid.NAMESPACE_URL, "/".join(map(str, key))).hex)

    length = f.create_entity("IfcSIUnit", UnitType="LENGTHUNIT", Prefix="MILLI", Name="METRE")
    units = f.create_entity("IfcUnitAssignment", Units=[length])
    origin = f.create_entity("IfcAxis2Placement3D", Location=f.create_entity("IfcCartesianPoint", [0.0, 0.0, 0.0]))
    context = f.create_entity(
        "IfcGeometricRepresentationContext",
        ContextType="Model",
        CoordinateSpaceDimension=3,
        Precision=1e-5,
        WorldCoordinateSystem=origin,
    )
    body = f.create_entity(
        "IfcGeometricRepresentationSubContext",
        ContextIdentifier="Body",
        ContextType="Model",
        ParentContext=context,
        TargetView="MODEL_VIEW",
    )
    project = f.create_entity(
        "IfcProject", GlobalId=guid("project"), Name="Synthetic", RepresentationContexts=[context], UnitsInContext=units
    )
    building = f.create_entity("IfcBuilding", GlobalId=guid("building"), Name="Building")
    f.create_entity("IfcRelAggregates", GlobalId=guid("agg"), RelatingObject=project, RelatedObjects=[building])
    storeys = [
        f.create_entity("IfcBuildingStorey", GlobalId=guid("storey", k), Name=f"L{k:02d}", Elevation=3000.0 * k)
        for k in range(STOREYS)
    ]
    f.create_entity("IfcRelAggregates", GlobalId=guid("agg2"), RelatingObject=building, RelatedObjects=storeys)
    system = f.create_entity("IfcClassification", Name="Synthetic classes")
    references = {
        c: f.create_entity("IfcClassificationReference", Identification=c[3:].upper(), Name=c, ReferencedSource=system)
        for c in CLASSES
    }
    sizes = rng.uniform(200, 6000, size=(count, 3))
    origins = rng.uniform(0, 100_000, size=(count, 2))
    by_storey, by_class = [[] for _ in range(STOREYS)], {c: [] for c in CLASSES}
    for i in range(count):
        storey = i % STOREYS
        ifc_class = CLASSES[i % len(CLASSES)]
        dx, dy, dz = (float(v) for v in sizes[i])
        profile = f.create_entity(
            "IfcRectangleProfileDef",
            ProfileType="AREA",
            XDim=dx,
            YDim=dy,
            Position=f.create_entity(
                "IfcAxis2Placement2D", Location=f.create_entity("IfcCartesianPoint", [dx / 2, dy / 2])
            ),
        )
        solid = f.create_entity(
            "IfcExtrudedAreaSolid",
            SweptArea=profile,
            Position=origin,
            ExtrudedDirection=f.create_entity("IfcDirection", [0.0, 0.0, 1.0]),
            Depth=dz,
        )
        shape = f.create_entity(
            "IfcShapeRepresentation",
            ContextOfItems=body,
            RepresentationIdentifier="Body",
            RepresentationType="SweptSolid",
            Items=[solid],
        )
        placement = f.create_entity(
            "IfcLocalPlacement",
            RelativePlacement=f.create_entity(
                "IfcAxis2Placement3D",
                Location=f.create_entity(
                    "IfcCartesianPoint", [float(origins[i, 0]), float(origins[i, 1]), 3000.0 * storey]
                ),
            ),
        )
        element = f.create_entity(
            ifc_class,
            GlobalId=guid("element", i),
            Name=f"{ifc_class[3:]} {i}",
            ObjectPlacement=placement,
            Representation=f.create_entity("IfcProductDefinitionShape", Representations=[shape]),
        )
        value = f.create_entity(
            "IfcPropertySingleValue", Name="WBS", NominalValue=f.create_entity("IfcIdentifier", f"W{i % 500}")
        )
        pset = f.create_entity("IfcPropertySet", GlobalId=guid("pset", i), Name="Codes", HasProperties=[value])
        f.create_entity(
            "IfcRelDefinesByProperties",
            GlobalId=guid("rel", i),
            RelatedObjects=[element],
            RelatingPropertyDefinition=pset,
        )
        by_storey[storey].append(element)
        by_class[ifc_class].append(element)
    for k, members in enumerate(by_storey):
        f.create_entity(
            "IfcRelContainedInSpatialStructure",
            GlobalId=guid("contained", k),
            RelatingStructure=storeys[k],
            RelatedElements=members,
        )
    for ifc_class, members in by_class.items():
        f.create_entity(
            "IfcRelAssociatesClassification",
            GlobalId=guid("class", ifc_class),
            RelatedObjects=members,
            RelatingClassification=references[ifc_class],
        )
    f.write(str(path))


def peer_iteration(path: Path) -> float:
    """ifcopenshell's own geometry iterator over the same elements: open, iterate, read vertices."""
    import ifcopenshell
    import ifcopenshell.geom

    from delay.ifc.import_model import GEOMETRY_LIBRARY

    start = time.perf_counter()
    model = ifcopenshell.open(str(path))
    settings = ifcopenshell.geom.settings()
    settings.set("use-world-coords", True)
    iterator = ifcopenshell.geom.iterator(
        settings, model, 1, include=model.by_type("IfcElement"), geometry_library=GEOMETRY_LIBRARY
    )
    shapes = 0
    if iterator.initialize():
        while True:
            vertices = np.asarray(iterator.get().geometry.verts).reshape(-1, 3)
            shapes += vertices.shape[0] > 0
            if not iterator.next():
                break
    elapsed = time.perf_counter() - start
    print(f"  (peer iterated {shapes:,} shapes)")
    return elapsed


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--elements", type=int, default=20_000)
    args = parser.parse_args()
    if importlib.util.find_spec("ifcopenshell") is None:
        print("install the ifc extra: pip install .[ifc]")
        sys.exit(2)
    from delay.ifc import import_model

    with tempfile.TemporaryDirectory() as folder:
        folder = Path(folder)
        model = folder / "synthetic.ifc"
        start = time.perf_counter()
        build_model(model, args.elements)
        print(
            f"built a synthetic model of {args.elements:,} elements in {time.perf_counter() - start:.1f} s "
            f"({model.stat().st_size / 1e6:.1f} MB)"
        )
        activities = [{"id": f"A{k}", "name": f"Work package {k}", "duration": 5, "wbs": f"W{k}"} for k in range(500)]
        case = write_case(folder / "case", activities=activities, links=[])
        start = time.perf_counter()
        result = import_model(model, case, code_property="Codes.WBS")
        ours = time.perf_counter() - start
        assert len(result.read.elements) == args.elements, result.read.findings.head()
        assert result.read.elements[["x", "dx"]].notna().all().all()
        peer = peer_iteration(model)
        start = time.perf_counter()
        table = pd.read_csv(case / "elements.csv", dtype=str, keep_default_na=False)
        csv_time = time.perf_counter() - start
        assert len(table) == args.elements
        shutil.rmtree(case, ignore_errors=True)
    print(f"delay.ifc.import_model, {args.elements:,} elements:       {ours:7.2f} s")
    print(f"peer: ifcopenshell geometry iteration alone:        {peer:7.2f} s   ratio {ours / peer:5.2f}x")
    print(f"peer: pandas.read_csv of the elements.csv written:  {csv_time:7.3f} s   ratio {ours / csv_time:7.0f}x")


if __name__ == "__main__":
    main()
