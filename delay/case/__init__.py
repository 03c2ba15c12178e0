"""Loading and checking a case (case-format version 2), in folder or workbook form.

:func:`load_case` reads a case folder (case.toml, calendars.csv, snapshots/...) or a single
``case.xlsx`` workbook, applies the analyst's corrections, types every column as
:mod:`delay.model` documents, checks everything the case format requires and returns a
:class:`~delay.model.Case`. Any problem, in any file, raises one
:class:`~delay.errors.CaseError` that lists them all (file, spreadsheet row, column, what
is wrong and what to do).

:func:`summarise` describes a loaded case in a JSON-ready dictionary, and
:func:`write_workbook` writes a case as one ``case.xlsx`` workbook.

Example
-------
>>> from pathlib import Path
>>> from delay.case import load_case, summarise
>>> case = load_case(Path(demo.root))  # the demo case, read again from its folder
>>> summarise(case)["snapshots"][0]["snapshot"]
'baseline'
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

from delay.case._loader import load as _load
from delay.case._workbook import write_workbook_file as _write_workbook_file
from delay.model import Case, Snapshot

__all__ = ["load_case", "summarise", "write_workbook"]


def load_case(path: str | Path) -> Case:
    """Load, correct and check the case at ``path``.

    Parameters
    ----------
    path : str or pathlib.Path
        A case folder (holding case.toml), a ``.xlsx`` workbook in the case's workbook
        form, or a folder holding only ``case.xlsx``.

    Returns
    -------
    Case
        The validated case. Snapshots run baseline first, then updates by data date; the
        as-built snapshot (when asbuilt.csv has rows) is :attr:`Case.asbuilt_snapshot`.
        Blank cells take the format's defaults (calendar: ``schedule.default_calendar``;
        kind: ``task``; link type: ``FS``; lag: 0). A milestone (a milestone kind or a task
        of duration 0) with one actual date takes it as both; a finished activity has
        remaining 0. Dates are ``datetime64[us]``. The CSV files are read in the dialect
        ``[input]`` of case.toml declares (else detected or the default: UTF-8, ISO
        dates); what was read for each file is :attr:`Case.input_dialects`. The analyst's
        opinion.md, when there is one, is :attr:`Case.opinion`.

    Raises
    ------
    CaseError
        When anything in the case is missing or wrong, or beyond the limits of the case
        format (dates outside 1900-01-01 to 2200-12-31, more than 36,500 days, settings
        files or workbooks too large or too deeply nested); it lists every problem found,
        at most :data:`delay.errors.MAX_PROBLEMS_PER_FILE` per file.

    Examples
    --------
    >>> import tempfile
    >>> from pathlib import Path
    >>> from delay.synth import synthesise
    >>> folder = tempfile.TemporaryDirectory()
    >>> case = load_case(synthesise(Path(folder.name) / "case", activities=12, updates=1))
    >>> [snap.folder for snap in case.snapshots], case.asbuilt_snapshot is not None
    (['baseline', 'u01'], True)
    >>> folder.cleanup()

    A path with nothing to read is one problem:

    >>> from delay.errors import CaseError
    >>> try:
    ...     load_case("no/such/case")
    ... except CaseError as error:
    ...     print(error.problems[0].message)
    there is no case folder or workbook at this path
    """
    return _load(Path(path)).case


def _snapshot_summary(snap: Snapshot) -> dict[str, Any]:
    return {
        "snapshot": snap.folder,
        "label": snap.label,
        "kind": snap.kind,
        "data_date": snap.data_date.isoformat(),
        "activities": int(len(snap.activities_table)),
        "links": int(len(snap.links_table)),
    }


def summarise(case: Case) -> dict[str, Any]:
    """What the case holds, as a dictionary ready for ``json.dumps``.

    Parameters
    ----------
    case : Case
        A loaded case.

    Returns
    -------
    dict
        ``project``, ``contract_start`` and ``contract_completion`` (ISO dates), ``root``,
        ``snapshots`` (one dict each: folder, label, kind, data_date, activities, links),
        ``asbuilt`` (``True`` when the case has an as-built record), ``asbuilt_snapshot``
        (its summary or ``None``), ``completion_activity`` (from case.toml, or ``None``),
        ``unexplained_risk``, ``preferred_method`` (or ``None``), ``opinion`` (``True``
        when the case has an opinion.md that is not blank), ``input`` (per file or sheet
        read, what was read: ``file``, ``delimiter`` and ``encoding`` with where each came
        from, ``date_format``, ``decimal`` and the ``renamed`` headers), and the counts
        ``calendars``, ``events``, ``fragnets`` (inserted activities), ``fragnet_links``,
        ``elements``, ``sections``, ``extensions``, ``corrections`` and ``attributions``.

    Examples
    --------
    >>> import tempfile
    >>> from pathlib import Path
    >>> from delay.synth import synthesise
    >>> folder = tempfile.TemporaryDirectory()
    >>> case = load_case(synthesise(Path(folder.name) / "case", activities=12, updates=1))
    >>> facts = summarise(case)
    >>> facts["snapshots"][1]["snapshot"], facts["snapshots"][1]["activities"], facts["asbuilt"]
    ('u01', 12, True)
    >>> folder.cleanup()
    """
    project = case.settings.project

    def rows(name: str) -> int:
        return int(len(case.table(name)))

    return {
        "project": project.name,
        "root": str(case.root),
        "contract_start": project.contract_start.isoformat(),
        "contract_completion": project.contract_completion.isoformat(),
        "snapshots": [_snapshot_summary(s) for s in case.snapshots],
        "asbuilt": case.asbuilt_snapshot is not None,
        "asbuilt_snapshot": (_snapshot_summary(case.asbuilt_snapshot) if case.asbuilt_snapshot is not None else None),
        "completion_activity": project.completion_activity,
        "unexplained_risk": case.settings.analysis.unexplained_risk,
        "preferred_method": case.settings.report.preferred_method,
        "opinion": bool(case.opinion.strip()),
        "input": [dialect.as_dict() for dialect in case.input_dialects],
        "calendars": rows("calendars"),
        "events": rows("events"),
        "fragnets": rows("fragnets"),
        "fragnet_links": rows("fragnet_links"),
        "elements": rows("elements"),
        "sections": rows("sections"),
        "extensions": rows("extensions_granted"),
        "corrections": len(case.corrections),
        "attributions": rows("attributions"),
    }


def write_workbook(case_or_folder: Case | str | Path, path: str | Path) -> Path:
    """Write a case as one ``case.xlsx`` workbook.

    The workbook holds the records as they are in the case's files, corrections not
    applied (the ``corrections`` sheet carries them, so loading the workbook applies them
    again): a ``case`` sheet of ``section.name`` / value rows, a ``snapshots`` sheet
    (label, data_date, kind, folder), ``activities`` and ``links`` sheets with a leading
    ``snapshot`` column holding the folder name, and one sheet per other file, named by
    its stem. Dates are written as dates. The file is written under a temporary name and
    moved into place.

    Parameters
    ----------
    case_or_folder : Case or str or pathlib.Path
        A loaded :class:`Case` (its files are read again from ``case.root``), or the path
        of a case folder or workbook.
    path : str or pathlib.Path
        Where to write the workbook.

    Returns
    -------
    Path
        ``path``.

    Raises
    ------
    CaseError
        When the case does not load; nothing is written then.

    Examples
    --------
    >>> import tempfile
    >>> from pathlib import Path
    >>> from delay.synth import synthesise
    >>> folder = tempfile.TemporaryDirectory()
    >>> case = load_case(synthesise(Path(folder.name) / "case", activities=12, updates=1))
    >>> workbook = write_workbook(case, Path(folder.name) / "case.xlsx")
    >>> [snap.folder for snap in load_case(workbook).snapshots]
    ['baseline', 'u01']
    >>> folder.cleanup()
    """
    root = case_or_folder.root if isinstance(case_or_folder, Case) else Path(case_or_folder)
    loaded = _load(Path(root), keep_uncorrected=True)
    settings = loaded.source.settings.values if loaded.source.settings is not None else {}
    return _write_workbook_file(loaded.case, settings, loaded.uncorrected, Path(path))
