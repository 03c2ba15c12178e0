"""The loops over the logic run two ways, as plain Python and compiled by numba, with one result.

References
----------
- networkx ``dag_longest_path_length``: the longest path through an FS-only network (each
  activity a start node and a finish node joined by an edge of its duration, each link an
  edge of its lag), as in test_cpm_properties.py.
- numpy ``busday_offset`` on the 5-day weekmask: the date of the last work day.
- The two ways are compared with each other on random networks of all four link types,
  leads and lags, two calendars and milestones; every table of the result must be equal.
- numba's documented cache behaviour: with ``cache=True`` a function's compiled code goes
  beside its source file when that folder may be written, else into the user-wide cache
  folder (numba documentation, "Cache behaviour"; recalled from memory, checked here by
  running a read-only copy of the package).
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
import sys
import tempfile
from pathlib import Path

import networkx as nx
import numpy as np
import pandas as pd
import pytest
from casewriter import write_case
from hypothesis import given, settings
from hypothesis import strategies as st

from delay._jit import kernel_mode

ROOT = Path(__file__).resolve().parent.parent
DATA_DATE = np.datetime64("2025-01-06")  # casewriter's default start: a Monday
FIVE_DAY = "Mon Tue Wed Thu Fri"


@st.composite
def networks(draw, link_types=("FS", "SS", "FF", "SF"), lags=(-2, 4), calendars=("5d", "7d"), max_activities=12):
    """(activity rows, link rows): ids shuffled, links from lower to higher position."""
    count = draw(st.integers(1, max_activities))
    durations = draw(st.lists(st.integers(0, 8), min_size=count, max_size=count))
    labels = draw(st.permutations([f"W{n:02d}" for n in range(count)]))
    pairs = [(i, j) for i in range(count) for j in range(i + 1, count)]
    chosen = draw(st.lists(st.sampled_from(pairs), unique=True, max_size=2 * count)) if pairs else []
    links = [
        {
            "pred": labels[i],
            "succ": labels[j],
            "type": draw(st.sampled_from(link_types)),
            "lag": draw(st.integers(*lags)),
        }
        for i, j in chosen
    ]
    activities = [
        {
            "id": labels[n],
            "name": f"Work {labels[n]}",
            "duration": durations[n],
            "calendar": draw(st.sampled_from(calendars)),
        }
        for n in range(count)
    ]
    order = draw(st.permutations(range(count)))
    return [activities[n] for n in order], links


def schedule_both(activities, links):
    """The case loaded and scheduled once with plain-Python loops, once compiled."""
    from delay.case import load_case
    from delay.cpm import schedule

    results = {}
    with tempfile.TemporaryDirectory(prefix="kernels-") as folder:
        root = write_case(Path(folder) / "case", activities=activities, links=links)
        for mode in ("python", "compiled"):
            with kernel_mode(mode):
                result = schedule(load_case(root))
                results[mode] = (
                    result,
                    result.activities,
                    result.links,
                    result.driving_path(),
                    result.longest_path(),
                    result.link_gaps.copy(),
                )
    return results["python"], results["compiled"]


def longest_path_length(activities, links) -> int:
    """networkx reference: the longest FS path in work days."""
    graph = nx.DiGraph()
    for row in activities:
        graph.add_edge(("start", row["id"]), ("finish", row["id"]), weight=row["duration"])
    for row in links:
        graph.add_edge(("finish", row["pred"]), ("start", row["succ"]), weight=row["lag"])
    return nx.dag_longest_path_length(graph, weight="weight")


@settings(max_examples=15, deadline=None)
@given(networks(link_types=("FS",), lags=(0, 3), calendars=("5d",)))
def test_both_ways_give_the_networkx_completion(network):
    activities, links = network
    activities = [dict(row, duration=max(1, row["duration"])) for row in activities]  # tasks only
    plain, compiled = schedule_both(activities, links)
    length = longest_path_length(activities, links)  # reference: networkx
    # the last work day of `length` work days from the data date (numpy busday_offset)
    expected = np.busday_offset(DATA_DATE, length - 1, roll="forward", weekmask=FIVE_DAY).item()
    assert plain[0].completion == compiled[0].completion == expected


@settings(max_examples=30, deadline=None)
@given(networks())
def test_plain_and_compiled_loops_give_the_same_schedule(network):
    activities, links = network
    plain, compiled = schedule_both(activities, links)
    assert plain[0].completion == compiled[0].completion
    pd.testing.assert_frame_equal(plain[1], compiled[1])  # dates, floats, flags
    pd.testing.assert_frame_equal(plain[2], compiled[2])  # relative float, driving links
    assert plain[3] == compiled[3] and plain[4] == compiled[4]
    np.testing.assert_array_equal(plain[5], compiled[5])


@settings(max_examples=15, deadline=None)
@given(networks(link_types=("FS",), lags=(0, 3)))
def test_redundant_links_the_same_both_ways(network):
    from delay.checks.redundancy import redundant_links
    from delay.network import compile_network

    activities, links = network
    if not links:
        return
    net = compile_network(pd.DataFrame(activities), pd.DataFrame(links))
    duration = np.asarray([row["duration"] for row in activities])
    found = {}
    for mode in ("python", "compiled"):
        with kernel_mode(mode):
            exact = redundant_links(net, duration)
            approximate = redundant_links(net, duration, exact_limit=0)
        found[mode] = (
            exact.redundant.tolist(),
            exact.via.tolist(),
            approximate.redundant.tolist(),
            approximate.via.tolist(),
        )
    assert found["python"] == found["compiled"]
    # a link implied by a two-link path through another activity (the approximate search)
    # is implied in the exact one too
    assert all(e or not a for e, a in zip(found["python"][0], found["python"][2]))


def test_kernel_mode_rejects_an_unknown_mode():
    with pytest.raises(ValueError):
        with kernel_mode("fast"):
            pass


SIX = [
    {"id": "START", "name": "Start", "duration": 0, "kind": "start_milestone"},
    {"id": "A", "name": "Dig", "duration": 3},
    {"id": "B", "name": "Pour", "duration": 2, "calendar": "7d"},
    {"id": "C", "name": "Cure", "duration": 4},
    {"id": "D", "name": "Frame", "duration": 5},
    {"id": "END", "name": "Finish", "duration": 0, "kind": "finish_milestone"},
]
SIX_LINKS = [
    {"pred": "START", "succ": "A", "type": "FS", "lag": 0},
    {"pred": "A", "succ": "B", "type": "SS", "lag": 1},
    {"pred": "A", "succ": "C", "type": "FS", "lag": 0},
    {"pred": "B", "succ": "D", "type": "FF", "lag": 2},
    {"pred": "C", "succ": "D", "type": "FS", "lag": -1},
    {"pred": "D", "succ": "END", "type": "FS", "lag": 0},
]


def _child_env(**extra) -> dict:
    env = {k: v for k, v in os.environ.items() if k not in ("DELAY_KERNELS", "NUMBA_CACHE_DIR")}
    env.update(extra)
    return env


def test_a_small_case_schedules_without_numba(tmp_path):
    # The start-up promise: `delay schedule` of six activities never imports numba.
    root = write_case(tmp_path / "case", activities=SIX, links=SIX_LINKS)
    code = (
        "import sys\n"
        "from delay.cli import cli\n"
        "cli(['schedule', sys.argv[1], '--format', 'json'], standalone_mode=False)\n"
        "print('numba' in sys.modules, file=sys.stderr)\n"
    )
    done = subprocess.run(
        [sys.executable, "-c", code, str(root)],
        capture_output=True,
        text=True,
        env=_child_env(),
        cwd=tmp_path,
        timeout=300,
    )
    assert done.returncode == 0, done.stderr
    assert done.stderr.strip() == "False"
    assert json.loads(done.stdout)["completion"] == "2025-01-20"


def _privileges_dropped() -> list[str] | None:
    """A prefix that runs a child without the power to ignore file permissions, or None."""
    if not hasattr(os, "geteuid") or os.geteuid() != 0:
        return []
    setpriv = shutil.which("setpriv")
    if setpriv is None:
        return None
    # root keeps no capability after exec, so the read-only bits apply to it too
    return [setpriv, "--inh-caps=-all", "--bounding-set=-all", "--"]


def test_compiled_loops_go_to_the_user_cache_when_the_package_is_read_only(tmp_path):
    prefix = _privileges_dropped()
    if prefix is None:
        pytest.skip("running as root without setpriv: permissions cannot be made to apply")
    package = tmp_path / "site"
    shutil.copytree(ROOT / "delay", package / "delay", ignore=shutil.ignore_patterns("__pycache__"))
    for path in [package, *package.rglob("*")]:
        path.chmod(0o555 if path.is_dir() else 0o444)
    root = write_case(tmp_path / "case", activities=SIX, links=SIX_LINKS)
    cache = tmp_path / "cache"
    code = (
        "import sys, delay\n"
        "assert delay.__file__.startswith(sys.argv[2]), delay.__file__\n"
        "from delay.case import load_case\n"
        "from delay.cpm import schedule\n"
        "from delay._jit import compiled_in_use\n"
        "result = schedule(load_case(sys.argv[1]))\n"
        "print(result.completion, compiled_in_use())\n"
    )
    env = _child_env(
        DELAY_KERNELS="compiled",
        PYTHONPATH=str(package),
        XDG_CACHE_HOME=str(cache),
        HOME=str(tmp_path / "home"),
        PYTHONDONTWRITEBYTECODE="1",
    )
    try:
        for _ in range(2):  # compiled into the user's cache, then read back from it
            done = subprocess.run(
                [*prefix, sys.executable, "-c", code, str(root), str(package)],
                capture_output=True,
                text=True,
                env=env,
                cwd=tmp_path,
                timeout=600,
            )
            assert done.returncode == 0, done.stderr
            assert done.stderr == ""  # silently: no warning, no error
            assert done.stdout.split() == ["2025-01-20", "True"]
        cached = list(cache.rglob("*.nbi"))
        assert cached, "the compiled loops were not cached in the user's cache folder"
        assert not list(package.rglob("*.nbi")) and not list(package.rglob("__pycache__"))
    finally:
        for path in [package, *package.rglob("*")]:
            path.chmod(0o755 if path.is_dir() else 0o644)
