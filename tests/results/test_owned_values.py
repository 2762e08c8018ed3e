"""Results own read-only copies of the values they keep, never views of the caller's data.

The data are invented: crush strengths (kN) of concrete cubes from two curing rooms.
Reference values come from scipy.stats (ttest_1samp, ttest_ind), never from tinfer.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from scipy import stats

import tinfer  # noqa: F401  (registers the accessor)

ROOM_A = [41.2, 39.8, 42.5, 40.9, 43.1, 38.7, 41.8, 40.2]
ROOM_B = [38.4, 37.9, 39.6, 36.8, 38.1, 40.2, 37.3, 38.8]


def _frame() -> pd.DataFrame:
    return pd.DataFrame({"kn": ROOM_A + ROOM_B, "room": ["a"] * 8 + ["b"] * 8})


@pytest.mark.parametrize(
    "run",
    [
        lambda df: df.tinfer.one_sample("kn", null=40.0),
        lambda df: df.tinfer.two_sample("kn", by="room"),
        lambda df: df.iloc[:8].assign(b=ROOM_B).tinfer.paired("kn", "b"),
        lambda df: df["kn"].tinfer.one_sample(null=40.0),
    ],
    ids=["one-sample", "two-sample", "paired", "series"],
)
def test_samples_are_read_only_copies(run):
    """Every kept array is read-only and shares no memory with the DataFrame."""
    df = _frame()
    r = run(df)
    column = df["kn"].to_numpy()
    for x in r.samples:
        assert not x.flags.writeable
        assert not np.shares_memory(x, column)
        with pytest.raises(ValueError):
            x[0] = 0.0


def test_later_edits_do_not_reach_the_result():
    """Editing the DataFrame after the test changes none of the result's views of the data."""
    df = _frame()
    r = df.tinfer.one_sample("kn", null=40.0)
    before = (r.fingerprint, r.recompute(trim=0.2).estimate, str(r.check()))
    df.loc[0, "kn"] = 100.0
    after = (r.fingerprint, r.recompute(trim=0.2).estimate, str(r.check()))
    assert before == after
    ref = stats.ttest_1samp(ROOM_A + ROOM_B, 40.0)  # reference: scipy.stats
    assert r.recompute(level=0.9).t == pytest.approx(ref.statistic, rel=1e-12)


def test_recompute_keeps_owning_the_same_values():
    """A recomputed result keeps the same read-only values (no copy of a copy needed)."""
    r = _frame().tinfer.two_sample("kn", by="room")
    again = r.recompute(level=0.99)
    assert all(a is b for a, b in zip(r.samples, again.samples, strict=True))
    ref = stats.ttest_ind(ROOM_A, ROOM_B, equal_var=False)  # reference: scipy.stats
    assert again.p == pytest.approx(ref.pvalue, rel=1e-10)
