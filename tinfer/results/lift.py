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
        finite = [v for v in self.ci if math.isfinite(v)]
        if len(finite) == 2:
            return pct_decimals(*finite)
        half = abs(self.lift - finite[0]) if finite else 0.0
        return pct_decimals(0.0, half)

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
