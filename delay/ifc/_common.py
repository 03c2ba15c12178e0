"""What the IFC readers and writers share: findings, ISO 8601 times, checks in a copy.

Nothing here imports ifcopenshell.
"""

from __future__ import annotations

import csv
import datetime as dt
import hashlib
import io
import re
import shutil
import tempfile
from collections.abc import Iterable, Mapping
from dataclasses import dataclass
from pathlib import Path

import pandas as pd

from ..errors import CaseError, Problem

__all__ = [
    "ifc_text",
    "ifc_value",
    "csv_bytes",
    "FINDING_COLUMNS",
    "Findings",
    "IsoDuration",
    "parse_duration",
    "work_days_duration",
    "parse_date",
    "date_time_text",
    "open_model",
    "case_folder",
    "case_calendar_days",
    "sha256_of",
    "validate_in_copy",
    "SCHEDULING_PSET",
    "ELEMENT_PSET",
]

#: Our own property sets: what IfcTaskTime and IfcTask cannot hold, and placeholder facts.
SCHEDULING_PSET = "DelayToolkit_Scheduling"
ELEMENT_PSET = "DelayToolkit_Element"

#: Columns of every findings table (a finding is a fact worth a look, not an error).
FINDING_COLUMNS = ("kind", "entity", "global_id", "subject", "message")


class Findings:
    """Findings collected while reading or writing a file, in the order they were found."""

    def __init__(self) -> None:
        self.rows: list[dict[str, str]] = []

    def add(self, kind: str, message: str, entity=None, subject: str = "") -> None:
        """One finding.

        Parameters
        ----------
        kind : str
            What sort of finding it is (the reader's or writer's own short word).
        message : str
            The finding in words.
        entity : ifcopenshell.entity_instance, optional
            The IFC entity it is about, recorded as ``#id IfcClass`` with its GlobalId; ``None``
            for none.
        subject : str, optional
            What else it is about (an activity id, a calendar name, ...).
        """
        label, global_id = "", ""
        if entity is not None:
            label = f"#{entity.id()} {entity.is_a()}"
            global_id = str(getattr(entity, "GlobalId", "") or "")
        self.rows.append(
            {"kind": kind, "entity": label, "global_id": global_id, "subject": str(subject or ""), "message": message}
        )

    def frame(self) -> pd.DataFrame:
        """The findings as a table.

        Returns
        -------
        pandas.DataFrame
            One row per finding, in the order found, with :data:`FINDING_COLUMNS`, all text.
        """
        return pd.DataFrame(self.rows, columns=list(FINDING_COLUMNS)).astype(str)

    def __len__(self) -> int:
        return len(self.rows)


# -- ISO 8601 durations and dates ---------------------------------------------------------------
_DURATION = re.compile(
    r"^(?P<sign>[-+])?P(?!$)(?:(?P<years>\d+(?:[.,]\d+)?)Y)?(?:(?P<months>\d+(?:[.,]\d+)?)M)?"
    r"(?:(?P<weeks>\d+(?:[.,]\d+)?)W)?(?:(?P<days>\d+(?:[.,]\d+)?)D)?"
    r"(?:T(?=\d)(?:(?P<hours>\d+(?:[.,]\d+)?)H)?(?:(?P<minutes>\d+(?:[.,]\d+)?)M)?"
    r"(?:(?P<seconds>\d+(?:[.,]\d+)?)S)?)?$"
)


@dataclass(frozen=True)
class IsoDuration:
    """An ISO 8601 duration (``IfcDuration``) split into its parts.

    ISO 8601 itself has no negative durations; IFC files carry a lead as ``-P2D``
    (common practice), which is read here with ``sign = -1``.

    Parameters
    ----------
    sign : int, default 1
        +1 or -1.
    years, months, weeks, days : float, default 0.0
        The date parts.
    hours, minutes, seconds : float, default 0.0
        The time parts.
    """

    sign: int = 1
    years: float = 0.0
    months: float = 0.0
    weeks: float = 0.0
    days: float = 0.0
    hours: float = 0.0
    minutes: float = 0.0
    seconds: float = 0.0

    @property
    def has_calendar_parts(self) -> bool:
        """Years or months, which have no fixed length in days."""
        return bool(self.years or self.months)

    @property
    def has_time_parts(self) -> bool:
        """Hours, minutes or seconds."""
        return bool(self.hours or self.minutes or self.seconds)


def ifc_value(value):
    """The plain value of an IFC attribute.

    Parameters
    ----------
    value : object
        An attribute value read by ifcopenshell, or ``None``.

    Returns
    -------
    object
        A measure or label entity's ``wrappedValue``, anything else as it is (``None`` stays
        ``None``).

    Examples
    --------
    >>> ifc_value(None), ifc_value(2.5)
    (None, 2.5)
    """
    if value is None:
        return None
    return value.wrappedValue if hasattr(value, "wrappedValue") else value


def ifc_text(value) -> str:
    """An IFC attribute as text: blank for none, a whole float without ``.0``, stripped.

    Parameters
    ----------
    value : object
        An attribute value (see :func:`ifc_value`), or ``None``.

    Returns
    -------
    str
        The value as text.

    Examples
    --------
    >>> ifc_text(None), ifc_text(3.0), ifc_text("  Level 1 ")
    ('', '3', 'Level 1')
    """
    value = ifc_value(value)
    if value is None:
        return ""
    if isinstance(value, float) and value.is_integer():
        return str(int(value))
    return str(value).strip()


def parse_duration(text: str) -> IsoDuration | None:
    """Read an ISO 8601 duration such as ``"P5D"``.

    Parameters
    ----------
    text : str
        The duration; surrounding blanks and lower case are accepted, and a decimal comma.

    Returns
    -------
    IsoDuration or None
        Its parts (``"P5D"`` gives ``IsoDuration(days=5.0)``); ``None`` when ``text`` is not
        an ISO 8601 duration.

    Examples
    --------
    >>> parse_duration("-P1W2DT4H").weeks, parse_duration("-P1W2DT4H").sign
    (1.0, -1)
    >>> parse_duration("five days") is None
    True
    """
    found = _DURATION.match(str(text).strip().upper())
    if not found:
        return None
    parts = {k: float(v.replace(",", ".")) for k, v in found.groupdict().items() if k != "sign" and v}
    return IsoDuration(sign=-1 if found.group("sign") == "-" else 1, **parts)


def work_days_duration(days: int) -> str:
    """Whole work days as an ``IfcDuration``.

    Parameters
    ----------
    days : int
        Work days; negative for a lead.

    Returns
    -------
    str
        ``"P<n>D"``, or ``"-P<n>D"`` for a negative number.

    Examples
    --------
    >>> work_days_duration(3), work_days_duration(-2), work_days_duration(0)
    ('P3D', '-P2D', 'P0D')
    """
    days = int(days)
    return f"-P{-days}D" if days < 0 else f"P{days}D"


def parse_date(text) -> dt.date | None:
    """The date of an ``IfcDateTime`` or ``IfcDate``.

    Parameters
    ----------
    text : str or None
        The value; only its first ten characters (``YYYY-MM-DD``) are read.

    Returns
    -------
    datetime.date or None
        The date; ``None`` for a blank or unreadable value.

    Examples
    --------
    >>> parse_date("2025-03-03T08:00:00")
    datetime.date(2025, 3, 3)
    >>> parse_date("") is None, parse_date("03/03/2025") is None
    (True, True)
    """
    if text is None:
        return None
    value = str(text).strip()
    if not value:
        return None
    try:
        return dt.date.fromisoformat(value[:10])
    except ValueError:
        return None


def date_time_text(day: dt.date, time: str) -> str:
    """An ``IfcDateTime``: the date with a time of day.

    Parameters
    ----------
    day : datetime.date
        The date.
    time : str
        The time of day, ``"HH:MM:SS"``.

    Returns
    -------
    str
        ``"YYYY-MM-DDTHH:MM:SS"``.

    Examples
    --------
    >>> import datetime
    >>> date_time_text(datetime.date(2025, 3, 3), "08:00:00")
    '2025-03-03T08:00:00'
    """
    return f"{day.isoformat()}T{time}"


# -- files --------------------------------------------------------------------------------------
def open_model(path: str | Path):
    """Open an IFC file with ifcopenshell.

    Parameters
    ----------
    path : str or pathlib.Path
        The ``.ifc`` file.

    Returns
    -------
    ifcopenshell.file
        The opened model.

    Raises
    ------
    delay.ifc.IfcExtraMissing
        ifcopenshell is not installed.
    delay.errors.CaseError
        The file does not exist or cannot be read as an IFC file.
    """
    from . import require_ifcopenshell

    ifcopenshell = require_ifcopenshell()
    path = Path(path)
    if not path.is_file():
        raise CaseError(
            Problem(file=str(path), message="the IFC file does not exist", fix="give the path of the .ifc file")
        )
    try:
        return ifcopenshell.open(str(path))
    except Exception as error:  # ifcopenshell raises several kinds for a broken file
        detail = str(error).strip().splitlines()[0] if str(error).strip() else type(error).__name__
        raise CaseError(
            Problem(
                file=str(path),
                message=f"cannot be read as an IFC file ({detail})",
                fix="export the model again as an IFC file (STEP physical file, .ifc)",
            )
        ) from None


def case_folder(case) -> Path:
    """The folder of a loaded case.

    Parameters
    ----------
    case : delay.model.Case
        A loaded case.

    Returns
    -------
    pathlib.Path
        Its root folder (the one holding case.toml).

    Raises
    ------
    delay.errors.CaseError
        The case is a workbook (or its root holds no case.toml): the IFC commands write
        files into a case folder.
    """
    root = Path(case.root)
    if root.is_file() or not (root / "case.toml").is_file():
        raise CaseError(
            Problem(
                file=str(root),
                message="the IFC commands write into a case folder, and this case is a workbook",
                fix="use the case in folder form (case.toml, calendars.csv, snapshots/...)",
            )
        )
    return root


def case_calendar_days(case, name: str) -> tuple[dict[dt.date, str], dict[dt.date, str]]:
    """The dated exceptions of one calendar of a case (its calendar_exceptions.csv).

    Parameters
    ----------
    case : delay.model.Case
        A loaded case.
    name : str
        The calendar's name.

    Returns
    -------
    holidays, extra_workdays : dict
        The holidays and the extra working days, each date (``datetime.date``) mapped to its
        reason, in the order of calendar_exceptions.csv.
    """
    holidays: dict[dt.date, str] = {}
    extra_workdays: dict[dt.date, str] = {}
    exceptions = case.calendar_exceptions
    own = exceptions[exceptions["calendar"] == name]
    for day, working, reason in zip(own["date"], own["working"], own["reason"]):
        (extra_workdays if bool(working) else holidays)[pd.Timestamp(day).date()] = str(reason)
    return holidays, extra_workdays


def sha256_of(path: str | Path) -> str:
    """The SHA-256 digest of a file, read in blocks of 1 MiB.

    Parameters
    ----------
    path : str or pathlib.Path
        The file.

    Returns
    -------
    str
        The digest as 64 lower-case hexadecimal digits.

    Examples
    --------
    >>> import pathlib, tempfile
    >>> with tempfile.TemporaryDirectory() as folder:
    ...     empty = pathlib.Path(folder) / "empty.txt"
    ...     _ = empty.write_bytes(b"")
    ...     sha256_of(empty)
    'e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855'
    """
    digest = hashlib.sha256()
    with open(path, "rb") as stream:
        for block in iter(lambda: stream.read(1 << 20), b""):
            digest.update(block)
    return digest.hexdigest()


def validate_in_copy(case_root: Path, files: Mapping[str, bytes], snapshots: Iterable[str] = ("baseline",)):
    """Load a copy of the case's settings, calendars and ``snapshots`` with ``files`` laid over.

    Checks what a command is about to write before anything is written: the copy holds
    case.toml, calendars.csv, calendar_exceptions.csv and the named snapshot folders; then
    each entry of ``files`` (path relative to the case -> content) is written into it.
    Problems name the files relative to the case, so they read as they would after writing.

    Parameters
    ----------
    case_root : pathlib.Path
        The case folder; nothing in it is changed.
    files : mapping of str to bytes
        Path relative to the case, to the content it is about to get.
    snapshots : iterable of str, default ("baseline",)
        The snapshot folders (under ``snapshots/``) to copy.

    Returns
    -------
    delay.model.Case
        The loaded copy (its root is a temporary folder that no longer exists).

    Raises
    ------
    delay.errors.CaseError
        When the copy does not load.
    """
    from ..case import load_case

    with tempfile.TemporaryDirectory(prefix="delay-ifc-check-") as folder:
        copy = Path(folder) / "case"
        copy.mkdir()
        for name in ("case.toml", "calendars.csv", "calendar_exceptions.csv"):
            if (case_root / name).is_file():
                shutil.copy2(case_root / name, copy / name)
        for snapshot in snapshots:
            source = case_root / "snapshots" / snapshot
            if source.is_dir():
                shutil.copytree(source, copy / "snapshots" / snapshot)
        for relative, content in files.items():
            target = copy / relative
            target.parent.mkdir(parents=True, exist_ok=True)
            target.write_bytes(content)
        return load_case(copy)


def csv_bytes(frame: pd.DataFrame) -> bytes:
    """A table as the case's CSV files hold it: a header row, every cell as text, UTF-8.

    Parameters
    ----------
    frame : pandas.DataFrame
        The table; its index is not written.

    Returns
    -------
    bytes
        The CSV text (``\\n`` line ends) encoded as UTF-8.

    Examples
    --------
    >>> import pandas as pd
    >>> csv_bytes(pd.DataFrame({"id": ["A1"], "duration": [5]}))
    b'id,duration\\nA1,5\\n'
    """
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(list(frame.columns))
    writer.writerows(frame.astype(str).itertuples(index=False, name=None))
    return buffer.getvalue().encode("utf-8")
