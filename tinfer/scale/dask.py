"""The ``.tinfer`` accessor on Dask DataFrames.

Import this module once to register it::

    import dask.dataframe as dd
    import tinfer.scale.dask  # registers ddf.tinfer

    ddf = dd.read_parquet("fills/*.parquet")
    r = ddf.tinfer.two_sample("fill_g", by="line")
    m = ddf.tinfer.compare("fill_g", by="line", within="shift", adjust="benjamini-hochberg")

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
from dask.dataframe.extensions import register_dataframe_accessor

from ..analyses import build, check_options, group_stats
from ..core.comoments import Comoments, adjusted_arms, ratio_summary
from ..core.summary import Summary
from ..errors import DataError, ParameterError
from ..frames import (
    as_list,
    check_roles,
    choose_two,
    compare_moments,
    compare_summaries,
    experiment_checks,
    label_pair,
    metric_specs,
    ratio_stats,
    removed_note,
)
from ..results import BatchResult, TResult
from .summaries import METRIC, merged_summaries, partial_summaries, summary_of
from .units import unit_rows


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
        s, miss = summary_of(table, 0)
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
        column: Hashable | None = None,
        by: Hashable | None = None,
        *,
        groups: Sequence | None = None,
        null: float = 0.0,
        side: str = "two-sided",
        level: float = 0.95,
        pooled: bool = False,
        units: str | None = None,
        covariate: Hashable | None = None,
        ratio: Sequence | None = None,
        relative: bool | str = False,
        cluster: Hashable | None = None,
    ) -> TResult:
        """Two independent groups of ``column`` split by ``by`` (long form; Welch by default).

        See ``DataFrame.tinfer.two_sample``; ``cluster=``, ``ratio=`` and ``covariate=`` work
        as there (see ``compare`` for how), from co-moments merged exactly across partitions.
        """
        if by is None or (column is None) == (ratio is None):
            raise DataError("two_sample on Dask needs by= and either a value column or ratio=.")
        if ratio is not None and covariate is not None:
            raise DataError("ratio= does not combine with covariate=; give one of them.")
        variable = str(column)
        spec = (variable, (column,), "value")
        if ratio is not None:
            spec = metric_specs(None, None, "two_sample", tuple(ratio))[0]
            variable = spec[0]
        data, notes, cov = self._obj, [], covariate
        if cluster is not None:
            data, [spec], cov, notes = unit_rows(data, [], by, cluster, [spec], covariate)
        if covariate is not None:
            spec = (variable, (spec[1][0], cov), "adjust")
            variable = f"{column} (adjusted for {covariate})"
        table, no_key = merged_summaries(data, [by], [spec])
        levels = table[by].to_numpy(dtype=object)
        first, second = choose_two(list(levels), by, groups, "two-sample comparison")
        co = _comoments(table)
        notes += [f"{no_key} row(s) with a missing {by!r} value were not used."] if no_key else []
        if ratio is not None:
            sums = tuple(ratio_summary(co.take(i)) for i in (first, second))
        elif covariate is not None:
            _check_covariate(table, by, groups, covariate)
            adj = adjusted_arms(co.take(first), co.take(second))
            sums, notes = (adj.first, adj.second), [*notes, removed_note(adj, covariate)]
        else:
            sums = tuple(_summary(table.iloc[i]) for i in (first, second))
        return build(
            "two-sample",
            sums,
            func="two_sample",
            variable=variable,
            labels=label_pair(levels[first], levels[second]),
            n_missing=tuple(int(table.iloc[i]["n_missing"]) for i in (first, second)),
            null=null,
            side=side,
            level=level,
            pooled=pooled,
            units=units,
            warnings=tuple(notes),
            relative=relative,
            estimand="ratio" if ratio is not None else "mean",
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
        d, dropped = summary_of(table, 0)
        sa, _ = summary_of(table, 1)
        sb, _ = summary_of(table, 2)
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
        covariate: Hashable | None = None,
        ratio: Sequence | None = None,
        cluster: Hashable | None = None,
        relative: bool | str = False,
    ) -> BatchResult:
        """Many tests at once; see ``DataFrame.tinfer.compare`` (same options, same result).

        ``ratio=`` and ``covariate=`` work as there, from co-moments merged exactly across
        partitions. ``cluster=`` averages (sums, for ratios) each unit's rows with a Dask
        groupby; the unit table, one row per segment, arm and unit, then comes to the client
        once to leave out units found in both arms.

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
        options = check_options(
            func, adjust=adjust, rate=rate, level=level, side=side, null=null, pooled=pooled
        )
        options["relative"] = relative
        specs2 = metric_specs(columns, paired, func, ratio)
        keys = as_list(within)
        check_roles(keys, by, specs2, func)
        experiment_checks(func, by, paired, None, covariate, specs2)
        data, unit_notes, cov = self._obj, [], covariate
        if cluster is not None:
            data, specs2, cov, unit_notes = unit_rows(data, keys, by, cluster, specs2, covariate)
        specs = [(n, (*c, cov), "adjust") for n, c, _ in specs2] if covariate else specs2
        all_keys = keys + ([by] if by is not None else [])
        table, dropped = merged_summaries(data, all_keys, specs)
        if table.empty:
            raise DataError(
                "The Dask DataFrame has no rows with values to compare: every partition is "
                f"empty ({dropped} row(s) had a missing key). Check the filter applied before."
            )
        names = [s[0] for s in specs]
        table["metric"] = [names[i] for i in table[METRIC]]
        table = table.drop(columns=[METRIC])
        opts: dict[str, Any] = dict(options)
        if by is not None and paired is not None:
            raise ParameterError(f"{func} takes by= (two groups) or paired=, not both.")
        co = _comoments(table)
        ratio_note = None
        if covariate is not None:
            _check_covariate(table, by, groups, covariate)
            stats = table.drop(columns=["n", "mean", "mean_lo", "ssd", *EXTRA])
            result = compare_moments(
                stats, co, "covariate", keys, covariate=covariate, arm=by, groups=groups,
                metric="metric", **opts,
            )  # fmt: skip
        else:
            ratio_names = [n for n, _, kind in specs2 if kind == "ratio"]
            table, ratio_note = _ratio_rows(table, co, ratio_names)
            more: dict[str, Any] = {"arm": by, "groups": groups} if by is not None else {}
            if paired is not None:
                more = {"paired": True, "labels": tuple(str(v) for v in specs2[0][1])}
            result = compare_summaries(table, within=keys, metric="metric", **more, **opts)
        notes = unit_notes + list(result.warnings) + ([ratio_note] if ratio_note else [])
        if dropped:
            what = "segment key" if by is None else f"segment key or {by!r} value"
            notes.insert(0, f"{dropped} row(s) with a missing {what} were not used.")
        missing = int(table["n_missing"].sum())
        if missing:
            notes.append(f"{missing} missing value(s) dropped.")
        if notes != list(result.warnings):
            result = dataclasses.replace(result, warnings=tuple(dict.fromkeys(notes)))
        return result


def _ratio_rows(table, co: Comoments, ratio_names: list[str]):
    """The table with each ratio metric's row as the summary of its linearised values."""
    ratios = table["metric"].isin(ratio_names).to_numpy()
    note = None
    if ratios.any():
        n, mean, ssd, note = ratio_stats(co.take(ratios))
        table.loc[ratios, "n"], table.loc[ratios, "mean"], table.loc[ratios, "ssd"] = n, mean, ssd
        table.loc[ratios, "mean_lo"] = 0.0
    return table.drop(columns=list(EXTRA), errors="ignore"), note


#: Columns of the merged table beyond the summaries.
EXTRA = ("mx", "sxx", "sxy", "n_no_x")


def _check_covariate(table, by, groups, covariate) -> None:
    """A row of the compared arms with a value but no covariate is an error."""
    levels = list(dict.fromkeys(table[by].tolist()))
    first, second = choose_two(levels, by, groups, "two-sample comparison")
    chosen = table[by].isin([levels[first], levels[second]]).to_numpy()
    bad = int(table["n_no_x"].to_numpy()[chosen].sum())
    if bad:
        raise DataError(
            f"{bad:,} row(s) in the compared groups have a value but no {covariate!r}. The "
            "adjustment needs the pre-period value of every unit: fill it (for example with "
            "the overall pre-period mean, a stated rule) or drop those rows."
        )


def _summary(row) -> Summary:
    return Summary(*(np.asarray(row[c]) for c in ("n", "mean", "ssd", "mean_lo")))


def _comoments(table) -> Comoments:
    """The merged co-moments of every row (zeros where the metric has one column)."""
    zeros = np.zeros(len(table))
    cross = [table[c].to_numpy() if c in table else zeros for c in ("mx", "sxx", "sxy")]
    y = table["mean"].to_numpy() + table["mean_lo"].to_numpy()
    return Comoments(table["n"].to_numpy(), y, cross[0], table["ssd"].to_numpy(), *cross[1:])


__all__ = ["TinferDaskAccessor", "merged_summaries", "partial_summaries"]
