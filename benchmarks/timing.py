"""The one timing rule of the benchmark scripts: the best of a few runs, in seconds.

The scripts run as ``python benchmarks/bench_*.py``, so they import this module by name.
"""

from __future__ import annotations

import time
from collections.abc import Callable


def best(fn: Callable[[], object], repeat: int = 3) -> float:
    """The shortest wall time of ``repeat`` calls of ``fn`` (the least disturbed run)."""
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return min(times)
