"""Pre-period adjustment (CUPED, Deng, Xu, Kohavi and Walker 2013): ``covariate=``.

Each unit's pre-experiment value x of the metric predicts much of its value y; subtracting
theta (x - mean x) leaves the difference between groups unbiased (x cannot depend on the
randomised group) and removes the share of the variance that x explains. Theta is the
within-group pooled regression slope of y on x over both groups, so the adjusted difference
equals the group coefficient of the least-squares fit of y on group and x; the test is then
Welch's on the adjusted values (theta treated as known, as in the published method).
"""

from __future__ import annotations

from collections.abc import Hashable, Sequence

import numpy as np
import pandas as pd

from ..core.comoments import Comoments, adjusted_arms
from ..errors import DataError
from .batch import choose_arms
from .columns import column, to_float
from .levels import group_codes


def adjust(
    df: pd.DataFrame, value: Hashable, by: Hashable, covariate: Hashable, groups: Sequence | None
) -> tuple[pd.DataFrame, tuple[str, ...]]:
    """The frame with ``value`` replaced by its adjusted values, and the notes to show."""
    if covariate in (value, by):
        raise DataError(f"covariate={covariate!r} must be a column other than the value and by=.")
    y = to_float(column(df, value), f"Column {value!r}")
    x = to_float(column(df, covariate), f"Column {covariate!r}")
    codes, levels = group_codes(column(df, by))
    counts = np.bincount(codes.astype(np.intp) + 1, minlength=len(levels) + 1)
    first, second = choose_arms(levels, counts[1:] > 0, by, groups, "two-sample test")
    in_arms = (codes == first) | (codes == second)
    missing_x = in_arms & np.isnan(x) & ~np.isnan(y)
    if missing_x.any():
        raise DataError(
            f"{int(missing_x.sum()):,} row(s) in the compared groups have {value!r} but no "
            f"{covariate!r}. The adjustment needs the pre-period value of every unit: fill it "
            "(for example with the overall pre-period mean, a stated rule) or drop those rows."
        )
    ok = in_arms & ~np.isnan(y)
    adj = adjusted_arms(*(Comoments.of(y[ok & (codes == k)], x[ok & (codes == k)])
                          for k in (first, second)))  # fmt: skip
    if not adj.adjusted:
        raise DataError(f"Column {covariate!r} does not vary within the groups; no adjustment.")
    theta, removed = float(adj.theta), float(adj.removed)  # removed: within-group share
    adjusted = np.where(ok, y - theta * (x - float(adj.centre)), np.nan)
    notes = (
        f"Pre-period adjustment (CUPED) by {covariate!r}, theta {theta:.4g}: it removed "
        f"{100 * removed:.0f}% of the variance, so the same precision without it would have "
        f"needed {1 / max(1 - removed, 1e-12):.2g}x the units.",
    )
    out = pd.DataFrame({value: adjusted, by: column(df, by).to_numpy()})
    return out, notes
