"""Standardised effect sizes and their confidence intervals from the noncentral t.

The interval for a standardised mean difference inverts the noncentral t distribution
in its noncentrality parameter (Steiger and Fouladi 1997; Cumming and Finch 2001):
the lower limit is the noncentrality under which the observed t sits at the upper
``alpha/2`` point, the upper limit the one under which it sits at the lower ``alpha/2``
point. The limits start from a normal approximation (Abramowitz and Stegun 26.7.10), take
one Newton step and then secant steps on scipy's exact ``nctdtr`` (two evaluations at large
df); the few that do not converge fall back to scipy's ``nctdtrinc`` polished by a bracketed
Illinois (regula falsi) iteration until they are exact to rounding.
Beyond |t| of about 2e5, where scipy's noncentral t gives nan (or does not return), the
limits come from the large-noncentrality limit ``P(T <= t) ~ P(S >= lam / t)`` with
``S^2 ~ chi2(df) / df``, whose relative error is of order 1 / |t|.
"""

from __future__ import annotations

from functools import partial

import numpy as np
from scipy import special

from . import parallel
from .distribution import log_gamma_half_ratio


def _ncp_for_cdf(df, t, prob) -> np.ndarray:
    """The noncentrality ``lam`` with ``P(T <= t | df, lam) = prob``, vectorised and polished.

    Most values converge in a few evaluations from a normal-approximation start
    (:func:`_ncp_fast`); the rest, and every |t| beyond 1e4, go to the bracketed method.
    """
    df, t, prob = (np.array(v, dtype=float) for v in np.broadcast_arrays(df, t, prob))
    shape = df.shape
    df, t, prob = df.ravel(), t.ravel(), prob.ravel()
    fast, done = _ncp_fast(np.where(np.abs(t) < 1e4, df, np.nan), t, prob)
    done &= np.abs(t) < 1e4
    if done.all():
        return fast.reshape(shape)
    rest = ~done
    fast[rest] = _ncp_bracketed(df[rest], t[rest], prob[rest])
    return fast.reshape(shape)


def _ncp_bracketed(df, t, prob) -> np.ndarray:
    """The bracketed method: scipy's ``nctdtrinc``, then an Illinois iteration to rounding."""
    # For large |t| scipy's nctdtrinc can loop for ever (|t| ~ 1e6 and up, scipy 1.17) and
    # nctdtr turns nan (|lam| ~ 1e6). There, start from (and fall back to) the large-lam
    # limit: T = (Z + lam) / S with S^2 ~ chi2(df) / df, so P(T <= t) ~ P(S >= lam / t).
    with np.errstate(all="ignore"):
        approx = t * np.sqrt(special.chdtri(df, np.where(t > 0, prob, 1.0 - prob)) / df)
        safe = np.abs(t) < 1e4
        x0 = special.nctdtrinc(np.where(safe, df, 1.0), prob, np.where(safe, t, 0.0))
    x0 = np.where(safe & np.isfinite(x0), x0, np.where(np.isfinite(approx), approx, t))

    def f(lam, df=df, t=t):
        lam = np.clip(lam, -1e6, 1e6)  # beyond, nctdtr is nan and can take seconds per value
        with np.errstate(all="ignore"):
            return special.nctdtr(df, lam, t) - prob

    unusable = ~np.isfinite(f(x0)) | (np.abs(x0) > 2e5)
    if unusable.any():  # dummy arguments keep scipy fast on the values left to ``approx``
        f = partial(f, df=np.where(unusable, 1.0, df), t=np.where(unusable, 0.0, t))
    step = np.maximum(1e-6 * np.abs(x0), 1e-8)
    lo, hi = x0 - step, x0 + step
    f_lo, f_hi = f(lo), f(hi)
    # F is decreasing in lam: need f(lo) >= 0 >= f(hi). Widen until bracketed.
    for _ in range(80):
        bad_lo, bad_hi = f_lo < 0, f_hi > 0
        if not (bad_lo.any() or bad_hi.any()):
            break
        width = hi - lo
        lo = np.where(bad_lo, lo - 2 * width, lo)
        hi = np.where(bad_hi, hi + 2 * width, hi)
        f_lo = np.where(bad_lo, f(lo), f_lo)
        f_hi = np.where(bad_hi, f(hi), f_hi)
    side_kept = np.zeros(lo.shape, dtype=np.int8)
    for _ in range(100):
        denom = f_lo - f_hi
        with np.errstate(all="ignore"):
            mid = np.where(denom > 0, lo + (hi - lo) * f_lo / denom, 0.5 * (lo + hi))
        mid = np.where((mid <= lo) | (mid >= hi) | ~np.isfinite(mid), 0.5 * (lo + hi), mid)
        f_mid = f(mid)
        go_right = f_mid > 0  # root lies above mid
        # Illinois: halve the stale end's value when the same end is kept twice
        f_hi = np.where(go_right & (side_kept == 1), 0.5 * f_hi, f_hi)
        f_lo = np.where(~go_right & (side_kept == -1), 0.5 * f_lo, f_lo)
        lo, f_lo = np.where(go_right, mid, lo), np.where(go_right, f_mid, f_lo)
        hi, f_hi = np.where(go_right, hi, mid), np.where(go_right, f_hi, f_mid)
        side_kept = np.where(go_right, 1, -1).astype(np.int8)
        done = (hi - lo) <= 4e-16 * np.maximum(np.abs(lo), 1e-300) + 1e-300
        if done.all() or (f_mid == 0).all():
            break
    return np.where(unusable, x0, np.where(np.abs(f_lo) <= np.abs(f_hi), lo, hi))


def _normal_start(df, t, prob) -> tuple[np.ndarray, np.ndarray]:
    """A start for ``lam`` and the slope ``dF/dlam`` there, from the normal approximation

    ``P(T <= t) ~ Phi((t (1 - 1 / (4 df)) - lam) / sqrt(1 + t^2 / (2 df)))``

    (Abramowitz and Stegun 1964, 26.7.10, from memory): good to about 1e-6 relative at df
    in the hundreds, 1e-3 at df near 20.
    """
    z = special.ndtri(prob)
    with np.errstate(all="ignore"):
        scale = np.sqrt(1.0 + t * t / (2.0 * df))
        lam = t * (1.0 - 1.0 / (4.0 * df)) - z * scale
        slope = -np.exp(-0.5 * z * z) / (np.sqrt(2.0 * np.pi) * scale)
    return lam, slope


#: Values above which the noncentral t CDF is split over threads (scipy's ufunc releases the
#: GIL, so the cores share the work); below, one call is quicker than the hand-off.
PARALLEL_MIN = 1024


def _nct_cdf(df: np.ndarray, lam: np.ndarray, t: np.ndarray) -> np.ndarray:
    """scipy's noncentral t CDF on 1-d arrays, split over threads when large."""
    if lam.size < PARALLEL_MIN:
        return special.nctdtr(df, lam, t)
    size = lam.size
    return parallel.chunked(lambda s: special.nctdtr(df[s], lam[s], t[s]), size, size, PARALLEL_MIN)


def _ncp_fast(df, t, prob, max_steps: int = 12) -> tuple[np.ndarray, np.ndarray]:
    """``lam`` with ``P(T <= t | df, lam) = prob`` by one Newton step (with the start's
    slope) and secant steps on scipy's ``nctdtr``, each round on the unfinished values only:
    two or three evaluations at large df. Returns the values and a mask of those that
    converged (the rest go to the bracketed method)."""
    x0, slope = _normal_start(df, t, prob)
    out = np.full(x0.shape, np.nan)
    done = np.zeros(x0.shape, dtype=bool)
    idx = np.flatnonzero(np.isfinite(x0) & np.isfinite(slope) & (slope < 0))
    d, tt, pp = df[idx], t[idx], prob[idx]
    with np.errstate(all="ignore"):
        xa = x0[idx]
        fa = _nct_cdf(d, xa, tt) - pp
        xb = xa - fa / slope[idx]
        for _ in range(max_steps):
            fb = _nct_cdf(d, xb, tt) - pp
            step = -fb * (xb - xa) / (fb - fa)
            xc = xb + step
            ok = np.isfinite(xc) & np.isfinite(fb)
            # secant errors shrink superlinearly, e_next ~ K e_now e_before with K small for
            # a near-normal law: stop once a step of 1e-12 or that product is below 1e-15
            size = np.abs(xc) + 1.0
            tiny = (np.abs(step) <= 1e-12 * size) | (np.abs(step * (xb - xa)) <= 1e-15 * size**2)
            small = ok & (tiny | (fb == 0))
            finished = np.where(fb == 0, xb, xc)
            out[idx[small]], done[idx[small]] = finished[small], True
            keep = ok & ~small
            if not keep.any():
                break
            idx, d, tt, pp = idx[keep], d[keep], tt[keep], pp[keep]
            xa, fa, xb = xb[keep], fb[keep], xc[keep]
    return out, done


def ncp_interval(t_obs, df, level, side: str) -> tuple[np.ndarray, np.ndarray]:
    """Confidence limits for the noncentrality parameter given an observed t.

    ``side`` follows the test: two-sided limits at ``level``, or a one-sided bound
    (``"upper"`` alternative: lower limit only; ``"lower"``: upper limit only).
    """
    t_obs = np.asarray(t_obs, float)
    alpha = 1.0 - np.asarray(level, float)
    inf = np.full(np.broadcast(t_obs, df, alpha).shape, np.inf)
    if side == "two-sided":
        return _ncp_for_cdf(df, t_obs, 1 - alpha / 2), _ncp_for_cdf(df, t_obs, alpha / 2)
    if side == "upper":
        return _ncp_for_cdf(df, t_obs, 1 - alpha), inf
    return -inf, _ncp_for_cdf(df, t_obs, alpha)


def hedges_j(df) -> np.ndarray:
    """Exact small-sample correction of Hedges (1981).

    J(df) = Gamma(df/2) / (sqrt(df/2) Gamma((df-1)/2)).

    Examples
    --------
    >>> round(float(hedges_j(10)), 6)
    0.922745
    """
    m = np.asarray(df, float) / 2.0
    # Gamma(m) / Gamma(m - 1/2) through the accurate log ratio (poch loses ~4e-13 near m = 250)
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.exp(log_gamma_half_ratio(m - 0.5) - 0.5 * np.log(m))
