"""The element timeline as an HTML fragment for the report, and as a page of its own.

What it shows: the title naming where each view's dates come from, the legend in plain
words, the week slider with a play/pause button, the two 3D scenes (as planned, as built)
and the flat view by level and zone, and the elements with no linked activity. The data is
an :class:`~reports.element_timeline.data.ElementTimeline` (the baseline's early dates and
the as-built record); the layouts come from :mod:`reports.element_timeline.scene` and the
script from :mod:`reports.element_timeline.script`.

Size
----
:func:`timeline_html` writes the model's geometry once (six numbers per box), one hover text
per element and the states as runs (state, number of weeks) per element; the script builds
the boxes (8 corners, 12 triangles each) and recolours both views when the week changes. A
5,000-element model of a long project stays near one megabyte besides plotly.js.
"""

from __future__ import annotations

import datetime as dt
import hashlib
import html
import json
from collections.abc import Sequence

import numpy as np

from .data import NOT_STARTED, STATE_NAMES, UNLINKED, VIEW_TITLES, VIEWS, ElementTimeline
from .scene import (
    BOX_CORNERS,
    BOX_EDGES,
    BOX_TRIANGLES,
    LEGEND,
    PLAY_MILLISECONDS,
    ROLES_3D,
    base_2d,
    base_3d,
    box_levels,
    hover_texts,
)
from .script import SCRIPT, STYLE

__all__ = ["timeline_html", "standalone_html"]


def _encode_runs(runs: list[list[tuple[int, int]]]) -> str:
    """Runs as text: per element ``<code><frames in base 36>`` joined by ".", elements by ","."""
    return ",".join(
        ".".join(f"{code}{np.base_repr(length, 36).lower()}" for code, length in element) for element in runs
    )


def _json_for_script(value) -> str:
    text = json.dumps(value, separators=(",", ":"), ensure_ascii=False, allow_nan=False)
    # inside <script> no "</" may appear; these escapes keep the JSON valid
    return (
        text.replace("&", "\\u0026")
        .replace("<", "\\u003c")
        .replace(">", "\\u003e")
        .replace("\u2028", "\\u2028")
        .replace("\u2029", "\\u2029")
    )


def _plotly_json(value) -> object:
    """Plain JSON values of a plotly layout or trace dict (numpy arrays become lists)."""
    from plotly.io.json import to_json_plotly

    return json.loads(to_json_plotly(value))


def _payload(timeline: ElementTimeline, views: Sequence[str]) -> dict:
    count = len(timeline.frames)
    first = timeline.frame_dates[0].astype(dt.date).isoformat()
    payload: dict = {
        "title": timeline.title,
        "frames": {"first": first, "count": count, "step_days": 7},
        "views": [{"key": v, "name": VIEW_TITLES[v]} for v in VIEWS],
        "state_names": list(STATE_NAMES),
        "states": {v: _encode_runs(timeline.runs(v)) for v in VIEWS},
        "start_frames": {v: timeline.start_frames(v).tolist() for v in VIEWS},
        "elements": len(timeline.elements),
        "hover": hover_texts(timeline),
        "play_milliseconds": PLAY_MILLISECONDS,
    }
    if "3d" in views:
        base = base_3d(timeline, legend=False)
        drawn, boxes = base["drawn"], base["boxes"]
        highlighted = timeline.elements["highlighted"].to_numpy(dtype=bool)
        levels, numbers = box_levels(timeline, drawn)
        payload["figure3d"] = {
            "layout": _plotly_json(base["layout"]),
            "traces": _plotly_json(base["traces"]),
            "roles": list(ROLES_3D),
            "drawn": drawn.tolist(),
            "boxes": [round(float(v), 3) for v in boxes.ravel()],
            "outlined": [n for n, row in enumerate(drawn.tolist()) if highlighted[row]],
            "levels": levels,
            "box_levels": numbers.tolist(),
            "margin": base["margin"],
            "corners": BOX_CORNERS,
            "triangles": BOX_TRIANGLES,
            "edges": BOX_EDGES,
        }
    if "2d" in views:
        base = base_2d(timeline, legend=False)
        payload["figure2d"] = {
            "layout": _plotly_json(base["layout"]),
            "traces": _plotly_json(base["traces"]),
            "x": base["x"].tolist(),
            "y": base["y"].tolist(),
        }
    return payload


def _legend_html() -> str:
    items = []
    kinds = {NOT_STARTED: " ghost", UNLINKED: " wire"}
    for code, colour, label, meaning in LEGEND:
        if code is None:
            swatch = f'<span class="swatch" style="background:#FFFFFF;border:3px solid {colour}"></span>'
        else:
            swatch = f'<span class="swatch{kinds.get(code, "")}" style="background:{colour}"></span>'
        items.append(f"<li>{swatch}<b>{html.escape(label)}</b>: {html.escape(meaning)}</li>")
    return '<ul class="legend">' + "".join(items) + "</ul>"


def _levels_html(timeline: ElementTimeline) -> str:
    """The "show levels up to" control of the 3D views (a select: mouse and keyboard)."""
    levels, _ = box_levels(timeline, np.flatnonzero(timeline.elements["drawn_in_3d"].to_numpy(dtype=bool)))
    if not levels:
        return ""
    options = "".join(
        f'<option value="{k}"{" selected" if k == len(levels) - 1 else ""}>'
        f"{html.escape(name)}{' (every level)' if k == len(levels) - 1 else ''}</option>"
        for k, name in enumerate(levels)
    )
    return (
        '<div class="controls levels"><label>3D views: show levels up to '
        f'<select data-role="levels">{options}</select></label>'
        '<span class="hint">choose a lower level to see the work inside; drag either view to turn both'
        "</span></div>"
    )


def _unlinked_html(timeline: ElementTimeline) -> str:
    table = timeline.unlinked
    if table.empty:
        return '<p class="unlinked" data-role="unlinked">Every element is linked to an activity.</p>'
    rows = "".join(
        "<tr>"
        + "".join(f"<td>{html.escape(str(v))}</td>" for v in (r.id, r.name, r.wbs, r.classification, r.missing_from))
        + "</tr>"
        for r in table.itertuples(index=False)
    )
    noun = "element has" if len(table) == 1 else "elements have"
    return (
        f'<details class="unlinked" data-role="unlinked" open><summary>{len(table)} {noun} no linked '
        "activity in at least one view (shown grey)</summary><table><thead><tr><th>element</th>"
        "<th>name</th><th>wbs</th><th>classification</th><th>no activity in</th></tr></thead>"
        f"<tbody>{rows}</tbody></table></details>"
    )


def _not_drawn_html(timeline: ElementTimeline) -> str:
    missing = timeline.elements.loc[~timeline.elements["drawn_in_3d"], "id"].astype(str).tolist()
    if not missing:
        return ""
    shown = ", ".join(html.escape(m) for m in missing[:50]) + (" ..." if len(missing) > 50 else "")
    return (
        f'<p class="not-drawn" data-role="not-drawn">{len(missing)} element(s) have no complete box '
        f"(x, y, z, dx, dy, dz) and appear only in the view by level and zone: {shown}</p>"
    )


def timeline_html(
    timeline: ElementTimeline, *, views: Sequence[str] = ("3d", "2d"), element_id: str | None = None
) -> str:
    """The element timeline as an HTML fragment: a ``div`` with its data and a small script.

    The page that holds it must load plotly.js once (inline, for a self-contained report)
    before the fragment. The fragment holds the title, the legend in plain words, the week
    slider with a play/pause button, the 3D views (as planned and as built, one camera:
    turning one turns the other) with a "show levels up to" control, the 2D view by level
    and zone, and the list of elements with no linked activity.

    Parameters
    ----------
    timeline : ElementTimeline
        From :func:`~reports.element_timeline.data.element_states`.
    views : sequence of str, default ("3d", "2d")
        ``"3d"``, ``"2d"`` or both (for a very large model, the 2D view alone).
    element_id : str, optional
        The ``id`` of the outer ``div``; default derived from the content, so the
        same timeline always gives the same text.

    Returns
    -------
    str
        The fragment. Its outer ``div`` has class ``element-timeline``; controls carry
        ``data-role`` attributes (``slider``, ``play``, ``date``, ``counts``, ``levels``,
        ``plot3d``, ``plot2d``, ``unlinked``); once drawn the ``div`` has
        ``data-ready="true"``, ``data-frame`` (the week shown, from 0), ``data-top-level``
        (the number of the highest level shown in 3D, from 0 at the lowest) and
        ``data-drawn`` (``"<week>:<level>"`` once both are drawn).

    Raises
    ------
    ValueError
        ``views`` other than ``"3d"``, ``"2d"`` or both.
    """
    views = tuple(views)
    unknown = set(views) - {"3d", "2d"}
    if unknown or not views:
        raise ValueError(f"views must be '3d', '2d' or both, not {views!r}")
    payload_json = _json_for_script(_payload(timeline, views))
    if element_id is None:
        element_id = "element-timeline-" + hashlib.sha256(payload_json.encode("utf-8")).hexdigest()[:12]
    count = len(timeline.frames)
    plots = ""
    if "3d" in views:
        plots += _levels_html(timeline) + '<div data-role="plot3d" style="width:100%;height:560px"></div>'
    if "2d" in views:
        plots += '<div data-role="plot2d" style="width:100%"></div>'
    return (
        f'<div id="{element_id}" class="element-timeline">'
        f"<style>{STYLE.format(id=element_id)}</style>"
        f"<h3>{html.escape(timeline.title)}</h3>"
        f"{_legend_html()}"
        '<div class="controls">'
        '<button type="button" data-role="play" aria-pressed="false">Play</button>'
        f'<input type="range" data-role="slider" min="0" max="{count - 1}" step="1" value="0" '
        'aria-label="Week shown">'
        '<output data-role="date"></output></div>'
        '<p class="counts" data-role="counts" aria-live="polite"></p>'
        '<p class="status" data-role="status"></p>'
        f"{plots}{_unlinked_html(timeline)}{_not_drawn_html(timeline)}"
        f'<script type="application/json" data-role="timeline-data">{payload_json}</script>'
        f"<script>{SCRIPT.replace('{id}', element_id)}</script>"
        "</div>"
    )


def standalone_html(timeline: ElementTimeline, title: str | None = None, **options) -> str:
    """A complete HTML page holding :func:`timeline_html`, with plotly.js inlined.

    It opens offline (``file://``): plotly.js is the copy shipped with the plotly package,
    the same one ``include_plotlyjs=True`` writes.

    Parameters
    ----------
    timeline : ElementTimeline
        From :func:`~reports.element_timeline.data.element_states`.
    title : str, optional
        The page's title (escaped; default "Element timeline").
    **options
        Passed to :func:`timeline_html` (``views``, ``element_id``).

    Returns
    -------
    str
        The page, one HTML document.

    Raises
    ------
    ValueError
        ``views`` other than ``"3d"``, ``"2d"`` or both.
    """
    from plotly.offline import get_plotlyjs

    heading = html.escape(title or "Element timeline")
    return (
        '<!DOCTYPE html>\n<html lang="en"><head><meta charset="utf-8">'
        f"<title>{heading}</title>"
        '<meta name="viewport" content="width=device-width, initial-scale=1">'
        f'<script type="text/javascript">{get_plotlyjs()}</script>'
        '</head><body style="margin:1em">'
        f'<h1 style="font-family:system-ui,sans-serif;font-size:1.3em">{heading}</h1>'
        f"{timeline_html(timeline, **options)}</body></html>\n"
    )
