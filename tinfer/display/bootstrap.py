"""The card and chart of the bootstrap-t cross-check (:class:`~tinfer.BootstrapCheck`).

The card sets the bootstrap-t interval beside the t interval; the chart draws the bootstrap
t* (binned in numpy, so its size does not grow with the resamples) over the t density.
Every user string goes through ``html.escape``; no JavaScript, no ids.
"""

from __future__ import annotations

import numpy as np

from ..core import distribution as dist
from ..results.bootstrap import BootstrapCheck
from ..results.format import fmt_df, fmt_fixed, fmt_level, fmt_num
from . import html
from .charts import altair
from .diagnostics import BOX, FLAG, LINE, rounded
from .render import card


@card.register
def bootstrap_card(b: BootstrapCheck, chart: bool = True) -> str:
    """HTML card for :class:`~tinfer.BootstrapCheck`: both intervals and the t* histogram.

    Examples
    --------
    >>> import pandas as pd, tinfer
    >>> df = pd.DataFrame({"s": [3.1, 2.4, 5.8, 3.3, 2.9, 4.4, 3.0, 7.9, 3.6, 2.2]})
    >>> b = df.tinfer.one_sample("s").bootstrap(n_resamples=999, seed=2)
    >>> "bootstrap-t" in bootstrap_card(b, chart=False)
    True
    """
    dec = b.decimals
    lv = fmt_level(b.level)
    rows = [
        ["bootstrap-t", *(fmt_num(v, dec) for v in b.interval)],
        [f"t (df = {fmt_df(b.df)})", *(fmt_num(v, dec) for v in b.t_interval)],
    ]
    unit = f" {b.units}" if b.units else ""
    figures = html.figures_table(
        [
            ("Estimate", html.num(fmt_num(b.estimate, dec) + unit, strong=True)),
            (
                "t* quantiles",
                html.num(" and ".join(fmt_fixed(q, 3) for q in b.t_star_quantiles))
                + html.aside("(in place of the t critical values)"),
            ),
            ("Resamples", html.num(f"{b.n_resamples:,}") + html.aside(f"(seed {b.seed})")),
        ]
    )
    note_items = (
        [f"{b.n_degenerate} resample(s) had no spread (t* infinite or undefined)."]
        if b.n_degenerate
        else []
    )
    chart_html = (
        html.altair_block(
            lambda: bootstrap_chart(b).properties(width=330),
            "Histogram of the bootstrap t* over the t density",
        )
        if chart
        else ""
    )
    numbers = (
        figures
        + html.section(f"{lv} intervals")
        + html.data_table(["interval", "low", "high"], rows)
    )
    prov = [
        html.version_item(),
        ("level", html.esc(lv)),
        ("side", html.esc(b.side)),
        ("resamples", html.esc(f"{b.n_resamples:,}")),
        ("seed", html.esc(b.seed)),
    ]
    inner = (
        html.card_start(f"Bootstrap-t cross-check · {b.statistic}", b.verdict)
        + f'<p class="tinfer-foot">{html.esc(b.comparison)}</p>'
        + f'<div class="tinfer-cols"><div class="tinfer-numbers">{numbers}</div>'
        + f"{chart_html}</div>"
        + html.notes(note_items)
        + html.provenance(prov)
    )
    return html.wrap(str(b), inner)


def bootstrap_chart(b: BootstrapCheck):
    """Histogram of the bootstrap t* (binned in numpy) over the t density at the result's df.

    Examples
    --------
    >>> import pandas as pd, tinfer
    >>> df = pd.DataFrame({"s": [3.1, 2.4, 5.8, 3.3, 2.9, 4.4, 3.0, 7.9, 3.6, 2.2]})
    >>> ch = df.tinfer.one_sample("s").bootstrap(n_resamples=999, seed=2).chart()
    >>> type(ch).__name__
    'LayerChart'
    """
    alt = altair()
    import pandas as pd

    edges, counts = np.asarray(b.hist_edges), np.asarray(b.hist_counts)
    width = edges[1] - edges[0]
    total = counts.sum() + b.n_outside
    bars = pd.DataFrame(
        {
            "lo": rounded(edges[:-1]),
            "hi": rounded(edges[1:]),
            "density": rounded(counts / (total * width)),
            "zero": 0.0,
        }
    )
    grid = np.linspace(edges[0], edges[-1], 161)
    curve = pd.DataFrame({"t": rounded(grid), "density": rounded(dist.pdf(grid, b.df))})
    alpha = 1 - b.level
    crit = (
        [
            -float(dist.critical(b.df, b.level, "two-sided")),
            float(dist.critical(b.df, b.level, "two-sided")),
        ]
        if b.side == "two-sided"
        else [float(dist.ppf(alpha, b.df)), float(dist.ppf(1 - alpha, b.df))]
    )
    marks = pd.DataFrame(
        {
            "t": rounded([*b.t_star_quantiles, *crit]),
            "kind": ["bootstrap t* quantile"] * 2 + ["t critical value"] * 2,
        }
    )
    x = alt.X("lo:Q", title="studentised statistic t*")
    hist = (
        alt.Chart(bars)
        .mark_rect(color=BOX, opacity=0.85)
        .encode(x=x, x2="hi:Q", y=alt.Y("density:Q", title="density"), y2="zero:Q")
    )
    dens = alt.Chart(curve).mark_line(color=LINE).encode(x="t:Q", y="density:Q")
    rules = (
        alt.Chart(marks)
        .mark_rule(strokeWidth=2)
        .encode(
            x="t:Q",
            color=alt.Color(
                "kind:N",
                title=None,
                scale=alt.Scale(
                    domain=["bootstrap t* quantile", "t critical value"], range=[FLAG, LINE]
                ),
            ),
            # two kinds of line told apart by dash as well as colour, in one legend
            strokeDash=alt.StrokeDash(
                "kind:N",
                title=None,
                scale=alt.Scale(
                    domain=["bootstrap t* quantile", "t critical value"], range=[[1, 0], [6, 4]]
                ),
            ),
        )
    )
    sub = [f"{b.n_resamples} resamples (seed {b.seed}); curve: t density at df = {fmt_df(b.df)}"]
    if b.n_outside:
        sub.append(f"{b.n_outside} extreme t* beyond the plotted range")
    return alt.layer(hist, dens, rules).properties(
        width=460,
        height=200,
        title=alt.TitleParams(
            f"Bootstrap distribution of t* ({b.statistic})", subtitle=sub, anchor="start"
        ),
    )
