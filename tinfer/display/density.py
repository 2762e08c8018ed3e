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
    TAIL,
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


def critical_marks(values: Sequence[float], L: float) -> list[dict[str, Any]]:
    """Marks for critical values; a symmetric pair carries one label, "critical ±2.08"."""
    if len(values) == 2 and math.isclose(values[0], -values[1]):
        c = abs(values[0])
        text = mark_label("critical ±", c, L).replace("± ", "±")
        return [mark("critical", -c, "", L), mark("critical", c, text, L)]
    return [mark("critical", v, mark_label("critical", v, L), L) for v in values]


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
            shown = [m for m in rows if m["align"] == align and m["label"]]
            if shown:
                out.append(
                    {
                        "description": f"{kind} label",
                        "data": {"values": shown},
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


def mark(kind: str, value: float, label: str, L: float, row: int = 0) -> dict[str, Any]:
    """One vertical mark; :func:`place_labels` later decides the row and side of its label."""
    return {
        "kind": kind,
        "value": value,
        "pos": clamp(value, L),
        "label": label,
        "ypix": LABEL_TOP,
        "align": "left",
    }


#: Top of the first label row, the rows' spacing, and the rows there are: every row lies
#: in the head room above the curve's peak (the y scale reaches 1.3 times the peak).
LABEL_TOP, LABEL_ROW, LABEL_ROWS = 2, 13, 3
CHAR_PX = 6.2  # a generous width of one 10-px character, for collision checks


def place_labels(marks: list[dict[str, Any]], L: float) -> list[dict[str, Any]]:
    """Give each label a row and a side where it crosses no other mark's line, overlaps no
    other label and stays inside the plot; observed values are placed first.

    Examples
    --------
    >>> ms = [mark("critical", -2.0, "critical −2.00", 4.0), mark("observed", -1.8, "t −1.80", 4.0)]
    >>> [(m["label"], m["align"], m["ypix"]) for m in place_labels(ms, 4.0)]
    [('critical −2.00', 'right', 2), ('t −1.80', 'left', 2)]
    """
    px = WIDTH / (2 * L)
    xs = [(m["pos"] + L) * px for m in marks]
    taken: list[tuple[int, float, float]] = []
    order = sorted(range(len(marks)), key=lambda i: marks[i]["kind"] != "observed")
    for i in order:
        m, x = marks[i], xs[i]
        if not m["label"]:
            continue
        width = CHAR_PX * len(m["label"]) + 6
        lines = [xs[j] for j in range(len(marks)) if j != i and abs(xs[j] - x) > 0.5]
        outward = "right" if x >= WIDTH / 2 else "left"
        sides = [outward, "left" if outward == "right" else "right"]

        def cost(choice: tuple[int, str], x=x, width=width, lines=lines) -> float:
            row, side = choice
            lo, hi = (x, x + width) if side == "right" else (x - width, x)
            outside = max(0.0, -lo) + max(0.0, hi - WIDTH)
            crossed = sum(lo < v < hi for v in lines)
            clash = sum(r == row and lo < b and a < hi for r, a, b in taken)
            return 1000 * clash + 100 * outside + 10 * crossed + row

        row, side = min(((r, s) for r in range(LABEL_ROWS) for s in sides), key=cost)
        lo, hi = (x, x + width) if side == "right" else (x - width, x)
        taken.append((row, lo, hi))
        m["align"] = "left" if side == "right" else "right"
        m["ypix"] = LABEL_TOP + LABEL_ROW * row
    return marks


def tail_layers(
    shade: Sequence[tuple[float, float]],
    df: float,
    L: float,
    peak: float,
    labels: Sequence[str],
    lines: Sequence[float] = (),
) -> list[dict[str, Any]]:
    """A bar along the axis under each shaded tail too thin to see, and its area beside it.

    A tail is too thin when the density over it stays below 6% of the peak (about 8 px):
    the shading is then drawn but invisible, so the bar shows where the p-value lies.
    ``labels`` go with the shaded areas in order ("" for none); a label sits beside its
    tail's inner edge, half way up, unless it would cross a marked line or another label.
    """
    bars, texts = [], []
    for (lo, hi), label in zip(shade, labels, strict=True):
        if not hi > lo or float(max(dist.pdf(np.array([lo, hi]), df))) >= 0.06 * peak:
            continue
        bars.append({"lo": lo, "hi": hi})
        placed = _tail_text(lo, hi, L, label, lines) if label else None
        if placed is not None and not any(_overlap(placed, t, L) for t in texts):
            texts.append(placed)
    if not bars:
        return []
    bar_x = x_encoding(L, "lo", None)
    layers: list[dict[str, Any]] = [
        {
            "description": "thin tail",
            "data": {"values": bars},
            "mark": {"type": "rule", "color": TAIL, "strokeWidth": 6, "strokeCap": "butt"},
            "encoding": {"x": bar_x, "x2": {"field": "hi"}, "y": {"value": HEIGHT - 3}},
        }
    ]
    for align, dx in (("right", -5), ("left", 5)):
        rows = [t for t in texts if t["align"] == align]
        if rows:
            layers.append(
                {
                    "description": "thin tail label",
                    "data": {"values": rows},
                    "mark": {
                        "type": "text",
                        "align": align,
                        "baseline": "middle",
                        "dx": dx,
                        "fontSize": 10,
                        "color": TAIL,
                    },
                    "encoding": {
                        "x": bar_x,
                        "y": {"value": round(0.6 * HEIGHT)},
                        "text": {"field": "text", "type": "nominal"},
                    },
                }
            )
    return layers


def _overlap(a: dict, b: dict, L: float) -> bool:
    """Whether two tail labels (anchor, width in characters, side) share any x."""

    def span(t: dict) -> tuple[float, float]:
        w = (CHAR_PX * len(t["text"]) + 8) * (2 * L) / WIDTH
        return (t["lo"] - w, t["lo"]) if t["align"] == "right" else (t["lo"], t["lo"] + w)

    (a0, a1), (b0, b1) = span(a), span(b)
    return a0 < b1 and b0 < a1


def _tail_text(lo: float, hi: float, L: float, label: str, lines: Sequence[float]):
    """Where a thin tail's label goes: beside the tail's inner edge, half way up, where the
    curve is near zero; None when that would cross a marked line (the subtitle then
    carries the number alone)."""
    at_right = lo > 0 or hi >= L
    edge = lo if at_right else hi
    text = f"{label} →" if at_right else f"← {label}"
    span = (CHAR_PX * len(text) + 8) * (2 * L) / WIDTH
    inside = (edge - span, edge) if at_right else (edge, edge + span)
    if inside[0] < -L or inside[1] > L:
        return None
    if any(inside[0] < v < inside[1] and abs(v - edge) > 1e-9 * L for v in lines):
        return None
    return {"lo": edge, "text": text, "align": "right" if at_right else "left"}


def subtitle_lines(text: str, width: int = 64) -> list[str]:
    """A subtitle as lines of at most about ``width`` characters, split at "; " first.

    >>> subtitle_lines("shaded area: p = 0.01 (two-sided); dashed: standard normal", 40)
    ['shaded area: p = 0.01 (two-sided)', 'dashed: standard normal']
    """
    lines: list[str] = []
    for part in text.split("; "):
        if lines and len(lines[-1]) + 2 + len(part) <= width:
            lines[-1] += "; " + part
        else:
            lines.append(part)
    return lines


def density_panel(
    df: float,
    L: float,
    rows: list[dict[str, float]],
    shade: Sequence[tuple[float, float]],
    marks: list[dict[str, Any]],
    normal: bool,
    title: dict[str, Any],
    tail_labels: Sequence[str] = (),
) -> dict[str, Any]:
    """The density with its shaded areas, the normal curve, marked values and, where a shaded
    tail is too thin to see, a bar that shows it (labelled by ``tail_labels``, one per
    shaded area)."""
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
    if tail_labels:
        lines = [m["pos"] for m in marks]
        layers += tail_layers(shade, df, L, peak, tail_labels, lines)
    if isinstance(title.get("subtitle"), str):
        title = {**title, "subtitle": subtitle_lines(title["subtitle"])}
    return {
        "width": WIDTH,
        "height": HEIGHT,
        "title": title,
        "data": {"values": rows},
        "layer": layers,
    }
