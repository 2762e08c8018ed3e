"""The demo notebooks' analysis records open offline in Chromium with their charts visible.

The committed notebooks hold their executed outputs (nbval checks them), so this exports each
one to static HTML with tinfer.records, as ``make demo`` does, and opens the file with every
non-file request refused.
"""

from __future__ import annotations

from pathlib import Path

import nbformat
import pytest
from browser_support import OUTPUT, launch, require_chromium

from tinfer import records

pytestmark = require_chromium()

NOTEBOOKS = sorted((Path(__file__).resolve().parents[2] / "notebooks").glob("*.ipynb"))


@pytest.fixture(scope="module")
def browser():
    from playwright.sync_api import sync_playwright

    with sync_playwright() as p:
        b = launch(p)
        yield b
        b.close()


def test_every_notebook_is_covered():
    """There are demo notebooks to check (the glob did not silently come back empty)."""
    assert len(NOTEBOOKS) >= 6


@pytest.mark.parametrize("path", NOTEBOOKS, ids=lambda p: p.stem)
def test_record_renders_offline_with_charts(path, browser, tmp_path):
    """Each record shows at least one tinfer card or chart as a visible SVG, with no network."""
    nb = nbformat.read(path, as_version=4)
    html_file = tmp_path / (path.stem + ".html")
    html_file.write_text(records.to_html(nb), encoding="utf-8")
    page = browser.new_page(viewport={"width": 1100, "height": 900})
    page.route("http*://**", lambda route: route.abort())
    page.goto(html_file.as_uri())
    # Cards inline their SVG; Altair charts under tinfer.offline_charts() arrive as SVG outputs,
    # which nbconvert shows as data-URI images.
    svgs = page.locator(".tinfer-card svg, [data-mime-type='image/svg+xml'] img")
    assert svgs.count() >= 1, f"{path.name}: no chart in the record"
    svgs.first.scroll_into_view_if_needed()
    assert svgs.first.is_visible()
    box = svgs.first.bounding_box()
    assert box is not None and box["width"] > 100 and box["height"] > 50
    for i in range(svgs.count()):
        el = svgs.nth(i)
        if el.evaluate("e => e.tagName") == "IMG":
            assert el.evaluate("e => e.complete && e.naturalWidth > 0"), "an SVG image failed"
    OUTPUT.mkdir(exist_ok=True)
    page.screenshot(path=str(OUTPUT / f"record_{path.stem}.png"))
    page.close()


def test_records_index_links_and_manifest(browser, tmp_path):
    """index.html lists every record with its title and headlines, its links open the records
    offline, and manifest.json catches a record edited after the run."""
    entries = []
    for path in NOTEBOOKS[:3]:
        nb = nbformat.read(path, as_version=4)
        ipynb, html_file = tmp_path / path.name, tmp_path / (path.stem + ".html")
        nbformat.write(nb, ipynb)
        html_file.write_text(records.to_html(nb), encoding="utf-8")
        entries.append(records.entry(nb, ipynb, html_file, "2026-01-01T00:00:00+00:00"))
    records.write_index(tmp_path, entries)
    assert records.verify(tmp_path) == []
    page = browser.new_page(viewport={"width": 1000, "height": 900})
    page.route("http*://**", lambda route: route.abort())
    page.goto((tmp_path / "index.html").as_uri())
    titles = page.locator("h2").all_inner_texts()
    assert titles == [e["title"] for e in entries]
    assert all(e["headlines"] for e in entries)  # every demo record shows some result
    assert page.locator("li").count() == sum(len(e["headlines"]) for e in entries)
    hrefs = [a.get_attribute("href") for a in page.locator("a").all()]
    assert len(hrefs) == 1 + 3 * len(entries)  # the manifest, then title, record, notebook
    for href in hrefs:
        assert (tmp_path / href).exists(), href
    page.locator("h2 a").first.click()
    page.wait_for_load_state()
    assert page.url.endswith(entries[0]["html"])
    assert page.locator(".tinfer-card").count() >= 1
    # an edit after the run is caught
    edited = tmp_path / entries[0]["html"]
    edited.write_text(edited.read_text(encoding="utf-8") + "<!-- edited -->", encoding="utf-8")
    assert records.verify(tmp_path) == [f"{entries[0]['html']}: changed since the run"]
