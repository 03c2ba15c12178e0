"""Section 11, inputs and method: what the report was made from and how.

From the loaded case (``delay.model.Case``): the case by its folder's name, the programmes,
events, elements and input files, whether the analyst gave an opinion; the settings of the
case and of the report; the analyst's disclosed corrections; and from each method module's
own docstring its published source and assumptions; then the cautions.
"""

from __future__ import annotations

import dataclasses
import datetime as dt
from pathlib import Path

import pandas as pd

from delay.methods import asbuilt, collapsed, impacted, tia, windows

from ..blocks import Facts, Paragraph, Section
from ..context import CAUTIONS, METHOD_NAMES, Context

__all__ = ["section", "docstring_part", "settings_frame"]

_METHOD_MODULES = {"windows": windows, "impacted": impacted, "tia": tia, "collapsed": collapsed, "asbuilt": asbuilt}


def docstring_part(doc: str, heading: str) -> list[str]:
    """The paragraphs under a numpydoc-style heading of a docstring.

    Parameters
    ----------
    doc : str
        The docstring (a method module's ``__doc__``).
    heading : str
        ``"References"``, ``"Assumptions"``, ...

    Returns
    -------
    list of str
        One text per paragraph or list item, lines joined.

    Examples
    --------
    >>> docstring_part("Intro.\\n\\nReferences\\n----------\\nA book,\\n2011.\\n", "References")
    ['A book, 2011.']
    """
    lines = (doc or "").splitlines()
    out: list[str] = []
    inside = False
    for number, line in enumerate(lines):
        underline = lines[number + 1].strip() if number + 1 < len(lines) else ""
        if line.strip() and underline and set(underline) == {"-"}:
            if inside:
                break
            inside = line.strip() == heading
            continue
        if inside and not (line.strip() and set(line.strip()) == {"-"}):
            out.append(line.strip())
    paragraphs, current = [], []
    for line in out:
        if not line:
            if current:
                paragraphs.append(" ".join(current))
                current = []
        elif line.startswith("- ") and current:
            paragraphs.append(" ".join(current))
            current = [line]
        else:
            current.append(line)
    if current:
        paragraphs.append(" ".join(current))
    return paragraphs


def settings_frame(case, methods: list[str], title: str) -> pd.DataFrame:
    """Every setting of the case and of this report.

    Parameters
    ----------
    case : delay.model.Case
        The loaded case.
    methods : list of str
        The methods of the report.
    title : str
        The report's title.

    Returns
    -------
    pandas.DataFrame
        ``setting`` (``part.name``) and ``value``.
    """
    settings = case.settings
    rows = []
    for part in ("project", "schedule", "commercial", "analysis", "report"):
        for name, value in dataclasses.asdict(getattr(settings, part)).items():
            rows.append({"setting": f"{part}.{name}", "value": value})
    for name, value in dict(settings.extra).items():
        rows.append(
            {
                "setting": str(name),
                "value": value if isinstance(value, (str, int, float, bool, dt.date)) else str(value),
            }
        )
    rows.append({"setting": "report.methods", "value": ", ".join(methods) or "(none)"})
    rows.append({"setting": "report.title", "value": title})
    return pd.DataFrame(rows, columns=["setting", "value"])


def _corrections(case) -> pd.DataFrame:
    columns = ["record", "snapshot", "table", "key", "column", "original", "corrected", "reason", "row"]
    frame = pd.DataFrame([{c: getattr(item, c) for c in columns} for item in case.corrections], columns=columns)
    return frame.rename(columns={"snapshot": "label"})  # a correction names its snapshot by label


def section(ctx: Context, title: str) -> Section:
    """The inputs section (see the module docstring).

    Parameters
    ----------
    ctx : reports.context.Context
        The report's results.
    title : str
        The report's title (listed among the settings).

    Returns
    -------
    reports.blocks.Section
        "Inputs and method": facts of the case, its settings, the disclosed
        corrections, each method's published sources and assumptions, and the cautions;
        always available.
    """
    inputs = Section("inputs", "Inputs and method")
    case = ctx.case
    blocks = inputs.blocks
    opinion = case.opinion.strip()
    blocks.append(
        Facts(
            (
                # the case by its folder's (or workbook's) name: the report names no path of the machine it was made on
                ("Case", Path(case.root).resolve().name),
                (
                    "Programmes",
                    f"{len(case.snapshots)} (baseline and {len(case.updates)} progress updates)"
                    + ("; an as-built record" if case.asbuilt_snapshot is not None else "; no as-built record"),
                ),
                ("Delay events", str(len(case.events))),
                ("Model elements", str(len(case.elements))),
                ("Input files", f"{len(case.input_files)}, each with its SHA-256 in the manifest"),
                (
                    "The analyst's opinion",
                    f"opinion.md, {len(opinion):,} characters (shown in the summary)"
                    if opinion
                    else "none given (no opinion.md)",
                ),
            )
        )
    )
    blocks.append(
        ctx.table(
            "settings", "Settings of the case and of this report", "inputs", settings_frame(case, ctx.methods, title)
        )
    )
    corrections = _corrections(case)
    blocks.append(
        ctx.table(
            "corrections",
            "The analyst's disclosed corrections to the records",
            "inputs",
            corrections,
            note="Applied when the case is loaded, never written back to the input files."
            if len(corrections)
            else "No corrections were made.",
        )
    )
    blocks.append(Paragraph("Methods", style="heading"))
    for method in ctx.methods:
        doc = _METHOD_MODULES[method].__doc__
        blocks.append(Paragraph(METHOD_NAMES[method].capitalize(), style="subheading"))
        for text in docstring_part(doc, "References"):
            blocks.append(Paragraph(f"Published source: {text}", style="small"))
        for text in docstring_part(doc, "Assumptions"):
            blocks.append(Paragraph(f"Assumption: {text.lstrip('- ')}", style="small"))
    blocks.append(Paragraph("Cautions", style="heading"))
    for caution in CAUTIONS:
        blocks.append(Paragraph(caution, style="caution"))
    return inputs
