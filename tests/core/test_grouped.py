"""One-pass grouped summaries: tinfer.core.grouped against numpy and exact rational arithmetic."""

from __future__ import annotations

from fractions import Fraction

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

from tinfer.core.grouped import grouped_summary, integer_codes


def exact_mean_ssd(values) -> tuple[float, float]:
    """Exact two-pass mean and sum of squared deviations of the doubles, in rationals."""
    xs = [Fraction(float(v)) for v in values]
    mean = sum(xs) / len(xs)
    return float(mean), float(sum((x - mean) ** 2 for x in xs))


def numacc4() -> np.ndarray:
    """NIST StRD NumAcc4-like data (from memory): 1e7 + 0.2, then 1e7 + 0.1, 1e7 + 0.3
    alternating, 1001 values; certified mean 10000000.2, certified sd 0.1."""
    tail = np.tile([10000000.1, 10000000.3], 500)
    return np.concatenate([[10000000.2], tail])


# ---------------------------------------------------------------- grouped_summary
class TestGroupedSummary:
    @settings(max_examples=40, deadline=None)
    @given(st.integers(1, 6), st.integers(0, 10_000))
    def test_matches_numpy_per_group(self, k, seed):
        """n, mean and ssd per group equal numpy's two-pass mean and var (ddof=0) times n."""
        rng = np.random.default_rng(seed)
        codes = rng.integers(0, k, 200)
        x = rng.normal(50, 3, 200)
        s = grouped_summary(x, codes, k)
        for g in range(k):
            v = x[codes == g]
            assert s.n[g] == v.size
            if v.size:
                np.testing.assert_allclose(s.mean[g], v.mean(), rtol=1e-14)
                np.testing.assert_allclose(s.ssd[g], v.var() * v.size, rtol=1e-11, atol=1e-12)
            else:
                assert np.isnan(s.mean[g]) and s.ssd[g] == 0

    def test_large_mean_unit_noise_exact(self):
        """Values near 1e9 with unit noise: mean and ssd equal the exact rational answer."""
        rng = np.random.default_rng(7)
        codes = np.repeat([0, 1, 2], 300)
        x = 1e9 + rng.normal(0, 1, 900) + np.repeat([0.0, 0.5, 2.0], 300)
        s = grouped_summary(x, codes, 3)
        for g in range(3):
            mean, ssd = exact_mean_ssd(x[codes == g])
            assert abs(s.mean[g] - mean) <= 2 * np.spacing(mean)
            np.testing.assert_allclose(s.ssd[g], ssd, rtol=1e-9)

    def test_numacc4(self):
        """NumAcc4-like data: sd 0.1 and mean 10000000.2 (NIST certified values, from memory);
        exact to 1e-12 against rational arithmetic on the same doubles."""
        x = numacc4()
        codes = np.zeros(x.size, dtype=np.intp)
        s = grouped_summary(x, codes, 1)
        mean, ssd = exact_mean_ssd(x)
        np.testing.assert_allclose(s.mean[0], mean, rtol=1e-15)
        np.testing.assert_allclose(s.ssd[0], ssd, rtol=1e-12)
        np.testing.assert_allclose(np.sqrt(s.ssd[0] / (x.size - 1)), 0.1, rtol=1e-8)
        np.testing.assert_allclose(s.mean[0], 10000000.2, rtol=1e-15)

    def test_counts_argument_reused(self):
        """Passing precomputed counts gives the same summaries."""
        codes = np.array([1, 0, 1, 1])
        x = np.array([2.0, 5.0, 4.0, 9.0])
        a = grouped_summary(x, codes, 3)
        b = grouped_summary(x, codes, 3, counts=np.bincount(codes, minlength=3))
        np.testing.assert_array_equal(a.ssd, b.ssd)
        assert a.n.tolist() == [1.0, 3.0, 0.0]


# ---------------------------------------------------------------- integer_codes
class TestIntegerCodes:
    def test_offsets_by_minimum(self):
        """Codes are value - min, levels the full range (absent levels included)."""
        codes, levels = integer_codes(np.array([-3, 0, 2, -3], dtype=np.int32))
        assert codes.tolist() == [0, 3, 5, 0]
        assert levels.tolist() == [-3, -2, -1, 0, 1, 2]

    def test_refuses_floats_and_sparse_ranges(self):
        """Floats and very sparse integer ranges fall back (None) to hashing."""
        assert integer_codes(np.array([1.0, 2.0])) is None
        assert integer_codes(np.array([0, 10**12])) is None

    def test_input_unchanged(self):
        """The input array is never modified."""
        v = np.array([7, 5, 9], dtype=np.int64)
        codes, _ = integer_codes(v)
        assert v.tolist() == [7, 5, 9] and codes.tolist() == [2, 0, 4]
