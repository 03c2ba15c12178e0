"""The loaded case: typed settings and read-only tables.

:func:`delay.case.load_case` builds these objects; every other module reads them. Tables are
pandas DataFrames with the stable column names listed below (unknown input columns follow
them, unchanged). They are handed out as shallow copy-on-write copies, so whatever a caller
does to the frame it receives never reaches the loaded case.

Column types after loading
--------------------------
- identifiers and text: ``str``; a blank cell is ``""``
- dates: ``datetime64``; a blank cell is ``NaT``
- whole numbers that are always given (``duration``, ``lag``): ``int64``
- optional numbers (``remaining``, ``days``, boxes, rates): ``float64``; blank is ``NaN``
- yes/no: ``bool``
"""

from __future__ import annotations

import datetime as dt
from collections.abc import Mapping
from dataclasses import dataclass, field
from functools import cached_property
from pathlib import Path
from typing import Literal

import numpy as np
import pandas as pd

__all__ = [
    "ProjectSettings",
    "ScheduleSettings",
    "CommercialSettings",
    "AnalysisSettings",
    "ReportSettings",
    "InputSettings",
    "CaseSettings",
    "Snapshot",
    "Correction",
    "Case",
    "COLUMNS",
    "LINK_TYPES",
    "ACTIVITY_KINDS",
    "CONSTRAINTS",
    "PARTIES",
    "IMPACTS",
    "METHODS",
    "WEEKDAYS",
    "FIRST_DATE",
    "LAST_DATE",
    "LARGEST_DAYS",
]

LINK_TYPES = ("FS", "SS", "FF", "SF")
ACTIVITY_KINDS = ("task", "start_milestone", "finish_milestone")
CONSTRAINTS = ("earliest_start", "latest_finish", "fixed_start", "fixed_finish")
PARTIES = ("employer", "contractor", "neutral")
IMPACTS = ("extend", "hold", "fragnet")
#: The first and last date a case may hold and the toolkit computes: far wider than any
#: works, narrow enough that every date stays exact in every date type the toolkit uses.
FIRST_DATE = dt.date(1900, 1, 1)
LAST_DATE = dt.date(2200, 12, 31)
#: The largest duration, remaining duration, lag or number of days (work or calendar days
#: as the column is) a case may give: 36,500, about a hundred years of calendar days.
LARGEST_DAYS = 36_500

#: The delay-analysis methods a report may name as the analyst's preferred one.
METHODS = ("windows", "asbuilt", "impacted", "tia", "collapsed")
WEEKDAYS = ("Mon", "Tue", "Wed", "Thu", "Fri", "Sat", "Sun")

#: The stable columns of every table, in order. Unknown input columns follow these.
COLUMNS: dict[str, tuple[str, ...]] = {
    "calendars": ("calendar", "workdays"),
    "calendar_exceptions": ("calendar", "date", "working", "reason"),
    "activities": (
        "id",
        "name",
        "duration",
        "calendar",
        "wbs",
        "kind",
        "constraint",
        "constraint_date",
        "party",
        "risk",
        "actual_start",
        "actual_finish",
        "remaining",
    ),
    "links": ("pred", "succ", "type", "lag"),
    "asbuilt": ("id", "actual_start", "actual_finish", "source"),
    "corrections": ("snapshot", "table", "key", "column", "value", "reason"),
    "attributions": ("window", "activity", "event", "party", "reason"),
    "events": (
        "id",
        "title",
        "party",
        "start",
        "finish",
        "activities",
        "impact",
        "days",
        "evidence",
        "notified",
        "claimed_days",
        "tia_update",
        "asbuilt_activities",
    ),
    "fragnets": ("event", "id", "name", "duration", "calendar", "wbs"),
    "fragnet_links": ("event", "pred", "succ", "type", "lag"),
    "elements": (
        "id",
        "name",
        "wbs",
        "classification",
        "x",
        "y",
        "z",
        "dx",
        "dy",
        "dz",
        "level",
        "zone",
    ),
    "sections": (
        "section",
        "name",
        "completion_activity",
        "contract_completion",
        "liquidated_damages_per_day",
    ),
    "extensions_granted": ("id", "granted_on", "days", "section", "events", "reason"),
    "prolongation_rates": ("from", "to", "cost_per_day"),
}


@dataclass(frozen=True)
class ProjectSettings:
    """The ``[project]`` table of case.toml.

    Parameters
    ----------
    name : str
        The project's name.
    contract_start : datetime.date
        The date the works may start.
    contract_completion : datetime.date
        The contractual completion date of the whole works.
    completion_activity : str or None, optional
        The activity whose finish is the completion of the whole works, as given; ``None``
        when case.toml names none (the methods then take the finish milestone that
        finishes last in the baseline).
    """

    name: str
    contract_start: dt.date
    contract_completion: dt.date
    completion_activity: str | None = None


@dataclass(frozen=True)
class ScheduleSettings:
    """The ``[schedule]`` table of case.toml: everything the CPM engine needs to know.

    Override one field for a what-if with :func:`dataclasses.replace`.

    Parameters
    ----------
    default_calendar : str, default "5d"
        The calendar of an activity that names none.
    progress : {"retained_logic", "progress_override"}, default "retained_logic"
        How out-of-sequence progress is scheduled: the remaining work of an activity in
        progress still waits for its predecessors, or not.
    lag_calendar : {"successor", "predecessor"}, default "successor"
        Whose calendar counts a lag, in work days.
    float_to : {"project_finish", "contract_completion"}, default "project_finish"
        Where the backward pass starts: the early completion, or the contract completion
        date.

    Examples
    --------
    >>> import dataclasses
    >>> dataclasses.replace(ScheduleSettings(), progress="progress_override").progress
    'progress_override'
    """

    default_calendar: str = "5d"
    progress: Literal["retained_logic", "progress_override"] = "retained_logic"
    lag_calendar: Literal["successor", "predecessor"] = "successor"
    float_to: Literal["project_finish", "contract_completion"] = "project_finish"


@dataclass(frozen=True)
class CommercialSettings:
    """The ``[commercial]`` table of case.toml (all optional).

    Parameters
    ----------
    currency : str, default "EUR"
        ISO 4217 code of every amount.
    liquidated_damages_per_day : float, default 0.0
        Liquidated damages per calendar day of delay for the whole works (sections.csv may
        set a section's own).
    liquidated_damages_cap : float, default 0.0
        The most liquidated damages may come to; 0 for no cap.
    prolongation_cost_per_day : float, default 0.0
        Time-related cost per calendar day, a flat rate (prolongation_rates.csv overrides
        it by period).
    """

    currency: str = "EUR"
    liquidated_damages_per_day: float = 0.0
    liquidated_damages_cap: float = 0.0  # 0: no cap
    prolongation_cost_per_day: float = 0.0


@dataclass(frozen=True)
class AnalysisSettings:
    """The ``[analysis]`` table of case.toml (all optional).

    Parameters
    ----------
    half_step : bool, default True
        Whether the windows analysis splits each window into the effect of progress and
        the effect of revisions.
    concurrency : {"time_not_money", "apportion"}, default "time_not_money"
        How concurrent critical delay is treated: time without money, or shared out in
        proportion.
    unexplained_risk : {"employer", "contractor", "neutral"}, default "contractor"
        Who carries slippage that no event and no activity's ``risk`` explains.
    """

    half_step: bool = True
    concurrency: Literal["time_not_money", "apportion"] = "time_not_money"
    #: Who carries slippage that no event and no activity's ``risk`` explains.
    unexplained_risk: Literal["employer", "contractor", "neutral"] = "contractor"


@dataclass(frozen=True)
class ReportSettings:
    """The ``[report]`` table of case.toml (all optional).

    Parameters
    ----------
    preferred_method : {"windows", "asbuilt", "impacted", "tia", "collapsed"} or None, optional
        The method the analyst relies on (one of :data:`METHODS`), or ``None`` when
        case.toml names none.
    """

    preferred_method: Literal["windows", "asbuilt", "impacted", "tia", "collapsed"] | None = None


@dataclass(frozen=True)
class InputSettings:
    """The ``[input]`` table of case.toml (all optional): the dialect the case's CSV files are in.

    ``delimiter`` (``None``: detected from each file's header row) and ``encoding``
    (``None``: UTF-8; a byte-order mark always decides) say how files are read;
    ``date_format`` (a :func:`datetime.datetime.strptime` format) is applied to every date
    column and ``decimal`` (``"."`` or ``","``) to every number, ISO dates and a decimal
    point being understood too; ``columns`` maps, per table, a header of the user's files
    (matched ignoring case and surrounding spaces, as its key here) to the case format's
    column. What was read for each file is :attr:`Case.input_dialects`.

    Parameters
    ----------
    delimiter : str or None, optional
        The field delimiter; ``None`` to detect it from each file's header row.
    encoding : str or None, optional
        The text encoding; ``None`` for UTF-8 (a byte-order mark always decides).
    date_format : str, default "%Y-%m-%d"
        A :func:`datetime.datetime.strptime` format applied to every date column.
    decimal : str, default "."
        The decimal mark of every number, ``"."`` or ``","``.
    columns : Mapping of str to Mapping of str to str, optional
        Per table, a header of the user's files (lower case, spaces stripped) to the case
        format's column.
    """

    delimiter: str | None = None
    encoding: str | None = None
    date_format: str = "%Y-%m-%d"
    decimal: str = "."
    columns: Mapping[str, Mapping[str, str]] = field(default_factory=dict)


@dataclass(frozen=True)
class CaseSettings:
    """All of case.toml, defaults applied.

    Parameters
    ----------
    project : ProjectSettings
        ``[project]``.
    schedule : ScheduleSettings, optional
        ``[schedule]``.
    commercial : CommercialSettings, optional
        ``[commercial]``.
    analysis : AnalysisSettings, optional
        ``[analysis]``.
    report : ReportSettings, optional
        ``[report]``.
    input : InputSettings, optional
        ``[input]``.
    extra : Mapping of str to object, optional
        The keys of case.toml the toolkit does not know, kept as read.

    Examples
    --------
    >>> demo.settings.schedule  # doctest: +NORMALIZE_WHITESPACE
    ScheduleSettings(default_calendar='site5', progress='retained_logic', lag_calendar='successor',
                     float_to='project_finish')
    >>> demo.settings.commercial.liquidated_damages_per_day
    4500.0
    """

    project: ProjectSettings
    schedule: ScheduleSettings = field(default_factory=ScheduleSettings)
    commercial: CommercialSettings = field(default_factory=CommercialSettings)
    analysis: AnalysisSettings = field(default_factory=AnalysisSettings)
    report: ReportSettings = field(default_factory=ReportSettings)
    input: InputSettings = field(default_factory=InputSettings)
    extra: Mapping[str, object] = field(default_factory=dict)


def _read_only(frame: pd.DataFrame) -> pd.DataFrame:
    # pandas >= 3 copies on write: a shallow copy shares memory until either side writes.
    return frame.copy(deep=False)


@dataclass(frozen=True)
class Snapshot:
    """One programme: the baseline, a progress update, or the as-built record.

    ``folder`` is the folder name under ``snapshots/`` (``"asbuilt"`` for the as-built
    snapshot); ``label`` the label from snapshot.toml; ``kind`` is ``"baseline"``,
    ``"update"`` or ``"asbuilt"``. The as-built snapshot is the last update with the
    as-built record's actual dates laid over it, every activity complete, and a data date
    one day after the latest actual finish.

    Parameters
    ----------
    folder : str
        The folder name under ``snapshots/`` (``"asbuilt"`` for the as-built snapshot).
    label : str
        The label from snapshot.toml.
    data_date : datetime.date
        The data date.
    kind : {"baseline", "update", "asbuilt"}
        What the snapshot is.
    activities_table : pandas.DataFrame
        The activities (read them through :attr:`activities`, a copy-on-write copy).
    links_table : pandas.DataFrame
        The links (read them through :attr:`links`).
    derived : dict, optional
        Data derived from the tables once per snapshot (the codes the case loader found
        while checking them, the engine's compiled arrays), shared by every later use;
        never part of the snapshot's identity.

    Examples
    --------
    >>> snapshot = demo.snapshot("Update 01")
    >>> snapshot.folder, snapshot.kind, snapshot.data_date
    ('2025-03-31', 'update', datetime.date(2025, 3, 31))
    """

    folder: str
    label: str
    data_date: dt.date
    kind: Literal["baseline", "update", "asbuilt"]
    activities_table: pd.DataFrame = field(repr=False)
    links_table: pd.DataFrame = field(repr=False)
    #: Data derived from the tables once per snapshot (the codes the case loader found
    #: while checking them, the engine's compiled arrays), shared by every later use; never
    #: part of the snapshot's identity.
    derived: dict = field(default_factory=dict, repr=False, compare=False)

    @property
    def activities(self) -> pd.DataFrame:
        """Columns ``COLUMNS["activities"]`` then unknown ones; one row per activity."""
        return _read_only(self.activities_table)

    @property
    def links(self) -> pd.DataFrame:
        """Columns ``COLUMNS["links"]`` then unknown ones; one row per link."""
        return _read_only(self.links_table)

    @cached_property
    def link_numbers(self) -> tuple[np.ndarray, np.ndarray]:
        """Activity numbers (rows of ``activities``) of each link's predecessor and successor,
        ``-1`` for an unknown id; computed once per snapshot (the case loader hands over the
        numbers it found while checking the links) and shared by every use."""
        given = self.derived.get("link_numbers")
        if given is not None:
            pred, succ = (np.array(numbers, dtype=np.int64) for numbers in given)
        else:
            index = pd.Index(self.activities_table["id"])
            pred = index.get_indexer(self.links_table["pred"]).astype(np.int64)
            succ = index.get_indexer(self.links_table["succ"]).astype(np.int64)
        pred.flags.writeable = False
        succ.flags.writeable = False
        return pred, succ


@dataclass(frozen=True)
class Correction:
    """One disclosed correction by the analyst, applied on load.

    ``record`` describes the corrected thing in words (``"snapshot 'Update 03', activity
    A120, column remaining"``); ``original`` and ``corrected`` are the cell values as text
    (``""`` for blank); ``row`` is the row of corrections.csv that asked for it.

    Parameters
    ----------
    snapshot : str
        The snapshot corrected (its label or folder, as corrections.csv gives it).
    table : str
        ``"activities"`` or ``"links"``.
    key : str
        The activity id, or the link's ends.
    column : str
        The column corrected.
    original : str
        The value before, as text.
    corrected : str
        The value after, as text.
    reason : str
        The analyst's reason, disclosed in the report.
    row : int
        The row of corrections.csv (header = 1).

    Examples
    --------
    >>> print(demo.corrections[0].record)
    snapshot 'Update 13', activity MEP-03-SECOND-FIX, column remaining
    """

    snapshot: str
    table: str
    key: str
    column: str
    original: str
    corrected: str
    reason: str
    row: int

    @property
    def record(self) -> str:
        """The corrected thing in words: snapshot, activity or link, and column."""
        thing = "activity" if self.table == "activities" else "link"
        return f"snapshot '{self.snapshot}', {thing} {self.key}, column {self.column}"


_TABLE_DOCS = {
    "calendars": "work calendars",
    "calendar_exceptions": "holidays and extra working days",
    "asbuilt": "the as-built record (rows as given, corrections applied)",
    "attributions": "the analyst's disclosed attributions of a window's charge on an activity",
    "events": "the delay event register",
    "fragnets": "activities inserted by events",
    "fragnet_links": "links of the fragnet activities",
    "elements": "model elements",
    "sections": "sectional completion dates",
    "extensions_granted": "extensions of time already granted",
    "prolongation_rates": "time-related cost per day by period",
}

#: Tables of case-format version 2 that a hand-built Case may leave out (all text columns).
_VERSION_2_TABLES = ("attributions",)


class Case:
    """A validated case. Build it with :func:`delay.case.load_case`.

    Parameters
    ----------
    root : Path
        The case folder, or the workbook's path.
    settings : CaseSettings
        The settings of case.toml, defaults applied.
    tables : Mapping of str to pandas.DataFrame
        The case's tables other than the snapshots' by name (``events``, ``sections`` ...),
        each also an attribute of the case (``case.events``), handed out as a
        copy-on-write copy. A table may also be given as a function without arguments
        that builds it (the empty table of a file the case does not have, say): it is
        called once, when the table is first asked for.
    snapshots : tuple of Snapshot
        Baseline first, then updates by data date (the as-built snapshot is not among
        them; see ``asbuilt_snapshot``).
    asbuilt_snapshot : Snapshot or None
        The snapshot built from the as-built record, or ``None``.
    corrections : tuple of Correction
        The analyst's corrections, applied, in corrections.csv order.
    input_files : tuple of Path
        Every file read, for the report's manifest.
    opinion : str, default ""
        The analyst's opinion (opinion.md) as text, ``""`` when there is none.
    input_dialects : tuple, optional
        Per CSV file (or sheet) read, what was read: delimiter, encoding, date format,
        decimal mark and renamed headers (``delay.case._dialect.Dialect``).

    Raises
    ------
    ValueError
        When ``tables`` lacks a table the case format has (a fault of the caller).

    Notes
    -----
    Each optional table is present (empty, with its stable columns) even when its file
    is absent. A table added in case-format version 2 (``attributions``) may be left out
    of ``tables`` when a case is built by hand: it is then empty.

    Examples
    --------
    >>> demo  # doctest: +NORMALIZE_WHITESPACE
    Case('Tessaly Wharf, Brennholm: mixed-use building (fictitious demo case)', snapshots=17, events=11,
         elements=687)
    >>> demo.baseline.label, len(demo.updates), demo.asbuilt_snapshot.folder
    ('Baseline', 16, 'asbuilt')
    """

    def __init__(
        self,
        *,
        root: Path,
        settings: CaseSettings,
        tables: Mapping[str, pd.DataFrame],
        snapshots: tuple[Snapshot, ...],
        asbuilt_snapshot: Snapshot | None,
        corrections: tuple[Correction, ...],
        input_files: tuple[Path, ...],
        opinion: str = "",
        input_dialects: tuple = (),
    ):
        tables = dict(tables)
        for name in _VERSION_2_TABLES:
            if name not in tables:  # built only when missing
                tables[name] = pd.DataFrame({column: pd.Series([], dtype="str") for column in COLUMNS[name]})
        missing = set(_TABLE_DOCS) - set(tables)
        if missing:
            raise ValueError(f"tables missing: {sorted(missing)}")
        self.root = Path(root)
        self.settings = settings
        self.opinion = str(opinion)
        self.input_dialects = tuple(input_dialects)
        self._tables = tables
        self.snapshots = tuple(snapshots)
        self.asbuilt_snapshot = asbuilt_snapshot
        self.corrections = tuple(corrections)
        self.input_files = tuple(input_files)

    def table(self, name: str) -> pd.DataFrame:
        """Give one of the case's tables by name, as a copy-on-write copy.

        Parameters
        ----------
        name : str
            A key of ``COLUMNS`` other than ``activities`` and ``links``.

        Returns
        -------
        pandas.DataFrame
            The table; changing it does not change the case.

        Raises
        ------
        KeyError
            For another name.

        Examples
        --------
        >>> list(demo.table("sections").columns)[:3]
        ['section', 'name', 'completion_activity']
        """
        return _read_only(self._table(name))

    def _table(self, name: str) -> pd.DataFrame:
        """The table ``name`` itself, built first if it was given as a function."""
        table = self._tables[name]
        if callable(table):
            table = self._tables[name] = table()
        return table

    def snapshot(self, name: str = "baseline") -> Snapshot:
        """Find a snapshot by folder name, then by label; ``"asbuilt"`` gives the as-built one.

        Parameters
        ----------
        name : str, default "baseline"
            A folder name under snapshots/ or a label; ``"baseline"`` also finds a
            baseline whose folder and label are named otherwise.

        Returns
        -------
        Snapshot
            The snapshot.

        Raises
        ------
        KeyError
            With the known folder names, when there is none of that name.

        Examples
        --------
        >>> demo.snapshot("Update 01").folder, demo.snapshot("2025-03-31").label
        ('2025-03-31', 'Update 01')
        """
        candidates = list(self.snapshots)
        if self.asbuilt_snapshot is not None:
            candidates.append(self.asbuilt_snapshot)
        for attribute in ("folder", "label"):
            for snap in candidates:
                if getattr(snap, attribute) == name:
                    return snap
        if name == "baseline" and self.snapshots and self.snapshots[0].kind == "baseline":
            return self.snapshots[0]
        known = ", ".join(s.folder for s in candidates)
        raise KeyError(f"no snapshot '{name}' in the case (known: {known})")

    @property
    def baseline(self) -> Snapshot:
        """The first snapshot: the baseline."""
        return self.snapshots[0]

    @property
    def updates(self) -> tuple[Snapshot, ...]:
        """The snapshots after the baseline, by data date (the as-built one not among them)."""
        return self.snapshots[1:]

    def __repr__(self) -> str:
        return (
            f"Case({self.settings.project.name!r}, snapshots={len(self.snapshots)}, "
            f"events={len(self._table('events'))}, elements={len(self._table('elements'))})"
        )


for _name, _doc in _TABLE_DOCS.items():
    setattr(
        Case,
        _name,
        property(lambda self, _n=_name: _read_only(self._table(_n)), doc=f"{_doc.capitalize()}."),
    )
