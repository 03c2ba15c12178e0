"""Commands of the ``delay`` command line, one module per capability.

Each module defines click commands with the helpers of :mod:`delay.commands.common` and lists
them in ``COMMANDS``; :mod:`delay.cli` adds every listed command to the ``delay`` group.
"""

from __future__ import annotations

import importlib

#: Modules under delay.commands whose COMMANDS are added to the ``delay`` group, in order.
MODULES: tuple[str, ...] = ("retrospective", "check", "modelled", "ifc", "entitlement", "report")


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
