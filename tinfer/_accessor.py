"""The ``.tinfer`` accessor on pandas DataFrames and Series.

Thin by design: it picks columns, drops missing values, splits groups and hands
summaries to the core. pandas builds a new accessor on every attribute access, so the
constructor only checks and stores the object.
"""

from __future__ import annotations

from collections.abc import Hashable, Sequence

import pandas as pd

from . import _frames
from ._build import build, group_stats
from ._errors import DataError
from .core.summary import Summary
from .results import TResult


def _summary(sample: _frames.Sample) -> Summary:
    return Summary.of(sample.values)


def _one_sample(sample: _frames.Sample, variable, *, func, **opts) -> TResult:
    return build(
        "one-sample",
        (_summary(sample),),
        func=func,
        variable=variable,
        labels=(sample.label,),
        n_missing=(sample.n_missing,),
        samples=(sample.values,),
        **opts,
    )


def _paired(a: _frames.Sample, b: _frames.Sample, dropped: int, variable, *, func, **opts):
    diff = a.values - b.values
    extra = (group_stats(a.label, _summary(a)), group_stats(b.label, _summary(b)))
    return build(
        "paired",
        (Summary.of(diff),),
        func=func,
        variable=variable,
        labels=(a.label, b.label),
        n_missing=(dropped,),
        extra_groups=extra,
        samples=(diff,),
        **opts,
    )


def _two_sample(a: _frames.Sample, b: _frames.Sample, variable, *, func, **opts) -> TResult:
    return build(
        "two-sample",
        (_summary(a), _summary(b)),
        func=func,
        variable=variable,
        labels=(a.label, b.label),
        n_missing=(a.n_missing, b.n_missing),
        samples=(a.values, b.values),
        **opts,
    )


def _is_pair(x) -> bool:
    return isinstance(x, list | tuple) and len(x) == 2


@pd.api.extensions.register_dataframe_accessor("tinfer")
class TinferFrameAccessor:
    """t inference on the columns of a DataFrame: ``df.tinfer.one_sample(...)`` and friends."""

    def __init__(self, obj: pd.DataFrame) -> None:
        self._obj = obj

    def one_sample(
        self,
        column: Hashable,
        *,
        null: float = 0.0,
        side: str = "two-sided",
        level: float = 0.95,
        units: str | None = None,
        margin: float | tuple[float, float] | None = None,
        margin_units: str = "raw",
        worse: str | None = None,
        superior: bool = False,
        trim: float = 0.0,
    ) -> TResult:
        """Test the mean of ``column`` against the reference value ``null``.

        Parameters
        ----------
        column : column label
            The measurements. Missing values are dropped and counted.
        null : float, default 0
            The hypothesised mean (a target, a specification, a reference value).
        side : {"two-sided", "upper", "lower"}
            The alternative: the mean differs from, is greater than, or is less than ``null``.
        level : float, default 0.95
            Confidence level of the interval; the test's significance level is ``1 - level``.
        units : str, optional
            Units of the measurements, shown next to estimates.
        margin : float or (float, float), optional
            Ask for an equivalence claim by two one-sided tests (TOST): a positive number
            ``m`` is the band ``null - m`` to ``null + m``; a pair ``(lower, upper)`` gives
            offsets relative to ``null`` with ``lower < 0 < upper``, e.g. ``(-1.5, 2.0)``.
            Each one-sided test runs at ``1 - level``; the matching interval is at
            ``2 * level - 1`` (90% for the default level).
        margin_units : {"raw", "standardised"}, default "raw"
            "standardised": the margin is in SDs (converted with the sample SD); the raw
            margin then depends on the observed SD.
        worse : {None, "lower", "higher"}
            For a one-sided claim (non-inferiority): the direction that counts as worse.
            With ``margin=m`` the claim is "not worse than ``null`` by more than m".
        superior : bool, default False
            With ``worse``: claim "better than ``null`` by more than the margin" instead.
        trim : float, default 0
            Proportion trimmed from each tail, in [0, 0.5): with ``trim=0.2`` Yuen's
            trimmed-mean t (20% trimmed means, winsorised variances) replaces the t test
            and the estimate is a trimmed mean. 0 gives the ordinary t.

        Returns
        -------
        TResult

        Examples
        --------
        >>> import pandas as pd, tinfer
        >>> df = pd.DataFrame({"fill_g": [501.2, 499.8, 502.4, 500.9, 501.7, 500.3]})
        >>> r = df.tinfer.one_sample("fill_g", null=500)
        >>> round(r.estimate, 3), round(r.t, 3), round(r.p, 4)
        (501.05, 2.737, 0.0409)
        """
        sample = _frames.one_column(self._obj, column)
        return _one_sample(
            sample,
            str(column),
            func="one_sample",
            null=null,
            side=side,
            level=level,
            units=units,
            margin=margin,
            margin_units=margin_units,
            worse=worse,
            superior=superior,
            trim=trim,
        )

    def two_sample(
        self,
        column: Hashable | Sequence[Hashable],
        by: Hashable | None = None,
        *,
        groups: Sequence | None = None,
        null: float = 0.0,
        side: str = "two-sided",
        level: float = 0.95,
        pooled: bool = False,
        units: str | None = None,
        margin: float | tuple[float, float] | None = None,
        margin_units: str = "raw",
        worse: str | None = None,
        superior: bool = False,
        trim: float = 0.0,
    ) -> TResult:
        """Compare the means of two independent groups (Welch by default).

        Parameters
        ----------
        column : column label, or a pair of labels
            The measurements in long form, split by ``by``; or two columns, one per group.
        by : column label, optional
            The grouping column for long data. It must have two levels unless ``groups``
            names the two to compare.
        groups : (first, second), optional
            The two levels to compare and their order: the estimate is first minus second.
            Without it the two levels are taken in sorted order of their text (so a
            level 10 comes before a level 2).
        null : float, default 0
            The hypothesised difference (first minus second).
        side : {"two-sided", "upper", "lower"}
            "upper": the first mean exceeds the second by more than ``null``.
        level : float, default 0.95
            Confidence level.
        pooled : bool, default False
            True for Student's equal-variance test; False for Welch's test.
        units : str, optional
            Units of the measurements.
        margin : float or (float, float), optional
            Ask for an equivalence claim by two one-sided tests (TOST): a positive number
            ``m`` is the band ``null - m`` to ``null + m``; a pair ``(lower, upper)`` gives
            offsets relative to ``null`` with ``lower < 0 < upper``, e.g. ``(-1.5, 2.0)``.
            Each one-sided test runs at ``1 - level``; the matching interval is at
            ``2 * level - 1`` (90% for the default level).
        margin_units : {"raw", "standardised"}, default "raw"
            "standardised": the margin is in SDs (converted with the pooled SD); the raw
            margin then depends on the observed SD.
        worse : {None, "lower", "higher"}
            For a one-sided claim (non-inferiority): the direction that counts as worse.
            With ``margin=m`` the claim is "not worse than ``null`` by more than m".
        superior : bool, default False
            With ``worse``: claim "better than ``null`` by more than the margin" instead.
        trim : float, default 0
            Proportion trimmed from each tail, in [0, 0.5): with ``trim=0.2`` Yuen's
            trimmed-mean t (20% trimmed means, winsorised variances) replaces the t test
            and the estimate is a trimmed mean difference. 0 gives the ordinary t.

        Examples
        --------
        >>> import pandas as pd, tinfer
        >>> df = pd.DataFrame({"kg": [5.2, 4.8, 6.1, 5.5, 4.1, 4.4, 3.9, 4.6],
        ...                    "plot": ["drip"] * 4 + ["furrow"] * 4})
        >>> r = df.tinfer.two_sample("kg", by="plot")
        >>> r.comparison, round(r.estimate, 3), round(r.df, 2)
        ('drip minus furrow', 1.15, 4.75)
        """
        opts = dict(null=null, side=side, level=level, pooled=pooled, units=units)
        opts |= dict(margin=margin, margin_units=margin_units, worse=worse, superior=superior)
        opts["trim"] = trim
        if by is None:
            if not _is_pair(column):
                raise DataError(
                    "two_sample needs either by= (a grouping column) or a pair of columns, "
                    f"one per group. Got column={column!r} and no by."
                )
            a, b = (_frames.one_column(self._obj, c) for c in column)
            return _two_sample(a, b, f"{column[0]} vs {column[1]}", func="two_sample", **opts)
        a, b = _frames.two_groups(self._obj, column, by, groups)
        no_key = int(_frames.column(self._obj, by).isna().sum())
        if no_key:
            opts["warnings"] = (f"{no_key} row(s) with a missing {by!r} value were not used.",)
        return _two_sample(a, b, str(column), func="two_sample", **opts)

    def paired(
        self,
        first: Hashable,
        second: Hashable | None = None,
        *,
        by: Hashable | None = None,
        subject: Hashable | None = None,
        groups: Sequence | None = None,
        null: float = 0.0,
        side: str = "two-sided",
        level: float = 0.95,
        units: str | None = None,
        margin: float | tuple[float, float] | None = None,
        margin_units: str = "raw",
        worse: str | None = None,
        superior: bool = False,
        trim: float = 0.0,
    ) -> TResult:
        """Paired comparison: the mean of within-unit differences, first minus second.

        Wide data: ``paired("before", "after")``, one row per unit. Long data:
        ``paired("score", by="visit", subject="unit_id")``, one row per unit and
        condition; pairs are matched by ``subject``. Rows missing either value of a
        pair are dropped and counted. ``margin``, ``margin_units``, ``worse`` and
        ``superior`` ask for an equivalence or non-inferiority claim as in ``one_sample``,
        with a standardised margin converted by the SD of the differences.
        ``trim`` (e.g. 0.2) runs Yuen's trimmed-mean t on the differences: the estimate is
        then the trimmed mean of the differences.

        Examples
        --------
        >>> import pandas as pd, tinfer
        >>> df = pd.DataFrame({"before": [12.1, 11.4, 13.0, 12.7],
        ...                    "after": [11.2, 11.0, 12.1, 12.5]})
        >>> r = df.tinfer.paired("before", "after")
        >>> r.comparison, round(r.estimate, 3)
        ('before minus after', 0.6)
        """
        opts = dict(null=null, side=side, level=level, units=units)
        opts |= dict(margin=margin, margin_units=margin_units, worse=worse, superior=superior)
        opts["trim"] = trim
        if by is None and subject is None:
            if second is None:
                raise DataError(
                    "paired needs two columns (wide data) or by= and subject= (long data)."
                )
            a, b, dropped = _frames.paired_wide(self._obj, first, second)
            variable = f"{first} vs {second}"
        else:
            if by is None or subject is None or second is not None:
                raise DataError(
                    "Long paired data need one value column plus by= (the condition column) and "
                    "subject= (the unit id), e.g. paired('score', by='visit', subject='unit_id')."
                )
            a, b, dropped = _frames.paired_long(self._obj, first, by, subject, groups)
            variable = str(first)
        return _paired(a, b, dropped, variable, func="paired", **opts)

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
    ):
        """Many t tests at once: every metric in every segment, with adjusted p-values.

        One pass over the rows builds n, mean and the sum of squared deviations of every
        segment, arm and column; all tests then run as array operations.

        Parameters
        ----------
        columns : column label or list of labels
            The value columns (metrics) to compare.
        by : column label, optional
            Two-level group column: a Welch (or pooled) two-sample test per segment,
            first minus second. Without ``by`` (and without ``paired``) each segment's
            mean is tested against ``null``.
        within : column label or list of labels, optional
            Segment columns; one test per combination of their values that occurs.
        groups : (first, second), optional
            The two levels of ``by`` to compare, in order; default: its two levels sorted
            as text.
        null : float, default 0
            Hypothesised mean, difference or paired difference.
        paired : (first, second) or list of such pairs, optional
            Paired wide columns: each pair is tested on its within-row differences
            first minus second (rows missing either value are dropped). Replaces
            ``columns``.
        adjust : {"holm", "hochberg", "bh", "by", "none"}, default "holm"
            Multiplicity adjustment over all tested rows as one family; also
            "benjamini-hochberg" and "benjamini-yekutieli".
        rate : float, default 0.05
            Error rate (family-wise for Holm and Hochberg, false discovery rate for BH
            and BY): a row is a discovery when its adjusted p-value is at most ``rate``.
        level, side, pooled
            As for ``two_sample``.

        Returns
        -------
        BatchResult
            ``.to_frame()`` has one row per segment and metric.

        Examples
        --------
        >>> import pandas as pd, tinfer
        >>> df = pd.DataFrame({"fill_g": [501, 503, 502, 498, 497, 499, 510, 512, 509,
        ...                               508, 507, 509],
        ...                    "line": ["new", "new", "new", "old", "old", "old"] * 2,
        ...                    "shift": ["day"] * 6 + ["night"] * 6})
        >>> m = df.tinfer.compare("fill_g", by="line", within="shift", adjust="bh")
        >>> m.comparison, m.n_tests, m.estimate.round(2).tolist()
        ('new minus old', 2, [4.0, 2.33])
        """
        from ._compare import compare_frame

        return compare_frame(
            self._obj,
            columns,
            by,
            within,
            groups=groups,
            null=null,
            paired=paired,
            adjust=adjust,
            rate=rate,
            level=level,
            side=side,
            pooled=pooled,
        )


@pd.api.extensions.register_series_accessor("tinfer")
class TinferSeriesAccessor:
    """t inference on one Series: ``s.tinfer.one_sample(null=...)``."""

    def __init__(self, obj: pd.Series) -> None:
        self._obj = obj

    def one_sample(
        self,
        *,
        null: float = 0.0,
        side: str = "two-sided",
        level: float = 0.95,
        units: str | None = None,
        margin: float | tuple[float, float] | None = None,
        margin_units: str = "raw",
        worse: str | None = None,
        superior: bool = False,
        trim: float = 0.0,
    ) -> TResult:
        """Test the mean of the Series against ``null``; see ``DataFrame.tinfer.one_sample``.

        Examples
        --------
        >>> import pandas as pd, tinfer
        >>> r = pd.Series([9.8, 10.4, 10.1, 9.7, 10.6], name="ohms").tinfer.one_sample(null=10)
        >>> round(r.estimate, 2), r.variable
        (10.12, 'ohms')
        """
        name = "value" if self._obj.name is None else str(self._obj.name)
        what = f"Series {name!r}"
        sample = _frames.finite(_frames.to_float(self._obj, what), name, what)
        return _one_sample(
            sample,
            name,
            func="one_sample",
            null=null,
            side=side,
            level=level,
            units=units,
            margin=margin,
            margin_units=margin_units,
            worse=worse,
            superior=superior,
            trim=trim,
        )


__all__ = ["TinferFrameAccessor", "TinferSeriesAccessor"]
