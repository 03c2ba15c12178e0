"""What every report section reads: the case, the methods' results, the entitlement and the
comparison, and the register of the tables shown.

:class:`Context` is made once by :func:`reports.builder.compute`, after the methods have run;
each module of :mod:`reports.sections` takes it and returns its
:class:`~reports.blocks.Section`. Tables are registered here in page order, so that their
keys stay unique and the appendices and the manifest list them in the order they appear.
"""

from __future__ import annotations

import datetime as dt
from typing import Any

import pandas as pd

from delay.cpm import calendars_of, prepare
from delay.methods import METHOD_TITLES
from delay.model import Case

from .blocks import Paragraph, Section, TableBlock
from .sections import method_title
from .tables import BuildUp, ReportTable

__all__ = [
    "Context",
    "REPORT_METHODS",
    "ENTITLEMENT_METHODS",
    "METHOD_NAMES",
    "CAUTIONS",
    "days_text",
    "money_text",
]

#: Methods a report can run, by their command-line names, in the order of the sections.
REPORT_METHODS = ("windows", "impacted", "tia", "collapsed", "asbuilt")

#: The methods that assess an extension of time and money (:mod:`delay.entitlement`).
ENTITLEMENT_METHODS = ("windows", "impacted", "tia", "collapsed")

#: Each method in words, by its one-word name (:data:`delay.methods.METHOD_TITLES`).
METHOD_NAMES = METHOD_TITLES

#: The cautions that go with every figure of the report (summary and inputs sections).
CAUTIONS: tuple[str, ...] = (
    "The results depend on the records given to the toolkit and on the method chosen; different "
    "recognised methods can give different answers on the same facts.",
    "Nothing in this report is legal advice.",
    "The contract, the applicable law and the analyst's professional judgement govern; every result "
    "should be reviewed by a competent professional before it is relied upon.",
)


def days_text(n: int) -> str:
    """``n`` calendar days in words.

    Parameters
    ----------
    n : int
        A number of calendar days.

    Returns
    -------
    str
        ``"<n> calendar day"``, plural unless ``n`` is 1 or -1.

    Examples
    --------
    >>> days_text(1), days_text(-3)
    ('1 calendar day', '-3 calendar days')
    """
    return f"{n} calendar day{'s' if abs(n) != 1 else ''}"


def money_text(amount: float, currency: str) -> str:
    """A sum of money in words.

    Parameters
    ----------
    amount : float
        The sum.
    currency : str
        Its ISO 4217 code.

    Returns
    -------
    str
        The code, then the sum with thousands separators and two decimals.

    Examples
    --------
    >>> money_text(54600, "EUR")
    'EUR 54,600.00'
    """
    return f"{currency} {float(amount):,.2f}"


class Context:
    """The results a report is made of.

    Parameters
    ----------
    case : delay.model.Case
        The loaded case.
    methods : list of str
        The methods run, in section order.
    results : dict of str to object
        Each method's result, by its name in :data:`REPORT_METHODS`.
    entitlement : delay.entitlement.EntitlementResult, optional
        The entitlement of the methods that assess it, or ``None`` when none of them ran.
    comparison : delay.comparison.MethodComparison, optional
        The comparison of the same methods, or ``None``.
    """

    def __init__(self, case: Case, methods: list[str], results: dict[str, Any], entitlement=None, comparison=None):
        self.case = case
        self.methods = methods
        self.results = results
        self.entitlement = entitlement
        self.comparison = comparison
        self.tables: list[ReportTable] = []
        self._completions: dict[str, dt.date] = {}
        self._calendars = None

    @property
    def entitled(self) -> list:
        """The entitlement of each method assessed.

        Returns
        -------
        list of delay.entitlement.Entitlement
            In the order of the methods; empty when none was assessed.
        """
        return list(self.entitlement.methods) if self.entitlement is not None else []

    @property
    def currency(self) -> str:
        """The case's currency (``[commercial] currency``)."""
        return self.case.settings.commercial.currency

    def table(
        self,
        key: str,
        title: str,
        section: str,
        frame: pd.DataFrame,
        *,
        note: str = "",
        labels: dict | None = None,
        style: str = "",
        build_up: BuildUp | None = None,
    ) -> TableBlock:
        """Register a table of the report and return the block that shows it.

        Parameters
        ----------
        key : str
            The table's key (see :class:`reports.tables.ReportTable`).
        title : str
            Its caption.
        section : str
            The key of the section that shows it.
        frame : pandas.DataFrame
            Its rows (the index is dropped).
        note : str, optional
            A sentence under the caption.
        labels : dict, optional
            Headings in plain words for its columns.
        style : str, optional
            The block's style (:class:`reports.blocks.TableBlock`).
        build_up : reports.tables.BuildUp, optional
            How its money is built up.

        Returns
        -------
        reports.blocks.TableBlock
            The block that shows the table.

        Raises
        ------
        ValueError
            A key already registered (two tables of one report never share a name), or a key
            :class:`reports.tables.ReportTable` refuses.
        """
        if any(t.key == key for t in self.tables):
            raise ValueError(f"two tables named {key}")
        table = ReportTable(
            key=key,
            title=title,
            section=section,
            frame=frame.reset_index(drop=True),
            labels=labels or {},
            note=note,
            build_up=build_up,
        )
        self.tables.append(table)
        return TableBlock(table, style=style)

    def completion(self, snapshot) -> dt.date:
        """The forecast completion of a programme, scheduled once per programme.

        Parameters
        ----------
        snapshot : delay.model.Snapshot
            A snapshot of the case.

        Returns
        -------
        datetime.date
            The programme's completion from the forward pass of the critical path method
            (:meth:`delay.cpm.ScheduleModel.completion`).
        """
        if snapshot.folder not in self._completions:
            if self._calendars is None:
                self._calendars = calendars_of(self.case)
            model = prepare(self.case, snapshot, calendars=self._calendars)
            self._completions[snapshot.folder] = model.completion()
        return self._completions[snapshot.folder]

    def method_section(self, method: str, explanation: str) -> tuple[Section, Any]:
        """The section of a method, opened, and the method's result.

        Parameters
        ----------
        method : str
            A name of :data:`REPORT_METHODS` (also the section's key); the title is the method
            in words and its one-word name, the command that runs it alone.
        explanation : str
            The paragraph the section opens with when the method ran.

        Returns
        -------
        section : reports.blocks.Section
            The section; when the method did not run, it says why and is marked not
            available.
        result : object or None
            The method's result, ``None`` when it did not run.
        """
        section = Section(method, method_title(method))
        if method not in self.results:
            return section.not_shown(
                f"The {METHOD_NAMES[method]} was not run for this report (see the methods "
                "chosen in the inputs section)."
            ), None
        section.blocks.append(Paragraph(explanation))
        return section, self.results[method]
