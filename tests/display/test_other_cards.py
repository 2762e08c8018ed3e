"""The cards of plans, batches, assumption checks and bootstrap checks share the result card's
skeleton: packaged stylesheet, text fallback, escaped strings, one inline SVG chart.

Expected numbers come from scipy.stats (nct, ttest_ind, ttest_1samp, skew, shapiro) and
numpy; the rules for the HTML (no script, no id, escaped labels, prefixed classes) are
common practice, no source. The data are invented: rise of bread dough (mm) in bakery
branches under an old and a new recipe, and drying times (minutes) of glaze in two kilns.
"""

from __future__ import annotations

import html
import math
import re

import numpy as np
import pandas as pd
import pytest
from scipy import stats

import tinfer
from tinfer import MissingDependencyError, PlanResult
from tinfer.display import batch, bootstrap, charts, diagnostics, plan
from tinfer.display.html import css

SCRIPT = "<script>alert(1)</script>"
KILN_A = [41.2, 38.7, 44.1, 40.3, 39.8, 42.6, 43.9, 37.5, 41.7, 40.9, 45.2]
KILN_B = [36.4, 38.1, 35.2, 39.9, 37.3, 34.8, 38.6, 36.9, 35.7, 37.8, 39.1, 36.2, 47.5]
CSS_CLASSES = set(re.findall(r"\.(tinfer-[\w-]+)", css()))
MAX_BYTES = 150_000


# ---------------------------------------------------------------------------- shared checks
def _fallback(page: str) -> str:
    (text,) = re.findall(r'<pre class="tinfer-text-fallback">(.*?)</pre>', page, flags=re.S)
    return html.unescape(text)


def _classes(page: str) -> set[str]:
    return {c for attr in re.findall(r'class="([^"]*)"', page) for c in attr.split()}


def _skeleton(page: str, obj) -> None:
    """The checks every card passes (common practice, no source)."""
    assert page.startswith('<div class="tinfer-card"><style>')
    assert "<script" not in page.lower()
    assert not re.search(r"\sid\s*=", page)
    assert _fallback(page) == str(obj)
    assert '<div class="tinfer-rich" style="display:none">' in page
    for part in ("tinfer-kicker", "tinfer-headline", "tinfer-provenance"):
        assert f'class="{part}"' in page, part
    assert _classes(page) <= CSS_CLASSES, _classes(page) - CSS_CLASSES
    assert page.count("<svg") == 1 and page.count("</svg>") == 1
    assert "tinfer-missing-chart" not in page.split("</style>", 1)[1]


def _escaped(page: str, *labels: str) -> None:
    for label in labels:
        assert label not in page, label
        assert html.escape(label) in page, label


@pytest.fixture(scope="module")
def bakery() -> pd.DataFrame:
    rng = np.random.default_rng(5)
    rows = []
    for i, branch in enumerate([SCRIPT, "<x>", "harbour", "mill", "station", "square"]):
        for recipe, shift in (("old recipe", 0.0), ("new recipe", 1.6 * (i % 2))):
            rows += [(branch, recipe, round(v, 2)) for v in rng.normal(20 + shift, 1.0, 12)]
    return pd.DataFrame(rows, columns=["branch", "recipe", "rise_mm"])


@pytest.fixture(scope="module")
def kilns() -> pd.DataFrame:
    return pd.DataFrame(
        {SCRIPT: KILN_A + KILN_B, "kiln": ["<x>"] * len(KILN_A) + ["south"] * len(KILN_B)}
    )


def _power(n: int, d: float) -> float:
    """Two-sided two-sample t power at n per group, alpha 0.05 (scipy's noncentral t)."""
    df = 2 * n - 2
    crit = stats.t.isf(0.025, df)
    ncp = d * math.sqrt(n / 2)
    return stats.nct.sf(crit, df, ncp) + stats.nct.cdf(-crit, df, ncp)


# ---------------------------------------------------------------------------- plan_card
class TestPlanCard:
    def test_skeleton_and_numbers(self):
        """A sample-size plan's card has the shared skeleton and scipy's n and power."""
        n = next(k for k in range(2, 500) if _power(k, 0.5) >= 0.8)
        assert n == 64  # also Cohen's power tables for d = 0.5, power 0.80 (from memory)
        p = tinfer.plan("two-sample", effect=0.5, power=0.8)
        page = plan.plan_card(p)
        _skeleton(page, p)
        text = _fallback(page)
        assert f"{n} per group" in text and f"{_power(n, 0.5):.3f}" in text
        assert "Study plan" in page and "tinfer-figures" in page

    def test_grid_table_and_chart(self):
        """A grid of plans gets a table with one row per point and one SVG of the curves."""
        p = tinfer.plan("paired", effect=[0.3, 0.5, 0.8], power=0.9)
        page = plan.plan_card(p)
        _skeleton(page, p)
        body = page.split('class="tinfer-table"', 1)[1].split("</table>", 1)[0]
        assert body.count("<tr>") == 1 + 3  # header row and one per grid point

    def test_long_grid_is_cut(self):
        """A grid of 200 points shows 20 rows, says how many are left out, and draws no chart."""
        p = tinfer.plan("one-sample", effect=np.linspace(0.2, 1.2, 200), power=0.8)
        page = plan.plan_card(p)
        assert "180 more grid point(s) not shown" in page
        assert f"more than {plan.GRID_CHART_MAX} grid points" in page and "<svg" not in page
        assert page.split('class="tinfer-table"', 1)[1].split("</table>")[0].count("<tr>") == 21
        assert len(page.encode()) < MAX_BYTES

    def test_escapes_strings(self):
        """A method named like a script tag is shown escaped in the card and its fallback."""
        p = tinfer.plan("paired", effect=0.5, power=0.8)
        fake = PlanResult(**{**p.to_dict(), "method": SCRIPT + "<x>"})
        page = plan.plan_card(fake)
        _escaped(page, SCRIPT, "<x>")
        _skeleton(page, fake)

    def test_mimebundle_uses_the_card(self):
        """PlanResult's bundle carries this card."""
        p = tinfer.plan("paired", effect=0.5, power=0.8)
        assert p._repr_mimebundle_()["text/html"] == plan.plan_card(p)

    def test_provenance_lists_inputs(self):
        """The provenance line names tinfer's version and the plan's inputs."""
        p = tinfer.plan("two-sample", diff=2.0, sd=4.0, n=30, ratio=2)
        prov = plan.plan_card(p, chart=False).split('class="tinfer-provenance"', 1)[1]
        for word in (
            f"tinfer {tinfer.__version__}",
            "group sizes 2 in the second per 1 in the first",
            "SD 4",
            "solved for power",
        ):
            assert word in html.unescape(re.sub(r"<[^>]+>", "", prov)), word


# ---------------------------------------------------------------------------- html_card
class TestBatchCard:
    def test_skeleton_escaping_and_numbers(self, bakery):
        """The batch card has the skeleton, escapes segments and shows scipy's smallest p."""
        m = bakery.tinfer.compare("rise_mm", by="recipe", within="branch")
        page = batch.html_card(m)
        _skeleton(page, m)
        _escaped(page, SCRIPT, "<x>")
        ps = {}
        for branch, g in bakery.groupby("branch"):
            new = g.loc[g.recipe == "new recipe", "rise_mm"]
            old = g.loc[g.recipe == "old recipe", "rise_mm"]
            ps[branch] = stats.ttest_ind(new, old, equal_var=False).pvalue
        p = np.array(sorted(ps.values()))
        # Holm's step-down (Holm 1979): reject while p_(i) <= rate / (m - i + 1)
        k = len(p)
        ok = p <= 0.05 / (k - np.arange(k))
        hits = int(np.argmin(ok)) if not ok.all() else k
        assert f"{k} comparisons tested; {hits} discoveries" in _fallback(page)
        assert f"{p[0]:.2e}".replace("-", "\u2212") in _fallback(page)  # a real minus
        assert hits > 0 and page.count('<tr class="tinfer-hit">') == hits

    def test_many_segments_stay_small(self):
        """With 10,000 segments the card stays under 150 KB and draws at most 15 rows."""
        rng = np.random.default_rng(11)
        k = 10_000
        table = pd.DataFrame(
            {
                "store": [f"store {i:05d}" for i in range(k)],
                "n_a": 30,
                "mean_a": rng.normal(50, 2, k),
                "sd_a": 8.0,
                "n_b": 30,
                "mean_b": rng.normal(50, 2, k),
                "sd_b": 8.0,
            }
        )
        m = tinfer.compare_summaries(table, within="store")
        page = batch.html_card(m)
        assert len(page.encode()) < MAX_BYTES
        svg = page.split("<svg", 1)[1]
        assert len(set(re.findall(r"store \d{5}", svg))) <= 15
        _skeleton(page, m)


# ---------------------------------------------------------------------------- diagnostics_card
class TestDiagnosticsCard:
    def test_skeleton_escaping_and_numbers(self, kilns):
        """The checks card escapes labels and shows scipy's G1 and Shapiro-Wilk p."""
        d = kilns.tinfer.two_sample(SCRIPT, by="kiln").check()
        page = diagnostics.diagnostics_card(d)
        _skeleton(page, d)
        _escaped(page, SCRIPT, "<x>")
        text = _fallback(page)
        for values in (KILN_A, KILN_B):
            skew = stats.skew(values, bias=False)
            assert (
                f"skewness G1 {0.0 if abs(skew) < 0.005 else skew:.2f}".replace("-", "\u2212")
                in text
            )
            assert f"p = {stats.shapiro(values).pvalue:.3g}" in text
        assert html.escape(d.advice) in page

    def test_large_n_stays_small(self):
        """With 300,000 values the card (Q-Q and box plot included) stays under 150 KB."""
        rng = np.random.default_rng(9)
        df = pd.DataFrame({"v": rng.lognormal(size=300_000), "g": ["a", "b"] * 150_000})
        d = df.tinfer.two_sample("v", by="g").check()
        page = diagnostics.diagnostics_card(d)
        assert len(page.encode()) < MAX_BYTES
        _skeleton(page, d)


# ---------------------------------------------------------------------------- bootstrap_card
class TestBootstrapCard:
    def test_skeleton_escaping_and_numbers(self, kilns):
        """The bootstrap card escapes labels and shows scipy's t interval."""
        b = kilns.tinfer.one_sample(SCRIPT, null=40).bootstrap(999, seed=3)
        page = bootstrap.bootstrap_card(b)
        _skeleton(page, b)
        _escaped(page, SCRIPT)
        ci = stats.ttest_1samp(KILN_A + KILN_B, 40).confidence_interval(0.95)
        d = b.decimals
        assert f"[{ci.low:.{d}f}, {ci.high:.{d}f}]".replace("-", "\u2212") in _fallback(page)
        assert html.escape(b.verdict) in page

    def test_large_n_stays_small(self):
        """With 300,000 values the card stays under 150 KB (the histogram is binned)."""
        rng = np.random.default_rng(4)
        df = pd.DataFrame({"v": rng.lognormal(size=300_000), "g": ["a", "b"] * 150_000})
        b = df.tinfer.two_sample("v", by="g").bootstrap(199, seed=1)
        page = bootstrap.bootstrap_card(b)
        assert len(page.encode()) < MAX_BYTES
        _skeleton(page, b)


# ---------------------------------------------------------------------------- charts missing
def test_missing_chart_extras_leave_a_note(monkeypatch, kilns):
    """Without vl-convert every card still builds, with a note in place of the SVG."""

    def no_svg(_):
        raise MissingDependencyError("Rendering charts to SVG needs vl-convert-python.")

    monkeypatch.setattr(charts, "to_svg", no_svg)
    r = kilns.tinfer.two_sample(SCRIPT, by="kiln")
    pages = [
        plan.plan_card(tinfer.plan("paired", effect=0.5, power=0.8)),
        batch.html_card(kilns.assign(seg="a").tinfer.compare(SCRIPT, by="kiln", within="seg")),
        diagnostics.diagnostics_card(r.check()),
        bootstrap.bootstrap_card(r.bootstrap(199, seed=2)),
    ]
    for page in pages:
        assert "<svg" not in page
        assert 'tinfer-missing-chart">Rendering charts to SVG needs' in page


def test_card_spec_recolours_named_colours_only():
    """card_spec turns 'black' marks into the palette ink but leaves data values alone."""
    spec = {
        "data": {"values": [{"colour": "black"}]},
        "layer": [{"mark": {"type": "rule", "color": "black"}, "title": "black"}],
    }
    out = charts.card_spec(spec)
    assert out["layer"][0]["mark"]["color"] == charts.INK
    assert out["layer"][0]["title"] == "black"
    assert out["data"]["values"][0]["colour"] == "black"
    assert out["config"]["aria"] is False


# ---------------------------------------------------------------------------- render.html
def test_render_html_passes_chart_flag(kilns, bakery):
    """render.html builds each of these cards, with the chart or without it on request."""
    from tinfer.display.render import html as render_html

    r = kilns.tinfer.two_sample(SCRIPT, by="kiln")
    objs = [
        tinfer.plan("paired", effect=0.5, power=0.8),
        bakery.tinfer.compare("rise_mm", by="recipe", within="branch"),
        r.check(),
        r.bootstrap(199, seed=5),
    ]
    for obj in objs:
        assert render_html(obj, chart=False).count("<svg") == 0
        assert render_html(obj) == obj._repr_mimebundle_()["text/html"]
