"""The ``.tinfer`` accessor on pandas DataFrames and Series.

Thin by design: it picks columns, and hands them to :mod:`tinfer.frames.ttest` (one test)
or :mod:`tinfer.frames.batch` (many tests), which drop missing values, split groups and
call the analyses. pandas builds a new accessor on every attribute access, so the
constructor only stores the object.
"""

from __future__ import annotations

from collections.abc import Hashable, Sequence

import pandas as pd

from ..docstrings import fill_params
from ..errors import DataError
from ..results.batch import BatchResult
from ..results.pairwise import PairwiseResult
from ..results.ttest import TResult
from . import ttest
from .batch import compare_frame
from .columns import one_column
from .experiment import long_two_sample
from .pairwise import pairwise_frame

Margin = float | tuple[float, float] | None

_ONE_SIDE = "the mean differs from, is greater than, or is less than ``null``."
_TWO_SIDE = '"upper": the first mean exceeds the second by more than ``null``.'
_RATIO_BATCH = " A list of pairs gives several; they join the metrics of ``columns``."
_PAIR_SIDE = '"upper": the mean difference (first minus second) exceeds ``null``.'


def _is_pair(x) -> bool:
    return isinstance(x, list | tuple) and len(x) == 2


@pd.api.extensions.register_dataframe_accessor("tinfer")
class TinferFrameAccessor:
    """t inference on the columns of a DataFrame: ``df.tinfer.one_sample(...)`` and friends."""

    def __init__(self, obj: pd.DataFrame) -> None:
        self._obj = obj

    @fill_params(side=_ONE_SIDE, sd="the sample SD", trimmed="a trimmed mean")
    def one_sample(
        self,
        column: Hashable,
        *,
        null: float = 0.0,
        side: str = "two-sided",
        level: float = 0.95,
        units: str | None = None,
        margin: Margin = None,
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
        {side}
        {level}
        {units}
        {margin_options}
        {trim}

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
        sample = one_column(self._obj, column)
        opts = dict(null=null, side=side, level=level, units=units, trim=trim)
        opts |= dict(margin=margin, margin_units=margin_units, worse=worse, superior=superior)
        return ttest.one_sample(sample, str(column), func="one_sample", **opts)

    @fill_params(side=_TWO_SIDE, sd="the pooled SD", trimmed="a trimmed mean difference")
    def two_sample(
        self,
        column: Hashable | Sequence[Hashable] | None = None,
        by: Hashable | None = None,
        *,
        groups: Sequence | None = None,
        null: float = 0.0,
        side: str = "two-sided",
        level: float = 0.95,
        pooled: bool = False,
        units: str | None = None,
        margin: Margin = None,
        margin_units: str = "raw",
        worse: str | None = None,
        superior: bool = False,
        trim: float = 0.0,
        cluster: Hashable | None = None,
        covariate: Hashable | None = None,
        ratio: tuple[Hashable, Hashable] | None = None,
        relative: bool | str = False,
    ) -> TResult:
        """Compare the means of two independent groups (Welch by default).

        Parameters
        ----------
        column : column label, or a pair of labels
            The measurements in long form, split by ``by``; or two columns, one per group
            (left out with ``ratio``).
        by : column label, optional
            The grouping column for long data. It must have two levels unless ``groups``
            names the two to compare.
        groups : (first, second), optional
            The two levels to compare and their order: the estimate is first minus second.
            Without it the two levels are taken in sorted order of their text (so a
            level 10 comes before a level 2).
        null : float, default 0
            The hypothesised difference (first minus second).
        {side}
        {level}
        {pooled}
        {units}
        {margin_options}
        {trim}
        {experiment_options}
        {relative}

        Returns
        -------
        TResult

        Examples
        --------
        >>> import pandas as pd, tinfer
        >>> df = pd.DataFrame({"kg": [5.2, 4.8, 6.1, 5.5, 4.1, 4.4, 3.9, 4.6],
        ...                    "plot": ["drip"] * 4 + ["furrow"] * 4})
        >>> r = df.tinfer.two_sample("kg", by="plot")
        >>> r.comparison, round(r.estimate, 3), round(r.df, 2)
        ('drip minus furrow', 1.15, 4.75)
        """
        opts = dict(null=null, side=side, level=level, pooled=pooled, units=units, trim=trim)
        opts |= dict(margin=margin, margin_units=margin_units, worse=worse, superior=superior)
        opts["relative"] = relative
        if by is None:
            if cluster is not None or covariate is not None or ratio is not None:
                raise DataError(
                    "cluster=, covariate= and ratio= work on long data: give by= (the group "
                    "column) too."
                )
            if not _is_pair(column):
                raise DataError(
                    "two_sample needs either by= (a grouping column) or a pair of columns, "
                    f"one per group. Got column={column!r} and no by."
                )
            a, b = (one_column(self._obj, c) for c in column)
            variable = f"{column[0]} vs {column[1]}"
            return ttest.two_sample(a, b, variable, func="two_sample", **opts)
        experiment = dict(cluster=cluster, covariate=covariate, ratio=ratio)
        return long_two_sample(self._obj, column, by, groups, experiment, opts)

    @fill_params(
        side=_PAIR_SIDE,
        sd="the SD of the differences",
        trimmed="the trimmed mean of the differences",
        relative_what="(the first condition's mean over the second's)",
    )
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
        margin: Margin = None,
        margin_units: str = "raw",
        worse: str | None = None,
        superior: bool = False,
        trim: float = 0.0,
        relative: bool | str = False,
    ) -> TResult:
        """Paired comparison: the mean of within-unit differences, first minus second.

        Wide data: ``paired("before", "after")``, one row per unit. Long data:
        ``paired("score", by="visit", subject="unit_id")``, one row per unit and
        condition; pairs are matched by ``subject``. Rows missing either value of a
        pair are dropped and counted.

        Parameters
        ----------
        first, second : column label
            Wide data: the two measurement columns. Long data: ``first`` is the value
            column and ``second`` is left out.
        by : column label, optional
            Long data: the condition column (two levels, or the two named in ``groups``).
        subject : column label, optional
            Long data: the unit id that matches the two values of a pair.
        groups : (first, second), optional
            Long data: the two conditions and their order (default: sorted as text).
        null : float, default 0
            The hypothesised mean of the differences.
        {side}
        {level}
        {units}
        {margin_options}
        {trim}
        {relative}

        Returns
        -------
        TResult

        Examples
        --------
        >>> import pandas as pd, tinfer
        >>> df = pd.DataFrame({"before": [12.1, 11.4, 13.0, 12.7],
        ...                    "after": [11.2, 11.0, 12.1, 12.5]})
        >>> r = df.tinfer.paired("before", "after")
        >>> r.comparison, round(r.estimate, 3)
        ('before minus after', 0.6)
        """
        opts = dict(null=null, side=side, level=level, units=units, trim=trim)
        opts |= dict(margin=margin, margin_units=margin_units, worse=worse, superior=superior)
        opts["relative"] = relative
        if by is None and subject is None:
            if second is None:
                raise DataError(
                    "paired needs two columns (wide data) or by= and subject= (long data)."
                )
            a, b, dropped = ttest.paired_wide(self._obj, first, second)
            variable = f"{first} vs {second}"
        else:
            if by is None or subject is None or second is not None:
                raise DataError(
                    "Long paired data need one value column plus by= (the condition column) and "
                    "subject= (the unit id), e.g. paired('score', by='visit', subject='unit_id')."
                )
            a, b, dropped = ttest.paired_long(self._obj, first, by, subject, groups)
            variable = str(first)
        return ttest.paired(a, b, dropped, variable, func="paired", **opts)

    @fill_params(side=_TWO_SIDE, where=", per segment and metric", ratio_where=_RATIO_BATCH)
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
        pairwise: str | None = None,
        against: Hashable | None = None,
        cluster: Hashable | None = None,
        covariate: Hashable | None = None,
        ratio: Sequence | None = None,
        relative: bool | str = False,
    ) -> BatchResult:
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
        {batch_options}
        pairwise : str, optional
            Compare every level of ``by`` (not two) within every segment, as one family
            per segment and metric, by this method: "games-howell", "tukey-kramer",
            "dunnett" (needs ``against``) or separate Welch tests with "holm", "hochberg",
            "benjamini-hochberg", "benjamini-yekutieli" or "none" (see ``pairwise()``).
            ``p_family`` is then each pair's p-value adjusted within its family, the
            intervals are the family's, and ``adjust`` works on ``p_family`` over all rows.
        against : label, optional
            With ``pairwise``: a control level of ``by``; each other level is compared
            with it (default method "dunnett").
        {experiment_options}
        {relative}

        Returns
        -------
        BatchResult
            ``.to_frame()`` has one row per segment and metric (and pair, with
            ``pairwise``).

        Examples
        --------
        >>> import pandas as pd, tinfer
        >>> df = pd.DataFrame({"fill_g": [501, 503, 502, 498, 497, 499, 510, 512, 509,
        ...                               508, 507, 509],
        ...                    "line": ["new", "new", "new", "old", "old", "old"] * 2,
        ...                    "shift": ["day"] * 6 + ["night"] * 6})
        >>> m = df.tinfer.compare("fill_g", by="line", within="shift", adjust="benjamini-hochberg")
        >>> m.comparison, m.n_tests, m.estimate.round(2).tolist()
        ('new minus old', 2, [4.0, 2.33])
        """
        return compare_frame(
            self._obj, columns, by, within, groups=groups, paired=paired, null=null,
            adjust=adjust, rate=rate, level=level, side=side, pooled=pooled,
            pairwise=pairwise, against=against, cluster=cluster, covariate=covariate,
            ratio=ratio, relative=relative,
        )  # fmt: skip

    @fill_params()
    def pairwise(
        self,
        column: Hashable,
        by: Hashable,
        *,
        against: Hashable | None = None,
        method: str | None = None,
        level: float = 0.95,
        side: str = "two-sided",
        units: str | None = None,
    ) -> PairwiseResult:
        """Compare the means of every level of ``by`` as one family of comparisons.

        Every pair of levels, or every level against the control ``against``, with
        intervals and p-values that hold for the whole family. Levels keep a categorical
        column's own order and are sorted otherwise; each pair estimates a later level
        minus an earlier one (a level minus the control with ``against``). Equivalence margins
        are not offered here: test a pair with ``two_sample(..., groups=(a, b), margin=m)``.

        Parameters
        ----------
        column : column label
            The measurements.
        by : column label
            The group column (two or more levels).
        {pairwise_options}
        {units}

        Returns
        -------
        PairwiseResult

        Examples
        --------
        >>> import pandas as pd, tinfer
        >>> df = pd.DataFrame({"crisp_s": [4.1, 3.8, 4.4, 4.0, 5.2, 5.6, 4.9, 5.4, 4.3, 4.7,
        ...                                4.5, 4.2],
        ...                    "oven": ["A"] * 4 + ["B"] * 4 + ["C"] * 4})
        >>> r = df.tinfer.pairwise("crisp_s", by="oven")
        >>> r.pair_labels(), r.n_differ
        (['B minus A', 'C minus A', 'C minus B'], 2)
        """
        return pairwise_frame(
            self._obj, column, by, against=against, method=method, level=level, side=side,
            units=units,
        )  # fmt: skip


__all__ = ["TinferFrameAccessor"]
