"""The methods side by side, why they differ, and how far the answer rests on two settings.

:func:`compare_methods` puts the causation of every method that the case allows (windows,
impacted as-planned, time impact, collapsed as-built) side by side, per party and per event,
and writes a plain-words explanation generated from those numbers: which method gives each
party the most and the least, and the known reasons such methods differ (what each one
measures). :func:`sensitivity` re-runs the headline figures (extension of time, compensable
and culpable days, damages exposure) under the other progress mode (retained logic or
progress override) and the other concurrency rule (time but not money, or apportionment), so
the reader sees which conclusions depend on them.

The explanation is a reading aid, not a finding: which method suits a dispute is for the
analyst, under the contract and the applicable law (SCL Delay and Disruption Protocol, 2nd
edition (2017), Part B on choosing a method of analysis; AACE RP 29R-03 (2011), section 5 on
choosing a method, both as recalled).
"""

from __future__ import annotations

import dataclasses
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import pandas as pd

from .convert import json_records, split_ids
from .entitlement import Entitlement, assess
from .memo import remembered
from .methods import METHOD_TITLES
from .model import Case

__all__ = [
    "compare_methods",
    "sensitivity",
    "other_progress_figures",
    "adopt_other_progress_figures",
    "available_methods",
    "disagreements",
    "why_they_differ",
    "MethodComparison",
    "METHOD_TITLES",
    "DISAGREEMENT_DAYS",
    "HEADLINE_DAYS",
]


#: What each method measures: the sentence the explanation uses for it.
MEASURES = {
    "windows": "follows the contemporaneous updates, so it charges what actually moved the forecast "
    "completion, progress and re-planning included",
    "impacted": "adds the register's events to the plan alone, at their real dates, ignoring progress and "
    "delays no event describes (the residual is the difference from what happened)",
    "tia": "adds each event to the programme current before it began, so each event is measured against the "
    "programme of its own time, and reconciles each programme with the next through its residual",
    "collapsed": "takes the events out of the as-built record, so it depends on the as-built logic "
    "reproducing the actual dates",
}
PARTY_ORDER = ("employer", "contractor", "neutral", "concurrent", "unexplained", "recovery")

#: Methods whose figures of days differ by more than this many calendar days disagree
#: (:func:`disagreements`): our own threshold, about two working weeks, for the reader's
#: attention; it is no rule of the trade.
DISAGREEMENT_DAYS = 10

#: The headline figures counted in days, with their names in words, in the order they are
#: compared.
HEADLINE_DAYS = {
    "eot_days": "extension of time",
    "compensable_days": "compensable days",
    "ld_days": "days of liquidated damages",
}


def available_methods(case: Case) -> list[str]:
    """List the methods the case's records allow.

    The windows analysis needs two snapshots (the as-built record counts as one), the
    impacted as-planned and the time impact analysis an event register, the collapsed
    as-built an as-built record too.

    Parameters
    ----------
    case : Case
        The loaded case.

    Returns
    -------
    list of str
        Method names in this order: ``windows``, ``impacted``, ``tia``, ``collapsed``.

    Examples
    --------
    >>> available_methods(demo)
    ['windows', 'impacted', 'tia', 'collapsed']
    """
    methods = []
    if len(case.snapshots) + (case.asbuilt_snapshot is not None) >= 2:
        methods.append("windows")
    if len(case.events):
        methods += ["impacted", "tia"]
        if case.asbuilt_snapshot is not None:
            methods.append("collapsed")
    return methods


@dataclass(frozen=True)
class MethodComparison:
    """Per party and per event, one column of days per method, and the explanation.

    Made by :func:`compare_methods`.

    Parameters
    ----------
    methods : tuple of str
        The methods compared, in column order.
    by_party : pandas.DataFrame
        Column ``party`` and one column of days of delay to completion per method.
    by_event : pandas.DataFrame
        Columns ``event``, ``party``, ``title`` and one column of days per method.
    headline : pandas.DataFrame
        One row per method: its headline figures of entitlement.
    explanation : tuple of str
        The differences in plain words, one sentence each.
    """

    methods: tuple[str, ...]
    by_party: pd.DataFrame
    by_event: pd.DataFrame
    headline: pd.DataFrame
    explanation: tuple[str, ...]

    def to_json(self) -> dict:
        """Give the comparison as plain JSON values (the ``comparison.json`` of ``delay demo``).

        Returns
        -------
        dict
            ``methods``, ``by_party``, ``by_event`` and ``headline`` (lists of records, dates
            as ISO text) and ``explanation`` (list of sentences).
        """
        records = json_records
        return {
            "methods": list(self.methods),
            "by_party": records(self.by_party),
            "by_event": records(self.by_event),
            "headline": records(self.headline),
            "explanation": list(self.explanation),
        }


def _party_days(result: Entitlement) -> dict[str, int]:
    table = result.causation.table
    days = table.groupby("party")["days"].sum().to_dict() if len(table) else {}
    return {party: int(value) for party, value in days.items()}


def _event_days(result: Entitlement) -> dict[str, int]:
    """Days per event: for the collapsed as-built each event's own but-for days (the days
    concurrent between parties belong to the group, not to each of its events); for the
    other methods the days of the rows that name the event."""
    if result.method == "collapsed":
        events = result.events
        return {e: int(d) for e, d in zip(events["event"], events["assessed_days"]) if d is not None and not pd.isna(d)}
    table = result.causation.table
    out: dict[str, int] = {}
    for events, days in zip(table["event"], table["days"]):
        ids = split_ids(events)
        for event_id in ids:  # a row explained by several events is shown against each
            out[event_id] = out.get(event_id, 0) + int(days)
    return out


def _group_rows(results: Mapping[str, Entitlement], methods: Sequence[str]) -> list[dict]:
    """One row for the collapsed as-built's days concurrent between parties: shown once, on
    the group's row, not against each of its events."""
    found = results.get("collapsed")
    if found is None:
        return []
    table = found.causation.table
    group = table[table["step"].str.startswith("but for every event")]
    if not len(group) or not int(group["days"].sum()):
        return []
    events = str(group["event"].iloc[0]).replace(";", ", ")
    return [
        {
            "event": "concurrent group",
            "party": "concurrent",
            "title": f"days concurrent between parties ({events})",
            **{m: (int(group["days"].sum()) if m == "collapsed" else 0) for m in methods},
        }
    ]


def compare_methods(case: Case, results: Mapping[str, Entitlement] | None = None) -> MethodComparison:
    """Every available method side by side, with a plain-words explanation of the differences.

    Parameters
    ----------
    case : Case
        The loaded case.
    results : Mapping of str to Entitlement, optional
        Entitlements already assessed, by method; their order is the comparison's. By
        default every method of :func:`available_methods`, assessed here
        (:func:`delay.entitlement.assess`).

    Returns
    -------
    MethodComparison
        ``by_party``: rows employer, contractor, neutral, concurrent, unexplained; one column
        of days of delay to completion per method (each method's rows add up to the delay
        it explains). ``by_event``: one row per event of the register, the days each method
        gives it (a row explained by several events counts against each, and the collapsed
        as-built gives each event's own but-for days, so these columns need not add up),
        and for the collapsed as-built one row of the days concurrent between parties.
        ``headline``: per method the extension of time, the revised completion, compensable
        days and prolongation cost, culpable delay and acceleration days, days of liquidated damages,
        damages exposure, concurrent days and the days each explains. ``explanation``:
        sentences. Only the parties some method gives days to have a row.

    References
    ----------
    SCL Delay and Disruption Protocol, 2nd edition (2017), Part B on choosing a method of
    analysis; AACE RP 29R-03 (2011), section 5 (both as recalled).

    Examples
    --------
    >>> comparison = compare_methods(demo)
    >>> comparison.methods
    ('windows', 'impacted', 'tia', 'collapsed')
    >>> comparison.headline[["method", "eot_days", "compensable_days"]].values.tolist()
    [['windows', 0, 20], ['impacted', 0, 29], ['tia', 4, 32], ['collapsed', 12, 3]]
    """
    methods = tuple(results) if results else tuple(available_methods(case))
    if results is None:
        assessed = assess(case, list(methods))
        results = {m: assessed.method(m) for m in methods}
    party = {m: _party_days(results[m]) for m in methods}
    rows = [
        {"party": p, **{m: party[m].get(p, 0) for m in methods}}
        for p in PARTY_ORDER
        if any(party[m].get(p, 0) for m in methods)
    ]
    by_party = pd.DataFrame(rows, columns=["party", *methods])
    events = case.events
    event_days = {m: _event_days(results[m]) for m in methods}
    by_event = pd.DataFrame(
        [
            {"event": e, "party": p, "title": t, **{m: event_days[m].get(e, 0) for m in methods}}
            for e, p, t in zip(events["id"], events["party"], events["title"])
        ]
        + _group_rows(results, methods),
        columns=["event", "party", "title", *methods],
    )
    headline = pd.DataFrame(
        [
            {
                "method": m,
                "eot_days": results[m].eot_days,
                "revised_completion": results[m].revised_completion,
                "compensable_days": results[m].compensable_days,
                "prolongation_cost": results[m].prolongation_cost,
                "culpable_delay_days": results[m].culpable_delay_days,
                "acceleration_days": results[m].acceleration_days,
                "ld_days": results[m].ld_days,
                "ld_exposure": results[m].ld_exposure,
                "concurrent_days": results[m].concurrent_days,
                "explained_days": results[m].causation.explained_days,
            }
            for m in methods
        ]
    )
    return MethodComparison(
        methods, by_party, by_event, headline, tuple(_explain(methods, by_party, headline, results))
    )


def _explain(methods, by_party: pd.DataFrame, headline: pd.DataFrame, results) -> list[str]:
    if not methods:
        return ["No method can be run on this case's records."]
    lines = []
    eot = headline.set_index("method")["eot_days"]
    if len(methods) > 1:
        high, low = eot.idxmax(), eot.idxmin()
        if eot[high] == eot[low]:
            lines.append(f"All {len(methods)} methods give the same extension of time, {int(eot[high])} days.")
        else:
            lines.append(
                f"The extension of time ranges from {int(eot[low])} days ({METHOD_TITLES[low]}) to "
                f"{int(eot[high])} days ({METHOD_TITLES[high]})."
            )
    for row in by_party.itertuples(index=False):
        values = {m: int(getattr(row, m)) for m in methods}
        if len(methods) > 1 and max(values.values()) != min(values.values()):
            most = max(values, key=values.get)
            least = min(values, key=values.get)
            lines.append(
                f"Delay carried by {row.party}: {values[most]} days by {METHOD_TITLES[most]}, "
                f"{values[least]} by {METHOD_TITLES[least]}."
            )
    for m in methods:
        explained = results[m].causation
        lines.append(
            f"{METHOD_TITLES[m].capitalize()} {MEASURES[m]}; it explains {explained.explained_days} days "
            f"({explained.explains})."
        )
        for row in by_party.itertuples(index=False):
            days = int(getattr(row, m))
            if row.party == "unexplained" and days:
                lines.append(
                    f"By {METHOD_TITLES[m]}, {days} days are delay no event explains (carried by the "
                    "unexplained-risk setting)."
                )
            if row.party == "recovery" and days:
                lines.append(
                    f"By {METHOD_TITLES[m]}, the works finished {-days} days earlier than the method's "
                    "model of the events predicted: the contractor's recovery, counted against its "
                    "culpable delay first (or events modelled larger than they were)."
                )
        if results[m].acceleration_days:
            lines.append(
                f"By {METHOD_TITLES[m]}, the contractor's net recovery is {results[m].acceleration_days} days "
                "of acceleration: shown, and not taken off the extension of time."
            )
    collapsed = results.get("collapsed")
    if collapsed is not None:
        for note in collapsed.causation.notes:
            if "does not reproduce" in note:
                lines.append(
                    "The collapsed as-built figures carry the error of an as-built model that does not "
                    "reproduce every actual date; see its mismatches."
                )
                break
    lines.append(
        "Which method suits the dispute, and whether its assumptions hold on these records, is for the "
        "analyst's professional judgement under the contract and the applicable law."
    )
    return lines


def _spread(comparison: MethodComparison, figure: str) -> tuple[str, int, str, int]:
    """``(method, days, method, days)``: the lowest and the highest value of ``figure``
    (the first method in the comparison's order on a tie)."""
    values = comparison.headline.set_index("method")[figure]
    low, high = values.idxmin(), values.idxmax()
    return low, int(values[low]), high, int(values[high])


def disagreements(comparison: MethodComparison, threshold: int = DISAGREEMENT_DAYS) -> list[dict]:
    """The headline figures of days on which the methods differ by more than ``threshold``.

    Parameters
    ----------
    comparison : MethodComparison
        From :func:`compare_methods`.
    threshold : int, default DISAGREEMENT_DAYS
        Calendar days.

    Returns
    -------
    list of dict
        One per figure of :data:`HEADLINE_DAYS` whose highest and lowest values differ by
        more than ``threshold``: ``figure`` (its name in words), ``difference``, ``low`` and
        ``high`` (method names), ``low_days``, ``high_days``, ``sentence``. Empty when fewer
        than two methods were compared.

    Examples
    --------
    >>> found = disagreements(compare_methods(demo))
    >>> [(f["figure"], f["low"], f["high"], f["difference"]) for f in found]
    [('extension of time', 'windows', 'collapsed', 12), ('compensable days', 'collapsed', 'tia', 29)]
    >>> found[0]["sentence"]
    'The methods differ by 12 days on the extension of time (0 days by windows analysis, ...'
    """
    found = []
    if len(comparison.methods) < 2:
        return found
    for figure, words in HEADLINE_DAYS.items():
        low, low_days, high, high_days = _spread(comparison, figure)
        if high_days - low_days > threshold:
            found.append(
                {
                    "figure": words,
                    "difference": high_days - low_days,
                    "low": low,
                    "high": high,
                    "low_days": low_days,
                    "high_days": high_days,
                    "sentence": (
                        f"The methods differ by {high_days - low_days} days on the {words} ({low_days} days "
                        f"by {METHOD_TITLES[low]}, {high_days} by {METHOD_TITLES[high]}), more than the "
                        f"{threshold} days this report flags."
                    ),
                }
            )
    return found


def why_they_differ(comparison: MethodComparison) -> tuple[str, ...]:
    """Say in one or two sentences, for a first page, why the methods differ.

    How far apart the methods are on the headline figure of days that differs most (the
    first of :data:`HEADLINE_DAYS` on a tie), and what the two methods at either end
    measure.

    Parameters
    ----------
    comparison : MethodComparison
        From :func:`compare_methods`.

    Returns
    -------
    tuple of str
        The sentences: one when no method, one method or methods that all agree were
        compared, else two.

    Examples
    --------
    >>> why_they_differ(compare_methods(demo))[0]
    'The methods differ most on the compensable days: from 3 days by collapsed as-built to 32 by time impact analysis.'
    """
    methods = comparison.methods
    if not methods:
        return ("No method can be run on this case's records.",)
    if len(methods) == 1:
        return (f"Only the {METHOD_TITLES[methods[0]]} was run, so there is no other method to compare it with.",)
    spreads = {figure: _spread(comparison, figure) for figure in HEADLINE_DAYS}
    figure = max(spreads, key=lambda f: spreads[f][3] - spreads[f][1])  # the first on a tie
    low, low_days, high, high_days = spreads[figure]
    if high_days == low_days:
        return (
            f"All {len(methods)} methods give the same extension of time, compensable days and days of liquidated "
            f"damages ({spreads['eot_days'][1]}, {spreads['compensable_days'][1]} and {spreads['ld_days'][1]}).",
        )
    return (
        f"The methods differ most on the {HEADLINE_DAYS[figure]}: from {low_days} days by {METHOD_TITLES[low]} "
        f"to {high_days} by {METHOD_TITLES[high]}.",
        f"The {METHOD_TITLES[high]} {MEASURES[high]}; the {METHOD_TITLES[low]} {MEASURES[low]}.",
    )


def _with_progress(case: Case, progress: str) -> Case:
    """The case under another progress mode (one variant per case, kept with it)."""

    def variant() -> Case:
        settings = dataclasses.replace(
            case.settings, schedule=dataclasses.replace(case.settings.schedule, progress=progress)
        )
        return Case(
            root=case.root,
            settings=settings,
            tables={n: case.table(n) for n in case._tables},
            snapshots=case.snapshots,
            asbuilt_snapshot=case.asbuilt_snapshot,
            corrections=case.corrections,
            input_files=case.input_files,
        )

    return remembered(case, ("with progress", progress), variant)


def sensitivity(case: Case, methods: Sequence[str] | None = None) -> pd.DataFrame:
    """Give the headline figures of each method under the case's settings and the alternatives.

    The alternatives are the other progress mode (retained logic or progress override)
    and the other concurrency rule (time but not money, or apportionment), one at a time.
    Computed once per case and methods (:func:`delay.memo.remembered`); a copy is handed
    out.

    Parameters
    ----------
    case : Case
        The loaded case.
    methods : sequence of str, optional
        The methods to run; by default :func:`available_methods`.

    Returns
    -------
    DataFrame
        One row per method and variant (``as set``, ``other progress mode``, ``other
        concurrency rule``): ``progress``, ``concurrency``, ``eot_days``,
        ``compensable_days``, ``ld_days``, ``ld_exposure``, ``concurrent_days``, and
        ``changed`` (whether any figure differs from the case's own settings).

    Examples
    --------
    >>> table = sensitivity(demo, ["windows"])
    >>> table[["variant", "eot_days", "changed"]].values.tolist()
    [['as set', 0, False], ['other progress mode', 0, False], ['other concurrency rule', 0, False]]
    """
    methods = list(methods) if methods else available_methods(case)
    return remembered(case, ("sensitivity", tuple(methods)), lambda: _sensitivity(case, methods)).copy()


#: The headline figures of one method that the sensitivity table compares, in its order.
FIGURES = ("eot_days", "compensable_days", "ld_days", "ld_exposure", "concurrent_days")


def _other_progress(case: Case) -> str:
    return "progress_override" if case.settings.schedule.progress == "retained_logic" else "retained_logic"


def _figures(assessed: Entitlement, methods: Sequence[str]) -> dict[str, tuple]:
    return {m: tuple(getattr(assessed.method(m), f) for f in FIGURES) for m in methods}


def other_progress_figures(case: Case, methods: Sequence[str]) -> dict[str, tuple]:
    """Give each method's headline figures under the other progress mode.

    The costliest row of :func:`sensitivity`: every method is run again on the case under
    the other progress mode (retained logic or progress override), with the case's own
    concurrency rule. Computed once per case and methods (:func:`delay.memo.remembered`),
    or adopted from another process that made them from the same case
    (:func:`adopt_other_progress_figures`).

    Parameters
    ----------
    case : Case
        The loaded case.
    methods : sequence of str
        The methods to run.

    Returns
    -------
    dict
        Method to its figures, in the order of :data:`FIGURES`.

    Examples
    --------
    >>> other_progress_figures(demo, ["windows"])["windows"][:3]
    (0, 20, 6)
    """
    methods = tuple(methods)
    return remembered(
        case,
        ("other progress figures", methods),
        lambda: _figures(assess(_with_progress(case, _other_progress(case)), methods), methods),
    )


def adopt_other_progress_figures(case: Case, methods: Sequence[str], figures: Mapping[str, tuple]) -> None:
    """Take figures of :func:`other_progress_figures` made in another process as this case's.

    ``delay demo`` makes them on its second core from the same case files: the methods are
    pure functions of the case, so the figures are those this process would compute. Figures
    already known for the case and methods are kept.

    Parameters
    ----------
    case : Case
        The loaded case.
    methods : sequence of str
        The methods the figures were made for.
    figures : mapping
        Method to its figures, as :func:`other_progress_figures` gives them.

    Raises
    ------
    ValueError
        When ``figures`` is not one tuple of :data:`FIGURES` per method.
    """
    methods = tuple(methods)
    if sorted(figures) != sorted(methods) or any(len(f) != len(FIGURES) for f in figures.values()):
        raise ValueError(f"figures for {sorted(figures)} do not fit the methods {sorted(methods)}")
    remembered(case, ("other progress figures", methods), lambda: {m: tuple(figures[m]) for m in methods})


def _sensitivity(case: Case, methods: list[str]) -> pd.DataFrame:
    progress = case.settings.schedule.progress
    concurrency = case.settings.analysis.concurrency
    other_concurrency = "apportion" if concurrency == "time_not_money" else "time_not_money"
    variants = [
        ("as set", progress, concurrency, _figures(assess(case, methods), methods)),
        ("other progress mode", _other_progress(case), concurrency, other_progress_figures(case, methods)),
        (
            "other concurrency rule",
            progress,
            other_concurrency,
            _figures(assess(case, methods, concurrency=other_concurrency), methods),
        ),
    ]
    rows = []
    for name, mode, rule, figures in variants:
        for m in methods:
            rows.append(
                {"method": m, "variant": name, "progress": mode, "concurrency": rule}
                | dict(zip(FIGURES, figures[m], strict=True))
                | {"changed": figures[m] != variants[0][3][m]}
            )
    return pd.DataFrame(rows)
