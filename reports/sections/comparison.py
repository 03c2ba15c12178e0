"""Section 8, the method comparison: the methods side by side and why they differ.

From :func:`delay.comparison.compare_methods` (``ctx.comparison``): the explanation in
plain words, the days per party and per event by method; and from
:func:`delay.comparison.sensitivity`, the headline figures under the other progress mode
and the other concurrency rule.
"""

from __future__ import annotations

from delay.comparison import sensitivity

from ..blocks import Paragraph, Section
from ..context import Context

__all__ = ["section"]

_EXPLAIN = (
    "Different recognised methods can give different answers on the same facts. This section sets "
    "the methods' figures side by side and explains in plain words why they differ."
)


def section(ctx: Context) -> Section:
    """The comparison section (see the module docstring).

    Parameters
    ----------
    ctx : reports.context.Context
        The report's results; this section reads ``ctx.comparison`` (and runs :func:`delay.comparison.sensitivity`).

    Returns
    -------
    reports.blocks.Section
        "Method comparison"; not available when no method assessed entitlement.
    """
    comparison = Section("comparison", "Method comparison")
    if ctx.comparison is None:
        return comparison.not_shown("No method that assesses entitlement was run, so there is nothing to compare.")
    result = ctx.comparison
    blocks = comparison.blocks
    blocks.append(Paragraph(_EXPLAIN))
    for paragraph in result.explanation:
        blocks.append(Paragraph(str(paragraph)))
    blocks.append(
        ctx.table(
            "comparison_by_party",
            "Days of delay to completion per party, by method",
            "comparison",
            result.by_party,
            note="Each method's column adds up to the delay that method explains.",
        )
    )
    blocks.append(
        ctx.table(
            "comparison_by_event",
            "Days per event, by method",
            "comparison",
            result.by_event,
            note="A day explained by several events counts against each, so these columns need not add up.",
        )
    )
    blocks.append(
        ctx.table(
            "sensitivity",
            "Sensitivity of the headline figures to the progress mode and the concurrency rule",
            "comparison",
            sensitivity(ctx.case, list(result.methods)),
        )
    )
    return comparison
