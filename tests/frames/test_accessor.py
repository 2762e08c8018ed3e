"""The .tinfer accessor: published data, scipy agreement, missing values, dtypes, properties."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
import strategies as tst
from hypothesis import assume, given, settings
from references import SCIPY_PPF_RTOL
from scipy import stats

from tinfer import DataError

# Student (1908), "The probable error of a mean", the sleep data of Cushny and Peebles:
# extra hours of sleep of 10 patients under two drugs (entered from memory).
DRUG_1 = [0.7, -1.6, -0.2, -1.2, -0.1, 3.4, 3.7, 0.8, 0.0, 2.0]
DRUG_2 = [1.9, 0.8, 1.1, 0.1, -0.1, 4.4, 5.5, 1.6, 4.6, 3.4]
# Published paired result (drug 2 minus drug 1): t = 4.0621, df = 9, p = 0.002833,
# mean difference 1.58, 95% CI 0.700 to 2.460 (from memory).
SIDE_TO_SCIPY = {"two-sided": "two-sided", "upper": "greater", "lower": "less"}


def _sleep_wide() -> pd.DataFrame:
    return pd.DataFrame({"patient": range(1, 11), "drug_1": DRUG_1, "drug_2": DRUG_2})


def _sleep_long() -> pd.DataFrame:
    w = _sleep_wide()
    long = w.melt(id_vars="patient", var_name="drug", value_name="extra_h")
    return long.sample(frac=1.0, random_state=3).reset_index(drop=True)  # order must not matter


class TestPairedSleepData:
    def _check(self, r):
        assert abs(r.t - 4.0621) <= 0.00005
        assert r.df == 9
        assert abs(r.p - 0.002833) <= 0.0000005
        assert r.estimate == pytest.approx(1.58, rel=1e-12)
        assert abs(r.ci[0] - 0.700) <= 0.0005 and abs(r.ci[1] - 2.460) <= 0.0005

    def test_wide(self):
        """Wide data (one row per patient) reproduce Student's t = 4.06 on 9 df."""
        r = _sleep_wide().tinfer.paired("drug_2", "drug_1")
        self._check(r)
        assert r.comparison == "drug_2 minus drug_1"

    def test_long(self):
        """Long data matched by patient give the same result as the wide form."""
        r = _sleep_long().tinfer.paired(
            "extra_h", by="drug", subject="patient", groups=("drug_2", "drug_1")
        )
        self._check(r)
        wide = _sleep_wide().tinfer.paired("drug_2", "drug_1")
        assert r.t == pytest.approx(wide.t, rel=1e-14)

    def test_matches_scipy_ttest_rel(self):
        """Paired result equals scipy.stats.ttest_rel on the same columns, every side."""
        w = _sleep_wide()
        for side, alt in SIDE_TO_SCIPY.items():
            r = w.tinfer.paired("drug_2", "drug_1", side=side, level=0.9)
            ref = stats.ttest_rel(w["drug_2"], w["drug_1"], alternative=alt)
            assert r.t == pytest.approx(ref.statistic, rel=1e-12)
            assert r.p == pytest.approx(ref.pvalue, rel=1e-12)
            ci = ref.confidence_interval(0.9)
            assert r.ci == pytest.approx((ci.low, ci.high), rel=SCIPY_PPF_RTOL)


def _two_group_frame(rng, na, nb) -> pd.DataFrame:
    a = rng.normal(12.0, 2.0, na)
    b = rng.normal(11.0, 3.5, nb)
    return pd.DataFrame({"kg": np.r_[a, b], "bed": ["drip"] * na + ["furrow"] * nb})


class TestTwoSample:
    @pytest.mark.parametrize("pooled", [False, True])
    @pytest.mark.parametrize("side", ["two-sided", "upper", "lower"])
    def test_long_form_matches_scipy(self, side, pooled):
        """by= splits the groups; t, df, p, CI equal scipy.stats.ttest_ind to 1e-12."""
        df = _two_group_frame(np.random.default_rng(8), 17, 26)
        r = df.tinfer.two_sample("kg", by="bed", side=side, pooled=pooled, level=0.99)
        a = df.loc[df.bed == "drip", "kg"]
        b = df.loc[df.bed == "furrow", "kg"]
        ref = stats.ttest_ind(a, b, equal_var=pooled, alternative=SIDE_TO_SCIPY[side])
        assert r.comparison == "drip minus furrow"
        assert r.t == pytest.approx(ref.statistic, rel=1e-12)
        assert r.df == pytest.approx(ref.df, rel=1e-12)
        assert r.p == pytest.approx(ref.pvalue, rel=1e-12)
        ci = ref.confidence_interval(0.99)
        assert r.ci == pytest.approx((ci.low, ci.high), rel=1e-12)

    def test_groups_order_and_pair_of_columns(self):
        """groups=(second, first) reverses the difference; a column pair gives the same test."""
        df = _two_group_frame(np.random.default_rng(9), 9, 12)
        fwd = df.tinfer.two_sample("kg", by="bed")
        rev = df.tinfer.two_sample("kg", by="bed", groups=("furrow", "drip"))
        assert rev.estimate == pytest.approx(-fwd.estimate, rel=1e-15)
        wide = pd.DataFrame(
            {
                "drip": df.loc[df.bed == "drip", "kg"].reset_index(drop=True),
                "furrow": df.loc[df.bed == "furrow", "kg"].reset_index(drop=True),
            }
        )
        pair = wide.tinfer.two_sample(("drip", "furrow"))
        assert pair.t == pytest.approx(fwd.t, rel=1e-14)
        assert pair.groups[0].n == 9 and pair.groups[1].n_missing == 0


class TestOneSample:
    def test_matches_scipy(self):
        """one_sample on a column equals scipy.stats.ttest_1samp (t, p, CI)."""
        x = np.random.default_rng(4).normal(501.0, 1.2, 23)
        r = pd.DataFrame({"fill_g": x}).tinfer.one_sample("fill_g", null=500, side="upper")
        ref = stats.ttest_1samp(x, 500, alternative="greater")
        assert r.t == pytest.approx(ref.statistic, rel=1e-12)
        assert r.p == pytest.approx(ref.pvalue, rel=1e-12)
        assert r.ci[0] == pytest.approx(ref.confidence_interval(0.95).low, rel=1e-12)
        assert r.ci[1] == np.inf

    @pytest.mark.parametrize(("scale", "word"), [(1e-200, "too small"), (1e155, "too large")])
    def test_spread_beyond_double_precision_is_refused(self, scale, word):
        """Spreads whose squares leave double precision raise a DataError (was: t = 0, p = 1)."""
        # IEEE 754 binary64 range, common practice: 1e-200 squared underflows to 0 and 1e155
        # squared overflows; before, the first said "no spread", the second gave t = 0, p = 1.
        df = pd.DataFrame({"x": np.array([1.0, 2.0, 4.0]) * scale})
        with pytest.raises(DataError, match=word):
            df.tinfer.one_sample("x")
        wide = pd.DataFrame({"p": np.array([1.0, 2.0, 4.0]) * scale, "q": [0.0, 0.0, 0.0]})
        with pytest.raises(DataError, match=word):
            wide.tinfer.two_sample(("p", "q"))


class TestMissingValues:
    def test_dropped_per_group_and_counted(self):
        """np.nan, None and pd.NA are dropped per group and counted in n_missing."""
        df = pd.DataFrame(
            {
                "v": pd.array([1.0, None, 2.5, 3.0, np.nan, 4.0, 4.5, pd.NA, 6.0], dtype="Float64"),
                "g": ["a", "a", "a", "a", "b", "b", "b", "b", "b"],
            }
        )
        r = df.tinfer.two_sample("v", by="g")
        assert [(g.label, g.n, g.n_missing) for g in r.groups] == [("a", 3, 1), ("b", 3, 2)]
        ref = stats.ttest_ind([1.0, 2.5, 3.0], [4.0, 4.5, 6.0], equal_var=False)
        assert r.t == pytest.approx(ref.statistic, rel=1e-12)

    def test_rows_without_group_are_noted(self):
        """Rows whose group is missing are left out and said so, also after recompute."""
        df = pd.DataFrame(
            {"v": [1.0, 2.5, 3.0, 9.0, 4.0, 4.5, 6.0, 7.0], "g": ["a", "a", "a", None] + ["b"] * 4}
        )
        df.loc[7, "g"] = np.nan
        r = df.tinfer.two_sample("v", by="g")
        assert r.warnings[0] == "2 row(s) with a missing 'g' value were not used."  # by hand
        assert r.recompute(side="upper").warnings == r.warnings
        ref = stats.ttest_ind([1.0, 2.5, 3.0], [4.0, 4.5, 6.0], equal_var=False)
        assert r.t == pytest.approx(ref.statistic, rel=1e-12)

    def test_paired_drops_pairwise(self):
        """A pair with either value missing is dropped whole and counted once."""
        df = pd.DataFrame(
            {"pre": [5.0, 6.1, np.nan, 7.2, 6.6, 5.9], "post": [4.1, None, 5.0, 6.0, 6.1, 5.0]}
        )
        r = df.tinfer.paired("pre", "post")
        assert r.groups[-1].n == 4 and r.groups[-1].n_missing == 2
        keep = df.dropna()
        ref = stats.ttest_rel(keep["pre"], keep["post"])
        assert r.t == pytest.approx(ref.statistic, rel=1e-12)


class TestDtypes:
    def _frame(self):
        return pd.DataFrame(
            {
                "v": [3.1, 2.4, 5.0, 4.4, 6.2, 5.9, 1.0, 7.7],
                "g": ["lo", "hi", "lo", "hi", "lo", "hi", "lo", "hi"],
            }
        )

    def test_string_dtype_groups(self):
        """A pandas 3 "str" group column works and gives the object-dtype answer."""
        df = self._frame()
        ref = df.astype({"g": object}).tinfer.two_sample("v", by="g")
        r = df.astype({"g": "str"}).tinfer.two_sample("v", by="g")
        assert r.t == ref.t and r.comparison == "hi minus lo"

    def test_categorical_groups(self):
        """A categorical group column (even with an unused category) works."""
        df = self._frame()
        df["g"] = pd.Categorical(df["g"], categories=["lo", "hi", "unused"])
        r = df.tinfer.two_sample("v", by="g", groups=("lo", "hi"))
        ref = stats.ttest_ind(df.v[df.g == "lo"], df.v[df.g == "hi"], equal_var=False)
        assert r.t == pytest.approx(ref.statistic, rel=1e-12)

    @pytest.mark.parametrize("dtype", ["Float64", "Int64", "float32", "int64"])
    def test_value_dtypes(self, dtype):
        """Nullable Float64 / Int64 and plain numeric columns give the float64 answer."""
        df = pd.DataFrame({"v": [3, 2, 5, 4, 6, 5, 1, 7], "g": list("abababab")})
        ref = df.astype({"v": "float64"}).tinfer.two_sample("v", by="g")
        r = df.astype({"v": dtype}).tinfer.two_sample("v", by="g")
        assert r.t == pytest.approx(ref.t, rel=1e-15)


class TestCallerDataUntouched:
    def test_frame_not_modified(self):
        """No method modifies the caller's DataFrame (compared with a deep copy)."""
        df = pd.DataFrame(
            {
                "v": pd.array([1.0, None, 2.5, 3.0, 4.0, 4.5, 6.0, 2.0], dtype="Float64"),
                "w": [1.5, 2.0, np.nan, 3.5, 3.0, 5.0, 6.5, 2.5],
                "g": pd.Series(list("abababab"), dtype="str"),
                "s": [1, 1, 2, 2, 3, 3, 4, 4],
            }
        )
        before = df.copy(deep=True)
        df.tinfer.two_sample("v", by="g")
        df.tinfer.two_sample(("v", "w"))
        df.tinfer.paired("v", "w")
        df.tinfer.paired("w", by="g", subject="s")
        df.tinfer.one_sample("w", null=2)
        df["w"].tinfer.one_sample()
        pd.testing.assert_frame_equal(df, before)


# ----------------------------------------------------------------------- properties
def _frame_two(a: np.ndarray, b: np.ndarray) -> pd.DataFrame:
    return pd.DataFrame({"v": np.r_[a, b], "g": ["a"] * a.size + ["b"] * b.size})


def _p_close(p1: float, p2: float, t: float, rtol: float) -> bool:
    # d log p / dt grows like t: the tolerance on p follows (1 + t^2)
    return p1 == pytest.approx(p2, rel=rtol * (1 + t * t), abs=1e-300)


class TestProperties:
    @settings(max_examples=40, deadline=None)
    @given(tst.samples(), tst.shifts, tst.nulls, tst.sides)
    def test_shift_moves_only_the_estimate(self, x, c, null, side):
        """Adding c to data and null moves the estimate by c; t, p, effect are unchanged."""
        r0 = pd.Series(x).tinfer.one_sample(null=null, side=side)
        r1 = pd.Series(x + c).tinfer.one_sample(null=null + c, side=side)
        rtol = 1e-9  # (|x| + |c|) / sd is at most ~2e5 by the strategy: ~1e-11 expected
        assert r1.estimate == pytest.approx(r0.estimate + c, rel=1e-12, abs=1e-9 * (1 + abs(c)))
        assert r1.t == pytest.approx(r0.t, rel=rtol, abs=1e-9)
        assert _p_close(r1.p, r0.p, r0.t, rtol)
        assert r1.effect.value == pytest.approx(r0.effect.value, rel=rtol, abs=1e-9)

    @settings(max_examples=40, deadline=None)
    @given(tst.two_samples, tst.scales, tst.sides, tst.levels)
    def test_scaling_leaves_t_p_effect(self, samples, c, side, level):
        """Multiplying all values by c > 0 scales estimate and CI; t, p, g unchanged."""
        a, b = samples
        r0 = _frame_two(a, b).tinfer.two_sample("v", by="g", side=side, level=level)
        r1 = _frame_two(a * c, b * c).tinfer.two_sample("v", by="g", side=side, level=level)
        assert r1.estimate == pytest.approx(r0.estimate * c, rel=1e-12, abs=1e-12 * c)
        assert r1.t == pytest.approx(r0.t, rel=1e-12, abs=1e-12)
        assert r1.df == pytest.approx(r0.df, rel=1e-12)
        assert _p_close(r1.p, r0.p, r0.t, 1e-12)
        assert r1.effect.value == pytest.approx(r0.effect.value, rel=1e-12, abs=1e-12)
        for lo1, lo0 in zip(r1.ci, r0.ci, strict=True):
            assert lo1 == pytest.approx(lo0 * c, rel=1e-12, abs=1e-12 * c * (1 + abs(r0.se)))

    @settings(max_examples=40, deadline=None)
    @given(tst.two_samples, tst.levels)
    def test_swapping_groups(self, samples, level):
        """Swapping groups negates estimate, t and g; p stays (sides mirror)."""
        a, b = samples
        df = _frame_two(a, b)
        for side, mirrored in (("two-sided", "two-sided"), ("upper", "lower")):
            r0 = df.tinfer.two_sample("v", by="g", side=side, level=level)
            r1 = df.tinfer.two_sample("v", by="g", groups=("b", "a"), side=mirrored, level=level)
            assert r1.estimate == pytest.approx(-r0.estimate, rel=1e-14, abs=1e-300)
            assert r1.t == pytest.approx(-r0.t, rel=1e-14, abs=1e-300)
            assert r1.p == pytest.approx(r0.p, rel=1e-12)
            assert r1.effect.value == pytest.approx(-r0.effect.value, rel=1e-14, abs=1e-300)
            assert r1.effect.ci[0] == pytest.approx(-r0.effect.ci[1], rel=1e-9, abs=1e-9)

    @settings(max_examples=60, deadline=None)
    @given(tst.samples(), tst.nulls, tst.sides, tst.levels)
    def test_p_below_alpha_iff_ci_excludes_null(self, x, null, side, level):
        """p < 1 - level exactly when the interval leaves out the null (each side)."""
        r = pd.Series(x).tinfer.one_sample(null=null, side=side, level=level)
        alpha = 1 - level
        assume(abs(r.p - alpha) > 1e-9 * alpha)  # at the boundary rounding decides
        excludes = not (r.ci[0] <= null <= r.ci[1])
        assert (r.p < alpha) == excludes == r.significant

    @settings(max_examples=30, deadline=None)
    @given(tst.paired_samples(), tst.levels, tst.sides)
    def test_recompute_equals_fresh_call(self, pair, level, side):
        """r.recompute(level=..., side=...) equals a fresh call with those options."""
        first, second = pair
        df = pd.DataFrame({"pre": first, "post": second})
        r = df.tinfer.paired("pre", "post")
        again = r.recompute(level=level, side=side)
        fresh = df.tinfer.paired("pre", "post", level=level, side=side)
        assert again.to_dict() == fresh.to_dict()
        assert again.groups == fresh.groups


class TestHypothesisWords:
    def test_one_sided_null_is_the_complement(self):
        """H0 of a one-sided test is the complement of H1 (common practice, no source)."""
        df = pd.DataFrame({"v": [1.2, 0.8, 1.9, 1.4, 0.7]})
        words = {
            side: (r.null_hypothesis, r.alternative)
            for side in ("two-sided", "upper", "lower")
            for r in [df.tinfer.one_sample("v", null=1, side=side)]
        }
        assert words["two-sided"][0] == "the mean of v equals 1.00"
        assert "is at most 1.00" in words["upper"][0] and "greater than" in words["upper"][1]
        assert "is at least 1.00" in words["lower"][0] and "less than" in words["lower"][1]
