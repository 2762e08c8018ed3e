"""The bootstrap-t cross-check of a t result: ``result.bootstrap()`` builds a BootstrapCheck.

Resamples the values kept on the result (:func:`tinfer.core.robust.bootstrap_t`); the words
are in :mod:`tinfer.results.bootstrap`, the card and chart in :mod:`tinfer.display.bootstrap`.
A long run can report progress through ``progress`` (the result method passes a notebook
progress bar from :mod:`tinfer.display.progress`).
"""

from __future__ import annotations

from collections.abc import Callable
from typing import TYPE_CHECKING, Any

import numpy as np

from ..checks import check_level
from ..core import distribution as dist
from ..core.procedures import t_interval
from ..core.robust import bootstrap_t, order_quantile
from ..errors import DataError, ParameterError
from ..results.bootstrap import BootstrapCheck
from .diagnostics import values_of

if TYPE_CHECKING:  # pragma: no cover
    from ..results.ttest import TResult

HIST_BINS = 50
#: Progress hook: called with the total number of resamples and the work (values resampled);
#: returns a per-chunk callback (or None) and a closer to call at the end (or None).
Progress = Callable[[int, int], tuple[Callable[[int], None] | None, Callable[[], None] | None]]


def check_resamples(n_resamples: Any) -> int:
    if (
        isinstance(n_resamples, bool)
        or not isinstance(n_resamples, int | np.integer)
        or n_resamples < 99
    ):
        raise ParameterError(
            "The 'n_resamples' parameter of bootstrap must be an int of at least 99. "
            f"Got {n_resamples!r} instead."
        )
    return int(n_resamples)


def check_seed(seed: Any) -> int:
    if seed is None:
        return int(np.random.SeedSequence().generate_state(1, np.uint32)[0])
    if isinstance(seed, bool) or not isinstance(seed, int | np.integer) or seed < 0:
        raise ParameterError(
            "The 'seed' parameter of bootstrap must be a non-negative int or None. "
            f"Got {seed!r} instead."
        )
    return int(seed)


def bootstrap(
    result: TResult,
    n_resamples: int = 9999,
    seed: int | None = None,
    level: float | None = None,
    progress: Progress | None = None,
) -> BootstrapCheck:
    """Bootstrap-t interval for the statistic of ``result`` (see ``TResult.bootstrap``)."""
    n_resamples = check_resamples(n_resamples)
    seed = check_seed(seed)
    level = result.level if level is None else check_level(level, "bootstrap")
    named = values_of(result, "bootstrap")
    trim = float(result.trim or 0.0)
    xs = [x for _, x in named]
    for label, x in named:
        if x.size < 2:
            raise DataError(f"{label} has {x.size} value(s); the bootstrap needs at least 2.")
    work = n_resamples * sum(x.size for x in xs)
    callback, close = progress(n_resamples, work) if progress is not None else (None, None)
    try:
        boot = bootstrap_t(
            xs,
            trim=trim,
            level=level,
            side=result.side,
            n_resamples=n_resamples,
            rng=np.random.default_rng(seed),
            progress=callback,
        )
    finally:
        if close is not None:
            close()
    lo_t, hi_t = t_interval(result.estimate, result.se, result.df, level, result.side)
    alpha = 1.0 - level
    finite = boot.t_star[np.isfinite(boot.t_star)]
    ps = {"two-sided": (alpha / 2, 1 - alpha / 2), "upper": (alpha, 1 - alpha)}
    p_lo, p_hi = ps.get(result.side, (alpha, 1 - alpha))
    usable = np.sort(boot.t_star[~np.isnan(boot.t_star)])
    q_lo, q_hi = (order_quantile(usable, p) for p in (p_lo, p_hi))
    if finite.size:
        lo, hi = np.quantile(finite, [0.001, 0.999])
        crit = float(dist.critical(result.df, 0.999, "two-sided"))
        lo, hi = min(lo, -crit), max(hi, crit)
    else:
        lo, hi = -1.0, 1.0
    counts, edges = np.histogram(finite, bins=HIST_BINS, range=(lo, hi))
    return BootstrapCheck(
        design=result.design,
        comparison=result.comparison,
        variable=result.variable,
        units=result.units,
        method=result.method,
        trim=trim,
        estimate=boot.estimate,
        se=boot.se,
        df=result.df,
        level=level,
        side=result.side,
        interval=(boot.low, boot.high),
        t_interval=(float(lo_t), float(hi_t)),
        t_star_quantiles=(q_lo, q_hi),
        n_resamples=n_resamples,
        seed=seed,
        n_degenerate=boot.n_degenerate,
        hist_edges=edges,
        hist_counts=counts,
        n_outside=int(boot.t_star.size - counts.sum()),
    )
