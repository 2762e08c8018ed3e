"""tinfer.core.distribution against mpmath at 40 digits.

Reference: the t tail area as the regularised incomplete beta function,
P(T > t) = I_x(df/2, 1/2) / 2 with x = df / (df + t^2), for t >= 0 (Abramowitz and Stegun
26.7.1), evaluated with mpmath.betainc; the density from mpmath.loggamma.
"""

from __future__ import annotations

import math

import mpmath as mp
import numpy as np
import pytest

from tinfer.core import distribution as dist

DIGITS = 40


@pytest.fixture(autouse=True)
def _mp_digits():
    """mpmath's precision is global: set it per test and restore it after."""
    with mp.workdps(DIGITS):
        yield


DFS = (0.5, 1.0, 1.5, 2.0, 2.5, 3.0, 7.3, 10.0, 30.0, 100.0, 1e3, 1e6)
TS = (-50.0, -3.0, -1.0, -0.1, 0.0, 0.3, 1.0, 2.0, 5.0, 20.0, 1e2, 1e4, 1e8, 1e20, 1e100, 1e200)


def _cases():
    for df in DFS:
        for t in TS:
            if df >= 1e6 and abs(t) >= 100:  # mpmath's hypergeometric series does not converge
                continue
            yield df, t


def mp_sf(t: float, df: float) -> mp.mpf:
    """P(T > t) from the regularised incomplete beta function (A&S 26.7.1)."""
    t, df = mp.mpf(t), mp.mpf(df)
    if t == 0:
        return mp.mpf(1) / 2
    half = mp.betainc(df / 2, mp.mpf(1) / 2, 0, df / (df + t * t), regularized=True) / 2
    return half if t > 0 else 1 - half


def mp_pdf(t: float, df: float) -> mp.mpf:
    """Student's t density, Gamma functions in logs."""
    t, df = mp.mpf(t), mp.mpf(df)
    log_c = mp.loggamma((df + 1) / 2) - mp.loggamma(df / 2) - mp.log(df * mp.pi) / 2
    return mp.exp(log_c - (df + 1) / 2 * mp.log(1 + t * t / df))


CASES = list(_cases())
# Cases whose reference lies below what a float64 holds (1e-300) are left to log_sf
with mp.workdps(DIGITS):
    _FLOOR = mp.mpf("1e-300")
    TINY_UPPER = {(df, t) for df, t in CASES if mp_sf(t, df) < _FLOOR}
    TINY_LOWER = {(df, t) for df, t in CASES if mp_sf(-t, df) < _FLOOR}
    TINY_PDF = {(df, t) for df, t in CASES if mp_pdf(t, df) < _FLOOR}


def _rel(got: float, ref) -> float:
    return abs(got - float(ref)) / abs(float(ref))


class TestSf:
    @pytest.mark.parametrize(("df", "t"), [c for c in CASES if c not in TINY_UPPER])
    def test_matches_mpmath(self, df, t):
        """sf equals the mpmath tail to 1e-12 relative wherever the area is representable."""
        ref = mp_sf(t, df)
        # 1e-12 in general; at |t| >= 1e100 exp(log p) with |log p| ~ 460 costs ~1e-13
        assert _rel(float(dist.sf(t, df)), ref) < 1e-12

    def test_huge_t_small_df_does_not_underflow(self):
        """At df=1, t=1e200 the tail 3.18e-201 is representable and returned (not 0)."""
        ref = mp_sf(1e200, 1.0)  # = 1/(pi * 1e200) to leading order
        got = float(dist.sf(1e200, 1.0))
        assert got > 0
        assert _rel(got, ref) < 1e-12


class TestLogSf:
    @pytest.mark.parametrize(("df", "t"), CASES)
    def test_matches_mpmath_log(self, df, t):
        """log_sf equals log of the mpmath tail to 1e-12 relative (absolute when |log| < 1)."""
        ref = float(mp.log(mp_sf(t, df)))
        got = float(dist.log_sf(t, df))
        assert abs(got - ref) <= 1e-12 * max(1.0, abs(ref))

    @pytest.mark.parametrize("df", [0.5, 1.0, 2.5, 4.0, 30.0, 250.0])
    @pytest.mark.parametrize("t", [1e3, 1e6, 1e12])
    def test_underflowing_tails(self, df, t):
        """Where P(T > t) underflows double precision, its log is still exact to 1e-12."""
        ref = mp.log(mp_sf(t, df))
        got = float(dist.log_sf(t, df))
        assert abs(got - float(ref)) <= 1e-12 * abs(float(ref))

    @pytest.mark.parametrize("df", [1e4, 1e6, 1e9, 1e12])
    @pytest.mark.parametrize("t", [40.0, 1e2, 1e4])
    def test_underflowing_tails_at_large_df(self, df, t):
        """At df 1e4 to 1e12 (millions of rows) log_sf is finite and exact to 1e-12 (was nan)."""
        # Reference: mpmath.quad of the mpmath density from t to infinity, in logs (mpmath's
        # betainc does not converge here).
        tt, nu = mp.mpf(t), mp.mpf(df)
        log_c = mp.loggamma((nu + 1) / 2) - mp.loggamma(nu / 2) - mp.log(nu * mp.pi) / 2
        log_f = lambda u: log_c - (nu + 1) / 2 * mp.log1p(u * u / nu)  # noqa: E731
        k = (nu + 1) * tt / (nu + tt * tt)
        area = mp.quad(lambda s: mp.exp(log_f(tt + s) - log_f(tt)), [0, 1 / k, 10 / k, mp.inf])
        ref = float(log_f(tt) + mp.log(area))
        got = float(dist.log_sf(t, df))
        assert abs(got - ref) <= 1e-12 * abs(ref)
        _, log_p = dist.p_value(t, df, "two-sided")
        assert abs(float(log_p) - (ref + math.log(2.0))) <= 1e-12 * abs(ref)

    def test_vectorised_over_df_and_t(self):
        """Arrays broadcast: one call equals element-wise calls."""
        t = np.array([[0.5], [40.0], [1e5]])
        df = np.array([1.0, 3.5, 60.0])
        out = dist.log_sf(t, df)
        assert out.shape == (3, 3)
        for i in range(3):
            for j in range(3):
                ref = float(mp.log(mp_sf(t[i, 0], df[j])))
                assert abs(out[i, j] - ref) <= 1e-12 * max(1.0, abs(ref))


class TestCdf:
    @pytest.mark.parametrize(("df", "t"), [c for c in CASES if c not in TINY_LOWER])
    def test_matches_mpmath(self, df, t):
        """cdf equals 1 - (mpmath upper tail) to 1e-11 relative, small lower tails included."""
        ref = mp_sf(-t, df)  # the lower tail, no subtraction
        # scipy's stdtr keeps ~1.5e-12 relative on lower tails near 1e-40 (df=30, t=-50)
        assert _rel(float(dist.cdf(t, df)), ref) < 1e-11


class TestPdf:
    @pytest.mark.parametrize(("df", "t"), [c for c in CASES if c not in TINY_PDF])
    def test_matches_mpmath(self, df, t):
        """pdf equals the mpmath density to 1e-12 relative (1e-13 * |log pdf| far out)."""
        ref = mp_pdf(t, df)
        # exp() of a log of size L carries L * 2.2e-16 relative error: allow for it
        tol = max(1e-12, 4e-16 * abs(float(mp.log(ref))))
        assert _rel(float(dist.pdf(t, df)), ref) < tol

    def test_large_df_density_keeps_digits(self):
        """At df=1e6 the density is right to 1e-14 (a gammaln difference loses 4e-10 here)."""
        for t in (0.0, 1.0, 3.0):
            assert _rel(float(dist.pdf(t, 1e6)), mp_pdf(t, 1e6)) < 1e-14


class TestPpf:
    @pytest.mark.parametrize("df", DFS)
    @pytest.mark.parametrize("q", [1e-12, 1e-5, 0.025, 0.3, 0.5, 0.9, 0.995])
    def test_inverts_mpmath_cdf(self, df, q):
        """The mpmath cdf at ppf(q) gives back q to 1e-11 relative."""
        x = float(dist.ppf(q, df))
        back = mp_sf(-x, df)  # P(T < x), no subtraction
        assert _rel(float(back), q) < 1e-11


class TestIsf:
    @pytest.mark.parametrize("df", [1.0, 2.5, 9.0, 120.0])
    @pytest.mark.parametrize("q", [1e-15, 1e-8, 0.01])
    def test_small_upper_tails(self, df, q):
        """The mpmath upper tail at isf(q) gives back a tiny q to 1e-11 relative."""
        x = float(dist.isf(q, df))
        assert _rel(float(mp_sf(x, df)), q) < 1e-11


class TestPValue:
    @pytest.mark.parametrize("side", ["two-sided", "upper", "lower"])
    @pytest.mark.parametrize("t", [-7.5, -0.4, 0.0, 1.3, 12.0, 400.0])
    def test_sides_match_mpmath(self, side, t):
        """p for each alternative equals the mpmath tail area(s) at df=13.5 to 1e-12."""
        df = 13.5
        if side == "upper":
            ref = mp_sf(t, df)
        elif side == "lower":
            ref = mp_sf(-t, df)
        else:
            ref = min(2 * mp_sf(abs(t), df), mp.mpf(1))
        p, log_p = dist.p_value(t, df, side)
        assert _rel(float(p), ref) < 1e-12
        assert abs(float(log_p) - float(mp.log(ref))) <= 1e-12 * max(1.0, abs(float(mp.log(ref))))

    def test_p_never_zero_when_log_p_finite(self):
        """A t of 1e120 at df=3 has p near 1e-360: p is 0 in float, log_p exact."""
        p, log_p = dist.p_value(1e120, 3.0, "upper")
        ref = float(mp.log(mp_sf(1e120, 3.0)))
        assert float(p) < 1e-300 and math.isfinite(float(log_p))
        assert abs(float(log_p) - ref) <= 1e-12 * abs(ref)


class TestCritical:
    @pytest.mark.parametrize("side", ["two-sided", "upper", "lower"])
    @pytest.mark.parametrize("df", [1.0, 4.5, 30.0, math.inf])
    def test_tail_areas_at_the_critical_value(self, side, df):
        """The critical value cuts off 1 - level in the stated tail(s) (mpmath / normal)."""
        level = 0.9
        c = float(dist.critical(df, level, side))
        if math.isinf(df):
            tail = mp.ncdf(-abs(c))  # standard normal, mpmath
        else:
            tail = mp_sf(abs(c), df)
        want = 0.05 if side == "two-sided" else 0.1
        assert _rel(float(tail), want) < 1e-11
        assert (c < 0) == (side == "lower")
