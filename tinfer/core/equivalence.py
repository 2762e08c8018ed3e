"""Equivalence, non-inferiority and superiority by a margin: two one-sided t tests (TOST).

Schuirmann (1987) splits the claim "the true value lies inside the band (low, high)" into
two one-sided t tests, each at significance ``alpha = 1 - level``:

- the lower test, null "true value <= low" against "true value > low",
  ``t_lower = (estimate - low) / se`` with p-value ``P(T > t_lower)``;
- the upper test, null "true value >= high" against "true value < high",
  ``t_upper = (estimate - high) / se`` with p-value ``P(T < t_upper)``.

The band is claimed when both reject, so the overall p-value is the larger of the two.
This decision is exactly "the ``1 - 2 alpha`` two-sided confidence interval lies inside
the band" (Schuirmann 1987; Westlake 1981), which is why that interval is returned with
the tests. A one-sided claim (non-inferiority, or superiority by a margin) is the same
computation with one bound infinite: that side's test then always rejects (p = 0) and
the decision rests on the other test alone.

Every function is vectorised: arrays of estimates, standard errors, df and bounds that
broadcast give arrays of answers.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from . import distribution as dist
from .summary import Summary


@dataclass(frozen=True, eq=False)
class Tost:
    """Arrays of TOST results, one entry per test.

    Attributes
    ----------
    t_lower, p_lower, log_p_lower : ndarray
        The lower one-sided test (null: true value at or below ``low``).
    t_upper, p_upper, log_p_upper : ndarray
        The upper one-sided test (null: true value at or above ``high``).
    p, log_p : ndarray
        Overall p-value: the larger of the two one-sided p-values.
    ci_low, ci_high : ndarray
        The two-sided confidence interval at ``1 - 2 alpha`` that matches the decision.
    ci_level : ndarray
        Its confidence level, ``1 - 2 alpha = 2 level - 1``.
    inside : ndarray of bool
        The decision: True where both one-sided tests reject at ``alpha``.
    """

    t_lower: np.ndarray
    p_lower: np.ndarray
    log_p_lower: np.ndarray
    t_upper: np.ndarray
    p_upper: np.ndarray
    log_p_upper: np.ndarray
    p: np.ndarray
    log_p: np.ndarray
    ci_low: np.ndarray
    ci_high: np.ndarray
    ci_level: np.ndarray
    inside: np.ndarray


def tost(estimate, se, df, low, high, level=0.95, *, null=0.0, estimate_lo=0.0) -> Tost:
    """Two one-sided t tests of ``low < true value < high`` at significance ``1 - level``.

    Parameters
    ----------
    estimate, se, df : array_like
        Estimate (a mean or a mean difference), its standard error and degrees of freedom
        (Welch or pooled, as the ordinary test uses; ``inf`` for the normal).
    low, high : array_like
        The band in the units of ``estimate``, as offsets from ``null`` (with the default
        ``null=0`` these are the absolute limits). ``-inf`` or ``inf`` gives a one-sided
        claim.
    level : array_like, default 0.95
        ``1 - alpha``; each one-sided test runs at ``alpha``, the matching interval is at
        ``1 - 2 alpha``. Must exceed 0.5.
    null, estimate_lo : array_like, default 0
        The reference value and the rounding remainder of ``estimate``. The statistics use
        ``(estimate - null) + estimate_lo - offset``, so that data near 1e9 and a margin of
        0.2 keep their digits (``null + margin`` alone would round the margin to the
        spacing of doubles near ``null``).

    Returns
    -------
    Tost

    Examples
    --------
    A difference of 0.3 with standard error 0.4 on 20 df, band -1 to 1:

    >>> r = tost(0.3, 0.4, 20.0, -1.0, 1.0)
    >>> round(float(r.t_lower), 3), round(float(r.t_upper), 3)
    (3.25, -1.75)
    >>> round(float(r.p), 4), bool(r.inside)
    (0.0477, True)
    >>> round(float(r.ci_low), 4), round(float(r.ci_high), 4), float(r.ci_level)
    (-0.3899, 0.9899, 0.9)
    """
    estimate, se, df, low, high, level, null, estimate_lo = np.broadcast_arrays(
        *(
            np.asarray(v, dtype=np.float64)
            for v in (estimate, se, df, low, high, level, null, estimate_lo)
        )
    )
    shift = (estimate - null) + estimate_lo
    with np.errstate(divide="ignore", invalid="ignore"):
        t_lower = (shift - low) / se
        t_upper = (shift - high) / se
    p_lower, log_p_lower = dist.p_value(t_lower, df, "upper")
    p_upper, log_p_upper = dist.p_value(t_upper, df, "lower")
    p = np.maximum(p_lower, p_upper)
    log_p = np.maximum(log_p_lower, log_p_upper)
    alpha = 1.0 - level
    ci_level = 1.0 - 2.0 * alpha
    half = dist.isf(alpha, df) * se
    inside = (p_lower < alpha) & (p_upper < alpha)
    return Tost(
        t_lower=t_lower,
        p_lower=p_lower,
        log_p_lower=log_p_lower,
        t_upper=t_upper,
        p_upper=p_upper,
        log_p_upper=log_p_upper,
        p=p,
        log_p=log_p,
        ci_low=(estimate + estimate_lo) - half,
        ci_high=(estimate + estimate_lo) + half,
        ci_level=ci_level,
        inside=inside,
    )


def band(null, margin, worse: str | None = None, superior: bool = False):
    """Absolute band limits ``(low, high)`` from a margin given relative to ``null``.

    Parameters
    ----------
    null : array_like
        The reference value (one sample) or reference difference (usually 0).
    margin : array_like or pair
        Without ``worse``: a positive number ``m`` gives ``(null - m, null + m)``; a pair
        ``(lower_offset, upper_offset)`` with ``lower_offset < 0 < upper_offset`` gives
        ``(null + lower_offset, null + upper_offset)``. With ``worse``: a positive number.
    worse : {None, "lower", "higher"}
        For one-sided claims, the direction that counts as worse.
    superior : bool
        With ``worse``: claim "better than ``null`` by more than the margin" instead of
        "not worse than ``null`` by more than the margin".

    Examples
    --------
    >>> band(500.0, 2.0)
    (498.0, 502.0)
    >>> band(0.0, (-1.5, 2.0))
    (-1.5, 2.0)
    >>> band(0.0, 0.5, worse="lower"), band(0.0, 0.5, worse="higher")
    ((-0.5, inf), (-inf, 0.5))
    >>> band(0.0, 0.5, worse="lower", superior=True)
    (0.5, inf)
    """
    if worse is None:
        if isinstance(margin, tuple | list):
            lo_off, hi_off = margin
            return (null + lo_off, null + hi_off)
        return (null - margin, null + margin)
    sign = 1.0 if superior else -1.0
    if worse == "lower":
        return (null + sign * margin, np.inf)
    return (-np.inf, null - sign * margin)


def standardiser(design: str, summaries: tuple[Summary, ...]) -> np.ndarray:
    """The SD that turns a standardised margin into raw units.

    One sample: the sample SD. Paired: the SD of the differences (the summary passed is
    that of the differences). Two samples: the pooled SD,
    ``sqrt((ssd_a + ssd_b) / (n_a + n_b - 2))``. The raw margin therefore depends on the
    observed SD.

    Examples
    --------
    >>> a, b = Summary.of([1.0, 2.0, 3.0]), Summary.of([2.0, 4.0, 6.0])
    >>> float(standardiser("two-sample", (a, b))) ** 2   # (2 + 8) / 4
    2.5
    """
    if design == "two-sample":
        a, b = summaries
        return np.sqrt((a.ssd + b.ssd) / (a.n + b.n - 2.0))
    (s,) = summaries
    return s.sd
