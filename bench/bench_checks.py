"""Benchmark of ``delay check`` on a 50,000-activity programme (run by hand).

    /work/venv/bin/python bench/bench_checks.py [--activities 50000] [--elements 50000]
        [--peer-activities 5000] [--seed 11]

Writes a synthetic case (delay.synth.synthesise: baseline, two updates, an as-built record and
model elements) to a temporary folder, loads it, and prints the time of each family of checks
on the last update, each beside a peer run in the same process:

- quality metrics: against one CPM run of the same snapshot (the metrics schedule the
  baseline and one what-if besides);
- redundant links: against ``networkx.transitive_reduction`` on a smaller programme of
  ``--peer-activities`` (networkx needs minutes at 50,000), both on the finish-to-start
  links with lags >= 0 of that programme;
- the other forensic checks, the snapshot comparison: against a pandas merge of the two
  snapshots' activities on id and links on predecessor and successor (the joins the
  comparison is built on);
- element checks: against pandas ``duplicated`` on classification and box (exact copies
  only; the check also finds copies within 1 mm).

Nothing is asserted: the figures are for reading. The compiled loops are built (or read
from numba's cache) on a small case first, so the times are of the checks themselves.
"""

from __future__ import annotations

import argparse
import shutil
import tempfile
import time
from pathlib import Path

import networkx as nx
import numpy as np
import pandas as pd

from delay.case import load_case
from delay.checks import check_snapshot, compare, data_checks, element_checks, quality_metrics
from delay.checks._common import model_of, scheduled
from delay.checks.redundancy import redundant_links
from delay.network import build_network
from delay.synth import synthesise, synthetic_network


def timed(function, *args, repeat=1, **kwargs):
    best = None
    result = None
    for _ in range(repeat):
        start = time.perf_counter()
        result = function(*args, **kwargs)
        elapsed = time.perf_counter() - start
        best = elapsed if best is None else min(best, elapsed)
    return best, result


def searched_network(activities: int, seed: int):
    """The finish-to-start links with lags >= 0 of a synthetic programme, as a Network
    and as a networkx DiGraph of the same activity numbers."""
    table, links = synthetic_network(activities, seed=seed)
    links = links[(links["type"] == "FS") & (links["lag"] >= 0)]
    index = pd.Index(table["id"])
    pred = index.get_indexer(links["pred"]).astype(np.int64)
    succ = index.get_indexer(links["succ"]).astype(np.int64)
    network = build_network(
        table["id"].to_numpy(dtype=object), pred, succ, np.zeros(pred.size, np.int8), np.zeros(pred.size, np.int64)
    )
    graph = nx.DiGraph()
    graph.add_nodes_from(range(len(table)))
    graph.add_edges_from(zip(pred.tolist(), succ.tolist()))
    return network, graph


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--activities", type=int, default=50_000)
    parser.add_argument("--elements", type=int, default=50_000)
    parser.add_argument("--peer-activities", type=int, default=5_000)
    parser.add_argument("--seed", type=int, default=11)
    args = parser.parse_args()
    folder = Path(tempfile.mkdtemp(prefix="bench-checks-"))
    try:
        # Build the compiled loops first, on a small case.
        warm = load_case(synthesise(folder / "warm", 300, updates=2, seed=1, elements=300))
        check_snapshot(warm, "u02")
        compare(warm, "u01", "u02")

        start = time.perf_counter()
        root = synthesise(folder / "case", args.activities, updates=2, seed=args.seed, elements=args.elements)
        print(
            f"synthetic case of {args.activities} activities, {args.elements} elements: "
            f"{time.perf_counter() - start:.1f} s to write"
        )
        load_seconds, case = timed(load_case, root)
        snap = case.snapshot("u02")
        print(
            f"loaded in {load_seconds:.2f} s: {len(snap.activities_table)} activities, "
            f"{len(snap.links_table)} links in u02"
        )

        # Everything for one snapshot from cold (its schedules included).
        cold, _ = timed(check_snapshot, case, "u02")
        print(f"\ncheck of one snapshot from cold (schedules, metrics, data checks, elements): {cold:.2f} s\n")

        rows = []
        cpm_seconds, _ = timed(lambda: model_of(case, snap).run(), repeat=3)
        metric_seconds, _ = timed(quality_metrics, case, "u02", repeat=3)
        rows.append(("quality metrics (14)", metric_seconds, "one CPM run of u02", cpm_seconds))

        network, graph = searched_network(args.peer_activities, args.seed)
        duration = np.ones(network.size, dtype=np.int64)
        ours_small, found = timed(redundant_links, network, duration, repeat=3)
        peer_small, reduced = timed(nx.transitive_reduction, graph)
        expected = np.array([not reduced.has_edge(p, q) for p, q in zip(network.pred.tolist(), network.succ.tolist())])
        agree = bool((found.redundant == expected).all())
        rows.append(
            (
                f"redundant links, {args.peer_activities} activities",
                ours_small,
                "networkx.transitive_reduction",
                peer_small,
            )
        )
        model = model_of(case, snap)
        ours_large, large = timed(redundant_links, model.network, model.duration, repeat=3)
        rows.append((f"redundant links, {model.network.size} activities", ours_large, "", None))

        checks_seconds, checks = timed(data_checks, case, "u02", repeat=3)
        earlier, later = case.snapshot("u01"), case.snapshot("u02")

        def merge_peer():
            a = earlier.activities_table.merge(later.activities_table, on="id", how="outer", indicator=True)
            b = earlier.links_table.merge(later.links_table, on=["pred", "succ"], how="outer", indicator=True)
            return len(a) + len(b)

        scheduled(case, earlier)
        merge_seconds, _ = timed(merge_peer, repeat=3)
        rows.append(("forensic data checks (all 8)", checks_seconds, "pandas merge of u01 and u02", merge_seconds))
        compare_seconds, comparison = timed(compare, case, "u01", "u02", repeat=3)
        rows.append(("snapshot comparison u01 -> u02", compare_seconds, "pandas merge of u01 and u02", merge_seconds))

        elements = case.elements
        element_seconds, element_result = timed(element_checks, case, "u02", repeat=3)
        peer_seconds, _ = timed(
            lambda: elements.duplicated(["classification", "x", "y", "z", "dx", "dy", "dz"], keep=False).sum(), repeat=3
        )
        rows.append(
            (
                f"element checks, {len(elements)} elements",
                element_seconds,
                "pandas duplicated (exact copies only)",
                peer_seconds,
            )
        )

        width = max(len(r[0]) for r in rows)
        print(f"{'family':<{width}}  {'ours':>8}  {'peer':>8}  {'ratio':>7}  peer")
        for name, ours, peer_name, peer in rows:
            if peer is None:
                print(f"{name:<{width}}  {ours:8.3f}")
            else:
                print(f"{name:<{width}}  {ours:8.3f}  {peer:8.3f}  {ours / peer:7.3g}  {peer_name}")
        print(
            f"\nredundant links found: {int(large.redundant.sum())} of {model.network.link_count} links "
            f"(exact: {large.exact}); on the peer programme ours and networkx agree link by link: {agree}"
        )
        counts = {c.key: c.count for c in checks}
        print(f"data checks: {counts}")
        print(f"comparison: {comparison.counts()}")
        print(
            f"elements: {len(element_result.unlinked_elements)} unlinked, "
            f"{len(element_result.duplicate_groups())} duplicate groups"
        )
        print("(ratio = ours / peer: below 1 we are faster; the peers do less, see the docstring)")
    finally:
        shutil.rmtree(folder, ignore_errors=True)


if __name__ == "__main__":
    main()
