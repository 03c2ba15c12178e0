"""What the report holds: every method's results turned into sections, tables and figures.

:func:`compute` runs the analyses a report needs on a loaded case and gathers their results
into a :class:`ReportContent`: an ordered list of :class:`Section` objects made of blocks
(paragraphs, facts, tables, figures, the element timeline) and the list of every
:class:`~reports.tables.ReportTable` they show. Nothing here writes a file or renders HTML;
:mod:`reports.page` renders the content and :func:`reports.build` writes it out, and
``delay verify`` calls :func:`compute` again to compare fingerprints.

Capabilities that this version of the toolkit lacks
---------------------------------------------------
Each section looks up the functions it needs (``delay.methods.collapsed.analyse``,
``delay.checks.run_all``, ``delay.entitlement.assess``, ...) when the report is built. A
module or function that is not there (an ``ImportError`` or ``AttributeError`` on looking
it up) leaves its section in the report with a visible note "not available in this version
of the toolkit" and no figures: a figure is never made up. An error raised *while* an
analysis runs is not caught: a case error reaches the user as plain lines, and anything else
is a fault of the toolkit.
"""

from __future__ import annotations

import dataclasses
import datetime as dt
import importlib
import re
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Callable, Sequence

import pandas as pd

from delay.errors import CaseError, Problem
from delay.model import Case

from .tables import ReportTable

__all__ = [
    "compute",
    "resolve_methods",
    "ReportContent",
    "Section",
    "Paragraph",
    "Facts",
    "TableBlock",
    "FigureBlock",
    "TimelineBlock",
    "Notice",
    "REPORT_METHODS",
    "METHOD_NAMES",
    "SECTIONS",
    "CAUTIONS",
    "NOT_AVAILABLE",
]

#: Methods a report can run, by their command-line names, in the order of the sections.
REPORT_METHODS = ("windows", "impacted", "tia", "collapsed", "asbuilt")
_ENTITLEMENT_METHODS = ("windows", "impacted", "tia", "collapsed")

METHOD_NAMES = {
    "windows": "windows analysis",
    "impacted": "impacted as-planned",
    "tia": "time impact analysis",
    "collapsed": "collapsed as-built",
    "asbuilt": "as planned against as built",
}

#: The sections of the report: key (the page anchor) and title, in order.
SECTIONS: tuple[tuple[str, str], ...] = (
    ("summary", "Summary"),
    ("quality", "Schedule quality"),
    ("windows", "Windows analysis"),
    ("impacted", "Impacted as-planned"),
    ("tia", "Time impact analysis"),
    ("collapsed", "Collapsed as-built"),
    ("comparison", "Method comparison"),
    ("asbuilt", "As planned against as built"),
    ("timeline", "Element timeline"),
    ("inputs", "Inputs and method"),
    ("manifest", "Manifest"),
)

#: The cautions that go with every figure of the report (summary and inputs sections).
CAUTIONS: tuple[str, ...] = (
    "The results depend on the records given to the toolkit and on the method chosen; different "
    "recognised methods can give different answers on the same facts.",
    "Nothing in this report is legal advice.",
    "The contract, the applicable law and the analyst's professional judgement govern; every result "
    "should be reviewed by a competent professional before it is relied upon.",
)

NOT_AVAILABLE = "Not available in this version of the toolkit"

#: At most this many activities are drawn in the as planned against as built chart.
CHART_ACTIVITIES = 300


# -- blocks ------------------------------------------------------------------------------------
@dataclass(frozen=True)
class Paragraph:
    text: str
    kind: str = "paragraph"
    style: str = ""


@dataclass(frozen=True)
class Facts:
    """Label and value pairs (values already in words)."""

    rows: tuple[tuple[str, str], ...]
    kind: str = "facts"


@dataclass(frozen=True)
class TableBlock:
    table: ReportTable
    kind: str = "table"
    style: str = ""  # "matrix": a table of verdicts with turned headings


@dataclass(frozen=True)
class FigureBlock:
    key: str
    figure: Any = field(repr=False)
    caption: str = ""
    kind: str = "figure"


@dataclass(frozen=True)
class TimelineBlock:
    timeline: Any = field(repr=False)
    kind: str = "timeline"


@dataclass(frozen=True)
class Notice:
    """A visible note: a capability missing, a method left out, a caution."""

    text: str
    kind: str = "notice"
    style: str = "not-available"


@dataclass
class Section:
    key: str
    title: str
    blocks: list = field(default_factory=list)
    available: bool = True


@dataclass
class ReportContent:
    """Everything the report shows, before it is rendered.

    Attributes
    ----------
    case: the loaded case.
    title: the report's title.
    methods: the methods asked for (after resolving defaults), in section order.
    sections: in :data:`SECTIONS` order (the manifest section is filled in when rendering).
    tables: every table shown, in page order; keys are unique.
    missing: capabilities looked up and not found (``module.function``).
    """

    case: Case
    title: str
    methods: list[str]
    sections: list[Section]
    tables: list[ReportTable]
    missing: list[str]
    left_out: list[str]

    def fingerprints(self) -> dict[str, str]:
        return {t.key: t.fingerprint() for t in self.tables}

    def table(self, key: str) -> ReportTable:
        for table in self.tables:
            if table.key == key:
                return table
        raise KeyError(key)


class _Missing(Exception):
    def __init__(self, what: str):
        self.what = what
        super().__init__(what)


def _capability(module: str, name: str) -> Callable:
    """``module.name`` if this version of the toolkit has it, else raise ``_Missing``."""
    try:
        found = importlib.import_module(module)
        return getattr(found, name)
    except (ImportError, AttributeError):
        raise _Missing(f"{module}.{name}") from None


def _has(module: str, name: str) -> bool:
    try:
        _capability(module, name)
        return True
    except _Missing:
        return False


# -- methods -------------------------------------------------------------------------------------
def resolve_methods(case: Case, methods: str | Sequence[str] | None) -> tuple[list[str], list[str]]:
    """The methods to run and, for defaults left out, why.

    ``None`` or ``"all"``: every method the case supports (a windows analysis needs two
    programmes; the collapsed as-built and as planned against as built need an as-built
    record). Names given are kept as given (in section order) and an unsupported one fails
    in its method with the method's own message.

    Raises
    ------
    CaseError: an unknown method name.
    """
    if isinstance(methods, str):
        methods = [m.strip() for m in methods.split(",") if m.strip()]
    if not methods or list(methods) == ["all"]:
        chosen, reasons = [], []
        programmes = len(case.snapshots) + (case.asbuilt_snapshot is not None)
        for method in REPORT_METHODS:
            if method == "windows" and programmes < 2:
                reasons.append("The windows analysis is left out: the case holds one programme only.")
                continue
            if method in ("collapsed", "asbuilt") and case.asbuilt_snapshot is None:
                reasons.append(f"The {METHOD_NAMES[method]} is left out: the case has no as-built record "
                               "(asbuilt.csv).")
                continue
            chosen.append(method)
        return chosen, reasons
    unknown = [m for m in methods if m not in REPORT_METHODS]
    if unknown:
        raise CaseError(Problem(file="--methods", message=f"unknown method '{unknown[0]}'",
                                fix=f"choose among: {', '.join(REPORT_METHODS)} (comma separated), or all"))
    return [m for m in REPORT_METHODS if m in methods], []


_RUNNERS = {
    "windows": ("delay.methods.windows", "analyse"),
    "impacted": ("delay.methods.impacted", "analyse"),
    "tia": ("delay.methods.time_impact", "analyse"),
    "collapsed": ("delay.methods.collapsed", "analyse"),
    "asbuilt": ("delay.methods.as_built", "compare"),
}


class _Context:
    def __init__(self, case: Case, methods: list[str]):
        self.case = case
        self.methods = methods
        self.results: dict[str, Any] = {}
        self.tables: list[ReportTable] = []
        self.missing: list[str] = []
        self.entitlement = None
        self.entitlement_missing: str | None = None
        self.missing_methods: dict[str, str] = {}
        self._cpm_cache: dict[str, Any] = {}

    # tables
    def table(self, key: str, title: str, section: str, frame: pd.DataFrame, *, note: str = "",
              labels: dict | None = None, style: str = "") -> TableBlock:
        if any(t.key == key for t in self.tables):
            raise ValueError(f"two tables named {key}")
        table = ReportTable(key=key, title=title, section=section, frame=frame.reset_index(drop=True),
                            labels=labels or {}, note=note)
        self.tables.append(table)
        return TableBlock(table, style=style)

    def miss(self, what: str) -> Notice:
        if what not in self.missing:
            self.missing.append(what)
        return Notice(f"{NOT_AVAILABLE}: this section needs {what}, which this version does not have. "
                      "It is left out; no figure is shown in its place.")

    # schedules
    def completion(self, snapshot) -> dt.date:
        if snapshot.folder not in self._cpm_cache:
            from delay.cpm import calendars_of, prepare

            calendars = self._cpm_cache.setdefault("~calendars", calendars_of(self.case))
            self._cpm_cache[snapshot.folder] = prepare(self.case, snapshot, calendars=calendars).completion()
        return self._cpm_cache[snapshot.folder]

    def causation_table(self, method: str) -> pd.DataFrame | None:
        if self.entitlement is not None:
            return self.entitlement.method(method).causation.table
        try:
            causation = _capability("delay.causation", "causation")
        except _Missing:
            return None
        return causation(self.case, method, self.results[method]).table


# -- helpers ---------------------------------------------------------------------------------------
def _words(value) -> str:
    if value is None or (not isinstance(value, (str, list, tuple)) and pd.isna(value)):
        return "not given"
    if isinstance(value, (dt.date, pd.Timestamp)):
        return pd.Timestamp(value).date().isoformat()
    return str(value)


def _days(n: int) -> str:
    return f"{n} calendar day{'s' if abs(n) != 1 else ''}"


def _wbs_key(code) -> tuple:
    parts = re.split(r"[.\-/ ]", str(code or ""))
    return tuple((0, int(p), "") if p.isdigit() else (1, 0, p) for p in parts) if code else ((2, 0, ""),)


def _docstring_part(module_name: str, heading: str) -> list[str]:
    """The paragraphs under ``heading`` (a numpydoc-style heading) of a module's docstring."""
    try:
        doc = importlib.import_module(module_name).__doc__ or ""
    except ImportError:
        return []
    lines = doc.splitlines()
    out: list[str] = []
    inside = False
    for number, line in enumerate(lines):
        underline = lines[number + 1].strip() if number + 1 < len(lines) else ""
        is_heading = bool(line.strip()) and underline and set(underline) == {"-"}
        if is_heading:
            if inside:
                break
            inside = line.strip() == heading
            continue
        if inside and not (line.strip() and set(line.strip()) == {"-"}):
            out.append(line.strip())
    paragraphs, current = [], []
    for line in out:
        if not line:
            if current:
                paragraphs.append(" ".join(current))
                current = []
        elif line.startswith("- ") and current:
            paragraphs.append(" ".join(current))
            current = [line]
        else:
            current.append(line)
    if current:
        paragraphs.append(" ".join(current))
    return paragraphs


def _list_text(items, limit: int = 12) -> str:
    items = [str(i) for i in items]
    if len(items) > limit:
        return ", ".join(items[:limit]) + f" and {len(items) - limit} more"
    return ", ".join(items)


def _item_text(item) -> str:
    if not isinstance(item, dict):
        return str(item)
    if "id" in item:
        return str(item["id"])
    if "activity" in item and item.get("activity"):
        return str(item["activity"])
    if "pred" in item and "succ" in item:
        return f"{item['pred']}>{item['succ']}"
    if "elements" in item:
        return "/".join(str(e) for e in item["elements"])
    return "; ".join(f"{k} {v}" for k, v in item.items())


# -- sections ----------------------------------------------------------------------------------------
_EXPLAIN = {
    "quality": (
        "Before any delay method is relied upon, each programme is checked: the fourteen-point "
        "schedule assessment (DCMA-EA PAM 200.1, October 2012, section 4), forensic checks of the "
        "records (open ends, dangling activities, actual dates that change or are entered late, "
        "out-of-sequence progress, redundant links, the analyst's corrections) and the model elements "
        "against the programme. A failed check is a finding about the records, not an error."),
    "windows": (
        "The progress updates cut the project into windows. In each window the forecast completion at "
        "the end is compared with the one at the start. A half-step brings the earlier programme to the "
        "later data date with the later progress alone, so each window's movement splits into what "
        "progress did and what the revisions to the programme did. Progress is charged to the "
        "activities on the chain that drives the completion activity, by how late each finished against "
        "the late dates its logic alone allowed (milestone constraints change nothing), in work days of "
        "the completion activity's calendar: float used and weekends or shutdowns crossed are not delay, "
        "and an activity that only carried an earlier delay is charged nothing. Revisions are charged to "
        "each kind of change in turn. In every window the charges add up to the movement, to the day, "
        "and the windows add up to the whole movement."),
    "impacted": (
        "Each delay event of the register is put into the baseline programme, first on its own (its "
        "impact alone) and then one after another in the order they happened (the cumulative run). "
        "Impacts alone need not add up: events on parallel paths overlap and one can hide another. "
        "The increments of the cumulative run do add up, to the total impact. Each event is put in at "
        "its real dates; a hold stops the work it names for its period, and leaves alone work the plan "
        "has no work on then. The method measures the plan's response to the events, not what happened "
        "on site: the residual, the actual completion less the impacted one, shows the difference."),
    "tia": (
        "Each delay event is put into the last programme before it began (or the one the analyst names "
        "in tia_update), and its effect on that programme's forecast completion is measured. Events "
        "that share a programme are inserted one after another; their increments add up within it. "
        "Each programme's residual, the next programme's completion less its impacted completion, "
        "reconciles the increments with what happened: a positive residual is delay no event explains, "
        "a negative one recovery."),
    "collapsed": (
        "The as-built record is turned into a programme that reproduces the actual dates. The delay of "
        "one party's events (or of one event) is then taken out and the works are scheduled again: "
        "but for those events, the works would have finished on the date shown. But-for figures need "
        "not add up: with delays on parallel paths, taking out either alone may move completion "
        "little, while taking out both moves it a lot."),
    "comparison": (
        "Different recognised methods can give different answers on the same facts. This section sets "
        "the methods' figures side by side and explains in plain words why they differ."),
    "asbuilt": (
        "The planned dates of the baseline are set beside the actual dates of the as-built record, "
        "activity by activity, in calendar and in work days. The as-built critical path is traced back "
        "from the completion activity, each activity to the predecessor that held it back. Each activity "
        "on it contributes how much later it finished, past its own float, than its driving predecessor "
        "had (by the windows rules), and that delay falls in the period of its actual finish: an "
        "activity carried across a shutdown, or slipping into its own float, contributes nothing."),
    "timeline": (
        "The building model's elements take the colour of their work's state week by week, as planned "
        "(the baseline's early dates) and as built (the as-built record). Press Play, or move the "
        "slider, to watch what should have been built against what was built."),
}


def _summary(ctx: _Context, left_out: list[str]) -> Section:
    case = ctx.case
    project = case.settings.project
    section = Section("summary", "Summary")
    blocks = section.blocks
    blocks.append(Paragraph(f"Project: {project.name}."))
    rows = [{"what": "contract start", "date": project.contract_start, "note": ""},
            {"what": "contract completion", "date": project.contract_completion, "note": "as in the contract"}]
    in_force = None
    try:
        completion_in_force = _capability("delay.entitlement", "completion_in_force")
        contract, granted, in_force = completion_in_force(case)
        rows.append({"what": "contract completion in force", "date": in_force,
                     "note": f"the contract completion plus {_days(granted)} already granted"})
    except _Missing as missing:
        blocks.append(ctx.miss(missing.what))
    planned = ctx.completion(case.baseline)
    rows.append({"what": "planned completion", "date": planned, "note": "the baseline programme's completion"})
    if case.updates:
        last = case.updates[-1]
        rows.append({"what": "forecast completion", "date": ctx.completion(last),
                     "note": f"{last.label}, data date {last.data_date.isoformat()}"})
    actual = None
    if case.asbuilt_snapshot is not None:
        actual = ctx.completion(case.asbuilt_snapshot)
        rows.append({"what": "actual completion", "date": actual, "note": "the as-built record"})
    frame = pd.DataFrame(rows, columns=["what", "date", "note"])
    blocks.append(ctx.table("completion_dates", "Contract, planned, forecast and actual completion", "summary",
                            frame))
    facts = []
    reached = actual if actual is not None else (ctx.completion(case.updates[-1]) if case.updates else None)
    if reached is not None:
        word = "actual" if actual is not None else "forecast"
        facts.append((f"{word.capitalize()} completion against planned", _days((reached - planned).days) + " later"
                      if reached >= planned else _days((planned - reached).days) + " earlier"))
        if in_force is not None:
            difference = (reached - in_force).days
            facts.append((f"{word.capitalize()} completion against the contract completion in force",
                          _days(difference) + " later" if difference >= 0 else _days(-difference) + " earlier"))
    if facts:
        blocks.append(Facts(tuple(facts)))

    entitled = [m for m in ctx.methods if m in _ENTITLEMENT_METHODS and m in ctx.results]
    if ctx.entitlement_missing:
        blocks.append(ctx.miss(ctx.entitlement_missing))
    elif ctx.entitlement is not None and entitled:
        currency = ctx.entitlement.currency
        figures = [
            ("contract completion in force", "completion_in_force"),
            ("planned completion", "planned_completion"),
            ("excusable days (time)", "excusable_days"),
            ("completion with only the excusable delays", "completion_with_excusable_delays"),
            ("extension of time (calendar days)", "eot_days"),
            ("revised completion date", "revised_completion"),
            ("actual or forecast completion", "actual_completion"),
            ("compensable days (time and money)", "compensable_days"),
            (f"prolongation cost ({currency})", "prolongation_cost"),
            ("culpable days", "culpable_days"),
            (f"liquidated damages exposure ({currency})", "ld_exposure"),
            ("damages limited by the cap", "ld_capped"),
            ("concurrent days", "concurrent_days"),
        ]
        data: dict[str, list] = {"figure": [label for label, _ in figures]}
        for item in ctx.entitlement.methods:
            data[item.method] = [getattr(item, name) for _, name in figures]
        data["figure"].append("delay explained (calendar days)")
        data["figure"].append("what that delay is")
        for item in ctx.entitlement.methods:
            data[item.method] += [item.causation.explained_days, item.causation.explains]
        frame = pd.DataFrame(data)
        labels = {m: METHOD_NAMES[m] for m in entitled}
        labels["figure"] = "figure"
        blocks.append(ctx.table(
            "entitlement_by_method", f"Extension of time and money per method (money in {currency})", "summary",
            frame, labels=labels,
            note=(f"Concurrency rule: {ctx.entitlement.concurrency.replace('_', ' ')}. Each method's classified "
                  "days add up to the delay it explains; impacts alone and but-for days need not add up. The "
                  "methods measure different things and their figures are not to be added.")))
        chart = pd.DataFrame({"method": [METHOD_NAMES[m.method] for m in ctx.entitlement.methods],
                              "eot_days": [m.eot_days for m in ctx.entitlement.methods],
                              "compensable_days": [m.compensable_days for m in ctx.entitlement.methods],
                              "culpable_days": [m.culpable_days for m in ctx.entitlement.methods]})
        from .figures import days_by_method

        blocks.append(FigureBlock("days_by_method", days_by_method(chart, title="Days by method"),
                                  "Extension of time, compensable and culpable days of each method."))
        sections = [m.sections.assign(method=m.method) for m in ctx.entitlement.methods if len(m.sections)]
        if sections:
            frame = pd.concat(sections, ignore_index=True)
            columns = ["method", "section", "name", "completion_activity", "completion_in_force",
                       "planned_completion", "excusable_days", "eot_days", "revised_completion", "actual_completion",
                       "compensable_days", "prolongation_cost", "culpable_days", "ld_exposure", "note"]
            frame = frame[columns].assign(method=frame["method"].map(METHOD_NAMES))
            blocks.append(ctx.table("entitlement_by_section", f"Sections (money in {currency})", "summary", frame,
                                    note="Sections' figures overlap each other and the whole works': never add them."))
        events = [m.events.assign(method=m.method) for m in ctx.entitlement.methods if len(m.events)]
        if events:
            frame = pd.concat(events, ignore_index=True)
            frame = frame[["method"] + [c for c in frame.columns if c != "method"]]
            frame = frame.assign(method=frame["method"].map(METHOD_NAMES))
            blocks.append(ctx.table("entitlement_by_event", "Events: days claimed beside days assessed", "summary",
                                    frame, labels={"title": "event title"}))
        owners: dict[str, list[str]] = {}
        for item in ctx.entitlement.methods:
            for note in item.notes:
                owners.setdefault(note, []).append(METHOD_NAMES[item.method])
        for note, names in owners.items():
            prefix = "" if len(names) == len(ctx.entitlement.methods) > 1 else ", ".join(names).capitalize() + ": "
            blocks.append(Paragraph(prefix + note, style="small"))
    elif not entitled:
        blocks.append(Notice("No method that assesses entitlement was run, so no extension of time or money "
                             "is shown.", style="left-out"))
    for reason in left_out:
        blocks.append(Notice(reason, style="left-out"))
    blocks.append(Paragraph("Cautions", style="heading"))
    for caution in CAUTIONS:
        blocks.append(Paragraph(caution, style="caution"))
    return section


def _quality(ctx: _Context) -> Section:
    section = Section("quality", "Schedule quality")
    try:
        run_all = _capability("delay.checks", "run_all")
    except _Missing as missing:
        section.available = False
        section.blocks.append(ctx.miss(missing.what))
        return section
    found = run_all(ctx.case)
    blocks = section.blocks
    blocks.append(Paragraph(_EXPLAIN["quality"]))
    snapshots = found.get("snapshots", [])
    folders = [s["folder"] for s in snapshots]
    labels = {s["folder"]: s["snapshot"] for s in snapshots}
    if snapshots:
        verdict_rows, metric_rows = [], []
        order = [m["key"] for m in snapshots[0].get("metrics", [])]
        titles = {m["key"]: m["title"] for s in snapshots for m in s.get("metrics", [])}
        cells = {(s["folder"], m["key"]): m for s in snapshots for m in s.get("metrics", [])}
        for key in order:
            row = {"metric": titles[key]}
            for folder in folders:
                metric = cells.get((folder, key))
                passed = None if metric is None else metric.get("passed")
                row[folder] = "pass" if passed is True else ("fail" if passed is False else "not applicable")
            verdict_rows.append(row)
        for snap in snapshots:
            for metric in snap.get("metrics", []):
                passed = metric.get("passed")
                metric_rows.append({
                    "snapshot": snap["snapshot"], "metric": metric["title"], "count": metric.get("count"),
                    "denominator": metric.get("denominator"), "percent": metric.get("percent"),
                    "threshold": metric.get("threshold"),
                    "verdict": "pass" if passed is True else ("fail" if passed is False else "not applicable"),
                    "unit": metric.get("unit"), "activities": list(metric.get("activities") or []),
                    "note": metric.get("note", "")})
        blocks.append(ctx.table("quality_verdicts", "Schedule assessment: verdict of each metric in each programme",
                                "quality", pd.DataFrame(verdict_rows, columns=["metric"] + folders),
                                labels=labels, style="matrix",
                                note="Thresholds as recalled from DCMA-EA PAM 200.1 (2012), section 4."))
        blocks.append(ctx.table("quality_metrics", "Schedule assessment in detail", "quality",
                                pd.DataFrame(metric_rows, columns=["snapshot", "metric", "count", "denominator",
                                                                   "percent", "threshold", "verdict", "unit",
                                                                   "activities", "note"]),
                                labels={"activities": "activities or links found"}))
        check_rows, finding_rows = [], []
        check_order = [c["key"] for c in snapshots[0].get("data_checks", [])]
        check_titles = {c["key"]: c["title"] for s in snapshots for c in s.get("data_checks", [])}
        checked = {(s["folder"], c["key"]): c for s in snapshots for c in s.get("data_checks", [])}
        for key in check_order:
            row = {"check": check_titles[key]}
            for folder in folders:
                item = checked.get((folder, key))
                row[folder] = None if item is None else item.get("count")
            check_rows.append(row)
        for snap in snapshots:
            for item in snap.get("data_checks", []):
                if item.get("count"):
                    finding_rows.append({"snapshot": snap["snapshot"], "check": item["title"],
                                         "status": item.get("status"), "count": item.get("count"),
                                         "items": [_item_text(i) for i in item.get("items") or []],
                                         "note": item.get("note", "")})
        blocks.append(ctx.table("data_checks", "Forensic checks of the records: findings in each programme",
                                "quality", pd.DataFrame(check_rows, columns=["check"] + folders), labels=labels,
                                style="matrix"))
        blocks.append(ctx.table("data_check_findings", "Forensic checks: what was found", "quality",
                                pd.DataFrame(finding_rows, columns=["snapshot", "check", "status", "count", "items",
                                                                    "note"])))
        elements = snapshots[0].get("elements") or {}
        link_rows = []
        for item in (elements.get("unlinked_elements") or {}).get("items", []):
            link_rows.append({"finding": "element whose work breakdown code matches no activity",
                              "items": [item.get("id")], "wbs": item.get("wbs", ""),
                              "classification": item.get("classification", ""), "note": item.get("name", "")})
        for group in (elements.get("duplicates") or {}).get("groups", []):
            link_rows.append({"finding": "suspected duplicate elements (same classification and box)",
                              "items": list(group.get("elements", [])), "wbs": "",
                              "classification": group.get("classification", ""),
                              "note": "box " + " ".join(str(v) for v in group.get("box", []))})
        for item in (elements.get("unmodelled_activities") or {}).get("items", []):
            link_rows.append({"finding": f"activity of the {item.get('snapshot', 'programme')} that no element carries",
                              "items": [item.get("id")], "wbs": item.get("wbs", ""), "classification": "",
                              "note": item.get("name", "")})
        if elements:
            blocks.append(ctx.table("model_links", f"Model elements against the programme ({snapshots[0]['snapshot']})",
                                    "quality", pd.DataFrame(link_rows, columns=["finding", "items", "wbs",
                                                                                "classification", "note"]),
                                    labels={"items": "elements or activity", "note": "name or box"}))
    comparisons = found.get("comparisons", [])
    if comparisons:
        kinds = list(dict.fromkeys(k for c in comparisons for k in c.get("counts", {})))
        rows = [{"earlier": c.get("earlier"), "later": c.get("later"), **{k: c.get("counts", {}).get(k, 0) for k in kinds}}
                for c in comparisons]
        blocks.append(ctx.table("snapshot_changes", "Changes from each programme to the next", "quality",
                                pd.DataFrame(rows, columns=["earlier", "later"] + kinds),
                                labels={k: k.replace("_", " ") for k in kinds}))
    return section


def _method_missing(ctx: _Context, section: Section, method: str) -> bool:
    """Fill ``section`` with the reason when the method did not run; True when it did."""
    if method in ctx.results:
        return True
    section.available = False
    if method in ctx.missing_methods:
        section.blocks.append(ctx.miss(ctx.missing_methods[method]))
    else:
        section.blocks.append(Notice(f"The {METHOD_NAMES[method]} was not run for this report (see the methods "
                                     "chosen in the inputs section).", style="left-out"))
    return False


def _causation_block(ctx: _Context, method: str, key: str, title: str, section: str, columns: list[str],
                     only_charged: bool = False):
    table = ctx.causation_table(method)
    if table is None:
        return ctx.miss("delay.causation.causation")
    if only_charged and len(table):
        table = table[(table["days"] != 0) | (table["concurrent_with"].fillna("") != "")]
    return ctx.table(key, title, section, table[[c for c in columns if c in table.columns]],
                     note="Excusable days give time; compensable days (a part of the excusable days) give time and "
                          "money; culpable days give neither. Excusable and culpable days add up to the days.")


def _windows(ctx: _Context) -> Section:
    section = Section("windows", "Windows analysis")
    if not _method_missing(ctx, section, "windows"):
        return section
    result = ctx.results["windows"]
    case = ctx.case
    blocks = section.blocks
    blocks.append(Paragraph(_EXPLAIN["windows"]))
    points = []
    if result.windows:
        first = result.windows[0]
        points.append((first.start, first.start_label, first.start_data_date, first.completion_start))
        points += [(w.end, w.end_label, w.end_data_date, w.completion_end) for w in result.windows]
    trend = pd.DataFrame([{"snapshot": folder, "label": label, "kind": case.snapshot(folder).kind,
                           "data_date": data_date, "completion": completion}
                          for folder, label, data_date, completion in points],
                         columns=["snapshot", "label", "kind", "data_date", "completion"])
    in_force = ctx.entitlement.methods[0].completion_in_force if ctx.entitlement is not None else None
    from .figures import completion_trend, window_movements

    blocks.append(FigureBlock("completion_trend", completion_trend(
        trend, contract_in_force=in_force, planned=ctx.completion(case.baseline)),
        "Forecast completion of each programme at its data date (the as-built record at its last day)."))
    blocks.append(ctx.table("completion_trend", "Forecast completion at each programme", "windows", trend,
                            labels={"snapshot": "programme folder"}))
    table = result.table
    blocks.append(ctx.table("windows", "Windows: movement of completion and its split", "windows", table,
                            note=f"Total movement {_days(result.total_movement_days)}, from "
                                 f"{result.first_completion.isoformat()} to {result.last_completion.isoformat()}."))
    if len(table):
        blocks.append(FigureBlock("window_movements", window_movements(table),
                                  "Each window's movement of completion: progress and revisions."))
    blocks.append(_causation_block(
        ctx, "windows", "windows_causation", "Causation in each window (charges other than zero)", "windows",
        ["window", "step", "activities", "event", "party", "days", "causes", "concurrent_with", "excusable_days",
         "compensable_days", "culpable_days", "classification"], only_charged=True))
    changes = pd.DataFrame([{
        "window": w.number, "start": w.start, "end": w.end, "driving_start": len(w.driving_start),
        "driving_end": len(w.driving_end), "joined": list(w.joined_driving_path), "left": list(w.left_driving_path),
    } for w in result.windows], columns=["window", "start", "end", "driving_start", "driving_end", "joined", "left"])
    blocks.append(ctx.table("driving_path_changes", "Driving path changes in each window", "windows", changes))
    return section


def _steps(rows: list[dict]) -> pd.DataFrame:
    return pd.DataFrame(rows, columns=["run", "step", "completion", "alone", "title"])


#: Causation columns shown for the modelled methods (time impact adds ``snapshot``).
_MODELLED_CAUSATION_COLUMNS = ["step", "event", "party", "days", "alone_days", "causes", "concurrent_with",
                               "concurrent_days", "excusable_days", "compensable_days", "culpable_days",
                               "classification"]


def _event_rows(events: pd.DataFrame, extra: list[str] = (), alone: list[str] = (),
                increment: list[str] = ()) -> pd.DataFrame:
    """A modelled method's events for the report: the figures, and one column of notes
    (activities not found, what a hold left alone, warnings)."""
    notes = []
    for record in events.itertuples(index=False):
        parts = [record.applied, record.effect, *getattr(record, "warnings", [])]
        notes.append("; ".join(p for p in parts if p))
    columns = ["id", "title", "party", "impact", "start", *extra, "alone_days", *alone, "increment_days", *increment,
               "completion_after"]
    return events[columns].assign(notes=notes)


def _impacted(ctx: _Context) -> Section:
    section = Section("impacted", "Impacted as-planned")
    if not _method_missing(ctx, section, "impacted"):
        return section
    result = ctx.results["impacted"]
    blocks = section.blocks
    blocks.append(Paragraph(_EXPLAIN["impacted"]))
    if not len(result.events):
        blocks.append(Notice("The delay event register holds no events: nothing was inserted.", style="left-out"))
    blocks.append(Facts((("Programme impacted", result.base), ("Completion before any event",
                                                                 result.completion_base.isoformat()),
                         ("Completion after every event", result.completion_cumulative.isoformat()),
                         ("Total impact", _days(result.total_days)),
                         ("Actual completion", result.actual_completion.isoformat()),
                         ("Residual (actual less impacted)", _days(result.residual_days)))))
    rows = [{"run": result.base, "step": "before any event", "completion": result.completion_base, "alone": None,
             "title": "the programme before any event"}]
    rows += [{"run": result.base, "step": r.id, "completion": r.completion_after, "alone": r.completion_alone,
              "title": r.title} for r in result.events.itertuples(index=False)]
    from .figures import completion_steps

    blocks.append(FigureBlock("impacted_steps", completion_steps(_steps(rows), title="Completion after each event"),
                              "The staircase is the cumulative run; hollow markers show each event alone."))
    blocks.append(ctx.table("impacted_events", "Each event alone and in the cumulative run", "impacted",
                            _event_rows(result.events, ["finish"], ["alone_work_days", "completion_alone"],
                                        ["increment_work_days"]), note=" ".join(result.notes)))
    blocks.append(ctx.table("impacted_by_party", "Per party", "impacted", result.by_party,
                            labels={"alone_days": "the party's events together, without the others"}))
    blocks.append(_causation_block(
        ctx, "impacted", "impacted_causation", "Causation of the impacted as-planned", "impacted",
        _MODELLED_CAUSATION_COLUMNS))
    return section


def _tia(ctx: _Context) -> Section:
    section = Section("tia", "Time impact analysis")
    if not _method_missing(ctx, section, "tia"):
        return section
    result = ctx.results["tia"]
    blocks = section.blocks
    blocks.append(Paragraph(_EXPLAIN["tia"]))
    if not len(result.events):
        blocks.append(Notice("The delay event register holds no events: nothing was inserted.", style="left-out"))
    rows = []
    for update in result.updates.itertuples(index=False):
        rows.append({"run": update.snapshot, "step": "before", "completion": update.completion_before, "alone": None,
                     "title": f"the update of {update.data_date.isoformat()} before its events"})
        events = result.events[result.events["update"] == update.snapshot]
        rows += [{"run": update.snapshot, "step": r.id, "completion": r.completion_after, "alone": r.completion_alone,
                  "title": r.title} for r in events.itertuples(index=False)]
    from .figures import completion_steps

    if rows:
        blocks.append(FigureBlock("tia_steps", completion_steps(_steps(rows), title="Completion of each update "
                                                                                   "after its events"),
                                  "One staircase per update; hollow markers show each event alone."))
    blocks.append(ctx.table("tia_updates", "Each programme: its events, impacted completion and residual", "tia",
                            result.updates, labels={"increment_days": "increments of its events (calendar days)",
                                                    "events": "events inserted"}))
    blocks.append(ctx.table("tia_events", "Each event in the programme it was inserted into", "tia",
                            _event_rows(result.events, ["update", "completion_before"]), note=" ".join(result.notes)))
    blocks.append(ctx.table("tia_by_party", "Per party", "tia", result.by_party,
                            labels={"alone_days": "impacts alone of its events, summed (need not add up)",
                                    "increment_days": "increments of its events (calendar days)"}))
    blocks.append(_causation_block(
        ctx, "tia", "tia_causation", "Causation of the time impact analysis", "tia",
        ["step", "snapshot", *_MODELLED_CAUSATION_COLUMNS[1:]]))
    return section


def _collapsed(ctx: _Context) -> Section:
    section = Section("collapsed", "Collapsed as-built")
    if not _method_missing(ctx, section, "collapsed"):
        return section
    result = ctx.results["collapsed"]
    blocks = section.blocks
    blocks.append(Paragraph(_EXPLAIN["collapsed"]))
    blocks.append(Facts((
        ("Actual completion", result.actual_completion.isoformat()),
        ("Completion of the as-built model", result.modelled_completion.isoformat()),
        ("The model reproduces the actual dates", "yes" if result.reproduced else
         f"no: {len(result.mismatches)} activities differ (listed below)"),
    )))
    from .figures import but_for_days

    if result.by_party["days_earlier"].notna().any():
        blocks.append(FigureBlock("but_for_days", but_for_days(result.by_party),
                                  "But-for days of each party's events and of all events: they need not add up."))
    blocks.append(ctx.table("collapsed_by_party", "But for each party's events", "collapsed", result.by_party,
                            note=result.notes[0] if result.notes else ""))
    blocks.append(ctx.table("collapsed_by_event", "But for each event alone", "collapsed", result.by_event))
    if len(result.mismatches):
        blocks.append(ctx.table("collapsed_mismatches", "Where the as-built model differs from the actual dates",
                                "collapsed", result.mismatches))
    for note in result.notes[1:]:
        blocks.append(Paragraph(note, style="small"))
    blocks.append(_causation_block(
        ctx, "collapsed", "collapsed_causation", "Causation of the collapsed as-built", "collapsed",
        _MODELLED_CAUSATION_COLUMNS))
    return section


def _comparison(ctx: _Context) -> Section:
    section = Section("comparison", "Method comparison")
    try:
        compare = _capability("delay.comparison", "compare_methods")
        sensitivity = _capability("delay.comparison", "sensitivity")
    except _Missing as missing:
        section.available = False
        section.blocks.append(ctx.miss(missing.what))
        return section
    if ctx.entitlement is None:
        section.available = False
        section.blocks.append(ctx.miss(ctx.entitlement_missing or "the entitlement of at least one method"))
        return section
    methods = [item.method for item in ctx.entitlement.methods]
    result = compare(ctx.case, {m: ctx.entitlement.method(m) for m in methods})
    section.blocks.append(Paragraph(_EXPLAIN["comparison"]))
    for paragraph in result.explanation:
        section.blocks.append(Paragraph(str(paragraph)))
    section.blocks.append(ctx.table(
        "comparison_by_party", "Days of delay to completion per party, by method", "comparison", result.by_party,
        note="Each method's column adds up to the delay that method explains."))
    section.blocks.append(ctx.table(
        "comparison_by_event", "Days per event, by method", "comparison", result.by_event,
        note="A day explained by several events counts against each, so these columns need not add up."))
    section.blocks.append(ctx.table(
        "sensitivity", "Sensitivity of the headline figures to the progress mode and the concurrency rule",
        "comparison", sensitivity(ctx.case, methods)))
    return section


def _asbuilt(ctx: _Context) -> Section:
    section = Section("asbuilt", "As planned against as built")
    if not _method_missing(ctx, section, "asbuilt"):
        return section
    result = ctx.results["asbuilt"]
    case = ctx.case
    blocks = section.blocks
    blocks.append(Paragraph(_EXPLAIN["asbuilt"]))
    blocks.append(Facts((("Planned completion", result.planned_completion.isoformat()),
                         ("Actual completion", result.actual_completion.isoformat()),
                         ("Completion variance", _days(result.completion_variance_days)))))
    from delay.cpm import calendars_of, prepare

    planned_path = prepare(case, case.baseline, calendars=calendars_of(case)).run().driving_path()
    built_path = list(result.critical_path["activity"])
    wbs = {}
    for snap in [case.baseline] + list(case.updates) + ([case.asbuilt_snapshot] if case.asbuilt_snapshot else []):
        acts = snap.activities
        for ident, code in zip(acts["id"], acts["wbs"]):
            if code and ident not in wbs:
                wbs[ident] = code
    on_planned, on_built = set(planned_path), set(built_path)
    chosen = list(dict.fromkeys(planned_path + built_path))
    table = result.activities.set_index("id")
    rows = []
    for ident in chosen:
        if ident not in table.index:
            continue
        row = table.loc[ident]
        paths = [p for p, flag in (("baseline driving path", ident in on_planned),
                                   ("as-built critical path", ident in on_built)) if flag]
        planned_duration = row["planned_duration"]
        milestone = bool((pd.notna(planned_duration) and planned_duration == 0)
                         or (pd.isna(planned_duration) and row["actual_duration"] == 0))
        rows.append({"wbs": wbs.get(ident, ""), "id": ident, "name": row["name"], "on_paths": paths,
                     "planned_start": row["planned_start"], "planned_finish": row["planned_finish"],
                     "actual_start": row["actual_start"], "actual_finish": row["actual_finish"],
                     "finish_variance_days": row["finish_variance_days"], "milestone": milestone})
    frame = pd.DataFrame(rows, columns=["wbs", "id", "name", "on_paths", "planned_start", "planned_finish",
                                        "actual_start", "actual_finish", "finish_variance_days", "milestone"])
    if len(frame):
        order = sorted(range(len(frame)), key=lambda k: (
            _wbs_key(frame["wbs"].iloc[k]),
            pd.Timestamp(frame["planned_start"].iloc[k]) if pd.notna(frame["planned_start"].iloc[k])
            else pd.Timestamp(frame["actual_start"].iloc[k]), frame["id"].iloc[k]))
        frame = frame.iloc[order].reset_index(drop=True)
    drawn = frame
    note = ""
    if len(frame) > CHART_ACTIVITIES:
        keep = frame["finish_variance_days"].abs().fillna(0).sort_values(ascending=False, kind="stable")
        keep = sorted(keep.index[:CHART_ACTIVITIES])
        drawn = frame.loc[keep]
        note = (f" The chart shows the {CHART_ACTIVITIES} of the {len(frame)} activities with the largest "
                "finish variance; the table lists them all.")
    data_dates = pd.DataFrame({"label": [s.label for s in case.updates],
                               "data_date": [s.data_date for s in case.updates]})
    from .figures import planned_against_built

    if len(drawn):
        blocks.append(FigureBlock("planned_against_built", planned_against_built(
            drawn, critical_path=result.critical_path, data_dates=data_dates),
                                  "Planned (baseline early dates, pale hatched bars) and actual (solid bars) dates of "
                                  "the activities on the baseline driving path and the as-built critical path: the "
                                  "as-built critical path first, in path order, then the other activities by start; "
                                  "dotted lines mark the data dates of the progress updates." + note))
    blocks.append(ctx.table("driving_path_activities", "Activities on the driving paths, planned and actual",
                            "asbuilt", frame))
    blocks.append(ctx.table("asbuilt_critical_path", "The as-built critical path", "asbuilt", result.critical_path,
                            note="The contributions along the path add up to the completion variance."))
    blocks.append(ctx.table("asbuilt_periods", "Delay along the as-built critical path by period", "asbuilt",
                            result.periods, labels={"cumulative_days": "running total (calendar days)"}))
    blocks.append(ctx.table("asbuilt_activities", "Every activity, planned against actual", "asbuilt",
                            result.activities))
    return section


def _timeline(ctx: _Context) -> Section:
    section = Section("timeline", "Element timeline")
    case = ctx.case
    if not len(case.elements):
        section.available = False
        section.blocks.append(Notice("The case has no model elements (elements.csv is absent or empty): there is "
                                     "no element timeline.", style="left-out"))
        return section
    try:
        element_states = _capability("reports.element_timeline", "element_states")
    except _Missing as missing:
        section.available = False
        section.blocks.append(ctx.miss(missing.what))
        return section
    timeline = element_states(case)
    section.blocks.append(Paragraph(_EXPLAIN["timeline"]))
    section.blocks.append(TimelineBlock(timeline))
    columns = ["id", "name", "wbs", "classification", "level", "zone", "activities", "events", "highlighted",
               "planned_start", "planned_finish", "actual_start", "actual_finish", "linked_as_planned",
               "linked_as_built"]
    section.blocks.append(ctx.table("element_dates", "Each element's dates as planned and as built", "timeline",
                                    timeline.elements[columns],
                                    note=f"{len(timeline.frames)} weekly frames from "
                                         f"{timeline.frame_dates[0]} to {timeline.frame_dates[-1]}."))
    return section


def _settings_frame(ctx: _Context, methods: list[str], title: str) -> pd.DataFrame:
    settings = ctx.case.settings
    rows = []
    for part in ("project", "schedule", "commercial", "analysis"):
        for name, value in dataclasses.asdict(getattr(settings, part)).items():
            rows.append({"setting": f"{part}.{name}", "value": value})
    for name, value in dict(settings.extra).items():
        rows.append({"setting": str(name), "value": value if isinstance(value, (str, int, float, bool, dt.date))
                     else str(value)})
    rows.append({"setting": "report.methods", "value": ", ".join(methods) or "(none)"})
    rows.append({"setting": "report.title", "value": title})
    return pd.DataFrame(rows, columns=["setting", "value"])


_METHOD_MODULES = {
    "windows": "delay.methods.windows",
    "impacted": "delay.methods.impacted",
    "tia": "delay.methods.time_impact",
    "collapsed": "delay.methods.collapsed",
    "asbuilt": "delay.methods.as_built",
}


def _inputs(ctx: _Context, title: str) -> Section:
    section = Section("inputs", "Inputs and method")
    case = ctx.case
    blocks = section.blocks
    summary = []
    # the case by its folder's (or workbook's) name: the report names no path of the machine it was made on
    summary.append(("Case", Path(case.root).resolve().name))
    summary.append(("Programmes", f"{len(case.snapshots)} (baseline and {len(case.updates)} progress updates)"
                    + ("; an as-built record" if case.asbuilt_snapshot is not None else "; no as-built record")))
    summary.append(("Delay events", str(len(case.events))))
    summary.append(("Model elements", str(len(case.elements))))
    summary.append(("Input files", f"{len(case.input_files)}, each with its SHA-256 in the manifest"))
    blocks.append(Facts(tuple(summary)))
    blocks.append(ctx.table("settings", "Settings of the case and of this report", "inputs",
                            _settings_frame(ctx, ctx.methods, title)))
    corrections = pd.DataFrame([{
        "record": c.record, "snapshot": c.snapshot, "table": c.table, "key": c.key, "column": c.column,
        "original": c.original, "corrected": c.corrected, "reason": c.reason, "row": c.row,
    } for c in case.corrections], columns=["record", "snapshot", "table", "key", "column", "original", "corrected",
                                           "reason", "row"])
    blocks.append(ctx.table("corrections", "The analyst's disclosed corrections to the records", "inputs",
                            corrections, note="Applied when the case is loaded, never written back to the input "
                                              "files." if len(corrections) else "No corrections were made."))
    blocks.append(Paragraph("Methods", style="heading"))
    for method in ctx.methods:
        module = _METHOD_MODULES[method]
        sources = _docstring_part(module, "References")
        assumptions = _docstring_part(module, "Assumptions")
        blocks.append(Paragraph(METHOD_NAMES[method].capitalize(), style="subheading"))
        if method not in ctx.results:
            blocks.append(Notice(f"{NOT_AVAILABLE}: {ctx.missing_methods.get(method, module)}."))
            continue
        for text in sources:
            blocks.append(Paragraph(f"Published source: {text}", style="small"))
        for text in assumptions:
            blocks.append(Paragraph(f"Assumption: {text.lstrip('- ')}", style="small"))
    blocks.append(Paragraph("Cautions", style="heading"))
    for caution in CAUTIONS:
        blocks.append(Paragraph(caution, style="caution"))
    return section


# -- the whole ---------------------------------------------------------------------------------------
def compute(case: Case, methods: str | Sequence[str] | None = None, title: str | None = None) -> ReportContent:
    """Run the report's analyses on ``case`` and gather every section, table and figure.

    Parameters
    ----------
    case: a loaded case.
    methods: names among :data:`REPORT_METHODS` (a list or a comma-separated text);
        ``None`` or ``"all"``: every method the case supports.
    title: the report's title (default "Delay analysis: <project name>").

    Returns
    -------
    ReportContent

    Raises
    ------
    CaseError: an unknown method, or input a method cannot use.
    ReconciliationError: figures of a method that do not add up (a fault of the toolkit).
    """
    chosen, left_out = resolve_methods(case, methods)
    title = title or f"Delay analysis: {case.settings.project.name}"
    ctx = _Context(case, chosen)
    for method in chosen:
        module, name = _RUNNERS[method]
        try:
            run = _capability(module, name)
        except _Missing as missing:
            ctx.missing_methods[method] = missing.what
            continue
        ctx.results[method] = run(case)
    entitled = [m for m in chosen if m in _ENTITLEMENT_METHODS and m in ctx.results]
    if entitled:
        try:
            assess = _capability("delay.entitlement", "assess")
        except _Missing as missing:
            ctx.entitlement_missing = missing.what
        else:
            ctx.entitlement = assess(case, entitled, results={m: ctx.results[m] for m in entitled})
    sections = [
        _summary(ctx, left_out), _quality(ctx), _windows(ctx), _impacted(ctx), _tia(ctx), _collapsed(ctx),
        _comparison(ctx), _asbuilt(ctx), _timeline(ctx), _inputs(ctx, title),
        Section("manifest", "Manifest"),
    ]
    return ReportContent(case=case, title=title, methods=chosen, sections=sections, tables=ctx.tables,
                         missing=ctx.missing + [v for v in ctx.missing_methods.values() if v not in ctx.missing],
                         left_out=left_out)
