"""The largest of several t statistics: p-values and critical values for simultaneous intervals.

Two families, each the upper tail of a normal-theory statistic divided by a common
``S = sqrt(chi2(df) / df)``:

- the **studentized range** ``Q = (max Z_i - min Z_i) / S`` of k independent standard normals
  (Tukey 1953; the reference distribution of Tukey-Kramer and Games-Howell):
  :func:`range_sf` and :func:`range_critical`;
- the **largest of m correlated t statistics** ``max |Z_i| / S`` (or ``max Z_i / S``) with
  correlations ``lam_i * lam_j`` (Dunnett 1955, many-to-one comparisons, where
  ``lam_i = sqrt(n_i / (n_i + n_0))``): :func:`dunnett_sf` and :func:`dunnett_critical`.

Both tails are ``P = E_S[G(c S)]`` with ``G`` the tail of the normal-theory statistic. The
product form of Dunnett's correlations writes ``Z_i = sqrt(1 - lam_i^2) U_i + lam_i W`` with
independent standard normals, so ``G`` is a one-dimensional integral over ``W`` of products
of normal tails (Dunnett 1955); the range tail is
``G(r) = k int phi(z) [Phi(z)^(k-1) - (Phi(z) - Phi(z - r))^(k-1)] dz`` (Hartley 1942, from
memory). Each ``G`` is formed as an upper tail (``-expm1`` of a sum of ``log1p``), never as
``1 - cdf``, so small p-values keep their digits; :mod:`tinfer.core.studentize` averages it
over ``S``. The range tail ``G`` depends on ``r`` and ``k`` only; it is tabulated once per
``k`` on a grid of step 1/256 with its derivative and read by cubic Hermite interpolation
of ``log G``.

Critical values solve ``P(c) = 1 - level`` by the Illinois method on ``log c``, bracketed by
the single-comparison and the Bonferroni critical values. ``df = inf`` gives the normal
theory. Accuracy against mpmath and scipy is in ``tests/core/test_simultaneous.py``.
"""

from __future__ import annotations

import functools

import numpy as np
from numpy.polynomial import chebyshev
from scipy import special

from .studentize import GL16, HALF_LOG_2PI, panels, solve, t_upper, tail

_GL12 = np.polynomial.legendre.leggauss(12)
_R_MAX = 56.0  # the range tail is below 1e-300 beyond this r, for every k
_STEP = 1.0 / 256.0
#: From this many distinct df values on, critical values come from a table (see
#: :func:`range_critical`); its degree.
TABLE_MIN = 64
CHEB_DEGREE = 40


# ---------------------------------------------------------------- the studentized range
@functools.lru_cache(maxsize=16)
def _range_table(k: int) -> tuple[np.ndarray, ...]:
    """Cubic pieces of ``log G_k`` between the grid points ``r = 0, 1/256, ..., 56``.

    Arrays ``(c0, c1, c2, c3)``: entry ``i`` of each is a coefficient of the cubic Hermite
    interpolant on cell ``i`` in ``u = r / step - i``, from ``log G`` and its derivative at
    the two ends.
    """
    r = np.arange(0.0, _R_MAX + _STEP / 2, _STEP)
    logs, slopes = np.empty_like(r), np.empty_like(r)
    for part in np.array_split(np.arange(r.size), 16):
        logs[part], slopes[part] = _range_direct(r[part], k)
    f0, f1 = logs[:-1], logs[1:]
    d0, d1 = slopes[:-1] * _STEP, slopes[1:] * _STEP
    pieces = (f0, d0, 3 * (f1 - f0) - 2 * d0 - d1, 2 * (f0 - f1) + d0 + d1)
    return tuple(np.ascontiguousarray(v) for v in pieces)


def _range_direct(r: np.ndarray, k: int) -> tuple[np.ndarray, np.ndarray]:
    """``log G_k(r)`` and ``d log G_k / dr`` by Gauss-Legendre over z (8 panels of 16).

    Both integrals are summed on the log scale, so that neither underflows at large r.
    """
    centre = r / 2.0
    z, w = panels(np.minimum(-9.0, centre - 10.0), np.maximum(9.0, centre + 10.0), 8, GL16)
    rr = r[:, None]
    log_w = np.log(w)
    log_pdf = -0.5 * z * z - HALF_LOG_2PI
    with np.errstate(divide="ignore", under="ignore", invalid="ignore"):
        log_low = special.log_ndtr(z)
        ratio = np.exp(special.log_ndtr(z - rr) - log_low)  # Phi(z - r) / Phi(z)
        # G: k phi(z) Phi(z)^(k-1) (1 - (1 - ratio)^(k-1))
        log_tail = log_pdf + (k - 1) * log_low + np.log(-np.expm1((k - 1) * np.log1p(-ratio)))
        # its derivative: k (k-1) phi(z) phi(z - r) (Phi(z) - Phi(z - r))^(k-2)
        log_dens = log_pdf - 0.5 * (z - rr) ** 2 - HALF_LOG_2PI
        if k > 2:
            log_dens = log_dens + (k - 2) * (log_low + np.log1p(-ratio))
        log_g = np.log(k) + special.logsumexp(log_w + log_tail, axis=1)
        log_dg = np.log(k * (k - 1.0)) + special.logsumexp(log_w + log_dens, axis=1)
    return log_g, -np.exp(log_dg - log_g)


def range_log_g(r: np.ndarray, k: int) -> np.ndarray:
    """``log G_k(r)`` by cubic Hermite interpolation in the table (``-inf`` beyond it)."""
    c0, c1, c2, c3 = _range_table(k)
    pos = np.asarray(r, float) * (1.0 / _STEP)
    beyond = ~(pos < c0.size)  # also NaN
    pos[beyond] = 0.0
    i = pos.astype(np.intp)
    pos -= i  # now the position u in the cell
    out = np.take(c3, i)
    for coef in (c2, c1, c0):
        out *= pos
        out += np.take(coef, i)
    out[beyond] = -np.inf
    return out


def range_bound(r: np.ndarray, k: int) -> np.ndarray:
    """Bonferroni: ``log min(1, C(k, 2) * 2 Phi(-r / sqrt 2))``."""
    pairs = k * (k - 1) / 2.0
    return np.minimum(0.0, np.log(pairs) + np.log(2.0) + special.log_ndtr(-r / np.sqrt(2.0)))


def range_sf(q, k: int, df) -> np.ndarray:
    """P(Q > q) for the studentized range of ``k`` means with ``df`` degrees of freedom.

    Examples
    --------
    >>> round(float(range_sf(3.0, 2, 10.0)), 12)  # k = 2: Q = sqrt(2) |T|
    0.059890324426
    """
    k = _check_k(k, 2)
    if k == 2:  # exact through Student's t
        q, df = np.broadcast_arrays(np.asarray(q, float), np.asarray(df, float))
        t = np.where(np.isinf(df), 0.0, special.stdtr(np.where(np.isinf(df), 1.0, df), -q / 2**0.5))
        return np.where(np.isinf(df), 2.0 * special.ndtr(-q / 2**0.5), 2.0 * t)
    _range_table(k)  # built once, before any threads read it
    return tail(
        q,
        df,
        lambda r, idx: range_log_g(r, k),
        lambda r, idx: range_bound(r, k),
        0.25,
    )


def range_critical(level, k: int, df) -> np.ndarray:
    """The ``level`` quantile of the studentized range: ``range_sf(q, k, df) = 1 - level``.

    Each distinct df is solved once. From :data:`TABLE_MIN` distinct df values on (batches),
    df of 1 and more are read from a Chebyshev interpolant of ``log q`` in ``1 / df``
    (degree 40, built once per k and level from 41 solved values), which agrees with the
    solved values to about 1e-13 (``tests/core/test_simultaneous.py``).

    Examples
    --------
    >>> round(float(range_critical(0.95, 3, np.inf)), 3)  # Tukey's q(0.05; 3, inf)
    3.314
    """
    k = _check_k(k, 2)
    level = float(level)
    df = np.asarray(df, float)
    if k == 2:  # Q = sqrt(2) |T|
        return 2**0.5 * t_upper((1.0 - level) / 2.0, df)
    uniq, back = np.unique(df, return_inverse=True)
    out = np.empty(uniq.size)
    tabled = (uniq >= 1.0) if uniq.size >= TABLE_MIN else np.zeros(uniq.size, dtype=bool)
    if tabled.any():
        coef = _range_critical_table(k, level)
        out[tabled] = np.exp(chebyshev.chebval(2.0 / uniq[tabled] - 1.0, coef))
    if (~tabled).any():
        out[~tabled] = _range_critical_direct(level, k, uniq[~tabled])
    return out[back].reshape(df.shape)


def _range_critical_direct(level: float, k: int, df: np.ndarray) -> np.ndarray:
    """Solve ``range_sf(q) = 1 - level`` for each df, bracketed by one pair and Bonferroni."""
    alpha = 1.0 - level
    pairs = k * (k - 1) / 2.0
    low = 2**0.5 * t_upper(alpha / 2.0, df)
    high = 2**0.5 * t_upper(alpha / (2.0 * pairs), df)
    return solve(lambda c, i: range_sf(c, k, df[i]), alpha, low, high)


@functools.lru_cache(maxsize=64)
def _range_critical_table(k: int, level: float) -> np.ndarray:
    """Chebyshev coefficients of ``log q`` in ``t = 2 / df - 1`` over df in [1, inf]."""
    nodes = np.cos(np.pi * (np.arange(CHEB_DEGREE + 1) + 0.5) / (CHEB_DEGREE + 1))
    df = 2.0 / (nodes + 1.0)
    return chebyshev.chebfit(nodes, np.log(_range_critical_direct(level, k, df)), CHEB_DEGREE)


# ---------------------------------------------------------------- Dunnett's many-to-one
def _dunnett_parts(lam: np.ndarray, kind: str):
    """``log G`` and its Bonferroni bound for Dunnett families (rows of ``lam``).

    ``kind`` "two-sided": ``G(r) = P(max |Z_i| > r)``; "upper": ``P(max Z_i > r)``;
    "all-below": ``P(all Z_i <= -r)``, used for one-sided tails at negative c. With
    ``Z_i = rho_i U_i + lam_i W``, each is an integral over ``w`` of products of normal
    tails, by Gauss-Legendre (panels of 12 nodes about 1.5 wide) over the stretch of w that
    holds the mass.
    """
    used = np.isfinite(lam)
    lam0 = np.where(used, lam, 0.0)
    rho = np.sqrt(1.0 - lam0 * lam0)
    low = np.min(np.where(used, lam0, np.inf), axis=1)
    m = used.sum(axis=1).astype(float)

    def log_g(r, idx):
        lam_i, rho_i, used_i = lam0[idx], rho[idx], used[idx]
        if kind == "all-below":  # mass near w = -r / lam
            a = np.maximum(-38.0, -r / low[idx][:, None] - 9.0)
            b = np.full_like(r, 9.0)
        else:  # mass near w = +-lam r, and near 0
            a = np.zeros_like(r) if kind == "two-sided" else np.full_like(r, -9.0)
            b = np.minimum(38.0, np.max(lam_i, axis=1)[:, None] * r + 9.0)
        z, w = panels(a.ravel(), b.ravel(), 6 if kind == "two-sided" else 12, _GL12)
        z = z.reshape(*r.shape, -1)[..., None]  # (rows, nodes, w nodes, 1)
        w = w.reshape(*r.shape, -1) * (2.0 if kind == "two-sided" else 1.0)
        rr = r[..., None, None]
        li, ri, ui = (v[:, None, None, :] for v in (lam_i, rho_i, used_i))
        with np.errstate(under="ignore", divide="ignore"):
            log_dens = -0.5 * z[..., 0] ** 2 - HALF_LOG_2PI
            if kind == "all-below":
                inner = np.sum(np.where(ui, special.log_ndtr((-rr - li * z) / ri), 0.0), -1)
                return special.logsumexp(np.log(w) + log_dens + inner, axis=-1)
            e = special.ndtr((li * z - rr) / ri)
            if kind == "two-sided":
                e = e + special.ndtr((-li * z - rr) / ri)
            e = np.where(ui, np.minimum(e, 1.0), 0.0)
            some = -np.expm1(np.sum(np.log1p(-e), axis=-1))  # P(some exceed | w)
            return np.log(np.sum(w * np.exp(log_dens) * some, axis=-1))

    def log_bound(r, idx):
        single = special.log_ndtr(-r)
        if kind == "all-below":
            return single
        sides = np.log(2.0) if kind == "two-sided" else 0.0
        return np.minimum(0.0, np.log(m[idx])[:, None] + sides + single)

    return log_g, log_bound


def dunnett_sf(c, lam, df, side: str = "two-sided") -> np.ndarray:
    """P(max |T_i| > c) (``side="two-sided"``) or P(max T_i > c) (one-sided) for Dunnett.

    ``lam`` has one row per family, ``lam_i = sqrt(n_i / (n_i + n_0))`` for each group
    ``i`` compared with control 0 (NaN pads families with fewer groups); ``c`` has one row
    per family and any number of columns; ``df`` one entry per family. One-sided tails
    are the same for "upper" and "lower" (pass ``-t`` for "lower").

    Examples
    --------
    >>> round(float(dunnett_sf([[2.0]], [[0.5**0.5]], [np.inf])[0, 0]), 12)  # m = 1: normal
    0.045500263896
    """
    lam = np.atleast_2d(np.asarray(lam, float))
    c = np.atleast_2d(np.asarray(c, float))
    df = np.broadcast_to(np.asarray(df, float).reshape(-1, 1), c.shape).ravel()
    fam = np.broadcast_to(np.arange(lam.shape[0])[:, None], c.shape).ravel()
    cf = c.ravel()
    out = np.ones(cf.size)

    def run(kind, sel, cc):
        log_g, log_bound = _dunnett_parts(lam, kind)
        g = lambda r, idx: log_g(r, fam[sel][idx])  # noqa: E731
        bound = lambda r, idx: log_bound(r, fam[sel][idx])  # noqa: E731
        return tail(cc, df[sel], g, bound, 0.5)

    if side == "two-sided":
        every = np.arange(cf.size)
        out = run("two-sided", every, np.abs(cf))
    else:
        up = np.flatnonzero(cf > 0)
        if up.size:
            out[up] = run("upper", up, cf[up])
        down = np.flatnonzero(cf <= 0)
        if down.size:  # P(max T_i > c) = 1 - P(all T_i <= c), c <= 0
            out[down] = 1.0 - run("all-below", down, -cf[down])
    out[np.isnan(cf)] = np.nan
    return out.reshape(c.shape)


def dunnett_critical(level, lam, df, side: str = "two-sided") -> np.ndarray:
    """Critical value per family: ``dunnett_sf(c, lam, df, side) = 1 - level``.

    Examples
    --------
    >>> lam = np.full((1, 2), 0.5**0.5)  # two groups against a control, equal sizes
    >>> round(float(dunnett_critical(0.95, lam, [np.inf])[0]), 2)  # Dunnett's table
    2.21
    """
    lam = np.atleast_2d(np.asarray(lam, float))
    alpha = 1.0 - float(level)
    df = np.asarray(df, float).reshape(-1)
    m = np.isfinite(lam).sum(axis=1)
    sides = 2.0 if side == "two-sided" else 1.0
    low = t_upper(alpha / sides, df)
    high = t_upper(alpha / (sides * m), df)
    return solve(lambda cc, i: dunnett_sf(cc[:, None], lam[i], df[i], side)[:, 0], alpha, low, high)


def _check_k(k, least: int) -> int:
    if isinstance(k, bool) or int(k) != k or k < least:
        raise ValueError(f"k must be an integer of at least {least}; got {k!r}")
    return int(k)
