"""The manifest of a report, and checking a report against its inputs.

``manifest.json`` beside ``report.html`` records what a reader needs to reproduce the report,
and names no absolute path of the machine it was made on:

- ``tool`` and its version, ``environment`` (Python and the version of every dependency),
  ``created`` (the time of the run), ``output_id`` (the id in the folder's marker,
  :data:`delay.output.MARKER`);
- ``case``: ``path``, the case folder's (or workbook's) name; ``form`` (``folder`` or
  ``workbook``); ``relative_to_report``, where the case was seen from the report folder
  (``../case``), or ``null`` when the two shared no folder but the file system's root (the
  relative path would then spell out the absolute one); and the project's name;
- ``options`` (methods, title) and ``settings`` of the case;
- ``inputs``: every input file, by its path relative to the case folder, with its size and
  SHA-256;
- ``outputs``: every file the report wrote (``report.html``, ``tables.xlsx``,
  ``tables/*.csv``; all but the manifest and the marker), with size and SHA-256;
- ``tables``: the fingerprint of every table (the SHA-256 of its canonical CSV, see
  :mod:`reports.tables`).

:func:`verify` trusts nothing in the folder. The manifest is checked first, before any file
is read through it: at most :data:`MAX_BYTES`, nested at most :data:`MAX_DEPTH` deep (counted
on the text, before it is parsed), and every key, type and path as :func:`read_manifest`
states (paths relative, no ``..``, no absolute path, no key repeated). A manifest that fails
is one line and exit status 2. Then, listing every difference:

1. every file in the report folder is hashed: a file changed, missing, or not written with
   the report (a forged ``tables/x.csv``) is listed; so is a missing or foreign marker;
2. the case is found where the manifest says (relative to the report) or where ``--case``
   says, loaded again, and every input it reads is hashed: a file changed, missing or newly
   read is listed (only files inside the case are read; no hash is ever printed);
3. the analysis is re-run with the same options; each table whose fingerprint differs, or
   that is new or gone, is listed.

The report is confirmed when nothing differs. The manifest is not signed: a hand that
rewrites the manifest's hashes as well as ``report.html`` or ``tables.xlsx`` is not caught
by step 1; ``tables/*.csv`` are caught by step 3 even then.
"""

from __future__ import annotations

import dataclasses
import datetime as dt
import hashlib
import json
import os
import platform
import re
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np

from delay.errors import CaseError, ReconciliationError
from delay.output import MARKER, OS_LITTER, read_marker

__all__ = [
    "make_manifest",
    "record_outputs",
    "input_files",
    "read_manifest",
    "verify",
    "Verification",
    "Difference",
    "VerifyError",
    "MANIFEST",
    "FORMAT",
    "MAX_BYTES",
    "MAX_DEPTH",
]

MANIFEST = "manifest.json"
FORMAT = "delay-report-manifest/3"

#: The largest manifest read (a manifest of a case of 240 updates is a few hundred KB).
MAX_BYTES = 32 << 20
#: The deepest nesting of objects and lists in a manifest (its own layout is 4 deep; the
#: case's settings add what case.toml nests, cut at :data:`_SETTINGS_DEPTH`).
MAX_DEPTH = 64
_SETTINGS_DEPTH = 48
_MAX_ITEMS = 1_000_000
_METHODS = ("windows", "impacted", "tia", "collapsed", "asbuilt")
_HEX64 = re.compile(r"[0-9a-f]{64}\Z")
_HEX32 = re.compile(r"[0-9a-f]{32}\Z")
_KEY = re.compile(r"[A-Za-z0-9_]{1,31}\Z")
_REMAKE = "make the report again with delay report (the manifest must be as the toolkit wrote it)"


class VerifyError(Exception):
    """``delay verify`` cannot start: the manifest is missing, unreadable or malformed, or
    the case is not where it says. One line; the command line exits with status 2.

    Parameters
    ----------
    where : str or pathlib.Path
        The file or folder concerned, as shown.
    message : str
        What is wrong.
    fix : str
        What to do.
    """

    def __init__(self, where: str | Path, message: str, fix: str):
        super().__init__(where, message, fix)
        self.where, self.message, self.fix = str(where), message, fix

    def __str__(self) -> str:
        return f"{self.where}: {self.message} - {self.fix}"


def _sha256(path: Path) -> str:
    digest = hashlib.sha256()
    with open(path, "rb") as handle:
        for block in iter(lambda: handle.read(1 << 20), b""):
            digest.update(block)
    return digest.hexdigest()


# -- making the manifest ----------------------------------------------------------------------
def _case_base(root: Path) -> Path:
    return root if root.is_dir() else root.parent


def _input_path(path: Path, base: Path) -> str:
    try:
        return Path(path).relative_to(base).as_posix()
    except ValueError:  # the loader reads inside the case only; a path it spelled another way
        return Path(os.path.realpath(path)).relative_to(os.path.realpath(base)).as_posix()


def input_files(case) -> list[dict[str, Any]]:
    """Every file the case was read from.

    Parameters
    ----------
    case : delay.model.Case
        A loaded case.

    Returns
    -------
    list of dict
        ``path`` (relative to the case folder, or the workbook's name), ``bytes`` and
        ``sha256`` of each file, sorted by path.
    """
    base = _case_base(Path(case.root))
    rows = []
    for path in dict.fromkeys(Path(p) for p in case.input_files):
        rows.append({"path": _input_path(path, base), "bytes": path.stat().st_size, "sha256": _sha256(path)})
    return sorted(rows, key=lambda r: r["path"])


def _plain(value, depth: int = 0):
    if depth > _SETTINGS_DEPTH:
        return f"(nested deeper than {_SETTINGS_DEPTH} levels: see the case's own file)"
    if isinstance(value, (dt.date, dt.datetime)):
        return value.isoformat()
    if isinstance(value, dict):
        return {str(k): _plain(v, depth + 1) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_plain(v, depth + 1) for v in value]
    if isinstance(value, (str, int, float, bool)) or value is None:
        return value
    return str(value)


#: Recorded when the installed package's own list of dependencies cannot be read.
_DEPENDENCIES = (
    "pandas",
    "numpy",
    "networkx",
    "plotly",
    "jinja2",
    "click",
    "rich",
    "markdown-it-py",
    "openpyxl",
    "numba",
)


def _environment() -> dict[str, str]:
    """Python and the installed version of every dependency of the toolkit."""
    from importlib import metadata

    names = list(_DEPENDENCIES)
    try:
        required = metadata.requires("delay-toolkit") or []
        names = [re.split(r"[\s<>=!~;\[(]", r, maxsplit=1)[0] for r in required if "extra ==" not in r] or names
    except metadata.PackageNotFoundError:
        pass
    versions = {"python": platform.python_version()}
    for name in names:
        try:
            versions[name] = metadata.version(name)
        except metadata.PackageNotFoundError:
            versions[name] = "not installed"
    return versions


def _relative_location(root: Path, out_dir: Path) -> str | None:
    """``root`` as seen from ``out_dir``, or ``None`` when they share no folder but the
    root of the file system (or lie on different drives)."""
    try:
        common = Path(os.path.commonpath([root, out_dir]))
    except ValueError:
        return None
    if common.parent == common:
        return None
    return Path(os.path.relpath(root, out_dir)).as_posix()


def make_manifest(content, out_dir: Path, created: dt.datetime | None = None, *, output_id: str = "") -> dict[str, Any]:
    """The manifest of a report of ``content`` that will be at ``out_dir``, without its
    ``outputs`` (:func:`record_outputs` adds them once the files are written).

    Parameters
    ----------
    content : reports.builder.ReportContent
        The report's content (:func:`reports.builder.compute`).
    out_dir : pathlib.Path
        Where the report folder will be (the case is recorded relative to it).
    created : datetime.datetime, optional
        The time of the run; default now (UTC).
    output_id : str, default ""
        The id of the report folder's marker.

    Returns
    -------
    dict
        Ready for ``json.dumps``.
    """
    from delay import __version__

    case = content.case
    root = Path(os.path.realpath(case.root))
    created = created or dt.datetime.now(dt.UTC)
    settings = case.settings
    return {
        "format": FORMAT,
        "tool": {"name": "delay-toolkit", "version": __version__},
        "output_id": output_id,
        "created": created.isoformat(timespec="seconds"),
        "environment": _environment(),
        "case": {
            "path": root.name,
            "form": "folder" if root.is_dir() else "workbook",
            "relative_to_report": _relative_location(root, Path(os.path.realpath(out_dir))),
            "project": settings.project.name,
        },
        "options": {"methods": list(content.methods), "title": content.title},
        "settings": _plain(
            {
                part: dataclasses.asdict(getattr(settings, part))
                for part in ("project", "schedule", "commercial", "analysis")
            }
            | {"extra": dict(settings.extra)}
        ),
        "inputs": input_files(case),
        "outputs": [],
        "tables": [
            {
                "key": t.key,
                "title": t.title,
                "section": t.section,
                "rows": int(len(t.frame)),
                "columns": t.columns,
                "file": f"tables/{t.key}.csv",
                "sha256": t.fingerprint(),
            }
            for t in content.tables
        ],
    }


def _report_files(folder: Path) -> dict[str, Path]:
    """Every entry of a report folder but the manifest, the marker and operating-system
    litter, by its path relative to the folder (links are not followed)."""
    found: dict[str, Path] = {}

    def walk(at: Path, prefix: str) -> None:
        for entry in sorted(os.scandir(at), key=lambda e: e.name):
            if (not prefix and entry.name in (MANIFEST, MARKER)) or entry.name in OS_LITTER:
                continue
            if entry.is_dir(follow_symlinks=False):
                walk(Path(entry.path), prefix + entry.name + "/")
            else:
                found[prefix + entry.name] = Path(entry.path)

    walk(folder, "")
    return found


def record_outputs(manifest: dict, folder: Path) -> dict:
    """The manifest with the report's files recorded.

    Parameters
    ----------
    manifest : dict
        From :func:`make_manifest`.
    folder : pathlib.Path
        The report folder, every file written but the manifest.

    Returns
    -------
    dict
        ``manifest`` with ``outputs``: every file now in ``folder`` (all but the manifest,
        the marker and operating-system litter), with its size and SHA-256.
    """
    outputs = [
        {"path": name, "bytes": path.stat().st_size, "sha256": _sha256(path)}
        for name, path in _report_files(folder).items()
    ]
    return manifest | {"outputs": outputs}


# -- reading the manifest, trusting nothing ---------------------------------------------------
def _depth(text: str) -> int:
    """The deepest nesting of ``[`` and ``{`` outside strings, counted without parsing."""
    bare = re.sub(r'"(?:[^"\\]|\\.)*"', '""', text)
    codes = np.frombuffer(bare.encode("utf-8"), dtype=np.uint8)
    steps = np.isin(codes, (0x5B, 0x7B)).astype(np.int64) - np.isin(codes, (0x5D, 0x7D)).astype(np.int64)
    return int(np.cumsum(steps).max(initial=0))


def _no_repeats(pairs):
    keys = [k for k, _ in pairs]
    if len(set(keys)) != len(keys):
        repeated = next(k for k in keys if keys.count(k) > 1)
        raise ValueError(f"the key '{repeated[:40]}' is given twice in one object")
    return dict(pairs)


class _Schema:
    """The manifest's layout, checked by hand: each check names the place and the fault."""

    def __init__(self, shown: str):
        self.shown = shown

    def fail(self, where: str, what: str):
        raise VerifyError(self.shown, f"{where or 'the manifest'} {what}", _REMAKE)

    def object(self, value, where: str, keys: dict[str, Callable]) -> None:
        if not isinstance(value, dict):
            self.fail(where, "is not an object")
        for key in keys:
            if key not in value:
                self.fail(where, f"has no '{key}'")
        for key in value:
            if key not in keys:
                self.fail(where, f"has a key the toolkit does not write ('{str(key)[:40]}')")
        for key, check in keys.items():
            check(value[key], f"{where}.{key}" if where else key)

    def text(self, value, where: str, limit: int = 100_000) -> None:
        if not isinstance(value, str):
            self.fail(where, "is not text")
        if len(value) > limit or "\x00" in value:
            self.fail(where, "is not a plausible text (too long, or a NUL character)")

    def optional_text(self, value, where: str) -> None:
        if value is not None:
            self.text(value, where)

    def count(self, value, where: str) -> None:
        if isinstance(value, bool) or not isinstance(value, int) or value < 0:
            self.fail(where, "is not a whole number of 0 or more")

    def pattern(self, regex: re.Pattern, what: str) -> Callable:
        def check(value, where):
            if not isinstance(value, str) or not regex.match(value):
                self.fail(where, f"is not {what}")

        return check

    def items(self, check: Callable, unique: str | None = None) -> Callable:
        def run(value, where):
            if not isinstance(value, list):
                self.fail(where, "is not a list")
            if len(value) > _MAX_ITEMS:
                self.fail(where, f"has more than {_MAX_ITEMS:,} items")
            for number, item in enumerate(value):
                check(item, f"{where}[{number}]")
            if unique is not None:
                names = [item[unique] for item in value]
                if len(set(names)) != len(names):
                    self.fail(where, f"names one {unique} twice")

        return run

    def relative_path(self, value, where: str) -> None:
        """A path inside its folder: relative, ``/``-separated, no ``..``, ``.`` or empty part."""
        self.text(value, where, limit=1024)
        if not value or value.startswith(("/", "\\")) or re.match(r"[A-Za-z]:", value) or "\\" in value:
            self.fail(where, f"'{value[:80]}' is not a relative path inside its folder (absolute, or with '\\')")
        parts = value.split("/")
        if ".." in parts:
            self.fail(where, f"'{value[:80]}' climbs out of its folder ('..')")
        if any(part in ("", ".") for part in parts):
            self.fail(where, f"'{value[:80]}' is not a plain relative path (an empty or '.' part)")

    def name(self, value, where: str) -> None:
        self.text(value, where, limit=255)
        if not value or value in (".", "..") or "/" in value or "\\" in value:
            self.fail(where, "is not the name of one folder or file")

    def location(self, value, where: str, name: str) -> None:
        """``relative_to_report``: ``..`` parts, then plain parts ending with the case's name."""
        if value is None:
            return
        self.text(value, where, limit=4096)
        if value.startswith(("/", "\\")) or re.match(r"[A-Za-z]:", value) or "\\" in value:
            self.fail(where, "is an absolute path")
        parts = value.split("/")
        climbs = next((i for i, p in enumerate(parts) if p != ".."), len(parts))
        rest = parts[climbs:]
        if not rest or any(p in ("", ".", "..") for p in rest) or rest[-1] != name:
            self.fail(where, f"is not a path from the report to the case '{name[:80]}'")

    def anything(self, value, where: str) -> None:
        if not isinstance(value, dict):
            self.fail(where, "is not an object")

    def check(self, manifest) -> None:
        if not isinstance(manifest, dict):
            self.fail("", "is not a JSON object")
        found = manifest.get("format")
        if found != FORMAT:
            if isinstance(found, str) and found.startswith("delay-report-manifest/"):
                raise VerifyError(
                    self.shown,
                    f"the manifest is of format '{found[:40]}', made by another version "
                    f"of the toolkit (this one reads '{FORMAT}')",
                    "make the report again with this version",
                )
            self.fail("", "is not a report manifest of this toolkit (no 'format' of its own)")
        case = manifest.get("case")
        name = case.get("path") if isinstance(case, dict) else None
        entry = {"path": self.relative_path, "bytes": self.count, "sha256": self.pattern(_HEX64, "a SHA-256")}
        self.object(
            manifest,
            "",
            {
                "format": self.text,
                "tool": lambda v, w: self.object(v, w, {"name": self.text, "version": self.text}),
                "output_id": self.pattern(_HEX32, "the id of the report's marker (32 hex digits)"),
                "created": self.text,
                "environment": lambda v, w: [self.text(x, f"{w}.{k}") for k, x in self._mapping(v, w).items()],
                "case": lambda v, w: self.object(
                    v,
                    w,
                    {
                        "path": self.name,
                        "form": self.pattern(re.compile(r"(folder|workbook)\Z"), "folder or workbook"),
                        "relative_to_report": lambda x, y: self.location(x, y, str(name)),
                        "project": self.text,
                    },
                ),
                "options": lambda v, w: self.object(
                    v,
                    w,
                    {
                        "methods": self.items(self.pattern(re.compile("(" + "|".join(_METHODS) + r")\Z"), "a method")),
                        "title": self.optional_text,
                    },
                ),
                "settings": self.anything,
                "inputs": self.items(lambda v, w: self.object(v, w, entry), unique="path"),
                "outputs": self.items(lambda v, w: self.object(v, w, entry), unique="path"),
                "tables": self.items(
                    lambda v, w: self.object(
                        v,
                        w,
                        {
                            "key": self.pattern(_KEY, "a table key"),
                            "title": self.text,
                            "section": self.text,
                            "rows": self.count,
                            "columns": self.items(self.text),
                            "file": self.relative_path,
                            "sha256": self.pattern(_HEX64, "a SHA-256"),
                        },
                    ),
                    unique="key",
                ),
            },
        )
        self._agree(manifest)

    def _mapping(self, value, where: str) -> dict:
        if not isinstance(value, dict):
            self.fail(where, "is not an object")
        return value

    def _agree(self, manifest: dict) -> None:
        """The parts that must agree with each other."""
        outputs = {o["path"]: o for o in manifest["outputs"]}
        for number, table in enumerate(manifest["tables"]):
            where = f"tables[{number}]"
            if table["file"] != f"tables/{table['key']}.csv":
                self.fail(f"{where}.file", f"is not tables/{table['key']}.csv")
            written = outputs.get(table["file"])
            if written is None or written["sha256"] != table["sha256"]:
                self.fail(where, "has a fingerprint that is not the hash recorded for its file among the outputs")
        if manifest["case"]["form"] == "workbook" and any(
            i["path"] != manifest["case"]["path"] for i in manifest["inputs"]
        ):
            self.fail("inputs", "names a file other than the workbook of a workbook case")


def read_manifest(folder: str | Path) -> dict:
    """The manifest of a report folder, checked before it is trusted (module docstring).

    Parameters
    ----------
    folder : str or pathlib.Path
        A report folder.

    Returns
    -------
    dict
        The manifest, every key, type and path as the toolkit writes them.

    Raises
    ------
    VerifyError
        No manifest, too large, nested too deep, not JSON, or not the toolkit's layout.
    """
    path = Path(folder) / MANIFEST
    shown = path.as_posix()
    if path.is_symlink() or not path.is_file():
        raise VerifyError(
            shown,
            "there is no manifest.json in this folder"
            if not path.is_symlink()
            else "the manifest is a link, not the file the report wrote",
            "give the folder that delay report wrote",
        )
    size = path.stat().st_size
    if size > MAX_BYTES:
        raise VerifyError(
            shown, f"the manifest is {size:,} bytes; a report's manifest is at most {MAX_BYTES:,}", _REMAKE
        )
    with open(path, "rb") as handle:
        data = handle.read(MAX_BYTES + 1)
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError:
        raise VerifyError(shown, "the manifest is not UTF-8 text", _REMAKE) from None
    if len(data) > MAX_BYTES:
        raise VerifyError(shown, f"the manifest is more than {MAX_BYTES:,} bytes", _REMAKE)
    depth = _depth(text)
    if depth > MAX_DEPTH:
        raise VerifyError(
            shown, f"the manifest nests {depth:,} levels deep; a report's manifest nests at most {MAX_DEPTH}", _REMAKE
        )
    try:
        manifest = json.loads(text, object_pairs_hook=_no_repeats)
    except json.JSONDecodeError as error:
        raise VerifyError(
            shown,
            f"the manifest is not readable as JSON ({error.msg} at line {error.lineno}, column {error.colno})",
            _REMAKE,
        ) from None
    except (ValueError, RecursionError) as error:
        raise VerifyError(shown, f"the manifest is not readable as JSON ({str(error)[:120]})", _REMAKE) from None
    _Schema(shown).check(manifest)
    return manifest


# -- verify -----------------------------------------------------------------------------------
@dataclass(frozen=True)
class Difference:
    """One thing that differs between a report folder and what it was made from.

    Parameters
    ----------
    kind : str
        ``output changed``, ``output missing``, ``output added``, ``table file changed``,
        ``input changed``, ``input missing``, ``input added``, ``input outside the case``,
        ``table differs``, ``table missing``, ``table new``, ``case does not load`` or
        ``analysis fails``.
    what : str
        What it concerns (a file, a table key).
    detail : str, optional
        The difference in words.
    """

    kind: str
    what: str
    detail: str = ""

    def __str__(self) -> str:
        return f"{self.kind}: {self.what}" + (f" ({self.detail})" if self.detail else "")


@dataclass(frozen=True)
class Verification:
    """The outcome of :func:`verify`.

    Parameters
    ----------
    folder : pathlib.Path
        The report folder checked.
    case : pathlib.Path
        The case folder or workbook it was checked against.
    differences : tuple of Difference
        Everything that differs; empty when the report is confirmed.
    tables : int
        Tables the manifest lists.
    inputs : int
        Input files the manifest lists.
    notes : tuple of str, optional
        Notes that are not differences (a report made by another version).
    outputs : int, default 0
        Files of the report the manifest lists.
    """

    folder: Path
    case: Path
    differences: tuple[Difference, ...]
    tables: int
    inputs: int
    notes: tuple[str, ...] = field(default=())
    outputs: int = 0

    @property
    def confirmed(self) -> bool:
        """True when nothing differs."""
        return not self.differences

    def lines(self) -> list[str]:
        """The outcome in lines, as ``delay verify`` prints them.

        Returns
        -------
        list of str
            One line per note and per difference, then the verdict.
        """
        out = list(self.notes)
        if self.confirmed:
            files = "input file" if self.inputs == 1 else "input files"
            out.append(
                f"Confirmed: {self.inputs} {files} unchanged, the {self.outputs} files of the report as "
                f"written, and all {self.tables} tables reproduced from the case at {self.case}."
            )
        else:
            out += [str(d) for d in self.differences]
            out.append(
                f"{len(self.differences)} difference(s) found: the report in {self.folder} does not match its inputs."
            )
        return out


def _check_outputs(folder: Path, manifest: dict) -> list[Difference]:
    """Every file of the report folder against the manifest's outputs, and the marker."""
    differences = []
    marker = read_marker(folder)
    if marker is None:
        differences.append(Difference("output missing", MARKER, "the marker of the report folder"))
    elif marker["id"] != manifest["output_id"]:
        differences.append(Difference("output changed", MARKER, "its id is not the one the manifest records"))
    tables = {t["file"] for t in manifest["tables"]}
    present = _report_files(folder)
    recorded = {o["path"]: o for o in manifest["outputs"]}
    for name, item in recorded.items():
        path = present.get(name)
        kind = "table file changed" if name in tables else "output changed"
        if path is None:
            differences.append(Difference(kind if name in tables else "output missing", name, "missing"))
        elif path.is_symlink() or not path.is_file():
            differences.append(Difference(kind, name, "it is no longer a plain file"))
        elif path.stat().st_size != item["bytes"] or _sha256(path) != item["sha256"]:
            detail = (
                "it no longer matches the fingerprint made with the report"
                if name in tables
                else "its content is not what the report wrote"
            )
            differences.append(Difference(kind, name, detail))
    for name in sorted(set(present) - set(recorded)):
        differences.append(Difference("output added", name, "the report did not write it"))
    return differences


def _locate_case(folder: Path, manifest: dict, given: str | Path | None) -> Path:
    case = manifest["case"]
    if given is not None:
        root, shown = Path(given), str(given)
    else:
        location = case["relative_to_report"]
        if location is None:
            raise VerifyError(
                folder / MANIFEST,
                f"the report does not record where the case '{case['path']}' was (it shared no folder with the report)",
                "give its folder with --case",
            )
        root, shown = Path(os.path.realpath(folder)) / location, location
        if not os.path.lexists(root):
            raise VerifyError(
                folder / MANIFEST,
                f"the case '{case['path']}' is not at {location} beside the report",
                "give its folder with --case",
            )
    if not ((root.is_dir() and (root / "case.toml").is_file()) or root.is_file()):
        raise VerifyError(shown, "there is no case here (no case.toml)", "give the case folder with --case")
    return root


def _check_inputs(root: Path, manifest: dict, case) -> list[Difference]:
    """The recorded inputs against the files the loader reads now (``case``), or, when the
    case does not load, against the files inside the case."""
    differences = []
    base = _case_base(root)
    recorded = {i["path"]: i for i in manifest["inputs"]}
    now = None if case is None else {_input_path(Path(p), base): Path(p) for p in case.input_files}
    inside = Path(os.path.realpath(base))
    for name, item in recorded.items():
        if now is not None:
            file = now.get(name)
        else:
            file = base / name
            if not Path(os.path.realpath(file)).is_relative_to(inside):
                differences.append(
                    Difference("input outside the case", name, "a link out of the case folder; not read")
                )
                continue
        if file is None or not file.is_file():
            differences.append(Difference("input missing", name))
        elif file.stat().st_size != item["bytes"] or _sha256(file) != item["sha256"]:
            differences.append(Difference("input changed", name, "its content is not what the report was made from"))
    for name in sorted(set(now or ()) - set(recorded)):
        differences.append(Difference("input added", name, "read by the loader now, not when the report was made"))
    return differences


def _check_tables(case, manifest: dict) -> list[Difference]:
    """The analysis re-run with the report's options, its tables against the fingerprints."""
    from .builder import compute

    options = manifest["options"]
    try:
        content = compute(case, options["methods"] or None, options["title"])
    except (CaseError, ReconciliationError) as error:
        lines = [str(p) for p in error.problems] if isinstance(error, CaseError) else [str(error)]
        return [Difference("analysis fails", line) for line in lines]
    differences = []
    again = content.fingerprints()
    before = {t["key"]: t for t in manifest["tables"]}
    for key, item in before.items():
        if key not in again:
            differences.append(Difference("table missing", key, "the analysis no longer gives it"))
        elif again[key] != item["sha256"]:
            rows = len(content.table(key).frame)
            detail = f"{item['rows']} rows before, {rows} now" if rows != item["rows"] else "same rows, other values"
            differences.append(Difference("table differs", key, detail))
    for key in again:
        if key not in before:
            differences.append(Difference("table new", key, "the analysis gives a table the report does not hold"))
    return differences


def verify(folder: str | Path, case_path: str | Path | None = None) -> Verification:
    """Check a report folder against its manifest and its inputs (see the module docstring).

    Parameters
    ----------
    folder : str or pathlib.Path
        A folder written by :func:`reports.build`.
    case_path : str or pathlib.Path, optional
        The case, when it is no longer where the manifest says.

    Returns
    -------
    Verification
        ``confirmed`` is true when nothing differs; ``differences`` lists the rest (a case
        that no longer loads is a difference, not an error).

    Raises
    ------
    VerifyError
        No manifest, or one that is too large, too deep, unreadable or not of the
        toolkit's layout; or no case where the manifest or ``case_path`` says.

    Examples
    --------
    >>> import pathlib, tempfile
    >>> from delay.case import load_case
    >>> from delay.synth import synthesise
    >>> from reports.writer import build
    >>> folder = tempfile.TemporaryDirectory()
    >>> case = load_case(synthesise(pathlib.Path(folder.name) / "case", 20, updates=2))
    >>> report = build(case, pathlib.Path(folder.name) / "report", methods="windows")
    >>> verify(report).confirmed
    True
    >>> folder.cleanup()
    """
    from delay import __version__
    from delay.case import load_case

    folder = Path(folder)
    manifest = read_manifest(folder)
    root = _locate_case(folder, manifest, case_path)
    notes: list[str] = []
    version = manifest["tool"]["version"]
    if version != __version__:
        notes.append(f"note: the report was made by version {version[:40]}; this is version {__version__}")
    differences = _check_outputs(folder, manifest)
    counts = {"tables": len(manifest["tables"]), "inputs": len(manifest["inputs"]), "outputs": len(manifest["outputs"])}
    try:
        case = load_case(root)
    except CaseError as error:
        differences += _check_inputs(root, manifest, None)
        differences += [Difference("case does not load", str(problem)) for problem in error.problems]
        return Verification(folder, root, tuple(differences), notes=tuple(notes), **counts)
    differences += _check_inputs(root, manifest, case)
    differences += _check_tables(case, manifest)
    return Verification(folder, root, tuple(differences), notes=tuple(notes), **counts)
