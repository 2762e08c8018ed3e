"""The estimate panel: an estimate with its interval against ``null``, on the data's scale.

Drawn under the t density in the t-test chart (:mod:`tinfer.display.ttest`). A plain
Vega-Lite dict, built without altair.
"""

from __future__ import annotations

import math
from typing import Any

from ..results.format import fmt_level, fmt_num
from ..results.ttest import TResult
from .charts import CURVE, INK, MUTED, STRIP_HEIGHT, WIDTH, Q
from .clean import label


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
