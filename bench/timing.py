"""What every benchmark here shares: the median of repeated wall-clock timings."""

from __future__ import annotations

import statistics
import time


def median_time(function, repeat: int) -> float:
    """Median seconds of ``repeat`` calls of ``function``."""
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        function()
        times.append(time.perf_counter() - start)
    return statistics.median(times)
