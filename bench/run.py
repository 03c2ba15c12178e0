"""Every speed figure of the toolkit in one run, each beside its peer or its target.

    python bench/run.py [--repeat 5] [--quick] [--only whole|in-process] [--out bench/RESULTS.md]

Whole processes first, as a user runs them, each started as a fresh child process:

- ``delay schedule`` of a 100,002-activity, ~192,700-link synthetic case, ``--format json``
  (standard output to a file), beside the plain-script peer ``bench/peer_schedule.py``
  (the ``csv`` module, a per-node CPM over ``networkx.topological_sort``, ``json.dump``),
  started alternately, ``--repeat`` times each; the median of each and the median of the
  per-pair ratios, and the largest resident memory of our child (``os.wait4``);
- ``delay schedule`` of a six-activity case (the start-up), with ``python -c "import
  pandas"`` beside it: the floor of any command that reads a case;
- ``delay demo`` (fewer repeats: it takes seconds).

Then the in-process figures: the windows analysis (bench/bench_windows.py), impacted
as-planned (bench/bench_impacted.py) and ``load_case`` against ``pandas.read_csv``
(bench/bench_load.py). Each ratio is printed with its target and whether it is met, and
the whole table is written to bench/RESULTS.md with the machine (cores, CPU model,
Python and library versions) and the date. Nothing here asserts a time.

The package's bytecode is compiled first (``compileall``): a normal Python writes it on
the first import, but an environment with ``PYTHONDONTWRITEBYTECODE`` would otherwise
compile every module from source in every child. Each command runs once untimed first
(file cache, numba's cache of compiled loops).
"""

from __future__ import annotations

import argparse
import compileall
import datetime as dt
import importlib.metadata
import os
import platform
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
ROOT = HERE.parent
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(HERE))
sys.path.insert(0, str(ROOT / "tests"))

SIX_ACTIVITIES = [
    {"id": "START", "name": "Start", "duration": 0, "kind": "start_milestone"},
    {"id": "A", "name": "Dig", "duration": 3},
    {"id": "B", "name": "Pour", "duration": 2, "calendar": "7d"},
    {"id": "C", "name": "Cure", "duration": 4},
    {"id": "D", "name": "Frame", "duration": 5},
    {"id": "END", "name": "Finish", "duration": 0, "kind": "finish_milestone"},
]
SIX_LINKS = [
    {"pred": "START", "succ": "A", "type": "FS", "lag": 0},
    {"pred": "A", "succ": "B", "type": "SS", "lag": 1},
    {"pred": "A", "succ": "C", "type": "FS", "lag": 0},
    {"pred": "B", "succ": "D", "type": "FF", "lag": 2},
    {"pred": "C", "succ": "D", "type": "FS", "lag": -1},
    {"pred": "D", "succ": "END", "type": "FS", "lag": 0},
]


def delay_command() -> list[str]:
    """The ``delay`` console script beside this interpreter, else ``python -m delay.cli``."""
    script = Path(sys.executable).parent / "delay"
    return [str(script)] if script.exists() else [sys.executable, "-m", "delay.cli"]


def run_child(command: list[str], stdout_path: Path | None = None, cwd: Path | None = None) -> tuple[float, float]:
    """Wall seconds and largest resident memory (MiB) of one child process; raises on failure."""
    out = open(stdout_path, "wb") if stdout_path else subprocess.DEVNULL
    try:
        start = time.perf_counter()
        child = subprocess.Popen(command, stdout=out, stderr=subprocess.PIPE, cwd=cwd)
        _, status, usage = os.wait4(child.pid, 0)
        took = time.perf_counter() - start
        child.returncode = os.waitstatus_to_exitcode(status)
        error = child.stderr.read().decode("utf-8", "replace")
        child.stderr.close()
    finally:
        if stdout_path:
            out.close()
    if child.returncode != 0:
        raise RuntimeError(f"{' '.join(command)} failed ({child.returncode}): {error[-2000:]}")
    return took, usage.ru_maxrss / 1024  # KiB on Linux


def alternate(ours: list[str], peer: list[str] | None, repeat: int, out: Path) -> dict:
    """Run ``ours`` and ``peer`` alternately ``repeat`` times (after one untimed run each)."""
    run_child(ours, out)
    if peer:
        run_child(peer, out)
    times, peers, memory = [], [], []
    for _ in range(repeat):
        took, rss = run_child(ours, out)
        times.append(took)
        memory.append(rss)
        if peer:
            peers.append(run_child(peer, out)[0])
    found = {"ours": statistics.median(times), "memory": max(memory), "times": times}
    if peer:
        found.update(
            peer=statistics.median(peers), ratio=statistics.median(p / o for p, o in zip(peers, times)), peers=peers
        )
    return found


def machine() -> dict:
    """Cores, CPU model, Python and library versions."""
    model = platform.processor() or "unknown"
    try:
        for line in Path("/proc/cpuinfo").read_text().splitlines():
            if line.startswith("model name"):
                model = line.split(":", 1)[1].strip()
                break
    except OSError:
        pass
    versions = {}
    for name in ("numpy", "pandas", "numba", "llvmlite", "networkx", "click"):
        try:
            versions[name] = importlib.metadata.version(name)
        except importlib.metadata.PackageNotFoundError:
            versions[name] = "not installed"
    return {"cores": os.cpu_count(), "cpu": model, "python": platform.python_version(), "versions": versions}


def whole_processes(folder: Path, repeat: int, demo_repeat: int) -> list[dict]:
    from casewriter import write_case

    from delay.synth import synthesise

    rows = []
    delay = delay_command()
    big = folder / "big"
    print("writing the 100,002-activity case ...", flush=True)
    synthesise(big, 100_002, links_per_activity=2.17, seed=0)
    links = sum(1 for _ in open(big / "snapshots" / "baseline" / "links.csv", encoding="utf-8")) - 1
    found = alternate(
        delay + ["schedule", str(big), "--format", "json"],
        [sys.executable, str(HERE / "peer_schedule.py"), str(big)],
        repeat,
        folder / "out.json",
    )
    rows.append(
        {
            "what": f"`delay schedule` of 100,002 activities / {links:,} links, `--format json`",
            "ours": f"{found['ours']:.2f} s, {found['memory']:.0f} MiB",
            "peer": f"plain script (csv, networkx, json.dump): {found['peer']:.2f} s",
            "ratio": f"{found['ratio']:.1f}x faster",
            "target": "at least 5x faster",
            "met": found["ratio"] >= 5,
            "detail": found,
        }
    )
    rows.append(
        {
            "what": "peak memory of that `delay schedule`",
            "ours": f"{found['memory']:.0f} MiB",
            "peer": "",
            "ratio": "",
            "target": "under 400 MiB",
            "met": found["memory"] < 400,
            "detail": {},
        }
    )
    print(f"  {rows[0]['ours']} vs {found['peer']:.2f} s: {found['ratio']:.1f}x", flush=True)

    six = write_case(folder / "six", activities=SIX_ACTIVITIES, links=SIX_LINKS)
    found = alternate(delay + ["schedule", str(six), "--format", "json"], None, max(repeat, 5), folder / "six.json")
    floor = alternate([sys.executable, "-c", "import pandas"], None, max(repeat, 5), folder / "floor.txt")
    rows.append(
        {
            "what": "`delay schedule` of a six-activity case (start-up)",
            "ours": f"{found['ours']:.2f} s",
            "peer": f'`python -c "import pandas"` alone: {floor["ours"]:.2f} s',
            "ratio": f"{found['ours'] / floor['ours']:.1f}x importing pandas",
            "target": "under 0.6 s",
            "met": found["ours"] < 0.6,
            "detail": found,
        }
    )
    print(f"  six activities: {found['ours']:.2f} s", flush=True)

    out = folder / "demo-out"
    found = alternate(delay + ["demo", "--out", str(out)], None, demo_repeat, folder / "demo.txt")
    rows.append(
        {
            "what": "`delay demo`",
            "ours": f"{found['ours']:.1f} s",
            "peer": "",
            "ratio": "",
            "target": "under 10 s",
            "met": found["ours"] < 10,
            "detail": found,
        }
    )
    print(f"  demo: {found['ours']:.1f} s", flush=True)
    return rows


def in_process(repeat: int) -> list[dict]:
    import bench_impacted
    import bench_load
    import bench_windows

    rows = []
    print("windows, 10,000 activities x 24 updates ...", flush=True)
    found = bench_windows.measure(10_000, 24, repeat)
    ratio = found["with_half"] / found["peer"]
    rows.append(
        {
            "what": f"windows, {found['activities']:,} activities x {found['updates']} updates + as-built, half-steps",
            "ours": f"{found['with_half']:.2f} s",
            "peer": f"every snapshot scheduled once: {found['peer']:.2f} s",
            "ratio": f"{ratio:.1f}x the peer",
            "target": "at most 15x the peer",
            "met": ratio <= 15,
            "detail": found,
        }
    )
    print("impacted as-planned, 200 events ...", flush=True)
    found = bench_impacted.measure(10_000, 200, repeat)
    faster = found["peer"] / found["method"]
    to_floor = found["method"] / found["floor"]
    rows.append(
        {
            "what": f"impacted as-planned, {found['events']} events on {found['activities']:,} activities",
            "ours": f"{found['method']:.2f} s",
            "peer": f"{found['runs']} full schedules: {found['peer']:.2f} s",
            "ratio": f"{faster:.1f}x faster" if faster >= 1 else f"{1 / faster:.1f}x slower",
            "target": "at least 2x faster",
            "met": faster >= 2,
            "detail": found,
        }
    )
    rows.append(
        {
            "what": "impacted as-planned against its floor",
            "ours": f"{found['method']:.2f} s",
            "peer": f"{found['runs']} completions of the prepared model: {found['floor']:.2f} s",
            "ratio": f"{to_floor:.1f}x the floor",
            "target": "within 2x the floor",
            "met": to_floor <= 2,
            "detail": {},
        }
    )
    print("load_case, 50,000 activities / 120,000 links ...", flush=True)
    found = bench_load.measure(runs=max(repeat, 3))
    rows.append(
        {
            "what": "`load_case`, 50,000 activities / 120,000 links",
            "ours": f"{found['load']:.3f} s",
            "peer": f"`pandas.read_csv` of the same files: {found['peer']:.3f} s",
            "ratio": f"{found['ratio']:.1f}x read_csv",
            "target": "at most 2x read_csv",
            "met": found["ratio"] <= 2,
            "detail": found,
        }
    )
    return rows


def report(rows: list[dict], facts: dict, options: str) -> str:
    lines = [
        "# Speed of the toolkit",
        "",
        f"Measured {dt.datetime.now().strftime('%Y-%m-%d %H:%M')} by `python bench/run.py {options}`.".rstrip(),
        "",
        f"Machine: {facts['cores']} cores ({facts['cpu']}), Python {facts['python']}; "
        + ", ".join(f"{name} {version}" for name, version in facts["versions"].items())
        + ".",
        "Whole processes are fresh child processes started alternately with their peer; each "
        "figure is a median, each ratio the median of the pairs' ratios. The machine is shared, "
        "so figures move from run to run; the ratios are what to compare.",
        "",
        "| what the user runs | ours | peer in the same run | ratio | target | met |",
        "|---|---|---|---|---|---|",
    ]
    for row in rows:
        lines.append(
            f"| {row['what']} | {row['ours']} | {row['peer'] or '—'} | {row['ratio'] or '—'} | "
            f"{row['target']} | {'met' if row['met'] else 'not met'} |"
        )
    return "\n".join(lines) + "\n"


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=5, help="repeats of each figure (default 5)")
    parser.add_argument("--quick", action="store_true", help="fewest repeats (3 whole-process pairs, 1 in-process)")
    parser.add_argument("--only", choices=("whole", "in-process"), help="one half of the figures only")
    parser.add_argument("--out", default=str(HERE / "RESULTS.md"), help="where the table is written")
    args = parser.parse_args()
    repeat = 3 if args.quick else args.repeat
    compileall.compile_dir(str(ROOT / "delay"), quiet=1)
    compileall.compile_dir(str(ROOT / "reports"), quiet=1)
    facts = machine()
    folder = Path(tempfile.mkdtemp(prefix="delay-bench-"))
    try:
        rows = whole_processes(folder, repeat, 1 if args.quick else 3) if args.only != "in-process" else []
        if args.only != "whole":
            rows += in_process(1 if args.quick else 3)
    finally:
        shutil.rmtree(folder, ignore_errors=True)
    options = " ".join(
        part
        for part in (
            f"--repeat {args.repeat}" if args.repeat != 5 and not args.quick else "",
            "--quick" if args.quick else "",
            f"--only {args.only}" if args.only else "",
        )
        if part
    )
    text = report(rows, facts, options)
    print()
    print(text)
    Path(args.out).write_text(text, encoding="utf-8")
    print(f"written to {args.out}")


if __name__ == "__main__":
    main()
