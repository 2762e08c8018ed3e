"""Sufficient statistics of many groups in one pass over the rows.

Given float values and an integer group code per row, :func:`grouped_summary` returns the
:class:`~tinfer.core.summary.Summary` (count, mean, sum of squared deviations) of every
group. It uses the corrected two-pass algorithm (Chan, Golub and LeVeque 1983, eq. 1.7):

1. counts and sums per group give a first mean ``m0``;
2. deviations ``d = x - m0[group]`` give ``s1 = sum d`` and ``s2 = sum d^2`` per group;
3. mean = ``m0 + s1 / n`` and ssd = ``s2 - s1^2 / n``.

The second pass works on deviations, never on raw squares, so values near 1e9 with unit
noise keep their digits; the ``s1`` term repairs the rounding of the first mean, which
makes the mean exact to a few units in the last place. Every per-group sum is one
``numpy.bincount`` call, so the cost is a handful of linear passes whatever the number of
groups.
"""

from __future__ import annotations

import numpy as np

from .summary import Summary


def grouped_summary(
    values: np.ndarray, codes: np.ndarray, n_groups: int, counts: np.ndarray | None = None
) -> Summary:
    """Summaries of ``values`` split by integer ``codes`` in ``[0, n_groups)``.

    Parameters
    ----------
    values : numpy.ndarray
        Finite float64 values, one per row.
    codes : numpy.ndarray
        Integer group code of each row, all in ``[0, n_groups)``.
    n_groups : int
        Number of groups; groups with no rows get n = 0 and NaN mean.
    counts : numpy.ndarray, optional
        ``numpy.bincount(codes, minlength=n_groups)`` when the caller has it already.

    Returns
    -------
    Summary
        Arrays of length ``n_groups``.

    Examples
    --------
    >>> s = grouped_summary(np.array([1.0, 2.0, 10.0, 12.0, 3.0]), np.array([0, 0, 1, 1, 0]), 2)
    >>> s.n.tolist(), s.mean.tolist(), s.ssd.tolist()
    ([3.0, 2.0], [2.0, 11.0], [2.0, 2.0])
    """
    n, mean, _, ssd = grouped_moments(values, codes, n_groups, counts)  # type: ignore[misc]
    return Summary(n, mean, ssd)


def grouped_moments(
    values: np.ndarray,
    codes: np.ndarray,
    n_groups: int,
    counts: np.ndarray | None = None,
    finite_only: bool = False,
) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray] | None:
    """Count, mean as a double-double ``mean + mean_lo``, and ssd of every group.

    ``mean`` is the double nearest the group mean; ``mean_lo`` the small remainder, so that
    differences of large means (1e9 with unit noise) keep their digits when they are
    taken as ``(mean_1 - mean_2) + (mean_lo_1 - mean_lo_2)``. Same arguments as
    :func:`grouped_summary`; with ``finite_only`` it returns None as soon as the first pass
    shows a non-finite value, which spares callers a separate check of every value.

    Examples
    --------
    >>> x = np.array([1e9 + 0.1, 1e9 + 0.2, 1e9 + 0.4])
    >>> n, mean, lo, ssd = grouped_moments(x, np.zeros(3, dtype=np.intp), 1)
    >>> bool(abs(lo[0]) <= np.spacing(mean[0]))
    True
    """
    x = np.asarray(values, dtype=np.float64)
    c = np.asarray(codes)
    if counts is None:
        counts = np.bincount(c, minlength=n_groups)
    n = counts.astype(np.float64)
    # values near 1e308 overflow the sums: the groups come out non-finite, and callers
    # report them as untestable, so numpy need not warn
    with np.errstate(over="ignore", invalid="ignore"):
        sums = np.bincount(c, weights=x, minlength=n_groups)
    if finite_only and not np.isfinite(sums).all():
        return None  # some value is NaN or infinite (or a sum overflowed): caller masks
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        m0 = np.where(n > 0, sums / np.where(n > 0, n, 1.0), 0.0)
        dev = np.take(m0, c)
        np.subtract(x, dev, out=dev)
        s1 = np.bincount(c, weights=dev, minlength=n_groups)
        np.multiply(dev, dev, out=dev)
        s2 = np.bincount(c, weights=dev, minlength=n_groups)
    del dev
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        corr = np.where(n > 0, s1 / np.where(n > 0, n, 1.0), 0.0)
        mean = np.where(n > 0, m0 + corr, np.nan)
        mean_lo = np.where(n > 0, (m0 - mean) + corr, 0.0)  # exact remainder (Fast2Sum)
        ssd = np.maximum(s2 - s1 * corr, 0.0)
    return n, mean, mean_lo, ssd


def integer_codes(values: np.ndarray) -> tuple[np.ndarray, np.ndarray] | None:
    """Codes ``values - min`` and the full range of levels, for compact integer keys.

    Returns None when ``values`` are not integers, or span a range much larger than their
    count (then a hash-based factorisation is cheaper). Levels absent from the data are
    included in the range; callers drop groups with no rows. The codes may be ``values``
    itself (non-negative ``intp`` input): callers must not write to them.

    Examples
    --------
    >>> codes, levels = integer_codes(np.array([12, 10, 12, 11]))
    >>> codes.tolist(), levels.tolist()
    ([2, 0, 2, 1], [10, 11, 12])
    """
    v = np.asarray(values)
    if v.dtype.kind not in "iu" or v.size == 0:
        return None
    lo, hi = int(v.min()), int(v.max())
    span = hi - lo + 1
    if span > 4 * v.size + 1_000_000:
        return None
    if lo == 0 and v.dtype == np.intp:
        codes = v  # already codes: no copy (callers must not write to them)
    else:
        codes = np.subtract(v, lo, dtype=np.intp)
    return codes, np.arange(lo, hi + 1, dtype=v.dtype)
