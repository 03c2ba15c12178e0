"""Value conversions shared by the engine, the methods, the commands and the report.

One place for each conversion the toolkit makes between its own forms and the ones it
reads or writes:

- day numbers and dates: a day number counts days since 1970-01-01 (``int64``; day 0 is
  Thursday 1 January 1970), :data:`NO_DAY` stands for "no date";
- cells for JSON (:func:`json_cell`, :func:`json_records`) and for printed tables
  (:func:`text_cell`);
- ``;``-separated lists of ids, as the case format writes them (:func:`split_ids`,
  :func:`join_ids`).

Nothing here reads a file or knows a method; every function is total over the values a
result table can hold (numpy and pandas scalars, missing values, dates of every kind).
"""

from __future__ import annotations

import datetime as dt
import json
import math
from collections.abc import Iterable, Mapping
from json.encoder import encode_basestring_ascii
from typing import Any

import numpy as np
import pandas as pd

__all__ = [
    "EPOCH",
    "NO_DAY",
    "to_days",
    "to_dates",
    "table_dates",
    "iso_dates",
    "day_to_date",
    "iso_date",
    "json_int",
    "json_cell",
    "json_records",
    "json_date_cells",
    "json_text_cells",
    "json_int_cells",
    "json_bool_cells",
    "json_rows_text",
    "list_cells",
    "text_cell",
    "split_ids",
    "split_id_column",
    "join_ids",
    "LIST_SEPARATOR",
]

#: Day number 0.
EPOCH = np.datetime64("1970-01-01", "D")
#: "No date" in arrays of day numbers (the smallest ``int64``).
NO_DAY = np.iinfo(np.int64).min
#: How a list of ids is written in one cell of an output, as the case format writes it.
LIST_SEPARATOR = ";"


# -- day numbers and dates ----------------------------------------------------------------
def to_days(dates) -> np.ndarray:
    """Convert dates to day numbers.

    Parameters
    ----------
    dates : array-like
        ``datetime64`` values of any unit, ISO ``YYYY-MM-DD`` text, ``datetime.date``
        objects, or whole numbers (taken as day numbers already).

    Returns
    -------
    numpy.ndarray
        ``int64`` days since 1970-01-01, one per date; ``NaT`` becomes :data:`NO_DAY`.

    Raises
    ------
    TypeError
        For values of any other kind (floats, for instance).

    Examples
    --------
    >>> to_days(["1970-01-02", "2025-01-06"]).tolist()
    [1, 20094]
    >>> bool(to_days(np.array(["NaT"], dtype="datetime64[ns]"))[0] == NO_DAY)
    True
    """
    array = np.asarray(dates)
    if array.dtype.kind == "M":
        return array.astype("datetime64[D]").astype(np.int64)
    if array.dtype.kind in "iu":
        return array.astype(np.int64)
    if array.dtype == object or array.dtype.kind in "US":
        return np.asarray(array, dtype="datetime64[D]").astype(np.int64)
    raise TypeError(f"cannot read dates of dtype {array.dtype}")


def to_dates(days) -> np.ndarray:
    """Convert day numbers to ``datetime64[D]`` dates, ``NaT`` for :data:`NO_DAY`.

    Parameters
    ----------
    days : array-like of int
        Day numbers.

    Returns
    -------
    numpy.ndarray
        ``datetime64[D]``, one per day number (``NaT`` for :data:`NO_DAY`).

    Examples
    --------
    >>> to_dates([20094, NO_DAY]).tolist()
    [datetime.date(2025, 1, 6), None]
    """
    numbers = np.asarray(days, dtype=np.int64)
    values = numbers.astype("datetime64[D]")
    values[numbers == NO_DAY] = np.datetime64("NaT")
    return values


def table_dates(days) -> np.ndarray:
    """Convert day numbers to the dates of a result table's column, ``NaT`` for :data:`NO_DAY`.

    The dates are ``datetime64[s]``, pandas's own resolution for dates read from text.

    Parameters
    ----------
    days : array-like of int
        Day numbers.

    Returns
    -------
    numpy.ndarray
        ``datetime64[s]``, one per day number.

    Examples
    --------
    >>> str(table_dates([20094])[0])
    '2025-01-06T00:00:00'
    """
    return to_dates(days).astype("datetime64[s]")


def day_to_date(day: int) -> dt.date:
    """Convert one day number to its date.

    Parameters
    ----------
    day : int
        Days since 1970-01-01.

    Returns
    -------
    datetime.date
        The date ``day`` days after 1970-01-01.

    Examples
    --------
    >>> day_to_date(20094)
    datetime.date(2025, 1, 6)
    """
    return dt.date(1970, 1, 1) + dt.timedelta(days=int(day))


def _missing(value) -> bool:
    """Whether a scalar stands for no value (None, NaN, NaT, pandas's NA)."""
    if value is None or value is pd.NA or value is pd.NaT:
        return True
    if isinstance(value, (float, np.floating)):
        return math.isnan(value)
    if isinstance(value, np.datetime64):
        return bool(np.isnat(value))
    return False


def iso_date(value) -> str | None:
    """Write a date as ISO ``YYYY-MM-DD`` text, ``None`` when there is none.

    Parameters
    ----------
    value : date-like or None
        A ``datetime.date`` or ``datetime.datetime``, a ``pandas.Timestamp``, a
        ``numpy.datetime64``, ISO text (returned as it is) or a missing value.

    Returns
    -------
    str or None
        The ISO date (the date part of a date and time), or ``None`` for a missing value.

    Examples
    --------
    >>> iso_date(pd.Timestamp("2025-01-06 13:00")), iso_date(np.datetime64("NaT")), iso_date(None)
    ('2025-01-06', None, None)
    """
    if _missing(value):
        return None
    if isinstance(value, str):
        return value
    if isinstance(value, pd.Timestamp):
        return value.date().isoformat()
    if isinstance(value, dt.datetime):
        return value.date().isoformat()
    if isinstance(value, dt.date):
        return value.isoformat()
    return pd.Timestamp(value).date().isoformat()


def json_int(value) -> int | None:
    """Convert a whole number for JSON, ``None`` when missing.

    Parameters
    ----------
    value : int-like or None
        A Python or numpy number, or a missing value (None, NaN, NaT, NA).

    Returns
    -------
    int or None
        ``int(value)``, or ``None`` for a missing value.

    Examples
    --------
    >>> json_int(np.int64(3)), json_int(float("nan"))
    (3, None)
    """
    return None if _missing(value) else int(value)


# -- cells ----------------------------------------------------------------------------------
def json_cell(value: Any) -> Any:
    """Convert a value for ``json.dumps``.

    Parameters
    ----------
    value : Any
        A cell of a result table or a value of a result: numpy scalars become Python ones,
        dates ISO text, missing values (NaN, NaT, NA) ``None``; lists, tuples, arrays and
        dicts are converted item by item (dict keys become text); anything else is shown
        as its text.

    Returns
    -------
    Any
        ``None``, ``bool``, ``int``, ``float``, ``str``, a list or a dict of these.

    Examples
    --------
    >>> json_cell({"d": pd.Timestamp("2025-01-06"), "n": np.int32(2), "x": [np.float64("nan"), True]})
    {'d': '2025-01-06', 'n': 2, 'x': [None, True]}
    """
    if _missing(value):
        return None
    if isinstance(value, (str, bool)):
        return value
    if isinstance(value, np.bool_):
        return bool(value)
    if isinstance(value, (int, np.integer)):
        return int(value)
    if isinstance(value, (float, np.floating)):
        return float(value)
    if isinstance(value, (dt.date, pd.Timestamp, np.datetime64)):
        return iso_date(value)
    if isinstance(value, dict):
        return {str(k): json_cell(v) for k, v in value.items()}
    if isinstance(value, (list, tuple, np.ndarray)):
        return [json_cell(v) for v in value]
    return str(value)


def json_records(frame: pd.DataFrame) -> list[dict[str, Any]]:
    """Convert the rows of a result table to JSON-ready dicts, columns in order.

    Parameters
    ----------
    frame : pandas.DataFrame
        Any table (its index is left out).

    Returns
    -------
    list of dict
        One dict per row, each cell through :func:`json_cell`.

    Examples
    --------
    >>> json_records(pd.DataFrame({"day": pd.to_datetime(["2025-01-06", None]), "n": [1, 2]}))
    [{'day': '2025-01-06', 'n': 1}, {'day': None, 'n': 2}]
    """
    columns = [str(c) for c in frame.columns]
    return [dict(zip(columns, map(json_cell, row))) for row in frame.itertuples(index=False, name=None)]


def list_cells(frame: pd.DataFrame) -> pd.DataFrame:
    """Write every list of ids in a result table as one cell, for a CSV file.

    Each list becomes :func:`join_ids` of it, so that no cell shows Python's
    ``['A', 'B']``.

    Parameters
    ----------
    frame : pandas.DataFrame
        Any table.

    Returns
    -------
    pandas.DataFrame
        A copy where some column held lists; else ``frame`` itself.

    Examples
    --------
    >>> list_cells(pd.DataFrame({"events": [["E1", "E2"], []], "days": [3, 0]}))["events"].tolist()
    ['E1;E2', '']
    """
    listed = [
        c
        for c in frame.columns
        if frame[c].dtype == object and frame[c].map(lambda v: isinstance(v, (list, tuple, np.ndarray))).any()
    ]
    if not listed:
        return frame
    out = frame.copy()
    for column in listed:
        out[column] = [join_ids(v) if isinstance(v, (list, tuple, np.ndarray)) else v for v in out[column]]
    return out


def text_cell(value: Any) -> str:
    """Write a value as the text of a printed table's cell.

    Parameters
    ----------
    value : Any
        Missing values become blank, dates ISO text, ``True`` "yes" and ``False`` blank,
        whole floats lose their ``.0``, lists are joined with :data:`LIST_SEPARATOR`.

    Returns
    -------
    str
        The cell's text.

    Examples
    --------
    >>> [text_cell(v) for v in (None, pd.Timestamp("2025-01-06"), True, 3.0, 2.5, ["A", "B"])]
    ['', '2025-01-06', 'yes', '3', '2.5', 'A;B']
    """
    if isinstance(value, (list, tuple, np.ndarray)):
        return join_ids(text_cell(v) for v in value)
    if _missing(value):
        return ""
    if isinstance(value, (bool, np.bool_)):
        return "yes" if value else ""
    if isinstance(value, (float, np.floating)):
        return f"{float(value):g}" if float(value).is_integer() else str(float(value))
    if isinstance(value, (dt.date, pd.Timestamp, np.datetime64)):
        return iso_date(value) or ""
    return str(value)


# -- lists of ids ------------------------------------------------------------------------------
def split_ids(text) -> list[str]:
    """Split a ``;``-separated cell into its ids, in order, blanks dropped, each once.

    Parameters
    ----------
    text : str or None
        A cell such as ``"A1; A2"``; a missing value has no ids.

    Returns
    -------
    list of str
        The ids, stripped of surrounding spaces.

    Examples
    --------
    >>> split_ids(" A1; A2;;A1 "), split_ids(None)
    (['A1', 'A2'], [])
    """
    if _missing(text):
        return []
    ids: list[str] = []
    for part in str(text).split(";"):
        part = part.strip()
        if part and part not in ids:
            ids.append(part)
    return ids


def split_id_column(text: pd.Series) -> pd.Series:
    """Split a whole column of ``;``-separated cells at once, as the loader checks them.

    Unlike :func:`split_ids`, repeats are kept.

    Parameters
    ----------
    text : pandas.Series of str
        Cells of ``;``-separated ids.

    Returns
    -------
    pandas.Series of str
        One entry per id named in a cell, indexed by its row's label (repeats kept, blanks
        dropped).

    Examples
    --------
    >>> split_id_column(pd.Series(["A; B", "", "C;;C"])).tolist()
    ['A', 'B', 'C', 'C']
    """
    parts = text.str.split(LIST_SEPARATOR).explode().str.strip()
    return parts[parts.notna() & (parts != "")]


def join_ids(values: Iterable) -> str:
    """Join ids into one cell, :data:`LIST_SEPARATOR` between them.

    The inverse of :func:`split_ids` for ids without ``;``.

    Parameters
    ----------
    values : iterable
        The ids, in order.

    Returns
    -------
    str
        The cell (each id as its text).

    Examples
    --------
    >>> join_ids(["A1", "A2"])
    'A1;A2'
    >>> split_ids(join_ids(["A1", "A2"]))
    ['A1', 'A2']
    """
    return LIST_SEPARATOR.join(str(v) for v in values)


# -- JSON of whole columns --------------------------------------------------------------------
# A table of n rows and k columns becomes JSON through k whole-column conversions and one
# join, not n * k Python calls: each column is turned into its cells' JSON text at once
# (dates once per distinct day), and the rows are laid out as json.dumps(..., indent=...)
# lays them out, so that the text is the same to the byte.
def _distinct_texts(values, missing, blank, format_values) -> np.ndarray:
    """Per cell, the text ``format_values`` gives for its value, each distinct value
    formatted once (a table of the whole span where it is short, else of the distinct
    values); ``blank`` where ``missing``. One take from the table fills the column."""
    values = np.asarray(values, dtype=np.int64)
    given = ~missing
    if not given.any():
        return np.full(values.shape, blank, dtype=object)
    present = values[given]
    low, high = int(present.min()), int(present.max())
    if high - low <= 4 * present.size + 4096:  # every value of the span: no sort
        distinct, at = np.arange(low, high + 1, dtype=np.int64), values - low
    else:
        distinct, inverse = np.unique(present, return_inverse=True)
        at = np.zeros(values.shape, dtype=np.int64)
        at[given] = inverse
    table = np.empty(distinct.size + 1, dtype=object)
    table[:-1] = format_values(distinct).astype(object)
    table[-1] = blank
    return table[np.where(given, at, distinct.size)]


def _day_texts(days, quoted: bool) -> np.ndarray:
    """Per cell, the ISO date of a day number (quoted for JSON), ``None`` (``null``) for
    ``NO_DAY``; each distinct day formatted once, by numpy."""

    def dates(distinct):
        texts = np.datetime_as_string(distinct.astype("datetime64[D]"), unit="D")
        return np.char.add(np.char.add('"', texts), '"') if quoted else texts

    days = np.asarray(days, dtype=np.int64)
    return _distinct_texts(days, days == NO_DAY, "null" if quoted else None, dates)


def iso_dates(days) -> np.ndarray:
    """Write day numbers (days since 1970-01-01) as ISO dates, each distinct day formatted once.

    Parameters
    ----------
    days : array of int64
        Day numbers; the least int64 (``NO_DAY``) for no date.

    Returns
    -------
    numpy.ndarray of object
        ``YYYY-MM-DD`` text, ``None`` for :data:`NO_DAY`; the shape of ``days``.

    Examples
    --------
    >>> iso_dates([20089, -(2**63), 20089]).tolist()
    ['2025-01-01', None, '2025-01-01']
    """
    return _day_texts(days, quoted=False)


def json_date_cells(days) -> np.ndarray:
    """Write day numbers as the JSON text of date cells, each distinct day formatted once.

    See :func:`iso_dates`.

    Parameters
    ----------
    days : array of int64
        Day numbers, ``NO_DAY`` for no date.

    Returns
    -------
    numpy.ndarray of object (str)
        ``"2025-01-01"`` (quotes included) or ``null``, per cell.

    Examples
    --------
    >>> json_date_cells([20089, -(2**63)]).tolist()
    ['"2025-01-01"', 'null']
    """
    return _day_texts(days, quoted=True)


def json_text_cells(values) -> np.ndarray:
    """Write text cells as JSON text, escaped as :func:`json.dumps` escapes them.

    Parameters
    ----------
    values : sequence of str or None
        The cells; another value is written as its text.

    Returns
    -------
    numpy.ndarray of object (str)
        Per cell its JSON string (quoted, ``ensure_ascii`` escapes), ``null`` for ``None``.

    Examples
    --------
    >>> print(*json_text_cells(["A", "Café", None]))
    "A" "Caf\\u00e9" null
    """
    items = list(values)
    if all(type(v) is str for v in items):
        return np.fromiter(map(encode_basestring_ascii, items), dtype=object, count=len(items))
    return np.fromiter(
        ("null" if v is None else encode_basestring_ascii(str(v)) for v in items), dtype=object, count=len(items)
    )


def json_int_cells(values, missing=None) -> np.ndarray:
    """Write whole-number cells as JSON text, each distinct number formatted once.

    Parameters
    ----------
    values : array of int
        The numbers.
    missing : array of bool, optional
        ``True`` where the cell has no number (written ``null``); by default none.

    Returns
    -------
    numpy.ndarray of object (str)
        Per cell the number's text, or ``null``.

    Examples
    --------
    >>> json_int_cells([3, -1, 3], [False, False, True]).tolist()
    ['3', '-1', 'null']
    """
    values = np.asarray(values, dtype=np.int64)
    missing = np.zeros(values.shape, dtype=bool) if missing is None else np.asarray(missing, dtype=bool)
    return _distinct_texts(values, missing, "null", lambda distinct: distinct.astype(str))


def json_bool_cells(values) -> np.ndarray:
    """Write boolean cells as JSON text.

    Parameters
    ----------
    values : array of bool
        The flags.

    Returns
    -------
    numpy.ndarray of object (str)
        ``true`` or ``false``, per cell.

    Examples
    --------
    >>> json_bool_cells([True, False]).tolist()
    ['true', 'false']
    """
    return np.where(np.asarray(values, dtype=bool), "true", "false").astype(object)


def json_rows_text(columns: Mapping[str, np.ndarray], indent: int = 2, level: int = 1) -> str:
    """Write a list of records as :func:`json.dumps` with ``indent`` writes it, from whole columns.

    Parameters
    ----------
    columns : mapping of key to array of str
        Each record's keys in order, and per key the JSON text of every record's cell
        (:func:`json_text_cells`, :func:`json_int_cells`, :func:`json_date_cells`,
        :func:`json_bool_cells`). All of the same length.
    indent : int
        Spaces per level, as for :func:`json.dumps`.
    level : int
        The nesting level at which the list stands (1: a value of the top-level object).

    Returns
    -------
    str
        ``[`` ... ``]``, the same text as ``json.dumps`` gives for the list at that level.

    Examples
    --------
    >>> import json, numpy as np
    >>> text = json_rows_text({"id": json_text_cells(["A"]), "days": json_int_cells([3])}, level=0)
    >>> text == json.dumps([{"id": "A", "days": 3}], indent=2)
    True
    """
    keys = list(columns)
    count = len(columns[keys[0]]) if keys else 0
    if not count:
        return "[]"
    outer = "\n" + " " * (indent * (level + 1))
    inner = "\n" + " " * (indent * (level + 2))
    pieces = np.empty((count, 2 * len(keys) + 1), dtype=object)
    first = "{" + inner + json.dumps(keys[0]) + ": "
    pieces[:, 0] = "," + outer + first
    pieces[0, 0] = outer + first
    for number, key in enumerate(keys):
        if number:
            pieces[:, 2 * number] = "," + inner + json.dumps(key) + ": "
        pieces[:, 2 * number + 1] = columns[key]
    pieces[:, -1] = outer + "}"
    return "[" + "".join(pieces.ravel().tolist()) + "\n" + " " * (indent * level) + "]"
