"""Benchmark of the impacted as-planned analysis, against full schedules from the case tables.

    python bench/bench_impacted.py [--activities 10000] [--events 200] [--repeat 3]

Writes a synthetic baseline (delay.synth) and a register of delay events into it (extends
and holds on random tasks, and some fragnets of two or three activities tied into the
programme with FS, SS and FF links), loads the case, then times the impacted as-planned
analysis: every event inserted alone and cumulatively, through one prepared model and its
what-ifs. The peer, measured in the same process, is the naive way of doing the same
number of re-schedules: ``delay.cpm.schedule(case)`` (compile the snapshot from the case
tables, both passes, floats) twice per event. The ratio says how much cheaper a what-if
run is than a full schedule. A third line gives the floor: the same number of completions
of the prepared model with no change at all (the forward pass alone), so that the cost of
modelling the events themselves shows. No assertions.
"""

from __future__ import annotations

import argparse
import datetime as dt
import sys
import tempfile
from pathlib import Path

import numpy as np
import pandas as pd

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))
sys.path.insert(0, str(Path(__file__).resolve().parent))

from timing import median_time

from delay.case import load_case
from delay.cpm import prepare, schedule
from delay.memo import forget
from delay.methods.impacted import analyse
from delay.synth import synthesise


def write_register(folder: Path, count: int, seed: int) -> dict[str, int]:
    """events.csv, fragnets.csv and fragnet_links.csv of ``count`` events, into ``folder``.

    Dates follow the baseline's own early dates, so that holds fall near the work they hold.
    """
    rng = np.random.default_rng(seed)
    planned = schedule(load_case(folder)).activities
    tasks = planned[planned["duration"] > 0].reset_index(drop=True)
    kinds = rng.choice(["extend", "hold", "fragnet"], size=count, p=[0.45, 0.4, 0.15])
    parties = rng.choice(["employer", "contractor", "neutral"], size=count, p=[0.5, 0.35, 0.15])
    events, fragnets, fragnet_links = [], [], []
    for number in range(count):
        event_id = f"EV{number + 1:03d}"
        affected = tasks.iloc[rng.choice(len(tasks), size=int(rng.integers(1, 4)), replace=False)]
        first_start = pd.Timestamp(affected["early_start"].min()).date()
        start = first_start - dt.timedelta(days=int(rng.integers(0, 15)))
        finish = first_start + dt.timedelta(days=int(rng.integers(0, 20)))
        start = min(start, finish)
        kind = str(kinds[number])
        events.append(
            {
                "id": event_id,
                "title": f"Synthetic event {number + 1}",
                "party": parties[number],
                "start": start.isoformat(),
                "finish": finish.isoformat(),
                "activities": ";".join(affected["id"]),
                "impact": kind,
                "days": int(rng.integers(1, 16)) if kind == "extend" else "",
            }
        )
        if kind == "fragnet":
            size = int(rng.integers(2, 4))
            ids = [f"{event_id}-N{k + 1}" for k in range(size)]
            for k, activity in enumerate(ids):
                fragnets.append(
                    {
                        "event": event_id,
                        "id": activity,
                        "name": f"Inserted work {k + 1}",
                        "duration": int(rng.integers(1, 11)),
                    }
                )
            for pred, succ in zip(ids, ids[1:]):
                fragnet_links.append(
                    {
                        "event": event_id,
                        "pred": pred,
                        "succ": succ,
                        "type": str(rng.choice(["FS", "SS"])),
                        "lag": int(rng.integers(0, 3)),
                    }
                )
            for target in affected["id"]:
                fragnet_links.append(
                    {
                        "event": event_id,
                        "pred": ids[-1],
                        "succ": target,
                        "type": str(rng.choice(["FS", "FF"])),
                        "lag": 0,
                    }
                )
    pd.DataFrame(events).to_csv(folder / "events.csv", index=False)
    pd.DataFrame(fragnets, columns=["event", "id", "name", "duration"]).to_csv(folder / "fragnets.csv", index=False)
    pd.DataFrame(fragnet_links, columns=["event", "pred", "succ", "type", "lag"]).to_csv(
        folder / "fragnet_links.csv", index=False
    )
    return {kind: int((kinds == kind).sum()) for kind in ("extend", "hold", "fragnet")}


def measure(activities: int = 10_000, events: int = 200, repeat: int = 3) -> dict:
    """The impacted as-planned analysis beside its peer (two full schedules from the case
    tables per event) and its floor (as many completions of the prepared model), in seconds
    (medians of ``repeat``), on a synthetic case and register written here."""
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp) / "case"
        synthesise(folder, activities, seed=11)
        kinds = write_register(folder, events, seed=12)
        case = load_case(folder)
    runs = 2 * len(case.events)
    analyse(case)  # compile the kernels once
    schedule(case)

    def peer_runs():
        for _ in range(runs):
            schedule(case)

    model = prepare(case)
    measure_one = model.completion_day if hasattr(model, "completion_day") else model.run

    def floor_runs():
        for _ in range(runs):
            measure_one()

    peer = median_time(peer_runs, repeat)
    method = median_time(lambda: forget(case) or analyse(case), repeat)
    floor = median_time(floor_runs, repeat)
    result = analyse(case)
    return {
        "activities": len(case.baseline.activities),
        "links": len(case.baseline.links),
        "events": len(case.events),
        "kinds": kinds,
        "fragnet_activities": len(case.fragnets),
        "runs": runs,
        "peer": peer,
        "method": method,
        "floor": floor,
        "base": result.completion_base,
        "cumulative": result.completion_cumulative,
        "total_days": result.total_days,
        "largest": int(result.events["alone_days"].max()),
    }


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--activities", type=int, default=10_000)
    parser.add_argument("--events", type=int, default=200)
    parser.add_argument("--repeat", type=int, default=3)
    args = parser.parse_args()
    found = measure(args.activities, args.events, args.repeat)
    kinds, runs, peer, method, floor = found["kinds"], found["runs"], found["peer"], found["method"], found["floor"]
    print(
        f"{found['activities']} activities, {found['links']} links; "
        f"{found['events']} events ({kinds['extend']} extend, {kinds['hold']} hold, "
        f"{kinds['fragnet']} fragnet with {found['fragnet_activities']} inserted activities)"
    )
    print(f"peer: {runs} full schedules from the case tables : {peer:7.2f} s   ({1000 * peer / runs:6.1f} ms each)")
    print(
        f"impacted as-planned, {runs} what-if runs + parties : {method:7.2f} s   "
        f"({1000 * method / runs:6.1f} ms per run)   ratio to peer = {method / peer:5.2f}x"
    )
    print(
        f"floor: {runs} completions of the prepared model    : {floor:7.2f} s   "
        f"({1000 * floor / runs:6.1f} ms each)   ratio to peer = {floor / peer:5.2f}x"
    )
    print(
        f"completion {found['base']} -> {found['cumulative']}: {found['total_days']} calendar "
        f"days cumulative; the largest impact alone {found['largest']} days"
    )


if __name__ == "__main__":
    main()
