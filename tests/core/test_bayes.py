"""The default (JZS) Bayes factor of a t test against independent mpmath references.

References:

- Rouder, Speckman, Sun, Morey and Iverson (2009), eq. 1 of their appendix: the two-sided
  factor as one integral over g,
  BF10 = int_0^inf (1 + N g r^2)^(-1/2) [(1 + t^2 / ((1 + N g r^2) nu)) / (1 + t^2 / nu)]
  ^(-(nu + 1)/2) (2 pi)^(-1/2) g^(-3/2) e^(-1/(2g)) dg,
  here by mpmath.quad in u = log g at 30 digits.
- The same factor as an integral over the standardised effect delta: the likelihood ratio
  of delta to 0 is the ratio of the noncentral to the central t density at t,
  R(lambda) = exp(-lambda^2 nu / (2 (t^2 + nu))) I(lambda t / sqrt(t^2 + nu)) / I(0) with
  lambda = delta sqrt(N) and I(a) = int_0^inf x^nu exp(-(x - a)^2 / 2) dx (the integral
  representation of the noncentral t density); so BF10 = int R c, with c the Cauchy(0, r)
  density. I(a) is evaluated by the parabolic cylinder function,
  I(a) = Gamma(nu + 1) e^(-a^2/4) D_(-nu-1)(-a) (DLMF 12.5.1), and that identity is itself
  checked against the integral below (it is twenty times faster than nested quadrature,
  and more accurate far out on the negative side, where a fixed set of breakpoints in the
  integral misses the peak of the integrand near x = nu / |a|). For the large-df cases
  the series form of the same integral is used instead (termwise integration of e^(a x):
  I(a) e^(a^2/2) = 2^((nu-1)/2) [G((nu+1)/2) 1F1((nu+1)/2; 1/2; a^2/2)
  + sqrt(2) a G(nu/2 + 1) 1F1(nu/2 + 1; 3/2; a^2/2)], G = Gamma), on a window of delta
  where |a| stays small.
- Morey and Wagenmakers (2014): the one-sided factors truncate the prior to one side,
  BF+0 = 2 int_0^inf R c, BF-0 = 2 int_-inf^0 R c, so (BF+0 + BF-0) / 2 = BF10.
- The posterior of delta is proportional to R c (on one side, for a one-sided prior).
- Limiting behaviour (t = 0 favours no difference more with more data; Bartlett-Lindley:
  a wider prior favours no difference more; a prior shrunk onto 0 gives BF -> 1): common
  practice, no source.
- scipy.stats.cauchy.logpdf for the prior density (reference library).
"""

from __future__ import annotations

import math

import mpmath as mp
import numpy as np
import pytest
from scipy import stats

import tinfer
from tinfer.core import bayes

R0 = bayes.DEFAULT_SCALE
SCALES = (0.2, R0, 1.5)
TOL = 1e-12  # |got - ref| <= TOL * max(1, |ref|), on the log


def close(got, ref, tol=TOL) -> bool:
    ref = float(ref)
    return abs(float(got) - ref) <= tol * max(1.0, abs(ref))


# ------------------------------------------------------------------ mpmath references

G_BREAKS = [-50, -10, -3, 0, 3, 10, 20, 40, 80, 200]  # in u = log g


def mp_log_bf10(t, n_eff, df, scale) -> mp.mpf:
    """log BF10 by Rouder et al.'s (2009) integral over g, in u = log g (the Jacobian g
    turns g^(-3/2) into g^(-1/2)). Call under mp.workdps(30)."""
    t, n, nu, r = (mp.mpf(v) for v in (t, n_eff, df, scale))

    def f(u):
        g = mp.exp(u)
        q = 1 + n * g * r * r
        ratio = (1 + t * t / (q * nu)) / (1 + t * t / nu)
        return (
            q ** (-0.5)
            * ratio ** (-(nu + 1) / 2)
            / mp.sqrt(2 * mp.pi)
            * g ** (-0.5)
            * mp.exp(-1 / (2 * g))
        )

    return mp.log(mp.quad(f, G_BREAKS))


def mp_I(a, nu) -> mp.mpf:
    """I(a) = int_0^inf x^nu exp(-(x - a)^2 / 2) dx by DLMF 12.5.1."""
    a, nu = mp.mpf(a), mp.mpf(nu)
    return mp.gamma(nu + 1) * mp.exp(-a * a / 4) * mp.pcfd(-nu - 1, -a)


def mp_I_integral(a, nu) -> mp.mpf:
    """I(a) by direct quadrature, with breakpoints around the peak of the integrand."""
    a, nu = mp.mpf(a), mp.mpf(nu)
    if a >= 0:
        peak = (a + mp.sqrt(a * a + 4 * nu)) / 2
    else:  # the same root, written without cancellation
        peak = 2 * nu / (mp.sqrt(a * a + 4 * nu) - a)
    w = 1 / mp.sqrt(1 + nu / peak**2)  # curvature of the log integrand at the peak
    pts = [p for p in (peak - 30 * w, peak - 6 * w, peak, peak + 6 * w, peak + 30 * w) if p > 0]
    return mp.quad(lambda x: x**nu * mp.exp(-((x - a) ** 2) / 2), [0, *pts, mp.inf])


def mp_density(t, n_eff, df, scale, i_func=mp_I):
    """delta -> R(delta sqrt(N)) c(delta), the unnormalised posterior under the prior."""
    t, n, nu, r = (mp.mpf(v) for v in (t, n_eff, df, scale))
    s = mp.sqrt(t * t + nu)
    i0 = i_func(0, nu)

    def f(d):
        lam = d * mp.sqrt(n)
        ratio = mp.exp(-(lam**2) * nu / (2 * s * s)) * i_func(lam * t / s, nu) / i0
        return ratio * r / (mp.pi * (r * r + d * d))

    return f


def delta_breaks(t, n_eff, df, lo, hi) -> list:
    """Breakpoints for an integral over delta on [lo, hi]: 0 and the body of R."""
    m = mp.mpf(t) / mp.sqrt(n_eff)
    sd = mp.sqrt((1 + mp.mpf(t) ** 2 / (2 * mp.mpf(df))) / n_eff)
    inner = {mp.mpf(0)} | {m + k * sd for k in (-8, -3, -1, 0, 1, 3, 8)}
    return [lo, *sorted(p for p in inner if lo < p < hi), hi]


def mp_log_bf_delta(t, n_eff, df, scale, side) -> mp.mpf:
    """log BF10, BF+0 or BF-0 as an integral over delta (Morey and Wagenmakers 2014)."""
    f = mp_density(t, n_eff, df, scale)
    lo, hi, k = {
        "two-sided": (-mp.inf, mp.inf, 1),
        "upper": (mp.mpf(0), mp.inf, 2),
        "lower": (-mp.inf, mp.mpf(0), 2),
    }[side]
    return mp.log(k * mp.quad(f, delta_breaks(t, n_eff, df, lo, hi)))


def mp_posterior_cdf(t, n_eff, df, scale, side, i_func=mp_I, window=None):
    """d -> P(delta <= d | data), the normalised R c (on one side for a one-sided prior);
    ``window`` = (lo, hi) replaces the infinite range where the tails are negligible."""
    f = mp_density(t, n_eff, df, scale, i_func)
    lo = mp.mpf(0) if side == "upper" else -mp.inf
    hi = mp.mpf(0) if side == "lower" else mp.inf
    if window is not None:
        lo, hi = max(lo, mp.mpf(window[0])), min(hi, mp.mpf(window[1]))
    breaks = delta_breaks(t, n_eff, df, lo, hi)
    total = mp.quad(f, breaks)

    def cdf(d):
        d = mp.mpf(d)
        if d <= lo:
            return mp.mpf(0)
        return mp.quad(f, [p for p in breaks if p < d] + [min(d, hi)]) / total

    return cdf


def mp_I_series(nu):
    """a -> I(a) exp(a^2/2) / (2^((nu-1)/2) Gamma((nu+1)/2)), by termwise integration of
    exp(a x) (two Kummer functions); for large nu, where the parabolic cylinder function
    of mpmath does not converge. Accurate for moderate |a| only (the two terms cancel for
    a < 0)."""
    nu = mp.mpf(nu)
    half = mp.mpf(1) / 2
    c1 = mp.sqrt(2) * mp.exp(mp.loggamma(nu / 2 + 1) - mp.loggamma((nu + 1) / 2))

    def series(a, _nu=None):
        a = mp.mpf(a)
        body = mp.hyp1f1((nu + 1) / 2, half, a * a / 2, maxterms=10**6)
        odd = c1 * a * mp.hyp1f1(nu / 2 + 1, 3 * half, a * a / 2, maxterms=10**6)
        return mp.exp(-a * a / 2) * (body + odd)

    return series


# ------------------------------------------------------------------ a. BF10 against the g integral

# a negative t at the default scale only (the sign is checked exactly in TestLimits)
ONE_SAMPLE = [
    (t, n, r)
    for t in (0.0, 0.5, 2.0, 5.0, 30.0, 1e3)
    for n in (3, 10, 100, 1e4, 1e7)
    for r in SCALES
] + [(-2.0, n, R0) for n in (3, 10, 100, 1e4, 1e7)]
PAIRS = ((5, 8), (40, 25), (3000, 5000))
TWO_SAMPLE = [(t, pair, r) for t in (0.0, 2.0, 30.0) for pair in PAIRS for r in SCALES] + [
    (-5.0, pair, R0) for pair in PAIRS
]


class TestTwoSidedAgainstGIntegral:
    @pytest.mark.parametrize(("t", "n", "r"), ONE_SAMPLE)
    def test_one_sample(self, t, n, r):
        """N = n, nu = n - 1 (Rouder et al. 2009, the integral over g, 30 digits)."""
        with mp.workdps(30):
            ref = mp_log_bf10(t, n, n - 1, r)
        got = bayes.log_bf10(t, n, n - 1, r)
        assert np.isfinite(got)
        assert close(got, ref), (float(got), float(ref))

    @pytest.mark.parametrize(("t", "pair", "r"), TWO_SAMPLE)
    def test_two_sample(self, t, pair, r):
        """N = n1 n2 / (n1 + n2), nu = n1 + n2 - 2 (Rouder et al. 2009, 30 digits)."""
        n1, n2 = pair
        n_eff, df = n1 * n2 / (n1 + n2), n1 + n2 - 2
        with mp.workdps(30):
            ref = mp_log_bf10(t, n_eff, df, r)
        got = bayes.log_bf10(t, n_eff, df, r)
        assert close(got, ref), (float(got), float(ref))

    @pytest.mark.parametrize(
        ("t", "n", "r"), [(2.0, 20, 1e-3), (-5.0, 20, 1e-6), (0.0, 20, 50.0), (3.0, 1e4, 20.0)]
    )
    def test_far_prior_scales(self, t, n, r):
        """Scales far from the conventional ones (Rouder et al. 2009, 30 digits)."""
        with mp.workdps(30):
            ref = mp_log_bf10(t, n, n - 1, r)
        assert close(bayes.log_bf10(t, n, n - 1, r), ref)

    def test_arrays_broadcast_to_the_scalar_answers(self):
        """Vectorised calls (as the batch path makes them) give each scalar call's value."""
        t = np.array([0.0, 0.5, 2.0, -30.0])[:, None]
        n = np.array([3.0, 100.0, 1e7])[None, :]
        got = bayes.log_bf10(t, n, n - 1, R0)
        assert got.shape == (4, 3)
        for i, ti in enumerate(t[:, 0]):
            for j, nj in enumerate(n[0]):
                assert close(got[i, j], bayes.log_bf10(ti, nj, nj - 1, R0), 1e-15)


# ------------------------------------------------------------------ b. one-sided, delta form

DELTA_CASES = [
    (2.1, 20, 19, 0.7071),
    (-1.3, 8, 7, 1.0),
    (0.4, 5.5, 20, 0.5),
    (4.0, 12, 11, 0.7071),
    (-3.0, 16.5, 68, R0),  # two samples of 22 and 66 (N not an integer)
    (1.7, 7.5, 13.5, 0.3),  # df not an integer
    (-6.0, 3, 2, 1.5),  # df = 2
]


class TestOneSidedAgainstDeltaIntegral:
    @pytest.mark.parametrize("case", DELTA_CASES)
    @pytest.mark.parametrize("side", ["upper", "lower", "two-sided"])
    def test_factor(self, case, side):
        """BF+0 = 2 int_0^inf R c, BF-0 = 2 int_-inf^0 R c (Morey and Wagenmakers 2014);
        the two-sided factor int R c as a second reference for BF10; 20 digits."""
        with mp.workdps(20):
            ref = mp_log_bf_delta(*case, side)
        assert close(bayes.log_bayes_factor(*case, side), ref), side

    @pytest.mark.parametrize(("a", "nu"), [(0.0, 7), (0.3, 19), (-2.0, 7), (5.0, 20.5), (-9.0, 2)])
    def test_parabolic_cylinder_form_of_the_reference(self, a, nu):
        """The reference's own identity: I(a) as D_(-nu-1) equals I(a) as an integral
        (DLMF 12.5.1)."""
        with mp.workdps(25):
            assert mp.almosteq(mp_I(a, nu), mp_I_integral(a, nu), rel_eps=mp.mpf(10) ** -20)

    def test_dict_of_the_three(self):
        """log_bayes_factors returns the three sides, each equal to log_bayes_factor."""
        f = bayes.log_bayes_factors(2.1, 20, 19, R0)
        assert set(f) == {"two-sided", "upper", "lower"}
        for side, v in f.items():
            assert float(v) == float(bayes.log_bayes_factor(2.1, 20, 19, R0, side))


# ------------------------------------------------------------------ c. the averaging identity

IDENTITY = [
    (t, n, r)
    for t in (0.0, 0.7, 2.5, -4.0, 8.0, 40.0, -1e3, 1e3)
    for n in (4, 30, 1e4, 1e7)
    for r in (0.3, R0, 2.0)
]


@pytest.mark.parametrize(("t", "n", "r"), IDENTITY)
def test_one_sided_factors_average_to_the_two_sided(t, n, r):
    """(BF+0 + BF-0) / 2 = BF10 (Morey and Wagenmakers 2014), compared in logs."""
    f = bayes.log_bayes_factors(t, n, n - 1, r)
    assert all(np.isfinite(v) for v in f.values())
    mean = np.logaddexp(f["upper"], f["lower"]) - math.log(2.0)
    assert close(mean, f["two-sided"])


@pytest.mark.parametrize(("t", "n"), [(2.0, 20), (-2.0, 20), (30.0, 1e4), (-1e3, 10)])
def test_one_sided_factor_is_at_most_twice_the_two_sided(t, n):
    """BF+0 = 2 BF10 P(delta > 0 | data) <= 2 BF10 (Morey and Wagenmakers 2014), and the
    side the data point to has the larger factor."""
    f = bayes.log_bayes_factors(t, n, n - 1, R0)
    for side in ("upper", "lower"):
        assert f[side] <= f["two-sided"] + math.log(2.0) + 1e-12
    pointed, other = ("upper", "lower") if t > 0 else ("lower", "upper")
    assert f[pointed] > f["two-sided"] > f[other]


# ------------------------------------------------------------------ d. limiting behaviour


class TestLimits:
    """Common practice, no source."""

    def test_t_zero_favours_no_difference_more_with_more_data(self):
        logs = [float(bayes.log_bf10(0.0, n, n - 1, R0)) for n in (10, 100, 1e4, 1e7)]
        assert all(v < 0 for v in logs)
        assert np.all(np.diff(logs) < 0)

    def test_large_t_favours_a_difference_and_grows_with_t(self):
        logs = [float(bayes.log_bf10(t, 20, 19, R0)) for t in (3.0, 5.0, 10.0, 30.0, 100.0, 1e3)]
        assert all(v > 0 for v in logs)
        assert np.all(np.diff(logs) > 0)

    @pytest.mark.parametrize(("t", "n"), [(0.5, 10), (2.0, 20), (30.0, 1e4), (1e3, 1e7)])
    def test_symmetric_in_the_sign_of_t(self, t, n):
        """Two-sided: same factor for t and -t; one-sided: upper at t is lower at -t."""
        assert close(bayes.log_bf10(-t, n, n - 1, R0), bayes.log_bf10(t, n, n - 1, R0), 1e-15)
        up = bayes.log_bayes_factor(t, n, n - 1, R0, "upper")
        assert close(bayes.log_bayes_factor(-t, n, n - 1, R0, "lower"), up, 1e-15)

    def test_one_sided_equal_two_sided_at_t_zero(self):
        f = bayes.log_bayes_factors(0.0, 30, 29, R0)
        assert close(f["upper"], f["two-sided"], 1e-15)
        assert close(f["lower"], f["two-sided"], 1e-15)

    def test_wider_prior_favours_no_difference_more_at_t_zero(self):
        """Bartlett-Lindley: BF10 -> 0 as r grows."""
        logs = [float(bayes.log_bf10(0.0, 20, 19, r)) for r in (0.5, 1.0, 2.0, 5.0, 20.0, 1e3)]
        assert np.all(np.diff(logs) < 0)
        assert logs[-1] < -7.0
        assert float(bayes.log_bf10(0.0, 20, 19, 1e6)) < -14.0

    @pytest.mark.parametrize("t", [0.0, 2.0, -5.0])
    def test_prior_shrunk_onto_zero_gives_one(self, t):
        """r -> 0: the two models coincide, BF10 -> 1 (about linearly in r: the Cauchy
        prior keeps mass of order r out where the likelihood ratio is large)."""
        logs = [abs(float(bayes.log_bf10(t, 20, 19, r))) for r in (1e-2, 1e-4, 1e-6)]
        assert np.all(np.diff(logs) < 0)
        assert logs[-1] < 1e-2


# ------------------------------------------------------------------ e. posterior quantiles

POSTERIOR_CASES = [
    (24, 0.41, "two-sided"),
    (10, -0.3, "two-sided"),
    (24, 0.41, "upper"),
    (10, -0.3, "lower"),
]


class TestPosterior:
    @pytest.mark.parametrize(("n", "mean", "side"), POSTERIOR_CASES)
    def test_quantiles_of_bayes_factor(self, n, mean, side):
        """The median and 2.5% / 97.5% points of result.bayes_factor() against the
        normalised R c (on one side for a one-sided prior), 15 digits."""
        b = tinfer.from_summary(n=n, mean=mean, sd=1.0).bayes_factor(side=side)
        assert b.side == side
        assert (b.t, b.n_eff, b.df) == (pytest.approx(mean * math.sqrt(n), rel=1e-14), n, n - 1)
        with mp.workdps(15):
            cdf = mp_posterior_cdf(b.t, b.n_eff, b.df, b.scale, side)
            got = [float(cdf(v)) for v in (b.median, *b.interval)]
        assert got == pytest.approx([0.5, 0.025, 0.975], abs=1e-9)
        if side == "upper":
            assert 0.0 < b.interval[0] < b.median < b.interval[1]
        if side == "lower":
            assert b.interval[0] < b.median < b.interval[1] < 0.0

    def test_cdf_on_a_grid(self):
        """posterior_cdf itself, away from the quantiles (15 digits)."""
        t, n = 0.41 * math.sqrt(24), 24
        d = np.array([-0.5, -0.1, 0.0, 0.2, 0.5, 0.9, 1.5])
        got = bayes.posterior_cdf(d, t, n, n - 1, R0)
        with mp.workdps(15):
            cdf = mp_posterior_cdf(t, n, n - 1, R0, "two-sided")
            ref = [float(cdf(v)) for v in d]
        assert got == pytest.approx(ref, abs=1e-9)
        assert np.all(np.diff(got) > 0)

    def test_one_sided_cdf_is_zero_beyond_its_side(self):
        t, n = 2.0, 15
        up = bayes.posterior_cdf(np.array([-1.0, -1e-9, 0.0]), t, n, n - 1, R0, "upper")
        low = bayes.posterior_cdf(np.array([0.0, 1e-9, 1.0]), t, n, n - 1, R0, "lower")
        assert np.all(up == 0.0)
        assert low == pytest.approx([1.0, 1.0, 1.0], abs=1e-15)

    @pytest.mark.parametrize(("t", "n"), [(3.464, 3), (8.0, 3), (3.5, 4)])
    def test_cdf_small_df(self, t, n):
        """df 2 to 4 with a large t, where the spread of the chi-square part dominates
        (at df = 2 the chi-square cdf is only like |x|^3 at 0; a Gauss-Hermite sum over
        it was once off by 2.5e-6 here). 15 digits."""
        m = t / math.sqrt(n)
        d = m + np.array([-1.1, -0.6, 0.3, 1.5]) * abs(m)
        got = bayes.posterior_cdf(d, t, n, n - 1, R0)
        with mp.workdps(15):
            cdf = mp_posterior_cdf(t, n, n - 1, R0, "two-sided")
            ref = [float(cdf(v)) for v in d]
        assert got == pytest.approx(ref, abs=1e-9)

    @pytest.mark.parametrize("n", [1e4, 1e6, 1e7])
    def test_cdf_large_df(self, n):
        """t = 2, df 1e4 to 1e7 (the chi-square nodes must resolve a log V of SD
        sqrt(2/df); a grid 10 SD + 5 wide was once off by 3e-3 here): reference by the
        Kummer-function series of I (30 digits) on +-25 SD of delta."""
        t = 2.0
        sd = math.sqrt((1 + t * t / (2 * (n - 1))) / n)
        m = t / math.sqrt(n)
        d = m + sd * np.array([-2.0, -1.0, 0.0, 1.0, 2.0])
        got = bayes.posterior_cdf(d, t, n, n - 1, R0)
        with mp.workdps(30):
            cdf = mp_posterior_cdf(
                t, n, n - 1, R0, "two-sided", mp_I_series(n - 1), (m - 25 * sd, m + 25 * sd)
            )
            ref = [float(cdf(v)) for v in d]
        assert got == pytest.approx(ref, abs=1e-9)

    def test_quantiles_large_n(self):
        """result.bayes_factor() at n = 1e6: its median and 2.5% / 97.5% points (30 digits,
        the series reference)."""
        n = 10**6
        b = tinfer.from_summary(n=n, mean=0.002, sd=1.0).bayes_factor()
        sd = math.sqrt((1 + b.t**2 / (2 * b.df)) / n)
        m = b.t / math.sqrt(n)
        with mp.workdps(30):
            cdf = mp_posterior_cdf(
                b.t, n, b.df, R0, "two-sided", mp_I_series(b.df), (m - 25 * sd, m + 25 * sd)
            )
            got = [float(cdf(v)) for v in (b.median, *b.interval)]
        assert got == pytest.approx([0.5, 0.025, 0.975], abs=1e-9)


# ------------------------------------------------------------------ f. large inputs


class TestLargeInputs:
    def test_huge_t_and_n(self):
        """t = 1e3, n = 1e7: log BF near (nu + 1)/2 log(1 + t^2/nu), the log of the
        likelihood ratio at the best delta, less the Occam penalty of a few units."""
        n = 1e7
        nu = n - 1
        f = bayes.log_bayes_factors(1e3, n, nu, R0)
        assert all(np.isfinite(v) for v in f.values())
        top = (nu + 1) / 2 * math.log1p(1e6 / nu)
        assert 0 < f["two-sided"] < top
        assert abs(f["two-sided"] - top) < 0.01 * top
        assert f["upper"] == pytest.approx(f["two-sided"] + math.log(2.0), abs=1e-9)

    def test_t_zero_huge_n(self):
        """t = 0, n = 1e7: finite and clearly negative (about -log(sqrt(N) r) + const)."""
        v = float(bayes.log_bf10(0.0, 1e7, 1e7 - 1, R0))
        assert np.isfinite(v)
        assert v < -5.0


# ------------------------------------------------------------------ the prior


@pytest.mark.parametrize("scale", [0.2, R0, 1.5])
def test_cauchy_log_pdf(scale):
    """Two-sided: scipy.stats.cauchy (reference library); one-sided: doubled on its side,
    zero (log -inf) on the other."""
    d = np.array([-3.0, -0.5, 0.0, 0.4, 2.0])
    ref = stats.cauchy.logpdf(d, scale=scale)
    assert bayes.cauchy_log_pdf(d, scale) == pytest.approx(ref, rel=1e-14)
    up = bayes.cauchy_log_pdf(d, scale, "upper")
    low = bayes.cauchy_log_pdf(d, scale, "lower")
    assert np.all(np.isneginf(up[d < 0])) and np.all(np.isneginf(low[d > 0]))
    assert up[d >= 0] == pytest.approx(ref[d >= 0] + math.log(2.0), rel=1e-14)
    assert low[d <= 0] == pytest.approx(ref[d <= 0] + math.log(2.0), rel=1e-14)


def test_default_scale():
    assert R0 == pytest.approx(math.sqrt(2.0) / 2.0, rel=1e-16)
