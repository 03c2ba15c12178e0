"""Acceptance tests of the causation tables and the entitlement, every figure worked by hand.

Sources
-------
- shared/case-format.md, "Time convention" and "Scheduling rules" (cited as "rule n"), and
  its events.csv, sections.csv, extensions_granted.csv and prolongation_rates.csv sections:
  the dates below.
- The classification rules of the SCL Delay and Disruption Protocol, 2nd edition (2017), as
  recalled: core principles 9 and 10 on concurrency ("time but not money": a day of delay
  with an employer or neutral risk cause is excusable, compensable only when every cause is
  employer risk, otherwise culpable), core principle 7 (float is shared, first come, first
  served: delay that only uses float gives no extension), core principle 4 (the extension
  is measured against the completion date then in force), core principle 17 and Part B on
  prolongation (priced in the period the delay arose). AACE International RP 29R-03 (2011)
  section 4 on concurrency (as recalled). Apportionment of concurrent days pro rata to the
  causes' impacts alone is the approach some jurisdictions take (common practice), with
  whole days by the largest remainder (Hamilton) method: M. L. Balinski and H. P. Young,
  "Fair Representation" (1982), chapter 2 (as recalled), which also states the quota
  property checked below.
- The project's own statement of how each method becomes causation rows and how the
  entitlement follows, in the docstrings of ``delay.causation`` ("causation doc") and
  ``delay.entitlement`` ("entitlement doc"), and the methods' docstrings (windows doc,
  impacted doc, collapsed doc). The cases are our own; no value below was read from the
  code's output.

The entitlement formulae (entitlement doc, from the project's issue):
    completion in force   = contract completion + days already granted
    with excusable delays = planned (baseline) completion + excusable days
    extension of time     = max(0, with excusable delays - completion in force), never
                            more than the excusable days
    revised completion    = completion in force + extension of time
    culpable days         = max(0, actual or forecast completion - revised completion)
    damages               = culpable days x rate, limited to the cap when it is above 0
    prolongation cost     = sum of compensable days x the rate on the date each arose

Seven-day calendar throughout, so that work days = calendar days: work day k is
2025-01-06 + k; a task of duration d starting on date D finishes on D + d - 1 (time
convention); an FS successor starts the next day; a finish milestone takes the date of the
work day it follows (rule 1); completion is the latest early finish (rule 5).
"""

from __future__ import annotations

import datetime as dt
import json
from fractions import Fraction

import pandas as pd
import pytest
from casewriter import write_case
from click.testing import CliRunner
from hypothesis import given, settings
from hypothesis import strategies as st

from delay import causation as causation_module
from delay.case import load_case
from delay.causation import classify_days, largest_remainder, reconcile
from delay.commands.entitlement import entitlement as entitlement_command
from delay.entitlement import assess, completion_in_force, prolongation_rate
from delay.errors import ReconciliationError

SEVEN_DAY = {"default_calendar": "7d"}
ALL = ("windows", "impacted", "tia", "collapsed")


def task(activity_id, duration, **extra):
    return {"id": activity_id, "name": f"Work {activity_id}", "duration": duration, **extra}


def finish_milestone(activity_id="F"):
    return {"id": activity_id, "name": f"Milestone {activity_id}", "duration": 0, "kind": "finish_milestone"}


def link(pred, succ):
    return {"pred": pred, "succ": succ, "type": "FS", "lag": 0}


def record(activity_id, start, finish):
    return {"id": activity_id, "actual_start": start, "actual_finish": finish, "source": "site diary"}


def event(event_id, party, start, finish, activities, days, **extra):
    return {
        "id": event_id,
        "title": f"Event {event_id}",
        "party": party,
        "start": start,
        "finish": finish,
        "activities": activities,
        "impact": "extend",
        "days": days,
        **extra,
    }


def day(text):
    return dt.date.fromisoformat(text)


def whole_works(entitlement):
    """The headline figures of one method's entitlement."""
    return {
        "excusable": entitlement.excusable_days,
        "eot": entitlement.eot_days,
        "revised": entitlement.revised_completion,
        "compensable": entitlement.compensable_days,
        "prolongation": entitlement.prolongation_cost,
        "culpable": entitlement.ld_days,
        "damages": entitlement.ld_exposure,
        "concurrent": entitlement.concurrent_days,
    }


def rows_by_event(entitlement):
    return entitlement.causation.table.set_index("event")


# =======================================================================================
# 1. An event on the critical path (all four methods)
#
# Baseline A5 -> B5 -> F: A Jan 06-10, B Jan 11-15, F Jan 15.  Planned completion Jan 15,
#   which is also the contract completion.
# EV1 (employer, from Jan 06) adds 3 days to A.  As-built: A Jan 06-13, B Jan 14-18, F Jan 18.
# Impacted as-planned (impacted doc): with EV1, A Jan 06-13, B Jan 14-18, F Jan 18: alone 3,
#   increment 3.  Time impact analysis: no update, so EV1 goes into the baseline: the same.
# Windows (windows doc), one window baseline -> as-built: the half-step is the baseline with
#   the record's progress, completion Jan 18: progress 3.  Lateness A 13 - 10 = 3 (no
#   predecessor: the path's origin counts zero), B 18 - 15 = 3, F 3: charges A 3, B 0, F 0.
#   A matches EV1 (names A, starts Jan 06, before the window's last day Jan 18): employer.
# Collapsed as-built (collapsed doc): actual durations A 8, B 5; but for EV1, A 5 -> F Jan 15,
#   3 days earlier, for the employer and for every event.  D = Jan 18 - Jan 15 = 3; the
#   employer's sole days 3 - 0 overlap = 3; concurrent 3 - 3 = 0; unexplained 3 - 3 = 0.
# Every method: 3 days, sole cause employer -> excusable 3 and compensable 3 (causation doc).
#   with excusable delays Jan 15 + 3 = Jan 18; EoT max(0, Jan 18 - Jan 15) = 3; revised
#   Jan 18; actual Jan 18: culpable 0, damages 0.  Prolongation 3 x 1000 (flat rate; no
#   rate periods) = 3000.
# The register gives EV1's notification (Jan 09) and claim (5 days): shown beside the 3
#   days assessed.
def critical_case(root):
    write_case(
        root,
        activities=[task("A", 5), task("B", 5), finish_milestone()],
        links=[link("A", "B"), link("B", "F")],
        completion="2025-01-15",
        schedule=SEVEN_DAY,
        commercial={"prolongation_cost_per_day": 1000, "liquidated_damages_per_day": 500},
        files={
            "events.csv": [
                event("EV1", "employer", "2025-01-06", "2025-01-08", "A", 3, notified="2025-01-09", claimed_days=5)
            ],
            "asbuilt.csv": [
                record("A", "2025-01-06", "2025-01-13"),
                record("B", "2025-01-14", "2025-01-18"),
                record("F", "2025-01-18", "2025-01-18"),
            ],
        },
    )
    return load_case(root)


@pytest.mark.parametrize("method", ALL)
def test_event_on_the_critical_path(tmp_path, method):
    result = assess(critical_case(tmp_path / "case"), [method]).method(method)
    assert whole_works(result) == {
        "excusable": 3,
        "eot": 3,
        "revised": day("2025-01-18"),
        "compensable": 3,
        "prolongation": 3000.0,
        "culpable": 0,
        "damages": 0.0,
        "concurrent": 0,
    }
    assert result.completion_in_force == day("2025-01-15")
    assert result.planned_completion == day("2025-01-15")
    assert result.actual_completion == day("2025-01-18")
    assert result.causation.explained_days == 3
    row = rows_by_event(result).loc["EV1"]
    assert (int(row["days"]), row["classification"]) == (3, "compensable")
    claim = result.events.set_index("event").loc["EV1"]
    assert (claim["notified"], claim["claimed_days"], claim["assessed_days"]) == (day("2025-01-09"), 5, 3)


# =======================================================================================
# 2. An event within float gives no extension; float is first come, first served
#
# Baseline A5 -> F and B2 -> F: A Jan 06-10, B Jan 06-07, F Jan 10 (B has 3 days of float).
# (a) EV2 (employer, Jan 08) adds 2 days to B: B Jan 06-10, still not after A: completion
#     stays Jan 10.  Alone 0, increment 0: no delay, no extension (causation doc, float).
# (b) EV1 (contractor, Jan 06) also adds 2 days to B, and comes first (chronological order):
#     EV1 alone: B Jan 06-09 -> 0.  EV2 alone: 0.  Cumulative: EV1 B 4 days -> 0; EV2 B 6
#     days Jan 06-11 -> F Jan 11: increment 1.  EV2 alone (0) is not above its increment,
#     so nothing is hidden: the day is EV2's alone -> compensable 1.  The contractor's
#     earlier delay used the float first; EoT = Jan 10 + 1 - Jan 10 = 1, revised Jan 11.
#     No as-built record and no update: the forecast completion compared is the
#     baseline's, Jan 10 -> culpable 0.
def float_case(root, events):
    write_case(
        root,
        activities=[task("A", 5), task("B", 2), finish_milestone()],
        links=[link("A", "F"), link("B", "F")],
        completion="2025-01-10",
        schedule=SEVEN_DAY,
        commercial={"prolongation_cost_per_day": 100},
        files={"events.csv": events},
    )
    return load_case(root)


@pytest.mark.parametrize("method", ["impacted", "tia"])
def test_event_within_float_gives_no_extension(tmp_path, method):
    case = float_case(tmp_path / "case", [event("EV2", "employer", "2025-01-08", "2025-01-09", "B", 2)])
    result = assess(case, [method]).method(method)
    assert whole_works(result) == {
        "excusable": 0,
        "eot": 0,
        "revised": day("2025-01-10"),
        "compensable": 0,
        "prolongation": 0.0,
        "culpable": 0,
        "damages": 0.0,
        "concurrent": 0,
    }
    row = rows_by_event(result).loc["EV2"]
    assert (int(row["days"]), int(row["alone_days"]), row["classification"]) == (0, 0, "no delay")


def test_float_is_first_come_first_served(tmp_path):
    case = float_case(
        tmp_path / "case",
        [
            event("EV1", "contractor", "2025-01-06", "2025-01-07", "B", 2),
            event("EV2", "employer", "2025-01-08", "2025-01-09", "B", 2),
        ],
    )
    result = assess(case, ["impacted"]).method("impacted")
    rows = rows_by_event(result)
    assert (int(rows.loc["EV1", "days"]), rows.loc["EV1", "classification"]) == (0, "no delay")
    assert (int(rows.loc["EV2", "days"]), rows.loc["EV2", "classification"]) == (1, "compensable")
    assert whole_works(result) == {
        "excusable": 1,
        "eot": 1,
        "revised": day("2025-01-11"),
        "compensable": 1,
        "prolongation": 100.0,
        "culpable": 0,
        "damages": 0.0,
        "concurrent": 0,
    }


# =======================================================================================
# 3. Two events on parallel paths: the longer governs, the overlap is concurrent
#
# Baseline A5 -> F and B5 -> F: A and B Jan 06-10, F Jan 10 (both critical).
# EV1 (employer, Jan 06) adds 4 days to A; EV2 (neutral, Jan 07) adds 6 days to B.
#   Alone: EV1 A Jan 06-14 -> 4; EV2 B Jan 06-16 -> 6.
#   Cumulative (EV1 first): EV1 +4 takes days 1-4; EV2: F = max(Jan 14, Jan 16) = Jan 16,
#   +2, days 5-6.  EV2 alone 6 exceeds its increment 2 by 4: hidden behind the first 4 days
#   up to day 6 it did not take, days 1-4 (EV1's) (causation doc).
#   time_not_money: days 1-4 have causes employer and neutral -> excusable, not compensable
#   (not every cause is employer risk); days 5-6 neutral -> excusable.  Excusable 6,
#   compensable 0, concurrent 4.  EoT Jan 10 + 6 - Jan 10 = 6, revised Jan 16.
#   apportion: days 1-4 split pro rata to the impacts alone 4 : 6 -> quotas 1.6 and 2.4,
#   whole parts 1 and 2, one day left to the larger remainder (0.6, EV1): EV1 2 (employer:
#   compensable), EV2 2 (neutral: excusable).  Rounding down alone would have given EV1 1.
#   Excusable still 6, compensable 2 (prolongation 2 x 100 = 200).
def parallel_case(root, concurrency):
    write_case(
        root,
        activities=[task("A", 5), task("B", 5), finish_milestone()],
        links=[link("A", "F"), link("B", "F")],
        completion="2025-01-10",
        schedule=SEVEN_DAY,
        commercial={"prolongation_cost_per_day": 100},
        analysis={"concurrency": concurrency},
        files={
            "events.csv": [
                event("EV1", "employer", "2025-01-06", "2025-01-09", "A", 4),
                event("EV2", "neutral", "2025-01-07", "2025-01-12", "B", 6),
            ]
        },
    )
    return load_case(root)


def test_two_events_on_parallel_paths(tmp_path):
    result = assess(parallel_case(tmp_path / "case", "time_not_money"), ["impacted"]).method("impacted")
    rows = rows_by_event(result)
    assert [int(rows.loc[e, "days"]) for e in ("EV1", "EV2")] == [4, 2]
    assert [int(rows.loc[e, "concurrent_days"]) for e in ("EV1", "EV2")] == [4, 0]
    assert rows.loc["EV1", "concurrent_with"] == "EV2" and rows.loc["EV2", "concurrent_with"] == "EV1"
    assert [rows.loc[e, "classification"] for e in ("EV1", "EV2")] == ["excusable", "excusable"]
    assert whole_works(result) == {
        "excusable": 6,
        "eot": 6,
        "revised": day("2025-01-16"),
        "compensable": 0,
        "prolongation": 0.0,
        "culpable": 0,
        "damages": 0.0,
        "concurrent": 4,
    }


def test_two_events_on_parallel_paths_apportioned(tmp_path):
    result = assess(parallel_case(tmp_path / "case", "apportion"), ["impacted"]).method("impacted")
    row = rows_by_event(result).loc["EV1"]
    assert (int(row["excusable_days"]), int(row["compensable_days"]), int(row["culpable_days"])) == (4, 2, 0)
    assert row["classification"] == "apportioned"
    assert whole_works(result) == {
        "excusable": 6,
        "eot": 6,
        "revised": day("2025-01-16"),
        "compensable": 2,
        "prolongation": 200.0,
        "culpable": 0,
        "damages": 0.0,
        "concurrent": 4,
    }


# =======================================================================================
# 4. An employer and a contractor delay concurrent on parallel paths (all four methods)
#
# Baseline A5 -> F and B5 -> F: A, B Jan 06-10, F Jan 10 = contract completion.
# EV1 (employer, from Jan 06) adds 7 days to A; EV2 (contractor, from Jan 07) 7 days to B.
# As-built: A Jan 06-17, B Jan 06-17, F Jan 17.  Damages 1000/day, prolongation 200/day.
# Impacted and time impact (no update: into the baseline): alone 7 and 7; cumulative EV1
#   +7 (days 1-7), EV2 +0.  EV2 alone 7 exceeds its increment 0 by 7: hidden behind days
#   1-7, which therefore have causes employer and contractor.
# Windows: the half-step (baseline with the record's progress) finishes Jan 17: progress
#   7.  F's driving predecessors A and B tie (both finish Jan 17, FS); lateness A = B =
#   17 - 10 = 7; the counted chain takes A (equal lateness, both FS, then input order).
#   Charges: A 7 counted, B 7 beside it in one concurrency group (windows doc).  A matches
#   EV1 (employer), B matches EV2 (contractor): A's 7 days have causes employer (its own
#   days, 7) and contractor (B's 7 x A's 7 / group's counted 7 = 7) (causation doc).
# Collapsed: but for EV1, A 5 days but B still Jan 06-17: 0 earlier; but for EV2: 0; but
#   for both: F Jan 10, 7 earlier.  D = 7; overlap max(0, 0 + 0 - 7) = 0; sole 0 and 0;
#   concurrent 7 - 0 = 7 between employer and contractor (both had events taken out).
# time_not_money (causation doc): the 7 concurrent days are excusable (an employer cause),
#   not compensable (a contractor cause).  EoT Jan 10 + 7 - Jan 10 = 7, revised Jan 17,
#   actual Jan 17: culpable 0, damages 0; compensable 0, prolongation 0.
# apportion: 7 days split 1 : 1 (impacts alone 7 and 7; windows 7 and 7; collapsed equal
#   shares) -> quotas 3.5 and 3.5, whole parts 3 and 3, one day left, equal remainders: to
#   the earlier cause (EV1, inserted first; the counted chain's; the employer's first event
#   began Jan 06, before Jan 07).  Employer 4 (compensable), contractor 3 (culpable).
#   Excusable 4: with excusable delays Jan 14, EoT 4, revised Jan 14; actual Jan 17:
#   culpable 3, damages 3 x 1000 = 3000; compensable 4, prolongation 4 x 200 = 800.
def concurrent_case(root, concurrency):
    write_case(
        root,
        activities=[task("A", 5), task("B", 5), finish_milestone()],
        links=[link("A", "F"), link("B", "F")],
        completion="2025-01-10",
        schedule=SEVEN_DAY,
        analysis={"concurrency": concurrency},
        commercial={"prolongation_cost_per_day": 200, "liquidated_damages_per_day": 1000},
        files={
            "events.csv": [
                event("EV1", "employer", "2025-01-06", "2025-01-12", "A", 7),
                event("EV2", "contractor", "2025-01-07", "2025-01-13", "B", 7),
            ],
            "asbuilt.csv": [
                record("A", "2025-01-06", "2025-01-17"),
                record("B", "2025-01-06", "2025-01-17"),
                record("F", "2025-01-17", "2025-01-17"),
            ],
        },
    )
    return load_case(root)


@pytest.mark.parametrize("method", ALL)
def test_concurrent_employer_and_contractor_time_not_money(tmp_path, method):
    result = assess(concurrent_case(tmp_path / "case", "time_not_money"), [method]).method(method)
    assert result.concurrency == "time_not_money"
    assert whole_works(result) == {
        "excusable": 7,
        "eot": 7,
        "revised": day("2025-01-17"),
        "compensable": 0,
        "prolongation": 0.0,
        "culpable": 0,
        "damages": 0.0,
        "concurrent": 7,
    }
    assert result.causation.explained_days == 7


@pytest.mark.parametrize("method", ALL)
def test_concurrent_employer_and_contractor_apportioned(tmp_path, method):
    result = assess(concurrent_case(tmp_path / "case", "apportion"), [method]).method(method)
    assert whole_works(result) == {
        "excusable": 4,
        "eot": 4,
        "revised": day("2025-01-14"),
        "compensable": 4,
        "prolongation": 800.0,
        "culpable": 3,
        "damages": 3000.0,
        "concurrent": 7,
    }
    table = result.causation.table
    assert int(table["culpable_days"].sum()) == 3


def test_concurrent_rows_name_each_other(tmp_path):
    result = assess(concurrent_case(tmp_path / "case", "time_not_money"), ["impacted", "windows"])
    rows = rows_by_event(result.method("impacted"))
    assert (int(rows.loc["EV1", "days"]), rows.loc["EV1", "concurrent_with"]) == (7, "EV2")
    assert (int(rows.loc["EV2", "days"]), int(rows.loc["EV2", "alone_days"]), rows.loc["EV2", "concurrent_with"]) == (
        0,
        7,
        "EV1",
    )
    assert rows.loc["EV1", "causes"] == "employer;contractor"
    windows = result.method("windows").causation.table
    assert len(windows) == 1  # the counted charge on A; B is its parallel path
    assert (windows["activities"].iloc[0], windows["event"].iloc[0]) == ("A", "EV1")
    assert windows["concurrent_with"].iloc[0] == "B (EV2)"


# =======================================================================================
# 5. A section with its own damages rate
#
# Baseline A5 -> M1 (section 1's milestone) and A5 -> B5 -> F:
#   A Jan 06-10, M1 Jan 10, B Jan 11-15, F Jan 15.
# sections.csv: S1 (M1, contract Jan 10, 500/day); S2 (F, contract Jan 15, rate blank: the
#   [commercial] rate, 1000/day).  Contract completion Jan 15.
# EV1 (contractor, Jan 06) adds 2 days to A; EV2 (employer, Jan 12) adds 3 days to B.
# As-built: A Jan 06-12, M1 Jan 12, B Jan 13-20, F Jan 20.
# Impacted (chronological: EV1, EV2): EV1 alone: A Jan 06-12 -> M1 +2, F +2; EV2 alone:
#   B Jan 11-18 -> F +3, M1 0.  Cumulative: EV1 +2 at F and at M1; EV2 +3 at F (B Jan
#   13-20), 0 at M1.  Alone equals increment for both: nothing concurrent.
# Windows: one window; the half-step finishes Jan 20: lateness A 12 - 10 = 2, B 20 - 15 = 5,
#   F 5: charges A 2 (EV1, contractor), B 3 (EV2, employer).  Section 1 (entitlement doc):
#   M1 moves Jan 10 -> Jan 12 (+2); the charges on M1 and what leads to it (A) are A's 2
#   culpable days: the 2 days split 2 : 0 : 0 -> culpable 2.
# Whole works: excusable 3, compensable 3; with excusable Jan 18, EoT 3, revised Jan 18;
#   actual Jan 20: culpable 2, damages 2 x 1000 = 2000.
# Section 1: excusable 0, EoT 0, revised Jan 10; actual Jan 12: culpable 2, damages
#   2 x 500 = 1000 (its own rate).  Section 2: as the whole works, 2 x 1000 = 2000.
# Collapsed: the whole works the same (but for the employer: B 5 days, F Jan 17: 3; but for
#   the contractor: A 5 days, B Jan 11-18, F Jan 18: 2; every event: 5 = D; overlap 0;
#   sole 3 and 2); a section is not assessed (entitlement doc).
def section_case(root):
    write_case(
        root,
        activities=[task("A", 5), finish_milestone("M1"), task("B", 5), finish_milestone()],
        links=[link("A", "M1"), link("A", "B"), link("B", "F")],
        completion="2025-01-15",
        schedule=SEVEN_DAY,
        commercial={"liquidated_damages_per_day": 1000},
        files={
            "events.csv": [
                event("EV1", "contractor", "2025-01-06", "2025-01-07", "A", 2),
                event("EV2", "employer", "2025-01-12", "2025-01-14", "B", 3),
            ],
            "sections.csv": [
                {
                    "section": "S1",
                    "name": "Car park",
                    "completion_activity": "M1",
                    "contract_completion": "2025-01-10",
                    "liquidated_damages_per_day": 500,
                },
                {
                    "section": "S2",
                    "name": "The rest",
                    "completion_activity": "F",
                    "contract_completion": "2025-01-15",
                    "liquidated_damages_per_day": "",
                },
            ],
            "asbuilt.csv": [
                record("A", "2025-01-06", "2025-01-12"),
                record("M1", "2025-01-12", "2025-01-12"),
                record("B", "2025-01-13", "2025-01-20"),
                record("F", "2025-01-20", "2025-01-20"),
            ],
        },
    )
    return load_case(root)


@pytest.mark.parametrize("method", ["windows", "impacted", "tia"])
def test_section_with_its_own_damages_rate(tmp_path, method):
    result = assess(section_case(tmp_path / "case"), [method]).method(method)
    assert whole_works(result) == {
        "excusable": 3,
        "eot": 3,
        "revised": day("2025-01-18"),
        "compensable": 3,
        "prolongation": 0.0,
        "culpable": 2,
        "damages": 2000.0,
        "concurrent": 0,
    }
    sections = result.sections.set_index("section")
    one = sections.loc["S1"]
    assert (one["planned_completion"], one["completion_in_force"], one["actual_completion"]) == (
        day("2025-01-10"),
        day("2025-01-10"),
        day("2025-01-12"),
    )
    assert (one["excusable_days"], one["eot_days"], one["revised_completion"]) == (0, 0, day("2025-01-10"))
    assert (one["ld_days"], one["liquidated_damages_per_day"], one["ld_exposure"]) == (2, 500.0, 1000.0)
    two = sections.loc["S2"]
    assert (two["eot_days"], two["ld_days"], two["liquidated_damages_per_day"], two["ld_exposure"]) == (
        3,
        2,
        1000.0,
        2000.0,
    )


def test_collapsed_assesses_the_whole_works_not_the_sections(tmp_path):
    result = assess(section_case(tmp_path / "case"), ["collapsed"]).method("collapsed")
    assert whole_works(result) == {
        "excusable": 3,
        "eot": 3,
        "revised": day("2025-01-18"),
        "compensable": 3,
        "prolongation": 0.0,
        "culpable": 2,
        "damages": 2000.0,
        "concurrent": 0,
    }
    one = result.sections.set_index("section").loc["S1"]
    assert one["eot_days"] is None and one["ld_exposure"] is None
    assert one["actual_completion"] == day("2025-01-12")
    assert "the whole works only" in one["note"]


# =======================================================================================
# 6. An extension already granted
#
# Baseline A5 -> M1 and A5 -> B5 -> F: A Jan 06-10, M1 Jan 10, B Jan 11-15, F Jan 15 = contract
#   completion; section S1 marked by M1 with its own contract date Jan 10 (rate 300).  EV1
#   (employer, Jan 06) adds 7 days to A; as-built A Jan 06-17, M1 Jan 17, B Jan 18-22, F Jan 22.
# extensions_granted.csv: X1 5 days for the whole works (no section); X2 10 days for S1.
# Whole works: in force Jan 15 + 5 = Jan 20 (X2 is S1's only); with excusable Jan 15 + 7
#   = Jan 22; EoT = Jan 22 - Jan 20 = 2 (not 7: 5 were granted); revised Jan 22; actual
#   Jan 22: culpable 0.
# S1: in force Jan 10 + 10 = Jan 20; M1 traced: A's 7 days (EV1) -> with excusable Jan 17;
#   EoT max(0, Jan 17 - Jan 20) = 0; revised Jan 20; actual Jan 17: culpable 0.
# A second section S2 marked by F, the project's completion activity, is the whole of the works
#   (case format v2): a grant naming it (X3, 3 days) counts for the whole works, and its row
#   is the whole works'.
def granted_case(root, whole_works_grant=False):
    grants = [
        {"id": "X1", "granted_on": "2025-01-20", "days": 5, "section": "", "events": "EV1", "reason": "Late access"},
        {
            "id": "X2",
            "granted_on": "2025-01-21",
            "days": 10,
            "section": "S1",
            "events": "EV1",
            "reason": "Late access, the section",
        },
    ]
    if whole_works_grant:
        grants.append(
            {
                "id": "X3",
                "granted_on": "2025-01-22",
                "days": 3,
                "section": "S2",
                "events": "EV1",
                "reason": "Late access, the whole of the works",
            }
        )
    write_case(
        root,
        activities=[task("A", 5), finish_milestone("M1"), task("B", 5), finish_milestone()],
        links=[link("A", "M1"), link("A", "B"), link("B", "F")],
        completion="2025-01-15",
        schedule=SEVEN_DAY,
        commercial={"liquidated_damages_per_day": 1000},
        files={
            "events.csv": [event("EV1", "employer", "2025-01-06", "2025-01-12", "A", 7)],
            "sections.csv": [
                {
                    "section": "S1",
                    "name": "Car park",
                    "completion_activity": "M1",
                    "contract_completion": "2025-01-10",
                    "liquidated_damages_per_day": 300,
                },
                {
                    "section": "S2",
                    "name": "The whole of the works",
                    "completion_activity": "F",
                    "contract_completion": "2025-01-15",
                    "liquidated_damages_per_day": 1000,
                },
            ],
            "extensions_granted.csv": grants,
            "asbuilt.csv": [
                record("A", "2025-01-06", "2025-01-17"),
                record("M1", "2025-01-17", "2025-01-17"),
                record("B", "2025-01-18", "2025-01-22"),
                record("F", "2025-01-22", "2025-01-22"),
            ],
        },
    )
    return load_case(root)


@pytest.mark.parametrize("method", ALL)
def test_an_extension_already_granted(tmp_path, method):
    case = granted_case(tmp_path / "case")
    assert completion_in_force(case) == (day("2025-01-15"), 5, day("2025-01-20"))
    assert completion_in_force(case, "S1") == (day("2025-01-10"), 10, day("2025-01-20"))
    assert completion_in_force(case, at=day("2025-01-19")) == (day("2025-01-15"), 0, day("2025-01-15"))
    result = assess(case, [method]).method(method)
    assert (result.granted_days, result.completion_in_force) == (5, day("2025-01-20"))
    assert (result.excusable_days, result.eot_days, result.revised_completion, result.ld_days) == (
        7,
        2,
        day("2025-01-22"),
        0,
    )
    assert list(result.grants["grant"]) == ["X1"]
    sections = result.sections.set_index("section")
    whole = sections.loc["S2"]
    assert bool(whole["whole_works"]) and (whole["eot_days"], whole["revised_completion"]) == (2, day("2025-01-22"))
    if method != "collapsed":
        one = sections.loc["S1"]
        assert (
            one["granted_days"],
            one["completion_in_force"],
            one["eot_days"],
            one["revised_completion"],
            one["ld_days"],
        ) == (10, day("2025-01-20"), 0, day("2025-01-20"), 0)


@pytest.mark.parametrize("method", ALL)
def test_a_grant_for_the_whole_works_section_is_the_whole_works(tmp_path, method):
    # X3 names S2, the whole of the works: in force Jan 15 + 5 + 3 = Jan 23; with excusable
    #   Jan 22: EoT 0, revised Jan 23; S2's row is the whole works' (they never differ).
    case = granted_case(tmp_path / "case", whole_works_grant=True)
    assert completion_in_force(case) == (day("2025-01-15"), 8, day("2025-01-23"))
    assert completion_in_force(case, "S2") == completion_in_force(case)
    result = assess(case, [method]).method(method)
    assert (result.eot_days, result.revised_completion) == (0, day("2025-01-23"))
    assert list(result.grants["grant"]) == ["X1", "X3"]
    whole = result.sections.set_index("section").loc["S2"]
    for column in (
        "granted_days",
        "completion_in_force",
        "excusable_days",
        "eot_days",
        "revised_completion",
        "ld_days",
        "ld_exposure",
    ):
        assert whole[column] == getattr(result, column), column


# =======================================================================================
# 7. A cap on damages
#
# Baseline A5 -> F: F Jan 10 = contract completion.  EV1 (contractor, Jan 06) adds 9 days to
#   A; as-built A Jan 06-19, F Jan 19.  Damages 1000/day, cap 6000.  Section S1 (F, Jan 10,
#   500/day).
# Excusable 0, EoT 0, revised Jan 10; actual Jan 19: culpable 9.  Whole works 9 x 1000 =
#   9000 > 6000: 6000, capped.  S1: 9 x 500 = 4500 < 6000: 4500, not capped.
def capped_case(root, cap):
    # S1 is marked by its own milestone M1 (after A, beside F; F, last in the file, is the
    # completion activity on the tie), so that it is a section of its own.
    write_case(
        root,
        activities=[task("A", 5), finish_milestone("M1"), finish_milestone()],
        links=[link("A", "M1"), link("A", "F")],
        completion="2025-01-10",
        schedule=SEVEN_DAY,
        commercial={"liquidated_damages_per_day": 1000, "liquidated_damages_cap": cap},
        files={
            "events.csv": [event("EV1", "contractor", "2025-01-06", "2025-01-14", "A", 9)],
            "sections.csv": [
                {
                    "section": "S1",
                    "name": "All",
                    "completion_activity": "M1",
                    "contract_completion": "2025-01-10",
                    "liquidated_damages_per_day": 500,
                }
            ],
            "asbuilt.csv": [
                record("A", "2025-01-06", "2025-01-19"),
                record("M1", "2025-01-19", "2025-01-19"),
                record("F", "2025-01-19", "2025-01-19"),
            ],
        },
    )
    return load_case(root)


@pytest.mark.parametrize("method", ["windows", "impacted", "collapsed"])
def test_damages_are_capped(tmp_path, method):
    result = assess(capped_case(tmp_path / "case", 6000), [method]).method(method)
    assert (result.eot_days, result.ld_days, result.culpable_delay_days) == (0, 9, 9)
    assert (result.ld_exposure, result.ld_capped) == (6000.0, True)
    if method != "collapsed":
        one = result.sections.set_index("section").loc["S1"]
        assert (one["ld_days"], one["ld_exposure"], one["ld_capped"]) == (9, 4500.0, False)


def test_a_baseline_late_against_the_contract_gives_no_extension_by_itself(tmp_path):
    # Baseline A5 -> F: F Jan 10, but the contract completion is Jan 07: the programme itself
    # overran by 3 days.  EV1 (employer, Jan 06) adds 2 days to A; as-built A Jan 06-12, F
    # Jan 12.  Excusable 2: with excusable delays Jan 12; Jan 12 - Jan 07 = 5, but the
    # extension is never more than the excusable days (entitlement doc): EoT 2, revised
    # Jan 09; actual Jan 12: culpable 3 (the baseline's own overrun), 3 x 1000 = 3000.
    write_case(
        tmp_path / "case",
        activities=[task("A", 5), finish_milestone()],
        links=[link("A", "F")],
        completion="2025-01-07",
        schedule=SEVEN_DAY,
        commercial={"liquidated_damages_per_day": 1000},
        files={
            "events.csv": [event("EV1", "employer", "2025-01-06", "2025-01-07", "A", 2)],
            "asbuilt.csv": [record("A", "2025-01-06", "2025-01-12"), record("F", "2025-01-12", "2025-01-12")],
        },
    )
    result = assess(load_case(tmp_path / "case"), ["impacted"]).method("impacted")
    assert result.completion_with_excusable_delays == day("2025-01-12")
    assert (result.eot_days, result.revised_completion, result.ld_days, result.ld_exposure) == (
        2,
        day("2025-01-09"),
        3,
        3000.0,
    )


def test_a_cap_of_zero_means_no_cap(tmp_path):
    # 9 culpable days x 1000 = 9000 (case-format: liquidated_damages_cap = 0 is "no cap").
    result = assess(capped_case(tmp_path / "case", 0), ["impacted"]).method("impacted")
    assert (result.ld_exposure, result.ld_capped) == (9000.0, False)


# =======================================================================================
# 8. Prolongation cost across two rate periods
#
# prolongation_rates.csv: Jan 01-31 100/day, Feb 01-28 200/day; flat rate 50/day outside.
# (a) Impacted.  Baseline A5 -> B5 -> C5 -> F: F Jan 20.  Employer events on the one path,
#     each dated by its start (entitlement doc): EV1 Jan 06 +2 on A, EV2 Feb 03 +3 on B, EV3
#     Mar 10 +1 on C.  Serial: alone = increment = 2, 3, 1; all compensable (6 days).
#     Cost 2 x 100 (January) + 3 x 200 (February) + 1 x 50 (no period: flat) = 850.
# (b) Windows.  Baseline A20 -> B20 -> F: A Jan 06-25, B Jan 26-Feb 14, F Feb 14.
#     Update U1 (data date Jan 28, the day after A finished): A done Jan 06-27 (2 days late;
#     EV1 employer, Jan 06, names A).  U1's forecast: B Jan 28-Feb 16 (after A and not
#     before the data date, rule 3), F Feb 16.  As-built: B Jan 28-Feb 19 (EV2 employer,
#     Feb 03, names B), F Feb 19.
#     Window 1 (baseline -> U1, last day Jan 27): A's lateness 27 - 25 = 2, B's 16 - 14 = 2:
#       charges A 2, B 0: 2 days at 100.  EV2 starts after Jan 27: it does not match here.
#     Window 2 (U1 -> as-built, data date Feb 20, last day Feb 19): A complete at U1 (the
#       trace stops there, zero); B's lateness 19 - 16 = 3: 3 days at 200.
#     Cost 2 x 100 + 3 x 200 = 800; compensable 5.
RATES = [
    {"from": "2025-01-01", "to": "2025-01-31", "cost_per_day": 100},
    {"from": "2025-02-01", "to": "2025-02-28", "cost_per_day": 200},
]


def test_prolongation_across_two_rate_periods_impacted(tmp_path):
    write_case(
        tmp_path / "case",
        activities=[task("A", 5), task("B", 5), task("C", 5), finish_milestone()],
        links=[link("A", "B"), link("B", "C"), link("C", "F")],
        completion="2025-01-20",
        schedule=SEVEN_DAY,
        commercial={"prolongation_cost_per_day": 50},
        files={
            "events.csv": [
                event("EV1", "employer", "2025-01-06", "2025-01-07", "A", 2),
                event("EV2", "employer", "2025-02-03", "2025-02-05", "B", 3),
                event("EV3", "employer", "2025-03-10", "2025-03-10", "C", 1),
            ],
            "prolongation_rates.csv": RATES,
        },
    )
    case = load_case(tmp_path / "case")
    assert [prolongation_rate(case, d) for d in ("2025-01-06", "2025-02-03", "2025-03-10")] == [100.0, 200.0, 50.0]
    result = assess(case, ["impacted"]).method("impacted")
    assert (result.compensable_days, result.prolongation_cost) == (6, 850.0)


def test_prolongation_across_two_rate_periods_windows(tmp_path):
    a, b, f = task("A", 20), task("B", 20), finish_milestone()
    update = [
        {**a, "actual_start": "2025-01-06", "actual_finish": "2025-01-27"},
        {**b, "actual_start": None, "actual_finish": None},
        {**f, "actual_start": None, "actual_finish": None},
    ]
    write_case(
        tmp_path / "case",
        activities=[a, b, f],
        links=[link("A", "B"), link("B", "F")],
        completion="2025-02-14",
        schedule=SEVEN_DAY,
        commercial={"prolongation_cost_per_day": 50},
        snapshots={"U1": {"data_date": "2025-01-28", "activities": update}},
        files={
            "events.csv": [
                event("EV1", "employer", "2025-01-06", "2025-01-27", "A", 2),
                event("EV2", "employer", "2025-02-03", "2025-02-19", "B", 3),
            ],
            "prolongation_rates.csv": RATES,
            "asbuilt.csv": [
                record("A", "2025-01-06", "2025-01-27"),
                record("B", "2025-01-28", "2025-02-19"),
                record("F", "2025-02-19", "2025-02-19"),
            ],
        },
    )
    result = assess(load_case(tmp_path / "case"), ["windows"]).method("windows")
    table = result.causation.table
    assert list(zip(table["window"].astype(int), table["activities"], table["days"].astype(int))) == [
        (1, "A", 2),
        (2, "B", 3),
    ]
    assert list(table["arose_on"].dt.date) == [day("2025-01-27"), day("2025-02-19")]
    assert (result.compensable_days, result.prolongation_cost) == (5, 800.0)


# =======================================================================================
# 9. Windows: a revision charge takes the parties of the events naming its activities
#
# Baseline A5 -> B5 -> F: A Jan 06-10, B Jan 11-15, F Jan 15 = contract completion.
# Update U1 (data date Jan 11): A done Jan 06-10, on time; B re-planned at 8 days.
#   Half-step: the baseline with A's progress: F Jan 15, progress 0.  Revisions (windows
#   doc): durations (B 5 -> 8): B Jan 11-18, F Jan 18: +3.
#   With EV1 (employer, Jan 08, names B): the revision's causes are employer ->
#   compensable 3, EoT 3.  Without an event: the unexplained-risk setting, contractor ->
#   culpable 3, EoT 0.
#   The forecast completion compared (no as-built record) is U1's, Jan 18.
@pytest.mark.parametrize(
    "events, expected",
    [
        ([event("EV1", "employer", "2025-01-08", "2025-01-09", "B", 3)], ("employer", "compensable", 3, 3, 0)),
        ([], ("contractor", "culpable", 0, 0, 3)),
    ],
)
def test_windows_revision_charge_parties(tmp_path, events, expected):
    a, b, f = task("A", 5), task("B", 5), finish_milestone()
    update = [{**a, "actual_start": "2025-01-06", "actual_finish": "2025-01-10"}, {**b, "duration": 8}, {**f}]
    files = {"events.csv": events} if events else {}
    write_case(
        tmp_path / "case",
        activities=[a, b, f],
        links=[link("A", "B"), link("B", "F")],
        completion="2025-01-15",
        schedule=SEVEN_DAY,
        snapshots={"U1": {"data_date": "2025-01-11", "activities": update}},
        files=files,
    )
    result = assess(load_case(tmp_path / "case"), ["windows"]).method("windows")
    table = result.causation.table
    assert len(table) == 1
    row = table.iloc[0]
    assert (row["step"], row["activities"], int(row["days"])) == (
        "window 1 (baseline to U1): revision (durations)",
        "B",
        3,
    )
    party, classification, eot, compensable, culpable = expected
    assert (row["party"], row["classification"]) == (party, classification)
    assert (result.eot_days, result.compensable_days, result.ld_days) == (eot, compensable, culpable)
    assert result.actual_completion == day("2025-01-18")


# =======================================================================================
# 10. Collapsed: delay that no event explains is the contractor's
#
# Baseline A5 -> F: F Jan 10 = contract completion.  As-built A Jan 06-15 (10 days), F Jan
#   15.  EV1 (employer, Jan 06) adds 3 days to A: the register explains 3 of the 5.
# Collapsed: but for EV1, A 7 days, F Jan 12: 3 earlier (employer and every event).  D = 5:
#   the employer's sole days 3, concurrent 0, unexplained 5 - 3 = 2 (contractor: culpable).
#   EoT 3, revised Jan 13; actual Jan 15: culpable 2.
# Impacted: EV1 +3 (its alone and increment), and the residual: the actual Jan 15 less the
#   impacted Jan 13 = 2 days no event explains (the unexplained-risk setting, contractor):
#   culpable delay 2 in the table too (impacted doc), and the actual completion is Jan 15:
#   culpable days 2.
@pytest.mark.parametrize("method", ["collapsed", "impacted"])
def test_delay_no_event_explains(tmp_path, method):
    write_case(
        tmp_path / "case",
        activities=[task("A", 5), finish_milestone()],
        links=[link("A", "F")],
        completion="2025-01-10",
        schedule=SEVEN_DAY,
        commercial={"liquidated_damages_per_day": 100},
        files={
            "events.csv": [event("EV1", "employer", "2025-01-06", "2025-01-08", "A", 3)],
            "asbuilt.csv": [record("A", "2025-01-06", "2025-01-15"), record("F", "2025-01-15", "2025-01-15")],
        },
    )
    result = assess(load_case(tmp_path / "case"), [method]).method(method)
    assert (result.excusable_days, result.eot_days, result.revised_completion) == (3, 3, day("2025-01-13"))
    assert (result.ld_days, result.ld_exposure) == (2, 200.0)
    assert result.culpable_delay_days == 2
    table = result.causation.table
    if method == "collapsed":
        assert int(table.set_index("step").loc["not taken out by any event", "culpable_days"]) == 2
    else:
        (residual,) = table[table["basis"] == "residual"].itertuples()
        assert (residual.party, int(residual.days), int(residual.culpable_days)) == ("unexplained", 2, 2)


# =======================================================================================
# 11. Reconciliation
def test_broken_reconciliation_raises(tmp_path, monkeypatch):
    # Case 5: impacted increments 2 (EV1) and 3 (EV2) explain the total impact 5.  Dropping
    # the last row of the sequence leaves 2 classified days against 5: the table must not
    # be accepted (DESIGN.md: a broken reconciliation raises an error).
    case = section_case(tmp_path / "case")
    original = causation_module.sequence_rows
    monkeypatch.setattr(causation_module, "sequence_rows", lambda *a, **k: original(*a, **k)[:-1])
    with pytest.raises(ReconciliationError) as error:
        assess(case, ["impacted"])
    assert error.value.figures["classified days"] == 2
    assert error.value.figures["delay explained"] == 5
    assert "impacted" in error.value.where


def test_a_row_that_does_not_split_raises():
    # 4 days split into 3 excusable + 0 culpable: one day is lost.
    table = pd.DataFrame(
        [{"step": "a step", "days": 4, "excusable_days": 3, "compensable_days": 0, "culpable_days": 0}]
    )
    with pytest.raises(ReconciliationError) as error:
        reconcile(table, 4, "a table")
    assert error.value.figures == {"excusable + culpable": 3, "days": 4}


# =======================================================================================
# 12. The classification rule and the largest remainder method
def test_classification_of_a_day_by_its_causes():
    # Causation doc / SCL core principles 9 and 10 as recalled: excusable when any cause is employer
    # or neutral risk; compensable only when every cause is employer risk; else culpable.
    one = {"employer": (1, 1, 0), "neutral": (1, 0, 0), "contractor": (0, 0, 1)}
    for party, (excusable, compensable, culpable) in one.items():
        split = classify_days([(party, 1)], 1, "time_not_money")
        assert (split["excusable"], split["compensable"], split["culpable"]) == (excusable, compensable, culpable)
    for causes, expected in [
        (["employer", "contractor"], (1, 0, 0)),
        (["employer", "neutral"], (1, 0, 0)),
        (["neutral", "contractor"], (1, 0, 0)),
        (["employer", "employer"], (1, 1, 0)),
        (["contractor", "contractor"], (0, 0, 1)),
    ]:
        split = classify_days([(p, 1) for p in causes], 1, "time_not_money")
        assert (split["excusable"], split["compensable"], split["culpable"]) == expected, causes
    with pytest.raises(ValueError):  # days always have a cause: the methods name the unexplained risk
        classify_days([], 2, "time_not_money")


def test_largest_remainder_worked_examples():
    # 7 days 1:1 -> quotas 3.5, 3.5 -> 3 + 3, one day left, tie to the earlier: [4, 3].
    assert largest_remainder(7, [1, 1]) == [4, 3]
    # 4 days 7:4 -> quotas 28/11 = 2.545 and 16/11 = 1.455 -> 2 + 1, the day to 0.545: [3, 1].
    assert largest_remainder(4, [7, 4]) == [3, 1]
    # 10 days 1:1:1 -> 3.33 each -> 3 + 3 + 3, one day left, to the first of three ties.
    assert largest_remainder(10, [1, 1, 1]) == [4, 3, 3]
    # A gain splits as its size: -7 -> [-4, -3]; all-zero weights share equally.
    assert largest_remainder(-7, [1, 1]) == [-4, -3]
    assert largest_remainder(6, [0, 0]) == [3, 3]


@settings(max_examples=200, deadline=None)
@given(
    st.integers(min_value=-200, max_value=200), st.lists(st.integers(min_value=0, max_value=50), min_size=1, max_size=6)
)
def test_largest_remainder_keeps_the_total_and_the_quota(total, weights):
    # Balinski and Young (1982), as recalled: Hamilton's method always satisfies quota: each
    # share is its exact quota rounded down or up, and the shares add up to the whole.
    shares = largest_remainder(total, weights)
    assert sum(shares) == total
    whole = sum(weights) or len(weights)
    for weight, share in zip(weights, shares):
        quota = Fraction(abs(total)) * Fraction(weight if sum(weights) else 1, whole)
        assert int(quota) <= abs(share) <= int(quota) + 1


# =======================================================================================
# 13. The command
def test_command_json_shape(tmp_path):
    critical_case(tmp_path / "case")
    run = CliRunner().invoke(entitlement_command, [str(tmp_path / "case"), "--format", "json"])
    assert run.exit_code == 0, run.output
    data = json.loads(run.output)
    assert [m["method"] for m in data["methods"]] == list(ALL)
    required = {
        "method",
        "eot_days",
        "revised_completion",
        "compensable_days",
        "prolongation_cost",
        "ld_days",
        "ld_exposure",
        "concurrent_days",
        "sections",
    }
    for method in data["methods"]:
        assert required <= set(method)
        # Case 1 worked by hand: EoT 3, revised 2025-01-18, compensable 3 at 1000/day.
        assert (
            method["eot_days"],
            method["revised_completion"],
            method["compensable_days"],
            method["prolongation_cost"],
            method["ld_days"],
            method["ld_exposure"],
        ) == (3, "2025-01-18", 3, 3000.0, 0, 0.0)


def test_command_one_method_as_a_table(tmp_path):
    concurrent_case(tmp_path / "case", "apportion")
    run = CliRunner().invoke(entitlement_command, [str(tmp_path / "case"), "--method", "impacted"])
    assert run.exit_code == 0, run.output
    assert "Entitlement per method" in run.output and "apportion" in run.output
    assert "3,000.00" in run.output  # case 4, apportioned: 3 culpable days x 1000


def test_command_all_leaves_out_what_the_case_cannot_support(tmp_path):
    float_case(tmp_path / "case", [event("EV2", "employer", "2025-01-08", "2025-01-09", "B", 2)])
    run = CliRunner().invoke(entitlement_command, [str(tmp_path / "case"), "--format", "json"])
    assert run.exit_code == 0, run.output
    assert [m["method"] for m in json.loads(run.output)["methods"]] == ["impacted", "tia"]


def test_command_collapsed_without_an_as_built_record_is_an_input_error(tmp_path):
    float_case(tmp_path / "case", [event("EV2", "employer", "2025-01-08", "2025-01-09", "B", 2)])
    run = CliRunner().invoke(entitlement_command, [str(tmp_path / "case"), "--method", "collapsed"])
    assert run.exit_code == 2
    assert "asbuilt.csv" in run.output and "Traceback" not in run.output


# =======================================================================================
# 14. Properties on random synthetic cases (delay.synth) with a random event register
#
# Consequences of the rules above that hold on any case (causation doc, entitlement doc):
# - every table adds up: excusable + culpable = days on each row, and the days sum to the
#   delay the method explains;
# - on a row of delay (days >= 0): 0 <= compensable <= excusable <= days, and no more days
#   are concurrent than the row has;
# - the entitlement follows its formulae: EoT >= 0, revised = in force + EoT, culpable days
#   = max(0, actual - revised), damages never above the cap;
# - apportioning concurrent days instead of "time but not money" can only move concurrent
#   days from excusable to culpable and from excusable-only to compensable: on a row of
#   delay the excusable days do not rise and the compensable days do not fall (on a row of
#   gain, negative days, the reverse), and the days themselves do not change.
# The collapsed as-built is left out of an example when the method itself refuses it (its
# own check that no but-for completion is later than the modelled one); its properties are
# tested with the method.
def synthetic_case_with_events(folder, activities, updates, seed):
    import random

    from casewriter import write_csv

    from delay.synth import synthesise

    root = synthesise(folder / "case", activities, updates=updates, seed=seed)
    baseline = pd.read_csv(root / "snapshots" / "baseline" / "activities.csv", dtype=str, keep_default_na=False)
    rng = random.Random(seed)
    tasks = [a for a, d in zip(baseline["id"], baseline["duration"]) if int(d) > 0]
    start = dt.date(2026, 1, 5)  # delay.synth.START
    events = []
    for k in range(rng.randint(2, 6)):
        begins = start + dt.timedelta(days=rng.randint(0, 120))
        events.append(
            event(
                f"EV{k + 1}",
                rng.choice(["employer", "contractor", "neutral"]),
                begins.isoformat(),
                (begins + dt.timedelta(days=rng.randint(0, 10))).isoformat(),
                ";".join(rng.sample(tasks, rng.randint(1, 2))),
                rng.randint(1, 15),
            )
        )
    write_csv(root / "events.csv", events)
    milestones = [a for a, d in zip(baseline["id"], baseline["duration"]) if int(d) == 0]
    write_csv(
        root / "sections.csv",
        [
            {
                "section": f"S{i + 1}",
                "name": f"Section {i + 1}",
                "completion_activity": m,
                "contract_completion": (start + dt.timedelta(days=60 * (i + 1))).isoformat(),
                "liquidated_damages_per_day": 100 * (i + 1),
            }
            for i, m in enumerate(milestones[-2:])
        ],
    )
    text = (root / "case.toml").read_text(encoding="utf-8")
    (root / "case.toml").write_text(
        text + "\n[commercial]\nliquidated_damages_per_day = 250\n"
        "liquidated_damages_cap = 5000\nprolongation_cost_per_day = 40\n",
        encoding="utf-8",
    )
    return load_case(root)


@settings(max_examples=4, deadline=None)
@given(activities=st.integers(30, 90), updates=st.integers(1, 3), seed=st.integers(0, 10_000))
def test_properties_on_synthetic_cases(activities, updates, seed):
    import tempfile
    from pathlib import Path

    from delay.entitlement import _run_method

    with tempfile.TemporaryDirectory(prefix="entitlement-case-") as folder:
        case = synthetic_case_with_events(Path(folder), activities, updates, seed)
        methods = list(ALL)
        results = {}
        for method in ALL:
            results[method] = _run_method(case, method)
        plain = assess(case, methods, results, concurrency="time_not_money")
        split = assess(case, methods, results, concurrency="apportion")
        for method in methods:
            for result in (plain.method(method), split.method(method)):
                table = result.causation.table
                assert ((table["excusable_days"] + table["culpable_days"]) == table["days"]).all(), method
                assert int(table["days"].sum()) == result.causation.explained_days, method
                delay = table[table["days"] >= 0]
                assert (
                    (delay["compensable_days"] >= 0)
                    & (delay["compensable_days"] <= delay["excusable_days"])
                    & (delay["excusable_days"] <= delay["days"])
                    & (delay["concurrent_days"] <= delay["days"])
                ).all(), method
                assert result.eot_days >= 0
                assert result.revised_completion == result.completion_in_force + dt.timedelta(days=result.eot_days)
                assert result.ld_days == max(0, (result.actual_completion - result.revised_completion).days)
                assert result.ld_exposure <= 5000.0
                for section in result.sections.to_dict("records"):
                    if section["eot_days"] is not None:
                        assert section["eot_days"] >= 0 and section["ld_exposure"] <= 5000.0
            a, b = plain.method(method).causation.table, split.method(method).causation.table
            assert list(a["days"]) == list(b["days"]), method
            sign = a["days"].map(lambda d: 1 if d >= 0 else -1)
            assert (sign * b["excusable_days"] <= sign * a["excusable_days"]).all(), method
            assert (sign * b["compensable_days"] >= sign * a["compensable_days"]).all(), method


# =======================================================================================
# 15. Concurrency needs time (causation doc; AACE RP 29R-03 section 4.2 and the SCL
#     Protocol's guidance on concurrent delay, as recalled)
#
# Baseline A5 -> F and B5 -> F (7-day): A, B Jan 06-10, F Jan 10 = contract completion.
# EV1 (employer) adds 4 days to A; EV2 (contractor) adds 6 days to B.  Impacted as-planned
#   (prospective: no record after the baseline): alone 4 and 6; chronological run EV1 +4
#   (positions 1-4), EV2 +2 (positions 5-6).
# (a) EV1 Jan 06-08, EV2 Feb 10-12: their periods do not overlap, so no day is concurrent,
#     however far EV2 alone would reach: positions 1-4 are the employer's alone (compensable
#     4), 5-6 the contractor's (culpable 2), under either rule.
# (b) EV2 Jan 07-09 overlaps EV1, and EV2 alone (6) reaches positions 1-4: those 4 days are
#     concurrent.  time_not_money: excusable 4, compensable 0; 5-6 culpable 2.  apportion: the
#     4 days split 4 : 6 (impacts alone) by largest remainder: quotas 1.6 and 2.4, whole parts
#     1 and 2, the day left to the larger remainder (0.6, EV1): employer 2 (compensable),
#     contractor 2 (culpable); with 5-6: excusable 2, compensable 2, culpable delay 4.
@pytest.mark.parametrize(
    "start, finish, rule, expected",
    [
        ("2025-02-10", "2025-02-12", "time_not_money", (4, 4, 2, 0)),
        ("2025-02-10", "2025-02-12", "apportion", (4, 4, 2, 0)),
        ("2025-01-07", "2025-01-09", "time_not_money", (4, 0, 2, 4)),
        ("2025-01-07", "2025-01-09", "apportion", (2, 2, 4, 4)),
    ],
)
def test_concurrency_needs_the_periods_to_overlap(tmp_path, start, finish, rule, expected):
    write_case(
        tmp_path / "case",
        activities=[task("A", 5), task("B", 5), finish_milestone()],
        links=[link("A", "F"), link("B", "F")],
        completion="2025-01-10",
        schedule=SEVEN_DAY,
        analysis={"concurrency": rule},
        files={
            "events.csv": [
                event("EV1", "employer", "2025-01-06", "2025-01-08", "A", 4),
                event("EV2", "contractor", start, finish, "B", 6),
            ]
        },
    )
    result = assess(load_case(tmp_path / "case"), ["impacted"]).method("impacted")
    assert (
        result.excusable_days,
        result.compensable_days,
        result.culpable_delay_days,
        result.concurrent_days,
    ) == expected
    assert result.causation.explained_days == 6
