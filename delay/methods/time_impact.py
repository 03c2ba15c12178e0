"""Time impact analysis: each event inserted into the programme current when it began.

For every event of the register, the *current* programme is the last snapshot (baseline or
progress update, not the as-built record) whose data date is on or before the event's start.
The event is modelled in that programme as impacted as-planned models it
(:mod:`delay.methods.impacted`: ``extend``, ``hold``, ``fragnet``) and its effect is measured
against that update's own completion. Events sharing a current update are inserted
cumulatively in chronological order (start, finish, register row); their increments add up
exactly to the cumulative impact on that update. Each event's impact alone is also given; it
need not add up.

References
----------
AACE International Recommended Practice 29R-03, Forensic Schedule Analysis (2011), MIP 3.7
(modelled / additive / multiple base). Society of Construction Law Delay and Disruption
Protocol, 2nd edition (2017), Part B, time impact analysis.

Assumptions
-----------
Each update is a reasonable statement of the plan and progress at its data date; the
fragnets and modelled changes represent the events fairly; the effect on the forecast
completion of the update current at the time is the measure of each event's delay.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass

import pandas as pd

from ..cpm import calendars_of, prepare
from ..model import Case
from .impacted import EVENT_COLUMNS, order_events, run_events

__all__ = ["analyse", "TimeImpactResult"]


@dataclass(frozen=True)
class TimeImpactResult:
    """Per event: the update it was inserted into, impact alone and increment there."""

    events: pd.DataFrame
    updates: pd.DataFrame
    by_party: pd.DataFrame
    notes: tuple[str, ...]

    @property
    def total_days(self) -> int:
        """Sum over the updates of the cumulative impact of the events inserted into each."""
        return int(self.events["cumulative_days"].sum()) if len(self.events) else 0

    def to_json(self) -> dict:
        return {
            "updates": [
                {"snapshot": r.snapshot, "data_date": r.data_date.isoformat(),
                 "completion_before": r.completion_before.isoformat(),
                 "completion_after": r.completion_after.isoformat(), "events": list(r.events),
                 "cumulative_days": int(r.cumulative_days)}
                for r in self.updates.itertuples(index=False)
            ],
            "events": [
                {"id": r.id, "party": r.party, "snapshot": r.snapshot, "alone_days": int(r.alone_days),
                 "cumulative_days": int(r.cumulative_days), "completion_after": r.completion_after.isoformat()}
                for r in self.events.itertuples(index=False)
            ],
            "total_days": self.total_days,
        }


def analyse(case: Case) -> TimeImpactResult:
    """Time impact analysis of every event of the register.

    Returns
    -------
    TimeImpactResult
        ``events`` (impact columns of :data:`delay.methods.impacted.EVENT_COLUMNS` plus
        ``snapshot`` and ``completion_before``), ``updates`` (one row per update used) and
        ``by_party`` (increments summed per party).
    """
    register = order_events(case)
    snapshots = list(case.snapshots)
    calendars = calendars_of(case)
    current = []
    for start in register["start"]:
        chosen = snapshots[0]
        for snap in snapshots:
            if pd.notna(start) and pd.Timestamp(snap.data_date) <= pd.Timestamp(start):
                chosen = snap
        current.append(chosen.folder)
    register = register.assign(_current=current)
    frames, updates = [], []
    for snap in snapshots:
        group = register[register["_current"] == snap.folder].drop(columns="_current")
        if not len(group):
            continue
        model = prepare(case, snap, calendars=calendars)
        frame, base_day, final_day, _ = run_events(case, snap, model, group.reset_index(drop=True), snap.folder)
        before = dt.date(1970, 1, 1) + dt.timedelta(days=int(base_day))
        frames.append(frame.assign(snapshot=snap.folder, completion_before=before))
        after = dt.date(1970, 1, 1) + dt.timedelta(days=int(final_day))
        updates.append({"snapshot": snap.folder, "data_date": snap.data_date, "completion_before": before,
                        "completion_after": after, "events": list(group["id"]),
                        "cumulative_days": (after - before).days})
    columns = EVENT_COLUMNS + ["snapshot", "completion_before"]
    events = pd.concat(frames, ignore_index=True) if frames else pd.DataFrame(columns=columns)
    by_party = (events.groupby("party", sort=False)[["alone_days", "cumulative_days"]].sum().reset_index()
                if len(events) else pd.DataFrame(columns=["party", "alone_days", "cumulative_days"]))
    notes = ("Each event is measured against the update current when it began; increments add up within each "
             "update, and impacts alone need not add up.",)
    return TimeImpactResult(events, pd.DataFrame(updates), by_party, notes)
