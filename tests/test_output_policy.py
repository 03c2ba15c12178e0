"""The output policy (delay.output): never lose a user's file, never write into the case.

Every probe is a command run as a user would run it, checked for its exit status, the one
line it prints, no traceback, inputs unchanged (the folder hashed with hashlib before and
after), nothing written on a refusal, and the user's files intact. The contract is the
project's own (README "Outputs", delay/output.py module docstring); the references outside
the project are hashlib for "unchanged", the POSIX rule for file modes (a new folder gets
0777 and a new file 0666, less the umask: mkdir(2), open(2)) and the shell's convention
that a process ended by signal N exits with status 128 + N (130 for SIGINT, 143 for
SIGTERM; POSIX "Shell Command Language", 2.8.2 Exit Status for Commands).

The case is the small one of tests/test_report.py (START -> A -> B -> END on a 5-day
calendar, an update with A finished, one employer event on B, an as-built record, two model
elements): enough for every method of the report.
"""

from __future__ import annotations

import hashlib
import json
import os
import shutil
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest
from click.testing import CliRunner
from test_report import write_small_case

from delay import output
from delay.cli import cli

# the small case of the report's tests (its working is in tests/test_report.py)
small_case = write_small_case


def digest(root: Path) -> dict[str, str]:
    """Every file (SHA-256), folder and link under ``root``, by relative path."""
    if root.is_file():
        return {root.name: hashlib.sha256(root.read_bytes()).hexdigest()}
    found = {}
    for path in sorted(root.rglob("*")):
        key = path.relative_to(root).as_posix()
        if path.is_symlink():
            found[key] = "link to " + os.readlink(path)
        elif path.is_dir():
            found[key] = "folder"
        else:
            found[key] = hashlib.sha256(path.read_bytes()).hexdigest()
    return found


def run(*args):
    return CliRunner().invoke(cli, [str(a) for a in args])


def temporaries(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir() if ".delay-" in p.name)


def assert_refused(result, *words):
    """Exit status 2, exactly one line on stderr naming the reason, no traceback."""
    assert result.exit_code == 2, result.output
    assert result.exception is None or isinstance(result.exception, SystemExit), result.exception
    assert "Traceback" not in result.output
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: "), lines
    for word in words:
        assert word in lines[0], lines[0]
    return lines[0]


@pytest.fixture
def case(tmp_path):
    return small_case(tmp_path / "case")


# -- refusals: the probes of the issue ------------------------------------------------------------
def test_demo_into_the_case_folder_is_refused_and_the_case_survives(case):
    before = digest(case)
    line = assert_refused(run("demo", "--case", case, "--out", case), "case folder itself")
    assert "nothing was written" in line
    assert digest(case) == before


def test_demo_into_the_parent_of_the_case_is_refused(case, tmp_path):
    before = digest(tmp_path)
    assert_refused(run("demo", "--case", case, "--out", tmp_path), "holds the case folder")
    assert digest(tmp_path) == before


def test_demo_into_a_folder_of_user_files_is_refused_with_exit_2(case, tmp_path):
    mine = tmp_path / "thesis"
    (mine / "chapters").mkdir(parents=True)
    (mine / "draft.txt").write_text("two years of work", encoding="utf-8")
    (mine / "chapters" / "one.txt").write_text("chapter one", encoding="utf-8")
    before, case_before = digest(mine), digest(case)
    assert_refused(run("demo", "--case", case, "--out", mine), "did not write")
    assert digest(mine) == before and digest(case) == case_before
    assert temporaries(tmp_path) == []


def test_report_into_a_web_app_with_its_own_manifest_json_is_refused(case, tmp_path):
    app = tmp_path / "webapp"
    (app / "src").mkdir(parents=True)
    (app / "manifest.json").write_text('{"name": "my app", "start_url": "/"}', encoding="utf-8")
    (app / "app.js").write_text("console.log('hello')", encoding="utf-8")
    (app / "src" / "index.js").write_text("export default 1", encoding="utf-8")
    before = digest(app)
    assert_refused(run("report", case, "--out", app, "--methods", "impacted"), "did not write")
    assert digest(app) == before


def test_report_inside_the_case_is_refused_and_makes_no_new_snapshot(case):
    before = digest(case)
    assert_refused(run("report", case, "--out", case / "snapshots" / "report"), "inside the case folder")
    assert digest(case) == before
    assert sorted(p.name for p in (case / "snapshots").iterdir()) == ["baseline", "u01"]
    assert run("validate", case).exit_code == 0


def test_a_link_to_the_case_is_the_case(case, tmp_path):
    link = tmp_path / "shortcut"
    link.symlink_to(case, target_is_directory=True)
    before = digest(case)
    assert_refused(run("report", case, "--out", link, "--methods", "impacted"), "case folder itself")
    assert_refused(run("demo", "--case", case, "--out", link / "out"), "inside the case folder")
    assert digest(case) == before and link.is_symlink()


def test_a_file_or_a_broken_link_is_no_output_folder(case, tmp_path):
    letter = tmp_path / "letter.txt"
    letter.write_text("keep me", encoding="utf-8")
    assert_refused(run("report", case, "--out", letter), "is a file")
    assert letter.read_text(encoding="utf-8") == "keep me"
    broken = tmp_path / "gone"
    broken.symlink_to(tmp_path / "nowhere")
    assert_refused(run("report", case, "--out", broken), "broken")
    assert not (tmp_path / "nowhere").exists()


def test_export_ifc_over_the_cases_own_events_csv_is_refused(case, tmp_path):
    pytest.importorskip("ifcopenshell")
    before = digest(case)
    assert_refused(run("export-ifc", case, case / "events.csv"), "input file")
    assert_refused(run("export-ifc", case, case / "model" / "schedule.ifc"), "inside the case folder")
    assert digest(case) == before
    # a file of the user's is not replaced; an earlier export is
    mine = tmp_path / "mine.ifc"
    mine.write_text("ISO-10303-21;\nHEADER;\nFILE_NAME('x','',(''),(''),'a CAD program','','');\n", encoding="utf-8")
    assert_refused(run("export-ifc", case, mine), "did not write")
    assert mine.read_text(encoding="utf-8").startswith("ISO-10303-21;")
    fresh = tmp_path / "schedule.ifc"
    assert run("export-ifc", case, fresh).exit_code == 0
    again = run("export-ifc", case, fresh)
    assert again.exit_code == 0, again.output
    assert b"'delay-toolkit " in fresh.read_bytes()[:2000]
    assert temporaries(tmp_path) == []


def test_import_ifc_never_writes_over_its_model_or_through_a_link_out_of_the_case(case, tmp_path):
    pytest.importorskip("ifcopenshell")
    # the model named is the case's own elements.csv, which the import would write
    (case / "elements.csv").write_text("id,name,wbs\n", encoding="utf-8")
    before = digest(case)
    assert_refused(run("import-ifc", case / "elements.csv", case), "the model is the case's elements.csv")
    assert digest(case) == before
    # elements.csv is a link to a file outside the case: the import must not write there
    outside = tmp_path / "shared-elements.csv"
    outside.write_text("id,name,wbs\n", encoding="utf-8")
    (case / "elements.csv").unlink()
    (case / "elements.csv").symlink_to(outside)
    model = tmp_path / "model.ifc"  # refused before the model is read
    model.write_text("ISO-10303-21;\n", encoding="utf-8")
    assert_refused(run("import-ifc", model, case), "a link out of the case folder")
    assert outside.read_text(encoding="utf-8") == "id,name,wbs\n"


def test_new_and_synth_write_only_into_a_new_or_empty_folder(tmp_path):
    mine = tmp_path / "mine"
    mine.mkdir()
    (mine / "notes.txt").write_text("keep me", encoding="utf-8")
    for args in (("new", mine), ("synth", mine, "--activities", 20)):
        assert_refused(run(*args), "not empty")
        assert [p.name for p in mine.iterdir()] == ["notes.txt"]
    empty = tmp_path / "empty"
    empty.mkdir()
    assert run("synth", empty, "--activities", 20).exit_code == 0
    assert (empty / "case.toml").is_file() and not (empty / output.MARKER).exists()  # a case, not an output
    assert run("new", tmp_path / "fresh").exit_code == 0
    assert not (tmp_path / "fresh" / output.MARKER).exists()
    # a case written by new is never taken for an output the toolkit may replace
    other = small_case(tmp_path / "other")
    before = digest(tmp_path / "fresh")
    assert_refused(run("report", other, "--out", tmp_path / "fresh", "--methods", "impacted"), "did not write")
    assert digest(tmp_path / "fresh") == before
    assert temporaries(tmp_path) == []


# -- replacing an earlier output ------------------------------------------------------------------
def test_an_earlier_output_is_replaced_whole_and_a_nested_report_keeps_its_own_marker(case, tmp_path):
    out = tmp_path / "out"
    assert run("demo", "--case", case, "--out", out).exit_code == 0
    outer = json.loads((out / output.MARKER).read_text(encoding="utf-8"))
    inner = json.loads((out / "report" / output.MARKER).read_text(encoding="utf-8"))
    assert outer["tool"] == inner["tool"] == "delay-toolkit" and outer["id"] != inner["id"]
    # the report inside the demo's folder written again on its own: the demo's folder then
    # still holds only what the toolkit wrote, and a later demo replaces it
    assert run("report", case, "--out", out / "report", "--methods", "impacted").exit_code == 0
    assert run("demo", "--case", case, "--out", out).exit_code == 0
    assert json.loads((out / output.MARKER).read_text(encoding="utf-8"))["id"] != outer["id"]
    assert temporaries(tmp_path) == []


def test_operating_system_litter_does_not_block_a_replacement(case, tmp_path):
    out = tmp_path / "r"
    assert run("report", case, "--out", out, "--methods", "impacted").exit_code == 0
    (out / ".DS_Store").write_bytes(b"\0\0\0\1Bud1")
    assert run("report", case, "--out", out, "--methods", "impacted").exit_code == 0
    assert not (out / ".DS_Store").exists()


def test_stale_temporaries_of_a_dead_run_are_removed_and_a_set_aside_output_put_back(case, tmp_path):
    dead = subprocess.run(
        [sys.executable, "-c", "import os; print(os.getpid())"], capture_output=True, text=True, check=True
    )
    pid = int(dead.stdout)
    out = tmp_path / "r"
    assert run("report", case, "--out", out, "--methods", "impacted").exit_code == 0
    earlier = digest(out)
    # what a run killed between moving the earlier report aside and moving the new one in leaves
    os.replace(out, tmp_path / f".r.delay-{pid}-abcd1234.old")
    half = tmp_path / f".r.delay-{pid}-efgh5678.part"
    (half / "tables").mkdir(parents=True)
    (tmp_path / f".other.csv.delay-{pid}-ijkl9012.part").write_text("half a file", encoding="utf-8")
    output.clean_stale(tmp_path)
    assert digest(out) == earlier, "the earlier report is put back"
    assert temporaries(tmp_path) == []
    # a live run's temporaries are left alone
    mine = tmp_path / f".r.delay-{os.getpid()}-mnop3456.part"
    mine.mkdir()
    output.clean_stale(tmp_path)
    assert mine.exists()
    mine.rmdir()


# -- modes ------------------------------------------------------------------------------------------
@pytest.mark.parametrize("mask", [0o022, 0o077])
def test_folder_and_file_modes_follow_the_umask(case, tmp_path, mask):
    previous = os.umask(mask)
    try:
        assert run("report", case, "--out", tmp_path / "r", "--methods", "impacted").exit_code == 0
        assert run("new", tmp_path / "fresh").exit_code == 0
        assert run("synth", tmp_path / "synthetic", "--activities", 20).exit_code == 0
        pytest.importorskip("ifcopenshell")
        assert run("export-ifc", case, tmp_path / "schedule.ifc").exit_code == 0
    finally:
        os.umask(previous)
    for folder in (tmp_path / "r", tmp_path / "r" / "tables", tmp_path / "fresh", tmp_path / "synthetic"):
        assert folder.stat().st_mode & 0o777 == 0o777 & ~mask, folder
    for file in (
        tmp_path / "r" / "report.html",
        tmp_path / "r" / "tables.xlsx",
        tmp_path / "fresh" / "case.toml",
        tmp_path / "schedule.ifc",
    ):
        assert file.stat().st_mode & 0o777 == 0o666 & ~mask, file


# -- signals ----------------------------------------------------------------------------------------
def _delay(*args, **kwargs):
    return subprocess.Popen(
        [sys.executable, "-m", "delay.cli", *map(str, args)],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
        **kwargs,
    )


def _wait_for_temporary(process, folder: Path, name: str, timeout: float = 120.0) -> None:
    """Wait until the run has started building ``name`` under a temporary name."""
    deadline = time.monotonic() + timeout
    while time.monotonic() < deadline:
        if any(p.name.startswith(f".{name}.delay-") for p in folder.iterdir()):
            return
        assert process.poll() is None, process.communicate()
        time.sleep(0.005)
    process.kill()
    pytest.fail("the run never started writing")


@pytest.mark.parametrize("signum", [signal.SIGINT, signal.SIGTERM])
def test_a_signal_while_the_report_is_written_exits_with_one_line_and_leaves_the_earlier_report(case, tmp_path, signum):
    out = tmp_path / "r"
    assert run("report", case, "--out", out).exit_code == 0
    earlier = digest(out)
    process = _delay("report", case, "--out", out)
    _wait_for_temporary(process, tmp_path, "r")
    process.send_signal(signum)
    stdout, stderr = process.communicate(timeout=120)
    assert process.returncode == 128 + signum, (stdout, stderr)
    lines = stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: interrupted"), stderr
    assert "Traceback" not in stdout + stderr
    assert temporaries(tmp_path) == [], "no temporary is left"
    assert digest(out) == earlier, "the earlier report is intact"


def test_a_killed_run_leaves_temporaries_that_the_next_run_removes(case, tmp_path):
    out = tmp_path / "r"
    assert run("report", case, "--out", out, "--methods", "impacted").exit_code == 0
    earlier = digest(out)
    process = _delay("report", case, "--out", out, "--methods", "impacted")
    _wait_for_temporary(process, tmp_path, "r")
    process.kill()  # SIGKILL: nothing can clean up
    process.communicate(timeout=60)
    assert digest(out) == earlier
    assert run("report", case, "--out", out, "--methods", "impacted").exit_code == 0
    assert temporaries(tmp_path) == []


# -- write failures: a full disk and a read-only file system ----------------------------------------
def _mount_tmpfs(folder: Path, size: str) -> None:
    folder.mkdir()
    if os.geteuid() != 0 or shutil.which("mount") is None:
        pytest.skip("mounting a small tmpfs needs root and mount(8); this machine allows neither")
    done = subprocess.run(
        ["mount", "-t", "tmpfs", "-o", f"size={size}", "tmpfs", str(folder)], capture_output=True, text=True
    )
    if done.returncode != 0:
        pytest.skip(f"this machine does not allow mounting a tmpfs ({done.stderr.strip()})")


def _unmount(folder: Path) -> None:
    subprocess.run(["umount", str(folder)], capture_output=True, check=False)


def test_a_full_disk_gives_one_line_and_the_earlier_report_survives(case, tmp_path):
    disk = tmp_path / "disk"
    _mount_tmpfs(disk, "9m")  # one report of the small case (about 5 MB: plotly.js inlined) fits, two do not
    try:
        out = disk / "r"
        first = run("report", case, "--out", out)
        assert first.exit_code == 0, first.output
        earlier = digest(out)
        line = assert_refused(run("report", case, "--out", out), "No space left on device")
        assert "earlier output is unchanged" in line and str(out) in line
        assert digest(out) == earlier
        assert temporaries(disk) == []
    finally:
        _unmount(disk)


def test_a_read_only_target_gives_one_line_and_changes_nothing(case, tmp_path):
    disk = tmp_path / "disk"
    _mount_tmpfs(disk, "16m")
    try:
        out = disk / "r"
        assert run("report", case, "--out", out, "--methods", "impacted").exit_code == 0
        earlier = digest(out)
        remount = subprocess.run(["mount", "-o", "remount,ro", str(disk)], capture_output=True, text=True)
        if remount.returncode != 0:
            pytest.skip(f"cannot remount the tmpfs read-only ({remount.stderr.strip()})")
        assert_refused(run("report", case, "--out", out, "--methods", "impacted"), "Read-only file system")
        assert_refused(run("demo", "--case", case, "--out", disk / "demo"), "Read-only file system")
        assert_refused(run("new", disk / "fresh"), "Read-only file system")
        assert digest(out) == earlier
    finally:
        _unmount(disk)


def test_an_oserror_inside_the_writer_leaves_no_temporary(tmp_path, monkeypatch):
    # a write that fails half-way (the disk filling up while the folder is built)
    out = tmp_path / "out"
    with pytest.raises(output.OutputFailed) as failed:
        with output.output_folder(out) as folder:
            (folder / "a.txt").write_text("first", encoding="utf-8")
            raise OSError(28, "No space left on device", str(folder / "b.txt"))
    assert str(failed.value).startswith(f"{out}: cannot be written (No space left on device)")
    assert ".part" not in str(failed.value), "the message names the output, not its temporary"
    assert sorted(tmp_path.iterdir()) == []
