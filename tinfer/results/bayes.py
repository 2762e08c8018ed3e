"""The default (JZS) Bayes factor of a t result (``result.bayes_factor()``): :class:`BayesFactor`.

Numbers and words only; computed by :mod:`tinfer.analyses.bayes` from :mod:`tinfer.core.bayes`;
the card and its two charts are in :mod:`tinfer.display.bayes`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from .card import Card
from .format import fmt_bf, fmt_df, fmt_level, fmt_sig

#: Jeffreys (1961, Theory of Probability, 3rd ed., Appendix B; grades from memory): the
#: lower edge of each grade on the Bayes factor, and his words for it.
JEFFREYS_GRADES = (
    (1.0, "not worth more than a bare mention"),
    (10**0.5, "substantial"),
    (10.0, "strong"),
    (10**1.5, "very strong"),
    (100.0, "decisive"),
)

SIDE_WORDS = {
    "two-sided": "a difference (either direction)",
    "upper": "an effect above 0",
    "lower": "an effect below 0",
}


def jeffreys_grade(log_bf: float) -> str:
    """Jeffreys' words for a Bayes factor of at least 1 (given as its natural log).

    >>> jeffreys_grade(math.log(5.0)), jeffreys_grade(math.log(250.0))
    ('substantial', 'decisive')
    """
    words = JEFFREYS_GRADES[0][1]
    for edge, grade in JEFFREYS_GRADES:
        if log_bf >= math.log(edge):
            words = grade
    return words


@dataclass(frozen=True, eq=False)
class BayesFactor(Card):
    """The default Bayes factor of a t test, with the posterior of the standardised effect.

    Attributes
    ----------
    log_bf : float
        Natural log of the Bayes factor for an effect (on ``side``) over no effect; exact
        even where the factor itself overflows a float.
    log_bf10, log_bf_upper, log_bf_lower : float
        The two-sided factor and the one-sided ones (prior truncated to delta > 0, < 0).
    scale : float
        Scale r of the Cauchy prior on the standardised effect delta.
    side : str
        "two-sided", "upper" or "lower": which prior the factor ``log_bf`` uses.
    t, df, n_eff : float
        The t statistic used (pooled for two samples), its df, and the effective sample size.
    median, interval : float, tuple of float
        Posterior median of delta and the equal-tailed credible interval at ``level``.

    Examples
    --------
    >>> import tinfer
    >>> r = tinfer.from_summary(n=24, mean=0.41, sd=1.0)
    >>> b = r.bayes_factor()
    >>> round(b.bf, 3), b.grade
    (1.182, 'not worth more than a bare mention')
    """

    design: str
    comparison: str
    variable: str
    t: float
    df: float
    n_eff: float
    scale: float
    side: str
    level: float
    log_bf: float
    log_bf10: float
    log_bf_upper: float
    log_bf_lower: float
    median: float
    interval: tuple[float, float]
    pooled_from_welch: bool = False
    created: str = ""

    @property
    def bf(self) -> float:
        """The Bayes factor for an effect over no effect (``inf`` past 1.8e308)."""
        return math.exp(self.log_bf) if self.log_bf < 709.0 else math.inf

    @property
    def bf01(self) -> float:
        """The reverse: for no effect over an effect (``1 / bf``)."""
        return math.exp(-self.log_bf) if -self.log_bf < 709.0 else math.inf

    @property
    def favours(self) -> str:
        """Which model the data favour: "effect", "no effect" or "neither" (BF exactly 1)."""
        if self.log_bf > 0:
            return "effect"
        return "no effect" if self.log_bf < 0 else "neither"

    @property
    def grade(self) -> str:
        """Jeffreys' words for the strength of the evidence, in the favoured direction."""
        return jeffreys_grade(abs(self.log_bf))

    @property
    def prior_words(self) -> str:
        """The prior, as it must be reported beside the factor."""
        half = {"upper": ", truncated to delta > 0", "lower": ", truncated to delta < 0"}
        return f"Cauchy prior on delta, scale r = {fmt_sig(self.scale, 3)}" + half.get(
            self.side, ""
        )

    @property
    def headline(self) -> str:
        """One sentence: how many times more probable, for what, and Jeffreys' grade."""
        effect = SIDE_WORDS[self.side]
        if self.favours == "neither":
            return "The data are equally probable with and without an effect (Bayes factor 1)."
        if self.favours == "effect":
            times, first, second = fmt_bf(self.log_bf), effect, "no effect"
        else:
            times, first, second = fmt_bf(-self.log_bf), "no effect", effect
        return (
            f"The data are {times} times as probable under {first} as under {second}; "
            f"on Jeffreys' scale, evidence for {first} that is {self.grade}."
        )

    def to_dict(self) -> dict[str, Any]:
        """The numbers as a flat dict of Python scalars."""
        return {
            "bf": self.bf,
            "bf01": self.bf01,
            "log_bf": self.log_bf,
            "log_bf10": self.log_bf10,
            "log_bf_upper": self.log_bf_upper,
            "log_bf_lower": self.log_bf_lower,
            "side": self.side,
            "scale": self.scale,
            "grade": self.grade,
            "favours": self.favours,
            "t": self.t,
            "df": self.df,
            "n_eff": self.n_eff,
            "median": self.median,
            "low": self.interval[0],
            "high": self.interval[1],
            "level": self.level,
        }

    def to_frame(self):
        """One row, the columns of :meth:`to_dict` (a pandas DataFrame)."""
        import pandas as pd

        return pd.DataFrame([self.to_dict()])

    def __str__(self) -> str:
        lv = fmt_level(self.level)
        lo, hi = (fmt_sig(v, 3) for v in self.interval)
        t_kind = "pooled t" if self.pooled_from_welch else "t"
        lines = [
            f"Default Bayes factor (JZS) for {self.comparison}",
            f"  {self.headline}",
            f"  BF for an effect over none {fmt_bf(self.log_bf)}; the reverse "
            f"{fmt_bf(-self.log_bf)}; log BF {self.log_bf:.4g}",
            f"  prior: {self.prior_words}",
            f"  posterior of delta: median {fmt_sig(self.median, 3)}, {lv} credible interval "
            f"{lo} to {hi}",
            f"  from {t_kind} = {self.t:.4g} on {fmt_df(self.df)} df, effective n "
            f"{fmt_sig(self.n_eff, 4)}",
        ]
        if self.pooled_from_welch:
            lines.append(
                "  note: the default Bayes factor assumes equal variances, so it uses the "
                "pooled t, not the Welch t of the test."
            )
        return "\n".join(lines)

    def sentence(self, style: str = "plain") -> str:
        """The factor in one sentence with its prior ("plain" or "compact")."""
        from . import report

        return report.bayes_sentence(self, report.check_style(style))

    def __repr__(self) -> str:
        return f"<BayesFactor {self.design}>\n{self}"

    def plain_text(self) -> str:
        return repr(self)

    def chart(self):
        """Prior and posterior densities of delta beside the factor across prior scales."""
        from ..display.bayes import bayes_chart

        return bayes_chart(self)
