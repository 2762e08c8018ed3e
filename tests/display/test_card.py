"""HTML cards: the numbers, the words, escaping of every user string, the text fallback.

Expected numbers come from scipy.stats (ttest_ind, ttest_1samp, t) and numpy, formatted by
the documented rules (p: three significant digits, tinfer/_format.py; estimates: decimals
that show the SE to two significant digits, common practice, no source). The data are
invented: drying times (minutes) of glaze on tiles from two kilns.
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
from tinfer import MissingDependencyError
from tinfer.display import charts, ttest
from tinfer.display import tdist as tdist_display

KILN_A = [41.2, 38.7, 44.1, 40.3, 39.8, 42.6, 43.9, 37.5, 41.7, 40.9, 45.2]
KILN_B = [36.4, 38.1, 35.2, 39.9, 37.3, 34.8, 38.6, 36.9, 35.7, 37.8, 39.1, 36.2]
SCRIPT = "<script>alert(1)</script>"


def _frame(value="dry_min", a="north", b="south", missing_b=0) -> pd.DataFrame:
    vb = KILN_B + [math.nan] * missing_b
    return pd.DataFrame({value: KILN_A + vb, "kiln": [a] * len(KILN_A) + [b] * len(vb)})


def _decimals(se: float) -> int:
    """Decimals showing the SE to two significant digits (common practice, no source)."""
    return max(1 - math.floor(math.log10(se)), 0)


def _fallback(page: str) -> str:
    (text,) = re.findall(r'<pre class="tinfer-text-fallback">(.*?)</pre>', page, flags=re.S)
    return html.unescape(text)


def _m(text: str) -> str:
    """Our rule for printed numbers: a real minus sign (U+2212)."""
    return text.replace("-", "\u2212")


def _cell(page: str, label: str) -> str:
    """The value cell next to a row label of the figures table, tags removed."""
    key = re.escape(html.escape(label))
    m = re.search(rf"<th scope=\"row\">{key}</th><td>(.*?)</td>", page)
    assert m, label
    return html.unescape(re.sub(r"<[^>]+>", "", m.group(1)))


@pytest.fixture(scope="module")
def kilns():
    r = _frame().tinfer.two_sample("dry_min", by="kiln")
    return r, ttest.result_card(r, chart=False)


# ---------------------------------------------------------------------------- result_card
def test_card_numbers_match_scipy(kilns):
    """Estimate, CI, t, df and p in the card equal scipy's Welch test, formatted by our rules."""
    _, page = kilns
    ref = stats.ttest_ind(KILN_A, KILN_B, equal_var=False)
    ci = ref.confidence_interval(0.95)
    va, vb = np.var(KILN_A, ddof=1) / 11, np.var(KILN_B, ddof=1) / 12
    se = math.sqrt(va + vb)
    d = _decimals(se)
    est = np.mean(KILN_A) - np.mean(KILN_B)
    df = (va + vb) ** 2 / (va**2 / 10 + vb**2 / 11)  # Welch-Satterthwaite
    assert _cell(page, "Estimate").startswith(_m(f"{est:.{d}f}"))
    assert _cell(page, "95% CI") == _m(f"{ci.low:.{d}f} to {ci.high:.{d}f}")
    assert _cell(page, "t") == _m(f"{ref.statistic:.3f} on {df:.2f} df")
    assert _cell(page, "p-value, two-sided") == _m(f"{ref.pvalue:.2e}")


def test_card_effect_size(kilns):
    """Hedges' g in the card is within 0.002 of d * (1 - 3 / (4 m - 1)) (Hedges 1981)."""
    _, page = kilns
    m = 11 + 12 - 2
    sp = math.sqrt((10 * np.var(KILN_A, ddof=1) + 11 * np.var(KILN_B, ddof=1)) / m)
    g = (np.mean(KILN_A) - np.mean(KILN_B)) / sp * (1 - 3 / (4 * m - 1))
    shown = float(_cell(page, "Effect size, Hedges' g").split()[0])
    assert shown == pytest.approx(g, abs=2e-3)
    assert "95% CI" in _cell(page, "Effect size, Hedges' g")


def test_card_group_descriptives(kilns):
    """Each group's n, mean and SD appear in its row (reference: numpy)."""
    _, page = kilns
    d = _decimals(math.sqrt(np.var(KILN_A, ddof=1) / 11 + np.var(KILN_B, ddof=1) / 12))
    for label, xs in (("north", KILN_A), ("south", KILN_B)):
        row = re.search(rf'<tr><th scope="row">{label}</th>(.*?)</tr>', page).group(1)
        cells = re.findall(r"<td[^>]*>(.*?)</td>", row)
        assert cells[0] == str(len(xs))
        assert cells[2] == f"{np.mean(xs):.{d}f}"
        assert cells[3] == f"{np.std(xs, ddof=1):.{d}f}"


def test_card_headline_question_provenance(kilns):
    """Headline, the question tested, version, time, settings and fingerprint are in the card."""
    r, page = kilns
    assert html.escape(r.headline()) in page
    assert html.escape("Question tested: " + r.question()) in page
    assert "differ between north and south? Two-sided, at the 5% level." in r.question()
    assert f"tinfer {tinfer.__version__}" in page
    assert f'datetime="{r.created}"' in page
    assert r.fingerprint in page
    for word in ("level 95%", "side two-sided", "variances not pooled (Welch)"):
        assert word in page


def test_footer_lists_only_settings_that_apply():
    """A one-sample card names no pooling; a margin card names its band, not a side."""
    one = ttest.result_card(pd.DataFrame({"m": KILN_A}).tinfer.one_sample("m", null=40), False)
    assert "pooled" not in one.split('class="tinfer-provenance"')[1]
    eq = tinfer.from_summary(n=30, mean=0.2, sd=1.0, margin=0.8)
    foot = ttest.result_card(eq, chart=False).split('class="tinfer-provenance"')[1]
    assert "band −0.80 to 0.80" in foot and "<span>side" not in foot


def test_text_fallback_holds_str(kilns):
    """The hidden <pre> holds exactly str(result), and the rich part starts hidden inline."""
    r, page = kilns
    assert _fallback(page) == str(r)
    assert '<div class="tinfer-rich" style="display:none">' in page


def test_no_javascript_and_no_ids():
    """No script element, event handler, javascript: URL or id attribute, chart included."""
    r = _frame().tinfer.two_sample("dry_min", by="kiln")
    page = ttest.result_card(r)
    assert "<svg" in page
    low = page.lower()
    assert "<script" not in low and "javascript:" not in low
    assert not re.search(r"\son[a-z]+\s*=", low)
    assert not re.search(r"\sid\s*=", low)


def test_user_strings_escaped():
    """A column named <x> and a group named like a script tag appear escaped, never raw."""
    df = _frame(value="<x>", a=SCRIPT)
    r = df.tinfer.two_sample("<x>", by="kiln")
    page = ttest.result_card(r)  # chart included: its SVG must be safe too
    assert "<x>" not in page and "<script" not in page
    assert "&lt;x&gt;" in page
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in page


def test_units_and_labels_escaped():
    """Units and labels from published numbers are escaped as well."""
    r = tinfer.from_summary(
        n=(11, 12),
        mean=(41.5, 37.2),
        sd=(2.3, 1.6),
        labels=("<i>north</i>", "south & co"),
        variable='say "hi"',
        units="<b>min</b>",
    )
    page = ttest.result_card(r, chart=False)
    assert "<i>" not in page and "<b>" not in page
    assert "&lt;b&gt;min&lt;/b&gt;" in page and "south &amp; co" in page
    assert "say &quot;hi&quot;" in page


def test_missing_counts_in_footer():
    """Dropped missing values are counted per group in the notes."""
    r = _frame(missing_b=2).tinfer.two_sample("dry_min", by="kiln")
    page = ttest.result_card(r, chart=False)
    assert "Missing values dropped before the test: south: 2." in page
    clean = ttest.result_card(_frame().tinfer.two_sample("dry_min", by="kiln"), chart=False)
    assert "No missing values were dropped." in clean


def test_underflowing_p_never_zero():
    """A p below double precision reads 'below 1e-300', never 0 (rule in _format.py)."""
    r = tinfer.from_summary(n=1000, mean=100.0, sd=1.0, null=0.0)
    # reference: scipy's t.sf also underflows to exactly 0 here
    assert stats.t.sf(r.t, 999) == 0.0
    page = ttest.result_card(r, chart=False)
    assert _cell(page, "p-value, two-sided") == "below 1e-300"


def test_one_sided_interval_words():
    """An 'upper' test shows its one-sided bound and an open interval (reference: scipy)."""
    r = pd.DataFrame({"dry_min": KILN_A}).tinfer.one_sample("dry_min", null=40.0, side="upper")
    ref = stats.ttest_1samp(KILN_A, 40.0, alternative="greater")
    d = _decimals(np.std(KILN_A, ddof=1) / math.sqrt(11))
    page = ttest.result_card(r, chart=False)
    assert _cell(page, "95% lower bound") == f"{ref.confidence_interval(0.95).low:.{d}f}"
    assert _cell(page, "p-value, one-sided (upper)") == f"{ref.pvalue:#.3g}"


def test_chart_embedded_as_svg():
    """With the display extras, the card carries one inline SVG inside .tinfer-chart."""
    pytest.importorskip("vl_convert")
    page = ttest.result_card(_frame().tinfer.two_sample("dry_min", by="kiln"))
    assert page.count("<svg") == 1
    assert re.search(r'<div class="tinfer-chart" role="img" aria-label="[^"]+"><svg', page)


def test_missing_chart_dependency_keeps_card(monkeypatch):
    """If vl-convert is missing, the card says how to install it and keeps the numbers."""

    def missing(spec):
        raise MissingDependencyError("install vl-convert-python")

    monkeypatch.setattr(charts, "to_svg", missing)
    page = ttest.result_card(_frame().tinfer.two_sample("dry_min", by="kiln"))
    assert "tinfer-missing-chart" in page and "install vl-convert-python" in page
    assert "<svg" not in page and "p-value" in page


# ---------------------------------------------------------------------------- tdist_card
def test_tdist_card_area_and_percentiles():
    """Area and percentiles in the t-distribution card equal scipy's (reference: scipy)."""
    page = tdist_display.tdist_card(tinfer.tdist(12).show(low=-1.0, high=2.0), chart=False)
    area = stats.t.cdf(2.0, 12) - stats.t.cdf(-1.0, 12)
    assert _cell(page, "area P(\u22121 < T < 2)") == f"{area:#.3g}"
    assert _cell(page, "2.5% percentile") == _m(f"{stats.t.ppf(0.025, 12):.4f}")
    assert _cell(page, "97.5% percentile") == f"{stats.t.ppf(0.975, 12):.4f}"


@pytest.mark.parametrize(
    ("df", "mean", "variance"),
    [
        (1.0, "undefined", "undefined"),  # Cauchy: no mean (textbook fact, from memory)
        (1.5, "0", "infinite"),  # 1 < df <= 2: mean 0, variance infinite (from memory)
        (5.0, "0", f"{5 / 3:.4f}"),  # df / (df - 2) for df > 2 (scipy: stats.t.var(5))
    ],
)
def test_tdist_card_moments_with_conditions(df, mean, variance):
    """Mean and variance are stated with their df conditions."""
    if df == 5.0:
        assert stats.t.var(5.0) == pytest.approx(5 / 3)
    page = tdist_display.tdist_card(tinfer.tdist(df).show(), chart=False)
    assert _cell(page, "mean").startswith(mean)
    assert _cell(page, "variance").startswith(variance)
    assert "df &gt; 1" in page and "df &gt; 2" in page


def test_tdist_card_fallback_and_no_area():
    """Without bounds there is no area row; the fallback holds str(view)."""
    view = tinfer.tdist(8).show()
    page = tdist_display.tdist_card(view, chart=False)
    assert "area P(" not in page
    assert _fallback(page) == str(view)


def test_tdist_show_rejects_reversed_bounds():
    """show(low > high) raises a ValueError."""
    with pytest.raises(ValueError):
        tinfer.tdist(5).show(low=2.0, high=1.0)
