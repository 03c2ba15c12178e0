"""Names the docstring Examples can use when run as doctests.

``pytest --doctest-modules delay reports`` runs the Examples of the toolkit's docstrings.
Every doctest gets ``np`` (numpy), ``pd`` (pandas) and ``dt`` (the standard ``datetime``
module), and a doctest whose text names ``demo`` also gets ``demo``: the invented demo
project of ``case_demo/`` loaded by :func:`delay.case.load_case`. The case is loaded once per
test session, at the first doctest that uses it, so that a run of doctests that never names
it (and every ordinary test) does not pay for loading it. Tables a ``Case`` hands out are
copy-on-write copies, so one doctest cannot change what the next one sees.
"""

from __future__ import annotations

import datetime as dt
import functools
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from _pytest.doctest import DoctestItem

DEMO_CASE = Path(__file__).resolve().parent / "case_demo"


@functools.cache
def _demo_case():
    from delay.case import load_case

    return load_case(DEMO_CASE)


def _uses_demo(item: DoctestItem) -> bool:
    """Whether any example of the doctest names ``demo`` in its source."""
    return any("demo" in example.source for example in item.dtest.examples)


@pytest.fixture(autouse=True)
def _doctest_names(request, doctest_namespace):
    """Fill ``doctest_namespace`` before a doctest copies it into its globals."""
    if isinstance(request.node, DoctestItem):
        doctest_namespace.update(np=np, pd=pd, dt=dt)
        if _uses_demo(request.node):
            doctest_namespace["demo"] = _demo_case()
    yield
