"""`delay new`: the empty case skeleton (delay.skeleton.write_skeleton).

The skeleton must hold every file of case-format version 2 with exactly the format's header,
load as a valid case, document every setting and every column, and never write into a
folder that already holds something.
"""

from __future__ import annotations

import csv
import dataclasses
import datetime as dt
import tomllib

import pytest

from delay.case import load_case
from delay.errors import CaseError
from delay.model import COLUMNS, CaseSettings
from delay.skeleton import GUIDE_NAME, write_skeleton

# The files of the format (docs/case-format.md, the folder tree at its top).
FORMAT_FILES = {
    "calendars.csv": "calendars",
    "calendar_exceptions.csv": "calendar_exceptions",
    "snapshots/baseline/activities.csv": "activities",
    "snapshots/baseline/links.csv": "links",
    "asbuilt.csv": "asbuilt",
    "corrections.csv": "corrections",
    "attributions.csv": "attributions",
    "events.csv": "events",
    "fragnets.csv": "fragnets",
    "fragnet_links.csv": "fragnet_links",
    "elements.csv": "elements",
    "sections.csv": "sections",
    "extensions_granted.csv": "extensions_granted",
    "prolongation_rates.csv": "prolongation_rates",
}


def test_skeleton_loads_as_a_valid_case(tmp_path):
    root = write_skeleton(tmp_path / "new_case", start=dt.date(2025, 3, 3))
    case = load_case(root)
    assert case.settings.project.contract_start == dt.date(2025, 3, 3)
    # 52 weeks after Monday 2025-03-03 is Monday 2026-03-02; the Friday before is 2026-02-27.
    assert case.settings.project.contract_completion == dt.date(2026, 2, 27)
    assert [s.folder for s in case.snapshots] == ["baseline"]
    assert case.baseline.data_date == dt.date(2025, 3, 3)
    assert case.baseline.activities[["id", "duration", "kind"]].values.tolist() == [["START", 0, "start_milestone"]]
    assert case.asbuilt_snapshot is None and case.events.empty


def test_skeleton_has_every_file_with_the_formats_header(tmp_path):
    root = write_skeleton(tmp_path / "new_case")
    for relative, table in FORMAT_FILES.items():
        with (root / relative).open(newline="", encoding="utf-8") as handle:
            header = next(csv.reader(handle))
        assert header == list(COLUMNS[table]), relative
    assert (root / "case.toml").is_file() and (root / "snapshots/baseline/snapshot.toml").is_file()


def test_default_start_is_a_monday(tmp_path):
    case = load_case(write_skeleton(tmp_path / "new_case"))
    assert case.settings.project.contract_start.weekday() == 0
    assert 0 <= (case.settings.project.contract_start - dt.date.today()).days < 7


def test_case_toml_gives_every_setting_with_a_comment(tmp_path):
    root = write_skeleton(tmp_path / "new_case")
    text = (root / "case.toml").read_text(encoding="utf-8")
    values = tomllib.loads(text)
    settings = load_case(root).settings
    for section in dataclasses.fields(CaseSettings):
        if section.name == "extra":
            continue
        fields = dataclasses.fields(type(getattr(settings, section.name)))
        # A setting whose default is "none given" cannot be written in TOML (which has no
        # null): the skeleton gives it as a commented example line under its section.
        # So is a table to fill in (``[input] columns``, empty by default).
        commented = {f.name for f in fields if f.default is None or f.default_factory is not dataclasses.MISSING}
        given = {f.name for f in fields} - commented
        assert set(values.get(section.name, {})) == given, section.name
        block = text.split(f"[{section.name}]\n", 1)[1].split("\n[", 1)[0]
        for field in fields:
            if field.name in commented:
                line = next(lk for lk in block.splitlines() if lk.startswith(f"# {field.name} = "))
                example = tomllib.loads(line[2:].split("#", 1)[0])
                assert set(example) == {field.name}, line
    setting_lines = [line for line in text.splitlines() if "=" in line and not line.startswith("#")]
    assert setting_lines and all("#" in line for line in setting_lines)


def test_guide_explains_every_column_of_every_file(tmp_path):
    root = write_skeleton(tmp_path / "new_case")
    guide = (root / GUIDE_NAME).read_text(encoding="utf-8")
    for relative, table in FORMAT_FILES.items():
        name = relative.replace("snapshots/baseline/", "snapshots/<folder>/")
        heading = f"{name}\n{'-' * len(name)}\n"
        assert heading in guide, name
        section = guide.split(heading, 1)[1].split("\n\n", 1)[0]
        for column in COLUMNS[table]:
            assert f"  {column} " in section, (relative, column)


def test_refuses_a_folder_that_is_not_empty(tmp_path):
    target = tmp_path / "existing"
    target.mkdir()
    (target / "notes.txt").write_text("keep me", encoding="utf-8")
    with pytest.raises(CaseError) as info:
        write_skeleton(target)
    assert "not empty" in info.value.problems[0].message
    assert [p.name for p in target.iterdir()] == ["notes.txt"]
    assert sorted(p.name for p in tmp_path.iterdir()) == ["existing"]  # nothing left over


def test_refuses_a_file(tmp_path):
    target = tmp_path / "case.txt"
    target.write_text("x", encoding="utf-8")
    with pytest.raises(CaseError):
        write_skeleton(target)


def test_writes_into_an_empty_folder(tmp_path):
    target = tmp_path / "empty"
    target.mkdir()
    write_skeleton(target)
    assert load_case(target).baseline.activities["id"].tolist() == ["START"]
    assert sorted(p.name for p in tmp_path.iterdir()) == ["empty"]
