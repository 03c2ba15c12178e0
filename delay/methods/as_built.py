"""As-planned versus as-built.

Compares every activity's planned dates (the baseline's early dates) with its actual dates
(the as-built record), traces the as-built critical path backward from actual completion
through the as-built logic, and spreads the delay along that path over periods.

- Planned dates are the baseline's early dates; planned duration is the baseline duration
  in work days. Actual duration is the number of work days of the activity's calendar from
  its actual start to its actual finish, both included (a one-day task has duration 1).
- The as-built logic is that of the last update, with the as-built record's dates. Walking
  back from the activity that finished last (where several finished that day, the last of
  them in logic order, such as the completion milestone), each activity's driving predecessor is the
  one whose actual date, plus the link, lies closest to the activity's actual start (or
  finish, for FF and SF links); ties go to an FS link, then to input order. The gap is that
  distance in work days (negative where work started out of sequence).
- Along the path, each activity accrues its finish variance (actual less planned finish,
  calendar days) less its driving predecessor's; the first activity of the path accrues
  its whole variance and the last is taken as late by the completion variance, so the
  accrued days add up exactly to the completion variance. Each activity's accrual falls in
  the period of its actual finish.

References
----------
AACE International Recommended Practice 29R-03, Forensic Schedule Analysis (2011), MIP 3.1
(observational / static / gross) and MIP 3.2 (observational / static / periodic). Society of
Construction Law Delay and Disruption Protocol, 2nd edition (2017), Part B, as-planned versus
as-built windows analysis.

Assumptions
-----------
The as-built record is complete and accurate (after disclosed corrections), and the last
update's logic reflects how the work was actually sequenced. Activities added after the
baseline have no planned dates and accrue no variance of their own (they pass on their
predecessor's).
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass

import numpy as np
import pandas as pd

from ..cpm import NO_DAY, calendars_of, prepare
from ..errors import CaseError, Problem, ReconciliationError
from ..model import Case
from ..output import json_date, json_int
from ..tracing import driving_predecessors

__all__ = ["compare", "AsBuiltResult"]


@dataclass(frozen=True)
class AsBuiltResult:
    """Planned against actual, the as-built critical path and the delay per period."""

    activities: pd.DataFrame
    critical_path: pd.DataFrame
    periods: pd.DataFrame
    planned_completion: dt.date
    actual_completion: dt.date
    period: str

    @property
    def completion_variance_days(self) -> int:
        return (self.actual_completion - self.planned_completion).days

    def to_json(self) -> dict:
        return {
            "planned_completion": self.planned_completion.isoformat(),
            "actual_completion": self.actual_completion.isoformat(),
            "completion_variance_days": self.completion_variance_days,
            "critical_path": [
                {"activity": r.activity, "actual_start": json_date(r.actual_start), "actual_finish": json_date(r.actual_finish),
                 "planned_finish": json_date(r.planned_finish), "driving_predecessor": r.driving_predecessor or None,
                 "gap_work_days": json_int(r.gap_work_days), "accrued_days": int(r.accrued_days), "period": r.period}
                for r in self.critical_path.itertuples(index=False)
            ],
            "periods": [
                {"period": r.period, "delay_days": int(r.delay_days), "cumulative_days": int(r.cumulative_days)}
                for r in self.periods.itertuples(index=False)
            ],
            "activities": [
                {"activity": r.id, "planned_start": json_date(r.planned_start), "planned_finish": json_date(r.planned_finish),
                 "actual_start": json_date(r.actual_start), "actual_finish": json_date(r.actual_finish),
                 "start_variance_days": json_int(r.start_variance_days),
                 "finish_variance_days": json_int(r.finish_variance_days),
                 "duration_variance_work_days": json_int(r.duration_variance_work_days)}
                for r in self.activities.itertuples(index=False)
            ],
        }


def _dates(days: np.ndarray) -> np.ndarray:
    values = np.asarray(days, dtype=np.int64).astype("datetime64[D]")
    values[np.asarray(days) == NO_DAY] = np.datetime64("NaT")
    return values.astype("datetime64[s]")


def compare(case: Case, period: str = "M") -> AsBuiltResult:
    """As-planned versus as-built comparison of a case.

    Parameters
    ----------
    case: a case with an as-built record (asbuilt.csv).
    period: pandas period alias for the delay per period (``"M"`` monthly, ``"W"`` weekly,
        ``"Q"`` quarterly).

    Returns
    -------
    AsBuiltResult
        ``activities`` (planned and actual dates, durations, variances), ``critical_path``
        (in time order, with each driving predecessor, link gap and accrued days),
        ``periods`` (delay per period along the path, with the running total).

    Raises
    ------
    CaseError: the case has no as-built record.
    ReconciliationError: the accrued days do not add up to the completion variance.
    """
    if case.asbuilt_snapshot is None:
        raise CaseError(Problem(file="asbuilt.csv", message="the case has no as-built record",
                                fix="add asbuilt.csv with the actual dates of every activity"))
    calendars = calendars_of(case)
    planned = prepare(case, case.baseline, calendars=calendars).run()
    built = prepare(case, case.asbuilt_snapshot, calendars=calendars).run()

    plan = pd.DataFrame({
        "id": planned.ids,
        "planned_start": _dates(planned.day_array("early_start")),
        "planned_finish": _dates(planned.day_array("early_finish")),
        "planned_duration": case.baseline.activities["duration"].to_numpy(),
    })
    actual_start_day = built.day_array("early_start")
    actual_finish_day = built.day_array("early_finish")
    cal = built.model.calendar
    work_days = (calendars.finish_index_days(cal, actual_finish_day) + 1
                 - calendars.start_index_days(cal, actual_start_day))
    milestone = (built.point != 0) | (built.model.kind != 0)
    actual = pd.DataFrame({
        "id": built.ids,
        "name": built.model.names,
        "actual_start": _dates(actual_start_day),
        "actual_finish": _dates(actual_finish_day),
        "actual_duration": np.where(milestone, 0, np.maximum(work_days, 0)),
    })
    table = plan.merge(actual, on="id", how="outer", sort=False)
    order = {a: i for i, a in enumerate(list(built.ids) + [a for a in planned.ids if a not in set(built.ids)])}
    table = table.assign(_order=table["id"].map(order)).sort_values("_order").drop(columns="_order")
    table["start_variance_days"] = (table["actual_start"] - table["planned_start"]).dt.days.astype("Int64")
    table["finish_variance_days"] = (table["actual_finish"] - table["planned_finish"]).dt.days.astype("Int64")
    table["duration_variance_work_days"] = (table["actual_duration"] - table["planned_duration"]).astype("Int64")
    table = table[["id", "name", "planned_start", "planned_finish", "planned_duration", "actual_start",
                   "actual_finish", "actual_duration", "start_variance_days", "finish_variance_days",
                   "duration_variance_work_days"]].reset_index(drop=True)

    planned_completion = planned.completion
    actual_completion = built.completion
    variance_total = (actual_completion - planned_completion).days

    # the as-built critical path, walking back from the last finish
    net = built.model.network
    last = np.flatnonzero(built.finish_day == built.completion_day)
    current = int(max(last, key=lambda v: (net.rank[v], -v)))
    chain: list[tuple[int, int | None, int | None, int | None]] = []
    seen = set()
    while current not in seen:
        seen.add(current)
        found = driving_predecessors(built, current)
        if not found:
            chain.append((current, None, None, None))
            break
        pred, link, gap = found[0]
        chain.append((current, pred, link, gap))
        current = pred
    chain.reverse()
    finish_variance = dict(zip(table["id"], table["finish_variance_days"]))
    rows = []
    previous = 0
    for position, (v, pred, link, gap) in enumerate(chain):
        activity = str(net.ids[v])
        variance = finish_variance.get(activity)
        if position == len(chain) - 1:
            variance = variance_total
        elif variance is None or pd.isna(variance):
            variance = previous
        accrued = int(variance) - previous
        previous = int(variance)
        finish = pd.Timestamp(_dates(np.array([actual_finish_day[v]]))[0])
        rows.append({
            "activity": activity, "name": built.model.names[v],
            "actual_start": pd.Timestamp(_dates(np.array([actual_start_day[v]]))[0]), "actual_finish": finish,
            "planned_finish": plan.set_index("id")["planned_finish"].get(activity, pd.NaT),
            "driving_predecessor": str(net.ids[pred]) if pred is not None else "",
            "link": "" if link is None else ["FS", "SS", "FF", "SF"][int(net.link_type[link])] + (
                f"{int(net.lag[link]):+d}" if net.lag[link] else ""),
            "gap_work_days": pd.NA if gap is None else int(gap),
            "finish_variance_days": int(variance), "accrued_days": accrued,
            "period": str(finish.to_period(period)),
        })
    path = pd.DataFrame(rows)
    path["gap_work_days"] = path["gap_work_days"].astype("Int64")
    if int(path["accrued_days"].sum()) != variance_total:
        raise ReconciliationError("as-built critical path", {"accrued days": int(path["accrued_days"].sum()),
                                                             "completion variance": variance_total})
    periods = path.groupby("period", sort=True)["accrued_days"].sum().reset_index(name="delay_days")
    periods["cumulative_days"] = periods["delay_days"].cumsum()
    return AsBuiltResult(table, path, periods, planned_completion, actual_completion, period)
