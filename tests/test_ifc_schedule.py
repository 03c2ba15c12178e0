"""``delay import-ifc-schedule``: an IFC 4 work schedule read into a snapshot folder.

The work schedule is built with ifcopenshell.api.sequence (work schedule, tasks, task
times, sequences with lags, a work calendar) and read back; the snapshot it gives is then
scheduled by delay.cpm and checked against dates worked by hand below. Work-day numbers
are turned into dates with numpy's business-day functions (numpy.busday_offset with the
calendar's weekmask and holiday), the reference library for work-day arithmetic.

The programme (work calendar "Site week": Monday to Friday, 08:00-12:00 and 13:00-17:00,
so 8 working hours a day; Monday 2025-03-10 a holiday; data date Monday 2025-03-03):

    M0  start milestone
    A   5 days            M0 -> A  FS
    B   3 days            A -> B   FS, lag P2D
    C   2 days            A -> C   SS, lag P1D
    D   PT16H = 2 days    B -> D   FS;   C -> D  FS, lead -P1D
    M1  finish milestone  D -> M1  FS;   C -> M1 FF
    X   P1M (months cannot be counted in work days), scheduled 2025-03-03 to 2025-03-04
        in the file: its duration is taken from those dates, 2 work days; no links
    B and C are nested in the summary task S1, which gives them their wbs.

Worked by hand (day k = k-th work day from the data date: day 0 = 03-03 ... day 4 = 03-07,
day 5 = 03-11 (03-10 is the holiday), day 7 = 03-13, day 9 = 03-17, day 10 = 03-18, day 11 = 03-19):

    A: ES 0, EF 5 -> 03-03 .. 03-07        C: ES 0+1 = 1, EF 3 -> 03-04 .. 03-05
    B: ES 5+2 = 7, EF 10 -> 03-13 .. 03-17  D: ES max(10, 3-1) = 10, EF 12 -> 03-18 .. 03-19
    M1: boundary 12, dated by the day it follows: day 11 = 03-19 = completion
    Backward from 12: D LS 10 (TF 0); B LF 10 (TF 0); C LF min(LS(D) + 1, LF(M1)) = 11,
    TF 11 - 3 = 8, FF 10 - (3 - 1) = 8; A LF min(LS(B) - 2, LS(C) - 1 + 5) = min(5, 13) = 5, TF 0;
    X: EF 2, LF 12 (open end: completion), TF 10, FF 10.
"""

from __future__ import annotations

import ifcopenshell
import ifcopenshell.api
import ifcopenshell.api.control
import ifcopenshell.api.project
import ifcopenshell.api.pset
import ifcopenshell.api.root
import ifcopenshell.api.sequence
import numpy as np
import pandas as pd
from casewriter import write_case
from click.testing import CliRunner

from delay.case import load_case
from delay.commands.ifc import import_ifc_schedule
from delay.cpm import schedule
from delay.ifc import import_work_schedule, read_work_schedule

HOLIDAYS = ["2025-03-10"]


def day(k: int) -> pd.Timestamp:
    """The date of work day k after Monday 2025-03-03 (numpy's business-day reference)."""
    return pd.Timestamp(np.busday_offset("2025-03-03", k, roll="forward", weekmask="1111100", holidays=HOLIDAYS))


def build_schedule(path, progress: bool = False, extra=None):
    """The work schedule of the module docstring; ``progress`` adds the update of 2025-03-17."""
    api = ifcopenshell.api
    model = api.project.create_file(version="IFC4")
    api.root.create_entity(model, ifc_class="IfcProject", name="Schedule test")
    schedule_entity = api.sequence.add_work_schedule(model, name="Programme", start_time="2025-03-03T08:00:00")
    calendar = api.sequence.add_work_calendar(model, name="Site week")
    week = api.sequence.add_work_time(model, work_calendar=calendar, time_type="WorkingTimes")
    api.sequence.edit_work_time(model, work_time=week, attributes={"Name": "Weekdays"})
    pattern = api.sequence.assign_recurrence_pattern(model, parent=week, recurrence_type="WEEKLY")
    api.sequence.edit_recurrence_pattern(
        model, recurrence_pattern=pattern, attributes={"WeekdayComponent": [1, 2, 3, 4, 5]}
    )
    api.sequence.add_time_period(model, recurrence_pattern=pattern, start_time="08:00:00", end_time="12:00:00")
    api.sequence.add_time_period(model, recurrence_pattern=pattern, start_time="13:00:00", end_time="17:00:00")
    holiday = api.sequence.add_work_time(model, work_calendar=calendar, time_type="ExceptionTimes")
    api.sequence.edit_work_time(
        model, work_time=holiday, attributes={"Name": "Test holiday", "Start": "2025-03-10", "Finish": "2025-03-10"}
    )
    summary = api.sequence.add_task(model, work_schedule=schedule_entity, name="Structure", identification="S1")
    tasks = {}
    for identification, name, duration, parent in (
        ("M0", "Start", "P0D", None),
        ("A", "Excavate", "P5D", None),
        ("B", "Pour", "P3D", summary),
        ("C", "Cure", "P2D", summary),
        ("D", "Finish works", "PT16H", None),
        ("M1", "Complete", "P0D", None),
        ("X", "Permit", None, None),
    ):
        if parent is None:
            task = api.sequence.add_task(
                model,
                work_schedule=schedule_entity,
                name=name,
                identification=identification,
                predefined_type="CONSTRUCTION",
            )
        else:
            task = api.sequence.add_task(model, parent_task=parent, name=name, predefined_type="CONSTRUCTION")
            task.Identification = identification  # the API numbers nested tasks after their parent
        time = api.sequence.add_task_time(model, task=task)
        if duration is not None:
            api.sequence.edit_task_time(
                model, task_time=time, attributes={"ScheduleDuration": duration, "DurationType": "WORKTIME"}
            )
        if identification.startswith("M"):
            api.sequence.edit_task(model, task=task, attributes={"IsMilestone": True})
        tasks[identification] = task
    tasks["X"].TaskTime.ScheduleDuration = "P1M"
    tasks["X"].TaskTime.ScheduleStart = "2025-03-03T08:00:00"
    tasks["X"].TaskTime.ScheduleFinish = "2025-03-04T17:00:00"
    api.control.assign_control(model, relating_control=calendar, related_objects=list(tasks.values()))

    def link(pred, succ, kind, lag=None):
        rel = api.sequence.assign_sequence(
            model, relating_process=tasks[pred], related_process=tasks[succ], sequence_type=kind
        )
        if lag is not None:
            api.sequence.assign_lag_time(model, rel_sequence=rel, lag_value=lag, duration_type="WORKTIME")

    link("M0", "A", "FINISH_START")
    link("A", "B", "FINISH_START", "P2D")
    link("A", "C", "START_START", "P1D")
    link("B", "D", "FINISH_START")
    link("C", "D", "FINISH_START", "-P1D")
    link("D", "M1", "FINISH_START")
    link("C", "M1", "FINISH_FINISH")
    if progress:
        # Update of Monday 2025-03-17: A done 03-03 to 03-07, C done 03-04 to 03-05, B started
        # 03-13 with 2 days to go; every task's status assessed on the data date.
        for identification, start, finish in (
            ("A", "2025-03-03", "2025-03-07"),
            ("C", "2025-03-04", "2025-03-05"),
            ("M0", "2025-03-03", "2025-03-03"),
            ("X", "2025-03-03", "2025-03-04"),
            ("B", "2025-03-13", None),
        ):
            time = tasks[identification].TaskTime
            time.ActualStart = f"{start}T08:00:00"
            if finish:
                time.ActualFinish = f"{finish}T17:00:00"
        tasks["B"].TaskTime.RemainingTime = "P2D"
        for task in tasks.values():
            task.TaskTime.StatusTime = "2025-03-17T00:00:00"
    if extra:
        extra(model, tasks)
    model.write(str(path))
    return path


def empty_case(root):
    """A case whose baseline the import replaces."""
    return write_case(
        root, activities=[{"id": "S", "name": "Start", "duration": 0, "kind": "start_milestone"}], start="2025-03-03"
    )


def test_read_maps_tasks_durations_links_lags_and_calendar(tmp_path):
    read = read_work_schedule(build_schedule(tmp_path / "programme.ifc"))
    activities = read.activities.set_index("id")
    # the summary task S1 is not an activity; its tasks B and C follow it (it was added first)
    # and take its Identification as wbs
    assert list(activities.index) == ["B", "C", "M0", "A", "D", "M1", "X"]
    assert dict(activities["duration"]) == {"M0": "0", "A": "5", "B": "3", "C": "2", "D": "2", "M1": "0", "X": "2"}
    assert dict(activities["kind"]) == {
        "M0": "start_milestone",
        "A": "task",
        "B": "task",
        "C": "task",
        "D": "task",
        "M1": "finish_milestone",
        "X": "task",
    }
    assert (activities.loc["B", "wbs"], activities.loc["C", "wbs"], activities.loc["A", "wbs"]) == ("S1", "S1", "")
    links = {(r.pred, r.succ): (r.type, r.lag) for r in read.links.itertuples()}
    assert links == {
        ("M0", "A"): ("FS", "0"),
        ("A", "B"): ("FS", "2"),
        ("A", "C"): ("SS", "1"),
        ("B", "D"): ("FS", "0"),
        ("C", "D"): ("FS", "-1"),
        ("D", "M1"): ("FS", "0"),
        ("C", "M1"): ("FF", "0"),
    }
    calendar = read.calendars["Site week"]
    assert calendar.workdays == "Mon Tue Wed Thu Fri" and calendar.hours_per_day == 8.0
    assert {d.isoformat(): r for d, r in calendar.holidays.items()} == {"2025-03-10": "Test holiday"}
    kinds = {(f.kind, f.subject) for f in read.findings.itertuples()}
    assert ("summary_task", "S1") in kinds
    assert ("duration", "X") in kinds  # months, then the dates


def test_imported_baseline_schedules_as_worked_by_hand(tmp_path):
    case = empty_case(tmp_path / "case")
    result = import_work_schedule(build_schedule(tmp_path / "programme.ifc"), case, "baseline", replace=True)
    # no data date in the file: a baseline takes the work schedule's StartTime
    assert result.data_date.isoformat() == "2025-03-03" and result.kind == "baseline"
    assert result.calendars_added == ("Site week",)
    loaded = load_case(case)
    exceptions = loaded.calendar_exceptions
    assert list(exceptions["date"].dt.strftime("%Y-%m-%d")) == HOLIDAYS and not exceptions["working"].any()
    table = schedule(loaded, "baseline").activities.set_index("id")
    expected = {  # (early start, early finish, total float, free float) as worked in the docstring
        "A": (day(0), day(4), 0, 0),
        "B": (day(7), day(9), 0, 0),
        "C": (day(1), day(2), 8, 8),
        "D": (day(10), day(11), 0, 0),
        "M1": (day(11), day(11), 0, 0),
        "X": (day(0), day(1), 10, 10),
    }
    for identification, (start, finish, total, free) in expected.items():
        row = table.loc[identification]
        assert (row["early_start"], row["early_finish"], row["total_float"], row["free_float"]) == (
            start,
            finish,
            total,
            free,
        ), identification
    assert str(schedule(loaded, "baseline").completion) == "2025-03-19"


def test_imported_update_keeps_progress(tmp_path):
    case = empty_case(tmp_path / "case")
    import_work_schedule(build_schedule(tmp_path / "baseline.ifc"), case, "baseline", replace=True)
    result = import_work_schedule(build_schedule(tmp_path / "update.ifc", progress=True), case, "2025-03-17")
    assert result.data_date.isoformat() == "2025-03-17" and result.kind == "update"  # the tasks' StatusTime
    assert result.calendars_added == ()  # the same calendar as the baseline's: reused
    loaded = load_case(case)
    update = loaded.snapshot("2025-03-17").activities.set_index("id")
    assert update.loc["A", "actual_finish"] == pd.Timestamp("2025-03-07") and update.loc["B", "remaining"] == 2
    table = schedule(loaded, "2025-03-17").activities.set_index("id")
    # B: started 03-13, 2 days remaining from the data date (day 9 = 03-17): 03-17 .. 03-18;
    # D: FS from B -> days 11 .. 12 = 03-19 .. 03-20; M1 dated 03-20.
    assert table.loc["B", "early_finish"] == day(10)
    assert (table.loc["D", "early_start"], table.loc["D", "early_finish"]) == (day(11), day(12))
    assert table.loc["A", "status"] == "complete" and pd.isna(table.loc["A", "total_float"])
    assert str(schedule(loaded, "2025-03-17").completion) == "2025-03-20"


def test_bad_schedules_exit_2_and_write_nothing(tmp_path):
    case = empty_case(tmp_path / "case")
    before = sorted(p.name for p in (case / "snapshots").iterdir())

    def twice(model, tasks):
        tasks["B"].Identification = "A"

    path = build_schedule(tmp_path / "twice.ifc", extra=twice)
    runner = CliRunner()
    done = runner.invoke(
        import_ifc_schedule, [str(path), str(case), "--snapshot", "baseline", "--replace"], catch_exceptions=False
    )
    assert done.exit_code == 2
    assert "Identification 'A'" in done.output and "Traceback" not in done.output
    # an update whose actual dates are not before the data date given
    good = build_schedule(tmp_path / "update.ifc", progress=True)
    done = runner.invoke(
        import_ifc_schedule,
        [str(good), str(case), "--snapshot", "2025-03-05", "--data-date", "2025-03-05"],
        catch_exceptions=False,
    )
    assert done.exit_code == 2 and "on or after the data date" in done.output
    # an existing folder is not replaced without --replace
    done = runner.invoke(import_ifc_schedule, [str(good), str(case), "--snapshot", "baseline"], catch_exceptions=False)
    assert done.exit_code == 2 and "--replace" in done.output
    assert sorted(p.name for p in (case / "snapshots").iterdir()) == before
    assert not (case / "calendar_exceptions.csv").exists()
