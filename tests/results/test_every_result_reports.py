"""Every result type has its HTML card as a string, and single results carry their groups.

The data are invented: drying times (minutes) of glaze tiles from two kilns. Reference
values come from numpy.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import tinfer

A = [41.2, 38.7, 44.1, 40.3, 39.8, 42.6, 43.9, 37.5, 41.7, 40.9, 45.2]
B = [36.4, 38.1, 35.2, 39.6, 37.7, 34.9, 36.8, 38.5, 37.1, 35.8, 36.3, 39.0]


def _frame() -> pd.DataFrame:
    return pd.DataFrame({"min": A + B, "kiln": ["north"] * 11 + ["south"] * 12})


RESULTS = {
    "t test": lambda: _frame().tinfer.two_sample("min", by="kiln"),
    "batch": lambda: _frame().assign(s="x").tinfer.compare("min", by="kiln", within="s"),
    "plan": lambda: tinfer.plan("two-sample", effect=0.5, power=0.8),
    "checks": lambda: _frame().tinfer.two_sample("min", by="kiln").check(),
    "bootstrap": lambda: _frame().tinfer.two_sample("min", by="kiln").bootstrap(199, seed=3),
    "t distribution": lambda: tinfer.tdist(7),
    "t distribution view": lambda: tinfer.tdist(7).show(low=1.0),
}


@pytest.mark.parametrize("kind", RESULTS)
def test_to_html_everywhere(kind):
    """to_html() gives the card the notebook shows; chart=False leaves the chart out."""
    obj = RESULTS[kind]()
    bare = obj.to_html(chart=False)
    assert bare.startswith('<div class="tinfer-card">') and "<script" not in bare
    assert "<svg" not in bare
    assert obj.to_html() == obj._repr_mimebundle_()["text/html"]


def test_two_sample_frame_carries_groups():
    """to_frame() of a two-sample result has n, mean and SD per group, as batch tables do."""
    row = _frame().tinfer.two_sample("min", by="kiln").to_frame().iloc[0]
    assert (row["n_a"], row["n_b"]) == (11, 12)
    assert row["mean_a"] == pytest.approx(np.mean(A), rel=1e-14)  # reference: numpy
    assert row["sd_b"] == pytest.approx(np.std(B, ddof=1), rel=1e-14)


def test_paired_frame_carries_differences():
    """A paired result's n, mean and SD are those of the differences."""
    r = pd.DataFrame({"a": A[:10], "b": B[:10]}).tinfer.paired("a", "b")
    row = r.to_frame().iloc[0]
    d = np.subtract(A[:10], B[:10])
    assert row["n"] == 10 and row["sd"] == pytest.approx(np.std(d, ddof=1), rel=1e-13)


def test_batch_and_single_frames_share_column_names():
    """A single test's group columns are named like the batch table's."""
    single = set(_frame().tinfer.two_sample("min", by="kiln").to_frame().columns)
    batch = set(RESULTS["batch"]().to_frame().columns)
    assert {"n_a", "mean_a", "sd_a", "n_b", "mean_b", "sd_b"} <= single & batch
