"""Properties of the CPM engine on random acyclic networks (hypothesis).

References
----------
- networkx ``dag_longest_path_length``: the length of the longest path through an FS-only
  network, activities as weighted edges (each activity is a start node and a finish node
  joined by an edge weighted by its duration; an FS link is an edge weighted by its lag).
- numpy ``busday_offset`` / ``busday_count`` on the 5-day weekmask: work-day dates.
- shared/case-format.md scheduling rules 2, 5 and 6 for the link inequalities and the
  float definitions; the inequalities ES <= LS and TF >= FF >= 0 are common practice (the
  early schedule is a feasible schedule and the late schedule the latest feasible one).
- Reverse critical activities: Elmaghraby & Kamburowski, "The analysis of activity networks
  under generalized precedence relations", Management Science 38(9), 1992 (recalled from
  memory): with an FF link into an activity and an SS link out of it, lengthening the
  activity makes the project shorter.

Each network is drawn with activity ids in a shuffled order (so the file order is not a
topological order) and links only from a lower to a higher position (so it is acyclic).
"""

from __future__ import annotations

import datetime as dt
import tempfile
from pathlib import Path

import networkx as nx
import numpy as np
import pandas as pd
from casewriter import write_case
from hypothesis import given, settings
from hypothesis import strategies as st

from conftest import activity_table, schedule_case

DATA_DATE = np.datetime64("2025-01-06")  # casewriter's default start: a Monday
FIVE_DAY = "Mon Tue Wed Thu Fri"

PROPERTY_SETTINGS = settings(max_examples=30, deadline=None)


@st.composite
def networks(draw, link_types=("FS",), lags=(0, 0), max_activities=10, max_duration=8):
    """(activity rows, link rows): ids in shuffled order, links from lower to higher position."""
    count = draw(st.integers(1, max_activities))
    durations = draw(st.lists(st.integers(1, max_duration), min_size=count, max_size=count))
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
    activities = [{"id": labels[n], "name": f"Work {labels[n]}", "duration": durations[n]} for n in range(count)]
    row_order = draw(st.permutations(range(count)))
    return [activities[n] for n in row_order], links


def longest_path_length(activities, links) -> int:
    """networkx reference: longest FS path through the network, in work days."""
    graph = nx.DiGraph()
    for row in activities:
        graph.add_edge(("start", row["id"]), ("finish", row["id"]), weight=row["duration"])
    for row in links:
        assert row["type"] == "FS"
        graph.add_edge(("finish", row["pred"]), ("start", row["succ"]), weight=row["lag"])
    return nx.dag_longest_path_length(graph, weight="weight")


def boundaries(table: pd.DataFrame, start_column: str, finish_column: str):
    """Work-day boundaries (time convention) from a result's dates: start = index of the
    start date, finish = index of the finish date + 1, counted from the data date with
    numpy busday_count on the 5-day weekmask."""
    starts = table[start_column].to_numpy().astype("datetime64[D]")
    finishes = table[finish_column].to_numpy().astype("datetime64[D]")
    start = np.busday_count(DATA_DATE, starts, weekmask=FIVE_DAY)
    finish = np.busday_count(DATA_DATE, finishes, weekmask=FIVE_DAY) + 1
    return dict(zip(table.index, start)), dict(zip(table.index, finish))


def link_bound(kind, lag, pred_start, pred_finish, duration):
    """Rule 2 on one calendar: the lowest successor start boundary the link allows."""
    if kind == "FS":
        return pred_finish + lag
    if kind == "SS":
        return pred_start + lag
    if kind == "FF":
        return pred_finish + lag - duration
    return pred_start + lag - duration  # SF


# ---------------------------------------------------------------------------------------


@PROPERTY_SETTINGS
@given(networks(lags=(0, 3)))
def test_completion_equals_networkx_longest_path(network):
    activities, links = network
    result = schedule_case(activities=activities, links=links)
    length = longest_path_length(activities, links)  # reference: networkx
    # The last work day of a project of `length` work days from the data date
    # (reference: numpy busday_offset on the 5-day weekmask).
    expected = np.busday_offset(DATA_DATE, length - 1, roll="forward", weekmask=FIVE_DAY)
    assert result.completion == expected.item()


@PROPERTY_SETTINGS
@given(networks(link_types=("FS", "SS", "FF", "SF"), lags=(-2, 4)))
def test_early_and_late_dates_satisfy_every_link_and_are_tight(network):
    activities, links = network
    result = schedule_case(activities=activities, links=links)
    table = activity_table(result)
    duration = {row["id"]: row["duration"] for row in activities}
    early_start, early_finish = boundaries(table, "early_start", "early_finish")
    late_start, late_finish = boundaries(table, "late_start", "late_finish")
    completion = max(early_finish.values())
    # Time convention: a task of d days finishes d-1 work days after it starts.
    for activity, days in duration.items():
        assert early_finish[activity] - early_start[activity] == days
        assert late_finish[activity] - late_start[activity] == days
    # Completion is the latest early finish date (rule 5).
    assert result.completion == np.busday_offset(DATA_DATE, completion - 1, weekmask=FIVE_DAY).item()
    # Forward pass: every link holds on early dates, nothing starts before the data date,
    # and each activity is held either by the data date or by one of its links (else it
    # could start earlier: it would not be the EARLY start).
    held = {activity: early_start[activity] == 0 for activity in duration}
    for row in links:
        p, s = row["pred"], row["succ"]
        bound = link_bound(row["type"], row["lag"], early_start[p], early_finish[p], duration[s])
        assert early_start[s] >= bound, row
        held[s] = held[s] or early_start[s] == bound
    assert all(start >= 0 for start in early_start.values())
    assert all(held.values()), held
    # Backward pass from the completion (float_to = project_finish): every link holds on
    # late dates, nothing finishes after completion, and each activity is held either by
    # the completion or by one of its links (else it could finish later).
    held = {activity: late_finish[activity] == completion for activity in duration}
    for row in links:
        p, s = row["pred"], row["succ"]
        bound = link_bound(row["type"], row["lag"], late_start[p], late_finish[p], duration[s])
        assert late_start[s] >= bound, row
        held[p] = held[p] or late_start[s] == bound
    assert all(finish <= completion for finish in late_finish.values())
    assert all(held.values()), held


@PROPERTY_SETTINGS
@given(networks(link_types=("FS", "SS", "FF", "SF"), lags=(-2, 4)))
def test_float_inequalities(network):
    activities, links = network
    result = schedule_case(activities=activities, links=links)
    table = activity_table(result)
    for activity, row in table.iterrows():
        # Common practice: the early schedule is feasible, so early start <= late start.
        assert row["early_start"] <= row["late_start"], activity
        # Common practice (no constraints, float to project finish): TF >= FF >= 0.
        assert row["total_float"] >= row["free_float"] >= 0, activity
        # Rule 6: total float = late finish - early finish in work days (numpy reference).
        assert row["total_float"] == np.busday_count(
            np.datetime64(row["early_finish"], "D"),
            np.datetime64(row["late_finish"], "D"),
            weekmask=FIVE_DAY,
        ), activity
        assert bool(row["critical"]) == (row["total_float"] <= 0), activity


@PROPERTY_SETTINGS
@given(networks(link_types=("FS", "SS", "FF", "SF"), lags=(-2, 4)))
def test_driving_path_runs_from_data_date_to_completion_at_zero_float(network):
    # Random networks often have ties (two chains of equal length), so the driving path is
    # not always one chain; what holds either way: it runs from the data date to the
    # completion, every activity on it has zero total float, and each of its activities
    # is reached from the data date, and reaches the completion, through driving links
    # (rule 2 on early dates) between activities of the path.
    activities, links = network
    result = schedule_case(activities=activities, links=links)
    table = activity_table(result)
    path = result.driving_path()
    assert path, "a driving path has at least one activity"
    assert len(set(path)) == len(path), path
    # Every activity on it has zero total float (one calendar, float to project finish).
    assert all(int(table.loc[a, "total_float"]) == 0 for a in path), path
    # The driving flag marks exactly the activities on the driving path (API contract).
    assert set(path) == {str(a) for a in table.index[table["driving"].astype(bool)]}
    # It starts at the data date and ends at completion.
    assert table.loc[path[0], "early_start"] == pd.Timestamp(DATA_DATE)
    assert table.loc[path[-1], "early_finish"] == pd.Timestamp(result.completion)
    duration = {row["id"]: row["duration"] for row in activities}
    early_start, early_finish = boundaries(table, "early_start", "early_finish")
    completion = max(early_finish.values())
    on_path = set(path)
    fed = {a: early_start[a] == 0 for a in path}  # held by the data date
    feeds = {a: early_finish[a] == completion for a in path}  # sets the completion
    for row in links:
        pred, succ = row["pred"], row["succ"]
        if pred in on_path and succ in on_path:
            bound = link_bound(row["type"], row["lag"], early_start[pred], early_finish[pred], duration[succ])
            if early_start[succ] == bound:  # a driving link
                fed[succ] = True
                feeds[pred] = True
    assert all(fed.values()), f"not reached from the data date by driving links: {fed}"
    assert all(feeds.values()), f"does not lead to completion by driving links: {feeds}"


@PROPERTY_SETTINGS
@given(networks(lags=(0, 2)), st.data())
def test_fs_network_lengthening_never_advances_completion(network, data):
    # Common practice for FS-only networks: a longer activity can only delay completion.
    activities, links = network
    before = schedule_case(activities=activities, links=links).completion
    target = data.draw(st.sampled_from([row["id"] for row in activities]))
    extra = data.draw(st.integers(1, 5))
    longer = [dict(row, duration=row["duration"] + extra) if row["id"] == target else row for row in activities]
    after = schedule_case(activities=longer, links=links).completion
    assert after >= before
    # And by exactly what networkx says (reference: dag_longest_path_length).
    grown = longest_path_length(longer, links) - longest_path_length(activities, links)
    assert np.busday_count(before, after, weekmask=FIVE_DAY) == grown


@PROPERTY_SETTINGS
@given(networks(lags=(0, 2)), st.data())
def test_fs_network_shortening_a_non_critical_activity_keeps_completion(network, data):
    # Common practice for FS-only networks: completion follows the critical path only.
    activities, links = network
    result = schedule_case(activities=activities, links=links)
    table = activity_table(result)
    candidates = [
        row["id"] for row in activities if not bool(table.loc[row["id"], "critical"]) and row["duration"] >= 2
    ]
    if not candidates:
        return  # every activity is critical or already one day long: nothing to shorten
    target = data.draw(st.sampled_from(candidates))
    cut = data.draw(st.integers(1, dict((r["id"], r["duration"]) for r in activities)[target] - 1))
    shorter = [dict(row, duration=row["duration"] - cut) if row["id"] == target else row for row in activities]
    assert schedule_case(activities=shorter, links=links).completion == result.completion


# ---------------------------------------------------------------------------------------
# Reverse and normal effect of an activity's duration under SS / FF links (hand-worked)


def _completion_with(b_duration, links):
    activities = [
        {"id": "A", "name": "Lay pipe", "duration": 10},
        {"id": "B", "name": "Backfill", "duration": b_duration},
        {"id": "C", "name": "Reinstate", "duration": 8},
    ]
    return schedule_case(activities=activities, links=links, schedule={"default_calendar": "7d"}).completion


def test_reverse_critical_activity_lengthening_shortens_the_project():
    # A -FF0-> B -SS0-> C on the 7-day calendar (day k = 2025-01-06 + k). The critical
    # path enters B at its finish and leaves from its start ("reverse critical", see the
    # module docstring):
    #   A: ES 0, EF 10.  B (d days): EF >= 10 -> ES = 10-d.  C (8): ES >= ES_B = 10-d,
    #   EF = 18-d. Completion date = day 17-d.
    #   d = 4: ES_B 6, C 6..13 -> completion day 13 = 2025-01-19.
    #   d = 6: ES_B 4, C 4..11 -> completion day 11 = 2025-01-17 (two days EARLIER).
    #   d = 2: ES_B 8, C 8..15 -> completion day 15 = 2025-01-21 (shorter B, later finish).
    links = [{"pred": "A", "succ": "B", "type": "FF", "lag": 0}, {"pred": "B", "succ": "C", "type": "SS", "lag": 0}]
    assert _completion_with(4, links) == dt.date(2025, 1, 19)
    assert _completion_with(6, links) == dt.date(2025, 1, 17)
    assert _completion_with(2, links) == dt.date(2025, 1, 21)


def test_normal_activity_under_ss_in_and_ff_out_lengthening_delays_the_project():
    # A -SS0-> B -FF2-> C on the 7-day calendar: the path enters B at its start and leaves
    # from its finish, so B behaves normally.
    #   A: ES 0, EF 10.  B (d): ES >= 0 -> EF = d.  C (8): EF >= d+2 and ES >= 0 ->
    #   EF = max(8, d+2). Completion = day max(10, d+2, 8) - 1.
    #   d = 4: C EF 8; completion from A: day 9 = 2025-01-15.
    #   d = 12: C EF 14 -> day 13 = 2025-01-19.  d = 14: C EF 16 -> day 15 = 2025-01-21.
    links = [{"pred": "A", "succ": "B", "type": "SS", "lag": 0}, {"pred": "B", "succ": "C", "type": "FF", "lag": 2}]
    assert _completion_with(4, links) == dt.date(2025, 1, 15)
    assert _completion_with(12, links) == dt.date(2025, 1, 19)
    assert _completion_with(14, links) == dt.date(2025, 1, 21)


@PROPERTY_SETTINGS
@given(networks(lags=(0, 5)), st.data())
def test_other_lags_on_a_compiled_network_match_networkx(network, data):
    # Network.with_lags changes the lags of a compiled network (the collapsed method
    # fits the as-built gaps that way); completion must again equal the networkx longest
    # path with the new lags, and the early dates those of a case written with them.
    import dataclasses

    from delay.case import load_case
    from delay.cpm import prepare

    activities, links = network
    new_lags = [data.draw(st.integers(0, 6)) for _ in links]
    changed = [dict(row, lag=lag) for row, lag in zip(links, new_lags)]
    with tempfile.TemporaryDirectory(prefix="cpm-case-") as folder:
        root = Path(folder) / "case"
        write_case(root, activities=activities, links=links)
        model = prepare(load_case(root))
    varied = dataclasses.replace(model, network=model.network.with_lags(np.asarray(new_lags, dtype=np.int64)))
    length = longest_path_length(activities, changed)  # reference: networkx
    expected = np.busday_offset(DATA_DATE, length - 1, roll="forward", weekmask=FIVE_DAY)
    result = varied.run()
    assert result.completion == expected.item()
    rebuilt = schedule_case(activities=activities, links=changed)
    assert activity_table(result)[["early_start", "early_finish", "total_float"]].equals(
        activity_table(rebuilt)[["early_start", "early_finish", "total_float"]]
    )
