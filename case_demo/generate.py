"""Generate the bundled demo case: Tessaly Wharf, a fictitious mixed-use building in Brennholm.

Run ``python case_demo/generate.py`` (optionally ``--output DIR``). The output is a case folder
in case-format v2 (shared/case-format.md) written beside this script. The generator is
deterministic: a fixed seed, no clock, the same files on every run.

Everything in the case is invented: the project, the town, the companies, the documents. No
real person, firm or project is meant.

The scenario's facts are data in ``scenario/`` beside this script (its README.md explains
every file and column): the contract, the calendars and their holidays, the accepted
baseline's activities and links, the delay events and what each did to the works, the
contractor's re-planning, the record defects and disclosed corrections, the layout of the
model elements and the README's text. This script computes from them.

How the dates come about
------------------------
1. The accepted baseline programme is ``scenario/activities.csv`` and ``links.csv``.
2. "What actually happened" is the baseline network changed by the delay events
   (``effects.csv``: longer durations; holds, which stop work on their activities from the
   hold's first to its last day, whether the work has started or not, so that the work
   before a hold stands and the rest resumes after it), by the contractor's re-planning
   (``revisions.csv``, with the activities it adds), by a little seeded variation of the
   contractor's own durations, and by the actual sequence of the works (one activity
   started before its predecessor finished). A forward pass over that actual network,
   following the time convention of the case format, gives every actual date.
3. Every month end is a data date. Each progress update is the programme then in force
   (baseline plus the revisions made so far) with the actual dates that lie before the data
   date; an activity in progress carries the work days still to do as its remaining
   duration. The as-built record is the actual dates of every activity.
4. The event register is dated from what happened (``events.csv`` names the dates or the
   activities whose actual dates date the event); a fragnet event's ``asbuilt_activities``
   are the activities the contractor added for it, which carry its work in the as-built.

Deliberate record defects (``scenario/records.toml``; a checker must find each of them, and
KNOWN_DEFECTS.json lists the same, machine-readable): duplicate model elements, elements whose
work breakdown code matches no activity, and a retrospective edit of an actual finish.
Disclosed corrections (corrections.csv; not defects, the analyst has already corrected them):
a mis-keyed remaining duration, a link omitted from one update, a wrong as-built start.

Nothing else is meant to be wrong: ids are unique, every link names known activities, no
snapshot has a logic loop, every element other than the planted ones is unique and linked.
"""

from __future__ import annotations

import argparse
import copy
import csv
import datetime as dt
import fnmatch
import io
import json
import os
import shutil
import string
import sys
import tempfile
import textwrap
import tomllib
from collections import defaultdict
from dataclasses import dataclass
from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent
SCENARIO = HERE / "scenario"


class CaseCheckError(Exception):
    """The generated case would break a rule of the case format or of its own story."""


def require(condition: bool, message: str):
    if not condition:
        raise CaseCheckError(message)


# ---------------------------------------------------------------------------------------
# The scenario tables
# ---------------------------------------------------------------------------------------


def read_csv(path: Path) -> list[dict[str, str]]:
    with path.open(encoding="utf-8", newline="") as handle:
        return list(csv.DictReader(handle))


def read_toml(path: Path) -> dict:
    return tomllib.loads(path.read_text(encoding="utf-8"))


def split_ids(text: str) -> list[str]:
    return [part for part in text.split(";") if part]


def optional_date(text: str) -> dt.date | None:
    return dt.date.fromisoformat(text) if text else None


@dataclass
class Scenario:
    """Every file of ``scenario/``: TOML files as dicts, CSV files as lists of text rows."""

    project: dict
    calendars: dict
    story: dict
    records: dict
    layout: dict
    activities: list[dict]
    links: list[dict]
    events: list[dict]
    effects: list[dict]
    added: list[dict]
    added_links: list[dict]
    revisions: list[dict]
    fragnets: list[dict]
    fragnet_links: list[dict]
    sections: list[dict]
    extensions: list[dict]
    prolongation: list[dict]
    elements: list[dict]
    readme: str

    @property
    def start(self) -> dt.date:
        return self.project["project"]["contract_start"]

    @property
    def completion_date(self) -> dt.date:
        return self.project["project"]["contract_completion"]

    @property
    def completion(self) -> str:
        """The milestone of the whole of the Works."""
        return self.project["project"]["completion_activity"]

    @property
    def section(self) -> dict:
        """The section that is not the whole of the Works (Section 1)."""
        return next(s for s in self.sections if s["completion_activity"] != self.completion)

    @property
    def site(self) -> str:
        return self.project["schedule"]["default_calendar"]

    def added_row(self, aid: str) -> dict:
        return next(r for r in self.added if r["id"] == aid)


def load_scenario(folder: Path = SCENARIO) -> Scenario:
    tables = {
        name: read_csv(folder / f"{file}.csv")
        for name, file in (
            ("activities", "activities"),
            ("links", "links"),
            ("events", "events"),
            ("effects", "effects"),
            ("added", "added_activities"),
            ("added_links", "added_links"),
            ("revisions", "revisions"),
            ("fragnets", "fragnets"),
            ("fragnet_links", "fragnet_links"),
            ("sections", "sections"),
            ("extensions", "extensions_granted"),
            ("prolongation", "prolongation_rates"),
            ("elements", "elements"),
        )
    }
    settings = {
        name: read_toml(folder / f"{name}.toml") for name in ("project", "calendars", "story", "records", "layout")
    }
    return Scenario(**settings, **tables, readme=(folder / "readme.md").read_text(encoding="utf-8"))


# ---------------------------------------------------------------------------------------
# Calendars
# ---------------------------------------------------------------------------------------

WEEKDAYS = ["Mon", "Tue", "Wed", "Thu", "Fri", "Sat", "Sun"]


def easter_sunday(year: int) -> dt.date:
    """Gregorian Easter Sunday (the anonymous Gregorian algorithm, Meeus/Jones/Butcher)."""
    a, b, c = year % 19, year // 100, year % 100
    d, e = b // 4, b % 4
    f = (b + 8) // 25
    g = (b - f + 1) // 3
    h = (19 * a + b - d - g + 15) % 30
    i, k = c // 4, c % 4
    el = (32 + 2 * e + 2 * i - h - k) % 7
    m = (a + 11 * h + 22 * el) // 451
    month = (h + el - 7 * m + 114) // 31
    day = ((h + el - 7 * m + 114) % 31) + 1
    return dt.date(year, month, day)


def nth_weekday(year: int, month: int, weekday: int, n: int) -> dt.date:
    first = dt.date(year, month, 1)
    offset = (weekday - first.weekday()) % 7
    return first + dt.timedelta(days=offset + 7 * (n - 1))


def holiday_date(rule: dict, year: int) -> dt.date:
    if "easter" in rule:
        return easter_sunday(year) + dt.timedelta(days=rule["easter"])
    if "weekday" in rule:
        return nth_weekday(year, rule["month"], WEEKDAYS.index(rule["weekday"]), rule["n"])
    return dt.date(year, rule["month"], rule["day"])


def calendar_exceptions(scn: Scenario) -> list[dict]:
    """The non-working days of ``calendars.toml``: holidays of each year, then shutdowns."""
    rows: list[dict] = []
    seen: set[tuple[str, dt.date]] = set()

    def off(calendar: str, day: dt.date, reason: str):
        if day.weekday() < 5 and (calendar, day) not in seen:  # weekends are not work days
            seen.add((calendar, day))
            rows.append({"calendar": calendar, "date": day, "working": "no", "reason": reason})

    rules = scn.calendars["holiday"]
    for year in scn.calendars["years"]:
        days = sorted((holiday_date(r, year), r["reason"], r["calendar"]) for r in rules)
        for day, reason, calendar in days:
            off(calendar, day, reason)
    for shutdown in scn.calendars["shutdown"]:
        day = shutdown["first"]
        while day <= shutdown["last"]:
            off(shutdown["calendar"], day, shutdown["reason"])
            day += dt.timedelta(days=1)
    rows.sort(key=lambda r: (r["calendar"], r["date"]))
    return rows


class WorkCalendar:
    """Work days of one calendar as a sorted numpy array of dates (numpy busday functions)."""

    def __init__(
        self, name: str, workdays: str, holidays: list[dt.date], extra: list[dt.date], horizon: tuple[dt.date, dt.date]
    ):
        self.name = name
        first, last = (np.datetime64(d, "D") for d in horizon)
        every_day = np.arange(first, last + 1, dtype="datetime64[D]")
        working = np.is_busday(every_day, weekmask=workdays, holidays=np.array(holidays, dtype="datetime64[D]"))
        if extra:
            working |= np.isin(every_day, np.array(extra, dtype="datetime64[D]"))
        self.days = every_day[working]

    def on_or_after(self, day: dt.date) -> int:
        """Boundary before the first work day on or after ``day`` (a start rolls forward)."""
        return int(np.searchsorted(self.days, np.datetime64(day, "D"), side="left"))

    def after(self, day: dt.date) -> int:
        """Boundary at the end of ``day``: before the first work day after it."""
        return int(np.searchsorted(self.days, np.datetime64(day, "D"), side="right"))

    def date(self, index: int) -> dt.date:
        return self.days[index].astype(dt.date)

    def add_workdays(self, day: dt.date, n: int) -> dt.date:
        """The work day ``n`` work days after the first work day on or after ``day``."""
        return self.date(self.on_or_after(day) + n)

    def count(self, first: dt.date, last: dt.date) -> int:
        """Work days in ``first .. last`` inclusive."""
        return self.after(last) - self.on_or_after(first)


def build_calendars(scn: Scenario, exceptions: list[dict]) -> dict[str, WorkCalendar]:
    horizon = tuple(scn.calendars["horizon"])
    out = {}
    for c in scn.calendars["calendar"]:
        mine = [r for r in exceptions if r["calendar"] == c["name"]]
        out[c["name"]] = WorkCalendar(
            c["name"],
            c["workdays"],
            [r["date"] for r in mine if r["working"] == "no"],
            [r["date"] for r in mine if r["working"] == "yes"],
            horizon,
        )
    return out


def calendar_rows(scn: Scenario) -> list[dict]:
    return [{"calendar": c["name"], "workdays": c["workdays"]} for c in scn.calendars["calendar"]]


# ---------------------------------------------------------------------------------------
# The programme network
# ---------------------------------------------------------------------------------------


@dataclass
class Activity:
    id: str
    name: str
    duration: int
    wbs: str
    calendar: str = ""
    kind: str = "task"
    constraint: str = ""
    constraint_date: dt.date | None = None
    party: str = ""
    risk: str = ""  # who carries its own unexplained slippage (case format v2); blank: default


@dataclass(frozen=True)
class Link:
    pred: str
    succ: str
    type: str = "FS"
    lag: int = 0


def activity_of(row: dict) -> Activity:
    """An activity from a row of ``scenario/activities.csv``."""
    return Activity(
        row["id"],
        row["name"],
        int(row["duration"]),
        row["wbs"],
        row["calendar"],
        row["kind"] or "task",
        row["constraint"],
        optional_date(row["constraint_date"]),
        row["party"],
        row["risk"],
    )


def link_of(row: dict) -> Link:
    return Link(row["pred"], row["succ"], row["type"] or "FS", int(row["lag"] or 0))


class Programme:
    """Activities (in WBS order) and links of one programme."""

    def __init__(self):
        self.activities: dict[str, Activity] = {}
        self.links: list[Link] = []

    def copy(self) -> Programme:
        other = Programme()
        other.activities = {k: copy.copy(v) for k, v in self.activities.items()}
        other.links = list(self.links)
        return other

    def add(self, activity: Activity):
        if activity.id in self.activities:
            raise ValueError(f"activity {activity.id} defined twice")
        self.activities[activity.id] = activity

    def link(self, link: Link):
        if any(lk.pred == link.pred and lk.succ == link.succ for lk in self.links):
            raise ValueError(f"link {link.pred}>{link.succ} defined twice")
        self.links.append(link)

    def remove_link(self, pred: str, succ: str):
        before = len(self.links)
        self.links = [lk for lk in self.links if not (lk.pred == pred and lk.succ == succ)]
        if len(self.links) != before - 1:
            raise ValueError(f"no link {pred}>{succ} to remove")

    def remove_activity(self, id: str):
        del self.activities[id]
        self.links = [lk for lk in self.links if id not in (lk.pred, lk.succ)]

    def insert_after(self, anchor: str, activity: Activity):
        """Insert ``activity`` right after ``anchor`` in the WBS order of the table."""
        items = list(self.activities.items())
        position = [k for k, _ in items].index(anchor) + 1
        items.insert(position, (activity.id, activity))
        self.activities = dict(items)


def baseline_programme(scn: Scenario) -> Programme:
    """The accepted as-planned programme of ``scenario/activities.csv`` and ``links.csv``."""
    p = Programme()
    for row in scn.activities:
        p.add(activity_of(row))
    for row in scn.links:
        p.link(link_of(row))
    return p


# ---------------------------------------------------------------------------------------
# Forward pass (the case format's time convention and scheduling rules 1 to 3)
# ---------------------------------------------------------------------------------------


@dataclass
class Timing:
    start: dt.date
    finish: dt.date
    early_start: int  # boundary on the activity's own calendar
    early_finish: int
    logic_start: int  # where logic alone would have started it (before holds)


@dataclass(frozen=True)
class Progress:
    actual_start: dt.date | None = None
    actual_finish: dt.date | None = None
    remaining: int | None = None


@dataclass(frozen=True)
class Hold:
    """No work on ``activities`` from ``first`` to ``last`` (an event of the actual works)."""

    event: str
    first: dt.date
    last: dt.date
    activities: frozenset[str]


def milestone_kind(activity: Activity, has_predecessor: bool) -> str | None:
    if activity.kind in ("start_milestone", "finish_milestone"):
        return activity.kind
    if activity.duration == 0:
        return "finish_milestone" if has_predecessor else "start_milestone"
    return None


def topological_order(programme: Programme) -> list[str]:
    """Kahn's algorithm; raises ``ValueError`` naming the activities left in a loop."""
    indegree = {a: 0 for a in programme.activities}
    successors = defaultdict(list)
    for lk in programme.links:
        indegree[lk.succ] += 1
        successors[lk.pred].append(lk.succ)
    ready = [a for a in programme.activities if indegree[a] == 0]
    order = []
    while ready:
        a = ready.pop(0)
        order.append(a)
        for s in successors[a]:
            indegree[s] -= 1
            if indegree[s] == 0:
                ready.append(s)
    if len(order) != len(programme.activities):
        raise ValueError(f"logic loop among {sorted(set(programme.activities) - set(order))}")
    return order


def complete_timing(cal: WorkCalendar, milestone: str | None, prog: Progress) -> Timing:
    """A complete activity: its actual dates stand."""
    if milestone == "start_milestone":
        b = cal.on_or_after(prog.actual_start or prog.actual_finish)
        return Timing(prog.actual_finish, prog.actual_finish, b, b, b)
    if milestone == "finish_milestone":
        b = cal.after(prog.actual_finish)
        return Timing(prog.actual_finish, prog.actual_finish, b, b, b)
    es, ef = cal.on_or_after(prog.actual_start), cal.after(prog.actual_finish)
    return Timing(prog.actual_start, prog.actual_finish, es, ef, es)


def logic_bound(
    programme: Programme, calendars, timings, incoming, aid: str, milestone, duration: int, start: int
) -> int:
    """The latest start that the links into ``aid`` allow, from ``start`` on."""
    a = programme.activities[aid]
    cal = calendars[a.calendar]
    for lk in incoming[aid]:
        pred = timings[lk.pred]
        pa = programme.activities[lk.pred]
        from_finish = lk.type in ("FS", "FF")
        if pa.calendar == a.calendar:
            point = pred.early_finish if from_finish else pred.early_start
        else:
            if milestone or milestone_kind(pa, bool(incoming[lk.pred])):
                raise ValueError(f"cross-calendar link {lk} involves a milestone")
            point = cal.after(pred.finish) if from_finish else cal.on_or_after(pred.start)
        bound = point + lk.lag
        if lk.type in ("FF", "SF"):
            bound -= duration
        start = max(start, bound)
    return start


def stopped_days(cal: WorkCalendar, hold: Hold) -> range:
    """The work days of ``cal`` on which ``hold`` stops work, as day indices."""
    return range(cal.on_or_after(hold.first), cal.after(hold.last))


def work_around(cal: WorkCalendar, start: int, duration: int, holds: list[Hold]) -> tuple[int, int, list[Hold]]:
    """Start and finish boundaries of ``duration`` work days from ``start`` that do no work
    on the days of ``holds`` (both ends inclusive): a start inside a hold moves after it, work
    in progress when a hold begins stops there and the rest resumes after it. Also returns
    the holds that moved some of the work (a hold on work done before it, or on work that
    starts after it, has no effect)."""
    stopped = set()
    for hold in holds:
        stopped.update(stopped_days(cal, hold))
    first = start
    while start in stopped:
        start += 1
    day, left = start, duration
    while left > 0:
        left -= day not in stopped
        day += 1
    finish = day if duration else start
    moved = [h for h in holds if any(first <= k < finish for k in stopped_days(cal, h))]
    return start, finish, moved


def forward_pass(
    programme: Programme,
    calendars: dict[str, WorkCalendar],
    data_date: dt.date,
    progress: dict[str, Progress] | None = None,
    holds: list[Hold] | None = None,
    held: dict[str, set[str]] | None = None,
    not_before: dict[str, dt.date] | None = None,
) -> dict[str, Timing]:
    """Early dates of every activity.

    ``progress`` gives actual dates and remaining durations (retained logic). For the
    actual network, ``holds`` stop work on the listed activities from the first to the last
    day of each hold (see ``work_around``); ``held`` collects, per event, the activities a
    hold actually moved; ``not_before`` keeps an activity from starting before a date
    (materials not yet on site).
    """
    progress = progress or {}
    not_before = not_before or {}
    holds = holds or []
    incoming = defaultdict(list)
    for lk in programme.links:
        incoming[lk.succ].append(lk)
    timings: dict[str, Timing] = {}
    for aid in topological_order(programme):
        a = programme.activities[aid]
        cal = calendars[a.calendar]
        milestone = milestone_kind(a, bool(incoming[aid]))
        prog = progress.get(aid, Progress())
        if prog.actual_finish is not None:
            timings[aid] = complete_timing(cal, milestone, prog)
            continue
        in_progress = prog.actual_start is not None
        duration = prog.remaining if prog.remaining is not None else a.duration
        start = cal.on_or_after(data_date)
        if milestone == "finish_milestone":
            start += 1  # a not-started milestone is never dated before the data date
        start = logic_bound(programme, calendars, timings, incoming, aid, milestone, duration, start)
        if not in_progress and a.constraint == "earliest_start":
            start = max(start, cal.on_or_after(a.constraint_date))
        logic_start = start
        if not in_progress and aid in not_before:
            start = max(start, cal.on_or_after(not_before[aid]))
        finish_boundary = start + duration
        mine = [h for h in holds if aid in h.activities] if not in_progress else []
        if mine:
            require(milestone is None, f"a hold on the milestone {aid}")
            start, finish_boundary, moved = work_around(cal, start, duration, mine)
            for hold in moved:
                if held is not None:
                    held.setdefault(hold.event, set()).add(aid)
        if milestone == "start_milestone":
            when = cal.date(start)
            timings[aid] = Timing(when, when, start, start, logic_start)
        elif milestone == "finish_milestone":
            when = cal.date(start - 1)
            timings[aid] = Timing(when, when, start, start, logic_start)
        else:
            first_day = prog.actual_start if in_progress else cal.date(start)
            es = cal.on_or_after(prog.actual_start) if in_progress else start
            timings[aid] = Timing(first_day, cal.date(finish_boundary - 1), es, finish_boundary, logic_start)
    return timings


def completion_of(timings: dict[str, Timing]) -> dt.date:
    return max(t.finish for t in timings.values())


# ---------------------------------------------------------------------------------------
# What actually happened
# ---------------------------------------------------------------------------------------


def on_site(row: dict, calendars) -> dt.date | None:
    """When the materials of an added activity are on site (``on_site_from`` plus the lead
    time in work days); the contractor's programme shows it as an earliest start."""
    if not row["on_site_from"]:
        return None
    return calendars[row["calendar"]].add_workdays(dt.date.fromisoformat(row["on_site_from"]), int(row["lead_days"]))


def add_to(scn: Scenario, programme: Programme, aid: str, planned: bool, calendars):
    """Add an activity of ``added_activities.csv`` and its links, as programmed (``planned``)
    or as it was carried out."""
    row = scn.added_row(aid)
    duration = int(row["duration"] if planned else row["actual_duration"])
    activity = Activity(aid, row["name"], duration, row["wbs"], row["calendar"], "task", "", None, row["party"])
    if planned and row["on_site_from"]:
        activity.constraint, activity.constraint_date = "earliest_start", on_site(row, calendars)
    programme.insert_after(row["after"], activity)
    for lk in scn.added_links:
        if lk["activity"] == aid:
            programme.link(link_of(lk))


def revise(scn: Scenario, programme: Programme, revision: dict, planned: bool, calendars):
    """Apply one row of ``revisions.csv`` to ``programme``."""
    kind = revision["kind"]
    if kind == "added activity":
        add_to(scn, programme, revision["activity"], planned, calendars)
    elif kind == "deleted activity":
        programme.remove_activity(revision["activity"])
    elif kind == "duration change":
        for aid in split_ids(revision["activities"]):
            programme.activities[aid].duration = int(revision["duration"])
    elif kind == "logic change":
        programme.remove_link(revision["pred"], revision["succ"])
        programme.link(link_of(revision))
    else:
        raise CaseCheckError(f"revisions.csv: unknown kind {kind!r}")


@dataclass
class ActualWorks:
    programme: Programme
    timings: dict[str, Timing]
    holds: list[Hold]
    held: dict[str, set[str]]
    not_before: dict[str, dt.date]
    out_of_sequence: tuple[str, str] | None
    variation: dict[str, int]


def named_activities(scn: Scenario) -> set[str]:
    """Activities that an event or a re-planning names by id: their durations are the
    story's, untouched by the contractor's own variation."""
    named = {r["id"] for r in scn.added}
    for effect in scn.effects:
        named |= {aid for aid in split_ids(effect["activities"]) if "*" not in aid}
    for revision in scn.revisions:
        if revision["kind"] == "duration change":
            named |= set(split_ids(revision["activities"]))
    return named


def contractor_variation(scn: Scenario, programme: Programme) -> dict[str, int]:
    """Seeded variation of the contractor's own task durations (``story.toml``)."""
    rule = scn.story["variation"]
    touched = named_activities(scn)
    candidates = [
        a.id
        for a in programme.activities.values()
        if a.party == rule["party"]
        and a.calendar == rule["calendar"]
        and a.duration >= rule["min_duration"]
        and a.id not in touched
    ]
    rng = np.random.default_rng(rule["seed"])
    draws = rng.choice(np.array(rule["draws"]), size=len(candidates))
    return {aid: int(d) for aid, d in zip(candidates, draws) if d != 0}


def event_row(scn: Scenario, event: str) -> dict:
    return next(e for e in scn.events if e["id"] == event)


def actual_holds(scn: Scenario, programme: Programme, without: frozenset[str]) -> list[Hold]:
    """The holds of ``effects.csv`` over their events' dates; ``*`` in an id is a wildcard."""
    holds = []
    for effect in scn.effects:
        if effect["effect"] != "hold" or effect["event"] in without:
            continue
        event = event_row(scn, effect["event"])
        patterns = split_ids(effect["activities"])
        ids = frozenset(aid for aid in programme.activities if any(fnmatch.fnmatchcase(aid, p) for p in patterns))
        require(
            all("*" in p or p in ids for p in patterns),
            f"effects.csv: hold of {effect['event']} names an unknown activity",
        )
        holds.append(
            Hold(effect["event"], dt.date.fromisoformat(event["start"]), dt.date.fromisoformat(event["finish"]), ids)
        )
    return holds


def simulate_actual(
    scn: Scenario,
    baseline: Programme,
    calendars: dict[str, WorkCalendar],
    out_of_sequence: tuple[str, str] | None,
    without: frozenset[str] = frozenset(),
    variation: dict[str, int] | None = None,
) -> ActualWorks:
    """The actual works: the baseline with every event, the re-planning, the contractor's
    own variation of durations and the actual sequence. ``without`` leaves events out (a
    but-for run for the README; ``variation`` then repeats the full run's variation)."""
    p = baseline.copy()
    not_before = {}
    for revision in scn.revisions:
        if revision["kind"] == "added activity":
            row = scn.added_row(revision["activity"])
            if row["event"] in without:
                continue
            if row["on_site_from"]:
                not_before[row["id"]] = on_site(row, calendars)
        revise(scn, p, revision, False, calendars)
    for effect in scn.effects:
        if effect["effect"] == "extend" and effect["event"] not in without:
            for aid in split_ids(effect["activities"]):
                p.activities[aid].duration += int(effect["days"])
    holds = actual_holds(scn, p, without)
    if variation is None:
        variation = contractor_variation(scn, p)
    for aid, delta in variation.items():
        if aid in p.activities:
            p.activities[aid].duration = max(1, p.activities[aid].duration + delta)
    if out_of_sequence is not None:  # the actual sequence
        pred, succ = out_of_sequence
        p.remove_link(pred, succ)
        p.link(Link(pred, succ, "SS", scn.story["out_of_sequence"]["lag"]))
    held: dict[str, set[str]] = {}
    timings = forward_pass(p, calendars, scn.start, holds=holds, held=held, not_before=not_before)
    return ActualWorks(p, timings, holds, held, not_before, out_of_sequence, variation)


def but_for(scn: Scenario, baseline, calendars, works: ActualWorks) -> dict[str, tuple[dt.date, dt.date]]:
    """Completion and Section 1 of the actual works with each event taken out alone."""
    out = {}
    for event in scn.events:
        t = simulate_actual(
            scn, baseline, calendars, works.out_of_sequence, frozenset([event["id"]]), works.variation
        ).timings
        out[event["id"]] = (t[scn.completion].finish, t[scn.section["completion_activity"]].finish)
    return out


def month_ends(first: dt.date, before: dt.date) -> list[dt.date]:
    out = []
    year, month = first.year, first.month
    while True:
        nxt = dt.date(year + month // 12, month % 12 + 1, 1)
        end = nxt - dt.timedelta(days=1)
        if end >= before:
            return out
        if end >= first:
            out.append(end)
        year, month = nxt.year, nxt.month


def choose_out_of_sequence(scn: Scenario, baseline, calendars) -> tuple[ActualWorks, list[dt.date]]:
    """The actual works, with the first pair of ``story.toml`` whose successor's start before
    its predecessor finished shows in a monthly update (an out-of-sequence record)."""
    for pair in scn.story["out_of_sequence"]["pairs"]:
        pair = tuple(pair)
        works = simulate_actual(scn, baseline, calendars, pair)
        dates = month_ends(scn.start, completion_of(works.timings))
        pred, succ = works.timings[pair[0]], works.timings[pair[1]]
        if any(succ.start < d <= pred.finish for d in dates):
            return works, dates
    raise CaseCheckError("no pair shows the out-of-sequence progress in an update")


# ---------------------------------------------------------------------------------------
# The monthly updates
# ---------------------------------------------------------------------------------------


def resolve_date(text: str, timings: dict[str, Timing]) -> dt.date:
    """A date of a scenario table: ``YYYY-MM-DD``, or ``start:ID`` / ``finish:ID``, the actual
    start or finish of activity ID."""
    if ":" in text:
        which, aid = text.split(":", 1)
        return {"start": timings[aid].start, "finish": timings[aid].finish}[which]
    return dt.date.fromisoformat(text)


@dataclass
class Revision:
    first_data_date: dt.date  # first update that shows it: data dates on or after this
    kind: str  # added activity / deleted activity / duration change / logic change
    text: str
    row: dict  # the row of revisions.csv


def revisions(scn: Scenario, works: ActualWorks) -> list[Revision]:
    """The contractor's re-planning, each shown in the updates after the day it was adopted."""
    out = [
        Revision(resolve_date(r["adopted_on"], works.timings) + dt.timedelta(days=1), r["kind"], r["text"], r)
        for r in scn.revisions
    ]
    return sorted(out, key=lambda r: r.first_data_date)


def programme_at(scn: Scenario, baseline: Programme, data_date: dt.date, revs: list[Revision], calendars) -> Programme:
    p = baseline.copy()
    for r in revs:
        if data_date >= r.first_data_date:
            revise(scn, p, r.row, True, calendars)
    return p


def progress_at(
    programme: Programme, works: ActualWorks, calendars, data_date: dt.date, hidden: dict[str, tuple[dt.date, int]]
) -> dict[str, Progress]:
    """What the update reports at ``data_date``: actual dates before it, remaining work.

    The remaining duration of work in progress is the work days it actually still took
    (days on which a hold stopped it are not work), less any extension ``hidden`` from the
    update because its cause had not yet arisen (an extension of ``days`` that becomes known
    on ``date``).
    """
    out: dict[str, Progress] = {}
    for aid, a in programme.activities.items():
        t = works.timings.get(aid)
        if t is None or t.start >= data_date:
            continue  # not started (or never built)
        if a.duration == 0 or a.kind != "task":
            if t.finish < data_date:
                out[aid] = Progress(t.start, t.finish, 0)
            continue
        if t.finish < data_date:
            out[aid] = Progress(t.start, t.finish, 0)
        else:
            cal = calendars[a.calendar]
            remaining = cal.count(data_date, t.finish) - sum(
                cal.count(max(h.first, data_date), min(h.last, t.finish))
                for h in works.holds
                if aid in h.activities and max(h.first, data_date) <= min(h.last, t.finish)
            )
            known_from, days = hidden.get(aid, (data_date, 0))
            if data_date < known_from:
                remaining = max(1, remaining - days)
            out[aid] = Progress(t.start, None, remaining)
    return out


@dataclass
class Update:
    folder: str
    label: str
    data_date: dt.date
    programme: Programme
    progress: dict[str, Progress]


def build_updates(scn, baseline, works, calendars, data_dates, hidden) -> list[Update]:
    revs = revisions(scn, works)
    updates = []
    for number, data_date in enumerate(data_dates, start=1):
        p = programme_at(scn, baseline, data_date, revs, calendars)
        updates.append(
            Update(
                data_date.isoformat(),
                f"Update {number:02d}",
                data_date,
                p,
                progress_at(p, works, calendars, data_date, hidden),
            )
        )
    return updates


# ---------------------------------------------------------------------------------------
# The delay event register
# ---------------------------------------------------------------------------------------


def register_activities(scn: Scenario, event: dict, works: ActualWorks) -> tuple[list[str], str]:
    """The affected activities and days of an event as the register gives them: for an
    extension its effect's, for a hold the activities it held, for a fragnet the table's."""
    effects = [e for e in scn.effects if e["event"] == event["id"]]
    if event["impact"] == "extend":
        require(
            len(effects) == 1 and effects[0]["effect"] == "extend",
            f"{event['id']}: an extension needs one extend row in effects.csv",
        )
        return split_ids(effects[0]["activities"]), effects[0]["days"]
    if event["impact"] == "hold":
        held = sorted(works.held.get(event["id"], ()))
        require(held, f"{event['id']}: the hold holds no activity in the actual works")
        for effect in effects:
            for aid in split_ids(effect["activities"]):
                require("*" in aid or aid in held, f"{event['id']}: the hold does not hold {aid} in the actual works")
        return held, ""
    return split_ids(event["activities"]), ""


def asbuilt_activities(scn: Scenario, event: dict) -> list[str]:
    """Where the as-built record shows an event, when that is not the register's default:
    a fragnet's activities are never built under their own ids, the activities the
    contractor added for the event carry its work."""
    if event["impact"] != "fragnet":
        return []
    added = [r["id"] for r in scn.added if r["event"] == event["id"]]
    require(added, f"{event['id']}: its fragnet is not in the as-built and no added activity carries its work")
    return added


def derive_events(scn: Scenario, works: ActualWorks):
    """The register dated from what happened. Returns (events rows, extensions hidden from
    the updates until their cause arose: id -> (date known, days))."""
    t = works.timings
    rows, hidden = [], {}
    for event in scn.events:
        start, finish = resolve_date(event["start"], t), resolve_date(event["finish"], t)
        activities, days = register_activities(scn, event, works)
        notified = None
        if event["notified_from"]:
            notified = {"start": start, "finish": finish}[event["notified_from"]] + dt.timedelta(
                days=int(event["notified_after_days"])
            )
        rows.append(
            {
                "id": event["id"],
                "title": event["title"],
                "party": event["party"],
                "start": start,
                "finish": finish,
                "activities": ";".join(activities),
                "impact": event["impact"],
                "days": days,
                "evidence": event["evidence"].format(start=start, finish=finish),
                "notified": notified,
                "claimed_days": event["claimed_days"],
                "asbuilt_activities": ";".join(asbuilt_activities(scn, event)),
            }
        )
        for effect in scn.effects:
            if effect["event"] == event["id"] and effect["effect"] == "extend":
                for aid in split_ids(effect["activities"]):
                    require(
                        event["impact"] != "extend" or (t[aid].start <= finish and start <= t[aid].finish),
                        f"{event['id']}: {aid} does not run during the event",
                    )
                    if effect["known_from"] == "start":
                        hidden[aid] = (start, int(effect["days"]))
    rows.sort(key=lambda r: r["id"])
    starts = [r["start"] for r in rows]
    require(starts == sorted(starts), "event ids are not in date order")
    return rows, hidden


# ---------------------------------------------------------------------------------------
# Model elements (layout.toml and elements.csv)
# ---------------------------------------------------------------------------------------
# Classification: the project's own simple scheme, GROUP-TYPE (SUB substructure, FRM frame,
# ENV envelope, SRV services, LFT lifts, FIT fit-out, EXT external works, TMP temporary works).


class Boxes:
    """Element rows in the order they are made, with the layout's helpers."""

    def __init__(self, layout: dict):
        self.layout = layout
        self.rows: list[dict] = []
        grid = layout["grid"]
        self.width, self.depth = max(grid["x"].values()), max(grid["y"].values())

    def box(self, id, name, wbs, classification, x, y, z, dx, dy, dz, level, zone):
        self.rows.append(
            {
                "id": id,
                "name": name,
                "wbs": wbs,
                "classification": classification,
                "x": round(x, 3),
                "y": round(y, 3),
                "z": round(z, 3),
                "dx": round(dx, 3),
                "dy": round(dy, 3),
                "dz": round(dz, 3),
                "level": level,
                "zone": zone,
            }
        )

    def zone_of(self, x: float) -> str:
        return "A" if x < self.layout["grid"]["zone_split"] else "B"

    def thickness(self, slab: str) -> float:
        levels = self.layout["levels"]
        return levels["slab_thickness"].get(slab, levels["default_slab_thickness"])

    def level_name(self, level: str) -> str:
        return self.layout["levels"]["names"].get(level, f"level {level}")

    def grid(self):
        g = self.layout["grid"]
        return [(gx, x, gy, y) for gx, x in g["x"].items() for gy, y in g["y"].items()]

    def bays(self, side: str) -> int:
        return round((self.width if side in "NS" else self.depth) / self.layout["grid"]["bay"])

    def edge(self, side: str, along: float, length: float, thickness: float, outside: bool):
        """A strip along one side of the building: x, y, dx, dy."""
        if side in "NS":
            if side == "N":
                y = self.depth if outside else self.depth - thickness
            else:
                y = -thickness if outside else 0.0
            return along, y, length, thickness
        if side == "E":
            x = self.width if outside else self.width - thickness
        else:
            x = -thickness if outside else 0.0
        return x, along, thickness, length


def piles(b: Boxes):
    p, lowest = b.layout["piles"], b.layout["levels"]["storeys"][0]
    for gx, x, gy, y in b.grid():
        z = b.zone_of(x)
        half, cap = p["pile_size"] / 2, p["cap_size"] / 2
        b.box(
            f"PIL-{gx}{gy}",
            f"Bearing pile {gx}/{gy}",
            p["pile_wbs"][z],
            "SUB-PILE",
            x - half,
            y - half,
            p["pile_bottom"],
            p["pile_size"],
            p["pile_size"],
            p["pile_length"],
            lowest,
            z,
        )
        b.box(
            f"CAP-{gx}{gy}",
            f"Pile cap {gx}/{gy}",
            p["cap_wbs"][z],
            "SUB-CAP",
            x - cap,
            y - cap,
            p["cap_bottom"],
            p["cap_size"],
            p["cap_size"],
            p["cap_depth"],
            lowest,
            z,
        )


def lift_pit(b: Boxes):
    x0, y0, x1, y1 = b.layout["core"]["box"]
    pit = b.layout["lift_pit"]
    b.box(
        "PIT-01",
        "Lift pit and core base",
        pit["wbs"],
        "SUB-PIT",
        x0,
        y0,
        pit["bottom"],
        x1 - x0,
        y1 - y0,
        pit["depth"],
        b.layout["levels"]["storeys"][0],
        "core",
    )


def perimeter_walls(b: Boxes):
    p, lowest = b.layout["perimeter"], b.layout["levels"]["storeys"][0]
    piled, lining = p["piled_wall"], p["lining_wall"]
    for side, word in b.layout["facade"]["elevations"].items():
        for n in range(1, b.bays(side) + 1):
            along = b.layout["grid"]["bay"] * (n - 1)
            pw = b.edge(side, along, b.layout["grid"]["bay"], piled["thickness"], True)
            lw = b.edge(side, along, b.layout["grid"]["bay"], lining["thickness"], False)
            zone = b.zone_of(pw[0] + pw[2] / 2)
            b.box(
                f"PWL-{side}-{n}",
                f"Contiguous piled wall, {word} side, bay {n}",
                p["pile_wbs"][side],
                "SUB-PILED-WALL",
                pw[0],
                pw[1],
                piled["bottom"],
                pw[2],
                pw[3],
                piled["height"],
                lowest,
                zone,
            )
            b.box(
                f"BWL-{side}-{n}",
                f"Basement lining wall, {word} side, bay {n}",
                p["wall_wbs"][side],
                "SUB-WALL",
                lw[0],
                lw[1],
                lining["bottom"],
                lw[2],
                lw[3],
                lining["height"],
                lowest,
                zone,
            )


def frame(b: Boxes):
    levels, core = b.layout["levels"], b.layout["core"]
    size, words = b.layout["frame"]["column_size"], b.layout["facade"]["elevations"]
    x0, y0, x1, y1 = core["box"]
    t = core["wall_thickness"]
    walls = {
        "N": (x0, y1 - t, x1 - x0, t),
        "S": (x0, y0, x1 - x0, t),
        "E": (x1 - t, y0 + t, t, y1 - y0 - 2 * t),
        "W": (x0, y0 + t, t, y1 - y0 - 2 * t),
    }
    for storey in levels["storeys"]:
        above = levels["slab_above"][storey]
        bottom = levels["z"][storey]
        height = levels["z"][above] - bottom - b.thickness(above)
        for gx, x, gy, y in b.grid():
            if f"{gx}{gy}" in core["no_column"]:
                continue
            b.box(
                f"COL-{storey}-{gx}{gy}",
                f"Column {gx}/{gy}, storey {storey}",
                f"3.{storey}.1",
                "FRM-COLUMNS",
                x - size / 2,
                y - size / 2,
                bottom,
                size,
                size,
                height,
                storey,
                b.zone_of(x),
            )
        for side, (x, y, dx, dy) in walls.items():
            b.box(
                f"CORE-{storey}-{side}",
                f"Core wall, {words[side]}, storey {storey}",
                f"3.{storey}.1",
                "FRM-CORE",
                x,
                y,
                bottom,
                dx,
                dy,
                height,
                storey,
                "core",
            )
        sx, sy, sdx, sdy = core["stair"]
        b.box(
            f"STR-{storey}",
            f"Precast stair flights, storey {storey}",
            f"3.{storey}.3",
            "FRM-STAIR",
            sx,
            sy,
            bottom,
            sdx,
            sdy,
            height,
            storey,
            "core",
        )


def slabs(b: Boxes):
    levels, split = b.layout["levels"], b.layout["grid"]["zone_split"]
    for slab in (levels["slab_above"][s] for s in levels["storeys"]):
        thickness = b.thickness(slab)
        for z in b.layout["zones"]:
            x0, x1 = (0.0, split) if z == "A" else (split, b.width)
            b.box(
                f"SLB-{slab}-{z}",
                f"Slab level {slab}, zone {z}",
                f"3.{slab}.2",
                "FRM-SLAB",
                x0,
                0.0,
                levels["z"][slab] - thickness,
                x1 - x0,
                b.depth,
                thickness,
                slab,
                z,
            )


def facade(b: Boxes):
    """One panel and one window (a shopfront on the ground floor) per bay."""
    levels, f, bay = b.layout["levels"], b.layout["facade"], b.layout["grid"]["bay"]
    for floor in levels["floors"]:
        bottom, top = levels["z"][floor], levels["z"][levels["slab_above"][floor]]
        shop = floor not in levels["residential"]
        opening = f["shopfront"] if shop else f["window"]
        for code, word in f["elevations"].items():
            for n in range(1, b.bays(code) + 1):
                px, py, pdx, pdy = b.edge(code, bay * (n - 1), bay, f["panel_thickness"], True)
                zone = b.zone_of(px + pdx / 2)
                b.box(
                    f"PNL-{code}{floor}-{n}",
                    f"Facade panel, {word} elevation, level {floor}, bay {n}",
                    f"4.{code}.{floor}.1",
                    "ENV-PANEL",
                    px,
                    py,
                    bottom,
                    pdx,
                    pdy,
                    top - bottom,
                    floor,
                    zone,
                )
                inset, width = opening["inset"], opening["width"]
                wx, wy = (px + inset, py) if code in "NS" else (px, py + inset)
                wdx, wdy = (width, pdy) if code in "NS" else (pdx, width)
                b.box(
                    f"WIN-{code}{floor}-{n}",
                    f"{'Shopfront' if shop else 'Window'}, {word} elevation, level {floor}, bay {n}",
                    f"4.{code}.{floor}.2",
                    "ENV-SHOPFRONT" if shop else "ENV-WINDOW",
                    wx,
                    wy,
                    bottom + opening["sill"],
                    wdx,
                    wdy,
                    opening["height"],
                    floor,
                    zone,
                )


def service_zones(b: Boxes):
    levels, depth = b.layout["levels"], b.layout["service_zones"]["depth"]
    for level in levels["storeys"]:
        above = levels["slab_above"][level]
        soffit = levels["z"][above] - b.thickness(above)
        for z, (x, y, dx, dy) in b.layout["zones"].items():
            b.box(
                f"SRV-{level}-{z}",
                f"Services distribution in the ceiling void, {b.level_name(level)}, zone {z}",
                f"5.{level}.1",
                "SRV-ZONE",
                x,
                y,
                soffit - depth,
                dx,
                dy,
                depth,
                level,
                z,
            )


def fit_out(b: Boxes):
    levels, f = b.layout["levels"], b.layout["fit_out"]
    kdx, kdy, kdz = f["kitchen_size"]
    for floor in levels["floors"]:
        bottom = levels["z"][floor]
        residential = floor in levels["residential"]
        spots = f["doors"] if residential else f["doors"][: f["retail_doors"]]
        for n, (x, y, dx, dy) in enumerate(spots, start=1):
            what = "Lobby door" if dx < dy else ("Apartment entrance door" if residential else "Retail unit door")
            b.box(
                f"DOR-{floor}-{n:02d}",
                f"{what} {n}, level {floor}",
                f"6.{floor}.3",
                "FIT-DOOR",
                x,
                y,
                bottom,
                dx,
                dy,
                f["door_height"],
                floor,
                b.zone_of(x),
            )
        if residential:
            for n, (x, y) in enumerate(f["kitchens"], start=1):
                b.box(
                    f"KIT-{floor}-{n:02d}",
                    f"Kitchen, apartment {n}, level {floor}",
                    f"6.{floor}.4",
                    "FIT-KITCHEN",
                    x,
                    y,
                    bottom,
                    kdx,
                    kdy,
                    kdz,
                    floor,
                    b.zone_of(x),
                )
        band, ceiling = f["partitions"], f["ceiling"]
        for z, (x, y, dx, dy) in b.layout["zones"].items():
            b.box(
                f"PRT-{floor}-{z}",
                f"Partitions and drylining, level {floor}, zone {z}",
                f"6.{floor}.1",
                "FIT-PARTITION",
                x,
                band["y"],
                bottom,
                dx,
                band["dy"],
                band["height"],
                floor,
                z,
            )
            b.box(
                f"CLG-{floor}-{z}",
                f"Suspended ceilings, level {floor}, zone {z}",
                f"6.{floor}.2",
                "FIT-CEILING",
                x,
                y,
                bottom + ceiling["height"],
                dx,
                dy,
                ceiling["thickness"],
                floor,
                z,
            )


ELEMENT_KINDS = {
    "piles": piles,
    "lift pit": lift_pit,
    "perimeter walls": perimeter_walls,
    "frame": frame,
    "slabs": slabs,
    "facade": facade,
    "service zones": service_zones,
    "fit-out": fit_out,
}
BOX_COLUMNS = ["x", "y", "z", "dx", "dy", "dz"]


def build_elements(scn: Scenario) -> list[dict]:
    """Every element of ``layout.toml``'s sequence, then the planted defects of
    ``records.toml``: wrong codes on some elements, copies of others in the same place."""
    b = Boxes(scn.layout)
    for step in scn.layout["sequence"]:
        if step.startswith("fixed:"):
            for r in scn.elements:
                if r["group"] == step[len("fixed:") :]:
                    b.box(
                        r["id"],
                        r["name"],
                        r["wbs"],
                        r["classification"],
                        *(float(r[c]) for c in BOX_COLUMNS),
                        r["level"],
                        r["zone"],
                    )
        else:
            ELEMENT_KINDS[step](b)
    rows = b.rows
    defects = scn.records["elements"]
    for row in rows:
        row["wbs"] = defects["unlinked"].get(row["id"], row["wbs"])
    by_id = {r["id"]: r for r in rows}
    for group in defects["duplicates"]:
        original = by_id[group[0]]
        position = rows.index(original)
        for n, copy_id in enumerate(group[1:], start=1):
            rows.insert(position + n, {**original, "id": copy_id})
    return rows


# ---------------------------------------------------------------------------------------
# Records as kept: as-built sources, deliberate defects, disclosed corrections
# ---------------------------------------------------------------------------------------


def asbuilt_source(sources: dict, aid: str, finish: dt.date) -> str:
    """The record an as-built date comes from (``records.toml``)."""
    if aid in sources["activity"]:
        return sources["activity"][aid]
    text = next(
        (text for end, text in sources["suffix"].items() if aid.endswith(end)),
        next((text for start, text in sources["prefix"].items() if aid.startswith(start)), sources["default"]),
    )
    return text.format(finish=finish)


@dataclass
class Records:
    """The case as it is kept: updates with their defects, as-built rows, corrections."""

    update_rows: dict[str, list[dict]]  # folder -> activities rows
    update_links: dict[str, list[dict]]  # folder -> links rows
    asbuilt_rows: list[dict]
    corrections: list[dict]
    retrospective: list[dict]


def activity_row(a: Activity) -> dict:
    return {
        "id": a.id,
        "name": a.name,
        "duration": a.duration,
        "calendar": a.calendar,
        "wbs": a.wbs,
        "kind": a.kind,
        "constraint": a.constraint,
        "constraint_date": a.constraint_date,
        "party": a.party,
        "risk": a.risk,
    }


def link_rows(p: Programme) -> list[dict]:
    return [{"pred": lk.pred, "succ": lk.succ, "type": lk.type, "lag": lk.lag} for lk in p.links]


def row_of(rows: list[dict], aid: str) -> dict:
    return next(r for r in rows if r["id"] == aid)


def retrospective_edit(scn: Scenario, records: Records, updates, works, site) -> None:
    """Defect: an actual finish re-dated in every update after the first that reported it."""
    rule = scn.records["retrospective_edit"]
    aid = rule["activity"]
    true_finish = works.timings[aid].finish
    edited = site.date(site.on_or_after(true_finish) - rule["workdays_earlier"])
    require(edited >= works.timings[aid].start, "the retrospective edit precedes the start")
    first = next(u for u in updates if u.progress.get(aid) and u.progress[aid].actual_finish)
    later = [u for u in updates if u.data_date > first.data_date]
    for u in later:
        row_of(records.update_rows[u.folder], aid)["actual_finish"] = edited
    records.retrospective.append(
        {
            "activity": aid,
            "column": "actual_finish",
            "first_reported_in": first.folder,
            "first_value": true_finish.isoformat(),
            "changed_in": later[0].folder,
            "changed_value": edited.isoformat(),
            "also_in": [u.folder for u in later[1:]],
            "asbuilt_value": true_finish.isoformat(),
        }
    )


def miskeyed_remaining(scn: Scenario, records: Records, updates) -> None:
    """Disclosed correction: a remaining duration keyed without its tens digit."""
    rule = scn.records["miskeyed_remaining"]
    for u in updates[rule["from_update"] - 1 :]:
        candidates = sorted(
            aid
            for aid, p in u.progress.items()
            if p.actual_finish is None and p.remaining is not None and rule["low"] <= p.remaining <= rule["high"]
        )
        if candidates:
            break
    require(candidates, "no update has a remaining duration to mis-key")
    row = row_of(records.update_rows[u.folder], candidates[0])
    remaining = row["remaining"]
    row["remaining"] = remaining % 10
    records.corrections.append(
        {
            "snapshot": u.label,
            "table": "activities",
            "key": row["id"],
            "column": "remaining",
            "value": remaining,
            "reason": rule["reason"].format(keyed=remaining % 10, remaining=remaining),
        }
    )


def omitted_link(scn: Scenario, records: Records, updates, works) -> None:
    """Disclosed correction: a link dropped from one update by mistake."""
    rule = scn.records["omitted_link"]
    pair = (rule["pred"], rule["succ"])
    u = updates[rule["update"] - 1]
    require(pair[1] not in u.progress, "the omitted link must precede its successor")
    require(pair != works.out_of_sequence, "the omitted link is the out-of-sequence pair")
    before = len(records.update_links[u.folder])
    records.update_links[u.folder] = [r for r in records.update_links[u.folder] if (r["pred"], r["succ"]) != pair]
    require(len(records.update_links[u.folder]) == before - 1, "the omitted link was not found")
    records.corrections.append(
        {
            "snapshot": u.label,
            "table": "links",
            "key": f"{pair[0]}>{pair[1]}",
            "column": "add",
            "value": rule["value"],
            "reason": rule["reason"],
        }
    )


def asbuilt_record(scn: Scenario, records: Records, last: Update, works, site) -> None:
    """The as-built record, every activity of the last update, and the disclosed correction
    of an as-built start taken from the wrong record."""
    sources = scn.records["asbuilt_sources"]
    for aid in last.programme.activities:
        t = works.timings[aid]
        records.asbuilt_rows.append(
            {
                "id": aid,
                "actual_start": t.start,
                "actual_finish": t.finish,
                "source": asbuilt_source(sources, aid, t.finish),
            }
        )
    rule = scn.records["asbuilt_start"]
    late = sorted(
        (works.timings[aid].start, aid)
        for aid, a in last.programme.activities.items()
        if a.kind == "task" and a.duration >= rule["min_duration"] and works.timings[aid].start >= last.data_date
    )
    require(late, "no activity starts after the last data date")
    start, aid = late[0]
    wrong = site.date(site.on_or_after(start) + rule["workdays_late"])
    require(wrong <= works.timings[aid].finish, "the wrong as-built start is after the finish")
    row = row_of(records.asbuilt_rows, aid)
    row["actual_start"], row["source"] = wrong, rule["source"].format(wrong=wrong)
    records.corrections.append(
        {
            "snapshot": "asbuilt",
            "table": "activities",
            "key": aid,
            "column": "actual_start",
            "value": start,
            "reason": rule["reason"].format(wrong=wrong, start=start),
        }
    )


def keep_records(scn: Scenario, updates: list[Update], works: ActualWorks, calendars) -> Records:
    records = Records({}, {}, [], [], [])
    for u in updates:
        rows = []
        for aid, a in u.programme.activities.items():
            row = activity_row(a)
            prog = u.progress.get(aid)
            row.update(
                actual_start=prog.actual_start if prog else None,
                actual_finish=prog.actual_finish if prog else None,
                remaining=prog.remaining if prog else None,
            )
            rows.append(row)
        records.update_rows[u.folder] = rows
        records.update_links[u.folder] = link_rows(u.programme)
    site = calendars[scn.site]
    retrospective_edit(scn, records, updates, works, site)
    miskeyed_remaining(scn, records, updates)
    omitted_link(scn, records, updates, works)
    asbuilt_record(scn, records, updates[-1], works, site)
    return records


# ---------------------------------------------------------------------------------------
# Checks: every validation rule of the case format, and the planted defects exactly
# ---------------------------------------------------------------------------------------


def check_progress(where: str, r: dict, data_date: dt.date):
    start, finish, remaining = r["actual_start"], r["actual_finish"], r["remaining"]
    for d in (start, finish):
        require(d is None or d < data_date, f"{where}: {r['id']} actual date on or after the data date")
    if finish is not None:
        require(start is not None and finish >= start, f"{where}: {r['id']} finish/start")
        require(remaining in (0, None), f"{where}: {r['id']} complete with remaining")
    elif start is not None:
        require(remaining is not None and remaining > 0, f"{where}: {r['id']} in progress without remaining")
    else:
        require(remaining is None, f"{where}: {r['id']} not started with remaining")


def programme_of_rows(rows: list[dict], links: list[dict]) -> Programme:
    p = Programme()
    for r in rows:
        p.activities[r["id"]] = Activity(r["id"], r["name"], int(r["duration"]), r["wbs"])
    p.links = [Link(lk["pred"], lk["succ"], lk["type"], int(lk["lag"])) for lk in links]
    return p


def check_snapshot(where: str, rows: list[dict], links: list[dict], calendars: set[str], data_date: dt.date | None):
    ids = [r["id"] for r in rows]
    require(len(ids) == len(set(ids)), f"{where}: duplicate activity ids")
    known = set(ids)
    for r in rows:
        require(r["calendar"] in calendars, f"{where}: {r['id']} unknown calendar")
        require(r["kind"] in ("task", "start_milestone", "finish_milestone"), f"{where}: kind")
        require(isinstance(r["duration"], int) and r["duration"] >= 0, f"{where}: duration")
        if r["kind"] != "task":
            require(r["duration"] == 0, f"{where}: milestone {r['id']} has a duration")
        if r["constraint"]:
            require(
                r["constraint"] in ("earliest_start", "latest_finish", "fixed_start", "fixed_finish")
                and r["constraint_date"] is not None,
                f"{where}: constraint of {r['id']}",
            )
        if data_date is not None:
            check_progress(where, r, data_date)
    pairs = [(lk["pred"], lk["succ"]) for lk in links]
    require(len(pairs) == len(set(pairs)), f"{where}: duplicate links")
    for lk in links:
        require(lk["pred"] in known and lk["succ"] in known, f"{where}: link {lk} names unknown id")
        require(lk["pred"] != lk["succ"], f"{where}: self link")
        require(lk["type"] in ("FS", "SS", "FF", "SF"), f"{where}: link type")
    try:
        topological_order(programme_of_rows(rows, links))
    except ValueError as error:
        raise CaseCheckError(f"{where}: {error}") from None


def check_records(updates, records: Records):
    """Actual dates never change between updates, except the planted retrospective edit; the
    as-built record covers every activity of the last update with both dates."""
    planted = {(e["activity"], e["column"]) for e in records.retrospective}
    seen: dict[tuple[str, str], object] = {}
    changes = set()
    for u in updates:
        for r in records.update_rows[u.folder]:
            for column in ("actual_start", "actual_finish"):
                if r[column] is None:
                    continue
                key = (r["id"], column)
                if key in seen and seen[key] != r[column]:
                    changes.add(key)
                seen[key] = r[column]
    require(changes == planted, f"actual dates changed between updates: {sorted(changes)}")
    last = updates[-1]
    last_ids = [r["id"] for r in records.update_rows[last.folder]]
    require([r["id"] for r in records.asbuilt_rows] == last_ids, "as-built does not cover all")
    for r in records.asbuilt_rows:
        require(
            r["actual_start"] is not None
            and r["actual_finish"] is not None
            and r["actual_finish"] >= r["actual_start"],
            f"as-built row {r['id']}",
        )
    require(
        max(r["actual_finish"] for r in records.asbuilt_rows) >= last.data_date,
        "as-built does not run past the last data date",
    )


def check_events(scn: Scenario, events, baseline_rows, baseline_links, all_ids):
    baseline_ids = {r["id"] for r in baseline_rows}
    require(len({e["id"] for e in events}) == len(events), "event ids")
    require({e["party"] for e in events} == {"employer", "contractor", "neutral"}, "parties")
    require({e["impact"] for e in events} == {"extend", "hold", "fragnet"}, "impacts")
    require(len(events) >= 10, "fewer than 10 events")
    for e in events:
        require(e["start"] <= e["finish"], f"{e['id']} start after finish")
        require(all(a in baseline_ids for a in e["activities"].split(";")), f"{e['id']} ids")
        require((e["impact"] == "extend") == (e["days"] != ""), f"{e['id']} days")
    fragnet_ids = [f["id"] for f in scn.fragnets]
    require(len(fragnet_ids) == len(set(fragnet_ids)), "fragnet ids not unique")
    require(not (set(fragnet_ids) & all_ids), "fragnet id collides with an activity id")
    fragnet_events = {f["event"] for f in scn.fragnets}
    require(fragnet_events == {e["id"] for e in events if e["impact"] == "fragnet"}, "fragnet events")
    require(len(fragnet_events) >= 3, "fewer than 3 fragnets")
    for event in fragnet_events:
        own = {f["id"] for f in scn.fragnets if f["event"] == event}
        rows = baseline_rows + [{**f, "duration": int(f["duration"])} for f in scn.fragnets if f["event"] == event]
        links = list(baseline_links)
        for lk in scn.fragnet_links:
            if lk["event"] == event:
                require(
                    lk["pred"] in own | baseline_ids and lk["succ"] in own | baseline_ids,
                    f"fragnet link {lk['pred']}>{lk['succ']}",
                )
                require(
                    lk["pred"] in own or lk["succ"] in own,
                    f"fragnet link {lk['pred']}>{lk['succ']} has no fragnet activity",
                )
                links.append(lk)
        topological_order(programme_of_rows(rows, links))


def check_elements(scn: Scenario, elements, wbs_codes: set[str], last_wbs: set[str], baseline_wbs: set[str]):
    """Unique ids; the planted duplicates and unlinked elements and no others."""
    defects = scn.records["elements"]
    ids = [e["id"] for e in elements]
    require(len(ids) == len(set(ids)), "element ids not unique")
    require(len(elements) >= 300, "fewer than 300 elements")
    unlinked = {e["id"] for e in elements if e["wbs"] not in wbs_codes}
    require(unlinked == set(defects["unlinked"]), f"unlinked elements {sorted(unlinked)}")
    require(
        all(e["wbs"] in last_wbs and e["wbs"] in baseline_wbs for e in elements if e["id"] not in defects["unlinked"]),
        "element wbs not in every programme",
    )
    groups = defaultdict(list)
    for e in elements:
        groups[(e["classification"], *(e[c] for c in BOX_COLUMNS))].append(e["id"])
    duplicates = sorted(sorted(g) for g in groups.values() if len(g) > 1)
    require(duplicates == sorted(sorted(g) for g in defects["duplicates"]), f"duplicates {duplicates}")


def check_case(scn: Scenario, baseline_rows, baseline_links, updates, records: Records, events, elements, exceptions):
    calendars = {r["calendar"] for r in calendar_rows(scn)}
    require(len(calendars) == len(calendar_rows(scn)), "calendar names not unique")
    require({r["calendar"] for r in exceptions} <= calendars, "exception for unknown calendar")
    check_snapshot("baseline", baseline_rows, baseline_links, calendars, None)
    previous_date = scn.start
    for u in updates:
        require(u.data_date > previous_date, "data dates must increase")
        previous_date = u.data_date
        check_snapshot(u.folder, records.update_rows[u.folder], records.update_links[u.folder], calendars, u.data_date)
    require([u.folder for u in updates] == sorted(u.folder for u in updates), "folder order")
    require(len(updates) >= 8, "fewer than 8 updates")
    check_records(updates, records)
    all_ids = {r["id"] for r in baseline_rows}
    wbs_codes = {r["wbs"] for r in baseline_rows}
    for u in updates:
        all_ids |= {r["id"] for r in records.update_rows[u.folder]}
        wbs_codes |= {r["wbs"] for r in records.update_rows[u.folder]}
    check_events(scn, events, baseline_rows, baseline_links, all_ids)
    check_elements(
        scn,
        elements,
        wbs_codes,
        {r["wbs"] for r in records.update_rows[updates[-1].folder]},
        {r["wbs"] for r in baseline_rows},
    )
    baseline_ids = {r["id"] for r in baseline_rows}
    for s in scn.sections:
        require(s["completion_activity"] in baseline_ids, "section milestone")
    for g in scn.extensions:
        granted = dt.date.fromisoformat(g["granted_on"])
        require(granted.weekday() == 4, f"{g['id']}: the Employer's agent decides on Fridays")
        require(
            all(e["start"] < granted for e in events if e["id"] in split_ids(g["events"])),
            f"{g['id']} is granted before its event began",
        )
    for c in records.corrections:
        if c["table"] == "activities":
            require(c["key"] in all_ids, f"correction key {c['key']}")


# ---------------------------------------------------------------------------------------
# Writing the files
# ---------------------------------------------------------------------------------------

ACTIVITY_COLUMNS = [
    "id",
    "name",
    "duration",
    "calendar",
    "wbs",
    "kind",
    "constraint",
    "constraint_date",
    "party",
    "risk",
]
PROGRESS_COLUMNS = ["actual_start", "actual_finish", "remaining"]
LINK_COLUMNS = ["pred", "succ", "type", "lag"]
EVENT_COLUMNS = [
    "id",
    "title",
    "party",
    "start",
    "finish",
    "activities",
    "impact",
    "days",
    "evidence",
    "notified",
    "claimed_days",
    "asbuilt_activities",
]
ELEMENT_COLUMNS = ["id", "name", "wbs", "classification", *BOX_COLUMNS, "level", "zone"]


def cell(value) -> str:
    if value is None:
        return ""
    if isinstance(value, dt.date):
        return value.isoformat()
    if isinstance(value, float):
        text = f"{value:.3f}".rstrip("0").rstrip(".")
        return "0" if text in ("-0", "") else text
    return str(value)


def write_csv(path: Path, rows: list[dict], columns: list[str]):
    path.parent.mkdir(parents=True, exist_ok=True)
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(columns)
    for row in rows:
        writer.writerow([cell(row.get(c)) for c in columns])
    path.write_text(buffer.getvalue(), encoding="utf-8")


def toml_value(value) -> str:
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, (int, float)):
        return repr(value)
    if isinstance(value, dt.date):
        return value.isoformat()
    return json.dumps(str(value), ensure_ascii=False)


def write_toml(path: Path, sections: dict[str, dict]):
    lines = []
    for name, values in sections.items():
        if name:
            lines.append(f"[{name}]")
        lines += [f"{k} = {toml_value(v)}" for k, v in values.items()]
        lines.append("")
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text("\n".join(lines), encoding="utf-8")


CASE_SECTIONS = ("project", "schedule", "commercial", "analysis")
GENERATED = [
    "case.toml",
    "calendars.csv",
    "calendar_exceptions.csv",
    "snapshots",
    "asbuilt.csv",
    "corrections.csv",
    "events.csv",
    "fragnets.csv",
    "fragnet_links.csv",
    "elements.csv",
    "sections.csv",
    "extensions_granted.csv",
    "prolongation_rates.csv",
    "KNOWN_DEFECTS.json",
    "README.md",
]


def write_snapshots(folder: Path, scn: Scenario, baseline_rows, baseline_links, updates, records):
    snapshots = folder / "snapshots"
    write_toml(
        snapshots / "baseline" / "snapshot.toml",
        {"": {"label": "Baseline", "data_date": scn.start, "kind": "baseline"}},
    )
    write_csv(snapshots / "baseline" / "activities.csv", baseline_rows, ACTIVITY_COLUMNS)
    write_csv(snapshots / "baseline" / "links.csv", baseline_links, LINK_COLUMNS)
    for u in updates:
        write_toml(
            snapshots / u.folder / "snapshot.toml", {"": {"label": u.label, "data_date": u.data_date, "kind": "update"}}
        )
        write_csv(
            snapshots / u.folder / "activities.csv", records.update_rows[u.folder], ACTIVITY_COLUMNS + PROGRESS_COLUMNS
        )
        write_csv(snapshots / u.folder / "links.csv", records.update_links[u.folder], LINK_COLUMNS)


def write_case(
    folder: Path,
    scn: Scenario,
    baseline_rows,
    baseline_links,
    updates,
    records,
    events,
    elements,
    exceptions,
    readme: str,
    known_defects: dict,
):
    write_toml(folder / "case.toml", {name: values for name, values in scn.project.items() if name in CASE_SECTIONS})
    write_csv(folder / "calendars.csv", calendar_rows(scn), ["calendar", "workdays"])
    write_csv(folder / "calendar_exceptions.csv", exceptions, ["calendar", "date", "working", "reason"])
    write_snapshots(folder, scn, baseline_rows, baseline_links, updates, records)
    write_csv(folder / "asbuilt.csv", records.asbuilt_rows, ["id", "actual_start", "actual_finish", "source"])
    write_csv(
        folder / "corrections.csv", records.corrections, ["snapshot", "table", "key", "column", "value", "reason"]
    )
    write_csv(folder / "events.csv", events, EVENT_COLUMNS)
    write_csv(folder / "elements.csv", elements, ELEMENT_COLUMNS)
    # tables of the scenario that the case takes as they are
    for name, rows in (
        ("fragnets", scn.fragnets),
        ("fragnet_links", scn.fragnet_links),
        ("sections", scn.sections),
        ("extensions_granted", scn.extensions),
        ("prolongation_rates", scn.prolongation),
    ):
        write_csv(folder / f"{name}.csv", rows, list(rows[0]))
    (folder / "KNOWN_DEFECTS.json").write_text(
        json.dumps(known_defects, indent=2, ensure_ascii=False) + "\n", encoding="utf-8"
    )
    (folder / "README.md").write_text(readme, encoding="utf-8")


def move_into_place(built: Path, target: Path):
    """Replace each generated file or folder of ``target`` by the one in ``built``."""
    for name in GENERATED:
        new, old = built / name, target / name
        if old.is_dir():
            trash = target / f".{name}.old"
            if trash.exists():
                shutil.rmtree(trash)
            os.replace(old, trash)
            os.replace(new, old)
            shutil.rmtree(trash)
        else:
            os.replace(new, old)


# ---------------------------------------------------------------------------------------
# README and the machine-readable list of planted defects
# ---------------------------------------------------------------------------------------


def known_defects(scn: Scenario, records: Records) -> dict:
    defects = scn.records["elements"]
    return {
        "description": scn.records["known_defects_description"],
        "duplicate_elements": defects["duplicates"],
        "unlinked_elements": list(defects["unlinked"]),
        "unlinked_element_wbs": defects["unlinked"],
        "retrospective_edits": records.retrospective,
        "disclosed_corrections": [{k: cell(v) for k, v in c.items() if k != "reason"} for c in records.corrections],
    }


NUMBER_WORDS = ["no", "one", "two", "three", "four", "five", "six", "seven", "eight", "nine"]


def counted(n: int, noun: str) -> str:
    return f"{NUMBER_WORDS[n] if n < len(NUMBER_WORDS) else n} {noun}{'' if n == 1 else 's'}"


def readme_tables(scn: Scenario, f: dict) -> dict:
    """The README's tables and lists, as text."""
    events = "\n".join(
        f"| {e['id']} | {e['party']} | {e['start']} to {e['finish']} | {e['impact']}"
        f"{' +' + str(e['days']) + ' d' if e['days'] != '' else ''} | {e['title']} |"
        for e in f["events"]
    )
    forecasts = "\n".join(f"| {label} | {date} | {pc} | {s1} |" for label, date, pc, s1 in f["forecasts"])

    def first_update(threshold: dt.date) -> str:
        label, date = next((label, date) for label, date, _, _ in f["forecasts"] if date >= threshold)
        return f"{label} ({date})"

    causes = {e["id"]: e["cause"] for e in scn.events}
    return {
        "events": events,
        "forecasts": forecasts,
        "revisions": "\n".join(
            f"- {r.kind}, from {first_update(r.first_data_date)} on: {r.text}" for r in f["revisions"]
        ),
        "but_for": "\n".join(f"| {e} | {causes[e]} | {pc} | {s1} |" for e, (pc, s1) in f["but_for"].items()),
        "corrections": "\n".join(
            f"- {c['snapshot']}, {c['table']} `{c['key']}` {c['column']}: {c['reason']}" for c in f["corrections"]
        ),
    }


def joined(words: list[str]) -> str:
    """``a``, ``a and b``, ``a, b and c``."""
    return words[0] if len(words) == 1 else ", ".join(words[:-1]) + " and " + words[-1]


def programme_before(day: dt.date, programmes: list[tuple[str, dt.date, dict]]):
    """The last programme whose data date is strictly before ``day``."""
    return [p for p in programmes if p[1] < day][-1]


def hold_relation(t: Timing | None, progress: Progress | None, first: dt.date, last: dt.date) -> str:
    """How a hold from ``first`` to ``last`` falls on an activity's dates in a programme."""
    if t is None:
        return "not in this programme"
    if progress is not None and progress.actual_finish is not None:
        return f"complete ({t.finish}): no effect"
    planned = f"for {t.start}" if t.start == t.finish else f"{t.start} to {t.finish}"
    if t.finish < first:
        return f"planned {planned}, before the hold: no effect"
    if t.start > last:
        return f"planned from {t.start}, after the hold: no effect"
    if t.start < first:
        return f"planned {planned}: stops for the hold, resumes after it"
    return f"planned from {t.start}, in the hold: its start moves after it"


def actual_hold_effect(works: ActualWorks, aid: str, first: dt.date, last: dt.date, calendars) -> str:
    """What a hold did to an activity in the actual works."""
    t = works.timings[aid]
    cal = calendars[works.programme.activities[aid].calendar]
    resumed = cal.date(cal.after(last))
    if t.start < first:
        done = cal.count(t.start, first - dt.timedelta(days=1))
        return f"started {t.start}, stopped after {counted(done, 'work day')}, resumed {resumed}, finished {t.finish}"
    return f"due {cal.date(t.logic_start)}, started {t.start}"


def hold_rows(f: dict, works: ActualWorks, programmes, calendars) -> str:
    rows = []
    for e in f["events"]:
        if e["impact"] != "hold":
            continue
        label, data_date, timings, progress = programme_before(e["start"], programmes)
        for aid in e["activities"].split(";"):
            baseline = hold_relation(programmes[0][2].get(aid), None, e["start"], e["finish"])
            before = hold_relation(timings.get(aid), progress.get(aid), e["start"], e["finish"])
            actual = actual_hold_effect(works, aid, e["start"], e["finish"], calendars)
            rows.append(f"| {e['id']} | {aid} | {baseline} | {label} ({data_date}): {before} | {actual} |")
    return "\n".join(rows)


def grant_rows(scn: Scenario, programmes) -> tuple[str, str]:
    """The grants table and the words on when each grant is in force."""
    rows, words, granted = [], [], defaultdict(int)
    whole_works = next(s for s in scn.sections if s["completion_activity"] == scn.completion)
    for g in sorted(scn.extensions, key=lambda g: g["granted_on"]):
        day = dt.date.fromisoformat(g["granted_on"])
        section = next((s for s in scn.sections if s["section"] == g["section"]), whole_works)
        granted[section["section"]] += int(g["days"])
        in_force = dt.date.fromisoformat(section["contract_completion"]) + dt.timedelta(
            days=granted[section["section"]]
        )
        before = programme_before(day, programmes)
        after = next(p for p in programmes if p[1] > day)
        require(not any(p[1] == day for p in programmes), f"{g['id']} is granted on a data date")
        whole = " (the whole of the Works)" if section is whole_works else ""
        rows.append(
            f"| {g['id']} | {section['section']}{whole} | {day} | {before[0]} "
            f"({before[1]}) and {after[0]} ({after[1]}) | {g['days']} | "
            f"{', '.join(split_ids(g['events']))} | {in_force} |"
        )
        words.append(f"{g['id']} from {after[0]} ({after[1]}) on, not in {before[0]}")
    return "\n".join(rows), "; ".join(words)


def v2_values(scn: Scenario, f: dict, works: ActualWorks, programmes, calendars) -> dict:
    """The README's account of what the case exercises of case format v2."""
    risks = defaultdict(list)
    for row in scn.activities:
        if row["risk"]:
            risks[row["risk"]].append(row["id"])
    shown = [e for e in f["events"] if e["asbuilt_activities"]]
    tia = defaultdict(list)
    for e in f["events"]:
        label, data_date, _, _ = programme_before(e["start"], programmes)
        tia[f"{label} ({data_date})"].append(e["id"])
    on_data_date = [
        f"{e['id']} starts on the data date of {label} ({date}), so it goes into "
        f"the programme before, not into the update that already reports it"
        for e in f["events"]
        for label, date, _, _ in programmes[1:]
        if e["start"] == date
    ]
    claim = next(iter(scn.story["claims"]["in_progress"].items()))
    event = next(e for e in f["events"] if e["id"] == claim[0])
    grants, grant_words = grant_rows(scn, programmes)
    return {
        "in_progress_hold": f"{claim[1]} "
        + actual_hold_effect(works, claim[1], event["start"], event["finish"], calendars)
        + f" ({claim[0]}).",
        "grants": grants,
        "grant_words": grant_words,
        "completion_activity": f"`{scn.completion}`",
        "unexplained_risk": f"`{scn.project['analysis']['unexplained_risk']}`",
        "risk_words": "; ".join(f"`{risk}` for {joined(ids)}" for risk, ids in risks.items()),
        "asbuilt_words": f"{joined([e['id'] for e in shown])} are fragnets whose activities are "
        f"never built under their own ids; the as-built record carries their "
        f"work as "
        + joined([f"{e['asbuilt_activities'].replace(';', ', ')} ({e['id']})" for e in shown])
        + ", and the column names those for collapsed as-built. Every other "
        "event shows in its own activities (the default).",
        "holds": hold_rows(f, works, programmes, calendars),
        "tia_words": "; ".join(f"{joined(ids)} into {where}" for where, ids in tia.items())
        + "."
        + "".join(f" {text}." for text in on_data_date),
    }


def readme_text(scn: Scenario, f: dict) -> str:
    """``scenario/readme.md`` with the figures of this run filled in."""
    labels = {date.isoformat(): label for label, date, _, _ in f["forecasts"]}
    retro = f["retrospective"][0]
    pred, succ = f["out_of_sequence"]
    commercial = scn.project["commercial"]
    values = {
        "contract_sum": f"{scn.project['contract']['contract_sum']:,}",
        "contract_start": scn.start,
        "contract_completion": scn.completion_date,
        "section_1_completion": scn.section["contract_completion"],
        "section_1_damages": f"{int(scn.section['liquidated_damages_per_day']):,}",
        "whole_works_damages": f"{commercial['liquidated_damages_per_day']:,}",
        "damages_cap": f"{commercial['liquidated_damages_cap']:,}",
        "out_of_sequence_floor": pred[4:6],
        "out_of_sequence_pred": pred,
        "out_of_sequence_succ": succ,
        "retro_activity": retro["activity"],
        "retro_first_value": retro["first_value"],
        "retro_first_label": labels[retro["first_reported_in"]],
        "retro_first_folder": retro["first_reported_in"],
        "retro_changed_value": retro["changed_value"],
        "retro_changed_label": labels[retro["changed_in"]],
        "retro_changed_folder": retro["changed_in"],
        "retro_asbuilt_value": retro["asbuilt_value"],
        "event_count": len(f["events"]),
        "fragnet_count": len(scn.fragnets),
        "fragnet_events": len({r["event"] for r in scn.fragnets}),
        "sections_count": counted(len(scn.sections), "section"),
        "grants_count": counted(len(scn.extensions), "extension"),
        "rates_count": counted(len(scn.prolongation), "prolongation rate period"),
        **{
            k: f[k]
            for k in (
                "activities",
                "links",
                "baseline_pc",
                "baseline_s1",
                "actual_pc",
                "actual_s1",
                "power_float",
                "carpark_float",
                "updates",
                "elements",
                "out_of_sequence_update",
            )
        },
        **readme_tables(scn, f),
        **f["v2"],
    }
    return reflow(string.Template(scn.readme).substitute(values))


def reflow(text: str, width: int = 92, longest: int = 100) -> str:
    """Re-wrap each paragraph or list item that a filled-in figure made longer than
    ``longest`` characters; tables, headings and every other paragraph stay as written."""
    out, block = [], []

    def flush():
        if any(len(line) > longest for line in block):
            item = block[0].startswith("- ")
            out.extend(
                textwrap.wrap(
                    " ".join(line.strip() for line in block),
                    width,
                    subsequent_indent="  " if item else "",
                    break_on_hyphens=False,
                    break_long_words=False,
                )
            )
        else:
            out.extend(block)
        block.clear()

    for line in text.split("\n"):
        if not line.strip() or line.startswith(("|", "#")):
            flush()
            out.append(line)
        else:
            if line.startswith("- "):
                flush()
            block.append(line)
    flush()
    return "\n".join(out)


# ---------------------------------------------------------------------------------------
# The story told in the README, checked
# ---------------------------------------------------------------------------------------


def driving_chain(programme: Programme, timings: dict[str, Timing], calendars, end: str) -> list[str]:
    """Activities that drove ``end``, walking back along links whose bound set the start."""
    incoming = defaultdict(list)
    for lk in programme.links:
        incoming[lk.succ].append(lk)
    chain, aid = [], end
    while aid is not None:
        chain.append(aid)
        a, t = programme.activities[aid], timings[aid]
        cal = calendars[a.calendar]
        driver = None
        for lk in incoming[aid]:
            pred, pa = timings[lk.pred], programme.activities[lk.pred]
            from_finish = lk.type in ("FS", "FF")
            if pa.calendar == a.calendar:
                point = pred.early_finish if from_finish else pred.early_start
            else:
                point = cal.after(pred.finish) if from_finish else cal.on_or_after(pred.start)
            bound = point + lk.lag - ((t.early_finish - t.early_start) if lk.type in ("FF", "SF") else 0)
            if bound == t.logic_start:
                driver = lk.pred
        aid = driver
    return chain


def check_claims(scn: Scenario, baseline_timings, calendars, works: ActualWorks) -> dict:
    """The claims of ``story.toml`` about the actual works; returns the gaps it measures."""
    claims, t = scn.story["claims"], works.timings
    site = calendars[scn.site]
    for later, earlier in claims["finishes_after"]:
        require(t[later].finish > t[earlier].finish, f"{later} no longer finishes after {earlier}")
    for end, drivers in claims["drives"].items():
        chain = driving_chain(works.programme, t, calendars, end)
        for aid in drivers:
            require(aid in chain, f"{aid} no longer drives {end}")
    for event, aid in claims["in_progress"].items():
        row = event_row(scn, event)
        first, last = dt.date.fromisoformat(row["start"]), dt.date.fromisoformat(row["finish"])
        require(
            t[aid].start < first and t[aid].finish > last and aid in works.held[event],
            f"{event} no longer stops {aid} in progress",
        )
    first, second = claims["finish_together"]
    require(
        t[first].finish == t[second].finish,
        f"{first} ({t[first].finish}) and {second} ({t[second].finish}) no longer end together",
    )
    for event, aid in claims["due"].items():
        due = site.date(site.after(baseline_timings[aid].finish))
        require(resolve_date(event_row(scn, event)["start"], t) == due, f"{event} does not start when {aid} was due")
    gaps = {}
    for gap in claims["gap"]:
        after = max(site.after(t[aid].finish) for aid in gap["after"])
        gaps[gap["name"]] = site.on_or_after(t[gap["before"]].start) - after
        require(gap["min"] <= gaps[gap["name"]] <= gap["max"], f"{gap['name']} is {gaps[gap['name']]} work days")
    return gaps


def story_checks(
    scn: Scenario, baseline, baseline_timings, calendars, works: ActualWorks, updates: list[Update]
) -> dict:
    """Make sure what the README tells about the actual works is true."""
    t = works.timings
    link_types = [lk.type for lk in baseline.links]
    require(
        link_types.count("SF") == 1
        and {"FS", "SS", "FF"} <= set(link_types)
        and any(lk.lag < 0 for lk in baseline.links),
        "link types differ from the README",
    )
    gaps = check_claims(scn, baseline_timings, calendars, works)
    require(t[scn.completion].finish > scn.completion_date, "the works are not late")
    section = scn.section
    require(
        t[section["completion_activity"]].finish > dt.date.fromisoformat(section["contract_completion"]),
        "section 1 is not late",
    )
    but = but_for(scn, baseline, calendars, works)
    require(
        all(pc == t[scn.completion].finish for pc, _ in but.values()), "a single event now moves completion on its own"
    )
    pred, succ = works.out_of_sequence
    seen = next(
        u for u in updates if succ in u.progress and pred in u.progress and u.progress[pred].actual_finish is None
    )
    return {**gaps, "but_for": but, "out_of_sequence_update": f"{seen.label} ({seen.data_date})"}


# ---------------------------------------------------------------------------------------
# Main
# ---------------------------------------------------------------------------------------


def schedule_all(scn: Scenario, baseline_timings, updates, calendars):
    """Each update's forecast: the generator's own forward pass over what the update says."""
    forecasts, schedules = [], {"baseline": baseline_timings}
    milestone = scn.section["completion_activity"]
    for u in updates:
        t = forward_pass(u.programme, calendars, u.data_date, progress=u.progress)
        schedules[u.folder] = t
        forecasts.append((u.label, u.data_date, t[scn.completion].finish, t[milestone].finish))
    return forecasts, schedules


def build(output: Path, scn: Scenario | None = None) -> dict:
    scn = scn or load_scenario()
    exceptions = calendar_exceptions(scn)
    calendars = build_calendars(scn, exceptions)
    baseline = baseline_programme(scn)
    baseline_timings = forward_pass(baseline, calendars, scn.start)
    section = scn.section
    require(
        baseline_timings[section["completion_activity"]].finish
        <= dt.date.fromisoformat(section["contract_completion"]),
        "baseline misses Section 1",
    )
    require(baseline_timings[scn.completion].finish <= scn.completion_date, "baseline misses completion")
    works, data_dates = choose_out_of_sequence(scn, baseline, calendars)
    events, hidden = derive_events(scn, works)
    updates = build_updates(scn, baseline, works, calendars, data_dates, hidden)
    records = keep_records(scn, updates, works, calendars)
    baseline_rows = [activity_row(a) for a in baseline.activities.values()]
    baseline_links = link_rows(baseline)
    elements = build_elements(scn)
    check_case(scn, baseline_rows, baseline_links, updates, records, events, elements, exceptions)
    story = story_checks(scn, baseline, baseline_timings, calendars, works, updates)
    forecasts, schedules = schedule_all(scn, baseline_timings, updates, calendars)
    programmes = [("Baseline", scn.start, baseline_timings, {})] + [
        (u.label, u.data_date, schedules[u.folder], u.progress) for u in updates
    ]
    facts = {
        "activities": len(baseline.activities),
        "links": len(baseline.links),
        "baseline_pc": baseline_timings[scn.completion].finish,
        "baseline_s1": baseline_timings[section["completion_activity"]].finish,
        "actual_pc": works.timings[scn.completion].finish,
        "actual_s1": works.timings[section["completion_activity"]].finish,
        "events": events,
        "revisions": revisions(scn, works),
        "corrections": records.corrections,
        "retrospective": records.retrospective,
        "forecasts": forecasts,
        "out_of_sequence": works.out_of_sequence,
        "updates": len(updates),
        "elements": len(elements),
        "schedules": schedules,
        "retrospective_activity": scn.records["retrospective_edit"]["activity"],
        **story,
    }
    facts["v2"] = v2_values(scn, facts, works, programmes, calendars)
    output.mkdir(parents=True, exist_ok=True)
    built = Path(tempfile.mkdtemp(prefix=".generate-", dir=output))
    try:
        write_case(
            built,
            scn,
            baseline_rows,
            baseline_links,
            updates,
            records,
            events,
            elements,
            exceptions,
            readme_text(scn, facts),
            known_defects(scn, records),
        )
        move_into_place(built, output)
    finally:
        shutil.rmtree(built, ignore_errors=True)
    return facts


def self_check(output: Path, facts: dict) -> None:
    """Load the written case with the toolkit and compare its early dates with this
    generator's forward pass, snapshot by snapshot, if the toolkit is there."""
    try:
        from delay.case import load_case
    except ImportError as error:
        print(f"note: delay.case is not available ({error}); loader check skipped")
        return
    case = load_case(output)
    print(f"loaded with delay.case.load_case: {case!r}")
    try:
        from delay.cpm import schedule
    except ImportError as error:
        print(f"note: delay.cpm is not available ({error}); schedule check skipped")
        return
    differences = compared = 0
    for folder, timings in facts["schedules"].items():
        result = schedule(case, folder)
        if result.completion != completion_of(timings):
            print(f"warning: {folder}: delay.cpm completion {result.completion}, generator {completion_of(timings)}")
        table = result.activities.set_index("id")
        for aid, t in timings.items():
            if aid == facts["retrospective_activity"]:
                continue  # the records carry the planted edit, the generator the truth
            compared += 1
            row = table.loc[aid]
            if (row["early_start"].date(), row["early_finish"].date()) != (t.start, t.finish):
                differences += 1
                if differences <= 10:
                    print(
                        f"warning: {folder} {aid}: delay.cpm {row['early_start'].date()} to "
                        f"{row['early_finish'].date()}, generator {t.start} to {t.finish}"
                    )
    verdict = "all agree with the generator" if not differences else f"{differences} differ"
    print(f"delay.cpm early dates of {compared} activities in {len(facts['schedules'])} snapshots: {verdict}")


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument(
        "--output", type=Path, default=HERE, help="case folder to write (default: the folder of this script)"
    )
    parser.add_argument(
        "--no-self-check", action="store_true", help="do not load the written case with the toolkit afterwards"
    )
    args = parser.parse_args(argv)
    try:
        facts = build(args.output)
    except (CaseCheckError, ValueError) as error:
        print(f"error: the generated case breaks a rule: {error}", file=sys.stderr)
        return 2
    print(
        f"wrote {args.output}: {facts['activities']} baseline activities, {facts['links']} "
        f"links, {facts['updates']} updates, {len(facts['events'])} events, "
        f"{facts['elements']} elements; planned completion {facts['baseline_pc']}, actual "
        f"{facts['actual_pc']}"
    )
    if not args.no_self_check:
        self_check(args.output, facts)
    return 0


if __name__ == "__main__":
    sys.exit(main())
