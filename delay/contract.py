"""The contract's dates: completion dates in force, extensions already granted, and which
section is the whole of the works.

- The *contract completion in force* at a date D is the original date (``[project]
  contract_completion``, or a section's own date from sections.csv) plus the days of every
  extension granted on or before D (extensions_granted.csv, ``granted_on``; case format
  v2): a grant takes effect from the day it is made. Without a date, every grant counts
  (an entitlement summary); a check of an update uses the update's data date.
- A grant with no ``section`` applies to the whole works; one naming a section applies to
  that section only (under sectional completion each section has its own date and its own
  extensions - common practice; the contract governs).
- The section whose ``completion_activity`` is the project's completion activity
  (:func:`delay.events.completion_activity`) *is* the whole of the works: a grant naming it
  is a grant for the whole works, and its dates and figures are the whole works' (the two
  never differ).

References
----------
Society of Construction Law, Delay and Disruption Protocol, 2nd edition (2017), core
principle 4 (an extension is assessed against the contract completion date then in force)
and guidance on sectional completion (as recalled).
"""

from __future__ import annotations

import datetime as dt

import pandas as pd

from .events import completion_activity
from .model import Case

__all__ = ["whole_works_section", "completion_in_force", "grants"]


def whole_works_section(case: Case) -> str | None:
    """The id of the section that is the whole of the works (its completion activity is the
    project's), or ``None`` when no section is."""
    sections = case.sections
    if not len(sections):
        return None
    target = completion_activity(case)
    match = sections[sections["completion_activity"].astype(str) == target]
    return str(match["section"].iloc[0]) if len(match) else None


def grants(case: Case, section: str | None = None, at: dt.date | None = None) -> pd.DataFrame:
    """The extensions granted that apply to the whole works (``section=None``) or to one
    section, made on or before ``at`` (``None``: all), in the order of the file.

    Returns
    -------
    DataFrame
        The rows of extensions_granted.csv that apply (its columns as in the file).
    """
    granted = case.extensions_granted
    named = granted["section"].fillna("").astype(str).str.strip()
    whole = whole_works_section(case)
    if section is None or (whole is not None and str(section) == whole):
        rows = granted[(named == "") | (named == (whole or ""))] if whole else granted[named == ""]
    else:
        rows = granted[named == str(section)]
    if at is not None:
        rows = rows[pd.to_datetime(rows["granted_on"]) <= pd.Timestamp(at)]
    return rows


def completion_in_force(
    case: Case, section: str | None = None, at: dt.date | None = None
) -> tuple[dt.date, int, dt.date]:
    """``(contract completion, days granted, completion in force)`` for the whole works
    (``section=None``) or one section, counting the grants made on or before ``at``.

    Parameters
    ----------
    case:
        The loaded case.
    section:
        A section of sections.csv; the whole-works section gives the whole works' dates.
    at:
        The date the completion in force is wanted for (``None``: after every grant).

    Returns
    -------
    tuple
        The original completion date, the days granted by ``at``, and their sum.

    Raises
    ------
    KeyError
        A section not in sections.csv.

    Examples
    --------
    >>> completion_in_force(load_case("case_demo"), at=dt.date(2025, 8, 1))  # doctest: +SKIP
    (datetime.date(2026, 5, 29), 0, datetime.date(2026, 5, 29))
    """
    whole = whole_works_section(case)
    if section is None or (whole is not None and str(section) == whole):
        contract = case.settings.project.contract_completion
    else:
        sections = case.sections
        match = sections[sections["section"].astype(str) == str(section)]
        if not len(match):
            raise KeyError(f"no section '{section}' in sections.csv")
        contract = pd.Timestamp(match["contract_completion"].iloc[0]).date()
    rows = grants(case, section, at)
    days = int(rows["days"].sum()) if len(rows) else 0
    return contract, days, contract + dt.timedelta(days=days)
