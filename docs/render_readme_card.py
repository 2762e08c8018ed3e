"""Render the README's example card to docs/img/readme-card.png, offline, in headless Chromium.

Run with ``make readme-image``. Uses Debian's chromium at /usr/bin/chromium through playwright;
no browser download and no network (every http request is refused).
"""

from __future__ import annotations

import tempfile
from pathlib import Path

import numpy as np
import pandas as pd

import tinfer

HERE = Path(__file__).resolve().parent


def example() -> tinfer.TResult:
    """The README's ten-line example."""
    rng = np.random.default_rng(7)
    plots = pd.DataFrame(
        {
            "yield_kg": np.r_[rng.normal(41.8, 2.0, 14), rng.normal(39.9, 3.1, 16)],
            "irrigation": ["drip"] * 14 + ["furrow"] * 16,
        }
    )
    return plots.tinfer.two_sample("yield_kg", by="irrigation", units="kg")


def main() -> None:
    from playwright.sync_api import sync_playwright

    html = example().to_html()
    page_html = (
        "<!doctype html><html><head><meta charset='utf-8'></head>"
        f"<body style='margin:16px;background:#fff'>{html}</body></html>"
    )
    out = HERE / "img" / "readme-card.png"
    out.parent.mkdir(exist_ok=True)
    with tempfile.TemporaryDirectory() as tmp:
        page_file = Path(tmp) / "card.html"
        page_file.write_text(page_html, encoding="utf-8")
        with sync_playwright() as p:
            browser = p.chromium.launch(
                executable_path="/usr/bin/chromium",
                args=[
                    "--headless",
                    "--no-sandbox",
                    "--disable-gpu",
                    "--disable-background-networking",
                    "--no-first-run",
                ],
            )
            page = browser.new_page(viewport={"width": 980, "height": 600})
            page.route("http*://**", lambda route: route.abort())
            page.goto(page_file.as_uri())
            page.locator(".tinfer-card").screenshot(path=str(out))
            browser.close()
    print(f"wrote {out}")


if __name__ == "__main__":
    main()
