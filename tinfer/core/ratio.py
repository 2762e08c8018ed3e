"""Ratios of means and relative lift (ratio minus one), vectorised.

Fieller's theorem (Fieller 1954): for means a and b with variances va, vb and covariance
c (of the means), the set of ratios rho with (a - rho b)^2 <= q^2 (va - 2 rho c + rho^2 vb),
q the t critical value, is the interval between the roots of

    (b^2 - q^2 vb) rho^2 - 2 (a b - q^2 c) rho + (a^2 - q^2 va) = 0

when b^2 > q^2 vb (the denominator's own test rejects b = 0); otherwise the set is unbounded
and no finite interval is honest. The delta method on log(a / b) gives the alternative
``exp(log(a / b) -+ q sqrt(va / a^2 + vb / b^2))`` for positive means.
"""

from __future__ import annotations

import numpy as np

from . import distribution as dist


def welch_df(va, vb, rho, dfa, dfb) -> np.ndarray:
    """Satterthwaite df of va + rho^2 vb (the variance of a - rho b for independent means)."""
    va, vb, rho = (np.asarray(v, float) for v in (va, vb, rho))
    wb = rho * rho * vb
    with np.errstate(divide="ignore", invalid="ignore"):
        return (va + wb) ** 2 / (va * va / dfa + wb * wb / dfb)


def fieller(a, b, va, vb, cov, df, level=0.95, side: str = "two-sided"):
    """Ratio a / b with Fieller's interval; returns (ratio, low, high, bounded).

    One-sided sides give one finite limit ("upper": a lower bound, "lower": an upper bound).
    Where the interval is unbounded both limits are nan and ``bounded`` is False.

    Examples
    --------
    >>> r, lo, hi, ok = fieller(10.0, 8.0, 0.25, 0.16, 0.0, 40.0)
    >>> round(float(r), 4), round(float(lo), 4), round(float(hi), 4), bool(ok)
    (1.25, 1.0829, 1.4429, True)
    """
    a, b, va, vb, cov, df = np.broadcast_arrays(
        *(np.asarray(v, float) for v in (a, b, va, vb, cov, df))
    )
    q = dist.critical(df, level, "two-sided" if side == "two-sided" else "upper")
    q2 = q * q
    qa = b * b - q2 * vb
    qb = a * b - q2 * cov
    qc = a * a - q2 * va
    with np.errstate(divide="ignore", invalid="ignore"):
        ratio = a / b
        root = np.sqrt(np.maximum(qb * qb - qa * qc, 0.0))
        s = qb + np.copysign(root, qb)  # no cancellation: the other root is qc / s
        r1, r2 = s / qa, qc / s
    bounded = qa > 0
    lo = np.where(bounded, np.minimum(r1, r2), np.nan)
    hi = np.where(bounded, np.maximum(r1, r2), np.nan)
    if side == "upper":
        hi = np.where(bounded, np.inf, np.nan)
    elif side == "lower":
        lo = np.where(bounded, -np.inf, np.nan)
    return ratio, lo, hi, bounded


def log_delta(a, b, va, vb, cov, df, level=0.95, side: str = "two-sided"):
    """Ratio a / b with the delta-method interval on log(a / b) (positive means only).

    Examples
    --------
    >>> r, lo, hi = log_delta(10.0, 8.0, 0.25, 0.16, 0.0, 40.0)
    >>> round(float(lo), 4), round(float(hi), 4)
    (1.0835, 1.442)
    """
    a, b, va, vb, cov, df = np.broadcast_arrays(
        *(np.asarray(v, float) for v in (a, b, va, vb, cov, df))
    )
    q = dist.critical(df, level, "two-sided" if side == "two-sided" else "upper")
    with np.errstate(divide="ignore", invalid="ignore"):
        ratio = a / b
        se = np.sqrt(va / (a * a) + vb / (b * b) - 2.0 * cov / (a * b))
        ok = (a > 0) & (b > 0)
        lo = np.where(ok, ratio * np.exp(-q * se), np.nan)
        hi = np.where(ok, ratio * np.exp(q * se), np.nan)
    if side == "upper":
        hi = np.where(ok, np.inf, np.nan)
    elif side == "lower":
        lo = np.where(ok, -np.inf, np.nan)
    return ratio, lo, hi
