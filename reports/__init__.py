"""The report builder: figures, tables and pages made from the results of :mod:`delay`.

- :func:`build` writes a report folder (``report.html``, ``tables.xlsx``, ``tables/*.csv``,
  ``manifest.json``) for a case; :func:`demo_report` the full report of the demo case.
- :func:`verify` checks a report folder against its inputs.
- :func:`compute` gathers the report's sections and tables without writing anything.
- :mod:`reports.figures` makes every chart, :mod:`reports.element_timeline` the element
  timeline, :mod:`reports.tables` the tables' canonical form and the appendices.
"""

from reports.builder import ReportContent, compute
from reports.element_timeline import (
    ElementTimeline,
    element_states,
    figure_2d,
    figure_3d,
    standalone_html,
    timeline_html,
)
from reports.manifest import Verification, verify
from reports.writer import build, demo_report

__all__ = [
    "build",
    "demo_report",
    "verify",
    "compute",
    "ReportContent",
    "Verification",
    "ElementTimeline",
    "element_states",
    "figure_2d",
    "figure_3d",
    "standalone_html",
    "timeline_html",
]
