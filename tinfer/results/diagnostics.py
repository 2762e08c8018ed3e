"""Assumption checks of a t result (``result.check()``): the :class:`Diagnostics` type.

Numbers and words only; built by :mod:`tinfer.analyses.diagnostics` from the values kept on
the result; the card and charts are in :mod:`tinfer.display.diagnostics`.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..core import diagnostics as diag
from .card import Card
from .format import decimals_for, fmt_num

#: Points per sample kept for Q-Q and strip charts; above this the charts thin out.
MAX_POINTS = 250


@dataclass(frozen=True, eq=False)
class Diagnostics(Card):
    """Checks of the assumptions behind a t result, with advice in plain words.

    Attributes
    ----------
    method, comparison, variable : str
        Copied from the result that was checked.
    shapes : tuple of Shape
        Per group (or for the paired differences): n, skewness G1 and excess kurtosis G2
        (bias-corrected), a normality test, values flagged by the Hampel identifier.
    variance_ratio : float
        Larger over smaller sample variance (two samples; ``nan`` otherwise).
    advice : str
        Which procedure fits. It never changes the test that was run.
    basis : tuple of str
        The findings the advice rests on.
    outlier_rule : str
        The rule that flags outliers, in words.

    Examples
    --------
    >>> import pandas as pd, tinfer
    >>> df = pd.DataFrame({"ml": [250.3, 249.8, 250.1, 250.6, 249.9, 250.2, 250.0, 255.9]})
    >>> d = df.tinfer.one_sample("ml", null=250).check()
    >>> d.shapes[0].n_outliers, d.shapes[0].outliers
    (1, (255.9,))
    """

    design: str
    method: str
    comparison: str
    variable: str
    units: str | None
    trim: float
    shapes: tuple[diag.Shape, ...]
    variance_ratio: float
    advice: str
    basis: tuple[str, ...]
    outlier_rule: str = diag.OUTLIER_RULE
    qq: tuple[tuple[np.ndarray, np.ndarray], ...] = field(default=(), repr=False)
    qq_lines: tuple[tuple[float, float], ...] = field(default=(), repr=False)
    strip: tuple[np.ndarray, ...] = field(default=(), repr=False)
    strip_flags: tuple[np.ndarray, ...] = field(default=(), repr=False)
    thinned: tuple[bool, ...] = field(default=(), repr=False)

    @property
    def decimals(self) -> int:
        """Decimals for printed values: from the smallest standard error among the samples."""
        se = min(s.sd / np.sqrt(s.n) for s in self.shapes)
        return decimals_for(float(se))

    def to_frame(self):
        """One row per sample with every check (a pandas DataFrame)."""
        import pandas as pd

        rows = []
        for s in self.shapes:
            rows.append(
                {
                    "sample": s.label,
                    "n": s.n,
                    "skewness_G1": s.skewness,
                    "excess_kurtosis_G2": s.excess_kurtosis,
                    "normality_test": s.test_name,
                    "normality_statistic": s.test_statistic,
                    "normality_p": s.test_p,
                    "n_outliers": s.n_outliers,
                    "median": s.median,
                    "mad_sd": s.mad_sd,
                }
            )
        return pd.DataFrame(rows).set_index("sample")

    def __str__(self) -> str:
        dec = self.decimals
        lines = [f"Assumption checks for {self.method}: {self.comparison}"]
        for s in self.shapes:
            lines.append(f"  {s.label}: n = {s.n}")
            lines.append(
                f"    skewness G1 {fmt_num(s.skewness, 2)}, excess kurtosis G2 "
                f"{fmt_num(s.excess_kurtosis, 2)} (bias-corrected sample versions)"
            )
            if s.test_name:
                lines.append(
                    f"    {s.test_name} = {s.test_statistic:.4f}, p = {s.test_p:.3g} "
                    "(normality test)"
                )
            else:
                lines.append("    normality test: too few distinct values")
            shown = ", ".join(fmt_num(v, dec) for v in s.outliers)
            more = " ..." if s.n_outliers > len(s.outliers) else ""
            lines.append(
                f"    outliers: {s.n_outliers}" + (f" ({shown}{more})" if s.n_outliers else "")
            )
        if np.isfinite(self.variance_ratio):
            lines.append(f"  variance ratio (larger over smaller): {self.variance_ratio:.2f}")
        lines.append(f"  outlier rule: {self.outlier_rule}")
        lines.append(f"Advice: {self.advice}")
        lines.append("It rests on:")
        lines.extend(f"  - {b}" for b in self.basis)
        return "\n".join(lines)

    def __repr__(self) -> str:
        return f"<Diagnostics {self.design}>\n{self}"

    def plain_text(self) -> str:
        return repr(self)

    def qq_chart(self):
        """Normal Q-Q plot per sample (an Altair chart, not displayed)."""
        from ..display.diagnostics import qq_chart

        return qq_chart(self)

    def box_chart(self):
        """Box plot per sample with the points, or only the flagged ones for large n."""
        from ..display.diagnostics import box_chart

        return box_chart(self)

    def chart(self):
        """Q-Q plot and box plot side by side (an Altair chart, not displayed)."""
        from ..display.diagnostics import diagnostics_chart

        return diagnostics_chart(self)
