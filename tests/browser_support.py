"""Shared set-up for the browser checks: Debian's Chromium driven by playwright.

No browser is ever downloaded. Outside CI the checks are skipped when /usr/bin/chromium is
missing; under CI (``CI`` set) a missing browser is a failure, since ``make test`` installs it.
"""

from __future__ import annotations

import os
from pathlib import Path

import pytest

CHROMIUM = "/usr/bin/chromium"
CHROMIUM_ARGS = [
    "--headless",
    "--no-sandbox",
    "--disable-gpu",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
    "--no-first-run",
]
OUTPUT = Path(__file__).resolve().parents[1] / "test-output"


def require_chromium() -> list:
    """pytest marks for a module that needs the browser."""
    if os.environ.get("CI"):
        return [pytest.mark.browser]
    return [
        pytest.mark.browser,
        pytest.mark.skipif(not os.path.exists(CHROMIUM), reason="needs Debian's chromium package"),
    ]


def launch(playwright):
    """Headless Chromium from the Debian package."""
    return playwright.chromium.launch(executable_path=CHROMIUM, args=CHROMIUM_ARGS)


def open_offline(browser, path: Path, color_scheme: str = "light", width: int = 1100):
    """A page showing ``path`` with every non-file request aborted; dialogs are recorded."""
    page = browser.new_page(viewport={"width": width, "height": 900}, color_scheme=color_scheme)
    page.dialogs = []

    def on_dialog(dialog):
        page.dialogs.append(dialog.message)
        dialog.dismiss()

    page.on("dialog", on_dialog)
    page.route(
        "**/*",
        lambda route: route.continue_() if route.request.url.startswith("file:") else route.abort(),
    )
    page.goto(path.as_uri(), wait_until="load")
    page.wait_for_timeout(300)
    return page
