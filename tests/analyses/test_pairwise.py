"""Pairwise comparisons of k groups against outside references.

References: scipy.stats.tukey_hsd (Tukey-Kramer p-values and intervals), scipy.stats.dunnett
(randomised quasi-Monte Carlo, so agreement is to about 1e-4), scipy.stats.studentized_range
in a hand-written Games-Howell formula (Games and Howell 1976: Welch's standard error and
df per pair, q = |difference| / SE * sqrt 2), scipy.stats.ttest_ind for separate Welch tests
and their Bonferroni intervals, scipy.stats.false_discovery_control for Benjamini-Hochberg
and Benjamini-Yekutieli, and the published definitions of Holm (1979) and Hochberg (1988)
written out by hand. I know no published worked example of Games-Howell well enough to quote
it, so none is used. The data are invented: the hardness of tablets pressed on four presses,
and the height of seedlings under five watering schedules.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from references import SCIPY_PPF_RTOL
from scipy import stats

import tinfer
from tinfer.errors import DataError, ParameterError

RNG = np.random.default_rng(20261203)
PRESSES = {  # level: (mean, SD, n) -- unequal spreads and sizes
    "press 1": (82.0, 2.0, 9),
    "press 2": (84.5, 3.5, 12),
    "press 3": (81.0, 1.5, 7),
    "press 4": (86.0, 5.0, 10),
}
SAMPLES = {k: RNG.normal(m, s, n) for k, (m, s, n) in PRESSES.items()}
TABLETS = pd.DataFrame(
    {
        "hardness_n": np.concatenate(list(SAMPLES.values())),
        "press": np.repeat(list(SAMPLES), [v.size for v in SAMPLES.values()]),
    }
)
NAMES = list(SAMPLES)


def _pair_index(r, first, second) -> int:
    return r.pair_labels().index(f"{first} minus {second}")


class TestTukeyKramer:
    def test_against_scipy_tukey_hsd(self):
        """p-values (1e-10 relative) and intervals (1e-10 absolute) of scipy.stats.tukey_hsd."""
        r = TABLETS.tinfer.pairwise("hardness_n", by="press", method="tukey-kramer")
        ref = stats.tukey_hsd(*SAMPLES.values())
        ci = ref.confidence_interval(0.95)
        for i in range(4):
            for j in range(i):
                p = _pair_index(r, NAMES[i], NAMES[j])  # later minus earlier
                assert r.estimate[p] == pytest.approx(ref.statistic[i, j], rel=1e-12)
                assert r.p_adjusted[p] == pytest.approx(ref.pvalue[i, j], rel=1e-10)
                assert r.ci_low[p] == pytest.approx(ci.low[i, j], abs=1e-10)
                assert r.ci_high[p] == pytest.approx(ci.high[i, j], abs=1e-10)

    def test_level_changes_the_intervals_like_scipy(self):
        """At level 0.99 the intervals still match scipy's (1e-10)."""
        r = TABLETS.tinfer.pairwise("hardness_n", by="press", method="tukey-kramer", level=0.99)
        ci = stats.tukey_hsd(*SAMPLES.values()).confidence_interval(0.99)
        p = _pair_index(r, "press 4", "press 1")
        assert r.ci_low[p] == pytest.approx(ci.low[3, 0], abs=1e-10)


class TestGamesHowell:
    def test_against_hand_written_formula(self):
        """Welch SE and df per pair, scipy's studentized range for p and the interval (1e-9)."""
        r = TABLETS.tinfer.pairwise("hardness_n", by="press")
        assert r.method == "games-howell"
        for i in range(4):
            for j in range(i):
                a, b = SAMPLES[NAMES[i]], SAMPLES[NAMES[j]]
                va, vb = a.var(ddof=1) / a.size, b.var(ddof=1) / b.size
                se = np.sqrt(va + vb)
                df = (va + vb) ** 2 / (va**2 / (a.size - 1) + vb**2 / (b.size - 1))
                diff = a.mean() - b.mean()
                q = abs(diff) / se * np.sqrt(2)
                half = stats.studentized_range.ppf(0.95, 4, df) / np.sqrt(2) * se
                p = _pair_index(r, NAMES[i], NAMES[j])
                assert r.df[p] == pytest.approx(df, rel=1e-12)
                assert r.p_adjusted[p] == pytest.approx(
                    stats.studentized_range.sf(q, 4, df), rel=1e-8
                )
                assert r.ci_low[p] == pytest.approx(diff - half, rel=1e-9)
                assert r.p_single[p] == pytest.approx(
                    stats.ttest_ind(a, b, equal_var=False).pvalue, rel=1e-12
                )


class TestDunnett:
    @pytest.mark.parametrize(
        ("side", "alternative"),
        [("two-sided", "two-sided"), ("upper", "greater"), ("lower", "less")],
    )
    def test_against_scipy_dunnett(self, side, alternative):
        """p-values and the interval ends of scipy.stats.dunnett (its QMC error: 2e-4)."""
        r = TABLETS.tinfer.pairwise("hardness_n", by="press", against="press 1", side=side)
        others = [SAMPLES[k] for k in NAMES[1:]]
        ref = stats.dunnett(
            *others, control=SAMPLES["press 1"], alternative=alternative, random_state=1
        )
        ci = ref.confidence_interval(0.95)
        for j, name in enumerate(NAMES[1:]):
            p = _pair_index(r, name, "press 1")
            assert r.p_adjusted[p] == pytest.approx(ref.pvalue[j], abs=2e-4)
            for mine, theirs in ((r.ci_low[p], ci.low[j]), (r.ci_high[p], ci.high[j])):
                if np.isfinite(theirs):
                    assert mine == pytest.approx(theirs, abs=2e-3)
                else:
                    assert mine == theirs

    def test_unequal_spreads_get_a_note(self):
        """A pooled method with SDs 2-fold apart or more says so and names the alternative."""
        r = TABLETS.tinfer.pairwise("hardness_n", by="press", against="press 1")
        assert any("assumes equal variances" in w for w in r.warnings)


class TestSeparateTests:
    @pytest.mark.parametrize(
        "method", ["holm", "hochberg", "benjamini-hochberg", "benjamini-yekutieli"]
    )
    def test_adjusted_welch_p_values(self, method):
        """Welch p per pair (scipy.stats.ttest_ind), adjusted by the published definition
        (Holm, Hochberg by hand; BH and BY by scipy.stats.false_discovery_control)."""
        r = TABLETS.tinfer.pairwise("hardness_n", by="press", method=method)
        raw = np.array(
            [stats.ttest_ind(SAMPLES[NAMES[a]], SAMPLES[NAMES[b]], equal_var=False).pvalue
             for a, b in zip(r.first, r.second, strict=True)]
        )  # fmt: skip
        np.testing.assert_allclose(r.p_single, raw, rtol=1e-12)
        np.testing.assert_allclose(r.p_adjusted, _adjusted(raw, method), rtol=1e-12)

    def test_bonferroni_intervals_for_family_wise_methods(self):
        """Holm's intervals are each pair's Welch interval at 1 - alpha / m (scipy)."""
        r = TABLETS.tinfer.pairwise("hardness_n", by="press", method="holm")
        a, b = SAMPLES["press 4"], SAMPLES["press 2"]
        ref = stats.ttest_ind(a, b, equal_var=False).confidence_interval(1 - 0.05 / 6)
        p = _pair_index(r, "press 4", "press 2")
        tol = max(1e-11, SCIPY_PPF_RTOL)  # the reference's own t.ppf (tests/references.py)
        assert (r.ci_low[p], r.ci_high[p]) == pytest.approx((ref.low, ref.high), rel=tol)

    def test_false_coverage_rate_intervals(self):
        """BH's intervals are at 1 - R alpha / m with R the discoveries (Benjamini and
        Yekutieli 2005), so an interval excludes zero exactly when the pair is a discovery."""
        r = TABLETS.tinfer.pairwise("hardness_n", by="press", method="bh")
        found = int(r.differs.sum())
        a, b = SAMPLES["press 4"], SAMPLES["press 3"]
        level = 1 - max(found, 1) * 0.05 / 6
        ref = stats.ttest_ind(a, b, equal_var=False).confidence_interval(level)
        p = _pair_index(r, "press 4", "press 3")
        assert r.ci_low[p] == pytest.approx(ref.low, rel=1e-11)
        excludes = (r.ci_low > 0) | (r.ci_high < 0)
        assert np.array_equal(excludes, r.differs)


def _adjusted(p: np.ndarray, method: str) -> np.ndarray:
    m = p.size
    order = np.argsort(p)
    s = p[order]
    if method == "holm":  # Holm (1979): max over j <= i of (m - j + 1) p_(j)
        adj = np.array([max((m - j) * s[j] for j in range(i + 1)) for i in range(m)])
    elif method == "hochberg":  # Hochberg (1988): min over j >= i of (m - j + 1) p_(j)
        adj = np.array([min((m - j) * s[j] for j in range(i, m)) for i in range(m)])
    else:
        kind = "bh" if method == "benjamini-hochberg" else "by"
        return stats.false_discovery_control(p, method=kind)
    out = np.empty(m)
    out[order] = np.minimum(adj, 1.0)
    return out


class TestReductions:
    def test_two_levels_are_the_two_sample_tests(self):
        """k = 2: Games-Howell is Welch's test and Tukey-Kramer Student's, p and interval
        (1e-12); the effect size and its interval are the two-sample Hedges' g."""
        two = TABLETS[TABLETS.press.isin(["press 1", "press 2"])]
        gh = two.tinfer.pairwise("hardness_n", by="press")
        welch = two.tinfer.two_sample("hardness_n", by="press", groups=("press 2", "press 1"))
        assert gh.p_adjusted[0] == pytest.approx(welch.p, rel=1e-12)
        assert (gh.ci_low[0], gh.ci_high[0]) == pytest.approx(welch.ci, rel=1e-12)
        assert gh.effect[0] == pytest.approx(welch.effect.value, rel=1e-12)
        assert gh.effect_ci_low[0] == pytest.approx(welch.effect.ci[0], rel=1e-10)
        tk = two.tinfer.pairwise("hardness_n", by="press", method="tukey-kramer")
        student = two.tinfer.two_sample(
            "hardness_n", by="press", groups=("press 2", "press 1"), pooled=True
        )
        assert tk.p_adjusted[0] == pytest.approx(student.p, rel=1e-12)
        assert tk.ci_high[0] == pytest.approx(student.ci[1], rel=1e-12)

    def test_summaries_give_the_raw_data_answer(self):
        """pairwise_from_summary on the groups' n, mean, SD equals the DataFrame path (1e-12)."""
        raw = TABLETS.tinfer.pairwise("hardness_n", by="press", method="tukey-kramer")
        summ = tinfer.pairwise_from_summary(
            n=[v.size for v in SAMPLES.values()],
            mean=[v.mean() for v in SAMPLES.values()],
            sd=[v.std(ddof=1) for v in SAMPLES.values()],
            labels=NAMES,
            method="tukey-kramer",
        )
        assert summ.pair_labels() == raw.pair_labels()
        np.testing.assert_allclose(summ.p_adjusted, raw.p_adjusted, rtol=1e-12)
        np.testing.assert_allclose(summ.ci_low, raw.ci_low, rtol=1e-12)


class TestShape:
    def test_levels_follow_a_categorical_order_and_pairs_read_upward(self):
        """A categorical column keeps its order; a pair is a later level minus an earlier one,
        and with a control, each level minus the control."""
        df = TABLETS.assign(press=pd.Categorical(TABLETS.press, categories=NAMES[::-1]))
        r = df.tinfer.pairwise("hardness_n", by="press")
        assert r.levels == tuple(NAMES[::-1])
        assert r.pair_labels()[0] == "press 3 minus press 4"
        c = TABLETS.tinfer.pairwise("hardness_n", by="press", against="press 3")
        assert c.pair_labels() == [
            "press 1 minus press 3",
            "press 2 minus press 3",
            "press 4 minus press 3",
        ]

    def test_to_frame_and_groups(self):
        """to_frame has one row per pair with both levels' figures; groups_frame one per level."""
        r = TABLETS.tinfer.pairwise("hardness_n", by="press")
        frame = r.to_frame()
        assert len(frame) == 6 and {"first", "second", "p_adjusted", "differs", "n_first"} <= set(
            frame
        )
        assert frame.n_first.tolist() == [SAMPLES[v].size for v in frame["first"]]
        assert r.groups_frame()["mean"].tolist() == pytest.approx(
            [SAMPLES[k].mean() for k in NAMES]
        )

    def test_missing_values_and_keys_are_counted(self):
        """Missing values and rows without a group are left out and counted in notes."""
        df = TABLETS.copy()
        df.loc[[0, 1], "hardness_n"] = np.nan
        df.loc[5, "press"] = None
        r = df.tinfer.pairwise("hardness_n", by="press")
        assert "1 row(s) with a missing 'press' value were not used." in r.warnings
        assert "2 missing value(s) of 'hardness_n' dropped." in r.warnings
        assert r.groups[0].n == PRESSES["press 1"][2] - 3

    def test_a_level_with_one_value_takes_no_part(self):
        """A level with a single value gets NaN pairs and a note; k counts the others."""
        df = pd.concat([TABLETS, pd.DataFrame({"hardness_n": [90.0], "press": ["press 5"]})])
        r = df.tinfer.pairwise("hardness_n", by="press")
        alone = [i for i, lab in enumerate(r.pair_labels()) if "press 5" in lab]
        assert np.isnan(r.p_adjusted[alone]).all() and r.n_tested == 6
        assert any("fewer than two values" in w for w in r.warnings)
        ref = TABLETS.tinfer.pairwise("hardness_n", by="press")
        np.testing.assert_allclose(
            np.sort(r.p_adjusted[np.isfinite(r.p_adjusted)]), np.sort(ref.p_adjusted)
        )


class TestRefusals:
    @pytest.mark.parametrize(
        ("kwargs", "message"),
        [
            ({"method": "dunnett"}, "against="),
            ({"method": "tukey-kramer", "against": "press 1"}, "compares all pairs"),
            ({"side": "upper"}, "two-sided only"),
            ({"method": "scheffe"}, "The 'method' parameter of pairwise"),
            ({"against": "press 9"}, "does not occur in column"),
            ({"level": 1.5}, "The 'level' parameter of pairwise"),
        ],
    )
    def test_clear_messages(self, kwargs, message):
        """Each unsupported combination is refused with a message that says what to do."""
        with pytest.raises((ParameterError, DataError), match=message):
            TABLETS.tinfer.pairwise("hardness_n", by="press", **kwargs)

    def test_one_level_is_refused(self):
        with pytest.raises(DataError, match="needs at least two"):
            TABLETS[TABLETS.press == "press 1"].tinfer.pairwise("hardness_n", by="press")


class TestAdjust:
    def test_matches_scipy_and_keeps_nan_in_place(self):
        """tinfer.adjust: BH and BY as scipy.stats.false_discovery_control; NaN stays put and
        does not count in m."""
        p = np.array([0.001, 0.04, np.nan, 0.02, 0.3])
        keep = ~np.isnan(p)
        for method, kind in (("bh", "bh"), ("by", "by")):
            got = tinfer.adjust(p, method)
            assert np.isnan(got[2])
            np.testing.assert_allclose(
                got[keep], stats.false_discovery_control(p[keep], method=kind), rtol=1e-14
            )
        np.testing.assert_allclose(
            tinfer.adjust(p[keep], "holm"), _adjusted(p[keep], "holm"), rtol=1e-14
        )

    def test_series_stay_series(self):
        s = pd.Series([0.01, 0.02, 0.5], index=["a", "b", "c"], name="p")
        out = tinfer.adjust(s, "hochberg")
        assert isinstance(out, pd.Series) and list(out.index) == ["a", "b", "c"] and out.name == "p"

    @pytest.mark.parametrize("bad", [[0.1, 1.2], ["x"], [-0.1]])
    def test_refuses_values_outside_zero_one(self, bad):
        with pytest.raises(ParameterError, match="The 'p' parameter of adjust"):
            tinfer.adjust(bad)
