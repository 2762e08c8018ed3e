"""Assumption checks and the bootstrap cross-check of a TResult: ``r.check()``, ``r.bootstrap()``.

Both work from the arrays kept on the result (``result.samples``); the caller's DataFrame
is never read again. Results hold numbers and words; cards and charts are built on demand
by :mod:`tinfer.display.diagnostics`.
"""

from __future__ import annotations

import sys
from collections.abc import Callable
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

import numpy as np

from ._errors import DataError, ParameterError
from ._format import decimals_for, fmt_level, fmt_num
from ._validation import check_level
from .core import diagnostics as diag
from .core import distribution as dist
from .core.procedures import t_interval
from .core.robust import bootstrap_t, order_quantile

if TYPE_CHECKING:
    from .results import TResult

MAX_POINTS = 250  # points per group in Q-Q and strip charts; above this the charts thin out
PROGRESS_WORK = 20_000_000  # resampled values above which a notebook progress bar is shown
HIST_BINS = 50


def _samples(result: TResult, func: str) -> tuple[tuple[str, np.ndarray], ...]:
    if result.samples is None:
        raise DataError(
            f"{func}() needs the data values, but this result was built from summary "
            "statistics (n, mean, sd) only. Run the test on a DataFrame to use it."
        )
    if result.design == "paired":
        return ((f"{result.comparison} (differences)", np.asarray(result.samples[0], float)),)
    labels = result.labels or (result.variable,)
    return tuple(
        (str(lab), np.asarray(x, float)) for lab, x in zip(labels, result.samples, strict=False)
    )


def _trim_of(result: TResult) -> float:
    return float(getattr(result, "trim", 0.0) or 0.0)


# ---------------------------------------------------------------------- diagnostics


@dataclass(frozen=True, eq=False)
class Diagnostics:
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

    def _repr_mimebundle_(self, include=None, exclude=None) -> dict[str, str]:
        from .display.diagnostics import diagnostics_card

        return {"text/plain": repr(self), "text/html": diagnostics_card(self)}

    def qq_chart(self):
        """Normal Q-Q plot per sample (an Altair chart, not displayed)."""
        from .display.diagnostics import qq_chart

        return qq_chart(self)

    def box_chart(self):
        """Box plot per sample with the points, or only the flagged ones for large n."""
        from .display.diagnostics import box_chart

        return box_chart(self)

    def chart(self):
        """Q-Q plot and box plot side by side (an Altair chart, not displayed)."""
        from .display.diagnostics import diagnostics_chart

        return diagnostics_chart(self)


def diagnose(result: TResult) -> Diagnostics:
    """Build the :class:`Diagnostics` of ``result`` from its stored arrays."""
    named = _samples(result, "check")
    for label, x in named:
        if x.size < 2:
            raise DataError(f"{label} has {x.size} value(s); checks need at least 2.")
    shapes = tuple(diag.shape(label, x) for label, x in named)
    trim = _trim_of(result)
    advice, basis = diag.advise(shapes, design=result.design, trim=trim, pooled=result.pooled)
    qq, lines, strip, flags, thinned = [], [], [], [], []
    for (_, x), s in zip(named, shapes, strict=True):
        xs = np.sort(x)
        ranks = diag.thin_ranks(xs.size, MAX_POINTS)
        z = diag.blom_quantiles(xs.size)
        qq.append((z[ranks], xs[ranks]))
        z1, z3 = -0.6744897501960817, 0.6744897501960817  # Phi^-1(1/4), Phi^-1(3/4)
        q1, _, q3 = s.quartiles
        slope = (q3 - q1) / (z3 - z1)
        lines.append((float(slope), float(q1 - slope * z1)))
        big = xs.size > MAX_POINTS
        thinned.append(big)
        strip.append(np.asarray(s.outliers) if big else xs)
        flags.append(np.ones(len(s.outliers), bool) if big else diag.hampel(xs)[0])
    ratio = diag.variance_ratio(*shapes) if len(shapes) == 2 else float("nan")
    return Diagnostics(
        design=result.design,
        method=result.method,
        comparison=result.comparison,
        variable=result.variable,
        units=result.units,
        trim=trim,
        shapes=shapes,
        variance_ratio=ratio,
        advice=advice,
        basis=basis,
        qq=tuple(qq),
        qq_lines=tuple(lines),
        strip=tuple(strip),
        strip_flags=tuple(flags),
        thinned=tuple(thinned),
    )


# ---------------------------------------------------------------------- bootstrap


@dataclass(frozen=True, eq=False)
class BootstrapCheck:
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
        agreeing (a rule of thumb, common practice, no source)."""
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
            f"  {lv} t interval            [{tl}, {th}]   (df = {self.df:.4g})",
            f"  {self.n_resamples} resamples, seed {self.seed}; the t* quantiles "
            f"{self.t_star_quantiles[0]:.3f} and {self.t_star_quantiles[1]:.3f} replace the "
            "t critical values.",
            f"  {self.verdict}",
        ]
        if self.n_degenerate:
            lines.append(
                f"  note: {self.n_degenerate} resample(s) had no spread (t* infinite or undefined)."
            )
        return "\n".join(lines)

    def __repr__(self) -> str:
        return f"<BootstrapCheck {self.design}>\n{self}"

    def _repr_mimebundle_(self, include=None, exclude=None) -> dict[str, str]:
        from .display.diagnostics import bootstrap_card

        return {"text/plain": repr(self), "text/html": bootstrap_card(self)}

    def chart(self):
        """Histogram of the bootstrap t* against the t density (an Altair chart)."""
        from .display.diagnostics import bootstrap_chart

        return bootstrap_chart(self)


def _check_resamples(n_resamples: Any) -> int:
    if (
        isinstance(n_resamples, bool)
        or not isinstance(n_resamples, int | np.integer)
        or n_resamples < 99
    ):
        raise ParameterError(
            "The 'n_resamples' parameter of bootstrap must be an int of at least 99. "
            f"Got {n_resamples!r} instead."
        )
    return int(n_resamples)


def _check_seed(seed: Any) -> int:
    if seed is None:
        return int(np.random.SeedSequence().generate_state(1, np.uint32)[0])
    if isinstance(seed, bool) or not isinstance(seed, int | np.integer) or seed < 0:
        raise ParameterError(
            "The 'seed' parameter of bootstrap must be a non-negative int or None. "
            f"Got {seed!r} instead."
        )
    return int(seed)


def _in_kernel() -> bool:
    if "IPython" not in sys.modules:
        return False
    try:
        from IPython import get_ipython
    except ImportError:  # pragma: no cover
        return False
    shell = get_ipython()
    return shell is not None and hasattr(shell, "kernel")


def _progress(total: int, work: int) -> tuple[Callable[[int], None] | None, Any]:
    """A per-chunk callback updating an ipywidgets bar, only for long runs inside a kernel."""
    if work < PROGRESS_WORK or not _in_kernel():
        return None, None
    try:
        import ipywidgets
        from IPython.display import display
    except ImportError:
        return None, None
    bar = ipywidgets.IntProgress(value=0, min=0, max=total, description="resampling")
    display(bar)

    def update(done: int) -> None:
        bar.value = done

    return update, bar


def bootstrap(
    result: TResult, n_resamples: int = 9999, seed: int | None = None, level: float | None = None
) -> BootstrapCheck:
    """Bootstrap-t interval for the statistic of ``result`` (see ``TResult.bootstrap``)."""
    n_resamples = _check_resamples(n_resamples)
    seed = _check_seed(seed)
    level = result.level if level is None else check_level(level, "bootstrap")
    named = _samples(result, "bootstrap")
    trim = _trim_of(result)
    xs = [x for _, x in named]
    for label, x in named:
        if x.size < 2:
            raise DataError(f"{label} has {x.size} value(s); the bootstrap needs at least 2.")
    callback, bar = _progress(n_resamples, n_resamples * sum(x.size for x in xs))
    try:
        boot = bootstrap_t(
            xs,
            trim=trim,
            level=level,
            side=result.side,
            n_resamples=n_resamples,
            rng=np.random.default_rng(seed),
            progress=callback,
        )
    finally:
        if bar is not None:
            bar.close()
    lo_t, hi_t = t_interval(result.estimate, result.se, result.df, level, result.side)
    alpha = 1.0 - level
    finite = boot.t_star[np.isfinite(boot.t_star)]
    ps = {"two-sided": (alpha / 2, 1 - alpha / 2), "upper": (alpha, 1 - alpha)}
    p_lo, p_hi = ps.get(result.side, (alpha, 1 - alpha))
    usable = np.sort(boot.t_star[~np.isnan(boot.t_star)])
    q_lo, q_hi = (order_quantile(usable, p) for p in (p_lo, p_hi))
    if finite.size:
        lo, hi = np.quantile(finite, [0.001, 0.999])
        crit = float(dist.critical(result.df, 0.999, "two-sided"))
        lo, hi = min(lo, -crit), max(hi, crit)
    else:
        lo, hi = -1.0, 1.0
    counts, edges = np.histogram(finite, bins=HIST_BINS, range=(lo, hi))
    return BootstrapCheck(
        design=result.design,
        comparison=result.comparison,
        variable=result.variable,
        units=result.units,
        method=result.method,
        trim=trim,
        estimate=boot.estimate,
        se=boot.se,
        df=result.df,
        level=level,
        side=result.side,
        interval=(boot.low, boot.high),
        t_interval=(float(lo_t), float(hi_t)),
        t_star_quantiles=(q_lo, q_hi),
        n_resamples=n_resamples,
        seed=seed,
        n_degenerate=boot.n_degenerate,
        hist_edges=edges,
        hist_counts=counts,
        n_outside=int(boot.t_star.size - counts.sum()),
    )
