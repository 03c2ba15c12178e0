"""``delay check``: schedule quality, forensic data checks, model links, snapshot changes."""

from __future__ import annotations

import json

import click

from .common import load_case_argument, print_table, reports_input_errors

__all__ = ["check", "COMMANDS"]

#: Rows of one finding shown in a table; ``--format json`` lists them all.
SHOWN = 20


@click.command("check")
@click.argument("case", type=click.Path(exists=True))
@click.option(
    "--snapshot",
    default=None,
    metavar="LABEL",
    help="Folder name under snapshots/ or label; 'asbuilt' for the as-built record. Default: the baseline.",
)
@click.option(
    "--all", "all_snapshots", is_flag=True, help="Check every snapshot: baseline, updates, then the as-built record."
)
@click.option(
    "--compare", nargs=2, metavar="A B", default=None, help="List every change from snapshot A to snapshot B instead."
)
@click.option(
    "--format",
    "output_format",
    type=click.Choice(["table", "json"]),
    default="table",
    show_default=True,
    help="How to print the findings.",
)
@reports_input_errors
def check(case, snapshot, all_snapshots, compare, output_format):
    """Check that the programmes are fit to use, and what changed between them.

    \b
    For one snapshot (or every one, with --all) it prints:
      metrics      the fourteen-point schedule assessment (DCMA-EA PAM 200.1, 2012,
                   section 4, thresholds as recalled): count, denominator, percentage,
                   threshold, verdict and the offending activities of each metric
      data checks  open ends, dangling starts and finishes, actual dates changed or
                   entered after their period, out-of-sequence progress, redundant
                   links, and the disclosed corrections applied on load
      elements     model elements whose wbs matches no activity, activities no element
                   carries, suspected duplicate elements (same classification and box)

    With --compare A B it lists every change from A to B instead: activities added and
    deleted, names, durations, remaining re-estimates, calendars, constraints, links
    added, deleted or changed, and the progress recorded, each marked when it touches the
    driving path of either snapshot.

    \b
    JSON (--format json):
      one snapshot   {"snapshot", "metrics": [...], "data_checks": [...], "elements": {...}}
      --all          {"snapshots": [one object per snapshot, as above]}
      --compare      {"earlier_snapshot", "earlier_label", "later_snapshot", "later_label", "counts": {...},
          "changes": [...]}

    A failed metric is a finding about the records, not an error: the exit status is 0.
    It is 2, with one line per problem, only when the case or the options are invalid.
    """
    from ..checks import check_snapshot
    from ..checks import compare as compare_snapshots
    from ..checks._common import ordered_snapshots

    if all_snapshots and snapshot:
        raise click.UsageError("give --snapshot or --all, not both")
    if compare and (snapshot or all_snapshots):
        raise click.UsageError("--compare lists changes between two snapshots; leave out --snapshot and --all")
    loaded = load_case_argument(case)
    if compare:
        comparison = compare_snapshots(loaded, compare[0], compare[1])
        if output_format == "json":
            click.echo(json.dumps(comparison.to_json(), indent=2))
        else:
            _print_comparison(comparison)
        return
    if all_snapshots:
        findings = [check_snapshot(loaded, snap) for snap in ordered_snapshots(loaded)]
        if output_format == "json":
            click.echo(json.dumps({"snapshots": findings}, indent=2))
            return
        for found in findings:
            _print_findings(found)
        return
    found = check_snapshot(loaded, snapshot or "baseline")
    if output_format == "json":
        click.echo(json.dumps(found, indent=2))
        return
    _print_findings(found)


#: Widest cell printed in a table; longer text is cut (``--format json`` gives it whole).
CELL_WIDTH = 60


def _cut(text: str, width: int = CELL_WIDTH) -> str:
    return text if len(text) <= width else text[: width - 3] + "..."


def _listed(values: list, shown: int = 3) -> str:
    values = [str(v) for v in values]
    if len(values) <= shown:
        return _cut(", ".join(values))
    return _cut(", ".join(values[:shown])) + f" (+{len(values) - shown} more)"


def _verdict(passed) -> str:
    return "n/a" if passed is None else ("pass" if passed else "FAIL")


def _blank(value) -> str:
    return "" if value is None else _cut(str(value))


def _print_findings(found: dict) -> None:
    head = (
        f"{found['label']} ({found['snapshot']}): data date {found['data_date']}, forecast completion "
        f"{found['completion']}, contract completion in force {found['completion_in_force']}"
    )
    click.echo(head)
    rows = []
    for metric in found["metrics"]:
        percent = "" if metric["percent"] is None else f"{metric['percent']:g}%"
        rows.append(
            [
                metric["key"],
                _blank(metric["count"]),
                _blank(metric["denominator"]),
                percent,
                metric["threshold"],
                _verdict(metric["passed"]),
                _listed(metric["activities"]),
            ]
        )
    print_table(
        "Schedule quality (DCMA-EA PAM 200.1, 2012, section 4; thresholds as recalled)",
        ["metric", "count", "of", "percent", "threshold", "result", "offending"],
        rows,
    )
    for metric in found["metrics"]:
        if metric["note"]:
            click.echo(f"  {metric['key']}: {metric['note']}")

    print_table(
        "Data checks",
        ["check", "status", "count", "title"],
        [[c["key"], c["status"], c["count"], c["title"]] for c in found["data_checks"]],
    )
    for data_check in found["data_checks"]:
        if data_check["note"]:
            click.echo(f"  {data_check['key']}: {data_check['note']}")
    for data_check in found["data_checks"]:
        items = data_check["items"]
        if not items:
            continue
        columns = list(items[0])
        title = data_check["title"]
        if len(items) > SHOWN:
            title += f" (first {SHOWN} of {len(items)}; --format json lists all)"
        print_table(title, columns, [[_blank(item[c]) for c in columns] for item in items[:SHOWN]])

    elements = found["elements"]
    duplicates = elements["duplicates"]
    print_table(
        "Model elements",
        ["check", "count", "items"],
        [
            [
                "unlinked elements",
                elements["unlinked_elements"]["count"],
                _listed([i["element"] for i in elements["unlinked_elements"]["items"]]),
            ],
            [
                "unmodelled activities",
                elements["unmodelled_activities"]["count"],
                _listed([i["activity"] for i in elements["unmodelled_activities"]["items"]]),
            ],
            [
                "duplicate groups",
                duplicates["count"],
                _listed([" = ".join(g["elements"]) for g in duplicates["groups"]], 4),
            ],
            ["duplicate ids", "", duplicates["duplicate_ids"]],
        ],
    )


def _print_comparison(comparison) -> None:
    click.echo(
        f"Changes from '{comparison.earlier}' ({comparison.earlier_folder}) to '{comparison.later}' "
        f"({comparison.later_folder})"
    )
    print_table("Changes by kind", ["kind", "count"], [[k, v] for k, v in comparison.counts().items()])
    frame = comparison.changes
    columns = ["kind", "activity", "pred", "succ", "field", "before", "after", "touches_driving_path"]
    rows = []
    for record in frame[columns].itertuples(index=False):
        rows.append([_blank(v) if not isinstance(v, bool) else ("yes" if v else "") for v in record])
    title = "Changes"
    limit = 200
    if len(rows) > limit:
        title += f" (first {limit} of {len(rows)}; --format json lists all)"
    print_table(title, [c.replace("_", " ") for c in columns], rows[:limit])


COMMANDS = (check,)
