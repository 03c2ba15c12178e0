"""An empty case folder to start from: every file of case-format version 2 with its header.

:func:`write_skeleton` writes case.toml (every setting, each with a comment), the
calendars, a baseline snapshot holding one start milestone (so the skeleton loads as a
valid case), every optional file with its header row and no rows, and README-case.txt,
which explains each column of each file.
"""

from __future__ import annotations

import csv
import datetime as dt
import textwrap
from pathlib import Path

from delay.case._source import OPTIONAL_FILES
from delay.errors import CaseError, Problem
from delay.model import COLUMNS
from delay.output import new_folder

__all__ = ["write_skeleton", "FILE_GUIDE", "GUIDE_NAME"]

#: Name of the explanatory text file written into a new case folder.
GUIDE_NAME = "README-case.txt"

#: Each file of a case: (path, what it is for, [(column, meaning), ...]).
FILE_GUIDE: tuple[tuple[str, str, tuple[tuple[str, str], ...]], ...] = (
    (
        "calendars.csv",
        "The work calendars. Every activity counts its duration in the working days of one of them.",
        (
            ("calendar", "a short name for the calendar, used in the calendar column of other files; each name once"),
            ("workdays", "the weekdays on which work happens, separated by spaces, from Mon Tue Wed Thu Fri Sat Sun"),
        ),
    ),
    (
        "calendar_exceptions.csv",
        "Optional. Single dates on which a calendar departs from its "
        "weekdays: public holidays, shutdowns, or extra working days.",
        (
            ("calendar", "the calendar the date belongs to"),
            ("date", "the date, YYYY-MM-DD"),
            ("working", "no for a day off on a normal working weekday, yes for work on a day that is normally off"),
            ("reason", "free text, e.g. the name of the holiday"),
        ),
    ),
    (
        "snapshots/<folder>/snapshot.toml",
        "One folder per programme under snapshots/: the "
        "baseline folder holds the accepted as-planned programme, every other folder one "
        "progress update. snapshot.toml says which it is.",
        (
            ("label", "the name shown in the report, e.g. Update 03"),
            (
                "data_date",
                "the first day not yet reported on (for the baseline: the planned start); every snapshot has its own",
            ),
            ("kind", "baseline for the baseline, update for a progress update"),
        ),
    ),
    (
        "snapshots/<folder>/activities.csv",
        "The activities of that programme, one per row.",
        (
            (
                "id",
                "the activity's code; unique in the programme and the same in every "
                "snapshot for the same piece of work",
            ),
            ("name", "what the work is"),
            ("duration", "the planned duration in whole working days; 0 for a milestone"),
            ("calendar", "which calendar counts its days; blank means the default calendar of case.toml"),
            ("wbs", "the work breakdown code; model elements with the same code are built by this activity"),
            ("kind", "task (blank means task), start_milestone or finish_milestone"),
            ("constraint", "optional date constraint: earliest_start, latest_finish, fixed_start or fixed_finish"),
            ("constraint_date", "the date of that constraint, YYYY-MM-DD"),
            ("party", "who carries out the work, free text"),
            (
                "risk",
                "who carries the risk of this activity's own slippage when no event "
                "explains it: employer (e.g. employer-supplied information or free-issue "
                "items), contractor or neutral; blank means unexplained_risk of case.toml",
            ),
            ("actual_start", "updates only: the day the work started; blank if it has not"),
            ("actual_finish", "updates only: the day the work was finished; blank if it is not"),
            (
                "remaining",
                "updates only: working days still to go at the data date; needed (more than 0) for work in progress",
            ),
        ),
    ),
    (
        "snapshots/<folder>/links.csv",
        "The logic of that programme: which activity depends on which.",
        (
            ("pred", "the id of the activity that comes first"),
            ("succ", "the id of the activity that depends on it"),
            (
                "type",
                "FS (blank means FS): finish to start; SS start to start; FF finish to finish; SF start to finish",
            ),
            ("lag", "working days between the two, whole number; negative for an overlap; blank means 0"),
        ),
    ),
    (
        "asbuilt.csv",
        "Optional. The as-built record: when each activity really started and "
        "finished, from site diaries and other records. It takes precedence over the last "
        "update; activities not listed keep the last update's dates.",
        (
            ("id", "the activity's id"),
            ("actual_start", "the day it started"),
            ("actual_finish", "the day it finished"),
            ("source", "which record the dates come from"),
        ),
    ),
    (
        "corrections.csv",
        "Optional. Changes the analyst makes to the records, each with its "
        "reason. They are applied when the case is loaded and listed in every report beside "
        "the value they replace; the files themselves are never changed.",
        (
            ("snapshot", "the folder name or label of the snapshot, or asbuilt for the as-built record"),
            ("table", "activities or links"),
            ("key", "the activity's id, or PRED>SUCC for a link"),
            ("column", "the column to change; for a link also delete (remove the link) or add (create it)"),
            ("value", "the new value (blank clears the cell); for add, the type and lag, e.g. FS 0"),
            ("reason", "why the record is corrected, with the document that shows it"),
        ),
    ),
    (
        "attributions.csv",
        "Optional. The analyst's own attribution of the delay charged to "
        "an activity in a window, overriding the matching rule. Each one is applied in memory "
        "and listed in every output beside what the rule would have given, like a "
        "correction.",
        (
            (
                "window",
                "the label or folder of the snapshot that ends the window (any update, or asbuilt for the last window)",
            ),
            ("activity", "the id of the activity, in that snapshot, whose charge is attributed"),
            (
                "event",
                "the id of the event (events.csv) the charge is attributed to; leave it blank when a party is given",
            ),
            (
                "party",
                "employer, contractor or neutral, when no event explains the charge; "
                "leave it blank when an event is given",
            ),
            ("reason", "why, with the record that shows it (required)"),
        ),
    ),
    (
        "events.csv",
        "Optional. The register of delay events.",
        (
            ("id", "the event's reference, unique"),
            ("title", "a short description"),
            ("party", "who carries the risk: employer, contractor or neutral"),
            ("start", "the day the event began"),
            ("finish", "the day it ended"),
            ("activities", "the ids of the activities it affected, separated by ;"),
            (
                "impact",
                "how to model it: extend (lengthen the activities by days), hold (the "
                "activities do no work from start to finish, both days included, "
                "whatever their status; the rest of their work resumes after it) or "
                "fragnet (insert its rows of fragnets.csv)",
            ),
            ("days", "for extend: the working days added to each affected activity"),
            ("evidence", "the records that support the event"),
            ("notified", "the day it was notified under the contract"),
            ("claimed_days", "the extension of time claimed for it, in calendar days"),
            (
                "tia_update",
                "optional: the label or folder of the update that time impact "
                "analysis inserts the event into, instead of the one current when "
                "it began (the analyst's choice, disclosed)",
            ),
            (
                "asbuilt_activities",
                "optional: the as-built activities in which the event "
                "shows, separated by ;, for collapsed as-built (blank: the "
                "activities column, or the event's fragnet activities)",
            ),
        ),
    ),
    (
        "fragnets.csv",
        "Optional. Activities that an event adds to the programme.",
        (
            ("event", "the id of the event that adds it"),
            ("id", "the new activity's id, not used by any other activity"),
            ("name", "what the added work is"),
            ("duration", "its duration in whole working days"),
            ("calendar", "its calendar; blank means the default calendar"),
            ("wbs", "its work breakdown code"),
        ),
    ),
    (
        "fragnet_links.csv",
        "Optional. The links that tie the added activities into the programme.",
        (
            ("event", "the id of the event"),
            ("pred", "the id of the activity that comes first (an added one or one of the programme)"),
            ("succ", "the id of the activity that depends on it"),
            ("type", "FS, SS, FF or SF; blank means FS"),
            ("lag", "working days between the two; blank means 0"),
        ),
    ),
    (
        "elements.csv",
        "Optional. Elements of the building model, shown being built over time.",
        (
            ("id", "the element or asset tag, unique"),
            ("name", "what the element is"),
            ("wbs", "the work breakdown code of the activities that build it"),
            ("classification", "its classification code"),
            ("x", "the box's corner along x, in metres"),
            ("y", "the box's corner along y, in metres"),
            ("z", "the box's corner along z, in metres"),
            ("dx", "the box's size along x, in metres, not negative"),
            ("dy", "the box's size along y, in metres, not negative"),
            ("dz", "the box's size along z, in metres, not negative"),
            ("level", "the storey or level"),
            ("zone", "the zone or area"),
        ),
    ),
    (
        "sections.csv",
        "Optional. Parts of the works with their own completion dates.",
        (
            ("section", "the section's reference, unique"),
            ("name", "what the section is"),
            ("completion_activity", "the id of the milestone that marks its completion"),
            ("contract_completion", "its contractual completion date"),
            ("liquidated_damages_per_day", "its rate of damages per day of delay"),
        ),
    ),
    (
        "extensions_granted.csv",
        "Optional. Extensions of time already granted.",
        (
            ("id", "the reference of the award"),
            ("granted_on", "the day it was granted"),
            ("days", "the calendar days granted"),
            ("section", "the section it applies to; blank for the whole works"),
            ("events", "the ids of the events it was granted for, separated by ;"),
            ("reason", "free text"),
        ),
    ),
    (
        "prolongation_rates.csv",
        "Optional. The time-related cost of one day of prolongation, period by period.",
        (
            ("from", "the first day of the period"),
            ("to", "the last day of the period"),
            ("cost_per_day", "the cost of a day of prolongation in that period"),
        ),
    ),
)

#: case.toml of a new case: (section, key, value as TOML, comment). ``{start}``,
#: ``{completion}`` and ``{name}`` are filled in when it is written. A setting with no
#: default (value ``None``) is written as a comment, to be filled in when it applies.
_SETTINGS: tuple[tuple[str, str, str, str], ...] = (
    ("project", "name", '"{name}"', "the project's name, shown on every report"),
    ("project", "contract_start", "{start}", "the day the works may start under the contract"),
    ("project", "contract_completion", "{completion}", "the contractual completion date"),
    (
        "project",
        "completion_activity",
        None,
        "the milestone that marks completion of the whole works; left out: the finish "
        "milestone that finishes last in the baseline",
    ),
    ("schedule", "default_calendar", '"5d"', "the calendar of activities that name none (see calendars.csv)"),
    (
        "schedule",
        "progress",
        '"retained_logic"',
        'out-of-sequence progress: "retained_logic" keeps the logic into started work, "progress_override" ignores it',
    ),
    ("schedule", "lag_calendar", '"successor"', 'whose calendar counts a lag: "successor" or "predecessor"'),
    (
        "schedule",
        "float_to",
        '"project_finish"',
        'where the backward pass starts: "project_finish" or "contract_completion"',
    ),
    ("commercial", "currency", '"EUR"', "ISO 4217 code of all amounts"),
    (
        "commercial",
        "liquidated_damages_per_day",
        "0",
        "damages per day of delay to the whole works (sections.csv may set its own)",
    ),
    ("commercial", "liquidated_damages_cap", "0", "the most the damages can reach; 0: no cap"),
    (
        "commercial",
        "prolongation_cost_per_day",
        "0",
        "flat time-related cost per day; prolongation_rates.csv overrides it by period",
    ),
    ("analysis", "half_step", "true", "split every window into the effect of progress and the effect of revisions"),
    (
        "analysis",
        "concurrency",
        '"time_not_money"',
        'concurrent critical delay: "time_not_money" (time, no money) or "apportion"',
    ),
    (
        "analysis",
        "unexplained_risk",
        '"contractor"',
        'who carries slippage no event or risk column explains: "employer", "contractor" or "neutral"',
    ),
    (
        "report",
        "preferred_method",
        None,
        'the method the analyst relies on: "windows", "asbuilt", "impacted", "tia" or '
        '"collapsed"; left out: none is named',
    ),
    (
        "input",
        "delimiter",
        None,
        'the CSV files\' delimiter: ",", ";", "\\t" (tab) or "|"; left out: detected from '
        "each file's header row (validate says which)",
    ),
    (
        "input",
        "encoding",
        None,
        'the CSV files\' encoding: "utf-8", "cp1252" or "utf-16"; left out: UTF-8 (a byte-order mark always decides)',
    ),
    (
        "input",
        "date_format",
        '"%Y-%m-%d"',
        'how the CSV files write dates, e.g. "%d/%m/%Y" or "%d.%m.%Y"; YYYY-MM-DD is always read',
    ),
    ("input", "decimal", '"."', 'the decimal mark of numbers in the CSV files: "." or ","'),
    ("input", "columns", None, "per table, a header of your files (any case) read as a column of the format"),
)


def _case_toml(name: str, start: dt.date, completion: dt.date) -> str:
    values = {
        "name": name.replace("\\", "/").replace('"', "'"),
        "start": start.isoformat(),
        "completion": completion.isoformat(),
    }
    settings = [
        (section, f"{key} = {value.format(**values)}" if value is not None else f"# {key} = {_EXAMPLES[key]}", comment)
        for section, key, value, comment in _SETTINGS
    ]
    width = max(len(line) for _, line, _ in settings) + 2
    lines = [
        "# The facts of the project and the settings of the analysis.",
        "# Dates are written YYYY-MM-DD without quotes; text in double quotes.",
    ]
    section = None
    for name_of_section, line, comment in settings:
        if name_of_section != section:
            section = name_of_section
            lines += ["", f"[{section}]"]
        lines.append(f"{line.ljust(width)}# {comment}")
    return "\n".join(lines) + "\n"


#: An example for each setting that has no default (written as a comment line).
_EXAMPLES = {
    "completion_activity": '"FINISH"',
    "preferred_method": '"windows"',
    "delimiter": '";"',
    "encoding": '"cp1252"',
    "columns": '{ activities = { "Task No" = "id", "Task" = "name" } }',
}

_SNAPSHOT_TOML = """\
label = "Baseline"        # the name shown in the report
data_date = {start}     # for the baseline: the planned start
kind = "baseline"         # "baseline" here; "update" for every progress update
"""


def _guide_text() -> str:
    lines = [
        "A case for the delay analysis toolkit",
        "=====================================",
        "",
        "Every file is a CSV file in UTF-8 with a header row. Dates are written YYYY-MM-DD.",
        "Columns the toolkit does not know are kept and shown in the outputs. Files marked",
        "optional may stay as they are (a header row only) when they do not apply.",
        "case.toml holds the project's facts and the analysis settings; each line there",
        "has a comment. `delay validate FOLDER` checks the case and names every problem.",
        "The analyst's opinion may be written, in Markdown, in an optional opinion.md",
        "beside case.toml (UTF-8 text, at most 256 KiB); the report shows it.",
        "",
    ]
    for path, purpose, columns in FILE_GUIDE:
        lines.append(path)
        lines.append("-" * len(path))
        lines.extend(textwrap.wrap(purpose, 88, break_on_hyphens=False))
        width = max(len(c) for c, _ in columns)
        for column, meaning in columns:
            lines.extend(
                textwrap.wrap(
                    meaning,
                    88,
                    initial_indent=f"  {column.ljust(width)}  ",
                    subsequent_indent=" " * (width + 4),
                    break_on_hyphens=False,
                )
            )
        lines.append("")
    return "\n".join(lines)


def _write_csv(path: Path, header, rows=()) -> None:
    path.parent.mkdir(parents=True, exist_ok=True)
    with path.open("w", newline="", encoding="utf-8") as handle:
        writer = csv.writer(handle)
        writer.writerow(header)
        writer.writerows(rows)


def _next_monday(day: dt.date) -> dt.date:
    return day + dt.timedelta(days=(7 - day.weekday()) % 7)


def write_skeleton(directory: str | Path, *, project_name: str = "New project", start: dt.date | None = None) -> Path:
    """Write an empty, valid case into ``directory``, which must not exist or be empty.

    The case holds case.toml with every setting explained, the ``5d`` and ``7d``
    calendars, a baseline snapshot with one start milestone and no links, every optional
    file of the case format with its header row only, and :data:`GUIDE_NAME`, a text file
    explaining each column. The folder is built under a temporary name and moved into
    place (:func:`delay.output.new_folder`).

    Parameters
    ----------
    directory : str or Path
        The new case folder.
    project_name : str, default "New project"
        The project's name in case.toml.
    start : datetime.date, optional
        The contract start and baseline data date; by default the next Monday (today if
        it is a Monday). The contract completion is set 52 weeks later, on the Friday
        before.

    Returns
    -------
    Path
        ``directory``.

    Raises
    ------
    CaseError
        When ``directory`` is a file or a folder that is not empty; nothing is written.

    Examples
    --------
    >>> import tempfile
    >>> from pathlib import Path
    >>> from delay.case import load_case
    >>> with tempfile.TemporaryDirectory() as folder:
    ...     case = load_case(write_skeleton(Path(folder) / "new", start=dt.date(2026, 3, 2)))
    ...     case.settings.project.contract_start, case.settings.project.contract_completion
    (datetime.date(2026, 3, 2), datetime.date(2027, 2, 26))
    """
    directory = Path(directory)
    if directory.exists() and (not directory.is_dir() or any(directory.iterdir())):
        what = "a folder that is not empty" if directory.is_dir() else "a file"
        raise CaseError(
            Problem(
                file=str(directory),
                message=f"cannot write a new case here: it is {what}",
                fix="give the path of a new or empty folder",
            )
        )
    start = start or _next_monday(dt.date.today())
    completion = start + dt.timedelta(weeks=52, days=-3)
    # built under a temporary name and moved into place (delay.output.new_folder)
    with new_folder(directory) as staging:
        (staging / "case.toml").write_text(_case_toml(project_name, start, completion), encoding="utf-8")
        _write_csv(
            staging / "calendars.csv",
            COLUMNS["calendars"],
            [
                ("5d", "Mon Tue Wed Thu Fri"),
                ("7d", "Mon Tue Wed Thu Fri Sat Sun"),
            ],
        )
        baseline = staging / "snapshots" / "baseline"
        baseline.mkdir(parents=True)
        (baseline / "snapshot.toml").write_text(_SNAPSHOT_TOML.format(start=start.isoformat()), encoding="utf-8")
        start_milestone = {"id": "START", "name": "Start of works", "duration": "0", "kind": "start_milestone"}
        _write_csv(
            baseline / "activities.csv",
            COLUMNS["activities"],
            [[start_milestone.get(c, "") for c in COLUMNS["activities"]]],
        )
        _write_csv(baseline / "links.csv", COLUMNS["links"])
        for name in OPTIONAL_FILES:
            _write_csv(staging / f"{name}.csv", COLUMNS[name])
        (staging / GUIDE_NAME).write_text(_guide_text(), encoding="utf-8")
    return directory
