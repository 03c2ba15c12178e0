"""Write small case folders for tests, in case-format version 2.

Every test that needs a case builds it here from plain rows, so the tests read as data:

    root = write_case(tmp_path, activities=[{"id": "A", "name": "Dig", "duration": 3}],
                      links=[])

``snapshots`` adds progress updates: a mapping of folder name to a dict with
``data_date``, ``activities`` and ``links`` (each defaults to the baseline's rows), and
optionally ``label`` and ``kind`` (default ``"update"``); ``data_date = None`` leaves the
data date out of snapshot.toml. Optional files are written only when their rows are given.

``write_text`` writes one file of a case as given, for inputs the helpers cannot express
(a broken header, a byte-order mark, bad TOML).
"""

from __future__ import annotations

import csv
from collections.abc import Iterable, Mapping
from pathlib import Path
from typing import Any

DEFAULT_CALENDARS = [
    {"calendar": "5d", "workdays": "Mon Tue Wed Thu Fri"},
    {"calendar": "7d", "workdays": "Mon Tue Wed Thu Fri Sat Sun"},
]


def task(activity_id: str, duration: int, **extra) -> dict:
    """An activity row: ``Work <id>`` of ``duration`` work days."""
    return {"id": activity_id, "name": f"Work {activity_id}", "duration": duration, **extra}


def finish_milestone(activity_id: str = "F", **extra) -> dict:
    """A finish milestone row."""
    return {"id": activity_id, "name": f"Milestone {activity_id}", "duration": 0, "kind": "finish_milestone", **extra}


def link(pred: str, succ: str, kind: str = "FS", lag: int = 0) -> dict:
    """A link row."""
    return {"pred": pred, "succ": succ, "type": kind, "lag": lag}


def progressed(row: Mapping[str, Any], actual_start=None, actual_finish=None, remaining=None) -> dict:
    """An update's row: the baseline row with its progress columns."""
    return {**row, "actual_start": actual_start, "actual_finish": actual_finish, "remaining": remaining}


def write_csv(path: Path, rows: Iterable[Mapping[str, Any]], columns: list[str] | None = None):
    rows = list(rows)
    if columns is None:
        columns = []
        for row in rows:
            for key in row:
                if key not in columns:
                    columns.append(key)
    path.parent.mkdir(parents=True, exist_ok=True)
    with path.open("w", newline="", encoding="utf-8") as handle:
        writer = csv.DictWriter(handle, fieldnames=columns)
        writer.writeheader()
        for row in rows:
            writer.writerow({k: ("" if row.get(k) is None else row.get(k)) for k in columns})
    return path


def _toml_value(value: Any) -> str:
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, (int, float)):
        return repr(value)
    text = str(value)
    if len(text) == 10 and text[4] == "-" and text[7] == "-":
        return text  # a TOML local date
    return '"' + text.replace("\\", "\\\\").replace('"', '\\"') + '"'


def write_toml(path: Path, sections: Mapping[str, Mapping[str, Any]]):
    lines = []
    for section, values in sections.items():
        if section:
            lines.append(f"[{section}]")
        for key, value in values.items():
            lines.append(f"{key} = {_toml_value(value)}")
        lines.append("")
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text("\n".join(lines), encoding="utf-8")
    return path


def write_case(
    root: Path,
    *,
    activities: list[Mapping[str, Any]],
    links: list[Mapping[str, Any]] = (),
    start: str = "2025-01-06",
    completion: str = "2025-12-19",
    schedule: Mapping[str, Any] | None = None,
    commercial: Mapping[str, Any] | None = None,
    analysis: Mapping[str, Any] | None = None,
    project: Mapping[str, Any] | None = None,
    report: Mapping[str, Any] | None = None,
    calendars: list[Mapping[str, Any]] | None = None,
    exceptions: list[Mapping[str, Any]] | None = None,
    snapshots: Mapping[str, Mapping[str, Any]] | None = None,
    files: Mapping[str, list[Mapping[str, Any]]] | None = None,
    name: str = "Test case",
) -> Path:
    """Write a case folder under ``root`` and return ``root``.

    ``files`` maps an optional file name (``"events.csv"``) to its rows. ``project`` adds
    keys to ``[project]`` (e.g. ``completion_activity``); ``analysis`` and ``report``
    write those sections when given.
    """
    root = Path(root)
    sections: dict[str, Mapping[str, Any]] = {
        "project": {"name": name, "contract_start": start, "contract_completion": completion, **(project or {})},
        "schedule": {"default_calendar": "5d", **(schedule or {})},
    }
    if commercial:
        sections["commercial"] = commercial
    if analysis:
        sections["analysis"] = analysis
    if report:
        sections["report"] = report
    write_toml(root / "case.toml", sections)
    write_csv(root / "calendars.csv", calendars or DEFAULT_CALENDARS, ["calendar", "workdays"])
    if exceptions is not None:
        write_csv(root / "calendar_exceptions.csv", exceptions, ["calendar", "date", "working", "reason"])
    link_columns = ["pred", "succ", "type", "lag"]
    activity_columns = ["id", "name", "duration"]
    base = root / "snapshots" / "baseline"
    write_toml(base / "snapshot.toml", {"": {"label": "Baseline", "data_date": start, "kind": "baseline"}})
    write_csv(base / "activities.csv", activities, _columns(activities, activity_columns))
    write_csv(base / "links.csv", links, _columns(links, link_columns))
    for folder, spec in (snapshots or {}).items():
        folder_path = root / "snapshots" / folder
        rows = spec.get("activities", activities)
        link_rows = spec.get("links", links)
        facts = {
            "label": spec.get("label", folder),
            "data_date": spec.get("data_date"),
            "kind": spec.get("kind", "update"),
        }
        write_toml(folder_path / "snapshot.toml", {"": {k: v for k, v in facts.items() if v is not None}})
        write_csv(folder_path / "activities.csv", rows, _columns(rows, activity_columns))
        write_csv(folder_path / "links.csv", link_rows, _columns(link_rows, link_columns))
    for file_name, rows in (files or {}).items():
        write_csv(root / file_name, rows)
    return root


def write_text(root: Path, relative: str, text: str, *, bom: bool = False) -> Path:
    """Write ``text`` to the file ``relative`` of the case at ``root`` (UTF-8)."""
    path = Path(root) / relative
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_bytes((b"\xef\xbb\xbf" if bom else b"") + text.encode("utf-8"))
    return path


def _columns(rows: Iterable[Mapping[str, Any]], required: list[str]) -> list[str]:
    columns = list(required)
    for row in rows:
        for key in row:
            if key not in columns:
                columns.append(key)
    return columns


def write_large_case(
    root: Path, *, activities: int = 50_000, links: int = 120_000, seed: int = 1, update: bool = False
) -> Path:
    """Write a large valid case (an invented programme) for load tests and benchmarks.

    Activity ``i`` is ``A000i``; every link runs from a lower to a higher number (so there
    is no loop) within 60 places, each pair once. With ``update``, a progress update with
    data date 2025-07-07 follows: the first fifth of the activities finished, the next
    hundred in progress (those of them with a duration), all on dates before the data date.
    """
    import random

    rng = random.Random(seed)
    root = Path(root)
    write_toml(
        root / "case.toml",
        {
            "project": {
                "name": "Large generated case",
                "contract_start": "2025-01-06",
                "contract_completion": "2027-12-17",
            },
            "schedule": {"default_calendar": "5d"},
        },
    )
    write_csv(root / "calendars.csv", DEFAULT_CALENDARS, ["calendar", "workdays"])
    ids = [f"A{i:06d}" for i in range(activities)]
    calendars = ["", "5d", "7d"]
    rows = [[ids[i], f"Activity {i}", rng.randint(0, 20), calendars[i % 3], f"W{i % 500}"] for i in range(activities)]
    pairs: set[tuple[int, int]] = set()
    while len(pairs) < links:
        first = rng.randrange(activities - 1)
        pairs.add((first, min(activities - 1, first + rng.randint(1, 60))))
    link_rows = [
        [ids[a], ids[b], ("FS", "FS", "FS", "SS", "FF")[(a + b) % 5], rng.randint(-2, 5)] for a, b in sorted(pairs)
    ]

    def write_snapshot(folder: str, facts: Mapping[str, Any], activity_rows, header):
        base = root / "snapshots" / folder
        write_toml(base / "snapshot.toml", {"": facts})
        with (base / "activities.csv").open("w", newline="", encoding="utf-8") as handle:
            writer = csv.writer(handle)
            writer.writerow(header)
            writer.writerows(activity_rows)
        with (base / "links.csv").open("w", newline="", encoding="utf-8") as handle:
            writer = csv.writer(handle)
            writer.writerow(["pred", "succ", "type", "lag"])
            writer.writerows(link_rows)

    write_snapshot(
        "baseline",
        {"label": "Baseline", "data_date": "2025-01-06", "kind": "baseline"},
        rows,
        ["id", "name", "duration", "calendar", "wbs"],
    )
    if update:
        finished = activities // 5
        progress = []
        for i, row in enumerate(rows):
            if i < finished:  # a milestone (duration 0) has one date
                extra = ["2025-02-03", "2025-03-03" if row[2] else "2025-02-03", 0]
            elif i < finished + 100 and row[2]:
                extra = ["2025-06-02", "", row[2]]
            else:
                extra = ["", "", ""]
            progress.append(row + extra)
        write_snapshot(
            "update_01",
            {"label": "Update 01", "data_date": "2025-07-07", "kind": "update"},
            progress,
            ["id", "name", "duration", "calendar", "wbs", "actual_start", "actual_finish", "remaining"],
        )
    return root
