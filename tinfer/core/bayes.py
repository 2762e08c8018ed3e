"""The default (JZS) Bayes factor of a t test, from t, the sample size and the df alone.

Rouder, Speckman, Sun, Morey and Iverson (2009): under "a difference" the standardised
effect delta has a Cauchy prior of scale r, written as a normal with variance g r^2 and an
inverse-gamma(1/2, 1/2) mixing density p(g); the variance has Jeffreys' prior. With an
effective sample size N (n for one sample or pairs, n1 n2 / (n1 + n2) for two samples), nu
degrees of freedom and q = 1 + N g r^2, the Bayes factor for a difference over none is

    BF10 = integral over g of  q^(-1/2) [(1 + t^2 / (q nu)) / (1 + t^2 / nu)]^(-(nu+1)/2) p(g).

Given g the model is conjugate (normal-inverse-gamma), so the posterior of delta given g is
a noncentral t in disguise, and the posterior probability that delta > 0 given g is the t
area ``P(T_{nu+1} < x_g)`` with ``x_g = t sqrt((nu + 1)(q - 1) / (q nu + t^2))``. That gives
the one-sided factors of Morey and Wagenmakers (2014), prior truncated to one side, as
``BF+0 = 2 BF10 P(delta > 0 | data)`` and ``BF-0 = 2 BF10 P(delta < 0 | data)``, whose
average is BF10.

Everything is in logs: the integral is a trapezoid sum in u = log g (the integrand is
analytic and decays exponentially at both ends, so the sum converges geometrically), taken
by log-sum-exp, so |t| of 1e3 and n of 1e7 (log BF near 5e5) keep their digits.
"""

from __future__ import annotations

import numpy as np
from scipy import special

from . import distribution as dist

#: the conventional default prior scale of the standardised effect, sqrt(2) / 2
DEFAULT_SCALE = float(np.sqrt(0.5))

_STEP = 0.2  # trapezoid step in u = log g
# The window in u: it starts 12 below the peak, and no later than u = -6 (left of the peak
# the integrand may fall only like e^(u/2) until the prior's e^(-1/(2g)) takes over there),
# and runs 72 on (right of the peak it falls like e^-u).
_LEFT, _WIDTH, _LATEST_START = 12.0, 72.0, -6.0
_NODES = int(_WIDTH / _STEP) + 1
_COARSE = np.arange(-25.0, 45.0, 0.5)  # where the peak is looked for


def _log_integrand(u, t, n_eff, df, scale):
    """Log of the BF10 integrand in u = log g (the Jacobian g included)."""
    with np.errstate(over="ignore", under="ignore", divide="ignore"):
        g = np.exp(u)
        q = 1.0 + n_eff * scale * scale * g
        t2 = t * t
        ratio = np.log1p(t2 / (q * df)) - np.log1p(t2 / df)
        return (
            -0.5 * np.log(q)
            - (df + 1.0) / 2.0 * ratio
            - 0.5 * np.log(2.0 * np.pi)
            - 0.5 * u
            - 0.5 * np.exp(-u)
        )


def nodes(t, n_eff, df, scale) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The trapezoid nodes in u = log g for each test: (u, log weight, q), shape (..., K).

    ``log weight`` is the log of the integrand times the step, so that ``logsumexp`` of it
    over the last axis is log BF10.
    """
    t, n_eff, df, scale = (
        np.asarray(v, float)[..., None] for v in np.broadcast_arrays(t, n_eff, df, scale)
    )
    coarse = _log_integrand(_COARSE, t, n_eff, df, scale)
    peak = _COARSE[np.argmax(coarse, axis=-1)][..., None]
    u = np.minimum(peak - _LEFT, _LATEST_START) + _STEP * np.arange(_NODES)
    logw = _log_integrand(u, t, n_eff, df, scale) + np.log(_STEP)
    q = 1.0 + n_eff * scale * scale * np.exp(u)
    return u, logw, q


def log_bf10(t, n_eff, df, scale=DEFAULT_SCALE) -> np.ndarray:
    """Natural log of the two-sided JZS Bayes factor (difference over no difference).

    Parameters
    ----------
    t : array_like
        The t statistic (pooled, for two samples).
    n_eff : array_like
        Effective sample size: n (one sample, pairs) or n1 n2 / (n1 + n2).
    df : array_like
        Degrees of freedom: n - 1 or n1 + n2 - 2.
    scale : array_like, default sqrt(2)/2
        Scale r of the Cauchy prior on the standardised effect.

    Examples
    --------
    At t = 0 the data favour no difference, more so with more data:

    >>> bool(log_bf10(0.0, 10, 9) < 0), bool(log_bf10(0.0, 1000, 999) < log_bf10(0.0, 10, 9))
    (True, True)
    """
    return log_bayes_factor(t, n_eff, df, scale, "two-sided")


def log_bayes_factor(t, n_eff, df, scale=DEFAULT_SCALE, side: str = "two-sided") -> np.ndarray:
    """log BF10 ("two-sided"), log BF+0 ("upper": prior on delta > 0) or log BF-0 ("lower")."""
    _, logw, q = nodes(t, n_eff, df, scale)
    two = special.logsumexp(logw, axis=-1)
    if side == "two-sided":
        return two
    t, df = (np.asarray(v, float)[..., None] for v in np.broadcast_arrays(t, df))
    with np.errstate(divide="ignore", invalid="ignore"):
        x = t * np.sqrt((df + 1.0) * (q - 1.0) / (q * df + t * t))
    x = x if side == "upper" else -x  # P(delta > 0 | g) = P(T < x_g); below 0: P(T > x_g)
    share = special.logsumexp(logw + dist.log_sf(-x, df + 1.0), axis=-1) - two
    return two + np.log(2.0) + share


def log_bayes_factors(t, n_eff, df, scale=DEFAULT_SCALE) -> dict[str, np.ndarray]:
    """log BF10, log BF+0 (prior on delta > 0) and log BF-0 (prior on delta < 0).

    Examples
    --------
    The one-sided factors average to the two-sided one (Morey and Wagenmakers 2014):

    >>> f = log_bayes_factors(2.1, 20, 19)
    >>> bool(abs((np.exp(f["upper"]) + np.exp(f["lower"])) / 2 - np.exp(f["two-sided"])) < 1e-12)
    True
    """
    return {s: log_bayes_factor(t, n_eff, df, scale, s) for s in ("two-sided", "upper", "lower")}


def posterior_cdf(d, t, n_eff, df, scale=DEFAULT_SCALE, side: str = "two-sided") -> np.ndarray:
    """P(delta <= d | data) under the Cauchy prior (truncated to one side for "upper" or
    "lower"), for one test and an array of d (to about 1e-8: it sets displayed quantiles).

    Given g, delta = A + B with A = m sqrt(V), V chi-square on nu + 1 df, and B = Z / K,
    Z standard normal, K = sqrt(N + 1 / (g r^2)), K m sqrt(nu + 1) = x_g. The narrower of
    A and B is integrated numerically and the other's distribution function used exactly
    (a sum over the broader one would meet a step); g by the nodes of the Bayes-factor sum
    (every other one; weights below e^-30 of the largest dropped).
    """
    d = np.atleast_1d(np.asarray(d, float))
    u, logw, q = nodes(t, n_eff, df, scale)
    keep = logw >= logw.max() - 30.0
    keep[1::2] = False  # every other node (step 0.2 in log g) holds 1e-9 here
    u, logw, q = u[keep], logw[keep], q[keep]
    k = df + 1.0
    big_k = np.sqrt(n_eff + 1.0 / (np.exp(u) * scale * scale))
    m = t * np.sqrt((q - 1.0) / (q * df + t * t)) / big_k  # so that K m sqrt(k) = x_g
    w = np.exp(logw - logw.max())
    points = np.concatenate([d, [0.0]])  # P(delta <= 0 | g) for the one-sided priors
    cdf = np.empty((u.size, points.size))
    broad_a = np.abs(m) * _CHI_SD(k) > 1.0 / big_k
    if broad_a.any():  # outer: Z; inner: the chi-square cdf of A
        cdf[broad_a] = _outer_z(points, m[broad_a], big_k[broad_a], k)
    if (~broad_a).any():  # outer: V by a trapezoid sum in log V; inner: Phi for B
        root_v, omega = _chi_square_nodes(k)
        mm, kk = m[~broad_a][:, None, None], big_k[~broad_a][:, None, None]
        arg = kk * (points[None, None, :] - mm * root_v[None, :, None])
        cdf[~broad_a] = np.einsum("v,gvd->gd", omega, special.ndtr(arg))
    below, zero = cdf[:, :-1], cdf[:, -1]
    if side == "two-sided":
        return w @ below / w.sum()
    if side == "upper":  # delta > 0: (P(delta <= d) - P(delta <= 0)) / P(delta > 0)
        part = np.where(d[None, :] > 0, below - zero[:, None], 0.0)
        return w @ part / (w @ (1.0 - zero))
    part = np.where(d[None, :] < 0, below, zero[:, None])
    return w @ part / (w @ zero)


_LEG_X, _LEG_W = np.polynomial.legendre.leggauss(64)


def _outer_z(d: np.ndarray, m: np.ndarray, big_k: np.ndarray, k: float) -> np.ndarray:
    """P(m sqrt(V) + Z / K <= d) for each node (rows) and d (columns), Z outer.

    With c = K d and s the distance of Z from c on the side where A must make up the rest:
    m > 0 gives the integral over s > 0 of phi(c - s) F(s), m < 0 gives
    Phi(c) + the integral of phi(c + s) (1 - F(s)), with F(s) = P(chi2_k <= (s / (K m))^2).
    F is smooth on s > 0 and behaves like s^k at 0, so Gauss-Legendre on the part of
    s > 0 where phi is not negligible (its centre +-10) converges fast; there is no kink.
    """
    c = big_k[:, None] * d[None, :]
    centre = np.where(m[:, None] > 0, c, -c)
    lo = np.maximum(centre - 10.0, 0.0)
    hi = np.maximum(centre + 10.0, 0.0)
    half = (hi - lo) / 2.0
    s = (lo + hi)[..., None] / 2.0 + half[..., None] * _LEG_X
    scale = (big_k * np.abs(m))[:, None, None]
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        f = special.chdtr(k, (s / scale) ** 2)
    up = m[:, None, None] > 0
    integrand = np.where(up, _phi(c[..., None] - s) * f, _phi(c[..., None] + s) * (1.0 - f))
    part = half * (integrand @ _LEG_W)
    return np.where(m[:, None] > 0, part, special.ndtr(c) + part)


def _phi(z):
    return np.exp(-0.5 * z * z) / np.sqrt(2.0 * np.pi)


def _CHI_SD(k: float) -> float:
    """Standard deviation of the chi distribution on k df."""
    mean = np.sqrt(2.0) * np.exp(special.gammaln((k + 1) / 2) - special.gammaln(k / 2))
    return float(np.sqrt(max(k - mean * mean, 0.0)))


def _chi_square_nodes(k: float) -> tuple[np.ndarray, np.ndarray]:
    """sqrt(V) at trapezoid nodes in y = log V for V chi-square on k df, and weights
    summing to 1 (the density of y is analytic and falls off at both ends)."""
    sd = float(np.sqrt(special.polygamma(1, k / 2.0)))  # SD of log V
    peak = float(np.log(k))
    left, right = max(10.0 * sd, min(40.0 / (k / 2.0), 80.0)), 12.0 * sd
    y = np.linspace(peak - left, peak + right, 241)
    logp = k / 2.0 * y - np.exp(y) / 2.0  # up to a constant
    omega = np.exp(logp - logp.max())
    return np.exp(y / 2.0), omega / omega.sum()


def cauchy_log_pdf(d, scale, side: str = "two-sided") -> np.ndarray:
    """Log density of the Cauchy prior on delta (doubled on one side when truncated)."""
    d = np.asarray(d, float)
    out = -np.log(np.pi * scale) - np.log1p((d / scale) ** 2)
    if side == "upper":
        return np.where(d >= 0, out + np.log(2.0), -np.inf)
    if side == "lower":
        return np.where(d <= 0, out + np.log(2.0), -np.inf)
    return out
