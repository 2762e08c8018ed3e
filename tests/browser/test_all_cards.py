"""One card of every result type on one page, in headless Chromium, light and dark.

Uses Debian's /usr/bin/chromium through playwright (see tests/browser_support.py); requests
other than file:// are aborted, so the page is checked offline. Labels look like script tags:
the browser must show them as text and no dialog may open. Screenshots go to
``test-output/``. The data are invented: drying times (minutes) of glaze in two kilns and the
rise of bread dough (mm) in bakery branches under two recipes.
"""

from __future__ import annotations

import re
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from browser_support import OUTPUT, launch, open_offline, require_chromium

import tinfer
from tinfer.display.render import html

pytestmark = require_chromium()

SCRIPT = "<script>alert(1)</script>"
KILN_A = [41.2, 38.7, 44.1, 40.3, 39.8, 42.6, 43.9, 37.5, 41.7, 40.9, 45.2]
KILN_B = [36.4, 38.1, 35.2, 39.9, 37.3, 34.8, 38.6, 36.9, 35.7, 37.8, 39.1, 36.2, 47.5]
KINDS = (
    "result",
    "equivalence",
    "t distribution",
    "plan",
    "plan grid",
    "batch",
    "checks",
    "bootstrap",
    "bayes factor",
    "pairwise",
    "against a control",
)


def _objects() -> dict[str, object]:
    kilns = pd.DataFrame(
        {SCRIPT: KILN_A + KILN_B, "kiln": ["north"] * len(KILN_A) + ["<x>"] * len(KILN_B)}
    )
    r = kilns.tinfer.two_sample(SCRIPT, by="kiln")
    rng = np.random.default_rng(5)
    rows = []
    for i, branch in enumerate([SCRIPT, "<x>", "harbour", "mill", "station", "square"]):
        for recipe, shift in (("old recipe", 0.0), ("new recipe", 1.6 * (i % 2))):
            rise = rng.normal(20 + shift, 1.0, 12)
            crust = rng.normal(3.0 - 0.1 * shift, 0.4, 12)
            rows += [
                (branch, recipe, round(a, 2), round(c, 2)) for a, c in zip(rise, crust, strict=True)
            ]
    bakery = pd.DataFrame(rows, columns=["branch", "recipe", "rise_mm", "crust_mm"])
    # ten invented glaze recipes: 45 pairs, the most the pairwise chart is made for
    glaze = pd.DataFrame(
        {
            "gloss": np.concatenate([rng.normal(60 + 1.5 * i, 2 + 0.4 * i, 9) for i in range(10)]),
            "recipe": np.repeat([f"recipe {chr(65 + i)}" for i in range(9)] + ["<x>"], 9),
        }
    )
    return {
        "result": r,
        "equivalence": tinfer.from_summary(n=30, mean=0.2, sd=1.0, margin=0.8, variable=SCRIPT),
        "t distribution": tinfer.tdist(12).show(low=-1, high=2),
        "plan": tinfer.plan("two-sample", effect=0.5, power=0.8),
        "plan grid": tinfer.plan("paired", effect=[0.3, 0.5, 0.8], power=0.9),
        "batch": bakery.tinfer.compare(["rise_mm", "crust_mm"], by="recipe", within="branch"),
        "checks": r.check(),
        "bootstrap": r.bootstrap(1999, seed=7),
        "bayes factor": r.bayes_factor(side="upper"),
        "pairwise": glaze.tinfer.pairwise("gloss", by="recipe"),
        "against a control": glaze.tinfer.pairwise("gloss", by="recipe", against="recipe A"),
    }


def _page(dark: bool, strip_styles: bool = False) -> str:
    cards = [html(obj) for obj in _objects().values()]
    if strip_styles:  # what a sanitiser that drops <style> elements leaves
        cards = [re.sub(r"<style>.*?</style>", "", c, flags=re.S) for c in cards]
    body = "".join(f'<div class="cell">{c}</div>' for c in cards)
    theme = "false" if dark else "true"
    ground = "#111418" if dark else "#ffffff"
    return (
        '<!DOCTYPE html><html><head><meta charset="utf-8"><title>tinfer cards</title>'
        f"<style>body{{background:{ground};margin:16px}}.cell{{margin:0 0 18px}}</style>"
        f'</head><body data-jp-theme-light="{theme}">{body}</body></html>'
    )


@pytest.fixture(scope="module")
def browser():
    sync_api = pytest.importorskip("playwright.sync_api")
    with sync_api.sync_playwright() as p:
        b = launch(p)
        yield b
        b.close()


def _open(browser, path: Path, color_scheme: str):
    return open_offline(browser, path, color_scheme, width=1000)


def _luminance(css_colour: str) -> float:
    r, g, b = (int(v) for v in re.findall(r"\d+", css_colour)[:3])
    return (r + g + b) / 3


@pytest.mark.parametrize("theme", ["light", "dark"])
def test_every_card_and_chart_visible(browser, tmp_path, theme):
    """Each card type shows its rich part and its SVG chart; labels stay text; no dialog."""
    dark = theme == "dark"
    path = tmp_path / f"all_cards_{theme}.html"
    path.write_text(_page(dark), encoding="utf-8")
    page = _open(browser, path, theme)
    try:
        cards = page.locator(".tinfer-rich")
        assert cards.count() == len(KINDS)
        OUTPUT.mkdir(exist_ok=True)
        for i, kind in enumerate(KINDS):
            card = cards.nth(i)
            assert card.is_visible(), kind
            assert card.locator(".tinfer-chart svg").first.is_visible(), kind
            assert card.locator(".tinfer-kicker").is_visible(), kind
            assert card.locator(".tinfer-headline").is_visible(), kind
            ink = _luminance(card.evaluate("e => getComputedStyle(e).color"))
            assert (ink > 150) if dark else (ink < 100), (kind, ink)
            name = kind.replace(" ", "_")
            card.screenshot(path=str(OUTPUT / f"all_cards_{name}_{theme}.png"))
        assert page.locator(".tinfer-text-fallback").first.is_visible() is False
        assert SCRIPT in page.locator("body").inner_text()
        assert page.dialogs == []
        page.screenshot(path=str(OUTPUT / f"all_cards_{theme}.png"), full_page=True)
    finally:
        page.close()


def test_stripped_styles_show_the_text(browser, tmp_path):
    """Without the stylesheets each card shows its plain text and hides the rich part."""
    path = tmp_path / "all_cards_stripped.html"
    path.write_text(_page(dark=False, strip_styles=True), encoding="utf-8")
    page = _open(browser, path, "light")
    try:
        pres = page.locator("pre.tinfer-text-fallback")
        assert pres.count() == len(KINDS)
        for i in range(len(KINDS)):
            assert pres.nth(i).is_visible()
            assert not page.locator(".tinfer-rich").nth(i).is_visible()
        text = page.locator("body").inner_text()
        assert SCRIPT in text and "64 per group" in text and "discoveries" in text
        assert page.dialogs == []
    finally:
        page.close()
