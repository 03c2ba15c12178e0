"""Random bytes and random mutations of the demo's files never give a traceback.

Property: whatever one file of a case holds, ``load_case`` either returns a case or raises
:class:`~delay.errors.CaseError`, and ``delay validate`` exits 0 or 2 with plain lines
(the case format's rule "bad input gets one clear message ... never a traceback").

The demo is trimmed to the snapshots its corrections and as-built record need (the
baseline, Update 11, Update 13 and the last update) so that one example loads in a
fraction of a second; every file it keeps is the demo's own. Each example works on a
fresh copy. The number of examples and the deadline keep the whole module well under a
minute on a shared machine.
"""

from __future__ import annotations

import datetime as dt
import shutil
import tempfile
from pathlib import Path

import pytest
from click.testing import CliRunner
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from delay.case import load_case, write_workbook
from delay.cli import cli

DEMO = Path(__file__).resolve().parents[1] / "case_demo"
KEPT_SNAPSHOTS = ("baseline", "2026-01-31", "2026-03-31", "2026-06-30")

FUZZ = settings(
    max_examples=10,
    deadline=dt.timedelta(seconds=20),
    database=None,
    suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large],
)

# Values a hostile or careless file might hold in a cell.
NASTY = [
    "",
    " ",
    "9999-12-31",
    "0001-01-01",
    "2025-02-30",
    "-1",
    "1e308",
    "-1e308",
    "nan",
    "inf",
    "36501",
    "100000000",
    '=HYPERLINK("x")',
    "\x00",
    "\ufeff",
    "é",
    "\u202e",
    "A;B;;C",
    "FS 99999999",
    "asbuilt",
    "baseline",
    '"',
    "x" * 5000,
    "1,5",
    "0x10",
    "\r",
    "[[[[[[",
    "a.b.c.d.e.f.g.h.i.j",
]


@pytest.fixture(scope="module")
def template(tmp_path_factory) -> Path:
    root = tmp_path_factory.mktemp("fuzz") / "case"
    shutil.copytree(DEMO, root, ignore=shutil.ignore_patterns("model", "*.py", "*.json", "*.md"))
    for folder in (root / "snapshots").iterdir():
        if folder.name not in KEPT_SNAPSHOTS:
            shutil.rmtree(folder)
    load_case(root)  # the starting point must itself be valid
    return root


def case_files(root: Path) -> list[str]:
    return sorted(str(p.relative_to(root)) for p in root.rglob("*") if p.is_file())


def mutate(data: bytes, operations: list[tuple[str, float, bytes]]) -> bytes:
    """Apply each (operation, where as a fraction of the length, payload) in turn."""
    for operation, where, payload in operations:
        at = int(where * len(data))
        if operation == "insert":
            data = data[:at] + payload + data[at:]
        elif operation == "overwrite":
            data = data[:at] + payload + data[at + len(payload) :]
        elif operation == "delete":
            data = data[:at] + data[at + 1 + len(payload) :]
        elif operation == "truncate":
            data = data[:at]
        elif operation == "duplicate line":
            lines = data.split(b"\n")
            line = int(where * len(lines)) % max(1, len(lines))
            lines.insert(line, lines[line] if lines else b"")
            data = b"\n".join(lines)
    return data


def replace_cell(data: bytes, where: float, value: str) -> bytes:
    """One comma-separated cell of the line at ``where`` replaced by ``value``."""
    lines = data.split(b"\n")
    if len(lines) < 2:
        return data
    number = 1 + int(where * (len(lines) - 1)) % (len(lines) - 1)
    cells = lines[number].split(b",")
    cells[int(where * 997) % len(cells)] = value.encode("utf-8", "surrogatepass")
    lines[number] = b",".join(cells)
    return b"\n".join(lines)


def check_no_traceback(root: Path) -> None:
    """``delay validate`` (which runs ``load_case``) exits 0, or 2 with plain lines.

    The command turns a CaseError into lines and exit 2; any other exception reaches the
    test runner as ``result.exception`` and fails the property.
    """
    result = CliRunner().invoke(cli, ["validate", str(root)])
    assert result.exception is None or isinstance(result.exception, SystemExit), (
        f"{type(result.exception).__name__}: {result.exception}"
    )
    assert result.exit_code in (0, 2), result.output
    assert "Traceback" not in result.output
    if result.exit_code == 2:
        lines = [line for line in result.stderr.splitlines() if line]
        assert lines and all(line.startswith("error: ") for line in lines[:-1])
        assert lines[-1].endswith("problem(s) found; nothing was written.")


def fresh_copy(template: Path) -> tuple[Path, Path]:
    folder = Path(tempfile.mkdtemp(prefix="fuzz-case-"))
    root = folder / "case"
    shutil.copytree(template, root)
    return folder, root


OPERATION = st.tuples(
    st.sampled_from(["insert", "overwrite", "delete", "truncate", "duplicate line"]),
    st.floats(min_value=0, max_value=1, allow_nan=False),
    st.binary(min_size=0, max_size=40) | st.sampled_from([v.encode("utf-8") for v in NASTY]),
)


@FUZZ
@given(data=st.data())
def test_random_bytes_in_one_file(template, data):
    name = data.draw(st.sampled_from(case_files(template)), label="file")
    content = data.draw(st.binary(max_size=3000), label="bytes")
    folder, root = fresh_copy(template)
    try:
        (root / name).write_bytes(content)
        check_no_traceback(root)
    finally:
        shutil.rmtree(folder, ignore_errors=True)


@FUZZ
@given(data=st.data())
def test_random_mutations_of_one_file(template, data):
    name = data.draw(st.sampled_from(case_files(template)), label="file")
    operations = data.draw(st.lists(OPERATION, min_size=1, max_size=4), label="operations")
    folder, root = fresh_copy(template)
    try:
        path = root / name
        path.write_bytes(mutate(path.read_bytes(), operations))
        check_no_traceback(root)
    finally:
        shutil.rmtree(folder, ignore_errors=True)


@FUZZ
@given(data=st.data())
def test_nasty_values_in_cells(template, data):
    names = [n for n in case_files(template) if n.endswith(".csv")]
    chosen = data.draw(
        st.lists(
            st.tuples(
                st.sampled_from(names),
                st.floats(min_value=0, max_value=1, allow_nan=False),
                st.sampled_from(NASTY) | st.text(max_size=30),
            ),
            min_size=1,
            max_size=5,
        ),
        label="cells",
    )
    folder, root = fresh_copy(template)
    try:
        for name, where, value in chosen:
            path = root / name
            path.write_bytes(replace_cell(path.read_bytes(), where, value))
        check_no_traceback(root)
    finally:
        shutil.rmtree(folder, ignore_errors=True)


@pytest.fixture(scope="module")
def workbook_bytes(template, tmp_path_factory) -> bytes:
    return write_workbook(template, tmp_path_factory.mktemp("book") / "case.xlsx").read_bytes()


@FUZZ
@given(operations=st.lists(OPERATION, min_size=1, max_size=3))
def test_random_mutations_of_the_workbook(workbook_bytes, operations):
    folder = Path(tempfile.mkdtemp(prefix="fuzz-book-"))
    try:
        book = folder / "case.xlsx"
        book.write_bytes(mutate(workbook_bytes, operations))
        check_no_traceback(book)
    finally:
        shutil.rmtree(folder, ignore_errors=True)


@pytest.mark.parametrize("value", ["\x0c", "\u2028", "\x1e", "\x85", "\x00"])
def test_a_cell_with_a_line_break_of_its_own_stays_one_line(template, tmp_path, value):
    # Found by test_nasty_values_in_cells: a form feed in an id ended the problem's line.
    root = tmp_path / "case"
    shutil.copytree(template, root)
    path = root / "asbuilt.csv"
    path.write_bytes(replace_cell(path.read_bytes(), 0.0, value))
    result = CliRunner().invoke(cli, ["validate", str(root)])
    assert result.exit_code == 2
    lines = result.stderr.splitlines()
    assert len(lines) == 2 and lines[0].startswith("error: asbuilt.csv, row 2, column 'id'")
