"""The element timeline: element dates, weekly states, figures and the HTML fragment.

The small case below is worked by hand (five-day calendar, Monday 2025-01-06 start):

    baseline  A  5 days, wbs W1                      2025-01-06 .. 2025-01-10 (Mon-Fri)
              B 10 days, wbs W2, FS after A          2025-01-13 .. 2025-01-24
              C  3 days, wbs W2, FS after B          2025-01-27 .. 2025-01-29 (Mon-Wed)
    as built  A 2025-01-06 .. 2025-01-14,  B 2025-01-15 .. 2025-02-04,
              C 2025-02-05 .. 2025-02-07

    elements  E1 (W1), E2 and E3 (W2), E4 (W9: no activity has it, so unlinked)
    dates     E1 planned 01-06 .. 01-10, built 01-06 .. 01-14
              E2, E3 planned 01-13 (B's start) .. 01-29 (C's finish),
                     built 01-15 (B) .. 02-07 (C)   (case-format: earliest start to latest finish)

The finish dates follow the time convention of case-format v1 (a task of d days starting on
work day s finishes on the date of work day s + d - 1; an FS successor starts on the next work
day); the calendar facts are checked against numpy's business-day functions below.
"""

from __future__ import annotations

import datetime as dt
import itertools
import json
import re
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from casewriter import write_case

from delay.case import load_case
from delay.synth import synthesise
from reports.element_timeline import (
    COMPLETE,
    IN_PROGRESS,
    LATE,
    NOT_STARTED,
    UNLINKED,
    element_states,
    figure_2d,
    figure_3d,
    standalone_html,
    timeline_html,
)
from reports.element_timeline.scene import ROLES_3D, box_levels, drawn_parts
from reports.palette import HIGHLIGHT_COLOUR, STATE_COLOURS

ACTIVITIES = [
    {"id": "A", "name": "Foundations", "duration": 5, "wbs": "W1"},
    {"id": "B", "name": "Frame", "duration": 10, "wbs": "W2"},
    {"id": "C", "name": "Roof", "duration": 3, "wbs": "W2"},
]
LINKS = [{"pred": "A", "succ": "B", "type": "FS", "lag": 0}, {"pred": "B", "succ": "C", "type": "FS", "lag": 0}]
UPDATE = [
    {**ACTIVITIES[0], "actual_start": "2025-01-06", "actual_finish": "2025-01-14", "remaining": 0},
    {**ACTIVITIES[1], "actual_start": "2025-01-15", "actual_finish": "", "remaining": 8},
    {**ACTIVITIES[2], "actual_start": "", "actual_finish": "", "remaining": ""},
]
ASBUILT = [
    {"id": "A", "actual_start": "2025-01-06", "actual_finish": "2025-01-14", "source": "site diary"},
    {"id": "B", "actual_start": "2025-01-15", "actual_finish": "2025-02-04", "source": "site diary"},
    {"id": "C", "actual_start": "2025-02-05", "actual_finish": "2025-02-07", "source": "site diary"},
]
ELEMENTS = [
    {
        "id": "E1",
        "name": "Footing",
        "wbs": "W1",
        "classification": "footing",
        "x": 0,
        "y": 0,
        "z": 0,
        "dx": 4,
        "dy": 4,
        "dz": 1,
        "level": "00",
        "zone": "A",
    },
    {
        "id": "E2",
        "name": "Column",
        "wbs": "W2",
        "classification": "column",
        "x": 1,
        "y": 1,
        "z": 1,
        "dx": 0.5,
        "dy": 0.5,
        "dz": 3,
        "level": "00",
        "zone": "A",
    },
    {
        "id": "E3",
        "name": "Roof slab",
        "wbs": "W2",
        "classification": "slab",
        "x": 0,
        "y": 0,
        "z": 4,
        "dx": 4,
        "dy": 4,
        "dz": 0.3,
        "level": "01",
        "zone": "A",
    },
    {
        "id": "E4",
        "name": "Flagpole",
        "wbs": "W9",
        "classification": "fixture",
        "x": 6,
        "y": 0,
        "z": 0,
        "dx": 0.2,
        "dy": 0.2,
        "dz": 6,
        "level": "00",
        "zone": "B",
    },
]
EVENTS = [
    {
        "id": "EV1",
        "title": "Late roof sheeting delivery",
        "party": "employer",
        "start": "2025-01-20",
        "finish": "2025-01-24",
        "activities": "C",
        "impact": "extend",
        "days": 2,
    }
]


def small_case(root: Path, *, asbuilt: bool = True, elements=ELEMENTS):
    files = {"elements.csv": elements, "events.csv": EVENTS}
    if asbuilt:
        files["asbuilt.csv"] = ASBUILT
    write_case(
        root,
        activities=ACTIVITIES,
        links=LINKS,
        snapshots={"u01": {"label": "Update 01", "data_date": "2025-01-20", "activities": UPDATE}},
        files=files,
    )
    return load_case(root)


@pytest.fixture
def small(tmp_path):
    return element_states(small_case(tmp_path / "case"))


def d(text: str) -> pd.Timestamp:
    return pd.Timestamp(text)


def test_calendar_facts_of_the_worked_case():
    # numpy's business-day functions (a general reference library) confirm the hand dates:
    # 5 work days from Monday 2025-01-06 end on 2025-01-10; B's 10 days from 2025-01-13 end
    # on 2025-01-24; C's 3 days from 2025-01-27 end on 2025-01-29.
    assert np.busday_offset("2025-01-06", 4) == np.datetime64("2025-01-10")
    assert np.busday_offset("2025-01-13", 9) == np.datetime64("2025-01-24")
    assert np.busday_offset("2025-01-27", 2) == np.datetime64("2025-01-29")
    assert np.is_busday("2025-01-06") and dt.date(2025, 1, 6).weekday() == 0  # a Monday


def test_element_dates_are_earliest_start_and_latest_finish_of_the_wbs(small):
    table = small.elements.set_index("id")
    # hand-worked in the module docstring above
    assert (table.loc["E1", "planned_start"], table.loc["E1", "planned_finish"]) == (d("2025-01-06"), d("2025-01-10"))
    assert (table.loc["E1", "actual_start"], table.loc["E1", "actual_finish"]) == (d("2025-01-06"), d("2025-01-14"))
    for element in ("E2", "E3"):
        assert (table.loc[element, "planned_start"], table.loc[element, "planned_finish"]) == (
            d("2025-01-13"),
            d("2025-01-29"),
        )
        assert (table.loc[element, "actual_start"], table.loc[element, "actual_finish"]) == (
            d("2025-01-15"),
            d("2025-02-07"),
        )
        assert table.loc[element, "activities"] == "B;C"
    assert pd.isna(table.loc["E4", "planned_start"]) and pd.isna(table.loc["E4", "actual_finish"])
    assert not table.loc["E4", "linked_as_planned"] and not table.loc["E4", "linked_as_built"]
    assert table.loc["E1", "activities"] == "A" and table.loc["E4", "activities"] == ""


def test_frames_are_the_mondays_of_the_project(small):
    # first start Monday 2025-01-06; last finish Friday 2025-02-07 (as built); the first
    # Monday after it is 2025-02-10: six Mondays in all (counted on a calendar by hand).
    expected = [d(x) for x in ("2025-01-06", "2025-01-13", "2025-01-20", "2025-01-27", "2025-02-03", "2025-02-10")]
    assert list(small.frames["date"]) == expected
    assert list(small.frames["frame"]) == list(range(6))
    assert all(x.weekday() == 0 for x in small.frames["date"])


def test_state_codes_every_week_against_hand_worked_values(small):
    # Mondays: 01-06, 01-13, 01-20, 01-27, 02-03, 02-10 (see the dates in the docstring).
    # As planned: E1 in progress on 01-06 (its start), complete after 01-10; E2/E3 start
    # 01-13, in progress through 01-29, complete from 02-03; E4 unlinked.
    planned = {
        "E1": [1, 2, 2, 2, 2, 2],
        "E2": [0, 1, 1, 1, 2, 2],
        "E3": [0, 1, 1, 1, 2, 2],
        "E4": [4, 4, 4, 4, 4, 4],
    }
    # As built: E1 still in progress on 01-13 while the plan has it complete -> late (3);
    # E2/E3 not started on 01-13 while planned in progress -> late; in progress and on plan
    # on 01-20 and 01-27; on 02-03 planned complete but still in progress -> late; complete
    # on 02-10.
    built = {
        "E1": [1, 3, 2, 2, 2, 2],
        "E2": [0, 3, 1, 1, 3, 2],
        "E3": [0, 3, 1, 1, 3, 2],
        "E4": [4, 4, 4, 4, 4, 4],
    }
    ids = list(small.elements["id"])
    for view, expected in (("as_planned", planned), ("as_built", built)):
        states = small.states(view)
        assert states.shape == (4, 6) and states.dtype == np.int8
        for element, row in expected.items():
            assert states[ids.index(element)].tolist() == row, (view, element)


def test_state_on_the_boundary_dates(small):
    # The finish date is a work date (inclusive): on Friday 2025-01-10 E1 is still in
    # progress as planned; on Saturday 2025-01-11 the plan has it complete while as built it
    # runs to 01-14 -> late. On 2025-01-15 (B's actual start) E2 is in progress as built.
    assert small.state_at("2025-01-10", "as_planned")[0] == IN_PROGRESS
    assert small.state_at("2025-01-11", "as_planned")[0] == COMPLETE
    assert small.state_at("2025-01-11", "as_built")[0] == LATE
    assert small.state_at(dt.date(2025, 1, 15), "as_built")[1] == IN_PROGRESS
    assert small.state_at("2025-01-14", "as_built")[1] == LATE
    assert small.state_at("2025-01-05", "as_built").tolist() == [NOT_STARTED] * 3 + [UNLINKED]
    with pytest.raises(ValueError, match="unknown view"):
        small.state_at("2025-01-10", "forecast")


def test_runs_give_the_same_states_as_the_table(small):
    # E2 as built: [0, 3, 1, 1, 3, 2] (hand-worked above) as runs of (state, weeks)
    assert small.runs("as_built")[1] == [(0, 1), (3, 1), (1, 2), (3, 1), (2, 1)]
    assert small.runs("as_planned")[3] == [(4, 6)]


def test_start_frames_tell_begun_work_from_work_not_begun(small):
    # Mondays 01-06, 01-13, 01-20, 01-27, 02-03, 02-10. As planned E1 starts Monday 01-06
    # (frame 0) and E2, E3 Monday 01-13 (frame 1); as built E2, E3 start Wednesday 01-15,
    # so the first Monday on or after it is 01-20 (frame 2). E4 is linked in neither view:
    # its work never begins (6, the number of frames).
    assert small.start_frames("as_planned").tolist() == [0, 1, 1, 6]
    assert small.start_frames("as_built").tolist() == [0, 2, 2, 6]
    with pytest.raises(ValueError, match="unknown view"):
        small.start_frames("forecast")


def test_drawn_parts_follow_the_state_and_the_start():
    # one box per case: not started; in progress; complete; late and begun; late and not
    # begun; unlinked; and one complete box on a level that is not shown
    codes = np.array([NOT_STARTED, IN_PROGRESS, COMPLETE, LATE, LATE, UNLINKED, COMPLETE])
    begun = np.array([False, True, True, True, False, False, True])
    outlined = np.array([True, True, False, True, True, True, True])
    shown = np.array([True, True, True, True, True, True, False])
    parts = drawn_parts(codes, begun, outlined, shown)
    assert parts["solid"].tolist() == [1, 2, 3]
    assert parts["ghost"].tolist() == [0, 4]  # work not begun is faint, late or not
    assert parts["unlinked"].tolist() == [5]
    assert parts["outline"].tolist() == [1, 3]  # affected boxes, once begun and shown
    assert drawn_parts(codes, begun, outlined)["solid"].tolist() == [1, 2, 3, 6]


def test_levels_are_offered_from_the_lowest_up(small):
    # E1, E2 and E4 are on level 00 (lowest z 0), E3 on level 01 (z 4)
    levels, numbers = box_levels(small, np.arange(4))
    assert levels == ["00", "01"] and numbers.tolist() == [0, 0, 1, 0]
    fragment = timeline_html(small)
    options = re.findall(r'<option value="(\d+)"( selected)?>([^<]*)</option>', fragment)
    assert options == [("0", "", "00"), ("1", " selected", "01 (every level)")]
    payload = _payload_of(fragment)
    assert payload["figure3d"]["levels"] == ["00", "01"] and payload["figure3d"]["box_levels"] == [0, 0, 1, 0]
    assert payload["start_frames"] == {"as_planned": [0, 1, 1, 6], "as_built": [0, 2, 2, 6]}


def test_unlinked_elements_are_grey_and_listed(small):
    assert small.unlinked["id"].tolist() == ["E4"]
    assert small.unlinked["missing_from"].tolist() == ["both views"]
    fragment = timeline_html(small)
    unlinked = re.search(r'data-role="unlinked".*?</details>', fragment, re.S).group(0)
    assert "E4" in unlinked and "Flagpole" in unlinked and "E1" not in unlinked
    payload = _payload_of(fragment)
    assert payload["states"]["as_built"].split(",")[3] == "46"  # state 4 for all six weeks
    # grey is the colour the palette gives to "no linked activity"
    assert STATE_COLOURS[UNLINKED] == "#9A9A9A"


def test_events_pick_out_the_elements_of_their_activities(tmp_path):
    case = small_case(tmp_path / "case")
    timeline = element_states(case)  # EV1 names activity C (wbs W2): E2 and E3
    table = timeline.elements.set_index("id")
    assert table["highlighted"].to_dict() == {"E1": False, "E2": True, "E3": True, "E4": False}
    assert table.loc["E2", "events"] == "EV1" and table.loc["E1", "events"] == ""
    chosen = element_states(case, highlight={"A"}).elements.set_index("id")["highlighted"]
    assert chosen.to_dict() == {"E1": True, "E2": False, "E3": False, "E4": False}
    # 3D: outlines are drawn round the highlighted boxes once their work has begun. In the
    # first week (Monday 2025-01-06) only E1 (not highlighted) has begun: no outline. On
    # Monday 2025-01-20 (frame 2) B has begun in both views (planned 01-13, built 01-15),
    # so E2 and E3 are outlined: 12 edges of 2 ends each, per box.
    figure = figure_3d(timeline)
    outline = [2 * ROLES_3D.index("outline") + view for view in (0, 1)]
    for number in outline:
        assert [v for v in figure.data[number].x if v is not None] == []
    for trace in figure.frames[2].data[-2:]:
        assert len([v for v in trace.x if v is not None]) == 2 * 12 * 2
    # each outline stands off its box by the margin on every side: E2 spans x 1 .. 1.5 and
    # E3 x 0 .. 4 (elements.csv above); the margin is 0.15 % of the model's largest extent,
    # here the 6.2 m of x (0 .. 6.2 with the flagpole): 0.0093, kept to 3 decimals: 0.009
    margin = 0.009
    xs = {round(v, 3) for v in figure.frames[2].data[-1].x if v is not None}
    assert xs == {round(1 - margin, 3), round(1.5 + margin, 3), round(-margin, 3), round(4 + margin, 3)}


def test_without_an_as_built_record_the_last_update_is_used(tmp_path):
    timeline = element_states(small_case(tmp_path / "case", asbuilt=False))
    assert "Update 01" in timeline.title and "forecast" in timeline.title
    table = timeline.elements.set_index("id")
    # Update 01 (data date Monday 2025-01-20): B started 01-15 with 8 days left, which run
    # 01-20 .. 01-29; C follows 01-30, 01-31, 02-03 (numpy business days, checked below).
    assert np.busday_offset("2025-01-20", 7) == np.datetime64("2025-01-29")
    assert np.busday_offset("2025-01-30", 2) == np.datetime64("2025-02-03")
    assert (table.loc["E2", "actual_start"], table.loc["E2", "actual_finish"]) == (d("2025-01-15"), d("2025-02-03"))
    assert table.loc["E1", "actual_finish"] == d("2025-01-14")


def test_the_title_names_the_as_built_record(small):
    assert "baseline early dates" in small.title and "as-built record" in small.title


def test_programmes_can_be_given_as_tables(tmp_path):
    case = small_case(tmp_path / "case")
    planned = pd.DataFrame(
        {"id": ["A", "B", "C"], "early_start": ["2025-02-03"] * 3, "early_finish": ["2025-02-07"] * 3}
    )
    timeline = element_states(case, planned=planned, planned_source="a what-if")
    assert timeline.elements.set_index("id").loc["E1", "planned_start"] == d("2025-02-03")
    assert "a what-if" in timeline.title
    with pytest.raises(ValueError, match="early_finish"):
        element_states(case, planned=planned.drop(columns="early_finish"))


def test_a_case_without_elements_is_refused(tmp_path):
    write_case(tmp_path / "case", activities=ACTIVITIES, links=LINKS)
    with pytest.raises(ValueError, match="no model elements"):
        element_states(load_case(tmp_path / "case"))


def _payload_of(fragment: str) -> dict:
    text = re.search(r'<script type="application/json" data-role="timeline-data">(.*?)</script>', fragment, re.S).group(
        1
    )
    return json.loads(text)


def test_fragment_holds_geometry_once_and_escapes_input_text(tmp_path):
    hostile = [dict(ELEMENTS[0], name="</script><script>alert(1)</script>"), *ELEMENTS[1:]]
    timeline = element_states(small_case(tmp_path / "case", elements=hostile))
    fragment = timeline_html(timeline)
    assert fragment.count("<script") == 2 and fragment.count("</script>") == 2
    payload = _payload_of(fragment)
    assert "&lt;/script&gt;" in payload["hover"][0]
    three = payload["figure3d"]
    assert three["drawn"] == [0, 1, 2, 3] and len(three["boxes"]) == 4 * 6
    assert three["boxes"][6:12] == [1, 1, 1, 0.5, 0.5, 3]  # E2 as in elements.csv
    assert three["outlined"] == [1, 2]
    assert fragment == timeline_html(timeline)  # the same input gives the same text
    page = standalone_html(timeline, "Test page")
    assert page.startswith("<!DOCTYPE html>") and "<title>Test page</title>" in page
    assert len(page) > 3_000_000  # plotly.js is inlined (several megabytes)


def test_figures_carry_geometry_once_and_colours_per_frame(small):
    figure = figure_3d(small)
    mesh = figure.data[0]
    assert mesh.type == "mesh3d" and figure.data[1].scene == "scene2"
    # every box's 8 corners; in the first week (Monday 2025-01-06) only E1 has begun:
    # 12 triangles solid, E2 and E3 faint wire frames (12 edges of two ends and a gap
    # each), E4 (no linked activity) a dotted wire frame
    assert len(mesh.x) == 4 * 8 and len(mesh.i) == 1 * 12 and len(figure.data[2].x) == 2 * 12 * 3
    assert set(figure.data[2].line.color) == {NOT_STARTED}
    assert len([v for v in figure.data[4].x if v is not None]) == 12 * 2
    assert figure.data[4].line.dash == "dot" and figure.data[4].line.color == STATE_COLOURS[UNLINKED]
    # vertex 8n + 6 is the far corner (x + dx, y + dy, z + dz) of box n: E2 -> (1.5, 1.5, 4)
    assert (mesh.x[8 + 6], mesh.y[8 + 6], mesh.z[8 + 6]) == (1.5, 1.5, 4.0)
    assert len(figure.frames) == 6 and len(figure.layout.sliders[0].steps) == 6
    for frame in figure.frames:
        meshes = [t.to_plotly_json() for t in frame.data if t.type == "mesh3d"]
        # the corners are sent once; a week sends only the triangles drawn and the colours
        assert [set(t) for t in meshes] == [{"type", "i", "j", "k", "intensity"}] * 2
    # Monday 2025-01-13 (frame 1), worked from the dates in the module docstring: as planned
    # E1 is complete and E2, E3 in progress, all begun: solid, no wire frame. As built E1
    # is still in progress (late) and begun: solid; E2 and E3 are late and not begun (B
    # started 01-15): faint wire frames in the "late" colour. Box n owns vertices
    # 8n .. 8n+7 and 12 triangles; a wire frame is 12 edges of two ends and a gap.
    solid_planned, solid_built, ghost_planned, ghost_built = figure.frames[1].data[:4]
    assert len(solid_planned.i) == 3 * 12 and len(ghost_planned.x) == 0
    assert sorted(set(solid_built.i) | set(solid_built.j) | set(solid_built.k)) == list(range(8))
    assert len(ghost_built.x) == 2 * 12 * 3 and set(ghost_built.line.color) == {LATE}
    # E2's box runs x 1 .. 1.5, E3's 0 .. 4 (elements.csv above)
    assert {v for v in ghost_built.x if v is not None} == {0, 1, 1.5, 4}
    # Monday 2025-02-03 (frame 4): E2 and E3 are still late as built but begun: solid
    assert len(figure.frames[4].data[1].i) == 3 * 12 and len(figure.frames[4].data[3].x) == 0
    # the frame of Monday 2025-01-13: E2 late as built (3), in progress as planned (1)
    assert figure.frames[1].data[1].intensity[8] == LATE
    assert figure.frames[1].data[0].intensity[8] == IN_PROGRESS
    assert "E2" in mesh.text[8] and "column" in mesh.text[8] and "2025-01-13" in mesh.text[8]
    flat = figure_2d(small)
    assert flat.data[0].type == "scattergl" and len(flat.data[0].x) == 4
    assert len(flat.frames) == 6
    assert list(flat.frames[4].data[1].marker.color) == [2, 3, 3, 4]  # Monday 2025-02-03


def test_synthetic_case_frames_and_states(tmp_path):
    root = synthesise(tmp_path / "synthetic", 300, updates=3, seed=1, elements=200)
    case = load_case(root)
    timeline = element_states(case)
    # Expected frame count from the input dates: the as-built record (asbuilt.csv) and the
    # baseline's early dates; one Monday per week from the Monday on or before the first
    # start to the first Monday after the last finish.
    from delay.cpm import schedule

    base = schedule(case, "baseline").activities
    record = pd.read_csv(root / "asbuilt.csv", parse_dates=["actual_start", "actual_finish"])
    first = min(base["early_start"].min(), record["actual_start"].min()).date()
    last = max(base["early_finish"].max(), record["actual_finish"].max()).date()
    monday = first - dt.timedelta(days=first.weekday())
    after = last + dt.timedelta(days=7 - last.weekday())
    weeks = (after - monday).days // 7 + 1
    assert len(timeline.frames) == weeks
    states = {view: timeline.states(view) for view in ("as_planned", "as_built")}
    assert states["as_built"].shape == (200, weeks)
    # every element is finished in the last frame and not started (or in progress at the
    # very start) in the first; "late" appears only in the as-built view
    assert (states["as_planned"][:, -1] == COMPLETE).all() and (states["as_built"][:, -1] == COMPLETE).all()
    assert LATE not in states["as_planned"]
    for view, table in states.items():
        runs = timeline.runs(view)
        rebuilt = np.array([[c for c, n in row for _ in range(n)] for row in runs])
        assert (rebuilt == table).all()
        assert all(a[0] != b[0] for row in runs for a, b in zip(row, row[1:]))


# -- colour-blind safety of the palette ------------------------------------------------------
# Simulation of dichromacy by Machado, Oliveira and Fernandes, "A physiologically-based model
# for simulation of color vision deficiency", IEEE TVCG 15(6), 2009: matrices for severity 1.0
# applied to linear RGB (recalled from memory). sRGB transfer and XYZ matrix from IEC
# 61966-2-1; CIE 1976 L*a*b* with the D65 white (CIE 15).
_DICHROMACY = {
    "protanopia": [[0.152286, 1.052583, -0.204868], [0.114503, 0.786281, 0.099216], [-0.003882, -0.048116, 1.051998]],
    "deuteranopia": [[0.367322, 0.860646, -0.227968], [0.280085, 0.672501, 0.047413], [-0.011820, 0.042940, 0.968881]],
    "tritanopia": [[1.255528, -0.076749, -0.178779], [-0.078411, 0.930809, 0.147602], [0.004733, 0.691367, 0.303900]],
}


def _lab(colour: str, matrix) -> np.ndarray:
    rgb = np.array([int(colour[k : k + 2], 16) for k in (1, 3, 5)]) / 255
    linear = np.where(rgb <= 0.04045, rgb / 12.92, ((rgb + 0.055) / 1.055) ** 2.4)
    linear = np.clip(np.asarray(matrix) @ linear, 0, 1)
    xyz = (
        np.array([[0.4124, 0.3576, 0.1805], [0.2126, 0.7152, 0.0722], [0.0193, 0.1192, 0.9505]])
        @ linear
        / np.array([0.95047, 1.0, 1.08883])
    )
    f = np.where(xyz > (6 / 29) ** 3, np.cbrt(xyz), xyz / (3 * (6 / 29) ** 2) + 4 / 29)
    return np.array([116 * f[1] - 16, 500 * (f[0] - f[1]), 200 * (f[1] - f[2])])


@pytest.mark.parametrize("vision", ["normal", *_DICHROMACY])
def test_palette_colours_stay_apart_for_colour_blind_readers(vision):
    matrix = np.eye(3) if vision == "normal" else _DICHROMACY[vision]
    colours = (*STATE_COLOURS, HIGHLIGHT_COLOUR)
    for first, second in itertools.combinations(colours, 2):
        distance = np.linalg.norm(_lab(first, matrix) - _lab(second, matrix))
        # a CIE76 difference of 20 is far above the just-noticeable difference of about 2.3
        # (Sharma, Digital Color Imaging Handbook, 2003; recalled from memory)
        assert distance > 20, (vision, first, second, round(distance, 1))


# -- size for a large model --------------------------------------------------------------------
def test_html_size_for_five_thousand_elements(tmp_path):
    root = synthesise(tmp_path / "large", 10_000, updates=1, seed=1, elements=5_000)
    timeline = element_states(load_case(root))
    fragment = timeline_html(timeline)
    page = standalone_html(timeline, "Size check")
    payload = _payload_of(fragment)
    parts = {name: len(json.dumps(value)) for name, value in payload.items()}
    frames = len(timeline.frames)
    # the colour-only frames of the plain plotly figure for comparison: one byte per corner,
    # per view, per week, base64 (4/3)
    one_frame = 2 * 8 * int(timeline.elements["drawn_in_3d"].sum()) * 4 / 3
    print(
        f"\n5,000 elements, {frames} weekly frames: fragment {len(fragment) / 1e6:.2f} MB, "
        f"standalone page {len(page) / 1e6:.2f} MB (plotly.js included); largest parts: "
        + ", ".join(f"{k} {v / 1e6:.2f} MB" for k, v in sorted(parts.items(), key=lambda kv: -kv[1])[:4])
        + f"; a plotly figure with colour frames would need about {one_frame * frames / 1e6:.0f} MB"
    )
    # ceiling from the design: per element six box numbers, one hover text of a few hundred
    # characters and a few runs per view; far below the 40 MB allowed for the whole report
    assert len(fragment) < 8 * 1024 * 1024
    assert len(page) < 40 * 1024 * 1024
