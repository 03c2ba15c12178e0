"""Properties of the windows analysis on random synthetic cases with updates (hypothesis).

References
----------
- The reconciliation the windows analysis promises (``delay.methods.windows`` docstring):
  "in every window the counted progress charges plus the revision charges equal the
  movement, to the day, and the windows add up to the movement from the first snapshot to
  the last. A failure raises ReconciliationError."
- Arithmetic of dates: the movement of a window is the difference of two completion dates
  in calendar days (shared/case-format.md, "Time convention"), and the windows' movements
  telescope to the movement from the first boundary to the last (common practice: a sum of
  consecutive differences).
- The half-step split (AACE International RP 29R-03 (2011), MIP 3.4, recalled from memory):
  progress effect = completion(H) - completion(S), revision effect = completion(E) -
  completion(H).
- The classes of a causation table (``delay.causation`` docstring, "Classes over a table",
  from the project's issue): excusable + culpable delay - acceleration = the movement.
- Invariances an opposing expert would test (common practice of cross-examination: a
  figure must not change when no fact changes): adding ``latest_finish`` constraints to
  milestones moves no forward date, so it must move no figure; shifting every date of the
  case by one week (weekdays and holidays kept) and renaming every activity change no
  figure either.

Each case comes from ``delay.synth.synthesise`` (a random programme, monthly updates from one
simulated actual run, and an as-built record), so the windows run baseline, each update,
as-built. The completions are checked against ``delay.cpm.schedule`` of each snapshot on its
own, outside the windows code.
"""

from __future__ import annotations

import tempfile
from pathlib import Path

import numpy as np
import pytest
from casetools import add_milestone_constraints, rename_activities, shift_dates
from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st

import delay.methods.windows as windows_module
from delay.case import load_case
from delay.causation import class_totals, windows_causation
from delay.cpm import schedule
from delay.errors import ReconciliationError
from delay.events import completion_activity
from delay.methods.windows import analyse
from delay.synth import synthesise

PROPERTY_SETTINGS = settings(max_examples=6, deadline=None, suppress_health_check=[HealthCheck.too_slow])


def synthetic_case(folder: Path, activities: int, updates: int, seed: int):
    return load_case(synthesise(folder / "case", activities, updates=updates, seed=seed))


@PROPERTY_SETTINGS
@given(activities=st.integers(30, 150), updates=st.integers(2, 5), seed=st.integers(0, 10_000), half_step=st.booleans())
@example(activities=150, updates=5, seed=11, half_step=True)
@example(activities=30, updates=2, seed=7, half_step=False)
def test_windows_reconcile_on_synthetic_cases(activities, updates, seed, half_step):
    with tempfile.TemporaryDirectory(prefix="windows-case-") as folder:
        case = synthetic_case(Path(folder), activities, updates, seed)
        result = analyse(case, half_step=half_step)
        boundaries = list(case.snapshots) + [case.asbuilt_snapshot]
        assert len(result.windows) == len(boundaries) - 1 == updates + 1
        target = completion_activity(case)
        completions = {
            s.folder: schedule(case, snapshot=s.folder).activities.set_index("id").loc[target, "early_finish"].date()
            for s in boundaries
        }
        for window in result.windows:
            where = f"window {window.number} ({window.start} to {window.end})"
            assert window.completion_start == completions[window.start], where
            assert window.completion_end == completions[window.end], where
            assert window.movement_days == (window.completion_end - window.completion_start).days, where
            counted = window.charges[window.charges["counted"].astype(bool)]
            assert int(counted["days"].sum()) == window.progress_days, where
            assert int(window.revisions["days"].sum()) == window.revision_days, where
            assert window.progress_days + window.revision_days == window.movement_days, where
            if half_step:
                assert window.progress_days == (window.completion_half - window.completion_start).days, where
                assert window.revision_days == (window.completion_end - window.completion_half).days, where
            else:
                assert window.progress_days == window.movement_days and len(window.revisions) == 0, where
        first, last = completions[boundaries[0].folder], completions[boundaries[-1].folder]
        assert result.total_movement_days == (last - first).days
        assert sum(w.movement_days for w in result.windows) == result.total_movement_days
        totals = class_totals(windows_causation(case, result).table)
        assert (
            totals["excusable_days"] + totals["culpable_delay_days"] - totals["acceleration_days"]
            == result.total_movement_days
        )


def _figures(result) -> list:
    """Every figure of a windows result: per window its movement and split, and each charge
    and revision in work days and calendar days, with its party."""
    out = []
    for window in result.windows:
        out.append(
            (window.number, window.movement_days, window.movement_work_days, window.progress_days, window.revision_days)
        )
        charges = window.charges
        out.append(
            sorted(
                zip(
                    charges["activity"],
                    charges["work_days"].astype(int),
                    charges["days"].astype(int),
                    charges["counted"].astype(bool),
                    charges["party"],
                )
            )
        )
        out.append(
            sorted(
                zip(
                    window.revisions["kind"],
                    window.revisions["work_days"].astype(int),
                    window.revisions["days"].astype(int),
                )
            )
        )
    return out


@PROPERTY_SETTINGS
@given(
    activities=st.integers(30, 120), updates=st.integers(2, 4), seed=st.integers(0, 10_000), offset=st.integers(-40, 40)
)
@example(activities=80, updates=3, seed=5, offset=-20)
def test_milestone_constraints_change_no_figure(activities, updates, seed, offset):
    # A latest_finish on every finish milestone of every programme (some met, some not,
    # by the offset from the baseline's own finish) moves no forward date; lateness is
    # measured against late dates by logic alone, so no figure may move.
    with tempfile.TemporaryDirectory(prefix="windows-case-") as folder:
        plain = synthetic_case(Path(folder), activities, updates, seed)
        constrained = load_case(add_milestone_constraints(Path(folder) / "case", Path(folder) / "constrained", offset))
        assert _figures(analyse(constrained)) == _figures(analyse(plain))


@PROPERTY_SETTINGS
@given(
    activities=st.integers(30, 100), updates=st.integers(2, 4), seed=st.integers(0, 10_000), weeks=st.integers(-3, 3)
)
def test_a_week_later_or_renamed_changes_no_figure(activities, updates, seed, weeks):
    # Every date of every file shifted by whole weeks (weekdays and holidays kept), and every
    # activity renamed: the same facts, so the same figures (ids mapped back).
    with tempfile.TemporaryDirectory(prefix="windows-case-") as folder:
        plain = synthetic_case(Path(folder), activities, updates, seed)
        shifted = load_case(shift_dates(Path(folder) / "case", Path(folder) / "shifted", 7 * weeks))
        renamed = load_case(rename_activities(Path(folder) / "case", Path(folder) / "renamed", "R-"))
        expected = _figures(analyse(plain))
        assert _figures(analyse(shifted)) == expected
        back = [
            [(a[2:], *rest) for a, *rest in entry]
            if isinstance(entry, list) and entry and isinstance(entry[0], tuple) and len(entry[0]) == 5
            else entry
            for entry in _figures(analyse(renamed))
        ]
        assert back == expected


def test_broken_progress_charges_raise_reconciliation_error(tmp_path, monkeypatch):
    """A progress charge off by one work day must raise ReconciliationError naming the window."""
    case = synthetic_case(tmp_path, 40, 2, 3)
    real = windows_module.trace_charges

    def off_by_one(*args, **kwargs):
        frame = real(*args, **kwargs).copy()
        counted = np.flatnonzero(frame["counted"].astype(bool).to_numpy())
        assert counted.size, "the trace found no counted chain to break"
        frame.loc[frame.index[counted[0]], "work_days"] += 1
        return frame

    monkeypatch.setattr(windows_module, "trace_charges", off_by_one)
    with pytest.raises(ReconciliationError) as raised:
        analyse(case, half_step=True)
    first = case.snapshots[0].folder, case.snapshots[1].folder
    assert raised.value.where.startswith("window 1")
    assert f"{first[0]} to {first[1]}" in raised.value.where
    assert "window 1" in str(raised.value)
    figures = raised.value.figures
    assert figures["progress charges (work days)"] == figures["progress effect (work days)"] + 1
