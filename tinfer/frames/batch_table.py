"""``tinfer.compare_summaries``: many t tests from a table of per-segment summaries.

Reads a summary table (as a SQL ``GROUP BY`` returns it, or ``BatchResult.to_frame()``)
into arrays shaped ``(metric, segment, arm)`` and hands them to
:func:`tinfer.analyses.from_cube`. The Dask accessor ends here too, with the summaries it
merged from its partitions.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Hashable, Sequence
from dataclasses import dataclass

import numpy as np
import pandas as pd

from ..analyses import check_options, check_relative, from_cube
from ..checks import shown, summary_problem
from ..docstrings import fill_params
from ..errors import DataError, ParameterError
from ..results.batch import RESULT_COLUMNS, BatchResult
from .batch import choose_arms
from .columns import column, to_float
from .levels import as_list, key_codes, label_pair, py_value

STAT_NAMES = ("n", "mean", "sd", "ssd", "mean_lo")
FUNC = "compare_summaries"


@fill_params(
    side="the true difference differs from, is greater than, or is less than ``null``.",
    relative_what="(arm a's mean over arm b's, in every row)",
)
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
    relative: bool | str = False,
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
    groups : (first, second), optional
        The two arm levels to compare, in order (long layout); default: the two levels
        sorted as text.
    metric : label, optional
        A column naming the compared quantity, when the table holds several; defaults
        to the column "metric" if there is one.
    paired : bool, default False
        One-sample layout only: the rows summarise within-unit differences.
    labels : (str, str), optional
        Names of the two arms (wide layout) or of the two paired conditions.
    null : float, default 0
        Hypothesised mean, difference or paired difference.
    {batch_options}
    {relative}

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
    options = check_options(
        FUNC, adjust=adjust, rate=rate, level=level, side=side, null=null, pooled=pooled
    )
    lift = check_relative(relative, FUNC)
    if not isinstance(frame, pd.DataFrame):
        raise ParameterError(
            f"The 'frame' parameter of {FUNC} must be a pandas DataFrame of summaries. "
            f"Got {type(frame).__name__} instead."
        )
    cols = list(frame.columns)
    if metric is None and "metric" in cols:
        metric = "metric"
    wide = "n_a" in cols and arm is None
    if wide:
        design = "two-sample"
    else:
        design = "two-sample" if arm is not None else ("paired" if paired else "one-sample")
    keys = _keys(frame, within, wide, arm, metric)
    if metric is not None:
        metric_text = column(frame, metric).astype(str)
    else:
        metric_text = pd.Series("value", index=frame.index)
    m_codes, m_levels = pd.factorize(metric_text, sort=False)
    by_index = not keys and within is None and arm is None
    if by_index and pd.Series(m_codes).duplicated().any():
        # no key columns at all: each row (or arm pair of rows) is named by the index
        keys = [frame.index.name if frame.index.name is not None else "row"]
        s_codes, segments = _segment_codes(pd.Index(frame.index))
    elif keys:
        s_codes, segments = _segment_codes(_key_index(frame, keys))
    else:
        s_codes, segments = np.zeros(len(frame), dtype=np.intp), [()]
    cube = _Cube(frame, m_codes, s_codes, len(m_levels), len(segments), design)
    if wide:
        labs = tuple(labels) if labels is not None else ("a", "b")
        cube.place(0, np.arange(len(frame)), "_a")
        cube.place(1, np.arange(len(frame)), "_b")
    elif arm is not None:
        labs = _place_arms(cube, arm, groups, labels)
    else:
        if paired:
            labs = tuple(labels) if labels is not None else ("first", "second")
        else:
            labs = ("mean", str(options["null"]))
        cube.place(0, np.arange(len(frame)), "")
    if len(labs) != 2:
        raise ParameterError(
            f"The 'labels' parameter of {FUNC} must be two names (first, second). "
            f"Got {labels!r} instead."
        )
    if lift is not None and design != "two-sample":
        raise ParameterError(f"relative= of {FUNC} needs two arms (arm=, or the wide layout).")
    result = from_cube(
        design, cube.n, cube.mean, cube.ssd, present=cube.present, segments=segments,
        keys=[str(k) for k in keys], metrics=[str(m) for m in m_levels], labels=labs,
        options=options, mean_lo=cube.lo,
    )  # fmt: skip
    return result if lift is None else dataclasses.replace(result, relative=lift)


def _place_arms(cube: _Cube, arm, groups, labels) -> tuple[str, ...]:
    """Long layout: put the rows of the two chosen arm levels in arms 0 and 1."""
    a_codes, a_levels, _ = key_codes(column(cube.frame, arm))
    a_present = np.bincount(a_codes[a_codes >= 0], minlength=len(a_levels)) > 0
    first, second = choose_arms(a_levels, a_present, arm, groups)
    cube.place(0, np.flatnonzero(a_codes == first), "")
    cube.place(1, np.flatnonzero(a_codes == second), "")
    if labels is not None:
        return tuple(labels)
    return label_pair(a_levels[first], a_levels[second])


def _keys(frame: pd.DataFrame, within, wide: bool, arm, metric) -> list:
    """The segment key columns: ``within``, or every column that is not a statistic."""
    cols = list(frame.columns)
    if wide:
        needed = ["n_a", "mean_a", "n_b", "mean_b"]
        stat_cols = [c for c in cols if str(c).rsplit("_", 1)[0] in STAT_NAMES and "_" in str(c)]
        stat_cols = [c for c in stat_cols if str(c).endswith(("_a", "_b"))]
    else:
        needed = ["n", "mean"]
        stat_cols = [c for c in cols if c in STAT_NAMES]
    for c in needed:
        column(frame, c)
    if within is None:
        skip = set(stat_cols) | {arm, metric} | set(RESULT_COLUMNS) | {"log_p", "comparison"}
        return [c for c in cols if c not in skip]
    keys = as_list(within)
    for k in keys:
        column(frame, k)
    return keys


def _key_index(frame: pd.DataFrame, keys: list) -> pd.Index:
    index = pd.MultiIndex.from_frame(frame[keys]) if len(keys) > 1 else pd.Index(frame[keys[0]])
    return index


def _segment_codes(index: pd.Index) -> tuple[np.ndarray, list[tuple]]:
    """Codes of the rows' segments (sorted) and each segment's key values."""
    codes, levels = index.factorize(sort=True)
    if (codes < 0).any():
        raise DataError(f"The segment columns {list(index.names)!r} hold missing values.")
    if isinstance(index, pd.MultiIndex):
        return codes, [tuple(py_value(v) for v in lev) for lev in levels]
    return codes, [(py_value(v),) for v in levels]


@dataclass
class _Cube:
    """Arrays (metric, segment, arm) filled from the rows of a summary table."""

    frame: pd.DataFrame
    m_codes: np.ndarray
    s_codes: np.ndarray
    n_m: int
    n_s: int
    design: str

    def __post_init__(self) -> None:
        shape = (self.n_m, self.n_s, 2 if self.design == "two-sample" else 1)
        self.n, self.mean, self.ssd = np.zeros(shape), np.full(shape, np.nan), np.zeros(shape)
        self.lo = np.zeros(shape)
        self.present = np.zeros((self.n_m, self.n_s), dtype=bool)

    def place(self, arm_index: int, rows, suffix: str) -> None:
        """Put the statistics of ``rows`` (columns ending in ``suffix``) in one arm."""
        n, mean, ssd, lo = _stats(self.frame, suffix, rows)
        mi, si = self.m_codes[rows], self.s_codes[rows]
        key = mi * self.n_s + si
        if np.unique(key).size != key.size:
            raise DataError(
                "The summary table has more than one row for the same segment (and arm and "
                "metric); aggregate it first."
            )
        self.n[mi, si, arm_index], self.mean[mi, si, arm_index] = n, mean
        self.ssd[mi, si, arm_index] = ssd
        self.lo[mi, si, arm_index] = lo
        self.present[mi, si] = True


def _stats(t: pd.DataFrame, suffix: str, rows) -> tuple[np.ndarray, ...]:
    """n, mean, ssd and mean_lo of ``rows`` (ssd from ``sd`` where no ``ssd`` column).

    The statistics pass the one validation of summaries (:func:`tinfer.checks.summary_problem`):
    an empty group may have no mean, a group of one no SD.
    """
    cols = set(t.columns)
    if f"sd{suffix}" in cols and f"ssd{suffix}" in cols:
        raise DataError(
            f"The summary table has both 'sd{suffix}' and 'ssd{suffix}' columns; give one "
            "(SD with the n - 1 denominator, or the sum of squared deviations), not both."
        )
    spread = f"ssd{suffix}" if f"ssd{suffix}" in cols else f"sd{suffix}"
    n, mean, sp = (_num(t, name)[rows] for name in (f"n{suffix}", f"mean{suffix}", spread))
    problem = summary_problem(n, mean, sp, spread_name=spread.removesuffix(suffix))
    if problem is not None:
        name, i, value, rule = problem
        row = t.index[np.atleast_1d(rows)[i]] if not isinstance(rows, slice) else t.index[i]
        raise DataError(
            f"Column {name + suffix!r} of the summary table must hold {rule}; row {shown(row)} "
            f"holds {shown(value)}. Fix or drop that row first."
        )
    ssd = sp if spread.startswith("ssd") else sp * sp * (n - 1.0)
    ssd = np.where(np.isnan(ssd) & (n < 2), 0.0, ssd)  # a group of one: kept, untestable
    lo = _num(t, f"mean_lo{suffix}")[rows] if f"mean_lo{suffix}" in cols else 0.0
    return n, mean, ssd, np.where(np.isfinite(lo), lo, 0.0)


def _num(t: pd.DataFrame, name: str) -> np.ndarray:
    """A numeric column of the summary table (missing values as NaN, checked by the caller)."""
    return to_float(column(t, name), f"Column {name!r}")
