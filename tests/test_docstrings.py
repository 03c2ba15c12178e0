"""Every public function, method and class of delay/ and reports/ has a numpydoc docstring.

The reference is numpydoc's own validator, ``numpydoc.validate.validate`` (numpydoc
documentation, "Validation"; its error codes are listed in ``numpydoc.validate.ERROR_MSGS``).
The codes checked are those of the project's docstring style (DEVELOPERS.md, "Conventions"):

- GL08: the object has a docstring;
- SS01, SS03: it opens with a summary that ends with a period;
- GL02, GL03: its closing quotes sit on their own line, without blank lines between sections;
- PR01, PR02, PR10: its ``Parameters`` section names every parameter of the signature, no
  other, each as ``name : type``;
- RT01: a function that returns something has a ``Returns`` (or ``Yields``) section.

The objects checked are those a module exports: the names of its ``__all__`` (every name
without a leading underscore when it has none) that are defined in the module itself, and
the public methods of the classes among them. A name imported from another module is
checked where it is defined. A click command is not a function but a ``click.Command``
object: its docstring is the command's ``--help`` text, which numpydoc sections would
clutter, so commands are left out by type, not by name, and each module's test records
the ones it left out (``record_property``, shown in a JUnit XML report).
"""

from __future__ import annotations

import importlib
import inspect
from pathlib import Path

import click
import pytest
from numpydoc.validate import validate

ROOT = Path(__file__).resolve().parent.parent
PACKAGES = ("delay", "reports")
CODES = frozenset({"GL08", "PR01", "PR02", "PR10", "RT01", "SS01", "SS03", "GL02", "GL03"})


def _module_names() -> list[str]:
    names = []
    for package in PACKAGES:
        for path in sorted((ROOT / package).rglob("*.py")):
            parts = path.relative_to(ROOT).with_suffix("").parts
            if parts[-1] == "__init__":
                parts = parts[:-1]
            names.append(".".join(parts))
    return names


MODULES = _module_names()


def _public_objects(module) -> tuple[list[str], list[str]]:
    """The qualified names to validate, and the click commands left out."""
    names = getattr(module, "__all__", None) or [n for n in vars(module) if not n.startswith("_")]
    checked, commands = [], []
    for name in names:
        obj = getattr(module, name, None)
        if isinstance(obj, click.Command):
            if obj.callback is not None and obj.callback.__module__ == module.__name__:
                commands.append(name)
            continue
        if obj is None or getattr(obj, "__module__", None) != module.__name__:
            continue
        if inspect.isfunction(obj):
            checked.append(f"{module.__name__}.{name}")
        elif inspect.isclass(obj):
            checked.append(f"{module.__name__}.{name}")
            for attr, value in vars(obj).items():
                if not attr.startswith("_") and inspect.isfunction(value):
                    checked.append(f"{module.__name__}.{name}.{attr}")
    return checked, commands


def test_every_module_of_the_packages_is_found():
    # A package that moved or a glob that matched nothing would make the test below vacuous.
    assert "delay.cpm" in MODULES and "reports.builder" in MODULES


@pytest.mark.parametrize("module_name", MODULES)
def test_public_docstrings_follow_numpydoc(module_name, record_property):
    module = importlib.import_module(module_name)
    checked, commands = _public_objects(module)
    record_property("checked", len(checked))
    record_property("click_commands_left_out", ", ".join(commands))
    findings = []
    for qualname in checked:
        for code, message in validate(qualname)["errors"]:
            if code in CODES:
                findings.append(f"{qualname}: {code} {message}")
    assert not findings, f"{len(findings)} docstring findings in {module_name}:\n" + "\n".join(findings)
