"""Points of the results that need explaining, found from the numbers and put in plain words.

:func:`warnings_of` reads the methods' results, their entitlement and the comparison, and
writes one sentence for each figure a reader would otherwise have to puzzle out:

- an extension of time beyond the actual overrun past the completion in force, which is the
  same as a revised completion after the actual completion (revised = in force + extension,
  overrun = actual - in force), with how much of the difference the contractor's
  acceleration explains and, for the rest, the method's reason;
- methods that disagree by more than :data:`delay.comparison.DISAGREEMENT_DAYS` on a
  headline figure of days;
- days no event explains, gains (negative days) and the recovery a modelled method finds;
- an as-built model that does not reproduce the actual dates (collapsed as-built);
- an event a method could not score, or applied only in part, and work a hold left alone;
- a programme that may already show an event it is inserted into (time impact analysis).

Nothing here decides anything: each sentence points at a figure and says where it comes from.
"""

from __future__ import annotations

import pandas as pd

from delay.comparison import disagreements

from .context import METHOD_NAMES, Context

__all__ = [
    "warnings_of",
    "extension_beyond_overrun",
    "unexplained_days",
    "events_left_alone",
    "collapsed_model",
    "tia_warnings",
]

#: The reason, per method, for an extension beyond the overrun that acceleration does not explain.
_METHOD_REASON = {
    "windows": "the windows charge each window's movement as it happened, and the contractor's gains in some "
    "windows net against its delays in others",
    "impacted": "the method measures the events in the plan, not what happened on site: the works finished "
    "earlier than its model of the events",
    "tia": "the method measures each event in the programme of its time, not what happened on site: the works "
    "finished earlier than its model of the events",
    "collapsed": "the but-for days are measured on the as-built model, and the model's error is among the days no "
    "event explains",
}


def _name(method: str) -> str:
    return METHOD_NAMES[method].capitalize()


def _days(n: int) -> str:
    return f"{n} day{'s' if abs(n) != 1 else ''}"


def extension_beyond_overrun(item, *, actual_word: str = "actual") -> str | None:
    """The sentence for an extension of time beyond the overrun past the completion in
    force (a revised completion after the actual one), or ``None`` when there is none.

    Parameters
    ----------
    item : delay.entitlement.Entitlement
        One method's entitlement (its extension, overrun, completions and acceleration,
        in calendar days).
    actual_word : str, default "actual"
        ``"actual"``, or ``"forecast"`` when the case has no as-built record.

    Returns
    -------
    str or None
        The sentence, with how much of the excess the contractor's acceleration explains
        and the method's reason for the rest; ``None`` when the extension is not beyond
        the overrun.
    """
    overrun = item.overrun_days
    excess = item.eot_days - max(0, overrun)
    if item.eot_days <= 0 or excess <= 0:
        return None
    if overrun > 0:
        start = (
            f"{_name(item.method)}: the extension of time, {_days(item.eot_days)}, is more than the "
            f"{_days(overrun)} by which the works overran the completion in force "
            f"({item.completion_in_force.isoformat()})"
        )
    else:
        start = (
            f"{_name(item.method)}: the works finished {_days(-overrun)} before the completion in force "
            f"({item.completion_in_force.isoformat()}), yet the extension of time is {_days(item.eot_days)}"
        )
    text = (
        f"{start}, so its revised completion, {item.revised_completion.isoformat()}, falls after the "
        f"{actual_word} completion, {item.actual_completion.isoformat()}."
    )
    accelerated = min(excess, int(item.acceleration_days))
    if accelerated:
        share = f"All {_days(excess)}" if accelerated == excess else f"{accelerated} of the {_days(excess)}"
        text += (
            f" {share} of the difference are the contractor's acceleration (its net recovery of "
            f"{_days(int(item.acceleration_days))}), which is shown and does not cut the extension."
        )
    if excess > accelerated:
        text += f" The other {_days(excess - accelerated)}: {_METHOD_REASON[item.method]}."
    return text


def unexplained_days(item) -> str | None:
    """The sentence for days no event explains, gains and recovery in one method's
    causation table, or ``None`` when it has none.

    Parameters
    ----------
    item : delay.entitlement.Entitlement
        One method's entitlement (its causation table is read).

    Returns
    -------
    str or None
        The sentence (days in calendar days), or ``None`` when there is nothing to say.
    """
    table = item.causation.table
    if not len(table):
        return None
    days = pd.to_numeric(table["days"]).astype(int)
    party = table["party"].astype(str)
    basis = table["basis"].fillna("").astype(str)
    unexplained = (party == "unexplained") | basis.isin(["unexplained", "residual"])
    recovery = party == "recovery"
    parts = []
    late, gain = int(days[unexplained & (days > 0)].sum()), -int(days[unexplained & (days < 0)].sum())
    if late:
        parts.append(f"{_days(late)} of delay that no event explains")
    if gain:
        parts.append(f"{_days(gain)} of gain that no event explains")
    gains = days[~unexplained & ~recovery & (days < 0)]
    if len(gains):
        parts.append(f"{_days(-int(gains.sum()))} of gain charged to events")
    if recovery.any() and int(days[recovery].sum()):
        parts.append(
            f"{_days(-int(days[recovery].sum()))} of recovery (the works finished earlier than its model of "
            "the events predicted: the contractor's recovery, or events modelled larger than they were)"
        )
    return f"{_name(item.method)}: " + "; ".join(parts) + "." if parts else None


def collapsed_model(result) -> str | None:
    """The sentence for a collapsed as-built model that does not reproduce the actual dates.

    Parameters
    ----------
    result : delay.methods.collapsed.CollapsedResult
        The collapsed as-built result.

    Returns
    -------
    str or None
        ``None`` when the model reproduces them.
    """
    if result.reproduced:
        return None
    count = len(result.mismatches)
    return (
        f"Collapsed as-built: the as-built model does not reproduce the actual dates of {count} "
        f"activit{'y' if count == 1 else 'ies'} (modelled completion {result.modelled_completion.isoformat()}, "
        f"actual {result.actual_completion.isoformat()}); its but-for figures carry that error. The activities "
        "and the reasons are listed in its section."
    )


def events_left_alone(method: str, result) -> list[str]:
    """Sentences for the events a method could not score, applied only in part, or whose
    hold left work alone.

    Parameters
    ----------
    method : str
        ``impacted``, ``tia`` or ``collapsed``.
    result : object
        The method's result (its ``events``, with ``applied`` and ``effect``; for the
        collapsed as-built its ``by_event``, with ``days_earlier`` and ``note``).

    Returns
    -------
    list of str
        One sentence per event not scored or applied only in part, then one for all the
        events whose hold left work alone; empty when there are none.
    """
    found = []
    if method == "collapsed":
        events = result.by_event
        for row in events[events["days_earlier"].isna()].itertuples(index=False):
            found.append(f"Collapsed as-built: {row.event} is not scored: {row.note or 'it could not be taken out'}.")
        return found
    events = result.events
    for row in events.itertuples(index=False):
        if row.applied:
            found.append(f"{_name(method)}: {row.event} is applied only in part ({row.applied}).")
    untouched = [str(row.event) for row in events.itertuples(index=False) if row.effect]
    if untouched:
        which = " and ".join([", ".join(untouched[:-1]), untouched[-1]] if len(untouched) > 1 else untouched)
        one = len(untouched) == 1
        verb, its, score = (
            ("leaves", "its", "it scores less than its period suggests")
            if one
            else ("leave", "their", "they score less than their periods suggest")
        )
        found.append(
            f"{_name(method)}: {which} {verb} some of {its} activities alone (a hold stops only work the "
            f"programme has in its period), so {score}; the events table says which."
        )
    return found


def tia_warnings(result) -> list[str]:
    """The time impact analysis's warnings that a programme may already show an event.

    Parameters
    ----------
    result : delay.methods.tia.TimeImpactResult
        The time impact analysis (its events' ``warnings``).

    Returns
    -------
    list of str
        One sentence per warning, naming its event.
    """
    return [
        f"Time impact analysis, {row.event}: {warning}."
        for row in result.events.itertuples(index=False)
        for warning in row.warnings
    ]


def warnings_of(ctx: Context) -> list[str]:
    """Every point of the report's results that needs explaining, in plain words.

    Parameters
    ----------
    ctx : reports.context.Context
        The report's results (:class:`reports.context.Context`).

    Returns
    -------
    list of str
        The extensions beyond the overrun first, then the methods' disagreements, the days
        no event explains, the collapsed as-built model, the events not scored and the
        time impact analysis's warnings.
    """
    actual_word = "actual" if ctx.case.asbuilt_snapshot is not None else "forecast"
    found = [text for item in ctx.entitled if (text := extension_beyond_overrun(item, actual_word=actual_word))]
    if ctx.comparison is not None:
        found += [d["sentence"] for d in disagreements(ctx.comparison)]
    unexplained = [text for item in ctx.entitled if (text := unexplained_days(item))]
    if any("no event explains" in text for text in unexplained):
        unexplained.append(
            "Who carries days no event explains is set by an activity's risk column, else by "
            f"[analysis] unexplained_risk (here: {ctx.case.settings.analysis.unexplained_risk})."
        )
    found += unexplained
    if "collapsed" in ctx.results and (text := collapsed_model(ctx.results["collapsed"])):
        found.append(text)
    for method in ("impacted", "tia", "collapsed"):
        if method in ctx.results:
            found += events_left_alone(method, ctx.results[method])
    if "tia" in ctx.results:
        found += tia_warnings(ctx.results["tia"])
    return found
