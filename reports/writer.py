"""Writing a report folder: the page, the appendices and the manifest, all at once.

:func:`build` checks the target by the toolkit's output policy (:mod:`delay.output`: new,
empty or an earlier output of the toolkit; never the case or an input), then writes into a
folder built under a temporary name and moved into place whole: a reader never sees half a
report, and a failed or interrupted run leaves whatever was there before.

::

    DIR/
      report.html        the report, one self-contained page (plotly.js inlined)
      tables.xlsx        every table of the report as a sheet (dates as dates)
      tables/*.csv       every table as canonical CSV (the text that is fingerprinted)
      manifest.json      tool version, settings, input hashes, the hash of every file above,
                         time of the run, fingerprints
      delay-output.json  the marker of an output folder of the toolkit (delay.output.MARKER)
"""

from __future__ import annotations

import json
from collections.abc import Callable, Sequence
from pathlib import Path

from delay.model import Case
from delay.output import check_folder_target, finish_marker, mark_folder, output_folder

from .builder import CAUTIONS, ReportContent, compute, resolve_methods
from .manifest import MANIFEST, make_manifest, record_outputs
from .page import render_html
from .tables import write_csv_files, write_workbook

__all__ = [
    "build",
    "demo_report",
    "demo_title",
    "write_report",
    "content_of",
    "REPORT_FILE",
    "WORKBOOK_FILE",
    "TABLES_FOLDER",
]

REPORT_FILE = "report.html"
WORKBOOK_FILE = "tables.xlsx"
TABLES_FOLDER = "tables"

_OPTION = " (--out)"


def _case(case: Case | str | Path) -> Case:
    if isinstance(case, Case):
        return case
    from delay.case import load_case

    return load_case(Path(case))


def write_report(content: ReportContent, folder: Path, location: Path) -> Path:
    """Write the report of ``content`` into ``folder``.

    ``folder`` is a new folder that will be moved to ``location`` (the manifest records the
    case relative to that place). The folder gets its own marker
    (:func:`delay.output.mark_folder`), so that it is an output of the toolkit wherever it
    sits (inside the folder of ``delay demo``, say).

    Parameters
    ----------
    content : ReportContent
        The report's content (:func:`reports.builder.compute`).
    folder : pathlib.Path
        A new folder inside a folder being built by :func:`delay.output.output_folder`.
    location : pathlib.Path
        Where ``folder`` will be once it is moved into place.

    Returns
    -------
    pathlib.Path
        ``folder``, holding report.html, tables.xlsx, tables/, manifest.json and the marker.
    """
    folder.mkdir(parents=True, exist_ok=True)
    output_id = mark_folder(folder, "report")
    manifest = make_manifest(content, location, output_id=output_id)
    page = render_html(content, manifest)
    (folder / REPORT_FILE).write_bytes(page.encode("utf-8"))
    write_workbook(content.tables, folder / WORKBOOK_FILE, title=content.title, caution=" ".join(CAUTIONS))
    write_csv_files(content.tables, folder / TABLES_FOLDER)
    manifest = record_outputs(manifest, folder)
    (folder / MANIFEST).write_bytes(json.dumps(manifest, indent=2, ensure_ascii=False).encode("utf-8"))
    finish_marker(folder)
    return folder


def build(
    case: Case | str | Path,
    out_dir: str | Path,
    methods: str | Sequence[str] | None = None,
    title: str | None = None,
    *,
    echo: Callable[[str], None] | None = None,
) -> Path:
    """Write the report of ``case`` into ``out_dir`` (replaced whole).

    Parameters
    ----------
    case : delay.model.Case or str or pathlib.Path
        A loaded case, or the path of a case folder or workbook.
    out_dir : str or pathlib.Path
        The report folder; it must be new, empty or an earlier output of the toolkit,
        and neither the case folder, inside it, nor a folder holding it.
    methods : str or sequence of str, optional
        Among ``windows``, ``impacted``, ``tia``, ``collapsed``, ``asbuilt`` (a list or
        comma-separated text); ``None`` or ``"all"``: every method the case supports.
    title : str, optional
        The report's title (default "Delay analysis: <project name>").
    echo : callable, optional
        Called with a line of progress (``str``) now and then.

    Returns
    -------
    pathlib.Path
        ``out_dir``.

    Raises
    ------
    delay.errors.CaseError
        Bad input or an unknown method. Nothing is written then.
    delay.output.OutputRefused
        An output folder that must not be replaced (checked before any work). Nothing is
        written then.
    delay.output.OutputFailed
        An OSError while writing; an earlier report survives whole.

    Examples
    --------
    >>> import pathlib, tempfile
    >>> from delay.case import load_case
    >>> from delay.synth import synthesise
    >>> folder = tempfile.TemporaryDirectory()
    >>> case = load_case(synthesise(pathlib.Path(folder.name) / "case", 20, updates=2))
    >>> out = build(case, pathlib.Path(folder.name) / "report", methods="windows")
    >>> sorted(p.name for p in out.iterdir())
    ['delay-output.json', 'manifest.json', 'report.html', 'tables', 'tables.xlsx']
    >>> folder.cleanup()
    """
    say = echo or (lambda line: None)
    loaded = _case(case)
    out = Path(out_dir)
    guard = {"case_root": loaded.root, "inputs": loaded.input_files, "option": _OPTION}
    check_folder_target(out, **guard)  # refused before any work
    resolve_methods(loaded, methods)  # an unknown method is refused before any work
    say(f"Analysing {loaded.settings.project.name}")
    content = compute(loaded, methods, title)
    say(f"Writing the report: {len(content.tables)} tables")
    with output_folder(out, what="report", **guard) as folder:
        write_report(content, folder, out)  # renews the marker: its id is the manifest's
    say(f"Wrote {out / REPORT_FILE}")
    return out


def demo_report(case: Case | str | Path, out_dir: str | Path, *, echo: Callable[[str], None] | None = None) -> Path:
    """The full report of the demo case (every method the case supports) into ``out_dir``.

    This is what ``delay demo`` writes beside its other outputs: :func:`build` with the
    title of :func:`demo_title`.

    Parameters
    ----------
    case : delay.model.Case or str or pathlib.Path
        The demo case, loaded or as a path.
    out_dir : str or pathlib.Path
        The report folder (see :func:`build`).
    echo : callable, optional
        Called with a line of progress (``str``) now and then.

    Returns
    -------
    pathlib.Path
        ``out_dir``.

    Raises
    ------
    delay.errors.CaseError
        Bad input. Nothing is written then.
    delay.output.OutputRefused
        An output folder that must not be replaced.
    """
    loaded = _case(case)
    return build(loaded, out_dir, methods=None, title=demo_title(loaded), echo=echo)


def demo_title(case: Case) -> str:
    """The title of the demo's report of ``case``.

    Parameters
    ----------
    case : delay.model.Case
        A loaded case.

    Returns
    -------
    str
        ``"Delay analysis report: <project name>"``.
    """
    return f"Delay analysis report: {case.settings.project.name}"


def content_of(case: Case | str | Path, methods=None, title=None) -> ReportContent:
    """The report's content without writing anything (for notebooks).

    Parameters
    ----------
    case : delay.model.Case or str or pathlib.Path
        A loaded case, or the path of a case folder or workbook.
    methods : str or sequence of str, optional
        As for :func:`reports.builder.compute`.
    title : str, optional
        The report's title.

    Returns
    -------
    ReportContent
        As :func:`reports.builder.compute` gives it.

    Raises
    ------
    delay.errors.CaseError
        A case that does not load, an unknown method, or input a method cannot use.
    """
    return compute(_case(case), methods, title)
