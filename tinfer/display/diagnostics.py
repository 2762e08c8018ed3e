"""Cards and charts for assumption checks and for the bootstrap cross-check.

Cards use the shared skeleton of :mod:`tinfer.display.card` (packaged stylesheet, a
plain-text fallback shown where styles are stripped, charts as inline SVG); every user
string goes through :func:`html.escape`. No JavaScript, no ids. Charts are Altair
objects, never displayed here; altair is imported when a chart is first asked for.
Chart data are bounded: at most ``MAX_POINTS`` points per sample (evenly spaced order
statistics for the Q-Q plot; only flagged values in the box plot for large n), and the
bootstrap histogram is binned in numpy, so a chart's size does not grow with n.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from .._errors import MissingDependencyError
from .._format import fmt_level, fmt_num
from ..core import distribution as dist
from ..core.diagnostics import HAMPEL_K, MAX_LISTED
from . import card
from .card import esc

if TYPE_CHECKING:  # pragma: no cover
    from .._diagnostics import BootstrapCheck, Diagnostics

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


def diagnostics_card(d: Diagnostics, chart: bool = True) -> str:
    """HTML card for :class:`~tinfer._diagnostics.Diagnostics`: advice, shapes, Q-Q and box.

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
        card.altair_block(
            lambda: diagnostics_chart(d),
            f"Normal Q-Q plot and box plot of {d.variable}",
            wide=True,
        )
        if chart
        else ""
    )
    prov = [
        ("tinfer", esc(card._version())),
        ("variable", esc(d.variable)),
        ("design", esc(d.design)),
        ("values", esc(", ".join(f"{s.n:,}" for s in d.shapes))),
    ]
    inner = (
        card.head(f"Assumption checks · {d.method}")
        + card.headline_p(d.advice)
        + f'<p class="tinfer-foot">{esc(d.comparison)}, variable {esc(d.variable)}</p>'
        + card.section("shape per sample")
        + card.data_table(header, rows)
        + foot
        + chart_html
        + card.provenance(prov)
    )
    return card.wrap(str(d), inner)


def bootstrap_card(b: BootstrapCheck, chart: bool = True) -> str:
    """HTML card for :class:`~tinfer._diagnostics.BootstrapCheck`: both intervals and t*.

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
        [f"t (df = {b.df:.4g})", *(fmt_num(v, dec) for v in b.t_interval)],
    ]
    unit = f" {b.units}" if b.units else ""
    figures = card.figures_table(
        [
            ("Estimate", card.num(fmt_num(b.estimate, dec) + unit, strong=True)),
            (
                "t* quantiles",
                card.num(f"{b.t_star_quantiles[0]:.3f} and {b.t_star_quantiles[1]:.3f}")
                + card.aside("(in place of the t critical values)"),
            ),
            ("Resamples", card.num(f"{b.n_resamples:,}") + card.aside(f"(seed {b.seed})")),
        ]
    )
    notes = (
        [f"{b.n_degenerate} resample(s) had no spread (t* infinite or undefined)."]
        if b.n_degenerate
        else []
    )
    chart_html = (
        card.altair_block(
            lambda: bootstrap_chart(b).properties(width=330),
            "Histogram of the bootstrap t* over the t density",
        )
        if chart
        else ""
    )
    numbers = (
        figures
        + card.section(f"{lv} intervals")
        + card.data_table(["interval", "low", "high"], rows)
    )
    prov = [
        ("tinfer", esc(card._version())),
        ("level", esc(lv)),
        ("side", esc(b.side)),
        ("resamples", esc(f"{b.n_resamples:,}")),
        ("seed", esc(b.seed)),
    ]
    inner = (
        card.head(f"Bootstrap-t cross-check · {b.statistic}")
        + card.headline_p(b.verdict)
        + f'<p class="tinfer-foot">{esc(b.comparison)}</p>'
        + f'<div class="tinfer-cols"><div class="tinfer-numbers">{numbers}</div>'
        + f"{chart_html}</div>"
        + card.notes(notes)
        + card.provenance(prov)
    )
    return card.wrap(str(b), inner)


# ---------------------------------------------------------------------- charts


def _altair():
    try:
        import altair as alt
    except ImportError as exc:  # pragma: no cover - exercised only without altair
        raise MissingDependencyError(
            "Charts need the 'altair' package, which is not installed. "
            "Install it with: pip install 'tinfer[display]'"
        ) from exc
    return alt


def _r(x) -> list[float]:
    """Values rounded to 6 significant digits (keeps chart specs small)."""
    return [float(f"{v:.6g}") for v in np.asarray(x, dtype=float)]


def _flag_color(alt):
    return alt.Color(
        "flag:N", title=None, scale=alt.Scale(domain=["value", "outlier"], range=[POINT, FLAG])
    )


def _thin_note(d: Diagnostics, what: str) -> list[str]:
    big = [s for s, t in zip(d.shapes, d.thinned, strict=True) if t]
    if not big:
        return []
    from .._diagnostics import MAX_POINTS

    return [f"{what} (n above {MAX_POINTS} in " + ", ".join(s.label for s in big) + ")"]


def qq_chart(d: Diagnostics):
    """Normal Q-Q plot, one panel per sample, with the line through the quartiles."""
    alt = _altair()
    import pandas as pd

    pts, ends = [], []
    for s, (z, x), (slope, icpt) in zip(d.shapes, d.qq, d.qq_lines, strict=True):
        far = np.abs(x - s.median) > HAMPEL_K * s.mad_sd if s.mad_sd > 0 else np.zeros(x.size, bool)
        pts.append(
            pd.DataFrame(
                {
                    "sample": s.label,
                    "normal quantile": _r(z),
                    "value": _r(x),
                    "flag": np.where(far, "outlier", "value"),
                }
            )
        )
        z_ends = np.array([z.min(), z.max()])
        ends.append(
            pd.DataFrame(
                {
                    "sample": s.label,
                    "normal quantile": _r(z_ends),
                    "value": _r(icpt + slope * z_ends),
                }
            )
        )
    points = (
        alt.Chart(pd.concat(pts, ignore_index=True))
        .mark_circle(size=22, opacity=0.75)
        .encode(
            x=alt.X("normal quantile:Q", title="normal quantile"),
            y=alt.Y("value:Q", title=d.variable, scale=alt.Scale(zero=False)),
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
    for s in d.shapes:
        keep = alt.datum["sample"] == s.label
        charts.append(
            alt.layer(points.transform_filter(keep), line.transform_filter(keep)).properties(
                width=220, height=200, title=s.label
            )
        )
    return alt.hconcat(*charts).properties(
        title=alt.TitleParams("Normal Q-Q plot", subtitle=sub, anchor="start")
    )


def box_chart(d: Diagnostics):
    """Box plot per sample (Tukey whiskers), with the values or, for large n, the flagged ones."""
    alt = _altair()
    import pandas as pd

    boxes = pd.DataFrame(
        [
            {
                "sample": s.label,
                "q1": s.quartiles[0],
                "median": s.quartiles[1],
                "q3": s.quartiles[2],
                "low": s.whiskers[0],
                "high": s.whiskers[1],
            }
            for s in d.shapes
        ]
    )
    rows = []
    for s, x, flags in zip(d.shapes, d.strip, d.strip_flags, strict=True):
        for v, f in zip(_r(x), flags, strict=True):
            rows.append({"sample": s.label, "value": v, "flag": "outlier" if f else "value"})
    pts = pd.DataFrame(rows, columns=["sample", "value", "flag"])
    y = alt.Y("sample:N", title=None)
    whisker = (
        alt.Chart(boxes)
        .mark_rule(color=MUTED)
        .encode(y=y, x=alt.X("low:Q", title=d.variable, scale=alt.Scale(zero=False)), x2="high:Q")
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
    return alt.layer(whisker, box, mid, dots).properties(
        width=460,
        height=60 * len(d.shapes),
        title=alt.TitleParams("Spread and outliers", subtitle=sub, anchor="start"),
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
    alt = _altair()
    return alt.vconcat(qq_chart(d), box_chart(d))


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
    alt = _altair()
    import pandas as pd

    edges, counts = np.asarray(b.hist_edges), np.asarray(b.hist_counts)
    width = edges[1] - edges[0]
    total = counts.sum() + b.n_outside
    bars = pd.DataFrame(
        {
            "lo": _r(edges[:-1]),
            "hi": _r(edges[1:]),
            "density": _r(counts / (total * width)),
            "zero": 0.0,
        }
    )
    grid = np.linspace(edges[0], edges[-1], 161)
    curve = pd.DataFrame({"t": _r(grid), "density": _r(dist.pdf(grid, b.df))})
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
            "t": _r([*b.t_star_quantiles, *crit]),
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
        .mark_rule(strokeWidth=1.5)
        .encode(
            x="t:Q",
            color=alt.Color(
                "kind:N",
                title=None,
                scale=alt.Scale(
                    domain=["bootstrap t* quantile", "t critical value"], range=[FLAG, LINE]
                ),
            ),
            strokeDash=alt.StrokeDash("kind:N", legend=None),
        )
    )
    sub = [f"{b.n_resamples} resamples (seed {b.seed}); curve: t density at df = {b.df:.4g}"]
    if b.n_outside:
        sub.append(f"{b.n_outside} extreme t* beyond the plotted range")
    return alt.layer(hist, dens, rules).properties(
        width=460,
        height=200,
        title=alt.TitleParams(
            f"Bootstrap distribution of t* ({b.statistic})", subtitle=sub, anchor="start"
        ),
    )
