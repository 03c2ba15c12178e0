"""``delay verify`` trusts nothing, and the manifest names no path of the machine.

The contract is the project's own (reports/manifest.py module docstring): a manifest that is
missing, too large, nested too deep or not of the toolkit's layout is one line and exit
status 2, before any file is read through it; a file of the report changed, missing or
added, an input changed, or a table that the re-run does not reproduce is one line each and
exit status 1. The references outside the project are hashlib (SHA-256, for "unchanged" and
for the hashes that must never be printed), openpyxl (to change a number in the workbook as
a spreadsheet user would) and importlib.metadata (the installed version of each dependency).

The case is the small one of tests/test_report.py (START -> A -> B -> END, an update, one
event, an as-built record).
"""

from __future__ import annotations

import hashlib
import json
import os
import re
import shutil
import zipfile
from importlib import metadata
from pathlib import Path

import pytest
from click.testing import CliRunner
from test_output_policy import small_case

from delay.cli import cli
from delay.output import MARKER
from reports.manifest import FORMAT, MAX_BYTES, MAX_DEPTH, _relative_location
from reports.writer import build

PROJECT = Path(__file__).resolve().parent.parent


def run(*args):
    return CliRunner().invoke(cli, [str(a) for a in args])


@pytest.fixture(scope="module")
def pristine(tmp_path_factory):
    project = tmp_path_factory.mktemp("verify") / "project"
    case = small_case(project / "case")
    build(case, project / "report")
    return project


@pytest.fixture
def project(pristine, tmp_path):
    copy = tmp_path / "project"
    shutil.copytree(pristine, copy, symlinks=True)
    return copy


def manifest_of(report: Path) -> dict:
    return json.loads((report / "manifest.json").read_text(encoding="utf-8"))


def write_manifest(report: Path, manifest) -> None:
    (report / "manifest.json").write_text(json.dumps(manifest), encoding="utf-8")


def differences(result) -> list[str]:
    """The difference lines of a verify that found some (exit status 1)."""
    assert result.exit_code == 1, result.output
    assert "Traceback" not in result.output
    lines = result.stdout.strip().splitlines()
    assert "difference(s) found" in lines[-1]
    return lines[:-1]


def assert_unreadable(result, *words) -> str:
    assert result.exit_code == 2, result.output
    assert result.exception is None or isinstance(result.exception, SystemExit), result.exception
    assert "Traceback" not in result.output and result.stdout == ""
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: "), lines
    for word in words:
        assert word in lines[0], lines[0]
    return lines[0]


def test_an_unchanged_report_is_confirmed(project):
    result = run("verify", project / "report")
    assert result.exit_code == 0, result.output
    assert result.stdout.startswith("Confirmed:")


# -- crafted manifests: one line, exit 2, nothing read through them ----------------------------------
def _set(path: str, value):
    def change(manifest):
        *parents, last = path.split(".")
        where = manifest
        for part in parents:
            where = where[int(part)] if part.isdigit() else where[part]
        if value is KeyError:
            del where[last]
        else:
            where[int(last) if last.isdigit() else last] = value
        return manifest

    return change


CRAFTED = {
    "input climbing out": (_set("inputs.0.path", "../../../../etc/passwd"), "climbs out of its folder"),
    "absolute input": (_set("inputs.0.path", "/etc/shadow"), "not a relative path"),
    "drive-letter input": (_set("inputs.0.path", "C:/Windows/win.ini"), "not a relative path"),
    "backslash input": (_set("inputs.0.path", "..\\..\\etc\\passwd"), "not a relative path"),
    "dot part": (_set("inputs.0.path", "./case.toml"), "not a plain relative path"),
    "output climbing out": (_set("outputs.0.path", "../case/case.toml"), "climbs out of its folder"),
    "no inputs": (_set("inputs", KeyError), "has no 'inputs'"),
    "no case": (_set("case", KeyError), "has no 'case'"),
    "no output id": (_set("output_id", KeyError), "has no 'output_id'"),
    "rows as text": (_set("tables.0.rows", "3"), "tables[0].rows is not a whole number"),
    "bytes as a boolean": (_set("inputs.0.bytes", True), "inputs[0].bytes is not a whole number"),
    "negative bytes": (_set("inputs.0.bytes", -1), "is not a whole number of 0 or more"),
    "case name as a number": (_set("case.path", 5), "case.path is not text"),
    "case name with a slash": (_set("case.path", "a/b"), "is not the name of one folder"),
    "unknown method": (_set("options.methods", ["windows", "rm -rf"]), "options.methods[1] is not a method"),
    "tables not a list": (_set("tables", {}), "tables is not a list"),
    "hash not hex": (_set("inputs.0.sha256", "z" * 64), "is not a SHA-256"),
    "key of its own": (_set("evil", 1), "has a key the toolkit does not write"),
    "absolute case location": (_set("case.relative_to_report", "/etc"), "absolute"),
    "location to another name": (_set("case.relative_to_report", "../elsewhere"), "is not a path from the report"),
    "table file elsewhere": (_set("tables.0.file", "report.html"), "is not tables/"),
    "fingerprint against its file": (_set("tables.0.sha256", "0" * 64), "is not the hash recorded for its file"),
    "output id": (_set("output_id", "x"), "is not the id of the report's marker"),
    "older format": (_set("format", "delay-report-manifest/1"), "made by another version"),
    "not a manifest": (lambda m: [m], "is not a JSON object"),
    "another format": (_set("format", "web-app-manifest"), "not a report manifest of this toolkit"),
}


@pytest.mark.parametrize("name", sorted(CRAFTED))
def test_a_crafted_manifest_is_one_line_and_exit_2(project, name):
    change, words = CRAFTED[name]
    report = project / "report"
    write_manifest(report, change(manifest_of(report)))
    line = assert_unreadable(run("verify", report), words)
    secret = hashlib.sha256(Path("/etc/passwd").read_bytes()).hexdigest() if Path("/etc/passwd").is_file() else None
    assert not re.search(r"[0-9a-f]{12}", line) or secret is None or secret[:12] not in line


@pytest.mark.parametrize("where", ["whole", "settings"])
def test_a_manifest_nested_200000_deep_is_refused_without_recursing(project, where):
    report = project / "report"
    deep = "[" * 200_000 + "]" * 200_000
    if where == "whole":
        text = deep
    else:
        manifest = manifest_of(report)
        manifest["settings"] = {"deep": "PLACE"}
        text = json.dumps(manifest).replace('"PLACE"', deep)
    (report / "manifest.json").write_text(text, encoding="utf-8")
    assert_unreadable(run("verify", report), "nests 200,0", f"at most {MAX_DEPTH}")


@pytest.mark.parametrize(
    "content, words",
    [
        (b"{", "not readable as JSON"),
        (b"\xff\xfe{}", "not UTF-8"),
        (b'{"format": "delay-report-manifest/2", "format": "again"}', "given twice"),
        (b'{"format": "' + FORMAT.encode() + b'", "rows": 1' + b"0" * 5000 + b"}", "not readable as JSON"),
        (b"", "not readable as JSON"),
    ],
)
def test_a_manifest_that_is_not_json_is_one_line(project, content, words):
    report = project / "report"
    (report / "manifest.json").write_bytes(content)
    assert_unreadable(run("verify", report), words)


def test_a_huge_manifest_is_refused_before_it_is_read(project):
    report = project / "report"
    with open(report / "manifest.json", "r+b") as handle:
        handle.truncate(MAX_BYTES + 1)  # sparse: nothing of it is read
    assert_unreadable(run("verify", report), "a report's manifest is at most")


def test_no_manifest_or_a_linked_one_is_one_line(project, tmp_path):
    report = project / "report"
    elsewhere = tmp_path / "other.json"
    shutil.move(report / "manifest.json", elsewhere)
    assert_unreadable(run("verify", report), "there is no manifest.json")
    (report / "manifest.json").symlink_to(elsewhere)
    assert_unreadable(run("verify", report), "is a link")


def test_a_manifest_pointing_its_case_at_a_system_folder_reads_nothing_there(project):
    report = project / "report"
    manifest = manifest_of(report)
    depth = len(Path(os.path.realpath(report)).parts) - 1
    manifest["case"]["path"] = "etc"
    manifest["case"]["relative_to_report"] = "../" * depth + "etc"
    manifest["inputs"] = [{"path": "passwd", "bytes": 1, "sha256": "0" * 64}]
    write_manifest(report, manifest)
    line = assert_unreadable(run("verify", report), "there is no case here")
    assert not re.search(r"[0-9a-f]{12}", line)


def test_an_input_linked_out_of_the_case_is_not_read_and_no_hash_is_printed(project, tmp_path):
    outside = tmp_path / "outside.csv"
    outside.write_text("secret,columns\n1,2\n", encoding="utf-8")
    events = project / "case" / "events.csv"
    events.unlink()
    events.symlink_to(outside)
    result = run("verify", project / "report")
    lines = differences(result)
    assert "input outside the case: events.csv (a link out of the case folder; not read)" in lines
    secret = hashlib.sha256(outside.read_bytes()).hexdigest()
    assert secret[:8] not in result.output


# -- the report's own files -------------------------------------------------------------------------
def test_an_edited_page_is_found(project):
    page = project / "report" / "report.html"
    page.write_text(
        page.read_text(encoding="utf-8").replace("Dig the foundations", "Dig the footings"), encoding="utf-8"
    )
    assert differences(run("verify", project / "report")) == [
        "output changed: report.html (its content is not what the report wrote)"
    ]


def test_a_number_changed_in_the_workbook_is_found(project):
    from openpyxl import load_workbook

    path = project / "report" / "tables.xlsx"
    book = load_workbook(path)
    changed = None
    for sheet in book.worksheets[1:]:
        for row in sheet.iter_rows(min_row=2):
            for cell in row:
                if isinstance(cell.value, (int, float)) and not isinstance(cell.value, bool):
                    cell.value += 1
                    changed = (sheet.title, cell.coordinate)
                    break
            if changed:
                break
        if changed:
            break
    assert changed, "the workbook holds a number"
    book.save(path)
    assert differences(run("verify", project / "report")) == [
        "output changed: tables.xlsx (its content is not what the report wrote)"
    ]


def test_a_forged_table_file_missing_files_and_the_marker_are_found(project, pristine):
    report = project / "report"
    (report / "tables" / "x.csv").write_text("party,days\ncontractor,0\n", encoding="utf-8")
    (report / "tables.xlsx").unlink()
    first = sorted((report / "tables").glob("*.csv"))[0]
    first.write_text(first.read_text(encoding="utf-8") + "forged,row\n", encoding="utf-8")
    lines = differences(run("verify", report))
    assert "output added: tables/x.csv (the report did not write it)" in lines
    assert "output missing: tables.xlsx (missing)" in lines
    assert (
        f"table file changed: tables/{first.name} (it no longer matches the fingerprint made with the report)" in lines
    )
    assert len(lines) == 3
    # the marker: removed, or taken from another report
    (report / MARKER).unlink()
    assert "output missing: delay-output.json (the marker of the report folder)" in differences(run("verify", report))
    other = json.loads((pristine / "report" / MARKER).read_text(encoding="utf-8"))
    other["id"] = "f" * 32
    (report / MARKER).write_text(json.dumps(other), encoding="utf-8")
    assert "output changed: delay-output.json (its id is not the one the manifest records)" in differences(
        run("verify", report)
    )


def test_every_difference_is_one_line_of_a_known_kind(project):
    report = project / "report"
    (report / "report.html").write_text("<p>another report</p>", encoding="utf-8")
    (report / "extra.txt").write_text("x", encoding="utf-8")
    activities = project / "case" / "snapshots" / "baseline" / "activities.csv"
    text = activities.read_text(encoding="utf-8")
    assert "A,Dig the foundations,5" in text
    activities.write_text(text.replace("A,Dig the foundations,5", "A,Dig the foundations,7"), encoding="utf-8")
    kinds = ("output changed:", "output added:", "input changed:", "table differs:")
    lines = differences(run("verify", report))
    assert all(line.startswith(kinds) for line in lines), lines
    assert {line.split(":")[0] + ":" for line in lines} == set(kinds)


# -- where the case is: relative to the report, or --case ---------------------------------------------
def test_verify_after_the_case_and_the_report_are_moved_together_or_apart(project, tmp_path):
    moved = tmp_path / "moved"
    project.rename(moved)
    assert run("verify", moved / "report").exit_code == 0
    (moved / "report").rename(tmp_path / "report-alone")
    assert_unreadable(run("verify", tmp_path / "report-alone"), "is not at ../case beside the report", "--case")
    result = run("verify", tmp_path / "report-alone", "--case", moved / "case")
    assert result.exit_code == 0, result.output
    assert_unreadable(run("verify", tmp_path / "report-alone", "--case", tmp_path), "there is no case here")


def test_the_case_is_recorded_by_name_and_relative_place_only():
    assert _relative_location(Path("/srv/claims/case"), Path("/srv/claims/out/report")) == "../../case"
    # sharing nothing but the root, the relative path would spell out the absolute one
    assert _relative_location(Path("/home/analyst/case"), Path("/tmp/report")) is None


def test_a_workbook_case_is_verified_from_its_workbook(tmp_path):
    from delay.case import write_workbook

    folder = small_case(tmp_path / "folder-case")
    workbook = write_workbook(folder, tmp_path / "project" / "case.xlsx")
    build(workbook, tmp_path / "project" / "report", methods="impacted")
    manifest = manifest_of(tmp_path / "project" / "report")
    assert manifest["case"] == {
        "path": "case.xlsx",
        "form": "workbook",
        "relative_to_report": "../case.xlsx",
        "project": "Test case",
    }  # casewriter's project name
    assert [i["path"] for i in manifest["inputs"]] == ["case.xlsx"]
    (tmp_path / "project").rename(tmp_path / "moved")
    result = run("verify", tmp_path / "moved" / "report")
    assert result.exit_code == 0, result.output


def test_the_manifest_records_every_dependency_version(project):
    environment = manifest_of(project / "report")["environment"]
    required = [
        re.split(r"[\s<>=!~;\[(]", r, maxsplit=1)[0] for r in metadata.requires("delay-toolkit") if "extra ==" not in r
    ]
    assert "numba" in required and "pandas" in required
    for name in required:
        assert environment[name] == metadata.version(name), name


# -- no machine paths in any output of delay demo ------------------------------------------------------
@pytest.fixture(scope="module")
def demo_output(tmp_path_factory):
    out = tmp_path_factory.mktemp("demo-output") / "out"
    result = run("demo", "--out", out)
    assert result.exit_code == 0, result.output
    return out


def _texts(folder: Path):
    """The bytes of every output file, and of every member of a zip file (tables.xlsx)."""
    for path in sorted(folder.rglob("*")):
        if not path.is_file():
            continue
        if zipfile.is_zipfile(path):
            with zipfile.ZipFile(path) as archive:
                for member in archive.namelist():
                    yield f"{path.name}:{member}", archive.read(member)
        else:
            yield str(path.relative_to(folder)), path.read_bytes()


def test_no_output_of_the_demo_names_a_path_of_the_machine(demo_output):
    forbidden = {str(demo_output.parent), str(demo_output.parent.resolve()), str(PROJECT), str(Path.cwd())}
    forbidden |= {p.replace("/", "\\/") for p in forbidden}  # as JSON may escape it
    found = [(name, path) for name, data in _texts(demo_output) for path in forbidden if path.encode() in data]
    assert found == []
    manifest = manifest_of(demo_output / "report")
    assert manifest["case"]["path"] == "case_demo"
    assert all(not i["path"].startswith("/") and ".." not in i["path"].split("/") for i in manifest["inputs"])


def test_the_demo_report_is_confirmed_with_the_case_given(demo_output):
    result = run("verify", demo_output / "report", "--case", PROJECT / "case_demo")
    assert result.exit_code == 0, result.output
