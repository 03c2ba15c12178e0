"""The pieces a report section is made of, before they are rendered.

A :class:`Section` holds blocks in page order: paragraphs, label and value pairs, tables,
figures, lists of sentences, the analyst's opinion (Markdown already rendered to safe
markup), groups laid out side by side, and folded parts a reader opens on demand (always
open in print). :mod:`reports.page` renders each kind; nothing here makes HTML.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from .tables import ReportTable

__all__ = [
    "Paragraph",
    "Facts",
    "TableBlock",
    "FigureBlock",
    "TimelineBlock",
    "Notice",
    "Sentences",
    "Markdown",
    "Group",
    "Folded",
    "Section",
]


@dataclass(frozen=True)
class Paragraph:
    """A paragraph, or a heading.

    Parameters
    ----------
    text : str
        The text (escaped when rendered).
    kind : str, default "paragraph"
        The block's kind, which :mod:`reports.page` renders it by.
    style : str, optional
        ``heading`` or ``subheading`` makes it a heading; other styles (``small``,
        ``caution``, ``lead``) are classes of the paragraph.
    """

    text: str
    kind: str = "paragraph"
    style: str = ""


@dataclass(frozen=True)
class Facts:
    """Label and value pairs (values already in words).

    Parameters
    ----------
    rows : tuple of (str, str)
        The label and value of each row.
    kind : str, default "facts"
        The block's kind, which :mod:`reports.page` renders it by.
    """

    rows: tuple[tuple[str, str], ...]
    kind: str = "facts"


@dataclass(frozen=True)
class TableBlock:
    """A table of the report (listed in :attr:`reports.builder.ReportContent.tables`).

    Parameters
    ----------
    table : reports.tables.ReportTable
        The table.
    kind : str, default "table"
        The block's kind, which :mod:`reports.page` renders it by.
    style : str, optional
        ``matrix``: a table of verdicts with turned headings; ``compact``: no fold.
    """

    table: ReportTable
    kind: str = "table"
    style: str = ""  # "matrix": a table of verdicts with turned headings; "compact": no fold


@dataclass(frozen=True)
class FigureBlock:
    """A plotly figure with its caption.

    Parameters
    ----------
    key : str
        The figure's name, unique in the report.
    figure : plotly.graph_objects.Figure
        The figure.
    caption : str, optional
        The caption below it.
    kind : str, default "figure"
        The block's kind, which :mod:`reports.page` renders it by.
    """

    key: str
    figure: Any = field(repr=False)
    caption: str = ""
    kind: str = "figure"


@dataclass(frozen=True)
class TimelineBlock:
    """The element timeline (:mod:`reports.element_timeline`).

    Parameters
    ----------
    timeline : reports.element_timeline.ElementTimeline
        The element states by week (:func:`reports.element_timeline.element_states`).
    kind : str, default "timeline"
        The block's kind, which :mod:`reports.page` renders it by.
    """

    timeline: Any = field(repr=False)
    kind: str = "timeline"


@dataclass(frozen=True)
class Notice:
    """A visible note: a method left out, a record the case lacks.

    Parameters
    ----------
    text : str
        The note.
    kind : str, default "notice"
        The block's kind, which :mod:`reports.page` renders it by.
    style : str, default "left-out"
        The note's class.
    """

    text: str
    kind: str = "notice"
    style: str = "left-out"


@dataclass(frozen=True)
class Sentences:
    """Sentences shown as a list, with an optional heading.

    Parameters
    ----------
    items : tuple of str
        The sentences.
    heading : str, optional
        A heading above the list.
    ordered : bool, default False
        Number the list.
    style : str, optional
        The list's class (``warnings`` marks points that need explaining).
    kind : str, default "sentences"
        The block's kind, which :mod:`reports.page` renders it by.
    """

    items: tuple[str, ...]
    heading: str = ""
    ordered: bool = False
    style: str = ""
    kind: str = "sentences"


@dataclass(frozen=True)
class Markdown:
    """Markup rendered from the analyst's Markdown by :func:`reports.opinion.render_opinion`.

    Raw HTML is off and links are checked: it is the one piece of case text the page does
    not escape.

    Parameters
    ----------
    html : markupsafe.Markup
        The rendered markup.
    kind : str, default "markdown"
        The block's kind, which :mod:`reports.page` renders it by.
    """

    html: Any = field(repr=False)
    kind: str = "markdown"


@dataclass(frozen=True)
class Group:
    """Blocks kept together.

    Parameters
    ----------
    blocks : tuple, optional
        The blocks, in page order.
    style : str, optional
        The layout: ``conclusions`` (columns side by side on a wide page), ``column``,
        ``opinion``.
    kind : str, default "group"
        The block's kind, which :mod:`reports.page` renders it by.
    """

    blocks: tuple = ()
    style: str = ""
    kind: str = "group"


@dataclass(frozen=True)
class Folded:
    """Blocks under a summary line, closed on screen until opened, open in print.

    Parameters
    ----------
    summary : str
        The summary line.
    blocks : tuple, optional
        The blocks folded under it.
    kind : str, default "folded"
        The block's kind, which :mod:`reports.page` renders it by.
    """

    summary: str
    blocks: tuple = ()
    kind: str = "folded"


@dataclass
class Section:
    """One numbered section of the report.

    Parameters
    ----------
    key : str
        Its page anchor.
    title : str
        Its title.
    blocks : list, optional
        Its blocks, in page order.
    available : bool, default True
        False when the case or the methods chosen give it nothing to show.

    Examples
    --------
    >>> section = Section("windows", "Windows analysis").not_shown("the case has one programme only")
    >>> section.available, section.blocks[0].text
    (False, 'the case has one programme only')
    """

    key: str
    title: str
    blocks: list = field(default_factory=list)
    available: bool = True

    def not_shown(self, reason: str) -> Section:
        """Mark the section not available and say why.

        Parameters
        ----------
        reason : str
            A sentence shown in the section's place (added as a :class:`Notice`).

        Returns
        -------
        Section
            This section, changed in place.
        """
        self.available = False
        self.blocks.append(Notice(reason))
        return self
