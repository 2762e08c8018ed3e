"""Chart machinery shared by every card: the palette, the Altair bridge and SVG rendering.

Charts are built as plain Vega-Lite dicts (fast, no altair needed; the cards render them to
SVG with vl-convert) or as Altair charts, which functions return and never display. Altair
and vl-convert are imported only when a chart is drawn (:mod:`tinfer.optional`), so
``import tinfer`` stays light. Charts hold no raw data, so their size does not depend on the
number of observations.
"""

from __future__ import annotations

import functools
import json
import math
from typing import Any

from ..optional import require
from .clean import clean_spec

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
TAIL = "#c76b1a"  # the bar under a tail too thin to see
FONT = "system-ui, -apple-system, 'Segoe UI', Roboto, 'Helvetica Neue', Arial, sans-serif"

Q = {"type": "quantitative"}
NORMAL_EXPR = "exp(-datum.x * datum.x / 2) / sqrt(2 * PI)"
NORMAL_PEAK = 1 / math.sqrt(2 * math.pi)


def altair():
    """Import altair, or raise a MissingDependencyError that says how to install it."""
    return require("altair", "charts")


def to_altair(spec: dict[str, Any]):
    """A Vega-Lite dict as the matching Altair chart object, its text made safe to render
    (:func:`tinfer.display.clean.clean_spec`); not validated: our own specs."""
    return _build(altair(), clean_spec(spec))


def _build(alt, spec: dict[str, Any]):
    """Altair objects around the dict's own parts (no schema walk: ``from_dict`` resolves
    every nested object against the schema, which costs about 100 times as much)."""
    kinds = (
        ("layer", alt.LayerChart),
        ("vconcat", alt.VConcatChart),
        ("hconcat", alt.HConcatChart),
        ("concat", alt.ConcatChart),
    )
    for key, cls in kinds:
        if key in spec:
            rest = {k: v for k, v in spec.items() if k != key}
            return cls(**{key: [_build(alt, s) for s in spec[key]]}, **rest)
    unit = dict(spec)
    if "encoding" in unit:
        unit["encoding"] = alt.FacetedEncoding(**unit["encoding"])
    return alt.Chart(**unit)


def finish(chart):
    """An Altair chart built from users' labels, returned with every text safe to render.

    The chart itself when nothing needed cleaning, else the cleaned copy.
    """
    spec = chart.to_dict(validate=False)
    cleaned = clean_spec(spec)
    return chart if cleaned == spec else to_altair(cleaned)


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
        # x ticks never run together: browsers set the system font a little wider than the
        # renderer measures it, so labels keep a wide gap and drop out before touching
        "axisX": {"tickCount": 6, "labelOverlap": "greedy", "labelSeparation": 16},
        "title": {
            "color": INK,
            "fontSize": 12,
            "fontWeight": 600,
            "anchor": "start",
            "subtitleColor": MUTED,
            "subtitleFontSize": 10,
        },
    }


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
    """Render a chart (or a Vega-Lite dict) to SVG with vl-convert, offline, its text cleaned.

    External data requests are refused (``allowed_base_urls=[]``); the charts hold inline data
    only, so no network is needed. Text is set in the system font stack :data:`FONT`, so no
    web font is ever requested. The last :data:`SVG_CACHE_SIZE` renders are kept (keyed by
    the spec's JSON), so showing the same result again is instant; the cache never grows
    beyond that.
    """
    spec = (
        chart_or_spec if isinstance(chart_or_spec, dict) else chart_or_spec.to_dict(validate=False)
    )
    return _svg(json.dumps(clean_spec(spec), sort_keys=True, allow_nan=False))


SVG_CACHE_SIZE = 16


@functools.lru_cache(maxsize=SVG_CACHE_SIZE)
def _svg(spec_json: str) -> str:
    vlc = require("vl_convert", "rendering charts to SVG")
    return vlc.vegalite_to_svg(spec_json, allowed_base_urls=[])
