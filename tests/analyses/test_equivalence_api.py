"""Equivalence, non-inferiority and superiority claims through the public API.

``margin=`` on the accessor methods and on ``tinfer.from_summary``; expected values from
scipy.stats one-sided t tests (reference library) with the null moved to the margin.
The data are invented: fill weights of a packing line, yields of two invented plot layouts,
readings of a made-up gauge before and after recalibration.
"""

from __future__ import annotations

import math

import numpy as np
import pandas as pd
import pytest
from scipy import stats

import tinfer
from tinfer import ParameterError


@pytest.fixture
def plots():
    """Two invented plot layouts with unequal spreads."""
    rng = np.random.default_rng(42)
    a = rng.normal(20.3, 1.1, 14)
    b = rng.normal(20.0, 1.9, 11)
    return pd.DataFrame({"kg": np.r_[a, b], "layout": ["ridge"] * 14 + ["flat"] * 11}), a, b


@pytest.fixture
def fills():
    rng = np.random.default_rng(5)
    return pd.DataFrame({"fill_g": rng.normal(500.4, 1.2, 18)})


@pytest.fixture
def gauge():
    rng = np.random.default_rng(9)
    before = rng.normal(12.0, 0.8, 15)
    after = before + rng.normal(0.05, 0.25, 15)
    return pd.DataFrame({"before": before, "after": after})


# ---------------------------------------------------------------------------- two_sample
class TestTwoSampleMargin:
    @pytest.mark.parametrize("pooled", [False, True])
    def test_one_sided_ps_match_scipy(self, plots, pooled):
        """Both one-sided tests equal scipy's ttest_ind at the band limits (Welch or pooled)."""
        df, a, b = plots
        r = df.tinfer.two_sample(
            "kg", by="layout", groups=("ridge", "flat"), margin=1.5, pooled=pooled
        )
        eq = r.equivalence
        ref_lo = stats.ttest_ind(a + 1.5, b, equal_var=pooled, alternative="greater")
        ref_hi = stats.ttest_ind(a - 1.5, b, equal_var=pooled, alternative="less")
        assert eq.lower.t == pytest.approx(ref_lo.statistic, rel=1e-10)
        assert eq.lower.p == pytest.approx(ref_lo.pvalue, rel=1e-9)
        assert eq.upper.t == pytest.approx(ref_hi.statistic, rel=1e-10)
        assert eq.upper.p == pytest.approx(ref_hi.pvalue, rel=1e-9)
        assert eq.lower.df == pytest.approx(ref_lo.df, rel=1e-10)
        assert eq.p == max(eq.lower.p, eq.upper.p)
        assert (eq.low, eq.high) == (-1.5, 1.5)

    def test_decision_matches_interval_in_band(self, plots):
        """The decision is "the 90% CI lies in the band", the CI from scipy's ppf."""
        df, a, b = plots
        for m in (0.3, 0.8, 1.2, 1.6, 2.5, 4.0):
            eq = df.tinfer.two_sample(
                "kg", by="layout", groups=("ridge", "flat"), margin=m
            ).equivalence
            res = stats.ttest_ind(a, b, equal_var=False)
            se = (a.mean() - b.mean()) / res.statistic
            c = stats.t.ppf(0.95, res.df)
            lo, hi = a.mean() - b.mean() - c * se, a.mean() - b.mean() + c * se
            assert eq.ci == pytest.approx((lo, hi), rel=1e-10)
            assert eq.decision == (lo > -m and hi < m)
            assert eq.ci_level == pytest.approx(0.90)

    def test_non_inferiority_equals_one_sided_test_at_margin(self, plots):
        """worse="lower": p equals scipy's one-sided test of "difference > -margin"."""
        df, a, b = plots
        r = df.tinfer.two_sample(
            "kg", by="layout", groups=("ridge", "flat"), margin=0.7, worse="lower"
        )
        ref = stats.ttest_ind(a + 0.7, b, equal_var=False, alternative="greater")
        assert r.equivalence.kind == "non-inferiority"
        assert r.equivalence.upper is None
        assert r.equivalence.p == pytest.approx(ref.pvalue, rel=1e-9)
        assert r.equivalence.decision == (ref.pvalue < 0.05)

    def test_non_inferiority_higher_is_worse(self, plots):
        """worse="higher": p equals scipy's one-sided test of "difference < margin"."""
        df, a, b = plots
        r = df.tinfer.two_sample(
            "kg", by="layout", groups=("ridge", "flat"), margin=0.7, worse="higher"
        )
        ref = stats.ttest_ind(a - 0.7, b, equal_var=False, alternative="less")
        assert r.equivalence.lower is None
        assert r.equivalence.p == pytest.approx(ref.pvalue, rel=1e-9)

    def test_superiority_by_margin(self, plots):
        """superior=True: p equals scipy's one-sided test of "difference > +margin"."""
        df, a, b = plots
        r = df.tinfer.two_sample(
            "kg", by="layout", groups=("ridge", "flat"), margin=0.2, worse="lower", superior=True
        )
        ref = stats.ttest_ind(a - 0.2, b, equal_var=False, alternative="greater")
        assert r.equivalence.kind == "superiority"
        assert r.equivalence.p == pytest.approx(ref.pvalue, rel=1e-9)
        assert r.equivalence.low == pytest.approx(0.2)

    def test_standardised_margin_converts_with_pooled_sd(self, plots):
        """margin_units="standardised": the band is margin times the pooled SD (numpy)."""
        df, a, b = plots
        r = df.tinfer.two_sample(
            "kg", by="layout", groups=("ridge", "flat"), margin=0.5, margin_units="standardised"
        )
        n1, n2 = len(a), len(b)
        sp = math.sqrt(((n1 - 1) * a.var(ddof=1) + (n2 - 1) * b.var(ddof=1)) / (n1 + n2 - 2))
        eq = r.equivalence
        assert (eq.low, eq.high) == pytest.approx((-0.5 * sp, 0.5 * sp), rel=1e-12)
        assert eq.sd == pytest.approx(sp, rel=1e-12)
        assert "depends on the observed SD" in eq.note
        ref = stats.ttest_ind(a - 0.5 * sp, b, equal_var=False, alternative="less")
        assert eq.upper.p == pytest.approx(ref.pvalue, rel=1e-9)


# ---------------------------------------------------------------------------- one_sample
class TestOneSampleMargin:
    def test_asymmetric_offsets_are_relative_to_null(self, fills):
        """margin=(-1.5, 2.0) around null=500 is the band 498.5 to 502, tested by scipy."""
        r = fills.tinfer.one_sample("fill_g", null=500, margin=(-1.5, 2.0), units="g")
        x = fills["fill_g"].to_numpy()
        eq = r.equivalence
        assert (eq.low, eq.high) == (498.5, 502.0)
        assert eq.lower.p == pytest.approx(
            stats.ttest_1samp(x, 498.5, alternative="greater").pvalue, rel=1e-10
        )
        assert eq.upper.p == pytest.approx(
            stats.ttest_1samp(x, 502.0, alternative="less").pvalue, rel=1e-10
        )

    def test_standardised_margin_uses_sample_sd(self, fills):
        """A standardised one-sample margin converts with the n - 1 sample SD."""
        r = fills.tinfer.one_sample("fill_g", null=500, margin=0.25, margin_units="standardized")
        sd = fills["fill_g"].std(ddof=1)
        assert r.equivalence.high - 500 == pytest.approx(0.25 * sd, rel=1e-10)

    def test_series_accessor_takes_margin(self, fills):
        """The Series accessor gives the same one-sided p as scipy."""
        x = fills["fill_g"]
        r = x.tinfer.one_sample(null=500, margin=1.0, worse="lower")
        ref = stats.ttest_1samp(x.to_numpy(), 499.0, alternative="greater").pvalue
        assert r.equivalence.p == pytest.approx(ref, rel=1e-10)


# ---------------------------------------------------------------------------- paired
class TestPairedMargin:
    def test_ps_match_scipy_ttest_rel(self, gauge):
        """Paired one-sided ps equal scipy's ttest_rel with the first column shifted."""
        r = gauge.tinfer.paired("after", "before", margin=0.2)
        a, b = gauge["after"].to_numpy(), gauge["before"].to_numpy()
        eq = r.equivalence
        ref_lo = stats.ttest_rel(a + 0.2, b, alternative="greater")
        ref_hi = stats.ttest_rel(a - 0.2, b, alternative="less")
        assert eq.lower.p == pytest.approx(ref_lo.pvalue, rel=1e-9)
        assert eq.upper.p == pytest.approx(ref_hi.pvalue, rel=1e-9)

    def test_standardised_margin_uses_sd_of_differences(self, gauge):
        """A standardised paired margin converts with the SD of the differences."""
        r = gauge.tinfer.paired("after", "before", margin=0.5, margin_units="standardised")
        sd = (gauge["after"] - gauge["before"]).std(ddof=1)
        assert r.equivalence.high == pytest.approx(0.5 * sd, rel=1e-10)


# ---------------------------------------------------------------------------- from_summary
class TestFromSummaryMargin:
    def test_published_summaries_match_scipy(self):
        """from_summary with a margin equals scipy's ttest_ind_from_stats at the limits."""
        r = tinfer.from_summary(n=(16, 18), mean=(7.4, 7.1), sd=(0.9, 1.3), margin=1.0)
        eq = r.equivalence
        # reference: scipy.stats.ttest_ind_from_stats, first mean shifted by the limit
        ref_lo = stats.ttest_ind_from_stats(
            8.4, 0.9, 16, 7.1, 1.3, 18, equal_var=False, alternative="greater"
        )
        ref_hi = stats.ttest_ind_from_stats(
            6.4, 0.9, 16, 7.1, 1.3, 18, equal_var=False, alternative="less"
        )
        assert eq.lower.p == pytest.approx(ref_lo.pvalue, rel=1e-9)
        assert eq.upper.p == pytest.approx(ref_hi.pvalue, rel=1e-9)


# ---------------------------------------------------------------------------- words
class TestWords:
    def test_headline_states_equivalence(self):
        """headline() gives the interval at 1 - 2 alpha and the conclusion in words."""
        r = tinfer.from_summary(
            n=(40, 40),
            mean=(10.1, 10.0),
            sd=(1.0, 1.0),
            margin=2.0,
            units="kg",
            labels=("ridge", "flat"),
        )
        h = r.headline()
        assert "90% CI" in h and "equivalent within ±2 kg" in h and "TOST p =" in h
        assert "not shown" not in h

    def test_headline_states_failure(self):
        """A failed claim says "not shown", never "not equivalent"."""
        r = tinfer.from_summary(n=(5, 5), mean=(10.1, 10.0), sd=(3.0, 3.0), margin=1.0)
        assert "not shown equivalent within ±1" in r.headline()

    def test_non_inferiority_words_name_the_worse_direction(self):
        """Non-inferiority words state the margin and which direction is worse."""
        r = tinfer.from_summary(
            n=50, mean=500.6, sd=1.0, null=500, margin=0.5, worse="lower", units="g"
        )
        c = r.equivalence.conclusion
        assert c == "not worse than 500 g by more than 0.5 g, counting lower as worse"
        assert "one-sided 95% lower bound" in r.headline()

    def test_trimmed_one_sample_words_name_the_trimmed_mean(self, fills):
        """With trim, the one-sided nulls and the failure words speak of the trimmed mean."""
        r = fills.tinfer.one_sample("fill_g", null=500, margin=0.01, worse="lower", trim=0.2)
        eq = r.equivalence
        # common practice, no source: Yuen's test is about trimmed means, not means
        assert eq.lower.null_hypothesis.startswith("20% trimmed mean at or below")
        assert not eq.decision and "the 20% trimmed mean could be worse" in eq.conclusion
        plain = r.recompute(trim=0.0).equivalence
        assert plain.lower.null_hypothesis.startswith("mean at or below")

    def test_to_dict_holds_the_tost_numbers(self):
        """to_dict() carries both one-sided tests, the overall p and the decision."""
        r = tinfer.from_summary(n=30, mean=0.2, sd=1.0, margin=0.8)
        d = r.to_dict()
        eq = r.equivalence
        assert d["tost_p_lower"] == eq.lower.p and d["tost_p_upper"] == eq.upper.p
        assert d["tost_p"] == eq.p and d["tost_decision"] is eq.decision
        assert (d["margin_low"], d["margin_high"]) == (-0.8, 0.8)
        assert "tost_p" not in tinfer.from_summary(n=30, mean=0.2, sd=1.0).to_dict()


# ---------------------------------------------------------------------------- recompute
class TestRecompute:
    def test_recompute_keeps_margin(self, plots):
        """recompute(level=0.9) keeps the margin and moves the one-sided tests to 0.10."""
        df, a, b = plots
        r = df.tinfer.two_sample("kg", by="layout", groups=("ridge", "flat"), margin=1.5)
        r2 = r.recompute(level=0.9)
        eq = r2.equivalence
        assert (eq.low, eq.high) == (-1.5, 1.5)
        assert eq.alpha == pytest.approx(0.10)
        assert eq.ci_level == pytest.approx(0.80)
        ref = stats.ttest_ind(a - 1.5, b, equal_var=False, alternative="less")
        assert eq.upper.p == pytest.approx(ref.pvalue, rel=1e-9)

    def test_recompute_can_drop_or_change_margin(self, plots):
        """recompute(margin=None) drops the claim; another margin replaces it."""
        df, _, _ = plots
        r = df.tinfer.two_sample("kg", by="layout", margin=1.5, worse="lower")
        assert r.recompute(margin=None).equivalence is None
        assert r.recompute(margin=0.4).equivalence.low == -0.4


# ---------------------------------------------------------------------------- errors
class TestMarginErrors:
    @pytest.mark.parametrize(
        ("kwargs", "fragment"),
        [
            ({"margin": (1.5, 2.0)}, "lower < 0 < upper"),
            ({"margin": -1.0}, "positive number"),
            ({"margin": float("nan")}, "positive number"),
            ({"margin": "2"}, "positive number"),
            ({"worse": "lower"}, "'margin' parameter"),
            ({"margin": 1.0, "worse": "down"}, "'worse' parameter"),
            ({"margin": (-1.0, 1.0), "worse": "lower"}, "single positive number"),
            ({"margin": 1.0, "margin_units": "sd"}, "'margin_units' parameter"),
            ({"margin": 1.0, "superior": True}, "'worse' parameter"),
            ({"margin": 1.0, "level": 0.4}, "above 0.5"),
        ],
    )
    def test_bad_margin_keywords_raise(self, kwargs, fragment):
        """Bad margin keywords raise a ParameterError (a ValueError) naming the parameter."""
        with pytest.raises(ParameterError, match=fragment.replace("(", r"\(")):
            tinfer.from_summary(n=10, mean=1.0, sd=1.0, **kwargs)
        with pytest.raises(ValueError):
            tinfer.from_summary(n=10, mean=1.0, sd=1.0, **kwargs)
