"""tinfer.tdist: handbook critical values and the textbook facts of the t distribution."""

from __future__ import annotations

import itertools
import math

import mpmath as mp
import numpy as np
import pytest
from scipy import special

import tinfer

DIGITS = 30


@pytest.fixture(autouse=True)
def _mp_digits():
    """mpmath's precision is global: set it per test and restore it after."""
    with mp.workdps(DIGITS):
        yield


# Critical values of Student's t as printed (three decimals) in the usual handbook table,
# e.g. NIST/SEMATECH e-Handbook of Statistical Methods, section 1.3.6.7.2 "Critical values
# of the Student's t distribution" (values from memory). (df, level, side, printed value)
TABLE = [
    (1, 0.95, "two-sided", 12.706),
    (2, 0.95, "two-sided", 4.303),
    (5, 0.95, "two-sided", 2.571),
    (10, 0.95, "two-sided", 2.228),
    (20, 0.95, "two-sided", 2.086),
    (30, 0.95, "two-sided", 2.042),
    (math.inf, 0.95, "two-sided", 1.960),
    (1, 0.99, "two-sided", 63.657),
    (10, 0.99, "two-sided", 3.169),
    (30, 0.99, "two-sided", 2.750),
    (math.inf, 0.99, "two-sided", 2.576),
    (1, 0.95, "upper", 6.314),
    (10, 0.95, "upper", 1.812),
    (30, 0.95, "upper", 1.697),
    (math.inf, 0.95, "upper", 1.645),
    (10, 0.99, "upper", 2.764),
    (10, 0.95, "lower", -1.812),
]


class TestCritical:
    @pytest.mark.parametrize(("df", "level", "side", "printed"), TABLE)
    def test_handbook_table(self, df, level, side, printed):
        """Critical values agree with the printed table to its three decimals."""
        assert abs(tinfer.tdist(df).critical(level, side) - printed) <= 0.0005

    def test_converges_monotonically_to_the_normal(self):
        """95% two-sided critical values fall toward 1.959964 as df grows (common practice)."""
        z = float(special.ndtri(0.975))  # normal quantile, scipy reference
        crit = [tinfer.tdist(df).critical(0.95) for df in (1, 2, 3, 5, 10, 30, 100, 1e3, 1e5)]
        assert all(a > b for a, b in itertools.pairwise(crit))
        assert crit[-1] > z and crit[-1] - z < 1e-4
        assert tinfer.tdist(math.inf).critical(0.95) == pytest.approx(z, rel=1e-15)

    def test_bad_level_and_side(self):
        """level outside (0, 1) and an unknown side raise TinferError and ValueError."""
        with pytest.raises(tinfer.TinferError, match="'level' parameter of critical"):
            tinfer.tdist(5).critical(95)
        with pytest.raises(ValueError, match="'side' parameter of critical"):
            tinfer.tdist(5).critical(0.95, "both")


class TestMoments:
    def test_median_is_zero(self):
        """The median is 0 for every df (symmetry; common practice, no source)."""
        for df in (0.5, 1, 3, math.inf):
            assert tinfer.tdist(df).median == 0.0
            assert tinfer.tdist(df).percentile(0.5) == 0.0

    def test_mean(self):
        """Mean 0 for df > 1, undefined for df <= 1 (common practice, no source)."""
        assert tinfer.tdist(1.5).mean == 0.0 and tinfer.tdist(40).mean == 0.0
        assert math.isnan(tinfer.tdist(1).mean) and math.isnan(tinfer.tdist(0.7).mean)

    def test_variance(self):
        """Variance df/(df-2) for df > 2 (20/18 at df=20), infinite for 1 < df <= 2."""
        # common practice, no source
        assert tinfer.tdist(20).variance == pytest.approx(20 / 18, rel=1e-15)
        assert tinfer.tdist(5).sd == pytest.approx(math.sqrt(5 / 3), rel=1e-15)
        assert tinfer.tdist(2).variance == math.inf and tinfer.tdist(1.5).variance == math.inf
        assert tinfer.tdist(math.inf).variance == 1.0

    def test_variance_matches_numerical_second_moment(self):
        """df/(df-2) equals the integral of t^2 times the density (mpmath quad, df=7)."""
        df = mp.mpf(7)
        c = mp.gamma((df + 1) / 2) / (mp.sqrt(df * mp.pi) * mp.gamma(df / 2))
        m2 = mp.quad(
            lambda x: x * x * c * (1 + x * x / df) ** (-(df + 1) / 2), [-mp.inf, 0, mp.inf]
        )
        assert tinfer.tdist(7).variance == pytest.approx(float(m2), rel=1e-12)


class TestNormalLimit:
    def test_df_inf_is_the_normal(self):
        """df = inf gives the standard normal pdf, cdf and percentiles (scipy.special)."""
        z = tinfer.tdist(math.inf)
        x = np.array([-4.0, -1.0, 0.0, 0.7, 3.0])
        np.testing.assert_allclose(z.cdf(x), special.ndtr(x), rtol=1e-15)
        np.testing.assert_allclose(z.pdf(x), np.exp(-x * x / 2) / np.sqrt(2 * np.pi), rtol=1e-15)
        assert z.percentile(0.975) == pytest.approx(float(special.ndtri(0.975)), rel=1e-15)
        assert str(z).endswith("(standard normal)")

    def test_density_at_zero_rises_to_the_normal(self):
        """pdf(0) increases with df toward 1/sqrt(2 pi) (common practice, no source)."""
        vals = [tinfer.tdist(df).pdf(0.0) for df in (1, 2, 5, 20, 100, 1e4, 1e8)]
        assert all(a < b for a, b in itertools.pairwise(vals))
        assert vals[-1] == pytest.approx(1 / math.sqrt(2 * math.pi), rel=1e-8)
        assert vals[0] == pytest.approx(1 / math.pi, rel=1e-15)  # Cauchy density at 0


class TestSymmetry:
    @pytest.mark.parametrize("df", [0.5, 3.0, 27.5])
    def test_cdf_and_sf_mirror(self, df):
        """cdf(-x) = sf(x) and pdf(-x) = pdf(x) exactly (symmetry; common practice)."""
        d = tinfer.tdist(df)
        x = np.array([0.1, 1.0, 4.0, 80.0])
        np.testing.assert_array_equal(d.cdf(-x), d.sf(x))
        np.testing.assert_array_equal(d.pdf(-x), d.pdf(x))
        np.testing.assert_allclose(d.percentile(0.1), -d.percentile(0.9), rtol=1e-14)


class TestArea:
    @pytest.mark.parametrize(("low", "high"), [(-1.0, 2.0), (0.5, 3.0), (-3.0, -0.2), (-2.5, 2.5)])
    def test_area_is_difference_of_cdfs(self, low, high):
        """area(low, high) = cdf(high) - cdf(low) (mpmath betainc reference, df=12)."""
        df = mp.mpf(12)

        def mp_cdf(x):
            x = mp.mpf(x)
            half = mp.betainc(df / 2, mp.mpf(1) / 2, 0, df / (df + x * x), regularized=True) / 2
            return 1 - half if x > 0 else half

        ref = float(mp_cdf(high) - mp_cdf(low))
        assert tinfer.tdist(12).area(low=low, high=high) == pytest.approx(ref, rel=1e-13)

    def test_tiny_tail_areas_keep_relative_precision(self):
        """An area far in the tail, 1e3 < T < 2e3 at df=5, is right to 1e-12 relative."""
        df = mp.mpf(5)

        def mp_sf(x):
            return mp.betainc(df / 2, mp.mpf(1) / 2, 0, df / (df + x * x), regularized=True) / 2

        ref = float(mp_sf(1e3) - mp_sf(2e3))
        got = tinfer.tdist(5).area(low=1e3, high=2e3)
        assert 0 < ref < 1e-13
        assert got == pytest.approx(ref, rel=1e-12)
        assert tinfer.tdist(5).area(low=1e3) == pytest.approx(float(mp_sf(1e3)), rel=1e-12)

    def test_single_tails(self):
        """Leaving out a bound gives a tail; the two tails plus the middle make 1."""
        d = tinfer.tdist(8)
        total = d.area(high=-1.0) + d.area(low=-1.0, high=1.5) + d.area(low=1.5)
        assert total == pytest.approx(1.0, rel=1e-15)


class TestConstruction:
    @pytest.mark.parametrize("df", [0, -2, float("nan"), "ten", True])
    def test_bad_df(self, df):
        """df must be a positive number: TinferError (a ValueError) otherwise."""
        with pytest.raises(tinfer.TinferError, match="'df' parameter of tdist"):
            tinfer.tdist(df)
