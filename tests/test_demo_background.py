"""The demo's IFC part runs in a process of its own, beside the rest of the demo.

What is checked: its outputs are the same bytes as the IFC part run in the demo's own
process; an error it meets reaches the demo as the same one-line problem, and the demo then
writes nothing; a stopped part leaves no process and no folder behind. The outputs
themselves are checked against the IFC standard in test_ifc_demo.py; this file checks only
that moving the work to another process changes nothing (an invariance, common practice
for a parallel step).
"""

from __future__ import annotations

import multiprocessing
import pickle
import shutil
from pathlib import Path

import pytest

pytest.importorskip("ifcopenshell")

from delay.case import load_case
from delay.demo import _IfcPart, run_demo
from delay.errors import CaseError, Problem
from delay.ifc import demo_outputs

DEMO = Path(__file__).resolve().parent.parent / "case_demo"


def test_a_case_error_crosses_a_process_with_its_problems():
    error = CaseError(
        [Problem("a.csv", "bad value", "give a number", row=3, column="days"), Problem("b.csv", "x", "y")]
    )
    again = pickle.loads(pickle.dumps(error))
    assert isinstance(again, CaseError)
    assert again.problems == error.problems
    assert str(again) == str(error)


def test_the_part_hands_back_what_it_writes_in_process(tmp_path):
    part = _IfcPart.start(load_case(DEMO))
    assert part is not None
    handed = part.files()
    part.stop()
    paths = demo_outputs(load_case(DEMO), tmp_path)
    here = {p.relative_to(tmp_path).as_posix(): p.read_bytes() for p in paths}
    assert sorted(handed) == sorted(here)
    for name in ("ifc/elements_from_model.csv", "ifc/elements_findings.csv", "ifc/element_checks.json"):
        assert handed[name] == here[name]
    assert not multiprocessing.active_children()


def test_an_error_of_the_part_stops_the_demo_with_its_problem_and_nothing_written(tmp_path):
    case = tmp_path / "case"
    shutil.copytree(DEMO, case)
    for model in (case / "model").glob("*.ifc"):
        model.write_text("not an ifc file", encoding="utf-8")
    out = tmp_path / "out"
    with pytest.raises(CaseError, match="cannot be read as an IFC file"):
        run_demo(case, out, echo=lambda line: None)
    assert not out.exists()
    assert sorted(p.name for p in tmp_path.iterdir()) == ["case"]  # no temporary left beside it
    assert not multiprocessing.active_children()


def test_a_part_stopped_early_leaves_no_process():
    part = _IfcPart.start(load_case(DEMO))
    part.stop()
    assert not multiprocessing.active_children()
