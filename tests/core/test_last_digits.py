"""The corners of the t machinery against mpmath at 50 digits.

Lower tails out to |t| = 1e300, percentiles down to q = 1e-300, df = 1 and 2 near zero,
data near 1e9 through the equivalence and trimmed-mean tests, and power at a tiny alpha.

References: the t tail area as the regularised incomplete beta function,
P(T > t) = I_x(df/2, 1/2) / 2 with x = df / (df + t^2) for t >= 0 (Abramowitz and Stegun
26.7.1), and the central area P(0 < T < t) = I_y(1/2, df/2) / 2 with y = t^2 / (df + t^2)
(the same identity, complemented), both with mpmath.betainc at 50 digits; the density from
mpmath.loggamma; the test statistics from their published formulas in 50-digit arithmetic.
"""

from __future__ import annotations

import math

import mpmath as mp
import numpy as np
import pandas as pd
import pytest

import tinfer
from tinfer.core import distribution as dist
from tinfer.core import power

TOL = 1e-13  # relative, the promise of the validation page
DFS = (0.5, 0.75, 1.0, 1.5, 2.0, 2.5, 3.0, 5.0, 7.3, 10.0, 29.0, 31.0, 100.0, 1e3, 1e4, 1e6)
SMALLEST = 2.2250738585072014e-308  # the smallest normal double: below it digits are lost


@pytest.fixture(autouse=True)
def _mp_digits():
    with mp.workdps(50):
        yield


def mp_upper(s, df) -> mp.mpf:
    """P(T > s) for s >= 0 (A&S 26.7.1)."""
    s, df = mp.mpf(s), mp.mpf(df)
    if s == 0:
        return mp.mpf(1) / 2
    return mp.betainc(df / 2, mp.mpf(1) / 2, 0, df / (df + s * s), regularized=True) / 2


def mp_central(s, df) -> mp.mpf:
    """P(0 < T < s) for s >= 0 (A&S 26.7.1, complemented: no cancellation near zero)."""
    s, df = mp.mpf(s), mp.mpf(df)
    return mp.betainc(mp.mpf(1) / 2, df / 2, 0, s * s / (df + s * s), regularized=True) / 2


def mp_pdf(s, df) -> mp.mpf:
    s, df = mp.mpf(s), mp.mpf(df)
    log_c = mp.loggamma((df + 1) / 2) - mp.loggamma(df / 2) - mp.log(df * mp.pi) / 2
    return mp.exp(log_c - (df + 1) / 2 * mp.log(1 + s * s / df))


def rel(got, ref) -> float:
    return float(abs((mp.mpf(float(got)) - ref) / ref))


# ------------------------------------------------------------------ lower tails, |t| to 1e300


def _tail_cases():
    for df in (0.5, 1.0, 1.5, 2.0, 3.0, 7.3, 30.0, 1e3):
        for t in np.logspace(0, 300, 31):
            if df >= 1e3 and t > 1e40:  # the area is far below any double
                continue
            yield df, float(t)


TAIL_CASES = list(_tail_cases())


class TestLowerTail:
    @pytest.mark.parametrize(("df", "t"), TAIL_CASES)
    def test_lower_equals_mirrored_upper_to_the_last_digits(self, df, t):
        """cdf(-t) and sf(t) both equal the 50-digit tail wherever it is a normal double."""
        ref = mp_upper(t, df)
        if ref < SMALLEST:
            assert float(dist.cdf(-t, df)) < 1e-300  # underflows, as it should
            return
        assert rel(dist.cdf(-t, df), ref) < TOL
        assert rel(dist.sf(t, df), ref) < TOL

    def test_reproducers(self):
        """The one-line reproducers: lower tails beyond 1e154 are no longer 0."""
        d = tinfer.tdist(1)
        ref = mp_upper(1e160, 1.0)  # about 1 / (pi 1e160)
        assert rel(d.cdf(-1e160), ref) < TOL
        assert rel(d.area(high=-1e160), ref) < TOL
        lower = tinfer.from_summary(n=2, mean=-1e150, sd=1e-10, side="lower").p
        upper = tinfer.from_summary(n=2, mean=1e150, sd=1e-10, side="upper").p
        assert lower > 0 and lower == upper

    @pytest.mark.parametrize("df", [1.0, 3.0, 30.0])
    def test_p_values_both_sides_at_huge_t(self, df):
        """One-sided p-values mirror each other exactly; the two-sided one is twice."""
        t = np.array([-1e200, -1e100, -1e20])
        p_lower, _ = dist.p_value(t, df, "lower")
        p_upper, _ = dist.p_value(-t, df, "upper")
        np.testing.assert_array_equal(p_lower, p_upper)
        for ti, pi in zip(t, p_lower, strict=True):
            ref = mp_upper(-ti, df)
            if ref >= SMALLEST:
                assert rel(pi, ref) < TOL


# ------------------------------------------------------------- percentiles down to 1e-300

QS = [
    *np.logspace(-300, -1, 70).tolist(),
    *np.linspace(0.1, 0.5, 9).tolist(),
    0.5 - 1e-17,
    0.5 - 1e-10,
    0.5 + 1e-12,
    0.7,
    0.975,
    1 - 1e-10,
    1 - 1e-16,
]


def percentile_error(q: float, df: float) -> float:
    """Relative error of ppf(q) in the root itself, to first order: the residual of the
    50-digit tail area at the returned value over s f(s) (exact to O(error^2))."""
    t = float(dist.ppf(q, df))
    s = abs(t)
    p = mp.mpf(q) if q <= 0.5 else 1 - mp.mpf(q)
    if math.isinf(t):  # allowed only where the true percentile overflows
        assert mp_upper(np.finfo(float).max, df) > p
        return 0.0
    if s == 0:
        assert q == 0.5
        return 0.0
    assert (t < 0) == (q < 0.5)
    resid = (mp.mpf(1) / 2 - p) - mp_central(s, df) if p > 0.1 else mp_upper(s, df) - p
    return float(abs(resid / (s * mp_pdf(s, df))))


class TestPercentile:
    @pytest.mark.parametrize("df", DFS)
    def test_every_percentile_within_1e13(self, df):
        """ppf at q from 1e-300 to 1 - 1e-16 inverts the 50-digit tail area to 1e-13."""
        worst = max(percentile_error(q, df) for q in QS)
        assert worst < TOL

    @pytest.mark.parametrize(
        ("df", "q", "ref"),
        [(3.0, 1e-300, -1.03e100), (3.0, 1e-200, -4.795e66), (0.5, 1e-100, -1.03e199)],
    )
    def test_reproducers(self, df, q, ref):
        """The issue's reproducers (true values as it reports them, to 3-4 digits), then the
        50-digit tail area at the returned value."""
        got = tinfer.tdist(df).percentile(q)
        assert got == pytest.approx(ref, rel=1e-2)
        assert percentile_error(q, df) < TOL

    @pytest.mark.parametrize("df", [0.5, 1.0, 3.0])
    def test_beyond_the_largest_double(self, df):
        """Where the percentile overflows it is -inf; just inside it is finite."""
        top = np.finfo(float).max
        area = float(mp_upper(top, df))
        if area > SMALLEST:
            assert dist.ppf(area * 0.5, df) == -np.inf
            assert np.isfinite(dist.ppf(area * 2.0, df))

    def test_median_is_zero_at_every_df(self):
        """ppf(1/2) is exactly 0, not a residue of the inverse (7.6e-17 on older scipy)."""
        got = dist.ppf(0.5, np.array((*DFS, np.inf)))
        assert np.all(got == 0.0)
        assert not np.any(np.signbit(got))

    def test_closed_forms_at_df_1_and_2(self):
        """df = 1: -cot(pi q); df = 2: (2q - 1) / sqrt(2 q (1 - q)) (from memory)."""
        for q in (1e-300, 1e-20, 0.01, 0.3, 0.7, 0.99):
            qq = mp.mpf(q)
            assert rel(dist.ppf(q, 1.0), -mp.cot(mp.pi * qq)) < TOL
            assert rel(dist.ppf(q, 2.0), (2 * qq - 1) / mp.sqrt(2 * qq * (1 - qq))) < TOL


# -------------------------------------------------------------------- near zero, df = 1 and 2


class TestNearZero:
    @pytest.mark.parametrize("df", [1.0, 2.0, 0.5, 3.0, 1e6])
    def test_cdf_and_sf_for_tiny_t(self, df):
        """|t| from 1e-12 to 1e-3: both tails to 1e-13 (df = 1 was 3e-9 off at t = 1e-8)."""
        for t in np.logspace(-12, -3, 19):
            c = mp_central(t, df)
            assert rel(dist.cdf(t, df), mp.mpf(1) / 2 + c) < TOL
            assert rel(dist.cdf(-t, df), mp.mpf(1) / 2 - c) < TOL
            assert rel(dist.sf(t, df), mp.mpf(1) / 2 - c) < TOL

    def test_closed_forms(self):
        """df = 1: 1/2 + atan(t)/pi; df = 2: 1/2 + t / (2 sqrt(2 + t^2)) (from memory)."""
        for t in (1e-12, 1e-8, -3e-5, 1e-3):
            tt = mp.mpf(t)
            assert rel(dist.cdf(t, 1.0), mp.mpf(1) / 2 + mp.atan(tt) / mp.pi) < TOL
            assert rel(dist.cdf(t, 2.0), mp.mpf(1) / 2 + tt / (2 * mp.sqrt(2 + tt * tt))) < TOL
        assert tinfer.tdist(1).cdf(1e-8) == pytest.approx(0.5000000031830989, rel=1e-15)


# ------------------------------------------------------------------- tests on data near 1e9

# NIST StRD NumAcc4-style data (values 1e9 + 0.1 / 0.3 around a centre of 1e9 + 0.2):
# the reference statistics come from the same doubles in 50-digit arithmetic.
NEAR = np.array([1000000000.2] + [1000000000.1, 1000000000.3] * 500)
OTHER = np.array([1000000000.25] + [1000000000.15, 1000000000.35] * 400)


def mp_values(x):
    return [mp.mpf(float(v)) for v in x]


def mp_trimmed(x, trim):
    """Trimmed mean and Yuen's squared standard error (Yuen 1974) in 50 digits."""
    xs = sorted(mp_values(x))
    n = len(xs)
    g = math.floor(trim * n)
    h = n - 2 * g
    tm = sum(xs[g : n - g]) / h
    w = [min(max(v, xs[g]), xs[n - g - 1]) for v in xs]
    wm = sum(w) / n
    wv = sum((v - wm) ** 2 for v in w) / (n - 1)
    return tm, (n - 1) * wv / (h * (h - 1)), h


class TestNearOneBillion:
    def test_equivalence_one_sided_tests(self):
        """The issue's reproducer: upper t was -0.1581815, exact -0.1581967."""
        r = pd.DataFrame({"x": NEAR}).tinfer.one_sample("x", null=1e9, margin=0.2005)
        x = mp_values(NEAR)
        n = len(x)
        m = sum(x) / n
        se = mp.sqrt(sum((v - m) ** 2 for v in x) / (n - 1) / n)
        null, margin = mp.mpf(1e9), mp.mpf(0.2005)
        assert rel(r.equivalence.upper.t, (m - null - margin) / se) < TOL
        assert rel(r.equivalence.lower.t, (m - null + margin) / se) < TOL
        assert rel(r.t, (m - null) / se) < TOL

    def test_yuen_one_sample(self):
        r = pd.DataFrame({"x": NEAR}).tinfer.one_sample("x", null=1e9, trim=0.2)
        tm, d, h = mp_trimmed(NEAR, 0.2)
        assert rel(r.t, (tm - mp.mpf(1e9)) / mp.sqrt(d)) < TOL
        assert rel(r.estimate, tm) < 1e-16
        assert r.df == h - 1

    def test_yuen_with_a_margin(self):
        r = pd.DataFrame({"x": NEAR}).tinfer.one_sample("x", null=1e9, trim=0.2, margin=0.2005)
        tm, d, _ = mp_trimmed(NEAR, 0.2)
        ref = (tm - mp.mpf(1e9) - mp.mpf(0.2005)) / mp.sqrt(d)
        assert rel(r.equivalence.upper.t, ref) < TOL

    def test_yuen_two_sample(self):
        frame = pd.DataFrame({"x": np.r_[NEAR, OTHER], "g": ["a"] * NEAR.size + ["b"] * OTHER.size})
        r = frame.tinfer.two_sample("x", by="g", trim=0.2)
        ta, da, _ = mp_trimmed(NEAR, 0.2)
        tb, db, _ = mp_trimmed(OTHER, 0.2)
        assert rel(r.t, (ta - tb) / mp.sqrt(da + db)) < TOL

    def test_two_sample_equivalence(self):
        frame = pd.DataFrame({"x": np.r_[NEAR, OTHER], "g": ["a"] * NEAR.size + ["b"] * OTHER.size})
        r = frame.tinfer.two_sample("x", by="g", margin=0.0505)
        a, b = mp_values(NEAR), mp_values(OTHER)
        ma, mb = sum(a) / len(a), sum(b) / len(b)
        va = sum((v - ma) ** 2 for v in a) / (len(a) - 1) / len(a)
        vb = sum((v - mb) ** 2 for v in b) / (len(b) - 1) / len(b)
        ref = (ma - mb + mp.mpf(0.0505)) / mp.sqrt(va + vb)
        assert rel(r.equivalence.lower.t, ref) < TOL


# -------------------------------------------------------------------- power at a tiny alpha


class TestTinyAlpha:
    def test_power_at_no_effect_is_alpha(self):
        """At effect 0 every test's power is its size alpha = 1 - level (common practice, no
        source); two-sided used to round 1 - alpha/2 (1.4e-10 off at level 0.999999)."""
        for level in (0.999999, 1 - 1e-12, 0.95):
            alpha = mp.mpf(1) - mp.mpf(level)  # the size of the test at this double level
            for side in ("two-sided", "upper", "lower"):
                got = power.power_from_ncp(0.0, 29.0, level, side)
                assert rel(got, alpha) < 1e-12
        plan = tinfer.plan("one-sample", n=30, effect=1e-9, level=0.999999)
        assert plan.power == pytest.approx(float(1 - mp.mpf(0.999999)), rel=1e-8)
