"""The t procedures as pure functions of summaries, vectorised over many tests at once.

Every function takes :class:`~tinfer.core.summary.Summary` objects (arrays of any shape
that broadcast) and returns a :class:`Computed` holding arrays of the same shape.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from . import distribution as dist
from .effects import hedges_j, ncp_interval
from .summary import Summary


@dataclass(frozen=True, eq=False)
class Computed:
    """Arrays of results for one or many tests of the same kind."""

    estimate: np.ndarray
    se: np.ndarray
    t: np.ndarray
    df: np.ndarray
    p: np.ndarray
    log_p: np.ndarray
    ci_low: np.ndarray
    ci_high: np.ndarray
    effect: np.ndarray
    effect_low: np.ndarray
    effect_high: np.ndarray
    effect_df: np.ndarray
    #: rounding remainder of ``estimate`` (one-sample means near 1e9 keep it separately)
    estimate_lo: np.ndarray | float = 0.0


def t_interval(estimate, se, df, level, side: str) -> tuple[np.ndarray, np.ndarray]:
    """Confidence limits ``estimate -+ c * se``; one-sided sides give a single bound."""
    estimate = np.asarray(estimate, float)
    c = dist.critical(df, level, "upper" if side != "two-sided" else "two-sided")
    half = c * se
    inf = np.full(np.shape(half), np.inf)
    if side == "upper":
        return estimate - half, inf + 0 * estimate
    if side == "lower":
        return -inf + 0 * estimate, estimate + half
    return estimate - half, estimate + half


def finish(
    estimate, se, df, null, level, side, t_eff, df_eff, scale, correction=1.0, effect_ci=True
):
    with np.errstate(divide="ignore", invalid="ignore"):
        t = (estimate - null) / se
    p, log_p = dist.p_value(t, df, side)
    lo, hi = t_interval(estimate, se, df, level, side)
    if effect_ci:
        n_lo, n_hi = ncp_interval(t_eff, df_eff, level, side)
    else:  # the noncentral-t inversion is the slow part; batch callers defer it
        n_lo = n_hi = np.full(np.shape(t_eff), np.nan)
    return Computed(
        estimate=np.asarray(estimate, float),
        se=np.asarray(se, float),
        t=t,
        df=np.asarray(df, float),
        p=p,
        log_p=log_p,
        ci_low=lo,
        ci_high=hi,
        effect=correction * t_eff * scale,
        effect_low=correction * n_lo * scale,
        effect_high=correction * n_hi * scale,
        effect_df=np.asarray(df_eff, float),
    )


def one_sample(
    s: Summary, null=0.0, level=0.95, side: str = "two-sided", effect_ci: bool = True
) -> Computed:
    """One-sample t for the mean against ``null``; effect size Cohen's d = (mean - null) / sd.

    Used for paired designs with ``s`` the summary of the differences (d is then d_z).

    Examples
    --------
    >>> r = one_sample(Summary.of([5.1, 4.9, 5.6, 5.8, 6.0]), null=5.0)
    >>> round(float(r.t), 4), round(float(r.df), 1), round(float(r.p), 4)
    (2.3041, 4.0, 0.0826)
    """
    df = s.n - 1.0
    se = s.se
    # mean - null with the mean's low part, so that means near 1e9 keep their digits in t;
    # the interval is built around the mean itself, so that a null far from the data (1e12
    # against values near 10) cannot cost the interval its digits
    shifted = (s.mean - null) + _lo(s)
    with np.errstate(divide="ignore", invalid="ignore"):
        t_eff = shifted / se
    c = finish(
        shifted, se, df, 0.0, level, side, t_eff, df, 1.0 / np.sqrt(s.n), effect_ci=effect_ci
    )
    estimate = np.asarray(s.mean, float)
    lo, hi = t_interval(estimate + _lo(s), se, df, level, side)
    return replace(c, estimate=estimate, ci_low=lo, ci_high=hi, estimate_lo=_lo(s))


def _lo(s: Summary):
    return 0.0 if s.mean_lo is None else s.mean_lo


def two_sample(
    a: Summary,
    b: Summary,
    null=0.0,
    level=0.95,
    side: str = "two-sided",
    pooled: bool = False,
    effect_ci: bool = True,
) -> Computed:
    """Two independent samples, mean of ``a`` minus mean of ``b``.

    Welch's test (Welch 1947) with Satterthwaite's df (Satterthwaite 1946) unless
    ``pooled``, which gives Student's equal-variance test. The effect size is Hedges' g:
    the difference over the pooled SD, times the exact correction J(n_a + n_b - 2), with
    the interval from the noncentral t at n_a + n_b - 2 df, scaled by J (Hedges 1981).
    """
    estimate = (a.mean - b.mean) + (_lo(a) - _lo(b))
    df_pool = a.n + b.n - 2.0
    sp2 = (a.ssd + b.ssd) / df_pool
    scale = np.sqrt(1.0 / a.n + 1.0 / b.n)
    if pooled:
        se = np.sqrt(sp2) * scale
        df = df_pool
    else:
        va, vb = a.var / a.n, b.var / b.n
        se = np.sqrt(va + vb)
        with np.errstate(divide="ignore", invalid="ignore"):
            # (va + vb)^2 / (va^2 / (n_a - 1) + vb^2 / (n_b - 1)) in shares of va + vb, so
            # that squares of tiny or huge variances cannot underflow or overflow
            w = va / (va + vb)
            df = 1.0 / (w * w / (a.n - 1.0) + (1.0 - w) * (1.0 - w) / (b.n - 1.0))
    t_eff = (estimate - null) / (np.sqrt(sp2) * scale)
    return finish(
        estimate,
        se,
        df,
        null,
        level,
        side,
        t_eff,
        df_pool,
        scale,
        hedges_j(df_pool),
        effect_ci=effect_ci,
    )


def rows(design: str, a, b, null, level, side: str, pooled: bool, effect_ci: bool) -> Computed:
    """Run the procedure for ``design`` on many rows of double-double summaries.

    ``a`` and ``b`` are ``(n, mean, mean_lo, ssd)`` tuples of arrays (``b`` is None for
    one-sample and paired designs). The low parts of the means enter the differences of
    means that the procedures take (``mean - null``, ``mean_a - mean_b``), so differences of
    means near 1e9 keep their digits.

    Examples
    --------
    >>> one = (np.array([3.0]), np.array([1e9 + 2]), np.array([0.0]), np.array([2.0]))
    >>> c = rows("one-sample", one, None, 1e9, 0.95, "two-sided", False, False)
    >>> float(c.estimate[0]) - 1e9, round(float(c.t[0]), 12)
    (2.0, 3.464101615138)
    """
    n_a, hi_a, lo_a, ssd_a = a
    opts = dict(null=null, level=level, side=side, effect_ci=effect_ci)
    sa = Summary(n_a, hi_a, ssd_a, lo_a)
    if design == "two-sample":
        n_b, hi_b, lo_b, ssd_b = b
        return two_sample(sa, Summary(n_b, hi_b, ssd_b, lo_b), pooled=pooled, **opts)
    return one_sample(sa, **opts)


def effect_interval_rows(design: str, a, b, null, level, side: str):
    """Only the effect-size limits of :func:`rows` (the deferred part of a batch table).

    Same arguments; returns the lower and upper limits of Cohen's d, d_z or Hedges' g from
    the noncentral t, without recomputing p-values and mean intervals.
    """
    n_a, hi_a, lo_a, ssd_a = (np.asarray(v, float) for v in a)
    with np.errstate(divide="ignore", invalid="ignore"):
        if design == "two-sample":
            n_b, hi_b, lo_b, ssd_b = (np.asarray(v, float) for v in b)
            df = n_a + n_b - 2.0
            scale = np.sqrt(1.0 / n_a + 1.0 / n_b)
            t_eff = ((hi_a - hi_b) + (lo_a - lo_b) - null) / (np.sqrt((ssd_a + ssd_b) / df) * scale)
            correction = hedges_j(df)
        else:
            df = n_a - 1.0
            scale = 1.0 / np.sqrt(n_a)
            t_eff = ((hi_a - null) + lo_a) / np.sqrt(ssd_a / df / n_a)
            correction = 1.0
    low, high = ncp_interval(t_eff, df, level, side)
    return correction * low * scale, correction * high * scale
