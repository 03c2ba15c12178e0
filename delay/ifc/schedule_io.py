"""An IFC work schedule read into a snapshot folder of a case.

A programme exchanged in the open standard is an ``IfcWorkSchedule`` whose tasks are
assigned to it (``IfcRelAssignsToControl``), nested into summary tasks (``IfcRelNests``),
timed (``IfcTaskTime``), linked (``IfcRelSequence`` with an ``IfcLagTime``) and worked on
calendars (``IfcWorkCalendar`` assigned to the tasks). What the standard holds is mapped
onto case-format v1 like this:

==============================================  =============================================
IFC                                             snapshot
==============================================  =============================================
``IfcTask.Identification``                      ``id`` (the GlobalId when there is none)
``IfcTask.Name``                                ``name``
``IfcTaskTime.ScheduleDuration``                ``duration``, work days (``P5D``; weeks count
                                                the calendar's working weekdays, hours the
                                                calendar's working hours a day, else 8)
``IfcTaskTime.ActualStart / ActualFinish``      ``actual_start`` / ``actual_finish`` (dates)
``IfcTaskTime.RemainingTime``                   ``remaining``, work days
``IfcTask.IsMilestone``                         ``kind`` (start milestone without a
                                                predecessor, else finish milestone)
``IfcRelSequence.SequenceType``                 ``type``: START_START SS, FINISH_START FS,
                                                FINISH_FINISH FF, START_FINISH SF
``IfcRelSequence.TimeLag`` (``IfcLagTime``)     ``lag``, work days (negative: a lead)
``IfcWorkCalendar``                             a calendar of calendars.csv: weekly working
                                                times -> ``workdays``; dated working times ->
                                                extra working days, exception times ->
                                                holidays in calendar_exceptions.csv
property set ``DelayToolkit_Scheduling``        ``kind``, ``constraint``, ``constraint_date``,
(our own, written by ``delay export-ifc``)      ``party``, ``wbs``; on the work schedule the
                                                data date, label and kind of the snapshot
==============================================  =============================================

Everything else, and everything that had to be approximated (durations in months, elapsed
time, ratio lags, links to summary tasks, ...), is a *finding*: listed, and written into
the snapshot folder as ``ifc_findings.csv``. The ``wbs`` of a task without our property
set is the Identification of the summary task it is nested in.

References
----------
ISO 16739-1:2018 (IFC 4): IfcWorkSchedule, IfcTask, IfcTaskTime, IfcRelSequence,
IfcSequenceEnum, IfcLagTime, IfcTaskDurationEnum, IfcWorkCalendar, IfcWorkTime,
IfcRecurrencePattern. ISO 8601-1:2019 for durations (``P5D``) and dates.
"""

from __future__ import annotations

import datetime as dt
import json
import re
from collections import defaultdict
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from ..errors import CaseError, Problem
from ..model import ACTIVITY_KINDS, COLUMNS, CONSTRAINTS, WEEKDAYS
from ..output import replace_directory, write_bytes
from ._common import (
    SCHEDULING_PSET,
    Findings,
    IsoDuration,
    case_calendar_days,
    case_folder,
    csv_bytes,
    ifc_text,
    ifc_value,
    open_model,
    parse_date,
    parse_duration,
    validate_in_copy,
)

__all__ = [
    "CalendarRead",
    "WorkScheduleRead",
    "ScheduleImport",
    "read_work_schedule",
    "import_work_schedule",
    "SEQUENCE_TYPES",
    "FINDINGS_FILE",
    "HOURS_PER_WORK_DAY",
]

#: IfcSequenceEnum -> link type of the case format.
SEQUENCE_TYPES = {"START_START": "SS", "FINISH_START": "FS", "FINISH_FINISH": "FF", "START_FINISH": "SF"}
#: Written into the snapshot folder.
FINDINGS_FILE = "ifc_findings.csv"
#: Working hours of a day when the calendar gives none (common practice).
HOURS_PER_WORK_DAY = 8.0
_RECURRING_YEARS_AFTER = 5  # a yearly exception is written out to this many years after the last task date


@dataclass
class CalendarRead:
    """One ``IfcWorkCalendar`` as the case format holds calendars.

    Parameters
    ----------
    name : str
        The calendar's name (its Name, else Identification).
    weekmask : tuple of bool
        Seven flags, Monday first: the working weekdays.
    holidays : dict, optional
        Non-working dates (``datetime.date``) mapped to their reason (the ``IfcWorkTime``
        Name).
    extra_workdays : dict, optional
        Working dates outside the weekmask, mapped to their reason.
    hours_per_day : float, optional
        Working hours a day, from the time periods of the weekly working time, else
        :data:`HOURS_PER_WORK_DAY`.
    global_id : str, optional
        The calendar's GlobalId.

    Examples
    --------
    >>> import datetime
    >>> weekdays = CalendarRead("5d", (True,) * 5 + (False,) * 2)
    >>> weekdays.workdays
    'Mon Tue Wed Thu Fri'
    >>> weekdays.count(datetime.date(2025, 3, 3), datetime.date(2025, 3, 9))  # Monday to Sunday
    5
    """

    name: str
    weekmask: tuple[bool, ...]
    holidays: dict[dt.date, str] = field(default_factory=dict)
    extra_workdays: dict[dt.date, str] = field(default_factory=dict)
    hours_per_day: float = HOURS_PER_WORK_DAY
    global_id: str = ""

    @property
    def workdays(self) -> str:
        """The working weekdays as calendars.csv writes them (``"Mon Tue Wed Thu Fri"``)."""
        return " ".join(day for day, on in zip(WEEKDAYS, self.weekmask) if on)

    @property
    def workdays_per_week(self) -> int:
        """How many weekdays are working days."""
        return int(sum(self.weekmask))

    def effective(self) -> tuple[tuple[bool, ...], frozenset, frozenset]:
        """The calendar as the work days it gives, for comparing calendars.

        Returns
        -------
        weekmask : tuple of bool
            The working weekdays, Monday first.
        holidays : frozenset of datetime.date
            Holidays that fall on working weekdays and are not also extra working days.
        extra_workdays : frozenset of datetime.date
            Extra working days that fall on other weekdays and are not also holidays.
        """
        holidays = frozenset(d for d in self.holidays if self.weekmask[d.weekday()] and d not in self.extra_workdays)
        extra = frozenset(d for d in self.extra_workdays if not self.weekmask[d.weekday()] and d not in self.holidays)
        return self.weekmask, holidays, extra

    def is_workday(self, day: dt.date) -> bool:
        """Whether one date is a working day of the calendar.

        Parameters
        ----------
        day : datetime.date
            The date.

        Returns
        -------
        bool
            False on a holiday; else True on an extra working day or a working weekday.
        """
        if day in self.holidays:
            return False
        return day in self.extra_workdays or self.weekmask[day.weekday()]

    def count(self, first: dt.date, last: dt.date) -> int:
        """Work days from ``first`` to ``last``, both included.

        Parameters
        ----------
        first, last : datetime.date
            The first and last dates of the period.

        Returns
        -------
        int
            The working weekdays that are not holidays (counted with ``numpy.busday_count``),
            plus the extra working days on other weekdays; 0 when ``last`` is before ``first``.
        """
        if last < first:
            return 0
        end = np.datetime64(last, "D") + 1
        weekly = 0
        if any(self.weekmask):
            weekly = int(
                np.busday_count(
                    np.datetime64(first, "D"),
                    end,
                    weekmask=list(self.weekmask),
                    holidays=[np.datetime64(d, "D") for d in self.holidays],
                )
            )
        extra = sum(
            1
            for d in self.extra_workdays
            if first <= d <= last and not self.weekmask[d.weekday()] and d not in self.holidays
        )
        return weekly + extra


@dataclass(frozen=True)
class WorkScheduleRead:
    """What :func:`read_work_schedule` found.

    Parameters
    ----------
    name : str
        The work schedule's Name.
    activities : pandas.DataFrame
        Columns ``COLUMNS["activities"]``, every cell text as it will be written.
    links : pandas.DataFrame
        ``pred, succ, type, lag`` as text (lags in work days).
    calendars : dict
        The calendars the tasks use, by name (:class:`CalendarRead`).
    data_date : datetime.date or None
        The data date the file gives (our property set, else the tasks' common
        StatusTime), or None.
    facts : dict
        The values of our property set on the work schedule (``DataDate``,
        ``SnapshotLabel``, ``SnapshotKind``, ...).
    file_dates : pandas.DataFrame
        ``id, start, finish`` as the file schedules them (EarlyStart/EarlyFinish, else
        ScheduleStart/ScheduleFinish), ``datetime64``.
    findings : pandas.DataFrame
        ``kind, entity, global_id, subject, message``.
    start_time : datetime.date or None, optional
        The date of the work schedule's StartTime.
    """

    name: str
    activities: pd.DataFrame
    links: pd.DataFrame
    calendars: dict[str, CalendarRead]
    data_date: dt.date | None
    facts: dict
    file_dates: pd.DataFrame
    findings: pd.DataFrame
    start_time: dt.date | None = None


@dataclass(frozen=True)
class ScheduleImport:
    """What :func:`import_work_schedule` did.

    Parameters
    ----------
    read : WorkScheduleRead
        What was read from the file.
    folder : pathlib.Path
        The snapshot folder written.
    data_date : datetime.date
        The snapshot's data date.
    label : str
        The snapshot's label.
    kind : str
        ``baseline`` or ``update``.
    calendars_added : tuple of str
        Names of the calendars added to the case.
    findings : pandas.DataFrame
        The read's findings and the comparison of the file's dates with the toolkit's
        schedule (as written to ``ifc_findings.csv``).
    written : tuple of pathlib.Path
        The paths written.
    """

    read: WorkScheduleRead
    folder: Path
    data_date: dt.date
    label: str
    kind: str
    calendars_added: tuple[str, ...]
    findings: pd.DataFrame
    written: tuple[Path, ...]


# -- small readers ---------------------------------------------------------------------------------
def _psets_named(model, name: str) -> dict[int, dict[str, object]]:
    """Values of the property set ``name`` by entity id of the object it defines."""
    found: dict[int, dict[str, object]] = {}
    for rel in model.by_type("IfcRelDefinesByProperties"):
        definition = rel.RelatingPropertyDefinition
        sets = list(definition) if isinstance(definition, (list, tuple)) else [definition]
        for pset in sets:
            if pset is None or not pset.is_a("IfcPropertySet") or pset.Name != name:
                continue
            values = {}
            for prop in pset.HasProperties or ():
                if prop.is_a("IfcPropertySingleValue"):
                    values[prop.Name] = ifc_value(prop.NominalValue)
            for obj in rel.RelatedObjects or ():
                found.setdefault(obj.id(), {}).update(values)
    return found


def _assigned_controls(model) -> dict[int, list]:
    """Controls (work schedules, calendars) each object is assigned to, by entity id."""
    controls: dict[int, list] = defaultdict(list)
    for rel in model.by_type("IfcRelAssignsToControl"):
        for obj in rel.RelatedObjects or ():
            controls[obj.id()].append(rel.RelatingControl)
    return controls


def _nested(model) -> tuple[dict[int, list], dict[int, object]]:
    children: dict[int, list] = defaultdict(list)
    parent: dict[int, object] = {}
    for rel in model.by_type("IfcRelNests"):
        whole = rel.RelatingObject
        if whole is None or not whole.is_a("IfcTask"):
            continue
        for part in rel.RelatedObjects or ():
            if part.is_a("IfcTask"):
                children[whole.id()].append(part)
                parent[part.id()] = whole
    return children, parent


def _time_of(text) -> float | None:
    """Hours of an IfcTime ``08:30:00``."""
    match = re.match(r"^(\d{1,2}):(\d{2})(?::(\d{2}(?:\.\d+)?))?", str(text or ""))
    if not match:
        return None
    return int(match.group(1)) + int(match.group(2)) / 60 + float(match.group(3) or 0) / 3600


def _work_time_dates(work_time) -> tuple[dt.date | None, dt.date | None]:
    """Start and finish of an IfcWorkTime (IFC 4: Start, Finish; IFC 4.3: StartDate, FinishDate)."""
    start = getattr(work_time, "Start", None) if hasattr(work_time, "Start") else getattr(work_time, "StartDate", None)
    finish = (
        getattr(work_time, "Finish", None) if hasattr(work_time, "Finish") else getattr(work_time, "FinishDate", None)
    )
    return parse_date(start), parse_date(finish)


def _dates_of(
    work_time, pattern, limit_first: dt.date, limit_last: dt.date, findings: Findings, what: str, calendar
) -> list[dt.date]:
    """The dates a dated or recurring IfcWorkTime covers (both ends included)."""
    start, finish = _work_time_dates(work_time)
    recurrence = pattern.RecurrenceType if pattern is not None else None
    if start is None and finish is None:
        if recurrence == "YEARLY_BY_DAY_OF_MONTH" and pattern.MonthComponent and pattern.DayComponent:
            days = []
            for year in range(limit_first.year, limit_last.year + 1):
                for month in pattern.MonthComponent:
                    for day in pattern.DayComponent:
                        try:
                            days.append(dt.date(year, int(month), int(day)))
                        except ValueError:
                            continue
            findings.add(
                "calendar",
                f"the recurring {what} '{ifc_text(work_time.Name)}' is written out for the years "
                f"{limit_first.year} to {limit_last.year}",
                calendar,
                ifc_text(calendar.Name),
            )
            return sorted(days)
        findings.add(
            "calendar",
            f"the undated {what} '{ifc_text(work_time.Name)}' ({recurrence or 'no pattern'}) "
            "cannot be mapped to dates; it is left out",
            calendar,
            ifc_text(calendar.Name),
        )
        return []
    if start is None or finish is None:
        findings.add(
            "calendar",
            f"the {what} '{ifc_text(work_time.Name)}' has only one end date; it is taken as a single day",
            calendar,
            ifc_text(calendar.Name),
        )
        start = finish = start or finish
    if finish < start:
        findings.add(
            "calendar",
            f"the {what} '{ifc_text(work_time.Name)}' ends before it starts; it is left out",
            calendar,
            ifc_text(calendar.Name),
        )
        return []
    if (finish - start).days > 3660:
        findings.add(
            "calendar",
            f"the {what} '{ifc_text(work_time.Name)}' spans more than ten years; it is cut to ten years",
            calendar,
            ifc_text(calendar.Name),
        )
        finish = start + dt.timedelta(days=3660)
    days = [start + dt.timedelta(days=k) for k in range((finish - start).days + 1)]
    if recurrence in (None, "DAILY"):
        return days
    if recurrence == "WEEKLY" and pattern.WeekdayComponent:
        weekdays = {int(d) - 1 for d in pattern.WeekdayComponent}
        return [d for d in days if d.weekday() in weekdays]
    findings.add(
        "calendar",
        f"the {what} '{ifc_text(work_time.Name)}' recurs {recurrence}, which is not mapped; "
        "every day of its dates is taken",
        calendar,
        ifc_text(calendar.Name),
    )
    return days


def read_calendar(calendar, findings: Findings, first: dt.date, last: dt.date) -> CalendarRead:
    """One ``IfcWorkCalendar`` as a :class:`CalendarRead`.

    Parameters
    ----------
    calendar : ifcopenshell.entity_instance
        The ``IfcWorkCalendar``.
    findings : delay.ifc._common.Findings
        Where what had to be approximated or left out is recorded.
    first, last : datetime.date
        Bound the years over which a yearly exception is written out.

    Returns
    -------
    CalendarRead
        The calendar.
    """
    name = ifc_text(calendar.Name) or ifc_text(calendar.Identification) or f"ifc-{calendar.id()}"
    mask = [False] * 7
    dated_working = []
    hours = None
    for work_time in calendar.WorkingTimes or ():
        pattern = work_time.RecurrencePattern
        if any(_work_time_dates(work_time)):
            dated_working.append(work_time)
            continue
        recurrence = pattern.RecurrenceType if pattern is not None else None
        if recurrence in (None, "DAILY"):
            mask = [True] * 7
        elif recurrence == "WEEKLY" and pattern.WeekdayComponent:
            for day in pattern.WeekdayComponent:
                if 1 <= int(day) <= 7:
                    mask[int(day) - 1] = True
        else:
            findings.add(
                "calendar",
                f"the working time '{ifc_text(work_time.Name)}' recurs {recurrence}, which "
                "is not mapped; it is left out",
                calendar,
                name,
            )
            continue
        if pattern is not None and pattern.TimePeriods:
            total = 0.0
            for period in pattern.TimePeriods:
                begin, end = _time_of(period.StartTime), _time_of(period.EndTime)
                if begin is not None and end is not None and end > begin:
                    total += end - begin
            if total > 0:
                hours = total
    if not calendar.WorkingTimes:
        findings.add(
            "calendar",
            "the calendar has no working times; every weekday Monday to Friday is taken "
            "as a work day (common practice)",
            calendar,
            name,
        )
        mask = [True] * 5 + [False] * 2
    result = CalendarRead(
        name=name, weekmask=tuple(mask), hours_per_day=hours or HOURS_PER_WORK_DAY, global_id=str(calendar.GlobalId)
    )
    for work_time in dated_working:
        for day in _dates_of(work_time, work_time.RecurrencePattern, first, last, findings, "working time", calendar):
            if not mask[day.weekday()]:
                result.extra_workdays[day] = ifc_text(work_time.Name)
    for work_time in calendar.ExceptionTimes or ():
        for day in _dates_of(work_time, work_time.RecurrencePattern, first, last, findings, "exception time", calendar):
            result.holidays[day] = ifc_text(work_time.Name)
            result.extra_workdays.pop(day, None)
    if not any(result.weekmask) and not result.extra_workdays:
        findings.add("calendar", "the calendar has no work day; Monday to Friday is taken", calendar, name)
        result.weekmask = (True,) * 5 + (False,) * 2
    return result


def _pick_schedule(model, wanted: str | None, path: Path):
    schedules = list(model.by_type("IfcWorkSchedule"))
    if not schedules:
        raise CaseError(
            Problem(
                file=str(path),
                message="the file holds no work schedule (IfcWorkSchedule)",
                fix="export the programme as an IFC work schedule",
            )
        )
    if wanted is not None:
        for schedule in schedules:
            if wanted in (ifc_text(schedule.Name), ifc_text(schedule.Identification), str(schedule.GlobalId)):
                return schedule
        names = ", ".join(f"'{ifc_text(s.Name) or s.GlobalId}'" for s in schedules)
        raise CaseError(
            Problem(
                file=str(path),
                message=f"no work schedule '{wanted}' in the file (it holds {names})",
                fix="name one of them with --work-schedule",
            )
        )
    if len(schedules) > 1:
        names = ", ".join(f"'{ifc_text(s.Name) or s.GlobalId}'" for s in schedules)
        raise CaseError(
            Problem(
                file=str(path),
                message=f"the file holds {len(schedules)} work schedules ({names})",
                fix="choose one with --work-schedule NAME",
            )
        )
    return schedules[0]


def _work_days(
    duration: IsoDuration, calendar: CalendarRead | None, findings: Findings, entity, subject: str, what: str
) -> float | None:
    """Work days of a work-time duration; None for years or months (no fixed length)."""
    if duration.has_calendar_parts:
        findings.add(
            "duration", f"the {what} is given in years or months, which have no length in work days", entity, subject
        )
        return None
    per_week = calendar.workdays_per_week if calendar is not None else 5
    per_day = calendar.hours_per_day if calendar is not None else HOURS_PER_WORK_DAY
    days = duration.weeks * per_week + duration.days
    if duration.has_time_parts:
        days += (duration.hours + duration.minutes / 60 + duration.seconds / 3600) / per_day
    return duration.sign * days


def _whole(value: float, findings: Findings, entity, subject: str, what: str) -> int:
    whole = int(np.floor(abs(value) + 0.5)) * (1 if value >= 0 else -1)
    if abs(whole - value) > 1e-9:
        findings.add("rounded", f"the {what} of {value:g} work days is rounded to {whole}", entity, subject)
    return whole


# -- the reader: tasks and calendars ---------------------------------------------------------------
def _open_schedule(path: Path, work_schedule: str | None):
    """The opened model and the work schedule chosen in it; an IFC 2x3 file is refused."""
    model = open_model(path)
    if model.schema == "IFC2X3":
        raise CaseError(
            Problem(
                file=str(path),
                message="the file is IFC 2x3, whose work schedules are not read here",
                fix="export the programme as an IFC 4 work schedule",
            )
        )
    return model, _pick_schedule(model, work_schedule, path)


def _schedule_tasks(schedule, children: dict[int, list], path: Path) -> tuple[list, set[int]]:
    """Every task of the work schedule, depth first (a summary task before its parts), and the
    entity ids of all of them; a work schedule without a task is refused."""
    roots = [o for rel in (schedule.Controls or ()) for o in (rel.RelatedObjects or ()) if o.is_a("IfcTask")]
    tasks, stack, seen = [], list(reversed(roots)), set()
    while stack:
        task = stack.pop()
        if task.id() in seen:
            continue
        seen.add(task.id())
        tasks.append(task)
        stack.extend(reversed(children.get(task.id(), [])))
    if not tasks:
        raise CaseError(
            Problem(
                file=str(path),
                message=f"the work schedule '{ifc_text(schedule.Name)}' has no task",
                fix="assign its tasks to it (IfcRelAssignsToControl)",
            )
        )
    return tasks, seen


def _leaf_tasks(tasks: list, children: dict[int, list], findings: Findings) -> list:
    """The tasks that become activities (those with no nested task); each summary task is a finding."""
    leaves = [t for t in tasks if not children.get(t.id())]
    for summary in (t for t in tasks if children.get(t.id())):
        findings.add(
            "summary_task",
            f"a summary task of {len(children[summary.id()])} tasks: its tasks are read, it is not an activity",
            summary,
            ifc_text(summary.Identification),
        )
    return leaves


def _calendar_years(leaves: list) -> tuple[dt.date, dt.date]:
    """The span over which a yearly exception is written out: the tasks' first scheduled or
    actual date (today when none is dated) to ``_RECURRING_YEARS_AFTER`` years after the last."""
    dates = []
    for task in leaves:
        time = task.TaskTime
        if time is not None:
            for attribute in ("ScheduleStart", "ScheduleFinish", "ActualStart", "ActualFinish"):
                day = parse_date(getattr(time, attribute))
                if day is not None:
                    dates.append(day)
    first = min(dates) if dates else dt.date.today()
    last = (max(dates) if dates else first) + dt.timedelta(days=366 * _RECURRING_YEARS_AFTER)
    return first, last


def _calendar_entity(task, schedule, controls: dict[int, list], parent: dict[int, object]):
    """The IfcWorkCalendar a task is worked on: its own, else that of the nearest summary task
    it is nested in, else the work schedule's; None when there is none."""
    current, steps = task, 0
    while current is not None and steps < 1000:
        for control in controls.get(current.id(), ()):
            if control.is_a("IfcWorkCalendar"):
                return control
        current = parent.get(current.id())
        steps += 1
    for control in controls.get(schedule.id(), ()):
        if control.is_a("IfcWorkCalendar"):
            return control
    return None


def _read_calendars(
    leaves: list, schedule, controls: dict[int, list], parent: dict[int, object], findings: Findings
) -> tuple[dict[str, CalendarRead], dict[int, CalendarRead | None]]:
    """The calendars the tasks are worked on, by name (each read once), and each task's
    calendar by entity id (None: the case's default calendar)."""
    first, last = _calendar_years(leaves)
    calendars: dict[str, CalendarRead] = {}
    by_entity: dict[int, CalendarRead] = {}
    task_calendar: dict[int, CalendarRead | None] = {}
    for task in leaves:
        entity = _calendar_entity(task, schedule, controls, parent)
        if entity is None:
            task_calendar[task.id()] = None
            continue
        if entity.id() not in by_entity:
            read = read_calendar(entity, findings, first, last)
            if read.name in calendars:
                read.name = f"{read.name}-{entity.id()}"
                findings.add(
                    "calendar", f"two calendars share a name; this one is read as '{read.name}'", entity, read.name
                )
            by_entity[entity.id()] = read
            calendars[read.name] = read
        task_calendar[task.id()] = by_entity[entity.id()]
    if any(c is None for c in task_calendar.values()):
        count = sum(1 for c in task_calendar.values() if c is None)
        findings.add("calendar", f"{count} task(s) have no work calendar; they take the case's default calendar")
    return calendars, task_calendar


def _task_ids(leaves: list, findings: Findings, path: Path) -> dict[int, str]:
    """Each activity's id by entity id: its Identification, else its GlobalId (a finding); a
    repeated Identification is refused, every repeat named."""
    ids: dict[int, str] = {}
    used: dict[str, object] = {}
    problems = []
    for task in leaves:
        identification = ifc_text(task.Identification)
        if not identification:
            identification = str(task.GlobalId)
            findings.add(
                "no_identification", "the task has no Identification; its GlobalId is its id", task, ifc_text(task.Name)
            )
        if identification in used:
            problems.append(
                Problem(
                    file=str(path),
                    message=f"the task Identification '{identification}' is used by "
                    f"#{used[identification].id()} and #{task.id()}",
                    fix="give every task of the work schedule its own Identification",
                )
            )
        used.setdefault(identification, task)
        ids[task.id()] = identification
    if problems:
        raise CaseError(problems)
    return ids


# -- the reader: links and lags --------------------------------------------------------------------
def _read_links(
    model, ids: dict[int, str], seen: set[int], findings: Findings
) -> tuple[list[dict], list[tuple], set[int]]:
    """The links between activities, each with a lag of 0 for now: the rows, the sequences they
    come from (``(rel, pred, succ)``, row by row, for the lags) and the entity ids of the tasks
    that have a predecessor. Links the case cannot hold are findings, and left out."""
    link_rows, has_predecessor, link_seen = [], set(), set()
    raw_lags = []
    leaf_ids = set(ids)
    for rel in model.by_type("IfcRelSequence"):
        pred, succ = rel.RelatingProcess, rel.RelatedProcess
        if pred is None or succ is None:
            continue
        in_pred, in_succ = pred.id() in leaf_ids, succ.id() in leaf_ids
        if not (in_pred or in_succ) and pred.id() not in seen and succ.id() not in seen:
            continue  # another work schedule's link
        if not (in_pred and in_succ):
            findings.add(
                "link",
                "a link to or from a summary task or a task outside the work schedule is left out",
                rel,
                f"{ifc_text(pred.Identification)}>{ifc_text(succ.Identification)}",
            )
            continue
        kind = rel.SequenceType
        link_type = SEQUENCE_TYPES.get(kind or "")
        if link_type is None:
            link_type = "FS"
            findings.add(
                "link",
                f"the sequence type {kind or 'not given'} "
                f"({ifc_text(rel.UserDefinedSequenceType) or 'no user-defined type'}) is read as FS",
                rel,
                f"{ids[pred.id()]}>{ids[succ.id()]}",
            )
        key = (ids[pred.id()], ids[succ.id()])
        if key[0] == key[1]:
            findings.add("link", "a link from a task to itself is left out", rel, f"{key[0]}>{key[1]}")
            continue
        if key in link_seen:
            findings.add("link", "a second link between the same two tasks is left out", rel, f"{key[0]}>{key[1]}")
            continue
        link_seen.add(key)
        has_predecessor.add(succ.id())
        raw_lags.append((rel, pred, succ))
        link_rows.append({"pred": key[0], "succ": key[1], "type": link_type, "lag": 0})
    return link_rows, raw_lags, has_predecessor


def _lag_days(
    rel, predecessor_duration: int, calendar: CalendarRead | None, findings: Findings, subject: str
) -> float | None:
    """Work days of a link's IfcLagTime (a ratio of the predecessor's duration, elapsed time or
    work time); None when the link keeps its lag of 0 (no lag, or one that cannot be read)."""
    lag_time = rel.TimeLag
    if lag_time is None:
        return None
    value = lag_time.LagValue
    if value is None:
        return None
    if (
        value.is_a("IfcRatioMeasure")
        or value.is_a("IfcNormalisedRatioMeasure")
        or value.is_a("IfcPositiveRatioMeasure")
    ):
        lag = float(value.wrappedValue) * predecessor_duration
        findings.add(
            "lag",
            f"a lag of {float(value.wrappedValue):g} of the predecessor's duration is taken as {lag:g} work days",
            rel,
            subject,
        )
        return lag
    parsed = parse_duration(ifc_text(value))
    if parsed is None:
        findings.add("lag", f"the lag '{ifc_text(value)}' is not an ISO 8601 duration; it is taken as 0", rel, subject)
        return None
    if lag_time.DurationType == "ELAPSEDTIME":
        elapsed = parsed.sign * (parsed.weeks * 7 + parsed.days)
        lag = elapsed * (calendar.workdays_per_week if calendar is not None else 5) / 7
        findings.add(
            "lag", f"the lag '{ifc_text(value)}' is elapsed time; it is taken as {lag:g} work days", rel, subject
        )
        return lag
    return _work_days(parsed, calendar, findings, rel, subject, "lag")


def _with_lags(
    link_rows: list[dict],
    raw_lags: list[tuple],
    durations: dict[int, int],
    task_calendar: dict[int, CalendarRead | None],
    findings: Findings,
) -> list[dict]:
    """The link rows with their lags in whole work days of the successor's calendar, as text."""
    rows = []
    for row, (rel, pred, succ) in zip(link_rows, raw_lags):
        subject = f"{row['pred']}>{row['succ']}"
        lag = _lag_days(rel, durations.get(pred.id(), 0), task_calendar.get(succ.id()), findings, subject)
        rows.append({**row, "lag": str(row["lag"] if lag is None else _whole(lag, findings, rel, subject, "lag"))})
    return rows


# -- the reader: activities ------------------------------------------------------------------------
@dataclass
class _TaskTimes:
    """What a task's IfcTaskTime gives (``present`` False when it has none): dates, and its
    duration and remaining time in work days (None when not given)."""

    present: bool = False
    duration_days: float | None = None
    remaining: float | None = None
    actual_start: dt.date | None = None
    actual_finish: dt.date | None = None
    status: dt.date | None = None
    early_start: dt.date | None = None
    early_finish: dt.date | None = None


def _scheduled_duration(
    time, start: dt.date | None, calendar: CalendarRead | None, findings: Findings, task, identification: str
) -> float | None:
    """Work days of a task time's ScheduleDuration, elapsed time counted on the calendar from
    the scheduled start; None when it is not given or not read."""
    if not time.ScheduleDuration:
        return None
    parsed = parse_duration(time.ScheduleDuration)
    if parsed is None:
        findings.add(
            "duration", f"the duration '{time.ScheduleDuration}' is not an ISO 8601 duration", task, identification
        )
        return None
    if time.DurationType == "ELAPSEDTIME":
        elapsed = parsed.sign * (
            parsed.weeks * 7 + parsed.days + (parsed.hours + parsed.minutes / 60 + parsed.seconds / 3600) / 24
        )
        if start is not None and calendar is not None:
            duration_days = calendar.count(start, start + dt.timedelta(days=max(0, int(np.ceil(elapsed)) - 1)))
        else:
            duration_days = elapsed * (calendar.workdays_per_week if calendar else 5) / 7
        findings.add(
            "duration",
            f"the duration '{time.ScheduleDuration}' is elapsed time; it is taken "
            f"as the {duration_days:g} work days it covers",
            task,
            identification,
        )
        return duration_days
    if time.DurationType not in ("WORKTIME",):
        findings.add(
            "duration", "the duration type is not given; the duration is read as work time", task, identification
        )
    return _work_days(parsed, calendar, findings, task, identification, "duration")


def _task_times(task, identification: str, calendar: CalendarRead | None, findings: Findings) -> _TaskTimes:
    """The dates and durations of a task's IfcTaskTime; without a duration, the work days
    between its scheduled dates (a finding)."""
    time = task.TaskTime
    if time is None:
        findings.add(
            "duration", "the task has no task time (IfcTaskTime); its duration is taken as 0", task, identification
        )
        return _TaskTimes()
    start, finish = parse_date(time.ScheduleStart), parse_date(time.ScheduleFinish)
    times = _TaskTimes(
        present=True,
        actual_start=parse_date(time.ActualStart),
        actual_finish=parse_date(time.ActualFinish),
        status=parse_date(time.StatusTime),
        early_start=parse_date(time.EarlyStart) or start,
        early_finish=parse_date(time.EarlyFinish) or finish,
    )
    times.duration_days = _scheduled_duration(time, start, calendar, findings, task, identification)
    if times.duration_days is None and start is not None and finish is not None:
        if calendar is not None:
            times.duration_days = calendar.count(start, finish)
        else:
            times.duration_days = int(np.busday_count(start, finish + dt.timedelta(days=1)))
        findings.add(
            "duration",
            f"the duration is taken from the scheduled dates {start} to {finish}: {times.duration_days:g} work days",
            task,
            identification,
        )
    if time.RemainingTime:
        parsed = parse_duration(time.RemainingTime)
        if parsed is not None:
            times.remaining = _work_days(parsed, calendar, findings, task, identification, "remaining time")
    return times


def _whole_duration(times: _TaskTimes, task, identification: str, findings: Findings) -> int:
    """The activity's duration in whole work days: 0 when none is given, when it is negative
    and for a milestone (each a finding)."""
    duration_days = times.duration_days
    if duration_days is None:
        if times.present:
            findings.add(
                "duration",
                "the task has neither a duration nor scheduled dates; its duration is taken as 0",
                task,
                identification,
            )
        duration_days = 0
    duration = _whole(duration_days, findings, task, identification, "duration")
    if duration < 0:
        findings.add("duration", "a negative duration is taken as 0", task, identification)
        duration = 0
    if task.IsMilestone and duration > 0:
        findings.add(
            "milestone", f"a milestone with a duration of {duration} work days: taken as 0", task, identification
        )
        duration = 0
    return duration


def _activity_kind(
    task, facts: dict, duration: int, has_predecessor: set[int], identification: str, findings: Findings
) -> str:
    """The activity's kind: our property set's, else from IsMilestone (a start milestone when
    nothing precedes it); anything with a duration is a task."""
    kind = ifc_text(facts.get("Kind"))
    if kind not in ACTIVITY_KINDS:
        if kind:
            findings.add("kind", f"the kind '{kind}' is not one of {', '.join(ACTIVITY_KINDS)}", task, identification)
        kind = "task"
        if task.IsMilestone:
            kind = "finish_milestone" if task.id() in has_predecessor else "start_milestone"
    if kind != "task" and duration > 0:
        kind = "task"
    return kind


def _activity_constraint(task, facts: dict, identification: str, findings: Findings) -> tuple[str, dt.date | None]:
    """The constraint of our property set and its date; an unknown one, or one without its
    date, is left out (a finding)."""
    constraint = ifc_text(facts.get("Constraint"))
    constraint_date = parse_date(facts.get("ConstraintDate"))
    if constraint and constraint not in CONSTRAINTS:
        findings.add(
            "constraint",
            f"the constraint '{constraint}' is not one of {', '.join(CONSTRAINTS)}; it is left out",
            task,
            identification,
        )
        constraint = ""
    if constraint and constraint_date is None:
        findings.add("constraint", "a constraint without its date is left out", task, identification)
        constraint = ""
    return constraint, constraint_date


def _progress(
    times: _TaskTimes, kind: str, duration: int, task, identification: str, findings: Findings
) -> tuple[dt.date | None, str]:
    """The actual start (an actual finish without one: the finish) and the remaining duration
    as text: 0 when finished, the file's remaining time, else a started task's duration."""
    actual_start, actual_finish, remaining = times.actual_start, times.actual_finish, times.remaining
    remaining_text = ""
    if actual_finish is not None:
        remaining_text = "0"
        if actual_start is None and kind == "task" and duration > 0:
            findings.add(
                "progress",
                "an actual finish without an actual start: the start is taken as the finish",
                task,
                identification,
            )
            actual_start = actual_finish
    elif remaining is not None:
        remaining_text = str(max(0, _whole(remaining, findings, task, identification, "remaining time")))
    if actual_start is not None and actual_finish is None and not remaining_text:
        if duration > 0:
            findings.add(
                "progress",
                "a started task without a remaining time: its remaining duration is taken as its duration",
                task,
                identification,
            )
            remaining_text = str(duration)
    return actual_start, remaining_text


def _activity_row(
    task,
    identification: str,
    calendar: CalendarRead | None,
    facts: dict,
    times: _TaskTimes,
    parent: dict[int, object],
    has_predecessor: set[int],
    findings: Findings,
) -> dict[str, str]:
    """One row of activities.csv for a task, every cell text. The wbs is our property set's,
    else the Identification of the summary task it is nested in."""
    duration = _whole_duration(times, task, identification, findings)
    kind = _activity_kind(task, facts, duration, has_predecessor, identification, findings)
    constraint, constraint_date = _activity_constraint(task, facts, identification, findings)
    wbs = ifc_text(facts.get("WorkBreakdownCode"))
    if not wbs and task.id() in parent:
        wbs = ifc_text(parent[task.id()].Identification)
    actual_start, remaining_text = _progress(times, kind, duration, task, identification, findings)
    actual_finish = times.actual_finish
    return {
        "id": identification,
        "name": ifc_text(task.Name),
        "duration": str(duration),
        "calendar": calendar.name if calendar is not None else "",
        "wbs": wbs,
        "kind": kind,
        "constraint": constraint,
        "constraint_date": constraint_date.isoformat() if constraint else "",
        "party": ifc_text(facts.get("Party")),
        "risk": "",
        "actual_start": actual_start.isoformat() if actual_start else "",
        "actual_finish": actual_finish.isoformat() if actual_finish else "",
        "remaining": remaining_text,
    }


def _read_activities(
    leaves: list,
    ids: dict[int, str],
    task_calendar: dict[int, CalendarRead | None],
    ours: dict[int, dict],
    parent: dict[int, object],
    has_predecessor: set[int],
    findings: Findings,
) -> tuple[list[dict], list[dict], set[dt.date], dict[int, int]]:
    """The activities' rows, the file's own dates of each timed task (``id, start, finish``),
    the distinct StatusTime dates, and each activity's duration by entity id (for ratio lags)."""
    rows, file_dates = [], []
    dated_statuses = set()
    durations: dict[int, int] = {}
    for task in leaves:
        identification = ids[task.id()]
        calendar = task_calendar[task.id()]
        times = _task_times(task, identification, calendar, findings)
        if times.present:
            if times.status is not None:
                dated_statuses.add(times.status)
            file_dates.append({"id": identification, "start": times.early_start, "finish": times.early_finish})
        row = _activity_row(
            task, identification, calendar, ours.get(task.id(), {}), times, parent, has_predecessor, findings
        )
        rows.append(row)
        durations[task.id()] = int(row["duration"])
    return rows, file_dates, dated_statuses, durations


# -- the reader ------------------------------------------------------------------------------------
def _work_schedule_read(
    schedule,
    schedule_facts: dict,
    calendars: dict[str, CalendarRead],
    rows: list[dict],
    link_rows: list[dict],
    file_dates: list[dict],
    dated_statuses: set[dt.date],
    findings: Findings,
) -> WorkScheduleRead:
    """The tables of the read: the data date is our property set's, else the tasks' StatusTime
    when they all give the same one."""
    data_date = parse_date(schedule_facts.get("DataDate"))
    if data_date is None and len(dated_statuses) == 1:
        data_date = next(iter(dated_statuses))
    activities = pd.DataFrame(rows, columns=list(COLUMNS["activities"])).astype(str)
    links = pd.DataFrame(link_rows, columns=list(COLUMNS["links"])).astype(str)
    dates_frame = pd.DataFrame(file_dates, columns=["id", "start", "finish"])
    for column in ("start", "finish"):
        dates_frame[column] = pd.to_datetime(dates_frame[column])
    return WorkScheduleRead(
        ifc_text(schedule.Name),
        activities,
        links,
        calendars,
        data_date,
        schedule_facts,
        dates_frame,
        findings.frame(),
        parse_date(schedule.StartTime),
    )


def read_work_schedule(path: str | Path, *, work_schedule: str | None = None) -> WorkScheduleRead:
    """Read one IFC work schedule into case-format tables.

    Parameters
    ----------
    path : str or pathlib.Path
        The .ifc file.
    work_schedule : str, optional
        Name, Identification or GlobalId of the work schedule when the file holds several.

    Returns
    -------
    WorkScheduleRead
        The activities, links and calendars as text tables, the file's own dates and the
        findings.

    Raises
    ------
    delay.errors.CaseError
        When the file is not IFC, holds no (or no such) work schedule, a task's
        Identification repeats, or the schedule has no task.
    delay.ifc.IfcExtraMissing
        When ifcopenshell is not installed.

    References
    ----------
    ISO 16739-1:2018 (IFC 4): IfcWorkSchedule, IfcTask, IfcTaskTime, IfcRelSequence,
    IfcLagTime, IfcWorkCalendar.
    """
    path = Path(path)
    model, schedule = _open_schedule(path, work_schedule)
    findings = Findings()
    controls = _assigned_controls(model)
    children, parent = _nested(model)
    ours = _psets_named(model, SCHEDULING_PSET)
    tasks, seen = _schedule_tasks(schedule, children, path)
    leaves = _leaf_tasks(tasks, children, findings)
    calendars, task_calendar = _read_calendars(leaves, schedule, controls, parent, findings)
    ids = _task_ids(leaves, findings, path)
    link_rows, raw_lags, has_predecessor = _read_links(model, ids, seen, findings)
    rows, file_dates, dated_statuses, durations = _read_activities(
        leaves, ids, task_calendar, ours, parent, has_predecessor, findings
    )
    link_rows = _with_lags(link_rows, raw_lags, durations, task_calendar, findings)
    schedule_facts = {
        k: (v.isoformat() if isinstance(v, dt.date) else v) for k, v in ours.get(schedule.id(), {}).items()
    }
    return _work_schedule_read(
        schedule, schedule_facts, calendars, rows, link_rows, file_dates, dated_statuses, findings
    )


# -- into the case -------------------------------------------------------------------------------------
def _case_calendar(case, name: str) -> CalendarRead | None:
    table = case.calendars
    found = table[table["calendar"] == name]
    if not len(found):
        return None
    from ..calendars import parse_workdays

    holidays, extra_workdays = case_calendar_days(case, name)
    return CalendarRead(
        name=name, weekmask=parse_workdays(found["workdays"].iloc[0]), holidays=holidays, extra_workdays=extra_workdays
    )


def _place_calendars(
    case, calendars: dict[str, CalendarRead], findings: Findings
) -> tuple[dict[str, str], list[CalendarRead]]:
    """The case calendar each read calendar becomes: an equal one of the same name, or a new
    one (renamed ``NAME-ifc`` when the case has a different calendar of that name)."""
    names: dict[str, str] = {}
    added: list[CalendarRead] = []
    taken = set(case.calendars["calendar"])
    for name, read in calendars.items():
        candidate, number = name, 1
        while True:
            existing = _case_calendar(case, candidate)
            if existing is None:
                if candidate in taken:
                    candidate = f"{name}-ifc{number}"
                    number += 1
                    continue
                read.name = candidate
                added.append(read)
                taken.add(candidate)
                break
            if existing.effective() == read.effective():
                break
            findings.add(
                "calendar",
                f"the case has a different calendar named '{candidate}'; the file's calendar "
                f"is read under another name",
                subject=name,
            )
            candidate = f"{name}-ifc" if number == 1 else f"{name}-ifc{number}"
            number += 1
        names[name] = candidate
    return names, added


def _append_rows(path: Path, columns: list[str], rows: list[dict]) -> bytes:
    if path.is_file():
        existing = pd.read_csv(path, dtype=str, keep_default_na=False, encoding="utf-8-sig")
    else:
        existing = pd.DataFrame(columns=columns)
    for column in columns:
        if column not in existing.columns:
            existing[column] = ""
    added = pd.DataFrame(rows, columns=columns).reindex(columns=list(existing.columns), fill_value="")
    return csv_bytes(pd.concat([existing, added], ignore_index=True).fillna(""))


def _toml_text(value: str) -> str:
    return json.dumps(value, ensure_ascii=False)


_FOLDER_NAME = re.compile(r"^[^./\\][^/\\]*$")


def _check_options(root: Path, folder: str, kind: str | None, replace: bool) -> tuple[Path, str]:
    """The snapshot folder to write and the snapshot's kind. Refused: a folder that is not a
    plain name, one that exists (unless ``replace``), a kind other than baseline or update."""
    if not _FOLDER_NAME.match(folder or ""):
        raise CaseError(
            Problem(
                file="snapshots/",
                message=f"'{folder}' is not a folder name",
                fix="give --snapshot a plain name such as 2025-06-30",
            )
        )
    target = root / "snapshots" / folder
    if target.exists() and not replace:
        raise CaseError(
            Problem(
                file=f"snapshots/{folder}",
                message="the snapshot folder exists",
                fix="choose another --snapshot, or give --replace to replace it",
            )
        )
    kind = kind or ("baseline" if folder == "baseline" else "update")
    if kind not in ("baseline", "update"):
        raise CaseError(
            Problem(
                file=f"snapshots/{folder}",
                message=f"the kind '{kind}' is not baseline or update",
                fix="give --kind baseline or --kind update",
            )
        )
    return target, kind


def _resolve_data_date(data_date: dt.date | str | None, read: WorkScheduleRead, kind: str, model_path: Path) -> dt.date:
    """The data date given (a date or ``YYYY-MM-DD``), else the file's, else for a baseline the
    work schedule's StartTime; refused when there is none."""
    if isinstance(data_date, str):
        try:
            data_date = dt.date.fromisoformat(data_date)
        except ValueError:
            raise CaseError(
                Problem(
                    file=str(model_path),
                    message=f"the data date '{data_date}' is not a date",
                    fix="write it as YYYY-MM-DD",
                )
            ) from None
    if data_date is None:
        data_date = read.data_date
    if data_date is None and kind == "baseline":
        data_date = read.start_time
    if data_date is None:
        raise CaseError(
            Problem(
                file=str(model_path),
                message="the file does not say the data date of the programme",
                fix="give it with --data-date YYYY-MM-DD",
            )
        )
    return data_date


def _check_other_snapshots(case, folder: str, data_date: dt.date, label: str) -> None:
    """Refused when another snapshot of the case has the same data date, or the label as its
    label or folder."""
    for snap in case.snapshots:
        if snap.folder == folder:
            continue
        if snap.data_date == data_date:
            raise CaseError(
                Problem(
                    file=f"snapshots/{folder}",
                    message=f"the data date {data_date} is also the data date of '{snap.folder}'",
                    fix="give another --data-date, or --replace that snapshot",
                )
            )
        if label in (snap.label, snap.folder):
            raise CaseError(
                Problem(
                    file=f"snapshots/{folder}",
                    message=f"the label '{label}' is also used by '{snap.folder}'",
                    fix="give another --label",
                )
            )


def _check_actual_dates(activities: pd.DataFrame, data_date: dt.date, model_path: Path) -> None:
    """Refused when a task's actual start or finish is on or after the data date (the first 50
    such dates named)."""
    problems = []
    for identification, start, finish in zip(activities["id"], activities["actual_start"], activities["actual_finish"]):
        for what, value in (("actual start", start), ("actual finish", finish)):
            if value and dt.date.fromisoformat(value) >= data_date:
                problems.append(
                    Problem(
                        file=str(model_path),
                        message=f"the task '{identification}' has an {what} "
                        f"{value} on or after the data date {data_date}",
                        fix="give the data date with --data-date, or correct the task's task time",
                    )
                )
    if problems:
        raise CaseError(problems[:50])


def _calendar_files(root: Path, added: list[CalendarRead]) -> dict[str, bytes]:
    """calendars.csv, and calendar_exceptions.csv when they have exceptions, with the calendars
    ``added`` appended (no file when no calendar is added)."""
    files: dict[str, bytes] = {}
    if not added:
        return files
    files["calendars.csv"] = _append_rows(
        root / "calendars.csv", ["calendar", "workdays"], [{"calendar": c.name, "workdays": c.workdays} for c in added]
    )
    rows = []
    for calendar in added:
        for day, reason in sorted(calendar.holidays.items()):
            rows.append({"calendar": calendar.name, "date": day.isoformat(), "working": "no", "reason": reason})
        for day, reason in sorted(calendar.extra_workdays.items()):
            rows.append({"calendar": calendar.name, "date": day.isoformat(), "working": "yes", "reason": reason})
    if rows:
        files["calendar_exceptions.csv"] = _append_rows(
            root / "calendar_exceptions.csv", ["calendar", "date", "working", "reason"], rows
        )
    return files


def _snapshot_files(
    label: str, data_date: dt.date, kind: str, activities: pd.DataFrame, links: pd.DataFrame
) -> dict[str, bytes]:
    """The files of the snapshot folder, by name: snapshot.toml, activities.csv and links.csv."""
    snapshot_toml = (
        f"label = {_toml_text(label)}\ndata_date = {data_date.isoformat()}\nkind = {_toml_text(kind)}\n"
    ).encode()
    return {
        "snapshot.toml": snapshot_toml,
        "activities.csv": csv_bytes(activities),
        "links.csv": csv_bytes(links),
    }


def _compare_dates(file_dates: pd.DataFrame, result, findings: Findings) -> None:
    """A finding for each activity (the first 50, then their count) whose dates in the file
    differ from the early dates of the toolkit's critical path method (``result``)."""
    compared = file_dates.dropna(subset=["start", "finish"], how="all").set_index("id")
    if not len(compared):
        return
    ours = result.activities.set_index("id")[["early_start", "early_finish"]]
    joined = compared.join(ours, how="inner")
    differ = joined[(joined["start"] != joined["early_start"]) | (joined["finish"] != joined["early_finish"])]
    for identification, row in differ.head(50).iterrows():
        findings.add(
            "dates_differ",
            f"the file schedules it {_day(row['start'])} to {_day(row['finish'])}; the "
            f"toolkit's critical path method gives {_day(row['early_start'])} to "
            f"{_day(row['early_finish'])}",
            subject=str(identification),
        )
    if len(differ) > 50:
        findings.add("dates_differ", f"{len(differ) - 50} more activities whose dates differ")


def _write_import(root: Path, target: Path, files: dict[str, bytes], snapshot_files: dict[str, bytes]) -> list[Path]:
    """Write the case's calendar files, then the snapshot folder (built under a temporary name
    and moved into place whole); returns the paths written."""
    written = [write_bytes(root / name, content) for name, content in files.items()]
    with replace_directory(target) as building:
        for name, content in snapshot_files.items():
            (building / name).write_bytes(content)
    return written + [target / name for name in snapshot_files]


def import_work_schedule(
    model_path: str | Path,
    case_path: str | Path,
    folder: str,
    *,
    data_date: dt.date | str | None = None,
    label: str | None = None,
    kind: str | None = None,
    work_schedule: str | None = None,
    replace: bool = False,
) -> ScheduleImport:
    """Read an IFC work schedule into the snapshot folder ``snapshots/FOLDER`` of a case.

    Writes snapshot.toml, activities.csv, links.csv and ifc_findings.csv into the folder
    (built under a temporary name and moved into place whole), and adds the file's
    calendars that the case does not have to calendars.csv and calendar_exceptions.csv.
    The new snapshot is loaded with the case's settings and calendars before anything is
    written.

    Parameters
    ----------
    model_path : str or pathlib.Path
        The .ifc file holding the work schedule.
    case_path : str or pathlib.Path
        The case folder.
    folder : str
        The snapshot folder to write (``2025-06-30``, ``baseline``).
    data_date : datetime.date or str, optional
        The snapshot's data date (a date or ``YYYY-MM-DD``); default the one the file gives
        (our property set on the work schedule, else the tasks' common StatusTime), else for
        a baseline the work schedule's StartTime.
    label : str, optional
        The snapshot's label; default the label the file gives (our property set), else
        the folder name.
    kind : {"baseline", "update"}, optional
        Default ``baseline`` for the folder ``baseline``, else ``update``.
    work_schedule : str, optional
        Which work schedule, when the file holds several.
    replace : bool, default False
        Replace the folder when it exists.

    Returns
    -------
    ScheduleImport
        What was read, where it was written and the findings.

    Raises
    ------
    delay.errors.CaseError
        Any problem with the file, the options or the snapshot it gives (a folder that is
        not a plain name or exists without ``replace``, an unknown kind, no data date, a data
        date or label another snapshot has, an actual date on or after the data date, a
        snapshot that would not load); nothing is written then.
    delay.ifc.IfcExtraMissing
        When ifcopenshell is not installed.
    """
    from ..case import load_case
    from ..cpm import schedule

    case = load_case(Path(case_path))
    root = case_folder(case)
    model_path = Path(model_path)
    target, kind = _check_options(root, folder, kind, replace)
    read = read_work_schedule(model_path, work_schedule=work_schedule)
    findings = Findings()
    findings.rows.extend(read.findings.to_dict("records"))
    data_date = _resolve_data_date(data_date, read, kind, model_path)
    label = label or str(read.facts.get("SnapshotLabel") or "") or folder
    _check_other_snapshots(case, folder, data_date, label)
    activities = read.activities.copy()
    _check_actual_dates(activities, data_date, model_path)
    names, added = _place_calendars(case, read.calendars, findings)
    activities["calendar"] = activities["calendar"].map(lambda c: names.get(c, c) if c else "")
    files = _calendar_files(root, added)
    snapshot_files = _snapshot_files(label, data_date, kind, activities, read.links)
    base = f"snapshots/{folder}"
    copies = ["baseline"] if folder != "baseline" else []
    checked = validate_in_copy(root, {**files, **{f"{base}/{k}": v for k, v in snapshot_files.items()}}, copies)
    _compare_dates(read.file_dates, schedule(checked, folder), findings)
    findings_frame = findings.frame()
    snapshot_files[FINDINGS_FILE] = csv_bytes(findings_frame)
    written = _write_import(root, target, files, snapshot_files)
    return ScheduleImport(
        read, target, data_date, label, kind, tuple(c.name for c in added), findings_frame, tuple(written)
    )


def _day(value) -> str:
    return "no date" if pd.isna(value) else pd.Timestamp(value).date().isoformat()
