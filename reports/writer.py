"""Writing a report folder: the page, the appendices and the manifest, all at once.

:func:`build` writes into a folder built under a temporary name and moved into place whole
(:func:`delay.output.replace_directory`): a reader never sees half a report, and a failed
run leaves whatever was there before.

::

    DIR/
      report.html      the report, one self-contained page (plotly.js inlined)
      tables.xlsx      every table of the report as a sheet (dates as dates)
      tables/*.csv     every table as canonical CSV (the text that is fingerprinted)
      manifest.json    tool version, settings, input hashes, time of the run, fingerprints
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Callable, Sequence

from delay.errors import CaseError, Problem
from delay.model import Case
from delay.output import replace_directory

from .builder import CAUTIONS, ReportContent, compute, resolve_methods
from .manifest import MANIFEST, make_manifest
from .page import render_html
from .tables import write_csv_files, write_workbook

__all__ = ["build", "demo_report", "REPORT_FILE", "WORKBOOK_FILE", "TABLES_FOLDER"]

REPORT_FILE = "report.html"
WORKBOOK_FILE = "tables.xlsx"
TABLES_FOLDER = "tables"


def _case(case: Case | str | Path) -> Case:
    if isinstance(case, Case):
        return case
    from delay.case import load_case

    return load_case(Path(case))


def _check_target(out_dir: Path, case: Case) -> None:
    """Refuse a folder whose replacement would lose anything but an earlier report."""
    out = out_dir.resolve()
    root = Path(case.root).resolve()
    shown = str(out_dir)
    if out.exists() and not out.is_dir():
        raise CaseError(Problem(file=shown, message="the output is a file, not a folder",
                                fix="give a folder for the report with --out"))
    if root == out or root.is_relative_to(out):
        raise CaseError(Problem(file=shown, message="the output folder holds the case itself",
                                fix="give a new folder for the report with --out"))
    if out.is_dir() and any(out.iterdir()) and not (out / MANIFEST).is_file():
        raise CaseError(Problem(file=shown, message="the folder exists and is not a report folder; it would be "
                                                    "replaced whole",
                                fix="give a new or empty folder, or the folder of an earlier report, with --out"))


def build(case: Case | str | Path, out_dir: str | Path, methods: str | Sequence[str] | None = None,
          title: str | None = None, *, echo: Callable[[str], None] | None = None) -> Path:
    """Write the report of ``case`` into ``out_dir`` (replaced whole).

    Parameters
    ----------
    case: a loaded case, or the path of a case folder or workbook.
    out_dir: the report folder; it must be new, empty or an earlier report's folder.
    methods: among ``windows``, ``impacted``, ``tia``, ``collapsed``, ``asbuilt`` (a list or
        comma-separated text); ``None`` or ``"all"``: every method the case supports.
    title: the report's title.
    echo: called with a line of progress now and then.

    Returns
    -------
    Path
        ``out_dir``.

    Raises
    ------
    CaseError: bad input, an unknown method or an output folder that must not be replaced.
        Nothing is written then.

    Example
    -------
    >>> build(load_case("case_demo"), "out/report", methods="windows,impacted")   # doctest: +SKIP
    """
    say = echo or (lambda line: None)
    loaded = _case(case)
    out = Path(out_dir)
    _check_target(out, loaded)
    resolve_methods(loaded, methods)  # an unknown method is refused before any work
    say(f"Analysing {loaded.settings.project.name}")
    content = compute(loaded, methods, title)
    manifest = make_manifest(content, out)
    say(f"Writing the report: {len(content.tables)} tables")
    page = render_html(content, manifest)
    with replace_directory(out) as folder:
        (folder / REPORT_FILE).write_bytes(page.encode("utf-8"))
        write_workbook(content.tables, folder / WORKBOOK_FILE, title=content.title, caution=" ".join(CAUTIONS))
        write_csv_files(content.tables, folder / TABLES_FOLDER)
        (folder / MANIFEST).write_bytes(json.dumps(manifest, indent=2, ensure_ascii=False).encode("utf-8"))
    say(f"Wrote {out / REPORT_FILE}")
    return out


def demo_report(case: Case | str | Path, out_dir: str | Path, *,
                echo: Callable[[str], None] | None = None) -> Path:
    """The full report of the demo case (every method the case supports) into ``out_dir``.

    This is what ``delay demo`` writes beside its other outputs.
    """
    loaded = _case(case)
    return build(loaded, out_dir, methods=None,
                 title=f"Delay analysis report: {loaded.settings.project.name}", echo=echo)


def content_of(case: Case | str | Path, methods=None, title=None) -> ReportContent:
    """The report's content without writing anything (for notebooks)."""
    return compute(_case(case), methods, title)
