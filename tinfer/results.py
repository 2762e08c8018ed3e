"""Result objects: frozen value objects holding numbers and words, never the caller's data.

Display (HTML cards, charts, widgets) is added by :mod:`tinfer.display` on demand.
"""

from __future__ import annotations

import dataclasses
import datetime as _dt
import hashlib
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from ._format import decimals_for, fmt_df, fmt_level, fmt_num, fmt_p
from .core.summary import Summary

DESIGNS = ("one-sample", "paired", "two-sample")


@dataclass(frozen=True)
class GroupStats:
    """Descriptive statistics of one group (or of the paired differences)."""

    label: str
    n: int
    n_missing: int
    mean: float
    sd: float
    se: float


@dataclass(frozen=True)
class Effect:
    """A standardised effect size with its confidence interval.

    ``name`` is one of "Cohen's d" (one sample), "d_z" (paired differences) or
    "Hedges' g" (two independent samples).
    """

    name: str
    value: float
    ci: tuple[float, float]
    level: float

    def __str__(self) -> str:
        lo, hi = (fmt_num(round(v, 3), 3) if np.isfinite(v) else fmt_num(v) for v in self.ci)
        return f"{self.name} = {self.value:.3f} ({fmt_level(self.level)} CI {lo} to {hi})"


@dataclass(frozen=True, eq=False)
class TResult:
    """The full answer of one t procedure.

    Attributes
    ----------
    design : str
        "one-sample", "paired" or "two-sample".
    variable : str
        What was measured (the value column's name).
    comparison : str
        The estimate in words: "mean of fill_g", "drip minus furrow", "before minus after".
    estimate, se, t, df, p : float
        Mean or mean difference, its standard error, the t statistic, degrees of freedom
        (non-integer for Welch) and the p-value.
    log_p : float
        Natural log of the p-value, exact even where ``p`` underflows.
    ci : tuple of float
        Confidence interval at ``level``; one-sided tests give one infinite limit.
    effect : Effect
        Standardised effect size with its noncentral-t interval.
    groups : tuple of GroupStats
        Descriptives per group, or of the differences for paired data.
    """

    design: str
    variable: str
    comparison: str
    estimate: float
    se: float
    t: float
    df: float
    p: float
    log_p: float
    ci: tuple[float, float]
    level: float
    side: str
    null: float
    effect: Effect
    groups: tuple[GroupStats, ...]
    method: str
    pooled: bool = False
    units: str | None = None
    warnings: tuple[str, ...] = ()
    labels: tuple[str, ...] = ()
    summaries: tuple[Summary, ...] = field(default=(), repr=False)
    samples: tuple[np.ndarray, ...] | None = field(default=None, repr=False)
    created: str = field(default="", repr=False)

    # ------------------------------------------------------------------ words
    @property
    def null_hypothesis(self) -> str:
        """The null hypothesis in words."""
        return f"the {self._subject()} equals {self._fmt(self.null)}"

    @property
    def alternative(self) -> str:
        """The alternative hypothesis in words."""
        verb = {"two-sided": "differs from", "upper": "is greater than", "lower": "is less than"}
        return f"the {self._subject()} {verb[self.side]} {self._fmt(self.null)}"

    def _subject(self) -> str:
        if self.design == "one-sample":
            return f"mean of {self.variable}"
        if self.design == "paired":
            return f"mean paired difference ({self.comparison}) in {self.variable}"
        return f"difference in mean {self.variable} ({self.comparison})"

    @property
    def decimals(self) -> int:
        """Decimals used to print estimates: enough to show the SE to two digits."""
        return decimals_for(self.se)

    def _fmt(self, x: float) -> str:
        text = fmt_num(x, self.decimals)
        return f"{text} {self.units}" if self.units and np.isfinite(x) else text

    @property
    def significant(self) -> bool:
        """True when p < 1 - level, which is exactly when the interval excludes ``null``."""
        return bool(self.p < 1.0 - self.level)

    def headline(self) -> str:
        """One sentence: direction, estimate with its interval, and the verdict on ``null``."""
        lo, hi = self.ci
        if self.side == "two-sided":
            ci = f"{fmt_level(self.level)} CI {self._fmt(lo)} to {self._fmt(hi)}"
        elif self.side == "upper":
            ci = f"{fmt_level(self.level)} lower bound {self._fmt(lo)}"
        else:
            ci = f"{fmt_level(self.level)} upper bound {self._fmt(hi)}"
        if self.design == "one-sample":
            lead = f"The mean of {self.variable} is {self._fmt(self.estimate)}"
        elif self.design == "paired":
            lead = (
                f"Paired differences in {self.variable} ({self.comparison}) average "
                f"{self._fmt(self.estimate)}"
            )
        else:
            lead = (
                f"The mean {self.variable} of {self.labels[0]} minus {self.labels[1]} is "
                f"{self._fmt(self.estimate)}"
            )
        verdict = (
            f"the data are not consistent with {self._fmt(self.null)}"
            if self.significant
            else f"the data are consistent with {self._fmt(self.null)}"
        )
        return f"{lead} ({ci}); {verdict} (p = {fmt_p(self.p, self.log_p)})."

    # ------------------------------------------------------------------ tables
    def to_dict(self) -> dict[str, Any]:
        """The numbers and words as a flat dict of Python scalars."""
        return {
            "design": self.design,
            "variable": self.variable,
            "comparison": self.comparison,
            "estimate": self.estimate,
            "se": self.se,
            "ci_low": self.ci[0],
            "ci_high": self.ci[1],
            "level": self.level,
            "side": self.side,
            "null": self.null,
            "t": self.t,
            "df": self.df,
            "p": self.p,
            "log_p": self.log_p,
            "effect_name": self.effect.name,
            "effect": self.effect.value,
            "effect_ci_low": self.effect.ci[0],
            "effect_ci_high": self.effect.ci[1],
            "method": self.method,
        }

    def to_frame(self):
        """One tidy row with every number of the test (a pandas DataFrame)."""
        import pandas as pd

        return pd.DataFrame([self.to_dict()])

    def describe(self):
        """Per-group descriptives (a pandas DataFrame, one row per group)."""
        import pandas as pd

        return pd.DataFrame([dataclasses.asdict(g) for g in self.groups]).set_index("label")

    # ------------------------------------------------------------------ provenance
    @property
    def fingerprint(self) -> str:
        """A short hash of the exact values used (or the summaries, for published numbers)."""
        h = hashlib.blake2b(digest_size=8)
        h.update(self.design.encode())
        if self.samples is not None:
            for arr in self.samples:
                h.update(np.ascontiguousarray(arr, dtype=np.float64).tobytes())
                h.update(b"|")
        else:
            for s in self.summaries:
                for v in (s.n, s.mean, s.ssd):
                    h.update(np.ascontiguousarray(v, dtype=np.float64).tobytes())
        return h.hexdigest()

    # ------------------------------------------------------------------ recompute
    def recompute(self, **changes: Any) -> TResult:
        """The same data tested with other ``level``, ``side`` or ``null``.

        Works from the stored summaries; the DataFrame is not read again.
        """
        from ._build import rebuild

        return rebuild(self, **changes)

    # ------------------------------------------------------------------ text
    def __str__(self) -> str:
        lines = [f"{self.method}: {self.comparison}", self.headline()]
        lo, hi = self.ci
        lines.append(
            f"  estimate {self._fmt(self.estimate)}   se {fmt_num(self.se, self.decimals + 1)}"
            f"   {fmt_level(self.level)} CI [{fmt_num(lo, self.decimals)}, "
            f"{fmt_num(hi, self.decimals)}]"
        )
        lines.append(
            f"  t = {self.t:.3f}   df = {fmt_df(self.df)}   p = {fmt_p(self.p, self.log_p)}"
            f" ({self.side})"
        )
        lines.append(f"  {self.effect}")
        for g in self.groups:
            miss = f", {g.n_missing} missing dropped" if g.n_missing else ""
            lines.append(
                f"  {g.label}: n = {g.n}{miss}, mean {fmt_num(g.mean, self.decimals)}, "
                f"sd {fmt_num(g.sd, self.decimals)}"
            )
        lines.append(f"  H0: {self.null_hypothesis}.  H1: {self.alternative}.")
        lines.extend(f"  note: {w}" for w in self.warnings)
        return "\n".join(lines)

    def __repr__(self) -> str:
        return f"<TResult {self.design}>\n{self}"

    def _repr_mimebundle_(self, include=None, exclude=None):
        from .display.render import mimebundle

        return mimebundle(self)


def now_iso() -> str:
    return _dt.datetime.now(_dt.UTC).isoformat(timespec="seconds")
