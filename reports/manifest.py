"""The manifest of a report, and checking a report against its inputs.

``manifest.json`` beside ``report.html`` records what a reader needs to reproduce the report:
the tool and its version, the case's folder (absolute, and relative to the report), the
report's options, the case's settings, the SHA-256 of every input file, the time of the run
and the fingerprint of every table (the SHA-256 of its canonical CSV, see
:mod:`reports.tables`).

:func:`verify` checks a report folder in three steps and lists every difference:

1. each input file named in the manifest is hashed again; a file changed, missing or newly
   read by the loader is listed;
2. each ``tables/<key>.csv`` of the folder is hashed and compared with its fingerprint (the
   report's own appendix changed after it was made);
3. the case is loaded again from the same folder and the analysis re-run with the same
   options; each table whose fingerprint differs, or that is new or gone, is listed.

The report is confirmed when nothing differs.
"""

from __future__ import annotations

import dataclasses
import datetime as dt
import hashlib
import json
import os
import platform
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from delay.errors import CaseError, Problem, ReconciliationError

__all__ = ["make_manifest", "input_files", "verify", "Verification", "Difference", "MANIFEST", "FORMAT"]

MANIFEST = "manifest.json"
FORMAT = "delay-report-manifest/1"


def _sha256(path: Path) -> str:
    digest = hashlib.sha256()
    with open(path, "rb") as handle:
        for block in iter(lambda: handle.read(1 << 20), b""):
            digest.update(block)
    return digest.hexdigest()


def _relative(path: Path, root: Path) -> str:
    try:
        return path.resolve().relative_to(root.resolve()).as_posix()
    except ValueError:
        return path.resolve().as_posix()


def input_files(case) -> list[dict[str, Any]]:
    """Every file the case was read from: ``path`` (relative to the case folder, or the
    workbook's name), ``bytes`` and ``sha256``; sorted by path."""
    root = Path(case.root)
    base = root if root.is_dir() else root.parent
    rows = []
    for path in dict.fromkeys(Path(p) for p in case.input_files):
        rows.append({"path": _relative(path, base), "bytes": path.stat().st_size, "sha256": _sha256(path)})
    return sorted(rows, key=lambda r: r["path"])


def _plain(value):
    if isinstance(value, (dt.date, dt.datetime)):
        return value.isoformat()
    if isinstance(value, dict):
        return {str(k): _plain(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_plain(v) for v in value]
    if isinstance(value, (str, int, float, bool)) or value is None:
        return value
    return str(value)


def _environment() -> dict[str, str]:
    import jinja2
    import numpy
    import openpyxl
    import pandas
    import plotly

    return {"python": platform.python_version(), "numpy": numpy.__version__, "pandas": pandas.__version__,
            "plotly": plotly.__version__, "jinja2": jinja2.__version__, "openpyxl": openpyxl.__version__}


def make_manifest(content, out_dir: Path, created: dt.datetime | None = None) -> dict[str, Any]:
    """The manifest of a report of ``content`` written to ``out_dir``."""
    from delay import __version__

    case = content.case
    root = Path(case.root).resolve()
    created = created or dt.datetime.now(dt.timezone.utc)
    settings = case.settings
    return {
        "format": FORMAT,
        "tool": {"name": "delay-toolkit", "version": __version__},
        "created": created.isoformat(timespec="seconds"),
        "environment": _environment(),
        "case": {"path": root.as_posix(), "relative_to_report": Path(os.path.relpath(root, Path(out_dir).resolve()))
                 .as_posix(), "project": settings.project.name},
        "options": {"methods": list(content.methods), "title": content.title},
        "settings": _plain({part: dataclasses.asdict(getattr(settings, part))
                            for part in ("project", "schedule", "commercial", "analysis")}
                           | {"extra": dict(settings.extra)}),
        "inputs": input_files(case),
        "tables": [{"key": t.key, "title": t.title, "section": t.section, "rows": int(len(t.frame)),
                    "columns": t.columns, "file": f"tables/{t.key}.csv", "sha256": t.fingerprint()}
                   for t in content.tables],
        "not_available": list(content.missing),
    }


@dataclass(frozen=True)
class Difference:
    """One thing that differs: ``kind`` (``input changed``, ``input missing``, ``input
    added``, ``table file changed``, ``table differs``, ``table missing``, ``table new``,
    ``case does not load``, ``analysis fails``, ``options``), ``what`` it concerns and
    ``detail`` in words."""

    kind: str
    what: str
    detail: str = ""

    def __str__(self) -> str:
        return f"{self.kind}: {self.what}" + (f" ({self.detail})" if self.detail else "")


@dataclass(frozen=True)
class Verification:
    """The outcome of :func:`verify`."""

    folder: Path
    case: Path
    differences: tuple[Difference, ...]
    tables: int
    inputs: int
    notes: tuple[str, ...] = field(default=())

    @property
    def confirmed(self) -> bool:
        return not self.differences

    def lines(self) -> list[str]:
        out = list(self.notes)
        if self.confirmed:
            files = "input file" if self.inputs == 1 else "input files"
            out.append(f"Confirmed: {self.inputs} {files} unchanged and all {self.tables} tables reproduced "
                       f"from the case at {self.case}.")
        else:
            out += [str(d) for d in self.differences]
            out.append(f"{len(self.differences)} difference(s) found: the report in {self.folder} does not match "
                       "its inputs.")
        return out


def _read_manifest(folder: Path) -> dict:
    path = folder / MANIFEST
    shown = path.as_posix()
    if not path.is_file():
        raise CaseError(Problem(file=shown, message="there is no manifest.json in this folder",
                                fix="give the folder that delay report wrote"))
    try:
        manifest = json.loads(path.read_text(encoding="utf-8"))
    except (UnicodeDecodeError, json.JSONDecodeError) as error:
        raise CaseError(Problem(file=shown, message=f"not readable as JSON ({error})",
                                fix="give the folder that delay report wrote, with its manifest unchanged")) from None
    if not isinstance(manifest, dict) or manifest.get("format") != FORMAT:
        raise CaseError(Problem(file=shown, message="not a report manifest of this toolkit",
                                fix="give the folder that delay report wrote"))
    for key in ("case", "options", "inputs", "tables"):
        if key not in manifest:
            raise CaseError(Problem(file=shown, message=f"the manifest has no '{key}'",
                                    fix="make the report again with delay report"))
    return manifest


def _case_path(folder: Path, manifest: dict, given: str | Path | None) -> Path:
    if given is not None:
        return Path(given)
    case = manifest["case"]
    for candidate in (case.get("path"), (folder / case["relative_to_report"]) if case.get("relative_to_report")
                      else None):
        if candidate and Path(candidate).exists():
            return Path(candidate)
    raise CaseError(Problem(file=(folder / MANIFEST).as_posix(),
                            message=f"the case the report was made from is not at {case.get('path')}",
                            fix="give its folder with --case"))


def verify(folder: str | Path, case_path: str | Path | None = None) -> Verification:
    """Check a report folder against its inputs (see the module docstring).

    Parameters
    ----------
    folder: a folder written by :func:`reports.build`.
    case_path: the case, when it is no longer where the manifest says.

    Returns
    -------
    Verification
        ``confirmed`` is true when nothing differs; ``differences`` lists the rest.

    Raises
    ------
    CaseError: no readable manifest in ``folder``, or no case where it says.
    """
    from delay import __version__
    from delay.case import load_case

    from .builder import compute

    folder = Path(folder)
    manifest = _read_manifest(folder)
    root = _case_path(folder, manifest, case_path)
    base = root if root.is_dir() else root.parent
    differences: list[Difference] = []
    notes: list[str] = []
    version = manifest.get("tool", {}).get("version")
    if version and version != __version__:
        notes.append(f"note: the report was made by version {version}; this is version {__version__}")

    recorded = {i["path"]: i for i in manifest["inputs"]}
    for path, item in recorded.items():
        file = base / path if not Path(path).is_absolute() else Path(path)
        if not file.is_file():
            differences.append(Difference("input missing", path))
        elif _sha256(file) != item["sha256"]:
            differences.append(Difference("input changed", path, f"SHA-256 was {item['sha256'][:12]}..., now "
                                                                 f"{_sha256(file)[:12]}..."))

    for item in manifest["tables"]:
        file = folder / item.get("file", f"tables/{item['key']}.csv")
        if not file.is_file():
            differences.append(Difference("table file changed", file.relative_to(folder).as_posix(), "missing"))
        elif _sha256(file) != item["sha256"]:
            differences.append(Difference("table file changed", file.relative_to(folder).as_posix(),
                                          "it no longer matches the fingerprint made with the report"))

    try:
        case = load_case(root)
    except CaseError as error:
        for problem in error.problems:
            differences.append(Difference("case does not load", str(problem)))
        return Verification(folder, root, tuple(differences), len(manifest["tables"]), len(recorded), tuple(notes))
    now = {i["path"] for i in input_files(case)}
    for path in sorted(now - set(recorded)):
        differences.append(Difference("input added", path, "read by the loader now, not when the report was made"))
    options = manifest["options"]
    try:
        content = compute(case, options.get("methods") or None, options.get("title"))
    except (CaseError, ReconciliationError) as error:
        lines = [str(p) for p in error.problems] if isinstance(error, CaseError) else [str(error)]
        for line in lines:
            differences.append(Difference("analysis fails", line))
        return Verification(folder, root, tuple(differences), len(manifest["tables"]), len(recorded), tuple(notes))
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
    return Verification(folder, root, tuple(differences), len(before), len(recorded), tuple(notes))
