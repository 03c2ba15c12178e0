"""The ``delay`` command: thin commands over the public API.

Every command that prints a table takes ``--format``; ``json`` gives the machine form.
Input problems print one plain line each (file, row, column, what is wrong, what to do) and
exit with status 2, never with a traceback. Every command that writes follows one output
policy (:mod:`delay.output`): a target that holds anything the toolkit did not write, the
case or an input is refused (one line, status 2); outputs are written under a temporary name
and moved into place, so a failed or interrupted run leaves nothing half-written; a failed
write is one line and status 2; Ctrl-C is one line and status 130 (SIGTERM 143).
"""

from __future__ import annotations

import dataclasses
import json
import sys
from pathlib import Path

import click

from . import __version__
from .commands import ALIASES, COMMAND_MODULES, command_named
from .commands.common import FORMAT, reports_input_errors
from .commands.common import load_case_argument as _load
from .commands.common import print_table as _print_table

__all__ = ["cli", "main"]


class _Commands(click.Group):
    """The ``delay`` group: a former command name (:data:`delay.commands.ALIASES`) runs the
    command it became, and ``--help`` lists each command once, by its name. The commands
    of :mod:`delay.commands` are imported when they run (:data:`COMMAND_MODULES`), so that
    a command pays for no other's imports."""

    def get_command(self, ctx, cmd_name):
        name = ALIASES.get(cmd_name, cmd_name)
        return super().get_command(ctx, name) or command_named(name)

    def list_commands(self, ctx):
        return sorted(set(super().list_commands(ctx)) | set(COMMAND_MODULES))

    def resolve_command(self, ctx, args):
        _, command, rest = super().resolve_command(ctx, args)
        return (command.name if command is not None else None), command, rest


@click.group(cls=_Commands, context_settings={"help_option_names": ["-h", "--help"], "max_content_width": 100})
@click.version_option(__version__, prog_name="delay")
def cli():
    """Forensic delay analysis of construction programmes.

    Point the toolkit at a case folder (or a case.xlsx workbook) holding the baseline
    programme, its progress updates, the as-built record, the delay event register and,
    optionally, model elements. It checks the records, schedules every programme with its own
    critical path method engine and applies recognised delay-analysis methods.

    \b
    Start here:
      delay new my_case          write an empty case to fill in
      delay validate my_case     check it and summarise what it holds
      delay schedule my_case     early and late dates, floats, driving path
      delay demo                 run everything on the bundled invented project

    Results depend on the records and on the method chosen; they are not legal advice. The
    contract, the applicable law and the analyst's professional judgement govern.
    """


@cli.command()
@click.argument("case", type=click.Path(exists=True, file_okay=True, dir_okay=True))
@click.option(
    "--format",
    "output_format",
    type=click.Choice(["table", "json"]),
    default="table",
    show_default=True,
    help="How to print the summary.",
)
@reports_input_errors
def validate(case, output_format):
    """Check a case and summarise it.

    Reads every file of the case folder (or the case.xlsx workbook), checks it against the
    case format and prints what it holds: snapshots with their data dates and activity
    counts, events, elements. Exit status 0 when the case is valid; 2 with one line per
    problem when it is not.
    """
    from .case import summarise

    summary = summarise(_load(case))
    if output_format == "json":
        click.echo(json.dumps(summary, indent=2))
        return
    _print_summary(summary)
    click.echo("The case is valid.")


def _print_summary(summary: dict) -> None:
    click.echo(f"Project: {summary.get('project', '')}")
    click.echo(f"Contract: {summary.get('contract_start', '')} to {summary.get('contract_completion', '')}")
    snapshots = list(summary.get("snapshots", []))
    if summary.get("asbuilt_snapshot"):
        snapshots.append(summary["asbuilt_snapshot"])
    rows = [
        [s.get("snapshot"), s.get("label"), s.get("kind"), s.get("data_date"), s.get("activities"), s.get("links")]
        for s in snapshots
    ]
    _print_table("Snapshots", ["folder", "label", "kind", "data date", "activities", "links"], rows)
    counts = [
        [key.replace("_", " "), value]
        for key, value in summary.items()
        if isinstance(value, int) and not isinstance(value, bool)
    ]
    if counts:
        _print_table("Records", ["record", "count"], counts)
    click.echo(
        "Completion activity: "
        + (summary.get("completion_activity") or "not named (the finish milestone that finishes last in the baseline)")
    )
    click.echo(f"Unexplained slippage carried by: {summary.get('unexplained_risk', '')}")
    click.echo(f"Preferred method: {summary.get('preferred_method') or 'none named'}")
    click.echo(f"Analyst's opinion (opinion.md): {'given' if summary.get('opinion') else 'none'}")
    _print_dialects(summary.get("input", []))


_DELIMITER_WORDS = {",": "comma", ";": "semicolon", "\t": "tab", "|": "vertical bar"}


def _print_dialects(dialects: list) -> None:
    """How each file was read, so that nothing is guessed silently."""
    rows = []
    for d in dialects:
        if d.get("delimiter_source") == "sheet":
            delimiter = encoding = "workbook sheet"
        else:
            delimiter = f"{_DELIMITER_WORDS.get(d.get('delimiter'), d.get('delimiter'))} ({d.get('delimiter_source')})"
            encoding = f"{d.get('encoding')} ({d.get('encoding_source')})"
        renamed = ", ".join(f"{k} -> {v}" for k, v in d.get("renamed", {}).items())
        rows.append(
            [
                d.get("file"),
                delimiter,
                encoding,
                d.get("date_format"),
                d.get("decimal"),
                f"headers read as: {renamed}" if renamed else "",
            ]
        )
    if rows:  # "note" is a column that wraps (commands.common.WIDE_COLUMNS)
        _print_table(
            "How the files were read", ["file", "delimiter", "encoding", "date format", "decimal", "note"], rows
        )


@cli.command()
@click.argument("directory", type=click.Path())
@reports_input_errors
def new(directory):
    """Write an empty, valid case skeleton into DIRECTORY.

    Every file of the case format is written with its header row, a baseline snapshot with
    one start milestone, a case.toml with every setting explained, and a text file that
    explains each column. DIRECTORY must be new or empty.
    """
    from .output import check_folder_target
    from .skeleton import write_skeleton

    check_folder_target(Path(directory), earlier=False)  # one line when it is not new or empty
    path = write_skeleton(Path(directory))
    click.echo(f"Wrote an empty case to {path}. Fill in the CSV files, then run: delay validate {path}")


def _schedule_settings(case, progress, float_to, lag_calendar):
    settings = case.settings.schedule
    changes = {k: v for k, v in {"progress": progress, "float_to": float_to, "lag_calendar": lag_calendar}.items() if v}
    return dataclasses.replace(settings, **changes) if changes else settings


@cli.command()
@click.argument("case", type=click.Path(exists=True))
@click.option(
    "--snapshot",
    default="baseline",
    show_default=True,
    help="Folder name under snapshots/ or label; 'asbuilt' for the as-built record.",
)
@click.option("--format", "output_format", type=FORMAT, default="table", show_default=True)
@click.option(
    "--progress",
    type=click.Choice(["retained_logic", "progress_override"]),
    help="Override how out-of-sequence progress is scheduled.",
)
@click.option(
    "--float-to",
    type=click.Choice(["project_finish", "contract_completion"]),
    help="Override where the backward pass starts.",
)
@click.option(
    "--lag-calendar", type=click.Choice(["successor", "predecessor"]), help="Override whose calendar counts a lag."
)
@reports_input_errors
def schedule(case, snapshot, output_format, progress, float_to, lag_calendar):
    """Schedule one snapshot by the critical path method.

    Prints early and late start and finish, total and free float and the critical flag of
    every activity, the driving path first, then the completion date. Floats are in work
    days of the activity's own calendar; complete activities have no float.
    """
    from .cpm import schedule as run_schedule

    loaded = _load(case)
    result = run_schedule(loaded, snapshot, _schedule_settings(loaded, progress, float_to, lag_calendar))
    if output_format == "json":
        click.echo(result.to_json_text(indent=2))  # json.dumps(result.to_json()) to the byte, from whole columns
        return
    frame = _schedule_rows(result)
    if output_format == "csv":
        from .cpm import _find
        from .output import csv_text

        frame = _with_unknown_columns(frame, _find(loaded, snapshot)).rename(columns={"id": "activity"})
        click.echo(csv_text(frame, date_format="%Y-%m-%d"), nl=False)
        return
    from .convert import text_cell

    columns = [
        "id",
        "name",
        "status",
        "early_start",
        "early_finish",
        "late_start",
        "late_finish",
        "total_float",
        "free_float",
        "critical",
        "driving",
    ]
    rows = [[text_cell(v) for v in row] for row in frame[columns].itertuples(index=False)]
    _print_table(
        f"{result.snapshot}: data date {result.data_date}, completion {result.completion}",
        [c.replace("_", " ") for c in columns],
        rows,
    )
    click.echo(f"Completion: {result.completion}  (driving path of {len(result.driving_path())} activities)")


def _schedule_rows(result):
    """The schedule table, driving path first (in logic order), then by early start."""
    import pandas as pd

    frame = result.activities
    path = result.driving_path()
    position = pd.Series(range(len(path)), index=path)
    frame = frame.assign(_path=frame["id"].map(position))
    frame = frame.sort_values(["_path", "early_start", "id"], na_position="last", kind="stable")
    return frame.drop(columns="_path").reset_index(drop=True)


def _with_unknown_columns(frame, snap):
    """The schedule with the snapshot's columns the toolkit does not know carried along, by
    activity id (a name the schedule uses already gets `` (input)``)."""
    from .model import COLUMNS

    activities = snap.activities
    unknown = [c for c in activities.columns if c not in COLUMNS["activities"]]
    if not unknown:
        return frame
    extra = activities[["id", *unknown]].drop_duplicates("id")
    extra = extra.rename(columns={c: f"{c} (input)" for c in unknown if c in frame.columns})
    return frame.merge(extra, on="id", how="left", sort=False)


@cli.command()
@click.argument("out", type=click.Path())
@click.option("--activities", type=click.IntRange(2, 5_000_000), required=True, help="Number of activities.")
@click.option("--links-per-activity", type=click.FloatRange(1.0, 20.0), default=2.5, show_default=True)
@click.option(
    "--updates",
    type=click.IntRange(0, 240),
    default=0,
    show_default=True,
    help="Monthly progress updates to write (with an as-built record when > 0).",
)
@click.option(
    "--elements",
    type=click.IntRange(0, 5_000_000),
    default=0,
    show_default=True,
    help="Model elements to write, linked to the activities by wbs.",
)
@click.option("--seed", type=int, default=0, show_default=True, help="Random seed; same seed, same case.")
@reports_input_errors
def synth(out, activities, links_per_activity, updates, elements, seed):
    """Write a valid random case of any size into OUT (for benchmarks and trying scale)."""
    from .synth import synthesise

    path = synthesise(Path(out), activities, links_per_activity, updates, seed, elements)
    click.echo(f"Wrote a synthetic case of {activities} activities to {path}")


def _demo_case() -> Path:
    here = Path(__file__).resolve().parent.parent / "case_demo"
    for candidate in (here, Path.cwd() / "case_demo"):
        if (candidate / "case.toml").exists():
            return candidate
    raise click.ClickException("the demo case was not found: run from the project folder or pass --case")


@cli.command()
@click.option(
    "--out",
    "out_dir",
    type=click.Path(),
    default="out/demo",
    show_default=True,
    help="Folder for the outputs: new, empty or an earlier output of the toolkit (replaced whole "
    "when the run succeeds); never the case folder, inside it or above it.",
)
@click.option(
    "--case",
    "case_path",
    type=click.Path(exists=True),
    default=None,
    help="Another case to run instead of the bundled demo.",
)
@reports_input_errors
def demo(out_dir, case_path):
    """Run everything the toolkit can do on the bundled invented demo project.

    Validates the demo case, schedules every snapshot, runs the windows analysis and the
    as-planned versus as-built comparison, and writes the results under out/demo/ (or
    --out): the case summary, each snapshot's schedule as CSV and JSON, the completion date
    of every snapshot, the windows and their charges, the as-built critical path, the
    modelled methods, entitlement and the method comparison, and the full report in
    out/demo/report/ (report.html, tables.xlsx, tables/*.csv, manifest.json).
    """
    from .demo import run_demo

    case = Path(case_path) if case_path else _demo_case()
    written = run_demo(case, Path(out_dir), echo=click.echo, extra=_demo_report)
    click.echo(f"Wrote {len(written)} files to {out_dir} and the report to {Path(out_dir) / 'report' / 'report.html'}")


def _demo_report(case, folder: Path, out_dir: Path) -> list[Path]:
    """The demo's full report, written into the demo's folder as it is built."""
    from reports.builder import compute  # the report builder sits downstream of delay
    from reports.writer import REPORT_FILE, demo_title, write_report

    click.echo(f"Analysing {case.settings.project.name} for the report")
    content = compute(case, None, demo_title(case))
    click.echo(f"Writing the report: {len(content.tables)} tables")
    write_report(content, folder / "report", out_dir / "report")
    return [out_dir / "report" / REPORT_FILE]


def main() -> None:
    """Run the ``delay`` command on the process's arguments (the console script's entry).

    Ctrl-C and SIGTERM end it with one line (status 130 or 143) after every temporary
    output is removed; an output refused, a failed write or another ``OSError`` is one line
    on standard error and status 2 even where a command did not catch it. Bad input is
    reported by the commands themselves (one line per problem, status 2).

    Raises
    ------
    SystemExit
        Always: with click's status (0 on success) or with the status above.
    """
    from .output import Interrupted, OutputFailed, OutputRefused, describe_os_error, install_signal_handlers

    install_signal_handlers()
    try:
        cli(prog_name="delay")
    except Interrupted as stop:
        click.echo(f"error: {stop}", err=True)
        sys.exit(stop.exit_status)
    except (OutputRefused, OutputFailed) as error:
        click.echo(f"error: {error}", err=True)
        sys.exit(2)
    except OSError as error:
        click.echo(f"error: {describe_os_error(error)}", err=True)
        sys.exit(2)


if __name__ == "__main__":
    main()
