"""The fields case-format version 2 adds (docs/case-format.md, the "(v2)" marks).

For each: a valid case using it loads to the typed value the format describes, and a
broken one gives one problem naming the file, the spreadsheet row (header = row 1, first
data row = row 2, counted by hand from the rows written), the column and what is wrong.
A version-1 case (none of these fields) stays valid: see test_the_full_case_is_valid in
test_case_validation and the demo case tests.
"""

from __future__ import annotations

import copy
import datetime as dt

import openpyxl
import pytest
from casewriter import write_text
from test_case_support import ACTIVITIES, FILES, UPDATE, make_case, problem_at

from delay.case import load_case, summarise, write_workbook
from delay.model import COLUMNS

BASE = "snapshots/baseline/activities.csv"
U1 = "snapshots/u1/activities.csv"

ATTRIBUTIONS = [
    {
        "window": "Update 01",
        "activity": "B",
        "event": "E1",
        "party": "",
        "reason": "the drawings of E1 held the capping beam (RFI 7)",
    },
    {
        "window": "asbuilt",
        "activity": "A",
        "event": "",
        "party": "Employer",
        "reason": "late possession of the quay, site diary 2025-01-06",
    },
]


def events_with(index, **changes):
    rows = copy.deepcopy(FILES["events.csv"])
    rows[index].update(changes)
    return {"events.csv": rows}


def attributions_with(index=None, **changes):
    rows = copy.deepcopy(ATTRIBUTIONS)
    if index is not None:
        rows[index].update(changes)
    return {"attributions.csv": rows}


# ----------------------------------------------------------------- activities: risk


def test_risk_is_a_party_or_blank_in_every_snapshot(tmp_path):
    update = copy.deepcopy(UPDATE)
    update["u1"]["activities"][0]["risk"] = "Employer"
    activities = copy.deepcopy(ACTIVITIES)
    activities[1]["risk"] = "neutral"
    case = load_case(make_case(tmp_path, activities=activities, snapshots=update))
    assert case.baseline.activities["risk"].tolist() == ["", "neutral", ""]
    # Stored in the case of the format, like the other choice columns.
    assert case.snapshot("u1").activities["risk"].tolist() == ["employer", "", ""]
    assert list(case.baseline.activities.columns[:13]) == list(COLUMNS["activities"])


def test_risk_that_is_not_a_party(tmp_path):
    update = copy.deepcopy(UPDATE)
    update["u1"]["activities"][2]["risk"] = "subcontractor"
    root = make_case(tmp_path, snapshots=update)
    problem = problem_at(root, U1, 4, "risk", "'subcontractor' is not a known risk owner")
    assert "employer, contractor, neutral" in problem.fix


def test_a_version_1_case_has_blank_risk(tmp_path):
    case = load_case(make_case(tmp_path))
    assert (case.baseline.activities["risk"] == "").all()
    assert case.settings.analysis.unexplained_risk == "contractor"  # the format's default


# ----------------------------------------------------------------- case.toml


def test_unexplained_risk_setting(tmp_path):
    case = load_case(make_case(tmp_path, analysis={"unexplained_risk": "employer"}))
    assert case.settings.analysis.unexplained_risk == "employer"


def test_unexplained_risk_that_is_not_a_party(tmp_path):
    root = make_case(tmp_path, analysis={"unexplained_risk": "nobody"})
    problem = problem_at(root, "case.toml", None, "analysis.unexplained_risk", "must be one of")
    assert 'unexplained_risk = "employer"' in problem.fix


def test_completion_activity_absent_is_none(tmp_path):
    case = load_case(make_case(tmp_path))
    # The default (the finish milestone that finishes last) is the methods' to resolve.
    assert case.settings.project.completion_activity is None


def test_completion_activity_of_the_baseline(tmp_path):
    case = load_case(make_case(tmp_path, project={"completion_activity": "M"}))
    assert case.settings.project.completion_activity == "M"


def test_completion_activity_not_in_the_baseline(tmp_path):
    root = make_case(tmp_path, project={"completion_activity": "HANDOVER"})
    problem = problem_at(
        root, "case.toml", None, "project.completion_activity", "'HANDOVER' is not an activity of the baseline"
    )
    assert "leave project.completion_activity out" in problem.fix


def test_completion_activity_must_be_text(tmp_path):
    root = make_case(tmp_path, project={"completion_activity": True})
    problem_at(root, "case.toml", None, "project.completion_activity", "must be text")


@pytest.mark.parametrize("method", ["windows", "asbuilt", "impacted", "tia", "collapsed"])
def test_preferred_method(tmp_path, method):
    case = load_case(make_case(tmp_path, report={"preferred_method": method}))
    assert case.settings.report.preferred_method == method


def test_preferred_method_absent_is_none(tmp_path):
    assert load_case(make_case(tmp_path)).settings.report.preferred_method is None


def test_preferred_method_that_is_not_a_method(tmp_path):
    root = make_case(tmp_path, report={"preferred_method": "gut feeling"})
    problem = problem_at(root, "case.toml", None, "report.preferred_method", "must be one of")
    assert '"windows", "asbuilt", "impacted", "tia", "collapsed"' in problem.message


# ----------------------------------------------------------------- events


def test_tia_update_by_label_or_folder(tmp_path):
    files = events_with(0, tia_update="Update 01")
    files["events.csv"][1]["tia_update"] = "baseline"
    case = load_case(make_case(tmp_path, files=files))
    assert case.events["tia_update"].tolist() == ["Update 01", "baseline"]
    assert case.snapshot(case.events["tia_update"].iat[0]).folder == "u1"


def test_tia_update_that_is_no_snapshot(tmp_path):
    root = make_case(tmp_path, files=events_with(1, tia_update="Update 07"))
    problem = problem_at(root, "events.csv", 3, "tia_update", "'Update 07' is not a snapshot")
    assert "baseline, u1" in problem.fix


@pytest.mark.parametrize("name", ["asbuilt", "As-built"])
def test_tia_update_cannot_be_the_as_built_record(tmp_path, name):
    root = make_case(tmp_path, files=events_with(0, tia_update=name))
    problem_at(root, "events.csv", 2, "tia_update", "the as-built record cannot be")


def test_asbuilt_activities(tmp_path):
    case = load_case(make_case(tmp_path, files=events_with(0, asbuilt_activities="A; B")))
    assert case.events["asbuilt_activities"].tolist() == ["A; B", ""]


def test_asbuilt_activities_not_in_the_as_built_record(tmp_path):
    root = make_case(tmp_path, files=events_with(1, asbuilt_activities="B;F1"))
    # F1 is a fragnet activity: it is not in the as-built programme.
    problem_at(root, "events.csv", 3, "asbuilt_activities", "'F1' is not in the as-built record")


def test_asbuilt_activities_without_an_as_built_record(tmp_path):
    root = make_case(tmp_path, files=events_with(0, asbuilt_activities="Z1;Z2"), drop=("asbuilt.csv",))
    problem_at(root, "events.csv", 2, "asbuilt_activities", "'Z1', 'Z2' are not in the last update ('Update 01')")


# ----------------------------------------------------------------- attributions.csv


def test_attributions_load(tmp_path):
    case = load_case(make_case(tmp_path, files=attributions_with()))
    table = case.attributions
    assert list(table.columns) == list(COLUMNS["attributions"])
    assert table["window"].tolist() == ["Update 01", "asbuilt"]
    assert table["party"].tolist() == ["", "employer"]
    assert table["event"].tolist() == ["E1", ""]
    assert (case.root / "attributions.csv") in case.input_files
    assert summarise(case)["attributions"] == 2


def test_no_attributions_file_gives_an_empty_table(tmp_path):
    case = load_case(make_case(tmp_path))
    assert list(case.attributions.columns) == list(COLUMNS["attributions"])
    assert case.attributions.empty and summarise(case)["attributions"] == 0


@pytest.mark.parametrize(
    "changes, row, column, words",
    [
        ({"window": "Baseline"}, 2, "window", "begins the first window and ends none"),
        ({"window": "Update 09"}, 2, "window", "'Update 09' is not a snapshot"),
        ({"window": ""}, 2, "window", "names no window"),
        ({"activity": "F1"}, 2, "activity", "'F1' is not in the snapshot 'Update 01'"),
        ({"activity": ""}, 2, "activity", "names no activity"),
        ({"event": "E9"}, 2, "event", "'E9' is not in events.csv"),
        ({"party": "contractor"}, 2, "party", "both an event and a party"),
        ({"event": ""}, 2, "event", "neither an event nor a party"),
        ({"reason": ""}, 2, "reason", "gives no reason"),
    ],
)
def test_broken_attribution(tmp_path, changes, row, column, words):
    root = make_case(tmp_path, files=attributions_with(0, **changes))
    problem_at(root, "attributions.csv", row, column, words)


def test_attribution_party_that_is_not_a_party(tmp_path):
    root = make_case(tmp_path, files=attributions_with(1, party="architect"))
    problem_at(root, "attributions.csv", 3, "party", "'architect' is not a known party")


def test_attribution_given_twice(tmp_path):
    files = attributions_with()
    # The same window named by folder instead of label, the same activity: a repeat.
    files["attributions.csv"].append({**ATTRIBUTIONS[0], "window": "u1"})
    root = make_case(tmp_path, files=files)
    problem_at(root, "attributions.csv", 4, "activity", "attributed twice")


def test_attribution_to_the_as_built_window_without_an_as_built_record(tmp_path):
    root = make_case(tmp_path, files=attributions_with(), drop=("asbuilt.csv",))
    problem_at(root, "attributions.csv", 3, "window", "no as-built record")


def test_attributions_sheet_of_the_workbook(tmp_path):
    folder = make_case(tmp_path, files=attributions_with())
    book = write_workbook(folder, tmp_path / "book" / "case.xlsx")
    assert "attributions" in openpyxl.load_workbook(book, read_only=True).sheetnames
    loaded = load_case(book)
    assert loaded.attributions.equals(load_case(folder).attributions)


def test_attributions_sheet_with_a_problem(tmp_path):
    folder = make_case(tmp_path, files=attributions_with(1, activity="Q"))
    book = write_workbook(make_case(tmp_path / "good", files=attributions_with()), tmp_path / "book" / "case.xlsx")
    workbook = openpyxl.load_workbook(book)
    sheet = workbook["attributions"]
    header = [cell.value for cell in sheet[1]]
    sheet.cell(row=3, column=header.index("activity") + 1, value="Q")
    workbook.save(book)
    problem_at(book, "case.xlsx:attributions", 3, "activity", "'Q' is not in the snapshot")
    assert folder.exists()


# ----------------------------------------------------------------- opinion.md


def test_opinion_is_read_as_text(tmp_path):
    root = make_case(tmp_path)
    text = "# Opinion\n\nThe late drawings of E1 drove completion — in my view by 4 days.\n"
    write_text(root, "opinion.md", text, bom=True)
    case = load_case(root)
    assert case.opinion == text  # the byte-order mark is not part of the text
    assert (root / "opinion.md") in case.input_files
    assert summarise(case)["opinion"] is True


def test_no_opinion(tmp_path):
    case = load_case(make_case(tmp_path))
    assert case.opinion == "" and summarise(case)["opinion"] is False


def test_opinion_beside_the_workbook(tmp_path):
    book = write_workbook(make_case(tmp_path), tmp_path / "book" / "case.xlsx")
    write_text(book.parent, "opinion.md", "Windows analysis is preferred.\n")
    case = load_case(book)
    assert case.opinion == "Windows analysis is preferred.\n"
    assert book.parent / "opinion.md" in case.input_files


def test_opinion_too_large(tmp_path):
    root = make_case(tmp_path)
    write_text(root, "opinion.md", "x" * (256 * 1024 + 1))
    problem = problem_at(root, "opinion.md", None, None, "more than the 262,144 bytes")
    assert "shorten" in problem.fix


def test_opinion_not_utf8(tmp_path):
    root = make_case(tmp_path)
    (root / "opinion.md").write_bytes("Stellungnahme: Verzögerung".encode("cp1252"))
    problem_at(root, "opinion.md", None, None, "not UTF-8")


def test_summary_names_the_version_2_settings(tmp_path):
    case = load_case(
        make_case(
            tmp_path,
            project={"completion_activity": "M"},
            report={"preferred_method": "tia"},
            analysis={"unexplained_risk": "neutral"},
        )
    )
    summary = summarise(case)
    assert (summary["completion_activity"], summary["preferred_method"], summary["unexplained_risk"]) == (
        "M",
        "tia",
        "neutral",
    )


def test_workbook_case_sheet_carries_the_version_2_settings(tmp_path):
    folder = make_case(
        tmp_path,
        project={"completion_activity": "M"},
        report={"preferred_method": "collapsed"},
        analysis={"unexplained_risk": "employer"},
    )
    case = load_case(write_workbook(folder, tmp_path / "book" / "case.xlsx"))
    assert case.settings.project.completion_activity == "M"
    assert case.settings.report.preferred_method == "collapsed"
    assert case.settings.analysis.unexplained_risk == "employer"
    assert case.settings.project.contract_start == dt.date(2025, 1, 6)
