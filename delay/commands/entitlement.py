"""``delay entitlement``: extension of time, compensable days and damages per method."""

from __future__ import annotations

import json

import click

from .common import load_case_argument, print_table, reports_input_errors

__all__ = ["entitlement", "COMMANDS", "applicable_methods"]

CAUTION = (
    "Results depend on the records and on the method chosen; they are not legal advice. "
    "The contract, the applicable law and the analyst's professional judgement govern."
)

METHOD_CHOICES = ["windows", "impacted", "tia", "collapsed", "all"]


def applicable_methods(case) -> tuple[list[str], list[str]]:
    """The methods ``--method all`` runs on this case, and why any is left out.

    A windows analysis needs two programmes (snapshots, the as-built one included), a
    collapsed as-built an as-built record; the impacted and time impact analyses always
    run.

    Parameters
    ----------
    case : Case
        The loaded case.

    Returns
    -------
    methods : list of str
        Of ``windows``, ``impacted``, ``tia`` and ``collapsed``, those that apply, in that
        order.
    reasons : list of str
        One sentence for each method left out.
    """
    methods, reasons = [], []
    if len(case.snapshots) + (case.asbuilt_snapshot is not None) >= 2:
        methods.append("windows")
    else:
        reasons.append("windows analysis left out: the case has one programme only")
    methods += ["impacted", "tia"]
    if case.asbuilt_snapshot is not None:
        methods.append("collapsed")
    else:
        reasons.append("collapsed as-built left out: the case has no as-built record")
    return methods, reasons


def _text(value) -> str:
    import pandas as pd

    if value is None or (not isinstance(value, str) and pd.isna(value)):
        return ""
    if isinstance(value, pd.Timestamp):
        return value.date().isoformat()
    if isinstance(value, float):
        return f"{value:,.2f}"
    if isinstance(value, bool):
        return "yes" if value else "no"
    return str(value)


@click.command()
@click.argument("case", type=click.Path(exists=True))
@click.option(
    "--method",
    type=click.Choice(METHOD_CHOICES),
    default="all",
    show_default=True,
    help="The method whose causation table the entitlement rests on; all: every method the case "
    "supports (windows needs two programmes, collapsed an as-built record).",
)
@click.option("--format", "output_format", type=click.Choice(["table", "json"]), default="table", show_default=True)
@reports_input_errors
def entitlement(case, method, output_format):
    """Extension of time, compensable days, prolongation cost and liquidated damages.

    Each method's results become a causation table: every day of critical delay is
    excusable when any of its causes is employer or neutral risk, compensable only when
    every cause is employer risk, culpable otherwise. Concurrent days follow the case's
    [analysis] concurrency: time_not_money (time, no money) or apportion (split pro rata to
    the causes' impacts alone, whole days by largest remainder). Float is shared: a delay
    that only uses float gives no extension.

    \b
    For the whole works and for each section of sections.csv:
      completion in force   contract completion plus the extensions already granted
      extension of time     max(0, planned completion + excusable days - completion in force),
                            never more than the excusable days
      revised completion    completion in force + extension of time
      damages days          max(0, actual or forecast completion - revised completion)
      acceleration          the contractor's net gain in the causation table: shown, never
                            cutting the extension of time
      damages               damages days x the rate, limited to the cap when one is set
      prolongation cost     compensable days x the rate of the period the delay arose in

    Days are calendar days. Beside each event: its notification date and the days claimed,
    where the register gives them, and the days assessed.
    """
    from ..entitlement import assess

    loaded = load_case_argument(case)
    reasons: list[str] = []
    if method == "all":
        methods, reasons = applicable_methods(loaded)
    else:
        methods = [method]
    result = assess(loaded, methods)
    if output_format == "json":
        click.echo(json.dumps(result.to_json(), indent=2))
        return
    _print_figures(result)
    for m in result.methods:
        _print_sections(m)
        _print_causation(m)
        _print_events(m)
    for line in reasons:
        click.echo(line)
    click.echo(f"Impacts alone and but-for days need not add up; the classified days do. {CAUTION}")


def _print_figures(result) -> None:
    """The headline figures of every method, one column per method."""
    currency = result.currency
    figures = [
        ("contract completion in force", lambda m: m.completion_in_force),
        ("planned completion", lambda m: m.planned_completion),
        ("excusable days", lambda m: m.excusable_days),
        ("extension of time (days)", lambda m: m.eot_days),
        ("revised completion", lambda m: m.revised_completion),
        ("actual or forecast completion", lambda m: m.actual_completion),
        ("compensable days", lambda m: m.compensable_days),
        (f"prolongation cost ({currency})", lambda m: _text(m.prolongation_cost)),
        ("culpable delay (the contractor's net delay)", lambda m: m.culpable_delay_days),
        ("acceleration (the contractor's net recovery)", lambda m: m.acceleration_days),
        ("days of liquidated damages (past the revised completion)", lambda m: m.ld_days),
        (f"liquidated damages ({currency})", lambda m: _text(m.ld_exposure) + (" (capped)" if m.ld_capped else "")),
        ("concurrent days", lambda m: m.concurrent_days),
    ]
    print_table(
        f"Entitlement per method (calendar days; concurrency {result.concurrency})",
        ["figure", *[m.method for m in result.methods]],
        [[name, *[_text(value(m)) for m in result.methods]] for name, value in figures],
    )


def _print_sections(m) -> None:
    """A method's sections, when sections.csv names any."""
    if len(m.sections):
        print_table(
            f"{m.method}: sections (never add them to each other or to the whole works)",
            [
                "section",
                "milestone",
                "in force",
                "planned",
                "excusable",
                "extension",
                "revised",
                "actual or forecast",
                "compensable",
                "prolongation cost",
                "damages days",
                "damages",
                "note",
            ],
            [
                [
                    s["section"],
                    s["completion_activity"],
                    _text(s["completion_in_force"]),
                    _text(s["planned_completion"]),
                    _text(s["excusable_days"]),
                    _text(s["eot_days"]),
                    _text(s["revised_completion"]),
                    _text(s["actual_completion"]),
                    _text(s["compensable_days"]),
                    _text(s["prolongation_cost"]),
                    _text(s["ld_days"]),
                    _text(s["ld_exposure"]) + (" (capped)" if s["ld_capped"] else ""),
                    _text(s["note"]),
                ]
                for s in m.sections.to_dict("records")
            ],
        )


def _print_causation(m) -> None:
    """A method's causation rows that carry days or a concurrency."""
    table = m.causation.table
    shown = table[(table["days"] != 0) | (table["concurrent_with"] != "")]
    print_table(
        f"{m.method}: causation ({m.causation.explained_days} days: {m.causation.explains})",
        [
            "step",
            "event",
            "party",
            "activities",
            "days",
            "alone (need not add up)",
            "concurrent with",
            "excusable",
            "compensable",
            "culpable",
            "classification",
        ],
        [
            [
                r.step,
                r.event,
                r.party,
                r.activities,
                r.days,
                _text(r.alone_days),
                r.concurrent_with,
                r.excusable_days,
                r.compensable_days,
                r.culpable_days,
                r.classification,
            ]
            for r in shown.itertuples(index=False)
        ],
    )


def _print_events(m) -> None:
    """A method's events: what the register claims beside what is assessed."""
    if len(m.events):
        print_table(
            f"{m.method}: events, claimed beside assessed",
            ["event", "party", "notified", "claimed", "assessed", "excusable", "compensable", "note"],
            [
                [
                    e["event"],
                    e["party"],
                    _text(e["notified"]),
                    _text(e["claimed_days"]),
                    _text(e["assessed_days"]),
                    _text(e["excusable_days"]),
                    _text(e["compensable_days"]),
                    e["note"],
                ]
                for e in m.events.to_dict("records")
            ],
        )


@click.command()
@click.argument("case", type=click.Path(exists=True))
@click.option("--format", "output_format", type=click.Choice(["table", "json"]), default="table", show_default=True)
@reports_input_errors
def compare(case, output_format):
    """The methods side by side, why they differ, and the sensitivity to two settings.

    Puts every method the records allow (windows, impacted as-planned, time impact,
    collapsed as-built) side by side per party and per event, explains in plain words where
    and why they differ, and re-runs the headline figures under the other progress mode and
    the other concurrency rule.
    """
    from ..comparison import compare_methods, sensitivity

    loaded = load_case_argument(case)
    result = compare_methods(loaded)
    table = sensitivity(loaded, result.methods)
    if output_format == "json":
        payload = result.to_json()
        payload["sensitivity"] = json.loads(table.to_json(orient="records"))
        click.echo(json.dumps(payload, indent=2))
        return
    methods = list(result.methods)
    print_table(
        "Days of delay to completion per party (each method's column adds up to what it explains)",
        ["party", *methods],
        result.by_party.values.tolist(),
    )
    print_table(
        "Days per event (a day explained by several events counts against each)",
        ["event", "party", *methods],
        result.by_event.drop(columns="title").values.tolist(),
    )
    print_table(
        "Sensitivity of the headline figures",
        [
            "method",
            "variant",
            "progress",
            "concurrency",
            "extension of time",
            "compensable",
            "damages days",
            "damages",
            "changed",
        ],
        [
            [
                r.method,
                r.variant,
                r.progress,
                r.concurrency,
                r.eot_days,
                r.compensable_days,
                r.ld_days,
                f"{r.ld_exposure:,.2f}",
                "yes" if r.changed else "",
            ]
            for r in table.itertuples()
        ],
    )
    for line in result.explanation:
        click.echo(line)


COMMANDS = (entitlement, compare)
