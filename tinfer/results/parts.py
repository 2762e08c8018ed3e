"""Parts of a t result shared by every result type that reports groups or an effect size:
the descriptives of one group (:class:`GroupStats`) and a standardised effect with its
interval (:class:`Effect`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .format import fmt_level, fmt_num


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
