"""two_sample(..., covariate=): the pre-period (CUPED) adjustment of Deng, Xu, Kohavi and
Walker (2013).

References: an ordinary least-squares fit of y on (1, group, x) with numpy.linalg.lstsq on
the same data (reference library): its group coefficient equals the adjusted difference,
and its standard error agrees to order 1/n (CUPED treats theta as known; OLS does not);
the variance share removed equals the within-group R^2, computed here with numpy. The data
are invented: a sign-up flow's time on task with each visitor's pre-period time.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import tinfer


def _visits(n: int = 3000, seed: int = 11) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    pre = rng.gamma(4.0, 10.0, n)
    flow = np.where(rng.random(n) < 0.5, "new", "old")
    post = 5.0 + 0.7 * pre + rng.normal(0, 8, n) - np.where(flow == "new", 1.2, 0.0)
    return pd.DataFrame({"minutes": post, "pre_minutes": pre, "flow": flow})


def _ols(df):
    g = (df["flow"] == "new").to_numpy(float)
    design = np.column_stack([np.ones(len(df)), g, df["pre_minutes"].to_numpy()])
    y = df["minutes"].to_numpy()
    beta, rss, *_ = np.linalg.lstsq(design, y, rcond=None)
    sigma2 = rss[0] / (len(y) - 3)
    cov = sigma2 * np.linalg.inv(design.T @ design)
    return beta[1], np.sqrt(cov[1, 1])


def test_estimate_equals_the_least_squares_group_coefficient():
    df = _visits()
    r = df.tinfer.two_sample("minutes", by="flow", groups=("new", "old"), covariate="pre_minutes")
    coef, se = _ols(df)
    assert r.estimate == pytest.approx(coef, rel=1e-10)
    assert r.se == pytest.approx(se, rel=0.02)  # differ at order 1/n (theta known vs fitted)


def test_variance_removed_is_the_within_group_r_squared():
    df = _visits()
    r = df.tinfer.two_sample("minutes", by="flow", groups=("new", "old"), covariate="pre_minutes")
    sxy = sxx = syy = 0.0
    for _, part in df.groupby("flow"):
        dx = part["pre_minutes"] - part["pre_minutes"].mean()
        dy = part["minutes"] - part["minutes"].mean()
        sxy, sxx, syy = sxy + (dx * dy).sum(), sxx + (dx * dx).sum(), syy + (dy * dy).sum()
    share = sxy * sxy / (sxx * syy)
    assert f"removed {100 * share:.0f}% of the variance" in r.warnings[0]
    plain = df.tinfer.two_sample("minutes", by="flow", groups=("new", "old"))
    assert r.se < plain.se


def test_with_cluster_uses_per_unit_means_of_both_columns():
    df = _visits(600)
    rows = pd.concat([df.assign(visitor=np.arange(len(df)))] * 2, ignore_index=True)
    rows["minutes"] += np.tile([-1.0, 1.0], len(rows) // 2)[: len(rows)].repeat(1)
    r = rows.tinfer.two_sample(
        "minutes", by="flow", groups=("new", "old"), cluster="visitor", covariate="pre_minutes"
    )
    units = rows.groupby(["visitor", "flow"])[["minutes", "pre_minutes"]].mean().reset_index()
    coef, _ = _ols(units)
    assert r.estimate == pytest.approx(coef, rel=1e-10)


def test_missing_covariate_is_an_error_not_a_silent_drop():
    df = _visits(200)
    df.loc[3, "pre_minutes"] = np.nan
    with pytest.raises(tinfer.DataError, match="1 row"):
        df.tinfer.two_sample("minutes", by="flow", covariate="pre_minutes")
