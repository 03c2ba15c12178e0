"""Forensic data checks of the records, on cases built by hand.

Sources
-------
- shared/case-format.md: the progress rules (actual dates lie before the data date), the
  time convention (a finish-to-start link lets the successor start on the next work day
  after the predecessor's finish date; a start milestone is dated by the day it precedes,
  a finish milestone by the day it follows) and corrections.csv.
- Open ends, dangling starts and finishes, retrospective edits and out-of-sequence progress
  are common practice of forensic schedule review; the definitions used are those stated
  in delay/checks/data_checks.py.
- networkx (in- and out-degree; transitive reduction, ``dag_longest_path_length``) is the
  reference for open ends and redundant links.
"""

from __future__ import annotations

import networkx as nx
import numpy as np
import pandas as pd
import pytest
from casewriter import write_case

from delay.case import load_case
from delay.checks import data_checks, redundant_links
from delay.checks.forensic import DATA_CHECK_KEYS, ITEM_COLUMNS
from delay.errors import CaseError
from delay.network import build_network


def task(activity_id, duration, **extra):
    return {"id": activity_id, "name": f"Work {activity_id}", "duration": duration, **extra}


def start_milestone(activity_id="START", **extra):
    return {"id": activity_id, "name": "Start", "duration": 0, "kind": "start_milestone", **extra}


def finish_milestone(activity_id="FINISH", **extra):
    return {"id": activity_id, "name": "Finish", "duration": 0, "kind": "finish_milestone", **extra}


def link(pred, succ, kind="FS", lag=0):
    return {"pred": pred, "succ": succ, "type": kind, "lag": lag}


def checks_of(root, snapshot="baseline"):
    return {c.key: c for c in data_checks(load_case(root), snapshot)}


def rows(check, *columns):
    return [tuple(_plain(v) for v in r) for r in check.items[list(columns)].itertuples(index=False)]


def _plain(value):
    if isinstance(value, pd.Timestamp):
        return value.date().isoformat()
    if value is pd.NaT or (not isinstance(value, str) and pd.isna(value)):
        return None
    return value


def test_every_check_is_reported_with_its_columns(tmp_path):
    root = write_case(
        tmp_path,
        activities=[start_milestone(), task("A", 1), finish_milestone()],
        links=[link("START", "A"), link("A", "FINISH")],
    )
    found = data_checks(load_case(root))
    assert tuple(c.key for c in found) == DATA_CHECK_KEYS
    for check in found:
        assert tuple(check.items.columns) == ITEM_COLUMNS[check.key]


# -- open ends --------------------------------------------------------------------------------


def test_open_ends_other_than_the_project_start_and_finish(tmp_path):
    # START -> A -> B -> C -> FINISH; X follows A and leads nowhere; Y has no predecessor.
    # Y and START both start on 2025-01-06: the milestone is taken as the project start.
    activities = [
        start_milestone(),
        task("A", 2),
        task("B", 2),
        task("C", 2),
        task("X", 1),
        task("Y", 1),
        finish_milestone(),
    ]
    links = [link("START", "A"), link("A", "B"), link("B", "C"), link("C", "FINISH"), link("A", "X"), link("Y", "C")]
    found = checks_of(write_case(tmp_path, activities=activities, links=links))["open_ends"]
    # Reference: networkx degrees, less the project's two ends.
    graph = nx.DiGraph([(lk["pred"], lk["succ"]) for lk in links])
    no_pred = {v for v in graph if graph.in_degree(v) == 0} - {"START"}
    no_succ = {v for v in graph if graph.out_degree(v) == 0} - {"FINISH"}
    assert (no_pred, no_succ) == ({"Y"}, {"X"})
    assert sorted(rows(found, "activity", "missing")) == [("X", "successor"), ("Y", "predecessor")]
    assert "START" in found.note and "FINISH" in found.note


# -- dangling starts and finishes -----------------------------------------------------------


def test_dangling_starts_and_finishes(tmp_path):
    # B's only predecessor link is FF: nothing drives its start. C's only successor link
    # is SS: nothing follows its finish. M is a finish milestone reached by FF only: a
    # milestone is one point and any link drives it, so it is not listed.
    activities = [
        start_milestone(),
        task("A", 3),
        task("B", 3),
        task("C", 3),
        task("D", 3),
        finish_milestone("M"),
        finish_milestone(),
    ]
    links = [
        link("START", "A"),
        link("A", "B", "FF"),
        link("B", "FINISH"),
        link("START", "C"),
        link("C", "D", "SS"),
        link("D", "FINISH"),
        link("A", "M", "FF"),
        link("M", "FINISH"),
    ]
    found = checks_of(write_case(tmp_path, activities=activities, links=links))["dangling"]
    assert rows(found, "activity", "dangling") == [("B", "start"), ("C", "finish")]


# -- actual date changes and retrospective edits ------------------------------------------


def progress_case(tmp_path):
    # Baseline: START -> T1 (5) -> T2 (5) -> FINISH; T3 (5) and T5 (5) in parallel.
    activities = [start_milestone(), task("T1", 5), task("T2", 5), task("T3", 5), task("T5", 5), finish_milestone()]
    links = [
        link("START", "T1"),
        link("T1", "T2"),
        link("T2", "FINISH"),
        link("START", "T3"),
        link("T3", "FINISH"),
        link("START", "T5"),
        link("T5", "FINISH"),
    ]

    def update(changes):
        table = [dict(a) for a in activities]
        for row in table:
            row.update(changes.get(row["id"], {}))
        return table

    start = {"actual_start": "2025-01-06"}
    # Update 1, data date 2025-01-20: T1 done 01-06..01-10; T2 and T5 started 01-13.
    first = update(
        {
            "START": start,
            "T1": {"actual_start": "2025-01-06", "actual_finish": "2025-01-10"},
            "T2": {"actual_start": "2025-01-13", "remaining": 2},
            "T5": {"actual_start": "2025-01-13", "remaining": 3},
        }
    )
    # Update 2, data date 2025-02-03:
    # - T1's finish now reads 01-09 (reported as 01-10 before): changed, and entered for a
    #   day before update 1's data date that update 1 reported otherwise: retrospective;
    # - T2 finished 01-21: new, after update 1's data date: neither;
    # - T3 started 01-16, before update 1's data date, which showed it not started:
    #   retrospective (not a change: there was no earlier date to change);
    # - T5's actual start is cleared: changed (to nothing), not retrospective.
    second = update(
        {
            "START": start,
            "T1": {"actual_start": "2025-01-06", "actual_finish": "2025-01-09"},
            "T2": {"actual_start": "2025-01-13", "actual_finish": "2025-01-21"},
            "T3": {"actual_start": "2025-01-16", "remaining": 2},
        }
    )
    return write_case(
        tmp_path,
        activities=activities,
        links=links,
        snapshots={
            "u01": {"data_date": "2025-01-20", "activities": first, "label": "Update 1"},
            "u02": {"data_date": "2025-02-03", "activities": second, "label": "Update 2"},
        },
    )


def test_actual_dates_changed_between_updates(tmp_path):
    root = progress_case(tmp_path)
    changes = checks_of(root, "u02")["actual_date_changes"]
    assert rows(changes, "activity", "column", "earlier_snapshot", "earlier_value", "later_value") == [
        ("T1", "actual_finish", "u01", "2025-01-10", "2025-01-09"),
        ("T5", "actual_start", "u01", "2025-01-13", None),
    ]
    # Against the baseline, which reports no progress, update 1 changes nothing.
    assert checks_of(root, "u01")["actual_date_changes"].count == 0


def test_retrospective_edits(tmp_path):
    root = progress_case(tmp_path)
    edits = checks_of(root, "u02")["retrospective_edits"]
    assert rows(edits, "activity", "column", "value", "earlier_snapshot", "earlier_data_date", "earlier_value") == [
        ("T1", "actual_finish", "2025-01-09", "u01", "2025-01-20", "2025-01-10"),
        ("T3", "actual_start", "2025-01-16", "u01", "2025-01-20", None),
    ]
    # The first update follows the baseline, which is no progress report.
    assert checks_of(root, "u01")["retrospective_edits"].count == 0


def test_future_actuals_are_checked_at_load(tmp_path):
    activities = [start_milestone(), task("A", 5), finish_milestone()]
    links = [link("START", "A"), link("A", "FINISH")]
    root = write_case(tmp_path / "good", activities=activities, links=links)
    future = checks_of(root)["future_actuals"]
    assert (future.status, future.count) == ("checked at load", 0)
    # The claim holds: the loader refuses an actual date on the data date (case-format
    # progress rules: "actual dates on or after the data date are an input error").
    bad = [dict(a) for a in activities]
    bad[1].update(actual_start="2025-01-13", remaining=3)
    with pytest.raises(CaseError, match="on or after the data date"):
        load_case(
            write_case(
                tmp_path / "bad",
                activities=activities,
                links=links,
                snapshots={"u01": {"data_date": "2025-01-13", "activities": bad}},
            )
        )


# -- out-of-sequence progress ---------------------------------------------------------------


def test_out_of_sequence_progress(tmp_path):
    # Update at 2025-01-20:
    # - A in progress, B (its FS successor) started 01-13: out of sequence (A not finished);
    # - C finished 01-10 and D started 01-10, the same day: out of sequence (an FS
    #   successor may start on the next work day after the finish date);
    # - G finished 01-10 and H started 01-13: in sequence;
    # - E -> F carries a lead of 2 days: F starting before E finished is what the lead
    #   allows, and the link is not judged;
    # - every task follows START, a start milestone dated 01-06 by the start of the day,
    #   so tasks starting 01-06 are in sequence.
    names = ["A", "B", "C", "D", "E", "F", "G", "H"]
    activities = [start_milestone()] + [task(n, 5) for n in names] + [finish_milestone()]
    links = (
        [link("START", n) for n in ("A", "C", "E", "G")]
        + [link("A", "B"), link("C", "D"), link("E", "F", lag=-2), link("G", "H")]
        + [link(n, "FINISH") for n in ("B", "D", "F", "H")]
    )
    progress = [dict(a) for a in activities]
    facts = {
        "START": {"actual_start": "2025-01-06"},
        "A": {"actual_start": "2025-01-06", "remaining": 2},
        "B": {"actual_start": "2025-01-13", "remaining": 3},
        "C": {"actual_start": "2025-01-06", "actual_finish": "2025-01-10"},
        "D": {"actual_start": "2025-01-10", "remaining": 1},
        "E": {"actual_start": "2025-01-06", "actual_finish": "2025-01-14"},
        "F": {"actual_start": "2025-01-13", "remaining": 1},
        "G": {"actual_start": "2025-01-06", "actual_finish": "2025-01-10"},
        "H": {"actual_start": "2025-01-13", "remaining": 2},
    }
    for row in progress:
        row.update(facts.get(row["id"], {}))
    root = write_case(
        tmp_path,
        activities=activities,
        links=links,
        snapshots={"u01": {"data_date": "2025-01-20", "activities": progress}},
    )
    found = checks_of(root, "u01")["out_of_sequence"]
    assert rows(found, "pred", "succ", "succ_actual_start", "pred_actual_finish") == [
        ("A", "B", "2025-01-13", None),
        ("C", "D", "2025-01-10", "2025-01-10"),
    ]


# -- redundant links --------------------------------------------------------------------------


def redundancy_case():
    # A (2) -> B (3) -> C (1) with A -> C lag 0: implied by the path through B: redundant.
    # D -> E (5) -> F with D -> F lag 10: the path implies 0 + 5 + 0 = 5 < 10: kept.
    # G -> H (5) -> I with G -> I lag 5: implied 5 >= 5: redundant.
    # J -SS-> K -> L with J -> L: the path holds an SS link: kept.
    # M -> N (lag -1, a lead) -> O with M -> O: the path holds a lead: kept.
    # P -> Q -> R -> S with P -> S: a path of three links: redundant (every length searched).
    durations = {
        "A": 2,
        "B": 3,
        "C": 1,
        "D": 1,
        "E": 5,
        "F": 1,
        "G": 1,
        "H": 5,
        "I": 1,
        "J": 1,
        "K": 1,
        "L": 1,
        "M": 1,
        "N": 1,
        "O": 1,
        "P": 1,
        "Q": 1,
        "R": 1,
        "S": 1,
    }
    activities = [task(a, d) for a, d in durations.items()]
    links = [
        link("A", "B"),
        link("B", "C"),
        link("A", "C"),
        link("D", "E"),
        link("E", "F"),
        link("D", "F", lag=10),
        link("G", "H"),
        link("H", "I"),
        link("G", "I", lag=5),
        link("J", "K", "SS"),
        link("K", "L"),
        link("J", "L"),
        link("M", "N", lag=-1),
        link("N", "O"),
        link("M", "O"),
        link("P", "Q"),
        link("Q", "R"),
        link("R", "S"),
        link("P", "S"),
    ]
    return activities, links


def test_redundant_links_by_hand(tmp_path):
    activities, links = redundancy_case()
    found = checks_of(write_case(tmp_path, activities=activities, links=links))["redundant_links"]
    assert found.status == "checked"
    assert rows(found, "pred", "succ", "lag", "via") == [("A", "C", 0, "B"), ("G", "I", 5, "H"), ("P", "S", 0, "Q")]


def test_redundant_links_bounded_beyond_the_exact_limit(tmp_path, monkeypatch):
    # Beyond the limit only paths of two links are searched: P -> S (three links) is not
    # found, and the check says it was bounded.
    from delay.checks import redundancy

    activities, links = redundancy_case()
    root = write_case(tmp_path, activities=activities, links=links)
    monkeypatch.setattr(redundancy, "EXACT_REDUNDANCY_LIMIT", 5)
    found = checks_of(root)["redundant_links"]
    assert found.status == "bounded" and "two links" in found.note
    assert rows(found, "pred", "succ") == [("A", "C"), ("G", "I")]


def _random_network(seed, n, m, lags=False):
    rng = np.random.default_rng(seed)
    first, second = rng.integers(0, n, m), rng.integers(0, n, m)
    keep = first < second
    pairs = np.unique(np.stack([first[keep], second[keep]], 1), axis=0)
    shuffle = rng.permutation(n)  # numbers that are not a topological order
    pred, succ = shuffle[pairs[:, 0]], shuffle[pairs[:, 1]]
    kinds = rng.choice([0, 0, 0, 1, 2], pred.size).astype(np.int8) if lags else np.zeros(pred.size, np.int8)
    lag = rng.choice([0, 0, 0, 2, 5, -1], pred.size) if lags else np.zeros(pred.size, np.int64)
    duration = rng.integers(0, 6, n)
    ids = np.array([f"N{i}" for i in range(n)], dtype=object)
    return build_network(ids, pred, succ, kinds, lag), duration


@pytest.mark.parametrize("seed", range(6))
def test_redundant_links_match_networkx_transitive_reduction(seed):
    # Finish-to-start links of lag 0: a link is redundant exactly when the transitive
    # reduction (networkx.transitive_reduction) drops it. Small bit budgets force the
    # search through many blocks of target columns.
    network, duration = _random_network(seed, 120, 500)
    graph = nx.DiGraph()
    graph.add_nodes_from(range(network.size))
    graph.add_edges_from(zip(network.pred.tolist(), network.succ.tolist()))
    reduced = nx.transitive_reduction(graph)
    expected = [not reduced.has_edge(p, s) for p, s in zip(network.pred, network.succ)]
    for budget in (8_000_000, 200):
        found = redundant_links(network, duration, bit_budget_words=budget)
        assert found.exact and found.redundant.tolist() == expected


@pytest.mark.parametrize("seed", range(4))
def test_redundant_links_with_lags_match_longest_paths(seed):
    # Mixed types and lags. Reference: for each finish-to-start link u -> w of lag L >= 0,
    # the longest implied lag of another path in the graph of finish-to-start links with
    # lags >= 0 is found with networkx.dag_longest_path_length on the activities between
    # u and w, an edge x -> y weighing lag + duration of y (lag only into w); the link is
    # redundant when that path exists with two links or more and is at least L long.
    network, duration = _random_network(seed, 60, 200, lags=True)
    searched = (network.link_type == 0) & (network.lag >= 0)
    graph = nx.DiGraph()
    graph.add_nodes_from(range(network.size))
    for e in np.flatnonzero(searched):
        graph.add_edge(int(network.pred[e]), int(network.succ[e]), lag=int(network.lag[e]))
    expected = []
    for e in range(network.link_count):
        if not searched[e]:
            expected.append(False)
            continue
        u, w, own = int(network.pred[e]), int(network.succ[e]), int(network.lag[e])
        best = None
        for x in graph.successors(u):
            if x == w or not nx.has_path(graph, x, w):
                continue
            between = (nx.descendants(graph, x) | {x}) & (nx.ancestors(graph, w) | {w})
            sub = graph.subgraph(between).copy()
            for _a, b, data in sub.edges(data=True):
                data["weight"] = data["lag"] + (0 if b == w else int(duration[b]))
            # Every activity of the sub-graph lies on a path from x to w and no weight is
            # negative, so its longest path runs from x to w.
            length = nx.dag_longest_path_length(sub, weight="weight")
            implied = graph.edges[u, x]["lag"] + int(duration[x]) + length
            best = implied if best is None else max(best, implied)
        expected.append(best is not None and best >= own)
    found = redundant_links(network, duration)
    assert found.redundant.tolist() == expected


# -- corrections --------------------------------------------------------------------------------


def test_corrections_are_listed_with_the_original_value(tmp_path):
    activities = [start_milestone(), task("A", 5), finish_milestone()]
    links = [link("START", "A"), link("A", "FINISH")]
    progress = [dict(a) for a in activities]
    progress[0]["actual_start"] = "2025-01-06"
    progress[1].update(actual_start="2025-01-06", remaining=2)
    root = write_case(
        tmp_path,
        activities=activities,
        links=links,
        snapshots={"u01": {"data_date": "2025-01-08", "activities": progress, "label": "Update 1"}},
        files={
            "corrections.csv": [
                {
                    "snapshot": "Update 1",
                    "table": "activities",
                    "key": "A",
                    "column": "remaining",
                    "value": "4",
                    "reason": "progress report gives 4 days",
                }
            ]
        },
    )
    found = checks_of(root, "u01")["corrections"]
    assert rows(found, "table", "key", "column", "original", "corrected", "row") == [
        ("activities", "A", "remaining", "2", "4", 2)
    ]
    assert checks_of(root, "baseline")["corrections"].count == 0


# -- a synthetic programme ----------------------------------------------------------------


def test_synthetic_case_against_references(tmp_path):
    # A random valid case (delay.synth) with two updates. References: networkx degrees for
    # open ends and for the logic metric's count; a pandas merge for the progress of the
    # period; json for the whole output.
    import json

    from delay.checks import check_snapshot, compare, metric_list
    from delay.synth import synthesise

    case = load_case(synthesise(tmp_path / "synthetic", 400, updates=2, seed=3))
    for snap in case.snapshots:
        table, links = snap.activities, snap.links
        graph = nx.DiGraph()
        graph.add_nodes_from(table["id"])
        graph.add_edges_from(zip(links["pred"], links["succ"]))
        open_ends = {v for v in graph if graph.in_degree(v) == 0 or graph.out_degree(v) == 0}
        found = {c.key: c for c in data_checks(case, snap)}["open_ends"]
        ends = set(table["id"][table["kind"].isin(["start_milestone", "finish_milestone"])])
        assert len(ends) == 2  # the synthetic programme's start and finish milestones
        assert set(found.items["activity"]) == open_ends - ends
        task = (table["kind"] == "task") & (table["duration"] > 0) & table["actual_finish"].isna()
        no_logic = {v for v in table["id"][task] if graph.in_degree(v) == 0 or graph.out_degree(v) == 0}
        logic = {m.key: m for m in metric_list(case, snap)}["logic"]
        assert (set(logic.activities), logic.denominator) == (no_logic, int(task.sum()))
        json.dumps(check_snapshot(case, snap))
    merged = case.snapshot("u01").activities.merge(case.snapshot("u02").activities, on="id", suffixes=("_a", "_b"))
    moved = sum(
        int(((merged[f"{c}_a"] != merged[f"{c}_b"]) & merged[f"{c}_b"].notna()).sum())
        for c in ("actual_start", "actual_finish")
    )
    progress = compare(case, "u01", "u02").of("progress")
    assert int((progress["field"] != "remaining").sum()) == moved
