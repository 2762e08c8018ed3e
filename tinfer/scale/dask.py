"""The ``.tinfer`` accessor on Dask DataFrames.

Import this module once to register it::

    import dask.dataframe as dd
    import tinfer.scale.dask  # registers ddf.tinfer

    ddf = dd.read_parquet("fills/*.parquet")
    r = ddf.tinfer.two_sample("fill_g", by="line")
    m = ddf.tinfer.compare("fill_g", by="line", within="shift", adjust="bh")

To run on a cluster, create a ``dask.distributed.Client`` first; the accessor uses
whatever scheduler is active::

    from dask.distributed import Client
    client = Client("tcp://scheduler-host:8786")   # or Client(LocalCluster(...))
    r = ddf.tinfer.one_sample("fill_g", null=500)

How it works: every partition is reduced (``map_partitions``) to a small table of
summaries, one row per group and metric, with the two-pass algorithm of
:func:`tinfer.core.grouped.grouped_summary`. Only these tables travel to the client, where
the summaries of the same group are merged pairwise by the formula of Chan, Golub and
LeVeque (:func:`tinfer.core.summary.merge`). Dask's own grouped variance, which works from
raw sums of squares, is never used: for values near 1e9 with unit noise it loses every
digit. The results are the same objects the pandas accessor returns (``TResult`` and
``BatchResult``), equal to the pandas results to rounding; they hold no raw values, so
``samples`` is None and diagnostics that need the values are not available.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Hashable, Sequence
from typing import Any

import dask.dataframe as dd
import numpy as np
import pandas as pd
from dask.dataframe.extensions import register_dataframe_accessor

from .. import _compare
from .._build import build, group_stats
from .._errors import ParameterError
from ..core.grouped import grouped_moments
from ..core.summary import Summary, merge
from ..results import TResult

_METRIC = "__tinfer_metric__"
_STATS = ("__n__", "__mean__", "__lo__", "__ssd__", "__missing__")
_DROPPED = "__dropped__"

# A metric spec: (name, columns, kind). kind "value" takes one column; "diff" takes
# first minus second; "first"/"second" take one column of a pair where both are present.
Spec = tuple[str, tuple, str]


def _metric_values(pdf: pd.DataFrame, cols: tuple, kind: str) -> np.ndarray:
    if kind == "value":
        return _compare._values(pdf, cols)
    x = _compare._values(pdf, cols[:1])
    y = _compare._values(pdf, cols[1:])
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
        parts = [_compare.key_codes(pdf[k]) for k in keys]
        code, _ = _compare.combine_codes([p[0] for p in parts], [len(p[1]) for p in parts])
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
        x = _metric_values(pdf, cols, kind)[ok]
        fin = np.isfinite(x)
        n, mean, lo, ssd = grouped_moments(x[fin], g[fin], n_groups)
        miss = np.bincount(g[~fin], minlength=n_groups)
        out = {k: pdf[k].iloc[first_row].to_numpy() for k in keys}
        out[_METRIC] = np.full(n_groups, j, dtype=np.int64)
        out["__n__"], out["__mean__"], out["__lo__"], out["__ssd__"] = n, mean, lo, ssd
        out["__missing__"] = miss.astype(np.int64)
        out[_DROPPED] = np.zeros(n_groups, dtype=np.int64)
        if j == 0 and n_groups:  # once per partition: the client sums this column
            out[_DROPPED][0] = dropped
        frames.append(pd.DataFrame(out))
    table = pd.concat(frames, ignore_index=True)
    if dropped and n_groups == 0:
        blank = pd.DataFrame({k: pd.Series([None], dtype=object) for k in keys})
        blank[_METRIC] = -1
        for c in _STATS:
            blank[c] = 0.0 if c != "__missing__" else 0
        blank[_DROPPED] = dropped
        table = pd.concat([table, blank], ignore_index=True)
    return table


def _meta(ddf: dd.DataFrame, keys: list) -> pd.DataFrame:
    meta = {k: ddf._meta[k].iloc[:0] for k in keys}
    frame = pd.DataFrame({k: pd.Series(v.to_numpy(), dtype=v.dtype) for k, v in meta.items()})
    frame[_METRIC] = pd.Series([], dtype=np.int64)
    for c in ("__n__", "__mean__", "__lo__", "__ssd__"):
        frame[c] = pd.Series([], dtype=np.float64)
    frame["__missing__"] = pd.Series([], dtype=np.int64)
    frame[_DROPPED] = pd.Series([], dtype=np.int64)
    return frame


def merged_summaries(ddf: dd.DataFrame, keys: list, specs: list[Spec]) -> tuple[pd.DataFrame, int]:
    """Per-group summaries over the whole Dask DataFrame, merged pairwise.

    Returns a pandas table with the key columns, the metric index, n, mean, ssd and the
    missing count per group, and the number of rows dropped for a missing key.
    """
    for k in keys:
        if k not in ddf.columns:
            raise _compare._frames.missing_column(k, ddf.columns)
    for _, cols, _ in specs:
        for c in cols:
            if c not in ddf.columns:
                raise _compare._frames.missing_column(c, ddf.columns)
    parts = ddf.map_partitions(partial_summaries, keys, specs, meta=_meta(ddf, keys))
    table = parts.compute()
    dropped = int(table[_DROPPED].sum())
    table = table[table[_METRIC] >= 0].reset_index(drop=True)
    if table.empty:
        return table, dropped
    # group id per partial row: (keys..., metric)
    codes = [_compare.key_codes(table[k])[0] for k in keys]
    codes.append(table[_METRIC].to_numpy(dtype=np.intp))
    sizes = [int(c.max()) + 1 for c in codes]
    combined, _ = _compare.combine_codes(codes, sizes)
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
    out = table.iloc[first][[*keys, _METRIC]].reset_index(drop=True)
    total = s.n[:, 0]
    rel_mean = np.where(total > 0, s.mean[:, 0], 0.0)
    hi = anchor + rel_mean
    out["n"] = total
    out["mean"] = np.where(total > 0, hi, 0.0)
    out["mean_lo"] = np.where(total > 0, (anchor - hi) + rel_mean, 0.0)
    out["ssd"] = s.ssd[:, 0]
    missing = np.bincount(gid, weights=table["__missing__"].to_numpy(), minlength=uniq.size)
    out["n_missing"] = missing.astype(np.int64)
    return out, dropped


def _one(table: pd.DataFrame, metric: int, mask=None) -> tuple[Summary, int]:
    rows = table[table[_METRIC] == metric]
    if mask is not None:
        rows = rows[mask(rows)]
    if rows.empty:
        return Summary(np.asarray(0.0), np.asarray(np.nan), np.asarray(0.0)), 0
    r = rows.iloc[0]
    s = Summary(
        np.asarray(r["n"]), np.asarray(r["mean"]), np.asarray(r["ssd"]), np.asarray(r["mean_lo"])
    )
    return s, int(r["n_missing"])


@register_dataframe_accessor("tinfer")
class TinferDaskAccessor:
    """t inference on a Dask DataFrame: the same methods and results as on pandas."""

    def __init__(self, obj: dd.DataFrame) -> None:
        self._obj = obj

    def one_sample(
        self,
        column: Hashable,
        *,
        null: float = 0.0,
        side: str = "two-sided",
        level: float = 0.95,
        units: str | None = None,
    ) -> TResult:
        """Test the mean of ``column`` against ``null``; see ``DataFrame.tinfer.one_sample``.

        Examples
        --------
        >>> import dask.dataframe as dd, pandas as pd, tinfer.scale.dask
        >>> pdf = pd.DataFrame({"fill_g": [501.2, 499.8, 502.4, 500.9, 501.7, 500.3]})
        >>> r = dd.from_pandas(pdf, npartitions=2).tinfer.one_sample("fill_g", null=500)
        >>> round(r.estimate, 3), round(r.t, 3), round(r.p, 4)
        (501.05, 2.737, 0.0409)
        """
        table, _ = merged_summaries(self._obj, [], [(str(column), (column,), "value")])
        s, miss = _one(table, 0)
        return build(
            "one-sample",
            (s,),
            func="one_sample",
            variable=str(column),
            labels=(str(column),),
            n_missing=(miss,),
            null=null,
            side=side,
            level=level,
            units=units,
        )

    def two_sample(
        self,
        column: Hashable,
        by: Hashable,
        *,
        groups: Sequence | None = None,
        null: float = 0.0,
        side: str = "two-sided",
        level: float = 0.95,
        pooled: bool = False,
        units: str | None = None,
    ) -> TResult:
        """Two independent groups of ``column`` split by ``by`` (long form; Welch by default).

        See ``DataFrame.tinfer.two_sample``.
        """
        table, no_key = merged_summaries(self._obj, [by], [(str(column), (column,), "value")])
        levels = table[by].to_numpy(dtype=object)
        first, second = _compare._choose_arms(levels, np.ones(len(levels), bool), by, groups)
        sums, miss, labs = [], [], []
        for i in (first, second):
            row = table.iloc[i]
            sums.append(
                Summary(
                    np.asarray(row["n"]),
                    np.asarray(row["mean"]),
                    np.asarray(row["ssd"]),
                    np.asarray(row["mean_lo"]),
                )
            )
            miss.append(int(row["n_missing"]))
            labs.append(str(_compare._py(levels[i])))
        return build(
            "two-sample",
            tuple(sums),
            func="two_sample",
            variable=str(column),
            labels=tuple(labs),
            n_missing=tuple(miss),
            null=null,
            side=side,
            level=level,
            pooled=pooled,
            units=units,
            warnings=(f"{no_key} row(s) with a missing {by!r} value were not used.",)
            if no_key
            else (),
        )

    def paired(
        self,
        first: Hashable,
        second: Hashable,
        *,
        null: float = 0.0,
        side: str = "two-sided",
        level: float = 0.95,
        units: str | None = None,
    ) -> TResult:
        """Paired wide columns, first minus second; see ``DataFrame.tinfer.paired``."""
        cols = (first, second)
        specs = [("diff", cols, "diff"), ("first", cols, "first"), ("second", cols, "second")]
        table, _ = merged_summaries(self._obj, [], specs)
        d, dropped = _one(table, 0)
        sa, _ = _one(table, 1)
        sb, _ = _one(table, 2)
        extra = (group_stats(str(first), sa), group_stats(str(second), sb))
        return build(
            "paired",
            (d,),
            func="paired",
            variable=f"{first} vs {second}",
            labels=(str(first), str(second)),
            n_missing=(dropped,),
            extra_groups=extra,
            null=null,
            side=side,
            level=level,
            units=units,
        )

    def compare(
        self,
        columns: Hashable | Sequence[Hashable] | None = None,
        by: Hashable | None = None,
        within: Hashable | Sequence[Hashable] | None = None,
        *,
        groups: Sequence | None = None,
        null: float = 0.0,
        paired: Sequence | None = None,
        adjust: str = "holm",
        rate: float = 0.05,
        level: float = 0.95,
        side: str = "two-sided",
        pooled: bool = False,
    ) -> _compare.BatchResult:
        """Many tests at once; see ``DataFrame.tinfer.compare`` (same options, same result).

        Examples
        --------
        >>> import dask.dataframe as dd, pandas as pd, tinfer.scale.dask
        >>> pdf = pd.DataFrame({"fill_g": [501, 503, 502, 498, 497, 499, 510, 512, 509,
        ...                                508, 507, 509],
        ...                     "line": ["new", "new", "new", "old", "old", "old"] * 2,
        ...                     "shift": ["day"] * 6 + ["night"] * 6})
        >>> m = dd.from_pandas(pdf, npartitions=3).tinfer.compare(
        ...     "fill_g", by="line", within="shift")
        >>> m.comparison, m.estimate.round(2).tolist()
        ('new minus old', [4.0, 2.33])
        """
        func = "compare"
        options = _compare.check_options(
            func, adjust=adjust, rate=rate, level=level, side=side, null=null, pooled=pooled
        )
        specs2 = _compare._metric_specs(columns, paired, func)
        keys = _compare.as_list(within)
        _compare._check_result_names(keys, by, func)
        kind = "diff" if paired is not None else "value"
        specs = [(name, cols, kind) for name, cols in specs2]
        all_keys = keys + ([by] if by is not None else [])
        table, dropped = merged_summaries(self._obj, all_keys, specs)
        names = [s[0] for s in specs]
        table["metric"] = [names[i] for i in table[_METRIC]]
        table = table.drop(columns=[_METRIC])
        opts: dict[str, Any] = dict(options)
        if by is not None:
            if paired is not None:
                raise ParameterError(f"{func} takes by= (two groups) or paired=, not both.")
            result = _compare.compare_summaries(
                table, within=keys, arm=by, groups=groups, metric="metric", **opts
            )
        elif paired is not None:
            labs = tuple(str(v) for v in specs2[0][1])
            result = _compare.compare_summaries(
                table, within=keys, metric="metric", paired=True, labels=labs, **opts
            )
        else:
            result = _compare.compare_summaries(table, within=keys, metric="metric", **opts)
        notes = list(result.warnings)
        if dropped:
            what = "segment key" if by is None else f"segment key or {by!r} value"
            notes.insert(0, f"{dropped} row(s) with a missing {what} were not used.")
        missing = int(table["n_missing"].sum())
        if missing:
            notes.append(f"{missing} missing value(s) dropped.")
        if notes != list(result.warnings):
            result = dataclasses.replace(result, warnings=tuple(dict.fromkeys(notes)))
        return result


__all__ = ["TinferDaskAccessor", "merged_summaries", "partial_summaries"]
