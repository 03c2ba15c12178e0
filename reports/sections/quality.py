"""Section 3, schedule quality: each programme checked before any method is relied upon.

From :func:`delay.checks.run_all`: the fourteen-point schedule assessment per programme (a
verdict matrix and the metrics in detail), the forensic checks of the records and what they
found, the model elements against the programme, and the changes from each programme to the
next.
"""

from __future__ import annotations

import pandas as pd

from delay.checks import run_all

from ..blocks import Paragraph, Section
from ..context import Context

__all__ = ["section"]

_EXPLAIN = (
    "Before any delay method is relied upon, each programme is checked: the fourteen-point "
    "schedule assessment (DCMA-EA PAM 200.1, October 2012, section 4), forensic checks of the "
    "records (open ends, dangling activities, actual dates that change or are entered late, "
    "out-of-sequence progress, redundant links, the analyst's corrections) and the model elements "
    "against the programme. A failed check is a finding about the records, not an error."
)


def _verdict(passed) -> str:
    return "pass" if passed is True else ("fail" if passed is False else "not applicable")


def _item_text(item) -> str:
    if not isinstance(item, dict):
        return str(item)
    for key in ("activity", "element"):
        if item.get(key):
            return str(item[key])
    if "pred" in item and "succ" in item:
        return f"{item['pred']}>{item['succ']}"
    if "elements" in item:
        return "/".join(str(e) for e in item["elements"])
    return "; ".join(f"{k} {v}" for k, v in item.items())


def _metrics(ctx: Context, snapshots: list[dict], folders: list[str], labels: dict) -> list:
    order = [m["key"] for m in snapshots[0].get("metrics", [])]
    titles = {m["key"]: m["title"] for s in snapshots for m in s.get("metrics", [])}
    cells = {(s["snapshot"], m["key"]): m for s in snapshots for m in s.get("metrics", [])}
    verdicts = [
        {
            "metric": titles[key],
            **{
                folder: _verdict(None if (folder, key) not in cells else cells[(folder, key)].get("passed"))
                for folder in folders
            },
        }
        for key in order
    ]
    detail = [
        {
            "label": snap["label"],
            "metric": m["title"],
            "count": m.get("count"),
            "denominator": m.get("denominator"),
            "percent": m.get("percent"),
            "threshold": m.get("threshold"),
            "verdict": _verdict(m.get("passed")),
            "unit": m.get("unit"),
            "activities": list(m.get("activities") or []),
            "note": m.get("note", ""),
        }
        for snap in snapshots
        for m in snap.get("metrics", [])
    ]
    return [
        ctx.table(
            "quality_verdicts",
            "Schedule assessment: verdict of each metric in each programme",
            "quality",
            pd.DataFrame(verdicts, columns=["metric"] + folders),
            labels=labels,
            style="matrix",
            note="Thresholds as recalled from DCMA-EA PAM 200.1 (2012), section 4.",
        ),
        ctx.table(
            "quality_metrics",
            "Schedule assessment in detail",
            "quality",
            pd.DataFrame(
                detail,
                columns=[
                    "label",
                    "metric",
                    "count",
                    "denominator",
                    "percent",
                    "threshold",
                    "verdict",
                    "unit",
                    "activities",
                    "note",
                ],
            ).astype({"count": "Int64", "denominator": "Int64"}),  # whole numbers, blank where none
            labels={"activities": "activities or links found"},
        ),
    ]


def _data_checks(ctx: Context, snapshots: list[dict], folders: list[str], labels: dict) -> list:
    order = [c["key"] for c in snapshots[0].get("data_checks", [])]
    titles = {c["key"]: c["title"] for s in snapshots for c in s.get("data_checks", [])}
    checked = {(s["snapshot"], c["key"]): c for s in snapshots for c in s.get("data_checks", [])}
    counts = [
        {
            "check": titles[key],
            **{
                folder: None if (folder, key) not in checked else checked[(folder, key)].get("count")
                for folder in folders
            },
        }
        for key in order
    ]
    findings = [
        {
            "label": snap["label"],
            "check": item["title"],
            "status": item.get("status"),
            "count": item.get("count"),
            "items": [_item_text(i) for i in item.get("items") or []],
            "note": item.get("note", ""),
        }
        for snap in snapshots
        for item in snap.get("data_checks", [])
        if item.get("count")
    ]
    return [
        ctx.table(
            "data_checks",
            "Forensic checks of the records: findings in each programme",
            "quality",
            pd.DataFrame(counts, columns=["check"] + folders),
            labels=labels,
            style="matrix",
        ),
        ctx.table(
            "data_check_findings",
            "Forensic checks: what was found",
            "quality",
            pd.DataFrame(findings, columns=["label", "check", "status", "count", "items", "note"]),
        ),
    ]


def _model_links(ctx: Context, snapshot: dict, labels: dict) -> list:
    elements = snapshot.get("elements") or {}
    if not elements:
        return []
    rows = []
    for item in (elements.get("unlinked_elements") or {}).get("items", []):
        rows.append(
            {
                "finding": "element whose work breakdown code matches no activity",
                "items": [item.get("element")],
                "wbs": item.get("wbs", ""),
                "classification": item.get("classification", ""),
                "note": item.get("name", ""),
            }
        )
    for group in (elements.get("duplicates") or {}).get("groups", []):
        rows.append(
            {
                "finding": "suspected duplicate elements (same classification and box)",
                "items": list(group.get("elements", [])),
                "wbs": "",
                "classification": group.get("classification", ""),
                "note": "box " + " ".join(str(v) for v in group.get("box", [])),
            }
        )
    for item in (elements.get("unmodelled_activities") or {}).get("items", []):
        rows.append(
            {
                "finding": f"activity of the {labels.get(item.get('snapshot'), 'programme')} that no element carries",
                "items": [item.get("activity")],
                "wbs": item.get("wbs", ""),
                "classification": "",
                "note": item.get("name", ""),
            }
        )
    return [
        ctx.table(
            "model_links",
            f"Model elements against the programme ({snapshot['label']})",
            "quality",
            pd.DataFrame(rows, columns=["finding", "items", "wbs", "classification", "note"]),
            labels={"items": "elements or activity", "note": "name or box"},
        )
    ]


def section(ctx: Context) -> Section:
    """The schedule quality section (see the module docstring).

    Parameters
    ----------
    ctx : reports.context.Context
        The report's results; this section reads the case alone (and runs :func:`delay.checks.run_all`).

    Returns
    -------
    reports.blocks.Section
        "Schedule quality".
    """
    quality = Section("quality", "Schedule quality")
    found = run_all(ctx.case)
    blocks = quality.blocks
    blocks.append(Paragraph(_EXPLAIN))
    snapshots = found.get("snapshots", [])
    if snapshots:
        folders = [s["snapshot"] for s in snapshots]
        labels = {s["snapshot"]: s["label"] for s in snapshots}
        blocks += _metrics(ctx, snapshots, folders, labels)
        blocks += _data_checks(ctx, snapshots, folders, labels)
        blocks += _model_links(ctx, snapshots[0], labels)
    comparisons = found.get("comparisons", [])
    if comparisons:
        kinds = list(dict.fromkeys(k for c in comparisons for k in c.get("counts", {})))
        rows = [
            {
                "earlier_label": c.get("earlier_label"),
                "later_label": c.get("later_label"),
                **{k: c.get("counts", {}).get(k, 0) for k in kinds},
            }
            for c in comparisons
        ]
        blocks.append(
            ctx.table(
                "snapshot_changes",
                "Changes from each programme to the next",
                "quality",
                pd.DataFrame(rows, columns=["earlier_label", "later_label"] + kinds),
                labels={k: k.replace("_", " ") for k in kinds},
            )
        )
    return quality
