"""Parts of a t result shared by every result type that reports groups or an effect size:
the descriptives of one group (:class:`GroupStats`) and a standardised effect with its
interval (:class:`Effect`).
"""

from __future__ import annotations

from dataclasses import dataclass

from .format import fmt_level, fmt_num


@dataclass(frozen=True)
class GroupStats:
    """Descriptive statistics of one group (or of the paired differences).

    For a trimmed-means result, ``trimmed_mean`` and ``winsorised_sd`` hold the group's
    trimmed mean and winsorised SD and ``trimmed_se`` Yuen's standard error of the trimmed
    mean; they are ``None`` otherwise.
    """

    label: str
    n: int
    n_missing: int
    mean: float
    sd: float
    se: float
    trimmed_mean: float | None = None
    winsorised_sd: float | None = None
    trimmed_se: float | None = None


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
        lo, hi = (fmt_num(v, 3) for v in self.ci)
        return f"{self.name} {fmt_num(self.value, 3)} ({fmt_level(self.level)} CI {lo} to {hi})"
