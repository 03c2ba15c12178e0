"""delay.graph against networkx, the reference implementation of graph algorithms.

networkx.is_directed_acyclic_graph decides whether a loop exists; networkx.find_cycle
is the reference for "there is a cycle"; a cycle our function returns is checked edge by
edge against the graph itself. topological_order is checked against the definition (every
edge runs forward) and against networkx's acyclicity test.
"""

from __future__ import annotations

import networkx as nx
import numpy as np
import pytest

from delay.graph import find_loop, topological_order


def reference_graph(n, src, dst):
    graph = nx.MultiDiGraph()
    graph.add_nodes_from(range(n))
    graph.add_edges_from(zip(src.tolist(), dst.tolist()))
    return graph


def assert_is_cycle(cycle, src, dst):
    edges = set(zip(src.tolist(), dst.tolist()))
    assert len(set(cycle)) == len(cycle), "a node is repeated"
    for a, b in zip(cycle, cycle[1:] + cycle[:1]):
        assert (a, b) in edges, (a, b)


def assert_is_order(order, n, src, dst):
    assert sorted(order.tolist()) == list(range(n))
    position = np.empty(n, dtype=np.int64)
    position[order] = np.arange(n)
    assert np.all(position[src] < position[dst])


def random_graph(rng, n, m, acyclic):
    src = rng.integers(0, n, m)
    dst = rng.integers(0, n, m)
    if acyclic:  # edges from lower to higher rank of a random permutation
        rank = rng.permutation(n)
        keep = rank[src] != rank[dst]
        src, dst = src[keep], dst[keep]
        swap = rank[src] > rank[dst]
        src, dst = np.where(swap, dst, src), np.where(swap, src, dst)
    return src, dst


@pytest.mark.parametrize("seed", range(40))
def test_random_graphs_agree_with_networkx(seed):
    rng = np.random.default_rng(seed)
    n = int(rng.integers(1, 300))
    m = int(rng.integers(0, 3 * n))
    src, dst = random_graph(rng, n, m, acyclic=bool(seed % 2))
    graph = reference_graph(n, src, dst)
    acyclic = nx.is_directed_acyclic_graph(graph)
    cycle = find_loop(n, src, dst)
    order = topological_order(n, src, dst)
    if acyclic:
        assert cycle is None and order is not None
        assert_is_order(order, n, src, dst)
        with pytest.raises(nx.NetworkXNoCycle):
            nx.find_cycle(graph)
    else:
        assert order is None
        assert cycle is not None
        assert_is_cycle(cycle, src, dst)
        assert nx.find_cycle(graph)  # networkx sees a cycle too


def test_sparse_random_graphs_with_few_loops():
    # Mostly acyclic graphs with one back edge: a loop exists exactly when networkx says.
    rng = np.random.default_rng(7)
    for _ in range(30):
        n = 200
        src, dst = random_graph(rng, n, 400, acyclic=True)
        a, b = rng.integers(0, n, 2)
        src, dst = np.append(src, a), np.append(dst, b)
        graph = reference_graph(n, src, dst)
        cycle = find_loop(n, src, dst)
        assert (cycle is None) == nx.is_directed_acyclic_graph(graph)
        if cycle is not None:
            assert_is_cycle(cycle, src, dst)


def test_small_cases_by_hand():
    empty = np.zeros(0, dtype=np.int64)
    assert find_loop(0, empty, empty) is None
    assert topological_order(0, empty, empty).tolist() == []
    assert topological_order(3, empty, empty).tolist() == [0, 1, 2]
    assert find_loop(2, np.array([1]), np.array([1])) == [1]  # a self-edge
    assert find_loop(2, np.array([0, 0]), np.array([1, 1])) is None  # parallel edges
    assert find_loop(3, np.array([0, 1, 2]), np.array([1, 2, 0])) == [0, 1, 2]
    # 0 -> 1 -> 2 and 2 -> 1: the loop is 1 -> 2 -> 1, node 0 only leads into it.
    assert find_loop(3, np.array([0, 1, 2]), np.array([1, 2, 1])) == [1, 2]


def test_deep_chain_and_wide_layers():
    # A chain of 20,000 nodes is as deep as a graph gets (one node per layer); then a
    # layer of 5,000 nodes all fed by node 0 is as wide as it gets. Both must work
    # without recursion, and closing the chain must give the whole chain as the loop.
    n = 20_000
    src, dst = np.arange(n - 1), np.arange(1, n)
    order = topological_order(n, src, dst)
    assert order.tolist() == list(range(n))
    loop = find_loop(n, np.append(src, n - 1), np.append(dst, 0))
    assert loop == list(range(n))
    wide_src = np.concatenate([np.zeros(5000, dtype=np.int64), np.arange(1, 5001)])
    wide_dst = np.concatenate([np.arange(1, 5001), np.full(5000, 5001)])
    order = topological_order(5002, wide_src, wide_dst)
    assert_is_order(order, 5002, wide_src, wide_dst)
    assert find_loop(5002, np.append(wide_src, 5001), np.append(wide_dst, 0)) is not None


def test_large_graph_against_networkx():
    # 100,000 nodes, 250,000 edges, as the engine meets them.
    rng = np.random.default_rng(3)
    src, dst = random_graph(rng, 100_000, 250_000, acyclic=True)
    graph = nx.DiGraph(list(zip(src.tolist(), dst.tolist())))
    assert nx.is_directed_acyclic_graph(graph)
    assert find_loop(100_000, src, dst) is None
    assert_is_order(topological_order(100_000, src, dst), 100_000, src, dst)
    cycle_src, cycle_dst = np.append(src, dst[0]), np.append(dst, src[0])  # closes a 2-loop
    loop = find_loop(100_000, cycle_src, cycle_dst)
    assert_is_cycle(loop, cycle_src, cycle_dst)


@pytest.mark.parametrize(
    "n, src, dst",
    [
        (3, [0, 1], [1]),  # lengths differ
        (3, [0, 3], [1, 2]),  # node out of range
        (3, [0.5], [1.0]),  # not integers
        (3, [-1], [0]),  # negative node
    ],
)
def test_bad_input_is_refused(n, src, dst):
    with pytest.raises(ValueError):
        find_loop(n, np.array(src), np.array(dst))
    with pytest.raises(ValueError):
        topological_order(n, np.array(src), np.array(dst))
