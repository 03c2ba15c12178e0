"""Section 2, money and its build-up: where each sum of money of the summary comes from.

From :func:`delay.entitlement.assess` (``ctx.entitlement``), for each method:

- the rates of time-related cost and their sources (prolongation_rates.csv by period, and
  the flat ``[commercial] prolongation_cost_per_day`` for a day outside every period);
- the prolongation cost built up (``Entitlement.prolongation``, from
  :func:`delay.entitlement.prolongation_build_up`): compensable days x the rate of the
  period in which their delay arose, one row per rate applied, with a total per method that
  is the prolongation cost of the summary;
- the liquidated damages built up: days of liquidated damages x the rate (the whole works' and each
  section's), the cap of ``[commercial] liquidated_damages_cap`` and whether it bit.

In tables.xlsx these tables carry formula columns that recompute every product, cap and
total (:class:`reports.tables.BuildUp`).
"""

from __future__ import annotations

import pandas as pd

from ..blocks import Paragraph, Section
from ..context import METHOD_NAMES, Context, money_text
from ..tables import BuildUp

__all__ = ["section", "rates_frame", "prolongation_frame", "damages_frame", "PROLONGATION", "DAMAGES"]

#: How the prolongation cost is built up: days x rate, totals per method.
PROLONGATION = BuildUp(products={"cost": ("days", "cost_per_day")}, totals=("days", "cost"), group="method_title")

#: How liquidated damages are built up: days of liquidated damages x rate, then the cap where it is above 0.
DAMAGES = BuildUp(
    products={"damages_before_cap": ("ld_days", "liquidated_damages_per_day")},
    capped={"ld_exposure": ("damages_before_cap", "cap")},
)

_EXPLAIN = (
    "Prolongation is priced when the delay was caused: each method's compensable days are priced at the rate of "
    "the period of prolongation_rates.csv that holds the day their delay arose (a window's last day, an event's "
    "start), else at the flat rate of case.toml (SCL Delay and Disruption Protocol, 2nd edition (2017), core "
    "principle 17, as recalled). Liquidated damages are the days of liquidated damages times the rate, "
    "limited to the cap when "
    "the contract sets one; the cap applies to each figure on its own. Sums already paid are not deducted. In "
    "tables.xlsx the sheets prolongation_build_up and damages_build_up recompute every product, cap and total by "
    "formula, in the columns marked (formula) beside the values: the library that writes the workbook stores a "
    "formula without its result, so a spreadsheet shows the formulas' results once it calculates."
)


def rates_frame(case) -> pd.DataFrame:
    """The rates of time-related cost and their sources.

    Parameters
    ----------
    case : delay.model.Case
        The loaded case.

    Returns
    -------
    pandas.DataFrame
        ``from``, ``to``, ``cost_per_day``, ``source``: each period of
        prolongation_rates.csv (by its row), then the flat rate of case.toml.
    """
    rates = case.prolongation_rates.reset_index(drop=True)
    rows = [
        {
            "from": pd.Timestamp(r["from"]).date(),
            "to": pd.Timestamp(r["to"]).date(),
            "cost_per_day": float(r["cost_per_day"]),
            "source": f"prolongation_rates.csv row {k + 2}",
        }
        for k, r in rates.iterrows()
    ]
    rows.append(
        {
            "from": None,
            "to": None,
            "cost_per_day": float(case.settings.commercial.prolongation_cost_per_day),
            "source": "case.toml [commercial] prolongation_cost_per_day"
            + (", for a day outside every period above" if len(rates) else ""),
        }
    )
    return pd.DataFrame(rows, columns=["from", "to", "cost_per_day", "source"])


def prolongation_frame(ctx: Context) -> pd.DataFrame:
    """Each method's prolongation build-up, one row per rate applied.

    Parameters
    ----------
    ctx : reports.context.Context
        The report's results.

    Returns
    -------
    pandas.DataFrame
        ``method_title`` (the method in words) and the columns of
        :func:`delay.entitlement.prolongation_build_up`, method by method.
    """
    frames = [
        m.prolongation.assign(method_title=METHOD_NAMES[m.method])
        for m in ctx.entitled
        if m.prolongation is not None and len(m.prolongation)
    ]
    columns = ["method_title", "from", "to", "source", "cost_per_day", "days", "cost"]
    if not frames:
        return pd.DataFrame(columns=columns)
    return pd.concat(frames, ignore_index=True)[columns]


def damages_frame(ctx: Context) -> pd.DataFrame:
    """Each method's liquidated damages: the whole works', then each other section's.

    Parameters
    ----------
    ctx : reports.context.Context
        The report's results.

    Returns
    -------
    pandas.DataFrame
        ``method_title``, ``applies_to``, ``ld_days``, ``liquidated_damages_per_day``,
        ``damages_before_cap`` (days x rate), ``cap`` (``[commercial]
        liquidated_damages_cap``, 0: none), ``ld_exposure`` and ``ld_capped`` (the
        entitlement's figures).
    """
    cap = float(ctx.case.settings.commercial.liquidated_damages_cap)
    rows = []
    for item in ctx.entitled:
        figures = [("the whole works", item.ld_days, item.liquidated_damages_per_day, item.ld_exposure, item.ld_capped)]
        for part in item.sections.itertuples(index=False):
            if not part.whole_works and part.ld_days is not None and not pd.isna(part.ld_days):
                figures.append(
                    (
                        f"section {part.section}",
                        part.ld_days,
                        part.liquidated_damages_per_day,
                        part.ld_exposure,
                        part.ld_capped,
                    )
                )
        for what, days, rate, exposure, capped in figures:
            rows.append(
                {
                    "method_title": METHOD_NAMES[item.method],
                    "applies_to": what,
                    "ld_days": int(days),
                    "liquidated_damages_per_day": float(rate),
                    "damages_before_cap": round(int(days) * float(rate), 2),
                    "cap": cap,
                    "ld_exposure": float(exposure),
                    "ld_capped": bool(capped),
                }
            )
    return pd.DataFrame(
        rows,
        columns=[
            "method_title",
            "applies_to",
            "ld_days",
            "liquidated_damages_per_day",
            "damages_before_cap",
            "cap",
            "ld_exposure",
            "ld_capped",
        ],
    )


def _cap_sentence(frame: pd.DataFrame, cap: float, currency: str) -> str:
    if cap <= 0:
        return "The contract sets no cap on liquidated damages ([commercial] liquidated_damages_cap is 0)."
    bit = frame[frame["ld_capped"]]
    text = (
        f"The cap of {money_text(cap, currency)} ([commercial] liquidated_damages_cap) applies to each figure on "
        "its own"
    )
    if not len(bit):
        largest = frame["damages_before_cap"].max() if len(frame) else 0
        return text + f"; it limits none of them (the largest before the cap is {money_text(largest, currency)})."
    limited = "; ".join(
        f"{r.method_title}, {r.applies_to}: {money_text(r.damages_before_cap, currency)}"
        for r in bit.itertuples(index=False)
    )
    return text + f"; it limits: {limited}."


def section(ctx: Context) -> Section:
    """The money section (see the module docstring).

    Parameters
    ----------
    ctx : reports.context.Context
        The report's results; this section reads ``ctx.entitlement`` and the case's rates.

    Returns
    -------
    reports.blocks.Section
        "Money and its build-up"; not available when no method assessed entitlement.
    """
    money = Section("money", "Money and its build-up")
    if ctx.entitlement is None:
        return money.not_shown("No method that assesses entitlement was run, so there is no money to build up.")
    currency = ctx.currency
    blocks = money.blocks
    blocks.append(Paragraph(_EXPLAIN))
    blocks.append(
        ctx.table(
            "prolongation_rates",
            f"Rates of time-related cost per day ({currency}) and their sources",
            "money",
            rates_frame(ctx.case),
            labels={"from": "from", "to": "to", "cost_per_day": f"cost per day ({currency})"},
        )
    )
    build_up = prolongation_frame(ctx)
    none = [METHOD_NAMES[m.method] for m in ctx.entitled if not m.compensable_days]
    totals = "; ".join(f"{METHOD_NAMES[m.method]} {money_text(m.prolongation_cost, currency)}" for m in ctx.entitled)
    blocks.append(
        ctx.table(
            "prolongation_build_up",
            f"Prolongation cost: compensable days x the rate of their period ({currency})",
            "money",
            build_up,
            build_up=PROLONGATION,
            labels={
                "cost_per_day": f"rate per day ({currency})",
                "days": "compensable days",
                "cost": f"cost ({currency})",
                "source": "source of the rate",
            },
            note=(
                f"Each method's total is its prolongation cost: {totals}."
                + (f" No compensable days, so no prolongation: {', '.join(none)}." if none else "")
            ),
        )
    )
    damages = damages_frame(ctx)
    blocks.append(
        ctx.table(
            "damages_build_up",
            f"Liquidated damages: days of liquidated damages x the rate, and the cap ({currency})",
            "money",
            damages,
            build_up=DAMAGES,
            labels={
                "applies_to": "applies to",
                "liquidated_damages_per_day": f"rate per day ({currency})",
                "damages_before_cap": f"before the cap ({currency})",
                "cap": f"cap ({currency}; 0: none)",
                "ld_exposure": f"liquidated damages ({currency})",
                "ld_capped": "the cap bit",
            },
            note=_cap_sentence(damages, float(ctx.case.settings.commercial.liquidated_damages_cap), currency),
        )
    )
    return money
