"""t procedures against scipy.stats, over many seeded random cases.

Reference: scipy.stats.ttest_1samp, ttest_ind (equal_var True / False) and ttest_rel,
with their .df and .confidence_interval(level). scipy's alternative "greater" is
tinfer's side "upper", "less" is "lower".
"""

from __future__ import annotations

import numpy as np
import pytest
from references import SCIPY_PPF_RTOL
from scipy import stats

from tinfer.core import procedures
from tinfer.core.summary import Summary

SIDE_TO_SCIPY = {"two-sided": "two-sided", "upper": "greater", "lower": "less"}
RTOL = 1e-12


def _close(got, want, rtol=RTOL, atol=0.0):
    np.testing.assert_allclose(
        np.asarray(got, float), np.asarray(want, float), rtol=rtol, atol=atol
    )


def _check(c, ref, level, side):
    """Compare a tinfer Computed with a scipy TtestResult."""
    _close(c.t, ref.statistic)
    _close(c.df, ref.df)
    # p: scipy and tinfer both use the cephes/boost t cdf; tiny p agree relatively too
    _close(c.p, ref.pvalue)
    ci = ref.confidence_interval(confidence_level=level)
    for got, want in ((c.ci_low, ci.low), (c.ci_high, ci.high)):
        if np.isinf(want):
            assert got == want
        else:
            # limits near 0 lose relative digits by cancellation (estimate - c * se); the
            # reference's own t.ppf sets the tolerance (tests/references.py)
            scale = SCIPY_PPF_RTOL / 1e-12
            _close(
                got,
                want,
                rtol=SCIPY_PPF_RTOL,
                atol=scale * 1e-13 * float(abs(c.estimate) + abs(c.se) * 10),
            )


def _cases(seed: int, count: int):
    rng = np.random.default_rng(seed)
    for i in range(count):
        side = ("two-sided", "upper", "lower")[i % 3]
        level = (0.95, 0.9, 0.99, 0.8, 0.999)[i % 5]
        yield rng, side, level


class TestOneSample:
    @pytest.mark.parametrize("case", range(60))
    def test_matches_scipy_ttest_1samp(self, case):
        """t, df, p and CI equal scipy.stats.ttest_1samp to 1e-12 relative."""
        rng = np.random.default_rng(1000 + case)
        side = ("two-sided", "upper", "lower")[case % 3]
        level = (0.95, 0.9, 0.99, 0.8, 0.999)[case % 5]
        n = int(rng.integers(2, 200))
        x = rng.normal(rng.uniform(-5, 5), rng.uniform(0.1, 10), n)
        null = float(rng.uniform(-3, 3))
        c = procedures.one_sample(Summary.of(x), null=null, level=level, side=side)
        ref = stats.ttest_1samp(x, null, alternative=SIDE_TO_SCIPY[side])
        _check(c, ref, level, side)
        _close(c.estimate, x.mean())


class TestPaired:
    @pytest.mark.parametrize("case", range(45))
    def test_matches_scipy_ttest_rel(self, case):
        """One-sample t on the differences equals scipy.stats.ttest_rel to 1e-12."""
        rng = np.random.default_rng(2000 + case)
        side = ("two-sided", "upper", "lower")[case % 3]
        level = (0.95, 0.9, 0.99)[case % 3]
        n = int(rng.integers(3, 100))
        before = rng.normal(50, 8, n)
        after = before + rng.normal(rng.uniform(-2, 2), rng.uniform(0.5, 4), n)
        c = procedures.one_sample(Summary.of(before - after), level=level, side=side)
        ref = stats.ttest_rel(before, after, alternative=SIDE_TO_SCIPY[side])
        _check(c, ref, level, side)


class TestTwoSample:
    @pytest.mark.parametrize("pooled", [False, True])
    @pytest.mark.parametrize("case", range(45))
    def test_matches_scipy_ttest_ind(self, case, pooled):
        """Welch and pooled t, df (non-integer for Welch), p, CI equal scipy.stats.ttest_ind."""
        rng = np.random.default_rng(3000 + case)
        side = ("two-sided", "upper", "lower")[case % 3]
        level = (0.95, 0.9, 0.99, 0.8, 0.999)[case % 5]
        na, nb = (int(v) for v in rng.integers(2, 150, 2))
        a = rng.normal(rng.uniform(-3, 3), rng.uniform(0.2, 5), na)
        b = rng.normal(rng.uniform(-3, 3), rng.uniform(0.2, 5), nb)
        c = procedures.two_sample(
            Summary.of(a), Summary.of(b), level=level, side=side, pooled=pooled
        )
        ref = stats.ttest_ind(a, b, equal_var=pooled, alternative=SIDE_TO_SCIPY[side])
        _check(c, ref, level, side)
        _close(c.estimate, a.mean() - b.mean())

    @pytest.mark.parametrize(
        ("na", "nb", "sa", "sb"),
        [(2, 5000, 100.0, 0.01), (3, 4, 1e-3, 1e3), (500, 2, 1.0, 50.0), (1000, 1000, 1.0, 1.0)],
    )
    def test_very_unequal_groups(self, na, nb, sa, sb):
        """Welch with very unequal n and variances (df near its bounds) matches scipy."""
        rng = np.random.default_rng(na * 7 + nb)
        a, b = rng.normal(1.0, sa, na), rng.normal(0.0, sb, nb)
        c = procedures.two_sample(Summary.of(a), Summary.of(b))
        ref = stats.ttest_ind(a, b, equal_var=False)
        _check(c, ref, 0.95, "two-sided")
        assert min(na, nb) - 1 <= float(c.df) <= na + nb - 2  # Welch df bounds, common practice

    def test_means_near_1e9_keep_their_digits(self):
        """t for means near 1e9 with spread 1e-3 equals the exact t to 1e-12 (was 1e-4)."""
        from fractions import Fraction

        import mpmath as mp

        rng = np.random.default_rng(11)
        a = 1e9 + rng.normal(0.0004, 0.001, 100)
        b = 1e9 + rng.normal(0.0, 0.001, 100)

        def exact(x):  # exact mean and ssd of the stored doubles (Fractions, stdlib)
            m = sum(Fraction(v) for v in x) / len(x)
            return m, sum((Fraction(v) - m) ** 2 for v in x)

        (ma, sa), (mb, sb) = exact(a), exact(b)
        with mp.workdps(40):
            q = lambda f: mp.mpf(f.numerator) / f.denominator  # noqa: E731
            t_one = float(q(ma - 10**9) / mp.sqrt(q(sa) / (99 * 100)))
            t_two = float(q(ma - mb) / mp.sqrt((q(sa) + q(sb)) / (99 * 100)))
        c = procedures.one_sample(Summary.of(a), null=1e9)
        _close(c.t, t_one, rtol=1e-12)
        c = procedures.two_sample(Summary.of(a), Summary.of(b))
        _close(c.t, t_two, rtol=1e-12)

    @pytest.mark.parametrize("scale", [1e-150, 1e150])
    def test_welch_df_at_extreme_scales(self, scale):
        """Welch df stays finite and scale-free at 1e-150 and 1e150 (was nan: squares of v)."""
        rng = np.random.default_rng(21)
        a, b = rng.normal(0.0, 1.0, 6), rng.normal(0.5, 2.0, 9)
        c = procedures.two_sample(Summary.of(a * scale), Summary.of(b * scale))
        ref = stats.ttest_ind(a, b, equal_var=False)  # scipy on the unscaled values
        _close(c.df, ref.df, rtol=1e-12)
        _close(c.t, ref.statistic, rtol=1e-12)
        _close(c.p, ref.pvalue, rtol=1e-11)

    def test_tiny_p_keeps_relative_digits(self):
        """A large separation gives p ~ 1e-100: still equal to scipy to 1e-12 relative."""
        rng = np.random.default_rng(5)
        a, b = rng.normal(1.5, 1, 400), rng.normal(0, 1, 400)
        c = procedures.two_sample(Summary.of(a), Summary.of(b), pooled=True)
        ref = stats.ttest_ind(a, b)
        assert 0 < ref.pvalue < 1e-60
        _close(c.p, ref.pvalue)


class TestVectorised:
    def test_many_tests_at_once_match_scipy(self):
        """Arrays of 200 Welch tests in one call match scipy test by test."""
        rng = np.random.default_rng(77)
        k = 200
        groups_a = [
            rng.normal(0.3, rng.uniform(0.5, 3), int(rng.integers(2, 60))) for _ in range(k)
        ]
        groups_b = [
            rng.normal(0.0, rng.uniform(0.5, 3), int(rng.integers(2, 60))) for _ in range(k)
        ]

        def stack(gs):
            return Summary(
                np.array([g.size for g in gs], float),
                np.array([g.mean() for g in gs]),
                np.array([((g - g.mean()) ** 2).sum() for g in gs]),
            )

        c = procedures.two_sample(stack(groups_a), stack(groups_b), level=0.9, side="lower")
        for i in range(k):
            r = stats.ttest_ind(groups_a[i], groups_b[i], equal_var=False, alternative="less")
            _close(c.t[i], r.statistic)
            _close(c.df[i], r.df)
            _close(c.p[i], r.pvalue)
            _close(
                c.ci_high[i],
                r.confidence_interval(0.9).high,
                rtol=SCIPY_PPF_RTOL,
                # limits near 0: the reference's error is absolute there (c * se ~ 1)
                atol=1e-13 if SCIPY_PPF_RTOL <= 1e-12 else 1e-10,
            )


class TestEffect:
    def test_one_sample_d_is_mean_over_sd(self):
        """Cohen's d for one sample is (mean - null) / sd with the n - 1 sd (common practice)."""
        x = np.array([5.1, 4.9, 5.6, 5.8, 6.0])
        c = procedures.one_sample(Summary.of(x), null=5.0)
        _close(c.effect, (x.mean() - 5.0) / x.std(ddof=1))

    def test_hedges_g_definition(self):
        """Hedges' g = J(n1+n2-2) (m1 - m2) / s_pooled, J by Gamma functions (Hedges 1981)."""
        from scipy.special import gammaln

        a = np.array([5.2, 4.8, 6.1, 5.5, 5.9])
        b = np.array([4.1, 4.4, 3.9, 4.6])
        df = a.size + b.size - 2
        sp = np.sqrt(((a - a.mean()) ** 2).sum() + ((b - b.mean()) ** 2).sum()) / np.sqrt(df)
        j = np.exp(gammaln(df / 2) - gammaln((df - 1) / 2)) / np.sqrt(df / 2)
        c = procedures.two_sample(Summary.of(a), Summary.of(b))
        _close(c.effect, j * (a.mean() - b.mean()) / sp, rtol=1e-13)

    def test_effect_interval_contains_effect(self):
        """The effect interval brackets the point effect (both designs, all sides)."""
        s = Summary.of([2.0, 3.5, 1.0, 4.2, 3.3, 2.8])
        for side in ("two-sided", "upper", "lower"):
            c = procedures.one_sample(s, null=1.0, side=side)
            assert c.effect_low <= c.effect <= c.effect_high
