"""The report's sections, one module each, in page order.

Each module has a ``section(ctx)`` function that takes the report's results
(:class:`reports.context.Context`) and returns its :class:`reports.blocks.Section`;
:func:`reports.builder.compute` calls them in the order of :data:`SECTIONS` and does
nothing else. The manifest section is filled in when the page is rendered
(:mod:`reports.page`), from the manifest written beside it.
"""

from __future__ import annotations

from delay.methods import METHOD_TITLES

__all__ = ["SECTIONS", "method_title"]


def method_title(method: str) -> str:
    """The title of a method's section: the method in words and its one-word name.

    Parameters
    ----------
    method : str
        A method's one-word name (a key of :data:`delay.methods.METHOD_TITLES`).

    Returns
    -------
    str
        ``"<Method in words> (<name>)"``.

    Raises
    ------
    KeyError
        An unknown method name.

    Examples
    --------
    >>> method_title("impacted")
    'Impacted as-planned (impacted)'
    """
    return f"{METHOD_TITLES[method].capitalize()} ({method})"


#: The sections of the report: key (the page anchor and the module's name) and title, in order.
SECTIONS: tuple[tuple[str, str], ...] = (
    ("summary", "Summary"),
    ("money", "Money and its build-up"),
    ("quality", "Schedule quality"),
    ("windows", method_title("windows")),
    ("impacted", method_title("impacted")),
    ("tia", method_title("tia")),
    ("collapsed", method_title("collapsed")),
    ("comparison", "Method comparison"),
    ("asbuilt", method_title("asbuilt")),
    ("timeline", "Element timeline"),
    ("inputs", "Inputs and method"),
    ("manifest", "Manifest"),
)
