"""The analyst's opinion (opinion.md) rendered as safe markup for the report's first page.

The Markdown is read by markdown-it-py under its CommonMark rules with raw HTML turned
off: a ``<script>`` element, an ``<img onerror=...>`` or any other tag in the text is shown
as the characters typed. On top of that:

- a link is kept only when its address is ``http:``, ``https:``, ``mailto:`` or relative
  (no scheme: ``#part``, ``notes/a.html``); any other (``javascript:``, ``data:``,
  ``vbscript:``, ``file:`` ...) is not made a link, and its text stays as typed;
- links open nothing by themselves and carry ``rel="noopener noreferrer"``;
- images are not shown (the report opens with no network access and holds no file of the
  case): the image's description stands in its place;
- headings move down three levels (``#`` becomes ``<h4>``), under the page's own.

References
----------
CommonMark Spec, version 0.31.2 (2024), section 6.6 (raw HTML) and 6.3 (links), as recalled.
"""

from __future__ import annotations

import html
import re

from markdown_it import MarkdownIt
from markupsafe import Markup

__all__ = ["render_opinion", "safe_link", "LINK_SCHEMES"]

#: The schemes a link of the opinion may have (a relative address has none).
LINK_SCHEMES = ("http", "https", "mailto")

_SCHEME = re.compile(r"^([A-Za-z][A-Za-z0-9+.\-]*):")
_CONTROL = re.compile(r"[\x00-\x20\x7f]+")


def safe_link(address: str) -> bool:
    """Whether ``address`` may be a link of the opinion: ``http``, ``https``, ``mailto`` or relative.

    Blanks and control characters are taken out before the scheme is read, as browsers do
    (``java\\tscript:`` is ``javascript:``).

    Parameters
    ----------
    address : str
        A link's address as written in the Markdown (after markdown-it-py's normalisation).

    Returns
    -------
    bool
        True for a relative address (no scheme) or one whose scheme is in
        :data:`LINK_SCHEMES`, in any case.

    Examples
    --------
    >>> [safe_link(a) for a in ("https://example.org", "#part", "mailto:a@b.c", "javascript:alert(1)",
    ...                         " JaVaScRiPt:x", "data:text/html,x")]
    [True, True, True, False, False, False]
    """
    found = _SCHEME.match(_CONTROL.sub("", address))
    return found is None or found.group(1).lower() in LINK_SCHEMES


def _parser() -> MarkdownIt:
    parser = MarkdownIt("commonmark", {"html": False})
    parser.validateLink = safe_link

    def image(tokens, index, options, env):
        """An image: its description in words, no image."""
        text = html.escape(tokens[index].content or "an image", quote=False)
        return f'<span class="image-left-out">[{text}: image not shown]</span>'

    def link_open(tokens, index, options, env):
        """A link kept: it opens no other page's access to this one."""
        tokens[index].attrSet("rel", "noopener noreferrer")
        return parser.renderer.renderToken(tokens, index, options, env)

    def heading(tokens, index, options, env):
        """A heading three levels down."""
        token = tokens[index]
        token.tag = f"h{min(6, int(token.tag[1]) + 3)}"
        return parser.renderer.renderToken(tokens, index, options, env)

    parser.renderer.rules["image"] = image
    parser.renderer.rules["link_open"] = link_open
    parser.renderer.rules["heading_open"] = heading
    parser.renderer.rules["heading_close"] = heading
    return parser


def render_opinion(text: str) -> Markup:
    """The opinion's Markdown as markup safe to place in the page.

    Parameters
    ----------
    text : str
        The analyst's Markdown (``Case.opinion``).

    Returns
    -------
    markupsafe.Markup
        HTML with no raw HTML of the text, no link outside :data:`LINK_SCHEMES` and
        relative addresses, and no image; headings three levels down.

    Examples
    --------
    >>> str(render_opinion("**Late** <script>x</script> [a](javascript:alert(1))"))
    '<p><strong>Late</strong> &lt;script&gt;x&lt;/script&gt; [a](javascript:alert(1))</p>\\n'
    >>> str(render_opinion("# Opinion"))
    '<h4>Opinion</h4>\\n'

    References
    ----------
    CommonMark Spec, version 0.31.2 (2024), section 6.6 (raw HTML), as recalled.
    """
    return Markup(_parser().render(text))
