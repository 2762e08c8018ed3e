"""Tests for tinfer.core.equivalence: two one-sided t tests, bands and standardisers.

Expected values come from scipy.stats (reference library), from the bioequivalence rule
and from printed t tables, never from tinfer itself.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from references import SCIPY_PPF_RTOL
from scipy import stats

from tinfer.core.equivalence import band, standardiser, tost
from tinfer.core.summary import Summary


def _welch(a, b):
    """Welch's standard error and Satterthwaite df, written out from the textbook formula."""
    va, vb = np.var(a, ddof=1) / len(a), np.var(b, ddof=1) / len(b)
    df = (va + vb) ** 2 / (va**2 / (len(a) - 1) + vb**2 / (len(b) - 1))
    return math.sqrt(va + vb), df


# ---------------------------------------------------------------------------- tost
class TestTost:
    def test_decision_is_interval_inside_band(self):
        """Over 20 000 random cases the decision equals "the 1 - 2 alpha CI lies in the band"."""
        # Equivalence of TOST and the 1 - 2 alpha interval: Schuirmann (1987); the interval
        # itself from scipy.stats.t.ppf (reference library).
        rng = np.random.default_rng(20261201)
        k = 20_000
        est = rng.normal(0, 2, k)
        se = rng.uniform(0.05, 2.0, k)
        df = rng.uniform(1.5, 120, k)
        low = -rng.uniform(0.1, 4, k)
        high = rng.uniform(0.1, 4, k)
        level = rng.uniform(0.8, 0.995, k)
        r = tost(est, se, df, low, high, level)
        c = stats.t.ppf(level, df)  # 1 - alpha quantile: limits of the 1 - 2 alpha CI
        lo, hi = est - c * se, est + c * se
        expected = (lo > low) & (hi < high)
        clear = (np.abs(lo - low) > 1e-9) & (np.abs(hi - high) > 1e-9)  # drop exact ties
        assert clear.sum() > 19_900
        assert np.array_equal(r.inside[clear], expected[clear])
        assert 0.05 < expected.mean() < 0.95  # both outcomes are exercised
        tol = SCIPY_PPF_RTOL  # the reference's own accuracy (tests/references.py)
        np.testing.assert_allclose(r.ci_low, lo, rtol=tol, atol=tol * 2e2)
        np.testing.assert_allclose(r.ci_high, hi, rtol=tol, atol=tol * 2e2)
        np.testing.assert_allclose(r.ci_level, 2 * level - 1, rtol=1e-12)

    @pytest.mark.parametrize("seed", range(8))
    def test_one_sample_ps_match_scipy_one_sided_tests(self, seed):
        """Each one-sided p equals scipy's one-sided one-sample t test at the shifted null."""
        rng = np.random.default_rng(seed)
        x = rng.normal(10.0, 1.5, rng.integers(4, 40))
        low, high = 10.0 - rng.uniform(0.2, 1.5), 10.0 + rng.uniform(0.2, 1.5)
        se = np.std(x, ddof=1) / math.sqrt(len(x))
        r = tost(x.mean(), se, len(x) - 1, low, high)
        # reference: scipy.stats.ttest_1samp with alternative= (reference library)
        p_lo = stats.ttest_1samp(x, low, alternative="greater").pvalue
        p_hi = stats.ttest_1samp(x, high, alternative="less").pvalue
        assert float(r.p_lower) == pytest.approx(p_lo, rel=1e-10)
        assert float(r.p_upper) == pytest.approx(p_hi, rel=1e-10)
        assert float(r.p) == pytest.approx(max(p_lo, p_hi), rel=1e-10)

    @pytest.mark.parametrize("equal_var", [False, True])
    @pytest.mark.parametrize("seed", range(5))
    def test_two_sample_ps_match_scipy_ttest_ind(self, seed, equal_var):
        """Welch and pooled one-sided ps equal scipy's ttest_ind with the null shifted."""
        rng = np.random.default_rng(100 + seed)
        a = rng.normal(5.0, 1.0, rng.integers(5, 30))
        b = rng.normal(5.2, 2.0, rng.integers(5, 30))
        low, high = -0.9, 1.3
        if equal_var:
            n1, n2 = len(a), len(b)
            sp2 = ((n1 - 1) * np.var(a, ddof=1) + (n2 - 1) * np.var(b, ddof=1)) / (n1 + n2 - 2)
            se, df = math.sqrt(sp2 * (1 / n1 + 1 / n2)), n1 + n2 - 2
        else:
            se, df = _welch(a, b)
        r = tost(a.mean() - b.mean(), se, df, low, high)
        # reference: scipy.stats.ttest_ind on (a - bound) vs b tests "difference = bound"
        ref_lo = stats.ttest_ind(a - low, b, equal_var=equal_var, alternative="greater")
        ref_hi = stats.ttest_ind(a - high, b, equal_var=equal_var, alternative="less")
        assert float(r.t_lower) == pytest.approx(ref_lo.statistic, rel=1e-10)
        assert float(r.t_upper) == pytest.approx(ref_hi.statistic, rel=1e-10)
        assert float(r.p_lower) == pytest.approx(ref_lo.pvalue, rel=1e-9)
        assert float(r.p_upper) == pytest.approx(ref_hi.pvalue, rel=1e-9)

    def test_infinite_upper_limit_is_the_one_sided_test(self):
        """With high = inf the overall p is the lower test's p: non-inferiority at the margin."""
        rng = np.random.default_rng(7)
        x = rng.normal(0.3, 1.0, 25)
        se = np.std(x, ddof=1) / 5.0
        r = tost(x.mean(), se, 24, -0.5, np.inf)
        ref = stats.ttest_1samp(x, -0.5, alternative="greater").pvalue  # scipy reference
        assert float(r.p) == pytest.approx(ref, rel=1e-10)
        assert float(r.p_upper) == 0.0
        assert bool(r.inside) == (ref < 0.05)

    def test_infinite_lower_limit_is_the_one_sided_test(self):
        """With low = -inf the overall p is the upper test's p (higher counts as worse)."""
        rng = np.random.default_rng(8)
        x = rng.normal(-0.2, 1.0, 16)
        se = np.std(x, ddof=1) / 4.0
        r = tost(x.mean(), se, 15, -np.inf, 0.4)
        ref = stats.ttest_1samp(x, 0.4, alternative="less").pvalue  # scipy reference
        assert float(r.p) == pytest.approx(ref, rel=1e-10)

    def test_normal_limit_with_infinite_df(self):
        """df = inf gives the z version: tails from scipy.stats.norm."""
        r = tost(0.1, 0.2, math.inf, -0.5, 0.5)
        # reference: scipy.stats.norm survival function (reference library)
        assert float(r.p_lower) == pytest.approx(stats.norm.sf(3.0), rel=1e-12)
        assert float(r.p_upper) == pytest.approx(stats.norm.cdf(-2.0), rel=1e-12)

    def test_tiny_p_keeps_its_exact_log(self):
        """A one-sided p below double precision keeps its exact log (mpmath reference)."""
        import mpmath

        r = tost(0.0, 1e-6, 60.0, -1.0, 1.0)  # both t = +-1e6 at 60 df
        # reference: P(T > t) = I_x(df/2, 1/2) / 2 with x = df / (df + t^2), in mpmath
        mpmath.mp.dps = 40
        x = mpmath.mpf(60) / (60 + mpmath.mpf(10) ** 12)
        ref = mpmath.log(mpmath.betainc(30, 0.5, 0, x, regularized=True) / 2)
        assert float(r.p) < 1e-300
        assert float(r.log_p) == pytest.approx(float(ref), rel=1e-10)
        assert bool(r.inside)

    def test_printed_t_table_decision(self):
        """A hand-worked case decided by the printed critical value t(0.95, 15) = 1.753."""
        # Worked by hand: n = 16 differences, mean 0.05, sd 0.20, so se = 0.05;
        # band +-0.2231 (ln 1.25); t_lower = 0.2731 / 0.05 = 5.462, t_upper = -0.1731 / 0.05
        # = -3.462. Printed t tables give t(0.95, 15) = 1.753 (standard table, from memory),
        # so both tests reject at 0.05.
        r = tost(0.05, 0.05, 15, -0.2231, 0.2231)
        assert float(r.t_lower) == pytest.approx(5.462, abs=1e-3)
        assert float(r.t_upper) == pytest.approx(-3.462, abs=1e-3)
        assert bool(r.inside)
        assert float(r.ci_low) == pytest.approx(0.05 - 1.753 * 0.05, abs=5e-5)
        assert float(r.ci_high) == pytest.approx(0.05 + 1.753 * 0.05, abs=5e-5)

    @pytest.mark.parametrize(
        ("mean_log_ratio", "sd", "n", "expected"),
        [
            (0.02, 0.25, 24, True),
            (0.15, 0.25, 24, False),
            (-0.05, 0.60, 12, False),
            (-0.10, 0.15, 40, True),
        ],
    )
    def test_bioequivalence_80_125_rule(self, mean_log_ratio, sd, n, expected):
        """Band ln 0.80 to ln 1.25 on log differences reproduces the 80-125% rule."""
        # The average bioequivalence rule: the 90% CI of the geometric mean ratio lies within
        # 80.00% to 125.00% (Schuirmann 1987; FDA guidance 2001; from memory). The ratio CI
        # is computed here with scipy.stats.t.ppf and exp (reference library).
        se = sd / math.sqrt(n)
        c = stats.t.ppf(0.95, n - 1)
        lo, hi = math.exp(mean_log_ratio - c * se), math.exp(mean_log_ratio + c * se)
        assert ((lo > 0.80) and (hi < 1.25)) == expected
        r = tost(mean_log_ratio, se, n - 1, math.log(0.80), math.log(1.25), 0.95)
        assert bool(r.inside) == expected
        assert math.exp(float(r.ci_low)) == pytest.approx(lo, rel=1e-12)

    def test_vectorised_shapes_broadcast(self):
        """Arrays of estimates against one band give arrays of answers, element by element."""
        est = np.array([[0.0, 0.5], [1.0, 2.0]])
        r = tost(est, 0.3, 30.0, -1.0, 1.0)
        assert r.p.shape == (2, 2)
        for i in range(2):
            for j in range(2):
                one = tost(est[i, j], 0.3, 30.0, -1.0, 1.0)
                assert float(r.p[i, j]) == float(one.p)


# ---------------------------------------------------------------------------- band
class TestBand:
    def test_symmetric_band_around_null(self):
        """A number m gives null - m to null + m (offsets relative to null)."""
        assert band(500.0, 2.0) == (498.0, 502.0)

    def test_pair_gives_offsets_relative_to_null(self):
        """A pair is read as offsets from null, not as absolute limits."""
        assert band(10.0, (-1.5, 2.0)) == (8.5, 12.0)

    @pytest.mark.parametrize(
        ("worse", "superior", "expected"),
        [
            ("lower", False, (-0.5, math.inf)),  # non-inferiority, lower is worse
            ("higher", False, (-math.inf, 0.5)),  # non-inferiority, higher is worse
            ("lower", True, (0.5, math.inf)),  # superiority by 0.5, higher is better
            ("higher", True, (-math.inf, -0.5)),  # superiority by 0.5, lower is better
        ],
    )
    def test_one_sided_forms(self, worse, superior, expected):
        """One-sided claims put the margin on the worse side, or past null for superiority."""
        # Hypotheses of non-inferiority and superiority by a margin: common practice, no source.
        assert band(0.0, 0.5, worse, superior) == expected


# ---------------------------------------------------------------------------- standardiser
class TestStandardiser:
    def test_one_sample_uses_sample_sd(self):
        """One sample: the n - 1 sample SD (numpy reference)."""
        x = [4.1, 5.3, 6.2, 5.0, 4.4]
        assert float(standardiser("one-sample", (Summary.of(x),))) == pytest.approx(
            np.std(x, ddof=1), rel=1e-13
        )

    def test_paired_uses_sd_of_differences(self):
        """Paired: the SD of the differences (numpy reference)."""
        d = np.array([0.3, -0.1, 0.6, 0.2, 0.0, 0.4])
        assert float(standardiser("paired", (Summary.of(d),))) == pytest.approx(
            np.std(d, ddof=1), rel=1e-13
        )

    def test_two_sample_uses_pooled_sd(self):
        """Two samples: the pooled SD, sqrt of the df-weighted mean of the variances."""
        a, b = [3.0, 4.5, 5.1, 4.0], [6.2, 5.1, 7.7, 6.9, 5.5, 6.0]
        # pooled variance as in any textbook: ((n1-1)s1^2 + (n2-1)s2^2) / (n1+n2-2)
        sp2 = (3 * np.var(a, ddof=1) + 5 * np.var(b, ddof=1)) / 8
        got = standardiser("two-sample", (Summary.of(a), Summary.of(b)))
        assert float(got) == pytest.approx(math.sqrt(sp2), rel=1e-13)


# ---------------------------------------------------------------------------- with power
class TestTostAgainstPower:
    @pytest.mark.parametrize(
        ("diff", "n1", "n2", "low", "high"),
        [(0.1, 20, 20, -0.6, 0.6), (0.0, 15, None, -0.5, 0.7), (0.3, 12, 18, -0.4, np.inf)],
    )
    def test_decision_rate_matches_equivalence_power(self, diff, n1, n2, low, high):
        """In a seeded simulation the TOST decision rate matches equivalence_power."""
        # Monte Carlo with numpy's generator (reference): 20 000 data sets, normal data,
        # SD 1; pooled SD for two samples, as equivalence_power assumes. Tolerance 4.5
        # binomial standard errors.
        from tinfer.core.power import equivalence_power

        rng = np.random.default_rng(31337)
        k = 20_000
        a = rng.normal(diff, 1.0, (k, n1))
        if n2 is None:
            est = a.mean(axis=1)
            se, df = a.std(axis=1, ddof=1) / math.sqrt(n1), n1 - 1
        else:
            b = rng.normal(0.0, 1.0, (k, n2))
            est = a.mean(axis=1) - b.mean(axis=1)
            df = n1 + n2 - 2
            sp2 = ((n1 - 1) * a.var(axis=1, ddof=1) + (n2 - 1) * b.var(axis=1, ddof=1)) / df
            se = np.sqrt(sp2 * (1 / n1 + 1 / n2))
        rate = tost(est, se, df, low, high, 0.95).inside.mean()
        power = float(equivalence_power(diff, low, high, n1, n2, sd=1.0, level=0.95))
        assert 0.05 < power < 0.95
        assert abs(rate - power) < 4.5 * math.sqrt(power * (1 - power) / k)
