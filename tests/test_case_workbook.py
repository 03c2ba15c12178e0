"""The workbook form of a case (case-format v1: one case.xlsx, one sheet per file).

Two kinds of check: a workbook built by hand here with openpyxl (not by the toolkit's own
writer) loads as the format describes, with problems named by sheet and sheet row; and a
case folder written out with write_workbook loads back to the same tables.
"""

from __future__ import annotations

import datetime as dt

import openpyxl
import pandas.testing as pdt
import pytest
from test_case_support import make_case, problem_at

from delay.case import load_case, write_workbook
from delay.errors import CaseError
from delay.model import COLUMNS


def hand_built_workbook(path, links=(("Baseline", "A", "B", "", None), ("Baseline", "B", "M", "FF", 1))):
    """A workbook typed in as a user would: snapshots named by label, no folder column."""
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.title = "case"
    sheet.append(["key", "value"])
    sheet.append(["project.name", "Harbour office"])
    sheet.append(["project.contract_start", dt.datetime(2025, 1, 6)])  # a real date cell
    sheet.append(["project.contract_completion", dt.datetime(2025, 12, 19)])
    sheet.append(["schedule.default_calendar", "5d"])
    sheet.append(["analysis.half_step", False])
    calendars = book.create_sheet("calendars")
    calendars.append(["calendar", "workdays"])
    calendars.append(["5d", "Mon Tue Wed Thu Fri"])
    snapshots = book.create_sheet("snapshots")
    snapshots.append(["label", "data_date", "kind"])
    snapshots.append(["Baseline", dt.datetime(2025, 1, 6), "baseline"])
    snapshots.append(["Update 01", dt.datetime(2025, 2, 3), "update"])
    activities = book.create_sheet("activities")
    activities.append(["snapshot", "id", "name", "duration", "kind", "actual_start", "actual_finish", "remaining"])
    activities.append(["Baseline", "A", "Excavate", 3, None, None, None, None])
    activities.append(["Baseline", "B", "Foundations", 2.0, None, None, None, None])
    activities.append(["Baseline", "M", "Ready", 0, "finish_milestone", None, None, None])
    activities.append(["Update 01", "A", "Excavate", 3, None, dt.datetime(2025, 1, 6), dt.datetime(2025, 1, 8), 0])
    activities.append(["Update 01", "B", "Foundations", 2, None, dt.datetime(2025, 1, 9), None, 1])
    activities.append(["Update 01", "M", "Ready", 0, "finish_milestone", None, None, None])
    sheet = book.create_sheet("links")
    sheet.append(["snapshot", "pred", "succ", "type", "lag"])
    for row in links:
        sheet.append(list(row))
    for row in (("Update 01", "A", "B", "FS", 0), ("Update 01", "B", "M", "FS", 0)):
        sheet.append(list(row))
    holidays = book.create_sheet("calendar_exceptions")
    holidays.append(["calendar", "date", "working", "reason"])
    holidays.append(["5d", dt.datetime(2025, 4, 18), "no", "public holiday"])
    book.save(path)
    return path


def test_hand_built_workbook_loads(tmp_path):
    case = load_case(hand_built_workbook(tmp_path / "case.xlsx"))
    assert case.settings.project.name == "Harbour office"
    assert case.settings.project.contract_start == dt.date(2025, 1, 6)
    assert case.settings.analysis.half_step is False
    # Without a folder column, a snapshot's folder is its label.
    assert [(s.folder, s.kind, s.data_date) for s in case.snapshots] == [
        ("Baseline", "baseline", dt.date(2025, 1, 6)),
        ("Update 01", "update", dt.date(2025, 2, 3)),
    ]
    baseline = case.baseline.activities
    assert baseline["duration"].tolist() == [3, 2, 0]  # 2.0 in the sheet is 2 work days
    assert list(baseline.columns) == list(COLUMNS["activities"])
    update = case.snapshot("Update 01").activities
    assert str(update["actual_finish"].iat[0].date()) == "2025-01-08"
    links = case.baseline.links
    assert links[["type", "lag"]].values.tolist() == [["FS", 0], ["FF", 1]]
    assert case.calendar_exceptions["date"].iat[0].date() == dt.date(2025, 4, 18)
    assert case.input_files == (tmp_path / "case.xlsx",)
    assert case.root == tmp_path / "case.xlsx"


def test_folder_holding_only_the_workbook(tmp_path):
    hand_built_workbook(tmp_path / "case.xlsx")
    assert load_case(tmp_path).settings.project.name == "Harbour office"


def test_workbook_problem_names_sheet_and_sheet_row(tmp_path):
    # Links sheet: row 1 header, row 2 A>B, row 3 B>Q where Q is not an activity.
    path = hand_built_workbook(
        tmp_path / "case.xlsx", links=(("Baseline", "A", "B", "", None), ("Baseline", "B", "Q", "", None))
    )
    problem_at(path, "case.xlsx:links", 3, "succ", "'Q' is not an activity")


def test_workbook_row_naming_unknown_snapshot(tmp_path):
    path = hand_built_workbook(
        tmp_path / "case.xlsx", links=(("Baseline", "A", "B", "", None), ("Update 7", "B", "M", "", None))
    )
    problem_at(path, "case.xlsx:links", 3, "snapshot", "'Update 7' is not in the snapshots sheet")


def test_workbook_bad_setting_names_its_row(tmp_path):
    path = hand_built_workbook(tmp_path / "case.xlsx")
    book = openpyxl.load_workbook(path)
    book["case"].append(["schedule.progress", "foo"])  # row 7 of the case sheet
    book.save(path)
    problem_at(path, "case.xlsx:case", 7, "value", "schedule.progress must be one of")


def test_workbook_missing_sheet(tmp_path):
    path = hand_built_workbook(tmp_path / "case.xlsx")
    book = openpyxl.load_workbook(path)
    del book["links"]
    book.save(path)
    problem_at(path, "case.xlsx", None, None, "sheet 'links' is missing")


def assert_same_case(left, right):
    assert left.settings == right.settings
    assert [(s.folder, s.label, s.kind, s.data_date) for s in left.snapshots] == [
        (s.folder, s.label, s.kind, s.data_date) for s in right.snapshots
    ]
    for a, b in zip(left.snapshots, right.snapshots):
        pdt.assert_frame_equal(a.activities, b.activities)
        pdt.assert_frame_equal(a.links, b.links)
    if left.asbuilt_snapshot is None:
        assert right.asbuilt_snapshot is None
    else:
        assert left.asbuilt_snapshot.data_date == right.asbuilt_snapshot.data_date
        pdt.assert_frame_equal(left.asbuilt_snapshot.activities, right.asbuilt_snapshot.activities)
    for name in (
        "calendars",
        "calendar_exceptions",
        "asbuilt",
        "corrections",
        "events",
        "fragnets",
        "fragnet_links",
        "elements",
        "sections",
        "extensions_granted",
        "prolongation_rates",
    ):
        pdt.assert_frame_equal(left.table(name), right.table(name), obj=name)
    assert [(c.snapshot, c.key, c.column, c.original, c.corrected) for c in left.corrections] == [
        (c.snapshot, c.key, c.column, c.original, c.corrected) for c in right.corrections
    ]


def test_folder_and_its_workbook_give_the_same_tables(tmp_path):
    corrections = [
        {
            "snapshot": "Update 01",
            "table": "activities",
            "key": "B",
            "column": "remaining",
            "value": "2",
            "reason": "diary",
        },
        {"snapshot": "baseline", "table": "links", "key": "A>M", "column": "add", "value": "FS 0", "reason": "logic"},
    ]
    root = make_case(
        tmp_path,
        files={"corrections.csv": corrections},
        schedule={"lag_calendar": "predecessor"},
        commercial={"currency": "USD"},
    )
    folder_case = load_case(root)
    path = write_workbook(folder_case, tmp_path / "out" / "case.xlsx")
    workbook_case = load_case(path)
    assert_same_case(folder_case, workbook_case)
    # and once more from the workbook to a workbook
    again = load_case(write_workbook(path, tmp_path / "again.xlsx"))
    assert_same_case(folder_case, again)


def test_workbook_cells_are_real_dates(tmp_path):
    path = write_workbook(make_case(tmp_path), tmp_path / "case.xlsx")
    book = openpyxl.load_workbook(path)  # not read-only: rows come back full width
    rows = list(book["activities"].iter_rows(values_only=True))
    header = rows[0]
    assert header[0] == "snapshot"
    start = [r[header.index("actual_start")] for r in rows[1:] if r[0] == "u1"][0]
    assert isinstance(start, dt.datetime) and start.date() == dt.date(2025, 1, 6)
    snapshots = list(book["snapshots"].iter_rows(values_only=True))
    assert snapshots[0] == ("label", "data_date", "kind", "folder")
    assert snapshots[2][1].date() == dt.date(2025, 2, 3) and snapshots[2][3] == "u1"
    case_rows = dict(list(book["case"].iter_rows(values_only=True))[1:])
    assert case_rows["project.contract_start"].date() == dt.date(2025, 1, 6)
    assert set(book.sheetnames) >= {
        "case",
        "snapshots",
        "activities",
        "links",
        "calendars",
        "events",
        "prolongation_rates",
        "extensions_granted",
    }
    book.close()


def test_workbook_of_a_broken_case_is_not_written(tmp_path):
    root = make_case(tmp_path, schedule={"progress": "foo"})
    with pytest.raises(CaseError):
        write_workbook(root, tmp_path / "out.xlsx")
    assert not (tmp_path / "out.xlsx").exists()
    assert [p.name for p in tmp_path.iterdir()] == ["case"]  # no temporary file left
