"""Take the README's screenshot of the demo report with headless Chromium.

    .venv/bin/python tools/screenshot.py [--report DIR] [--out docs/report.png]
        [--section first-page] [--week 0.6] [--width 1280] [--height 900]

Without ``--report`` the demo case's full report is built first into a temporary folder
(``reports.writer.demo_report``). The page is opened from the file system in Debian's
Chromium (``/usr/bin/chromium``, or ``$CHROMIUM``) driven by Playwright, headless and
offline: any request that is not for a local file is refused and reported. The element
timeline is moved to the week ``--week`` of the way through the project. With ``--section
first-page`` (the default) the window is photographed as a reader first sees it, from the
top of the page (``--width`` x ``--height``: what shows without scrolling); with a
section's id (``timeline``, ``windows``, ...) that section is photographed from its heading
down (``--height`` pixels at most).
"""

from __future__ import annotations

import argparse
import os
import shutil
import sys
import tempfile
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
#: The ``--section`` that photographs the window at the top of the page.
FIRST_PAGE = "first-page"
CHROMIUM = os.environ.get("CHROMIUM", "/usr/bin/chromium")
ARGUMENTS = [
    "--no-sandbox",
    "--disable-gpu",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
    "--no-first-run",
    "--use-angle=swiftshader",
    "--enable-unsafe-swiftshader",
]


def take(report: Path, out: Path, *, section: str, week: float, width: int, height: int) -> Path:
    """Photograph a report page with headless Chromium.

    Parameters
    ----------
    report: the report's ``report.html``.
    out: the PNG file to write.
    section: :data:`FIRST_PAGE`, or the id of a section.
    week: how far through the project the element timeline is set, 0 to 1.
    width, height: the window's size in pixels (a section: at most ``height`` of it).

    Returns
    -------
    Path
        ``out``.

    Raises
    ------
    SystemExit
        The page reported a problem (a console error, a network request), or has no such
        section.
    """
    from playwright.sync_api import sync_playwright

    problems: list[str] = []
    with sync_playwright() as driver:
        browser = driver.chromium.launch(executable_path=CHROMIUM, headless=True, args=ARGUMENTS)
        try:
            page = browser.new_page(viewport={"width": width, "height": height}, device_scale_factor=1)
            page.on("console", lambda m: problems.append(m.text) if m.type == "error" else None)
            page.on("pageerror", lambda e: problems.append(f"uncaught: {e}"))
            page.route(
                "**/*",
                lambda route: (
                    route.continue_()
                    if route.request.url.startswith("file:")
                    else (problems.append(f"network request: {route.request.url}"), route.abort())
                ),
            )
            page.goto(report.resolve().as_uri())
            page.wait_for_function("() => document.documentElement.dataset.reportReady === 'true'")
            if page.locator(".element-timeline").count():
                page.wait_for_selector(".element-timeline[data-ready=true]", timeout=120_000)
                frames = int(page.eval_on_selector('.element-timeline [data-role="slider"]', "s => +s.max")) + 1
                frame = max(0, min(frames - 1, round(week * (frames - 1))))
                page.evaluate(
                    """frame => {
                    const slider = document.querySelector('.element-timeline [data-role="slider"]');
                    slider.value = String(frame);
                    slider.dispatchEvent(new Event("input", {bubbles: true}));
                }""",
                    frame,
                )
                # the timeline marks the week and levels it has drawn in data-drawn
                page.wait_for_function(
                    """f => {
                    const root = document.querySelector('.element-timeline');
                    return root.dataset.frame === String(f) && root.dataset.drawn === f + ":" + root.dataset.topLevel;
                }""",
                    arg=frame,
                    timeout=120_000,
                )
                page.wait_for_timeout(500)  # software WebGL paints on the next animation frames
            out.parent.mkdir(parents=True, exist_ok=True)
            if section == FIRST_PAGE:
                page.evaluate("() => window.scrollTo(0, 0)")
                page.screenshot(path=str(out))
            else:
                box = page.locator(f"#{section}").bounding_box()
                if box is None:
                    raise SystemExit(f"the report has no section '{section}'")
                page.screenshot(
                    path=str(out),
                    full_page=True,
                    clip={"x": 0, "y": box["y"], "width": width, "height": min(box["height"], height)},
                )
        finally:
            browser.close()
    if problems:
        raise SystemExit("the page reported problems:\n" + "\n".join(problems))
    return out


def main() -> None:
    """The command line: build the demo report unless ``--report`` names one, then photograph it."""
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--report", type=Path, help="a report folder (default: build the demo report)")
    parser.add_argument("--out", type=Path, default=ROOT / "docs" / "report.png")
    parser.add_argument(
        "--section",
        default=FIRST_PAGE,
        help=f"{FIRST_PAGE} (the window at the top of the page), or a section's id to photograph",
    )
    parser.add_argument("--week", type=float, default=0.6, help="how far through the project, 0 to 1")
    parser.add_argument("--width", type=int, default=1280)
    parser.add_argument("--height", type=int, default=900)
    arguments = parser.parse_args()
    if not (Path(CHROMIUM).exists() or shutil.which(CHROMIUM)):
        raise SystemExit(f"Chromium is not at {CHROMIUM}: apt-get install chromium (or set CHROMIUM)")
    temporary = None
    report = arguments.report
    if report is None:
        sys.path.insert(0, str(ROOT))
        from reports.writer import demo_report

        temporary = Path(tempfile.mkdtemp(prefix="report-screenshot-"))
        report = demo_report(ROOT / "case_demo", temporary / "report", echo=print)
    try:
        path = take(
            Path(report) / "report.html",
            arguments.out,
            section=arguments.section,
            week=arguments.week,
            width=arguments.width,
            height=arguments.height,
        )
        print(f"Wrote {path} ({path.stat().st_size:,} bytes)")
    finally:
        if temporary is not None:
            shutil.rmtree(temporary, ignore_errors=True)


if __name__ == "__main__":
    main()
