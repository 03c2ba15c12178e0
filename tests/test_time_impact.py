"""Acceptance tests of the time impact analysis and ``delay tia``, worked by hand.

Sources
-------
- shared/case-format.md, "Time convention" and "Scheduling rules" (cited as "rule n"),
  in particular rule 3 (an activity in progress keeps its actual start; its remaining work
  starts no earlier than the data date) and the events.csv section (``extend``).
- The method's definitions in the docstring of ``delay.methods.time_impact`` (cited as
  "tia doc"): an event's *current* programme is the last snapshot (baseline or update)
  whose data date is on or before the event's start; the event is modelled there as
  impacted as-planned models it (``delay.methods.impacted``: ``extend`` adds to the
  remaining duration of a started activity) and measured against that update's own
  completion; events sharing an update are inserted cumulatively in chronological order
  (start, finish, register row) and their increments add up to the update's cumulative
  impact; impacts alone need not add up.
- The method itself: AACE International RP 29R-03 (2011), MIP 3.7, and the SCL Delay and
  Disruption Protocol, 2nd edition (2017), Part B, time impact analysis (both recalled from
  memory).

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

Events and their current programmes (tia doc):
  E0 neutral,    start Jan 08: baseline (Jan 06 <= Jan 08 < Jan 11).  extend A by 1.
  E3 employer,   start Jan 12: u1 (Jan 11 <= Jan 12 < Jan 14).           extend C by 1.
  E1 employer,   start Jan 13: u1.                                       extend A by 3.
  E2 contractor, start Jan 14 = u2's data date: u2 ("on or before").     extend C by 3.

Baseline, against Jan 15:
  E0: A 11 days Jan 06-16, F Jan 16: alone +1, increment +1.  Baseline: Jan 15 -> Jan 16, 1.
u1, against Jan 16 (E3 before E1: starts Jan 12 < Jan 13):
  E3 alone: C remaining 7, Jan 11-17, F Jan 17: +1.
  E1 alone: A remaining 5 + 3 = 8, Jan 11-18, F Jan 18: +2.
  cumulative: after E3 Jan 17 (+1); after E3+E1: A Jan 18, C Jan 17 -> Jan 18 (+1).
  u1: Jan 16 -> Jan 18, 2 = 1 + 1 (impacts alone add to 3).
u2, against Jan 17:
  E2: C remaining 2 + 3 = 5, Jan 14-18, F Jan 18: alone +1, increment +1.  u2: Jan 17 -> Jan 18, 1.
Total over the updates: 1 + 2 + 1 = 4.  Increments per party: neutral 1, employer 2,
contractor 1.

Cross-checks that the figures tell the rules apart: E1 in the baseline would give A 13
days, Jan 06-18, +3 against Jan 15 (not 2); E2 in u1 would give C remaining 9, Jan 11-19,
+3 against Jan 16 (not 1); E0 in u1 would give A remaining 6, Jan 11-16, +0 (not 1).
"""

from __future__ import annotations

import datetime as dt
import json

from click.testing import CliRunner

from casewriter import write_case
from delay.case import load_case
from delay.commands.modelled import tia
from delay.methods.time_impact import analyse

SEVEN_DAY = {"default_calendar": "7d"}

A = {"id": "A", "name": "Work A", "duration": 10}
C = {"id": "C", "name": "Work C", "duration": 8}
F = {"id": "F", "name": "Completion", "duration": 0, "kind": "finish_milestone"}
LINKS = [{"pred": "A", "succ": "F", "type": "FS", "lag": 0}, {"pred": "C", "succ": "F", "type": "FS", "lag": 0}]


def progressed(row, actual_start=None, actual_finish=None, remaining=None):
    return {**row, "actual_start": actual_start, "actual_finish": actual_finish, "remaining": remaining}


def event(event_id, party, start, finish, activities, days):
    return {"id": event_id, "title": f"Event {event_id}", "party": party, "start": start, "finish": finish,
            "activities": activities, "impact": "extend", "days": days}


EVENTS = [
    event("E1", "employer", "2025-01-13", "2025-01-13", "A", 3),
    event("E2", "contractor", "2025-01-14", "2025-01-15", "C", 3),
    event("E0", "neutral", "2025-01-08", "2025-01-09", "A", 1),
    event("E3", "employer", "2025-01-12", "2025-01-12", "C", 1),
]


def two_update_case(root):
    write_case(root, activities=[A, C, F], links=LINKS, schedule=SEVEN_DAY, snapshots={
        "u1": {"data_date": "2025-01-11", "activities": [
            progressed(A, "2025-01-06", None, 5), progressed(C, "2025-01-06", None, 6), progressed(F)]},
        "u2": {"data_date": "2025-01-14", "activities": [
            progressed(A, "2025-01-06", None, 4), progressed(C, "2025-01-06", None, 2), progressed(F)]},
    }, files={"events.csv": EVENTS})
    return root


def day(text):
    return dt.date.fromisoformat(text)


def test_events_go_into_the_update_current_when_they_began(tmp_path):
    result = analyse(load_case(two_update_case(tmp_path / "case")))
    events = result.events.set_index("id")
    assert list(result.events["id"]) == ["E0", "E3", "E1", "E2"]
    assert dict(events["snapshot"]) == {"E0": "baseline", "E3": "u1", "E1": "u1", "E2": "u2"}
    assert dict(events["completion_before"]) == {"E0": day("2025-01-15"), "E3": day("2025-01-16"),
                                                 "E1": day("2025-01-16"), "E2": day("2025-01-17")}
    assert dict(events["alone_days"]) == {"E0": 1, "E3": 1, "E1": 2, "E2": 1}
    assert dict(events["cumulative_days"]) == {"E0": 1, "E3": 1, "E1": 1, "E2": 1}
    assert dict(events["completion_after"]) == {"E0": day("2025-01-16"), "E3": day("2025-01-17"),
                                                "E1": day("2025-01-18"), "E2": day("2025-01-18")}
    assert result.total_days == 4


def test_each_update_is_measured_against_its_own_completion(tmp_path):
    result = analyse(load_case(two_update_case(tmp_path / "case")))
    updates = result.updates.set_index("snapshot")
    assert list(updates.index) == ["baseline", "u1", "u2"]
    assert dict(updates["completion_before"]) == {"baseline": day("2025-01-15"), "u1": day("2025-01-16"),
                                                  "u2": day("2025-01-17")}
    assert dict(updates["completion_after"]) == {"baseline": day("2025-01-16"), "u1": day("2025-01-18"),
                                                 "u2": day("2025-01-18")}
    assert dict(updates["cumulative_days"]) == {"baseline": 1, "u1": 2, "u2": 1}
    assert [list(e) for e in updates["events"]] == [["E0"], ["E3", "E1"], ["E2"]]
    # within each update the increments add up to its cumulative impact
    for snapshot, row in updates.iterrows():
        own = result.events[result.events["snapshot"] == snapshot]
        assert int(own["cumulative_days"].sum()) == row["cumulative_days"]


def test_increments_per_party(tmp_path):
    result = analyse(load_case(two_update_case(tmp_path / "case")))
    parties = result.by_party.set_index("party")
    assert dict(parties["cumulative_days"]) == {"neutral": 1, "employer": 2, "contractor": 1}


def test_cli_json(tmp_path):
    run = CliRunner().invoke(tia, [str(two_update_case(tmp_path / "case")), "--format", "json"])
    assert run.exit_code == 0, run.output
    assert json.loads(run.stdout) == {
        "updates": [
            {"snapshot": "baseline", "data_date": "2025-01-06", "completion_before": "2025-01-15",
             "completion_after": "2025-01-16", "events": ["E0"], "cumulative_days": 1},
            {"snapshot": "u1", "data_date": "2025-01-11", "completion_before": "2025-01-16",
             "completion_after": "2025-01-18", "events": ["E3", "E1"], "cumulative_days": 2},
            {"snapshot": "u2", "data_date": "2025-01-14", "completion_before": "2025-01-17",
             "completion_after": "2025-01-18", "events": ["E2"], "cumulative_days": 1},
        ],
        "events": [
            {"id": "E0", "party": "neutral", "snapshot": "baseline", "alone_days": 1, "cumulative_days": 1,
             "completion_after": "2025-01-16"},
            {"id": "E3", "party": "employer", "snapshot": "u1", "alone_days": 1, "cumulative_days": 1,
             "completion_after": "2025-01-17"},
            {"id": "E1", "party": "employer", "snapshot": "u1", "alone_days": 2, "cumulative_days": 1,
             "completion_after": "2025-01-18"},
            {"id": "E2", "party": "contractor", "snapshot": "u2", "alone_days": 1, "cumulative_days": 1,
             "completion_after": "2025-01-18"},
        ],
        "total_days": 4,
    }


def test_cli_table_with_the_cautions(tmp_path):
    run = CliRunner().invoke(tia, [str(two_update_case(tmp_path / "case"))])
    assert run.exit_code == 0, run.output
    text = run.stdout

    def cells(line):
        return [c.strip() for c in line.strip().strip("│").split("│")]

    rows = [cells(line) for line in text.splitlines() if line.count("│") >= 3]
    # updates table: update, data date, completion before, completion after, events, cumulative
    assert ["u1", "2025-01-11", "2025-01-16", "2025-01-18", "E3, E1", "2"] in rows
    assert ["employer", "2"] in rows  # per party
    assert "need not add up" in text
    assert "not legal advice" in text
    assert "professional judgement" in text


def test_cli_bad_case_is_a_plain_input_error(tmp_path):
    root = two_update_case(tmp_path / "case")
    (root / "events.csv").write_text("id,title,party,start,finish\nE1,Bad,nobody,2025-01-13,2025-01-13\n",
                                     encoding="utf-8")
    run = CliRunner().invoke(tia, [str(root)])
    assert run.exit_code == 2
    assert "events.csv" in run.stderr and "party" in run.stderr
    assert "Traceback" not in run.output
    assert run.stdout == ""
