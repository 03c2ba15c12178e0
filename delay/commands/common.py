"""What every command shares: input errors as plain lines, tables that fit, case loading."""

from __future__ import annotations

import functools
import sys
from pathlib import Path

import click

from ..errors import CaseError, ReconciliationError
from ..output import OutputFailed, OutputRefused, describe_os_error

__all__ = ["EXIT_INPUT", "FORMAT", "reports_input_errors", "print_table", "load_case_argument"]

EXIT_INPUT = 2

FORMAT = click.Choice(["table", "csv", "json"])

#: Columns of free text: they wrap at a width of their own so the others keep theirs.
WIDE_COLUMNS = {
    "name",
    "title",
    "label",
    "reason",
    "note",
    "notes",
    "removed",
    "events",
    "activities",
    "concurrent with",
    "offending",
    "applied",
    "not_scored",
}


def _fail(lines: list[str]) -> None:
    for line in lines:
        click.echo(line, err=True)
    sys.exit(EXIT_INPUT)


def reports_input_errors(command):
    """Turn input problems into plain lines on stderr and a non-zero exit, never a traceback.

    A bad case (:class:`~delay.errors.CaseError`: one line per problem and a count), an
    output the policy refuses, a failed write or any other :class:`OSError` (one line
    each) exit with status 2 (:data:`EXIT_INPUT`). A
    :class:`~delay.errors.ReconciliationError` (figures that do not add up: a fault of the
    toolkit or a record it cannot reconcile) prints one line and exits with status 1.

    Parameters
    ----------
    command : callable
        A command function (below ``@click.command``).

    Returns
    -------
    callable
        The wrapped function, with the same name and docstring (``--help`` text).
    """

    @functools.wraps(command)
    def wrapper(*args, **kwargs):
        try:
            return command(*args, **kwargs)
        except CaseError as error:
            lines = [f"error: {problem}" for problem in error.problems]
            lines.append(f"{len(error.problems)} problem(s) found; nothing was written.")
            _fail(lines)
        except ReconciliationError as error:
            click.echo(
                f"error: {error} - the analysis was stopped; nothing was written. Please report this "
                "with the case, it is a fault of the toolkit or a record it cannot reconcile",
                err=True,
            )
            sys.exit(1)
        except (OutputRefused, OutputFailed) as error:
            _fail([f"error: {error}"])
        except OSError as error:  # reading an input, or writing outside delay.output
            _fail([f"error: {describe_os_error(error)}"])

    return wrapper


def _console():
    from rich.console import Console

    console = Console(soft_wrap=False)
    if not console.is_terminal:
        console = Console(soft_wrap=False, width=200)
    return console


def print_table(title: str, columns: list[str], rows: list[list], out=None) -> None:
    """Print a table that fits the terminal (rich); plain text beyond a few thousand rows.

    Free-text columns (``name``, ``title``, ``note`` ...) wrap at 48 characters; the others
    keep their width. Off a terminal the table is 200 characters wide.

    Parameters
    ----------
    title : str
        The table's title, printed above it.
    columns : list of str
        The column headings.
    rows : list of list
        The rows, one value per column; ``None`` prints as blank.
    out : rich.console.Console or None, optional
        Where to print the table; ``None`` for standard output. Beyond 3,000 rows the
        plain text always goes to standard output.
    """
    if len(rows) > 3000:
        widths = [max(len(c), *(len(str(r[i])) for r in rows)) for i, c in enumerate(columns)]
        click.echo(title)
        click.echo("  ".join(c.ljust(w) for c, w in zip(columns, widths)))
        for row in rows:
            click.echo("  ".join(str(v).ljust(w) for v, w in zip(row, widths)))
        return
    from rich.table import Table

    table = Table(title=title, title_justify="left", header_style="bold")
    for column in columns:
        wide = column in WIDE_COLUMNS
        table.add_column(column, overflow="fold", max_width=48 if wide else None, no_wrap=not wide)
    for row in rows:
        table.add_row(*("" if v is None else str(v) for v in row))
    (out or _console()).print(table)


def load_case_argument(case_path: str):
    """Load the case named on the command line.

    Parameters
    ----------
    case_path : str
        The case folder or workbook as given on the command line.

    Returns
    -------
    Case
        The loaded case (:func:`delay.case.load_case`).

    Raises
    ------
    CaseError
        When the case does not load; under :func:`reports_input_errors` it becomes plain
        lines and exit status 2.
    """
    from ..case import load_case

    return load_case(Path(case_path))
