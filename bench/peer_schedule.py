"""The plain-script peer of ``delay schedule CASE --format json``, for bench/run.py.

    python bench/peer_schedule.py CASE > schedule.json

What a capable analyst would script without the toolkit: the ``csv`` module reads the
baseline's activities and links, ``networkx`` holds the logic, a per-node forward and
backward pass walks ``networkx.topological_sort`` with dict look-ups (all four link types
and lags), and ``json.dump`` writes the same shape as ``delay schedule --format json``: the
snapshot's label, data date and completion, and per activity its id, early and late start
and finish, total and free float and the critical flag.

To stay a lower bound on the work a peer does, it schedules every activity on one calendar
(the case's default calendar with its exceptions) and ignores constraints, milestones'
own kinds and progress: its dates are not the toolkit's on a case that uses those, its
running time is at most what a faithful script would need.
"""

from __future__ import annotations

import csv
import datetime as dt
import json
import sys
import tomllib
from pathlib import Path

import networkx as nx

DAY_NAMES = ("Mon", "Tue", "Wed", "Thu", "Fri", "Sat", "Sun")


def work_dates(case: Path, calendar: str, first: dt.date, count: int) -> list[dt.date]:
    """The first ``count`` work dates of ``calendar`` from ``first`` on."""
    with (case / "calendars.csv").open(newline="", encoding="utf-8-sig") as handle:
        weekdays = {
            row["calendar"]: {DAY_NAMES.index(d) for d in row["workdays"].split()} for row in csv.DictReader(handle)
        }[calendar]
    off, extra = set(), set()
    exceptions = case / "calendar_exceptions.csv"
    if exceptions.exists():
        with exceptions.open(newline="", encoding="utf-8-sig") as handle:
            for row in csv.DictReader(handle):
                if row["calendar"] == calendar:
                    (extra if row["working"] == "yes" else off).add(dt.date.fromisoformat(row["date"]))
    dates, day = [], first
    while len(dates) < count:
        if (day.weekday() in weekdays and day not in off) or day in extra:
            dates.append(day)
        day += dt.timedelta(days=1)
    return dates


def per_node_cpm(graph: nx.DiGraph):
    """Early and late boundaries (work-day indices) by one pass each way over the nodes."""
    order = list(nx.topological_sort(graph))
    duration = nx.get_node_attributes(graph, "duration")
    early_start, early_finish = {}, {}
    for node in order:
        start = 0
        for pred, _, data in graph.in_edges(node, data=True):
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
    end = max(early_finish.values(), default=0)
    late_start, late_finish, free_float = {}, {}, {}
    for node in reversed(order):
        finish, free = end, end - early_finish[node]
        for _, succ, data in graph.out_edges(node, data=True):
            kind, lag = data["type"], data["lag"]
            if kind == "FS":
                finish = min(finish, late_start[succ] - lag)
                free = min(free, early_start[succ] - lag - early_finish[node])
            elif kind == "SS":
                finish = min(finish, late_start[succ] - lag + duration[node])
                free = min(free, early_start[succ] - lag - early_start[node])
            elif kind == "FF":
                finish = min(finish, late_finish[succ] - lag)
                free = min(free, early_finish[succ] - lag - early_finish[node])
            else:
                finish = min(finish, late_finish[succ] - lag + duration[node])
                free = min(free, early_finish[succ] - lag - early_start[node])
        late_finish[node] = finish
        late_start[node] = finish - duration[node]
        free_float[node] = max(free, 0)
    return order, early_start, early_finish, late_start, late_finish, free_float, end


def main(case: Path) -> None:
    snapshot = case / "snapshots" / "baseline"
    facts = tomllib.loads((snapshot / "snapshot.toml").read_text(encoding="utf-8"))
    settings = tomllib.loads((case / "case.toml").read_text(encoding="utf-8"))
    data_date = facts["data_date"]
    graph = nx.DiGraph()
    with (snapshot / "activities.csv").open(newline="", encoding="utf-8-sig") as handle:
        ids = []
        for row in csv.DictReader(handle):
            ids.append(row["id"])
            graph.add_node(row["id"], duration=int(row["duration"] or 0))
    with (snapshot / "links.csv").open(newline="", encoding="utf-8-sig") as handle:
        for row in csv.DictReader(handle):
            graph.add_edge(row["pred"], row["succ"], type=row.get("type") or "FS", lag=int(row.get("lag") or 0))
    order, es, ef, ls, lf, free, end = per_node_cpm(graph)
    dates = work_dates(case, settings["schedule"]["default_calendar"], data_date, end + 2)

    def start_date(k):
        return dates[k].isoformat()

    def finish_date(start, finish):
        return dates[max(finish - 1, start)].isoformat()

    rows = [
        {
            "id": node,
            "early_start": start_date(es[node]),
            "early_finish": finish_date(es[node], ef[node]),
            "late_start": start_date(ls[node]),
            "late_finish": finish_date(ls[node], lf[node]),
            "total_float": lf[node] - ef[node],
            "free_float": free[node],
            "critical": lf[node] - ef[node] <= 0,
        }
        for node in ids
    ]
    json.dump(
        {
            "snapshot": facts.get("label", "baseline"),
            "data_date": data_date.isoformat(),
            "completion": dates[max(end - 1, 0)].isoformat(),
            "activities": rows,
        },
        sys.stdout,
        indent=2,
    )
    sys.stdout.write("\n")


if __name__ == "__main__":
    main(Path(sys.argv[1]))
