"""What the report holds: every method's results, gathered into its sections.

:func:`compute` runs the analyses a report needs on a loaded case, assesses the
entitlement and compares the methods, then has each module of :mod:`reports.sections`
make its section, in the order of :data:`~reports.sections.SECTIONS`. The result, a
:class:`ReportContent`, holds the sections and every :class:`~reports.tables.ReportTable`
they show. Nothing here writes a file or renders HTML: :mod:`reports.page` renders the
content, :func:`reports.build` writes it out, and ``delay verify`` calls :func:`compute`
again to compare fingerprints.

An error raised while an analysis runs is not caught: a case error reaches the user as
plain lines, and anything else is a fault of the toolkit.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from delay.comparison import compare_methods
from delay.entitlement import assess
from delay.errors import CaseError, Problem
from delay.methods import asbuilt, collapsed, impacted, tia, windows
from delay.model import Case

from .blocks import Section
from .context import CAUTIONS, ENTITLEMENT_METHODS, METHOD_NAMES, REPORT_METHODS, Context
from .sections import SECTIONS
from .sections import asbuilt as asbuilt_section
from .sections import collapsed as collapsed_section
from .sections import comparison as comparison_section
from .sections import impacted as impacted_section
from .sections import inputs as inputs_section
from .sections import money as money_section
from .sections import quality as quality_section
from .sections import summary as summary_section
from .sections import tia as tia_section
from .sections import timeline as timeline_section
from .sections import windows as windows_section
from .tables import ReportTable

__all__ = [
    "compute",
    "resolve_methods",
    "ReportContent",
    "REPORT_METHODS",
    "METHOD_NAMES",
    "SECTIONS",
    "CAUTIONS",
]

#: Each method's entry function, by its name in :data:`REPORT_METHODS`.
_RUNNERS = {
    "windows": windows.analyse,
    "impacted": impacted.analyse,
    "tia": tia.analyse,
    "collapsed": collapsed.analyse,
    "asbuilt": asbuilt.compare,
}


@dataclass
class ReportContent:
    """Everything the report shows, before it is rendered.

    Parameters
    ----------
    case : delay.model.Case
        The loaded case.
    title : str
        The report's title.
    methods : list of str
        The methods asked for (after resolving defaults), in section order.
    sections : list of reports.blocks.Section
        In :data:`SECTIONS` order (the manifest section is filled in when rendering).
    tables : list of reports.tables.ReportTable
        Every table shown, in page order; keys are unique.
    left_out : list of str
        Why methods the case cannot support were left out (when none were named).
    """

    case: Case
    title: str
    methods: list[str]
    sections: list[Section]
    tables: list[ReportTable]
    left_out: list[str]

    def fingerprints(self) -> dict[str, str]:
        """The fingerprint of every table.

        Returns
        -------
        dict of str to str
            Table key to the SHA-256 (hex) of its canonical CSV, in page order.
        """
        return {t.key: t.fingerprint() for t in self.tables}

    def table(self, key: str) -> ReportTable:
        """The table named ``key``.

        Parameters
        ----------
        key : str
            A table key.

        Returns
        -------
        reports.tables.ReportTable
            The table.

        Raises
        ------
        KeyError
            When the report has no table of that key.
        """
        for table in self.tables:
            if table.key == key:
                return table
        raise KeyError(key)


def resolve_methods(case: Case, methods: str | Sequence[str] | None) -> tuple[list[str], list[str]]:
    """The methods to run and, for defaults left out, why.

    ``None``, an empty list or ``"all"``: every method the case supports (a windows analysis
    needs two programmes; the collapsed as-built and as planned against as built need an
    as-built record). Names given are kept (put in section order) and an unsupported one
    fails in its method with the method's own message.

    Parameters
    ----------
    case : delay.model.Case
        A loaded case.
    methods : str or sequence of str or None
        Names among :data:`REPORT_METHODS` (a list or a comma-separated text), ``None`` or
        ``"all"``.

    Returns
    -------
    methods : list of str
        The methods, in section order.
    left_out : list of str
        A sentence for each default left out, and why; empty when names were given.

    Raises
    ------
    delay.errors.CaseError
        An unknown method name (``--methods``).
    """
    if isinstance(methods, str):
        methods = [m.strip() for m in methods.split(",") if m.strip()]
    if not methods or list(methods) == ["all"]:
        chosen, reasons = [], []
        programmes = len(case.snapshots) + (case.asbuilt_snapshot is not None)
        for method in REPORT_METHODS:
            if method == "windows" and programmes < 2:
                reasons.append("The windows analysis is left out: the case holds one programme only.")
                continue
            if method in ("collapsed", "asbuilt") and case.asbuilt_snapshot is None:
                reasons.append(
                    f"The {METHOD_NAMES[method]} is left out: the case has no as-built record (asbuilt.csv)."
                )
                continue
            chosen.append(method)
        return chosen, reasons
    unknown = [m for m in methods if m not in REPORT_METHODS]
    if unknown:
        raise CaseError(
            Problem(
                file="--methods",
                message=f"unknown method '{unknown[0]}'",
                fix=f"choose among: {', '.join(REPORT_METHODS)} (comma separated), or all",
            )
        )
    return [m for m in REPORT_METHODS if m in methods], []


def compute(case: Case, methods: str | Sequence[str] | None = None, title: str | None = None) -> ReportContent:
    """Run the report's analyses on ``case`` and gather every section, table and figure.

    Nothing is written.

    Parameters
    ----------
    case : delay.model.Case
        A loaded case.
    methods : str or sequence of str, optional
        Names among :data:`REPORT_METHODS` (a list or a comma-separated text);
        ``None`` or ``"all"``: every method the case supports.
    title : str, optional
        The report's title (default "Delay analysis: <project name>").

    Returns
    -------
    ReportContent
        The sections in :data:`SECTIONS` order and every table they show.

    Raises
    ------
    delay.errors.CaseError
        An unknown method, or input a method cannot use.
    delay.errors.ReconciliationError
        Figures of a method that do not add up (a fault of the toolkit).

    Examples
    --------
    >>> import pathlib, tempfile
    >>> from delay.case import load_case
    >>> from delay.synth import synthesise
    >>> folder = tempfile.TemporaryDirectory()
    >>> case = load_case(synthesise(pathlib.Path(folder.name) / "case", 20, updates=2))
    >>> content = compute(case, methods="windows,asbuilt")
    >>> content.methods, [s.key for s in content.sections][:2]
    (['windows', 'asbuilt'], ['summary', 'money'])
    >>> folder.cleanup()
    """
    chosen, left_out = resolve_methods(case, methods)
    title = title or f"Delay analysis: {case.settings.project.name}"
    results = {method: _RUNNERS[method](case) for method in chosen}
    entitled = [m for m in chosen if m in ENTITLEMENT_METHODS]
    entitlement = comparison = None
    if entitled:
        entitlement = assess(case, entitled, results={m: results[m] for m in entitled})
        comparison = compare_methods(case, {m: entitlement.method(m) for m in entitled})
    ctx = Context(case, chosen, results, entitlement, comparison)
    sections = [
        summary_section.section(ctx, left_out),
        money_section.section(ctx),
        quality_section.section(ctx),
        windows_section.section(ctx),
        impacted_section.section(ctx),
        tia_section.section(ctx),
        collapsed_section.section(ctx),
        comparison_section.section(ctx),
        asbuilt_section.section(ctx),
        timeline_section.section(ctx),
        inputs_section.section(ctx, title),
        Section("manifest", "Manifest"),
    ]
    if [s.key for s in sections] != [key for key, _ in SECTIONS]:
        raise AssertionError("the sections are not in the order of SECTIONS")
    return ReportContent(
        case=case, title=title, methods=chosen, sections=sections, tables=ctx.tables, left_out=left_out
    )
