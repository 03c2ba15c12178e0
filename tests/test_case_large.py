"""A generated case of 50,000 activities and 120,000 links loads with the right counts.

The counts are those the generator writes (tests/casewriter.write_large_case); the loop
check on the big network is compared with networkx. Timing is left to
bench/bench_load.py: no test here asserts a time.
"""

from __future__ import annotations

import csv
import shutil

import networkx as nx
import pytest
from casewriter import write_large_case
from test_case_support import problems_of

from delay.case import load_case, summarise


@pytest.fixture(scope="module")
def large_root(tmp_path_factory):
    return write_large_case(tmp_path_factory.mktemp("large") / "case", update=True)


def test_large_case_loads_with_every_row(large_root):
    case = load_case(large_root)
    summary = summarise(case)
    assert [(s["snapshot"], s["activities"], s["links"]) for s in summary["snapshots"]] == [
        ("baseline", 50_000, 120_000),
        ("update_01", 50_000, 120_000),
    ]
    baseline = case.baseline.activities
    assert baseline["id"].is_unique
    # Every third activity has a blank calendar, which becomes the default "5d":
    # ids 0, 3, 6, ... -> ceil(50,000 / 3) = 16,667 blanks, plus the 16,667 written "5d"
    # (ids 1, 4, ...), so 33,334 on "5d" (counted by hand).
    assert (baseline["calendar"] == "5d").sum() == 33_334
    update = case.snapshot("update_01").activities
    # The first fifth (10,000) are finished, with remaining 0.
    assert update["actual_finish"].notna().sum() == 10_000
    assert (update["remaining"] == 0).sum() == 10_000


def test_large_case_loop_is_found_and_matches_networkx(large_root, tmp_path):
    # Add one link from the last activity back to the first: the generator's links
    # run forward, so this closes a loop exactly when the last is reachable from the
    # first, which networkx decides independently.
    links_file = large_root / "snapshots" / "baseline" / "links.csv"
    with links_file.open(newline="", encoding="utf-8") as handle:
        rows = list(csv.reader(handle))
    graph = nx.DiGraph((pred, succ) for pred, succ, _, _ in rows[1:])
    graph.add_edge("A049999", "A000000")
    assert not nx.is_directed_acyclic_graph(graph)
    copy_root = tmp_path / "case"
    shutil.copytree(large_root, copy_root)
    with (copy_root / "snapshots" / "baseline" / "links.csv").open("a", newline="", encoding="utf-8") as handle:
        csv.writer(handle).writerow(["A049999", "A000000", "FS", 0])
    problems = problems_of(copy_root)
    assert len(problems) == 1
    problem = problems[0]
    assert (problem.file, problem.column) == ("snapshots/baseline/links.csv", "pred")
    loop = problem.message.removeprefix("logic loop: ").split(" -> ")
    assert loop[0] == loop[-1] and len(set(loop)) == len(loop) - 1
    for pred, succ in zip(loop, loop[1:]):
        assert graph.has_edge(pred, succ), (pred, succ)
    # The row named is the link from the loop's first activity to its second.
    rows.append(["A049999", "A000000", "FS", "0"])
    assert rows[problem.row - 1][:2] == loop[:2]
