"""Writing outputs safely: to a temporary name first, then moved into place.

A reader never sees half a file or half a folder of results, and a failure leaves what was
there before untouched.
"""

from __future__ import annotations

import contextlib
import os
import shutil
import tempfile
from pathlib import Path
from typing import Callable, Iterator

import pandas as pd

__all__ = ["write_text", "write_bytes", "write_through", "replace_directory", "json_date", "json_int"]


def write_through(path: str | Path, write: Callable[[str], object], suffix: str = ".part") -> Path:
    """Have ``write(temporary)`` write a file under a temporary name in ``path``'s folder,
    then move it to ``path``; on an exception the temporary file is removed and ``path`` is
    left as it was. ``suffix`` ends the temporary name (a writer may choose its format by
    it)."""
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    handle, temporary = tempfile.mkstemp(prefix=f".{path.name}.", suffix=suffix, dir=path.parent)
    os.close(handle)
    try:
        write(temporary)
        os.chmod(temporary, 0o666 & ~_umask())  # mkstemp makes 0600; give the usual mode
        os.replace(temporary, path)
    except BaseException:
        with contextlib.suppress(FileNotFoundError):
            os.unlink(temporary)
        raise
    return path


def write_bytes(path: str | Path, data: bytes) -> Path:
    """Write ``data`` to ``path`` through a temporary file in the same folder."""
    return write_through(path, lambda temporary: Path(temporary).write_bytes(data))


def _umask() -> int:
    current = os.umask(0)
    os.umask(current)
    return current


def write_text(path: str | Path, text: str) -> Path:
    """Write UTF-8 ``text`` to ``path`` through a temporary file."""
    return write_bytes(path, text.encode("utf-8"))


@contextlib.contextmanager
def replace_directory(target: str | Path) -> Iterator[Path]:
    """Build a folder under a temporary name; on success it replaces ``target`` whole.

    >>> with replace_directory("out/demo") as folder:   # doctest: +SKIP
    ...     (folder / "summary.json").write_text("{}")

    On an exception the temporary folder is removed and ``target`` is left as it was.
    """
    target = Path(target)
    target.parent.mkdir(parents=True, exist_ok=True)
    building = Path(tempfile.mkdtemp(prefix=f".{target.name}.", suffix=".part", dir=target.parent))
    try:
        yield building
    except BaseException:
        shutil.rmtree(building, ignore_errors=True)
        raise
    old = None
    if target.exists():
        old = target.parent / f".{target.name}.old-{os.getpid()}"
        os.replace(target, old)
    os.replace(building, target)
    if old is not None:
        shutil.rmtree(old, ignore_errors=True)


def json_date(value) -> str | None:
    """A date cell of a result table for JSON: ISO ``YYYY-MM-DD``, ``None`` when blank."""
    return None if pd.isna(value) else pd.Timestamp(value).date().isoformat()


def json_int(value) -> int | None:
    """A whole-number cell of a result table for JSON, ``None`` when blank."""
    return None if pd.isna(value) else int(value)
