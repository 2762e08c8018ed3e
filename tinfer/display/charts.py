"""Charts for results and for the t distribution, as Vega-Lite specs and Altair charts.

The ``*_spec`` functions build plain Vega-Lite dicts (fast, no altair needed; the HTML card
renders them to SVG). The ``*_chart`` functions wrap the same dicts in Altair chart objects
and never display them. Altair and vl-convert are imported inside the functions, so
``import tinfer`` stays light.

The density is drawn on a fixed grid of :data:`GRID_POINTS` points over ``[-L, L]``, plus the
few marked values (the observed t, the bounds of a shaded area) inserted exactly so that the
shading starts where it should. ``L`` covers the observed t and the critical values with 10%
room, within [:data:`MIN_HALF_WIDTH`, :data:`MAX_HALF_WIDTH`]; a value beyond the range is
marked at its edge with an arrow in its label. Charts hold no raw data, so their size does
not depend on the number of observations.
"""

from __future__ import annotations

import functools
import json
import math
from collections.abc import Iterable, Sequence
from typing import TYPE_CHECKING, Any

import numpy as np

from .._errors import MissingDependencyError
from .._format import fmt_df, fmt_level, fmt_num, fmt_p, p_equals
from ..core import distribution as dist

if TYPE_CHECKING:  # pragma: no cover
    from .._tdist import TDistribution
    from ..results import TResult

GRID_POINTS = 401
MIN_HALF_WIDTH = 4.0
MAX_HALF_WIDTH = 15.0
WIDTH = 400
HEIGHT = 170
STRIP_HEIGHT = 44

# Our own palette. The card's CSS restyles chart text and axes for dark themes.
INK = "#2f3a45"
MUTED = "#6b7682"
GRID = "#e3e7eb"
CURVE = "#1f5f8b"
SHADE = "#f2bd7f"
OBSERVED = "#b0413e"
REFERENCE = "#8a96a3"
FONT = "system-ui, -apple-system, 'Segoe UI', Roboto, 'Helvetica Neue', Arial, sans-serif"

_Q = {"type": "quantitative"}
NORMAL_EXPR = "exp(-datum.x * datum.x / 2) / sqrt(2 * PI)"
NORMAL_PEAK = 1 / math.sqrt(2 * math.pi)


def _altair():
    """Import altair, or raise a MissingDependencyError that says how to install it."""
    try:
        import altair as alt
    except ImportError as exc:  # pragma: no cover - exercised only without altair
        raise MissingDependencyError(
            "Charts need the 'altair' package, which is not installed. "
            "Install it with: pip install 'tinfer[display]'"
        ) from exc
    return alt


def _to_altair(spec: dict[str, Any]):
    alt = _altair()
    return alt.Chart.from_dict(spec, validate=False) if "mark" in spec else _top(alt, spec)


def _top(alt, spec: dict[str, Any]):
    for key, cls in (("vconcat", alt.VConcatChart), ("layer", alt.LayerChart)):
        if key in spec:
            return cls.from_dict(spec, validate=False)
    raise ValueError("unexpected chart spec")  # pragma: no cover


# --------------------------------------------------------------------------- helpers
def half_width(values: Iterable[float]) -> float:
    """Half-width L of the plotted t range: covers ``values`` with 10% room, within [4, 15].

    Examples
    --------
    >>> half_width([2.1, -1.3]), half_width([7.0]), half_width([80.0])
    (4.0, 7.7, 15.0)
    """
    finite = [abs(v) for v in values if math.isfinite(v)]
    want = max([MIN_HALF_WIDTH, *(1.1 * v for v in finite)])
    return float(round(min(want, MAX_HALF_WIDTH), 6))


def density_rows(df: float, L: float, extra: Iterable[float] = ()) -> list[dict[str, float]]:
    """Rows ``{"x", "dens"}`` of the t density on the fixed grid over [-L, L].

    ``extra`` values inside the range are inserted exactly, so that shaded areas start at them.
    Densities keep 5 significant digits; a density that underflows stays a tiny positive
    number or 0, never negative.

    Examples
    --------
    >>> rows = density_rows(10.0, 4.0, extra=[1.2345678])
    >>> len(rows), rows[0]["x"], rows[-1]["x"]
    (402, -4.0, 4.0)
    >>> any(r["x"] == 1.2345678 for r in rows)
    True
    """
    grid = np.round(np.linspace(-L, L, GRID_POINTS), 4)
    # rounding may push the end points just outside [-L, L]: use the exact ends instead
    pts = {float(x) for x in grid[1:-1]} | {-float(L), float(L)}
    pts.update(float(v) for v in extra if math.isfinite(v) and -L <= v <= L)
    x = np.array(sorted(pts))
    dens = dist.pdf(x, df).tolist()
    return [{"x": xi, "dens": _sig(di)} for xi, di in zip(x.tolist(), dens, strict=True)]


def _sig(v: float, digits: int = 5) -> float:
    return float(f"{v:.{digits}g}")


def _clamp(v: float, L: float) -> float:
    return min(max(v, -L), L)


def _mark_label(name: str, value: float, L: float) -> str:
    text = f"{name} {fmt_num(value, 2)}"
    if value > L:
        return text + " →"
    if value < -L:
        return "← " + text
    return text


def config() -> dict[str, Any]:
    """Shared chart configuration: system fonts only (no web fonts), our palette."""
    return {
        "font": FONT,
        "background": "transparent",
        "view": {"stroke": None},
        "axis": {
            "labelColor": INK,
            "titleColor": INK,
            "domainColor": MUTED,
            "tickColor": MUTED,
            "gridColor": GRID,
            "labelFontSize": 10,
            "titleFontSize": 11,
            "titleFontWeight": "normal",
        },
        "title": {
            "color": INK,
            "fontSize": 12,
            "fontWeight": 600,
            "anchor": "start",
            "subtitleColor": MUTED,
            "subtitleFontSize": 10,
        },
    }


def _x(L: float, field: str = "x", title: str | None = "t") -> dict[str, Any]:
    return {
        "field": field,
        **_Q,
        "scale": {"domain": [-L, L], "nice": False, "zero": False},
        "title": title,
        "axis": {"grid": False},
    }


def _marks_layers(marks: list[dict[str, Any]], L: float) -> list[dict[str, Any]]:
    """Vertical rules with labels; each mark row carries its own colour, dash and row."""
    if not marks:
        return []
    out: list[dict[str, Any]] = []
    for kind, colour, width, dash in (
        ("observed", OBSERVED, 2, None),
        ("critical", MUTED, 1, [4, 3]),
        ("percentile", OBSERVED, 1.2, [4, 3]),
    ):
        rows = [m for m in marks if m["kind"] == kind]
        if not rows:
            continue
        mark: dict[str, Any] = {"type": "rule", "color": colour, "strokeWidth": width}
        if dash:
            mark["strokeDash"] = dash
        out.append(
            {
                "description": kind,
                "data": {"values": rows},
                "mark": mark,
                "encoding": {"x": _x(L, "pos", None)},
            }
        )
        for align, dx in (("left", 4), ("right", -4)):
            if any(m["align"] == align for m in rows):
                out.append(
                    {
                        "description": f"{kind} label",
                        "data": {"values": [m for m in rows if m["align"] == align]},
                        "mark": {
                            "type": "text",
                            "align": align,
                            "dx": dx,
                            "baseline": "top",
                            "fontSize": 10,
                            "color": colour if kind != "critical" else INK,
                        },
                        "encoding": {
                            "x": _x(L, "pos", None),
                            "y": {"field": "ypix", **_Q, "scale": None},
                            "text": {"field": "label", "type": "nominal"},
                        },
                    }
                )
    return out


def _mark(kind: str, value: float, label: str, L: float, row: int) -> dict[str, Any]:
    """One vertical mark; :func:`_place_labels` later decides which side its label goes."""
    return {
        "kind": kind,
        "value": value,
        "pos": _clamp(value, L),
        "label": label,
        "ypix": 2 + 14 * row,
        "align": "left",
    }


def _place_labels(marks: list[dict[str, Any]], L: float) -> list[dict[str, Any]]:
    """Put each label on the side away from the nearest other mark, if it fits there.

    A label that would run past the plot edge goes to the other side of its line.
    """
    px_per_unit = WIDTH / (2 * L)
    for m in marks:
        width = (5.6 * len(m["label"]) + 6) / px_per_unit
        others = [o["pos"] for o in marks if o is not m and o["pos"] != m["pos"]]
        nearest = min(others, key=lambda o: abs(o - m["pos"]), default=None)
        if nearest is None:
            right = m["pos"] <= 0
        else:
            right = nearest < m["pos"]
        if right and m["pos"] + width > L:
            right = False
        elif not right and m["pos"] - width < -L:
            right = True
        m["align"] = "left" if right else "right"
    return marks


def _density_panel(
    df: float,
    L: float,
    rows: list[dict[str, float]],
    shade: Sequence[tuple[float, float]],
    marks: list[dict[str, Any]],
    normal: bool,
    title: dict[str, Any],
) -> dict[str, Any]:
    x = _x(L)
    # Head room above the peak keeps the mark labels clear of the curve.
    peak = max(max(r["dens"] for r in rows), NORMAL_PEAK if normal else 0.0)
    y_scale = {"domain": [0, _sig(1.3 * peak, 3)], "nice": False}
    layers: list[dict[str, Any]] = [
        {
            "description": "shaded area",
            "mark": {"type": "area", "color": SHADE, "opacity": 1},
            "transform": [{"filter": {"field": "x", "range": [lo, hi]}}],
            "encoding": {"x": x, "y": {"field": "dens", **_Q, "scale": y_scale}},
        }
        for lo, hi in shade
    ]
    layers.append(
        {
            "description": "t density",
            "mark": {"type": "line", "color": CURVE, "strokeWidth": 2},
            "encoding": {
                "x": x,
                "y": {
                    "field": "dens",
                    **_Q,
                    "title": "density",
                    "scale": y_scale,
                    "axis": {"tickCount": 4},
                },
            },
        }
    )
    if normal and not math.isinf(df):
        layers.append(
            {
                "description": "standard normal",
                "mark": {
                    "type": "line",
                    "color": REFERENCE,
                    "strokeDash": [5, 4],
                    "strokeWidth": 1.3,
                },
                # exact standard normal density, computed by Vega from x (keeps the spec small)
                "transform": [{"calculate": NORMAL_EXPR, "as": "norm"}],
                "encoding": {"x": x, "y": {"field": "norm", **_Q, "scale": y_scale}},
            }
        )
    layers += _marks_layers(_place_labels(marks, L), L)
    return {
        "width": WIDTH,
        "height": HEIGHT,
        "title": title,
        "data": {"values": rows},
        "layer": layers,
    }


# --------------------------------------------------------------------------- results
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
    from .._tdist import tdist

    if result.equivalence is not None:
        from .equivalence import equivalence_spec

        return equivalence_spec(result, normal)
    df, t, side, level = result.df, result.t, result.side, result.level
    crit = tdist(df).critical(level, side)
    crits = [-crit, crit] if side == "two-sided" else [crit]
    # Widen the range for the observed t only while it fits; further out, t is marked at
    # the edge with an arrow and the curve keeps a readable scale.
    shown_t = [t] if 1.1 * abs(t) <= MAX_HALF_WIDTH else []
    L = half_width([*shown_t, *crits])
    if side == "two-sided":
        a = min(abs(t), L)
        shade, extra = [(-L, -a), (a, L)], [-a, a]
    elif side == "upper":
        a = _clamp(t, L)
        shade, extra = [(a, L)], [a]
    else:
        a = _clamp(t, L)
        shade, extra = [(-L, a)], [a]
    rows = density_rows(df, L, extra)
    marks = [_mark("observed", t, _mark_label("t =", t, L), L, 0)]
    marks += [_mark("critical", c, _mark_label("critical", c, L), L, 1) for c in crits]
    sub = f"shaded area: {p_equals(result.p, result.log_p)} ({side})"
    if normal and not math.isinf(df):
        sub += "; dashed: standard normal"
    title = {"text": f"t distribution, df = {fmt_df(df)}", "subtitle": sub}
    top = _density_panel(df, L, rows, shade, marks, normal, title)
    top["description"] = "t density with p-value"
    return {
        "config": config(),
        "vconcat": [top, _interval_panel(result)],
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
    return _to_altair(result_spec(result, normal))


def _interval_panel(result: TResult) -> dict[str, Any]:
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

    x_title = f"{result.comparison}{unit}"

    def x(field: str) -> dict[str, Any]:
        axis = {"grid": False, "tickCount": 6}
        return {"field": field, **_Q, "scale": scale, "title": x_title, "axis": axis}

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
    side_word = "" if result.side == "two-sided" else " (one-sided)"
    return {
        "description": "estimate and interval",
        "width": WIDTH,
        "height": STRIP_HEIGHT,
        "title": {"text": f"estimate and {fmt_level(result.level)} CI{side_word}", "fontSize": 11},
        "data": {"values": [row]},
        "layer": layers,
    }


# --------------------------------------------------------------------------- t distribution
def tdist_spec(
    distribution: TDistribution,
    low: float | None = None,
    high: float | None = None,
    percentiles: Sequence[float] = (0.025, 0.975),
    normal: bool = True,
) -> dict[str, Any]:
    """The Vega-Lite dict behind :func:`tdist_chart`.

    Examples
    --------
    >>> import tinfer
    >>> spec = tdist_spec(tinfer.tdist(5), low=1.0)
    >>> [layer["description"] for layer in spec["layer"]][:3]
    ['shaded area', 't density', 'standard normal']
    """
    df = distribution.df
    qs = [float(q) for q in percentiles]
    q_vals = [float(distribution.percentile(q)) for q in qs] if qs else []
    bounds = [float(v) for v in (low, high) if v is not None]
    L = half_width([*bounds, *q_vals])
    shade: list[tuple[float, float]] = []
    extra = [v for v in q_vals]
    if bounds:
        a = -L if low is None else _clamp(float(low), L)
        b = L if high is None else _clamp(float(high), L)
        shade = [(a, b)]
        extra += [a, b]
    rows = density_rows(df, L, extra)
    marks = [
        _mark("percentile", v, _mark_label(f"{100 * q:.4g}%:", v, L), L, i % 2)
        for i, (q, v) in enumerate(zip(qs, q_vals, strict=True))
    ]
    sub = []
    if bounds:
        sub.append(f"shaded: {area_words(low, high)} = {fmt_p(distribution.area(low, high))}")
    if normal and not math.isinf(df):
        sub.append("dashed: standard normal")
    title = {"text": f"t distribution, df = {fmt_df(df)}", "subtitle": "; ".join(sub) or " "}
    spec = _density_panel(df, L, rows, shade, marks, normal, title)
    spec["description"] = "t distribution"
    spec["config"] = config()
    return spec


def tdist_chart(
    distribution: TDistribution,
    low: float | None = None,
    high: float | None = None,
    percentiles: Sequence[float] = (0.025, 0.975),
    normal: bool = True,
):
    """The density of ``distribution`` with P(low < T < high) shaded and percentiles marked.

    Parameters
    ----------
    distribution : TDistribution
        The t distribution to draw.
    low, high : float or None
        Bounds of the shaded area; leave one out for a tail, both out for no shading.
    percentiles : sequence of float
        Lower-tail probabilities whose values are marked.
    normal : bool
        Add the standard normal density as a dashed reference curve.

    Returns
    -------
    altair.LayerChart

    Examples
    --------
    >>> import tinfer
    >>> type(tdist_chart(tinfer.tdist(5), low=1.0)).__name__
    'LayerChart'
    """
    return _to_altair(tdist_spec(distribution, low, high, percentiles, normal))


def area_words(low: float | None, high: float | None) -> str:
    """The requested area in symbols, e.g. ``P(-1 < T < 2)``.

    >>> area_words(None, 2.0), area_words(-1.0, 2.0)
    ('P(T < 2)', 'P(-1 < T < 2)')
    """
    if low is None and high is None:
        return "P(−∞ < T < ∞)"
    if low is None:
        return f"P(T < {fmt_num(high)})"
    if high is None:
        return f"P(T > {fmt_num(low)})"
    return f"P({fmt_num(low)} < T < {fmt_num(high)})"


# --------------------------------------------------------------------------- card palette
# Colours for series in charts drawn with Altair's defaults (plans, batches, checks). The
# first is CURVE, so the stylesheet gives it the theme's curve colour.
SERIES = [CURVE, "#c0612b", "#5f8f4e", "#8a5fa8", "#b08a1e", "#4f8d94", "#a0527a", "#6b7682"]
# Named colours Altair charts use, turned into palette colours the stylesheet restyles.
NAMED = {"black": INK, "gray": REFERENCE, "grey": REFERENCE}


def _merge(base: dict[str, Any], extra: dict[str, Any]) -> dict[str, Any]:
    out = dict(base)
    for k, v in extra.items():
        out[k] = _merge(out[k], v) if isinstance(v, dict) and isinstance(out.get(k), dict) else v
    return out


def _renamed(node: Any) -> Any:
    """Replace named colours in colour properties only (never in data, titles or labels)."""
    if isinstance(node, dict):
        out = {}
        for k, v in node.items():
            if k in ("data", "datasets"):
                out[k] = v
            elif k in ("color", "fill", "stroke") and isinstance(v, str):
                out[k] = NAMED.get(v.lower(), v)
            else:
                out[k] = _renamed(v)
        return out
    if isinstance(node, list):
        return [_renamed(v) for v in node]
    return node


def card_spec(chart_or_spec) -> dict[str, Any]:
    """A chart's Vega-Lite dict in the card palette: our fonts, axes, legends and series.

    Marks carry no ARIA labels (the card describes the chart once, on its container).

    Named colours ("black", "gray") become palette colours, so that the card's stylesheet can
    restyle them for dark themes. The data are left as they are.

    Examples
    --------
    >>> spec = card_spec({"mark": {"type": "rule", "color": "black"}, "data": {"values": []}})
    >>> spec["mark"]["color"] == INK, spec["config"]["range"]["category"][0] == CURVE
    (True, True)
    """
    spec = _renamed(
        chart_or_spec if isinstance(chart_or_spec, dict) else chart_or_spec.to_dict(validate=False)
    )
    extra = {
        # the card's chart element carries one description; per-mark ARIA labels would
        # repeat every point's values in the SVG and make it grow with the points drawn
        "aria": False,
        # room for labels that the browser's font sets wider than vl-convert measured
        "padding": {"left": 24, "top": 4, "right": 12, "bottom": 4},
        "legend": {"labelColor": INK, "titleColor": INK, "labelFontSize": 10, "titleFontSize": 10},
        "header": {"labelColor": INK, "titleColor": INK},
        "range": {"category": SERIES},
    }
    spec["config"] = _merge(_merge(spec.get("config", {}), config()), extra)
    return spec


# --------------------------------------------------------------------------- rendering
def to_svg(chart_or_spec) -> str:
    """Render a chart (or a Vega-Lite dict) to SVG with vl-convert, offline.

    External data requests are refused (``allowed_base_urls=[]``); the charts hold inline data
    only, so no network is needed. Text is set in the system font stack :data:`FONT`, so no
    web font is ever requested. The last :data:`SVG_CACHE_SIZE` renders are kept (keyed by
    the spec's JSON), so showing the same result again is instant; the cache never grows
    beyond that.
    """
    spec = (
        chart_or_spec if isinstance(chart_or_spec, dict) else chart_or_spec.to_dict(validate=False)
    )
    return _svg(json.dumps(spec, sort_keys=True, allow_nan=False))


SVG_CACHE_SIZE = 16


@functools.lru_cache(maxsize=SVG_CACHE_SIZE)
def _svg(spec_json: str) -> str:
    try:
        import vl_convert as vlc
    except ImportError as exc:  # pragma: no cover - exercised only without vl-convert
        raise MissingDependencyError(
            "Rendering charts to SVG needs the 'vl-convert-python' package, which is not "
            "installed. Install it with: pip install 'tinfer[display]'"
        ) from exc
    return vlc.vegalite_to_svg(spec_json, allowed_base_urls=[])
