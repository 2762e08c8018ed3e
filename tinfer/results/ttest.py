"""The result of one t procedure (:class:`TResult`) and its words.

A frozen value object holding numbers and words, and copies of the values it was computed
from (read-only), never the caller's data. Built by :mod:`tinfer.analyses.ttest`; cards,
charts and sliders come from :mod:`tinfer.display` on demand, inside the convenience methods.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from ..core.summary import Summary
from . import provenance, sentences
from .card import Card, Reported
from .equivalence import Equivalence
from .format import decimals_for, fmt_num
from .lift import RelativeLift
from .parts import Effect, GroupStats
from .words import interval_words

DESIGNS = ("one-sample", "paired", "two-sample")


@dataclass(frozen=True, eq=False)
class TResult(Reported, Card):
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
    equivalence : Equivalence or None
        The two one-sided tests of a margin claim, when ``margin=`` was given.
    trim : float
        Proportion trimmed from each tail (Yuen's trimmed-mean t); 0 for the ordinary t,
        whose estimate is a mean rather than a trimmed mean.
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
    equivalence: Equivalence | None = None
    trim: float = 0.0
    lift: RelativeLift | None = None
    estimand: str = "mean"

    # ------------------------------------------------------------------ words
    @property
    def null_hypothesis(self) -> str:
        """The null hypothesis in words (one-sided tests: the complement of the alternative)."""
        verb = {"two-sided": "equals", "upper": "is at most", "lower": "is at least"}
        return f"the {self._subject()} {verb[self.side]} {self.fmt(self.null)}"

    @property
    def alternative(self) -> str:
        """The alternative hypothesis in words."""
        verb = {"two-sided": "differs from", "upper": "is greater than", "lower": "is less than"}
        return f"the {self._subject()} {verb[self.side]} {self.fmt(self.null)}"

    @property
    def location(self) -> str:
        """What is estimated: "mean", "ratio" (a ratio metric's ratio of sums) or, for Yuen's
        test, e.g. "20% trimmed mean"."""
        return f"{self.trim * 100:g}% trimmed mean" if self.trim else self.estimand

    def _subject(self) -> str:
        if self.design == "one-sample":
            return f"{self.location} of {self.variable}"
        if self.design == "paired":
            return f"{self.location} paired difference ({self.comparison}) in {self.variable}"
        return f"difference in {self.location} {self.variable} ({self.comparison})"

    @property
    def decimals(self) -> int:
        """Decimals used to print estimates: enough to show the SE to two digits."""
        return decimals_for(self.se)

    def fmt(self, x: float) -> str:
        """A number of this result in its decimals, with the units when finite."""
        text = fmt_num(x, self.decimals)
        return f"{text} {self.units}" if self.units and np.isfinite(x) else text

    @property
    def significant(self) -> bool:
        """True when p < 1 - level, which is exactly when the interval excludes ``null``."""
        return bool(self.p < 1.0 - self.level)

    def headline(self) -> str:
        """One sentence: the estimate with its interval, and the verdict with its p-value."""
        return sentences.headline(self)

    def question(self) -> str:
        """The question the test answers, as the test was run (side, margin, trimming)."""
        return sentences.question(self)

    def interval_words(self, level: float | None = None) -> str:
        """The confidence interval in words, "95% CI 1.2 to 3.4" (without ``level``: "1.2 to
        3.4"; a one-sided bound reads "95% lower bound 1.2" or "1.2 or more (one-sided)")."""
        return interval_words(*self.ci, self.fmt, level)

    # ------------------------------------------------------------------ tables
    def to_dict(self) -> dict[str, Any]:
        """The numbers and words as a flat dict of Python scalars."""
        return (
            {
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
                "trim": self.trim,
            }
            | self._group_columns()
            | (self.equivalence.to_dict() if self.equivalence is not None else {})
            | (self.lift.columns() if self.lift is not None else {})
        )

    def _group_columns(self) -> dict[str, Any]:
        """n, mean and SD per group, named as batch tables name them: ``n_a, mean_a, sd_a,
        n_b, ...`` for two samples, ``n, mean, sd`` otherwise (of the differences, paired)."""
        if self.design == "two-sample":
            named = zip(("_a", "_b"), self.groups, strict=True)
        else:
            named = [("", self.groups[-1])]
        out: dict[str, Any] = {}
        for suffix, g in named:
            out |= {f"n{suffix}": g.n, f"mean{suffix}": g.mean, f"sd{suffix}": g.sd}
        return out

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
        return provenance.fingerprint(self.design, self.samples, self.summaries)

    # ------------------------------------------------------------------ recompute
    def recompute(self, **changes: Any) -> TResult:
        """The same data tested with other ``level``, ``side`` or ``null``.

        Works from the stored summaries; the DataFrame is not read again.
        """
        from ..analyses.ttest import rebuild

        return rebuild(self, **changes)

    # ------------------------------------------------------------------ assumptions
    def check(self):
        """Check the assumptions behind this result; advice in plain words.

        Per group (or for the paired differences): skewness and excess kurtosis, a
        normality test, outliers by the Hampel identifier, the variance ratio, Q-Q and
        box plots (``.chart()``). Reads the values kept on the result; the advice never
        changes the test that was run. Returns a :class:`~tinfer.Diagnostics`.

        Examples
        --------
        >>> import pandas as pd, tinfer
        >>> df = pd.DataFrame({"ms": [212, 198, 205, 220, 201, 209, 214, 640.0]})
        >>> d = df.tinfer.one_sample("ms", null=200).check()
        >>> d.shapes[0].n_outliers, "trim=0.2" in d.advice
        (1, True)
        """
        from ..analyses.diagnostics import diagnose

        return diagnose(self)

    def bootstrap(
        self, n_resamples: int = 9999, seed: int | None = None, level: float | None = None
    ):
        """Bootstrap-t (percentile-t) interval as a cross-check of the t interval.

        Resamples the stored values (each group on its own) ``n_resamples`` times,
        studentises each resampled mean, trimmed mean or difference with its own standard
        error, and reads the interval from the quantiles of t*. Reproducible with ``seed``
        (a numpy Generator); with ``seed=None`` a seed is drawn and reported. ``level``
        defaults to this result's. Returns a :class:`~tinfer.BootstrapCheck`.

        Examples
        --------
        >>> import pandas as pd, tinfer
        >>> df = pd.DataFrame({"h": [3.1, 2.4, 5.8, 3.3, 2.9, 4.4, 3.0, 7.9, 3.6, 2.2]})
        >>> b = df.tinfer.one_sample("h").bootstrap(n_resamples=1999, seed=11)
        >>> b.seed, b.interval[0] < 3.86 < b.interval[1]
        (11, True)
        """
        from ..analyses.bootstrap import bootstrap
        from ..display.progress import progress_bar

        return bootstrap(
            self, n_resamples=n_resamples, seed=seed, level=level, progress=progress_bar
        )

    def explore(self):
        """Sliders for level, side and null (margin, trim where they apply), redrawn live.

        Returns an ipywidgets VBox; every change recomputes from the stored summaries and
        the result shown is kept in its ``result`` attribute. Needs ipywidgets.

        Examples
        --------
        >>> import tinfer
        >>> ex = tinfer.from_summary(n=20, mean=10.4, sd=1.5, null=10).explore()
        >>> ex.side.value = "upper"
        >>> ex.result.side, ex.result.ci[1]
        ('upper', inf)
        """
        from ..display.widgets import explore_result

        return explore_result(self)

    # ------------------------------------------------------------------ evidence
    def bayes_factor(self, scale: float = 0.7071067811865476, side=None, level=None):
        """The default (JZS) Bayes factor for an effect over no effect, both ways.

        The Cauchy prior of scale ``scale`` (r, default sqrt(2)/2) on the standardised
        effect of Rouder et al. (2009); ``side`` "upper" or "lower" truncates it to one side
        (Morey and Wagenmakers 2014) and defaults to this result's side. Two samples use the
        pooled t (the default Bayes factor assumes equal variances). Returns a
        :class:`~tinfer.BayesFactor` with the factor, Jeffreys' words for it, and the
        posterior median and credible interval (at ``level``, default this result's) of the
        standardised effect. Needs only t and the sample sizes, so results from
        :func:`tinfer.from_summary` have it too.

        Examples
        --------
        >>> import tinfer
        >>> r = tinfer.from_summary(n=(30, 30), mean=(10.0, 10.02), sd=(1.0, 1.0), pooled=True)
        >>> b = r.bayes_factor()
        >>> b.favours, round(b.bf01, 2)
        ('no effect', 3.8)
        """
        from ..analyses.bayes import bayes_factor_of

        return bayes_factor_of(self, scale=scale, side=side, level=level)

    def relative_lift(self, method: str = "fieller", level=None):
        """The first mean relative to the second (or the mean relative to ``null``), in percent.

        Fieller's interval ("unbounded" when the second mean is not clearly away from zero) or
        ``method="log"`` (delta method on the log ratio); see :class:`~tinfer.RelativeLift`.

        >>> import tinfer
        >>> r = tinfer.from_summary(n=(400, 400), mean=(10.4, 10.0), sd=(2.0, 2.0))
        >>> print(r.relative_lift().headline)
        The mean value of first relative to second: +4.0% (95% CI +1.2% to +6.9%).
        """
        from ..analyses.lift import relative_lift_of

        return relative_lift_of(self, method=method, level=level)

    # ------------------------------------------------------------------ planning
    def detectable_effect(self, power: float = 0.8):
        """Smallest standardised effect this design (its n, level and side) detects with ``power``.

        Returns a :class:`~tinfer.PlanResult` solved for ``effect`` (exact noncentral t;
        pooled-variance t for two samples). This replaces "observed power", which only
        restates the p-value.

        Examples
        --------
        >>> import tinfer
        >>> r = tinfer.from_summary(n=(12, 15), mean=(5.1, 4.3), sd=(1.2, 1.5))
        >>> round(r.detectable_effect(0.8).effect, 3)
        1.129
        """
        from ..analyses.plan import detectable_effect_of

        return detectable_effect_of(self, power=power)

    def plan(
        self,
        power: float = 0.8,
        effect: float | None = None,
        *,
        diff: float | None = None,
        level: float | None = None,
        side: str | None = None,
        ratio: float | None = None,
    ):
        """Size a follow-up study with the SD observed here (a :class:`~tinfer.PlanResult`).

        ``effect`` defaults to the observed standardised effect; ``diff`` gives a raw
        difference instead. ``level``, ``side`` and the allocation ``ratio`` default to
        this result's.

        Examples
        --------
        >>> import tinfer
        >>> r = tinfer.from_summary(n=(12, 15), mean=(5.1, 4.3), sd=(1.2, 1.5))
        >>> r.plan(power=0.8, diff=1.0).n
        28
        """
        from ..analyses.plan import follow_up

        return follow_up(self, power, effect, diff=diff, level=level, side=side, ratio=ratio)

    # ------------------------------------------------------------------ text
    def __str__(self) -> str:
        return "\n".join(sentences.text_lines(self))

    def __repr__(self) -> str:
        return f"<TResult {self.design}>\n{self}"

    # ------------------------------------------------------------------ display
    def chart(self, normal: bool = True):
        """Altair chart: the t density with the p-value shaded, and the estimate's interval.

        The upper panel marks the observed t and the critical value(s) at ``level``;
        ``normal`` adds the standard normal density (dashed). The lower panel shows the
        estimate with its interval against ``null`` on the data's scale. Returned, not shown.

        Examples
        --------
        >>> import tinfer
        >>> r = tinfer.from_summary(n=12, mean=5.4, sd=1.1, null=5.0)
        >>> type(r.chart()).__name__
        'VConcatChart'
        """
        from ..display.ttest import result_chart

        return result_chart(self, normal)
