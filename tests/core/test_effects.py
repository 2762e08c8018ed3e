"""Effect-size machinery against mpmath.

References: the noncentral t cdf as a one-dimensional integral over the chi distribution,
P(T <= t | df, lam) = E[Phi(t * S - lam)] with S^2 ~ chi2(df) / df (the definition of the
noncentral t, e.g. Johnson, Kotz and Balakrishnan, Continuous Univariate Distributions
vol. 2, ch. 31, from memory), integrated by mpmath.quad at 25 digits; and Hedges' (1981)
correction J(df) = Gamma(df/2) / (sqrt(df/2) Gamma((df-1)/2)) with mpmath.gamma.
"""

from __future__ import annotations

import time

import mpmath as mp
import numpy as np
import pytest
from scipy import special

from tinfer.core.effects import hedges_j, ncp_interval

DIGITS = 25


@pytest.fixture(autouse=True)
def _mp_digits():
    """mpmath's precision is global: set it per test and restore it after."""
    with mp.workdps(DIGITS):
        yield


def mp_nct_cdf(t: float, df: float, lam: float) -> mp.mpf:
    """P(T <= t) for the noncentral t by quadrature over S = sqrt(chi2(df) / df)."""
    t, df, lam = mp.mpf(t), mp.mpf(df), mp.mpf(lam)
    log_k = mp.log(2) + (df / 2) * mp.log(df / 2) - mp.loggamma(df / 2)

    def integrand(s):
        if s == 0:
            return mp.mpf(0)
        return mp.ncdf(t * s - lam) * mp.exp(log_k + (df - 1) * mp.log(s) - df * s * s / 2)

    sd = 1 / mp.sqrt(2 * df)
    pts = {mp.mpf(0)} | {max(mp.mpf(0), 1 + k * sd) for k in (-8, -4, -2, -1, 0, 1, 2, 4, 8)}
    if t != 0 and lam / t > 0:  # where Phi switches from 0 to 1
        pts.add(lam / t)
    return mp.quad(integrand, [*sorted(pts), mp.inf])


CASES = [  # (observed t, df, level)
    (2.0, 9.0, 0.95),
    (-1.5, 3.0, 0.95),
    (0.0, 12.0, 0.9),
    (5.0, 40.0, 0.99),
    (30.0, 200.0, 0.95),
    (2.5, 1998.0, 0.95),
    (-8.0, 5.5, 0.8),
]


class TestNcpInterval:
    @pytest.mark.parametrize(("t", "df", "level"), CASES)
    def test_two_sided_limits_hit_the_tail_areas(self, t, df, level):
        """At the limits the observed t sits at the 1-alpha/2 and alpha/2 points (mpmath)."""
        lo, hi = (float(v) for v in ncp_interval(t, df, level, "two-sided"))
        alpha = 1 - level
        assert lo < hi
        assert abs(float(mp_nct_cdf(t, df, lo)) - (1 - alpha / 2)) < 1e-12
        assert abs(float(mp_nct_cdf(t, df, hi)) - alpha / 2) < 1e-12

    @pytest.mark.parametrize(("t", "df", "level"), [CASES[0], CASES[1], CASES[5]])
    def test_limits_match_a_50_digit_root(self, t, df, level):
        """Each limit is within 1e-10 relative of the root of the mpmath cdf found at 50 digits
        (mpmath quadrature and secant root finding, reference library)."""
        lo, hi = (float(v) for v in ncp_interval(t, df, level, "two-sided"))
        alpha = 1 - level
        with mp.workdps(50):
            for got, prob in ((lo, 1 - alpha / 2), (hi, alpha / 2)):
                start = (mp.mpf(got) * (1 - 1e-6) - 1e-9, mp.mpf(got) * (1 + 1e-6) + 1e-9)
                root = mp.findroot(lambda lam, p=prob: mp_nct_cdf(t, df, lam) - p, start)
                assert abs(got - float(root)) <= 1e-10 * abs(float(root))

    @pytest.mark.parametrize(("t", "df", "level"), CASES[:4])
    def test_one_sided_bounds(self, t, df, level):
        """'upper' gives a lower bound at 1 - alpha, 'lower' an upper bound at alpha (mpmath)."""
        alpha = 1 - level
        lo, inf = (float(v) for v in ncp_interval(t, df, level, "upper"))
        assert inf == np.inf
        assert abs(float(mp_nct_cdf(t, df, lo)) - (1 - alpha)) < 1e-12
        ninf, hi = (float(v) for v in ncp_interval(t, df, level, "lower"))
        assert ninf == -np.inf
        assert abs(float(mp_nct_cdf(t, df, hi)) - alpha) < 1e-12

    def test_zero_t_at_df_two_is_the_normal_interval(self):
        """At t = 0, P(T <= 0 | lam) = Phi(-lam) exactly, so the limits are -+1.95996...

        Source: the definition T = (Z + lam) / S; 1.959963984540054 = Phi^-1(0.975) (mpmath).
        """
        lo, hi = ncp_interval(0.0, 2.0, 0.95, "two-sided")
        z = float(mp.sqrt(2) * mp.erfinv(mp.mpf("0.95")))
        assert abs(float(lo) + z) < 1e-12 and abs(float(hi) - z) < 1e-12

    def test_vectorised(self):
        """An array of observed t gives the same limits as one call per value."""
        ts = np.array([0.5, 2.0, -3.0])
        lo, hi = ncp_interval(ts, 14.0, 0.95, "two-sided")
        for i, t in enumerate(ts):
            one = ncp_interval(t, 14.0, 0.95, "two-sided")
            assert lo[i] == pytest.approx(float(one[0]), rel=1e-14)
            assert hi[i] == pytest.approx(float(one[1]), rel=1e-14)

    @pytest.mark.parametrize("t", [1.7e7, -1.7e7, 1e9])
    def test_huge_t_returns_promptly(self, t):
        """Extreme t (NumAcc1 against 0 gives t = 1.7e7) ends in well under a second.

        scipy's nctdtrinc loops for ever there; the limits then come from the large-lam
        limit P(T <= t) ~ P(S >= lam / t): checked against mpmath's chi-square quantile.
        """
        start = time.perf_counter()
        lo, hi = (float(v) for v in ncp_interval(t, 2.0, 0.95, "two-sided"))
        assert time.perf_counter() - start < 2.0
        # chi2(2) upper quantile of p is -2 log p (closed form): lam = t * sqrt(q / 2)
        q_hi = float(-2 * mp.log(mp.mpf("0.975")))  # S large enough in 97.5% of cases
        q_lo = float(-2 * mp.log(mp.mpf("0.025")))
        want = sorted((abs(t) * np.sqrt(q_hi / 2), abs(t) * np.sqrt(q_lo / 2)))
        got = sorted((abs(lo), abs(hi)))
        assert got == pytest.approx(want, rel=1e-6)
        assert (lo > 0) == (t > 0)

    @pytest.mark.parametrize("t", [300.0, 3e4])
    def test_large_t_uses_the_exact_cdf(self, t):
        """At t = 300 and 3e4 (df=9) the limits satisfy the exact cdf (mpmath).

        Measured: 6e-16 at t = 300; near 1e-9 at t = 3e4, the accuracy of scipy's nctdtr
        there (the root is exact for nctdtr), hence the looser bound.
        """
        tol = 1e-14 if t < 1e3 else 1e-8
        lo, hi = (float(v) for v in ncp_interval(t, 9.0, 0.95, "two-sided"))
        assert abs(float(mp_nct_cdf(t, 9.0, lo)) - 0.975) < tol
        assert abs(float(mp_nct_cdf(t, 9.0, hi)) - 0.025) < tol


class TestHedgesJ:
    @pytest.mark.parametrize("df", [1.5, 2.0, 3.0, 10.0, 57.5, 100.0, 500.0, 998.0, 1e4, 1e6, 1e9])
    def test_matches_mpmath_gamma_ratio(self, df):
        """J(df) equals Gamma(df/2) / (sqrt(df/2) Gamma((df-1)/2)) to 2e-15 relative."""
        m = mp.mpf(df) / 2
        ref = mp.gamma(m) / (mp.sqrt(m) * mp.gamma(m - mp.mpf(1) / 2))
        assert abs(float(hedges_j(df)) - float(ref)) / float(ref) < 2e-15

    def test_approximation_and_limit(self):
        """Hedges' (1981) approximation 1 - 3/(4 df - 1) is close; J rises to 1 (from memory)."""
        for df, tol in ((10.0, 5e-4), (200.0, 1e-6)):
            assert abs(float(hedges_j(df)) - (1 - 3 / (4 * df - 1))) < tol
        assert 1 - float(hedges_j(1e8)) < 1e-8
        assert np.all(np.diff(hedges_j(np.array([2.0, 5.0, 20.0, 100.0]))) > 0)


class TestFastInversion:
    """The quick Newton-secant inversion agrees with the bracketed one it replaced."""

    @pytest.mark.parametrize("df_range", [(3.0, 10.0), (20.0, 60.0), (500.0, 5000.0)])
    def test_same_limits_as_the_bracketed_method(self, df_range):
        """Over 2,000 random (df, t) pairs both methods give the same limit to 1e-10
        relative; each solves scipy's nctdtr = prob (reference library)."""
        from tinfer.core.effects import _ncp_bracketed, _ncp_for_cdf

        rng = np.random.default_rng(17)
        df = rng.uniform(*df_range, 2000)
        t = rng.normal(0.0, 3.0, 2000)
        for prob in (0.025, 0.975):
            fast = _ncp_for_cdf(df, t, np.full(2000, prob))
            slow = _ncp_bracketed(df, t, np.full(2000, prob))
            rel = np.abs(fast - slow) / np.maximum(np.abs(slow), 1e-300)
            assert rel.max() < 1e-10
            np.testing.assert_allclose(special.nctdtr(df, fast, t), prob, rtol=0, atol=1e-12)
