"""The default Bayes factor of a t result: ``result.bayes_factor()`` builds a BayesFactor.

Needs only t, the sample sizes and the df (:mod:`tinfer.core.bayes`), so results built from
published summaries get it as well. Two samples use the pooled t (Rouder et al. 2009 assume
equal variances), recomputed from the result's group summaries when the test was Welch's.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np

from ..checks import check_level, check_side, fail, real
from ..core import bayes, procedures
from ..errors import ParameterError
from ..results import provenance
from ..results.bayes import BayesFactor

if TYPE_CHECKING:  # pragma: no cover
    from ..results.ttest import TResult

FUNC = "bayes_factor"


def check_scale(scale: Any) -> float:
    """The prior scale r: a finite number above 0 (conventional values 0.5 to 1.5)."""
    r = real(scale, "scale", FUNC, "a positive number (the Cauchy prior's scale r)")
    if not (np.isfinite(r) and r > 0):
        raise fail("scale", FUNC, "a positive number (the Cauchy prior's scale r)", scale)
    return r


def bayes_inputs(result: TResult) -> tuple[float, float, float, bool]:
    """(t, n_eff, df, pooled_from_welch) for the default Bayes factor of ``result``."""
    if getattr(result, "trim", 0.0):
        raise ParameterError(
            "bayes_factor is defined for the t test on means; this result is a trimmed-means "
            "(Yuen) test. Run the test without trim= to get its Bayes factor."
        )
    if result.design != "two-sample":
        n = float(result.summaries[0].n)
        return float(result.t), n, n - 1.0, False
    a, b = result.summaries
    na, nb = float(a.n), float(b.n)
    t = result.t
    if not result.pooled:  # the default Bayes factor assumes equal variances
        t = procedures.two_sample(a, b, null=result.null, pooled=True, effect_ci=False).t
    return float(t), na * nb / (na + nb), na + nb - 2.0, not result.pooled


def bayes_factor_of(
    result: TResult, scale: Any = bayes.DEFAULT_SCALE, side: Any = None, level: Any = None
) -> BayesFactor:
    """The default Bayes factor of ``result``; see :meth:`tinfer.TResult.bayes_factor`."""
    r = check_scale(scale)
    side = result.side if side is None else check_side(side, FUNC)
    level = result.level if level is None else check_level(level, FUNC)
    t, n_eff, df, from_welch = bayes_inputs(result)
    if not (np.isfinite(t) and df > 0):
        raise ParameterError(
            f"bayes_factor needs a finite t statistic with df > 0; this result has t = {t} "
            f"on {df:g} df."
        )
    logs = bayes.log_bayes_factors(t, n_eff, df, r)
    alpha = 1.0 - level
    probs = np.array([0.5, alpha / 2.0, 1.0 - alpha / 2.0])
    median, low, high = posterior_quantiles(probs, t, n_eff, df, r, side)
    return BayesFactor(
        design=result.design,
        comparison=result.comparison,
        variable=result.variable,
        t=t,
        df=df,
        n_eff=n_eff,
        scale=r,
        side=side,
        level=level,
        log_bf=float(logs[side]),
        log_bf10=float(logs["two-sided"]),
        log_bf_upper=float(logs["upper"]),
        log_bf_lower=float(logs["lower"]),
        median=median,
        interval=(low, high),
        pooled_from_welch=from_welch,
        created=provenance.now_iso(),
    )


def posterior_quantiles(probs, t, n_eff, df, scale, side) -> list[float]:
    """Quantiles of the posterior of delta by bisection on its distribution function,
    vectorised over ``probs`` (44 halvings of a bracket found by doubling: 1e-13 of it)."""
    probs = np.asarray(probs, float)
    centre = t / np.sqrt(n_eff)
    width = np.sqrt((1.0 + t * t / (2.0 * df)) / n_eff) + 1e-300
    lo = np.full(probs.shape, centre - 10 * width if side != "upper" else 0.0)
    hi = np.full(probs.shape, centre + 10 * width if side != "lower" else 0.0)
    if side == "upper":
        hi = np.maximum(hi, width)
    if side == "lower":
        lo = np.minimum(lo, -width)
    for _ in range(60):  # widen until the bracket holds every quantile
        f_lo = bayes.posterior_cdf(lo, t, n_eff, df, scale, side)
        f_hi = bayes.posterior_cdf(hi, t, n_eff, df, scale, side)
        if np.all(f_lo <= probs) and np.all(f_hi >= probs):
            break
        span = hi - lo
        lo = np.where(f_lo > probs, lo - span, lo)
        hi = np.where(f_hi < probs, hi + span, hi)
    for _ in range(44):
        mid = 0.5 * (lo + hi)
        below = bayes.posterior_cdf(mid, t, n_eff, df, scale, side) < probs
        lo, hi = np.where(below, mid, lo), np.where(below, hi, mid)
    return [float(v) for v in 0.5 * (lo + hi)]


def batch_log_bf(batch, scale: Any, side: Any) -> np.ndarray:
    """log Bayes factor of every row of a :class:`~tinfer.BatchResult` (NaN where untestable)."""
    r = check_scale(scale)
    side = check_side(side, FUNC)
    na = np.asarray(batch.n_a, float)
    if batch.design == "two-sample":
        nb = np.asarray(batch.n_b, float)
        arms = [
            (getattr(batch, f"n_{k}"), getattr(batch, f"mean_{k}"), getattr(batch, f"mean_lo_{k}"),
             getattr(batch, f"ssd_{k}"))
            for k in "ab"
        ]  # fmt: skip
        with np.errstate(all="ignore"):
            pooled = procedures.rows(
                "two-sample", *arms, batch.null, 0.95, "two-sided", True, False
            )
        t, n_eff, df = np.asarray(pooled.t, float), na * nb / (na + nb), na + nb - 2.0
    else:
        t, n_eff, df = np.asarray(batch.t, float), na, na - 1.0
    ok = np.asarray(batch.testable, bool) & np.isfinite(t) & (df > 0)
    out = np.full(t.shape, np.nan)
    if ok.any():
        out[ok] = bayes.log_bayes_factor(t[ok], n_eff[ok], df[ok], r, side)
    return out
