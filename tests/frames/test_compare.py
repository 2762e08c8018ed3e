"""Many comparisons at once: df.tinfer.compare, tinfer.compare_summaries and BatchResult."""

from __future__ import annotations

import json
import warnings
from fractions import Fraction

import numpy as np
import pandas as pd
import pytest
from scipy import stats

import tinfer
from tinfer import BatchResult, DataError, ParameterError, SmallSegmentWarning

RTOL = 1e-12


def orchard(seed: int = 1, n_sites: int = 6, per: int = 9) -> pd.DataFrame:
    """Invented data: apple mass (g) and sugar (Brix) by site, row and netting (yes/no)."""
    rng = np.random.default_rng(seed)
    rows = []
    for site in range(n_sites):
        for block in ("east", "west"):
            for net in ("netted", "open"):
                k = per + int(rng.integers(0, 4))
                shift = 4.0 * (net == "netted") * (site % 2)
                rows.append(
                    pd.DataFrame(
                        {
                            "site": f"s{site:02d}",
                            "block": block,
                            "net": net,
                            "mass_g": rng.normal(180 + shift, 6 + site, k),
                            "brix": rng.normal(12, 1.5, k),
                        }
                    )
                )
    df = pd.concat(rows, ignore_index=True)
    df.loc[[3, 40], "mass_g"] = np.nan
    return df


def assert_row_matches(row: pd.Series, r, two: bool = True):
    """Every number of a batch row equals the one-at-a-time result."""
    np.testing.assert_allclose(row["estimate"], r.estimate, rtol=RTOL)
    np.testing.assert_allclose(row["se"], r.se, rtol=RTOL)
    np.testing.assert_allclose(row["t"], r.t, rtol=RTOL)
    np.testing.assert_allclose(row["df"], r.df, rtol=RTOL)
    np.testing.assert_allclose(row["p"], r.p, rtol=1e-11)
    np.testing.assert_allclose([row["ci_low"], row["ci_high"]], r.ci, rtol=RTOL)
    np.testing.assert_allclose(row["effect"], r.effect.value, rtol=RTOL)
    np.testing.assert_allclose(
        [row["effect_ci_low"], row["effect_ci_high"]], r.effect.ci, rtol=1e-10
    )


# ---------------------------------------------------------------- compare (two samples)
class TestCompareTwoSample:
    def test_equals_one_at_a_time(self):
        """Each segment x metric row equals df.tinfer.two_sample on that segment (1e-12)."""
        df = orchard()
        m = df.tinfer.compare(["mass_g", "brix"], by="net", within=["site", "block"])
        frame = m.to_frame()
        assert len(frame) == 2 * 6 * 2
        for _, row in frame.iterrows():
            part = df[(df.site == row["site"]) & (df.block == row["block"])]
            r = part.tinfer.two_sample(row["metric"], by="net")
            assert_row_matches(row, r)
            assert row["n_a"] == r.groups[0].n and row["n_b"] == r.groups[1].n

    def test_pooled_and_groups_order(self):
        """pooled=True and groups=(second, first) match two_sample with the same options."""
        df = orchard(seed=3)
        m = df.tinfer.compare(
            "brix",
            by="net",
            within="site",
            groups=("open", "netted"),
            pooled=True,
            side="upper",
            level=0.9,
        )
        assert m.comparison == "open minus netted"
        for _, row in m.to_frame().iterrows():
            r = df[df.site == row["site"]].tinfer.two_sample(
                "brix", by="net", groups=("open", "netted"), pooled=True, side="upper", level=0.9
            )
            assert_row_matches(row, r)

    def test_holm_adjustment_over_family(self):
        """p_adjusted is Holm over all rows (slow formula from Holm 1979 in the test)."""
        df = orchard(seed=5)
        m = df.tinfer.compare(["mass_g", "brix"], by="net", within="site", adjust="holm")
        p = np.asarray(m.p)
        mm = p.size
        order = np.argsort(p, kind="stable")
        expected = np.empty(mm)
        running = 0.0
        for rank, i in enumerate(order, start=1):
            running = max(running, min(1.0, (mm - rank + 1) * p[i]))
            expected[i] = running
        np.testing.assert_allclose(m.p_adjusted, expected, rtol=1e-12)
        np.testing.assert_array_equal(m.discovery, expected <= 0.05)

    def test_bh_adjustment_matches_scipy(self):
        """With adjust='bh', p_adjusted equals scipy.stats.false_discovery_control."""
        df = orchard(seed=6)
        m = df.tinfer.compare("mass_g", by="net", within=["site", "block"], adjust="bh")
        np.testing.assert_allclose(
            m.p_adjusted, stats.false_discovery_control(m.p, method="bh"), rtol=1e-12
        )

    def test_integer_keys_and_third_level(self):
        """Integer segment codes work, and rows of a third level of by are left out."""
        rng = np.random.default_rng(2)
        n = 600
        df = pd.DataFrame(
            {"seg": rng.integers(5, 25, n), "arm": rng.integers(0, 3, n), "y": rng.normal(0, 1, n)}
        )
        m = df.tinfer.compare("y", by="arm", within="seg", groups=(2, 0))
        assert m.labels == ("2", "0")
        frame = m.to_frame()
        assert frame["seg"].tolist() == sorted(df.seg.unique().tolist())
        for _, row in frame.iterrows():
            r = df[df.seg == row["seg"]].tinfer.two_sample("y", by="arm", groups=(2, 0))
            assert_row_matches(row, r)

    def test_small_segments_warn_and_give_nan(self):
        """A segment with one value in an arm gets NaN results and a warning, not an error."""
        df = orchard(seed=8)
        tiny = pd.DataFrame(
            {
                "site": "zz",
                "block": "east",
                "net": ["netted", "open", "open"],
                "mass_g": [170.0, 171.0, 175.0],
                "brix": [11.0, 12.0, 13.0],
            }
        )
        df = pd.concat([df, tiny], ignore_index=True)
        with pytest.warns(SmallSegmentWarning, match="could not be tested"):
            m = df.tinfer.compare("mass_g", by="net", within="site")
        frame = m.to_frame().set_index("site")
        assert np.isnan(frame.loc["zz", "p"]) and np.isnan(frame.loc["zz", "p_adjusted"])
        assert not frame.loc["zz", "discovery"]
        assert m.n_tests == 6 and m.n_rows == 7
        assert any("could not be tested" in w for w in m.warnings)

    def test_no_spread_segment(self):
        """Equal values in both arms of a segment: NaN results and a warning."""
        df = pd.DataFrame(
            {
                "g": ["a"] * 4 + ["b"] * 4,
                "arm": ["x", "x", "y", "y"] * 2,
                "v": [1.0, 1.0, 1.0, 1.0, 1.0, 2.0, 3.0, 5.0],
            }
        )
        with pytest.warns(SmallSegmentWarning):
            m = df.tinfer.compare("v", by="arm", within="g")
        assert np.isnan(m.t[0]) and np.isfinite(m.t[1])

    def test_numacc_large_means(self):
        """Values near 1e9 with unit noise: estimate, t and df equal the exact two-pass answer."""
        df = big_mean_frame()
        m = df.tinfer.compare("w", by="arm", within="seg")
        expected = exact_welch(df)
        np.testing.assert_allclose(m.mean_a, expected[:, 3], rtol=2e-16)
        np.testing.assert_allclose(m.mean_b, expected[:, 4], rtol=2e-16)
        np.testing.assert_allclose(m.estimate, expected[:, 0], rtol=1e-12)
        np.testing.assert_allclose(m.t, expected[:, 1], rtol=1e-10)
        np.testing.assert_allclose(m.df, expected[:, 2], rtol=1e-10)

    def test_bad_parameters(self):
        """Bad adjust, rate or by give ParameterError or DataError with the usual message."""
        df = orchard()
        with pytest.raises(ParameterError, match="'adjust' parameter of compare"):
            df.tinfer.compare("brix", by="net", adjust="fdr")
        with pytest.raises(ParameterError, match="'rate' parameter of compare"):
            df.tinfer.compare("brix", by="net", rate=5)
        with pytest.raises(DataError, match="exactly two"):
            df.tinfer.compare("brix", by="site")
        with pytest.raises(DataError, match="no column"):
            df.tinfer.compare("brixx", by="net")


def big_mean_frame() -> pd.DataFrame:
    """Invented: weights near 1e9 units with unit noise, and NumAcc4-like 1e7 + 0.1 steps."""
    rng = np.random.default_rng(11)
    parts = []
    for seg, base in enumerate([1e9, 1e9 + 3, 2e9]):
        for arm, shift in (("p", 0.0), ("q", 0.7)):
            parts.append(
                pd.DataFrame({"seg": seg, "arm": arm, "w": base + shift + rng.normal(0, 1, 60)})
            )
    num = 1e7 + np.tile([0.2, 0.1, 0.3], 20)  # NumAcc4-like pattern
    parts.append(pd.DataFrame({"seg": 3, "arm": "p", "w": num}))
    parts.append(pd.DataFrame({"seg": 3, "arm": "q", "w": num[::-1] + 0.1}))
    return pd.concat(parts, ignore_index=True)


def exact_welch(df: pd.DataFrame) -> np.ndarray:
    """(estimate, t, df, mean_a, mean_b) per segment from exact rational two-pass summaries,
    with Welch's statistic and Satterthwaite's df (Welch 1947; Satterthwaite 1946)."""
    out = []
    for seg in sorted(df.seg.unique()):
        sums = []
        for arm in ("p", "q"):
            xs = [Fraction(float(v)) for v in df.w[(df.seg == seg) & (df.arm == arm)]]
            n = len(xs)
            mean = sum(xs) / n
            var = sum((x - mean) ** 2 for x in xs) / (n - 1)
            sums.append((n, mean, var))
        (na, ma, va), (nb, mb, vb) = sums
        se2 = va / na + vb / nb
        dfw = se2**2 / ((va / na) ** 2 / (na - 1) + (vb / nb) ** 2 / (nb - 1))
        est = float(ma - mb)  # the exact difference of the exact means
        out.append((est, est / float(se2) ** 0.5, float(dfw), float(ma), float(mb)))
    return np.array(out)


# ---------------------------------------------------------------- compare (one sample, paired)
class TestCompareOneSampleAndPaired:
    def test_one_sample_equals_one_at_a_time(self):
        """No by: each segment's mean against null equals df.tinfer.one_sample (1e-12)."""
        df = orchard(seed=4)
        m = df.tinfer.compare(["mass_g", "brix"], within="block", null=12.0)
        assert m.design == "one-sample"
        for _, row in m.to_frame().iterrows():
            r = df[df.block == row["block"]].tinfer.one_sample(row["metric"], null=12.0)
            assert_row_matches(row, r)
            assert row["n"] == r.groups[0].n

    def test_paired_equals_one_at_a_time(self):
        """paired=(first, second) equals df.tinfer.paired per segment (1e-12)."""
        rng = np.random.default_rng(9)
        df = pd.DataFrame(
            {"bench": np.repeat(["b1", "b2", "b3"], 12), "before": rng.normal(20, 2, 36)}
        )
        df["after"] = df.before - rng.normal(0.5, 1.0, 36)
        df.loc[5, "after"] = np.nan
        m = df.tinfer.compare(paired=("before", "after"), within="bench")
        assert m.design == "paired" and m.metrics == ("before minus after",)
        for _, row in m.to_frame().iterrows():
            r = df[df.bench == row["bench"]].tinfer.paired("before", "after")
            assert_row_matches(row, r)

    def test_no_within_is_one_segment(self):
        """Without within there is one segment per metric, labelled 'all rows'."""
        df = orchard()
        m = df.tinfer.compare(["brix", "mass_g"], by="net")
        assert m.n_rows == 2 and m.segments == ((),)
        assert m.segment_labels() == ["all rows", "all rows"]


# ---------------------------------------------------------------- compare_summaries
class TestCompareSummaries:
    def test_group_of_one_with_missing_sd_is_untestable(self):
        """A group of one has no SD (pandas std gives NaN): that segment is NaN, not an error."""
        table = pd.DataFrame(
            {
                "seg": [1, 2, 3],
                "n_a": [10, 1, 12],
                "mean_a": [1.0, 2.0, 3.0],
                "sd_a": [1.0, np.nan, 1.2],
                "n_b": [10, 9, 12],
                "mean_b": [0.5, 1.0, 2.0],
                "sd_b": [1.0, 1.0, 1.0],
            }
        )
        with pytest.warns(SmallSegmentWarning):
            m = tinfer.compare_summaries(table, within="seg")
        frame = m.to_frame().set_index("seg")
        assert np.isnan(frame.loc[2, "p"])
        # reference: scipy's Welch test from the same summaries (reference library)
        ref = stats.ttest_ind_from_stats(3.0, 1.2, 12, 2.0, 1.0, 12, equal_var=False)
        assert frame.loc[3, "p"] == pytest.approx(ref.pvalue, rel=1e-12)
        table.loc[0, "sd_a"] = np.nan
        with pytest.raises(
            tinfer.DataError, match=r"sd_a.*finite, non-negative number; row 0 holds nan"
        ):
            tinfer.compare_summaries(table, within="seg")

    def test_round_trip_of_to_frame(self):
        """The table from to_frame() gives the same tests back through compare_summaries."""
        df = orchard(seed=12)
        m = df.tinfer.compare(["mass_g", "brix"], by="net", within=["site", "block"])
        back = tinfer.compare_summaries(m.to_frame(), labels=m.labels)
        for name in ("estimate", "t", "df", "p", "ci_low", "ci_high", "effect"):
            np.testing.assert_allclose(getattr(back, name), getattr(m, name), rtol=1e-12)

    def test_sql_like_long_table(self):
        """A GROUP BY-style long table (site, arm, n, mean, sd) matches from_summary per row."""
        table = pd.DataFrame(
            {
                "site": ["n1", "n1", "n2", "n2"],
                "arm": ["new", "old", "new", "old"],
                "n": [12, 15, 20, 18],
                "mean": [5.1, 4.3, 7.4, 7.1],
                "sd": [1.2, 1.5, 2.0, 1.9],
            }
        )
        m = tinfer.compare_summaries(table, within="site", arm="arm", adjust="by")
        assert m.comparison == "new minus old"
        r1 = tinfer.from_summary(n=(12, 15), mean=(5.1, 4.3), sd=(1.2, 1.5))
        # t = 1.5396 on 25.0 df: Welch statistic, checked by hand (from memory of the docs).
        np.testing.assert_allclose(m.t[0], r1.t, rtol=1e-12)
        np.testing.assert_allclose(m.t[0], 1.5396, atol=5e-5)
        np.testing.assert_allclose(
            m.p_adjusted, stats.false_discovery_control(m.p, method="by"), rtol=1e-12
        )

    def test_one_sample_table_against_scipy(self):
        """One-sample rows (n, mean, sd) match scipy.stats.ttest_1samp on invented samples."""
        rng = np.random.default_rng(4)
        samples = {f"lot{i}": rng.normal(10 + i / 4, 1, 15) for i in range(4)}
        table = pd.DataFrame(
            {
                "lot": list(samples),
                "n": [15] * 4,
                "mean": [v.mean() for v in samples.values()],
                "sd": [v.std(ddof=1) for v in samples.values()],
            }
        )
        m = tinfer.compare_summaries(table, null=10.0)
        for i, v in enumerate(samples.values()):
            ref = stats.ttest_1samp(v, 10.0)
            np.testing.assert_allclose(m.t[i], ref.statistic, rtol=1e-12)
            np.testing.assert_allclose(m.p[i], ref.pvalue, rtol=1e-10)

    def test_numacc_summaries(self):
        """Exact double-double summaries of the 1e9 and NumAcc4-like data give the exact answer."""
        df = big_mean_frame()
        rows = []
        for seg in sorted(df.seg.unique()):
            row = {"seg": seg}
            for arm, suffix in (("p", "_a"), ("q", "_b")):
                xs = [Fraction(float(v)) for v in df.w[(df.seg == seg) & (df.arm == arm)]]
                mean = sum(xs) / len(xs)
                row[f"n{suffix}"] = len(xs)
                row[f"mean{suffix}"] = float(mean)
                row[f"mean_lo{suffix}"] = float(mean - Fraction(float(mean)))  # low part
                row[f"ssd{suffix}"] = float(sum((x - mean) ** 2 for x in xs))
            rows.append(row)
        m = tinfer.compare_summaries(pd.DataFrame(rows), labels=("p", "q"))
        expected = exact_welch(df)
        np.testing.assert_allclose(m.estimate, expected[:, 0], rtol=1e-12)
        np.testing.assert_allclose(m.t, expected[:, 1], rtol=1e-10)
        np.testing.assert_allclose(m.df, expected[:, 2], rtol=1e-10)

    def test_duplicate_rows_rejected(self):
        """Two rows for the same segment raise a DataError asking to aggregate first."""
        table = pd.DataFrame({"g": ["x", "x"], "n": [5, 6], "mean": [1.0, 2.0], "sd": [1, 1]})
        with pytest.raises(DataError, match="aggregate"):
            tinfer.compare_summaries(table)


# ---------------------------------------------------------------- BatchResult display
class TestBatchResultDisplay:
    def test_card_escapes_and_counts(self):
        """The HTML card escapes user strings, uses tinfer- classes and no script."""
        df = orchard().rename(columns={"site": "<site>", "brix": "<b>brix"})
        m = df.tinfer.compare("<b>brix", by="net", within="<site>")
        bundle = m._repr_mimebundle_()
        page = bundle["text/html"]
        assert "&lt;b&gt;brix" in page and "<b>brix" not in page
        assert "&lt;site&gt;" in page
        assert "<script" not in page.lower()
        assert '<div class="tinfer-card">' in page
        assert f"{m.n_tests} comparisons tested" in bundle["text/plain"]

    def test_card_lists_small_segment_warning(self):
        """The card shows the note about segments too small to test."""
        df = pd.DataFrame(
            {
                "g": ["a"] * 4 + ["b"] * 3,
                "arm": ["x", "x", "y", "y", "x", "y", "y"],
                "v": [1.0, 2.0, 3.0, 5.0, 1.0, 2.0, 4.0],
            }
        )
        with pytest.warns(SmallSegmentWarning):
            m = df.tinfer.compare("v", by="arm", within="g")
        assert "could not be tested" in m._repr_mimebundle_()["text/html"]
        assert "1 comparison tested" in str(m)

    def test_chart_small_for_many_segments(self):
        """The forest plot spec of 10,000 segments stays under 100 KB and shows top rows."""
        m = many_segments(10_000)
        spec = m.chart(top=30).to_dict()
        text = json.dumps(spec)
        assert len(text) < 100_000
        assert len(inline_rows(spec, "row")) == 30
        hist = json.dumps(m.p_histogram(bins=20).to_dict())
        assert len(hist) < 20_000

    def test_chart_marks_discoveries(self):
        """Discoveries and the rest get two distinct colours, and rows carry their status."""
        m = many_segments(300)
        spec = m.chart(top=50).to_dict()
        scales = [
            layer["encoding"]["color"]["scale"]
            for layer in spec["layer"]
            if "color" in layer.get("encoding", {})
        ]
        assert scales and scales[0]["domain"] == ["discovery", "not a discovery"]
        assert len(set(scales[0]["range"])) == 2
        rows = inline_rows(spec, "status")
        top_hits = int(m.discovery[np.argsort(m.p)[:50]].sum())
        assert sum(r["status"] == "discovery" for r in rows) == top_hits

    def test_chart_pages(self):
        """page=k shows the k-th block of rows in p order; an out-of-range page is refused."""
        m = many_segments(95)
        spec = m.chart(top=40, page=3).to_dict()
        rows = inline_rows(spec, "row")
        assert len(rows) == 15 and rows[0]["row"].startswith("81.")
        with pytest.raises(ParameterError, match="'page' parameter"):
            m.chart(top=40, page=4)

    def test_chart_one_panel_per_metric(self):
        """Several metrics get one forest panel each, holding only that metric's rows."""
        m = orchard().tinfer.compare(["mass_g", "brix"], by="net", within="site")
        spec = m.chart(top=4).to_dict()
        assert len(spec["vconcat"]) == 2
        frame = m.to_frame()
        for panel, metric in zip(spec["vconcat"], ("mass_g", "brix"), strict=True):
            rows = inline_rows(panel, "row")
            assert len(rows) == 4
            mine = frame[frame["metric"] == metric]
            assert {r["estimate"] for r in rows} <= set(mine["estimate"].tolist())
            assert panel["title"]["text"].startswith(f"{metric}:")

    def test_p_histogram_counts(self):
        """The histogram holds numpy's bin counts of the testable p-values."""
        m = many_segments(500)
        spec = m.p_histogram(bins=10).to_dict()
        rows = inline_rows(spec, "count")
        expected, _ = np.histogram(m.p, bins=10, range=(0, 1))
        assert [r["count"] for r in rows] == expected.tolist()

    def test_result_is_frozen(self):
        """BatchResult fields and arrays cannot be changed."""
        m = many_segments(5)
        with pytest.raises(AttributeError):
            m.rate = 0.1  # type: ignore[misc]
        with pytest.raises(ValueError):
            m.p[0] = 0.0
        assert isinstance(m, BatchResult)


def inline_rows(spec, field: str) -> list[dict]:
    """The first inline data list (in 'datasets' or any 'values') whose rows have ``field``."""
    found: list[list] = []

    def walk(node):
        if isinstance(node, dict):
            for key, val in node.items():
                if key in ("values", "datasets") and isinstance(val, list | dict):
                    lists = val.values() if isinstance(val, dict) else [val]
                    found.extend(v for v in lists if v and isinstance(v[0], dict))
                walk(val)
        elif isinstance(node, list):
            for v in node:
                walk(v)

    walk(spec)
    return next(v for v in found if field in v[0])


def many_segments(k: int) -> BatchResult:
    """k invented segments from summaries, a tenth of them with a real difference."""
    rng = np.random.default_rng(k)
    table = pd.DataFrame(
        {
            "store": np.arange(k),
            "n_a": 30,
            "n_b": 30,
            "mean_a": rng.normal(0, 0.25, k) + np.where(np.arange(k) % 10 == 0, 1.0, 0.0),
            "mean_b": rng.normal(0, 0.25, k),
            "sd_a": 1.0,
            "sd_b": 1.0,
        }
    )
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        return tinfer.compare_summaries(table, labels=("promo", "control"), adjust="bh")


def test_public_names():
    """The batch names are public and listed in tinfer.__all__."""
    assert {"BatchResult", "SmallSegmentWarning", "compare_summaries"} <= set(tinfer.__all__)
    assert tinfer.BatchResult is BatchResult
