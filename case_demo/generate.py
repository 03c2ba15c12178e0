"""Generate the bundled demo case: Tessaly Wharf, a fictitious mixed-use building in Brennholm.

Run ``python case_demo/generate.py`` (optionally ``--output DIR``). The output is a case folder
in case-format v1 (shared/case-format.md) written beside this script. The generator is
deterministic: a fixed seed, no clock, the same files on every run.

Everything in the case is invented: the project, the town, the companies, the documents. No
real person, firm or project is meant.

How the dates come about
------------------------
1. The accepted baseline programme is defined below as activities and links (five-day site
   calendar ``site5`` with public holidays and a winter shutdown; seven-day ``cure7`` for
   concrete curing and screed drying).
2. "What actually happened" is the baseline network changed by the delay events (longer
   durations, later starts), by the contractor's re-planning, by a little seeded
   variation of the contractor's own durations, and by the actual sequence of the works
   (one activity started before its predecessor finished). A forward pass over that actual
   network, following the time convention of the case format, gives every actual date.
3. Every month end is a data date. Each progress update is the programme then in force
   (baseline plus the revisions made so far) with the actual dates that lie before the data
   date; an activity in progress carries the work days still to do as its remaining
   duration. The as-built record is the actual dates of every activity.

Deliberate record defects (a checker must find each of them; KNOWN_DEFECTS.json lists the
same, machine-readable)
-----------------------------------------------------------------------------------------
- duplicate_elements: door ``DOR-03-02`` appears three times in the same place (the original
  and the copies ``DOR-03-02b`` and ``DOR-03-02c``: same classification, same box); column
  ``COL-02-B3`` is duplicated in the same place as ``COL-02-B3b``.
- unlinked_elements: ``WIN-W03-2`` (its wbs ``4.W.3.2`` is a typing slip for ``4.W.03.2``),
  ``PLT-RF-09`` (wbs ``5.0.9``, no such work package) and ``LGT-EXT-07`` (wbs ``8.9``, no
  such work package) match no activity.
- retrospective_edits: the actual finish of ``SET-WELFARE`` (welfare and site offices) is
  changed in the second and later updates to two work days earlier than first reported; the
  site diary in the as-built record keeps the first date.

Disclosed corrections (corrections.csv; these are not defects for the checker, the analyst
has already corrected them): a mis-keyed remaining duration in one update, a link omitted
from one update, and a wrong actual start in the as-built record.

Nothing else is meant to be wrong: ids are unique, every link names known activities, no
snapshot has a logic loop, every element other than the ones above is unique and linked.
"""

from __future__ import annotations

import argparse
import copy
import csv
import datetime as dt
import io
import json
import os
import shutil
import sys
import tempfile
from collections import defaultdict
from dataclasses import dataclass
from pathlib import Path

import numpy as np

SEED = 20250303

PROJECT_NAME = "Tessaly Wharf, Brennholm: mixed-use building (fictitious demo case)"
CONTRACT_START = dt.date(2025, 3, 3)
CONTRACT_COMPLETION = dt.date(2026, 5, 29)
SECTION_1_COMPLETION = dt.date(2026, 1, 30)
LIFT_DELIVERY_PROMISED = dt.date(2026, 2, 9)
POWER_CONNECTION_OFFERED = dt.date(2025, 12, 8)

SITE = "site5"
CURE = "cure7"
HORIZON = (dt.date(2024, 12, 1), dt.date(2028, 12, 31))

EMPLOYER = "Employer"
CONTRACTOR = "Contractor"
NETWORK_OPERATOR = "Network operator"

# Storeys with vertical structure, and the slab that closes each of them.
STOREYS = ["B1", "00", "01", "02", "03", "04", "05"]
SLAB_ABOVE = {"B1": "00", "00": "01", "01": "02", "02": "03", "03": "04", "04": "05", "05": "RF"}
SLABS = [SLAB_ABOVE[s] for s in STOREYS]
FLOORS = ["00", "01", "02", "03", "04", "05"]  # floors above ground: facade, fit-out
RESIDENTIAL = ["01", "02", "03", "04", "05"]
ELEVATIONS = [("N", "north"), ("E", "east"), ("S", "south"), ("W", "west")]
LEVEL_Z = {"B1": -3.6, "00": 0.0, "01": 4.5, "02": 7.7, "03": 10.9, "04": 14.1, "05": 17.3,
           "RF": 20.5}


class CaseCheckError(Exception):
    """The generated case would break a rule of the case format or of its own story."""


def require(condition: bool, message: str):
    if not condition:
        raise CaseCheckError(message)


def level_name(level: str) -> str:
    return {"B1": "basement B1", "00": "ground floor 00", "RF": "roof"}.get(level, f"level {level}")


# ---------------------------------------------------------------------------------------
# Calendars
# ---------------------------------------------------------------------------------------

def easter_sunday(year: int) -> dt.date:
    """Gregorian Easter Sunday (the anonymous Gregorian algorithm, Meeus/Jones/Butcher)."""
    a, b, c = year % 19, year // 100, year % 100
    d, e = b // 4, b % 4
    f = (b + 8) // 25
    g = (b - f + 1) // 3
    h = (19 * a + b - d - g + 15) % 30
    i, k = c // 4, c % 4
    l = (32 + 2 * e + 2 * i - h - k) % 7
    m = (a + 11 * h + 22 * l) // 451
    month = (h + l - 7 * m + 114) // 31
    day = ((h + l - 7 * m + 114) % 31) + 1
    return dt.date(year, month, day)


def nth_weekday(year: int, month: int, weekday: int, n: int) -> dt.date:
    first = dt.date(year, month, 1)
    offset = (weekday - first.weekday()) % 7
    return first + dt.timedelta(days=offset + 7 * (n - 1))


def site_exceptions() -> list[dict]:
    """Public holidays of the (invented) region, Brennholm's own Harbour Day, winter shutdowns."""
    rows: list[dict] = []
    seen: set[dt.date] = set()

    def off(day: dt.date, reason: str):
        if day.weekday() < 5 and day not in seen:  # weekends are not work days anyway
            seen.add(day)
            rows.append({"calendar": SITE, "date": day, "working": "no", "reason": reason})

    for year in (2025, 2026, 2027):
        easter = easter_sunday(year)
        holidays = [
            (dt.date(year, 1, 1), "Public holiday: New Year's Day"),
            (easter - dt.timedelta(days=2), "Public holiday: Good Friday"),
            (easter + dt.timedelta(days=1), "Public holiday: Easter Monday"),
            (dt.date(year, 5, 1), "Public holiday: Labour Day"),
            (easter + dt.timedelta(days=39), "Public holiday: Ascension Day"),
            (easter + dt.timedelta(days=50), "Public holiday: Whit Monday"),
            (nth_weekday(year, 8, 0, 3), "Local holiday: Brennholm Harbour Day"),
            (nth_weekday(year, 10, 0, 1), "Public holiday: Charter Day"),
            (dt.date(year, 12, 25), "Public holiday: Christmas Day"),
            (dt.date(year, 12, 26), "Public holiday: Second Christmas Day"),
        ]
        for day, reason in sorted(holidays):
            off(day, reason)
    for first, last in ((dt.date(2025, 12, 22), dt.date(2026, 1, 2)),
                        (dt.date(2026, 12, 21), dt.date(2027, 1, 1))):
        day = first
        while day <= last:
            off(day, "Winter shutdown of the site (contract particulars)")
            day += dt.timedelta(days=1)
    rows.sort(key=lambda r: (r["calendar"], r["date"]))
    return rows


class WorkCalendar:
    """Work days of one calendar as a sorted numpy array of dates (numpy busday functions)."""

    def __init__(self, name: str, weekmask: str, holidays: list[dt.date], extra: list[dt.date]):
        self.name = name
        first, last = (np.datetime64(d, "D") for d in HORIZON)
        every_day = np.arange(first, last + 1, dtype="datetime64[D]")
        working = np.is_busday(every_day, weekmask=weekmask,
                               holidays=np.array(holidays, dtype="datetime64[D]"))
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

    def is_workday(self, day: dt.date) -> bool:
        k = self.on_or_after(day)
        return k < len(self.days) and self.date(k) == day

    def add_workdays(self, day: dt.date, n: int) -> dt.date:
        """The work day ``n`` work days after the first work day on or after ``day``."""
        return self.date(self.on_or_after(day) + n)

    def count(self, first: dt.date, last: dt.date) -> int:
        """Work days in ``first .. last`` inclusive."""
        return self.after(last) - self.on_or_after(first)


def build_calendars(exceptions: list[dict]) -> dict[str, WorkCalendar]:
    site_holidays = [r["date"] for r in exceptions
                     if r["calendar"] == SITE and r["working"] == "no"]
    site_extra = [r["date"] for r in exceptions if r["calendar"] == SITE and r["working"] == "yes"]
    return {
        SITE: WorkCalendar(SITE, "1111100", site_holidays, site_extra),
        CURE: WorkCalendar(CURE, "1111111", [], []),
    }


CALENDAR_ROWS = [
    {"calendar": SITE, "workdays": "Mon Tue Wed Thu Fri"},
    {"calendar": CURE, "workdays": "Mon Tue Wed Thu Fri Sat Sun"},
]


# ---------------------------------------------------------------------------------------
# The programme network
# ---------------------------------------------------------------------------------------

@dataclass
class Activity:
    id: str
    name: str
    duration: int
    wbs: str
    calendar: str = SITE
    kind: str = "task"
    constraint: str = ""
    constraint_date: dt.date | None = None
    party: str = CONTRACTOR


@dataclass(frozen=True)
class Link:
    pred: str
    succ: str
    type: str = "FS"
    lag: int = 0


class Programme:
    """Activities (in WBS order) and links of one programme."""

    def __init__(self):
        self.activities: dict[str, Activity] = {}
        self.links: list[Link] = []

    def copy(self) -> "Programme":
        other = Programme()
        other.activities = {k: copy.copy(v) for k, v in self.activities.items()}
        other.links = list(self.links)
        return other

    def add(self, id: str, name: str, duration: int, wbs: str, **fields) -> Activity:
        if id in self.activities:
            raise ValueError(f"activity {id} defined twice")
        self.activities[id] = Activity(id, name, duration, wbs, **fields)
        return self.activities[id]

    def link(self, pred: str, succ: str, type: str = "FS", lag: int = 0):
        if any(l.pred == pred and l.succ == succ for l in self.links):
            raise ValueError(f"link {pred}>{succ} defined twice")
        self.links.append(Link(pred, succ, type, lag))

    def remove_link(self, pred: str, succ: str):
        before = len(self.links)
        self.links = [l for l in self.links if not (l.pred == pred and l.succ == succ)]
        if len(self.links) != before - 1:
            raise ValueError(f"no link {pred}>{succ} to remove")

    def remove_activity(self, id: str):
        del self.activities[id]
        self.links = [l for l in self.links if id not in (l.pred, l.succ)]

    def insert_after(self, anchor: str, activity: Activity):
        """Insert ``activity`` right after ``anchor`` in the WBS order of the table."""
        items = list(self.activities.items())
        position = [k for k, _ in items].index(anchor) + 1
        items.insert(position, (activity.id, activity))
        self.activities = dict(items)


# Durations of the facade design path, tuned so that path runs close to the frame path.
ENV_DESIGN_DAYS = 80
ENV_FABRICATION_DAYS = 60


def build_baseline() -> Programme:
    """The accepted as-planned programme (revision B, accepted at contract start)."""
    p = Programme()
    add, link = p.add, p.link

    # 1.1 Key dates --------------------------------------------------------------------
    add("MS-START", "Contract start: possession of the site", 0, "1.1", kind="start_milestone",
        party=EMPLOYER)

    # 1.2 Site establishment, 1.3 cranage and hoists -------------------------------------
    add("SET-HOARDING", "Site hoarding, gates and traffic management", 5, "1.2")
    add("SET-WELFARE", "Welfare facilities and site offices", 8, "1.2")
    add("SET-TEMP-POWER", "Temporary site electrics and generator", 5, "1.2")
    add("SET-CRANE-BASE", "Tower crane base: excavate, reinforce and pour", 4, "1.3")
    add("SET-CRANE-CURE", "Tower crane base: concrete curing", 7, "1.3", calendar=CURE)
    add("SET-CRANE-ERECT", "Erect tower crane", 3, "1.3")
    add("SET-HOIST-ERECT", "Erect construction hoist on the north elevation", 3, "1.3")
    add("SET-CRANE-DISMANTLE", "Dismantle tower crane", 3, "1.3")
    add("SET-HOIST-REMOVE", "Remove construction hoist and make good", 4, "1.3")
    add("SET-TEMP-POWER-OFF", "Decommission temporary supply and generator", 3, "1.2")
    add("SET-DEMOBILISE", "Final site clearance and demobilisation", 5, "1.2")
    link("MS-START", "SET-HOARDING")
    link("SET-HOARDING", "SET-WELFARE", "SS", 2)
    link("SET-HOARDING", "SET-TEMP-POWER")
    link("SET-WELFARE", "SUB-PILING-MAT")
    link("SET-TEMP-POWER", "SET-CRANE-ERECT")

    # 2 Substructure ---------------------------------------------------------------------
    add("SUB-CLEARANCE", "Site clearance and break-out of existing slabs", 10, "2.1.1")
    add("SUB-DIVERSIONS", "Diversion of existing services", 12, "2.1.1")
    add("SUB-PILING-MAT", "Piling platform and rig mobilisation", 5, "2.1.4")
    add("SUB-PILED-WALL-NE", "Contiguous piled wall, north and east", 13, "2.2.1")
    add("SUB-PILED-WALL-SW", "Contiguous piled wall, south and west", 13, "2.2.2")
    add("SUB-CAPPING-BEAM-NE", "Capping beam, north and east", 6, "2.2.1")
    add("SUB-CAPPING-BEAM-SW", "Capping beam, south and west", 6, "2.2.2")
    add("SUB-CAPPING-BEAM-CURE", "Capping beam: concrete curing", 7, "2.2.2", calendar=CURE)
    add("SUB-PROPS", "Temporary props to the piled wall", 5, "2.1.3")
    add("SUB-EXCAVATION-A", "Bulk excavation to formation, zone A (west)", 12, "2.1.2")
    add("SUB-EXCAVATION-B", "Bulk excavation to formation, zone B (east)", 12, "2.1.2")
    add("SUB-PILES-A", "Bearing piles, zone A", 8, "2.2.3")
    add("SUB-PILES-B", "Bearing piles, zone B", 8, "2.2.4")
    add("SUB-PILE-TEST-A", "Pile integrity tests, zone A", 2, "2.2.5")
    add("SUB-PILE-TEST-B", "Pile integrity tests, zone B", 2, "2.2.5")
    add("SUB-CAPS-A", "Pile caps and ground beams, zone A", 8, "2.3.1")
    add("SUB-CAPS-B", "Pile caps and ground beams, zone B", 8, "2.3.2")
    add("SUB-LIFT-PIT", "Lift pit and core base", 6, "2.3.3")
    add("SUB-DRAINAGE", "Below-slab drainage", 6, "2.5.3")
    add("SUB-SLAB-A-REINFORCE", "Basement slab zone A: membrane and reinforcement", 6, "2.5.1")
    add("SUB-SLAB-A-POUR", "Basement slab zone A: pour", 1, "2.5.1")
    add("SUB-SLAB-A-CURE", "Basement slab zone A: curing", 7, "2.5.1", calendar=CURE)
    add("SUB-SLAB-B-REINFORCE", "Basement slab zone B: membrane and reinforcement", 6, "2.5.2")
    add("SUB-SLAB-B-POUR", "Basement slab zone B: pour", 1, "2.5.2")
    add("SUB-SLAB-B-CURE", "Basement slab zone B: curing", 7, "2.5.2", calendar=CURE)
    add("SUB-WALL-W", "Basement lining wall, west", 6, "2.4.4")
    add("SUB-WALL-N", "Basement lining wall, north", 8, "2.4.1")
    add("SUB-WALL-E", "Basement lining wall, east", 6, "2.4.2")
    add("SUB-WALL-S", "Basement lining wall, south", 8, "2.4.3")
    add("SUB-RAMP", "Car park access ramp", 8, "2.5.4")
    add("SUB-PROPS-OUT", "Remove temporary props (podium slab in place)", 4, "2.1.3")
    add("MS-SUBSTRUCTURE", "Substructure complete", 0, "1.1", kind="finish_milestone")
    link("SET-HOARDING", "SUB-CLEARANCE")
    link("SUB-CLEARANCE", "SUB-DIVERSIONS", "SS", 5)
    link("SUB-DIVERSIONS", "SUB-EXCAVATION-A")
    link("SUB-CLEARANCE", "SUB-PILING-MAT")
    link("SUB-CLEARANCE", "SET-CRANE-BASE")
    link("SET-CRANE-BASE", "SET-CRANE-CURE")
    link("SET-CRANE-CURE", "SET-CRANE-ERECT")
    link("SUB-PILING-MAT", "SUB-PILED-WALL-NE")
    link("SUB-PILED-WALL-NE", "SUB-PILED-WALL-SW")
    link("SUB-PILED-WALL-NE", "SUB-CAPPING-BEAM-NE")
    link("SUB-PILED-WALL-SW", "SUB-CAPPING-BEAM-SW")
    link("SUB-CAPPING-BEAM-NE", "SUB-CAPPING-BEAM-SW")
    link("SUB-CAPPING-BEAM-SW", "SUB-CAPPING-BEAM-CURE")
    link("SUB-CAPPING-BEAM-CURE", "SUB-PROPS")
    link("SUB-PROPS", "SUB-EXCAVATION-A", "SS", 3)
    link("SUB-CAPPING-BEAM-CURE", "SUB-EXCAVATION-A")
    link("SUB-EXCAVATION-A", "SUB-EXCAVATION-B", "SS", 6)
    link("SUB-PROPS", "SUB-EXCAVATION-B")
    link("SUB-EXCAVATION-A", "SUB-PILES-A")
    link("SUB-EXCAVATION-B", "SUB-PILES-B")
    link("SUB-PILES-A", "SUB-PILES-B")
    link("SUB-PILES-A", "SUB-PILE-TEST-A", "FS", 5)
    link("SUB-PILES-B", "SUB-PILE-TEST-B", "FS", 5)
    link("SUB-PILE-TEST-A", "SUB-CAPS-A")
    link("SUB-PILE-TEST-B", "SUB-CAPS-B")
    link("SUB-CAPS-A", "SUB-CAPS-B")
    link("SUB-CAPS-B", "SUB-LIFT-PIT")
    link("SUB-CAPS-A", "SUB-DRAINAGE", "SS", 3)
    link("SUB-CAPS-A", "SUB-SLAB-A-REINFORCE")
    link("SUB-DRAINAGE", "SUB-SLAB-A-REINFORCE")
    link("SUB-SLAB-A-REINFORCE", "SUB-SLAB-A-POUR")
    link("SUB-SLAB-A-POUR", "SUB-SLAB-A-CURE")
    link("SUB-CAPS-B", "SUB-SLAB-B-REINFORCE")
    link("SUB-LIFT-PIT", "SUB-SLAB-B-REINFORCE")
    link("SUB-SLAB-A-REINFORCE", "SUB-SLAB-B-REINFORCE")
    link("SUB-SLAB-B-REINFORCE", "SUB-SLAB-B-POUR")
    link("SUB-SLAB-B-POUR", "SUB-SLAB-B-CURE")
    link("SUB-SLAB-A-POUR", "SUB-WALL-W", "FS", 2)
    link("SUB-WALL-W", "SUB-WALL-N")
    link("SUB-WALL-N", "SUB-WALL-E")
    link("SUB-SLAB-B-POUR", "SUB-WALL-E", "FS", 2)
    link("SUB-WALL-E", "SUB-WALL-S")
    link("SUB-WALL-S", "SUB-RAMP")
    link("SUB-WALL-S", "MS-SUBSTRUCTURE")
    link("SUB-RAMP", "MS-SUBSTRUCTURE")
    link("MS-SUBSTRUCTURE", "SUB-PROPS-OUT")

    # 3 Frame: per storey the columns and core walls, then the slab that closes it --------
    previous_pour = None
    for storey in STOREYS:
        slab = SLAB_ABOVE[storey]
        col, stair = f"FRM-{storey}-COLUMNS", f"FRM-{storey}-STAIR"
        deck, pour, cure, strike = (f"FRM-{slab}-{x}" for x in ("DECK", "POUR", "CURE", "STRIKE"))
        add(col, f"Columns and core walls, storey {storey}", 6 if storey == "B1" else 5,
            f"3.{storey}.1")
        add(stair, f"Precast stair flights, storey {storey}", 2, f"3.{storey}.3")
        slab_text = "podium slab level 00" if slab == "00" else (
            "roof slab" if slab == "RF" else f"slab level {slab}")
        add(deck, f"Formwork and reinforcement, {slab_text}", 9 if slab == "00" else 7,
            f"3.{slab}.2")
        add(pour, f"Pour {slab_text}", 1, f"3.{slab}.2")
        add(cure, f"Curing, {slab_text}", 7, f"3.{slab}.2", calendar=CURE)
        add(strike, f"Strike formwork and back-prop, {slab_text}", 2, f"3.{slab}.2")
        if previous_pour is None:
            link("SUB-SLAB-A-CURE", col)
            link("SUB-SLAB-B-CURE", col)
            link("SET-CRANE-ERECT", col)
        else:
            link(previous_pour, col, "SS", 2)
        link(col, deck)
        if slab == "00":
            link("SUB-WALL-S", deck)
        link(deck, pour)
        link(pour, cure)
        link(cure, strike)
        link(pour, stair)
        previous_pour = pour
    add("MS-TOPPED-OUT", "Frame topped out", 0, "1.1", kind="finish_milestone")
    link("FRM-RF-POUR", "MS-TOPPED-OUT")
    link("FRM-00-STRIKE", "SUB-PROPS-OUT")
    link("SUB-WALL-S", "SUB-PROPS-OUT")
    link("FRM-02-STRIKE", "SET-HOIST-ERECT")

    # 4 Envelope ------------------------------------------------------------------------
    add("ENV-DESIGN", "Facade design information: panel and fixing details (Employer's architect)",
        ENV_DESIGN_DAYS, "4.0.1", party=EMPLOYER)
    add("ENV-SHOP-DRAWINGS", "Facade shop drawings and approval", 12, "4.0.2")
    add("ENV-FABRICATE", "Facade panel fabrication and first deliveries", ENV_FABRICATION_DAYS,
        "4.0.3")
    link("MS-START", "ENV-DESIGN")
    link("ENV-DESIGN", "ENV-SHOP-DRAWINGS")
    link("ENV-SHOP-DRAWINGS", "ENV-FABRICATE")
    previous_panel = "ENV-FABRICATE"
    for floor in FLOORS:
        above = SLAB_ABOVE[floor]
        for code, word in ELEVATIONS:
            panel, window = f"ENV-{code}{floor}-PANELS", f"ENV-{code}{floor}-WINDOWS"
            glazing = "Shopfront glazing" if floor == "00" else "Windows"
            add(panel, f"Facade panels, {word} elevation, {level_name(floor)}", 3,
                f"4.{code}.{floor}.1")
            add(window, f"{glazing}, {word} elevation, {level_name(floor)}", 3,
                f"4.{code}.{floor}.2")
            link(previous_panel, panel)
            if code == "N":
                link(f"FRM-{above}-STRIKE", panel)
            if code == "E":
                # the glazing gang follows the panel gang round the corner: finish-to-finish
                link(panel, window, "FF", 1)
            else:
                link(panel, window, "SS", 2)
            previous_panel = panel
    add("ENV-ROOF-UPSTAND", "Roof upstands and parapets", 5, "4.R.1")
    add("ENV-ROOF-TEMP", "Temporary weather protection to the roof slab", 3, "4.R.3")
    add("ENV-ROOF-MEMBRANE", "Roof insulation and waterproof membrane", 10, "4.R.2")
    add("MS-WEATHERTIGHT", "Building weathertight", 0, "1.1", kind="finish_milestone")
    link("FRM-RF-STRIKE", "ENV-ROOF-UPSTAND")
    link("FRM-RF-STRIKE", "ENV-ROOF-TEMP")
    link("ENV-ROOF-TEMP", "ENV-ROOF-MEMBRANE")
    link("ENV-ROOF-UPSTAND", "ENV-ROOF-MEMBRANE", "FS", -2)  # a lead: membrane laps the upstands
    link("ENV-ROOF-MEMBRANE", "MS-WEATHERTIGHT")
    link("ENV-W05-WINDOWS", "MS-WEATHERTIGHT")

    # 5 Services ------------------------------------------------------------------------
    previous = None
    for level in ["B1"] + FLOORS:
        above = SLAB_ABOVE[level]
        mech, elec, plumb, sprink, second = (
            f"MEP-{level}-{x}"
            for x in ("MECHANICAL", "ELECTRICAL", "PLUMBING", "SPRINKLER", "SECOND-FIX"))
        add(mech, f"Mechanical first fix, {level_name(level)}", 7, f"5.{level}.1")
        add(elec, f"Electrical first fix, {level_name(level)}", 7, f"5.{level}.1")
        add(plumb, f"Plumbing and drainage first fix, {level_name(level)}", 5, f"5.{level}.1")
        add(sprink, f"Sprinkler installation, {level_name(level)}", 4, f"5.{level}.1")
        add(second, f"Services second fix, {level_name(level)}", 7, f"5.{level}.2")
        link(f"FRM-{above}-STRIKE", mech)
        link(mech, elec, "SS", 3)
        link(mech, plumb, "SS", 2)
        link(mech, sprink, "SS", 3)
        if previous is not None:
            link(f"MEP-{previous}-MECHANICAL", mech)
            link(f"MEP-{previous}-ELECTRICAL", elec)
            if previous != "B1":
                link(f"MEP-{previous}-SECOND-FIX", second)
        previous = level
    link("MEP-B1-ELECTRICAL", "MEP-B1-SECOND-FIX")
    link("MEP-B1-SPRINKLER", "MEP-B1-SECOND-FIX")
    add("MEP-PLANTROOM", "Basement plant room: pumps, boilers and tanks", 12, "5.0.1")
    add("MEP-SWITCHBOARD", "Main switchboard and low-voltage distribution", 7, "5.0.2")
    add("MEP-POWER-ON", "Energise permanent power supply (network operator)", 1, "5.0.7",
        party=NETWORK_OPERATOR, constraint="earliest_start",
        constraint_date=POWER_CONNECTION_OFFERED)
    add("MEP-RISERS", "Rising mains and service risers, all levels", 12, "5.0.3")
    add("MEP-BMS", "Building management system: installation", 12, "5.0.4")
    add("MEP-ROOF-PLANT", "Roof plant: air handling units and heat pumps", 5, "5.0.5")
    add("MEP-FIRE-ALARM", "Fire alarm and detection installation", 10, "5.0.6")
    link("MEP-B1-MECHANICAL", "MEP-PLANTROOM")
    link("MEP-B1-ELECTRICAL", "MEP-SWITCHBOARD")
    link("MEP-SWITCHBOARD", "MEP-POWER-ON")
    link("MEP-00-MECHANICAL", "MEP-RISERS", "SS", 4)
    link("MEP-05-MECHANICAL", "MEP-RISERS", "FF", 4)
    link("MEP-PLANTROOM", "MEP-BMS")
    link("MEP-RISERS", "MEP-BMS")
    link("ENV-ROOF-MEMBRANE", "MEP-ROOF-PLANT")
    link("MEP-05-ELECTRICAL", "MEP-FIRE-ALARM")
    link("MEP-ROOF-PLANT", "SET-CRANE-DISMANTLE")
    link("MS-TOPPED-OUT", "SET-CRANE-DISMANTLE")
    # SF: the temporary supply cannot be switched off before the permanent one is energised.
    link("MEP-POWER-ON", "SET-TEMP-POWER-OFF", "SF", 2)

    # 6 Fit-out -------------------------------------------------------------------------
    previous = None
    for floor in FLOORS:
        ids = {x: f"FIT-{floor}-{x}" for x in
               ("SCREED", "DRYING", "PARTITIONS", "CEILINGS", "JOINERY", "KITCHEN", "DECORATION",
                "FLOOR-FINISH", "SNAG")}
        where = level_name(floor)
        retail = floor == "00"
        add(ids["SCREED"], f"Floor screed, {where}", 4, f"6.{floor}.1")
        add(ids["DRYING"], f"Screed drying, {where}", 14, f"6.{floor}.1", calendar=CURE)
        add(ids["PARTITIONS"], f"Partitions and drylining, {where}", 9 if retail else 12,
            f"6.{floor}.1")
        add(ids["CEILINGS"], f"Suspended ceilings, {where}", 6, f"6.{floor}.2")
        add(ids["JOINERY"], f"Doors, frames and joinery, {where}", 6, f"6.{floor}.3")
        if not retail:
            add(ids["KITCHEN"], f"Kitchens and bathrooms, {where}", 10, f"6.{floor}.4")
        add(ids["DECORATION"], f"Decoration, {where}", 7, f"6.{floor}.2")
        add(ids["FLOOR-FINISH"], f"Floor finishes, {where}", 5, f"6.{floor}.2")
        add(ids["SNAG"], f"Clean and snag, {where}", 4, f"6.{floor}.5")
        second = f"MEP-{floor}-SECOND-FIX"
        link(f"MEP-{floor}-PLUMBING", ids["SCREED"])
        link(ids["SCREED"], ids["DRYING"])
        for code, _ in ELEVATIONS:  # the floor is weathertight when its windows are in
            link(f"ENV-{code}{floor}-WINDOWS", ids["PARTITIONS"])
        link(f"FRM-{floor}-STAIR", ids["PARTITIONS"])
        link(f"MEP-{floor}-ELECTRICAL", ids["PARTITIONS"])
        link(ids["SCREED"], ids["PARTITIONS"], "FS", 2)
        link(ids["PARTITIONS"], ids["CEILINGS"])
        link(f"MEP-{floor}-SPRINKLER", ids["CEILINGS"])
        link(ids["CEILINGS"], second, "SS", 2)
        link(ids["CEILINGS"], ids["JOINERY"])
        link(ids["JOINERY"], ids["DECORATION"])
        if not retail:
            link(ids["PARTITIONS"], ids["KITCHEN"])
            link(ids["KITCHEN"], ids["DECORATION"])
        link(second, ids["DECORATION"], "FF", 2)
        link(ids["DECORATION"], ids["FLOOR-FINISH"])
        link(ids["DRYING"], ids["FLOOR-FINISH"])
        link(ids["FLOOR-FINISH"], ids["SNAG"])
        link(second, ids["SNAG"])
        if previous is not None:
            for x in ("SCREED", "PARTITIONS", "DECORATION"):
                link(f"FIT-{previous}-{x}", ids[x])
            if not retail and previous != "00":
                link(f"FIT-{previous}-KITCHEN", ids["KITCHEN"])
        previous = floor
    add("FIT-B1-DECK", "Car park deck coating", 8, "6.B1.1")
    add("FIT-B1-MARK", "Car park line marking and signage", 3, "6.B1.2")
    add("FIT-B1-DOORS", "Car park fire doors and barriers", 4, "6.B1.3")
    link("MEP-B1-SECOND-FIX", "FIT-B1-DECK")
    link("SUB-RAMP", "FIT-B1-DECK")
    link("SUB-PROPS-OUT", "FIT-B1-DECK")
    link("FIT-B1-DECK", "FIT-B1-MARK")
    link("FIT-B1-DECK", "FIT-B1-DOORS", "SS", 3)
    link("FRM-B1-STAIR", "FIT-B1-DOORS")
    link("SET-HOIST-ERECT", "FIT-01-PARTITIONS")
    link("MEP-B1-PLUMBING", "MEP-B1-SECOND-FIX")

    # 7 Lifts (Employer-supplied equipment) ----------------------------------------------
    add("LFT-DELIVERY", "Employer-supplied lift equipment delivered to site", 1, "7.1",
        party=EMPLOYER, constraint="earliest_start", constraint_date=LIFT_DELIVERY_PROMISED)
    add("LFT-SURVEY", "Lift shaft survey and bracket setting-out", 3, "7.1")
    add("LFT-1-INSTALL", "Lift 1 installation: guides, car and drive", 20, "7.2")
    add("LFT-2-INSTALL", "Lift 2 installation: guides, car and drive", 20, "7.3")
    add("LFT-TEST", "Lift testing and certification", 5, "7.4")
    link("MS-START", "LFT-DELIVERY")
    link("FRM-RF-POUR", "LFT-SURVEY")
    link("LFT-DELIVERY", "LFT-1-INSTALL")
    link("LFT-SURVEY", "LFT-1-INSTALL")
    link("LFT-1-INSTALL", "LFT-2-INSTALL")
    link("LFT-2-INSTALL", "LFT-TEST")
    link("MEP-POWER-ON", "LFT-TEST")
    link("LFT-TEST", "SET-HOIST-REMOVE")

    # 8 External works -------------------------------------------------------------------
    add("EXT-DRAINAGE", "External drainage and connections", 12, "8.1")
    add("EXT-HARD-N", "Hard landscaping, north frontage", 8, "8.2")
    add("EXT-HARD-S", "Hard landscaping, south courtyard", 8, "8.3")
    add("EXT-SOFT", "Soft landscaping and planting", 6, "8.4")
    add("EXT-BOUNDARY", "Boundary walls and railings", 8, "8.5")
    add("EXT-LIGHTING", "External lighting", 4, "8.6")
    add("EXT-CROSSING", "Footway crossing and reinstatement", 4, "8.7")
    link("SET-CRANE-DISMANTLE", "EXT-DRAINAGE")
    link("SUB-RAMP", "EXT-DRAINAGE")
    link("EXT-DRAINAGE", "EXT-HARD-N")
    link("EXT-DRAINAGE", "EXT-HARD-S")
    link("EXT-HARD-S", "EXT-SOFT")
    link("EXT-DRAINAGE", "EXT-BOUNDARY")
    link("EXT-BOUNDARY", "EXT-LIGHTING")
    link("MEP-POWER-ON", "EXT-LIGHTING")
    link("EXT-HARD-N", "EXT-CROSSING")
    link("SET-HOIST-REMOVE", "EXT-HARD-N")

    # 9 Commissioning and handover ---------------------------------------------------------
    add("COM-MECHANICAL", "Commission mechanical services", 12, "9.1")
    add("COM-ELECTRICAL", "Commission electrical services", 8, "9.1")
    add("COM-FIRE", "Fire alarm and sprinkler cause-and-effect tests", 5, "9.1")
    add("COM-BMS", "Building management system commissioning", 4, "9.1")
    add("COM-CARPARK",
        "Section 1: car park and retail units commissioning, fire officer's inspection", 3, "9.2")
    add("COM-AUTHORITY", "Building control and fire authority inspection", 3, "9.3")
    add("COM-CLEAN", "Final builder's clean", 5, "9.3")
    add("COM-DOCS", "Operation and maintenance manuals, training", 10, "9.3")
    add("COM-INSPECT", "Practical completion inspection", 3, "9.3")
    add("MS-SECTION-1", "Section 1 complete: basement car park and ground-floor retail units", 0,
        "1.1",
        kind="finish_milestone", constraint="latest_finish", constraint_date=SECTION_1_COMPLETION)
    add("MS-COMPLETION", "Practical completion of the whole of the Works (Section 2)", 0, "1.1",
        kind="finish_milestone", constraint="latest_finish", constraint_date=CONTRACT_COMPLETION)
    link("MEP-05-SECOND-FIX", "COM-MECHANICAL")
    link("MEP-PLANTROOM", "COM-MECHANICAL")
    link("MEP-ROOF-PLANT", "COM-MECHANICAL")
    link("MEP-POWER-ON", "COM-MECHANICAL")
    link("MS-WEATHERTIGHT", "COM-MECHANICAL")
    link("MEP-SWITCHBOARD", "COM-ELECTRICAL")
    link("MEP-05-SECOND-FIX", "COM-ELECTRICAL")
    link("MEP-POWER-ON", "COM-ELECTRICAL")
    link("COM-MECHANICAL", "COM-FIRE")
    link("COM-ELECTRICAL", "COM-FIRE")
    link("MEP-FIRE-ALARM", "COM-FIRE")
    link("FIT-05-DECORATION", "COM-FIRE")
    link("COM-MECHANICAL", "COM-BMS")
    link("MEP-BMS", "COM-BMS")
    link("FIT-B1-MARK", "COM-CARPARK")
    link("FIT-00-SNAG", "COM-CARPARK")
    link("FIT-B1-DOORS", "COM-CARPARK")
    link("MEP-PLANTROOM", "COM-CARPARK")
    link("MEP-POWER-ON", "COM-CARPARK")
    link("COM-CARPARK", "MS-SECTION-1")
    link("MS-SECTION-1", "COM-INSPECT")
    link("SET-TEMP-POWER-OFF", "SET-DEMOBILISE")
    link("COM-FIRE", "COM-AUTHORITY")
    link("LFT-TEST", "COM-AUTHORITY")
    for floor in FLOORS:
        link(f"FIT-{floor}-SNAG", "COM-CLEAN")
    link("EXT-SOFT", "COM-CLEAN")
    link("COM-MECHANICAL", "COM-DOCS", "SS", 4)
    link("COM-AUTHORITY", "COM-INSPECT")
    link("COM-CLEAN", "COM-INSPECT")
    link("COM-BMS", "COM-INSPECT")
    link("COM-DOCS", "COM-INSPECT")
    link("EXT-LIGHTING", "COM-INSPECT")
    link("EXT-CROSSING", "COM-INSPECT")
    link("SET-HOIST-REMOVE", "SET-DEMOBILISE")
    link("EXT-SOFT", "SET-DEMOBILISE")
    link("SET-DEMOBILISE", "COM-INSPECT", "FF", 0)
    link("COM-INSPECT", "MS-COMPLETION")
    return p


# ---------------------------------------------------------------------------------------
# Forward pass (the case format's time convention and scheduling rules 1 to 3)
# ---------------------------------------------------------------------------------------

@dataclass
class Timing:
    start: dt.date
    finish: dt.date
    early_start: int   # boundary on the activity's own calendar
    early_finish: int
    logic_start: int   # where logic alone would have started it (before holds and delays)


@dataclass(frozen=True)
class Progress:
    actual_start: dt.date | None = None
    actual_finish: dt.date | None = None
    remaining: int | None = None


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
    for l in programme.links:
        indegree[l.succ] += 1
        successors[l.pred].append(l.succ)
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


def forward_pass(
    programme: Programme,
    calendars: dict[str, WorkCalendar],
    data_date: dt.date,
    progress: dict[str, Progress] | None = None,
    start_delays: dict[str, int] | None = None,
    hold_windows: list[tuple[dt.date, dt.date, set[str]]] | None = None,
    held: dict[str, tuple[dt.date, dt.date]] | None = None,
    not_before: dict[str, dt.date] | None = None,
) -> dict[str, Timing]:
    """Early dates of every activity.

    ``progress`` gives actual dates and remaining durations (retained logic). For the
    actual network, ``start_delays`` starts an activity that many work days after its logic
    allows, and ``hold_windows`` keeps the listed activities from starting inside a window;
    ``held`` collects the activities a window actually held; ``not_before`` keeps an
    activity from starting before a date (materials not yet on site).
    """
    progress = progress or {}
    not_before = not_before or {}
    start_delays = start_delays or {}
    hold_windows = hold_windows or []
    incoming = defaultdict(list)
    for l in programme.links:
        incoming[l.succ].append(l)
    timings: dict[str, Timing] = {}
    for aid in topological_order(programme):
        a = programme.activities[aid]
        cal = calendars[a.calendar]
        milestone = milestone_kind(a, bool(incoming[aid]))
        prog = progress.get(aid, Progress())
        if prog.actual_finish is not None:  # complete: its actual dates stand
            if milestone == "start_milestone":
                b = cal.on_or_after(prog.actual_start or prog.actual_finish)
                timings[aid] = Timing(prog.actual_finish, prog.actual_finish, b, b, b)
            elif milestone == "finish_milestone":
                b = cal.after(prog.actual_finish)
                timings[aid] = Timing(prog.actual_finish, prog.actual_finish, b, b, b)
            else:
                es, ef = cal.on_or_after(prog.actual_start), cal.after(prog.actual_finish)
                timings[aid] = Timing(prog.actual_start, prog.actual_finish, es, ef, es)
            continue
        in_progress = prog.actual_start is not None
        duration = prog.remaining if prog.remaining is not None else a.duration
        start = cal.on_or_after(data_date)
        if milestone == "finish_milestone":
            start += 1  # a not-started milestone is never dated before the data date
        for l in incoming[aid]:
            pred = timings[l.pred]
            pa = programme.activities[l.pred]
            from_finish = l.type in ("FS", "FF")
            if pa.calendar == a.calendar:
                point = pred.early_finish if from_finish else pred.early_start
            else:
                if milestone or milestone_kind(pa, bool(incoming[l.pred])):
                    raise ValueError(f"cross-calendar link {l} involves a milestone")
                point = cal.after(pred.finish) if from_finish else cal.on_or_after(pred.start)
            bound = point + l.lag
            if l.type in ("FF", "SF"):
                bound -= duration
            start = max(start, bound)
        if not in_progress and a.constraint == "earliest_start":
            start = max(start, cal.on_or_after(a.constraint_date))
        logic_start = start
        if not in_progress:
            if aid in not_before:
                start = max(start, cal.on_or_after(not_before[aid]))
            start += start_delays.get(aid, 0)
            for first, last, ids in hold_windows:
                if aid in ids and first <= cal.date(start) <= last:
                    start = cal.after(last)
                    if held is not None:
                        held[aid] = (first, last)
        finish_boundary = start + duration
        if milestone == "start_milestone":
            when = cal.date(start)
            timings[aid] = Timing(when, when, start, start, logic_start)
        elif milestone == "finish_milestone":
            when = cal.date(start - 1)
            timings[aid] = Timing(when, when, start, start, logic_start)
        else:
            first_day = prog.actual_start if in_progress else cal.date(start)
            es = cal.on_or_after(prog.actual_start) if in_progress else start
            timings[aid] = Timing(first_day, cal.date(finish_boundary - 1), es, finish_boundary,
                                  logic_start)
    return timings


def completion_of(timings: dict[str, Timing]) -> dt.date:
    return max(t.finish for t in timings.values())


# ---------------------------------------------------------------------------------------
# What actually happened
# ---------------------------------------------------------------------------------------

# Magnitudes of the delay events, in work days (the event register is derived from them).
OBSTRUCTION_DAYS = 15          # EV02 obstruction removal and pile redesign, as it happened
OBSTRUCTION_ESTIMATE = 12      # ... as the contractor first programmed it
EXTRA_PILES_DAYS = 2           # EV02 additional piles in zone B
RAIN_EXTRA_DAYS = 3            # EV01 exceptional rainfall, each excavation
FRAME_SLOW_EXTRA_DAYS = 4      # EV04 contractor's formwork gang short, each of three slabs
CRANE_OUTAGE_DAYS = 8          # EV08 tower crane out of service
DESIGN_LATE_DAYS = 30          # EV03 facade design information late
POWER_LATE_DAYS = 31           # EV07 network operator energises late
LIFT_LATE_DAYS = 46            # EV10 Employer-supplied lift equipment late
MEP_SLOW_EXTRA_DAYS = 6        # EV11 services subcontractor short of fitters, each of 3 floors
V07_INSTRUCTION = dt.date(2025, 10, 15)   # EV05 variation V-07 instructed
V07_PROCUREMENT_DAYS = 25                 # EV05 charging equipment lead time
REMEDIAL_DAYS = 10             # EV06 resin injection of leaking basement wall joints
COLD_SPELL = (dt.date(2026, 1, 26), dt.date(2026, 2, 6))  # EV09 pours and screeds stopped
COLD_SENSITIVE_SUFFIXES = ("-POUR", "-SCREED", "-MEMBRANE")

SLOW_FRAME = ["FRM-00-DECK", "FRM-01-DECK", "FRM-02-DECK"]
SLOW_SERVICES = ["MEP-03-SECOND-FIX", "MEP-04-SECOND-FIX", "MEP-05-SECOND-FIX"]
RAIN_HIT = ["SUB-EXCAVATION-A", "SUB-EXCAVATION-B"]

# Re-planning by the contractor, shown in every update whose data date is on or after the date.
ROOF_TEMP_DELETED_FROM = dt.date(2025, 10, 31)    # temporary roof protection dropped
PARTITIONS_REVISED_FROM = dt.date(2025, 11, 30)   # second drylining gang: 12 -> 10 days
PARTITIONS_REVISED = ["FIT-03-PARTITIONS", "FIT-04-PARTITIONS", "FIT-05-PARTITIONS"]
PARTITIONS_NEW_DAYS = 10
LIFT_SECOND_TEAM_LAG = 10                         # lift 2 starts 10 days after lift 1

OUT_OF_SEQUENCE_LAG = 4  # ceilings actually started 4 days after partitions began


def equipment_on_site(calendars) -> dt.date:
    """When the charging equipment of variation V-07 is on site (the contractor's programme
    shows it as an earliest start from the update that adds the work)."""
    return calendars[SITE].add_workdays(V07_INSTRUCTION, V07_PROCUREMENT_DAYS)


def added_activity(aid: str, planned: bool, calendars=None) -> Activity:
    """Activities the contractor added to the programme during the works."""
    if aid == "SUB-OBSTRUCTIONS":
        return Activity(aid, "Break out buried obstructions and redesign piles, zone B",
                        OBSTRUCTION_ESTIMATE if planned else OBSTRUCTION_DAYS, "2.2.4")
    if aid == "SUB-REMEDIAL":
        return Activity(aid, "Seal leaking basement wall joints by resin injection", REMEDIAL_DAYS,
                        "2.4.1")
    if aid == "MEP-EV-CHARGE":
        activity = Activity(aid, "Electric vehicle charging points, basement (variation V-07)",
                            8, "5.B1.2")
        if planned:
            activity.constraint = "earliest_start"
            activity.constraint_date = equipment_on_site(calendars)
        return activity
    raise KeyError(aid)


ADDED_AFTER = {"SUB-OBSTRUCTIONS": "SUB-EXCAVATION-B", "SUB-REMEDIAL": "SUB-WALL-S",
               "MEP-EV-CHARGE": "MEP-B1-SECOND-FIX"}
ADDED_LINKS = {
    "SUB-OBSTRUCTIONS": [Link("SUB-EXCAVATION-B", "SUB-OBSTRUCTIONS", "SS", 6),
                         Link("SUB-OBSTRUCTIONS", "SUB-PILES-B")],
    "SUB-REMEDIAL": [Link("FRM-00-STRIKE", "SUB-REMEDIAL"), Link("SUB-REMEDIAL", "FIT-B1-DECK")],
    "MEP-EV-CHARGE": [Link("MEP-B1-ELECTRICAL", "MEP-EV-CHARGE"),
                      Link("MEP-EV-CHARGE", "FIT-B1-DECK"),
                      Link("MEP-EV-CHARGE", "COM-CARPARK")],
}


def add_to(programme: Programme, aid: str, planned: bool, calendars=None):
    programme.insert_after(ADDED_AFTER[aid], added_activity(aid, planned, calendars))
    for l in ADDED_LINKS[aid]:
        programme.link(l.pred, l.succ, l.type, l.lag)


def lift_logic_change(programme: Programme):
    programme.remove_link("LFT-1-INSTALL", "LFT-2-INSTALL")
    programme.link("LFT-1-INSTALL", "LFT-2-INSTALL", "SS", LIFT_SECOND_TEAM_LAG)


@dataclass
class ActualWorks:
    programme: Programme
    timings: dict[str, Timing]
    start_delays: dict[str, int]
    not_before: dict[str, dt.date]
    held: dict[str, tuple[dt.date, dt.date]]
    out_of_sequence: tuple[str, str] | None
    variation: dict[str, int]


def contractor_variation(programme: Programme, touched: set[str]) -> dict[str, int]:
    """Seeded -1/0/+1 day variation of the contractor's own task durations."""
    candidates = [a.id for a in programme.activities.values()
                  if a.party == CONTRACTOR and a.calendar == SITE and a.duration >= 4
                  and a.id not in touched]
    rng = np.random.default_rng(SEED)
    draws = rng.choice(np.array([-1, 0, 0, 0, 1]), size=len(candidates))
    return {aid: int(d) for aid, d in zip(candidates, draws) if d != 0}


#: The delay events as causes in the actual works, by the event id in events.csv.
EVENT_CAUSES = {
    "EV01": "exceptional rainfall", "EV02": "buried obstructions", "EV03": "late facade design",
    "EV04": "slow frame", "EV05": "variation V-07", "EV06": "leaking basement walls",
    "EV07": "late power connection", "EV08": "crane failure", "EV09": "cold spell",
    "EV10": "late lift equipment", "EV11": "slow services second fix",
}


def simulate_actual(baseline: Programme, calendars: dict[str, WorkCalendar],
                    out_of_sequence: tuple[str, str] | None, without: frozenset[str] = frozenset(),
                    variation: dict[str, int] | None = None) -> ActualWorks:
    """The actual works: the baseline with every event, the re-planning, the contractor's
    own variation of durations and the actual sequence. ``without`` leaves events out (a
    but-for run for the README; ``variation`` then repeats the full run's variation)."""
    p = baseline.copy()
    p.remove_activity("ENV-ROOF-TEMP")                       # never built (re-planning)
    added = {"SUB-OBSTRUCTIONS": "EV02", "SUB-REMEDIAL": "EV06", "MEP-EV-CHARGE": "EV05"}
    for aid, event in added.items():
        if event not in without:
            add_to(p, aid, planned=False)
    extensions = [("EV02", ["SUB-PILES-B"], EXTRA_PILES_DAYS),
                  ("EV01", RAIN_HIT, RAIN_EXTRA_DAYS),
                  ("EV04", SLOW_FRAME, FRAME_SLOW_EXTRA_DAYS),
                  ("EV03", ["ENV-DESIGN"], DESIGN_LATE_DAYS),
                  ("EV11", SLOW_SERVICES, MEP_SLOW_EXTRA_DAYS)]
    for event, ids, days in extensions:
        if event not in without:
            for aid in ids:
                p.activities[aid].duration += days
    for aid in PARTITIONS_REVISED:                               # re-planning
        p.activities[aid].duration = PARTITIONS_NEW_DAYS
    lift_logic_change(p)                                         # re-planning
    delays = [("EV08", "FRM-03-COLUMNS", CRANE_OUTAGE_DAYS),
              ("EV07", "MEP-POWER-ON", POWER_LATE_DAYS),
              ("EV10", "LFT-DELIVERY", LIFT_LATE_DAYS)]
    start_delays = {aid: days for event, aid, days in delays if event not in without}
    not_before = {}
    if "EV05" not in without:
        not_before["MEP-EV-CHARGE"] = equipment_on_site(calendars)
    cold = {a for a in p.activities if a.endswith(COLD_SENSITIVE_SUFFIXES)}
    windows = [] if "EV09" in without else [(COLD_SPELL[0], COLD_SPELL[1], cold)]
    if variation is None:
        touched = set(RAIN_HIT + SLOW_FRAME + SLOW_SERVICES + PARTITIONS_REVISED
                      + [aid for _, aid, _ in delays] + list(added)
                      + ["SUB-PILES-B", "ENV-DESIGN"])
        variation = contractor_variation(p, touched)
    for aid, delta in variation.items():
        if aid in p.activities:
            p.activities[aid].duration = max(1, p.activities[aid].duration + delta)
    if out_of_sequence is not None:                              # the actual sequence
        pred, succ = out_of_sequence
        p.remove_link(pred, succ)
        p.link(pred, succ, "SS", OUT_OF_SEQUENCE_LAG)
    held: dict[str, tuple[dt.date, dt.date]] = {}
    timings = forward_pass(p, calendars, CONTRACT_START, start_delays=start_delays,
                           hold_windows=windows, held=held, not_before=not_before)
    return ActualWorks(p, timings, start_delays, not_before, held, out_of_sequence, variation)


def but_for(baseline, calendars, works: ActualWorks) -> dict[str, tuple[dt.date, dt.date]]:
    """Completion and Section 1 of the actual works with each event taken out alone."""
    out = {}
    for event in EVENT_CAUSES:
        t = simulate_actual(baseline, calendars, works.out_of_sequence, frozenset([event]),
                            works.variation).timings
        out[event] = (t["MS-COMPLETION"].finish, t["MS-SECTION-1"].finish)
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


def choose_out_of_sequence(baseline, calendars) -> tuple[ActualWorks, list[dt.date]]:
    """The actual works, with ceilings on the first floor whose start before the partitions
    finished shows in a monthly update (an out-of-sequence record)."""
    for floor in FLOORS:
        pair = (f"FIT-{floor}-PARTITIONS", f"FIT-{floor}-CEILINGS")
        works = simulate_actual(baseline, calendars, pair)
        dates = month_ends(CONTRACT_START, completion_of(works.timings))
        pred, succ = works.timings[pair[0]], works.timings[pair[1]]
        if any(succ.start < d <= pred.finish for d in dates):
            return works, dates
    raise CaseCheckError("no floor shows the out-of-sequence ceilings in an update")


# ---------------------------------------------------------------------------------------
# The monthly updates
# ---------------------------------------------------------------------------------------

@dataclass
class Revision:
    first_data_date: dt.date   # first update that shows it: data dates on or after this
    kind: str                  # added activity / deleted activity / duration / logic
    text: str
    activity: str = ""         # the activity added or deleted


def revisions(works: ActualWorks) -> list[Revision]:
    """The contractor's re-planning between updates, in the order it was adopted."""
    t = works.timings
    day = dt.timedelta(days=1)
    out = [
        Revision(t["SUB-OBSTRUCTIONS"].start + day, "added activity",
                 "SUB-OBSTRUCTIONS added after buried obstructions were found in zone B",
                 "SUB-OBSTRUCTIONS"),
        Revision(t["SUB-REMEDIAL"].start + day, "added activity",
                 "SUB-REMEDIAL added after leaks through the basement walls were found",
                 "SUB-REMEDIAL"),
        Revision(V07_INSTRUCTION + day, "added activity",
                 "MEP-EV-CHARGE added for variation V-07 (electric vehicle charging points)",
                 "MEP-EV-CHARGE"),
        Revision(ROOF_TEMP_DELETED_FROM, "deleted activity",
                 "ENV-ROOF-TEMP deleted: the roof membrane follows the upstands directly",
                 "ENV-ROOF-TEMP"),
        Revision(PARTITIONS_REVISED_FROM, "duration change",
                 "FIT-03/04/05-PARTITIONS revised from 12 to 10 days: a second drylining gang"),
        Revision(LIFT_DELIVERY_PROMISED + day, "logic change",
                 f"LFT-1-INSTALL > LFT-2-INSTALL changed from FS to SS {LIFT_SECOND_TEAM_LAG}: "
                 "a second lift installation team once the lift delivery was late"),
    ]
    return sorted(out, key=lambda r: r.first_data_date)


def programme_at(baseline: Programme, data_date: dt.date, revs: list[Revision], calendars
                 ) -> Programme:
    p = baseline.copy()
    for r in revs:
        if data_date < r.first_data_date:
            continue
        if r.kind == "added activity":
            add_to(p, r.activity, planned=True, calendars=calendars)
        elif r.kind == "deleted activity":
            p.remove_activity(r.activity)
        elif r.kind == "duration change":
            for a in PARTITIONS_REVISED:
                p.activities[a].duration = PARTITIONS_NEW_DAYS
        elif r.kind == "logic change":
            lift_logic_change(p)
    return p


def progress_at(programme: Programme, works: ActualWorks, calendars, data_date: dt.date,
                hidden: dict[str, tuple[dt.date, int]]) -> dict[str, Progress]:
    """What the update reports at ``data_date``: actual dates before it, remaining work.

    The remaining duration of work in progress is the work days it actually still took,
    less any extension ``hidden`` from the update because its cause had not yet arisen
    (an extension of ``days`` that becomes known on ``date``).
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
            remaining = calendars[a.calendar].count(data_date, t.finish)
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


def build_updates(baseline, works, calendars, data_dates, hidden) -> list[Update]:
    revs = revisions(works)
    updates = []
    for number, data_date in enumerate(data_dates, start=1):
        p = programme_at(baseline, data_date, revs, calendars)
        updates.append(Update(data_date.isoformat(), f"Update {number:02d}", data_date, p,
                              progress_at(p, works, calendars, data_date, hidden)))
    return updates


# ---------------------------------------------------------------------------------------
# The delay event register and the fragnets
# ---------------------------------------------------------------------------------------

def derive_events(baseline_timings, works: ActualWorks, calendars):
    """Events dated from what happened. Returns (events rows, extensions hidden from the
    updates until their cause arose: id -> (date known, days))."""
    site = calendars[SITE]
    t = works.timings
    day = dt.timedelta(days=1)

    def before(d: dt.date) -> dt.date:  # the work day before d
        return site.date(site.on_or_after(d) - 1)

    def logic_date(aid: str) -> dt.date:
        return calendars[works.programme.activities[aid].calendar].date(t[aid].logic_start)

    rain_start = site.add_workdays(t["SUB-EXCAVATION-B"].start, 2)
    rain_finish = site.add_workdays(rain_start, 4)
    for aid in RAIN_HIT:
        require(t[aid].start <= rain_start and rain_finish <= t[aid].finish,
                f"the rain window is outside {aid}")
    design_due = site.date(site.after(baseline_timings["ENV-DESIGN"].finish))
    require(t["ENV-DESIGN"].finish == site.add_workdays(design_due, DESIGN_LATE_DAYS - 1),
            "the design delay does not match its event")
    crane_start, crane_finish = logic_date("FRM-03-COLUMNS"), before(t["FRM-03-COLUMNS"].start)
    power_start, power_finish = logic_date("MEP-POWER-ON"), before(t["MEP-POWER-ON"].start)
    lift_start, lift_finish = logic_date("LFT-DELIVERY"), before(t["LFT-DELIVERY"].start)
    require(lift_start == LIFT_DELIVERY_PROMISED,
            "the lift hold does not start at the promised delivery")
    cold = sorted(works.held)
    require(cold, "the cold spell holds no activity")

    def row(id, title, party, start, finish, activities, impact, days="", evidence="",
           notified=None, claimed=""):
        return {"id": id, "title": title, "party": party, "start": start, "finish": finish,
                "activities": ";".join(activities), "impact": impact, "days": days,
                "evidence": evidence, "notified": notified, "claimed_days": claimed}

    obstruction = t["SUB-OBSTRUCTIONS"]
    remedial = t["SUB-REMEDIAL"]
    rows = [
        row("EV02", "Unforeseen ground conditions: buried concrete obstructions in piling zone B "
           "(Employer's risk: ground conditions not shown in the site investigation)",
           "employer", obstruction.start, obstruction.finish, ["SUB-EXCAVATION-B", "SUB-PILES-B"],
           "fragnet", evidence=f"Site diary {obstruction.start}; contractor's notice CN-03; "
           "Employer's engineer's pile redesign memo SE-M-014",
           notified=obstruction.start + 2 * day, claimed=28),
        row("EV01", "Exceptionally adverse weather: rainfall far above the 10-year average floods "
           "the basement excavation (neutral: time, no money)", "neutral", rain_start,
           rain_finish, RAIN_HIT, "extend", RAIN_EXTRA_DAYS,
           "Brennholm harbour weather station daily rainfall record; site diaries "
           f"{rain_start} to {rain_finish}", notified=rain_finish + 3 * day, claimed=7),
        row("EV04", "Contractor's slow progress of the frame: formwork gang below strength on "
           "slabs 00 to 02", "contractor", t[SLOW_FRAME[0]].start, t[SLOW_FRAME[-1]].finish,
           SLOW_FRAME, "extend", FRAME_SLOW_EXTRA_DAYS,
           "Contractor's weekly labour returns; Employer's agent's progress reports PR-07 "
           "to PR-09"),
        row("EV08", "Tower crane out of service: slewing ring failure (contractor's plant)",
           "contractor", crane_start, crane_finish, ["FRM-03-COLUMNS"], "hold",
           evidence=f"Crane inspection report CI-22; crane hire breakdown log from {crane_start}"),
        row("EV03", "Late issue of facade design information (panel and fixing details) by the "
           "Employer's architect", "employer", design_due, t["ENV-DESIGN"].finish,
           ["ENV-DESIGN"], "extend", DESIGN_LATE_DAYS,
           "Architect's information release schedule rev F; contractor's request for "
           "information RFI-041 and reminders", notified=design_due + 10 * day, claimed=45),
        row("EV07", "Network operator energises the permanent power supply late (statutory "
           "undertaker: neutral)", "neutral", power_start, power_finish, ["MEP-POWER-ON"], "hold",
           evidence="Network operator's connection offer NO-2291 and revised energisation notice",
           notified=power_start + 5 * day, claimed=21),
        row("EV10", "Late delivery of the Employer-supplied lift equipment", "employer",
           lift_start, lift_finish, ["LFT-DELIVERY"], "hold",
           evidence="Employer's letter EL-027; lift supplier's delivery note LD-118",
           notified=lift_start + 3 * day, claimed=60),
        row("EV11", "Contractor's slow services second fix on floors 03 to 05: services "
           "subcontractor short of fitters", "contractor", t[SLOW_SERVICES[0]].start,
           t[SLOW_SERVICES[-1]].finish, SLOW_SERVICES, "extend", MEP_SLOW_EXTRA_DAYS,
           "Services subcontractor's resource histogram; Employer's agent's progress report "
           "PR-15"),
        row("EV05", "Variation V-07: electric vehicle charging points in the basement car park",
           "employer", V07_INSTRUCTION, t["MEP-EV-CHARGE"].finish,
           ["FIT-B1-DECK", "COM-CARPARK"], "fragnet",
           evidence="Variation instruction V-07; contractor's quotation Q-V07",
           notified=V07_INSTRUCTION + 7 * day, claimed=14),
        row("EV06", "Leaks through the basement walls: remedial resin injection (contractor's "
           "defective work)", "contractor", remedial.start, remedial.finish, ["FIT-B1-DECK"],
           "fragnet", evidence=f"Site diary {remedial.start}; non-conformance report NCR-09"),
        row("EV09", "Exceptional cold spell: concrete pours and screeds suspended (neutral)",
           "neutral", COLD_SPELL[0], COLD_SPELL[1], cold, "hold",
           evidence="Brennholm harbour weather station temperature record; concrete pour "
           "register", notified=COLD_SPELL[0] + 4 * day, claimed=7),
    ]
    rows.sort(key=lambda r: r["id"])
    starts = [r["start"] for r in rows]
    require(starts == sorted(starts), "event ids are not in date order")
    hidden = {"SUB-PILES-B": (obstruction.start, EXTRA_PILES_DAYS),
              "ENV-DESIGN": (design_due, DESIGN_LATE_DAYS)}
    for aid in RAIN_HIT:
        hidden[aid] = (rain_start, RAIN_EXTRA_DAYS)
    return rows, hidden


FRAGNETS = [
    {"event": "EV02", "id": "EV02-F1", "name": "Break out buried obstructions, zone B",
     "duration": 6, "calendar": SITE, "wbs": "2.2.4"},
    {"event": "EV02", "id": "EV02-F2",
     "name": "Redesign of zone B piles by the Employer's engineer",
     "duration": 8, "calendar": SITE, "wbs": "2.2.4"},
    {"event": "EV02", "id": "EV02-F3", "name": "Additional piles, zone B", "duration": 3,
     "calendar": SITE, "wbs": "2.2.4"},
    {"event": "EV05", "id": "EV05-F1",
     "name": "Design and procure electric vehicle charging equipment (V-07)", "duration": 25,
     "calendar": SITE, "wbs": "5.B1.2"},
    {"event": "EV05", "id": "EV05-F2",
     "name": "Install electric vehicle charging points and containment, basement",
     "duration": 8, "calendar": SITE, "wbs": "5.B1.2"},
    {"event": "EV06", "id": "EV06-F1", "name": "Investigate leaks through the basement walls",
     "duration": 3, "calendar": SITE, "wbs": "2.4.1"},
    {"event": "EV06", "id": "EV06-F2", "name": "Resin injection of leaking basement wall joints",
     "duration": 8, "calendar": SITE, "wbs": "2.4.1"},
]
FRAGNET_LINKS = [
    ("EV02", "SUB-EXCAVATION-B", "EV02-F1", "SS", 6),
    ("EV02", "EV02-F1", "EV02-F2", "FS", 0),
    ("EV02", "EV02-F2", "SUB-PILES-B", "FS", 0),
    ("EV02", "SUB-PILES-B", "EV02-F3", "FS", 0),
    ("EV02", "EV02-F3", "SUB-PILE-TEST-B", "FS", 5),
    ("EV05", "EV05-F1", "EV05-F2", "FS", 0),
    ("EV05", "MEP-B1-ELECTRICAL", "EV05-F2", "FS", 0),
    ("EV05", "EV05-F2", "FIT-B1-DECK", "FS", 0),
    ("EV05", "EV05-F2", "COM-CARPARK", "FS", 0),
    ("EV06", "FRM-00-STRIKE", "EV06-F1", "FS", 0),
    ("EV06", "EV06-F1", "EV06-F2", "FS", 0),
    ("EV06", "EV06-F2", "FIT-B1-DECK", "FS", 0),
]


# ---------------------------------------------------------------------------------------
# Model elements: a 48 m x 24 m block on an 8 m grid, basement B1, floors 00 to 05
# ---------------------------------------------------------------------------------------
# Classification: the project's own simple scheme, GROUP-TYPE (SUB substructure, FRM frame,
# ENV envelope, SRV services, LFT lifts, FIT fit-out, EXT external works, TMP temporary works).

GRID_X = {"A": 0.0, "B": 8.0, "C": 16.0, "D": 24.0, "E": 32.0, "F": 40.0, "G": 48.0}
GRID_Y = {"1": 0.0, "2": 8.0, "3": 16.0, "4": 24.0}
CORE = (24.0, 8.0, 32.0, 16.0)  # x0, y0, x1, y1 of the stair and lift core
CORE_CORNERS = {("D", "2"), ("E", "2"), ("D", "3"), ("E", "3")}

DUPLICATE_GROUPS = [["DOR-03-02", "DOR-03-02b", "DOR-03-02c"], ["COL-02-B3", "COL-02-B3b"]]
UNLINKED = {"WIN-W03-2": "4.W.3.2", "PLT-RF-09": "5.0.9", "LGT-EXT-07": "8.9"}


def build_elements() -> list[dict]:
    rows: list[dict] = []

    def box(id, name, wbs, classification, x, y, z, dx, dy, dz, level, zone):
        rows.append({"id": id, "name": name, "wbs": wbs, "classification": classification,
                     "x": round(x, 3), "y": round(y, 3), "z": round(z, 3), "dx": round(dx, 3),
                     "dy": round(dy, 3), "dz": round(dz, 3), "level": level, "zone": zone})

    def zone_of(x: float) -> str:
        return "A" if x < 24.0 else "B"

    grid = [(gx, gy) for gx in GRID_X for gy in GRID_Y]
    # Substructure
    for gx, gy in grid:
        x, y = GRID_X[gx], GRID_Y[gy]
        z = zone_of(x)
        box(f"PIL-{gx}{gy}", f"Bearing pile {gx}/{gy}", "2.2.3" if z == "A" else "2.2.4",
            "SUB-PILE", x - 0.45, y - 0.45, -20.1, 0.9, 0.9, 15.0, "B1", z)
        box(f"CAP-{gx}{gy}", f"Pile cap {gx}/{gy}", "2.3.1" if z == "A" else "2.3.2", "SUB-CAP",
            x - 0.9, y - 0.9, -5.1, 1.8, 1.8, 1.0, "B1", z)
    box("PIT-01", "Lift pit and core base", "2.3.3", "SUB-PIT", CORE[0], CORE[1], -5.6,
        CORE[2] - CORE[0], CORE[3] - CORE[1], 1.5, "B1", "core")
    sides = {"N": ("2.2.1", "2.4.1", 6), "E": ("2.2.1", "2.4.2", 3),
             "S": ("2.2.2", "2.4.3", 6), "W": ("2.2.2", "2.4.4", 3)}
    for side, (pile_wbs, wall_wbs, bays) in sides.items():
        word = dict(ELEVATIONS)[side]
        for n in range(1, bays + 1):
            a = 8.0 * (n - 1)
            if side == "N":
                pw, lw = (a, 24.0, 8.0, 0.6), (a, 23.7, 8.0, 0.3)
            elif side == "S":
                pw, lw = (a, -0.6, 8.0, 0.6), (a, 0.0, 8.0, 0.3)
            elif side == "E":
                pw, lw = (48.0, a, 0.6, 8.0), (47.7, a, 0.3, 8.0)
            else:
                pw, lw = (-0.6, a, 0.6, 8.0), (0.0, a, 0.3, 8.0)
            zone = zone_of(pw[0] + pw[2] / 2)
            box(f"PWL-{side}-{n}", f"Contiguous piled wall, {word} side, bay {n}", pile_wbs,
                "SUB-PILED-WALL", pw[0], pw[1], -12.0, pw[2], pw[3], 12.0, "B1", zone)
            box(f"BWL-{side}-{n}", f"Basement lining wall, {word} side, bay {n}", wall_wbs,
                "SUB-WALL", lw[0], lw[1], -3.6, lw[2], lw[3], 3.15, "B1", zone)
    for z, wbs in (("A", "2.5.1"), ("B", "2.5.2")):
        box(f"BSL-{z}", f"Basement slab, zone {z}", wbs, "SUB-SLAB", 0.0 if z == "A" else 24.0,
            0.0, -4.1, 24.0, 24.0, 0.5, "B1", z)
    box("RMP-01", "Car park access ramp", "2.5.4", "SUB-RAMP", 48.6, 2.0, -3.6, 4.0, 18.0, 3.6,
        "B1", "B")

    # Frame
    for storey in STOREYS:
        bottom, top = LEVEL_Z[storey], LEVEL_Z[SLAB_ABOVE[storey]]
        height = top - bottom - (0.45 if storey == "B1" else 0.3)
        for gx, gy in grid:
            if (gx, gy) in CORE_CORNERS:
                continue
            x, y = GRID_X[gx], GRID_Y[gy]
            box(f"COL-{storey}-{gx}{gy}", f"Column {gx}/{gy}, storey {storey}",
                f"3.{storey}.1", "FRM-COLUMNS", x - 0.2, y - 0.2, bottom, 0.4, 0.4, height, storey,
                zone_of(x))
        x0, y0, x1, y1 = CORE
        walls = {"N": (x0, y1 - 0.25, x1 - x0, 0.25), "S": (x0, y0, x1 - x0, 0.25),
                 "E": (x1 - 0.25, y0 + 0.25, 0.25, y1 - y0 - 0.5),
                 "W": (x0, y0 + 0.25, 0.25, y1 - y0 - 0.5)}
        for side, (x, y, dx, dy) in walls.items():
            box(f"CORE-{storey}-{side}", f"Core wall, {dict(ELEVATIONS)[side]}, storey {storey}",
                f"3.{storey}.1", "FRM-CORE", x, y, bottom, dx, dy, height, storey, "core")
        box(f"STR-{storey}", f"Precast stair flights, storey {storey}", f"3.{storey}.3",
            "FRM-STAIR", 28.5, 12.5, bottom, 3.0, 3.0, height, storey, "core")
    for slab in SLABS:
        thickness = 0.45 if slab == "00" else 0.3
        for z in ("A", "B"):
            box(f"SLB-{slab}-{z}", f"Slab level {slab}, zone {z}", f"3.{slab}.2", "FRM-SLAB",
                0.0 if z == "A" else 24.0, 0.0, LEVEL_Z[slab] - thickness, 24.0, 24.0, thickness,
                slab, z)

    # Envelope: one panel and one window per 8 m bay, per elevation, per floor
    for floor in FLOORS:
        bottom, top = LEVEL_Z[floor], LEVEL_Z[SLAB_ABOVE[floor]]
        for code, word in ELEVATIONS:
            bays = 6 if code in "NS" else 3
            for n in range(1, bays + 1):
                a = 8.0 * (n - 1)
                if code == "N":
                    px, py, pdx, pdy = a, 24.0, 8.0, 0.3
                elif code == "S":
                    px, py, pdx, pdy = a, -0.3, 8.0, 0.3
                elif code == "E":
                    px, py, pdx, pdy = 48.0, a, 0.3, 8.0
                else:
                    px, py, pdx, pdy = -0.3, a, 0.3, 8.0
                zone = zone_of(px + pdx / 2) if code in "NS" else ("B" if code == "E" else "A")
                box(f"PNL-{code}{floor}-{n}", f"Facade panel, {word} elevation, level {floor}, "
                    f"bay {n}", f"4.{code}.{floor}.1", "ENV-PANEL", px, py, bottom, pdx, pdy,
                    top - bottom, floor, zone)
                shop = floor == "00"
                inset, width = (0.5, 7.0) if shop else (1.5, 5.0)
                sill, height = (0.3, 3.5) if shop else (0.9, 1.5)
                wx, wy = (px + inset, py) if code in "NS" else (px, py + inset)
                wdx, wdy = (width, pdy) if code in "NS" else (pdx, width)
                wid = f"WIN-{code}{floor}-{n}"
                box(wid, f"{'Shopfront' if shop else 'Window'}, {word} elevation, level {floor}, "
                    f"bay {n}", UNLINKED.get(wid, f"4.{code}.{floor}.2"),
                    "ENV-SHOPFRONT" if shop else "ENV-WINDOW", wx, wy, bottom + sill, wdx, wdy,
                    height, floor, zone)
    for z in ("A", "B"):
        box(f"ROF-{z}", f"Roof insulation and membrane, zone {z}", "4.R.2", "ENV-ROOF",
            0.0 if z == "A" else 24.0, 0.0, 20.5, 24.0, 24.0, 0.3, "RF", z)
    for side, (x, y, dx, dy) in {"N": (0.0, 23.8, 48.0, 0.2), "S": (0.0, 0.0, 48.0, 0.2),
                                 "E": (47.8, 0.2, 0.2, 23.6), "W": (0.0, 0.2, 0.2, 23.6)}.items():
        box(f"PAR-{side}", f"Roof parapet, {dict(ELEVATIONS)[side]}", "4.R.1", "ENV-PARAPET",
            x, y, 20.8, dx, dy, 1.1, "RF", "roof")

    # Services
    plant = [("PLT-RF-01", "Air handling unit 1", 4.0, 4.0, 6.0, 4.0, 2.0),
             ("PLT-RF-02", "Air handling unit 2", 38.0, 4.0, 6.0, 4.0, 2.0),
             ("PLT-RF-03", "Heat pump bank 1", 14.0, 16.0, 6.0, 4.0, 1.8),
             ("PLT-RF-04", "Heat pump bank 2", 34.0, 17.0, 6.0, 4.0, 1.8),
             ("PLT-RF-09", "Roof extract fan", 22.0, 2.0, 1.2, 1.2, 1.0)]
    for id, name, x, y, dx, dy, dz in plant:
        box(id, name, UNLINKED.get(id, "5.0.5"), "SRV-PLANT", x, y, 20.8, dx, dy, dz, "RF",
            "roof")
    for id, name, x, y, dx, dy, dz in [("PLT-B1-01", "Boilers", 2.0, 2.0, 4.0, 3.0, 2.2),
                                       ("PLT-B1-02", "Booster pumps", 7.0, 2.0, 3.0, 2.0, 1.5),
                                       ("PLT-B1-03", "Cold water storage tanks", 11.0, 2.0, 5.0,
                                        3.0, 2.5)]:
        box(id, name, "5.0.1", "SRV-PLANT", x, y, -3.6, dx, dy, dz, "B1", "A")
    box("SWB-B1-01", "Main switchboard", "5.0.2", "SRV-SWITCH", 18.0, 2.0, -3.6, 4.0, 0.8, 2.2,
        "B1", "A")
    box("RSR-01", "Service riser, all levels", "5.0.3", "SRV-RISER", 32.2, 12.0, -3.6, 1.2, 2.0,
        24.1, "B1-RF", "core")
    for level in ["B1"] + FLOORS:
        soffit = LEVEL_Z[SLAB_ABOVE[level]] - (0.45 if level == "B1" else 0.3)
        for z in ("A", "B"):
            box(f"SRV-{level}-{z}",
                f"Services distribution in the ceiling void, {level_name(level)}, zone {z}",
                f"5.{level}.1", "SRV-ZONE", 0.3 if z == "A" else 24.0, 0.3,
                soffit - 0.5, 23.7, 23.4, 0.5, level, z)

    # Lifts
    for n, x in ((1, 24.5), (2, 28.5)):
        box(f"LFT-CAR-{n}", f"Lift car {n}", f"7.{n + 1}", "LFT-CAR", x, 8.5, -3.6, 3.0, 3.0, 2.4,
            "B1", "core")

    # Fit-out
    door_spots = [(4.0, 12.5, 1.0, 0.1), (12.0, 12.5, 1.0, 0.1), (38.0, 12.5, 1.0, 0.1),
                  (44.0, 12.5, 1.0, 0.1), (8.0, 11.4, 1.0, 0.1), (40.0, 11.4, 1.0, 0.1),
                  (23.9, 11.5, 0.1, 1.0)]
    for floor in FLOORS:
        bottom = LEVEL_Z[floor]
        spots = door_spots if floor != "00" else door_spots[:4]
        for n, (x, y, dx, dy) in enumerate(spots, start=1):
            did = f"DOR-{floor}-{n:02d}"
            what = "Lobby door" if (dx < dy) else ("Retail unit door" if floor == "00"
                                                   else "Apartment entrance door")
            box(did, f"{what} {n}, level {floor}", f"6.{floor}.3", "FIT-DOOR", x, y, bottom, dx,
                dy, 2.1, floor, zone_of(x))
        if floor in RESIDENTIAL:
            for n, (x, y) in enumerate([(2.0, 20.0), (10.0, 20.0), (36.0, 20.0), (44.0, 20.0),
                                        (6.0, 3.0), (40.0, 3.0)], start=1):
                box(f"KIT-{floor}-{n:02d}", f"Kitchen, apartment {n}, level {floor}",
                    f"6.{floor}.4", "FIT-KITCHEN", x, y, bottom, 3.0, 0.6, 0.9, floor, zone_of(x))
        for z in ("A", "B"):
            x0 = 0.3 if z == "A" else 24.0
            box(f"PRT-{floor}-{z}", f"Partitions and drylining, level {floor}, zone {z}",
                f"6.{floor}.1", "FIT-PARTITION", x0, 11.5, bottom, 23.7, 1.0, 2.7, floor, z)
            box(f"CLG-{floor}-{z}", f"Suspended ceilings, level {floor}, zone {z}",
                f"6.{floor}.2", "FIT-CEILING", x0, 0.3, bottom + 2.7, 23.7, 23.4, 0.05, floor, z)
    for n, (x, y, dx, dy) in enumerate([(23.9, 11.5, 0.1, 1.0), (16.0, 4.9, 1.0, 0.1),
                                        (31.9, 13.0, 0.1, 1.0)], start=1):
        box(f"DOR-B1-{n:02d}", f"Fire door {n}, basement", "6.B1.3", "FIT-DOOR", x, y, -3.6, dx,
            dy, 2.1, "B1", zone_of(x))
    for z in ("A", "B"):
        box(f"CPK-DECK-{z}", f"Car park deck coating, zone {z}", "6.B1.1", "FIT-DECK",
            0.3 if z == "A" else 24.0, 0.3, -3.6, 23.7, 23.4, 0.01, "B1", z)
        box(f"CPK-MARK-{z}", f"Car park bay marking, zone {z}", "6.B1.2", "FIT-MARKING",
            0.3 if z == "A" else 24.0, 0.3, -3.59, 23.7, 23.4, 0.005, "B1", z)
    box("CPK-BARRIER", "Car park entry barrier", "6.B1.3", "FIT-BARRIER", 48.6, 19.0, -3.6, 4.0,
        0.3, 1.2, "B1", "B")

    # External works and temporary works
    box("EXT-MH-01", "Manhole and connection, north", "8.1", "EXT-MANHOLE", 10.0, 27.0, -1.5,
        1.2, 1.2, 1.5, "00", "external")
    box("EXT-MH-02", "Manhole and connection, south", "8.1", "EXT-MANHOLE", 36.0, -5.0, -1.5,
        1.2, 1.2, 1.5, "00", "external")
    box("EXT-PAV-N", "Paving, north frontage", "8.2", "EXT-PAVING", -2.0, 24.6, -0.2, 52.0, 5.4,
        0.2, "00", "external")
    box("EXT-PAV-S", "Paving, south courtyard", "8.3", "EXT-PAVING", -2.0, -8.0, -0.2, 52.0, 7.4,
        0.2, "00", "external")
    for n, x in enumerate((4.0, 20.0, 36.0), start=1):
        box(f"EXT-BED-{n}", f"Planting bed {n}, south courtyard", "8.4", "EXT-PLANTING", x, -6.5,
            0.0, 6.0, 3.0, 0.5, "00", "external")
    for side, (x, y, dx, dy) in {"N": (-4.0, 32.0, 57.0, 0.3), "S": (-4.0, -10.3, 57.0, 0.3),
                                 "E": (52.7, -10.0, 0.3, 42.0), "W": (-4.3, -10.0, 0.3, 42.0)
                                 }.items():
        box(f"EXT-WAL-{side}", f"Boundary wall and railings, {dict(ELEVATIONS)[side]}", "8.5",
            "EXT-WALL", x, y, 0.0, dx, dy, 1.2, "00", "external")
    for n in range(1, 8):
        x = -1.0 + 8.0 * (n - 1)
        box(f"LGT-EXT-{n:02d}", f"External lighting column {n}", UNLINKED.get(
            f"LGT-EXT-{n:02d}", "8.6"), "EXT-LIGHT", x, 30.5, 0.0, 0.2, 0.2, 5.0, "00", "external")
    box("EXT-XNG-01", "Footway crossing", "8.7", "EXT-CROSSING", 48.6, 30.0, -0.2, 4.0, 2.5, 0.2,
        "00", "external")
    box("TMP-CRANE-BASE", "Tower crane base", "1.3", "TMP-CRANEBASE", 49.0, 25.0, -1.5, 4.0, 4.0,
        1.5, "00", "external")
    box("TMP-CRANE", "Tower crane mast", "1.3", "TMP-CRANE", 50.0, 26.0, 0.0, 2.0, 2.0, 45.0, "00",
        "external")
    box("TMP-HOIST", "Construction hoist, north elevation", "1.3", "TMP-HOIST", 20.0, 24.3, 0.0,
        3.0, 1.7, 22.0, "00-RF", "external")

    # The planted duplicates: copies in the same place as their originals
    by_id = {r["id"]: r for r in rows}
    for group in DUPLICATE_GROUPS:
        original = by_id[group[0]]
        position = rows.index(original)
        for n, copy_id in enumerate(group[1:], start=1):
            rows.insert(position + n, {**original, "id": copy_id})
    return rows


# ---------------------------------------------------------------------------------------
# Commercial tables
# ---------------------------------------------------------------------------------------

CONTRACT_SUM = 18_400_000
LD_WHOLE_WORKS = 4500
LD_SECTION_1 = 1500
LD_CAP = CONTRACT_SUM // 10
PROLONGATION_FLAT = 3100

SECTIONS = [
    {"section": "1", "name": "Basement car park and ground-floor retail units",
     "completion_activity": "MS-SECTION-1", "contract_completion": SECTION_1_COMPLETION,
     "liquidated_damages_per_day": LD_SECTION_1},
    {"section": "2", "name": "The whole of the Works", "completion_activity": "MS-COMPLETION",
     "contract_completion": CONTRACT_COMPLETION, "liquidated_damages_per_day": LD_WHOLE_WORKS},
]
PROLONGATION_RATES = [
    {"from": dt.date(2025, 3, 3), "to": dt.date(2025, 9, 30), "cost_per_day": 2800},
    {"from": dt.date(2025, 10, 1), "to": dt.date(2026, 3, 31), "cost_per_day": 3400},
    {"from": dt.date(2026, 4, 1), "to": dt.date(2026, 12, 31), "cost_per_day": 2600},
]


def extensions_granted(events: list[dict]) -> list[dict]:
    obstruction = next(e for e in events if e["title"].startswith("Unforeseen ground"))
    granted = obstruction["finish"] + dt.timedelta(days=42)
    while granted.weekday() != 4:  # the Employer's agent's decisions go out on Fridays
        granted += dt.timedelta(days=1)
    return [{"id": "EOT-01", "granted_on": granted, "days": 21, "section": "2",
             "events": obstruction["id"],
             "reason": "Buried obstructions in piling zone B: 21 days granted for the Works "
                       "(Section 2); the Employer's agent assessed no delay to Section 1"}]


# ---------------------------------------------------------------------------------------
# Records as kept: as-built sources, deliberate defects, disclosed corrections
# ---------------------------------------------------------------------------------------

RETROSPECTIVE_ACTIVITY = "SET-WELFARE"
RETROSPECTIVE_SHIFT = 2  # work days earlier in the later updates
CORRECTED_REMAINING_UPDATE = 9   # from this update on, the first remaining of 11 to 19 days
OMITTED_LINK_UPDATE = 11         # the update that dropped a link by mistake
OMITTED_LINK = ("FIT-03-PARTITIONS", "FIT-03-CEILINGS")


def asbuilt_source(aid: str, finish: dt.date) -> str:
    special = {
        "MS-START": "Possession certificate PC-00",
        "MS-SECTION-1": "Section 1 completion certificate SC-01",
        "MS-COMPLETION": "Practical completion certificate PCC-01",
        "LFT-DELIVERY": "Lift supplier's delivery note LD-118",
        "MEP-POWER-ON": "Network operator's energisation certificate EN-2291",
        "LFT-TEST": "Lift test certificates LT-1 and LT-2",
        "COM-AUTHORITY": "Building control completion notice BC-114",
    }
    if aid in special:
        return special[aid]
    if aid.endswith("-POUR"):
        return f"Concrete pour register {finish}"
    if aid.startswith("COM-"):
        return f"Commissioning record {finish}"
    return f"Site diary {finish}"


@dataclass
class Records:
    """The case as it is kept: updates with their defects, as-built rows, corrections."""
    update_rows: dict[str, list[dict]]      # folder -> activities rows
    update_links: dict[str, list[dict]]     # folder -> links rows
    asbuilt_rows: list[dict]
    corrections: list[dict]
    retrospective: list[dict]


def activity_row(a: Activity) -> dict:
    return {"id": a.id, "name": a.name, "duration": a.duration, "calendar": a.calendar,
            "wbs": a.wbs, "kind": a.kind, "constraint": a.constraint,
            "constraint_date": a.constraint_date, "party": a.party}


def link_rows(p: Programme) -> list[dict]:
    return [{"pred": l.pred, "succ": l.succ, "type": l.type, "lag": l.lag} for l in p.links]


def keep_records(updates: list[Update], works: ActualWorks, calendars) -> Records:
    update_rows, update_links = {}, {}
    for u in updates:
        rows = []
        for aid, a in u.programme.activities.items():
            row = activity_row(a)
            prog = u.progress.get(aid)
            row.update(actual_start=prog.actual_start if prog else None,
                       actual_finish=prog.actual_finish if prog else None,
                       remaining=prog.remaining if prog else None)
            rows.append(row)
        update_rows[u.folder] = rows
        update_links[u.folder] = link_rows(u.programme)

    # Deliberate defect: the welfare finish is re-dated in every update after the first
    # that reported it complete.
    site = calendars[SITE]
    true_finish = works.timings[RETROSPECTIVE_ACTIVITY].finish
    edited = site.date(site.on_or_after(true_finish) - RETROSPECTIVE_SHIFT)
    require(edited >= works.timings[RETROSPECTIVE_ACTIVITY].start,
            "the retrospective edit precedes the start")
    first = next(u for u in updates if u.progress.get(RETROSPECTIVE_ACTIVITY)
                 and u.progress[RETROSPECTIVE_ACTIVITY].actual_finish)
    later = [u for u in updates if u.data_date > first.data_date]
    for u in later:
        for row in update_rows[u.folder]:
            if row["id"] == RETROSPECTIVE_ACTIVITY:
                row["actual_finish"] = edited
    retrospective = [{"activity": RETROSPECTIVE_ACTIVITY, "column": "actual_finish",
                      "first_reported_in": first.folder, "first_value": true_finish.isoformat(),
                      "changed_in": later[0].folder, "changed_value": edited.isoformat(),
                      "also_in": [u.folder for u in later[1:]],
                      "asbuilt_value": true_finish.isoformat()}]

    corrections = []
    # Disclosed correction 1: a remaining duration keyed without its tens digit.
    for u in updates[CORRECTED_REMAINING_UPDATE - 1:]:
        candidates = sorted(aid for aid, p in u.progress.items() if p.actual_finish is None
                            and p.remaining is not None and 11 <= p.remaining <= 19)
        if candidates:
            break
    require(candidates, "no update has a remaining duration to mis-key")
    aid = candidates[0]
    for row in update_rows[u.folder]:
        if row["id"] == aid:
            true_remaining = row["remaining"]
            row["remaining"] = true_remaining % 10
    corrections.append({"snapshot": u.label, "table": "activities", "key": aid,
                        "column": "remaining", "value": true_remaining,
                        "reason": f"Remaining duration keyed as {true_remaining % 10} in the "
                                  f"update; the contractor's progress report for the month "
                                  f"gives {true_remaining} days"})
    # Disclosed correction 2: a link dropped from one update by mistake.
    u = updates[OMITTED_LINK_UPDATE - 1]
    require(OMITTED_LINK[1] not in u.progress, "the omitted link must precede its successor")
    require(OMITTED_LINK != works.out_of_sequence, "the omitted link is the out-of-sequence pair")
    before = len(update_links[u.folder])
    update_links[u.folder] = [r for r in update_links[u.folder]
                              if (r["pred"], r["succ"]) != OMITTED_LINK]
    require(len(update_links[u.folder]) == before - 1, "the omitted link was not found")
    corrections.append({"snapshot": u.label, "table": "links",
                        "key": f"{OMITTED_LINK[0]}>{OMITTED_LINK[1]}", "column": "add",
                        "value": "FS 0",
                        "reason": "Link lost when the update was saved; it is in the updates "
                                  "before and after and in the contractor's method statement"})

    # The as-built record, every activity of the last update.
    last = updates[-1]
    asbuilt = []
    for aid in last.programme.activities:
        t = works.timings[aid]
        asbuilt.append({"id": aid, "actual_start": t.start, "actual_finish": t.finish,
                        "source": asbuilt_source(aid, t.finish)})
    # Disclosed correction 3: an as-built start taken from the wrong record.
    late = sorted((works.timings[aid].start, aid) for aid, a in last.programme.activities.items()
                  if a.kind == "task" and a.duration >= 2
                  and works.timings[aid].start >= last.data_date)
    require(late, "no activity starts after the last data date")
    start, aid = late[0]
    wrong = site.date(site.on_or_after(start) + 1)
    require(wrong <= works.timings[aid].finish, "the wrong as-built start is after the finish")
    for row in asbuilt:
        if row["id"] == aid:
            row["actual_start"] = wrong
            row["source"] = f"Site diary {wrong}"
    corrections.append({"snapshot": "asbuilt", "table": "activities", "key": aid,
                        "column": "actual_start", "value": start,
                        "reason": f"The as-built record took the start from the site diary of "
                                  f"{wrong}; the Employer's agent's inspection notes show the "
                                  f"work began on {start}"})
    return Records(update_rows, update_links, asbuilt, corrections, retrospective)


# ---------------------------------------------------------------------------------------
# Checks: every validation rule of case-format v1, and the planted defects exactly
# ---------------------------------------------------------------------------------------

def check_snapshot(where: str, rows: list[dict], links: list[dict], calendars: set[str],
                   data_date: dt.date | None):
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
            require(r["constraint"] in ("earliest_start", "latest_finish", "fixed_start",
                                        "fixed_finish") and r["constraint_date"] is not None,
                    f"{where}: constraint of {r['id']}")
        if data_date is None:
            continue
        start, finish, remaining = r["actual_start"], r["actual_finish"], r["remaining"]
        for d in (start, finish):
            require(d is None or d < data_date, f"{where}: {r['id']} actual date on or after "
                                                f"the data date")
        if finish is not None:
            require(start is not None and finish >= start, f"{where}: {r['id']} finish/start")
            require(remaining in (0, None), f"{where}: {r['id']} complete with remaining")
        elif start is not None:
            require(remaining is not None and remaining > 0, f"{where}: {r['id']} in progress "
                                                             f"without remaining")
        else:
            require(remaining is None, f"{where}: {r['id']} not started with remaining")
    pairs = [(l["pred"], l["succ"]) for l in links]
    require(len(pairs) == len(set(pairs)), f"{where}: duplicate links")
    for l in links:
        require(l["pred"] in known and l["succ"] in known, f"{where}: link {l} names unknown id")
        require(l["pred"] != l["succ"], f"{where}: self link")
        require(l["type"] in ("FS", "SS", "FF", "SF"), f"{where}: link type")
    p = Programme()
    for r in rows:
        p.activities[r["id"]] = Activity(r["id"], r["name"], r["duration"], r["wbs"])
    p.links = [Link(l["pred"], l["succ"], l["type"], l["lag"]) for l in links]
    try:
        topological_order(p)
    except ValueError as error:
        raise CaseCheckError(f"{where}: {error}") from None


def check_case(baseline_rows, baseline_links, updates, records: Records, events, elements,
               exceptions):
    calendars = {r["calendar"] for r in CALENDAR_ROWS}
    require(len(calendars) == len(CALENDAR_ROWS), "calendar names not unique")
    require({r["calendar"] for r in exceptions} <= calendars, "exception for unknown calendar")
    check_snapshot("baseline", baseline_rows, baseline_links, calendars, None)
    previous_date = CONTRACT_START
    for u in updates:
        require(u.data_date > previous_date, "data dates must increase")
        previous_date = u.data_date
        check_snapshot(u.folder, records.update_rows[u.folder], records.update_links[u.folder],
                       calendars, u.data_date)
    require([u.folder for u in updates] == sorted(u.folder for u in updates), "folder order")
    require(len(updates) >= 8, "fewer than 8 updates")

    # Actual dates never change between updates, except the planted retrospective edit.
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

    # As-built: every activity of the last update, both dates, past the last data date.
    last = updates[-1]
    last_ids = [r["id"] for r in records.update_rows[last.folder]]
    require([r["id"] for r in records.asbuilt_rows] == last_ids, "as-built does not cover all")
    for r in records.asbuilt_rows:
        require(r["actual_start"] is not None and r["actual_finish"] is not None
                and r["actual_finish"] >= r["actual_start"], f"as-built row {r['id']}")
    require(max(r["actual_finish"] for r in records.asbuilt_rows) >= last.data_date,
            "as-built does not run past the last data date")

    # Events and fragnets.
    baseline_ids = {r["id"] for r in baseline_rows}
    require(len({e["id"] for e in events}) == len(events), "event ids")
    require({e["party"] for e in events} == {"employer", "contractor", "neutral"}, "parties")
    require({e["impact"] for e in events} == {"extend", "hold", "fragnet"}, "impacts")
    require(len(events) >= 10, "fewer than 10 events")
    for e in events:
        require(e["start"] <= e["finish"], f"{e['id']} start after finish")
        require(all(a in baseline_ids for a in e["activities"].split(";")), f"{e['id']} ids")
        require((e["impact"] == "extend") == (e["days"] != ""), f"{e['id']} days")
    all_ids = set(baseline_ids)
    for u in updates:
        all_ids |= {r["id"] for r in records.update_rows[u.folder]}
    fragnet_ids = [f["id"] for f in FRAGNETS]
    require(len(fragnet_ids) == len(set(fragnet_ids)), "fragnet ids not unique")
    require(not (set(fragnet_ids) & all_ids), "fragnet id collides with an activity id")
    fragnet_events = {f["event"] for f in FRAGNETS}
    require(fragnet_events == {e["id"] for e in events if e["impact"] == "fragnet"},
            "fragnet events")
    require(len(fragnet_events) >= 3, "fewer than 3 fragnets")
    for event in fragnet_events:
        own = {f["id"] for f in FRAGNETS if f["event"] == event}
        p = Programme()
        for r in baseline_rows:
            p.activities[r["id"]] = Activity(r["id"], r["name"], r["duration"], r["wbs"])
        for f in FRAGNETS:
            if f["event"] == event:
                p.activities[f["id"]] = Activity(f["id"], f["name"], f["duration"], f["wbs"])
        p.links = [Link(l["pred"], l["succ"], l["type"], l["lag"]) for l in baseline_links]
        for ev_id, pred, succ, type_, lag in FRAGNET_LINKS:
            if ev_id == event:
                require(pred in own | baseline_ids and succ in own | baseline_ids,
                        f"fragnet link {pred}>{succ}")
                require(pred in own or succ in own, f"fragnet link {pred}>{succ} has no "
                                                    f"fragnet activity")
                p.links.append(Link(pred, succ, type_, lag))
        topological_order(p)

    # Elements: unique ids; the planted duplicates and unlinked elements and no others.
    ids = [e["id"] for e in elements]
    require(len(ids) == len(set(ids)), "element ids not unique")
    require(len(elements) >= 300, "fewer than 300 elements")
    wbs_codes = {r["wbs"] for r in baseline_rows}
    for u in updates:
        wbs_codes |= {r["wbs"] for r in records.update_rows[u.folder]}
    last_wbs = {r["wbs"] for r in records.update_rows[last.folder]}
    unlinked = {e["id"] for e in elements if e["wbs"] not in wbs_codes}
    require(unlinked == set(UNLINKED), f"unlinked elements {sorted(unlinked)}")
    require(all(e["wbs"] in last_wbs and e["wbs"] in {r["wbs"] for r in baseline_rows}
                for e in elements if e["id"] not in UNLINKED), "element wbs not in every programme")
    groups = defaultdict(list)
    for e in elements:
        groups[(e["classification"], e["x"], e["y"], e["z"], e["dx"], e["dy"], e["dz"])].append(
            e["id"])
    duplicates = sorted(sorted(g) for g in groups.values() if len(g) > 1)
    require(duplicates == sorted(sorted(g) for g in DUPLICATE_GROUPS), f"duplicates {duplicates}")

    # Sections and corrections name things that exist.
    for s in SECTIONS:
        require(s["completion_activity"] in baseline_ids, "section milestone")
    for c in records.corrections:
        if c["table"] == "activities":
            require(c["key"] in all_ids, f"correction key {c['key']}")


# ---------------------------------------------------------------------------------------
# Writing the files
# ---------------------------------------------------------------------------------------

ACTIVITY_COLUMNS = ["id", "name", "duration", "calendar", "wbs", "kind", "constraint",
                    "constraint_date", "party"]
PROGRESS_COLUMNS = ["actual_start", "actual_finish", "remaining"]


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


CASE_TOML = {
    "project": {"name": PROJECT_NAME, "contract_start": CONTRACT_START,
                "contract_completion": CONTRACT_COMPLETION},
    "schedule": {"default_calendar": SITE, "progress": "retained_logic",
                 "lag_calendar": "successor", "float_to": "project_finish"},
    "commercial": {"currency": "EUR", "liquidated_damages_per_day": LD_WHOLE_WORKS,
                   "liquidated_damages_cap": LD_CAP,
                   "prolongation_cost_per_day": PROLONGATION_FLAT},
    "analysis": {"half_step": True, "concurrency": "time_not_money"},
}

GENERATED = ["case.toml", "calendars.csv", "calendar_exceptions.csv", "snapshots", "asbuilt.csv",
             "corrections.csv", "events.csv", "fragnets.csv", "fragnet_links.csv",
             "elements.csv", "sections.csv", "extensions_granted.csv", "prolongation_rates.csv",
             "KNOWN_DEFECTS.json", "README.md"]


def write_case(folder: Path, baseline_rows, baseline_links, updates, records, events, elements,
               exceptions, readme: str, known_defects: dict):
    write_toml(folder / "case.toml", CASE_TOML)
    write_csv(folder / "calendars.csv", CALENDAR_ROWS, ["calendar", "workdays"])
    write_csv(folder / "calendar_exceptions.csv", exceptions,
              ["calendar", "date", "working", "reason"])
    snapshots = folder / "snapshots"
    write_toml(snapshots / "baseline" / "snapshot.toml",
               {"": {"label": "Baseline", "data_date": CONTRACT_START, "kind": "baseline"}})
    write_csv(snapshots / "baseline" / "activities.csv", baseline_rows, ACTIVITY_COLUMNS)
    write_csv(snapshots / "baseline" / "links.csv", baseline_links, ["pred", "succ", "type", "lag"])
    for u in updates:
        write_toml(snapshots / u.folder / "snapshot.toml",
                   {"": {"label": u.label, "data_date": u.data_date, "kind": "update"}})
        write_csv(snapshots / u.folder / "activities.csv", records.update_rows[u.folder],
                  ACTIVITY_COLUMNS + PROGRESS_COLUMNS)
        write_csv(snapshots / u.folder / "links.csv", records.update_links[u.folder],
                  ["pred", "succ", "type", "lag"])
    write_csv(folder / "asbuilt.csv", records.asbuilt_rows,
              ["id", "actual_start", "actual_finish", "source"])
    write_csv(folder / "corrections.csv", records.corrections,
              ["snapshot", "table", "key", "column", "value", "reason"])
    write_csv(folder / "events.csv", events,
              ["id", "title", "party", "start", "finish", "activities", "impact", "days",
               "evidence", "notified", "claimed_days"])
    write_csv(folder / "fragnets.csv", FRAGNETS,
              ["event", "id", "name", "duration", "calendar", "wbs"])
    write_csv(folder / "fragnet_links.csv",
              [dict(zip(["event", "pred", "succ", "type", "lag"], l)) for l in FRAGNET_LINKS],
              ["event", "pred", "succ", "type", "lag"])
    write_csv(folder / "elements.csv", elements,
              ["id", "name", "wbs", "classification", "x", "y", "z", "dx", "dy", "dz", "level",
               "zone"])
    write_csv(folder / "sections.csv", SECTIONS,
              ["section", "name", "completion_activity", "contract_completion",
               "liquidated_damages_per_day"])
    write_csv(folder / "extensions_granted.csv", extensions_granted(events),
              ["id", "granted_on", "days", "section", "events", "reason"])
    write_csv(folder / "prolongation_rates.csv", PROLONGATION_RATES, ["from", "to", "cost_per_day"])
    (folder / "KNOWN_DEFECTS.json").write_text(
        json.dumps(known_defects, indent=2, ensure_ascii=False) + "\n", encoding="utf-8")
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

def known_defects(records: Records) -> dict:
    return {
        "description": "Record defects planted on purpose in the Tessaly Wharf demo case; a "
                       "checker must find each of these and nothing else. Disclosed "
                       "corrections (corrections.csv) are listed apart: they are not defects.",
        "duplicate_elements": DUPLICATE_GROUPS,
        "unlinked_elements": list(UNLINKED),
        "unlinked_element_wbs": UNLINKED,
        "retrospective_edits": records.retrospective,
        "disclosed_corrections": [{k: cell(v) for k, v in c.items() if k != "reason"}
                                  for c in records.corrections],
    }


def readme_text(f: dict) -> str:
    events = "\n".join(
        f"| {e['id']} | {e['party']} | {e['start']} to {e['finish']} | {e['impact']}"
        f"{' +' + str(e['days']) + ' d' if e['days'] != '' else ''} | {e['title']} |"
        for e in f["events"])
    forecasts = "\n".join(f"| {label} | {date} | {pc} | {s1} |"
                          for label, date, pc, s1 in f["forecasts"])
    def first_update(threshold: dt.date) -> str:
        label, date = next((label, date) for label, date, _, _ in f["forecasts"]
                           if date >= threshold)
        return f"{label} ({date})"

    revisions_text = "\n".join(f"- {r.kind}, from {first_update(r.first_data_date)} on: {r.text}"
                               for r in f["revisions"])
    labels = {date.isoformat(): label for label, date, _, _ in f["forecasts"]}
    but_for = "\n".join(f"| {e} | {EVENT_CAUSES[e]} | {pc} | {s1} |"
                        for e, (pc, s1) in f["but_for"].items())
    corrections = "\n".join(f"- {c['snapshot']}, {c['table']} `{c['key']}` {c['column']}: "
                            f"{c['reason']}" for c in f["corrections"])
    retro = f["retrospective"][0]
    return f"""# Tessaly Wharf, Brennholm: the bundled demo case

**This project is fictitious.** Tessaly Wharf, the town of Brennholm, every company, person,
document and event in this folder are invented for the toolkit's demonstration and tests.
Any likeness to a real project, firm or person is accidental.

The folder is a case in case-format v1, written by `generate.py` (deterministic; run
`python case_demo/generate.py` to rebuild it). Do not edit the files by hand.

## The project

A six-storey mixed-use building on a former harbour yard: a basement car park (level B1) in a
contiguous piled box, retail units on the ground floor (level 00) and 30 apartments on
levels 01 to 05; reinforced concrete frame on bearing piles, 48 m by 24 m on an 8 m grid,
one stair and lift core, precast facade panels, two passenger lifts.

- Employer: Tessaly Wharf Developments Ltd; its architect: Varnhalt Architects; the contract
  is run by the Employer's agent. The Employer supplies the lift equipment (free issue).
- Contractor: Hollowmere Construction Ltd, with its piling, services and lift installation
  subcontractors.
- Contract sum EUR {CONTRACT_SUM:,}; start {CONTRACT_START}; completion of Section 1
  (basement car park and ground-floor retail units) {SECTION_1_COMPLETION}, damages
  EUR {LD_SECTION_1:,} a day; completion of the whole of the Works (Section 2)
  {CONTRACT_COMPLETION}, damages EUR {LD_WHOLE_WORKS:,} a day, capped at EUR {LD_CAP:,}.
- Ground conditions are at the Employer's risk (the site investigation is the Employer's);
  exceptional weather and a statutory undertaker's delay give time but no money (neutral).

The accepted baseline has {f['activities']} activities and {f['links']} links (FS, SS, FF and
one SF; lags and one lead) on two calendars: `site5` (Monday to Friday, public holidays,
Brennholm Harbour Day, winter shutdowns) and `cure7` (every day: concrete curing, screed
drying). It plans Section 1 for {f['baseline_s1']} and practical completion for
{f['baseline_pc']}.

## What went wrong

| event | risk | dates | impact | what happened |
|---|---|---|---|---|
{events}

The whole of the Works: the buried obstructions (EV02, absorbing the rain of EV01 on the
same excavation), the slow frame (EV04), the crane failure (EV08) and the cold spell (EV09)
drove completion in turn. At the end two delays run at the same time on parallel paths and
end on the same day: the late Employer-supplied lift equipment (EV10: lifts, then hoist
removal and the north frontage) and the contractor's slow services second fix (EV11:
commissioning, then the authority inspection). That is the concurrent pair of employer and
contractor delay.

Section 1: the late facade design information (EV03, employer) drove the ground-floor
facade a few days ahead of the frame path, which the contractor's slow frame (EV04) and the
obstructions (EV02) had delayed as well; the late power connection (EV07, neutral) ends
{f['power_float']} work days before the commissioning needed it. The variation (EV05) and
the leaking basement walls (EV06) stay on the car park path, which keeps
{f['carpark_float']} work days of float: an analysis should give them no time.

Taking any one event out of the actual works alone (a but-for test, not additive, shown so
that a reader sees why concurrency matters) leaves completion where it was: whichever of
EV10 and EV11 is left still holds it.

| event | cause | completion without it | Section 1 without it |
|---|---|---|---|
{but_for}

Re-planning shown in the updates:
{revisions_text}

On floor {f['out_of_sequence'][0][4:6]} the ceilings ({f['out_of_sequence'][1]}) started before
the partitions ({f['out_of_sequence'][0]}) were finished, against the programme's
finish-to-start link: out-of-sequence progress, seen in {f['out_of_sequence_update']}.

## How it ended

Section 1 was completed on {f['actual_s1']} and the whole of the Works on {f['actual_pc']}.
Extension EOT-01 (21 days, Section 2, for EV02) was granted on {f['eot_granted']}. Monthly
updates have data dates at month ends; each one's forecast (the generator's own forward
pass, retained logic):

| update | data date | forecast completion | forecast Section 1 |
|---|---|---|---|
| Baseline | {CONTRACT_START} | {f['baseline_pc']} | {f['baseline_s1']} |
{forecasts}

## Deliberate record defects (for the checker)

Listed again, machine-readable, in `KNOWN_DEFECTS.json`; nothing else is meant to be wrong.

- Door `DOR-03-02` appears three times in one place (`DOR-03-02b`, `DOR-03-02c`); column
  `COL-02-B3` is duplicated as `COL-02-B3b`.
- `WIN-W03-2` (wbs `4.W.3.2`, a slip for `4.W.03.2`), `PLT-RF-09` (wbs `5.0.9`) and
  `LGT-EXT-07` (wbs `8.9`) match no activity.
- The actual finish of `{retro['activity']}` is {retro['first_value']} in
  {labels[retro['first_reported_in']]} ({retro['first_reported_in']}) and {retro['changed_value']}
  from {labels[retro['changed_in']]} ({retro['changed_in']}) on: a retrospective edit of the
  records (the site diary in the as-built record keeps {retro['asbuilt_value']}).

Disclosed corrections (corrections.csv), which the analyst has made openly:
{corrections}

## Contents

{f['updates']} monthly updates in `snapshots/` (folders named by data date), the as-built
record (`asbuilt.csv`, every activity, sources such as site diaries and pour registers),
{len(f['events'])} delay events with {f['fragnet_count']} fragnet activities for 3 events,
{f['elements']} model elements (axis-aligned boxes in metres, x east, y north, z up from the
ground floor; classification codes of the project's own GROUP-TYPE scheme: SUB substructure,
FRM frame, ENV envelope, SRV services, LFT lifts, FIT fit-out, EXT external works, TMP
temporary works), two sections, one extension granted and three prolongation rate periods.

Activity ids read AREA-PLACE-WORK: MS key dates, SET site establishment and plant, SUB
substructure, FRM frame (`FRM-03-COLUMNS`: columns and core walls of storey 03;
`FRM-04-POUR`: pouring slab level 04), ENV envelope (`ENV-N02-PANELS`: north elevation,
level 02), MEP services, FIT fit-out, LFT lifts, EXT external works, COM commissioning and
handover. Work breakdown codes run 1 (key dates, site) to 9 (commissioning) with the level
(`B1`, `00` to `05`, `RF`) and elevation (`N`, `E`, `S`, `W`) in them; model elements carry
the same codes, so `4.N.02.1` ties the north facade panels of level 02 to `ENV-N02-PANELS`.
"""


# ---------------------------------------------------------------------------------------
# Main
# ---------------------------------------------------------------------------------------

def driving_chain(programme: Programme, timings: dict[str, Timing], calendars, end: str
                  ) -> list[str]:
    """Activities that drove ``end``, walking back along links whose bound set the start."""
    incoming = defaultdict(list)
    for l in programme.links:
        incoming[l.succ].append(l)
    chain, aid = [], end
    while aid is not None:
        chain.append(aid)
        a, t = programme.activities[aid], timings[aid]
        cal = calendars[a.calendar]
        driver = None
        for l in incoming[aid]:
            pred, pa = timings[l.pred], programme.activities[l.pred]
            from_finish = l.type in ("FS", "FF")
            if pa.calendar == a.calendar:
                point = pred.early_finish if from_finish else pred.early_start
            else:
                point = cal.after(pred.finish) if from_finish else cal.on_or_after(pred.start)
            bound = point + l.lag - ((t.early_finish - t.early_start)
                                     if l.type in ("FF", "SF") else 0)
            if bound == t.logic_start:
                driver = l.pred
        aid = driver
    return chain


def story_checks(baseline, calendars, works: ActualWorks, updates: list[Update]) -> dict:
    """Make sure what the README tells about the actual works is true."""
    site = calendars[SITE]
    t = works.timings
    require(t["SUB-OBSTRUCTIONS"].finish > t["SUB-EXCAVATION-B"].finish,
            "the obstructions no longer absorb the rain")
    require(t["ENV-FABRICATE"].finish > t["FRM-01-STRIKE"].finish,
            "the facade design path no longer leads the frame into the ground-floor facade")
    link_types = [l.type for l in baseline.links]
    require(link_types.count("SF") == 1 and {"FS", "SS", "FF"} <= set(link_types)
            and any(l.lag < 0 for l in baseline.links), "link types differ from the README")
    services_chain = driving_chain(works.programme, t, calendars, "COM-AUTHORITY")
    for aid in ("MEP-05-SECOND-FIX", "FRM-04-POUR", "FRM-03-COLUMNS", "FRM-00-DECK",
                "SUB-OBSTRUCTIONS"):
        require(aid in services_chain, f"{aid} no longer drives completion")
    require(t["FRM-04-POUR"].early_start > t["FRM-04-POUR"].logic_start, "cold spell idle")
    require("LFT-DELIVERY" in driving_chain(works.programme, t, calendars, "EXT-CROSSING"),
            "the lift delivery no longer drives the lift path")
    lift_path = t["EXT-CROSSING"].finish
    services_path = t["COM-AUTHORITY"].finish
    require(lift_path == services_path, f"lift path {lift_path} and services path "
                                        f"{services_path} no longer end together")
    require(t["MS-COMPLETION"].finish > CONTRACT_COMPLETION, "the works are not late")
    require(t["MS-SECTION-1"].finish > SECTION_1_COMPLETION, "section 1 is not late")
    power_float = site.on_or_after(t["COM-CARPARK"].start) - site.after(t["MEP-POWER-ON"].finish)
    carpark_float = (site.on_or_after(t["COM-CARPARK"].start)
                     - site.after(max(t["FIT-B1-MARK"].finish, t["FIT-B1-DOORS"].finish)))
    require(0 < power_float <= 5, "the power connection is no longer near-critical")
    require(carpark_float >= 10, "the car park path has lost its float")
    but = but_for(baseline, calendars, works)
    require(all(pc == t["MS-COMPLETION"].finish for pc, _ in but.values()),
            "a single event now moves completion on its own")
    pred, succ = works.out_of_sequence
    seen = next(u for u in updates if succ in u.progress and pred in u.progress
                and u.progress[pred].actual_finish is None)
    return {"power_float": power_float, "carpark_float": carpark_float, "but_for": but,
            "out_of_sequence_update": f"{seen.label} ({seen.data_date})"}


def build(output: Path) -> dict:
    exceptions = site_exceptions()
    calendars = build_calendars(exceptions)
    baseline = build_baseline()
    baseline_timings = forward_pass(baseline, calendars, CONTRACT_START)
    require(baseline_timings["MS-SECTION-1"].finish <= SECTION_1_COMPLETION,
            "baseline misses Section 1")
    require(baseline_timings["MS-COMPLETION"].finish <= CONTRACT_COMPLETION,
            "baseline misses completion")
    works, data_dates = choose_out_of_sequence(baseline, calendars)
    events, hidden = derive_events(baseline_timings, works, calendars)
    updates = build_updates(baseline, works, calendars, data_dates, hidden)
    records = keep_records(updates, works, calendars)
    baseline_rows = [activity_row(a) for a in baseline.activities.values()]
    baseline_links = link_rows(baseline)
    elements = build_elements()
    check_case(baseline_rows, baseline_links, updates, records, events, elements, exceptions)

    story = story_checks(baseline, calendars, works, updates)
    forecasts = []
    schedules = {"baseline": baseline_timings}
    for u in updates:
        t = forward_pass(u.programme, calendars, u.data_date, progress=u.progress)
        schedules[u.folder] = t
        forecasts.append((u.label, u.data_date, t["MS-COMPLETION"].finish,
                          t["MS-SECTION-1"].finish))
    facts = {
        "activities": len(baseline.activities), "links": len(baseline.links),
        "baseline_pc": baseline_timings["MS-COMPLETION"].finish,
        "baseline_s1": baseline_timings["MS-SECTION-1"].finish,
        "actual_pc": works.timings["MS-COMPLETION"].finish,
        "actual_s1": works.timings["MS-SECTION-1"].finish,
        "events": events, "revisions": revisions(works), "corrections": records.corrections,
        "retrospective": records.retrospective, "forecasts": forecasts,
        "out_of_sequence": works.out_of_sequence, "updates": len(updates),
        "elements": len(elements), "fragnet_count": len(FRAGNETS),
        "eot_granted": extensions_granted(events)[0]["granted_on"],
        "schedules": schedules,
        **story,
    }
    output.mkdir(parents=True, exist_ok=True)
    built = Path(tempfile.mkdtemp(prefix=".generate-", dir=output))
    try:
        write_case(built, baseline_rows, baseline_links, updates, records, events, elements,
                   exceptions, readme_text(facts), known_defects(records))
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
            print(f"warning: {folder}: delay.cpm completion {result.completion}, generator "
                  f"{completion_of(timings)}")
        table = result.activities.set_index("id")
        for aid, t in timings.items():
            if aid == RETROSPECTIVE_ACTIVITY:
                continue  # the records carry the planted edit, the generator the truth
            compared += 1
            row = table.loc[aid]
            if (row["early_start"].date(), row["early_finish"].date()) != (t.start, t.finish):
                differences += 1
                if differences <= 10:
                    print(f"warning: {folder} {aid}: delay.cpm {row['early_start'].date()} to "
                          f"{row['early_finish'].date()}, generator {t.start} to {t.finish}")
    verdict = "all agree with the generator" if not differences else f"{differences} differ"
    print(f"delay.cpm early dates of {compared} activities in {len(facts['schedules'])} "
          f"snapshots: {verdict}")


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--output", type=Path, default=Path(__file__).resolve().parent,
                        help="case folder to write (default: the folder of this script)")
    parser.add_argument("--no-self-check", action="store_true",
                        help="do not load the written case with the toolkit afterwards")
    args = parser.parse_args(argv)
    try:
        facts = build(args.output)
    except (CaseCheckError, ValueError) as error:
        print(f"error: the generated case breaks a rule: {error}", file=sys.stderr)
        return 2
    print(f"wrote {args.output}: {facts['activities']} baseline activities, {facts['links']} "
          f"links, {facts['updates']} updates, {len(facts['events'])} events, "
          f"{facts['elements']} elements; planned completion {facts['baseline_pc']}, actual "
          f"{facts['actual_pc']}")
    if not args.no_self_check:
        self_check(args.output, facts)
    return 0


if __name__ == "__main__":
    sys.exit(main())
