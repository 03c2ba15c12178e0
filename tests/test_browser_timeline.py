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

import browser as browser_support
import pytest
from browser import (
    Page,
    chromium,
    drag,
    image_difference,
    painted_share,
    pixel_share,
    play_then_pause,
    require_browser,
    save_screenshot,
    set_slider,
    set_top_level,
    state_mismatches,
)
from test_element_timeline import small_case

from delay.case import load_case
from delay.cpm import schedule
from delay.errors import CaseError
from delay.synth import synthesise
from reports.element_timeline import element_states, standalone_html

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
        ("E1", 1): (2, 3),
        ("E1", 2): (2, 2),
        ("E1", 4): (2, 2),
        ("E2", 1): (1, 3),
        ("E2", 2): (1, 1),
        ("E2", 4): (2, 3),
        ("E4", 1): (4, 4),
        ("E4", 2): (4, 4),
        ("E4", 4): (4, 4),
    }
    hover = {"E1": ("footing", {"A"}, "2025-01-06"), "E2": ("column", {"B", "C"}, "2025-01-13")}
    return case, rows, 6, checks, hover, ["E4"]


def _computed_expectations(case, rows: list[dict]):
    """Expected weeks and states worked out from the case's input dates (see module doc)."""
    base = schedule(case, "baseline").activities
    planned_dates = {i: (s.date(), f.date()) for i, s, f in zip(base["id"], base["early_start"], base["early_finish"])}
    record = case.asbuilt_snapshot.activities
    built_dates = {
        i: (s.date(), f.date()) for i, s, f in zip(record["id"], record["actual_start"], record["actual_finish"])
    }
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
    going = next((i for i, c in codes.items() if i != late and any(1 in pair for pair in c.values())), rows[1]["id"])
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


def _begun(case, rows: list[dict]):
    """Per element, the date its work begins in each view, worked out from the input as
    ``_computed_expectations`` does (None where no activity shares its wbs); and the weeks."""
    base = schedule(case, "baseline").activities
    record = case.asbuilt_snapshot.activities
    wbs_of = dict(zip(record["id"], record["wbs"]))
    wbs_of.update(zip(case.baseline.activities["id"], case.baseline.activities["wbs"]))
    starts = {
        "planned": dict(zip(base["id"], (d.date() for d in base["early_start"]))),
        "built": dict(zip(record["id"], (d.date() for d in record["actual_start"]))),
    }
    finishes = [d.date() for d in list(base["early_finish"]) + list(record["actual_finish"])]
    begun = {}
    for row in rows:
        found = {
            view: [day for a, day in dates.items() if wbs_of.get(a) == row["wbs"]] for view, dates in starts.items()
        }
        begun[row["id"]] = tuple(min(found[view]) if found[view] else None for view in ("planned", "built"))
    weeks = _mondays(min(min(d.values()) for d in starts.values()), max(finishes))
    return begun, weeks


def _small_begun():
    """Restated from the hand working in test_element_timeline.py: as planned E1 begins
    Monday 2025-01-06 and E2, E3 Monday 01-13; as built E1 01-06 and E2, E3 Wednesday
    01-15; E4 never (no activity shares its wbs)."""
    planned, built = dt.date(2025, 1, 13), dt.date(2025, 1, 15)
    begun = {"E1": (dt.date(2025, 1, 6),) * 2, "E2": (planned, built), "E3": (planned, built), "E4": (None, None)}
    return begun, _mondays(dt.date(2025, 1, 6), dt.date(2025, 2, 7))


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
        begun, mondays = _small_begun()
    else:
        case, rows = _demo_or_synthetic(folder)
        weeks, checks, hover, unlinked = _computed_expectations(case, rows)
        begun, mondays = _begun(case, rows)
    assert len(mondays) == weeks
    path = folder / "timeline.html"
    path.write_text(standalone_html(element_states(case), "Element timeline"), encoding="utf-8")
    page = Page(browser, path)
    page.page.wait_for_selector(".element-timeline[data-ready=true]", timeout=120_000)
    yield SimpleNamespace(
        name=request.param,
        page=page.page,
        errors=page.errors,
        folder=folder,
        rows=rows,
        drawn=_drawn_positions(rows),
        weeks=weeks,
        checks=checks,
        hover=hover,
        unlinked=unlinked,
        begun=begun,
        mondays=mondays,
    )
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
    slider = opened.page.eval_on_selector('.element-timeline [data-role="slider"]', "s => [s.min, s.max, s.step]")
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
    if not _webgl(page):
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


# -- progress, levels and one camera ------------------------------------------------------------
def _solid_triangles(page) -> list[int]:
    """Triangles the two solid meshes draw (12 per box drawn solid), as planned and as built."""
    return page.evaluate("""() => {
        const three = document.querySelector('.element-timeline [data-role="plot3d"]');
        return [three.data[0].i.length, three.data[1].i.length];
    }""")


def _expected_solid(opened, frame: int, levels: set[str] | None = None) -> list[int]:
    """12 triangles for each box whose work has begun by the Monday of ``frame`` in each
    view (the input dates, see ``_begun``), on the ``levels`` shown (default all)."""
    monday = opened.mondays[frame]
    counts = [0, 0]
    for row in opened.rows:
        if row["id"] not in opened.drawn or (levels is not None and row["level"] not in levels):
            continue
        for view, day in enumerate(opened.begun[row["id"]]):
            counts[view] += 12 * (day is not None and day <= monday)
    return counts


def _webgl(page) -> bool:
    return page.evaluate("() => Boolean(document.createElement('canvas').getContext('webgl'))")


def test_the_building_rises_from_an_empty_site(opened):
    page = opened.page
    plot = page.locator('.element-timeline [data-role="plot3d"]')
    last = opened.weeks - 1
    frames = sorted({0, last // 4, last // 2, (3 * last) // 4, last})
    shares = []
    for frame in frames:
        set_slider(page, frame)
        # only work begun by that Monday is solid, in both views
        assert _solid_triangles(page) == _expected_solid(opened, frame), frame
        if _webgl(page):
            shares.append(painted_share(page, plot))
    if shares:
        print(
            f"\n{opened.name}: painted share of the 3D views at weeks {frames}: "
            + ", ".join(f"{share:.1%}" for share in shares)
        )
        # the painted share of the view grows week by week (a little give for antialiasing)
        assert all(later >= earlier - 0.002 for earlier, later in zip(shares, shares[1:])), shares
        assert shares[-1] > shares[0] + 0.01, shares
        if _expected_solid(opened, 0) == [0, 0]:
            # nothing begun: an empty-looking site, the axis labels and faint wire frames
            # (measured on the demo: 0.5 % of the view in the first week, 13.5 % in the last)
            assert shares[0] < shares[-1] / 5, shares
    _no_errors(opened)


def test_the_level_filter_changes_what_is_painted(opened):
    page = opened.page
    plot = page.locator('.element-timeline [data-role="plot3d"]')
    last = opened.weeks - 1
    set_slider(page, last)
    # the levels of the boxes drawn, from the lowest up by the lowest z of their elements
    # (elements.csv)
    lowest: dict[str, float] = {}
    for row in opened.rows:
        if row["id"] in opened.drawn:
            level = row["level"] or "(no level)"
            lowest[level] = min(lowest.get(level, float("inf")), float(row["z"]))
    order = sorted(lowest, key=lambda name: (lowest[name], name))
    options = page.eval_on_selector_all('.element-timeline [data-role="levels"] option', "os => os.map(o => o.value)")
    assert len(options) == len(order) and page.eval_on_selector(
        '.element-timeline [data-role="levels"]', "s => s.value"
    ) == str(len(order) - 1)  # every level to start
    every = painted_share(page, plot) if _webgl(page) else None
    # by keyboard: Home on the focused control chooses the lowest level
    assert set_top_level(page, keys=["Home"]) == 0
    assert _solid_triangles(page) == _expected_solid(opened, last, {order[0]})
    if every is not None:
        lowest_only = painted_share(page, plot)
        print(
            f"\n{opened.name}: painted share in the last week, every level {every:.1%}, "
            f"the lowest level only {lowest_only:.1%}"
        )
        assert lowest_only < every - 0.005
    # as a mouse would: the second level, then every level again
    if len(order) > 1:
        assert set_top_level(page, option="1") == 1
        assert _solid_triangles(page) == _expected_solid(opened, last, set(order[:2]))
    assert set_top_level(page, keys=["End"]) == len(order) - 1
    assert _solid_triangles(page) == _expected_solid(opened, last)
    _no_errors(opened)


def _scene_images(page) -> list[bytes]:
    """Screenshots of the two scenes, the same size, below their titles."""
    boxes = page.evaluate("""() => {
        const div = document.querySelector('.element-timeline [data-role="plot3d"]');
        const r = div.getBoundingClientRect(), size = div._fullLayout._size;
        return ["scene", "scene2"].map(name => {
            const d = div._fullLayout[name].domain;
            return {x: r.left + window.scrollX + size.l + d.x[0] * size.w,
                    y: r.top + window.scrollY + size.t + (1 - d.y[1]) * size.h,
                    width: (d.x[1] - d.x[0]) * size.w, height: (d.y[1] - d.y[0]) * size.h};
        });
    }""")
    width = int(min(b["width"] for b in boxes)) - 2
    height = int(min(b["height"] for b in boxes)) - 2
    return [
        page.screenshot(
            full_page=True, clip={"x": round(b["x"]) + 1, "y": round(b["y"]) + 1, "width": width, "height": height}
        )
        for b in boxes
    ]


def _cameras(page) -> list[dict]:
    return page.evaluate("""() => {
        const div = document.querySelector('.element-timeline [data-role="plot3d"]');
        return [div._fullLayout.scene.camera.eye, div._fullLayout.scene2.camera.eye];
    }""")


def test_the_cameras_stay_in_step_when_either_view_is_dragged(opened):
    page = opened.page
    set_slider(page, 0)
    set_top_level(page, keys=["End"])
    # the first week draws the same in both views here (checked below from the input), so
    # with one camera the two scenes' pictures are alike
    assert _expected_solid(opened, 0)[0] == _expected_solid(opened, 0)[1]
    plot = page.locator('.element-timeline [data-role="plot3d"]')
    plot.scroll_into_view_if_needed()
    box = plot.bounding_box()
    start = _cameras(page)
    before = _scene_images(page) if _webgl(page) else None
    for side, dx in ((0.25, 140), (0.75, -90)):
        drag(page, box["x"] + side * box["width"], box["y"] + 0.55 * box["height"], dx, 25)
        page.wait_for_timeout(800)
        eyes = _cameras(page)
        assert eyes[0] != start[0], "the drag did not turn the view"
        assert eyes[0] == pytest.approx(eyes[1], abs=1e-9), (side, eyes)
        start = eyes
    # a new week keeps the camera the reader chose
    set_slider(page, 1)
    set_slider(page, 0)
    assert _cameras(page) == start
    if before is not None:
        page.mouse.move(1, 1)  # no hover label over either scene
        page.wait_for_timeout(300)
        left, right = _scene_images(page)
        alike = image_difference(page, left, right)
        turned = image_difference(page, before[0], left)
        print(
            f"\n{opened.name}: mean pixel difference, left against right scene {alike:.2f}, "
            f"left scene before against after the turn {turned:.2f}"
        )
        assert alike < turned / 4, (alike, turned)
    _no_errors(opened)
