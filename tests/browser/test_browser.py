"""Cards in a real browser: a notebook executed, exported by nbconvert, opened in Chromium.

Uses Debian's /usr/bin/chromium through playwright (no browser is downloaded; the test is
skipped when the package is absent). Requests other than file:// are aborted, so the page is
checked offline. A column is named like a script tag: the browser must show it as text and
no dialog may open. Screenshots go to ``test-output/``. The data are invented: drying times
(minutes) of glaze on tiles from two kilns.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
from browser_support import CHROMIUM, CHROMIUM_ARGS, OUTPUT, open_offline, require_chromium

SCRIPT = "<script>alert(1)</script>"

pytestmark = require_chromium()

CELL_RESULT = f"""\
import pandas as pd
import tinfer
col = {SCRIPT!r}
df = pd.DataFrame({{
    col: [41.2, 38.7, 44.1, 40.3, 39.8, 42.6, 43.9, 37.5, 41.7, 40.9, 45.2,
          36.4, 38.1, 35.2, 39.9, 37.3, 34.8, 38.6, 36.9, 35.7, 37.8, 39.1, 36.2],
    "kiln": ["north"] * 11 + ["south"] * 12,
}})
r = df.tinfer.two_sample(col, by="kiln")
r
"""
CELL_TDIST = "tinfer.tdist(12).show(low=-1, high=2)"
# the numbers as the card prints them (a real minus sign in the exponent)
CELL_NUMBERS = "print(repr(f'{r.estimate:.2f}|{r.p:.3g}'.replace('-', '\u2212')))"


@pytest.fixture(scope="module")
def notebook(tmp_path_factory):
    """The executed notebook (nbclient) and the numbers it printed."""
    nbformat = pytest.importorskip("nbformat")
    nbclient = pytest.importorskip("nbclient")
    root = tmp_path_factory.mktemp("nb")
    nb = nbformat.v4.new_notebook(
        cells=[
            nbformat.v4.new_code_cell(CELL_RESULT),
            nbformat.v4.new_code_cell(CELL_TDIST),
            nbformat.v4.new_code_cell(CELL_NUMBERS),
        ]
    )
    client = nbclient.NotebookClient(
        nb, timeout=180, kernel_name="python3", resources={"metadata": {"path": str(root)}}
    )
    client.execute()
    printed = nb.cells[2].outputs[0]["text"].strip().strip("'")
    estimate, p = printed.split("|")
    return nb, root, estimate, p


def _export(nb, root: Path, name: str, **opts) -> Path:
    nbconvert = pytest.importorskip("nbconvert")
    body, _ = nbconvert.HTMLExporter(**opts).from_notebook_node(nb)
    path = root / name
    path.write_text(body, encoding="utf-8")
    return path


@pytest.fixture(scope="module")
def browser():
    sync_api = pytest.importorskip("playwright.sync_api")
    with sync_api.sync_playwright() as p:
        b = p.chromium.launch(executable_path=CHROMIUM, args=CHROMIUM_ARGS)
        yield b
        b.close()


def _open(browser, path: Path, color_scheme: str = "light"):
    """A page showing ``path`` with every non-file request aborted; records dialogs."""
    return open_offline(browser, path, color_scheme, width=1100)


# ---------------------------------------------------------------------------- exported cards
def test_cards_visible_offline_and_script_inert(notebook, browser):
    """Both cards and their SVG charts are visible; the script-like name is text; no dialog."""
    nb, root, estimate, p = notebook
    page = _open(browser, _export(nb, root, "cards.html"))
    try:
        cards = page.locator(".tinfer-rich")
        assert cards.count() == 2
        for i in range(2):
            assert cards.nth(i).is_visible()
            assert cards.nth(i).locator(".tinfer-chart svg").is_visible()
        fallbacks = page.locator(".tinfer-text-fallback")
        assert fallbacks.count() == 2 and not fallbacks.first.is_visible()
        headline = page.locator(".tinfer-headline").first.inner_text()
        assert SCRIPT in headline
        assert estimate in headline and p in page.locator(".tinfer-figures").first.inner_text()
        assert page.dialogs == []
        OUTPUT.mkdir(exist_ok=True)
        page.screenshot(path=str(OUTPUT / "cards_notebook_light.png"), full_page=True)
        cards.first.screenshot(path=str(OUTPUT / "card_light.png"))
    finally:
        page.close()


def test_dark_theme_export(notebook, browser):
    """nbconvert's dark theme gives the card its dark variables (CSS only); it stays visible."""
    nb, root, _, _ = notebook
    page = _open(browser, _export(nb, root, "cards_dark.html", theme="dark"), "dark")
    try:
        card = page.locator(".tinfer-rich").first
        assert card.is_visible()
        ink = card.evaluate("e => getComputedStyle(e).color")
        rgb = [int(v) for v in re.findall(r"\d+", ink)[:3]]
        assert sum(rgb) / 3 > 150, ink  # light text on a dark page
        assert page.dialogs == []
        OUTPUT.mkdir(exist_ok=True)
        card.screenshot(path=str(OUTPUT / "card_dark.png"))
    finally:
        page.close()


def test_sanitized_export_keeps_numbers(notebook, browser):
    """Under nbconvert's sanitiser the visible text still holds the fallback with estimate and p."""
    nb, root, estimate, p = notebook
    page = _open(browser, _export(nb, root, "cards_sanitized.html", sanitize_html=True))
    try:
        pre = page.locator("pre.tinfer-text-fallback").first
        assert pre.is_visible()  # the stylesheet was removed, so the fallback shows
        fallback = pre.inner_text()
        assert f"estimate {estimate}" in fallback
        assert f"p = {p}" in fallback
        assert SCRIPT in fallback  # shown as text
        assert page.dialogs == []
        assert page.locator(".tinfer-card svg").count() == 0  # the sanitiser dropped the SVG
    finally:
        page.close()
