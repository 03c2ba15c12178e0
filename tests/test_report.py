"""The report folder: its files, its figures against hand working, escaping, and the manifest.

The worked case (``write_small_case``), on a Monday-to-Friday calendar:

- baseline: START (start milestone) -> A "Dig the foundations" (5 days) -> B (5 days) ->
  END (finish milestone), all FS with no lag; B's name is ``<script>alert(1)</script>``.
  A runs Monday 2025-01-06 to Friday 2025-01-10, B Monday 2025-01-13 to Friday
  2025-01-17: planned completion 2025-01-17, which is also the contract completion.
- Update 01, data date 2025-01-13: A finished on plan.
- event E1 (employer): B extended by 3 work days, from 2025-01-13.
  B then takes 8 work days from Monday 2025-01-13: Mon 13 ... Fri 17, Mon 20, Tue 21,
  Wed 22: completion 2025-01-22, 5 calendar days and 3 work days later.
- as-built record: A 01-06 to 01-10, B 01-13 to 01-22 (the event's 3 days), END 01-22.

Entitlement by the rules stated in delay.entitlement (the project's contract, module
docstring): every method explains the 5 days by one employer event, so 5 excusable days,
all compensable; extension of time = max(0, planned 2025-01-17 + 5 - in force 2025-01-17)
= 5 days; revised completion 2025-01-22; culpable days = max(0, actual 2025-01-22 -
revised 2025-01-22) = 0; prolongation cost = 5 days x 100 EUR = 500.
"""

from __future__ import annotations

import csv
import datetime as dt
import hashlib
import json
import sys
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from casewriter import write_case
from click.testing import CliRunner

from delay.cli import cli
from reports.builder import SECTIONS, compute, resolve_methods
from reports.tables import ReportTable, canonical_csv, canonical_value, fingerprint, write_workbook
from reports.writer import build

SCRIPT = "<script>alert(1)</script>"

ACTIVITIES = [
    {"id": "START", "name": "Possession of the site", "duration": 0, "kind": "start_milestone", "wbs": "1"},
    {"id": "A", "name": "Dig the foundations", "duration": 5, "wbs": "1"},
    {"id": "B", "name": SCRIPT, "duration": 5, "wbs": "2"},
    {"id": "END", "name": "Completion", "duration": 0, "kind": "finish_milestone", "wbs": "2"},
]
LINKS = [{"pred": "START", "succ": "A"}, {"pred": "A", "succ": "B"}, {"pred": "B", "succ": "END"}]
UPDATE = [
    dict(ACTIVITIES[0], actual_start="2025-01-06"),
    dict(ACTIVITIES[1], actual_start="2025-01-06", actual_finish="2025-01-10"),
    ACTIVITIES[2],
    ACTIVITIES[3],
]
EVENTS = [
    {
        "id": "E1",
        "title": "Late drawings for the slab",
        "party": "employer",
        "start": "2025-01-13",
        "finish": "2025-01-22",
        "activities": "B",
        "impact": "extend",
        "days": 3,
    }
]
ASBUILT = [
    {"id": "START", "actual_start": "2025-01-06", "actual_finish": "2025-01-06"},
    {"id": "A", "actual_start": "2025-01-06", "actual_finish": "2025-01-10"},
    {"id": "B", "actual_start": "2025-01-13", "actual_finish": "2025-01-22"},
    {"id": "END", "actual_start": "2025-01-22", "actual_finish": "2025-01-22"},
]
ELEMENTS = [
    {
        "id": "E-1",
        "name": "Footing",
        "wbs": "1",
        "classification": "SUB",
        "x": 0,
        "y": 0,
        "z": 0,
        "dx": 1,
        "dy": 1,
        "dz": 1,
        "level": "00",
        "zone": "A",
    },
    {
        "id": "E-2",
        "name": "Slab",
        "wbs": "2",
        "classification": "FRM",
        "x": 0,
        "y": 0,
        "z": 1,
        "dx": 2,
        "dy": 2,
        "dz": 0.3,
        "level": "00",
        "zone": "A",
    },
]


def write_small_case(root: Path) -> Path:
    return write_case(
        root,
        activities=ACTIVITIES,
        links=LINKS,
        completion="2025-01-17",
        commercial={"currency": "EUR", "prolongation_cost_per_day": 100, "liquidated_damages_per_day": 50},
        snapshots={"u01": {"label": "Update 01", "data_date": "2025-01-13", "activities": UPDATE}},
        files={"events.csv": EVENTS, "asbuilt.csv": ASBUILT, "elements.csv": ELEMENTS},
    )


def run(*args):
    from delay.commands.report import COMMANDS

    for command in COMMANDS:  # the lead adds "report" to delay.commands.MODULES; until then add here
        if command.name not in cli.commands:
            cli.add_command(command)
    return CliRunner().invoke(cli, [str(a) for a in args], catch_exceptions=False)


def rows_of(folder: Path, key: str) -> list[dict]:
    with open(folder / "tables" / f"{key}.csv", newline="", encoding="utf-8") as handle:
        return list(csv.DictReader(handle))


@pytest.fixture(scope="module")
def small_report(tmp_path_factory):
    folder = tmp_path_factory.mktemp("small-report")
    case = write_small_case(folder / "case")
    out = build(case, folder / "report")
    return folder, case, out


# -- the folder ---------------------------------------------------------------------------------
def test_the_folder_holds_the_page_the_workbook_the_tables_and_the_manifest(small_report):
    _, case, out = small_report
    assert sorted(p.name for p in out.iterdir()) == [
        "delay-output.json",
        "manifest.json",
        "report.html",
        "tables",
        "tables.xlsx",
    ]
    manifest = json.loads((out / "manifest.json").read_text(encoding="utf-8"))
    listed = {t["key"] for t in manifest["tables"]}
    assert listed == {p.stem for p in (out / "tables").glob("*.csv")}
    for item in manifest["tables"]:
        # the fingerprint is the SHA-256 of the CSV file as written (hashlib, the reference)
        assert hashlib.sha256((out / item["file"]).read_bytes()).hexdigest() == item["sha256"]
    # every file the report wrote, with its SHA-256 (all but the manifest and the marker)
    written = {p.relative_to(out).as_posix(): p for p in out.rglob("*") if p.is_file()}
    assert {o["path"] for o in manifest["outputs"]} == set(written) - {"manifest.json", "delay-output.json"}
    for item in manifest["outputs"]:
        assert hashlib.sha256(written[item["path"]].read_bytes()).hexdigest() == item["sha256"]
    # the case by its folder's name and its place relative to the report, never an absolute path
    assert manifest["case"]["path"] == "case" and manifest["case"]["relative_to_report"] == "../case"
    assert (out / manifest["case"]["relative_to_report"]).resolve() == case.resolve()
    for item in manifest["inputs"]:
        path = out / manifest["case"]["relative_to_report"] / item["path"]
        assert hashlib.sha256(path.read_bytes()).hexdigest() == item["sha256"]
        assert path.stat().st_size == item["bytes"]
    assert {"snapshots/baseline/activities.csv", "events.csv", "case.toml"} <= {i["path"] for i in manifest["inputs"]}
    assert manifest["tool"]["version"] and manifest["created"]
    assert dt.datetime.fromisoformat(manifest["created"]).tzinfo is not None
    assert manifest["options"]["methods"] == ["windows", "impacted", "tia", "collapsed", "asbuilt"]
    assert manifest["settings"]["project"]["contract_completion"] == "2025-01-17"


def test_every_section_is_in_the_page_in_order(small_report):
    page = (small_report[2] / "report.html").read_text(encoding="utf-8")
    positions = [page.index(f'<section id="{key}"') for key, _ in SECTIONS]
    assert positions == sorted(positions)
    # plotly.js is inlined, and nothing is fetched from elsewhere
    assert "<script src=" not in page and 'src="http' not in page and '<link rel="stylesheet"' not in page
    assert page.count("Plotly.newPlot") >= 5
    # the cautions appear in the summary and in the inputs section
    for key in ("summary", "inputs"):
        body = page.split(f'<section id="{key}"', 1)[1].split("</section>", 1)[0]
        assert "is legal advice" in body and "professional judgement govern" in body


def test_summary_figures_match_the_hand_working(small_report):
    out = small_report[2]
    dates = {r["what"]: r["date"] for r in rows_of(out, "completion_dates")}
    assert dates["planned completion"] == "2025-01-17"
    assert dates["contract completion in force"] == "2025-01-17"
    assert dates["forecast completion"] == "2025-01-17"  # Update 01: A on plan, B not started
    assert dates["actual completion"] == "2025-01-22"
    figures = {r["figure"]: r for r in rows_of(out, "entitlement_by_method")}
    for method in ("windows", "impacted", "tia", "collapsed"):
        assert figures["excusable days (time)"][method] == "5"
        assert figures["extension of time (calendar days)"][method] == "5"
        assert figures["revised completion date"][method] == "2025-01-22"
        assert figures["compensable days (time and money)"][method] == "5"
        assert figures["days of liquidated damages"][method] == "0"
        assert float(figures["prolongation cost (EUR)"][method]) == 500.0


def test_impacted_event_alone_and_cumulative_match_the_hand_working(small_report):
    (event,) = rows_of(small_report[2], "impacted_events")
    # numpy's business-day count (reference library): Fri 2025-01-17 to Wed 2025-01-22 is 3 work days
    assert np.busday_count("2025-01-17", "2025-01-22") == 3
    assert (event["alone_days"], event["alone_work_days"], event["completion_alone"]) == ("5", "3", "2025-01-22")
    assert (event["increment_days"], event["completion_after"]) == ("5", "2025-01-22")


def test_windows_and_as_built_match_the_hand_working(small_report):
    out = small_report[2]
    windows = rows_of(out, "windows")
    assert [(w["start"], w["end"], w["movement_days"]) for w in windows] == [
        ("baseline", "u01", "0"),
        ("u01", "asbuilt", "5"),
    ]
    trend = rows_of(out, "completion_trend")
    assert [t["completion"] for t in trend] == ["2025-01-17", "2025-01-17", "2025-01-22"]
    path = {r["activity"]: r for r in rows_of(out, "driving_path_activities")}
    assert set(path) == {"START", "A", "B", "END"}  # one chain: every activity drives
    assert (path["B"]["planned_finish"], path["B"]["actual_finish"], path["B"]["finish_variance_days"]) == (
        "2025-01-17",
        "2025-01-22",
        "5",
    )
    party = {r["party"]: r for r in rows_of(out, "collapsed_by_party")}
    assert (party["employer"]["but_for_completion"], party["employer"]["days_earlier"]) == ("2025-01-17", "5")


def test_an_activity_named_like_a_script_is_text_in_the_page(small_report):
    out = small_report[2]
    page = (out / "report.html").read_text(encoding="utf-8")
    assert SCRIPT not in page and "<script>alert" not in page
    assert "<td>&lt;script&gt;alert(1)&lt;/script&gt;</td>" in page  # a table cell, escaped
    # in the charts' data it is escaped for plotly's labels and kept out of the script element
    assert "&lt;script&gt;alert(1)&lt;\\u002fscript&gt;" in page or "&lt;script&gt;alert(1)&lt;/script&gt;" in page
    # the appendix keeps the name as recorded
    names = {r["activity"]: r["name"] for r in rows_of(out, "asbuilt_activities")}
    assert names["B"] == SCRIPT


# -- canonical form -------------------------------------------------------------------------------
def test_canonical_csv_written_out_by_hand():
    frame = pd.DataFrame(
        {
            "id": ["A", "B, C"],
            "date": pd.to_datetime(["2025-01-06", None]),
            "days": pd.array([3, None], dtype="Int64"),
            "rate": [0.1, 1e-7],
            "flag": [True, False],
            "ids": [["X", "Y"], []],
        }
    )
    # by hand: dates ISO, NaT and <NA> empty, floats as repr (0.1, 1e-07), booleans true/false,
    # lists joined by ";", a field with a comma quoted (csv.QUOTE_MINIMAL)
    expected = 'id,date,days,rate,flag,ids\nA,2025-01-06,3,0.1,true,X;Y\n"B, C",,,1e-07,false,\n'
    assert canonical_csv(frame) == expected
    assert fingerprint(frame) == hashlib.sha256(expected.encode("utf-8")).hexdigest()
    assert canonical_value(dt.datetime(2025, 1, 6, 12, 30)) == "2025-01-06T12:30:00"
    assert canonical_value(np.float64(2.5)) == "2.5" and canonical_value(np.int64(7)) == "7"


def test_the_workbook_has_a_sheet_per_table_dates_as_dates_and_widths(tmp_path):
    from openpyxl import load_workbook

    tables = [
        ReportTable(
            "first",
            "First table",
            "summary",
            pd.DataFrame(
                {
                    "activity": ["A", "=SUM(1)"],
                    "planned_finish": pd.to_datetime(["2025-01-10", "2025-01-17"]),
                    "days": [5, 3],
                }
            ),
        ),
        ReportTable("second", "Second", "windows", pd.DataFrame({"when": [dt.date(2025, 2, 3)], "note": ["x" * 80]})),
    ]
    path = write_workbook(tables, tmp_path / "t.xlsx", title="Report", caution="Not legal advice.")
    book = load_workbook(path)
    assert book.sheetnames == ["contents", "first", "second"]
    sheet = book["first"]
    assert [c.value for c in sheet[1]] == ["activity", "planned finish", "days of delay to completion"]
    assert sheet["B2"].is_date and sheet["B2"].value.date() == dt.date(2025, 1, 10)
    assert sheet["B2"].number_format == "yyyy-mm-dd"
    assert sheet["C2"].value == 5 and sheet["A3"].value == "=SUM(1)" and sheet["A3"].data_type == "s"
    assert sheet.freeze_panes == "A2"
    assert book["second"]["A2"].is_date
    assert book["second"].column_dimensions["B"].width == 60  # capped
    assert sheet.column_dimensions["B"].width >= len("planned finish")


def test_the_workbook_of_a_report_holds_every_table(small_report):
    from openpyxl import load_workbook

    out = small_report[2]
    manifest = json.loads((out / "manifest.json").read_text(encoding="utf-8"))
    book = load_workbook(out / "tables.xlsx", read_only=True)
    assert book.sheetnames == ["contents"] + [t["key"] for t in manifest["tables"]]
    sheet = book["completion_dates"]
    values = list(sheet.iter_rows(min_row=2, values_only=True))
    assert values[0][1] == dt.datetime(2025, 1, 6)  # a date cell, not text


# -- options and imports -------------------------------------------------------------------
def test_methods_default_to_what_the_case_supports(tmp_path):
    from delay.case import load_case

    root = write_case(tmp_path / "case", activities=ACTIVITIES, links=LINKS, files={"events.csv": EVENTS})
    chosen, reasons = resolve_methods(load_case(root), None)
    assert chosen == ["impacted", "tia"]  # one programme, no as-built record
    assert len(reasons) == 3 and all("left out" in r for r in reasons)
    content = compute(load_case(root))
    shown = {s.key: s.available for s in content.sections}
    assert not shown["windows"] and not shown["collapsed"] and not shown["asbuilt"] and shown["impacted"]


def test_a_module_that_fails_to_import_stops_the_report_instead_of_leaving_a_section_out(tmp_path):
    # the report imports every method plainly: a method module that cannot be imported is an
    # error of the toolkit, never a section quietly left out. In a fresh interpreter, the
    # module is made unimportable (None in sys.modules: Python's documented way to make an
    # import raise ImportError) before the report builder is imported.
    import subprocess

    script = (
        "import sys; sys.modules['delay.methods.collapsed'] = None\n"
        "try:\n    import reports.builder\nexcept ImportError as error:\n    print('ImportError', error)\n"
        "else:\n    print('imported')\n"
    )
    done = subprocess.run(
        [sys.executable, "-c", script],
        capture_output=True,
        text=True,
        timeout=120,
        cwd=Path(__file__).resolve().parents[1],
    )
    assert done.stdout.startswith("ImportError") and "delay.methods.collapsed" in done.stdout, done.stdout + done.stderr


# -- the command line ---------------------------------------------------------------------------------
def test_report_command_writes_the_folder_with_the_title_escaped(tmp_path):
    root = write_small_case(tmp_path / "case")
    result = run(
        "report", root, "--out", tmp_path / "out", "--methods", "impacted,asbuilt", "--title", "Claim <b>review</b>"
    )
    assert result.exit_code == 0, result.output
    page = (tmp_path / "out" / "report.html").read_text(encoding="utf-8")
    assert "<title>Claim &lt;b&gt;review&lt;/b&gt;</title>" in page
    manifest = json.loads((tmp_path / "out" / "manifest.json").read_text(encoding="utf-8"))
    assert manifest["options"] == {"methods": ["impacted", "asbuilt"], "title": "Claim <b>review</b>"}
    assert 'id="windows" class="report-section" data-section="windows" data-available="no"' in page


@pytest.mark.parametrize("change", ["broken link", "unknown method"])
def test_bad_input_exits_2_with_plain_lines_and_writes_nothing(tmp_path, change):
    root = write_small_case(tmp_path / "case")
    arguments = ["report", root, "--out", tmp_path / "out"]
    if change == "broken link":
        (root / "snapshots" / "baseline" / "links.csv").write_text(
            "pred,succ,type,lag\nA,NOPE,FS,0\n", encoding="utf-8"
        )
        where = "snapshots/baseline/links.csv"
    else:
        arguments += ["--methods", "windows,guesswork"]
        where = "--methods"
    before = {p: p.read_bytes() for p in root.rglob("*") if p.is_file()}
    result = run(*arguments)
    assert result.exit_code == 2
    assert "Traceback" not in result.output and where in result.output
    assert all(line.startswith(("error:", "1 problem")) for line in result.output.strip().splitlines())
    assert not (tmp_path / "out").exists()
    assert {p: p.read_bytes() for p in root.rglob("*") if p.is_file()} == before


def test_a_folder_that_is_not_a_report_is_never_replaced(tmp_path):
    root = write_small_case(tmp_path / "case")
    keep = tmp_path / "notes"
    keep.mkdir()
    (keep / "letter.txt").write_text("keep me", encoding="utf-8")
    for target in (keep, root, tmp_path):
        result = run("report", root, "--out", target, "--methods", "impacted")
        assert result.exit_code == 2, target
    assert (keep / "letter.txt").read_text(encoding="utf-8") == "keep me"
    assert (root / "case.toml").exists()
    # an earlier report's folder is replaced whole: a table of the first run is gone
    assert run("report", root, "--out", tmp_path / "r", "--methods", "impacted").exit_code == 0
    assert (tmp_path / "r" / "tables" / "impacted_events.csv").exists()
    assert run("report", root, "--out", tmp_path / "r", "--methods", "asbuilt").exit_code == 0
    assert not (tmp_path / "r" / "tables" / "impacted_events.csv").exists()
    # but not once the user has put a file of their own into it
    (tmp_path / "r" / "notes.txt").write_text("mine", encoding="utf-8")
    refused = run("report", root, "--out", tmp_path / "r", "--methods", "impacted")
    assert refused.exit_code == 2 and "notes.txt" in refused.output
    assert (tmp_path / "r" / "notes.txt").read_text(encoding="utf-8") == "mine"
    assert not (tmp_path / "r" / "tables" / "impacted_events.csv").exists()


def test_verify_confirms_an_unchanged_report_and_lists_a_tampered_input(tmp_path):
    root = write_small_case(tmp_path / "case")
    out = tmp_path / "report"
    assert run("report", root, "--out", out).exit_code == 0
    same = run("verify", out)
    assert same.exit_code == 0, same.output
    assert same.output.startswith("Confirmed")

    # tamper with an input: B's planned duration 5 -> 7 in the baseline
    activities = root / "snapshots" / "baseline" / "activities.csv"
    text = activities.read_text(encoding="utf-8")
    assert "B,<script>alert(1)</script>,5" in text
    activities.write_text(
        text.replace("B,<script>alert(1)</script>,5", "B,<script>alert(1)</script>,7"), encoding="utf-8"
    )
    changed = run("verify", out)
    assert changed.exit_code == 1
    lines = changed.output.splitlines()
    assert "input changed: snapshots/baseline/activities.csv" in changed.output
    assert not any("input changed" in line and "activities.csv" not in line for line in lines)
    # a 7-day B plans completion two work days later (Tue 2025-01-21): the summary differs
    assert "table differs: completion_dates" in changed.output
    assert "table differs: impacted_events" in changed.output
    assert "difference(s) found" in lines[-1]


def test_verify_lists_a_changed_table_file_and_a_missing_manifest_is_an_input_error(tmp_path):
    root = write_small_case(tmp_path / "case")
    out = tmp_path / "report"
    assert run("report", root, "--out", out, "--methods", "impacted").exit_code == 0
    table = out / "tables" / "impacted_events.csv"
    table.write_text(table.read_text(encoding="utf-8").replace(",5,3,", ",4,3,"), encoding="utf-8")
    result = run("verify", out)
    assert result.exit_code == 1
    assert "table file changed: tables/impacted_events.csv" in result.output
    assert "input changed" not in result.output and "table differs" not in result.output
    (out / "manifest.json").unlink()
    missing = run("verify", out)
    assert missing.exit_code == 2 and "manifest.json" in missing.output and "Traceback" not in missing.output


def test_verify_finds_a_moved_case_through_its_relative_path_or_case_option(tmp_path):
    root = write_small_case(tmp_path / "project" / "case")
    out = tmp_path / "project" / "report"
    assert run("report", root, "--out", out, "--methods", "impacted").exit_code == 0
    moved = tmp_path / "elsewhere"
    (tmp_path / "project").rename(moved)
    # the absolute path is gone; the path relative to the report still holds
    assert run("verify", moved / "report").exit_code == 0
    (moved / "case").rename(moved / "case-moved")
    lost = run("verify", moved / "report")
    assert lost.exit_code == 2 and "--case" in lost.output
    assert run("verify", moved / "report", "--case", moved / "case-moved").exit_code == 0


def test_verify_lists_an_input_that_no_longer_loads(tmp_path):
    root = write_small_case(tmp_path / "case")
    out = tmp_path / "report"
    assert run("report", root, "--out", out, "--methods", "impacted").exit_code == 0
    (root / "snapshots" / "baseline" / "links.csv").write_text("pred,succ,type,lag\nA,NOPE,FS,0\n", encoding="utf-8")
    result = run("verify", out)
    assert result.exit_code == 1 and "Traceback" not in result.output
    assert "input changed: snapshots/baseline/links.csv" in result.output
    assert "case does not load: snapshots/baseline/links.csv, row 2, column 'succ'" in result.output
