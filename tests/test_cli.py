"""The ``delay`` command line: exit codes, plain error lines, nothing written on bad input.

The expectations here are the project's own contract (shared/case-format.md, issue text):
input problems exit with status 2 and print one line per problem naming file, row and
column; a traceback never reaches the user; outputs appear whole or not at all; input files
are never changed.
"""

from __future__ import annotations

import hashlib
import json
from pathlib import Path

import pytest
from casewriter import write_case, write_csv
from click.testing import CliRunner

from delay.cli import cli

ACTIVITIES = [
    {"id": "START", "name": "Start", "duration": 0, "kind": "start_milestone"},
    {"id": "A", "name": "Dig", "duration": 3},
    {"id": "B", "name": "Pour", "duration": 2},
    {"id": "END", "name": "Finish", "duration": 0, "kind": "finish_milestone"},
]
LINKS = [
    {"pred": "START", "succ": "A", "type": "FS", "lag": 0},
    {"pred": "A", "succ": "B", "type": "FS", "lag": 0},
    {"pred": "B", "succ": "END", "type": "FS", "lag": 0},
]


def run(*args):
    return CliRunner().invoke(cli, [str(a) for a in args], catch_exceptions=False)


def digest(folder: Path) -> dict[str, str]:
    return {
        str(p.relative_to(folder)): hashlib.sha256(p.read_bytes()).hexdigest()
        for p in sorted(folder.rglob("*"))
        if p.is_file()
    }


def test_help_reads_like_a_manual():
    result = run("--help")
    assert result.exit_code == 0
    for command in ("validate", "new", "schedule", "synth", "demo"):
        assert command in result.output
    assert "not legal" in result.output  # the caution is part of the manual


def test_validate_a_valid_case(tmp_path):
    root = write_case(tmp_path / "case", activities=ACTIVITIES, links=LINKS)
    result = run("validate", root)
    assert result.exit_code == 0, result.output
    assert "baseline" in result.output and "valid" in result.output
    summary = json.loads(run("validate", root, "--format", "json").output)
    assert summary["snapshots"][0]["activities"] == 4


BROKEN = {
    # name: (change to the rows, file, row, column) - rows counted as in a spreadsheet
    "unknown link type": (
        lambda rows, links: links.__setitem__(1, {**links[1], "type": "XX"}),
        "snapshots/baseline/links.csv",
        3,
        "type",
    ),
    "negative duration": (
        lambda rows, links: rows.__setitem__(2, {**rows[2], "duration": -1}),
        "snapshots/baseline/activities.csv",
        4,
        "duration",
    ),
    "link to unknown activity": (
        lambda rows, links: links.__setitem__(2, {**links[2], "succ": "NOPE"}),
        "snapshots/baseline/links.csv",
        4,
        "succ",
    ),
    "logic loop": (
        lambda rows, links: links.append({"pred": "B", "succ": "A", "type": "FS", "lag": 0}),
        "snapshots/baseline/links.csv",
        None,
        None,
    ),
}


@pytest.mark.parametrize("name", sorted(BROKEN))
@pytest.mark.parametrize("command", ["validate", "schedule", "demo"])
def test_bad_input_exits_2_with_plain_lines_and_writes_nothing(tmp_path, name, command):
    change, file, row, column = BROKEN[name]
    rows = [dict(r) for r in ACTIVITIES]
    links = [dict(r) for r in LINKS]
    change(rows, links)
    root = write_case(tmp_path / "case", activities=rows, links=links)
    before = digest(root)
    out = tmp_path / "out"
    args = {
        "validate": ("validate", root),
        "schedule": ("schedule", root),
        "demo": ("demo", "--case", root, "--out", out),
    }[command]
    result = CliRunner().invoke(cli, [str(a) for a in args])
    assert result.exit_code == 2, result.output
    assert "Traceback" not in result.output
    assert result.exception is None or isinstance(result.exception, SystemExit)
    errors = [line for line in result.output.splitlines() if line.startswith("error:")]
    assert errors, result.output
    assert any(file in line for line in errors)
    if row is not None:
        assert any(f"row {row}" in line and f"'{column}'" in line for line in errors), errors
    assert not out.exists()
    assert digest(root) == before, "input files must not change"


def test_every_problem_of_a_file_is_reported_in_one_run(tmp_path):
    rows = [dict(r) for r in ACTIVITIES]
    rows[1]["duration"] = -1
    rows[2]["duration"] = "two"
    root = write_case(tmp_path / "case", activities=rows, links=LINKS)
    result = CliRunner().invoke(cli, ["validate", str(root)])
    assert result.exit_code == 2
    errors = [line for line in result.output.splitlines() if line.startswith("error:")]
    assert any("row 3" in line for line in errors) and any("row 4" in line for line in errors)


def test_missing_case_folder_is_a_usage_error(tmp_path):
    result = CliRunner().invoke(cli, ["validate", str(tmp_path / "nowhere")])
    assert result.exit_code == 2
    assert "Traceback" not in result.output


def test_new_writes_a_skeleton_that_validates(tmp_path):
    target = tmp_path / "fresh"
    assert run("new", target).exit_code == 0
    assert run("validate", target).exit_code == 0
    # a second time into the now non-empty folder is refused, and changes nothing
    before = digest(target)
    result = CliRunner().invoke(cli, ["new", str(target)])
    assert result.exit_code == 2 and "Traceback" not in result.output
    assert digest(target) == before


def test_schedule_json_contract(tmp_path):
    root = write_case(tmp_path / "case", activities=ACTIVITIES, links=LINKS)
    payload = json.loads(run("schedule", root, "--format", "json").output)
    assert set(payload) == {"snapshot", "label", "data_date", "completion", "activities"}
    assert payload["snapshot"] == "baseline"
    assert set(payload["activities"][0]) == {
        "activity",
        "early_start",
        "early_finish",
        "late_start",
        "late_finish",
        "total_float",
        "free_float",
        "critical",
    }
    by_id = {a["activity"]: a for a in payload["activities"]}
    # Hand-worked (case-format time convention, 5-day calendar from Monday 2025-01-06):
    # A occupies Mon 6 .. Wed 8, B Thu 9 .. Fri 10, the finish milestone is dated Fri 10.
    assert by_id["A"]["early_start"] == "2025-01-06" and by_id["A"]["early_finish"] == "2025-01-08"
    assert by_id["B"]["early_start"] == "2025-01-09" and by_id["B"]["early_finish"] == "2025-01-10"
    assert payload["completion"] == "2025-01-10"
    assert all(a["total_float"] == 0 and a["critical"] for a in payload["activities"])


def test_schedule_table_lists_the_driving_path_first(tmp_path):
    rows = ACTIVITIES + [{"id": "SIDE", "name": "Side work", "duration": 1}]
    links = LINKS + [{"pred": "START", "succ": "SIDE", "type": "FS", "lag": 0}]
    root = write_case(tmp_path / "case", activities=rows, links=links)
    result = run("schedule", root, "--format", "csv")
    assert result.exit_code == 0
    ids = [line.split(",")[0] for line in result.output.splitlines()[1:]]
    assert ids[:4] == ["START", "A", "B", "END"] and ids[-1] == "SIDE"


def test_synth_then_validate_and_schedule(tmp_path):
    out = tmp_path / "synthetic"
    assert run("synth", out, "--activities", 120, "--updates", 2, "--elements", 30, "--seed", 3).exit_code == 0
    assert run("validate", out).exit_code == 0
    for snapshot in ("baseline", "u01", "u02", "asbuilt"):
        result = run("schedule", out, "--snapshot", snapshot, "--format", "json")
        assert result.exit_code == 0, result.output
    # the same seed writes the same case
    again = tmp_path / "again"
    run("synth", again, "--activities", 120, "--updates", 2, "--elements", 30, "--seed", 3)
    assert digest(out) == digest(again)


def test_unknown_snapshot_is_an_input_error(tmp_path):
    root = write_case(tmp_path / "case", activities=ACTIVITIES, links=LINKS)
    result = CliRunner().invoke(cli, ["schedule", str(root), "--snapshot", "u99"])
    assert result.exit_code == 2 and "u99" in result.output and "Traceback" not in result.output


def test_demo_on_a_small_case_writes_its_outputs_whole(tmp_path):
    root = write_case(tmp_path / "case", activities=ACTIVITIES, links=LINKS)
    out = tmp_path / "out"
    assert run("demo", "--case", root, "--out", out).exit_code == 0
    earlier = json.loads((out / "delay-output.json").read_text(encoding="utf-8"))
    (out / "schedules" / "baseline.csv").write_text("an earlier run's file", encoding="utf-8")
    result = run("demo", "--case", root, "--out", out)  # the folder of an earlier run
    assert result.exit_code == 0, result.output
    assert (out / "schedules" / "baseline.csv").read_text(encoding="utf-8").startswith("activity,")
    marker = json.loads((out / "delay-output.json").read_text(encoding="utf-8"))
    assert marker["id"] != earlier["id"], "the output folder is replaced whole"
    assert "schedules/baseline.csv" in marker["files"] and "report/report.html" in marker["files"]
    assert not [p for p in tmp_path.iterdir() if p.name.startswith(".")], "no temporary folder is left"
    # a folder that holds a file the toolkit did not write is never replaced
    mine = tmp_path / "mine"
    mine.mkdir()
    (mine / "stale.txt").write_text("from an earlier run", encoding="utf-8")
    refused = run("demo", "--case", root, "--out", mine)
    assert refused.exit_code == 2 and "did not write" in refused.output
    assert [p.name for p in mine.iterdir()] == ["stale.txt"]
    assert (mine / "stale.txt").read_text(encoding="utf-8") == "from an earlier run"


def test_case_rows_with_a_bom_are_read(tmp_path):
    root = write_case(tmp_path / "case", activities=ACTIVITIES, links=LINKS)
    path = root / "snapshots" / "baseline" / "links.csv"
    path.write_bytes(b"\xef\xbb\xbf" + path.read_bytes())
    assert run("validate", root).exit_code == 0


def test_unknown_columns_are_kept(tmp_path):
    rows = [{**r, "area": "North"} for r in ACTIVITIES]
    root = write_case(tmp_path / "case", activities=rows, links=LINKS)
    write_csv(root / "snapshots" / "baseline" / "activities.csv", rows)
    assert run("validate", root).exit_code == 0
    from delay.case import load_case

    assert list(load_case(root).baseline.activities["area"]) == ["North"] * 4


def test_former_command_names_run_the_command_they_became(tmp_path):
    # impact became impacted and butfor collapsed (one word per method everywhere); the old
    # names still run, give the same output, and --help lists each command once
    # A occupies Mon 6 .. Wed 8 Jan 2025, B Thu 9 .. Fri 10; the as-built record has B two
    # days late, and one event of the employer's lengthens it by two days
    events = [
        {
            "id": "E1",
            "title": "Late pour permit",
            "party": "employer",
            "start": "2025-01-09",
            "finish": "2025-01-14",
            "activities": "B",
            "impact": "extend",
            "days": 2,
        }
    ]
    asbuilt = [
        {"id": "START", "actual_start": "2025-01-06", "actual_finish": "2025-01-06"},
        {"id": "A", "actual_start": "2025-01-06", "actual_finish": "2025-01-08"},
        {"id": "B", "actual_start": "2025-01-09", "actual_finish": "2025-01-14"},
        {"id": "END", "actual_start": "2025-01-14", "actual_finish": "2025-01-14"},
    ]
    root = write_case(
        tmp_path / "case", activities=ACTIVITIES, links=LINKS, files={"events.csv": events, "asbuilt.csv": asbuilt}
    )
    for old, new in (("impact", "impacted"), ("butfor", "collapsed")):
        before, after = run(old, root, "--format", "json"), run(new, root, "--format", "json")
        assert after.exit_code == 0, after.output
        assert before.exit_code == after.exit_code and before.output == after.output
    listed = [line.split()[0] for line in run("--help").output.split("Commands:")[1].splitlines() if line.strip()]
    assert "impacted" in listed and "collapsed" in listed
    assert "impact" not in listed and "butfor" not in listed


def test_each_command_module_is_imported_only_when_its_command_runs():
    # The registry of where each command lives must name every command of every module
    # and no other; a run of one command imports its own module and none of the others
    # (checked in a fresh interpreter, where nothing else has imported them).
    import subprocess
    import sys

    from delay.commands import COMMAND_MODULES, MODULES, all_commands, command_named

    defined = {command.name: command.callback.__module__.rsplit(".", 1)[1] for command in all_commands()}
    assert COMMAND_MODULES == defined
    assert set(COMMAND_MODULES.values()) == set(MODULES)
    assert all(command_named(name).name == name for name in COMMAND_MODULES)
    assert command_named("schedule") is None  # defined in delay.cli itself
    script = (
        "import sys\n"
        "from click.testing import CliRunner\n"
        "from delay.cli import cli\n"
        "result = CliRunner().invoke(cli, ['tia', '--help'])\n"
        "assert result.exit_code == 0, result.output\n"
        "print(sorted(m for m in sys.modules if m.startswith('delay.commands.')))\n"
    )
    found = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True, check=True)
    assert found.stdout.strip() == "['delay.commands.common', 'delay.commands.modelled']"
