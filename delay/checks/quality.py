"""Schedule quality metrics of one snapshot: the fourteen-point schedule assessment.

Before a delay method is trusted, the analyst shows that each programme it uses is fit for
the purpose. The fourteen checks below follow the published fourteen-point schedule
assessment of the United States Defense Contract Management Agency (DCMA-EA PAM 200.1,
*Earned Value Management System (EVMS) Program Analysis Pamphlet*, October 2012, section 4).
The thresholds are as recalled from that document, not copied from it:

=================  ==========================================  =============================
key                what is counted                             threshold (as recalled)
=================  ==========================================  =============================
logic              incomplete tasks without a predecessor or   at most 5 %
                   without a successor (or both)
leads              links with a negative lag                   none (0)
lags               links with a positive lag                   at most 5 %
relationship_types finish-to-start links                       at least 90 % FS
hard_constraints   incomplete tasks with latest_finish,        at most 5 %
                   fixed_start or fixed_finish
high_float         incomplete tasks with total float > 44      at most 5 %
                   work days
negative_float     incomplete tasks with total float < 0       none (0)
high_duration      incomplete tasks with planned duration      at most 5 %
                   > 44 work days
invalid_dates      tasks with a forecast date before the       none (0)
                   data date or an actual date on or after it
resources          incomplete tasks without resources          none published ("-")
missed_activities  tasks due by the data date in the baseline  at most 5 %
                   that finished late or not at all
critical_path_test completion moves by a delay added to the    pass / fail
                   first critical task of the driving path
cpli               critical path length index                  at least 0.95
bei                baseline execution index                    at least 0.95
=================  ==========================================  =============================

Denominators (DCMA-EA PAM 200.1 (2012) section 4, as recalled; where the text leaves a
choice, the choice taken is said):

- *Incomplete tasks* - the assessment's "total tasks" leaves out completed work, summary
  and level-of-effort activities and zero-duration activities (milestones). A case has no
  summary or level-of-effort activities, so this is: activities of kind ``task`` with a
  planned duration above 0 that are not complete at the data date. It is the denominator
  of logic, hard_constraints, high_float, negative_float, high_duration and resources.
  (Milestones without logic are found by the forensic open-end check instead.)
- *Relationships* - the assessment counts "predecessor relationships of incomplete
  tasks": the links whose successor is an incomplete task. Denominator of leads, lags and
  relationship_types. Links into complete work no longer shape the schedule (the
  scheduling rules ignore them). In the offending list a link is written ``pred>succ``.
- invalid_dates counts over every task of the snapshot, complete or not, since an actual
  date can be invalid on complete work too.
- missed_activities and bei: the tasks of the baseline whose baseline (early) finish lies
  before the data date, i.e. on or before the last day the update reports, and that are
  still in the snapshot. An activity added after the baseline has no baseline finish and
  is left out; a baseline task deleted from the snapshot cannot be judged and is left out
  too (the note says how many). bei divides the baseline tasks complete in the snapshot
  (ahead of time or not, as the assessment does) by those due.
- high_duration uses the snapshot's planned (original) ``duration``, not the remaining
  duration: the assessment speaks of the baseline duration of the task.
- cpli: critical path length (work days of the case's default calendar from the data date
  to the forecast completion, both days counted) plus the total float to the contract
  completion in force (positive when the forecast is early), over the critical path length.
  The contract completion in force is case.toml's ``contract_completion`` plus the days of
  extensions_granted.csv rows without a section; measured against the project's own finish
  the index would always be 1. ``count`` is the numerator, ``denominator`` the path length.
- critical_path_test: a delay of :data:`CRITICAL_PATH_TEST_DELAY` work days is added (the
  engine's what-if) to the first incomplete task of the driving path that is critical; the
  test passes when completion moves by the same amount, counted in work days of that task's
  calendar (common practice for this test). When the driving path mixes calendars, dates
  are rounded to each calendar's work days where it changes, so a movement within
  :data:`MIXED_CALENDAR_TOLERANCE` of the delay passes; the note says when that applied.
  ``count`` is the movement, ``denominator`` the delay added.

A metric with a zero denominator is "not applicable": ``percent`` and ``passed`` are
``None``. A failed metric is a finding about the records, not an error.

References
----------
Defense Contract Management Agency, DCMA-EA PAM 200.1, Earned Value Management System
(EVMS) Program Analysis Pamphlet, October 2012, section 4 (fourteen-point assessment), as
recalled.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from ..convert import NO_DAY, day_to_date, json_cell, to_days
from ..cpm import COMPLETE, NOT_STARTED, TASK, ScheduleResult
from ..model import Case, Snapshot
from ._common import contract_completion_in_force, link_keys, model_of, resolve, scheduled

__all__ = [
    "Metric",
    "quality_metrics",
    "metric_list",
    "METRIC_KEYS",
    "METRIC_COLUMNS",
    "HIGH_FLOAT_DAYS",
    "HIGH_DURATION_DAYS",
    "CRITICAL_PATH_TEST_DELAY",
    "MIXED_CALENDAR_TOLERANCE",
    "HARD_CONSTRAINTS",
    "invalid_date_mask",
]

METRIC_KEYS = (
    "logic",
    "leads",
    "lags",
    "relationship_types",
    "hard_constraints",
    "high_float",
    "negative_float",
    "high_duration",
    "invalid_dates",
    "resources",
    "missed_activities",
    "critical_path_test",
    "cpli",
    "bei",
)
METRIC_COLUMNS = (
    "key",
    "title",
    "count",
    "denominator",
    "percent",
    "threshold",
    "passed",
    "activities",
    "unit",
    "note",
)

#: Total float above this many work days is high float (DCMA-EA PAM 200.1 (2012), as recalled).
HIGH_FLOAT_DAYS = 44
#: A planned duration above this many work days is a high duration (same source, as recalled).
HIGH_DURATION_DAYS = 44
#: Work days added to one critical task by the critical path test (common practice).
CRITICAL_PATH_TEST_DELAY = 600
#: Share of the delay by which completion may differ when the driving path mixes calendars.
MIXED_CALENDAR_TOLERANCE = 0.02
#: Constraints that hold an activity's dates against its logic (the assessment's "hard"
#: constraints: must start or finish on, start or finish no later than; as recalled).
HARD_CONSTRAINTS = ("latest_finish", "fixed_start", "fixed_finish")


@dataclass(frozen=True)
class Metric:
    """One metric's finding.

    Parameters
    ----------
    key : str
        The metric, one of :data:`METRIC_KEYS`.
    title : str
        Its title in plain words.
    count : int or None
        What was counted (see the module docstring); ``None`` when nothing could be.
    denominator : int or None
        What it is counted against; ``0`` or ``None`` when not applicable.
    percent : float or None
        ``100 * count / denominator`` rounded to two places; ``None`` when not applicable.
    threshold : str
        The threshold as text (``"<= 5%"``, ``"0"``, ``"-"``, ...).
    passed : bool or None
        The verdict; ``None`` when not applicable.
    activities : tuple of str, optional
        The offending activity ids (links as ``pred>succ`` when ``unit == "links"``).
    unit : str, optional
        What ``activities`` lists: ``"activities"`` or ``"links"``.
    note : str, optional
        What the reader should know (why it is not applicable, a tolerance applied).

    Examples
    --------
    >>> Metric("leads", "Leads (negative lags)", 1, 40, 2.5, "0", False, ("A>B",), "links").to_json()["activities"]
    ['A>B']
    """

    key: str
    title: str
    count: int | None
    denominator: int | None
    percent: float | None
    threshold: str
    passed: bool | None
    activities: tuple[str, ...] = ()
    unit: str = "activities"
    note: str = ""

    def to_json(self) -> dict:
        """The metric as a dictionary ready for ``json.dumps`` (the form ``delay check`` prints).

        Returns
        -------
        dict
            The fields by name (:data:`METRIC_COLUMNS`), ``activities`` as a list and
            numbers as plain Python numbers (``None`` for none).
        """
        return {
            "key": self.key,
            "title": self.title,
            "count": json_cell(self.count),
            "denominator": json_cell(self.denominator),
            "percent": json_cell(self.percent),
            "threshold": self.threshold,
            "passed": self.passed,
            "activities": list(self.activities),
            "unit": self.unit,
            "note": self.note,
        }


def _percent(count: int, denominator: int) -> float | None:
    return None if not denominator else round(100.0 * count / denominator, 2)


def _share(
    key: str,
    title: str,
    offending: np.ndarray,
    ids,
    denominator: int,
    *,
    at_most: float | None,
    unit: str = "activities",
    note: str = "",
    threshold: str | None = None,
) -> Metric:
    """A count-over-denominator metric: ``at_most`` percent, or ``None`` for 'none at all'."""
    count = int(np.count_nonzero(offending))
    listed = tuple(str(i) for i in np.asarray(ids, dtype=object)[offending])
    if not denominator:
        return Metric(
            key,
            title,
            count,
            0,
            None,
            threshold or _limit_text(at_most),
            None,
            listed,
            unit,
            note or f"not applicable: there are no {_population(unit)}",
        )
    if at_most is None:
        passed = count == 0
    else:
        passed = count * 100 <= at_most * denominator
    return Metric(
        key,
        title,
        count,
        int(denominator),
        _percent(count, denominator),
        threshold or _limit_text(at_most),
        passed,
        listed,
        unit,
        note,
    )


def _population(unit: str) -> str:
    return "links into incomplete tasks" if unit == "links" else "incomplete tasks"


def _limit_text(at_most: float | None) -> str:
    return "0" if at_most is None else f"<= {at_most:g}%"


def quality_metrics(case: Case, snapshot: str | Snapshot = "baseline") -> pd.DataFrame:
    """The fourteen-point schedule assessment of one snapshot.

    Parameters
    ----------
    case : Case
        A loaded case.
    snapshot : str or Snapshot, optional
        Folder name, label, ``"asbuilt"``, or a :class:`~delay.model.Snapshot`.

    Returns
    -------
    pandas.DataFrame
        One row per metric in :data:`METRIC_KEYS` order, columns :data:`METRIC_COLUMNS`.
        The module docstring gives each metric's denominator and threshold (DCMA-EA PAM
        200.1, October 2012, section 4, as recalled).

    Raises
    ------
    CaseError
        For an unknown snapshot, or a snapshot that cannot be scheduled.

    Examples
    --------
    >>> metrics = quality_metrics(demo)  # the demo case
    >>> bool(metrics.set_index("key").loc["logic", "passed"])
    True
    """
    metrics = metric_list(case, snapshot)
    return pd.DataFrame([[getattr(m, c) for c in METRIC_COLUMNS] for m in metrics], columns=list(METRIC_COLUMNS))


def metric_list(case: Case, snapshot: str | Snapshot = "baseline") -> list[Metric]:
    """:func:`quality_metrics` as a list of :class:`Metric` (for JSON and tables).

    Parameters
    ----------
    case : Case
        A loaded case.
    snapshot : str or Snapshot, default "baseline"
        The programme measured: a folder name, a label, ``"asbuilt"`` or a snapshot.

    Returns
    -------
    list of Metric
        The fourteen metrics in the order of :data:`METRIC_KEYS`.
    """
    snap = resolve(case, snapshot)
    result = scheduled(case, snap)
    table = snap.activities_table
    model = result.model
    net = model.network
    ids = net.ids
    status = result.status
    complete = status == COMPLETE
    task = (table["kind"].to_numpy(dtype=object) == "task") & (table["duration"].to_numpy() > 0)
    incomplete_task = task & ~complete
    tasks_left = int(incomplete_task.sum())
    metrics: list[Metric] = []

    metrics.extend(_logic_metrics(net, ids, incomplete_task, tasks_left))
    metrics.extend(_float_and_duration_metrics(table, result, ids, incomplete_task, tasks_left))
    metrics.append(_invalid_dates_metric(model, result, status, task, ids))

    # 10 resources
    metrics.append(_resources(table, incomplete_task, ids, tasks_left))

    # 11, 14 missed activities and baseline execution index
    missed, bei = _baseline_execution(case, snap, result, table)
    metrics.append(missed)

    # 12 critical path test
    metrics.append(_critical_path_test(case, snap, result))

    # 13 critical path length index
    metrics.append(_critical_path_length_index(case, result))
    metrics.append(bei)
    order = {key: i for i, key in enumerate(METRIC_KEYS)}
    return sorted(metrics, key=lambda m: order[m.key])


def _logic_metrics(net, ids: np.ndarray, incomplete_task: np.ndarray, tasks_left: int) -> list[Metric]:
    """Metrics 1-4: missing logic, leads, lags and relationship types (links into
    incomplete tasks)."""
    metrics: list[Metric] = []
    # 1 logic
    has_pred = np.bincount(net.succ, minlength=net.size) > 0
    has_succ = np.bincount(net.pred, minlength=net.size) > 0
    metrics.append(
        _share("logic", "Missing logic", incomplete_task & ~(has_pred & has_succ), ids, tasks_left, at_most=5)
    )

    # 2-4 relationships into incomplete tasks
    relationship = incomplete_task[net.succ]
    keys = np.asarray(link_keys(ids[net.pred], ids[net.succ]), dtype=object)
    links_counted = int(relationship.sum())
    metrics.append(
        _share(
            "leads",
            "Leads (negative lags)",
            relationship & (net.lag < 0),
            keys,
            links_counted,
            at_most=None,
            unit="links",
        )
    )
    metrics.append(
        _share(
            "lags", "Lags (positive lags)", relationship & (net.lag > 0), keys, links_counted, at_most=5, unit="links"
        )
    )
    metrics.append(_relationship_types(relationship, net.link_type, keys, links_counted))

    return metrics


def _float_and_duration_metrics(table, result, ids: np.ndarray, incomplete_task: np.ndarray, tasks_left: int):
    """Metrics 5-8 over the incomplete tasks: hard constraints, high float, negative float,
    high duration (work days)."""
    metrics: list[Metric] = []
    # 5 hard constraints
    constraint = table["constraint"].fillna("").to_numpy(dtype=object)
    metrics.append(
        _share(
            "hard_constraints",
            "Hard constraints",
            incomplete_task & np.isin(constraint, HARD_CONSTRAINTS),
            ids,
            tasks_left,
            at_most=5,
        )
    )

    # 6-7 float
    total_float = result.total_float
    metrics.append(
        _share(
            "high_float",
            f"High float (> {HIGH_FLOAT_DAYS} work days)",
            incomplete_task & (total_float > HIGH_FLOAT_DAYS),
            ids,
            tasks_left,
            at_most=5,
        )
    )
    metrics.append(
        _share("negative_float", "Negative float", incomplete_task & (total_float < 0), ids, tasks_left, at_most=None)
    )

    # 8 high duration (planned duration)
    duration = table["duration"].to_numpy()
    metrics.append(
        _share(
            "high_duration",
            f"High duration (> {HIGH_DURATION_DAYS} work days)",
            incomplete_task & (duration > HIGH_DURATION_DAYS),
            ids,
            tasks_left,
            at_most=5,
        )
    )

    return metrics


def _invalid_dates_metric(model, result, status: np.ndarray, task: np.ndarray, ids: np.ndarray) -> Metric:
    """Metric 9: tasks with actual dates after the data date or forecasts before it."""
    invalid = task & invalid_date_mask(
        model.data_day,
        status,
        result.day_array("early_start"),
        result.day_array("early_finish"),
        model.actual_start,
        model.actual_finish,
    )
    return _share(
        "invalid_dates",
        "Invalid dates",
        invalid,
        ids,
        int(task.sum()),
        at_most=None,
        note="actual dates on or after the data date are also refused when the case "
        "is loaded; the engine never forecasts work before the data date",
    )


def _relationship_types(relationship: np.ndarray, link_type: np.ndarray, keys: np.ndarray, counted: int) -> Metric:
    finish_to_start = relationship & (link_type == 0)
    count = int(finish_to_start.sum())
    others = tuple(str(k) for k in keys[relationship & (link_type != 0)])
    if not counted:
        return Metric(
            "relationship_types",
            "Relationship types (finish-to-start share)",
            count,
            0,
            None,
            ">= 90% FS",
            None,
            others,
            "links",
            "not applicable: there are no links into incomplete tasks",
        )
    return Metric(
        "relationship_types",
        "Relationship types (finish-to-start share)",
        count,
        counted,
        _percent(count, counted),
        ">= 90% FS",
        count * 100 >= 90 * counted,
        others,
        "links",
        "count is the finish-to-start links; the list gives the other links",
    )


def invalid_date_mask(
    data_day: int,
    status: np.ndarray,
    early_start: np.ndarray,
    early_finish: np.ndarray,
    actual_start: np.ndarray,
    actual_finish: np.ndarray,
) -> np.ndarray:
    """Activities with an invalid date at the data date (all arrays shape ``(n,)``).

    A forecast (early) start of work not started, or a forecast finish of work not complete,
    before the data date; or an actual start or finish on or after it. Day numbers are
    ``int64`` calendar days since 1970-01-01, :data:`delay.cpm.NO_DAY` for none.

    Parameters
    ----------
    data_day : int
        The snapshot's data date as a day number.
    status : numpy.ndarray
        Each activity's status code (:data:`delay.cpm.NOT_STARTED`, ``IN_PROGRESS`` or
        :data:`delay.cpm.COMPLETE`) at the data date.
    early_start : numpy.ndarray
        Forecast (early) starts, as day numbers.
    early_finish : numpy.ndarray
        Forecast (early) finishes, as day numbers.
    actual_start : numpy.ndarray
        Actual starts, as day numbers.
    actual_finish : numpy.ndarray
        Actual finishes, as day numbers.

    Returns
    -------
    numpy.ndarray
        One boolean per activity, true where a date is invalid.

    Examples
    --------
    >>> import numpy as np
    >>> from delay.cpm import COMPLETE, IN_PROGRESS, NO_DAY, NOT_STARTED
    >>> data_day = 20269  # 2025-06-30
    >>> invalid_date_mask(
    ...     data_day,
    ...     np.array([NOT_STARTED, IN_PROGRESS, COMPLETE]),
    ...     early_start=np.array([20260, 20200, 20100]),  # the first is forecast to start before the data date
    ...     early_finish=np.array([20280, 20290, 20150]),
    ...     actual_start=np.array([NO_DAY, 20200, 20100]),
    ...     actual_finish=np.array([NO_DAY, NO_DAY, 20270]),  # the third finished after the data date
    ... ).tolist()
    [True, False, True]
    """
    status = np.asarray(status)
    not_started = status == NOT_STARTED
    incomplete = status != COMPLETE
    forecast_start_early = not_started & (early_start != NO_DAY) & (early_start < data_day)
    forecast_finish_early = incomplete & (early_finish != NO_DAY) & (early_finish < data_day)
    actual_late = ((actual_start != NO_DAY) & (actual_start >= data_day)) | (
        (actual_finish != NO_DAY) & (actual_finish >= data_day)
    )
    return forecast_start_early | forecast_finish_early | actual_late


def _resources(table: pd.DataFrame, incomplete_task: np.ndarray, ids, tasks_left: int) -> Metric:
    title = "Resources"
    if "resources" not in table.columns:
        return Metric(
            "resources",
            title,
            None,
            None,
            None,
            "-",
            None,
            (),
            "activities",
            "not applicable: the case holds no resource data (no 'resources' column)",
        )
    blank = table["resources"].fillna("").astype(str).str.strip().to_numpy() == ""
    metric = _share("resources", title, incomplete_task & blank, ids, tasks_left, at_most=None, threshold="-")
    # The assessment publishes no threshold for resources: the count is reported only.
    return Metric(
        metric.key,
        metric.title,
        metric.count,
        metric.denominator,
        metric.percent,
        "-",
        None,
        metric.activities,
        metric.unit,
        "incomplete tasks whose 'resources' cell is blank; no published threshold, reported only",
    )


def _baseline_execution(case: Case, snap: Snapshot, result: ScheduleResult, table: pd.DataFrame):
    base_snap = case.baseline
    base = scheduled(case, base_snap)
    base_table = base_snap.activities_table
    base_task = (base_table["kind"].to_numpy(dtype=object) == "task") & (base_table["duration"].to_numpy() > 0)
    base_finish = base.day_array("early_finish")
    data_day = result.model.data_day
    due_in_baseline = base_task & (base_finish != NO_DAY) & (base_finish < data_day)
    where = pd.Index(table["id"]).get_indexer(base_table["id"])
    present = where >= 0
    due = due_in_baseline & present
    deleted = int((due_in_baseline & ~present).sum())
    rows = np.maximum(where, 0)
    actual_finish = result.model.actual_finish[rows]
    finished = present & (actual_finish != NO_DAY)
    late = finished & (actual_finish > base_finish)
    missed = due & (~finished | late)
    due_count = int(due.sum())
    base_ids = base_table["id"].to_numpy(dtype=object)
    note = ""
    if deleted:
        note = f"{deleted} baseline task(s) due by the data date are not in this snapshot and are left out"
    missed_metric = _share(
        "missed_activities",
        "Missed activities",
        missed,
        base_ids,
        due_count,
        at_most=5,
        note=note or ("" if due_count else "not applicable: no baseline task was due before the data date"),
    )
    completed = int((base_task & finished).sum())
    title = "Baseline execution index"
    if not due_count:
        bei = Metric(
            "bei",
            title,
            completed,
            0,
            None,
            ">= 0.95",
            None,
            (),
            "activities",
            "not applicable: no baseline task was due before the data date",
        )
    else:
        index = completed / due_count
        bei_note = f"BEI {index:.2f}: {completed} baseline task(s) complete of {due_count} due"
        if note:
            bei_note += f"; {note}"
        bei = Metric(
            "bei",
            title,
            completed,
            due_count,
            _percent(completed, due_count),
            ">= 0.95",
            completed * 100 >= 95 * due_count,
            tuple(str(i) for i in base_ids[missed]) if completed * 100 < 95 * due_count else (),
            "activities",
            bei_note,
        )
    return missed_metric, bei


def _critical_path_length_index(case: Case, result: ScheduleResult) -> Metric:
    model = result.model
    cals = model.calendars
    calendar = np.asarray([cals.number[case.settings.schedule.default_calendar]])
    in_force = contract_completion_in_force(case, at=result.data_date)
    data_day = model.data_day
    forecast = result.completion_day
    contract_day = int(to_days(np.datetime64(in_force, "D")))

    def start_index(day: int) -> int:
        return int(cals.start_index_days(calendar, np.asarray([day], dtype=np.int64))[0])

    length = start_index(forecast + 1) - start_index(data_day)
    to_contract = start_index(contract_day + 1) - start_index(data_day)
    title = "Critical path length index"
    if length <= 0:
        return Metric(
            "cpli",
            title,
            None,
            None,
            None,
            ">= 0.95",
            None,
            (),
            "activities",
            "not applicable: no work remains after the data date",
        )
    index = to_contract / length
    passed = to_contract * 100 >= 95 * length
    note = (
        f"CPLI {index:.2f}: {length} work days from the data date {result.data_date} to the forecast "
        f"completion {result.completion}; {to_contract} to the contract completion in force {in_force} "
        f"(total float {to_contract - length} work days)"
    )
    offending = () if passed else tuple(result.driving_path())
    return Metric(
        "cpli",
        title,
        to_contract,
        length,
        _percent(to_contract, length),
        ">= 0.95",
        passed,
        offending,
        "activities",
        note,
    )


def _critical_path_test(case: Case, snap: Snapshot, result: ScheduleResult) -> Metric:
    title = "Critical path test"
    threshold = "completion moves by the added delay"
    model = result.model
    path = result.driving_path()
    numbers = pd.Index(model.network.ids).get_indexer(pd.Index(path)) if path else np.empty(0, np.int64)
    usable = (result.status[numbers] != COMPLETE) & (model.kind[numbers] == TASK) & (result.duration[numbers] > 0)
    candidates = numbers[usable & result.critical[numbers]]
    if not candidates.size:
        candidates = numbers[usable]
    if not candidates.size:
        return Metric(
            "critical_path_test",
            title,
            None,
            None,
            None,
            threshold,
            None,
            (),
            "activities",
            "not applicable: the driving path holds no task with work remaining",
        )
    chosen = int(candidates[0])
    chosen_id = str(model.network.ids[chosen])
    delayed_day = model_of(case, snap).what_if(extend={chosen_id: CRITICAL_PATH_TEST_DELAY}).completion_day()
    cals = model.calendars
    calendar = np.asarray([model.calendar[chosen]])
    before = int(cals.finish_index_days(calendar, np.asarray([result.completion_day]))[0])
    after = int(cals.finish_index_days(calendar, np.asarray([delayed_day]))[0])
    moved = after - before
    one_calendar = bool((model.calendar[numbers] == model.calendar[chosen]).all())
    if one_calendar:
        passed = moved == CRITICAL_PATH_TEST_DELAY
        rule = "exactly"
    else:
        passed = abs(moved - CRITICAL_PATH_TEST_DELAY) <= MIXED_CALENDAR_TOLERANCE * CRITICAL_PATH_TEST_DELAY
        rule = f"within {MIXED_CALENDAR_TOLERANCE:.0%} (the driving path mixes calendars)"
    calendar_name = cals.names[model.calendar[chosen]]
    note = (
        f"{chosen_id} lengthened by {CRITICAL_PATH_TEST_DELAY} work days: completion moved from "
        f"{result.completion} to {day_to_date(delayed_day)}, {moved} work days of calendar '{calendar_name}'; "
        f"it must move {rule} by the delay"
    )
    return Metric(
        "critical_path_test",
        title,
        moved,
        CRITICAL_PATH_TEST_DELAY,
        _percent(moved, CRITICAL_PATH_TEST_DELAY),
        threshold,
        passed,
        () if passed else (chosen_id,),
        "activities",
        note,
    )
