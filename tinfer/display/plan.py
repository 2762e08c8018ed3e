"""The card and power curves of a :class:`~tinfer.PlanResult` (sample size, power or effect).

Built from the same blocks as the result card (:mod:`tinfer.display.html`): the packaged
stylesheet, a plain-text fallback holding ``str(plan)``, a kicker naming what was solved,
the plan's sentence as headline, its numbers, the power curve as inline SVG and a line of
the inputs. Every word comes from :mod:`tinfer.results.plan`; every string passes through
``html.escape``; there is no JavaScript and no id. The curves' powers come from
:mod:`tinfer.core.power`.
"""

from __future__ import annotations

import numpy as np

from ..checks import check_level
from ..core import power as pw
from ..errors import ParameterError
from ..results.format import fmt_level, fmt_sig
from ..results.plan import PlanResult, design_words, margin_words, size_words, test_words
from .charts import altair
from .html import (
    altair_block,
    aside,
    card_start,
    data_table,
    esc,
    figures_table,
    notes,
    num,
    provenance,
    version_item,
    wrap,
)
from .render import card

MAX_ROWS = 20
GRID_CHART_MAX = 40  # grid points up to which the card draws the curves
SOLVED = {"n": "sample size", "power": "power", "effect": "smallest detectable effect"}
COLUMNS = {
    "n": "n",
    "n2": "n (second group)",
    "n_total": "n in all",
    "effect": "effect (SD units)",
    "diff": "difference",
    "power": "power",
    "target": "target power",
}


def _g(x, digits: int = 4) -> str:
    return fmt_sig(float(x), digits)


def kicker(p: PlanResult) -> str:
    """What the plan answers, and for which test.

    >>> import tinfer
    >>> kicker(tinfer.plan("paired", effect=0.4, power=0.9))
    'Study plan · sample size · paired t test'
    """
    return f"Study plan · {SOLVED[p.solved]} · {design_words(p)}"


def single_rows(p: PlanResult) -> list[tuple[str, str]]:
    """Label and (escaped) value rows of a single plan; the solved quantity in bold."""
    strong = {"n": "size", "power": "power", "effect": "effect"}[p.solved]
    rows = [("Sample size", num(size_words(p, p.n, p.n2), strong=strong == "size"))]
    effect = num(_g(p.effect), strong=strong == "effect")
    if p.diff is not None:
        effect += aside(f"(difference {_g(p.diff)}, SD {_g(p.sd)})")
    rows.append(("Standardised effect", effect))
    if p.margin is not None:
        rows.append(("Equivalence margins", num(margin_words(p))))
    power = num(f"{p.power:.4f}", strong=strong == "power")
    if p.target is not None:
        power += aside(f"(target {_g(p.target, 3)})")
    rows.append(("Power", power))
    rows.append(("Significance level", num(fmt_level(1 - p.level)) + aside(p.side)))
    rows.append(("Method", esc(p.method)))
    return rows


def grid_table(p: PlanResult, max_rows: int = MAX_ROWS) -> tuple[str, list[str]]:
    """The grid as a table of at most ``max_rows`` rows, and a note on the rows left out."""
    frame = p.to_frame()
    show = [c for c in COLUMNS if frame[c].notna().any()]
    rows = []
    for rec in frame[show].head(max_rows).astype(object).itertuples(index=False):
        cells = []
        for v in rec:
            if v is None or (isinstance(v, float) and not np.isfinite(v)):
                cells.append("–")
            elif isinstance(v, float):
                cells.append(_g(v))
            else:
                cells.append(str(v))
        rows.append(cells)
    more = len(frame) - max_rows
    note = (
        [f"{more:,} more grid point(s) not shown; plan.to_frame() has them all."]
        if more > 0
        else []
    )
    return data_table([COLUMNS[c] for c in show], rows), note


def inputs(p: PlanResult) -> list[tuple[str, str]]:
    """The provenance line: tinfer's version and the plan's inputs (values escaped)."""
    items = [version_item(), ("design", esc(p.design))]
    items.append(("solved for", esc(p.solved)))
    if p.grid:
        items.append(("grid over", esc(", ".join(p.grid))))
    items.append(("level", esc(fmt_level(p.level))))
    items.append(("side", esc(p.side)))
    if p.design == "two-sample":
        items.append(("group sizes", esc(f"{p.ratio:g} in the second per 1 in the first")))
    if p.sd is not None:
        items.append(("SD", esc(_g(p.sd))))
    if p.margin is not None:
        items.append(("margins", esc(f"{_g(p.margin[0])} to {_g(p.margin[1])}")))
    return items


def card_chart(p: PlanResult):
    """The plan's power curve for the card: a short title, the legend only for a grid."""
    alt = altair()

    what = "n" if p.solved != "effect" else "effect"
    sub = []
    if p.target is not None:
        sub.append("dashed line: target power")
    sub.append("dotted line and dot: this plan" if not p.is_grid else "dots: the plans")
    heading = "Power against sample size" if what == "n" else "Power against the effect"
    chart = p.chart().properties(
        title=alt.TitleParams(heading, subtitle=["; ".join(sub)], anchor="start")
    )
    return chart if p.is_grid else chart.configure_legend(disable=True)


@card.register
def plan_card(p: PlanResult, chart: bool = True) -> str:
    """The full HTML card of a plan.

    Examples
    --------
    >>> import tinfer
    >>> page = plan_card(tinfer.plan("two-sample", effect=0.5, power=0.8), chart=False)
    >>> page.startswith('<div class="tinfer-card">') and "64 per group" in page
    True
    """
    if p.is_grid:  # a wide table, with the curves below it
        table, extra = grid_table(p)
        chart_html = ""
        if chart and len(p) <= GRID_CHART_MAX:
            chart_html = altair_block(
                lambda: card_chart(p), f"Power curves of {len(p)} plans", wide=True
            )
        elif chart:  # every grid point is marked, so the drawing grows with the grid
            extra.append(
                f"No chart in the card for more than {GRID_CHART_MAX} grid points; "
                "plan.chart() draws the curves."
            )
        body = table + notes(extra) + chart_html
    else:  # the figures beside the curve, as in the result card
        chart_html = (
            altair_block(lambda: card_chart(p), "Power curve with this plan marked")
            if chart
            else ""
        )
        numbers = figures_table(single_rows(p))
        body = (
            f'<div class="tinfer-cols"><div class="tinfer-numbers">{numbers}</div>'
            f"{chart_html}</div>"
        )
    inner = (
        card_start(kicker(p), p.sentence(), f"solved for {p.solved}", "tinfer-chip-in")
        + body
        + provenance(inputs(p))
    )
    return wrap(str(p), inner)


def _powers(p: PlanResult, effect, n1, level) -> np.ndarray:
    """Power of this plan's design at (broadcast) effects, first-group sizes and levels."""
    n2 = pw.second_group(n1, p.ratio) if p.design == "two-sample" else None
    if p.margin is None:
        return pw.t_power(effect, n1, n2, level=level, side=p.side)
    scale = p.sd if p.sd is not None else 1.0
    low, high = p.margin[0] / scale, p.margin[1] / scale
    return pw.equivalence_power(effect, low, high, n1, n2, level=level)


def _curve_label(effect: float, level: float, many_e: bool, many_l: bool) -> str:
    parts = []
    if many_e or not many_l:
        parts.append(f"effect {fmt_sig(effect)}")
    if many_l:
        parts.append(f"level {fmt_level(level)}")
    return ", ".join(parts)


def plan_chart(p: PlanResult, *, effects=None, levels=None, x=None, n_max=None):
    """Power curve(s) of a plan as an Altair chart (see ``PlanResult.chart``)."""
    import pandas as pd

    alt = altair()
    x = x or ("effect" if p.solved == "effect" else "n")
    if x not in ("n", "effect"):
        raise ParameterError(
            f"The 'x' parameter of chart must be 'n' or 'effect'. Got {x!r} instead."
        )
    if x == "effect" and p.margin is not None:
        raise ParameterError(
            "The 'x' parameter of chart must be 'n' for an equivalence plan. Got 'effect' instead."
        )
    plan_n = np.atleast_1d(np.asarray(p.n, float))
    plan_e = np.atleast_1d(np.asarray(p.effect, float))
    plan_p = np.atleast_1d(np.asarray(p.power, float))
    lev = np.asarray(levels if levels is not None else [p.level], float)
    for v in lev:
        check_level(float(v), "chart")
    n_min = pw.smallest_n(p.design == "two-sample", p.ratio)
    if x == "n":
        eff = np.asarray(effects if effects is not None else np.unique(plan_e)[:8], float)
        top = int(n_max or max(2 * np.nanmax(plan_n), n_min + 20))
        grid = np.unique(np.round(np.linspace(n_min, top, 240)))
        pw_grid = _powers(p, eff[:, None, None], grid[None, None, :], lev[None, :, None])
        x_title = {
            "one-sample": "n",
            "paired": "pairs",
            "two-sample": "n per group" if p.ratio == 1 else "n (first group)",
        }[p.design]
        x_vals = grid
    else:
        eff = np.unique(plan_n)[:8]  # one curve per sample size
        lim = 2.0 * np.nanmax(np.abs(plan_e)) if np.isfinite(plan_e).any() else 1.5
        sign = -1.0 if p.side == "lower" else 1.0
        x_vals = sign * np.linspace(0.0, max(lim, 0.1), 240)
        pw_grid = _powers(p, x_vals[None, None, :], eff[:, None, None], lev[None, :, None])
        x_title = "standardised effect"
    rows = []
    many_e, many_l = len(eff) > 1, len(lev) > 1
    for i, e in enumerate(eff):
        for j, lv in enumerate(lev):
            if x == "n":
                label = _curve_label(e, lv, many_e, many_l)
            else:
                label = ", ".join(
                    ([f"n {int(e)}"] if many_e or not many_l else [])
                    + ([f"level {fmt_level(lv)}"] if many_l else [])
                )
            rows.append(pd.DataFrame({"x": x_vals, "power": pw_grid[i, j], "curve": label}))
    data = pd.concat(rows, ignore_index=True)
    enc_x = alt.X("x:Q", title=x_title)
    enc_y = alt.Y("power:Q", title="power", scale=alt.Scale(domain=[0, 1]))
    layers = [
        alt.Chart(data).mark_line().encode(x=enc_x, y=enc_y, color=alt.Color("curve:N", title=None))
    ]
    if p.target is not None:
        targets = np.unique(np.atleast_1d(np.asarray(p.target, float)))
        layers.append(
            alt.Chart(pd.DataFrame({"target": targets}))
            .mark_rule(strokeDash=[4, 4], color="gray")
            .encode(y=alt.Y("target:Q"))
        )
    marks = pd.DataFrame(
        {"x": plan_n if x == "n" else plan_e, "power": plan_p, "what": f"this plan ({p.solved})"}
    )
    layers.append(
        alt.Chart(marks).mark_rule(strokeDash=[2, 2], color="black").encode(x=alt.X("x:Q"))
    )
    layers.append(
        alt.Chart(marks)
        .mark_point(filled=True, size=60, color="black")
        .encode(x=enc_x, y=enc_y, tooltip=["x:Q", "power:Q", "what:N"])
    )
    title = f"Power of a {design_words(p)}, {test_words(p)}"
    return alt.layer(*layers).properties(title=title, width=380, height=240)
