"""The bundled demo case: it loads, it covers what the issue asks of it, its workbook form loads
to the same tables, its generator reproduces it, and ``delay demo`` runs on it.

The requirements checked here are those of the project's issue for the demo case (counts of
activities, updates, events, parties, impact kinds, fragnets, elements, link types); the
facts about the case are read from its files, not from the toolkit's results.
"""

from __future__ import annotations

import csv
import datetime as dt
import hashlib
import importlib.util
import json
import subprocess
import sys
import tomllib
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from click.testing import CliRunner

from delay.case import load_case, write_workbook
from delay.cli import cli
from delay.model import COLUMNS

DEMO = Path(__file__).resolve().parent.parent / "case_demo"


@pytest.fixture(scope="module")
def demo():
    return load_case(DEMO)


def rows(name):
    with (DEMO / name).open(encoding="utf-8-sig", newline="") as handle:
        return list(csv.DictReader(handle))


def test_demo_case_covers_the_story(demo):
    baseline = demo.baseline.activities
    assert 200 <= len(baseline) <= 400
    assert len(demo.updates) >= 8
    # two calendars: one of five working weekdays with holidays, one of seven
    workdays = {len(w.split()) for w in demo.calendars["workdays"]}
    assert {5, 7} <= workdays
    assert len(demo.calendar_exceptions) > 0
    types = set(demo.baseline.links["type"])
    assert types == {"FS", "SS", "FF", "SF"}
    assert (demo.baseline.links["lag"] != 0).any() and (demo.baseline.links["lag"] < 0).any()
    events = rows("events.csv")
    assert len(events) >= 10
    assert {e["party"] for e in events} == {"employer", "contractor", "neutral"}
    assert {e["impact"] for e in events} == {"extend", "hold", "fragnet"}
    assert len({r["event"] for r in rows("fragnets.csv")}) >= 3
    assert len(rows("elements.csv")) >= 300
    assert demo.asbuilt_snapshot is not None
    # every activity of the as-built snapshot has both actual dates
    built = demo.asbuilt_snapshot.activities
    assert built["actual_start"].notna().all() and built["actual_finish"].notna().all()


def test_demo_case_has_out_of_sequence_progress_and_replanning(demo):
    # out of sequence: some update shows an activity started while an FS predecessor is unfinished
    found = False
    for snap in demo.updates:
        acts = snap.activities.set_index("id")
        fs = snap.links[snap.links["type"] == "FS"]
        started = acts["actual_start"].notna()
        unfinished = acts["actual_finish"].isna()
        hit = started.reindex(fs["succ"]).to_numpy() & unfinished.reindex(fs["pred"]).to_numpy()
        found |= bool(hit.any())
    assert found
    # re-planning: the activity set or a duration changes between some pair of updates
    changes = 0
    for a, b in zip(demo.snapshots[:-1], demo.snapshots[1:]):
        ids_a, ids_b = set(a.activities["id"]), set(b.activities["id"])
        changes += len(ids_a ^ ids_b)
        both = a.activities.set_index("id")["duration"].reindex(sorted(ids_a & ids_b))
        changes += int((both != b.activities.set_index("id")["duration"].reindex(sorted(ids_a & ids_b))).sum())
    assert changes > 0


def test_demo_case_exercises_case_format_version_2():
    """The version-2 fields the demo is there to exercise, read from its files."""
    settings = tomllib.loads((DEMO / "case.toml").read_text(encoding="utf-8"))
    completion = settings["project"]["completion_activity"]
    assert settings["analysis"]["unexplained_risk"] in ("employer", "contractor", "neutral")
    # the whole-works section: a section whose completion activity is the project's
    assert completion in {s["completion_activity"] for s in rows("sections.csv")}
    risks = [a["risk"] for a in rows("snapshots/baseline/activities.csv")]
    assert set(risks) <= {"", "employer", "contractor", "neutral"}
    assert "employer" in risks and risks.count("") > len(risks) / 2
    built = {r["id"]: r for r in rows("asbuilt.csv")}
    events = rows("events.csv")
    # a hold on work already in progress when it begins: the activity started before the
    # hold's first day and finished after its last
    assert any(
        built[a]["actual_start"] < e["start"] and built[a]["actual_finish"] > e["finish"]
        for e in events
        if e["impact"] == "hold"
        for a in e["activities"].split(";")
    )
    # every fragnet is absent from the as-built record, which shows the work in the
    # activities that asbuilt_activities names
    fragnet_ids = {f["event"]: set() for f in rows("fragnets.csv")}
    for f in rows("fragnets.csv"):
        fragnet_ids[f["event"]].add(f["id"])
    for e in events:
        if e["impact"] == "fragnet":
            assert not fragnet_ids[e["id"]] & set(built)
            shown = e["asbuilt_activities"].split(";")
            assert shown != [""] and set(shown) <= set(built), e["id"]
    # a grant that falls strictly between two updates' data dates, besides the first grant
    dates = sorted(snap.data_date for snap in load_case(DEMO).updates)
    grants = rows("extensions_granted.csv")
    assert len(grants) >= 2
    for g in grants:
        day = dt.date.fromisoformat(g["granted_on"])
        assert day not in dates and dates[0] < day < dates[-1], g["id"]


def _generator():
    """case_demo/generate.py as a module (it is a script, not part of the package)."""
    spec = importlib.util.spec_from_file_location("demo_generate", DEMO / "generate.py")
    module = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = module  # dataclasses look their module up while they are made
    spec.loader.exec_module(module)
    return module


@pytest.mark.parametrize(
    "start, duration, first, finish, moved",
    [
        # in progress when the hold begins: Thu 8 and Fri 9 January worked, no work from Mon 12
        # to Wed 21 (the hold), the other three days on Thu 22, Fri 23 and Mon 26
        ("2026-01-08", 5, "2026-01-08", "2026-01-26", True),
        # due to start inside the hold (Wed 14): starts Thu 22, three days to Mon 26
        ("2026-01-14", 3, "2026-01-22", "2026-01-26", True),
        # finished before the hold (Mon 5 to Fri 9): no effect
        ("2026-01-05", 5, "2026-01-05", "2026-01-09", False),
        # starts after the hold (Thu 22, two days): no effect
        ("2026-01-22", 2, "2026-01-22", "2026-01-23", False),
    ],
)
def test_the_generators_hold_stops_work_from_its_first_to_its_last_day(start, duration, first, finish, moved):
    """The generator's own simulation of a hold (case-format v2: no work from the hold's
    start to its finish, both inclusive), hand-worked above on a Monday-to-Friday calendar
    and checked against numpy's business-day functions with the hold's days as holidays."""
    generate = _generator()
    hold = generate.Hold("EV", dt.date(2026, 1, 12), dt.date(2026, 1, 21), frozenset({"A"}))
    cal = generate.WorkCalendar("five", "Mon Tue Wed Thu Fri", [], [], (dt.date(2025, 12, 1), dt.date(2026, 3, 31)))
    begin, end, holds = generate.work_around(cal, cal.on_or_after(dt.date.fromisoformat(start)), duration, [hold])
    assert (cal.date(begin).isoformat(), cal.date(end - 1).isoformat()) == (first, finish)
    assert (holds == [hold]) is moved
    stopped = np.arange(np.datetime64("2026-01-12"), np.datetime64("2026-01-22"))
    reference_start = np.busday_offset(start, 0, roll="forward", holidays=stopped)
    reference_finish = np.busday_offset(reference_start, duration - 1, holidays=stopped)
    assert (str(reference_start), str(reference_finish)) == (first, finish)


def test_demo_names_are_declared_fictitious():
    assert "fictitious" in (DEMO / "README.md").read_text(encoding="utf-8").lower()


def _same(left: pd.DataFrame, right: pd.DataFrame, what: str):
    left = left.reset_index(drop=True)
    right = right.reset_index(drop=True)
    assert list(left.columns) == list(right.columns), what
    pd.testing.assert_frame_equal(left, right, check_dtype=False, obj=what)


def test_workbook_form_loads_to_the_same_tables(demo, tmp_path):
    workbook = write_workbook(DEMO, tmp_path / "case.xlsx")
    other = load_case(workbook)
    assert other.settings == demo.settings
    assert [s.folder for s in other.snapshots] == [s.folder for s in demo.snapshots]
    for a, b in zip(demo.snapshots, other.snapshots):
        assert (a.label, a.data_date, a.kind) == (b.label, b.data_date, b.kind)
        _same(a.activities, b.activities, f"{a.folder} activities")
        _same(a.links, b.links, f"{a.folder} links")
    _same(demo.asbuilt_snapshot.activities, other.asbuilt_snapshot.activities, "as-built")
    for name in COLUMNS:
        if name in ("activities", "links", "corrections"):
            continue
        _same(demo.table(name), other.table(name), name)
    assert [(c.record, c.original, c.corrected) for c in demo.corrections] == [
        (c.record, c.original, c.corrected) for c in other.corrections
    ]


def _digest(folder: Path) -> dict:
    return {
        str(p.relative_to(folder)): hashlib.sha256(p.read_bytes()).hexdigest()
        for p in sorted(folder.rglob("*"))
        if p.is_file() and p.suffix != ".py"
    }


def test_generator_reproduces_the_committed_case(tmp_path):
    out = tmp_path / "again"
    done = subprocess.run(
        [sys.executable, str(DEMO / "generate.py"), "--output", str(out)], capture_output=True, text=True, timeout=300
    )
    assert done.returncode == 0, done.stdout + done.stderr
    # model/ holds the demo's IFC model, made by its own script from the generated elements;
    # scenario/ holds the tables the generator reads
    committed = {k: v for k, v in _digest(DEMO).items() if not k.startswith(("__pycache__", "model/", "scenario/"))}
    assert _digest(out) == committed


def test_delay_demo_writes_every_output(tmp_path):
    out = tmp_path / "demo"
    result = CliRunner().invoke(cli, ["demo", "--out", str(out)], catch_exceptions=False)
    assert result.exit_code == 0, result.output
    summary = json.loads((out / "case_summary.json").read_text())
    assert len(summary["snapshots"]) >= 9
    assert (out / "schedules" / "baseline.csv").exists() and (out / "schedules" / "asbuilt.json").exists()
    windows = json.loads((out / "windows.json").read_text())
    trend = pd.read_csv(out / "completion_by_snapshot.csv")
    # the windows explain the whole movement of completion from the baseline to the as-built
    total = (pd.Timestamp(trend["completion"].iloc[-1]) - pd.Timestamp(trend["completion"].iloc[0])).days
    assert windows["total_movement_days"] == total
    assert (out / "asbuilt.json").exists()
