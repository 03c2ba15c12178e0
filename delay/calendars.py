"""Work calendars as numpy arrays.

A work calendar says which dates are work days: working weekdays, less holidays, plus extra
working days. Time in the engine is counted in *work-day indices*: index ``k`` is the k-th work
day counted from the calendar's anchor date (index 0 is the first work day on or after the
anchor; earlier work days have negative indices). Indices stay the same when the covered
horizon grows, so arrays of indices computed earlier remain valid.

All conversions take and return whole numpy arrays:

- :meth:`WorkCalendar.start_index` — the first work day on or after a date (a start rolls
  forward);
- :meth:`WorkCalendar.finish_index` — the last work day on or before a date (a finish rolls
  back);
- :meth:`WorkCalendar.date_of` — the date of a work-day index;
- :meth:`WorkCalendar.count` — work days in ``[start, end)``, as ``numpy.busday_count``.

The horizon grows on demand (it doubles), never silently clips.

Dates are given as ``datetime64[D]`` arrays, ``datetime.date`` objects or ISO strings; inside,
a date is its day number since 1970-01-01 (``int64``).
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping, Sequence

import numpy as np

from .convert import to_dates, to_days
from .errors import DateBoundError
from .model import FIRST_DATE, LAST_DATE, WEEKDAYS

__all__ = ["WorkCalendar", "CalendarSet", "build_calendars", "parse_workdays", "HORIZON_FIRST_DAY", "HORIZON_LAST_DAY"]

#: The horizon grows no further than a year beyond the dates a case may hold: a look-up a
#: few days past them still works, and one further raises DateBoundError (day numbers).
HORIZON_FIRST_DAY = int(np.datetime64(FIRST_DATE, "D").astype(np.int64)) - 366
HORIZON_LAST_DAY = int(np.datetime64(LAST_DATE, "D").astype(np.int64)) + 366


def parse_workdays(text: str) -> tuple[bool, ...]:
    """Read a weekday list such as ``"Mon Tue Wed Thu Fri"`` as a mask, Monday first.

    Tokens are separated by spaces or commas and read in any letter case.

    Parameters
    ----------
    text : str
        The working weekdays, by their three-letter English names.

    Returns
    -------
    tuple of bool
        Seven flags, Monday to Sunday: which weekdays are worked.

    Raises
    ------
    ValueError
        Naming an unknown token.

    Examples
    --------
    >>> parse_workdays("Mon Tue Wed Thu Fri")
    (True, True, True, True, True, False, False)
    >>> parse_workdays("mon,sat")
    (True, False, False, False, False, True, False)
    """
    mask = [False] * 7
    for token in str(text).replace(",", " ").split():
        key = token.capitalize()
        if key not in WEEKDAYS:
            raise ValueError(f"unknown weekday '{token}' (use {' '.join(WEEKDAYS)})")
        mask[WEEKDAYS.index(key)] = True
    return tuple(mask)


def _widened(first: int, last: int, low: int, high: int) -> tuple[int, int]:
    """The horizon ``[first, last]`` widened until it covers ``[low, high]``, doubling the
    step each time (so growing on demand costs a constant number of rebuilds per doubling),
    never past the horizon's bounds; a day beyond them raises :class:`DateBoundError`."""
    if low < min(first, HORIZON_FIRST_DAY) or high > max(last, HORIZON_LAST_DAY):
        raise DateBoundError(earlier=low < min(first, HORIZON_FIRST_DAY))
    floor, ceiling = min(first, HORIZON_FIRST_DAY), max(last, HORIZON_LAST_DAY)
    span = last - first + 1
    while low < first:
        first = max(first - span, floor)
        span *= 2
    while high > last:
        last = min(last + span, ceiling)
        span *= 2
    return first, last


def _further(first: int, last: int, span: int, earlier: bool, later: bool) -> tuple[int, int]:
    """The horizon ``[first, last]`` grown by ``span`` days on the sides asked for, within
    the horizon's bounds; :class:`DateBoundError` when a side asked for is at its bound."""
    if (earlier and first <= HORIZON_FIRST_DAY) or (later and last >= HORIZON_LAST_DAY):
        raise DateBoundError(earlier=earlier and first <= HORIZON_FIRST_DAY)
    return (
        max(first - span, HORIZON_FIRST_DAY) if earlier else first,
        min(last + span, HORIZON_LAST_DAY) if later else last,
    )


class WorkCalendar:
    """One work calendar over a horizon that grows on demand.

    Parameters
    ----------
    name : str
        The calendar's name.
    weekmask : iterable of bool
        Seven booleans, Monday first: which weekdays are worked.
    holidays : iterable of date-like, optional
        Dates that are not worked although their weekday is.
    extra_workdays : iterable of date-like, optional
        Dates that are worked although their weekday is not.
    anchor : date-like, optional
        The date from which indices count (index 0 is the first work day on or after it);
        by default ``start``, else 2000-01-03.
    start : date-like, optional
        The first day of the initial horizon (inclusive); by default a year before the
        anchor. It grows by itself when needed.
    end : date-like, optional
        The last day of the initial horizon (inclusive); by default three years after the
        anchor.

    Raises
    ------
    ValueError
        When the weekmask does not have seven days, or the calendar has no work day at all.

    Examples
    --------
    >>> cal = WorkCalendar.from_weekdays("5d", "Mon Tue Wed Thu Fri", anchor="2025-01-06")
    >>> str(cal.date_of(cal.start_index(np.datetime64("2025-01-11")))[()])  # Saturday
    '2025-01-13'
    """

    def __init__(
        self,
        name: str,
        weekmask: Iterable[bool],
        holidays: Iterable = (),
        extra_workdays: Iterable = (),
        anchor=None,
        start=None,
        end=None,
    ):
        self.name = name
        self.weekmask = tuple(bool(x) for x in weekmask)
        if len(self.weekmask) != 7:
            raise ValueError("a weekmask has seven days, Monday first")
        holidays, extra_workdays = list(holidays), list(extra_workdays)
        self.holidays = np.unique(to_days(holidays)) if holidays else np.empty(0, np.int64)
        self.extra_workdays = np.unique(to_days(extra_workdays)) if extra_workdays else np.empty(0, np.int64)
        if not any(self.weekmask) and self.extra_workdays.size == 0:
            raise ValueError(f"calendar '{name}' has no work day")
        anchor_day = int(to_days(anchor if anchor is not None else (start or "2000-01-03")))
        self.anchor = anchor_day
        first = int(to_days(start)) if start is not None else anchor_day - 366
        last = int(to_days(end)) if end is not None else anchor_day + 3 * 366
        first = min(first, anchor_day)
        last = max(last, anchor_day)
        self._build(first, last)

    @classmethod
    def from_weekdays(
        cls, name, workdays="Mon Tue Wed Thu Fri", holidays=(), extra_workdays=(), start=None, end=None, anchor=None
    ) -> WorkCalendar:
        """Make a calendar from a weekday list such as ``"Mon Tue Wed Thu Fri"``.

        Parameters
        ----------
        name : str
            The calendar's name.
        workdays : str, default "Mon Tue Wed Thu Fri"
            The working weekdays (:func:`parse_workdays`).
        holidays : iterable of date-like, optional
            Dates that are not worked although their weekday is.
        extra_workdays : iterable of date-like, optional
            Dates that are worked although their weekday is not.
        start : date-like, optional
            The first day of the initial horizon, and the anchor when none is given.
        end : date-like, optional
            The last day of the initial horizon.
        anchor : date-like, optional
            The date from which indices count.

        Returns
        -------
        WorkCalendar
            The calendar.

        Raises
        ------
        ValueError
            For an unknown weekday, or a calendar with no work day.
        """
        return cls(
            name,
            parse_workdays(workdays),
            holidays,
            extra_workdays,
            anchor=anchor if anchor is not None else start,
            start=start,
            end=end,
        )

    # -- horizon -------------------------------------------------------------------------
    def _build(self, first: int, last: int) -> None:
        days = np.arange(first, last + 1, dtype=np.int64)
        weekday = (days + 3) % 7  # 1970-01-01 was a Thursday (weekday 3, Monday = 0)
        working = np.asarray(self.weekmask, dtype=bool)[weekday]
        if self.holidays.size:
            working[np.isin(days, self.holidays)] = False
        if self.extra_workdays.size:
            working[np.isin(days, self.extra_workdays)] = True
        self.first_day = first
        self.last_day = last
        self._working = working
        # _before[t] = work days in [first, first + t), t = 0 .. span
        self._before = np.concatenate(([0], np.cumsum(working, dtype=np.int64)))
        self._work_days = days[working]
        self._anchor_before = int(self._before[self.anchor - first])

    def _grow_days(self, low: int, high: int) -> None:
        if low >= self.first_day and high <= self.last_day:
            return
        self._build(*_widened(self.first_day, self.last_day, low, high))

    def _grow_indices(self, low: int, high: int) -> None:
        while True:
            lo_pos = low + self._anchor_before
            hi_pos = high + self._anchor_before
            if lo_pos >= 0 and hi_pos < self._work_days.size:
                return
            span = self.last_day - self.first_day + 1
            if lo_pos < 0 and not any(self.weekmask) and self.extra_workdays.size:
                raise ValueError(f"calendar '{self.name}' has no work day that early")
            if hi_pos >= self._work_days.size and not any(self.weekmask):
                raise ValueError(f"calendar '{self.name}' has no work day that late")
            self._grow_days(*_further(self.first_day, self.last_day, span, lo_pos < 0, hi_pos >= self._work_days.size))

    # -- conversions -----------------------------------------------------------------------
    def start_index_days(self, days: np.ndarray) -> np.ndarray:
        """Give the index of the first work day on or after each day number.

        Parameters
        ----------
        days : array_like of int
            Day numbers (days since 1970-01-01).

        Returns
        -------
        numpy.ndarray
            ``int64`` work-day indices, the shape of ``days``.

        Raises
        ------
        DateBoundError
            When a day lies more than a year beyond 1900-01-01 .. 2200-12-31, past what the
            horizon may grow to.

        Examples
        --------
        >>> cal = WorkCalendar.from_weekdays("5d", anchor="2025-01-06")
        >>> cal.start_index_days(to_days(["2025-01-06", "2025-01-11"])).tolist()  # Monday, Saturday
        [0, 5]
        """
        days = np.asarray(days, dtype=np.int64)
        if days.size:
            self._grow_days(int(days.min()) - 7, int(days.max()) + 7)
        return self._before[days - self.first_day] - self._anchor_before

    def finish_index_days(self, days: np.ndarray) -> np.ndarray:
        """Give the index of the last work day on or before each day number.

        Parameters
        ----------
        days : array_like of int
            Day numbers (days since 1970-01-01).

        Returns
        -------
        numpy.ndarray
            ``int64`` work-day indices, the shape of ``days``.

        Raises
        ------
        DateBoundError
            When a day lies more than a year beyond 1900-01-01 .. 2200-12-31, past what the
            horizon may grow to.

        Examples
        --------
        >>> cal = WorkCalendar.from_weekdays("5d", anchor="2025-01-06")
        >>> cal.finish_index_days(to_days(["2025-01-06", "2025-01-11"])).tolist()  # Monday, Saturday
        [0, 4]
        """
        days = np.asarray(days, dtype=np.int64)
        if days.size:
            self._grow_days(int(days.min()) - 7, int(days.max()) + 7)
        return self._before[days - self.first_day + 1] - self._anchor_before - 1

    def day_of(self, indices: np.ndarray) -> np.ndarray:
        """Give the day number of each work-day index.

        Parameters
        ----------
        indices : array_like of int
            Work-day indices of this calendar.

        Returns
        -------
        numpy.ndarray
            ``int64`` day numbers (days since 1970-01-01), the shape of ``indices``.

        Raises
        ------
        DateBoundError
            When an index lies beyond what the horizon may grow to.
        ValueError
            When the calendar has no work day that early or that late (one with extra work
            days only).
        """
        indices = np.asarray(indices, dtype=np.int64)
        if indices.size:
            self._grow_indices(int(indices.min()), int(indices.max()))
        return self._work_days[indices + self._anchor_before]

    def start_index(self, dates) -> np.ndarray:
        """Give the work-day index of the first work day on or after each date (a start rolls forward).

        Parameters
        ----------
        dates : date-like or array_like of date-like
            ``datetime64[D]`` values, ``datetime.date`` objects or ISO strings.

        Returns
        -------
        numpy.ndarray
            ``int32`` work-day indices.

        Raises
        ------
        DateBoundError
            When a day lies more than a year beyond 1900-01-01 .. 2200-12-31, past what the
            horizon may grow to.

        Examples
        --------
        >>> cal = WorkCalendar.from_weekdays("5d", anchor="2025-01-06")
        >>> cal.start_index(["2025-01-10", "2025-01-11"]).tolist()  # Friday, Saturday
        [4, 5]
        """
        return self.start_index_days(to_days(dates)).astype(np.int32)

    def finish_index(self, dates) -> np.ndarray:
        """Give the work-day index of the last work day on or before each date (a finish rolls back).

        Parameters
        ----------
        dates : date-like or array_like of date-like
            ``datetime64[D]`` values, ``datetime.date`` objects or ISO strings.

        Returns
        -------
        numpy.ndarray
            ``int32`` work-day indices.

        Raises
        ------
        DateBoundError
            When a day lies more than a year beyond 1900-01-01 .. 2200-12-31, past what the
            horizon may grow to.

        Examples
        --------
        >>> cal = WorkCalendar.from_weekdays("5d", anchor="2025-01-06")
        >>> cal.finish_index(["2025-01-10", "2025-01-11"]).tolist()  # Friday, Saturday
        [4, 4]
        """
        return self.finish_index_days(to_days(dates)).astype(np.int32)

    def date_of(self, indices) -> np.ndarray:
        """Give the date of each work-day index.

        Parameters
        ----------
        indices : array_like of int
            Work-day indices of this calendar.

        Returns
        -------
        numpy.ndarray
            ``datetime64[D]`` dates.

        Raises
        ------
        DateBoundError
            When an index lies beyond what the horizon may grow to.

        Examples
        --------
        >>> cal = WorkCalendar.from_weekdays("5d", anchor="2025-01-06", holidays=["2025-01-08"])
        >>> cal.date_of([0, 1, 2]).astype(str).tolist()  # Wednesday is a holiday
        ['2025-01-06', '2025-01-07', '2025-01-09']
        """
        return to_dates(self.day_of(indices))

    def count(self, start_dates, end_dates) -> np.ndarray:
        """Count the work days in ``[start, end)``: the difference of the two dates' start indices.

        For ``end < start`` the result is ``-count(end, start)``. (numpy's ``busday_count``
        counts ``(end, start]`` for reversed arguments since numpy 1.25, which can differ by
        one day; the difference of indices is what the engine's arithmetic needs.)

        Parameters
        ----------
        start_dates : date-like or array_like of date-like
            The first dates, included.
        end_dates : date-like or array_like of date-like
            The end dates, excluded (broadcast with ``start_dates``).

        Returns
        -------
        numpy.ndarray
            ``int32`` work-day counts.

        Raises
        ------
        DateBoundError
            When a date lies more than a year beyond 1900-01-01 .. 2200-12-31.

        Examples
        --------
        >>> cal = WorkCalendar.from_weekdays("5d", anchor="2025-01-06", holidays=["2025-01-08"])
        >>> cal.count(["2025-01-06"], ["2025-01-13"]).tolist(), cal.count(["2025-01-13"], ["2025-01-06"]).tolist()
        ([4], [-4])
        >>> int(np.busday_count("2025-01-06", "2025-01-13", holidays=["2025-01-08"]))  # numpy agrees
        4
        """
        return (self.start_index_days(to_days(end_dates)) - self.start_index_days(to_days(start_dates))).astype(
            np.int32
        )

    def is_workday(self, dates) -> np.ndarray:
        """Tell whether each date is a work day.

        Parameters
        ----------
        dates : date-like or array_like of date-like
            ``datetime64[D]`` values, ``datetime.date`` objects or ISO strings.

        Returns
        -------
        numpy.ndarray
            Boolean, one per date.

        Raises
        ------
        DateBoundError
            When a date lies more than a year beyond 1900-01-01 .. 2200-12-31.

        Examples
        --------
        >>> cal = WorkCalendar.from_weekdays("5d", anchor="2025-01-06", holidays=["2025-01-08"])
        >>> cal.is_workday(["2025-01-07", "2025-01-08", "2025-01-11"]).tolist()
        [True, False, False]
        """
        days = to_days(dates)
        if days.size:
            self._grow_days(int(np.min(days)), int(np.max(days)))
        return self._working[days - self.first_day]

    def __repr__(self) -> str:
        names = " ".join(d for d, on in zip(WEEKDAYS, self.weekmask) if on)
        return f"WorkCalendar({self.name!r}, {names!r}, holidays={self.holidays.size})"


class CalendarSet:
    """Several calendars over one shared horizon, with vectorised lookups by calendar number.

    ``names`` gives each calendar's number (its position). Every lookup takes an array of
    calendar numbers beside the array of day numbers or indices (broadcast together), so one
    call converts a whole array whose elements sit on different calendars. The tables are
    flat: calendar ``c``'s entries follow calendar ``c - 1``'s. Building the set widens every
    calendar to the horizon they cover together.

    Parameters
    ----------
    calendars : Mapping of str to WorkCalendar
        The calendars by name; their order gives their numbers.
    held : Mapping of int to tuple of (int, tuple of int), optional
        For calendars derived by holding work (:meth:`with_held_days`): calendar number to
        ``(base calendar number, held day numbers)``.

    Raises
    ------
    ValueError
        When ``calendars`` is empty.

    Examples
    --------
    >>> five = WorkCalendar.from_weekdays("5d", anchor="2025-01-06")
    >>> seven = WorkCalendar.from_weekdays("7d", "Mon Tue Wed Thu Fri Sat Sun", anchor="2025-01-06")
    >>> calendars = CalendarSet({"5d": five, "7d": seven})
    >>> calendars.number, len(calendars)
    ({'5d': 0, '7d': 1}, 2)
    >>> calendars.start_index_days([0, 1], to_days(["2025-01-11", "2025-01-11"])).tolist()  # a Saturday
    [5, 5]
    >>> calendars.finish_index_days([0, 1], to_days(["2025-01-11", "2025-01-11"])).tolist()
    [4, 5]
    """

    def __init__(
        self, calendars: Mapping[str, WorkCalendar], held: Mapping[int, tuple[int, tuple[int, ...]]] | None = None
    ):
        self.names = tuple(calendars)
        self.calendars = tuple(calendars[n] for n in self.names)
        self.number = {name: i for i, name in enumerate(self.names)}
        if not self.calendars:
            raise ValueError("a calendar set needs at least one calendar")
        #: Calendars derived by holding work (see :meth:`with_held_days`): number to
        #: ``(base calendar number, held day numbers)``.
        self.held = dict(held or {})
        self._derived: dict[tuple, CalendarSet] = {}
        first = min(c.first_day for c in self.calendars)
        last = max(c.last_day for c in self.calendars)
        self._cover(first, last)

    def __getitem__(self, name: str) -> WorkCalendar:
        return self.calendars[self.number[name]]

    def __len__(self) -> int:
        return len(self.calendars)

    def _cover(self, first: int, last: int) -> None:
        for calendar in self.calendars:
            if calendar.first_day != first or calendar.last_day != last:
                calendar._build(min(first, calendar.first_day), max(last, calendar.last_day))
        self.first_day = first
        self.last_day = last
        self._stride = last - first + 2
        self._before = np.concatenate([c._before for c in self.calendars])
        counts = np.array([c._work_days.size for c in self.calendars], dtype=np.int64)
        self._work_count = counts
        self._work_offset = np.concatenate(([0], np.cumsum(counts)[:-1]))
        self._work_days = np.concatenate([c._work_days for c in self.calendars])
        self._anchor_before = np.array([c._anchor_before for c in self.calendars], dtype=np.int64)
        self._table = None

    def _grow(self, low_day: int, high_day: int) -> None:
        self._cover(*_widened(self.first_day, self.last_day, low_day, high_day))

    def grow(self, earlier: bool) -> None:
        """Widen the horizon on one side by three times its span.

        The compiled passes ask for it when a look-up falls outside the tables; the lookup
        tables (:meth:`table`) are built again.

        Parameters
        ----------
        earlier : bool
            ``True`` to widen it backwards, ``False`` forwards.

        Raises
        ------
        DateBoundError
            When the horizon is already at its bound on that side (a year beyond
            1900-01-01 or 2200-12-31).
        """
        span = 3 * (self.last_day - self.first_day + 1)
        self._cover(*_further(self.first_day, self.last_day, span, earlier, not earlier))

    def table(self) -> np.ndarray:
        """Give the lookup tables as the compiled passes take them, in one ``int64`` array.

        One array, because a kernel handed several arrays pays reference counting on each
        look-up. Layout: ``[count, stride, first_day]``, then per calendar
        ``[anchor_before, before_at, work_at, work_count]``, then every calendar's
        ``before`` table (``stride`` entries each), then every calendar's work days. See
        :mod:`delay._kernels` for the look-ups.

        Returns
        -------
        numpy.ndarray
            The packed table, read-only; built once and again after the horizon grows.
        """
        if self._table is None:
            count = len(self.calendars)
            head = 3 + 4 * count
            before_at = head + self._stride * np.arange(count, dtype=np.int64)
            work_at = head + self._before.size + self._work_offset
            rows = np.stack([self._anchor_before, before_at, work_at, self._work_count], axis=1)
            self._table = np.concatenate(
                [
                    np.array([count, self._stride, self.first_day], dtype=np.int64),
                    rows.ravel(),
                    self._before.astype(np.int64),
                    self._work_days.astype(np.int64),
                ]
            )
            self._table.flags.writeable = False
        return self._table

    def base_of(self, number: int) -> tuple[int, tuple[int, ...]]:
        """Give the calendar a calendar was derived from, and the days held on it.

        Parameters
        ----------
        number : int
            A calendar number of this set.

        Returns
        -------
        tuple of (int, tuple of int)
            ``(base calendar number, held day numbers)``: the calendar itself and no held
            days unless it was derived by :meth:`with_held_days`.
        """
        return self.held.get(int(number), (int(number), ()))

    def with_held_days(self, requests: Sequence[tuple[int, Iterable[int]]]) -> tuple[CalendarSet, list[int]]:
        """A set with a derived calendar for each request: calendar ``c`` less the held days.

        A hold stops an activity's work for a period whatever its calendar says (a
        suspension, a stop by a third party): its work days in that period become
        non-working for that activity alone. Each request names a calendar of this set and
        the day numbers to hold; a request on a calendar that is itself derived holds its
        base calendar's days together with the days held already. Indices of the derived
        calendar count from the same anchor as its base.

        Parameters
        ----------
        requests : sequence of tuple of (int, iterable of int)
            ``(calendar number, day numbers to take out of it)`` pairs, one per activity
            held.

        Returns
        -------
        (CalendarSet, list of int)
            The set (this one when nothing new is held; sets are cached, so the same
            requests give the same set) and, per request, the number of the calendar to use
            instead. Every calendar of this set keeps its number in the new one.

        Examples
        --------
        >>> week = WorkCalendar.from_weekdays("5d", anchor="2025-01-06")
        >>> held, numbers = CalendarSet({"5d": week}).with_held_days(
        ...     [(0, to_days(["2025-01-08", "2025-01-09"]))])
        >>> str(held.calendars[numbers[0]].date_of(2)[()])  # the third work day from Monday
        '2025-01-10'
        """
        specs = []
        for number, days in requests:
            base, before = self.base_of(number)
            specs.append((base, tuple(sorted(set(before) | {int(d) for d in days}))))
        wanted = sorted({spec for spec in specs if spec[1]} - {(b, d) for b, d in self.held.values()})
        if not wanted:
            known = {value: number for number, value in self.held.items()}
            return self, [known.get(spec, spec[0]) if spec[1] else spec[0] for spec in specs]
        key = tuple(wanted)
        found = self._derived.get(key)
        if found is None:
            calendars = dict(zip(self.names, self.calendars))
            held = dict(self.held)
            for base, days in wanted:
                calendar = self.calendars[base]
                name = f"{calendar.name} held {_ranges(days)}"
                held_days = np.asarray(days, dtype=np.int64)
                calendars[name] = WorkCalendar(
                    name,
                    calendar.weekmask,
                    holidays=np.union1d(calendar.holidays, held_days),
                    extra_workdays=np.setdiff1d(calendar.extra_workdays, held_days),
                    anchor=calendar.anchor,
                    start=min(calendar.first_day, int(held_days.min())),
                    end=max(calendar.last_day, int(held_days.max())),
                )
                held[len(calendars) - 1] = (base, days)
            found = self._derived[key] = CalendarSet(calendars, held)
        known = {value: number for number, value in found.held.items()}
        return found, [known.get(spec, spec[0]) if spec[1] else spec[0] for spec in specs]

    def start_index_days(self, which, days) -> np.ndarray:
        """Give, per element, the index of the first work day on or after the day, on calendar ``which``.

        Parameters
        ----------
        which : array_like of int
            Calendar numbers.
        days : array_like of int
            Day numbers (days since 1970-01-01), broadcast with ``which``.

        Returns
        -------
        numpy.ndarray
            ``int64`` work-day indices, each on its own calendar.

        Raises
        ------
        DateBoundError
            When a day lies more than a year beyond 1900-01-01 .. 2200-12-31, past what the
            horizon may grow to.
        """
        days = np.asarray(days, dtype=np.int64)
        if days.size and (days.min() < self.first_day + 7 or days.max() > self.last_day - 7):
            self._grow(int(days.min()) - 7, int(days.max()) + 7)
        which = np.asarray(which, dtype=np.int64)
        return self._before[which * self._stride + (days - self.first_day)] - self._anchor_before[which]

    def finish_index_days(self, which, days) -> np.ndarray:
        """Give, per element, the index of the last work day on or before the day, on calendar ``which``.

        Parameters
        ----------
        which : array_like of int
            Calendar numbers.
        days : array_like of int
            Day numbers (days since 1970-01-01), broadcast with ``which``.

        Returns
        -------
        numpy.ndarray
            ``int64`` work-day indices, each on its own calendar.

        Raises
        ------
        DateBoundError
            When a day lies more than a year beyond 1900-01-01 .. 2200-12-31, past what the
            horizon may grow to.
        """
        return self.start_index_days(which, np.asarray(days, dtype=np.int64) + 1) - 1

    def day_of(self, which, indices) -> np.ndarray:
        """Give, per element, the day number of a work-day index on calendar ``which``.

        Parameters
        ----------
        which : array_like of int
            Calendar numbers.
        indices : array_like of int
            Work-day indices, broadcast with ``which``.

        Returns
        -------
        numpy.ndarray
            ``int64`` day numbers (days since 1970-01-01).

        Raises
        ------
        DateBoundError
            When an index lies beyond what the horizon may grow to.
        ValueError
            When an index lies beyond every calendar's work days after the horizon has
            grown 64 times.

        Examples
        --------
        >>> five = WorkCalendar.from_weekdays("5d", anchor="2025-01-06")
        >>> seven = WorkCalendar.from_weekdays("7d", "Mon Tue Wed Thu Fri Sat Sun", anchor="2025-01-06")
        >>> days = CalendarSet({"5d": five, "7d": seven}).day_of([0, 1], [5, 5])
        >>> to_dates(days).astype(str).tolist()  # the sixth work day from Monday 2025-01-06
        ['2025-01-13', '2025-01-11']
        """
        which = np.asarray(which, dtype=np.int64)
        indices = np.asarray(indices, dtype=np.int64)
        for _ in range(64):
            position = indices + self._anchor_before[which]
            if not position.size:
                break
            too_early = position < 0
            too_late = position >= self._work_count[which]
            if not (too_early.any() or too_late.any()):
                break
            span = self.last_day - self.first_day + 1
            self._cover(*_further(self.first_day, self.last_day, span, bool(too_early.any()), bool(too_late.any())))
        else:
            raise ValueError("a work-day index lies beyond every calendar's work days")
        return self._work_days[self._work_offset[which] + position]


def _ranges(days: tuple[int, ...]) -> str:
    """Held day numbers in words: ``2025-01-08..2025-01-09, 2025-02-03``."""
    parts, start = [], None
    for position, day in enumerate(days):
        if start is None:
            start = day
        if position + 1 == len(days) or days[position + 1] != day + 1:
            first, last = (str(np.datetime64(int(d), "D")) for d in (start, day))
            parts.append(first if start == day else f"{first}..{last}")
            start = None
    return ", ".join(parts)


def build_calendars(case, anchor=None) -> dict[str, WorkCalendar]:
    """Build every calendar of a case, with its exceptions.

    A row of calendar_exceptions.csv with ``working`` false is a holiday of its calendar,
    one with ``working`` true an extra work day.

    Parameters
    ----------
    case : Case
        A :class:`delay.model.Case`.
    anchor : date-like, optional
        Index anchor date; default the contract start.

    Returns
    -------
    dict of str to WorkCalendar
        Calendar name to :class:`WorkCalendar`, in calendars.csv order.

    Raises
    ------
    ValueError
        For a calendar with no work day (the case loader has refused one already).

    Examples
    --------
    >>> calendars = build_calendars(demo)
    >>> list(calendars)
    ['site5', 'cure7']
    >>> calendars["site5"]
    WorkCalendar('site5', 'Mon Tue Wed Thu Fri', holidays=41)
    """
    anchor = anchor if anchor is not None else case.settings.project.contract_start
    calendars = case.calendars
    exceptions = case.calendar_exceptions
    result: dict[str, WorkCalendar] = {}
    for name, workdays in zip(calendars["calendar"], calendars["workdays"]):
        own = exceptions[exceptions["calendar"] == name]
        working = own["working"].to_numpy(dtype=bool)
        dates = own["date"].to_numpy()
        result[name] = WorkCalendar(
            name,
            parse_workdays(workdays),
            holidays=list(dates[~working]),
            extra_workdays=list(dates[working]),
            anchor=anchor,
        )
    return result
