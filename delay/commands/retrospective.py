"""``delay windows`` and ``delay asbuilt``: the methods that rest on the contemporaneous records."""

from __future__ import annotations

import json

import click

from .common import load_case_argument, print_table, reports_input_errors

CAUTION = (
    "Results depend on the records and on the method chosen; they are not legal advice. "
    "The contract, the applicable law and the analyst's professional judgement govern."
)


@click.command()
@click.argument("case", type=click.Path(exists=True))
@click.option(
    "--windows",
    "boundaries",
    default=None,
    metavar="L1,L2,...",
    help="Boundary snapshots (folder names or labels), earliest first; default every snapshot and the as-built record.",
)
@click.option("--no-half-step", is_flag=True, help="Do not split windows into progress and revision effects.")
@click.option("--format", "output_format", type=click.Choice(["table", "json"]), default="table", show_default=True)
@reports_input_errors
def windows(case, boundaries, no_half_step, output_format):
    """Windows analysis: how far completion moved in each window, and why.

    Each window runs from one snapshot to the next. With half-steps (the default, or the
    case's [analysis] half_step), the movement is split into the effect of progress (the
    earlier programme brought to the later data date with the later progress) and the effect
    of revisions (deletions, additions, durations, logic, calendars, constraints, in that
    order). Progress is charged along the driving chain to the project's completion
    activity, traced back through actual dates, by lateness against late dates by logic
    alone (milestone constraints change nothing), counted in work days of the completion
    activity's calendar and split into calendar days at completion. Charges go to the
    delay events that name the activity in the window, else to the activity's risk column,
    else to the unexplained-risk setting. Positive is delay, negative is gain. Every window
    reconciles to the day; each section's milestone is traced the same way (--format json).
    """
    from ..methods.windows import analyse

    loaded = load_case_argument(case)
    names = [n.strip() for n in boundaries.split(",") if n.strip()] if boundaries else None
    result = analyse(loaded, names, half_step=False if no_half_step else None)
    if output_format == "json":
        click.echo(json.dumps(result.to_json(), indent=2))
        return
    rows = [
        [
            w.number,
            w.start,
            w.end,
            w.completion_start,
            w.completion_end,
            w.movement_days,
            w.movement_work_days,
            w.progress_days,
            w.revision_days,
            ", ".join(f"{p} {d:+d}" for p, d in w.by_party_days.items()),
        ]
        for w in result.windows
    ]
    print_table(
        f"Windows, traced to {result.target} (calendar days; work days of calendar "
        f"'{result.ledger_calendar}'; positive is delay)",
        [
            "window",
            "from",
            "to",
            "completion before",
            "completion after",
            "movement",
            "movement (work days)",
            "progress",
            "revisions",
            "by party",
        ],
        rows,
    )
    for w in result.windows:
        counted = w.counted
        lines = [
            [
                r.activity,
                r.name,
                r.work_days,
                r.days,
                ", ".join(r.events),
                r.party,
                r.basis,
                ", ".join(r.concurrent_with),
            ]
            for r in counted.itertuples()
        ]
        lines += [
            [
                f"({r.kind})",
                ", ".join(r.activities[:6]) + (" ..." if len(r.activities) > 6 else ""),
                r.work_days,
                r.days,
                ", ".join(r.events),
                r.party,
                r.basis,
                "",
            ]
            for r in w.revisions.itertuples()
        ]
        if lines:
            print_table(
                f"Window {w.number}: {w.start} to {w.end}",
                ["activity", "name", "work days", "days", "events", "party", "basis", "concurrent with"],
                lines,
            )
        click.echo(w.sentence)
    click.echo(f"Total movement: {result.total_movement_days} calendar days. {CAUTION}")


@click.command()
@click.argument("case", type=click.Path(exists=True))
@click.option(
    "--period",
    type=click.Choice(["W", "M", "Q"]),
    default="M",
    show_default=True,
    help="Period for the delay along the as-built critical path: week, month or quarter.",
)
@click.option("--format", "output_format", type=click.Choice(["table", "json"]), default="table", show_default=True)
@reports_input_errors
def asbuilt(case, period, output_format):
    """As-planned versus as-built: variances, the as-built critical path, delay per period.

    Planned dates are the baseline's early dates, actual dates those of the as-built record;
    variances are given in work days of each activity's calendar beside calendar days. The
    as-built critical path is traced back from the project's completion activity through
    the last update's logic: each activity's driving predecessor is the one whose actual
    date, plus the link, lies closest to its actual start. Each activity on it contributes
    its lateness against the baseline's late finish by logic alone, less its driving
    predecessor's, in work days of the completion activity's calendar: float and
    non-working days are not delay. The periods add up to the completion variance.
    """
    from ..methods.asbuilt import compare

    result = compare(load_case_argument(case), period=period)
    if output_format == "json":
        click.echo(json.dumps(result.to_json(), indent=2))
        return
    path = result.critical_path
    rows = [
        [
            r.activity,
            r.name,
            r.actual_start.date(),
            r.actual_finish.date(),
            "" if r.planned_finish is None or str(r.planned_finish) == "NaT" else r.planned_finish.date(),
            r.driving_predecessor,
            r.link,
            "" if str(r.gap_work_days) == "<NA>" else r.gap_work_days,
            r.lateness_work_days,
            r.work_days,
            r.delay_days,
        ]
        for r in path.itertuples()
    ]
    print_table(
        f"As-built critical path to {result.target}",
        [
            "activity",
            "name",
            "actual start",
            "actual finish",
            "planned finish",
            "driven by",
            "link",
            "gap (work days)",
            "late (work days)",
            "delay (work days)",
            "delay (days)",
        ],
        rows,
    )
    print_table(
        "Delay along the as-built critical path by period",
        ["period", "delay days", "work days", "cumulative"],
        [[r.period, r.delay_days, r.work_days, r.cumulative_days] for r in result.periods.itertuples()],
    )
    click.echo(
        f"Planned completion {result.planned_completion}, actual {result.actual_completion}: "
        f"{result.completion_variance_days} calendar days late. {CAUTION}"
    )


@click.command()
@click.argument("case", type=click.Path(exists=True))
@click.option("--format", "output_format", type=click.Choice(["table", "json"]), default="table", show_default=True)
@reports_input_errors
def collapsed(case, output_format):
    """Collapsed as-built: when would the works have finished but for each party's events?

    Builds an as-built model from actual durations and the last update's logic (the gaps
    before each activity's actual start kept as lags), checks that it reproduces the actual
    dates (and lists the activities it cannot, with the reason), then removes each party's
    delay events, and each event alone, and schedules again (an event is taken out where
    the register's asbuilt_activities says it shows, else where its activities or its
    fragnet are). But-for figures need not add up: removing one party's delay can leave
    another's in its place.
    """
    from ..convert import text_cell
    from ..methods.collapsed import analyse

    result = analyse(load_case_argument(case))
    if output_format == "json":
        click.echo(json.dumps(result.to_json(), indent=2))
        return
    click.echo(
        f"Actual completion {result.actual_completion}; the as-built model "
        f"{'reproduces every actual date' if result.reproduced else 'does not reproduce every actual date'}."
    )
    if len(result.mismatches):
        print_table(
            "Activities the as-built model does not place on their actual dates",
            list(result.mismatches.columns),
            [[text_cell(v) for v in row] for row in result.mismatches.itertuples(index=False)],
        )
    print_table(
        "But for each party's events",
        list(result.by_party.columns),
        [[text_cell(v) for v in row] for row in result.by_party.itertuples(index=False)],
    )
    print_table(
        "But for each event alone",
        list(result.by_event.columns),
        [[text_cell(v) for v in row] for row in result.by_event.itertuples(index=False)],
    )
    for note in result.notes:
        click.echo(note)
    click.echo(CAUTION)


COMMANDS = (windows, asbuilt, collapsed)
