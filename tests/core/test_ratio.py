"""Relative lift: Fieller's interval and the delta method on the log ratio.

References: Fieller's theorem (Fieller 1954) written out in the test as a brute-force scan of
the confidence set {rho : (a - rho b)^2 <= q^2 (va + rho^2 vb)} and as numpy.roots of its
quadratic (reference library); the delta-method variance of log(a/b) against a brute-force
numerical derivative; coverage by seeded simulation (within 4 binomial standard errors of the
nominal level, common practice, no source); scipy.stats.t for the critical values.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from scipy import stats

import tinfer
from tinfer.core import distribution as dist
from tinfer.core import ratio


def _set_limits(a, b, va, vb, q):
    """The Fieller set by scanning rho on a fine grid (no quadratic formula)."""
    rho = np.linspace(a / b - 2.0, a / b + 2.0, 2_000_001)
    inside = (a - rho * b) ** 2 <= q * q * (va + rho * rho * vb)
    return rho[inside].min(), rho[inside].max()


@pytest.mark.parametrize(
    ("a", "b", "va", "vb", "df"),
    [(10.0, 8.0, 0.25, 0.16, 40.0), (5.2, 5.0, 0.01, 0.02, 120.0), (-3.0, 4.0, 0.3, 0.2, 15.0)],
)
def test_fieller_equals_the_scanned_set_and_numpy_roots(a, b, va, vb, df):
    # the critical value is tinfer's (checked against mpmath in test_last_digits.py): scipy's
    # t.ppf before 1.17 is 2e-11 off, which would show in these 1e-14 residuals
    q = float(dist.critical(df, 0.95, "two-sided"))
    r, lo, hi, ok = ratio.fieller(a, b, va, vb, 0.0, df)
    assert ok and r == a / b
    s_lo, s_hi = _set_limits(a, b, va, vb, q)
    assert abs(lo - s_lo) < 3e-6 and abs(hi - s_hi) < 3e-6  # the scan's step is 2e-6
    coef = [b * b - q * q * vb, -2 * a * b, a * a - q * q * va]
    roots = np.sort(np.roots(coef).real)
    # numpy.roots goes through eigenvalues: about 1e-12 (numpy 1.26), so 1e-10 here, and the
    # quadratic's residual at each limit, relative to the size of its terms, to 1e-14
    np.testing.assert_allclose([lo, hi], roots, rtol=1e-10)
    for rho in (lo, hi):
        terms = np.abs([coef[0] * rho * rho, coef[1] * rho, coef[2]])
        assert abs(np.polyval(coef, rho)) <= 1e-14 * terms.sum()


def test_fieller_with_covariance():
    """(a - rho b)^2 = q^2 (va - 2 rho c + rho^2 vb) at both limits (the theorem itself)."""
    a, b, va, vb, c, df = 7.0, 6.0, 0.2, 0.15, 0.1, 30.0
    q = stats.t.ppf(0.975, df)
    _, lo, hi, _ = ratio.fieller(a, b, va, vb, c, df)
    for rho in (lo, hi):
        assert (a - rho * b) ** 2 == pytest.approx(q * q * (va - 2 * rho * c + rho**2 * vb))


def test_unbounded_when_the_denominator_is_not_clear_of_zero():
    """b^2 <= q^2 vb: the set is not a finite interval; nan limits, bounded False."""
    _, lo, hi, ok = ratio.fieller(1.0, 0.3, 0.4, 0.4, 0.0, 18.0)
    assert not ok and np.isnan(lo) and np.isnan(hi)


def test_log_delta_variance_by_numerical_derivative():
    """se of log(a/b) = sqrt(grad' V grad), the gradient by central differences."""
    a, b, va, vb, c, df = 10.0, 8.0, 0.25, 0.16, 0.05, 40.0
    h = 1e-6
    ga = (np.log((a + h) / b) - np.log((a - h) / b)) / (2 * h)
    gb = (np.log(a / (b + h)) - np.log(a / (b - h))) / (2 * h)
    se = np.sqrt(ga * ga * va + gb * gb * vb + 2 * ga * gb * c)
    q = stats.t.ppf(0.975, df)
    r, lo, hi = ratio.log_delta(a, b, va, vb, c, df)
    np.testing.assert_allclose([lo, hi], [r * np.exp(-q * se), r * np.exp(q * se)], rtol=1e-8)


@pytest.mark.parametrize("method", ["fieller", "log"])
def test_coverage_by_simulation(method):
    """Two normal samples (means 10 and 8, SDs 3 and 2, n 15 and 25): the 95% intervals for
    the ratio cover 1.25 within 4 standard errors of 95% over 4000 seeded draws."""
    rng = np.random.default_rng(2026)
    reps, na, nb = 4000, 15, 25
    xa = rng.normal(10.0, 3.0, (reps, na))
    xb = rng.normal(8.0, 2.0, (reps, nb))
    ma, mb = xa.mean(1), xb.mean(1)
    va, vb = xa.var(1, ddof=1) / na, xb.var(1, ddof=1) / nb
    df = ratio.welch_df(va, vb, ma / mb, na - 1, nb - 1)
    if method == "fieller":
        _, lo, hi, _ = ratio.fieller(ma, mb, va, vb, 0.0, df)
    else:
        _, lo, hi = ratio.log_delta(ma, mb, va, vb, 0.0, df)
    rate = np.mean((lo <= 1.25) & (1.25 <= hi))
    assert abs(rate - 0.95) < 4 * np.sqrt(0.95 * 0.05 / reps)


class TestApi:
    def test_two_sample_lift_in_percent(self):
        r = tinfer.from_summary(n=(400, 400), mean=(10.4, 10.0), sd=(2.0, 2.0))
        lift = r.relative_lift()
        va = vb = 4.0 / 400
        df = ratio.welch_df(va, vb, 1.04, 399, 399)
        _, lo, hi, _ = ratio.fieller(10.4, 10.0, va, vb, 0.0, df)
        assert lift.lift == pytest.approx(0.04, rel=1e-12)
        assert lift.ci == pytest.approx((lo - 1, hi - 1), rel=1e-12)
        assert "+4.0%" in lift.headline and lift.to_html().startswith('<div class="tinfer-card">')

    def test_one_sample_is_the_interval_over_null(self):
        r = tinfer.from_summary(n=20, mean=10.4, sd=2.0, null=10.0)
        lift = r.relative_lift()
        assert lift.ci == pytest.approx((r.ci[0] / 10 - 1, r.ci[1] / 10 - 1), rel=1e-14)

    def test_unbounded_says_so(self):
        lift = tinfer.from_summary(n=(10, 10), mean=(1.0, 0.3), sd=(2.0, 2.0)).relative_lift()
        assert not lift.bounded and "unbounded" in lift.headline

    def test_refusals(self):
        paired = tinfer.from_summary(n=10, mean=1.0, sd=1.0, paired=True)
        with pytest.raises(tinfer.ParameterError, match="paired"):
            paired.relative_lift()
        frame = pd.DataFrame({"x": np.r_[np.arange(10.0), np.arange(10.0) + 3], "g": [0, 1] * 10})
        with pytest.raises(tinfer.ParameterError, match="trim"):
            frame.tinfer.two_sample("x", by="g", trim=0.2).relative_lift()
        with pytest.raises(tinfer.ParameterError):
            tinfer.from_summary(n=(5, 5), mean=(1, 2), sd=(1, 1)).relative_lift(method="x")

    def test_batch_rows_equal_single_results(self):
        rng = np.random.default_rng(8)
        shops = pd.DataFrame(
            {"shop": np.repeat(["north", "south", "east"], 40), "arm": np.tile(["b", "a"], 60),
             "basket": rng.normal(20, 4, 120)}
        )  # fmt: skip
        batch = shops.tinfer.compare("basket", by="arm", within="shop", groups=("a", "b"))
        frame = batch.relative_lift()
        for _, row in frame.iterrows():
            part = shops[shops["shop"] == row["shop"]]
            single = part.tinfer.two_sample("basket", by="arm", groups=("a", "b"))
            lift = single.relative_lift()
            assert row["lift"] == pytest.approx(lift.lift, rel=1e-12)
            assert (row["lift_low"], row["lift_high"]) == pytest.approx(lift.ci, rel=1e-10)
