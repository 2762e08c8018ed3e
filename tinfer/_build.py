"""Turn summaries and labels into result objects (shared by the accessor and from_summary)."""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from ._errors import DataError, ParameterError
from ._margin import check_margin, equivalence_for
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


def check_scale(s: Summary, label: str, values=None) -> None:
    """Raise a DataError when the mean or the sum of squares leaves double precision.

    Values whose spread is beyond about 1e154 overflow the sum of squared deviations (t would
    silently come out 0); a spread below about 1e-154 underflows it to 0.
    """
    if not (np.isfinite(_scalar(s.mean)) and np.isfinite(_scalar(s.ssd))):
        raise DataError(
            f"The values of {label} are too large for double precision (their sum of squared "
            "deviations overflows). Rescale them, for example by expressing them in larger units."
        )
    if values is not None and _scalar(s.ssd) == 0 and np.ptp(values) > 0:
        raise DataError(
            f"The spread of {label} is too small for double precision (its squared deviations "
            "underflow to 0). Rescale the values, for example by expressing them in smaller units."
        )


def check_summary(s: Summary, label: str, values=None) -> None:
    """Raise a DataError when a summary cannot support a t procedure."""
    n = _scalar(s.n)
    if n < 2:
        raise DataError(
            f"{label} has {n:g} usable value(s) after dropping missing ones; a t procedure "
            "needs at least 2. Check the filter or the missing values."
        )
    check_scale(s, label, values)
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
    margin=None,
    margin_units="raw",
    worse=None,
    superior=False,
    trim=0.0,
) -> TResult:
    """Run the procedure for ``design`` on ``summaries`` and wrap the numbers in a TResult."""
    level = check_level(level, func)
    side = check_side(side, func)
    null = check_finite(null, "null", func)
    pooled = check_bool(pooled, "pooled", func)
    margin_spec = check_margin(margin, margin_units, worse, superior, func)
    trim = check_trim(trim, func, samples, pooled)
    labels = tuple(str(v) for v in labels)
    n_missing = tuple(n_missing) or (0,) * len(summaries)
    if design == "two-sample":
        a, b = summaries
        for k, (s, lab) in enumerate(zip(summaries, labels, strict=True)):
            check_summary_n(s, lab)
            check_scale(s, f"{variable} in group {lab!r}", None if samples is None else samples[k])
        if not (_scalar(a.ssd) > 0 or _scalar(b.ssd) > 0):
            raise DataError(
                f"All values of {variable} are equal within each group (no spread), so the "
                "standard error is zero and t is undefined."
            )
        c = procedures.two_sample(
            a, b, null=null, level=level, side=side, pooled=pooled, effect_ci=not trim
        )
        comparison = f"{labels[0]} minus {labels[1]}"
        method = METHODS["pooled" if pooled else "welch"]
        groups = tuple(
            group_stats(lab, s, m) for lab, s, m in zip(labels, summaries, n_missing, strict=True)
        )
    else:
        (s,) = summaries
        what = f"the differences {labels[0]} minus {labels[1]}" if design == "paired" else variable
        check_summary(s, what, None if samples is None else samples[0])
        c = procedures.one_sample(s, null=null, level=level, side=side, effect_ci=not trim)
        if design == "paired":
            comparison = f"{labels[0]} minus {labels[1]}"
            groups = (*extra_groups, group_stats(comparison, s, n_missing[0]))
        else:
            comparison = f"mean of {variable}"
            labels = labels or (variable,)
            groups = (group_stats(labels[0], s, n_missing[0]),)
        method = METHODS[design]
        pooled = False
    if trim:
        c, method = trimmed(design, samples, trim, labels, variable, null, level, side)
        if design == "one-sample":
            comparison = f"{trim * 100:g}% trimmed mean of {variable}"
    warns = list(warnings)
    for g in groups:
        if g.n_missing:
            warns.append(f"{g.n_missing} missing value(s) dropped from {g.label}.")
    p = _scalar(c.p)
    if p == 0.0 or p < 1e-300:
        warns.append(_UNDERFLOW_NOTE)
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
            name=ROBUST_EFFECT if trim else EFFECT_NAMES[design],
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
        trim=trim,
        equivalence=None
        if margin_spec is None
        else equivalence_for(
            margin_spec,
            design=design,
            summaries=tuple(summaries),
            estimate=_scalar(c.estimate),
            se=_scalar(c.se),
            df=_scalar(c.df),
            null=null,
            level=level,
            labels=labels,
            comparison=comparison,
            units=units,
            func=func,
        ),
    )


ROBUST_EFFECT = "robust d (AKP)"
_UNDERFLOW_NOTE = "The p-value is below what double precision holds; log_p keeps its exact log."


def check_trim(trim, func: str, samples, pooled: bool) -> float:
    """``trim`` as a float in [0, 0.5); trimming needs the values and excludes ``pooled``."""
    if isinstance(trim, bool) or not isinstance(trim, int | float) or not 0 <= trim < 0.5:
        raise ParameterError(
            f"The 'trim' parameter of {func} must be a float in [0, 0.5) (0 for the ordinary "
            f"t, 0.2 for 20% trimmed means). Got {trim!r} instead."
        )
    if trim and samples is None:
        raise ParameterError(
            f"The 'trim' parameter of {func} needs the data values; results from published "
            "summaries (n, mean, sd) cannot be trimmed. Use trim=0."
        )
    if trim and pooled:
        raise ParameterError(
            f"The 'pooled' parameter of {func} must be False with trim > 0: Yuen's test does "
            "not pool variances. Got True instead."
        )
    return float(trim)


def trimmed(design, samples, trim, labels, variable, null, level, side):
    """Yuen's trimmed-mean t on the stored values; returns the computed arrays and method."""
    from .core import robust

    parts = [robust.Trimmed.of(np.asarray(x, float), trim) for x in samples]
    names = list(labels) if design == "two-sample" else [f"the values of {variable}"]
    if design == "paired":
        names = [f"the differences {labels[0]} minus {labels[1]}"]
    for p, name in zip(parts, names, strict=True):
        if int(p.h) < 2:
            raise DataError(
                f"After trimming {trim:g} per tail, {name} keep(s) {int(p.h)} value(s); "
                "a trimmed-mean t needs at least 2. Use a smaller trim or more data."
            )
    if not all(_scalar(p.wvar) > 0 for p in parts):
        bad = [n for p, n in zip(parts, names, strict=True) if not _scalar(p.wvar) > 0]
        if design != "two-sample" or len(bad) == 2:
            raise DataError(
                f"The winsorised values of {' and '.join(bad)} have no spread, so the "
                "trimmed-mean standard error is zero and t is undefined. Use a smaller trim."
            )
    pct = f"{trim * 100:g}% trimmed"
    if design == "two-sample":
        c = robust.yuen_two_sample(*parts, null=null, level=level, side=side)
        return c, f"Yuen trimmed-mean t ({pct})"
    c = robust.yuen_one_sample(parts[0], null=null, level=level, side=side)
    kind = "Paired" if design == "paired" else "One-sample"
    return c, f"{kind} Yuen trimmed-mean t ({pct})"


def check_summary_n(s: Summary, label: str) -> None:
    n = _scalar(s.n)
    if n < 2:
        raise DataError(
            f"Group {label!r} has {n:g} usable value(s) after dropping missing ones; a "
            "two-sample t procedure needs at least 2 per group."
        )


def rebuild(result: TResult, **changes) -> TResult:
    """Recompute ``result`` from its stored summaries with other options."""
    allowed = {"level", "side", "null", "pooled", "margin", "margin_units", "worse", "superior"}
    allowed |= {"trim"}
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
        "trim": result.trim,
    }
    eq = result.equivalence
    opts |= {
        "margin": eq.margin if eq else None,
        "margin_units": eq.margin_units if eq else "raw",
        "worse": eq.worse if eq else None,
        "superior": eq.superior if eq else False,
    }
    opts.update(changes)
    if changes.get("margin", 0) is None:  # margin=None drops the claim and its companions
        for key, default in (("margin_units", "raw"), ("worse", None), ("superior", False)):
            opts[key] = changes.get(key, default)
    extra = result.groups[:-1] if result.design == "paired" else ()
    n_missing = tuple(g.n_missing for g in result.groups[-len(result.summaries) :])
    # notes about the data (rows not used, missing values) stay; the p-value note is redone
    kept = tuple(w for w in result.warnings if not w.startswith(_UNDERFLOW_NOTE[:20]))
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
        warnings=kept,
        **opts,
    )
    return new
