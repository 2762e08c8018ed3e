"""Analysis records: run notebooks headlessly and save them as executed .ipynb and offline HTML.

Command line::

    python -m tinfer.records NOTEBOOK_DIR OUTPUT_DIR [--in-place]

Needs the optional packages nbclient, nbconvert and ipykernel (``pip install tinfer[dev]``).
"""

from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path

from .optional import require


def _imports():
    """nbclient, nbformat and nbconvert's HTMLExporter (optional: the ``dev`` extra)."""
    what = "making analysis records"
    nbclient = require("nbclient", what)
    nbformat = require("nbformat", what)
    return nbclient, nbformat, require("nbconvert", what).HTMLExporter


def execute(path: Path, timeout: int = 600):
    """Execute the notebook at ``path`` in its own folder; return the executed notebook node."""
    nbclient, nbformat, _ = _imports()
    nb = nbformat.read(path, as_version=4)
    client = nbclient.NotebookClient(
        nb,
        timeout=timeout,
        kernel_name="python3",
        resources={"metadata": {"path": str(path.parent)}},
        store_widget_state=True,
        # the kernel's own start-up warnings are not part of the record
        extra_arguments=["--IPKernelApp.log_level=ERROR"],
    )
    client.execute()
    return nb


def to_html(nb) -> str:
    """Static HTML of an executed notebook. Charts are inline SVG, so it renders offline."""
    _, _, HTMLExporter = _imports()
    from traitlets.config import Config

    # Prefer the card's HTML over a live widget view: the widget needs JavaScript from a CDN,
    # the card is self-contained (inline CSS and SVG) and renders offline.
    priority = [
        "text/html",
        "application/vnd.jupyter.widget-view+json",
        "application/javascript",
        "text/markdown",
        "image/svg+xml",
        "text/latex",
        "image/png",
        "image/jpeg",
        "text/plain",
    ]
    exporter = HTMLExporter(config=Config({"NbConvertBase": {"display_data_priority": priority}}))
    body, _ = exporter.from_notebook_node(nb)
    return body


def export(path: Path, out_dir: Path, in_place: bool = False) -> list[Path]:
    """Execute one notebook; write the executed .ipynb (and the HTML record unless in place)."""
    _, nbformat, _ = _imports()
    nb = execute(path)
    if in_place:
        nbformat.write(nb, path)
        return [path]
    out_dir.mkdir(parents=True, exist_ok=True)
    ipynb = out_dir / path.name
    html = out_dir / (path.stem + ".html")
    nbformat.write(nb, ipynb)
    html.write_text(to_html(nb), encoding="utf-8")
    return [ipynb, html]


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(prog="python -m tinfer.records", description=__doc__)
    parser.add_argument("notebooks", type=Path, help="folder of .ipynb files (or one file)")
    parser.add_argument("output", type=Path, help="folder for the records")
    parser.add_argument("--in-place", action="store_true", help="overwrite the notebooks instead")
    args = parser.parse_args(argv)
    src = args.notebooks
    paths = [src] if src.is_file() else sorted(src.glob("*.ipynb"))
    if not paths:
        print(f"No notebooks found in {src}", file=sys.stderr)
        return 1
    written: list[Path] = []
    for p in paths:
        start = time.perf_counter()
        written += export(p, args.output, in_place=args.in_place)
        print(f"ran {p.name} in {time.perf_counter() - start:.1f} s")
    print("\nAnalysis records written:")
    for w in written:
        print(f"  {w.resolve()}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
