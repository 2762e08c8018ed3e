"""Adjusted p-values for many tests at once, and the discoveries they give.

Every method works on an array of p-values in any order and returns adjusted p-values in
the same order, monotone in the raw p-values and capped at 1. Missing p-values (NaN, from
tests that could not be run) are left out of the family: they stay NaN and do not count
in ``m``. A test is a discovery when its adjusted p-value is at most ``rate``, which is
exactly the decision of the step-down or step-up procedure at that rate.

- ``"holm"``: Holm (1979) step-down, family-wise error rate.
  ``adj_(i) = max_{j <= i} min(1, (m - j + 1) p_(j))``.
- ``"hochberg"``: Hochberg (1988) step-up, family-wise error rate (independent or
  positively dependent tests). ``adj_(i) = min_{j >= i} min(1, (m - j + 1) p_(j))``.
- ``"benjamini-hochberg"`` (alias ``"bh"``): Benjamini and Hochberg (1995) step-up, false
  discovery rate.
  ``adj_(i) = min_{j >= i} min(1, m p_(j) / j)``.
- ``"benjamini-yekutieli"`` (alias ``"by"``): Benjamini and Yekutieli (2001), false
  discovery rate under any dependence:
  BH with ``m`` replaced by ``m * (1 + 1/2 + ... + 1/m)``.
- ``"none"``: the raw p-values.

Here ``p_(1) <= ... <= p_(m)`` are the sorted p-values.
"""

from __future__ import annotations

import numpy as np

from ..errors import ParameterError

#: The methods by their published names (canonical); short forms are accepted as aliases.
METHODS = ("holm", "hochberg", "benjamini-hochberg", "benjamini-yekutieli", "none")
ALIASES = {m: m for m in METHODS} | {"bh": "benjamini-hochberg", "by": "benjamini-yekutieli"}
NAMES = {
    "holm": "Holm step-down (family-wise error rate)",
    "hochberg": "Hochberg step-up (family-wise error rate)",
    "benjamini-hochberg": "Benjamini-Hochberg (false discovery rate)",
    "benjamini-yekutieli": "Benjamini-Yekutieli (false discovery rate, any dependence)",
    "none": "no adjustment",
}


def check_method(method, func: str) -> str:
    """The canonical name of an adjustment method, or a ParameterError."""
    key = method.lower() if isinstance(method, str) else method
    if key not in ALIASES:
        raise ParameterError(
            f"The 'adjust' parameter of {func} must be one of 'holm', 'hochberg', "
            "'benjamini-hochberg' (or 'bh'), 'benjamini-yekutieli' (or 'by') or 'none'. "
            f"Got {method!r} instead."
        )
    return ALIASES[key]


def adjust(p, method: str = "holm") -> np.ndarray:
    """Adjusted p-values by ``method``, same shape and order as ``p``.

    Parameters
    ----------
    p : array_like
        Raw p-values in [0, 1]; NaN marks a test that was not run.
    method : {"holm", "hochberg", "benjamini-hochberg", "benjamini-yekutieli", "none"}
        See the module docstring; "bh" and "by" are accepted as short forms.

    Returns
    -------
    numpy.ndarray
        Adjusted p-values (float64), NaN where ``p`` is NaN.

    Examples
    --------
    >>> adjust([0.01, 0.04, 0.03, 0.005], "holm").tolist()
    [0.03, 0.06, 0.06, 0.02]
    >>> adjust([0.01, 0.04, 0.03, 0.005], "benjamini-hochberg").tolist()
    [0.02, 0.04, 0.04, 0.02]
    """
    method = check_method(method, "adjust")
    p = np.asarray(p, dtype=np.float64)
    out = np.full(p.shape, np.nan)
    flat = p.ravel()
    ok = ~np.isnan(flat)
    q = flat[ok]
    m = q.size
    if m == 0:
        return out
    if method == "none":
        res = q.copy()
    else:
        order = np.argsort(q, kind="stable")
        s = q[order]
        rank = np.arange(1, m + 1, dtype=np.float64)
        if method == "holm":
            adj = np.maximum.accumulate(np.minimum((m - rank + 1.0) * s, 1.0))
        elif method == "hochberg":
            adj = np.minimum.accumulate(((m - rank + 1.0) * s)[::-1])[::-1]
        else:
            factor = m / rank
            if method == "benjamini-yekutieli":
                factor = factor * np.sum(1.0 / rank)
            adj = np.minimum.accumulate((factor * s)[::-1])[::-1]
        adj = np.minimum(adj, 1.0)
        res = np.empty(m)
        res[order] = adj
    flat_out = out.reshape(-1)
    flat_out[ok] = res
    return out


def discoveries(p_adjusted, rate: float) -> np.ndarray:
    """Boolean array: adjusted p-value at most ``rate`` (NaN gives False).

    Examples
    --------
    >>> discoveries([0.01, 0.05, 0.2, float("nan")], 0.05).tolist()
    [True, True, False, False]
    """
    q = np.asarray(p_adjusted, dtype=np.float64)
    with np.errstate(invalid="ignore"):
        return q <= rate


def adjust_rows(p, method: str = "holm") -> np.ndarray:
    """:func:`adjust` applied to every row of a 2-d array separately (one family per row).

    Vectorised over rows; NaN entries stay NaN and do not count in their row's ``m``.

    Examples
    --------
    >>> adjust_rows([[0.01, 0.04, 0.03], [0.02, float("nan"), 0.5]], "holm").tolist()
    [[0.03, 0.06, 0.06], [0.04, nan, 0.5]]
    """
    method = check_method(method, "adjust")
    p = np.atleast_2d(np.asarray(p, dtype=np.float64))
    if method == "none":
        return p.copy()
    width = p.shape[1]
    order = np.argsort(np.where(np.isnan(p), np.inf, p), axis=1, kind="stable")
    s = np.take_along_axis(p, order, axis=1)
    m = (~np.isnan(p)).sum(axis=1, keepdims=True).astype(np.float64)
    rank = np.arange(1, width + 1, dtype=np.float64)[None, :]
    with np.errstate(invalid="ignore", divide="ignore"):
        if method == "holm":
            adj = np.fmax.accumulate(np.minimum((m - rank + 1.0) * s, 1.0), axis=1)
        else:
            if method == "hochberg":
                raw = (m - rank + 1.0) * s
            else:
                factor = m / rank
                if method == "benjamini-yekutieli":
                    harmonic = np.cumsum(1.0 / rank, axis=1)
                    factor = factor * np.take_along_axis(
                        harmonic, np.maximum(m.astype(np.intp) - 1, 0), axis=1
                    )
                raw = factor * s
            raw = np.where(np.isnan(s), np.inf, raw)
            adj = np.minimum.accumulate(raw[:, ::-1], axis=1)[:, ::-1]
        adj = np.where(np.isnan(s), np.nan, np.minimum(adj, 1.0))
    out = np.empty_like(adj)
    np.put_along_axis(out, order, adj, axis=1)
    return out
