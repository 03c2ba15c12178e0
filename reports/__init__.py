"""The report builder: figures, tables and pages made from the results of :mod:`delay`."""

from reports.element_timeline import (
    ElementTimeline,
    element_states,
    figure_2d,
    figure_3d,
    standalone_html,
    timeline_html,
)

__all__ = [
    "ElementTimeline",
    "element_states",
    "figure_2d",
    "figure_3d",
    "standalone_html",
    "timeline_html",
]
