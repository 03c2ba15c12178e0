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
import math
from typing import Any, Iterable

import numpy as np
import pandas as pd

__all__ = ["EPOCH", "NO_DAY", "to_days", "to_dates", "table_dates", "iso_dates", "day_to_date", "iso_date", "json_int",
           "json_cell", "json_records", "list_cells", "text_cell", "split_ids", "join_ids", "LIST_SEPARATOR"]

#: Day number 0.
EPOCH = np.datetime64("1970-01-01", "D")
#: "No date" in arrays of day numbers (the smallest ``int64``).
NO_DAY = np.iinfo(np.int64).min
#: How a list of ids is written in one cell of an output, as the case format writes it.
LIST_SEPARATOR = ";"


# -- day numbers and dates ----------------------------------------------------------------
def to_days(dates) -> np.ndarray:
    """Day numbers of dates.

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
    """``datetime64[D]`` dates of day numbers, ``NaT`` for :data:`NO_DAY`.

    Parameters
    ----------
    days : array-like of int
        Day numbers.

    Returns
    -------
    numpy.ndarray
        ``datetime64[D]``, one per day number.

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
    """Dates of day numbers for a column of a result table (``datetime64[s]``, pandas's
    own resolution for dates read from text), ``NaT`` for :data:`NO_DAY`.

    Parameters
    ----------
    days : array-like of int
        Day numbers.

    Returns
    -------
    numpy.ndarray
        ``datetime64[s]``.

    Examples
    --------
    >>> str(table_dates([20094])[0])
    '2025-01-06T00:00:00'
    """
    return to_dates(days).astype("datetime64[s]")


def iso_dates(days) -> np.ndarray:
    """ISO ``YYYY-MM-DD`` text of day numbers, blank for :data:`NO_DAY`.

    Parameters
    ----------
    days : array-like of int
        Day numbers.

    Returns
    -------
    numpy.ndarray
        ``object`` array of ``str``.

    Examples
    --------
    >>> iso_dates([20094, NO_DAY]).tolist()
    ['2025-01-06', '']
    """
    dates = to_dates(days)
    text = np.datetime_as_string(dates).astype(object)
    text[np.isnat(dates)] = ""
    return text


def day_to_date(day: int) -> dt.date:
    """The date of one day number.

    Parameters
    ----------
    day : int
        Days since 1970-01-01.

    Returns
    -------
    datetime.date

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
    """A date as ISO ``YYYY-MM-DD`` text, ``None`` when there is none.

    Parameters
    ----------
    value : date-like or None
        A ``datetime.date`` or ``datetime.datetime``, a ``pandas.Timestamp``, a
        ``numpy.datetime64``, ISO text (returned as it is) or a missing value.

    Returns
    -------
    str or None

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
    """A whole number for JSON, ``None`` when missing.

    Parameters
    ----------
    value : int-like or None

    Returns
    -------
    int or None

    Examples
    --------
    >>> json_int(np.int64(3)), json_int(float("nan"))
    (3, None)
    """
    return None if _missing(value) else int(value)


# -- cells ----------------------------------------------------------------------------------
def json_cell(value: Any) -> Any:
    """A value ready for ``json.dumps``.

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
    """The rows of a result table as JSON-ready dicts, columns in order.

    Parameters
    ----------
    frame : pandas.DataFrame

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
    """A result table for a CSV file: every cell that holds a list of ids written as one
    cell (:func:`join_ids`), so that no cell shows Python's ``['A', 'B']``.

    Parameters
    ----------
    frame : pandas.DataFrame

    Returns
    -------
    pandas.DataFrame
        A copy where some column held lists; else ``frame`` itself.

    Examples
    --------
    >>> list_cells(pd.DataFrame({"events": [["E1", "E2"], []], "days": [3, 0]}))["events"].tolist()
    ['E1;E2', '']
    """
    listed = [c for c in frame.columns if frame[c].dtype == object
              and frame[c].map(lambda v: isinstance(v, (list, tuple, np.ndarray))).any()]
    if not listed:
        return frame
    out = frame.copy()
    for column in listed:
        out[column] = [join_ids(v) if isinstance(v, (list, tuple, np.ndarray)) else v for v in out[column]]
    return out


def text_cell(value: Any) -> str:
    """A value as the text of a printed table's cell.

    Parameters
    ----------
    value : Any
        Missing values become blank, dates ISO text, ``True`` "yes" and ``False`` blank,
        whole floats lose their ``.0``, lists are joined with :data:`LIST_SEPARATOR`.

    Returns
    -------
    str

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
    """The ids of a ``;``-separated cell, in order, blanks dropped, each once.

    Parameters
    ----------
    text : str or None
        A cell such as ``"A1; A2"``; a missing value has no ids.

    Returns
    -------
    list of str

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


def join_ids(values: Iterable) -> str:
    """Ids written in one cell, :data:`LIST_SEPARATOR` between them (the inverse of
    :func:`split_ids` for ids without ``;``).

    Parameters
    ----------
    values : iterable
        The ids, in order.

    Returns
    -------
    str

    Examples
    --------
    >>> join_ids(["A1", "A2"])
    'A1;A2'
    >>> split_ids(join_ids(["A1", "A2"]))
    ['A1', 'A2']
    """
    return LIST_SEPARATOR.join(str(v) for v in values)
