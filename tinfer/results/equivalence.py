"""Equivalence, non-inferiority and superiority claims: the result types and all their words.

The numbers come from :mod:`tinfer.analyses.equivalence` (two one-sided tests); the card
section and chart from :mod:`tinfer.display.equivalence`. Every sentence about a margin
claim (the claim, the conclusion, each one-sided null hypothesis, the band, the interval
that matches the decision) is built here.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

from .format import fmt_df, fmt_fixed, fmt_level, fmt_num, p_equals
from .words import Fmt, interval_words, signed

KIND_TITLES = {
    "equivalence": "Equivalence by two one-sided tests",
    "non-inferiority": "Non-inferiority by a one-sided test",
    "superiority": "Superiority by a margin, one-sided test",
}


@dataclass(frozen=True)
class OneSidedTest:
    """One of the one-sided t tests behind an equivalence or non-inferiority claim.

    ``bound`` is the band limit tested (raw units); ``null_hypothesis`` says in words
    what the test rejects when ``p`` is small.
    """

    bound: float
    null_hypothesis: str
    t: float
    df: float
    p: float
    log_p: float


@dataclass(frozen=True)
class Equivalence:
    """An equivalence, non-inferiority or superiority-by-margin claim, tested by TOST.

    Attributes
    ----------
    kind : str
        "equivalence" (a band on both sides), "non-inferiority" or "superiority" (one side).
    low, high : float
        The band in raw units (absolute limits); one is infinite for a one-sided claim.
    lower, upper : OneSidedTest or None
        The test against ``low`` (null: true value at or below it) and against ``high``
        (null: at or above it); ``None`` where that limit is infinite.
    p, log_p : float
        Overall p-value: the larger one-sided p-value.
    ci, ci_level : tuple of float, float
        The two-sided interval at ``1 - 2 alpha`` whose inclusion in the band is the
        decision (for one-sided claims its finite limit is the one-sided ``1 - alpha`` bound).
    alpha : float
        Significance of each one-sided test, ``1 - level``.
    decision : bool
        True when the claim is shown at ``alpha``.
    conclusion : str
        The decision in words.
    margin, margin_units, worse, superior
        The margin keywords as given (offsets relative to ``null``), kept for recompute.
    sd : float or None
        The observed SD used to convert a standardised margin to raw units.
    note : str
        Words on the conversion of a standardised margin ("" for raw margins).
    """

    kind: str
    low: float
    high: float
    lower: OneSidedTest | None
    upper: OneSidedTest | None
    p: float
    log_p: float
    ci: tuple[float, float]
    ci_level: float
    alpha: float
    decision: bool
    conclusion: str
    margin: float | tuple[float, float]
    margin_units: str = "raw"
    worse: str | None = None
    superior: bool = False
    sd: float | None = None
    note: str = ""

    @property
    def tests(self) -> list[tuple[str, OneSidedTest]]:
        """The one-sided tests that were run, as ("lower" or "upper", test) pairs."""
        return [(name, t) for name, t in (("lower", self.lower), ("upper", self.upper)) if t]

    @property
    def title(self) -> str:
        """What kind of claim, in words: "Equivalence by two one-sided tests", ..."""
        return KIND_TITLES[self.kind]

    def band_words(self, fmt: Fmt) -> str:
        """The band, e.g. "-0.80 kg to 0.80 kg" (an open side shown as ∞)."""
        return interval_words(self.low, self.high, fmt, open_ends=True)

    def interval_words(self, fmt: Fmt) -> str:
        """The interval that matches the decision: the ``1 - 2 alpha`` CI, or for a one-sided
        claim the one-sided ``1 - alpha`` bound."""
        lo, hi = self.ci
        if self.lower is not None and self.upper is not None:
            return interval_words(lo, hi, fmt, self.ci_level)
        lo, hi = (lo, math.inf) if self.lower is not None else (-math.inf, hi)
        return interval_words(lo, hi, fmt, 1.0 - self.alpha, one_sided="one-sided ")

    def text_lines(self, fmt: Fmt) -> list[str]:
        """Plain-text lines: the claim's p and interval, each one-sided test, the band."""
        verdict = "shown" if self.decision else "not shown"
        lines = [
            f"{self.title}, {verdict}: {p_equals(self.p, self.log_p)}, "
            f"{self.interval_words(fmt)}; band {self.band_words(fmt)}"
        ]
        for name, test in self.tests:
            lines.append(
                f"  against the {name} limit {fmt(test.bound)}: t {fmt_fixed(test.t, 3)} on "
                f"{fmt_df(test.df)} df, {p_equals(test.p, test.log_p)}"
            )
        if self.note:
            lines.append(f"  {self.note}")
        return lines

    def to_dict(self) -> dict[str, Any]:
        """The numbers as a flat dict, keys prefixed ``margin_``/``tost_``."""
        nan = float("nan")
        return {
            "tost_kind": self.kind,
            "margin_low": self.low,
            "margin_high": self.high,
            "tost_t_lower": self.lower.t if self.lower else nan,
            "tost_p_lower": self.lower.p if self.lower else nan,
            "tost_t_upper": self.upper.t if self.upper else nan,
            "tost_p_upper": self.upper.p if self.upper else nan,
            "tost_p": self.p,
            "tost_ci_low": self.ci[0],
            "tost_ci_high": self.ci[1],
            "tost_ci_level": self.ci_level,
            "tost_decision": self.decision,
            "tost_conclusion": self.conclusion,
        }


@dataclass(frozen=True)
class ClaimWords:
    """The sentences of one margin claim, built by :func:`claim_words`."""

    kind: str
    conclusion: str
    note: str
    lower_null: str
    upper_null: str


@dataclass(frozen=True)
class Claim:
    """A margin claim as the user stated it, with what the words need to know of the test."""

    margin: float | tuple[float, float]
    units_kind: str  # "raw" or "standardised"
    worse: str | None
    superior: bool
    design: str
    null: float
    labels: Sequence[str]
    comparison: str
    units: str | None
    decimals: int
    sd: float | None


def claim_words(c: Claim, low: float, high: float, decision: bool) -> ClaimWords:
    """The kind of claim, its conclusion, the conversion note and the one-sided nulls."""

    def unit(text: str) -> str:
        return f"{text} {c.units}" if c.units else text

    def val(x: float) -> str:
        return unit(fmt_num(x, c.decimals))

    std = c.units_kind == "standardised"

    def band_text(m) -> str:
        if isinstance(m, tuple):
            lo, hi = m
            if std:
                return f"{signed(lo)} to {signed(hi)} SD ({val(lo * c.sd)} to {val(hi * c.sd)})"
            return f"{unit(signed(lo))} to {unit(signed(hi))}"
        if std:
            return f"{fmt_num(m)} SD ({val(m * c.sd)})"
        return unit(fmt_num(m))

    note = _conversion_note(c, val) if std else ""
    if c.design == "one-sample":
        reference = unit(fmt_num(c.null))
        subject = "the mean"
    else:
        second = c.labels[1]
        reference = second if c.null == 0 else f"{second} {signed(c.null)} {c.units or ''}".rstrip()
        subject = c.labels[0]
    # one sample: "mean" or, with trim, "20% trimmed mean" (comparison is "<that> of <variable>")
    what = c.comparison.split(" of ")[0] if c.design == "one-sample" else c.comparison
    if c.worse is None:
        kind = "equivalence"
        asym = isinstance(c.margin, tuple)
        within = f"within {'' if asym else '±'}{band_text(c.margin)}"
        if c.design == "one-sample":
            who, claim = "", f"equivalent to {reference} {within}"
        else:
            who = f"{c.labels[0]} and {c.labels[1]} "
            target = "" if c.null == 0 else f" around a difference of {unit(fmt_num(c.null))}"
            where = f" ({c.comparison})" if asym or target else ""
            claim = f"equivalent {within}{target}{where}"
        conclusion = f"{who}{claim}" if decision else f"{who}not shown {claim}"
    else:
        better = "higher" if c.worse == "lower" else "lower"
        by = band_text(c.margin)
        who = "" if c.design == "one-sample" else f"{subject} "
        if c.superior:
            kind = "superiority"
            claim = f"better than {reference} by more than {by}, counting {better} as better"
            conclusion = f"{who}{claim}" if decision else f"{who}not shown {claim}"
        else:
            kind = "non-inferiority"
            tail = f"by more than {by}, counting {c.worse} as worse"
            if decision:
                conclusion = f"{who}not worse than {reference} {tail}"
            else:
                conclusion = (
                    f"not shown non-inferior: {who or f'the {what} '}could be worse than "
                    f"{reference} {tail}"
                )
    return ClaimWords(
        kind=kind,
        conclusion=conclusion,
        note=note,
        lower_null=f"{what} at or below {val(low)}",
        upper_null=f"{what} at or above {val(high)}",
    )


def _conversion_note(c: Claim, val) -> str:
    which = {"two-sample": "pooled SD", "paired": "SD of the differences", "one-sample": "SD"}
    if isinstance(c.margin, tuple):
        given = f"{signed(c.margin[0])} to {signed(c.margin[1])} SD"
        shown = f"{val(c.margin[0] * c.sd)} to {val(c.margin[1] * c.sd)}"
    else:
        given = f"{fmt_num(c.margin)} SD"
        shown = val(c.margin * c.sd)
    return (
        f"The margin of {given} was converted with the observed {which[c.design]} "
        f"({val(c.sd)}) to {shown}; the raw margin depends on the observed SD."
    )


def level_words(eq: Equivalence) -> str:
    """The level of the interval drawn against the band, e.g. "90% CI" or a one-sided bound."""
    if eq.lower is None or eq.upper is None:
        which = "lower" if eq.upper is None else "upper"
        return f"one-sided {fmt_level(1.0 - eq.alpha)} {which} bound"
    return f"{fmt_level(eq.ci_level)} CI"
