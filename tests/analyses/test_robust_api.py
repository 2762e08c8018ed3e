"""Issue 7 in public: ``trim=`` on the accessor, ``result.check()``, ``result.bootstrap()``.

References: scipy.stats.ttest_ind(..., trim=) (Yuen's test) and scipy.stats.ttest_1samp;
data invented for the scenarios here.
"""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pytest
from scipy import stats

import tinfer
from tinfer import BootstrapCheck, Diagnostics
from tinfer.display import progress


@pytest.fixture
def kilns():
    """Firing times (min) of two kilns, heavy-tailed with a few stuck batches (seeded)."""
    rng = np.random.default_rng(101)
    a = 42 + 3 * rng.standard_t(2, size=28)
    b = 45 + 3 * rng.standard_t(2, size=33)
    a[:2] = [95.0, 88.0]
    return pd.DataFrame({"minutes": np.r_[a, b], "kiln": ["east"] * 28 + ["west"] * 33})


@pytest.fixture
def clean():
    """Clean normal fill weights of two lines (seeded)."""
    rng = np.random.default_rng(202)
    return pd.DataFrame(
        {"grams": np.r_[rng.normal(500, 2, 40), rng.normal(501, 3, 35)],
         "line": ["L1"] * 40 + ["L2"] * 35}
    )  # fmt: skip


class TestTrimKeyword:
    def test_two_sample_equals_scipy_yuen(self, kilns):
        """two_sample(trim=0.2) gives scipy.stats.ttest_ind(equal_var=False, trim=0.2)."""
        r = kilns.tinfer.two_sample("minutes", by="kiln", trim=0.2)
        a = kilns.minutes[kilns.kiln == "east"].to_numpy()
        b = kilns.minutes[kilns.kiln == "west"].to_numpy()
        ref = stats.ttest_ind(a, b, equal_var=False, trim=0.2)
        assert (r.t, r.df, r.p) == pytest.approx((ref.statistic, ref.df, ref.pvalue), rel=1e-9)
        assert r.estimate == pytest.approx(stats.trim_mean(a, 0.2) - stats.trim_mean(b, 0.2))
        assert r.method == "Yuen trimmed-mean t (20% trimmed)"
        assert r.trim == 0.2 and r.effect.name == "robust d (AKP)"
        assert "20% trimmed mean" in r.headline()

    @pytest.mark.filterwarnings("ignore:Precision loss:RuntimeWarning")  # scipy, constant group
    def test_one_sample_and_series(self, kilns):
        """one_sample(trim=) on a frame and a Series equal Yuen against a constant in scipy."""
        x = kilns.minutes.to_numpy()
        ref = stats.ttest_ind(x, np.full(5, 44.0), equal_var=False, trim=0.1)
        for r in (
            kilns.tinfer.one_sample("minutes", null=44, trim=0.1),
            kilns.minutes.tinfer.one_sample(null=44, trim=0.1),
        ):
            assert (r.t, r.df, r.p) == pytest.approx((ref.statistic, ref.df, ref.pvalue), rel=1e-9)
            assert r.comparison == "10% trimmed mean of minutes"
            assert r.method.startswith("One-sample Yuen")

    def test_paired_trims_the_differences(self):
        """paired(trim=) is the one-sample trimmed test on the differences (scipy reference)."""
        before = [8.1, 7.4, 9.0, 8.8, 7.9, 8.3, 12.5, 8.0, 7.7, 8.6]
        after = [7.6, 7.5, 8.1, 8.0, 7.2, 8.1, 8.0, 7.1, 7.5, 8.2]
        df = pd.DataFrame({"before": before, "after": after})
        r = df.tinfer.paired("before", "after", trim=0.2)
        d = (df.before - df.after).to_numpy()
        ref = stats.ttest_ind(d, np.zeros(4), equal_var=False, trim=0.2)
        assert (r.t, r.df, r.p) == pytest.approx((ref.statistic, ref.df, ref.pvalue), rel=1e-9)
        assert r.estimate == pytest.approx(stats.trim_mean(d, 0.2))
        assert r.method.startswith("Paired Yuen")

    def test_zero_trim_is_the_ordinary_test(self, clean):
        """trim=0 gives exactly the Welch result (scipy.stats.ttest_ind, equal_var=False)."""
        r = clean.tinfer.two_sample("grams", by="line", trim=0)
        ref = stats.ttest_ind(*(g.to_numpy() for _, g in clean.groupby("line").grams),
                              equal_var=False)  # fmt: skip
        assert r.t == pytest.approx(ref.statistic, rel=1e-12)
        assert r.method == "Welch two-sample t test" and r.effect.name == "Hedges' g"

    @pytest.mark.parametrize("bad", [0.5, -0.1, 0.7, True, "0.2"])
    def test_bad_trim(self, clean, bad):
        """trim outside [0, 0.5) or not a number raises ParameterError (a ValueError)."""
        with pytest.raises(tinfer.ParameterError, match="'trim' parameter of two_sample"):
            clean.tinfer.two_sample("grams", by="line", trim=bad)

    def test_pooled_with_trim_refused(self, clean):
        """Yuen's test does not pool variances: pooled=True with trim > 0 is refused."""
        with pytest.raises(tinfer.ParameterError, match="pooled"):
            clean.tinfer.two_sample("grams", by="line", trim=0.2, pooled=True)

    def test_too_few_left_after_trimming(self):
        """Too few values after trimming raise DataError with the count."""
        df = pd.DataFrame({"v": [1.0, 2.0, 3.0]})  # floor(0.45 * 3) = 1 per tail leaves 1
        with pytest.raises(tinfer.DataError, match="keep"):
            df.tinfer.one_sample("v", trim=0.45)

    def test_recompute_switches_trim(self, kilns):
        """recompute(trim=0.2) equals the direct call; recompute(trim=0) returns to Welch."""
        plain = kilns.tinfer.two_sample("minutes", by="kiln")
        direct = kilns.tinfer.two_sample("minutes", by="kiln", trim=0.2)
        again = plain.recompute(trim=0.2)
        assert (again.t, again.df, again.ci) == (direct.t, direct.df, direct.ci)
        back = again.recompute(trim=0)
        assert (back.t, back.method) == (plain.t, plain.method)

    def test_from_summary_cannot_trim(self):
        """Results from published summaries hold no values: recompute(trim=) is refused."""
        r = tinfer.from_summary(n=(12, 15), mean=(5.1, 4.3), sd=(1.2, 1.5))
        with pytest.raises(tinfer.ParameterError, match="needs the data values"):
            r.recompute(trim=0.2)


class TestCheck:
    def test_contaminated_data_get_trimming_advice(self, kilns):
        """Heavy-tailed kilns with stuck batches: outliers flagged, trim=0.2 advised."""
        d = kilns.tinfer.two_sample("minutes", by="kiln").check()
        assert isinstance(d, Diagnostics)
        east = d.shapes[0]
        assert east.label == "east" and {95.0, 88.0} <= set(east.outliers)
        assert "trim=0.2" in d.advice
        assert "Hampel" in d.outlier_rule and np.isfinite(d.variance_ratio)

    def test_clean_data_keep_welch(self, clean):
        """Clean normal lines: at most a stray value flagged, Welch advised, no trimming."""
        d = clean.tinfer.two_sample("grams", by="line").check()
        assert sum(s.n_outliers for s in d.shapes) <= 1  # 75 values x 0.27% false alarms
        assert "Welch" in d.advice and "trim=" not in d.advice

    def test_advice_leaves_result_alone(self, kilns):
        """check() does not change the result it was called on (same numbers after)."""
        r = kilns.tinfer.two_sample("minutes", by="kiln")
        before = r.to_dict()
        r.check()
        assert r.to_dict() == before

    def test_paired_checks_the_differences(self):
        """For paired data the one checked sample is the differences."""
        df = pd.DataFrame({"pre": [5.0, 6.1, 5.5, 6.4, 5.9], "post": [4.8, 5.7, 5.6, 6.0, 5.1]})
        d = df.tinfer.paired("pre", "post").check()
        assert len(d.shapes) == 1 and d.shapes[0].label.endswith("(differences)")
        assert d.shapes[0].mean == pytest.approx(np.mean(df.pre - df.post))

    def test_text_and_card(self, kilns):
        """The text names the measures and the rule; the card escapes user labels."""
        kilns = kilns.rename(columns={"minutes": "<b>min</b>"})
        d = kilns.tinfer.two_sample("<b>min</b>", by="kiln").check()
        text = str(d)
        for word in ("skewness G1", "excess kurtosis G2", "Shapiro-Wilk", "Advice:", "Hampel"):
            assert word in text
        html = d._repr_mimebundle_()["text/html"]
        assert "<b>min</b>" not in html and "&lt;b&gt;min&lt;/b&gt;" in html
        assert "<script" not in html and "tinfer-card" in html

    def test_chart_spec_stays_small_for_large_n(self):
        """With 150,000 values per group the chart spec stays below 100 KB (thinned)."""
        rng = np.random.default_rng(9)
        df = pd.DataFrame({"v": rng.lognormal(size=300_000), "g": ["a", "b"] * 150_000})
        d = df.tinfer.two_sample("v", by="g").check()
        spec = d.chart().to_json()
        assert len(spec.encode()) < 100_000
        assert all(d.thinned) and "evenly spaced" in spec

    def test_from_summary_has_no_values(self):
        """check() on a result from published summaries raises DataError."""
        r = tinfer.from_summary(n=12, mean=5.1, sd=1.2)
        with pytest.raises(tinfer.DataError, match="summary statistics"):
            r.check()


class TestBootstrap:
    def test_seed_reproducible(self, clean):
        """The same seed gives the same interval; seed=None draws and reports one that does."""
        r = clean.tinfer.two_sample("grams", by="line")
        one, two = r.bootstrap(1999, seed=5), r.bootstrap(1999, seed=5)
        assert one.interval == two.interval and one.seed == 5
        free = r.bootstrap(999)
        assert free.interval == r.bootstrap(999, seed=free.seed).interval

    def test_close_to_t_interval_on_clean_data(self, clean):
        """On clean normal data the bootstrap-t limits lie near the Welch limits."""
        r = clean.tinfer.two_sample("grams", by="line")
        b = r.bootstrap(9999, seed=1)
        assert isinstance(b, BootstrapCheck)
        assert b.t_interval == pytest.approx(r.ci, rel=1e-12)
        width = r.ci[1] - r.ci[0]
        assert abs(b.interval[0] - r.ci[0]) < 0.1 * width
        assert abs(b.interval[1] - r.ci[1]) < 0.1 * width
        assert "agree" in b.verdict

    def test_trimmed_result_resamples_trimmed_means(self, kilns):
        """For a trimmed result the statistic is the trimmed-mean difference."""
        r = kilns.tinfer.two_sample("minutes", by="kiln", trim=0.2)
        b = r.bootstrap(999, seed=3)
        assert b.estimate == pytest.approx(r.estimate, rel=1e-12)
        assert b.statistic == "20% trimmed mean difference"

    def test_level_and_side(self, clean):
        """level= overrides the result's level; a one-sided result gives one finite limit."""
        r = clean.tinfer.one_sample("grams", null=500, side="upper")
        b = r.bootstrap(999, seed=2, level=0.9)
        assert b.level == 0.9 and b.side == "upper" and b.interval[1] == np.inf
        assert b.t_interval[0] == pytest.approx(r.recompute(level=0.9).ci[0], rel=1e-12)

    @pytest.mark.parametrize("bad", [10, 99.5, True, "many"])
    def test_bad_n_resamples(self, clean, bad):
        """n_resamples must be an int of at least 99."""
        with pytest.raises(tinfer.ParameterError, match="n_resamples"):
            clean.tinfer.one_sample("grams").bootstrap(bad)

    def test_card_and_chart(self, clean):
        """The card shows both intervals with no script; the chart spec is small."""
        b = clean.tinfer.one_sample("grams", null=500).bootstrap(9999, seed=4)
        html = b._repr_mimebundle_()["text/html"]
        assert "bootstrap-t" in html and "<script" not in html
        spec = b.chart().to_json()
        assert len(spec.encode()) < 30_000
        assert b.hist_counts.sum() + b.n_outside == 9999
        layer = json.loads(spec)
        bars = next(v for k, v in layer["datasets"].items() if "lo" in v[0])
        area = sum(row["density"] * (row["hi"] - row["lo"]) for row in bars)
        assert area == pytest.approx(1 - b.n_outside / 9999, abs=1e-3)

    def test_no_progress_bar_outside_a_kernel(self):
        """Outside IPython no progress bar is made, however long the run."""
        assert progress.progress_bar(10**6, 10**12) == (None, None)

    def test_progress_bar_updates_per_chunk(self, clean, monkeypatch):
        """Inside a kernel a long run drives an ipywidgets IntProgress to n_resamples."""
        import ipywidgets

        made = []
        real = ipywidgets.IntProgress

        def spy(**kw):
            bar = real(**kw)
            made.append(bar)
            return bar

        monkeypatch.setattr(progress, "in_kernel", lambda: True)
        monkeypatch.setattr(progress, "PROGRESS_WORK", 1)
        monkeypatch.setattr(ipywidgets, "IntProgress", spy)
        clean.tinfer.one_sample("grams").bootstrap(3000, seed=1)
        assert len(made) == 1 and made[0].value == 3000 and made[0].max == 3000
