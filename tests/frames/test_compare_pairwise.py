"""compare(..., pairwise=...): a family of comparisons in every segment.

References: the single ``pairwise()`` result of each segment (itself checked against scipy
in tests/analyses/test_pairwise.py) and, for the adjustment over rows, the published Holm
(1979) definition written out in numpy.
The data are invented: seedling heights (cm) under four watering schedules in six
greenhouses.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import tinfer  # noqa: F401
from tinfer.errors import DataError, ParameterError

RNG = np.random.default_rng(31)
ROWS = 2400
SEEDLINGS = pd.DataFrame(
    {
        "house": RNG.integers(0, 6, ROWS),
        "schedule": RNG.choice(["daily", "twice daily", "weekly", "drip"], ROWS),
        "height_cm": RNG.normal(20.0, 3.0, ROWS),
        "leaves": RNG.poisson(9, ROWS).astype(float),
    }
)
SEEDLINGS.loc[SEEDLINGS.schedule == "drip", "height_cm"] += 1.2


@pytest.mark.parametrize(("method", "against"), [("games-howell", None), ("tukey-kramer", None),
                                                 ("holm", None), ("dunnett", "daily")])  # fmt: skip
def test_each_segment_is_the_single_pairwise_result(method, against):
    """Every segment's rows equal pairwise() on that segment alone (1e-12): estimate,
    family p-value, interval, and effect size with its interval."""
    m = SEEDLINGS.tinfer.compare(
        ["height_cm", "leaves"], by="schedule", within="house", pairwise=method, against=against
    )
    frame = m.to_frame()
    for metric in ("height_cm", "leaves"):
        for house in range(6):
            one = SEEDLINGS[SEEDLINGS.house == house].tinfer.pairwise(
                metric, by="schedule", method=method, against=against
            )
            rows = frame[(frame.house == house) & (frame.metric == metric)]
            assert [
                f"{a} minus {b}" for a, b in zip(rows["first"], rows["second"], strict=True)
            ] == one.pair_labels()
            np.testing.assert_allclose(rows.estimate, one.estimate, rtol=1e-12)
            np.testing.assert_allclose(rows.p_family, one.p_adjusted, rtol=1e-12)
            np.testing.assert_allclose(rows.ci_low, one.ci_low, rtol=1e-12)
            np.testing.assert_allclose(rows.effect_ci_high, one.effect_ci_high, rtol=1e-10)


def test_adjustment_over_rows_works_on_family_p_values():
    """p_adjusted is Holm over all rows of the family p-values (definition by hand)."""
    m = SEEDLINGS.tinfer.compare(
        "height_cm", by="schedule", within="house", pairwise="tukey-kramer"
    )
    p = m.p_family
    order = np.argsort(p)
    k = p.size
    holm = np.maximum.accumulate(np.minimum((k - np.arange(k)) * p[order], 1.0))
    expected = np.empty(k)
    expected[order] = holm
    np.testing.assert_allclose(m.p_adjusted, expected, rtol=1e-14)
    assert m.n_tests == 6 * 6 and np.array_equal(m.discovery, m.p_adjusted <= 0.05)


def test_segment_missing_a_level_keeps_the_other_pairs():
    """A house without one schedule gets NaN for its pairs and a note; k there is 3."""
    df = SEEDLINGS[~((SEEDLINGS.house == 2) & (SEEDLINGS.schedule == "weekly"))]
    m = df.tinfer.compare("height_cm", by="schedule", within="house", pairwise="games-howell")
    frame = m.to_frame()
    gone = frame[
        (frame.house == 2) & ((frame["first"] == "weekly") | (frame["second"] == "weekly"))
    ]
    assert gone.p.isna().all() and len(gone) == 3
    one = df[df.house == 2].tinfer.pairwise("height_cm", by="schedule")
    kept = frame[(frame.house == 2)].dropna(subset=["p"])
    np.testing.assert_allclose(np.sort(kept.p_family), np.sort(one.p_adjusted), rtol=1e-12)
    assert any("could not be compared" in w for w in m.warnings)


def test_card_and_text_name_the_pairs():
    m = SEEDLINGS.tinfer.compare(
        "height_cm", by="schedule", within="house", pairwise="games-howell"
    )
    assert "Games-Howell pairwise comparisons: every pair of levels of schedule" in str(m)
    assert "house=" in m.segment_labels()[0] and " minus " in m.segment_labels()[0]
    assert "minus" in m.to_html(chart=False)


@pytest.mark.parametrize(
    ("kwargs", "error", "message"),
    [
        ({"pairwise": "games-howell"}, ParameterError, "name it with by="),
        (
            {"by": "schedule", "pairwise": "holm", "groups": ("daily", "drip")},
            ParameterError,
            "not both",
        ),
        ({"by": "schedule", "pairwise": "holm", "pooled": True}, ParameterError, "do not apply"),
        ({"by": "schedule", "against": "hourly"}, DataError, "does not occur"),
        (
            {"by": "schedule", "pairwise": "tukey-kramer", "side": "upper"},
            ParameterError,
            "two-sided only",
        ),
    ],
)
def test_refusals(kwargs, error, message):
    with pytest.raises(error, match=message):
        SEEDLINGS.tinfer.compare("height_cm", within="house", **kwargs)
