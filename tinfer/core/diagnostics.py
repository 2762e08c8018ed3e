"""Checks of the assumptions behind t procedures, as pure numpy/scipy functions.

Shape: skewness and excess kurtosis as the bias-corrected sample versions G1 and G2
(Joanes and Gill 1998, "The Statistician" 47, 183-189). Normality: Shapiro-Wilk for
3 <= n <= 5000, D'Agostino-Pearson K^2 above. Outliers: the Hampel identifier, values
farther than 3 scaled MADs from the median (Hampel 1974; Davies and Gather 1993).
The rules that turn these numbers into advice are rules of thumb, stated in the advice.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from scipy import special

HAMPEL_K = 3.0
MAD_TO_SD = 1.482602218505602  # 1 / Phi^-1(3/4): the MAD of a normal sample estimates 0.6745 sd
OUTLIER_RULE = "Hampel identifier: more than 3 scaled MADs (1.4826 x MAD) from the median"
SHAPE_LIMIT = 1.0  # |G1| or G2 beyond this counts as marked skew or heavy tails (rule of thumb)
ALPHA = 0.05  # normality tests at the 5% level
MAX_LISTED = 20  # outlying values kept for display


def skewness(x) -> float:
    """Bias-corrected sample skewness G1 = sqrt(n(n-1)) / (n-2) * m3 / m2^1.5 (n >= 3).

    Examples
    --------
    >>> round(skewness([1.0, 2.0, 3.0, 10.0]), 4)
    1.7636
    """
    x = np.asarray(x, dtype=np.float64)
    n = x.size
    if n < 3:
        return float("nan")
    dev = x - x.mean()
    m2, m3 = np.mean(dev**2), np.mean(dev**3)
    if m2 == 0:
        return float("nan")
    return float(np.sqrt(n * (n - 1.0)) / (n - 2.0) * m3 / m2**1.5)


def excess_kurtosis(x) -> float:
    """Bias-corrected excess kurtosis G2 = ((n+1) g2 + 6)(n-1) / ((n-2)(n-3)) (n >= 4).

    ``g2 = m4 / m2^2 - 3``; G2 is 0 on average for normal samples.

    Examples
    --------
    >>> round(excess_kurtosis([1.0, 2.0, 3.0, 10.0]), 4)
    3.228
    """
    x = np.asarray(x, dtype=np.float64)
    n = x.size
    if n < 4:
        return float("nan")
    dev = x - x.mean()
    m2, m4 = np.mean(dev**2), np.mean(dev**4)
    if m2 == 0:
        return float("nan")
    g2 = m4 / (m2 * m2) - 3.0
    return float(((n + 1.0) * g2 + 6.0) * (n - 1.0) / ((n - 2.0) * (n - 3.0)))


def normality_test(x) -> tuple[str, float, float] | None:
    """(name, statistic, p) of a normality test suited to n, or None when n < 3.

    Shapiro-Wilk W for 3 <= n <= 5000; D'Agostino-Pearson K^2 for larger n.
    """
    from scipy import stats

    x = np.asarray(x, dtype=np.float64)
    if x.size < 3 or np.ptp(x) == 0:
        return None
    if x.size <= 5000:
        res = stats.shapiro(x)
        return "Shapiro-Wilk W", float(res.statistic), float(res.pvalue)
    res = stats.normaltest(x)
    return "D'Agostino-Pearson K²", float(res.statistic), float(res.pvalue)


def hampel(x, k: float = HAMPEL_K) -> tuple[np.ndarray, float, float]:
    """Boolean mask of values beyond ``median -+ k * 1.4826 * MAD``, the median, the scale.

    When more than half the values are equal the MAD is 0 and nothing is flagged.

    Examples
    --------
    >>> mask, med, scale = hampel([9.8, 10.1, 10.0, 9.9, 10.2, 14.0])
    >>> mask.tolist(), med
    ([False, False, False, False, False, True], 10.05)
    """
    x = np.asarray(x, dtype=np.float64)
    med = float(np.median(x))
    scale = float(MAD_TO_SD * np.median(np.abs(x - med)))
    if scale == 0:
        return np.zeros(x.shape, dtype=bool), med, scale
    return np.abs(x - med) > k * scale, med, scale


def blom_quantiles(n: int) -> np.ndarray:
    """Normal quantiles at Blom's (1958) plotting positions (i - 3/8) / (n + 1/4)."""
    i = np.arange(1, n + 1, dtype=np.float64)
    return special.ndtri((i - 0.375) / (n + 0.25))


def thin_ranks(n: int, max_points: int) -> np.ndarray:
    """Evenly spaced ranks 0..n-1 (all of them when n <= max_points), ends included."""
    if n <= max_points:
        return np.arange(n)
    return np.unique(np.round(np.linspace(0, n - 1, max_points)).astype(np.int64))


@dataclass(frozen=True, eq=False)
class Shape:
    """Shape checks of one sample (a group, or the paired differences)."""

    label: str
    n: int
    mean: float
    sd: float
    skewness: float
    excess_kurtosis: float
    test_name: str | None
    test_statistic: float
    test_p: float
    median: float
    mad_sd: float
    n_outliers: int
    outliers: tuple[float, ...]
    quartiles: tuple[float, float, float]
    whiskers: tuple[float, float]
    n_outliers_high: int = 0  # flagged values above the median

    @property
    def departs(self) -> bool:
        """The normality test rejects at the 5% level."""
        return self.test_name is not None and self.test_p < ALPHA

    @property
    def heavy_tailed(self) -> bool:
        """Excess kurtosis above 1 and the normality test rejects."""
        return self.departs and self.excess_kurtosis > SHAPE_LIMIT

    @property
    def skewed(self) -> bool:
        """|skewness| above 1 and the normality test rejects."""
        return self.departs and abs(self.skewness) > SHAPE_LIMIT

    @property
    def long_tail(self) -> bool:
        """A skewed sample whose flagged values are its long tail, not stray values: at least
        five and at least 1% of the values flagged (the Hampel rule flags 0.27% of normal
        data), 90% or more of them on the side the skew points to. Rule of thumb, common
        practice, no source."""
        if not self.skewed or self.n_outliers < max(5, 0.01 * self.n):
            return False
        on_long_side = (
            self.n_outliers_high if self.skewness > 0 else (self.n_outliers - self.n_outliers_high)
        )
        return on_long_side >= 0.9 * self.n_outliers

    @property
    def contaminated(self) -> bool:
        """Outliers flagged and the shape departs from normal (skewed or heavy-tailed), the
        flags not being the long tail of a skewed sample."""
        return self.n_outliers > 0 and (self.heavy_tailed or self.skewed) and not self.long_tail

    @property
    def large_for_skew(self) -> bool:
        """n > 25 G1^2: large enough for the mean's sampling distribution to be close to
        normal despite the skew (Cochran's rule; Cochran 1977, Sampling Techniques, 3rd
        ed., section 2.15, from memory)."""
        return bool(np.isfinite(self.skewness) and self.n > 25 * self.skewness**2)


def shape(label: str, x) -> Shape:
    """All checks of one sample of finite values.

    Examples
    --------
    >>> s = shape("cups", [9.8, 10.1, 10.0, 9.9, 10.2, 14.0])
    >>> s.n, s.n_outliers, s.outliers, s.test_name
    (6, 1, (14.0,), 'Shapiro-Wilk W')
    """
    x = np.asarray(x, dtype=np.float64).ravel()
    test = normality_test(x)
    mask, med, scale = hampel(x)
    flagged = np.sort(x[mask])
    q1, q2, q3 = (float(v) for v in np.quantile(x, [0.25, 0.5, 0.75]))
    fence_lo, fence_hi = q1 - 1.5 * (q3 - q1), q3 + 1.5 * (q3 - q1)
    inside = x[(x >= fence_lo) & (x <= fence_hi)]
    whiskers = (float(inside.min()), float(inside.max())) if inside.size else (q1, q3)
    far = flagged[np.argsort(-np.abs(flagged - med), kind="stable")][:MAX_LISTED]
    return Shape(
        label=str(label),
        n=int(x.size),
        mean=float(x.mean()),
        sd=float(x.std(ddof=1)) if x.size > 1 else float("nan"),
        skewness=skewness(x),
        excess_kurtosis=excess_kurtosis(x),
        test_name=None if test is None else test[0],
        test_statistic=float("nan") if test is None else test[1],
        test_p=float("nan") if test is None else test[2],
        median=med,
        mad_sd=scale,
        n_outliers=int(mask.sum()),
        outliers=tuple(float(v) for v in np.sort(far)),
        quartiles=(q1, q2, q3),
        whiskers=whiskers,
        n_outliers_high=int((flagged > med).sum()),
    )


def variance_ratio(a: Shape, b: Shape) -> float:
    """Larger sample variance over the smaller one (>= 1)."""
    va, vb = a.sd**2, b.sd**2
    lo, hi = min(va, vb), max(va, vb)
    return float(hi / lo) if lo > 0 else float("inf")


def _names(shapes: Sequence[Shape]) -> str:
    return " and ".join(s.label for s in shapes)


def _basis(shapes: Sequence[Shape], ratio: float) -> list[str]:
    """The findings the advice rests on, one line per sample, then the rules used."""
    basis = []
    for s in shapes:
        parts = [f"{s.label}: n = {s.n}"]
        if np.isfinite(s.skewness):
            parts.append(f"skewness {s.skewness:.2f}".replace("-", "\u2212"))
        if np.isfinite(s.excess_kurtosis):
            parts.append(f"excess kurtosis {s.excess_kurtosis:.2f}".replace("-", "\u2212"))
        if s.test_name:
            parts.append(f"{s.test_name.rsplit(' ', 1)[0]} p = {s.test_p:.3g}")
        parts.append(f"{s.n_outliers} value(s) flagged by the Hampel rule")
        basis.append(", ".join(parts))
    if len(shapes) == 2:
        basis.append(f"variance ratio (larger over smaller) {ratio:.2f}")
    basis.append(
        "rules of thumb: skewed if |skewness| > 1, heavy-tailed if excess kurtosis > 1, "
        "each counted only when the normality test rejects at 5%"
    )
    return basis


def _skew_advice(skewed: Sequence[Shape]) -> str:
    """Advice for skewed samples: Cochran's rule says whether the t interval for the mean
    holds; a long tail is described as such, not as outliers."""
    worst = max(skewed, key=lambda s: abs(s.skewness))
    g1 = f"{worst.skewness:.1f}".replace("-", "\u2212")
    tails = [
        f"{s.n_outliers:,} values of {s.label} ({100 * s.n_outliers / s.n:.0f}%) lie beyond the "
        "Hampel rule on the long tail, as expected in data this skewed; they are part of the "
        "distribution, not errors to remove."
        for s in skewed
        if s.long_tail
    ]
    if all(s.large_for_skew for s in skewed):
        text = (
            f"Skewed values in {_names(skewed)} (skewness up to {g1}), in samples larger than "
            "25 times the squared skewness (Cochran's rule): the t procedure for the mean holds "
            "up; result.bootstrap() is an optional cross-check."
        )
    else:
        text = (
            f"Skewed values in {_names(skewed)} (skewness up to {g1}), in samples smaller than "
            "25 times the squared skewness (Cochran's rule): the t interval for the mean can "
            "be off. If the mean is the quantity you need (for example to scale up to totals), "
            "keep it and check its interval with result.bootstrap() (bootstrap-t). A "
            "trimmed-means test (trim=0.2) answers another question: the typical value, not "
            "the mean."
        )
    return " ".join([text, *tails])


def advise(
    shapes: Sequence[Shape], *, design: str, trim: float = 0.0, pooled: bool = False
) -> tuple[str, tuple[str, ...]]:
    """Plain-words advice on which procedure fits, and the findings it rests on.

    The advice never changes the test that was run. Rules (rules of thumb, common
    practice, no single source): a sample is *skewed* when |G1| > 1, *heavy-tailed*
    when G2 > 1, each only counted when the normality test also rejects at 5%;
    *contaminated* when it is skewed or heavy-tailed and the Hampel rule flags values that
    are not simply the long tail of a skewed sample (:attr:`Shape.long_tail`).
    Contamination points to a 20% trimmed-means test; skew weighs the sample size against
    the skewness (Cochran's rule n > 25 G1^2, :attr:`Shape.large_for_skew`): above it the t
    procedure for the mean holds, below it the bootstrap-t checks the interval, and trimmed
    means are named as a different question; otherwise the ordinary t (Welch for two
    samples) fits.
    """
    ratio = variance_ratio(*shapes) if len(shapes) == 2 else float("nan")
    basis = _basis(shapes, ratio)
    contaminated = [s for s in shapes if s.contaminated]
    skewed = [s for s in shapes if s.skewed and not s.contaminated]
    heavy = [s for s in shapes if s.heavy_tailed and not s.contaminated]
    ordinary = "Welch's t test" if design == "two-sample" else "the t test"
    trimmed_word = f"the {trim * 100:g}% trimmed-means test you ran"
    if contaminated:
        kinds = [
            k
            for k, has in (
                ("heavy tails", any(s.heavy_tailed for s in contaminated)),
                ("skew", any(s.skewed for s in contaminated)),
            )
            if has
        ]
        what = "Outlying values with " + " and ".join(kinds)
        if trim > 0:
            text = f"{what} in {_names(contaminated)}: {trimmed_word} suits these data."
        else:
            text = (
                f"{what} in {_names(contaminated)}: the mean and its standard error are pulled "
                "by a few values. A trimmed-means test (trim=0.2) describes the bulk of the "
                "data and keeps its error rates here; run it as a second analysis. It tests "
                "trimmed means, not means."
            )
    elif skewed:
        text = _skew_advice(skewed)
    elif heavy:
        text = (
            f"Tails heavier than normal in {_names(heavy)}, with no value beyond the Hampel "
            "rule: the t test keeps its error rates but loses power; a trimmed-means test "
            "(trim=0.2) is an option."
        )
    elif trim > 0:
        text = (
            "No marked departure from normality: the ordinary t test would fit as well as "
            f"{trimmed_word}."
        )
    else:
        text = f"No marked departure from normality: {ordinary} fits these data."
    if design == "two-sample" and not trim:
        if pooled and ratio > 2.0:
            text += (
                f" The variances differ (ratio {ratio:.2f}): Welch's test (pooled=False) does "
                "not assume equal variances and is the safer choice."
            )
        elif not contaminated:
            text += " Welch's test stays the default: it does not need equal variances."
    if min(s.n for s in shapes) < 10:
        text += " With fewer than 10 values these checks can miss real departures."
    elif (
        max(s.n for s in shapes) > 1000
        and any(s.departs for s in shapes)
        and not (contaminated or skewed or heavy)
    ):
        text += (
            " With this many values a normality test flags departures too small to matter "
            "for a t test; the shape measures count more than its p-value."
        )
    return text, tuple(basis)
