"""Rendering the report's content as one self-contained HTML page.

The page is made from the jinja2 templates in ``reports/templates`` with autoescaping on:
every text that comes from the case (names, titles, notes) is escaped. The only markup
passed through unescaped is made by this package: plotly's figure fragments (whose data is
JSON with ``<`` written as ``\\u003c``), the element timeline's fragment (which escapes
its own text) and the analyst's opinion as :func:`reports.opinion.render_opinion` renders
it (Markdown with raw HTML off, links checked, no images). plotly.js is inlined once in the
page's head, so the page opens with no network access.
"""

from __future__ import annotations

from typing import Any

import numpy as np
import pandas as pd
from markupsafe import Markup

from .blocks import FigureBlock, Folded, Group, Section, TableBlock, TimelineBlock
from .builder import ReportContent
from .element_timeline import timeline_html
from .figures import figure_html
from .tables import MONEY_COLUMNS, ReportTable, display_value

__all__ = ["render_html", "environment", "table_view", "COLLAPSE_ROWS"]

#: Tables longer than this many rows are folded (opened for printing).
COLLAPSE_ROWS = 40

#: A table of verdicts (programmes across) is shown in parts of at most this many
#: programmes, so that it fits a printed A4 landscape page whatever the number of updates.
MATRIX_COLUMNS = 10


def environment():
    """The jinja2 environment of the report's templates.

    Returns
    -------
    jinja2.Environment
        Autoescaping on, undefined names an error.
    """
    from jinja2 import Environment, PackageLoader, StrictUndefined

    return Environment(
        loader=PackageLoader("reports", "templates"),
        autoescape=True,
        undefined=StrictUndefined,
        trim_blocks=True,
        lstrip_blocks=True,
    )


def _numeric(series: pd.Series) -> bool:
    if pd.api.types.is_bool_dtype(series):
        return False
    if pd.api.types.is_numeric_dtype(series):
        return True
    values = [v for v in series.tolist()[:200] if v is not None and not (isinstance(v, float) and np.isnan(v))]
    return bool(values) and all(
        isinstance(v, (int, float, np.integer, np.floating)) and not isinstance(v, bool) for v in values
    )


def _rows(table: ReportTable) -> tuple[list[list[str]], list[str]]:
    """The page's rows of ``table`` (at most ``shown_rows``) and a class for each: ``total``
    for the total rows of a :class:`~reports.tables.BuildUp`, after each group."""
    frame = table.frame
    shown = frame.iloc[: table.shown_rows]
    money = [c in MONEY_COLUMNS for c in shown.columns]
    columns = [shown[c].tolist() for c in shown.columns]
    rows = (
        [[display_value(v, money=m) for v, m in zip(row, money)] for row in zip(*columns)] if len(shown.columns) else []
    )
    classes = [""] * len(rows)
    build_up = table.build_up
    if build_up is None or not build_up.totals or len(shown) < len(frame):
        return rows, classes
    for first, stop in reversed(build_up.groups(frame)):
        sums = build_up.total(frame, first, stop)
        total = [display_value(sums[c], money=m) if c in sums else "" for c, m in zip(frame.columns, money)]
        total[0] = build_up.total_label(frame, first)
        rows.insert(stop, total)
        classes.insert(stop, "total")
    return rows, classes


def table_view(table: ReportTable, style: str = "") -> dict[str, Any]:
    """What the template needs to show a table.

    Parameters
    ----------
    table : reports.tables.ReportTable
        The table.
    style : str, default ""
        Its block's style (``matrix`` is cut into parts of :data:`MATRIX_COLUMNS`
        programmes; ``folded`` and ``headline`` are never folded again).

    Returns
    -------
    dict
        Headings and rows (total rows of a build-up included) in parts, the counts, and
        whether the table is folded.

    Examples
    --------
    >>> from reports.tables import ReportTable
    >>> view = table_view(ReportTable("eot", "Extension of time", "money", pd.DataFrame({"eot_days": [12]})))
    >>> view["parts"][0]["headings"], view["parts"][0]["rows"], view["collapsed"]
    (['extension of time (calendar days)'], [['12']], False)
    """
    frame = table.frame
    rows, classes = _rows(table)
    headings = table.headings
    numeric = [_numeric(frame[c]) for c in frame.columns]
    groups = [list(range(len(headings)))]
    if style == "matrix" and len(headings) > MATRIX_COLUMNS + 1:
        rest = list(range(1, len(headings)))
        groups = [[0] + rest[k : k + MATRIX_COLUMNS] for k in range(0, len(rest), MATRIX_COLUMNS)]
    parts = [
        {
            "headings": [headings[k] for k in group],
            "numeric": [numeric[k] for k in group],
            "rows": [[row[k] for k in group] for row in rows],
            "classes": classes,
        }
        for group in groups
    ]
    return {
        "kind": "table",
        "key": table.key,
        "title": table.title,
        "note": table.note,
        "style": style,
        "parts": parts,
        "total": len(frame),
        "shown": min(len(frame), table.shown_rows),
        "collapsed": len(frame) > COLLAPSE_ROWS and style not in ("matrix", "folded", "headline"),
    }


def _figure_id(key: str) -> str:
    return f"figure-{key}"


def _block_view(block) -> dict[str, Any] | Any:
    if isinstance(block, TableBlock):
        return table_view(block.table, block.style)
    if isinstance(block, FigureBlock):
        return {
            "kind": "figure",
            "key": block.key,
            "caption": block.caption,
            "html": Markup(figure_html(block.figure, _figure_id(block.key))),
        }
    if isinstance(block, TimelineBlock):
        return {"kind": "timeline", "html": Markup(timeline_html(block.timeline, element_id="element-timeline"))}
    if isinstance(block, Group):
        return {"kind": "group", "style": block.style, "blocks": [_block_view(b) for b in block.blocks]}
    if isinstance(block, Folded):
        return {"kind": "folded", "summary": block.summary, "blocks": [_block_view(b) for b in block.blocks]}
    return block


def _manifest_section(section: Section, manifest: dict) -> dict[str, Any]:
    tool = manifest.get("tool", {})
    facts = (
        ("Tool", f"{tool.get('name', '')} {tool.get('version', '')}"),
        ("Report made", manifest.get("created", "")),
        ("Case", manifest.get("case", {}).get("path", "")),
        ("Methods", ", ".join(manifest.get("options", {}).get("methods", [])) or "(none)"),
        ("Environment", ", ".join(f"{k} {v}" for k, v in manifest.get("environment", {}).items())),
        (
            "To check this report",
            "run  delay verify <this folder>: it re-runs the analysis from the inputs named "
            "here and confirms every table, or lists what differs.",
        ),
    )
    inputs = [[i["path"], f"{i['bytes']:,}", i["sha256"]] for i in manifest.get("inputs", [])]
    tables = [[t["key"], t["title"], str(t["rows"]), t["sha256"]] for t in manifest.get("tables", [])]
    blocks = [
        {"kind": "facts", "rows": facts},
        {
            "kind": "table",
            "key": "manifest_inputs",
            "title": "Input files and their SHA-256",
            "note": "",
            "style": "hashes",
            "parts": [
                {
                    "headings": ["file", "bytes", "SHA-256"],
                    "numeric": [False, True, False],
                    "rows": inputs,
                    "classes": [""] * len(inputs),
                }
            ],
            "total": len(inputs),
            "shown": len(inputs),
            "collapsed": len(inputs) > COLLAPSE_ROWS,
        },
        {
            "kind": "table",
            "key": "manifest_tables",
            "title": "Fingerprint of each table (SHA-256 of its canonical CSV)",
            "note": "The canonical CSV of each table is tables/<table>.csv beside this page.",
            "style": "hashes",
            "parts": [
                {
                    "headings": ["table", "title", "rows", "SHA-256"],
                    "numeric": [False, False, True, False],
                    "rows": tables,
                    "classes": [""] * len(tables),
                }
            ],
            "total": len(tables),
            "shown": len(tables),
            "collapsed": len(tables) > COLLAPSE_ROWS,
        },
    ]
    return {"key": section.key, "title": section.title, "available": True, "blocks": blocks}


def render_html(content: ReportContent, manifest: dict) -> str:
    """The whole report page (plotly.js inlined).

    Parameters
    ----------
    content : reports.builder.ReportContent
        From :func:`reports.builder.compute`.
    manifest : dict
        The manifest written beside the page (its facts fill the manifest section).

    Returns
    -------
    str
        The page, one self-contained HTML document.
    """
    from plotly.offline import get_plotlyjs

    sections = []
    for section in content.sections:
        if section.key == "manifest":
            sections.append(_manifest_section(section, manifest))
            continue
        sections.append(
            {
                "key": section.key,
                "title": section.title,
                "available": section.available,
                "blocks": [_block_view(b) for b in section.blocks],
            }
        )
    template = environment().get_template("report.html.j2")
    plotly_js = get_plotlyjs()
    if "</script" in plotly_js.lower():  # never expected; would end the script element early
        raise ValueError("plotly.js holds '</script': it cannot be inlined safely")
    return template.render(
        title=content.title,
        project=content.case.settings.project.name,
        sections=sections,
        created=manifest.get("created", ""),
        version=manifest.get("tool", {}).get("version", ""),
        plotly_js=Markup(plotly_js),
    )
