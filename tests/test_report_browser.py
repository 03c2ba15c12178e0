"""The report in a real browser: Debian's Chromium, headless, offline (file://).

Two reports are opened: the demo case's full report (``reports.writer.demo_report``) and the
small worked case of ``test_report.py``, whose activity B is named
``<script>alert(1)</script>``. The expected weeks and element states are worked out by the
test from the input files (the baseline's early dates from the engine and the as-built
record as loaded, joined to elements.csv by work breakdown code, the state rule of
case-format), as ``test_browser_timeline.py`` does, and compared with what plotly draws.
"""

from __future__ import annotations

import re
from types import SimpleNamespace

import pytest
from browser import (
    Page,
    chromium,
    grey_statistics,
    play_then_pause,
    printed,
    require_browser,
    save_screenshot,
    set_slider,
    state_mismatches,
)
from test_browser_timeline import _computed_expectations, _demo_or_synthetic, _drawn_positions
from test_report import SCRIPT, write_small_case

from reports.builder import SECTIONS
from reports.writer import demo_report

#: A4 landscape is 297 mm wide; the report prints with 10 mm margins: 277 mm at 96 px per inch
A4_LANDSCAPE_CONTENT_PX = int(277 / 25.4 * 96)  # 1046


@pytest.fixture(scope="module")
def browser():
    require_browser()
    with chromium() as opened:
        yield opened


@pytest.fixture(scope="module")
def demo(browser, tmp_path_factory):
    folder = tmp_path_factory.mktemp("report-demo")
    case, rows = _demo_or_synthetic(folder)
    weeks, checks, _, _ = _computed_expectations(case, rows)
    out = demo_report(case, folder / "report")
    page = Page(browser, out / "report.html")
    page.page.wait_for_selector(".element-timeline[data-ready=true]", timeout=120_000)
    page.page.wait_for_function("() => document.documentElement.dataset.reportReady === 'true'")
    yield SimpleNamespace(
        page=page.page,
        errors=page.errors,
        folder=folder,
        out=out,
        rows=rows,
        drawn=_drawn_positions(rows),
        weeks=weeks,
        checks=checks,
    )
    page.close()


def _no_errors(opened) -> None:
    assert opened.errors == [], f"console errors: {opened.errors}"


def test_no_console_errors_and_every_section_present(demo):
    found = demo.page.evaluate("""() => Array.from(document.querySelectorAll('main > section.report-section'))
        .map(s => [s.id, s.querySelector('h2').textContent, s.dataset.available])""")
    assert [key for key, _, _ in found] == [key for key, _ in SECTIONS]
    for (key, title), (_, heading, _) in zip(SECTIONS, found):
        assert heading.endswith(title), (key, heading)
    available = {key: flag for key, _, flag in found}
    # the demo case has every record a report needs; the method comparison is not in this version
    for key in (
        "summary",
        "quality",
        "windows",
        "impacted",
        "tia",
        "collapsed",
        "asbuilt",
        "timeline",
        "inputs",
        "manifest",
    ):
        assert available[key] == "yes", key
    charts = demo.page.evaluate("""() => Array.from(document.querySelectorAll('figure.chart .js-plotly-plot'))
        .map(div => [div.closest('figure').dataset.figure, div.data.length, div._fullLayout ? 1 : 0])""")
    assert {name for name, _, _ in charts} >= {
        "days_by_method",
        "completion_trend",
        "window_movements",
        "impacted_steps",
        "tia_steps",
        "planned_against_built",
    }
    assert all(traces >= 1 and drawn for _, traces, drawn in charts)
    _no_errors(demo)


def test_the_timeline_has_one_frame_per_week_and_both_views(demo):
    page = demo.page
    slider = page.eval_on_selector('.element-timeline [data-role="slider"]', "s => [s.min, s.max, s.step]")
    assert slider == ["0", str(demo.weeks - 1), "1"], f"expected {demo.weeks} weekly frames"
    facts = page.evaluate("""() => {
        const three = document.querySelector('.element-timeline [data-role="plot3d"]');
        const flat = document.querySelector('.element-timeline [data-role="plot2d"]');
        return {types: three.data.map(t => t.type), scenes: three.data.map(t => t.scene),
                vertices: three.data[0].x.length, flat: flat.data.map(t => t.type),
                points: flat.data[0].x.length};
    }""")
    assert facts["types"][:2] == ["mesh3d", "mesh3d"] and facts["scenes"][:2] == ["scene", "scene2"]
    assert facts["vertices"] == 8 * len(demo.drawn)
    assert facts["flat"] == ["scattergl", "scattergl"] and facts["points"] == len(demo.rows)
    _no_errors(demo)


def test_the_play_button_advances_the_slider(demo):
    page = demo.page
    play_then_pause(page)
    assert page.eval_on_selector('.element-timeline [data-role="slider"]', "s => +s.value") >= 1
    _no_errors(demo)


def test_three_elements_at_three_dates_match_the_planned_and_built_dates(demo):
    assert len({ident for ident, _ in demo.checks}) == 3 and len({f for _, f in demo.checks}) == 3
    problems = state_mismatches(demo.page, demo.rows, demo.checks, demo.drawn)
    assert not problems, "\n".join(problems)
    _no_errors(demo)


def test_the_tables_fit_a4_landscape_when_printed(demo):
    page = demo.page
    with printed(page, A4_LANDSCAPE_CONTENT_PX, settle=300):  # folded tables open
        _tables_fit_a4(page)
    _no_errors(demo)


def _tables_fit_a4(page) -> None:
    wide = page.evaluate("""() => Array.from(document.querySelectorAll('table'))
        .filter(t => t.offsetParent !== null && t.getBoundingClientRect().width > 0)
        .filter(t => t.getBoundingClientRect().right > document.documentElement.clientWidth + 1)
        .map(t => [(t.closest('[data-table]') || t.closest('section')).dataset.table || 'timeline',
                   Math.round(t.getBoundingClientRect().right)])""")
    assert wide == [], f"tables wider than A4 landscape ({A4_LANDSCAPE_CONTENT_PX} px): {wide}"
    opened = page.evaluate("() => Array.from(document.querySelectorAll('details.long-table')).every(d => d.open)")
    assert opened
    pdf = page.pdf(format="A4", landscape=True, print_background=True)
    # each page is A4 landscape (842 x 595 points), and each section starts a page
    boxes = re.findall(rb"/MediaBox\s*\[\s*0\s+0\s+([\d.]+)\s+([\d.]+)\s*\]", pdf)
    assert boxes and all(abs(float(w) - 841.89) < 2 and abs(float(h) - 595.28) < 2 for w, h in boxes)
    assert len(boxes) >= len(SECTIONS)


def _boxes_of(page, figure: str, selector: str) -> list[dict]:
    return page.evaluate(
        """([figure, selector]) => Array.from(
        document.querySelectorAll(`[data-figure="${figure}"] ${selector}`))
        .map(e => e.getBoundingClientRect()).filter(r => r.width > 0 && r.height > 0)
        .map(r => ({left: r.left, top: r.top, right: r.right, bottom: r.bottom}))""",
        [figure, selector],
    )


def _overlap(a: dict, b: dict) -> bool:
    return a["left"] < b["right"] and b["left"] < a["right"] and a["top"] < b["bottom"] and b["top"] < a["bottom"]


def test_the_planned_against_built_chart_prints_on_a4_and_reads_in_greyscale(demo):
    page = demo.page
    with printed(page, A4_LANDSCAPE_CONTENT_PX):  # charts fit the printed width
        _chart_prints_on_a4_in_greyscale(page, "planned_against_built")
    _no_errors(demo)


def _chart_prints_on_a4_in_greyscale(page, name: str) -> None:
    chart = page.locator(f'[data-figure="{name}"] .js-plotly-plot')
    chart.scroll_into_view_if_needed()
    (svg,) = _boxes_of(page, name, ".main-svg:first-of-type")
    assert svg["right"] <= page.evaluate("() => document.documentElement.clientWidth") + 1, svg
    # every other chart and both views of the element timeline fit the printed width too
    wide = page.evaluate("""() => Array.from(document.querySelectorAll('.js-plotly-plot'))
        .filter(p => p.getBoundingClientRect().right > document.documentElement.clientWidth + 1)
        .map(p => (p.closest('[data-figure]') || {dataset: {figure: p.dataset.role}}).dataset.figure)""")
    assert wide == [], f"charts wider than A4 landscape: {wide}"
    # the legend keeps clear of the plot, of every date tick (the first one too) and of the title
    (legend,) = _boxes_of(page, name, ".legend")
    ticks = _boxes_of(page, name, ".xtick text")
    plot = _boxes_of(page, name, ".nsewdrag")
    title = _boxes_of(page, name, ".gtitle")
    assert ticks and plot and title
    assert not [box for box in ticks + plot + title if _overlap(legend, box)], (legend, ticks[:2])
    assert legend["bottom"] <= min(t["top"] for t in ticks)  # above the first date tick, not beside it
    # in greyscale the planned bars (pale, hatched) and the actual bars (solid, dark) stay
    # apart: compare the pixels of the longest bar of each kind
    page.evaluate(f"""() => document.querySelector('[data-figure="{name}"]').style.filter = "grayscale(1)" """)
    statistics = []
    for trace in range(2):  # the bar traces: as planned, then as built
        bars = page.evaluate(
            """([figure, trace]) => {
            const layer = document.querySelectorAll(`[data-figure="${figure}"] .barlayer .trace`)[trace];
            return Array.from(layer.querySelectorAll(".point path")).map(p => p.getBoundingClientRect())
                .map(r => ({x: r.left + window.scrollX, y: r.top + window.scrollY, width: r.width, height: r.height}));
        }""",
            [name, trace],
        )
        widest = max(bars, key=lambda b: b["width"])
        assert widest["width"] > 8 and widest["height"] > 4, widest
        clip = {
            "x": widest["x"] + 2,
            "y": widest["y"] + 2,
            "width": widest["width"] - 4,
            "height": widest["height"] - 4,
        }
        statistics.append(grey_statistics(page, page.screenshot(full_page=True, clip=clip)))
    (planned_mean, planned_spread), (built_mean, built_spread) = statistics
    print(
        f"\ngreyscale print: planned bar lightness {planned_mean:.0f} (spread {planned_spread:.0f}), "
        f"actual bar {built_mean:.0f} (spread {built_spread:.0f})"
    )
    # (two plain blues, sky #56B4E9 and deep #0072B2, come out at 164 and 94 under the
    # weights 0.2126 r + 0.7152 g + 0.0722 b of grayscale() in the W3C Filter Effects
    # specification, worked by hand: 70 apart; these bars must be more than 90 apart, and
    # only one of them hatched)
    assert planned_mean - built_mean > 90  # light against dark, out of 255
    assert planned_spread > 2 * built_spread + 5  # hatched against plain
    page.evaluate(f"""() => document.querySelector('[data-figure="{name}"]').style.filter = "" """)


def test_a_screenshot_of_the_report_is_saved(demo):
    page = demo.page
    set_slider(page, demo.weeks // 2)
    page.locator("#timeline").scroll_into_view_if_needed()
    paths = save_screenshot(page, "report_demo.png", demo.folder)
    assert all(p.stat().st_size > 50_000 for p in paths)
    _no_errors(demo)


def test_an_activity_named_like_a_script_shows_as_text_and_runs_nothing(browser, tmp_path):
    from reports.writer import build

    out = build(write_small_case(tmp_path / "case"), tmp_path / "report")
    dialogs: list[str] = []
    page = Page(browser, out / "report.html")
    page.page.on("dialog", lambda d: (dialogs.append(d.message), d.dismiss()))
    page.page.wait_for_selector(".element-timeline[data-ready=true]", timeout=60_000)
    page.page.wait_for_timeout(500)
    text = page.page.inner_text("body")
    assert SCRIPT in text  # shown as the characters typed
    injected = page.page.evaluate("""() => Array.from(document.scripts)
        .filter(s => s.textContent.includes('<script>alert(1)')).length""")
    hover = page.page.evaluate("""() => {
        const div = document.querySelector('[data-figure="planned_against_built"] .js-plotly-plot');
        return div.data.map(t => (t.hovertext || []).join(' ')).join(' ');
    }""")
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in hover  # plotly shows entities as text
    assert dialogs == [] and injected == 0
    assert page.errors == []
    page.close()


# -- the first page: what each method concludes, why they differ, what needs explaining, the opinion --
#: A4 landscape is 210 mm high; the report prints with 10 mm margins: 190 mm at 96 px per inch
A4_LANDSCAPE_CONTENT_HEIGHT_PX = int(190 / 25.4 * 96)  # 718


def _csv_rows(folder, key: str) -> list[dict]:
    import csv

    with open(folder / "tables" / f"{key}.csv", newline="", encoding="utf-8") as handle:
        return list(csv.DictReader(handle))


@pytest.fixture(scope="module")
def first_page(browser, demo):
    """The demo report in a window of 1280 x 900, at the top of the page."""
    opened = Page(browser, demo.out / "report.html", width=1280, height=900)
    opened.page.wait_for_function("() => document.documentElement.dataset.reportReady === 'true'")
    yield opened
    opened.close()


def _box(page, selector: str) -> dict:
    return page.evaluate(
        """selector => {
        const r = document.querySelector(selector).getBoundingClientRect();
        return {top: r.top + window.scrollY, bottom: r.bottom + window.scrollY, height: r.height};
    }""",
        selector,
    )


def test_the_headline_the_reasons_and_the_opinion_are_seen_without_scrolling(first_page, demo):
    page = first_page.page
    assert page.evaluate("() => window.scrollY") == 0
    headline = _box(page, '[data-table="headline"]')
    reasons = _box(page, ".first-page .sentences:not(.warnings)")
    opinion = _box(page, ".first-page .group.opinion")
    assert 0 < headline["top"] and headline["bottom"] <= 900, headline
    assert reasons["bottom"] <= 900 and opinion["bottom"] <= 900, (reasons, opinion)
    # what each method concludes: one row per method, as in the appendix's table
    shown = page.evaluate("""() => Array.from(document.querySelectorAll('[data-table="headline"] tbody tr'))
        .map(tr => Array.from(tr.cells).map(td => td.textContent.trim()))""")
    rows = _csv_rows(demo.out, "headline")
    assert [r[0] for r in shown] == [r["method_title"] for r in rows]
    assert [(r[1], r[2]) for r in shown] == [(r["eot_days"], r["revised_completion"]) for r in rows]
    assert "Why the methods differ" in page.inner_text(".first-page")
    assert "No opinion was given" in page.inner_text(".first-page .group.opinion")  # the demo has no opinion.md
    save_screenshot(page, "report_first_page.png", demo.folder, full_page=False)
    _no_errors(first_page)


def test_the_warnings_the_demo_needs_are_on_its_first_page(first_page, demo):
    page = first_page.page
    warnings = page.evaluate("""() => Array.from(document.querySelectorAll('.first-page .sentences.warnings li'))
        .map(li => [li.textContent, li.getBoundingClientRect().top + window.scrollY])""")
    texts = [text for text, _ in warnings]
    # worked out here from the headline and the dates of the appendix: a method whose revised
    # completion falls after the actual completion gives more than the overrun; extensions
    # further apart than 10 days are a disagreement
    actual = {r["what"]: r["date"] for r in _csv_rows(demo.out, "completion_dates")}["actual completion"]
    headline = _csv_rows(demo.out, "headline")
    late = [r["method_title"] for r in headline if r["revised_completion"] > actual]
    assert late, "the demo has a revised completion after the actual completion"
    for method in late:
        assert any(
            t.startswith(method.split(" (")[0].capitalize() + ": the extension of time")
            and "falls after the actual completion" in t
            for t in texts
        ), method
    extensions = [int(r["eot_days"]) for r in headline]
    if max(extensions) - min(extensions) > 10:
        assert any(f"differ by {max(extensions) - min(extensions)} days on the extension of time" in t for t in texts)
    assert any("no event explains" in t for t in texts) and any(
        "does not reproduce the actual dates" in t for t in texts
    )
    assert warnings[0][1] < 900  # they start above the fold
    _no_errors(first_page)


def test_the_first_printed_page_holds_the_conclusions_and_the_fold_prints_open(first_page):
    page = first_page.page
    assert page.evaluate("() => document.querySelector('details.folded').open") is False  # closed on screen
    with printed(page, A4_LANDSCAPE_CONTENT_PX):
        conclusions = _box(page, ".first-page")
        assert conclusions["bottom"] <= A4_LANDSCAPE_CONTENT_HEIGHT_PX, conclusions
        folded = page.evaluate("""() => { const d = document.querySelector('details.folded');
            return [d.open, d.querySelector('table').getBoundingClientRect().height]; }""")
        assert folded[0] is True and folded[1] > 1000  # the whole ledger, printed
        _tables_fit_a4(page)
    # closed again, the long tables too, though the PDF printed in between began a print of its own
    assert page.evaluate("() => document.querySelector('details.folded').open") is False
    assert page.evaluate("() => Array.from(document.querySelectorAll('details.long-table')).every(d => !d.open)")
    _no_errors(first_page)


def test_each_window_is_told_in_one_sentence(demo):
    told = demo.page.evaluate("""() => Array.from(document.querySelectorAll('#windows .sentences.story li'))
        .map(li => li.textContent)""")
    windows = _csv_rows(demo.out, "windows")
    assert len(told) == len(windows) > 1
    assert told == [w["sentence"] for w in windows]
    assert all(t.startswith(f"Window {w['window']} (") for t, w in zip(told, windows))
    _no_errors(demo)


def test_the_grants_are_listed_and_the_forecast_chart_steps_at_each(demo):
    page = demo.page
    rows = page.evaluate("""() => Array.from(document.querySelectorAll('[data-table="extensions_granted"] tbody tr'))
        .map(tr => Array.from(tr.cells).slice(0, 3).map(td => td.textContent))""")
    # extensions_granted.csv of the demo: EOT-01 of 21 days on 2025-08-22, EOT-02 of 7 days on 2026-03-20
    assert rows == [["EOT-01", "2025-08-22", "21"], ["EOT-02", "2026-03-20", "7"]]
    line = page.evaluate("""() => {
        const trace = document.querySelector('[data-figure="completion_trend"] .js-plotly-plot').data
            .find(t => t.name === 'contract completion in force');
        return {x: Array.from(trace.x), y: Array.from(trace.y), shape: trace.line.shape};
    }""")
    # the contract completion 2026-05-29, +21 days from 2025-08-22, +7 more from 2026-03-20
    assert line["shape"] == "hv"
    steps = dict(zip(line["x"], line["y"]))
    assert line["y"][0] == "2026-05-29" and steps["2025-08-22"] == "2026-06-19" and steps["2026-03-20"] == "2026-06-26"
    _no_errors(demo)


def test_a_hostile_opinion_is_shown_as_text_and_runs_nothing(browser, tmp_path):
    from test_report_conclusions import HOSTILE_OPINION

    from reports.writer import build

    root = write_small_case(tmp_path / "case")
    (root / "opinion.md").write_text(HOSTILE_OPINION, encoding="utf-8")
    out = build(root, tmp_path / "report")
    opened = Page(browser, out / "report.html", width=1280, height=900)
    page = opened.page
    dialogs: list[str] = []
    page.on("dialog", lambda d: (dialogs.append(d.message), d.dismiss()))
    page.wait_for_function("() => document.documentElement.dataset.reportReady === 'true'")
    opinion = page.locator(".group.opinion .markdown")
    opinion.hover()
    page.mouse.move(5, 5)
    for link in page.locator(".group.opinion .markdown a").all():  # the links kept are safe to follow
        assert link.get_attribute("href").startswith(("https:", "mailto:", "notes/"))
    page.wait_for_timeout(300)
    found = page.evaluate("""() => ({
        owned: typeof window.owned,
        hrefs: Array.from(document.querySelectorAll('.markdown a')).map(a => a.getAttribute('href')),
        dangerous: document.querySelectorAll('.markdown script, .markdown img, .markdown iframe, .markdown [onerror], '
                                             + '.markdown [onmouseover], .markdown [onclick]').length,
        text: document.querySelector('.markdown').textContent})""")
    assert found["owned"] == "undefined"  # neither the script, the image, the div nor a link set it
    assert found["dangerous"] == 0 and dialogs == []
    assert found["hrefs"] == ["https://example.org/protocol", "notes/a.html", "mailto:a@example.org"]
    assert "<script>" in found["text"] and "javascript:window.owned='link'" in found["text"]  # shown as typed
    assert opened.errors == []  # no request for the image on the network either
    opened.close()
