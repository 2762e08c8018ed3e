"""The studentized range and Dunnett's distribution against outside references.

References:
- Student's t (scipy.special.stdtr): with k = 2 means the studentized range is
  ``sqrt(2) |T|``, and Dunnett's statistic with one comparison is ``|T|`` (by definition);
- mpmath quadrature of the normal-theory tails (df = inf) at 30 digits, and stored values of
  the full double integral computed with mpmath at 20 digits by nested quadrature (about
  two minutes each, so they are stored; the function that made them is ``_mp_range_sf``);
- scipy.stats.studentized_range and scipy.stats.tukey_hsd (reference library);
- scipy.stats.dunnett (randomised quasi-Monte Carlo, so agreement is to about 1e-4);
- printed tables of the studentized range (Harter 1960) and of Dunnett (1955, 1964), from
  memory, to the three or two decimals they print.
"""

from __future__ import annotations

import mpmath as mp
import numpy as np
import pytest
from scipy import integrate, special, stats

from tinfer.core import simultaneous as sim
from tinfer.core.studentize import tail


def _mp_range_tail(r: float, k: int) -> float:
    """G_k(r) = P(range of k standard normals > r) at 30 digits (mpmath quadrature)."""
    with mp.workdps(30):
        r = mp.mpf(r)

        def f(z):
            return mp.npdf(z) * (mp.ncdf(z) ** (k - 1) - (mp.ncdf(z) - mp.ncdf(z - r)) ** (k - 1))

        c = r / 2
        return float(k * mp.quad(f, [-mp.inf, -8, c - 4, c, c + 4, mp.inf]))


def _mp_range_sf(q: float, k: int, df: float) -> float:  # pragma: no cover - slow, documented
    """The full tail P(Q > q) at 20 digits: G_k(q s) averaged over S = sqrt(chi2/df)."""
    with mp.workdps(20):
        q, df = mp.mpf(q), mp.mpf(df)
        log_k = mp.log(2) + (df / 2) * mp.log(df / 2) - mp.loggamma(df / 2)

        def dens(s):
            return mp.exp(log_k + (df - 1) * mp.log(s) - df * s * s / 2)

        sd = 1 / mp.sqrt(2 * df)
        pts = sorted({mp.mpf(0)} | {max(mp.mpf(0), 1 + j * sd) for j in (-8, -4, -2, 0, 2, 4, 8)})
        return float(mp.quad(lambda s: dens(s) * _mp_range_tail(q * s, k) if s > 0 else 0, pts))


# (q, k, df, P(Q > q)) from _mp_range_sf
STORED = [
    (3.0, 3, 1000.0, 0.08605419152067023),
    (5.0, 4, 1000.0, 0.002400312334937915),
    (3.0, 3, 3.0, 0.23252643067685155),
    (8.0, 4, 57.5, 3.0022931383811635e-06),
]


class TestRangeTail:
    def test_k2_is_students_t_everywhere(self):
        """k = 2: P(Q > q) = 2 P(T > q / sqrt 2) over df 1..1e6 and p down to 1e-100
        (scipy.special.stdtr), within 1e-12 relative."""
        rng = np.random.default_rng(5)
        df = np.exp(rng.uniform(0, np.log(1e6), 4000))
        q = np.exp(rng.uniform(np.log(0.01), np.log(3e3), 4000))
        exact = 2.0 * special.stdtr(df, -q / np.sqrt(2.0))
        keep = exact > 1e-100
        # the general machinery, not the k = 2 shortcut of range_sf
        got = tail(
            q, df, lambda r, i: sim.range_log_g(r, 2), lambda r, i: sim.range_bound(r, 2), 0.25
        )
        assert np.max(np.abs(got[keep] / exact[keep] - 1)) < 1e-12

    @pytest.mark.parametrize("k", [3, 5, 10])
    @pytest.mark.parametrize("r", [0.5, 2.0, 4.0, 7.0])
    def test_normal_theory_tail_matches_mpmath(self, k, r):
        """df = inf: G_k(r) against mpmath's quadrature at 30 digits, 1e-13 relative."""
        got = float(sim.range_sf(r, k, np.inf))
        assert got == pytest.approx(_mp_range_tail(r, k), rel=1e-13)

    @pytest.mark.parametrize(("q", "k", "df", "ref"), STORED)
    def test_full_tail_matches_stored_mpmath_values(self, q, k, df, ref):
        """Finite df: the double integral against mpmath's nested quadrature, 1e-13 relative."""
        assert float(sim.range_sf(q, k, df)) == pytest.approx(ref, rel=1e-13)

    @pytest.mark.parametrize("k", [3, 4, 6, 10])
    @pytest.mark.parametrize("df", [3.0, 10.0, 57.5])
    def test_matches_scipy_studentized_range(self, k, df):
        """Against scipy.stats.studentized_range.sf: 1e-8 relative for p above 1e-6 (scipy's own
        accuracy is the limit here; the stored mpmath values above are tighter)."""
        q = np.array([0.5, 1.0, 2.0, 3.0, 4.0, 5.0, 6.0])
        ref = stats.studentized_range.sf(q, k, df)
        got = sim.range_sf(q, k, df)
        keep = ref > 1e-6
        np.testing.assert_allclose(got[keep], ref[keep], rtol=1e-8)

    def test_edges(self):
        """q = 0 gives 1, q = inf gives 0, NaN stays NaN; the tail falls as q grows."""
        got = sim.range_sf(np.array([0.0, np.inf, np.nan, 1.0, 2.0]), 4, 12.0)
        assert got[0] == 1.0 and got[1] == 0.0 and np.isnan(got[2])
        assert 1.0 > got[3] > got[4] > 0.0


class TestRangeCritical:
    # Harter (1960) tables of the studentized range, upper 5% points (from memory)
    @pytest.mark.parametrize(
        ("k", "df", "q"),
        [
            (3, 10.0, 3.877),
            (4, 20.0, 3.958),
            (5, np.inf, 3.858),
            (10, 30.0, 4.824),
            (2, np.inf, 2.772),
        ],
    )
    def test_printed_table(self, k, df, q):
        """Upper 5% points to the table's three decimals."""
        assert abs(float(sim.range_critical(0.95, k, df)) - q) <= 5e-4

    def test_inverts_the_tail(self):
        """range_sf(range_critical(level)) = 1 - level to 1e-11 over random df (consistency;
        300 df values read the critical values from the table)."""
        df = np.exp(np.random.default_rng(2).uniform(0, np.log(5000), 300))
        for k, level in ((3, 0.95), (7, 0.99)):
            q = sim.range_critical(level, k, df)
            np.testing.assert_allclose(sim.range_sf(q, k, df), 1 - level, rtol=1e-11)

    def test_table_for_many_df_matches_solving_each(self):
        """Batches read critical values from a Chebyshev table in 1/df: within 2e-13 of
        solving each df (consistency), df from 1 to 1e6 and infinity."""
        df = np.r_[np.exp(np.random.default_rng(4).uniform(0, np.log(1e6), 400)), np.inf]
        many = sim.range_critical(0.95, 5, df)
        one_by_one = np.array([float(sim.range_critical(0.95, 5, v)) for v in df[::20]])
        np.testing.assert_allclose(many[::20], one_by_one, rtol=2e-13)

    def test_matches_scipy_ppf(self):
        """Against scipy.stats.studentized_range.ppf at a few df, 1e-9 relative."""
        for k, df in ((3, 5.0), (5, 24.0), (8, 120.0)):
            ref = stats.studentized_range.ppf(0.95, k, df)
            assert float(sim.range_critical(0.95, k, df)) == pytest.approx(ref, rel=1e-9)


def _mp_dunnett_tail(r: float, lam: list[float], side: str) -> float:
    """Normal-theory Dunnett tail at 30 digits: 1 - int phi(w) prod P(no exceedance | w) dw."""
    with mp.workdps(30):
        r = mp.mpf(r)
        lams = [mp.mpf(v) for v in lam]

        def inside(w):
            out = mp.npdf(w)
            for la in lams:
                rho = mp.sqrt(1 - la * la)
                upper = mp.ncdf((r - la * w) / rho)
                out *= upper - mp.ncdf((-r - la * w) / rho) if side == "two-sided" else upper
            return out

        return float(1 - mp.quad(inside, [-mp.inf, -6, 0, 6, mp.inf]))


class TestDunnett:
    def test_one_comparison_is_students_t(self):
        """m = 1: P(|T| > c) and P(T > c), also for c < 0 (scipy.special.stdtr), 1e-12."""
        rng = np.random.default_rng(3)
        df = np.exp(rng.uniform(0, np.log(1e5), 200))
        c = rng.uniform(-4, 8, 200)
        lam = np.full((200, 1), 0.6)
        two = sim.dunnett_sf(np.abs(c)[:, None], lam, df, "two-sided")[:, 0]
        one = sim.dunnett_sf(c[:, None], lam, df, "upper")[:, 0]
        np.testing.assert_allclose(two, 2 * special.stdtr(df, -np.abs(c)), rtol=1e-12)
        np.testing.assert_allclose(one, special.stdtr(df, -c), rtol=1e-12)

    @pytest.mark.parametrize("side", ["two-sided", "upper"])
    @pytest.mark.parametrize("r", [1.0, 2.5, 4.0])
    def test_normal_theory_tail_matches_mpmath(self, side, r):
        """df = inf, three unequal arms: against mpmath's quadrature at 30 digits, 1e-12."""
        lam = [0.55, 0.7, 0.8]
        got = float(sim.dunnett_sf([[r]], [lam], [np.inf], side)[0, 0])
        assert got == pytest.approx(_mp_dunnett_tail(r, lam, side), rel=1e-12)

    def test_all_below_branch_matches_bivariate_normal(self):
        """One-sided tail at c < 0, df = inf: 1 - P(Z1 <= c, Z2 <= c) with correlation
        rho = lam1 lam2, written out by conditioning on Z1 (common practice, no source) and
        integrated with scipy.integrate.quad, 1e-7. (scipy.stats.multivariate_normal.cdf
        is randomised quasi-Monte Carlo on some scipy versions: 1e-5 apart between calls.)"""
        lam = np.array([0.6, 0.75])
        rho, c = lam[0] * lam[1], -0.8
        both, _ = integrate.quad(
            lambda z: stats.norm.pdf(z) * stats.norm.cdf((c - rho * z) / np.sqrt(1 - rho**2)),
            -np.inf,
            c,
            epsabs=1e-13,
        )
        ref = 1 - both
        got = float(sim.dunnett_sf([[-0.8]], [lam], [np.inf], "upper")[0, 0])
        assert got == pytest.approx(ref, abs=1e-7)

    # Dunnett (1955) one-sided and Dunnett (1964) two-sided tables, 5%, equal sizes, from memory
    @pytest.mark.parametrize(
        ("m", "df", "two", "one"),
        [(2, np.inf, 2.21, 1.92), (3, np.inf, 2.35, 2.06), (4, np.inf, 2.44, 2.16),
         (2, 10.0, 2.57, 2.15), (3, 10.0, 2.76, 2.34)],
    )  # fmt: skip
    def test_printed_tables(self, m, df, two, one):
        """Critical values to the tables' two decimals."""
        lam = np.full((1, m), np.sqrt(0.5))
        assert abs(float(sim.dunnett_critical(0.95, lam, [df])[0]) - two) <= 0.005
        assert abs(float(sim.dunnett_critical(0.95, lam, [df], "upper")[0]) - one) <= 0.005

    def test_many_families_at_once(self):
        """Families of different sizes (NaN-padded) give what each gives alone."""
        lam = np.array([[0.6, 0.7, np.nan], [0.5, 0.55, 0.65]])
        c = np.array([[2.1, 1.0, 0.0], [2.4, 0.3, 1.7]])
        both = sim.dunnett_sf(c, lam, [14.0, 30.0])
        first = sim.dunnett_sf(c[:1, :2], lam[:1, :2], [14.0])
        second = sim.dunnett_sf(c[1:], lam[1:], [30.0])
        np.testing.assert_allclose(both[0, :2], first[0], rtol=1e-14)
        np.testing.assert_allclose(both[1], second[0], rtol=1e-14)
