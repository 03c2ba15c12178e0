"""Section 7, the collapsed as-built: the works but for each party's events, and each event.

From :func:`delay.methods.collapsed.analyse` (``ctx.results["collapsed"]``, a
:class:`~delay.methods.collapsed.CollapsedResult`): whether the as-built model reproduces
the actual dates (and where it does not: ``mismatches``), the but-for days of each party's
events and of each event alone (with the events not scored and why), and the method's
causation (``Entitlement.causation``).
"""

from __future__ import annotations

from ..blocks import Facts, FigureBlock, Paragraph, Section
from ..context import Context
from ..figures import but_for_days
from .common import MODELLED_CAUSATION_COLUMNS, causation_block

__all__ = ["section"]

_EXPLAIN = (
    "The as-built record is turned into a programme that reproduces the actual dates. The delay of "
    "one party's events (or of one event) is then taken out and the works are scheduled again: "
    "but for those events, the works would have finished on the date shown. But-for figures need "
    "not add up: with delays on parallel paths, taking out either alone may move completion "
    "little, while taking out both moves it a lot."
)


def section(ctx: Context) -> Section:
    """The collapsed as-built section (see the module docstring).

    Parameters
    ----------
    ctx : reports.context.Context
        The report's results; this section reads ``ctx.results["collapsed"]`` and the method's entitlement.

    Returns
    -------
    reports.blocks.Section
        "Collapsed as-built (collapsed)"; not available when the method was not run.
    """
    collapsed, result = ctx.method_section("collapsed", _EXPLAIN)
    if result is None:
        return collapsed
    blocks = collapsed.blocks
    blocks.append(
        Facts(
            (
                ("Actual completion", result.actual_completion.isoformat()),
                ("Completion of the as-built model", result.modelled_completion.isoformat()),
                (
                    "The model reproduces the actual dates",
                    "yes" if result.reproduced else f"no: {len(result.mismatches)} activities differ (listed below)",
                ),
            )
        )
    )
    if result.by_party["days_earlier"].notna().any():
        blocks.append(
            FigureBlock(
                "but_for_days",
                but_for_days(result.by_party),
                "But-for days of each party's events and of all events: they need not add up.",
            )
        )
    blocks.append(
        ctx.table(
            "collapsed_by_party",
            "But for each party's events",
            "collapsed",
            result.by_party,
            note=result.notes[0] if result.notes else "",
        )
    )
    blocks.append(ctx.table("collapsed_by_event", "But for each event alone", "collapsed", result.by_event))
    if len(result.mismatches):
        blocks.append(
            ctx.table(
                "collapsed_mismatches",
                "Where the as-built model differs from the actual dates",
                "collapsed",
                result.mismatches,
            )
        )
    for note in result.notes[1:]:
        blocks.append(Paragraph(note, style="small"))
    blocks.append(
        causation_block(
            ctx, "collapsed", "collapsed_causation", "Causation of the collapsed as-built", MODELLED_CAUSATION_COLUMNS
        )
    )
    return collapsed
