"""Bounds on what a case may hold, checked before anything is parsed or scheduled.

Dates lie within 1900-01-01 to 2200-12-31 and durations, lags and days within 36,500
(delay.model.FIRST_DATE, LAST_DATE, LARGEST_DAYS); settings files and workbooks are
checked for size and depth before a parser sees them; names the format keeps for itself
are refused; a schedule that would run past 2200 is one problem naming the snapshot and
the durations or lags that drive it. Each case below gives one plain problem (file, row,
column) and, through the command line, exit 2 and no traceback.
"""

from __future__ import annotations

import copy
import subprocess
import sys
import zipfile

import openpyxl
import pytest
from casewriter import write_case, write_text
from test_case_support import ACTIVITIES, FILES, UPDATE, make_case, problem_at, problems_of

from delay.case import load_case, write_workbook
from delay.cpm import prepare, schedule
from delay.errors import CaseError

BASE = "snapshots/baseline/activities.csv"
BASE_LINKS = "snapshots/baseline/links.csv"
U1 = "snapshots/u1/activities.csv"


def rows_with(rows, index, **changes):
    rows = copy.deepcopy(rows)
    rows[index].update(changes)
    return rows


def file_with(name, index, **changes):
    return {name: rows_with(FILES[name], index, **changes)}


# ----------------------------------------------------------------- dates


@pytest.mark.parametrize("value", ["1899-12-31", "2201-01-01", "9999-12-31", "0001-01-01"])
def test_csv_date_outside_the_bounds(tmp_path, value):
    rows = rows_with(ACTIVITIES, 1, constraint="latest_finish", constraint_date=value)
    root = make_case(tmp_path, activities=rows, snapshots={})
    problem_at(root, BASE, 3, "constraint_date", "outside 1900-01-01 to 2200-12-31")


@pytest.mark.parametrize("value", ["1900-01-01", "2200-12-31"])
def test_csv_dates_on_the_bounds_are_accepted(tmp_path, value):
    rows = rows_with(ACTIVITIES, 1, constraint="earliest_start", constraint_date=value)
    case = load_case(make_case(tmp_path, activities=rows, snapshots={}))
    assert str(case.baseline.activities["constraint_date"].iat[1].date()) == value


def test_event_ending_far_in_the_future(tmp_path):
    # A hold to 9999-12-31: refused on loading, before any method models it.
    root = make_case(tmp_path, files=file_with("events.csv", 0, impact="hold", finish="9999-12-31", days=""))
    problem_at(root, "events.csv", 2, "finish", "outside 1900-01-01 to 2200-12-31")


def test_case_toml_date_outside_the_bounds(tmp_path):
    root = make_case(tmp_path, completion="2300-01-01")
    problem_at(root, "case.toml", None, "project.contract_completion", "must be a date from 1900-01-01 to 2200-12-31")


def test_data_date_outside_the_bounds(tmp_path):
    update = copy.deepcopy(UPDATE)
    update["u1"]["data_date"] = "2250-01-06"
    root = make_case(tmp_path, snapshots=update)
    problem_at(root, "snapshots/u1/snapshot.toml", None, "data_date", "outside 1900-01-01 to 2200-12-31")


# ----------------------------------------------------------------- days


@pytest.mark.parametrize(
    "file, column, value, row, words",
    [
        (BASE, "duration", 36_501, 2, "too large"),
        (BASE_LINKS, "lag", 36_501, 2, "out of range"),
        (BASE_LINKS, "lag", -36_501, 2, "out of range"),
        ("events.csv", "days", 36_501, 2, "too large"),
        ("events.csv", "days", 100_000_000, 2, "too large"),
        ("events.csv", "claimed_days", 36_501, 2, "too large"),
        ("extensions_granted.csv", "days", 10_000_000, 2, "too large"),
        ("extensions_granted.csv", "days", -36_501, 2, "below -36500"),
        ("fragnets.csv", "duration", 36_501, 2, "too large"),
        ("fragnet_links.csv", "lag", 36_501, 2, "out of range"),
    ],
)
def test_days_beyond_the_largest(tmp_path, file, column, value, row, words):
    if file == BASE:
        root = make_case(tmp_path, activities=rows_with(ACTIVITIES, 0, duration=value), snapshots={})
    elif file == BASE_LINKS:
        root = make_case(
            tmp_path, links=[{"pred": "A", "succ": "B", "lag": value}, {"pred": "B", "succ": "M"}], snapshots={}
        )
    else:
        root = make_case(tmp_path, files=file_with(file, 0, **{column: value}))
    problem = problem_at(root, file, row, column, words)
    assert "36,500" in problem.fix or "-36500" in problem.fix


def test_remaining_beyond_the_largest(tmp_path):
    update = copy.deepcopy(UPDATE)
    update["u1"]["activities"][1]["remaining"] = 36_501
    problem = problem_at(make_case(tmp_path, snapshots=update), U1, 3, "remaining", "too large")
    assert "at most 36,500 work days" in problem.fix


def test_largest_days_are_accepted(tmp_path):
    case = load_case(make_case(tmp_path, activities=rows_with(ACTIVITIES, 0, duration=36_500), snapshots={}))
    # 36,500 work days of a Mon-Fri calendar from 2025-01-06 end in about 2164: in bounds.
    assert schedule(case).completion.year == 2164


# ----------------------------------------------------------------- settings files


def test_toml_nested_a_hundred_thousand_deep(tmp_path):
    root = make_case(tmp_path)
    text = (root / "case.toml").read_text(encoding="utf-8")
    write_text(root, "case.toml", text + "[extra]\ndeep = " + "[" * 100_000 + "]" * 100_000 + "\n")
    problem = problem_at(root, "case.toml", None, None, "nest 100,")
    assert "more than the 32 levels" in problem.message


def test_toml_dotted_key_five_thousand_deep(tmp_path):
    root = make_case(tmp_path)
    deep = ".".join(["k"] * 5_000)
    write_text(root, "snapshots/u1/snapshot.toml", f'label = "Update 01"\ndata_date = 2025-02-03\n{deep} = 1\n')
    problem_at(root, "snapshots/u1/snapshot.toml", None, None, "levels deep")


def test_toml_too_large(tmp_path):
    root = make_case(tmp_path)
    text = (root / "case.toml").read_text(encoding="utf-8")
    write_text(root, "case.toml", text + "# " + "x" * (1024 * 1024) + "\n")
    problem_at(root, "case.toml", None, None, "more than the 1,048,576 bytes")


def test_toml_with_a_byte_order_mark(tmp_path):
    # Some editors save UTF-8 with a byte-order mark; it is not part of the settings.
    root = make_case(tmp_path)
    write_text(root, "case.toml", (root / "case.toml").read_text(encoding="utf-8"), bom=True)
    assert load_case(root).settings.project.name == "Test case"


def test_workbook_setting_name_five_thousand_parts(tmp_path):
    book = write_workbook(make_case(tmp_path), tmp_path / "book" / "case.xlsx")
    workbook = openpyxl.load_workbook(book)
    sheet = workbook["case"]
    sheet.append([".".join(["k"] * 5_000), 1])
    row = sheet.max_row
    workbook.save(book)
    problem_at(book, "case.xlsx:case", row, "key", "5,000 parts")


# ----------------------------------------------------------------- workbooks


def test_workbook_that_unpacks_too_large(tmp_path, monkeypatch):
    import delay.case._limits as limits

    book = write_workbook(make_case(tmp_path), tmp_path / "book" / "case.xlsx")
    with zipfile.ZipFile(book) as archive:
        unpacked = sum(entry.file_size for entry in archive.infolist())
    # The limit is lowered below this workbook's size, to test the check without writing
    # half a gibibyte; the sizes come from the archive's directory, before any parsing.
    monkeypatch.setattr(limits, "LARGEST_WORKBOOK", unpacked - 1)
    problems = problems_of(book)
    assert len(problems) == 1 and problems[0].file == "case.xlsx"
    assert f"unpacks to {unpacked:,} bytes, more than the {unpacked - 1:,}" in problems[0].message


def test_workbook_that_unpacks_to_a_lot_of_xml_is_refused_unparsed(tmp_path):
    # A small archive holding one sheet of 600 MiB of spaces (compressed about 1000:1):
    # refused from the archive's directory in well under the time openpyxl would take.
    book = write_workbook(make_case(tmp_path), tmp_path / "book" / "case.xlsx")
    with zipfile.ZipFile(book, "a", compression=zipfile.ZIP_DEFLATED) as archive:
        with archive.open("xl/worksheets/padding.xml", "w", force_zip64=True) as handle:
            block = b" " * (1 << 20)
            for _ in range(600):
                handle.write(block)
    assert book.stat().st_size < 5 * (1 << 20)
    problems = problems_of(book)
    assert len(problems) == 1 and "more than the 536,870,912 bytes" in problems[0].message


def test_sheet_with_too_many_rows(tmp_path, monkeypatch):
    import delay.case._limits as limits

    book = write_workbook(make_case(tmp_path), tmp_path / "book" / "case.xlsx")
    monkeypatch.setattr(limits, "LARGEST_SHEET_ROWS", 3)  # the activities sheet has 7 rows
    problems = problems_of(book)
    assert len(problems) == 1 and "rows, more than the 3 a sheet may hold" in problems[0].message


def test_rows_are_counted_across_pieces():
    # The row counter reads a sheet a mebibyte at a time; a tag cut by a piece's end must
    # be counted once. 300,000 rows of 9 bytes each run over three pieces.
    import io

    from delay.case._limits import _sheet_rows

    data = b"<sheetData>" + b"<row r=1>" * 300_000 + b"</sheetData>"
    buffer = io.BytesIO()
    with zipfile.ZipFile(buffer, "w", zipfile.ZIP_DEFLATED) as archive:
        archive.writestr("xl/worksheets/sheet1.xml", data)
    with zipfile.ZipFile(buffer) as archive:
        assert _sheet_rows(archive, archive.getinfo("xl/worksheets/sheet1.xml")) == 300_000


# ----------------------------------------------------------------- reserved names


def test_update_folder_named_asbuilt(tmp_path):
    update = {"asbuilt": copy.deepcopy(UPDATE["u1"])}
    root = make_case(tmp_path, snapshots=update)
    problem = problem_at(root, "snapshots/asbuilt", None, None, "'asbuilt' is kept for the as-built record")
    assert "asbuilt.csv" in problem.fix


def test_update_labelled_as_built(tmp_path):
    update = copy.deepcopy(UPDATE)
    update["u1"]["label"] = "As-built"
    problem_at(
        make_case(tmp_path, snapshots=update),
        "snapshots/u1/snapshot.toml",
        None,
        "label",
        "kept for the as-built record",
    )


def test_update_folder_named_baseline_in_a_workbook(tmp_path):
    book = write_workbook(make_case(tmp_path), tmp_path / "book" / "case.xlsx")
    workbook = openpyxl.load_workbook(book)
    sheet = workbook["snapshots"]
    header = [cell.value for cell in sheet[1]]
    # Row 3 is the update u1: call its label asbuilt.
    sheet.cell(row=3, column=header.index("label") + 1, value="asbuilt")
    workbook.save(book)
    problem_at(book, "case.xlsx:snapshots", 3, "label", "kept for the as-built record")


# ----------------------------------------------------------------- progress


def test_in_progress_without_remaining_in_a_workbook(tmp_path):
    # Scheduling rule 3: "An activity in progress must give remaining > 0".
    book = write_workbook(make_case(tmp_path), tmp_path / "book" / "case.xlsx")
    workbook = openpyxl.load_workbook(book)
    sheet = workbook["activities"]
    header = [cell.value for cell in sheet[1]]
    # Rows 2-4 are the baseline's A, B, M; rows 5-7 the update's: B (in progress) is row 6.
    assert sheet.cell(row=6, column=header.index("id") + 1).value == "B"
    sheet.cell(row=6, column=header.index("remaining") + 1).value = None  # value=None would keep it
    workbook.save(book)
    problem_at(book, "case.xlsx:activities", 6, "remaining", "no remaining duration")


def test_in_progress_remaining_cleared_by_a_correction(tmp_path):
    corrections = [
        {
            "snapshot": "u1",
            "table": "activities",
            "key": "B",
            "column": "remaining",
            "value": "",
            "reason": "remaining not reported",
        }
    ]
    root = make_case(tmp_path, files={"corrections.csv": corrections})
    problem = problem_at(root, U1, 3, "remaining", "no remaining duration")
    assert "corrections.csv row 2" in problem.message


# ----------------------------------------------------------------- computed dates


def long_chain(count, duration=36_500, lag=0):
    activities = [{"id": f"W{i:03d}", "name": f"Stage {i}", "duration": duration} for i in range(count)]
    links = [{"pred": f"W{i:03d}", "succ": f"W{i + 1:03d}", "lag": lag} for i in range(count - 1)]
    return activities, links


def test_chain_running_past_2200_is_one_problem(tmp_path):
    # Three stages of 36,500 work days of a Mon-Fri calendar: 109,500 work days, about
    # 420 years from 2025 (a year has about 261 such days): past 2200.
    activities, links = long_chain(3)
    case = load_case(write_case(tmp_path / "case", activities=activities, links=links))
    with pytest.raises(CaseError) as info:
        schedule(case)
    (problem,) = info.value.problems
    assert problem.file == "snapshot 'Baseline'" and problem.column == "duration"
    assert "after 2200-12-31" in problem.message
    assert "activity 'W002' ends a chain of 3 activities holding about 109,500 work days" in problem.message
    assert "W000 (36,500 work days), W001 (36,500 work days), W002 (36,500 work days)" in problem.message


def test_chain_of_three_hundred_never_overflows(tmp_path):
    # 300 x 36,500 work days would reach the year 44,000, past what a date type holds.
    activities, links = long_chain(300)
    root = write_case(tmp_path / "case", activities=activities, links=links)
    result = subprocess.run(
        [sys.executable, "-m", "delay.cli", "schedule", str(root)], capture_output=True, text=True, timeout=300
    )
    assert result.returncode == 2, result.stderr
    assert "Traceback" not in result.stderr and "Overflow" not in result.stderr
    assert "activity 'W299' ends a chain of 300 activities" in result.stderr
    assert result.stdout == ""


def test_long_lags_are_named(tmp_path):
    # Short stages but lags of 30,000 work days: the lags drive the dates past 2200.
    activities, links = long_chain(4, duration=5, lag=30_000)
    case = load_case(write_case(tmp_path / "case", activities=activities, links=links))
    with pytest.raises(CaseError) as info:
        schedule(case)
    message = info.value.problems[0].message
    assert "longest lags are W000>W001 (30,000 work days)" in message
    assert "W002>W003 (30,000 work days)" in message


def test_what_if_that_runs_past_2200(tmp_path):
    # In bounds as given (36,500 work days end in 2164); 36,500 more days end past 2200.
    activities, links = long_chain(1)
    case = load_case(write_case(tmp_path / "case", activities=activities, links=links))
    model = prepare(case)
    assert model.run().completion.year == 2164
    with pytest.raises(CaseError) as info:
        model.what_if(extend={"W000": 36_500}).run()
    # The durations named are those scheduled: as given plus what the what-if adds.
    assert "a chain of 1 activity holding about 73,000 work days" in info.value.problems[0].message


def test_late_dates_before_1900(tmp_path):
    # A finish milestone that must finish by 1900-06-01 behind 36,500 work days of work:
    # its late dates would run back to the 1760s.
    activities = [
        {"id": "A", "name": "Long work", "duration": 36_500},
        {
            "id": "M",
            "name": "Done",
            "duration": 0,
            "kind": "finish_milestone",
            "constraint": "latest_finish",
            "constraint_date": "1900-06-01",
        },
    ]
    case = load_case(
        write_case(
            tmp_path / "case",
            activities=activities,
            links=[{"pred": "A", "succ": "M"}],
            start="1900-01-01",
            completion="1900-12-31",
        )
    )
    with pytest.raises(CaseError) as info:
        schedule(case)
    assert "before 1900-01-01" in info.value.problems[0].message
