"""Benchmark: loading and checking a case of 50,000 activities and 120,000 links.

Prints the median of three runs of :func:`delay.case.load_case` and, as the peer run in
the same process on the same files, the median of three runs of plain ``pandas.read_csv``
(every CSV file of the case read as text, nothing checked), with the ratio of the two.
A second part times the loop check of :mod:`delay.graph` on 100,000 nodes and 250,000
edges against ``networkx.is_directed_acyclic_graph``.

Run: ``python bench/bench_load.py``
"""

from __future__ import annotations

import statistics
import sys
import tempfile
import time
from pathlib import Path

import networkx as nx
import numpy as np
import pandas as pd

sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "tests"))
from casewriter import write_large_case

from delay.case import load_case
from delay.graph import find_loop

ACTIVITIES = 50_000
LINKS = 120_000
RUNS = 3


def median_time(function, runs: int = RUNS) -> float:
    times = []
    for _ in range(runs):
        start = time.perf_counter()
        function()
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def measure(activities: int = ACTIVITIES, links: int = LINKS, runs: int = RUNS) -> dict:
    """``load_case`` beside ``pandas.read_csv`` of the same files (every CSV of the case as
    text, nothing checked), in seconds (medians of ``runs``, alternating)."""
    with tempfile.TemporaryDirectory() as folder:
        root = write_large_case(Path(folder) / "large", activities=activities, links=links)
        files = sorted(root.rglob("*.csv"))

        def plain_read():
            for path in files:
                pd.read_csv(path, dtype=str, keep_default_na=False, encoding="utf-8-sig")

        case = load_case(root)  # once to warm the file cache and imports
        assert len(case.baseline.activities) == activities
        assert len(case.baseline.links) == links
        loads, reads = [], []
        for _ in range(runs):  # alternating, so that a drift of the machine touches both
            loads.append(median_time(lambda: load_case(root), 1))
            reads.append(median_time(plain_read, 1))
    return {
        "load": statistics.median(loads),
        "peer": statistics.median(reads),
        "ratio": statistics.median(a / b for a, b in zip(loads, reads)),
    }


def main() -> None:
    found = measure()
    load, peer = found["load"], found["peer"]
    print(f"load_case, {ACTIVITIES:,} activities / {LINKS:,} links: {load:.3f} s (median of {RUNS})")
    print(f"peer pandas.read_csv of the same files:             {peer:.3f} s (median of {RUNS})")
    print(f"ratio load_case / read_csv: {found['ratio']:.1f}")

    rng = np.random.default_rng(1)
    nodes, edges = 100_000, 250_000
    src, dst = rng.integers(0, nodes, edges), rng.integers(0, nodes, edges)
    rank = rng.permutation(nodes)
    keep = rank[src] != rank[dst]
    src, dst = src[keep], dst[keep]
    forward = rank[src] < rank[dst]
    src, dst = np.where(forward, src, dst), np.where(forward, dst, src)
    graph = nx.DiGraph()
    graph.add_nodes_from(range(nodes))
    graph.add_edges_from(zip(src.tolist(), dst.tolist()))
    ours = median_time(lambda: find_loop(nodes, src, dst))
    reference = median_time(lambda: nx.is_directed_acyclic_graph(graph))
    print(
        f"find_loop, {nodes:,} nodes / {len(src):,} edges (acyclic): {ours:.3f} s; "
        f"networkx.is_directed_acyclic_graph: {reference:.3f} s; "
        f"ratio {ours / reference:.2f}"
    )


if __name__ == "__main__":
    main()
