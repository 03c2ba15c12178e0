"""Benchmark of the CPM engine against two peers run in the same process.

Run by hand (not by the test suite):

    python bench/bench_cpm.py [--activities 100000] [--repeat 5]

It writes a synthetic case (two calendars, all four link types, lags and leads), loads it,
and prints the median of several repetitions for:

- ours: ``delay.cpm.schedule`` and the driving path, (1) as the first use of a freshly
  loaded case (compile from the case, both passes, floats, driving flags; the headline
  figure), (2) again with the snapshot's compiled arrays kept, (3) from bare tables without
  the codes the loader found while checking them; and with the result table;
- peer (a): ``networkx.dag_longest_path_length`` on the same network read as FS links without
  calendars (the graph is built outside the timing);
- peer (b): a straightforward per-node CPM over ``networkx.topological_sort`` with dict
  look-ups (all four link types and lags, one calendar), as a typical scripted tool does it;
- the what-if engine: one changed duration re-scheduled on the compiled model, against the
  first full schedule after loading.

It prints ratios, never asserts times. Peak memory is the process's maximum resident size.
"""

from __future__ import annotations

import argparse
import dataclasses
import resource
import sys
import tempfile
import time
from pathlib import Path

import networkx as nx

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))
sys.path.insert(0, str(Path(__file__).resolve().parent))

from delay.case import load_case  # noqa: E402
from delay.cpm import prepare, schedule  # noqa: E402
from delay.synth import synthesise  # noqa: E402
from timing import median_time, median_time_after  # noqa: E402


def per_node_cpm(graph: nx.DiGraph, duration: dict) -> dict:
    """Forward and backward pass node by node with dict look-ups (the peer (b))."""
    order = list(nx.topological_sort(graph))
    early_start, early_finish = {}, {}
    for node in order:
        start = 0
        for pred in graph.predecessors(node):
            data = graph.edges[pred, node]
            kind, lag = data["type"], data["lag"]
            if kind == "FS":
                start = max(start, early_finish[pred] + lag)
            elif kind == "SS":
                start = max(start, early_start[pred] + lag)
            elif kind == "FF":
                start = max(start, early_finish[pred] + lag - duration[node])
            else:
                start = max(start, early_start[pred] + lag - duration[node])
        early_start[node] = start
        early_finish[node] = start + duration[node]
    end = max(early_finish.values())
    late_start, late_finish = {}, {}
    for node in reversed(order):
        finish = end
        for succ in graph.successors(node):
            data = graph.edges[node, succ]
            kind, lag = data["type"], data["lag"]
            if kind == "FS":
                finish = min(finish, late_start[succ] - lag)
            elif kind == "SS":
                finish = min(finish, late_start[succ] - lag + duration[node])
            elif kind == "FF":
                finish = min(finish, late_finish[succ] - lag)
            else:
                finish = min(finish, late_finish[succ] - lag + duration[node])
        late_finish[node] = finish
        late_start[node] = finish - duration[node]
    return {node: late_finish[node] - early_finish[node] for node in order}


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--activities", type=int, default=100_000)
    parser.add_argument("--links-per-activity", type=float, default=2.9,
                        help="2.9 gives about 250,000 distinct links for 100,000 activities")
    parser.add_argument("--repeat", type=int, default=5)
    args = parser.parse_args()

    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp) / "case"
        start = time.perf_counter()
        synthesise(folder, args.activities, args.links_per_activity, updates=0, seed=1)
        print(f"wrote synthetic case in {time.perf_counter() - start:.1f} s")
        start = time.perf_counter()
        case = load_case(folder)
        print(f"loaded in {time.perf_counter() - start:.2f} s")
        snap = case.baseline
        activities, links = snap.activities, snap.links
        print(f"network: {len(activities)} activities, {len(links)} links, "
              f"link types {links['type'].value_counts().to_dict()}, calendars {sorted(activities['calendar'].unique())}")

        schedule(case)  # compile the kernels once (cached on disk after the first run)

        def first_after_loading(fresh_case):
            # nothing is kept from earlier runs: the case (its calendars, the snapshot's
            # compiled arrays) is new; the loader's codes are there, as after any load
            return schedule(fresh_case).driving_path()

        first_time = median_time_after(lambda: load_case(folder), first_after_loading, args.repeat)

    def ours():
        result = schedule(case)
        return result.driving_path()

    def ours_from_tables():
        # a bare snapshot: not even the loader's codes, every id and name looked up anew
        result = schedule(case, dataclasses.replace(snap, derived={}))
        return result.driving_path()

    def ours_with_table():
        return schedule(case).activities

    ours_time = median_time(ours, args.repeat)
    tables_time = median_time(ours_from_tables, args.repeat)
    table_time = median_time(ours_with_table, args.repeat)
    passes_model = prepare(case)
    passes_time = median_time(passes_model.run, args.repeat)

    duration = dict(zip(activities["id"], activities["duration"].astype(int)))
    fs_graph = nx.DiGraph()
    fs_graph.add_nodes_from(activities["id"])
    fs_graph.add_weighted_edges_from(
        (p, s, duration[p]) for p, s in zip(links["pred"], links["succ"]))
    peer_a = median_time(lambda: nx.dag_longest_path_length(fs_graph, weight="weight"), args.repeat)

    typed_graph = nx.DiGraph()
    typed_graph.add_nodes_from(activities["id"])
    for p, s, t, lag in zip(links["pred"], links["succ"], links["type"], links["lag"]):
        typed_graph.add_edge(p, s, type=t, lag=int(lag))
    peer_b = median_time(lambda: per_node_cpm(typed_graph, duration), max(1, args.repeat // 2))

    model = prepare(case)
    ids = list(activities["id"][activities["duration"] > 0][:50])
    counter = iter(range(10**9))

    def what_if():
        k = next(counter) % len(ids)
        return model.what_if(extend={ids[k]: 5}).completion_day()

    def what_if_full():
        k = next(counter) % len(ids)
        return model.what_if(extend={ids[k]: 5}).run().completion

    what_if_time = median_time(what_if, args.repeat)
    what_if_full_time = median_time(what_if_full, args.repeat)
    full_time = first_time  # a full schedule from the case tables

    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    print()
    print(f"ours, first schedule after loading, driving path  : {first_time * 1000:9.1f} ms"
          "   (compile from the loaded case, both passes, floats, driving flags and path)")
    print(f"ours, the same again (the compiled arrays kept)    : {ours_time * 1000:9.1f} ms")
    print(f"ours, the same from bare tables (no loader codes)  : {tables_time * 1000:9.1f} ms")
    print(f"ours, the same and the result DataFrame            : {table_time * 1000:9.1f} ms")
    print(f"ours, both passes + floats on the compiled model   : {passes_time * 1000:9.1f} ms")
    for name, peer in (("peer (a) networkx dag_longest_path_length (FS only)", peer_a),
                       ("peer (b) per-node CPM over networkx topological_sort", peer_b)):
        print(f"{name}: {peer * 1000:9.1f} ms   ratio peer/ours = {peer / first_time:6.1f}x after loading, "
              f"{peer / ours_time:5.1f}x arrays kept, {peer / tables_time:5.1f}x from bare tables")
    print(f"what-if re-schedule, completion (one longer duration): {what_if_time * 1000:7.1f} ms"
          f"   full schedule after loading {full_time * 1000:.1f} ms, ratio = {full_time / what_if_time:5.1f}x")
    print(f"what-if re-schedule, all dates and floats           : {what_if_full_time * 1000:7.1f} ms"
          f"   ratio = {full_time / what_if_full_time:5.1f}x")
    print(f"peak resident memory                               : {peak:9.0f} MiB")


if __name__ == "__main__":
    main()
