"""Turn summaries and labels into result objects (shared by the accessor and from_summary)."""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from ._errors import DataError
from ._validation import check_bool, check_finite, check_level, check_side
from .core import procedures
from .core.summary import Summary
from .results import Effect, GroupStats, TResult, now_iso

METHODS = {
    "one-sample": "One-sample t test",
    "paired": "Paired t test",
    "welch": "Welch two-sample t test",
    "pooled": "Two-sample t test, pooled variance",
}
EFFECT_NAMES = {"one-sample": "Cohen's d", "paired": "d_z", "two-sample": "Hedges' g"}


def _scalar(x) -> float:
    return float(np.asarray(x).reshape(()))


def group_stats(label: str, s: Summary, n_missing: int = 0) -> GroupStats:
    return GroupStats(
        label=str(label),
        n=int(_scalar(s.n)),
        n_missing=int(n_missing),
        mean=_scalar(s.mean),
        sd=_scalar(s.sd),
        se=_scalar(s.se),
    )


def check_summary(s: Summary, label: str) -> None:
    """Raise a DataError when a summary cannot support a t procedure."""
    n = _scalar(s.n)
    if n < 2:
        raise DataError(
            f"{label} has {n:g} usable value(s) after dropping missing ones; a t procedure "
            "needs at least 2. Check the filter or the missing values."
        )
    if not _scalar(s.ssd) > 0:
        raise DataError(
            f"All values of {label} are equal (no spread), so the standard error is zero and "
            "t is undefined. Check that the right column was chosen."
        )


def build(
    design: str,
    summaries: Sequence[Summary],
    *,
    func: str,
    null=0.0,
    level=0.95,
    side="two-sided",
    pooled=False,
    variable: str = "value",
    labels: Sequence[str] = (),
    units: str | None = None,
    n_missing: Sequence[int] = (),
    extra_groups: Sequence[GroupStats] = (),
    samples: tuple[np.ndarray, ...] | None = None,
    warnings: Sequence[str] = (),
) -> TResult:
    """Run the procedure for ``design`` on ``summaries`` and wrap the numbers in a TResult."""
    level = check_level(level, func)
    side = check_side(side, func)
    null = check_finite(null, "null", func)
    pooled = check_bool(pooled, "pooled", func)
    labels = tuple(str(v) for v in labels)
    n_missing = tuple(n_missing) or (0,) * len(summaries)
    if design == "two-sample":
        a, b = summaries
        for s, lab in zip(summaries, labels, strict=True):
            check_summary_n(s, lab)
        if not (_scalar(a.ssd) > 0 or _scalar(b.ssd) > 0):
            raise DataError(
                f"All values of {variable} are equal within each group (no spread), so the "
                "standard error is zero and t is undefined."
            )
        c = procedures.two_sample(a, b, null=null, level=level, side=side, pooled=pooled)
        comparison = f"{labels[0]} minus {labels[1]}"
        method = METHODS["pooled" if pooled else "welch"]
        groups = tuple(
            group_stats(lab, s, m) for lab, s, m in zip(labels, summaries, n_missing, strict=True)
        )
    else:
        (s,) = summaries
        what = f"the differences {labels[0]} minus {labels[1]}" if design == "paired" else variable
        check_summary(s, what)
        c = procedures.one_sample(s, null=null, level=level, side=side)
        if design == "paired":
            comparison = f"{labels[0]} minus {labels[1]}"
            groups = (*extra_groups, group_stats(comparison, s, n_missing[0]))
        else:
            comparison = f"mean of {variable}"
            labels = labels or (variable,)
            groups = (group_stats(labels[0], s, n_missing[0]),)
        method = METHODS[design]
        pooled = False
    warns = list(warnings)
    for g in groups:
        if g.n_missing:
            warns.append(f"{g.n_missing} missing value(s) dropped from {g.label}.")
    p = _scalar(c.p)
    if p == 0.0 or p < 1e-300:
        warns.append("The p-value is below what double precision holds; log_p keeps its exact log.")
    return TResult(
        design=design,
        variable=str(variable),
        comparison=comparison,
        estimate=_scalar(c.estimate),
        se=_scalar(c.se),
        t=_scalar(c.t),
        df=_scalar(c.df),
        p=p,
        log_p=_scalar(c.log_p),
        ci=(_scalar(c.ci_low), _scalar(c.ci_high)),
        level=level,
        side=side,
        null=null,
        effect=Effect(
            name=EFFECT_NAMES[design],
            value=_scalar(c.effect),
            ci=(_scalar(c.effect_low), _scalar(c.effect_high)),
            level=level,
        ),
        groups=groups,
        method=method,
        pooled=pooled,
        units=units,
        warnings=tuple(dict.fromkeys(warns)),
        labels=labels,
        summaries=tuple(summaries),
        samples=samples,
        created=now_iso(),
    )


def check_summary_n(s: Summary, label: str) -> None:
    n = _scalar(s.n)
    if n < 2:
        raise DataError(
            f"Group {label!r} has {n:g} usable value(s) after dropping missing ones; a "
            "two-sample t procedure needs at least 2 per group."
        )


def rebuild(result: TResult, **changes) -> TResult:
    """Recompute ``result`` from its stored summaries with other options."""
    allowed = {"level", "side", "null", "pooled"}
    unknown = set(changes) - allowed
    if unknown:
        raise TypeError(
            f"recompute() got unexpected option(s) {sorted(unknown)}; use {sorted(allowed)}."
        )
    opts = {
        "level": result.level,
        "side": result.side,
        "null": result.null,
        "pooled": result.pooled,
    }
    opts.update(changes)
    extra = result.groups[:-1] if result.design == "paired" else ()
    n_missing = tuple(g.n_missing for g in result.groups[-len(result.summaries) :])
    new = build(
        result.design,
        result.summaries,
        func="recompute",
        variable=result.variable,
        labels=result.labels,
        units=result.units,
        n_missing=n_missing,
        extra_groups=extra,
        samples=result.samples,
        **opts,
    )
    return new
