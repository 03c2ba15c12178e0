"""Model elements from an IFC file, merged into a case's ``elements.csv``.

Every physical element of the model (an ``IfcElement`` that is neither a feature such as an
opening nor a virtual element: walls, slabs, columns, beams, doors, windows, coverings,
distribution elements, furnishings, piles, footings, ...) becomes one row of elements.csv
(case-format v1):

==================  ==========================================================================
``id``              the element's GlobalId
``name``            its Name
``wbs``             the work breakdown code that links it to the programme (below)
``classification``  the Identification of its classification reference
                    (``IfcRelAssociatesClassification``; the element's own, else its type's);
                    ``classification=`` picks the system when it carries several
``x y z dx dy dz``  the axis-aligned box of its body geometry in world coordinates, in metres
                    (the file's length unit applied), rounded to the micrometre
``level``           the Name of the ``IfcBuildingStorey`` that contains it (through the spaces
                    or the element it is part of); an element contained higher up and referenced
                    in several storeys spans them: ``B1-RF`` (lowest and highest by elevation)
``zone``            the Name of the ``IfcSpatialZone`` that references or contains it
``ifc_class``       its IFC class
``code_source``     where the wbs came from: ``property``, ``classification`` or ``task``
==================  ==========================================================================

The work breakdown code is taken, in this order, from

1. the property ``code_property`` (``"PSET.NAME"``) of the element, or of its type;
2. the classification reference of the system ``code_classification``;
3. the task that builds the element: an ``IfcTask`` assigned to it by
   ``IfcRelAssignsToProduct`` (the standard's way of saying a task produces a product), or
   else by ``IfcRelAssignsToProcess``, whose Identification is an activity id of the case's
   baseline: the element takes that activity's wbs.

An element without a code cannot be linked, so it is not written; an element without
geometry is written without a box. Both are *findings* - listed, written beside
elements.csv as ``elements_findings.csv`` - not errors. ``elements_source.json`` records
which model was read (path, SHA-256, schema, options), so that ``delay export-ifc`` can
assign its tasks to the same elements.

Merging keeps every row of the existing elements.csv whose id is not in the model, replaces
the rows whose id is, and adds the new ones after them; unknown columns are kept.

References
----------
ISO 16739-1:2018 (IFC 4): IfcElement and its subtypes, IfcRelContainedInSpatialStructure,
IfcRelReferencedInSpatialStructure, IfcRelAggregates, IfcRelDefinesByProperties,
IfcRelDefinesByType, IfcRelAssociatesClassification, IfcRelAssignsToProduct,
IfcRelAssignsToProcess, IfcSIUnit and IfcConversionBasedUnit (length units).
"""

from __future__ import annotations

import datetime as dt
import json
import os
from collections import defaultdict
from collections.abc import Callable, Mapping
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pandas as pd

from ..model import COLUMNS
from ..output import OutputRefused, write_together
from ._common import Findings, case_folder, csv_bytes, ifc_text, open_model, sha256_of, validate_in_copy

__all__ = [
    "ModelRead",
    "ModelImport",
    "read_model",
    "import_model",
    "ELEMENT_COLUMNS",
    "FINDINGS_FILE",
    "SOURCE_FILE",
    "WRITTEN_FILES",
    "GEOMETRY_LIBRARY",
]

#: Columns written for an imported element, in order (case-format columns first).
ELEMENT_COLUMNS = (*COLUMNS["elements"], "ifc_class", "code_source")
#: Beside elements.csv: what the import found, and which model it read.
FINDINGS_FILE = "elements_findings.csv"
SOURCE_FILE = "elements_source.json"
#: ifcopenshell's geometry kernels: the fast one for simple solids, the general one as fallback.
GEOMETRY_LIBRARY = "hybrid-cgal-simple-opencascade"

_NOT_PHYSICAL = ("IfcFeatureElement", "IfcVirtualElement")
_DECIMALS = 6  # micrometres


@dataclass(frozen=True)
class ModelRead:
    """What :func:`read_model` found in one IFC file.

    Parameters
    ----------
    elements : pandas.DataFrame
        One row per physical element that has a code, columns :data:`ELEMENT_COLUMNS`
        (boxes ``float64`` in metres, ``NaN`` without geometry; the rest ``str``), in file
        order.
    findings : pandas.DataFrame
        ``kind, entity, global_id, subject, message`` (kinds: ``no_geometry``,
        ``geometry_failed``, ``no_code``, ``task_not_in_baseline``, ``several_codes``,
        ``several_classification_systems``, ``duplicate_global_id``, ``no_elements``).
    schema : str
        The file's schema (``IFC4`` ...).
    length_unit_in_metres : float
        The file's length unit in metres (0.001 for millimetres).
    physical_elements : int
        How many physical elements the file holds.
    """

    elements: pd.DataFrame
    findings: pd.DataFrame
    schema: str
    length_unit_in_metres: float
    physical_elements: int


@dataclass(frozen=True)
class ModelImport:
    """What :func:`import_model` did.

    Parameters
    ----------
    read : ModelRead
        What was read from the model.
    elements : pandas.DataFrame
        The merged elements.csv as written, all cells text.
    replaced : int
        Rows of the existing elements.csv replaced by the model's (same id).
    added : int
        Rows added after them.
    written : tuple of pathlib.Path
        The files written into the case folder.
    """

    read: ModelRead
    elements: pd.DataFrame
    replaced: int
    added: int
    written: tuple[Path, ...]


# -- reading --------------------------------------------------------------------------------------
def _property_value(prop) -> str:
    if prop.is_a("IfcPropertySingleValue"):
        return ifc_text(prop.NominalValue)
    if prop.is_a("IfcPropertyEnumeratedValue"):
        values = prop.EnumerationValues or ()
        return ifc_text(values[0]) if values else ""
    return ""


def _split_property(code_property: str, pset_names) -> tuple[str, str] | None:
    """``"Pset_X.Code"`` -> ("Pset_X", "Code"), matching the property set names in the file
    (a property set name may itself hold a dot)."""
    for name in sorted(pset_names, key=len, reverse=True):
        if code_property.startswith(name + ".") and len(code_property) > len(name) + 1:
            return name, code_property[len(name) + 1 :]
    return None


def _property_sets(model) -> tuple[dict[int, list], dict[int, list]]:
    """Property sets of objects (by entity id) and of types."""
    of_object: dict[int, list] = defaultdict(list)
    for rel in model.by_type("IfcRelDefinesByProperties"):
        definition = rel.RelatingPropertyDefinition
        sets = list(definition) if isinstance(definition, (list, tuple)) else [definition]
        sets = [s for s in sets if s is not None and s.is_a("IfcPropertySet")]
        for obj in rel.RelatedObjects or ():
            of_object[obj.id()].extend(sets)
    of_type: dict[int, list] = defaultdict(list)
    for type_object in model.by_type("IfcTypeObject"):
        for pset in getattr(type_object, "HasPropertySets", None) or ():
            if pset.is_a("IfcPropertySet"):
                of_type[type_object.id()].append(pset)
    return of_object, of_type


def _classification_system(reference) -> str:
    seen = 0
    source = reference
    while source is not None and seen < 50:
        if source.is_a("IfcClassification"):
            return ifc_text(source.Name)
        source = getattr(source, "ReferencedSource", None)
        seen += 1
    return ""


def _reference_code(reference) -> str:
    for attribute in ("Identification", "ItemReference"):  # IFC 4, IFC 2x3
        if hasattr(reference, attribute) and getattr(reference, attribute):
            return ifc_text(getattr(reference, attribute))
    return ifc_text(getattr(reference, "Name", None))


def _classifications(model) -> dict[int, list[tuple[str, str]]]:
    """(system, code) pairs by entity id of the classified object (element or type)."""
    found: dict[int, list[tuple[str, str]]] = defaultdict(list)
    for rel in model.by_type("IfcRelAssociatesClassification"):
        reference = rel.RelatingClassification
        if reference is None or not reference.is_a("IfcClassificationReference"):
            continue
        pair = (_classification_system(reference), _reference_code(reference))
        for obj in rel.RelatedObjects or ():
            found[obj.id()].append(pair)
    return found


def _pick(pairs: list[tuple[str, str]], system: str | None) -> str:
    if not pairs:
        return ""
    if system is None:
        return sorted(pairs)[0][1]
    wanted = system.casefold()
    for name, code in pairs:
        if name.casefold() == wanted:
            return code
    return ""


def _storeys_and_zones(model):
    """Maps for the location of an element: containing structure, referencing structures,
    aggregate parent (for parts and for spatial elements)."""
    contained: dict[int, object] = {}
    for rel in model.by_type("IfcRelContainedInSpatialStructure"):
        for element in rel.RelatedElements or ():
            contained[element.id()] = rel.RelatingStructure
    referenced: dict[int, list] = defaultdict(list)
    for rel in model.by_type("IfcRelReferencedInSpatialStructure"):
        for element in rel.RelatedElements or ():
            referenced[element.id()].append(rel.RelatingStructure)
    parent: dict[int, object] = {}
    children: dict[int, list] = defaultdict(list)
    for rel in model.by_type("IfcRelAggregates"):
        for part in rel.RelatedObjects or ():
            parent[part.id()] = rel.RelatingObject
            children[rel.RelatingObject.id()].append(part)
    return contained, referenced, parent, children


def _storey_name(storey) -> str:
    return ifc_text(storey.Name) or ifc_text(getattr(storey, "LongName", None))


def _level(element, contained, referenced, parent) -> str:
    current, steps = element, 0
    structure = None
    while current is not None and steps < 100:  # through the whole an element is part of
        structure = contained.get(current.id())
        if structure is not None:
            break
        current = parent.get(current.id())
        steps += 1
    while structure is not None and steps < 200:  # up the spatial structure to the storey
        if structure.is_a("IfcBuildingStorey"):
            return _storey_name(structure)
        structure = parent.get(structure.id())
        steps += 1
    storeys = [s for s in referenced.get(element.id(), ()) if s.is_a("IfcBuildingStorey")]
    if not storeys:
        return ""
    storeys.sort(key=lambda s: (s.Elevation is None, s.Elevation or 0.0, _storey_name(s)))
    low, high = _storey_name(storeys[0]), _storey_name(storeys[-1])
    return low if low == high else f"{low}-{high}"


def _zone(element, contained, referenced) -> str:
    zones = [s for s in referenced.get(element.id(), ()) if s.is_a("IfcSpatialZone")]
    holder = contained.get(element.id())
    if holder is not None and holder.is_a("IfcSpatialZone"):
        zones.insert(0, holder)
    names = []
    for zone in zones:
        name = ifc_text(zone.Name) or ifc_text(getattr(zone, "LongName", None))
        if name and name not in names:
            names.append(name)
    return "; ".join(names)


def _building_tasks(model) -> dict[int, list]:
    """Tasks that build each product (by entity id): outputs first, then process inputs."""
    outputs: dict[int, list] = defaultdict(list)
    for rel in model.by_type("IfcRelAssignsToProduct"):
        product = rel.RelatingProduct
        for obj in rel.RelatedObjects or ():
            if obj.is_a("IfcTask"):
                outputs[product.id()].append(obj)
    inputs: dict[int, list] = defaultdict(list)
    for rel in model.by_type("IfcRelAssignsToProcess"):
        process = rel.RelatingProcess
        if process is None or not process.is_a("IfcTask"):
            continue
        for obj in rel.RelatedObjects or ():
            inputs[obj.id()].append(process)
    merged: dict[int, list] = defaultdict(list)
    for key in set(outputs) | set(inputs):
        merged[key] = outputs.get(key, []) + [t for t in inputs.get(key, []) if t not in outputs.get(key, [])]
    return merged


def _boxes(model, elements, progress: Callable[[int], None] | None, findings: Findings) -> dict[int, np.ndarray]:
    """World-coordinate boxes (min x y z, max x y z) in metres by entity id.

    ifcopenshell's geometry iterator works in SI units (metres) unless told to convert
    back, so the file's unit scale is applied by it; ``use-world-coords`` places every
    vertex through the element's placement chain.
    """
    from . import require_ifcopenshell

    ifcopenshell = require_ifcopenshell()
    with_shape = [e for e in elements if e.Representation is not None]
    boxes: dict[int, np.ndarray] = {}
    if not with_shape:
        return boxes
    settings = ifcopenshell.geom.settings()
    settings.set("use-world-coords", True)
    iterator = ifcopenshell.geom.iterator(settings, model, 1, include=with_shape, geometry_library=GEOMETRY_LIBRARY)
    try:
        started = iterator.initialize()
    except RuntimeError as error:
        findings.add("geometry_failed", f"the geometry of the model could not be processed ({error})")
        started = False
    done = 0
    while started:
        shape = iterator.get()
        vertices = np.asarray(shape.geometry.verts, dtype=np.float64).reshape(-1, 3)
        if vertices.size:
            boxes[int(shape.id)] = np.concatenate([vertices.min(axis=0), vertices.max(axis=0)])
        done += 1
        if progress is not None:
            progress(1)
        if not iterator.next():
            break
    if progress is not None and done < len(with_shape):
        progress(len(with_shape) - done)
    return boxes


# -- reading: the model's relations -----------------------------------------------------------------
@dataclass(frozen=True)
class _Relations:
    """What the model relates to its objects, by entity id: property sets (of objects and of
    types), each object's type, (system, code) classification pairs, the spatial maps of
    :func:`_storeys_and_zones`, the tasks that build each product, and the geometry's boxes."""

    psets: dict[int, list]
    type_psets: dict[int, list]
    types: dict[int, object]
    classes: dict[int, list[tuple[str, str]]]
    contained: dict[int, object]
    referenced: dict[int, list]
    parent: dict[int, object]
    children: dict[int, list]
    builders: dict[int, list]
    boxes: dict[int, np.ndarray]


def _physical_elements(model, findings: Findings) -> list:
    """The model's physical elements (IfcElement but no feature or virtual element), in file
    order; none is a finding."""
    physical = [e for e in model.by_type("IfcElement") if not any(e.is_a(c) for c in _NOT_PHYSICAL)]
    if not physical:
        findings.add("no_elements", "the model holds no physical element (IfcElement)")
    return physical


def _code_property_key(
    code_property: str | None, psets: dict[int, list], type_psets: dict[int, list], findings: Findings
) -> tuple[str, str] | None:
    """``code_property`` split into the property set and property names of the file; None
    when it is not given, or matches no property set (a finding)."""
    property_key = None
    if code_property:
        names = {p.Name for sets in (*psets.values(), *type_psets.values()) for p in sets if p.Name}
        property_key = _split_property(code_property, names)
        if property_key is None:
            findings.add(
                "no_code",
                f"no property set of the model matches '{code_property}' "
                "(PSET.NAME, as the property set and property are named in the file)",
            )
    return property_key


def _element_types(model) -> dict[int, object]:
    """The type object of each typed object, by entity id (``IfcRelDefinesByType``)."""
    types: dict[int, object] = {}
    for rel in model.by_type("IfcRelDefinesByType"):
        for obj in rel.RelatedObjects or ():
            types[obj.id()] = rel.RelatingType
    return types


def _check_classification_systems(
    classes: dict[int, list[tuple[str, str]]], classification: str | None, findings: Findings
) -> None:
    """A finding when several systems could fill the classification column and none is chosen,
    or when the chosen system is not in the model."""
    systems = sorted({s for pairs in classes.values() for s, _ in pairs})
    if classification is None and len(systems) > 1:
        findings.add(
            "several_classification_systems",
            f"the model uses {len(systems)} classification systems ({', '.join(systems)}); "
            f"'{systems[0]}' fills the classification column - choose one with --classification",
        )
    elif classification is not None and systems and classification.casefold() not in {s.casefold() for s in systems}:
        findings.add(
            "several_classification_systems",
            f"no classification system '{classification}' in the model (it has: {', '.join(systems)})",
        )


# -- reading: each element ---------------------------------------------------------------------------
def _own_or_type(entity_id: int, table: Mapping[int, list], types: dict[int, object]) -> list:
    """The entries of ``table`` for an object, then those for its type."""
    found = list(table.get(entity_id, ()))
    if entity_id in types:
        found += list(table.get(types[entity_id].id(), ()))
    return found


def _property_code(element, property_key: tuple[str, str] | None, relations: _Relations) -> str:
    """The first non-blank value of the code property, on the element or else on its type."""
    if property_key is None:
        return ""
    pset_name, prop_name = property_key
    types = relations.types
    for pset in list(relations.psets.get(element.id(), ())) + (
        relations.type_psets.get(types[element.id()].id(), []) if element.id() in types else []
    ):
        if pset.Name != pset_name:
            continue
        for prop in pset.HasProperties or ():
            if prop.Name == prop_name:
                value = _property_value(prop)
                if value:
                    return value
    return ""


def _task_code(element, builders: dict[int, list], activity_wbs: dict[str, str], findings: Findings) -> str:
    """The wbs, in the baseline, of the first activity among the tasks that build the element;
    a task that is no activity of the baseline, and tasks of several codes, are findings."""
    codes = []
    for task in builders.get(element.id(), ()):
        activity = ifc_text(task.Identification)
        if activity in activity_wbs and activity_wbs[activity]:
            codes.append(activity_wbs[activity])
        elif activity:
            findings.add(
                "task_not_in_baseline",
                f"the task '{activity}' that builds it is not an activity of the baseline (or has no wbs there)",
                element,
                ifc_text(element.Name),
            )
    distinct = list(dict.fromkeys(codes))
    if len(distinct) > 1:
        findings.add(
            "several_codes",
            f"the tasks that build it carry several wbs codes ({', '.join(distinct)}); the first is taken",
            element,
            ifc_text(element.Name),
        )
    return distinct[0] if distinct else ""


def _element_code(
    element,
    pairs: list[tuple[str, str]],
    relations: _Relations,
    property_key: tuple[str, str] | None,
    code_classification: str | None,
    activity_wbs: dict[str, str],
    findings: Findings,
) -> tuple[str, str]:
    """The element's work breakdown code and its source: the code property, else the
    reference of the code classification (``pairs``: the element's and its type's), else the
    tasks that build it."""
    wbs, source = _property_code(element, property_key, relations), "property"
    if not wbs and code_classification:
        own = relations.classes.get(element.id(), [])
        wbs, source = _pick(own, code_classification) or _pick(pairs, code_classification), "classification"
    if not wbs:
        wbs, source = _task_code(element, relations.builders, activity_wbs, findings), "task"
    return wbs, source


def _element_box(
    element, boxes: dict[int, np.ndarray], children: dict[int, list], findings: Findings
) -> np.ndarray | None:
    """The element's box, else the box around its parts' boxes; None (a finding) when neither
    has geometry."""
    box = boxes.get(element.id())
    if box is None:
        parts = [boxes[p.id()] for p in _all_parts(element, children) if p.id() in boxes]
        if parts:
            stacked = np.vstack(parts)
            box = np.concatenate([stacked[:, :3].min(axis=0), stacked[:, 3:].max(axis=0)])
    if box is None:
        if element.Representation is None:
            findings.add(
                "no_geometry",
                "the element has no shape representation; it is written without a box",
                element,
                ifc_text(element.Name),
            )
        else:
            findings.add(
                "geometry_failed",
                "the element's geometry could not be processed; it is written without a box",
                element,
                ifc_text(element.Name),
            )
    return box


def _element_row(
    element, global_id: str, wbs: str, class_code: str, source: str, box: np.ndarray | None, relations: _Relations
) -> dict:
    """One row of :data:`ELEMENT_COLUMNS`: the box rounded to the micrometre (NaN without one)."""
    if box is None:
        x = y = z = dx = dy = dz = np.nan
    else:
        low, high = np.round(box[:3], _DECIMALS), np.round(box[3:], _DECIMALS)
        x, y, z = (float(v) for v in low)
        dx, dy, dz = (float(v) for v in np.round(high - low, _DECIMALS))
    contained, referenced = relations.contained, relations.referenced
    return {
        "id": global_id,
        "name": ifc_text(element.Name),
        "wbs": wbs,
        "classification": class_code,
        "x": x,
        "y": y,
        "z": z,
        "dx": dx,
        "dy": dy,
        "dz": dz,
        "level": _level(element, contained, referenced, relations.parent),
        "zone": _zone(element, contained, referenced),
        "ifc_class": element.is_a(),
        "code_source": source,
    }


def _element_rows(
    physical: list,
    relations: _Relations,
    property_key: tuple[str, str] | None,
    classification: str | None,
    code_classification: str | None,
    activity_wbs: dict[str, str],
    findings: Findings,
) -> list[dict]:
    """A row for each physical element that has a code, in file order; a repeated GlobalId
    and an element without a code are findings, and not written."""
    rows = []
    seen: set[str] = set()
    for element in physical:
        global_id = str(element.GlobalId)
        if global_id in seen:
            findings.add(
                "duplicate_global_id",
                "the GlobalId is used twice in the model; the first is kept",
                element,
                ifc_text(element.Name),
            )
            continue
        seen.add(global_id)
        pairs = _own_or_type(element.id(), relations.classes, relations.types)
        own_pairs = relations.classes.get(element.id(), [])
        class_code = _pick(own_pairs, classification) or _pick(pairs, classification)
        wbs, source = _element_code(
            element, pairs, relations, property_key, code_classification, activity_wbs, findings
        )
        box = _element_box(element, relations.boxes, relations.children, findings)
        if not wbs:
            findings.add(
                "no_code",
                "no work breakdown code (property, classification or building task); "
                "the element is not written - give --code-property or --code-classification, "
                "or assign it to the task that builds it",
                element,
                ifc_text(element.Name),
            )
            continue
        rows.append(_element_row(element, global_id, wbs, class_code, source, box, relations))
    return rows


def read_model(
    path: str | Path,
    *,
    code_property: str | None = None,
    classification: str | None = None,
    code_classification: str | None = None,
    activity_wbs: Mapping[str, str] | None = None,
    progress: Callable[[int], None] | None = None,
    on_total: Callable[[int], None] | None = None,
) -> ModelRead:
    """Read the physical elements of an IFC model.

    Parameters
    ----------
    path : str or pathlib.Path
        The .ifc file (IFC 2x3, IFC 4 or IFC 4.3).
    code_property : str, optional
        ``"PSET.NAME"``: the property that carries the work breakdown code.
    classification : str, optional
        The classification system (``IfcClassification.Name``) whose reference fills the
        ``classification`` column; default the first system by name.
    code_classification : str, optional
        A classification system whose reference *is* the work breakdown code.
    activity_wbs : mapping of str to str, optional
        Activity id -> wbs (the case's baseline), for codes taken from building tasks.
    progress : callable, optional
        Called with the number of elements whose geometry was just processed (for a
        progress bar).
    on_total : callable, optional
        Called once with how many elements have geometry to process.

    Returns
    -------
    ModelRead
        The elements with a code, the findings, and the file's schema and length unit.

    Raises
    ------
    delay.errors.CaseError
        When the file does not exist or cannot be read as IFC.
    delay.ifc.IfcExtraMissing
        When ifcopenshell is not installed.

    References
    ----------
    ISO 16739-1:2018 (IFC 4): IfcElement, IfcRelContainedInSpatialStructure,
    IfcRelAssociatesClassification, IfcRelAssignsToProduct.
    """
    from . import require_ifcopenshell

    ifcopenshell = require_ifcopenshell()
    model = open_model(path)
    findings = Findings()
    physical = _physical_elements(model, findings)
    scale = float(ifcopenshell.util.unit.calculate_unit_scale(model))
    psets, type_psets = _property_sets(model)
    property_key = _code_property_key(code_property, psets, type_psets, findings)
    types = _element_types(model)
    classes = _classifications(model)
    _check_classification_systems(classes, classification, findings)
    contained, referenced, parent, children = _storeys_and_zones(model)
    builders = _building_tasks(model)
    activity_wbs = dict(activity_wbs or {})

    if on_total is not None:
        on_total(sum(1 for e in physical if e.Representation is not None))
    boxes = _boxes(model, physical, progress, findings)
    relations = _Relations(psets, type_psets, types, classes, contained, referenced, parent, children, builders, boxes)
    rows = _element_rows(physical, relations, property_key, classification, code_classification, activity_wbs, findings)
    frame = pd.DataFrame(rows, columns=list(ELEMENT_COLUMNS))
    for column in ("x", "y", "z", "dx", "dy", "dz"):
        frame[column] = frame[column].astype(np.float64)
    return ModelRead(frame, findings.frame(), str(model.schema), scale, len(physical))


def _all_parts(element, children) -> list:
    found, stack = [], list(children.get(element.id(), ()))
    while stack and len(found) < 100_000:
        part = stack.pop()
        found.append(part)
        stack.extend(children.get(part.id(), ()))
    return found


# -- merging into the case --------------------------------------------------------------------------
def _number_text(value: float) -> str:
    if value is None or not np.isfinite(value):
        return ""
    text = f"{value:.{_DECIMALS}f}".rstrip("0").rstrip(".")
    return "0" if text in ("-0", "") else text


def _read_existing(path: Path) -> pd.DataFrame | None:
    if not path.is_file():
        return None
    return pd.read_csv(path, dtype=str, keep_default_na=False, encoding="utf-8-sig")


def merge_elements(existing: pd.DataFrame | None, imported: pd.DataFrame) -> tuple[pd.DataFrame, int, int]:
    """Merge imported elements into an existing elements table.

    Existing rows whose id is not in the model are kept (in their order, cells as they
    were), rows with an imported id are replaced in place, new rows are appended; columns of
    the existing table that the import does not know are kept (blank for new rows).

    Parameters
    ----------
    existing : pandas.DataFrame or None
        The case's elements.csv read as text, or ``None`` when there is none.
    imported : pandas.DataFrame
        :attr:`ModelRead.elements` (columns :data:`ELEMENT_COLUMNS`; boxes in metres).

    Returns
    -------
    table : pandas.DataFrame
        The merged table, every cell text (boxes rounded to the micrometre, blank for none).
    replaced : int
        Existing rows replaced.
    added : int
        Rows appended.

    Examples
    --------
    >>> import pandas as pd
    >>> existing = pd.DataFrame({"id": ["A", "B"], "name": ["old A", "old B"]})
    >>> imported = pd.DataFrame([dict.fromkeys(ELEMENT_COLUMNS, "")] * 2).assign(
    ...     id=["B", "C"], name=["new B", "new C"], x=[0.5, 1.0], y=0.0, z=0.0, dx=1.0, dy=1.0, dz=1.0
    ... )
    >>> table, replaced, added = merge_elements(existing, imported)
    >>> list(table["id"]), list(table["name"]), list(table["x"]), replaced, added
    (['A', 'B', 'C'], ['old A', 'new B', 'new C'], ['', '0.5', '1'], 1, 1)
    """
    new = imported.copy()
    for column in ("x", "y", "z", "dx", "dy", "dz"):
        new[column] = [_number_text(v) for v in new[column]]
    new = new.astype(str)
    if existing is None or not len(existing.columns):
        return new.reset_index(drop=True), 0, len(new)
    columns = list(existing.columns)
    for column in ELEMENT_COLUMNS:
        if column not in columns:
            columns.append(column)
    old = existing.reindex(columns=columns, fill_value="")
    new = new.reindex(columns=columns, fill_value="")
    by_id = {i: n for n, i in enumerate(new["id"])}
    replace_at = old["id"].map(by_id)
    replaced_rows = replace_at.notna().to_numpy()
    if replaced_rows.any():
        old.loc[replaced_rows, :] = new.iloc[replace_at[replaced_rows].astype(int).to_numpy()].to_numpy()
    added = ~new["id"].isin(set(existing["id"])).to_numpy()
    merged = pd.concat([old, new.loc[added]], ignore_index=True)
    return merged, int(replaced_rows.sum()), int(added.sum())


def import_model(
    model_path: str | Path,
    case_path: str | Path,
    *,
    code_property: str | None = None,
    classification: str | None = None,
    code_classification: str | None = None,
    progress: Callable[[int], None] | None = None,
    on_total: Callable[[int], None] | None = None,
) -> ModelImport:
    """Read an IFC model and merge its elements into the case's elements.csv.

    Writes ``elements_findings.csv``, ``elements_source.json`` and ``elements.csv``, each
    under a temporary name first, then all three moved into place together. The merged
    table is loaded with the case's settings before anything is written; a table the case
    would refuse is never written.

    Parameters
    ----------
    model_path : str or pathlib.Path
        The .ifc file (see :func:`read_model`).
    case_path : str or pathlib.Path
        The case folder; its baseline gives the wbs of activities named by building tasks.
    code_property : str, optional
        ``"PSET.NAME"``: the property that carries the work breakdown code.
    classification : str, optional
        The classification system whose reference fills the ``classification`` column.
    code_classification : str, optional
        A classification system whose reference *is* the work breakdown code.
    progress : callable, optional
        Called with the number of elements whose geometry was just processed.
    on_total : callable, optional
        Called once with how many elements have geometry to process.

    Returns
    -------
    ModelImport
        What was read, the merged table, the counts replaced and added, the files written.

    Raises
    ------
    delay.errors.CaseError
        When the case does not load, is a workbook, the file is not IFC, or the merged
        elements would not load.
    delay.output.OutputRefused
        When the model is one of the files written, or one of them is a link out of the
        case or a folder.
    delay.output.OutputFailed
        An OSError while writing; none of the three files is changed then.
    delay.ifc.IfcExtraMissing
        When ifcopenshell is not installed.
    """
    from ..case import load_case

    case = load_case(Path(case_path))
    root = case_folder(case)
    _check_targets(Path(model_path), root)
    baseline = case.baseline.activities
    activity_wbs = dict(zip(baseline["id"].astype(str), baseline["wbs"].astype(str)))
    model_path = Path(model_path)
    read = read_model(
        model_path,
        code_property=code_property,
        classification=classification,
        code_classification=code_classification,
        activity_wbs=activity_wbs,
        progress=progress,
        on_total=on_total,
    )
    existing = _read_existing(root / "elements.csv")
    merged, replaced, added = merge_elements(existing, read.elements)
    elements_bytes = csv_bytes(merged)
    validate_in_copy(root, {"elements.csv": elements_bytes})
    findings_bytes = csv_bytes(read.findings)
    try:
        shown = os.path.relpath(model_path.resolve(), root.resolve())
    except ValueError:  # another drive
        shown = str(model_path.resolve())
    source = {
        "model": str(model_path.resolve()),
        "model_relative_to_case": shown.replace(os.sep, "/"),
        "sha256": sha256_of(model_path),
        "schema": read.schema,
        "length_unit_in_metres": read.length_unit_in_metres,
        "physical_elements": read.physical_elements,
        "elements_written": int(len(read.elements)),
        "findings": int(len(read.findings)),
        "code_property": code_property,
        "classification": classification,
        "code_classification": code_classification,
        "imported_on": dt.date.today().isoformat(),
    }
    written = write_together(
        {  # all three, or none: a full disk leaves the case as it was
            root / FINDINGS_FILE: findings_bytes,
            root / SOURCE_FILE: (json.dumps(source, indent=2) + "\n").encode("utf-8"),
            root / "elements.csv": elements_bytes,
        }
    )
    return ModelImport(read, merged, replaced, added, written)


#: The files the import writes into the case folder.
WRITTEN_FILES = (FINDINGS_FILE, SOURCE_FILE, "elements.csv")


def _check_targets(model_path: Path, root: Path) -> None:
    """The import writes WRITTEN_FILES into the case (that is its purpose): never over the
    model it reads, and never through a link out of the case folder or onto a folder."""
    model = Path(os.path.realpath(model_path))
    inside = Path(os.path.realpath(root))
    for name in WRITTEN_FILES:
        target = root / name
        real = Path(os.path.realpath(target))
        if real == model:
            raise OutputRefused(
                model_path,
                f"the model is the case's {name}, which the import writes",
                "give the path of the .ifc model",
            )
        if not real.is_relative_to(inside):
            raise OutputRefused(
                target,
                "this is a link out of the case folder; the import writes only inside the case",
                "remove the link, or replace it with the file itself",
            )
        if real.is_dir():
            raise OutputRefused(
                target, "this is a folder; the import writes a file of that name", "move the folder out of the case"
            )


def imported_model_path(case_root: Path) -> Path | None:
    """The model the case's elements were last imported from, when the file is still there.

    Parameters
    ----------
    case_root : pathlib.Path
        The case folder; its ``elements_source.json`` is read.

    Returns
    -------
    pathlib.Path or None
        The model's resolved path (tried relative to the case first, then as recorded);
        ``None`` without a readable record or when neither path is a file.
    """
    record = case_root / SOURCE_FILE
    if not record.is_file():
        return None
    try:
        facts = json.loads(record.read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return None
    for key in ("model_relative_to_case", "model"):
        value = facts.get(key)
        if not value:
            continue
        candidate = Path(value) if Path(value).is_absolute() else case_root / value
        if candidate.is_file():
            return candidate.resolve()
    return None
