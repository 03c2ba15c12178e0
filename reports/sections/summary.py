"""Section 1, the summary: the report's conclusions on its first page, then the dates and
figures behind them.

The first page shows, from :func:`delay.entitlement.assess` (``ctx.entitlement``) and
:func:`delay.comparison.compare_methods` (``ctx.comparison``):

- the key dates in one sentence (planned, in force, actual or forecast completion);
- a headline per method: extension of time, revised completion, compensable days and
  prolongation cost, days of liquidated damages and the damages, acceleration days;
- why the methods differ (:func:`delay.comparison.why_they_differ`);
- the points that need explaining (:func:`reports.conclusions.warnings_of`);
- the analyst's opinion (``Case.opinion``, opinion.md, rendered by
  :func:`reports.opinion.render_opinion`) and the method relied on (``[report]
  preferred_method``), or a plain placeholder when none was given.

Below the first page: the contract, planned, forecast and actual completion dates, every
extension of time already granted (extensions_granted.csv, with the completion in force
after each, :func:`delay.contract.completion_in_force`), the full table of figures per
method and per section, the events' days claimed beside days assessed, the methods' notes
and the cautions.
"""

from __future__ import annotations

import pandas as pd

from delay.comparison import why_they_differ
from delay.contract import completion_in_force, whole_works_section

from ..blocks import FigureBlock, Group, Markdown, Notice, Paragraph, Section, Sentences
from ..conclusions import warnings_of
from ..context import CAUTIONS, ENTITLEMENT_METHODS, METHOD_NAMES, Context, days_text
from ..figures import days_by_method
from ..opinion import render_opinion

__all__ = ["section", "headline_frame", "grants_frame", "key_dates"]

#: Headings of the headline table (money columns get the currency).
_HEADLINE_LABELS = {
    "method_title": "method",
    "eot_days": "extension of time (days)",
    "revised_completion": "revised completion",
    "compensable_days": "compensable days",
    "ld_days": "days of liquidated damages",
    "acceleration_days": "acceleration (days)",
}


def headline_frame(ctx: Context) -> pd.DataFrame:
    """One row per method assessed: the figures of the first page.

    Parameters
    ----------
    ctx : reports.context.Context
        The report's results.

    Returns
    -------
    pandas.DataFrame
        ``method_title`` (the method in words; the one the analyst relies on marked), ``eot_days``,
        ``revised_completion``, ``compensable_days``, ``prolongation_cost``,
        ``ld_days``, ``ld_exposure``, ``acceleration_days``.
    """
    preferred = ctx.case.settings.report.preferred_method
    rows = [
        {
            "method_title": METHOD_NAMES[m.method] + (" (relied on by the analyst)" if m.method == preferred else ""),
            "eot_days": m.eot_days,
            "revised_completion": m.revised_completion,
            "compensable_days": m.compensable_days,
            "prolongation_cost": m.prolongation_cost,
            "ld_days": m.ld_days,
            "ld_exposure": m.ld_exposure,
            "acceleration_days": m.acceleration_days,
        }
        for m in ctx.entitled
    ]
    return pd.DataFrame(
        rows,
        columns=[
            "method_title",
            "eot_days",
            "revised_completion",
            "compensable_days",
            "prolongation_cost",
            "ld_days",
            "ld_exposure",
            "acceleration_days",
        ],
    )


def key_dates(ctx: Context) -> str:
    """The planned, in force and actual (or forecast) completion in one sentence.

    Parameters
    ----------
    ctx : reports.context.Context
        The report's results.

    Returns
    -------
    str
        The planned completion, the actual (as-built record) or forecast (last update)
        one and how many calendar days later or earlier, the contract completion and the
        date in force after the extensions already granted, and the overrun past it.
    """
    case = ctx.case
    planned = ctx.completion(case.baseline)
    contract, granted, in_force = completion_in_force(case)
    if case.asbuilt_snapshot is not None:
        reached, word = ctx.completion(case.asbuilt_snapshot), "finished"
    elif case.updates:
        reached, word = ctx.completion(case.updates[-1]), f"are forecast ({case.updates[-1].label}) to finish"
    else:
        reached, word = None, ""
    text = f"The works were planned to finish on {planned.isoformat()}"
    if reached is not None:
        late = (reached - planned).days
        text += f" and {word} on {reached.isoformat()}, {abs(late)} days {'later' if late >= 0 else 'earlier'}"
    text += f". The contract completion is {contract.isoformat()}"
    if granted:
        text += f"; with the {granted} days already granted, the date in force is {in_force.isoformat()}"
    if reached is not None:
        overrun = (reached - in_force).days
        text += (
            f": {abs(overrun)} days {'of overrun past' if overrun >= 0 else 'before'} the date in force"
            if granted
            else f": {abs(overrun)} days {'of overrun past' if overrun >= 0 else 'before'} it"
        )
    return text + "."


def _opinion(ctx: Context) -> Group:
    settings = ctx.case.settings.report
    blocks = [Paragraph("The analyst's opinion", style="heading")]
    if settings.preferred_method:
        name = METHOD_NAMES[settings.preferred_method]
        ran = "" if settings.preferred_method in ctx.results else " (not run in this report)"
        blocks.append(Paragraph(f"Method relied on: the {name}{ran} ([report] preferred_method).", style="lead"))
    else:
        blocks.append(
            Paragraph("The analyst names no method relied on ([report] preferred_method of case.toml).", style="small")
        )
    if ctx.case.opinion.strip():
        blocks.append(Markdown(render_opinion(ctx.case.opinion)))
    else:
        blocks.append(
            Notice(
                "No opinion was given: the case has no opinion.md. The figures of this report are the "
                "methods' results alone.",
                style="placeholder",
            )
        )
    return Group(tuple(blocks), style="column opinion")


def _conclusions(ctx: Context) -> Group:
    main = [Paragraph(key_dates(ctx), style="lead")]
    if ctx.entitlement is not None:
        currency = ctx.currency
        labels = dict(
            _HEADLINE_LABELS,
            prolongation_cost=f"prolongation ({currency})",
            ld_exposure=f"liquidated damages ({currency})",
        )
        main.append(
            ctx.table(
                "headline",
                "What each method concludes",
                "summary",
                headline_frame(ctx),
                labels=labels,
                style="headline",
            )
        )
        main.append(Sentences(why_they_differ(ctx.comparison), heading="Why the methods differ"))
    else:
        main.append(Notice("No method that assesses entitlement was run, so no extension of time or money is shown."))
    found = warnings_of(ctx)
    warnings = Sentences(
        tuple(found) if found else ("None: no figure of this report needs a note of its own.",),
        heading="Points that need explaining",
        style="warnings",
    )
    return Group(
        (Group((Group(tuple(main), style="column main"), _opinion(ctx)), style="conclusions"), warnings),
        style="first-page",
    )


def _dates(ctx: Context) -> pd.DataFrame:
    case = ctx.case
    project = case.settings.project
    contract, granted, in_force = completion_in_force(case)
    rows = [
        {"what": "contract start", "date": project.contract_start, "note": ""},
        {"what": "contract completion", "date": project.contract_completion, "note": "as in the contract"},
        {
            "what": "contract completion in force",
            "date": in_force,
            "note": f"the contract completion plus {days_text(granted)} already granted",
        },
        {
            "what": "planned completion",
            "date": ctx.completion(case.baseline),
            "note": "the baseline programme's completion",
        },
    ]
    if case.updates:
        last = case.updates[-1]
        rows.append(
            {
                "what": "forecast completion",
                "date": ctx.completion(last),
                "note": f"{last.label}, data date {last.data_date.isoformat()}",
            }
        )
    if case.asbuilt_snapshot is not None:
        rows.append(
            {"what": "actual completion", "date": ctx.completion(case.asbuilt_snapshot), "note": "the as-built record"}
        )
    return pd.DataFrame(rows, columns=["what", "date", "note"])


def grants_frame(case) -> pd.DataFrame:
    """Every extension of time already granted and the completion in force from its day.

    Parameters
    ----------
    case : delay.model.Case
        The loaded case.

    Returns
    -------
    pandas.DataFrame
        One row per row of extensions_granted.csv, in the file's order: ``id``,
        ``granted_on``, ``days``, ``applies_to`` (the whole works or a section, in words),
        ``events``, ``reason`` and ``completion_in_force`` (of what it applies to, counting
        the grants made on or before ``granted_on``: :func:`delay.contract.completion_in_force`).
    """
    whole = whole_works_section(case)
    names = dict(zip(case.sections["section"].astype(str), case.sections["name"])) if len(case.sections) else {}
    rows = []
    for grant in case.extensions_granted.itertuples(index=False):
        section = "" if pd.isna(grant.section) else str(grant.section).strip()
        granted_on = pd.Timestamp(grant.granted_on).date()
        whole_works = not section or section == whole
        applies = "the whole works" if whole_works else f"section {section}"
        if section and section in names and pd.notna(names[section]):
            applies += f" ({names[section]})" if not whole_works else f" (section {section}, {names[section]})"
        in_force = completion_in_force(case, None if whole_works else section, at=granted_on)[2]
        rows.append(
            {
                "grant": grant.id,
                "granted_on": granted_on,
                "days": int(grant.days),
                "applies_to": applies,
                "events": "" if pd.isna(grant.events) else str(grant.events),
                "reason": "" if pd.isna(grant.reason) else str(grant.reason),
                "completion_in_force": in_force,
            }
        )
    return pd.DataFrame(
        rows, columns=["grant", "granted_on", "days", "applies_to", "events", "reason", "completion_in_force"]
    )


_FIGURES = (
    ("contract completion in force", "completion_in_force"),
    ("planned completion", "planned_completion"),
    ("excusable days (time)", "excusable_days"),
    ("completion with only the excusable delays", "completion_with_excusable_delays"),
    ("extension of time (calendar days)", "eot_days"),
    ("revised completion date", "revised_completion"),
    ("actual or forecast completion", "actual_completion"),
    ("compensable days (time and money)", "compensable_days"),
    ("prolongation cost ({currency})", "prolongation_cost"),
    ("days of liquidated damages", "ld_days"),
    ("acceleration days (the contractor's net recovery)", "acceleration_days"),
    ("liquidated damages exposure ({currency})", "ld_exposure"),
    ("damages limited by the cap", "ld_capped"),
    ("concurrent days", "concurrent_days"),
)


def _entitlement_tables(ctx: Context) -> list:
    currency = ctx.currency
    data: dict[str, list] = {"figure": [label.format(currency=currency) for label, _ in _FIGURES]}
    for item in ctx.entitled:
        data[item.method] = [getattr(item, name) for _, name in _FIGURES]
    data["figure"] += ["delay explained (calendar days)", "what that delay is"]
    for item in ctx.entitled:
        data[item.method] += [item.causation.explained_days, item.causation.explains]
    labels = {m.method: METHOD_NAMES[m.method] for m in ctx.entitled} | {"figure": "figure"}
    blocks = [
        ctx.table(
            "entitlement_by_method",
            f"Extension of time and money per method (money in {currency})",
            "summary",
            pd.DataFrame(data),
            labels=labels,
            note=(
                f"Concurrency rule: {ctx.entitlement.concurrency.replace('_', ' ')}. Each method's classified "
                "days add up to the delay it explains; impacts alone and but-for days need not add up. The "
                "methods measure different things and their figures are not to be added."
            ),
        )
    ]
    chart = pd.DataFrame(
        {
            "method": [METHOD_NAMES[m.method] for m in ctx.entitled],
            "eot_days": [m.eot_days for m in ctx.entitled],
            "compensable_days": [m.compensable_days for m in ctx.entitled],
            "ld_days": [m.ld_days for m in ctx.entitled],
        }
    )
    blocks.append(
        FigureBlock(
            "days_by_method",
            days_by_method(chart, title="Days by method"),
            "Extension of time, compensable days and days of liquidated damages of each method.",
        )
    )
    sections = [m.sections.assign(method=m.method) for m in ctx.entitled if len(m.sections)]
    if sections:
        frame = pd.concat(sections, ignore_index=True)
        columns = [
            "method",
            "section",
            "name",
            "completion_activity",
            "completion_in_force",
            "planned_completion",
            "excusable_days",
            "eot_days",
            "revised_completion",
            "actual_completion",
            "compensable_days",
            "prolongation_cost",
            "ld_days",
            "ld_exposure",
            "note",
        ]
        frame = (
            frame[columns].assign(method=frame["method"].map(METHOD_NAMES)).rename(columns={"method": "method_title"})
        )
        blocks.append(
            ctx.table(
                "entitlement_by_section",
                f"Sections (money in {currency})",
                "summary",
                frame,
                note="Sections' figures overlap each other and the whole works': never add them.",
            )
        )
    events = [m.events.assign(method=m.method) for m in ctx.entitled if len(m.events)]
    if events:
        frame = pd.concat(events, ignore_index=True)
        frame = frame[["method"] + [c for c in frame.columns if c != "method"]]
        blocks.append(
            ctx.table(
                "entitlement_by_event",
                "Events: days claimed beside days assessed",
                "summary",
                frame.assign(method=frame["method"].map(METHOD_NAMES)).rename(columns={"method": "method_title"}),
                labels={"title": "event title"},
            )
        )
    owners: dict[str, list[str]] = {}
    for item in ctx.entitled:
        for note in item.notes:
            owners.setdefault(note, []).append(METHOD_NAMES[item.method])
    for note, names in owners.items():
        prefix = "" if len(names) == len(ctx.entitled) > 1 else ", ".join(names).capitalize() + ": "
        blocks.append(Paragraph(prefix + note, style="small"))
    return blocks


def section(ctx: Context, left_out: list[str] = ()) -> Section:
    """The summary section (see the module docstring).

    Parameters
    ----------
    ctx : reports.context.Context
        The report's results.
    left_out : list of str, default ()
        Why methods the case cannot support were left out.

    Returns
    -------
    reports.blocks.Section
        "Summary": the points that need explaining, the methods left out, the completion
        dates and the extensions already granted, the figures per method (when one
        assessed entitlement) and the cautions; always available.
    """
    summary = Section("summary", "Summary")
    blocks = summary.blocks
    blocks.append(_conclusions(ctx))
    for reason in left_out:
        blocks.append(Notice(reason))
    blocks.append(Paragraph("Dates and extensions already granted", style="heading"))
    blocks.append(
        ctx.table("completion_dates", "Contract, planned, forecast and actual completion", "summary", _dates(ctx))
    )
    grants = grants_frame(ctx.case)
    blocks.append(
        ctx.table(
            "extensions_granted",
            "Extensions of time already granted",
            "summary",
            grants,
            labels={
                "days": "days granted (calendar days)",
                "applies_to": "applies to",
                "completion_in_force": "completion in force from that day",
            },
            note=(
                "Each grant is in force from the day it was granted; the completion in force counts the grants made "
                "on or before a date (extensions_granted.csv)."
                if len(grants)
                else "No extension of time has been granted (extensions_granted.csv is absent or empty)."
            ),
        )
    )
    if ctx.entitlement is not None and any(m in ENTITLEMENT_METHODS for m in ctx.results):
        blocks.append(Paragraph("Figures per method", style="heading"))
        blocks += _entitlement_tables(ctx)
    blocks.append(Paragraph("Cautions", style="heading"))
    for caution in CAUTIONS:
        blocks.append(Paragraph(caution, style="caution"))
    return summary
