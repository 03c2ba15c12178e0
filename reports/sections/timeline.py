"""Section 10, the element timeline: the building model coloured by the state of its work.

From :func:`reports.element_timeline.element_states` (the baseline's early dates and the
as-built record joined to elements.csv by work breakdown code): the two views, as planned
and as built, week by week, and each element's dates.
"""

from __future__ import annotations

from ..blocks import Paragraph, Section, TimelineBlock
from ..context import Context
from ..element_timeline import element_states

__all__ = ["section"]

_EXPLAIN = (
    "The building model's elements take the colour of their work's state week by week, as planned "
    "(the baseline's early dates) and as built (the as-built record). Press Play, or move the "
    "slider, to watch what should have been built against what was built."
)

_COLUMNS = [
    "element",
    "name",
    "wbs",
    "classification",
    "level",
    "zone",
    "activities",
    "events",
    "highlighted",
    "planned_start",
    "planned_finish",
    "actual_start",
    "actual_finish",
    "linked_as_planned",
    "linked_as_built",
]


def section(ctx: Context) -> Section:
    """The element timeline section (see the module docstring).

    Parameters
    ----------
    ctx : reports.context.Context
        The report's results; this section reads the case's elements and programmes.

    Returns
    -------
    reports.blocks.Section
        "Element timeline"; not available when the case has no elements.
    """
    timeline_section = Section("timeline", "Element timeline")
    if not len(ctx.case.elements):
        return timeline_section.not_shown(
            "The case has no model elements (elements.csv is absent or empty): there is no element timeline."
        )
    timeline = element_states(ctx.case)
    timeline_section.blocks.append(Paragraph(_EXPLAIN))
    timeline_section.blocks.append(TimelineBlock(timeline))
    timeline_section.blocks.append(
        ctx.table(
            "element_dates",
            "Each element's dates as planned and as built",
            "timeline",
            timeline.elements.rename(columns={"id": "element"})[_COLUMNS],
            note=f"{len(timeline.frames)} weekly frames from {timeline.frame_dates[0]} to {timeline.frame_dates[-1]}.",
        )
    )
    return timeline_section
