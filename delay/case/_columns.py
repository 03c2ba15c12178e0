"""Typing the columns of a table and checking them, a whole column at a time.

Every helper takes a :class:`~delay.case._problems.RawTable` of strings, records a problem
for each bad row, and returns the typed column (bad cells become the column's blank value,
so that later checks can still run on the rest).
"""

from __future__ import annotations

import datetime as dt
import re
import warnings
from collections.abc import Callable, Iterable

import numpy as np
import pandas as pd

from delay.case._dialect import ISO_DATE
from delay.case._problems import Problems, RawTable
from delay.convert import split_id_column
from delay.model import COLUMNS, FIRST_DATE, LARGEST_DAYS, LAST_DATE

__all__ = [
    "DATE_DTYPE",
    "DATE_COLUMNS",
    "INTEGER_COLUMNS",
    "NUMBER_COLUMNS",
    "BOOLEAN_COLUMNS",
    "REQUIRED_COLUMNS",
    "require_columns",
    "empty_cells",
    "required_cells",
    "dates",
    "parse_dates",
    "parse_numbers",
    "integers",
    "numbers",
    "choices",
    "duplicates",
    "references",
    "member",
    "id_lists",
    "assemble",
]

#: The largest whole number of days accepted (:data:`delay.model.LARGEST_DAYS`).
LARGEST_WHOLE_NUMBER = LARGEST_DAYS
_FIRST = np.datetime64(FIRST_DATE, "us")
_LAST = np.datetime64(LAST_DATE, "us")

#: The dtype of every date column (pandas' own unit for parsed dates).
DATE_DTYPE = "datetime64[us]"

DATE_COLUMNS: dict[str, tuple[str, ...]] = {
    "calendar_exceptions": ("date",),
    "activities": ("constraint_date", "actual_start", "actual_finish"),
    "asbuilt": ("actual_start", "actual_finish"),
    "events": ("start", "finish", "notified"),
    "sections": ("contract_completion",),
    "extensions_granted": ("granted_on",),
    "prolongation_rates": ("from", "to"),
}
#: Whole numbers that always have a value after loading (``int64``).
INTEGER_COLUMNS: dict[str, tuple[str, ...]] = {
    "activities": ("duration",),
    "links": ("lag",),
    "fragnets": ("duration",),
    "fragnet_links": ("lag",),
}
#: Optional numbers (``float64``, blank is ``NaN``).
NUMBER_COLUMNS: dict[str, tuple[str, ...]] = {
    "activities": ("remaining",),
    "events": ("days", "claimed_days"),
    "elements": ("x", "y", "z", "dx", "dy", "dz"),
    "sections": ("liquidated_damages_per_day",),
    "extensions_granted": ("days",),
    "prolongation_rates": ("cost_per_day",),
}
BOOLEAN_COLUMNS: dict[str, tuple[str, ...]] = {"calendar_exceptions": ("working",)}

#: Columns each file must have in its header row.
REQUIRED_COLUMNS: dict[str, tuple[str, ...]] = {
    "calendars": ("calendar", "workdays"),
    "calendar_exceptions": ("calendar", "date", "working"),
    "activities": ("id", "name", "duration"),
    "links": ("pred", "succ"),
    "asbuilt": ("id", "actual_start", "actual_finish"),
    "corrections": ("snapshot", "table", "key", "column", "value"),
    "attributions": ("window", "activity", "reason"),
    "events": ("id", "title", "party", "start", "finish"),
    "fragnets": ("event", "id", "name", "duration"),
    "fragnet_links": ("event", "pred", "succ"),
    "elements": ("id", "wbs"),
    "sections": ("section", "completion_activity", "contract_completion"),
    "extensions_granted": ("id", "granted_on", "days"),
    "prolongation_rates": ("from", "to", "cost_per_day"),
}

Text = str | Callable[[int], str]


def require_columns(problems: Problems, table: RawTable | None) -> bool:
    """Record a problem for each required column missing from ``table``'s header.

    When none is missing, the format's optional columns the table lacks are added to it as
    blank columns (:meth:`RawTable.ensure_columns`).

    Parameters
    ----------
    problems : Problems
        Where the problems found are recorded.
    table : RawTable or None
        The table as read, or ``None`` when the file could not be read.

    Returns
    -------
    bool
        ``True`` when the table can be checked further; ``False`` when it is ``None`` or a
        required column (:data:`REQUIRED_COLUMNS`) is missing.
    """
    if table is None:
        return False
    missing = [c for c in REQUIRED_COLUMNS[table.name] if c not in table.frame.columns]
    for column in missing:
        problems.add(
            table.file,
            f"the required column '{column}' is missing",
            f"add a column '{column}' to the header row (row 1); the file's columns are "
            + ", ".join(COLUMNS[table.name]),
            row=1,
            column=column,
        )
    if missing:
        return False
    table.ensure_columns(COLUMNS[table.name])
    return True


def empty_cells(text: pd.Series) -> np.ndarray:
    """Mask of the blank cells of a text column (a numpy comparison: fast on big tables).

    Parameters
    ----------
    text : pandas.Series
        A column of stripped text, blank as ``""``.

    Returns
    -------
    numpy.ndarray
        One boolean per cell, true where the cell is ``""``.

    Examples
    --------
    >>> import pandas as pd
    >>> empty_cells(pd.Series(["A", ""])).tolist()
    [False, True]
    """
    return text.to_numpy() == ""


def blank(table: RawTable, column: str) -> np.ndarray:
    """Mask of the blank cells of ``column`` (:func:`empty_cells` of the table's column).

    Parameters
    ----------
    table : RawTable
        The table as read (all text).
    column : str
        One of its columns.

    Returns
    -------
    numpy.ndarray
        One boolean per row, true where the cell is ``""`` (found once per column:
        :meth:`RawTable.blank`; read-only).
    """
    return table.blank(column)


def required_cells(problems: Problems, table: RawTable, column: str, message: Text, fix: Text) -> np.ndarray:
    """Flag blank cells of ``column``.

    Parameters
    ----------
    problems : Problems
        Where the problems found are recorded.
    table : RawTable
        The table as read (all text).
    column : str
        The column checked.
    message : str or callable
        What is wrong, for each blank cell (see :meth:`Problems.flag`).
    fix : str or callable
        What to do about it.

    Returns
    -------
    numpy.ndarray
        The mask of blank cells.
    """
    empty = blank(table, column)
    problems.flag(table, empty, column, message, fix)
    return empty


def dates(
    problems: Problems, table: RawTable, column: str, *, required: Text | None = None, fix_required: Text = ""
) -> pd.Series:
    """``column`` as dates (``NaT`` for blank); text that is not a date is a problem.

    Dates are read in the table's ``date_format`` (ISO ``YYYY-MM-DD`` is understood too). A
    date outside :data:`~delay.model.FIRST_DATE` to :data:`~delay.model.LAST_DATE` is a
    problem as well. Bad cells become ``NaT``.

    Parameters
    ----------
    problems : Problems
        Where the problems found are recorded.
    table : RawTable
        The table as read (all text).
    column : str
        The column read.
    required : str or callable or None, optional
        The message for a blank cell; ``None`` lets a cell be blank.
    fix_required : str or callable, optional
        What to do about a blank cell (default: fill in the date as YYYY-MM-DD).

    Returns
    -------
    pandas.Series
        The dates, of dtype :data:`DATE_DTYPE`.
    """
    text = table.frame[column]
    empty = blank(table, column)
    parsed = parse_dates(text, table.date_format, empty)
    example = dt.date(2025, 3, 31).strftime(table.date_format)
    shown = "YYYY-MM-DD" if table.date_format == ISO_DATE else f"{table.date_format} ([input] of case.toml)"
    problems.flag(
        table,
        ~empty & parsed.isna().to_numpy(),
        column,
        "'{value}' is not a date",
        f"write the date as {shown}, for example {example}",
    )
    values = parsed.to_numpy()
    outside = ~np.isnat(values) & ((values < _FIRST) | (values > _LAST))
    problems.flag(
        table,
        outside,
        column,
        f"the date '{{value}}' is outside {FIRST_DATE} to {LAST_DATE}, the dates the toolkit works with",
        "check the year of the date",
    )
    if outside.any():
        parsed = parsed.where(~outside)
    if required is not None:
        problems.flag(table, empty, column, required, fix_required or "fill in the date as YYYY-MM-DD")
    return parsed


def parse_dates(text: pd.Series, date_format: str = ISO_DATE, empty: np.ndarray | None = None) -> pd.Series:
    """Read a text column of dates written in ``date_format``.

    ISO ``YYYY-MM-DD`` is understood too, whatever ``date_format`` is (workbook date cells
    and corrections may use it). Nothing is recorded as a problem: see :func:`dates`.

    Parameters
    ----------
    text : pandas.Series
        A column of stripped text, blank as ``""``.
    date_format : str, optional
        A strptime format; ISO ``%Y-%m-%d`` by default.
    empty : numpy.ndarray or None, optional
        The mask of the blank cells of ``text`` when it is already known.

    Returns
    -------
    pandas.Series
        The dates (:data:`DATE_DTYPE`), ``NaT`` for a blank or unreadable cell.

    Examples
    --------
    >>> import pandas as pd
    >>> parse_dates(pd.Series(["31/03/2025", "2025-04-01", "", "soon"]), "%d/%m/%Y").tolist()
    [Timestamp('2025-03-31 00:00:00'), Timestamp('2025-04-01 00:00:00'), NaT, NaT]
    """
    empty = empty_cells(text) if empty is None else empty
    if empty.all():
        return pd.Series(np.full(len(text), np.datetime64("NaT"), dtype=DATE_DTYPE), index=text.index, name=text.name)
    parsed = pd.to_datetime(text.where(~empty), format=date_format, errors="coerce")
    if date_format != ISO_DATE:
        again = parsed.isna().to_numpy() & ~empty
        if again.any():
            parsed = parsed.where(~again, pd.to_datetime(text.where(again), format=ISO_DATE, errors="coerce"))
    return parsed.astype(DATE_DTYPE)


def parse_numbers(text: pd.Series, decimal: str = ".") -> np.ndarray:
    """Read a text column of numbers written with the decimal mark ``decimal``.

    With the decimal mark ``","``, a cell holding a point is unreadable: it may be a
    thousands separator (``2.800``), which must never be read as a decimal point. Nothing
    is recorded as a problem: see :func:`numbers` and :func:`integers`.

    Parameters
    ----------
    text : pandas.Series
        A column of stripped text.
    decimal : str, optional
        The decimal mark, ``"."`` (default) or ``","``.

    Returns
    -------
    numpy.ndarray
        The numbers (``float64``), ``NaN`` for a blank or unreadable cell.

    Examples
    --------
    >>> import pandas as pd
    >>> parse_numbers(pd.Series(["2,5", "2.800", ""]), ",").tolist()
    [2.5, nan, nan]
    """
    if decimal == ",":
        point = text.str.contains(".", regex=False).to_numpy()
        text = text.str.replace(",", ".", regex=False).where(~point, "not a number")
    return pd.to_numeric(text, errors="coerce").to_numpy(dtype=np.float64)


#: The most digits a plain whole number may have (more may not be exact as a float).
_MOST_DIGITS = 15
_LONG_DIGITS = re.compile(rf"[0-9]{{{_MOST_DIGITS + 1}}}")
#: What each byte of a column of plain whole numbers may be: 0 nothing allowed, 1 a digit,
#: 2 the line break between two cells, 3 a minus.
_DIGIT, _BREAK, _MINUS = 1, 2, 3
_OCTET_KINDS = np.zeros(256, dtype=np.uint8)
_OCTET_KINDS[np.frombuffer(b"0123456789", dtype=np.uint8)] = _DIGIT
_OCTET_KINDS[ord("\n")] = _BREAK
_OCTET_KINDS[ord("-")] = _MINUS


def _plain_integers(cells: np.ndarray, empty: np.ndarray) -> np.ndarray | None:
    """The values (``float64``, ``NaN`` for a blank) of a text column whose every non-blank
    cell is a plain whole number (an optional leading minus and at most 15 digits), read in
    one pass over the joined text; ``None`` when any cell is anything else (the general
    reader then decides, cell by cell, what it is)."""
    given = cells[~empty]
    joined = "\n".join(given.tolist())
    if not _plain_lines(joined):
        return None
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        try:
            parsed = np.fromstring(joined, dtype=np.int64, sep="\n")
        except (ValueError, DeprecationWarning):
            return None
    if parsed.size != given.size:
        return None
    values = np.full(cells.size, np.nan)
    values[~empty] = parsed
    return values


def _plain_lines(joined: str) -> bool:
    """Whether every line of ``joined`` is a plain whole number: digits, a minus only as
    the line's first character and followed by a digit, at most :data:`_MOST_DIGITS`
    digits. Whole-array operations over the text's bytes."""
    if not joined.isascii():
        return False
    octets = np.frombuffer(joined.encode("ascii"), dtype=np.uint8)
    if not octets.size:
        return True
    kinds = _OCTET_KINDS[octets]
    if not kinds.all():  # a byte that is neither a digit, a line break nor a minus
        return False
    breaks = np.flatnonzero(kinds == _BREAK)
    minus = np.flatnonzero(kinds == _MINUS)
    if minus.size:
        line_start = np.zeros(octets.size + 1, dtype=bool)
        line_start[0] = True
        line_start[breaks + 1] = True
        after = np.append(kinds, 0)[minus + 1]
        if not (line_start[minus].all() and (after == _DIGIT).all()):
            return False
    bounds = np.concatenate(([-1], breaks, [octets.size]))
    if int(np.diff(bounds).max()) - 1 <= _MOST_DIGITS:  # no line is long enough to hold more
        return True
    return _LONG_DIGITS.search(joined) is None


def _numbers(
    text: pd.Series, decimal: str = ".", empty: np.ndarray | None = None
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(values, blank mask, not-a-number mask) of a text column (``empty``: its blank
    cells, when known)."""
    empty = empty_cells(text) if empty is None else empty
    if empty.all():
        nothing = np.zeros(len(text), dtype=bool)
        return np.full(len(text), np.nan), empty, nothing
    values = _plain_integers(text.to_numpy(dtype=object), empty)
    if values is None:
        values = parse_numbers(text.where(~empty), decimal)
    not_number = ~empty & ~np.isfinite(values)
    values = np.where(not_number, np.nan, values)
    return values, empty, not_number


def _column_numbers(table: RawTable, column: str) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """:func:`_numbers` of a table's column, each distinct text read once."""
    codes, texts = table.distinct(column)
    empty = blank(table, column)
    if empty.all():
        return np.full(len(empty), np.nan), empty, np.zeros(len(empty), dtype=bool)
    values, _, not_number = _numbers(pd.Series(texts, dtype="str"), table.decimal, texts == "")
    return values[codes], empty, not_number[codes]


def integers(
    problems: Problems,
    table: RawTable,
    column: str,
    *,
    unit: str,
    default: int | None = None,
    minimum: int | None = None,
    required: Text | None = None,
) -> pd.Series:
    """``column`` as ``int64`` whole numbers.

    Text that is not a number, a fraction, a value beyond
    :data:`~delay.model.LARGEST_DAYS` either way, or a value below ``minimum`` is a
    problem.

    Parameters
    ----------
    problems : Problems
        Where the problems found are recorded.
    table : RawTable
        The table as read (all text).
    column : str
        The column read.
    unit : str
        What the numbers count, as the advice names it (``"work days"``, say).
    default : int or None, optional
        The value of a blank cell; ``None`` makes a blank a problem.
    minimum : int or None, optional
        The smallest value allowed; ``None`` for no bound.
    required : str or callable or None, optional
        The message for a blank cell when ``default`` is ``None`` (default: the
        ``column`` is missing).

    Returns
    -------
    pandas.Series
        The whole numbers (``int64``); blank and bad cells hold ``default`` (or 0).

    Examples
    --------
    >>> import numpy as np, pandas as pd
    >>> from delay.case._problems import Problems, RawTable
    >>> table = RawTable("links", "links.csv", pd.DataFrame({"lag": ["2", "", "1.5"]}), np.array([2, 3, 4]))
    >>> problems = Problems()
    >>> integers(problems, table, "lag", unit="work days", default=0).tolist()
    [2, 0, 0]
    >>> problems.count()
    1
    """
    values, empty, not_number = _column_numbers(table, column)
    problems.flag(table, not_number, column, "'{value}' is not a number", f"write a whole number of {unit}")
    fraction = ~empty & ~not_number & (np.floor(values) != values)
    problems.flag(table, fraction, column, "'{value}' is not a whole number", f"give a whole number of {unit}")
    bad = not_number | fraction
    huge = ~empty & ~bad & (np.abs(np.nan_to_num(values)) > LARGEST_WHOLE_NUMBER)
    signed = minimum is None or minimum < 0
    problems.flag(
        table,
        huge,
        column,
        "'{value}' is too large" if not signed else "'{value}' is out of range",
        f"give at most {LARGEST_WHOLE_NUMBER:,} {unit}"
        if not signed
        else f"give from -{LARGEST_WHOLE_NUMBER:,} to {LARGEST_WHOLE_NUMBER:,} {unit}",
    )
    bad |= huge
    if minimum is not None:
        low = ~empty & ~bad & (values < minimum)
        problems.flag(table, low, column, f"{column} {{value}} is below {minimum}", f"give {minimum} or more {unit}")
        bad |= low
    if default is None:
        problems.flag(
            table,
            empty,
            column,
            required or f"the {column} is missing",
            f"give the {column} as a whole number of {unit}",
        )
    fill = 0 if default is None else default
    result = np.where(empty | bad, fill, np.nan_to_num(values)).astype(np.int64)
    return pd.Series(result, index=table.frame.index, name=column)


def numbers(
    problems: Problems,
    table: RawTable,
    column: str,
    *,
    unit: str = "",
    whole: bool = False,
    minimum: float | None = None,
    maximum: float | None = None,
    required: Text | None = None,
) -> pd.Series:
    """``column`` as ``float64`` (``NaN`` for blank).

    Text that is not a number (in the table's decimal mark) is a problem.

    Parameters
    ----------
    problems : Problems
        Where the problems found are recorded.
    table : RawTable
        The table as read (all text).
    column : str
        The column read.
    unit : str, optional
        What the numbers count, as the advice names it.
    whole : bool, optional
        Make a fraction a problem.
    minimum : float or None, optional
        A smaller value is a problem; ``None`` for no bound.
    maximum : float or None, optional
        A larger value is a problem; ``None`` for no bound.
    required : str or callable or None, optional
        The message for a blank cell; ``None`` lets a cell be blank.

    Returns
    -------
    pandas.Series
        The numbers (``float64``); blank and bad cells are ``NaN``.
    """
    values, empty, not_number = _column_numbers(table, column)
    what = f"a whole number of {unit}" if whole else (f"a number of {unit}" if unit else "a number")
    mark = (
        ", with a decimal comma and no thousands separator ([input] of case.toml)"
        if table.decimal == "," and not whole
        else ""
    )
    problems.flag(table, not_number, column, "'{value}' is not a number", f"write {what}{mark}")
    bad = not_number.copy()
    if whole:
        fraction = ~empty & ~bad & (np.floor(values) != values)
        problems.flag(table, fraction, column, "'{value}' is not a whole number", f"give {what}")
        bad |= fraction
    if minimum is not None:
        low = ~empty & ~bad & (values < minimum)
        problems.flag(table, low, column, f"{column} {{value}} is below {minimum:g}", f"give {minimum:g} or more")
        bad |= low
    if maximum is not None:
        high = ~empty & ~bad & (np.nan_to_num(values) > maximum)
        problems.flag(table, high, column, "'{value}' is too large", f"give at most {maximum:,g} {unit}".rstrip())
        bad |= high
    if required is not None:
        problems.flag(table, empty, column, required, f"give {what}")
    result = np.where(bad, np.nan, values)
    return pd.Series(result, index=table.frame.index, name=column, dtype=np.float64)


def choices(
    problems: Problems,
    table: RawTable,
    column: str,
    allowed: Iterable[str],
    *,
    default: str | None = None,
    upper: bool = False,
    what: str = "value",
    required: Text | None = None,
) -> pd.Series:
    """``column`` as one of ``allowed`` (compared without regard to case).

    An unknown value is a problem. See :func:`coded_choices`, which also returns each
    cell's position in ``allowed``.

    Parameters
    ----------
    problems : Problems
        Where the problems found are recorded.
    table : RawTable
        The table as read (all text).
    column : str
        The column read.
    allowed : iterable of str
        The values allowed, written as they are to be stored.
    default : str or None, optional
        The value of a blank cell (one of ``allowed``); ``None`` leaves it blank.
    upper : bool, optional
        Compare a cell not found as written in upper case (``True``, for codes such as
        ``FS``) or in lower case (``False``).
    what : str, optional
        What a value is, as the message names it (``"link type"``, say).
    required : str or callable or None, optional
        The message for a blank cell; ``None`` lets a cell be blank.

    Returns
    -------
    pandas.Series
        The values as text, in the case of ``allowed``; an unknown value is kept as
        changed to upper (or lower) case.
    """
    return coded_choices(problems, table, column, allowed, default=default, upper=upper, what=what, required=required)[
        0
    ]


def coded_choices(
    problems: Problems,
    table: RawTable,
    column: str,
    allowed: Iterable[str],
    *,
    default: str | None = None,
    upper: bool = False,
    what: str = "value",
    required: Text | None = None,
) -> tuple[pd.Series, np.ndarray]:
    """:func:`choices`, and each cell's position in ``allowed``, found in the same look-up.

    Cells already in the case of ``allowed`` are looked up as they are; only the others are
    changed to upper (or lower) case and looked up again.

    Parameters
    ----------
    problems : Problems
        Where the problems found are recorded.
    table : RawTable
        The table as read (all text).
    column : str
        The column read.
    allowed : iterable of str
        The values allowed, written as they are to be stored.
    default : str or None, optional
        The value of a blank cell (one of ``allowed``); ``None`` leaves it blank.
    upper : bool, optional
        Compare a cell not found as written in upper case (``True``) or lower case.
    what : str, optional
        What a value is, as the message names it.
    required : str or callable or None, optional
        The message for a blank cell; ``None`` lets a cell be blank.

    Returns
    -------
    values : pandas.Series
        As :func:`choices` returns them.
    codes : numpy.ndarray
        Each cell's position in ``allowed``; ``-1`` for a blank without default or an
        unknown value.

    Examples
    --------
    >>> import numpy as np, pandas as pd
    >>> from delay.case._problems import Problems, RawTable
    >>> table = RawTable("links", "links.csv", pd.DataFrame({"type": ["fs", "", "XX"]}), np.array([2, 3, 4]))
    >>> problems = Problems()
    >>> values, codes = coded_choices(problems, table, "type", ["FS", "SS", "FF", "SF"], default="FS", upper=True)
    >>> values.tolist(), codes.tolist(), problems.count()
    (['FS', 'FS', 'XX'], [0, 0, -1], 1)
    """
    allowed = tuple(allowed)
    text = table.frame[column]
    empty = blank(table, column)
    index = pd.Index(allowed)
    if empty.all():  # a blank column (an optional one the file leaves out): nothing to look up
        codes = np.full(len(text), -1, dtype=np.intp)
        if required is not None:
            problems.flag(table, empty, column, required, "use one of: " + ", ".join(allowed))
        if default is None:
            return text.astype("str"), codes
        codes[:] = allowed.index(default)
        return pd.Series(default, index=text.index, name=text.name, dtype="str"), codes
    # Each distinct text is looked up once; cells written in another case, changed to
    # upper (or lower) case, once more.
    rows, texts = table.distinct(column)
    found = index.get_indexer(texts)
    differ = (texts != "") & (found < 0)
    written = texts.copy()
    if differ.any():
        cells = pd.Series(texts[differ], dtype="str")
        changed = (cells.str.upper() if upper else cells.str.lower()).to_numpy(dtype=object)
        found[differ] = index.get_indexer(changed)
        written[differ] = changed
    codes, other, normal = found[rows], differ[rows], written[rows]
    unknown = other & (codes < 0)
    problems.flag(table, unknown, column, f"'{{value}}' is not a known {what}", "use one of: " + ", ".join(allowed))
    if required is not None:
        problems.flag(table, empty, column, required, "use one of: " + ", ".join(allowed))
    if default is not None:
        if empty.any():
            normal = np.where(empty, default, normal)
        codes[empty] = allowed.index(default)
    return pd.Series(normal, index=text.index, name=text.name, dtype="str"), codes


def _combined(table: RawTable, columns: list[str]) -> pd.Series:
    key = table.frame[columns[0]]
    for column in columns[1:]:
        key = key + "\x1f" + table.frame[column]
    return key


def duplicates(
    problems: Problems,
    table: RawTable,
    columns: list[str],
    column: str,
    describe: Callable[[int], str],
    fix: str,
    skip: np.ndarray | None = None,
    codes: np.ndarray | None = None,
) -> None:
    """Flag every row whose ``columns`` repeat an earlier row's.

    The message is ``describe(position)`` followed by "is given twice (first on row N)",
    N being the spreadsheet row of the first occurrence.

    Parameters
    ----------
    problems : Problems
        Where the problems found are recorded.
    table : RawTable
        The table as read (all text).
    columns : list of str
        The columns that together must be unique.
    column : str
        The column the problems are reported in.
    describe : callable
        ``describe(position)`` names the repeated thing (``"activity id 'A'"``).
    fix : str
        What to do about a repeated row.
    skip : numpy.ndarray or None, optional
        One boolean per row; rows where it is true are ignored.
    codes : numpy.ndarray or None, optional
        One whole number per row standing for its ``columns`` (equal exactly where they
        are equal: the link ends' activity numbers, say), compared instead of the text.
    """
    values = _combined(table, columns).to_numpy(dtype=object) if codes is None else np.asarray(codes, dtype=np.int64)
    # Rows in ``skip`` take no part: neither repeated nor the first of a repetition.
    considered = np.flatnonzero(~np.asarray(skip, dtype=bool)) if skip is not None else None
    looked_at = values if considered is None else values[considered]
    repeated_among = pd.Index(looked_at, dtype=looked_at.dtype, copy=False).duplicated(keep="first")
    if not repeated_among.any():
        return
    positions = np.arange(len(values)) if considered is None else considered
    repeated = np.zeros(len(values), dtype=bool)
    repeated[positions[repeated_among]] = True
    firsts = positions[~repeated_among]
    first_position = dict(zip(values[firsts].tolist(), firsts.tolist()))

    def message(position: int) -> str:
        file, row = table.where(int(first_position[values[position]]))
        return f"{describe(position)} is given twice (first on row {row})"

    problems.flag(table, repeated, column, message, fix)


def member(values: pd.Series, known) -> np.ndarray:
    """Mask of the cells of ``values`` found in ``known``.

    Against an index of unique values (the case's activity ids) the index's own hash
    table, built once, is used; nothing is built for an empty column.

    Parameters
    ----------
    values : pandas.Series
        The cells looked up.
    known : pandas.Index or collection of str
        The values known.

    Returns
    -------
    numpy.ndarray
        One boolean per cell of ``values``, true where it is in ``known``.

    Examples
    --------
    >>> import pandas as pd
    >>> member(pd.Series(["A", "Z"]), pd.Index(["A", "B"])).tolist()
    [True, False]
    """
    if not len(values):
        return np.zeros(0, dtype=bool)
    if isinstance(known, pd.Index) and known.is_unique:
        return known.get_indexer(values) >= 0
    return values.isin(known).to_numpy()


def references(problems: Problems, table: RawTable, column: str, known, message: Text, fix: Text) -> np.ndarray:
    """Flag non-blank cells of ``column`` not in ``known``.

    Parameters
    ----------
    problems : Problems
        Where the problems found are recorded.
    table : RawTable
        The table as read (all text).
    column : str
        The column checked.
    known : pandas.Index or collection of str
        The values a cell may hold (see :func:`member`).
    message : str or callable
        What is wrong, for each unknown cell (see :meth:`Problems.flag`).
    fix : str or callable
        What to do about it.

    Returns
    -------
    numpy.ndarray
        The mask of the unknown cells.
    """
    text = table.frame[column]
    unknown = ~blank(table, column) & ~member(text, known)
    problems.flag(table, unknown, column, message, fix)
    return unknown


def coded_references(
    problems: Problems,
    table: RawTable,
    column: str,
    known: pd.Index,
    message: Text,
    fix: Text,
    *,
    few: bool = False,
) -> tuple[np.ndarray, np.ndarray]:
    """:func:`references` against an index of unique ``known`` values, and each cell's position in it.

    Parameters
    ----------
    problems : Problems
        Where the problems found are recorded.
    table : RawTable
        The table as read (all text).
    column : str
        The column checked.
    known : pandas.Index
        The values a cell may hold, unique.
    message : str or callable
        What is wrong, for each unknown cell (see :meth:`Problems.flag`).
    fix : str or callable
        What to do about it.
    few : bool, optional
        The column holds few distinct texts (calendar names, say): each is looked up
        once (:meth:`RawTable.distinct`) rather than every cell.

    Returns
    -------
    unknown : numpy.ndarray
        The mask of the non-blank cells not in ``known``.
    codes : numpy.ndarray
        Each cell's position in ``known``; ``-1`` for a blank or unknown cell.
    """
    if few:
        rows, texts = table.distinct(column)
        codes = known.get_indexer(texts)[rows]
    else:
        codes = known.get_indexer(table.frame[column])
    unknown = (codes < 0) & ~blank(table, column)
    problems.flag(table, unknown, column, message, fix)
    return unknown, codes


def id_lists(problems: Problems, table: RawTable, column: str, known, where: str, fix: str) -> None:
    """Flag rows of ``column`` (``;``-separated ids) naming an id not in ``known``.

    The message reads "'X' is not in {where}" (or "'X', 'Y' are not in {where}").

    Parameters
    ----------
    problems : Problems
        Where the problems found are recorded.
    table : RawTable
        The table as read (all text).
    column : str
        The column of ``;``-separated ids.
    known : pandas.Index or collection of str
        The ids a list may name (see :func:`member`).
    where : str
        What ``known`` is, as the message names it (``"the baseline"``, say).
    fix : str
        What to do about an unknown id.
    """
    if not len(table):
        return
    parts = split_id_column(table.frame[column])
    unknown = parts[~member(parts, known)]
    if unknown.empty:
        return
    names = unknown.groupby(level=0).agg(list)
    mask = np.zeros(len(table), dtype=bool)
    mask[names.index.to_numpy(dtype=np.int64)] = True

    def message(position: int) -> str:
        ids = names[position]
        verb = "is" if len(ids) == 1 else "are"
        return ", ".join(f"'{i}'" for i in ids) + f" {verb} not in {where}"

    problems.flag(table, mask, column, message, fix)


def assemble(table: RawTable, typed: dict[str, pd.Series]) -> pd.DataFrame:
    """The table with its stable columns in order (typed where given), then the rest as text.

    Parameters
    ----------
    table : RawTable
        The table as read; it must have every column of :data:`delay.model.COLUMNS` for
        its name (see :func:`require_columns`).
    typed : dict of str to pandas.Series
        The typed columns, by name; the other columns are kept as text.

    Returns
    -------
    pandas.DataFrame
        The columns of :data:`delay.model.COLUMNS` in order, then the table's other
        columns (unknown columns are kept), on a fresh ``RangeIndex``.
    """
    frame = table.frame
    stable = COLUMNS[table.name]
    data = {}
    for column in stable:
        data[column] = typed[column] if column in typed else frame[column].astype("str")
    for column in frame.columns:
        if column not in data:
            data[column] = frame[column].astype("str")
    # No copy is made: the new frame shares the columns' memory until either side writes
    # (copy-on-write keeps them apart).
    return pd.DataFrame(data, index=pd.RangeIndex(len(frame)), copy=False)
