"""Section 4, the windows analysis, told window by window.

From :func:`delay.methods.windows.analyse` (``ctx.results["windows"]``, a
:class:`~delay.methods.windows.WindowsResult`):

- the forecast completion of each programme at its data date, with the contract completion
  in force stepping up on the day of each extension granted
  (:func:`delay.contract.completion_in_force` with ``at=``);
- one generated sentence per window (``Window.sentence``);
- each window's movement by party, stacked, gains below zero (``Window.by_party_days``),
  and its split into progress and revisions;
- the windows table, the analyst's attributions beside the rule
  (``WindowsResult.attributions``), and, folded under the charts, the charge ledger: the
  causation of every charge other than zero (``Entitlement.causation`` of the windows);
- the changes of the driving path in each window.
"""

from __future__ import annotations

import datetime as dt

import pandas as pd

from delay.contract import completion_in_force, grants

from ..blocks import FigureBlock, Folded, Section, Sentences
from ..context import Context, days_text
from ..figures import PARTIES_DRAWN, completion_trend, window_movements, window_parties
from .common import causation_block

__all__ = ["section", "in_force_steps", "party_frame"]

_EXPLAIN = (
    "The progress updates cut the project into windows. In each window the forecast completion at "
    "the end is compared with the one at the start. A half-step brings the earlier programme to the "
    "later data date with the later progress alone, so each window's movement splits into what "
    "progress did and what the revisions to the programme did. Progress is charged to the "
    "activities on the chain that drives the completion activity, by how late each finished against "
    "the late dates its logic alone allowed (milestone constraints change nothing), in work days of "
    "the completion activity's calendar: float used and weekends or shutdowns crossed are not delay, "
    "and an activity that only carried an earlier delay is charged nothing. Revisions are charged to "
    "each kind of change in turn. In every window the charges add up to the movement, to the day, "
    "and the windows add up to the whole movement."
)

_CAUSATION_COLUMNS = [
    "window",
    "step",
    "activities",
    "event",
    "party",
    "days",
    "causes",
    "concurrent_with",
    "excusable_days",
    "compensable_days",
    "culpable_days",
    "classification",
]

_LEDGER_COLUMNS = [
    "window",
    "start",
    "end",
    "source",
    "activity",
    "name",
    "level",
    "counted",
    "inherited",
    "driving_predecessor",
    "work_days",
    "days",
    "events",
    "party",
    "basis",
    "concurrent_with",
    "reason",
]


def in_force_steps(case, first: dt.date, last: dt.date) -> pd.DataFrame:
    """The whole works' contract completion in force over time.

    Parameters
    ----------
    case : delay.model.Case
        The loaded case.
    first, last : datetime.date
        The dates the chart spans.

    Returns
    -------
    pandas.DataFrame
        ``date``, ``completion_in_force`` and ``grant``: a row at ``first``, one on the day
        of each grant after it (its id and days in ``grant``), and one at ``last`` (or at
        the last grant, when later).
    """
    granted = grants(case)
    rows = [{"date": first, "completion_in_force": completion_in_force(case, at=first)[2], "grant": ""}]
    days = sorted({pd.Timestamp(d).date() for d in granted["granted_on"]})
    for day in days:
        if day <= first:
            continue
        made = granted[pd.to_datetime(granted["granted_on"]).dt.date == day]
        words = ", ".join(f"{g} +{int(n)} days" for g, n in zip(made["id"], made["days"]))
        rows.append({"date": day, "completion_in_force": completion_in_force(case, at=day)[2], "grant": words})
    end = max([last] + days)
    rows.append({"date": end, "completion_in_force": completion_in_force(case, at=end)[2], "grant": ""})
    return pd.DataFrame(rows, columns=["date", "completion_in_force", "grant"])


def party_frame(result) -> pd.DataFrame:
    """Each window's delays and gains by party.

    Parameters
    ----------
    result : delay.methods.windows.WindowsResult
        The windows analysis.

    Returns
    -------
    pandas.DataFrame
        One row per window: ``window``, ``start``, ``end`` (labels), ``movement_days``, and
        per party of :data:`PARTIES_DRAWN` its delays (``<party>_days``) and gains
        (``<party>_gain_days``, zero or less), from the window's counted charges and
        revisions, which add up to its movement.
    """
    rows = []
    for w in result.windows:
        parties = list(w.counted["party"]) + list(w.revisions["party"])
        days = [int(d) for d in list(w.counted["days"]) + list(w.revisions["days"])]
        row = {"window": w.number, "start": w.start_label, "end": w.end_label, "movement_days": w.movement_days}
        for party in PARTIES_DRAWN:
            row[f"{party}_days"] = sum(d for p, d in zip(parties, days) if p == party and d > 0)
            row[f"{party}_gain_days"] = sum(d for p, d in zip(parties, days) if p == party and d < 0)
        rows.append(row)
    columns = ["window", "start", "end", "movement_days"]
    columns += [f"{p}{kind}" for p in PARTIES_DRAWN for kind in ("_days", "_gain_days")]
    return pd.DataFrame(rows, columns=columns)


def _trend(ctx: Context, result) -> list:
    case = ctx.case
    points = []
    if result.windows:
        first = result.windows[0]
        points.append((first.start, first.start_label, first.start_data_date, first.completion_start))
        points += [(w.end, w.end_label, w.end_data_date, w.completion_end) for w in result.windows]
    trend = pd.DataFrame(
        [
            {
                "snapshot": folder,
                "label": label,
                "kind": case.snapshot(folder).kind,
                "data_date": data_date,
                "completion": completion,
            }
            for folder, label, data_date, completion in points
        ],
        columns=["snapshot", "label", "kind", "data_date", "completion"],
    )
    steps = in_force_steps(case, points[0][2], points[-1][2]) if points else None
    caption = (
        "Forecast completion of each programme at its data date (the as-built record at its last day), "
        "and the contract completion in force, stepping up on the day each extension was granted."
    )
    return [
        FigureBlock(
            "completion_trend", completion_trend(trend, planned=ctx.completion(case.baseline), in_force=steps), caption
        ),
        ctx.table(
            "completion_trend",
            "Forecast completion at each programme",
            "windows",
            trend,
            labels={"snapshot": "programme folder"},
        ),
    ]


def section(ctx: Context) -> Section:
    """The windows section (see the module docstring).

    Parameters
    ----------
    ctx : reports.context.Context
        The report's results; this section reads ``ctx.results["windows"]``, the windows' entitlement and the grants.

    Returns
    -------
    reports.blocks.Section
        "Windows analysis (windows)"; not available when the method was not run.
    """
    windows, result = ctx.method_section("windows", _EXPLAIN)
    if result is None:
        return windows
    blocks = windows.blocks
    blocks += _trend(ctx, result)
    blocks.append(
        Sentences(tuple(w.sentence for w in result.windows), heading="Window by window", ordered=True, style="story")
    )
    table = result.table
    if len(table):
        blocks.append(
            FigureBlock(
                "window_parties",
                window_parties(party_frame(result)),
                "Each window's movement of completion by the party that carries it, stacked: "
                "delays above zero, gains (the contractor's acceleration, recovery) below; the "
                "diamond is the window's net movement.",
            )
        )
        blocks.append(
            FigureBlock(
                "window_movements",
                window_movements(table),
                "Each window's movement of completion: progress and revisions.",
            )
        )
    ledger = result.charges[[c for c in _LEDGER_COLUMNS if c in result.charges.columns]]
    blocks.append(
        Folded(
            f"The charge ledger: all {len(ledger)} charges of the {len(result.windows)} windows (open to read; printed "
            "in full)",
            (
                ctx.table(
                    "windows_ledger",
                    "The charge ledger: every charge of every window",
                    "windows",
                    ledger,
                    labels={"source": "progress or revision", "level": "level on the chain"},
                    note="Progress charges along each window's driving chain (counted: on the chain that is charged; "
                    "the others lie on tied paths beside it), then each kind of revision; the counted charges "
                    "of a window add up to its movement.",
                    style="folded",
                ),
            ),
        )
    )
    blocks.append(
        causation_block(
            ctx,
            "windows",
            "windows_causation",
            "Causation in each window (charges other than zero)",
            _CAUSATION_COLUMNS,
            only_charged=True,
        )
    )
    blocks.append(
        ctx.table(
            "windows",
            "Windows: movement of completion and its split",
            "windows",
            table.drop(columns=["progress_work_days", "revision_work_days"]),  # the page's width: the JSON has them
            note=f"Total movement {days_text(result.total_movement_days)}, from "
            f"{result.first_completion.isoformat()} to {result.last_completion.isoformat()}.",
        )
    )
    if result.attributions is not None and len(result.attributions):
        blocks.append(
            ctx.table(
                "windows_attributions",
                "The analyst's attributions beside the rule",
                "windows",
                result.attributions,
                note="attributions.csv: applied in memory, each beside what the matching rule would have given.",
            )
        )
    changes = pd.DataFrame(
        [
            {
                "window": w.number,
                "start": w.start,
                "end": w.end,
                "driving_start": len(w.driving_start),
                "driving_end": len(w.driving_end),
                "joined": list(w.joined_driving_path),
                "left": list(w.left_driving_path),
            }
            for w in result.windows
        ],
        columns=["window", "start", "end", "driving_start", "driving_end", "joined", "left"],
    )
    blocks.append(ctx.table("driving_path_changes", "Driving path changes in each window", "windows", changes))
    return windows
