"""The report's sections, one module each, in page order.

Each module has a ``section(ctx)`` function that takes the report's results
(:class:`reports.context.Context`) and returns its :class:`reports.blocks.Section`;
:func:`reports.builder.compute` calls them in the order of :data:`SECTIONS` and does
nothing else. The manifest section is filled in when the page is rendered
(:mod:`reports.page`), from the manifest written beside it.
"""

from __future__ import annotations

__all__ = ["SECTIONS"]

#: The sections of the report: key (the page anchor and the module's name) and title, in order.
SECTIONS: tuple[tuple[str, str], ...] = (
    ("summary", "Summary"),
    ("money", "Money and its build-up"),
    ("quality", "Schedule quality"),
    ("windows", "Windows analysis"),
    ("impacted", "Impacted as-planned"),
    ("tia", "Time impact analysis"),
    ("collapsed", "Collapsed as-built"),
    ("comparison", "Method comparison"),
    ("asbuilt", "As planned against as built"),
    ("timeline", "Element timeline"),
    ("inputs", "Inputs and method"),
    ("manifest", "Manifest"),
)
