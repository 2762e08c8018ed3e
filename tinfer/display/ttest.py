"""The card and chart of one t test (:class:`~tinfer.TResult`).

The card: headline, the test's numbers, per-group descriptives, the hypotheses, the chart
and a provenance line, built from the blocks of :mod:`tinfer.display.html`. The chart: the
t density with the p-value shaded (:mod:`tinfer.display.density`) above the estimate with
its interval. A result with a margin claim gets the equivalence section and chart
(:mod:`tinfer.display.equivalence`) instead.
"""

from __future__ import annotations

import math
from typing import Any

from ..core import distribution as dist
from ..results.equivalence import level_words
from ..results.format import fmt_df, fmt_fixed, fmt_level, fmt_num, fmt_p, p_equals
from ..results.lift import SHORT_NAMES
from ..results.sentences import SIDE_WORDS, test_line
from ..results.ttest import TResult
from ..results.words import capital, interval_words
from .charts import config, to_altair
from .density import (
    MAX_HALF_WIDTH,
    clamp,
    critical_marks,
    density_panel,
    density_rows,
    half_width,
    mark,
    mark_label,
)
from .equivalence import card_section, equivalence_spec
from .estimate import interval_panel
from .html import (
    aside,
    card_start,
    chart_block,
    esc,
    figures_table,
    notes,
    num,
    provenance,
    section,
    version_item,
    when,
    wrap,
)
from .render import card


def result_figures(result: TResult) -> str:
    """The compact table of the test's numbers: the decision's own p and interval in bold.

    With a margin the emphasised p is the equivalence (or non-inferiority) p beside the
    matching ``1 - 2 alpha`` interval; the ordinary test follows on a line of its own.
    """
    e = result.effect
    eq = result.equivalence
    estimate = num(result.fmt(result.estimate), strong=True) + aside(
        f"(SE {fmt_num(result.se, result.decimals)})"
    )
    test = num(f"{fmt_fixed(result.t, 3)} on {fmt_df(result.df)} df")
    if eq is None:
        rows = [
            ("Estimate", estimate),
            (level_label(result), num(_interval_cell(result))),
            ("t", test),
            (f"p-value, {SIDE_WORDS[result.side]}", num(fmt_p(result.p, result.log_p), True)),
        ]
    else:
        label = {"equivalence": "Equivalence p (TOST)"}.get(eq.kind, f"{capital(eq.kind)} p")
        rows = [
            ("Estimate", estimate),
            (capital(level_words(eq)), num(claim_interval(result))),
            (label, num(fmt_p(eq.p, eq.log_p), strong=True)),
        ]
    rows += [
        (f"Effect size, {e.name}", num(fmt_num(e.value, 3)) + aside(
            f"({fmt_level(e.level)} CI {fmt_num(e.ci[0], 3)} to {fmt_num(e.ci[1], 3)})"
        )),
        ("Method", esc(result.method)),
    ]  # fmt: skip
    if result.lift is not None:
        lift = result.lift
        cell = num(esc(lift.short)) + aside(SHORT_NAMES[lift.method])
        rows.insert(2, (f"Relative change vs {esc(lift.reference)}", cell))
    return figures_table(rows)


def claim_interval(result: TResult) -> str:
    """The interval that matches a margin claim's decision: "lo to hi", or the one bound."""
    eq = result.equivalence
    lo, hi = eq.ci
    if eq.lower is not None and eq.upper is not None:
        return f"{result.fmt(lo)} to {result.fmt(hi)}"
    return result.fmt(lo if eq.lower is not None else hi)


def _interval_cell(result: TResult) -> str:
    """The interval's value: "lo to hi", or the one finite bound of a one-sided test."""
    lo, hi = result.ci
    if result.side == "two-sided":
        return f"{result.fmt(lo)} to {result.fmt(hi)}"
    return result.fmt(lo if result.side == "upper" else hi)


def level_label(result: TResult) -> str:
    """The interval's row label: "95% CI", or "95% lower bound" for a one-sided test."""
    if result.side == "two-sided":
        return f"{fmt_level(result.level)} CI"
    which = "lower" if result.side == "upper" else "upper"
    return f"{fmt_level(result.level)} {which} bound"


def reference_line(result: TResult) -> str:
    """With a margin: the ordinary test, on a muted line of its own, for reference only."""
    if result.equivalence is None:
        return ""
    text = (
        f"For reference, not the decision: the ordinary {SIDE_WORDS[result.side]} test "
        f"against {result.fmt(result.null)} gives {test_line(result)}, "
        f"{interval_words(*result.ci, result.fmt, result.level)}."
    )
    return f'<p class="tinfer-foot">{esc(text)}</p>'


def groups_table(result: TResult) -> str:
    """Per-group descriptives: n, missing dropped, mean, SD and SE, in one decimals rule.

    A trimmed-means result shows each group's trimmed mean, winsorised SD and Yuen SE, the
    numbers its test used.
    """
    trimmed = result.trim > 0
    names = ("trimmed mean", "winsorised SD", "SE") if trimmed else ("mean", "SD", "SE")
    if result.estimand == "ratio":  # each group's ratio of sums; SD of the linearised values
        names = ("ratio", "SD (linearised)", "SE")
    d = result.decimals
    head_cells = "".join(
        f'<th scope="col" class="tinfer-num">{h}</th>' for h in ("n", "missing", *names)
    )
    rows = []
    for g in result.groups:
        centre = (
            (g.trimmed_mean, g.winsorised_sd, g.trimmed_se)
            if trimmed and g.trimmed_mean is not None
            else (g.mean, g.sd, g.se)
        )
        cells = (str(g.n), str(g.n_missing), *(fmt_num(v, d) for v in centre))
        tds = "".join(f'<td class="tinfer-num">{esc(c)}</td>' for c in cells)
        rows.append(f'<tr><th scope="row">{esc(g.label)}</th>{tds}</tr>')
    return (
        '<table class="tinfer-groups"><thead><tr><th scope="col">group</th>'
        f"{head_cells}</tr></thead><tbody>{''.join(rows)}</tbody></table>"
    )


def missing_line(result: TResult) -> str:
    """Missing-value counts per group, in one sentence."""
    dropped = [(g.label, g.n_missing) for g in result.groups if g.n_missing]
    if not dropped:
        return "No missing values were dropped."
    counts = ", ".join(f"{label}: {k}" for label, k in dropped)
    return f"Missing values dropped before the test: {counts}."


def result_notes(result: TResult) -> list[str]:
    """The result's warnings, less the per-group missing counts already in :func:`missing_line`."""
    said = {f"{g.n_missing} missing value(s) dropped from {g.label}." for g in result.groups}
    return [w for w in result.warnings if w not in said]


def result_provenance(result: TResult) -> str:
    """The footer: version, time, and only the settings that apply to this design."""
    eq = result.equivalence
    items = [version_item(), ("computed", when(result.created))]
    items.append(("level", esc(fmt_level(result.level))))
    if eq is None:
        items.append(("side", esc(result.side)))
    else:
        items.append(("band", esc(eq.band_words(result.fmt))))
    items.append(("null", esc(result.fmt(result.null))))
    if result.design == "two-sample" and not result.trim:
        items.append(("variances", "pooled" if result.pooled else "not pooled (Welch)"))
    if result.trim:
        items.append(("trim", esc(f"{result.trim:g} per tail")))
    items.append(("fingerprint", f"<code>{esc(result.fingerprint)}</code>"))
    return provenance(items)


def chip(result: TResult) -> tuple[str, str]:
    """The verdict chip: what the card's decision is, in two or three words."""
    eq = result.equivalence
    if eq is not None:
        shown = eq.decision
        return f"{eq.kind} {'shown' if shown else 'not shown'}", (
            "tinfer-chip-out" if shown else "tinfer-chip-in"
        )
    if result.significant:
        return "difference shown" if result.side == "two-sided" else "direction shown", (
            "tinfer-chip-out"
        )
    return "no difference shown", "tinfer-chip-in"


@card.register
def result_card(result: TResult, chart: bool = True) -> str:
    """The full HTML card of a :class:`~tinfer.TResult`.

    Examples
    --------
    >>> import tinfer
    >>> r = tinfer.from_summary(n=12, mean=5.4, sd=1.1, null=5.0, variable="<x>")
    >>> page = result_card(r, chart=False)
    >>> "&lt;x&gt;" in page and "<x>" not in page
    True
    """
    level = fmt_level(result.level)
    numbers = (
        result_figures(result)
        + reference_line(result)
        + card_section(result)
        + section("groups")
        + groups_table(result)
    )
    chart_html = (
        chart_block(
            lambda: result_spec(result),
            f"t density at df {fmt_df(result.df)} with the p-value shaded, "
            f"and the estimate with its {level} CI",
        )
        if chart
        else ""
    )
    inner = (
        card_start(result.method, result.headline(), *chip(result))
        + f'<p class="tinfer-question">{esc("Question tested: " + result.question())}</p>'
        + f'<div class="tinfer-cols"><div class="tinfer-numbers">{numbers}</div>'
        + f"{chart_html}</div>"
        + notes(result_notes(result))
        + f'<p class="tinfer-missing">{esc(missing_line(result))}</p>'
        + result_provenance(result)
    )
    return wrap(str(result), inner)


def result_spec(result: TResult, normal: bool = True) -> dict[str, Any]:
    """The Vega-Lite dict behind :func:`result_chart`.

    A result with a margin claim gets the equivalence chart
    (:func:`tinfer.display.equivalence.equivalence_spec`) instead.

    Examples
    --------
    >>> import tinfer
    >>> r = tinfer.from_summary(n=12, mean=5.4, sd=1.1, null=5.0)
    >>> [p["description"] for p in result_spec(r)["vconcat"]]
    ['t density with p-value', 'estimate and interval']
    """
    if result.equivalence is not None:
        return equivalence_spec(result, normal)
    df, t, side, level = result.df, result.t, result.side, result.level
    crit = float(dist.critical(df, level, side))
    crits = [-crit, crit] if side == "two-sided" else [crit]
    # Widen the range for the observed t only while it fits; further out, t is marked at
    # the edge with an arrow and the curve keeps a readable scale.
    shown_t = [t] if 1.1 * abs(t) <= MAX_HALF_WIDTH else []
    L = half_width([*shown_t, *crits])
    if side == "two-sided":
        a = min(abs(t), L)
        shade, extra = [(-L, -a), (a, L)], [-a, a]
    elif side == "upper":
        a = clamp(t, L)
        shade, extra = [(a, L)], [a]
    else:
        a = clamp(t, L)
        shade, extra = [(-L, a)], [a]
    rows = density_rows(df, L, extra)
    marks = [mark("observed", t, mark_label("t =", t, L), L)]
    marks += critical_marks(crits, L)
    sub = f"shaded area: {p_equals(result.p, result.log_p)} ({side})"
    if normal and not math.isinf(df):
        sub += "; dashed: standard normal"
    title = {"text": f"t distribution, df = {fmt_df(df)}", "subtitle": sub}
    top = density_panel(
        df, L, rows, shade, marks, normal, title, tail_labels=_tail_labels(result, shade)
    )
    top["description"] = "t density with p-value"
    return {
        "config": config(),
        "vconcat": [top, interval_panel(result)],
        "spacing": 16,
    }


def _tail_labels(result: TResult, shade) -> list[str]:
    """The p-value beside the tail it belongs to (two-sided: beside the right tail)."""
    p = p_equals(result.p, result.log_p)
    if len(shade) == 2:
        return ["", f"{p}, both tails"]
    return [p]


def result_chart(result: TResult, normal: bool = True):
    """Two panels for a t test: the t density with the p-value shaded, and the estimate's CI.

    Parameters
    ----------
    result : TResult
        The result to draw.
    normal : bool
        Add the standard normal density as a dashed reference curve.

    Returns
    -------
    altair.VConcatChart
        Not displayed; show it by leaving it last in a notebook cell.

    Examples
    --------
    >>> import tinfer
    >>> r = tinfer.from_summary(n=12, mean=5.4, sd=1.1, null=5.0)
    >>> type(result_chart(r)).__name__
    'VConcatChart'
    """
    return to_altair(result_spec(result, normal))
