"""Random, valid cases of any size, for benchmarks and for trying the toolkit at scale.

The network is built the way large programmes tend to look: activities in work packages of
about forty, each package a chain with some parallel branches, packages tied to earlier ones
by a few links; all four link types, lags and leads, two calendars (five-day with holidays,
seven-day), milestones and a few constraints. Every link runs from a lower to a higher
activity number, so the logic never loops.

Updates are produced from one simulated "actual" run of the programme: the baseline
durations scaled by random factors, scheduled once by our engine; at each data date the
activities finished before it are complete, the ones started before it are in progress with
the remaining work days still to go, and the rest are not started. From the second update
on, each update also re-plans some work not yet started: a few remaining-duration
re-estimates, a few longer lags and one deleted activity. An as-built record closes the
case.
"""

from __future__ import annotations

import datetime as dt
from pathlib import Path

import numpy as np
import pandas as pd

from .calendars import CalendarSet, WorkCalendar, parse_workdays
from .convert import iso_dates
from .network import LINK_CODES, build_network
from .output import check_folder_target, new_folder

__all__ = ["synthesise", "synthetic_network"]

START = dt.date(2026, 1, 5)  # a Monday
HOLIDAYS = [
    "2026-04-03",
    "2026-04-06",
    "2026-05-01",
    "2026-12-25",
    "2026-12-28",
    "2027-01-01",
    "2027-03-26",
    "2027-03-29",
    "2027-12-27",
    "2027-12-28",
    "2028-01-03",
    "2028-04-14",
    "2028-04-17",
    "2028-12-25",
    "2028-12-26",
]


def synthetic_network(activities: int, links_per_activity: float = 2.5, seed: int = 0):
    """Build the tables of a random programme, before any progress.

    Activities come in work packages of forty, each a chain with parallel lanes, the first
    of a package tied to an activity of an earlier package; further links reach close by
    or into an earlier package. Every link runs from a lower to a higher activity number,
    so the logic never loops. Durations are 1 to 10 work days (0 for the milestones, the
    first activity a start milestone and the last a finish milestone); lags are 0, 1 to 5
    or a lead of 1 to 2 work days (never a lead on an SF link); about one activity in 500
    has an ``earliest_start`` constraint. Calendars are ``5d`` or ``7d`` (about one in
    eight).

    Parameters
    ----------
    activities : int
        Number of activities (at least two).
    links_per_activity : float, default 2.5
        Links per activity on average, before the duplicates are dropped.
    seed : int, default 0
        Random seed; the same arguments give the same tables.

    Returns
    -------
    activities : DataFrame
        Columns ``id`` (``A000`` ...), ``name``, ``duration``, ``calendar``, ``wbs``,
        ``kind``, ``constraint``, ``constraint_date`` (ISO text or blank).
    links : DataFrame
        Columns ``pred``, ``succ``, ``type`` (FS, SS, FF, SF), ``lag``, sorted by
        successor and predecessor.

    Raises
    ------
    ValueError
        When ``activities`` is less than two.

    Examples
    --------
    >>> activities, links = synthetic_network(100, seed=1)
    >>> len(activities), list(links.columns)
    (100, ['pred', 'succ', 'type', 'lag'])
    >>> activities["kind"].iloc[[0, -1]].tolist()
    ['start_milestone', 'finish_milestone']
    >>> bool((links["pred"] < links["succ"]).all())  # ids of one width sort by number
    True
    """
    rng = np.random.default_rng(seed)
    n = int(activities)
    if n < 2:
        raise ValueError("a synthetic programme needs at least two activities")
    package = np.arange(n) // 40
    duration = rng.integers(1, 11, n)
    milestone = rng.random(n) < 0.04
    milestone[0] = milestone[-1] = True
    duration[milestone] = 0
    calendar = np.where(rng.random(n) < 0.12, "7d", "5d").astype(object)
    kind = np.full(n, "task", dtype=object)
    kind[0] = "start_milestone"
    kind[-1] = "finish_milestone"
    # links: a few parallel lanes inside each work package of forty; the first
    # activity of a package follows an activity of an earlier package chosen at random, and
    # further links reach either close by or into an earlier package.
    position = np.arange(n) % 40
    first_of_package = position == 0
    step_back = rng.choice([1, 2, 3, 4], size=n, p=[0.4, 0.3, 0.2, 0.1])  # parallel lanes
    step_back = np.minimum(step_back, position)
    chain_succ = np.flatnonzero(~first_of_package)
    chain_pred = chain_succ - step_back[chain_succ]
    heads = np.flatnonzero(first_of_package & (package > 0))
    earlier = (rng.random(heads.size) * package[heads]).astype(np.int64)
    head_pred = np.minimum(earlier * 40 + rng.integers(0, 40, heads.size), heads - 1)
    extra = max(0, int(round(n * links_per_activity)) - chain_succ.size - heads.size)
    extra_succ = rng.integers(1, n, extra)
    near = rng.random(extra) < 0.95
    near_pred = np.maximum(extra_succ - rng.integers(1, 12, extra), package[extra_succ] * 40)  # same package
    far_package = (rng.random(extra) * package[extra_succ]).astype(np.int64)
    far_pred = np.minimum(far_package * 40 + rng.integers(0, 40, extra), extra_succ - 1)
    extra_pred = np.where(near, near_pred, far_pred)
    pred = np.concatenate([chain_pred, head_pred, extra_pred])
    succ = np.concatenate([chain_succ, heads, extra_succ])
    keep = pred < succ
    pairs = np.unique(np.stack([pred[keep], succ[keep]], axis=1), axis=0)
    pred, succ = pairs[:, 0], pairs[:, 1]
    m = pred.size
    draw = rng.random(m)
    link_type = np.select([draw < 0.78, draw < 0.88, draw < 0.97], ["FS", "SS", "FF"], "SF").astype(object)
    lag_draw = rng.random(m)
    lag = np.where(lag_draw < 0.8, 0, np.where(lag_draw < 0.9, rng.integers(1, 6, m), -rng.integers(1, 3, m)))
    lag[(link_type == "SF") & (lag < 0)] = 0
    width = len(str(n))
    ids = np.array([f"A{i:0{width}d}" for i in range(n)], dtype=object)
    names = np.array([f"Package {p} task {i % 40}" for i, p in enumerate(package)], dtype=object)
    wbs = np.array([f"{1 + p // 25}.{1 + p % 25}" for p in package], dtype=object)
    constraint = np.full(n, "", dtype=object)
    constraint_date = np.full(n, "", dtype=object)
    picks = rng.choice(np.arange(1, n - 1), size=max(1, n // 500), replace=False)
    for k, i in enumerate(picks):
        constraint[i] = "earliest_start"
        constraint_date[i] = (START + dt.timedelta(days=int(i // 8) + 7 * (k % 3))).isoformat()
    activities_table = pd.DataFrame(
        {
            "id": ids,
            "name": names,
            "duration": duration,
            "calendar": calendar,
            "wbs": wbs,
            "kind": kind,
            "constraint": constraint,
            "constraint_date": constraint_date,
        }
    )
    links_table = pd.DataFrame({"pred": ids[pred], "succ": ids[succ], "type": link_type, "lag": lag})
    links_table = links_table.sort_values(["succ", "pred"], kind="stable").reset_index(drop=True)
    return activities_table, links_table


def _actual_run(activities: pd.DataFrame, links: pd.DataFrame, rng):
    """Actual start and finish days of a simulated execution (our engine, scaled durations)."""
    from .convert import NO_DAY
    from .cpm import ScheduleModel
    from .model import ScheduleSettings

    calendars = CalendarSet(
        {
            "5d": WorkCalendar("5d", parse_workdays("Mon Tue Wed Thu Fri"), HOLIDAYS, anchor=START),
            "7d": WorkCalendar("7d", parse_workdays("Mon Tue Wed Thu Fri Sat Sun"), anchor=START),
        }
    )
    index = pd.Index(activities["id"])
    pred = index.get_indexer(links["pred"]).astype(np.int64)
    succ = index.get_indexer(links["succ"]).astype(np.int64)
    n = len(activities)
    network = build_network(
        activities["id"].to_numpy(dtype=object),
        pred,
        succ,
        links["type"].map(LINK_CODES).to_numpy(dtype=np.int8),
        links["lag"].to_numpy(dtype=np.int64),
    )
    duration = activities["duration"].to_numpy(dtype=np.int64)
    factor = rng.choice([1.0, 1.0, 1.0, 1.2, 1.5, 2.0], n)
    actual_duration = np.where(duration > 0, np.maximum(1, np.round(duration * factor)), 0).astype(np.int64)
    kinds = {"task": 0, "start_milestone": 1, "finish_milestone": 2}
    model = ScheduleModel(
        network=network,
        calendars=calendars,
        names=activities["name"].to_numpy(dtype=object),
        calendar=activities["calendar"].map(calendars.number).to_numpy(dtype=np.int64),
        duration=actual_duration,
        remaining=np.full(n, np.nan),
        actual_start=np.full(n, NO_DAY, dtype=np.int64),
        actual_finish=np.full(n, NO_DAY, dtype=np.int64),
        kind=activities["kind"].map(kinds).to_numpy(dtype=np.int8),
        constraint=np.zeros(n, dtype=np.int8),
        constraint_day=np.full(n, NO_DAY, dtype=np.int64),
        start_bound=np.full(n, NO_DAY, dtype=np.int64),
        data_day=int(np.datetime64(START, "D").astype(np.int64)),
        contract_completion_day=int(np.datetime64(START, "D").astype(np.int64)) + 3650,
        settings=ScheduleSettings(default_calendar="5d"),
    )
    result = model.run()
    return result.day_array("early_start"), result.day_array("early_finish"), calendars, result


def synthesise(
    out: str | Path,
    activities: int,
    links_per_activity: float = 2.5,
    updates: int = 0,
    seed: int = 0,
    elements: int = 0,
) -> Path:
    """Write a valid random case folder to ``out``, which must not exist or be empty.

    The baseline is :func:`synthetic_network` starting on Monday 2026-01-05, with a
    five-day calendar with holidays and a seven-day one. The updates have data dates on the
    first of each following month and take their progress from one simulated actual run
    (the baseline durations scaled at random and scheduled by the engine); from the second
    update on each also re-plans some work not yet started. The contract completion is
    set at four fifths of the simulated run (at least 30 calendar days after the start).

    Parameters
    ----------
    out : str or Path
        The case folder to create.
    activities : int
        Number of activities (at least two).
    links_per_activity : float, default 2.5
        Links per activity on average.
    updates : int, default 0
        Number of monthly progress updates (an as-built record is written when > 0).
    seed : int, default 0
        Random seed; the same arguments give the same case.
    elements : int, default 0
        Number of model elements to write (boxes on a grid, linked by ``wbs``).

    Returns
    -------
    Path
        The case folder, ``out``.

    Raises
    ------
    delay.output.OutputRefused
        When ``out`` is a file or a folder that is not empty (nothing is written).
    ValueError
        When ``activities`` is less than two (nothing is written).
    """
    out = Path(out)
    check_folder_target(out, earlier=False)  # new or empty, before any work
    rng = np.random.default_rng(seed + 1)
    acts, links = synthetic_network(activities, links_per_activity, seed)
    start_day, finish_day, calendars, actual = _actual_run(acts, links, rng)
    end = dt.date(1970, 1, 1) + dt.timedelta(days=int(finish_day.max()))
    planned_end = end  # contract completion a little before the simulated end
    contract = START + dt.timedelta(days=max(30, int((planned_end - START).days * 0.8)))
    # built under a temporary name and moved into place (delay.output.new_folder)
    with new_folder(out) as tmp:
        (tmp / "case.toml").write_text(
            "[project]\n"
            f'name = "Synthetic programme of {activities} activities (seed {seed})"\n'
            f"contract_start = {START.isoformat()}\n"
            f"contract_completion = {contract.isoformat()}\n\n"
            "[schedule]\n"
            'default_calendar = "5d"\nprogress = "retained_logic"\n'
            'lag_calendar = "successor"\nfloat_to = "project_finish"\n',
            encoding="utf-8",
        )
        pd.DataFrame(
            {"calendar": ["5d", "7d"], "workdays": ["Mon Tue Wed Thu Fri", "Mon Tue Wed Thu Fri Sat Sun"]}
        ).to_csv(tmp / "calendars.csv", index=False)
        pd.DataFrame({"calendar": "5d", "date": HOLIDAYS, "working": "no", "reason": "public holiday"}).to_csv(
            tmp / "calendar_exceptions.csv", index=False
        )
        _write_snapshot(tmp / "snapshots" / "baseline", "Baseline", START, "baseline", acts, links)
        data_dates = []
        month = START.replace(day=1)
        for _ in range(updates):
            month = (month + dt.timedelta(days=32)).replace(day=1)
            data_dates.append(month)
        dd_days = [int(np.datetime64(d, "D").astype(np.int64)) for d in data_dates]
        cal_number = acts["calendar"].map(calendars.number).to_numpy(dtype=np.int64)
        revised_remaining = pd.Series(np.nan, index=acts.index)
        current_links = links.copy()
        deleted = np.zeros(len(acts), dtype=bool)
        for k, (data_date, day) in enumerate(zip(data_dates, dd_days), start=1):
            table = acts.copy()
            done = finish_day < day
            started = (start_day < day) & ~done
            milestone = acts["duration"].to_numpy() == 0
            started &= ~milestone
            done_ms = milestone & (start_day < day)
            done |= done_ms
            table["actual_start"] = np.where(done | started, iso_dates(start_day), "")
            table.loc[done_ms, "actual_start"] = ""
            table["actual_finish"] = np.where(done, iso_dates(finish_day), "")
            # remaining: work days from the data date to the simulated finish (inclusive)
            remaining = np.zeros(len(acts), dtype=np.int64)
            if started.any():
                rows = np.flatnonzero(started)
                first = calendars.start_index_days(cal_number[rows], np.full(rows.size, day))
                last = calendars.finish_index_days(cal_number[rows], finish_day[rows])
                remaining[rows] = np.maximum(1, last - first + 1)
            if k > 1:
                # re-planning in this update: re-estimates, lag changes and a deletion, all
                # among work not yet started (later updates keep them)
                waiting = np.flatnonzero(~(done | started) & ~milestone & ~deleted)
                if waiting.size:
                    picks = rng.choice(waiting, size=max(1, waiting.size // 200), replace=False)
                    durations = acts["duration"].to_numpy()[picks]
                    revised_remaining.iloc[picks] = np.maximum(1, durations + rng.integers(-3, 6, picks.size))
                    gone = int(rng.choice(waiting))
                    deleted[gone] = True
                waiting_ids = set(acts["id"].to_numpy()[~(done | started)])
                movable = np.flatnonzero(
                    current_links["succ"].isin(waiting_ids).to_numpy() & (current_links["type"] != "SF").to_numpy()
                )
                if movable.size:
                    change = rng.choice(movable, size=max(1, movable.size // 500), replace=False)
                    current_links.loc[current_links.index[change], "lag"] += 1
            waiting_now = ~(done | started)
            table["remaining"] = np.where(started, remaining.astype(str), np.where(done, "0", "")).astype(object)
            revised = waiting_now & revised_remaining.notna().to_numpy()
            table.loc[revised, "remaining"] = revised_remaining[revised].astype(int).astype(str).to_numpy()
            kept_ids = set(acts["id"].to_numpy()[~deleted])
            kept_links = current_links[current_links["pred"].isin(kept_ids) & current_links["succ"].isin(kept_ids)]
            _write_snapshot(
                tmp / "snapshots" / f"u{k:02d}", f"Update {k:02d}", data_date, "update", table[~deleted], kept_links
            )
        if updates:
            kept = ~deleted
            pd.DataFrame(
                {
                    "id": acts["id"][kept],
                    "actual_start": np.where(acts["duration"] > 0, iso_dates(start_day), iso_dates(finish_day))[kept],
                    "actual_finish": iso_dates(finish_day)[kept],
                    "source": "simulated record",
                }
            ).to_csv(tmp / "asbuilt.csv", index=False)
        if elements:
            _write_elements(tmp / "elements.csv", acts, elements, rng)
    return out


def _write_snapshot(
    folder: Path, label: str, data_date: dt.date, kind: str, activities: pd.DataFrame, links: pd.DataFrame
) -> None:
    folder.mkdir(parents=True, exist_ok=True)
    (folder / "snapshot.toml").write_text(
        f'label = "{label}"\ndata_date = {data_date.isoformat()}\nkind = "{kind}"\n', encoding="utf-8"
    )
    activities.to_csv(folder / "activities.csv", index=False)
    links.to_csv(folder / "links.csv", index=False)


def _write_elements(path: Path, activities: pd.DataFrame, count: int, rng) -> None:
    codes = activities["wbs"].unique()
    wbs = codes[np.arange(count) % codes.size]
    side = int(np.ceil(np.sqrt(count / 10)))
    k = np.arange(count)
    pd.DataFrame(
        {
            "id": [f"E{i:06d}" for i in k],
            "name": [f"Element {i}" for i in k],
            "wbs": wbs,
            "classification": np.where(k % 3 == 0, "column", np.where(k % 3 == 1, "slab", "wall")),
            "x": (k % side) * 6.0,
            "y": ((k // side) % side) * 6.0,
            "z": (k // (side * side)) * 3.5,
            "dx": 5.0,
            "dy": 5.0,
            "dz": 3.0,
            "level": [f"L{int(z)}" for z in k // (side * side)],
            "zone": [f"Z{int(x) // 4}" for x in k % side],
        }
    ).to_csv(path, index=False)
