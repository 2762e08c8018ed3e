"""The card of a relative lift (:class:`~tinfer.RelativeLift`): the lift in percent, its
interval (or why there is none), the ratio and the method. No chart: the t result's card
already draws the difference."""

from __future__ import annotations

from ..results.format import fmt_df, fmt_level, pct
from ..results.lift import METHOD_NAMES, RelativeLift
from . import html
from .render import card


@card.register
def lift_card(r: RelativeLift, chart: bool = True) -> str:
    """HTML card for :class:`~tinfer.RelativeLift`.

    Examples
    --------
    >>> import tinfer
    >>> lift = tinfer.from_summary(n=(50, 50), mean=(5.3, 5.0), sd=(1, 1)).relative_lift()
    >>> "Fieller" in lift_card(lift)
    True
    """
    lv = fmt_level(r.level)
    d = r.decimals
    interval = (
        f"{pct(r.ci[0], d)} to {pct(r.ci[1], d)}".replace("unbounded", "no limit")
        if r.bounded
        else "unbounded (the reference mean is not clearly away from zero)"
    )
    figures = html.figures_table(
        [
            ("Relative lift", html.num(pct(r.lift, d), strong=True)),
            (f"{lv} interval", html.num(interval)),
            ("Ratio of means", html.num(f"{r.ratio:.4g}")),
            ("Method", html.num(METHOD_NAMES[r.method]) + html.aside(f"(df {fmt_df(r.df)})")),
        ]
    )
    prov = [html.version_item(), ("level", html.esc(lv)), ("side", html.esc(r.side))]
    inner = (
        html.card_start(f"Relative lift · {r.variable}", r.headline)
        + f'<div class="tinfer-numbers">{figures}</div>'
        + html.provenance(prov)
    )
    return html.wrap(repr(r), inner)
