"""The value conversions (delay.convert) against the standard library and numpy.

- Day numbers: Python's ``datetime.date.toordinal`` counts 1 January of year 1 as day 1, so
  1970-01-01 is ordinal 719163 (standard library documentation of ``date.toordinal``);
  numpy's ``datetime64[D]`` counts days from 1970-01-01 (numpy's datetime documentation).
- JSON cells: ``json.dumps`` of the standard library must accept every converted value.
- Lists of ids: splitting what was joined gives the ids back (a property, by hypothesis).
"""

from __future__ import annotations

import datetime as dt
import json

import numpy as np
import pandas as pd
from hypothesis import given
from hypothesis import strategies as st

from delay.convert import (
    NO_DAY,
    day_to_date,
    iso_date,
    iso_dates,
    join_ids,
    json_cell,
    json_records,
    split_ids,
    table_dates,
    text_cell,
    to_dates,
    to_days,
)

ORDINAL_OF_DAY_0 = dt.date(1970, 1, 1).toordinal()  # 719163, standard library


@given(st.dates(min_value=dt.date(1900, 1, 1), max_value=dt.date(2200, 12, 31)))
def test_day_numbers_agree_with_the_standard_library_ordinals(date):
    day = date.toordinal() - ORDINAL_OF_DAY_0
    assert to_days([date.isoformat()]).tolist() == [day]
    assert to_days(np.array([date], dtype="datetime64[D]")).tolist() == [day]
    assert day_to_date(day) == date == dt.date.fromordinal(day + ORDINAL_OF_DAY_0)
    assert to_dates([day])[0] == np.datetime64(date, "D")
    assert iso_dates([day]).tolist() == [date.isoformat()]
    assert pd.Timestamp(table_dates([day])[0]).date() == date


def test_no_day_is_a_missing_date_everywhere():
    assert np.isnat(to_dates([NO_DAY])[0]) and np.isnat(table_dates([NO_DAY])[0])
    assert iso_dates([NO_DAY]).tolist() == [None]
    assert to_days(pd.to_datetime(pd.Series([None]))).tolist() == [NO_DAY]
    for missing in (None, np.nan, pd.NaT, pd.NA, np.datetime64("NaT")):
        assert iso_date(missing) is None and json_cell(missing) is None and text_cell(missing) == ""


def test_dates_of_every_kind_read_the_same():
    kinds = (
        dt.date(2025, 1, 6),
        dt.datetime(2025, 1, 6, 17, 30),
        pd.Timestamp("2025-01-06 08:00"),
        np.datetime64("2025-01-06"),
        np.datetime64("2025-01-06T12:00:00"),
        "2025-01-06",
    )
    assert {iso_date(v) for v in kinds} == {"2025-01-06"}
    assert {text_cell(v) for v in kinds} == {"2025-01-06"}


def test_json_cells_are_what_json_dumps_accepts():
    frame = pd.DataFrame(
        {
            "when": pd.to_datetime(["2025-01-06", None]),
            "days": pd.array([3, None], dtype="Int64"),
            "share": [0.5, np.nan],
            "ok": np.array([True, False]),
            "ids": [["A", "B"], []],
        }
    )
    records = json_records(frame)
    assert json.loads(json.dumps(records)) == [
        {"when": "2025-01-06", "days": 3, "share": 0.5, "ok": True, "ids": ["A", "B"]},
        {"when": None, "days": None, "share": None, "ok": False, "ids": []},
    ]
    assert type(json_cell(np.int64(2))) is int and type(json_cell(np.float32(0.5))) is float


ID = st.text(
    alphabet=st.characters(blacklist_characters=";", blacklist_categories=("Cs", "Zs", "Zl", "Zp", "Cc")),
    min_size=1,
    max_size=8,
)


@given(st.lists(ID, unique=True, max_size=6))
def test_splitting_what_was_joined_gives_the_ids_back(ids):
    assert split_ids(join_ids(ids)) == ids


def test_a_list_cell_drops_blanks_and_repeats_and_tolerates_spaces():
    assert split_ids(" A1 ;A2;; A1") == ["A1", "A2"]
    assert split_ids(np.nan) == [] and split_ids("") == []
