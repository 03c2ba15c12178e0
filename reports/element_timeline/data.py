"""The element timeline's data: each model element's dates and its state week by week.

From which results
------------------
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

Example
-------
A small random case with a dozen elements, one state code each:

>>> import pathlib, tempfile
>>> from delay.case import load_case
>>> from delay.synth import synthesise
>>> from reports.element_timeline import element_states
>>> with tempfile.TemporaryDirectory() as folder:
...     case = load_case(synthesise(pathlib.Path(folder) / "case", 20, updates=2, elements=12))
>>> timeline = element_states(case)
>>> timeline.state_at(timeline.frame_dates[0], "as_built").shape
(12,)
"""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass
from functools import cached_property

import numpy as np
import pandas as pd

from delay.convert import NO_DAY, join_ids, to_days
from delay.cpm import ScheduleResult, schedule
from delay.events import event_activities
from delay.model import Case

__all__ = [
    "ElementTimeline",
    "element_states",
    "NOT_STARTED",
    "IN_PROGRESS",
    "COMPLETE",
    "LATE",
    "UNLINKED",
    "STATE_NAMES",
    "VIEWS",
    "VIEW_TITLES",
]

NOT_STARTED, IN_PROGRESS, COMPLETE, LATE, UNLINKED = 0, 1, 2, 3, 4
STATE_NAMES = ("not started", "in progress", "complete", "late against plan", "no linked activity")
VIEWS = ("as_planned", "as_built")
VIEW_TITLES = {"as_planned": "As planned", "as_built": "As built"}


@dataclass(frozen=True, eq=False)
class ElementTimeline:
    """Per element its dates as planned and as built, and the weekly frames.

    Made by :func:`element_states`. The state codes are those of the module docstring.

    Parameters
    ----------
    elements : pandas.DataFrame
        One row per element, in elements.csv order: ``id, name, wbs, classification, level,
        zone, x, y, z, dx, dy, dz`` as loaded, then ``activities`` (the linked activity ids,
        ``;`` separated: those of the planned programme, then any only in the as-built one),
        ``events`` (ids of the events whose affected activities share the element's wbs,
        ``;`` separated), ``highlighted`` (the element is picked out), ``planned_start``,
        ``planned_finish``, ``actual_start``, ``actual_finish`` (``datetime64``, ``NaT`` when
        not linked in that view), ``linked_as_planned``, ``linked_as_built`` and
        ``drawn_in_3d`` (the element has a complete box).
    frames : pandas.DataFrame
        ``frame`` (0, 1, ...) and ``date`` (the Monday of each week shown).
    unlinked : pandas.DataFrame
        The elements grey in at least one view: ``id, name, wbs, classification, level,
        zone, missing_from`` (``"both views"``, ``"as planned"`` or ``"as built"``).
    planned_source, actual_source : str
        In words, where each view's dates come from.
    title : str
        The figure's title, naming both sources.

    Examples
    --------
    One element planned for the first week and built, late, in the second; the states
    methods read only the dates and the ``linked_*`` columns:

    >>> import pandas as pd
    >>> days = pd.to_datetime
    >>> elements = pd.DataFrame({
    ...     "id": ["E1"],
    ...     "planned_start": days(["2025-03-04"]), "planned_finish": days(["2025-03-07"]),
    ...     "actual_start": days(["2025-03-12"]), "actual_finish": days(["2025-03-14"]),
    ...     "linked_as_planned": [True], "linked_as_built": [True],
    ... })
    >>> frames = pd.DataFrame({"frame": [0, 1, 2], "date": days(["2025-03-03", "2025-03-10", "2025-03-17"])})
    >>> timeline = ElementTimeline(elements, frames, elements.iloc[:0], "baseline", "as-built record", "E1")
    >>> timeline.states("as_planned").tolist(), timeline.states("as_built").tolist()
    ([[0, 2, 2]], [[0, 3, 2]])
    >>> timeline.runs(), timeline.start_frames()
    ([[(0, 1), (3, 1), (2, 1)]], array([2]))
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
            out[column] = to_days(pd.to_datetime(self.elements[column]))
        out["frames"] = to_days(pd.to_datetime(self.frames["date"]))
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
        date : datetime.date or str or numpy.datetime64 or pandas.Timestamp
            A date (ISO text accepted).
        view : {"as_built", "as_planned"}, default "as_built"
            The view.

        Returns
        -------
        numpy.ndarray
            ``int8`` codes, shape (elements,), as the module docstring defines them.

        Raises
        ------
        ValueError
            An unknown view.
        """
        day = int(to_days([pd.Timestamp(date).to_datetime64()])[0])
        return self._codes(view, np.int64(day))

    def states(self, view: str = "as_built") -> np.ndarray:
        """State codes of every element in every frame.

        Parameters
        ----------
        view : {"as_built", "as_planned"}, default "as_built"
            The view.

        Returns
        -------
        numpy.ndarray
            ``int8`` codes, shape (elements, frames): one byte per element and week.

        Raises
        ------
        ValueError
            An unknown view.
        """
        return self._codes(view, self._days["frames"][None, :])

    def _codes(self, view: str, day) -> np.ndarray:
        if view not in VIEWS:
            raise ValueError(f"unknown view '{view}': use one of {', '.join(VIEWS)}")
        d = self._days
        shape = (-1, 1) if np.ndim(day) == 2 else (-1,)
        return _state_codes(
            view,
            day,
            d["planned_start"].reshape(shape),
            d["planned_finish"].reshape(shape),
            d["linked_as_planned"].reshape(shape),
            d["actual_start"].reshape(shape),
            d["actual_finish"].reshape(shape),
            d["linked_as_built"].reshape(shape),
        )

    def start_frames(self, view: str = "as_built") -> np.ndarray:
        """Per element, the first frame at which its work has begun in ``view``'s own dates.

        "Late against plan" (code 3) covers work that has begun but not caught up with the
        plan and work that has not begun at all; this tells the two apart. The frame is the
        first whose Monday is on or after the element's start in that view (its planned
        start as planned, its actual start as built).

        Parameters
        ----------
        view : {"as_built", "as_planned"}, default "as_built"
            The view.

        Returns
        -------
        numpy.ndarray
            ``int64``, shape (elements,): the frame number; the number of frames for an element
            not linked in the view (its work never begins there).

        Raises
        ------
        ValueError
            An unknown view.

        Examples
        --------
        An element whose actual start is the Wednesday of the second week has begun by the
        third Monday, frame 2; its planned start, the Tuesday of the first week, gives frame 1:

        >>> import pandas as pd
        >>> days = pd.to_datetime
        >>> elements = pd.DataFrame({
        ...     "id": ["E1"],
        ...     "planned_start": days(["2025-03-04"]), "planned_finish": days(["2025-03-07"]),
        ...     "actual_start": days(["2025-03-12"]), "actual_finish": days(["2025-03-14"]),
        ...     "linked_as_planned": [True], "linked_as_built": [True],
        ... })
        >>> frames = pd.DataFrame({"frame": [0, 1, 2], "date": days(["2025-03-03", "2025-03-10", "2025-03-17"])})
        >>> timeline = ElementTimeline(elements, frames, elements.iloc[:0], "baseline", "as-built record", "E1")
        >>> timeline.start_frames("as_built").tolist(), timeline.start_frames("as_planned").tolist()
        ([2], [1])
        """
        if view not in VIEWS:
            raise ValueError(f"unknown view '{view}': use one of {', '.join(VIEWS)}")
        d = self._days
        start = d["planned_start"] if view == "as_planned" else d["actual_start"]
        linked = d["linked_as_planned"] if view == "as_planned" else d["linked_as_built"]
        first = np.searchsorted(d["frames"], start, side="left").astype(np.int64)
        return np.where(linked, first, d["frames"].size)

    def runs(self, view: str = "as_built") -> list[list[tuple[int, int]]]:
        """Per element, its states as runs ``(code, number of frames)`` from frame 0.

        The runs of an element add up to the number of frames; two neighbouring runs never
        have the same code. They are found from the few dates at which an element's state
        can change (its start and the day after its finish in both views), without building
        the whole elements x frames table.

        Parameters
        ----------
        view : {"as_built", "as_planned"}, default "as_built"
            The view.

        Returns
        -------
        list of list of (int, int)
            Per element, in element order, its runs.

        Raises
        ------
        ValueError
            An unknown view.
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
        breaks = np.stack(
            [np.zeros(len(self.elements), dtype=np.int64)]
            + [np.searchsorted(frames, t, side="left") for t in thresholds],
            axis=1,
        )
        breaks = np.sort(np.minimum(breaks, count), axis=1)
        following = np.concatenate([breaks[:, 1:], np.full((breaks.shape[0], 1), count)], axis=1)
        lengths = following - breaks
        at = frames[np.minimum(breaks, count - 1)]
        codes = self._codes(view, at)
        return codes, lengths


def _state_codes(
    view, day, planned_start, planned_finish, linked_planned, actual_start, actual_finish, linked_built
) -> np.ndarray:
    """The state codes of the module docstring, on whole arrays (broadcasting ``day``)."""
    planned = np.where(day < planned_start, NOT_STARTED, np.where(day <= planned_finish, IN_PROGRESS, COMPLETE))
    if view == "as_planned":
        return np.where(linked_planned, planned, UNLINKED).astype(np.int8)
    built = np.where(day < actual_start, NOT_STARTED, np.where(day <= actual_finish, IN_PROGRESS, COMPLETE))
    late = linked_planned & (built < planned)
    return np.where(linked_built, np.where(late, LATE, built), UNLINKED).astype(np.int8)


def _next_day(days: np.ndarray) -> np.ndarray:
    return np.where(days == NO_DAY, NO_DAY, days + 1)


def _monday_on_or_before(day: int) -> int:
    return day - (day + 3) % 7  # day 4 (1970-01-05) is a Monday


def element_states(
    case: Case,
    planned: ScheduleResult | pd.DataFrame | None = None,
    actual: ScheduleResult | pd.DataFrame | None = None,
    *,
    highlight: Iterable[str] | None = None,
    planned_source: str | None = None,
    actual_source: str | None = None,
) -> ElementTimeline:
    """Dates and weekly states of the case's model elements, as planned and as built.

    Parameters
    ----------
    case : delay.model.Case
        A loaded case with rows in elements.csv.
    planned : delay.cpm.ScheduleResult or pandas.DataFrame, optional
        The planned programme: a :class:`~delay.cpm.ScheduleResult`, or a DataFrame with
        ``id``, ``early_start``, ``early_finish`` (and optionally ``wbs``). Default: the
        baseline scheduled.
    actual : delay.cpm.ScheduleResult or pandas.DataFrame, optional
        The as-built programme, in the same forms. Default: the as-built record's actual
        dates; without one, the last update scheduled at its data date; with no update, the
        baseline.
    highlight : iterable of str, optional
        Ids of the activities delayed by an event; their elements are picked out. Default:
        every activity named in events.csv.
    planned_source, actual_source : str, optional
        Words for the title saying where the dates come from (defaults describe the
        defaults above, or name the snapshot of a ScheduleResult).

    Returns
    -------
    ElementTimeline
        The elements with their dates in both views, the weekly frames and the unlinked
        elements.

    Raises
    ------
    ValueError
        When the case has no elements, or a programme DataFrame lacks a column.
    delay.errors.CaseError
        When a snapshot cannot be scheduled.

    Examples
    --------
    >>> import pathlib, tempfile
    >>> from delay.case import load_case
    >>> from delay.synth import synthesise
    >>> with tempfile.TemporaryDirectory() as folder:
    ...     case = load_case(synthesise(pathlib.Path(folder) / "case", 20, updates=2, elements=12))
    >>> timeline = element_states(case)
    >>> timeline.states().shape == (12, len(timeline.frames))
    True
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
    frames = pd.DataFrame(
        {"frame": np.arange(frame_days.size), "date": frame_days.astype("datetime64[D]").astype("datetime64[us]")}
    )

    missing_planned = ~table["linked_as_planned"]
    missing_built = ~table["linked_as_built"]
    grey = missing_planned | missing_built
    unlinked = table.loc[grey, ["id", "name", "wbs", "classification", "level", "zone"]].copy()
    unlinked["missing_from"] = np.where(
        missing_planned[grey] & missing_built[grey],
        "both views",
        np.where(missing_planned[grey], "as planned", "as built"),
    )
    unlinked = unlinked.reset_index(drop=True)
    title = f"Element timeline: as planned ({planned_source}) against as built ({actual_source})"
    return ElementTimeline(
        elements=table.reset_index(drop=True),
        frames=frames,
        unlinked=unlinked,
        planned_source=planned_source,
        actual_source=actual_source,
        title=title,
    )


def _from_result(result: ScheduleResult) -> pd.DataFrame:
    frame = result.activities
    return pd.DataFrame({"id": frame["id"].astype(str), "start": frame["early_start"], "finish": frame["early_finish"]})


def _programme(source, what: str) -> pd.DataFrame:
    if isinstance(source, ScheduleResult):
        return _from_result(source)
    if isinstance(source, pd.DataFrame):
        missing = [c for c in ("id", "early_start", "early_finish") if c not in source.columns]
        if missing:
            raise ValueError(
                f"the {what} programme lacks the column(s) {', '.join(missing)}: "
                "give id, early_start and early_finish (and optionally wbs)"
            )
        frame = pd.DataFrame(
            {
                "id": source["id"].astype(str),
                "start": pd.to_datetime(source["early_start"]),
                "finish": pd.to_datetime(source["early_finish"]),
            }
        )
        if "wbs" in source.columns:
            frame["wbs"] = source["wbs"].fillna("").astype(str).to_numpy()
        return frame
    raise TypeError(f"the {what} programme must be a ScheduleResult or a DataFrame, not {type(source).__name__}")


def _describe(source) -> str:
    if isinstance(source, ScheduleResult):
        return f"{source.snapshot} early dates"
    return "dates given"


def _default_actual(case: Case) -> tuple[pd.DataFrame, str]:
    record = case.asbuilt_snapshot
    if record is not None:
        acts = record.activities
        return (
            pd.DataFrame(
                {"id": acts["id"].astype(str), "start": acts["actual_start"], "finish": acts["actual_finish"]}
            ),
            "the as-built record",
        )
    if case.updates:
        last = case.updates[-1]
        return (
            _from_result(schedule(case, last.folder)),
            f"{last.label} of {last.data_date.isoformat()}: actual dates where recorded, "
            "forecast early dates otherwise",
        )
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
    return pd.DataFrame(
        {"start": grouped["start"].min(), "finish": grouped["finish"].max(), "ids": grouped["id"].agg(list)}
    )


def _linked_ids(wbs: pd.Series, planned: pd.DataFrame, actual: pd.DataFrame) -> np.ndarray:
    by_wbs: dict[str, str] = {}
    for code in pd.unique(wbs):
        ids = list(planned["ids"].get(code, []))
        seen = set(ids)
        ids += [a for a in actual["ids"].get(code, []) if a not in seen]
        by_wbs[code] = ";".join(ids)
    return wbs.map(by_wbs).fillna("").to_numpy(dtype=object)


def _event_activities(case: Case) -> set[str]:
    """Every programme activity an event names, those its fragnet ties into included."""
    return set().union(*event_activities(case).values())


def _events_by_wbs(case: Case, wbs_of: dict[str, str]) -> dict[str, str]:
    found: dict[str, list[str]] = {}
    for event, activities in event_activities(case).items():
        for activity in sorted(activities):
            code = wbs_of.get(activity, "")
            if code and event not in found.setdefault(code, []):
                found[code].append(event)
    return {code: join_ids(ids) for code, ids in found.items()}


def _project_span(*programmes: pd.DataFrame) -> tuple[int, int]:
    starts, finishes = [], []
    for frame in programmes:
        for column, out in (("start", starts), ("finish", finishes)):
            days = to_days(pd.to_datetime(frame[column]))
            days = days[days != NO_DAY]
            if days.size:
                out.append(days)
    if not starts or not finishes:
        raise ValueError("neither programme has any dated activity")
    return int(min(d.min() for d in starts)), int(max(d.max() for d in finishes))
