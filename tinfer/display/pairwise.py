"""The card and the chart of intervals of a :class:`~tinfer.PairwiseResult`.

Every word comes from :mod:`tinfer.results.pairwise`; user strings (levels, column names,
units) are escaped in the card and cleaned for the chart renderer. The chart holds one row
per pair (at most 45 for 10 levels in the card's size), never the data.
"""

from __future__ import annotations

import numpy as np

from ..results.format import fmt_level, fmt_p
from ..results.pairwise import PAIR_HEADERS, SHORT_NAMES, PairwiseResult
from .batch import HIT, PLAIN, RULE
from .charts import altair, finish
from .clean import label
from .html import (
    altair_block,
    card_start,
    data_table,
    esc,
    notes,
    provenance,
    section,
    version_item,
    when,
    wrap,
)
from .render import card

ROW_HEIGHT = 18  # pixels per pair in the chart


def chip(r: PairwiseResult) -> tuple[str, str]:
    if r.n_differ:
        word = "pair differs" if r.n_differ == 1 else "pairs differ"
        if r.against is not None:
            word = "differs from control" if r.n_differ == 1 else "differ from control"
        return f"{r.n_differ} {word}", "tinfer-chip-out"
    return "no difference shown", "tinfer-chip-in"


def pairwise_provenance(r: PairwiseResult) -> str:
    items = [
        version_item(),
        ("computed", when(r.created)),
        ("method", esc(SHORT_NAMES[r.method])),
        ("level", esc(fmt_level(r.level))),
        ("side", esc(r.side)),
        ("intervals", esc(r.interval_kind)),
        ("fingerprint", f"<code>{esc(r.fingerprint)}</code>"),
    ]
    return provenance(items)


@card.register
def pairwise_card(r: PairwiseResult, chart: bool = True) -> str:
    """The HTML card: headline, question, the pairs largest first, the levels, the chart.

    Examples
    --------
    >>> import tinfer
    >>> r = tinfer.pairwise_from_summary(n=[8, 9, 7], mean=[5.1, 6.3, 5.4], sd=[0.9, 1.1, 1.0],
    ...                                  labels=["<a>", "b", "c"])
    >>> page = pairwise_card(r, chart=False)
    >>> "b minus &lt;a&gt;" in page and "<a>" not in page
    True
    """
    rows = r.pair_rows()
    units = f" ({r.units})" if r.units else ""
    pairs = data_table(
        [h for _, h in PAIR_HEADERS],
        [[row[k] for k, _ in PAIR_HEADERS] for row in rows],
        ["tinfer-hit" if row["verdict"] == "yes" else "" for row in rows],
        caption=f"Differences in {r.variable}{units}, largest first; {r.interval_kind}",
    )
    levels = data_table(["level", "n", "mean", "SD"], r.group_rows())
    chart_html = ""
    if chart and r.n_tested:
        chart_html = altair_block(
            lambda: pairs_chart(r),
            f"Every pair's difference with its {r.interval_kind}, against zero",
            wide=True,
        )
    inner = (
        card_start(f"Pairwise comparisons · {r.method_name}", r.headline(), *chip(r))
        + f'<p class="tinfer-question">{esc("Question tested: " + r.question())}</p>'
        + pairs
        + section(f"levels of {r.by}")
        + levels
        + chart_html
        + notes(list(r.warnings))
        + pairwise_provenance(r)
    )
    return wrap(str(r), inner)


def chart_rows(r: PairwiseResult) -> tuple[list[dict], tuple[float, float]]:
    """One row per tested pair (largest estimate first) and the x domain.

    Infinite ends of one-sided intervals are drawn to the edge of the domain.
    """
    order = [i for i in r.order_by_estimate() if np.isfinite(r.p_adjusted[i])]
    labels = r.pair_labels()
    ends = np.concatenate([r.ci_low[order], r.ci_high[order], r.estimate[order], [0.0]])
    ends = ends[np.isfinite(ends)]
    lo, hi = float(ends.min()), float(ends.max())
    pad = 0.06 * (hi - lo or 1.0)
    lo, hi = lo - pad, hi + pad
    rows = []
    for i in order:
        rows.append(
            {
                "pair": label(labels[i]),
                "estimate": float(r.estimate[i]),
                "low": float(r.ci_low[i]) if np.isfinite(r.ci_low[i]) else lo,
                "high": float(r.ci_high[i]) if np.isfinite(r.ci_high[i]) else hi,
                "p_adjusted": fmt_p(float(r.p_adjusted[i])),
                "status": "differs" if r.differs[i] else "no difference shown",
            }
        )
    return rows, (lo, hi)


def pairs_chart(r: PairwiseResult):
    """Each pair's difference (dot) and family interval (line), largest at the top, with a
    dashed line at zero; pairs that differ in colour."""
    alt = altair()
    rows, (lo, hi) = chart_rows(r)
    order = [row["pair"] for row in rows]
    base = alt.Chart(alt.Data(values=rows))
    y = alt.Y("pair:N", sort=order, title=None)
    colour = alt.Color(
        "status:N",
        scale=alt.Scale(domain=["differs", "no difference shown"], range=[HIT, PLAIN]),
        legend=alt.Legend(title=None, orient="top"),
    )
    units = f" ({r.units})" if r.units else ""
    x = alt.X(
        "low:Q",
        title=label(f"difference in {r.variable}{units}"),
        scale=alt.Scale(domain=[lo, hi], nice=False, zero=False),
    )
    lines = base.mark_rule(strokeWidth=2).encode(x=x, x2="high:Q", y=y, color=colour)
    dots = base.mark_point(filled=True, size=45).encode(
        x="estimate:Q",
        y=y,
        color=colour,
        tooltip=["pair:N", "estimate:Q", "low:Q", "high:Q", "p_adjusted:N"],
    )
    zero = (
        alt.Chart(alt.Data(values=[{"x": 0.0}]))
        .mark_rule(strokeDash=[4, 3], color=RULE)
        .encode(x="x:Q")
    )
    subtitle = [f"{r.interval_kind.capitalize()} ({SHORT_NAMES[r.method]})"]
    if r.side != "two-sided":
        subtitle.append("one-sided bounds: each line runs on past the edge of the chart")
    title = alt.TitleParams(
        label(f"{r.n_differ} of {r.n_tested} differ from zero"),
        subtitle=subtitle,
        anchor="start",
    )
    height = max(60, ROW_HEIGHT * len(rows))
    return finish((zero + lines + dots).properties(width=420, height=height, title=title))
