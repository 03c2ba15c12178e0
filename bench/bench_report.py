"""Benchmark of ``delay report`` (run by hand): build time and size of the report folder.

    /work/venv/bin/python bench/bench_report.py [--activities 10000] [--elements 5000]
        [--updates 6] [--seed 3] [--demo-only]

Builds the full report of the demo case, then of a synthetic case (delay.synth.synthesise:
``--activities`` activities, ``--updates`` monthly updates with an as-built record, and
``--elements`` model elements), each into a temporary folder, and prints for each:

- the time to load the case, the time of the analyses alone (``reports.builder.compute``,
  the peer: the work any report must do) and the time of the whole build, with the ratio of
  the build to the analyses (what the page, the workbook, the CSV files and the manifest
  add);
- the time to write the workbook beside ``pandas.DataFrame.to_excel`` of the same frames
  (openpyxl under both) as a peer;
- the size of report.html beside plotly.js alone (the inlined library, the peer), of
  tables.xlsx, of tables/ and of the whole folder.

The issue's targets are printed beside the figures (demo: under 20 s and 15 MB; the
synthetic case: under 40 MB); nothing is asserted.
"""

from __future__ import annotations

import argparse
import shutil
import tempfile
import time
import warnings
from pathlib import Path

import pandas as pd

from delay.case import load_case
from delay.synth import synthesise
from reports.builder import compute
from reports.tables import write_workbook
from reports.writer import build

DEMO = Path(__file__).resolve().parents[1] / "case_demo"
MB = 1024 * 1024


def _size(path: Path) -> int:
    if path.is_file():
        return path.stat().st_size
    return sum(p.stat().st_size for p in path.rglob("*") if p.is_file())


def measure(name: str, case_path: Path, work: Path, size_target_mb: float | None, time_target_s: float | None):
    from plotly.offline import get_plotlyjs

    started = time.perf_counter()
    case = load_case(case_path)
    loaded = time.perf_counter() - started

    started = time.perf_counter()
    content = compute(case)
    analyses = time.perf_counter() - started

    out = work / f"report-{name}"
    started = time.perf_counter()
    build(case, out)
    whole = time.perf_counter() - started

    started = time.perf_counter()
    write_workbook(content.tables, work / f"{name}-ours.xlsx")
    ours = time.perf_counter() - started
    started = time.perf_counter()
    warnings.filterwarnings("ignore", message="Cell contents too long")
    with pd.ExcelWriter(work / f"{name}-pandas.xlsx", engine="openpyxl") as writer:
        for table in content.tables:
            frame = table.frame.copy()
            for column in frame.columns:
                if frame[column].dtype == object and frame[column].map(lambda v: isinstance(v, (list, tuple))).any():
                    frame[column] = frame[column].map(
                        lambda v: "; ".join(map(str, v)) if isinstance(v, (list, tuple)) else v
                    )
            frame.to_excel(writer, sheet_name=table.key, index=False)
    peer = time.perf_counter() - started

    page = _size(out / "report.html")
    library = len(get_plotlyjs().encode("utf-8"))
    folder = _size(out)
    print(
        f"\n{name}: {len(case.baseline.activities):,} activities, {len(case.snapshots)} programmes"
        f"{' and an as-built record' if case.asbuilt_snapshot is not None else ''}, {len(case.elements):,} elements,"
        f" {len(content.tables)} tables"
    )
    print(f"  load the case           {loaded:7.2f} s")
    print(f"  analyses alone (peer)   {analyses:7.2f} s")
    line = f"  whole build             {whole:7.2f} s   ({whole / analyses:.2f} x the analyses)"
    if time_target_s is not None:
        line += f"   target under {time_target_s:.0f} s: {'met' if whole < time_target_s else 'NOT met'}"
    print(line)
    print(
        f"  workbook                {ours:7.2f} s   (pandas.to_excel of the same frames: {peer:.2f} s, "
        f"ratio {ours / peer:.2f})"
    )
    print(
        f"  report.html             {page / MB:7.2f} MB  (plotly.js alone: {library / MB:.2f} MB, "
        f"ratio {page / library:.2f})"
    )
    print(f"  tables.xlsx             {_size(out / 'tables.xlsx') / MB:7.2f} MB")
    print(f"  tables/*.csv            {_size(out / 'tables') / MB:7.2f} MB")
    line = f"  whole folder            {folder / MB:7.2f} MB"
    if size_target_mb is not None:
        line += f"   target under {size_target_mb:.0f} MB: {'met' if folder / MB < size_target_mb else 'NOT met'}"
    print(line)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--activities", type=int, default=10_000)
    parser.add_argument("--elements", type=int, default=5_000)
    parser.add_argument("--updates", type=int, default=6)
    parser.add_argument("--seed", type=int, default=3)
    parser.add_argument("--demo-only", action="store_true")
    arguments = parser.parse_args()
    work = Path(tempfile.mkdtemp(prefix="bench-report-"))
    try:
        # compiled loops are built (or read from numba's cache) and modules imported first
        compute(load_case(DEMO), "impacted")
        measure("demo", DEMO, work, 15, 20)
        if not arguments.demo_only:
            root = synthesise(
                work / "synthetic", arguments.activities, 2.5, arguments.updates, arguments.seed, arguments.elements
            )
            measure("synthetic", root, work, 40, None)
    finally:
        shutil.rmtree(work, ignore_errors=True)


if __name__ == "__main__":
    main()
