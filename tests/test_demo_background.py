"""Parts of the demo run in a process of their own, beside the rest of the demo.

Those parts are the figures under the other progress mode, the checks and the IFC outputs.
What is checked:
- each part hands back what the same part gives in the demo's own process: the same
  figures, the same checks, the same bytes;
- on a machine with one core, only the IFC part goes to the second process;
- an error the process meets reaches the demo as the same one-line problem, and the demo
  then writes nothing;
- a stopped process leaves no process and no folder behind.
The outputs themselves are checked elsewhere (the IFC standard in test_ifc_demo.py, the
methods in their own tests). This file checks only that moving the work to another process
changes nothing (an invariance, common practice for a parallel step).
"""

from __future__ import annotations

import multiprocessing
import pickle
import shutil
from pathlib import Path

import pandas as pd
import pytest

pytest.importorskip("ifcopenshell")

from delay import demo
from delay.case import load_case
from delay.checks import adopt_checks, run_all
from delay.comparison import adopt_other_progress_figures, available_methods, other_progress_figures, sensitivity
from delay.demo import _Beside, run_demo
from delay.errors import CaseError, DateBoundError, Problem, ReconciliationError
from delay.ifc import demo_outputs

DEMO = Path(__file__).resolve().parent.parent / "case_demo"


def test_the_other_errors_a_part_may_meet_cross_a_process_whole():
    bound = DateBoundError(False)
    again = pickle.loads(pickle.dumps(bound))
    assert isinstance(again, DateBoundError) and again.earlier is False and again.problems == bound.problems
    reconciling = ReconciliationError("window 2", {"charged_days": 9, "movement_days": 10})
    again = pickle.loads(pickle.dumps(reconciling))
    assert isinstance(again, ReconciliationError)
    assert (again.where, again.figures, str(again)) == ("window 2", reconciling.figures, str(reconciling))


def test_a_case_error_crosses_a_process_with_its_problems():
    error = CaseError(
        [Problem("a.csv", "bad value", "give a number", row=3, column="days"), Problem("b.csv", "x", "y")]
    )
    again = pickle.loads(pickle.dumps(error))
    assert isinstance(again, CaseError)
    assert again.problems == error.problems
    assert str(again) == str(error)


def test_each_part_hands_back_what_it_gives_in_process(tmp_path):
    case = load_case(DEMO)
    part = _Beside.start(case, DEMO)
    assert part is not None and part.methods == tuple(available_methods(case)) and part.checks and part.ifc
    part.adopt_figures(case)
    assert part.adopt_checks(case)
    handed = part.files()
    part.stop()
    fresh = load_case(DEMO)  # nothing adopted: computed here
    assert other_progress_figures(case, part.methods) == other_progress_figures(fresh, part.methods)
    assert run_all(case) == run_all(fresh)
    pd.testing.assert_frame_equal(sensitivity(case), sensitivity(fresh))
    paths = demo_outputs(fresh, tmp_path)
    here = {p.relative_to(tmp_path).as_posix(): p.read_bytes() for p in paths}
    assert sorted(handed) == sorted(here)
    for name in ("ifc/elements_from_model.csv", "ifc/elements_findings.csv", "ifc/element_checks.json"):
        assert handed[name] == here[name]
    assert not multiprocessing.active_children()


def test_on_one_core_only_the_ifc_part_goes_beside(monkeypatch):
    # the demo then makes the figures and the checks itself, through the same functions
    # whose results the test above compares
    monkeypatch.setattr(demo, "_cores", lambda: 1)
    part = _Beside.start(load_case(DEMO), DEMO)
    assert (part.methods, part.checks, part.ifc) == ((), False, True)
    case = load_case(DEMO)
    part.adopt_figures(case)  # nothing to wait for
    assert not part.adopt_checks(case)
    assert sorted(part.files())
    part.stop()
    assert not multiprocessing.active_children()


def test_figures_or_checks_that_do_not_fit_are_refused():
    case = load_case(DEMO)
    with pytest.raises(ValueError, match="do not fit"):
        adopt_other_progress_figures(case, ["windows", "tia"], {"windows": (0, 20, 6, 27000, 0)})
    with pytest.raises(ValueError, match="do not fit"):
        adopt_other_progress_figures(case, ["windows"], {"windows": (0, 20)})
    with pytest.raises(ValueError, match="not a result of the checks"):
        adopt_checks(case, {"snapshots": []})


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
    part = _Beside.start(load_case(DEMO), DEMO)
    part.stop()
    assert not multiprocessing.active_children()
