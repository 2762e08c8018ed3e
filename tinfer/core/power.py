"""Power, sample size and detectable effect of t tests from the exact noncentral t distribution.

Everything here is vectorised: arguments broadcast against each other and a whole grid of
plans is solved in one call, with no Python loop over grid points.

Definitions (Cohen 1988, ch. 2; Owen 1965):

- one sample or paired differences of ``n`` units: ``df = n - 1``, noncentrality
  ``ncp = effect * sqrt(n)``;
- two independent samples of ``n1`` and ``n2`` (pooled-variance t): ``df = n1 + n2 - 2``,
  ``ncp = effect * sqrt(n1 * n2 / (n1 + n2))``;
- ``T'`` noncentral t(df, ncp); with ``alpha = 1 - level`` the power is
  ``P(T' > c) + P(T' < -c)`` with ``c = t(1 - alpha/2, df)`` for a two-sided test,
  ``P(T' > t(1 - alpha, df))`` for ``side="upper"`` and ``P(T' < t(alpha, df))`` for
  ``side="lower"``. Upper tails are taken as lower tails of ``-T'`` (never ``1 - cdf``).

Equivalence (two one-sided tests, TOST) has its own exact formula, see
:func:`equivalence_power`.
"""

from __future__ import annotations

import numpy as np
from scipy import special

from . import distribution as dist

N_MAX = 10**9  # largest sample size the integer search will consider
_RATIO_TOL = 1e-9  # ratio * n1 within this of a whole number counts as that number


# ----------------------------------------------------------------------------- designs
def second_group(n1, ratio) -> np.ndarray:
    """Size of the second group for allocation ``ratio = n2 / n1``, rounded up.

    Examples
    --------
    >>> second_group(np.array([3, 10]), 7 / 3).tolist()
    [7.0, 24.0]
    """
    return np.ceil(np.asarray(ratio, float) * np.asarray(n1, float) - _RATIO_TOL)


def smallest_n(two_sample: bool, ratio: float = 1.0) -> int:
    """Smallest usable (first-group) sample size: 2 per group, so that every group has a spread.

    Examples
    --------
    >>> smallest_n(False), smallest_n(True, 1.0), smallest_n(True, 0.25)
    (2, 2, 5)
    """
    if not two_sample:
        return 2
    return max(2, int(np.floor((1.0 + _RATIO_TOL) / ratio)) + 1)


def df_and_scale(n1, n2=None) -> tuple[np.ndarray, np.ndarray]:
    """Degrees of freedom and the factor that turns a standardised effect into the ncp.

    One sample (``n2`` is None): ``(n - 1, sqrt(n))``. Two samples:
    ``(n1 + n2 - 2, sqrt(n1 n2 / (n1 + n2)))``.
    """
    n1 = np.asarray(n1, float)
    if n2 is None:
        return n1 - 1.0, np.sqrt(n1)
    n2 = np.asarray(n2, float)
    return n1 + n2 - 2.0, np.sqrt(n1 * n2 / (n1 + n2))


# ----------------------------------------------------------------------------- power
def nct_cdf(df, ncp, x) -> np.ndarray:
    """P(T' <= x) for noncentral t(df, ncp), by ``scipy.special.nctdtr``.

    ``nctdtr`` returns nan far out in a tail (``|x - ncp|`` of 7 or more); there the area
    is within about 1e-12 of 0 or 1 (checked against a 4,000-point quadrature over the chi
    distribution), so it is replaced by 0 below the bulk and 1 above it.
    """
    with np.errstate(all="ignore"):
        out = special.nctdtr(df, ncp, x)
    return np.where(np.isnan(out) & ~np.isnan(x - ncp + df), np.where(x > ncp, 1.0, 0.0), out)


def power_from_ncp(ncp, df, level=0.95, side: str = "two-sided") -> np.ndarray:
    """Exact power of a t test on ``df`` degrees of freedom when the true noncentrality is ``ncp``.

    Examples
    --------
    >>> round(float(power_from_ncp(0.0, 10, 0.95, "two-sided")), 12)   # size of the test
    0.05
    >>> round(float(power_from_ncp(3.0, 20, 0.95, "upper")), 4)
    0.8946
    """
    ncp, df, level = np.broadcast_arrays(*(np.asarray(v, float) for v in (ncp, df, level)))
    alpha = 1.0 - level
    with np.errstate(all="ignore"):
        if side == "two-sided":
            c = dist.isf(alpha / 2.0, df)  # not ppf(1 - alpha / 2): that rounds at tiny alpha
            return nct_cdf(df, -ncp, -c) + nct_cdf(df, ncp, -c)
        if side == "upper":
            c = dist.isf(alpha, df)
            return nct_cdf(df, -ncp, -c)
        if side == "lower":
            c = dist.ppf(alpha, df)
            return nct_cdf(df, ncp, c)
    raise ValueError(f"side must be 'two-sided', 'upper' or 'lower', not {side!r}")


def t_power(effect, n1, n2=None, *, level=0.95, side: str = "two-sided") -> np.ndarray:
    """Exact power of a one-sample/paired (``n2`` None) or pooled two-sample t test.

    ``effect`` is the true standardised difference (mean difference over the SD), signed:
    a ``side="upper"`` test has power for positive effects, ``"lower"`` for negative ones.

    Examples
    --------
    >>> round(float(t_power(0.5, 64, 64)), 4)      # two groups of 64, d = 0.5
    0.8015
    >>> t_power([0.2, 0.5, 0.8], 26, 26).round(3).tolist()
    [0.109, 0.424, 0.807]
    """
    df, scale = df_and_scale(n1, n2)
    return power_from_ncp(np.asarray(effect, float) * scale, df, level, side)


# ----------------------------------------------------------------------------- solvers
def _illinois(f, lo, hi, f_lo, f_hi, rtol=1e-13, max_iter=200) -> np.ndarray:
    """Vectorised Illinois (modified regula falsi) root of increasing ``f`` bracketed by lo, hi."""
    kept = np.zeros(lo.shape, dtype=np.int8)
    for _ in range(max_iter):
        denom = f_hi - f_lo
        with np.errstate(all="ignore"):
            mid = np.where(denom > 0, lo - f_lo * (hi - lo) / denom, 0.5 * (lo + hi))
        mid = np.where((mid <= lo) | (mid >= hi) | ~np.isfinite(mid), 0.5 * (lo + hi), mid)
        f_mid = f(mid)
        up = f_mid < 0  # root above mid
        f_hi = np.where(up & (kept == 1), 0.5 * f_hi, f_hi)
        f_lo = np.where(~up & (kept == -1), 0.5 * f_lo, f_lo)
        lo, f_lo = np.where(up, mid, lo), np.where(up, f_mid, f_lo)
        hi, f_hi = np.where(up, hi, mid), np.where(up, f_hi, f_mid)
        kept = np.where(up, 1, -1).astype(np.int8)
        if np.all((hi - lo <= rtol * np.abs(hi)) | (f_mid == 0)):
            break
    return np.where(np.abs(f_lo) <= np.abs(f_hi), lo, hi)


def solve_ncp(power, df, level=0.95, side: str = "two-sided") -> np.ndarray:
    """The noncentrality at which the test has exactly ``power`` (positive; negative for "lower").

    ``power`` must exceed ``1 - level`` (the power at ncp 0); elsewhere the answer is nan.

    Examples
    --------
    >>> round(float(solve_ncp(0.8, 1e300, 0.95, "upper")), 6)   # normal limit: z_.95 + z_.8
    2.486475
    """
    power, df, level = np.broadcast_arrays(*(np.asarray(v, float) for v in (power, df, level)))
    sd = "upper" if side == "lower" else side  # by symmetry, solve on the upper side

    def f(ncp):
        return power_from_ncp(ncp, df, level, sd) - power

    lo = np.zeros(power.shape)
    f_lo = f(lo)
    hi = special.ndtri(1.0 - (1.0 - level) / 2.0) + special.ndtri(np.clip(power, 0.5, 1)) + 1.0
    f_hi = f(hi)
    for _ in range(60):
        short = f_hi < 0
        if not short.any():
            break
        lo, f_lo = np.where(short, hi, lo), np.where(short, f_hi, f_lo)
        hi = np.where(short, 2.0 * hi, hi)
        f_hi = np.where(short, f(hi), f_hi)
    ok = (f_lo < 0) & (f_hi >= 0)
    root = _illinois(f, lo, hi, f_lo, f_hi)
    root = np.where(ok, root, np.nan)
    return -root if side == "lower" else root


def solve_effect(n1, n2=None, *, power=0.8, level=0.95, side: str = "two-sided") -> np.ndarray:
    """Smallest standardised effect detected with ``power``, from the exact noncentral t.

    Positive for two-sided and "upper" tests, negative for "lower" tests.

    Examples
    --------
    >>> round(float(solve_effect(64, 64, power=0.8015)), 3)
    0.5
    """
    df, scale = df_and_scale(n1, n2)
    return solve_ncp(power, df, level, side) / scale


def integer_search(power_of, target, n_min: int, guess=None, n_max: int = N_MAX) -> np.ndarray:
    """Smallest whole ``n >= n_min`` with ``power_of(n) >= target``, for every grid point at once.

    ``power_of`` maps an array of whole numbers (shape of ``target``) to powers and must be
    increasing in n. Bracketing doubles an upper end until it reaches the target, then
    bisection on integers closes the bracket; both steps act on the whole grid at once.
    Points that cannot reach the target by ``n_max`` come back as nan.
    """
    target = np.asarray(target, float)
    shape = target.shape
    lo = np.full(shape, n_min - 1.0)  # invariant: power(lo) < target (n_min - 1 is a sentinel)
    hi = np.full(shape, float(n_min))
    if guess is not None:
        g = np.broadcast_to(np.floor(np.nan_to_num(np.asarray(guess, float), nan=0.0)), shape)
        g = np.clip(g, n_min, n_max)
        below = power_of(g) < target
        lo = np.where(below, g, lo)
        hi = np.where(below, np.minimum(np.ceil(g * 1.05) + 1.0, n_max), g)
    p_hi = power_of(hi)
    for _ in range(80):
        short = (p_hi < target) & (hi < n_max)
        if not short.any():
            break
        lo = np.where(short, hi, lo)
        hi = np.where(short, np.minimum(2.0 * hi + 1.0, n_max), hi)
        p_hi = np.where(short, power_of(hi), p_hi)
    reached = p_hi >= target
    for _ in range(80):
        gap = reached & (hi - lo > 1)
        if not gap.any():
            break
        mid = np.where(gap, np.floor((lo + hi) / 2.0), hi)
        ok = power_of(mid) >= target
        hi = np.where(gap & ok, mid, hi)
        lo = np.where(gap & ~ok, mid, lo)
    return np.where(reached, hi, np.nan)


def solve_n(
    effect,
    *,
    power=0.8,
    level=0.95,
    side: str = "two-sided",
    two_sample: bool = False,
    ratio: float = 1.0,
) -> np.ndarray:
    """Smallest whole (first-group) sample size whose exact power reaches ``power``.

    For two samples the second group has ``ceil(ratio * n1)`` units. Points whose target
    cannot be reached (effect zero or in the wrong direction for a one-sided test) are nan.

    Examples
    --------
    >>> solve_n([0.2, 0.5, 0.8], power=0.8, two_sample=True).tolist()
    [394.0, 64.0, 26.0]
    """
    effect, power, level = np.broadcast_arrays(
        *(np.asarray(v, float) for v in (effect, power, level))
    )

    def power_of(n1):
        n2 = second_group(n1, ratio) if two_sample else None
        return t_power(effect, n1, n2, level=level, side=side)

    alpha = 1.0 - level
    z_a = special.ndtri(1.0 - (alpha / 2.0 if side == "two-sided" else alpha))
    with np.errstate(all="ignore"):
        n_eff = ((z_a + special.ndtri(power)) / np.abs(effect)) ** 2  # normal approximation
        guess = n_eff * (1.0 + ratio) / ratio if two_sample else n_eff
    return integer_search(power_of, power, smallest_n(two_sample, ratio), guess=guess)


# ----------------------------------------------------------------------------- equivalence
_GL_NODES, _GL_WEIGHTS = np.polynomial.legendre.leggauss(96)
_TAIL = 1e-15  # chi mass left out at each end of the integration range


def equivalence_power(
    diff, low, high, n1, n2=None, *, sd=1.0, level=0.95, nodes: int | None = None
) -> np.ndarray:
    """Exact power of two one-sided t tests (TOST) for equivalence within ``(low, high)``.

    Each one-sided test is at significance ``1 - level`` (so the design declares equivalence
    when the ``2 * level - 1`` two-sided interval lies inside the margins). With
    ``k = 1/sqrt(n)`` (one sample or pairs) or ``sqrt(1/n1 + 1/n2)`` (two samples, pooled
    SD on ``df`` degrees of freedom), ``c = t(level, df)`` and ``U = s / sd`` distributed as
    ``chi(df) / sqrt(df)``, the tests both reject when
    ``low + c s k < mean difference < high - c s k``, so (Owen 1965; Phillips 1990)

        power = E[ Phi(dU - c U) - Phi(dL + c U) ; U < u_max ],
        dU = (high - diff) / (sd k),  dL = (low - diff) / (sd k),  u_max = (dU - dL) / (2 c).

    The expectation over the chi distribution is a fixed 96-point Gauss-Legendre rule on
    ``[u_lo, min(u_hi, u_max)]``, where ``u_lo`` and ``u_hi`` leave out 1e-15 of the chi mass
    at each end; the rule is evaluated for every grid point at once.

    Examples
    --------
    >>> round(float(equivalence_power(0.0, -0.5, 0.5, 40)), 4)
    0.8562
    >>> # with no upper margin it is the one-sided noncentral t power
    >>> bool(abs(equivalence_power(0.2, -0.3, np.inf, 30) - t_power(0.5, 30, side="upper")) < 1e-9)
    True
    """
    if nodes is None:
        x, w = _GL_NODES, _GL_WEIGHTS
    else:
        x, w = np.polynomial.legendre.leggauss(nodes)
    diff, low, high, sd, level = (np.asarray(v, float) for v in (diff, low, high, sd, level))
    df, scale = df_and_scale(n1, n2)  # scale = 1/k
    diff, low, high, sd, level, df, scale = np.broadcast_arrays(
        diff, low, high, sd, level, df, scale
    )
    c = dist.ppf(level, df)
    with np.errstate(all="ignore"):
        d_up = (high - diff) * scale / sd
        d_low = (low - diff) * scale / sd
        u_max = (d_up - d_low) / (2.0 * c)
        half = df / 2.0
        u_lo = np.sqrt(special.gammaincinv(half, _TAIL) / half)
        u_hi = np.sqrt(special.gammainccinv(half, _TAIL) / half)
        top = np.minimum(u_hi, u_max)
        width = np.maximum(top - u_lo, 0.0)
        # nodes mapped to [u_lo, top]; trailing axis holds the rule
        u = u_lo[..., None] + 0.5 * width[..., None] * (x + 1.0)
        # density of U = chi_df / sqrt(df): 2 df u f_chi2(df u^2)
        log_f = (
            np.log(2.0 * df[..., None])
            + np.log(u)
            + (half[..., None] - 1.0) * np.log(df[..., None] * u * u)
            - df[..., None] * u * u / 2.0
            - half[..., None] * np.log(2.0)
            - special.gammaln(half)[..., None]
        )
        g = special.ndtr(d_up[..., None] - c[..., None] * u) - special.ndtr(
            d_low[..., None] + c[..., None] * u
        )
        g = np.maximum(g, 0.0)
        out = 0.5 * width * np.sum(w * g * np.exp(log_f), axis=-1)
    return np.clip(np.where(width > 0, out, 0.0), 0.0, 1.0)


def solve_n_equivalence(
    diff, low, high, *, sd=1.0, power=0.8, level=0.95, two_sample: bool = False, ratio=1.0
) -> np.ndarray:
    """Smallest whole (first-group) sample size whose exact TOST power reaches ``power``.

    nan where the target cannot be reached (true difference on or outside a margin).

    Examples
    --------
    >>> solve_n_equivalence(0.0, -0.5, 0.5, power=0.8).tolist()
    36.0
    """
    diff, low, high, sd, power, level = np.broadcast_arrays(
        *(np.asarray(v, float) for v in (diff, low, high, sd, power, level))
    )

    def power_of(n1):
        n2 = second_group(n1, ratio) if two_sample else None
        return equivalence_power(diff, low, high, n1, n2, sd=sd, level=level)

    with np.errstate(all="ignore"):
        gap = np.minimum(high - diff, diff - low) / sd
        z = special.ndtri(level) + special.ndtri(np.clip((1.0 + power) / 2.0, 0.5, 1.0))
        n_eff = (z / gap) ** 2
        guess = np.where(gap > 0, n_eff * (1.0 + ratio) / ratio if two_sample else n_eff, np.nan)
    return integer_search(power_of, power, smallest_n(two_sample, ratio), guess=0.5 * guess)
