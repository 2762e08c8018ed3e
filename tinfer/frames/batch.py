"""The DataFrame path of ``df.tinfer.compare``: rows -> per-group summaries -> a batch.

The segment and arm columns become integer codes (``pandas.factorize``, or ``value - min``
for compact integer columns), and :func:`tinfer.core.grouped.grouped_moments` builds every
group's summary in a few ``numpy.bincount`` passes. The arrays, shaped
``(metric, segment, arm)``, go to :func:`tinfer.analyses.from_cube`, which runs every test
in one vectorised call. The caller's columns are never written to.
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Hashable, Sequence
from dataclasses import dataclass

import numpy as np
import pandas as pd

from ..analyses import check_method, check_options, check_relative, from_cube, run_pairwise_batch
from ..core.comoments import FIELDS, Comoments, ratio_summary
from ..core.grouped import grouped_moments
from ..errors import DataError, ParameterError
from ..results.batch import BatchResult
from .columns import column, metric_values, reject_inf
from .experiment_batch import (
    adjusted_cube,
    check_covariate,
    experiment_checks,
    pair_moments,
    unit_frame,
)
from .levels import (
    as_list,
    choose_two,
    combine_codes,
    group_codes,
    key_codes,
    label_pair,
    level_labels,
    levels_text,
    py_value,
)
from .specs import check_roles, metric_specs

#: Up to this many levels of ``by``, every level gets its own column of group codes and the
#: two compared levels are picked after counting (no remapping pass over the rows).
FEW_LEVELS = 16
#: The phrase naming a two-level comparison of a batch in messages.
WHAT = "two-sample comparison"


def choose_arms(
    levels: np.ndarray, present: np.ndarray, by, groups, what: str = WHAT
) -> tuple[int, int]:
    """Indices into ``levels`` of the two compared levels among those ``present``."""
    present_idx = np.flatnonzero(present)
    first, second = choose_two([levels[i] for i in present_idx], by, groups, what)
    return int(present_idx[first]), int(present_idx[second])


@dataclass
class _Segments:
    """Integer segment codes of the rows (-1 where a key is missing) and their levels."""

    codes: np.ndarray
    size: int
    missing: bool
    levels: list[np.ndarray]
    radix_of: np.ndarray | None = None  # compact code -> mixed-radix code (sparse keys)

    def values(self, keep: np.ndarray) -> list[tuple]:
        """The key values of the kept segments (compact codes ``keep``)."""
        if not self.levels:
            return [()]
        codes = keep if self.radix_of is None else self.radix_of[keep]
        idx = np.unravel_index(codes, tuple(len(lv) for lv in self.levels))
        cols = [np.asarray(lv)[i].tolist() for lv, i in zip(self.levels, idx, strict=True)]
        return list(zip(*cols, strict=True))


def _segments(df: pd.DataFrame, keys: list) -> _Segments:
    """Segment codes of the rows (the caller's compact integer column may be shared)."""
    if not keys:
        return _Segments(np.zeros(len(df), dtype=np.intp), 1, False, [])
    parts = [key_codes(df[k]) for k in keys]
    levels = [p[1] for p in parts]
    seg, _ = combine_codes([p[0] for p in parts], [len(lv) for lv in levels])
    out = _Segments(seg, math.prod(len(lv) for lv in levels), any(p[2] for p in parts), levels)
    if out.size > 4 * max(len(df), 1) + 1_000_000:  # sparse product of many keys
        valid = seg >= 0
        compact, uniq = pd.factorize(seg[valid], sort=True)
        out.codes = np.where(valid, 0, -1)
        out.codes[valid] = compact
        out.radix_of = np.asarray(uniq, dtype=np.intp)
        out.size = len(uniq)
    return out


@dataclass
class _Arms:
    """Group codes (segment * width + arm) and how the two compared arms are found."""

    codes: np.ndarray
    width: int
    may_miss: bool
    levels: np.ndarray | None = None
    chosen: tuple[int, int] | None = None  # known before counting (many levels)


def _arms(df: pd.DataFrame, by, groups, seg: _Segments) -> _Arms:
    """Group codes for a two-sample batch, one column per level of ``by`` when few."""
    by_codes, levels, by_missing = key_codes(column(df, by))
    chosen = None
    if len(levels) <= FEW_LEVELS:
        width, arm = len(levels), by_codes
    else:
        present = np.bincount(by_codes[by_codes >= 0], minlength=len(levels)) > 0
        chosen = choose_arms(levels, present, by, groups)
        lut = np.full(len(levels) + 1, -1, dtype=np.intp)
        lut[chosen[0]], lut[chosen[1]] = 0, 1
        arm = lut[by_codes]  # by_codes == -1 picks the last entry, -1
        width, by_missing = 2, True
    g = np.multiply(seg.codes, width, dtype=np.intp)
    g += arm
    if seg.missing or by_missing:
        g[(seg.codes < 0) | (arm < 0)] = -1
    return _Arms(g, width, seg.missing or by_missing, levels, chosen)


def _moments(df, specs, g, key_ok, counts, n_groups) -> tuple[np.ndarray, ...]:
    """n, mean, mean_lo, ssd and missing counts per (metric, group), in bincount passes."""
    shape = (len(specs), n_groups)
    n, mean, ssd, lo = (np.empty(shape) for _ in range(4))
    miss = np.zeros(shape)
    g_ok = g if key_ok is None else g[key_ok]
    for j, (_, cols, kind) in enumerate(specs):
        if kind == "ratio":
            co, use = pair_moments(df, cols, g, key_ok, n_groups, counts)
            s = ratio_summary(co)
            n[j], mean[j], lo[j], ssd[j] = s.n, s.mean, 0.0, s.ssd
            miss[j] = _lost(g, use, key_ok, n_groups)
            continue
        x = metric_values(df, cols, check_inf=False)
        xs = x if key_ok is None else x[key_ok]
        s = grouped_moments(xs, g_ok, n_groups, counts=counts, finite_only=True)
        if s is None:  # missing values: mask them and count them per group
            reject_inf([metric_values(df, (c,), check_inf=False) for c in cols], cols)
            fin = np.isfinite(x)
            use = fin if key_ok is None else fin & key_ok
            s = grouped_moments(x[use], g[use], n_groups)
            lost = ~fin if key_ok is None else ~fin & key_ok
            miss[j] = np.bincount(g[lost], minlength=n_groups)
        n[j], mean[j], lo[j], ssd[j] = s
    return n, mean, lo, ssd, miss


def compare_frame(
    df: pd.DataFrame,
    columns=None,
    by: Hashable | None = None,
    within=None,
    *,
    groups: Sequence | None = None,
    paired=None,
    pairwise: str | None = None,
    against=None,
    func: str = "compare",
    cluster=None,
    covariate=None,
    ratio=None,
    relative=False,
    **opts,
) -> BatchResult:
    """The DataFrame path of ``df.tinfer.compare`` (see its docstring for the options)."""
    options = check_options(func, **opts)
    specs, keys = _checked(df, columns, by, within, paired, pairwise, covariate, ratio, func)
    lift = _relative(relative, by, pairwise, against, func)
    notes: list[str] = []
    if cluster is not None:
        df, specs, notes = unit_frame(df, keys, by, cluster, specs, covariate)
    if pairwise is not None or against is not None:
        return _pairwise_batch(df, specs, by, keys, groups, pairwise, against, options, func, notes)
    design = "paired" if paired is not None else ("two-sample" if by is not None else "one-sample")
    seg = _segments(df, keys)
    if design == "two-sample":
        arms = _arms(df, by, groups, seg)
    else:
        arms = _Arms(seg.codes, 1, seg.missing)
    n_groups = seg.size * arms.width
    key_ok = arms.codes >= 0 if arms.may_miss else None
    if key_ok is not None and key_ok.all():
        key_ok = None
    if key_ok is not None:
        what = "a missing segment key"
        if design == "two-sample":
            what = f"a missing segment key or {by!r} value, or outside the two compared groups,"
        notes.append(f"{int((~key_ok).sum())} row(s) with {what} were not used.")
    g_ok = arms.codes if key_ok is None else arms.codes[key_ok]
    counts = np.bincount(g_ok, minlength=n_groups)
    by_seg = counts.reshape(seg.size, arms.width)
    if design == "two-sample":
        cols, labels = _compared(arms, by_seg, by, groups, notes)
    else:
        cols = [0]
        names = specs[0][1] if paired is not None else ("mean", options["null"])
        labels = tuple(str(v) for v in names)
    keep = np.flatnonzero(by_seg[:, cols].sum(axis=1) > 0)  # segments with compared rows

    def pick(arr):
        return arr.reshape(len(specs), seg.size, arms.width)[:, keep][:, :, cols]

    if covariate is None:
        parts = _moments(df, specs, arms.codes, key_ok, counts, n_groups)
        if parts[4].sum():
            notes.append(f"{int(parts[4].sum())} missing value(s) dropped.")
        n, mean, lo, ssd, miss = (pick(v) for v in parts)
    else:
        n, mean, lo, ssd, miss = _adjusted(
            df, specs, covariate, arms, key_ok, counts, cols, pick, notes
        )
    result = from_cube(
        design, n, mean, ssd, present=None, segments=seg.values(keep),
        keys=[str(k) for k in keys], metrics=[s[0] for s in specs], labels=labels,
        options=options, n_missing=miss, notes=notes, mean_lo=lo,
    )  # fmt: skip
    return result if lift is None else dataclasses.replace(result, relative=lift)


def _lost(g, use, key_ok, n_groups) -> np.ndarray:
    """Rows per group left out for a missing value (``use`` None: none)."""
    if use is None:
        return np.zeros(n_groups)
    lost = ~use if key_ok is None else ~use & key_ok
    return np.bincount(g[lost], minlength=n_groups)


def _relative(relative, by, pairwise, against, func) -> str | None:
    lift = check_relative(relative, func)
    if lift is not None and (by is None or pairwise is not None or against is not None):
        raise ParameterError(f"relative= of {func} needs two groups: by= without pairwise=.")
    return lift


def _checked(df, columns, by, within, paired, pairwise, covariate, ratio, func):
    """The metric specs and segment keys of a batch, after every check of the options."""
    specs = metric_specs(columns, paired, func, ratio)
    keys = as_list(within)
    for k in keys:
        column(df, k)
    check_roles(keys, by, specs, func)
    values = {c for _, cols, _ in specs for c in cols}
    if by is not None and paired is not None:
        raise ParameterError(f"{func} takes by= (two groups) or paired=, not both.")
    experiment_checks(func, by, paired, pairwise, covariate, specs)
    if covariate is not None and (covariate in keys or covariate == by or covariate in values):
        raise ParameterError(f"covariate={covariate!r} must be a column of its own in {func}.")
    return specs, keys


def _adjusted(df, specs, covariate, arms: _Arms, key_ok, counts, cols, pick, notes):
    """n, mean, mean_lo, ssd, missing of the compared arms after the pre-period adjustment."""
    g, n_groups = arms.codes, counts.size

    def compared() -> np.ndarray:
        return np.isin(g % arms.width, cols) & (g >= 0)

    fields, missing = [], []
    for _, (value,), _ in specs:
        check_covariate(df, value, covariate, compared)
        co, use = pair_moments(df, (value, covariate), g, key_ok, n_groups, counts)
        missing.append(_lost(g, use, key_ok, n_groups))
        fields.append(co)
    co = Comoments(*(np.stack([getattr(c, f) for c in fields]) for f in FIELDS))
    picked = Comoments(*(pick(getattr(co, f)) for f in FIELDS))
    (n, mean, ssd), note = adjusted_cube(picked, covariate)
    miss = np.stack(missing)
    if miss.sum():
        notes.append(f"{int(miss.sum())} missing value(s) dropped.")
    notes.append(note)
    return n, mean, np.zeros_like(mean), ssd, pick(miss)


def _compared(arms: _Arms, by_seg: np.ndarray, by, groups, notes: list[str]):
    """The columns of the two compared arms and their labels; notes rows in other levels."""
    if arms.chosen is None:
        chosen = choose_arms(arms.levels, by_seg.sum(axis=0) > 0, by, groups)
        cols = list(chosen)
        others = int(by_seg.sum() - by_seg[:, cols].sum())
        if others:
            notes.append(f"{others} row(s) in other levels of {by!r} were not used.")
    else:
        chosen, cols = arms.chosen, [0, 1]
    labels = label_pair(*(arms.levels[i] for i in chosen))
    return cols, labels


#: The most levels of ``by`` a pairwise batch takes (190 pairs per segment).
MAX_PAIRWISE_LEVELS = 20


def _pairwise_batch(
    df, specs, by, keys, groups, method, against, options, func, notes
) -> BatchResult:
    """``compare(..., pairwise=method)``: every level of ``by`` in every segment."""
    if by is None:
        raise ParameterError(
            f"pairwise= of {func} compares the levels of a column: name it with by=."
        )
    if groups is not None:
        raise ParameterError(
            f"{func} takes groups= (two levels) or pairwise= (all levels), not both."
        )
    if options["pooled"] or options["null"] != 0.0:
        raise ParameterError(
            f"pooled= and null= do not apply with pairwise= in {func}: the method decides the "
            "variance model, and pairs are tested against no difference."
        )
    seg = _segments(df, keys)
    # the single pairwise() path's split: a categorical column keeps its own order
    by_codes, levels = group_codes(column(df, by))
    by_codes = by_codes.astype(np.intp, copy=False)
    by_missing = bool((by_codes < 0).any())
    width = len(levels)
    g = np.multiply(seg.codes, width, dtype=np.intp)
    g += by_codes
    may_miss = seg.missing or by_missing
    if may_miss:
        g[(seg.codes < 0) | (by_codes < 0)] = -1
    key_ok = g >= 0 if may_miss else None
    n_groups = seg.size * width
    counts = np.bincount(g if key_ok is None else g[key_ok], minlength=n_groups)
    table = counts.reshape(seg.size, width)
    used = np.flatnonzero(table.sum(axis=0) > 0)  # levels that occur (categories may not)
    if used.size > MAX_PAIRWISE_LEVELS:
        raise ParameterError(
            f"Column {by!r} has {used.size} levels; pairwise= in {func} takes at most "
            f"{MAX_PAIRWISE_LEVELS}. Compare fewer levels, or use groups=(first, second)."
        )
    labels = level_labels(levels[used])
    control = None
    if against is not None:
        hits = [j for j, i in enumerate(used) if py_value(levels[i]) == against]
        if not hits:
            raise DataError(
                f"The control {against!r} does not occur in column {by!r}. Levels found: "
                f"{levels_text(levels[used])}."
            )
        control = hits[0]
    method = check_method(
        method, None if control is None else labels[control], options["side"], func
    )
    notes = list(notes)
    if key_ok is not None and not key_ok.all():
        lost = int((~key_ok).sum())
        notes.append(f"{lost} row(s) with a missing segment key or {by!r} value were not used.")
    n, mean, lo, ssd, miss = _moments(df, specs, g, key_ok, counts, n_groups)
    if miss.sum():
        notes.append(f"{int(miss.sum())} missing value(s) dropped.")
    keep = np.flatnonzero(table.sum(axis=1) > 0)

    def cube(arr):
        return arr.reshape(len(specs), seg.size, width)[:, keep][:, :, used]

    return run_pairwise_batch(
        cube(n), cube(mean), cube(ssd), cube(lo),
        method=method, levels=labels, by=str(by), control=control,
        segments=seg.values(keep), keys=[str(k) for k in keys],
        metrics=[s[0] for s in specs], options=options, n_missing=cube(miss), notes=notes,
    )  # fmt: skip
