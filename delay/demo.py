"""``delay demo``: every capability of the toolkit, run on one case.

The outputs go into a folder built under a temporary name and moved into place whole.
Each capability adds its outputs here as it is built.
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Callable

import pandas as pd

from .calendars import CalendarSet, build_calendars
from .case import load_case, summarise
from .cpm import prepare
from .output import replace_directory

__all__ = ["run_demo"]


def run_demo(case_path: Path, out_dir: Path, echo: Callable[[str], None] = print) -> list[Path]:
    """Run the demo on ``case_path``, writing into ``out_dir``; returns the files written.

    Raises
    ------
    CaseError
        When the case is invalid (nothing is written then).
    """
    case = load_case(case_path)
    echo(f"Loaded {case.settings.project.name}: {len(case.snapshots)} snapshots")
    written: list[Path] = []
    with replace_directory(out_dir) as folder:
        summary = summarise(case)
        (folder / "case_summary.json").write_text(json.dumps(summary, indent=2), encoding="utf-8")
        written.append(out_dir / "case_summary.json")

        schedules = folder / "schedules"
        schedules.mkdir()
        calendars = CalendarSet(build_calendars(case))
        trend = []
        snapshots = list(case.snapshots) + ([case.asbuilt_snapshot] if case.asbuilt_snapshot else [])
        for snap in snapshots:
            result = prepare(case, snap, calendars=calendars).run()
            frame = result.activities
            frame.to_csv(schedules / f"{snap.folder}.csv", index=False, date_format="%Y-%m-%d")
            (schedules / f"{snap.folder}.json").write_text(json.dumps(result.to_json(), indent=2), encoding="utf-8")
            written += [out_dir / "schedules" / f"{snap.folder}.csv", out_dir / "schedules" / f"{snap.folder}.json"]
            trend.append({
                "snapshot": snap.folder, "label": snap.label, "kind": snap.kind,
                "data_date": snap.data_date.isoformat(), "completion": result.completion.isoformat(),
                "critical_activities": int(frame["critical"].sum()),
                "driving_path_length": len(result.driving_path()),
            })
            echo(f"  {snap.label:<24} data date {snap.data_date}  completion {result.completion}")
        pd.DataFrame(trend).to_csv(folder / "completion_by_snapshot.csv", index=False)
        written.append(out_dir / "completion_by_snapshot.csv")
    return written
