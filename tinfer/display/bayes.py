"""The card and charts of the default Bayes factor (:class:`~tinfer.BayesFactor`).

Left: the prior and posterior densities of the standardised effect delta, with delta = 0
marked. Right: the Bayes factor across prior scales r, so a reader sees how much the
conclusion leans on the conventional r. Every user string goes through ``html.escape``.
"""

from __future__ import annotations

import numpy as np

from ..core import bayes
from ..results.bayes import BayesFactor
from ..results.format import fmt_bf, fmt_df, fmt_level, fmt_sig
from . import html
from .charts import CURVE, INK, MUTED, OBSERVED, REFERENCE, altair
from .diagnostics import rounded
from .render import card

SCALES = np.geomspace(0.1, 2.0, 61)  # prior scales r drawn in the sensitivity panel


@card.register
def bayes_card(b: BayesFactor, chart: bool = True) -> str:
    """HTML card for :class:`~tinfer.BayesFactor`: both factors, the prior, the posterior.

    Examples
    --------
    >>> import tinfer
    >>> b = tinfer.from_summary(n=24, mean=0.41, sd=1.0).bayes_factor()
    >>> page = bayes_card(b, chart=False)
    >>> "Jeffreys" in page and "Cauchy prior" in page
    True
    """
    lv = fmt_level(b.level)
    effect = {
        "two-sided": "a difference",
        "upper": "an effect above 0",
        "lower": "an effect below 0",
    }
    t_kind = "pooled t" if b.pooled_from_welch else "t"
    favoured = "an effect" if b.favours == "effect" else b.favours
    figures = html.figures_table(
        [
            (f"BF for {effect[b.side]} over none", html.num(fmt_bf(b.log_bf), strong=True)),
            ("BF for no effect over it", html.num(fmt_bf(-b.log_bf))),
            (
                "Jeffreys' grade",
                html.num(b.grade) + html.aside(f"(favours {favoured})"),
            ),
            ("Prior", html.num(b.prior_words)),
            (
                "Posterior of delta",
                html.num(f"median {fmt_sig(b.median, 3)}")
                + html.aside(
                    f"({lv} credible interval {fmt_sig(b.interval[0], 3)} to "
                    f"{fmt_sig(b.interval[1], 3)})"
                ),
            ),
            (
                "From",
                html.num(f"{t_kind} = {b.t:.4g}, df = {fmt_df(b.df)}")
                + html.aside(f"(effective n {fmt_sig(b.n_eff, 4)})"),
            ),
        ]
    )
    note_items = [
        "A Bayes factor compares how well two models predicted these data; it is not the "
        "probability that either is true. The default prior is a convention to report, "
        "not a truth: the right-hand panel shows the factor at other prior scales."
    ]
    if b.pooled_from_welch:
        note_items.append(
            "The default Bayes factor assumes equal variances, so it uses the pooled t, "
            "not the Welch t of the test."
        )
    chart_html = (
        html.altair_block(
            lambda: bayes_chart(b),
            "Prior and posterior densities of delta; Bayes factor across prior scales",
            wide=True,
        )
        if chart
        else ""
    )
    prov = [
        html.version_item(),
        ("prior scale r", html.esc(fmt_sig(b.scale, 4))),
        ("side", html.esc(b.side)),
        ("credible level", html.esc(lv)),
        ("method", html.esc("JZS Bayes factor (Rouder et al. 2009; one-sided: Morey and "
                            "Wagenmakers 2014)")),
    ]  # fmt: skip
    if b.created:
        prov.append(("computed", html.when(b.created)))
    inner = (
        html.card_start(f"Default Bayes factor · {b.comparison}", b.headline)
        + f'<div class="tinfer-numbers">{figures}</div>'
        + chart_html
        + html.notes(note_items)
        + html.provenance(prov)
    )
    return html.wrap(repr(b), inner)


def _densities(b: BayesFactor):
    """Grid of delta with the prior and posterior densities (posterior: the derivative of
    its distribution function, which the core computes to ~1e-12)."""
    lo, hi = b.interval
    span = max(hi - lo, 1e-12)
    a, z = lo - 0.8 * span, hi + 0.8 * span
    if span > b.scale / 10:  # a posterior about as wide as the prior: show the prior's body
        a, z = min(a, -2.5 * b.scale), max(z, 2.5 * b.scale)
    if b.side == "upper":
        a = max(a, 0.0)
    if b.side == "lower":
        z = min(z, 0.0)
    d = np.linspace(a, z, 241)
    cdf = bayes.posterior_cdf(d, b.t, b.n_eff, b.df, b.scale, b.side)
    post = np.maximum(np.gradient(cdf, d), 0.0)
    prior = np.exp(bayes.cauchy_log_pdf(d, b.scale, b.side))
    return d, prior, post


def bayes_chart(b: BayesFactor):
    """Two panels: prior and posterior of delta, and the factor across prior scales r.

    Examples
    --------
    >>> import tinfer
    >>> ch = tinfer.from_summary(n=24, mean=0.41, sd=1.0).bayes_factor().chart()
    >>> type(ch).__name__
    'HConcatChart'
    """
    alt = altair()
    import pandas as pd

    d, prior, post = _densities(b)
    curves = pd.DataFrame(
        {
            "delta": rounded(np.r_[d, d]),
            "density": rounded(np.r_[prior, post]),
            "curve": ["prior"] * d.size + ["posterior"] * d.size,
        }
    )
    colour = alt.Color(
        "curve:N",
        title=None,
        scale=alt.Scale(domain=["prior", "posterior"], range=[REFERENCE, CURVE]),
    )
    dash = alt.StrokeDash(
        "curve:N",
        title=None,
        scale=alt.Scale(domain=["prior", "posterior"], range=[[6, 4], [1, 0]]),
    )
    lines = (
        alt.Chart(curves)
        .mark_line(strokeWidth=2)
        .encode(
            x=alt.X("delta:Q", title="standardised effect delta"),
            y=alt.Y("density:Q", title="density"),
            color=colour,
            strokeDash=dash,
        )
    )
    layers = [lines]
    if d[0] <= 0.0 <= d[-1]:
        zero = alt.Chart(pd.DataFrame({"delta": [0.0]})).mark_rule(color=MUTED, strokeDash=[2, 2])
        layers.append(zero.encode(x="delta:Q"))
    left = alt.layer(*layers).properties(
        width=300,
        height=190,
        title=alt.TitleParams(
            "Prior and posterior of delta",
            subtitle=[f"{b.prior_words}", f"posterior median {fmt_sig(b.median, 3)}"],
            anchor="start",
        ),
    )
    return alt.hconcat(left, _scale_panel(b, alt, pd)).resolve_scale(
        color="independent", strokeDash="independent"
    )


def _scale_panel(b: BayesFactor, alt, pd):
    """log10 of the factor across prior scales r, with Jeffreys' grade edges as rules."""
    logs = bayes.log_bayes_factor(b.t, b.n_eff, b.df, SCALES, b.side)
    frame = pd.DataFrame({"r": rounded(SCALES), "log10 BF": rounded(logs / np.log(10.0))})
    mark = pd.DataFrame({"r": [b.scale], "log10 BF": [b.log_bf / np.log(10.0)]})
    lo, hi = float(frame["log10 BF"].min()), float(frame["log10 BF"].max())
    edges = [e for e in (-2, -1.5, -1, -0.5, 0.0, 0.5, 1, 1.5, 2) if lo - 0.6 <= e <= hi + 0.6]
    rules = (
        alt.Chart(pd.DataFrame({"edge": edges}))
        .mark_rule(color=REFERENCE, strokeWidth=1, strokeDash=[3, 3])
        .encode(y=alt.Y("edge:Q"))
    )
    x = alt.X(
        "r:Q",
        title="prior scale r",
        scale=alt.Scale(type="log", domain=[float(SCALES[0]), float(SCALES[-1])]),
    )
    y = alt.Y("log10 BF:Q", title="log10 Bayes factor", axis=alt.Axis(titlePadding=14))
    line = alt.Chart(frame).mark_line(color=INK, strokeWidth=2).encode(x=x, y=y)
    point = alt.Chart(mark).mark_point(color=OBSERVED, size=70, filled=True).encode(x=x, y=y)
    return alt.layer(rules, line, point).properties(
        width=260,
        height=190,
        title=alt.TitleParams(
            "Bayes factor across prior scales",
            subtitle=[
                f"dot: r = {fmt_sig(b.scale, 3)}, BF {fmt_bf(b.log_bf)}; above 0 favours an effect",
                "dashed: Jeffreys' grade edges (log10 BF ±0.5, ±1, ±1.5, ±2)",
            ],
            anchor="start",
        ),
    )
