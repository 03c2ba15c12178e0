"""Without the ``ifc`` extra the toolkit works and the IFC commands say what to install.

These tests hide ifcopenshell (a None entry in sys.modules makes ``import ifcopenshell``
raise ImportError, as the Python import system documents), so they run whether or not the
extra is installed.
"""

from __future__ import annotations

import subprocess
import sys

import pytest
from casewriter import write_case
from click.testing import CliRunner

from delay.commands import ifc as commands

ACTIVITIES = [
    {"id": "S", "name": "Start", "duration": 0, "kind": "start_milestone"},
    {"id": "A", "name": "Work", "duration": 2},
]
LINKS = [{"pred": "S", "succ": "A"}]


@pytest.fixture
def without_ifcopenshell(monkeypatch):
    for name in list(sys.modules):
        if name == "ifcopenshell" or name.startswith("ifcopenshell."):
            monkeypatch.delitem(sys.modules, name)
    monkeypatch.setitem(sys.modules, "ifcopenshell", None)


@pytest.mark.parametrize(
    "command, arguments",
    [
        (commands.import_ifc, ["model.ifc", "{case}"]),
        (commands.import_ifc_schedule, ["model.ifc", "{case}", "--snapshot", "u1"]),
        (commands.export_ifc, ["{case}", "out.ifc"]),
    ],
)
def test_a_command_without_the_extra_prints_one_line_and_exits_2(tmp_path, without_ifcopenshell, command, arguments):
    case = write_case(tmp_path / "case", activities=ACTIVITIES, links=LINKS)
    (tmp_path / "model.ifc").write_text("not read\n", encoding="utf-8")
    args = [a.format(case=case) if "{case}" in a else str(tmp_path / a) if a.endswith(".ifc") else a for a in arguments]
    result = CliRunner().invoke(command, args, catch_exceptions=False)
    assert result.exit_code == 2
    lines = [line for line in result.output.splitlines() if line.strip()]
    assert len(lines) == 1 and "install the ifc extra: pip install .[ifc]" in lines[0]
    assert not (tmp_path / "out.ifc").exists() and not (case / "snapshots" / "u1").exists()


def test_the_package_imports_without_the_extra(without_ifcopenshell):
    from delay import ifc

    assert ifc.available() is False
    with pytest.raises(ifc.IfcExtraMissing):
        ifc.require_ifcopenshell()


def test_the_rest_of_the_toolkit_never_imports_ifcopenshell():
    # A fresh interpreter: load the command line and schedule a case; ifcopenshell stays unloaded.
    code = (
        "import sys, delay.cli, delay.cpm, delay.case, delay.commands.ifc, delay.ifc; "
        "print('ifcopenshell' in sys.modules)"
    )
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120)
    assert done.returncode == 0, done.stderr
    assert done.stdout.strip() == "False"
