"""The card section and chart of an equivalence or non-inferiority claim (two one-sided tests).

Small functions, each returning a string or chart layers, used by the t-test card and
chart (:mod:`tinfer.display.ttest`) when a result carries ``equivalence``; every word comes
from :mod:`tinfer.results.equivalence`:

- :func:`card_section`: an HTML section listing the one-sided tests and the conclusion;
- :func:`density_parts`: shaded tails and marks for the t-density panel (one tail at each
  one-sided test's t);
- :func:`band_layers`: the shaded band and the ``1 - 2 alpha`` interval for the data-scale panel;
- :func:`equivalence_spec` and :func:`equivalence_chart`: both panels together.
"""

from __future__ import annotations

import html
import math
from typing import Any

from ..core import distribution as dist
from ..results.equivalence import level_words
from ..results.format import fmt_df, fmt_fixed, fmt_num, fmt_p, p_equals
from ..results.ttest import TResult
from . import density
from .charts import INK, STRIP_HEIGHT, WIDTH, config, to_altair
from .clean import label

BAND = "#6a9f58"  # edge of the shaded band on the data scale (our own choice)
BAND_FILL = "#dcebd5"
TOST_CI = "#1f5f8b"


def card_section(result: TResult) -> str:
    """An HTML section for the card: the one-sided tests, the interval, the conclusion.

    Every user string is escaped; returns "" when the result has no margin claim.

    Examples
    --------
    >>> import tinfer
    >>> r = tinfer.from_summary(n=(10, 12), mean=(5.0, 4.9), sd=(0.5, 0.6),
    ...                         labels=("<a>", "b"), margin=1.0)
    >>> s = card_section(r)
    >>> "&lt;a&gt; and b" in s and "<a>" not in s
    True
    """
    eq = result.equivalence
    if eq is None:
        return ""
    esc = html.escape
    rows = []
    for name, test in eq.tests:
        rows.append(
            "<tr>"
            f"<td>{esc(name)} limit {esc(result.fmt(test.bound))}</td>"
            f"<td>{esc(fmt_fixed(test.t, 3))}</td>"
            f"<td>{esc(fmt_df(test.df))}</td>"
            f"<td>{esc(fmt_p(test.p, test.log_p))}</td>"
            "</tr>"
        )
    verdict_class = "tinfer-eq-yes" if eq.decision else "tinfer-eq-no"
    note = f'<p class="tinfer-eq-note">{esc(eq.note)}</p>' if eq.note else ""
    return (
        '<section class="tinfer-eq">'
        f'<h4 class="tinfer-eq-title">{esc(eq.title)}</h4>'
        f'<p class="tinfer-eq-band">Band: {esc(eq.band_words(result.fmt))}; '
        f"each one-sided test at {eq.alpha:.3g}.</p>"
        '<table class="tinfer-eq-tests">'
        "<thead><tr><th>test against</th><th>t</th><th>df</th><th>p</th></tr></thead>"
        f"<tbody>{''.join(rows)}</tbody></table>"
        f'<p class="tinfer-eq-verdict {verdict_class}">'
        f"{esc(eq.interval_words(result.fmt))}: {esc(eq.conclusion)} "
        f"({esc(p_equals(eq.p, eq.log_p))}).</p>"
        f"{note}</section>"
    )


# ---------------------------------------------------------------------------- charts
def density_values(result: TResult) -> list[float]:
    """The t values the density panel must cover: each one-sided test's t and critical value."""
    eq = result.equivalence
    crit = float(dist.isf(eq.alpha, result.df))
    vals = []
    if eq.lower is not None:
        vals += [eq.lower.t, crit]
    if eq.upper is not None:
        vals += [eq.upper.t, -crit]
    return vals


def density_parts(result: TResult, L: float) -> dict[str, Any]:
    """Shaded tails, exact grid points, marks and subtitle for the t-density panel.

    Each one-sided test's p-value is a tail of the same t distribution: the lower test's
    to the right of its t (``P(T > t_lower)``), the upper test's to the left of its t
    (``P(T < t_upper)``). Since ``t_lower > t_upper`` always, the two never overlap.

    Examples
    --------
    >>> import tinfer
    >>> r = tinfer.from_summary(n=30, mean=0.2, sd=1.0, margin=0.8)
    >>> parts = density_parts(r, 6.0)
    >>> [(round(a, 3), round(b, 3)) for a, b in parts["shade"]]
    [(5.477, 6.0), (-6.0, -3.286)]
    """
    eq = result.equivalence
    shade, extra, marks = [], [], []
    for _, test in eq.tests:
        a = density.clamp(test.t, L)
        shade.append((a, L) if test is eq.lower else (-L, a))
        extra.append(a)
        word = "t vs lower limit" if test is eq.lower else "t vs upper limit"
        marks.append(density.mark("observed", test.t, density.mark_label(f"{word}:", test.t, L), L))
    crit = float(dist.isf(eq.alpha, result.df))
    marks += density.critical_marks([v for v, t in ((-crit, eq.upper), (crit, eq.lower)) if t], L)
    ps = ", ".join(f"{name} {fmt_p(t.p, t.log_p)}" for name, t in eq.tests)
    subtitle = f"shaded: one tail per one-sided test (p: {ps})"
    tails = [p_equals(t.p, t.log_p) for _, t in eq.tests]
    return {"shade": shade, "extra": extra, "marks": marks, "subtitle": subtitle, "tail": tails}


def band_layers(result: TResult, edges: tuple[float, float]) -> list[dict[str, Any]]:
    """Vega-Lite layers for the data-scale panel: the band shaded, the ``1 - 2 alpha`` CI.

    Infinite band limits are drawn to the panel's ``edges``; for a one-sided claim the
    interval is the one-sided ``1 - alpha`` bound, also drawn open to the edge.

    Examples
    --------
    >>> import tinfer
    >>> r = tinfer.from_summary(n=30, mean=0.2, sd=1.0, margin=0.5, worse="lower")
    >>> layers = band_layers(r, (-1.0, 1.0))
    >>> layers[0]["data"]["values"]
    [{'b_lo': -0.5, 'b_hi': 1.0}]
    """
    eq = result.equivalence
    lo = eq.low if math.isfinite(eq.low) else edges[0]
    hi = eq.high if math.isfinite(eq.high) else edges[1]
    scale = {"domain": list(edges), "nice": False, "zero": False}

    def x(field: str, title: str | None = None) -> dict[str, Any]:
        return {"field": field, "type": "quantitative", "scale": scale, "title": title}

    ci_lo, ci_hi = eq.ci
    if eq.upper is None:  # one-sided claim: the bound runs open to the panel edge
        ci_hi = edges[1]
    if eq.lower is None:
        ci_lo = edges[0]
    return [
        {
            "description": "margin band",
            "data": {"values": [{"b_lo": lo, "b_hi": hi}]},
            "mark": {"type": "rect", "fill": BAND_FILL, "stroke": BAND},
            "encoding": {"x": x("b_lo"), "x2": {"field": "b_hi"}},
        },
        {
            "description": "interval matching the decision",
            "data": {"values": [{"c_lo": ci_lo, "c_hi": ci_hi}]},
            "mark": {"type": "rule", "color": TOST_CI, "strokeWidth": 3},
            "encoding": {"x": x("c_lo"), "x2": {"field": "c_hi"}},
        },
    ]


def band_panel(result: TResult) -> dict[str, Any]:
    """The data-scale panel: band, ``1 - 2 alpha`` interval and estimate (a Vega-Lite dict)."""
    eq = result.equivalence
    est = result.estimate
    finite = [v for v in (eq.low, eq.high, *eq.ci, est) if math.isfinite(v)]
    span = (max(finite) - min(finite)) or (abs(est) or 1.0)
    edges = (min(finite) - 0.2 * span, max(finite) + 0.2 * span)
    scale = {"domain": list(edges), "nice": False, "zero": False}
    unit = f" ({result.units})" if result.units else ""
    point = {"est": est, "label": fmt_num(est, result.decimals)}
    x = {"field": "est", "type": "quantitative", "scale": scale}
    layers = [
        *band_layers(result, edges),
        {
            "description": "estimate",
            "data": {"values": [point]},
            "mark": {"type": "point", "filled": True, "size": 70, "color": TOST_CI, "opacity": 1},
            "encoding": {"x": {**x, "title": label(f"{result.comparison}{unit}")}},
        },
        {
            "description": "estimate label",
            "data": {"values": [point]},
            "mark": {"type": "text", "dy": -12, "fontSize": 10, "color": INK},
            "encoding": {"x": x, "text": {"field": "label", "type": "nominal"}},
        },
    ]
    verdict = "inside" if eq.decision else "not inside"
    what = level_words(eq)
    return {
        "description": "interval against the margin band",
        "width": WIDTH,
        "height": STRIP_HEIGHT,
        "title": {
            "text": f"{what} against the shaded band: {verdict}",
            "fontSize": 11,
        },
        "layer": layers,
    }


def equivalence_spec(result: TResult, normal: bool = True) -> dict[str, Any]:
    """The Vega-Lite dict: t density with both one-sided tails shaded, and the band panel.

    Examples
    --------
    >>> import tinfer
    >>> r = tinfer.from_summary(n=(10, 12), mean=(5.0, 4.9), sd=(0.5, 0.6), margin=1.0)
    >>> [p["description"] for p in equivalence_spec(r)["vconcat"]]
    ['t density with one-sided tails', 'interval against the margin band']
    """
    eq = result.equivalence
    df = result.df
    L = density.half_width(density_values(result))
    parts = density_parts(result, L)
    rows = density.density_rows(df, L, parts["extra"])
    sub = parts["subtitle"]
    if normal and not math.isinf(df):
        sub += "; dashed: standard normal"
    title = {
        "text": f"t distribution, df = {fmt_df(df)}, each test at {eq.alpha:.3g}",
        "subtitle": sub,
    }
    top = density.density_panel(
        df, L, rows, parts["shade"], parts["marks"], normal, title, tail_labels=parts["tail"]
    )
    top["description"] = "t density with one-sided tails"
    return {"config": config(), "vconcat": [top, band_panel(result)], "spacing": 16}


def equivalence_chart(result: TResult, normal: bool = True):
    """:func:`equivalence_spec` as an Altair chart (not displayed).

    Examples
    --------
    >>> import tinfer
    >>> r = tinfer.from_summary(n=(10, 12), mean=(5.0, 4.9), sd=(0.5, 0.6), margin=1.0)
    >>> type(equivalence_chart(r)).__name__
    'VConcatChart'
    """
    return to_altair(equivalence_spec(result, normal))
