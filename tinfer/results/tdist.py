"""The t distribution as an object, ``tinfer.tdist(df)``, and a view of it with an area.

Numbers come from :mod:`tinfer.core.distribution`; the words (areas in symbols, moments
with the df conditions under which they exist) are here; the card and chart are in
:mod:`tinfer.display.tdist`.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from ..checks import check_df, check_level, check_side, fail, is_real, shown
from ..core import distribution as dist
from ..errors import ParameterError
from .card import Card
from .format import fmt_df, fmt_num, fmt_p


@dataclass(frozen=True)
class TDistribution(Card):
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
        lo = -np.inf if low is None else _bounds(low, "low", "area")
        hi = np.inf if high is None else _bounds(high, "high", "area")
        lo, hi = np.broadcast_arrays(np.asarray(lo, float), np.asarray(hi, float))
        if np.any(lo > hi):
            raise ParameterError(
                f"The 'low' parameter of area must be at most 'high'. Got low={shown(low)} "
                f"and high={shown(high)} instead."
            )
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
        q_arr = _numbers(q, "q", "percentile", "a probability in (0, 1)")
        if np.any(~((q_arr > 0) & (q_arr < 1))):
            raise fail("q", "percentile", "a probability in (0, 1)", q)
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

    def explore(self):
        """Sliders for df (or the normal) and for a shaded area, with the area shown live.

        Returns an ipywidgets VBox; the view shown (distribution, bounds, percentiles) is
        kept in its ``result`` attribute and the shaded area in ``area``. Needs ipywidgets.

        Examples
        --------
        >>> import tinfer
        >>> ex = tinfer.tdist(12).explore()
        >>> ex.bounds.value = (-1.0, 2.0)
        >>> round(ex.area, 6)
        0.797148
        """
        from ..display.widgets import explore_tdist

        return explore_tdist(self)

    def chart(
        self,
        low: float | None = None,
        high: float | None = None,
        percentiles: Sequence[float] = (0.025, 0.975),
        normal: bool = True,
    ):
        """Altair chart of the density with P(low < T < high) shaded and percentiles marked.

        Leave ``low`` or ``high`` out for a tail, both out for no shading; ``normal`` adds the
        standard normal density (dashed) for comparison. The chart is returned, not shown.

        Examples
        --------
        >>> import tinfer
        >>> type(tinfer.tdist(8).chart(low=2.0)).__name__
        'LayerChart'
        """
        from ..display.tdist import tdist_chart

        return tdist_chart(self, low, high, percentiles, normal)

    def show(
        self,
        low: float | None = None,
        high: float | None = None,
        percentiles: Sequence[float] = (0.025, 0.975),
    ) -> TDistView:
        """A displayable card of this distribution with an area and percentiles.

        Leave it last in a notebook cell to see the card (area, percentiles, moments and
        chart); ``str()`` gives the same in plain text. Displaying the distribution itself
        shows the card without an area.

        Examples
        --------
        >>> import tinfer
        >>> print(tinfer.tdist(12).show(low=-1, high=2, percentiles=(0.975,)))
        t distribution, df = 12
          area P(−1 < T < 2) = 0.797
          97.5% percentile: 2.1788
          mean: 0 (exists for df > 1)
          variance: 1.2 (df / (df − 2), finite for df > 2)
          SD: 1.095
          median: 0 (every df)
        """
        for name, v in (("low", low), ("high", high)):
            if v is not None and not (is_real(v) and not math.isnan(v)):
                raise fail(name, "show", "a number (or None for an open side)", v)
        if low is not None and high is not None and low > high:
            raise ParameterError(
                f"The 'low' parameter of show must be at most 'high'. Got low={shown(low)} and "
                f"high={shown(high)} instead."
            )
        return TDistView(self, low, high, tuple(float(q) for q in percentiles))


@dataclass(frozen=True)
class TDistView(Card):
    """A t distribution with an area and percentiles to show; made by ``TDistribution.show``.

    Attributes
    ----------
    dist : TDistribution
    low, high : float or None
        Bounds of the area (None: open on that side).
    percentiles : tuple of float
        Lower-tail probabilities whose values are listed and marked.
    """

    dist: TDistribution
    low: float | None = None
    high: float | None = None
    percentiles: tuple[float, ...] = (0.025, 0.975)

    @property
    def area(self) -> float | None:
        """P(low < T < high), or None when neither bound is given."""
        if self.low is None and self.high is None:
            return None
        return float(self.dist.area(low=self.low, high=self.high))

    @property
    def values(self) -> tuple[float, ...]:
        """The values at ``percentiles``."""
        return tuple(float(self.dist.percentile(q)) for q in self.percentiles)

    def chart(self, normal: bool = True):
        """The Altair chart of this view (see ``TDistribution.chart``).

        Examples
        --------
        >>> import tinfer
        >>> type(tinfer.tdist(6).show(high=-1.5).chart()).__name__
        'LayerChart'
        """
        return self.dist.chart(self.low, self.high, self.percentiles, normal)

    @property
    def area_words(self) -> str:
        """The area in symbols, e.g. "P(-1 < T < 2)"."""
        return area_words(self.low, self.high)

    def lines(self) -> list[str]:
        """The plain-text lines of this view (also its ``str``)."""
        lines = [str(self.dist)]
        if self.low is not None or self.high is not None:
            lines.append(f"  area {self.area_words} = {fmt_p(float(self.area))}")
        for q, v in zip(self.percentiles, self.values, strict=True):
            lines.append(f"  {100 * q:.4g}% percentile: {fmt_num(v, 4)}")
        lines.extend(f"  {k}: {v}" for k, v in moments(self.dist))
        return lines

    def __str__(self) -> str:
        return "\n".join(self.lines())


def _out(a):
    a = np.asarray(a)
    return float(a) if a.ndim == 0 else a


def tdist(df: float) -> TDistribution:
    """Student's t distribution with ``df`` degrees of freedom (non-integer allowed; ``math.inf``
    gives the standard normal)."""
    return TDistribution(df)


def area_words(low: float | None, high: float | None) -> str:
    """The requested area in symbols, e.g. ``P(-1 < T < 2)``.

    >>> area_words(None, 2.0), area_words(-1.0, 2.0)
    ('P(T < 2)', 'P(−1 < T < 2)')
    """
    if low is None and high is None:
        return "P(−∞ < T < ∞)"
    if low is None:
        return f"P(T < {fmt_num(high)})"
    if high is None:
        return f"P(T > {fmt_num(low)})"
    return f"P({fmt_num(low)} < T < {fmt_num(high)})"


def moments(distribution: TDistribution) -> list[tuple[str, str]]:
    """Mean, variance, SD and median with the df conditions under which they exist.

    >>> moments(tdist(1.5))[1]
    ('variance', 'infinite (finite only for df > 2)')
    """
    df = distribution.df
    mean = "0 (exists for df > 1)" if df > 1 else "undefined (exists only for df > 1)"
    if math.isinf(df):
        var = "1 (standard normal)"
    elif df > 2:
        var = f"{fmt_num(distribution.variance)} (df / (df − 2), finite for df > 2)"
    elif df > 1:
        var = "infinite (finite only for df > 2)"
    else:
        var = "undefined (finite only for df > 2)"
    sd_val = distribution.sd
    if math.isnan(sd_val):
        sd = "undefined (finite only for df > 2)"
    elif math.isinf(sd_val):
        sd = "infinite (finite only for df > 2)"
    else:
        sd = fmt_num(sd_val)
    return [("mean", mean), ("variance", var), ("SD", sd), ("median", "0 (every df)")]


def df_words(df: float) -> str:
    """df as shown on cards: "12", "20.73" or "∞ (standard normal)"."""
    return "∞ (standard normal)" if math.isinf(df) else fmt_df(df)


def _numbers(value, name: str, func: str, what: str) -> np.ndarray:
    """A number or an array of numbers as floats; strings, bools and objects are refused."""
    arr = np.asarray(value)
    if arr.dtype.kind not in "iuf" or (arr.ndim == 0 and not is_real(value)):
        raise fail(name, func, what, value)
    return arr.astype(float)


def _bounds(value, name: str, func: str) -> np.ndarray:
    """Bounds of an area: numbers, never NaN (leave a bound out for an open side)."""
    arr = _numbers(value, name, func, "a number or an array of numbers (None for an open side)")
    if np.isnan(arr).any():
        raise fail(name, func, "a number, not NaN (None for an open side)", value)
    return arr
