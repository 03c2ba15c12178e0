"""Method comparison and sensitivity on a hand-worked concurrent case.

The case (7-day calendar, so work days are calendar days; time convention of
shared/case-format.md): START (start milestone, Mon 2025-01-06) -> A (5 days) -> F (finish
milestone) and START -> B (5 days) -> F. Baseline: A and B occupy Jan 6..10, F is dated Fri
Jan 10, the contract completion is Jan 10 (no float to spare).

Events: E1 (employer) extends A by 3 days from Jan 6; C1 (contractor) extends B by 3 days
from Jan 7. The as-built record has A and B both finishing Jan 13 and F on Jan 13: the works
finished 3 days late, with the employer's and the contractor's delays concurrent on parallel
paths.

Impacted as-planned, worked by hand: E1 alone moves F to Jan 13 (+3); C1 alone also +3.
Chronologically E1 (+3) then C1 (+0: B's 3 extra days now run beside A's). Increments 3 + 0
add up to the cumulative impact 3; impacts alone (6) need not add up.

Causation (delay.causation's rule for the modelled methods: the day at position p of the
cumulative run has as causes the event whose increment covers it and every event whose period
overlaps that event's and whose impact alone reaches p): E1 (Jan 6-8) and C1 (Jan 7-9)
overlap and C1 alone reaches days 1-3, so the 3 days are concurrent between the employer and
the contractor.
- time_not_money (SCL Protocol 2017, concurrency: time but not money, as recalled): a day
  with an employer cause is excusable, compensable only if every cause is the employer's:
  extension of time = 10 Jan + 3 - 10 Jan = 3 days, compensable 0, culpable 0.
- apportion: the 3 concurrent days split pro rata to the impacts alone 3 : 3 by largest
  remainder, the tied day going to the earlier cause (E1): employer 2, contractor 1, so
  2 days are excusable and compensable, 1 culpable.
The progress mode cannot matter here: nothing is out of sequence.
"""

from __future__ import annotations

import pytest
from casewriter import write_case

from delay.case import load_case
from delay.comparison import available_methods, compare_methods, sensitivity

SEVEN = {"calendar": "7d", "workdays": "Mon Tue Wed Thu Fri Sat Sun"}


@pytest.fixture()
def case(tmp_path):
    activities = [
        {"id": "START", "name": "Start", "duration": 0, "kind": "start_milestone", "calendar": "7d"},
        {"id": "A", "name": "Path A", "duration": 5, "calendar": "7d"},
        {"id": "B", "name": "Path B", "duration": 5, "calendar": "7d"},
        {"id": "F", "name": "Finish", "duration": 0, "kind": "finish_milestone", "calendar": "7d"},
    ]
    links = [
        {"pred": "START", "succ": "A"},
        {"pred": "START", "succ": "B"},
        {"pred": "A", "succ": "F"},
        {"pred": "B", "succ": "F"},
    ]
    root = write_case(
        tmp_path / "case",
        activities=activities,
        links=links,
        start="2025-01-06",
        completion="2025-01-10",
        schedule={"default_calendar": "7d"},
        calendars=[SEVEN],
        files={
            "events.csv": [
                {
                    "id": "E1",
                    "title": "Late drawings",
                    "party": "employer",
                    "start": "2025-01-06",
                    "finish": "2025-01-08",
                    "activities": "A",
                    "impact": "extend",
                    "days": 3,
                },
                {
                    "id": "C1",
                    "title": "Slow gang",
                    "party": "contractor",
                    "start": "2025-01-07",
                    "finish": "2025-01-09",
                    "activities": "B",
                    "impact": "extend",
                    "days": 3,
                },
            ],
            "asbuilt.csv": [
                {"id": "START", "actual_start": "2025-01-06", "actual_finish": "2025-01-06"},
                {"id": "A", "actual_start": "2025-01-06", "actual_finish": "2025-01-13"},
                {"id": "B", "actual_start": "2025-01-06", "actual_finish": "2025-01-13"},
                {"id": "F", "actual_start": "2025-01-13", "actual_finish": "2025-01-13"},
            ],
        },
    )
    return load_case(root)


def test_available_methods_follow_the_records(case):
    # two snapshots (baseline and as-built), a register and an as-built record: all four
    assert available_methods(case) == ["windows", "impacted", "tia", "collapsed"]


def test_impacted_column_and_headline(case):
    result = compare_methods(case)
    by_party = result.by_party.set_index("party")
    # impacted as-planned: the 3 days are concurrent (see the module docstring)
    assert int(by_party["impacted"].sum()) == 3
    headline = result.headline.set_index("method")
    assert int(headline.loc["impacted", "eot_days"]) == 3
    assert int(headline.loc["impacted", "compensable_days"]) == 0
    assert int(headline.loc["impacted", "ld_days"]) == 0
    assert int(headline.loc["impacted", "concurrent_days"]) == 3
    # every method explains the delay it measures; the table says so per method
    assert int(headline.loc["collapsed", "explained_days"]) == 3  # actual Jan 13 less planned Jan 10
    by_event = result.by_event.set_index("event")
    # the collapsed as-built gives each event its own but-for days (0: the other event's delay
    # still holds completion) and the 3 days concurrent between the parties once, on the
    # group's row, not against each event (issue on the modelled methods, item 6)
    assert set(by_event.index) == {"E1", "C1", "concurrent group"}
    assert (int(by_event.loc["E1", "collapsed"]), int(by_event.loc["C1", "collapsed"])) == (0, 0)
    assert int(by_event.loc["concurrent group", "collapsed"]) == 3
    assert int(by_event.loc["concurrent group", "impacted"]) == 0
    assert result.explanation and "professional judgement" in result.explanation[-1]


def test_sensitivity_shows_what_rests_on_the_concurrency_rule(case):
    table = sensitivity(case, ["impacted"]).set_index("variant")
    as_set = table.loc["as set"]
    assert (as_set["eot_days"], as_set["compensable_days"], as_set["ld_days"]) == (3, 0, 0)
    other_rule = table.loc["other concurrency rule"]
    assert other_rule["concurrency"] == "apportion"
    # apportioned 2 : 1 by largest remainder, the tie to the earlier cause (module docstring)
    assert (other_rule["eot_days"], other_rule["compensable_days"], other_rule["ld_days"]) == (2, 2, 1)
    assert bool(other_rule["changed"])
    other_mode = table.loc["other progress mode"]
    assert other_mode["progress"] == "progress_override"
    assert not bool(other_mode["changed"])
