"""Commands of the ``delay`` command line, one module per capability.

Each module defines click commands with the helpers of :mod:`delay.commands.common` and lists
them in ``COMMANDS``; the ``delay`` group of :mod:`delay.cli` finds each listed command
through :data:`COMMAND_MODULES`, importing its module only when the command runs.
"""

from __future__ import annotations

import importlib

#: Modules under delay.commands whose COMMANDS are added to the ``delay`` group, in order.
MODULES: tuple[str, ...] = ("retrospective", "check", "modelled", "ifc", "entitlement", "report")


#: The module of MODULES defining each of their commands, by command name: a command's
#: module is imported only when that command runs (or ``--help`` lists every command).
COMMAND_MODULES: dict[str, str] = {
    "windows": "retrospective",
    "asbuilt": "retrospective",
    "collapsed": "retrospective",
    "check": "check",
    "impacted": "modelled",
    "tia": "modelled",
    "import-ifc": "ifc",
    "import-ifc-schedule": "ifc",
    "export-ifc": "ifc",
    "entitlement": "entitlement",
    "compare": "entitlement",
    "report": "report",
    "verify": "report",
}

#: Former command names, still accepted: each runs the command it names (not listed in ``--help``).
ALIASES: dict[str, str] = {"impact": "impacted", "butfor": "collapsed"}


def all_commands():
    """Every command of every module in MODULES.

    Yields
    ------
    click.Command
        Each module's ``COMMANDS``, module by module in :data:`MODULES` order.
    """
    for name in MODULES:
        module = importlib.import_module(f"{__name__}.{name}")
        yield from module.COMMANDS


def command_named(name: str):
    """The command ``name`` of a module of MODULES, its module imported now.

    Parameters
    ----------
    name : str
        A command's name (``windows``, ``import-ifc``, ...).

    Returns
    -------
    click.Command or None
        The command; ``None`` when no module of MODULES defines it
        (:data:`COMMAND_MODULES`).
    """
    module_name = COMMAND_MODULES.get(name)
    if module_name is None:
        return None
    module = importlib.import_module(f"{__name__}.{module_name}")
    return next((command for command in module.COMMANDS if command.name == name), None)
