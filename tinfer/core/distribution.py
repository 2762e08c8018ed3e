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


def _central(s, df) -> np.ndarray:
    """P(0 < T < s) for s >= 0: I_x(1/2, df/2) / 2 with x = s^2 / (df + s^2) (A&S 26.7.1).

    Keeps every digit near zero, where the lower-tail route loses them (3e-9 relative at
    df = 1, t = 1e-8 with scipy's stdtr).
    """
    with np.errstate(over="ignore", under="ignore", invalid="ignore"):
        x = s * s / (df + s * s)
        return 0.5 * special.betainc(0.5, df / 2.0, x)


def _cdf_direct(t, df) -> np.ndarray:
    """P(T <= t) from the lower-tail route, with the central series for |t| < 1."""
    t, df = np.broadcast_arrays(np.asarray(t, float), np.asarray(df, float))
    normal = _is_normal(df)
    d = np.where(normal, 1.0, df)
    with np.errstate(invalid="ignore"):
        out = np.where(normal, special.ndtr(t), special.stdtr(d, t))
    near = (np.abs(t) < 1.0) & ~normal
    if near.any():
        out = np.array(out, copy=True)
        out[near] = 0.5 + np.copysign(_central(np.abs(t[near]), d[near]), t[near])
    return out


def cdf(t, df) -> np.ndarray:
    """P(T <= t) for T with ``df`` degrees of freedom (``inf`` gives the standard normal).

    Where the lower tail underflows although the area is representable (t below -1e154 at
    small df), the area comes from the mirrored upper tail in product form (:func:`_far_tail`).
    """
    t, df = np.broadcast_arrays(np.asarray(t, float), np.asarray(df, float))
    out = _cdf_direct(t, df)
    # scipy's lower tail loses digits far out (2e-13 near 1e-300 before scipy 1.14) or
    # underflows (t below -1e154 at small df): the product form of the mirrored tail keeps
    # them up to df 200 (its power costs df times rounding); beyond, the log tail fills zeros
    far = (out < 1e-30) & np.isfinite(t) & (df < 200.0)
    with np.errstate(over="ignore"):
        far &= t * t > df
    gone = (out == 0.0) & np.isfinite(t) & ~far
    if far.any() or gone.any():
        out = np.array(out, copy=True)
        with np.errstate(under="ignore"):
            out[far] = _far_tail(-t[far], df[far])
            out[gone] = np.exp(log_sf(-t[gone], df[gone]))
    return out


def sf(t, df) -> np.ndarray:
    """P(T > t), computed as the lower tail at -t so that small upper tails keep their digits.

    Where that underflows although the area is representable (t near 1e200 at small df),
    the area comes from :func:`log_sf`.
    """
    return cdf(-np.asarray(t, float), df)


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
        direct = np.log(_cdf_direct(-t, df))
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


def log_pdf(t, df) -> np.ndarray:
    """Natural log of the density of Student's t at ``t`` (finite for every finite t)."""
    t, df = np.broadcast_arrays(np.asarray(t, float), np.asarray(df, float))
    normal = _is_normal(df)
    d = np.where(normal, 1.0, df)
    with np.errstate(over="ignore", invalid="ignore", divide="ignore"):
        log_c = log_gamma_half_ratio(d / 2) - 0.5 * np.log(d * np.pi)
        big = np.abs(t) > 1e100  # t * t would overflow
        tb = np.where(big, np.abs(t), 1.0)
        log_kernel = np.where(
            big, 2 * np.log(tb) - np.log(d) + np.log1p(d / (tb * tb)), np.log1p(t * t / d)
        )
        return np.where(
            normal, -0.5 * t * t - 0.5 * np.log(2 * np.pi), log_c - (d + 1) / 2 * log_kernel
        )


def pdf(t, df) -> np.ndarray:
    """Density of Student's t at ``t``."""
    t, df = np.broadcast_arrays(np.asarray(t, float), np.asarray(df, float))
    with np.errstate(under="ignore"):
        return np.where(
            _is_normal(df), np.exp(-0.5 * t * t) / np.sqrt(2 * np.pi), np.exp(log_pdf(t, df))
        )


def ppf(q, df) -> np.ndarray:
    """The t value with lower-tail area ``q`` (percentile, quantile).

    Solved in the smaller tail (``1 - q`` is exact for q >= 1/2) on the library's own tail
    area, so the digits do not depend on the scipy version: closed forms at df = 1 and 2,
    otherwise a safeguarded Newton iteration on log t, started from scipy's inverse and kept
    inside a bracket that always holds the answer (the normal percentile below, the
    power-law tail ``P(T > s) <= K s^-df`` above). Areas of 0.1 and more use the central
    area :func:`_central` as the residual, smaller ones the log tail :func:`log_sf`.
    """
    q, df = np.broadcast_arrays(np.asarray(q, float), np.asarray(df, float))
    lower = q <= 0.5
    p = np.where(lower, q, 1.0 - q)  # exact (Sterbenz) for q in [1/2, 1]
    normal = _is_normal(df)
    with np.errstate(all="ignore"):
        s = np.where(normal, -special.ndtri(p), _upper_percentile(p, np.where(normal, 1.0, df)))
        s = np.where((q < 0) | (q > 1) | np.isnan(df) | (df <= 0), np.nan, s)
    return np.where(lower & (s != 0.0), -s, s) + 0.0  # + 0.0: no -0.0 at the median


def isf(q, df) -> np.ndarray:
    """The t value with upper-tail area ``q``, as the negated lower percentile (keeps digits)."""
    return -ppf(q, df)


_CENTRAL_P = 0.1  # at upper areas from here to 1/2 the residual is the central area
_LOG_MAX = float(np.log(np.finfo(float).max))


def _upper_percentile(p, df) -> np.ndarray:
    """s >= 0 with P(T > s) = p for 0 <= p <= 1/2 and finite df > 0 (nan elsewhere)."""
    p, df = np.broadcast_arrays(np.asarray(p, float), np.asarray(df, float))
    one, two = df == 1.0, df == 2.0
    s = np.full(p.shape, np.nan)
    # df = 1: s = cot(pi p); df = 2: s = (1 - 2p) / sqrt(2 p (1 - p)) (from the closed-form cdfs)
    s = np.where(one, np.where(p > 0.25, np.tan(np.pi * (0.5 - p)), 1.0 / np.tan(np.pi * p)), s)
    s = np.where(two, (1.0 - 2.0 * p) / np.sqrt(2.0 * p * (1.0 - p)), s)
    s = np.where(p == 0.5, 0.0, s)
    s = np.where(p == 0.0, np.inf, s)
    solve = ~one & ~two & (p > 0.0) & (p < 0.5) & (df > 0)
    if solve.any():
        s[solve] = _solve_upper(p[solve], df[solve])
    return s


def _solve_upper(p: np.ndarray, df: np.ndarray) -> np.ndarray:
    """Safeguarded Newton on u = log s for P(T > s) = p, 0 < p < 1/2 (vectorised)."""
    log_p = np.log(p)
    central = p >= _CENTRAL_P
    # Bracket in u. Below: the normal percentile (the t tail is heavier everywhere).
    lo = np.log(-special.ndtri(p))
    # Above: P(T > s) <= K s^-df with K = c df^((df-1)/2), c the density's constant.
    log_k = log_gamma_half_ratio(df / 2) - 0.5 * np.log(df * np.pi) + (df - 1) / 2 * np.log(df)
    hi = (log_k - log_p) / df
    over = hi > _LOG_MAX
    if over.any():  # the answer may not be representable: then it is inf
        beyond = log_sf(np.full(over.sum(), np.finfo(float).max), df[over]) > log_p[over]
        hi[over] = _LOG_MAX
        lo[over] = np.where(beyond, _LOG_MAX, lo[over])  # lo == hi: nothing to solve
    with np.errstate(all="ignore"):
        start = np.log(-special.stdtrit(df, p))
    u = np.where((start > lo) & (start < hi), start, 0.5 * (lo + hi))
    u = np.where(lo >= _LOG_MAX, _LOG_MAX, u)
    active = lo < hi
    for _ in range(200):
        if not active.any():
            break
        ua, dfa = u[active], df[active]
        resid, slope = _residual(np.exp(ua), p[active], dfa, central[active])
        with np.errstate(all="ignore"):
            step = resid / slope
        lo_a = np.where(resid > 0, ua, lo[active])
        hi_a = np.where(resid < 0, ua, hi[active])
        new = ua + step
        out = ~((new > lo_a) & (new < hi_a)) | ~np.isfinite(new)
        new = np.where(out, 0.5 * (lo_a + hi_a), new)
        done = (np.abs(new - ua) <= 1e-13 * np.maximum(1.0, np.abs(ua))) & ~out
        done |= resid == 0.0
        idx = np.flatnonzero(active)
        u[idx] = np.where(resid == 0.0, ua, new)
        lo[idx], hi[idx] = lo_a, hi_a
        active[idx[done | (hi_a - lo_a <= 4e-16 * np.maximum(1.0, np.abs(hi_a)))]] = False
    with np.errstate(over="ignore"):
        s = np.where(u >= _LOG_MAX, np.inf, np.exp(u))
    return _last_step(s, p, df, central)


def _residual(s, p, df, central) -> tuple[np.ndarray, np.ndarray]:
    """Residual in u = log s and its slope: the central area's (1/2 - p - C(s), s f(s)) at
    central areas, the log tail's (log P(T > s) - log p, s f(s) / P(T > s)) elsewhere."""
    resid, slope = np.empty_like(s), np.empty_like(s)
    with np.errstate(all="ignore"):
        lpdf = log_pdf(s, df)
        c, t = central, ~central
        resid[c] = 0.5 - p[c] - _central(s[c], df[c])
        slope[c] = np.exp(np.log(s[c]) + lpdf[c])
        lsf = log_sf(s[t], df[t])
        resid[t] = lsf - np.log(p[t])
        slope[t] = np.exp(np.log(s[t]) + lpdf[t] - lsf)
    return resid, slope


def _last_step(s, p, df, central) -> np.ndarray:
    """One Newton step on s itself: exp(u) is only as good as u's last digit (3e-15 at
    |u| = 27), and log p holds only ~1e-13 of p when |log p| is in the hundreds, an error
    divided by df in s, so at small df the far tail is taken as an area, not a log."""
    ok = np.isfinite(s) & (s > 0)
    far = ok & ~central & (df < 30.0) & (s * s > df)
    logs = ok & ~central & ~far
    mid = ok & central
    s = np.array(s, copy=True)
    with np.errstate(under="ignore"):
        if mid.any():
            sm, dm = s[mid], df[mid]
            s[mid] = sm + (0.5 - p[mid] - _central(sm, dm)) / np.exp(log_pdf(sm, dm))
        if far.any():
            sf_, df_ = s[far], df[far]
            s_f = np.exp(np.log(sf_) + log_pdf(sf_, df_))  # s f(s): f alone may underflow
            s[far] = sf_ - sf_ * (p[far] - _far_tail(sf_, df_)) / s_f
        if logs.any():
            sl, dl = s[logs], df[logs]
            lsf = log_sf(sl, dl)
            slope = np.exp(np.log(sl) + log_pdf(sl, dl) - lsf)
            s[logs] = sl + sl * (lsf - np.log(p[logs])) / slope
    return s


def _far_tail(s: np.ndarray, df: np.ndarray) -> np.ndarray:
    """P(T > s) for s^2 >= df as a product of well-scaled factors, each to rounding.

    ``I_x(a, 1/2) / 2 = x^a (1 - x)^(1/2) F(a + 1/2, 1; a + 1; x) / (2 a B(a, 1/2))`` with
    a = df / 2 and x = df / (df + s^2) (A&S 26.5.23); ``x^a`` is split as
    ``(sqrt(df) / m)^df (2^-k)^df (1 + df / s^2)^-a`` with s = m 2^k, so no factor
    underflows and no large logarithm is rounded.
    """
    a = df / 2.0
    k = np.floor(np.log2(s) / 2.0)
    m = np.ldexp(s, -k.astype(int))
    with np.errstate(under="ignore"):
        r = df / s / s  # df / s^2 (0 when it underflows: then every correction is 1)
        x = r / (1.0 + r)
        lead = np.power(np.sqrt(df) / m, df) * np.power(np.ldexp(1.0, -k.astype(int)), df)
        corr = np.power(1.0 + r, -a - 0.5) * special.hyp2f1(a + 0.5, 1.0, a + 1.0, x)
        const = np.exp(log_gamma_half_ratio(a)) / (2.0 * a * np.sqrt(np.pi))
    return lead * corr * const


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
    # the areas themselves, not exp(log p): that keeps only |log p| x 1e-16 (7e-14 at 1e-300)
    if side == "upper":
        p = sf(t, df)
    elif side == "lower":
        p = cdf(t, df)
    else:
        p = np.minimum(2.0 * sf(np.abs(t), df), 1.0)
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
