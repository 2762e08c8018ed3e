"""The card and charts of assumption checks (:class:`~tinfer.Diagnostics`).

Cards use the shared skeleton of :mod:`tinfer.display.card` (packaged stylesheet, a
plain-text fallback shown where styles are stripped, charts as inline SVG); every user
string goes through :func:`html.escape`. No JavaScript, no ids. Charts are Altair
objects, never displayed here; altair is imported when a chart is first asked for.
Chart data are bounded: at most ``MAX_POINTS`` points per sample (evenly spaced order
statistics for the Q-Q plot; only flagged values in the box plot for large n), and the
bootstrap histogram is binned in numpy, so a chart's size does not grow with n.
"""

from __future__ import annotations

import numpy as np

from ..core.diagnostics import HAMPEL_K, MAX_LISTED
from ..results.diagnostics import MAX_POINTS, Diagnostics
from ..results.format import fmt_num
from .charts import altair, finish
from .clean import label
from .html import (
    altair_block,
    card_start,
    data_table,
    esc,
    provenance,
    section,
    version_item,
    wrap,
)
from .render import card

# Chart colours from the card palette (tinfer/display/charts.py), so that the stylesheet
# restyles points, flags, medians and whiskers for dark themes.
POINT = "#1f5f8b"
LINE = "#c0612b"
BOX = "#9fb8c9"
FLAG = "#b0413e"
MUTED = "#6b7682"
MEDIAN = "#2f3a45"


def _outlier_cell(shape, decimals: int) -> str:
    if not shape.n_outliers:
        return "none"
    shown = ", ".join(fmt_num(v, decimals) for v in shape.outliers[:5])
    more = ", ..." if shape.n_outliers > min(len(shape.outliers), 5) else ""
    return f"{shape.n_outliers} ({shown}{more})"


def shape_rows(d: Diagnostics) -> tuple[list[str], list[list[str]]]:
    """Header and rows of the per-sample table (one column per sample), unescaped."""
    dec = d.decimals
    header = ["", *(s.label for s in d.shapes)]
    rows = [
        ["n", *(f"{s.n:,}" for s in d.shapes)],
        ["skewness G1", *(fmt_num(s.skewness, 2) for s in d.shapes)],
        ["excess kurtosis G2", *(fmt_num(s.excess_kurtosis, 2) for s in d.shapes)],
        ["normality test", *(s.test_name or "not run" for s in d.shapes)],
        ["normality p", *(f"{s.test_p:.3g}" if s.test_name else "–" for s in d.shapes)],
        ["median", *(fmt_num(s.median, dec) for s in d.shapes)],
        ["MAD × 1.4826", *(fmt_num(s.mad_sd, dec + 1) for s in d.shapes)],
        ["outliers", *(_outlier_cell(s, dec) for s in d.shapes)],
    ]
    if np.isfinite(d.variance_ratio):
        rows.append(
            ["variance ratio (larger over smaller)", f"{d.variance_ratio:.2f}"]
            + [""] * (len(d.shapes) - 1)
        )
    return header, rows


@card.register
def diagnostics_card(d: Diagnostics, chart: bool = True) -> str:
    """HTML card for :class:`~tinfer.Diagnostics`: advice, shapes, Q-Q and box plots.

    Examples
    --------
    >>> import pandas as pd, tinfer
    >>> df = pd.DataFrame({"<g>": [4.1, 3.9, 4.4, 4.0, 4.2, 3.8, 9.5]})
    >>> html_text = diagnostics_card(df.tinfer.one_sample("<g>").check(), chart=False)
    >>> "&lt;g&gt;" in html_text and "<g>" not in html_text
    True
    """
    header, rows = shape_rows(d)
    basis = "".join(f"<li>{esc(b)}</li>" for b in d.basis)
    foot = (
        '<p class="tinfer-foot">Skewness and excess kurtosis are the bias-corrected sample '
        f"versions G1 and G2. Outliers: {esc(d.outlier_rule)}. The advice leaves the test "
        "you ran unchanged.</p>"
        '<details class="tinfer-details"><summary>What the advice rests on</summary>'
        f"<ul>{basis}</ul></details>"
    )
    chart_html = (
        altair_block(
            lambda: diagnostics_chart(d),
            f"Normal Q-Q plot and box plot of {d.variable}",
            wide=True,
        )
        if chart
        else ""
    )
    prov = [
        version_item(),
        ("variable", esc(d.variable)),
        ("design", esc(d.design)),
        ("values", esc(", ".join(f"{s.n:,}" for s in d.shapes))),
    ]
    inner = (
        card_start(f"Assumption checks · {d.method}", d.advice)
        + f'<p class="tinfer-foot">{esc(d.comparison)}, variable {esc(d.variable)}</p>'
        + section("shape per sample")
        + data_table(header, rows)
        + foot
        + chart_html
        + provenance(prov)
    )
    return wrap(str(d), inner)


# ---------------------------------------------------------------------- charts
def rounded(x) -> list[float]:
    """Values rounded to 6 significant digits (keeps chart specs small)."""
    return [float(f"{v:.6g}") for v in np.asarray(x, dtype=float)]


def _flag_color(alt):
    return alt.Color(
        "flag:N", title=None, scale=alt.Scale(domain=["value", "outlier"], range=[POINT, FLAG])
    )


def names(d: Diagnostics) -> list[str]:
    """The samples' labels as the charts show them: visible, short, and distinct."""
    out = [label(s.label, 30) for s in d.shapes]
    if len(set(out)) < len(out):  # two labels that read alike once shortened
        out = [f"{k + 1}. {n}" for k, n in enumerate(out)]
    return out


def _thin_note(d: Diagnostics, what: str) -> list[str]:
    big = [n for n, t in zip(names(d), d.thinned, strict=True) if t]
    if not big:
        return []
    return [f"{what} (n above {MAX_POINTS} in " + ", ".join(big) + ")"]


def qq_chart(d: Diagnostics):
    """Normal Q-Q plot, one panel per sample, with the line through the quartiles."""
    alt = altair()
    import pandas as pd

    pts, ends = [], []
    shown = names(d)
    for k, (s, (z, x), (slope, icpt)) in enumerate(zip(d.shapes, d.qq, d.qq_lines, strict=True)):
        far = np.abs(x - s.median) > HAMPEL_K * s.mad_sd if s.mad_sd > 0 else np.zeros(x.size, bool)
        pts.append(
            pd.DataFrame(
                {
                    "k": k,
                    "sample": shown[k],
                    "normal quantile": rounded(z),
                    "value": rounded(x),
                    "flag": np.where(far, "outlier", "value"),
                }
            )
        )
        z_ends = np.array([z.min(), z.max()])
        ends.append(
            pd.DataFrame(
                {
                    "k": k,
                    "normal quantile": rounded(z_ends),
                    "value": rounded(icpt + slope * z_ends),
                }
            )
        )
    points = (
        alt.Chart(pd.concat(pts, ignore_index=True))
        .mark_circle(size=22, opacity=0.75)
        .encode(
            x=alt.X("normal quantile:Q", title="normal quantile", axis=alt.Axis(tickCount=4)),
            y=alt.Y("value:Q", title=label(d.variable), scale=alt.Scale(zero=False)),
            color=_flag_color(alt),
            tooltip=["sample:N", "value:Q", "flag:N"],
        )
    )
    line = (
        alt.Chart(pd.concat(ends, ignore_index=True))
        .mark_line(color=LINE, strokeDash=[5, 3])
        .encode(x="normal quantile:Q", y="value:Q")
    )
    sub = ["points near the dashed line (through the quartiles) fit a normal shape"]
    sub += _thin_note(d, "evenly spaced order statistics shown, 250 per sample")
    charts = []
    for k, name in enumerate(shown):
        keep = alt.datum["k"] == k
        charts.append(
            alt.layer(points.transform_filter(keep), line.transform_filter(keep)).properties(
                width=220, height=200, title=name
            )
        )
    return finish(
        alt.hconcat(*charts).properties(
            title=alt.TitleParams("Normal Q-Q plot", subtitle=sub, anchor="start")
        )
    )


def box_chart(d: Diagnostics):
    """Box plot per sample (Tukey whiskers), with the values or, for large n, the flagged ones."""
    alt = altair()
    import pandas as pd

    shown = names(d)
    boxes = pd.DataFrame(
        [
            {
                "sample": name,
                "q1": s.quartiles[0],
                "median": s.quartiles[1],
                "q3": s.quartiles[2],
                "low": s.whiskers[0],
                "high": s.whiskers[1],
            }
            for s, name in zip(d.shapes, shown, strict=True)
        ]
    )
    rows = []
    for name, x, flags in zip(shown, d.strip, d.strip_flags, strict=True):
        for v, f in zip(rounded(x), flags, strict=True):
            rows.append({"sample": name, "value": v, "flag": "outlier" if f else "value"})
    pts = pd.DataFrame(rows, columns=["sample", "value", "flag"])
    y = alt.Y("sample:N", title=None)
    whisker = (
        alt.Chart(boxes)
        .mark_rule(color=MUTED)
        .encode(
            y=y, x=alt.X("low:Q", title=label(d.variable), scale=alt.Scale(zero=False)), x2="high:Q"
        )
    )
    box = (
        alt.Chart(boxes).mark_bar(size=22, color=BOX, opacity=0.8).encode(y=y, x="q1:Q", x2="q3:Q")
    )
    mid = alt.Chart(boxes).mark_tick(size=22, thickness=2, color=MEDIAN).encode(y=y, x="median:Q")
    dots = (
        alt.Chart(pts)
        .mark_tick(size=12, thickness=1.2, opacity=0.7)
        .encode(
            y=y,
            x="value:Q",
            color=_flag_color(alt),
            tooltip=["sample:N", "value:Q", "flag:N"],
        )
    )
    sub = ["box: quartiles; whiskers: Tukey's 1.5 IQR; red: Hampel outliers"]
    sub += _thin_note(d, f"only flagged values drawn, at most the {MAX_LISTED} farthest per sample")
    return finish(
        alt.layer(whisker, box, mid, dots).properties(
            width=460,
            height=60 * len(d.shapes),
            title=alt.TitleParams("Spread and outliers", subtitle=sub, anchor="start"),
        )
    )


def diagnostics_chart(d: Diagnostics):
    """The Q-Q plot above the box plot.

    Examples
    --------
    >>> import numpy as np, pandas as pd, tinfer, json
    >>> rng = np.random.default_rng(3)
    >>> df = pd.DataFrame({"v": rng.normal(size=40_000), "k": ["a", "b"] * 20_000})
    >>> spec = diagnostics_chart(df.tinfer.two_sample("v", by="k").check()).to_json()
    >>> len(spec) < 100_000
    True
    """
    alt = altair()
    return alt.vconcat(qq_chart(d), box_chart(d))
