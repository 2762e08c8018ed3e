"""Text and HTML cards and Altair charts for :class:`~tinfer._compare.BatchResult`.

Small functions that return strings (or chart objects). Every user string (column names,
segment values, arm labels) goes through ``html.escape``; CSS classes start with
``tinfer-``; no JavaScript. The forest plot holds at most ``top`` rows and the p-value
histogram only bin counts, so chart size does not grow with the number of segments.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from .._errors import MissingDependencyError, ParameterError
from .._format import fmt_df, fmt_level, fmt_num, fmt_p

if TYPE_CHECKING:  # pragma: no cover
    from .._compare import BatchResult

TOP_ROWS = 5
CARD_FOREST_ROWS = 15  # rows per metric panel in the card's forest plot
HIT = "#b0413e"  # discoveries (the card's stylesheet gives it the theme's accent red)
PLAIN = "#6b7682"  # the rest (restyled to the theme's muted ink)
RULE = "#8a96a3"


def _altair():
    try:
        import altair as alt
    except ImportError as exc:  # pragma: no cover - exercised only without altair
        raise MissingDependencyError(
            "Charts need the 'altair' package, which is not installed. "
            "Install it with: pip install 'tinfer[display]'"
        ) from exc
    return alt


def _order(r: BatchResult) -> np.ndarray:
    from .._compare import _order_by_p

    return _order_by_p(r)


def headline(r: BatchResult) -> str:
    """One sentence: how many comparisons, how many discoveries, at which rate and method.

    Examples
    --------
    >>> import pandas as pd, tinfer
    >>> t = pd.DataFrame({"n_a": [12, 20], "mean_a": [5.1, 7.4], "sd_a": [1.2, 2.0],
    ...                   "n_b": [15, 18], "mean_b": [4.3, 7.1], "sd_b": [1.5, 1.9]})
    >>> headline(tinfer.compare_summaries(t))
    '2 comparisons tested; 0 discoveries at rate 0.05 (Holm step-down (family-wise error rate)).'
    """
    tests = r.n_tests
    disc = r.n_discoveries
    word = "comparison" if tests == 1 else "comparisons"
    dword = "discovery" if disc == 1 else "discoveries"
    return f"{tests:,} {word} tested; {disc:,} {dword} at rate {r.rate:g} ({r.adjust_name})."


def subject(r: BatchResult) -> str:
    """What each row compares, in words."""
    if r.design == "two-sample":
        return f"{r.method}: {r.comparison}"
    if r.design == "paired":
        return f"{r.method}: paired differences"
    return f"{r.method}: mean against {fmt_num(r.null)}"


def top_rows(r: BatchResult, k: int = TOP_ROWS) -> list[dict[str, str]]:
    """The ``k`` smallest-p rows as formatted strings (unescaped)."""
    seg = r.segment_labels()
    rows = []
    for i in _order(r)[:k]:
        rows.append(
            {
                "segment": seg[i],
                "metric": r.metrics[r.row_metric[i]],
                "estimate": fmt_num(float(r.estimate[i])),
                "ci": f"{fmt_num(float(r.ci_low[i]))} to {fmt_num(float(r.ci_high[i]))}",
                "t": f"{r.t[i]:.2f}",
                "df": fmt_df(float(r.df[i])),
                "p": fmt_p(float(r.p[i])),
                "p_adj": fmt_p(float(r.p_adjusted[i])),
                "hit": "yes" if r.discovery[i] else "no",
            }
        )
    return rows


HEADERS = (
    ("segment", "segment"),
    ("metric", "metric"),
    ("estimate", "estimate"),
    ("ci", "interval"),
    ("t", "t"),
    ("df", "df"),
    ("p", "p"),
    ("p_adj", "adjusted p"),
    ("hit", "discovery"),
)


def text_card(r: BatchResult) -> str:
    """Plain-text card: subject, headline, the top rows and the notes."""
    lines = [subject(r), headline(r)]
    rows = top_rows(r)
    if rows:
        lines.append(f"Smallest p-values ({fmt_level(r.level)} intervals):")
        widths = {k: max(len(h), *(len(row[k]) for row in rows)) for k, h in HEADERS}
        lines.append("  " + "  ".join(h.ljust(widths[k]) for k, h in HEADERS))
        for row in rows:
            lines.append("  " + "  ".join(row[k].ljust(widths[k]) for k, _ in HEADERS))
    lines.extend(f"note: {w}" for w in r.warnings)
    return "\n".join(lines)


def card_rows(rows: list[dict[str, str]]) -> list[list[str]]:
    """The top rows as table cells (segment first), unescaped."""
    return [[row[k] for k, _ in HEADERS] for row in rows]


def provenance(r: BatchResult) -> list[tuple[str, str]]:
    """tinfer's version and the settings of the batch (values escaped)."""
    from .card import _version, esc

    return [
        ("tinfer", esc(_version())),
        ("comparisons", esc(f"{r.n_tests:,}")),
        ("level", esc(fmt_level(r.level))),
        ("side", esc(r.side)),
        ("null", esc(fmt_num(r.null))),
        ("error rate", esc(f"{r.rate:g}")),
        ("adjustment", esc(r.adjust_name)),
        ("pooled", "yes" if r.pooled else "no"),
    ]


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
    from . import card

    rows = top_rows(r)
    table = ""
    if rows:
        table = card.data_table(
            [h for _, h in HEADERS],
            card_rows(rows),
            ["tinfer-hit" if row["hit"] == "yes" else "" for row in rows],
            caption=f"Smallest p-values ({fmt_level(r.level)} intervals)",
        )
    chart_html = ""
    if chart and r.n_tests:
        chart_html = card.altair_block(
            lambda: forest_chart(r, top=CARD_FOREST_ROWS),
            f"Forest plot of the {CARD_FOREST_ROWS} smallest p-values per metric",
            wide=True,
        )
    dcount = r.n_discoveries
    chip = f"{dcount:,} {'discovery' if dcount == 1 else 'discoveries'}"
    inner = (
        card.head(subject(r), chip, "tinfer-chip-out" if dcount else "tinfer-chip-in")
        + card.headline_p(headline(r))
        + table
        + chart_html
        + card.notes(list(r.warnings))
        + card.provenance(provenance(r))
    )
    return card.wrap(text_card(r), inner)


# --------------------------------------------------------------------------- charts
def forest_rows(
    r: BatchResult, top: int = 30, page: int | None = None, metric: str | None = None
) -> tuple[list[dict], str]:
    """Rows of the forest plot (at most ``top``) and a note on the rows not shown.

    With ``metric`` only that metric's rows are drawn (estimates of different metrics are in
    different units and do not share an axis).
    """
    if isinstance(top, bool) or not isinstance(top, int) or top < 1:
        raise ParameterError(f"The 'top' parameter of chart must be a positive int. Got {top!r}.")
    order = _order(r)
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
        label = seg[i] + (f" · {r.metrics[r.row_metric[i]]}" if multi else "")
        rows.append(
            {
                "row": f"{rank}. {label}",
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
    alt = _altair()
    if len(r.metrics) == 1:
        return _forest_panel(alt, r, top, page, None)
    panels = [_forest_panel(alt, r, top, page, m) for m in r.metrics]
    return alt.vconcat(*panels).resolve_scale(x="independent", y="independent")


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
        x=alt.X("low:Q", title=f"{metric or 'estimate'} ({r.comparison})"),
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
            f"{metric}: {int((r.discovery & mine).sum()):,} of {int(mine.sum()):,} "
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
    alt = _altair()
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
    return (bars + level).properties(width=420, height=180, title=title)
