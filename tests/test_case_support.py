"""Shared rows for the case tests: one small valid case holding every file of the format.

The case is an invented quay-wall job of three activities: A (3 days) then B (2 days)
then the finish milestone M, on the Mon-Fri calendar from Monday 2025-01-06. The update
u1 has data date Monday 2025-02-03: A finished, B in progress with 1 day to go.
(Not a test module itself; the test modules import it.)
"""

from __future__ import annotations

import copy
import hashlib
from pathlib import Path

import pytest
from casewriter import write_case

from delay.case import load_case
from delay.errors import CaseError, Problem

__all__ = ["ACTIVITIES", "LINKS", "UPDATE", "FILES", "make_case", "problems_of", "problem_at"]

ACTIVITIES = [
    {"id": "A", "name": "Drive sheet piles", "duration": 3},
    {"id": "B", "name": "Cast capping beam", "duration": 2},
    {"id": "M", "name": "Quay wall complete", "duration": 0, "kind": "finish_milestone"},
]
LINKS = [{"pred": "A", "succ": "B"}, {"pred": "B", "succ": "M"}]
UPDATE_ACTIVITIES = [
    {**ACTIVITIES[0], "actual_start": "2025-01-06", "actual_finish": "2025-01-08", "remaining": 0},
    {**ACTIVITIES[1], "actual_start": "2025-01-09", "actual_finish": "", "remaining": 1},
    {**ACTIVITIES[2], "actual_start": "", "actual_finish": "", "remaining": ""},
]
UPDATE = {"u1": {"data_date": "2025-02-03", "label": "Update 01", "activities": UPDATE_ACTIVITIES}}

FILES = {
    "calendar_exceptions.csv": [
        {"calendar": "5d", "date": "2025-04-18", "working": "no", "reason": "public holiday"},
    ],
    "asbuilt.csv": [
        {"id": "A", "actual_start": "2025-01-06", "actual_finish": "2025-01-08", "source": "diary"},
        {"id": "B", "actual_start": "2025-01-09", "actual_finish": "2025-02-14", "source": "diary"},
        {"id": "M", "actual_start": "", "actual_finish": "2025-02-17", "source": "certificate"},
    ],
    "events.csv": [
        {
            "id": "E1",
            "title": "Late capping beam drawings",
            "party": "employer",
            "start": "2025-01-13",
            "finish": "2025-01-17",
            "activities": "B",
            "impact": "extend",
            "days": 3,
            "evidence": "RFI 7",
            "notified": "2025-01-14",
            "claimed_days": 4,
        },
        {
            "id": "E2",
            "title": "Redesign of anchors",
            "party": "employer",
            "start": "2025-01-20",
            "finish": "2025-01-24",
            "activities": "",
            "impact": "fragnet",
            "days": "",
            "evidence": "",
            "notified": "",
            "claimed_days": "",
        },
    ],
    "fragnets.csv": [
        {"event": "E2", "id": "F1", "name": "Install new anchors", "duration": 4, "calendar": "", "wbs": "W2"},
    ],
    "fragnet_links.csv": [
        {"event": "E2", "pred": "A", "succ": "F1", "type": "", "lag": ""},
        {"event": "E2", "pred": "F1", "succ": "B", "type": "FS", "lag": 0},
    ],
    "elements.csv": [
        {
            "id": "EL1",
            "name": "Sheet pile bay 1",
            "wbs": "W1",
            "classification": "Pr_20",
            "x": 0,
            "y": 0,
            "z": -12,
            "dx": 10,
            "dy": 0.6,
            "dz": 14,
            "level": "L0",
            "zone": "Z1",
        },
    ],
    "sections.csv": [
        {
            "section": "S1",
            "name": "Quay wall",
            "completion_activity": "M",
            "contract_completion": "2025-10-31",
            "liquidated_damages_per_day": 1500,
        },
    ],
    "extensions_granted.csv": [
        {"id": "X1", "granted_on": "2025-03-03", "days": 5, "section": "S1", "events": "E1", "reason": "first award"},
    ],
    "prolongation_rates.csv": [
        {"from": "2025-01-06", "to": "2025-06-30", "cost_per_day": 2500},
        {"from": "2025-07-01", "to": "2025-12-31", "cost_per_day": 2800},
    ],
}


def make_case(tmp_path: Path, *, files: dict | None = None, drop: tuple[str, ...] = (), **overrides) -> Path:
    """Write the full valid case, with ``files`` replacing or adding optional files and
    ``drop`` naming optional files to leave out; other keywords go to ``write_case``."""
    all_files = copy.deepcopy(FILES)
    all_files.update(files or {})
    for name in drop:
        all_files.pop(name, None)
    arguments = {"activities": ACTIVITIES, "links": LINKS, "snapshots": UPDATE}
    arguments.update(overrides)
    return write_case(tmp_path / "case", files=all_files, **arguments)


def problems_of(root) -> list[Problem]:
    """The problems ``load_case`` reports for ``root`` (it must fail)."""
    with pytest.raises(CaseError) as info:
        load_case(root)
    return list(info.value.problems)


def problem_at(root, file: str, row: int | None, column: str | None, words: str) -> Problem:
    """The one problem at ``file``/``row``/``column``; its message must contain ``words``.

    The same broken case is also run through the command line (``delay demo --case``),
    which must exit with status 2, print the problem as a plain line naming the file, row
    and column, show no traceback, write no output and leave the input files unchanged.
    """
    found = problems_of(root)
    here = [p for p in found if p.file == file and p.row == row and p.column == column]
    listing = "\n".join(str(p) for p in found)
    assert here, f"no problem at {file}, row {row}, column {column}; found:\n{listing}"
    assert any(words.lower() in p.message.lower() for p in here), listing
    problem = next(p for p in here if words.lower() in p.message.lower())
    _command_line_refuses(Path(root), problem)
    return problem


def _digest(root: Path) -> dict:
    if not root.exists():
        return {}
    if root.is_file():
        return {root.name: hashlib.sha256(root.read_bytes()).hexdigest()}
    return {
        str(p.relative_to(root)): hashlib.sha256(p.read_bytes()).hexdigest()
        for p in sorted(root.rglob("*"))
        if p.is_file()
    }


def _command_line_refuses(root: Path, problem: Problem) -> None:
    from click.testing import CliRunner

    from delay.cli import cli

    before = _digest(root)
    out = root.parent / f"{root.name}-demo-output"
    result = CliRunner().invoke(cli, ["demo", "--case", str(root), "--out", str(out)])
    assert result.exit_code == 2, result.output
    assert "Traceback" not in result.output
    if root.exists():  # a path that does not exist is refused by the argument parser itself
        assert str(problem) in result.output, result.output
    assert not out.exists(), "nothing may be written for a case with problems"
    assert _digest(root) == before, "input files must not change"
