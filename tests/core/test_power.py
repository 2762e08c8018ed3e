"""Exact power, sample size and sensitivity of t tests: tinfer.core.power."""

from __future__ import annotations

import math

import mpmath
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from references import nct_power
from scipy import integrate, stats

from tinfer.core import power as pw

# ----------------------------------------------------------------------------- references


def tost_power_quad(diff, low, high, n1, n2=None, sd=1.0, level=0.95):
    """TOST power by adaptive quadrature (scipy.integrate.quad) with scipy.stats.chi."""
    if n2 is None:
        df, k = n1 - 1, 1 / math.sqrt(n1)
    else:
        df, k = n1 + n2 - 2, math.sqrt(1 / n1 + 1 / n2)
    c = stats.t.ppf(level, df)
    d_up, d_low = (high - diff) / (sd * k), (low - diff) / (sd * k)
    u_max = (d_up - d_low) / (2 * c)

    def f(u):
        g = stats.norm.cdf(d_up - c * u) - stats.norm.cdf(d_low + c * u)
        return g * stats.chi.pdf(u * math.sqrt(df), df) * math.sqrt(df)

    return integrate.quad(f, 0, u_max, limit=200, epsabs=1e-13)[0]


# ---------------------------------------------------------------- power_from_ncp / t_power
class TestTPower:
    @pytest.mark.parametrize("side", ["two-sided", "upper", "lower"])
    def test_matches_scipy_nct(self, side):
        """Power agrees with scipy.stats.nct (reference library) on a grid of designs."""
        effects = np.array([-0.8, -0.3, 0.0, 0.2, 0.5, 1.1])
        for n1, n2 in [(5, None), (30, None), (200, None), (8, 8), (20, 35), (150, 90)]:
            for level in (0.9, 0.95, 0.99):
                got = pw.t_power(effects, n1, n2, level=level, side=side)
                want = np.array([nct_power(e, n1, n2, level, side) for e in effects])
                ok = np.isfinite(want)  # scipy gives nan far out in a tail; tested below
                assert ok.sum() >= 5
                np.testing.assert_allclose(got[ok], want[ok], rtol=1e-10, atol=1e-15)

    def test_size_at_zero_effect(self):
        """With no effect the rejection rate is the significance level (definition of size)."""
        for side in ("two-sided", "upper", "lower"):
            got = pw.power_from_ncp(0.0, [3, 17, 400], 0.95, side)
            np.testing.assert_allclose(got, 0.05, rtol=1e-10)

    def test_matches_mpmath_integral(self):
        """Noncentral t tail agrees with mpmath quadrature of E[Phi(x U - ncp)] (independent)."""
        mpmath.mp.dps = 30

        def cdf(df, ncp, x):
            # U = chi_df / sqrt(df); density of U is 2 df u f_chi2(df u^2)
            def f(u):
                dens = (
                    2 * df * u * (df * u * u) ** (df / 2 - 1) * mpmath.e ** (-df * u * u / 2)
                ) / (mpmath.mpf(2) ** (df / 2) * mpmath.gamma(df / 2))
                return mpmath.ncdf(x * u - ncp) * dens

            return float(mpmath.quad(f, [0, 1, 3, mpmath.inf]))

        for df, ncp, x in [(9, 1.5, 2.262), (24, 3.0, -2.064), (4, -0.7, 1.2)]:
            assert pw.nct_cdf(df, ncp, x) == pytest.approx(cdf(df, ncp, x), rel=1e-9, abs=1e-14)

    def test_far_tails_are_finite(self):
        """Huge noncentrality gives power 1 where scipy.special.nctdtr alone returns nan."""
        got = pw.t_power([3.0, 6.0, 12.0], 40)  # ncp about 19, 38 and 76
        assert np.all(np.isfinite(got))
        np.testing.assert_allclose(got, 1.0, rtol=1e-12)
        # the lower-side tail far below the bulk is 0, not nan
        assert pw.t_power(6.0, 40, side="lower") == pytest.approx(0.0, abs=1e-30)

    def test_monte_carlo_one_sample(self):
        """Seeded simulation with scipy.stats.ttest_1samp agrees with the exact power (4 SE)."""
        rng = np.random.default_rng(20261201)
        reps, n, d = 20000, 15, 0.6
        x = rng.normal(loc=d, scale=1.0, size=(reps, n))
        rate = np.mean(stats.ttest_1samp(x, 0.0, axis=1).pvalue < 0.05)
        exact = float(pw.t_power(d, n))
        se = math.sqrt(exact * (1 - exact) / reps)
        assert abs(rate - exact) < 4 * se

    def test_monte_carlo_two_sample_one_sided(self):
        """Seeded simulation with scipy.stats.ttest_ind (pooled, upper) agrees within 4 SE."""
        rng = np.random.default_rng(7)
        reps, n1, n2, d = 20000, 12, 18, 0.7
        a = rng.normal(loc=d, size=(reps, n1))
        b = rng.normal(loc=0.0, size=(reps, n2))
        p = stats.ttest_ind(a, b, axis=1, alternative="greater").pvalue
        rate = np.mean(p < 0.10)
        exact = float(pw.t_power(d, n1, n2, level=0.90, side="upper"))
        se = math.sqrt(exact * (1 - exact) / reps)
        assert abs(rate - exact) < 4 * se


# ----------------------------------------------------------------------------- solve_n
class TestSolveN:
    def test_cohen_table_exact(self):
        """Exact n per group, two-sample, alpha .05 two-sided, power .80: 394, 64, 26.

        Cohen (1988) table 2.4.1 lists 393, 64, 26 (from memory); his table uses an
        approximation, and the exact noncentral t needs 394 for d = 0.2 (checked below
        against scipy.stats.nct).
        """
        got = pw.solve_n([0.2, 0.5, 0.8], power=0.8, two_sample=True)
        assert got.tolist() == [394, 64, 26]
        assert nct_power(0.2, 393, 393) < 0.8 <= nct_power(0.2, 394, 394)  # scipy.stats.nct

    def test_cohen_table_within_one(self):
        """Agrees with Cohen (1988) table 2.4.1 (from memory: 393, 64, 26) within +-1."""
        got = pw.solve_n([0.2, 0.5, 0.8], power=0.8, two_sample=True)
        np.testing.assert_array_less(np.abs(got - np.array([393, 64, 26])), 1.5)

    @pytest.mark.parametrize("side", ["two-sided", "upper", "lower"])
    @pytest.mark.parametrize("two", [False, True])
    def test_smallest_n_reaching_target(self, side, two):
        """At the solved n power >= target and at n - 1 below it (scipy.stats.nct reference)."""
        sign = -1.0 if side == "lower" else 1.0
        effects = sign * np.array([0.15, 0.35, 0.6, 1.0, 1.8])
        for target in (0.5, 0.8, 0.95):
            n = pw.solve_n(effects, power=target, level=0.95, side=side, two_sample=two)
            for e, k in zip(effects, n, strict=True):
                k = int(k)
                at = nct_power(e, k, k if two else None, 0.95, side)
                assert at >= target
                if k > 2:
                    below = nct_power(e, k - 1, k - 1 if two else None, 0.95, side)
                    assert below < target

    def test_unequal_allocation(self):
        """With ratio 2 the second group is twice the first and n1 is the smallest that works."""
        n1 = int(pw.solve_n(0.5, power=0.9, two_sample=True, ratio=2.0))
        assert nct_power(0.5, n1, 2 * n1) >= 0.9 > nct_power(0.5, n1 - 1, 2 * (n1 - 1))

    def test_normal_approximation_is_not_larger(self):
        """The normal-approximation n never exceeds the exact n (common practice, no source)."""
        effects = np.array([0.3, 0.5, 0.8, 1.2, 2.0])
        z = stats.norm.ppf(0.975) + stats.norm.ppf(0.8)  # scipy.stats.norm
        approx_two = np.ceil(2 * (z / effects) ** 2)
        approx_one = np.ceil((z / effects) ** 2)
        assert np.all(approx_two <= pw.solve_n(effects, power=0.8, two_sample=True))
        assert np.all(approx_one <= pw.solve_n(effects, power=0.8))

    def test_unreachable_is_nan(self):
        """No effect, or an effect against a one-sided alternative, cannot reach the target."""
        got = pw.solve_n([0.0, -0.5, 0.5], power=0.8, side="upper")
        assert np.isnan(got[0]) and np.isnan(got[1]) and got[2] == 27  # 27: scipy check below
        assert nct_power(0.5, 26, side="upper") < 0.8 <= nct_power(0.5, 27, side="upper")

    def test_grid_equals_single_solves(self):
        """A 200-point grid solved at once equals the points solved one by one."""
        effects = np.linspace(0.1, 2.0, 200)
        grid = pw.solve_n(effects, power=0.85, two_sample=True, ratio=1.5)
        single = [
            float(pw.solve_n(e, power=0.85, two_sample=True, ratio=1.5)) for e in effects[::37]
        ]
        assert grid[::37].tolist() == single


# ----------------------------------------------------------------------------- solve_effect
class TestSolveEffect:
    @pytest.mark.parametrize("side", ["two-sided", "upper", "lower"])
    def test_power_at_solved_effect_is_target(self, side):
        """The sensitivity effect has exactly the target power (scipy.stats.nct reference)."""
        for n1, n2 in [(6, None), (40, None), (10, 14), (120, 120)]:
            e = pw.solve_effect(n1, n2, power=np.array([0.5, 0.8, 0.99]), side=side)
            assert np.all(e < 0) if side == "lower" else np.all(e > 0)
            for ei, target in zip(e, (0.5, 0.8, 0.99), strict=True):
                assert nct_power(ei, n1, n2, 0.95, side) == pytest.approx(target, abs=1e-10)

    def test_power_not_above_size_is_nan(self):
        """A target power at or below the significance level has no positive solution."""
        assert np.isnan(pw.solve_effect(20, power=0.04))

    @settings(max_examples=40, deadline=None)
    @given(
        effect=st.floats(0.05, 2.5),
        n=st.integers(3, 300),
        side=st.sampled_from(["two-sided", "upper"]),
        level=st.sampled_from([0.9, 0.95, 0.99]),
    )
    def test_round_trip(self, effect, n, side, level):
        """Power at an effect, then the effect at that power, gives the effect back."""
        p = float(pw.t_power(effect, n, level=level, side=side))
        if not 1 - level + 1e-6 < p < 1 - 1e-9:
            return  # flat ends: power carries no information about the effect there
        back = float(pw.solve_effect(n, power=p, level=level, side=side))
        assert back == pytest.approx(effect, rel=1e-6)


# ----------------------------------------------------------------------------- equivalence_power
class TestEquivalencePower:
    @pytest.mark.parametrize(
        "diff, low, high, n1, n2",
        [
            (0.0, -0.5, 0.5, 40, None),
            (0.1, -0.5, 0.5, 36, None),
            (0.3, -0.4, 0.6, 5, None),
            (0.0, -1.0, 1.0, 2, None),
            (0.0, -0.05, 0.05, 5000, None),
            (0.2, -0.5, 0.5, 20, 30),
            (-0.1, -0.3, 0.4, 150, 100),
        ],
    )
    def test_matches_adaptive_quadrature(self, diff, low, high, n1, n2):
        """Fixed Gauss-Legendre rule agrees with scipy.integrate.quad of the same integral."""
        got = float(pw.equivalence_power(diff, low, high, n1, n2))
        assert got == pytest.approx(tost_power_quad(diff, low, high, n1, n2), abs=1e-10)

    def test_one_margin_is_one_sided_t(self):
        """With one margin infinite the TOST power is the one-sided noncentral t power (scipy)."""
        for n1, n2 in [(10, None), (25, 40)]:
            got = float(pw.equivalence_power(0.1, -0.4, np.inf, n1, n2, level=0.95))
            # shifted null: effect 0.5 above the lower margin, one-sided upper test
            assert got == pytest.approx(nct_power(0.5, n1, n2, 0.95, "upper"), abs=1e-10)

    def test_monte_carlo_paired(self):
        """Seeded simulation of two one-sided ttest_1samp tests agrees within 4 SE."""
        rng = np.random.default_rng(11)
        reps, n, sd, diff, low, high = 20000, 30, 2.0, 0.3, -1.0, 1.2
        x = rng.normal(loc=diff, scale=sd, size=(reps, n))
        p_low = stats.ttest_1samp(x, low, axis=1, alternative="greater").pvalue
        p_high = stats.ttest_1samp(x, high, axis=1, alternative="less").pvalue
        rate = np.mean((p_low < 0.05) & (p_high < 0.05))
        exact = float(pw.equivalence_power(diff, low, high, n, sd=sd))
        se = math.sqrt(exact * (1 - exact) / reps)
        assert abs(rate - exact) < 4 * se

    def test_monte_carlo_two_sample(self):
        """Seeded simulation with pooled scipy.stats.ttest_ind, both one-sided, within 4 SE."""
        rng = np.random.default_rng(12)
        reps, n1, n2, diff, margin = 20000, 25, 35, 0.1, 0.6
        a = rng.normal(loc=diff, size=(reps, n1))
        b = rng.normal(size=(reps, n2))
        p_low = stats.ttest_ind(a + margin, b, axis=1, alternative="greater").pvalue
        p_high = stats.ttest_ind(a - margin, b, axis=1, alternative="less").pvalue
        rate = np.mean((p_low < 0.05) & (p_high < 0.05))
        exact = float(pw.equivalence_power(diff, -margin, margin, n1, n2))
        se = math.sqrt(exact * (1 - exact) / reps)
        assert abs(rate - exact) < 4 * se

    def test_solve_n_smallest(self):
        """Solved TOST n reaches the target and n - 1 does not (scipy.integrate.quad reference)."""
        for diff, two in [(0.0, False), (0.15, False), (0.0, True)]:
            n = int(pw.solve_n_equivalence(diff, -0.5, 0.5, power=0.8, two_sample=two))
            n2, m2 = (n, n - 1) if two else (None, None)
            assert tost_power_quad(diff, -0.5, 0.5, n, n2) >= 0.8
            assert tost_power_quad(diff, -0.5, 0.5, n - 1, m2) < 0.8

    def test_outside_margin_unreachable(self):
        """A true difference on a margin never reaches 80% power (size at most alpha)."""
        assert np.isnan(pw.solve_n_equivalence(0.5, -0.5, 0.5, power=0.8))
