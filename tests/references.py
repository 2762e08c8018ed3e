"""Reference values computed with general-purpose libraries, shared by several test modules."""

from __future__ import annotations

import math

import numpy as np
from scipy import stats


def nct_power(effect, n1, n2=None, level=0.95, side="two-sided"):
    """Power from scipy.stats.nct (reference library), written out from the textbook formula."""
    if n2 is None:
        df, ncp = n1 - 1, effect * math.sqrt(n1)
    else:
        df, ncp = n1 + n2 - 2, effect * math.sqrt(n1 * n2 / (n1 + n2))
    alpha = 1 - level
    if side == "two-sided":
        c = stats.t.ppf(1 - alpha / 2, df)
        return stats.nct.sf(c, df, ncp) + np.nan_to_num(stats.nct.cdf(-c, df, ncp))
    if side == "upper":
        return stats.nct.sf(stats.t.ppf(1 - alpha, df), df, ncp)
    return stats.nct.cdf(stats.t.ppf(alpha, df), df, ncp)
