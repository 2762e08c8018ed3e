"""The rows of an online experiment made ready for a two-sample test.

``two_sample(..., cluster=, covariate=, ratio=)`` runs three steps in this order: one row
per unit of randomisation (:mod:`.cluster`), then either the pre-period adjustment
(:mod:`.cuped`) or the linearised values of a ratio metric (:func:`linearise`).
"""

from __future__ import annotations

from collections.abc import Hashable, Sequence

import numpy as np
import pandas as pd

from ..core.comoments import Comoments, ratio_summary
from ..errors import DataError
from ..results.ttest import TResult
from . import ttest
from .batch import choose_arms
from .cluster import per_unit_means
from .columns import column, to_float
from .cuped import adjust
from .levels import group_codes


def ratio_label(ratio) -> str:
    """The metric name of a ratio ``(numerator, denominator)``."""
    return f"{ratio[0]} / {ratio[1]}"


def check_ratio(ratio, func: str) -> tuple:
    """The ratio as a pair of column labels, or a clear error."""
    if not (isinstance(ratio, list | tuple) and len(ratio) == 2):
        raise DataError(
            f"ratio= of {func} takes (numerator, denominator), two columns such as "
            f"('revenue', 'sessions'). Got {ratio!r}."
        )
    return tuple(ratio)


def linearise(
    df: pd.DataFrame, ratio: tuple, by: Hashable, groups: Sequence | None
) -> tuple[pd.DataFrame, tuple[str, ...]]:
    """Each row's linearised value ``R + (y - R x) / mean x`` of its group's ratio of sums.

    The values of a group have mean R (its ratio of sums) and the delta-method variance
    (Deng, Knoblich and Lu 2018), so Welch's test on them is the delta-method test.
    """
    num, den = ratio
    y = to_float(column(df, num), f"Column {num!r}")
    x = to_float(column(df, den), f"Column {den!r}")
    if np.isinf(y).any() or np.isinf(x).any():
        raise DataError(f"Columns {num!r} and {den!r} must not hold infinite values.")
    codes, levels = group_codes(column(df, by))
    counts = np.bincount(codes.astype(np.intp) + 1, minlength=len(levels) + 1)
    first, second = choose_arms(levels, counts[1:] > 0, by, groups, "two-sample test")
    ok = ~(np.isnan(y) | np.isnan(x))
    z = np.full(len(y), np.nan)
    for k in (first, second):
        m = ok & (codes == k)
        c = Comoments.of(y[m], x[m])
        if not c.mx > 0:
            raise DataError(
                f"The mean of {den!r} in group {levels[k]!r} is not above 0, so the ratio "
                f"{ratio_label(ratio)} is undefined there."
            )
        r = float(ratio_summary(c).mean)
        z[m] = r + (y[m] - r * x[m]) / float(c.mx)
    notes = (
        f"Ratio metric {ratio_label(ratio)}: each group's sum of {num!r} over its sum of "
        f"{den!r}, with the delta-method standard error (Deng, Knoblich and Lu 2018) and "
        "Welch-type df; a group's SD is that of its units' linearised values.",
    )
    lost = int((~ok & (codes >= 0)).sum())
    if lost:
        notes += (f"{lost:,} row(s) with a missing {num!r} or {den!r} were not used.",)
    out = pd.DataFrame({ratio_label(ratio): z, by: column(df, by).to_numpy()})
    return out, notes


def prepare(
    df, value, by, groups, cluster, covariate, ratio, func: str = "two_sample"
) -> tuple[pd.DataFrame, Hashable, tuple[str, ...]]:
    """The frame a two-sample test reads, the value column in it, and the notes."""
    frame, notes = df, ()
    if ratio is not None:
        if value is not None or covariate is not None:
            raise DataError(
                f"ratio= of {func} replaces the value column and does not combine with "
                "covariate=; give ratio=(numerator, denominator) alone."
            )
        num, den = check_ratio(ratio, func)
        if cluster is not None:
            frame, notes = per_unit_means(df, num, by, cluster, (den,), how="sum")
        frame, more = linearise(frame, (num, den), by, groups)
        return frame, ratio_label(ratio), notes + more
    if cluster is not None:
        extra = () if covariate is None else (covariate,)
        frame, notes = per_unit_means(df, value, by, cluster, extra)
    if covariate is not None:
        frame, more = adjust(frame, value, by, covariate, groups)
        notes += more
    return frame, value, notes


def long_two_sample(df, column, by, groups, experiment: dict, opts: dict) -> TResult:
    """``two_sample`` on long data: the experiment steps, the split by ``by``, the test."""
    cluster, covariate, ratio = (experiment[k] for k in ("cluster", "covariate", "ratio"))
    if column is None and ratio is None:
        raise DataError("two_sample needs a value column (or ratio=).")
    frame, column, notes = prepare(df, column, by, groups, cluster, covariate, ratio)
    a, b, no_key = ttest.two_groups(frame, column, by, groups)
    if no_key:
        notes += (f"{no_key} row(s) with a missing {by!r} value were not used.",)
    if notes:
        opts = opts | {"warnings": notes}
    if ratio is not None:
        opts = opts | {"estimand": "ratio"}
    label = str(column) if covariate is None else f"{column} (adjusted for {covariate})"
    return ttest.two_sample(a, b, label, func="two_sample", **opts)
