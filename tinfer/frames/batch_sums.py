"""``tinfer.compare_sums``: many t tests from the raw sums a warehouse query returns.

A query such as ``SELECT segment, arm, COUNT(*) AS n, SUM(y) AS sum, SUM(y * y) AS sum_sq,
SUM(x) AS sum_x, SUM(x * x) AS sum_x_sq, SUM(x * y) AS sum_xy ... GROUP BY segment, arm``
holds everything a plain metric, a ratio metric (y over x) or the pre-period adjustment (x
the pre-period value) needs. The sums become co-moments
(:meth:`tinfer.core.comoments.Comoments.from_sums`), then summaries, then
:func:`tinfer.compare_summaries` runs the tests.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Hashable, Sequence

import numpy as np
import pandas as pd

from ..core.comoments import Comoments, adjusted_arms, ratio_summary
from ..docstrings import fill_params
from ..errors import DataError, ParameterError
from .batch import choose_arms
from .batch_table import compare_summaries
from .columns import column, to_float
from .experiment_batch import removed_note
from .levels import as_list, key_codes

FUNC = "compare_sums"
SUMS = ("n", "sum", "sum_sq")
CROSS = ("sum_x", "sum_x_sq", "sum_xy")
USES = ("mean", "ratio", "covariate")


@fill_params(
    side="the true difference differs from, is greater than, or is less than ``null``.",
    relative_what="(the first arm's mean, ratio or adjusted mean over the second's)",
)
def compare_sums(
    frame: pd.DataFrame,
    within=None,
    *,
    arm: Hashable | None = None,
    groups: Sequence | None = None,
    metric: Hashable | None = None,
    use: str = "mean",
    labels: Sequence[str] | None = None,
    null: float = 0.0,
    adjust: str = "holm",
    rate: float = 0.05,
    level: float = 0.95,
    side: str = "two-sided",
    pooled: bool = False,
    relative: bool | str = False,
):
    """Many t tests from per-segment raw sums: plain metrics, ratio metrics, or adjusted.

    One row per segment (and arm, and metric) with the columns ``n`` (units), ``sum`` and
    ``sum_sq`` (of the value y and of its square); ratio metrics and the adjustment also
    need ``sum_x``, ``sum_x_sq`` and ``sum_xy``. Each row's units must be units of
    randomisation: aggregate the rows of a visitor in the query first.

    Raw sums of squares cancel: the SD keeps about ``16 - 2 log10(|mean| / sd)`` digits.
    Centre values in the query (subtract a round number) when the spread is small next to
    the mean, or prefer :func:`tinfer.compare_summaries` with two-pass SDs.

    Parameters
    ----------
    frame : pandas.DataFrame
        The table of sums.
    within : label or list of labels, optional
        Segment key columns. Default: every column that is not a sum, ``arm`` or ``metric``.
    arm : label, optional
        The arm column (two-sample tests); without it each row is tested against ``null``.
    groups : (first, second), optional
        The two arm levels to compare, in order; default: the two levels sorted as text.
    metric : label, optional
        A column naming the metric, when the table holds several.
    use : {{"mean", "ratio", "covariate"}}, default "mean"
        "mean": the mean of y. "ratio": the ratio of sums y / x with its delta-method
        variance (Deng, Knoblich and Lu 2018). "covariate": the mean of y after the
        pre-period adjustment by x (CUPED, Deng et al. 2013), theta per segment and metric.
    labels : (str, str), optional
        Names of the two arms.
    null : float, default 0
        Hypothesised mean or difference.
    {batch_options}
    {relative}

    Returns
    -------
    BatchResult

    Examples
    --------
    >>> import pandas as pd, tinfer
    >>> sums = pd.DataFrame({"arm": ["new", "old"], "n": [4, 4],
    ...                      "sum": [30.0, 24.0], "sum_sq": [230.0, 148.0],
    ...                      "sum_x": [10.0, 10.0], "sum_x_sq": [30.0, 30.0],
    ...                      "sum_xy": [80.0, 64.0]})
    >>> r = tinfer.compare_sums(sums, arm="arm", use="ratio")
    >>> r.comparison, r.estimate.round(3).tolist()
    ('new minus old', [0.6])
    """
    if use not in USES:
        raise ParameterError(
            f"The 'use' parameter of {FUNC} must be one of {', '.join(map(repr, USES))}. "
            f"Got {use!r} instead."
        )
    if not isinstance(frame, pd.DataFrame):
        raise ParameterError(
            f"The 'frame' parameter of {FUNC} must be a pandas DataFrame of sums. "
            f"Got {type(frame).__name__} instead."
        )
    names = SUMS + (CROSS if use != "mean" else ())
    values = [to_float(column(frame, c), f"Column {c!r}") for c in names]
    for c, v in zip(names, values, strict=True):
        if not np.isfinite(v).all():
            raise DataError(f"Column {c!r} of the sums holds a missing or infinite value.")
    if use == "mean":
        zeros = np.zeros(len(frame))
        co = Comoments.from_sums(*values, zeros, zeros, zeros)
    else:
        co = Comoments.from_sums(*values)
    table = frame[[c for c in frame.columns if c not in (*SUMS, *CROSS)]]
    return compare_moments(
        table, co, use, within, arm=arm, groups=groups, metric=metric, labels=labels,
        null=null, adjust=adjust, rate=rate, level=level, side=side, pooled=pooled,
        relative=relative,
    )  # fmt: skip


def compare_moments(
    table: pd.DataFrame, co: Comoments, use: str, within=None, covariate="x", **opts
):
    """``compare_summaries`` on co-moments, one per row of ``table`` (its key columns):
    the mean of y, the ratio of sums y / x, or y adjusted by x. The Dask accessor ends here
    with the co-moments it merged from its partitions."""
    table = table.copy()
    arm, groups, metric = opts.get("arm"), opts.get("groups"), opts.get("metric")
    note = None
    if use == "covariate":
        table, co, adj = _adjusted(table, co, within, arm, groups, metric)
        note = removed_note(adj, covariate)
    if use == "ratio":
        table["n"], table["mean"], table["ssd"], note = ratio_stats(co)
    else:
        table["n"], table["mean"], table["ssd"] = co.n, co.my, co.syy
    result = compare_summaries(table, within, **opts)
    if note is not None:
        result = dataclasses.replace(result, warnings=(*result.warnings, note))
    return result


def ratio_stats(co: Comoments):
    """n, mean and ssd of the ratio of sums of every group, and a note where it is undefined.

    A group whose mean denominator is not above 0 has no ratio: its n is reported as 0, so
    its comparison is untestable instead of stopping the batch.
    """
    stats = ratio_summary(co)
    undefined = np.isnan(stats.mean) & (co.n > 0)
    note = None
    if undefined.any():
        note = (
            f"{int(undefined.sum()):,} group(s) have a mean denominator not above 0: the ratio "
            "is undefined there, and their comparisons untestable."
        )
    return np.where(undefined, 0.0, co.n), stats.mean, stats.ssd, note


def _adjusted(table, co: Comoments, within, arm, groups, metric):
    """The rows of the two compared arms, their co-moments adjusted per segment and metric."""
    if arm is None:
        raise ParameterError(
            f'use="covariate" in {FUNC} adjusts a comparison of two arms: give arm=.'
        )
    codes, levels, _ = key_codes(column(table, arm))
    present = np.bincount(codes[codes >= 0], minlength=len(levels)) > 0
    first, second = choose_arms(levels, present, arm, groups)
    keys = (
        as_list(within)
        if within is not None
        else [c for c in table.columns if c not in (arm, metric) and c != "metric"]
    )
    keys += [m for m in (metric if metric is not None else "metric",) if m in table.columns]
    rows = np.flatnonzero((codes == first) | (codes == second))
    table = table.iloc[rows].reset_index(drop=True)
    co = co.take(rows)
    seg = (pd.MultiIndex.from_frame(table[keys]).factorize()[0] if keys
           else np.zeros(len(rows), dtype=np.intp))  # fmt: skip
    n_seg = int(seg.max()) + 1 if seg.size else 0
    is_first = codes[rows] == first
    if np.bincount(seg, minlength=n_seg).max(initial=0) > 2:
        raise DataError("The sums have more than one row for the same segment, arm and metric.")

    def arm_sums(mask):
        return Comoments(*(np.bincount(seg[mask], weights=v[mask], minlength=n_seg)
                           for v in (co.n, co.my, co.mx, co.syy, co.sxx, co.sxy)))  # fmt: skip

    adj = adjusted_arms(arm_sums(is_first), arm_sums(~is_first))
    mean = np.where(is_first, adj.first.mean[seg], adj.second.mean[seg])
    ssd = np.where(is_first, adj.first.ssd[seg], adj.second.ssd[seg])
    zeros = np.zeros(len(rows))
    return table, Comoments(co.n, mean, zeros, ssd, zeros, zeros), adj
