"""Every key of every command's ``--format json`` output and every column of every CSV file
``delay demo`` writes is defined in docs/outputs.md, and every name it defines is emitted.

The external references are the document itself (its ``### `name``` entries, each with a
``- unit:`` and an ``- emitted by:`` line) and the JSON standard, RFC 8259 (IETF, 2017),
section 4, for what a key is: the name of a member of an object. The walk collects the
member names of every object, at any depth, including the objects inside arrays; the
values of arrays of strings are values, not keys. A CSV column is a field of the file's
header record (RFC 4180, section 2). Both section numbers are recalled from memory.

Some objects and columns are keyed by data, not by vocabulary (party names, snapshot
folders, method names, kinds of change, the headers a case file gave): docs/outputs.md
documents each such dictionary once, under its parent, and the walk leaves their keys out.

Each command runs once per module on the demo case (case_demo/), through
``click.testing.CliRunner`` on ``delay.cli:cli``; the commands that write into a case
(``import-ifc``, ``import-ifc-schedule``) run on a copy in a temporary folder.
"""

from __future__ import annotations

import csv
import json
import re
import shutil
from pathlib import Path

import pytest
from click.testing import CliRunner

from delay.cli import cli

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "case_demo"
DOC = ROOT / "docs" / "outputs.md"

#: Each JSON form, by the name docs/outputs.md gives it in "emitted by", and its arguments
#: (``{case}``: the demo case, ``{copy}``: a copy of it, ``{tmp}``: a scratch folder).
JSON_COMMANDS = {
    "delay validate": ["validate", "{case}"],
    "delay schedule": ["schedule", "{case}"],
    "delay check": ["check", "{case}"],
    "delay check --all": ["check", "{case}", "--all"],
    "delay check --compare": ["check", "{case}", "--compare", "baseline", "2025-03-31"],
    "delay windows": ["windows", "{case}"],
    "delay asbuilt": ["asbuilt", "{case}"],
    "delay impacted": ["impacted", "{case}"],
    "delay tia": ["tia", "{case}"],
    "delay collapsed": ["collapsed", "{case}"],
    "delay entitlement": ["entitlement", "{case}"],
    "delay compare": ["compare", "{case}"],
    "delay export-ifc": ["export-ifc", "{case}", "--snapshot", "baseline", "{tmp}/baseline.ifc"],
    "delay import-ifc": [
        "import-ifc",
        "{case}/model/tessaly_wharf.ifc",
        "{copy}",
        "--code-property",
        "TW_ProjectCodes.WorkBreakdownCode",
        "--classification",
        "Tessaly Wharf element codes",
    ],
    "delay import-ifc-schedule": [
        "import-ifc-schedule",
        "{tmp}/baseline.ifc",
        "{copy}",
        "--snapshot",
        "baseline",
        "--replace",
    ],
}

#: JSON objects whose keys are data (documented once under the parent in docs/outputs.md):
#: ``by_party_days`` is keyed by party, ``renamed`` by the header a case file gave, and
#: ``counts`` by kind of change (the values of ``changes[].kind``).
DATA_KEYED_OBJECTS = ("by_party_days", "renamed", "counts")
#: Rows whose method columns are data: in ``delay compare``, a key of a ``by_party`` or
#: ``by_event`` row that names one of the output's ``methods`` holds that method's days.
METHOD_KEYED_ROWS = ("by_party", "by_event")
#: CSV files whose columns after the first are data: snapshot folders (one column per
#: snapshot), method names, or kinds of change.
SNAPSHOT_COLUMN_FILES = ("data_checks.csv", "quality_verdicts.csv")
METHOD_COLUMN_FILES = ("comparison_by_event.csv", "comparison_by_party.csv", "entitlement_by_method.csv")
CHANGE_COLUMN_FILES = ("snapshot_changes.csv",)
#: A schedule's CSV carries the case's own extra activity columns along, named as the case
#: names them (with `` (input)`` where the schedule already uses the name): data.
INPUT_COLUMN = " (input)"


def _args(template: list[str], case: Path, copy: Path, tmp: Path) -> list[str]:
    return [a.format(case=case, copy=copy, tmp=tmp) for a in template]


def _keys(node, methods: frozenset, parent: str = "", found: set | None = None) -> set:
    """Member names of every object in ``node`` (RFC 8259, section 4), at any depth."""
    found = set() if found is None else found
    if isinstance(node, dict):
        for key, value in node.items():
            if parent in DATA_KEYED_OBJECTS:
                continue
            if parent in METHOD_KEYED_ROWS and key in methods:
                continue
            found.add(key)
            _keys(value, methods, key, found)
    elif isinstance(node, list):
        for item in node:
            _keys(item, methods, parent, found)
    return found


@pytest.fixture(scope="module")
def outputs(tmp_path_factory) -> dict:
    """Every JSON form (by command) and the demo's CSV headers (by relative path)."""
    tmp = tmp_path_factory.mktemp("vocabulary")
    copy = tmp / "case"
    shutil.copytree(DEMO, copy)
    runner = CliRunner()
    forms = {}
    for name, template in JSON_COMMANDS.items():
        run = runner.invoke(cli, [*_args(template, DEMO, copy, tmp), "--format", "json"])
        assert run.exit_code == 0, f"{name}: {run.output}"
        forms[name] = json.loads(run.stdout)
    demo = tmp / "demo"
    run = runner.invoke(cli, ["demo", "--out", str(demo)])
    assert run.exit_code == 0, run.output
    headers = {}
    for path in sorted(demo.rglob("*.csv")):
        with path.open(newline="", encoding="utf-8") as handle:
            headers[path.relative_to(demo).as_posix()] = next(csv.reader(handle))
    return {"json": forms, "csv": headers}


def _methods(outputs) -> frozenset:
    return frozenset(outputs["json"]["delay compare"]["methods"])


def _data_columns(outputs, file: str, columns: list[str]) -> set:
    """The columns of one CSV file that are data (see the constants above)."""
    name = file.rsplit("/", 1)[-1]
    summary = outputs["json"]["delay validate"]
    folders = {s["snapshot"] for s in summary["snapshots"]} | {summary["asbuilt_snapshot"]["snapshot"]}
    kinds = set(outputs["json"]["delay check --compare"]["counts"])
    data = {c for c in columns if c.endswith(INPUT_COLUMN)}
    if name in SNAPSHOT_COLUMN_FILES:
        data |= {c for c in columns if c in folders}
    if name in METHOD_COLUMN_FILES:
        data |= {c for c in columns if c in _methods(outputs)}
    if name in CHANGE_COLUMN_FILES:
        data |= {c for c in columns if c in kinds}
    return data


def _file_name(file: str) -> str:
    """How docs/outputs.md names a CSV file: ``schedules/<snapshot>.csv`` for every schedule."""
    return "schedules/<snapshot>.csv" if file.startswith("schedules/") else file


def _emitters(outputs) -> dict[str, set[str]]:
    """Each vocabulary name and the commands and CSV files that emit it."""
    found: dict[str, set[str]] = {}
    methods = _methods(outputs)
    for command, form in outputs["json"].items():
        for key in _keys(form, methods):
            found.setdefault(key, set()).add(command)
    for file, columns in outputs["csv"].items():
        data = _data_columns(outputs, file, columns)
        for column in columns:
            if column not in data:
                found.setdefault(column, set()).add(_file_name(file))
    return found


def _documented() -> dict[str, dict[str, str]]:
    """The doc's entries: ``### `name``` headings, each with its unit and emitters line."""
    entries: dict[str, dict[str, str]] = {}
    current = None
    for line in DOC.read_text(encoding="utf-8").splitlines():
        heading = re.fullmatch(r"### `([^`]+)`", line.strip())
        if heading:
            current = heading.group(1)
            assert current not in entries, f"{current} is defined twice in docs/outputs.md"
            entries[current] = {}
            continue
        if line.startswith("## "):
            current = None
        field = re.fullmatch(r"- (unit|emitted by): (.+)", line.strip())
        if current and field:
            entries[current][field.group(1)] = field.group(2)
    return entries


def test_every_json_key_is_defined(outputs):
    defined = _documented()
    methods = _methods(outputs)
    for command, form in outputs["json"].items():
        missing = sorted(_keys(form, methods) - set(defined))
        assert not missing, f"{command} --format json: keys not in docs/outputs.md: {missing}"


def test_every_csv_column_is_defined(outputs):
    defined = _documented()
    for file, columns in outputs["csv"].items():
        missing = sorted(set(columns) - _data_columns(outputs, file, columns) - set(defined))
        assert not missing, f"{file}: columns not in docs/outputs.md: {missing}"


def test_every_defined_name_is_emitted(outputs):
    emitted = _emitters(outputs)
    stale = sorted(set(_documented()) - set(emitted))
    assert not stale, f"docs/outputs.md defines names no output emits: {stale}"


def test_each_entry_gives_its_unit_and_exactly_its_emitters(outputs):
    emitted = _emitters(outputs)
    for name, entry in _documented().items():
        assert entry.get("unit"), f"{name}: no '- unit:' line"
        assert "emitted by" in entry, f"{name}: no '- emitted by:' line"
        listed = set(re.findall(r"`([^`]+)`", entry["emitted by"]))
        assert listed == emitted.get(name, set()), (
            f"{name}: the doc lists {sorted(listed)}, the outputs are {sorted(emitted.get(name, set()))}"
        )


def test_the_data_keyed_dictionaries_are_documented(outputs):
    """Each parent whose keys are data is described in the doc's section on them."""
    text = DOC.read_text(encoding="utf-8")
    section = text.split("## Keys and columns that are data", 1)
    assert len(section) == 2, "docs/outputs.md has no section 'Keys and columns that are data'"
    body = section[1].split("\n## ", 1)[0]
    for parent in (*DATA_KEYED_OBJECTS, *METHOD_KEYED_ROWS, *SNAPSHOT_COLUMN_FILES, *METHOD_COLUMN_FILES):
        assert f"`{parent}`" in body, f"the data section does not name `{parent}`"
    for parent in (*CHANGE_COLUMN_FILES, "schedules/<snapshot>.csv"):
        assert f"`{parent}`" in body, f"the data section does not name `{parent}`"


def test_the_walk_finds_nested_keys_and_skips_data():
    """The walker itself, on a hand-made object (RFC 8259: keys are member names)."""
    form = {
        "a": [{"b": 1, "by_party_days": {"employer": 2}}, {"c": [{"d": None}]}],
        "by_party": [{"party": "x", "windows": 3}],
        "e": ["f", "g"],
    }
    assert _keys(form, frozenset({"windows"})) == {"a", "b", "by_party_days", "c", "d", "by_party", "party", "e"}
