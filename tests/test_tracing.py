"""The driving predecessors of every activity on arrays equal the rule applied one at a time.

:func:`delay.tracing.driving_table` applies the rule of :func:`delay.tracing.driving_predecessors`
(not started: links driving on early dates; in progress: those driving its remaining work,
else the closest to its actual start; complete: the links closest to its actual dates; ties
by an FS link first, then input order) to every link at once, for the windows' charge
trace. What is checked is an invariance, common practice for a vectorised rewrite: for
every activity of every snapshot, under both progress modes and in the half-step
schedules the windows analysis builds, the table gives the same predecessors, links and
gaps in the same order as the rule applied to that activity alone. The rule itself is
checked on worked cases in test_windows_ledger.py and test_windows.py.
"""

from __future__ import annotations

import dataclasses
import tempfile
from pathlib import Path

from casewriter import write_case
from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st

from delay.case import load_case
from delay.cpm import COMPLETE, IN_PROGRESS, NOT_STARTED, prepare, schedule
from delay.synth import synthesise
from delay.tracing import driving_predecessors, driving_table

DEMO = Path(__file__).resolve().parent.parent / "case_demo"


def assert_same(result) -> set[int]:
    table = driving_table(result)
    for v in range(result.model.network.size):
        assert table.of(v) == driving_predecessors(result, v), (str(result.ids[v]), int(result.status[v]))
    return {int(s) for s in result.status}


def test_every_snapshot_of_the_demo():
    case = load_case(DEMO)
    seen = set()
    for snap in [*case.snapshots, case.asbuilt_snapshot]:
        seen |= assert_same(schedule(case, snap))
    assert seen == {NOT_STARTED, IN_PROGRESS, COMPLETE}  # every branch of the rule was met


@settings(max_examples=8, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(activities=st.integers(20, 200), updates=st.integers(1, 4), seed=st.integers(0, 10_000))
@example(activities=150, updates=4, seed=11)
def test_synthetic_snapshots_under_both_progress_modes(activities, updates, seed):
    with tempfile.TemporaryDirectory() as folder:
        case = load_case(synthesise(Path(folder) / "case", activities, updates=updates, seed=seed))
        for snap in [*case.snapshots, case.asbuilt_snapshot]:
            model = prepare(case, snap)
            assert_same(model.run())
            for mode in ("retained_logic", "progress_override"):
                other = dataclasses.replace(model.settings, progress=mode)
                assert_same(model.what_if(settings=other).run())


def test_the_half_step_schedules_of_a_windows_analysis(tmp_path, monkeypatch):
    import delay.tracing as tracing
    from delay.methods.windows import analyse

    checked = []

    def checking(result):
        checked.append(assert_same(result))
        return tracing._driving_table(result)

    monkeypatch.setattr(tracing, "driving_table", checking)
    case = load_case(synthesise(tmp_path / "case", 120, updates=4, seed=5))
    analyse(case, half_step=True)
    assert len(checked) >= 4  # at least one trace per window


def test_an_in_progress_activity_is_not_driven_by_the_start_of_one_in_progress(tmp_path):
    # A and B both started on Mon 6 Jan; B may not finish before 10 work days after A's
    # start (SF, lag 10), which holds B's finish on the dates. The link reads a start that
    # has happened, so the rule does not take it as driving B's remaining work and falls
    # back to the links closest to B's actual dates.
    activities = [
        {"id": "A", "name": "A", "duration": 10},
        {"id": "B", "name": "B", "duration": 4},
        {"id": "D", "name": "D", "duration": 8},
    ]
    links = [{"pred": "A", "succ": "B", "type": "SF", "lag": 10}, {"pred": "D", "succ": "B", "type": "FF"}]
    progress = [
        {"id": "A", "name": "A", "duration": 10, "actual_start": "2025-01-06", "remaining": 8},
        {"id": "B", "name": "B", "duration": 4, "actual_start": "2025-01-06", "remaining": 2},
        {"id": "D", "name": "D", "duration": 8},
    ]
    root = write_case(
        tmp_path / "case",
        activities=activities,
        links=links,
        snapshots={"u01": {"data_date": "2025-01-08", "activities": progress}},
    )
    result = schedule(load_case(root), "u01")
    net = result.model.network
    a, b = (int(v) for v in net.index_of(["A", "B"]))
    sf = int(
        net.in_link[net.in_ptr[b] : net.in_ptr[b + 1]][net.pred[net.in_link[net.in_ptr[b] : net.in_ptr[b + 1]]] == a][0]
    )
    assert int(result.status[a]) == int(result.status[b]) == IN_PROGRESS
    assert bool(result.driving_link[sf])  # on the dates, the SF link holds B
    found = driving_predecessors(result, b)
    assert [str(result.ids[p]) for p, _, _ in found] == ["D"]  # the FF link, which also holds B, drives
    assert driving_table(result).of(b) == found
