"""As-planned versus as-built.

Compares every activity's planned dates (the baseline's early dates) with its actual dates
(the as-built record), traces the as-built critical path backward from the project's
completion activity through the as-built logic, and spreads the delay along that path over
periods by the work-day ledger of :mod:`delay.ledger` (the rules of the windows analysis,
applied to one window from the baseline to the as-built record).

- Planned dates are the baseline's early dates; planned duration is the baseline duration
  in work days. Actual duration is the number of work days of the activity's calendar from
  its actual start to its actual finish, both included (a one-day task has duration 1).
  Start, finish and duration variances are given in work days of the activity's own
  calendar, with the calendar-day start and finish variances beside them, so that a
  five-day task run over a weekend does not read as late.
- The as-built logic is that of the last update, with the as-built record's dates. Walking
  back from the completion activity, each activity's driving predecessor is the one whose
  actual date, plus the link, lies closest to the activity's actual start (or finish, for
  FF and SF links); ties go to an FS link, then to input order. The gap is that distance
  in work days (negative where work started out of sequence).
- Along the path, each activity's *contribution* is its lateness against the baseline's
  late finish by logic alone (a backward pass from the baseline's completion that ignores
  milestone constraints), counted in work days of the ledger calendar (the completion
  activity's) and floored by its own float (an activity that only slipped into its float is
  not late), less its driving predecessor's. An activity that only carried an earlier delay
  across non-working days (same gap behind its driving predecessor, same duration)
  contributes nothing. The contributions add up to the completion's movement in work days;
  they are split into calendar days at completion in path order, so they add up exactly to
  the completion variance. Each contribution is dated at the activity's actual finish and
  falls in that period.

References
----------
AACE International Recommended Practice 29R-03, Forensic Schedule Analysis (2011), MIP 3.1
(observational / static / gross) and MIP 3.2 (observational / static / periodic), as
recalled. Society of Construction Law Delay and Disruption Protocol, 2nd edition (2017),
Part B, as-planned versus as-built windows analysis. Measuring delay on the critical path
in work days is common practice.

Assumptions
-----------
The as-built record is complete and accurate (after disclosed corrections), and the last
update's logic reflects how the work was actually sequenced. Activities added after the
baseline have no planned dates and contribute nothing of their own (they pass on their
predecessor's lateness).
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass

import numpy as np
import pandas as pd

from ..convert import NO_DAY, day_to_date, iso_date, json_int, table_dates
from ..cpm import calendars_of, prepare
from ..errors import CaseError, Problem, ReconciliationError
from ..events import completion_activity
from ..ledger import ledger_number, logic_late_finish, split_days, trace_charges
from ..memo import remembered

__all__ = ["compare", "AsBuiltResult", "PERIODS"]

#: The period lengths ``--period`` takes (pandas period aliases).
PERIODS = ("W", "M", "Q")

_TYPE_NAMES = ("FS", "SS", "FF", "SF")


@dataclass(frozen=True)
class AsBuiltResult:
    """Planned against actual, the as-built critical path and the delay per period.

    Made by :func:`compare`. Dates are calendar dates; ``*_days`` columns count calendar
    days and ``*_work_days`` columns work days (of the activity's own calendar in
    ``activities``, of the ledger calendar on the critical path).

    Parameters
    ----------
    activities : pandas.DataFrame
        Every activity (as-built order, then baseline activities not in the record): planned
        and actual dates, planned and actual durations in work days, and the start, finish
        and duration variances in calendar days and work days.
    critical_path : pandas.DataFrame
        The as-built critical path in path order: actual dates, planned finish, driving
        predecessor, link, gap and lateness in work days, ``inherited``, the contribution in
        ledger work days (``work_days``) and calendar days (``delay_days``), and its period.
    periods : pandas.DataFrame
        Delay per period along the path: ``period``, ``delay_days`` (calendar days),
        ``work_days`` (ledger work days) and ``cumulative_days`` (running total).
    planned_completion : datetime.date
        The completion activity's finish in the baseline (its early finish).
    actual_completion : datetime.date
        The completion activity's actual finish in the as-built record.
    period : str
        The pandas period alias the periods are cut by (``"W"``, ``"M"`` or ``"Q"``).
    target : str, optional
        The completion activity's id.
    ledger_calendar : str, optional
        The name of the calendar the work days of the path are counted on.
    """

    activities: pd.DataFrame
    critical_path: pd.DataFrame
    periods: pd.DataFrame
    planned_completion: dt.date
    actual_completion: dt.date
    period: str
    target: str = ""
    ledger_calendar: str = ""

    @property
    def completion_variance_days(self) -> int:
        """The actual less the planned completion, in calendar days (positive is late)."""
        return (self.actual_completion - self.planned_completion).days

    def to_json(self) -> dict:
        """The result as plain JSON values (dates as ISO text, ``None`` for no value).

        Returns
        -------
        dict
            ``method`` (``"asbuilt"``), the target, ledger calendar, completions and
            variance, and the ``critical_path``, ``periods`` and ``activities`` rows.
        """
        return {
            "method": "asbuilt",
            "target": self.target,
            "ledger_calendar": self.ledger_calendar,
            "planned_completion": self.planned_completion.isoformat(),
            "actual_completion": self.actual_completion.isoformat(),
            "completion_variance_days": self.completion_variance_days,
            "critical_path": [
                {
                    "activity": r.activity,
                    "actual_start": iso_date(r.actual_start),
                    "actual_finish": iso_date(r.actual_finish),
                    "planned_finish": iso_date(r.planned_finish),
                    "driving_predecessor": r.driving_predecessor or None,
                    "link": r.link or None,
                    "gap_work_days": json_int(r.gap_work_days),
                    "lateness_work_days": json_int(r.lateness_work_days),
                    "inherited": bool(r.inherited),
                    "work_days": int(r.work_days),
                    "delay_days": int(r.delay_days),
                    "period": r.period,
                }
                for r in self.critical_path.itertuples(index=False)
            ],
            "periods": [
                {
                    "period": r.period,
                    "delay_days": int(r.delay_days),
                    "work_days": int(r.work_days),
                    "cumulative_days": int(r.cumulative_days),
                }
                for r in self.periods.itertuples(index=False)
            ],
            "activities": [
                {
                    "activity": r.activity,
                    "planned_start": iso_date(r.planned_start),
                    "planned_finish": iso_date(r.planned_finish),
                    "actual_start": iso_date(r.actual_start),
                    "actual_finish": iso_date(r.actual_finish),
                    "start_variance_days": json_int(r.start_variance_days),
                    "start_variance_work_days": json_int(r.start_variance_work_days),
                    "finish_variance_days": json_int(r.finish_variance_days),
                    "finish_variance_work_days": json_int(r.finish_variance_work_days),
                    "duration_variance_work_days": json_int(r.duration_variance_work_days),
                }
                for r in self.activities.itertuples(index=False)
            ],
        }


def _work_index(calendars, cal: np.ndarray, days: np.ndarray, finish: bool) -> pd.array:
    """Work-day indices of day numbers on each activity's calendar (``<NA>`` for none)."""
    days = np.asarray(days, dtype=np.int64)
    known = days != NO_DAY
    out = np.zeros(days.size, dtype=np.int64)
    if known.any():
        convert = calendars.finish_index_days if finish else calendars.start_index_days
        out[known] = convert(cal[known], days[known])
    values = pd.array(out, dtype="Int64")
    values[~known] = pd.NA
    return values


def _activity_table(planned, built) -> pd.DataFrame:
    """Every activity, planned against actual, with variances in calendar and work days."""
    calendars = built.model.calendars
    planned_start_day = planned.day_array("early_start")
    planned_finish_day = planned.day_array("early_finish")
    actual_start_day = built.day_array("early_start")
    actual_finish_day = built.day_array("early_finish")
    cal = built.model.calendar
    work_days = (
        calendars.finish_index_days(cal, actual_finish_day) + 1 - calendars.start_index_days(cal, actual_start_day)
    )
    milestone = (built.point != 0) | (built.model.kind != 0)
    actual = pd.DataFrame(
        {
            "id": built.ids,
            "name": built.model.names,
            "actual_start": table_dates(actual_start_day),
            "actual_finish": table_dates(actual_finish_day),
            "actual_duration": np.where(milestone, 0, np.maximum(work_days, 0)),
            "_actual_start_index": _work_index(calendars, cal, actual_start_day, False),
            "_actual_finish_index": _work_index(calendars, cal, actual_finish_day, True),
        }
    )
    # the planned dates counted on the as-built calendar of each activity
    where = built.model.network.index_of(planned.ids)
    plan_cal = np.where(where >= 0, cal[np.maximum(where, 0)], planned.model.calendar)
    plan = pd.DataFrame(
        {
            "id": planned.ids,
            "planned_start": table_dates(planned_start_day),
            "planned_finish": table_dates(planned_finish_day),
            "planned_duration": planned.model.duration,
            "_planned_start_index": _work_index(calendars, plan_cal, planned_start_day, False),
            "_planned_finish_index": _work_index(calendars, plan_cal, planned_finish_day, True),
        }
    )
    table = actual.merge(plan, on="id", how="outer", sort=False)
    order = pd.Index(list(built.ids) + list(pd.Index(planned.ids).difference(pd.Index(built.ids), sort=False)))
    table = table.set_index("id").reindex(order).rename_axis("id").reset_index()
    table["start_variance_days"] = (table["actual_start"] - table["planned_start"]).dt.days.astype("Int64")
    table["start_variance_work_days"] = (table["_actual_start_index"] - table["_planned_start_index"]).astype("Int64")
    table["finish_variance_days"] = (table["actual_finish"] - table["planned_finish"]).dt.days.astype("Int64")
    table["finish_variance_work_days"] = (table["_actual_finish_index"] - table["_planned_finish_index"]).astype(
        "Int64"
    )
    table["duration_variance_work_days"] = (table["actual_duration"] - table["planned_duration"]).astype("Int64")
    return table.rename(columns={"id": "activity"})[
        [
            "activity",
            "name",
            "planned_start",
            "planned_finish",
            "planned_duration",
            "actual_start",
            "actual_finish",
            "actual_duration",
            "start_variance_days",
            "start_variance_work_days",
            "finish_variance_days",
            "finish_variance_work_days",
            "duration_variance_work_days",
        ]
    ].reset_index(drop=True)


def compare(case, period: str = "M") -> AsBuiltResult:
    """As-planned versus as-built comparison of a case.

    Parameters
    ----------
    case : delay.model.Case
        A case with an as-built record (asbuilt.csv).
    period : str, default "M"
        Pandas period alias for the delay per period (``"M"`` monthly, ``"W"`` weekly,
        ``"Q"`` quarterly).

    Returns
    -------
    AsBuiltResult
        ``activities`` (planned and actual dates, durations, variances in calendar and work
        days), ``critical_path`` (in path order, with each driving predecessor, link gap,
        lateness, contribution in work days and calendar days, and period), ``periods``
        (delay per period along the path: calendar days, ledger work days and the running
        total).

    Raises
    ------
    delay.errors.CaseError
        The case has no as-built record, or the completion activity is not in both the
        baseline and the record.
    delay.errors.ReconciliationError
        The contributions do not add up to the completion variance.

    Examples
    --------
    A small random case with two monthly updates and an as-built record; the
    contributions along the as-built critical path add up to the completion variance:

    >>> import pathlib, tempfile
    >>> from delay.case import load_case
    >>> from delay.synth import synthesise
    >>> with tempfile.TemporaryDirectory() as folder:
    ...     case = load_case(synthesise(pathlib.Path(folder) / "case", 20, updates=2))
    >>> result = compare(case, period="M")
    >>> int(result.critical_path["delay_days"].sum()) == result.completion_variance_days
    True

    References
    ----------
    AACE RP 29R-03 (2011), MIP 3.1 and 3.2; SCL Delay and Disruption Protocol, 2nd edition
    (2017), Part B, as-planned versus as-built windows analysis.
    """
    if case.asbuilt_snapshot is None:
        raise CaseError(
            Problem(
                file="asbuilt.csv",
                message="the case has no as-built record",
                fix="add asbuilt.csv with the actual dates of every activity",
            )
        )
    return remembered(case, ("asbuilt", period), lambda: _compare(case, period))


def _compare(case, period: str) -> AsBuiltResult:
    calendars = calendars_of(case)
    planned = prepare(case, case.baseline, calendars=calendars).run()
    built = prepare(case, case.asbuilt_snapshot, calendars=calendars).run()
    target = completion_activity(case)
    k_plan = int(planned.model.network.index_of([target])[0])
    k_built = int(built.model.network.index_of([target])[0])
    if k_plan < 0 or k_built < 0:
        raise CaseError(
            Problem(
                file="case.toml",
                column="completion_activity",
                message=f"the completion activity '{target}' is not in the baseline and the as-built record",
                fix="name an activity both have in [project] completion_activity",
            )
        )
    table = _activity_table(planned, built)
    planned_day, actual_day = int(planned.finish_day[k_plan]), int(built.finish_day[k_built])
    ledger = ledger_number(planned, target)
    late = logic_late_finish(planned, k_plan)
    stop = np.zeros(built.ids.size, dtype=bool)
    charges = trace_charges(built, planned, late, target, stop, ledger)
    chain = charges[charges["counted"].astype(bool)].reset_index(drop=True)
    days = split_days(planned_day, actual_day, chain["work_days"], built, ledger)
    path = _path_table(built, table, chain, days, period)
    variance_total = actual_day - planned_day
    if int(path["delay_days"].sum()) != variance_total:
        raise ReconciliationError(
            "as-built critical path",
            {"contributions": int(path["delay_days"].sum()), "completion variance": variance_total},
        )
    periods = path.groupby("period", sort=True)[["delay_days", "work_days"]].sum().reset_index()
    periods["cumulative_days"] = periods["delay_days"].cumsum()
    return AsBuiltResult(
        table,
        path,
        periods,
        day_to_date(planned_day),
        day_to_date(actual_day),
        period,
        target=target,
        ledger_calendar=calendars.names[ledger],
    )


def _path_table(built, table: pd.DataFrame, chain: pd.DataFrame, days: np.ndarray, period: str) -> pd.DataFrame:
    """The as-built critical path in path order, with each activity's contribution."""
    net = built.model.network
    numbers = net.index_of(list(chain["activity"]))
    predecessors = net.index_of([p or "" for p in chain["driving_predecessor"]])
    planned_finish = table.set_index("activity")["planned_finish"]
    actual_start = built.day_array("early_start")
    actual_finish = built.day_array("early_finish")
    rows = []
    for i, (v, p) in enumerate(zip(numbers, predecessors)):
        link, gap = "", pd.NA
        if p >= 0:
            links = net.in_link[net.in_ptr[v] : net.in_ptr[v + 1]]
            links = links[net.pred[links] == p]
            if links.size:
                e = int(links[np.argmin(np.abs(built.link_gaps[links]))])
                lag = int(net.lag[e])
                link = _TYPE_NAMES[int(net.link_type[e])] + (f"{lag:+d}" if lag else "")
                gap = int(built.link_gaps[e])
        finish = pd.Timestamp(table_dates(np.array([actual_finish[v]]))[0])
        rows.append(
            {
                "activity": str(net.ids[v]),
                "name": built.model.names[v],
                "actual_start": pd.Timestamp(table_dates(np.array([actual_start[v]]))[0]),
                "actual_finish": finish,
                "planned_finish": planned_finish.get(str(net.ids[v]), pd.NaT),
                "driving_predecessor": str(net.ids[p]) if p >= 0 else "",
                "link": link,
                "gap_work_days": gap,
                "lateness_work_days": int(chain["level"].iloc[i]),
                "inherited": bool(chain["inherited"].iloc[i]),
                "work_days": int(chain["work_days"].iloc[i]),
                "delay_days": int(days[i]),
                "period": str(finish.to_period(period)),
            }
        )
    columns = [
        "activity",
        "name",
        "actual_start",
        "actual_finish",
        "planned_finish",
        "driving_predecessor",
        "link",
        "gap_work_days",
        "lateness_work_days",
        "inherited",
        "work_days",
        "delay_days",
        "period",
    ]
    path = pd.DataFrame(rows, columns=columns)
    path["gap_work_days"] = path["gap_work_days"].astype("Int64")
    return path
