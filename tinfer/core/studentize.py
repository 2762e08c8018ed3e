"""A normal-theory tail "studentized": ``E_S[G(c S)]`` with ``S = sqrt(chi2(df) / df)``.

Statistics such as the studentized range or the largest of several t statistics divide a
normal-theory quantity by the common estimate of the SD, ``S``. Their upper tail at ``c``
is the average of the normal-theory tail ``G`` at ``c S`` over the distribution of ``S``.
:func:`tail` computes it for arrays of ``c`` and df, given ``log G`` and a cheap upper bound
of it; :func:`solve` inverts such a tail for critical values. Used by
:mod:`tinfer.core.simultaneous`.

The integral runs over ``x = log S`` with Gauss-Legendre panels placed where the integrand
lives: a coarse look with the bound of ``G`` first, then panels on the stretch that holds
the mass, in ``x`` left of the peak (where the integrand falls like ``e^(df x)``) and in
``s`` right of it (where it falls like ``exp(-rate s^2)``). Accuracy is checked in
``tests/core/test_simultaneous.py``.
"""

from __future__ import annotations

import numpy as np
from scipy import special

from . import distribution as dist
from . import parallel

GL16 = np.polynomial.legendre.leggauss(16)
_LOG_FLOOR = -745.0  # exp of anything below is zero in float64
_CUT = 46.0  # the integrand is dropped where it is e^-46 (1e-20) below its peak
CHUNK = 1024  # values per chunk of the integral (threads share the chunks)
BUCKETS = (2, 4, 8, 16, 32)  # panel counts of the integral (64 above them)
HALF_LOG_2PI = 0.5 * np.log(2.0 * np.pi)
LOCAL_DF = 50.0  # from this df on, S is concentrated enough to look only near its peak


# ---------------------------------------------------------------- the distribution of log S
def _stirling_remainder(a: np.ndarray) -> np.ndarray:
    """``lgamma(a) - ((a - 1/2) log a - a + log(2 pi) / 2)``, accurate for every a > 0."""
    big = a >= 20.0
    ab = np.where(big, a, 20.0)
    z = 1.0 / (ab * ab)
    series = (1.0 / 12.0 - z * (1.0 / 360.0 - z * (1.0 / 1260.0 - z / 1680.0))) / ab
    small = np.where(big, 1.0, a)
    direct = special.gammaln(small) - ((small - 0.5) * np.log(small) - small + HALF_LOG_2PI)
    return np.where(big, series, direct)


_INV_FACT = [1.0 / np.prod(np.arange(1.0, n + 1)) for n in range(12)]


def _expm1_minus(u: np.ndarray) -> np.ndarray:
    """``exp(u) - 1 - u`` without cancellation near 0 (the Taylor series below 0.1)."""
    u = np.asarray(u, float)
    with np.errstate(over="ignore"):
        out = np.atleast_1d(np.expm1(u) - u)
    near = np.abs(u) < 0.1
    if near.any():
        v = u[near]
        acc = np.full(v.shape, _INV_FACT[11])
        for n in range(10, 1, -1):
            acc = acc * v + _INV_FACT[n]
        out[near] = acc * v * v
    return out.reshape(u.shape)


def _log_s_const(df) -> np.ndarray:
    """``log 2 + (df/2) log(df/2) - lgamma(df/2) - df/2`` by Stirling's remainder."""
    a = np.asarray(df, float) / 2.0
    return np.log(2.0) + 0.5 * np.log(a) - HALF_LOG_2PI - _stirling_remainder(a)


def log_s_density(x, df) -> np.ndarray:
    """Log density of ``log S`` at ``x``, for ``S = sqrt(chi2(df) / df)``.

    ``log 2 + (df/2) log(df/2) - lgamma(df/2) + df x - (df/2) e^(2x)``, rearranged with
    Stirling's remainder and ``exp(u) - 1 - u`` so that nothing cancels at large df.

    Examples
    --------
    >>> from scipy import integrate
    >>> round(integrate.quad(lambda x: np.exp(log_s_density(x, 7.0)), -30, 5)[0], 12)
    1.0
    """
    x, df = np.asarray(x, float), np.asarray(df, float)
    return _log_s_const(df) - (df / 2.0) * _expm1_minus(2.0 * x)


# ---------------------------------------------------------------- the outer integral
def _outer(c, df, log_g, log_bound, beta):
    """``P = E_S[G(c S)]`` for arrays ``c`` and ``df`` of one shape (finite df).

    ``log_g(r, idx)`` returns ``log G`` at ``r`` (shape (len(idx), nodes)) for the values
    ``idx``; ``log_bound(r, idx)`` an upper bound of it that is cheap to evaluate; ``beta``
    the Gaussian rate of G's tail, ``log G(r) ~ -beta r^2``, which places the peak.
    """
    c, df = np.broadcast_arrays(np.asarray(c, float), np.asarray(df, float))
    shape = c.shape
    c, df = c.ravel(), df.ravel()
    idx = np.arange(c.size)
    sig = 1.0 / np.sqrt(2.0 * df)
    with np.errstate(divide="ignore"):
        peak = -0.5 * np.log1p(2.0 * beta * c * c / df)
    lo = -(-_LOG_FLOOR + 10.0) / df - 1.0
    hi = np.minimum(np.sqrt(800.0 / df), 0.5 * np.log(1600.0 / df + 9.0))
    steps = np.linspace(-12.0, 12.0, 13)
    # near the two places the mass can centre on (0, where S peaks, and the Gaussian-tail
    # estimate of the product's peak); at small df also across the whole range of log S,
    # whose exponential left tail can carry the mass far out
    wide = 24 if (df < LOCAL_DF).any() else 0
    coarse = np.concatenate(
        [
            lo[:, None] + (hi - lo)[:, None] * np.linspace(0.0, 1.0, wide),
            steps * sig[:, None],
            peak[:, None] + steps * sig[:, None],
        ],
        axis=1,
    )
    coarse.sort(axis=1)
    with np.errstate(over="ignore", under="ignore"):
        r = c[:, None] * np.exp(coarse)
    const, half = _log_s_const(df)[:, None], (df / 2.0)[:, None]
    val = log_bound(r, idx) + (const - half * _expm1_minus(2.0 * coarse))
    top = val.max(axis=1, keepdims=True)
    inside = val >= top - _CUT
    first = np.argmax(inside, axis=1)
    last = inside.shape[1] - 1 - np.argmax(inside[:, ::-1], axis=1)
    rows = np.arange(c.size)
    a = coarse[rows, np.maximum(first - 1, 0)]
    b = coarse[rows, np.minimum(last + 1, inside.shape[1] - 1)]
    mid = np.minimum(coarse[rows, np.argmax(val, axis=1)] + np.minimum(2.0 * sig, 0.1), b)
    # Left of the peak (and a little past it) the integrand falls like e^(df x) far out and
    # like a Gaussian of width sig near the peak; it is integrated in x, in panels of at
    # most 6 sig and, where the exponential fall matters (small df), at most 10 / df.
    # Right of it the integrand falls like exp(-rate s^2), a Gaussian of width tau in s,
    # and is integrated in s = e^x, in panels of at most 6 tau (or a fall of e^10 where
    # that is wider), and at most a doubling of s. 16 nodes integrate each to rounding.
    rate = df / 2.0 + beta * c * c
    tau = 1.0 / np.sqrt(2.0 * rate)
    s0, s1 = np.exp(mid), np.exp(b)
    left = np.ceil(
        (mid - a)
        / np.where(df >= 20.0, 6.0 * sig, np.minimum(6.0 * sig, np.maximum(10.0 / df, 2.0 * sig)))
    )
    width = np.where(
        df >= 20.0, 6.0 * tau, np.minimum(6.0 * tau, np.maximum(5.0 / (rate * s1), 2.0 * tau))
    )
    right = np.ceil((s1 - s0) / np.minimum(np.minimum(6.0 * sig, 1.0) * s0, width))
    total = np.zeros(c.size)
    for lo_edge, hi_edge, need, in_s in ((a, mid, left, False), (s0, s1, right, True)):
        count = np.select([need <= 2, need <= 4, need <= 8, need <= 16, need <= 32], BUCKETS, 64)
        for pieces in np.unique(count):
            sel = np.flatnonzero(count == pieces)
            nodes, weights = panels(lo_edge[sel], hi_edge[sel], int(pieces), GL16)
            if in_s:
                weights = weights / nodes
                nodes = np.log(nodes)
            with np.errstate(over="ignore", under="ignore"):
                r = c[sel, None] * np.exp(nodes)
            logs = log_g(r, idx[sel]) + (const[sel] - half[sel] * _expm1_minus(2.0 * nodes))
            with np.errstate(under="ignore"):
                total[sel] += np.sum(weights * np.exp(logs), axis=1)
    return total.reshape(shape)


def panels(a, b, count, rule):
    """Composite Gauss-Legendre nodes and weights on ``[a_i, b_i]``, ``count`` equal panels."""
    x, w = rule
    width = (b - a) / count
    starts = a[:, None] + width[:, None] * np.arange(count)
    nodes = starts[:, :, None] + (width[:, None, None] / 2.0) * (x + 1.0)
    weights = np.broadcast_to((width[:, None, None] / 2.0) * w, nodes.shape)
    return nodes.reshape(a.size, -1), weights.reshape(a.size, -1)


def tail(c, df, log_g, log_bound, beta):
    """``E_S[G(cS)]`` for ``c >= 0``; ``df = inf`` and ``c = 0`` need only ``G(c)``."""
    c, df = np.broadcast_arrays(np.asarray(c, float), np.asarray(df, float))
    out = np.ones(c.shape)
    normal = (np.isinf(df) | (c == 0)) & np.isfinite(c)
    if normal.any():
        idx = np.flatnonzero(normal)
        with np.errstate(under="ignore"):
            out[normal] = np.exp(log_g(c[normal][:, None], idx))[:, 0]
    finite = np.isfinite(df) & (c > 0) & np.isfinite(c)
    if finite.any():
        idx = np.flatnonzero(finite)

        def part(s: slice) -> np.ndarray:
            here = idx[s]
            g = lambda r, rows: log_g(r, here[rows])  # noqa: E731
            bound = lambda r, rows: log_bound(r, here[rows])  # noqa: E731
            return _outer(c.flat[here], df.flat[here], g, bound, beta)

        out[finite] = parallel.chunked(part, idx.size, CHUNK, 2 * CHUNK)
    out[np.isinf(c) & (c > 0)] = 0.0
    out[np.isnan(c) | np.isnan(df)] = np.nan
    return np.minimum(out, 1.0)


def t_upper(p, df) -> np.ndarray:
    """The upper ``p`` point of Student's t (normal for infinite df)."""
    return dist.isf(p, df)


def solve(tail, alpha, low, high, iterations: int = 60) -> np.ndarray:
    """``c`` with ``tail(c) = alpha``, tail decreasing, bracketed by [low, high].

    The Illinois method on ``log c`` against ``log tail - log alpha`` (regula falsi where the
    end kept twice in a row has its value halved, which keeps convergence superlinear),
    each round on the unfinished values only. ``tail`` takes the values and their indices.
    A value is finished when ``log tail`` is within 5e-14 of ``log alpha``.
    """
    low, high = np.broadcast_arrays(np.asarray(low, float), np.asarray(high, float))
    shape = low.shape
    low, high = low.ravel(), high.ravel()
    log_alpha = np.broadcast_to(np.log(np.asarray(alpha, float)), shape).ravel()

    def f(x, idx):
        with np.errstate(divide="ignore"):
            return np.log(tail(np.exp(x), idx)) - log_alpha[idx]

    every = np.arange(low.size)
    a, b = np.log(low), np.log(high * (1.0 + 1e-12))
    fa, fb = f(a, every), f(b, every)
    for _ in range(iterations):
        todo = np.flatnonzero((np.abs(fb) > 5e-14) & (np.abs(b - a) > 4e-16 * np.abs(b)))
        if todo.size == 0:
            break
        at, bt, fat, fbt = a[todo], b[todo], fa[todo], fb[todo]
        with np.errstate(invalid="ignore", divide="ignore"):
            x = (at * fbt - bt * fat) / (fbt - fat)
        inside = np.isfinite(x) & (x > np.minimum(at, bt)) & (x < np.maximum(at, bt))
        x = np.where(inside, x, (at + bt) / 2.0)
        fx = f(x, todo)
        same = np.sign(fx) == np.sign(fbt)
        fa[todo] = np.where(same, fat / 2.0, fbt)
        a[todo] = np.where(same, at, bt)
        b[todo], fb[todo] = x, fx
    return np.exp(b).reshape(shape)
