"""Writing a case as one ``case.xlsx`` workbook (the workbook form of case-format version 2)."""

from __future__ import annotations

import datetime as dt
import os
import tempfile
from collections.abc import Iterator
from pathlib import Path
from typing import Any

import pandas as pd

from delay.case import _columns as columns
from delay.case._problems import RawTable
from delay.case._source import OPTIONAL_FILES
from delay.model import COLUMNS, Case

__all__ = ["write_workbook_file"]

_DATE_FORMAT = "yyyy-mm-dd"


def _flatten(values: dict[str, Any], prefix: str = "") -> Iterator[tuple[str, Any]]:
    for key, value in values.items():
        name = f"{prefix}{key}"
        if isinstance(value, dict):
            yield from _flatten(value, name + ".")
        else:
            yield name, value


def _typed(table_name: str, column: str, text: str, table: RawTable) -> Any:
    """The cell value to write for ``text`` (already checked by loading the case), read
    in the dialect of the file it came from ([input] of case.toml)."""
    if text == "":
        return None
    if column in columns.DATE_COLUMNS.get(table_name, ()):
        return columns.parse_dates(pd.Series([text]), table.date_format).iat[0].date()
    if column in columns.INTEGER_COLUMNS.get(table_name, ()) or column in columns.NUMBER_COLUMNS.get(table_name, ()):
        number = float(columns.parse_numbers(pd.Series([text]), table.decimal)[0])
        return int(number) if number.is_integer() else number
    return text


def _ordered_columns(name: str, tables: list[RawTable | None]) -> list[str]:
    present: list[str] = []
    for table in tables:
        if table is not None:
            for column in table.frame.columns:
                if column not in present:
                    present.append(column)
    stable = [c for c in COLUMNS[name] if c in present or c in columns.REQUIRED_COLUMNS[name]]
    return stable + [c for c in present if c not in COLUMNS[name]]


class _SheetWriter:
    def __init__(self, workbook):
        from openpyxl.cell import WriteOnlyCell

        self.workbook = workbook
        self._cell = WriteOnlyCell

    def sheet(self, title: str, header: list[str]):
        sheet = self.workbook.create_sheet(title)
        sheet.append(header)
        return sheet

    def value(self, sheet, value: Any) -> Any:
        if isinstance(value, dt.date) and not isinstance(value, dt.datetime):
            cell = self._cell(sheet, value=value)
            cell.number_format = _DATE_FORMAT
            return cell
        return value

    def table(self, title: str, name: str, parts: list[tuple[str | None, RawTable | None]]):
        """One sheet holding the rows of ``parts``; a part's label fills a leading column."""
        leading = parts and parts[0][0] is not None
        header = _ordered_columns(name, [t for _, t in parts])
        sheet = self.sheet(title, (["snapshot"] if leading else []) + header)
        for label, table in parts:
            if table is None:
                continue
            frame = table.frame
            cells = [frame[c].tolist() if c in frame.columns else [""] * len(frame) for c in header]
            converters = [(c, c in columns.DATE_COLUMNS.get(name, ())) for c in header]
            for values in zip(*cells) if cells else ():
                row = [label] if leading else []
                for (column, is_date), text in zip(converters, values):
                    value = _typed(name, column, text, table)
                    row.append(self.value(sheet, value) if is_date else value)
                sheet.append(row)


def write_workbook_file(case: Case, settings_values: dict[str, Any], uncorrected: dict[str, Any], path: Path) -> Path:
    """Write the workbook; the tables come from ``uncorrected`` (the files as read).

    The sheets are ``case`` (``section.name`` / value rows; a list is written as
    ``a, b``), ``snapshots`` (label, data_date, kind, folder, in the case's order),
    ``activities`` and ``links`` (a leading ``snapshot`` column holding the folder), then
    ``calendars`` and one sheet per optional file. Cells of date and number columns are
    written as dates and numbers, read in the dialect of the file they came from. The file
    is written under a temporary name in the same folder and moved into place, so a
    failed write leaves no partial workbook.

    Parameters
    ----------
    case : Case
        The loaded case: the order and facts of its snapshots.
    settings_values : dict of str to Any
        The settings as read (nested ``{section: {key: value}}``).
    uncorrected : dict of str to Any
        The tables as read, before corrections: ``"snapshots"`` a list of (folder,
        activities, links) and ``"tables"`` the case-wide tables by name (each a
        :class:`RawTable` or ``None``).
    path : pathlib.Path
        Where to write the workbook; its folder is created when missing.

    Returns
    -------
    pathlib.Path
        ``path``.
    """
    import openpyxl

    path = Path(path)
    workbook = openpyxl.Workbook(write_only=True)
    writer = _SheetWriter(workbook)

    sheet = writer.sheet("case", ["key", "value"])
    for key, value in _flatten(settings_values):
        if isinstance(value, (list, tuple)):
            value = ", ".join(str(v) for v in value)
        elif isinstance(value, dt.datetime):
            value = value.isoformat(sep=" ")
        sheet.append([key, writer.value(sheet, value)])

    sheet = writer.sheet("snapshots", ["label", "data_date", "kind", "folder"])
    for snap in case.snapshots:
        sheet.append([snap.label, writer.value(sheet, snap.data_date), snap.kind, snap.folder])

    raw_snapshots = {folder: (activities, links) for folder, activities, links in uncorrected["snapshots"]}
    order = [snap.folder for snap in case.snapshots]
    writer.table("activities", "activities", [(folder, raw_snapshots[folder][0]) for folder in order])
    writer.table("links", "links", [(folder, raw_snapshots[folder][1]) for folder in order])
    tables = uncorrected["tables"]
    for name in ("calendars",) + OPTIONAL_FILES:
        writer.table(name, name, [(None, tables.get(name))])

    path.parent.mkdir(parents=True, exist_ok=True)
    handle, temporary = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent)
    os.close(handle)
    try:
        workbook.save(temporary)
        mask = os.umask(0)
        os.umask(mask)
        os.chmod(temporary, 0o666 & ~mask)
        os.replace(temporary, path)
    except BaseException:
        if os.path.exists(temporary):
            os.unlink(temporary)
        raise
    return path
