"""The t-density panel shared by the result, equivalence and t-distribution charts.

The density is drawn on a fixed grid of :data:`GRID_POINTS` points over ``[-L, L]``, plus the
few marked values (the observed t, the bounds of a shaded area) inserted exactly so that the
shading starts where it should. ``L`` covers the observed t and the critical values with 10%
room, within [:data:`MIN_HALF_WIDTH`, :data:`MAX_HALF_WIDTH`]; a value beyond the range is
marked at its edge with an arrow in its label. Plain Vega-Lite dicts, built without altair.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from typing import Any

import numpy as np

from ..core import distribution as dist
from ..results.format import fmt_num
from .charts import (
    CURVE,
    HEIGHT,
    INK,
    MUTED,
    NORMAL_EXPR,
    NORMAL_PEAK,
    OBSERVED,
    REFERENCE,
    SHADE,
    WIDTH,
    Q,
)

GRID_POINTS = 401
MIN_HALF_WIDTH = 4.0
MAX_HALF_WIDTH = 15.0


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
    return [{"x": xi, "dens": sig(di)} for xi, di in zip(x.tolist(), dens, strict=True)]


def sig(v: float, digits: int = 5) -> float:
    return float(f"{v:.{digits}g}")


def clamp(v: float, L: float) -> float:
    return min(max(v, -L), L)


def mark_label(name: str, value: float, L: float) -> str:
    text = f"{name} {fmt_num(value, 2)}"
    if value > L:
        return text + " →"
    if value < -L:
        return "← " + text
    return text


def x_encoding(L: float, field: str = "x", title: str | None = "t") -> dict[str, Any]:
    return {
        "field": field,
        **Q,
        "scale": {"domain": [-L, L], "nice": False, "zero": False},
        "title": title,
        "axis": {"grid": False},
    }


def marks_layers(marks: list[dict[str, Any]], L: float) -> list[dict[str, Any]]:
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
                "encoding": {"x": x_encoding(L, "pos", None)},
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
                            "x": x_encoding(L, "pos", None),
                            "y": {"field": "ypix", **Q, "scale": None},
                            "text": {"field": "label", "type": "nominal"},
                        },
                    }
                )
    return out


def mark(kind: str, value: float, label: str, L: float, row: int) -> dict[str, Any]:
    """One vertical mark; :func:`_place_labels` later decides which side its label goes."""
    return {
        "kind": kind,
        "value": value,
        "pos": clamp(value, L),
        "label": label,
        "ypix": 2 + 14 * row,
        "align": "left",
    }


def place_labels(marks: list[dict[str, Any]], L: float) -> list[dict[str, Any]]:
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


def density_panel(
    df: float,
    L: float,
    rows: list[dict[str, float]],
    shade: Sequence[tuple[float, float]],
    marks: list[dict[str, Any]],
    normal: bool,
    title: dict[str, Any],
) -> dict[str, Any]:
    x = x_encoding(L)
    # Head room above the peak keeps the mark labels clear of the curve.
    peak = max(max(r["dens"] for r in rows), NORMAL_PEAK if normal else 0.0)
    y_scale = {"domain": [0, sig(1.3 * peak, 3)], "nice": False}
    layers: list[dict[str, Any]] = [
        {
            "description": "shaded area",
            "mark": {"type": "area", "color": SHADE, "opacity": 1},
            "transform": [{"filter": {"field": "x", "range": [lo, hi]}}],
            "encoding": {"x": x, "y": {"field": "dens", **Q, "scale": y_scale}},
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
                    **Q,
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
                "encoding": {"x": x, "y": {"field": "norm", **Q, "scale": y_scale}},
            }
        )
    layers += marks_layers(place_labels(marks, L), L)
    return {
        "width": WIDTH,
        "height": HEIGHT,
        "title": title,
        "data": {"values": rows},
        "layer": layers,
    }
