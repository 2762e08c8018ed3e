"""Every pair of k groups, or every group against a control, compared as one family.

Inputs are per-level summaries shaped ``(families, levels)`` (one family per segment of a
batch, or a single family); outputs are arrays shaped ``(families, pairs)``. A pair
``(i, j)`` estimates mean ``i`` minus mean ``j``; :func:`pair_indices` lists a later level
minus an earlier one. Levels with fewer than two values take no
part (their pairs are NaN and they do not count in k).

Methods, by their published names:

- ``"games-howell"`` (Games and Howell 1976): Welch's standard error and df for each pair,
  p-values and intervals from the studentized range of k means;
- ``"tukey-kramer"`` (Tukey 1953, Kramer 1956): the pooled variance of all k levels with
  ``N - k`` df, the studentized range;
- ``"dunnett"`` (Dunnett 1955): each level against the control, pooled variance, the
  largest of correlated t statistics; one-sided sides allowed;
- ``"holm"``, ``"hochberg"``, ``"benjamini-hochberg"``, ``"benjamini-yekutieli"``,
  ``"none"``: a separate Welch test per pair, p-values adjusted within the family.
  Intervals: Bonferroni (each at ``1 - alpha / m``) for the family-wise methods and no
  adjustment; the false-coverage-rate intervals of Benjamini and Yekutieli (2005), each at
  ``1 - R alpha / m`` with R the number of discoveries, for the false-discovery-rate ones.

Effect sizes are Hedges' g of each pair (the two groups' pooled SD, exact J), with the
noncentral-t interval at the plain ``level``: they describe a pair, not the family.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from . import distribution as dist
from . import multiplicity
from .effects import hedges_j, ncp_interval
from .simultaneous import dunnett_critical, dunnett_sf, range_critical, range_sf

RANGE_METHODS = ("games-howell", "tukey-kramer")
SEPARATE = ("holm", "hochberg", "benjamini-hochberg", "benjamini-yekutieli", "none")
METHODS = (*RANGE_METHODS, "dunnett", *SEPARATE)
POOLED = ("tukey-kramer", "dunnett")
#: Short published names, for headlines and method lines.
SHORT = {
    "games-howell": "Games-Howell",
    "tukey-kramer": "Tukey-Kramer",
    "dunnett": "Dunnett",
    "holm": "Welch tests, Holm",
    "hochberg": "Welch tests, Hochberg",
    "benjamini-hochberg": "Welch tests, Benjamini-Hochberg",
    "benjamini-yekutieli": "Welch tests, Benjamini-Yekutieli",
    "none": "Welch tests, unadjusted",
}


@dataclass(frozen=True, eq=False)
class Family:
    """Arrays shaped (families, pairs) for the pairs ``(first[p], second[p])``."""

    first: np.ndarray
    second: np.ndarray
    estimate: np.ndarray
    se: np.ndarray
    t: np.ndarray
    df: np.ndarray
    p_single: np.ndarray
    p_family: np.ndarray
    ci_low: np.ndarray
    ci_high: np.ndarray
    effect: np.ndarray
    effect_low: np.ndarray
    effect_high: np.ndarray
    k: np.ndarray  # levels taking part, per family


def pair_indices(k: int, against: int | None = None) -> tuple[np.ndarray, np.ndarray]:
    """``(first, second)`` level indices: all pairs ``(j, i)`` with ``i < j`` (a later level
    minus an earlier one, so that differences along ordered levels read upward), or
    ``(i, against)`` (each level minus the control).

    Examples
    --------
    >>> [v.tolist() for v in pair_indices(3)]
    [[1, 2, 2], [0, 0, 1]]
    >>> [v.tolist() for v in pair_indices(3, against=0)]
    [[1, 2], [0, 0]]
    """
    if against is None:
        second, first = np.triu_indices(k, 1)
    else:
        first = np.array([i for i in range(k) if i != against], dtype=np.intp)
        second = np.full(first.size, against, dtype=np.intp)
    return first.astype(np.intp), second.astype(np.intp)


def family(
    method: str,
    n,
    mean,
    ssd,
    first,
    second,
    *,
    mean_lo=None,
    against: int | None = None,
    level: float = 0.95,
    side: str = "two-sided",
    effect_ci: bool = True,
) -> Family:
    """Run ``method`` on per-level summaries (arrays (families, levels)) for the pairs given.

    ``against`` is the control's level index (Dunnett needs it; the pairs are then
    ``pair_indices(k, against)``).

    Examples
    --------
    >>> n, mean, ssd = [[5.0, 5.0, 5.0]], [[10.0, 12.0, 15.0]], [[8.0, 10.0, 12.0]]
    >>> f = family("tukey-kramer", n, mean, ssd, *pair_indices(3))
    >>> np.round(f.estimate[0], 3).tolist(), np.round(f.p_family[0], 4).tolist()
    ([2.0, 5.0, 3.0], [0.1546, 0.0008, 0.0277])
    """
    n, mean, ssd = (np.atleast_2d(np.asarray(v, float)) for v in (n, mean, ssd))
    lo = np.zeros_like(mean) if mean_lo is None else np.atleast_2d(np.asarray(mean_lo, float))
    usable = (n >= 2) & np.isfinite(mean) & np.isfinite(ssd)
    n = np.where(usable, n, np.nan)
    k = usable.sum(axis=1)
    a, b = first, second
    with np.errstate(invalid="ignore", divide="ignore"):
        estimate = (mean[:, a] - mean[:, b]) + (lo[:, a] - lo[:, b])
        var = ssd / (n - 1.0)
        if method in POOLED:
            df = np.where(usable, n, 0.0).sum(axis=1, keepdims=True) - k[:, None]
            mse = np.where(usable, ssd, 0.0).sum(axis=1, keepdims=True) / df
            se = np.sqrt(mse * (1.0 / n[:, a] + 1.0 / n[:, b]))
            df = np.broadcast_to(df, se.shape)
        else:
            va, vb = var[:, a] / n[:, a], var[:, b] / n[:, b]
            se = np.sqrt(va + vb)
            w = va / (va + vb)
            df = 1.0 / (w * w / (n[:, a] - 1.0) + (1.0 - w) ** 2 / (n[:, b] - 1.0))
        t = estimate / se
    ok = np.isfinite(t) & (se > 0)
    t = np.where(ok, t, np.nan)
    p_single = dist.p_value(np.where(ok, t, 0.0), np.where(ok, df, 1.0), side)[0]
    p_single = np.where(ok, p_single, np.nan)
    p_family, crit = _family_p(method, t, df, ok, k, n, a, against, level, side, p_single)
    ci_low, ci_high = _interval(estimate, se, crit, side)
    eff, eff_lo, eff_hi = _effects(estimate, n, ssd, a, b, level, side, effect_ci)
    nan = lambda v: np.where(ok, v, np.nan)  # noqa: E731
    return Family(
        first=a,
        second=b,
        estimate=nan(estimate),
        se=nan(se),
        t=t,
        df=nan(df),
        p_single=p_single,
        p_family=nan(p_family),
        ci_low=nan(ci_low),
        ci_high=nan(ci_high),
        effect=nan(eff),
        effect_low=nan(eff_lo),
        effect_high=nan(eff_hi),
        k=k,
    )


def _family_p(method, t, df, ok, k, n, a, against, level, side, p_single):
    """Family-adjusted p-values and the multiplier of the SE for the intervals."""
    alpha = 1.0 - level
    p = np.full(t.shape, np.nan)
    crit = np.full(t.shape, np.nan)
    if method in RANGE_METHODS:
        for kk in np.unique(k[k >= 2]):
            sel = ok & (k == kk)[:, None]
            if sel.any():
                p[sel] = range_sf(np.sqrt(2.0) * np.abs(t[sel]), int(kk), df[sel])
                crit[sel] = range_critical(level, int(kk), df[sel]) / np.sqrt(2.0)
    elif method == "dunnett":
        fam = np.flatnonzero(ok.any(axis=1))
        if fam.size:
            okf, nf = ok[fam], n[fam]
            lam = np.where(okf, np.sqrt(nf[:, a] / (nf[:, a] + nf[:, [against]])), np.nan)
            stat = {"two-sided": np.abs(t[fam]), "upper": t[fam], "lower": -t[fam]}[side]
            tail = dunnett_sf(np.where(okf, stat, 0.0), lam, df[fam, 0], side)
            p[fam] = np.where(okf, tail, np.nan)
            crit[fam] = dunnett_critical(level, lam, df[fam, 0], side)[:, None]
    else:
        p = multiplicity.adjust_rows(p_single, method)
        m = ok.sum(axis=1, keepdims=True)
        share = alpha / np.maximum(m, 1)
        if method in ("benjamini-hochberg", "benjamini-yekutieli"):
            found = multiplicity.discoveries(p, alpha).sum(axis=1, keepdims=True)
            share = share * np.maximum(found, 1)
        if method == "none":
            share = np.full_like(share, alpha)
        one = "upper" if side != "two-sided" else "two-sided"
        crit = np.where(ok, dist.critical(df, 1.0 - share, one), np.nan)
    return p, crit


def _interval(estimate, se, crit, side):
    half = crit * se
    inf = np.full(estimate.shape, np.inf)
    if side == "upper":
        return estimate - half, inf
    if side == "lower":
        return -inf, estimate + half
    return estimate - half, estimate + half


def _effects(estimate, n, ssd, a, b, level, side, effect_ci):
    """Hedges' g of each pair with its noncentral-t interval (per pair, not simultaneous)."""
    with np.errstate(invalid="ignore", divide="ignore"):
        df = n[:, a] + n[:, b] - 2.0
        scale = np.sqrt(1.0 / n[:, a] + 1.0 / n[:, b])
        t_eff = estimate / (np.sqrt((ssd[:, a] + ssd[:, b]) / df) * scale)
    j = hedges_j(np.where(np.isfinite(df) & (df > 0), df, 1.0))
    if not effect_ci:
        nan = np.full(t_eff.shape, np.nan)
        return j * t_eff * scale, nan, nan
    fine = np.isfinite(t_eff) & np.isfinite(df)
    low = np.full(t_eff.shape, np.nan)
    high = np.full(t_eff.shape, np.nan)
    if fine.any():
        low[fine], high[fine] = ncp_interval(t_eff[fine], df[fine], level, side)
    return j * t_eff * scale, j * low * scale, j * high * scale
