"""HTML cards, built by small functions that each return a string.

Every user string (column names, group labels, units, anything inside a headline) passes
through :func:`esc`. A card is self-contained: the stylesheet is inlined in a ``<style>``
element, the chart is inline SVG, and there is no JavaScript and no element id. A
``<pre class="tinfer-text-fallback">`` holds the plain text; the stylesheet hides it, so it
shows exactly where styles are stripped, while the rich part is hidden by an inline style
that only the stylesheet overrides.
"""

from __future__ import annotations

import datetime as _dt
import html as _html
import math
import re
from collections.abc import Iterable, Sequence
from typing import TYPE_CHECKING

from .._errors import MissingDependencyError
from .._format import fmt_df, fmt_level, fmt_num, fmt_p
from . import charts, equivalence
from .render import css

if TYPE_CHECKING:  # pragma: no cover
    from .._tdist import TDistribution, TDistView
    from ..results import TResult


def esc(value: object) -> str:
    """HTML-escape any value's text (quotes included).

    >>> esc('<script>alert("x")</script>')
    '&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt;'
    """
    return _html.escape(str(value), quote=True)


def _version() -> str:
    from .. import __version__

    return __version__


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


def chart_block(spec_fn, label: str, wide: bool = False) -> str:
    """The chart as inline SVG, or a short note when the display extras are missing.

    ``wide`` marks a chart that sits below the tables, across the card, rather than beside
    them.
    """
    cls = "tinfer-chart tinfer-chart-wide" if wide else "tinfer-chart"
    try:
        svg = bare_svg(charts.to_svg(spec_fn()))
    except MissingDependencyError as exc:
        return f'<div class="{cls} tinfer-missing-chart">{esc(exc)}</div>'
    return f'<div class="{cls}" role="img" aria-label="{esc(label)}">{svg}</div>'


def altair_block(build, label: str, wide: bool = False) -> str:
    """An Altair chart built by ``build()``, in the card palette, as inline SVG.

    The chart is themed by :func:`tinfer.display.charts.card_spec` so that the stylesheet
    can follow dark themes. Missing display extras give a short note; a chart that fails
    for any other reason gives a note too, so that the card's numbers always show.
    """
    try:
        return chart_block(lambda: charts.card_spec(build()), label, wide)
    except Exception as exc:  # a broken chart must not hide the numbers
        cls = "tinfer-chart tinfer-chart-wide" if wide else "tinfer-chart"
        return (
            f'<div class="{cls} tinfer-missing-chart">The chart could not be drawn '
            f"({esc(type(exc).__name__)}: {esc(exc)}).</div>"
        )


def data_table(
    header: Sequence[str],
    rows: Iterable[Sequence[str]],
    row_classes: Iterable[str] | None = None,
    caption: str = "",
) -> str:
    """A table with a header row; the first column names the row, the others are numbers.

    Cells are plain strings and are escaped here. ``row_classes`` gives each body row a class
    (or "" for none).

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
        cells += "".join(f'<td class="tinfer-num">{esc(c)}</td>' for c in row[1:])
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


def _capital(s: str) -> str:
    return s[:1].upper() + s[1:]


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


# --------------------------------------------------------------------------- results
def interval_text(result: TResult) -> str:
    """The interval in words, using the result's decimals and units."""
    lo, hi = result.ci
    if result.side == "two-sided":
        return f"{result._fmt(lo)} to {result._fmt(hi)}"
    if result.side == "upper":
        return f"{result._fmt(lo)} or more (one-sided)"
    return f"{result._fmt(hi)} or less (one-sided)"


def result_figures(result: TResult) -> str:
    """The compact table of the test's numbers."""
    e = result.effect
    e_lo, e_hi = (fmt_num(v, 3) if math.isfinite(v) else fmt_num(v) for v in e.ci)
    rows = [
        (
            "Estimate",
            num(result._fmt(result.estimate), strong=True)
            + aside(f"(SE {fmt_num(result.se, result.decimals + 1)})"),
        ),
        (f"{fmt_level(result.level)} CI", num(interval_text(result))),
        ("t", num(f"{result.t:.3f}")),
        ("df", num(fmt_df(result.df))),
        (f"p-value ({result.side})", num(fmt_p(result.p, result.log_p), strong=True)),
        (
            f"Effect size, {e.name}",
            num(f"{e.value:.3f}") + aside(f"({fmt_level(e.level)} CI {e_lo} to {e_hi})"),
        ),
        ("Method", esc(result.method)),
    ]
    return figures_table(rows)


def groups_table(result: TResult) -> str:
    """Per-group descriptives: n, missing dropped, mean, SD and SE."""
    d = result.decimals
    head_cells = "".join(
        f'<th scope="col" class="tinfer-num">{h}</th>' for h in ("n", "missing", "mean", "SD", "SE")
    )
    rows = []
    for g in result.groups:
        cells = (
            str(g.n),
            str(g.n_missing),
            fmt_num(g.mean, d),
            fmt_num(g.sd, d),
            fmt_num(g.se, d + 1),
        )
        tds = "".join(f'<td class="tinfer-num">{esc(c)}</td>' for c in cells)
        rows.append(f'<tr><th scope="row">{esc(g.label)}</th>{tds}</tr>')
    return (
        '<table class="tinfer-groups"><thead><tr><th scope="col">group</th>'
        f"{head_cells}</tr></thead><tbody>{''.join(rows)}</tbody></table>"
    )


def missing_line(result: TResult) -> str:
    """Missing-value counts per group, in one sentence."""
    dropped = [(g.label, g.n_missing) for g in result.groups if g.n_missing]
    if not dropped:
        return "No missing values were dropped."
    counts = ", ".join(f"{label}: {k}" for label, k in dropped)
    return f"Missing values dropped before the test: {counts}."


def result_notes(result: TResult) -> list[str]:
    """The result's warnings, less the per-group missing counts already in :func:`missing_line`."""
    said = {f"{g.n_missing} missing value(s) dropped from {g.label}." for g in result.groups}
    return [w for w in result.warnings if w not in said]


def result_provenance(result: TResult) -> str:
    return provenance(
        [
            ("tinfer", esc(_version())),
            ("computed", when(result.created)),
            ("level", esc(fmt_level(result.level))),
            ("side", esc(result.side)),
            ("null", esc(result._fmt(result.null))),
            ("pooled", "yes" if result.pooled else "no"),
            ("fingerprint", f"<code>{esc(result.fingerprint)}</code>"),
        ]
    )


def result_card(result: TResult, chart: bool = True) -> str:
    """The full HTML card of a :class:`~tinfer.TResult`.

    Examples
    --------
    >>> import tinfer
    >>> r = tinfer.from_summary(n=12, mean=5.4, sd=1.1, null=5.0, variable="<x>")
    >>> page = result_card(r, chart=False)
    >>> "&lt;x&gt;" in page and "<x>" not in page
    True
    """
    level = fmt_level(result.level)
    if result.significant:
        chip, chip_cls = f"null outside the {level} CI", "tinfer-chip-out"
    else:
        chip, chip_cls = f"null inside the {level} CI", "tinfer-chip-in"
    if result.equivalence is not None:
        shown = result.equivalence.decision
        chip = f"{result.equivalence.kind} {'shown' if shown else 'not shown'}"
        chip_cls = "tinfer-chip-out" if shown else "tinfer-chip-in"
    numbers = (
        result_figures(result)
        + equivalence.card_section(result)
        + section("groups")
        + groups_table(result)
        + section("hypotheses")
        + figures_table(
            [
                ("Null", esc(_capital(result.null_hypothesis))),
                ("Alternative", esc(_capital(result.alternative))),
            ],
            "tinfer-figures tinfer-hypotheses",
        )
    )
    chart_html = (
        chart_block(
            lambda: charts.result_spec(result),
            f"t density at df {fmt_df(result.df)} with the p-value shaded, "
            f"and the estimate with its {level} CI",
        )
        if chart
        else ""
    )
    inner = (
        head(result.method, chip, chip_cls)
        + f'<p class="tinfer-headline">{esc(result.headline())}</p>'
        + f'<div class="tinfer-cols"><div class="tinfer-numbers">{numbers}</div>'
        + f"{chart_html}</div>"
        + notes(result_notes(result))
        + f'<p class="tinfer-missing">{esc(missing_line(result))}</p>'
        + result_provenance(result)
    )
    return wrap(str(result), inner)


# --------------------------------------------------------------------------- t distribution
def moments(dist: TDistribution) -> list[tuple[str, str]]:
    """Mean, variance, SD and median with the df conditions under which they exist.

    >>> import tinfer
    >>> moments(tinfer.tdist(1.5))[1]
    ('variance', 'infinite (finite only for df > 2)')
    """
    df = dist.df
    if df > 1:
        mean = "0 (exists for df > 1)"
    else:
        mean = "undefined (exists only for df > 1)"
    if math.isinf(df):
        var = "1 (standard normal)"
    elif df > 2:
        var = f"{fmt_num(dist.variance)} (df / (df − 2), finite for df > 2)"
    elif df > 1:
        var = "infinite (finite only for df > 2)"
    else:
        var = "undefined (finite only for df > 2)"
    sd_val = dist.sd
    if math.isnan(sd_val):
        sd = "undefined (finite only for df > 2)"
    elif math.isinf(sd_val):
        sd = "infinite (finite only for df > 2)"
    else:
        sd = fmt_num(sd_val)
    return [("mean", mean), ("variance", var), ("SD", sd), ("median", "0 (every df)")]


def tdist_lines(view: TDistView) -> list[str]:
    """The plain-text lines of a t distribution view (also its ``str``)."""
    dist = view.dist
    lines = [str(dist)]
    if view.low is not None or view.high is not None:
        lines.append(f"  area {charts.area_words(view.low, view.high)} = {fmt_p(float(view.area))}")
    for q, v in zip(view.percentiles, view.values, strict=True):
        lines.append(f"  {100 * q:.4g}% percentile: {fmt_num(v, 4)}")
    lines.extend(f"  {k}: {v}" for k, v in moments(dist))
    return lines


def tdist_card(view: TDistView, chart: bool = True) -> str:
    """The HTML card of a t distribution with an optional area and percentiles.

    Examples
    --------
    >>> import tinfer
    >>> page = tdist_card(tinfer.tdist(12).show(low=-1, high=2), chart=False)
    >>> "0.797" in page
    True
    """
    dist = view.dist
    df_text = "∞ (standard normal)" if math.isinf(dist.df) else fmt_df(dist.df)
    rows = [("df", num(df_text))]
    if view.low is not None or view.high is not None:
        headline = (
            f"Under Student's t with df = {df_text}, "
            f"{charts.area_words(view.low, view.high)} = {fmt_p(float(view.area))}."
        )
        rows.append(
            (
                "area " + charts.area_words(view.low, view.high),
                num(fmt_p(float(view.area)), strong=True),
            )
        )
    else:
        headline = f"Student's t distribution with df = {df_text}."
    for q, v in zip(view.percentiles, view.values, strict=True):
        rows.append((f"{100 * q:.4g}% percentile", num(fmt_num(v, 4))))
    rows += [(k, esc(v)) for k, v in moments(dist)]
    chart_html = (
        chart_block(
            lambda: charts.tdist_spec(dist, view.low, view.high, view.percentiles),
            f"t density at df {df_text}",
        )
        if chart
        else ""
    )
    params = [("tinfer", esc(_version())), ("df", esc(df_text))]
    params += [
        (k, esc(fmt_num(v))) for k, v in (("low", view.low), ("high", view.high)) if v is not None
    ]
    inner = (
        head("t distribution")
        + f'<p class="tinfer-headline">{esc(headline)}</p>'
        + f'<div class="tinfer-cols"><div class="tinfer-numbers">{figures_table(rows)}</div>'
        + f"{chart_html}</div>"
        + provenance(params)
    )
    return wrap(str(view), inner)
