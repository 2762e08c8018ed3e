"""Long-form groups are split once by integer codes, whatever the group column's dtype.

Reference: scipy.stats.ttest_ind on the values selected by hand. The data are invented:
yields (kg) of plots under two irrigation methods.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from scipy import stats

RNG = np.random.default_rng(20261203)
VALUES = np.r_[RNG.normal(41.8, 2.0, 40), RNG.normal(39.9, 3.1, 50)]
FIRST = np.r_[np.ones(40, bool), np.zeros(50, bool)]


def _columns() -> dict[str, pd.Series]:
    words = np.where(FIRST, "drip", "furrow")
    cat = pd.Categorical(words, categories=["unused", "furrow", "drip"])
    return {
        "string": pd.Series(pd.array(words, dtype="str")),
        "object": pd.Series(words, dtype=object),
        "categorical, unused level, own order": pd.Series(cat),
        "integer": pd.Series(np.where(FIRST, 3, 7)),
        "boolean": pd.Series(~FIRST),  # False (drip) sorts first
        "nullable boolean": pd.Series(pd.array(~FIRST, dtype="boolean")),
        "float": pd.Series(np.where(FIRST, 0.5, 1.5)),
    }


@pytest.mark.parametrize("name", list(_columns()))
def test_every_dtype_gives_scipys_welch(name):
    """Whatever the dtype, the first level (sorted as text) minus the second is scipy's t."""
    df = pd.DataFrame({"kg": VALUES, "g": _columns()[name]})
    r = df.tinfer.two_sample("kg", by="g")
    ref = stats.ttest_ind(VALUES[FIRST], VALUES[~FIRST], equal_var=False)  # reference
    assert r.t == pytest.approx(ref.statistic, rel=1e-12)
    assert r.groups[0].n == 40 and r.groups[1].n == 50


def test_missing_group_values_are_counted():
    """Rows whose group is missing are left out and counted in a note."""
    g = pd.Series(np.where(FIRST, "drip", "furrow"), dtype=object)
    g[[0, 45]] = None
    r = pd.DataFrame({"kg": VALUES, "g": g}).tinfer.two_sample("kg", by="g")
    ref = stats.ttest_ind(VALUES[1:40], np.delete(VALUES[40:], 5), equal_var=False)
    assert r.t == pytest.approx(ref.statistic, rel=1e-12)
    assert "2 row(s) with a missing 'g' value were not used." in r.warnings


def test_kept_values_are_fresh_and_read_only():
    """The split makes fresh arrays the result keeps as they are (no second copy)."""
    df = pd.DataFrame({"kg": VALUES, "g": np.where(FIRST, "drip", "furrow")})
    r = df.tinfer.two_sample("kg", by="g")
    assert all(not x.flags.writeable and x.base is None for x in r.samples)
    assert not any(np.shares_memory(x, df["kg"].to_numpy()) for x in r.samples)
