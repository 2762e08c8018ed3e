"""Summaries of a Dask DataFrame: per partition, then merged pairwise on the client.

Every partition is reduced (``map_partitions``) to a small table of summaries, one row per
group and metric, with the two-pass algorithm of :func:`tinfer.core.grouped.grouped_moments`.
Only these tables travel to the client, where the summaries of the same group are merged
pairwise by the formula of Chan, Golub and LeVeque (:func:`tinfer.core.summary.merge`).
"""

from __future__ import annotations

import dask.dataframe as dd
import numpy as np
import pandas as pd

from ..core.comoments import Comoments, grouped_comoments
from ..core.grouped import grouped_moments
from ..core.summary import Summary, merge
from ..frames import combine_codes, key_codes, metric_values, missing_column

METRIC = "__tinfer_metric__"
STATS = ("__n__", "__mean__", "__lo__", "__ssd__", "__missing__")
#: The extra co-moments of two-column metrics (a ratio, or a value with its covariate).
CROSS = ("__mx__", "__sxx__", "__sxy__")
#: Rows with a value but no covariate ("adjust" metrics): an error only in compared arms.
NO_X = "__nox__"
DROPPED = "__dropped__"

# A metric spec: (name, columns, kind). kind "value" takes one column; "diff" takes
# first minus second; "first"/"second" take one column of a pair where both are present;
# "ratio" and "adjust" take y and x and keep their co-moments (rows missing x are an error
# for "adjust", left out and counted for "ratio").
Spec = tuple[str, tuple, str]


def _values(pdf: pd.DataFrame, cols: tuple, kind: str) -> np.ndarray:
    if kind == "value":
        return metric_values(pdf, cols)
    x = metric_values(pdf, cols[:1])
    y = metric_values(pdf, cols[1:])
    if kind == "diff":
        return x - y
    both = ~(np.isnan(x) | np.isnan(y))
    return np.where(both, x if kind == "first" else y, np.nan)


def partial_summaries(pdf: pd.DataFrame, keys: list, specs: list[Spec]) -> pd.DataFrame:
    """Summaries of one partition: key columns, metric index, n, mean, ssd, missing count.

    Rows with a missing key are counted once, in the column ``__dropped__`` of the first
    output row (one extra row carries the count when no group is present).
    """
    n_rows = len(pdf)
    if keys:
        parts = [key_codes(pdf[k]) for k in keys]
        code, _ = combine_codes([p[0] for p in parts], [len(p[1]) for p in parts])
        ok = code >= 0
        present, g = np.unique(code[ok], return_inverse=True)
        first_row = np.flatnonzero(ok)[np.unique(g, return_index=True)[1]]
    else:
        ok = np.ones(n_rows, dtype=bool)
        g = np.zeros(n_rows, dtype=np.intp)
        present = np.zeros(min(n_rows, 1), dtype=np.intp)
        first_row = np.zeros(present.size, dtype=np.intp)
    n_groups = present.size
    dropped = int(n_rows - ok.sum())
    frames = []
    for j, (_, cols, kind) in enumerate(specs):
        out = {k: pdf[k].iloc[first_row].to_numpy() for k in keys}
        no_x = np.zeros(n_groups)
        if kind in ("ratio", "adjust"):
            co, fin, no_x = _pair_partial(pdf, cols, kind, ok, g, n_groups)
            n, mean, lo, ssd = co.n, co.my, np.zeros(n_groups), co.syy
            cross = (co.mx, co.sxx, co.sxy)
        else:
            x = _values(pdf, cols, kind)[ok]
            fin = np.isfinite(x)
            n, mean, lo, ssd = grouped_moments(x[fin], g[fin], n_groups)
            cross = (np.zeros(n_groups),) * 3
        miss = np.bincount(g[~fin], minlength=n_groups)
        out[METRIC] = np.full(n_groups, j, dtype=np.int64)
        out["__n__"], out["__mean__"], out["__lo__"], out["__ssd__"] = n, mean, lo, ssd
        out |= dict(zip(CROSS, cross, strict=True))
        out[NO_X] = no_x
        out["__missing__"] = miss.astype(np.int64)
        out[DROPPED] = np.zeros(n_groups, dtype=np.int64)
        if j == 0 and n_groups:  # once per partition: the client sums this column
            out[DROPPED][0] = dropped
        frames.append(pd.DataFrame(out))
    table = pd.concat(frames, ignore_index=True)
    if dropped and n_groups == 0:
        blank = pd.DataFrame({k: pd.Series([None], dtype=object) for k in keys})
        blank[METRIC] = -1
        for c in (*STATS, *CROSS, NO_X):
            blank[c] = 0.0 if c != "__missing__" else 0
        blank[DROPPED] = dropped
        table = pd.concat([table, blank], ignore_index=True)
    return table


def _pair_partial(pdf, cols, kind, ok, g, n_groups):
    """Co-moments of (y, x) per group in one partition, the rows used, and per group the
    rows with y but no x (an "adjust" metric's covariate missing: the caller decides)."""
    y, x = (metric_values(pdf, (c,))[ok] for c in cols)
    fin = ~(np.isnan(y) | np.isnan(x))
    no_x = np.zeros(n_groups)
    if kind == "adjust":
        no_x = np.bincount(g[~np.isnan(y) & np.isnan(x)], minlength=n_groups).astype(float)
    return grouped_comoments(y[fin], x[fin], g[fin], n_groups), fin, no_x


def _meta(ddf: dd.DataFrame, keys: list) -> pd.DataFrame:
    meta = {k: ddf._meta[k].iloc[:0] for k in keys}
    frame = pd.DataFrame({k: pd.Series(v.to_numpy(), dtype=v.dtype) for k, v in meta.items()})
    frame[METRIC] = pd.Series([], dtype=np.int64)
    for c in ("__n__", "__mean__", "__lo__", "__ssd__", *CROSS, NO_X):
        frame[c] = pd.Series([], dtype=np.float64)
    frame["__missing__"] = pd.Series([], dtype=np.int64)
    frame[DROPPED] = pd.Series([], dtype=np.int64)
    return frame


def merged_summaries(ddf: dd.DataFrame, keys: list, specs: list[Spec]) -> tuple[pd.DataFrame, int]:
    """Per-group summaries over the whole Dask DataFrame, merged pairwise.

    Returns a pandas table with the key columns, the metric index, n, mean, ssd and the
    missing count per group, and the number of rows dropped for a missing key.
    """
    for k in keys:
        if k not in ddf.columns:
            raise missing_column(k, ddf.columns)
    for _, cols, _ in specs:
        for c in cols:
            if c not in ddf.columns:
                raise missing_column(c, ddf.columns)
    parts = ddf.map_partitions(partial_summaries, keys, specs, meta=_meta(ddf, keys))
    table = parts.compute()
    dropped = int(table[DROPPED].sum())
    table = table[table[METRIC] >= 0].reset_index(drop=True)
    if table.empty:  # every partition empty: the public columns, no rows
        columns = [*keys, METRIC, "n", "mean", "mean_lo", "ssd", "n_missing"]
        return pd.DataFrame({c: table[c] if c in table else [] for c in columns}), dropped
    # group id per partial row: (keys..., metric)
    codes = [key_codes(table[k])[0] for k in keys]
    codes.append(table[METRIC].to_numpy(dtype=np.intp))
    sizes = [int(c.max()) + 1 for c in codes]
    combined, _ = combine_codes(codes, sizes)
    uniq, gid, counts = np.unique(combined, return_inverse=True, return_counts=True)
    order = np.argsort(gid, kind="stable")
    width = int(counts.max())
    slot = np.arange(order.size) - np.repeat(np.cumsum(counts) - counts, counts)
    gs = gid[order]
    p_n = table["__n__"].to_numpy()[order]
    p_hi = np.where(p_n > 0, table["__mean__"].to_numpy()[order], 0.0)
    p_lo = np.where(p_n > 0, table["__lo__"].to_numpy()[order], 0.0)
    # Each group's means are taken relative to an anchor (its first non-empty partial
    # mean), so that the merge works on small numbers: hi - anchor is exact for nearby
    # values, and the low parts keep the digits that 1e9-sized means would lose.
    has = p_n > 0
    first_nonempty = np.full(uniq.size, -1, dtype=np.intp)
    idx = np.flatnonzero(has)[::-1]
    first_nonempty[gs[idx]] = idx
    anchor = np.where(first_nonempty >= 0, p_hi[np.maximum(first_nonempty, 0)], 0.0)
    shape = (uniq.size, width)
    n = np.zeros(shape)
    rel = np.zeros(shape)
    ssd = np.zeros(shape)
    n[gs, slot] = p_n
    rel[gs, slot] = np.where(has, (p_hi - anchor[gs]) + p_lo, 0.0)
    ssd[gs, slot] = table["__ssd__"].to_numpy()[order]
    s = Summary(n, rel, ssd)
    while s.n.shape[1] > 1:  # pairwise tree of Chan-Golub-LeVeque merges
        if s.n.shape[1] % 2:
            pad = np.zeros((uniq.size, 1))
            s = Summary(*(np.hstack([v, pad]) for v in (s.n, s.mean, s.ssd)))
        left = Summary(s.n[:, 0::2], s.mean[:, 0::2], s.ssd[:, 0::2])
        right = Summary(s.n[:, 1::2], s.mean[:, 1::2], s.ssd[:, 1::2])
        s = merge(left, right)
    first = order[np.cumsum(counts) - counts]
    out = table.iloc[first][[*keys, METRIC]].reset_index(drop=True)
    total = s.n[:, 0]
    rel_mean = np.where(total > 0, s.mean[:, 0], 0.0)
    hi = anchor + rel_mean
    out["n"] = total
    out["mean"] = np.where(total > 0, hi, 0.0)
    out["mean_lo"] = np.where(total > 0, (anchor - hi) + rel_mean, 0.0)
    out["ssd"] = s.ssd[:, 0]
    missing = np.bincount(gid, weights=table["__missing__"].to_numpy(), minlength=uniq.size)
    out["n_missing"] = missing.astype(np.int64)
    out["n_no_x"] = np.bincount(gid, weights=table[NO_X].to_numpy(), minlength=uniq.size)
    if table[list(CROSS)].to_numpy().any():  # two-column metrics: merge their co-moments
        parts = [p_n, p_hi + p_lo, *(table[c].to_numpy()[order] for c in ("__mx__", "__ssd__"))]
        parts += [table[c].to_numpy()[order] for c in ("__sxx__", "__sxy__")]
        cells = []
        for v in parts:
            cell = np.zeros(shape)
            cell[gs, slot] = v
            cells.append(cell)
        c = Comoments(*cells)
        while c.n.shape[1] > 1:
            if c.n.shape[1] % 2:
                c = Comoments(*(np.hstack([v, np.zeros((uniq.size, 1))]) for v in c.fields()))
            c = c.take((slice(None), slice(0, None, 2))).merge(
                c.take((slice(None), slice(1, None, 2)))
            )
        out["mx"], out["sxx"], out["sxy"] = c.mx[:, 0], c.sxx[:, 0], c.sxy[:, 0]
    return out, dropped


def summary_of(table: pd.DataFrame, metric: int, mask=None) -> tuple[Summary, int]:
    rows = table[table[METRIC] == metric]
    if mask is not None:
        rows = rows[mask(rows)]
    if rows.empty:
        return Summary(np.asarray(0.0), np.asarray(np.nan), np.asarray(0.0)), 0
    r = rows.iloc[0]
    s = Summary(
        np.asarray(r["n"]), np.asarray(r["mean"]), np.asarray(r["ssd"]), np.asarray(r["mean_lo"])
    )
    return s, int(r["n_missing"])
