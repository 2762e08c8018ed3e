"""Many t tests at once (``df.tinfer.compare``): the :class:`BatchResult` type and its words.

Built by :mod:`tinfer.analyses.batch` from arrays of summaries; the card, forest plot and
p-value histogram are in :mod:`tinfer.display.batch`.
"""

from __future__ import annotations

import functools
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

import numpy as np

from ..core import multiplicity, procedures
from .card import Card
from .format import column_decimals, fmt_df, fmt_fixed, fmt_level, fmt_num, fmt_p
from .lift import lift_cell
from .provenance import frozen

if TYPE_CHECKING:  # pragma: no cover
    import pandas as pd

#: The rows a text or HTML card lists (the smallest p-values).
TOP_ROWS = 5
#: Keys of :meth:`BatchResult.top_rows` and their column titles.
HEADERS = (
    ("segment", "segment"),
    ("metric", "metric"),
    ("estimate", "estimate"),
    ("ci", "interval"),
    ("t", "t"),
    ("df", "df"),
    ("p", "p"),
    ("p_adj", "adjusted p"),
    ("hit", "discovery"),
)
#: Columns of ``to_frame()`` after the key columns, in order.
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


@dataclass(frozen=True, eq=False)
class BatchResult(Card):
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
    pairs, row_pair, p_family
        Pairwise batches (``compare(..., pairwise=...)``) only: the pairs of levels
        ``(first, second)``, each row's pair, and the p-value adjusted within its family
        (the pairs of one metric in one segment) by the pairwise method; ``p_adjusted`` then
        adjusts ``p_family`` over all rows by ``adjust``, and ``ci_low``/``ci_high`` are the
        family's intervals. ``p`` is each pair's own p-value.
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
    pairs: tuple[tuple[str, str], ...] = ()
    row_pair: np.ndarray | None = field(default=None, repr=False)
    p_family: np.ndarray | None = field(default=None, repr=False)
    relative: str | None = None

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
            low[ok], high[ok] = self._effect_limits(ok)
        return frozen(low), frozen(high)

    def _effect_limits(self, rows):
        """The effect-size limits of some rows (the deferred part of the table)."""
        b = None
        if self.design == "two-sample":
            b = (self.n_b[rows], self.mean_b[rows], self.mean_lo_b[rows], self.ssd_b[rows])
        a = (self.n_a[rows], self.mean_a[rows], self.mean_lo_a[rows], self.ssd_a[rows])
        return procedures.effect_interval_rows(self.design, a, b, self.null, self.level, self.side)

    def segment_labels(self) -> list[str]:
        """Each row's segment as text, ``key=value`` pairs joined by commas (and the pair,
        ``first minus second``, in a pairwise batch)."""
        texts = [
            ", ".join(f"{k}={v}" for k, v in zip(self.keys, seg, strict=True)) or "all rows"
            for seg in self.segments
        ]
        if self.row_pair is None:
            return [texts[i] for i in self.row_segment]
        pairs = [f"{a} minus {b}" for a, b in self.pairs]
        return [
            (f"{texts[s]} · " if self.keys else "") + pairs[p]
            for s, p in zip(self.row_segment, self.row_pair, strict=True)
        ]

    # ------------------------------------------------------------------ tables
    def to_frame(self) -> pd.DataFrame:
        """One row per segment and metric: keys, estimate, interval, t, df, p, adjusted p,
        discovery, effect size with its interval, and n, mean, sd per arm."""
        import pandas as pd

        data: dict[str, Any] = {}
        for j, k in enumerate(self.keys):
            data[k] = [self.segments[i][j] for i in self.row_segment]
        if self.row_pair is not None:
            data["first"] = [self.pairs[i][0] for i in self.row_pair]
            data["second"] = [self.pairs[i][1] for i in self.row_pair]
        data["metric"] = [self.metrics[i] for i in self.row_metric]
        for name in RESULT_COLUMNS[1:10]:
            data[name] = getattr(self, name)
            if name == "p" and self.p_family is not None:
                data["p_family"] = self.p_family
        data["effect"] = self.effect
        data["effect_ci_low"], data["effect_ci_high"] = self.effect_ci
        if self.relative is not None:
            data |= {k: v for k, v in self.lifts().items() if k != "lift_bounded"}
        two = self.design == "two-sample"
        for arm in ("a", "b") if two else ("a",):
            suffix = f"_{arm}" if two else ""
            n = getattr(self, f"n_{arm}")
            data[f"n{suffix}"] = n.astype(np.int64)
            data[f"mean{suffix}"] = np.where(n > 0, getattr(self, f"mean_{arm}"), np.nan)
            data[f"sd{suffix}"] = getattr(self, f"sd_{arm}")
        return pd.DataFrame(data)

    def bayes_factors(self, scale: float = 0.7071067811865476, side: str | None = None):
        """:meth:`to_frame` with the default (JZS) Bayes factor of every row, vectorised.

        Adds ``bf`` (for an effect over none), ``log_bf`` (its natural log, finite where
        ``bf`` overflows), ``bf_scale`` and ``bf_side``: the Cauchy prior of scale ``scale``
        on the standardised effect (Rouder et al. 2009), truncated to one side for
        ``side="upper"`` or ``"lower"`` (default: the batch's side). Two-sample rows use the
        pooled t, as the default Bayes factor assumes equal variances.

        Examples
        --------
        >>> import pandas as pd, tinfer
        >>> t = pd.DataFrame({"n_a": [12, 40], "mean_a": [5.1, 7.4], "sd_a": [1.2, 2.0],
        ...                   "n_b": [15, 40], "mean_b": [4.3, 7.4], "sd_b": [1.5, 1.9]})
        >>> f = tinfer.compare_summaries(t).bayes_factors()
        >>> [round(v, 3) for v in f["bf"]]
        [0.816, 0.232]
        """
        from ..analyses.bayes import batch_log_bf

        frame = self.to_frame()
        side = self.side if side is None else side
        frame["log_bf"] = batch_log_bf(self, scale, side)
        with np.errstate(over="ignore"):
            frame["bf"] = np.exp(frame["log_bf"].to_numpy())
        frame["bf_scale"] = float(scale)
        frame["bf_side"] = side
        return frame

    def relative_lift(self, method: str = "fieller") -> pd.DataFrame:
        """:meth:`to_frame` with the relative lift of every two-sample row, vectorised:
        ``lift`` (first mean over second, minus one), ``lift_low``, ``lift_high`` (Fieller's
        interval, or ``method="log"``) and ``lift_bounded`` (False where the second mean is
        not clearly away from zero: the limits are then NaN, not a number to trust)."""
        from ..analyses.lift import batch_lift

        frame = self.to_frame()
        for name, values in batch_lift(self, method).items():
            frame[name] = values
        return frame

    @functools.cached_property
    def _lifts(self) -> dict[str, np.ndarray]:
        from ..analyses.lift import batch_lift

        return batch_lift(self, self.relative or "fieller")

    def lifts(self) -> dict[str, np.ndarray]:
        """The relative change of every row (``relative=`` in compare), computed once:
        ``lift``, ``lift_low``, ``lift_high`` and ``lift_bounded``."""
        return self._lifts

    def top(self, k: int = 10) -> pd.DataFrame:
        """The ``k`` rows with the smallest p-values (testable rows only)."""
        frame = self.to_frame()
        order = self.order_by_p()[:k]
        return frame.iloc[order].reset_index(drop=True)

    def order_by_p(self) -> np.ndarray:
        """Row indices of testable rows sorted by p (then by the size of t, larger first)."""
        idx = np.flatnonzero(self.testable)
        key = np.lexsort((-np.abs(self.t[idx]), self.log_p[idx]))
        return idx[key]

    # ------------------------------------------------------------------ words
    def headline(self) -> str:
        """One sentence: how many comparisons, how many discoveries, at which rate and method.

        Examples
        --------
        >>> import pandas as pd, tinfer
        >>> t = pd.DataFrame({"n_a": [12, 20], "mean_a": [5.1, 7.4], "sd_a": [1.2, 2.0],
        ...                   "n_b": [15, 18], "mean_b": [4.3, 7.1], "sd_b": [1.5, 1.9]})
        >>> print(tinfer.compare_summaries(t).headline().replace("; ", ";\\n"))
        2 comparisons tested;
        0 discoveries at rate 0.05 (Holm step-down (family-wise error rate)).
        """
        tests, disc = self.n_tests, self.n_discoveries
        word = "comparison" if tests == 1 else "comparisons"
        dword = "discovery" if disc == 1 else "discoveries"
        return (
            f"{tests:,} {word} tested; {disc:,} {dword} at rate {self.rate:g} ({self.adjust_name})."
        )

    def subject(self) -> str:
        """What each row compares, in words."""
        if self.design == "two-sample":
            return f"{self.method}: {self.comparison}"
        if self.design == "paired":
            return f"{self.method}: paired differences"
        return f"{self.method}: mean against {fmt_num(self.null)}"

    def headers(self) -> tuple[tuple[str, str], ...]:
        """Keys and titles of the rows' table: :data:`HEADERS`, with the relative change."""
        if self.relative is None:
            return HEADERS
        return (*HEADERS[:4], ("lift", "relative change"), *HEADERS[4:])

    def top_rows(self, k: int = TOP_ROWS) -> list[dict[str, str]]:
        """The ``k`` smallest-p rows as formatted strings, keyed as :meth:`headers`."""
        seg = self.segment_labels()
        shown = self.order_by_p()[:k]
        d = column_decimals(self.se[shown])  # one rule for the whole column
        rows = []
        for i in shown:
            rows.append(
                {
                    "segment": seg[i],
                    "metric": self.metrics[self.row_metric[i]],
                    "estimate": fmt_num(float(self.estimate[i]), d),
                    "ci": f"{fmt_num(float(self.ci_low[i]), d)} to "
                    f"{fmt_num(float(self.ci_high[i]), d)}",
                    "t": fmt_fixed(float(self.t[i]), 2),
                    "df": fmt_df(float(self.df[i])),
                    "p": fmt_p(float(self.p[i])),
                    "p_adj": fmt_p(float(self.p_adjusted[i])),
                    "hit": "yes" if self.discovery[i] else "no",
                }
            )
        if self.relative is not None:
            for i, row in zip(shown, rows, strict=True):
                row["lift"] = lift_cell(*(float(v[i]) for v in self.lifts().values()))
        return rows

    def __str__(self) -> str:
        lines = [self.subject(), self.headline()]
        rows = self.top_rows()
        if rows:
            lines.append(f"Smallest p-values ({fmt_level(self.level)} intervals):")
            heads = self.headers()
            widths = {k: max(len(h), *(len(row[k]) for row in rows)) for k, h in heads}
            lines.append("  " + "  ".join(h.ljust(widths[k]) for k, h in heads))
            for row in rows:
                lines.append("  " + "  ".join(row[k].ljust(widths[k]) for k, _ in heads))
        lines.extend(f"note: {w}" for w in self.warnings)
        return "\n".join(lines)

    def report_table(self):
        """This result as rows of :func:`tinfer.table` (with its note line)."""
        from .table import table

        return table([self])

    def __repr__(self) -> str:
        return f"<BatchResult {self.design}, {self.n_rows} rows>\n{self}"

    # ------------------------------------------------------------------ display

    def chart(self, top: int = 30, page: int | None = None):
        """Forest plot of estimates with intervals, smallest p first, discoveries marked.

        Shows ``top`` rows (the smallest p-values) and a note counting the rest; with
        ``page=k`` (from 1) shows the k-th block of ``top`` rows in p order instead. The
        chart holds at most ``top`` rows whatever the number of segments.
        """
        from ..display.batch import forest_chart

        return forest_chart(self, top=top, page=page)

    def p_histogram(self, bins: int = 20):
        """Histogram of the raw p-values (counts binned in numpy; only counts in the chart)."""
        from ..display.batch import p_histogram

        return p_histogram(self, bins=bins)
