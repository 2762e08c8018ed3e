"""Adjusted p-values: tinfer.core.multiplicity against scipy and the published definitions."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import stats

from tinfer import ParameterError
from tinfer.core.multiplicity import adjust, check_method, discoveries

# Benjamini and Hochberg (1995), section 4: fifteen p-values from a study of myocardial
# infarction treatments (values from memory).
BH1995 = np.array(
    [0.0001, 0.0004, 0.0019, 0.0095, 0.0201, 0.0278, 0.0298, 0.0344, 0.0459, 0.3240,
     0.4262, 0.5719, 0.6528, 0.7590, 1.000]
)  # fmt: skip

p_arrays = st.lists(
    st.floats(min_value=0.0, max_value=1.0, allow_nan=False), min_size=1, max_size=40
).map(np.array)


def holm_by_definition(p: np.ndarray) -> np.ndarray:
    """Holm (1979): adj_(i) = max_{j<=i} min(1, (m-j+1) p_(j)); slow direct loops."""
    m = len(p)
    order = sorted(range(m), key=lambda i: (p[i], i))
    out = np.empty(m)
    for rank, i in enumerate(order, start=1):
        out[i] = max(min(1.0, (m - j + 1) * p[order[j - 1]]) for j in range(1, rank + 1))
    return out


def hochberg_by_definition(p: np.ndarray) -> np.ndarray:
    """Hochberg (1988): adj_(i) = min_{j>=i} min(1, (m-j+1) p_(j)); slow direct loops."""
    m = len(p)
    order = sorted(range(m), key=lambda i: (p[i], i))
    out = np.empty(m)
    for rank, i in enumerate(order, start=1):
        out[i] = min(min(1.0, (m - j + 1) * p[order[j - 1]]) for j in range(rank, m + 1))
    return out


def step_up_rejections(p: np.ndarray, thresholds: np.ndarray) -> int:
    """Number rejected by a step-up rule: the largest i with p_(i) <= thresholds[i-1]."""
    s = np.sort(p)
    hits = np.flatnonzero(s <= thresholds)
    return 0 if hits.size == 0 else int(hits[-1]) + 1


# ---------------------------------------------------------------- adjust
class TestAdjust:
    @settings(max_examples=60, deadline=None)
    @given(p_arrays)
    def test_bh_matches_scipy(self, p):
        """BH adjusted p-values equal scipy.stats.false_discovery_control(method='bh')."""
        np.testing.assert_allclose(
            adjust(p, "bh"), stats.false_discovery_control(p, method="bh"), rtol=1e-12, atol=1e-300
        )

    @settings(max_examples=60, deadline=None)
    @given(p_arrays)
    def test_by_matches_scipy(self, p):
        """BY adjusted p-values equal scipy.stats.false_discovery_control(method='by')."""
        np.testing.assert_allclose(
            adjust(p, "benjamini-yekutieli"),
            stats.false_discovery_control(p, method="by"),
            rtol=1e-12,
            atol=1e-300,  # subnormal p-values round differently
        )

    @settings(max_examples=60, deadline=None)
    @given(p_arrays)
    def test_holm_matches_definition(self, p):
        """Holm adjusted p-values equal the slow formula from Holm (1979)."""
        np.testing.assert_allclose(adjust(p, "holm"), holm_by_definition(p), rtol=1e-12)

    @settings(max_examples=60, deadline=None)
    @given(p_arrays)
    def test_hochberg_matches_definition(self, p):
        """Hochberg adjusted p-values equal the slow formula from Hochberg (1988)."""
        np.testing.assert_allclose(adjust(p, "hochberg"), hochberg_by_definition(p), rtol=1e-12)

    @settings(max_examples=40, deadline=None)
    @given(p_arrays, st.sampled_from(["holm", "hochberg", "bh", "by"]))
    def test_monotone_and_capped(self, p, method):
        """Adjusted p-values are at least the raw ones, at most 1, and ordered like them."""
        q = adjust(p, method)
        assert np.all(q >= p - 1e-15) and np.all(q <= 1.0)
        order = np.argsort(p, kind="stable")
        assert np.all(np.diff(q[order]) >= 0)

    def test_bh1995_worked_example(self):
        """Benjamini and Hochberg (1995): at q = 0.05 BH rejects 4 of the 15, Hochberg 3."""
        assert int(discoveries(adjust(BH1995, "bh"), 0.05).sum()) == 4
        assert int(discoveries(adjust(BH1995, "hochberg"), 0.05).sum()) == 3
        # the four BH discoveries are the four smallest p-values (same paper)
        assert discoveries(adjust(BH1995, "bh"), 0.05)[:4].all()

    @pytest.mark.parametrize("rate", [0.01, 0.05, 0.1, 0.2])
    def test_bh_decision_is_the_step_up_rule(self, rate):
        """adj <= rate gives exactly the BH step-up rule p_(i) <= i q / m (BH 1995, eq. 1)."""
        m = BH1995.size
        expected = step_up_rejections(BH1995, rate * np.arange(1, m + 1) / m)
        assert int(discoveries(adjust(BH1995, "bh"), rate).sum()) == expected

    @pytest.mark.parametrize("rate", [0.001, 0.01, 0.05])
    def test_hochberg_decision_is_the_step_up_rule(self, rate):
        """adj <= rate gives exactly Hochberg's rule p_(i) <= rate / (m - i + 1)."""
        m = BH1995.size
        expected = step_up_rejections(BH1995, rate / (m - np.arange(1, m + 1) + 1))
        assert int(discoveries(adjust(BH1995, "hochberg"), rate).sum()) == expected

    def test_nan_left_out_of_family(self):
        """NaN p-values stay NaN and do not count in m (common practice, no source)."""
        p = np.array([0.01, np.nan, 0.02, 0.03])
        q = adjust(p, "bh")
        assert np.isnan(q[1])
        np.testing.assert_allclose(q[[0, 2, 3]], stats.false_discovery_control([0.01, 0.02, 0.03]))

    def test_none_returns_raw(self):
        """'none' returns the raw p-values unchanged."""
        p = np.array([0.3, 0.01, 0.5])
        np.testing.assert_array_equal(adjust(p, "none"), p)

    def test_shape_kept(self):
        """A 2-d array comes back in the same shape, adjusted as one family."""
        p = np.array([[0.01, 0.2], [0.03, 0.04]])
        np.testing.assert_allclose(
            adjust(p, "bh").ravel(), stats.false_discovery_control(p.ravel(), method="bh")
        )

    def test_unknown_method(self):
        """An unknown method name raises a ParameterError naming the choices."""
        with pytest.raises(ParameterError, match="'adjust' parameter"):
            check_method("bonf", "compare")
