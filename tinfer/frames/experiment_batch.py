"""Experiments in a batch: ``compare(..., cluster=, covariate=, ratio=)``.

- :func:`unit_frame`: one row per segment, arm and unit of randomisation (pandas groupby),
  value columns averaged and the two columns of a ratio metric summed;
- :func:`pair_moments`: co-moments of two columns per group in bincount passes
  (:func:`tinfer.core.comoments.grouped_comoments`), the ratio of sums with its
  delta-method variance, or the moments the pre-period adjustment needs;
- :func:`adjusted_cube`: the adjustment in every segment at once.
"""

from __future__ import annotations

from collections.abc import Hashable, Sequence

import numpy as np
import pandas as pd

from ..core.comoments import Adjusted, Comoments, adjusted_arms, grouped_comoments
from ..errors import DataError, ParameterError
from .cluster import both_arms_note
from .columns import column, reject_inf, to_float

Spec = tuple[str, tuple, str]


def unit_frame(
    df: pd.DataFrame, keys: list, by, cluster, specs: list[Spec], covariate
) -> tuple[pd.DataFrame, list[Spec], list[str]]:
    """One row per (segments, arm, unit): the frame, specs that read it, and the notes."""
    if cluster in (*keys, by, covariate) or any(cluster in cols for _, cols, _ in specs):
        raise ParameterError(f"cluster={cluster!r} must be a column of its own.")
    group_cols = [*keys, *([by] if by is not None else []), cluster]
    t = "__t"  # a prefix for the frame's own columns that no kept column name starts with
    while any(str(c).startswith(t) for c in (*group_cols, covariate)):
        t += "_"
    data = {f"{t}k{i}": column(df, c).to_numpy() for i, c in enumerate(group_cols)}
    mean_cols, sum_cols, new_specs = [], [], []
    for j, (name, cols, kind) in enumerate(specs):
        if kind == "ratio":
            y, x = (to_float(column(df, c), f"Column {c!r}") for c in cols)
            both = ~(np.isnan(y) | np.isnan(x))
            data[f"{t}n{j}"] = np.where(both, y, np.nan)
            data[f"{t}d{j}"] = np.where(both, x, np.nan)
            sum_cols += [f"{t}n{j}", f"{t}d{j}"]
            new_specs.append((name, (f"{t}n{j}", f"{t}d{j}"), kind))
        else:
            data[f"{t}v{j}"] = to_float(column(df, cols[0]), f"Column {cols[0]!r}")
            mean_cols.append(f"{t}v{j}")
            new_specs.append((name, (f"{t}v{j}",), kind))
    if covariate is not None:
        data[f"{t}cov"] = to_float(column(df, covariate), f"Column {covariate!r}")
        mean_cols.append(f"{t}cov")
    frame = pd.DataFrame(data)
    names = list(data)[: len(group_cols)]
    unit = names[-1]
    notes = []
    lost = int(frame[names].isna().any(axis=1).sum())
    frame = frame.dropna(subset=names)
    if by is not None:
        arms = frame.groupby(unit, sort=False, observed=True)[names[-2]].nunique()
        both = arms.index[arms > 1]
        if len(both):
            frame = frame[~frame[unit].isin(both)]
            notes.append(both_arms_note(len(both), cluster))
    grouped = frame.groupby(names, sort=False, observed=True)
    parts = []
    if mean_cols:
        parts.append(grouped[mean_cols].mean())
    if sum_cols:
        parts.append(grouped[sum_cols].sum(min_count=1))
    units = pd.concat(parts, axis=1).reset_index()
    units = units.rename(columns=dict(zip(names[:-1], group_cols[:-1], strict=True)))
    if covariate is not None:
        units = units.rename(columns={f"{t}cov": covariate})
    notes.insert(0, unit_note(cluster, len(frame), len(units), bool(mean_cols), bool(sum_cols)))
    if lost:
        notes.append(f"{lost:,} row(s) with a missing {cluster!r} or segment key were not used.")
    return units, new_specs, notes


def unit_note(cluster, rows: int, units: int, averaged: bool, summed: bool) -> str:
    """The note on how many rows became how many units."""
    how = "averaged (ratio metrics: summed)" if averaged and summed else "averaged"
    how = "summed" if not averaged else how
    return (
        f"Rows {how} per {cluster!r} unit: {rows:,} rows became {units:,} units, and the "
        "tests treat units, not rows, as independent."
    )


def pair_moments(
    df: pd.DataFrame, cols: tuple, g: np.ndarray, key_ok, n_groups: int
) -> tuple[Comoments, np.ndarray]:
    """Co-moments per group of the rows where both columns are finite; and those rows (None
    when that is every row)."""
    y, x = (to_float(column(df, c), f"Column {c!r}") for c in cols)
    if key_ok is None:  # the common case: one pass shows that every value is finite
        co = grouped_comoments(y, x, g, n_groups, finite_only=True)
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
