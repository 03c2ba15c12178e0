"""``delay report`` and ``delay verify``: the report a user hands on, and checking it later."""

from __future__ import annotations

import sys
from pathlib import Path

import click

from .common import EXIT_INPUT, load_case_argument, reports_input_errors

__all__ = ["report", "verify", "COMMANDS"]

METHODS_HELP = (
    "Methods to run, comma separated, among windows, impacted, tia, collapsed, asbuilt; default all "
    "that the case supports (windows needs two programmes; collapsed and asbuilt an as-built record)."
)


@click.command()
@click.argument("case", type=click.Path(exists=True))
@click.option(
    "--out",
    "out_dir",
    type=click.Path(),
    default="out/report",
    show_default=True,
    help="Folder for the report: new, empty, or an earlier output of the toolkit (replaced whole); "
    "never the case folder, inside it or above it.",
)
@click.option("--methods", default=None, metavar="M1,M2,...", help=METHODS_HELP)
@click.option("--title", default=None, help="Title of the report (default: 'Delay analysis: <project name>').")
@reports_input_errors
def report(case, out_dir, methods, title):
    """Write the delay analysis report of CASE into a folder.

    \b
    The folder holds:
      report.html    one self-contained page (opens offline in any browser): summary
                     with extension of time and money per method, schedule quality,
                     each method's results with its charts, the element timeline,
                     inputs and method, manifest; printable on A4 landscape
      tables.xlsx    every table of the report as a sheet, dates as dates
      tables/*.csv   every table as CSV (the text each fingerprint is made from;
                     text a spreadsheet would run as a formula starts with ')
      manifest.json  tool version, settings, SHA-256 of every input file and of
                     every file above, the time of the run and a fingerprint of
                     every table; the case by its folder's name and its place
                     relative to the report, never an absolute path
      delay-output.json  the marker of a folder the toolkit wrote

    Check the report later with: delay verify FOLDER. The folder is written under a
    temporary name and moved into place whole; on bad input nothing is written and each
    problem is printed on one line (exit status 2). A folder that holds anything the
    toolkit did not write is never replaced.

    Results depend on the records and on the method chosen; they are not legal advice. The
    contract, the applicable law and the analyst's professional judgement govern.
    """
    from reports.writer import build

    loaded = load_case_argument(case)
    folder = build(loaded, Path(out_dir), methods=methods, title=title, echo=click.echo)
    click.echo(f"Open {Path(folder) / 'report.html'} in a browser; check it later with: delay verify {folder}")


@click.command()
@click.argument("directory", type=click.Path(exists=True, file_okay=False))
@click.option(
    "--case",
    "case_path",
    type=click.Path(exists=True),
    default=None,
    help="The case folder or workbook, when it has moved since the report was made.",
)
@reports_input_errors
def verify(directory, case_path):
    """Check a report folder against the inputs it was made from.

    \b
    0. manifest.json is checked before anything is read through it: its size,
       its nesting, every key and type, every path (relative, inside its folder);
    1. every file of the report folder (report.html, tables.xlsx, tables/*.csv,
       ...) is hashed and compared with the manifest: changed, missing or added;
    2. the case is found beside the report where the manifest says (its path
       relative to the report) or where --case says, and every input file is
       hashed again (SHA-256);
    3. the analysis is re-run with the report's options, and every table's
       fingerprint is compared.

    Exit status 0 when everything matches; 1 with one line per difference (a file of the
    report changed, missing or added, an input changed, missing or added, a table that
    differs, is new or is gone); 2 with one line when the manifest is missing, unreadable
    or malformed, or the case cannot be found.
    """
    from reports.manifest import VerifyError
    from reports.manifest import verify as check

    try:
        result = check(Path(directory), case_path)
    except VerifyError as error:
        click.echo(f"error: {error}", err=True)
        sys.exit(EXIT_INPUT)
    for line in result.lines():
        click.echo(line)
    if not result.confirmed:
        sys.exit(1)


COMMANDS = (report, verify)
