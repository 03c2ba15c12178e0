"""Section 9, as-planned versus as-built: the baseline's dates beside the actual ones.

From :func:`delay.methods.asbuilt.compare` (``ctx.results["asbuilt"]``, an
:class:`~delay.methods.asbuilt.AsBuiltResult`): the planned and actual completion and their
variance, a chart of planned against actual bars of the activities on the baseline driving
path and the as-built critical path (the path first, in path order:
:func:`reports.figures.gantt_order`), the as-built critical path with each activity's
contribution, the delay per period, and every activity planned against actual.
"""

from __future__ import annotations

import re

import pandas as pd

from delay.cpm import calendars_of, prepare

from ..blocks import Facts, FigureBlock, Section
from ..context import Context, days_text
from ..figures import planned_against_built

__all__ = ["section", "driving_path_frame", "CHART_ACTIVITIES"]

#: At most this many activities are drawn in the as-planned versus as-built chart.
CHART_ACTIVITIES = 300

_EXPLAIN = (
    "The planned dates of the baseline are set beside the actual dates of the as-built record, "
    "activity by activity, in calendar and in work days. The as-built critical path is traced back "
    "from the completion activity, each activity to the predecessor that held it back. Each activity "
    "on it contributes how much later it finished, past its own float, than its driving predecessor "
    "had (by the windows rules), and that delay falls in the period of its actual finish: an "
    "activity carried across a shutdown, or slipping into its own float, contributes nothing."
)

_COLUMNS = [
    "wbs",
    "activity",
    "name",
    "on_paths",
    "planned_start",
    "planned_finish",
    "actual_start",
    "actual_finish",
    "finish_variance_days",
    "milestone",
]


def _wbs_key(code) -> tuple:
    parts = re.split(r"[.\-/ ]", str(code or ""))
    return tuple((0, int(p), "") if p.isdigit() else (1, 0, p) for p in parts) if code else ((2, 0, ""),)


def driving_path_frame(ctx: Context, result) -> pd.DataFrame:
    """The activities on the baseline driving path and the as-built critical path.

    Parameters
    ----------
    ctx : reports.context.Context
        The report's results.
    result : delay.methods.asbuilt.AsBuiltResult
        The as-planned versus as-built comparison.

    Returns
    -------
    pandas.DataFrame
        Planned against actual, by work breakdown code then start, with the paths each
        activity is on and whether it is a milestone.
    """
    case = ctx.case
    planned_path = prepare(case, case.baseline, calendars=calendars_of(case)).run().driving_path()
    built_path = list(result.critical_path["activity"])
    wbs = {}
    for snap in [case.baseline] + list(case.updates) + ([case.asbuilt_snapshot] if case.asbuilt_snapshot else []):
        acts = snap.activities
        for ident, code in zip(acts["id"], acts["wbs"]):
            if code and ident not in wbs:
                wbs[ident] = code
    on_planned, on_built = set(planned_path), set(built_path)
    table = result.activities.set_index("activity")
    rows = []
    for ident in dict.fromkeys(planned_path + built_path):
        if ident not in table.index:
            continue
        row = table.loc[ident]
        paths = [
            p
            for p, flag in (
                ("baseline driving path", ident in on_planned),
                ("as-built critical path", ident in on_built),
            )
            if flag
        ]
        planned_duration = row["planned_duration"]
        milestone = bool(
            (pd.notna(planned_duration) and planned_duration == 0)
            or (pd.isna(planned_duration) and row["actual_duration"] == 0)
        )
        rows.append(
            {
                "wbs": wbs.get(ident, ""),
                "activity": ident,
                "name": row["name"],
                "on_paths": paths,
                "planned_start": row["planned_start"],
                "planned_finish": row["planned_finish"],
                "actual_start": row["actual_start"],
                "actual_finish": row["actual_finish"],
                "finish_variance_days": row["finish_variance_days"],
                "milestone": milestone,
            }
        )
    frame = pd.DataFrame(rows, columns=_COLUMNS)
    if len(frame):
        order = sorted(
            range(len(frame)),
            key=lambda k: (
                _wbs_key(frame["wbs"].iloc[k]),
                pd.Timestamp(frame["planned_start"].iloc[k])
                if pd.notna(frame["planned_start"].iloc[k])
                else pd.Timestamp(frame["actual_start"].iloc[k]),
                frame["activity"].iloc[k],
            ),
        )
        frame = frame.iloc[order].reset_index(drop=True)
    return frame


def section(ctx: Context) -> Section:
    """The as-planned versus as-built section (see the module docstring).

    Parameters
    ----------
    ctx : reports.context.Context
        The report's results; this section reads ``ctx.results["asbuilt"]`` and the baseline's driving path.

    Returns
    -------
    reports.blocks.Section
        "As-planned versus as-built (asbuilt)"; not available when the method was not run.
    """
    asbuilt, result = ctx.method_section("asbuilt", _EXPLAIN)
    if result is None:
        return asbuilt
    case = ctx.case
    blocks = asbuilt.blocks
    blocks.append(
        Facts(
            (
                ("Planned completion", result.planned_completion.isoformat()),
                ("Actual completion", result.actual_completion.isoformat()),
                ("Completion variance", days_text(result.completion_variance_days)),
            )
        )
    )
    frame = driving_path_frame(ctx, result)
    drawn, note = frame, ""
    if len(frame) > CHART_ACTIVITIES:
        keep = frame["finish_variance_days"].abs().fillna(0).sort_values(ascending=False, kind="stable")
        drawn = frame.loc[sorted(keep.index[:CHART_ACTIVITIES])]
        note = (
            f" The chart shows the {CHART_ACTIVITIES} of the {len(frame)} activities with the largest "
            "finish variance; the table lists them all."
        )
    data_dates = pd.DataFrame(
        {"label": [s.label for s in case.updates], "data_date": [s.data_date for s in case.updates]}
    )
    if len(drawn):
        blocks.append(
            FigureBlock(
                "planned_against_built",
                planned_against_built(drawn, critical_path=result.critical_path, data_dates=data_dates),
                "Planned (baseline early dates, pale hatched bars) and actual (solid bars) dates of the activities on "
                "the baseline driving path and the as-built critical path: the as-built critical path first, in path "
                "order, then the other activities by start; dotted lines mark the data dates of the progress "
                "updates." + note,
            )
        )
    blocks.append(
        ctx.table("driving_path_activities", "Activities on the driving paths, planned and actual", "asbuilt", frame)
    )
    blocks.append(
        ctx.table(
            "asbuilt_critical_path",
            "The as-built critical path",
            "asbuilt",
            result.critical_path,
            note="The contributions along the path add up to the completion variance.",
        )
    )
    blocks.append(
        ctx.table(
            "asbuilt_periods",
            "Delay along the as-built critical path by period",
            "asbuilt",
            result.periods,
            labels={"cumulative_days": "running total (calendar days)"},
        )
    )
    blocks.append(
        ctx.table(
            "asbuilt_activities",
            "Every activity, planned against actual",
            "asbuilt",
            result.activities,
        )
    )
    return asbuilt
