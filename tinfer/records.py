"""Analysis records: run notebooks headlessly and save them as executed .ipynb and offline HTML.

Command line::

    python -m tinfer.records NOTEBOOK_DIR OUTPUT_DIR [--in-place]
    python -m tinfer.records --verify OUTPUT_DIR

Records also get ``index.html`` (one offline page listing every record: its title, the
headline of each result in it, when and with which versions it ran, the data fingerprints of
its results, links to both files) and ``manifest.json`` (the same, with SHA-256 hashes of
each file and of each notebook's outputs, so a reviewer can check nothing was edited after
the run: ``--verify`` recomputes them).

Needs the optional packages nbclient, nbconvert and ipykernel (``pip install tinfer[dev]``).
"""

from __future__ import annotations

import argparse
import datetime as _dt
import hashlib
import html as _html
import json
import re
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


def entry(nb, ipynb: Path, html: Path, ran: str) -> dict:
    """The manifest entry of one record."""
    return describe(nb, ipynb.stem) | {
        "ipynb": ipynb.name,
        "html": html.name,
        "ran": ran,
        "ipynb_sha256": _sha256(ipynb.read_bytes()),
        "html_sha256": _sha256(html.read_bytes()),
        "outputs_sha256": outputs_hash(nb),
    }


HEADLINE = re.compile(r'<p class="tinfer-headline">(.*?)</p>', re.S)
FINGERPRINT = re.compile(r"fingerprint <code>([0-9a-f]{16})</code>")
TAG = re.compile(r"<[^>]+>")


def _sha256(data: bytes) -> str:
    return hashlib.sha256(data).hexdigest()


def outputs_hash(nb) -> str:
    """SHA-256 of every code cell's outputs as canonical JSON (key order fixed)."""
    outs = [c.get("outputs", []) for c in nb.cells if c.cell_type == "code"]
    return _sha256(json.dumps(outs, sort_keys=True, ensure_ascii=True).encode())


def describe(nb, name: str) -> dict:
    """Title, result headlines and data fingerprints of an executed notebook."""
    title = name
    for c in nb.cells:
        if c.cell_type == "markdown":
            first = next((ln for ln in c.source.splitlines() if ln.startswith("# ")), None)
            if first:
                title = first[2:].strip()
                break
    headlines: list[str] = []
    prints: list[str] = []
    for c in nb.cells:
        for o in c.get("outputs", []) if c.cell_type == "code" else []:
            page = o.get("data", {}).get("text/html", "")
            page = "".join(page) if isinstance(page, list) else page
            for h in HEADLINE.findall(page):
                text = _html.unescape(TAG.sub("", h)).strip()
                if text and text not in headlines:
                    headlines.append(text)
            prints += [f for f in FINGERPRINT.findall(page) if f not in prints]
    return {"notebook": name, "title": title, "headlines": headlines, "fingerprints": prints}


def write_index(out_dir: Path, entries: list[dict]) -> list[Path]:
    """``index.html`` and ``manifest.json`` for the records in ``out_dir``."""
    from .results.provenance import versions

    manifest = {
        "written": _dt.datetime.now(_dt.UTC).isoformat(timespec="seconds"),
        "versions": versions(),
        "records": entries,
    }
    (out_dir / "manifest.json").write_text(json.dumps(manifest, indent=2), encoding="utf-8")
    esc = _html.escape
    rows = []
    for e in entries:
        heads = (
            "".join(f"<li>{esc(h)}</li>" for h in e["headlines"]) or "<li>(no result cards)</li>"
        )
        prints = ", ".join(e["fingerprints"]) or "none"
        rows.append(
            f'<section><h2><a href="{esc(e["html"])}">{esc(e["title"])}</a></h2>'
            f'<p class="files"><a href="{esc(e["html"])}">record (HTML)</a> · '
            f'<a href="{esc(e["ipynb"])}">notebook (.ipynb)</a> · ran {esc(e["ran"])}</p>'
            f'<ul>{heads}</ul><p class="meta">data fingerprints: {esc(prints)}<br>'
            f"outputs SHA-256: <code>{esc(e['outputs_sha256'])}</code></p></section>"
        )
    v = manifest["versions"]
    line = ", ".join(f"{k} {val}" for k, val in v.items())
    page = (
        '<!DOCTYPE html><html lang="en"><head><meta charset="utf-8">'
        "<title>Analysis records</title><style>"
        "body{font-family:system-ui,sans-serif;max-width:60rem;margin:2rem auto;padding:0 1rem;"
        "color:#1d2630;background:#fff}h2{font-size:1.1rem;margin:1.4rem 0 .3rem}"
        ".files,.meta{color:#5b6670;font-size:.85rem}code{font-size:.8rem}"
        "@media (prefers-color-scheme: dark){body{color:#e3e7eb;background:#15191d}"
        "a{color:#8cc4f0}.files,.meta{color:#a3adb6}}</style></head><body>"
        f'<h1>Analysis records</h1><p class="meta">Written {esc(manifest["written"])} with '
        f'{esc(line)}. <a href="manifest.json">manifest.json</a> holds the same with the '
        "SHA-256 of every file, for checking that nothing was edited after the run "
        "(<code>python -m tinfer.records --verify</code> this folder).</p>"
        + "".join(rows)
        + "</body></html>"
    )
    (out_dir / "index.html").write_text(page, encoding="utf-8")
    return [out_dir / "index.html", out_dir / "manifest.json"]


def verify(out_dir: Path) -> list[str]:
    """Problems found when the files in ``out_dir`` are checked against its manifest."""
    _, nbformat, _ = _imports()
    manifest = json.loads((out_dir / "manifest.json").read_text(encoding="utf-8"))
    problems = []
    for e in manifest["records"]:
        for kind in ("ipynb", "html"):
            path = out_dir / e[kind]
            if not path.exists():
                problems.append(f"{e[kind]}: missing")
            elif _sha256(path.read_bytes()) != e[f"{kind}_sha256"]:
                problems.append(f"{e[kind]}: changed since the run")
        path = out_dir / e["ipynb"]
        if path.exists() and outputs_hash(nbformat.read(path, as_version=4)) != e["outputs_sha256"]:
            problems.append(f"{e['ipynb']}: outputs changed since the run")
    return problems


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(prog="python -m tinfer.records", description=__doc__)
    parser.add_argument("notebooks", type=Path, help="folder of .ipynb files (or one file)")
    parser.add_argument("output", type=Path, nargs="?", help="folder for the records")
    parser.add_argument("--in-place", action="store_true", help="overwrite the notebooks instead")
    parser.add_argument("--verify", action="store_true", help="check a records folder")
    args = parser.parse_args(argv)
    if args.verify:
        problems = verify(args.notebooks)
        print("\n".join(problems) or "Every record matches its manifest.")
        return 1 if problems else 0
    src = args.notebooks
    paths = [src] if src.is_file() else sorted(src.glob("*.ipynb"))
    if not paths:
        print(f"No notebooks found in {src}", file=sys.stderr)
        return 1
    written: list[Path] = []
    entries: list[dict] = []
    _, nbformat, _ = _imports()
    for p in paths:
        start = time.perf_counter()
        ran = _dt.datetime.now(_dt.UTC).isoformat(timespec="seconds")
        files = export(p, args.output, in_place=args.in_place)
        written += files
        if not args.in_place:
            entries.append(entry(nbformat.read(files[0], as_version=4), *files, ran))
        print(f"ran {p.name} in {time.perf_counter() - start:.1f} s")
    if entries:
        written += write_index(args.output, entries)
    print("\nAnalysis records written:")
    for w in written:
        print(f"  {w.resolve()}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
