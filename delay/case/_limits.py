"""Limits checked before a file is parsed, so that no file can exhaust time or memory.

A TOML file is checked for its size and for how deeply it nests (arrays, inline tables,
dotted keys and table headers) before :mod:`tomllib` reads it: a parser that recurses
would otherwise fail on a file nested a hundred thousand levels deep. A workbook is a zip
archive of XML; its entries' unpacked sizes (from the archive's directory, which the zip
reader then holds each entry to) and each sheet's row count are checked before openpyxl
parses it, so that a small file that unpacks to gigabytes is refused at once.
"""

from __future__ import annotations

import re
import zipfile
from pathlib import Path

import numpy as np

from delay.case._problems import Problems

__all__ = [
    "LARGEST_TOML",
    "DEEPEST_TOML",
    "LARGEST_SETTING_PARTS",
    "LARGEST_WORKBOOK",
    "LARGEST_SHEET_ROWS",
    "toml_depth",
    "check_toml",
    "check_workbook",
]

#: The largest case.toml or snapshot.toml read, in bytes (1 MiB; a real one is a few KiB).
LARGEST_TOML = 1024 * 1024
#: The deepest nesting accepted in a TOML file (the format itself needs four levels).
DEEPEST_TOML = 32
#: The most parts a setting's name may have in the workbook's ``case`` sheet
#: (``input.columns.activities.Activity ID`` has four).
LARGEST_SETTING_PARTS = 8
#: The most bytes a workbook may unpack to (512 MiB of XML).
LARGEST_WORKBOOK = 512 * 1024 * 1024
#: The most rows a sheet may hold: 1,048,576, the most a sheet of the .xlsx format holds
#: (ECMA-376 Part 1, the ``ref`` of a cell runs to row 1048576; recalled from memory).
LARGEST_SHEET_ROWS = 1_048_576
#: The most entries a workbook archive may hold.
LARGEST_ENTRIES = 10_000

# Strings and comments, which may hold any bracket or dot without nesting anything.
_TOML_TEXT = re.compile(r'"""[\s\S]*?"""|\'\'\'[\s\S]*?\'\'\'|"(?:[^"\\\n]|\\.)*"|\'[^\'\n]*\'|#[^\n]*')
_OPEN = np.zeros(256, dtype=np.int64)
_OPEN[[ord("["), ord("{")]] = 1
_OPEN[[ord("]"), ord("}")]] = -1
_DIGIT = np.zeros(256, dtype=bool)
_DIGIT[ord("0") : ord("9") + 1] = True


def toml_depth(text: str) -> int:
    """An upper bound of how deeply a TOML text nests.

    The deepest bracket nesting (arrays, inline tables, table headers) plus the most
    dots of a key on one line (a dot between two digits belongs to a number or a time),
    after strings and comments are taken out; whole-array operations over the text.

    Parameters
    ----------
    text : str
        The TOML text.

    Returns
    -------
    int
        At least the depth of the deepest value ``tomllib`` would build from ``text``.

    Examples
    --------
    >>> toml_depth('[input.columns.activities]\\n"Activity ID" = "id"\\n')
    3
    """
    bare = _TOML_TEXT.sub("s", text).encode("utf-8", "replace")
    octets = np.frombuffer(bare, dtype=np.uint8)
    if not octets.size:
        return 0
    brackets = int(np.cumsum(_OPEN[octets]).max(initial=0))
    dot = octets == ord(".")
    digit = _DIGIT[octets]
    between = np.zeros_like(dot)
    between[1:-1] = digit[:-2] & digit[2:]
    dots = dot & ~between
    if not dots.any():
        return brackets
    line = np.cumsum(octets == ord("\n"))
    return brackets + int(np.bincount(line[dots]).max())


def check_toml(data: bytes, file: str, problems: Problems) -> bool:
    """Whether ``data`` (a TOML file's bytes) may be parsed; records why not.

    Parameters
    ----------
    data : bytes
        The file's bytes (a UTF-8 byte-order mark already taken off or not).
    file : str
        The file's name in problems.
    problems : Problems
        Where a problem is recorded.

    Returns
    -------
    bool
        ``False`` when the file is too large or nests too deeply (one problem recorded).
    """
    if len(data) > LARGEST_TOML:
        problems.add(
            file,
            f"the file is {len(data):,} bytes, more than the {LARGEST_TOML:,} bytes (1 MiB) a settings file may hold",
            "keep only the settings of the case format in it",
        )
        return False
    depth = toml_depth(data.decode("utf-8", "replace"))
    if depth > DEEPEST_TOML:
        problems.add(
            file,
            f"the settings nest {depth:,} levels deep, more than the {DEEPEST_TOML} levels a settings file may use",
            "write each setting as key = value under its [section]",
        )
        return False
    return True


_ROW = re.compile(rb"<(?:[A-Za-z_][\w.-]{0,20}:)?row[\s>/]")
_SHEET = re.compile(r"xl/worksheets/[^/]+\.xml$")


def _sheet_rows(archive: zipfile.ZipFile, entry: zipfile.ZipInfo) -> int:
    """The rows of one sheet's XML, counted while unpacking it a mebibyte at a time."""
    count = 0
    tail = b""
    with archive.open(entry) as handle:
        while True:
            piece = handle.read(1 << 20)
            if not piece:
                return count + len(_ROW.findall(tail))
            block = tail + piece
            # A row tag starting in the last bytes may be cut: it is counted with the next.
            cut = max(0, len(block) - 64)
            count += sum(1 for found in _ROW.finditer(block) if found.start() < cut)
            tail = block[cut:]


def check_workbook(path: Path, name: str, problems: Problems) -> bool:
    """Whether the workbook at ``path`` may be handed to openpyxl; records why not.

    Parameters
    ----------
    path : pathlib.Path
        The workbook.
    name : str
        Its name in problems (``case.xlsx``).
    problems : Problems
        Where a problem is recorded.

    Returns
    -------
    bool
        ``False`` when the archive unpacks to more than :data:`LARGEST_WORKBOOK` bytes,
        holds more than :data:`LARGEST_ENTRIES` entries, or a sheet has more than
        :data:`LARGEST_SHEET_ROWS` rows. A file that is not a zip archive passes (openpyxl
        then says it cannot open it).
    """
    fix = "split the case, or give it as a case folder of CSV files, which has no such limit"
    try:
        with zipfile.ZipFile(path) as archive:
            entries = archive.infolist()
            if len(entries) > LARGEST_ENTRIES:
                problems.add(
                    name,
                    f"the workbook holds {len(entries):,} parts, more than "
                    f"the {LARGEST_ENTRIES:,} a case workbook may hold",
                    fix,
                )
                return False
            unpacked = sum(entry.file_size for entry in entries)
            if unpacked > LARGEST_WORKBOOK:
                problems.add(
                    name,
                    f"the workbook unpacks to {unpacked:,} bytes, more than "
                    f"the {LARGEST_WORKBOOK:,} bytes (512 MiB) a case workbook "
                    "may hold",
                    fix,
                )
                return False
            for entry in entries:
                if _SHEET.match(entry.filename):
                    rows = _sheet_rows(archive, entry)
                    if rows > LARGEST_SHEET_ROWS:
                        problems.add(
                            name,
                            f"a sheet ({entry.filename}) has {rows:,} rows, more "
                            f"than the {LARGEST_SHEET_ROWS:,} a sheet may hold",
                            fix,
                        )
                        return False
    except Exception:  # a damaged archive raises many kinds (zip, zlib, EOF, OS errors)
        return True  # openpyxl's own message then names the fault
    return True
