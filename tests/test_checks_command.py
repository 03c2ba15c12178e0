"""The ``delay check`` command, run through click's test runner on the command itself.

Exit status: 0 when the case is valid, even when metrics fail (they are findings); 2 with
one plain line per problem for invalid input (the project's command-line rules).
"""

from __future__ import annotations

import json

from casewriter import write_case, write_text
from click.testing import CliRunner

from delay.checks import DATA_CHECK_KEYS, METRIC_KEYS
from delay.commands.check import COMMANDS, check


def task(activity_id, duration, **extra):
    return {"id": activity_id, "name": f"Work {activity_id}", "duration": duration, **extra}


def small_case(root):
    # START -> A -> B -> FINISH, with a lead on A -> B: the leads metric fails (none are
    # allowed, DCMA-EA PAM 200.1 (2012) section 4, as recalled).
    activities = [
        {"id": "START", "name": "Start", "duration": 0, "kind": "start_milestone"},
        task("A", 3),
        task("B", 3),
        {"id": "FINISH", "name": "Finish", "duration": 0, "kind": "finish_milestone"},
    ]
    links = [{"pred": "START", "succ": "A"}, {"pred": "A", "succ": "B", "lag": -1}, {"pred": "B", "succ": "FINISH"}]
    progress = [dict(a) for a in activities]
    progress[0]["actual_start"] = "2025-01-06"
    progress[1].update(actual_start="2025-01-06", remaining=1)
    return write_case(
        root,
        activities=activities,
        links=links,
        snapshots={"u01": {"data_date": "2025-01-08", "activities": progress, "label": "Update 01"}},
    )


def run(*args):
    return CliRunner().invoke(check, [str(a) for a in args])


def test_listed_for_the_command_line():
    assert COMMANDS == (check,) and check.name == "check"


def test_one_snapshot_as_json(tmp_path):
    root = small_case(tmp_path)
    result = run(root, "--snapshot", "u01", "--format", "json")
    assert result.exit_code == 0, result.output
    data = json.loads(result.output)
    assert data["snapshot"] == "u01"
    assert [m["key"] for m in data["metrics"]] == list(METRIC_KEYS)
    for metric in data["metrics"]:
        assert {"key", "title", "count", "denominator", "percent", "threshold", "passed", "activities"} <= set(metric)
    leads = next(m for m in data["metrics"] if m["key"] == "leads")
    assert (leads["count"], leads["passed"], leads["activities"]) == (1, False, ["A>B"])  # a finding, exit 0
    assert [c["key"] for c in data["data_checks"]] == list(DATA_CHECK_KEYS)
    assert set(data["elements"]) == {"unlinked_elements", "unmodelled_activities", "duplicates"}


def test_baseline_by_default(tmp_path):
    data = json.loads(run(small_case(tmp_path), "--format", "json").output)
    assert data["snapshot"] == "baseline"


def test_all_snapshots(tmp_path):
    result = run(small_case(tmp_path), "--all", "--format", "json")
    assert result.exit_code == 0, result.output
    assert [s["snapshot"] for s in json.loads(result.output)["snapshots"]] == ["baseline", "u01"]


def test_compare_two_snapshots(tmp_path):
    result = run(small_case(tmp_path), "--compare", "baseline", "u01", "--format", "json")
    assert result.exit_code == 0, result.output
    data = json.loads(result.output)
    assert (data["earlier_label"], data["later_label"]) == ("Baseline", "Update 01")
    # START's one milestone date is both its actual dates; A started, and its remaining
    # work went from the planned 3 days to 1: four progress rows.
    assert data["counts"]["progress"] == 4
    assert [(c["activity"], c["field"], c["after"]) for c in data["changes"]] == [
        ("START", "actual_start", "2025-01-06"),
        ("START", "actual_finish", "2025-01-06"),
        ("A", "actual_start", "2025-01-06"),
        ("A", "remaining", "1"),
    ]


def test_tables(tmp_path):
    root = small_case(tmp_path)
    result = run(root, "--snapshot", "u01")
    assert result.exit_code == 0, result.output
    assert "Schedule quality" in result.output and "Data checks" in result.output
    assert "Model elements" in result.output and "FAIL" in result.output
    result = run(root, "--compare", "baseline", "u01")
    assert result.exit_code == 0 and "Changes by kind" in result.output


def test_unknown_snapshot_exits_2_with_one_line(tmp_path):
    result = run(small_case(tmp_path), "--snapshot", "u09")
    assert result.exit_code == 2
    assert "no snapshot 'u09'" in result.output and "Traceback" not in result.output


def test_conflicting_options_exit_2(tmp_path):
    root = small_case(tmp_path)
    assert run(root, "--all", "--snapshot", "u01").exit_code == 2
    assert run(root, "--all", "--compare", "baseline", "u01").exit_code == 2


def test_invalid_case_exits_2_naming_the_file(tmp_path):
    root = small_case(tmp_path)
    write_text(root, "snapshots/baseline/links.csv", "pred,succ,type,lag\nA,NOPE,FS,0\n")
    result = run(root)
    assert result.exit_code == 2
    assert "links.csv" in result.output and "NOPE" in result.output
    assert "Traceback" not in result.output
