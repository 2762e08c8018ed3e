"""Charts a reader can read: no two pieces of chart text overlap, and a small p shows.

Every card type is drawn in headless Chromium (Debian's package, offline); the browser's own
text boxes are compared, since the browser sets the system font a little differently from
the renderer that laid the chart out. Cards at p = 1e-6 must show a visible mark under the
tail that holds the p-value. The data are invented: glaze drying times (minutes) of two
kilns, and the fill weights (g) of a line checked against 500 g.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from browser_support import OUTPUT, launch, open_offline, require_chromium
from test_all_cards import _objects

import tinfer
from tinfer.display.charts import TAIL
from tinfer.display.render import html

pytestmark = require_chromium()

BOXES = """
svg => Array.from(svg.querySelectorAll('text'))
  .filter(t => t.textContent.trim() !== '')
  .map(t => { const b = t.getBoundingClientRect();
              return [t.textContent, b.left, b.top, b.right, b.bottom]; })
"""
TAIL_MARKS = f"""
svg => Array.from(svg.querySelectorAll('[stroke="{TAIL}"]'))
  .map(e => {{ const b = e.getBoundingClientRect();
              return [b.width, parseFloat(e.getAttribute('stroke-width') || '0')]; }})
"""


def _tiny_p() -> dict[str, object]:
    """Results whose p-value is about 1e-6, one per kind of t-density chart."""
    n = 30
    sd = 1.0
    shift = stats_t_shift(n)
    fill = pd.DataFrame({"g": 500 + shift + sd * _unit(n)})
    return {
        "one-sample p 1e-6": fill.tinfer.one_sample("g", null=500),
        "upper p 1e-6": fill.tinfer.one_sample("g", null=500, side="upper"),
        "two-sample p 1e-6": tinfer.from_summary(n=(30, 30), mean=(1.4, 0.0), sd=(1.0, 1.0)),
        "equivalence p 1e-6": tinfer.from_summary(n=60, mean=0.05, sd=1.0, margin=0.8),
        "area 1e-6": tinfer.tdist(10).show(low=11.0),
    }


def _unit(n: int) -> np.ndarray:
    """n values with mean exactly 0 and SD exactly 1."""
    x = np.random.default_rng(11).normal(size=n)
    return (x - x.mean()) / x.std(ddof=1)


def stats_t_shift(n: int) -> float:
    """The mean shift that gives a one-sample t with two-sided p near 1e-6 at n - 1 df."""
    from scipy import stats  # reference library

    return float(stats.t.isf(0.5e-6, n - 1)) / np.sqrt(n)


def _page(objects: dict[str, object]) -> str:
    cells = "".join(
        f'<div class="cell" data-kind="{k}">{html(o)}</div>' for k, o in objects.items()
    )
    return (
        '<!DOCTYPE html><html><head><meta charset="utf-8"><title>charts</title>'
        "<style>body{margin:16px}.cell{margin:0 0 18px}</style></head>"
        f'<body data-jp-theme-light="true">{cells}</body></html>'
    )


@pytest.fixture(scope="module")
def page(tmp_path_factory):
    sync_api = pytest.importorskip("playwright.sync_api")
    objects = _objects() | _tiny_p()
    path: Path = tmp_path_factory.mktemp("charts") / "charts.html"
    path.write_text(_page(objects), encoding="utf-8")
    with sync_api.sync_playwright() as p:
        browser = launch(p)
        pg = open_offline(browser, path, "light", width=1000)
        OUTPUT.mkdir(exist_ok=True)
        pg.screenshot(path=str(OUTPUT / "chart_text.png"), full_page=True)
        yield pg, list(objects)
        browser.close()


def _overlaps(boxes: list) -> list[tuple[str, str]]:
    """Pairs of text boxes that share more than a pixel in both directions."""
    out = []
    for i, (ta, al, at, ar, ab) in enumerate(boxes):
        for tb, bl, bt, br, bb in boxes[i + 1 :]:
            if min(ar, br) - max(al, bl) > 1 and min(ab, bb) - max(at, bt) > 1:
                out.append((ta, tb))
    return out


def test_no_chart_text_overlaps(page):
    """In every chart of every card, no two labels, titles or ticks overlap."""
    pg, kinds = page
    bad = {}
    for i, kind in enumerate(kinds):
        for svg in pg.locator(".tinfer-cell, .cell").nth(i).locator(".tinfer-chart svg").all():
            clash = _overlaps(svg.evaluate(BOXES))
            if clash:
                bad[kind] = clash[:5]
    assert not bad, bad


def test_tiny_p_shows_a_tail_mark(page):
    """At p = 1e-6 every t-density chart has a visible bar (wide, and drawn thick) under the
    tail holding p."""
    pg, kinds = page
    for kind in [k for k in kinds if "1e-6" in k]:
        cell = pg.locator(f'.cell[data-kind="{kind}"]')
        marks = cell.locator(".tinfer-chart svg").first.evaluate(TAIL_MARKS)
        assert marks, kind
        assert any(w >= 3 and h >= 3 for w, h in marks), (kind, marks)
