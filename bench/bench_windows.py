"""Benchmark of the windows analysis, against plain scheduling of the same snapshots.

    python bench/bench_windows.py [--activities 10000] [--updates 24] [--repeat 3]

Writes a synthetic case with monthly updates (with re-planning) and an as-built record, then
prints the median time of the windows analysis with half-steps and without, beside the peer
measured in the same process: scheduling every snapshot once from the case tables. The
ratio says how many plain schedules' worth of work the whole analysis costs. No assertions.
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
from delay.methods.windows import analyse
from delay.synth import synthesise


def measure(activities: int = 10_000, updates: int = 24, repeat: int = 3) -> dict:
    """The windows analysis with and without half-steps beside its peer (every snapshot
    scheduled once), in seconds (medians of ``repeat``), on a synthetic case written here."""
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp) / "case"
        synthesise(folder, activities, updates=updates, seed=7)
        case = load_case(folder)
    snapshots = list(case.snapshots) + [case.asbuilt_snapshot]
    analyse(case)  # compile the kernels once

    def plain():
        for snap in snapshots:
            schedule(case, snap)

    def fresh(half_step: bool):
        forget(case)  # results are remembered per case: measure the analysis, not the memory
        return analyse(case, half_step=half_step)

    peer = median_time(plain, repeat)
    with_half = median_time(lambda: fresh(True), repeat)
    without = median_time(lambda: fresh(False), repeat)
    result = analyse(case)
    return {
        "activities": len(case.baseline.activities),
        "links": len(case.baseline.links),
        "updates": len(case.updates),
        "windows": len(result.windows),
        "peer": peer,
        "with_half": with_half,
        "without": without,
        "revisions": sum(len(w.revisions) for w in result.windows),
        "movement": result.total_movement_days,
    }


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--activities", type=int, default=10_000)
    parser.add_argument("--updates", type=int, default=24)
    parser.add_argument("--repeat", type=int, default=3)
    args = parser.parse_args()
    found = measure(args.activities, args.updates, args.repeat)
    peer, with_half, without = found["peer"], found["with_half"], found["without"]
    print(
        f"{found['activities']} activities, {found['links']} links, {found['updates']} updates + as-built: "
        f"{found['windows']} windows"
    )
    print(f"peer: schedule every snapshot once         : {peer:7.2f} s")
    print(
        f"windows analysis with half-steps            : {with_half:7.2f} s   ratio to peer = {with_half / peer:5.1f}x"
        f"   ({found['revisions']} revision steps charged)"
    )
    print(f"windows analysis without half-steps         : {without:7.2f} s   ratio to peer = {without / peer:5.1f}x")
    print(f"total movement {found['movement']} calendar days over {found['windows']} windows; every window reconciled")


if __name__ == "__main__":
    main()
