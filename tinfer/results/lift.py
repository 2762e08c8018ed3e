"""Relative lift (``result.relative_lift()``): the ratio of means minus one, in percent.

Numbers and words only; computed by :mod:`tinfer.analyses.lift` from :mod:`tinfer.core.ratio`;
the card is in :mod:`tinfer.display.lift`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from .card import Card
from .format import fmt_df, fmt_level, pct, pct_decimals

METHOD_NAMES = {
    "fieller": "Fieller's interval for a ratio of means",
    "log": "delta method on the log of the ratio",
    "null": "the mean's interval divided by the reference value",
}

#: How the interval was found, in a one-line mention.
SHORT_NAMES = {
    "fieller": "by Fieller's theorem",
    "log": "by the delta method on the log scale",
    "null": "the mean's interval over the reference",
}


def lift_cell(lift: float, low: float, high: float, bounded: bool, label: str = "") -> str:
    """A lift and its interval in percent: "+3.2% (+0.4% to +6.1%)"; decimals from the
    interval's width; ``label`` (such as "95% CI ") goes before the limits.

    >>> lift_cell(0.032, 0.004, 0.061, True), lift_cell(0.5, float("nan"), float("nan"), False)
    ('+3.2% (+0.4% to +6.1%)', '+50.0% (interval unbounded)')
    """
    if not bounded or math.isnan(lift):
        return f"{pct(lift)} (interval unbounded)" if not math.isnan(lift) else "–"
    d = lift_decimals(lift, low, high)
    if math.isinf(high):
        inside = f"{label}{pct(low, d)} or more"
    elif math.isinf(low):
        inside = f"{label}{pct(high, d)} or less"
    else:
        inside = f"{label}{pct(low, d)} to {pct(high, d)}"
    return f"{pct(lift, d)} ({inside})"


def lift_decimals(lift: float, low: float, high: float) -> int:
    """Decimals of a lift's percentages: its interval's width (or, one-sided, the distance
    to the bound) to two significant digits."""
    finite = [v for v in (low, high) if math.isfinite(v)]
    if len(finite) == 2:
        return pct_decimals(*finite)
    return pct_decimals(0.0, abs(lift - finite[0]) if finite else 0.0)


@dataclass(frozen=True, eq=False)
class RelativeLift(Card):
    """The ratio of two means (or of a mean to its reference) minus one, with its interval.

    Attributes
    ----------
    lift : float
        ``ratio - 1``: +0.032 reads "3.2% higher than the reference".
    ci : tuple of float
        Interval for the lift at ``level``; both nan when ``bounded`` is False.
    bounded : bool
        False when the reference mean is not clearly away from zero (Fieller's set is then
        unbounded: no finite interval is honest).
    method : str
        "fieller", "log" or "null" (one sample against a reference value).

    Examples
    --------
    >>> import tinfer
    >>> r = tinfer.from_summary(n=(400, 400), mean=(10.4, 10.0), sd=(2.0, 2.0))
    >>> lift = r.relative_lift()
    >>> round(lift.lift, 4), lift.bounded
    (0.04, True)
    """

    design: str
    comparison: str
    variable: str
    reference: str
    ratio: float
    lift: float
    ci: tuple[float, float]
    bounded: bool
    method: str
    level: float
    side: str
    df: float

    @property
    def headline(self) -> str:
        """One sentence in percent, with the interval or the reason there is none."""
        lv = fmt_level(self.level)
        what = f"{self.comparison} relative to {self.reference}"
        if not self.bounded:
            return (
                f"The {what}: {pct(self.lift)}; the {lv} interval is unbounded, because the "
                "reference mean is not clearly different from zero (Fieller)."
            )
        d = self.decimals
        lo, hi = self.ci
        if math.isinf(hi):
            bound = f"{lv} lower bound {pct(lo, d)}"
        elif math.isinf(lo):
            bound = f"{lv} upper bound {pct(hi, d)}"
        else:
            bound = f"{lv} CI {pct(lo, d)} to {pct(hi, d)}"
        return f"The {what}: {pct(self.lift, d)} ({bound})."

    @property
    def decimals(self) -> int:
        """Decimals of the percentages: the interval's width to two significant digits."""
        return lift_decimals(self.lift, *self.ci)

    def to_dict(self) -> dict[str, Any]:
        return {
            "ratio": self.ratio,
            "lift": self.lift,
            "lift_low": self.ci[0],
            "lift_high": self.ci[1],
            "bounded": self.bounded,
            "method": self.method,
            "level": self.level,
            "side": self.side,
            "df": self.df,
        }

    def columns(self) -> dict[str, Any]:
        """The lift's columns in a result's table: ``lift``, ``lift_low``, ``lift_high``."""
        return {"lift": self.lift, "lift_low": self.ci[0], "lift_high": self.ci[1]}

    @property
    def short(self) -> str:
        """The lift and its interval in percent, as a card's row shows them."""
        return lift_cell(self.lift, *self.ci, self.bounded, f"{fmt_level(self.level)} CI ")

    def to_frame(self):
        import pandas as pd

        return pd.DataFrame([self.to_dict()])

    def __str__(self) -> str:
        return "\n".join(
            [
                f"Relative lift of {self.variable}: {self.comparison} relative to {self.reference}",
                f"  {self.headline}",
                f"  ratio {self.ratio:.4g}; {METHOD_NAMES[self.method]}; df {fmt_df(self.df)}",
            ]
        )

    def __repr__(self) -> str:
        return f"<RelativeLift {self.design}>\n{self}"

    def plain_text(self) -> str:
        return repr(self)
