"""The element timeline in a real browser: Debian's Chromium, headless, offline (file://).

Two pages are checked: the small hand-worked case of ``test_element_timeline.py`` (expected
states restated from the hand working there) and the demo case (or, when the demo case does
not load, a synthetic one), whose expected states the test works out itself from the input:
the baseline's early dates (``delay.cpm.schedule``, the engine) and the as-built record as
loaded (``case.asbuilt_snapshot``), joined to elements.csv by work breakdown code, and the
state rule of case-format ("in progress from the earliest start to the latest finish",
inclusive) with "late against plan" as defined in ``reports.element_timeline``.

The page's plots are read through plotly's own graph objects (``div.data``), so the checks
see what plotly draws. The 3D scenes need WebGL; Chromium's software renderer (SwiftShader)
provides it headless, and a pixel count on a screenshot confirms that colours are drawn.
"""

from __future__ import annotations

import csv
import datetime as dt
import os
from pathlib import Path
from types import SimpleNamespace

import pytest

import browser as browser_support
from browser import (Page, chromium, pixel_share, play_then_pause, require_browser, save_screenshot, set_slider,
                     state_mismatches)
from delay.case import load_case
from delay.cpm import schedule
from delay.errors import CaseError
from delay.synth import synthesise
from reports.element_timeline import element_states, standalone_html
from test_element_timeline import small_case

DEMO = Path(__file__).resolve().parents[1] / "case_demo"


def test_a_missing_browser_fails_on_ci_and_skips_elsewhere(monkeypatch):
    monkeypatch.setattr(browser_support, "CHROMIUM", "/nonexistent/chromium")
    monkeypatch.setenv("CI", "true")
    with pytest.raises(pytest.fail.Exception, match="cannot run on CI"):
        require_browser()
    monkeypatch.delenv("CI")
    with pytest.raises(pytest.skip.Exception, match="Chromium is not installed"):
        require_browser()


@pytest.fixture(scope="module")
def browser():
    require_browser()
    with chromium() as opened:
        yield opened


def _read_elements(path: Path) -> list[dict]:
    with open(path, newline="", encoding="utf-8-sig") as handle:
        return list(csv.DictReader(handle))


def _drawn_positions(rows: list[dict]) -> dict[str, int]:
    """Position of each element among those with a complete box, in elements.csv order."""
    keys = ("x", "y", "z", "dx", "dy", "dz")
    drawn = [row["id"] for row in rows if all((row.get(k) or "").strip() for k in keys)]
    return {ident: n for n, ident in enumerate(drawn)}


def _mondays(first: dt.date, last: dt.date) -> list[dt.date]:
    """Every Monday from the one on or before ``first`` to the first one after ``last``."""
    monday = first - dt.timedelta(days=first.weekday())
    after = last + dt.timedelta(days=7 - last.weekday())
    return [monday + dt.timedelta(weeks=k) for k in range((after - monday).days // 7 + 1)]


def _state(day: dt.date, dates) -> int:
    start, finish = dates
    return 0 if day < start else (1 if day <= finish else 2)


def _expected_codes(day: dt.date, planned, built) -> tuple[int, int]:
    planned_code = 4 if planned is None else _state(day, planned)
    if built is None:
        return planned_code, 4
    built_code = _state(day, built)
    if planned is not None and built_code < planned_code:
        built_code = 3  # behind its planned state at that date: late against plan
    return planned_code, built_code


def _small_expectations(folder: Path):
    case = small_case(folder / "case")
    rows = _read_elements(folder / "case" / "elements.csv")
    # restated from the hand working in test_element_timeline.py: six Mondays from 2025-01-06
    # to 2025-02-10; at frames 1, 2, 4 (01-13, 01-20, 02-03): E1 planned 2, 2, 2 and built
    # 3, 2, 2; E2 planned 1, 1, 2 and built 3, 1, 3; E4 (unlinked) 4 throughout.
    checks = {
        ("E1", 1): (2, 3), ("E1", 2): (2, 2), ("E1", 4): (2, 2),
        ("E2", 1): (1, 3), ("E2", 2): (1, 1), ("E2", 4): (2, 3),
        ("E4", 1): (4, 4), ("E4", 2): (4, 4), ("E4", 4): (4, 4),
    }
    hover = {"E1": ("footing", {"A"}, "2025-01-06"), "E2": ("column", {"B", "C"}, "2025-01-13")}
    return case, rows, 6, checks, hover, ["E4"]


def _computed_expectations(case, rows: list[dict]):
    """Expected weeks and states worked out from the case's input dates (see module doc)."""
    base = schedule(case, "baseline").activities
    planned_dates = {i: (s.date(), f.date()) for i, s, f in
                     zip(base["id"], base["early_start"], base["early_finish"])}
    record = case.asbuilt_snapshot.activities
    built_dates = {i: (s.date(), f.date()) for i, s, f in
                   zip(record["id"], record["actual_start"], record["actual_finish"])}
    wbs_of = dict(zip(record["id"], record["wbs"]))
    wbs_of.update(zip(case.baseline.activities["id"], case.baseline.activities["wbs"]))

    def element_dates(dates: dict, ident: str):
        found = [dates[a] for a, code in wbs_of.items() if code == ident and a in dates]
        return (min(s for s, _ in found), max(f for _, f in found)) if found else None

    every = list(planned_dates.values()) + list(built_dates.values())
    weeks = _mondays(min(s for s, _ in every), max(f for _, f in every))
    frames = [len(weeks) // 4, len(weeks) // 2, (3 * len(weeks)) // 4]
    codes = {}
    for row in rows:
        planned = element_dates(planned_dates, row["wbs"])
        built = element_dates(built_dates, row["wbs"])
        codes[row["id"]] = {f: _expected_codes(weeks[f], planned, built) for f in frames}
    # three elements: one late at a chosen date, one in progress, one unlinked (or the last)
    late = next((i for i, c in codes.items() if any(b == 3 for _, b in c.values())), rows[0]["id"])
    going = next((i for i, c in codes.items() if i != late and any(1 in pair for pair in c.values())),
                 rows[1]["id"])
    unlinked = [i for i, c in codes.items() if all(pair == (4, 4) for pair in c.values())]
    third = unlinked[0] if unlinked else rows[-1]["id"]
    checks = {(ident, f): codes[ident][f] for ident in (late, going, third) for f in frames}
    hover = {}
    for row in rows:
        planned = element_dates(planned_dates, row["wbs"])
        if planned and row["id"] in (late, going):
            activities = {a for a, code in wbs_of.items() if code == row["wbs"]}
            hover[row["id"]] = (row["classification"], activities, planned[0].isoformat())
    return len(weeks), checks, hover, unlinked


def _demo_or_synthetic(folder: Path):
    """The demo case when it loads with an as-built record and elements, else a synthetic one."""
    try:
        case = load_case(DEMO)
    except (CaseError, OSError):
        case = None
    if case is not None and case.asbuilt_snapshot is not None and len(case.elements):
        return case, _read_elements(DEMO / "elements.csv")
    root = synthesise(folder / "synthetic", 300, updates=3, seed=1, elements=200)
    return load_case(root), _read_elements(root / "elements.csv")


@pytest.fixture(scope="module", params=["small", "demo"])
def opened(request, browser, tmp_path_factory):
    folder = tmp_path_factory.mktemp(f"timeline-{request.param}")
    if request.param == "small":
        case, rows, weeks, checks, hover, unlinked = _small_expectations(folder)
    else:
        case, rows = _demo_or_synthetic(folder)
        weeks, checks, hover, unlinked = _computed_expectations(case, rows)
    path = folder / "timeline.html"
    path.write_text(standalone_html(element_states(case), "Element timeline"), encoding="utf-8")
    page = Page(browser, path)
    page.page.wait_for_selector(".element-timeline[data-ready=true]", timeout=120_000)
    yield SimpleNamespace(name=request.param, page=page.page, errors=page.errors, folder=folder,
                          rows=rows, drawn=_drawn_positions(rows), weeks=weeks, checks=checks,
                          hover=hover, unlinked=unlinked)
    page.close()


def _no_errors(opened) -> None:
    assert opened.errors == [], f"console errors on the {opened.name} page: {opened.errors}"


def test_both_views_are_drawn(opened):
    facts = opened.page.evaluate("""() => {
        const three = document.querySelector('.element-timeline [data-role="plot3d"]');
        const flat = document.querySelector('.element-timeline [data-role="plot2d"]');
        return {types: three.data.map(t => t.type), scenes: three.data.map(t => t.scene),
                hasScenes: Boolean(three._fullLayout.scene && three._fullLayout.scene2),
                canvases: three.querySelectorAll("canvas").length,
                vertices: three.data[0].x.length, flat: flat.data.map(t => t.type),
                points: flat.data[0].x.length};
    }""")
    assert facts["types"][:2] == ["mesh3d", "mesh3d"] and facts["scenes"][:2] == ["scene", "scene2"]
    assert facts["hasScenes"] and facts["canvases"] >= 1
    assert facts["vertices"] == 8 * len(opened.drawn)  # 8 corners per box drawn
    assert facts["flat"] == ["scattergl", "scattergl"] and facts["points"] == len(opened.rows)
    _no_errors(opened)


def test_one_slider_step_per_week(opened):
    slider = opened.page.eval_on_selector('.element-timeline [data-role="slider"]',
                                          "s => [s.min, s.max, s.step]")
    assert slider == ["0", str(opened.weeks - 1), "1"], f"expected {opened.weeks} weekly steps"
    _no_errors(opened)


def test_play_advances_the_slider_and_pause_stops_it(opened):
    page = opened.page
    play_then_pause(page)
    # a step already being drawn when pause was pressed may still land: let it settle
    # (software WebGL on a loaded machine takes a few seconds for one week of the demo)
    page.wait_for_timeout(4000)
    held = page.eval_on_selector('.element-timeline [data-role="slider"]', "s => +s.value")
    page.wait_for_timeout(2500)
    assert page.eval_on_selector('.element-timeline [data-role="slider"]', "s => +s.value") == held
    assert held >= 1
    _no_errors(opened)


def test_states_of_chosen_elements_match_the_input_dates(opened):
    problems = state_mismatches(opened.page, opened.rows, opened.checks, opened.drawn)
    assert not problems, "\n".join(problems)
    _no_errors(opened)


def test_boxes_and_hover_text_come_from_the_elements(opened):
    page = opened.page
    mesh = page.evaluate("""() => {
        const t = document.querySelector('.element-timeline [data-role="plot3d"]').data[0];
        return {x: Array.from(t.x), y: Array.from(t.y), z: Array.from(t.z), text: t.text};
    }""")
    by_id = {row["id"]: row for row in opened.rows}
    for ident in {i for i, _ in opened.checks} | set(opened.hover):
        if ident not in opened.drawn:
            continue
        row, n = by_id[ident], opened.drawn[ident]
        low = [float(row[k]) for k in ("x", "y", "z")]
        high = [float(row[k]) + float(row["d" + k]) for k in ("x", "y", "z")]
        corner0 = [mesh["x"][8 * n], mesh["y"][8 * n], mesh["z"][8 * n]]
        corner6 = [mesh["x"][8 * n + 6], mesh["y"][8 * n + 6], mesh["z"][8 * n + 6]]
        assert corner0 == pytest.approx(low, abs=1e-3) and corner6 == pytest.approx(high, abs=1e-3), ident
        assert ident in mesh["text"][8 * n]
    for ident, (classification, activities, planned_start) in opened.hover.items():
        text = mesh["text"][8 * opened.drawn[ident]]
        assert classification in text and planned_start in text, (ident, text)
        shown = text.split("activities: ", 1)[1].split("<br>", 1)[0].split(" and ")[0].split(", ")
        assert shown and set(shown) <= activities, (ident, shown, activities)
    _no_errors(opened)


def test_unlinked_elements_are_listed(opened):
    listed = opened.page.inner_text('.element-timeline [data-role="unlinked"]')
    for ident in opened.unlinked:
        assert ident in listed
    _no_errors(opened)


def test_the_two_scenes_share_one_camera(opened):
    page = opened.page
    eye = page.evaluate("""async () => {
        const div = document.querySelector('.element-timeline [data-role="plot3d"]');
        await Plotly.relayout(div, {"scene.camera": {eye: {x: 2.1, y: 0.4, z: 0.9}, up: {x: 0, y: 0, z: 1}}});
        await new Promise(r => setTimeout(r, 300));
        const first = div.layout.scene2.camera.eye;
        await Plotly.relayout(div, {"scene2.camera": {eye: {x: -1.2, y: -1.9, z: 1.3}, up: {x: 0, y: 0, z: 1}}});
        await new Promise(r => setTimeout(r, 300));
        return [first, div.layout.scene.camera.eye];
    }""")
    assert eye[0] == {"x": 2.1, "y": 0.4, "z": 0.9}
    assert eye[1] == {"x": -1.2, "y": -1.9, "z": 1.3}
    _no_errors(opened)


def test_webgl_draws_the_colours_and_a_screenshot_is_saved(opened):
    page = opened.page
    if not page.evaluate("() => Boolean(document.createElement('canvas').getContext('webgl'))"):
        pytest.skip("no WebGL in this browser: the 3D drawing itself is not checked (states are)")
    plot = page.locator('.element-timeline [data-role="plot3d"]')
    # complete deep blue (palette #0072B2 and its shades: red near 0, green about 0.64 of
    # blue); the sky blue of "in progress" (#56B4E9) has red 0.37 and green 0.77 of blue
    blue = "b > 80 && r < 0.2 * b && g < 0.72 * b"
    set_slider(page, 0)
    page.wait_for_timeout(400)
    at_start = pixel_share(page, plot.screenshot(), blue)
    set_slider(page, opened.weeks - 1)
    page.wait_for_timeout(400)
    at_end = pixel_share(page, plot.screenshot(), blue)
    assert at_end > 0.01 and at_start < at_end / 5, (at_start, at_end)
    set_slider(page, opened.weeks // 2)
    page.wait_for_timeout(400)
    paths = save_screenshot(page, f"element_timeline_{opened.name}.png", opened.folder)
    assert all(p.stat().st_size > 10_000 for p in paths)
    if os.environ.get("REPORT_SCREENSHOT_DIR"):
        assert len(paths) == 2
    _no_errors(opened)
