"""Trimmed means, winsorised variances, Yuen's t, the robust effect size and the bootstrap-t.

References: scipy.stats (``ttest_ind(..., trim=)`` implements Yuen's 1974 two-sample test;
``trim_mean``, ``mstats.winsorize``, ``nct``), mpmath for integrals, and worked examples
named beside each check.
"""

from __future__ import annotations

import mpmath
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from references import SCIPY_PPF_RTOL
from scipy import stats

from tinfer.core.robust import (
    Trimmed,
    bootstrap_t,
    trim_count,
    winsor_normal_sd,
    yuen_one_sample,
    yuen_two_sample,
)

SIDES = {"two-sided": "two-sided", "upper": "greater", "lower": "less"}

# Wilcox, Introduction to Robust Estimation and Hypothesis Testing (2nd/3rd ed.): the
# "self-awareness" data of Dana (1990), two groups of 19 -- values from memory.
SELF_AWARE_1 = [77, 87, 88, 114, 151, 210, 219, 246, 253, 262, 296, 299, 306, 376, 428, 515,
                666, 1310, 2611]  # fmt: skip
SELF_AWARE_2 = [59, 106, 174, 207, 219, 237, 313, 365, 458, 497, 515, 529, 557, 615, 625, 645,
                973, 1065, 3215]  # fmt: skip


def _cases(seed: int, count: int):
    """Random pairs of samples of varied size, spread, shape and location."""
    rng = np.random.default_rng(seed)
    for _ in range(count):
        na, nb = rng.integers(5, 60, size=2)
        kind = rng.integers(3)
        draw = [rng.normal, rng.standard_t, rng.lognormal][kind]
        if kind == 1:
            a, b = draw(2.5, size=na), draw(2.5, size=nb) * rng.uniform(0.3, 3)
        elif kind == 2:
            a, b = draw(0, 0.8, size=na), draw(0.3, 1.0, size=nb)
        else:
            a, b = draw(10, 2, size=na), draw(11, rng.uniform(0.5, 4), size=nb)
        yield a, b


class TestTrimCount:
    def test_floor_of_product(self):
        """g = floor(trim * n), as scipy's trim_mean counts (int(proportion * n))."""
        for n in range(2, 200):
            for trim in (0.05, 0.1, 0.2, 0.25, 0.3, 0.45):
                assert int(trim_count(n, trim)) == int(trim * n + 1e-9)

    def test_guard_against_rounding_down(self):
        """0.29 * 100 evaluates to 28.999...; the count is still 29 (floor of the exact product)."""
        assert 0.29 * 100 < 29
        assert int(trim_count(100, 0.29)) == 29


class TestTrimmed:
    @settings(max_examples=60, deadline=None)
    @given(
        st.lists(st.floats(-1e6, 1e6, allow_nan=False), min_size=3, max_size=60),
        st.sampled_from([0.0, 0.1, 0.2, 0.25, 0.4]),
    )
    def test_matches_scipy_trim_mean_and_winsorize(self, values, trim):
        """Trimmed mean = scipy.stats.trim_mean; winsorised variance = var(mstats.winsorize)."""
        x = np.array(values)
        s = Trimmed.of(x, trim)
        assert float(s.mean) == pytest.approx(stats.trim_mean(x, trim), rel=1e-12, abs=1e-6)
        w = np.asarray(stats.mstats.winsorize(x, limits=(trim, trim)), dtype=float)
        assert float(s.wvar) == pytest.approx(np.var(w, ddof=1), rel=1e-9, abs=1e-3)
        assert int(s.h) == x.size - 2 * int(trim * x.size)

    def test_rows_are_independent_samples(self):
        """A 2-D array gives per-row statistics equal to those of each row alone."""
        rng = np.random.default_rng(5)
        x = rng.standard_t(3, size=(7, 23))
        s = Trimmed.of(x, 0.2)
        for i in range(7):
            assert float(s.mean[i]) == pytest.approx(stats.trim_mean(x[i], 0.2), rel=1e-13)
            assert float(s.d[i]) == pytest.approx(float(Trimmed.of(x[i], 0.2).d), rel=1e-13)

    def test_worked_example_twenty_values(self):
        """20% trimmed mean of 20 values is 54.92 (Rousselet, Pernet and Wilcox, "Simple
        steps to improve statistical analyses", worked example)."""
        x = [39, 92, 75, 61, 45, 87, 59, 51, 87, 12, 8, 93, 74, 16, 32, 39, 87, 12, 47, 50]
        assert round(float(Trimmed.of(x, 0.2).mean), 2) == 54.92

    def test_worked_example_self_awareness(self):
        """20% trimmed means of Dana's self-awareness data are 282.7 and 444.8 (Wilcox,
        Introduction to Robust Estimation and Hypothesis Testing; from memory)."""
        assert round(float(Trimmed.of(SELF_AWARE_1, 0.2).mean), 1) == 282.7
        assert round(float(Trimmed.of(SELF_AWARE_2, 0.2).mean), 1) == 444.8

    def test_zero_trim_is_ordinary(self):
        """With trim = 0, mean, variance and d are the ordinary mean, variance and s^2/n."""
        x = np.array([3.2, 4.1, 2.7, 5.5, 4.4, 3.9])
        s = Trimmed.of(x, 0.0)
        assert float(s.mean) == pytest.approx(x.mean(), rel=1e-15)
        assert float(s.d) == pytest.approx(x.var(ddof=1) / x.size, rel=1e-14)


class TestYuenTwoSample:
    def test_matches_scipy_over_many_cases(self):
        """t, p and df equal scipy.stats.ttest_ind(equal_var=False, trim=0.2) on 150 cases."""
        for a, b in _cases(11, 150):
            ref = stats.ttest_ind(a, b, equal_var=False, trim=0.2)
            got = yuen_two_sample(Trimmed.of(a, 0.2), Trimmed.of(b, 0.2))
            assert float(got.t) == pytest.approx(ref.statistic, rel=1e-9)
            assert float(got.df) == pytest.approx(ref.df, rel=1e-9)
            assert float(got.p) == pytest.approx(ref.pvalue, rel=1e-8)

    @pytest.mark.parametrize("trim", [0.1, 0.25, 0.4])
    @pytest.mark.parametrize("side", list(SIDES))
    def test_other_trims_and_sides(self, trim, side):
        """Other trims, one-sided alternatives and a null shift agree with scipy.stats."""
        for a, b in _cases(int(trim * 100), 25):
            if min(x.size - 2 * int(trim * x.size) for x in (a, b)) < 2:
                continue  # fewer than 2 values left after trimming: no test
            null = 0.3
            ref = stats.ttest_ind(a - null, b, equal_var=False, trim=trim, alternative=SIDES[side])
            got = yuen_two_sample(Trimmed.of(a, trim), Trimmed.of(b, trim), null=null, side=side)
            assert float(got.t) == pytest.approx(ref.statistic, rel=1e-9, abs=1e-12)
            assert float(got.p) == pytest.approx(ref.pvalue, rel=1e-8, abs=1e-300)

    def test_interval_limits_are_where_p_equals_alpha(self):
        """At each 95% limit, scipy's Yuen p-value against that null is 0.05 (test inversion)."""
        for a, b in _cases(3, 30):
            got = yuen_two_sample(Trimmed.of(a, 0.2), Trimmed.of(b, 0.2), level=0.95)
            for limit in (float(got.ci_low), float(got.ci_high)):
                ref = stats.ttest_ind(a - limit, b, equal_var=False, trim=0.2)
                assert ref.pvalue == pytest.approx(0.05, rel=1e-7)

    def test_zero_trim_is_welch(self):
        """trim = 0 gives Welch's test (scipy.stats.ttest_ind with equal_var=False)."""
        for a, b in _cases(4, 20):
            ref = stats.ttest_ind(a, b, equal_var=False)
            got = yuen_two_sample(Trimmed.of(a, 0.0), Trimmed.of(b, 0.0))
            assert float(got.t) == pytest.approx(ref.statistic, rel=1e-10)
            assert float(got.df) == pytest.approx(ref.df, rel=1e-10)

    def test_self_awareness_example(self):
        """Dana's data: Yuen p about 0.053 against Welch's 0.47 (Wilcox; from memory)."""
        got = yuen_two_sample(Trimmed.of(SELF_AWARE_1, 0.2), Trimmed.of(SELF_AWARE_2, 0.2))
        assert round(float(got.p), 3) == 0.053
        assert round(stats.ttest_ind(SELF_AWARE_1, SELF_AWARE_2, equal_var=False).pvalue, 2) == 0.48

    def test_vectorised_over_rows(self):
        """Rows of 2-D inputs give the same answers as separate calls (many tests at once)."""
        rng = np.random.default_rng(8)
        a, b = rng.normal(size=(40, 15)), rng.normal(0.4, 2, size=(40, 21))
        got = yuen_two_sample(Trimmed.of(a, 0.2), Trimmed.of(b, 0.2))
        for i in range(40):
            ref = stats.ttest_ind(a[i], b[i], equal_var=False, trim=0.2)
            assert float(got.t[i]) == pytest.approx(ref.statistic, rel=1e-10)


def _direct_one_sample(x, trim, null):
    """Yuen's (1974) standard error for one trimmed mean, written out from the formula
    d = (n-1) s_w^2 / (h (h-1)) (as in Wilcox 2012, section 5.3, for each group), with
    scipy's trim_mean and mstats.winsorize supplying the pieces."""
    x = np.asarray(x, float)
    n = x.size
    g = int(trim * n)
    h = n - 2 * g
    sw2 = np.var(np.asarray(stats.mstats.winsorize(x, limits=(trim, trim)), float), ddof=1)
    d = (n - 1) * sw2 / (h * (h - 1))
    t = (stats.trim_mean(x, trim) - null) / np.sqrt(d)
    return t, h - 1, 2 * stats.t.sf(abs(t), h - 1)


class TestYuenOneSample:
    def test_matches_direct_formula(self):
        """t, df and p equal the formula computed with scipy's trim_mean and winsorize."""
        for a, _ in _cases(21, 60):
            t, df, p = _direct_one_sample(a, 0.2, 1.5)
            got = yuen_one_sample(Trimmed.of(a, 0.2), null=1.5)
            assert float(got.t) == pytest.approx(t, rel=1e-9)
            assert float(got.df) == df
            assert float(got.p) == pytest.approx(p, rel=1e-8)

    @pytest.mark.filterwarnings("ignore:Precision loss:RuntimeWarning")  # scipy, constant group
    def test_matches_scipy_two_sample_against_a_constant(self):
        """Yuen's two-sample test against a constant group (d = 0, df = h - 1) in
        scipy.stats.ttest_ind is the one-sample test."""
        for a, _ in _cases(22, 40):
            ref = stats.ttest_ind(a, np.full(6, 2.0), equal_var=False, trim=0.2)
            got = yuen_one_sample(Trimmed.of(a, 0.2), null=2.0)
            assert float(got.t) == pytest.approx(ref.statistic, rel=1e-9)
            assert float(got.df) == pytest.approx(ref.df, rel=1e-12)
            assert float(got.p) == pytest.approx(ref.pvalue, rel=1e-8)

    def test_zero_trim_is_student_one_sample(self):
        """trim = 0 gives scipy.stats.ttest_1samp."""
        for a, _ in _cases(23, 20):
            ref = stats.ttest_1samp(a, 1.0)
            got = yuen_one_sample(Trimmed.of(a, 0.0), null=1.0)
            assert float(got.t) == pytest.approx(ref.statistic, rel=1e-10)
            assert float(got.p) == pytest.approx(ref.pvalue, rel=1e-9)

    def test_interval_contains_trimmed_mean_symmetrically(self):
        """The interval is trimmed mean -+ t(0.975, h-1) * sqrt(d) (scipy.stats.t.ppf)."""
        x = np.array(SELF_AWARE_1, float)
        s = Trimmed.of(x, 0.2)
        got = yuen_one_sample(s)
        half = stats.t.ppf(0.975, 12) * float(np.sqrt(s.d))
        tol = SCIPY_PPF_RTOL  # the reference's own t.ppf (tests/references.py)
        assert float(got.ci_low) == pytest.approx(float(s.mean) - half, rel=tol)
        assert float(got.ci_high) == pytest.approx(float(s.mean) + half, rel=tol)


class TestRobustEffect:
    @pytest.mark.parametrize("trim", [0.05, 0.1, 0.2, 0.3, 0.45])
    def test_constant_by_numerical_integration(self, trim):
        """The winsorised SD of N(0, 1) equals its integral evaluated by mpmath.quad."""
        z = mpmath.sqrt(2) * mpmath.erfinv(1 - 2 * mpmath.mpf(trim))
        inner = mpmath.quad(lambda u: u * u * mpmath.npdf(u), [-z, z])
        ref = float(mpmath.sqrt(inner + 2 * trim * z * z))
        assert winsor_normal_sd(trim) == pytest.approx(ref, rel=1e-12)

    def test_constant_at_twenty_percent(self):
        """0.642 at 20% trimming (Algina, Keselman and Penfield 2005; from memory)."""
        assert round(winsor_normal_sd(0.2), 3) == 0.642

    def test_two_sample_formula(self):
        """d_R = 0.642 (tm_a - tm_b) / pooled winsorised SD, pieces from scipy.stats."""
        a, b = np.array(SELF_AWARE_1, float), np.array(SELF_AWARE_2, float)
        wa = np.asarray(stats.mstats.winsorize(a, limits=(0.2, 0.2)), float)
        wb = np.asarray(stats.mstats.winsorize(b, limits=(0.2, 0.2)), float)
        sw = np.sqrt((18 * np.var(wa, ddof=1) + 18 * np.var(wb, ddof=1)) / 36)
        ref = winsor_normal_sd(0.2) * (stats.trim_mean(a, 0.2) - stats.trim_mean(b, 0.2)) / sw
        got = yuen_two_sample(Trimmed.of(a, 0.2), Trimmed.of(b, 0.2))
        assert float(got.effect) == pytest.approx(ref, rel=1e-12)

    def test_interval_inverts_noncentral_t(self):
        """Scaled back to the t scale, the effect limits are the noncentrality values at
        which scipy.stats.nct puts the observed t at the 97.5% and 2.5% points."""
        a, b = np.array(SELF_AWARE_1, float), np.array(SELF_AWARE_2, float)
        got = yuen_two_sample(Trimmed.of(a, 0.2), Trimmed.of(b, 0.2))
        scale = float(got.effect) / float(got.t)
        for limit, prob in ((got.effect_low, 0.975), (got.effect_high, 0.025)):
            ncp = float(limit) / scale
            assert stats.nct.cdf(float(got.t), float(got.df), ncp) == pytest.approx(prob, rel=1e-8)

    def test_interval_coverage_under_normality(self):
        """Under normal data (n = 25 each, true d = 0.5), the 95% interval covers d in
        400 seeded data sets within 3 binomial SDs of 95% (common practice, no source)."""
        rng = np.random.default_rng(2024)
        a = rng.normal(0.5, 1.0, size=(400, 25))
        b = rng.normal(0.0, 1.0, size=(400, 25))
        got = yuen_two_sample(Trimmed.of(a, 0.2), Trimmed.of(b, 0.2))
        cover = np.mean((got.effect_low <= 0.5) & (0.5 <= got.effect_high))
        assert abs(cover - 0.95) < 3 * np.sqrt(0.95 * 0.05 / 400)


def _loop_bootstrap_t(x, n_resamples, seed, level):
    """Percentile-t written out resample by resample (Efron and Tibshirani 1993, ch. 12),
    drawing the same index matrix as one chunk of the vectorised code."""
    rng = np.random.default_rng(seed)
    idx = rng.integers(0, x.size, size=(n_resamples, x.size))
    m, se = x.mean(), x.std(ddof=1) / np.sqrt(x.size)
    ts = []
    for row in idx:
        xb = x[row]
        ts.append((xb.mean() - m) / (xb.std(ddof=1) / np.sqrt(x.size)))
    ts = np.sort(ts)
    k_hi = round((n_resamples + 1) * (1 - (1 - level) / 2))  # (B+1)p-th order statistic
    k_lo = round((n_resamples + 1) * (1 - level) / 2)
    return m - ts[k_hi - 1] * se, m - ts[k_lo - 1] * se


class TestBootstrapT:
    def test_matches_loop_implementation(self):
        """With B = 999 (so (B+1)p is whole) the interval equals a plain per-resample loop."""
        x = np.random.default_rng(1).exponential(size=17)
        got = bootstrap_t([x], n_resamples=999, rng=np.random.default_rng(42))
        lo, hi = _loop_bootstrap_t(x, 999, 42, 0.95)
        assert got.low == pytest.approx(lo, rel=1e-12)
        assert got.high == pytest.approx(hi, rel=1e-12)

    def test_coverage_skewed_data(self):
        """Bootstrap-t 95% intervals cover the mean of exponential data (n = 20) in 200
        seeded data sets x 999 resamples within 3 binomial SDs of 95% (common practice)."""
        rng = np.random.default_rng(20261201)
        hits = 0
        for _ in range(200):
            x = rng.exponential(2.0, size=20)
            b = bootstrap_t([x], n_resamples=999, rng=rng)
            hits += b.low <= 2.0 <= b.high
        assert abs(hits / 200 - 0.95) < 3 * np.sqrt(0.95 * 0.05 / 200)

    def test_closer_to_nominal_than_t_on_skewed_data(self):
        """On exponential data (n = 15, 400 seeded sets) bootstrap-t misses less often than the
        t interval (scipy.stats.t.interval), as second-order theory says (Hall 1988)."""
        rng = np.random.default_rng(15)
        boot = plain = 0
        for _ in range(400):
            x = rng.exponential(1.0, size=15)
            b = bootstrap_t([x], n_resamples=499, rng=rng)
            boot += b.low <= 1.0 <= b.high
            lo, hi = stats.t.interval(0.95, 14, x.mean(), x.std(ddof=1) / np.sqrt(15))
            plain += lo <= 1.0 <= hi
        assert abs(boot / 400 - 0.95) < abs(plain / 400 - 0.95)

    def test_coverage_two_sample_trimmed(self):
        """For symmetric data with unequal spreads the trimmed-difference bootstrap-t interval
        covers the true difference 1.0 at close to 95% (100 data sets, 3 binomial SDs)."""
        rng = np.random.default_rng(77)
        hits = 0
        for _ in range(100):
            a, b = rng.standard_t(3, size=18) + 1.0, 3 * rng.standard_t(3, size=25)
            r = bootstrap_t([a, b], trim=0.2, n_resamples=599, rng=rng)
            hits += r.low <= 1.0 <= r.high
        assert abs(hits / 100 - 0.95) < 3 * np.sqrt(0.95 * 0.05 / 100)

    def test_seed_reproducible_and_chunk_progress(self):
        """The same seed gives the same t*; progress reports cumulative counts per chunk."""
        x = np.random.default_rng(2).normal(size=30)
        seen = []
        one = bootstrap_t([x], n_resamples=1000, rng=np.random.default_rng(9), chunk_elements=3000,
                          progress=seen.append)  # fmt: skip
        two = bootstrap_t([x], n_resamples=1000, rng=np.random.default_rng(9), chunk_elements=3000)
        assert np.array_equal(one.t_star, two.t_star)
        assert seen == list(range(100, 1001, 100))
        other = bootstrap_t([x], n_resamples=1000, rng=np.random.default_rng(10))
        assert not np.array_equal(one.t_star, other.t_star)

    def test_one_sided_limits(self):
        """'upper' gives a finite lower limit only, 'lower' a finite upper limit only."""
        x = np.random.default_rng(3).normal(size=25)
        up = bootstrap_t([x], side="upper", n_resamples=499, rng=np.random.default_rng(1))
        lo = bootstrap_t([x], side="lower", n_resamples=499, rng=np.random.default_rng(1))
        assert np.isfinite(up.low) and up.high == np.inf
        assert lo.low == -np.inf and np.isfinite(lo.high)

    def test_degenerate_resamples_counted(self):
        """Resamples with no spread (all values equal) are counted; the interval stays finite."""
        x = np.array([1.0, 1.0, 1.0, 2.0])
        b = bootstrap_t([x], n_resamples=999, rng=np.random.default_rng(0))
        # P(all four draws are 1.0) = 0.75^4 = 0.316; all 2.0: 0.0039
        assert 250 < b.n_degenerate < 390
        assert np.isfinite(b.low) or np.isfinite(b.high)
