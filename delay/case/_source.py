"""Reading the files of a case, in folder or workbook form, into untyped tables.

Both forms produce the same :class:`CaseSource`: the settings as a nested mapping, one
:class:`~delay.case._problems.RawTable` of strings per file, and the snapshots with their
snapshot.toml facts. Nothing is typed or checked here beyond what is needed to read:
missing files, unreadable files, broken headers.
"""

from __future__ import annotations

import codecs
import datetime as dt
import io
import re
import tomllib
import warnings
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd

from delay.case._dialect import (
    DecodeProblem,
    Dialect,
    decode,
    detect_delimiter,
    header_key,
    parse_input,
    rename_header,
)
from delay.case._limits import LARGEST_SETTING_PARTS, LARGEST_TOML, check_toml, check_workbook
from delay.case._problems import Problems, RawTable
from delay.model import COLUMNS, InputSettings

__all__ = [
    "CaseSource",
    "SettingsSource",
    "SnapshotSource",
    "OPTIONAL_FILES",
    "WORKBOOK_NAME",
    "OPINION_NAME",
    "LARGEST_OPINION",
    "open_source",
    "read_csv_table",
    "cell_text",
]

WORKBOOK_NAME = "case.xlsx"

#: The analyst's opinion, in the case folder (beside case.xlsx for the workbook form).
OPINION_NAME = "opinion.md"
#: The largest opinion.md read, in bytes (256 KiB: a long expert's opinion is far less).
LARGEST_OPINION = 256 * 1024

#: Optional files of the case folder, by table name, in the order they are checked.
OPTIONAL_FILES = (
    "calendar_exceptions",
    "asbuilt",
    "corrections",
    "attributions",
    "events",
    "fragnets",
    "fragnet_links",
    "elements",
    "sections",
    "extensions_granted",
    "prolongation_rates",
)


@dataclass
class SettingsSource:
    """The settings as read: nested mapping ``{section: {key: value}}``.

    Parameters
    ----------
    values : dict of str to Any
        The settings, ``{section: {key: value}}``, as TOML or the ``case`` sheet gives
        them.
    file : str
        The file (``case.toml``) or sheet (``case.xlsx:case``) as problems name it.
    locate : callable
        Turns a dotted key (``"schedule.progress"``) into the (row, column) a problem
        with it should name (row ``None`` for a TOML file).
    """

    values: dict[str, Any]
    file: str
    locate: Callable[[str], tuple[int | None, str]]


@dataclass
class SnapshotSource:
    """One snapshot as read: its snapshot.toml facts and its two tables.

    Parameters
    ----------
    folder : str
        The snapshot's folder name under snapshots/ (the ``snapshot`` column of a
        workbook).
    facts : dict of str to Any or None
        snapshot.toml (or the snapshot's row of the ``snapshots`` sheet) as read;
        ``None`` when it could not be read.
    file : str
        That file or sheet, as problems name it.
    locate : callable
        Turns a dotted key (``"schedule.progress"``) into the (row, column) a problem
        with it should name (row ``None`` for a TOML file).
    activities : RawTable or None, optional
        activities.csv as read; ``None`` when it could not be read.
    links : RawTable or None, optional
        links.csv as read; ``None`` when it could not be read.
    """

    folder: str
    facts: dict[str, Any] | None  # None when snapshot.toml could not be read
    file: str
    locate: Callable[[str], tuple[int | None, str]]
    activities: RawTable | None = None
    links: RawTable | None = None


@dataclass
class CaseSource:
    """Everything read from a case folder or workbook, before typing and checking.

    Parameters
    ----------
    root : pathlib.Path
        The case folder, or the workbook's path.
    workbook : bool
        ``True`` for the workbook form.
    settings : SettingsSource or None
        case.toml or the ``case`` sheet; ``None`` when it could not be read.
    tables : dict of str to RawTable or None
        The case-wide tables by name (calendars and the optional files); ``None`` for one
        that could not be read.
    snapshots : list of SnapshotSource
        The snapshots found.
    input_files : list of pathlib.Path, optional
        Every file read, for the report's manifest.
    snapshots_found : bool, optional
        ``False`` when the snapshots/ folder or the snapshots sheet is missing (already
        reported).
    opinion : str, optional
        The analyst's opinion (opinion.md), ``""`` when there is none.
    input : InputSettings, optional
        ``[input]`` of the settings: the dialect the files are read in.
    dialects : list of Dialect, optional
        What was read for each CSV file or sheet, in reading order.
    """

    root: Path
    workbook: bool
    settings: SettingsSource | None
    tables: dict[str, RawTable | None]
    snapshots: list[SnapshotSource]
    input_files: list[Path] = field(default_factory=list)
    #: False when the snapshots/ folder or the snapshots sheet is missing (already reported).
    snapshots_found: bool = True
    #: The analyst's opinion (opinion.md), ``""`` when there is none.
    opinion: str = ""
    #: ``[input]`` of the settings: the dialect the files are read in.
    input: InputSettings = field(default_factory=InputSettings)
    #: What was read for each CSV file or sheet, in reading order.
    dialects: list[Dialect] = field(default_factory=list)


# --------------------------------------------------------------------------- tables


_EDGES = np.zeros(256, dtype=bool)
_EDGES[[ord(","), ord('"'), ord("\n"), ord("\r")]] = True


def _needs_strip(data: bytes, delimiter: str = ",") -> bool:
    """Whether any cell of a CSV file may start or end with a space.

    Looks for a space or tab beside a delimiter, a quote or a line end (or at either end
    of the file): whole-array operations over the file's bytes find the spaces and tabs,
    and only their neighbours are looked at; a file without one has no cell that needs
    stripping, and the costly strip of every column is skipped.
    """
    # A no-break space (its second byte is searched for first: one byte is found faster),
    # or a tab-separated file.
    if (b"\xa0" in data and b"\xc2\xa0" in data) or delimiter == "\t":
        return True
    tabs = b"\t" in data
    if b" " not in data and not tabs:
        return False
    octets = np.frombuffer(data, dtype=np.uint8)
    spaces = np.flatnonzero((octets == ord(" ")) | (octets == ord("\t")) if tabs else octets == ord(" "))
    if spaces[0] == 0 or spaces[-1] == octets.size - 1:
        return True
    edges = _EDGES.copy()
    edges[ord(delimiter)] = True
    return bool(edges[octets[spaces - 1]].any() or edges[octets[spaces + 1]].any())


def _make_table(
    name: str,
    file: str,
    header: list[str],
    body: pd.DataFrame,
    rows: np.ndarray,
    problems: Problems,
    path: Path | None = None,
    strip: bool = True,
    settings: InputSettings | None = None,
) -> tuple[RawTable | None, dict[str, str]]:
    """Name the columns of ``body`` from ``header``, strip cells and drop blank rows.

    Headers are matched ignoring case and surrounding spaces, through ``[input.columns]``
    of ``settings`` first; returns the table and the headers read as another name.
    """
    settings = settings or InputSettings()
    given = [str(h).strip() for h in header]
    header, renamed = rename_header(name, given, settings)
    usable = True
    kept: dict[str, object] = {}  # column name -> its cells (a pandas array)
    seen: dict[str, str] = {}
    for number, column_name in enumerate(header):
        column = body.iloc[:, number].astype("str")
        if strip and len(body):
            column = column.str.strip()
        if not column_name:
            if len(body) and (column != "").any():
                problems.add(
                    file,
                    f"column {number + 1} has values but no name in the header row",
                    "give the column a name in row 1, or delete it",
                    row=1,
                )
                usable = False
            continue
        if column_name in seen:
            first, this = seen[column_name], given[number]
            message = (
                f"the column '{column_name}' appears twice in the header row"
                if first == this == column_name
                else f"the columns '{first}' and '{this}' are both read as '{column_name}'"
            )
            problems.add(file, message, "keep one column of that name", row=1, column=column_name)
            usable = False
            continue
        seen[column_name] = given[number]
        kept[column_name] = column.array
    if not usable:
        return None, renamed
    # The cells are the parser's own (nothing else holds them): no copy is made.
    frame = pd.DataFrame(kept, index=pd.RangeIndex(len(body)), copy=False)
    first_blank = None  # the blank cells of the first column, when every row is kept
    if len(frame) and len(frame.columns):
        filled = np.zeros(len(frame), dtype=bool)
        for column in frame.columns:
            filled |= frame[column].to_numpy() != ""
            if first_blank is None:
                first_blank = ~filled
            if filled.all():  # no blank row: the other columns need not be looked at
                break
        else:
            frame = frame.loc[filled].reset_index(drop=True)
            rows = rows[filled]
            first_blank = None
    elif not len(frame.columns):
        frame = frame.iloc[0:0]
        rows = rows[:0]
    table = RawTable(
        name=name,
        file=file,
        frame=frame,
        rows=np.asarray(rows, dtype=np.int64),
        path=path,
        date_format=settings.date_format,
        decimal=settings.decimal,
    )
    if first_blank is not None:
        table.remember_blank(frame.columns[0], first_blank)
    return table, renamed


_DELIMITER_NAMES = {",": "comma", ";": "semicolon", "\t": "tab", "|": "vertical bar"}


def _encoding_name(encoding: str) -> str:
    return encoding.upper().replace("-LE", " LE").replace("-BE", " BE") if encoding.startswith("utf") else encoding


def read_csv_table(
    path: Path,
    name: str,
    file: str,
    problems: Problems,
    settings: InputSettings | None = None,
    dialects: list[Dialect] | None = None,
) -> RawTable | None:
    """Read one CSV file of the case into a :class:`RawTable` of strings.

    The file is read in the dialect of ``settings`` (``[input]`` of case.toml: encoding,
    delimiter, header names; detected where not declared). Nothing is typed here.

    Parameters
    ----------
    path : pathlib.Path
        The file.
    name : str
        The table's name in the case format (``"activities"``, ...).
    file : str
        The file as problems name it (``snapshots/baseline/activities.csv``).
    problems : Problems
        Where a problem is recorded.
    settings : InputSettings or None, optional
        The [input] settings; ``None`` for the defaults (UTF-8, delimiter detected, ISO
        dates, decimal point).
    dialects : list of Dialect or None, optional
        When given, what was read for the file is appended to it.

    Returns
    -------
    RawTable or None
        The table (spreadsheet rows from 2); ``None``, with a problem recorded, when the
        file cannot be read, is not text in its encoding, is empty, or is not a table
        (a row with more cells than the header, broken quoting).
    """
    settings = settings or InputSettings()
    try:
        data = path.read_bytes()
    except OSError as error:
        problems.add(
            file, f"the file cannot be read ({error.strerror or error})", "check that the file exists and may be read"
        )
        return None
    try:
        text, encoding, encoding_source = decode(data, settings.encoding)
    except DecodeProblem as error:
        problems.add(
            file,
            str(error).replace(
                f"not {settings.encoding or 'utf-8'}", f"not {_encoding_name(settings.encoding or 'utf-8')}"
            ),
            'save it as CSV in UTF-8 encoding, or name its encoding in [input] of case.toml (e.g. encoding = "cp1252")',
        )
        return None
    line_end = text.find("\n")
    delimiter = settings.delimiter or detect_delimiter(text[: line_end if line_end >= 0 else None])
    separator = _DELIMITER_NAMES[delimiter]
    # UTF-8 bytes go to the parser as they are (it decodes them itself, without a copy of
    # the whole text); other encodings go as the decoded text.
    utf8 = encoding == "utf-8"
    raw = (data[len(codecs.BOM_UTF8) :] if data.startswith(codecs.BOM_UTF8) else data) if utf8 else None
    try:
        cells = pd.read_csv(
            io.BytesIO(raw) if utf8 else io.StringIO(text),
            encoding="utf-8",
            low_memory=False,
            sep=delimiter,
            header=None,
            dtype=str,
            na_filter=False,
            skip_blank_lines=False,
            index_col=False,
            quotechar='"',
        )
    except pd.errors.EmptyDataError:
        problems.add(file, "the file is empty", "give at least the header row: " + ",".join(COLUMNS[name]), row=1)
        return None
    except pd.errors.ParserError as error:
        found = re.search(r"line (\d+), saw (\d+)", str(error))
        if found:
            problems.add(
                file,
                f"this row has {found.group(2)} cells, more than the header row",
                f"remove the extra cells or quote a value that contains a {separator}",
                row=int(found.group(1)),
            )
        else:
            problems.add(
                file,
                f"the file cannot be read as CSV ({error})",
                f"check the quoting of values that contain a {separator} or a line break",
            )
        return None
    header = cells.iloc[0].tolist() if len(cells) else []
    body = cells.iloc[1:]
    rows = np.arange(2, len(cells) + 1, dtype=np.int64)
    raw = raw if utf8 else text.encode("utf-8")
    table, renamed = _make_table(
        name, file, header, body, rows, problems, path, strip=_needs_strip(raw, delimiter), settings=settings
    )
    if dialects is not None:
        dialects.append(
            Dialect(
                file=file,
                delimiter=delimiter,
                delimiter_source="declared" if settings.delimiter else "detected",
                encoding=_encoding_name(encoding),
                encoding_source=encoding_source,
                date_format=settings.date_format,
                decimal=settings.decimal,
                renamed=renamed,
            )
        )
    return table


def cell_text(value: Any, decimal_comma: bool = False) -> str:
    """A workbook cell as the text a CSV file would hold for it.

    Parameters
    ----------
    value : Any
        The cell's value as openpyxl reads it.
    decimal_comma : bool, optional
        Write a fraction with a decimal comma (the ``decimal`` of [input] applies to the
        sheet's text as to a CSV file's).

    Returns
    -------
    str
        ``""`` for an empty cell, ``yes``/``no`` for a boolean, an ISO date for a date (a
        date-time with a time of day as ``YYYY-MM-DD HH:MM:SS``), a whole float without
        its ``.0``, else the value's text.

    Examples
    --------
    >>> import datetime as dt
    >>> [cell_text(v) for v in (None, True, 5.0, dt.datetime(2025, 3, 31))], cell_text(2.5, decimal_comma=True)
    (['', 'yes', '5', '2025-03-31'], '2,5')
    """
    if value is None:
        return ""
    if isinstance(value, str):
        return value
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, dt.datetime):
        if value.time() == dt.time(0):
            return value.date().isoformat()
        return value.isoformat(sep=" ")
    if isinstance(value, dt.date):
        return value.isoformat()
    if isinstance(value, float):
        if value.is_integer():
            return str(int(value))
        return repr(value).replace(".", ",") if decimal_comma else repr(value)
    return str(value)


# --------------------------------------------------------------------------- folder form


def _toml_locator(file: str) -> Callable[[str], tuple[int | None, str]]:
    return lambda key: (None, key)


def _read_toml(path: Path, file: str, problems: Problems) -> dict[str, Any] | None:
    try:
        with path.open("rb") as handle:
            data = handle.read(LARGEST_TOML + 1)
        if not check_toml(data, file, problems):
            return None
        # A byte-order mark (as some editors save UTF-8) is not part of the settings.
        text = data.decode("utf-8")
        return tomllib.loads(text[1:] if text.startswith("\ufeff") else text)
    except tomllib.TOMLDecodeError as error:
        problems.add(
            file,
            f"the file is not valid TOML: {error}",
            "write each setting as key = value; put text in double quotes, dates as YYYY-MM-DD",
        )
    except UnicodeDecodeError:
        problems.add(file, "the file is not UTF-8 text", "save it in UTF-8 encoding")
    except RecursionError:  # beyond what toml_depth foresaw: still one line
        problems.add(
            file, "the settings nest too deeply to be read", "write each setting as key = value under its [section]"
        )
    except OSError as error:
        problems.add(
            file, f"the file cannot be read ({error.strerror or error})", "check that the file exists and may be read"
        )
    return None


def _read_folder(root: Path, problems: Problems) -> CaseSource:
    source = CaseSource(root=root, workbook=False, settings=None, tables={}, snapshots=[])

    def required_file(relative: str) -> Path | None:
        path = root / relative
        if not path.is_file():
            problems.add(
                relative,
                f"the required file {relative} is missing",
                f"create {relative} (see the case-format description; `delay new` writes a skeleton)",
            )
            return None
        source.input_files.append(path)
        return path

    path = required_file("case.toml")
    if path is not None:
        values = _read_toml(path, "case.toml", problems)
        if values is not None:
            source.settings = SettingsSource(values, "case.toml", _toml_locator("case.toml"))
            source.input = _input_settings(source.settings, problems)

    def read(path: Path, name: str, relative: str) -> RawTable | None:
        return read_csv_table(path, name, relative, problems, source.input, source.dialects)

    path = required_file("calendars.csv")
    source.tables["calendars"] = read(path, "calendars", "calendars.csv") if path else None

    snapshots_dir = root / "snapshots"
    if not snapshots_dir.is_dir():
        problems.add(
            "snapshots",
            "the folder snapshots/ is missing",
            "create snapshots/baseline/ with snapshot.toml, activities.csv and links.csv",
        )
        source.snapshots_found = False
    else:
        folders = sorted(p for p in snapshots_dir.iterdir() if p.is_dir() and not p.name.startswith("."))
        for folder in folders:
            base = f"snapshots/{folder.name}"
            meta_file = f"{base}/snapshot.toml"
            path = required_file(meta_file)
            facts = _read_toml(path, meta_file, problems) if path is not None else None
            snap = SnapshotSource(folder=folder.name, facts=facts, file=meta_file, locate=_toml_locator(meta_file))
            for name in ("activities", "links"):
                relative = f"{base}/{name}.csv"
                path = required_file(relative)
                table = read(path, name, relative) if path else None
                setattr(snap, name, table)
            source.snapshots.append(snap)

    for name in OPTIONAL_FILES:
        path = root / f"{name}.csv"
        if path.is_file():
            source.input_files.append(path)
            source.tables[name] = read(path, name, f"{name}.csv")
        else:
            source.tables[name] = _empty_table(name, f"{name}.csv")
    _read_opinion(source, root, problems)
    return source


def _input_settings(settings: SettingsSource, problems: Problems) -> InputSettings:
    """``[input]`` of the settings, its problems recorded at the setting's place."""

    def report(key: str, message: str, fix: str) -> None:
        row, column = settings.locate(key)
        problems.add(settings.file, message, fix, row=row, column=column)

    return parse_input(settings.values.get("input"), report)


#: The frames of the empty stand-ins built so far, by table name.
_EMPTY_FRAMES: dict[str, pd.DataFrame] = {}


def _empty_table(name: str, file: str) -> RawTable:
    """The empty stand-in for the optional file ``name`` the case does not have.

    Its frame (every stable column, as text) is built once per table name and copied for
    each stand-in, so that a column added to one stand-in is not added to the next.
    """
    frame = _EMPTY_FRAMES.get(name)
    if frame is None:  # every column shares one text array of length 0
        cells = pd.array([], dtype="str")
        frame = pd.DataFrame(dict.fromkeys(COLUMNS[name], cells), index=pd.RangeIndex(0), copy=False)
        _EMPTY_FRAMES[name] = frame
    return RawTable(name=name, file=file, frame=frame.copy(), rows=np.zeros(0, dtype=np.int64), present=False)


# --------------------------------------------------------------------------- workbook form


def _sheet_cells(sheet) -> tuple[list[str], list[list[Any]], list[int]]:
    """Header texts, body rows (raw cell values) and their sheet row numbers."""
    header: list[str] = []
    body: list[list[Any]] = []
    rows: list[int] = []
    for number, values in enumerate(sheet.iter_rows(values_only=True), start=1):
        if number == 1:
            header = [cell_text(v) for v in values]
            continue
        if values is None or all(v is None or (isinstance(v, str) and not v.strip()) for v in values):
            continue
        body.append(list(values))
        rows.append(number)
    # Trailing header cells without a name and without values are not columns.
    while header and not header[-1].strip() and all(len(r) < len(header) or r[len(header) - 1] is None for r in body):
        header.pop()
    return header, body, rows


def _sheet_table(workbook, name: str, label: str, problems: Problems, source: CaseSource) -> RawTable | None:
    header, body, rows = _sheet_cells(workbook[name])
    width = len(header)
    for values, row in zip(body, rows):
        extra = [v for v in values[width:] if v is not None and cell_text(v).strip()]
        if extra:
            problems.add(
                label,
                "this row has values to the right of the last named column",
                "give the column a name in row 1, or delete the values",
                row=row,
            )
            return None
    comma = source.input.decimal == ","
    cells = [
        [cell_text(v, comma).strip() for v in (values[:width] + [None] * (width - len(values)))] for values in body
    ]
    frame = (
        pd.DataFrame(cells, columns=range(width), dtype="str")
        if cells
        else pd.DataFrame({n: pd.Series([], dtype="str") for n in range(width)})
    )
    table, renamed = _make_table(
        name, label, header, frame, np.asarray(rows, dtype=np.int64), problems, strip=False, settings=source.input
    )
    source.dialects.append(
        Dialect(
            file=label,
            delimiter="",
            delimiter_source="sheet",
            encoding="",
            encoding_source="sheet",
            date_format=source.input.date_format,
            decimal=source.input.decimal,
            renamed=renamed,
        )
    )
    return table


def _read_workbook(path: Path, problems: Problems) -> CaseSource:
    # openpyxl warns about styles and odd cells it cannot read; the checks that follow
    # report what matters in the case's own words.
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return _read_workbook_quietly(path, problems)


def _read_workbook_quietly(path: Path, problems: Problems) -> CaseSource:
    import openpyxl  # imported here: only the workbook form needs it

    name = path.name
    source = CaseSource(root=path, workbook=True, settings=None, tables={}, snapshots=[], input_files=[path])
    if not check_workbook(path, name, problems):
        source.snapshots_found = False  # nothing more is read: the one problem says why
        return source
    try:
        workbook = openpyxl.load_workbook(path, read_only=True, data_only=True)
    except Exception as error:  # openpyxl raises many kinds for a damaged file
        problems.add(
            name,
            f"the workbook cannot be opened ({error})",
            "save it again from the spreadsheet program as an .xlsx workbook",
        )
        source.snapshots_found = False
        return source
    try:
        sheets = set(workbook.sheetnames)

        def label(sheet: str) -> str:
            return f"{name}:{sheet}"

        def required_sheet(sheet: str) -> bool:
            if sheet not in sheets:
                problems.add(
                    name,
                    f"the required sheet '{sheet}' is missing",
                    f"add a sheet named '{sheet}' (see the case-format description)",
                )
                return False
            return True

        if required_sheet("case"):
            source.settings = _read_case_sheet(workbook["case"], label("case"), problems)
            if source.settings is not None:
                source.input = _input_settings(source.settings, problems)
        source.tables["calendars"] = (
            _sheet_table(workbook, "calendars", label("calendars"), problems, source)
            if required_sheet("calendars")
            else None
        )
        source.snapshots_found = required_sheet("snapshots")
        if source.snapshots_found:
            source.snapshots = _read_snapshots_sheet(workbook, label, problems)
            for table_name in ("activities", "links"):
                if required_sheet(table_name):
                    _split_snapshot_sheet(workbook, table_name, label(table_name), source, problems)
        for table_name in OPTIONAL_FILES:
            if table_name in sheets:
                source.tables[table_name] = _sheet_table(workbook, table_name, label(table_name), problems, source)
            else:
                source.tables[table_name] = _empty_table(table_name, label(table_name))
    finally:
        workbook.close()
    _read_opinion(source, path.parent, problems)
    return source


def _native(value: Any) -> Any:
    if isinstance(value, dt.datetime) and value.time() == dt.time(0):
        return value.date()
    if isinstance(value, str):
        return value.strip()
    if isinstance(value, float) and value.is_integer():
        return int(value)
    return value


def _known_headers(header: list[str], known: tuple[str, ...]) -> list[str]:
    """Header texts, those matching ``known`` (ignoring case and spaces) as ``known`` has them."""
    return [header_key(h) if header_key(h) in known else h.strip() for h in header]


def _read_case_sheet(sheet, file: str, problems: Problems) -> SettingsSource | None:
    header, body, rows = _sheet_cells(sheet)
    header = _known_headers(header, ("key", "value"))
    if "key" not in header or "value" not in header:
        problems.add(
            file,
            "the sheet needs the columns 'key' and 'value' in row 1",
            "write key in A1 and value in B1, then one setting per row, e.g. project.name",
            row=1,
        )
        return None
    key_at, value_at = header.index("key"), header.index("value")
    values: dict[str, Any] = {}
    where: dict[str, int] = {}
    for cells, row in zip(body, rows):
        cells = list(cells) + [None] * (len(header) - len(cells))
        key = cell_text(cells[key_at]).strip()
        if not key:
            continue
        if key in where:
            problems.add(
                file,
                f"the setting '{key}' is given twice (first on row {where[key]})",
                "keep one row for each setting",
                row=row,
                column="key",
            )
            continue
        where[key] = row
        value = _native(cells[value_at])
        if value is None or value == "":
            continue
        # A header named in input.columns may itself hold a dot: it is the fourth part.
        parts = key.split(".", 3) if key.startswith("input.columns.") else key.split(".")
        if len(parts) > LARGEST_SETTING_PARTS:
            problems.add(
                file,
                f"the setting name has {len(parts):,} parts, more than the {LARGEST_SETTING_PARTS} a setting may have",
                "name the setting section.name, e.g. project.name",
                row=row,
                column="key",
            )
            continue
        target = values
        for part in parts[:-1]:
            existing = target.setdefault(part, {})
            if not isinstance(existing, dict):
                problems.add(
                    file,
                    f"'{key}' conflicts with the setting '{part}'",
                    "use keys of the form section.name",
                    row=row,
                    column="key",
                )
                break
            target = existing
        else:
            target[parts[-1]] = value

    def locate(key: str) -> tuple[int | None, str]:
        return where.get(key), "value"

    return SettingsSource(values, file, locate)


def _read_snapshots_sheet(workbook, label, problems: Problems) -> list[SnapshotSource]:
    file = label("snapshots")
    header, body, rows = _sheet_cells(workbook["snapshots"])
    header = _known_headers(header, ("label", "data_date", "kind", "folder"))
    missing = [c for c in ("label", "data_date") if c not in header]
    for column in missing:
        problems.add(
            file,
            f"the required column '{column}' is missing",
            f"add a column '{column}' to row 1",
            row=1,
            column=column,
        )
    if missing:
        return []
    snapshots: list[SnapshotSource] = []
    for cells, row in zip(body, rows):
        cells = list(cells) + [None] * (len(header) - len(cells))
        facts = {}
        for column, value in zip(header, cells):
            value = _native(value)
            if column and value is not None and value != "":
                facts[column] = value
        folder = str(facts.pop("folder", "") or facts.get("label", "")).strip()
        if not folder:
            problems.add(
                file,
                "the snapshot has neither a label nor a folder name",
                "give each snapshot a label",
                row=row,
                column="label",
            )
            continue
        snapshots.append(
            SnapshotSource(
                folder=folder,
                facts=facts,
                file=file,
                locate=lambda key, _row=row: (_row, key),
            )
        )
    return snapshots


def _split_snapshot_sheet(workbook, name: str, file: str, source: CaseSource, problems: Problems) -> None:
    """Split the activities or links sheet by its leading ``snapshot`` column."""
    snapshots = source.snapshots
    table = _sheet_table(workbook, name, file, problems, source)
    if table is None:
        return
    if "snapshot" not in table.frame.columns:
        problems.add(
            file,
            "the required column 'snapshot' is missing",
            "add a first column 'snapshot' naming the snapshot of each row",
            row=1,
            column="snapshot",
        )
        return
    by_name: dict[str, SnapshotSource] = {}
    for snap in snapshots:
        by_name.setdefault(snap.folder, snap)
    for snap in snapshots:
        by_name.setdefault(str(snap.facts.get("label", "")), snap)
    names = table.frame["snapshot"]
    known = names.isin(list(by_name))
    problems.flag(
        table,
        ~known & (names != ""),
        "snapshot",
        "the snapshot '{value}' is not in the snapshots sheet",
        "add it to the snapshots sheet or correct the name",
    )
    problems.flag(
        table,
        names == "",
        "snapshot",
        "the row names no snapshot",
        "write the snapshot's folder name or label in the snapshot column",
    )
    owner = names.map({n: snap.folder for n, snap in by_name.items()}).fillna("")
    stable = set(COLUMNS[name])
    for snap in snapshots:
        mask = (owner == snap.folder).to_numpy()
        frame = table.frame.loc[mask].drop(columns=["snapshot"]).reset_index(drop=True)
        # A column the sheet has for another snapshot's sake is not part of this one.
        unused = [c for c in frame.columns if c not in stable and not (frame[c] != "").any()]
        frame = frame.drop(columns=unused)
        setattr(
            snap,
            name,
            RawTable(
                name=name,
                file=file,
                frame=frame,
                rows=table.rows[mask],
                date_format=table.date_format,
                decimal=table.decimal,
            ),
        )


# --------------------------------------------------------------------------- opinion


def _read_opinion(source: CaseSource, folder: Path, problems: Problems) -> None:
    """Read ``opinion.md`` from ``folder`` into ``source.opinion`` when it is there."""
    path = folder / OPINION_NAME
    if not path.is_file():
        return
    source.input_files.append(path)
    try:
        size = path.stat().st_size
        if size > LARGEST_OPINION:
            problems.add(
                OPINION_NAME,
                f"the file is {size:,} bytes, more than the {LARGEST_OPINION:,} bytes (256 KiB) an opinion may hold",
                "shorten the opinion, or refer to a separate document from it",
            )
            return
        data = path.read_bytes()
    except OSError as error:
        problems.add(
            OPINION_NAME, f"the file cannot be read ({error.strerror or error})", "check that the file may be read"
        )
        return
    try:
        text = data.decode("utf-8-sig")
    except UnicodeDecodeError as error:
        problems.add(
            OPINION_NAME,
            f"the file is not UTF-8 text (byte {error.start + 1})",
            "save it as plain text in UTF-8 encoding",
        )
        return
    if "\x00" in text:
        problems.add(
            OPINION_NAME, "the file holds a NUL character, so it is not text", "save the opinion as plain Markdown text"
        )
        return
    source.opinion = text


# --------------------------------------------------------------------------- entry point


def open_source(path: Path, problems: Problems) -> CaseSource | None:
    """Read the case at ``path`` (a folder, a workbook, or a folder holding only a workbook).

    A folder without case.toml but with a ``case.xlsx`` is read as that workbook. Problems
    in the files read are recorded, not raised.

    Parameters
    ----------
    path : pathlib.Path
        The case folder or workbook.
    problems : Problems
        Where problems are recorded.

    Returns
    -------
    CaseSource or None
        What was read; ``None``, with the problem recorded, when there is nothing at
        ``path`` or it is a file that is not an ``.xlsx`` workbook.
    """
    path = Path(path)
    if path.is_dir():
        if not (path / "case.toml").exists() and (path / WORKBOOK_NAME).is_file():
            return _read_workbook(path / WORKBOOK_NAME, problems)
        return _read_folder(path, problems)
    if path.is_file():
        if path.suffix.lower() == ".xlsx":
            return _read_workbook(path, problems)
        problems.add(
            str(path),
            "this is neither a case folder nor an .xlsx workbook",
            "give the case folder (the one holding case.toml) or the case.xlsx workbook",
        )
        return None
    problems.add(
        str(path),
        "there is no case folder or workbook at this path",
        "check the path; `delay new FOLDER` writes an empty case to start from",
    )
    return None
