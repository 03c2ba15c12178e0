"""A snapshot's schedule written as an IFC 4 work schedule, tasks assigned to the elements.

:func:`export_schedule` schedules one snapshot with :func:`delay.cpm.schedule` and writes:

- an ``IfcWorkPlan`` aggregating one ``IfcWorkSchedule`` (type BASELINE for the baseline,
  PLANNED for an update, ACTUAL for the as-built record; StartTime the data date,
  FinishTime the completion), declared in the project;
- one ``IfcTask`` per activity (Identification = id, Name, IsMilestone, PredefinedType
  CONSTRUCTION), all assigned to the work schedule (``IfcRelAssignsToControl``), with an
  ``IfcTaskTime``: DurationType WORKTIME, ScheduleDuration the planned duration in work
  days (``P5D``), ScheduleStart/ScheduleFinish and EarlyStart/EarlyFinish the early dates,
  LateStart/LateFinish, TotalFloat and FreeFloat (``IfcDuration`` in work days of the
  activity's calendar, ``-P2D`` when negative), IsCritical, StatusTime the data date,
  ActualStart/ActualFinish and RemainingTime as recorded. Times of day follow the common
  practice of a working day from 08:00 to 17:00: a start is dated 08:00 on its date, a
  finish 17:00 on its date (only the dates carry meaning);
- one ``IfcRelSequence`` per link (SequenceType FINISH_START ..., TimeLag an
  ``IfcLagTime`` of work days when the lag is not 0);
- one ``IfcWorkCalendar`` per calendar the activities use, assigned to its tasks: the
  working weekdays as a WEEKLY ``IfcRecurrencePattern``, holidays as ``ExceptionTimes``
  and extra working days as dated ``WorkingTimes``, each named by its reason;
- what IfcTaskTime cannot hold - kind, constraint and its date, party, wbs, calendar name,
  status - in our own property set ``DelayToolkit_Scheduling`` on each task, and the
  snapshot's data date, label, kind and scheduling settings in the same property set on
  the work schedule;
- the tasks that build each element: ``IfcRelAssignsToProduct`` (RelatingProduct the
  element, RelatedObjects the tasks that share its wbs), the standard's way of saying
  that a task's output is that product.

Elements: when the case's elements were imported from an IFC model that is still where
the import found it (``elements_source.json``), or when ``model`` names one, the schedule
is added to a copy of that model and the tasks are assigned to its elements by GlobalId.
Every other element of elements.csv becomes an ``IfcBuildingElementProxy`` placeholder
with its box (an extruded rectangle), in a storey named by its level, referenced in an
``IfcSpatialZone`` named by its zone, with its classification and, in the property set
``DelayToolkit_Element``, its id and wbs.

:func:`demo_outputs` runs all of it on the demo case.

References
----------
ISO 16739-1:2018 (IFC 4): IfcWorkPlan, IfcWorkSchedule, IfcTask, IfcTaskTime,
IfcRelSequence, IfcLagTime, IfcWorkCalendar, IfcWorkTime, IfcRecurrencePattern,
IfcRelAssignsToControl, IfcRelAssignsToProduct, IfcBuildingElementProxy.
"""

from __future__ import annotations

import datetime as dt
import json
import re
import shutil
import tempfile
import uuid
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pandas as pd

from ..convert import iso_date
from ..cpm import FINISH_MILESTONE
from ..errors import CaseError, Problem
from ..model import Case, Snapshot
from ..output import check_file_target, copy_csv, write_output_file
from ._common import (
    ELEMENT_PSET,
    SCHEDULING_PSET,
    Findings,
    case_calendar_days,
    date_time_text,
    open_model,
    work_days_duration,
)

__all__ = [
    "ScheduleExport",
    "export_schedule",
    "demo_outputs",
    "written_by_toolkit",
    "WRITTEN_BY",
    "START_TIME",
    "FINISH_TIME",
    "SEQUENCE_ENUM",
]

#: Times of day written with the dates (common practice: a working day from 08:00 to 17:00).
START_TIME = "08:00:00"
FINISH_TIME = "17:00:00"
#: Link type -> IfcSequenceEnum.
SEQUENCE_ENUM = {"FS": "FINISH_START", "SS": "START_START", "FF": "FINISH_FINISH", "SF": "START_FINISH"}
_SCHEDULE_TYPE = {"baseline": "BASELINE", "update": "PLANNED", "asbuilt": "ACTUAL"}
_NAMESPACE = uuid.UUID("6f1c2a52-3a0e-5b7c-9d59-1f3c0e7a2b41")  # our own namespace for stable GlobalIds
_GLOBAL_ID = re.compile(r"^[0-3][0-9A-Za-z_$]{21}$")


@dataclass(frozen=True)
class ScheduleExport:
    """What :func:`export_schedule` wrote.

    Parameters
    ----------
    path : pathlib.Path
        The IFC file written.
    tasks : int
        ``IfcTask`` written, one per activity.
    links : int
        ``IfcRelSequence`` written, one per link.
    calendars : int
        ``IfcWorkCalendar`` written, one per calendar the activities use.
    model_elements : int
        Elements of the model the tasks were assigned to (found by GlobalId).
    placeholders : int
        ``IfcBuildingElementProxy`` placeholders made from elements.csv boxes.
    assignments : int
        ``IfcRelAssignsToProduct`` written (elements with at least one task that builds them).
    model : pathlib.Path or None
        The model the schedule was added to; ``None`` for a file of placeholders only.
    findings : pandas.DataFrame
        What the export found, :data:`delay.ifc._common.FINDING_COLUMNS`.
    """

    path: Path
    tasks: int
    links: int
    calendars: int
    model_elements: int
    placeholders: int
    assignments: int
    model: Path | None
    findings: pd.DataFrame


def _stable_id(ifcopenshell, *parts: str) -> str:
    return ifcopenshell.guid.compress(uuid.uuid5(_NAMESPACE, "\x1f".join(parts)).hex)


class _Writer:
    """Creates entities in one file with stable GlobalIds."""

    def __init__(self, ifcopenshell, model, salt: str):
        self.ifc = ifcopenshell
        self.model = model
        self.salt = salt
        self.count = 0
        self.used: set[str] = set()

    def global_id(self, *key: str) -> str:
        value = _stable_id(self.ifc, self.salt, *key)
        while value in self.used:
            self.count += 1
            value = _stable_id(self.ifc, self.salt, *key, str(self.count))
        self.used.add(value)
        return value

    def rooted(self, ifc_class: str, key: tuple[str, ...], **attributes):
        return self.model.create_entity(ifc_class, GlobalId=self.global_id(ifc_class, *key), **attributes)

    def value(self, kind: str, value):
        return self.model.create_entity(kind, value)

    def pset(self, name: str, values: dict, objects: list, key: tuple[str, ...]):
        properties = []
        for prop_name, (kind, value) in values.items():
            if value is None or value == "":
                continue
            properties.append(
                self.model.create_entity("IfcPropertySingleValue", Name=prop_name, NominalValue=self.value(kind, value))
            )
        if not properties or not objects:
            return None
        pset = self.rooted("IfcPropertySet", key, Name=name, HasProperties=properties)
        self.rooted("IfcRelDefinesByProperties", key, RelatedObjects=objects, RelatingPropertyDefinition=pset)
        return pset


# -- the file to write into ---------------------------------------------------------------------
def _new_file(ifcopenshell, writer_salt: str, project_name: str):
    model = ifcopenshell.file(schema="IFC4")
    writer = _Writer(ifcopenshell, model, writer_salt)
    length = model.create_entity("IfcSIUnit", UnitType="LENGTHUNIT", Name="METRE")
    area = model.create_entity("IfcSIUnit", UnitType="AREAUNIT", Name="SQUARE_METRE")
    volume = model.create_entity("IfcSIUnit", UnitType="VOLUMEUNIT", Name="CUBIC_METRE")
    angle = model.create_entity("IfcSIUnit", UnitType="PLANEANGLEUNIT", Name="RADIAN")
    units = model.create_entity("IfcUnitAssignment", Units=[length, area, volume, angle])
    origin = _placement_3d(model, (0.0, 0.0, 0.0))
    context = model.create_entity(
        "IfcGeometricRepresentationContext",
        ContextType="Model",
        CoordinateSpaceDimension=3,
        Precision=1e-5,
        WorldCoordinateSystem=origin,
    )
    model.create_entity(
        "IfcGeometricRepresentationSubContext",
        ContextIdentifier="Body",
        ContextType="Model",
        ParentContext=context,
        TargetView="MODEL_VIEW",
    )
    writer.rooted("IfcProject", ("project",), Name=project_name, RepresentationContexts=[context], UnitsInContext=units)
    return model, writer


def _placement_3d(model, location):
    return model.create_entity(
        "IfcAxis2Placement3D", Location=model.create_entity("IfcCartesianPoint", [float(v) for v in location])
    )


def _body_context(model):
    for context in model.by_type("IfcGeometricRepresentationSubContext"):
        if context.ContextIdentifier == "Body":
            return context
    contexts = [
        c
        for c in model.by_type("IfcGeometricRepresentationContext")
        if not c.is_a("IfcGeometricRepresentationSubContext") and c.ContextType == "Model"
    ]
    if contexts:
        return model.create_entity(
            "IfcGeometricRepresentationSubContext",
            ContextIdentifier="Body",
            ContextType="Model",
            ParentContext=contexts[0],
            TargetView="MODEL_VIEW",
        )
    return None


class _Structure:
    """Site, building and storeys of the file, found or made on demand."""

    def __init__(self, writer: _Writer, unit_scale: float):
        self.writer = writer
        self.model = writer.model
        self.scale = unit_scale  # metres per file unit
        self.project = self.model.by_type("IfcProject")[0]
        self.storeys = {}
        for storey in self.model.by_type("IfcBuildingStorey"):
            if storey.Name and storey.Name not in self.storeys:
                self.storeys[storey.Name] = storey
        buildings = self.model.by_type("IfcBuilding")
        self.building = buildings[0] if buildings else None
        self.zones = {z.Name: z for z in self.model.by_type("IfcSpatialZone") if z.Name}
        self.contained: dict[int, list] = {}
        self.referenced: dict[int, list] = {}

    def _building(self):
        if self.building is None:
            site = self.writer.rooted(
                "IfcSite",
                ("site",),
                Name="Site",
                ObjectPlacement=self.model.create_entity(
                    "IfcLocalPlacement", RelativePlacement=_placement_3d(self.model, (0, 0, 0))
                ),
            )
            self.building = self.writer.rooted(
                "IfcBuilding",
                ("building",),
                Name="Building",
                ObjectPlacement=self.model.create_entity(
                    "IfcLocalPlacement",
                    PlacementRelTo=site.ObjectPlacement,
                    RelativePlacement=_placement_3d(self.model, (0, 0, 0)),
                ),
            )
            self.writer.rooted(
                "IfcRelAggregates", ("project-site",), RelatingObject=self.project, RelatedObjects=[site]
            )
            self.writer.rooted(
                "IfcRelAggregates", ("site-building",), RelatingObject=site, RelatedObjects=[self.building]
            )
        return self.building

    def storey(self, name: str, elevation_metres: float):
        if name not in self.storeys:
            building = self._building()
            elevation = elevation_metres / self.scale
            placement = self.model.create_entity(
                "IfcLocalPlacement",
                PlacementRelTo=building.ObjectPlacement,
                RelativePlacement=_placement_3d(self.model, (0, 0, elevation)),
            )
            storey = self.writer.rooted(
                "IfcBuildingStorey",
                ("storey", name),
                Name=name,
                ObjectPlacement=placement,
                Elevation=elevation,
                CompositionType="ELEMENT",
            )
            self.writer.rooted(
                "IfcRelAggregates", ("building-storey", name), RelatingObject=building, RelatedObjects=[storey]
            )
            self.storeys[name] = storey
        return self.storeys[name]

    def zone(self, name: str):
        if name not in self.zones:
            zone = self.writer.rooted("IfcSpatialZone", ("zone", name), Name=name)
            self.zones[name] = zone
        return self.zones[name]

    def contain(self, structure, element):
        self.contained.setdefault(structure.id(), []).append(element)

    def reference(self, structure, element):
        self.referenced.setdefault(structure.id(), []).append(element)

    def finish(self):
        for structure_id, elements in self.contained.items():
            structure = self.model.by_id(structure_id)
            self.writer.rooted(
                "IfcRelContainedInSpatialStructure",
                ("contained", str(structure.GlobalId)),
                RelatingStructure=structure,
                RelatedElements=elements,
            )
        for structure_id, elements in self.referenced.items():
            structure = self.model.by_id(structure_id)
            self.writer.rooted(
                "IfcRelReferencedInSpatialStructure",
                ("referenced", str(structure.GlobalId)),
                RelatingStructure=structure,
                RelatedElements=elements,
            )


def _placeholder_storeys(structure: _Structure, levels: np.ndarray, boxes: np.ndarray, complete: np.ndarray) -> None:
    """A storey per level (not a span ``B1-RF``), at the lowest base of its elements, made in
    the order of their elevations."""
    elevations: dict[str, float] = {}
    for level, box, ok in zip(levels, boxes, complete):
        if level and "-" not in level.strip("-"):
            base = float(box[2]) if ok else 0.0
            elevations[level] = min(elevations.get(level, base), base)
    for level in sorted(elevations, key=lambda name: (elevations[name], name)):
        structure.storey(level, round(elevations[level], 6))


def _placeholder_global_id(writer: _Writer, element_id: str) -> str:
    """The element id itself when it is a GlobalId the file does not hold yet, else a stable
    GlobalId of our own."""
    if (
        _GLOBAL_ID.match(element_id)
        and element_id not in writer.used
        and model_by_guid(writer.model, element_id) is None
    ):
        writer.used.add(element_id)
        return element_id
    return writer.global_id("IfcBuildingElementProxy", element_id)


def _box_shape(
    model, body, box: np.ndarray, complete: bool, unit_scale: float, findings: Findings, element_id: str
) -> tuple[object, object]:
    """The placement of a box (at its low corner, in file units) and its body, an extruded
    rectangle; None for what a box without a corner or an extent cannot give (a finding)."""
    if not complete:
        findings.add("placeholder", "the element has no box; its placeholder has no shape", subject=element_id)
        return None, None
    placement = model.create_entity(
        "IfcLocalPlacement", RelativePlacement=_placement_3d(model, tuple(box[:3] / unit_scale))
    )
    dx, dy, dz = (float(v) / unit_scale for v in box[3:])
    if not (min(dx, dy, dz) > 0 and body is not None):
        findings.add("placeholder", "the element's box has no extent; its placeholder has no shape", subject=element_id)
        return placement, None
    profile = model.create_entity(
        "IfcRectangleProfileDef",
        ProfileType="AREA",
        Position=model.create_entity(
            "IfcAxis2Placement2D", Location=model.create_entity("IfcCartesianPoint", [dx / 2, dy / 2])
        ),
        XDim=dx,
        YDim=dy,
    )
    solid = model.create_entity(
        "IfcExtrudedAreaSolid",
        SweptArea=profile,
        Position=_placement_3d(model, (0.0, 0.0, 0.0)),
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
    return placement, model.create_entity("IfcProductDefinitionShape", Representations=[shape])


def _place_in_structure(structure: _Structure, proxy, level: str, zone: str) -> None:
    """The placeholder contained in the storey of its level (a span of levels: contained in the
    building and referenced in both storeys), and referenced in its zone."""
    if level in structure.storeys:
        structure.contain(structure.storeys[level], proxy)
    else:
        structure.contain(structure._building(), proxy)
        low, _, high = level.partition("-")
        if low in structure.storeys and high in structure.storeys:
            structure.reference(structure.storeys[low], proxy)
            structure.reference(structure.storeys[high], proxy)
    if zone:
        structure.reference(structure.zone(zone), proxy)


def _classify_placeholders(writer: _Writer, by_code: dict[str, list]) -> None:
    """One classification reference per element code, associated with its placeholders."""
    if not by_code:
        return
    model = writer.model
    classification = model.create_entity("IfcClassification", Name="Element classification of the case")
    for code, products in by_code.items():
        reference = model.create_entity(
            "IfcClassificationReference", Identification=code, Name=code, ReferencedSource=classification
        )
        writer.rooted(
            "IfcRelAssociatesClassification",
            ("classification", code),
            RelatedObjects=products,
            RelatingClassification=reference,
        )


def _placeholders(
    writer: _Writer, structure: _Structure, rows: pd.DataFrame, findings: Findings, unit_scale: float
) -> dict[str, object]:
    """IfcBuildingElementProxy placeholders with their boxes, by element id."""
    model = writer.model
    body = _body_context(model)
    made: dict[str, object] = {}
    if not len(rows):
        return made
    boxes = rows[["x", "y", "z", "dx", "dy", "dz"]].to_numpy(dtype=np.float64)
    complete = np.isfinite(boxes).all(axis=1)
    _placeholder_storeys(structure, rows["level"].astype(str).to_numpy(), boxes, complete)
    by_code: dict[str, list] = {}
    for number, row in enumerate(rows.itertuples(index=False)):
        element_id = str(row.id)
        global_id = _placeholder_global_id(writer, element_id)
        placement, representation = _box_shape(
            model, body, boxes[number], complete[number], unit_scale, findings, element_id
        )
        proxy = model.create_entity(
            "IfcBuildingElementProxy",
            GlobalId=global_id,
            Name=str(row.name) or element_id,
            ObjectType="placeholder from elements.csv",
            ObjectPlacement=placement,
            Representation=representation,
            Tag=element_id[:255],
        )
        made[element_id] = proxy
        _place_in_structure(structure, proxy, str(row.level), str(getattr(row, "zone", "")))
        code = str(getattr(row, "classification", ""))
        if code:
            by_code.setdefault(code, []).append(proxy)
        writer.pset(
            ELEMENT_PSET,
            {"ElementId": ("IfcIdentifier", element_id), "WorkBreakdownCode": ("IfcIdentifier", str(row.wbs))},
            [proxy],
            ("element-pset", element_id),
        )
    _classify_placeholders(writer, by_code)
    return made


def model_by_guid(model, global_id: str):
    """The entity of a model with a GlobalId, or None.

    Parameters
    ----------
    model : ifcopenshell.file
        An open model.
    global_id : str
        The GlobalId looked for.

    Returns
    -------
    ifcopenshell.entity_instance or None
        The entity; ``None`` when the model has none of that GlobalId.
    """
    try:
        return model.by_guid(global_id)
    except RuntimeError:
        return None


# -- calendars ---------------------------------------------------------------------------------------
def _day_ranges(days: dict[dt.date, str]) -> list[tuple[dt.date, dt.date, str]]:
    """Consecutive dates with the same reason joined into ranges."""
    ranges: list[tuple[dt.date, dt.date, str]] = []
    for day in sorted(days):
        reason = days[day]
        if ranges and ranges[-1][2] == reason and (day - ranges[-1][1]).days == 1:
            ranges[-1] = (ranges[-1][0], day, reason)
        else:
            ranges.append((day, day, reason))
    return ranges


def _calendar(writer: _Writer, case: Case, name: str):
    from ..calendars import parse_workdays

    model = writer.model
    table = case.calendars
    workdays = table.loc[table["calendar"] == name, "workdays"].iloc[0]
    mask = parse_workdays(workdays)
    holidays, extra = case_calendar_days(case, name)
    weekly = model.create_entity(
        "IfcRecurrencePattern", RecurrenceType="WEEKLY", WeekdayComponent=[k + 1 for k, on in enumerate(mask) if on]
    )
    working = [model.create_entity("IfcWorkTime", Name=f"working weekdays: {workdays}", RecurrencePattern=weekly)]
    for first, last, reason in _day_ranges(extra):
        working.append(
            model.create_entity(
                "IfcWorkTime", Name=reason or "extra working day", Start=first.isoformat(), Finish=last.isoformat()
            )
        )
    exception_times = [
        model.create_entity("IfcWorkTime", Name=reason or "holiday", Start=first.isoformat(), Finish=last.isoformat())
        for first, last, reason in _day_ranges(holidays)
    ]
    return writer.rooted(
        "IfcWorkCalendar",
        ("calendar", name),
        Name=name,
        Identification=name,
        WorkingTimes=working,
        ExceptionTimes=exception_times or None,
        PredefinedType="FIRSTSHIFT",
    )


# -- the schedule --------------------------------------------------------------------------------------
def _dates(column: pd.Series) -> list[dt.date | None]:
    return [None if pd.isna(v) else pd.Timestamp(v).date() for v in column]


def _work_schedule(writer: _Writer, case: Case, snap: Snapshot, result, data_time: str):
    """The IfcWorkPlan declared in the project and its IfcWorkSchedule, with the snapshot's
    facts and scheduling settings in our property set; returns the work schedule."""
    settings = result.settings
    project = writer.model.by_type("IfcProject")[0]
    plan = writer.rooted(
        "IfcWorkPlan",
        ("plan",),
        Name=case.settings.project.name,
        CreationDate=data_time,
        StartTime=date_time_text(snap.data_date, START_TIME),
        PredefinedType="PLANNED",
    )
    schedule = writer.rooted(
        "IfcWorkSchedule",
        ("schedule",),
        Name=snap.label,
        Identification=snap.folder,
        CreationDate=data_time,
        Purpose=f"{snap.kind} programme scheduled by the critical path method",
        StartTime=date_time_text(snap.data_date, START_TIME),
        FinishTime=date_time_text(result.completion, FINISH_TIME),
        PredefinedType=_SCHEDULE_TYPE.get(snap.kind, "PLANNED"),
    )
    writer.rooted("IfcRelDeclares", ("declares",), RelatingContext=project, RelatedDefinitions=[plan])
    writer.rooted("IfcRelAggregates", ("plan-schedule",), RelatingObject=plan, RelatedObjects=[schedule])
    writer.pset(
        SCHEDULING_PSET,
        {
            "DataDate": ("IfcDate", snap.data_date.isoformat()),
            "SnapshotLabel": ("IfcLabel", snap.label),
            "SnapshotFolder": ("IfcLabel", snap.folder),
            "SnapshotKind": ("IfcLabel", snap.kind),
            "Completion": ("IfcDate", result.completion.isoformat()),
            "Progress": ("IfcLabel", settings.progress),
            "LagCalendar": ("IfcLabel", settings.lag_calendar),
            "FloatTo": ("IfcLabel", settings.float_to),
            "DefaultCalendar": ("IfcLabel", settings.default_calendar),
            "TimesOfDay": (
                "IfcText",
                f"starts at {START_TIME}, finishes at {FINISH_TIME}; only the dates carry meaning",
            ),
        },
        [schedule],
        ("schedule-pset",),
    )
    return schedule


def _scheduled_columns(result) -> tuple[dict[str, int], dict[str, list]]:
    """Each activity's position in the schedule, and the schedule's columns as lists (the
    early and late dates as dates, None for no date)."""
    scheduled = result.activities.set_index("id")
    columns = {name: list(scheduled[name]) for name in ("total_float", "free_float", "critical", "status")}
    for name in ("early_start", "early_finish", "late_start", "late_finish"):
        columns[name] = _dates(scheduled[name])
    position = {identification: k for k, identification in enumerate(scheduled.index)}
    return position, columns


def _task_time_attributes(row, k: int, milestone: bool, columns: dict[str, list], point: int, data_time: str) -> dict:
    """The IfcTaskTime of one activity (``k``: its position in the schedule): duration, early
    and late dates, floats, actual dates and remaining time. A milestone's dates all carry the
    time of day of the boundary it sits on."""
    attributes = {
        "DurationType": "WORKTIME",
        "ScheduleDuration": work_days_duration(int(row.duration)),
        "StatusTime": data_time,
    }
    start, finish = columns["early_start"][k], columns["early_finish"][k]
    late_start, late_finish = columns["late_start"][k], columns["late_finish"][k]
    start_time = FINISH_TIME if milestone and point == FINISH_MILESTONE else START_TIME
    if start is not None:
        attributes["ScheduleStart"] = attributes["EarlyStart"] = date_time_text(start, start_time)
    if finish is not None:
        finish_time = start_time if milestone else FINISH_TIME
        attributes["ScheduleFinish"] = attributes["EarlyFinish"] = date_time_text(finish, finish_time)
    if late_start is not None:
        attributes["LateStart"] = date_time_text(late_start, start_time)
    if late_finish is not None:
        attributes["LateFinish"] = date_time_text(late_finish, start_time if milestone else FINISH_TIME)
    total, free = columns["total_float"][k], columns["free_float"][k]
    if not pd.isna(total):
        attributes["TotalFloat"] = work_days_duration(int(total))
        attributes["IsCritical"] = bool(columns["critical"][k])
    if not pd.isna(free):
        attributes["FreeFloat"] = work_days_duration(int(free))
    if not pd.isna(row.actual_start):
        attributes["ActualStart"] = date_time_text(pd.Timestamp(row.actual_start).date(), START_TIME)
    if not pd.isna(row.actual_finish):
        attributes["ActualFinish"] = date_time_text(pd.Timestamp(row.actual_finish).date(), FINISH_TIME)
    if not pd.isna(row.remaining):
        attributes["RemainingTime"] = work_days_duration(int(round(float(row.remaining))))
    return attributes


def _write_tasks(writer: _Writer, snap: Snapshot, result, data_time: str) -> tuple[dict, dict[str, list]]:
    """One IfcTask per activity with its task time and our property set; returns the tasks by
    activity id and the tasks of each calendar."""
    model = writer.model
    position, columns = _scheduled_columns(result)
    tasks: dict[str, object] = {}
    calendar_of: dict[str, list] = {}
    for row in snap.activities.itertuples(index=False):
        identification = str(row.id)
        k = position[identification]
        milestone = row.kind != "task" or int(row.duration) == 0
        attributes = _task_time_attributes(row, k, milestone, columns, int(result.point[k]), data_time)
        task_time = model.create_entity("IfcTaskTime", **attributes)
        task = writer.rooted(
            "IfcTask",
            ("task", identification),
            Name=str(row.name),
            Identification=identification,
            IsMilestone=bool(milestone),
            PredefinedType="CONSTRUCTION",
            TaskTime=task_time,
            Status=str(columns["status"][k]),
        )
        tasks[identification] = task
        calendar_of.setdefault(str(row.calendar), []).append(task)
        constraint_date = iso_date(row.constraint_date)
        writer.pset(
            SCHEDULING_PSET,
            {
                "Kind": ("IfcLabel", str(row.kind)),
                "Constraint": ("IfcLabel", str(row.constraint or "")),
                "ConstraintDate": ("IfcDate", constraint_date if row.constraint else None),
                "Party": ("IfcLabel", str(row.party or "")),
                "WorkBreakdownCode": ("IfcIdentifier", str(row.wbs or "")),
                "Calendar": ("IfcLabel", str(row.calendar)),
            },
            [task],
            ("task-pset", identification),
        )
    return tasks, calendar_of


def _write_links(writer: _Writer, links: pd.DataFrame, tasks: dict) -> int:
    """One IfcRelSequence per link, its lag an IfcLagTime of work days when not 0; returns how many."""
    for row in links.itertuples(index=False):
        lag = int(row.lag)
        time_lag = None
        if lag:
            time_lag = writer.model.create_entity(
                "IfcLagTime", LagValue=writer.value("IfcDuration", work_days_duration(lag)), DurationType="WORKTIME"
            )
        writer.rooted(
            "IfcRelSequence",
            ("link", str(row.pred), str(row.succ)),
            RelatingProcess=tasks[str(row.pred)],
            RelatedProcess=tasks[str(row.succ)],
            TimeLag=time_lag,
            SequenceType=SEQUENCE_ENUM[str(row.type)],
        )
    return len(links)


def _write_schedule(writer: _Writer, case: Case, snap: Snapshot, result) -> tuple[dict, int, int]:
    """The work plan, work schedule, tasks, calendars and links of a scheduled snapshot;
    returns the tasks by activity id and the counts of links and calendars."""
    data_time = date_time_text(snap.data_date, "00:00:00")
    schedule = _work_schedule(writer, case, snap, result, data_time)
    tasks, calendar_of = _write_tasks(writer, snap, result, data_time)
    if tasks:
        writer.rooted(
            "IfcRelAssignsToControl", ("schedule-tasks",), RelatedObjects=list(tasks.values()), RelatingControl=schedule
        )
    for name, members in calendar_of.items():
        calendar = _calendar(writer, case, name)
        writer.rooted(
            "IfcRelAssignsToControl", ("calendar-tasks", name), RelatedObjects=members, RelatingControl=calendar
        )
    return tasks, _write_links(writer, snap.links, tasks), len(calendar_of)


#: The header's preprocessor_version (ISO 10303-21 FILE_NAME: the program that wrote the
#: file) of every file the export writes; how an earlier export is recognised as ours.
WRITTEN_BY = "delay-toolkit"


def written_by_toolkit(path: Path) -> bool:
    """Whether ``path`` is an IFC file this toolkit's export wrote.

    Such a file may be replaced by the next export.

    Parameters
    ----------
    path : pathlib.Path
        An existing file; one that cannot be read gives False.

    Returns
    -------
    bool
        True when the file is a STEP physical file (ISO 10303-21) whose header's FILE_NAME
        names :data:`WRITTEN_BY` as the program that wrote it (read from its first 4096
        bytes).

    Examples
    --------
    >>> import pathlib, tempfile
    >>> header = "ISO-10303-21;\\nHEADER;\\nFILE_NAME('a.ifc','2025-01-01',(''),(''),'delay-toolkit 1.0','','');\\n"
    >>> with tempfile.TemporaryDirectory() as folder:
    ...     ours = pathlib.Path(folder) / "ours.ifc"
    ...     _ = ours.write_text(header)
    ...     other = pathlib.Path(folder) / "other.ifc"
    ...     _ = other.write_text(header.replace("delay-toolkit", "another-writer"))
    ...     written_by_toolkit(ours), written_by_toolkit(other)
    (True, False)
    """
    try:
        with open(path, "rb") as stream:
            head = stream.read(4096)
    except OSError:
        return False
    if not head.startswith(b"ISO-10303-21;"):
        return False
    start = head.find(b"FILE_NAME(")
    end = head.find(b";", start) if start >= 0 else -1
    return start >= 0 and f"'{WRITTEN_BY} ".encode() in head[start:end]


def _guard(case: Case, model: Path | None) -> dict:
    """The output policy's checks for the export's file (delay.output.check_file_target)."""
    inputs = list(case.input_files) + ([model] if model is not None else [])
    return {"case_root": case.root, "inputs": inputs, "recognise": written_by_toolkit}


def _write_file(model, path: Path, guard: dict) -> Path:
    from .. import __version__

    model.header.file_name.preprocessor_version = f"{WRITTEN_BY} {__version__}"
    # the writer takes the format from the name's ending, hence ".part.ifc"
    return write_output_file(path, model.write, suffix=".part.ifc", **guard)


def export_schedule(
    case: Case,
    snapshot: str | Snapshot,
    out_path: str | Path,
    *,
    model: str | Path | None = None,
    use_imported_model: bool = True,
    settings=None,
) -> ScheduleExport:
    """Write one snapshot, scheduled by the critical path method, as an IFC 4 work schedule.

    Parameters
    ----------
    case : delay.model.Case
        A loaded case.
    snapshot : str or delay.model.Snapshot
        Folder name, label or ``"asbuilt"`` (or a Snapshot).
    out_path : str or pathlib.Path
        The .ifc file to write (written under a temporary name, then moved into place): a
        new file, or one an earlier export wrote (:func:`written_by_toolkit`); never an
        input file, the case folder or a file inside it.
    model : str or pathlib.Path, optional
        An IFC 4 model to add the schedule to; its elements whose GlobalId is an element id
        of the case are assigned to the tasks that build them.
    use_imported_model : bool, default True
        Without ``model``: use the model the case's elements were imported from, when it is
        still there (``elements_source.json``). False writes placeholders only.
    settings : delay.model.ScheduleSettings, optional
        Scheduling settings overriding the case's.

    Returns
    -------
    ScheduleExport
        The file written and the counts of what is in it, with the findings.

    Raises
    ------
    delay.errors.CaseError
        Unknown snapshot, a logic loop, a model that cannot be read, is not IFC 4 or has no
        IfcProject.
    delay.output.OutputRefused
        When ``out_path`` must not be written (checked before any work).
    delay.ifc.IfcExtraMissing
        When ifcopenshell is not installed.

    References
    ----------
    ISO 16739-1:2018 (IFC 4): IfcWorkSchedule, IfcTask, IfcTaskTime, IfcRelSequence,
    IfcLagTime, IfcWorkCalendar, IfcRelAssignsToProduct.
    """
    from ..cpm import _find, schedule
    from . import require_ifcopenshell
    from .import_model import imported_model_path

    require_ifcopenshell()  # a clear message when the ifc extra is not installed
    import ifcopenshell.util.unit

    root = Path(case.root)
    if model is None and use_imported_model and root.is_dir():
        model = imported_model_path(root)
    guard = _guard(case, Path(model) if model is not None else None)
    check_file_target(out_path, **guard)  # refused before any work
    snap = snapshot if isinstance(snapshot, Snapshot) else _find(case, snapshot)
    result = schedule(case, snap, settings)
    findings = Findings()
    salt = f"{case.settings.project.name}\x1f{snap.folder}"
    if model is not None:
        model = Path(model)
        base = open_model(model)
        if base.schema != "IFC4":
            raise CaseError(
                Problem(
                    file=str(model),
                    message=f"the model is {base.schema}; the schedule is written in IFC 4",
                    fix="export the model as IFC 4, or leave it out (placeholders are written)",
                )
            )
        writer = _Writer(ifcopenshell, base, salt)
        writer.used.update(str(e.GlobalId) for e in base.by_type("IfcRoot"))
        if not base.by_type("IfcProject"):
            raise CaseError(
                Problem(file=str(model), message="the model has no IfcProject", fix="export the whole model")
            )
    else:
        base, writer = _new_file(ifcopenshell, salt, case.settings.project.name)
    unit_scale = float(ifcopenshell.util.unit.calculate_unit_scale(base))
    structure = _Structure(writer, unit_scale)

    elements = case.elements
    found: dict[str, object] = {}
    if model is not None and len(elements):
        for element_id in elements["id"].astype(str):
            entity = model_by_guid(base, element_id)
            if entity is not None and entity.is_a("IfcProduct"):
                found[element_id] = entity
    missing = elements[~elements["id"].astype(str).isin(set(found))] if len(elements) else elements
    if model is not None and len(missing):
        findings.add(
            "placeholder",
            f"{len(missing)} element(s) of elements.csv are not in the model; placeholders are written for them",
        )
    made = _placeholders(writer, structure, missing, findings, unit_scale)
    structure.finish()
    tasks, link_count, calendar_count = _write_schedule(writer, case, snap, result)

    by_wbs: dict[str, list] = {}
    for row in snap.activities.itertuples(index=False):
        if row.wbs:
            by_wbs.setdefault(str(row.wbs), []).append(tasks[str(row.id)])
    assignments = 0
    for element_id, wbs in zip(elements["id"].astype(str), elements["wbs"].astype(str)):
        product = found.get(element_id) or made.get(element_id)
        builders = by_wbs.get(wbs)
        if product is None or not builders:
            continue
        writer.rooted(
            "IfcRelAssignsToProduct", ("builds", element_id), RelatedObjects=builders, RelatingProduct=product
        )
        assignments += 1
    unbuilt = int(sum(1 for w in elements["wbs"].astype(str) if w not in by_wbs)) if len(elements) else 0
    if unbuilt:
        findings.add(
            "assignment", f"{unbuilt} element(s) share their wbs with no activity of the snapshot; no task builds them"
        )
    path = _write_file(base, Path(out_path), guard)
    return ScheduleExport(
        path, len(tasks), link_count, calendar_count, len(found), len(made), assignments, model, findings.frame()
    )


# -- demo ----------------------------------------------------------------------------------------------
def _only_the_baseline(root: Path):
    """A ``shutil.copytree`` filter that copies of a case what its baseline needs, and no
    more: case.toml, the calendars and the baseline snapshot (the round trip of the
    baseline's schedule reads nothing else, and the other files name later programmes)."""
    keep = {"case.toml", "calendars.csv", "calendar_exceptions.csv", "snapshots"}

    def ignore(folder: str, names: list[str]) -> set[str]:
        if Path(folder) == root:
            return {name for name in names if name not in keep}
        if Path(folder) == root / "snapshots":
            return {name for name in names if name != "baseline"}
        return set()

    return ignore


def demo_outputs(case: Case, out_folder: str | Path) -> list[Path]:
    """The IFC part of ``delay demo``.

    Model import, element checks, schedule export and its round trip, on a copy of the
    case (the case itself is never changed).

    Looks for an IFC model under the case's ``model/`` folder (the first ``*.ifc`` by name,
    with the import options in ``model/import_options.json``: ``code_property``,
    ``classification``, ``code_classification``). Writes into ``out_folder/ifc/``:

    - ``elements_from_model.csv`` and ``elements_findings.csv``: the model's elements as
      imported, and what the import found;
    - ``element_checks.json``: the element checks of the imported elements (suspected
      duplicates, unlinked elements);
    - ``baseline_schedule.ifc``: the baseline schedule added to a copy of the model, its
      tasks assigned to the elements they build;
    - ``schedule_round_trip.json``: that file read back as the baseline of another copy,
      compared activity by activity with the original schedule.

    Parameters
    ----------
    case : delay.model.Case
        A loaded case in folder form.
    out_folder : str or pathlib.Path
        The demo's output folder; ``ifc/`` is made under it.

    Returns
    -------
    list of pathlib.Path
        The files written (under ``out_folder``); empty when the case has no model (or is a
        workbook).

    Raises
    ------
    delay.errors.CaseError
        The model, or a copy of the case with it, does not read or load.
    delay.ifc.IfcExtraMissing
        When ifcopenshell is not installed.
    """
    from ..case import load_case
    from ..checks import element_checks
    from ..cpm import schedule
    from .import_model import FINDINGS_FILE, SOURCE_FILE, import_model
    from .schedule_io import import_work_schedule

    root = Path(case.root)
    models = sorted((root / "model").glob("*.ifc")) if (root / "model").is_dir() else []
    if not models or not root.is_dir():
        return []
    options_file = root / "model" / "import_options.json"
    options = json.loads(options_file.read_text(encoding="utf-8")) if options_file.is_file() else {}
    options = {k: options.get(k) for k in ("code_property", "classification", "code_classification")}
    out = Path(out_folder) / "ifc"
    out.mkdir(parents=True, exist_ok=True)
    written: list[Path] = []
    with tempfile.TemporaryDirectory(prefix="delay-demo-ifc-") as folder:
        copy = Path(folder) / "case"
        shutil.copytree(root, copy, ignore=shutil.ignore_patterns("model", "__pycache__", "*.py"))
        for name in ("elements.csv", FINDINGS_FILE, SOURCE_FILE):
            (copy / name).unlink(missing_ok=True)
        imported = import_model(models[0], copy, **options)
        copy_csv(copy / "elements.csv", out / "elements_from_model.csv")  # an output: its cells neutralised
        copy_csv(copy / FINDINGS_FILE, out / "elements_findings.csv")
        loaded = load_case(copy)
        checks = element_checks(loaded)
        (out / "element_checks.json").write_text(json.dumps(checks.to_json(), indent=2), encoding="utf-8")
        exported = export_schedule(loaded, "baseline", out / "baseline_schedule.ifc")
        written += [
            out / "elements_from_model.csv",
            out / "elements_findings.csv",
            out / "element_checks.json",
            exported.path,
        ]

        again = Path(folder) / "again"  # the round trip needs the baseline only
        shutil.copytree(root, again, ignore=_only_the_baseline(root))
        read_back = import_work_schedule(exported.path, again, "baseline", replace=True)
        first = schedule(loaded, "baseline").activities.set_index("id")
        second = schedule(load_case(again), "baseline").activities.set_index("id")
        columns = ["early_start", "early_finish", "late_start", "late_finish", "total_float", "free_float"]
        same_ids = set(first.index) == set(second.index)
        differing = []
        if same_ids:
            joined = first[columns].join(second[columns].add_suffix("_read_back"))
            for column in columns:
                left, right = joined[column], joined[f"{column}_read_back"]
                bad = ~((left == right) | (left.isna() & right.isna()))
                differing += [f"{i}: {column}" for i in joined.index[bad.to_numpy(dtype=bool)]]
        summary = {
            "model": models[0].name,
            "elements_imported": int(len(imported.read.elements)),
            "findings": int(len(imported.read.findings)),
            "duplicate_groups": checks.duplicate_groups(),
            "exported_tasks": exported.tasks,
            "exported_links": exported.links,
            "elements_assigned": exported.assignments,
            "read_back_activities": int(len(read_back.read.activities)),
            "read_back_links": int(len(read_back.read.links)),
            "same_activities": same_ids,
            "differences": differing,
            "completion": schedule(loaded, "baseline").completion.isoformat(),
        }
        (out / "schedule_round_trip.json").write_text(json.dumps(summary, indent=2), encoding="utf-8")
        written.append(out / "schedule_round_trip.json")
    return written
