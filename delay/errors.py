"""Errors raised for bad input.

A :class:`CaseError` carries one or more :class:`Problem` records. Each names the file, the
row as a person counts it in a spreadsheet (the header is row 1, the first data row is
row 2), the column, what is wrong and what to do about it. The command line prints one
plain line per problem and exits with status 2; it never shows a traceback for them.
"""

from __future__ import annotations

import unicodedata
from dataclasses import dataclass

__all__ = ["Problem", "CaseError", "DateBoundError", "ReconciliationError", "MAX_PROBLEMS_PER_FILE"]

#: At most this many problems are collected from one file before checking moves on.
MAX_PROBLEMS_PER_FILE = 50


def _one_line(text: str) -> str:
    """``text`` with every control character (line breaks, form feeds, NUL ...) written as
    its escape, so that a problem quoting a cell stays one plain line."""
    if text.isprintable():
        return text
    return "".join(
        character
        if character.isprintable() or character == " " or unicodedata.category(character) not in ("Cc", "Zl", "Zp")
        else repr(character)[1:-1]
        for character in text
    )


@dataclass(frozen=True)
class Problem:
    """One thing wrong with the input.

    Parameters
    ----------
    file : str
        Path of the file as the user would type it, relative to the case folder where
        possible (``snapshots/baseline/links.csv``), or ``case.xlsx:links`` for a sheet.
    message : str
        What is wrong, in plain words.
    fix : str, default ""
        What the user should do.
    row : int or None, optional
        Spreadsheet row number (header = 1), or ``None`` when the problem is not in a row.
    column : str or None, optional
        Column name, or ``None``.

    Examples
    --------
    >>> print(Problem("links.csv", "the lag is not a number", "write a whole number of days", row=3, column="lag"))
    links.csv, row 3, column 'lag': the lag is not a number - write a whole number of days
    """

    file: str
    message: str
    fix: str = ""
    row: int | None = None
    column: str | None = None

    def __str__(self) -> str:
        where = self.file
        if self.row is not None:
            where += f", row {self.row}"
        if self.column is not None:
            where += f", column '{self.column}'"
        text = f"{where}: {self.message}"
        if self.fix:
            text += f" - {self.fix}"
        return _one_line(text)


class CaseError(Exception):
    """The case cannot be used as given; ``problems`` lists every problem found.

    The message is one line per problem (:class:`Problem`'s text).

    Parameters
    ----------
    problems : Problem or list of Problem or tuple of Problem
        The problems found: at least one.

    Raises
    ------
    ValueError
        When ``problems`` is empty.

    Examples
    --------
    >>> error = CaseError(Problem("events.csv", "the event id is blank", "give every event an id", row=2))
    >>> len(error.problems)
    1
    >>> print(error)
    events.csv, row 2: the event id is blank - give every event an id
    """

    def __init__(self, problems: Problem | list[Problem] | tuple[Problem, ...]):
        if isinstance(problems, Problem):
            problems = [problems]
        self.problems: tuple[Problem, ...] = tuple(problems)
        if not self.problems:
            raise ValueError("CaseError needs at least one problem")
        super().__init__("\n".join(str(p) for p in self.problems))

    def __reduce__(self):
        """Pickle by the problems (a process of the demo hands its errors back this way)."""
        return (type(self), (self.problems,))


class DateBoundError(CaseError):
    """A computed date would fall outside the dates the toolkit works with.

    Raised by :mod:`delay.calendars` when a look-up needs a date beyond its horizon's
    bound (a year past :data:`delay.model.FIRST_DATE` .. :data:`delay.model.LAST_DATE`).
    The engine turns it into a problem naming the snapshot and the durations and lags
    that drive the dates so far (:mod:`delay.bounds`); on its own it still reads as one
    plain line. ``earlier`` tells which bound: before the first date, or after the last.

    Parameters
    ----------
    earlier : bool
        ``True`` when the date would fall before the first date (1900-01-01), ``False``
        when after the last (2200-12-31).
    problems : Problem or list of Problem, optional
        The problems to report; by default one problem on ``the schedule`` naming the
        bound crossed and what to check.
    """

    def __init__(self, earlier: bool, problems: Problem | list[Problem] | None = None):
        self.earlier = bool(earlier)
        if problems is None:
            side = "before 1900-01-01" if earlier else "after 2200-12-31"
            problems = Problem(
                file="the schedule",
                message=f"a computed date would fall {side}, outside the dates the toolkit works with",
                fix="check the durations, lags and event days of the case for a value keyed "
                "in the wrong unit or with an extra digit",
            )
        super().__init__(problems)

    def __reduce__(self):
        """Pickle by the side crossed and the problems (as :class:`CaseError`)."""
        return (type(self), (self.earlier, self.problems))


class ReconciliationError(Exception):
    """A delay figure does not add up to the movement of completion it explains.

    Raised (never asserted, so ``python -O`` keeps the check) when, for example, the charges
    of a window do not sum to the window's movement of completion. ``where`` names the
    window or step and ``figures`` holds the numbers that disagree.

    Parameters
    ----------
    where : str
        The window, step or table whose figures disagree.
    figures : dict
        The figures that disagree, by name (copied).

    Examples
    --------
    >>> print(ReconciliationError("window 2", {"charged_days": 9, "movement_days": 10}))
    window 2: the figures do not reconcile (charged_days = 9, movement_days = 10)
    """

    def __init__(self, where: str, figures: dict):
        self.where = where
        self.figures = dict(figures)
        detail = ", ".join(f"{key} = {value}" for key, value in self.figures.items())
        super().__init__(f"{where}: the figures do not reconcile ({detail})")

    def __reduce__(self):
        """Pickle by where and the figures (a process of the demo hands its errors back this way)."""
        return (type(self), (self.where, self.figures))
