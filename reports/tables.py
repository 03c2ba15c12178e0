"""The report's tables: one object per table, its canonical CSV and fingerprint, and the
xlsx and CSV appendices.

Every table the report shows is a :class:`ReportTable`. The same frame is rendered in the
HTML page, written as a sheet of ``tables.xlsx`` and as ``tables/<key>.csv``, and
fingerprinted in ``manifest.json``, so a figure in the page can always be found again in
the appendix and checked against the inputs (``delay verify``).

Canonical CSV (the text that is fingerprinted and written to ``tables/<key>.csv``)
----------------------------------------------------------------------------------
- UTF-8, no byte-order mark, comma separated, ``\\n`` line ends, fields quoted only when
  they must be (the rules of Python's :mod:`csv` module, ``QUOTE_MINIMAL``);
- a header row with the column names in the order the table gives them, then the rows in
  the table's order (an order can itself be a finding, such as a driving path);
- dates as ISO ``YYYY-MM-DD`` (a time of day only where one is not midnight);
- floats as Python's ``repr`` (the shortest text that reads back to the same float);
- whole numbers as digits, booleans as ``true`` / ``false``;
- a missing value (``None``, ``NaN``, ``NaT``, ``<NA>``) as an empty field;
- a list or tuple as its items joined by ``;``;
- a text cell (or column name) that a spreadsheet would run as a formula - one that starts
  with ``=``, ``+``, ``-``, ``@``, a tab or a carriage return and is not a plain number -
  with a leading apostrophe (:func:`delay.output.neutralise`, after the OWASP guidance on
  CSV injection); numbers, dates and text such as ``-3`` stay as they are. The workbook's
  cells are typed strings and keep the text as it is.

The fingerprint of a table is the SHA-256 of its canonical CSV.
"""

from __future__ import annotations

import csv
import datetime as dt
import hashlib
import io
import math
import re
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, field
from functools import cached_property
from pathlib import Path

import numpy as np
import pandas as pd

from delay.output import neutralise

__all__ = [
    "ReportTable",
    "BuildUp",
    "canonical_value",
    "canonical_csv",
    "fingerprint",
    "display_value",
    "write_csv_files",
    "write_workbook",
    "EXCEL_CELL_LIMIT",
    "LABELS",
    "MONEY_COLUMNS",
    "label_of",
]

#: The most characters one cell of an xlsx workbook may hold.
EXCEL_CELL_LIMIT = 32_767

#: Columns that hold sums of money: the page shows them with two decimals.
MONEY_COLUMNS = frozenset(
    {
        "prolongation_cost",
        "ld_exposure",
        "cost",
        "cost_per_day",
        "damages_before_cap",
        "cap",
        "liquidated_damages_per_day",
    }
)

#: Column headings in plain words, for the page and the workbook (the CSV keeps the names).
LABELS: dict[str, str] = {
    "id": "id",
    "activity": "activity",
    "name": "name",
    "wbs": "work breakdown code",
    "window": "window",
    "start": "from",
    "end": "to",
    "start_data_date": "data date at the start",
    "end_data_date": "data date at the end",
    "completion_start": "completion at the start",
    "completion_half": "completion at the half-step",
    "completion_end": "completion at the end",
    "movement_days": "movement of completion (calendar days)",
    "movement_work_days": "movement of completion (work days)",
    "progress_days": "of which progress (calendar days)",
    "revision_days": "of which revisions (calendar days)",
    "step": "step",
    "event": "event",
    "events": "events",
    "title": "title",
    "party": "party",
    "impact": "how it is modelled",
    "activities": "activities",
    "days": "days of delay to completion",
    "alone_days": "impact alone (need not add up)",
    "alone_work_days": "impact alone (work days)",
    "completion_alone": "completion with this event alone",
    "increment_days": "increment in the cumulative run (calendar days)",
    "increment_work_days": "increment (work days)",
    "cumulative_days": "running total (calendar days)",
    "residual_days": "residual (calendar days)",
    "next_snapshot": "next programme",
    "next_data_date": "its data date",
    "next_completion": "its completion",
    "warnings": "warnings",
    "effect": "what the event leaves alone",
    "work_days": "work days (ledger calendar)",
    "basis": "how the party was found",
    "acceleration_days": "acceleration (the contractor's net recovery)",
    "whole_works": "the whole of the works",
    "overrun_days": "overrun past the completion in force",
    "lateness_work_days": "late by (work days, past its float)",
    "inherited": "only carried an earlier delay",
    "start_variance_work_days": "start variance (work days)",
    "finish_variance_work_days": "finish variance (work days)",
    "target": "traced to",
    "counted": "counted",
    "rule_party": "party by the rule",
    "rule_basis": "basis by the rule",
    "rule_events": "events by the rule",
    "sentence": "in words",
    "completion_after": "completion after this event",
    "completion_before": "completion before",
    "applied": "not applied",
    "causes": "caused by",
    "concurrent_with": "concurrent with",
    "concurrent_days": "concurrent days",
    "excusable_days": "excusable days (time)",
    "compensable_days": "compensable days (time and money)",
    "culpable_days": "culpable days",
    "ld_days": "days of liquidated damages",
    "classification": "classification",
    "arose_on": "delay arose on",
    "method": "method",
    "method_title": "method",
    "explains": "the delay explained",
    "explained_days": "days explained",
    "completion_in_force": "contract completion in force",
    "planned_completion": "planned completion",
    "completion_with_excusable_delays": "completion with only the excusable delays",
    "eot_days": "extension of time (calendar days)",
    "revised_completion": "revised completion date",
    "actual_completion": "actual or forecast completion",
    "prolongation_cost": "prolongation cost",
    "culpable_delay_days": "culpable delay (the contractor's net delay)",
    "liquidated_damages_per_day": "damages per day",
    "ld_exposure": "liquidated damages exposure",
    "ld_capped": "limited by the cap",
    "contract_completion": "contract completion",
    "granted_days": "extensions already granted (days)",
    "section": "section",
    "completion_activity": "completion milestone",
    "note": "note",
    "notified": "notified on",
    "claimed_days": "days claimed",
    "assessed_days": "days assessed",
    "snapshot": "programme",
    "label": "label",
    "data_date": "data date",
    "completion": "forecast completion",
    "kind": "kind",
    "metric": "metric",
    "count": "count",
    "denominator": "out of",
    "percent": "per cent",
    "threshold": "threshold",
    "verdict": "verdict",
    "check": "check",
    "status": "status",
    "items": "items found",
    "finding": "finding",
    "classification_code": "classification",
    "joined": "joined the driving path",
    "left": "left the driving path",
    "driving_start": "driving path at the start (activities)",
    "driving_end": "driving path at the end (activities)",
    "but_for_completion": "but-for completion",
    "days_earlier": "days earlier (need not add up)",
    "work_days_earlier": "work days earlier",
    "not_scored": "events not taken out",
    "found_in_as_built": "found in the as-built record",
    "removed": "what was taken out",
    "actual_start": "actual start",
    "actual_finish": "actual finish",
    "modelled_start": "modelled start",
    "modelled_finish": "modelled finish",
    "reason": "reason",
    "planned_start": "planned start",
    "planned_finish": "planned finish",
    "planned_duration": "planned duration (work days)",
    "actual_duration": "actual duration (work days)",
    "start_variance_days": "start variance (calendar days)",
    "finish_variance_days": "finish variance (calendar days)",
    "duration_variance_work_days": "duration variance (work days)",
    "driving_predecessor": "driven by",
    "link": "link",
    "gap_work_days": "gap (work days)",
    "period": "period",
    "delay_days": "delay (calendar days)",
    "on_paths": "on the driving path of",
    "level": "level",
    "zone": "zone",
    "highlighted": "affected by a delay event",
    "linked_as_planned": "linked as planned",
    "linked_as_built": "linked as built",
    "missing_from": "no activity in",
    "setting": "setting",
    "value": "value",
    "original": "original value",
    "corrected": "corrected value",
    "record": "record corrected",
    "row": "row of corrections.csv",
    "earlier_label": "earlier programme",
    "later_label": "later programme",
    "what": "what",
    "date": "date",
    "granted_on": "granted on",
    "applies_to": "applies to",
    "source": "source",
    "cost_per_day": "rate per day",
    "cost": "cost",
    "damages_before_cap": "damages before the cap",
    "cap": "cap (0: none)",
}


def label_of(column: str, labels: Mapping[str, str] | None = None) -> str:
    """The heading of ``column`` in plain words.

    Parameters
    ----------
    column : str
        A column name.
    labels : mapping of str to str, optional
        Headings that take precedence over :data:`LABELS` (a table's own).

    Returns
    -------
    str
        ``labels[column]``, else ``LABELS[column]``, else the name with blanks for
        underscores.

    Examples
    --------
    >>> label_of("eot_days"), label_of("eot_days", {"eot_days": "extension"}), label_of("new_column")
    ('extension of time (calendar days)', 'extension', 'new column')
    """
    if labels and column in labels:
        return labels[column]
    return LABELS.get(column, column.replace("_", " "))


@dataclass(frozen=True, eq=False)
class BuildUp:
    """How the money of a table is built up, so that a reader can recompute it.

    In the page the total rows follow each group. In tables.xlsx each column of
    ``products``, ``capped`` and ``totals`` gets a formula column beside the values, named
    "... (formula)": a product of the row's cells, ``MIN`` of a figure and its cap, ``SUM``
    over a group in the total row; a formula reads the formula column of a figure that has
    one, so the chain recomputes from the inputs. openpyxl, which writes the workbook,
    stores a formula without its result, so the values are written beside the formulas
    rather than as their cached results; a spreadsheet shows the formulas' results once it
    calculates (on opening).

    Parameters
    ----------
    products : mapping of str to tuple of str, optional
        A column whose values are the product of other columns (``{"cost": ("days",
        "cost_per_day")}``).
    capped : mapping of str to (str, str), optional
        A column whose values are the smaller of two others, the second a cap that applies
        only when above 0 (``{"ld_exposure": ("damages_before_cap", "cap")}``).
    totals : tuple of str, optional
        Columns summed in a total row after each group of rows.
    group : str, optional
        The column whose runs of equal values are totalled apart (``""``: one total for the
        whole table).

    Examples
    --------
    >>> import pandas as pd
    >>> rows = pd.DataFrame({"section": ["A", "A", "B"], "days": [2, 3, 4], "cost": [20.0, 30.0, 40.0]})
    >>> build_up = BuildUp(totals=("cost",), group="section")
    >>> build_up.groups(rows), build_up.total(rows, 0, 2), build_up.total_label(rows, 2)
    ([(0, 2), (2, 3)], {'cost': 50.0}, 'total, B')
    """

    products: Mapping[str, tuple[str, ...]] = field(default_factory=dict)
    capped: Mapping[str, tuple[str, str]] = field(default_factory=dict)
    totals: tuple[str, ...] = ()
    group: str = ""

    def recomputed(self, columns: Sequence[str]) -> list[str]:
        """The columns that get a formula column in the workbook.

        Parameters
        ----------
        columns : sequence of str
            The table's columns.

        Returns
        -------
        list of str
            Those of ``products``, ``capped`` or ``totals``, in the table's column order.
        """
        wanted = set(self.products) | set(self.capped) | set(self.totals)
        return [c for c in columns if c in wanted]

    def groups(self, frame: pd.DataFrame) -> list[tuple[int, int]]:
        """The runs of rows totalled together.

        Parameters
        ----------
        frame : pandas.DataFrame
            The table's rows.

        Returns
        -------
        list of tuple of int
            ``(first, past the last)`` positions of each run, in order; one run for the whole
            table without ``group``, none for no rows.
        """
        if not len(frame):
            return []
        if not self.group:
            return [(0, len(frame))]
        values = frame[self.group].tolist()
        runs, first = [], 0
        for k in range(1, len(values) + 1):
            if k == len(values) or values[k] != values[first]:
                runs.append((first, k))
                first = k
        return runs

    def total_label(self, frame: pd.DataFrame, first: int) -> str:
        """The words in the first cell of a total row.

        Parameters
        ----------
        frame : pandas.DataFrame
            The table's rows.
        first : int
            The position of the group's first row.

        Returns
        -------
        str
            ``"total"``, or ``"total, <the group's value>"``.
        """
        return f"total, {frame[self.group].iloc[first]}" if self.group else "total"

    def total(self, frame: pd.DataFrame, first: int, stop: int) -> dict[str, float | int]:
        """The sums of :attr:`totals` over a group.

        Parameters
        ----------
        frame : pandas.DataFrame
            The table's rows.
        first : int
            The position of the group's first row.
        stop : int
            The position past its last row.

        Returns
        -------
        dict
            Column to sum, missing values left out: a float rounded to cents where the column
            holds floats, else an int.
        """
        sums = {}
        for column in self.totals:
            values = frame[column].iloc[first:stop]
            total = sum(v for v in values.tolist() if not _missing(v))
            sums[column] = round(float(total), 2) if any(isinstance(v, float) for v in values.tolist()) else int(total)
        return sums


@dataclass(frozen=True, eq=False)
class ReportTable:
    """One table of the report.

    Parameters
    ----------
    key : str
        The file stem (``tables/<key>.csv``), the sheet name and the fingerprint's name; at
        most 31 characters, letters, digits and underscores.
    title : str
        The caption, in plain words.
    section : str
        The key of the report section that shows it.
    frame : pandas.DataFrame
        The rows; its column names are the CSV header.
    labels : mapping of str to str, optional
        Headings in plain words for columns :data:`LABELS` does not name well here.
    note : str, optional
        A sentence shown under the caption (what the figures mean, what need not add up).
    shown_rows : int, default 1000
        At most this many rows appear in the page (all appear in the appendix).
    build_up : BuildUp, optional
        For a table of money, how its figures are built up: the page adds a total row
        after each group, the workbook recomputes the figures and totals by formula. The
        canonical CSV holds the rows alone.

    Raises
    ------
    ValueError
        A key that is empty, longer than 31 characters or not letters, digits and
        underscores.

    Examples
    --------
    >>> import pandas as pd
    >>> table = ReportTable("eot", "Extension of time", "money", pd.DataFrame({"eot_days": [12]}))
    >>> table.canonical_csv(), table.headings
    ('eot_days\\n12\\n', ['extension of time (calendar days)'])
    """

    key: str
    title: str
    section: str
    frame: pd.DataFrame
    labels: Mapping[str, str] = field(default_factory=dict)
    note: str = ""
    shown_rows: int = 1000
    build_up: BuildUp | None = None

    def __post_init__(self):
        if not (0 < len(self.key) <= 31) or not self.key.replace("_", "").isalnum():
            raise ValueError(f"table key {self.key!r}: use 1 to 31 letters, digits and underscores")

    @property
    def columns(self) -> list[str]:
        """The column names, as text."""
        return [str(c) for c in self.frame.columns]

    @property
    def headings(self) -> list[str]:
        """The column headings in plain words (see :func:`label_of`)."""
        return [label_of(c, self.labels) for c in self.columns]

    @cached_property
    def _canonical(self) -> str:
        return canonical_csv(self.frame)

    def canonical_csv(self) -> str:
        """The canonical CSV text of the table (computed once; the frame must not change afterwards).

        Returns
        -------
        str
            :func:`canonical_csv` of :attr:`frame`.
        """
        return self._canonical

    def fingerprint(self) -> str:
        """The table's fingerprint.

        Returns
        -------
        str
            SHA-256 (64 hexadecimal digits) of :meth:`canonical_csv` encoded as UTF-8.
        """
        return hashlib.sha256(self._canonical.encode("utf-8")).hexdigest()


# -- canonical form -----------------------------------------------------------------------------
def _missing(value) -> bool:
    if value is None or value is pd.NA or value is pd.NaT:
        return True
    if isinstance(value, (float, np.floating)):
        return math.isnan(float(value))
    if isinstance(value, np.datetime64):
        return bool(np.isnat(value))
    return False


def canonical_value(value) -> str:
    """One cell as it appears in the canonical CSV (see the module docstring).

    Parameters
    ----------
    value : object
        The cell: a number, boolean, date or timestamp, text, list, or a missing value.

    Returns
    -------
    str
        Its canonical text (not yet neutralised against formulas: :func:`canonical_csv`
        does that for text cells).

    Examples
    --------
    >>> [canonical_value(v) for v in (None, True, 3, 0.1, dt.date(2025, 1, 6), ["A", "B"])]
    ['', 'true', '3', '0.1', '2025-01-06', 'A;B']
    """
    if isinstance(value, (list, tuple, np.ndarray)):
        return ";".join(canonical_value(v) for v in value)
    if _missing(value):
        return ""
    if isinstance(value, (bool, np.bool_)):
        return "true" if value else "false"
    if isinstance(value, (int, np.integer)):
        return str(int(value))
    if isinstance(value, (float, np.floating)):
        return repr(float(value))
    if isinstance(value, np.datetime64):
        value = pd.Timestamp(value)
    if isinstance(value, pd.Timestamp):
        value = value.to_pydatetime()
    if isinstance(value, dt.datetime):
        if value.time() == dt.time(0, 0) and value.tzinfo is None:
            return value.date().isoformat()
        return value.isoformat()
    if isinstance(value, dt.date):
        return value.isoformat()
    return str(value)


def _csv_cell(value) -> str:
    text = canonical_value(value)
    if isinstance(value, (bool, np.bool_, int, np.integer, float, np.floating, dt.date, np.datetime64)):
        return text  # a number or a date: never a formula
    return neutralise(text)


def canonical_csv(frame: pd.DataFrame) -> str:
    """The canonical CSV text of ``frame`` (see the module docstring).

    Parameters
    ----------
    frame : pandas.DataFrame
        The table; its index is not written.

    Returns
    -------
    str
        The header row and the rows, each line ending in ``\\n``.

    Examples
    --------
    >>> canonical_csv(pd.DataFrame({"name": ["=1+1", "-3", "Dig"], "days": [-3, 2, 1]})).splitlines()
    ['name,days', "'=1+1,-3", '-3,2', 'Dig,1']
    """
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n", quoting=csv.QUOTE_MINIMAL)
    writer.writerow([neutralise(str(c)) for c in frame.columns])
    columns = [frame.iloc[:, i].tolist() for i in range(frame.shape[1])]
    for row in zip(*columns):
        writer.writerow([_csv_cell(v) for v in row])
    return buffer.getvalue()


def fingerprint(frame: pd.DataFrame) -> str:
    """The fingerprint of a table.

    Parameters
    ----------
    frame : pandas.DataFrame
        The table.

    Returns
    -------
    str
        SHA-256 (64 hexadecimal digits) of its :func:`canonical_csv` encoded as UTF-8.

    Examples
    --------
    >>> import hashlib
    >>> frame = pd.DataFrame({"days": [1]})
    >>> fingerprint(frame) == hashlib.sha256(b"days\\n1\\n").hexdigest()
    True
    """
    return hashlib.sha256(canonical_csv(frame).encode("utf-8")).hexdigest()


# -- the page's view of a cell -------------------------------------------------------------------
_LIST_SHOWN = 12


def display_value(value, *, money: bool = False) -> str:
    """A cell as the page shows it.

    Dates ISO, lists joined by commas (the first dozen, then "and N more"), ``;``-joined
    ids with a space after each ``;``, floats of 1,000 or more (sums of money) with two
    decimals and thousands separators, yes/no for booleans, blank for missing. The page
    escapes the text; nothing here is markup.

    Parameters
    ----------
    value : object
        The cell.
    money : bool, default False
        The column holds money: every number with thousands separators, floats with two
        decimals.

    Returns
    -------
    str
        The text shown.

    Examples
    --------
    >>> display_value(1234.5), display_value(12.0), display_value(True), display_value("A1;A2")
    ('1,234.50', '12', 'yes', 'A1; A2')
    >>> display_value(7, money=True), display_value(None)
    ('7', '')
    """
    if isinstance(value, (list, tuple, np.ndarray)):
        items = [display_value(v) for v in value]
        if len(items) > _LIST_SHOWN:
            return ", ".join(items[:_LIST_SHOWN]) + f" and {len(items) - _LIST_SHOWN} more"
        return ", ".join(items)
    if _missing(value):
        return ""
    if isinstance(value, str):
        # ";"-joined lists of ids read better with a space, and can then wrap
        return re.sub(r";(?=\S)", "; ", value)
    if isinstance(value, (bool, np.bool_)):
        return "yes" if value else "no"
    if isinstance(value, (int, np.integer)):
        return f"{int(value):,}" if money else str(int(value))
    if isinstance(value, (float, np.floating)):
        number = float(value)
        if money or abs(number) >= 1000:
            return f"{number:,.2f}"
        return str(int(number)) if number.is_integer() else f"{number:g}"
    return canonical_value(value)


# -- appendices ----------------------------------------------------------------------------------
def write_csv_files(tables: Iterable[ReportTable], folder: Path) -> list[Path]:
    """Write each table's canonical CSV to ``folder/<key>.csv``.

    Parameters
    ----------
    tables : iterable of ReportTable
        The tables.
    folder : pathlib.Path
        The folder, made when missing; files of the same name are overwritten.

    Returns
    -------
    list of pathlib.Path
        The files written, in the tables' order.
    """
    folder = Path(folder)
    folder.mkdir(parents=True, exist_ok=True)
    written = []
    for table in tables:
        path = folder / f"{table.key}.csv"
        path.write_bytes(table.canonical_csv().encode("utf-8"))
        written.append(path)
    return written


def _excel_value(value):
    if isinstance(value, (list, tuple, np.ndarray)):
        value = "; ".join(canonical_value(v) for v in value)
    if _missing(value):
        return None
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, (int, np.integer)):
        return int(value)
    if isinstance(value, (float, np.floating)):
        return float(value)
    if isinstance(value, np.datetime64):
        value = pd.Timestamp(value)
    if isinstance(value, pd.Timestamp):
        value = value.to_pydatetime()
    if isinstance(value, dt.datetime):
        return value.date() if value.time() == dt.time(0, 0) else value.replace(tzinfo=None)
    if isinstance(value, dt.date):
        return value
    text = str(value)
    if len(text) > EXCEL_CELL_LIMIT:
        cut = " ... (cut at the workbook's cell limit: see the CSV file)"
        text = text[: EXCEL_CELL_LIMIT - len(cut)] + cut
    return text


def _width(values: Sequence, heading: str) -> float:
    longest = len(heading)
    for value in values[:2000]:
        if value is None:
            continue
        if isinstance(value, dt.date):
            size = 10
        elif isinstance(value, float):
            size = len(f"{value:,.2f}")
        else:
            size = max((len(part) for part in str(value).split("\n")), default=0)
        longest = max(longest, size)
    return float(min(max(longest + 2, 8), 60))


class _Sheets:
    """Cells and sheets of one write-only workbook (openpyxl)."""

    def __init__(self, book):
        from openpyxl.styles import Alignment, Font

        self.book = book
        self.bold = Font(bold=True)
        self.wrapped = Alignment(wrap_text=True, vertical="top")

    def cell(self, sheet, value, *, font=None, number_format=None, alignment=None, formula: bool = False):
        """A cell; text that starts with ``=`` stays text unless ``formula`` is set."""
        from openpyxl.cell import WriteOnlyCell

        item = WriteOnlyCell(sheet, value=value)
        if font is not None:
            item.font = font
        if number_format is not None:
            item.number_format = number_format
        if alignment is not None:
            item.alignment = alignment
        if isinstance(value, str) and value.startswith("=") and not formula:
            item.data_type = "s"  # text that looks like a formula stays text
        return item

    def contents(self, tables: Sequence[ReportTable], title: str, caution: str) -> None:
        from openpyxl.styles import Font

        contents = self.book.create_sheet("contents")
        for letter, width in zip("ABCDE", (32, 60, 16, 8, 80)):
            contents.column_dimensions[letter].width = width
        contents.append([self.cell(contents, title or "Report tables", font=Font(bold=True, size=13))])
        if caution:
            contents.append([caution])
        contents.append([])
        contents.append([self.cell(contents, h, font=self.bold) for h in ("sheet", "table", "section", "rows", "note")])
        for table in tables:
            note = table.note or ""
            if table.build_up is not None:
                note = (note + " " if note else "") + _FORMULA_NOTE
            contents.append([table.key, table.title, table.section, len(table.frame), note or None])

    def table(self, table: ReportTable) -> None:
        from openpyxl.utils import get_column_letter

        sheet = self.book.create_sheet(table.key)
        columns = [[_excel_value(v) for v in table.frame[c].tolist()] for c in table.frame.columns]
        headings = table.headings
        extra = table.build_up.recomputed(table.columns) if table.build_up is not None else []
        headings = headings + [f"{label_of(c, table.labels)} (formula)" for c in extra]
        widths = [_width(values, h) for values, h in zip(columns, headings)] + [
            _width(columns[table.columns.index(c)], h) for c, h in zip(extra, headings[len(columns) :])
        ]
        for number, width in enumerate(widths, start=1):
            sheet.column_dimensions[get_column_letter(number)].width = width
        sheet.freeze_panes = "A2"
        rows = len(table.frame) + (
            len(table.build_up.groups(table.frame)) if table.build_up and table.build_up.totals else 0
        )
        if headings:
            sheet.auto_filter.ref = f"A1:{get_column_letter(len(headings))}{max(1, rows + 1)}"
        sheet.append([self.cell(sheet, h, font=self.bold, alignment=self.wrapped) for h in headings])
        if table.build_up is not None:
            for row in _build_up_rows(self, sheet, table, columns, extra):
                sheet.append(row)
            return
        # a date cell takes openpyxl's date format (yyyy-mm-dd) from its value's type; only
        # text that would be read as a formula needs a cell of its own
        for row in zip(*columns):
            if any(isinstance(v, str) and v.startswith("=") for v in row):
                row = [self.cell(sheet, v) if isinstance(v, str) and v.startswith("=") else v for v in row]
            sheet.append(row)


_FORMULA_NOTE = (
    "The columns marked (formula) recompute the figures beside them and their totals: openpyxl, "
    "which writes this workbook, stores a formula without its result, so the values are written "
    "beside the formulas."
)


def _build_up_rows(sheets: _Sheets, sheet, table: ReportTable, columns: list[list], extra: list[str]):
    """The rows of a table with a :class:`BuildUp`: the values, a formula column for each
    figure it recomputes, and a total row after each group (values and ``SUM`` formulas)."""
    from openpyxl.utils import get_column_letter

    build_up, names, frame = table.build_up, table.columns, table.frame
    value_letter = {c: get_column_letter(k + 1) for k, c in enumerate(names)}
    formula_letter = {c: get_column_letter(len(names) + k + 1) for k, c in enumerate(extra)}
    row_formula = set(build_up.products) | set(build_up.capped)

    def ref(column: str, number: int) -> str:
        letter = formula_letter[column] if column in row_formula else value_letter[column]
        return f"{letter}{number}"

    def money(column: str) -> str | None:
        return "#,##0.00" if any(isinstance(v, float) for v in columns[names.index(column)]) else None

    number = 1
    for first, stop in build_up.groups(frame):
        for k in range(first, stop):
            number += 1
            row = [
                sheets.cell(sheet, v) if isinstance(v, str) and v.startswith("=") else v
                for v in (values[k] for values in columns)
            ]
            for column in extra:
                if column in build_up.products:
                    formula = "=" + "*".join(ref(p, number) for p in build_up.products[column])
                elif column in build_up.capped:
                    figure, cap = build_up.capped[column]
                    limit = frame[cap].iloc[k]
                    formula = (
                        f"=MIN({ref(figure, number)},{value_letter[cap]}{number})"
                        if not _missing(limit) and float(limit) > 0
                        else f"={ref(figure, number)}"
                    )
                else:
                    row.append(None)
                    continue
                row.append(sheets.cell(sheet, formula, formula=True, number_format=money(column)))
            yield row
        if not build_up.totals:
            continue
        number += 1
        sums = build_up.total(frame, first, stop)
        row = [sums.get(c) for c in names]
        row[0] = sheets.cell(sheet, build_up.total_label(frame, first), font=sheets.bold)
        for column in extra:
            if column not in build_up.totals:
                row.append(None)
                continue
            letter = formula_letter[column] if column in row_formula else value_letter[column]
            formula = f"=SUM({letter}{number - (stop - first)}:{letter}{number - 1})"
            row.append(sheets.cell(sheet, formula, formula=True, number_format=money(column), font=sheets.bold))
        yield row


def write_workbook(tables: Sequence[ReportTable], path: Path, *, title: str = "", caution: str = "") -> Path:
    """Write every table as a sheet of one xlsx workbook at ``path``.

    A first sheet ``contents`` lists the sheets with their titles and sections. Each table's
    sheet has the headings in plain words in row 1 (frozen, with a filter), dates as date
    cells (``yyyy-mm-dd``), numbers as numbers, and column widths set to fit the values. A
    table with a :class:`BuildUp` also has its formula columns and total rows. The workbook
    is written row by row (openpyxl's write-only mode).

    Parameters
    ----------
    tables : sequence of ReportTable
        The tables, one sheet each, in this order.
    path : pathlib.Path
        The workbook to write (overwritten when it exists).
    title : str, optional
        The heading of the contents sheet (default "Report tables").
    caution : str, optional
        A line under it.

    Returns
    -------
    pathlib.Path
        ``path``.
    """
    from openpyxl import Workbook

    book = Workbook(write_only=True)
    sheets = _Sheets(book)
    sheets.contents(tables, title, caution)
    for table in tables:
        sheets.table(table)
    buffer = io.BytesIO()
    book.save(buffer)
    Path(path).write_bytes(buffer.getvalue())
    return Path(path)
