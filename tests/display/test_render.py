"""The Jupyter display protocol: bundles for every displayable object, and graceful failure.

The data are invented: weights (g) of loaves from one bakery oven, checked against 800 g.
"""

from __future__ import annotations

import subprocess
import sys

import pandas as pd
import pytest

import tinfer
from tinfer.display import render
from tinfer.display.html import css

LOAVES = [803.1, 797.4, 801.8, 799.2, 805.6, 798.9, 802.2, 800.7, 796.5, 804.0]


def _result() -> tinfer.TResult:
    return pd.DataFrame({"loaf_g": LOAVES}).tinfer.one_sample("loaf_g", null=800.0)


# ---------------------------------------------------------------------------- mimebundle
@pytest.mark.parametrize(
    "make",
    [_result, lambda: tinfer.tdist(9), lambda: tinfer.tdist(9).show(low=1.0)],
    ids=["result", "tdist", "tdist-view"],
)
def test_bundle_has_text_and_card(make):
    """text/plain is str(obj); text/html is a tinfer card with the stylesheet inlined once."""
    obj = make()
    bundle = obj._repr_mimebundle_()
    assert set(bundle) == {"text/plain", "text/html"}
    assert bundle["text/plain"] == str(obj)
    page = bundle["text/html"]
    assert page.startswith('<div class="tinfer-card"><style>')
    assert page.count("<style>") == 1 and css() in page
    assert "<script" not in page.lower()


def test_bundle_falls_back_to_text(monkeypatch):
    """A failing card gives a RuntimeWarning and a bundle with the plain text only."""

    def broken(result, chart=True):
        raise KeyError("boom")

    monkeypatch.setattr(render, "card", broken)
    r = _result()
    with pytest.warns(RuntimeWarning, match="could not build the HTML card"):
        bundle = render.mimebundle(r)
    assert bundle == {"text/plain": str(r)}


# ---------------------------------------------------------------------------- html
def test_html_without_chart():
    """html(obj, chart=False) leaves the SVG out and keeps the numbers."""
    page = render.html(_result(), chart=False)
    assert "<svg" not in page and "p-value" in page


def test_html_rejects_unknown_objects():
    """Objects with no card raise TypeError naming their type."""
    with pytest.raises(TypeError, match="int"):
        render.html(3)


def test_to_html_matches_render():
    """TResult.to_html equals the card the notebook shows (chart left out for speed)."""
    r = _result()
    a = r.to_html(chart=False)
    b = render.html(r, chart=False)
    assert a == b


def test_each_render_is_independent():
    """Two renders of the same result are equal: no counters or ids leak between cards."""
    r = _result()
    assert render.html(r) == render.html(r)


# ---------------------------------------------------------------------------- laziness
def test_display_modules_load_on_demand():
    """import tinfer loads no display module; a card with its SVG needs vl-convert, not altair."""
    code = (
        "import sys, tinfer\n"
        "mods = ('altair', 'vl_convert', 'tinfer.display.ttest')\n"
        "before = {m for m in mods if m in sys.modules}\n"
        "r = tinfer.from_summary(n=12, mean=5.4, sd=1.1, null=5.0)\n"
        "page = r._repr_mimebundle_()['text/html']\n"
        "print(sorted(before), 'altair' in sys.modules, '<svg' in page)\n"
    )
    out = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, check=True, timeout=120
    )
    assert out.stdout.split("\n")[0] == "[] False True"
