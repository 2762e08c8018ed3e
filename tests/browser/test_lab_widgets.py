"""The result explorer in a real JupyterLab, driven by headless Chromium (Debian's package).

Starts JupyterLab on 127.0.0.1 (free port, token, no browser) in a temporary root holding a
small notebook, runs its cell, moves the level slider with the keyboard and checks that the
interval shown changes to the one scipy gives at the new level. A screenshot goes to
``test-output/``. No browser is downloaded; the test is skipped without /usr/bin/chromium.
"""

from __future__ import annotations

import json
import os
import re
import secrets
import signal
import socket
import subprocess
import sys
import time
import urllib.request
from pathlib import Path

import pytest
from browser_support import CHROMIUM, CHROMIUM_ARGS, OUTPUT, require_chromium

SERVER_START_S = 45.0
TOTAL_BUDGET_S = 110.0

# Invented scenario: drying times (minutes) of two glaze mixes in a pottery workshop.
CELL = """\
import tinfer
r = tinfer.from_summary(n=(14, 16), mean=(41.3, 37.9), sd=(4.4, 5.1), labels=("mix A", "mix B"))
ex = r.explore()
ex
"""

pytestmark = require_chromium()


def _free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


def _notebook(path: Path) -> None:
    nb = {
        "cells": [
            {
                "cell_type": "code",
                "execution_count": None,
                "id": "explore-cell",
                "metadata": {},
                "outputs": [],
                "source": CELL,
            }
        ],
        "metadata": {
            "kernelspec": {"display_name": "Python 3", "language": "python", "name": "python3"}
        },
        "nbformat": 4,
        "nbformat_minor": 5,
    }
    path.write_text(json.dumps(nb), encoding="utf-8")


def _wait_for_server(url: str, proc: subprocess.Popen, log: Path) -> None:
    deadline = time.monotonic() + SERVER_START_S
    while time.monotonic() < deadline:
        if proc.poll() is not None:
            raise RuntimeError(f"JupyterLab exited early:\n{log.read_text()[-3000:]}")
        try:
            with urllib.request.urlopen(url, timeout=2) as resp:
                if resp.status == 200:
                    return
        except OSError:
            time.sleep(0.5)
    raise RuntimeError(
        f"JupyterLab did not answer in {SERVER_START_S} s:\n{log.read_text()[-3000:]}"
    )


def _stop(proc: subprocess.Popen) -> None:
    """Stop the server we started (its own process group holds the kernel too)."""
    if proc.poll() is not None:
        return
    try:
        os.killpg(proc.pid, signal.SIGTERM)
        proc.wait(timeout=15)
    except (subprocess.TimeoutExpired, ProcessLookupError):
        try:
            os.killpg(proc.pid, signal.SIGKILL)
        except ProcessLookupError:
            pass
        proc.wait(timeout=10)


def _welch_ci(level: float) -> tuple[float, float]:
    """Welch interval of the notebook's summaries at ``level`` from scipy.stats.t."""
    from scipy import stats

    # Welch-Satterthwaite df and standard error (Welch 1947), quantile from scipy.stats.t.
    (n1, n2), (m1, m2), (s1, s2) = (14, 16), (41.3, 37.9), (4.4, 5.1)
    v1, v2 = s1**2 / n1, s2**2 / n2
    se = (v1 + v2) ** 0.5
    df = (v1 + v2) ** 2 / (v1**2 / (n1 - 1) + v2**2 / (n2 - 1))
    q = stats.t.ppf(0.5 + level / 2, df)
    return m1 - m2 - q * se, m1 - m2 + q * se


def _quiet_settings(settings: Path) -> None:
    """User settings that keep JupyterLab from asking about (or fetching) news."""
    folder = settings / "@jupyterlab" / "apputils-extension"
    folder.mkdir(parents=True)
    (folder / "notification.jupyterlab-settings").write_text(
        json.dumps({"fetchNews": "false", "checkForUpdates": False}), encoding="utf-8"
    )


def test_level_slider_changes_interval_in_lab(tmp_path):
    """Pressing PageDown on the level slider in JupyterLab redraws the card's interval."""
    playwright_api = pytest.importorskip("playwright.sync_api")
    pytest.importorskip("jupyterlab")
    started = time.monotonic()

    def left_ms() -> float:
        """Milliseconds left of the test's time budget (never below 1 s)."""
        return max(1000.0, 1000.0 * (TOTAL_BUDGET_S - (time.monotonic() - started)))

    root = tmp_path / "root"
    root.mkdir()
    _notebook(root / "explore.ipynb")
    _quiet_settings(tmp_path / "settings")
    port, token = _free_port(), secrets.token_hex(16)
    env = dict(os.environ)
    env.update(
        JUPYTERLAB_SETTINGS_DIR=str(tmp_path / "settings"),
        JUPYTERLAB_WORKSPACES_DIR=str(tmp_path / "workspaces"),
        JUPYTER_RUNTIME_DIR=str(tmp_path / "runtime"),
        JUPYTER_CONFIG_DIR=str(tmp_path / "config"),
    )
    log = tmp_path / "lab.log"
    OUTPUT.mkdir(exist_ok=True)
    with log.open("w") as log_file:
        proc = subprocess.Popen(
            [
                sys.executable,
                "-m",
                "jupyterlab",
                "--no-browser",
                "--allow-root",
                "--ServerApp.ip=127.0.0.1",
                f"--ServerApp.port={port}",
                "--ServerApp.port_retries=0",
                f"--IdentityProvider.token={token}",
                f"--ServerApp.root_dir={root}",
                "--LabApp.check_for_updates_class=jupyterlab.NeverCheckForUpdate",
            ],
            stdout=log_file,
            stderr=subprocess.STDOUT,
            env=env,
            cwd=root,
            start_new_session=True,
        )
    try:
        base = f"http://127.0.0.1:{port}"
        _wait_for_server(f"{base}/api/status?token={token}", proc, log)
        with playwright_api.sync_playwright() as pw:
            browser = pw.chromium.launch(executable_path=CHROMIUM, args=CHROMIUM_ARGS)
            page = browser.new_page(viewport={"width": 1280, "height": 1100})
            try:
                page.goto(f"{base}/lab/tree/explore.ipynb?token={token}", timeout=left_ms())
                # Run the cell once the kernel is idle (a cell run before that may be dropped).
                page.locator("#jp-main-statusbar").get_by_text(
                    re.compile(r"\| Idle")
                ).first.wait_for(timeout=left_ms())
                editor = page.locator(".jp-Cell .jp-InputArea-editor").first
                editor.click(timeout=left_ms())
                page.keyboard.press("Shift+Enter")
                explorer = page.locator(".tinfer-explorer").first
                explorer.wait_for(timeout=left_ms())
                slider = explorer.locator(".widget-slider").first
                readout = slider.locator(".widget-readout")
                view = explorer.locator(".widget-html-content").last
                view.locator(".tinfer-card").wait_for(timeout=left_ms())
                before_text = view.inner_text()
                before_level = readout.inner_text().strip()
                handle = slider.locator(".noUi-handle").first
                handle.focus()
                for _ in range(4):  # PageDown: 5 steps of 0.001 each (noUiSlider's default)
                    handle.press("PageDown")
                # Each key press is one change; wait for the card of the last one (93%).
                page.wait_for_function(
                    "([el, r]) => r.innerText.trim() === '0.930' && "
                    "el.innerText.includes('93% CI')",
                    arg=[view.element_handle(), readout.element_handle()],
                    timeout=left_ms(),
                )
                new_level = float(readout.inner_text())
                after_text = view.inner_text()
                page.screenshot(path=str(OUTPUT / "lab_widgets.png"), full_page=True)
            except Exception:
                page.screenshot(path=str(OUTPUT / "lab_widgets_failure.png"), full_page=True)
                raise
            finally:
                browser.close()
    finally:
        _stop(proc)
    assert before_level == "0.950"
    assert new_level == 0.93
    assert after_text != before_text
    # The card shows the interval scipy gives at each level; one decimal, as the SE (1.73)
    # has two significant digits at 0.1 (common practice, no source).
    for level, text in ((0.95, before_text), (0.93, after_text)):
        lo, hi = _welch_ci(level)
        pct = f"{100 * level:g}%"
        assert f"{pct} CI {lo:.1f} to {hi:.1f}" in text.replace("−", "-"), text
    assert time.monotonic() - started < 120
