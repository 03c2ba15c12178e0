"""Acceptance tests of the time impact analysis and ``delay tia``, worked by hand.

Sources
-------
- shared/case-format.md, "Time convention" and "Scheduling rules" (cited as "rule n"),
  in particular rule 3 (an activity in progress keeps its actual start; its remaining work
  starts no earlier than the data date) and the events.csv section (``extend``).
- The method's definitions in the docstring of ``delay.methods.tia`` (cited as
  "tia doc"): an event's *current* programme is the last snapshot (baseline or update)
  whose data date is strictly before the event's start, unless ``tia_update`` names one;
  the event is modelled there as impacted as-planned models it (``delay.methods.impacted``:
  ``extend`` adds to the remaining duration of a started activity) and measured against
  that programme's own completion; events sharing a programme are inserted cumulatively in
  chronological order (start, finish, register row); each programme's *residual* is the
  next programme's completion (the as-built record's for the last) less its impacted
  completion, and increments plus residuals equal the actual less the planned completion;
  a warning is given where the programme already shows the event's activities slipped
  against the previous programme by as much as the event adds.
- The method itself: AACE International RP 29R-03 (2011), MIP 3.7, and the SCL Delay and
  Disruption Protocol, 2nd edition (2017), Part B, time impact analysis (both recalled from
  memory); concurrency in time (causation doc), AACE RP 29R-03 section 4.2 (as recalled).

Every expected value is worked in the comments; none was read from the code's output.

Seven-day calendar throughout (work days = calendar days): work day k is 2025-01-06 + k
days; a task of duration d starting on date D finishes on D + d - 1; a finish milestone
takes the date of the work day it follows; completion is the latest early finish (rule 5).

The case
--------
Baseline: A10 -> F, C8 -> F.  A Jan 06-15, C Jan 06-13, F Jan 15.  Completion Jan 15.
Update u1, data date Sat Jan 11: A started Jan 06, remaining 5 -> Jan 11-15;
  C started Jan 06, remaining 6 -> Jan 11-16 (rule 3).  F Jan 16.  Completion Jan 16.
Update u2, data date Tue Jan 14: A started Jan 06, remaining 4 -> Jan 14-17;
  C started Jan 06, remaining 2 -> Jan 14-15.  F Jan 17.  Completion Jan 17.
As-built: A Jan 06-18, C Jan 06-17, F Jan 18.  Actual completion Jan 18.

Events and their programmes (tia doc: the last data date strictly before the start):
  E0 neutral,    Jan 08-09: baseline (Jan 06 < Jan 08; u1's Jan 11 is not).  extend A by 1.
  E3 employer,   Jan 12:    u1 (Jan 11 < Jan 12).                            extend C by 1.
  E1 employer,   Jan 13:    u1.                                              extend A by 3.
  E2 contractor, Jan 14-15: u1: it starts on u2's data date, and u2 may already show it.
                            extend C by 3.

Baseline, against Jan 15:
  E0: A 11 days Jan 06-16, F Jan 16: alone +1, increment +1.  Baseline: Jan 15 -> Jan 16.
  Residual: u1's completion Jan 16 - Jan 16 = 0.
u1, against Jan 16 (E3, E1, E2 by start):
  E3 alone: C remaining 7, Jan 11-17, F Jan 17: +1.
  E1 alone: A remaining 5 + 3 = 8, Jan 11-18, F Jan 18: +2.
  E2 alone: C remaining 6 + 3 = 9, Jan 11-19, F Jan 19: +3.
  cumulative: after E3 Jan 17 (+1); after E1 Jan 18 (+1); after E2 C remaining 10, Jan 11-20,
  F Jan 20 (+2).  u1: Jan 16 -> Jan 20, 4.
  Residual: u2's completion Jan 17 - Jan 20 = -3 (recovery).
  Warnings: C finishes Jan 16 in u1 against Jan 13 in the baseline, 3 work days later: as much
  as E3 adds (1) and as E2 adds (3): both are flagged; A finishes Jan 15 in both: E1 is not.
u2, no events: Jan 17.  Residual: the as-built Jan 18 - Jan 17 = +1 (no event explains it).
Increments 1 + 4 = 5, residuals 0 - 3 + 1 = -2: 3 = Jan 18 - Jan 15, the actual less the
planned completion.
Concurrency in time (causation doc): in u1's run E3 (Jan 12), E1 (Jan 13) and E2 (Jan 14-15)
have periods that do not overlap, so none is concurrent with another, whatever their impacts
alone (E2's alone 3 covers the days E3 and E1 took, which made them concurrent by size before).

Cross-checks that the figures tell the rules apart: E1 in the baseline would give A 13
days, Jan 06-18, +3 against Jan 15 (not 2); E2 in u2 would give C remaining 5, Jan 14-18, +1
against Jan 17 (not 2); E0 in u1 would give A remaining 6, Jan 11-16, +0 (not 1).
"""

from __future__ import annotations

import datetime as dt
import json

from casewriter import write_case
from click.testing import CliRunner

from delay.case import load_case
from delay.commands.modelled import tia
from delay.methods.tia import analyse

SEVEN_DAY = {"default_calendar": "7d"}

A = {"id": "A", "name": "Work A", "duration": 10}
C = {"id": "C", "name": "Work C", "duration": 8}
F = {"id": "F", "name": "Completion", "duration": 0, "kind": "finish_milestone"}
LINKS = [{"pred": "A", "succ": "F", "type": "FS", "lag": 0}, {"pred": "C", "succ": "F", "type": "FS", "lag": 0}]


def progressed(row, actual_start=None, actual_finish=None, remaining=None):
    return {**row, "actual_start": actual_start, "actual_finish": actual_finish, "remaining": remaining}


def event(event_id, party, start, finish, activities, days):
    return {
        "id": event_id,
        "title": f"Event {event_id}",
        "party": party,
        "start": start,
        "finish": finish,
        "activities": activities,
        "impact": "extend",
        "days": days,
    }


EVENTS = [
    event("E1", "employer", "2025-01-13", "2025-01-13", "A", 3),
    event("E2", "contractor", "2025-01-14", "2025-01-15", "C", 3),
    event("E0", "neutral", "2025-01-08", "2025-01-09", "A", 1),
    event("E3", "employer", "2025-01-12", "2025-01-12", "C", 1),
]


ASBUILT = [
    {"id": "A", "actual_start": "2025-01-06", "actual_finish": "2025-01-18"},
    {"id": "C", "actual_start": "2025-01-06", "actual_finish": "2025-01-17"},
    {"id": "F", "actual_start": "2025-01-18", "actual_finish": "2025-01-18"},
]


def two_update_case(root, events=EVENTS):
    write_case(
        root,
        activities=[A, C, F],
        links=LINKS,
        schedule=SEVEN_DAY,
        snapshots={
            "u1": {
                "data_date": "2025-01-11",
                "activities": [
                    progressed(A, "2025-01-06", None, 5),
                    progressed(C, "2025-01-06", None, 6),
                    progressed(F),
                ],
            },
            "u2": {
                "data_date": "2025-01-14",
                "activities": [
                    progressed(A, "2025-01-06", None, 4),
                    progressed(C, "2025-01-06", None, 2),
                    progressed(F),
                ],
            },
        },
        files={"events.csv": events, "asbuilt.csv": ASBUILT},
    )
    return root


def day(text):
    return dt.date.fromisoformat(text)


def test_events_go_into_the_last_programme_before_they_began(tmp_path):
    result = analyse(load_case(two_update_case(tmp_path / "case")))
    events = result.events.set_index("event")
    assert list(result.events["event"]) == ["E0", "E3", "E1", "E2"]
    assert dict(events["snapshot"]) == {"E0": "baseline", "E3": "u1", "E1": "u1", "E2": "u1"}
    assert dict(events["completion_before"]) == {
        "E0": day("2025-01-15"),
        "E3": day("2025-01-16"),
        "E1": day("2025-01-16"),
        "E2": day("2025-01-16"),
    }
    assert dict(events["alone_days"]) == {"E0": 1, "E3": 1, "E1": 2, "E2": 3}
    assert dict(events["increment_days"]) == {"E0": 1, "E3": 1, "E1": 1, "E2": 2}
    assert dict(events["completion_after"]) == {
        "E0": day("2025-01-16"),
        "E3": day("2025-01-17"),
        "E1": day("2025-01-18"),
        "E2": day("2025-01-20"),
    }
    assert result.total_days == 5


def test_each_programme_reconciles_with_the_next(tmp_path):
    result = analyse(load_case(two_update_case(tmp_path / "case")))
    updates = result.updates.set_index("snapshot")
    assert list(updates.index) == ["baseline", "u1", "u2"]
    assert dict(updates["completion_before"]) == {
        "baseline": day("2025-01-15"),
        "u1": day("2025-01-16"),
        "u2": day("2025-01-17"),
    }
    assert dict(updates["completion_after"]) == {
        "baseline": day("2025-01-16"),
        "u1": day("2025-01-20"),
        "u2": day("2025-01-17"),
    }
    assert dict(updates["increment_days"]) == {"baseline": 1, "u1": 4, "u2": 0}
    assert dict(updates["next_snapshot"]) == {"baseline": "u1", "u1": "u2", "u2": "asbuilt"}
    assert dict(updates["residual_days"]) == {"baseline": 0, "u1": -3, "u2": 1}
    assert [list(e) for e in updates["events"]] == [["E0"], ["E3", "E1", "E2"], []]
    for snapshot, row in updates.iterrows():  # within each programme the increments add up
        own = result.events[result.events["snapshot"] == snapshot]
        assert int(own["increment_days"].sum()) == row["increment_days"]
    assert (result.planned_completion, result.actual_completion) == (day("2025-01-15"), day("2025-01-18"))
    assert result.explained_days == 3 == result.total_days + int(updates["residual_days"].sum())


def test_a_programme_that_already_shows_the_event_is_flagged(tmp_path):
    result = analyse(load_case(two_update_case(tmp_path / "case")))
    warnings = dict(zip(result.events["event"], result.events["warnings"]))
    assert warnings["E0"] == [] and warnings["E1"] == []
    for event_id, adds in (("E3", 1), ("E2", 3)):
        (text,) = warnings[event_id]
        assert f"already shows C 3 work days later than Baseline (the event adds {adds})" in text


def test_tia_update_names_the_programme(tmp_path):
    # E2 with tia_update = u2 (the analyst's disclosed choice): u2 against Jan 17, C remaining
    #   2 + 3 = 5, Jan 14-18, F Jan 18: +1.  u1 (E3, E1): Jan 16 -> Jan 18, residual u2's Jan 17
    #   - Jan 18 = -1; u2: Jan 17 -> Jan 18, residual the as-built's Jan 18 - Jan 18 = 0.
    #   Increments 1 + 2 + 1 = 4, residuals 0 - 1 + 0 = -1: 3, the same actual delay.
    events = [{**e, "tia_update": "u2" if e["id"] == "E2" else ""} for e in EVENTS]
    result = analyse(load_case(two_update_case(tmp_path / "case", events)))
    events_by_id = result.events.set_index("event")
    assert dict(events_by_id["snapshot"]) == {"E0": "baseline", "E3": "u1", "E1": "u1", "E2": "u2"}
    assert int(events_by_id.loc["E2", "increment_days"]) == 1
    updates = result.updates.set_index("snapshot")
    assert dict(updates["residual_days"]) == {"baseline": 0, "u1": -1, "u2": 0}
    assert result.explained_days == 3


def test_increments_per_party(tmp_path):
    result = analyse(load_case(two_update_case(tmp_path / "case")))
    parties = result.by_party.set_index("party")
    assert dict(parties["increment_days"]) == {"neutral": 1, "employer": 2, "contractor": 2}


def test_events_apart_in_time_are_not_concurrent(tmp_path):
    from delay.causation import time_impact_causation

    case = load_case(two_update_case(tmp_path / "case"))
    table = time_impact_causation(case, analyse(case)).table
    assert int(table["concurrent_days"].sum()) == 0
    assert list(table["concurrent_with"]) == [""] * len(table)
    rows = table.set_index("step")
    assert int(table["days"].sum()) == 3
    # residual rows: u1's recovery (the contractor's) and u2's unexplained day
    residuals = table[table["basis"].isin(["residual", "recovery"])]
    assert [(r.party, int(r.days)) for r in residuals.itertuples()] == [("recovery", -3), ("unexplained", 1)]
    assert len(rows) == 6


def test_cli_json(tmp_path):
    run = CliRunner().invoke(tia, [str(two_update_case(tmp_path / "case")), "--format", "json"])
    assert run.exit_code == 0, run.output
    data = json.loads(run.stdout)
    assert (data["method"], data["planned_completion"], data["actual_completion"], data["explained_days"]) == (
        "tia",
        "2025-01-15",
        "2025-01-18",
        3,
    )
    assert [
        {
            k: u[k]
            for k in (
                "snapshot",
                "completion_before",
                "completion_after",
                "increment_days",
                "next_snapshot",
                "residual_days",
            )
        }
        for u in data["updates"]
    ] == [
        {
            "snapshot": "baseline",
            "completion_before": "2025-01-15",
            "completion_after": "2025-01-16",
            "increment_days": 1,
            "next_snapshot": "u1",
            "residual_days": 0,
        },
        {
            "snapshot": "u1",
            "completion_before": "2025-01-16",
            "completion_after": "2025-01-20",
            "increment_days": 4,
            "next_snapshot": "u2",
            "residual_days": -3,
        },
        {
            "snapshot": "u2",
            "completion_before": "2025-01-17",
            "completion_after": "2025-01-17",
            "increment_days": 0,
            "next_snapshot": "asbuilt",
            "residual_days": 1,
        },
    ]
    assert [{k: e[k] for k in ("event", "snapshot", "increment_days", "alone_days")} for e in data["events"]] == [
        {"event": "E0", "snapshot": "baseline", "increment_days": 1, "alone_days": 1},
        {"event": "E3", "snapshot": "u1", "increment_days": 1, "alone_days": 1},
        {"event": "E1", "snapshot": "u1", "increment_days": 1, "alone_days": 2},
        {"event": "E2", "snapshot": "u1", "increment_days": 2, "alone_days": 3},
    ]
    assert all(isinstance(e["warnings"], list) for e in data["events"])


def test_cli_table_with_the_cautions(tmp_path):
    run = CliRunner().invoke(tia, [str(two_update_case(tmp_path / "case"))])
    assert run.exit_code == 0, run.output
    text = run.stdout

    def cells(line):
        return [c.strip() for c in line.strip().strip("│").split("│")]

    rows = [cells(line) for line in text.splitlines() if line.count("│") >= 3]
    # programmes: programme, data date, completion, events, increments, impacted, next, its
    # completion, residual
    assert ["u1", "2025-01-11", "2025-01-16", "E3, E1, E2", "4", "2025-01-20", "u2", "2025-01-17", "-3"] in rows
    assert ["employer", "2"] in rows  # per party
    assert "need not add up" in text
    assert "not legal advice" in text
    assert "professional judgement" in text


def test_cli_bad_case_is_a_plain_input_error(tmp_path):
    root = two_update_case(tmp_path / "case")
    (root / "events.csv").write_text(
        "id,title,party,start,finish\nE1,Bad,nobody,2025-01-13,2025-01-13\n", encoding="utf-8"
    )
    run = CliRunner().invoke(tia, [str(root)])
    assert run.exit_code == 2
    assert "events.csv" in run.stderr and "party" in run.stderr
    assert "Traceback" not in run.output
    assert run.stdout == ""


def test_a_last_update_without_the_completion_activity_is_an_input_error(tmp_path):
    """With no as-built record the last update's forecast is the actual completion; an
    update that no longer holds the completion activity leaves nothing to reconcile the
    increments with: one input problem naming that update's file, no traceback."""
    root = tmp_path / "case"
    write_case(
        root,
        activities=[A, C, F],
        links=LINKS,
        schedule=SEVEN_DAY,
        snapshots={
            "u1": {
                "data_date": "2025-01-11",
                "activities": [progressed(A, "2025-01-06", None, 5), progressed(C, "2025-01-06", None, 6)],
                "links": [],
            }
        },
        files={"events.csv": EVENTS},
    )
    result = CliRunner().invoke(tia, [str(root)])
    assert result.exit_code == 2, result.output
    assert "snapshots/u1/activities.csv" in result.output and "'F'" in result.output
    assert "Traceback" not in result.output
