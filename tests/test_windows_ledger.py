"""The windows analysis under cross-examination: the work-day ledger, lateness by logic
alone, causes and risk, gains and acceleration, sections traced to their own milestones.

Sources
-------
- shared/case-format.md (version 2), "Time convention" and "Scheduling rules" (cited as
  "rule n"), and its activities ``risk``, attributions.csv, sections.csv and
  extensions_granted.csv sections.
- The rules as the project states them: ``delay.methods.windows`` ("windows doc"),
  ``delay.ledger`` ("ledger doc": levels against late finishes by logic alone in work days of
  the ledger calendar, charges along the driving chain, an activity that only carried a delay
  charged nothing, a link that reads a predecessor's start passing on its start level, the
  split into calendar days at completion), ``delay.events`` ("events doc": matching by the
  overlap of periods, then the activity's risk, then the unexplained-risk setting) and
  ``delay.causation`` ("causation doc": excusable + culpable delay - acceleration = the
  movement). These follow AACE International RP 29R-03 (2011), MIP 3.3/3.4, and the SCL
  Delay and Disruption Protocol, 2nd edition (2017), Part B (time-slice windows) and its
  guidance on float and acceleration (all recalled from memory).

Every case is our own and worked by hand in its comments; no value was read from the
code's output. Five-day calendar, January 2025 (Mon 2025-01-06 is work day k0):
    k:  0  1  2  3  4 | 5  6  7  8  9
 date: 06 07 08 09 10 |13 14 15 16 17          (11, 12 = Sat, Sun)
On the seven-day calendar work day k is 2025-01-06 + k.
"""

from __future__ import annotations

import datetime as dt

import pandas as pd
from casewriter import finish_milestone, link, progressed, task, write_case

from delay.case import load_case
from delay.causation import class_totals, windows_causation
from delay.entitlement import assess
from delay.methods.windows import analyse

SEVEN_DAY = {"default_calendar": "7d"}


def day(text):
    return dt.date.fromisoformat(text)


def charges(window):
    return window.charges.set_index("activity")


def only(result):
    (window,) = result.windows
    return window


# =======================================================================================
# 1. One activity slips on a five-day chain: only it is charged, with or without a milestone
#    constraint
#
# Baseline A3 -> B2 -> F (5-day): A k0-2 (Jan 06-08), B k3-4 (Jan 09-10), F Fri Jan 10.
# U1, data date Fri Jan 10: A Jan 06-09 (4 work days: 1 late); B Jan 10 and Mon Jan 13; F Jan 13.
# Late finishes by logic alone from F's own finish Jan 10: A Jan 08, B Jan 10.
#   Levels: A k3 - k2 = 1; B k5 - k4 = 1; F 1.  Charges: A 1; B and F kept their gaps and
#   durations: 0.  1 work day from Jan 10 is Mon Jan 13: 3 calendar days, all A's.
# With a latest_finish on F of Jan 08 (two days before its own forecast, in both programmes)
#   and one on A of Jan 07: the forward dates do not change, and lateness ignores the
#   constraints (ledger doc): every figure is the same.
def chain_case(root, constrained=False, files=None, risk=""):
    a, b, f = task("A", 3, risk=risk), task("B", 2), finish_milestone()
    if constrained:
        a = {**a, "constraint": "latest_finish", "constraint_date": "2025-01-07"}
        f = {**f, "constraint": "latest_finish", "constraint_date": "2025-01-08"}
    update = [progressed(a, "2025-01-06", "2025-01-09"), progressed(b), progressed(f)]
    write_case(
        root,
        activities=[a, b, f],
        links=[link("A", "B"), link("B", "F")],
        completion="2025-01-10",
        snapshots={"U1": {"data_date": "2025-01-10", "activities": update}},
        files=files,
    )
    return load_case(root)


def figures(window):
    frame = window.charges
    return (
        window.movement_days,
        window.movement_work_days,
        window.progress_days,
        window.revision_days,
        sorted(zip(frame["activity"], frame["work_days"], frame["days"], frame["party"])),
    )


def test_one_late_activity_is_charged_alone(tmp_path):
    window = only(analyse(chain_case(tmp_path / "case")))
    assert (window.movement_days, window.movement_work_days) == (3, 1)
    found = charges(window)
    assert {a: int(found.loc[a, "work_days"]) for a in "ABF"} == {"A": 1, "B": 0, "F": 0}
    assert {a: int(found.loc[a, "days"]) for a in "ABF"} == {"A": 3, "B": 0, "F": 0}
    assert {a: bool(found.loc[a, "inherited"]) for a in "ABF"} == {"A": False, "B": True, "F": True}


def test_milestone_constraints_change_no_figure(tmp_path):
    plain = only(analyse(chain_case(tmp_path / "plain")))
    constrained_case = chain_case(tmp_path / "constrained", constrained=True)
    constrained = only(analyse(constrained_case))
    assert figures(constrained) == figures(plain)
    # the constraints do show in the floats (negative float against F's Jan 08)
    from delay.cpm import schedule

    assert int(schedule(constrained_case).activities.set_index("id").loc["F", "total_float"]) < 0


# =======================================================================================
# 2. Risk: an activity of the employer's risk with no event is the employer's
#
# Case 1 with A's risk column "employer" (case format v2: e.g. employer-supplied information)
#   and no event: A's charge goes to the employer, basis "risk" (events doc).  Without the
#   column it goes to [analysis] unexplained_risk, default contractor, basis "unexplained".
def test_an_employer_risk_activity_is_charged_to_the_employer(tmp_path):
    found = charges(only(analyse(chain_case(tmp_path / "case", risk="employer"))))
    assert (found.loc["A", "party"], found.loc["A", "basis"], list(found.loc["A", "events"])) == (
        "employer",
        "risk",
        [],
    )
    plain = charges(only(analyse(chain_case(tmp_path / "plain"))))
    assert (plain.loc["A", "party"], plain.loc["A", "basis"]) == ("contractor", "unexplained")


def test_the_unexplained_risk_setting(tmp_path):
    root = tmp_path / "case"
    chain_case(root)
    text = (root / "case.toml").read_text(encoding="utf-8")
    (root / "case.toml").write_text(text + '\n[analysis]\nunexplained_risk = "neutral"\n', encoding="utf-8")
    found = charges(only(analyse(load_case(root))))
    assert (found.loc["A", "party"], found.loc["A", "basis"]) == ("neutral", "unexplained")


# =======================================================================================
# 3. The analyst's attribution overrides the rule, and both are listed
#
# Case 1 with attributions.csv: window U1, activity A, party employer ("Instruction AI-3
# suspended the work"): A's charge is the employer's, basis "analyst"; the rule gave the
# contractor (unexplained).  An attribution of B, which only carried A's delay, is listed
# with its 0 days.
def test_an_attribution_overrides_the_rule(tmp_path):
    files = {
        "attributions.csv": [
            {
                "window": "U1",
                "activity": "A",
                "event": "",
                "party": "employer",
                "reason": "Instruction AI-3 suspended the work",
            },
            {"window": "U1", "activity": "B", "event": "", "party": "employer", "reason": "B is not charged"},
        ]
    }
    result = analyse(chain_case(tmp_path / "case", files=files))
    found = charges(only(result))
    assert (found.loc["A", "party"], found.loc["A", "basis"]) == ("employer", "analyst")
    assert (found.loc["A", "rule_party"], found.loc["A", "rule_basis"]) == ("contractor", "unexplained")
    listed = result.attributions.set_index("activity")
    assert (listed.loc["A", "rule_party"], listed.loc["A", "party"], int(listed.loc["A", "days"])) == (
        "contractor",
        "employer",
        3,
    )
    assert int(listed.loc["B", "days"]) == 0


# =======================================================================================
# 4. A weekend crossed on another calendar is not charged to the completion milestone
#
# A3 (5-day) -> C3 (7-day curing) -> F (5-day finish milestone); the ledger calendar is F's.
# Baseline: A Mon Jan 06 - Wed Jan 08; C Thu Jan 09 - Sat Jan 11; F after C's finish on Sat Jan
#   11 goes through the date (rule 2): the boundary before F's next work day, Mon Jan 13, so F
#   is dated Fri Jan 10 (the work day it follows).  Late finishes by logic from F's Jan 10: C
#   Sun Jan 12 (its finish must end by the boundary before Mon Jan 13), A Wed Jan 08 ... C's
#   late start is Fri Jan 10, so A's late finish is Thu Jan 09 (float 1 on the 5-day ledger).
# U1, data date Sat Jan 11: A Jan 06 - Fri Jan 10 (5 work days: 2 late).  C Sat Jan 11 - Mon
#   Jan 13 (after A, FS, on its own calendar), F dated Mon Jan 13.  Movement Jan 10 -> Jan 13:
#   3 calendar days, 1 ledger work day (k4 -> k5).
# Levels (5-day ledger): A Fri Jan 10 (k4) past its late finish Thu Jan 09 (k3): 1; C Mon Jan
#   13 (k5) past Sun Jan 12 (ledger k4): 1; F 1.  C kept its gap (0) and its 3 days, F its
#   gap: both only carried A's delay.  Charges A 1 (3 calendar days), C 0, F 0.
#   (In calendar days, as before: A 1, C 1 - 1 = 0, and F 3 - 1 = 2 on the completion
#   milestone: the weekend.)
def test_a_weekend_on_another_calendar_goes_to_the_cause(tmp_path):
    a, c, f = task("A", 3), task("C", 3, calendar="7d"), finish_milestone()
    update = [progressed(a, "2025-01-06", "2025-01-10"), progressed(c), progressed(f)]
    write_case(
        tmp_path / "case",
        activities=[a, c, f],
        links=[link("A", "C"), link("C", "F")],
        completion="2025-01-10",
        snapshots={"U1": {"data_date": "2025-01-11", "activities": update}},
    )
    window = only(analyse(load_case(tmp_path / "case")))
    assert (window.completion_start, window.completion_end) == (day("2025-01-10"), day("2025-01-13"))
    assert (window.movement_days, window.movement_work_days) == (3, 1)
    found = charges(window)
    assert {x: int(found.loc[x, "work_days"]) for x in "ACF"} == {"A": 1, "C": 0, "F": 0}
    assert {x: int(found.loc[x, "days"]) for x in "ACF"} == {"A": 3, "C": 0, "F": 0}


# =======================================================================================
# 5. A start-to-start link passes on the predecessor's start, not its finish (7-day)
#
# Baseline: A5 (Jan 06-10) -SS+2-> B3 (Jan 08-10) -> F (Jan 10).  A's finish leads nowhere but
#   through F's end: its late finish is Jan 10; its late start, through B's late start Jan 08
#   less the lag, Jan 06.
# U1, data date Jan 12: A Jan 06-11 (6 days: its finish 1 late, its start on time); B started
#   Jan 08 and has 1 day left, Jan 12 (5 days for 3); F Jan 12.  Movement 2.
# Chain F <- B <- A (B's start Jan 08 = A's start + 2: gap 0).  A passes on its start level 0
#   (it started on time), so A is charged 0 and B, 2 late at its finish, is charged 2: B's own
#   extra days.  (Read at A's finish, A would have been charged 1 and B 1: A's overrun did not
#   hold B, which was free to start two days after A started.)
def test_a_start_to_start_link_passes_on_the_start(tmp_path):
    a, b, f = task("A", 5), task("B", 3), finish_milestone()
    update = [progressed(a, "2025-01-06", "2025-01-11"), progressed(b, "2025-01-08", None, 1), progressed(f)]
    write_case(
        tmp_path / "case",
        activities=[a, b, f],
        links=[link("A", "B", "SS", 2), link("B", "F")],
        schedule=SEVEN_DAY,
        completion="2025-01-10",
        snapshots={"U1": {"data_date": "2025-01-12", "activities": update}},
    )
    window = only(analyse(load_case(tmp_path / "case")))
    assert window.movement_days == 2
    found = charges(window)
    assert {x: int(found.loc[x, "work_days"]) for x in "ABF"} == {"A": 0, "B": 2, "F": 0}


# =======================================================================================
# 6. A real recovery by the contractor is acceleration: it does not cut the extension of time
#
# Baseline A5 -> B5 -> F (7-day): A Jan 06-10, B Jan 11-15, F Jan 15 = contract completion.
# EV1 (employer, Jan 06-12) names A.
# U1, data date Jan 13: A Jan 06-12 (7 days: 2 late, EV1).  B Jan 13-17, F Jan 17: +2.
# U2, data date Jan 15: B started Jan 13 with 2 days left, Jan 15-16 (4 days in all: a day
#   quicker than planned, no event); F Jan 16: -1.
# As-built: A Jan 06-12, B Jan 13-16, F Jan 16: the last window moves 0.
# Windows: W1 A +2 (EV1, employer); W2 B -1 (its own duration shrank: a gain, no event:
#   contractor, unexplained); W3 0.  Total +1 = Jan 16 - Jan 15.
# Classes (causation doc): excusable 2; the contractor's net -1: culpable delay 0,
#   acceleration 1; 2 + 0 - 1 = 1.
# Entitlement: with excusable delays Jan 15 + 2 = Jan 17; in force Jan 15; EoT 2, revised Jan
#   17; actual Jan 16: culpable days 0.  The extension exceeds the overrun (1) by exactly
#   the acceleration (1).
def test_a_real_recovery_is_acceleration(tmp_path):
    a, b, f = task("A", 5), task("B", 5), finish_milestone()
    u1 = [progressed(a, "2025-01-06", "2025-01-12"), progressed(b), progressed(f)]
    u2 = [progressed(a, "2025-01-06", "2025-01-12"), progressed(b, "2025-01-13", None, 2), progressed(f)]
    write_case(
        tmp_path / "case",
        activities=[a, b, f],
        links=[link("A", "B"), link("B", "F")],
        schedule=SEVEN_DAY,
        completion="2025-01-15",
        commercial={"liquidated_damages_per_day": 100},
        snapshots={
            "U1": {"data_date": "2025-01-13", "activities": u1},
            "U2": {"data_date": "2025-01-15", "activities": u2},
        },
        files={
            "events.csv": [
                {
                    "id": "EV1",
                    "title": "Late access",
                    "party": "employer",
                    "start": "2025-01-06",
                    "finish": "2025-01-12",
                    "activities": "A",
                    "impact": "extend",
                    "days": 2,
                }
            ],
            "asbuilt.csv": [
                {"id": "A", "actual_start": "2025-01-06", "actual_finish": "2025-01-12"},
                {"id": "B", "actual_start": "2025-01-13", "actual_finish": "2025-01-16"},
                {"id": "F", "actual_start": "2025-01-16", "actual_finish": "2025-01-16"},
            ],
        },
    )
    case = load_case(tmp_path / "case")
    result = analyse(case)
    assert [w.movement_days for w in result.windows] == [2, -1, 0]
    assert charges(result.windows[0]).loc["A", "party"] == "employer"
    second = charges(result.windows[1])
    assert (int(second.loc["B", "days"]), second.loc["B", "party"]) == (-1, "contractor")
    totals = class_totals(windows_causation(case, result).table)
    assert totals == {"excusable_days": 2, "compensable_days": 2, "culpable_delay_days": 0, "acceleration_days": 1}
    entitlement = assess(case, ["windows"], results={"windows": result}).method("windows")
    assert (entitlement.eot_days, entitlement.revised_completion, entitlement.ld_days) == (2, day("2025-01-17"), 0)
    assert entitlement.acceleration_days == 1
    assert entitlement.eot_days <= entitlement.overrun_days + entitlement.acceleration_days


# =======================================================================================
# 7. A section traced to its own milestone (7-day)
#
# Baseline: A5 -> F (Jan 06-10, F Jan 10) and C2 -> M1 (Jan 06-07, M1 Jan 07); sections.csv S1
#   marked by M1.  F, the finish milestone that finishes last, is the project's completion
#   activity.
# EV1 (employer, Jan 06-11) names A; EV2 (contractor, Jan 06-09) names C.
# U1, data date Jan 11: A started Jan 06 with 1 day left (Jan 11: +1), C Jan 06-09 (+2), M1 Jan
#   09 (complete).  F Jan 11.
# The whole works: F +1, charged to A (EV1, employer).  Section S1, traced from M1: +2,
#   charged to C (EV2, contractor): nothing of A's, nothing proportional.
def test_a_section_is_traced_to_its_own_milestone(tmp_path):
    a, f, c, m = task("A", 5), finish_milestone(), task("C", 2), finish_milestone("M1")
    update = [
        progressed(a, "2025-01-06", None, 1),
        progressed(f),
        progressed(c, "2025-01-06", "2025-01-09"),
        progressed(m, "2025-01-09", "2025-01-09"),
    ]
    events = [
        {
            "id": "EV1",
            "title": "Late access",
            "party": "employer",
            "start": "2025-01-06",
            "finish": "2025-01-11",
            "activities": "A",
            "impact": "extend",
            "days": 1,
        },
        {
            "id": "EV2",
            "title": "Slow gang",
            "party": "contractor",
            "start": "2025-01-06",
            "finish": "2025-01-09",
            "activities": "C",
            "impact": "extend",
            "days": 2,
        },
    ]
    write_case(
        tmp_path / "case",
        activities=[a, f, c, m],
        links=[link("A", "F"), link("C", "M1")],
        schedule=SEVEN_DAY,
        completion="2025-01-10",
        snapshots={"U1": {"data_date": "2025-01-11", "activities": update}},
        files={
            "events.csv": events,
            "sections.csv": [
                {
                    "section": "S1",
                    "name": "Car park",
                    "completion_activity": "M1",
                    "contract_completion": "2025-01-07",
                    "liquidated_damages_per_day": 100,
                }
            ],
        },
    )
    case = load_case(tmp_path / "case")
    result = analyse(case)
    whole = only(result)
    assert (whole.target, whole.movement_days) == ("F", 1)
    assert {r.activity: (int(r.days), r.party) for r in whole.counted.itertuples()} == {"A": (1, "employer")}
    (section,) = result.sections["S1"]
    assert (section.target, section.movement_days) == ("M1", 2)
    assert {r.activity: (int(r.days), r.party) for r in section.counted.itertuples()} == {"C": (2, "contractor")}
    table = windows_causation(case, result, section="S1").table
    assert class_totals(table)["culpable_delay_days"] == 2 and class_totals(table)["excusable_days"] == 0
    one = assess(case, ["windows"], results={"windows": result}).method("windows").sections.set_index("section")
    assert (one.loc["S1", "excusable_days"], one.loc["S1", "ld_days"], one.loc["S1", "ld_exposure"]) == (0, 2, 200.0)


# =======================================================================================
# 8. Float taken up along the chain is not a gain (7-day)
#
# Baseline: A2 -> X6 -> F and A2 -> B2 -> D2 -> F.  A Jan 06-07; X Jan 08-13; B Jan 08-09; D Jan
#   10-11; F Jan 13.  B and D have 2 days of float (late finishes B Jan 11, D Jan 13).
# U1, data date Jan 15: A Jan 06-08 (3 days: +1); X Jan 09-14 (on time after A); B Jan 09-11
#   (3 days: it started a day late and took a day longer, both inside its float); D started
#   Jan 12 with 2 days left, Jan 15-16 (5 days for 2); F Jan 16.  Movement 3.
# Chain F <- D <- B <- A.  Levels: A Jan 08 - Jan 07 = 1; B Jan 11 - Jan 11 = 0 (in its float);
#   D Jan 16 - Jan 13 = 3; F 3.  Raw differences: A 1, B -1, D 3, F 0.  B did not gain (it took
#   longer): its -1 is float that took up A's day (ledger doc), so it cancels A's 1: A 0, B 0,
#   D 3, F 0.  Nothing of A's reached completion; no one is credited a gain.
def test_float_taken_up_is_not_a_gain(tmp_path):
    a, x, b, d, f = task("A", 2), task("X", 6), task("B", 2), task("D", 2), finish_milestone()
    update = [
        progressed(a, "2025-01-06", "2025-01-08"),
        progressed(x, "2025-01-09", "2025-01-14"),
        progressed(b, "2025-01-09", "2025-01-11"),
        progressed(d, "2025-01-12", None, 2),
        progressed(f),
    ]
    write_case(
        tmp_path / "case",
        activities=[a, x, b, d, f],
        links=[link("A", "X"), link("X", "F"), link("A", "B"), link("B", "D"), link("D", "F")],
        schedule=SEVEN_DAY,
        completion="2025-01-13",
        snapshots={"U1": {"data_date": "2025-01-15", "activities": update}},
    )
    window = only(analyse(load_case(tmp_path / "case")))
    assert window.movement_days == 3
    found = charges(window)
    counted = found[found["counted"].astype(bool)]
    assert {x: int(counted.loc[x, "level"]) for x in "ABDF"} == {"A": 1, "B": 0, "D": 3, "F": 3}
    assert {x: int(counted.loc[x, "days"]) for x in "ABDF"} == {"A": 0, "B": 0, "D": 3, "F": 0}


# =======================================================================================
# 9. The window's JSON has a flag for the counted charges and a sentence
def test_the_window_in_words(tmp_path):
    window = only(analyse(chain_case(tmp_path / "case", risk="employer")))
    assert window.sentence == (
        "Window 1 (Baseline to U1): completion moved 3 days later; A drove it by 3 days "
        "(no event; the activity is employer risk)."
    )
    data = window.to_json()
    assert sum(c["days"] for c in data["charged"] if c["counted"]) == data["progress_days"] == 3
    assert data["by_party_days"] == {"employer": 3}
    assert isinstance(pd.Timestamp(data["completion_end"]), pd.Timestamp)
