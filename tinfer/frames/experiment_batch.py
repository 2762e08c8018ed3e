"""Experiments in a batch: ``compare(..., cluster=, covariate=, ratio=)``.

- :func:`unit_frame`: one row per segment, arm and unit of randomisation (pandas groupby),
  value columns averaged and the two columns of a ratio metric summed;
- :func:`pair_moments`: co-moments of two columns per group in bincount passes
  (:func:`tinfer.core.comoments.grouped_comoments`), the ratio of sums with its
  delta-method variance, or the moments the pre-period adjustment needs;
- :func:`adjusted_cube`: the adjustment in every segment at once.
"""

from __future__ import annotations

import math
from collections.abc import Hashable, Sequence

import numpy as np
import pandas as pd

from ..core.comoments import Adjusted, Comoments, adjusted_arms, grouped_comoments
from ..core.grouped import integer_codes
from ..errors import DataError, ParameterError
from .cluster import both_arms_note
from .columns import column, reject_inf, to_float
from .levels import combine_codes, key_codes, ungroupable

Spec = tuple[str, tuple, str]


def unit_frame(
    df: pd.DataFrame, keys: list, by, cluster, specs: list[Spec], covariate
) -> tuple[pd.DataFrame, list[Spec], list[str]]:
    """One row per (segments, arm, unit): the frame, specs that read it, and the notes.

    Value columns (and the covariate) are averaged over each unit's rows, skipping missing
    values; the two columns of a ratio metric are summed over the rows that have both. The
    group key is one integer per row (segment, arm and unit codes in mixed radix), so the
    whole table takes a factorisation and a few ``numpy.bincount`` passes.
    """
    if cluster in (*keys, by, covariate) or any(cluster in cols for _, cols, _ in specs):
        raise ParameterError(f"cluster={cluster!r} must be a column of its own.")
    group_cols = [*keys, *([by] if by is not None else []), cluster]
    t = "__t"  # a prefix for the frame's own columns that no kept column name starts with
    while any(str(c).startswith(t) for c in (*group_cols, covariate)):
        t += "_"
    parts = [key_codes(column(df, c)) for c in group_cols[:-1]]
    parts.append(_unit_codes(column(df, cluster)))
    sizes = [len(p[1]) for p in parts]
    unit_code = parts[-1][0]
    head = _combined([p[0] for p in parts[:-1]], sizes[:-1]) if len(parts) > 1 else None
    ok = unit_code >= 0 if head is None else (unit_code >= 0) & (head >= 0)
    notes: list[str] = []
    if by is not None:
        arm = parts[len(keys)][0]
        pairs = unit_code[ok].astype(np.int64) * sizes[-2] + arm[ok]
        if sizes[-1] * sizes[-2] <= 4 * len(df) + 10_000_000:  # a table of unit x arm counts
            seen = np.bincount(pairs, minlength=sizes[-1] * sizes[-2]).reshape(sizes[-1], -1)
            multi = (seen > 0).sum(axis=1) > 1
        else:
            multi = np.bincount(pd.unique(pairs) // sizes[-2], minlength=sizes[-1]) > 1
        if multi.any():
            ok &= ~multi[np.where(unit_code >= 0, unit_code, 0)]
            notes.append(both_arms_note(int(multi.sum()), cluster))
    full = unit_code[ok].astype(np.int64)
    if head is not None:
        if (int(head.max(initial=0)) + 1) * sizes[-1] >= 2**62:  # compact first: no overflow
            head = _combined([head, np.zeros_like(head)], [2**40, 1])
        full += head[ok].astype(np.int64) * sizes[-1]
    group, uniq = pd.factorize(full)
    n_units = len(uniq)
    first = np.empty(n_units, dtype=np.intp)  # each unit's first row, for its key values
    first[group[::-1]] = np.flatnonzero(ok)[::-1]
    out: dict = {c: column(df, c).iloc[first].to_numpy() for c in group_cols}
    for c in group_cols:
        if isinstance(column(df, c).dtype, pd.CategoricalDtype):
            out[c] = pd.Categorical(out[c], dtype=column(df, c).dtype)
    new_specs = []
    for j, (name, cols, kind) in enumerate(specs):
        if kind == "ratio":
            y, x = (to_float(column(df, c), f"Column {c!r}")[ok] for c in cols)
            both = ~(np.isnan(y) | np.isnan(x))
            out[f"{t}n{j}"], out[f"{t}d{j}"] = _unit_sums((y, x), both, group, n_units)
            new_specs.append((name, (f"{t}n{j}", f"{t}d{j}"), kind))
        else:
            v = to_float(column(df, cols[0]), f"Column {cols[0]!r}")[ok]
            out[f"{t}v{j}"] = _unit_mean(v, group, n_units)
            new_specs.append((name, (f"{t}v{j}",), kind))
    if covariate is not None:
        cov = to_float(column(df, covariate), f"Column {covariate!r}")[ok]
        out[covariate] = _unit_mean(cov, group, n_units)
    kinds = [kind for _, _, kind in specs]
    averaged = covariate is not None or any(k != "ratio" for k in kinds)
    rows = int(ok.sum())
    notes.insert(0, unit_note(cluster, rows, n_units, averaged, "ratio" in kinds))
    lost = int((unit_code < 0).sum() if head is None else ((unit_code < 0) | (head < 0)).sum())
    if lost:
        notes.append(f"{lost:,} row(s) with a missing {cluster!r} or segment key were not used.")
    return pd.DataFrame(out), new_specs, notes


def _unit_codes(col: pd.Series) -> tuple[np.ndarray, np.ndarray, bool]:
    """Codes of the unit column (-1 for missing): compact integers as they are, anything
    else hashed in order of appearance (units need no sorted order)."""
    fast = integer_codes(col.to_numpy()) if col.dtype.kind in "iu" else None
    if fast is not None:
        return fast[0], fast[1], False
    try:
        codes, uniques = pd.factorize(col)
    except TypeError as exc:  # lists, dicts or sets in the column
        raise ungroupable(col.name, exc) from None
    return codes.astype(np.intp, copy=False), np.asarray(uniques), bool((codes < 0).any())


def _combined(codes: list[np.ndarray], sizes: list[int]) -> np.ndarray:
    """One code per row for several key codes (-1 where any is missing), below 2**62 / n.

    Mixed radix when the product of the level counts is small; otherwise compacted after
    each key, so that no product of many large keys overflows.
    """
    if math.prod(sizes) < 2**40:
        return combine_codes(codes, sizes)[0]
    out = pd.factorize(codes[0])[0].astype(np.int64)
    for c, k in zip(codes[1:], sizes[1:], strict=True):
        step = np.where((out >= 0) & (c >= 0), out * k + c, -1)
        out = pd.factorize(step, use_na_sentinel=False)[0].astype(np.int64)
        out[step < 0] = -1
    return out


def _unit_mean(v: np.ndarray, group: np.ndarray, n: int) -> np.ndarray:
    """Mean per unit over its non-missing values (NaN for a unit with none)."""
    fin = ~np.isnan(v)
    total = np.bincount(group[fin], weights=v[fin], minlength=n)
    count = np.bincount(group[fin], minlength=n)
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.where(count > 0, total / np.maximum(count, 1), np.nan)


def _unit_sums(cols, both: np.ndarray, group: np.ndarray, n: int):
    """Sums per unit over the rows where both columns are present (NaN for a unit with none)."""
    count = np.bincount(group[both], minlength=n)
    return tuple(
        np.where(count > 0, np.bincount(group[both], weights=c[both], minlength=n), np.nan)
        for c in cols
    )


def unit_note(cluster, rows: int, units: int, averaged: bool, summed: bool) -> str:
    """The note on how many rows became how many units."""
    how = "averaged (ratio metrics: summed)" if averaged and summed else "averaged"
    how = "summed" if not averaged else how
    return (
        f"Rows {how} per {cluster!r} unit: {rows:,} rows became {units:,} units, and the "
        "tests treat units, not rows, as independent."
    )


def pair_moments(
    df: pd.DataFrame, cols: tuple, g: np.ndarray, key_ok, n_groups: int, counts=None
) -> tuple[Comoments, np.ndarray]:
    """Co-moments per group of the rows where both columns are finite; and those rows (None
    when that is every row). ``counts``: the rows per group, when every row has its key."""
    y, x = (to_float(column(df, c), f"Column {c!r}") for c in cols)
    if key_ok is None:  # the common case: one pass shows that every value is finite
        co = grouped_comoments(y, x, g, n_groups, counts=counts, finite_only=True)
        if co is not None:
            return co, None
    reject_inf([y, x], cols)
    use = ~(np.isnan(y) | np.isnan(x))
    if key_ok is not None:
        use &= key_ok
    return grouped_comoments(y[use], x[use], g[use], n_groups), use


def check_covariate(df, value, covariate, compared) -> None:
    """A row of the compared arms with a value but no covariate is an error.

    ``compared`` is a function giving the mask of rows in the compared arms (only built
    when some covariate is missing)."""
    x = to_float(column(df, covariate), f"Column {covariate!r}")
    missing = np.isnan(x)
    if not missing.any():
        return
    y = to_float(column(df, value), f"Column {value!r}")
    bad = compared() & ~np.isnan(y) & missing
    if bad.any():
        raise DataError(
            f"{int(bad.sum()):,} row(s) in the compared groups have {value!r} but no "
            f"{covariate!r}. The adjustment needs the pre-period value of every unit: fill it "
            "(for example with the overall pre-period mean, a stated rule) or drop those rows."
        )


def adjusted_cube(co: Comoments, covariate: Hashable) -> tuple[tuple[np.ndarray, ...], str]:
    """CUPED in every (metric, segment) of co-moments shaped (metric, segment, 2).

    Returns ``(n, mean, ssd)`` shaped like the input and a note on the variance removed.
    """
    adj = adjusted_arms(co.take((..., 0)), co.take((..., 1)))
    n, mean, ssd = (
        np.stack([getattr(adj.first, f), getattr(adj.second, f)], axis=-1)
        for f in ("n", "mean", "ssd")
    )
    return (n, mean, ssd), removed_note(adj, covariate)


def removed_note(adj: Adjusted, covariate) -> str:
    """The note on how much variance the pre-period adjustment removed, across tests."""
    shares = adj.removed[adj.adjusted]
    flat = int(adj.adjusted.size - shares.size)
    not_used = (
        f" In {flat:,} test(s) {covariate!r} does not vary within the groups: those are not "
        "adjusted."
        if flat
        else ""
    )
    if shares.size == 0:
        return f"Pre-period adjustment by {covariate!r}: no test could use it.{not_used}"
    lo, mid, hi = (100 * np.quantile(shares, q) for q in (0.0, 0.5, 1.0))
    spread = "" if shares.size == 1 else f" (median; from {lo:.0f}% to {hi:.0f}% across tests)"
    return (
        f"Pre-period adjustment (CUPED) by {covariate!r}, theta per segment and metric: it "
        f"removed {mid:.0f}% of the variance{spread}.{not_used}"
    )


def experiment_checks(func: str, by, paired, pairwise, covariate, specs: Sequence[Spec]) -> None:
    """Refuse combinations the experiment options do not cover."""
    if covariate is not None:
        if by is None or pairwise is not None:
            raise ParameterError(
                f"covariate= of {func} adjusts a two-group comparison: give by= (and not "
                "pairwise=)."
            )
        if any(kind == "ratio" for _, _, kind in specs):
            raise ParameterError(
                f"covariate= of {func} adjusts value columns; it does not combine with ratio=."
            )
    if paired is not None and any(kind == "ratio" for _, _, kind in specs):
        raise ParameterError(f"{func} takes paired= or ratio=, not both.")
