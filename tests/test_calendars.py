"""Acceptance tests of delay.calendars against numpy's business-day functions.

Reference: numpy ``busday_offset``, ``busday_count``, ``is_busday`` and ``busdaycalendar``
(weekmask + holidays). numpy cannot add extra working days to a weekmask, so a calendar
with extra working days is rebuilt for numpy as a seven-day weekmask whose holidays are
every non-working day of a wide window (``reference_calendar``); every date and offset the
tests draw stays well inside that window.

Work-day indices are relative to the calendar's own origin, so only differences and round
trips of indices are checked, never their values.
"""

from __future__ import annotations

import datetime as dt

import numpy as np
from casewriter import write_case
from hypothesis import given, settings
from hypothesis import strategies as st

from delay.calendars import WorkCalendar, build_calendars

WEEKDAY_NAMES = ("Mon", "Tue", "Wed", "Thu", "Fri", "Sat", "Sun")

#: The reference window: all dates and offsets drawn below stay inside it (see strategies).
WINDOW_START = np.datetime64("1890-01-01")
WINDOW_END = np.datetime64("2160-01-01")

#: Dates queried: 1950 .. 2100, i.e. decades either side of the initial 2025 horizon.
QUERY_FIRST = np.datetime64("1950-01-01").astype(int)
QUERY_LAST = np.datetime64("2100-12-31").astype(int)

#: Offsets in work days. With one work day a week, 1500 work days are about 29 years,
#: so 1950 - 29 y and 2100 + 29 y stay inside the window.
MAX_OFFSET = 1500

INITIAL_HORIZON = (dt.date(2025, 1, 1), dt.date(2025, 12, 31))


def reference_calendar(workdays: str, holidays=(), extra_workdays=()) -> np.busdaycalendar:
    """numpy's view of the calendar, extra working days included.

    Without extra working days: numpy's weekmask + holidays directly. With them: a weekmask
    of all seven days whose holidays are every day of the window that is not working
    (not in the weekmask and not an extra day, or a holiday).
    """
    holidays = np.array(holidays, dtype="datetime64[D]")
    extra = np.array(extra_workdays, dtype="datetime64[D]")
    if extra.size == 0:
        return np.busdaycalendar(weekmask=workdays, holidays=holidays)
    days = np.arange(WINDOW_START, WINDOW_END, dtype="datetime64[D]")
    by_weekmask = np.is_busday(days, weekmask=workdays, holidays=holidays)
    working = by_weekmask | (np.isin(days, extra) & ~np.isin(days, holidays))
    return np.busdaycalendar(weekmask="1111111", holidays=days[~working])


def make_calendar(workdays, holidays=(), extra_workdays=()):
    return WorkCalendar.from_weekdays(
        "test",
        workdays=workdays,
        holidays=tuple(holidays),
        extra_workdays=tuple(extra_workdays),
        start=INITIAL_HORIZON[0],
        end=INITIAL_HORIZON[1],
    )


# ---------------------------------------------------------------------------------------
# strategies


@st.composite
def weekday_sets(draw):
    """A non-empty set of weekdays, written in a random order (the order must not matter)."""
    chosen = draw(st.lists(st.sampled_from(WEEKDAY_NAMES), min_size=1, max_size=7, unique=True))
    return " ".join(chosen)


#: Fixed weekmasks named in the brief: five-day, seven-day and odd ones.
NAMED_WEEKMASKS = [
    "Mon Tue Wed Thu Fri",
    "Mon Tue Wed Thu Fri Sat Sun",
    "Mon Wed Fri",
    "Sun Mon Tue Wed Thu",
    "Sat",
]

weekmasks = st.one_of(st.sampled_from(NAMED_WEEKMASKS), weekday_sets())

#: Exception dates cluster in 2024-2026 (around the initial horizon) and a few far away.
near_dates = st.dates(dt.date(2024, 1, 1), dt.date(2026, 12, 31))
far_dates = st.dates(dt.date(1950, 1, 1), dt.date(2100, 12, 31))
exception_dates = st.one_of(near_dates, near_dates, far_dates)


@st.composite
def calendars(draw, with_extra=True):
    workdays = draw(weekmasks)
    holidays = draw(st.lists(exception_dates, max_size=25, unique=True))
    extra = []
    if with_extra:
        extra = draw(st.lists(exception_dates, max_size=25, unique=True))
        extra = [d for d in extra if d not in set(holidays)]  # a date is one or the other
    return workdays, holidays, extra


def date_arrays(min_size=1, max_size=40):
    days = st.integers(int(QUERY_FIRST), int(QUERY_LAST))
    near = st.integers(int(np.datetime64("2024-06-01").astype(int)), int(np.datetime64("2026-06-30").astype(int)))
    return st.lists(st.one_of(days, near), min_size=min_size, max_size=max_size).map(
        lambda values: np.array(values, dtype="int64").astype("datetime64[D]")
    )


PROPERTY_SETTINGS = settings(max_examples=60, deadline=None)


# ---------------------------------------------------------------------------------------
# conversions against numpy


@PROPERTY_SETTINGS
@given(calendars(), date_arrays())
def test_start_index_rolls_forward_like_numpy(calendar_spec, dates):
    workdays, holidays, extra = calendar_spec
    calendar = make_calendar(workdays, holidays, extra)
    reference = reference_calendar(workdays, holidays, extra)
    indices = calendar.start_index(dates)
    # Reference: numpy busday_offset(d, 0, roll="forward") is the first work day on or after d.
    expected = np.busday_offset(dates, 0, roll="forward", busdaycal=reference)
    np.testing.assert_array_equal(calendar.date_of(indices), expected)


@PROPERTY_SETTINGS
@given(calendars(), date_arrays())
def test_finish_index_rolls_backward_like_numpy(calendar_spec, dates):
    workdays, holidays, extra = calendar_spec
    calendar = make_calendar(workdays, holidays, extra)
    reference = reference_calendar(workdays, holidays, extra)
    indices = calendar.finish_index(dates)
    # Reference: numpy busday_offset(d, 0, roll="backward") is the last work day on or before d.
    expected = np.busday_offset(dates, 0, roll="backward", busdaycal=reference)
    np.testing.assert_array_equal(calendar.date_of(indices), expected)
    # The last work day on or before d is the one just before the first on or after d + 1
    # (follows from the two numpy rolls above).
    following = calendar.start_index(dates + np.timedelta64(1, "D"))
    np.testing.assert_array_equal(indices + 1, following)


@PROPERTY_SETTINGS
@given(calendars(), date_arrays(), st.data())
def test_offset_round_trip_matches_busday_offset(calendar_spec, dates, data):
    workdays, holidays, extra = calendar_spec
    calendar = make_calendar(workdays, holidays, extra)
    reference = reference_calendar(workdays, holidays, extra)
    offsets = np.array(
        data.draw(st.lists(st.integers(-MAX_OFFSET, MAX_OFFSET), min_size=dates.size, max_size=dates.size)),
        dtype="int64",
    )
    # Reference: numpy busday_offset(d, n, roll="forward").
    expected = np.busday_offset(dates, offsets, roll="forward", busdaycal=reference)
    got = calendar.date_of(calendar.start_index(dates) + offsets)
    np.testing.assert_array_equal(got, expected)


@PROPERTY_SETTINGS
@given(calendars(), date_arrays(), date_arrays())
def test_count_matches_busday_count(calendar_spec, starts, ends):
    workdays, holidays, extra = calendar_spec
    size = min(starts.size, ends.size)
    # Order each pair so that start <= end: numpy busday_count counts the work days in
    # [start, end) there, in every numpy version.
    starts, ends = np.minimum(starts[:size], ends[:size]), np.maximum(starts[:size], ends[:size])
    calendar = make_calendar(workdays, holidays, extra)
    reference = reference_calendar(workdays, holidays, extra)
    # Reference: numpy busday_count.
    expected = np.busday_count(starts, ends, busdaycal=reference)
    np.testing.assert_array_equal(calendar.count(starts, ends), expected)
    # Negative when end < start: the same half-open interval counted negative, so that
    # count(a, b) = -count(b, a) and counts add up like index differences. (numpy >= 1.25
    # counts (end, start] instead for reversed arguments, numpy gh-23197, so numpy's own
    # reversed call is not the reference here; the API contract reads "work days in
    # [start, end), negative when end < start".)
    np.testing.assert_array_equal(calendar.count(ends, starts), -expected)
    # Index differences count the same work days: the days skipped by rolling each date
    # forward are non-working, so [start, end) and [roll(start), roll(end)) hold the same
    # work days (consequence of the numpy definitions above).
    np.testing.assert_array_equal(calendar.start_index(ends).astype(np.int64) - calendar.start_index(starts), expected)


@PROPERTY_SETTINGS
@given(calendars(), date_arrays())
def test_is_workday_matches_is_busday(calendar_spec, dates):
    workdays, holidays, extra = calendar_spec
    calendar = make_calendar(workdays, holidays, extra)
    reference = reference_calendar(workdays, holidays, extra)
    # Reference: numpy is_busday.
    expected = np.is_busday(dates, busdaycal=reference)
    np.testing.assert_array_equal(calendar.is_workday(dates), expected)


@PROPERTY_SETTINGS
@given(calendars(with_extra=False), st.data())
def test_date_of_is_inverse_of_start_index_on_work_days(calendar_spec, data):
    workdays, holidays, _ = calendar_spec
    calendar = make_calendar(workdays, holidays)
    # Reference: numpy busday_offset from a fixed anchor gives a run of consecutive work days.
    anchor = np.datetime64(data.draw(far_dates))
    steps = np.array(data.draw(st.lists(st.integers(-MAX_OFFSET, MAX_OFFSET), min_size=1, max_size=30)), dtype="int64")
    work_days = np.busday_offset(
        anchor, steps, roll="forward", weekmask=workdays, holidays=np.array(holidays, dtype="datetime64[D]")
    )
    indices = calendar.start_index(work_days)
    np.testing.assert_array_equal(calendar.date_of(indices), work_days)
    # On a work day, rolling backward and forward give the same day (numpy: both rolls of a
    # business day return it unchanged).
    np.testing.assert_array_equal(calendar.finish_index(work_days), indices)
    # Index differences are the offsets' differences (busday_offset counts work days).
    np.testing.assert_array_equal(indices.astype(np.int64) - indices[0], steps - steps[0])


def test_result_types_follow_the_api_contract():
    # API contract: work-day indices are int32 arrays, is_workday a bool array, date_of
    # datetime64[D]; the shape follows the input.
    calendar = make_calendar("Mon Tue Wed Thu Fri")
    dates = np.array([["2025-01-06", "2025-01-11"], ["1960-02-29", "2090-07-04"]], dtype="datetime64[D]")
    assert calendar.start_index(dates).dtype == np.int32
    assert calendar.finish_index(dates).dtype == np.int32
    assert calendar.is_workday(dates).dtype == np.bool_
    assert calendar.date_of(calendar.start_index(dates)).dtype == np.dtype("datetime64[D]")
    assert calendar.start_index(dates).shape == (2, 2)


# ---------------------------------------------------------------------------------------
# fixed examples (worked by hand from a 2025 wall calendar; 2025-01-06 is a Monday)


def test_five_day_week_with_holiday_and_extra_working_day_by_hand():
    calendar = WorkCalendar.from_weekdays(
        "5d",
        workdays="Mon Tue Wed Thu Fri",
        holidays=(dt.date(2025, 1, 15),),  # a Wednesday
        extra_workdays=(dt.date(2025, 1, 18),),  # a Saturday
    )
    days = np.arange(np.datetime64("2025-01-13"), np.datetime64("2025-01-21"))
    # By hand: Mon 13 yes, Tue 14 yes, Wed 15 holiday, Thu 16 yes, Fri 17 yes, Sat 18 extra
    # working day, Sun 19 no, Mon 20 yes.
    np.testing.assert_array_equal(calendar.is_workday(days), [True, True, False, True, True, True, False, True])
    # By hand: work days in [Mon 13, Mon 20) = 13, 14, 16, 17, 18 = 5.
    assert int(calendar.count(days[:1], days[-1:])[0]) == 5
    # By hand: the first work day on or after Wed 15 is Thu 16; on or after Sun 19 is Mon 20.
    np.testing.assert_array_equal(
        calendar.date_of(calendar.start_index(np.array(["2025-01-15", "2025-01-19"], dtype="datetime64[D]"))),
        np.array(["2025-01-16", "2025-01-20"], dtype="datetime64[D]"),
    )
    # By hand: the last work day on or before Wed 15 is Tue 14; on or before Sun 19 is Sat 18.
    np.testing.assert_array_equal(
        calendar.date_of(calendar.finish_index(np.array(["2025-01-15", "2025-01-19"], dtype="datetime64[D]"))),
        np.array(["2025-01-14", "2025-01-18"], dtype="datetime64[D]"),
    )
    # By hand: count is negative when the end comes first: [Mon 20, Mon 13) -> -5.
    assert int(calendar.count(days[-1:], days[:1])[0]) == -5


def test_exception_dates_accept_numpy_arrays():
    holidays = np.array(["2025-01-15", "2025-12-25"], dtype="datetime64[D]")
    extra = np.array(["2025-01-18"], dtype="datetime64[D]")
    calendar = WorkCalendar.from_weekdays("5d", holidays=holidays, extra_workdays=extra)
    reference = reference_calendar("Mon Tue Wed Thu Fri", holidays, extra)
    days = np.arange(np.datetime64("2024-12-01"), np.datetime64("2026-02-01"))
    # Reference: numpy is_busday on the rebuilt calendar.
    np.testing.assert_array_equal(calendar.is_workday(days), np.is_busday(days, busdaycal=reference))


def test_horizon_grows_decades_either_way_without_clipping():
    calendar = make_calendar("Mon Tue Wed Thu Fri", holidays=[dt.date(2025, 5, 1)])
    reference = reference_calendar("Mon Tue Wed Thu Fri", [dt.date(2025, 5, 1)])
    # A date 70 years before and 75 after the initial 2025 horizon, queried in separate calls
    # (each call may grow the horizon): the results must agree with numpy.
    early = np.array(["1955-03-12"], dtype="datetime64[D]")  # a Saturday
    late = np.array(["2100-02-26"], dtype="datetime64[D]")  # a Friday
    inside = np.array(["2025-05-01"], dtype="datetime64[D]")  # the holiday
    for dates in (inside, early, late, inside):
        np.testing.assert_array_equal(
            calendar.date_of(calendar.start_index(dates)),
            np.busday_offset(dates, 0, roll="forward", busdaycal=reference),
        )
    # Work days from 1955 to 2100 counted by the calendar and by numpy busday_count.
    np.testing.assert_array_equal(calendar.count(early, late), np.busday_count(early, late, busdaycal=reference))
    # An index taken before growth keeps meaning the same day after growth (round trip).
    index_2025 = calendar.start_index(inside)
    calendar.start_index(np.array(["1900-01-01", "2150-01-01"], dtype="datetime64[D]"))
    np.testing.assert_array_equal(
        calendar.date_of(index_2025), np.array(["2025-05-02"], dtype="datetime64[D]")
    )  # by hand: Thu 1 May 2025 is the holiday, so the next work day is Fri 2 May


# ---------------------------------------------------------------------------------------
# build_calendars from a case


def test_build_calendars_applies_exceptions_to_their_own_calendar(tmp_path):
    from delay.case import load_case  # the loader is a separate module; only this test needs it

    root = write_case(
        tmp_path / "case",
        activities=[{"id": "A", "name": "Set out", "duration": 1}],
        calendars=[
            {"calendar": "5d", "workdays": "Mon Tue Wed Thu Fri"},
            {"calendar": "7d", "workdays": "Mon Tue Wed Thu Fri Sat Sun"},
            {"calendar": "alternate", "workdays": "Mon Wed Fri"},
        ],
        exceptions=[
            {"calendar": "5d", "date": "2025-01-15", "working": "no", "reason": "holiday"},
            {"calendar": "5d", "date": "2025-01-18", "working": "yes", "reason": "weekend shift"},
            {"calendar": "7d", "date": "2025-12-25", "working": "no", "reason": "holiday"},
            {"calendar": "alternate", "date": "2025-01-07", "working": "yes", "reason": "catch-up"},
            {"calendar": "alternate", "date": "2025-01-10", "working": "no", "reason": "holiday"},
        ],
    )
    calendars = build_calendars(load_case(root))
    assert set(calendars) == {"5d", "7d", "alternate"}
    # Reference: numpy business-day functions on the same weekmask and exceptions.
    references = {
        "5d": reference_calendar("Mon Tue Wed Thu Fri", ["2025-01-15"], ["2025-01-18"]),
        "7d": reference_calendar("Mon Tue Wed Thu Fri Sat Sun", ["2025-12-25"]),
        "alternate": reference_calendar("Mon Wed Fri", ["2025-01-10"], ["2025-01-07"]),
    }
    days = np.arange(np.datetime64("2024-12-01"), np.datetime64("2026-02-01"))
    for name, reference in references.items():
        calendar = calendars[name]
        np.testing.assert_array_equal(calendar.is_workday(days), np.is_busday(days, busdaycal=reference), err_msg=name)
        np.testing.assert_array_equal(
            calendar.date_of(calendar.start_index(days)),
            np.busday_offset(days, 0, roll="forward", busdaycal=reference),
            err_msg=name,
        )
        np.testing.assert_array_equal(
            calendar.count(days[:-1], days[1:]),
            np.busday_count(days[:-1], days[1:], busdaycal=reference),
            err_msg=name,
        )
    # By hand: the 5d holiday on Wed 15 Jan does not close the 7d calendar that day, and
    # the 7d Christmas holiday does not touch the 5d calendar (Thu 25 Dec 2025 stays a
    # work day there).
    probe = np.array(["2025-01-15", "2025-12-25"], dtype="datetime64[D]")
    np.testing.assert_array_equal(calendars["7d"].is_workday(probe), [True, False])
    np.testing.assert_array_equal(calendars["5d"].is_workday(probe), [False, True])
