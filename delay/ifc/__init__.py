"""Building models and work schedules in IFC (ISO 16739), the open standard for them.

Analysts receive the design model as an IFC file and, more and more often, the programme
as an IFC work schedule. This package reads both into a case and writes a case's schedule
back as an IFC 4 work schedule:

- :func:`import_model` (``delay import-ifc``) reads every physical element of a model -
  its GlobalId, name, IFC class, classification reference, storey, spatial zone and an
  axis-aligned bounding box in metres from its geometry - and merges them into the case's
  ``elements.csv``, each with the work breakdown code that links it to the activities;
- :func:`import_work_schedule` (``delay import-ifc-schedule``) reads an ``IfcWorkSchedule``
  (tasks, task times, sequences with their lags, work calendars) into a snapshot folder;
- :func:`export_schedule` (``delay export-ifc``) writes one snapshot, scheduled by the
  toolkit's critical path method, as an IFC 4 work schedule whose tasks are assigned to
  the elements they build, so that a model viewer can play the sequence;
- :func:`demo_outputs` is what ``delay demo`` runs when the extra is installed.

Everything here needs ifcopenshell, the ``ifc`` extra of the toolkit
(``pip install .[ifc]``). It is imported only when one of these functions runs; without
it they raise :class:`IfcExtraMissing`, whose message is the one line the command prints.
The rest of the toolkit never imports this package.

References
----------
ISO 16739-1:2018, Industry Foundation Classes (IFC 4.0.2.1) for data sharing in the
construction and facility management industries: IfcElement, IfcRelAssociatesClassification,
IfcRelContainedInSpatialStructure, IfcWorkSchedule, IfcTask, IfcTaskTime, IfcRelSequence,
IfcLagTime, IfcWorkCalendar, IfcRelAssignsToProduct.
"""

from __future__ import annotations

import importlib

# The modules import ifcopenshell only inside their functions, so these imports work without it.
from .export import demo_outputs, export_schedule
from .import_model import import_model, read_model
from .schedule_io import import_work_schedule, read_work_schedule

__all__ = [
    "IfcExtraMissing",
    "INSTALL_HINT",
    "require_ifcopenshell",
    "available",
    "import_model",
    "read_model",
    "import_work_schedule",
    "read_work_schedule",
    "export_schedule",
    "demo_outputs",
]

#: The one line printed when ifcopenshell is missing.
INSTALL_HINT = "install the ifc extra: pip install .[ifc]"


class IfcExtraMissing(RuntimeError):
    """ifcopenshell, the ``ifc`` extra of the toolkit, is not installed.

    The message is always the one line the command prints (ending in :data:`INSTALL_HINT`).

    Parameters
    ----------
    detail : str, optional
        What the import said, kept as ``detail`` and not shown.
    """

    def __init__(self, detail: str = ""):
        self.detail = detail
        super().__init__(f"reading and writing IFC needs ifcopenshell - {INSTALL_HINT}")


def require_ifcopenshell():
    """Import ifcopenshell (and the parts of it used here) or raise :class:`IfcExtraMissing`.

    Returns
    -------
    module
        The ``ifcopenshell`` module, with ``ifcopenshell.geom``, ``ifcopenshell.guid`` and
        ``ifcopenshell.util.unit`` imported.

    Raises
    ------
    IfcExtraMissing
        One of them cannot be imported.
    """
    try:
        for part in ("ifcopenshell.geom", "ifcopenshell.guid", "ifcopenshell.util.unit"):
            importlib.import_module(part)
        return importlib.import_module("ifcopenshell")
    except ImportError as error:
        raise IfcExtraMissing(str(error)) from None


def available() -> bool:
    """Whether ifcopenshell imports (the ``ifc`` extra is installed).

    Returns
    -------
    bool
        True when :func:`require_ifcopenshell` succeeds.
    """
    try:
        require_ifcopenshell()
    except IfcExtraMissing:
        return False
    return True
