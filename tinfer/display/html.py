"""The building blocks of every HTML card, small functions that each return a string.

Every user string (column names, group labels, units, anything inside a headline) passes
through :func:`esc`. A card is self-contained: the stylesheet is inlined in a ``<style>``
element, the chart is inline SVG, and there is no JavaScript and no element id. A
``<pre class="tinfer-text-fallback">`` holds the plain text; the stylesheet hides it, so it
shows exactly where styles are stripped, while the rich part is hidden by an inline style
that only the stylesheet overrides.
"""

from __future__ import annotations

import datetime as _dt
import functools
import html as _html
import importlib.resources
import re
from collections.abc import Callable, Iterable, Sequence

from ..results.provenance import VERSION, versions
from . import charts
from .clean import visible


def esc(value: object) -> str:
    """HTML-escape any value's text (quotes included).

    >>> esc('<script>alert("x")</script>')
    '&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt;'
    """
    return _html.escape(visible(str(value), keep_lines=True), quote=True)


# --------------------------------------------------------------------------- building blocks
def wrap(text_fallback: str, inner: str) -> str:
    """The outer card: inlined CSS, the plain-text fallback, then the rich part."""
    return (
        '<div class="tinfer-card">'
        f"<style>{css()}</style>"
        f'<pre class="tinfer-text-fallback">{esc(text_fallback)}</pre>'
        f'<div class="tinfer-rich" style="display:none">{inner}</div>'
        "</div>"
    )


def head(kicker: str, chip: str = "", chip_class: str = "") -> str:
    """Small upper line: what kind of result, and an optional verdict chip."""
    chip_html = f'<span class="tinfer-chip {chip_class}">{esc(chip)}</span>' if chip else ""
    kind = f'<span class="tinfer-kicker">{esc(kicker)}</span>'
    return f'<div class="tinfer-head">{kind}{chip_html}</div>'


def section(title: str) -> str:
    return f'<div class="tinfer-section">{esc(title)}</div>'


def figures_table(rows: Iterable[tuple[str, str]], cls: str = "tinfer-figures") -> str:
    """Label/value rows. Values arrive as HTML already escaped by the caller."""
    body = "".join(f'<tr><th scope="row">{esc(k)}</th><td>{v}</td></tr>' for k, v in rows)
    return f'<table class="{cls}"><tbody>{body}</tbody></table>'


def notes(items: Sequence[str]) -> str:
    if not items:
        return ""
    body = "".join(f"<li>{esc(n)}</li>" for n in items)
    return f'<ul class="tinfer-notes">{body}</ul>'


def provenance(items: Iterable[tuple[str, str]]) -> str:
    """Footer of key/value pairs (values already escaped)."""
    body = "".join(f"<span>{esc(k)} {v}</span>" for k, v in items)
    return f'<div class="tinfer-provenance">{body}</div>'


_SVG_CLASS = re.compile(r'(<[A-Za-z][^<>]*?)\s+class="[^"]*"')


def bare_svg(svg: str) -> str:
    """The SVG without vl-convert's class attributes (``marks``, ``background``...).

    A host page's own rules for such common names can then never restyle the chart, and
    every class left in a card is one of ours.

    >>> bare_svg('<svg class="marks" width="2"><g class="mark-group role-axis"></g></svg>')
    '<svg width="2"><g></g></svg>'
    """
    return _SVG_CLASS.sub(r"\1", svg)


def chart_block(spec_fn: Callable[[], dict], label: str, wide: bool = False) -> str:
    """The chart made by ``spec_fn()`` (a Vega-Lite dict) as inline SVG.

    ``wide`` marks a chart that sits below the tables, across the card, rather than beside
    them. Missing display extras give a short note in place of the chart; so does a chart
    that fails for any other reason, so that the card's numbers always show.
    """
    cls = "tinfer-chart tinfer-chart-wide" if wide else "tinfer-chart"
    try:
        svg = bare_svg(charts.to_svg(spec_fn()))
    except ImportError as exc:  # the display extras are missing (MissingDependencyError)
        return f'<div class="{cls} tinfer-missing-chart">{esc(exc)}</div>'
    except Exception as exc:  # a broken chart must not hide the numbers
        return (
            f'<div class="{cls} tinfer-missing-chart">The chart could not be drawn '
            f"({esc(type(exc).__name__)}); every number is in the tables.</div>"
        )
    return f'<div class="{cls}" role="img" aria-label="{esc(label)}">{svg}</div>'


def altair_block(build: Callable, label: str, wide: bool = False) -> str:
    """An Altair chart built by ``build()``, in the card palette, as inline SVG.

    The chart is themed by :func:`tinfer.display.charts.card_spec` so that the stylesheet
    can follow dark themes; failures leave a note as in :func:`chart_block`.
    """
    return chart_block(lambda: charts.card_spec(build()), label, wide)


def data_table(
    header: Sequence[str],
    rows: Iterable[Sequence[str]],
    row_classes: Iterable[str] | None = None,
    caption: str = "",
    wrap: Sequence[int] = (),
) -> str:
    """A table with a header row; the first column names the row, the others are numbers.

    Cells are plain strings and are escaped here. ``row_classes`` gives each body row a class
    (or "" for none). Number cells do not wrap, except in the columns ``wrap`` (indices), which
    may break at an ordinary space.

    >>> data_table(["sample", "n"], [["<a>", "3"]])
    ... # doctest: +NORMALIZE_WHITESPACE
    '<table class="tinfer-table"><thead><tr><th scope="col">sample</th><th scope="col"
    class="tinfer-num">n</th></tr></thead><tbody><tr><th scope="row">&lt;a&gt;</th><td
    class="tinfer-num">3</td></tr></tbody></table>'
    """
    rows = [list(r) for r in rows]
    classes = list(row_classes) if row_classes is not None else [""] * len(rows)
    cap = f"<caption>{esc(caption)}</caption>" if caption else ""
    heads = [f'<th scope="col">{esc(header[0])}</th>']
    heads += [f'<th scope="col" class="tinfer-num">{esc(h)}</th>' for h in header[1:]]
    body = []
    for row, cls in zip(rows, classes, strict=True):
        cells = f'<th scope="row">{esc(row[0])}</th>'
        cells += "".join(
            f'<td class="tinfer-num{" tinfer-wrap" if j in wrap else ""}">{esc(c)}</td>'
            for j, c in enumerate(row[1:], start=1)
        )
        attr = f' class="{cls}"' if cls else ""
        body.append(f"<tr{attr}>{cells}</tr>")
    return (
        f'<table class="tinfer-table">{cap}<thead><tr>{"".join(heads)}</tr></thead>'
        f"<tbody>{''.join(body)}</tbody></table>"
    )


def headline_p(text: str) -> str:
    """The headline sentence of a card."""
    return f'<p class="tinfer-headline">{esc(text)}</p>'


def num(text: str, strong: bool = False) -> str:
    cls = "tinfer-num tinfer-strong" if strong else "tinfer-num"
    return f'<span class="{cls}">{esc(text)}</span>'


def aside(text: str) -> str:
    return f' <span class="tinfer-aside">{esc(text)}</span>'


def when(created: str) -> str:
    """An ISO timestamp in a short readable form, inside a ``<time>`` element.

    >>> when("2026-05-04T10:11:12+00:00")
    '<time datetime="2026-05-04T10:11:12+00:00">2026-05-04 10:11:12 UTC</time>'
    """
    if not created:
        return "n/a"
    try:
        stamp = _dt.datetime.fromisoformat(created)
        shown = stamp.astimezone(_dt.UTC).strftime("%Y-%m-%d %H:%M:%S UTC")
    except ValueError:
        shown = created
    return f'<time datetime="{esc(created)}">{esc(shown)}</time>'


@functools.lru_cache(maxsize=1)
def css() -> str:
    """The card stylesheet shipped in ``tinfer/display/static/tinfer.css``, minified.

    Comments and runs of white space are removed, so that a viewer whose sanitiser turns the
    ``<style>`` element into text shows one compact line rather than the whole file.

    Examples
    --------
    >>> ".tinfer-card{" in css()
    True
    """
    text = (
        importlib.resources.files(__package__)
        .joinpath("static", "tinfer.css")
        .read_text(encoding="utf-8")
    )
    return minify(text)


def minify(text: str) -> str:
    r"""Drop CSS comments and collapse white space (never inside a selector's meaning).

    >>> minify("/* note */ .a  b {\n  color: red;\n}\n")
    '.a b{color: red;}'
    """
    text = re.sub(r"/\*.*?\*/", "", text, flags=re.S)
    text = re.sub(r"\s+", " ", text)
    return re.sub(r"\s*([{};])\s*", r"\1", text).strip()


def card_start(kicker: str, headline: str, chip: str = "", chip_class: str = "") -> str:
    """The top of a card: the kicker line with its chip, then the headline sentence."""
    return head(kicker, chip, chip_class) + headline_p(headline)


def version_item() -> tuple[str, str]:
    """The first provenance item of every card: tinfer's version, and the Python, numpy,
    scipy and pandas that computed it (the last digits depend on scipy's)."""
    v = versions()
    rest = f"(Python {v['python']}, numpy {v['numpy']}, scipy {v['scipy']}, pandas {v['pandas']})"
    return ("tinfer", esc(VERSION) + " " + f'<span class="tinfer-aside">{esc(rest)}</span>')
