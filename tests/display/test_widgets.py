"""Explorers (ipywidgets) driven from Python: each control recomputes and redraws in place.

Reference values come from scipy.stats (t, nct, ttest_ind, ttest_1samp), never from tinfer.
The data are invented: proofing rise (mm) of dough with two sourdough starters, and the fill
weight (g) of jars from one filling head.
"""

from __future__ import annotations

import math
import re
import sys

import numpy as np
import pandas as pd
import pytest
from scipy import stats

import tinfer

ipywidgets = pytest.importorskip("ipywidgets")

RISE_A = [31.2, 28.9, 33.5, 30.1, 29.8, 34.2, 31.7, 27.6, 32.3, 30.9, 35.1, 29.4]
RISE_B = [27.4, 29.1, 25.8, 28.3, 26.9, 30.2, 24.7, 27.9, 28.8, 26.1, 25.5, 29.6, 27.2, 41.0]
FILL = [251.3, 249.8, 250.6, 252.1, 250.9, 248.7, 251.8, 250.2, 249.5, 251.1, 250.4, 252.6]


def _two_groups() -> pd.DataFrame:
    return pd.DataFrame(
        {
            "rise_mm": RISE_A + RISE_B,
            "starter": ["rye"] * len(RISE_A) + ["wheat"] * len(RISE_B),
        }
    )


def _text(html: str) -> str:
    """Visible text of a card: tags and the inline SVG removed, real minus signs as '-'."""
    html = re.sub(r"<svg.*?</svg>", " ", html, flags=re.S)
    html = re.sub(r"<style.*?</style>", " ", html, flags=re.S)
    return re.sub(r"<[^>]+>", " ", html).replace("−", "-").replace("&minus;", "-")


def _shown(x: float, decimals: int) -> str:
    return f"{x:.{decimals}f}"


# ---------------------------------------------------------------------------- explore_result
class TestExploreResult:
    def test_level_slider_matches_scipy_interval(self):
        """Moving the level slider gives scipy's Welch interval at the new level, in the card."""
        r = _two_groups().tinfer.two_sample("rise_mm", by="starter")
        ex = r.explore()
        ex.level.value = 0.9
        # Reference: scipy.stats.ttest_ind (Welch) confidence_interval at 0.90.
        ref = stats.ttest_ind(RISE_A, RISE_B, equal_var=False).confidence_interval(0.9)
        assert ex.result.level == 0.9
        assert ex.result.ci == pytest.approx((ref.low, ref.high), rel=1e-10)
        assert ex.result.ci == r.recompute(level=0.9).ci
        text = _text(ex.view.value)
        d = ex.result.decimals
        assert _shown(ref.low, d) in text and _shown(ref.high, d) in text
        assert "90" in text
        assert ex.message.value == ""

    def test_level_slider_settings(self):
        """The level slider spans 0.50 to 0.999 and reads out three decimals."""
        ex = tinfer.from_summary(n=10, mean=2.0, sd=1.0).explore()
        assert (ex.level.min, ex.level.max) == (0.5, 0.999)
        assert ex.level.readout_format == ".3f"
        assert isinstance(ex, ipywidgets.VBox)

    def test_side_toggle_gives_one_sided_bound(self):
        """Choosing "upper" gives scipy's one-sided lower bound and an infinite upper limit."""
        r = _two_groups().tinfer.two_sample("rise_mm", by="starter")
        ex = r.explore()
        ex.side.value = "upper"
        ref = stats.ttest_ind(RISE_A, RISE_B, equal_var=False, alternative="greater")
        assert ex.result.side == "upper"
        assert ex.result.ci[0] == pytest.approx(ref.confidence_interval(0.95).low, rel=1e-10)
        assert math.isinf(ex.result.ci[1])
        assert ex.result.p == pytest.approx(ref.pvalue, rel=1e-9)

    def test_null_box_matches_scipy_one_sample(self):
        """A new null value gives scipy's one-sample t and p against that value."""
        r = pd.DataFrame({"fill_g": FILL}).tinfer.one_sample("fill_g", null=250.0)
        ex = r.explore()
        ex.null.value = 250.9
        ref = stats.ttest_1samp(FILL, popmean=250.9)
        assert ex.result.null == 250.9
        assert ex.result.t == pytest.approx(ref.statistic, rel=1e-10)
        assert ex.result.p == pytest.approx(ref.pvalue, rel=1e-9)
        assert _shown(ref.pvalue, 3)[:4] in _text(ex.view.value)

    def test_pooled_checkbox_matches_scipy_student(self):
        """Ticking "pool the two variances" gives scipy's equal-variance t test."""
        ex = _two_groups().tinfer.two_sample("rise_mm", by="starter").explore()
        assert ex.pooled is not None
        ex.pooled.value = True
        ref = stats.ttest_ind(RISE_A, RISE_B, equal_var=True)
        assert ex.result.pooled
        assert ex.result.df == len(RISE_A) + len(RISE_B) - 2
        assert ex.result.p == pytest.approx(ref.pvalue, rel=1e-9)

    def test_dataframe_is_not_read_again(self):
        """After explore(), overwriting the DataFrame does not change what the sliders show."""
        frame = _two_groups()
        ex = frame.tinfer.two_sample("rise_mm", by="starter").explore()
        frame["rise_mm"] = 0.0
        ex.level.value = 0.8
        ref = stats.ttest_ind(RISE_A, RISE_B, equal_var=False).confidence_interval(0.8)
        assert ex.result.ci == pytest.approx((ref.low, ref.high), rel=1e-10)

    def test_refused_value_shows_message_and_keeps_last_result(self):
        """An unusable null shows the parameter message and keeps the last good result."""
        ex = tinfer.from_summary(n=10, mean=2.0, sd=1.0).explore()
        before = ex.result
        ex.null.value = float("inf")
        assert "null" in ex.message.value
        assert ex.result is before
        ex.null.value = 1.0
        assert ex.message.value == ""
        assert ex.result.null == 1.0

    def test_margin_box_recomputes_tost(self):
        """A new equivalence margin gives the TOST p-value of two scipy one-sided tests."""
        r = pd.DataFrame({"fill_g": FILL}).tinfer.one_sample("fill_g", null=250.0, margin=1.0)
        ex = r.explore()
        assert ex.margin is not None
        ex.margin.value = 1.5
        eq = ex.result.equivalence
        assert (eq.low, eq.high) == (248.5, 251.5)
        # TOST (Schuirmann 1987): the larger of the two one-sided p-values, from scipy.
        p_low = stats.ttest_1samp(FILL, popmean=248.5, alternative="greater").pvalue
        p_high = stats.ttest_1samp(FILL, popmean=251.5, alternative="less").pvalue
        assert eq.p == pytest.approx(max(p_low, p_high), rel=1e-9)

    def test_asymmetric_margin_boxes_recompute_tost(self):
        """Editing the upper offset of an asymmetric band gives scipy's two one-sided tests."""
        r = pd.DataFrame({"fill_g": FILL}).tinfer.one_sample(
            "fill_g", null=250.0, margin=(-1.0, 2.0)
        )
        ex = r.explore()
        below, above = ex.margin.children
        assert (below.value, above.value) == (-1.0, 2.0)
        above.value = 1.2
        eq = ex.result.equivalence
        assert (eq.low, eq.high) == (249.0, 251.2)
        # TOST (Schuirmann 1987): the larger of the two one-sided p-values, from scipy.
        p_low = stats.ttest_1samp(FILL, popmean=249.0, alternative="greater").pvalue
        p_high = stats.ttest_1samp(FILL, popmean=251.2, alternative="less").pvalue
        assert eq.p == pytest.approx(max(p_low, p_high), rel=1e-9)
        assert ex.margin in ex.children

    def test_trim_slider_matches_scipy_yuen(self):
        """Moving the trim slider to 0.2 gives scipy's Yuen trimmed-mean t and p."""
        ex = _two_groups().tinfer.two_sample("rise_mm", by="starter").explore()
        assert ex.trim is not None
        ex.trim.value = 0.2
        ref = stats.ttest_ind(RISE_A, RISE_B, equal_var=False, trim=0.2)
        assert ex.result.trim == 0.2
        assert ex.result.t == pytest.approx(ref.statistic, rel=1e-9)
        assert ex.result.p == pytest.approx(ref.pvalue, rel=1e-8)

    def test_trimming_disables_pooling(self):
        """With a trim above 0 the pooling box is disabled (Yuen's test does not pool)."""
        ex = _two_groups().tinfer.two_sample("rise_mm", by="starter").explore()
        assert not ex.pooled.disabled
        ex.trim.value = 0.1
        assert ex.pooled.disabled
        ex.trim.value = 0.0
        assert not ex.pooled.disabled

    def test_controls_absent_where_they_do_not_apply(self):
        """Published summaries get no trim control; one sample gets no pooling; no margin."""
        ex = tinfer.from_summary(n=10, mean=2.0, sd=1.0).explore()
        assert (ex.trim, ex.pooled, ex.margin) == (None, None, None)
        assert len(ex.children) == 5  # level, side, null, message, view

    def test_mimebundle_has_widget_view_and_static_card(self):
        """The bundle holds the widget view, the card as text/html and the text repr."""
        r = tinfer.from_summary(n=(14, 16), mean=(41.3, 37.9), sd=(4.4, 5.1))
        ex = r.explore()
        ex.level.value = 0.9
        bundle = ex._repr_mimebundle_()
        assert "application/vnd.jupyter.widget-view+json" in bundle
        assert bundle["text/html"] == ex.view.value
        assert "tinfer-card" in bundle["text/html"]
        assert bundle["text/plain"] == str(ex.result)

    def test_missing_ipywidgets_raises_helpful_error(self, monkeypatch):
        """Without ipywidgets, explore() raises MissingDependencyError (also an ImportError)."""
        r = tinfer.from_summary(n=10, mean=2.0, sd=1.0)
        monkeypatch.setitem(sys.modules, "ipywidgets", None)
        with pytest.raises(tinfer.MissingDependencyError, match="pip install") as info:
            r.explore()
        assert isinstance(info.value, ImportError)


# ---------------------------------------------------------------------------- explore_tdist
class TestExploreTdist:
    def test_bounds_give_scipy_area(self):
        """The range slider's area at non-integer df equals scipy.stats.t's cdf difference."""
        ex = tinfer.tdist(7.5).explore()
        ex.bounds.value = (-1.3, 2.1)
        ref = stats.t.cdf(2.1, 7.5) - stats.t.cdf(-1.3, 7.5)
        assert ex.area == pytest.approx(ref, rel=1e-12)
        assert f"{ref:.3f}" in _text(ex.view.value)

    def test_df_slider_updates_percentiles(self):
        """A new df shows scipy's percentiles of t at that (non-integer) df."""
        ex = tinfer.tdist(10).explore()
        ex.df.value = 3.7
        assert ex.result.dist.df == pytest.approx(3.7)
        text = _text(ex.view.value)
        for q in (0.05, 0.975):
            assert f"{stats.t.ppf(q, ex.result.dist.df):.4f}" in text
        assert ex.df.min == pytest.approx(math.log10(0.5)) and ex.df.max == 3

    def test_normal_checkbox_switches_to_normal(self):
        """Ticking "normal (df = ∞)" gives scipy.stats.norm areas and disables the df slider."""
        ex = tinfer.tdist(4).explore()
        ex.bounds.value = (-1.0, 1.5)
        ex.normal.value = True
        assert math.isinf(ex.result.dist.df)
        assert ex.df.disabled
        ref = stats.norm.cdf(1.5) - stats.norm.cdf(-1.0)
        assert ex.area == pytest.approx(ref, rel=1e-12)

    def test_df_outside_slider_range_is_kept(self):
        """A df beyond 0.5 to 1000 widens the slider, so the explorer starts at that df."""
        ex = tinfer.tdist(5000).explore()
        assert ex.result.dist.df == 5000
        ex.bounds.value = (-1.0, 1.0)
        assert ex.area == pytest.approx(stats.t.cdf(1, 5000) - stats.t.cdf(-1, 5000), rel=1e-12)

    def test_upper_region_gives_scipy_tail(self):
        """Shading "above the second" bound gives scipy's survival function there."""
        ex = tinfer.tdist(12).explore()
        ex.bounds.value = (-1.0, 2.5)
        ex.region.value = "above"
        assert ex.options() == {"df": pytest.approx(12), "low": 2.5, "high": None}
        assert ex.area == pytest.approx(stats.t.sf(2.5, ex.result.dist.df), rel=1e-12)


# ---------------------------------------------------------------------------- explore_plan
def _power_scipy(effect: float, n1: int, n2: int, level: float = 0.95) -> float:
    """Two-sided pooled two-sample t power from scipy.stats.nct (Cohen 1988, ch. 2)."""
    df = n1 + n2 - 2
    ncp = effect * math.sqrt(n1 * n2 / (n1 + n2))
    c = stats.t.ppf(0.5 + level / 2, df)
    return stats.nct.sf(c, df, ncp) + stats.nct.cdf(-c, df, ncp)


class TestExplorePlan:
    def test_effect_slider_resolves_n(self):
        """Raising the effect from 0.5 to 0.8 moves n per group from 64 to 26."""
        ex = tinfer.plan("two-sample", effect=0.5, power=0.8).explore()
        # 64 and 26 per group at alpha 0.05, power 0.80: Cohen (1988), Table 2.4.1 (from memory).
        assert ex.result.n == 64
        ex.effect.value = 0.8
        assert ex.result.n == 26
        assert _power_scipy(0.8, 26, 26) >= 0.8 > _power_scipy(0.8, 25, 25)
        assert "26" in _text(ex.view.value)

    def test_ratio_slider_resolves_unequal_groups(self):
        """At ratio 2 the plan is the smallest n1 (n2 = 2 n1) whose scipy power reaches 0.8."""
        ex = tinfer.plan("two-sample", effect=0.5, power=0.8).explore()
        ex.ratio.value = 2.0
        n1, n2 = ex.result.n, ex.result.n2
        assert n2 == math.ceil(2 * n1)
        assert _power_scipy(0.5, n1, n2) >= 0.8 > _power_scipy(0.5, n1 - 1, math.ceil(2 * n1 - 2))

    def test_level_slider_resolves_power(self):
        """With n given, a new level gives scipy's noncentral-t power at that level."""
        ex = tinfer.plan("two-sample", effect=0.5, n=40).explore()
        ex.level.value = 0.99
        assert ex.result.power == pytest.approx(_power_scipy(0.5, 40, 40, 0.99), rel=1e-7)

    def test_grid_plan_is_refused(self):
        """A grid of plans cannot be explored; the message says to plan one point."""
        grid = tinfer.plan("two-sample", effect=[0.2, 0.5], power=0.8)
        with pytest.raises(tinfer.ParameterError, match="single plan"):
            grid.explore()


def test_explorer_views_hold_no_raw_values():
    """The view of an explorer on 2000 values is no larger than on 20 (summaries only)."""
    rng = np.random.default_rng(7)
    small = pd.DataFrame({"x": rng.normal(5, 1, 20)}).tinfer.one_sample("x", null=5).explore()
    big = pd.DataFrame({"x": rng.normal(5, 1, 2000)}).tinfer.one_sample("x", null=5).explore()
    assert len(big.view.value) < 1.2 * len(small.view.value)


# ---------------------------------------------------------------------------- static export
def test_headless_run_keeps_last_values_and_static_card(tmp_path):
    """A notebook run by nbclient stores the last slider value and a readable HTML card."""
    nbclient = pytest.importorskip("nbclient")
    nbformat = pytest.importorskip("nbformat")
    cell = (
        "import tinfer\n"
        "ex = tinfer.from_summary(n=(14, 16), mean=(41.3, 37.9), sd=(4.4, 5.1)).explore()\n"
        "ex.level.value = 0.9\n"
        "ex"
    )
    nb = nbformat.v4.new_notebook(cells=[nbformat.v4.new_code_cell(cell)])
    nb.metadata["kernelspec"] = {
        "name": "python3",
        "display_name": "Python 3",
        "language": "python",
    }
    client = nbclient.NotebookClient(
        nb, timeout=120, kernel_name="python3", store_widget_state=True
    )
    client.execute(cwd=str(tmp_path))
    (out,) = [o for o in nb.cells[0].outputs if o.output_type == "execute_result"]
    assert "application/vnd.jupyter.widget-view+json" in out.data
    # Welch interval at 0.90 (Welch 1947 df; quantile from scipy.stats.t); the card prints
    # one decimal here, as the SE (1.73) has two significant digits at 0.1 (common practice).
    v1, v2 = 4.4**2 / 14, 5.1**2 / 16
    df = (v1 + v2) ** 2 / (v1**2 / 13 + v2**2 / 15)
    half = stats.t.ppf(0.95, df) * math.sqrt(v1 + v2)
    text = _text(out.data["text/html"])
    assert f"90% CI {3.4 - half:.1f} to {3.4 + half:.1f}" in text
    state = nb.metadata["widgets"]["application/vnd.jupyter.widget-state+json"]["state"]
    sliders = [m["state"] for m in state.values() if m["model_name"] == "FloatSliderModel"]
    assert [s["value"] for s in sliders] == [0.9]
