"""Nothing a user types can end the Python process or hide the answer.

Hostile labels (every control character, line breaks, noncharacters, markup, very long
text) in every place a label reaches a result, and data at the edges (n of 0 to 2, no
spread, ties, NaN, infinities, magnitudes from 1e-300 to 1e308): building a result and every
output it has either works (perhaps with a card whose chart could not be drawn) or raises a
TinferError. The corpus runs in a subprocess, so that an abort of the chart renderer fails
this test instead of ending the run. Which inputs broke renderers is the project's own
finding (common practice, no source); the data are invented.
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from hostile_support import outcome, places, render_everything
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from strategies import degenerate_samples, labels

import tinfer
from tinfer.display import charts

HERE = Path(__file__).parent
FAST = settings(
    max_examples=25,
    deadline=None,
    derandomize=True,
    suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large],
)
ALLOWED = {"result", "degraded", "clear error"}


# ---------------------------------------------------------------------------- the corpus
def test_corpus_in_a_subprocess():
    """Every nasty character and label, in every place, in a process of its own: it must
    exit normally and sort every case into result, degraded card or clear error."""
    done = subprocess.run(
        [sys.executable, "hostile_support.py"],
        cwd=HERE,
        capture_output=True,
        text=True,
        timeout=600,
    )
    assert done.returncode == 0, done.stderr[-2000:]
    report = json.loads(done.stdout.strip().splitlines()[-1])
    assert not report["bugs"], report["bugs"]
    assert set(report["counts"]) <= ALLOWED
    assert sum(report["counts"].values()) >= 150


@FAST
@given(label=labels(), place=st.sampled_from(list(places("x"))))
def test_any_label_in_any_place(label, place):
    """Any Unicode label, in any place, gives a result or a clear error, never a bug."""
    assert outcome(places(label)[place], deep=False) in ALLOWED


@FAST
@given(x=degenerate_samples(), null=st.sampled_from([0.0, 1.0, 1e12]))
def test_degenerate_one_sample(x, null):
    """One sample at the edges: a result (and every check of it) or a clear error."""
    df = pd.DataFrame({"v": x})
    assert outcome(lambda: df.tinfer.one_sample("v", null=null)) in ALLOWED


@FAST
@given(a=degenerate_samples(), b=degenerate_samples())
def test_degenerate_two_samples(a, b):
    """Two samples at the edges, Welch and Yuen: a result or a clear error."""
    df = pd.DataFrame({"v": np.r_[a, b], "g": ["a"] * a.size + ["b"] * b.size})
    assert outcome(lambda: df.tinfer.two_sample("v", by="g")) in ALLOWED
    assert outcome(lambda: df.tinfer.two_sample("v", by="g", trim=0.2), deep=False) in ALLOWED


@FAST
@given(a=degenerate_samples(min_size=0, max_size=6), b=degenerate_samples(0, 6))
def test_degenerate_batches(a, b):
    """A batch whose segments sit at the edges: a result with NaN rows or a clear error."""
    df = pd.DataFrame(
        {"v": np.r_[a, b], "arm": (["x", "y"] * 10)[: a.size + b.size], "s": ["p"] * a.size
         + ["q"] * b.size}
    )  # fmt: skip
    assert outcome(lambda: df.tinfer.compare("v", by="arm", within="s"), deep=False) in ALLOWED


# ---------------------------------------------------------------------------- item 1 and 2
KG = [5.2, 4.8, 6.1, 4.1, 4.4, 3.9]


@pytest.mark.parametrize("level", ["fur\x0brow", "fur\x00row", "fur\ufffero w"])
def test_control_character_in_a_level_draws_the_chart(level):
    """A vertical tab (pasted from a spreadsheet) or NUL in a level: the card has its chart,
    the label shows as a control picture in the SVG and escaped in the HTML."""
    df = pd.DataFrame({"kg": KG, "plot": ["drip"] * 3 + [level] * 3})
    r = df.tinfer.two_sample("kg", by="plot")
    page = r._repr_mimebundle_()["text/html"]
    assert "<svg" in page and "could not be drawn" not in page
    assert "\x0b" not in page and "\x00" not in page
    svg = charts.to_svg(r.chart())
    assert "fur" in svg and "\x0b" not in svg


@pytest.mark.parametrize("brk", ["\n", "\r", "\u2028"])
def test_line_break_in_a_level_keeps_the_card(brk):
    """A line break in a level: to_html, the bundle and explore() all keep card and chart."""
    df = pd.DataFrame({"kg": KG, "plot": ["drip"] * 3 + [f"fur{brk}row"] * 3})
    r = df.tinfer.two_sample("kg", by="plot")
    for page in (r.to_html(), r._repr_mimebundle_()["text/html"], r.explore().view.value):
        assert "<svg" in page and "could not be drawn" not in page
    assert "fur\u2424row" in charts.to_svg(r.chart())


def test_a_failing_chart_leaves_one_quiet_line(monkeypatch):
    """Whatever breaks the renderer, the card keeps every number and says so in one line,
    without the renderer's trace or addresses."""

    def broken(spec):
        raise ValueError("Error: parse\n    at l (https://cdn.example/vega.js:1:2)")

    monkeypatch.setattr(charts, "to_svg", broken)
    r = pd.DataFrame({"kg": KG}).tinfer.one_sample("kg", null=4.5)
    page = r.to_html()
    assert "The chart could not be drawn (ValueError)" in page
    assert "https://" not in page and "at l (" not in page
    assert f"{r.t:.3f}" in page


# ---------------------------------------------------------------------------- item 3
def test_bootstrap_of_a_group_without_spread_displays():
    """A group with no spread (n = 3) makes most resamples degenerate: the check still shows,
    and says the bootstrap cannot check the t interval."""
    d = pd.DataFrame({"x": [1.0, 1, 1, 1, 2, 3], "g": list("aaabbb")})
    b = d.tinfer.two_sample("x", by="g").bootstrap(n_resamples=199, seed=1)
    assert "unbounded" in b.verdict and not render_everything(b)


# ---------------------------------------------------------------------------- item 4
def _table() -> pd.DataFrame:
    return pd.DataFrame(
        {"site": ["north", "south"], "n_a": [12, 20], "mean_a": [5.1, 7.4], "sd_a": [1.2, 2.0],
         "n_b": [15, 18], "mean_b": [4.3, 7.1], "sd_b": [1.5, 1.9]}
    )  # fmt: skip


@pytest.mark.parametrize(
    ("change", "message"),
    [
        ({"ssd_a": [15.8, 76.0]}, "both 'sd_a' and 'ssd_a'"),
        ({"sd_a": [-1.2, 2.0]}, "'sd_a' .* finite, non-negative number; row 0 holds -1.2"),
        ({"n_a": [12.5, 20]}, "'n_a' .* whole count of at least 0; row 0 holds 12.5"),
        ({"mean_b": [4.3, np.inf]}, "'mean_b' .* finite number; row 1 holds inf"),
    ],
)
def test_summary_tables_are_validated(change, message):
    """compare_summaries refuses what from_summary refuses, naming the column and row."""
    with pytest.raises(tinfer.DataError, match=message):
        tinfer.compare_summaries(_table().assign(**change))


@pytest.mark.parametrize(
    ("kw", "name", "rule"),
    [
        ({"n": 12.5}, "n", "whole count of at least 1"),
        ({"sd": -1.0}, "sd", "finite, non-negative number"),
        ({"mean": np.inf}, "mean", "finite number"),
    ],
)
def test_from_summary_shares_the_rules(kw, name, rule):
    """from_summary words the same rules in its parameter message."""
    args = {"n": 12, "mean": 5.1, "sd": 1.2} | kw
    with pytest.raises(tinfer.ParameterError, match=f"'{name}' parameter .* must be a {rule}"):
        tinfer.from_summary(**args)


def test_round_trip_with_an_empty_arm():
    """compare_summaries(result.to_frame()) works when a segment has an empty arm."""
    df = pd.DataFrame(
        {"v": [1.0, 2, 4, 3, 5, 6, 8, 7], "arm": list("aabbaaaa"), "s": list("xxxxyyyy")}
    )
    with pytest.warns(tinfer.SmallSegmentWarning):
        first = df.tinfer.compare("v", by="arm", within="s")
        again = tinfer.compare_summaries(first.to_frame())
    np.testing.assert_array_equal(first.t, again.t)
    assert np.isnan(again.t[1])


# ---------------------------------------------------------------------------- item 5
def test_numpy_scalars_are_numbers():
    """level=np.float32(.95) and pooled=np.True_ are accepted, as the user typed them."""
    r = tinfer.from_summary(n=(9, 11), mean=(1.0, 2.0), sd=(1.0, 1.2),
                            level=np.float32(0.95), pooled=np.True_)  # fmt: skip
    assert r.level == 0.95 and r.pooled is True


def test_messages_show_plain_numbers():
    """A refused numpy value reads as a person writes it: 3, not np.int64(3)."""
    with pytest.raises(tinfer.ParameterError, match=r"Got 3 instead"):
        tinfer.from_summary(n=10, mean=1.0, sd=1.0, level=np.int64(3))


def test_a_series_instead_of_a_label():
    """Passing the column instead of its name says to pass the name, without printing it."""
    df = pd.DataFrame({"kg": KG * 100})
    with pytest.raises(tinfer.DataError, match=r"not a Series .*Pass the column's name") as e:
        df.tinfer.one_sample(df["kg"])
    assert len(str(e.value)) < 300


def test_levels_that_read_alike_stay_distinct():
    """Levels 1 and "1" read 1 minus '1', in a single test and in a batch."""
    df = pd.DataFrame({"kg": KG, "plot": [1, 1, 1, "1", "1", "1"]})
    assert df.tinfer.two_sample("kg", by="plot").comparison == "1 minus '1'"
    assert df.tinfer.compare("kg", by="plot").comparison == "1 minus '1'"


def test_complex_values_are_refused():
    """A complex column is refused, not silently stripped of its imaginary part."""
    with pytest.raises(tinfer.DataError, match="complex numbers"):
        pd.DataFrame({"z": [1 + 1j, 2, 3]}).tinfer.one_sample("z")


def test_unhashable_group_labels():
    """Lists in a group column give a clear error that says how to convert them."""
    df = pd.DataFrame({"kg": KG, "plot": [[1]] * 3 + [[2]] * 3})
    for run in (lambda: df.tinfer.two_sample("kg", by="plot"),
                lambda: df.tinfer.compare("kg", by="plot")):  # fmt: skip
        with pytest.raises(tinfer.DataError, match="cannot label groups"):
            run()


@pytest.mark.parametrize("within", ["plot", "kg"])
def test_a_column_in_two_roles(within):
    """compare refuses a segment column that is also the group or a value column."""
    df = pd.DataFrame({"kg": KG, "plot": list("ababab")})
    with pytest.raises(tinfer.ParameterError, match="is also"):
        df.tinfer.compare("kg", by="plot", within=within)


def test_values_near_the_top_of_double_precision(recwarn):
    """Values near 1e308 give the clear error, and numpy prints no RuntimeWarning first."""
    with pytest.raises(tinfer.DataError, match="too large for double precision"):
        pd.DataFrame({"x": [1e308, -1e308, 1e308]}).tinfer.one_sample("x")
    assert not [w for w in recwarn if issubclass(w.category, RuntimeWarning)]


def test_one_number_rule_for_the_t_distribution():
    """tdist refuses text and NaN bounds, as every other number parameter does."""
    for bad in (lambda: tinfer.tdist("5"), lambda: tinfer.tdist(5).area(low=np.nan),
                lambda: tinfer.tdist(5).percentile("0.5")):  # fmt: skip
        with pytest.raises(tinfer.ParameterError):
            bad()


def test_a_very_long_label_keeps_charts_narrow():
    """A 10,000-character level is shortened in the chart; the card wraps it."""
    df = pd.DataFrame({"kg": KG, "plot": ["drip"] * 3 + ["x" * 10_000] * 3})
    r = df.tinfer.two_sample("kg", by="plot")
    svg = charts.to_svg(r.chart())
    width = float(svg.split('width="', 1)[1].split('"', 1)[0])
    assert width < 800 and "x" * 100 not in svg


@pytest.mark.parametrize(("kw", "attr"), [({"level": 0.9999}, "level"), ({"level": 0.3}, "level")])
def test_explorer_starts_at_the_results_own_level(kw, attr):
    """A level beyond the slider's usual range widens it instead of being clamped."""
    r = tinfer.from_summary(n=20, mean=10.4, sd=1.5, null=10, **kw)
    ex = r.explore()
    assert getattr(ex, attr).value == kw[attr] and ex.result.level == kw[attr]


def test_trim_beyond_the_slider_range():
    """A trim of 0.49 is shown as 0.49, not clamped to the slider's 0.45."""
    ex = pd.DataFrame({"x": np.arange(20.0) ** 1.5}).tinfer.one_sample("x", trim=0.49).explore()
    assert ex.trim.value == 0.49


def test_interval_far_from_the_null():
    """null=1e12 on data near 10: the interval keeps every digit (reference: scipy.stats)."""
    from scipy import stats

    x = [9.8, 10.4, 10.1, 9.7, 10.6]
    r = pd.DataFrame({"x": x}).tinfer.one_sample("x", null=1e12)
    ref = stats.ttest_1samp(x, 1e12).confidence_interval(0.95)  # reference library
    assert r.ci == pytest.approx((ref.low, ref.high), rel=1e-13)
    m = pd.DataFrame({"x": x, "s": "a"}).tinfer.compare("x", within="s", null=1e12)
    assert (m.ci_low[0], m.ci_high[0]) == pytest.approx((ref.low, ref.high), rel=1e-13)
