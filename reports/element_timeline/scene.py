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
from collections.abc import Sequence

import numpy as np
import pandas as pd

from delay.convert import split_ids, text_cell

from ..palette import BACKGROUND_COLOUR, GHOST_COLOURS, HIGHLIGHT_COLOUR, STATE_COLOURS, discrete_colourscale
from .data import COMPLETE, IN_PROGRESS, LATE, NOT_STARTED, UNLINKED, VIEW_TITLES, VIEWS, ElementTimeline

__all__ = [
    "figure_3d",
    "figure_2d",
    "hover_texts",
    "base_3d",
    "base_2d",
    "box_levels",
    "level_order",
    "drawn_parts",
    "edge_margin",
    "LEGEND",
    "SOLID_STATES",
    "ROLES_3D",
    "ROLE_NAMES",
    "BOX_CORNERS",
    "BOX_TRIANGLES",
    "BOX_EDGES",
    "PLAY_MILLISECONDS",
]

#: The legend in plain words: (state code or None for the outline, colour, label, meaning).
LEGEND: tuple[tuple[int | None, str, str, str], ...] = (
    (
        NOT_STARTED,
        STATE_COLOURS[0],
        "Not started",
        "its work has not begun by this date: a faint wire frame in 3D (a ghost of the works to come), "
        "pale in the flat view",
    ),
    (
        IN_PROGRESS,
        STATE_COLOURS[1],
        "In progress",
        "between the first start and the last finish of the activities that build it",
    ),
    (COMPLETE, STATE_COLOURS[2], "Complete", "all the activities that build it have finished"),
    (
        LATE,
        STATE_COLOURS[3],
        "Late against plan",
        "as built only: by this date the plan had it started (or finished) and it had not; "
        "in 3D a pale vermillion wire frame until its work begins, solid after",
    ),
    (
        UNLINKED,
        STATE_COLOURS[4],
        "No linked activity",
        "no activity shares its work breakdown code: a dotted grey wire frame in 3D, grey in the flat view "
        "(listed below)",
    ),
    (
        None,
        HIGHLIGHT_COLOUR,
        "Black outline",
        "built by an activity that a delay event affected (in 3D once its work has begun)",
    ),
)

#: The states drawn solid in 3D once an element's work has begun.
SOLID_STATES = (IN_PROGRESS, COMPLETE, LATE)

#: What each pair of 3D traces draws (see :func:`drawn_parts`); trace ``2 r + v`` is role
#: ``r`` in view ``v`` (0 as planned, 1 as built).
ROLES_3D = ("solid", "ghost", "unlinked", "outline")
ROLE_NAMES = {
    "solid": "work begun",
    "ghost": "work not begun",
    "unlinked": "no linked activity",
    "outline": "affected by a delay event",
}

#: Corners of a box as fractions of its size, and its 12 triangles and 12 edges (corner
#: numbers). Vertex ``8 n + c`` of a 3D trace is corner ``c`` of the ``n``-th box drawn.
BOX_CORNERS = ((0, 0, 0), (1, 0, 0), (1, 1, 0), (0, 1, 0), (0, 0, 1), (1, 0, 1), (1, 1, 1), (0, 1, 1))
BOX_TRIANGLES = (
    (0, 1, 2),
    (0, 2, 3),
    (4, 6, 5),
    (4, 7, 6),
    (0, 5, 1),
    (0, 4, 5),
    (3, 2, 6),
    (3, 6, 7),
    (0, 3, 7),
    (0, 7, 4),
    (1, 5, 6),
    (1, 6, 2),
)
BOX_EDGES = ((0, 1), (1, 2), (2, 3), (3, 0), (4, 5), (5, 6), (6, 7), (7, 4), (0, 4), (1, 5), (2, 6), (3, 7))

_MAX_HOVER_ACTIVITIES = 6
PLAY_MILLISECONDS = 350
_OUTLINE_2D = "#A8A290"  # a thin edge so pale "not started" squares show on white


def hover_texts(timeline: ElementTimeline) -> list[str]:
    """One hover text per element (plotly's small HTML subset; input text escaped).

    Parameters
    ----------
    timeline : ElementTimeline
        From :func:`~reports.element_timeline.data.element_states`.

    Returns
    -------
    list of str
        In element order: id and name, classification and wbs, the linked activities (at
        most six named), the planned and as-built dates, and the events that affected it.
    """
    e = timeline.elements
    texts = []
    columns = [
        "id",
        "name",
        "classification",
        "wbs",
        "activities",
        "events",
        "planned_start",
        "planned_finish",
        "actual_start",
        "actual_finish",
        "highlighted",
    ]
    for row in e[columns].itertuples(index=False):
        (ident, name, classification, wbs, activities, events, ps, pf, as_, af, highlighted) = row
        lines = [f"<b>{html.escape(str(ident))}</b>" + (f" {html.escape(str(name))}" if name else "")]
        lines.append(f"classification: {html.escape(str(classification)) or '(none)'} | wbs: {html.escape(str(wbs))}")
        ids = split_ids(activities)
        if ids:
            shown = ", ".join(html.escape(a) for a in ids[:_MAX_HOVER_ACTIVITIES])
            more = len(ids) - _MAX_HOVER_ACTIVITIES
            lines.append(f"activities: {shown}" + (f" and {more} more" if more > 0 else ""))
        else:
            lines.append("activities: none share this wbs")
        lines.append("as planned: " + (f"{text_cell(ps)} to {text_cell(pf)}" if not pd.isna(ps) else "not linked"))
        lines.append("as built: " + (f"{text_cell(as_)} to {text_cell(af)}" if not pd.isna(as_) else "not linked"))
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
    points = points.reshape(-1, 3).astype(np.float32)
    i, j, k = _triangles(np.arange(boxes.shape[0]))
    return points[:, 0], points[:, 1], points[:, 2], i, j, k


def _triangles(numbers: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The 12 triangles (i, j, k vertex numbers) of each box ``numbers`` of the mesh."""
    triangles = (
        np.asarray(BOX_TRIANGLES, dtype=np.int32)[None, :, :] + (8 * np.asarray(numbers, dtype=np.int32))[:, None, None]
    )
    triangles = triangles.reshape(-1, 3)
    return triangles[:, 0], triangles[:, 1], triangles[:, 2]


def _box_edges(boxes: np.ndarray, margin: float = 0.0) -> tuple[list, list, list]:
    """Line coordinates of the 12 edges of each box grown by ``margin`` on every side, each
    edge followed by a gap (None). The margin keeps an outline off its own box's faces,
    where the faces would hide half of each line."""
    corners = np.asarray(BOX_CORNERS, dtype=np.float64)
    edges = np.asarray(BOX_EDGES)
    xs: list = []
    ys: list = []
    zs: list = []
    for box in boxes:
        points = box[:3] - margin + corners * (box[3:] + 2 * margin)
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


def edge_margin(boxes: np.ndarray) -> float:
    """How far outlines stand off their boxes: 0.15 % of the model's largest extent.

    Parameters
    ----------
    boxes : numpy.ndarray
        ``x, y, z, dx, dy, dz`` of the boxes drawn, shape (n, 6).

    Returns
    -------
    float
        Metres (0.1 m on a model 70 m across; 0 with no boxes), rounded to the millimetre.

    Examples
    --------
    >>> edge_margin(np.array([[0.0, 0.0, 0.0, 70.0, 20.0, 12.0]])), edge_margin(np.empty((0, 6)))
    (0.105, 0.0)
    """
    if boxes.size == 0:
        return 0.0
    extent = (boxes[:, :3] + boxes[:, 3:]).max(axis=0) - boxes[:, :3].min(axis=0)
    return round(float(extent.max()) * 0.0015, 3)


def level_order(elements: pd.DataFrame) -> tuple[pd.Series, list[str]]:
    """Each element's level and the levels from the lowest up.

    Parameters
    ----------
    elements : pandas.DataFrame
        The timeline's elements (``level`` and ``z`` columns).

    Returns
    -------
    (pandas.Series, list of str)
        The level of each element (``"(no level)"`` where blank), and the level names in
        the order of their lowest ``z`` (levels with no ``z`` last, then by name).
    """
    level = elements["level"].fillna("").replace("", "(no level)")
    return level, _names_in_order(level, elements["z"])


def _names_in_order(names: pd.Series, position: pd.Series) -> list[str]:
    """The distinct ``names`` by their lowest ``position`` (those with none last, then by name)."""
    lowest = pd.DataFrame({"name": names, "at": position}).groupby("name", sort=False)["at"].min()
    return (
        lowest.reset_index()
        .assign(_n=lambda t: t["at"].isna())
        .sort_values(["_n", "at", "name"], kind="stable")["name"]
        .tolist()
    )


def box_levels(timeline: ElementTimeline, drawn: np.ndarray) -> tuple[list[str], np.ndarray]:
    """The levels of the boxes drawn, from the lowest up, and each box's level number.

    Parameters
    ----------
    timeline : ElementTimeline
        From :func:`~reports.element_timeline.data.element_states`.
    drawn : numpy.ndarray
        Row numbers of the elements drawn in 3D.

    Returns
    -------
    (list of str, numpy.ndarray of int64)
        What the "show levels up to" control offers, and which boxes each choice keeps
        (a box shows when its level number is at most the one chosen).
    """
    level, order = level_order(timeline.elements)
    present = set(level.iloc[drawn])
    order = [name for name in order if name in present]
    number = level.iloc[drawn].map({name: k for k, name in enumerate(order)}).to_numpy(dtype=np.int64)
    return order, number


def drawn_parts(
    box_states: np.ndarray, started: np.ndarray, outlined: np.ndarray, shown: np.ndarray | None = None
) -> dict[str, np.ndarray]:
    """Which boxes one 3D view draws in one week, and how.

    Parameters
    ----------
    box_states : numpy.ndarray
        State code of each box drawn (module :mod:`~reports.element_timeline.data`).
    started : numpy.ndarray
        Whether each box's work has begun in the view's own dates.
    outlined : numpy.ndarray
        Whether each box is built by an activity that a delay event affected.
    shown : numpy.ndarray, optional
        Whether each box's level is shown (default every box).

    Returns
    -------
    dict of numpy.ndarray (box numbers)
        ``solid``: work begun, drawn opaque in its state's colour (in progress, complete,
        or late against plan); ``ghost``: work not begun, a faint wire frame (not started,
        or late against plan and not begun); ``unlinked``: no linked activity, a dotted grey
        wire frame;
        ``outline``: solid boxes built by an affected activity.

    Examples
    --------
    Four boxes: in progress and begun, late and not begun, complete and begun (built by
    an affected activity), and one with no linked activity:

    >>> parts = drawn_parts(
    ...     np.array([1, 3, 2, 4]), np.array([True, False, True, False]), np.array([False, False, True, False])
    ... )
    >>> {name: numbers.tolist() for name, numbers in parts.items()}
    {'solid': [0, 2], 'ghost': [1], 'unlinked': [3], 'outline': [2]}
    """
    shown = np.ones(box_states.shape, dtype=bool) if shown is None else shown
    linked = box_states != UNLINKED
    solid = shown & linked & started & np.isin(box_states, SOLID_STATES)
    ghost = shown & linked & ~solid
    return {
        "solid": np.flatnonzero(solid),
        "ghost": np.flatnonzero(ghost),
        "unlinked": np.flatnonzero(shown & ~linked),
        "outline": np.flatnonzero(solid & outlined),
    }


def _legend_annotations(y: float) -> list[dict]:
    parts = [f'<span style="color:{colour}">&#9632;</span> {label}' for _, colour, label, _ in LEGEND]
    return [
        dict(
            text="   ".join(parts),
            x=0.5,
            y=y,
            xref="paper",
            yref="paper",
            showarrow=False,
            xanchor="center",
            yanchor="top",
            font=dict(size=12),
        )
    ]


def base_3d(timeline: ElementTimeline, *, legend: bool) -> dict:
    """Layout and trace styles of the 3D figure, without the per-box arrays.

    Parameters
    ----------
    timeline : ElementTimeline
        From :func:`~reports.element_timeline.data.element_states`.
    legend : bool
        Add the legend as an annotation under the scenes (a figure of its own); the
        report's fragment has its own legend in HTML.

    Returns
    -------
    dict
        ``layout`` (two scenes side by side, one camera to start with), ``traces`` (styles
        without coordinates, two per role of :data:`ROLES_3D`: trace ``2 r + v`` is role
        ``r`` in view ``v``), ``drawn`` (row numbers of the elements with a complete box),
        ``boxes`` (their ``x, y, z, dx, dy, dz``, shape (n, 6)) and ``margin`` (how far
        outlines stand off their boxes).
    """
    drawn, boxes = _boxes(timeline)
    ranges = _scene_ranges(boxes)
    axes = [
        dict(
            title=dict(text=f"{name} (m)"),
            range=r,
            backgroundcolor=BACKGROUND_COLOUR,
            gridcolor="#E4E4E4",
            zerolinecolor="#CCCCCC",
            showspikes=False,
        )
        for name, r in zip("xyz", ranges)
    ]
    camera = dict(eye=dict(x=1.2, y=-1.3, z=0.85), up=dict(x=0, y=0, z=1))
    scene = dict(
        xaxis=axes[0], yaxis=axes[1], zaxis=axes[2], aspectmode="data", camera=camera, bgcolor=BACKGROUND_COLOUR
    )
    annotations = [
        dict(
            text=f"<b>{VIEW_TITLES['as_planned']}</b> ({html.escape(timeline.planned_source)})",
            x=0.24,
            y=1.0,
            xref="paper",
            yref="paper",
            showarrow=False,
            xanchor="center",
        ),
        dict(
            text=f"<b>{VIEW_TITLES['as_built']}</b> ({html.escape(_short(timeline.actual_source))})",
            x=0.76,
            y=1.0,
            xref="paper",
            yref="paper",
            showarrow=False,
            xanchor="center",
        ),
    ]
    if legend:
        annotations += _legend_annotations(-0.02)
    layout = dict(
        template="none",
        paper_bgcolor=BACKGROUND_COLOUR,
        height=560,
        uirevision="timeline",
        margin=dict(l=0, r=0, t=40, b=60 if legend else 10),
        showlegend=False,
        scene=dict(scene, domain=dict(x=[0.0, 0.49], y=[0.0, 0.95])),
        scene2=dict(scene, domain=dict(x=[0.51, 1.0], y=[0.0, 0.95])),
        annotations=annotations,
        hoverlabel=dict(align="left"),
    )
    lighting = dict(ambient=0.72, diffuse=0.38, specular=0.04, roughness=0.9, fresnel=0.05)
    mesh = dict(
        type="mesh3d",
        flatshading=True,
        cmin=-0.5,
        cmax=len(STATE_COLOURS) - 0.5,
        showscale=False,
        hovertemplate="%{text}<extra></extra>",
        lighting=lighting,
        lightposition=dict(x=1000, y=-2000, z=4000),
    )
    lines = dict(type="scatter3d", mode="lines", hoverinfo="skip")
    styles = {
        "solid": dict(mesh, colorscale=discrete_colourscale()),
        "ghost": dict(
            lines,
            line=dict(
                colorscale=discrete_colourscale(GHOST_COLOURS), cmin=-0.5, cmax=len(GHOST_COLOURS) - 0.5, width=1
            ),
        ),
        "unlinked": dict(lines, line=dict(color=STATE_COLOURS[UNLINKED], width=2, dash="dot")),
        "outline": dict(lines, line=dict(color=HIGHLIGHT_COLOUR, width=6)),
    }
    traces = [
        dict(styles[role], scene=scene_name, name=f"{VIEW_TITLES[view]}: {ROLE_NAMES[role]}")
        for role in ROLES_3D
        for view, scene_name in zip(VIEWS, ("scene", "scene2"))
    ]
    return {"layout": layout, "traces": traces, "drawn": drawn, "boxes": boxes, "margin": edge_margin(boxes)}


def _short(source: str) -> str:
    return source.split(":")[0]


def _slider_and_buttons(dates: Sequence[str], *, frames: bool) -> dict:
    steps = [
        dict(
            label=d,
            method="animate",
            args=[[d], dict(mode="immediate", frame=dict(duration=0, redraw=True), transition=dict(duration=0))],
        )
        for d in dates
    ]
    slider = dict(
        active=0,
        steps=steps,
        x=0.08,
        len=0.9,
        y=0.0,
        yanchor="top",
        pad=dict(t=30),
        font=dict(color="rgba(0,0,0,0)"),
        ticklen=0,
        minorticklen=0,
        currentvalue=dict(prefix="Week of Monday ", font=dict(size=13, color="#222222")),
    )
    buttons = dict(
        type="buttons",
        direction="left",
        x=0.0,
        y=0.0,
        xanchor="left",
        yanchor="top",
        pad=dict(t=38),
        showactive=False,
        buttons=[
            dict(
                label="Play",
                method="animate",
                args=[
                    None,
                    dict(
                        frame=dict(duration=PLAY_MILLISECONDS, redraw=True),
                        fromcurrent=True,
                        transition=dict(duration=0),
                    ),
                ],
            ),
            dict(
                label="Pause",
                method="animate",
                args=[
                    [None],
                    dict(mode="immediate", frame=dict(duration=0, redraw=False), transition=dict(duration=0)),
                ],
            ),
        ],
    )
    return {"sliders": [slider], "updatemenus": [buttons]} if frames else {}


def _week_parts(
    boxes: np.ndarray,
    states: list[np.ndarray],
    starts: list[np.ndarray],
    outlined: np.ndarray,
    margin: float,
    frame: int,
    roles: Sequence[str] = ROLES_3D,
) -> list[dict]:
    """What changes in the 3D traces of ``roles`` in week ``frame``, in trace order."""
    parts = [drawn_parts(states[v][:, frame], starts[v] <= frame, outlined) for v in range(len(VIEWS))]
    out = []
    for role in roles:
        for v in range(len(VIEWS)):
            numbers = parts[v][role]
            if role == "solid":
                i, j, k = _triangles(numbers)
                out.append(
                    dict(type="mesh3d", i=i, j=j, k=k, intensity=np.repeat(states[v][:, frame], 8).astype(np.uint8))
                )
                continue
            ex, ey, ez = _box_edges(boxes[numbers], margin if role == "outline" else 0.0)
            trace = dict(type="scatter3d", x=ex, y=ey, z=ez)
            if role == "ghost":  # each edge is two ends and a gap: three colour values
                trace["line"] = dict(color=np.repeat(states[v][numbers, frame], 3 * len(BOX_EDGES)).astype(np.uint8))
            out.append(trace)
    return out


def figure_3d(timeline: ElementTimeline, *, frames: bool = True):
    """The two 3D views (as planned, as built) as a plotly figure with a weekly slider.

    Work begun is solid in its state's colour, work not begun a faint wire frame, elements
    with no linked activity a dotted grey wire frame, and begun work of an activity that a
    delay event affected outlined (:func:`drawn_parts`).

    Parameters
    ----------
    timeline : ElementTimeline
        From :func:`~reports.element_timeline.data.element_states`.
    frames : bool, default True
        Add one animation frame per week (the triangles drawn solid and their colour
        values, the faint wire frames and the outlines) with a slider and play/pause buttons; ``False``
        gives the first week alone.

    Returns
    -------
    plotly.graph_objects.Figure
        Traces in pairs (as planned, as built) by role of :data:`ROLES_3D`: 0 and 1 the
        solid boxes (Mesh3d over every box's 8 corners, drawing the 12 triangles of each
        box begun), 2 and 3 the faint wire frames of work not begun, 4 and 5 the dotted
        wire frames of elements with no linked activity, 6 and 7 the outlines. In a notebook the two scenes turn
        separately; the report's fragment
        links their cameras.
    """
    import plotly.graph_objects as go

    base = base_3d(timeline, legend=True)
    drawn, boxes = base["drawn"], base["boxes"]
    x, y, z, _, _, _ = _box_mesh(boxes)
    text = np.repeat(np.asarray(hover_texts(timeline), dtype=object)[drawn], 8).tolist()
    outlined = timeline.elements["highlighted"].to_numpy(dtype=bool)[drawn]
    states = [timeline.states(view)[drawn] for view in VIEWS]
    starts = [timeline.start_frames(view)[drawn] for view in VIEWS]
    data = [
        dict(trace, **part)
        for trace, part in zip(base["traces"], _week_parts(boxes, states, starts, outlined, base["margin"], 0))
    ]
    for trace in data:
        if trace["type"] == "mesh3d":
            trace.update(x=x, y=y, z=z, text=text)
    dates = [d.isoformat() for d in timeline.frame_dates.astype(dt.date)]
    layout = dict(
        base["layout"],
        title=dict(text=html.escape(timeline.title), font=dict(size=14), x=0.01),
        **_slider_and_buttons(dates, frames=frames),
    )
    layout["margin"] = dict(l=0, r=0, t=70, b=130)
    layout["height"] = 680
    for annotation in layout["annotations"]:
        if annotation.get("yanchor") == "top":
            annotation["y"] = -0.12
    figure = go.Figure(data=data, layout=layout)
    if frames:
        changing = ("solid", "ghost", "outline")
        numbers = [2 * ROLES_3D.index(role) + v for role in changing for v in range(len(VIEWS))]
        figure.frames = [
            go.Frame(
                name=date,
                traces=numbers,
                data=_week_parts(boxes, states, starts, outlined, base["margin"], f, changing),
            )
            for f, date in enumerate(dates)
        ]
    return figure


def _plan_positions(timeline: ElementTimeline) -> dict:
    """Where each element sits in the 2D view: zones across, levels up, a small grid per cell."""
    e = timeline.elements
    level, levels = level_order(e)
    zone = e["zone"].fillna("").replace("", "(no zone)")
    zone_order = _names_in_order(zone, e["x"])
    level_number = level.map({n: k for k, n in enumerate(levels)}).to_numpy(dtype=np.int64)
    zone_number = zone.map({n: k for k, n in enumerate(zone_order)}).to_numpy(dtype=np.int64)
    order = pd.DataFrame(
        {"level": level_number, "zone": zone_number, "z": e["z"], "y": e["y"], "x": e["x"], "row": np.arange(len(e))}
    )
    order = order.sort_values(["level", "zone", "z", "y", "x", "row"], kind="stable", na_position="last")
    place = order.groupby(["level", "zone"], sort=False).cumcount().to_numpy()
    per_cell = int(order.groupby(["level", "zone"]).size().max())
    side = max(1, math.ceil(math.sqrt(per_cell)))
    px = np.empty(len(e))
    py = np.empty(len(e))
    rows = order["row"].to_numpy()
    px[rows] = order["zone"].to_numpy() + (place % side + 0.5) / side
    py[rows] = order["level"].to_numpy() + 1 - (place // side + 0.5) / side
    return {"x": np.round(px, 4), "y": np.round(py, 4), "levels": levels, "zones": zone_order, "side": side}


def base_2d(timeline: ElementTimeline, *, legend: bool) -> dict:
    """Layout, trace styles and positions of the flat view by level and zone.

    Parameters
    ----------
    timeline : ElementTimeline
        From :func:`~reports.element_timeline.data.element_states`.
    legend : bool
        Add the legend as an annotation under the panels.

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
    axis_x = dict(
        tickvals=[k + 0.5 for k in range(len(zones))],
        ticktext=zones,
        range=[0, len(zones)],
        showgrid=False,
        zeroline=False,
        title=dict(text="zone"),
        minor=dict(tickvals=list(range(len(zones) + 1)), showgrid=True, gridcolor="#CCCCCC"),
    )
    axis_y = dict(
        tickvals=[k + 0.5 for k in range(len(levels))],
        ticktext=levels,
        range=[0, len(levels)],
        showgrid=False,
        zeroline=False,
        title=dict(text="level"),
        minor=dict(tickvals=list(range(len(levels) + 1)), showgrid=True, gridcolor="#CCCCCC"),
    )
    annotations = [
        dict(
            text=f"<b>{VIEW_TITLES['as_planned']}</b>",
            x=0.24,
            y=1.0,
            xref="paper",
            yref="paper",
            showarrow=False,
            xanchor="center",
            yanchor="bottom",
        ),
        dict(
            text=f"<b>{VIEW_TITLES['as_built']}</b>",
            x=0.76,
            y=1.0,
            xref="paper",
            yref="paper",
            showarrow=False,
            xanchor="center",
            yanchor="bottom",
        ),
    ]
    if legend:
        annotations += _legend_annotations(-0.16)
    layout = dict(
        template="none",
        paper_bgcolor=BACKGROUND_COLOUR,
        plot_bgcolor=BACKGROUND_COLOUR,
        height=height,
        margin=dict(l=90, r=10, t=30, b=70 if legend else 50),
        showlegend=False,
        xaxis=dict(axis_x, domain=[0.0, 0.48]),
        xaxis2=dict(axis_x, domain=[0.52, 1.0]),
        yaxis=axis_y,
        yaxis2=dict(axis_y, matches="y", showticklabels=False, title=None),
        annotations=annotations,
        hoverlabel=dict(align="left"),
    )
    highlighted = timeline.elements["highlighted"].to_numpy(dtype=bool)
    marker = dict(
        symbol="square",
        size=marker_size,
        colorscale=discrete_colourscale(),
        cmin=-0.5,
        cmax=len(STATE_COLOURS) - 0.5,
        line=dict(
            color=np.where(highlighted, HIGHLIGHT_COLOUR, _OUTLINE_2D).tolist(),
            width=np.where(highlighted, 2.0, 0.6).tolist(),
        ),
    )
    point = dict(type="scattergl", mode="markers", hovertemplate="%{text}<extra></extra>", marker=marker)
    traces = [
        dict(point, xaxis="x", yaxis="y", name=VIEW_TITLES["as_planned"]),
        dict(point, xaxis="x2", yaxis="y2", name=VIEW_TITLES["as_built"]),
    ]
    return {"layout": layout, "traces": traces, "x": places["x"], "y": places["y"]}


def figure_2d(timeline: ElementTimeline, *, frames: bool = True):
    """The same timeline drawn flat, by level (up) and zone (across), for large models.

    Each element is a small square in the cell of its level and zone; the two panels are
    as planned and as built.

    Parameters
    ----------
    timeline : ElementTimeline
        From :func:`~reports.element_timeline.data.element_states`.
    frames : bool, default True
        Add one animation frame per week (colour values only), a slider and play/pause
        buttons; ``False`` gives the first week alone.

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
    data = [
        dict(
            trace,
            x=base["x"],
            y=base["y"],
            text=hover,
            marker=dict(trace["marker"], color=states[n][:, 0].astype(np.uint8)),
        )
        for n, trace in enumerate(base["traces"])
    ]
    dates = [d.isoformat() for d in timeline.frame_dates.astype(dt.date)]
    layout = dict(
        base["layout"],
        title=dict(text=html.escape(timeline.title), font=dict(size=14), x=0.01),
        **_slider_and_buttons(dates, frames=frames),
    )
    layout["height"] = layout["height"] + 120
    layout["margin"] = dict(layout["margin"], t=70, b=170)
    for annotation in layout["annotations"]:
        if annotation.get("yanchor") == "top":
            annotation["y"] = -0.3
    figure = go.Figure(data=data, layout=layout)
    if frames:
        figure.frames = [
            go.Frame(
                name=date,
                traces=[0, 1],
                data=[dict(type="scattergl", marker=dict(color=s[:, f].astype(np.uint8))) for s in states],
            )
            for f, date in enumerate(dates)
        ]
    return figure
