"""Driving Debian's Chromium from the tests: headless, offline, through playwright.

The browser is the system's ``/usr/bin/chromium`` (``apt-get install chromium``); playwright
never downloads one here. On continuous integration (``CI=true``) a missing browser or a
missing playwright is a failure, elsewhere a skip with the reason.
"""

from __future__ import annotations

import base64
import contextlib
import importlib.util
import os
import shutil
from collections.abc import Iterator, Sequence
from pathlib import Path

import pytest

CHROMIUM = os.environ.get("CHROMIUM", "/usr/bin/chromium")
ARGUMENTS = [
    "--no-sandbox",
    "--disable-gpu",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
    "--no-first-run",
    # WebGL without a graphics card: Chromium's software renderer
    "--use-angle=swiftshader",
    "--enable-unsafe-swiftshader",
]


def require_browser() -> None:
    """Fail on CI, skip elsewhere, when playwright or Chromium is missing."""
    reason = None
    if importlib.util.find_spec("playwright") is None:
        reason = "the Python package playwright is not installed (pip install playwright)"
    if reason is None and not (Path(CHROMIUM).exists() or shutil.which(CHROMIUM)):
        reason = f"Chromium is not installed at {CHROMIUM} (apt-get install chromium)"
    if reason is None:
        return
    if os.environ.get("CI", "").lower() == "true":
        pytest.fail(f"browser test cannot run on CI: {reason}")
    pytest.skip(reason)


@contextlib.contextmanager
def chromium() -> Iterator[object]:
    """A headless Chromium (playwright ``Browser``), closed afterwards."""
    from playwright.sync_api import sync_playwright

    with sync_playwright() as driver:
        browser = driver.chromium.launch(executable_path=CHROMIUM, headless=True, args=ARGUMENTS)
        try:
            yield browser
        finally:
            browser.close()


class Page:
    """A page opened from a file, recording console errors and uncaught exceptions."""

    def __init__(self, browser, path: Path, *, width: int = 1300, height: int = 1400):
        self.errors: list[str] = []
        self.page = browser.new_page(viewport={"width": width, "height": height})
        self.page.on("console", lambda m: self.errors.append(m.text) if m.type == "error" else None)
        self.page.on("pageerror", lambda e: self.errors.append(f"uncaught: {e}"))
        # offline: any request that is not for a local file is an error
        self.page.route(
            "**/*",
            lambda route: (
                route.continue_()
                if route.request.url.startswith("file:")
                else (self.errors.append(f"network request: {route.request.url}"), route.abort())
            ),
        )
        self.page.goto(Path(path).resolve().as_uri())

    def close(self) -> None:
        self.page.close()


def save_screenshot(page, name: str, folder: Path, *, full_page: bool = True) -> list[Path]:
    """Save a screenshot of the whole page (``full_page``, else of the window) under
    ``folder`` and, if set, ``REPORT_SCREENSHOT_DIR``."""
    folder = Path(folder)
    folder.mkdir(parents=True, exist_ok=True)
    data = page.screenshot(full_page=full_page)
    paths = [folder / name]
    extra = os.environ.get("REPORT_SCREENSHOT_DIR")
    if extra:
        Path(extra).mkdir(parents=True, exist_ok=True)
        paths.append(Path(extra) / name)
    for path in paths:
        path.write_bytes(data)
    return paths


_DECODED = """async ([sources, argument]) => {
    const images = [];
    for (const source of sources) {
        const image = new Image();
        image.src = source;
        await image.decode();
        const canvas = document.createElement("canvas");
        canvas.width = image.width; canvas.height = image.height;
        const context = canvas.getContext("2d", {willReadFrequently: true});
        context.drawImage(image, 0, 0);
        images.push(context.getImageData(0, 0, image.width, image.height).data);
    }
    return (%s)(images, argument);
}"""


def _with_pixels(page, pngs: Sequence[bytes], function_js: str, argument=None):
    """Run ``function_js`` (a JS function of the images' RGBA pixel arrays and
    ``argument``) in the page on the PNGs, decoded by the browser itself (each drawn on a
    canvas), so that no imaging library is needed."""
    sources = ["data:image/png;base64," + base64.b64encode(png).decode("ascii") for png in pngs]
    return page.evaluate(_DECODED % function_js, [sources, argument])


def pixel_share(page, png: bytes, test_js: str) -> float:
    """Share of the pixels of a PNG for which ``test_js`` (a JS expression in r, g, b) holds."""
    return _with_pixels(
        page,
        [png],
        """([pixels], test) => {
        const check = new Function("r", "g", "b", "return " + test + ";");
        let hits = 0;
        for (let k = 0; k < pixels.length; k += 4) if (check(pixels[k], pixels[k + 1], pixels[k + 2])) hits++;
        return hits / (pixels.length / 4);
    }""",
        test_js,
    )


#: A pixel "painted" in the timeline's 3D views: its darkest channel below 190. The white
#: background, the pale grid (#E4E4E4) and the faint wire frames of work not begun
#: (#C9CFD6, palette.GHOST_COLOURS) have every channel at 190 or above, so they do not
#: count; the solid colours, the outlines and the axis labels do.
PAINTED = "Math.min(r, g, b) < 190"


def painted_share(page, locator) -> float:
    """Share of the painted pixels (:data:`PAINTED`) in a screenshot of ``locator``."""
    return pixel_share(page, locator.screenshot(), PAINTED)


def image_difference(page, first: bytes, second: bytes) -> float:
    """Mean absolute difference of two PNGs of the same size, per channel, 0 to 255."""
    return _with_pixels(
        page,
        [first, second],
        """([one, two]) => {
        if (one.length !== two.length) throw new Error("the images differ in size");
        let total = 0, count = 0;
        for (let k = 0; k < one.length; k += 4) {
            for (let c = 0; c < 3; c++) total += Math.abs(one[k + c] - two[k + c]);
            count += 3;
        }
        return total / count;
    }""",
    )


def grey_statistics(page, png: bytes) -> tuple[float, float]:
    """Mean and standard deviation of the lightness (0 to 255, the mean of r, g and b) of
    the pixels of a PNG."""
    return tuple(
        _with_pixels(
            page,
            [png],
            """([pixels]) => {
        let sum = 0, squares = 0, count = 0;
        for (let k = 0; k < pixels.length; k += 4) {
            const grey = (pixels[k] + pixels[k + 1] + pixels[k + 2]) / 3;
            sum += grey; squares += grey * grey; count++;
        }
        const mean = sum / count;
        return [mean, Math.sqrt(Math.max(0, squares / count - mean * mean))];
    }""",
        )
    )


def drag(page, x: float, y: float, dx: float, dy: float, steps: int = 10) -> None:
    """Press the mouse at (x, y), move it by (dx, dy) in ``steps`` steps and let go."""
    page.mouse.move(x, y)
    page.mouse.down()
    for k in range(1, steps + 1):
        page.mouse.move(x + dx * k / steps, y + dy * k / steps)
        page.wait_for_timeout(40)
    page.mouse.up()


@contextlib.contextmanager
def printed(page, width: int, *, settle: int = 500) -> Iterator[None]:
    """The page laid out as printed: ``width`` pixels wide, print media, the page's own
    ``beforeprint`` work done (folded tables opened, charts fitted); afterwards back to the
    screen at the size it had."""
    size = page.viewport_size
    page.set_viewport_size({"width": width, "height": 900})
    page.emulate_media(media="print")
    page.evaluate("() => window.dispatchEvent(new Event('beforeprint'))")
    page.wait_for_timeout(settle)
    try:
        yield
    finally:
        page.emulate_media(media="screen")
        page.evaluate("() => window.dispatchEvent(new Event('afterprint'))")
        page.set_viewport_size(size)


def set_slider(page, frame: int) -> None:
    """Move the element timeline's slider to ``frame`` and wait until it is drawn."""
    page.evaluate(
        """frame => {
        const slider = document.querySelector('.element-timeline [data-role="slider"]');
        slider.value = String(frame);
        slider.dispatchEvent(new Event("input", {bubbles: true}));
    }""",
        frame,
    )
    # software WebGL on a loaded machine can hold the page's thread for many seconds
    page.wait_for_function(
        "frame => document.querySelector('.element-timeline').dataset.frame === String(frame)",
        arg=frame,
        timeout=120_000,
    )
    wait_until_drawn(page)


def set_top_level(page, *, keys: Sequence[str] = (), option: str | None = None) -> int:
    """Choose the highest level the 3D views show: with the keyboard (``keys`` pressed on
    the focused control) or as a mouse would (``option``, the value chosen). Returns the
    level number now shown, once drawn."""
    control = page.locator('.element-timeline [data-role="levels"]')
    if option is not None:
        control.select_option(option)
    control.focus()
    for key in keys:
        page.keyboard.press(key)
    top = int(control.input_value())
    page.wait_for_function(
        "top => document.querySelector('.element-timeline').dataset.topLevel === String(top)", arg=top, timeout=120_000
    )
    wait_until_drawn(page)
    return top


def wait_until_drawn(page) -> None:
    """Wait until the element timeline has drawn the week and levels it shows."""
    page.wait_for_function(
        """() => {
        const root = document.querySelector('.element-timeline');
        return root.dataset.drawn === root.dataset.frame + ":" + root.dataset.topLevel;
    }""",
        timeout=120_000,
    )
    page.wait_for_timeout(150)  # WebGL paints on the next animation frames


def play_then_pause(page) -> None:
    """From the first week, press play, wait until the slider has moved on, press pause;
    the button must read "Play" again."""
    set_slider(page, 0)
    page.click('.element-timeline [data-role="play"]')
    # software WebGL (SwiftShader) takes about a second to draw a week of the demo model
    page.wait_for_function(
        "() => +document.querySelector('.element-timeline [data-role=\"slider\"]').value >= 1",
        timeout=30_000,
        polling=100,
    )
    # Pause in one step inside the page: on a loaded machine the few weeks of a small case
    # can all have played between a check here and a click (the player then stops by itself
    # at the last week, and a click would start it again from the first).
    page.evaluate(
        """() => {
        const play = document.querySelector('.element-timeline [data-role="play"]');
        if (play.textContent === "Pause") play.click();
    }"""
    )
    assert page.inner_text('.element-timeline [data-role="play"]') == "Play"

    def week() -> int:
        return int(page.eval_on_selector('.element-timeline [data-role="slider"]', "s => +s.value"))

    page.wait_for_timeout(500)  # a week being drawn when paused may still land
    shown = week()
    page.wait_for_timeout(1500)  # paused: the week shown stays put
    assert week() == shown


def state_mismatches(page, rows, checks, drawn) -> list[str]:
    """For each ``(element id, frame) -> (planned state, built state)`` in ``checks``, what
    the page's 2D view (and, for elements in ``drawn``, its 3D view) shows when it differs.

    ``rows`` are the elements in the page's order; ``drawn`` maps an element id to its box
    position in the 3D mesh (8 vertices a box).
    """
    position = {row["id"]: n for n, row in enumerate(rows)}
    problems = []
    for frame in sorted({f for _, f in checks}):
        set_slider(page, frame)
        seen = page.evaluate("""() => {
            const three = document.querySelector('.element-timeline [data-role="plot3d"]');
            const flat = document.querySelector('.element-timeline [data-role="plot2d"]');
            return {three: [Array.from(three.data[0].intensity), Array.from(three.data[1].intensity)],
                    flat: [Array.from(flat.data[0].marker.color), Array.from(flat.data[1].marker.color)]};
        }""")
        for (ident, f), expected in checks.items():
            if f != frame:
                continue
            got = (seen["flat"][0][position[ident]], seen["flat"][1][position[ident]])
            if got != expected:
                problems.append(f"{ident} week {frame}: 2D {got}, expected {expected}")
            if ident in drawn:
                vertex = 8 * drawn[ident]
                got = (seen["three"][0][vertex], seen["three"][1][vertex])
                if got != expected:
                    problems.append(f"{ident} week {frame}: 3D {got}, expected {expected}")
    return problems
