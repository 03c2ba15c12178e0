"""Writing outputs safely: one policy for every command that writes.

The policy
----------
- **What may be replaced.** An output folder must be new, empty, or a folder this toolkit
  wrote: one that holds the marker file :data:`MARKER` (the tool's name, a random id and the
  list of everything written there) and nothing else. A folder of the user's, or an earlier
  output to which the user has added a file, is refused. A file output (the IFC export) must
  be new or a file the toolkit wrote (the caller says how to recognise one).
- **What is never touched.** The case folder, anything inside it and any folder that holds
  it; any input file. Paths are compared after resolving symbolic links.
- **A refusal** raises :class:`OutputRefused` before anything is written: one line saying why
  and what to do; the command line prints it and exits with status 2.
- **Temporary name, then rename.** An output is built under a hidden temporary name beside
  its target (``.NAME.delay-PID-XXXXXXXX.part``) and moved into place whole; an earlier output
  is moved aside while the new one takes its place and then removed. A reader sees the old
  output or the new one, never half of one. Temporaries are removed when the writing fails
  or is interrupted, at exit, and at the next run (those of a process that no longer runs,
  such as one that was killed; an earlier output left aside by a killed run is put back).
- **Signals.** :func:`install_signal_handlers` turns SIGINT (Ctrl-C) and SIGTERM into
  :class:`Interrupted`, which unwinds through the writers (removing their temporaries); the
  moment of the swap itself is never interrupted (the signal waits until it is done).
- **Write failures.** An :class:`OSError` while writing (read-only file system, disk full,
  permissions) becomes :class:`OutputFailed` (one line); nothing half-written is left and an
  earlier output survives whole.
- **Modes.** Folders get ``0777`` and files ``0666``, less the umask, as any program's would.

CSV outputs
-----------
Every CSV the toolkit writes as an output goes through :func:`csv_safe` (or
:func:`csv_text`, :func:`write_csv`, :func:`copy_csv`): a text cell that starts with ``=``,
``+``, ``-``, ``@``, a tab or a carriage return gets a leading apostrophe, so that a
spreadsheet opening the file shows the text instead of running it as a formula (CSV
injection; the OWASP guidance on CSV injection recommends this prefix). Numbers stay
numbers, and so does text that reads as a plain decimal number (an optional sign, digits,
an optional decimal point and exponent: ``-3``, ``+2.5``, ``-1e3``): a spreadsheet reads
such text as that number and runs nothing. The case's own input files (``delay new``,
``delay import-ifc``) are not neutralised: they are read back by the toolkit, and an
apostrophe would change the ids and names that link the records.
"""

from __future__ import annotations

import atexit
import contextlib
import csv
import errno
import io
import json
import os
import re
import secrets
import shutil
import signal
import tempfile
import threading
import time
from collections.abc import Callable, Iterable, Iterator, Mapping
from pathlib import Path
from typing import TYPE_CHECKING

if TYPE_CHECKING:  # numpy and pandas are imported where a table is written, not at start-up
    import pandas as pd

__all__ = [
    "TOOL",
    "MARKER",
    "OutputRefused",
    "OutputFailed",
    "Interrupted",
    "check_folder_target",
    "check_file_target",
    "output_folder",
    "new_folder",
    "mark_folder",
    "finish_marker",
    "read_marker",
    "write_output_file",
    "write_through",
    "write_bytes",
    "write_text",
    "write_together",
    "replace_directory",
    "clean_stale",
    "critical",
    "install_signal_handlers",
    "describe_os_error",
    "neutralise",
    "csv_safe",
    "csv_text",
    "write_csv",
    "copy_csv",
]

#: The name the marker file carries; a folder whose marker names another tool is not ours.
TOOL = "delay-toolkit"

#: The marker file in every output folder the toolkit writes.
MARKER = "delay-output.json"

#: Files an operating system adds to a folder it shows (never a user's work): an earlier
#: output that holds them may still be replaced, and ``delay verify`` passes over them.
OS_LITTER = frozenset({".DS_Store", "Thumbs.db", "desktop.ini"})

_MARKER_LIMIT = 8 << 20
_ID = re.compile(r"[0-9a-f]{32}\Z")
_TEMPORARY = re.compile(r"\.(?P<name>.+)\.delay-(?P<pid>\d+)-[A-Za-z0-9_]+\.(?P<kind>part|old)(\.[A-Za-z0-9]+)?\Z")
_STALE_AFTER_SECONDS = 24 * 3600  # where a process cannot be asked whether it still runs


# -- errors -----------------------------------------------------------------------------------
class OutputRefused(Exception):
    """The output may not be written where asked; nothing was written.

    Parameters
    ----------
    target : str or Path
        The output as the user gave it.
    reason : str
        Why it is refused, in plain words.
    fix : str
        What to do.

    Examples
    --------
    >>> print(OutputRefused("out", "this is the case folder itself", "give a new folder outside the case"))
    out: this is the case folder itself - give a new folder outside the case; nothing was written
    """

    def __init__(self, target: str | Path, reason: str, fix: str):
        super().__init__(target, reason, fix)
        self.target, self.reason, self.fix = str(target), reason, fix

    def __str__(self) -> str:
        return f"{self.target}: {self.reason} - {self.fix}; nothing was written"


class OutputFailed(Exception):
    """An :class:`OSError` while writing an output; nothing half-written was left.

    Parameters
    ----------
    target : str or Path
        The output as the user gave it.
    error : OSError
        The error of the operating system.

    Examples
    --------
    >>> print(OutputFailed("out/report", OSError(28, "No space left on device")))  # doctest: +NORMALIZE_WHITESPACE
    out/report: cannot be written (No space left on device) - free some space on that disk, or write to
    another folder; nothing half-written was left and an earlier output is unchanged
    """

    def __init__(self, target: str | Path, error: OSError):
        super().__init__(target, error)
        self.target, self.error = str(target), error

    def __str__(self) -> str:
        return (
            f"{self.target}: cannot be written ({_reason(self.error)}) - {_os_fix(self.error)}; nothing "
            "half-written was left and an earlier output is unchanged"
        )


class Interrupted(BaseException):
    """SIGINT (Ctrl-C) or SIGTERM arrived.

    Raised by the handlers of :func:`install_signal_handlers`. A ``BaseException``, as
    ``KeyboardInterrupt`` is, so that no ``except Exception`` swallows it. Its
    ``exit_status`` is 128 plus the signal's number (130 for Ctrl-C, 143 for SIGTERM), as a
    shell reports it.

    Parameters
    ----------
    signum : int
        The signal's number.

    Examples
    --------
    >>> Interrupted(signal.SIGINT).exit_status, Interrupted(signal.SIGTERM).exit_status
    (130, 143)
    """

    def __init__(self, signum: int):
        super().__init__(signum)
        self.signum = signum

    @property
    def exit_status(self) -> int:
        """128 + the signal's number (130 for Ctrl-C), as a shell reports it."""
        return 128 + int(self.signum)

    def __str__(self) -> str:
        what = "by Ctrl-C" if self.signum == signal.SIGINT else f"by signal {signal.Signals(self.signum).name}"
        return (
            f"interrupted {what}: the run was stopped; nothing is left half-written and earlier outputs are unchanged"
        )


def _reason(error: OSError) -> str:
    return error.strerror or type(error).__name__


def _os_fix(error: OSError) -> str:
    code = getattr(error, "errno", None)
    if code in (errno.ENOSPC, getattr(errno, "EDQUOT", -1)):
        return "free some space on that disk, or write to another folder"
    if code == errno.EROFS:
        return "the file system is read-only: write to another folder"
    if code in (errno.EACCES, errno.EPERM):
        return "you may not write there: choose another folder, or get write permission"
    return "check the folder and try again"


def describe_os_error(error: OSError) -> str:
    """Describe in one line an :class:`OSError` that reached the command line (reading or writing).

    Parameters
    ----------
    error : OSError
        The error of the operating system.

    Returns
    -------
    str
        The file (or "the file system"), the reason and what to do.

    Examples
    --------
    >>> describe_os_error(PermissionError(13, "Permission denied", "case/case.toml"))
    'case/case.toml: Permission denied - you may not write there: choose another folder, or get write permission'
    """
    where = error.filename if error.filename is not None else "the file system"
    return f"{where}: {_reason(error)} - {_os_fix(error)}"


# -- signals ----------------------------------------------------------------------------------
class _Deferral(threading.local):
    depth = 0


_deferral = _Deferral()
_pending: list[int] = []


def _on_signal(signum, _frame):  # the signal module's signature
    if _deferral.depth:
        _pending.append(signum)
        return
    raise Interrupted(signum)


def install_signal_handlers() -> None:
    """Make SIGINT and SIGTERM raise :class:`Interrupted` (the command line calls this once).

    During :func:`critical` the signal waits until the block is done. Outside the main
    thread (where Python cannot set signal handlers) nothing is changed.
    """
    if threading.current_thread() is not threading.main_thread():
        return
    for name in ("SIGINT", "SIGTERM"):
        if hasattr(signal, name):
            signal.signal(getattr(signal, name), _on_signal)


@contextlib.contextmanager
def critical() -> Iterator[None]:
    """Hold SIGINT and SIGTERM while the block runs (moving an output into place).

    Where the platform can block signals (POSIX) they are blocked; with the handlers of
    :func:`install_signal_handlers` a signal that still arrives is kept and raised as
    :class:`Interrupted` when the block is done.

    Yields
    ------
    None
        Nothing: the block runs with the signals held.

    Raises
    ------
    Interrupted
        After the block (the outermost one, when blocks nest), for a signal kept while it
        ran.

    Examples
    --------
    >>> with critical():
    ...     print("moved into place")
    moved into place
    """
    blocked = None
    if hasattr(signal, "pthread_sigmask") and threading.current_thread() is threading.main_thread():
        blocked = signal.pthread_sigmask(signal.SIG_BLOCK, {signal.SIGINT, signal.SIGTERM})
    _deferral.depth += 1
    try:
        yield
    finally:
        _deferral.depth -= 1
        if blocked is not None:
            signal.pthread_sigmask(signal.SIG_SETMASK, blocked)
    if not _deferral.depth and _pending:
        signum = _pending[0]
        _pending.clear()
        raise Interrupted(signum)


# -- temporaries ------------------------------------------------------------------------------
_live: set[Path] = set()


def _remove(path: Path) -> None:
    with contextlib.suppress(OSError):
        if path.is_dir() and not path.is_symlink():
            shutil.rmtree(path, ignore_errors=True)
        else:
            path.unlink()


@atexit.register
def _remove_live() -> None:
    for path in list(_live):
        _remove(path)
        _live.discard(path)


def _prefix(name: str) -> str:
    return f".{name}.delay-{os.getpid()}-"


def _alive(pid: int, path: Path) -> bool:
    if pid == os.getpid():
        return True
    if os.name != "posix":  # os.kill would end the process there: go by age instead
        with contextlib.suppress(OSError):
            return time.time() - path.lstat().st_mtime < _STALE_AFTER_SECONDS
        return False
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except OSError:
        return True  # it runs, under another user
    return True


def clean_stale(folder: str | Path) -> None:
    """Remove the temporaries that runs which no longer run left in ``folder``.

    An earlier output that a killed run had moved aside, and whose place is still empty, is
    put back instead. Nothing else is touched; a failure to remove is passed over. Every
    writer of this module calls it on the folder it writes into.

    Parameters
    ----------
    folder : str or Path
        The folder to clean (its own entries only, not those of its subfolders). A folder
        that cannot be read (or does not exist) is left alone.
    """
    folder = Path(folder)
    try:
        entries = list(os.scandir(folder))
    except OSError:
        return
    found = [(entry, _TEMPORARY.match(entry.name)) for entry in entries]
    found = [(Path(entry.path), match) for entry, match in found if match]
    # earlier outputs put back first, so that a leftover new one is never taken for them
    for path, match in sorted(found, key=lambda item: item[1]["kind"] != "old"):
        if _alive(int(match["pid"]), path):
            continue
        original = folder / match["name"]
        with critical():
            if match["kind"] == "old" and not os.path.lexists(original):
                with contextlib.suppress(OSError):
                    os.replace(path, original)
                continue  # put back, or left where it is: an earlier output is never removed here
            _remove(path)


def _umask() -> int:
    current = os.umask(0)
    os.umask(current)
    return current


def _folder_mode(path: Path) -> None:
    os.chmod(path, 0o777 & ~_umask())  # mkdtemp makes 0700; give the folder the usual mode


# -- the marker -------------------------------------------------------------------------------
def read_marker(folder: str | Path) -> dict | None:
    """Read the marker of an output folder the toolkit wrote.

    A marker is :data:`MARKER`, a plain file (not a link) of at most 8 MiB holding a JSON
    object that names :data:`TOOL`, with a random ``id`` of 32 hex digits and ``files``, the
    list of every path written in the folder.

    Parameters
    ----------
    folder : str or Path
        The folder to look in.

    Returns
    -------
    dict or None
        The marker's facts (``tool``, ``version``, ``id``, ``what``, ``note``, ``files``), or
        ``None`` when the folder holds no valid marker.

    Examples
    --------
    >>> import tempfile
    >>> with tempfile.TemporaryDirectory() as folder:
    ...     before = read_marker(folder)
    ...     identity = mark_folder(folder, "report")
    ...     facts = read_marker(folder)
    >>> before, facts["what"], facts["id"] == identity, facts["files"]
    (None, 'report', True, [])
    """
    path = Path(folder) / MARKER
    try:
        if not path.is_file() or path.is_symlink() or path.stat().st_size > _MARKER_LIMIT:
            return None
        facts = json.loads(path.read_text(encoding="utf-8"))
    except (OSError, ValueError, RecursionError):
        return None
    if not isinstance(facts, dict) or facts.get("tool") != TOOL or not isinstance(facts.get("id"), str):
        return None
    files = facts.get("files")
    if not _ID.match(facts["id"]) or not isinstance(files, list) or not all(isinstance(f, str) for f in files):
        return None
    return facts


def mark_folder(folder: str | Path, what: str) -> str:
    """Write the marker of a new output into ``folder``, with no files listed yet.

    Its files are listed when :func:`finish_marker` is called.

    Parameters
    ----------
    folder : str or Path
        A folder being built (under a temporary name).
    what : str
        What the output is (``report``, ``demo``), for a reader of the marker.

    Returns
    -------
    str
        The output's random id (32 hex digits), recorded in a report's manifest.
    """
    identity = secrets.token_hex(16)
    _write_marker(Path(folder), {"tool": TOOL, "id": identity, "what": what, "files": []})
    return identity


def _write_marker(folder: Path, facts: dict) -> None:
    from . import __version__

    facts = {
        "tool": TOOL,
        "version": __version__,
        "id": facts["id"],
        "what": facts.get("what", "output"),
        "note": (
            "Written by the delay toolkit. The next run may replace this folder whole; a file added "
            "here by hand stops that, so nothing of yours is ever lost."
        ),
        "files": facts.get("files", []),
    }
    (folder / MARKER).write_text(json.dumps(facts, indent=2) + "\n", encoding="utf-8")


def _listing(folder: Path, prefix: str = "") -> list[str]:
    names = []
    for entry in sorted(os.scandir(folder), key=lambda e: e.name):
        relative = prefix + entry.name
        if not prefix and entry.name == MARKER:
            continue
        names.append(relative)
        if entry.is_dir(follow_symlinks=False):
            names += _listing(Path(entry.path), relative + "/")
    return names


def finish_marker(folder: str | Path) -> None:
    """List in the marker of ``folder`` every path now written there.

    Every file and folder under ``folder`` is listed by its path relative to it (``/``
    between parts), in name order, the marker itself left out.

    Parameters
    ----------
    folder : str or Path
        A folder marked by :func:`mark_folder`.

    Raises
    ------
    ValueError
        When the folder holds no marker (a fault of the caller).

    Examples
    --------
    >>> import tempfile
    >>> from pathlib import Path
    >>> with tempfile.TemporaryDirectory() as folder:
    ...     _ = mark_folder(folder, "demo")
    ...     (Path(folder) / "tables").mkdir()
    ...     _ = (Path(folder) / "tables" / "windows.csv").write_text("window\\n")
    ...     finish_marker(folder)
    ...     read_marker(folder)["files"]
    ['tables', 'tables/windows.csv']
    """
    folder = Path(folder)
    facts = read_marker(folder)
    if facts is None:
        raise ValueError(f"{folder} holds no marker: call mark_folder first")
    _write_marker(folder, facts | {"files": _listing(folder)})


def _foreign(folder: Path, listed: set[str], local: str = "", shown: str = "") -> list[str]:
    """Paths under ``folder`` that its marker does not list (nested outputs by their own)."""
    found = []
    for entry in sorted(os.scandir(folder), key=lambda e: e.name):
        if (not local and entry.name == MARKER) or entry.name in OS_LITTER:
            continue
        is_folder = entry.is_dir(follow_symlinks=False)
        if local + entry.name in listed:
            if is_folder:
                found += _foreign(Path(entry.path), listed, local + entry.name + "/", shown + entry.name + "/")
            continue
        nested = read_marker(entry.path) if is_folder else None
        if nested is not None:
            found += _foreign(Path(entry.path), set(nested["files"]), "", shown + entry.name + "/")
        else:
            found.append(shown + entry.name)
    return found


# -- target checks ----------------------------------------------------------------------------
def _real(path: str | Path) -> Path:
    return Path(os.path.realpath(path))


def _guard(real: Path, shown: str, case_root, inputs: Iterable, *, option: str) -> None:
    """Refuse a target that is an input, the case folder, inside it or above it."""
    root = _real(case_root) if case_root is not None else None
    if root is not None and root.is_file():  # a workbook: an input like any other
        inputs, root = [root, *inputs], None
    sources = [(Path(item).name, _real(item)) for item in inputs]
    if any(real == source for _, source in sources):
        raise OutputRefused(
            shown, "this is an input file; the toolkit never writes over its inputs", f"give another path{option}"
        )
    if root is not None:
        if real == root:
            raise OutputRefused(shown, "this is the case folder itself", f"give a new folder outside the case{option}")
        if real.is_relative_to(root):
            raise OutputRefused(
                shown,
                "this is inside the case folder; the toolkit never writes into its inputs",
                f"give a path outside the case{option}",
            )
        if root.is_relative_to(real):
            raise OutputRefused(
                shown,
                "this folder holds the case folder; replacing it would lose the case",
                f"give a new folder outside the case{option}",
            )
    for name, source in sources:
        if source.is_relative_to(real):
            raise OutputRefused(
                shown,
                f"this folder holds the input file {name}; the toolkit never replaces its inputs",
                f"give a new folder{option}",
            )


def check_folder_target(
    target: str | Path,
    *,
    case_root: str | Path | None = None,
    inputs: Iterable = (),
    earlier: bool = True,
    option: str = "",
) -> Path:
    """Check that an output folder may be written at ``target`` (see the module docstring).

    A folder may be written when it is new, empty (but for the files an operating system
    adds, :data:`OS_LITTER`) or, with ``earlier``, an output the toolkit wrote to which
    nothing was added; never when it is an input, the case folder, inside it or above it.

    Parameters
    ----------
    target : str or Path
        The output folder as the user gave it.
    case_root : str or Path, optional
        The case folder (or workbook) the output is made from, if any.
    inputs : iterable of path-like, optional
        Every input file of the run.
    earlier : bool, default True
        Whether a folder the toolkit wrote may be replaced (``False`` for a new case: the
        target must then be new or empty).
    option : str, default ""
        How the user names the target (`` with --out``), for the message.

    Returns
    -------
    Path
        The target with symbolic links resolved.

    Raises
    ------
    OutputRefused
        When the target must not be written; nothing is written then.
    OutputFailed
        When the target is a folder that cannot be read.

    Examples
    --------
    >>> check_folder_target("case_demo/out", case_root="case_demo")  # doctest: +NORMALIZE_WHITESPACE
    Traceback (most recent call last):
    ...
    delay.output.OutputRefused: case_demo/out: this is inside the case folder; the toolkit never writes
    into its inputs - give a path outside the case; nothing was written
    """
    shown = str(target)
    real = _real(target)
    if os.path.islink(target) and not os.path.exists(target):
        raise OutputRefused(shown, "this is a broken symbolic link", f"give a new folder{option}")
    _guard(real, shown, case_root, inputs, option=option)
    if not real.exists():
        return real
    if not real.is_dir():
        raise OutputRefused(shown, "this is a file, not a folder", f"give a new or empty folder{option}")
    try:
        entries = [e for e in os.listdir(real) if e not in OS_LITTER]
    except OSError as error:
        raise OutputFailed(shown, error) from None
    if not entries:
        return real
    marker = read_marker(real) if earlier else None
    if marker is None:
        what = "holds files this toolkit did not write" if earlier else "is not empty"
        fix = "give a new or empty folder" + (", or the folder of an earlier run" if earlier else "")
        raise OutputRefused(shown, f"the folder {what}; it would be replaced whole", fix + option)
    foreign = _foreign(real, set(marker["files"]))
    if foreign:
        more = f" and {len(foreign) - 1} more" if len(foreign) > 1 else ""
        raise OutputRefused(
            shown,
            f"this earlier output now also holds {foreign[0]}{more}, which the toolkit did "
            "not write; replacing the folder would lose it",
            f"move it out of the folder, or give another folder{option}",
        )
    return real


def check_file_target(
    target: str | Path,
    *,
    case_root: str | Path | None = None,
    inputs: Iterable = (),
    recognise: Callable[[Path], bool] | None = None,
    option: str = "",
) -> Path:
    """Check that an output file may be written at ``target``.

    It may when it is new, or a file the toolkit wrote (``recognise(path)`` says so);
    never when it is an input, a folder, the case folder or inside it.

    Parameters
    ----------
    target : str or Path
        The output file as the user gave it.
    case_root : str or Path, optional
        The case folder (or workbook) the output is made from, if any.
    inputs : iterable of path-like, optional
        Every input file of the run.
    recognise : callable, optional
        ``recognise(path)`` tells whether an existing file is one the toolkit wrote;
        without it, an existing file is refused.
    option : str, default ""
        How the user names the target, for the message.

    Returns
    -------
    Path
        The target with symbolic links resolved.

    Raises
    ------
    OutputRefused
        When the target must not be written.
    """
    shown = str(target)
    real = _real(target)
    _guard(real, shown, case_root, inputs, option=option)
    if real.is_dir():
        raise OutputRefused(shown, "this is a folder, not a file", f"give the path of a new file{option}")
    if real.exists() and not (recognise is not None and recognise(real)):
        raise OutputRefused(
            shown, "the file exists and this toolkit did not write it", f"give the path of a new file{option}"
        )
    return real


# -- writing folders --------------------------------------------------------------------------
def _swap(building: Path, real: Path) -> None:
    """Move ``building`` to ``real``, an earlier output there moved aside, then removed."""
    old = None
    with critical():
        if os.path.lexists(real):
            old = real.parent / f"{_prefix(real.name)}{secrets.token_hex(4)}.old"
            os.replace(real, old)
        try:
            os.replace(building, real)
        except OSError:
            if old is not None:
                os.replace(old, real)
            raise
        _live.discard(building)
        if old is not None:
            _live.add(old)
    if old is not None:
        _remove(old)
        _live.discard(old)


@contextlib.contextmanager
def _staged(real: Path, shown: str, what: str | None, recheck: Callable[[], object] | None) -> Iterator[Path]:
    try:
        clean_stale(real.parent)
        real.parent.mkdir(parents=True, exist_ok=True)
        with critical():
            building = Path(tempfile.mkdtemp(prefix=_prefix(real.name), suffix=".part", dir=real.parent))
            _live.add(building)
    except OSError as error:
        raise OutputFailed(shown, error) from None
    try:
        if what is not None:
            mark_folder(building, what)
        yield building
        if recheck is not None:
            recheck()  # the target may have changed while the output was made
        if what is not None:
            finish_marker(building)
        _folder_mode(building)
        _swap(building, real)
    except OSError as error:
        _discard(building)
        raise OutputFailed(shown, error) from None
    except OutputFailed as failed:  # a file inside: name the output, not its temporary folder
        _discard(building)
        raise OutputFailed(shown, failed.error) from None
    except BaseException:
        _discard(building)
        raise


def _discard(path: Path) -> None:
    with critical():
        _remove(path)
        _live.discard(path)


@contextlib.contextmanager
def output_folder(
    target: str | Path,
    *,
    case_root: str | Path | None = None,
    inputs: Iterable = (),
    what: str = "output",
    option: str = "",
) -> Iterator[Path]:
    """Build an output folder under a temporary name; on success it replaces ``target`` whole.

    The target is checked by :func:`check_folder_target` on entry and again before the
    swap. The temporary folder holds the marker from the start; the marker lists every
    file when the block is done. Use :func:`read_marker` on the yielded folder for the
    output's id.

    Parameters
    ----------
    target : str or Path
        The output folder as the user gave it.
    case_root : str or Path, optional
        The case folder (or workbook) the output is made from, if any.
    inputs : iterable of path-like, optional
        Every input file of the run.
    what : str, default "output"
        What the output is, for its marker.
    option : str, default ""
        How the user names the target, for the message.

    Yields
    ------
    Path
        The folder to write into (it becomes ``target`` when the block ends without error).

    Raises
    ------
    OutputRefused
        The target must not be written (nothing is written).
    OutputFailed
        An OSError while writing (the temporary folder is removed; the target is as it was).

    Examples
    --------
    >>> import tempfile
    >>> from pathlib import Path
    >>> with tempfile.TemporaryDirectory() as scratch:
    ...     with output_folder(Path(scratch) / "demo", case_root="case_demo", what="demo") as folder:
    ...         _ = (folder / "summary.json").write_text("{}")
    ...     sorted(p.name for p in (Path(scratch) / "demo").iterdir())
    ['delay-output.json', 'summary.json']
    """
    inputs = tuple(inputs)

    def check() -> Path:
        return check_folder_target(target, case_root=case_root, inputs=inputs, option=option)

    real = check()
    with _staged(real, str(target), what, check) as building:
        yield building


@contextlib.contextmanager
def new_folder(target: str | Path, *, option: str = "") -> Iterator[Path]:
    """Build a new folder (a new case) under a temporary name, then move it to ``target``.

    ``target`` must be new or empty. No marker is written: the folder is the user's, not
    an output the toolkit may replace later.

    Parameters
    ----------
    target : str or Path
        The new folder.
    option : str, default ""
        How the user names it, for the message.

    Yields
    ------
    Path
        The folder to write into.

    Raises
    ------
    OutputRefused
        When ``target`` is a file or a folder that is not empty (nothing is written).
    OutputFailed
        An OSError while writing (the temporary folder is removed).
    """

    def check() -> Path:
        return check_folder_target(target, earlier=False, option=option)

    real = check()
    with _staged(real, str(target), None, check) as building:
        yield building


@contextlib.contextmanager
def replace_directory(target: str | Path) -> Iterator[Path]:
    """Build a folder under a temporary name; on success it replaces ``target`` whole.

    The mechanism alone, for a folder the caller has already decided may be replaced (a
    snapshot folder the user asked to replace); outputs use :func:`output_folder`.

    Parameters
    ----------
    target : str or Path
        The folder to replace (or to create).

    Yields
    ------
    Path
        The folder to write into.

    Raises
    ------
    OutputFailed
        An OSError while writing; the temporary folder is removed and ``target`` is left as
        it was (as on any other exception).

    Examples
    --------
    >>> import tempfile
    >>> from pathlib import Path
    >>> with tempfile.TemporaryDirectory() as scratch:
    ...     target = Path(scratch) / "u01"
    ...     target.mkdir()
    ...     _ = (target / "old.txt").write_text("old")
    ...     with replace_directory(target) as folder:
    ...         _ = (folder / "snapshot.toml").write_text('label = "Update 01"')
    ...     [p.name for p in target.iterdir()]
    ['snapshot.toml']
    """
    with _staged(_real(target), str(target), None, None) as building:
        yield building


# -- writing files ----------------------------------------------------------------------------
def _temporary_file(path: Path, suffix: str) -> Path:
    with critical():
        handle, temporary = tempfile.mkstemp(prefix=_prefix(path.name), suffix=suffix, dir=path.parent)
        _live.add(Path(temporary))
    os.close(handle)
    return Path(temporary)


def write_through(path: str | Path, write: Callable[[str], object], suffix: str = ".part") -> Path:
    """Have ``write(temporary)`` write a file under a temporary name, then move it to ``path``.

    The temporary file is in ``path``'s folder (made when missing); on an exception it is
    removed and ``path`` is left as it was.

    Parameters
    ----------
    path : str or Path
        The file to write.
    write : callable
        ``write(temporary)`` writes the file at the path (a ``str``) it is given.
    suffix : str, default ".part"
        The end of the temporary name (a writer may choose its format by it).

    Returns
    -------
    Path
        ``path``.

    Raises
    ------
    OutputFailed
        An OSError while writing.

    Examples
    --------
    >>> import tempfile
    >>> from pathlib import Path
    >>> with tempfile.TemporaryDirectory() as scratch:
    ...     path = write_through(Path(scratch) / "a.txt", lambda temporary: Path(temporary).write_text("done"))
    ...     path.read_text()
    'done'
    """
    path = Path(path)
    temporary = None
    try:
        clean_stale(path.parent)
        path.parent.mkdir(parents=True, exist_ok=True)
        temporary = _temporary_file(path, suffix)
        write(str(temporary))
        os.chmod(temporary, 0o666 & ~_umask())  # mkstemp makes 0600; give the usual mode
        with critical():
            os.replace(temporary, path)
            _live.discard(temporary)
    except OSError as error:
        if temporary is not None:
            _discard(temporary)
        raise OutputFailed(path, error) from None
    except BaseException:
        if temporary is not None:
            _discard(temporary)
        raise
    return path


def write_bytes(path: str | Path, data: bytes) -> Path:
    """Write ``data`` to ``path`` through a temporary file in the same folder.

    See :func:`write_through`.

    Parameters
    ----------
    path : str or Path
        The file to write.
    data : bytes
        Its content.

    Returns
    -------
    Path
        ``path``.

    Raises
    ------
    OutputFailed
        An OSError while writing.
    """
    return write_through(path, lambda temporary: Path(temporary).write_bytes(data))


def write_text(path: str | Path, text: str) -> Path:
    """Write ``text`` to ``path`` as UTF-8, through a temporary file (:func:`write_bytes`).

    Parameters
    ----------
    path : str or Path
        The file to write.
    text : str
        Its content.

    Returns
    -------
    Path
        ``path``.

    Raises
    ------
    OutputFailed
        An OSError while writing.
    """
    return write_bytes(path, text.encode("utf-8"))


def write_together(files: Mapping[str | Path, bytes]) -> tuple[Path, ...]:
    """Write several files that belong together, all moved into place at once.

    Every one is written under a temporary name first, then all are moved into place
    together, so that a failure while writing (a full disk) leaves all of them as they
    were.

    Parameters
    ----------
    files : Mapping of path-like to bytes
        Each file's path and its content.

    Returns
    -------
    tuple of Path
        The paths written, in the order given.

    Raises
    ------
    OutputFailed
        An OSError while writing; no file was changed.
    """
    temporaries: dict[Path, Path] = {}
    current = None
    try:
        for path, data in files.items():
            current = Path(path)
            clean_stale(current.parent)
            current.parent.mkdir(parents=True, exist_ok=True)
            temporary = _temporary_file(current, ".part")
            temporaries[current] = temporary
            temporary.write_bytes(data)
            os.chmod(temporary, 0o666 & ~_umask())
        with critical():
            for path, temporary in temporaries.items():
                current = path
                os.replace(temporary, path)
                _live.discard(temporary)
    except OSError as error:
        for temporary in temporaries.values():
            if temporary in _live:
                _discard(temporary)
        raise OutputFailed(current if current is not None else "", error) from None
    except BaseException:
        for temporary in temporaries.values():
            if temporary in _live:
                _discard(temporary)
        raise
    return tuple(temporaries)


def write_output_file(
    target: str | Path,
    write: Callable[[str], object],
    *,
    case_root=None,
    inputs: Iterable = (),
    recognise: Callable[[Path], bool] | None = None,
    suffix: str = ".part",
    option: str = "",
) -> Path:
    """Check ``target`` with :func:`check_file_target`, then write it through a temporary file.

    See :func:`write_through`.

    Parameters
    ----------
    target : str or Path
        The output file as the user gave it.
    write : callable
        ``write(temporary)`` writes the file at the path (a ``str``) it is given.
    case_root : str or Path, optional
        The case folder (or workbook) the output is made from, if any.
    inputs : iterable of path-like, optional
        Every input file of the run.
    recognise : callable, optional
        ``recognise(path)`` tells whether an existing file is one the toolkit wrote.
    suffix : str, default ".part"
        The end of the temporary name.
    option : str, default ""
        How the user names the target, for the message.

    Returns
    -------
    Path
        ``target``.

    Raises
    ------
    OutputRefused
        When ``target`` must not be written (nothing is written).
    OutputFailed
        An OSError while writing.
    """
    check_file_target(target, case_root=case_root, inputs=inputs, recognise=recognise, option=option)
    return write_through(target, write, suffix=suffix)


# -- CSV outputs ------------------------------------------------------------------------------
_FORMULA_START = frozenset("=+-@\t\r")
_FORMULA_CELL = re.compile(r"\n[=+\-@\t\r]")  # a cell (after the first) that may start a formula
_PLAIN_NUMBER = re.compile(r"[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?\Z")


def neutralise(text: str) -> str:
    """Make a text cell safe to open in a spreadsheet (see the module docstring).

    A cell that starts with ``=``, ``+``, ``-``, ``@``, a tab or a carriage return gets a
    leading apostrophe, unless it reads as a plain decimal number.

    Parameters
    ----------
    text : str
        The cell.

    Returns
    -------
    str
        The cell, with a leading apostrophe where a spreadsheet would run it.

    References
    ----------
    OWASP, "CSV Injection" (owasp.org/www-community/attacks/CSV_Injection): cells beginning
    with ``=``, ``+``, ``-``, ``@``, tab or carriage return are prefixed with a single quote.

    Examples
    --------
    >>> [neutralise(t) for t in ("=1+1", "@SUM(A1)", "-2+3", "-3", "+2.5", "Dig", "")]
    ["'=1+1", "'@SUM(A1)", "'-2+3", '-3', '+2.5', 'Dig', '']
    """
    if text and text[0] in _FORMULA_START and not _PLAIN_NUMBER.match(text):
        return "'" + text
    return text


def _safe_cell(value):
    return neutralise(value) if isinstance(value, str) else value


def csv_safe(frame: pd.DataFrame) -> pd.DataFrame:
    """Copy ``frame`` with every text cell and column name passed through :func:`neutralise`.

    Parameters
    ----------
    frame : pandas.DataFrame
        Any table.

    Returns
    -------
    pandas.DataFrame
        A copy; numbers, dates and blanks unchanged (their columns keep their types).

    References
    ----------
    OWASP, "CSV Injection" (owasp.org/www-community/attacks/CSV_Injection).

    Examples
    --------
    >>> frame = pd.DataFrame({"event": ["=HYPERLINK(1)", "Rain"], "days": [-3, 4]})
    >>> csv_safe(frame).values.tolist()
    [["'=HYPERLINK(1)", -3], ['Rain', 4]]
    """
    import numpy as np
    import pandas as pd

    out = frame.copy()
    for position in range(frame.shape[1]):
        series = frame.iloc[:, position]
        if not (pd.api.types.is_object_dtype(series.dtype) or pd.api.types.is_string_dtype(series.dtype)):
            continue
        column = series.to_numpy(dtype=object, copy=True)
        try:  # one search over the joined column: most columns have no cell to neutralise
            joined = "\n".join(column.tolist())
        except TypeError:  # a cell that is not text (a blank): look cell by cell
            joined = None
        if joined is not None and joined[:1] not in _FORMULA_START and not _FORMULA_CELL.search(joined):
            continue
        starts = np.fromiter(
            (isinstance(v, str) and v[:1] in _FORMULA_START for v in column), dtype=bool, count=len(column)
        )
        if starts.any():
            column[starts] = [_safe_cell(v) for v in column[starts]]
            out.isetitem(position, pd.Series(column, index=series.index, name=series.name, dtype=object))
    out.columns = [_safe_cell(c) for c in frame.columns]
    return out


def csv_text(frame: pd.DataFrame, **to_csv) -> str:
    """Write ``frame`` as CSV text (no index), its text cells neutralised (:func:`csv_safe`).

    Parameters
    ----------
    frame : pandas.DataFrame
        Any table.
    **to_csv
        Passed to :meth:`pandas.DataFrame.to_csv` (``date_format``, say).

    Returns
    -------
    str
        The CSV text.

    Examples
    --------
    >>> print(csv_text(pd.DataFrame({"id": ["A", "@B"], "days": [1, -2]})), end="")
    id,days
    A,1
    '@B,-2
    """
    buffer = io.StringIO()
    csv_safe(frame).to_csv(buffer, index=False, **to_csv)
    return buffer.getvalue()


def write_csv(path: str | Path, frame: pd.DataFrame, **to_csv) -> Path:
    """Write ``frame`` as an output CSV (:func:`csv_text`) through a temporary file.

    Parameters
    ----------
    path : str or Path
        The file to write (UTF-8).
    frame : pandas.DataFrame
        Any table.
    **to_csv
        Passed to :meth:`pandas.DataFrame.to_csv` (``date_format``, say).

    Returns
    -------
    Path
        ``path``.

    Raises
    ------
    OutputFailed
        An OSError while writing.
    """
    text = csv_text(frame, **to_csv)
    return write_bytes(path, text.encode("utf-8"))


def copy_csv(source: str | Path, target: str | Path) -> Path:
    """Copy a CSV file (a case file shown among the outputs) with every cell neutralised.

    Parameters
    ----------
    source : str or Path
        A UTF-8 CSV file (a byte-order mark is dropped).
    target : str or Path
        The copy to write (through a temporary file).

    Returns
    -------
    Path
        ``target``.

    Raises
    ------
    OutputFailed
        An OSError while writing ``target``; an OSError reading ``source`` passes through
        as it is.
    """
    with open(source, newline="", encoding="utf-8-sig") as handle:
        rows = list(csv.reader(handle))
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerows([[neutralise(cell) for cell in row] for row in rows])
    return write_bytes(target, buffer.getvalue().encode("utf-8"))
