"""A notebook progress bar for long computations (the bootstrap), shown only in a kernel."""

from __future__ import annotations

import sys
from collections.abc import Callable

from ..optional import require

#: Work (values resampled) above which a progress bar is shown inside a notebook kernel.
PROGRESS_WORK = 20_000_000


def in_kernel() -> bool:
    """True when running inside a Jupyter (IPython) kernel."""
    if "IPython" not in sys.modules:
        return False
    try:
        from IPython import get_ipython
    except ImportError:  # pragma: no cover
        return False
    shell = get_ipython()
    return shell is not None and hasattr(shell, "kernel")


def progress_bar(
    total: int, work: int
) -> tuple[Callable[[int], None] | None, Callable[[], None] | None]:
    """A per-chunk callback updating an ipywidgets bar and a closer, for long runs only.

    Returns ``(None, None)`` outside a kernel, for short runs or without ipywidgets.

    >>> progress_bar(9999, 100)
    (None, None)
    """
    if work < PROGRESS_WORK or not in_kernel():
        return None, None
    try:
        ipywidgets = require("ipywidgets", "a progress bar")
        from IPython.display import display
    except ImportError:  # no bar without ipywidgets: the run goes on silently
        return None, None
    bar = ipywidgets.IntProgress(value=0, min=0, max=total, description="resampling")
    display(bar)

    def update(done: int) -> None:
        bar.value = done

    return update, bar.close
