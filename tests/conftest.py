"""Shared helpers for the engine's acceptance tests.

A test describes a case as plain rows (see ``casewriter.write_case``); ``run_schedule``
writes it to a fresh folder, loads it with ``delay.case.load_case`` and schedules one
snapshot with ``delay.cpm.schedule``. The ``activity_table`` helper indexes the result by
activity id so that checks read ``table.loc["A", "early_start"]``.
"""

from __future__ import annotations

import dataclasses
import tempfile
from collections.abc import Mapping
from pathlib import Path
from typing import Any

import pandas as pd
import pytest
from casewriter import write_case

DATE_COLUMNS = ("early_start", "early_finish", "late_start", "late_finish")


def schedule_case_in(
    root: Path,
    *,
    snapshot: str = "baseline",
    settings: Mapping[str, Any] | None = None,
    **case_rows: Any,
):
    """Write a case under ``root``, load it and schedule ``snapshot``.

    ``settings`` overrides fields of the case's schedule settings through
    ``dataclasses.replace`` (the engine's documented way of running a what-if);
    ``case_rows`` go to ``casewriter.write_case``.
    """
    from delay.case import load_case
    from delay.cpm import schedule

    write_case(root, **case_rows)
    case = load_case(root)
    overrides = None
    if settings:
        overrides = dataclasses.replace(case.settings.schedule, **settings)
    return schedule(case, snapshot=snapshot, settings=overrides)


def schedule_case(**kwargs: Any):
    """``schedule_case_in`` on a temporary folder that is removed afterwards.

    For property-based tests, which cannot use pytest's function-scoped ``tmp_path``.
    """
    with tempfile.TemporaryDirectory(prefix="cpm-case-") as folder:
        return schedule_case_in(Path(folder) / "case", **kwargs)


def activity_table(result) -> pd.DataFrame:
    """The result's activities indexed by id (ids must be unique)."""
    table = result.activities.set_index("id")
    assert table.index.is_unique, "activity ids repeat in the result"
    return table


def check_dates(result, expected: Mapping[str, tuple[str, str, str, str]]):
    """Each id's (early start, early finish, late start, late finish) as ISO dates."""
    table = activity_table(result)
    problems = []
    for activity, dates in expected.items():
        want = tuple(pd.Timestamp(d) for d in dates)
        got = tuple(pd.Timestamp(table.loc[activity, column]) for column in DATE_COLUMNS)
        if got != want:
            problems.append(
                f"{activity}: expected ES/EF/LS/LF {[str(d.date()) for d in want]}, "
                f"got {[str(d.date()) if not pd.isna(d) else 'NaT' for d in got]}"
            )
    assert not problems, "\n".join(problems)


def check_early_dates(result, expected: Mapping[str, tuple[str, str]]):
    """Each id's (early start, early finish) as ISO dates."""
    table = activity_table(result)
    problems = []
    for activity, (start, finish) in expected.items():
        got = (table.loc[activity, "early_start"], table.loc[activity, "early_finish"])
        want = (pd.Timestamp(start), pd.Timestamp(finish))
        if tuple(pd.Timestamp(g) for g in got) != want:
            problems.append(f"{activity}: expected ES/EF {start} {finish}, got {got[0]} {got[1]}")
    assert not problems, "\n".join(problems)


def check_floats(result, expected: Mapping[str, tuple[int, int]]):
    """Each id's (total float, free float) in work days of its own calendar."""
    table = activity_table(result)
    problems = []
    for activity, (total, free) in expected.items():
        got = (table.loc[activity, "total_float"], table.loc[activity, "free_float"])
        if pd.isna(got[0]) or pd.isna(got[1]) or (int(got[0]), int(got[1])) != (total, free):
            problems.append(f"{activity}: expected TF/FF {total} {free}, got {got[0]} {got[1]}")
    assert not problems, "\n".join(problems)


def check_critical(result, critical: set[str]):
    """Exactly the ids in ``critical`` are flagged critical."""
    table = activity_table(result)
    flagged = {str(i) for i in table.index[table["critical"].astype(bool)]}
    assert flagged == set(critical)


@pytest.fixture
def run_schedule(tmp_path):
    """``run_schedule(activities=..., links=..., snapshot=..., settings=..., **case)``."""
    counter = iter(range(1_000_000))

    def run(**kwargs):
        return schedule_case_in(tmp_path / f"case{next(counter)}", **kwargs)

    return run
