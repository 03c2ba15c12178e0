"""case.toml (or the workbook's ``case`` sheet) into :class:`~delay.model.CaseSettings`."""

from __future__ import annotations

import dataclasses
import datetime as dt
import re
import typing
from typing import Any

from delay.case._problems import Problems
from delay.case._source import SettingsSource
from delay.model import (
    FIRST_DATE,
    LAST_DATE,
    AnalysisSettings,
    CaseSettings,
    CommercialSettings,
    InputSettings,
    ProjectSettings,
    ReportSettings,
    ScheduleSettings,
)

__all__ = ["parse_settings", "parse_date_value", "SETTINGS_SECTIONS"]

#: The known sections of case.toml and the dataclass each becomes.
SETTINGS_SECTIONS: dict[str, type] = {
    "project": ProjectSettings,
    "schedule": ScheduleSettings,
    "commercial": CommercialSettings,
    "analysis": AnalysisSettings,
    "report": ReportSettings,
}

_MONEY = {"liquidated_damages_per_day", "liquidated_damages_cap", "prolongation_cost_per_day"}
_DATE_TEXT = re.compile(r"^\d{4}-\d{2}-\d{2}$")


def parse_date_value(value: Any) -> dt.date | None:
    """A TOML or workbook date, or ISO text ``YYYY-MM-DD``; ``None`` when it is not one.

    Parameters
    ----------
    value : Any
        A setting's value as read: a :class:`datetime.date`, a
        :class:`datetime.datetime` (a workbook cell), text, or anything else.

    Returns
    -------
    datetime.date or None
        The date; ``None`` for a date-time with a time of day or a time zone, text that is
        not an ISO date, or any other value.

    Examples
    --------
    >>> import datetime as dt
    >>> parse_date_value(" 2025-01-06 "), parse_date_value(dt.datetime(2025, 1, 6, 12)), parse_date_value(20250106)
    (datetime.date(2025, 1, 6), None, None)
    """
    if isinstance(value, dt.datetime):
        return value.date() if value.time() == dt.time(0) and value.tzinfo is None else None
    if isinstance(value, dt.date):
        return value
    if isinstance(value, str) and _DATE_TEXT.match(value.strip()):
        try:
            return dt.date.fromisoformat(value.strip())
        except ValueError:
            return None
    return None


def _hint(cls: type, name: str) -> Any:
    """The type of field ``name``, without the ``| None`` of an optional setting."""
    hint = typing.get_type_hints(cls)[name]
    arguments = typing.get_args(hint)
    if type(None) in arguments and typing.get_origin(hint) is not typing.Literal:
        rest = tuple(a for a in arguments if a is not type(None))
        return rest[0] if len(rest) == 1 else hint
    return hint


def _choices(cls: type, name: str) -> tuple[str, ...] | None:
    hint = _hint(cls, name)
    if typing.get_origin(hint) is typing.Literal:
        return typing.get_args(hint)
    return None


def _convert(cls: type, name: str, value: Any) -> tuple[Any, str | None]:
    """The value for field ``name`` of ``cls``, or an explanation of why it is not valid."""
    choices = _choices(cls, name)
    if choices is not None:
        if isinstance(value, str) and value in choices:
            return value, None
        return None, "must be one of " + ", ".join(f'"{c}"' for c in choices)
    hint = _hint(cls, name)
    if hint is dt.date:
        parsed = parse_date_value(value)
        if parsed is None:
            return None, "must be a date written YYYY-MM-DD"
        if not FIRST_DATE <= parsed <= LAST_DATE:
            return None, f"must be a date from {FIRST_DATE} to {LAST_DATE}"
        return parsed, None
    if hint is bool:
        if isinstance(value, bool):
            return value, None
        if isinstance(value, str) and value.lower() in ("true", "false", "yes", "no"):
            return value.lower() in ("true", "yes"), None
        return None, "must be true or false"
    if hint is float:
        if isinstance(value, str):
            try:
                value = float(value)
            except ValueError:
                return None, "must be a number"
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            return None, "must be a number"
        if name in _MONEY and value < 0:
            return None, "must not be negative"
        if value != value or value in (float("inf"), float("-inf")):
            return None, "must be a finite number"
        return float(value), None
    if name == "completion_activity" and isinstance(value, int) and not isinstance(value, bool):
        value = str(value)  # a workbook cell holding an activity id that is a number
    if not isinstance(value, str) or not value.strip():
        return None, "must be text in double quotes"
    value = value.strip() if name == "completion_activity" else value
    if name == "currency" and not re.fullmatch(r"[A-Z]{3}", value):
        return None, 'must be a three-letter ISO 4217 currency code such as "EUR"'
    return value, None


def _example(cls: type, name: str) -> str:
    choices = _choices(cls, name)
    if choices:
        return f'{name} = "{choices[0]}"'
    hint = _hint(cls, name)
    return {
        dt.date: f"{name} = 2025-01-06",
        bool: f"{name} = true",
        float: f"{name} = 0",
    }.get(hint, f'{name} = "..."')


def parse_settings(
    source: SettingsSource, problems: Problems, input_settings: InputSettings | None = None
) -> CaseSettings | None:
    """Build :class:`CaseSettings` from the settings as read, recording every problem.

    Each known section ([project], [schedule], [commercial], [analysis], [report]) is built
    with its defaults for the settings not given; a required setting that is missing, a
    value of the wrong kind, or a contract completion before the contract start is a
    problem. Unknown sections and keys are kept in :attr:`CaseSettings.extra`.

    Parameters
    ----------
    source : SettingsSource
        The settings read from case.toml or the ``case`` sheet: its ``values`` are the
        nested mapping, its ``locate`` gives a setting's row and column.
    problems : Problems
        Where problems are recorded; each names the file and the setting (``section.key``).
    input_settings : InputSettings or None, optional
        ``[input]``, already read and checked with the files it describes; ``None`` for
        the defaults.

    Returns
    -------
    CaseSettings or None
        The settings; ``None`` when a problem was found in the file or [project] could not
        be built.
    """
    file = source.file
    found_before = problems.count(file)
    extra: dict[str, Any] = {}
    built: dict[str, Any] = {}

    def report(key: str, message: str, fix: str) -> None:
        row, column = source.locate(key)
        problems.add(file, message, fix, row=row, column=column)

    for section, value in source.values.items():
        if section == "input":
            continue  # read with the files it describes (delay.case._dialect)
        if section not in SETTINGS_SECTIONS:
            extra[section] = value
        elif not isinstance(value, dict):
            report(
                section,
                f"'{section}' must be a section of settings",
                f"write [{section}] on a line of its own and its settings below it",
            )
    for section, cls in SETTINGS_SECTIONS.items():
        given = source.values.get(section, {})
        if not isinstance(given, dict):
            continue
        names = [f.name for f in dataclasses.fields(cls)]
        defaults = {f.name for f in dataclasses.fields(cls) if f.default is not dataclasses.MISSING}
        unknown = {k: v for k, v in given.items() if k not in names}
        if unknown:
            extra.setdefault(section, {}).update(unknown)
        arguments: dict[str, Any] = {}
        section_ok = True
        for name in names:
            key = f"{section}.{name}"
            if name not in given:
                if name not in defaults:
                    report(key, f"the setting {key} is missing", f"add it under [{section}]: {_example(cls, name)}")
                    section_ok = False
                continue
            value, error = _convert(cls, name, given[name])
            if error:
                report(key, f"{key} {error} (found {given[name]!r})", f"write it as {_example(cls, name)}")
                section_ok = False
            else:
                arguments[name] = value
        if section_ok:
            built[section] = cls(**arguments)
    project = built.get("project")
    if project is not None and project.contract_completion < project.contract_start:
        report(
            "project.contract_completion",
            "the contract completion date is before the contract start date",
            "check both dates in [project]",
        )
    if problems.count(file) > found_before or project is None:
        return None
    return CaseSettings(
        project=project,
        schedule=built.get("schedule", ScheduleSettings()),
        commercial=built.get("commercial", CommercialSettings()),
        analysis=built.get("analysis", AnalysisSettings()),
        report=built.get("report", ReportSettings()),
        input=input_settings or InputSettings(),
        extra=extra,
    )
