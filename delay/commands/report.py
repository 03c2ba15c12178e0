"""``delay report`` and ``delay verify``: the report a user hands on, and checking it later."""

from __future__ import annotations

import sys
from pathlib import Path

import click

from .common import load_case_argument, reports_input_errors

__all__ = ["report", "verify", "COMMANDS"]

METHODS_HELP = ("Methods to run, comma separated, among windows, impacted, tia, collapsed, asbuilt; default all "
                "that the case supports (windows needs two programmes; collapsed and asbuilt an as-built record).")


@click.command()
@click.argument("case", type=click.Path(exists=True))
@click.option("--out", "out_dir", type=click.Path(file_okay=False), default="out/report", show_default=True,
              help="Folder for the report: new, empty, or an earlier report's folder (replaced whole).")
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
      tables/*.csv   every table as CSV (the text each fingerprint is made from)
      manifest.json  tool version, settings, SHA-256 of every input file, the time of
                     the run and a fingerprint of every table

    Check the report later with: delay verify FOLDER. The folder is written under a
    temporary name and moved into place whole; on bad input nothing is written and each
    problem is printed on one line (exit status 2).

    Results depend on the records and on the method chosen; they are not legal advice. The
    contract, the applicable law and the analyst's professional judgement govern.
    """
    from reports.writer import build

    loaded = load_case_argument(case)
    folder = build(loaded, Path(out_dir), methods=methods, title=title, echo=click.echo)
    click.echo(f"Open {Path(folder) / 'report.html'} in a browser; check it later with: delay verify {folder}")


@click.command()
@click.argument("directory", type=click.Path(exists=True, file_okay=False))
@click.option("--case", "case_path", type=click.Path(exists=True), default=None,
              help="The case folder or workbook, when it has moved since the report was made.")
@reports_input_errors
def verify(directory, case_path):
    """Check a report folder against the inputs it was made from.

    \b
    1. every input file named in manifest.json is hashed again (SHA-256);
    2. every tables/*.csv of the folder is compared with its fingerprint;
    3. the case is loaded again and the analysis re-run with the report's options, and
       every table's fingerprint is compared.

    Exit status 0 when everything matches; 1 with one line per difference (an input
    changed, missing or added, a table that differs, is new or is gone); 2 when the folder
    holds no readable manifest or the case cannot be found.
    """
    from reports.manifest import verify as check

    result = check(Path(directory), case_path)
    for line in result.lines():
        click.echo(line)
    if not result.confirmed:
        sys.exit(1)


COMMANDS = (report, verify)
