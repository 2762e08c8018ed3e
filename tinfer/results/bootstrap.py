"""The bootstrap-t cross-check of a t result (``result.bootstrap()``): :class:`BootstrapCheck`.

Numbers and words only; built by :mod:`tinfer.analyses.bootstrap`; the card and the t*
histogram are in :mod:`tinfer.display.bootstrap`.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

import numpy as np

from .card import Card
from .format import decimals_for, fmt_df, fmt_fixed, fmt_level, fmt_num


@dataclass(frozen=True, eq=False)
class BootstrapCheck(Card):
    """A bootstrap-t (percentile-t) interval set beside the t interval of a result.

    Attributes
    ----------
    estimate : float
        The (trimmed) mean or difference, as on the result.
    interval : tuple of float
        The bootstrap-t interval at ``level`` (one infinite limit for one-sided tests).
    t_interval : tuple of float
        The t-based interval of the result at the same level, for comparison.
    n_resamples : int
    seed : int
        Seed of the numpy Generator; the same seed gives the same interval.
    t_star_quantiles : tuple of float
        The quantiles of t* that set the interval limits.

    Examples
    --------
    >>> import pandas as pd, tinfer
    >>> df = pd.DataFrame({"min": [3.1, 2.4, 5.8, 3.3, 2.9, 4.4, 3.0, 7.9, 3.6, 2.2]})
    >>> b = df.tinfer.one_sample("min", null=3).bootstrap(n_resamples=999, seed=7)
    >>> b.n_resamples, b.seed, b.interval[0] < b.estimate < b.interval[1]
    (999, 7, True)
    """

    design: str
    comparison: str
    variable: str
    units: str | None
    method: str
    trim: float
    estimate: float
    se: float
    df: float
    level: float
    side: str
    interval: tuple[float, float]
    t_interval: tuple[float, float]
    t_star_quantiles: tuple[float, float]
    n_resamples: int
    seed: int
    n_degenerate: int
    hist_edges: np.ndarray = field(repr=False)
    hist_counts: np.ndarray = field(repr=False)
    n_outside: int = 0

    @property
    def decimals(self) -> int:
        """Decimals used to print the limits."""
        return decimals_for(self.se)

    @property
    def statistic(self) -> str:
        """What was resampled, in words."""
        loc = f"{self.trim * 100:g}% trimmed mean" if self.trim > 0 else "mean"
        return f"{loc} difference" if self.design == "two-sample" else loc

    @property
    def verdict(self) -> str:
        """Do the two intervals agree? Limits within 10% of the t interval's width count as
        agreeing (a rule of thumb, common practice, no source). A bootstrap limit that is
        infinite where the t limit is not means the resamples cannot check the t interval."""
        unbounded = [
            np.isfinite(t) and not np.isfinite(b)
            for b, t in zip(self.interval, self.t_interval, strict=True)
        ]
        if any(unbounded):
            return (
                f"The bootstrap-t interval is unbounded: {self.n_degenerate} of "
                f"{self.n_resamples} resamples had no spread, as happens with few or tied "
                "values, so the bootstrap cannot check the t interval for these data."
            )
        pairs = [
            (b, t)
            for b, t in zip(self.interval, self.t_interval, strict=True)
            if np.isfinite(b) and np.isfinite(t)
        ]
        lo, hi = self.t_interval
        width = (hi - lo) if np.isfinite(hi - lo) else 2 * abs(pairs[0][1] - self.estimate)
        gap = max(abs(b - t) for b, t in pairs)
        if gap <= 0.1 * width:
            return (
                "The bootstrap-t and t intervals agree: the t interval looks trustworthy "
                "for these data."
            )
        return (
            "The bootstrap-t and t intervals differ by more than a tenth of the interval's "
            "width: the t interval may be off for these data (skew or outliers); look at "
            "result.check() and consider reporting the bootstrap-t interval as well."
        )

    def to_dict(self) -> dict[str, Any]:
        """The numbers as a flat dict of Python scalars."""
        return {
            "estimate": self.estimate,
            "boot_low": self.interval[0],
            "boot_high": self.interval[1],
            "t_low": self.t_interval[0],
            "t_high": self.t_interval[1],
            "level": self.level,
            "side": self.side,
            "n_resamples": self.n_resamples,
            "seed": self.seed,
            "n_degenerate": self.n_degenerate,
        }

    def __str__(self) -> str:
        dec = self.decimals
        lv = fmt_level(self.level)
        bl, bh = (fmt_num(v, dec) for v in self.interval)
        tl, th = (fmt_num(v, dec) for v in self.t_interval)
        lines = [
            f"Bootstrap-t cross-check of the {self.statistic}: {self.comparison}",
            f"  estimate {fmt_num(self.estimate, dec)}" + (f" {self.units}" if self.units else ""),
            f"  {lv} bootstrap-t interval  [{bl}, {bh}]",
            f"  {lv} t interval            [{tl}, {th}]   (df = {fmt_df(self.df)})",
            f"  {self.n_resamples} resamples, seed {self.seed}; the t* quantiles "
            + " and ".join(fmt_fixed(q, 3) for q in self.t_star_quantiles)
            + " replace the t critical values.",
            f"  {self.verdict}",
        ]
        if self.n_degenerate:
            lines.append(
                f"  note: {self.n_degenerate} resample(s) had no spread (t* infinite or undefined)."
            )
        return "\n".join(lines)

    def __repr__(self) -> str:
        return f"<BootstrapCheck {self.design}>\n{self}"

    def plain_text(self) -> str:
        return repr(self)

    def chart(self):
        """Histogram of the bootstrap t* against the t density (an Altair chart)."""
        from ..display.bootstrap import bootstrap_chart

        return bootstrap_chart(self)
