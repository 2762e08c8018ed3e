"""Relative lift of a t result: ``result.relative_lift()`` builds a RelativeLift.

Two samples: the first group's mean over the second's, minus one, with Fieller's interval
(Welch-type df for the variance of a - rho b, or the pooled df when the test was pooled) or,
as an option, the delta method on the log of the ratio. Paired: the first condition's mean
over the second's, with the covariance of the two means in both intervals (n - 1 df). One
sample: the mean over the reference value ``null``, whose interval is the mean's own divided
by it (exact).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np

from ..checks import check_level, fail
from ..core import ratio as core_ratio
from ..errors import ParameterError
from ..results.lift import RelativeLift

if TYPE_CHECKING:  # pragma: no cover
    from ..results.ttest import TResult

FUNC = "relative_lift"
METHODS = ("fieller", "log")


def check_relative(relative: Any, func: str) -> str | None:
    """The lift method a ``relative=`` option asks for: None, "fieller" or "log"."""
    if relative is None or relative is False:
        return None
    if relative is True:
        return "fieller"
    if relative in METHODS:
        return relative
    raise fail("relative", func, "True, False, 'fieller' or 'log'", relative)


def two_sample_parts(na, ma, ssa, nb, mb, ssb, pooled: bool):
    """(va, vb, df at the ratio) of two means from n, mean and ssd (arrays)."""
    na, ma, ssa, nb, mb, ssb = (np.asarray(v, float) for v in (na, ma, ssa, nb, mb, ssb))
    with np.errstate(divide="ignore", invalid="ignore"):
        if pooled:
            sp2 = (ssa + ssb) / (na + nb - 2.0)
            va, vb = sp2 / na, sp2 / nb
            df = na + nb - 2.0
        else:
            va, vb = ssa / (na - 1.0) / na, ssb / (nb - 1.0) / nb
            df = core_ratio.welch_df(va, vb, ma / mb, na - 1.0, nb - 1.0)
    return va, vb, df


def relative_lift_of(result: TResult, method: Any = "fieller", level: Any = None) -> RelativeLift:
    """The relative lift of ``result``; see :meth:`tinfer.TResult.relative_lift`."""
    if method not in METHODS:
        raise fail("method", FUNC, "'fieller' or 'log'", method)
    level = result.level if level is None else check_level(level, FUNC)
    side = result.side
    if getattr(result, "trim", 0.0):
        raise ParameterError(
            "relative_lift compares means; this result compares trimmed means (trim=). "
            "Run the test without trim= for the lift of the means."
        )
    if result.design == "one-sample":
        null = float(result.null)
        if not null > 0:
            raise ParameterError(
                f"relative_lift of one sample is relative to null, which must be above 0; "
                f"got null={null:g}."
            )
        lo, hi = (v / null - 1.0 for v in result.ci)
        return RelativeLift(
            design=result.design,
            comparison=f"mean {result.variable}",
            variable=result.variable,
            reference=f"the reference value {null:g}",
            ratio=result.estimate / null,
            lift=result.estimate / null - 1.0,
            ci=(lo, hi),
            bounded=True,
            method="null",
            level=result.level,
            side=side,
            df=result.df,
        )
    ma, mb, va, vb, cov, df = _parts(result)
    if method == "fieller":
        rho, lo, hi, ok = core_ratio.fieller(ma, mb, va, vb, cov, df, level, side)
    else:
        rho, lo, hi = core_ratio.log_delta(ma, mb, va, vb, cov, df, level, side)
        ok = np.isfinite(lo) | np.isfinite(hi)
    first, second = (*result.labels, "first", "second")[:2]
    wide = result.variable == f"{first} vs {second}"  # paired columns: the column names it
    return RelativeLift(
        design=result.design,
        comparison=f"mean {first}" if wide else f"mean {result.variable} of {first}",
        variable=result.variable,
        reference=second,
        ratio=float(rho),
        lift=float(rho) - 1.0,
        ci=(float(lo) - 1.0, float(hi) - 1.0),
        bounded=bool(ok),
        method=method,
        level=level,
        side=side,
        df=float(df),
    )


def _parts(result: TResult):
    """(mean a, mean b, their variances, their covariance, df) of a two-sample or paired t.

    Paired: the covariance of the two means comes from the variances of the columns and of
    the differences, ``cov = (var a + var b - var d) / 2``; ``a - rho b`` is then one sample
    of n, so Fieller's interval takes n - 1 df and is exact under normality.
    """
    if result.design == "paired":
        if len(result.groups) < 3:
            raise ParameterError(
                "relative_lift of a paired result needs each condition's mean and SD; this "
                "one was built from the differences alone (from_summary with paired=True)."
            )
        a, b, d = result.groups[0], result.groups[1], result.groups[-1]
        n = float(result.summaries[0].n)
        cov = (a.sd**2 + b.sd**2 - d.sd**2) / 2.0 / n
        return a.mean, b.mean, a.sd**2 / n, b.sd**2 / n, cov, n - 1.0
    a, b = result.summaries
    va, vb, df = two_sample_parts(a.n, a.mean, a.ssd, b.n, b.mean, b.ssd, result.pooled)
    return a.mean, b.mean, va, vb, 0.0, df


def batch_lift(batch, method: Any = "fieller") -> dict[str, np.ndarray]:
    """Lift, its limits and ``bounded`` for every row of a two-sample BatchResult."""
    if method not in METHODS:
        raise fail("method", FUNC, "'fieller' or 'log'", method)
    if batch.design != "two-sample":
        raise ParameterError("relative_lift on a batch needs two groups (by=).")
    ma = batch.mean_a + batch.mean_lo_a
    mb = batch.mean_b + batch.mean_lo_b
    va, vb, df = two_sample_parts(
        batch.n_a, ma, batch.ssd_a, batch.n_b, mb, batch.ssd_b, batch.pooled
    )
    if method == "fieller":
        rho, lo, hi, ok = core_ratio.fieller(ma, mb, va, vb, 0.0, df, batch.level, batch.side)
    else:
        rho, lo, hi = core_ratio.log_delta(ma, mb, va, vb, 0.0, df, batch.level, batch.side)
        ok = np.isfinite(lo) | np.isfinite(hi)
    return {"lift": rho - 1.0, "lift_low": lo - 1.0, "lift_high": hi - 1.0, "lift_bounded": ok}
