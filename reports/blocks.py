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
    """A paragraph; ``style`` ``heading`` or ``subheading`` makes it a heading, other styles
    (``small``, ``caution``, ``lead``) are classes of the paragraph."""

    text: str
    kind: str = "paragraph"
    style: str = ""


@dataclass(frozen=True)
class Facts:
    """Label and value pairs (values already in words)."""

    rows: tuple[tuple[str, str], ...]
    kind: str = "facts"


@dataclass(frozen=True)
class TableBlock:
    """A table of the report (listed in :attr:`reports.builder.ReportContent.tables`)."""

    table: ReportTable
    kind: str = "table"
    style: str = ""  # "matrix": a table of verdicts with turned headings; "compact": no fold


@dataclass(frozen=True)
class FigureBlock:
    """A plotly figure with its caption."""

    key: str
    figure: Any = field(repr=False)
    caption: str = ""
    kind: str = "figure"


@dataclass(frozen=True)
class TimelineBlock:
    """The element timeline (:mod:`reports.element_timeline`)."""

    timeline: Any = field(repr=False)
    kind: str = "timeline"


@dataclass(frozen=True)
class Notice:
    """A visible note: a method left out, a record the case lacks."""

    text: str
    kind: str = "notice"
    style: str = "left-out"


@dataclass(frozen=True)
class Sentences:
    """Sentences shown as a list (``ordered``: numbered), with an optional heading; ``style``
    is the list's class (``warnings`` marks points that need explaining)."""

    items: tuple[str, ...]
    heading: str = ""
    ordered: bool = False
    style: str = ""
    kind: str = "sentences"


@dataclass(frozen=True)
class Markdown:
    """Markup rendered from the analyst's Markdown by :func:`reports.opinion.render_opinion`
    (raw HTML off, links checked): the one piece of case text the page does not escape."""

    html: Any = field(repr=False)
    kind: str = "markdown"


@dataclass(frozen=True)
class Group:
    """Blocks kept together; ``style`` names the layout (``conclusions``: columns side by
    side on a wide page, ``column``, ``opinion``)."""

    blocks: tuple = ()
    style: str = ""
    kind: str = "group"


@dataclass(frozen=True)
class Folded:
    """Blocks under a summary line, closed on screen until opened, open in print."""

    summary: str
    blocks: tuple = ()
    kind: str = "folded"


@dataclass
class Section:
    """One numbered section of the report: its page anchor, title and blocks;
    ``available`` is false when the case or the methods chosen give it nothing to show."""

    key: str
    title: str
    blocks: list = field(default_factory=list)
    available: bool = True

    def not_shown(self, reason: str) -> Section:
        """Mark the section not available and say why.

        Parameters
        ----------
        reason: a sentence shown in the section's place.

        Returns
        -------
        Section
            This section.
        """
        self.available = False
        self.blocks.append(Notice(reason))
        return self
