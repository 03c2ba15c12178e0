"""Acceptance tests of the as-planned versus as-built comparison, worked by hand.

Sources
-------
- shared/case-format.md, "Time convention", "Scheduling rules" and "asbuilt.csv".
- The method's definitions in the docstrings of ``delay.methods.asbuilt`` ("as-built doc")
  and ``delay.ledger`` ("ledger doc"): planned dates are the baseline's early dates; actual
  duration counts the work days from actual start to actual finish, both included; the
  as-built critical path walks back from the completion activity, each step taking the
  predecessor whose actual date plus the link lies closest to the activity's actual start;
  each activity on the path contributes its level (finish past the baseline's late finish
  by logic alone, in work days of the ledger calendar; or, finishing early, before its
  planned early finish) less its driving predecessor's; an activity whose gap and duration
  did not change contributes nothing; the work days are split into calendar days at
  completion in path order, and each contribution falls in the period of its actual finish.
- Measuring delay along the critical path in work days is common practice (AACE RP 29R-03,
  section 4 on the critical path and float, as recalled).
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
from casewriter import write_case
from click.testing import CliRunner

from delay.case import load_case
from delay.cli import cli
from delay.errors import CaseError
from delay.methods.asbuilt import compare


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
# Path in time order A, B, C, F.  Late finishes by logic alone from F (Feb 05): C Feb 05,
#   B Feb 02, E Feb 02, D Feb 05, A Jan 29 (before B's late start Jan 30).
# Levels (7-day calendar, so work days = calendar days): A Jan 30 - Jan 29 = 1; B Feb 06 -
#   Feb 02 = 4; C Feb 10 - Feb 05 = 5; F 5.
# Contributions: A 1 (period 2025-01, its actual finish Jan 30); B 4 - 1 = 3 (its gap behind A
#   grew from 0 to 1 and it took 6 days for 4); C 5 - 4 = 1 (its gap behind B grew to 1);
#   F: gap 0 and no duration in both: it only carried the delay, 0.
#   1 + 3 + 1 + 0 = 5 = completion variance; on the 7-day ledger the calendar days are the same.
# Per month: 2025-01 1 (running total 1), 2025-02 4 (running total 5).
BASELINE = [
    task("A", 3),
    task("B", 4),
    task("C", 3),
    task("D", 2),
    task("E", 3),
    {"id": "F", "name": "Completion", "duration": 0, "kind": "finish_milestone"},
]
LINKS = [link("A", "B"), link("B", "C"), link("C", "F"), link("A", "D"), link("D", "F"), link("A", "E"), link("E", "C")]
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
    update = [
        progressed(a, "2025-01-27", "2025-01-30"),
        progressed(b, "2025-02-01", None, 3),
        progressed(c),
        progressed(d, "2025-01-31", "2025-02-01"),
        progressed(e),
        progressed(f),
    ]
    write_case(
        root,
        activities=BASELINE,
        links=LINKS,
        start="2025-01-27",
        completion="2025-02-14",
        schedule={"default_calendar": "7d"},
        snapshots={"U1": {"data_date": "2025-02-02", "activities": update}},
        files={"asbuilt.csv": ASBUILT},
    )
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
    table = result.activities.set_index("activity")
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
        got = (
            row["planned_start"],
            row["planned_finish"],
            row["actual_start"],
            row["actual_finish"],
            int(row["start_variance_days"]),
            int(row["finish_variance_days"]),
            int(row["planned_duration"]),
            int(row["actual_duration"]),
            int(row["duration_variance_work_days"]),
        )
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
    assert list(path["lateness_work_days"]) == [1, 4, 5, 5]
    assert list(path["inherited"]) == [False, False, False, True]
    assert list(path["work_days"]) == [1, 3, 1, 0]
    assert list(path["delay_days"]) == [1, 3, 1, 0]
    assert list(path["period"]) == ["2025-01", "2025-02", "2025-02", "2025-02"]
    assert int(path["delay_days"].sum()) == result.completion_variance_days


def test_accrued_days_per_month_add_up(result):
    periods = result.periods
    assert list(periods["period"]) == ["2025-01", "2025-02"]
    assert list(periods["delay_days"]) == [1, 4]
    assert list(periods["cumulative_days"]) == [1, 5]
    assert int(periods["delay_days"].sum()) == result.completion_variance_days


def test_case_without_as_built_record_is_a_case_error(tmp_path):
    # as-built doc, compare Raises: "CaseError: the case has no as-built record."
    write_case(
        tmp_path / "plain", activities=BASELINE, links=LINKS, start="2025-01-27", schedule={"default_calendar": "7d"}
    )
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
    path = [
        (r["activity"], r["driving_predecessor"], r["gap_work_days"], r["work_days"], r["delay_days"], r["period"])
        for r in data["critical_path"]
    ]
    assert path == [
        ("A", None, None, 1, 1, "2025-01"),
        ("B", "A", 1, 3, 3, "2025-02"),
        ("C", "B", 1, 1, 1, "2025-02"),
        ("F", "C", 0, 0, 0, "2025-02"),
    ]
    assert [(r["period"], r["delay_days"], r["work_days"], r["cumulative_days"]) for r in data["periods"]] == [
        ("2025-01", 1, 1, 1),
        ("2025-02", 4, 4, 5),
    ]
    activities = {r["activity"]: r for r in data["activities"]}
    assert activities["E"]["planned_finish"] == "2025-02-01"
    assert activities["E"]["actual_finish"] == "2025-02-10"
    assert (
        activities["E"]["start_variance_days"],
        activities["E"]["finish_variance_days"],
        activities["E"]["duration_variance_work_days"],
    ) == (6, 9, 3)
    # 7-day calendar: the work-day variances equal the calendar-day ones
    assert (activities["E"]["start_variance_work_days"], activities["E"]["finish_variance_work_days"]) == (6, 9)


# =======================================================================================
# A five-day calendar with a two-week winter shutdown (Dec 22 2025 to Jan 02 2026 not worked)
#
# Work days k from Mon Dec 08 2025: k0-4 Dec 08-12, k5-9 Dec 15-19, (shutdown), k10 Jan 05, k11 Jan 06.
# Baseline A5 -> B5 -> F: A Dec 08-12 (k0-4), B Dec 15-19 (k5-9), F Dec 19.  Planned completion
#   Dec 19; late finishes by logic alone from F: A Dec 12, B Dec 19.
# As built: A Dec 08-16 (7 work days: it slipped 2), B Dec 17-19 and Jan 05-06 (5 work days,
#   across the shutdown), F Jan 06.  Completion variance Jan 06 - Dec 19 = 18 calendar days.
# Levels (5-day ledger): A k6 - k4 = 2; B k11 - k9 = 2; F 2.
# Contributions: A 2; B kept its gap (0) and its 5 days: it only carried A's delay across the
#   shutdown, 0; F 0.  Calendar days: from Dec 19 (k9), A's 2 work days reach k11 = Jan 06:
#   18 days, all dated at A's finish in December.  January: 0 (the old reading, B +14 in
#   January, was the shutdown).
# Variances of B: start Dec 15 (k5) -> Dec 17 (k7): 2 work days, 2 calendar days; finish Dec 19
#   (k9) -> Jan 06 (k11): 2 work days but 18 calendar days.
SHUTDOWN = [
    {"calendar": "5d", "date": f"{day}", "working": "no", "reason": "winter shutdown"}
    for day in (
        "2025-12-22",
        "2025-12-23",
        "2025-12-24",
        "2025-12-25",
        "2025-12-26",
        "2025-12-29",
        "2025-12-30",
        "2025-12-31",
        "2026-01-01",
        "2026-01-02",
    )
]


def finish_milestone(activity_id="F"):
    return {"id": activity_id, "name": "Completion", "duration": 0, "kind": "finish_milestone"}


def built_case(root, baseline, links, asbuilt, start, files=None):
    write_case(
        root,
        activities=baseline,
        links=links,
        start=start,
        completion="2026-06-30",
        files={"asbuilt.csv": asbuilt, **(files or {})},
    )
    return load_case(root)


def record(activity, start, finish):
    return {"id": activity, "actual_start": start, "actual_finish": finish, "source": "site diary"}


def test_a_delay_carried_across_a_shutdown_falls_where_it_arose(tmp_path):
    case = built_case(
        tmp_path / "case",
        [task("A", 5), task("B", 5), finish_milestone()],
        [link("A", "B"), link("B", "F")],
        [
            record("A", "2025-12-08", "2025-12-16"),
            record("B", "2025-12-17", "2026-01-06"),
            record("F", "2026-01-06", "2026-01-06"),
        ],
        "2025-12-08",
        files={"calendar_exceptions.csv": SHUTDOWN},
    )
    result = compare(case)
    assert result.completion_variance_days == 18
    path = result.critical_path.set_index("activity")
    assert {a: int(path.loc[a, "work_days"]) for a in "ABF"} == {"A": 2, "B": 0, "F": 0}
    assert {a: int(path.loc[a, "delay_days"]) for a in "ABF"} == {"A": 18, "B": 0, "F": 0}
    assert [(r.period, int(r.delay_days), int(r.work_days)) for r in result.periods.itertuples()] == [
        ("2025-12", 18, 2),
        ("2026-01", 0, 0),
    ]
    b = result.activities.set_index("activity").loc["B"]
    assert (int(b["start_variance_work_days"]), int(b["start_variance_days"])) == (2, 2)
    assert (int(b["finish_variance_work_days"]), int(b["finish_variance_days"])) == (2, 18)
    assert int(b["duration_variance_work_days"]) == 0


# Slipping into float, then driving (five-day calendar, Mon Jan 06 2025 = k0):
# Baseline P2 -> Q3 -> F and P2 -> R1 -> F: P Jan 06-07, Q Jan 08-10, R Jan 08, F Jan 10 (Fri).
#   R's late finish by logic alone: Jan 10 (float 2).
# As built: P and Q as planned; R took 4 days, Jan 08-13 (Wed to Mon); F Jan 13.
#   Variance Jan 13 - Jan 10 = 3 calendar days, 1 work day.
# Path F <- R (F at the end of Jan 13: R's gap 0; Q's finish Jan 10 leaves a gap of 1) <- P.
# Levels: P 0 (on time); R k5 - k4 = 1 (3 work days late, 2 of them its own float); F 1.
# Contributions: P 0, R 1 (only the slip beyond its float), F 0.  Calendar: Jan 10 -> Jan 13, 3.
def test_only_the_slip_beyond_the_float_counts(tmp_path):
    case = built_case(
        tmp_path / "case",
        [task("P", 2), task("Q", 3), task("R", 1), finish_milestone()],
        [link("P", "Q"), link("Q", "F"), link("P", "R"), link("R", "F")],
        [
            record("P", "2025-01-06", "2025-01-07"),
            record("Q", "2025-01-08", "2025-01-10"),
            record("R", "2025-01-08", "2025-01-13"),
            record("F", "2025-01-13", "2025-01-13"),
        ],
        "2025-01-06",
    )
    result = compare(case)
    path = result.critical_path.set_index("activity")
    assert list(result.critical_path["activity"]) == ["P", "R", "F"]
    assert {a: int(path.loc[a, "lateness_work_days"]) for a in "PRF"} == {"P": 0, "R": 1, "F": 1}
    assert {a: int(path.loc[a, "delay_days"]) for a in "PRF"} == {"P": 0, "R": 3, "F": 0}


# A real gain on the critical path (five-day calendar, Mon Jan 06 2025 = k0):
# Baseline A3 -> B3 -> F: A Jan 06-08, B Jan 09-13 (Thu to Mon), F Jan 13.
# As built: A took 2 days, Jan 06-07; B Jan 08-10; F Jan 10 (Fri).  Variance -3 calendar days,
#   -1 work day.
# Levels: A finished k1, one work day before its planned early finish k2: -1 (its own duration
#   shrank: a gain); B -1, kept its gap and duration: 0; F 0.  Calendar: Jan 13 (k5) back one
#   work day to Jan 10 (k4): -3 days, in January.
def test_a_real_gain_is_a_negative_contribution(tmp_path):
    case = built_case(
        tmp_path / "case",
        [task("A", 3), task("B", 3), finish_milestone()],
        [link("A", "B"), link("B", "F")],
        [
            record("A", "2025-01-06", "2025-01-07"),
            record("B", "2025-01-08", "2025-01-10"),
            record("F", "2025-01-10", "2025-01-10"),
        ],
        "2025-01-06",
    )
    result = compare(case)
    assert result.completion_variance_days == -3
    path = result.critical_path.set_index("activity")
    assert {a: int(path.loc[a, "work_days"]) for a in "ABF"} == {"A": -1, "B": 0, "F": 0}
    assert {a: int(path.loc[a, "delay_days"]) for a in "ABF"} == {"A": -3, "B": 0, "F": 0}
    assert [(r.period, int(r.delay_days)) for r in result.periods.itertuples()] == [("2025-01", -3)]


def test_a_five_day_task_over_a_weekend_is_not_late_in_work_days(tmp_path):
    # P3 Jan 06-08; A5 after P: planned Thu Jan 09 - Wed Jan 15 (across the weekend), built on
    # the same dates: on time in both units. B5 after P with a lag of 2 work days: planned Mon
    # Jan 13 (k5) - Fri Jan 17 (k9), built Thu Jan 16 (k8) - Wed Jan 22 (k12): 3 work days late at
    # both ends, which is 3 and 5 calendar days.
    case = built_case(
        tmp_path / "case",
        [task("P", 3), task("A", 5), task("B", 5), finish_milestone()],
        [link("P", "A"), link("A", "F"), link("P", "B", lag=2), link("B", "F")],
        [
            record("P", "2025-01-06", "2025-01-08"),
            record("A", "2025-01-09", "2025-01-15"),
            record("B", "2025-01-16", "2025-01-22"),
            record("F", "2025-01-22", "2025-01-22"),
        ],
        "2025-01-06",
    )
    table = compare(case).activities.set_index("activity")
    a, b = table.loc["A"], table.loc["B"]
    assert (int(a["start_variance_work_days"]), int(a["finish_variance_work_days"])) == (0, 0)
    assert (int(b["start_variance_work_days"]), int(b["finish_variance_work_days"])) == (3, 3)
    assert (int(b["start_variance_days"]), int(b["finish_variance_days"])) == (3, 5)
