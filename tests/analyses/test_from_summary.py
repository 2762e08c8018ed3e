"""tinfer.from_summary: published worked examples and equality with the raw-data path."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
import strategies as tst
from hypothesis import given, settings

import tinfer

# Moore and McCabe, Introduction to the Practice of Statistics, the reading-activities
# (DRP) example of chapter 7 (from memory): treatment n = 21, mean 51.48, sd 11.01;
# control n = 23, mean 41.52, sd 17.15. Printed: Welch t = 2.31, df = 37.86 (software),
# one-sided P = 0.0132; pooled t = 2.27, df = 42, one-sided P = 0.014.
DRP = dict(n=(21, 23), mean=(51.48, 41.52), sd=(11.01, 17.15), labels=("treatment", "control"))


class TestPublishedExamples:
    def test_welch_reading_example(self):
        """Welch t, df and one-sided p match the printed 2.31, 37.86, 0.0132 to their digits."""
        r = tinfer.from_summary(**DRP, side="upper")
        assert abs(r.t - 2.31) <= 0.005
        assert abs(r.df - 37.86) <= 0.005
        assert abs(r.p - 0.0132) <= 0.00005
        assert r.comparison == "treatment minus control"
        assert r.estimate == pytest.approx(9.96, rel=1e-12)

    def test_pooled_reading_example(self):
        """Pooled t, df and one-sided p match the printed 2.27, 42, 0.014 to their digits."""
        r = tinfer.from_summary(**DRP, side="upper", pooled=True)
        assert abs(r.t - 2.27) <= 0.005
        assert r.df == 42
        assert abs(r.p - 0.014) <= 0.0005

    def test_paired_sleep_differences(self):
        """Student's (1908) sleep data as n, mean, sd of differences: t = 4.06 on 9 df.

        Summary of the ten differences (from memory): mean 1.58, sd 1.229995;
        the published paired t is 4.0621 with p = 0.002833.
        """
        r = tinfer.from_summary(10, 1.58, 1.229995483, paired=True, labels=("drug 2", "drug 1"))
        assert abs(r.t - 4.0621) <= 0.00005
        assert r.df == 9
        assert abs(r.p - 0.002833) <= 0.0000005
        assert r.design == "paired" and r.comparison == "drug 2 minus drug 1"


def _assert_same(a: tinfer.TResult, b: tinfer.TResult, rtol: float = 1e-12) -> None:
    for name in ("se", "df"):
        assert getattr(a, name) == pytest.approx(getattr(b, name), rel=rtol, abs=1e-300)
    # The raw path keeps each mean's rounding remainder, the summary path cannot: near a zero
    # difference the two agree to rounding of the means, so the scale is the SE, not the value.
    assert a.estimate == pytest.approx(b.estimate, rel=rtol, abs=rtol * a.se)
    assert a.t == pytest.approx(b.t, rel=rtol, abs=rtol)
    # p's relative error grows with t^2 (d log p / dt ~ t); the tolerance follows it
    assert a.p == pytest.approx(b.p, rel=rtol * (1 + a.t**2))
    for x, y in zip(a.ci, b.ci, strict=True):
        assert x == pytest.approx(y, rel=rtol, abs=rtol * (abs(a.estimate) + a.se))
    assert a.effect.value == pytest.approx(b.effect.value, rel=rtol, abs=1e-14)
    for x, y in zip(a.effect.ci, b.effect.ci, strict=True):
        assert x == pytest.approx(y, rel=1e-9, abs=1e-9)  # root finding stops at ~1e-12


class TestEqualsRawPath:
    @settings(max_examples=40, deadline=None)
    @given(tst.two_samples, tst.sides, tst.levels)
    def test_two_sample(self, samples, side, level):
        """Summaries of the raw data give the accessor's numbers to 1e-12 relative."""
        a, b = samples
        df = pd.DataFrame({"v": np.r_[a, b], "g": ["a"] * a.size + ["b"] * b.size})
        for pooled in (False, True):
            raw = df.tinfer.two_sample("v", by="g", side=side, level=level, pooled=pooled)
            pub = tinfer.from_summary(
                n=(a.size, b.size),
                mean=(a.mean(), b.mean()),
                sd=(a.std(ddof=1), b.std(ddof=1)),
                side=side,
                level=level,
                pooled=pooled,
            )
            _assert_same(pub, raw)

    @settings(max_examples=40, deadline=None)
    @given(tst.samples(), tst.nulls, tst.sides)
    def test_one_sample(self, x, null, side):
        """A one-sample test from n, mean, sd equals the test on the values."""
        raw = pd.Series(x, name="x").tinfer.one_sample(null=null, side=side)
        pub = tinfer.from_summary(x.size, x.mean(), x.std(ddof=1), null=null, side=side)
        _assert_same(pub, raw)


class TestParameters:
    def test_mixed_scalars_and_pairs(self):
        """n as a pair with mean as a scalar is refused with a ParameterError."""
        with pytest.raises(tinfer.ParameterError, match="'n', 'mean' and 'sd'"):
            tinfer.from_summary(n=(3, 4), mean=1.0, sd=(1.0, 2.0))

    @pytest.mark.parametrize(
        ("kw", "name"), [({"sd": -1.0}, "sd"), ({"n": 0}, "n"), ({"n": 10.5}, "n")]
    )
    def test_bad_numbers(self, kw, name):
        """A negative sd, n < 1 or a fractional n names the parameter (was: df = 9.5)."""
        args = {"n": 5, "mean": 1.0, "sd": 1.0} | kw
        with pytest.raises(ValueError, match=f"'{name}' parameter of from_summary"):
            tinfer.from_summary(**args)

    @pytest.mark.parametrize(
        "kw",
        [
            {"n": 10, "mean": 1.0, "sd": 1.0, "paired": True, "labels": ("a",)},
            {"n": (10, 10), "mean": (1.0, 0.0), "sd": (1.0, 1.0), "labels": ("a",)},
            {"n": (10, 10), "mean": (1.0, 0.0), "sd": (1.0, 1.0), "labels": "ab"},
        ],
    )
    def test_labels_must_be_two_names(self, kw):
        """labels of the wrong length raise a ParameterError (was IndexError / bare zip error)."""
        with pytest.raises(tinfer.ParameterError, match="'labels' parameter of from_summary"):
            tinfer.from_summary(**kw)

    def test_level_message_shape(self):
        """level=1.5 gives the one message shape used everywhere."""
        with pytest.raises(tinfer.ParameterError) as info:
            tinfer.from_summary(n=(5, 6), mean=(1.0, 2.0), sd=(1.0, 1.0), level=1.5)
        assert str(info.value) == (
            "The 'level' parameter of from_summary must be a float in (0, 1). Got 1.5 instead."
        )
