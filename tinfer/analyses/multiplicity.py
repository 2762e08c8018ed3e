"""``tinfer.adjust``: adjusted p-values for any family of tests.

The arithmetic is :mod:`tinfer.core.multiplicity`; this layer checks the input and keeps a
pandas Series a Series.
"""

from __future__ import annotations

import numpy as np

from ..checks import fail
from ..core import multiplicity


def adjust(p, method: str = "holm"):
    """Adjusted p-values for one family of tests, in the order given.

    Parameters
    ----------
    p : array_like or pandas.Series
        Raw p-values in [0, 1], any shape (all of them form one family). NaN marks a test
        that was not run: it stays NaN and does not count in the family's size.
    method : {"holm", "hochberg", "benjamini-hochberg", "benjamini-yekutieli", "none"}
        Holm (1979) step-down or Hochberg (1988) step-up for the family-wise error rate;
        Benjamini-Hochberg (1995) or Benjamini-Yekutieli (2001, any dependence) for the
        false discovery rate. "bh" and "by" are accepted as short forms.

    Returns
    -------
    numpy.ndarray or pandas.Series
        The adjusted p-values, same shape (a Series keeps its index and name).

    Examples
    --------
    >>> import tinfer
    >>> tinfer.adjust([0.01, 0.04, 0.03, float("nan")], "holm").tolist()
    [0.03, 0.06, 0.06, nan]
    """
    method = multiplicity.check_method(method, "adjust")
    values = p.to_numpy(dtype=float, na_value=np.nan) if hasattr(p, "to_numpy") else p
    try:
        arr = np.asarray(values, dtype=np.float64)
    except (TypeError, ValueError):
        raise fail("p", "adjust", "an array of p-values in [0, 1]", p) from None
    with np.errstate(invalid="ignore"):
        if ((arr < 0) | (arr > 1)).any():
            raise fail("p", "adjust", "an array of p-values in [0, 1] (NaN for untested)", p)
    out = multiplicity.adjust(arr, method)
    if hasattr(p, "index") and hasattr(p, "to_numpy") and arr.ndim == 1:
        return type(p)(out, index=p.index, name=getattr(p, "name", None))
    return out
