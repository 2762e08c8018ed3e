"""The card and chart of the t distribution (``tinfer.tdist(df)`` and its ``show`` views)."""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import Any

from ..results.format import fmt_df, fmt_num, fmt_p
from ..results.tdist import TDistribution, TDistView, area_words, df_words, moments
from .charts import config, to_altair
from .density import clamp, density_panel, density_rows, half_width, mark, mark_label
from .html import chart_block, esc, figures_table, head, num, provenance, version_item, wrap
from .render import card


@card.register
def tdist_card(view: TDistView, chart: bool = True) -> str:
    """The HTML card of a t distribution with an optional area and percentiles.

    Examples
    --------
    >>> import tinfer
    >>> page = tdist_card(tinfer.tdist(12).show(low=-1, high=2), chart=False)
    >>> "0.797" in page
    True
    """
    distribution = view.dist
    df_text = df_words(distribution.df)
    rows = [("df", num(df_text))]
    if view.low is not None or view.high is not None:
        headline = (
            f"Under Student's t with df = {df_text}, {view.area_words} = {fmt_p(float(view.area))}."
        )
        rows.append(
            (
                "area " + view.area_words,
                num(fmt_p(float(view.area)), strong=True),
            )
        )
    else:
        headline = f"Student's t distribution with df = {df_text}."
    for q, v in zip(view.percentiles, view.values, strict=True):
        rows.append((f"{100 * q:.4g}% percentile", num(fmt_num(v, 4))))
    rows += [(k, esc(v)) for k, v in moments(distribution)]
    chart_html = (
        chart_block(
            lambda: tdist_spec(distribution, view.low, view.high, view.percentiles),
            f"t density at df {df_text}",
        )
        if chart
        else ""
    )
    params = [version_item(), ("df", esc(df_text))]
    params += [
        (k, esc(fmt_num(v))) for k, v in (("low", view.low), ("high", view.high)) if v is not None
    ]
    inner = (
        head("t distribution")
        + f'<p class="tinfer-headline">{esc(headline)}</p>'
        + f'<div class="tinfer-cols"><div class="tinfer-numbers">{figures_table(rows)}</div>'
        + f"{chart_html}</div>"
        + provenance(params)
    )
    return wrap(str(view), inner)


@card.register
def distribution_card(distribution: TDistribution, chart: bool = True) -> str:
    """The card of a t distribution shown on its own: no area, the default percentiles."""
    return tdist_card(distribution.show(), chart=chart)


def tdist_spec(
    distribution: TDistribution,
    low: float | None = None,
    high: float | None = None,
    percentiles: Sequence[float] = (0.025, 0.975),
    normal: bool = True,
) -> dict[str, Any]:
    """The Vega-Lite dict behind :func:`tdist_chart`.

    Examples
    --------
    >>> import tinfer
    >>> spec = tdist_spec(tinfer.tdist(5), low=1.0)
    >>> [layer["description"] for layer in spec["layer"]][:3]
    ['shaded area', 't density', 'standard normal']
    """
    df = distribution.df
    qs = [float(q) for q in percentiles]
    q_vals = [float(distribution.percentile(q)) for q in qs] if qs else []
    bounds = [float(v) for v in (low, high) if v is not None]
    L = half_width([*bounds, *q_vals])
    shade: list[tuple[float, float]] = []
    extra = [v for v in q_vals]
    if bounds:
        a = -L if low is None else clamp(float(low), L)
        b = L if high is None else clamp(float(high), L)
        shade = [(a, b)]
        extra += [a, b]
    rows = density_rows(df, L, extra)
    marks = [
        mark("percentile", v, mark_label(f"{100 * q:.4g}%:", v, L), L)
        for q, v in zip(qs, q_vals, strict=True)
    ]
    sub = []
    if bounds:
        sub.append(f"shaded: {area_words(low, high)} = {fmt_p(distribution.area(low, high))}")
    if normal and not math.isinf(df):
        sub.append("dashed: standard normal")
    title = {"text": f"t distribution, df = {fmt_df(df)}", "subtitle": "; ".join(sub) or " "}
    area = [f"area {fmt_p(distribution.area(low, high))}"] if bounds else []
    spec = density_panel(df, L, rows, shade, marks, normal, title, tail_labels=area)
    spec["description"] = "t distribution"
    spec["config"] = config()
    return spec


def tdist_chart(
    distribution: TDistribution,
    low: float | None = None,
    high: float | None = None,
    percentiles: Sequence[float] = (0.025, 0.975),
    normal: bool = True,
):
    """The density of ``distribution`` with P(low < T < high) shaded and percentiles marked.

    Parameters
    ----------
    distribution : TDistribution
        The t distribution to draw.
    low, high : float or None
        Bounds of the shaded area; leave one out for a tail, both out for no shading.
    percentiles : sequence of float
        Lower-tail probabilities whose values are marked.
    normal : bool
        Add the standard normal density as a dashed reference curve.

    Returns
    -------
    altair.LayerChart

    Examples
    --------
    >>> import tinfer
    >>> type(tdist_chart(tinfer.tdist(5), low=1.0)).__name__
    'LayerChart'
    """
    return to_altair(tdist_spec(distribution, low, high, percentiles, normal))
