"""Loading a valid case: types, defaults, order, as-built record, corrections, summary.

The expectations come from docs/case-format.md (the input contract) and the column
types documented in delay/model.py; dates and counts are worked out by hand from the rows
of test_case_support.
"""

from __future__ import annotations

import copy
import dataclasses
import datetime as dt
import json
from pathlib import Path

import numpy as np
import pandas as pd
from casewriter import write_text
from pandas.api import types
from test_case_support import ACTIVITIES, FILES, LINKS, UPDATE, make_case, problem_at

from delay.case import load_case, summarise
from delay.model import COLUMNS, CaseSettings


def test_column_types_follow_the_model(tmp_path):
    case = load_case(make_case(tmp_path))
    activities = case.snapshot("u1").activities
    for column in ("id", "name", "calendar", "wbs", "kind", "constraint", "party"):
        assert types.is_string_dtype(activities[column]), column
    assert activities["duration"].dtype == "int64"
    for column in ("constraint_date", "actual_start", "actual_finish"):
        assert types.is_datetime64_dtype(activities[column]), column
    assert activities["remaining"].dtype == "float64"
    links = case.baseline.links
    assert links["lag"].dtype == "int64" and types.is_string_dtype(links["type"])
    assert case.calendar_exceptions["working"].dtype == bool
    assert case.calendar_exceptions["working"].tolist() == [False]  # "no": a holiday
    events = case.events
    assert events["days"].dtype == "float64" and types.is_datetime64_dtype(events["notified"])
    assert pd.isna(events["days"].iat[1])  # blank is NaN
    assert events["evidence"].iat[1] == ""  # blank text is ""
    assert case.elements["dz"].dtype == "float64"
    assert case.fragnets["duration"].dtype == "int64"
    assert case.prolongation_rates["cost_per_day"].tolist() == [2500.0, 2800.0]


def test_blank_cells_take_the_formats_defaults(tmp_path):
    # case-format: calendar blank -> schedule.default_calendar; kind blank -> task; link
    # type blank -> FS (lower case accepted); lag blank -> 0.
    activities = copy.deepcopy(ACTIVITIES)
    activities[1]["calendar"] = "5d"
    links = [{"pred": "A", "succ": "B", "type": "", "lag": ""}, {"pred": "B", "succ": "M", "type": "ss", "lag": "2"}]
    root = make_case(
        tmp_path,
        activities=activities,
        links=links,
        snapshots={},
        schedule={"default_calendar": "7d"},
        drop=("asbuilt.csv",),
    )
    case = load_case(root)
    baseline = case.baseline.activities
    assert baseline["calendar"].tolist() == ["7d", "5d", "7d"]
    assert baseline["kind"].tolist() == ["task", "task", "finish_milestone"]
    assert case.baseline.links["type"].tolist() == ["FS", "SS"]
    assert case.baseline.links["lag"].tolist() == [0, 2]
    assert case.fragnets["calendar"].tolist() == ["7d"]


def test_stable_columns_first_then_unknown_columns_as_text(tmp_path):
    activities = [{"cost_code": "C-1", **row, "zone": 4} for row in ACTIVITIES]
    root = make_case(tmp_path, activities=activities, snapshots={}, drop=("asbuilt.csv",))
    frame = load_case(root).baseline.activities
    assert list(frame.columns) == list(COLUMNS["activities"]) + ["cost_code", "zone"]
    assert frame["zone"].tolist() == ["4", "4", "4"]
    assert types.is_string_dtype(frame["zone"])


def test_byte_order_mark_and_surrounding_spaces_are_accepted(tmp_path):
    root = make_case(tmp_path, snapshots={}, drop=("asbuilt.csv",))
    write_text(root, "snapshots/baseline/links.csv", "pred, succ ,type\nA, B,fs\nB,M,\n", bom=True)
    links = load_case(root).baseline.links
    assert links[["pred", "succ", "type"]].values.tolist() == [["A", "B", "FS"], ["B", "M", "FS"]]


def test_blank_lines_do_not_shift_row_numbers(tmp_path):
    # Line 1 header, line 2 A>B, line 3 empty, line 4 the bad link: the spreadsheet row
    # of the bad link is 4.
    root = make_case(tmp_path, snapshots={}, drop=("asbuilt.csv",))
    write_text(root, "snapshots/baseline/links.csv", "pred,succ\nA,B\n\nB,Z\n")
    problem_at(root, "snapshots/baseline/links.csv", 4, "succ", "'Z'")


def test_settings(tmp_path):
    root = make_case(
        tmp_path,
        schedule={"progress": "progress_override", "float_to": "contract_completion", "night_shift": True},
        commercial={"currency": "GBP", "liquidated_damages_per_day": 1200},
        analysis={"half_step": False},
    )
    with (root / "case.toml").open("a", encoding="utf-8") as handle:
        handle.write('\n[reporting]\nlogo = "quay.png"\n')
    settings = load_case(root).settings
    assert isinstance(settings, CaseSettings)
    assert settings.project.contract_start == dt.date(2025, 1, 6)
    assert settings.project.contract_completion == dt.date(2025, 12, 19)
    assert settings.schedule.progress == "progress_override"
    assert settings.schedule.float_to == "contract_completion"
    assert settings.schedule.lag_calendar == "successor"  # the format's default
    assert settings.commercial.currency == "GBP"
    assert settings.commercial.liquidated_damages_per_day == 1200.0
    assert settings.commercial.liquidated_damages_cap == 0.0
    assert settings.analysis.half_step is False
    assert settings.analysis.concurrency == "time_not_money"
    assert settings.extra == {"schedule": {"night_shift": True}, "reporting": {"logo": "quay.png"}}


def test_snapshots_run_baseline_first_then_by_data_date(tmp_path):
    # Folder names sort the other way round from the data dates on purpose.
    update = copy.deepcopy(UPDATE)
    snapshots = {
        "a_late": {**update["u1"], "data_date": "2025-04-07", "label": "Update 02"},
        "z_early": {**update["u1"], "data_date": "2025-02-03", "label": "Update 01"},
    }
    case = load_case(make_case(tmp_path, snapshots=snapshots))
    assert [s.folder for s in case.snapshots] == ["baseline", "z_early", "a_late"]
    assert [s.label for s in case.snapshots] == ["Baseline", "Update 01", "Update 02"]
    assert [s.kind for s in case.snapshots] == ["baseline", "update", "update"]
    assert case.snapshots[2].data_date == dt.date(2025, 4, 7)
    assert case.snapshot("Update 02").folder == "a_late"
    assert [s.folder for s in case.updates] == ["z_early", "a_late"]


def test_finished_activity_gets_remaining_zero(tmp_path):
    update = copy.deepcopy(UPDATE)
    update["u1"]["activities"][0]["remaining"] = ""
    frame = load_case(make_case(tmp_path, snapshots=update)).snapshot("u1").activities
    assert frame["remaining"].tolist()[:2] == [0.0, 1.0]
    assert pd.isna(frame["remaining"].iat[2])  # not started, no re-estimate


def test_asbuilt_snapshot(tmp_path):
    case = load_case(make_case(tmp_path))
    asbuilt = case.asbuilt_snapshot
    assert (asbuilt.folder, asbuilt.label, asbuilt.kind) == ("asbuilt", "As-built", "asbuilt")
    # Latest actual finish in asbuilt.csv: M on 2025-02-17; the data date is the day after.
    assert asbuilt.data_date == dt.date(2025, 2, 18)
    frame = asbuilt.activities.set_index("id")
    assert frame.loc["B", "actual_finish"] == pd.Timestamp("2025-02-14")
    # M is a milestone given by its finish alone: its start is the same date.
    assert frame.loc["M", "actual_start"] == pd.Timestamp("2025-02-17")
    assert frame["remaining"].tolist() == [0.0, 0.0, 0.0]
    assert asbuilt.links.equals(case.snapshot("u1").links)
    assert case.snapshot("asbuilt") is asbuilt
    assert asbuilt not in case.snapshots
    assert len(case.asbuilt) == 3  # the record itself, rows as given


def test_asbuilt_keeps_the_last_updates_dates_for_activities_it_omits(tmp_path):
    # A has no row in asbuilt.csv: it keeps u1's actual dates 2025-01-06 .. 2025-01-08.
    rows = FILES["asbuilt.csv"][1:]
    frame = load_case(make_case(tmp_path, files={"asbuilt.csv": rows})).asbuilt_snapshot.activities
    a = frame.set_index("id").loc["A"]
    assert (a["actual_start"], a["actual_finish"]) == (pd.Timestamp("2025-01-06"), pd.Timestamp("2025-01-08"))


def test_asbuilt_without_updates_builds_on_the_baseline(tmp_path):
    case = load_case(make_case(tmp_path, snapshots={}))
    assert case.asbuilt_snapshot.data_date == dt.date(2025, 2, 18)
    assert len(case.asbuilt_snapshot.activities) == 3


def test_no_asbuilt_file_no_asbuilt_snapshot(tmp_path):
    assert load_case(make_case(tmp_path, drop=("asbuilt.csv",))).asbuilt_snapshot is None


def corrections(*rows):
    return {
        "corrections.csv": [dict(zip(("snapshot", "table", "key", "column", "value", "reason"), row)) for row in rows]
    }


def test_corrections_are_applied_and_recorded(tmp_path):
    files = corrections(
        ("Update 01", "activities", "B", "remaining", "2", "diary 14 Jan"),
        ("u1", "links", "A>B", "lag", "1", "method statement"),
        ("baseline", "links", "B>M", "delete", "", "duplicated logic"),
        ("baseline", "links", "A>M", "add", "ff 0", "handover logic"),
        ("asbuilt", "activities", "B", "actual_finish", "2025-02-13", "site diary"),
    )
    case = load_case(make_case(tmp_path, files=files))
    u1 = case.snapshot("u1")
    assert u1.activities.set_index("id").loc["B", "remaining"] == 2.0
    assert u1.links.set_index(["pred", "succ"]).loc[("A", "B"), "lag"] == 1
    baseline_links = case.baseline.links[["pred", "succ", "type", "lag"]].values.tolist()
    assert baseline_links == [["A", "B", "FS", 0], ["A", "M", "FF", 0]]
    assert case.asbuilt.set_index("id").loc["B", "actual_finish"] == pd.Timestamp("2025-02-13")
    found = [(c.snapshot, c.table, c.key, c.column, c.original, c.corrected, c.row) for c in case.corrections]
    assert found == [
        ("Update 01", "activities", "B", "remaining", "1", "2", 2),
        ("Update 01", "links", "A>B", "lag", "", "1", 3),
        ("Baseline", "links", "B>M", "delete", "FS 0", "", 4),
        ("Baseline", "links", "A>M", "add", "", "FF 0", 5),
        ("asbuilt", "activities", "B", "actual_finish", "2025-02-14", "2025-02-13", 6),
    ]
    assert case.corrections[0].record == "snapshot 'Update 01', activity B, column remaining"
    assert case.corrections[0].reason == "diary 14 Jan"
    assert len(case.table("corrections")) == 5


def test_checks_run_on_the_corrected_tables(tmp_path):
    # B is in progress without a remaining duration (an error) until the correction
    # gives it one.
    update = copy.deepcopy(UPDATE)
    update["u1"]["activities"][1]["remaining"] = ""
    files = corrections(("u1", "activities", "B", "remaining", "1", "programme narrative"))
    case = load_case(make_case(tmp_path, snapshots=update, files=files))
    assert case.snapshot("u1").activities["remaining"].iat[1] == 1.0


def test_corrections_never_change_the_files(tmp_path):
    root = make_case(tmp_path, files=corrections(("u1", "activities", "B", "remaining", "2", "")))
    before = (root / "snapshots/u1/activities.csv").read_bytes()
    load_case(root)
    assert (root / "snapshots/u1/activities.csv").read_bytes() == before


def test_input_files_lists_every_file_read(tmp_path):
    root = make_case(tmp_path)
    case = load_case(root)
    read = {p.relative_to(root).as_posix() for p in case.input_files}
    expected = (
        {"case.toml", "calendars.csv"}
        | {
            f"snapshots/{folder}/{name}"
            for folder in ("baseline", "u1")
            for name in ("snapshot.toml", "activities.csv", "links.csv")
        }
        | set(FILES)
    )
    assert read == expected


def test_tables_handed_out_do_not_write_back(tmp_path):
    case = load_case(make_case(tmp_path))
    frame = case.baseline.activities
    frame.loc[0, "name"] = "changed"
    assert case.baseline.activities["name"].iat[0] == "Drive sheet piles"


def test_summary(tmp_path):
    files = corrections(("u1", "activities", "B", "remaining", "2", ""))
    case = load_case(make_case(tmp_path, files=files))
    summary = json.loads(json.dumps(summarise(case)))
    assert summary["project"] == "Test case"
    assert summary["contract_start"] == "2025-01-06"
    assert summary["contract_completion"] == "2025-12-19"
    assert summary["snapshots"] == [
        {
            "snapshot": "baseline",
            "label": "Baseline",
            "kind": "baseline",
            "data_date": "2025-01-06",
            "activities": 3,
            "links": 2,
        },
        {
            "snapshot": "u1",
            "label": "Update 01",
            "kind": "update",
            "data_date": "2025-02-03",
            "activities": 3,
            "links": 2,
        },
    ]
    assert summary["asbuilt"] is True
    assert summary["asbuilt_snapshot"]["data_date"] == "2025-02-18"
    # Counts of the rows written in test_case_support.FILES.
    assert (
        summary["events"],
        summary["fragnets"],
        summary["fragnet_links"],
        summary["elements"],
        summary["sections"],
        summary["extensions"],
        summary["corrections"],
        summary["calendars"],
    ) == (2, 1, 2, 1, 1, 1, 1, 2)


def test_links_default_case(tmp_path):
    # The smallest case: one snapshot, no optional file.
    root = make_case(tmp_path, snapshots={}, files={}, drop=tuple(FILES))
    case = load_case(root)
    assert case.asbuilt_snapshot is None and case.corrections == ()
    assert list(case.events.columns) == list(COLUMNS["events"]) and case.events.empty
    assert types.is_datetime64_dtype(case.events["start"])
    assert case.baseline.links["pred"].tolist() == [row["pred"] for row in LINKS]


def _engine_arrays(snapshot, calendars):
    from delay.cpm import _compile_snapshot

    arrays = _compile_snapshot(snapshot, calendars)
    net = arrays.pop("network")
    arrays.update({name: getattr(net, name) for name in ("pred", "succ", "link_type", "lag", "order")})
    return arrays


def _same_arrays(first: dict, second: dict) -> None:
    assert first.keys() == second.keys()
    for name, value in first.items():
        if isinstance(value, np.ndarray):
            assert value.dtype == second[name].dtype, name
            assert np.array_equal(value, second[name], equal_nan=value.dtype.kind == "f"), name
        else:
            assert value == second[name], name


def test_codes_found_while_loading_equal_the_tables_text(tmp_path):
    # The loader hands the engine the codes it found while checking (calendar, kind,
    # constraint, link type, link ends); the engine's arrays must be the same as when it
    # reads the text itself. Blank cells and lower-case types follow case-format's defaults.
    activities = copy.deepcopy(ACTIVITIES)
    activities[1]["calendar"] = ""
    activities[1]["constraint"] = "latest_finish"
    activities[1]["constraint_date"] = "2026-03-31"
    links = [{"pred": "A", "succ": "B", "type": "", "lag": ""}, {"pred": "B", "succ": "M", "type": "ff", "lag": "2"}]
    root = make_case(tmp_path, activities=activities, links=links, snapshots={}, drop=("asbuilt.csv",))
    case = load_case(root)
    from delay.cpm import calendars_of

    calendars = calendars_of(case)
    for snapshot in case.snapshots:
        assert {"calendar_codes", "kind_codes", "constraint_codes", "type_codes", "link_numbers", "network"} <= set(
            snapshot.derived
        )
        bare = dataclasses.replace(snapshot, derived={})
        _same_arrays(_engine_arrays(snapshot, calendars), _engine_arrays(bare, calendars))
    assert case.baseline.derived["type_codes"].tolist() == [0, 2]  # FS, FF by LINK_TYPES


def test_demo_codes_found_while_loading_equal_the_tables_text():
    from delay.cpm import calendars_of

    case = load_case(Path(__file__).resolve().parent.parent / "case_demo")
    calendars = calendars_of(case)
    assert case.asbuilt_snapshot is not None
    for snapshot in (*case.snapshots, case.asbuilt_snapshot):
        bare = dataclasses.replace(snapshot, derived={})
        _same_arrays(_engine_arrays(snapshot, calendars), _engine_arrays(bare, calendars))
