"""Reading the tables people really export: ``[input]`` of case.toml (delay.case._dialect).

The main check: the demo case written out as a continental spreadsheet would save it
(semicolons, day-first dates, decimal commas, Windows code page 1252, headers in other
words and cases, a case.toml saved with a byte-order mark) loads to exactly the tables of
the demo itself. The demo's text is plain ASCII, the same bytes in UTF-8 and cp1252, so the
demo is first copied with a few letters only cp1252 and UTF-8 write differently (a curly
apostrophe, a cedilla); that UTF-8 copy is the reference. The conversion is done here with
Python's own csv module and ``str.encode("cp1252")``, not with the toolkit's reader. Then one check per rule: what is
detected and reported, and the plain problem for each thing that cannot be read.
"""

from __future__ import annotations

import csv
import dataclasses
import datetime as dt
import io
import json
import shutil
from pathlib import Path

import openpyxl
import pandas.testing as pdt
import pytest
from casewriter import write_text
from click.testing import CliRunner
from test_case_support import make_case, problem_at

from delay.case import load_case, summarise, write_workbook
from delay.case._columns import DATE_COLUMNS, INTEGER_COLUMNS, NUMBER_COLUMNS
from delay.cli import cli
from delay.model import COLUMNS

DEMO = Path(__file__).resolve().parents[1] / "case_demo"

# Headers in the user's own words, mapped back in [input.columns]; every other header is
# written in capitals with spaces around it, which must be matched without a mapping.
MAPPED = {
    "activities": {"id": "Task No", "name": "Task", "duration": "Work days"},
    "links": {"pred": "Predecessor", "succ": "Successor"},
    "events": {"claimed_days": "Days claimed"},
}
INPUT_TOML = """
[input]
encoding = "cp1252"
date_format = "%d/%m/%Y"
decimal = ","

[input.columns.activities]
"Task No" = "id"
"task" = "name"
"WORK DAYS" = "duration"

[input.columns.links]
"Predecessor" = "pred"
"Successor" = "succ"

[input.columns.events]
"Days claimed" = "claimed_days"
"""


def _iso(text: str) -> str:
    """A dd/mm/yyyy text as YYYY-MM-DD; any other text as it is."""
    try:
        return dt.datetime.strptime(text, "%d/%m/%Y").date().isoformat()
    except ValueError:
        return text


def _table_of(relative: Path) -> str:
    return relative.stem


def _continental(value: str, table: str, column: str, row: dict) -> str:
    """One cell as the export writes it: dd/mm/yyyy dates, decimal commas."""
    if not value:
        return value
    is_date = column in DATE_COLUMNS.get(table, ())
    if table == "corrections" and column == "value":  # a corrected date is a date too
        is_date = row.get("column") in DATE_COLUMNS["activities"]
    if is_date:
        return dt.date.fromisoformat(value).strftime("%d/%m/%Y")
    if column in NUMBER_COLUMNS.get(table, ()) or column in INTEGER_COLUMNS.get(table, ()):
        return value.replace(".", ",")
    return value


def accented_demo(target: Path) -> Path:
    """The demo case (UTF-8) with letters whose bytes differ between UTF-8 and cp1252."""
    for source in DEMO.rglob("*"):
        relative = source.relative_to(DEMO)
        if relative.parts[0] in ("model", "scenario") or source.is_dir():
            continue
        destination = target / relative
        destination.parent.mkdir(parents=True, exist_ok=True)
        text = source.read_text(encoding="utf-8")
        if source.suffix == ".csv":
            text = text.replace("'s ", "\u2019s ").replace("facade", "fa\u00e7ade")
        destination.write_text(text, encoding="utf-8")
    return target


def export_demo(demo: Path, target: Path) -> Path:
    """The case ``demo`` as a semicolon-separated, dd/mm/yyyy, cp1252 export."""
    for source in demo.rglob("*"):
        relative = source.relative_to(demo)
        if relative.parts[0] in ("model", "scenario") or source.is_dir():
            continue
        destination = target / relative
        destination.parent.mkdir(parents=True, exist_ok=True)
        if source.suffix != ".csv":
            shutil.copyfile(source, destination)
            continue
        table = _table_of(relative)
        with source.open(newline="", encoding="utf-8") as handle:
            rows = list(csv.DictReader(handle))
            header = list(rows[0]) if rows else next(csv.reader(source.open(encoding="utf-8")))
        names = [MAPPED.get(table, {}).get(c, f" {c.upper()} ") for c in header]
        buffer = io.StringIO()
        writer = csv.writer(buffer, delimiter=";", lineterminator="\r\n")
        writer.writerow(names)
        for row in rows:
            writer.writerow([_continental(row[c], table, c, row) for c in header])
        destination.write_bytes(buffer.getvalue().encode("cp1252"))
    toml = (demo / "case.toml").read_text(encoding="utf-8") + INPUT_TOML
    (target / "case.toml").write_bytes(b"\xef\xbb\xbf" + toml.encode("utf-8"))
    return target


@pytest.fixture(scope="module")
def demo_and_export(tmp_path_factory):
    demo = accented_demo(tmp_path_factory.mktemp("demo") / "case")
    export = export_demo(demo, tmp_path_factory.mktemp("export") / "case")
    return load_case(demo), load_case(export), export


def test_the_export_is_what_a_continental_spreadsheet_writes(demo_and_export):
    _, _, export = demo_and_export
    raw = (export / "elements.csv").read_bytes()
    assert b";" in raw.splitlines()[0] and b"-0,45" in raw  # decimal commas
    assert b"03/03/2025" in (export / "asbuilt.csv").read_bytes()
    events = (export / "events.csv").read_bytes()
    assert "fa\u00e7ade".encode("cp1252") in events and "\u2019s".encode("cp1252") in events
    with pytest.raises(UnicodeDecodeError):  # the text is cp1252, not UTF-8
        events.decode("utf-8")


def test_export_loads_to_the_same_tables_as_the_demo(demo_and_export):
    demo, export, _ = demo_and_export
    assert [(s.folder, s.label, s.kind, s.data_date) for s in export.snapshots] == [
        (s.folder, s.label, s.kind, s.data_date) for s in demo.snapshots
    ]
    for mine, theirs in zip(export.snapshots + (export.asbuilt_snapshot,), demo.snapshots + (demo.asbuilt_snapshot,)):
        pdt.assert_frame_equal(mine.activities, theirs.activities)
        pdt.assert_frame_equal(mine.links, theirs.links)
    for name in COLUMNS:
        if name not in ("activities", "links", "corrections"):
            pdt.assert_frame_equal(export.table(name), demo.table(name), obj=name)
    # Corrections are listed as written (beside the original cell, also as written): the
    # corrected date is the export's 30/06/2026 for the demo's 2026-06-30, and it is
    # applied as the same date (the as-built snapshot above is the demo's).
    iso = export.corrections[2].corrected
    assert (iso, demo.corrections[2].corrected) == ("30/06/2026", "2026-06-30")
    as_demo = [
        dataclasses.replace(c, corrected=c.corrected.replace(iso, "2026-06-30"), original=_iso(c.original))
        for c in export.corrections
    ]
    assert as_demo == list(demo.corrections)
    table = export.table("corrections")
    pdt.assert_frame_equal(table.replace({"30/06/2026": "2026-06-30"}), demo.table("corrections"))
    assert "fa\u00e7ade" in export.events["title"].str.cat()  # read as cp1252, not mangled
    # The settings are the demo's but for [input] itself.
    assert export.settings.project == demo.settings.project
    assert export.settings.commercial == demo.settings.commercial
    assert export.settings.input.date_format == "%d/%m/%Y"


def test_export_dialect_is_reported_for_every_file(demo_and_export):
    _, export, root = demo_and_export
    dialects = {d.file: d for d in export.input_dialects}
    csv_files = {str(p.relative_to(root)) for p in root.rglob("*.csv")}
    assert set(dialects) == csv_files
    for dialect in dialects.values():
        assert (dialect.delimiter, dialect.delimiter_source) == (";", "detected")
        assert (dialect.encoding, dialect.encoding_source) == ("cp1252", "declared")
        assert (dialect.date_format, dialect.decimal) == ("%d/%m/%Y", ",")
    assert dialects["snapshots/baseline/activities.csv"].renamed["Task No"] == "id"
    assert dialects["calendars.csv"].renamed == {"CALENDAR": "calendar", "WORKDAYS": "workdays"}


def test_validate_prints_the_dialect(demo_and_export):
    _, _, root = demo_and_export
    result = CliRunner().invoke(cli, ["validate", str(root)], terminal_width=250)
    assert result.exit_code == 0, result.output
    assert "How the files were read" in result.output
    assert "semicolon (detected)" in result.output and "cp1252 (declared)" in result.output
    result = CliRunner().invoke(cli, ["validate", str(root), "--format", "json"])
    summary = json.loads(result.output)
    first = summary["input"][0]
    assert (first["delimiter"], first["encoding"], first["date_format"]) == (";", "cp1252", "%d/%m/%Y")


def test_demo_itself_is_read_as_utf8_with_commas():
    demo = load_case(DEMO)
    assert {(d.delimiter, d.encoding, d.encoding_source, d.date_format) for d in demo.input_dialects} == {
        (",", "UTF-8", "default", "%Y-%m-%d")
    }
    assert summarise(demo)["input"][0]["delimiter_source"] == "detected"


# ----------------------------------------------------------------- one rule at a time


def test_headers_match_ignoring_case_and_spaces(tmp_path):
    root = make_case(tmp_path, snapshots={})
    write_text(
        root,
        "snapshots/baseline/activities.csv",
        " ID ,Name,DURATION,Kind\nA,Drive,3,\nB,Cast,2,\nM,Done,0,finish_milestone\n",
    )
    case = load_case(root)
    assert case.baseline.activities["id"].tolist() == ["A", "B", "M"]


@pytest.mark.parametrize("delimiter, word", [("\t", "tab"), ("|", "vertical bar"), (";", "semicolon")])
def test_delimiter_is_detected(tmp_path, delimiter, word):
    root = make_case(tmp_path, snapshots={})
    rows = [["pred", "succ", "type", "lag"], ["A", "B", "FS", "0"], ["B", "M", "", ""]]
    write_text(root, "snapshots/baseline/links.csv", "\n".join(delimiter.join(r) for r in rows) + "\n")
    case = load_case(root)
    assert case.baseline.links["pred"].tolist() == ["A", "B"]
    (dialect,) = [d for d in case.input_dialects if d.file == "snapshots/baseline/links.csv"]
    assert (dialect.delimiter, dialect.delimiter_source) == (delimiter, "detected")


def test_declared_delimiter_is_used(tmp_path):
    # Every file of the case with "|"; a name holding a semicolon and a comma would make
    # detection of another file's header uncertain, so the analyst declares it.
    root = make_case(tmp_path)
    for path in root.rglob("*.csv"):
        with path.open(newline="", encoding="utf-8") as handle:
            rows = list(csv.reader(handle))
        with path.open("w", newline="", encoding="utf-8") as handle:
            csv.writer(handle, delimiter="|").writerows(rows)
    text = (root / "case.toml").read_text(encoding="utf-8")
    write_text(root, "case.toml", text + '[input]\ndelimiter = "|"\n')
    case = load_case(root)
    assert case.baseline.links["succ"].tolist() == ["B", "M"]
    assert case.events["title"].tolist() == ["Late capping beam drawings", "Redesign of anchors"]
    assert {(d.delimiter, d.delimiter_source) for d in case.input_dialects} == {("|", "declared")}


def test_utf16_is_detected_from_its_byte_order_mark(tmp_path):
    root = make_case(tmp_path, snapshots={})
    text = "id,name,duration,kind\nA,Spundwände,3,\nB,Kopfbalken,2,\nM,Fertig,0,finish_milestone\n"
    (root / "snapshots/baseline/activities.csv").write_bytes(text.encode("utf-16"))
    case = load_case(root)
    assert case.baseline.activities["name"].iat[0] == "Spundwände"
    (dialect,) = [d for d in case.input_dialects if d.file.endswith("baseline/activities.csv")]
    assert dialect.encoding_source == "detected" and dialect.encoding.startswith("UTF-16")


def test_cp1252_without_a_declaration_is_one_problem(tmp_path):
    root = make_case(tmp_path, snapshots={})
    text = "id,name,duration,kind\nA,Spundwände,3,\nB,Kopfbalken,2,\nM,Fertig,0,finish_milestone\n"
    (root / "snapshots/baseline/activities.csv").write_bytes(text.encode("cp1252"))
    problem = problem_at(
        root, "snapshots/baseline/activities.csv", None, None, "not UTF-8 text (byte 31"
    )  # 22 bytes of header, "A,Spundw", then the 31st
    assert 'encoding = "cp1252"' in problem.fix


def test_date_in_another_format_names_the_format(tmp_path):
    root = make_case(
        tmp_path,
        files={
            "prolongation_rates.csv": [
                {"from": "06.01.2025", "to": "30.06.2025", "cost_per_day": "2500"},
                {"from": "01.07.2025", "to": "31/12/2025", "cost_per_day": "2800"},
            ]
        },
    )
    text = (root / "case.toml").read_text(encoding="utf-8")
    write_text(root, "case.toml", text + '[input]\ndate_format = "%d.%m.%Y"\n')
    problem = problem_at(root, "prolongation_rates.csv", 3, "to", "'31/12/2025' is not a date")
    assert "%d.%m.%Y ([input] of case.toml), for example 31.03.2025" in problem.fix


def test_iso_dates_are_read_whatever_the_format(tmp_path):
    # elements.csv (boxes with decimal points) is left out: [input] applies to every file.
    root = make_case(
        tmp_path,
        files={"prolongation_rates.csv": [{"from": "06/01/2025", "to": "2025-06-30", "cost_per_day": "2500,5"}]},
        drop=("elements.csv",),
    )
    text = (root / "case.toml").read_text(encoding="utf-8")
    write_text(root, "case.toml", text + '[input]\ndate_format = "%d/%m/%Y"\ndecimal = ","\n')
    rates = load_case(root).prolongation_rates
    assert rates["from"].iat[0] == dt.datetime(2025, 1, 6)
    assert rates["to"].iat[0] == dt.datetime(2025, 6, 30)
    assert rates["cost_per_day"].iat[0] == 2500.5


def test_a_point_under_a_decimal_comma_is_never_read_as_one(tmp_path):
    # "2.800" in a decimal-comma export is two thousand eight hundred, not 2.8: refused.
    root = make_case(
        tmp_path,
        files={"prolongation_rates.csv": [{"from": "2025-01-06", "to": "2025-06-30", "cost_per_day": "2.800"}]},
        drop=("elements.csv",),
    )
    text = (root / "case.toml").read_text(encoding="utf-8")
    write_text(root, "case.toml", text + '[input]\ndecimal = ","\n')
    problem = problem_at(root, "prolongation_rates.csv", 2, "cost_per_day", "'2.800' is not a number")
    assert "decimal comma and no thousands separator" in problem.fix


@pytest.mark.parametrize(
    "setting, words",
    [
        ('delimiter = ":"', "the delimiter ':' is not one"),
        ('encoding = "ebcdic-cp-be"', "the encoding 'ebcdic-cp-be' is not one"),
        ('date_format = "%d/%m/%y"', "four-digit year"),
        ('date_format = "%d/%m"', "must give the day"),
        ('decimal = ";"', "is not . or ,"),
        ('quoting = "all"', "'quoting' is not a setting of [input]"),
    ],
)
def test_bad_input_setting(tmp_path, setting, words):
    root = make_case(tmp_path)
    text = (root / "case.toml").read_text(encoding="utf-8")
    write_text(root, "case.toml", text + f"[input]\n{setting}\n")
    key = "input." + setting.split(" ", 1)[0]
    problem_at(root, "case.toml", None, key, words)


@pytest.mark.parametrize(
    "mapping, key, words",
    [
        ('[input.columns.activites]\n"Ref" = "id"\n', "input.columns.activites", "'activites' is not a table"),
        (
            '[input.columns.activities]\n"Ref" = "code"\n',
            "input.columns.activities.Ref",
            "'code' is not a column of activities",
        ),
        (
            '[input.columns.activities]\n"Ref" = "id"\n" REF " = "name"\n',
            "input.columns.activities. REF ",
            "mapped twice",
        ),
    ],
)
def test_bad_column_mapping(tmp_path, mapping, key, words):
    root = make_case(tmp_path)
    text = (root / "case.toml").read_text(encoding="utf-8")
    write_text(root, "case.toml", text + mapping)
    problem_at(root, "case.toml", None, key, words)


def test_two_headers_read_as_one_column(tmp_path):
    root = make_case(tmp_path, snapshots={})
    text = (root / "case.toml").read_text(encoding="utf-8")
    write_text(root, "case.toml", text + '[input.columns.activities]\n"Ref" = "id"\n')
    write_text(root, "snapshots/baseline/activities.csv", "Ref,ID,name,duration\nA,A,Drive,3\nB,B,Cast,2\nM,M,Done,0\n")
    problem_at(root, "snapshots/baseline/activities.csv", 1, "id", "the columns 'Ref' and 'ID' are both read as 'id'")


def test_workbook_maps_headers_from_its_case_sheet(tmp_path):
    book = write_workbook(make_case(tmp_path), tmp_path / "book" / "case.xlsx")
    workbook = openpyxl.load_workbook(book)
    workbook["case"].append(["input.columns.activities.Task No.", "id"])  # a dot in the header
    sheet = workbook["activities"]
    header = [cell.value for cell in sheet[1]]
    sheet.cell(row=1, column=header.index("id") + 1).value = "Task No."
    sheet.cell(row=1, column=header.index("name") + 1).value = "NAME"
    workbook.save(book)
    case = load_case(book)
    assert case.baseline.activities["id"].tolist() == ["A", "B", "M"]
    (dialect,) = [d for d in case.input_dialects if d.file == "case.xlsx:activities"]
    assert dialect.renamed == {"Task No.": "id", "NAME": "name"}
    assert dialect.delimiter_source == "sheet"
