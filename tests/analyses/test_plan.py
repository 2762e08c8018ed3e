"""Study planning: tinfer.plan, PlanResult and TResult.detectable_effect / TResult.plan."""

from __future__ import annotations

import math
import re

import numpy as np
import pandas as pd
import pytest
from references import nct_power
from scipy import optimize, stats

import tinfer
from tinfer import ParameterError, PlanResult


# ----------------------------------------------------------------------------- plan: solving
class TestPlanSolves:
    def test_n_cohen_two_sample(self):
        """n per group 64 for d = 0.5, power .80, alpha .05 two-sided (Cohen 1988 table 2.4.1,
        from memory), with the exact achieved power from scipy.stats.nct."""
        p = tinfer.plan("two-sample", effect=0.5, power=0.8)
        assert (p.n, p.n2, p.n_total, p.solved) == (64, 64, 128, "n")
        assert p.power == pytest.approx(nct_power(0.5, 64, 64), rel=1e-10)
        assert p.target == 0.8 and p.method == "exact noncentral t"

    def test_power_given_n(self):
        """Power of a paired design with 30 pairs matches scipy.stats.nct."""
        p = tinfer.plan("paired", effect=0.4, n=30, level=0.9, side="upper")
        assert p.solved == "power" and p.target is None and p.n2 is None
        assert p.power == pytest.approx(nct_power(0.4, 30, None, 0.9, "upper"), rel=1e-10)
        assert p.df == 29 and p.ncp == pytest.approx(0.4 * math.sqrt(30))

    def test_effect_given_n_and_power(self):
        """Sensitivity effect equals a scipy.optimize.brentq root of the scipy.stats.nct power."""
        p = tinfer.plan("one-sample", n=25, power=0.9)
        want = optimize.brentq(lambda d: nct_power(d, 25) - 0.9, 0.1, 2.0, xtol=1e-14)
        assert p.effect == pytest.approx(want, rel=1e-9)
        assert p.power == pytest.approx(0.9, abs=1e-10)

    def test_lower_side_effect_negative(self):
        """A 'lower' alternative is detected for negative effects and solved as negative."""
        p = tinfer.plan("one-sample", n=20, power=0.8, side="lower", level=0.99)
        assert p.effect < 0
        assert nct_power(p.effect, 20, None, 0.99, "lower") == pytest.approx(0.8, abs=1e-10)

    def test_ratio_states_both_groups(self):
        """ratio = n2/n1: the second group is ceil(ratio * n1) and both sizes are reported."""
        p = tinfer.plan("two-sample", effect=0.6, power=0.8, ratio=1.5)
        assert p.n2 == math.ceil(1.5 * p.n) and p.n_total == p.n + p.n2
        assert (
            nct_power(0.6, p.n, p.n2) >= 0.8 > nct_power(0.6, p.n - 1, math.ceil(1.5 * (p.n - 1)))
        )
        assert f"{p.n} in the first group and {p.n2} in the second" in p.sentence()

    def test_diff_with_sd(self):
        """A raw difference with an SD plans the same as effect = diff / sd."""
        raw = tinfer.plan("two-sample", diff=3.0, sd=6.0, power=0.9)
        std = tinfer.plan("two-sample", effect=0.5, power=0.9)
        assert raw.n == std.n and raw.diff == 3.0 and raw.sd == 6.0 and raw.effect == 0.5

    def test_sd_reports_raw_sensitivity(self):
        """With an SD the solved effect also comes as a raw difference (effect times SD)."""
        p = tinfer.plan("paired", n=30, power=0.8, sd=2.5)
        assert p.diff == pytest.approx(2.5 * p.effect)
        assert "a difference of" in p.sentence()

    def test_level_changes_answer(self):
        """A stricter level needs more units (checked with scipy.stats.nct at the answer)."""
        p = tinfer.plan("two-sample", effect=0.5, power=0.8, level=0.99)
        assert nct_power(0.5, p.n, p.n, 0.99) >= 0.8 > nct_power(0.5, p.n - 1, p.n - 1, 0.99)
        assert p.n > 64


# ----------------------------------------------------------------------------- plan: equivalence
class TestPlanEquivalence:
    def test_design_name_and_margin_agree(self):
        """'equivalence-paired' with a margin equals 'paired' with the same margin."""
        a = tinfer.plan("equivalence-paired", margin=0.5, power=0.8)
        b = tinfer.plan("paired", margin=0.5, power=0.8)
        assert a == b and a.side == "equivalence" and a.effect == 0.0

    def test_raw_margin_scales_with_sd(self):
        """A raw margin of 2 with SD 4 plans like a margin of 0.5 SD."""
        a = tinfer.plan("equivalence-two-sample", margin=2.0, sd=4.0, power=0.9)
        b = tinfer.plan("equivalence-two-sample", margin=0.5, power=0.9)
        assert a.n == b.n and a.margin == (-2.0, 2.0) and b.margin == (-0.5, 0.5)

    def test_monte_carlo_at_planned_n(self):
        """At the planned n, a seeded simulation of two one-sided tests reaches the power (4 SE)."""
        p = tinfer.plan("equivalence-one-sample", margin=(-0.4, 0.6), effect=0.1, power=0.8)
        rng = np.random.default_rng(99)
        reps = 20000
        x = rng.normal(loc=0.1, size=(reps, p.n))
        lo = stats.ttest_1samp(x, -0.4, axis=1, alternative="greater").pvalue
        hi = stats.ttest_1samp(x, 0.6, axis=1, alternative="less").pvalue
        rate = np.mean((lo < 0.05) & (hi < 0.05))
        se = math.sqrt(p.power * (1 - p.power) / reps)
        assert abs(rate - p.power) < 4 * se and p.power >= 0.8

    def test_effect_not_solvable(self):
        """Equivalence plans solve for n or power, not for an effect."""
        with pytest.raises(ParameterError, match="equivalence"):
            tinfer.plan("paired", margin=0.5, n=30, power=0.8)


# ----------------------------------------------------------------------------- plan: grids
class TestPlanGrid:
    def test_effect_grid(self):
        """A list of effects gives one plan per effect, equal to the single plans."""
        g = tinfer.plan("two-sample", effect=[0.2, 0.5, 0.8], power=0.8)
        assert g.is_grid and g.grid == ("effect",) and len(g) == 3
        assert g.n == (394, 64, 26)  # exact; Cohen (1988) table 2.4.1 has 393, 64, 26
        assert g.n[1] == tinfer.plan("two-sample", effect=0.5, power=0.8).n

    def test_n_grid_to_frame(self):
        """An array of n gives a power curve with one frame row per point (scipy.stats.nct)."""
        ns = np.arange(5, 105)
        g = tinfer.plan("one-sample", n=ns, effect=0.4)
        f = g.to_frame()
        assert isinstance(f, pd.DataFrame) and len(f) == 100
        np.testing.assert_allclose(
            f["power"].to_numpy(), [nct_power(0.4, int(k)) for k in ns], rtol=1e-10
        )
        assert (f["design"] == "one-sample").all() and (f["solved"] == "power").all()

    def test_two_grids_pair_up(self):
        """Equal-length grids of n and power pair point by point."""
        g = tinfer.plan("paired", n=[10, 40], power=[0.8, 0.9])
        assert g.grid == ("n", "power")
        for k, target, e in zip(g.n, g.target, g.effect, strict=True):
            assert nct_power(e, k) == pytest.approx(target, abs=1e-10)

    def test_grid_lengths_must_match(self):
        """Grids of different lengths are refused with the lengths in the message."""
        with pytest.raises(ParameterError, match="same length"):
            tinfer.plan("paired", n=[10, 20, 30], power=[0.8, 0.9])

    def test_grid_text_and_sentence(self):
        """A grid's text shows one line per point and a sentence with the range."""
        g = tinfer.plan("two-sample", effect=[0.2, 0.5, 0.8], power=0.8)
        text = str(g)
        assert "from 26 to 394" in g.sentence()
        assert len(text.splitlines()) == 2 + 1 + 3


# ----------------------------------------------------------------------------- plan: checks
class TestPlanErrors:
    @pytest.mark.parametrize(
        "kwargs, pattern",
        [
            ({"effect": 0.5, "n": 20, "power": 0.8}, "all but one"),
            ({"effect": 0.5}, "all but one"),
            ({"effect": 0.5, "diff": 1.0, "sd": 2.0, "power": 0.8}, "cannot both"),
            ({"diff": 1.0, "power": 0.8}, "'sd'"),
            ({"effect": 0.5, "power": 1.2}, "'power'"),
            ({"effect": 0.5, "n": 1}, "'n'"),
            ({"effect": 0.5, "n": 10.5}, "'n'"),
            ({"effect": 0.5, "power": 0.8, "level": 95}, "'level'"),
            ({"effect": 0.5, "power": 0.8, "side": "greater"}, "'side'"),
            ({"effect": 0.5, "power": 0.8, "ratio": 2.0}, "'ratio'"),
            ({"effect": 0.0, "power": 0.8}, "cannot reach"),
            ({"effect": -0.5, "power": 0.8, "side": "upper"}, "cannot reach"),
            ({"n": 20, "power": 0.03}, "'power'"),
            ({"effect": [0.5, float("nan")], "power": 0.8}, "'effect'"),
        ],
    )
    def test_messages(self, kwargs, pattern):
        """Bad combinations raise ParameterError (a ValueError) naming the parameter."""
        with pytest.raises(ParameterError, match=pattern):
            tinfer.plan("one-sample", **kwargs)
        assert issubclass(ParameterError, ValueError)

    def test_unknown_design_suggests(self):
        """A misspelt design is refused with the closest name suggested."""
        with pytest.raises(ParameterError, match="Did you mean 'two-sample'"):
            tinfer.plan("two-samples", effect=0.5, power=0.8)

    def test_equivalence_design_needs_margin(self):
        """An equivalence design without a margin is refused."""
        with pytest.raises(ParameterError, match="'margin'"):
            tinfer.plan("equivalence-paired", power=0.8)


# ----------------------------------------------------------------------------- PlanResult
class TestPlanResult:
    def test_frozen(self):
        """PlanResult is immutable."""
        p = tinfer.plan("paired", effect=0.5, power=0.8)
        with pytest.raises(AttributeError):
            p.n = 3

    def test_sentence_states_answer(self):
        """The sentence states the n, the target and the achieved power."""
        s = tinfer.plan("two-sample", effect=0.5, power=0.8).sentence()
        assert "64 per group (128 in all)" in s and "power 0.8" in s and "0.801" in s

    def test_docstring_explains_no_observed_power(self):
        """The PlanResult docs say why there is no observed power (it restates the p-value)."""
        assert "restatement of the p-value" in " ".join(PlanResult.__doc__.split())

    def test_mimebundle(self):
        """The bundle has text/plain and CSS-only text/html with tinfer- class names."""
        b = tinfer.plan("two-sample", effect=[0.3, 0.5], power=0.8)._repr_mimebundle_()
        assert set(b) == {"text/plain", "text/html"}
        html = b["text/html"]
        assert "<script" not in html.lower() and "64" in html
        classes = re.findall(r'class="([^"]+)"', html)
        assert classes and all(c.startswith("tinfer-") for c in classes)

    def test_html_escapes_strings(self):
        """Strings in the card are escaped: a method named <x> shows as &lt;x&gt;."""
        p = tinfer.plan("paired", effect=0.5, power=0.8)
        fake = PlanResult(**{**p.to_dict(), "method": "<x>"})
        html = fake._repr_mimebundle_()["text/html"]
        assert "&lt;x&gt;" in html and "<x>" not in html

    def test_chart_layers(self):
        """The chart has one curve per effect and level, the target rule and the plan marked."""
        p = tinfer.plan("two-sample", effect=0.5, power=0.8)
        spec = p.chart(effects=[0.3, 0.5, 0.8], levels=[0.9, 0.95]).to_dict()
        marks = [layer["mark"]["type"] for layer in spec["layer"]]
        assert marks == ["line", "rule", "rule", "point"]
        curves = {row["curve"] for row in _chart_rows(spec, 0)}
        assert len(curves) == 6
        assert _chart_rows(spec, 1)[0]["target"] == 0.8
        assert _chart_rows(spec, 3)[0]["x"] == 64

    def test_chart_size_bounded(self):
        """The chart data do not grow with n (at most 240 points per curve)."""
        spec = tinfer.plan("two-sample", effect=0.05, power=0.9).chart().to_dict()
        assert len(_chart_rows(spec, 0)) <= 240

    def test_chart_effect_axis(self):
        """A sensitivity plan charts power against the effect, reaching the target there."""
        p = tinfer.plan("paired", n=30, power=0.8)
        spec = p.chart().to_dict()
        assert spec["layer"][0]["encoding"]["x"]["title"] == "standardised effect"
        assert _chart_rows(spec, 3)[0]["power"] == pytest.approx(0.8)


def _chart_rows(spec, i):
    """Rows of the inline dataset behind layer ``i`` of an Altair spec."""
    name = spec["layer"][i]["data"]["name"]
    return spec["datasets"][name]


# ----------------------------------------------------------------------------- from a result
class TestFromResult:
    def test_detectable_effect_two_sample(self):
        """Sensitivity of a 12 + 15 design: the effect with power .8 there (scipy.stats.nct)."""
        r = tinfer.from_summary(n=(12, 15), mean=(5.1, 4.3), sd=(1.2, 1.5))
        s = r.detectable_effect(power=0.8)
        assert (s.n, s.n2, s.solved) == (12, 15, "effect")
        assert nct_power(s.effect, 12, 15) == pytest.approx(0.8, abs=1e-10)

    def test_detectable_effect_paired_uses_pairs(self):
        """A paired result's detectable effect counts pairs, keeping its level and side."""
        r = tinfer.from_summary(n=18, mean=0.7, sd=1.1, paired=True, level=0.9, side="upper")
        s = r.detectable_effect(0.9)
        assert s.n == 18 and s.level == 0.9 and s.side == "upper"
        assert nct_power(s.effect, 18, None, 0.9, "upper") == pytest.approx(0.9, abs=1e-10)

    def test_follow_up_uses_pooled_sd(self):
        """A follow-up for a raw difference uses the pooled SD sqrt((11*1.2^2 + 14*1.5^2)/25)."""
        r = tinfer.from_summary(n=(12, 15), mean=(5.1, 4.3), sd=(1.2, 1.5))
        f = r.plan(power=0.8, diff=1.0, ratio=1.0)
        sp = math.sqrt((11 * 1.2**2 + 14 * 1.5**2) / 25)  # pooled SD by hand
        assert f.sd == pytest.approx(sp) and f.effect == pytest.approx(1.0 / sp)
        d = 1.0 / sp
        assert nct_power(d, f.n, f.n) >= 0.8 > nct_power(d, f.n - 1, f.n - 1)

    def test_follow_up_default_effect(self):
        """By default the follow-up is sized for the observed standardised effect."""
        r = tinfer.from_summary(n=20, mean=10.4, sd=2.0, null=10.0)
        f = r.plan()
        assert f.effect == pytest.approx(r.effect.value) and f.sd == pytest.approx(2.0)
        assert nct_power(f.effect, f.n) >= 0.8 > nct_power(f.effect, f.n - 1)


def test_public_names():
    """plan and PlanResult are public and listed in __all__."""
    assert {"plan", "PlanResult"} <= set(tinfer.__all__)
    assert tinfer.plan is not None and tinfer.PlanResult is PlanResult


class TestPlanFromTrimmedResult:
    def test_refused_with_reason(self):
        """Planning from a Yuen result is refused: the noncentral-t plan is for means."""
        rng = np.random.default_rng(5)
        df = pd.DataFrame({"v": rng.normal(size=30), "g": ["a"] * 15 + ["b"] * 15})
        r = df.tinfer.two_sample("v", by="g", trim=0.2)
        with pytest.raises(tinfer.ParameterError, match="trimmed-means result"):
            r.detectable_effect()
        with pytest.raises(tinfer.ParameterError, match="trimmed-means result"):
            r.plan(power=0.9)


class TestGridText:
    def test_long_grid_text_is_bounded(self):
        """A 500-point grid lists 20 rows in its text form and says how many more to_frame has."""
        p = tinfer.plan("two-sample", effect=0.5, n=list(range(5, 505)))
        text = str(p)
        assert "... 480 more row(s); see to_frame()" in text
        assert len(text.splitlines()) < 30
        assert len(p.to_frame()) == 500


# ----------------------------------------------------------------------------- recompute
class TestPlanRecompute:
    def test_new_effect_solved_again(self):
        """recompute(effect=0.8) solves n again: the smallest n whose scipy.stats.nct power
        reaches 0.8 (26 per group; Cohen 1988 table 2.4.1 gives 26, from memory)."""
        p = tinfer.plan("two-sample", effect=0.5, power=0.8).recompute(effect=0.8)
        assert (p.solved, p.n, p.n2) == ("n", 26, 26)
        assert nct_power(0.8, 26, 26) >= 0.8 > nct_power(0.8, 25, 25)

    def test_keeps_what_was_given(self):
        """Inputs not changed (level, side, ratio, sd) keep the plan's values."""
        p = tinfer.plan("two-sample", diff=2.0, sd=4.0, power=0.9, ratio=2, side="upper")
        q = p.recompute(power=0.8)
        assert (q.sd, q.ratio, q.side, q.level, q.effect) == (4.0, 2.0, "upper", 0.95, 0.5)
        assert q.power == pytest.approx(nct_power(0.5, q.n, q.n2, 0.95, "upper"), rel=1e-10)
        assert q.power >= 0.8

    def test_equivalence_plan(self):
        """An equivalence plan keeps its margin and solves n again for the new power."""
        p = tinfer.plan("equivalence-paired", margin=0.5, power=0.8)
        q = p.recompute(power=0.9)
        assert q.margin == p.margin and q.side == "equivalence" and q.n > p.n

    def test_unknown_option(self):
        """An option plan does not take raises TypeError naming the allowed ones."""
        with pytest.raises(TypeError, match=r"unexpected option"):
            tinfer.plan("paired", effect=0.4, n=30).recompute(rate=0.1)
