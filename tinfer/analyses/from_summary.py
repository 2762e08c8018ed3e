"""Tests from published summary statistics: ``tinfer.from_summary``.

The same procedures as on a DataFrame, from counts, means and SDs (no values: no trimming,
no checks of the data).
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from ..checks import SUMMARY_RULES, fail, is_real, summary_problem
from ..core.summary import Summary
from ..docstrings import fill_params
from ..errors import ParameterError
from ..results.ttest import TResult
from .ttest import build


def _is_seq(x) -> bool:
    return isinstance(x, Sequence | np.ndarray) and not isinstance(x, str)


@fill_params(
    sd="the SD given, the SD of the differences, or the pooled SD of two samples",
    relative_what="(the first mean over the second; one sample: the mean over ``null``)",
)
def from_summary(
    n,
    mean,
    sd,
    *,
    null: float = 0.0,
    side: str = "two-sided",
    level: float = 0.95,
    pooled: bool = False,
    paired: bool = False,
    labels: Sequence[str] | None = None,
    variable: str = "value",
    units: str | None = None,
    margin: float | tuple[float, float] | None = None,
    margin_units: str = "raw",
    worse: str | None = None,
    superior: bool = False,
    relative: bool | str = False,
) -> TResult:
    """Run a t procedure from published counts, means and standard deviations.

    Scalars give a one-sample test; pairs ``(first, second)`` give a two-sample test of
    first minus second (Welch unless ``pooled``). For a paired design pass the summary of
    the differences with ``paired=True`` (a paired test is a one-sample test on them).
    Standard deviations use the n - 1 denominator.

    A mean passed here is one double: on data near 1e9 it carries an error of up to 6e-8
    (half the spacing of doubles there), which the raw-data path avoids by keeping the
    mean's rounding remainder. A difference of 0.2 from a null of 1e9 then agrees with the
    raw path to about 3e-7 relative, not 1e-13. Centre such data before summarising
    (subtract a round number from every value and from ``null``) to keep every digit.

    Parameters
    ----------
    n, mean, sd : float or pair of floats
        Sample size, mean and standard deviation (per group for two samples).
    null : float, default 0
        The hypothesised mean, mean difference (first minus second) or mean of the paired
        differences.
    {side}
    {level}
    {pooled}
    paired : bool, default False
        The scalars describe within-unit differences.
    labels : sequence of str, optional
        Names of the groups (or of the two conditions, for paired differences).
    variable : str, default "value"
        What was measured.
    {units}
    {margin_options}
    {relative}

    Returns
    -------
    TResult

    Examples
    --------
    >>> import tinfer
    >>> r = tinfer.from_summary(n=(12, 15), mean=(5.1, 4.3), sd=(1.2, 1.5))
    >>> round(r.t, 4), round(r.df, 3), round(r.p, 4)
    (1.5396, 24.998, 0.1362)
    """
    func = "from_summary"
    shapes = [_is_seq(v) for v in (n, mean, sd)]
    if any(shapes) and not all(shapes):
        raise ParameterError(
            "The 'n', 'mean' and 'sd' parameters of from_summary must all be numbers (one "
            f"sample) or all be pairs (two samples). Got n={n!r}, mean={mean!r}, sd={sd!r} instead."
        )
    opts = dict(func=func, null=null, side=side, level=level, units=units, variable=variable)
    opts |= dict(margin=margin, margin_units=margin_units, worse=worse, superior=superior)
    opts["relative"] = relative
    if not any(shapes):
        _check_numbers(n, mean, sd, func)
        s = Summary.from_moments(float(n), float(mean), float(sd))
        if paired:
            labs = _two_labels(labels, func)
            return build("paired", (s,), labels=labs, **opts)
        return build("one-sample", (s,), labels=tuple(labels or (variable,)), **opts)
    for name, v in (("n", n), ("mean", mean), ("sd", sd)):
        if len(v) != 2:
            raise ParameterError(
                f"The {name!r} parameter of from_summary must be a number or a pair. "
                f"Got {v!r} instead."
            )
    for k in range(2):
        _check_numbers(n[k], mean[k], sd[k], func)
    if paired:
        raise ParameterError(
            "The 'paired' parameter of from_summary needs the summary of the differences "
            "(scalars), not two groups. Got pairs instead."
        )
    s1 = Summary.from_moments(float(n[0]), float(mean[0]), float(sd[0]))
    s2 = Summary.from_moments(float(n[1]), float(mean[1]), float(sd[1]))
    labs = _two_labels(labels, func)
    return build("two-sample", (s1, s2), labels=labs, pooled=pooled, **opts)


def _two_labels(labels, func) -> tuple[str, ...]:
    """Two names (first, second), or a ParameterError."""
    if labels is None:
        return ("first", "second")
    if isinstance(labels, str) or not _is_seq(labels) or len(labels) != 2:
        raise ParameterError(
            f"The 'labels' parameter of {func} must be two names (first, second). "
            f"Got {labels!r} instead."
        )
    return tuple(labels)


def _check_numbers(n, mean, sd, func) -> None:
    """One group's n, mean and SD: numbers that pass the one validation of summaries."""
    for name, v in (("n", n), ("mean", mean), ("sd", sd)):
        if not is_real(v):
            raise fail(name, func, SUMMARY_RULES[name].format(min_n=1), v)
    problem = summary_problem(n, mean, sd, min_n=1)
    if problem is not None:
        name, _, _, rule = problem
        raise fail(name, func, rule, {"n": n, "mean": mean, "sd": sd}[name])
