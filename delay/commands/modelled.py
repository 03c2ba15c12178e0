"""``delay impacted`` and ``delay tia``: the modelled methods, events inserted into a programme.

``impacted`` is the impacted as-planned analysis (:mod:`delay.methods.impacted`): the events of
the register inserted into one programme, each alone and then one after another. ``tia`` is
the time impact analysis (:mod:`delay.methods.tia`): each event inserted into the
update current when it began and measured against that update's completion.
"""

from __future__ import annotations

import json

import click

from .common import load_case_argument, print_table, reports_input_errors

__all__ = ["impacted", "tia", "COMMANDS"]

CAUTION = (
    "Results depend on the records and on the method chosen; they are not legal advice. "
    "The contract, the applicable law and the analyst's professional judgement govern."
)

ALONE_NOTE = (
    "Impacts alone need not add up: events on parallel paths overlap and one event can hide "
    "behind another. Increments add up to the cumulative impact."
)


def _event_ids(text: str | None) -> list[str] | None:
    if not text:
        return None
    ids = [part.strip() for part in text.split(",") if part.strip()]
    return ids or None


def _listed(values) -> str:
    if isinstance(values, str):
        return values
    return ", ".join(str(v) for v in values)


@click.command()
@click.argument("case", type=click.Path(exists=True))
@click.option(
    "--events",
    "event_ids",
    default=None,
    metavar="E1,E2,...",
    help="Event ids to insert, comma separated; default every event of the register.",
)
@click.option(
    "--order",
    type=click.Choice(["chronological", "as-listed"]),
    default="chronological",
    show_default=True,
    help="Order of insertion in the cumulative run: by start, finish and register row, or "
    "as listed in --events (else as in the register).",
)
@click.option(
    "--base",
    default="baseline",
    show_default=True,
    metavar="LABEL",
    help="The programme to impact: a folder under snapshots/ or a snapshot's label.",
)
@click.option("--format", "output_format", type=click.Choice(["table", "json"]), default="table", show_default=True)
@reports_input_errors
def impacted(case, event_ids, order, base, output_format):
    """Impacted as-planned: the delay events inserted into one programme.

    Each event is modelled in the base programme at its real dates (extend: work days added
    to the affected activities; hold: no work on them from the event's start to its finish,
    both included, whatever their status; fragnet: the event's activities and links
    inserted) and the programme is re-scheduled. Its impact alone is the movement of the
    completion activity with that event only; its increment is what it adds when the events
    are inserted one after another. The residual is the actual completion less the impacted
    one: the method measures the plan's response, not what happened. Days are calendar
    days; positive is delay.
    """
    from ..convert import text_cell
    from ..methods.impacted import analyse

    result = analyse(load_case_argument(case), base=base, events=_event_ids(event_ids), order=order)
    if output_format == "json":
        click.echo(json.dumps(result.to_json(), indent=2))
        return
    rows = [
        [
            r.event,
            r.title,
            r.party,
            r.impact,
            text_cell(r.start),
            text_cell(r.finish),
            r.alone_days,
            r.alone_work_days,
            r.completion_alone,
            r.increment_days,
            r.increment_work_days,
            r.completion_after,
            "; ".join(x for x in (r.applied, r.effect) if x),
        ]
        for r in result.events.itertuples(index=False)
    ]
    print_table(
        f"Impacted as-planned on {result.base} (calendar days; positive is delay; order {result.order})",
        [
            "event",
            "title",
            "party",
            "impact",
            "start",
            "finish",
            "alone",
            "alone (work days)",
            "completion alone",
            "increment",
            "increment (work days)",
            "completion after",
            "applied",
        ],
        rows,
    )
    print_table(
        "By party (alone: the party's events together, without the others)",
        ["party", "events", "alone", "increments"],
        [[r.party, _listed(r.events), r.alone_days, r.increment_days] for r in result.by_party.itertuples(index=False)],
    )
    if not len(result.events):
        click.echo("No events to insert: the register is empty.")
    click.echo(ALONE_NOTE)
    click.echo(
        f"Completion of {result.base} {result.completion_base}, with the events "
        f"{result.completion_cumulative} ({result.total_days:+d} days); actual {result.actual_completion} "
        f"(residual {result.residual_days:+d} days). {CAUTION}"
    )


@click.command()
@click.argument("case", type=click.Path(exists=True))
@click.option("--format", "output_format", type=click.Choice(["table", "json"]), default="table", show_default=True)
@reports_input_errors
def tia(case, output_format):
    """Time impact analysis: each event inserted into the programme current before it began.

    An event's programme is the last one (baseline or progress update) whose data date is
    strictly before the event's start, unless the register's tia_update names another. Each
    event is modelled there as `delay impacted` models it and measured at that programme's
    completion activity; events sharing a programme are inserted one after another in
    chronological order. Each programme's residual (the next programme's completion less
    its impacted one) reconciles the increments with what happened: increments plus
    residuals equal the actual less the planned completion. Days are calendar days;
    positive is delay.
    """
    from ..convert import text_cell
    from ..methods.tia import analyse

    result = analyse(load_case_argument(case))
    if output_format == "json":
        click.echo(json.dumps(result.to_json(), indent=2))
        return
    print_table(
        "Programmes (calendar days; positive is delay)",
        [
            "programme",
            "data date",
            "completion",
            "events",
            "increments",
            "impacted completion",
            "next programme",
            "its completion",
            "residual",
        ],
        [
            [
                r.snapshot,
                r.data_date,
                r.completion_before,
                _listed(r.events),
                r.increment_days,
                r.completion_after,
                r.next_snapshot,
                r.next_completion,
                r.residual_days,
            ]
            for r in result.updates.itertuples(index=False)
        ],
    )
    rows = [
        [
            r.event,
            r.title,
            r.party,
            r.impact,
            text_cell(r.start),
            r.snapshot,
            r.completion_before,
            r.alone_days,
            r.increment_days,
            r.increment_work_days,
            r.completion_after,
            "; ".join(x for x in (r.applied, r.effect, *r.warnings) if x),
        ]
        for r in result.events.itertuples(index=False)
    ]
    print_table(
        "Events, each in the programme current before it began",
        [
            "event",
            "title",
            "party",
            "impact",
            "start",
            "programme",
            "completion before",
            "alone",
            "increment",
            "increment (work days)",
            "completion after",
            "notes",
        ],
        rows,
    )
    print_table(
        "By party (increments summed)",
        ["party", "increments"],
        [[r.party, r.increment_days] for r in result.by_party.itertuples(index=False)],
    )
    if not len(result.events):
        click.echo("No events to insert: the register is empty.")
    click.echo(ALONE_NOTE)
    click.echo(
        f"Increments {result.total_days:+d} days and residuals {result.trace.residual_days:+d} days: "
        f"{result.explained_days} calendar days from the planned {result.planned_completion} to "
        f"{result.actual_completion}. {CAUTION}"
    )


COMMANDS = (impacted, tia)
