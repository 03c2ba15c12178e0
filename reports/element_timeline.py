"""The element timeline: the building model coloured by the state of its work, week by week.

Two views of the same model sit side by side, *as planned* and *as built*. A slider and a
play button step through the project one week at a time, and every element takes the
colour of its state on that week's Monday. Elements built by activities that a delay event
affected are outlined; elements that no activity builds are grey and listed.

Which dates
-----------
- As planned: the early dates of the baseline (``delay.cpm.schedule(case, "baseline")``).
- As built: the as-built record (the actual dates of ``case.asbuilt_snapshot``); without
  one, the last update scheduled at its data date (actual dates where recorded, forecast
  early dates otherwise); with no update either, the baseline again. The figure's title says
  which.

An element is linked to the activities that share its work breakdown code (``wbs``). Its
dates in a view are the earliest start and the latest finish of those activities in that
view's programme (case-format, elements.csv). An activity's ``wbs`` is the one the baseline
gives it; an activity the baseline does not hold takes it from the latest snapshot that
holds it, then from fragnets.csv. A programme handed in as a DataFrame with its own ``wbs``
column uses that column instead.

States (codes of :attr:`ElementTimeline.states` and :meth:`ElementTimeline.state_at`)
--------------------------------------------------------------------------------------
For a date ``D`` and an element with start ``S`` and finish ``F`` in a view:

=====  ==================  ==========================================================
code   name                when
=====  ==================  ==========================================================
0      not started         ``D < S``
1      in progress         ``S <= D <= F`` (work is on the start and finish dates)
2      complete            ``D > F``
3      late against plan   as-built view only: the plan has the element started by
                           ``D`` (``D >= S_planned``) and it has not actually started
                           (``D < S_built``), or the plan has it complete
                           (``D > F_planned``) and it is not (``D <= F_built``). In
                           other words: its as-built state is behind its planned state.
4      no linked activity  no activity of the view's programme has the element's wbs
=====  ==================  ==========================================================

An element that is late shows 3 until it catches up with the plan; once complete it shows
2 however late it finished. An element with no planned dates (linked only in the as-built
programme) can never be late.

Frames are the Mondays from the Monday on or before the first start of either programme up
to the first Monday after the last finish of either, so the last frame shows the finished
works.

Size
----
:func:`timeline_html` writes the model's geometry once (six numbers per box), one hover text
per element and the states as runs (state, number of weeks) per element; a small script
builds the boxes (8 corners, 12 triangles each) and recolours both views when the week
changes. A 5,000-element model of a long project stays near one megabyte besides plotly.js.
:func:`figure_3d` and :func:`figure_2d` return ordinary plotly figures whose frames carry
only the colour values (one byte per box corner per view per week): convenient in a
notebook, large for a long project.

Example
-------
>>> from delay.case import load_case                                   # doctest: +SKIP
>>> from reports.element_timeline import element_states, timeline_html # doctest: +SKIP
>>> timeline = element_states(load_case("case_demo"))                  # doctest: +SKIP
>>> timeline.state_at("2025-09-01", "as_built")[:5]                    # doctest: +SKIP
>>> fragment = timeline_html(timeline)                                 # doctest: +SKIP
"""

from __future__ import annotations

import datetime as dt
import hashlib
import html
import json
import math
from dataclasses import dataclass
from functools import cached_property
from typing import Iterable, Sequence

import numpy as np
import pandas as pd

from delay.cpm import ScheduleResult, schedule
from delay.model import Case

from .palette import BACKGROUND_COLOUR, HIGHLIGHT_COLOUR, STATE_COLOURS, discrete_colourscale

__all__ = [
    "ElementTimeline",
    "element_states",
    "figure_3d",
    "figure_2d",
    "timeline_html",
    "standalone_html",
    "NOT_STARTED",
    "IN_PROGRESS",
    "COMPLETE",
    "LATE",
    "UNLINKED",
    "STATE_NAMES",
    "VIEWS",
    "LEGEND",
]

NOT_STARTED, IN_PROGRESS, COMPLETE, LATE, UNLINKED = 0, 1, 2, 3, 4
STATE_NAMES = ("not started", "in progress", "complete", "late against plan", "no linked activity")
VIEWS = ("as_planned", "as_built")
VIEW_TITLES = {"as_planned": "As planned", "as_built": "As built"}

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

_NO_DAY = np.iinfo(np.int64).min
_EPOCH = dt.date(1970, 1, 1)  # a Thursday
_MAX_HOVER_ACTIVITIES = 6
_PLAY_MILLISECONDS = 350
_OUTLINE_2D = "#A8A290"  # a thin edge so pale "not started" squares show on white


# -- the data ---------------------------------------------------------------------------------
@dataclass(frozen=True, eq=False)
class ElementTimeline:
    """Per element its dates as planned and as built, and the weekly frames.

    Attributes
    ----------
    elements:
        One row per element, in elements.csv order: ``id, name, wbs, classification, level,
        zone, x, y, z, dx, dy, dz`` as loaded, then ``activities`` (the linked activity ids,
        ``;`` separated: those of the planned programme, then any only in the as-built one),
        ``events`` (ids of the events whose affected activities share the element's wbs,
        ``;`` separated), ``highlighted`` (the element is picked out), ``planned_start``,
        ``planned_finish``, ``actual_start``, ``actual_finish`` (``datetime64``, ``NaT`` when
        not linked in that view), ``linked_as_planned``, ``linked_as_built`` and
        ``drawn_in_3d`` (the element has a complete box).
    frames:
        ``frame`` (0, 1, ...) and ``date`` (the Monday of each week shown).
    unlinked:
        The elements grey in at least one view: ``id, name, wbs, classification, level,
        zone, missing_from`` (``"both views"``, ``"as planned"`` or ``"as built"``).
    planned_source, actual_source:
        In words, where each view's dates come from.
    title:
        The figure's title, naming both sources.
    """

    elements: pd.DataFrame
    frames: pd.DataFrame
    unlinked: pd.DataFrame
    planned_source: str
    actual_source: str
    title: str

    @cached_property
    def _days(self) -> dict[str, np.ndarray]:
        out = {}
        for column in ("planned_start", "planned_finish", "actual_start", "actual_finish"):
            out[column] = _to_days(self.elements[column])
        out["frames"] = _to_days(self.frames["date"])
        out["linked_as_planned"] = self.elements["linked_as_planned"].to_numpy(dtype=bool)
        out["linked_as_built"] = self.elements["linked_as_built"].to_numpy(dtype=bool)
        return out

    @property
    def frame_dates(self) -> np.ndarray:
        """The frame dates as ``datetime64[D]``."""
        return self._days["frames"].astype("datetime64[D]")

    def state_at(self, date, view: str = "as_built") -> np.ndarray:
        """State code of every element on ``date`` in ``view``.

        Parameters
        ----------
        date: a date (``datetime.date``, ISO text, ``numpy.datetime64`` or ``Timestamp``).
        view: ``"as_planned"`` or ``"as_built"``.

        Returns
        -------
        numpy.ndarray of int8, shape (elements,), codes as the module docstring defines.
        """
        day = int(_to_days(pd.Series([pd.Timestamp(date)]))[0])
        return self._codes(view, np.int64(day))

    def states(self, view: str = "as_built") -> np.ndarray:
        """State codes of every element in every frame.

        Returns
        -------
        numpy.ndarray of int8, shape (elements, frames): one byte per element and week.
        """
        return self._codes(view, self._days["frames"][None, :])

    def _codes(self, view: str, day) -> np.ndarray:
        if view not in VIEWS:
            raise ValueError(f"unknown view '{view}': use one of {', '.join(VIEWS)}")
        d = self._days
        shape = (-1, 1) if np.ndim(day) == 2 else (-1,)
        return _state_codes(
            view, day,
            d["planned_start"].reshape(shape), d["planned_finish"].reshape(shape),
            d["linked_as_planned"].reshape(shape),
            d["actual_start"].reshape(shape), d["actual_finish"].reshape(shape),
            d["linked_as_built"].reshape(shape),
        )

    def runs(self, view: str = "as_built") -> list[list[tuple[int, int]]]:
        """Per element, its states as runs ``(code, number of frames)`` from frame 0.

        The runs of an element add up to the number of frames; two neighbouring runs never
        have the same code. They are found from the few dates at which an element's state
        can change (its start and the day after its finish in both views), without building
        the whole elements x frames table.
        """
        codes, lengths = self._run_arrays(view)
        out = []
        for row_codes, row_lengths in zip(codes.tolist(), lengths.tolist()):
            runs: list[tuple[int, int]] = []
            for code, length in zip(row_codes, row_lengths):
                if length == 0:
                    continue
                if runs and runs[-1][0] == code:
                    runs[-1] = (code, runs[-1][1] + length)
                else:
                    runs.append((code, length))
            out.append(runs)
        return out

    def _run_arrays(self, view: str) -> tuple[np.ndarray, np.ndarray]:
        d = self._days
        frames = d["frames"]
        count = frames.size
        thresholds = [d["planned_start"], _next_day(d["planned_finish"])]
        if view == "as_built":
            thresholds += [d["actual_start"], _next_day(d["actual_finish"])]
        # the first frame on or after each date at which the state may change
        breaks = np.stack([np.zeros(len(self.elements), dtype=np.int64)]
                          + [np.searchsorted(frames, t, side="left") for t in thresholds], axis=1)
        breaks = np.sort(np.minimum(breaks, count), axis=1)
        following = np.concatenate([breaks[:, 1:], np.full((breaks.shape[0], 1), count)], axis=1)
        lengths = following - breaks
        at = frames[np.minimum(breaks, count - 1)]
        codes = self._codes(view, at)
        return codes, lengths


def _state_codes(view, day, planned_start, planned_finish, linked_planned, actual_start,
                 actual_finish, linked_built) -> np.ndarray:
    """The state codes of the module docstring, on whole arrays (broadcasting ``day``)."""
    planned = np.where(day < planned_start, NOT_STARTED, np.where(day <= planned_finish, IN_PROGRESS, COMPLETE))
    if view == "as_planned":
        return np.where(linked_planned, planned, UNLINKED).astype(np.int8)
    built = np.where(day < actual_start, NOT_STARTED, np.where(day <= actual_finish, IN_PROGRESS, COMPLETE))
    late = linked_planned & (built < planned)
    return np.where(linked_built, np.where(late, LATE, built), UNLINKED).astype(np.int8)


def _to_days(column: pd.Series) -> np.ndarray:
    values = pd.to_datetime(column).to_numpy(dtype="datetime64[D]")
    days = values.astype(np.int64)
    days[np.isnat(values)] = _NO_DAY
    return days


def _next_day(days: np.ndarray) -> np.ndarray:
    return np.where(days == _NO_DAY, _NO_DAY, days + 1)


def _monday_on_or_before(day: int) -> int:
    return day - (day + 3) % 7  # day 4 (1970-01-05) is a Monday


# -- building it from a case ------------------------------------------------------------------
def element_states(case: Case, planned: ScheduleResult | pd.DataFrame | None = None,
                   actual: ScheduleResult | pd.DataFrame | None = None, *,
                   highlight: Iterable[str] | None = None,
                   planned_source: str | None = None,
                   actual_source: str | None = None) -> ElementTimeline:
    """Dates and weekly states of the case's model elements, as planned and as built.

    Parameters
    ----------
    case:
        A loaded case with rows in elements.csv.
    planned:
        The planned programme: a :class:`~delay.cpm.ScheduleResult`, or a DataFrame with
        ``id``, ``early_start``, ``early_finish`` (and optionally ``wbs``). Default: the
        baseline scheduled.
    actual:
        The as-built programme, in the same forms. Default: the as-built record's actual
        dates; without one, the last update scheduled at its data date; with no update, the
        baseline.
    highlight:
        Ids of the activities delayed by an event; their elements are picked out. Default:
        every activity named in events.csv.
    planned_source, actual_source:
        Words for the title saying where the dates come from (defaults describe the
        defaults above, or name the snapshot of a ScheduleResult).

    Returns
    -------
    ElementTimeline

    Raises
    ------
    ValueError
        When the case has no elements, or a programme DataFrame lacks a column.
    delay.errors.CaseError
        When a snapshot cannot be scheduled.
    """
    elements = case.elements
    if elements.empty:
        raise ValueError("the case has no model elements (elements.csv is absent or empty)")
    if planned is None:
        planned_frame = _from_result(schedule(case, "baseline"))
        planned_source = planned_source or "baseline early dates"
    else:
        planned_frame = _programme(planned, "planned")
        planned_source = planned_source or _describe(planned)
    if actual is None:
        actual_frame, default_source = _default_actual(case)
        actual_source = actual_source or default_source
    else:
        actual_frame = _programme(actual, "actual")
        actual_source = actual_source or _describe(actual)

    wbs_of = _activity_wbs(case)
    planned_by_wbs = _dates_by_wbs(planned_frame, wbs_of)
    actual_by_wbs = _dates_by_wbs(actual_frame, wbs_of)

    table = elements.copy()
    wbs = table["wbs"]
    table["activities"] = _linked_ids(wbs, planned_by_wbs, actual_by_wbs)
    highlight_ids = _event_activities(case) if highlight is None else {str(a) for a in highlight}
    highlighted_wbs = {wbs_of.get(a, "") for a in highlight_ids} - {""}
    events_by_wbs = _events_by_wbs(case, wbs_of)
    table["events"] = [events_by_wbs.get(code, "") for code in wbs.tolist()]
    table["highlighted"] = wbs.isin(highlighted_wbs).to_numpy()
    table["planned_start"] = wbs.map(planned_by_wbs["start"]).astype("datetime64[us]")
    table["planned_finish"] = wbs.map(planned_by_wbs["finish"]).astype("datetime64[us]")
    table["actual_start"] = wbs.map(actual_by_wbs["start"]).astype("datetime64[us]")
    table["actual_finish"] = wbs.map(actual_by_wbs["finish"]).astype("datetime64[us]")
    table["linked_as_planned"] = table["planned_start"].notna() & table["planned_finish"].notna()
    table["linked_as_built"] = table["actual_start"].notna() & table["actual_finish"].notna()
    table["drawn_in_3d"] = table[["x", "y", "z", "dx", "dy", "dz"]].notna().all(axis=1)

    first, last = _project_span(planned_frame, actual_frame)
    monday = _monday_on_or_before(first)
    after = _monday_on_or_before(last) + 7  # the first Monday after the last finish
    frame_days = np.arange(monday, after + 1, 7, dtype=np.int64)
    frames = pd.DataFrame({"frame": np.arange(frame_days.size),
                           "date": frame_days.astype("datetime64[D]").astype("datetime64[us]")})

    missing_planned = ~table["linked_as_planned"]
    missing_built = ~table["linked_as_built"]
    grey = missing_planned | missing_built
    unlinked = table.loc[grey, ["id", "name", "wbs", "classification", "level", "zone"]].copy()
    unlinked["missing_from"] = np.where(missing_planned[grey] & missing_built[grey], "both views",
                                        np.where(missing_planned[grey], "as planned", "as built"))
    unlinked = unlinked.reset_index(drop=True)
    title = f"Element timeline: as planned ({planned_source}) against as built ({actual_source})"
    return ElementTimeline(elements=table.reset_index(drop=True), frames=frames, unlinked=unlinked,
                           planned_source=planned_source, actual_source=actual_source, title=title)


def _from_result(result: ScheduleResult) -> pd.DataFrame:
    frame = result.activities
    return pd.DataFrame({"id": frame["id"].astype(str), "start": frame["early_start"],
                         "finish": frame["early_finish"]})


def _programme(source, what: str) -> pd.DataFrame:
    if isinstance(source, ScheduleResult):
        return _from_result(source)
    if isinstance(source, pd.DataFrame):
        missing = [c for c in ("id", "early_start", "early_finish") if c not in source.columns]
        if missing:
            raise ValueError(f"the {what} programme lacks the column(s) {', '.join(missing)}: "
                             "give id, early_start and early_finish (and optionally wbs)")
        frame = pd.DataFrame({"id": source["id"].astype(str),
                              "start": pd.to_datetime(source["early_start"]),
                              "finish": pd.to_datetime(source["early_finish"])})
        if "wbs" in source.columns:
            frame["wbs"] = source["wbs"].fillna("").astype(str).to_numpy()
        return frame
    raise TypeError(f"the {what} programme must be a ScheduleResult or a DataFrame, "
                    f"not {type(source).__name__}")


def _describe(source) -> str:
    if isinstance(source, ScheduleResult):
        return f"{source.snapshot} early dates"
    return "dates given"


def _default_actual(case: Case) -> tuple[pd.DataFrame, str]:
    record = case.asbuilt_snapshot
    if record is not None:
        acts = record.activities
        return (pd.DataFrame({"id": acts["id"].astype(str), "start": acts["actual_start"],
                              "finish": acts["actual_finish"]}), "the as-built record")
    if case.updates:
        last = case.updates[-1]
        return (_from_result(schedule(case, last.folder)),
                f"{last.label} of {last.data_date.isoformat()}: actual dates where recorded, "
                "forecast early dates otherwise")
    return _from_result(schedule(case, "baseline")), "no progress recorded: baseline early dates"


def _activity_wbs(case: Case) -> dict[str, str]:
    """Activity id -> wbs: the baseline's, then the latest snapshot's, then fragnets.csv."""
    sources = [case.baseline.activities]
    later = list(case.updates)
    if case.asbuilt_snapshot is not None:
        later.append(case.asbuilt_snapshot)
    sources += [snap.activities for snap in reversed(later)]
    sources.append(case.fragnets)
    frames = [s[["id", "wbs"]] for s in sources if len(s)]
    both = pd.concat(frames, ignore_index=True) if frames else pd.DataFrame({"id": [], "wbs": []})
    both = both[both["wbs"].fillna("") != ""].drop_duplicates("id", keep="first")
    return dict(zip(both["id"].astype(str), both["wbs"].astype(str)))


def _dates_by_wbs(programme: pd.DataFrame, wbs_of: dict[str, str]) -> pd.DataFrame:
    """Per wbs: earliest start, latest finish and the activity ids (in programme order)."""
    frame = programme.copy()
    if "wbs" not in frame.columns:
        frame["wbs"] = frame["id"].map(wbs_of).fillna("")
    frame = frame[(frame["wbs"] != "") & frame["start"].notna() & frame["finish"].notna()]
    grouped = frame.groupby("wbs", sort=False)
    return pd.DataFrame({"start": grouped["start"].min(), "finish": grouped["finish"].max(),
                         "ids": grouped["id"].agg(list)})


def _linked_ids(wbs: pd.Series, planned: pd.DataFrame, actual: pd.DataFrame) -> np.ndarray:
    by_wbs: dict[str, str] = {}
    for code in pd.unique(wbs):
        ids = list(planned["ids"].get(code, []))
        seen = set(ids)
        ids += [a for a in actual["ids"].get(code, []) if a not in seen]
        by_wbs[code] = ";".join(ids)
    return wbs.map(by_wbs).fillna("").to_numpy(dtype=object)


def _split_ids(text: str) -> list[str]:
    return [part.strip() for part in str(text).split(";") if part.strip()]


def _event_activities(case: Case) -> set[str]:
    ids: set[str] = set()
    for text in case.events["activities"].fillna(""):
        ids.update(_split_ids(text))
    return ids


def _events_by_wbs(case: Case, wbs_of: dict[str, str]) -> dict[str, str]:
    found: dict[str, list[str]] = {}
    events = case.events
    for event, text in zip(events["id"].astype(str), events["activities"].fillna("")):
        for activity in _split_ids(text):
            code = wbs_of.get(activity, "")
            if code and event not in found.setdefault(code, []):
                found[code].append(event)
    return {code: ";".join(ids) for code, ids in found.items()}


def _project_span(*programmes: pd.DataFrame) -> tuple[int, int]:
    starts, finishes = [], []
    for frame in programmes:
        for column, out in (("start", starts), ("finish", finishes)):
            days = _to_days(frame[column])
            days = days[days != _NO_DAY]
            if days.size:
                out.append(days)
    if not starts or not finishes:
        raise ValueError("neither programme has any dated activity")
    return int(min(d.min() for d in starts)), int(max(d.max() for d in finishes))


# -- figures ----------------------------------------------------------------------------------
def _iso(value) -> str:
    return "" if pd.isna(value) else pd.Timestamp(value).date().isoformat()


def _hover_texts(timeline: ElementTimeline) -> list[str]:
    """One hover text per element (plotly's small HTML subset; input text escaped)."""
    e = timeline.elements
    texts = []
    columns = ["id", "name", "classification", "wbs", "activities", "events", "planned_start",
               "planned_finish", "actual_start", "actual_finish", "highlighted"]
    for row in e[columns].itertuples(index=False):
        (ident, name, classification, wbs, activities, events, ps, pf, as_, af, highlighted) = row
        lines = [f"<b>{html.escape(str(ident))}</b>" + (f" {html.escape(str(name))}" if name else "")]
        lines.append(f"classification: {html.escape(str(classification)) or '(none)'}"
                     f" | wbs: {html.escape(str(wbs))}")
        ids = _split_ids(activities)
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


def _base_3d(timeline: ElementTimeline, *, legend: bool) -> dict:
    """Layout and trace styles of the 3D figure, without the per-box arrays."""
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
                                 args=[None, dict(frame=dict(duration=_PLAY_MILLISECONDS, redraw=True),
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

    base = _base_3d(timeline, legend=True)
    drawn, boxes = base["drawn"], base["boxes"]
    x, y, z, i, j, k = _box_mesh(boxes)
    hover = np.asarray(_hover_texts(timeline), dtype=object)[drawn]
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


def _base_2d(timeline: ElementTimeline, *, legend: bool) -> dict:
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

    base = _base_2d(timeline, legend=True)
    hover = _hover_texts(timeline)
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


# -- the report's HTML fragment -----------------------------------------------------------------
def _encode_runs(runs: list[list[tuple[int, int]]]) -> str:
    """Runs as text: per element ``<code><frames in base 36>`` joined by ".", elements by ","."""
    return ",".join(".".join(f"{code}{np.base_repr(length, 36).lower()}" for code, length in element)
                    for element in runs)


def _json_for_script(value) -> str:
    text = json.dumps(value, separators=(",", ":"), ensure_ascii=False, allow_nan=False)
    # inside <script> no "</" may appear; these escapes keep the JSON valid
    return text.replace("&", "\\u0026").replace("<", "\\u003c").replace(">", "\\u003e") \
        .replace("\u2028", "\\u2028").replace("\u2029", "\\u2029")


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
        "elements": len(timeline.elements),
        "hover": _hover_texts(timeline),
        "play_milliseconds": _PLAY_MILLISECONDS,
    }
    if "3d" in views:
        base = _base_3d(timeline, legend=False)
        drawn, boxes = base["drawn"], base["boxes"]
        highlighted = timeline.elements["highlighted"].to_numpy(dtype=bool)
        payload["figure3d"] = {
            "layout": _plotly_json(base["layout"]), "traces": _plotly_json(base["traces"]),
            "drawn": drawn.tolist(), "boxes": [round(float(v), 3) for v in boxes.ravel()],
            "outlined": [n for n, row in enumerate(drawn.tolist()) if highlighted[row]],
            "corners": BOX_CORNERS, "triangles": BOX_TRIANGLES, "edges": BOX_EDGES,
        }
    if "2d" in views:
        base = _base_2d(timeline, legend=False)
        payload["figure2d"] = {"layout": _plotly_json(base["layout"]),
                               "traces": _plotly_json(base["traces"]),
                               "x": base["x"].tolist(), "y": base["y"].tolist()}
    return payload


def _legend_html() -> str:
    items = []
    for code, colour, label, meaning in LEGEND:
        if code is None:
            swatch = f'<span class="swatch" style="background:#FFFFFF;border:3px solid {colour}"></span>'
        else:
            swatch = f'<span class="swatch" style="background:{colour}"></span>'
        items.append(f'<li>{swatch}<b>{html.escape(label)}</b>: {html.escape(meaning)}</li>')
    return '<ul class="legend">' + "".join(items) + "</ul>"


def _unlinked_html(timeline: ElementTimeline) -> str:
    table = timeline.unlinked
    if table.empty:
        return '<p class="unlinked" data-role="unlinked">Every element is linked to an activity.</p>'
    rows = "".join(
        "<tr>" + "".join(f"<td>{html.escape(str(v))}</td>" for v in (r.id, r.name, r.wbs, r.classification,
                                                                    r.missing_from)) + "</tr>"
        for r in table.itertuples(index=False))
    noun = "element has" if len(table) == 1 else "elements have"
    return (f'<details class="unlinked" data-role="unlinked" open><summary>{len(table)} {noun} no linked '
            'activity in at least one view (shown grey)</summary><table><thead><tr><th>element</th>'
            '<th>name</th><th>wbs</th><th>classification</th><th>no activity in</th></tr></thead>'
            f'<tbody>{rows}</tbody></table></details>')


def _not_drawn_html(timeline: ElementTimeline) -> str:
    missing = timeline.elements.loc[~timeline.elements["drawn_in_3d"], "id"].astype(str).tolist()
    if not missing:
        return ""
    shown = ", ".join(html.escape(m) for m in missing[:50]) + (" ..." if len(missing) > 50 else "")
    return (f'<p class="not-drawn" data-role="not-drawn">{len(missing)} element(s) have no complete box '
            f'(x, y, z, dx, dy, dz) and appear only in the view by level and zone: {shown}</p>')


_STYLE = """
#{id} {{ font-family: system-ui, -apple-system, "Segoe UI", sans-serif; color: #222; }}
#{id} h3 {{ font-size: 1.05em; margin: 0.4em 0; }}
#{id} .legend {{ list-style: none; padding: 0; margin: 0.3em 0; columns: 2 22em; font-size: 0.9em; }}
#{id} .legend li {{ margin: 0.15em 0; }}
#{id} .swatch {{ display: inline-block; width: 0.9em; height: 0.9em; margin-right: 0.4em;
  vertical-align: -0.1em; border: 1px solid #555; box-sizing: border-box; }}
#{id} .controls {{ display: flex; align-items: center; gap: 0.8em; margin: 0.4em 0; }}
#{id} .controls input[type=range] {{ flex: 1; }}
#{id} .controls button {{ min-width: 5em; padding: 0.25em 0.8em; }}
#{id} .counts {{ font-size: 0.85em; margin: 0.2em 0; }}
#{id} table {{ border-collapse: collapse; font-size: 0.85em; }}
#{id} td, #{id} th {{ border: 1px solid #ccc; padding: 0.15em 0.5em; text-align: left; }}
"""

_SCRIPT = r"""
(function (root) {
  "use strict";
  function start() {
    if (!window.Plotly) {
      root.querySelector('[data-role="status"]').textContent = "This figure needs plotly.js on the page.";
      return;
    }
    var data = JSON.parse(root.querySelector('script[data-role="timeline-data"]').textContent);
    var E = data.elements, F = data.frames.count;
    var slider = root.querySelector('[data-role="slider"]');
    var play = root.querySelector('[data-role="play"]');
    var label = root.querySelector('[data-role="date"]');
    var counts = root.querySelector('[data-role="counts"]');
    var first = Date.UTC(+data.frames.first.slice(0, 4), +data.frames.first.slice(5, 7) - 1,
                         +data.frames.first.slice(8, 10));
    function dateOf(frame) {
      return new Date(first + frame * data.frames.step_days * 86400000).toISOString().slice(0, 10);
    }
    function decode(text) {
      var items = text.split(","), offsets = new Int32Array(E + 1), starts = [], codes = [];
      for (var e = 0; e < E; e++) {
        offsets[e] = starts.length;
        var frame = 0, runs = items[e].split(".");
        for (var r = 0; r < runs.length; r++) {
          starts.push(frame);
          codes.push(+runs[r].charAt(0));
          frame += parseInt(runs[r].slice(1), 36);
        }
      }
      offsets[E] = starts.length;
      return {offsets: offsets, starts: Int32Array.from(starts), codes: Uint8Array.from(codes)};
    }
    var runs = data.views.map(function (v) { return decode(data.states[v.key]); });
    function statesAt(view, frame) {
      var r = runs[view], out = new Uint8Array(E);
      for (var e = 0; e < E; e++) {
        var k = r.offsets[e], last = r.offsets[e + 1] - 1;
        while (k < last && r.starts[k + 1] <= frame) k++;
        out[e] = r.codes[k];
      }
      return out;
    }
    var plots = [], three = data.figure3d, flat = data.figure2d;
    function intensities(states) {
      var drawn = three.drawn, out = new Float32Array(drawn.length * 8);
      for (var n = 0; n < drawn.length; n++) out.fill(states[drawn[n]], 8 * n, 8 * n + 8);
      return out;
    }
    function build3d(states) {
      var drawn = three.drawn, N = drawn.length, b = three.boxes;
      var x = new Float32Array(8 * N), y = new Float32Array(8 * N), z = new Float32Array(8 * N);
      var i = new Int32Array(12 * N), j = new Int32Array(12 * N), k = new Int32Array(12 * N);
      var text = new Array(8 * N), c, t, n;
      for (n = 0; n < N; n++) {
        for (c = 0; c < 8; c++) {
          var corner = three.corners[c], v = 8 * n + c;
          x[v] = b[6 * n] + corner[0] * b[6 * n + 3];
          y[v] = b[6 * n + 1] + corner[1] * b[6 * n + 4];
          z[v] = b[6 * n + 2] + corner[2] * b[6 * n + 5];
          text[v] = data.hover[drawn[n]];
        }
        for (t = 0; t < 12; t++) {
          var tri = three.triangles[t], f = 12 * n + t;
          i[f] = 8 * n + tri[0]; j[f] = 8 * n + tri[1]; k[f] = 8 * n + tri[2];
        }
      }
      var ex = [], ey = [], ez = [];
      three.outlined.forEach(function (n) {
        three.edges.forEach(function (edge) {
          [edge[0], edge[1]].forEach(function (c) {
            var corner = three.corners[c];
            ex.push(b[6 * n] + corner[0] * b[6 * n + 3]);
            ey.push(b[6 * n + 1] + corner[1] * b[6 * n + 4]);
            ez.push(b[6 * n + 2] + corner[2] * b[6 * n + 5]);
          });
          ex.push(null); ey.push(null); ez.push(null);
        });
      });
      var traces = three.traces.map(function (trace, number) {
        var copy = Object.assign({}, trace);
        if (number < 2) {
          Object.assign(copy, {x: x, y: y, z: z, i: i, j: j, k: k, text: text,
                               intensity: intensities(states[number])});
        } else {
          Object.assign(copy, {x: ex, y: ey, z: ez});
        }
        return copy;
      });
      var div = root.querySelector('[data-role="plot3d"]');
      return Plotly.newPlot(div, traces, three.layout, {responsive: true, displaylogo: false}).then(function () {
        var syncing = false;
        function follow(event) {
          if (syncing) return;
          var from = null, to = null;
          if (event["scene.camera"]) { from = "scene.camera"; to = "scene2.camera"; }
          else if (event["scene2.camera"]) { from = "scene2.camera"; to = "scene.camera"; }
          if (!from) return;
          syncing = true;
          var change = {}; change[to] = event[from];
          Plotly.relayout(div, change).then(function () { syncing = false; }, function () { syncing = false; });
        }
        div.on("plotly_relayout", follow);
        div.on("plotly_relayouting", follow);
        plots.push({div: div, update: function (s) {
          return Plotly.restyle(div, {intensity: [intensities(s[0]), intensities(s[1])]}, [0, 1]);
        }});
      });
    }
    function build2d(states) {
      var traces = flat.traces.map(function (trace, number) {
        var marker = Object.assign({}, trace.marker, {color: Float32Array.from(states[number])});
        return Object.assign({}, trace, {x: flat.x, y: flat.y, text: data.hover, marker: marker});
      });
      var div = root.querySelector('[data-role="plot2d"]');
      return Plotly.newPlot(div, traces, flat.layout, {responsive: true, displaylogo: false}).then(function () {
        plots.push({div: div, update: function (s) {
          return Plotly.restyle(div, {"marker.color": [Float32Array.from(s[0]), Float32Array.from(s[1])]}, [0, 1]);
        }});
      });
    }
    var current = 0, playing = false, timer = null;
    function describe(states) {
      return data.views.map(function (v, number) {
        var tally = [0, 0, 0, 0, 0];
        states[number].forEach(function (c) { tally[c]++; });
        var parts = [];
        tally.forEach(function (n, c) { if (n) parts.push(n + " " + data.state_names[c]); });
        return v.name + ": " + parts.join(", ");
      }).join(" | ");
    }
    function show(frame) {
      current = frame;
      slider.value = String(frame);
      root.dataset.frame = String(frame);
      label.textContent = "Week of Monday " + dateOf(frame) + " (week " + (frame + 1) + " of " + F + ")";
      var states = [statesAt(0, frame), statesAt(1, frame)];
      counts.textContent = describe(states);
      return states;
    }
    function setFrame(frame) {
      frame = Math.max(0, Math.min(F - 1, frame | 0));
      var states = show(frame);
      return Promise.all(plots.map(function (p) { return p.update(states); }));
    }
    function stop() {
      playing = false;
      if (timer) { clearTimeout(timer); timer = null; }
      play.textContent = "Play";
      play.setAttribute("aria-pressed", "false");
    }
    function step() {
      if (!playing) return;
      if (current >= F - 1) { stop(); return; }
      setFrame(current + 1).then(function () {
        if (playing) timer = setTimeout(step, data.play_milliseconds);
      });
    }
    slider.addEventListener("input", function () { setFrame(+slider.value); });
    play.addEventListener("click", function () {
      if (playing) { stop(); return; }
      playing = true;
      play.textContent = "Pause";
      play.setAttribute("aria-pressed", "true");
      (current >= F - 1 ? setFrame(0) : Promise.resolve()).then(function () {
        timer = setTimeout(step, data.play_milliseconds);
      });
    });
    var states = show(0), work = [];
    if (three) work.push(build3d(states));
    if (flat) work.push(build2d(states));
    root.elementTimeline = {setFrame: setFrame, statesAt: statesAt, frame: function () { return current; }};
    Promise.all(work).then(function () { root.dataset.ready = "true"; }, function (error) {
      root.querySelector('[data-role="status"]').textContent = "The figure could not be drawn: " + error;
      throw error;
    });
  }
  if (document.readyState === "loading") document.addEventListener("DOMContentLoaded", start);
  else start();
})(document.getElementById("{id}"));
"""


def timeline_html(timeline: ElementTimeline, *, views: Sequence[str] = ("3d", "2d"),
                  element_id: str | None = None) -> str:
    """The element timeline as an HTML fragment: a ``div`` with its data and a small script.

    The page that holds it must load plotly.js once (inline, for a self-contained report)
    before the fragment. The fragment holds the title, the legend in plain words, the week
    slider with a play/pause button, the 3D views (as planned and as built, one camera:
    turning one turns the other) and the 2D view by level and zone, and the list of
    elements with no linked activity.

    Parameters
    ----------
    timeline: from :func:`element_states`.
    views: ``"3d"``, ``"2d"`` or both (for a very large model, the 2D view alone).
    element_id: the ``id`` of the outer ``div``; default derived from the content, so the
        same timeline always gives the same text.

    Returns
    -------
    str
        The fragment. Its outer ``div`` has class ``element-timeline``; controls carry
        ``data-role`` attributes (``slider``, ``play``, ``date``, ``counts``, ``plot3d``,
        ``plot2d``, ``unlinked``); once drawn the ``div`` has ``data-ready="true"`` and
        ``data-frame`` (the week shown, from 0).
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
        plots += '<div data-role="plot3d" style="width:100%;height:560px"></div>'
    if "2d" in views:
        plots += '<div data-role="plot2d" style="width:100%"></div>'
    return (
        f'<div id="{element_id}" class="element-timeline">'
        f"<style>{_STYLE.format(id=element_id)}</style>"
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
        f'<script>{_SCRIPT.replace("{id}", element_id)}</script>'
        "</div>"
    )


def standalone_html(timeline: ElementTimeline, title: str | None = None, **options) -> str:
    """A complete HTML page holding :func:`timeline_html`, with plotly.js inlined.

    It opens offline (``file://``): plotly.js is the copy shipped with the plotly package,
    the same one ``include_plotlyjs=True`` writes. ``options`` go to :func:`timeline_html`.
    """
    from plotly.offline import get_plotlyjs

    heading = html.escape(title or "Element timeline")
    return (
        "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
        f"<title>{heading}</title>"
        '<meta name="viewport" content="width=device-width, initial-scale=1">'
        f'<script type="text/javascript">{get_plotlyjs()}</script>'
        "</head><body style=\"margin:1em\">"
        f"<h1 style=\"font-family:system-ui,sans-serif;font-size:1.3em\">{heading}</h1>"
        f"{timeline_html(timeline, **options)}</body></html>\n"
    )
