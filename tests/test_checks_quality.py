"""The fourteen-point schedule assessment, each metric on a case built by hand.

Source of every threshold and denominator: DCMA-EA PAM 200.1, *Earned Value Management
System (EVMS) Program Analysis Pamphlet*, October 2012, section 4 (the fourteen-point
schedule assessment), as recalled from memory - not copied from the document. Where the
document leaves a choice, the choice is the one stated in delay/checks/quality.py and is
named beside the check. Day arithmetic is checked against numpy's business-day functions
(``numpy.busday_offset``, ``numpy.busday_count``) for the five-day calendar.

5-day calendar, January 2025 (2025-01-06 is a Monday), work day k:
    k:  0  1  2  3  4 | 5  6  7  8  9 | 10 11 12 13 14 | 15 16 17 18 19
 date: 06 07 08 09 10 |13 14 15 16 17 | 20 21 22 23 24 | 27 28 29 30 31
"""

from __future__ import annotations

import datetime as dt

import numpy as np
import pytest
from casewriter import write_case

from delay.case import load_case
from delay.checks import contract_completion_in_force, metric_list, quality_metrics
from delay.checks.quality import METRIC_COLUMNS, METRIC_KEYS, invalid_date_mask
from delay.convert import NO_DAY
from delay.cpm import COMPLETE, IN_PROGRESS, NOT_STARTED


def task(activity_id, duration, **extra):
    return {"id": activity_id, "name": f"Work {activity_id}", "duration": duration, **extra}


def start_milestone(activity_id="START", **extra):
    return {"id": activity_id, "name": "Start", "duration": 0, "kind": "start_milestone", **extra}


def finish_milestone(activity_id="FINISH", **extra):
    return {"id": activity_id, "name": "Finish", "duration": 0, "kind": "finish_milestone", **extra}


def link(pred, succ, kind="FS", lag=0):
    return {"pred": pred, "succ": succ, "type": kind, "lag": lag}


def chain(count, duration, prefix="T"):
    """START -> T01 -> ... -> Tnn -> FINISH: the activities and links."""
    ids = [f"{prefix}{i:02d}" for i in range(1, count + 1)]
    activities = [start_milestone()] + [task(i, duration) for i in ids] + [finish_milestone()]
    order = ["START"] + ids + ["FINISH"]
    links = [link(a, b) for a, b in zip(order, order[1:])]
    return activities, links


def metrics_of(root, snapshot="baseline"):
    return {m.key: m for m in metric_list(load_case(root), snapshot)}


def replace_link(links, pred, succ, **changes):
    return [dict(lk, **changes) if (lk["pred"], lk["succ"]) == (pred, succ) else lk for lk in links]


# -- 1 logic: at most 5 % of incomplete tasks without a predecessor or a successor -----------


def test_logic_passes_at_one_in_twenty_one(tmp_path):
    # 20 chained tasks plus X, which follows T01 and has no successor. Incomplete tasks
    # (milestones left out, DCMA-EA PAM 200.1 (2012) section 4, as recalled): 21.
    # Missing logic: X only. 1 / 21 = 4.76 % <= 5 %: pass.
    activities, links = chain(20, 1)
    activities.append(task("X", 1))
    links.append(link("T01", "X"))
    logic = metrics_of(write_case(tmp_path, activities=activities, links=links))["logic"]
    assert (logic.count, logic.denominator, logic.percent) == (1, 21, 4.76)
    assert logic.passed is True
    assert logic.activities == ("X",)
    assert logic.threshold == "<= 5%"


def test_logic_fails_at_two_in_twenty_two(tmp_path):
    # As above, plus Y with no predecessor (Y -> FINISH): 2 / 22 = 9.09 % > 5 %: fail.
    activities, links = chain(20, 1)
    activities += [task("X", 1), task("Y", 1)]
    links += [link("T01", "X"), link("Y", "FINISH")]
    logic = metrics_of(write_case(tmp_path, activities=activities, links=links))["logic"]
    assert (logic.count, logic.denominator, logic.percent) == (2, 22, 9.09)
    assert logic.passed is False
    assert set(logic.activities) == {"X", "Y"}


# -- 2-4 leads (none), lags (at most 5 %), relationship types (at least 90 % FS) -------------


def relationship_case(extra_start_to_start=False):
    # Links into incomplete tasks (the assessment's "predecessor relationships of
    # incomplete tasks", as recalled): START->T01, T01->T02 ... T19->T20: 20 links.
    # T20->FINISH runs into a milestone and is not counted, although it carries a lag.
    activities, links = chain(20, 2)
    links = replace_link(links, "T05", "T06", lag=-1)  # a lead
    links = replace_link(links, "T10", "T11", lag=3)  # a lag
    links = replace_link(links, "T12", "T13", type="SS")
    links = replace_link(links, "T14", "T15", type="FF")
    links = replace_link(links, "T20", "FINISH", lag=5)  # into a milestone: not counted
    if extra_start_to_start:
        links = replace_link(links, "T16", "T17", type="SS")
    return activities, links


def test_leads_lags_and_relationship_types(tmp_path):
    activities, links = relationship_case()
    found = metrics_of(write_case(tmp_path, activities=activities, links=links))
    # leads: 1 of 20; the threshold is none at all: fail.
    assert (found["leads"].count, found["leads"].denominator) == (1, 20)
    assert found["leads"].passed is False and found["leads"].activities == ("T05>T06",)
    assert found["leads"].unit == "links"
    # lags: 1 of 20 = 5 % <= 5 %: pass (T20>FINISH is not a relationship of a task).
    assert (found["lags"].count, found["lags"].denominator, found["lags"].percent) == (1, 20, 5.0)
    assert found["lags"].passed is True and found["lags"].activities == ("T10>T11",)
    # relationship types: 18 FS of 20 = 90 % >= 90 %: pass; the list gives the others.
    types = found["relationship_types"]
    assert (types.count, types.denominator, types.percent) == (18, 20, 90.0)
    assert types.passed is True
    assert types.activities == ("T12>T13", "T14>T15")


def test_relationship_types_fail_below_ninety_percent(tmp_path):
    # One more SS link: 17 FS of 20 = 85 % < 90 %: fail.
    activities, links = relationship_case(extra_start_to_start=True)
    types = metrics_of(write_case(tmp_path, activities=activities, links=links))["relationship_types"]
    assert (types.count, types.denominator, types.percent, types.passed) == (17, 20, 85.0, False)


def test_relationships_into_complete_tasks_are_left_out(tmp_path):
    # An update at 2025-01-13 in which T01 (2 days) finished on 2025-01-07. The link
    # START->T01 runs into complete work and is no longer counted: 19 relationships.
    # The one lag is then 1 / 19 = 5.26 % > 5 %: fail. Incomplete tasks: 19.
    activities, links = relationship_case()
    progress = [dict(a) for a in activities]
    for row in progress:
        if row["id"] == "START":
            row["actual_start"] = "2025-01-06"
        if row["id"] == "T01":
            row.update(actual_start="2025-01-06", actual_finish="2025-01-07")
    root = write_case(
        tmp_path,
        activities=activities,
        links=links,
        snapshots={"u01": {"data_date": "2025-01-13", "activities": progress}},
    )
    found = metrics_of(root, "u01")
    assert (found["lags"].count, found["lags"].denominator, found["lags"].percent) == (1, 19, 5.26)
    assert found["lags"].passed is False
    assert found["logic"].denominator == 19


# -- 5 hard constraints: at most 5 % of incomplete tasks -----------------------------------


def test_hard_constraints_pass_at_one_in_twenty(tmp_path):
    # T03 latest_finish (hard); T07 earliest_start (soft, not counted). 1 / 20 = 5 %: pass.
    activities, links = chain(20, 1)
    for row in activities:
        if row["id"] == "T03":
            row.update(constraint="latest_finish", constraint_date="2025-12-31")
        if row["id"] == "T07":
            row.update(constraint="earliest_start", constraint_date="2025-01-06")
    hard = metrics_of(write_case(tmp_path, activities=activities, links=links))["hard_constraints"]
    assert (hard.count, hard.denominator, hard.percent, hard.passed) == (1, 20, 5.0, True)
    assert hard.activities == ("T03",)


def test_hard_constraints_fail_and_milestones_are_left_out(tmp_path):
    # Hard: T03 latest_finish, T09 fixed_start (its own early start, 2025-01-16, k = 8),
    # T11 fixed_finish (its own early finish, 2025-01-20, k = 10). FINISH carries a
    # latest_finish but is a milestone, outside the task count. 3 / 20 = 15 %: fail.
    activities, links = chain(20, 1)
    dates = {
        "T03": ("latest_finish", "2025-12-31"),
        "T09": ("fixed_start", "2025-01-16"),
        "T11": ("fixed_finish", "2025-01-20"),
        "FINISH": ("latest_finish", "2025-12-31"),
    }
    for row in activities:
        if row["id"] in dates:
            row.update(constraint=dates[row["id"]][0], constraint_date=dates[row["id"]][1])
    hard = metrics_of(write_case(tmp_path, activities=activities, links=links))["hard_constraints"]
    assert (hard.count, hard.denominator, hard.percent, hard.passed) == (3, 20, 15.0, False)
    assert hard.activities == ("T03", "T09", "T11")


# -- 6 high float: at most 5 % of incomplete tasks with total float above 44 work days ------


def float_case(extra=False):
    # The chain T01..T20 of 3 days each is 60 work days long and critical. B (15 days)
    # and C (16 days) run in parallel from START to FINISH: total float 60 - 15 = 45 and
    # 60 - 16 = 44 work days. With ``extra``, D (10 days): total float 50.
    activities, links = chain(20, 3)
    parallel = [("B", 15), ("C", 16)] + ([("D", 10)] if extra else [])
    for name, days in parallel:
        activities.append(task(name, days))
        links += [link("START", name), link(name, "FINISH")]
    return activities, links


def test_high_float_passes_at_one_in_twenty_two(tmp_path):
    # B's 45 > 44; C's 44 is not above. 1 / 22 = 4.55 %: pass.
    activities, links = float_case()
    high = metrics_of(write_case(tmp_path, activities=activities, links=links))["high_float"]
    assert (high.count, high.denominator, high.percent, high.passed) == (1, 22, 4.55, True)
    assert high.activities == ("B",)


def test_high_float_fails_at_two_in_twenty_three(tmp_path):
    activities, links = float_case(extra=True)
    high = metrics_of(write_case(tmp_path, activities=activities, links=links))["high_float"]
    assert (high.count, high.denominator, high.percent, high.passed) == (2, 23, 8.7, False)
    assert high.activities == ("B", "D")


# -- 7 negative float: none -------------------------------------------------------------------


def test_negative_float_from_a_latest_finish_that_cannot_be_met(tmp_path):
    # START -> T1 (5) -> T2 (5) -> T3 (5) -> FINISH; T2 must finish by 2025-01-15 (k = 7,
    # late finish boundary 8) but finishes on 2025-01-17 (early finish boundary 10):
    # T2 total float 8 - 10 = -2; T1's late finish is T2's late start 8 - 5 = 3 against an
    # early finish of 5: -2; T3 finishes the project: 0. Count 2 of 3 tasks: fail.
    activities = [
        start_milestone(),
        task("T1", 5),
        task("T2", 5, constraint="latest_finish", constraint_date="2025-01-15"),
        task("T3", 5),
        finish_milestone(),
    ]
    links = [link("START", "T1"), link("T1", "T2"), link("T2", "T3"), link("T3", "FINISH")]
    negative = metrics_of(write_case(tmp_path, activities=activities, links=links))["negative_float"]
    assert (negative.count, negative.denominator, negative.passed) == (2, 3, False)
    assert negative.activities == ("T1", "T2")
    assert negative.threshold == "0"


# -- 8 high duration: at most 5 % of incomplete tasks planned above 44 work days -----------


def test_high_duration_boundary(tmp_path):
    # T01 is 45 days (above 44), T02 44 (not above), T03..T20 one day: 1 / 20 = 5 %: pass.
    activities, links = chain(20, 1)
    for row in activities:
        if row["id"] == "T01":
            row["duration"] = 45
        if row["id"] == "T02":
            row["duration"] = 44
    high = metrics_of(write_case(tmp_path, activities=activities, links=links))["high_duration"]
    assert (high.count, high.denominator, high.percent, high.passed) == (1, 20, 5.0, True)
    assert high.activities == ("T01",)


def test_high_duration_fails_above_five_percent(tmp_path):
    # T01 45 and T05 60 days: 2 / 20 = 10 %: fail.
    activities, links = chain(20, 1)
    for row in activities:
        if row["id"] in ("T01", "T05"):
            row["duration"] = 45 if row["id"] == "T01" else 60
    high = metrics_of(write_case(tmp_path, activities=activities, links=links))["high_duration"]
    assert (high.count, high.denominator, high.percent, high.passed) == (2, 20, 10.0, False)


# -- 9 invalid dates: none ---------------------------------------------------------------------


def test_invalid_date_rule_on_arrays():
    # Data day D. Row 0: not started, forecast start D - 1 (invalid). Row 1: not started,
    # forecast D (valid). Row 2: in progress, forecast finish D - 1 (invalid). Row 3:
    # complete with an actual finish on D (invalid: actual dates lie before the data
    # date). Row 4: complete, actual finish D - 1 (valid).
    d = 20_000
    status = np.array([NOT_STARTED, NOT_STARTED, IN_PROGRESS, COMPLETE, COMPLETE])
    early_start = np.array([d - 1, d, d - 5, d - 9, d - 9])
    early_finish = np.array([d + 3, d + 3, d - 1, d, d - 1])
    actual_start = np.array([NO_DAY, NO_DAY, d - 5, d - 9, d - 9])
    actual_finish = np.array([NO_DAY, NO_DAY, NO_DAY, d, d - 1])
    mask = invalid_date_mask(d, status, early_start, early_finish, actual_start, actual_finish)
    assert mask.tolist() == [True, False, True, True, False]


def test_invalid_dates_none_in_a_valid_update(tmp_path):
    # An update at 2025-01-13: every forecast lies on or after the data date, every
    # actual before it. Tasks counted, complete or not: 20. 0 / 20: pass.
    activities, links = chain(20, 2)
    progress = [dict(a) for a in activities]
    for row in progress:
        if row["id"] == "START":
            row["actual_start"] = "2025-01-06"
        if row["id"] == "T01":
            row.update(actual_start="2025-01-06", actual_finish="2025-01-07")
        if row["id"] == "T02":
            row.update(actual_start="2025-01-08", remaining=1)
    root = write_case(
        tmp_path,
        activities=activities,
        links=links,
        snapshots={"u01": {"data_date": "2025-01-13", "activities": progress}},
    )
    invalid = metrics_of(root, "u01")["invalid_dates"]
    assert (invalid.count, invalid.denominator, invalid.passed) == (0, 20, True)


# -- 10 resources: reported only; "not applicable" without resource data -----------------


def test_resources_not_applicable_without_resource_data(tmp_path):
    activities, links = chain(3, 1)
    resources = metrics_of(write_case(tmp_path, activities=activities, links=links))["resources"]
    assert resources.passed is None and resources.count is None and resources.threshold == "-"
    assert "not applicable" in resources.note


def test_resources_counted_when_given(tmp_path):
    # A 'resources' column (an extra column the format carries): T01 has a crew, T02
    # and T03 none: 2 of 3 incomplete tasks; no published threshold, so no verdict.
    activities, links = chain(3, 1)
    for row in activities:
        row["resources"] = "crew A" if row["id"] == "T01" else ""
    resources = metrics_of(write_case(tmp_path, activities=activities, links=links))["resources"]
    assert (resources.count, resources.denominator, resources.passed) == (2, 3, None)
    assert resources.activities == ("T02", "T03")


# -- 11 missed activities (at most 5 %) and 14 baseline execution index (at least 0.95) ---


def execution_case(tmp_path, data_date, finished):
    # Baseline: START -> T1 .. T10 (5 days each) -> FINISH, and T11 (30 days) in parallel.
    # Baseline finishes (numpy.busday_offset from 2025-01-06): T1 01-10, T2 01-17, T3 01-24,
    # T4 01-31, T5 02-07, T6 02-14; T11 busday_offset(2025-01-06, 29) = 02-14.
    ids = [f"T{i}" for i in range(1, 11)]
    activities = [start_milestone()] + [task(i, 5) for i in ids] + [task("T11", 30), finish_milestone()]
    order = ["START"] + ids + ["FINISH"]
    links = [link(a, b) for a, b in zip(order, order[1:])] + [link("START", "T11"), link("T11", "FINISH")]
    progress = [dict(a) for a in activities]
    for row in progress:
        if row["id"] == "START":
            row["actual_start"] = "2025-01-06"
        if row["id"] in finished:
            start, finish, remaining = finished[row["id"]]
            row.update(actual_start=start, actual_finish=finish, remaining=remaining)
    return write_case(
        tmp_path,
        activities=activities,
        links=links,
        snapshots={"u01": {"data_date": data_date, "activities": progress}},
    )


def test_missed_activities_and_baseline_execution_index_fail(tmp_path):
    # Data date 2025-02-10: due (baseline finish before it) are T1..T5: 5 tasks.
    # T1 finished on time (01-10); T2 (01-20) and T3 (01-29) late; T4 in progress; T5 not
    # started: missed T2, T3, T4, T5 = 4 / 5 = 80 %: fail.
    # BEI counts every baseline task complete, also T11 finished ahead of its 02-14 baseline
    # finish: T1, T2, T3, T11 = 4 of 5 due = 0.80 < 0.95: fail.
    root = execution_case(
        tmp_path,
        "2025-02-10",
        {
            "T1": ("2025-01-06", "2025-01-10", None),
            "T2": ("2025-01-13", "2025-01-20", None),
            "T3": ("2025-01-21", "2025-01-29", None),
            "T4": ("2025-01-30", None, 3),
            "T11": ("2025-01-06", "2025-02-05", None),
        },
    )
    assert str(np.busday_offset("2025-01-06", 29)) == "2025-02-14"  # T11's baseline finish
    found = metrics_of(root, "u01")
    missed = found["missed_activities"]
    assert (missed.count, missed.denominator, missed.percent, missed.passed) == (4, 5, 80.0, False)
    assert missed.activities == ("T2", "T3", "T4", "T5")
    bei = found["bei"]
    assert (bei.count, bei.denominator, bei.percent, bei.passed) == (4, 5, 80.0, False)
    assert bei.threshold == ">= 0.95"


def test_missed_activities_and_baseline_execution_index_pass(tmp_path):
    # Data date 2025-01-20: due T1 (01-10) and T2 (01-17), both finished on time: missed
    # 0 / 2 = 0 %: pass; BEI 2 / 2 = 1.00: pass.
    root = execution_case(
        tmp_path, "2025-01-20", {"T1": ("2025-01-06", "2025-01-10", None), "T2": ("2025-01-13", "2025-01-17", None)}
    )
    found = metrics_of(root, "u01")
    assert (found["missed_activities"].count, found["missed_activities"].denominator) == (0, 2)
    assert found["missed_activities"].passed is True
    assert (found["bei"].count, found["bei"].denominator, found["bei"].passed) == (2, 2, True)


def test_baseline_execution_not_applicable_on_the_baseline(tmp_path):
    # Nothing is due before the baseline's own data date.
    root = execution_case(tmp_path, "2025-01-20", {})
    found = metrics_of(root, "baseline")
    assert found["missed_activities"].passed is None and found["missed_activities"].denominator == 0
    assert found["bei"].passed is None


# -- 12 critical path test: completion moves by the delay added (common practice) ----------


def test_critical_path_test_passes_on_a_continuous_path(tmp_path):
    # START -> T1 (5) -> T2 (5) -> FINISH; T1 is the first critical task of the driving
    # path. 600 work days more on T1 move the completion by 600 work days.
    activities = [start_milestone(), task("T1", 5), task("T2", 5), finish_milestone()]
    links = [link("START", "T1"), link("T1", "T2"), link("T2", "FINISH")]
    test = metrics_of(write_case(tmp_path, activities=activities, links=links))["critical_path_test"]
    assert (test.count, test.denominator, test.passed) == (600, 600, True)
    assert "T1" in test.note


def test_critical_path_test_fails_when_a_constraint_breaks_the_path(tmp_path):
    # T2 is pinned by fixed_start on 2025-01-13 (its own early start), so it no longer
    # moves with T1. Completion was T2's finish 2025-01-17. With 600 days more, T1
    # (605 days from 2025-01-06) finishes on busday_offset(2025-01-06, 604) = 2027-04-30
    # and that is the new completion: busday_count(2025-01-17, 2027-04-30) = 595 work days,
    # not 600: fail, and T1 is named.
    activities = [
        start_milestone(),
        task("T1", 5),
        task("T2", 5, constraint="fixed_start", constraint_date="2025-01-13"),
        finish_milestone(),
    ]
    links = [link("START", "T1"), link("T1", "T2"), link("T2", "FINISH")]
    new_finish = np.busday_offset("2025-01-06", 604)
    assert str(new_finish) == "2027-04-30"
    expected = int(np.busday_count("2025-01-17", new_finish))
    test = metrics_of(write_case(tmp_path, activities=activities, links=links))["critical_path_test"]
    assert (test.count, test.denominator, test.passed) == (expected, 600, False)
    assert expected == 595
    assert test.activities == ("T1",)


# -- 13 critical path length index: at least 0.95 ------------------------------------------


def cpli_case(tmp_path, completion, extensions=None):
    # START -> T1 (20 days) -> FINISH from 2025-01-06: forecast completion
    # busday_offset(2025-01-06, 19) = 2025-01-31. Critical path length: work days
    # 2025-01-06 .. 2025-01-31 = busday_count(2025-01-06, 2025-02-01) = 20.
    activities = [start_milestone(), task("T1", 20), finish_milestone()]
    links = [link("START", "T1"), link("T1", "FINISH")]
    files = {}
    if extensions:
        files["extensions_granted.csv"] = extensions
        files["sections.csv"] = [
            {
                "section": "S1",
                "name": "Part of the works",
                "completion_activity": "T1",
                "contract_completion": completion,
            }
        ]
    return write_case(tmp_path, activities=activities, links=links, completion=completion, files=files)


def test_cpli_against_the_contract_completion_in_force(tmp_path):
    # Contract completion 2025-01-24, plus 7 days granted for the whole works (no
    # section) on 2025-01-03, before the baseline's data date = 2025-01-31; 100 days granted
    # for section S1 (whose milestone is T1, not the project's completion) do not count. Work
    # days to it: busday_count(2025-01-06, 2025-02-01) = 20. CPLI = 20 / 20 = 1.00 >= 0.95: pass.
    root = cpli_case(
        tmp_path,
        "2025-01-24",
        extensions=[
            {"id": "E1", "granted_on": "2025-01-03", "days": 7, "section": ""},
            {"id": "E2", "granted_on": "2025-01-03", "days": 100, "section": "S1"},
        ],
    )
    case = load_case(root)
    assert str(contract_completion_in_force(case)) == "2025-01-31"
    cpli = {m.key: m for m in metric_list(case)}["cpli"]
    length = int(np.busday_count("2025-01-06", "2025-02-01"))
    assert (cpli.count, cpli.denominator, cpli.passed) == (length, length, True)


def test_cpli_uses_the_completion_in_force_at_the_data_date(tmp_path):
    # Case format v2: a grant is in force from its granted_on date, and a check of a programme
    # uses its data date. The 7 days granted on 2025-01-10 are not yet in force at the
    # baseline's data date 2025-01-06: CPLI 15 / 20 = 0.75, as without the extension; after every
    # grant the completion in force is 2025-01-31.
    root = cpli_case(
        tmp_path, "2025-01-24", extensions=[{"id": "E1", "granted_on": "2025-01-10", "days": 7, "section": ""}]
    )
    case = load_case(root)
    assert str(contract_completion_in_force(case)) == "2025-01-31"
    assert str(contract_completion_in_force(case, at=dt.date(2025, 1, 6))) == "2025-01-24"
    cpli = {m.key: m for m in metric_list(case)}["cpli"]
    assert (cpli.count, cpli.denominator, cpli.passed) == (15, 20, False)


def test_a_grant_naming_the_whole_works_section_is_the_whole_works(tmp_path):
    # Case format v2: the section whose completion activity is the project's completion
    # activity (FINISH, the finish milestone that finishes last) is the whole of the works,
    # and a grant naming it applies to the whole works.
    root = cpli_case(tmp_path, "2025-01-24")
    from casewriter import write_csv

    write_csv(
        root / "sections.csv",
        [
            {
                "section": "W",
                "name": "The whole of the works",
                "completion_activity": "FINISH",
                "contract_completion": "2025-01-24",
            }
        ],
    )
    write_csv(root / "extensions_granted.csv", [{"id": "E1", "granted_on": "2025-01-03", "days": 7, "section": "W"}])
    assert str(contract_completion_in_force(load_case(root))) == "2025-01-31"


def test_cpli_fails_without_the_extension(tmp_path):
    # Contract completion 2025-01-24: busday_count(2025-01-06, 2025-01-25) = 15 work
    # days, total float -5. CPLI = 15 / 20 = 0.75: fail; the driving path is listed.
    cpli = metrics_of(cpli_case(tmp_path, "2025-01-24"))["cpli"]
    assert (cpli.count, cpli.denominator) == (int(np.busday_count("2025-01-06", "2025-01-25")), 20)
    assert (cpli.percent, cpli.passed) == (75.0, False)
    assert "T1" in cpli.activities


def test_cpli_boundary_passes_at_ninety_five_hundredths(tmp_path):
    # Contract completion 2025-01-30: busday_count(2025-01-06, 2025-01-31) = 19;
    # 19 / 20 = 0.95: pass.
    cpli = metrics_of(cpli_case(tmp_path, "2025-01-30"))["cpli"]
    assert (cpli.count, cpli.denominator, cpli.passed) == (19, 20, True)


# -- the table as a whole ------------------------------------------------------------------


def test_every_metric_in_order_with_stable_columns(tmp_path):
    activities, links = chain(3, 1)
    frame = quality_metrics(load_case(write_case(tmp_path, activities=activities, links=links)))
    assert tuple(frame.columns) == METRIC_COLUMNS
    assert tuple(frame["key"]) == METRIC_KEYS
    assert len(METRIC_KEYS) == 14  # the fourteen points of the assessment


def test_unknown_snapshot_is_an_input_error(tmp_path):
    from delay.errors import CaseError

    activities, links = chain(3, 1)
    case = load_case(write_case(tmp_path, activities=activities, links=links))
    with pytest.raises(CaseError, match="no snapshot 'u09'"):
        metric_list(case, "u09")
