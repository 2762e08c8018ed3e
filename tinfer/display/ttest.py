"""The card and chart of one t test (:class:`~tinfer.TResult`).

The card: headline, the test's numbers, per-group descriptives, the hypotheses, the chart
and a provenance line, built from the blocks of :mod:`tinfer.display.html`. The chart: the
t density with the p-value shaded (:mod:`tinfer.display.density`) above the estimate with
its interval. A result with a margin claim gets the equivalence section and chart
(:mod:`tinfer.display.equivalence`) instead.
"""

from __future__ import annotations

import math
from typing import Any

from ..core import distribution as dist
from ..results.format import fmt_df, fmt_level, fmt_num, fmt_p, p_equals
from ..results.ttest import TResult
from ..results.words import capital
from .charts import CURVE, INK, MUTED, STRIP_HEIGHT, WIDTH, Q, config, to_altair
from .clean import label
from .density import (
    MAX_HALF_WIDTH,
    clamp,
    density_panel,
    density_rows,
    half_width,
    mark,
    mark_label,
)
from .equivalence import card_section, equivalence_spec
from .html import (
    aside,
    chart_block,
    esc,
    figures_table,
    head,
    notes,
    num,
    provenance,
    section,
    version_item,
    when,
    wrap,
)
from .render import card


def result_figures(result: TResult) -> str:
    """The compact table of the test's numbers."""
    e = result.effect
    e_lo, e_hi = (fmt_num(v, 3) if math.isfinite(v) else fmt_num(v) for v in e.ci)
    rows = [
        (
            "Estimate",
            num(result.fmt(result.estimate), strong=True)
            + aside(f"(SE {fmt_num(result.se, result.decimals + 1)})"),
        ),
        (f"{fmt_level(result.level)} CI", num(result.interval_words())),
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
            version_item(),
            ("computed", when(result.created)),
            ("level", esc(fmt_level(result.level))),
            ("side", esc(result.side)),
            ("null", esc(result.fmt(result.null))),
            ("pooled", "yes" if result.pooled else "no"),
            ("fingerprint", f"<code>{esc(result.fingerprint)}</code>"),
        ]
    )


@card.register
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
        + card_section(result)
        + section("groups")
        + groups_table(result)
        + section("hypotheses")
        + figures_table(
            [
                ("Null", esc(capital(result.null_hypothesis))),
                ("Alternative", esc(capital(result.alternative))),
            ],
            "tinfer-figures tinfer-hypotheses",
        )
    )
    chart_html = (
        chart_block(
            lambda: result_spec(result),
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


def result_spec(result: TResult, normal: bool = True) -> dict[str, Any]:
    """The Vega-Lite dict behind :func:`result_chart`.

    A result with a margin claim gets the equivalence chart
    (:func:`tinfer.display.equivalence.equivalence_spec`) instead.

    Examples
    --------
    >>> import tinfer
    >>> r = tinfer.from_summary(n=12, mean=5.4, sd=1.1, null=5.0)
    >>> [p["description"] for p in result_spec(r)["vconcat"]]
    ['t density with p-value', 'estimate and interval']
    """
    if result.equivalence is not None:
        return equivalence_spec(result, normal)
    df, t, side, level = result.df, result.t, result.side, result.level
    crit = float(dist.critical(df, level, side))
    crits = [-crit, crit] if side == "two-sided" else [crit]
    # Widen the range for the observed t only while it fits; further out, t is marked at
    # the edge with an arrow and the curve keeps a readable scale.
    shown_t = [t] if 1.1 * abs(t) <= MAX_HALF_WIDTH else []
    L = half_width([*shown_t, *crits])
    if side == "two-sided":
        a = min(abs(t), L)
        shade, extra = [(-L, -a), (a, L)], [-a, a]
    elif side == "upper":
        a = clamp(t, L)
        shade, extra = [(a, L)], [a]
    else:
        a = clamp(t, L)
        shade, extra = [(-L, a)], [a]
    rows = density_rows(df, L, extra)
    marks = [mark("observed", t, mark_label("t =", t, L), L, 0)]
    marks += [mark("critical", c, mark_label("critical", c, L), L, 1) for c in crits]
    sub = f"shaded area: {p_equals(result.p, result.log_p)} ({side})"
    if normal and not math.isinf(df):
        sub += "; dashed: standard normal"
    title = {"text": f"t distribution, df = {fmt_df(df)}", "subtitle": sub}
    top = density_panel(df, L, rows, shade, marks, normal, title)
    top["description"] = "t density with p-value"
    return {
        "config": config(),
        "vconcat": [top, interval_panel(result)],
        "spacing": 16,
    }


def result_chart(result: TResult, normal: bool = True):
    """Two panels for a t test: the t density with the p-value shaded, and the estimate's CI.

    Parameters
    ----------
    result : TResult
        The result to draw.
    normal : bool
        Add the standard normal density as a dashed reference curve.

    Returns
    -------
    altair.VConcatChart
        Not displayed; show it by leaving it last in a notebook cell.

    Examples
    --------
    >>> import tinfer
    >>> r = tinfer.from_summary(n=12, mean=5.4, sd=1.1, null=5.0)
    >>> type(result_chart(r)).__name__
    'VConcatChart'
    """
    return to_altair(result_spec(result, normal))


def interval_panel(result: TResult) -> dict[str, Any]:
    """The estimate with its interval against ``null``, on the data's own scale.

    An infinite (one-sided) limit is drawn to the panel edge, ended by a triangle.
    """
    lo, hi = result.ci
    est, null = result.estimate, result.null
    finite = [v for v in (lo, hi, est, null) if math.isfinite(v)]
    span = max(finite) - min(finite)
    if not span > 0:
        span = abs(est) or 1.0
    edge_lo, edge_hi = min(finite) - 0.2 * span, max(finite) + 0.2 * span
    dec = result.decimals
    row = {
        "est": est,
        "lo": lo if math.isfinite(lo) else edge_lo,
        "hi": hi if math.isfinite(hi) else edge_hi,
        "null": null,
        "label": fmt_num(est, dec),
        "null_label": f"null {fmt_num(null, dec)}",
    }
    unit = f" ({result.units})" if result.units else ""
    scale = {"domain": [edge_lo, edge_hi], "nice": False, "zero": False}

    x_title = label(f"{result.comparison}{unit}")

    def x(field: str) -> dict[str, Any]:
        axis = {"grid": False, "tickCount": 6}
        return {"field": field, **Q, "scale": scale, "title": x_title, "axis": axis}

    layers: list[dict[str, Any]] = [
        {
            "description": "null",
            "mark": {"type": "rule", "color": MUTED, "strokeDash": [2, 3]},
            "encoding": {"x": x("null")},
        },
        {
            "description": "interval",
            "mark": {"type": "rule", "color": CURVE, "strokeWidth": 3},
            "encoding": {"x": x("lo"), "x2": {"field": "hi"}},
        },
        {
            "description": "estimate",
            "mark": {"type": "point", "filled": True, "size": 70, "color": CURVE, "opacity": 1},
            "encoding": {"x": x("est")},
        },
        {
            "description": "estimate label",
            "mark": {"type": "text", "dy": -12, "fontSize": 10, "color": INK},
            "encoding": {"x": x("est"), "text": {"field": "label", "type": "nominal"}},
        },
        {
            "description": "null label",
            "mark": {
                "type": "text",
                "align": "left",
                "dx": 4,
                "dy": 14,
                "fontSize": 9,
                "color": MUTED,
            },
            "encoding": {"x": x("null"), "text": {"field": "null_label", "type": "nominal"}},
        },
    ]
    layers += _open_ends(lo, hi, edge_lo, edge_hi, x)
    side_word = "" if result.side == "two-sided" else " (one-sided)"
    return {
        "description": "estimate and interval",
        "width": WIDTH,
        "height": STRIP_HEIGHT,
        "title": {"text": f"estimate and {fmt_level(result.level)} CI{side_word}", "fontSize": 11},
        "data": {"values": [row]},
        "layer": layers,
    }


def _open_ends(lo: float, hi: float, edge_lo: float, edge_hi: float, x) -> list[dict[str, Any]]:
    """A triangle at the panel edge for each infinite (one-sided) limit of the interval."""
    layers: list[dict[str, Any]] = []
    for limit, edge, shape in ((lo, edge_lo, "triangle-left"), (hi, edge_hi, "triangle-right")):
        if not math.isfinite(limit):
            layers.append(
                {
                    "description": "open end",
                    "data": {"values": [{"edge": edge}]},
                    "mark": {
                        "type": "point",
                        "shape": shape,
                        "filled": True,
                        "size": 60,
                        "color": CURVE,
                        "opacity": 1,
                    },
                    "encoding": {"x": x("edge")},
                }
            )
    return layers
