"""Benchmark of the as-planned versus as-built comparison on a large case.

    python bench/bench_asbuilt.py [--activities 200000] [--repeat 1]

Writes a synthetic case (delay.synth) with one update and an as-built record, loads it, and
prints the time of :func:`delay.methods.asbuilt.compare` beside the peer measured in the same
process: scheduling the baseline and the as-built snapshot once each (the two schedules the
comparison cannot do without). No assertions.
"""

from __future__ import annotations

import argparse
import sys
import tempfile
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))
sys.path.insert(0, str(Path(__file__).resolve().parent))

from timing import median_time

from delay.case import load_case
from delay.cpm import schedule
from delay.memo import forget
from delay.methods.asbuilt import compare
from delay.synth import synthesise


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--activities", type=int, default=200_000)
    parser.add_argument("--repeat", type=int, default=1)
    args = parser.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        synthesise(Path(tmp) / "case", args.activities, updates=1, seed=3)
        case = load_case(Path(tmp) / "case")
    print(
        f"{len(case.baseline.activities)} activities, {len(case.baseline.links)} links, one update and the "
        "as-built record"
    )
    schedule(case)  # the kernels compiled once

    def peer():
        schedule(case, case.baseline)
        schedule(case, case.asbuilt_snapshot)

    def method():
        forget(case)
        return compare(case)

    plain = median_time(peer, args.repeat)
    took = median_time(method, args.repeat)
    result = compare(case)
    print(f"peer: schedule the baseline and the as-built : {plain:7.2f} s")
    print(f"as-planned versus as-built                  : {took:7.2f} s   ratio to peer = {took / plain:5.1f}x")
    print(
        f"{len(result.critical_path)} activities on the as-built critical path; completion variance "
        f"{result.completion_variance_days} calendar days"
    )


if __name__ == "__main__":
    main()
