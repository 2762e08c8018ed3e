"""One rule for choosing two levels, used by every path that compares two groups.

The data are invented: seed germination counts per tray under three lamp types.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import tinfer
from tinfer.frames import choose_two

LAMPS = pd.DataFrame(
    {
        "sprouted": [41.0, 38, 44, 40, 35, 37, 33, 36, 45, 48, 42, 46],
        "lamp": ["led"] * 4 + ["sodium"] * 4 + ["halide"] * 4,
        "tray": list(range(4)) * 3,
    }
)


def _summaries() -> pd.DataFrame:
    g = LAMPS.groupby("lamp")["sprouted"]
    return pd.DataFrame({"lamp": g.mean().index, "n": g.count(), "mean": g.mean(), "sd": g.std()})


PATHS = {
    "two_sample": lambda groups: LAMPS.tinfer.two_sample("sprouted", by="lamp", groups=groups),
    "paired_long": lambda groups: LAMPS.tinfer.paired(
        "sprouted", by="lamp", subject="tray", groups=groups
    ),
    "compare": lambda groups: LAMPS.tinfer.compare("sprouted", by="lamp", groups=groups),
    "compare_summaries": lambda groups: tinfer.compare_summaries(
        _summaries(), arm="lamp", groups=groups, within=[]
    ),
}


@pytest.mark.parametrize("path", PATHS, ids=list(PATHS))
def test_three_levels_need_a_choice(path):
    """Every path refuses three levels with the same words and lists the levels found."""
    with pytest.raises(tinfer.DataError, match=r"has 3 level\(s\) .*needs exactly two") as info:
        PATHS[path](None)
    assert all(level in str(info.value) for level in ("'led'", "'sodium'", "'halide'"))
    assert "groups=(first, second)" in str(info.value)


@pytest.mark.parametrize("path", PATHS, ids=list(PATHS))
def test_unknown_level(path):
    """Every path names a level that does not occur, in the same words."""
    with pytest.raises(tinfer.DataError, match="Level 'uv' does not occur in column 'lamp'"):
        PATHS[path](("led", "uv"))


@pytest.mark.parametrize("path", PATHS, ids=list(PATHS))
def test_same_level_twice(path):
    """Every path refuses a level named twice."""
    with pytest.raises(tinfer.DataError, match="names the same level twice"):
        PATHS[path](("led", "led"))


@pytest.mark.parametrize("path", PATHS, ids=list(PATHS))
def test_chosen_order_is_kept(path):
    """groups=(first, second) sets the direction: the estimate is first minus second."""
    r = PATHS[path](("sodium", "halide"))
    estimate = float(np.ravel(r.estimate)[0])
    sodium = LAMPS.loc[LAMPS.lamp == "sodium", "sprouted"].mean()
    halide = LAMPS.loc[LAMPS.lamp == "halide", "sprouted"].mean()
    assert estimate == pytest.approx(sodium - halide, rel=1e-12)


def test_two_levels_sort_as_text():
    """Without groups the two levels are taken in sorted order of their text (10 before 2)."""
    assert choose_two([2, 10], "dose", None) == (1, 0)
    assert choose_two(["b", "a"], "arm", None) == (1, 0)


def test_groups_must_be_a_pair():
    """groups must name exactly two levels."""
    with pytest.raises(tinfer.DataError, match="must name two levels"):
        choose_two(["a", "b"], "arm", ("a",))
    with pytest.raises(tinfer.DataError, match="must name two levels"):
        choose_two(["a", "b"], "arm", "ab")
