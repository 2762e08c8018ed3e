"""nbval settings: compare plain-text outputs; skip rich outputs that embed times or SVG."""


def pytest_collectstart(collector):
    """Skip comparing HTML, SVG, PNG and widget outputs (cards carry a timestamp and a hash)."""
    if collector.fspath and collector.fspath.ext == ".ipynb":
        collector.skip_compare += (
            "text/html",
            "image/svg+xml",
            "image/png",
            "application/vnd.jupyter.widget-view+json",
            "application/vnd.vegalite.v5+json",
            "application/vnd.vegalite.v6+json",
        )
