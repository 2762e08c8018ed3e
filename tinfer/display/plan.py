"""The HTML card of a :class:`~tinfer._plan.PlanResult` (sample size, power or sensitivity).

Built from the same pieces as the result card (:mod:`tinfer.display.card`): the packaged
stylesheet, a plain-text fallback holding ``str(plan)``, a kicker naming what was solved,
the plan's sentence as headline, its numbers, the power curve as inline SVG and a line of
the inputs. Every string passes through ``html.escape``; there is no JavaScript and no id.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from .._format import fmt_level
from . import card, charts
from .card import esc

if TYPE_CHECKING:  # pragma: no cover
    from .._plan import PlanResult

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
    "df": "df",
    "ncp": "noncentrality",
}


def _g(x, digits: int = 4) -> str:
    from .._plan import _g as g

    return g(float(x), digits)


def kicker(p: PlanResult) -> str:
    """What the plan answers, and for which test.

    >>> import tinfer
    >>> kicker(tinfer.plan("paired", effect=0.4, power=0.9))
    'Study plan · sample size · paired t test'
    """
    from .._plan import _design_words

    return f"Study plan · {SOLVED[p.solved]} · {_design_words(p)}"


def single_rows(p: PlanResult) -> list[tuple[str, str]]:
    """Label and (escaped) value rows of a single plan; the solved quantity in bold."""
    from .._plan import _margin_words, _size_words

    strong = {"n": "size", "power": "power", "effect": "effect"}[p.solved]
    rows = [("Sample size", card.num(_size_words(p, p.n, p.n2), strong=strong == "size"))]
    effect = card.num(_g(p.effect), strong=strong == "effect")
    if p.diff is not None:
        effect += card.aside(f"(difference {_g(p.diff)}, SD {_g(p.sd)})")
    rows.append(("Standardised effect", effect))
    if p.margin is not None:
        rows.append(("Equivalence margins", card.num(_margin_words(p))))
    power = card.num(f"{p.power:.4f}", strong=strong == "power")
    if p.target is not None:
        power += card.aside(f"(target {_g(p.target, 3)})")
    rows.append(("Power", power))
    rows.append(("Significance level", card.num(fmt_level(1 - p.level)) + card.aside(p.side)))
    rows.append(("df", card.num(f"{p.df:g}")))
    rows.append(("Noncentrality", card.num(_g(p.ncp))))
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
    return card.data_table([COLUMNS[c] for c in show], rows), note


def inputs(p: PlanResult) -> list[tuple[str, str]]:
    """The provenance line: tinfer's version and the plan's inputs (values escaped)."""
    items = [("tinfer", esc(card._version())), ("design", esc(p.design))]
    items.append(("solved for", esc(p.solved)))
    if p.grid:
        items.append(("grid over", esc(", ".join(p.grid))))
    items.append(("level", esc(fmt_level(p.level))))
    items.append(("side", esc(p.side)))
    if p.design == "two-sample":
        items.append(("ratio", esc(f"{p.ratio:g}")))
    if p.sd is not None:
        items.append(("SD", esc(_g(p.sd))))
    if p.margin is not None:
        items.append(("margins", esc(f"{_g(p.margin[0])} to {_g(p.margin[1])}")))
    return items


def card_chart(p: PlanResult):
    """The plan's power curve for the card: a short title, the legend only for a grid."""
    alt = charts._altair()

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
            chart_html = card.altair_block(
                lambda: card_chart(p), f"Power curves of {len(p)} plans", wide=True
            )
        elif chart:  # every grid point is marked, so the drawing grows with the grid
            extra.append(
                f"No chart in the card for more than {GRID_CHART_MAX} grid points; "
                "plan.chart() draws the curves."
            )
        body = table + card.notes(extra) + chart_html
    else:  # the figures beside the curve, as in the result card
        chart_html = (
            card.altair_block(lambda: card_chart(p), "Power curve with this plan marked")
            if chart
            else ""
        )
        numbers = card.figures_table(single_rows(p))
        body = (
            f'<div class="tinfer-cols"><div class="tinfer-numbers">{numbers}</div>'
            f"{chart_html}</div>"
        )
    inner = (
        card.head(kicker(p), f"solved for {p.solved}", "tinfer-chip-in")
        + card.headline_p(p.sentence())
        + body
        + card.provenance(inputs(p))
    )
    return card.wrap(str(p), inner)
