"""Acceptance tests of the as-planned versus as-built comparison, worked by hand.

Sources
-------
- shared/case-format.md, "Time convention", "Scheduling rules" and "asbuilt.csv".
- The method's definitions in the docstring of ``delay.methods.as_built`` ("as-built doc"):
  planned dates are the baseline's early dates; actual duration counts the work days from
  actual start to actual finish, both included; the as-built critical path walks back from
  the activity that finished last, each step taking the predecessor whose actual date plus
  the link lies closest to the activity's actual start; each activity on the path accrues
  its finish variance less its driving predecessor's, the first its whole variance and the
  last the completion variance; the accrual falls in the period of its actual finish.
- The method is the as-planned versus as-built analysis of AACE International RP 29R-03
  (2011), MIP 3.1 / 3.2, and of the SCL Delay and Disruption Protocol, 2nd edition (2017),
  Part B (recalled from memory). The case is our own, worked by hand; no value below was read
  from the code's output.

The case runs on the seven-day calendar (work days = calendar days): work day k is
2025-01-27 + k days, so the works cross from January into February.
"""

from __future__ import annotations

import datetime as dt
import json

import pandas as pd
import pytest
from click.testing import CliRunner

from casewriter import write_case
from delay.case import load_case
from delay.cli import cli
from delay.errors import CaseError
from delay.methods.as_built import compare


def task(activity_id, duration, **extra):
    return {"id": activity_id, "name": f"Work {activity_id}", "duration": duration, **extra}


def link(pred, succ, kind="FS", lag=0):
    return {"pred": pred, "succ": succ, "type": kind, "lag": lag}


def progressed(row, actual_start=None, actual_finish=None, remaining=None):
    return {**row, "actual_start": actual_start, "actual_finish": actual_finish, "remaining": remaining}


# Baseline (7-day, planned start 2025-01-27):
#   A3 -> B4 -> C3 -> F;  A -> D2 -> F;  A -> E3 -> C.
# Forward pass (planned = early dates):
#   A  Jan 27 - Jan 29
#   B  Jan 30 - Feb 02          D  Jan 30 - Jan 31          E  Jan 30 - Feb 01
#   C  after B (Feb 02) and E (Feb 01): Feb 03 - Feb 05
#   F  after C (Feb 05) and D: Feb 05.       Planned completion 2025-02-05.
# Update U1, data date 2025-02-02: A Jan 27-30 complete, D Jan 31 - Feb 01 complete, B started
#   Feb 01 with 3 days remaining; C, E, F not started.  Its logic = the baseline's.
# As-built record: A Jan 27-30, B Feb 01-06, C Feb 08-10, D Jan 31 - Feb 01, E Feb 05-10, F Feb 10.
#   Actual completion 2025-02-10; completion variance = Feb 10 - Feb 05 = 5 calendar days.
#
# Per activity (start variance, finish variance in calendar days; durations in work days,
#   actual = work days from start to finish both included):
#   A: planned Jan 27-29 (3), actual Jan 27-30 (4):  start 0, finish +1, duration +1
#   B: planned Jan 30-Feb 02 (4), actual Feb 01-06 (6): start +2, finish +4, duration +2
#   C: planned Feb 03-05 (3), actual Feb 08-10 (3):  start +5, finish +5, duration 0
#   D: planned Jan 30-31 (2), actual Jan 31-Feb 01 (2): start +1, finish +1, duration 0
#   E: planned Jan 30-Feb 01 (3), actual Feb 05-10 (6): start +6, finish +9, duration +3
#   F: milestone planned Feb 05, actual Feb 10:  start +5, finish +5, duration 0 (0 and 0)
#
# As-built critical path, from the last finish: C, E and F all finish Feb 10; F is the finish
# milestone they lead into, so the walk starts at F.
#   F: preds C (finish Feb 10; F sits at the end of Feb 10: gap 0) and D (finish Feb 01:
#      gap 9).  Closest: C, gap 0.
#   C: preds B (finish Feb 06; C could start Feb 07, started Feb 08: gap +1) and E (finish
#      Feb 10; C could start Feb 11 but started Feb 08: gap -3).  Closest |+1| < |-3|: B, even
#      though E finished later.
#   B: pred A (finish Jan 30; B could start Jan 31, started Feb 01: gap +1).
#   A: no predecessor: the path starts here.
# Path in time order A, B, C, F.  Accrued:
#   A: whole finish variance +1 (period 2025-01, its actual finish Jan 30)
#   B: 4 - 1 = 3 (2025-02);  C: 5 - 4 = 1 (2025-02);  F: completion variance 5 - 5 = 0 (2025-02)
#   1 + 3 + 1 + 0 = 5 = completion variance.
# Per month: 2025-01 1 (running total 1), 2025-02 4 (running total 5).
BASELINE = [task("A", 3), task("B", 4), task("C", 3), task("D", 2), task("E", 3),
            {"id": "F", "name": "Completion", "duration": 0, "kind": "finish_milestone"}]
LINKS = [link("A", "B"), link("B", "C"), link("C", "F"), link("A", "D"), link("D", "F"),
         link("A", "E"), link("E", "C")]
ASBUILT = [
    {"id": "A", "actual_start": "2025-01-27", "actual_finish": "2025-01-30", "source": "daily diary"},
    {"id": "B", "actual_start": "2025-02-01", "actual_finish": "2025-02-06", "source": "daily diary"},
    {"id": "C", "actual_start": "2025-02-08", "actual_finish": "2025-02-10", "source": "daily diary"},
    {"id": "D", "actual_start": "2025-01-31", "actual_finish": "2025-02-01", "source": "daily diary"},
    {"id": "E", "actual_start": "2025-02-05", "actual_finish": "2025-02-10", "source": "daily diary"},
    {"id": "F", "actual_start": "2025-02-10", "actual_finish": "2025-02-10", "source": "handover note"},
]


def as_built_case(root):
    a, b, c, d, e, f = BASELINE
    update = [progressed(a, "2025-01-27", "2025-01-30"), progressed(b, "2025-02-01", None, 3), progressed(c),
              progressed(d, "2025-01-31", "2025-02-01"), progressed(e), progressed(f)]
    write_case(root, activities=BASELINE, links=LINKS, start="2025-01-27", completion="2025-02-14",
               schedule={"default_calendar": "7d"},
               snapshots={"U1": {"data_date": "2025-02-02", "activities": update}},
               files={"asbuilt.csv": ASBUILT})
    return root


def stamp(text):
    return pd.Timestamp(text)


@pytest.fixture
def result(tmp_path):
    return compare(load_case(as_built_case(tmp_path / "case")))


def test_completions_and_variance(result):
    assert result.planned_completion == dt.date(2025, 2, 5)
    assert result.actual_completion == dt.date(2025, 2, 10)
    assert result.completion_variance_days == 5


def test_planned_against_actual_per_activity(result):
    table = result.activities.set_index("id")
    expected = {  # planned start, planned finish, actual start, actual finish, variances
        "A": ("2025-01-27", "2025-01-29", "2025-01-27", "2025-01-30", 0, 1, 3, 4, 1),
        "B": ("2025-01-30", "2025-02-02", "2025-02-01", "2025-02-06", 2, 4, 4, 6, 2),
        "C": ("2025-02-03", "2025-02-05", "2025-02-08", "2025-02-10", 5, 5, 3, 3, 0),
        "D": ("2025-01-30", "2025-01-31", "2025-01-31", "2025-02-01", 1, 1, 2, 2, 0),
        "E": ("2025-01-30", "2025-02-01", "2025-02-05", "2025-02-10", 6, 9, 3, 6, 3),
        "F": ("2025-02-05", "2025-02-05", "2025-02-10", "2025-02-10", 5, 5, 0, 0, 0),
    }
    problems = []
    for activity, (ps, pf, ast, af, sv, fv, pd_, ad, dv) in expected.items():
        row = table.loc[activity]
        got = (row["planned_start"], row["planned_finish"], row["actual_start"], row["actual_finish"],
               int(row["start_variance_days"]), int(row["finish_variance_days"]),
               int(row["planned_duration"]), int(row["actual_duration"]),
               int(row["duration_variance_work_days"]))
        want = (stamp(ps), stamp(pf), stamp(ast), stamp(af), sv, fv, pd_, ad, dv)
        if tuple(pd.Timestamp(g) if i < 4 else g for i, g in enumerate(got)) != want:
            problems.append(f"{activity}: expected {want}, got {got}")
    assert not problems, "\n".join(problems)


def test_as_built_critical_path_by_closest_predecessor(result):
    path = result.critical_path
    assert list(path["activity"]) == ["A", "B", "C", "F"]
    assert list(path["driving_predecessor"]) == ["", "A", "B", "C"]
    gaps = [None if pd.isna(g) else int(g) for g in path["gap_work_days"]]
    assert gaps == [None, 1, 1, 0]
    assert list(path["accrued_days"]) == [1, 3, 1, 0]
    assert list(path["period"]) == ["2025-01", "2025-02", "2025-02", "2025-02"]
    assert int(path["accrued_days"].sum()) == result.completion_variance_days


def test_accrued_days_per_month_add_up(result):
    periods = result.periods
    assert list(periods["period"]) == ["2025-01", "2025-02"]
    assert list(periods["delay_days"]) == [1, 4]
    assert list(periods["cumulative_days"]) == [1, 5]
    assert int(periods["delay_days"].sum()) == result.completion_variance_days


def test_case_without_as_built_record_is_a_case_error(tmp_path):
    # as-built doc, compare Raises: "CaseError: the case has no as-built record."
    write_case(tmp_path / "plain", activities=BASELINE, links=LINKS, start="2025-01-27",
               schedule={"default_calendar": "7d"})
    with pytest.raises(CaseError):
        compare(load_case(tmp_path / "plain"))


def test_asbuilt_json(tmp_path):
    root = as_built_case(tmp_path / "case")
    run = CliRunner().invoke(cli, ["asbuilt", str(root), "--format", "json"])
    assert run.exit_code == 0, run.output
    data = json.loads(run.output)
    assert data["planned_completion"] == "2025-02-05"
    assert data["actual_completion"] == "2025-02-10"
    assert data["completion_variance_days"] == 5
    path = [(r["activity"], r["driving_predecessor"], r["gap_work_days"], r["accrued_days"], r["period"])
            for r in data["critical_path"]]
    assert path == [("A", None, None, 1, "2025-01"), ("B", "A", 1, 3, "2025-02"),
                    ("C", "B", 1, 1, "2025-02"), ("F", "C", 0, 0, "2025-02")]
    assert [(r["period"], r["delay_days"], r["cumulative_days"]) for r in data["periods"]] == \
        [("2025-01", 1, 1), ("2025-02", 4, 5)]
    activities = {r["activity"]: r for r in data["activities"]}
    assert activities["E"]["planned_finish"] == "2025-02-01"
    assert activities["E"]["actual_finish"] == "2025-02-10"
    assert (activities["E"]["start_variance_days"], activities["E"]["finish_variance_days"],
            activities["E"]["duration_variance_work_days"]) == (6, 9, 3)
