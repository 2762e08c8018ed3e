"""Summary (count, mean, sum of squared deviations) against NIST StRD certified values.

Source: NIST Statistical Reference Datasets, univariate summary statistics, data sets
NumAcc1 to NumAcc4 (certified to 15 significant digits). Construction and certified
values from memory:
- NumAcc1: 10000001, 10000003, 10000002; mean 10000002, sd 1.
- NumAcc2: 1001 values, 1.2 then 500 pairs (1.1, 1.3); mean 1.2, sd 0.1.
- NumAcc3: the same pattern around 1000000.2; mean 1000000.2, sd 0.1.
- NumAcc4: the same pattern around 10000000.2; mean 10000000.2, sd 0.1.
(The sd is checkable by hand: 1000 deviations of 0.1 give 10 * 0.01 / 1000 = 0.01.)

Tolerances for the sd are set by the data, not the algorithm: a decimal such as
10000000.1 is stored with an error up to half a unit in the last place (9.3e-10 near 1e7),
which moves each deviation of 0.1 by up to 9.3e-9 relative. Measured with the two-pass
algorithm: NumAcc3 sd 3.5e-10 relative, NumAcc4 5.6e-9; the naive sum-of-squares formula
gives no correct digit on NumAcc4.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import tinfer  # noqa: F401  (registers the accessor)
from tinfer.core.summary import Summary, merge


def _pattern(centre_whole: float) -> np.ndarray:
    """x.2, then 500 pairs (x.1, x.3): the NumAcc2-4 construction (from memory)."""
    return np.array([centre_whole + 0.2] + [centre_whole + 0.1, centre_whole + 0.3] * 500)


NUMACC = {
    # name: (data, certified mean, certified sd, relative tolerance on sd)
    "NumAcc1": (np.array([10000001.0, 10000003.0, 10000002.0]), 10000002.0, 1.0, 1e-15),
    "NumAcc2": (_pattern(1.0), 1.2, 0.1, 1e-14),
    "NumAcc3": (_pattern(1000000.0), 1000000.2, 0.1, 1e-9),
    "NumAcc4": (_pattern(10000000.0), 10000000.2, 0.1, 1.5e-8),
}


def _rel(a, b) -> float:
    return abs(float(a) - b) / abs(b)


@pytest.mark.parametrize("name", list(NUMACC))
class TestOf:
    def test_certified_mean(self, name):
        """Summary.of reproduces the NIST certified mean to 1e-15 relative."""
        x, mean, _, _ = NUMACC[name]
        assert _rel(Summary.of(x).mean, mean) < 1e-15

    def test_certified_sd(self, name):
        """Summary.of reproduces the NIST certified sd within the data's storage error."""
        x, _, sd, tol = NUMACC[name]
        assert _rel(Summary.of(x).sd, sd) < tol

    def test_size(self, name):
        """The generated data set has the documented size (3 or 1001 values)."""
        x = NUMACC[name][0]
        assert float(Summary.of(x).n) == len(x) == (3 if name == "NumAcc1" else 1001)


class TestOfDoubleDouble:
    def test_mean_and_remainder_hold_the_exact_mean(self):
        """mean + mean_lo equals the exact mean of the stored doubles (Fraction) to 1e-24."""
        from fractions import Fraction

        x = 1e9 + np.random.default_rng(11).normal(0.0004, 0.001, 100)
        exact = sum(Fraction(v) for v in x) / len(x)  # exact rational mean, Python stdlib
        s = Summary.of(x)
        err = (Fraction(float(s.mean)) + Fraction(float(s.mean_lo))) - exact
        assert abs(float(err)) < 1e-24 * 1e9
        assert Summary(s.n, s.mean, s.ssd).mean_lo is None  # the remainder is optional


class TestOfEmpty:
    def test_no_values_give_n_zero_without_numpy_warnings(self):
        """Summary.of([]) is n = 0 with no RuntimeWarning (all values missing is reported later)."""
        import warnings

        with warnings.catch_warnings():
            warnings.simplefilter("error")
            s = Summary.of(np.array([]))
        assert float(s.n) == 0.0 and float(s.ssd) == 0.0  # common practice, no source


@pytest.mark.parametrize("name", list(NUMACC))
@pytest.mark.parametrize("chunks", [2, 3, 17, 1001])
class TestMerge:
    def test_chunks_merge_to_certified_values(self, name, chunks):
        """Merging chunk summaries pairwise (Chan et al.) keeps the certified mean and sd."""
        x, mean, sd, tol = NUMACC[name]
        parts = [p for p in np.array_split(x, min(chunks, len(x))) if p.size]
        acc = Summary.of(parts[0])
        for p in parts[1:]:
            acc = acc.merge(Summary.of(p))
        assert float(acc.n) == len(x)
        assert _rel(acc.mean, mean) < 1e-15
        assert _rel(acc.sd, sd) < tol


class TestMergeFunction:
    def test_empty_summary_is_neutral(self):
        """A summary with n = 0 leaves the other unchanged (either side)."""
        a = Summary.of([3.0, 4.0, 8.0])
        empty = Summary(np.asarray(0.0), np.asarray(0.0), np.asarray(0.0))
        for m in (merge(a, empty), merge(empty, a)):
            assert (float(m.n), float(m.mean), float(m.ssd)) == (3.0, 5.0, 14.0)

    def test_vectorised_merge_matches_numpy(self):
        """Merging arrays of summaries equals numpy's mean and ddof=1 variance per row."""
        rng = np.random.default_rng(11)
        data = rng.normal(50, 3, size=(6, 40))
        left = Summary(
            np.full(6, 15.0),
            data[:, :15].mean(1),
            ((data[:, :15].T - data[:, :15].mean(1)) ** 2).sum(0),
        )
        right = Summary(
            np.full(6, 25.0),
            data[:, 15:].mean(1),
            ((data[:, 15:].T - data[:, 15:].mean(1)) ** 2).sum(0),
        )
        m = merge(left, right)
        np.testing.assert_allclose(m.mean, data.mean(1), rtol=1e-14)
        np.testing.assert_allclose(m.var, data.var(1, ddof=1), rtol=1e-12)


class TestFromMoments:
    def test_round_trip(self):
        """n, mean and sd given in go back out unchanged (sd to rounding)."""
        s = Summary.from_moments(12, 5.1, 1.2)
        assert float(s.n) == 12 and float(s.mean) == 5.1
        assert _rel(s.sd, 1.2) < 1e-15


@pytest.mark.parametrize("name", list(NUMACC))
class TestAccessorDescriptives:
    def test_series_one_sample_descriptives(self, name):
        """The accessor's group descriptives give NIST's certified mean and sd."""
        x, mean, sd, tol = NUMACC[name]
        r = pd.Series(x, name="reading").tinfer.one_sample(null=0.0)
        g = r.groups[0]
        assert g.n == len(x)
        assert _rel(g.mean, mean) < 1e-15
        assert _rel(g.sd, sd) < tol

    def test_frame_describe(self, name):
        """DataFrame.tinfer ... describe() table carries the certified mean and sd."""
        x, mean, sd, tol = NUMACC[name]
        table = pd.DataFrame({"reading": x}).tinfer.one_sample("reading").describe()
        assert _rel(table.loc["reading", "mean"], mean) < 1e-15
        assert _rel(table.loc["reading", "sd"], sd) < tol
