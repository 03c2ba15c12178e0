"""The JSON of ``delay schedule``: the same text as ``json.dumps`` of per-activity records.

The command builds its JSON from whole columns (each distinct date and number formatted
once); these tests hold it to the text ``json.dumps(..., indent=2)`` gives for the same
records, and the records to an independent recomputation from the result table, cell by
cell, with ``datetime.date.isoformat``.
"""

from __future__ import annotations

import datetime as dt
import json

import pandas as pd
import pytest
from casewriter import write_case
from click.testing import CliRunner

from delay.cli import cli
from delay.convert import iso_dates, json_bool_cells, json_date_cells, json_int_cells, json_rows_text, json_text_cells

SIX = [
    {"id": "START", "name": "Start", "duration": 0, "kind": "start_milestone"},
    {"id": "A", "name": "Dig", "duration": 3},
    {"id": "B", "name": "Pour", "duration": 2, "calendar": "7d"},
    {"id": "C", "name": "Cure", "duration": 4},
    {"id": "D", "name": "Frame", "duration": 5},
    {"id": "END", "name": "Finish", "duration": 0, "kind": "finish_milestone"},
]
SIX_LINKS = [
    {"pred": "START", "succ": "A", "type": "FS", "lag": 0},
    {"pred": "A", "succ": "B", "type": "SS", "lag": 1},
    {"pred": "A", "succ": "C", "type": "FS", "lag": 0},
    {"pred": "B", "succ": "D", "type": "FF", "lag": 2},
    {"pred": "C", "succ": "D", "type": "FS", "lag": -1},
    {"pred": "D", "succ": "END", "type": "FS", "lag": 0},
]

# Worked by hand (case-format time convention; 5-day calendar from Monday 2025-01-06, B on
# the 7-day calendar, a lag counted on the successor's calendar):
# A Mon 6 .. Wed 8; B SS+1 from A's start: Tue 7 .. Wed 8; C FS after A: Thu 9, Fri 10,
# Mon 13, Tue 14; D FS-1 after C starts Tue 14 (FF+2 from B asks only a finish after
# Fri 10), five days Tue 14 .. Mon 20, the completion. Backward: B's finish at most two work
# days of D's calendar before D's late finish Mon 20, so Thu 16, start Wed 15; its floats
# Wed 8 -> Thu 16 on its 7-day calendar: 8 days, free too (D is not held by B).
EXPECTED = {
    "snapshot": "baseline",
    "label": "Baseline",
    "data_date": "2025-01-06",
    "completion": "2025-01-20",
    "activities": [
        ["START", "2025-01-06", "2025-01-06", "2025-01-06", "2025-01-06", 0, 0, True],
        ["A", "2025-01-06", "2025-01-08", "2025-01-06", "2025-01-08", 0, 0, True],
        ["B", "2025-01-07", "2025-01-08", "2025-01-15", "2025-01-16", 8, 8, False],
        ["C", "2025-01-09", "2025-01-14", "2025-01-09", "2025-01-14", 0, 0, True],
        ["D", "2025-01-14", "2025-01-20", "2025-01-14", "2025-01-20", 0, 0, True],
        ["END", "2025-01-20", "2025-01-20", "2025-01-20", "2025-01-20", 0, 0, True],
    ],
}
KEYS = ["activity", "early_start", "early_finish", "late_start", "late_finish", "total_float", "free_float", "critical"]


def run(*args):
    return CliRunner().invoke(cli, [str(a) for a in args], catch_exceptions=False)


def test_six_activities_the_same_text_as_json_dumps(tmp_path):
    root = write_case(tmp_path / "case", activities=SIX, links=SIX_LINKS)
    result = run("schedule", root, "--format", "json")
    assert result.exit_code == 0, result.output
    expected = {**EXPECTED, "activities": [dict(zip(KEYS, row)) for row in EXPECTED["activities"]]}
    # the text json.dumps(indent=2) writes for the hand-worked records, to the byte
    assert result.output == json.dumps(expected, indent=2) + "\n"


def _by_cell(result) -> list[dict]:
    """The records recomputed from the result table, one cell at a time."""

    def date(value):
        return None if pd.isna(value) else pd.Timestamp(value).date().isoformat()

    def number(value):
        return None if pd.isna(value) else int(value)

    rows = []
    for record in result.activities.to_dict("records"):
        rows.append(
            {
                "activity": record["id"],
                "early_start": date(record["early_start"]),
                "early_finish": date(record["early_finish"]),
                "late_start": date(record["late_start"]),
                "late_finish": date(record["late_finish"]),
                "total_float": number(record["total_float"]),
                "free_float": number(record["free_float"]),
                "critical": bool(record["critical"]),
            }
        )
    return rows


@pytest.mark.parametrize("snapshot", ["baseline", "u02", "asbuilt"])
def test_json_of_a_synthetic_case_against_a_cell_by_cell_recomputation(tmp_path, snapshot):
    from delay.case import load_case
    from delay.cpm import schedule

    out = tmp_path / "synthetic"
    assert run("synth", out, "--activities", 300, "--updates", 3, "--seed", 5).exit_code == 0
    result = run("schedule", out, "--snapshot", snapshot, "--format", "json")
    assert result.exit_code == 0, result.output
    payload = json.loads(result.output)
    scheduled = schedule(load_case(out), snapshot)
    assert payload["activities"] == _by_cell(scheduled)
    assert payload["completion"] == scheduled.completion.isoformat()
    assert payload["data_date"] == scheduled.data_date.isoformat()
    assert result.output == json.dumps(scheduled.to_json(), indent=2) + "\n"
    if snapshot != "baseline":  # progress: complete activities have no float and no late dates
        assert any(row["total_float"] is None and row["late_start"] is None for row in payload["activities"])


def test_column_encoders_match_json_dumps():
    days = [0, 20089, -(2**63), 20089, 2932896]  # 1970-01-01, 2025-01-01, none, again, 9999-12-31
    assert iso_dates(days).tolist() == [dt.date(1970, 1, 1).isoformat(), "2025-01-01", None, "2025-01-01", "9999-12-31"]
    texts = ["A", 'quote " and \\ slash', "Ünïcode – dash", "line\nbreak"]
    columns = {
        "id": json_text_cells(texts),
        "day": json_date_cells(days[:4]),
        "float": json_int_cells([3, -2, 0, 10**12], [False, False, True, False]),
        "on": json_bool_cells([True, False, True, False]),
    }
    expected = [
        {"id": t, "day": d, "float": f, "on": o}
        for t, d, f, o in zip(
            texts, ["1970-01-01", "2025-01-01", None, "2025-01-01"], [3, -2, None, 10**12], [True, False, True, False]
        )
    ]
    for level in (0, 1, 3):
        for indent in (2, 4):
            text = json_rows_text(columns, indent=indent, level=level)
            wanted = json.dumps(expected, indent=indent).replace("\n", "\n" + " " * (indent * level))
            assert text == wanted
    assert json_rows_text({"id": json_text_cells([])}) == "[]"
    # far apart days go through the distinct values instead of a table of the span
    assert iso_dates([0, 2932896]).tolist() == ["1970-01-01", "9999-12-31"]
