"""Loading a case: read, correct, type, check, and build :class:`~delay.model.Case`.

The order of work is fixed: settings and calendars first (every activity needs them),
then the snapshots' facts (data dates and order), then the corrections (applied to the
tables as read), then each snapshot's activities and links, then the as-built record and
the registers that refer to activities. Every check records its problems and the loading
goes on, so that one run lists all problems of all files; one :class:`CaseError` is raised
at the end if there were any.
"""

from __future__ import annotations

import copy
import datetime as dt
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from delay.case import _columns as columns
from delay.case._corrections import ASBUILT, CorrectionTarget, apply_corrections
from delay.case._problems import Problems, RawTable
from delay.case._settings import parse_date_value, parse_settings
from delay.case._source import CaseSource, SnapshotSource, open_source
from delay.graph import find_loop
from delay.model import (
    ACTIVITY_KINDS,
    COLUMNS,
    CONSTRAINTS,
    FIRST_DATE,
    IMPACTS,
    LAST_DATE,
    LINK_TYPES,
    PARTIES,
    WEEKDAYS,
    Case,
    CaseSettings,
    Correction,
    Snapshot,
)
from delay.network import sorted_network

__all__ = ["load", "Loaded"]

_MILESTONE_KINDS = ("start_milestone", "finish_milestone")
#: Their positions in ACTIVITY_KINDS (the kind codes of a milestone).
_MILESTONE_CODES = np.array([ACTIVITY_KINDS.index(kind) for kind in _MILESTONE_KINDS])
_SNAPSHOT_KINDS = ("baseline", "update")


@dataclass
class Loaded:
    """The result of :func:`load`: the case, and (on request) the tables as read.

    Parameters
    ----------
    case : Case
        The loaded, corrected and checked case.
    source : CaseSource
        What was read from the case's files, before typing.
    uncorrected : dict of str to object, optional
        With ``keep_uncorrected``, copies of the tables as read, before corrections:
        ``"tables"`` (the case-wide tables by name) and ``"snapshots"`` (a list of
        (folder, activities, links)); empty otherwise.
    """

    case: Case
    source: CaseSource
    uncorrected: dict[str, object] = field(default_factory=dict)


@dataclass
class _SnapshotFacts:
    source: SnapshotSource
    folder: str
    label: str
    data_date: dt.date | None
    kind: str | None
    activities: pd.DataFrame | None = None
    links: pd.DataFrame | None = None
    #: Codes found while checking the tables, handed to the Snapshot (``Snapshot.derived``)
    #: so that the engine need not look the same text up again.
    derived: dict = field(default_factory=dict)
    #: The activity ids as an index (first occurrences), its hash table built once for the
    #: links' look-ups and the registers' (``None`` until the activities are checked).
    id_index: pd.Index | None = None


def load(path: Path, *, keep_uncorrected: bool = False) -> Loaded:
    """Load and check the case at ``path``; see :func:`delay.case.load_case`.

    Parameters
    ----------
    path : pathlib.Path
        A case folder, a ``.xlsx`` workbook, or a folder holding only ``case.xlsx``.
    keep_uncorrected : bool, optional
        Keep a copy of every table as read, before corrections, for writing the case in
        another form (:func:`delay.case.write_workbook`).

    Returns
    -------
    Loaded
        The case, what was read, and (with ``keep_uncorrected``) the uncorrected tables.

    Raises
    ------
    CaseError
        When anything in the case is missing or wrong; it lists every problem found, at
        most :data:`delay.errors.MAX_PROBLEMS_PER_FILE` per file.
    """
    problems = Problems()
    source = open_source(Path(path), problems)
    if source is None:
        problems.raise_if_any()
    loader = _Loader(source, problems)
    uncorrected = {}
    if keep_uncorrected:
        uncorrected = {
            "tables": copy.deepcopy(source.tables),
            "snapshots": [(s.folder, copy.deepcopy(s.activities), copy.deepcopy(s.links)) for s in source.snapshots],
        }
    case = loader.run()
    problems.raise_if_any()
    assert case is not None
    return Loaded(case=case, source=source, uncorrected=uncorrected)


class _Loader:
    def __init__(self, source: CaseSource, problems: Problems):
        self.source = source
        self.problems = problems
        self.settings: CaseSettings | None = None
        self.default_calendar = "5d"
        self.calendar_names: list[str] | None = None
        self.tables: dict[str, pd.DataFrame | _EmptyTable] = {}
        self.snapshots: list[_SnapshotFacts] = []
        self.corrections: list[Correction] = []
        self.all_activity_ids: pd.Index | None = None
        self.asbuilt_snapshot: Snapshot | None = None
        self.event_ids: list[str] | None = None
        self.event_impacts: dict[str, str] = {}
        self.fragnet_ids: dict[str, set[str]] = {}
        self.section_ids: list[str] | None = None

    # ------------------------------------------------------------------ driver

    def run(self) -> Case | None:
        self.read_settings()
        self.check_calendars()
        self.check_calendar_exceptions()
        self.read_snapshot_facts()
        self.apply_corrections()
        for facts in self.snapshots:
            self.check_snapshot(facts)
        self.collect_activity_ids()
        self.check_completion_activity()
        self.build_asbuilt()
        self.check_events()
        self.check_attributions()
        self.check_fragnets()
        self.check_fragnet_links()
        self.check_elements()
        self.check_sections()
        self.check_extensions()
        self.check_prolongation_rates()
        if self.problems or self.settings is None:
            return None
        snapshots = tuple(
            Snapshot(
                folder=f.folder,
                label=f.label,
                data_date=f.data_date,
                kind=f.kind,
                activities_table=f.activities,
                links_table=f.links,
                derived=dict(f.derived),
            )
            for f in self.snapshots
        )
        return Case(
            root=self.source.root,
            settings=self.settings,
            tables=self.tables,
            snapshots=snapshots,
            asbuilt_snapshot=self.asbuilt_snapshot,
            corrections=tuple(self.corrections),
            input_files=tuple(self.source.input_files),
            opinion=self.source.opinion,
            input_dialects=tuple(self.source.dialects),
        )

    def usable(self, name: str) -> RawTable | None:
        table = self.source.tables.get(name)
        return table if columns.require_columns(self.problems, table) else None

    def absent(self, name: str) -> bool:
        """Whether the case does not have the optional file ``name`` (its stand-in is empty)."""
        table = self.source.tables.get(name)
        return table is not None and not table.present and not len(table)

    def optional(self, name: str) -> RawTable | None:
        """:meth:`usable` for an optional file; ``None`` too when the case does not have it:
        its checks would find nothing, and the caller records its empty table at once."""
        return None if self.absent(name) else self.usable(name)

    # ------------------------------------------------------------------ settings

    def read_settings(self) -> None:
        settings_source = self.source.settings
        if settings_source is None:
            return
        self.settings = parse_settings(settings_source, self.problems, self.source.input)
        if self.settings is not None:
            self.default_calendar = self.settings.schedule.default_calendar
        else:
            given = settings_source.values.get("schedule", {})
            if isinstance(given, dict) and isinstance(given.get("default_calendar"), str):
                self.default_calendar = given["default_calendar"]

    # ------------------------------------------------------------------ calendars

    def check_calendars(self) -> None:
        table = self.usable("calendars")
        if table is None:
            return
        p = self.problems
        names = table.frame["calendar"]
        columns.required_cells(
            p, table, "calendar", "the calendar has no name", "give every calendar a unique name, e.g. 5d"
        )
        columns.duplicates(
            p,
            table,
            ["calendar"],
            "calendar",
            lambda i: f"the calendar '{names.iat[i]}'",
            "give every calendar a different name",
            skip=(names == "").to_numpy(),
        )
        tokens = table.frame["workdays"].str.replace(",", " ").str.split()
        lookup = {day.lower(): day for day in WEEKDAYS}
        canonical = []
        bad = np.zeros(len(table), dtype=bool)
        empty = np.zeros(len(table), dtype=bool)
        # One entry per calendar: a short loop over a small table.
        for position, days in enumerate(tokens):
            days = days or []
            known = [lookup.get(d.lower()) for d in days]
            bad[position] = any(k is None for k in known)
            empty[position] = not days
            chosen = set(k for k in known if k)
            canonical.append(" ".join(d for d in WEEKDAYS if d in chosen))
        p.flag(
            table,
            bad,
            "workdays",
            lambda i: f"'{table.frame['workdays'].iat[i]}' holds a word that is not a weekday",
            "list the working weekdays separated by spaces, from: " + " ".join(WEEKDAYS),
        )
        p.flag(
            table,
            empty,
            "workdays",
            "the calendar has no working weekdays",
            "list its working weekdays, e.g. Mon Tue Wed Thu Fri",
        )
        workdays = pd.Series(canonical, index=table.frame.index, dtype="str")
        self.tables["calendars"] = columns.assemble(table, {"workdays": workdays})
        self.calendar_names = [n for n in names.tolist() if n]
        if self.source.settings is not None and self.default_calendar not in self.calendar_names:
            row, column = self.source.settings.locate("schedule.default_calendar")
            p.add(
                self.source.settings.file,
                f"the default calendar '{self.default_calendar}' is not in calendars.csv",
                "add it to calendars.csv or set schedule.default_calendar to one of: " + ", ".join(self.calendar_names),
                row=row,
                column=column,
            )

    def calendar_check(self, table: RawTable, column: str = "calendar", derived: dict | None = None) -> pd.Series:
        """The calendar column with blanks set to the default, unknown names flagged.

        With ``derived``, its ``"calendar_codes"`` is set to the calendar names and each
        row's position among them (when the default calendar is one of them).
        """
        text = table.frame[column]
        if self.calendar_names is not None:
            known = ", ".join(self.calendar_names) or "(none defined)"
            names = pd.Index(list(dict.fromkeys(self.calendar_names)))
            _, codes = columns.coded_references(
                self.problems,
                table,
                column,
                names,
                "the calendar '{value}' is not in calendars.csv",
                f"add it to calendars.csv or use one of: {known}",
                few=True,
            )
            if derived is not None and self.default_calendar in names:
                codes[table.blank(column)] = names.get_loc(self.default_calendar)
                derived["calendar_codes"] = (tuple(names), codes)
        filled = np.where(table.blank(column), self.default_calendar, text.to_numpy(dtype=object))
        return pd.Series(filled, index=text.index, name=text.name, dtype="str")

    def check_calendar_exceptions(self) -> None:
        table = self.optional("calendar_exceptions")
        if table is None:
            self.tables["calendar_exceptions"] = _empty("calendar_exceptions")
            return
        p = self.problems
        columns.required_cells(
            p, table, "calendar", "the exception names no calendar", "give the calendar it applies to"
        )
        calendar = self.calendar_check(table)
        date = columns.dates(p, table, "date", required="the exception has no date")
        answer = table.frame["working"].str.lower()
        yes = answer.isin(["yes", "true", "y", "1"]).to_numpy()
        no = answer.isin(["no", "false", "n", "0"]).to_numpy()
        p.flag(
            table,
            ~yes & ~no,
            "working",
            lambda i: (
                f"'{table.frame['working'].iat[i]}' is not yes or no"
                if table.frame["working"].iat[i]
                else "working is blank"
            ),
            "write yes for an extra working day, no for a holiday",
        )
        columns.duplicates(
            p,
            table,
            ["calendar", "date"],
            "date",
            lambda i: f"an exception for calendar '{table.frame['calendar'].iat[i]}' on {table.frame['date'].iat[i]}",
            "keep one row per calendar and date",
            skip=(table.frame["date"] == "").to_numpy(),
        )
        self.tables["calendar_exceptions"] = columns.assemble(
            table, {"calendar": calendar, "date": date, "working": pd.Series(yes, index=table.frame.index, dtype=bool)}
        )

    # ------------------------------------------------------------------ snapshots

    def read_snapshot_facts(self) -> None:
        """Every snapshot's facts, checked, in order (:attr:`snapshots`); a folder name used
        twice is reported and its second snapshot left out."""
        p = self.problems
        facts_list: list[_SnapshotFacts] = []
        seen_folders: dict[str, SnapshotSource] = {}
        for snap in self.source.snapshots:
            if snap.folder in seen_folders:
                row, _ = snap.locate("folder")
                p.add(
                    snap.file,
                    f"the snapshot folder name '{snap.folder}' is used twice",
                    "give every snapshot its own folder name",
                    row=row,
                    column="folder",
                )
                continue
            seen_folders[snap.folder] = snap
            facts = snap.facts
            if facts is None:
                facts_list.append(_SnapshotFacts(snap, snap.folder, snap.folder, None, None))
                continue
            facts_list.append(self._snapshot_facts(snap, facts))
        self.snapshots = self._ordered_snapshots(facts_list)

    def _snapshot_facts(self, snap: SnapshotSource, facts: dict) -> _SnapshotFacts:
        """One snapshot's label, data date and kind from its snapshot.toml (or workbook
        row), each checked; a fact that cannot be used is reported and left out."""
        p = self.problems

        def report(key: str, message: str, fix: str) -> None:
            row, column = snap.locate(key)
            p.add(snap.file, message, fix, row=row, column=column)

        label = facts.get("label", snap.folder)
        if not isinstance(label, str) or not label.strip():
            report("label", "the label must be text", 'write label = "Update 03"')
            label = snap.folder
        label = label.strip()
        data_date = None
        if "data_date" not in facts:
            report(
                "data_date",
                "the snapshot has no data date",
                "add data_date = YYYY-MM-DD: the first day not yet reported (for the baseline, the planned start)",
            )
        else:
            data_date = parse_date_value(facts["data_date"])
            if data_date is None:
                report(
                    "data_date",
                    f"the data date {facts['data_date']!r} is not a date",
                    "write it as data_date = YYYY-MM-DD",
                )
            elif not FIRST_DATE <= data_date <= LAST_DATE:
                report(
                    "data_date",
                    f"the data date {data_date} is outside {FIRST_DATE} to "
                    f"{LAST_DATE}, the dates the toolkit works with",
                    "check the year of the data date",
                )
                data_date = None
        kind = facts.get("kind", "baseline" if snap.folder.lower() == "baseline" else "update")
        if kind not in _SNAPSHOT_KINDS:
            report(
                "kind",
                f"the kind {kind!r} is not baseline or update",
                'write kind = "baseline" for the baseline, kind = "update" otherwise',
            )
            kind = None
        self.check_reserved_names(snap, label, kind, report)
        return _SnapshotFacts(snap, snap.folder, label, data_date, kind)

    def _ordered_snapshots(self, facts_list: list[_SnapshotFacts]) -> list[_SnapshotFacts]:
        """The snapshots in order, the baseline first, then by data date (undated last);
        one baseline, distinct data dates after the baseline's, distinct labels."""
        p = self.problems
        baselines = [f for f in facts_list if f.kind == "baseline"]
        if not baselines and self.source.snapshots_found and all(f.kind is not None for f in facts_list):
            if self.source.workbook:
                p.add(
                    f"{self.source.root.name}:snapshots",
                    "the case has no baseline snapshot",
                    "add a row for the baseline with kind baseline",
                )
            else:
                p.add(
                    "snapshots",
                    "the case has no baseline snapshot",
                    'add snapshots/baseline/ with a snapshot.toml saying kind = "baseline"',
                )
        for extra in baselines[1:]:
            row, column = extra.source.locate("kind")
            p.add(
                extra.source.file,
                f"a second baseline (the first is '{baselines[0].folder}')",
                'keep one baseline; write kind = "update" for a progress update',
                row=row,
                column=column,
            )
        baseline = baselines[0] if baselines else None
        updates = [f for f in facts_list if f is not baseline]
        dated = [f for f in updates if f.data_date is not None]
        dated.sort(key=lambda f: (f.data_date, f.folder))
        undated = [f for f in updates if f.data_date is None]
        by_date: dict[dt.date, _SnapshotFacts] = {}
        if baseline is not None and baseline.data_date is not None:
            by_date[baseline.data_date] = baseline
        for facts in dated:
            row, column = facts.source.locate("data_date")
            other = by_date.get(facts.data_date)
            if other is not None:
                p.add(
                    facts.source.file,
                    f"the data date {facts.data_date} is also the data date of '{other.folder}'",
                    "each snapshot needs its own data date",
                    row=row,
                    column=column,
                )
                continue
            by_date[facts.data_date] = facts
            if (
                baseline is not None
                and baseline.data_date is not None
                and facts.data_date < baseline.data_date
                and facts.kind is not None
            ):
                p.add(
                    facts.source.file,
                    f"the data date {facts.data_date} is before the baseline's "
                    f"({baseline.data_date}); updates must follow the baseline",
                    "check the data date of this update and of the baseline",
                    row=row,
                    column=column,
                )
        labels: dict[str, _SnapshotFacts] = {}
        ordered = ([baseline] if baseline else []) + dated + undated
        for facts in ordered:
            if facts.label in labels and facts.source.facts is not None:
                row, column = facts.source.locate("label")
                p.add(
                    facts.source.file,
                    f"the label '{facts.label}' is also the label of '{labels[facts.label].folder}'",
                    "give every snapshot its own label",
                    row=row,
                    column=column,
                )
            labels.setdefault(facts.label, facts)
        return ordered

    def check_reserved_names(self, snap: SnapshotSource, label: str, kind: str | None, report) -> None:
        """A snapshot may not take a name the case format keeps for something else:
        ``asbuilt`` (the as-built record, labelled As-built) for any snapshot, and
        ``baseline`` for a snapshot that is not the baseline. One problem per snapshot."""
        workbook = self.source.workbook
        names = [("folder name", snap.folder)] + ([("label", label)] if label != snap.folder else [])
        for what, name in names:
            plain = name.strip().lower().replace("-", "").replace("_", "").replace(" ", "")
            if plain == ASBUILT:
                message = f"the {what} '{name}' is kept for the as-built record, which comes from asbuilt.csv"
                fix = f"give this snapshot another {what}, and put the as-built dates in asbuilt.csv"
            elif plain == "baseline" and kind == "update":
                message = f"the {what} '{name}' is kept for the baseline, but this is an update"
                fix = f'give the update another {what}, or make it the baseline with kind = "baseline"'
            else:
                continue
            if what == "folder name" and not workbook:
                self.problems.add(f"snapshots/{snap.folder}", message, fix)
            else:  # the workbook's folder column, or its label when it has none
                given = what == "folder name" and snap.facts.get("label") != snap.folder
                report("folder" if given else "label", message, fix)
            return

    # ------------------------------------------------------------------ corrections

    def apply_corrections(self) -> None:
        table = self.optional("corrections")
        if table is None:
            self.tables["corrections"] = _empty("corrections")
            return

        def readable(raw: RawTable | None) -> RawTable | None:
            # A table without its key columns cannot be corrected; check_snapshot says why.
            if raw is None or not all(c in raw.frame for c in columns.REQUIRED_COLUMNS[raw.name]):
                return None
            return raw

        targets: dict[str, CorrectionTarget] = {}
        for facts in self.snapshots:
            targets.setdefault(
                facts.folder,
                CorrectionTarget(facts.label, readable(facts.source.activities), readable(facts.source.links)),
            )
        for facts in self.snapshots:
            targets.setdefault(facts.label, targets[facts.folder])
        asbuilt = self.source.tables.get("asbuilt")
        if asbuilt is not None and asbuilt.present:
            targets[ASBUILT] = CorrectionTarget(ASBUILT, readable(asbuilt), None, asbuilt=True)
        elif asbuilt is None:  # present but unreadable: its problem is already listed
            targets[ASBUILT] = CorrectionTarget(ASBUILT, None, None, asbuilt=True)
        self.corrections = apply_corrections(table, targets, self.problems)
        self.tables["corrections"] = columns.assemble(table, {})

    # ------------------------------------------------------------------ activities, links

    def check_snapshot(self, facts: _SnapshotFacts) -> None:
        activities = facts.source.activities
        if columns.require_columns(self.problems, activities):
            # The ids' hash table is built once: it tells whether an id repeats, and the
            # links and the registers look their ids up in it.
            nodes = pd.Index(activities.frame["id"])
            facts.activities = self.check_activities(activities, facts.data_date, facts.derived, nodes)
            facts.id_index = nodes if nodes.is_unique else pd.Index(facts.activities["id"].drop_duplicates())
        links = facts.source.links
        if columns.require_columns(self.problems, links):
            ids = facts.activities["id"] if facts.activities is not None else None
            facts.links = self.check_links(links, ids, facts.derived, facts.id_index)

    def check_activities(
        self, table: RawTable, data_date: dt.date | None, derived: dict | None = None, nodes: pd.Index | None = None
    ) -> pd.DataFrame:
        """Type and check one snapshot's activities; codes found go into ``derived``
        (``calendar_codes``, ``kind_codes`` by ACTIVITY_KINDS, ``constraint_codes`` by
        CONSTRAINTS, ``-1`` for none). ``nodes``, the ids as an index, spares the search
        for repeated ids when they are unique."""
        p = self.problems
        frame = table.frame
        ids = frame["id"]
        if not len(table):
            p.add(table.file, "the snapshot has no activities", "add at least one activity (a start milestone will do)")
        no_id = columns.required_cells(
            p, table, "id", "the activity has no id", "give every activity an id, unique in the snapshot"
        )
        if nodes is None or not nodes.is_unique:
            columns.duplicates(
                p,
                table,
                ["id"],
                "id",
                lambda i: f"the activity id '{ids.iat[i]}'",
                "give every activity of the snapshot a different id",
                skip=no_id,
            )
        duration = columns.integers(
            p, table, "duration", unit="work days", minimum=0, required="the duration is missing"
        )
        calendar = self.calendar_check(table, derived=derived)
        kind, kind_codes = columns.coded_choices(p, table, "kind", ACTIVITY_KINDS, default="task", what="activity kind")
        milestone_kind = np.isin(kind_codes, _MILESTONE_CODES)  # the codes say it: no text compared
        p.flag(
            table,
            milestone_kind & (duration.to_numpy() > 0),
            "duration",
            lambda i: f"a {kind.iat[i].replace('_', ' ')} cannot have a duration ({duration.iat[i]} work days)",
            "give the milestone duration 0, or make it a task",
        )
        constraint, constraint_codes = columns.coded_choices(p, table, "constraint", CONSTRAINTS, what="constraint")
        if derived is not None:
            derived["kind_codes"] = kind_codes
            derived["constraint_codes"] = constraint_codes
        constraint_date = columns.dates(p, table, "constraint_date")
        risk = columns.choices(p, table, "risk", PARTIES, what="risk owner")
        has_constraint = ~table.blank("constraint")
        has_date = ~table.blank("constraint_date")
        p.flag(
            table,
            has_constraint & ~has_date,
            "constraint_date",
            lambda i: f"the constraint {constraint.iat[i]} has no date",
            "give the constraint's date as YYYY-MM-DD",
        )
        p.flag(
            table,
            has_date & ~has_constraint,
            "constraint",
            "a constraint date is given without a constraint",
            "name the constraint (" + ", ".join(CONSTRAINTS) + ") or clear the date",
        )
        start = columns.dates(p, table, "actual_start")
        finish = columns.dates(p, table, "actual_finish")
        remaining = columns.numbers(
            p, table, "remaining", unit="work days", whole=True, minimum=0, maximum=columns.LARGEST_WHOLE_NUMBER
        )
        start, finish, remaining = self.check_progress(
            table, duration, milestone_kind, start, finish, remaining, data_date
        )
        return columns.assemble(
            table,
            {
                "duration": duration,
                "calendar": calendar,
                "kind": kind,
                "constraint": constraint,
                "constraint_date": constraint_date,
                "risk": risk,
                "actual_start": start,
                "actual_finish": finish,
                "remaining": remaining,
            },
        )

    def check_progress(
        self,
        table: RawTable,
        duration: pd.Series,
        milestone_kind: np.ndarray,
        start: pd.Series,
        finish: pd.Series,
        remaining: pd.Series,
        data_date: dt.date | None,
    ):
        """The progress rules of the case format (see its activities.csv section).

        A milestone (a milestone kind, or a task of duration 0) has one date: when only
        one of its actual dates is given, the other takes the same date.
        """
        p = self.problems
        milestone = milestone_kind | (duration.to_numpy() == 0)
        has_start = start.notna().to_numpy()
        has_finish = finish.notna().to_numpy()
        p.flag(
            table,
            has_finish & ~has_start & ~milestone,
            "actual_start",
            "the activity has an actual finish but no actual start",
            "give the actual start, or clear the actual finish",
        )
        both = has_start & has_finish
        p.flag(
            table,
            milestone & both & (start != finish).to_numpy(),
            "actual_finish",
            lambda i: (
                f"a milestone has one date, but its actual start is "
                f"{start.iat[i]:%Y-%m-%d} and its actual finish {finish.iat[i]:%Y-%m-%d}"
            ),
            "give the milestone the same actual start and finish",
        )
        start = start.where(~(milestone & ~has_start), finish)
        finish = finish.where(~(milestone & ~has_finish), start)
        has_start = start.notna().to_numpy()
        has_finish = finish.notna().to_numpy()
        p.flag(
            table,
            has_start & has_finish & (finish < start).to_numpy(),
            "actual_finish",
            lambda i: f"the actual finish {finish.iat[i]:%Y-%m-%d} is before the actual start {start.iat[i]:%Y-%m-%d}",
            "check both actual dates",
        )
        if data_date is not None:
            limit = pd.Timestamp(data_date)
            p.flag(
                table,
                (start >= limit).to_numpy(),
                "actual_start",
                lambda i: f"the actual start {start.iat[i]:%Y-%m-%d} is on or after the data date {data_date}",
                "actual dates must lie before the data date: check the date or the snapshot's data_date",
            )
            p.flag(
                table,
                (finish >= limit).to_numpy() & ~(start >= limit).to_numpy(),
                "actual_finish",
                lambda i: f"the actual finish {finish.iat[i]:%Y-%m-%d} is on or after the data date {data_date}",
                "actual dates must lie before the data date: check the date or the snapshot's data_date",
            )
        given = remaining.notna().to_numpy()
        values = remaining.to_numpy()
        complete = has_finish
        in_progress = has_start & ~has_finish
        p.flag(
            table,
            complete & given & (values > 0),
            "remaining",
            lambda i: f"the activity is finished but has {remaining.iat[i]:g} work days remaining",
            "give remaining 0 (or blank) for a finished activity, or clear its actual finish",
        )
        p.flag(
            table,
            in_progress & ~given,
            "remaining",
            "the activity is in progress but has no remaining duration",
            "give the remaining work days at the data date (more than 0)",
        )
        p.flag(
            table,
            in_progress & given & (values <= 0),
            "remaining",
            "the activity is in progress but has remaining 0",
            "give the remaining work days (more than 0), or give its actual finish",
        )
        remaining = remaining.where(~complete, 0.0)
        return start, finish, remaining

    def check_links(
        self, table: RawTable, ids: pd.Series | None, derived: dict | None = None, nodes: pd.Index | None = None
    ) -> pd.DataFrame:
        """Type and check one snapshot's links; codes found go into ``derived``
        (``type_codes`` by LINK_TYPES and, when every link is sound, ``link_numbers``: the
        activity rows of each link's ends, and, when there is no loop, ``network``: the
        compiled :class:`delay.network.Network` the loop check sorted)."""
        p = self.problems
        frame = table.frame
        pred, succ = frame["pred"], frame["succ"]
        no_pred = columns.required_cells(
            p, table, "pred", "the link has no predecessor", "give the predecessor's activity id"
        )
        no_succ = columns.required_cells(
            p, table, "succ", "the link has no successor", "give the successor's activity id"
        )
        bad = no_pred | no_succ
        if ids is not None:
            fix = "add the activity to this snapshot's activities or correct the id"
            if nodes is None:
                nodes = pd.Index(ids.drop_duplicates())
            unknown, pred_at = columns.coded_references(
                p, table, "pred", nodes, "the predecessor '{value}' is not an activity of this snapshot", fix
            )
            bad |= unknown
            unknown, succ_at = columns.coded_references(
                p, table, "succ", nodes, "the successor '{value}' is not an activity of this snapshot", fix
            )
            bad |= unknown
        # Known ends are the same activity exactly where their numbers are equal.
        same = (pred_at == succ_at) if ids is not None else (pred.to_numpy() == succ.to_numpy())
        itself = ~bad & same
        p.flag(
            table,
            itself,
            "succ",
            "the link runs from an activity to itself",
            "remove the link or correct one of its ids",
        )
        bad |= itself
        kind, type_codes = columns.coded_choices(
            p, table, "type", LINK_TYPES, default="FS", upper=True, what="link type"
        )
        lag = columns.integers(p, table, "lag", unit="work days (negative for a lead)", default=0)
        ends = None  # the pair of activity numbers, where every link's ends are known
        if ids is not None and not ((pred_at < 0) | (succ_at < 0))[~(no_pred | no_succ)].any():
            ends = pred_at.astype(np.int64) * max(len(nodes), 1) + succ_at
        columns.duplicates(
            p,
            table,
            ["pred", "succ"],
            "pred",
            lambda i: f"the link {pred.iat[i]}>{succ.iat[i]}",
            "keep one link from a predecessor to a successor",
            skip=no_pred | no_succ,
            codes=ends,
        )
        sound = ids is not None and not bad.any() and len(nodes) == len(ids) and bool((type_codes >= 0).all())
        network = None
        if sound:
            # The loop check is the engine's topological sort; the network it compiles is
            # kept for the engine, as the link numbers are.
            pred_at, succ_at = pred_at.astype(np.int64), succ_at.astype(np.int64)
            network = sorted_network(
                ids.to_numpy(dtype=object), pred_at, succ_at, type_codes, lag.to_numpy(dtype=np.int64)
            )
        if ids is not None and not bad.all() and network is None:
            self.check_loop(table, nodes, pred_at[~bad], succ_at[~bad], ~bad)
        if derived is not None:
            derived["type_codes"] = type_codes
            if sound:
                derived["link_numbers"] = (pred_at, succ_at)
            if network is not None:
                derived["network"] = network
        return columns.assemble(table, {"type": kind, "lag": lag})

    def check_loop(
        self, table: RawTable, nodes: pd.Index, pred: np.ndarray, succ: np.ndarray, valid: np.ndarray
    ) -> None:
        """Flag a logic loop among the sound links (``pred``, ``succ``: their ends' positions
        in ``nodes``; ``valid``: which rows of the table they are)."""
        loop = find_loop(len(nodes), pred, succ)
        if loop is None:
            return
        names = [str(nodes[i]) for i in loop]
        positions = np.flatnonzero(valid)
        first = positions[np.flatnonzero((pred == loop[0]) & (succ == loop[1 % len(loop)]))[0]]
        mask = np.zeros(len(table), dtype=bool)
        mask[first] = True
        text = " -> ".join(names + [names[0]])
        self.problems.flag(table, mask, "pred", f"logic loop: {text}", "remove or reverse one of the links of the loop")

    def collect_activity_ids(self) -> None:
        frames = [f.activities["id"] for f in self.snapshots if f.activities is not None]
        indexes = [f.id_index for f in self.snapshots if f.id_index is not None]
        if len(frames) == 1 and len(indexes) == 1:  # one programme: its index, hash table and all
            self.all_activity_ids = indexes[0]
        elif frames:
            self.all_activity_ids = pd.Index(pd.concat(frames, ignore_index=True).unique())
        elif not self.snapshots:
            self.all_activity_ids = pd.Index([], dtype="str")

    # ------------------------------------------------------------------ as-built

    def build_asbuilt(self) -> None:
        table = self.usable("asbuilt")
        if table is None or not table.present or not len(table):
            # No file, or a file without rows: the case has no as-built record.
            self.tables["asbuilt"] = _empty("asbuilt")
            return
        p = self.problems
        ids = table.frame["id"]
        no_id = columns.required_cells(
            p, table, "id", "the row has no activity id", "give the id of the activity whose actual dates it records"
        )
        columns.duplicates(
            p, table, ["id"], "id", lambda i: f"the activity '{ids.iat[i]}'", "keep one row per activity", skip=no_id
        )
        start = columns.dates(p, table, "actual_start")
        finish = columns.dates(p, table, "actual_finish")
        self.tables["asbuilt"] = columns.assemble(table, {"actual_start": start, "actual_finish": finish})
        if not self.snapshots:
            return
        last = self.snapshots[-1]
        if last.activities is None or last.links is None:
            return
        base = last.activities
        unknown = columns.references(
            p,
            table,
            "id",
            base["id"],
            f"the activity '{{value}}' is not in the last snapshot ('{last.label}')",
            "correct the id, or add the activity to the last update",
        )
        # Lay the as-built dates over the last snapshot's: a blank cell keeps its date.
        usable_rows = np.flatnonzero(~unknown & ~no_id & ~ids.duplicated().to_numpy())
        listed_at = pd.Index(ids.to_numpy()[usable_rows]).get_indexer(base["id"])
        listed = listed_at >= 0
        record_position = np.where(listed, usable_rows[np.maximum(listed_at, 0)], -1)
        new_start = base["actual_start"].to_numpy().copy()
        new_finish = base["actual_finish"].to_numpy().copy()
        for new, given in ((new_start, start.to_numpy()), (new_finish, finish.to_numpy())):
            from_record = given[record_position[listed]]
            targets = np.flatnonzero(listed)
            has_date = ~np.isnat(from_record)
            new[targets[has_date]] = from_record[has_date]
        milestone = (base["kind"].isin(_MILESTONE_KINDS) | (base["duration"] == 0)).to_numpy()
        new_start = np.where(milestone & np.isnat(new_start), new_finish, new_start)
        new_finish = np.where(milestone & np.isnat(new_finish), new_start, new_finish)

        # Problems of the combined record, at the as-built row where the activity has one.
        missing_start = np.isnat(new_start)
        missing_finish = np.isnat(new_finish)
        reversed_dates = ~missing_start & ~missing_finish & (new_finish < new_start)
        checks = (
            (
                missing_start,
                "actual_start",
                "has no actual start",
                "add the activity's actual start and finish to asbuilt.csv",
            ),
            (
                missing_finish,
                "actual_finish",
                "has no actual finish",
                "add the activity's actual start and finish to asbuilt.csv",
            ),
            (
                reversed_dates,
                "actual_finish",
                "has an actual finish before its actual start",
                "check the actual dates in asbuilt.csv",
            ),
        )
        found = False
        for mask, column, message, fix in checks:
            bad = np.flatnonzero(mask)
            found |= bool(bad.size)
            for number, at in enumerate(bad):
                if p.full(table.file):
                    p.more(table.file, bad.size - number)
                    break
                text = f"the activity '{base['id'].iat[at]}' {message} (in asbuilt.csv or in '{last.label}')"
                if record_position[at] >= 0:
                    _, row = table.where(int(record_position[at]))
                    p.add(table.file, text, fix, row=row, column=column)
                else:
                    p.add(table.file, text, fix, column=column)
        if found or not len(base):
            return
        data_date = (pd.Timestamp(new_finish.max()) + pd.Timedelta(days=1)).date()
        activities = base.copy()
        activities["actual_start"] = pd.Series(new_start, dtype=columns.DATE_DTYPE)
        activities["actual_finish"] = pd.Series(new_finish, dtype=columns.DATE_DTYPE)
        activities["remaining"] = 0.0
        self.asbuilt_snapshot = Snapshot(
            folder="asbuilt",
            label="As-built",
            data_date=data_date,
            kind="asbuilt",
            activities_table=activities,
            links_table=last.links,
            derived=dict(last.derived),
        )

    # ------------------------------------------------------------------ registers

    def check_events(self) -> None:
        table = self.optional("events")
        if table is None:
            self.tables["events"] = _empty("events")
            if self.absent("events"):  # no register: no event for the other files to name
                self.event_ids = []
            return
        p = self.problems
        frame = table.frame
        ids = frame["id"]
        no_id = columns.required_cells(p, table, "id", "the event has no id", "give every event a unique id")
        columns.duplicates(
            p,
            table,
            ["id"],
            "id",
            lambda i: f"the event id '{ids.iat[i]}'",
            "give every event a different id",
            skip=no_id,
        )
        party = columns.choices(p, table, "party", PARTIES, what="party", required="the event names no risk owner")
        start = columns.dates(p, table, "start", required="the event has no start date")
        finish = columns.dates(p, table, "finish", required="the event has no finish date")
        p.flag(
            table,
            (finish < start).to_numpy(),
            "finish",
            lambda i: f"the finish {finish.iat[i]:%Y-%m-%d} is before the start {start.iat[i]:%Y-%m-%d}",
            "check both dates",
        )
        if self.all_activity_ids is not None:
            columns.id_lists(
                p,
                table,
                "activities",
                self.all_activity_ids,
                "the baseline or any update",
                "name activities of the baseline or of an update, separated by ;",
            )
        impact = columns.choices(p, table, "impact", IMPACTS, what="impact")
        days = columns.numbers(
            p, table, "days", unit="work days", whole=True, minimum=0, maximum=columns.LARGEST_WHOLE_NUMBER
        )
        extend = (impact == "extend").to_numpy()
        p.flag(
            table,
            extend & (frame["days"] == "").to_numpy(),
            "days",
            "the impact extend needs the number of days",
            "give the work days added to each affected activity",
        )
        no_activities = (frame["activities"].str.replace(";", "").str.strip() == "").to_numpy()
        p.flag(
            table,
            (impact.isin(["extend", "hold"])).to_numpy() & no_activities,
            "activities",
            lambda i: f"the impact {impact.iat[i]} needs the affected activities",
            "list the affected activity ids, separated by ;",
        )
        fragnet_rows = self.source.tables.get("fragnets")
        events_with_rows = (
            set(fragnet_rows.frame["event"]) if fragnet_rows is not None and "event" in fragnet_rows.frame else set()
        )
        if fragnet_rows is not None and "event" in fragnet_rows.frame:
            p.flag(
                table,
                (impact == "fragnet").to_numpy() & ~ids.isin(events_with_rows).to_numpy(),
                "impact",
                lambda i: f"the event '{ids.iat[i]}' has impact fragnet but no rows in fragnets.csv",
                "add its activities to fragnets.csv, or choose another impact",
            )
        notified = columns.dates(p, table, "notified")
        claimed = columns.numbers(
            p, table, "claimed_days", unit="calendar days", minimum=0, maximum=columns.LARGEST_WHOLE_NUMBER
        )
        self.check_event_programmes(table)
        self.event_ids = [i for i in ids.tolist() if i]
        self.event_impacts = dict(zip(ids.tolist(), impact.tolist()))
        self.tables["events"] = columns.assemble(
            table,
            {
                "party": party,
                "start": start,
                "finish": finish,
                "impact": impact,
                "days": days,
                "notified": notified,
                "claimed_days": claimed,
            },
        )

    def snapshot_names(self, facts_list) -> dict[str, _SnapshotFacts]:
        """Folder names and labels of ``facts_list``, each mapped to its snapshot."""
        names: dict[str, _SnapshotFacts] = {}
        for facts in facts_list:
            names.setdefault(facts.folder, facts)
        for facts in facts_list:
            names.setdefault(facts.label, facts)
        return names

    def check_event_programmes(self, table: RawTable) -> None:
        """The events columns ``tia_update`` and ``asbuilt_activities`` (case-format v2)."""
        p = self.problems
        tia = table.frame["tia_update"]
        given = ~columns.empty_cells(tia)
        as_built = given & _names_asbuilt(tia)
        p.flag(
            table,
            as_built,
            "tia_update",
            "the as-built record cannot be the programme an event is inserted into",
            "name the progress update (folder or label) current when the event began, or leave the cell blank",
        )
        if self.snapshots:
            names = self.snapshot_names(self.snapshots)
            known = ", ".join(f.folder for f in self.snapshots)
            p.flag(
                table,
                given & ~as_built & ~tia.isin(list(names)).to_numpy(),
                "tia_update",
                "'{value}' is not a snapshot of the case",
                f"name a snapshot by its folder or label ({known}), or leave the cell blank",
            )
        last = self.snapshots[-1] if self.snapshots else None
        if last is None or last.activities is None:
            return
        if self.asbuilt_snapshot is not None:
            ids, where = self.asbuilt_snapshot.activities_table["id"], "the as-built record"
        else:
            ids, where = last.activities["id"], f"the last update ('{last.label}')"
            if last.kind == "baseline":
                where = f"the baseline ('{last.label}'), the case's only programme"
        columns.id_lists(
            p, table, "asbuilt_activities", ids, where, "name activities of the as-built programme, separated by ;"
        )

    def check_attributions(self) -> None:
        """attributions.csv (case-format v2): the analyst's attribution of a window's charge."""
        table = self.optional("attributions")
        if table is None:
            self.tables["attributions"] = _empty("attributions")
            return
        folder, no_activity = self._attribution_windows(table)
        party = self._attribution_causes(table)
        frame = table.frame
        window, activity = frame["window"], frame["activity"]
        key = folder + "\x1f" + activity
        repeated = key.duplicated(keep="first").to_numpy() & (folder != "").to_numpy() & ~no_activity
        first_row = {k: table.where(int(at))[1] for at, k in reversed(list(enumerate(key.tolist())))}
        self.problems.flag(
            table,
            repeated,
            "activity",
            lambda i: (
                f"the activity '{activity.iat[i]}' is attributed twice in the window "
                f"ending '{window.iat[i]}' (first on row {first_row[key.iat[i]]})"
            ),
            "keep one attribution per window and activity",
        )
        self.tables["attributions"] = columns.assemble(table, {"party": party})

    def _attribution_windows(self, table):
        """The window and activity of each attribution checked: the snapshot that ends
        the window (its folder per row, blank where none) and whether the activity cell is
        blank."""
        p = self.problems
        frame = table.frame
        window, activity = frame["window"], frame["activity"]
        no_window = columns.required_cells(
            p,
            table,
            "window",
            "the attribution names no window",
            "give the label or folder of the snapshot that ends the window, or asbuilt",
        )
        ends = self.snapshot_names(self.snapshots[1:])
        first = self.snapshot_names(self.snapshots[:1])
        asbuilt_named = ~no_window & _names_asbuilt(window)
        has_record = len(self.tables.get("asbuilt", ())) > 0
        p.flag(
            table,
            asbuilt_named & (not has_record),
            "window",
            "the case has no as-built record, so no window ends with it",
            "add asbuilt.csv, or name the update that ends the window",
        )
        starts = ~no_window & ~asbuilt_named & window.isin(list(first)).to_numpy() & ~window.isin(list(ends)).to_numpy()
        p.flag(
            table,
            starts,
            "window",
            "the first snapshot begins the first window and ends none",
            "name the snapshot at the end of the window (an update, or asbuilt)",
        )
        known = ", ".join([f.folder for f in self.snapshots[1:]] + ["asbuilt"])
        unknown = ~no_window & ~asbuilt_named & ~starts & ~window.isin(list(ends)).to_numpy()
        p.flag(
            table,
            unknown,
            "window",
            "'{value}' is not a snapshot of the case",
            f"name the snapshot that ends the window by its folder or label ({known})",
        )
        no_activity = columns.required_cells(
            p,
            table,
            "activity",
            "the attribution names no activity",
            "give the id of the activity whose charge it attributes",
        )
        # The snapshot each row's window ends with, and whether it holds the activity
        # (a short loop over the snapshots).
        folder = window.map(lambda w: ends[w].folder if w in ends else "").astype("str")
        folder[asbuilt_named] = ASBUILT
        missing = np.zeros(len(table), dtype=bool)
        programmes = [(f.folder, f.activities) for f in self.snapshots[1:]]
        if self.asbuilt_snapshot is not None:
            programmes.append((ASBUILT, self.asbuilt_snapshot.activities_table))
        for name, activities in programmes:
            if activities is not None:
                rows = (folder == name).to_numpy()
                missing |= rows & ~no_activity & ~activity.isin(activities["id"]).to_numpy()
        p.flag(
            table,
            missing,
            "activity",
            lambda i: f"the activity '{activity.iat[i]}' is not in the snapshot '{window.iat[i]}' that ends the window",
            "name an activity of that snapshot, or correct the window",
        )
        return folder, no_activity

    def _attribution_causes(self, table):
        """The event or party of each attribution checked (one of them, a known event, a
        party of the case format) and its reason given; the parties read."""
        p = self.problems
        frame = table.frame
        event, party_text = frame["event"], frame["party"]
        has_event = ~columns.empty_cells(event)
        has_party = ~columns.empty_cells(party_text)
        p.flag(
            table,
            ~has_event & ~has_party,
            "event",
            "the attribution gives neither an event nor a party",
            "give the event the charge is attributed to, or the party (employer, "
            "contractor or neutral) in the party column",
        )
        p.flag(
            table,
            has_event & has_party,
            "party",
            "the attribution gives both an event and a party",
            "give one of them: the event, or the party when no event explains the charge",
        )
        if self.event_ids is not None:
            columns.references(
                p,
                table,
                "event",
                self.event_ids,
                "the event '{value}' is not in events.csv",
                "add the event to events.csv or correct the id",
            )
        party = columns.choices(p, table, "party", PARTIES, what="party")
        columns.required_cells(
            p,
            table,
            "reason",
            "the attribution gives no reason",
            "say why the charge is attributed so, with the record that shows it",
        )
        return party

    def check_completion_activity(self) -> None:
        """``[project] completion_activity``, when given, must be an activity of the baseline."""
        source = self.source.settings
        if self.settings is None or source is None:
            return
        name = self.settings.project.completion_activity
        baseline = self.snapshots[0] if self.snapshots else None
        if name is None or baseline is None or baseline.kind != "baseline" or baseline.activities is None:
            return
        if not (baseline.activities["id"] == name).any():
            row, column = source.locate("project.completion_activity")
            self.problems.add(
                source.file,
                f"the completion activity '{name}' is not an activity of the baseline ('{baseline.label}')",
                "name the baseline's milestone that marks completion of the whole works, or "
                "leave project.completion_activity out (the finish milestone that finishes "
                "last in the baseline is then taken)",
                row=row,
                column=column,
            )

    def check_fragnets(self) -> None:
        table = self.optional("fragnets")
        if table is None:
            self.tables["fragnets"] = _empty("fragnets")
            return
        p = self.problems
        frame = table.frame
        events, ids = frame["event"], frame["id"]
        columns.required_cells(
            p, table, "event", "the fragnet activity names no event", "give the id of the event that inserts it"
        )
        if self.event_ids is not None:
            unknown = columns.references(
                p,
                table,
                "event",
                self.event_ids,
                "the event '{value}' is not in events.csv",
                "add the event to events.csv or correct the id",
            )
            impact = events.map(self.event_impacts).fillna("")
            p.flag(
                table,
                ~unknown & (events != "").to_numpy() & (impact != "fragnet").to_numpy(),
                "event",
                "the event '{value}' does not have impact fragnet",
                "set the event's impact to fragnet in events.csv, or remove these rows",
            )
        no_id = columns.required_cells(
            p, table, "id", "the fragnet activity has no id", "give it an id not used by any other activity"
        )
        columns.duplicates(
            p,
            table,
            ["id"],
            "id",
            lambda i: f"the fragnet activity id '{ids.iat[i]}'",
            "give every fragnet activity a different id",
            skip=no_id,
        )
        if self.all_activity_ids is not None:
            clash = ~no_id & columns.member(ids, self.all_activity_ids)
            p.flag(
                table,
                clash,
                "id",
                "the id '{value}' is already an activity of the programme",
                "give the inserted activity an id of its own",
            )
        duration = columns.integers(
            p, table, "duration", unit="work days", minimum=0, required="the duration is missing"
        )
        calendar = self.calendar_check(table)
        for event, activity in zip(events.tolist(), ids.tolist()):
            self.fragnet_ids.setdefault(event, set()).add(activity)
        self.tables["fragnets"] = columns.assemble(table, {"duration": duration, "calendar": calendar})

    def check_fragnet_links(self) -> None:
        table = self.optional("fragnet_links")
        if table is None:
            self.tables["fragnet_links"] = _empty("fragnet_links")
            return
        p = self.problems
        frame = table.frame
        events, pred, succ = frame["event"], frame["pred"], frame["succ"]
        columns.required_cells(
            p, table, "event", "the link names no event", "give the id of the event whose fragnet it belongs to"
        )
        if self.event_ids is not None:
            columns.references(
                p,
                table,
                "event",
                self.event_ids,
                "the event '{value}' is not in events.csv",
                "add the event to events.csv or correct the id",
            )
        no_pred = columns.required_cells(p, table, "pred", "the link has no predecessor", "give the predecessor's id")
        no_succ = columns.required_cells(p, table, "succ", "the link has no successor", "give the successor's id")
        programme = self.all_activity_ids
        if programme is not None:
            for column, role in (("pred", "predecessor"), ("succ", "successor")):
                own = [
                    activity in self.fragnet_ids.get(event, ())
                    for event, activity in zip(events.tolist(), frame[column].tolist())
                ]
                known = np.asarray(own, dtype=bool) | columns.member(frame[column], programme)
                p.flag(
                    table,
                    ~known & (frame[column] != "").to_numpy(),
                    column,
                    f"the {role} '{{value}}' is neither a fragnet activity of this event "
                    "nor an activity of the programme",
                    "add it to fragnets.csv under this event or correct the id",
                )
        p.flag(
            table,
            ~no_pred & ~no_succ & (pred == succ).to_numpy(),
            "succ",
            "the link runs from an activity to itself",
            "remove the link or correct one id",
        )
        kind = columns.choices(p, table, "type", LINK_TYPES, default="FS", upper=True, what="link type")
        lag = columns.integers(p, table, "lag", unit="work days (negative for a lead)", default=0)
        columns.duplicates(
            p,
            table,
            ["event", "pred", "succ"],
            "pred",
            lambda i: f"the link {pred.iat[i]}>{succ.iat[i]} of event '{events.iat[i]}'",
            "keep one link from a predecessor to a successor",
            skip=no_pred | no_succ,
        )
        self.tables["fragnet_links"] = columns.assemble(table, {"type": kind, "lag": lag})

    def check_elements(self) -> None:
        table = self.optional("elements")
        if table is None:
            self.tables["elements"] = _empty("elements")
            return
        p = self.problems
        ids = table.frame["id"]
        no_id = columns.required_cells(p, table, "id", "the element has no id", "give the element or asset tag")
        columns.duplicates(
            p,
            table,
            ["id"],
            "id",
            lambda i: f"the element id '{ids.iat[i]}'",
            "give every element a different id",
            skip=no_id,
        )
        columns.required_cells(
            p,
            table,
            "wbs",
            "the element has no wbs code",
            "give the work breakdown code of the activities that build it",
        )
        typed = {}
        for column in ("x", "y", "z"):
            typed[column] = columns.numbers(p, table, column, unit="metres")
        for column in ("dx", "dy", "dz"):
            typed[column] = columns.numbers(p, table, column, unit="metres", minimum=0)
        self.tables["elements"] = columns.assemble(table, typed)

    def check_sections(self) -> None:
        table = self.optional("sections")
        if table is None:
            self.tables["sections"] = _empty("sections")
            if self.absent("sections"):
                self.section_ids = []
            return
        p = self.problems
        ids = table.frame["section"]
        no_id = columns.required_cells(p, table, "section", "the section has no id", "give every section a unique id")
        columns.duplicates(
            p,
            table,
            ["section"],
            "section",
            lambda i: f"the section '{ids.iat[i]}'",
            "give every section a different id",
            skip=no_id,
        )
        columns.required_cells(
            p,
            table,
            "completion_activity",
            "the section names no completion activity",
            "give the id of the milestone that marks its completion",
        )
        if self.all_activity_ids is not None:
            columns.references(
                p,
                table,
                "completion_activity",
                self.all_activity_ids,
                "the activity '{value}' is not in the programme",
                "name an activity of the baseline or of an update",
            )
        completion = columns.dates(
            p, table, "contract_completion", required="the section has no contract completion date"
        )
        rate = columns.numbers(p, table, "liquidated_damages_per_day", minimum=0)
        self.section_ids = [s for s in ids.tolist() if s]
        self.tables["sections"] = columns.assemble(
            table, {"contract_completion": completion, "liquidated_damages_per_day": rate}
        )

    def check_extensions(self) -> None:
        table = self.optional("extensions_granted")
        if table is None:
            self.tables["extensions_granted"] = _empty("extensions_granted")
            return
        p = self.problems
        ids = table.frame["id"]
        no_id = columns.required_cells(
            p, table, "id", "the extension has no id", "give every extension of time a unique id"
        )
        columns.duplicates(
            p,
            table,
            ["id"],
            "id",
            lambda i: f"the extension id '{ids.iat[i]}'",
            "give every extension a different id",
            skip=no_id,
        )
        granted = columns.dates(p, table, "granted_on", required="the extension has no date")
        days = columns.numbers(
            p,
            table,
            "days",
            unit="calendar days",
            whole=True,
            minimum=-columns.LARGEST_WHOLE_NUMBER,
            maximum=columns.LARGEST_WHOLE_NUMBER,
            required="the extension gives no days",
        )
        if self.section_ids is not None:
            columns.references(
                p,
                table,
                "section",
                self.section_ids,
                "the section '{value}' is not in sections.csv",
                "add it to sections.csv, or leave the cell blank for the whole works",
            )
        if self.event_ids is not None:
            columns.id_lists(
                p, table, "events", self.event_ids, "events.csv", "name events of events.csv, separated by ;"
            )
        self.tables["extensions_granted"] = columns.assemble(table, {"granted_on": granted, "days": days})

    def check_prolongation_rates(self) -> None:
        table = self.optional("prolongation_rates")
        if table is None:
            self.tables["prolongation_rates"] = _empty("prolongation_rates")
            return
        p = self.problems
        start = columns.dates(p, table, "from", required="the period has no first day")
        end = columns.dates(p, table, "to", required="the period has no last day")
        cost = columns.numbers(p, table, "cost_per_day", minimum=0, required="the period has no cost per day")
        p.flag(
            table,
            (end < start).to_numpy(),
            "to",
            lambda i: f"the period ends ({end.iat[i]:%Y-%m-%d}) before it begins ({start.iat[i]:%Y-%m-%d})",
            "check both dates",
        )
        dated = (start.notna() & end.notna() & (end >= start)).to_numpy()
        order = np.flatnonzero(dated)[np.argsort(start.to_numpy()[dated], kind="stable")]
        if order.size > 1:
            ends = end.to_numpy()[order]
            starts = start.to_numpy()[order]
            previous_end = np.maximum.accumulate(ends)[:-1]
            overlap = np.zeros(len(table), dtype=bool)
            overlap[order[1:][starts[1:] <= previous_end]] = True
            p.flag(
                table,
                overlap,
                "from",
                lambda i: f"the period from {start.iat[i]:%Y-%m-%d} overlaps an earlier period",
                "make the periods follow one another without overlapping",
            )
        self.tables["prolongation_rates"] = columns.assemble(table, {"from": start, "to": end, "cost_per_day": cost})


def _names_asbuilt(text: pd.Series) -> np.ndarray:
    """Mask of the cells naming the as-built record (``asbuilt`` or its label, any case)."""
    lowered = text.str.lower().str.replace("-", "", regex=False)
    return lowered.isin([ASBUILT]).to_numpy()


#: The empty tables built so far, by name (:func:`_empty` hands out copies).
_EMPTY_TABLES: dict[str, pd.DataFrame] = {}


def _empty(name: str) -> _EmptyTable:
    """The table ``name`` with no rows, its stable columns typed, to be built when a case's
    user first asks for it (:class:`delay.model.Case` calls it then): a command that never
    reads the table never builds it."""
    return _EmptyTable(name)


class _EmptyTable:
    """Builds the empty table ``name`` when called; has no rows (``len`` is 0) until then.

    Each table is built once per process; every call returns a copy of it (a frame without
    rows is copied at almost no cost), so that no two cases share one.
    """

    __slots__ = ("name",)

    def __init__(self, name: str):
        self.name = name

    def __len__(self) -> int:
        return 0

    def __call__(self) -> pd.DataFrame:
        table = _EMPTY_TABLES.get(self.name)
        if table is None:
            table = _EMPTY_TABLES[self.name] = _build_empty(self.name)
        return table.copy()


def _build_empty(name: str) -> pd.DataFrame:
    """The table ``name`` with no rows, its stable columns typed, built afresh.

    The columns of one type share one array of length 0 (nothing can be written into
    it): built from arrays, the frame costs a fraction of one built from Series.
    """
    data = {}
    empty: dict[object, object] = {}  # one empty array per type
    for column in COLUMNS[name]:
        if column in columns.DATE_COLUMNS.get(name, ()):
            dtype = columns.DATE_DTYPE
        elif column in columns.INTEGER_COLUMNS.get(name, ()):
            dtype = np.int64
        elif column in columns.NUMBER_COLUMNS.get(name, ()):
            dtype = np.float64
        elif column in columns.BOOLEAN_COLUMNS.get(name, ()):
            dtype = bool
        else:
            dtype = "str"
        if dtype not in empty:
            empty[dtype] = pd.array([], dtype="str") if dtype == "str" else np.array([], dtype=dtype)
        data[column] = empty[dtype]
    return pd.DataFrame(data, index=pd.RangeIndex(0), copy=False)
