"""Sufficient statistics of a pair of variables per group, and what experiments make of them.

For each group: n, the means of y and x, and the centred sums of squares and cross-products
``syy, sxx, sxy``. From them, without the rows:

- a ratio metric (revenue per session): the ratio of sums ``R = sum y / sum x`` with the
  delta-method variance of Deng, Knoblich and Lu (2018). Its linearisation
  ``z = R + (y - R x) / mean x`` has mean R and sum of squared deviations
  ``(syy - 2 R sxy + R^2 sxx) / mean x^2``, so :func:`ratio_summary` returns an ordinary
  :class:`~tinfer.core.summary.Summary` and Welch's test on it is the delta-method test
  with Welch-type (Satterthwaite) degrees of freedom;
- the pre-period adjustment (CUPED, Deng, Xu, Kohavi and Walker 2013):
  :func:`adjusted_arms` subtracts ``theta (x - mean x)`` with theta the within-arm pooled
  slope of y on x over the two arms, again as Summaries.

Co-moments merge exactly by the pairwise formula of Chan, Golub and LeVeque (their
cross-product term is ``dx dy na nb / n``), so chunks, partitions and warehouse sums give
the same answer as the rows.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from . import parallel
from .summary import Summary

#: The fields of :class:`Comoments`, in order.
FIELDS = ("n", "my", "mx", "syy", "sxx", "sxy")


@dataclass(frozen=True, eq=False)
class Comoments:
    """n, means of y and x, centred sums ``syy, sxx, sxy`` (arrays of one shape).

    Examples
    --------
    >>> c = Comoments.of([3.0, 5.0, 10.0], [1.0, 2.0, 3.0])
    >>> float(c.my), float(c.mx), float(c.syy), float(c.sxx), float(c.sxy)
    (6.0, 2.0, 26.0, 2.0, 7.0)
    """

    n: np.ndarray
    my: np.ndarray
    mx: np.ndarray
    syy: np.ndarray
    sxx: np.ndarray
    sxy: np.ndarray

    @classmethod
    def of(cls, y, x) -> Comoments:
        """Two-pass co-moments of paired finite values."""
        y = np.asarray(y, dtype=np.float64).ravel()
        x = np.asarray(x, dtype=np.float64).ravel()
        codes = np.zeros(y.size, dtype=np.intp)
        return grouped_comoments(y, x, codes, 1).take(0)

    @classmethod
    def from_sums(cls, n, sum_y, sum_yy, sum_x, sum_xx, sum_xy) -> Comoments:
        """From raw sums as a warehouse query returns them (``SUM(y * y)``, ...).

        Raw sums of squares cancel: the centred sums keep about ``16 - 2 log10(|mean| / sd)``
        digits, so centre large values in the query (subtract a round number) when the
        spread is small next to the mean.
        """
        n, sy, syy, sx, sxx, sxy = (
            np.asarray(v, dtype=np.float64) for v in (n, sum_y, sum_yy, sum_x, sum_xx, sum_xy)
        )
        with np.errstate(invalid="ignore", divide="ignore"):
            my, mx = sy / n, sx / n
            return cls(
                n,
                my,
                mx,
                np.maximum(syy - sy * my, 0.0),
                np.maximum(sxx - sx * mx, 0.0),
                sxy - sx * my,
            )

    def take(self, index) -> Comoments:
        """The co-moments at ``index`` of every field."""
        return Comoments(*(np.asarray(v[index]) for v in self.fields()))

    def fields(self) -> tuple[np.ndarray, ...]:
        """The six arrays, in the order of ``FIELDS``."""
        return tuple(getattr(self, f) for f in FIELDS)

    def merge(self, other: Comoments) -> Comoments:
        """Pairwise merge (Chan, Golub and LeVeque); empty groups (n = 0) are neutral.

        Examples
        --------
        >>> a, b = Comoments.of([3.0, 5.0], [1.0, 2.0]), Comoments.of([10.0], [3.0])
        >>> float(a.merge(b).sxy)
        7.0
        """
        a, b = self, other
        n = a.n + b.n
        with np.errstate(invalid="ignore", divide="ignore"):
            frac = np.where(n > 0, b.n / np.where(n > 0, n, 1.0), 0.0)
            dy = np.where((a.n > 0) & (b.n > 0), b.my - a.my, 0.0)
            dx = np.where((a.n > 0) & (b.n > 0), b.mx - a.mx, 0.0)
            w = a.n * frac
            my = np.where(a.n == 0, b.my, a.my + dy * frac)
            mx = np.where(a.n == 0, b.mx, a.mx + dx * frac)
        return Comoments(
            n,
            my,
            mx,
            a.syy + b.syy + dy * dy * w,
            a.sxx + b.sxx + dx * dx * w,
            a.sxy + b.sxy + dx * dy * w,
        )


def grouped_comoments(
    y: np.ndarray,
    x: np.ndarray,
    codes: np.ndarray,
    n_groups: int,
    counts=None,
    finite_only: bool = False,
) -> Comoments | None:
    """Co-moments of finite ``y, x`` per integer code in ``[0, n_groups)``, by bincount.

    The corrected two-pass algorithm of :func:`tinfer.core.grouped.grouped_moments` for a
    pair: first means ``m0``, deviations ``dy, dx`` from them, then ``syy = sum dy^2 -
    (sum dy)^2 / n`` and ``sxy = sum dx dy - sum dx sum dy / n``. With ``finite_only`` it
    returns None as soon as the first pass shows a non-finite value (the caller masks).

    Examples
    --------
    >>> c = grouped_comoments(np.array([3.0, 5.0, 10.0, 1.0]), np.array([1.0, 2.0, 3.0, 7.0]),
    ...                       np.array([0, 0, 0, 1]), 2)
    >>> c.sxy.tolist(), c.mx.tolist()
    ([7.0, 0.0], [2.0, 7.0])
    """
    c = np.asarray(codes)
    if counts is None:
        counts = np.bincount(c, minlength=n_groups)
    n = counts.astype(np.float64)
    safe = np.where(n > 0, n, 1.0)

    def sums(v):
        with np.errstate(over="ignore", invalid="ignore"):
            return np.bincount(c, weights=v, minlength=n_groups)

    def deviations(v, total):
        """v minus its group's first mean; the deviations' sum and sum of squares."""
        with np.errstate(invalid="ignore", over="ignore"):
            dev = np.take(total / safe, c)
            np.subtract(v, dev, out=dev)
            s1 = np.bincount(c, weights=dev, minlength=n_groups)
            sq = np.bincount(c, weights=np.square(dev), minlength=n_groups)
        return dev, s1, sq

    sum_y, sum_x = both(sums, y, x, c.size)
    if finite_only and not (np.isfinite(sum_y).all() and np.isfinite(sum_x).all()):
        return None
    (dy, s1y, syy), (dx, s1x, sxx) = both(deviations, (y, sum_y), (x, sum_x), c.size)
    with np.errstate(invalid="ignore", over="ignore"):
        np.multiply(dx, dy, out=dx)
        sxy = np.bincount(c, weights=dx, minlength=n_groups)
        del dx, dy
        cy, cx = s1y / safe, s1x / safe
        return Comoments(
            n,
            np.where(n > 0, sum_y / safe + cy, np.nan),
            np.where(n > 0, sum_x / safe + cx, np.nan),
            np.maximum(syy - s1y * cy, 0.0),
            np.maximum(sxx - s1x * cx, 0.0),
            sxy - s1x * cy,
        )


def both(func, first, second, size: int):
    """``(func(*first), func(*second))``, on two threads for long inputs (numpy's bincount
    and ufuncs release the GIL for much of their work)."""
    a = first if isinstance(first, tuple) else (first,)
    b = second if isinstance(second, tuple) else (second,)
    if size < 1_000_000 or parallel.workers() < 2:
        return func(*a), func(*b)
    other = parallel.pool(2).submit(func, *b)
    return func(*a), other.result()


def ratio_summary(c: Comoments) -> Summary:
    """The ratio of sums ``sum y / sum x`` as a Summary of its linearised values.

    Mean R, and ssd ``(syy - 2 R sxy + R^2 sxx) / mean x^2``: ``ssd / (n - 1) / n`` is the
    delta-method variance of R (Deng, Knoblich and Lu 2018). Where the mean of x is not
    above 0 the ratio is undefined and the mean is NaN.

    Examples
    --------
    >>> s = ratio_summary(Comoments.of([3.0, 5.0, 10.0], [1.0, 2.0, 3.0]))
    >>> float(s.mean), round(float(s.ssd), 6)
    (3.0, 0.5)
    """
    with np.errstate(invalid="ignore", divide="ignore"):
        ok = c.mx > 0
        r = np.where(ok, c.my / np.where(ok, c.mx, 1.0), np.nan)
        ssd = (c.syy - 2.0 * r * c.sxy + r * r * c.sxx) / (c.mx * c.mx)
    return Summary(np.asarray(c.n), np.asarray(r), np.maximum(np.asarray(ssd), 0.0))


@dataclass(frozen=True, eq=False)
class Adjusted:
    """The two arms after the CUPED adjustment, with theta and the share of variance removed."""

    first: Summary
    second: Summary
    theta: np.ndarray
    removed: np.ndarray
    adjusted: np.ndarray  # False where x does not vary within the arms (theta 0: unadjusted)
    centre: np.ndarray  # the mean of x over both arms


def adjusted_arms(a: Comoments, b: Comoments) -> Adjusted:
    """CUPED on two arms (arrays over segments): ``y - theta (x - mean x)``.

    Theta is ``(sxy_a + sxy_b) / (sxx_a + sxx_b)``, the within-arm pooled slope, so the
    adjusted difference equals the arm coefficient of the least-squares fit of y on arm and
    x; ``mean x`` is over both arms. ``removed`` is the share of the within-arm variance of y
    that x explains, ``sxy^2 / (sxx syy)`` pooled. Where x does not vary within the arms
    nothing can be adjusted: theta is 0 there and ``adjusted`` False.

    Examples
    --------
    >>> a = Comoments.of([3.0, 5.0, 10.0], [1.0, 2.0, 3.0])
    >>> b = Comoments.of([2.0, 6.0], [1.0, 3.0])
    >>> adj = adjusted_arms(a, b)
    >>> round(float(adj.theta), 4), round(float(adj.first.mean - adj.second.mean), 4)
    (2.75, 2.0)
    """
    sxy, sxx, syy = a.sxy + b.sxy, a.sxx + b.sxx, a.syy + b.syy
    with np.errstate(invalid="ignore", divide="ignore"):
        adjusted = sxx > 0
        theta = np.where(adjusted, sxy / np.where(adjusted, sxx, 1.0), 0.0)
        centre = (a.n * a.mx + b.n * b.mx) / (a.n + b.n)
        removed = np.where(syy > 0, theta * sxy / np.where(syy > 0, syy, 1.0), 0.0)

    def arm(c: Comoments) -> Summary:
        mean = c.my - theta * (c.mx - centre)
        ssd = np.maximum(c.syy - 2.0 * theta * c.sxy + theta * theta * c.sxx, 0.0)
        return Summary(np.asarray(c.n), np.asarray(mean), np.asarray(ssd))

    return Adjusted(
        arm(a),
        arm(b),
        np.asarray(theta),
        np.asarray(removed),
        np.asarray(adjusted),
        np.asarray(centre),
    )
