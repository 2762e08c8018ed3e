"""The default Bayes factor in public: ``result.bayes_factor()``, ``BayesFactor`` and
``BatchResult.bayes_factors()``.

References: the numbers come from tinfer.core.bayes (tested against mpmath in
tests/core/test_bayes.py); here each path must hand it the right t, effective sample size N
and df: N = n, df = n - 1 for one sample and pairs, N = n1 n2 / (n1 + n2), df = n1 + n2 - 2
and the pooled t for two samples (Rouder et al. 2009 assume equal variances). The t
statistics are checked against scipy.stats.ttest_1samp, ttest_rel and ttest_ind(equal_var=
True) (reference library). Jeffreys' grade edges 1, 10^0.5, 10, 10^1.5, 100 and his words:
Jeffreys (1961, Theory of Probability, 3rd ed., Appendix B), from memory. Data invented for
the scenarios here (seeded).
"""

from __future__ import annotations

import dataclasses
import html
import math

import numpy as np
import pandas as pd
import pytest
from scipy import stats

import tinfer
from tinfer import ParameterError
from tinfer.core import bayes
from tinfer.display import render

R0 = bayes.DEFAULT_SCALE
TOL = 1e-12


def core_log_bf(t, n_eff, df, scale=R0, side="two-sided") -> float:
    return float(bayes.log_bayes_factor(t, n_eff, df, scale, side))


@pytest.fixture
def assay():
    """Potency of 18 tablets (% of label claim) against a claim of 100 (seeded)."""
    rng = np.random.default_rng(11)
    return pd.DataFrame({"potency": 100.0 + rng.normal(0.9, 1.6, 18)})


@pytest.fixture
def retrain():
    """Reaction times (ms) of 16 operators before and after retraining, wide (seeded)."""
    rng = np.random.default_rng(12)
    before = rng.normal(410.0, 25.0, 16)
    return pd.DataFrame({"before": before, "after": before - rng.normal(9.0, 14.0, 16)})


@pytest.fixture
def coatings():
    """Scratch depth (um) of two coatings, unequal sizes and spreads (seeded)."""
    rng = np.random.default_rng(13)
    a, b = rng.normal(12.0, 1.0, 14), rng.normal(11.2, 2.5, 23)
    return pd.DataFrame({"depth": np.r_[a, b], "coating": ["glaze"] * 14 + ["matte"] * 23})


def arms(frame):
    d = frame.groupby("coating")["depth"]
    return d.get_group("glaze").to_numpy(), d.get_group("matte").to_numpy()


# ------------------------------------------------------------------ the right t, N and df


class TestInputs:
    def test_one_sample(self, assay):
        x = assay["potency"].to_numpy()
        r = assay.tinfer.one_sample("potency", null=100.0)
        b = r.bayes_factor()
        n = x.size
        assert b.t == pytest.approx(stats.ttest_1samp(x, 100.0).statistic, rel=1e-12)
        assert (b.n_eff, b.df, b.scale, b.side) == (n, n - 1, R0, "two-sided")
        assert b.log_bf == pytest.approx(core_log_bf(b.t, n, n - 1), abs=TOL)
        assert b.log_bf10 == b.log_bf
        s = tinfer.from_summary(n=n, mean=x.mean(), sd=x.std(ddof=1), null=100.0).bayes_factor()
        assert s.log_bf == pytest.approx(b.log_bf, abs=TOL)
        assert s.log_bf_upper == pytest.approx(b.log_bf_upper, abs=TOL)
        assert s.median == pytest.approx(b.median, abs=1e-9)

    def test_paired(self, retrain):
        r = retrain.tinfer.paired("after", "before")
        b = r.bayes_factor()
        d = (retrain["after"] - retrain["before"]).to_numpy()
        n = d.size
        assert b.design == "paired"
        ref_t = stats.ttest_rel(retrain["after"], retrain["before"]).statistic
        assert b.t == pytest.approx(ref_t, rel=1e-12)
        assert (b.n_eff, b.df) == (n, n - 1)
        assert b.log_bf == pytest.approx(core_log_bf(b.t, n, n - 1), abs=TOL)
        s = tinfer.from_summary(n=n, mean=d.mean(), sd=d.std(ddof=1), paired=True)
        assert s.bayes_factor().log_bf == pytest.approx(b.log_bf, abs=TOL)

    def test_two_sample_pooled(self, coatings):
        a, m = arms(coatings)
        r = coatings.tinfer.two_sample("depth", by="coating", pooled=True)
        b = r.bayes_factor()
        n1, n2 = a.size, m.size
        ref_t = stats.ttest_ind(a, m, equal_var=True).statistic
        assert b.t == pytest.approx(ref_t, rel=1e-12)
        assert b.t == pytest.approx(r.t, rel=1e-14)
        assert b.n_eff == pytest.approx(n1 * n2 / (n1 + n2), rel=1e-15)
        assert b.df == n1 + n2 - 2
        assert b.pooled_from_welch is False
        assert "pooled t" not in str(b)
        assert b.log_bf == pytest.approx(core_log_bf(ref_t, n1 * n2 / (n1 + n2), n1 + n2 - 2))
        s = tinfer.from_summary(
            n=(n1, n2),
            mean=(a.mean(), m.mean()),
            sd=(a.std(ddof=1), m.std(ddof=1)),
            pooled=True,
        )
        assert s.bayes_factor().log_bf == pytest.approx(b.log_bf, abs=TOL)

    def test_welch_result_uses_the_pooled_t(self, coatings):
        a, m = arms(coatings)
        r = coatings.tinfer.two_sample("depth", by="coating")  # Welch by default
        b = r.bayes_factor()
        pooled = stats.ttest_ind(a, m, equal_var=True).statistic
        welch = stats.ttest_ind(a, m, equal_var=False).statistic
        assert r.t == pytest.approx(welch, rel=1e-12)
        assert abs(pooled - welch) > 0.05  # the scenario tells the two apart
        assert b.t == pytest.approx(pooled, rel=1e-12)
        assert b.df == a.size + m.size - 2
        assert b.pooled_from_welch is True
        assert "pooled t" in str(b)
        pooled_result = coatings.tinfer.two_sample("depth", by="coating", pooled=True)
        assert b.log_bf == pytest.approx(pooled_result.bayes_factor().log_bf, abs=TOL)
        s = tinfer.from_summary(
            n=(a.size, m.size), mean=(a.mean(), m.mean()), sd=(a.std(ddof=1), m.std(ddof=1))
        ).bayes_factor()
        assert s.pooled_from_welch is True
        assert s.log_bf == pytest.approx(b.log_bf, abs=TOL)

    def test_welch_with_a_null_difference(self, coatings):
        """The pooled t of a shifted null: that of the first arm shifted by the null."""
        a, m = arms(coatings)
        b = coatings.tinfer.two_sample("depth", by="coating", null=0.5).bayes_factor()
        ref_t = stats.ttest_ind(a - 0.5, m, equal_var=True).statistic
        assert b.t == pytest.approx(ref_t, rel=1e-12)

    def test_swapping_the_groups_mirrors_the_sides(self, coatings):
        ab = coatings.tinfer.two_sample("depth", by="coating").bayes_factor()
        ba = coatings.tinfer.two_sample(
            "depth", by="coating", groups=("matte", "glaze")
        ).bayes_factor()
        assert ba.t == pytest.approx(-ab.t, rel=1e-13)
        assert ba.log_bf10 == pytest.approx(ab.log_bf10, abs=TOL)
        assert ba.log_bf_upper == pytest.approx(ab.log_bf_lower, abs=TOL)
        assert ba.median == pytest.approx(-ab.median, abs=1e-9)


# ------------------------------------------------------------------ side, level, bf and bf01


class TestSideAndNumbers:
    def test_side_defaults_to_the_results(self, assay):
        r = assay.tinfer.one_sample("potency", null=100.0, side="upper")
        b = r.bayes_factor()
        assert b.side == "upper"
        assert b.log_bf == b.log_bf_upper
        assert "truncated to delta > 0" in b.prior_words

    @pytest.mark.parametrize(
        ("side", "field"), [("upper", "log_bf_upper"), ("lower", "log_bf_lower")]
    )
    def test_side_given(self, assay, side, field):
        r = assay.tinfer.one_sample("potency", null=100.0)
        b = r.bayes_factor(side=side)
        assert b.side == side
        assert b.log_bf == getattr(b, field)
        assert b.log_bf10 == pytest.approx(r.bayes_factor().log_bf, abs=TOL)
        assert b.log_bf == pytest.approx(core_log_bf(b.t, b.n_eff, b.df, R0, side), abs=TOL)

    def test_scale_is_passed_on(self, assay):
        r = assay.tinfer.one_sample("potency", null=100.0)
        b = r.bayes_factor(scale=1.0)
        assert b.scale == 1.0
        assert b.log_bf == pytest.approx(core_log_bf(b.t, b.n_eff, b.df, 1.0), abs=TOL)
        assert b.log_bf != pytest.approx(r.bayes_factor().log_bf, abs=1e-6)

    def test_level_defaults_to_the_results_and_sets_the_interval(self, assay):
        r = assay.tinfer.one_sample("potency", null=100.0, level=0.9)
        b90 = r.bayes_factor()
        b99 = r.bayes_factor(level=0.99)
        assert (b90.level, b99.level) == (0.9, 0.99)
        assert b99.interval[0] < b90.interval[0] < b90.median < b90.interval[1]
        assert b90.interval[1] < b99.interval[1]
        assert b99.median == pytest.approx(b90.median, abs=1e-12)

    @pytest.mark.parametrize("mean", [0.05, 0.3, 0.6, 1.5, 5.0])
    def test_bf_times_bf01_is_one(self, mean):
        b = tinfer.from_summary(n=30, mean=mean, sd=1.0).bayes_factor()
        assert b.bf * b.bf01 == pytest.approx(1.0, rel=TOL)
        assert b.bf == pytest.approx(math.exp(b.log_bf), rel=TOL)

    def test_to_dict_and_to_frame(self, assay):
        b = assay.tinfer.one_sample("potency", null=100.0).bayes_factor()
        d = b.to_dict()
        assert d["log_bf"] == b.log_bf and d["bf"] == b.bf and d["bf01"] == b.bf01
        assert (d["low"], d["high"]) == b.interval
        f = b.to_frame()
        assert len(f) == 1
        assert {"bf", "bf01", "log_bf"} <= set(f.columns)
        assert f["log_bf"].iloc[0] == b.log_bf
        assert f["bf"].iloc[0] == pytest.approx(b.bf, rel=1e-15)

    def test_overflowing_factor_keeps_its_log(self):
        b = tinfer.from_summary(n=5000, mean=1.0, sd=1.0).bayes_factor()
        assert b.log_bf > 710 and math.isfinite(b.log_bf)
        assert b.bf == math.inf and b.bf01 == 0.0
        assert "× 10^" in b.headline


# ------------------------------------------------------------------ Jeffreys' grades


def with_log_bf(b, log_bf):
    return dataclasses.replace(b, log_bf=log_bf)


class TestGrades:
    """Edges 1, 10^0.5, 10, 10^1.5, 100 (Jeffreys 1961, Appendix B, from memory)."""

    def test_a_factor_of_about_five_is_substantial(self):
        b = tinfer.from_summary(n=30, mean=0.5126, sd=1.0).bayes_factor()
        assert b.bf == pytest.approx(5.0, rel=0.01)
        assert (b.favours, b.grade) == ("effect", "substantial")
        assert "substantial" in b.headline

    def test_evidence_for_no_effect(self):
        b = tinfer.from_summary(n=200, mean=0.01, sd=1.0).bayes_factor()
        assert b.favours == "no effect"
        assert 10.0 <= b.bf01 < 10**1.5
        assert b.grade == "strong"
        assert "as probable under no effect" in b.headline

    @pytest.mark.parametrize(
        ("edge", "below", "at"),
        [
            (10**0.5, "not worth more than a bare mention", "substantial"),
            (10.0, "substantial", "strong"),
            (10**1.5, "strong", "very strong"),
            (100.0, "very strong", "decisive"),
        ],
    )
    @pytest.mark.parametrize("sign", [1.0, -1.0])
    def test_edges(self, edge, below, at, sign):
        b = tinfer.from_summary(n=30, mean=0.5, sd=1.0).bayes_factor()
        x = math.log(edge)
        assert with_log_bf(b, sign * (x - 1e-9)).grade == below
        assert with_log_bf(b, sign * (x + 1e-9)).grade == at
        assert with_log_bf(b, sign * x).favours == ("effect" if sign > 0 else "no effect")

    def test_exactly_one_favours_neither(self):
        b = with_log_bf(tinfer.from_summary(n=30, mean=0.5, sd=1.0).bayes_factor(), 0.0)
        assert b.favours == "neither"
        assert b.grade == "not worth more than a bare mention"
        assert "equally probable" in b.headline


# ------------------------------------------------------------------ bad input


class TestBadInput:
    @pytest.mark.parametrize("scale", [0, -1, float("nan"), "a", math.inf, None])
    def test_scale(self, assay, scale):
        with pytest.raises(ParameterError, match="scale"):
            assay.tinfer.one_sample("potency", null=100.0).bayes_factor(scale=scale)

    def test_side(self, assay):
        with pytest.raises(ParameterError, match="side"):
            assay.tinfer.one_sample("potency", null=100.0).bayes_factor(side="sideways")

    def test_level(self, assay):
        with pytest.raises(ParameterError, match="level"):
            assay.tinfer.one_sample("potency", null=100.0).bayes_factor(level=1.5)

    def test_trimmed_result(self, coatings):
        r = coatings.tinfer.two_sample("depth", by="coating", trim=0.2)
        with pytest.raises(ParameterError, match="trim"):
            r.bayes_factor()

    @pytest.mark.parametrize(
        ("kwargs", "word"), [({"scale": 0}, "scale"), ({"side": "up"}, "side")]
    )
    def test_batch(self, kwargs, word):
        batch = tinfer.compare_summaries(SUMMARIES)
        with pytest.raises(ParameterError, match=word):
            batch.bayes_factors(**kwargs)


# ------------------------------------------------------------------ the card


class TestCard:
    def test_html(self, coatings):
        b = coatings.tinfer.two_sample("depth", by="coating").bayes_factor()
        page = render.html(b, chart=False)
        assert "Jeffreys" in page
        assert "Cauchy prior" in page
        assert html.escape(b.headline) in page  # the headline's apostrophe is escaped
        assert "pooled t" in page

    def test_to_html(self, assay):
        b = assay.tinfer.one_sample("potency", null=100.0).bayes_factor(side="upper")
        page = b.to_html(chart=False)
        assert page.startswith('<div class="tinfer-card">')
        assert "<script" not in page
        assert "truncated to delta &gt; 0" in page

    def test_one_sided_card_names_its_side(self):
        b = tinfer.from_summary(n=20, mean=-0.4, sd=1.0).bayes_factor(side="lower")
        page = render.html(b, chart=False)
        assert "BF for an effect below 0 over none" in page
        assert "truncated to delta &lt; 0" in page

    def test_chart(self, assay):
        b = assay.tinfer.one_sample("potency", null=100.0).bayes_factor()
        assert type(b.chart()).__name__ == "HConcatChart"


# ------------------------------------------------------------------ batches

SUMMARIES = pd.DataFrame(
    {
        "n_a": [12, 40, 8, 250, 30],
        "mean_a": [5.1, 7.4, 3.0, 20.2, 1.0],
        "sd_a": [1.2, 2.0, 0.7, 4.0, 0.5],
        "n_b": [15, 40, 11, 260, 6],
        "mean_b": [4.3, 7.4, 2.1, 19.1, 1.9],
        "sd_b": [1.5, 1.9, 1.8, 4.4, 0.4],
    }
)


class TestBatch:
    @pytest.mark.parametrize("side", [None, "upper", "lower"])
    @pytest.mark.parametrize("scale", [R0, 1.0])
    def test_summaries_match_single_results(self, side, scale):
        f = tinfer.compare_summaries(SUMMARIES).bayes_factors(scale=scale, side=side)
        assert len(f) == len(SUMMARIES)
        assert (f["bf_scale"] == scale).all()
        assert (f["bf_side"] == (side or "two-sided")).all()
        for row, got_log, got_bf in zip(SUMMARIES.itertuples(), f["log_bf"], f["bf"], strict=True):
            one = tinfer.from_summary(
                n=(row.n_a, row.n_b), mean=(row.mean_a, row.mean_b), sd=(row.sd_a, row.sd_b)
            ).bayes_factor(scale=scale, side=side)
            assert got_log == pytest.approx(one.log_bf, abs=TOL)
            assert got_bf == pytest.approx(one.bf, rel=1e-12)

    def test_null_and_pooled_reach_the_rows(self):
        f = tinfer.compare_summaries(SUMMARIES, null=0.3, pooled=True).bayes_factors()
        for row, got in zip(SUMMARIES.itertuples(), f["log_bf"], strict=True):
            one = tinfer.from_summary(
                n=(row.n_a, row.n_b),
                mean=(row.mean_a, row.mean_b),
                sd=(row.sd_a, row.sd_b),
                null=0.3,
                pooled=True,
            ).bayes_factor()
            assert got == pytest.approx(one.log_bf, abs=TOL)

    def test_side_defaults_to_the_batchs(self):
        f = tinfer.compare_summaries(SUMMARIES, side="lower").bayes_factors()
        g = tinfer.compare_summaries(SUMMARIES).bayes_factors(side="lower")
        assert (f["bf_side"] == "lower").all()
        np.testing.assert_allclose(f["log_bf"], g["log_bf"], rtol=0, atol=TOL)

    def test_one_sample_frame_matches_single_results(self):
        rng = np.random.default_rng(14)
        df = pd.DataFrame(
            {
                "drift_ppm": np.r_[rng.normal(0.4, 1.0, 9), rng.normal(-0.1, 0.8, 25)],
                "site": ["north"] * 9 + ["south"] * 25,
            }
        )
        f = df.tinfer.compare("drift_ppm", within="site").bayes_factors()
        assert list(f["site"]) == ["north", "south"]
        for site, got in zip(f["site"], f["log_bf"], strict=True):
            part = df[df["site"] == site]
            one = part.tinfer.one_sample("drift_ppm").bayes_factor()
            assert got == pytest.approx(one.log_bf, abs=TOL)

    def test_two_sample_frame_uses_the_pooled_t(self, coatings):
        rng = np.random.default_rng(15)
        df = coatings.assign(batch=rng.choice(["k1", "k2"], size=len(coatings)))
        f = df.tinfer.compare("depth", by="coating", within="batch").bayes_factors()
        for batch, got in zip(f["batch"], f["log_bf"], strict=True):
            part = df[df["batch"] == batch]
            one = part.tinfer.two_sample("depth", by="coating").bayes_factor()
            assert one.pooled_from_welch
            assert got == pytest.approx(one.log_bf, abs=TOL)

    def test_paired_frame_matches_single_results(self, retrain):
        f = retrain.tinfer.compare(paired=[("after", "before")]).bayes_factors(side="lower")
        one = retrain.tinfer.paired("after", "before").bayes_factor(side="lower")
        assert f["log_bf"].iloc[0] == pytest.approx(one.log_bf, abs=TOL)

    def test_untestable_rows_are_nan(self):
        df = pd.DataFrame({"x": [1.0, 2.0, 3.5, 1.5], "seg": ["a", "a", "a", "b"]})
        with pytest.warns(UserWarning):
            f = df.tinfer.compare("x", within="seg").bayes_factors()
        assert np.isfinite(f["log_bf"].iloc[0])
        assert np.isnan(f["log_bf"].iloc[1]) and np.isnan(f["bf"].iloc[1])
