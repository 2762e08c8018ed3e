"""Sufficient statistics for t procedures: count, mean and sum of squared deviations.

Variances come from a two-pass algorithm (mean first, then squared deviations from it);
summaries of separate chunks merge by the pairwise formula of Chan, Golub and LeVeque
(1979, 1983), never through raw sums of squares, so large means with small spreads keep
their digits.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np


@dataclass(frozen=True, eq=False)
class Summary:
    """Count, mean and sum of squared deviations of one or many samples.

    Each field is a float array (0-d for a single sample) so that the core can run many
    tests at once. ``mean_lo`` (optional) is the rounding remainder of ``mean``, so that
    ``mean + mean_lo`` is the mean to about twice double precision; the t procedures use it
    in differences of means, which then keep their digits for means near 1e9.

    Examples
    --------
    >>> s = Summary.of([4.0, 5.0, 9.0])
    >>> float(s.n), float(s.mean), float(s.ssd), float(s.sd)
    (3.0, 6.0, 14.0, 2.6457513110645907)
    """

    n: np.ndarray
    mean: np.ndarray
    ssd: np.ndarray
    mean_lo: np.ndarray | None = None

    @classmethod
    def of(cls, values) -> Summary:
        """Two-pass summary of a one-dimensional array of finite values.

        The corrected two-pass algorithm (Chan, Golub and LeVeque 1983, eq. 1.7): a first
        mean ``m0``, deviations ``e = x - m0``, then mean ``m0 + sum(e) / n`` (kept with its
        rounding remainder in ``mean_lo``) and ssd ``sum(e^2) - sum(e)^2 / n``.
        """
        x = np.asarray(values, dtype=np.float64).ravel()
        if x.size == 0:  # no values (all missing): callers report it, numpy need not warn
            nan = np.asarray(np.nan)
            return cls(np.asarray(0.0), nan, np.asarray(0.0), np.asarray(0.0))
        with np.errstate(over="ignore", invalid="ignore", under="ignore"):  # callers check
            m0 = x.mean()
            s1, ss = _deviation_sums(x, m0)
            corr = s1 / x.size
            ssd = max(ss - s1 * corr, 0.0)
            mean = m0 + corr
            lo = (m0 - mean) + corr  # exact remainder (Fast2Sum: |corr| is tiny next to m0)
        return cls(np.asarray(float(x.size)), np.asarray(mean), np.asarray(ssd), np.asarray(lo))

    @classmethod
    def from_moments(cls, n, mean, sd) -> Summary:
        """Summary from published n, mean and standard deviation (n - 1 denominator)."""
        n = np.asarray(n, dtype=np.float64)
        sd = np.asarray(sd, dtype=np.float64)
        return cls(n, np.asarray(mean, dtype=np.float64), sd * sd * (n - 1.0))

    @property
    def var(self) -> np.ndarray:
        """Sample variance with the n - 1 denominator."""
        return self.ssd / (self.n - 1.0)

    @property
    def sd(self) -> np.ndarray:
        """Sample standard deviation with the n - 1 denominator."""
        return np.sqrt(self.var)

    @property
    def se(self) -> np.ndarray:
        """Standard error of the mean."""
        return np.sqrt(self.var / self.n)

    def merge(self, other: Summary) -> Summary:
        """Combine with the summary of another chunk (Chan, Golub and LeVeque).

        Examples
        --------
        >>> a, b = Summary.of([1e9 + 1, 1e9 + 2]), Summary.of([1e9 + 3])
        >>> float(a.merge(b).ssd)
        2.0
        """
        return merge(self, other)


def merge(a: Summary, b: Summary) -> Summary:
    """Pairwise merge of two summaries; empty summaries (n = 0) are neutral."""
    n = a.n + b.n
    with np.errstate(invalid="ignore", divide="ignore"):
        delta = b.mean - a.mean
        frac = np.where(n > 0, b.n / np.where(n > 0, n, 1.0), 0.0)
        mean = np.where(a.n == 0, b.mean, np.where(b.n == 0, a.mean, a.mean + delta * frac))
        ssd = a.ssd + b.ssd + np.where(n > 0, delta * delta * a.n * frac, 0.0)
    ssd = np.where((a.n == 0) | (b.n == 0), a.ssd + b.ssd, ssd)
    return Summary(np.asarray(n), np.asarray(mean), np.asarray(ssd))


#: Values per block of the second pass: the deviations of a block fit in the cache, so no
#: array the size of the data is made.
BLOCK = 1 << 15


def _deviation_sums(x: np.ndarray, m0: float) -> tuple[float, float]:
    """``sum(x - m0)`` and ``sum((x - m0)^2)`` block by block, with one small buffer."""
    if x.size <= BLOCK:
        dev = x - m0
        return float(dev.sum()), float(dev @ dev)
    buf = np.empty(BLOCK)
    s1 = ss = 0.0
    for start in range(0, x.size, BLOCK):
        part = x[start : start + BLOCK]
        dev = np.subtract(part, m0, out=buf[: part.size])
        s1 += float(dev.sum())
        ss += float(dev @ dev)
    return s1, ss
