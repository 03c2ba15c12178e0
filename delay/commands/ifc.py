"""``delay import-ifc``, ``delay import-ifc-schedule`` and ``delay export-ifc``: IFC models and
work schedules (ISO 16739, the open standard), through the optional ``ifc`` extra."""

from __future__ import annotations

import functools
import json
import sys
from pathlib import Path

import click

from .common import EXIT_INPUT, load_case_argument, print_table, reports_input_errors

_SHOWN_FINDINGS = 40


def needs_ifc_extra(command):
    """Without ifcopenshell: one plain line and exit status 2.

    Parameters
    ----------
    command : callable
        A command function that needs the IFC extra (ifcopenshell).

    Returns
    -------
    callable
        The wrapped function: when it raises :class:`delay.ifc.IfcExtraMissing`, the error
        is printed on stderr as ``error: ...`` and the process exits with
        :data:`~delay.commands.common.EXIT_INPUT` (2).
    """

    @functools.wraps(command)
    def wrapper(*args, **kwargs):
        from ..ifc import IfcExtraMissing

        try:
            return command(*args, **kwargs)
        except IfcExtraMissing as error:
            click.echo(f"error: {error}", err=True)
            sys.exit(EXIT_INPUT)

    return wrapper


def _print_findings(findings, title: str, output_format: str) -> None:
    if output_format == "json" or not len(findings):
        return
    shown = findings.head(_SHOWN_FINDINGS)
    print_table(
        title,
        ["kind", "entity", "subject", "message"],
        [[r.kind, r.entity, r.subject, r.message] for r in shown.itertuples(index=False)],
    )
    if len(findings) > _SHOWN_FINDINGS:
        click.echo(f"... and {len(findings) - _SHOWN_FINDINGS} more findings.")


def _progress_bar(description: str):
    """A rich progress bar on stderr when it is a terminal; callbacks (on_total, advance)."""
    from rich.console import Console
    from rich.progress import BarColumn, MofNCompleteColumn, Progress, TextColumn, TimeRemainingColumn

    console = Console(stderr=True)
    progress = Progress(
        TextColumn("{task.description}"),
        BarColumn(),
        MofNCompleteColumn(),
        TimeRemainingColumn(),
        console=console,
        transient=True,
        disable=not console.is_terminal,
    )
    task = progress.add_task(description, total=None)
    return progress, (lambda total: progress.update(task, total=total)), (lambda n: progress.advance(task, n))


@click.command("import-ifc")
@click.argument("model", type=click.Path(dir_okay=False))
@click.argument("case", type=click.Path(exists=True))
@click.option(
    "--code-property",
    metavar="PSET.NAME",
    default=None,
    help="The property that carries each element's work breakdown code, e.g. Pset_Codes.WBS.",
)
@click.option(
    "--classification",
    "classification",
    metavar="SYSTEM",
    default=None,
    help="The classification system (IfcClassification Name) for the classification column, when the "
    "model uses several.",
)
@click.option(
    "--code-classification",
    metavar="SYSTEM",
    default=None,
    help="A classification system whose reference is the work breakdown code.",
)
@click.option("--format", "output_format", type=click.Choice(["table", "json"]), default="table", show_default=True)
@needs_ifc_extra
@reports_input_errors
def import_ifc(model, case, code_property, classification, code_classification, output_format):
    """Read the physical elements of an IFC model into the case's elements.csv.

    Every IfcElement that is not an opening or a virtual element (walls, slabs, columns,
    beams, doors, windows, coverings, distribution elements, ...) becomes a row: its GlobalId
    as id, its name, IFC class, classification reference, storey as level, spatial zone, and
    the axis-aligned box of its geometry in world coordinates, in metres. Its work breakdown
    code - the link to the programme - comes from --code-property, else from
    --code-classification, else from the task that builds it (an IfcTask assigned to it whose
    Identification is an activity of the baseline).

    Rows already in elements.csv whose id is not in the model are kept; rows with the same id
    are replaced. Elements without geometry (written without a box) or without a code (not
    written) are findings, listed and written to elements_findings.csv.
    """
    from ..ifc import import_model

    progress, on_total, advance = _progress_bar("Reading element geometry")
    with progress:
        result = import_model(
            Path(model),
            Path(case),
            code_property=code_property,
            classification=classification,
            code_classification=code_classification,
            progress=advance,
            on_total=on_total,
        )
    read = result.read
    summary = {
        "model": str(model),
        "schema": read.schema,
        "length_unit_in_metres": read.length_unit_in_metres,
        "physical_elements": read.physical_elements,
        "elements_written": int(len(read.elements)),
        "replaced": result.replaced,
        "added": result.added,
        "elements_in_case": int(len(result.elements)),
        "findings": read.findings.to_dict("records"),
        "written": [str(p) for p in result.written],
    }
    if output_format == "json":
        click.echo(json.dumps(summary, indent=2))
        return
    _print_findings(read.findings, "Findings (not errors)", output_format)
    counts = read.findings["kind"].value_counts().to_dict() if len(read.findings) else {}
    click.echo(
        f"Read {read.physical_elements} physical elements from {model} ({read.schema}, length unit "
        f"{read.length_unit_in_metres:g} m): {len(read.elements)} written, {result.replaced} replaced, "
        f"{result.added} added; elements.csv now holds {len(result.elements)} elements."
    )
    if counts:
        click.echo(
            "Findings: "
            + ", ".join(f"{k} {v}" for k, v in counts.items())
            + f" (see {Path(case) / 'elements_findings.csv'})."
        )


@click.command("import-ifc-schedule")
@click.argument("model", type=click.Path(dir_okay=False))
@click.argument("case", type=click.Path(exists=True))
@click.option(
    "--snapshot",
    "folder",
    required=True,
    metavar="FOLDER",
    help="The snapshot folder to write under snapshots/ (e.g. 2025-06-30, or baseline).",
)
@click.option(
    "--data-date", default=None, metavar="YYYY-MM-DD", help="The snapshot's data date; default the one the file gives."
)
@click.option("--label", default=None, help="The snapshot's label; default the folder name.")
@click.option(
    "--kind",
    type=click.Choice(["baseline", "update"]),
    default=None,
    help="Default: baseline for the folder 'baseline', else update.",
)
@click.option(
    "--work-schedule",
    default=None,
    metavar="NAME",
    help="Which IfcWorkSchedule (Name, Identification or GlobalId) when the file holds several.",
)
@click.option("--replace", is_flag=True, help="Replace the snapshot folder when it exists.")
@click.option("--format", "output_format", type=click.Choice(["table", "json"]), default="table", show_default=True)
@needs_ifc_extra
@reports_input_errors
def import_ifc_schedule(model, case, folder, data_date, label, kind, work_schedule, replace, output_format):
    """Read an IFC work schedule into a snapshot folder of the case.

    Tasks become activities (Identification as id, ScheduleDuration in work days, actual
    dates, RemainingTime, IsMilestone), IfcRelSequence links with their SequenceType and
    TimeLag become links, and the IfcWorkCalendar of the tasks becomes a calendar of the case
    (added to calendars.csv and calendar_exceptions.csv when the case has no equal one). What
    cannot be mapped is listed as findings and written to ifc_findings.csv in the folder. The
    snapshot is checked like any other before it is written, and then compared with the
    toolkit's own schedule of it.
    """
    from ..ifc import import_work_schedule

    result = import_work_schedule(
        Path(model),
        Path(case),
        folder,
        data_date=data_date,
        label=label,
        kind=kind,
        work_schedule=work_schedule,
        replace=replace,
    )
    if output_format == "json":
        click.echo(
            json.dumps(
                {
                    "snapshot": folder,
                    "label": result.label,
                    "kind": result.kind,
                    "data_date": result.data_date.isoformat(),
                    "work_schedule": result.read.name,
                    "activities": int(len(result.read.activities)),
                    "links": int(len(result.read.links)),
                    "calendars_added": list(result.calendars_added),
                    "findings": result.findings.to_dict("records"),
                    "written": [str(p) for p in result.written],
                },
                indent=2,
            )
        )
        return
    _print_findings(result.findings, "Findings (not errors)", output_format)
    click.echo(
        f"Wrote snapshots/{folder} ({result.kind}, data date {result.data_date}) from the work schedule "
        f"'{result.read.name}': {len(result.read.activities)} activities, {len(result.read.links)} links"
        + (f"; calendars added: {', '.join(result.calendars_added)}" if result.calendars_added else "")
        + "."
    )


@click.command("export-ifc")
@click.argument("case", type=click.Path(exists=True))
@click.argument("out", type=click.Path())
@click.option(
    "--snapshot",
    default="baseline",
    show_default=True,
    help="Folder name under snapshots/ or label; 'asbuilt' for the as-built record.",
)
@click.option(
    "--model",
    "model_path",
    type=click.Path(dir_okay=False, exists=True),
    default=None,
    help="An IFC 4 model to add the schedule to (default: the model the elements were imported from, "
    "when it is still there).",
)
@click.option(
    "--placeholders", is_flag=True, help="Write placeholders from elements.csv even when the imported model is there."
)
@click.option("--format", "output_format", type=click.Choice(["table", "json"]), default="table", show_default=True)
@needs_ifc_extra
@reports_input_errors
def export_ifc(case, out, snapshot, model_path, placeholders, output_format):
    """Write a snapshot's schedule as an IFC 4 work schedule, tasks assigned to the elements.

    The snapshot is scheduled by the critical path method; each task's IfcTaskTime holds the
    early dates (ScheduleStart/Finish), late dates, total and free float in work days,
    IsCritical, actual dates and remaining time; links become IfcRelSequence with their lags,
    calendars IfcWorkCalendar. Each element is assigned to the tasks that share its wbs
    (IfcRelAssignsToProduct): elements of the imported model by GlobalId, the others as
    IfcBuildingElementProxy placeholders with their boxes. A model viewer can then play the
    sequence. What IfcTaskTime cannot hold goes in the property set DelayToolkit_Scheduling.
    """
    from ..ifc import export_schedule

    loaded = load_case_argument(case)
    result = export_schedule(
        loaded, snapshot, Path(out), model=Path(model_path) if model_path else None, use_imported_model=not placeholders
    )
    facts = {
        "path": str(result.path),
        "tasks": result.tasks,
        "links": result.links,
        "calendars": result.calendars,
        "model": str(result.model) if result.model else None,
        "model_elements": result.model_elements,
        "placeholders": result.placeholders,
        "assignments": result.assignments,
        "findings": result.findings.to_dict("records"),
    }
    if output_format == "json":
        click.echo(json.dumps(facts, indent=2))
        return
    _print_findings(result.findings, "Findings (not errors)", output_format)
    where = f"added to a copy of {result.model}" if result.model else "with placeholders from elements.csv"
    click.echo(
        f"Wrote {out}: {result.tasks} tasks, {result.links} links, {result.calendars} calendars, {where}; "
        f"{result.assignments} elements assigned to the tasks that build them "
        f"({result.model_elements} model elements, {result.placeholders} placeholders)."
    )


COMMANDS = (import_ifc, import_ifc_schedule, export_ifc)
