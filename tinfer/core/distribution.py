"""Student's t distribution: density, tail areas, percentiles, all vectorised.

Tail areas come from survival functions (never ``1 - cdf``). Where a tail is smaller than
double precision can hold, :func:`log_sf` still returns its exact logarithm through the
incomplete-beta series.
"""

from __future__ import annotations

import numpy as np
from scipy import special

_LOG_TINY = -650.0  # below exp(-650) a float64 tail area has underflowed or lost digits


# log Gamma(m + 1/2) - log Gamma(m) - log(m) / 2 for large m: the asymptotic series with
# coefficients (B_{k+1}(1/2) - B_{k+1}) / (k (k + 1)), k odd (Abramowitz and Stegun 6.1.47).
_HALF_RATIO = (-1 / 8, 1 / 192, -1 / 640, 17 / 14336, -31 / 18432)


def log_gamma_half_ratio(m) -> np.ndarray:
    """log(Gamma(m + 1/2) / Gamma(m)) for m > 0, accurate to rounding for every m.

    A difference of ``gammaln`` loses digits as m grows (4e-10 relative at m = 5e5); the
    series keeps them.

    Examples
    --------
    >>> round(float(np.exp(log_gamma_half_ratio(1.0))), 12)  # Gamma(1.5) = sqrt(pi) / 2
    0.886226925453
    """
    m = np.asarray(m, float)
    small = m < 30.0
    with np.errstate(all="ignore"):
        ms = np.where(small, m, 1.0)
        near = 0.5 * np.log(np.pi) - special.betaln(ms, 0.5)
        z = 1.0 / np.where(small, 30.0, m)
        z2 = z * z
        c = _HALF_RATIO
        far = 0.5 * np.log(m) + z * (c[0] + z2 * (c[1] + z2 * (c[2] + z2 * (c[3] + z2 * c[4]))))
    return np.where(small, near, far)


def _is_normal(df) -> np.ndarray:
    return np.isinf(np.asarray(df, dtype=np.float64))


def cdf(t, df) -> np.ndarray:
    """P(T <= t) for T with ``df`` degrees of freedom (``inf`` gives the standard normal)."""
    t, df = np.broadcast_arrays(np.asarray(t, float), np.asarray(df, float))
    with np.errstate(invalid="ignore"):
        return np.where(
            _is_normal(df), special.ndtr(t), special.stdtr(np.where(_is_normal(df), 1.0, df), t)
        )


def sf(t, df) -> np.ndarray:
    """P(T > t), computed as the lower tail at -t so that small upper tails keep their digits.

    Where that underflows although the area is representable (t near 1e200 at small df),
    the area comes from :func:`log_sf`.
    """
    t = np.asarray(t, float)
    out = cdf(-t, df)
    lost = (out == 0.0) & np.isfinite(t)
    if lost.any():
        with np.errstate(under="ignore"):
            out = np.where(lost, np.exp(log_sf(np.where(lost, t, 0.0), df)), out)
    return out


def log_sf(t, df) -> np.ndarray:
    """Natural log of P(T > t), exact even where P(T > t) underflows to zero.

    For large positive t the tail is ``I_x(df/2, 1/2) / 2`` with ``x = df / (df + t^2)``;
    its log comes from the hypergeometric series of the incomplete beta function
    (Abramowitz and Stegun 26.5.23, 26.7.1). For df of 1000 and more (t below 1e100) the
    series loses digits, and the log comes from the density times a Gauss-Laguerre
    integral of the tail instead.

    Examples
    --------
    >>> float(log_sf(0.0, 5.0)) == float(np.log(0.5))
    True
    >>> round(float(log_sf(1e5, 3.0)), 6)   # P(T > 1e5) at df=3, about 1.1e-15
    -34.441053
    """
    t, df = np.broadcast_arrays(np.asarray(t, float), np.asarray(df, float))
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        direct = np.log(cdf(-t, df))
        normal = special.log_ndtr(-t)
    deep = (t > 1.0) & ~(direct > _LOG_TINY) & ~_is_normal(df)
    use_laguerre = deep & (df >= _SERIES_MAX_DF) & (t < 1e100)  # t * t stays finite
    use_series = deep & ~use_laguerre
    out = np.where(_is_normal(df), normal, direct)
    if use_laguerre.any():
        out[use_laguerre] = _log_sf_laguerre(t[use_laguerre], df[use_laguerre])
    if use_series.any():  # the series (hyp2f1) is slow: evaluate it only where it is used
        ts, dfs = t[use_series], df[use_series]
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            a = dfs / 2.0
            tt = np.abs(ts)
            log_x = np.log(2.0 * a) - 2.0 * np.log(tt) - np.log1p(2.0 * a / (tt * tt))
            log_1mx = -np.log1p(2.0 * a / (tt * tt))
            series = (
                a * log_x
                + 0.5 * log_1mx
                - np.log(a)
                - special.betaln(a, 0.5)
                + np.log(special.hyp2f1(a + 0.5, 1.0, a + 1.0, np.exp(log_x)))
                + np.log(0.5)
            )
        out[use_series] = series
    return out


# Above this df scipy's hyp2f1 loses digits (1e-13 at df = 1e5) and then returns nan (df of
# 1e6 and more with t near 40); the Gauss-Laguerre integral below is exact to rounding there.
_SERIES_MAX_DF = 1000.0
_LAG_X, _LAG_W = np.polynomial.laguerre.laggauss(64)


def _log_sf_laguerre(t: np.ndarray, df: np.ndarray) -> np.ndarray:
    """log P(T > t) for t > 1 and large df: log f(t) plus the log of the integral of
    f(t + s) / f(t) over s > 0, by 64-point Gauss-Laguerre after scaling s by the slope
    -d log f / dt at t (the integrand is then close to exp(-v))."""
    q = df + t * t
    k = (df + 1.0) * t / q
    s = _LAG_X[:, None] / k
    expo = _LAG_X[:, None] - (df + 1.0) / 2.0 * np.log1p((2.0 * t * s + s * s) / q)
    top = expo.max(axis=0)
    log_int = top + np.log((_LAG_W[:, None] * np.exp(expo - top)).sum(axis=0)) - np.log(k)
    log_f = log_gamma_half_ratio(df / 2) - 0.5 * np.log(df * np.pi)
    return log_f - (df + 1.0) / 2.0 * np.log1p(t * t / df) + log_int


def pdf(t, df) -> np.ndarray:
    """Density of Student's t at ``t``."""
    t, df = np.broadcast_arrays(np.asarray(t, float), np.asarray(df, float))
    normal = _is_normal(df)
    d = np.where(normal, 1.0, df)
    with np.errstate(over="ignore", invalid="ignore"):
        log_c = log_gamma_half_ratio(d / 2) - 0.5 * np.log(d * np.pi)
        big = np.abs(t) > 1e100  # t * t would overflow
        tb = np.where(big, np.abs(t), 1.0)
        log_kernel = np.where(
            big, 2 * np.log(tb) - np.log(d) + np.log1p(d / (tb * tb)), np.log1p(t * t / d)
        )
        dens = np.exp(log_c - (d + 1) / 2 * log_kernel)
    return np.where(normal, np.exp(-0.5 * t * t) / np.sqrt(2 * np.pi), dens)


def ppf(q, df) -> np.ndarray:
    """The t value with lower-tail area ``q`` (percentile, quantile)."""
    q, df = np.broadcast_arrays(np.asarray(q, float), np.asarray(df, float))
    normal = _is_normal(df)
    return np.where(normal, special.ndtri(q), special.stdtrit(np.where(normal, 1.0, df), q))


def isf(q, df) -> np.ndarray:
    """The t value with upper-tail area ``q``, as the negated lower percentile (keeps digits)."""
    return -ppf(q, df)


def p_value(t, df, side: str) -> tuple[np.ndarray, np.ndarray]:
    """p-value and its natural log for observed ``t`` under the alternative ``side``.

    ``side`` is ``"two-sided"``, ``"upper"`` (true value above the null) or ``"lower"``.
    """
    t = np.asarray(t, float)
    if side == "upper":
        log_p = log_sf(t, df)
    elif side == "lower":
        log_p = log_sf(-t, df)
    else:
        log_p = np.minimum(np.log(2.0) + log_sf(np.abs(t), df), 0.0)
    with np.errstate(under="ignore"):
        p = np.exp(log_p)
    if side == "upper":
        p = np.where(log_p > _LOG_TINY, sf(t, df), p)
    elif side == "lower":
        p = np.where(log_p > _LOG_TINY, cdf(t, df), p)
    else:
        p = np.where(log_p > _LOG_TINY, np.minimum(2.0 * sf(np.abs(t), df), 1.0), p)
    return p, log_p


def critical(df, level, side: str) -> np.ndarray:
    """Critical value for a test at significance ``1 - level``.

    Two-sided: the positive value c with P(abs(T) > c) = 1 - level. Upper: c with
    P(T > c) = 1 - level. Lower: the negative value c with P(T < c) = 1 - level.
    """
    alpha = 1.0 - np.asarray(level, float)
    if side == "two-sided":
        return isf(alpha / 2.0, df)
    if side == "upper":
        return isf(alpha, df)
    return ppf(alpha, df)
