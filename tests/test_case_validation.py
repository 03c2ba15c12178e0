"""One small broken case per validation rule of case-format v1 (docs/case-format.md).

Each test starts from the valid case of test_case_support (which itself must load: see
test_the_full_case_is_valid), breaks one thing, and checks that the problem names the
file, the spreadsheet row (header = row 1, first data row = 2) and the column. The rules
are those of the case format; the row numbers are counted by hand from the rows written.
"""

from __future__ import annotations

import copy

import pandas as pd
import pytest
from casewriter import write_csv, write_text, write_toml
from test_case_support import (
    ACTIVITIES,
    FILES,
    LINKS,
    UPDATE,
    make_case,
    problem_at,
    problems_of,
)

from delay.case import load_case
from delay.errors import MAX_PROBLEMS_PER_FILE

BASE = "snapshots/baseline/activities.csv"
BASE_LINKS = "snapshots/baseline/links.csv"
U1 = "snapshots/u1/activities.csv"


def with_row(rows, index, **changes):
    rows = copy.deepcopy(rows)
    rows[index].update(changes)
    return rows


def update_with(index, **changes):
    update = copy.deepcopy(UPDATE)
    update["u1"]["activities"][index].update(changes)
    return update


def test_the_full_case_is_valid(tmp_path):
    # The starting point of every test below must itself load without a problem.
    case = load_case(make_case(tmp_path))
    assert [s.folder for s in case.snapshots] == ["baseline", "u1"]


# ----------------------------------------------------------------- files and columns


def test_missing_required_file(tmp_path):
    root = make_case(tmp_path)
    (root / "calendars.csv").unlink()
    problem_at(root, "calendars.csv", None, None, "missing")


def test_missing_snapshot_file(tmp_path):
    root = make_case(tmp_path)
    (root / "snapshots" / "u1" / "links.csv").unlink()
    problem_at(root, "snapshots/u1/links.csv", None, None, "missing")


def test_missing_required_column(tmp_path):
    rows = [{k: v for k, v in row.items() if k != "duration"} for row in ACTIVITIES]
    root = make_case(tmp_path)
    write_csv(root / BASE, rows)
    problem_at(root, BASE, 1, "duration", "required column")


def test_missing_column_of_optional_file(tmp_path):
    rows = [{k: v for k, v in row.items() if k != "party"} for row in FILES["events.csv"]]
    root = make_case(tmp_path, files={"events.csv": rows})
    problem_at(root, "events.csv", 1, "party", "required column")


def test_row_longer_than_header(tmp_path):
    root = make_case(tmp_path)
    write_text(root, BASE_LINKS, "pred,succ\nA,B\nB,M,FS\n")
    problem_at(root, BASE_LINKS, 3, None, "more than the header")


def test_duplicate_column_in_header(tmp_path):
    root = make_case(tmp_path)
    write_text(root, BASE_LINKS, "pred,succ,succ\nA,B,B\n")
    problem_at(root, BASE_LINKS, 1, "succ", "twice")


def test_bad_toml_names_the_file(tmp_path):
    root = make_case(tmp_path)
    write_text(root, "case.toml", "[project]\nname = \n")
    problem_at(root, "case.toml", None, None, "not valid toml")


# ----------------------------------------------------------------- activities


def test_blank_activity_id(tmp_path):
    root = make_case(
        tmp_path, activities=with_row(ACTIVITIES, 1, id=""), links=[{"pred": "A", "succ": "M"}], snapshots={}
    )
    problem_at(root, BASE, 3, "id", "no id")


def test_duplicate_activity_id(tmp_path):
    rows = ACTIVITIES + [{"id": "B", "name": "Second B", "duration": 1}]
    root = make_case(tmp_path, activities=rows, snapshots={})
    problem = problem_at(root, BASE, 5, "id", "given twice")
    assert "row 3" in problem.message  # the first B is on row 3


def test_negative_duration(tmp_path):
    root = make_case(tmp_path, activities=with_row(ACTIVITIES, 0, duration=-2), snapshots={})
    problem_at(root, BASE, 2, "duration", "below 0")


def test_fractional_duration(tmp_path):
    root = make_case(tmp_path, activities=with_row(ACTIVITIES, 1, duration="2.5"), snapshots={})
    problem_at(root, BASE, 3, "duration", "not a whole number")


def test_duration_not_a_number(tmp_path):
    root = make_case(tmp_path, activities=with_row(ACTIVITIES, 1, duration="two"), snapshots={})
    problem_at(root, BASE, 3, "duration", "not a number")


def test_blank_duration(tmp_path):
    root = make_case(tmp_path, activities=with_row(ACTIVITIES, 1, duration=""), snapshots={})
    problem_at(root, BASE, 3, "duration", "missing")


def test_unknown_calendar_in_activities(tmp_path):
    root = make_case(tmp_path, activities=with_row(ACTIVITIES, 0, calendar="6d"), snapshots={})
    problem_at(root, BASE, 2, "calendar", "'6d' is not in calendars.csv")


def test_unknown_kind(tmp_path):
    root = make_case(tmp_path, activities=with_row(ACTIVITIES, 2, kind="hammock"), snapshots={})
    problem_at(root, BASE, 4, "kind", "not a known activity kind")


def test_milestone_kind_with_duration(tmp_path):
    # Scheduling rule 1 of the case format: a milestone kind with duration > 0 is an error.
    root = make_case(tmp_path, activities=with_row(ACTIVITIES, 2, duration=2), snapshots={})
    problem_at(root, BASE, 4, "duration", "cannot have a duration")


def test_constraint_without_date(tmp_path):
    root = make_case(tmp_path, activities=with_row(ACTIVITIES, 1, constraint="latest_finish"), snapshots={})
    problem_at(root, BASE, 3, "constraint_date", "has no date")


def test_unknown_constraint(tmp_path):
    rows = with_row(ACTIVITIES, 1, constraint="must_finish_by", constraint_date="2025-03-03")
    root = make_case(tmp_path, activities=rows, snapshots={})
    problem_at(root, BASE, 3, "constraint", "not a known constraint")


def test_constraint_date_without_constraint(tmp_path):
    rows = with_row(ACTIVITIES, 1, constraint="", constraint_date="2025-03-03")
    root = make_case(tmp_path, activities=rows, snapshots={})
    problem_at(root, BASE, 3, "constraint", "without a constraint")


def test_snapshot_without_activities(tmp_path):
    root = make_case(
        tmp_path,
        activities=[],
        links=[],
        snapshots={},
        files={
            "asbuilt.csv": [],
            "events.csv": [],
            "fragnets.csv": [],
            "fragnet_links.csv": [],
            "sections.csv": [],
            "extensions_granted.csv": [],
        },
    )
    write_text(root, BASE, "id,name,duration\n")
    problem_at(root, BASE, None, None, "no activities")


# ----------------------------------------------------------------- progress


def test_actual_finish_before_actual_start(tmp_path):
    root = make_case(tmp_path, snapshots=update_with(0, actual_finish="2025-01-03"))
    problem_at(root, U1, 2, "actual_finish", "before the actual start")


def test_actual_finish_one_day_before_start(tmp_path):
    # The boundary: B started 2025-01-09; a finish on 2025-01-08 is a day too early.
    update = update_with(1, actual_finish="2025-01-08", remaining=0)
    problem_at(make_case(tmp_path, snapshots=update), U1, 3, "actual_finish", "before the actual start")


def test_one_day_task_starts_and_finishes_on_the_same_date(tmp_path):
    # Time convention of the format: "a one-day task starts and finishes on the same date".
    update = update_with(1, actual_finish="2025-01-09", remaining=0)
    case = load_case(make_case(tmp_path, snapshots=update))
    assert case.snapshot("u1").activities["actual_finish"].iat[1] == pd.Timestamp("2025-01-09")


def test_actual_finish_without_actual_start(tmp_path):
    # "An actual finish needs an actual start (tasks)": scheduling rule 3 of the format.
    root = make_case(tmp_path, snapshots=update_with(0, actual_start=""))
    problem_at(root, U1, 2, "actual_start", "no actual start")


def test_milestone_may_have_actual_finish_alone(tmp_path):
    # A milestone has one date (rule 1); the finish alone records it. Both dates then
    # hold that date.
    update = update_with(2, actual_finish="2025-01-31", remaining="")
    update = copy.deepcopy(update)
    update["u1"]["activities"][1].update(actual_finish="2025-01-30", remaining=0)
    case = load_case(make_case(tmp_path, snapshots=update))
    milestone = case.snapshot("u1").activities.set_index("id").loc["M"]
    assert str(milestone["actual_start"].date()) == "2025-01-31"
    assert str(milestone["actual_finish"].date()) == "2025-01-31"


def test_actual_start_on_data_date(tmp_path):
    # "actual dates on or after the data date are an input error": u1's data date is
    # 2025-02-03, so a start on that very day is wrong.
    root = make_case(tmp_path, snapshots=update_with(1, actual_start="2025-02-03"))
    problem_at(root, U1, 3, "actual_start", "on or after the data date")


def test_actual_finish_after_data_date(tmp_path):
    root = make_case(tmp_path, snapshots=update_with(0, actual_finish="2025-02-10"))
    problem_at(root, U1, 2, "actual_finish", "on or after the data date")


def test_finished_activity_with_remaining(tmp_path):
    root = make_case(tmp_path, snapshots=update_with(0, remaining=2))
    problem_at(root, U1, 2, "remaining", "finished")


def test_in_progress_without_remaining(tmp_path):
    root = make_case(tmp_path, snapshots=update_with(1, remaining=""))
    problem_at(root, U1, 3, "remaining", "no remaining")


def test_in_progress_with_zero_remaining(tmp_path):
    # Rule 3: "An activity in progress must give remaining > 0".
    root = make_case(tmp_path, snapshots=update_with(1, remaining=0))
    problem_at(root, U1, 3, "remaining", "remaining 0")


def test_remaining_not_whole(tmp_path):
    root = make_case(tmp_path, snapshots=update_with(1, remaining="1.5"))
    problem_at(root, U1, 3, "remaining", "not a whole number")


def test_remaining_negative(tmp_path):
    root = make_case(tmp_path, snapshots=update_with(2, remaining=-1))
    problem_at(root, U1, 4, "remaining", "below 0")


# ----------------------------------------------------------------- links


def test_link_to_unknown_activity(tmp_path):
    root = make_case(tmp_path, links=LINKS + [{"pred": "A", "succ": "Z9"}], snapshots={})
    problem_at(root, BASE_LINKS, 4, "succ", "'Z9' is not an activity")


def test_link_from_unknown_activity(tmp_path):
    root = make_case(tmp_path, links=[{"pred": "Q", "succ": "B"}] + LINKS, snapshots={})
    problem_at(root, BASE_LINKS, 2, "pred", "'Q' is not an activity")


def test_duplicate_link(tmp_path):
    # The same predecessor > successor pair twice is a duplicate, whatever its type.
    links = LINKS + [{"pred": "A", "succ": "B", "type": "SS", "lag": 1}]
    root = make_case(tmp_path, links=links, snapshots={})
    problem = problem_at(root, BASE_LINKS, 4, "pred", "given twice")
    assert "row 2" in problem.message


def test_unknown_link_type(tmp_path):
    root = make_case(tmp_path, links=with_row(LINKS, 1, type="FX"), snapshots={})
    problem_at(root, BASE_LINKS, 3, "type", "not a known link type")


def test_fractional_lag(tmp_path):
    root = make_case(tmp_path, links=with_row(LINKS, 0, lag="1.5"), snapshots={})
    problem_at(root, BASE_LINKS, 2, "lag", "not a whole number")


def test_negative_lag_is_a_lead_and_allowed(tmp_path):
    case = load_case(make_case(tmp_path, links=with_row(LINKS, 0, lag=-2), snapshots={}))
    assert case.baseline.links["lag"].tolist() == [-2, 0]


def test_link_to_itself(tmp_path):
    root = make_case(tmp_path, links=LINKS + [{"pred": "B", "succ": "B"}], snapshots={})
    problem_at(root, BASE_LINKS, 4, "succ", "to itself")


def test_logic_loop_names_every_activity_in_order(tmp_path):
    # Activities A, B, C, D; links A>B, B>C, C>A form a loop, D hangs off C. Walking the
    # links from A gives A -> B -> C and back to A (worked out by hand).
    activities = [{"id": i, "name": i, "duration": 1} for i in "ABCD"]
    links = [
        {"pred": "A", "succ": "B"},
        {"pred": "B", "succ": "C"},
        {"pred": "C", "succ": "D"},
        {"pred": "C", "succ": "A"},
    ]
    root = make_case(
        tmp_path,
        activities=activities,
        links=links,
        snapshots={},
        drop=("asbuilt.csv", "sections.csv", "extensions_granted.csv"),
    )
    problem = problem_at(root, BASE_LINKS, 2, "pred", "logic loop")
    assert problem.message == "logic loop: A -> B -> C -> A"


def test_logic_loop_in_an_update(tmp_path):
    update = copy.deepcopy(UPDATE)
    update["u1"]["links"] = LINKS + [{"pred": "M", "succ": "A"}]
    root = make_case(tmp_path, snapshots=update)
    problem = problem_at(root, "snapshots/u1/links.csv", 2, "pred", "logic loop")
    assert problem.message == "logic loop: A -> B -> M -> A"


# ----------------------------------------------------------------- snapshots


def test_snapshot_without_data_date(tmp_path):
    update = copy.deepcopy(UPDATE)
    update["u1"]["data_date"] = None
    root = make_case(tmp_path, snapshots=update)
    problem_at(root, "snapshots/u1/snapshot.toml", None, "data_date", "no data date")


def test_two_snapshots_with_the_same_data_date(tmp_path):
    update = copy.deepcopy(UPDATE)
    update["u2"] = {**copy.deepcopy(update["u1"]), "label": "Update 02"}
    root = make_case(tmp_path, snapshots=update)
    problem_at(root, "snapshots/u2/snapshot.toml", None, "data_date", "also the data date")


def test_update_before_the_baseline(tmp_path):
    update = copy.deepcopy(UPDATE)
    update["u0"] = {"data_date": "2024-12-02", "label": "Too early"}
    root = make_case(tmp_path, snapshots=update)
    problem_at(root, "snapshots/u0/snapshot.toml", None, "data_date", "before the baseline")


def test_update_on_the_baseline_date(tmp_path):
    update = {"u0": {"data_date": "2025-01-06", "label": "Same day"}}
    root = make_case(tmp_path, snapshots=update, drop=("asbuilt.csv",))
    problem_at(root, "snapshots/u0/snapshot.toml", None, "data_date", "also the data date")


def test_second_baseline(tmp_path):
    update = copy.deepcopy(UPDATE)
    update["other"] = {"data_date": "2025-03-03", "kind": "baseline", "label": "Rebaseline"}
    root = make_case(tmp_path, snapshots=update)
    problem_at(root, "snapshots/other/snapshot.toml", None, "kind", "second baseline")


def test_no_baseline(tmp_path):
    root = make_case(tmp_path)
    write_toml(
        root / "snapshots/baseline/snapshot.toml", {"": {"label": "Plan", "data_date": "2025-01-06", "kind": "update"}}
    )
    problem_at(root, "snapshots", None, None, "no baseline")


def test_unknown_snapshot_kind(tmp_path):
    update = copy.deepcopy(UPDATE)
    update["u1"]["kind"] = "revision"
    root = make_case(tmp_path, snapshots=update)
    problem_at(root, "snapshots/u1/snapshot.toml", None, "kind", "not baseline or update")


def test_duplicate_snapshot_label(tmp_path):
    update = copy.deepcopy(UPDATE)
    update["u2"] = {"data_date": "2025-03-03", "label": "Update 01"}
    root = make_case(tmp_path, snapshots=update)
    problem_at(root, "snapshots/u2/snapshot.toml", None, "label", "also the label")


# ----------------------------------------------------------------- dates everywhere

DATE_CELLS = [
    ("calendar_exceptions.csv", "date"),
    ("asbuilt.csv", "actual_start"),
    ("asbuilt.csv", "actual_finish"),
    ("events.csv", "start"),
    ("events.csv", "finish"),
    ("events.csv", "notified"),
    ("sections.csv", "contract_completion"),
    ("extensions_granted.csv", "granted_on"),
    ("prolongation_rates.csv", "from"),
    ("prolongation_rates.csv", "to"),
]


@pytest.mark.parametrize("file, column", DATE_CELLS)
def test_unparseable_date_in_optional_file(tmp_path, file, column):
    rows = copy.deepcopy(FILES[file])
    rows[0][column] = "31/03/2025"
    root = make_case(tmp_path, files={file: rows})
    problem_at(root, file, 2, column, "'31/03/2025' is not a date")


@pytest.mark.parametrize("column", ["actual_start", "actual_finish", "constraint_date"])
def test_unparseable_date_in_activities(tmp_path, column):
    changes = {column: "2025-02-30"}  # 30 February does not exist
    if column == "constraint_date":
        changes["constraint"] = "earliest_start"
    root = make_case(tmp_path, snapshots=update_with(2, **changes))
    problem_at(root, U1, 4, column, "not a date")


def test_unparseable_date_in_case_toml(tmp_path):
    root = make_case(tmp_path, start="6 January 2025")  # written as a TOML string
    write_toml(
        root / "snapshots/baseline/snapshot.toml",
        {"": {"label": "Baseline", "data_date": "2025-01-06", "kind": "baseline"}},
    )
    problem_at(root, "case.toml", None, "project.contract_start", "must be a date")


def test_unparseable_data_date(tmp_path):
    root = make_case(tmp_path)
    write_text(root, "snapshots/u1/snapshot.toml", 'label = "U1"\ndata_date = "March"\n')
    problem_at(root, "snapshots/u1/snapshot.toml", None, "data_date", "not a date")


# ----------------------------------------------------------------- case.toml and calendars


def test_bad_setting_value(tmp_path):
    root = make_case(tmp_path, schedule={"progress": "foo"})
    problem = problem_at(root, "case.toml", None, "schedule.progress", "must be one of")
    assert "retained_logic" in problem.message


def test_missing_project_name(tmp_path):
    root = make_case(tmp_path)
    write_text(root, "case.toml", "[project]\ncontract_start = 2025-01-06\ncontract_completion = 2025-12-19\n")
    problem_at(root, "case.toml", None, "project.name", "missing")


def test_negative_liquidated_damages(tmp_path):
    root = make_case(tmp_path, commercial={"liquidated_damages_per_day": -5})
    problem_at(root, "case.toml", None, "commercial.liquidated_damages_per_day", "negative")


def test_default_calendar_not_defined(tmp_path):
    root = make_case(tmp_path, schedule={"default_calendar": "6d"})
    problem_at(root, "case.toml", None, "schedule.default_calendar", "not in calendars.csv")


def test_bad_workday_token(tmp_path):
    calendars = [
        {"calendar": "5d", "workdays": "Mon Tue Wed Thu Fry"},
        {"calendar": "7d", "workdays": "Mon Tue Wed Thu Fri Sat Sun"},
    ]
    root = make_case(tmp_path, calendars=calendars)
    problem_at(root, "calendars.csv", 2, "workdays", "not a weekday")


def test_duplicate_calendar_name(tmp_path):
    calendars = [
        {"calendar": "5d", "workdays": "Mon Tue Wed Thu Fri"},
        {"calendar": "5d", "workdays": "Mon Tue Wed Thu"},
    ]
    root = make_case(tmp_path, calendars=calendars)
    problem_at(root, "calendars.csv", 3, "calendar", "given twice")


def test_unknown_calendar_in_exceptions(tmp_path):
    rows = [{"calendar": "4d", "date": "2025-04-18", "working": "no", "reason": "holiday"}]
    root = make_case(tmp_path, files={"calendar_exceptions.csv": rows})
    problem_at(root, "calendar_exceptions.csv", 2, "calendar", "'4d' is not in calendars.csv")


def test_exception_working_not_yes_or_no(tmp_path):
    rows = [{"calendar": "5d", "date": "2025-04-18", "working": "maybe", "reason": ""}]
    root = make_case(tmp_path, files={"calendar_exceptions.csv": rows})
    problem_at(root, "calendar_exceptions.csv", 2, "working", "not yes or no")


# ----------------------------------------------------------------- events and fragnets


def events_with(index, **changes):
    return {"events.csv": with_row(FILES["events.csv"], index, **changes)}


def test_event_names_unknown_activity(tmp_path):
    root = make_case(tmp_path, files=events_with(0, activities="B;Z7"))
    problem_at(root, "events.csv", 2, "activities", "'Z7'")


def test_event_may_name_an_activity_of_an_update_only(tmp_path):
    # "event naming an unknown activity (in the baseline or any snapshot)": N exists in
    # the update only, so the event may name it.
    update = copy.deepcopy(UPDATE)
    update["u1"]["activities"].append({"id": "N", "name": "New work", "duration": 2})
    case = load_case(make_case(tmp_path, snapshots=update, files=events_with(0, activities="N"), drop=("asbuilt.csv",)))
    assert case.events["activities"].iat[0] == "N"


def test_event_unknown_party(tmp_path):
    root = make_case(tmp_path, files=events_with(0, party="engineer"))
    problem_at(root, "events.csv", 2, "party", "not a known party")


def test_event_unknown_impact(tmp_path):
    root = make_case(tmp_path, files=events_with(0, impact="suspend"))
    problem_at(root, "events.csv", 2, "impact", "not a known impact")


def test_extend_without_days(tmp_path):
    root = make_case(tmp_path, files=events_with(0, days=""))
    problem_at(root, "events.csv", 2, "days", "needs the number of days")


def test_fragnet_impact_without_fragnet_rows(tmp_path):
    root = make_case(tmp_path, files={"fragnets.csv": [], "fragnet_links.csv": []})
    write_text(root, "fragnets.csv", "event,id,name,duration\n")
    write_text(root, "fragnet_links.csv", "event,pred,succ\n")
    problem_at(root, "events.csv", 3, "impact", "no rows in fragnets.csv")


def test_duplicate_event_id(tmp_path):
    rows = FILES["events.csv"] + [dict(FILES["events.csv"][0])]
    root = make_case(tmp_path, files={"events.csv": rows})
    problem_at(root, "events.csv", 4, "id", "given twice")


def test_event_finish_before_start(tmp_path):
    root = make_case(tmp_path, files=events_with(0, finish="2025-01-10"))
    problem_at(root, "events.csv", 2, "finish", "before the start")


def test_unknown_calendar_in_fragnets(tmp_path):
    rows = with_row(FILES["fragnets.csv"], 0, calendar="night")
    root = make_case(tmp_path, files={"fragnets.csv": rows})
    problem_at(root, "fragnets.csv", 2, "calendar", "'night' is not in calendars.csv")


def test_fragnet_of_unknown_event(tmp_path):
    rows = FILES["fragnets.csv"] + [{"event": "E9", "id": "F2", "name": "x", "duration": 1}]
    root = make_case(tmp_path, files={"fragnets.csv": rows})
    problem_at(root, "fragnets.csv", 3, "event", "'E9' is not in events.csv")


def test_fragnet_link_to_unknown_activity(tmp_path):
    rows = with_row(FILES["fragnet_links.csv"], 1, succ="ZZ")
    root = make_case(tmp_path, files={"fragnet_links.csv": rows})
    problem_at(root, "fragnet_links.csv", 3, "succ", "'ZZ'")


def test_fragnet_activity_id_clashes_with_programme(tmp_path):
    rows = with_row(FILES["fragnets.csv"], 0, id="B")
    root = make_case(tmp_path, files={"fragnets.csv": rows, "fragnet_links.csv": []})
    write_text(root, "fragnet_links.csv", "event,pred,succ\n")
    problem_at(root, "fragnets.csv", 2, "id", "already an activity")


# ----------------------------------------------------------------- elements, sections, money


def test_duplicate_element_id(tmp_path):
    rows = FILES["elements.csv"] + [dict(FILES["elements.csv"][0], name="copy")]
    root = make_case(tmp_path, files={"elements.csv": rows})
    problem_at(root, "elements.csv", 3, "id", "given twice")


@pytest.mark.parametrize("column", ["dx", "dy", "dz"])
def test_element_box_with_negative_size(tmp_path, column):
    rows = with_row(FILES["elements.csv"], 0, **{column: -1})
    root = make_case(tmp_path, files={"elements.csv": rows})
    problem_at(root, "elements.csv", 2, column, "below 0")


def test_section_unknown_completion_activity(tmp_path):
    rows = with_row(FILES["sections.csv"], 0, completion_activity="M9")
    root = make_case(tmp_path, files={"sections.csv": rows})
    problem_at(root, "sections.csv", 2, "completion_activity", "'M9'")


def test_extension_unknown_section(tmp_path):
    rows = with_row(FILES["extensions_granted.csv"], 0, section="S9")
    root = make_case(tmp_path, files={"extensions_granted.csv": rows})
    problem_at(root, "extensions_granted.csv", 2, "section", "'S9' is not in sections.csv")


def test_prolongation_periods_overlap(tmp_path):
    rows = with_row(FILES["prolongation_rates.csv"], 1, **{"from": "2025-06-01"})
    root = make_case(tmp_path, files={"prolongation_rates.csv": rows})
    problem_at(root, "prolongation_rates.csv", 3, "from", "overlaps")


# ----------------------------------------------------------------- as-built record


def test_asbuilt_activity_without_actual_dates(tmp_path):
    # M has no row in asbuilt.csv and no dates in u1: it ends with no actual start.
    rows = FILES["asbuilt.csv"][:2]
    root = make_case(tmp_path, files={"asbuilt.csv": rows})
    problem = problem_at(root, "asbuilt.csv", None, "actual_start", "'M' has no actual start")
    assert "M" in problem.message


def test_asbuilt_blank_finish_names_its_row(tmp_path):
    rows = with_row(FILES["asbuilt.csv"], 1, actual_finish="")
    root = make_case(tmp_path, files={"asbuilt.csv": rows})
    problem_at(root, "asbuilt.csv", 3, "actual_finish", "'B' has no actual finish")


def test_asbuilt_unknown_activity(tmp_path):
    rows = FILES["asbuilt.csv"] + [{"id": "Q", "actual_start": "2025-01-06", "actual_finish": "2025-01-07"}]
    root = make_case(tmp_path, files={"asbuilt.csv": rows})
    problem_at(root, "asbuilt.csv", 5, "id", "'Q' is not in the last snapshot")


def test_asbuilt_dates_may_run_past_the_data_date(tmp_path):
    # "its dates run past the last update's data date": B finishes 2025-02-14, after
    # u1's data date 2025-02-03, and that is no error.
    case = load_case(make_case(tmp_path))
    assert case.asbuilt_snapshot is not None


# ----------------------------------------------------------------- corrections


def corrections(*rows):
    return {
        "corrections.csv": [dict(zip(("snapshot", "table", "key", "column", "value", "reason"), row)) for row in rows]
    }


def test_correction_names_unknown_snapshot(tmp_path):
    root = make_case(tmp_path, files=corrections(("Update 09", "activities", "B", "remaining", "2", "diary")))
    problem_at(root, "corrections.csv", 2, "snapshot", "no snapshot 'Update 09'")


def test_correction_names_unknown_activity(tmp_path):
    root = make_case(tmp_path, files=corrections(("u1", "activities", "B7", "remaining", "2", "diary")))
    problem_at(root, "corrections.csv", 2, "key", "no activity 'B7'")


def test_correction_names_unknown_column(tmp_path):
    root = make_case(tmp_path, files=corrections(("u1", "activities", "B", "remainder", "2", "diary")))
    problem_at(root, "corrections.csv", 2, "column", "no column 'remainder'")


def test_correction_names_unknown_link(tmp_path):
    root = make_case(tmp_path, files=corrections(("Update 01", "links", "A>M", "delete", "", "not in the programme")))
    problem_at(root, "corrections.csv", 2, "key", "no link A>M")


def test_correction_names_unknown_table(tmp_path):
    root = make_case(tmp_path, files=corrections(("u1", "calendars", "5d", "workdays", "Mon", "")))
    problem_at(root, "corrections.csv", 2, "table", "not a table")


def test_correction_adds_a_link_that_exists(tmp_path):
    root = make_case(tmp_path, files=corrections(("baseline", "links", "A>B", "add", "FS 0", "")))
    problem_at(root, "corrections.csv", 2, "key", "already exists")


def test_correction_adding_a_loop_is_reported_at_the_correction(tmp_path):
    # M>A closes the loop A -> B -> M -> A; the added link has no row in links.csv, so
    # the problem names the correction's row. (The loop's first link is A>B on row 2.)
    root = make_case(
        tmp_path,
        snapshots={},
        files=corrections(("baseline", "links", "M>A", "add", "FS 0", "test")),
        drop=("asbuilt.csv",),
    )
    problem = problem_at(root, BASE_LINKS, 2, "pred", "logic loop")
    assert problem.message == "logic loop: A -> B -> M -> A"


def test_bad_value_set_by_a_correction_says_so(tmp_path):
    root = make_case(tmp_path, files=corrections(("u1", "activities", "B", "remaining", "-4", "typo")))
    problem = problem_at(root, U1, 3, "remaining", "below 0")
    assert "corrections.csv row 2" in problem.message


# ----------------------------------------------------------------- all problems at once


def test_all_problems_of_all_files_in_one_error(tmp_path):
    root = make_case(
        tmp_path,
        activities=with_row(ACTIVITIES, 0, duration=-1),
        links=with_row(LINKS, 1, type="XX"),
        snapshots={},
        files=events_with(0, party="owner"),
    )
    where = {(p.file, p.row, p.column) for p in problems_of(root)}
    assert {(BASE, 2, "duration"), (BASE_LINKS, 3, "type"), ("events.csv", 2, "party")} <= where


def test_problems_per_file_are_capped(tmp_path):
    # 60 activities with a negative duration: at most MAX_PROBLEMS_PER_FILE lines for the
    # file, the last of which says how many more there are (60 - 49 = 11 by hand).
    rows = [{"id": f"A{i}", "name": "x", "duration": -1} for i in range(60)]
    root = make_case(
        tmp_path,
        activities=rows,
        links=[],
        snapshots={},
        drop=(
            "asbuilt.csv",
            "events.csv",
            "fragnets.csv",
            "fragnet_links.csv",
            "sections.csv",
            "extensions_granted.csv",
        ),
    )
    found = [p for p in problems_of(root) if p.file == BASE]
    assert len(found) == MAX_PROBLEMS_PER_FILE == 50
    assert [p.row for p in found[:3]] == [2, 3, 4]
    assert found[-1].message == "11 more problems in this file are not listed"


# ----------------------------------------------------------------- unreadable input


def test_no_case_at_the_path(tmp_path):
    problem_at(tmp_path / "nowhere", str(tmp_path / "nowhere"), None, None, "no case folder")


def test_file_that_is_not_utf8(tmp_path):
    root = make_case(tmp_path)
    (root / "events.csv").write_bytes("id,title\nE1,Verz\xf6gerung\n".encode("latin-1"))
    problem_at(root, "events.csv", None, None, "not utf-8")


def test_empty_file(tmp_path):
    root = make_case(tmp_path)
    write_text(root, "elements.csv", "")
    problem_at(root, "elements.csv", 1, None, "empty")


def test_empty_snapshots_folder_has_no_baseline(tmp_path):
    import shutil

    root = make_case(tmp_path)
    shutil.rmtree(root / "snapshots")
    (root / "snapshots").mkdir()
    problem_at(root, "snapshots", None, None, "no baseline")
