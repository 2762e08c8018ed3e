"""Many t tests at once: one per segment and metric, with adjusted p-values.

The engine behind ``df.tinfer.compare``, :func:`tinfer.compare_summaries` and the Dask
accessor. Every path ends in the same place: arrays of summaries (n, mean, sum of squared
deviations) shaped ``(metric, segment, arm)``, which :func:`run_batch` hands to
:mod:`tinfer.core.procedures` in one vectorised call, then adjusts the p-values for
multiplicity with :mod:`tinfer.core.multiplicity`.

- DataFrame path: the segment and arm columns become integer codes (``pandas.factorize``,
  or ``value - min`` for compact integer columns), and :func:`tinfer.core.grouped.
  grouped_summary` builds every group's summary in a few ``numpy.bincount`` passes.
- Summary path: a table with one row per segment (and arm), as a SQL ``GROUP BY`` returns it.
- Dask path: partial summaries per partition, merged by Chan, Golub and LeVeque's formula.

Rows of a :class:`BatchResult` run metric by metric, and within a metric segment by segment
in sorted key order.
"""

from __future__ import annotations

import functools
import math
import warnings as _warnings
from collections.abc import Hashable, Sequence
from dataclasses import dataclass, field
from typing import Any

import numpy as np
import pandas as pd

from . import _frames
from ._errors import DataError, ParameterError
from ._validation import check_bool, check_finite, check_level, check_side
from .core import multiplicity, procedures
from .core.grouped import grouped_moments, integer_codes
from .core.summary import Summary

METHODS = {
    "one-sample": "One-sample t test",
    "paired": "Paired t test",
    "welch": "Welch two-sample t test",
    "pooled": "Two-sample t test, pooled variance",
}
EFFECT_NAMES = {"one-sample": "Cohen's d", "paired": "d_z", "two-sample": "Hedges' g"}
RESULT_COLUMNS = (
    "metric",
    "estimate",
    "se",
    "ci_low",
    "ci_high",
    "t",
    "df",
    "p",
    "p_adjusted",
    "discovery",
    "effect",
    "effect_ci_low",
    "effect_ci_high",
)


class SmallSegmentWarning(UserWarning):
    """Some segments had too few values (or no spread) to test; their results are NaN."""


# --------------------------------------------------------------------------- result object
@dataclass(frozen=True, eq=False)
class BatchResult:
    """Many t tests of the same kind, one per segment and metric, with adjusted p-values.

    Numbers and words only. Row ``i`` is metric ``metrics[row_metric[i]]`` in segment
    ``segments[row_segment[i]]``; arrays below are indexed by row. For two-sample designs
    arm ``a`` is ``labels[0]`` and arm ``b`` is ``labels[1]``; the estimate is a minus b.
    For one-sample and paired designs only the ``_a`` arrays are filled (the paired
    summaries are those of the differences).

    Attributes
    ----------
    design : str
        "two-sample", "one-sample" or "paired".
    keys : tuple of str
        Names of the segment columns (empty when there is one segment).
    segments : tuple of tuple
        Key values of each segment.
    metrics : tuple of str
        The compared quantities (value columns, or "first minus second" for paired ones).
    estimate, se, t, df, p, log_p, ci_low, ci_high : numpy.ndarray
        As on a single result; NaN for rows too small to test.
    p_adjusted : numpy.ndarray
        Adjusted p-values by ``adjust`` over all testable rows as one family.
    discovery : numpy.ndarray of bool
        ``p_adjusted <= rate``.
    effect : numpy.ndarray
        Hedges' g (two-sample), Cohen's d (one-sample) or d_z (paired); the noncentral-t
        interval is computed on first use (``effect_ci``), as it dominates the cost.
    """

    design: str
    method: str
    comparison: str
    labels: tuple[str, ...]
    keys: tuple[str, ...]
    segments: tuple[tuple[Any, ...], ...]
    metrics: tuple[str, ...]
    row_segment: np.ndarray
    row_metric: np.ndarray
    n_a: np.ndarray
    mean_a: np.ndarray
    ssd_a: np.ndarray
    n_b: np.ndarray
    mean_b: np.ndarray
    ssd_b: np.ndarray
    mean_lo_a: np.ndarray
    mean_lo_b: np.ndarray
    estimate: np.ndarray
    se: np.ndarray
    t: np.ndarray
    df: np.ndarray
    p: np.ndarray
    log_p: np.ndarray
    ci_low: np.ndarray
    ci_high: np.ndarray
    p_adjusted: np.ndarray
    discovery: np.ndarray
    effect: np.ndarray
    testable: np.ndarray
    adjust: str
    rate: float
    level: float
    side: str
    null: float
    pooled: bool
    effect_name: str
    warnings: tuple[str, ...] = ()
    n_missing: np.ndarray | None = field(default=None, repr=False)

    # ------------------------------------------------------------------ counts
    @property
    def n_rows(self) -> int:
        """Number of rows (segment x metric), testable or not."""
        return int(self.p.size)

    @property
    def n_tests(self) -> int:
        """Number of comparisons actually tested (the size of the adjusted family)."""
        return int(self.testable.sum())

    @property
    def n_discoveries(self) -> int:
        """Number of discoveries at ``rate`` after adjustment by ``adjust``."""
        return int(self.discovery.sum())

    @property
    def adjust_name(self) -> str:
        """The adjustment method in words."""
        return multiplicity.NAMES[self.adjust]

    @property
    def sd_a(self) -> np.ndarray:
        with np.errstate(invalid="ignore", divide="ignore"):
            return np.sqrt(self.ssd_a / (self.n_a - 1.0))

    @property
    def sd_b(self) -> np.ndarray:
        with np.errstate(invalid="ignore", divide="ignore"):
            return np.sqrt(self.ssd_b / (self.n_b - 1.0))

    @functools.cached_property
    def effect_ci(self) -> tuple[np.ndarray, np.ndarray]:
        """Noncentral-t confidence limits of the effect size, computed once on first use."""
        low = np.full(self.n_rows, np.nan)
        high = np.full(self.n_rows, np.nan)
        ok = self.testable
        if ok.any():
            c = _procedure(self, ok, effect_ci=True)
            low[ok], high[ok] = c.effect_low, c.effect_high
        return _frozen(low), _frozen(high)

    def segment_labels(self) -> list[str]:
        """Each row's segment as text, ``key=value`` pairs joined by commas."""
        texts = [
            ", ".join(f"{k}={v}" for k, v in zip(self.keys, seg, strict=True)) or "all rows"
            for seg in self.segments
        ]
        return [texts[i] for i in self.row_segment]

    # ------------------------------------------------------------------ tables
    def to_frame(self) -> pd.DataFrame:
        """One row per segment and metric: keys, estimate, interval, t, df, p, adjusted p,
        discovery, effect size with its interval, and n, mean, sd per arm."""
        data: dict[str, Any] = {}
        for j, k in enumerate(self.keys):
            data[k] = [self.segments[i][j] for i in self.row_segment]
        data["metric"] = [self.metrics[i] for i in self.row_metric]
        for name in RESULT_COLUMNS[1:10]:
            data[name] = getattr(self, name)
        data["effect"] = self.effect
        data["effect_ci_low"], data["effect_ci_high"] = self.effect_ci
        two = self.design == "two-sample"
        for arm in ("a", "b") if two else ("a",):
            suffix = f"_{arm}" if two else ""
            n = getattr(self, f"n_{arm}")
            data[f"n{suffix}"] = n.astype(np.int64)
            data[f"mean{suffix}"] = np.where(n > 0, getattr(self, f"mean_{arm}"), np.nan)
            data[f"sd{suffix}"] = getattr(self, f"sd_{arm}")
        return pd.DataFrame(data)

    def top(self, k: int = 10) -> pd.DataFrame:
        """The ``k`` rows with the smallest p-values (testable rows only)."""
        frame = self.to_frame()
        order = _order_by_p(self)[:k]
        return frame.iloc[order].reset_index(drop=True)

    # ------------------------------------------------------------------ display
    def __str__(self) -> str:
        from .display.batch import text_card

        return text_card(self)

    def __repr__(self) -> str:
        return f"<BatchResult {self.design}, {self.n_rows} rows>\n{self}"

    def _repr_mimebundle_(self, include=None, exclude=None):
        from .display.batch import html_card, text_card

        return {"text/plain": text_card(self), "text/html": html_card(self)}

    def chart(self, top: int = 30, page: int | None = None):
        """Forest plot of estimates with intervals, smallest p first, discoveries marked.

        Shows ``top`` rows (the smallest p-values) and a note counting the rest; with
        ``page=k`` (from 1) shows the k-th block of ``top`` rows in p order instead. The
        chart holds at most ``top`` rows whatever the number of segments.
        """
        from .display.batch import forest_chart

        return forest_chart(self, top=top, page=page)

    def p_histogram(self, bins: int = 20):
        """Histogram of the raw p-values (counts binned in numpy; only counts in the chart)."""
        from .display.batch import p_histogram

        return p_histogram(self, bins=bins)


def _frozen(a) -> np.ndarray:
    a = np.asarray(a)
    a.setflags(write=False)
    return a


def _order_by_p(r: BatchResult) -> np.ndarray:
    """Row indices of testable rows sorted by p (then by |t|, larger first)."""
    idx = np.flatnonzero(r.testable)
    key = np.lexsort((-np.abs(r.t[idx]), r.log_p[idx]))
    return idx[key]


def _procedure(r: BatchResult, rows, effect_ci: bool):
    """Rerun the procedure on some rows (used for the deferred effect-size intervals)."""
    b = None
    if r.design == "two-sample":
        b = (r.n_b[rows], r.mean_b[rows], r.mean_lo_b[rows], r.ssd_b[rows])
    a = (r.n_a[rows], r.mean_a[rows], r.mean_lo_a[rows], r.ssd_a[rows])
    c, _ = _run_procedure(r.design, a, b, r.null, r.level, r.side, r.pooled, effect_ci)
    return c


def _run_procedure(design, a, b, null, level, side, pooled, effect_ci):
    """Call tinfer.core.procedures on summaries shifted so that large means keep digits.

    Means arrive as double-double ``mean + mean_lo``. The t procedures only see
    differences of means, so each row is shifted by a constant first: by arm b's mean
    (two samples) or by ``null`` (one sample). ``(mean_a - mean_b) + (lo_a - lo_b)`` then
    carries the difference of means near 1e9 to full precision. Returns the Computed and
    the amount to add back to estimates and interval limits.
    """
    n_a, hi_a, lo_a, ssd_a = a
    opts = dict(level=level, side=side, effect_ci=effect_ci)
    if design == "two-sample":
        n_b, hi_b, lo_b, ssd_b = b
        sa = Summary(n_a, (hi_a - hi_b) + (lo_a - lo_b), ssd_a)
        sb = Summary(n_b, np.zeros_like(hi_b), ssd_b)
        return procedures.two_sample(sa, sb, null=null, pooled=pooled, **opts), 0.0
    sa = Summary(n_a, (hi_a - null) + lo_a, ssd_a)
    return procedures.one_sample(sa, null=0.0, **opts), null


# --------------------------------------------------------------------------- the tests
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
    n_a = np.asarray(a.n, float)
    mean_a = np.asarray(a.mean, float)
    ssd_a = np.asarray(a.ssd, float)
    lo_a = np.zeros_like(mean_a) if mean_lo_a is None else np.asarray(mean_lo_a, float)
    two = design == "two-sample"
    if two:
        n_b, mean_b, ssd_b = (np.asarray(v, float) for v in (b.n, b.mean, b.ssd))
        lo_b = np.zeros_like(mean_b) if mean_lo_b is None else np.asarray(mean_lo_b, float)
        with np.errstate(invalid="ignore"):
            ok = (n_a >= 2) & (n_b >= 2) & ((ssd_a > 0) | (ssd_b > 0))
    else:
        n_b = np.zeros_like(n_a)
        mean_b = np.full_like(mean_a, np.nan)
        ssd_b = np.zeros_like(n_a)
        lo_b = np.zeros_like(n_a)
        with np.errstate(invalid="ignore"):
            ok = (n_a >= 2) & (ssd_a > 0)
    ok &= np.isfinite(mean_a) & np.isfinite(ssd_a)
    if two:
        ok &= np.isfinite(mean_b) & np.isfinite(ssd_b)
    # Rows that cannot be tested get harmless stand-in summaries, so that the vectorised
    # call raises no floating-point warnings, and are set to NaN afterwards.
    bad = ~ok

    def stand_in(n, hi, lo, ssd):
        return (
            np.where(bad, 2.0, n),
            np.where(bad, 0.0, hi),
            np.where(bad, 0.0, lo),
            np.where(bad, 1.0, ssd),
        )

    sa = stand_in(n_a, mean_a, lo_a, ssd_a)
    sb = stand_in(n_b, mean_b, lo_b, ssd_b) if two else None
    c, add_back = _run_procedure(
        design, sa, sb, options["null"], options["level"], options["side"],
        options["pooled"], False,
    )  # fmt: skip
    if two:
        method = METHODS["pooled" if options["pooled"] else "welch"]
        comparison = f"{labels[0]} minus {labels[1]}"
    else:
        method = METHODS[design]
        comparison = f"{labels[0]} minus {labels[1]}" if design == "paired" else "mean"

    def clean(v):
        return _frozen(np.where(ok, v, np.nan))

    p = clean(c.p)
    p_adj = _frozen(multiplicity.adjust(p, options["adjust"]))
    disc = _frozen(multiplicity.discoveries(p_adj, options["rate"]))
    notes = list(notes)
    n_bad = int((~ok).sum())
    if n_bad:
        first = int(np.flatnonzero(~ok)[0])
        seg = segments[int(row_segment[first])]
        where = ", ".join(f"{k}={v}" for k, v in zip(keys, seg, strict=True)) or "all rows"
        msg = (
            f"{n_bad} of {ok.size} comparison(s) could not be tested (fewer than 2 values in "
            f"an arm, or no spread) and have NaN results; the first is {metrics[row_metric[first]]}"
            f" in {where}. They are left out of the multiplicity adjustment."
        )
        notes.append(msg)
        _warnings.warn(msg, SmallSegmentWarning, stacklevel=3)
    return BatchResult(
        design=design,
        method=method,
        comparison=comparison,
        labels=tuple(str(v) for v in labels),
        keys=tuple(str(k) for k in keys),
        segments=tuple(s if type(s) is tuple else tuple(s) for s in segments),
        metrics=tuple(str(m) for m in metrics),
        row_segment=_frozen(np.asarray(row_segment, dtype=np.intp)),
        row_metric=_frozen(np.asarray(row_metric, dtype=np.intp)),
        n_a=_frozen(n_a),
        mean_a=_frozen(mean_a),
        ssd_a=_frozen(ssd_a),
        n_b=_frozen(n_b),
        mean_b=_frozen(mean_b),
        ssd_b=_frozen(ssd_b),
        mean_lo_a=_frozen(lo_a),
        mean_lo_b=_frozen(lo_b),
        estimate=clean(c.estimate + add_back),
        se=clean(c.se),
        t=clean(c.t),
        df=clean(c.df),
        p=p,
        log_p=clean(c.log_p),
        ci_low=clean(c.ci_low + add_back),
        ci_high=clean(c.ci_high + add_back),
        p_adjusted=p_adj,
        discovery=disc,
        effect=clean(c.effect),
        testable=_frozen(ok),
        effect_name=EFFECT_NAMES[design],
        warnings=tuple(dict.fromkeys(notes)),
        n_missing=None if n_missing is None else _frozen(np.asarray(n_missing)),
        **options,
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


# --------------------------------------------------------------------------- DataFrame path
def as_list(x) -> list:
    """``None`` -> [], a single label -> [label], a list or tuple -> list."""
    if x is None:
        return []
    if isinstance(x, list | tuple):
        return list(x)
    return [x]


def key_codes(series: pd.Series) -> tuple[np.ndarray, np.ndarray, bool]:
    """Integer codes (-1 for missing), the sorted levels, and whether any code is -1.

    The codes may share memory with the column (compact integer columns): never write
    to them.
    """
    if isinstance(series.dtype, np.dtype) and series.dtype.kind in "iu":
        fast = integer_codes(series.to_numpy())
        if fast is not None:
            return fast[0], fast[1], False
    codes, uniques = pd.factorize(series, sort=True)
    levels = np.asarray(uniques.astype(object)) if hasattr(uniques, "astype") else uniques
    codes = codes.astype(np.intp, copy=False)
    return codes, np.asarray(levels, dtype=object), bool((codes < 0).any())


def combine_codes(codes: list[np.ndarray], sizes: list[int]) -> tuple[np.ndarray, list[int]]:
    """Mixed-radix code of several key codes; -1 where any key is missing.

    Returns the combined code and the radices used (the level counts).
    """
    out = codes[0] if len(codes) == 1 else codes[0].astype(np.intp, copy=True)
    if len(codes) > 1:
        bad = out < 0
        for c, k in zip(codes[1:], sizes[1:], strict=True):
            out *= k
            out += c
            bad |= c < 0
        if bad.any():
            out[bad] = -1
    return out, sizes


def _check_result_names(keys: Sequence[Hashable], by: Hashable | None, func: str) -> None:
    taken = set(RESULT_COLUMNS) | {"n", "mean", "sd", "n_a", "n_b", "mean_a", "mean_b"}
    taken |= {"sd_a", "sd_b"}
    for k in keys:
        if str(k) in taken:
            raise ParameterError(
                f"The 'within' parameter of {func} names a column {k!r} that clashes with a "
                "column of the result table. Rename it first, e.g. df.rename(columns=...)."
            )


def _choose_arms(levels: np.ndarray, present: np.ndarray, by, groups) -> list[int]:
    """Indices into ``levels`` of the two compared levels, in order (first, second)."""
    present_idx = np.flatnonzero(present)
    values = [levels[i] for i in present_idx]
    if groups is None:
        if len(values) != 2:
            raise DataError(
                f"Column {by!r} has {len(values)} level(s) ({_levels_text(values)}), but a "
                "two-sample comparison needs exactly two. Pick two with groups=(first, second)."
            )
        order = sorted(range(2), key=lambda i: str(values[i]))
        return [int(present_idx[i]) for i in order]
    if isinstance(groups, str) or len(groups) != 2:
        raise DataError(
            f"groups must name two levels of {by!r}, as (first, second). Got {groups!r}."
        )
    if groups[0] == groups[1]:
        raise DataError(f"groups names the same level twice: {groups!r}.")
    out = []
    for g in groups:
        hits = [int(i) for i, v in zip(present_idx, values, strict=True) if v == g]
        if not hits:
            raise DataError(
                f"Level {g!r} does not occur in column {by!r}. Levels found: "
                f"{_levels_text(values)}."
            )
        out.append(hits[0])
    return out


def _levels_text(values) -> str:
    shown = ", ".join(repr(_py(v)) for v in list(values)[:10])
    return shown + (", ..." if len(values) > 10 else "")


def _py(v):
    return v.item() if isinstance(v, np.generic) else v


def _metric_specs(columns, paired, func) -> list[tuple[str, tuple]]:
    """(name, columns) per metric: ("x", ("x",)) or ("before minus after", (before, after))."""
    if paired is not None:
        if columns is not None:
            raise ParameterError(
                f"{func} takes value columns or paired=(first, second), not both. "
                f"Got columns={columns!r} and paired={paired!r}."
            )
        pairs = [paired] if _is_pair_of_labels(paired) else list(paired)
        if not pairs or not all(_is_pair_of_labels(p) for p in pairs):
            raise ParameterError(
                f"The 'paired' parameter of {func} must be a pair of columns (first, second) "
                f"or a list of such pairs. Got {paired!r} instead."
            )
        return [(f"{p[0]} minus {p[1]}", (p[0], p[1])) for p in pairs]
    cols = as_list(columns)
    if not cols:
        raise ParameterError(
            f"The 'columns' parameter of {func} must name one or more value columns. "
            f"Got {columns!r} instead."
        )
    return [(str(c), (c,)) for c in cols]


def _is_pair_of_labels(p) -> bool:
    return (
        isinstance(p, tuple | list)
        and len(p) == 2
        and not any(isinstance(v, tuple | list) for v in p)
    )


def _values(df: pd.DataFrame, cols: tuple, check_inf: bool = True) -> np.ndarray:
    """Float values of one metric: a column, or first minus second for a paired metric.

    With ``check_inf=False`` the caller promises to call :func:`_reject_inf` whenever a
    non-finite value shows up (the fast path sees that from the group sums).
    """
    arrays = [_frames.to_float(_frames.column(df, c), f"Column {c!r}") for c in cols]
    if check_inf:
        _reject_inf(arrays, cols)
    return arrays[0] if len(arrays) == 1 else arrays[0] - arrays[1]


def _reject_inf(arrays, cols) -> None:
    for x, c in zip(arrays, cols, strict=True):
        if np.isinf(x).any():
            raise DataError(
                f"Column {c!r} holds infinite value(s). A mean with an infinite value is "
                "undefined; replace them with NaN to drop them, or fix them at the source."
            )


def compare_frame(
    df: pd.DataFrame,
    columns=None,
    by: Hashable | None = None,
    within=None,
    *,
    groups: Sequence | None = None,
    null: float = 0.0,
    paired=None,
    adjust: str = "holm",
    rate: float = 0.05,
    level: float = 0.95,
    side: str = "two-sided",
    pooled: bool = False,
    func: str = "compare",
) -> BatchResult:
    """The DataFrame path of ``df.tinfer.compare`` (see its docstring)."""
    options = check_options(
        func, adjust=adjust, rate=rate, level=level, side=side, null=null, pooled=pooled
    )
    specs = _metric_specs(columns, paired, func)
    keys = as_list(within)
    for k in keys:
        _frames.column(df, k)
    _check_result_names(keys, by, func)
    if by is not None and paired is not None:
        raise ParameterError(f"{func} takes by= (two groups) or paired=, not both.")
    design = "paired" if paired is not None else ("two-sample" if by is not None else "one-sample")
    n_rows = len(df)
    notes: list[str] = []

    # segment codes (may share memory with the caller's column: never written to)
    if keys:
        parts = [key_codes(df[k]) for k in keys]
        seg, _ = combine_codes([p[0] for p in parts], [len(p[1]) for p in parts])
        seg_missing = any(p[2] for p in parts)
        seg_size = math.prod(len(p[1]) for p in parts)
        if seg_size > 4 * max(n_rows, 1) + 1_000_000:  # sparse product of many keys
            seg_valid = seg >= 0
            compact, uniq = pd.factorize(seg[seg_valid], sort=True)
            seg = np.where(seg_valid, 0, -1)
            seg[seg_valid] = compact
            radix_of = np.asarray(uniq, dtype=np.intp)
            seg_size = len(uniq)
        else:
            radix_of = None
    else:
        parts = []
        seg = np.zeros(n_rows, dtype=np.intp)
        seg_missing = False
        seg_size = 1
        radix_of = None

    # group code = segment * width + arm. With few levels of `by` every level gets its own
    # column (no remapping pass over the rows); the two compared ones are picked after
    # counting. With many levels the two are mapped to 0 and 1 first.
    labels: tuple[str, ...]
    arm_cols = [0]
    width = 1
    if design == "two-sample":
        by_codes, by_levels, by_missing = key_codes(_frames.column(df, by))
        if len(by_levels) <= 16:
            width = len(by_levels)
            arm = by_codes
            chosen = None
        else:
            by_present = np.bincount(by_codes[by_codes >= 0], minlength=len(by_levels)) > 0
            chosen = _choose_arms(by_levels, by_present, by, groups)
            lut = np.full(len(by_levels) + 1, -1, dtype=np.intp)
            lut[chosen[0]], lut[chosen[1]] = 0, 1
            arm = lut[by_codes]  # by_codes == -1 picks the last entry, -1
            width, by_missing = 2, True
        g = np.multiply(seg, width, dtype=np.intp)
        g += arm
        if seg_missing or by_missing:
            bad = (seg < 0) | (arm < 0)
            g[bad] = -1
            del bad
        del arm, by_codes
        may_miss = seg_missing or by_missing
    else:
        g = seg
        may_miss = seg_missing
        if paired is not None:
            labels = tuple(str(v) for v in specs[0][1])
        else:
            labels = ("mean", str(options["null"]))
    n_groups = seg_size * width
    if may_miss:
        key_ok = g >= 0
        all_keys_ok = bool(key_ok.all())
    else:
        key_ok, all_keys_ok = None, True
    if not all_keys_ok:
        n_drop = int((~key_ok).sum())
        what = (
            "a missing segment key"
            if design != "two-sample"
            else (f"a missing segment key or {by!r} value, or outside the two compared groups,")
        )
        notes.append(f"{n_drop} row(s) with {what} were not used.")
        g_ok = g[key_ok]
    else:
        g_ok = g
    counts = np.bincount(g_ok, minlength=n_groups)
    if design == "two-sample":
        if chosen is None:
            by_present = counts.reshape(seg_size, width).sum(axis=0) > 0
            chosen = _choose_arms(by_levels, by_present, by, groups)
            arm_cols = list(chosen)
            others = int(counts.sum() - counts.reshape(seg_size, width)[:, arm_cols].sum())
            if others:
                notes.append(f"{others} row(s) in other levels of {by!r} were not used.")
        else:
            arm_cols = [0, 1]
        labels = (str(_py(by_levels[chosen[0]])), str(_py(by_levels[chosen[1]])))

    n_m = len(specs)
    n_arr = np.empty((n_m, n_groups))
    mean_arr = np.empty((n_m, n_groups))
    ssd_arr = np.empty((n_m, n_groups))
    lo_arr = np.empty((n_m, n_groups))
    miss_arr = np.zeros((n_m, n_groups))
    for j, (_, cols) in enumerate(specs):
        x = _values(df, cols, check_inf=False)
        s = grouped_moments(
            x if all_keys_ok else x[key_ok], g_ok, n_groups, counts=counts, finite_only=True
        )
        if s is None:  # missing values: mask them and count them per group
            _reject_inf([_values(df, (c,), check_inf=False) for c in cols], cols)
            fin = np.isfinite(x)
            use = fin if all_keys_ok else fin & key_ok
            s = grouped_moments(x[use], g[use], n_groups)
            lost = ~fin if all_keys_ok else ~fin & key_ok
            miss_arr[j] = np.bincount(g[lost], minlength=n_groups)
        n_arr[j], mean_arr[j], lo_arr[j], ssd_arr[j] = s
        del x
    total_missing = int(miss_arr.sum())
    if total_missing:
        notes.append(f"{total_missing} missing value(s) dropped.")

    # keep segments that have at least one row in the compared arms
    seg_present = counts.reshape(seg_size, width)[:, arm_cols].sum(axis=1) > 0
    keep = np.flatnonzero(seg_present)
    shape = (n_m, seg_size, width)

    def pick(arr):
        return arr.reshape(shape)[:, keep][:, :, arm_cols]

    n_arr, mean_arr, ssd_arr = pick(n_arr), pick(mean_arr), pick(ssd_arr)
    miss_arr, lo_arr = pick(miss_arr), pick(lo_arr)
    if keys:
        codes_kept = keep if radix_of is None else radix_of[keep]
        idx = np.unravel_index(codes_kept, tuple(len(p[1]) for p in parts))
        columns_vals = [np.asarray(p[1])[i].tolist() for p, i in zip(parts, idx, strict=True)]
        segments = list(zip(*columns_vals, strict=True))
    else:
        segments = [()]
    return from_cube(
        design,
        n_arr,
        mean_arr,
        ssd_arr,
        present=None,
        segments=segments,
        keys=[str(k) for k in keys],
        metrics=[s[0] for s in specs],
        labels=labels,
        options=options,
        n_missing=miss_arr,
        notes=notes,
        mean_lo=lo_arr,
    )


# --------------------------------------------------------------------------- summary path
STAT_NAMES = ("n", "mean", "sd", "ssd", "mean_lo")


def compare_summaries(
    frame: pd.DataFrame,
    within=None,
    *,
    arm: Hashable | None = None,
    groups: Sequence | None = None,
    metric: Hashable | None = None,
    paired: bool = False,
    labels: Sequence[str] | None = None,
    null: float = 0.0,
    adjust: str = "holm",
    rate: float = 0.05,
    level: float = 0.95,
    side: str = "two-sided",
    pooled: bool = False,
) -> BatchResult:
    """Many t tests from a table of per-segment summaries, as a SQL query returns them.

    Three layouts are read (``sd`` uses the n - 1 denominator; ``ssd``, the sum of squared
    deviations, may replace it; an optional ``mean_lo`` column holds the low part of a
    double-double mean, as tinfer's own merges produce):

    - two samples, wide: columns ``n_a, mean_a, sd_a, n_b, mean_b, sd_b`` (estimate is
      a minus b; name the arms with ``labels``);
    - two samples, long: columns ``n, mean, sd`` and an arm column named by ``arm``, one
      row per segment and arm; ``groups`` picks and orders two arm levels;
    - one sample: columns ``n, mean, sd`` and no ``arm``; tested against ``null``. With
      ``paired=True`` the rows are summaries of within-unit differences.

    Parameters
    ----------
    frame : pandas.DataFrame
        The summary table. ``BatchResult.to_frame()`` output is accepted as it is.
    within : label or list of labels, optional
        Segment key columns. Default: every column that is not a statistic, the arm or
        the metric column (and not a result column of ``to_frame``); when there is no
        such column, the index names the segments (key "row" if it has no name).
    arm : label, optional
        The arm column of the long two-sample layout.
    metric : label, optional
        A column naming the compared quantity, when the table holds several; defaults
        to the column "metric" if there is one.
    null, adjust, rate, level, side, pooled
        As for ``DataFrame.tinfer.compare``.

    Returns
    -------
    BatchResult

    Examples
    --------
    >>> import pandas as pd, tinfer
    >>> table = pd.DataFrame({"site": ["north", "south"],
    ...                       "n_a": [12, 20], "mean_a": [5.1, 7.4], "sd_a": [1.2, 2.0],
    ...                       "n_b": [15, 18], "mean_b": [4.3, 7.1], "sd_b": [1.5, 1.9]})
    >>> r = tinfer.compare_summaries(table, labels=("new", "old"))
    >>> r.comparison, r.t.round(4).tolist()
    ('new minus old', [1.5396, 0.474])
    """
    func = "compare_summaries"
    options = check_options(
        func, adjust=adjust, rate=rate, level=level, side=side, null=null, pooled=pooled
    )
    if not isinstance(frame, pd.DataFrame):
        raise ParameterError(
            f"The 'frame' parameter of {func} must be a pandas DataFrame of summaries. "
            f"Got {type(frame).__name__} instead."
        )
    cols = list(frame.columns)
    if metric is None and "metric" in cols:
        metric = "metric"
    wide = "n_a" in cols and arm is None
    if wide:
        design = "two-sample"
        needed = ["n_a", "mean_a", "n_b", "mean_b"]
        stat_cols = [c for c in cols if str(c).rsplit("_", 1)[0] in STAT_NAMES and "_" in str(c)]
        stat_cols = [c for c in stat_cols if str(c).endswith(("_a", "_b"))]
    else:
        design = "two-sample" if arm is not None else ("paired" if paired else "one-sample")
        needed = ["n", "mean"]
        stat_cols = [c for c in cols if c in STAT_NAMES]
    for c in needed:
        _frames.column(frame, c)
    result_cols = set(RESULT_COLUMNS) | {"log_p", "comparison"}
    if within is None:
        skip = set(stat_cols) | {arm, metric} | result_cols
        keys = [c for c in cols if c not in skip]
    else:
        keys = as_list(within)
        for k in keys:
            _frames.column(frame, k)
    t = frame
    if metric is not None:
        metric_values = _frames.column(t, metric).astype(str)
    else:
        metric_values = pd.Series("value", index=t.index)
    m_codes, m_levels = pd.factorize(metric_values, sort=False)
    if keys:
        seg_index = pd.MultiIndex.from_frame(t[keys]) if len(keys) > 1 else pd.Index(t[keys[0]])
        s_codes, s_levels = seg_index.factorize(sort=True)
        if (s_codes < 0).any():
            raise DataError(f"The segment columns {keys!r} hold missing values.")
        if len(keys) > 1:
            segments = [tuple(_py(v) for v in lev) for lev in s_levels]
        else:
            segments = [(_py(v),) for v in s_levels]
    elif within is None and arm is None and pd.Series(m_codes).duplicated().any():
        # no key columns at all: each row (or arm pair of rows) is named by the index
        name = t.index.name if t.index.name is not None else "row"
        s_codes, s_levels = pd.Index(t.index).factorize(sort=True)
        segments = [(_py(v),) for v in s_levels]
        keys = [name]
    else:
        s_codes = np.zeros(len(t), dtype=np.intp)
        segments = [()]
    n_m, n_s = len(m_levels), len(segments)

    def stats(suffix: str, rows) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        n = _num(t, f"n{suffix}", func)[rows]
        mean = _num(t, f"mean{suffix}", func)[rows]
        if f"ssd{suffix}" in cols:
            ssd = _num(t, f"ssd{suffix}", func, single_ok=True)[rows]
        else:
            sd = _num(t, f"sd{suffix}", func, single_ok=True)[rows]
            ssd = sd * sd * (n - 1.0)
        # A group of one has no SD (SQL and pandas give NULL/NaN): keep it, untestable.
        blank = np.isnan(ssd)
        if (blank & (n >= 2)).any():
            raise DataError(
                f"Column {'ssd' if f'ssd{suffix}' in cols else 'sd'}{suffix} of the summary "
                "table is missing for a group of 2 or more; drop those rows first."
            )
        ssd = np.where(blank, 0.0, ssd)
        if (n < 0).any() or (ssd < 0).any():
            raise DataError(f"Column n{suffix} or sd{suffix} holds negative values.")
        lo = _num(t, f"mean_lo{suffix}", func)[rows] if f"mean_lo{suffix}" in cols else 0.0
        return n, mean, ssd, lo

    arms = 2 if design == "two-sample" else 1
    shape = (n_m, n_s, arms)
    n_arr, mean_arr, ssd_arr = np.zeros(shape), np.full(shape, np.nan), np.zeros(shape)
    lo_arr = np.zeros(shape)
    present = np.zeros((n_m, n_s), dtype=bool)
    all_rows = np.arange(len(t))

    def place(arm_index: int, rows, suffix: str) -> None:
        n, mean, ssd, lo = stats(suffix, rows)
        mi, si = m_codes[rows], s_codes[rows]
        key = mi * n_s + si
        if np.unique(key).size != key.size:
            raise DataError(
                "The summary table has more than one row for the same segment (and arm and "
                "metric); aggregate it first."
            )
        n_arr[mi, si, arm_index], mean_arr[mi, si, arm_index] = n, mean
        ssd_arr[mi, si, arm_index] = ssd
        lo_arr[mi, si, arm_index] = lo
        present[mi, si] = True

    if wide:
        labs = tuple(labels) if labels is not None else ("a", "b")
        place(0, all_rows, "_a")
        place(1, all_rows, "_b")
    elif arm is not None:
        a_codes, a_levels, _ = key_codes(_frames.column(t, arm))
        a_present = np.bincount(a_codes[a_codes >= 0], minlength=len(a_levels)) > 0
        first, second = _choose_arms(a_levels, a_present, arm, groups)
        labs = (str(_py(a_levels[first])), str(_py(a_levels[second])))
        if labels is not None:
            labs = tuple(labels)
        place(0, np.flatnonzero(a_codes == first), "")
        place(1, np.flatnonzero(a_codes == second), "")
    else:
        if paired:
            labs = tuple(labels) if labels is not None else ("first", "second")
        else:
            labs = ("mean", str(options["null"]))
        place(0, all_rows, "")
    if len(labs) != 2:
        raise ParameterError(
            f"The 'labels' parameter of {func} must be two names (first, second). "
            f"Got {labels!r} instead."
        )
    return from_cube(
        design,
        n_arr,
        mean_arr,
        ssd_arr,
        present=present,
        segments=segments,
        keys=[str(k) for k in keys],
        metrics=[str(m) for m in m_levels],
        labels=labs,
        options=options,
        mean_lo=lo_arr,
    )


def _num(t: pd.DataFrame, name: str, func: str, single_ok: bool = False) -> np.ndarray:
    """A numeric column of the summary table; NaN allowed only where ``single_ok`` (SDs)."""
    x = _frames.to_float(_frames.column(t, name), f"Column {name!r}")
    bad = np.isinf(x) if single_ok else ~np.isfinite(x)
    if bad.any():
        raise DataError(
            f"Column {name!r} of the summary table holds missing or infinite values; "
            "drop those rows first."
        )
    return x


__all__ = ["BatchResult", "SmallSegmentWarning", "compare_frame", "compare_summaries"]
