"""Co-moments of (y, x) pairs, ratio metrics (delta method) and CUPED from co-moments.

References: numpy (means, ``np.cov``, ``np.linalg.lstsq``), scipy.stats.t.ppf for critical
values, a hand-written delta method ``g' S g / n`` (Deng, Knoblich and Lu 2018, from memory)
and its numerical-gradient version, and a seeded coverage simulation. All data are invented
and seeded: web-shop visitors with sessions, revenue and a pre-period spend.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from scipy import stats

import tinfer  # noqa: F401  (registers the accessor)
from tinfer.core.comoments import (
    Comoments,
    adjusted_arms,
    grouped_comoments,
    ratio_summary,
)

REL = 1e-12


def _pairs(n: int, seed: int, offset: float = 0.0) -> tuple[np.ndarray, np.ndarray]:
    """Correlated (y, x): x a pre-period value, y depends on it (so sxy is far from 0)."""
    rng = np.random.default_rng(seed)
    x = offset + rng.normal(20.0, 4.0, n)
    y = offset + 3.0 + 0.6 * (x - offset) + rng.normal(0.0, 2.0, n)
    return y, x


def _numpy_moments(y, x):
    """(n, mean y, mean x, syy, sxx, sxy) from np.cov (ddof 1) times n - 1."""
    # reference: numpy.mean and numpy.cov (n - 1 denominator), scaled back to sums
    n = y.size
    s = np.cov(np.vstack([y, x])) * (n - 1)
    return n, np.mean(y), np.mean(x), s[0, 0], s[1, 1], s[0, 1]


def _assert_matches(c: Comoments, ref, rel=REL):
    n, my, mx, syy, sxx, sxy = ref
    assert float(c.n) == n
    assert float(c.my) == pytest.approx(my, rel=rel)
    assert float(c.mx) == pytest.approx(mx, rel=rel)
    assert float(c.syy) == pytest.approx(syy, rel=rel)
    assert float(c.sxx) == pytest.approx(sxx, rel=rel)
    assert float(c.sxy) == pytest.approx(sxy, rel=rel)


# ---------------------------------------------------------------------------------------
# Comoments.of, merge, from_sums, grouped_comoments, take
# ---------------------------------------------------------------------------------------


def test_of_matches_numpy_cov():
    y, x = _pairs(1_000, seed=1)
    # reference: numpy.cov * (n - 1) and numpy.mean
    _assert_matches(Comoments.of(y, x), _numpy_moments(y, x))


def test_of_keeps_digits_for_values_near_1e6():
    y, x = _pairs(2_000, seed=2, offset=1e6)
    # reference: numpy.cov (centres before multiplying, so it keeps the digits here)
    _assert_matches(Comoments.of(y, x), _numpy_moments(y, x), rel=1e-9)


@pytest.mark.parametrize("offset", [0.0, 1e6])
def test_merge_of_two_chunks_equals_the_concatenation(offset):
    y, x = _pairs(1_501, seed=3, offset=offset)
    y[:600] += 5.0  # the chunks have different means, so the cross terms of the merge matter
    x[:600] -= 3.0
    a, b = Comoments.of(y[:600], x[:600]), Comoments.of(y[600:], x[600:])
    merged = a.merge(b)
    # reference: numpy.cov and numpy.mean of the concatenated rows
    _assert_matches(merged, _numpy_moments(y, x), rel=1e-12 if offset == 0 else 1e-9)
    # the merge is symmetric (common practice, no source)
    _assert_matches(b.merge(a), _numpy_moments(y, x), rel=1e-12 if offset == 0 else 1e-9)


def test_merge_with_an_empty_group_is_neutral():
    y, x = _pairs(50, seed=4)
    c = grouped_comoments(y, x, np.zeros(y.size, dtype=np.intp), 2)  # group 1 is empty
    empty, full = c.take(1), c.take(0)
    assert float(empty.n) == 0
    # reference: numpy.cov of the 50 rows (an empty group adds nothing)
    _assert_matches(empty.merge(full), _numpy_moments(y, x))
    _assert_matches(full.merge(empty), _numpy_moments(y, x))


def test_from_sums_equals_of_on_moderate_data():
    y, x = _pairs(800, seed=5)
    sums = (y.size, y.sum(), (y * y).sum(), x.sum(), (x * x).sum(), (x * y).sum())
    c = Comoments.from_sums(*sums)
    # reference: numpy.cov of the rows; raw sums cancel about 2 log10(mean / sd) ~ 2 digits
    _assert_matches(c, _numpy_moments(y, x), rel=1e-10)
    _assert_matches(Comoments.of(y, x), _numpy_moments(y, x))


def test_grouped_comoments_equals_a_loop_over_groups():
    rng = np.random.default_rng(6)
    y, x = _pairs(3_000, seed=6)
    codes = rng.integers(0, 7, y.size)
    codes[codes == 3] = 4  # group 3 is empty
    codes[0] = 6
    codes[codes == 6] = 5
    codes[0] = 6  # group 6 has a single row
    c = grouped_comoments(y, x, codes, 7)
    for k in range(7):
        m = codes == k
        got = c.take(k)
        if k == 3:
            assert float(got.n) == 0
            continue
        if k == 6:
            # one row: mean is the value, sums of squares are 0 (common practice, no source)
            assert float(got.n) == 1
            assert float(got.my) == y[m][0] and float(got.mx) == x[m][0]
            assert float(got.syy) == float(got.sxx) == float(got.sxy) == 0.0
            continue
        # reference: numpy.cov and numpy.mean of each group's rows in a Python loop
        _assert_matches(got, _numpy_moments(y[m], x[m]))


def test_take_selects_every_field():
    y, x = _pairs(300, seed=7)
    codes = np.repeat([0, 1, 2], 100)
    c = grouped_comoments(y, x, codes, 3)
    sub = c.take([2, 0])
    for f in ("n", "my", "mx", "syy", "sxx", "sxy"):
        # reference: numpy fancy indexing of the same arrays
        np.testing.assert_array_equal(getattr(sub, f), getattr(c, f)[[2, 0]])


# ---------------------------------------------------------------------------------------
# Ratio of sums: the delta method
# ---------------------------------------------------------------------------------------


def _sessions(n: int, seed: int, mu: float = 4.0):
    rng = np.random.default_rng(seed)
    sessions = rng.poisson(3.0, n).astype(float) + 1.0
    revenue = rng.gamma(2.0 * sessions, mu / 2.0)  # sum of `sessions` gamma(2, mu / 2) draws
    return revenue, sessions


@pytest.mark.parametrize("n", [5, 12, 40])
def test_delta_variance_equals_gradient_covariance_gradient(n):
    y, x = _sessions(n, seed=10 + n)
    s = ratio_summary(Comoments.of(y, x))
    my, mx = y.mean(), x.mean()
    # reference: numpy sums, the ratio of sums
    assert float(s.mean) == pytest.approx(y.sum() / x.sum(), rel=1e-14)
    # Deng, Knoblich and Lu (2018), delta method, from memory: var R = g' S g / n,
    # g = (1 / mean x, -mean y / mean x^2), S = np.cov([y, x]) (reference: numpy.cov)
    g = np.array([1.0 / mx, -my / mx**2])
    var_ref = g @ np.cov(np.vstack([y, x])) @ g / n
    var_got = float(s.ssd) / (n - 1) / n
    assert var_got == pytest.approx(var_ref, rel=1e-12)


def test_delta_variance_with_a_numerical_gradient():
    y, x = _sessions(25, seed=21)
    n = y.size
    my, mx = y.mean(), x.mean()

    def f(a, b):
        return a / b

    # common practice, no source: central finite differences of f(my, mx) = my / mx
    hy, hx = 1e-5 * abs(my), 1e-5 * abs(mx)
    g = np.array(
        [
            (f(my + hy, mx) - f(my - hy, mx)) / (2 * hy),
            (f(my, mx + hx) - f(my, mx - hx)) / (2 * hx),
        ]
    )
    var_ref = g @ np.cov(np.vstack([y, x])) @ g / n  # reference: numpy.cov
    s = ratio_summary(Comoments.of(y, x))
    assert float(s.ssd) / (n - 1) / n == pytest.approx(var_ref, rel=1e-6)


def test_ratio_summary_is_nan_when_the_denominator_mean_is_not_positive():
    c = Comoments.of([1.0, 2.0, 3.0], [0.0, 0.0, 0.0])
    # common practice, no source: a ratio of sums over a zero sum is undefined
    assert np.isnan(float(ratio_summary(c).mean))


def _arm(rng, n, mu, lam):
    """Per unit: Poisson sessions (may be 0) and revenue, the sum of one gamma(2, mu / 2)
    draw per session, so E[revenue] / E[sessions] = mu exactly."""
    sessions = rng.poisson(lam, n).astype(float)
    revenue = rng.gamma(2.0 * sessions, mu / 2.0)  # gamma(0) is 0: no sessions, no revenue
    return revenue, sessions


def _moments_rows(y, x):
    """Co-moments of every row of 2-d arrays (one replicate per row), with numpy."""
    n = np.full(y.shape[0], float(y.shape[1]))
    my, mx = y.mean(axis=1), x.mean(axis=1)
    dy, dx = y - my[:, None], x - mx[:, None]
    return Comoments(n, my, mx, (dy * dy).sum(axis=1), (dx * dx).sum(axis=1), (dx * dy).sum(axis=1))


def test_ratio_interval_covers_the_true_difference_at_the_nominal_rate():
    reps, n, mu_a, mu_b = 4_000, 200, 5.0, 4.4
    rng = np.random.default_rng(2024)
    ya, xa = _arm(rng, (reps, n), mu_a, 2.5)
    yb, xb = _arm(rng, (reps, n), mu_b, 2.5)
    sa, sb = ratio_summary(_moments_rows(ya, xa)), ratio_summary(_moments_rows(yb, xb))
    va, vb = sa.ssd / (n - 1) / n, sb.ssd / (n - 1) / n
    est, se = sa.mean - sb.mean, np.sqrt(va + vb)
    # Welch (1947) and Satterthwaite (1946) df, from memory
    df = (va + vb) ** 2 / (va**2 / (n - 1) + vb**2 / (n - 1))
    q = stats.t.ppf(0.975, df)  # reference: scipy.stats.t.ppf
    lo, hi = est - q * se, est + q * se

    # the vectorised replicate equals the accessor on the same rows
    for i in (0, 1, 2):
        rows = pd.DataFrame(
            {
                "revenue": np.concatenate([ya[i], yb[i]]),
                "sessions": np.concatenate([xa[i], xb[i]]),
                "arm": ["a"] * n + ["b"] * n,
            }
        )
        r = rows.tinfer.two_sample(ratio=("revenue", "sessions"), by="arm")
        assert r.estimate == pytest.approx(est[i], rel=1e-12)
        assert r.se == pytest.approx(se[i], rel=1e-10)
        assert r.df == pytest.approx(df[i], rel=1e-10)
        assert r.ci == pytest.approx((lo[i], hi[i]), rel=1e-9)

    truth = mu_a - mu_b  # true ratio per arm is mu by construction
    covered = np.mean((lo <= truth) & (truth <= hi))
    # common practice, no source: Monte Carlo error of a proportion, 4 standard errors
    mc_se = np.sqrt(0.95 * 0.05 / reps)
    assert abs(covered - 0.95) <= 4 * mc_se, covered
    # reference: the Monte Carlo spread of the estimates; the delta-method SE is calibrated
    assert np.std(est) == pytest.approx(np.mean(se), rel=0.05)


# ---------------------------------------------------------------------------------------
# CUPED from co-moments against least squares
# ---------------------------------------------------------------------------------------


def _experiment(n_a: int, n_b: int, seed: int):
    rng = np.random.default_rng(seed)
    xa, xb = rng.gamma(4.0, 10.0, n_a), rng.gamma(4.0, 10.0, n_b) + 4.0  # pre-period imbalance
    ya = 5.0 + 0.7 * xa + rng.normal(0, 8, n_a) + 1.2
    yb = 5.0 + 0.7 * xb + rng.normal(0, 8, n_b)
    return ya, xa, yb, xb


def _ols(ya, xa, yb, xb):
    """Arm coefficient, its SE and the slope of y on [1, arm, x] (numpy.linalg.lstsq)."""
    y = np.concatenate([ya, yb])
    arm = np.concatenate([np.ones(ya.size), np.zeros(yb.size)])
    x = np.concatenate([xa, xb])
    design = np.column_stack([np.ones(y.size), arm, x])
    beta, rss, *_ = np.linalg.lstsq(design, y, rcond=None)
    sigma2 = rss[0] / (y.size - 3)
    cov = sigma2 * np.linalg.inv(design.T @ design)
    return beta[1], np.sqrt(cov[1, 1]), beta[2]


def test_adjusted_difference_equals_the_least_squares_arm_coefficient():
    ya, xa, yb, xb = _experiment(500, 470, seed=31)
    adj = adjusted_arms(Comoments.of(ya, xa), Comoments.of(yb, xb))
    coef, se_ols, slope = _ols(ya, xa, yb, xb)
    diff = float(adj.first.mean - adj.second.mean)
    # reference: numpy.linalg.lstsq of y on [1, arm, x]
    assert diff == pytest.approx(coef, rel=1e-10)
    # reference: the x coefficient of the same fit is the pooled within-arm slope
    assert float(adj.theta) == pytest.approx(slope, rel=1e-10)
    # not trivially true: the unadjusted difference is far from the coefficient here
    assert abs((ya.mean() - yb.mean()) - coef) > 1.0
    # Welch SE of the adjusted arms vs the OLS SE: equal to order 1/n, theta treated as known
    # (Deng, Xu, Kohavi and Walker 2013, from memory; reference: numpy.linalg.lstsq)
    se = float(np.sqrt(adj.first.var / adj.first.n + adj.second.var / adj.second.n))
    assert se == pytest.approx(se_ols, rel=0.02)


def test_adjusted_arms_removed_share_and_segments_at_once():
    ya, xa, yb, xb = _experiment(300, 320, seed=32)
    ya2, xa2, yb2, xb2 = _experiment(200, 210, seed=33)
    a = Comoments.of(ya, xa)
    b = Comoments.of(yb, xb)
    a2, b2 = Comoments.of(ya2, xa2), Comoments.of(yb2, xb2)
    stacked_a = Comoments(*(np.array([u, v]) for u, v in zip(a.fields(), a2.fields(), strict=True)))
    stacked_b = Comoments(*(np.array([u, v]) for u, v in zip(b.fields(), b2.fields(), strict=True)))
    adj = adjusted_arms(stacked_a, stacked_b)
    for k, data in enumerate([(ya, xa, yb, xb), (ya2, xa2, yb2, xb2)]):
        coef, _, slope = _ols(*data)
        # reference: numpy.linalg.lstsq per segment (theta per segment)
        assert adj.first.mean[k] - adj.second.mean[k] == pytest.approx(coef, rel=1e-10)
        assert adj.theta[k] == pytest.approx(slope, rel=1e-10)
        # reference: within-arm R^2 written out with numpy (share of variance removed)
        sxy = sxx = syy = 0.0
        for y, x in ((data[0], data[1]), (data[2], data[3])):
            dx, dy = x - x.mean(), y - y.mean()
            sxy, sxx, syy = sxy + dx @ dy, sxx + dx @ dx, syy + dy @ dy
        assert adj.removed[k] == pytest.approx(sxy * sxy / (sxx * syy), rel=1e-10)


def test_adjusted_arms_leave_the_arms_unadjusted_when_x_does_not_vary():
    a = Comoments.of([1.0, 2.0, 4.0], [3.0, 3.0, 3.0])
    b = Comoments.of([2.0, 5.0], [3.0, 3.0])
    adj = adjusted_arms(a, b)
    # common practice, no source: no slope without spread in x, so nothing to subtract
    assert not bool(adj.adjusted) and float(adj.theta) == 0.0 and float(adj.removed) == 0.0
    # reference: numpy mean and sum of squared deviations of the raw values
    assert float(adj.first.mean) == pytest.approx(np.mean([1.0, 2.0, 4.0]), rel=1e-15)
    assert float(adj.second.ssd) == pytest.approx(4.5, rel=1e-15)
