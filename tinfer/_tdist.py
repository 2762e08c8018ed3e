"""The t distribution as an object: ``tinfer.tdist(df)``."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ._validation import check_df, check_level, check_probability, check_side
from .core import distribution as dist


@dataclass(frozen=True)
class TDistribution:
    """Student's t distribution with ``df`` degrees of freedom (``math.inf`` for the normal).

    Examples
    --------
    >>> import tinfer
    >>> t12 = tinfer.tdist(12)
    >>> round(t12.area(low=-1, high=2), 6)
    0.797148
    >>> round(t12.critical(0.95), 4)
    2.1788
    >>> tinfer.tdist(20).variance == 20 / 18
    True
    """

    df: float

    def __post_init__(self) -> None:
        object.__setattr__(self, "df", check_df(self.df, "tdist"))

    def pdf(self, x):
        """Density at ``x`` (a number or an array)."""
        return _out(dist.pdf(x, self.df))

    def cdf(self, x):
        """P(T <= x)."""
        return _out(dist.cdf(x, self.df))

    def sf(self, x):
        """P(T > x), computed without subtracting from 1."""
        return _out(dist.sf(x, self.df))

    def area(self, low: float | None = None, high: float | None = None):
        """P(low < T < high); leave a bound out for a single tail.

        Each piece is taken from the tail it lies in, so small areas keep their digits.
        """
        lo = -np.inf if low is None else np.asarray(low, float)
        hi = np.inf if high is None else np.asarray(high, float)
        lo, hi = np.broadcast_arrays(np.asarray(lo, float), np.asarray(hi, float))
        if np.any(lo > hi):
            raise ValueError("area() needs low <= high.")
        upper_side = lo >= 0  # both bounds in the upper half: difference of upper tails
        lower_side = hi <= 0
        a = np.where(
            upper_side,
            dist.sf(lo, self.df) - dist.sf(hi, self.df),
            np.where(
                lower_side,
                dist.cdf(hi, self.df) - dist.cdf(lo, self.df),
                1.0 - dist.cdf(lo, self.df) - dist.sf(hi, self.df),
            ),
        )
        return _out(np.maximum(a, 0.0))

    def percentile(self, q):
        """The value with lower-tail area ``q`` (0 < q < 1)."""
        q_arr = np.asarray(q, float)
        if np.any(~((q_arr > 0) & (q_arr < 1))):
            check_probability(q, "q", "percentile")
        return _out(dist.ppf(q_arr, self.df))

    def critical(self, level: float = 0.95, side: str = "two-sided") -> float:
        """Critical value at significance ``1 - level``.

        Two-sided: the positive c with P(abs(T) > c) = 1 - level (reject when abs(t) > c).
        "upper": c with P(T > c) = 1 - level. "lower": the negative c with P(T < c) = 1 - level.
        """
        level = check_level(level, "critical")
        side = check_side(side, "critical")
        return float(dist.critical(self.df, level, side))

    @property
    def mean(self) -> float:
        """0 for df > 1; undefined (nan) for df <= 1."""
        return 0.0 if self.df > 1 else math.nan

    @property
    def median(self) -> float:
        """0 for every df (the density is symmetric about 0)."""
        return 0.0

    @property
    def variance(self) -> float:
        """df / (df - 2) for df > 2; infinite for 1 < df <= 2; undefined (nan) for df <= 1."""
        if self.df <= 1:
            return math.nan
        if self.df <= 2:
            return math.inf
        return 1.0 if math.isinf(self.df) else self.df / (self.df - 2.0)

    @property
    def sd(self) -> float:
        """Square root of the variance."""
        return math.sqrt(self.variance)

    def __str__(self) -> str:
        df = "∞ (standard normal)" if math.isinf(self.df) else f"{self.df:g}"
        return f"t distribution, df = {df}"

    def _repr_mimebundle_(self, include=None, exclude=None):
        from .display.render import mimebundle

        return mimebundle(self)


def _out(a):
    a = np.asarray(a)
    return float(a) if a.ndim == 0 else a


def tdist(df: float) -> TDistribution:
    """Student's t distribution with ``df`` degrees of freedom (non-integer allowed; ``math.inf``
    gives the standard normal)."""
    return TDistribution(df)
