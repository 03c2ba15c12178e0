"""Acceptance tests of the windows analysis with half-steps, every expected value worked by hand.

Sources
-------
- shared/case-format.md, "Time convention" and "Scheduling rules" (cited as "rule n"): the
  boundary arithmetic of every date below.
- The method's definitions as stated in the docstrings of ``delay.methods.windows`` (cited
  as "windows doc") and ``delay.ledger`` ("ledger doc"), the event-matching rules of
  ``delay.events`` ("events doc") and the driving-predecessor rules of ``delay.tracing``
  ("tracing doc"). The method is the
  half-step (bifurcated) windows analysis of AACE International RP 29R-03 (2011), MIP 3.4,
  and the time slice windows analysis of the SCL Delay and Disruption Protocol, 2nd edition
  (2017), Part B (both recalled from memory): each window's movement of completion is split
  into the effect of progress (the earlier programme brought to the later data date with the
  later progress) and the effect of revisions. The cases are our own, worked by hand here;
  no value below was read from the code's output.

Notation: "LF(S)" is an activity's late finish in the window's start snapshot S (backward
pass by logic alone from the completion activity's own finish in S, ledger doc);
"finish(H)" its finish in the half-step H; its level = finish(H) - LF(S) in work days of the
ledger calendar (the completion activity's) when positive, finish(H) - EF(S) when negative,
else 0; a charge is the level less the driving predecessor's along H's driving chain, the
origin of the chain counting zero when it was complete at S; an activity whose gap behind
its driving predecessor and whose duration did not change is charged nothing (ledger doc).
Charges are split into calendar days by walking the ledger calendar from S's completion.

Seven-day calendar (most cases, so that work days = calendar days): work day k is
2025-01-06 + k days; a task of duration d starting on date D finishes on D + d - 1 (time
convention), and an FS successor starts the next day.

Five-day calendar, January 2025 (2025-01-06 is a Monday), work day k:
    k:  0  1  2  3  4 | 5  6  7  8  9
 date: 06 07 08 09 10 |13 14 15 16 17
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
from delay.methods.windows import analyse, half_step_snapshot

SEVEN_DAY = {"default_calendar": "7d"}


def task(activity_id, duration, **extra):
    return {"id": activity_id, "name": f"Work {activity_id}", "duration": duration, **extra}


def finish_milestone(activity_id="F"):
    return {"id": activity_id, "name": "Completion", "duration": 0, "kind": "finish_milestone"}


def link(pred, succ, kind="FS", lag=0):
    return {"pred": pred, "succ": succ, "type": kind, "lag": lag}


def progressed(row, actual_start=None, actual_finish=None, remaining=None):
    """An update's row: the baseline row with its progress columns."""
    return {**row, "actual_start": actual_start, "actual_finish": actual_finish, "remaining": remaining}


def day(text):
    return dt.date.fromisoformat(text)


def charges_by_activity(window):
    return window.charges.set_index("activity")


def only_window(result):
    assert len(result.windows) == 1
    return result.windows[0]


def assert_no_revision_charges(window):
    """No revision of any kind moves completion (there are none in the update)."""
    assert window.revision_days == 0
    assert all(int(d) == 0 for d in window.revisions["days"])


# =======================================================================================
# 1. A single critical chain with one late activity (7-day calendar)
#
# Baseline A5 -> B5 -> C5 -> F (finish milestone).
#   A Jan 06-10, B Jan 11-15, C Jan 16-20, F Jan 20.  Completion S = 2025-01-20.
#   Backward pass from Jan 20: LF A Jan 10, B Jan 15, C Jan 20, F Jan 20.
# Update U1, data date 2025-01-13: A took 7 days, Jan 06-12 (complete); B, C, F not started.
#   B starts no earlier than the data date Jan 13 and after A (Jan 12 + 1 = Jan 13): B Jan 13-17,
#   C Jan 18-22, F Jan 22 (rule 3).  Completion E = 2025-01-22.
# H = baseline programme with U1's progress on A: the same programme as U1, completion Jan 22.
#   movement = Jan 22 - Jan 20 = 2; progress = 2; revisions = 0; work days = 2 (7-day).
# H's driving path, traced back: F <- C <- B <- A (A has no predecessor: the project start).
#   levels: A 12-10 = 2, B 17-15 = 2, C 22-20 = 2, F 22-20 = 2 (the progress effect).
#   charges:  A 2-0 = 2; B, C and F kept their gaps (0) and durations: charged 0.
#   Counted sum 2 = progress.
SINGLE_CHAIN = [task("A", 5), task("B", 5), task("C", 5), finish_milestone()]
SINGLE_CHAIN_LINKS = [link("A", "B"), link("B", "C"), link("C", "F")]


def single_chain_case(root, files=None):
    a, b, c, f = SINGLE_CHAIN
    update = [progressed(a, "2025-01-06", "2025-01-12"), progressed(b), progressed(c), progressed(f)]
    write_case(
        root,
        activities=SINGLE_CHAIN,
        links=SINGLE_CHAIN_LINKS,
        schedule=SEVEN_DAY,
        snapshots={"U1": {"data_date": "2025-01-13", "activities": update}},
        files=files,
    )
    return load_case(root)


def test_single_chain_charge_lands_on_the_late_activity(tmp_path):
    window = only_window(analyse(single_chain_case(tmp_path / "case"), half_step=True))
    assert (window.start, window.end) == ("baseline", "U1")
    assert window.completion_start == day("2025-01-20")
    assert window.completion_half == day("2025-01-22")
    assert window.completion_end == day("2025-01-22")
    assert (window.movement_days, window.movement_work_days) == (2, 2)
    assert (window.progress_days, window.revision_days) == (2, 0)
    charges = charges_by_activity(window)
    assert {a: int(charges.loc[a, "days"]) for a in "ABCF"} == {"A": 2, "B": 0, "C": 0, "F": 0}
    assert {a: int(charges.loc[a, "level"]) for a in "ABC"} == {"A": 2, "B": 2, "C": 2}
    assert {a: bool(charges.loc[a, "inherited"]) for a in "ABCF"} == {"A": False, "B": True, "C": True, "F": True}
    assert all(bool(charges.loc[a, "counted"]) for a in "ABCF")
    assert int(window.charges.loc[window.charges["counted"].astype(bool), "days"].sum()) == 2
    assert_no_revision_charges(window)


# =======================================================================================
# 2. The same on the 5-day calendar: a delay that crosses a weekend
#
# Baseline A3 -> B2 -> F.  A k0-2 = Jan 06-08, B k3-4 = Jan 09-10 (Fri), F Jan 10.
#   LF A Jan 08 (k2), B Jan 10 (k4).  Completion S = 2025-01-10 (work day k4).
# Update U1, data date 2025-01-10 (Fri): A took 4 work days, Jan 06-09 (complete).
#   B starts k4 = Jan 10 and takes 2 work days: Jan 10 (Fri) and Jan 13 (Mon); F Jan 13.
#   Completion E = 2025-01-13 (k5).  movement = 3 calendar days, k5 - k4 = 1 work day.
# H = U1's programme (no revisions): progress 3, revisions 0.
#   levels (work days of the 5-day ledger calendar): A k3 - k2 = 1; B k5 - k4 = 1; F 1.
#   charges: A 1; B kept its gap (0) and its 2 days: it only carried A's delay across the
#   weekend and is charged 0; F 0.
#   Calendar days: from Jan 10 (k4), A's 1 work day reaches k5 = Jan 13: 3 calendar days.
def test_five_day_calendar_charges_in_work_days(tmp_path):
    base = [task("A", 3), task("B", 2), finish_milestone()]
    a, b, f = base
    update = [progressed(a, "2025-01-06", "2025-01-09"), progressed(b), progressed(f)]
    write_case(
        tmp_path / "case",
        activities=base,
        links=[link("A", "B"), link("B", "F")],
        snapshots={"U1": {"data_date": "2025-01-10", "activities": update}},
    )
    window = only_window(analyse(load_case(tmp_path / "case"), half_step=True))
    assert window.completion_start == day("2025-01-10")
    assert window.completion_end == day("2025-01-13")
    assert (window.movement_days, window.movement_work_days) == (3, 1)
    assert (window.progress_days, window.revision_days) == (3, 0)
    charges = charges_by_activity(window)
    assert {x: int(charges.loc[x, "work_days"]) for x in "ABF"} == {"A": 1, "B": 0, "F": 0}
    assert {x: int(charges.loc[x, "days"]) for x in "ABF"} == {"A": 3, "B": 0, "F": 0}


# =======================================================================================
# 3. Float absorbed without delay (7-day)
#
# Baseline A5 -> C5 -> F and B2 -> F.
#   A Jan 06-10, C Jan 11-15, F Jan 15; B Jan 06-07 with LF Jan 15 (total float 8).
# Update U1, data date 2025-01-11: A Jan 06-10 (on time), B Jan 06-10 (5 days for a 2-day task:
#   3 days late, within its float).  C Jan 11-15, F Jan 15: completion unchanged.
#   movement 0, progress 0.
# H's driving path: F <- C (C's finish Jan 15 drives F; B's finish Jan 10 leaves 5 days of
#   relative float) <- A.  Lateness A 0, C 0, F 0: every charge is 0.  B is not on the path
#   (and its lateness Jan 10 - Jan 15 = -5 would count as min(0, 0) = 0 anyway): no charge.
def test_float_absorbed_is_not_charged(tmp_path):
    base = [task("A", 5), task("B", 2), task("C", 5), finish_milestone()]
    a, b, c, f = base
    update = [
        progressed(a, "2025-01-06", "2025-01-10"),
        progressed(b, "2025-01-06", "2025-01-10"),
        progressed(c),
        progressed(f),
    ]
    write_case(
        tmp_path / "case",
        activities=base,
        links=[link("A", "C"), link("C", "F"), link("B", "F")],
        schedule=SEVEN_DAY,
        snapshots={"U1": {"data_date": "2025-01-11", "activities": update}},
    )
    window = only_window(analyse(load_case(tmp_path / "case"), half_step=True))
    assert window.completion_start == window.completion_end == day("2025-01-15")
    assert (window.movement_days, window.progress_days, window.revision_days) == (0, 0, 0)
    assert all(int(d) == 0 for d in window.charges["days"])
    charges = charges_by_activity(window)
    assert "B" not in set(charges.index[charges["counted"].astype(bool)])
    assert {"A", "C", "F"} <= set(charges.index[charges["counted"].astype(bool)])


# =======================================================================================
# 4. A non-critical path becomes critical within the window (7-day)
#
# Baseline A5 -> C5 -> F (critical) and B3 -> D4 -> F (float 3).
#   A Jan 06-10, C Jan 11-15, F Jan 15; B Jan 06-08, D Jan 09-12.
#   Backward from Jan 15: LF D Jan 15 (LS Jan 12), LF B Jan 11.
# Update U1, data date 2025-01-14: A Jan 06-10; C started Jan 11, 2 days remaining (Jan 14-15);
#   B took 8 days, Jan 06-13.  D starts Jan 14, finishes Jan 17; F Jan 17.
#   movement = Jan 17 - Jan 15 = 2 = progress (no revisions).
# H's driving path: F <- D <- B (project start).  C finishes Jan 15: not driving.
#   lateness: B 13 - 11 = 2, D 17 - 15 = 2, F 2.  charges: B 2, D 0, F 0; A and C nothing.
# Driving paths: S's runs through A, C, F; E's through D, F (B complete at E).
def test_non_critical_path_becomes_critical(tmp_path):
    base = [task("A", 5), task("B", 3), task("C", 5), task("D", 4), finish_milestone()]
    a, b, c, d, f = base
    update = [
        progressed(a, "2025-01-06", "2025-01-10"),
        progressed(b, "2025-01-06", "2025-01-13"),
        progressed(c, "2025-01-11", None, 2),
        progressed(d),
        progressed(f),
    ]
    links = [link("A", "C"), link("C", "F"), link("B", "D"), link("D", "F")]
    write_case(
        tmp_path / "case",
        activities=base,
        links=links,
        schedule=SEVEN_DAY,
        snapshots={"U1": {"data_date": "2025-01-14", "activities": update}},
    )
    window = only_window(analyse(load_case(tmp_path / "case"), half_step=True))
    assert window.completion_start == day("2025-01-15")
    assert window.completion_end == day("2025-01-17")
    assert (window.movement_days, window.progress_days, window.revision_days) == (2, 2, 0)
    charges = charges_by_activity(window)
    assert {x: int(charges.loc[x, "days"]) for x in "BDF"} == {"B": 2, "D": 0, "F": 0}
    assert all(bool(charges.loc[x, "counted"]) for x in "BDF")
    for untouched in "AC":
        assert untouched not in charges.index or int(charges.loc[untouched, "days"]) == 0
    assert "D" in window.joined_driving_path
    assert {"A", "C"} <= set(window.left_driving_path)
    assert "F" not in window.joined_driving_path and "F" not in window.left_driving_path


# =======================================================================================
# 5. A gain: the critical activity finishes early (7-day)
#
# Baseline A5 -> B5 -> F: A Jan 06-10, B Jan 11-15, F Jan 15; LF A Jan 10, B Jan 15.
# Update U1, data date 2025-01-09: A Jan 06-08 (2 days early).  B Jan 09-13, F Jan 13.
#   movement = Jan 13 - Jan 15 = -2 = progress.  Floor = min(0, -2) = -2.
#   lateness: A 8 - 10 = -2, B 13 - 15 = -2, F -2.  charges: A -2, B 0, F 0.
def test_gain_is_a_negative_charge(tmp_path):
    base = [task("A", 5), task("B", 5), finish_milestone()]
    a, b, f = base
    update = [progressed(a, "2025-01-06", "2025-01-08"), progressed(b), progressed(f)]
    write_case(
        tmp_path / "case",
        activities=base,
        links=[link("A", "B"), link("B", "F")],
        schedule=SEVEN_DAY,
        snapshots={"U1": {"data_date": "2025-01-09", "activities": update}},
    )
    window = only_window(analyse(load_case(tmp_path / "case"), half_step=True))
    assert window.completion_end == day("2025-01-13")
    assert (window.movement_days, window.progress_days, window.revision_days) == (-2, -2, 0)
    charges = charges_by_activity(window)
    assert {x: int(charges.loc[x, "days"]) for x in "ABF"} == {"A": -2, "B": 0, "F": 0}


# =======================================================================================
# 6. Two concurrent driving paths (7-day)
#
# Baseline P2 -> A5 -> F and P2 -> B5 -> F (A and B in parallel, both critical).
#   P Jan 06-07, A and B Jan 08-12, F Jan 12.  LF P Jan 07, A Jan 12, B Jan 12.
# Update U1, data date 2025-01-13: P Jan 06-07; A and B both started Jan 08 with 2 days
#   remaining: Jan 13-14.  F Jan 14.  movement 2 = progress.
# Trace: F has two tied driving predecessors, A and B (both FS, both finishing Jan 14).  A and
#   B are in progress and not driven by P's link (the data date drives their remaining work),
#   so each goes back to the closest link, P (gap 0, tracing doc); P has no predecessor.
#   lateness: P 0, A 14 - 12 = 2, B 2, F 2.
#   The counted chain takes at the tie the greatest lateness (equal), then an FS link (both),
#   then input order: A.  Counted: P 0, A 2, F 0 = 2 = progress.
#   B is listed with its own charge 2 - 0 = 2, not counted, in one concurrent group with the
#   stretch of the counted chain it runs beside (A).  All charges sum to 4: the delay is
#   counted once (2), not twice.
def test_two_concurrent_driving_paths(tmp_path):
    base = [task("P", 2), task("A", 5), task("B", 5), finish_milestone()]
    p, a, b, f = base
    update = [
        progressed(p, "2025-01-06", "2025-01-07"),
        progressed(a, "2025-01-08", None, 2),
        progressed(b, "2025-01-08", None, 2),
        progressed(f),
    ]
    links = [link("P", "A"), link("P", "B"), link("A", "F"), link("B", "F")]
    write_case(
        tmp_path / "case",
        activities=base,
        links=links,
        schedule=SEVEN_DAY,
        snapshots={"U1": {"data_date": "2025-01-13", "activities": update}},
    )
    window = only_window(analyse(load_case(tmp_path / "case"), half_step=True))
    assert window.completion_end == day("2025-01-14")
    assert (window.movement_days, window.progress_days, window.revision_days) == (2, 2, 0)
    charges = charges_by_activity(window)
    assert int(charges.loc["A", "days"]) == 2 and int(charges.loc["B", "days"]) == 2
    assert bool(charges.loc["A", "counted"]) and not bool(charges.loc["B", "counted"])
    assert list(charges.loc["A", "concurrent_with"]) == ["B"]
    assert list(charges.loc["B", "concurrent_with"]) == ["A"]
    assert charges.loc["A", "group"] == charges.loc["B", "group"] and pd.notna(charges.loc["A", "group"])
    assert {x: int(charges.loc[x, "days"]) for x in "PF"} == {"P": 0, "F": 0}
    counted = window.charges[window.charges["counted"].astype(bool)]
    assert int(counted["days"].sum()) == 2
    assert int(window.charges["days"].sum()) == 4


# =======================================================================================
# 7. A window whose delay comes entirely from revisions (7-day)
#
# Baseline A5 -> B5 -> F and A5 -> C3 -> F.
#   A Jan 06-10, B Jan 11-15, C Jan 11-13, F Jan 15.  Completion S = Jan 15.
# Update U1, data date 2025-01-11: A Jan 06-10 (on time).  Revisions: B re-planned at 8 days,
#   and a new link C -> B.  E: C Jan 11-13, B Jan 14-21, F Jan 21.  movement = 6.
# H = baseline programme with A's progress: B Jan 11-15, F Jan 15: progress 0 (charges all 0).
# Revisions, one kind at a time from H (windows doc):
#   deletions, additions: none.
#   durations (B 5 -> 8): B Jan 11-18, F Jan 18: +3, completion after Jan 18.
#   logic (C > B added): B after C: Jan 14-21, F Jan 21: +3, completion after Jan 21.
#   calendars, constraints: none.  3 + 3 = 6 = revision effect.
def test_window_delay_entirely_from_revisions(tmp_path):
    base = [task("A", 5), task("B", 5), task("C", 3), finish_milestone()]
    a, b, c, f = base
    update = [progressed(a, "2025-01-06", "2025-01-10"), progressed({**b, "duration": 8}), progressed(c), progressed(f)]
    links = [link("A", "B"), link("A", "C"), link("B", "F"), link("C", "F")]
    write_case(
        tmp_path / "case",
        activities=base,
        links=links,
        schedule=SEVEN_DAY,
        snapshots={"U1": {"data_date": "2025-01-11", "activities": update, "links": links + [link("C", "B")]}},
    )
    window = only_window(analyse(load_case(tmp_path / "case"), half_step=True))
    assert window.completion_start == window.completion_half == day("2025-01-15")
    assert window.completion_end == day("2025-01-21")
    assert (window.movement_days, window.progress_days, window.revision_days) == (6, 0, 6)
    assert all(int(d) == 0 for d in window.charges["days"])
    revisions = window.revisions.set_index("kind")
    assert list(revisions.loc["durations", "activities"]) == ["B"]
    assert int(revisions.loc["durations", "days"]) == 3
    assert revisions.loc["durations", "completion_after"] == day("2025-01-18")
    assert list(revisions.loc["logic", "activities"]) == ["C>B"]
    assert int(revisions.loc["logic", "days"]) == 3
    assert revisions.loc["logic", "completion_after"] == day("2025-01-21")
    assert set(revisions.index) == {"durations", "logic"}  # kinds that moved nothing are not listed
    # the kinds are charged in the fixed order of the windows doc
    kinds = list(window.revisions["kind"])
    assert kinds.index("durations") < kinds.index("logic")


# =======================================================================================
# 8. A window across several updates (7-day)
#
# Baseline A5 -> B5 -> C5 -> F: A Jan 06-10, B Jan 11-15, C Jan 16-20, F Jan 20.
# U1, data date 2025-01-13: A Jan 06-12 (2 days late).  B Jan 13-17, C Jan 18-22: completion Jan 22.
#   U1's backward pass from Jan 22: LF B Jan 17, C Jan 22.
# U2, data date 2025-01-20: A Jan 06-12, B Jan 13-19 (2 more days).  C Jan 20-24: completion Jan 24.
# Default windows:
#   W1 baseline -> U1: movement 2; charges A 2 (12-10), B 0, C 0 (as case 1).
#   W2 U1 -> U2: movement 2.  A was complete at U1: the trace stops there (counts 0).
#     lateness against U1: B 19-17 = 2, C 24-22 = 2, F 2.  charges A 0, B 2, C 0, F 0.
#   2 + 2 = 4 = Jan 24 - Jan 20 = total movement.
# Boundaries baseline, U2 (U1 skipped): one window, movement 4 = progress (no revisions).
#   lateness against the baseline: A 12-10 = 2, B 19-15 = 4, C 24-20 = 4, F 4.
#   charges A 2, B 4 - 2 = 2, C 0, F 0.  Sum 4.
def several_updates_case(root):
    a, b, c, f = SINGLE_CHAIN
    u1 = [progressed(a, "2025-01-06", "2025-01-12"), progressed(b), progressed(c), progressed(f)]
    u2 = [
        progressed(a, "2025-01-06", "2025-01-12"),
        progressed(b, "2025-01-13", "2025-01-19"),
        progressed(c),
        progressed(f),
    ]
    write_case(
        root,
        activities=SINGLE_CHAIN,
        links=SINGLE_CHAIN_LINKS,
        schedule=SEVEN_DAY,
        snapshots={
            "U1": {"data_date": "2025-01-13", "activities": u1},
            "U2": {"data_date": "2025-01-20", "activities": u2},
        },
    )
    return root


def test_consecutive_windows_add_up_to_the_total(tmp_path):
    result = analyse(load_case(several_updates_case(tmp_path / "case")), half_step=True)
    assert [(w.start, w.end) for w in result.windows] == [("baseline", "U1"), ("U1", "U2")]
    first, second = result.windows
    assert (first.movement_days, second.movement_days) == (2, 2)
    assert (second.completion_start, second.completion_end) == (day("2025-01-22"), day("2025-01-24"))
    assert result.total_movement_days == 4
    assert {x: int(charges_by_activity(first).loc[x, "days"]) for x in "ABCF"} == {"A": 2, "B": 0, "C": 0, "F": 0}
    second_charges = charges_by_activity(second)
    assert {x: int(second_charges.loc[x, "days"]) for x in "BCF"} == {"B": 2, "C": 0, "F": 0}
    assert "A" not in second_charges.index or int(second_charges.loc["A", "days"]) == 0
    assert list(result.table["movement_days"]) == [2, 2]


def test_window_across_several_updates(tmp_path):
    case = load_case(several_updates_case(tmp_path / "case"))
    window = only_window(analyse(case, windows=["baseline", "U2"], half_step=True))
    assert (window.start, window.end) == ("baseline", "U2")
    assert (window.completion_start, window.completion_end) == (day("2025-01-20"), day("2025-01-24"))
    assert (window.movement_days, window.progress_days, window.revision_days) == (4, 4, 0)
    charges = charges_by_activity(window)
    assert {x: int(charges.loc[x, "days"]) for x in "ABCF"} == {"A": 2, "B": 2, "C": 0, "F": 0}


def test_misordered_or_unknown_boundaries_are_case_errors(tmp_path):
    # windows doc / analyse Raises: "CaseError: unknown or misordered boundary snapshots."
    case = load_case(several_updates_case(tmp_path / "case"))
    with pytest.raises(CaseError):
        analyse(case, windows=["U2", "baseline"])
    with pytest.raises(CaseError):
        analyse(case, windows=["baseline", "U9"])


# =======================================================================================
# 9. Out-of-sequence progress in both progress modes (7-day)
#
# Baseline A5 -> B5 -> F: A Jan 06-10, B Jan 11-15, F Jan 15.  LF A Jan 10, B Jan 15.
# U1, data date 2025-01-09: A started Jan 06, 2 days remaining (Jan 09-10: on time);
#   B started out of sequence on Jan 08 with 4 days remaining.
# retained_logic (rule 3: the link A -> B bounds B's remaining work):
#   B's remaining after A's finish Jan 10: Jan 11-14; F Jan 14.  H = U1's programme:
#   half-step completion Jan 14, progress -1.  Floor -1.
#   Trace F <- B <- A (A drives B's remaining work).  lateness A 0, B 14-15 = -1, F -1.
#   charges A 0, B -1, F 0.
# progress_override (rule 3: links into B ignored):
#   B's remaining from the data date: Jan 09-12; A Jan 09-10; F Jan 12.  Half-step completion
#   Jan 12, progress -3.  Floor -3.
#   Trace F <- B <- A (no link drives B's remaining work: the closest link, tracing doc).
#   lateness A 0, B 12-15 = -3, F -3.  charges A 0, B -3, F 0.
def out_of_sequence_case(root, progress_mode):
    base = [task("A", 5), task("B", 5), finish_milestone()]
    a, b, f = base
    update = [progressed(a, "2025-01-06", None, 2), progressed(b, "2025-01-08", None, 4), progressed(f)]
    write_case(
        root,
        activities=base,
        links=[link("A", "B"), link("B", "F")],
        schedule={**SEVEN_DAY, "progress": progress_mode},
        snapshots={"U1": {"data_date": "2025-01-09", "activities": update}},
    )
    return load_case(root)


@pytest.mark.parametrize(
    "mode, completion, movement, b_charge",
    [
        ("retained_logic", "2025-01-14", -1, -1),
        ("progress_override", "2025-01-12", -3, -3),
    ],
)
def test_out_of_sequence_progress(tmp_path, mode, completion, movement, b_charge):
    window = only_window(analyse(out_of_sequence_case(tmp_path / "case", mode), half_step=True))
    assert window.completion_start == day("2025-01-15")
    assert window.completion_half == day(completion)
    assert window.completion_end == day(completion)
    assert (window.movement_days, window.progress_days, window.revision_days) == (movement, movement, 0)
    charges = charges_by_activity(window)
    assert {x: int(charges.loc[x, "days"]) for x in "ABF"} == {"A": 0, "B": b_charge, "F": 0}


# =======================================================================================
# 10. A deleted and an added activity (7-day)
#
# Baseline A5 -> B3 -> C5 -> F: A Jan 06-10, B Jan 11-13, C Jan 14-18, F Jan 18.
# U1, data date 2025-01-11: A Jan 06-10; B deleted; D6 added with A -> D -> C.
#   E: D Jan 11-16, C Jan 17-21, F Jan 21.  movement = Jan 21 - Jan 18 = 3.
# H: the baseline programme (B kept, unprogressed, flagged) with A's progress: B Jan 11-13,
#   C Jan 14-18, F Jan 18: progress 0.  D is not in H.
# Revisions from H:
#   deletions (B, with its links A>B, B>C): C has no predecessor left, starts at the data
#     date: Jan 11-15, F Jan 15: -3, completion after Jan 15.
#   additions (D, with A>D and D>C): D Jan 11-16, C Jan 17-21, F Jan 21: +6, after Jan 21.
#   durations, logic (links now equal U1's), calendars, constraints: none.
#   -3 + 6 = 3 = revision effect.
def deleted_added_case(root):
    a, b, c, f = [task("A", 5), task("B", 3), task("C", 5), finish_milestone()]
    update = [progressed(a, "2025-01-06", "2025-01-10"), progressed(c), progressed(task("D", 6)), progressed(f)]
    write_case(
        root,
        activities=[a, b, c, f],
        links=[link("A", "B"), link("B", "C"), link("C", "F")],
        schedule=SEVEN_DAY,
        snapshots={
            "U1": {
                "data_date": "2025-01-11",
                "activities": update,
                "links": [link("A", "D"), link("D", "C"), link("C", "F")],
            }
        },
    )
    return load_case(root)


def test_deleted_and_added_activities(tmp_path):
    case = deleted_added_case(tmp_path / "case")
    window = only_window(analyse(case, half_step=True))
    assert window.completion_half == day("2025-01-18")
    assert window.completion_end == day("2025-01-21")
    assert (window.movement_days, window.progress_days, window.revision_days) == (3, 0, 3)
    assert window.deleted_in_end == ("B",)
    revisions = window.revisions.set_index("kind")
    assert list(revisions.loc["deletions", "activities"]) == ["B"]
    assert int(revisions.loc["deletions", "days"]) == -3
    assert revisions.loc["deletions", "completion_after"] == day("2025-01-15")
    assert list(revisions.loc["additions", "activities"]) == ["D"]
    assert int(revisions.loc["additions", "days"]) == 6
    assert revisions.loc["additions", "completion_after"] == day("2025-01-21")
    assert set(revisions.index) == {"deletions", "additions"}
    kinds = list(window.revisions["kind"])
    assert kinds.index("deletions") < kinds.index("additions")
    assert "B" in window.driving_half  # H still runs through the deleted activity


def test_half_step_keeps_deleted_activity_unprogressed(tmp_path):
    case = deleted_added_case(tmp_path / "case")
    half = half_step_snapshot(case.snapshot("baseline"), case.snapshot("U1"))
    rows = half.activities.set_index("id")
    assert set(rows.index) == {"A", "B", "C", "F"}  # D (added in U1) is not in H
    assert half.data_date == day("2025-01-11")  # E's data date
    assert pd.isna(rows.loc["B", "actual_start"]) and pd.isna(rows.loc["B", "actual_finish"])
    assert pd.Timestamp(rows.loc["A", "actual_start"]) == pd.Timestamp("2025-01-06")
    assert pd.Timestamp(rows.loc["A", "actual_finish"]) == pd.Timestamp("2025-01-10")


# =======================================================================================
# 11. Charges linked to the event register (7-day)
#
# Baseline A2 -> B2 -> C2 -> D2 -> F: A Jan 06-07, B Jan 08-09, C Jan 10-11, D Jan 12-13, F Jan 13.
# U1, data date 2025-01-15: A Jan 06-08, B Jan 09-11, C Jan 12-14 (each one day longer).
#   D Jan 15-16, F Jan 16.  movement = 3 = progress.
#   lateness: A 8-7 = 1, B 11-9 = 2, C 14-11 = 3, D 16-13 = 3, F 3.
#   charges: A 1, B 1, C 1, D 0, F 0.
# Events (events doc: an event matches a charge when it names the activity and its period
# overlaps the window, from S's data date to E's, both included):
#   EV1 employer, Jan 06-08, names A            -> A: employer.
#   EV2 employer (Jan 09-11) and EV3 contractor (Jan 10-11), both name B -> B: concurrent.
#   EV4 employer names C but starts Jan 20, after the window's end -> no match:
#       C to the unexplained-risk setting (default contractor), basis "unexplained".
#   EV5 neutral names D and starts on Jan 15, the data date that ends the window: it matches.
EVENTS = [
    {
        "id": "EV1",
        "title": "Late access to the site",
        "party": "employer",
        "start": "2025-01-06",
        "finish": "2025-01-08",
        "activities": "A",
    },
    {
        "id": "EV2",
        "title": "Design change to the footings",
        "party": "employer",
        "start": "2025-01-09",
        "finish": "2025-01-11",
        "activities": "B",
    },
    {
        "id": "EV3",
        "title": "Crane breakdown",
        "party": "contractor",
        "start": "2025-01-10",
        "finish": "2025-01-11",
        "activities": "B",
    },
    {
        "id": "EV4",
        "title": "Instruction on finishes",
        "party": "employer",
        "start": "2025-01-20",
        "finish": "2025-01-22",
        "activities": "C",
    },
    {
        "id": "EV5",
        "title": "Exceptional rainfall",
        "party": "neutral",
        "start": "2025-01-15",
        "finish": "2025-01-16",
        "activities": "D",
    },
]


def events_case(root):
    base = [task("A", 2), task("B", 2), task("C", 2), task("D", 2), finish_milestone()]
    a, b, c, d, f = base
    update = [
        progressed(a, "2025-01-06", "2025-01-08"),
        progressed(b, "2025-01-09", "2025-01-11"),
        progressed(c, "2025-01-12", "2025-01-14"),
        progressed(d),
        progressed(f),
    ]
    links = [link("A", "B"), link("B", "C"), link("C", "D"), link("D", "F")]
    write_case(
        root,
        activities=base,
        links=links,
        schedule=SEVEN_DAY,
        snapshots={"U1": {"data_date": "2025-01-15", "activities": update}},
        files={"events.csv": EVENTS},
    )
    return root


def test_charges_are_linked_to_events(tmp_path):
    window = only_window(analyse(load_case(events_case(tmp_path / "case")), half_step=True))
    assert window.completion_end == day("2025-01-16")
    assert (window.movement_days, window.progress_days) == (3, 3)
    charges = charges_by_activity(window)
    assert {x: int(charges.loc[x, "days"]) for x in "ABCDF"} == {"A": 1, "B": 1, "C": 1, "D": 0, "F": 0}
    assert list(charges.loc["A", "events"]) == ["EV1"]
    assert (charges.loc["A", "party"], charges.loc["A", "basis"]) == ("employer", "event")
    assert list(charges.loc["B", "events"]) == ["EV2", "EV3"]
    assert list(charges.loc["B", "parties"]) == ["employer", "contractor"]
    assert (charges.loc["B", "party"], charges.loc["B", "basis"]) == ("concurrent", "event")
    assert list(charges.loc["C", "events"]) == []  # EV4 starts after the window's end
    assert (charges.loc["C", "party"], charges.loc["C", "basis"]) == ("contractor", "unexplained")


def test_event_starting_on_the_closing_data_date_matches(tmp_path):
    # events doc: the window's period runs to E's data date, both ends included, because the
    # update of that date may already show the event's effect. EV5 starts on Jan 15, U1's
    # data date, and names D: it matches D's charge.
    window = only_window(analyse(load_case(events_case(tmp_path / "case")), half_step=True))
    charges = charges_by_activity(window)
    assert list(charges.loc["D", "events"]) == ["EV5"]
    assert (charges.loc["D", "party"], charges.loc["D", "basis"]) == ("neutral", "event")


# =======================================================================================
# 12. Without half-steps the whole movement is charged along E's driving path
#
# Case 1 again: the whole movement 2 is charged through U1's trace: A 2, B 0, C 0, F 0
# (analyse doc: "Without it, each window's whole movement is charged along E's driving path
# and no revisions are listed").
def test_without_half_step(tmp_path):
    result = analyse(single_chain_case(tmp_path / "case"), half_step=False)
    window = only_window(result)
    assert result.half_step is False
    assert window.completion_half is None
    assert (window.movement_days, window.progress_days, window.revision_days) == (2, 2, 0)
    assert len(window.revisions) == 0
    charges = charges_by_activity(window)
    assert {x: int(charges.loc[x, "days"]) for x in "ABCF"} == {"A": 2, "B": 0, "C": 0, "F": 0}


# =======================================================================================
# 13. The JSON form of `delay windows` (keys as in the issue), on the events case (11)
def test_windows_json(tmp_path):
    root = events_case(tmp_path / "case")
    run = CliRunner().invoke(cli, ["windows", str(root), "--format", "json"])
    assert run.exit_code == 0, run.output
    data = json.loads(run.output)
    assert {"windows", "total_movement_days", "target", "ledger_calendar", "sections"} <= set(data)
    assert (data["total_movement_days"], data["target"], data["ledger_calendar"]) == (3, "F", "7d")
    (window,) = data["windows"]
    assert {
        "start",
        "end",
        "completion_start",
        "completion_end",
        "movement_days",
        "movement_work_days",
        "progress_days",
        "revision_days",
        "by_party_days",
        "charged",
        "revisions",
        "sentence",
    } <= set(window)
    assert (window["start"], window["end"]) == ("baseline", "U1")
    assert (window["completion_start"], window["completion_end"]) == ("2025-01-13", "2025-01-16")
    assert (window["movement_days"], window["movement_work_days"]) == (3, 3)
    assert (window["progress_days"], window["revision_days"]) == (3, 0)
    for entry in window["charged"]:
        assert {"activity", "work_days", "days", "counted", "events", "party", "basis", "concurrent_with"} <= set(entry)
    charged = {e["activity"]: e for e in window["charged"] if e["days"] != 0}
    assert set(charged) == {"A", "B", "C"}
    assert {k: charged["A"][k] for k in ("work_days", "days", "counted", "events", "party", "basis")} == {
        "work_days": 1,
        "days": 1,
        "counted": True,
        "events": ["EV1"],
        "party": "employer",
        "basis": "event",
    }
    assert {k: charged["B"][k] for k in ("days", "events", "party", "basis")} == {
        "days": 1,
        "events": ["EV2", "EV3"],
        "party": "concurrent",
        "basis": "event",
    }
    assert {k: charged["C"][k] for k in ("days", "events", "party", "basis")} == {
        "days": 1,
        "events": [],
        "party": "contractor",
        "basis": "unexplained",
    }
    # the counted charges add up to the progress effect (the issue's `counted` flag)
    assert sum(e["days"] for e in window["charged"] if e["counted"]) == window["progress_days"]
    assert window["by_party_days"] == {"employer": 1, "contractor": 1, "concurrent": 1}
    assert window["revisions"] == []


def test_windows_json_revisions_and_boundaries(tmp_path):
    # Case 10 through the command: revisions deletions ["B"] -3 and additions ["D"] +6.
    deleted_added_case(tmp_path / "revised")
    run = CliRunner().invoke(cli, ["windows", str(tmp_path / "revised"), "--format", "json"])
    assert run.exit_code == 0, run.output
    (window,) = json.loads(run.output)["windows"]
    revisions = {e["kind"]: e for e in window["revisions"]}
    assert {k: revisions["deletions"][k] for k in ("activities", "work_days", "days")} == {
        "activities": ["B"],
        "work_days": -3,
        "days": -3,
    }
    assert {k: revisions["additions"][k] for k in ("activities", "work_days", "days")} == {
        "activities": ["D"],
        "work_days": 6,
        "days": 6,
    }
    assert sum(e["days"] for e in window["revisions"]) == 3
    # Case 8 through --windows baseline,U2: one window of 4 days.
    root = several_updates_case(tmp_path / "several")
    run = CliRunner().invoke(cli, ["windows", str(root), "--windows", "baseline,U2", "--format", "json"])
    assert run.exit_code == 0, run.output
    data = json.loads(run.output)
    assert [(w["start"], w["end"], w["movement_days"]) for w in data["windows"]] == [("baseline", "U2", 4)]
    assert data["total_movement_days"] == 4
