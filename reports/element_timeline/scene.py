"""The element timeline's geometry and its plotly figures.

What it shows: every model element with a complete box in elements.csv (``x, y, z, dx, dy,
dz``, metres) as a box of 8 corners and 12 triangles in two 3D scenes, *as planned* and *as
built*; and every element, boxed or not, as a small square in the cell of its level and
zone in a flat view. The colours are the element states of
:class:`~reports.element_timeline.data.ElementTimeline` (built from the baseline's early
dates and the as-built record, see :mod:`reports.element_timeline.data`).

:func:`figure_3d` and :func:`figure_2d` return ordinary plotly figures whose frames carry
only the colour values (one byte per box corner per view per week): convenient in a
notebook, large for a long project. The report's fragment
(:func:`reports.element_timeline.fragment.timeline_html`) sends the same layouts and the
geometry once, and its script builds the boxes in the browser.
"""

from __future__ import annotations

import datetime as dt
import html
import math
from typing import Sequence

import numpy as np
import pandas as pd

from ..palette import BACKGROUND_COLOUR, HIGHLIGHT_COLOUR, STATE_COLOURS, discrete_colourscale
from .data import COMPLETE, IN_PROGRESS, LATE, NOT_STARTED, UNLINKED, VIEW_TITLES, VIEWS, ElementTimeline, split_ids

__all__ = [
    "figure_3d",
    "figure_2d",
    "hover_texts",
    "base_3d",
    "base_2d",
    "LEGEND",
    "BOX_CORNERS",
    "BOX_TRIANGLES",
    "BOX_EDGES",
    "PLAY_MILLISECONDS",
]

#: The legend in plain words: (state code or None for the outline, colour, label, meaning).
LEGEND: tuple[tuple[int | None, str, str, str], ...] = (
    (NOT_STARTED, STATE_COLOURS[0], "Not started", "its work has not begun by this date"),
    (IN_PROGRESS, STATE_COLOURS[1], "In progress",
     "between the first start and the last finish of the activities that build it"),
    (COMPLETE, STATE_COLOURS[2], "Complete", "all the activities that build it have finished"),
    (LATE, STATE_COLOURS[3], "Late against plan",
     "as built only: by this date the plan had it started (or finished) and it had not"),
    (UNLINKED, STATE_COLOURS[4], "No linked activity",
     "no activity shares its work breakdown code (greyed; listed below)"),
    (None, HIGHLIGHT_COLOUR, "Black outline",
     "built by an activity that a delay event affected"),
)

#: Corners of a box as fractions of its size, and its 12 triangles and 12 edges (corner
#: numbers). Vertex ``8 n + c`` of a 3D trace is corner ``c`` of the ``n``-th box drawn.
BOX_CORNERS = ((0, 0, 0), (1, 0, 0), (1, 1, 0), (0, 1, 0), (0, 0, 1), (1, 0, 1), (1, 1, 1), (0, 1, 1))
BOX_TRIANGLES = ((0, 1, 2), (0, 2, 3), (4, 6, 5), (4, 7, 6), (0, 5, 1), (0, 4, 5),
                 (3, 2, 6), (3, 6, 7), (0, 3, 7), (0, 7, 4), (1, 5, 6), (1, 6, 2))
BOX_EDGES = ((0, 1), (1, 2), (2, 3), (3, 0), (4, 5), (5, 6), (6, 7), (7, 4),
             (0, 4), (1, 5), (2, 6), (3, 7))

_MAX_HOVER_ACTIVITIES = 6
PLAY_MILLISECONDS = 350
_OUTLINE_2D = "#A8A290"  # a thin edge so pale "not started" squares show on white


def _iso(value) -> str:
    return "" if pd.isna(value) else pd.Timestamp(value).date().isoformat()


def hover_texts(timeline: ElementTimeline) -> list[str]:
    """One hover text per element (plotly's small HTML subset; input text escaped).

    Parameters
    ----------
    timeline: from :func:`~reports.element_timeline.data.element_states`.

    Returns
    -------
    list of str
        In element order: id and name, classification and wbs, the linked activities (at
        most six named), the planned and as-built dates, and the events that affected it.
    """
    e = timeline.elements
    texts = []
    columns = ["id", "name", "classification", "wbs", "activities", "events", "planned_start",
               "planned_finish", "actual_start", "actual_finish", "highlighted"]
    for row in e[columns].itertuples(index=False):
        (ident, name, classification, wbs, activities, events, ps, pf, as_, af, highlighted) = row
        lines = [f"<b>{html.escape(str(ident))}</b>" + (f" {html.escape(str(name))}" if name else "")]
        lines.append(f"classification: {html.escape(str(classification)) or '(none)'}"
                     f" | wbs: {html.escape(str(wbs))}")
        ids = split_ids(activities)
        if ids:
            shown = ", ".join(html.escape(a) for a in ids[:_MAX_HOVER_ACTIVITIES])
            more = len(ids) - _MAX_HOVER_ACTIVITIES
            lines.append(f"activities: {shown}" + (f" and {more} more" if more > 0 else ""))
        else:
            lines.append("activities: none share this wbs")
        lines.append("as planned: " + (f"{_iso(ps)} to {_iso(pf)}" if not pd.isna(ps) else "not linked"))
        lines.append("as built: " + (f"{_iso(as_)} to {_iso(af)}" if not pd.isna(as_) else "not linked"))
        if highlighted:
            lines.append("delayed by event: " + (html.escape(events.replace(";", ", ")) or "(named in the input)"))
        texts.append("<br>".join(lines))
    return texts


def _boxes(timeline: ElementTimeline) -> tuple[np.ndarray, np.ndarray]:
    """Row numbers of the elements drawn in 3D, and their boxes (n, 6) as x, y, z, dx, dy, dz."""
    e = timeline.elements
    drawn = np.flatnonzero(e["drawn_in_3d"].to_numpy(dtype=bool))
    boxes = e[["x", "y", "z", "dx", "dy", "dz"]].to_numpy(dtype=np.float64)[drawn]
    return drawn, boxes


def _box_mesh(boxes: np.ndarray):
    """Vertices (x, y, z: 8 per box) and triangles (i, j, k: 12 per box) of ``boxes``."""
    corners = np.asarray(BOX_CORNERS, dtype=np.float64)
    points = boxes[:, None, :3] + corners[None, :, :] * boxes[:, None, 3:]
    triangles = np.asarray(BOX_TRIANGLES, dtype=np.int32)[None, :, :] \
        + (8 * np.arange(boxes.shape[0], dtype=np.int32))[:, None, None]
    points = points.reshape(-1, 3).astype(np.float32)
    triangles = triangles.reshape(-1, 3)
    return points[:, 0], points[:, 1], points[:, 2], triangles[:, 0], triangles[:, 1], triangles[:, 2]


def _box_edges(boxes: np.ndarray) -> tuple[list, list, list]:
    """Line coordinates of the 12 edges of each box, each edge followed by a gap (None)."""
    corners = np.asarray(BOX_CORNERS, dtype=np.float64)
    edges = np.asarray(BOX_EDGES)
    xs: list = []
    ys: list = []
    zs: list = []
    for box in boxes:
        points = box[:3] + corners * box[3:]
        for a, b in edges:
            for out, axis in ((xs, 0), (ys, 1), (zs, 2)):
                out.extend((round(float(points[a, axis]), 3), round(float(points[b, axis]), 3), None))
    return xs, ys, zs


def _scene_ranges(boxes: np.ndarray) -> list[list[float]]:
    if boxes.size == 0:
        return [[0.0, 1.0]] * 3
    low = boxes[:, :3].min(axis=0)
    high = (boxes[:, :3] + boxes[:, 3:]).max(axis=0)
    pad = np.maximum((high - low) * 0.02, 0.5)
    return [[float(low[a] - pad[a]), float(high[a] + pad[a])] for a in range(3)]


def _legend_annotations(y: float) -> list[dict]:
    parts = [f'<span style="color:{colour}">&#9632;</span> {label}' for _, colour, label, _ in LEGEND]
    return [dict(text="   ".join(parts), x=0.5, y=y, xref="paper", yref="paper", showarrow=False,
                 xanchor="center", yanchor="top", font=dict(size=12))]


def base_3d(timeline: ElementTimeline, *, legend: bool) -> dict:
    """Layout and trace styles of the 3D figure, without the per-box arrays.

    Parameters
    ----------
    timeline: from :func:`~reports.element_timeline.data.element_states`.
    legend: add the legend as an annotation under the scenes (a figure of its own); the
        report's fragment has its own legend in HTML.

    Returns
    -------
    dict
        ``layout`` (two scenes side by side), ``traces`` (styles without coordinates),
        ``drawn`` (row numbers of the elements with a complete box) and ``boxes`` (their
        ``x, y, z, dx, dy, dz``, shape (n, 6)).
    """
    drawn, boxes = _boxes(timeline)
    ranges = _scene_ranges(boxes)
    axes = [dict(title=dict(text=f"{name} (m)"), range=r, backgroundcolor=BACKGROUND_COLOUR,
                 gridcolor="#DDDDDD", zerolinecolor="#BBBBBB", showspikes=False)
            for name, r in zip("xyz", ranges)]
    camera = dict(eye=dict(x=1.45, y=-1.55, z=1.05), up=dict(x=0, y=0, z=1))
    scene = dict(xaxis=axes[0], yaxis=axes[1], zaxis=axes[2], aspectmode="data", camera=camera,
                 bgcolor=BACKGROUND_COLOUR)
    annotations = [
        dict(text=f"<b>{VIEW_TITLES['as_planned']}</b> ({html.escape(timeline.planned_source)})",
             x=0.24, y=1.0, xref="paper", yref="paper", showarrow=False, xanchor="center"),
        dict(text=f"<b>{VIEW_TITLES['as_built']}</b> ({html.escape(_short(timeline.actual_source))})",
             x=0.76, y=1.0, xref="paper", yref="paper", showarrow=False, xanchor="center"),
    ]
    if legend:
        annotations += _legend_annotations(-0.02)
    layout = dict(
        template="none", paper_bgcolor=BACKGROUND_COLOUR, height=560,
        margin=dict(l=0, r=0, t=40, b=60 if legend else 10), showlegend=False,
        scene=dict(scene, domain=dict(x=[0.0, 0.49], y=[0.0, 0.95])),
        scene2=dict(scene, domain=dict(x=[0.51, 1.0], y=[0.0, 0.95])),
        annotations=annotations, hoverlabel=dict(align="left"),
    )
    mesh = dict(type="mesh3d", flatshading=True, colorscale=discrete_colourscale(),
                cmin=-0.5, cmax=len(STATE_COLOURS) - 0.5, showscale=False,
                hovertemplate="%{text}<extra></extra>",
                lighting=dict(ambient=0.72, diffuse=0.38, specular=0.04, roughness=0.9, fresnel=0.05),
                lightposition=dict(x=1000, y=-2000, z=4000))
    traces = [dict(mesh, scene="scene", name=VIEW_TITLES["as_planned"]),
              dict(mesh, scene="scene2", name=VIEW_TITLES["as_built"])]
    edges = dict(type="scatter3d", mode="lines", hoverinfo="skip",
                 line=dict(color=HIGHLIGHT_COLOUR, width=4))
    traces += [dict(edges, scene="scene", name="delayed by an event"),
               dict(edges, scene="scene2", name="delayed by an event")]
    return {"layout": layout, "traces": traces, "drawn": drawn, "boxes": boxes}


def _short(source: str) -> str:
    return source.split(":")[0]


def _slider_and_buttons(dates: Sequence[str], *, frames: bool) -> dict:
    steps = [dict(label=d, method="animate",
                  args=[[d], dict(mode="immediate", frame=dict(duration=0, redraw=True),
                                  transition=dict(duration=0))]) for d in dates]
    slider = dict(active=0, steps=steps, x=0.08, len=0.9, y=0.0, yanchor="top", pad=dict(t=30),
                  font=dict(color="rgba(0,0,0,0)"), ticklen=0, minorticklen=0,
                  currentvalue=dict(prefix="Week of Monday ", font=dict(size=13, color="#222222")))
    buttons = dict(type="buttons", direction="left", x=0.0, y=0.0, xanchor="left", yanchor="top",
                   pad=dict(t=38), showactive=False,
                   buttons=[dict(label="Play", method="animate",
                                 args=[None, dict(frame=dict(duration=PLAY_MILLISECONDS, redraw=True),
                                                  fromcurrent=True, transition=dict(duration=0))]),
                            dict(label="Pause", method="animate",
                                 args=[[None], dict(mode="immediate", frame=dict(duration=0, redraw=False),
                                                    transition=dict(duration=0))])])
    return {"sliders": [slider], "updatemenus": [buttons]} if frames else {}


def figure_3d(timeline: ElementTimeline, *, frames: bool = True):
    """The two 3D views (as planned, as built) as a plotly figure with a weekly slider.

    Parameters
    ----------
    timeline: from :func:`element_states`.
    frames: add one animation frame per week (colour values only) with a slider and
        play/pause buttons; ``False`` gives the first week alone.

    Returns
    -------
    plotly.graph_objects.Figure
        Traces: 0 and 1 the boxes of the planned and as-built views (one Mesh3d each), 2 and
        3 the outlines of the elements delayed by an event. In a notebook the two scenes
        turn separately; :func:`timeline_html` links their cameras.
    """
    import plotly.graph_objects as go

    base = base_3d(timeline, legend=True)
    drawn, boxes = base["drawn"], base["boxes"]
    x, y, z, i, j, k = _box_mesh(boxes)
    hover = np.asarray(hover_texts(timeline), dtype=object)[drawn]
    text = np.repeat(hover, 8).tolist()
    highlighted = timeline.elements["highlighted"].to_numpy(dtype=bool)[drawn]
    ex, ey, ez = _box_edges(boxes[highlighted])
    first = [np.repeat(timeline.states(view)[drawn, 0], 8).astype(np.uint8) for view in VIEWS]
    traces = base["traces"]
    data = []
    for number, trace in enumerate(traces[:2]):
        data.append(dict(trace, x=x, y=y, z=z, i=i, j=j, k=k, intensity=first[number], text=text))
    for trace in traces[2:]:
        data.append(dict(trace, x=ex, y=ey, z=ez))
    dates = [d.isoformat() for d in timeline.frame_dates.astype(dt.date)]
    layout = dict(base["layout"], title=dict(text=html.escape(timeline.title), font=dict(size=14), x=0.01),
                  **_slider_and_buttons(dates, frames=frames))
    layout["margin"] = dict(l=0, r=0, t=70, b=130)
    layout["height"] = 680
    for annotation in layout["annotations"]:
        if annotation.get("yanchor") == "top":
            annotation["y"] = -0.12
    figure = go.Figure(data=data, layout=layout)
    if frames:
        states = [timeline.states(view)[drawn] for view in VIEWS]
        figure.frames = [go.Frame(name=date, traces=[0, 1],
                                  data=[dict(type="mesh3d", intensity=np.repeat(s[:, f], 8).astype(np.uint8))
                                        for s in states])
                         for f, date in enumerate(dates)]
    return figure


def _plan_positions(timeline: ElementTimeline) -> dict:
    """Where each element sits in the 2D view: zones across, levels up, a small grid per cell."""
    e = timeline.elements
    level = e["level"].fillna("").replace("", "(no level)")
    zone = e["zone"].fillna("").replace("", "(no zone)")
    level_order = (pd.DataFrame({"name": level, "z": e["z"]}).groupby("name", sort=False)["z"].min()
                   .reset_index().assign(_n=lambda t: t["z"].isna())
                   .sort_values(["_n", "z", "name"], kind="stable")["name"].tolist())
    zone_order = (pd.DataFrame({"name": zone, "x": e["x"]}).groupby("name", sort=False)["x"].min()
                  .reset_index().assign(_n=lambda t: t["x"].isna())
                  .sort_values(["_n", "x", "name"], kind="stable")["name"].tolist())
    level_number = level.map({n: k for k, n in enumerate(level_order)}).to_numpy(dtype=np.int64)
    zone_number = zone.map({n: k for k, n in enumerate(zone_order)}).to_numpy(dtype=np.int64)
    order = pd.DataFrame({"level": level_number, "zone": zone_number, "z": e["z"], "y": e["y"],
                          "x": e["x"], "row": np.arange(len(e))})
    order = order.sort_values(["level", "zone", "z", "y", "x", "row"], kind="stable", na_position="last")
    place = order.groupby(["level", "zone"], sort=False).cumcount().to_numpy()
    per_cell = int(order.groupby(["level", "zone"]).size().max())
    side = max(1, math.ceil(math.sqrt(per_cell)))
    px = np.empty(len(e))
    py = np.empty(len(e))
    rows = order["row"].to_numpy()
    px[rows] = order["zone"].to_numpy() + (place % side + 0.5) / side
    py[rows] = order["level"].to_numpy() + 1 - (place // side + 0.5) / side
    return {"x": np.round(px, 4), "y": np.round(py, 4), "levels": level_order, "zones": zone_order,
            "side": side}


def base_2d(timeline: ElementTimeline, *, legend: bool) -> dict:
    """Layout, trace styles and positions of the flat view by level and zone.

    Parameters
    ----------
    timeline: from :func:`~reports.element_timeline.data.element_states`.
    legend: add the legend as an annotation under the panels.

    Returns
    -------
    dict
        ``layout`` (two panels, as planned and as built, sharing the level axis),
        ``traces`` (styles without colours) and ``x``, ``y`` (each element's place).
    """
    places = _plan_positions(timeline)
    levels, zones, side = places["levels"], places["zones"], places["side"]
    slot = max(3.0, min(18.0, 440.0 / (len(zones) * side)))
    height = int(min(900, max(300, len(levels) * side * slot + 140)))
    marker_size = round(max(2.0, 0.8 * min(slot, (height - 140) / (len(levels) * side))), 1)
    axis_x = dict(tickvals=[k + 0.5 for k in range(len(zones))], ticktext=zones, range=[0, len(zones)],
                  showgrid=False, zeroline=False, title=dict(text="zone"),
                  minor=dict(tickvals=list(range(len(zones) + 1)), showgrid=True, gridcolor="#CCCCCC"))
    axis_y = dict(tickvals=[k + 0.5 for k in range(len(levels))], ticktext=levels, range=[0, len(levels)],
                  showgrid=False, zeroline=False, title=dict(text="level"),
                  minor=dict(tickvals=list(range(len(levels) + 1)), showgrid=True, gridcolor="#CCCCCC"))
    annotations = [
        dict(text=f"<b>{VIEW_TITLES['as_planned']}</b>", x=0.24, y=1.0, xref="paper", yref="paper",
             showarrow=False, xanchor="center", yanchor="bottom"),
        dict(text=f"<b>{VIEW_TITLES['as_built']}</b>", x=0.76, y=1.0, xref="paper", yref="paper",
             showarrow=False, xanchor="center", yanchor="bottom"),
    ]
    if legend:
        annotations += _legend_annotations(-0.16)
    layout = dict(template="none", paper_bgcolor=BACKGROUND_COLOUR, plot_bgcolor=BACKGROUND_COLOUR,
                  height=height, margin=dict(l=90, r=10, t=30, b=70 if legend else 50), showlegend=False,
                  xaxis=dict(axis_x, domain=[0.0, 0.48]), xaxis2=dict(axis_x, domain=[0.52, 1.0]),
                  yaxis=axis_y, yaxis2=dict(axis_y, matches="y", showticklabels=False, title=None),
                  annotations=annotations, hoverlabel=dict(align="left"))
    highlighted = timeline.elements["highlighted"].to_numpy(dtype=bool)
    marker = dict(symbol="square", size=marker_size, colorscale=discrete_colourscale(),
                  cmin=-0.5, cmax=len(STATE_COLOURS) - 0.5,
                  line=dict(color=np.where(highlighted, HIGHLIGHT_COLOUR, _OUTLINE_2D).tolist(),
                            width=np.where(highlighted, 2.0, 0.6).tolist()))
    point = dict(type="scattergl", mode="markers", hovertemplate="%{text}<extra></extra>", marker=marker)
    traces = [dict(point, xaxis="x", yaxis="y", name=VIEW_TITLES["as_planned"]),
              dict(point, xaxis="x2", yaxis="y2", name=VIEW_TITLES["as_built"])]
    return {"layout": layout, "traces": traces, "x": places["x"], "y": places["y"]}


def figure_2d(timeline: ElementTimeline, *, frames: bool = True):
    """The same timeline drawn flat, by level (up) and zone (across), for large models.

    Each element is a small square in the cell of its level and zone; the two panels are
    as planned and as built. With ``frames`` the figure has one frame per week (colour
    values only), a slider and play/pause buttons.

    Returns
    -------
    plotly.graph_objects.Figure
        Traces 0 and 1: the elements of the planned and as-built views (marker colour =
        state code).
    """
    import plotly.graph_objects as go

    base = base_2d(timeline, legend=True)
    hover = hover_texts(timeline)
    states = [timeline.states(view) for view in VIEWS]
    data = [dict(trace, x=base["x"], y=base["y"], text=hover,
                 marker=dict(trace["marker"], color=states[n][:, 0].astype(np.uint8)))
            for n, trace in enumerate(base["traces"])]
    dates = [d.isoformat() for d in timeline.frame_dates.astype(dt.date)]
    layout = dict(base["layout"], title=dict(text=html.escape(timeline.title), font=dict(size=14), x=0.01),
                  **_slider_and_buttons(dates, frames=frames))
    layout["height"] = layout["height"] + 120
    layout["margin"] = dict(layout["margin"], t=70, b=170)
    for annotation in layout["annotations"]:
        if annotation.get("yanchor") == "top":
            annotation["y"] = -0.3
    figure = go.Figure(data=data, layout=layout)
    if frames:
        figure.frames = [go.Frame(name=date, traces=[0, 1],
                                  data=[dict(type="scattergl", marker=dict(color=s[:, f].astype(np.uint8)))
                                        for s in states])
                         for f, date in enumerate(dates)]
    return figure
