"""Reading the tables people really export: the ``[input]`` table of case.toml.

Spreadsheet programmes save "CSV" in many dialects: semicolons where the decimal mark is a
comma, Windows code page 1252 or UTF-16 instead of UTF-8, day-first dates, headers in
their own words. The optional ``[input]`` table says which dialect the files of a case are
in, and the toolkit reads them as given, never guessing silently: what it read for each
file (delimiter, encoding, date format, decimal mark, headers renamed, and whether each
was declared, detected or the default) is kept as a :class:`Dialect` and printed by
``delay validate``. Every value still goes through the same checks as a UTF-8, ISO-dated
file.

.. code-block:: toml

    [input]
    delimiter = ";"          # or ",", "\\t", "|"; by default detected from the header row
    encoding = "cp1252"      # or "utf-8" (the default), "utf-16"; a byte-order mark wins
    date_format = "%d/%m/%Y" # every date column; ISO YYYY-MM-DD is always understood too
    decimal = ","            # or "." (the default)

    [input.columns.activities]
    "Task No" = "id"          # the file's header = the case format's column
"""

from __future__ import annotations

import codecs
import datetime as dt
import re
from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from typing import Any

from delay.model import COLUMNS, InputSettings

__all__ = [
    "DELIMITERS",
    "ENCODINGS",
    "ISO_DATE",
    "Dialect",
    "DecodeProblem",
    "parse_input",
    "decode",
    "detect_delimiter",
    "header_key",
    "rename_header",
]

#: The delimiters a CSV file may use, by the name a user writes in case.toml.
DELIMITERS = {",": ",", ";": ";", "\t": "\t", "tab": "\t", "|": "|"}
#: The encodings a CSV file may be in (Python codec names).
ENCODINGS = ("utf-8", "cp1252", "utf-16", "utf-16-le", "utf-16-be")
#: The date format of the case format itself, always understood.
ISO_DATE = "%Y-%m-%d"
#: The directives a date format may use: day, month (number or name), four-digit year.
_DATE_DIRECTIVES = set("dmbBY%")
_BOMS = (
    (codecs.BOM_UTF8, "utf-8-sig", "utf-8"),
    (codecs.BOM_UTF16_LE, "utf-16", "utf-16-le"),
    (codecs.BOM_UTF16_BE, "utf-16", "utf-16-be"),
)
#: Extra columns a workbook's sheets hold beside a table's own.
_SHEET_COLUMNS = {"activities": ("snapshot",), "links": ("snapshot",)}


@dataclass(frozen=True)
class Dialect:
    """What was read for one file: the facts ``delay validate`` prints.

    Parameters
    ----------
    file : str
        The file (or ``case.xlsx:sheet``) as problems name it.
    delimiter : str
        The delimiter the file was read with.
    delimiter_source : str
        Where it came from: ``"declared"`` ([input] of case.toml), ``"detected"`` (the
        header row) or ``"default"``.
    encoding : str
        The encoding the file was read in.
    encoding_source : str
        Where it came from: ``"declared"``, ``"detected"`` (a byte-order mark) or
        ``"default"``.
    date_format : str
        The strptime format its dates were read in.
    decimal : str
        Its decimal mark, ``"."`` or ``","``.
    renamed : mapping of str to str, optional
        Each header of the file that was read as another name, to that name.
    """

    file: str
    delimiter: str
    delimiter_source: str
    encoding: str
    encoding_source: str
    date_format: str
    decimal: str
    renamed: Mapping[str, str] = field(default_factory=dict)

    def as_dict(self) -> dict[str, Any]:
        """The dialect as a dictionary ready for ``json.dumps``.

        Returns
        -------
        dict
            The fields by name (``file``, ``delimiter``, ``delimiter_source``,
            ``encoding``, ``encoding_source``, ``date_format``, ``decimal``), and
            ``renamed`` as a plain dict.

        Examples
        --------
        >>> Dialect("links.csv", ";", "declared", "utf-8", "default", "%d/%m/%Y", ",").as_dict()["renamed"]
        {}
        """
        return {
            "file": self.file,
            "delimiter": self.delimiter,
            "delimiter_source": self.delimiter_source,
            "encoding": self.encoding,
            "encoding_source": self.encoding_source,
            "date_format": self.date_format,
            "decimal": self.decimal,
            "renamed": dict(self.renamed),
        }


class DecodeProblem(ValueError):
    """The bytes of a file are not text in the encoding it is read in."""


def header_key(text: str) -> str:
    """A header as it is matched: surrounding spaces off, case folded.

    Parameters
    ----------
    text : str
        A header as written in a file (anything else is turned into text first).

    Returns
    -------
    str
        The header stripped and case-folded.

    Examples
    --------
    >>> header_key(" Task No ")
    'task no'
    """
    return str(text).strip().casefold()


Report = Callable[[str, str, str], None]


def _valid_date_format(text: str) -> str | None:
    """Why ``text`` is not a usable date format, or ``None`` when it is."""
    directives = re.findall(r"%(.)", text)
    if any(d not in _DATE_DIRECTIVES for d in directives):
        return "may use only %d (day), %m or %b (month) and %Y (four-digit year)"
    wanted = {"d", "Y"}
    if not wanted <= set(directives) or not {"m", "b", "B"} & set(directives):
        return "must give the day (%d), the month (%m) and the four-digit year (%Y)"
    sample = dt.date(2025, 3, 31)
    try:
        if dt.datetime.strptime(sample.strftime(text), text).date() != sample:
            return "does not read back the dates it writes"
    except ValueError:
        return "does not read back the dates it writes"
    return None


def _parse_columns(given: Any, report: Report) -> dict[str, dict[str, str]]:
    """``[input.columns]``: per table, the file's header (matched by :func:`header_key`)
    to the case format's column."""
    if not isinstance(given, dict):
        report(
            "input.columns",
            "input.columns must be a section of tables",
            'write [input.columns.activities] and below it "Your header" = "id"',
        )
        return {}
    mapping: dict[str, dict[str, str]] = {}
    for table, headers in given.items():
        key = f"input.columns.{table}"
        if table not in COLUMNS:
            report(key, f"'{table}' is not a table of the case", "use one of: " + ", ".join(COLUMNS))
            continue
        if not isinstance(headers, dict):
            report(
                key,
                f"{key} must be a section of headers",
                f'write [{key}] and below it "Your header" = "{COLUMNS[table][0]}"',
            )
            continue
        known = COLUMNS[table] + _SHEET_COLUMNS.get(table, ())
        ours: dict[str, str] = {}
        for header, column in headers.items():
            where = f"{key}.{header}"
            if not isinstance(column, str) or column.strip() not in known:
                report(where, f"{column!r} is not a column of {table}", "map the header to one of: " + ", ".join(known))
                continue
            column = column.strip()
            if header_key(header) in ours:
                report(
                    where,
                    f"the header '{header}' is mapped twice (ignoring case and spaces)",
                    "keep one mapping for each header",
                )
                continue
            if column in ours.values():
                report(
                    where,
                    f"two headers are mapped to the column '{column}'",
                    "map one header of the file to each column",
                )
                continue
            ours[header_key(header)] = column
        mapping[table] = ours
    return mapping


def parse_input(given: Any, report: Report) -> InputSettings:
    """The ``[input]`` table of the settings, checked.

    Each of ``delimiter``, ``encoding``, ``date_format``, ``decimal`` and
    ``[input.columns.TABLE]`` is checked; any other key is a problem.

    Parameters
    ----------
    given : dict or None
        The ``input`` entry of the settings as read (``None`` when there is none).
    report : callable
        ``report(key, message, fix)`` records a problem with the setting ``key``.

    Returns
    -------
    InputSettings
        The settings; a setting with a problem takes its default (the problem is recorded,
        so the case does not load).
    """
    if given is None:
        return InputSettings()
    if not isinstance(given, dict):
        report(
            "input",
            "'input' must be a section of settings",
            "write [input] on a line of its own and its settings below it",
        )
        return InputSettings()
    values: dict[str, Any] = {}
    for name, value in given.items():
        key = f"input.{name}"
        if name == "delimiter":
            if value not in DELIMITERS:
                report(
                    key,
                    f"the delimiter {value!r} is not one the toolkit reads",
                    'write delimiter = ";" (or ",", "\\t", "|"), or leave it out to detect it',
                )
            else:
                values[name] = DELIMITERS[value]
        elif name == "encoding":
            codec = _codec(value)
            if codec is None:
                report(
                    key,
                    f"the encoding {value!r} is not one the toolkit reads",
                    "write one of: " + ", ".join(f'"{e}"' for e in ENCODINGS),
                )
            else:
                values[name] = codec
        elif name == "date_format":
            why = _valid_date_format(value) if isinstance(value, str) else "must be text"
            if why:
                report(
                    key,
                    f"the date format {value!r} {why}",
                    'write it as date_format = "%d/%m/%Y" (or "%d.%m.%Y", "%Y-%m-%d")',
                )
            else:
                values[name] = value
        elif name == "decimal":
            if value not in (".", ","):
                report(key, f"the decimal mark {value!r} is not . or ,", 'write decimal = ","')
            else:
                values[name] = value
        elif name == "columns":
            values[name] = _parse_columns(value, report)
        else:
            report(
                key,
                f"'{name}' is not a setting of [input]",
                "use delimiter, encoding, date_format, decimal or [input.columns.TABLE]",
            )
    return InputSettings(**values)


def _codec(value: Any) -> str | None:
    if not isinstance(value, str):
        return None
    try:
        name = codecs.lookup(value.strip()).name
    except LookupError:
        return None
    names = {codecs.lookup(e).name: e for e in ENCODINGS}
    return names.get(name)


def decode(data: bytes, declared: str | None) -> tuple[str, str, str]:
    """The text of a file, the encoding it was read in and where that came from.

    A byte-order mark decides (UTF-8 or UTF-16), whatever is declared; otherwise the
    declared encoding, else UTF-8. A leading byte-order mark is not part of the text.

    Parameters
    ----------
    data : bytes
        The file's contents.
    declared : str or None
        The encoding [input] of case.toml declares (a Python codec name), or ``None``.

    Returns
    -------
    tuple of (str, str, str)
        The text, the encoding's name, and where it came from (``"detected"``,
        ``"declared"`` or ``"default"``).

    Raises
    ------
    DecodeProblem
        When the bytes are not text in that encoding; its message says where.

    Examples
    --------
    >>> decode("id;name".encode("cp1252"), "cp1252")
    ('id;name', 'cp1252', 'declared')
    """
    for mark, bom_codec, name in _BOMS:
        if data.startswith(mark):
            codec, encoding, source = bom_codec, name, "detected"
            break
    else:
        codec = declared or "utf-8"
        encoding, source = codec, ("declared" if declared else "default")
    try:
        text = data.decode(codec)
    except UnicodeDecodeError as error:
        raise DecodeProblem(f"the file is not {encoding} text (byte {error.start + 1:,} cannot be read)") from None
    if text.startswith("\ufeff"):
        text = text[1:]
    return text, encoding, source


def detect_delimiter(header_line: str) -> str:
    """The delimiter of a CSV file, detected from its header row.

    Parameters
    ----------
    header_line : str
        The file's first line.

    Returns
    -------
    str
        The candidate (``,`` ``;`` tab ``|``) found most often outside double quotes;
        ``,`` when none is there (a single column).

    Examples
    --------
    >>> detect_delimiter('id;name;"duration; days"')
    ';'
    """
    bare = re.sub(r'"[^"]*"', "", header_line)
    counts = {d: bare.count(d) for d in (",", ";", "\t", "|")}
    best = max(counts, key=lambda d: counts[d])
    return best if counts[best] else ","


def rename_header(table: str, header: list[str], settings: InputSettings) -> tuple[list[str], dict[str, str]]:
    """The column names of a file's header row, and the headers read as another name.

    Each header is matched ignoring case and surrounding spaces: first against
    ``[input.columns.TABLE]``, then against the table's own columns; any other header is
    kept as written (spaces taken off).

    Parameters
    ----------
    table : str
        The table's name in the case format (``"activities"``, ...).
    header : list of str
        The file's header row as read.
    settings : InputSettings
        The [input] settings of the case; their ``columns`` map headers to columns.

    Returns
    -------
    names : list of str
        The column name of each header, in order.
    renamed : dict of str to str
        Each header (spaces taken off) whose name differs from it, to that name.

    Examples
    --------
    >>> from delay.model import InputSettings
    >>> settings = InputSettings(columns={"activities": {"task no": "id"}})
    >>> rename_header("activities", [" Task No ", "NAME", "extra"], settings)
    (['id', 'name', 'extra'], {'Task No': 'id', 'NAME': 'name'})
    """
    mapped = settings.columns.get(table, {})
    own = {header_key(c): c for c in COLUMNS.get(table, ()) + _SHEET_COLUMNS.get(table, ())}
    names: list[str] = []
    renamed: dict[str, str] = {}
    for text in header:
        stripped = str(text).strip()
        key = header_key(stripped)
        name = mapped.get(key) or own.get(key) or stripped
        if name != stripped:
            renamed[stripped] = name
        names.append(name)
    return names, renamed
