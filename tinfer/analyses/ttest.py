"""One t procedure: summaries and labels -> a :class:`~tinfer.TResult`.

Shared by every entry point (the pandas and Dask accessors, ``from_summary``) and by
``TResult.recompute``. Checks the options, runs :mod:`tinfer.core.procedures` (or Yuen's
trimmed-mean t, :mod:`tinfer.analyses.robust`), adds a margin claim
(:mod:`tinfer.analyses.equivalence`) and wraps the numbers in the result type.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import replace

import numpy as np

from ..checks import check_bool, check_finite, check_level, check_side
from ..core import procedures
from ..core.summary import Summary
from ..errors import DataError
from ..results.parts import Effect, GroupStats
from ..results.provenance import frozen_copy, now_iso
from ..results.ttest import TResult
from .equivalence import check_margin, equivalence_for
from .lift import check_relative, relative_lift_of
from .robust import ROBUST_EFFECT, check_trim, trimmed

METHODS = {
    "one-sample": "One-sample t test",
    "paired": "Paired t test",
    "welch": "Welch two-sample t test",
    "pooled": "Two-sample t test, pooled variance",
}
EFFECT_NAMES = {"one-sample": "Cohen's d", "paired": "d_z", "two-sample": "Hedges' g"}


def _owned(x: np.ndarray) -> bool:
    """True for an array a result already owns: read-only and not a view of another."""
    return isinstance(x, np.ndarray) and not x.flags.writeable and x.base is None


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
    relative=False,
    estimand: str = "mean",
) -> TResult:
    """Run the procedure for ``design`` on ``summaries`` and wrap the numbers in a TResult."""
    relative = check_relative(relative, func)
    level = check_level(level, func)
    side = check_side(side, func)
    null = check_finite(null, "null", func)
    pooled = check_bool(pooled, "pooled", func)
    margin_spec = check_margin(margin, margin_units, worse, superior, func)
    trim = check_trim(trim, func, samples, pooled)
    labels = tuple(str(v) for v in labels)
    n_missing = tuple(n_missing) or (0,) * len(summaries)
    if samples is not None:  # the result owns read-only copies, never the caller's column
        samples = tuple(x if _owned(x) else frozen_copy(x) for x in samples)
    opts = dict(null=null, level=level, side=side, effect_ci=not trim)
    if design == "two-sample":
        c, comparison, groups = _two_sample(
            summaries, labels, variable, samples, n_missing, pooled=pooled, **opts
        )
        method = METHODS["pooled" if pooled else "welch"]
    else:
        c, comparison, groups, labels = _one_sample(
            design, summaries[0], labels, variable, samples, n_missing[0], extra_groups, **opts
        )
        method, pooled = METHODS[design], False
    if trim:
        c, method, parts = trimmed(design, samples, trim, labels, variable, null, level, side)
        groups = _with_trimmed(groups, parts)
        if design == "one-sample":
            comparison = f"{trim * 100:g}% trimmed mean of {variable}"
    nums = _numbers(c)
    if estimand == "ratio":
        method = f"{method}, delta method for the ratios"
    equivalence = None
    if margin_spec is not None:
        words = dict(labels=labels, comparison=comparison, units=units, func=func)
        est = {k: nums[k] for k in ("estimate", "se", "df")}
        est["estimate_lo"] = _scalar(c.estimate_lo)
        equivalence = equivalence_for(
            margin_spec, design=design, summaries=tuple(summaries), null=null, level=level,
            **est, **words,
        )  # fmt: skip
    result = TResult(
        design=design, variable=str(variable), comparison=comparison, **nums, level=level,
        side=side, null=null, groups=groups, method=method, pooled=pooled, units=units,
        effect=_effect(c, ROBUST_EFFECT if trim else EFFECT_NAMES[design], level),
        warnings=_notes(warnings, groups, nums["p"]), labels=labels,
        summaries=tuple(summaries), samples=samples, created=now_iso(), trim=trim,
        equivalence=equivalence, estimand=estimand,
    )  # fmt: skip
    if relative is not None:
        result = replace(result, lift=relative_lift_of(result, relative))
    return result


def _effect(c, name: str, level: float) -> Effect:
    """The effect size of one computed test with its interval."""
    ci = (_scalar(c.effect_low), _scalar(c.effect_high))
    return Effect(name=name, value=_scalar(c.effect), ci=ci, level=level)


def _with_trimmed(groups: tuple[GroupStats, ...], parts) -> tuple[GroupStats, ...]:
    """The groups with their trimmed means, winsorised SDs and Yuen SEs (the last groups:
    the samples, or the paired differences)."""
    first = len(groups) - len(parts)
    out = list(groups)
    for k, t in enumerate(parts, start=first):
        out[k] = replace(
            groups[k],
            trimmed_mean=_scalar(t.mean),
            winsorised_sd=_scalar(t.wsd),
            trimmed_se=_scalar(t.se),
        )
    return tuple(out)


def _numbers(c) -> dict:
    """The numbers of one computed test as Python floats, keyed as TResult's fields."""
    names = ("estimate", "se", "t", "df", "p", "log_p")
    return {k: _scalar(getattr(c, k)) for k in names} | {
        "ci": (_scalar(c.ci_low), _scalar(c.ci_high))
    }


def _two_sample(summaries, labels, variable, samples, n_missing, **opts):
    """Welch or pooled t on two summaries, after checking each group can be tested."""
    a, b = summaries
    for k, (s, lab) in enumerate(zip(summaries, labels, strict=True)):
        check_summary_n(s, lab)
        check_scale(s, f"{variable} in group {lab!r}", None if samples is None else samples[k])
    if not (_scalar(a.ssd) > 0 or _scalar(b.ssd) > 0):
        raise DataError(
            f"All values of {variable} are equal within each group (no spread), so the "
            "standard error is zero and t is undefined."
        )
    c = procedures.two_sample(a, b, **opts)
    groups = tuple(
        group_stats(lab, s, m) for lab, s, m in zip(labels, summaries, n_missing, strict=True)
    )
    return c, f"{labels[0]} minus {labels[1]}", groups


def _one_sample(design, s, labels, variable, samples, n_missing, extra_groups, **opts):
    """One-sample t on one summary (of the values, or of paired differences)."""
    what = f"the differences {labels[0]} minus {labels[1]}" if design == "paired" else variable
    check_summary(s, what, None if samples is None else samples[0])
    c = procedures.one_sample(s, **opts)
    if design == "paired":
        comparison = f"{labels[0]} minus {labels[1]}"
        return c, comparison, (*extra_groups, group_stats(comparison, s, n_missing)), labels
    labels = labels or (variable,)
    return c, f"mean of {variable}", (group_stats(labels[0], s, n_missing),), labels


def _notes(warnings: Sequence[str], groups: Sequence[GroupStats], p: float) -> tuple[str, ...]:
    """The caller's notes, the missing values dropped per group, and a p underflow note."""
    notes = list(warnings)
    notes += [
        f"{g.n_missing} missing value(s) dropped from {g.label}." for g in groups if g.n_missing
    ]
    if p == 0.0 or p < 1e-300:
        notes.append(_UNDERFLOW_NOTE)
    return tuple(dict.fromkeys(notes))


_UNDERFLOW_NOTE = "The p-value is below what double precision holds; log_p keeps its exact log."


def check_summary_n(s: Summary, label: str) -> None:
    n = _scalar(s.n)
    if n < 2:
        raise DataError(
            f"Group {label!r} has {n:g} usable value(s) after dropping missing ones; a "
            "two-sample t procedure needs at least 2 per group."
        )


def _lift_method(method: str) -> str:
    return "fieller" if method == "null" else method  # one sample: exact either way


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
        "relative": None if result.lift is None else _lift_method(result.lift.method),
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
        estimand=result.estimand,
        **opts,
    )
    return new
