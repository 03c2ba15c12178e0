"""Acceptance tests of the impacted as-planned analysis and ``delay impacted``, worked by hand.

Sources
-------
- shared/case-format.md (version 2), "Time convention" and "Scheduling rules" (cited as
  "rule n"), and its events.csv section (``extend``; ``hold`` = the affected activities do
  no work from ``start`` to ``finish``, both inclusive, whatever their status, work before
  it standing and the rest resuming after it, an activity with no work in the period not
  affected; ``fragnet``): the dates below.
- The method's definitions in the docstring of ``delay.methods.impacted`` (cited as
  "impacted doc"): an event's impact *alone* is the movement of completion with that event
  only; its *increment* is what it adds in the cumulative run, the events inserted one after
  another (chronological: by start, then finish, then register row); increments add up
  exactly to the cumulative impact, impacts alone need not; a failure to add up raises
  ReconciliationError. ``extend`` adds to the remaining duration of a started activity; a
  fragnet activity with no predecessor in its fragnet starts no earlier than the event's
  start; the residual is the actual completion less the impacted one.
- The method itself: AACE International RP 29R-03 (2011), MIP 3.6, and the SCL Delay and
  Disruption Protocol, 2nd edition (2017), Part B, impacted as-planned analysis (both
  recalled from memory). That concurrent events on parallel paths give impacts alone that
  overlap, and increments that depend on the order of insertion, is common practice.

Every expected value is worked in the comments from those rules; none was read from the
code's output. The cases are our own.

Seven-day calendar (most cases, so that work days = calendar days): work day k is
2025-01-06 + k days; a task of duration d starting on date D finishes on D + d - 1 (time
convention); an FS successor starts the next day; a finish milestone takes the date of the
work day it follows (rule 1). Completion is the latest early finish (rule 5); a delay is
the difference of two completion dates in calendar days.

Five-day calendar, January 2025 (2025-01-06 is a Monday), work day k:
    k:  0  1  2  3  4 | 5  6  7  8  9
 date: 06 07 08 09 10 |13 14 15 16 17          (11, 12 = Sat, Sun)
"""

from __future__ import annotations

import dataclasses
import datetime as dt
import json
import shutil
import tempfile
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from casewriter import write_case, write_csv
from click.testing import CliRunner
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from delay.case import load_case
from delay.commands.modelled import impacted
from delay.cpm import ScheduleModel, prepare, schedule
from delay.errors import CaseError, ReconciliationError
from delay.events import completion_activity
from delay.methods.impacted import analyse, event_changes
from delay.synth import synthesise

SEVEN_DAY = {"default_calendar": "7d"}


def task(activity_id, duration, **extra):
    return {"id": activity_id, "name": f"Work {activity_id}", "duration": duration, **extra}


def finish_milestone(activity_id="F"):
    return {"id": activity_id, "name": "Completion", "duration": 0, "kind": "finish_milestone"}


def link(pred, succ, kind="FS", lag=0):
    return {"pred": pred, "succ": succ, "type": kind, "lag": lag}


def event(event_id, party, start, finish, activities, impact_kind, days=None):
    return {
        "id": event_id,
        "title": f"Event {event_id}",
        "party": party,
        "start": start,
        "finish": finish,
        "activities": activities,
        "impact": impact_kind,
        "days": days,
    }


def day(text):
    return dt.date.fromisoformat(text)


def by_event(result):
    return result.events.set_index("event")


def invoke(*args):
    """``delay impacted ARGS`` through the command object itself."""
    return CliRunner().invoke(impacted, [str(a) for a in args])


# =======================================================================================
# 1. One event on the critical path, one within float (7-day calendar)
#
# Baseline: A5 -> B5 -> F, and X3 -> F.
#   A Jan 06-10, B Jan 11-15, F Jan 15; X Jan 06-08.  Completion Jan 15.
#   X: late finish Jan 15 (F's late date, backward pass from completion, rule 5), early
#   finish Jan 08: total float 7 (rule 6).
# E1 (start Jan 09): extend B by 3 -> B 8 days, Jan 11-18, F Jan 18.  Alone +3 (3 work days).
# E2 (start Jan 07): extend X by 7, exactly its float -> X 10 days, Jan 06-15; F still
#   Jan 15 (A-B path).  Alone 0.
# Cumulative, chronological (impacted doc): E2 first (Jan 07 < Jan 09):
#   after E2: completion Jan 15, increment 0;
#   after E2+E1: B Jan 11-18, X Jan 06-15, F Jan 18: increment 3.
#   Total 3 = 0 + 3.
CHAIN = [task("A", 5), task("B", 5), task("X", 3), finish_milestone()]
CHAIN_LINKS = [link("A", "B"), link("B", "F"), link("X", "F")]
CHAIN_EVENTS = [
    event("E1", "employer", "2025-01-09", "2025-01-10", "B", "extend", 3),
    event("E2", "employer", "2025-01-07", "2025-01-08", "X", "extend", 7),
]


def chain_case(root):
    write_case(root, activities=CHAIN, links=CHAIN_LINKS, schedule=SEVEN_DAY, files={"events.csv": CHAIN_EVENTS})
    return root


def test_event_on_the_critical_path_moves_completion_by_its_days(tmp_path):
    result = analyse(load_case(chain_case(tmp_path / "case")), events=["E1"])
    row = by_event(result).loc["E1"]
    assert result.completion_base == day("2025-01-15")
    assert (row["alone_days"], row["alone_work_days"]) == (3, 3)
    assert row["completion_alone"] == day("2025-01-18")
    assert (row["increment_days"], row["increment_work_days"]) == (3, 3)
    assert row["completion_after"] == day("2025-01-18")
    assert result.total_days == 3


def test_event_within_float_moves_nothing(tmp_path):
    result = analyse(load_case(chain_case(tmp_path / "case")), events=["E2"])
    row = by_event(result).loc["E2"]
    assert (row["alone_days"], row["increment_days"]) == (0, 0)
    assert row["completion_after"] == day("2025-01-15")
    assert result.total_days == 0


def test_chronological_run_of_critical_and_float_events(tmp_path):
    result = analyse(load_case(chain_case(tmp_path / "case")))
    assert list(result.events["event"]) == ["E2", "E1"]  # E2 starts Jan 07, E1 Jan 09
    assert list(result.events["alone_days"]) == [0, 3]
    assert list(result.events["increment_days"]) == [0, 3]
    assert list(result.events["completion_after"]) == [day("2025-01-15"), day("2025-01-18")]
    assert result.completion_cumulative == day("2025-01-18")
    assert result.total_days == 3


# =======================================================================================
# 2. Two events on parallel paths (7-day calendar)
#
# Baseline: A10 -> F, B8 -> F.  A Jan 06-15, B Jan 06-13, F Jan 15.  Completion Jan 15.
#   B has 2 days of float.
# E1 employer (start Jan 07): extend A by 5 -> A Jan 06-20: alone +5.
# E2 contractor (start Jan 08): extend B by 4 -> B 12 days Jan 06-17; A Jan 15: alone +2.
# Chronological (E1 then E2):
#   after E1: Jan 20, increment 5;  after E1+E2: A Jan 20, B Jan 17 -> Jan 20, increment 0
#   (E2 hidden behind E1).  Total 5 = 5 + 0, while the impacts alone add to 7.
# As listed E2, E1:
#   after E2: Jan 17, increment 2;  after E2+E1: Jan 20, increment 3.  Total 5 = 2 + 3.
# Per party (impacted doc: alone = the party's events together without the others):
#   employer [E1] alone 5, increments 5 (chronological);  contractor [E2] alone 2, increments 0.
PARALLEL = [task("A", 10), task("B", 8), finish_milestone()]
PARALLEL_LINKS = [link("A", "F"), link("B", "F")]
PARALLEL_EVENTS = [
    event("E1", "employer", "2025-01-07", "2025-01-09", "A", "extend", 5),
    event("E2", "contractor", "2025-01-08", "2025-01-10", "B", "extend", 4),
]


def parallel_case(root):
    write_case(
        root, activities=PARALLEL, links=PARALLEL_LINKS, schedule=SEVEN_DAY, files={"events.csv": PARALLEL_EVENTS}
    )
    return root


def test_parallel_paths_second_event_hidden_behind_the_first(tmp_path):
    result = analyse(load_case(parallel_case(tmp_path / "case")))
    table = by_event(result)
    assert list(result.events["event"]) == ["E1", "E2"]
    assert (table.loc["E1", "alone_days"], table.loc["E2", "alone_days"]) == (5, 2)
    assert table.loc["E2", "completion_alone"] == day("2025-01-17")
    assert (table.loc["E1", "increment_days"], table.loc["E2", "increment_days"]) == (5, 0)
    assert result.total_days == 5
    # the increments reconcile with the movement of completion; the impacts alone do not
    assert int(result.events["increment_days"].sum()) == result.total_days
    assert int(result.events["alone_days"].sum()) == 7 != result.total_days


def test_order_as_listed_changes_the_increments_not_the_total(tmp_path):
    case = load_case(parallel_case(tmp_path / "case"))
    listed = analyse(case, events=["E2", "E1"], order="as-listed")
    chronological = analyse(case, events=["E2", "E1"], order="chronological")
    assert list(listed.events["event"]) == ["E2", "E1"]
    assert list(listed.events["increment_days"]) == [2, 3]
    assert list(listed.events["completion_after"]) == [day("2025-01-17"), day("2025-01-20")]
    assert list(chronological.events["event"]) == ["E1", "E2"]
    assert list(chronological.events["increment_days"]) == [5, 0]
    assert listed.total_days == chronological.total_days == 5
    # the impacts alone do not depend on the order
    assert list(listed.events.set_index("event").loc[["E1", "E2"], "alone_days"]) == [5, 2]


def test_cli_json_chronological(tmp_path):
    run = invoke(parallel_case(tmp_path / "case"), "--format", "json")
    assert run.exit_code == 0, run.output
    data = json.loads(run.stdout)
    # no as-built record and no programme after the baseline: nothing says what happened, so
    # the analysis is prospective and the impacted completion stands, with no residual
    # (impacted doc)
    assert {
        k: data[k]
        for k in (
            "method",
            "base",
            "target",
            "completion_base",
            "completion_cumulative",
            "actual_completion",
            "total_days",
            "residual_days",
            "explained_days",
        )
    } == {
        "method": "impacted",
        "base": "baseline",
        "target": "F",
        "completion_base": "2025-01-15",
        "completion_cumulative": "2025-01-20",
        "actual_completion": "2025-01-20",
        "total_days": 5,
        "residual_days": 0,
        "explained_days": 5,
    }
    assert any("prospective" in note for note in data["notes"])
    assert [
        {k: e[k] for k in ("event", "party", "alone_days", "increment_days", "completion_after")}
        for e in data["events"]
    ] == [
        {"event": "E1", "party": "employer", "alone_days": 5, "increment_days": 5, "completion_after": "2025-01-20"},
        {"event": "E2", "party": "contractor", "alone_days": 2, "increment_days": 0, "completion_after": "2025-01-20"},
    ]


def test_cli_order_as_listed(tmp_path):
    run = invoke(parallel_case(tmp_path / "case"), "--events", "E2,E1", "--order", "as-listed", "--format", "json")
    assert run.exit_code == 0, run.output
    data = json.loads(run.stdout)
    assert [(e["event"], e["increment_days"], e["completion_after"]) for e in data["events"]] == [
        ("E2", 2, "2025-01-17"),
        ("E1", 3, "2025-01-20"),
    ]
    assert data["total_days"] == 5


def test_cli_events_filter(tmp_path):
    # only E2: alone 2, increment 2 (section 2), completion Jan 15 -> Jan 17
    run = invoke(parallel_case(tmp_path / "case"), "--events", "E2", "--format", "json")
    assert run.exit_code == 0, run.output
    data = json.loads(run.stdout)
    assert [e["event"] for e in data["events"]] == ["E2"]
    assert (data["events"][0]["alone_days"], data["events"][0]["increment_days"]) == (2, 2)
    assert data["total_days"] == 2


def test_cli_unknown_event_is_a_plain_input_error(tmp_path):
    root = parallel_case(tmp_path / "case")
    before = (root / "events.csv").read_bytes()
    run = invoke(root, "--events", "E1,E9")
    assert run.exit_code == 2
    assert "E9" in run.stderr and "events.csv" in run.stderr
    assert "Traceback" not in run.output
    assert run.stdout == ""
    assert (root / "events.csv").read_bytes() == before


def test_unknown_event_raises_case_error(tmp_path):
    with pytest.raises(CaseError, match="E9"):
        analyse(load_case(parallel_case(tmp_path / "case")), events=["E9"])


def test_cli_unknown_base_is_a_plain_input_error(tmp_path):
    run = invoke(parallel_case(tmp_path / "case"), "--base", "no-such-update")
    assert run.exit_code == 2
    assert "no-such-update" in run.stderr
    assert "Traceback" not in run.output


# =======================================================================================
# 3. An employer and a contractor delay concurrent on parallel paths (7-day calendar)
#
# Baseline: A10 -> F, B10 -> F, both critical: A, B Jan 06-15, F Jan 15.
# E1 employer, Jan 08-12: extend A by 5 -> A Jan 06-20: alone +5.
# E2 contractor, Jan 09-13 (overlapping E1): extend B by 5 -> B Jan 06-20: alone +5.
# Chronological: E1 increment 5 (Jan 20); E2: A and B both Jan 20 -> increment 0.  Total 5.
# Per party: employer [E1] alone 5, increments 5; contractor [E2] alone 5, increments 0.
# (Either delay alone would have moved completion 5 days: concurrent delay, common practice.)
CONCURRENT = [task("A", 10), task("B", 10), finish_milestone()]
CONCURRENT_EVENTS = [
    event("E1", "employer", "2025-01-08", "2025-01-12", "A", "extend", 5),
    event("E2", "contractor", "2025-01-09", "2025-01-13", "B", "extend", 5),
]


def concurrent_case(root):
    write_case(
        root, activities=CONCURRENT, links=PARALLEL_LINKS, schedule=SEVEN_DAY, files={"events.csv": CONCURRENT_EVENTS}
    )
    return root


def test_concurrent_employer_and_contractor_delays_per_party(tmp_path):
    result = analyse(load_case(concurrent_case(tmp_path / "case")))
    table = by_event(result)
    assert (table.loc["E1", "alone_days"], table.loc["E2", "alone_days"]) == (5, 5)
    assert (table.loc["E1", "increment_days"], table.loc["E2", "increment_days"]) == (5, 0)
    assert result.total_days == 5
    parties = result.by_party.set_index("party")
    assert list(parties.index) == ["employer", "contractor"]
    assert list(parties.loc["employer", "events"]) == ["E1"]
    assert list(parties.loc["contractor", "events"]) == ["E2"]
    assert (parties.loc["employer", "alone_days"], parties.loc["employer", "increment_days"]) == (5, 5)
    assert (parties.loc["contractor", "alone_days"], parties.loc["contractor", "increment_days"]) == (5, 0)


def test_cli_table_shows_per_party_rows_and_the_cautions(tmp_path):
    run = invoke(concurrent_case(tmp_path / "case"))
    assert run.exit_code == 0, run.output
    text = run.stdout

    def cells(line):
        return [c.strip() for c in line.strip().strip("│").split("│")]

    rows = [cells(line) for line in text.splitlines() if line.count("│") >= 4]
    assert ["employer", "E1", "5", "5"] in rows
    assert ["contractor", "E2", "5", "0"] in rows
    assert "need not add up" in text
    assert "not legal advice" in text
    assert "professional judgement" in text


# =======================================================================================
# 4. A fragnet with SS and FF links (7-day calendar)
#
# Baseline: A5 -> B5 -> F.  A Jan 06-10 (boundaries 0-5), B Jan 11-15 (5-10), F Jan 15.
# Event G (start Jan 09 = day 3), impact fragnet, inserting
#   N1 (4 days), N2 (6 days); fragnet links N1 -SS+2-> N2, N2 -FF+1-> B.
# N1 has no predecessor in its fragnet: starts no earlier than the event start (impacted
#   doc): ES 3 (Jan 09), EF 7, finish Jan 12.
# N2: SS reads N1's start, bounds N2's start (rule 2): ES >= 3 + 2 = 5 (Jan 11); EF 11,
#   finish Jan 16.  (N2 has a predecessor: no bound from the event start.)
# B: FS from A: ES >= 5; FF reads N2's finish, bounds B's finish: EF >= 11 + 1 = 12, so
#   ES >= 12 - 5 = 7.  B Jan 13-17 (ES 7, EF 12).  F follows B: Jan 17.
# Completion Jan 15 -> Jan 17: alone +2.
# Cross-checks that the figure tells the rules apart: with N1 at the data date (day 0) the
#   chain would give B EF >= 9 < 10, no delay; SS read as FS would give N2 ES 7, EF 13,
#   B EF 14, +4; FF read as FS would give B ES 12, EF 17, +7.
FRAGNET_EVENTS = [event("G", "employer", "2025-01-09", "2025-01-20", "B", "fragnet")]
FRAGNETS = [
    {"event": "G", "id": "N1", "name": "Redesign of the opening", "duration": 4},
    {"event": "G", "id": "N2", "name": "Rework of the opening", "duration": 6},
]
FRAGNET_LINKS = [
    {"event": "G", "pred": "N1", "succ": "N2", "type": "SS", "lag": 2},
    {"event": "G", "pred": "N2", "succ": "B", "type": "FF", "lag": 1},
]


def fragnet_case(root):
    write_case(
        root,
        activities=[task("A", 5), task("B", 5), finish_milestone()],
        links=[link("A", "B"), link("B", "F")],
        schedule=SEVEN_DAY,
        files={"events.csv": FRAGNET_EVENTS, "fragnets.csv": FRAGNETS, "fragnet_links.csv": FRAGNET_LINKS},
    )
    return root


def test_fragnet_with_ss_and_ff_links(tmp_path):
    result = analyse(load_case(fragnet_case(tmp_path / "case")))
    row = by_event(result).loc["G"]
    assert result.completion_base == day("2025-01-15")
    assert row["alone_days"] == 2
    assert row["completion_alone"] == day("2025-01-17")
    assert row["increment_days"] == 2
    assert row["applied"] == ""


def test_fragnet_activity_without_predecessor_starts_at_the_event_start(tmp_path):
    case = load_case(fragnet_case(tmp_path / "case"))
    model = prepare(case, "baseline")
    changes = event_changes(case, case.events.iloc[0], set(case.baseline.activities["id"]))
    assert changes["missing"] == []
    variant = model.what_if(add_activities=changes["add_activities"], add_links=changes["add_links"])
    table = variant.run().activities.set_index("id")
    # dates worked in section 4
    assert str(table.loc["N1", "early_start"].date()) == "2025-01-09"
    assert str(table.loc["N1", "early_finish"].date()) == "2025-01-12"
    assert str(table.loc["N2", "early_start"].date()) == "2025-01-11"
    assert str(table.loc["N2", "early_finish"].date()) == "2025-01-16"
    assert str(table.loc["B", "early_start"].date()) == "2025-01-13"
    assert str(table.loc["B", "early_finish"].date()) == "2025-01-17"


# =======================================================================================
# 5. Holds stop work for their period, five-day calendar
#
# Baseline: P2 -> A3 -> F.  P Mon Jan 06 - Tue Jan 07 (days 0-1), A Wed Jan 08 - Fri Jan 10
#   (days 2-4), F Fri Jan 10.  Completion Fri Jan 10.
# Event H, Tue Jan 07 - Fri Jan 10, hold on A: A does no work on Jan 07-10 (case format v2), so
#   its three days fall on the next work days after the hold: Mon Jan 13 - Wed Jan 15 (days
#   5-7), F Wed Jan 15.  Alone: Jan 15 - Jan 10 = 5 calendar days; work days 7 - 4 = 3.
def hold_case(root, first="2025-01-07", last="2025-01-10"):
    write_case(
        root,
        activities=[task("P", 2), task("A", 3), finish_milestone()],
        links=[link("P", "A"), link("A", "F")],
        files={"events.csv": [event("H", "employer", first, last, "A", "hold")]},
    )
    return root


def test_hold_across_the_whole_of_the_work(tmp_path):
    result = analyse(load_case(hold_case(tmp_path / "case")))
    row = by_event(result).loc["H"]
    assert result.completion_base == day("2025-01-10")
    assert row["completion_alone"] == day("2025-01-15")
    assert (row["alone_days"], row["alone_work_days"]) == (5, 3)
    assert (row["increment_days"], row["increment_work_days"]) == (5, 3)
    assert row["effect"] == ""


# The hold Thu Jan 09 only, across A's planned work Wed Jan 08 - Fri Jan 10: the day before it
#   stands (Wed Jan 08), the rest resumes after it (Fri Jan 10, Mon Jan 13): A finishes Mon
#   Jan 13, F Jan 13: +3 calendar days, +1 work day.  A start bound would have pushed the
#   whole of A to Fri Jan 10 - Tue Jan 14 (+4).
def test_hold_across_planned_work_splits_it(tmp_path):
    result = analyse(load_case(hold_case(tmp_path / "case", "2025-01-09", "2025-01-09")))
    row = by_event(result).loc["H"]
    assert row["completion_alone"] == day("2025-01-13")
    assert (row["alone_days"], row["alone_work_days"]) == (3, 1)


# A hold on Jan 13-17, after A is planned to finish (Fri Jan 10): no effect, and the result says
#   why (case format v2: "an activity that has no work in the period is not affected, and this
#   is reported").
def test_hold_on_work_planned_to_finish_before_it(tmp_path):
    result = analyse(load_case(hold_case(tmp_path / "case", "2025-01-13", "2025-01-17")))
    row = by_event(result).loc["H"]
    assert (row["alone_days"], row["increment_days"]) == (0, 0)
    assert "no effect on this programme: the work is planned to finish before the hold" in row["effect"]


# A hold on work in progress in an update (five-day calendar).
# Baseline P2 -> A5 -> F; update u1, data date Mon Jan 13: P done Jan 06-07, A started Wed Jan 08
#   with 2 days remaining (Jan 13-14), F Tue Jan 14.
# Event H, Tue Jan 14 - Wed Jan 15, hold on A: A works Mon Jan 13, stops Jan 14-15, resumes
#   Thu Jan 16 for its last day; F Thu Jan 16: +2 calendar days, +2 work days.  (Before, a
#   start bound on a started activity was ignored: +0.)
def test_hold_on_work_in_progress(tmp_path):
    p, a, f = task("P", 2), task("A", 5), finish_milestone()
    update = [
        {**p, "actual_start": "2025-01-06", "actual_finish": "2025-01-07", "remaining": None},
        {**a, "actual_start": "2025-01-08", "actual_finish": None, "remaining": 2},
        {**f, "actual_start": None, "actual_finish": None, "remaining": None},
    ]
    write_case(
        tmp_path / "case",
        activities=[p, a, f],
        links=[link("P", "A"), link("A", "F")],
        snapshots={"u1": {"data_date": "2025-01-13", "activities": update}},
        files={"events.csv": [event("H", "contractor", "2025-01-14", "2025-01-15", "A", "hold")]},
    )
    result = analyse(load_case(tmp_path / "case"), base="u1")
    row = by_event(result).loc["H"]
    assert result.completion_base == day("2025-01-14")
    assert row["completion_alone"] == day("2025-01-16")
    assert (row["alone_days"], row["alone_work_days"]) == (2, 2)


# =======================================================================================
# 6. An extension of an activity in progress in an update (7-day calendar)
#
# Baseline: A10 -> F.  A Jan 06-15.
# Update u1 ("Update 1"), data date Fri Jan 10: A started Jan 06, remaining 8.
#   A's remaining work starts at the data date (rule 3): Jan 10-17; F Jan 17.  Completion
#   of u1 = Jan 17.
# Event E (start Jan 12): extend A by 3, added to the remaining duration (impacted doc):
#   remaining 11, Jan 10-20, F Jan 20.  Alone +3 against u1.
# (Added to the original duration only, the given remaining 8 would still govern: +0.)
def in_progress_case(root):
    a, f = task("A", 10), finish_milestone()
    update = [
        {**a, "actual_start": "2025-01-06", "actual_finish": None, "remaining": 8},
        {**f, "actual_start": None, "actual_finish": None, "remaining": None},
    ]
    write_case(
        root,
        activities=[a, f],
        links=[link("A", "F")],
        schedule=SEVEN_DAY,
        snapshots={"u1": {"data_date": "2025-01-10", "label": "Update 1", "activities": update}},
        files={"events.csv": [event("E", "employer", "2025-01-12", "2025-01-14", "A", "extend", 3)]},
    )
    return root


def test_extend_on_an_activity_in_progress_adds_to_remaining(tmp_path):
    result = analyse(load_case(in_progress_case(tmp_path / "case")), base="u1")
    row = by_event(result).loc["E"]
    assert result.base == "u1"
    assert result.completion_base == day("2025-01-17")
    assert row["completion_alone"] == day("2025-01-20")
    assert (row["alone_days"], row["increment_days"]) == (3, 3)


def test_cli_base_by_label(tmp_path):
    run = invoke(in_progress_case(tmp_path / "case"), "--base", "Update 1", "--format", "json")
    assert run.exit_code == 0, run.output
    data = json.loads(run.stdout)
    assert (data["base"], data["completion_base"], data["total_days"]) == ("u1", "2025-01-17", 3)


# =======================================================================================
# 7. A failed reconciliation raises ReconciliationError (not an assert)
#
# Parallel case of section 2: base completion Jan 15, all events Jan 20, increments 5 + 0.
# The test makes the first measurement of the base programme's completion come back one
# day late (Jan 16); every other measurement is true.  The base completion serves twice:
# as ``completion_base`` (total_days = completion_cumulative - completion_base) and as the
# starting point of the first increment.  Measured more than once, the measurements now
# disagree and the figures cannot reconcile: increments from Jan 15 add to 5 + 0 = 5 while
# the total from Jan 16 is 4 (or increments from Jan 16 add to 4 while the total from
# Jan 15 is 5).  The impacted doc requires that failure to raise ReconciliationError; the
# only other acceptable outcome is output that does reconcile (the base measured once).
#
# The completion of a model is measured through ScheduleModel.run (its ScheduleResult's
# completion_day) or, where the model offers it, the forward-pass-only
# ScheduleModel.completion_day; both are wrapped, so the test follows either.
def test_broken_increments_raise_reconciliation_error(tmp_path, monkeypatch):
    case = load_case(parallel_case(tmp_path / "case"))
    base = prepare(case, "baseline")
    measured = {"base": 0}

    def is_base(model):
        return (
            model.network.size == base.network.size
            and np.array_equal(model.duration, base.duration)
            and np.array_equal(model.start_bound, base.start_bound)
        )

    def late_on_first_base_measurement(model) -> int:
        if not is_base(model):
            return 0
        measured["base"] += 1
        return 1 if measured["base"] == 1 else 0

    original_run = ScheduleModel.run

    def run(self):
        result = original_run(self)
        shift = late_on_first_base_measurement(self)
        return dataclasses.replace(result, completion_day=result.completion_day + shift) if shift else result

    monkeypatch.setattr(ScheduleModel, "run", run)
    if hasattr(ScheduleModel, "completion_day"):
        original_completion_day = ScheduleModel.completion_day

        def completion_day(self):
            return original_completion_day(self) + late_on_first_base_measurement(self)

        monkeypatch.setattr(ScheduleModel, "completion_day", completion_day)

    try:
        outcome = analyse(case)
    except ReconciliationError as error:
        assert error.figures  # the disagreeing numbers are named
        return
    assert measured["base"] >= 1, "the base programme's completion was never measured"
    increments = int(outcome.events["increment_days"].sum())
    span = (outcome.completion_cumulative - outcome.completion_base).days
    assert increments == outcome.total_days == span, (
        f"no ReconciliationError, yet the increments add to {increments} while total_days is "
        f"{outcome.total_days} (base measured {measured['base']} times)"
    )
    assert outcome.events["completion_after"].iloc[-1] == outcome.completion_cumulative


# =======================================================================================
# 8. Properties on random synthetic programmes (hypothesis)
#
# References:
# - The events written into the programme's own tables give the same programme as the
#   cumulative run: ``extend`` = a longer duration (events.csv), ``hold`` = no work on the
#   activity in its period (events.csv, version 2), which is a calendar of the activity's
#   own with those days as non-working exceptions (calendars.csv and
#   calendar_exceptions.csv), and a fragnet = added activities and links (events.csv), its
#   activities with no predecessor taking the event's start as ``earliest_start`` (impacted
#   doc).  Several holds on one activity: their days together; several extends: their days
#   add.  The reference completion is ``delay.cpm.schedule`` of that case, loaded from
#   files like any other: it does not go through the impacted code or the what-if path.
# - The forward pass takes maxima of non-decreasing functions of the predecessors' dates
#   (Kelley and Walker 1959), so a longer duration, a later start bound or an added link
#   never brings completion earlier: impacts alone and increments are >= 0, and the
#   programme with every event finishes no earlier than with any one of them (common
#   practice).
# - The programme with every event inserted does not depend on the order of insertion, so
#   neither does the total (impacted doc: "increments depend on the order of insertion").
def synthetic_register(rng, activities, count):
    """Events, fragnets and fragnet links on not-constrained tasks of a synthetic programme."""
    tasks = activities[(activities["duration"] > 0) & (activities["constraint"].fillna("") == "")]
    events, fragnets, fragnet_links = [], [], []
    for number in range(count):
        event_id = f"EV{number:02d}"
        targets = list(rng.choice(tasks["id"].to_numpy(), size=int(rng.integers(1, 3)), replace=False))
        start = dt.date(2026, 1, 5) + dt.timedelta(days=int(rng.integers(0, 60)))
        finish = start + dt.timedelta(days=int(rng.integers(0, 20)))
        kind = ("extend", "hold", "fragnet")[number % 3]
        events.append(
            {
                "id": event_id,
                "title": f"Event {number}",
                "party": ("employer", "contractor")[number % 2],
                "start": start.isoformat(),
                "finish": finish.isoformat(),
                "activities": ";".join(targets),
                "impact": kind,
                "days": int(rng.integers(1, 9)) if kind == "extend" else None,
            }
        )
        if kind == "fragnet":
            first, second = f"{event_id}-1", f"{event_id}-2"
            fragnets += [
                {"event": event_id, "id": first, "name": "Inserted 1", "duration": int(rng.integers(1, 9))},
                {"event": event_id, "id": second, "name": "Inserted 2", "duration": int(rng.integers(1, 9))},
            ]
            fragnet_links.append(
                {
                    "event": event_id,
                    "pred": first,
                    "succ": second,
                    "type": str(rng.choice(["FS", "SS"])),
                    "lag": int(rng.integers(0, 3)),
                }
            )
            for target in targets:
                fragnet_links.append(
                    {"event": event_id, "pred": second, "succ": target, "type": str(rng.choice(["FS", "FF"])), "lag": 0}
                )
    return events, fragnets, fragnet_links


def events_written_into_the_programme(folder, events, fragnets, fragnet_links):
    """Rewrite the baseline's activities.csv and links.csv with every event in them, and drop
    the register (its fragnet activities are now activities of the programme)."""
    for register in ("events.csv", "fragnets.csv", "fragnet_links.csv"):
        (folder / register).unlink(missing_ok=True)
    base = folder / "snapshots" / "baseline"
    activities = pd.read_csv(base / "activities.csv", dtype=str, keep_default_na=False)
    links = pd.read_csv(base / "links.csv", dtype=str, keep_default_na=False)
    activities = activities.set_index("id")
    duration = activities["duration"].astype(int)
    held: dict[str, set[dt.date]] = {}
    for row in events:
        targets = row["activities"].split(";")
        if row["impact"] == "extend":
            for target in targets:
                duration[target] += row["days"]
        elif row["impact"] == "hold":
            first, last = dt.date.fromisoformat(row["start"]), dt.date.fromisoformat(row["finish"])
            days = {first + dt.timedelta(days=k) for k in range((last - first).days + 1)}
            for target in targets:
                held.setdefault(target, set()).update(days)
    activities["duration"] = duration.astype(str)
    calendars = pd.read_csv(folder / "calendars.csv", dtype=str, keep_default_na=False)
    exceptions = pd.read_csv(folder / "calendar_exceptions.csv", dtype=str, keep_default_na=False)
    weekdays = dict(zip(calendars["calendar"], calendars["workdays"]))
    new_calendars, new_exceptions = [], []
    for target, days in held.items():
        own = activities.loc[target, "calendar"] or "5d"
        name = f"{own}-held-{target}"
        new_calendars.append({"calendar": name, "workdays": weekdays[own]})
        kept = exceptions[exceptions["calendar"] == own]
        holidays = {dt.date.fromisoformat(d) for d, w in zip(kept["date"], kept["working"]) if w == "no"}
        for d in sorted(days | holidays):
            new_exceptions.append({"calendar": name, "date": d.isoformat(), "working": "no", "reason": "held"})
        activities.loc[target, "calendar"] = name
    pd.concat([calendars, pd.DataFrame(new_calendars)]).to_csv(folder / "calendars.csv", index=False)
    pd.concat([exceptions, pd.DataFrame(new_exceptions, columns=exceptions.columns)]).to_csv(
        folder / "calendar_exceptions.csv", index=False
    )
    activities = activities.reset_index()
    starts = {row["id"]: row["start"] for row in events}
    with_predecessor = {link["succ"] for link in fragnet_links}
    added = pd.DataFrame(
        [
            {
                "id": f["id"],
                "name": f["name"],
                "duration": str(f["duration"]),
                "calendar": "",
                "wbs": "",
                "kind": "task",
                "constraint": "" if f["id"] in with_predecessor else "earliest_start",
                "constraint_date": "" if f["id"] in with_predecessor else starts[f["event"]],
            }
            for f in fragnets
        ],
        columns=activities.columns,
    )
    pd.concat([activities, added]).to_csv(base / "activities.csv", index=False)
    extra_links = pd.DataFrame(
        [{"pred": k["pred"], "succ": k["succ"], "type": k["type"], "lag": str(k["lag"])} for k in fragnet_links],
        columns=links.columns,
    )
    pd.concat([links, extra_links]).to_csv(base / "links.csv", index=False)


@settings(max_examples=4, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(seed=st.integers(0, 10_000), activities=st.integers(60, 240), count=st.integers(3, 12))
def test_properties_on_synthetic_programmes(seed, activities, count):
    rng = np.random.default_rng(seed)
    with tempfile.TemporaryDirectory(prefix="impacted-") as tmp:
        folder = synthesise(f"{tmp}/case", activities, seed=seed)
        table = pd.read_csv(folder / "snapshots" / "baseline" / "activities.csv", keep_default_na=False)
        events, fragnets, fragnet_links = synthetic_register(rng, table, count)
        write_csv(folder / "events.csv", events)
        if fragnets:
            write_csv(folder / "fragnets.csv", fragnets)
            write_csv(folder / "fragnet_links.csv", fragnet_links)
        case = load_case(folder)
        written = Path(shutil.copytree(folder, f"{tmp}/written"))
        events_written_into_the_programme(written, events, fragnets, fragnet_links)
        target = completion_activity(case)  # the finish milestone that finishes last
        reference = schedule(load_case(written)).activities.set_index("id").loc[target, "early_finish"].date()
        plain = schedule(case).activities.set_index("id").loc[target, "early_finish"].date()

    result = analyse(case)
    assert result.completion_base == plain
    assert result.completion_cumulative == reference
    assert int(result.events["increment_days"].sum()) == result.total_days == (reference - plain).days
    assert (result.events["alone_days"] >= 0).all() and (result.events["increment_days"] >= 0).all()
    assert int(result.events["alone_days"].max()) <= result.total_days
    reversed_order = analyse(case, events=list(result.events["event"])[::-1], order="as-listed")
    assert reversed_order.total_days == result.total_days
