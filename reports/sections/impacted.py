"""Section 5, the impacted as-planned: each event put into the baseline, alone and in turn.

From :func:`delay.methods.impacted.analyse` (``ctx.results["impacted"]``, an
:class:`~delay.methods.impacted.ImpactedResult`): the completion before and after every
event, the total impact and the residual (the actual less the impacted completion), a
staircase of the cumulative run with each event's impact alone beside it, each event's
figures with what it left alone (``effect``) or could not apply (``applied``), the days per
party, and the method's causation (``Entitlement.causation``).
"""

from __future__ import annotations

from ..blocks import Facts, FigureBlock, Notice, Section
from ..context import Context, days_text
from ..figures import completion_steps
from .common import MODELLED_CAUSATION_COLUMNS, causation_block, event_rows, steps_frame

__all__ = ["section"]

_EXPLAIN = (
    "Each delay event of the register is put into the baseline programme, first on its own (its "
    "impact alone) and then one after another in the order they happened (the cumulative run). "
    "Impacts alone need not add up: events on parallel paths overlap and one can hide another. "
    "The increments of the cumulative run do add up, to the total impact. Each event is put in at "
    "its real dates; a hold stops the work it names for its period, and leaves alone work the plan "
    "has no work on then. The method measures the plan's response to the events, not what happened "
    "on site: the residual, the actual completion less the impacted one, shows the difference."
)


def section(ctx: Context) -> Section:
    """The impacted as-planned section (see the module docstring).

    Parameters
    ----------
    ctx : reports.context.Context
        The report's results; this section reads ``ctx.results["impacted"]`` and the method's entitlement.

    Returns
    -------
    reports.blocks.Section
        "Impacted as-planned (impacted)"; not available when the method was not run.
    """
    impacted, result = ctx.method_section("impacted", _EXPLAIN)
    if result is None:
        return impacted
    blocks = impacted.blocks
    if not len(result.events):
        blocks.append(Notice("The delay event register holds no events: nothing was inserted."))
    blocks.append(
        Facts(
            (
                ("Programme impacted", result.base),
                ("Completion before any event", result.completion_base.isoformat()),
                ("Completion after every event", result.completion_cumulative.isoformat()),
                ("Total impact", days_text(result.total_days)),
                ("Actual completion", result.actual_completion.isoformat()),
                ("Residual (actual less impacted)", days_text(result.residual_days)),
            )
        )
    )
    rows = [
        {
            "run": result.base,
            "step": "before any event",
            "completion": result.completion_base,
            "alone": None,
            "title": "the programme before any event",
        }
    ]
    rows += [
        {
            "run": result.base,
            "step": r.event,
            "completion": r.completion_after,
            "alone": r.completion_alone,
            "title": r.title,
        }
        for r in result.events.itertuples(index=False)
    ]
    chart = completion_steps(steps_frame(rows), title="Completion after each event")
    blocks.append(
        FigureBlock(
            "impacted_steps", chart, "The staircase is the cumulative run; hollow markers show each event alone."
        )
    )
    blocks.append(
        ctx.table(
            "impacted_events",
            "Each event alone and in the cumulative run",
            "impacted",
            event_rows(result.events, ["finish"], ["alone_work_days", "completion_alone"], ["increment_work_days"]),
            note=" ".join(result.notes),
        )
    )
    blocks.append(
        ctx.table(
            "impacted_by_party",
            "Per party",
            "impacted",
            result.by_party,
            labels={"alone_days": "the party's events together, without the others"},
        )
    )
    blocks.append(
        causation_block(
            ctx, "impacted", "impacted_causation", "Causation of the impacted as-planned", MODELLED_CAUSATION_COLUMNS
        )
    )
    return impacted
