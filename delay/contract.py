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
from .memo import remembered
from .model import Case

__all__ = ["whole_works_section", "completion_in_force", "grants"]


def whole_works_section(case: Case) -> str | None:
    """Find the section that is the whole of the works.

    It is the section of sections.csv whose ``completion_activity`` is the project's
    completion activity (:func:`delay.events.completion_activity`); the first such row
    when several are.

    Parameters
    ----------
    case : Case
        The loaded case.

    Returns
    -------
    str or None
        The section's id as text, or ``None`` when the case has no sections or none of
        them completes with the project.

    Examples
    --------
    >>> whole_works_section(demo)
    '2'
    """
    sections = case.sections
    if not len(sections):
        return None
    target = completion_activity(case)
    match = sections[sections["completion_activity"].astype(str) == target]
    return str(match["section"].iloc[0]) if len(match) else None


def grants(case: Case, section: str | None = None, at: dt.date | None = None) -> pd.DataFrame:
    """Select the extensions granted that apply to the whole works or to one section.

    A grant with a blank ``section`` applies to the whole works, and so does one naming the
    whole-works section (:func:`whole_works_section`); a grant naming another section
    applies to that section only.

    Parameters
    ----------
    case : Case
        The loaded case.
    section : str or None, optional
        A section of sections.csv, or ``None`` (or the whole-works section) for the whole
        works. A section that is not in the file selects no rows.
    at : datetime.date or None, optional
        Count only the grants made on or before this date (``granted_on``); ``None``
        counts them all.

    Returns
    -------
    DataFrame
        The rows of extensions_granted.csv that apply, in the order of the file, with its
        columns as in the file (``days`` in calendar days).

    Examples
    --------
    >>> grants(demo)[["id", "days"]].values.tolist()
    [['EOT-01', 21.0], ['EOT-02', 7.0]]
    >>> len(grants(demo, at=dt.date(2025, 8, 1)))
    0
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
    """Give the contract completion date in force for the whole works or one section.

    The original date (``[project] contract_completion`` for the whole works, the
    section's ``contract_completion`` otherwise) plus the calendar days of every grant
    that applies (:func:`grants`) made on or before ``at``.

    Parameters
    ----------
    case : Case
        The loaded case.
    section : str or None, optional
        A section of sections.csv; ``None`` or the whole-works section gives the whole
        works' dates.
    at : datetime.date or None, optional
        The date the completion in force is wanted for (``None``: after every grant).

    Returns
    -------
    tuple of (datetime.date, int, datetime.date)
        The original completion date, the calendar days granted by ``at``, and the date in
        force (the original date plus those days).

    Raises
    ------
    KeyError
        A section not in sections.csv.

    References
    ----------
    Society of Construction Law, Delay and Disruption Protocol, 2nd edition (2017), core
    principle 4 (as recalled).

    Examples
    --------
    >>> completion_in_force(demo, at=dt.date(2025, 8, 1))
    (datetime.date(2026, 5, 29), 0, datetime.date(2026, 5, 29))
    >>> completion_in_force(demo)
    (datetime.date(2026, 5, 29), 28, datetime.date(2026, 6, 26))
    """
    return remembered(case, ("completion in force", section, at), lambda: _in_force(case, section, at))


def _in_force(case: Case, section: str | None, at: dt.date | None) -> tuple[dt.date, int, dt.date]:
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
