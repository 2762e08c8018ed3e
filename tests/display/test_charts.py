"""Charts of results and of the t distribution: layers, areas, critical values, size, SVG.

Reference values come from scipy.stats (t.sf, t.ppf, ttest_ind, ttest_1samp) and numpy's
trapezoid rule, never from tinfer. The data are invented: drying times (minutes) of glaze
on test tiles fired in two kilns, and fill weights (g) of honey jars.
"""

from __future__ import annotations

import json
import math
import socket
import sys

import numpy as np
import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import stats

import tinfer
from tinfer import MissingDependencyError
from tinfer.display import charts, density, ttest
from tinfer.display import tdist as tdist_display

alt = pytest.importorskip("altair")
pytest.importorskip("vl_convert")

KILN_A = [41.2, 38.7, 44.1, 40.3, 39.8, 42.6, 43.9, 37.5, 41.7, 40.9, 45.2]
KILN_B = [36.4, 38.1, 35.2, 39.9, 37.3, 34.8, 38.6, 36.9, 35.7, 37.8, 39.1, 36.2]
HONEY = [452.1, 449.6, 451.3, 450.8, 453.0, 448.9, 451.7, 450.2, 452.4, 449.8]


def _kilns(**opts) -> tinfer.TResult:
    df = pd.DataFrame(
        {"dry_min": KILN_A + KILN_B, "kiln": ["north"] * len(KILN_A) + ["south"] * len(KILN_B)}
    )
    return df.tinfer.two_sample("dry_min", by="kiln", **opts)


def _honey(**opts) -> tinfer.TResult:
    return pd.DataFrame({"fill_g": HONEY}).tinfer.one_sample("fill_g", **opts)


def _layers(panel: dict, description: str) -> list[dict]:
    return [layer for layer in panel["layer"] if layer.get("description") == description]


def _shaded_area(panel: dict) -> float:
    """Trapezoid integral of the density rows inside each shaded layer's filter range."""
    rows = panel["data"]["values"]
    x = np.array([r["x"] for r in rows])
    y = np.array([r["dens"] for r in rows])
    total = 0.0
    for layer in _layers(panel, "shaded area"):
        lo, hi = layer["transform"][0]["filter"]["range"]
        keep = (x >= lo) & (x <= hi)
        xs, ys = x[keep], y[keep]  # the trapezoid rule, written out (numpy 1.26 has no trapezoid)
        total += float(np.sum((ys[1:] + ys[:-1]) * np.diff(xs)) / 2.0)
    return total


# ---------------------------------------------------------------------------- result_spec
def test_result_spec_layers_two_sided():
    """Two-sided: one shaded layer per tail, the t curve, the normal curve, t and critical marks."""
    top, bottom = ttest.result_spec(_kilns())["vconcat"]
    names = [layer["description"] for layer in top["layer"]]
    assert names.count("shaded area") == 2
    for name in ("t density", "standard normal", "observed", "critical"):
        assert name in names
    assert [layer["description"] for layer in bottom["layer"]][:3] == [
        "null",
        "interval",
        "estimate",
    ]


def test_result_spec_one_tail_for_one_sided():
    """'upper' and 'lower' shade a single tail, on the matching side of the observed t."""
    for side in ("upper", "lower"):
        r = _honey(null=450.0, side=side)
        top = ttest.result_spec(r)["vconcat"][0]
        (shade,) = _layers(top, "shaded area")
        lo, hi = shade["transform"][0]["filter"]["range"]
        t = stats.ttest_1samp(HONEY, 450.0, alternative="greater" if side == "upper" else "less")
        if side == "upper":
            assert lo == pytest.approx(t.statistic) and hi > lo
        else:
            assert hi == pytest.approx(t.statistic) and lo < hi


def test_normal_reference_optional():
    """normal=False drops the dashed standard normal curve."""
    top = ttest.result_spec(_kilns(), normal=False)["vconcat"][0]
    assert not _layers(top, "standard normal")


def test_shaded_area_integrates_to_p_two_sided():
    """Trapezoid over the shaded grid rows ≈ scipy's two-sided Welch p (reference: scipy)."""
    ref = stats.ttest_ind(KILN_A, KILN_B, equal_var=False)
    top = ttest.result_spec(_kilns())["vconcat"][0]
    L = top["layer"][0]["encoding"]["x"]["scale"]["domain"][1]
    df = float(
        (np.var(KILN_A, ddof=1) / 11 + np.var(KILN_B, ddof=1) / 12) ** 2
        / ((np.var(KILN_A, ddof=1) / 11) ** 2 / 10 + (np.var(KILN_B, ddof=1) / 12) ** 2 / 11)
    )
    t = abs(float(ref.statistic))
    # the shaded part stops at the plot edge L; off-grid mass is 2 * P(T > L)
    on_grid = 2 * (stats.t.sf(t, df) - stats.t.sf(L, df))
    area = _shaded_area(top)
    assert area == pytest.approx(on_grid, rel=2e-3, abs=1e-6)
    assert area == pytest.approx(ref.pvalue, abs=2 * stats.t.sf(L, df) + 1e-5)


def test_shaded_area_integrates_to_p_one_sided():
    """One tail: trapezoid ≈ scipy's one-sided one-sample p (reference: scipy)."""
    r = _honey(null=450.5, side="upper")
    ref = stats.ttest_1samp(HONEY, 450.5, alternative="greater")
    top = ttest.result_spec(r)["vconcat"][0]
    L = top["layer"][0]["encoding"]["x"]["scale"]["domain"][1]
    area = _shaded_area(top)
    assert area == pytest.approx(ref.pvalue, rel=2e-3, abs=stats.t.sf(L, 9) + 1e-6)


@settings(max_examples=30, deadline=None)
@given(
    n=st.integers(2, 400),
    shift=st.floats(-30.0, 30.0),
    side=st.sampled_from(["two-sided", "upper", "lower"]),
)
def test_shaded_area_matches_tail_over_grid(n, shift, side):
    """For any n, t and side, the shaded trapezoid equals scipy's tail mass inside the range."""
    r = tinfer.from_summary(n=n, mean=shift, sd=math.sqrt(n), null=0.0, side=side)
    top = ttest.result_spec(r)["vconcat"][0]
    L = top["layer"][0]["encoding"]["x"]["scale"]["domain"][1]
    t, df = shift, n - 1  # se = sd / sqrt(n) = 1, so t equals the shift (exact by design)
    a = min(max(t, -L), L)
    if side == "two-sided":
        a = abs(a)
        ref = 2 * (stats.t.sf(a, df) - stats.t.sf(L, df))
    elif side == "upper":
        ref = stats.t.sf(a, df) - stats.t.sf(L, df)
    else:
        ref = stats.t.cdf(a, df) - stats.t.cdf(-L, df)
    assert _shaded_area(top) == pytest.approx(ref, rel=5e-3, abs=2e-5)


@pytest.mark.parametrize(
    ("side", "level", "q"),
    [("two-sided", 0.95, [0.025, 0.975]), ("upper", 0.9, [0.9]), ("lower", 0.99, [0.01])],
)
def test_critical_values_match_scipy(side, level, q):
    """Critical marks carry scipy.stats.t.ppf at the result's df (reference: scipy)."""
    r = _honey(null=450.0, side=side, level=level)
    top = ttest.result_spec(r)["vconcat"][0]
    (crit,) = _layers(top, "critical")
    values = sorted(m["value"] for m in crit["data"]["values"])
    assert values == pytest.approx(sorted(stats.t.ppf(q, len(HONEY) - 1)), rel=1e-10)


def test_observed_t_marked():
    """The observed-t mark holds scipy's t statistic and a label with it (reference: scipy)."""
    ref = stats.ttest_ind(KILN_A, KILN_B, equal_var=False)
    top = ttest.result_spec(_kilns())["vconcat"][0]
    (obs,) = _layers(top, "observed")
    (mark,) = obs["data"]["values"]
    assert mark["value"] == pytest.approx(ref.statistic, rel=1e-10)
    assert f"{ref.statistic:.2f}" in mark["label"]


def test_fixed_grid_size():
    """The density has 401 grid points plus at most the two inserted tail starts."""
    top = ttest.result_spec(_kilns())["vconcat"][0]
    assert density.GRID_POINTS <= len(top["data"]["values"]) <= density.GRID_POINTS + 2


def test_spec_size_independent_of_n():
    """n = 10 and n = 1,000,000 give specs under 30 KB of equal row counts and near-equal size."""
    rng = np.random.default_rng(20261201)
    sizes, rows = [], []
    for n in (10, 1_000_000):
        df = pd.DataFrame({"fill_g": rng.normal(450.0, 2.0, n)})
        r = df.tinfer.one_sample("fill_g", null=450.1)
        spec = r.chart().to_dict(validate=False)
        text = json.dumps(spec)
        sizes.append(len(text))
        rows.append(sum(len(d) for d in spec.get("datasets", {}).values()))
        assert len(text) < 30_000
    # the grid has 401 points either way; the few more are the marked values (observed t,
    # critical values) and their label rows, which depend on where t falls, not on n
    assert 401 <= min(rows) and rows[0] == pytest.approx(rows[1], abs=8)
    assert abs(sizes[0] - sizes[1]) < 1_000


def test_no_raw_data_in_spec():
    """None of the observations appears in the chart spec."""
    text = json.dumps(_kilns().chart().to_dict(validate=False))
    for v in KILN_A + KILN_B:
        assert str(v) not in text


def test_one_sided_interval_reaches_panel_edge():
    """An 'upper' interval is drawn from its bound to the panel edge and ends in a triangle."""
    r = _honey(null=450.0, side="upper")
    bottom = ttest.result_spec(r)["vconcat"][1]
    (row,) = bottom["data"]["values"]
    domain = bottom["layer"][0]["encoding"]["x"]["scale"]["domain"]
    ref = stats.ttest_1samp(HONEY, 450.0, alternative="greater").confidence_interval(0.95)
    assert row["lo"] == pytest.approx(ref.low, rel=1e-10)
    assert row["hi"] == domain[1]
    (end,) = _layers(bottom, "open end")
    assert end["mark"]["shape"] == "triangle-right"


def test_underflowing_p_still_drawn():
    """A p below 1e-300 keeps both tail layers and marks t at the edge with an arrow."""
    r = tinfer.from_summary(n=1000, mean=100.0, sd=1.0, null=0.0)
    top = ttest.result_spec(r)["vconcat"][0]
    assert len(_layers(top, "shaded area")) == 2
    (obs,) = _layers(top, "observed")
    (mark,) = obs["data"]["values"]
    L = top["layer"][0]["encoding"]["x"]["scale"]["domain"][1]
    assert mark["pos"] == L and mark["label"].endswith("→")
    assert "below 1e-300" in " ".join(top["title"]["subtitle"])


def test_result_chart_is_valid_altair():
    """chart() returns an Altair VConcatChart whose dict passes Altair's schema validation."""
    ch = _kilns().chart()
    assert isinstance(ch, alt.VConcatChart)
    ch.to_dict(validate=True)


# ---------------------------------------------------------------------------- tdist_spec
def test_tdist_area_integrates_to_scipy():
    """tdist(7).chart(low=-1, high=2): shaded trapezoid ≈ scipy t.cdf(2) - t.cdf(-1)."""
    spec = tinfer.tdist(7).chart(low=-1.0, high=2.0).to_dict(validate=False)
    spec["data"] = {"values": next(iter(spec["datasets"].values()))}
    ref = stats.t.cdf(2.0, 7) - stats.t.cdf(-1.0, 7)
    assert _shaded_area(spec) == pytest.approx(ref, rel=1e-3)


def test_tdist_percentiles_match_scipy():
    """Percentile marks carry scipy.stats.t.ppf values (reference: scipy)."""
    spec = tdist_display.tdist_spec(tinfer.tdist(4.5), percentiles=(0.05, 0.5, 0.99))
    (marks,) = _layers(spec, "percentile")
    values = [m["value"] for m in marks["data"]["values"]]
    assert values == pytest.approx(stats.t.ppf([0.05, 0.5, 0.99], 4.5), rel=1e-10, abs=1e-12)


def test_tdist_upper_tail_and_normal():
    """low only: one shaded layer from low to the edge; the normal curve is there for df < ∞."""
    spec = tdist_display.tdist_spec(tinfer.tdist(3), low=1.5)
    (shade,) = _layers(spec, "shaded area")
    lo, hi = shade["transform"][0]["filter"]["range"]
    assert lo == 1.5 and hi == spec["layer"][0]["encoding"]["x"]["scale"]["domain"][1]
    assert _layers(spec, "standard normal")
    assert not _layers(tdist_display.tdist_spec(tinfer.tdist(float("inf"))), "standard normal")


def test_tdist_chart_returns_layer_chart():
    """TDistribution.chart returns an Altair LayerChart that validates."""
    ch = tinfer.tdist(12).chart(high=-2.0)
    assert isinstance(ch, alt.LayerChart)
    ch.to_dict(validate=True)


# ---------------------------------------------------------------------------- to_svg
def test_svg_renders_without_network(monkeypatch):
    """With socket creation disabled, the SVG still renders and asks for no web fonts."""

    def refuse(*args, **kwargs):
        raise OSError("network disabled in this test")

    monkeypatch.setattr(socket, "socket", refuse)
    monkeypatch.setattr(socket, "create_connection", refuse)
    svg = charts.to_svg(ttest.result_spec(_kilns()))
    assert svg.startswith("<svg") and svg.rstrip().endswith("</svg>")
    low = svg.lower()
    assert "@font-face" not in low and "url(http" not in low and "@import" not in low
    assert 'href="http' not in low


def test_svg_cache_is_bounded():
    """Rendered SVGs are kept in an LRU of fixed size; a repeat render returns the same text."""
    assert charts._svg.cache_info().maxsize == charts.SVG_CACHE_SIZE == 16
    spec = tdist_display.tdist_spec(tinfer.tdist(6), high=-1.0)
    assert charts.to_svg(spec) is charts.to_svg(spec)
    for df in range(2, 2 + 2 * charts.SVG_CACHE_SIZE):
        charts.to_svg(tdist_display.tdist_spec(tinfer.tdist(df), percentiles=()))
    assert charts._svg.cache_info().currsize <= charts.SVG_CACHE_SIZE


def test_svg_escapes_labels():
    """A group named like a script tag reaches the SVG as escaped text only."""
    df = pd.DataFrame({"v": KILN_A + KILN_B, "g": ["<script>a</script>"] * 11 + ["b"] * 12})
    svg = charts.to_svg(ttest.result_spec(df.tinfer.two_sample("v", by="g")))
    assert "<script" not in svg and "&lt;script&gt;" in svg


# ---------------------------------------------------------------------------- dependencies
def test_missing_altair_message(monkeypatch):
    """Without altair, chart() raises MissingDependencyError (an ImportError) naming the fix."""
    monkeypatch.setitem(sys.modules, "altair", None)
    with pytest.raises(MissingDependencyError, match=r"pip install 'tinfer\[display\]'"):
        _kilns().chart()
    with pytest.raises(ImportError):
        tinfer.tdist(3).chart()


def test_missing_vl_convert_message(monkeypatch):
    """Without vl-convert, to_svg raises MissingDependencyError naming the package."""
    monkeypatch.setitem(sys.modules, "vl_convert", None)
    charts._svg.cache_clear()
    with pytest.raises(MissingDependencyError, match="vl-convert-python"):
        charts.to_svg(tdist_display.tdist_spec(tinfer.tdist(3)))
