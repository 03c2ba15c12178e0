"""docs/case-format.md, the users' contract, is kept in step with the loader.

Every file the loader reads, every column of every table (delay.model.COLUMNS), every key
of case.toml and snapshot.toml it accepts, every value of its choice columns and every
limit it enforces must be in the document. The example case.toml and snapshot.toml of
the document are read with Python's own tomllib, so they are valid TOML and name exactly
the settings the loader knows.
"""

from __future__ import annotations

import dataclasses
import re
import tomllib
from pathlib import Path

import pytest

from delay.case._dialect import DELIMITERS, ENCODINGS
from delay.case._limits import (
    DEEPEST_TOML,
    LARGEST_ENTRIES,
    LARGEST_SETTING_PARTS,
    LARGEST_SHEET_ROWS,
    LARGEST_TOML,
    LARGEST_WORKBOOK,
)
from delay.case._settings import SETTINGS_SECTIONS
from delay.case._source import LARGEST_OPINION, OPINION_NAME, OPTIONAL_FILES, WORKBOOK_NAME
from delay.errors import MAX_PROBLEMS_PER_FILE
from delay.model import (
    ACTIVITY_KINDS,
    COLUMNS,
    CONSTRAINTS,
    FIRST_DATE,
    IMPACTS,
    LARGEST_DAYS,
    LAST_DATE,
    LINK_TYPES,
    METHODS,
    PARTIES,
    InputSettings,
)

ROOT = Path(__file__).resolve().parents[1]
DOC = (ROOT / "docs" / "case-format.md").read_text(encoding="utf-8")


def section(heading: str) -> str:
    """The text under ``## heading`` (the heading's first words) up to the next one."""
    found = re.search(rf"^## {re.escape(heading)}\b.*?$(.*?)(?=^## |\Z)", DOC, re.M | re.S)
    assert found, f"no section '## {heading}' in docs/case-format.md"
    return found.group(1)


def code_block(text: str, language: str) -> str:
    found = re.search(rf"```{language}\n(.*?)```", text, re.S)
    assert found, f"no {language} block"
    return found.group(1)


def test_it_is_version_2():
    assert DOC.startswith("# Case format, version 2\n")


@pytest.mark.parametrize("table", [t for t in COLUMNS if t not in ("activities", "links")] + ["activities", "links"])
def test_every_column_of_every_file_is_documented(table):
    text = section(f"{table}.csv")
    missing = [c for c in COLUMNS[table] if f"`{c}`" not in text]
    assert not missing, f"{table}.csv: {missing} not in its section"


def test_every_file_the_loader_reads_is_in_the_folder_tree():
    tree = code_block(section("A case folder"), "")
    for name in (
        "case.toml",
        "calendars.csv",
        "snapshot.toml",
        "activities.csv",
        "links.csv",
        OPINION_NAME,
        *(f"{n}.csv" for n in OPTIONAL_FILES),
    ):
        assert re.search(rf"\b{re.escape(name)}\b", tree), name
    assert WORKBOOK_NAME in section("The workbook form")


def test_case_toml_example_names_every_setting_and_no_other():
    example = tomllib.loads(code_block(section("case.toml"), "toml"))
    for name, cls in SETTINGS_SECTIONS.items():
        assert set(example[name]) == {f.name for f in dataclasses.fields(cls)}, name
    assert set(example["input"]) == {f.name for f in dataclasses.fields(InputSettings)}
    assert example["input"]["columns"]["activities"]  # a mapping, as [input.columns.TABLE]
    assert set(example) == set(SETTINGS_SECTIONS) | {"input"}


def test_input_keys_and_choices_are_explained():
    text = section("case.toml")
    for field in dataclasses.fields(InputSettings):
        assert f"| `{field.name}` |" in text, field.name
    for encoding in ENCODINGS:
        assert f"`{encoding}`" in text, encoding
    for name in DELIMITERS:
        shown = {"\t": "\\t", "|": "\\|"}.get(name, name)
        assert f"`{shown}`" in text, name


def test_snapshot_toml_example_names_every_key():
    text = section("snapshot.toml")
    assert set(tomllib.loads(code_block(text, "toml"))) == {"label", "data_date", "kind"}
    for key in ("label", "data_date", "kind"):
        assert f"| `{key}` |" in text


def test_workbook_sheets_and_their_columns():
    text = section("The workbook form")
    for name in (
        "`case`",
        "`key`",
        "`value`",
        "`snapshots`",
        "`label`",
        "`data_date`",
        "`kind`",
        "`folder`",
        "`activities`",
        "`links`",
        "`snapshot`",
        "`attributions`",
    ):
        assert name in text, name


@pytest.mark.parametrize("values", [LINK_TYPES, ACTIVITY_KINDS, CONSTRAINTS, PARTIES, IMPACTS, METHODS])
def test_every_choice_is_documented(values):
    for value in values:
        assert f"`{value}`" in DOC or f'"{value}"' in DOC, value


def test_every_limit_is_documented():
    text = section("Limits")
    for figure in (
        f"{LARGEST_DAYS:,}",
        FIRST_DATE.isoformat(),
        LAST_DATE.isoformat(),
        f"{LARGEST_TOML:,}",
        f"{DEEPEST_TOML}",
        f"{LARGEST_SETTING_PARTS} parts",
        f"{LARGEST_WORKBOOK:,}",
        f"{LARGEST_ENTRIES:,}",
        f"{LARGEST_SHEET_ROWS:,}",
        f"{LARGEST_OPINION:,}",
    ):
        assert figure in text, figure
    assert f"at most {MAX_PROBLEMS_PER_FILE} a file" in section("Problems and exit status")


def test_reserved_names_are_documented():
    text = section("A case folder")
    assert "`asbuilt`" in text and "`As-built`" in text and "`baseline`" in text


def test_readme_points_to_the_document():
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    assert "docs/case-format.md" in readme and "shared/case-format.md" not in readme
