"""two_sample(..., cluster=): one mean per unit of randomisation, then the test.

References: the per-unit means by a manual pandas groupby, and the test on them by
scipy.stats.ttest_ind (Welch; reference library). The data are invented: an online shop's
orders, several per visitor, visitors randomised to the old or the new checkout.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from scipy import stats

import tinfer


def _orders(seed: int = 3) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    visitors = np.arange(300)
    arm = np.where(rng.random(300) < 0.5, "new", "old")
    level = rng.normal(40.0, 8.0, 300) + np.where(arm == "new", 1.5, 0.0)
    rows = []
    for v in visitors:
        for _ in range(rng.integers(1, 6)):  # 1 to 5 orders per visitor
            rows.append((v, arm[v], level[v] + rng.normal(0, 5)))
    return pd.DataFrame(rows, columns=["visitor", "checkout", "basket"])


def test_equals_the_test_on_manual_per_unit_means():
    orders = _orders()
    r = orders.tinfer.two_sample("basket", by="checkout", groups=("new", "old"), cluster="visitor")
    units = orders.groupby(["visitor", "checkout"])["basket"].mean().reset_index()
    new = units.loc[units["checkout"] == "new", "basket"]
    old = units.loc[units["checkout"] == "old", "basket"]
    ref = stats.ttest_ind(new, old, equal_var=False)
    assert r.t == pytest.approx(ref.statistic, rel=1e-12)
    assert r.p == pytest.approx(ref.pvalue, rel=1e-10)
    assert [g.n for g in r.groups] == [len(new), len(old)]
    assert f"{len(orders):,} rows became {len(units):,} units" in " ".join(r.warnings)


def test_units_in_both_groups_are_left_out_and_counted():
    orders = _orders()
    bad = orders.iloc[:2].assign(checkout=lambda f: np.where(f["checkout"] == "new", "old", "new"))
    both = pd.concat([orders, bad], ignore_index=True)
    r = both.tinfer.two_sample("basket", by="checkout", groups=("new", "old"), cluster="visitor")
    n_bad = bad["visitor"].nunique()
    assert any(
        f"{n_bad} unit(s) of 'visitor' appear in more than one group" in w for w in r.warnings
    )
    kept = both[~both["visitor"].isin(bad["visitor"])]
    units = kept.groupby(["visitor", "checkout"])["basket"].mean()
    assert sum(g.n for g in r.groups) == len(units)


def test_rows_as_units_understate_the_standard_error():
    """Treating orders as independent gives a smaller SE than the per-visitor test here
    (common practice, no source: correlated rows within a unit)."""
    orders = _orders()
    rows = orders.tinfer.two_sample("basket", by="checkout", groups=("new", "old"))
    units = orders.tinfer.two_sample(
        "basket", by="checkout", groups=("new", "old"), cluster="visitor"
    )
    assert rows.se < units.se


def test_cluster_needs_long_data():
    orders = _orders()
    with pytest.raises(tinfer.DataError, match="by="):
        orders.tinfer.two_sample(("basket", "visitor"), cluster="visitor")
    with pytest.raises(tinfer.DataError, match="other than"):
        orders.tinfer.two_sample("basket", by="checkout", cluster="checkout")


def test_missing_values_are_dropped_counted_and_the_frame_kept():
    orders = _orders()
    orders.loc[[0, 5, 9], "basket"] = np.nan
    before = orders.copy()
    r = orders.tinfer.two_sample("basket", by="checkout", groups=("new", "old"), cluster="visitor")
    assert any("3 row(s) with a missing 'basket' were not used." in w for w in r.warnings)
    pd.testing.assert_frame_equal(orders, before)
