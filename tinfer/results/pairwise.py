"""Comparisons of k groups as one family (``df.tinfer.pairwise``): the result and its words.

Built by :mod:`tinfer.analyses.pairwise`; the card and the chart of intervals are in
:mod:`tinfer.display.pairwise`.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np

from ..core.pairwise import SHORT
from .card import Card, Reported
from .format import column_decimals, fmt_df, fmt_fixed, fmt_level, fmt_num, fmt_p
from .parts import GroupStats

if TYPE_CHECKING:  # pragma: no cover
    import pandas as pd

#: The methods by their published names, in words.
METHOD_NAMES = {
    "games-howell": "Games-Howell (unequal variances, studentized range)",
    "tukey-kramer": "Tukey-Kramer (pooled variance, studentized range)",
    "dunnett": "Dunnett (pooled variance, each level against the control)",
    "holm": "separate Welch tests, Holm step-down",
    "hochberg": "separate Welch tests, Hochberg step-up",
    "benjamini-hochberg": "separate Welch tests, Benjamini-Hochberg",
    "benjamini-yekutieli": "separate Welch tests, Benjamini-Yekutieli",
    "none": "separate Welch tests, no adjustment",
}
#: Short names for headlines.
SHORT_NAMES = SHORT
#: Columns of the pairs table in the card and the text form: key and title.
PAIR_HEADERS = (
    ("pair", "pair"),
    ("estimate", "difference"),
    ("ci", "interval"),
    ("p_single", "p alone"),
    ("p_adjusted", "adjusted p"),
    ("effect", "Hedges' g"),
    ("verdict", "differs"),
)


def interval_text(low: float, high: float, decimals: int) -> str:
    """``"low to high"`` with one number of decimals for both ends."""
    return f"{fmt_num(float(low), decimals)} to {fmt_num(float(high), decimals)}"


@dataclass(frozen=True, eq=False)
class PairwiseResult(Reported, Card):
    """Every pair of levels (or every level against a control) compared as one family.

    Pair ``i`` estimates the mean of ``levels[first[i]]`` minus that of
    ``levels[second[i]]``. ``ci_low``/``ci_high`` hold the family's intervals (simultaneous
    for Games-Howell, Tukey-Kramer, Dunnett and the family-wise adjustments, see
    :attr:`interval_kind`), ``p_adjusted`` the family-adjusted p-values and ``p_single``
    the p-value of each pair on its own (same standard error and df). A pair differs when
    its adjusted p-value is at most ``1 - level``. The effect size is each pair's Hedges'
    g with its noncentral-t interval at ``level`` (for the pair alone, not the family).
    """

    method: str
    variable: str
    by: str
    units: str | None
    levels: tuple[str, ...]
    groups: tuple[GroupStats, ...]
    against: str | None
    first: np.ndarray
    second: np.ndarray
    estimate: np.ndarray
    se: np.ndarray
    t: np.ndarray
    df: np.ndarray
    p_single: np.ndarray
    p_adjusted: np.ndarray
    ci_low: np.ndarray
    ci_high: np.ndarray
    effect: np.ndarray
    effect_ci_low: np.ndarray
    effect_ci_high: np.ndarray
    level: float
    side: str
    warnings: tuple[str, ...] = ()
    created: str = ""
    fingerprint: str = ""

    # ------------------------------------------------------------------ numbers
    @property
    def alpha(self) -> float:
        return 1.0 - self.level

    @property
    def differs(self) -> np.ndarray:
        """Pairs whose adjusted p-value is at most ``1 - level`` (NaN gives False)."""
        with np.errstate(invalid="ignore"):
            return self.p_adjusted <= self.alpha

    @property
    def n_pairs(self) -> int:
        return int(self.estimate.size)

    @property
    def n_tested(self) -> int:
        return int(np.isfinite(self.p_adjusted).sum())

    @property
    def n_differ(self) -> int:
        return int(self.differs.sum())

    @property
    def method_name(self) -> str:
        return METHOD_NAMES[self.method]

    def pair_labels(self) -> list[str]:
        """Each pair in words, ``"first minus second"``."""
        return [
            f"{self.levels[a]} minus {self.levels[b]}"
            for a, b in zip(self.first, self.second, strict=True)
        ]

    @property
    def interval_kind(self) -> str:
        """What the intervals are, in words."""
        lev = fmt_level(self.level)
        if self.method in ("games-howell", "tukey-kramer", "dunnett"):
            return f"simultaneous {lev} intervals"
        if self.method in ("holm", "hochberg"):
            return f"simultaneous {lev} intervals by Bonferroni"
        if self.method == "none":
            return f"{lev} intervals, one pair at a time"
        return (
            f"false-coverage-rate intervals at {fmt_level(self.level)} (Benjamini-Yekutieli 2005)"
        )

    def order_by_estimate(self) -> np.ndarray:
        """Pair indices from the largest estimate to the smallest (untested pairs last)."""
        est = np.where(np.isfinite(self.estimate), self.estimate, -np.inf)
        return np.argsort(-est, kind="stable")

    # ------------------------------------------------------------------ tables
    def to_frame(self) -> pd.DataFrame:
        """One row per pair: the two levels, estimate, interval, t, df, p-values, verdict,
        effect size with its interval, and n, mean and SD of both levels."""
        import pandas as pd

        a, b = self.first, self.second
        n = np.array([g.n for g in self.groups])
        mean = np.array([g.mean for g in self.groups])
        sd = np.array([g.sd for g in self.groups])
        return pd.DataFrame(
            {
                "first": [self.levels[i] for i in a],
                "second": [self.levels[i] for i in b],
                "estimate": self.estimate,
                "se": self.se,
                "ci_low": self.ci_low,
                "ci_high": self.ci_high,
                "t": self.t,
                "df": self.df,
                "p_single": self.p_single,
                "p_adjusted": self.p_adjusted,
                "differs": self.differs,
                "effect": self.effect,
                "effect_ci_low": self.effect_ci_low,
                "effect_ci_high": self.effect_ci_high,
                "n_first": n[a],
                "n_second": n[b],
                "mean_first": mean[a],
                "mean_second": mean[b],
                "sd_first": sd[a],
                "sd_second": sd[b],
            }
        )

    def groups_frame(self) -> pd.DataFrame:
        """One row per level: n, missing values, mean, SD and standard error."""
        import pandas as pd

        return pd.DataFrame(
            {
                self.by: [g.label for g in self.groups],
                "n": [g.n for g in self.groups],
                "n_missing": [g.n_missing for g in self.groups],
                "mean": [g.mean for g in self.groups],
                "sd": [g.sd for g in self.groups],
                "se": [g.se for g in self.groups],
            }
        )

    # ------------------------------------------------------------------ words
    def _quantity(self) -> str:
        return f"mean {self.variable}"

    def question(self) -> str:
        """The question the family answers, in words."""
        k = len(self.levels)
        if self.against is not None:
            direction = {"two-sided": "differ from", "upper": "exceed", "lower": "fall below"}
            return (
                f"Which levels of {self.by} {direction[self.side]} {self.against} in "
                f"{self._quantity()}, with the error rate controlled over all "
                f"{self.n_pairs} comparisons?"
            )
        return (
            f"Which of the {k} levels of {self.by} differ in {self._quantity()}, with the "
            f"error rate controlled over all {self.n_pairs} pairs?"
        )

    def headline(self) -> str:
        """One sentence: how many pairs differ, at which level, by which method."""
        word = "comparison" if self.against is not None else "pair"
        total = self.n_tested
        noun = word if total == 1 else f"{word}s"
        verb = "differs" if self.n_differ == 1 else "differ"
        rate = "false-discovery rate" if self.method.startswith("benjamini") else "error rate"
        if self.method == "none":
            return (
                f"{self.n_differ} of {total} {noun} {verb} at {self.alpha:g}, each tested on "
                "its own (no adjustment for the family)."
            )
        return (
            f"{self.n_differ} of {total} {noun} {verb} at the family {rate} {self.alpha:g} "
            f"({SHORT_NAMES[self.method]})."
        )

    def pair_rows(self, order: np.ndarray | None = None) -> list[dict[str, str]]:
        """Formatted rows of the pairs table (largest estimate first), keyed as PAIR_HEADERS."""
        order = self.order_by_estimate() if order is None else order
        d = column_decimals(self.se[np.isfinite(self.se)])
        labels = self.pair_labels()
        rows = []
        for i in order:
            tested = bool(np.isfinite(self.p_adjusted[i]))
            rows.append(
                {
                    "pair": labels[i],
                    "estimate": fmt_num(float(self.estimate[i]), d),
                    "ci": interval_text(self.ci_low[i], self.ci_high[i], d),
                    "p_single": fmt_p(float(self.p_single[i])),
                    "p_adjusted": fmt_p(float(self.p_adjusted[i])),
                    "effect": fmt_num(float(self.effect[i]), 2),
                    "verdict": ("yes" if self.differs[i] else "no") if tested else "not tested",
                }
            )
        return rows

    def group_rows(self) -> list[list[str]]:
        """Formatted rows of the levels table: level, n, mean, SD."""
        d = column_decimals([g.se for g in self.groups if np.isfinite(g.se)])
        return [[g.label, f"{g.n:,}", fmt_num(g.mean, d), fmt_num(g.sd, d)] for g in self.groups]

    def __str__(self) -> str:
        lines = [f"Pairwise comparisons: {self.method_name}", self.question(), self.headline()]
        rows = self.pair_rows()
        if rows:
            lines.append(f"Pairs, largest difference first ({self.interval_kind}):")
            widths = {k: max(len(h), *(len(r[k]) for r in rows)) for k, h in PAIR_HEADERS}
            lines.append("  " + "  ".join(h.ljust(widths[k]) for k, h in PAIR_HEADERS))
            for r in rows:
                lines.append("  " + "  ".join(r[k].ljust(widths[k]) for k, _ in PAIR_HEADERS))
        lines.append(
            "Levels: "
            + "; ".join(
                f"{g.label} n={g.n:,} mean={fmt_num(g.mean)} sd={fmt_num(g.sd)}"
                for g in self.groups
            )
        )
        lines.extend(f"note: {w}" for w in self.warnings)
        return "\n".join(lines)

    def __repr__(self) -> str:
        return f"<PairwiseResult {self.method}, {self.n_pairs} pairs>\n{self}"

    def t_text(self, i: int) -> str:
        """``t(df) = value`` of pair ``i``."""
        return f"t({fmt_df(float(self.df[i]))}) = {fmt_fixed(float(self.t[i]), 2)}"

    # ------------------------------------------------------------------ display
    def chart(self):
        """Every pair's difference with its family interval, against zero (Altair)."""
        from ..display.pairwise import pairs_chart

        return pairs_chart(self)

    def to_dict(self) -> dict[str, Any]:
        """The numbers as plain Python values (lists for the per-pair arrays)."""
        out: dict[str, Any] = {
            "method": self.method,
            "variable": self.variable,
            "by": self.by,
            "levels": list(self.levels),
            "against": self.against,
            "level": self.level,
            "side": self.side,
        }
        for name in ("estimate", "se", "t", "df", "p_single", "p_adjusted", "ci_low", "ci_high"):
            out[name] = getattr(self, name).tolist()
        out["pairs"] = self.pair_labels()
        return out
