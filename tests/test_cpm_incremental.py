"""A what-if's forward dates, brought up to date from its parent's, equal a whole forward pass.

:meth:`delay.cpm.ScheduleModel.what_if` keeps the model it was made from, and the forward
dates of the variant are computed by visiting only the activities it changes and what lies
downstream of a date that moves (:func:`delay._kernels.forward_pass` given the changed
positions). The check here
is an invariance, not a reference value: on synthetic cases with progress, two calendars,
constraints and all four link types, every array of the updated forward state (status,
boundaries, early dates, finish and start days) must equal that of a whole forward pass of
the same variant, in both kernel modes, through chains of what-ifs (each made from the one
before) as the cumulative runs make them. The whole pass itself is checked against
networkx's longest path and numpy's business-day offsets in test_kernels.py and
test_cpm_reference.py.
"""

from __future__ import annotations

import dataclasses
import datetime as dt

import numpy as np
import pandas as pd
import pytest

from delay._jit import kernel_mode
from delay.case import load_case
from delay.cpm import calendars_of, prepare
from delay.errors import CaseError
from delay.synth import synthesise


@pytest.fixture(scope="module")
def synthetic(tmp_path_factory):
    return load_case(synthesise(tmp_path_factory.mktemp("incremental") / "case", 160, updates=2, seed=5))


def _whole(model):
    """The same variant with no parent: its forward dates by a whole pass."""
    return dataclasses.replace(model).work_dates()


def _day(model, offset: int) -> dt.date:
    return dt.date(1970, 1, 1) + dt.timedelta(days=int(model.data_day) + offset)


def _variant(model, rng, step: int):
    """One random what-if of ``model``: extend, hold, start bound, or a fragnet tied in."""
    ids = [str(i) for i in model.network.ids]
    pick = [ids[i] for i in rng.choice(len(ids), size=3, replace=False)]
    kind = step % 4
    if kind == 0:
        return model.what_if(extend={a: int(rng.integers(1, 15)) for a in pick})
    if kind == 1:
        first = _day(model, int(rng.integers(-30, 150)))
        return model.what_if(hold={a: [(first, first + dt.timedelta(days=int(rng.integers(0, 25))))] for a in pick})
    if kind == 2:
        return model.what_if(start_no_earlier={a: _day(model, int(rng.integers(0, 200))) for a in pick})
    new = [f"FR{step}-{k}" for k in range(3)]
    activities = pd.DataFrame(
        {"id": new, "duration": rng.integers(0, 8, 3), "start_no_earlier": [_day(model, 10), None, None]}
    )
    links = pd.DataFrame(
        [(new[0], new[1], "FS", 0), (new[1], new[2], "SS", 1), (new[2], pick[0], "FF", 0), (pick[1], new[0], "SF", 2)],
        columns=["pred", "succ", "type", "lag"],
    )
    try:
        return model.what_if(add_activities=activities, add_links=links)
    except CaseError:  # the two programme activities drawn close a loop through the fragnet
        return model.what_if(add_activities=activities, add_links=links.iloc[:3])


@pytest.mark.parametrize("mode", ["python", "compiled"])
def test_updated_forward_dates_equal_a_whole_pass(synthetic, mode):
    rng = np.random.default_rng(7)
    compared = 0
    with kernel_mode(mode):
        for snapshot in synthetic.snapshots:
            model = prepare(synthetic, snapshot, calendars=calendars_of(synthetic))
            chain = model
            for step in range(24):
                parent = chain if step % 2 else model  # alone from the programme, or the next in a chain
                variant = _variant(parent, rng, step)
                status, start, finish = variant.work_dates()
                whole_status, whole_start, whole_finish = _whole(variant)
                assert np.array_equal(status, whole_status)
                assert np.array_equal(start, whole_start), (snapshot.folder, step)
                assert np.array_equal(finish, whole_finish), (snapshot.folder, step)
                assert np.array_equal(variant.finish_days(), variant.run().finish_day)
                compared += 1
                if step % 2:
                    chain = variant
    assert compared == 24 * len(synthetic.snapshots)


def test_a_chain_computed_at_its_end_lets_go_of_its_parents(synthetic):
    model = prepare(synthetic, calendars=calendars_of(synthetic))
    rng = np.random.default_rng(3)
    chain = [model]
    for step in range(6):
        chain.append(_variant(chain[-1], rng, step))
    finish = chain[-1].finish_days()  # no state in between: the chain is brought up to date in one go
    assert np.array_equal(finish, _whole(chain[-1])[2])
    assert all("_parent" not in m.__dict__ for m in chain)


def test_a_variant_with_other_settings_is_scheduled_whole(synthetic):
    model = prepare(synthetic, calendars=calendars_of(synthetic))
    model.finish_days()
    other = dataclasses.replace(model.settings, progress="progress_override")
    variant = model.what_if(extend={str(model.network.ids[5]): 4}, settings=other)
    assert "_parent" not in variant.__dict__
    assert np.array_equal(variant.finish_days(), variant.run().finish_day)
