"""The card, forest plot and p-value histogram of a :class:`~tinfer.BatchResult`.

Small functions that return strings (or chart objects); every word comes from
:mod:`tinfer.results.batch`. Every user string (column names, segment values, arm labels)
goes through ``html.escape``; CSS classes start with ``tinfer-``; no JavaScript. The forest
plot holds at most ``top`` rows and the p-value histogram only bin counts, so chart size
does not grow with the number of segments.
"""

from __future__ import annotations

import numpy as np

from ..errors import ParameterError
from ..results.batch import BatchResult
from ..results.format import fmt_level, fmt_num, fmt_p
from .charts import altair, finish
from .clean import label
from .html import altair_block, card_start, data_table, esc, notes, provenance, version_item, wrap
from .render import card

CARD_FOREST_ROWS = 15  # rows per metric panel in the card's forest plot
HIT = "#b0413e"  # discoveries (the card's stylesheet gives it the theme's accent red)
PLAIN = "#6b7682"  # the rest (restyled to the theme's muted ink)
RULE = "#8a96a3"


def provenance_items(r: BatchResult) -> list[tuple[str, str]]:
    """tinfer's version and the settings of the batch (values escaped)."""
    return [
        version_item(),
        ("comparisons", esc(f"{r.n_tests:,}")),
        ("level", esc(fmt_level(r.level))),
        ("side", esc(r.side)),
        ("null", esc(fmt_num(r.null))),
        ("error rate", esc(f"{r.rate:g}")),
        ("adjustment", esc(r.adjust_name)),
    ] + (
        [("variances", "pooled" if r.pooled else "not pooled (Welch)")]
        if r.design == "two-sample"
        else []
    )


@card.register
def html_card(r: BatchResult, chart: bool = True) -> str:
    """The HTML card: the shared skeleton, the smallest p-values and the forest plot.

    The forest plot shows the ``CARD_FOREST_ROWS`` smallest p-values (one panel per
    metric), so the card's size does not grow with the number of segments.

    Examples
    --------
    >>> import pandas as pd, tinfer
    >>> t = pd.DataFrame({"n_a": [12, 20], "mean_a": [5.1, 7.4], "sd_a": [1.2, 2.0],
    ...                   "n_b": [15, 18], "mean_b": [4.3, 7.1], "sd_b": [1.5, 1.9]})
    >>> page = html_card(tinfer.compare_summaries(t), chart=False)
    >>> page.startswith('<div class="tinfer-card">') and "2 comparisons tested" in page
    True
    """
    rows = r.top_rows()
    table = ""
    if rows:
        table = data_table(
            [h for _, h in r.headers()],
            [
                [_keep_together(row[k]) if k == "lift" else row[k] for k, _ in r.headers()]
                for row in rows
            ],
            ["tinfer-hit" if row["hit"] == "yes" else "" for row in rows],
            caption=f"Smallest p-values ({fmt_level(r.level)} intervals)",
            wrap=[j for j, (k, _) in enumerate(r.headers()) if k == "lift"],
        )
    chart_html = ""
    if chart and r.n_tests:
        chart_html = altair_block(
            lambda: forest_chart(r, top=CARD_FOREST_ROWS),
            f"Forest plot of the {CARD_FOREST_ROWS} smallest p-values per metric",
            wide=True,
        )
    dcount = r.n_discoveries
    chip = f"{dcount:,} {'discovery' if dcount == 1 else 'discoveries'}"
    inner = (
        card_start(
            r.subject(), r.headline(), chip, "tinfer-chip-out" if dcount else "tinfer-chip-in"
        )
        + table
        + chart_html
        + notes(list(r.warnings))
        + provenance(provenance_items(r))
    )
    return wrap(str(r), inner)


# --------------------------------------------------------------------------- charts
def _keep_together(cell: str) -> str:
    """A lift cell that may break only before its interval: "+6% (−3%\u00a0to\u00a0+15%)"."""
    head, sep, tail = cell.partition(" (")
    return head + sep + tail.replace(" ", "\u00a0")


def forest_rows(
    r: BatchResult, top: int = 30, page: int | None = None, metric: str | None = None
) -> tuple[list[dict], str]:
    """Rows of the forest plot (at most ``top``) and a note on the rows not shown.

    With ``metric`` only that metric's rows are drawn (estimates of different metrics are in
    different units and do not share an axis).
    """
    if isinstance(top, bool) or not isinstance(top, int) or top < 1:
        raise ParameterError(f"The 'top' parameter of chart must be a positive int. Got {top!r}.")
    order = r.order_by_p()
    if metric is not None:
        if metric not in r.metrics:
            raise ParameterError(
                f"The 'metric' parameter of chart must be one of {list(r.metrics)}. "
                f"Got {metric!r} instead."
            )
        order = order[r.row_metric[order] == r.metrics.index(metric)]
    total = order.size
    start = 0
    if page is not None:
        pages = max(1, -(-total // top))
        if isinstance(page, bool) or not isinstance(page, int) or not 1 <= page <= pages:
            raise ParameterError(
                f"The 'page' parameter of chart must be an int from 1 to {pages}. "
                f"Got {page!r} instead."
            )
        start = (page - 1) * top
    shown = order[start : start + top]
    seg = r.segment_labels()
    multi = len(r.metrics) > 1 and metric is None
    rows = []
    for rank, i in enumerate(shown, start=start + 1):
        text = seg[i] + (f" · {r.metrics[r.row_metric[i]]}" if multi else "")
        rows.append(
            {
                "row": f"{rank}. {label(text)}",
                "estimate": float(r.estimate[i]),
                "low": _finite_or_none(r.ci_low[i]),
                "high": _finite_or_none(r.ci_high[i]),
                "p": fmt_p(float(r.p[i])),
                "p_adjusted": fmt_p(float(r.p_adjusted[i])),
                "status": "discovery" if r.discovery[i] else "not a discovery",
            }
        )
    rest = np.setdiff1d(order, shown, assume_unique=True)
    n_rest_hits = int(r.discovery[rest].sum())
    note = ""
    if rest.size:
        note = (
            f"{rest.size:,} more comparison(s) not shown, {n_rest_hits:,} of them discoveries"
            + (f" (page {page} of {-(-total // top)})." if page is not None else ".")
        )
    return rows, note


def _finite_or_none(v) -> float | None:
    v = float(v)
    return v if np.isfinite(v) else None


def forest_chart(r: BatchResult, top: int = 30, page: int | None = None):
    """Forest plot: one line per comparison, smallest p at the top, discoveries in colour.

    Several metrics give one panel each, stacked, each on its own scale.
    """
    alt = altair()
    if len(r.metrics) == 1:
        return finish(_forest_panel(alt, r, top, page, None))
    panels = [_forest_panel(alt, r, top, page, m) for m in r.metrics]
    return finish(alt.vconcat(*panels).resolve_scale(x="independent", y="independent"))


def _forest_panel(alt, r: BatchResult, top: int, page: int | None, metric: str | None):
    rows, note = forest_rows(r, top=top, page=page, metric=metric)
    order = [row["row"] for row in rows]
    base = alt.Chart(alt.Data(values=rows))
    y = alt.Y("row:N", sort=order, title=None)
    colour = alt.Color(
        "status:N",
        scale=alt.Scale(domain=["discovery", "not a discovery"], range=[HIT, PLAIN]),
        legend=alt.Legend(title=None, orient="top"),
    )
    tip = ["row:N", "estimate:Q", "low:Q", "high:Q", "p:N", "p_adjusted:N"]
    bars = base.mark_rule().encode(
        x=alt.X("low:Q", title=label(f"{metric or 'estimate'} ({r.comparison})")),
        x2="high:Q",
        y=y,
        color=colour,
    )
    dots = base.mark_point(filled=True, size=40).encode(
        x="estimate:Q", y=y, color=colour, tooltip=tip
    )
    zero = (
        alt.Chart(alt.Data(values=[{"x": r.null}]))
        .mark_rule(strokeDash=[4, 3], color=RULE)
        .encode(x="x:Q")
    )
    if metric is None:
        heading = f"{r.n_discoveries:,} of {r.n_tests:,} comparisons are discoveries"
    else:
        k = r.metrics.index(metric)
        mine = r.testable & (r.row_metric == k)
        heading = (
            f"{label(metric)}: {int((r.discovery & mine).sum()):,} of {int(mine.sum()):,} "
            "comparisons are discoveries"
        )
    title = alt.TitleParams(
        heading,
        subtitle=[note] if note else [],
        anchor="start",
    )
    height = max(60, 16 * len(rows))
    return (zero + bars + dots).properties(width=420, height=height, title=title)


def p_histogram(r: BatchResult, bins: int = 20):
    """Histogram of raw p-values on [0, 1]; counts come from numpy, not from the rows."""
    alt = altair()
    if isinstance(bins, bool) or not isinstance(bins, int) or not 2 <= bins <= 200:
        raise ParameterError(
            f"The 'bins' parameter of p_histogram must be an int from 2 to 200. Got {bins!r}."
        )
    p = r.p[r.testable]
    counts, edges = np.histogram(p, bins=bins, range=(0.0, 1.0))
    rows = [
        {"low": float(edges[i]), "high": float(edges[i + 1]), "count": int(counts[i]), "zero": 0}
        for i in range(bins)
    ]
    flat = p.size / bins
    bars = (
        alt.Chart(alt.Data(values=rows))
        .mark_bar(color=PLAIN)
        .encode(
            x=alt.X("low:Q", title="p-value", scale=alt.Scale(domain=[0, 1])),
            x2="high:Q",
            y=alt.Y("count:Q", title="comparisons"),
            y2="zero:Q",
            tooltip=["low:Q", "high:Q", "count:Q"],
        )
    )
    level = (
        alt.Chart(alt.Data(values=[{"y": flat}]))
        .mark_rule(strokeDash=[4, 3], color=RULE)
        .encode(y="y:Q")
    )
    title = alt.TitleParams(
        f"p-values of {p.size:,} comparisons",
        subtitle=["dashed line: the flat height expected if no null hypothesis were false"],
        anchor="start",
    )
    return finish((bars + level).properties(width=420, height=180, title=title))
