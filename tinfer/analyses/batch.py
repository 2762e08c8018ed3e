"""Many t tests at once: arrays of summaries -> a :class:`~tinfer.BatchResult`.

The engine behind ``df.tinfer.compare``, :func:`tinfer.compare_summaries` and the Dask
accessor. Every path ends here with arrays of summaries (n, mean, sum of squared
deviations) shaped ``(metric, segment, arm)``: :func:`from_cube` flattens them to rows and
:func:`run_batch` hands the rows to :mod:`tinfer.core.procedures` in one vectorised call,
then adjusts the p-values for multiplicity with :mod:`tinfer.core.multiplicity`. Reading
DataFrames into such arrays is :mod:`tinfer.frames.batch`'s job.

Rows of a :class:`~tinfer.BatchResult` run metric by metric, and within a metric segment by
segment in sorted key order.
"""

from __future__ import annotations

import warnings as _warnings
from collections.abc import Sequence
from typing import Any

import numpy as np

from ..checks import check_bool, check_finite, check_level, check_side
from ..core import multiplicity, procedures
from ..core import pairwise as pairwise_core
from ..core.summary import Summary
from ..errors import ParameterError, SmallSegmentWarning
from ..results.batch import BatchResult
from ..results.provenance import frozen
from .ttest import EFFECT_NAMES, METHODS


def check_options(func, *, adjust, rate, level, side, null, pooled) -> dict[str, Any]:
    """Validate the shared batch options; returns them cleaned."""
    if isinstance(rate, bool) or not isinstance(rate, int | float) or not 0.0 < rate < 1.0:
        raise ParameterError(
            f"The 'rate' parameter of {func} must be a float in (0, 1). Got {rate!r} instead."
        )
    return dict(
        adjust=multiplicity.check_method(adjust, func),
        rate=float(rate),
        level=check_level(level, func),
        side=check_side(side, func),
        null=check_finite(null, "null", func),
        pooled=check_bool(pooled, "pooled", func),
    )


def run_batch(
    design: str,
    a: Summary,
    b: Summary | None,
    *,
    row_segment: np.ndarray,
    row_metric: np.ndarray,
    segments: Sequence[tuple],
    keys: Sequence[str],
    metrics: Sequence[str],
    labels: Sequence[str],
    options: dict[str, Any],
    n_missing: np.ndarray | None = None,
    notes: Sequence[str] = (),
    mean_lo_a: np.ndarray | None = None,
    mean_lo_b: np.ndarray | None = None,
) -> BatchResult:
    """Run every test in one vectorised call and adjust the p-values.

    ``a`` and ``b`` hold one entry per row (``b`` is None for one-sample and paired
    designs); ``mean_lo_a`` and ``mean_lo_b`` are the low parts of double-double means
    (default zero). Rows with fewer than 2 values in an arm, or no spread, get NaN results and
    a :class:`SmallSegmentWarning`.
    """
    two = design == "two-sample"
    arm_a = _arm(a, mean_lo_a)
    arm_b = _arm(b, mean_lo_b) if two else _empty_arm(arm_a[0])
    ok = _testable(arm_a, arm_b if two else None)
    # Rows that cannot be tested get harmless stand-in summaries, so that the vectorised
    # call raises no floating-point warnings, and are set to NaN afterwards.
    bad = ~ok
    stand_in = (2.0, 0.0, 0.0, 1.0)  # n, mean, mean_lo, ssd
    sa = tuple(np.where(bad, v, x) for v, x in zip(stand_in, arm_a, strict=True))
    sb = tuple(np.where(bad, v, x) for v, x in zip(stand_in, arm_b, strict=True)) if two else None
    opts = (options["null"], options["level"], options["side"], options["pooled"], False)
    c = procedures.rows(design, sa, sb, *opts)
    if two:
        method = METHODS["pooled" if options["pooled"] else "welch"]
        comparison = f"{labels[0]} minus {labels[1]}"
    else:
        method = METHODS[design]
        comparison = f"{labels[0]} minus {labels[1]}" if design == "paired" else "mean"

    def clean(v):
        return frozen(np.where(ok, v, np.nan))

    p = clean(c.p)
    p_adj = frozen(multiplicity.adjust(p, options["adjust"]))
    disc = frozen(multiplicity.discoveries(p_adj, options["rate"]))
    notes = list(notes)
    if bad.any():
        msg = _untested_note(bad, row_segment, row_metric, segments, keys, metrics)
        notes.append(msg)
        _warnings.warn(msg, SmallSegmentWarning, stacklevel=3)
    fields = ("n", "mean", "mean_lo", "ssd")
    arrays = {f"{k}_{s}": frozen(v) for s, arm in (("a", arm_a), ("b", arm_b))
              for k, v in zip(fields, arm, strict=True)}  # fmt: skip
    return BatchResult(
        design=design,
        method=method,
        comparison=comparison,
        labels=tuple(str(v) for v in labels),
        keys=tuple(str(k) for k in keys),
        segments=tuple(s if type(s) is tuple else tuple(s) for s in segments),
        metrics=tuple(str(m) for m in metrics),
        row_segment=frozen(np.asarray(row_segment, dtype=np.intp)),
        row_metric=frozen(np.asarray(row_metric, dtype=np.intp)),
        **arrays,
        estimate=clean(c.estimate),
        se=clean(c.se),
        t=clean(c.t),
        df=clean(c.df),
        p=p,
        log_p=clean(c.log_p),
        ci_low=clean(c.ci_low),
        ci_high=clean(c.ci_high),
        p_adjusted=p_adj,
        discovery=disc,
        effect=clean(c.effect),
        testable=frozen(ok),
        effect_name=EFFECT_NAMES[design],
        warnings=tuple(dict.fromkeys(notes)),
        n_missing=None if n_missing is None else frozen(np.asarray(n_missing)),
        **options,
    )


def _arm(s: Summary, mean_lo) -> tuple[np.ndarray, ...]:
    """One arm's (n, mean, mean_lo, ssd) as float arrays (mean_lo zero when not given)."""
    mean = np.asarray(s.mean, float)
    lo = np.zeros_like(mean) if mean_lo is None else np.asarray(mean_lo, float)
    return np.asarray(s.n, float), mean, lo, np.asarray(s.ssd, float)


def _empty_arm(n_a: np.ndarray) -> tuple[np.ndarray, ...]:
    """The unused second arm of one-sample and paired batches."""
    return np.zeros_like(n_a), np.full_like(n_a, np.nan), np.zeros_like(n_a), np.zeros_like(n_a)


def _testable(a, b) -> np.ndarray:
    """Rows with at least 2 values per arm, some spread, and finite summaries."""
    n_a, mean_a, _, ssd_a = a
    with np.errstate(invalid="ignore"):
        if b is None:
            ok = (n_a >= 2) & (ssd_a > 0)
        else:
            n_b, mean_b, _, ssd_b = b
            ok = (n_a >= 2) & (n_b >= 2) & ((ssd_a > 0) | (ssd_b > 0))
            ok &= np.isfinite(mean_b) & np.isfinite(ssd_b)
    return ok & np.isfinite(mean_a) & np.isfinite(ssd_a)


def _untested_note(bad, row_segment, row_metric, segments, keys, metrics) -> str:
    first = int(np.flatnonzero(bad)[0])
    seg = segments[int(row_segment[first])]
    where = ", ".join(f"{k}={v}" for k, v in zip(keys, seg, strict=True)) or "all rows"
    return (
        f"{int(bad.sum())} of {bad.size} comparison(s) could not be tested (fewer than 2 "
        "values in an arm, no spread, or values beyond double precision) and have NaN "
        "results; the first is "
        f"{metrics[row_metric[first]]} in {where}. They are left out of the multiplicity "
        "adjustment."
    )


def from_cube(
    design: str,
    n: np.ndarray,
    mean: np.ndarray,
    ssd: np.ndarray,
    *,
    present: np.ndarray | None,
    segments: Sequence[tuple],
    keys: Sequence[str],
    metrics: Sequence[str],
    labels: Sequence[str],
    options: dict[str, Any],
    n_missing: np.ndarray | None = None,
    notes: Sequence[str] = (),
    mean_lo: np.ndarray | None = None,
) -> BatchResult:
    """Run the batch from arrays shaped ``(metric, segment, arm)`` (arm axis of length 2
    for two samples, 1 otherwise). ``present`` (metric, segment) selects the rows kept;
    None keeps all."""
    n_m, n_s = n.shape[:2]
    if present is None:
        present = np.ones((n_m, n_s), dtype=bool)
    rm, rs = np.nonzero(present)
    two = design == "two-sample"
    a = Summary(n[rm, rs, 0], mean[rm, rs, 0], ssd[rm, rs, 0])
    b = Summary(n[rm, rs, 1], mean[rm, rs, 1], ssd[rm, rs, 1]) if two else None
    lo_a = lo_b = None
    if mean_lo is not None:
        lo = np.where(np.isfinite(mean_lo), mean_lo, 0.0)
        lo_a = lo[rm, rs, 0]
        lo_b = lo[rm, rs, 1] if two else None
    miss = None if n_missing is None else n_missing[rm, rs].sum(axis=-1)
    return run_batch(
        design,
        a,
        b,
        row_segment=rs,
        row_metric=rm,
        segments=segments,
        keys=keys,
        metrics=metrics,
        labels=labels,
        options=options,
        n_missing=miss,
        notes=notes,
        mean_lo_a=lo_a,
        mean_lo_b=lo_b,
    )


def run_pairwise_batch(
    n: np.ndarray,
    mean: np.ndarray,
    ssd: np.ndarray,
    mean_lo: np.ndarray,
    *,
    method: str,
    levels: Sequence[str],
    by: str,
    control: int | None,
    segments: Sequence[tuple],
    keys: Sequence[str],
    metrics: Sequence[str],
    options: dict[str, Any],
    n_missing: np.ndarray | None = None,
    notes: Sequence[str] = (),
) -> BatchResult:
    """A family of pairwise comparisons in every segment, from arrays shaped
    ``(metric, segment, level)``, vectorised over segments (no loop per segment).

    Rows run metric by metric, then segment by segment, then pair by pair; a row is
    testable when both levels have two or more values and some spread.
    """
    first, second = pairwise_core.pair_indices(len(levels), control)
    n_m, n_s = n.shape[:2]
    opts = dict(against=control, level=options["level"], side=options["side"], effect_ci=False)
    parts = [
        pairwise_core.family(
            method, n[m], mean[m], ssd[m], first, second, mean_lo=mean_lo[m], **opts
        )
        for m in range(n_m)
    ]

    def stack(name):
        return np.concatenate([getattr(f, name).ravel() for f in parts])

    n_p = first.size
    row_metric = np.repeat(np.arange(n_m), n_s * n_p)
    row_segment = np.tile(np.repeat(np.arange(n_s), n_p), n_m)
    row_pair = np.tile(np.arange(n_p), n_m * n_s)
    p_family = stack("p_family")
    ok = np.isfinite(p_family)
    p_adj = frozen(multiplicity.adjust(p_family, options["adjust"]))
    arms = _pair_arms(n, mean, ssd, mean_lo, first, second)
    notes = list(notes)
    if (~ok).any():
        notes.append(
            f"{int((~ok).sum())} of {ok.size} pair(s) could not be compared (a level with fewer "
            "than 2 values in that segment, or no spread) and have NaN results; they are left "
            "out of the adjustment."
        )
    miss = None
    if n_missing is not None:
        miss = frozen((n_missing[:, :, first] + n_missing[:, :, second]).ravel())
    word = "each level minus " + levels[control] if control is not None else "every pair of levels"
    return BatchResult(
        design="two-sample",
        method=f"{pairwise_core.SHORT[method]} pairwise comparisons",
        comparison=f"{word} of {by}",
        labels=tuple(levels),
        keys=tuple(str(k) for k in keys),
        segments=tuple(tuple(s) for s in segments),
        metrics=tuple(str(m) for m in metrics),
        row_segment=frozen(row_segment),
        row_metric=frozen(row_metric),
        **arms,
        estimate=frozen(stack("estimate")),
        se=frozen(stack("se")),
        t=frozen(stack("t")),
        df=frozen(stack("df")),
        p=frozen(stack("p_single")),
        log_p=frozen(_log(stack("p_single"))),
        ci_low=frozen(stack("ci_low")),
        ci_high=frozen(stack("ci_high")),
        p_adjusted=p_adj,
        discovery=frozen(multiplicity.discoveries(p_adj, options["rate"])),
        effect=frozen(stack("effect")),
        testable=frozen(ok),
        effect_name=EFFECT_NAMES["two-sample"],
        warnings=tuple(dict.fromkeys(notes)),
        n_missing=miss,
        pairs=tuple((levels[a], levels[b]) for a, b in zip(first, second, strict=True)),
        row_pair=frozen(row_pair),
        p_family=frozen(p_family),
        **options,
    )


def _log(p: np.ndarray) -> np.ndarray:
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.log(p)


def _pair_arms(n, mean, ssd, mean_lo, first, second) -> dict[str, np.ndarray]:
    """Per-row summaries of each pair's two levels: ``n_a, mean_a, ..., ssd_b``."""
    arms = {}
    for suffix, idx in (("a", first), ("b", second)):
        for name, arr in (("n", n), ("mean", mean), ("mean_lo", mean_lo), ("ssd", ssd)):
            v = arr[:, :, idx].ravel().astype(float)
            if name == "mean_lo":
                v = np.where(np.isfinite(v), v, 0.0)
            arms[f"{name}_{suffix}"] = frozen(v)
    return arms
