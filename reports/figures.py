"""The report's charts: one function per figure, each returning a plotly figure.

Every chart of the report is made here and nowhere else, so each is tested once and looks
the same wherever it appears. Colours are the colour-blind-safe hues of
:mod:`reports.palette`; the roles are our own:

- planned dates and "time only" days: sky blue; actual dates and "time and money" days:
  deep blue; days of liquidated damages and lateness: vermillion; reference lines: black and grey;
- the bars of planned against actual dates differ in more than colour: planned bars are
  pale, hatched and outlined, actual bars solid and dark, for a greyscale print.

Text that comes from the case (activity names, event titles, labels) is escaped before it
reaches plotly, whose labels read a small subset of HTML: a name such as ``<b>`` shows as
typed and never becomes markup.
"""

from __future__ import annotations

import html

import numpy as np
import pandas as pd

from delay.convert import iso_date

from .palette import BACKGROUND_COLOUR, BUILT_BAR, HIGHLIGHT_COLOUR, PARTY_COLOURS, PLANNED_BAR, STATE_COLOURS

__all__ = [
    "completion_trend",
    "window_movements",
    "window_parties",
    "PARTIES_DRAWN",
    "completion_steps",
    "planned_against_built",
    "gantt_order",
    "GANTT_GROUPS",
    "days_by_method",
    "but_for_days",
    "PLANNED_COLOUR",
    "BUILT_COLOUR",
    "LATE_COLOUR",
    "REFERENCE_COLOUR",
    "MILLISECONDS_PER_DAY",
    "figure_html",
]

PLANNED_COLOUR = STATE_COLOURS[1]  # sky blue
BUILT_COLOUR = STATE_COLOURS[2]  # deep blue
LATE_COLOUR = STATE_COLOURS[3]  # vermillion
REFERENCE_COLOUR = STATE_COLOURS[4]  # grey
LINE_COLOUR = HIGHLIGHT_COLOUR  # black

MILLISECONDS_PER_DAY = 86_400_000
_FONT = dict(family='system-ui, -apple-system, "Segoe UI", sans-serif', size=12, color="#222222")


def _text(value) -> str:
    """Case text made safe for plotly's labels."""
    if value is None or (not isinstance(value, str) and pd.isna(value)):
        return ""
    return html.escape(str(value), quote=False)


def _layout(title: str, **extra) -> dict:
    layout = dict(
        title=dict(text=_text(title), x=0.0, xanchor="left", font=dict(size=15)),
        template="none",
        font=_FONT,
        paper_bgcolor=BACKGROUND_COLOUR,
        plot_bgcolor=BACKGROUND_COLOUR,
        margin=dict(l=70, r=30, t=60, b=60),
        hoverlabel=dict(align="left"),
        legend=dict(orientation="h", x=0.0, y=-0.15, xanchor="left", yanchor="top"),
    )
    layout.update(extra)
    return layout


def _reference_line(figure, *, y, text: str, colour: str, dash: str) -> None:
    """A horizontal line across the plot at ``y``, labelled at its right end."""
    figure.add_shape(
        type="line", xref="paper", x0=0, x1=1, yref="y", y0=y, y1=y, line=dict(color=colour, width=1.5, dash=dash)
    )
    figure.add_annotation(
        xref="paper",
        x=1.0,
        yref="y",
        y=y,
        text=_text(text),
        showarrow=False,
        xanchor="right",
        yanchor="bottom",
        font=dict(size=11, color=colour),
    )


def completion_trend(
    trend: pd.DataFrame,
    *,
    contract_in_force=None,
    planned=None,
    in_force: pd.DataFrame | None = None,
    title: str = "Forecast completion at each programme",
):
    """Forecast completion of each programme against its data date.

    Parameters
    ----------
    trend : pandas.DataFrame
        One row per programme, in data-date order: ``label``, ``data_date``,
        ``completion`` (dates), optionally ``kind`` (``baseline``, ``update``, ``asbuilt``).
    contract_in_force, planned : datetime.date, optional
        Dates drawn as horizontal reference lines (the contract
        completion in force, black dashes; the planned completion, grey dots).
    in_force : pandas.DataFrame, optional
        The contract completion in force over time, in date order: ``date`` (from
        when), ``completion_in_force`` and ``grant`` (the words at a step, ``""`` where
        none); drawn as a black dashed line that steps up at each grant (instead of the
        flat ``contract_in_force``).
    title : str, optional
        The figure's title (default "Forecast completion at each programme").

    Returns
    -------
    plotly.graph_objects.Figure
        A line trace ``forecast completion`` (x: data dates, y: completions, ISO text) and,
        with ``in_force``, a trace ``contract completion in force`` with
        ``line.shape = "hv"`` (each date holds until the next grant).
    """
    import plotly.graph_objects as go

    labels = [_text(v) for v in trend["label"]]
    x = [iso_date(v) for v in trend["data_date"]]
    y = [iso_date(v) for v in trend["completion"]]
    figure = go.Figure(
        layout=_layout(
            title,
            xaxis=dict(title=dict(text="data date of the programme"), type="date"),
            yaxis=dict(title=dict(text="forecast completion"), type="date"),
            height=420,
            showlegend=False,
        )
    )
    figure.add_trace(
        go.Scatter(
            x=x,
            y=y,
            mode="lines+markers",
            name="forecast completion",
            text=labels,
            line=dict(color=BUILT_COLOUR, width=2),
            marker=dict(size=7, color=BUILT_COLOUR),
            hovertemplate="%{text}<br>data date %{x|%Y-%m-%d}<br>completion %{y|%Y-%m-%d}<extra></extra>",
        )
    )
    if in_force is not None and len(in_force):
        words = [_text(g) for g in in_force["grant"]]
        figure.add_trace(
            go.Scatter(
                x=[iso_date(v) for v in in_force["date"]],
                y=[iso_date(v) for v in in_force["completion_in_force"]],
                mode="lines+markers+text",
                line_shape="hv",
                name="contract completion in force",
                text=words,
                textposition="top right",
                textfont=dict(size=10, color=LINE_COLOUR),
                line=dict(color=LINE_COLOUR, width=1.5, dash="dash"),
                marker=dict(size=[8 if w else 0 for w in words], symbol="triangle-up", color=LINE_COLOUR),
                hovertemplate="in force from %{x|%Y-%m-%d}: %{y|%Y-%m-%d}<br>%{text}<extra></extra>",
            )
        )
        figure.update_layout(showlegend=True)
    elif contract_in_force is not None:
        _reference_line(
            figure, y=iso_date(contract_in_force), text="contract completion in force", colour=LINE_COLOUR, dash="dash"
        )
    if planned is not None:
        _reference_line(figure, y=iso_date(planned), text="planned completion", colour=REFERENCE_COLOUR, dash="dot")
    return figure


def window_movements(windows: pd.DataFrame, *, title: str = "Movement of completion in each window"):
    """Each window's movement of completion split into progress and revisions.

    Parameters
    ----------
    windows : pandas.DataFrame
        One row per window: ``window``, ``start``, ``end`` (programme names),
        ``progress_days``, ``revision_days`` (calendar days; positive is delay).
    title : str, optional
        The figure's title (default "Movement of completion in each window").

    Returns
    -------
    plotly.graph_objects.Figure
        Two bar traces stacked (``progress``, ``revisions``), one bar per window (x: the
        window numbers as text).
    """
    import plotly.graph_objects as go

    names = [str(int(w)) for w in windows["window"]]
    spans = [
        f"window {int(w)}: {_text(s)} to {_text(e)}"
        for w, s, e in zip(windows["window"], windows["start"], windows["end"])
    ]
    figure = go.Figure(
        layout=_layout(
            title,
            barmode="relative",
            height=420,
            xaxis=dict(title=dict(text="window"), type="category"),
            yaxis=dict(title=dict(text="calendar days (positive is delay)"), zeroline=True),
        )
    )
    figure.add_trace(
        go.Bar(
            x=names,
            y=[int(v) for v in windows["progress_days"]],
            name="effect of progress",
            marker_color=BUILT_COLOUR,
            text=spans,
            textposition="none",
            hovertemplate="%{text}<br>progress %{y} days<extra></extra>",
        )
    )
    figure.add_trace(
        go.Bar(
            x=names,
            y=[int(v) for v in windows["revision_days"]],
            name="effect of revisions",
            marker_color=PLANNED_COLOUR,
            text=spans,
            textposition="none",
            hovertemplate="%{text}<br>revisions %{y} days<extra></extra>",
        )
    )
    return figure


#: The parties of :func:`window_parties`, in the order stacked.
PARTIES_DRAWN = ("employer", "contractor", "neutral", "concurrent")


def window_parties(windows: pd.DataFrame, *, title: str = "Each window's movement of completion, by party"):
    """Each window's movement of completion split by the party carrying it, stacked: delays
    above zero, gains (the contractor's acceleration, recovery, re-planning that saves time)
    below.

    Parameters
    ----------
    windows : pandas.DataFrame
        One row per window: ``window``, ``start``, ``end`` (programme labels),
        ``movement_days``, and per party of :data:`PARTIES_DRAWN` its delays
        ``<party>_days`` (zero or more) and its gains ``<party>_gain_days`` (zero or less),
        in calendar days.
    title : str, optional
        The figure's title (default "Each window's movement of completion, by party").

    Returns
    -------
    plotly.graph_objects.Figure
        Per party a bar trace of its delays and one of its gains (the same colour, the
        gains hatched; ``barmode="relative"`` stacks delays up from zero and gains down),
        x the window numbers as text, leaving out a trace that would be zero in every
        window; and a marker trace ``net movement`` at each window's movement (the sum of
        its bars).
    """
    import plotly.graph_objects as go

    names = [str(int(w)) for w in windows["window"]]
    spans = [
        f"window {int(w)}: {_text(s)} to {_text(e)}"
        for w, s, e in zip(windows["window"], windows["start"], windows["end"])
    ]
    figure = go.Figure(
        layout=_layout(
            title,
            barmode="relative",
            height=460,
            margin=dict(l=70, r=30, t=90, b=60),
            xaxis=dict(title=dict(text="window"), type="category"),
            yaxis=dict(title=dict(text="calendar days (below zero: a gain)"), zeroline=True, zerolinecolor=LINE_COLOUR),
            legend=dict(orientation="h", x=0.0, y=1.0, xanchor="left", yanchor="bottom"),
        )
    )
    for party in PARTIES_DRAWN:
        for column, name, shape in (
            (f"{party}_days", party, "x" if party == "concurrent" else ""),
            (f"{party}_gain_days", f"{party}: gain", "/"),
        ):
            values = [int(v) for v in windows[column]]
            if not any(values):
                continue
            figure.add_trace(
                go.Bar(
                    x=names,
                    y=values,
                    name=name,
                    text=spans,
                    textposition="none",
                    legendgroup=party,
                    marker=dict(
                        color=PARTY_COLOURS[party],
                        line=dict(color=LINE_COLOUR, width=0.5),
                        pattern=dict(shape=shape, fgcolor="#FFFFFF", size=6, fillmode="overlay"),
                    ),
                    hovertemplate="%{text}<br>" + name + " %{y} days<extra></extra>",
                )
            )
    figure.add_trace(
        go.Scatter(
            x=names,
            y=[int(v) for v in windows["movement_days"]],
            mode="markers",
            name="net movement",
            text=spans,
            marker=dict(symbol="diamond", size=9, color="#FFFFFF", line=dict(color=LINE_COLOUR, width=2)),
            hovertemplate="%{text}<br>net movement %{y} days<extra></extra>",
        )
    )
    return figure


def completion_steps(steps: pd.DataFrame, *, title: str = "Completion after each event"):
    """Completion after each event of a cumulative run, as a staircase.

    Parameters
    ----------
    steps : pandas.DataFrame
        One row per point, in run order: ``run`` (the programme the events are inserted
        into; one staircase per run), ``step`` (``"before any event"`` or the event id),
        ``completion`` (date after the step), optionally ``alone`` (completion with that
        event alone, drawn as a hollow marker) and ``title`` (hover text).
    title : str, optional
        The figure's title (default "Completion after each event").

    Returns
    -------
    plotly.graph_objects.Figure
        Per run one ``lines`` trace with ``line.shape = "hv"`` (x: step labels, y: ISO
        dates), and, where ``alone`` is given, one ``markers`` trace of impacts alone.
    """
    import plotly.graph_objects as go

    figure = go.Figure(
        layout=_layout(
            title,
            height=460,
            xaxis=dict(title=dict(text="events inserted, in order"), type="category", tickangle=-35, automargin=True),
            yaxis=dict(title=dict(text="completion"), type="date"),
            margin=dict(l=70, r=30, t=90, b=110),
            legend=dict(orientation="h", x=0.0, y=1.0, xanchor="left", yanchor="bottom"),
        )
    )
    runs = list(dict.fromkeys(steps["run"]))
    for number, run in enumerate(runs):
        rows = steps[steps["run"] == run]
        x = [f"{_text(run)}: {_text(s)}" if len(runs) > 1 else _text(s) for s in rows["step"]]
        hover = [_text(t) for t in rows["title"]] if "title" in rows else [""] * len(rows)
        figure.add_trace(
            go.Scatter(
                x=x,
                y=[iso_date(v) for v in rows["completion"]],
                mode="lines+markers",
                line_shape="hv",
                name=f"cumulative: {_text(run)}" if len(runs) > 1 else "completion, events inserted one after another",
                line=dict(color=BUILT_COLOUR if number % 2 == 0 else LATE_COLOUR, width=2),
                marker=dict(size=7),
                text=hover,
                hovertemplate="%{x}<br>%{text}<br>completion %{y|%Y-%m-%d}<extra></extra>",
            )
        )
        if "alone" in rows and rows["alone"].notna().any():
            figure.add_trace(
                go.Scatter(
                    x=x,
                    y=[iso_date(v) for v in rows["alone"]],
                    mode="markers",
                    name="completion with that event alone" if number == 0 else f"alone: {_text(run)}",
                    showlegend=number == 0,
                    marker=dict(size=9, symbol="circle-open", color=PLANNED_COLOUR, line=dict(width=2)),
                    hovertemplate="%{x}<br>with this event alone: %{y|%Y-%m-%d}<extra></extra>",
                )
            )
    return figure


#: The two groups of rows of :func:`planned_against_built`, top first.
GANTT_GROUPS = ("as-built critical path", "other activities")

#: Pixels of the top margin of :func:`planned_against_built`: the title, the legend under
#: it, then the date ticks above the plot, each in a band of its own.
_GANTT_TITLE_PX, _GANTT_LEGEND_PX, _GANTT_TOP_PX, _GANTT_BOTTOM_PX = 12, 44, 120, 110


def gantt_order(activities: pd.DataFrame, critical_path=None) -> pd.DataFrame:
    """The rows of :func:`planned_against_built` in the order drawn, with their group.

    Parameters
    ----------
    activities : pandas.DataFrame
        As for :func:`planned_against_built`.
    critical_path : pandas.DataFrame or list of str, optional
        The as-built critical path in path order: the ``critical_path`` table of
        :class:`delay.methods.asbuilt.AsBuiltResult` (its ``activity`` column) or a list of
        activity ids; ``None`` for none.

    Returns
    -------
    pandas.DataFrame
        ``activities`` reordered: the activities on the path first, in path order, then the
        others by start (the planned start, else the actual start), then id; with a column
        ``group`` (one of :data:`GANTT_GROUPS`).

    Examples
    --------
    >>> rows = pd.DataFrame({"activity": ["A", "B", "C"], "planned_start": pd.to_datetime(
    ...     ["2025-01-06", "2025-01-13", "2025-01-08"]), "actual_start": pd.NaT})
    >>> gantt_order(rows, ["B", "A"])["activity"].tolist()
    ['B', 'A', 'C']
    """
    if critical_path is None:
        path: list[str] = []
    elif isinstance(critical_path, pd.DataFrame):
        path = [str(a) for a in critical_path["activity"]]
    else:
        path = [str(a) for a in critical_path]
    position = {ident: k for k, ident in enumerate(dict.fromkeys(path))}
    ids = activities["activity"].astype(str)
    start = pd.to_datetime(activities["planned_start"]).fillna(pd.to_datetime(activities["actual_start"]))
    keys = pd.DataFrame(
        {"path": ids.map(position).to_numpy(dtype=float), "start": start.to_numpy(), "id": ids.to_numpy()}
    )
    order = keys.sort_values(["path", "start", "id"], na_position="last", kind="stable").index
    out = activities.iloc[order].reset_index(drop=True)
    out["group"] = np.where(keys["path"].notna().to_numpy()[order], GANTT_GROUPS[0], GANTT_GROUPS[1])
    return out


def planned_against_built(
    activities: pd.DataFrame,
    *,
    critical_path=None,
    data_dates: pd.DataFrame | None = None,
    title: str = "As-planned versus as-built, activities on the driving paths",
):
    """Planned and actual bars per activity, the as-built critical path first.

    Planned bars are a pale tint, hatched and outlined; actual bars solid and dark
    (:data:`reports.palette.PLANNED_BAR`, :data:`reports.palette.BUILT_BAR`), so that they
    stay apart in a greyscale print as well as in colour. The legend sits under the title,
    above the date ticks, clear of the axes.

    Parameters
    ----------
    activities : pandas.DataFrame
        One row per activity: ``wbs``, ``activity``, ``name``, ``planned_start``,
        ``planned_finish``, ``actual_start``, ``actual_finish`` (dates; a missing pair
        draws no bar) and ``milestone`` (bool). A bar runs from the start of its start date
        to the end of its finish date (work happens on both), so its length is
        ``finish - start + 1`` days.
    critical_path : pandas.DataFrame or list of str, optional
        The as-built critical path in path order (the ``critical_path`` table
        of :func:`delay.methods.asbuilt.compare`, or a list of ids): its activities are
        drawn first, in path order, then the others by start (:func:`gantt_order`).
    data_dates : pandas.DataFrame, optional
        ``label`` and ``data_date`` of each progress update, drawn as dotted
        vertical lines, labelled under the plot.
    title : str, optional
        The figure's title (default "As-planned versus as-built, activities on the driving paths").

    Returns
    -------
    plotly.graph_objects.Figure
        Two horizontal bar traces (``as planned``, ``as built``) on a two-level category
        axis (the group of :data:`GANTT_GROUPS`, the activity id), ``base`` the start date
        and ``x`` the length in milliseconds; milestones as diamond markers in two further
        traces (open as planned, filled as built). A first, invisible trace ``rows`` holds
        every row so the axis keeps the order drawn.
    """
    import plotly.graph_objects as go

    rows = gantt_order(activities, critical_path)
    groups = [g.replace(" ", "<br>", 1) for g in rows["group"]]
    ids = [_text(i) for i in rows["activity"]]
    names = [_text(n) for n in rows["name"]]
    codes = [_text(w) or "(no code)" for w in rows["wbs"]]
    height = max(360, _GANTT_TOP_PX + _GANTT_BOTTOM_PX + 22 * len(ids))
    layout = _layout(
        title,
        barmode="group",
        bargap=0.25,
        bargroupgap=0.05,
        height=height,
        xaxis=dict(type="date", side="top", ticks="outside", automargin=False),
        # the rows top first, half a row of room at either end (categories count 0, 1, ...)
        yaxis=dict(type="multicategory", range=[len(ids) - 0.5, -0.5], autorange=False, tickfont=dict(size=10)),
        margin=dict(l=230, r=30, t=_GANTT_TOP_PX, b=_GANTT_BOTTOM_PX),
        legend=dict(
            orientation="h",
            x=0.0,
            xanchor="left",
            xref="container",
            y=1 - _GANTT_LEGEND_PX / height,
            yanchor="top",
            yref="container",
        ),
    )
    layout["title"].update(y=1 - _GANTT_TITLE_PX / height, yanchor="top", yref="container")
    figure = go.Figure(layout=layout)
    milestone = rows["milestone"].to_numpy(dtype=bool) if "milestone" in rows else np.zeros(len(ids), bool)
    first_date = pd.to_datetime(rows["planned_start"]).fillna(pd.to_datetime(rows["actual_start"]))
    figure.add_trace(
        go.Scatter(
            mode="markers",
            y=[groups, ids],
            x=[iso_date(v) for v in first_date],
            showlegend=False,
            marker=dict(opacity=0, size=1),
            hoverinfo="skip",
            name="rows",
        )
    )
    for which, style, name in (("planned", PLANNED_BAR, "as planned"), ("actual", BUILT_BAR, "as built")):
        start = pd.to_datetime(rows[f"{which}_start"])
        finish = pd.to_datetime(rows[f"{which}_finish"])
        dated = (start.notna() & finish.notna()).to_numpy()
        length = ((finish - start).dt.days + 1).to_numpy(dtype=float, na_value=np.nan) * MILLISECONDS_PER_DAY
        hover = [
            f"{i} {n}<br>wbs {c}<br>{name}: {iso_date(s)} to {iso_date(f)}"
            for i, n, c, s, f in zip(ids, names, codes, start, finish)
        ]

        def pick(values, keep):
            return [v for v, k in zip(values, keep) if k]

        bar, point = dated & ~milestone, dated & milestone
        figure.add_trace(
            go.Bar(
                orientation="h",
                name=name,
                y=[pick(groups, bar), pick(ids, bar)],
                base=pick([iso_date(v) for v in start], bar),
                x=[float(v) for v in pick(length, bar)],
                marker=dict(
                    color=style["fill"],
                    line=dict(color=style["line"], width=1),
                    pattern=dict(shape=style["pattern"], fgcolor=style["line"], size=6, solidity=0.3),
                ),
                hovertext=pick(hover, bar),
                hoverinfo="text",
            )
        )
        figure.add_trace(
            go.Scatter(
                mode="markers",
                name=f"{name} (milestone)",
                showlegend=False,
                marker=dict(
                    symbol="diamond-open" if style["pattern"] else "diamond",
                    size=10,
                    color=style["line"],
                    line=dict(color=style["line"], width=2),
                ),
                y=[pick(groups, point), pick(ids, point)],
                x=pick([iso_date(f) for f in finish], point),
                hovertext=pick(hover, point),
                hoverinfo="text",
            )
        )
    if data_dates is not None:
        for label, day in zip(data_dates["label"], data_dates["data_date"]):
            _data_date_line(figure, iso_date(day), label)
    return figure


def _data_date_line(figure, day: str | None, label) -> None:
    """A dotted vertical line at a data date, labelled below the plot."""
    figure.add_shape(
        type="line",
        yref="paper",
        y0=0,
        y1=1,
        xref="x",
        x0=day,
        x1=day,
        line=dict(color=REFERENCE_COLOUR, width=1, dash="dot"),
    )
    figure.add_annotation(
        yref="paper",
        y=0,
        yshift=-6,
        xref="x",
        x=day,
        text=_text(label),
        showarrow=False,
        textangle=-90,
        xanchor="center",
        yanchor="top",
        font=dict(size=10, color="#555555"),
    )


def days_by_method(summary: pd.DataFrame, *, title: str = "Days by method"):
    """Extension of time, compensable days and days of liquidated damages of each method, side by side.

    Parameters
    ----------
    summary : pandas.DataFrame
        One row per method: ``method`` (its name in words), ``eot_days``,
        ``compensable_days``, ``ld_days`` (calendar days).
    title : str, optional
        The figure's title (default "Days by method").

    Returns
    -------
    plotly.graph_objects.Figure
        Three bar traces grouped by method, in the order above.
    """
    import plotly.graph_objects as go

    methods = [_text(m) for m in summary["method"]]
    figure = go.Figure(
        layout=_layout(
            title,
            barmode="group",
            height=400,
            xaxis=dict(type="category"),
            yaxis=dict(title=dict(text="calendar days")),
        )
    )
    for column, colour, name in (
        ("eot_days", BUILT_COLOUR, "extension of time"),
        ("compensable_days", PLANNED_COLOUR, "compensable days (time and money)"),
        ("ld_days", LATE_COLOUR, "days of liquidated damages"),
    ):
        figure.add_trace(
            go.Bar(
                x=methods,
                y=[int(v) for v in summary[column]],
                name=name,
                marker_color=colour,
                hovertemplate="%{x}<br>" + name + ": %{y}<extra></extra>",
            )
        )
    return figure


def but_for_days(by_party: pd.DataFrame, *, title: str = "How much earlier the works would have finished"):
    """The collapsed as-built's but-for days per party (need not add up).

    Parameters
    ----------
    by_party : pandas.DataFrame
        ``party`` and ``days_earlier`` (missing where nothing could be taken out;
        such a party is left out of the chart).
    title : str, optional
        The figure's title (default "How much earlier the works would have finished").

    Returns
    -------
    plotly.graph_objects.Figure
        One bar trace: a bar per party scored, the ``all`` row in grey.
    """
    import plotly.graph_objects as go

    rows = by_party[by_party["days_earlier"].notna()]
    names = ["all events" if p == "all" else f"{_text(p)} events" for p in rows["party"]]
    colours = [REFERENCE_COLOUR if p == "all" else BUILT_COLOUR for p in rows["party"]]
    figure = go.Figure(
        layout=_layout(
            title,
            height=360,
            showlegend=False,
            xaxis=dict(type="category"),
            yaxis=dict(title=dict(text="calendar days earlier")),
        )
    )
    figure.add_trace(
        go.Bar(
            x=names,
            y=[int(v) for v in rows["days_earlier"]],
            marker_color=colours,
            name="days earlier",
            hovertemplate="but for %{x}: %{y} days earlier<extra></extra>",
        )
    )
    return figure


def figure_html(figure, element_id: str) -> str:
    """The figure as an HTML fragment for a page that already holds plotly.js.

    Parameters
    ----------
    figure : plotly.graph_objects.Figure
        The figure.
    element_id : str
        The ``id`` of the ``div`` that holds it.

    Returns
    -------
    str
        The ``div`` and the script that draws the figure in it (no plotly.js, no plotly
        logo, resizing with the page).

    Examples
    --------
    >>> import plotly.graph_objects as go
    >>> fragment = figure_html(go.Figure(go.Bar(x=["A"], y=[3])), "figure-a")
    >>> 'id="figure-a"' in fragment, "<script" in fragment, "<html" in fragment
    (True, True, False)
    """
    return figure.to_html(
        full_html=False, include_plotlyjs=False, div_id=element_id, config={"displaylogo": False, "responsive": True}
    )
