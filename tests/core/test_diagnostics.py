"""Assumption checks: shape measures, normality tests, the Hampel rule and the advice.

References: scipy.stats (skew, kurtosis, shapiro, normaltest, median_abs_deviation,
norm.ppf); planted outliers and seeded simulated data of our own.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import stats

from tinfer.core import diagnostics as diag

finite_lists = st.lists(st.floats(-1e4, 1e4, allow_nan=False), min_size=4, max_size=80)


class TestShapeMeasures:
    @settings(max_examples=60, deadline=None)
    @given(finite_lists)
    def test_skewness_is_scipy_unbiased(self, values):
        """G1 equals scipy.stats.skew(bias=False)."""
        x = np.array(values)
        if np.ptp(x) < 1e-6 * max(1.0, np.abs(x).max()):
            return  # no spread to speak of: both sides are undefined
        assert diag.skewness(x) == pytest.approx(stats.skew(x, bias=False), rel=1e-7, abs=1e-9)

    @settings(max_examples=60, deadline=None)
    @given(finite_lists)
    def test_excess_kurtosis_is_scipy_unbiased(self, values):
        """G2 equals scipy.stats.kurtosis(bias=False) (Fisher's excess kurtosis)."""
        x = np.array(values)
        if np.ptp(x) < 1e-6 * max(1.0, np.abs(x).max()):
            return
        ref = stats.kurtosis(x, fisher=True, bias=False)
        assert diag.excess_kurtosis(x) == pytest.approx(ref, rel=1e-7, abs=1e-9)

    def test_too_small_is_nan(self):
        """Skewness needs 3 values and kurtosis 4; fewer give nan, not a number."""
        assert np.isnan(diag.skewness([1.0, 2.0]))
        assert np.isnan(diag.excess_kurtosis([1.0, 2.0, 4.0]))


class TestNormalityTest:
    def test_shapiro_up_to_5000(self):
        """For 3 <= n <= 5000 the test is scipy.stats.shapiro."""
        x = np.random.default_rng(1).normal(size=300)
        name, w, p = diag.normality_test(x)
        ref = stats.shapiro(x)
        assert name.startswith("Shapiro-Wilk")
        assert (w, p) == pytest.approx((ref.statistic, ref.pvalue), rel=1e-12)

    def test_dagostino_above_5000(self):
        """Above 5000 values the test is scipy.stats.normaltest (D'Agostino-Pearson)."""
        x = np.random.default_rng(2).normal(size=6000)
        name, k2, p = diag.normality_test(x)
        ref = stats.normaltest(x)
        assert name.startswith("D'Agostino-Pearson")
        assert (k2, p) == pytest.approx((ref.statistic, ref.pvalue), rel=1e-12)

    def test_none_when_too_few_or_constant(self):
        """Fewer than 3 values, or no spread: no test is run."""
        assert diag.normality_test([1.0, 2.0]) is None
        assert diag.normality_test([3.0, 3.0, 3.0, 3.0]) is None


class TestHampel:
    def test_scale_is_normal_consistent_mad(self):
        """The scale is scipy.stats.median_abs_deviation(scale='normal')."""
        x = np.random.default_rng(3).normal(5, 2, size=101)
        _, med, scale = diag.hampel(x)
        assert med == np.median(x)
        assert scale == pytest.approx(stats.median_abs_deviation(x, scale="normal"), rel=1e-9)
        assert pytest.approx(1 / stats.norm.ppf(0.75), rel=1e-15) == diag.MAD_TO_SD

    def test_flags_planted_outliers(self):
        """Three values planted 8 SD out in 60 normal values are exactly the ones flagged."""
        rng = np.random.default_rng(4)
        x = np.concatenate([rng.normal(50, 2, size=60), [66.0, 67.5, 31.0]])
        mask, _, _ = diag.hampel(x)
        assert np.flatnonzero(mask).tolist() == [60, 61, 62]

    def test_clean_normal_data_rarely_flagged(self):
        """In 200 clean normal values (seeded) at most 1% are flagged; the rule's false-alarm
        rate is 2 * P(Z > 3) = 0.27% per value (scipy.stats.norm)."""
        x = np.random.default_rng(5).normal(size=200)
        mask, _, _ = diag.hampel(x)
        assert mask.sum() <= 2
        assert 2 * stats.norm.sf(3) == pytest.approx(0.0027, abs=1e-4)

    def test_ties_give_no_flags(self):
        """When more than half the values are equal the MAD is 0 and nothing is flagged."""
        mask, _, scale = diag.hampel([4.0, 4.0, 4.0, 4.0, 9.0])
        assert scale == 0 and not mask.any()


class TestPlotHelpers:
    def test_blom_positions(self):
        """Blom's (1958) positions (i - 3/8) / (n + 1/4) through scipy.stats.norm.ppf."""
        i = np.arange(1, 12)
        ref = stats.norm.ppf((i - 0.375) / 11.25)
        np.testing.assert_allclose(diag.blom_quantiles(11), ref, rtol=1e-13)

    def test_thinning_keeps_ends(self):
        """Thinned ranks are increasing, at most max_points, and keep the first and last."""
        r = diag.thin_ranks(100_000, 250)
        assert r.size <= 250 and r[0] == 0 and r[-1] == 99_999 and np.all(np.diff(r) > 0)
        assert diag.thin_ranks(40, 250).tolist() == list(range(40))


def _shape(label, n, skew, kurt, p, outliers):
    """A hand-made Shape with the given findings (other fields are placeholders)."""
    return diag.Shape(
        label=label, n=n, mean=0.0, sd=1.0, skewness=skew, excess_kurtosis=kurt,
        test_name="Shapiro-Wilk W", test_statistic=0.9, test_p=p, median=0.0, mad_sd=1.0,
        n_outliers=outliers, outliers=(9.0,) * outliers, quartiles=(-1.0, 0.0, 1.0),
        whiskers=(-2.0, 2.0),
    )  # fmt: skip


class TestAdvise:
    def test_contaminated_heavy_tails_recommend_trimming(self):
        """Seeded normal data with 10% wide contamination: the advice names trim=0.2."""
        rng = np.random.default_rng(6)
        groups = []
        for label, shift in (("north", 0.0), ("south", 0.5)):
            x = rng.normal(shift, 1, size=40)
            wild = rng.random(40) < 0.1
            x[wild] = rng.normal(shift, 10, size=wild.sum())
            groups.append(diag.shape(label, x))
        text, basis = diag.advise(groups, design="two-sample")
        assert "trim=0.2" in text
        assert any("Hampel" in b for b in basis)

    def test_clean_normal_data_keep_welch(self):
        """Seeded clean normal groups: Welch's test is advised and trimming is not."""
        rng = np.random.default_rng(7)
        groups = [diag.shape("a", rng.normal(0, 1, 45)), diag.shape("b", rng.normal(0, 2, 38))]
        text, _ = diag.advise(groups, design="two-sample")
        assert "Welch" in text and "trim=" not in text

    def test_already_trimmed_is_confirmed(self):
        """When the trimmed test was run on contaminated data, the advice confirms it."""
        s = _shape("x", 30, 2.5, 6.0, 1e-5, 2)
        text, _ = diag.advise([s], design="one-sample", trim=0.2)
        assert "20% trimmed-means test you ran suits" in text

    def test_skew_without_outliers_small_n_points_to_bootstrap(self):
        """Marked skew, no flagged values, n < 50: the advice is a bootstrap cross-check."""
        text, _ = diag.advise([_shape("x", 25, 1.6, 0.5, 0.002, 0)], design="one-sample")
        assert "bootstrap()" in text

    def test_pooled_with_unequal_variances_points_to_welch(self):
        """A pooled test with variance ratio above 2 is steered to Welch (pooled=False)."""
        a = diag.shape("a", np.random.default_rng(8).normal(0, 1, 30))
        b = diag.shape("b", np.random.default_rng(9).normal(0, 3, 30))
        text, _ = diag.advise([a, b], design="two-sample", pooled=True)
        assert "pooled=False" in text

    def test_departures_ignored_without_significant_test(self):
        """Large sample skewness alone (normality p above 0.05) is not called a departure."""
        s = _shape("x", 12, 1.4, 2.0, 0.2, 1)
        assert not (s.skewed or s.heavy_tailed or s.contaminated)


class TestSkewAdvice:
    """Skewness weighed against the sample size; a long tail is not called outliers."""

    def test_long_skewed_tail_is_skew_not_outliers(self):
        """Order values with skewness near 8 and 2,400 per arm: the Hampel rule flags about
        16% on the long tail; the advice calls that skew, keeps the mean and points to the
        bootstrap (skewness reference: scipy.stats.skew, bias-corrected)."""
        rng = np.random.default_rng(5)
        shapes = [diag.shape(k, rng.lognormal(3, 1.6, 2400)) for k in ("a", "b")]
        assert all(s.long_tail and not s.contaminated for s in shapes)
        text, _ = diag.advise(shapes, design="two-sample")
        assert "Cochran's rule" in text and "result.bootstrap()" in text
        assert "part of the distribution, not errors" in text
        assert "answers another question" in text

    def test_large_sample_passes_cochrans_rule(self):
        """Exponential data (skewness 2) with n = 2,000 > 25 * 2^2: the t procedure holds."""
        x = np.random.default_rng(8).exponential(1.0, 2000)
        s = diag.shape("wait", x)
        assert abs(s.skewness - stats.skew(x, bias=False)) < 1e-9  # reference: scipy.stats
        assert s.large_for_skew and s.skewed
        text, _ = diag.advise([s], design="one-sample")
        assert "holds up" in text and "trim=0.2" not in text

    def test_one_stray_value_is_still_an_outlier(self):
        """One extreme value among eight is an outlier, not a long tail: trimming is offered."""
        s = diag.shape("ms", [212, 198, 205, 220, 201, 209, 214, 640.0])
        assert not s.long_tail and s.contaminated
        text, _ = diag.advise([s], design="one-sample")
        assert "trim=0.2" in text
