"""Reference values computed with general-purpose libraries, shared by several test modules."""

from __future__ import annotations

import math

import numpy as np
import scipy
from scipy import stats

#: How closely scipy.stats.t.ppf, the reference for confidence limits in several tests, can
#: be asked to agree. From scipy 1.17 it inverts the t distribution to rounding; scipy 1.13 to
#: 1.16 only to 4.5e-11 relative (measured against mpmath at 50 digits over 300 random
#: (q, df) pairs; tinfer's own percentiles held 5e-16 on every version). Limits compared
#: with those versions are asked for 1e-10.
SCIPY_PPF_RTOL = (
    1e-12 if tuple(int(v) for v in scipy.__version__.split(".")[:2]) >= (1, 17) else 1e-10
)


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
