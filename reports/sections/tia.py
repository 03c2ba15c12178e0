"""Section 6, the time impact analysis: each event put into the programme of its time.

From :func:`delay.methods.tia.analyse` (``ctx.results["tia"]``, a
:class:`~delay.methods.tia.TimeImpactResult`): one staircase per programme with
its events, each programme's impacted completion and residual to the next, each event's
figures with its warnings (the programme may already show the event), the days per party,
and the method's causation (``Entitlement.causation``).
"""

from __future__ import annotations

from ..blocks import FigureBlock, Notice, Section
from ..context import Context
from ..figures import completion_steps
from .common import MODELLED_CAUSATION_COLUMNS, causation_block, event_rows, steps_frame

__all__ = ["section"]

_EXPLAIN = (
    "Each delay event is put into the last programme before it began (or the one the analyst names "
    "in tia_update), and its effect on that programme's forecast completion is measured. Events "
    "that share a programme are inserted one after another; their increments add up within it. "
    "Each programme's residual, the next programme's completion less its impacted completion, "
    "reconciles the increments with what happened: a positive residual is delay no event explains, "
    "a negative one recovery."
)


def section(ctx: Context) -> Section:
    """The time impact analysis section (see the module docstring).

    Parameters
    ----------
    ctx : reports.context.Context
        The report's results; this section reads ``ctx.results["tia"]`` and the method's entitlement.

    Returns
    -------
    reports.blocks.Section
        "Time impact analysis (tia)"; not available when the method was not run.
    """
    tia, result = ctx.method_section("tia", _EXPLAIN)
    if result is None:
        return tia
    blocks = tia.blocks
    if not len(result.events):
        blocks.append(Notice("The delay event register holds no events: nothing was inserted."))
    rows = []
    for update in result.updates.itertuples(index=False):
        rows.append(
            {
                "run": update.snapshot,
                "step": "before",
                "completion": update.completion_before,
                "alone": None,
                "title": f"the update of {update.data_date.isoformat()} before its events",
            }
        )
        events = result.events[result.events["snapshot"] == update.snapshot]
        rows += [
            {
                "run": update.snapshot,
                "step": r.event,
                "completion": r.completion_after,
                "alone": r.completion_alone,
                "title": r.title,
            }
            for r in events.itertuples(index=False)
        ]
    if rows:
        blocks.append(
            FigureBlock(
                "tia_steps",
                completion_steps(steps_frame(rows), title="Completion of each update after its events"),
                "One staircase per update; hollow markers show each event alone.",
            )
        )
    blocks.append(
        ctx.table(
            "tia_updates",
            "Each programme: its events, impacted completion and residual",
            "tia",
            result.updates,
            labels={"increment_days": "increments of its events (calendar days)", "events": "events inserted"},
        )
    )
    blocks.append(
        ctx.table(
            "tia_events",
            "Each event in the programme it was inserted into",
            "tia",
            event_rows(result.events, ["snapshot", "completion_before"]),
            labels={"snapshot": "programme inserted into"},
            note=" ".join(result.notes),
        )
    )
    blocks.append(
        ctx.table(
            "tia_by_party",
            "Per party",
            "tia",
            result.by_party,
            labels={
                "alone_days": "impacts alone of its events, summed (need not add up)",
                "increment_days": "increments of its events (calendar days)",
            },
        )
    )
    blocks.append(
        causation_block(
            ctx,
            "tia",
            "tia_causation",
            "Causation of the time impact analysis",
            ["step", "snapshot", *MODELLED_CAUSATION_COLUMNS[1:]],
        )
    )
    return tia
