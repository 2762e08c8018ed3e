"""Split a long vectorised computation into chunks run on a few threads.

numpy's and scipy's ufuncs release the GIL, so threads share the cores without copying
data. Chunks also keep the temporary arrays of a computation small enough for the caches.
"""

from __future__ import annotations

import functools
import os
from collections.abc import Callable
from concurrent.futures import ThreadPoolExecutor

import numpy as np


@functools.cache
def pool(workers: int) -> ThreadPoolExecutor:
    """A shared pool of ``workers`` threads."""
    return ThreadPoolExecutor(max_workers=workers, thread_name_prefix="tinfer")


def workers() -> int:
    """Threads used: the cores available, at most four."""
    return min(os.cpu_count() or 1, 4)


def chunked(
    func: Callable[[slice], np.ndarray], size: int, chunk: int, threaded: int
) -> np.ndarray:
    """``concatenate([func(s) for s in slices])`` over ``range(size)`` in slices of ``chunk``.

    ``func`` maps a slice of the inputs to a 1-d float array of that length. From
    ``threaded`` values on, the slices run on :func:`workers` threads.

    Examples
    --------
    >>> x = np.arange(10.0)
    >>> chunked(lambda s: x[s] * 2, 10, 3, 4).tolist()
    [0.0, 2.0, 4.0, 6.0, 8.0, 10.0, 12.0, 14.0, 16.0, 18.0]
    """
    out = np.empty(size)
    n = workers()
    if size >= threaded and n >= 2:
        chunk = min(chunk, -(-size // n))
    slices = [slice(i, min(i + chunk, size)) for i in range(0, size, chunk)]

    def run(s: slice) -> None:
        out[s] = func(s)

    if size >= threaded and n >= 2 and len(slices) > 1:
        list(pool(n).map(run, slices))
    else:
        for s in slices:
            run(s)
    return out
