"""Pieces several sections share: the causation table of a method, the events of a
modelled method with their notes, and the steps of a cumulative run for a staircase chart.
"""

from __future__ import annotations

import pandas as pd

from ..blocks import TableBlock
from ..context import Context

__all__ = ["causation_block", "event_rows", "steps_frame", "MODELLED_CAUSATION_COLUMNS", "CAUSATION_NOTE"]

#: Causation columns shown for the modelled methods (time impact adds ``snapshot``).
MODELLED_CAUSATION_COLUMNS = [
    "step",
    "event",
    "party",
    "days",
    "alone_days",
    "causes",
    "concurrent_with",
    "concurrent_days",
    "excusable_days",
    "compensable_days",
    "culpable_days",
    "classification",
]

CAUSATION_NOTE = (
    "Excusable days give time; compensable days (a part of the excusable days) give time and money; "
    "culpable days give neither. Excusable and culpable days add up to the days."
)


def causation_block(
    ctx: Context, method: str, key: str, title: str, columns: list[str], *, only_charged: bool = False, style: str = ""
) -> TableBlock:
    """The causation table of a method, from its entitlement.

    Parameters
    ----------
    ctx : reports.context.Context
        The report's results.
    method : str
        The method (also the section's key).
    key, title : str
        The table's.
    columns : list of str
        The columns shown (those the table has).
    only_charged : bool, default False
        Keep only the rows with days or concurrency.
    style : str, default ""
        The block's style.

    Returns
    -------
    reports.blocks.TableBlock
        The table (key ``key``), registered in ``ctx``, with the causation note.
    """
    table = ctx.entitlement.method(method).causation.table
    if only_charged and len(table):
        table = table[(table["days"] != 0) | (table["concurrent_with"].fillna("") != "")]
    return ctx.table(
        key, title, method, table[[c for c in columns if c in table.columns]], note=CAUSATION_NOTE, style=style
    )


def event_rows(
    events: pd.DataFrame, extra: list[str] = (), alone: list[str] = (), increment: list[str] = ()
) -> pd.DataFrame:
    """A modelled method's events for the report.

    Parameters
    ----------
    events : pandas.DataFrame
        The method's events (:data:`delay.methods.impacted.EVENT_COLUMNS`).
    extra, alone, increment : list of str, default ()
        Columns shown after ``start``, after ``alone_days`` and after
        ``increment_days``.

    Returns
    -------
    pandas.DataFrame
        The figures, and one column ``notes``: activities not found, what a hold left
        alone, warnings.
    """
    notes = []
    for record in events.itertuples(index=False):
        parts = [record.applied, record.effect, *getattr(record, "warnings", [])]
        notes.append("; ".join(p for p in parts if p))
    columns = [
        "event",
        "title",
        "party",
        "impact",
        "start",
        *extra,
        "alone_days",
        *alone,
        "increment_days",
        *increment,
        "completion_after",
    ]
    return events[columns].assign(notes=notes)


def steps_frame(rows: list[dict]) -> pd.DataFrame:
    """The points of :func:`reports.figures.completion_steps`.

    Parameters
    ----------
    rows : list of dict
        Dicts with ``run``, ``step``, ``completion``, ``alone``, ``title``.

    Returns
    -------
    pandas.DataFrame
        Those columns, in that order (missing keys blank).

    Examples
    --------
    >>> steps_frame([{"run": "baseline", "step": "before any event", "completion": "2025-06-30"}]).columns.tolist()
    ['run', 'step', 'completion', 'alone', 'title']
    """
    return pd.DataFrame(rows, columns=["run", "step", "completion", "alone", "title"])
