"""The element timeline: the building model coloured by the state of its work, week by week.

Two views of the same model sit side by side, *as planned* (the baseline's early dates) and
*as built* (the as-built record, or else the last update). A slider and a play button step
through the project one week at a time, and every element takes the colour of its state on
that week's Monday. Elements built by activities that a delay event affected are outlined;
elements that no activity builds are grey and listed.

The package's parts:

- :mod:`~reports.element_timeline.data`: each element's dates and its state by week
  (:func:`element_states`, :class:`ElementTimeline`, the state codes);
- :mod:`~reports.element_timeline.scene`: the geometry and the plotly figures
  (:func:`figure_3d`, :func:`figure_2d`);
- :mod:`~reports.element_timeline.script`: the script and style the fragment carries;
- :mod:`~reports.element_timeline.fragment`: the report's HTML fragment and a page of its
  own (:func:`timeline_html`, :func:`standalone_html`).

Example
-------
A small random case with a dozen elements:

>>> import pathlib, tempfile
>>> from delay.case import load_case
>>> from delay.synth import synthesise
>>> from reports.element_timeline import element_states, timeline_html
>>> with tempfile.TemporaryDirectory() as folder:
...     case = load_case(synthesise(pathlib.Path(folder) / "case", 20, updates=2, elements=12))
>>> fragment = timeline_html(element_states(case), element_id="timeline")
>>> fragment.startswith('<div id="timeline" class="element-timeline">')
True
"""

from .data import (
    COMPLETE,
    IN_PROGRESS,
    LATE,
    NOT_STARTED,
    STATE_NAMES,
    UNLINKED,
    VIEWS,
    ElementTimeline,
    element_states,
)
from .fragment import standalone_html, timeline_html
from .scene import LEGEND, figure_2d, figure_3d

__all__ = [
    "ElementTimeline",
    "element_states",
    "figure_3d",
    "figure_2d",
    "timeline_html",
    "standalone_html",
    "NOT_STARTED",
    "IN_PROGRESS",
    "COMPLETE",
    "LATE",
    "UNLINKED",
    "STATE_NAMES",
    "VIEWS",
    "LEGEND",
]
