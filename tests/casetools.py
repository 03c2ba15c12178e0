"""Copies of a case folder with facts left alone and form changed, for invariance tests.

Each helper copies ``source`` to ``target`` and changes the copy only:

- :func:`shift_dates`: every ISO date of every CSV and TOML file moved by a number of days
  (whole weeks keep every weekday, so work days and holidays fall alike);
- :func:`rename_activities`: every activity id given a prefix, wherever ids appear
  (activities, links, the as-built record, events, fragnets, attributions, sections);
- :func:`add_milestone_constraints`: a ``latest_finish`` on every finish milestone of every
  programme, dated a number of days from the baseline's completion.
"""

from __future__ import annotations

import csv
import datetime as dt
import re
import shutil
from pathlib import Path

__all__ = ["shift_dates", "rename_activities", "add_milestone_constraints"]

_DATE = re.compile(r"\b(\d{4})-(\d{2})-(\d{2})\b")


def _copy(source: Path, target: Path) -> Path:
    shutil.copytree(source, target)
    return target


def shift_dates(source: Path, target: Path, days: int) -> Path:
    """A copy of the case with every date moved by ``days``."""
    _copy(source, target)

    def moved(match: re.Match) -> str:
        return (dt.date(*map(int, match.groups())) + dt.timedelta(days=days)).isoformat()

    for path in list(target.rglob("*.csv")) + list(target.rglob("*.toml")):
        path.write_text(_DATE.sub(moved, path.read_text(encoding="utf-8")), encoding="utf-8")
    return target


def _rewrite(path: Path, change) -> None:
    with path.open(encoding="utf-8-sig", newline="") as handle:
        rows = list(csv.DictReader(handle))
        columns = list(rows[0]) if rows else None
    if not rows:
        return
    rows = [change(row) for row in rows]
    with path.open("w", encoding="utf-8", newline="") as handle:
        writer = csv.DictWriter(handle, fieldnames=columns)
        writer.writeheader()
        writer.writerows(rows)


def rename_activities(source: Path, target: Path, prefix: str) -> Path:
    """A copy of the case with every activity id given ``prefix``."""
    _copy(source, target)

    def one(value: str) -> str:
        return prefix + value if value else value

    def many(value: str) -> str:
        return ";".join(one(v.strip()) for v in value.split(";")) if value else value

    columns = {
        "activities.csv": {"id": one},
        "links.csv": {"pred": one, "succ": one},
        "asbuilt.csv": {"id": one},
        "events.csv": {"activities": many, "asbuilt_activities": many},
        "fragnet_links.csv": {"pred": one, "succ": one},
        "fragnets.csv": {"id": one},
        "attributions.csv": {"activity": one},
        "sections.csv": {"completion_activity": one},
    }
    for path in target.rglob("*.csv"):
        rules = columns.get(path.name)
        if rules:
            _rewrite(path, lambda row, rules=rules: {k: (rules[k](v) if k in rules else v) for k, v in row.items()})
    corrections = target / "corrections.csv"
    if corrections.exists():
        _rewrite(corrections, lambda row: {**row, "key": ">".join(one(k) for k in row["key"].split(">"))})
    toml = target / "case.toml"
    text = toml.read_text(encoding="utf-8")
    toml.write_text(re.sub(r'(completion_activity\s*=\s*")', r"\g<1>" + prefix, text), encoding="utf-8")
    return target


def add_milestone_constraints(source: Path, target: Path, offset: int) -> Path:
    """A copy of the case with a ``latest_finish`` on every finish milestone of every
    programme (zero-duration activities with a predecessor, or of kind finish_milestone),
    ``offset`` days from the baseline's planned completion (read from the case: the latest
    ``constraint_date``-free early finish is not known here, so the contract completion of
    case.toml is used)."""
    _copy(source, target)
    text = (target / "case.toml").read_text(encoding="utf-8")
    contract = dt.date.fromisoformat(re.search(r"contract_completion\s*=\s*(\d{4}-\d{2}-\d{2})", text).group(1))
    date = (contract + dt.timedelta(days=offset)).isoformat()
    for path in target.glob("snapshots/*/activities.csv"):
        links = path.with_name("links.csv")
        with links.open(encoding="utf-8-sig", newline="") as handle:
            has_pred = {row["succ"] for row in csv.DictReader(handle)}

        def constrain(row: dict, has_pred=has_pred) -> dict:
            milestone = row.get("kind") == "finish_milestone" or (row.get("duration") == "0" and row["id"] in has_pred)
            if milestone and not row.get("constraint"):
                return {**row, "constraint": "latest_finish", "constraint_date": date}
            return row

        _rewrite(path, constrain)
    return target
