"""From result to report: one sentence per result, and tables as Markdown, LaTeX and HTML.

Two sentence styles: ``"plain"`` (the house style: the answer in words first, then the
numbers) and ``"compact"`` (the convention common in journals: the statistic with its df in
parentheses, p, then the effect size with its interval). Numbers go through
:mod:`tinfer.results.format`; the Markdown and LaTeX forms use an ASCII minus, HTML a real
minus sign.
"""

from __future__ import annotations

import html as _html
import math
from typing import Any

from .format import MINUS, fmt_bf, fmt_df, fmt_level, fmt_num, fmt_p, fmt_sig

STYLES = ("plain", "compact")
EFFECT_SYMBOLS = {"Cohen's d": "d", "d_z": "d_z", "Hedges' g": "g"}


def check_style(style: Any, func: str = "sentence") -> str:
    from ..checks import fail

    if style not in STYLES:
        raise fail("style", func, "'plain' or 'compact'", style)
    return style


def _ci(lo: float, hi: float, fmt) -> str:
    return f"[{fmt(lo)}, {fmt(hi)}]"


# ---------------------------------------------------------------------------- t results
def ttest_sentence(r, style: str) -> str:
    """One sentence for a :class:`~tinfer.TResult` (ordinary, trimmed or with a margin)."""
    lv = fmt_level(r.level)
    est = r.fmt(r.estimate)  # with the units, when the result has them
    lo, hi = r.ci
    eff = r.effect
    if style == "plain":
        from .sentences import quantity

        first = quantity(r)
        text = (
            f"The {first} was {est} ({lv} CI {r.interval_words()}); "
            f"t = {fmt_num(r.t, 2)} on {fmt_df(r.df)} df, p = {fmt_p(r.p, r.log_p)}"
        )
        if math.isfinite(eff.value):
            elo, ehi = (fmt_num(v, 2) for v in eff.ci)
            text += f"; {eff.name} {fmt_num(eff.value, 2)} ({lv} CI {elo} to {ehi})"
        text += "."
        if r.equivalence is not None:
            text += " " + equivalence_clause(r, style)
        return text
    symbol = "M" if r.design == "one-sample" else "M_diff"
    stat = "t" if not getattr(r, "trim", 0.0) else "t_Yuen"
    parts = [
        f"{symbol} = {est}, {lv} CI {_ci(lo, hi, r.fmt)}",
        f"{stat}({fmt_df(r.df)}) = {fmt_num(r.t, 2)}, p = {fmt_p(r.p, r.log_p)}",
    ]
    if math.isfinite(eff.value):
        sym = EFFECT_SYMBOLS.get(eff.name, eff.name)
        parts.append(
            f"{sym} = {fmt_num(eff.value, 2)}, {lv} CI {_ci(*eff.ci, lambda v: fmt_num(v, 2))}"
        )
    text = ", ".join(parts)
    if r.equivalence is not None:
        text += "; " + equivalence_clause(r, style)
    return text


def equivalence_clause(r, style: str) -> str:
    """The margin claim: its conclusion, p and matching interval."""
    eq = r.equivalence
    lv = fmt_level(eq.ci_level)
    lo, hi = eq.ci
    if style == "plain":
        return (
            f"{eq.conclusion[:1].upper()}{eq.conclusion[1:]} (two one-sided tests, "
            f"p = {fmt_p(eq.p, eq.log_p)}; {lv} CI {r.fmt(lo)} to {r.fmt(hi)})."
        )
    tests = [
        f"t_{side}({fmt_df(s.df)}) = {fmt_num(s.t, 2)}"
        for side, s in (("lower", eq.lower), ("upper", eq.upper))
        if s is not None
    ]
    return f"TOST {', '.join(tests)}, p = {fmt_p(eq.p, eq.log_p)}, {lv} CI {_ci(lo, hi, r.fmt)}"


def sentence_of(r, style: str) -> str:
    """The sentence of a t result or a pairwise family."""
    from .pairwise import PairwiseResult

    return (
        pairwise_sentence(r, style) if isinstance(r, PairwiseResult) else ttest_sentence(r, style)
    )


# --------------------------------------------------------------------------- other types
def pairwise_sentence(r, style: str, most: int = 3) -> str:
    """The headline of a pairwise family and its largest differing pairs (at most ``most``)."""
    order = [i for i in r.order_by_estimate() if r.differs[i]]
    labels = r.pair_labels()
    kind = r.interval_kind

    def one(i: int) -> str:
        lo, hi = r.ci_low[i], r.ci_high[i]
        f = r.fmt if hasattr(r, "fmt") else (lambda v: fmt_num(v, 2))
        if style == "plain":
            return (
                f"{labels[i]} {f(r.estimate[i])} ({kind}: {f(lo)} to {f(hi)}, "
                f"adjusted p = {fmt_p(r.p_adjusted[i])})"
            )
        return (
            f"{labels[i]}: {f(r.estimate[i])}, CI {_ci(lo, hi, f)}, "
            f"p_adj = {fmt_p(r.p_adjusted[i])}"
        )

    shown = [one(i) for i in order[:most]]
    more = len(order) - len(shown)
    tail = f"; and {more} more" if more > 0 else ""
    if style == "plain":
        return r.headline() + (f" Differing: {'; '.join(shown)}{tail}." if shown else "")
    head = f"{r.method_name} ({kind}), {r.n_tested} comparisons, {r.n_differ} at {r.alpha:g}"
    return head + (": " + "; ".join(shown) + tail if shown else "")


def bayes_sentence(b, style: str) -> str:
    """The Bayes factor both ways, with its prior and the posterior of delta."""
    lv = fmt_level(b.level)
    lo, hi = (fmt_sig(v, 3) for v in b.interval)
    if style == "plain":
        return (
            f"{b.headline} ({b.prior_words}; posterior median of the standardised effect "
            f"{fmt_sig(b.median, 3)}, {lv} credible interval {lo} to {hi}.)"
        )
    name = {"two-sided": "BF10", "upper": "BF+0", "lower": "BF-0"}[b.side]
    return (
        f"{name} = {fmt_bf(b.log_bf)} (Cauchy prior, r = {fmt_sig(b.scale, 3)}), "
        f"posterior median delta = {fmt_sig(b.median, 3)}, {lv} CrI [{lo}, {hi}]"
    )


def plan_sentence(p, style: str) -> str:
    """A study plan: its plain sentence, or n, power and effect in the compact form."""
    if style == "plain" or p.is_grid:
        return p.sentence()
    return (
        f"n = {p.n}" + (f" and {p.n2}" if p.n2 is not None else "") + f" for power "
        f"{fmt_num(p.power, 3)} at effect {fmt_num(p.effect, 3)}, alpha = "
        f"{fmt_num(1 - p.level, 3)} ({p.side}; {p.method})"
    )


# ------------------------------------------------------------------------------ tables
def value_text(v: Any) -> str:
    """One value of a ``to_dict()`` as table text (numbers to 4 significant digits).

    >>> value_text(0.123456), value_text(12), value_text(True), value_text((1.5, 2.25))
    ('0.1235', '12', 'True', '1.5, 2.25')
    """
    if isinstance(v, bool) or v is None or isinstance(v, str):
        return str(v)
    if isinstance(v, int):
        return str(v)
    if isinstance(v, float):
        return fmt_num(v)
    if isinstance(v, tuple | list):
        return ", ".join(value_text(x) for x in v)
    return str(v)


def plain_minus(text: str) -> str:
    """Real minus signs and infinities back to ASCII (for Markdown and LaTeX)."""
    return text.replace(MINUS, "-").replace("∞", "inf")


def markdown_table(headers: list[str], rows: list[list[str]], note: str = "") -> str:
    """A GitHub-flavoured Markdown table with an optional note line under it.

    >>> print(markdown_table(["a", "b"], [["1", "x|y"]]))
    | a | b |
    |---|---|
    | 1 | x\\|y |
    """

    def cell(text: str) -> str:
        return plain_minus(str(text)).replace("|", "\\|").replace("\n", " ")

    lines = ["| " + " | ".join(cell(h) for h in headers) + " |"]
    lines.append("|" + "|".join("---" for _ in headers) + "|")
    lines += ["| " + " | ".join(cell(c) for c in row) + " |" for row in rows]
    if note:
        lines += ["", cell(note)]
    return "\n".join(lines)


_LATEX_SPECIAL = {
    "\\": r"\textbackslash{}",
    "&": r"\&",
    "%": r"\%",
    "$": r"\$",
    "#": r"\#",
    "_": r"\_",
    "{": r"\{",
    "}": r"\}",
    "~": r"\textasciitilde{}",
    "^": r"\textasciicircum{}",
}


def latex_escape(text: str) -> str:
    """Escape LaTeX's special characters; ASCII minus; other non-ASCII kept as is.

    >>> latex_escape("50% of a_b & c")
    '50\\\\% of a\\\\_b \\\\& c'
    """
    text = plain_minus(str(text))
    return "".join(_LATEX_SPECIAL.get(ch, ch) for ch in text)


def latex_table(headers: list[str], rows: list[list[str]], note: str = "") -> str:
    """A ``tabular`` fragment (no packages needed) with the note as a footnote-sized line."""
    spec = "l" + "r" * (len(headers) - 1)
    body = [r"\begin{tabular}{" + spec + "}", r"\hline"]
    body.append(" & ".join(latex_escape(h) for h in headers) + r" \\")
    body.append(r"\hline")
    body += [" & ".join(latex_escape(c) for c in row) + r" \\" for row in rows]
    body += [r"\hline", r"\end{tabular}"]
    if note:
        body.append(r"\par{\footnotesize " + latex_escape(note) + "}")
    return "\n".join(body)


def html_table(headers: list[str], rows: list[list[str]], note: str = "") -> str:
    """A plain HTML table (escaped, real minus signs) with the note as a caption-like line."""
    esc = _html.escape
    head = "".join(f"<th>{esc(h)}</th>" for h in headers)
    body = "".join(
        "<tr>" + "".join(f"<td>{esc(str(c))}</td>" for c in row) + "</tr>" for row in rows
    )
    foot = f'<p class="tinfer-table-note">{esc(note)}</p>' if note else ""
    return (
        f'<div class="tinfer-report"><table><thead><tr>{head}</tr></thead>'
        f"<tbody>{body}</tbody></table>{foot}</div>"
    )
