"""Several results as one tidy table (``tinfer.table``), exportable as Markdown, LaTeX, HTML.

Single t results, batches (one row per tested segment and metric) and pairwise families (one
row per pair) share the columns of :data:`COLUMNS`; a note line names every method,
adjustment and level the rows used, so the table can travel without its cards.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from . import report
from .format import column_decimals, fmt_df, fmt_fixed, fmt_level, fmt_num, fmt_p
from .lift import lift_cell

#: every column a report table can show, in order, with its header
COLUMNS = {
    "comparison": "comparison",
    "estimate": "estimate",
    "ci": "CI",
    "relative": "relative change",
    "t": "t",
    "df": "df",
    "p": "p",
    "p_adjusted": "adjusted p",
    "effect": "effect size",
    "effect_ci": "effect CI",
    "n": "n",
}


@dataclass(frozen=True, eq=False)
class ReportTable:
    """Rows of formatted numbers with their headers and a note; see :func:`table`.

    ``frame`` holds the same rows as numbers (a pandas DataFrame) for further work.
    """

    headers: tuple[str, ...]
    rows: tuple[tuple[str, ...], ...]
    note: str
    frame: Any

    def to_markdown(self) -> str:
        """GitHub-flavoured Markdown: the table, a blank line, the note."""
        return report.markdown_table(list(self.headers), [list(r) for r in self.rows], self.note)

    def to_latex(self) -> str:
        """A LaTeX ``tabular`` fragment (no packages needed) and the note under it."""
        return report.latex_table(list(self.headers), [list(r) for r in self.rows], self.note)

    def to_html(self) -> str:
        """A plain HTML table and the note (escaped; no styles, no scripts)."""
        return report.html_table(list(self.headers), [list(r) for r in self.rows], self.note)

    def _repr_html_(self) -> str:
        return self.to_html()

    def __str__(self) -> str:
        return self.to_markdown()

    def __repr__(self) -> str:
        return f"<ReportTable: {len(self.rows)} rows>\n{self}"


def _row(comparison, est, lo, hi, t, df, p, padj, eff_name, eff, elo, ehi, n, dec) -> dict:
    def num(v: float) -> str:
        return fmt_fixed(v, dec) if np.isfinite(v) else fmt_num(v)

    symbol = report.EFFECT_SYMBOLS.get(eff_name, eff_name)
    return {
        "comparison": comparison,
        "estimate": num(est),
        "ci": f"[{num(lo)}, {num(hi)}]",
        "t": fmt_num(t, 2),
        "df": fmt_df(df),
        "p": fmt_p(p),
        "p_adjusted": "" if padj is None else fmt_p(padj),
        "effect": f"{symbol} = {fmt_num(eff, 2)}" if np.isfinite(eff) else "",
        "effect_ci": f"[{fmt_num(elo, 2)}, {fmt_num(ehi, 2)}]" if np.isfinite(eff) else "",
        "n": n,
        "relative": "",
        "_numbers": dict(estimate=est, ci_low=lo, ci_high=hi, t=t, df=df, p=p, p_adjusted=padj),
    }


def _rows_of(r) -> tuple[list[dict], list[str]]:
    """Rows and note parts for one result."""
    from .batch import BatchResult
    from .pairwise import PairwiseResult
    from .ttest import TResult

    if isinstance(r, TResult):
        return _single_rows(r)
    if isinstance(r, PairwiseResult):
        return _family_rows(r)
    if isinstance(r, BatchResult):
        return _batch_rows(r)
    raise TypeError(
        f"tinfer.table takes t results, batches and pairwise families; got {type(r).__name__}."
    )


def _single_rows(r) -> tuple[list[dict], list[str]]:
    e = r.effect
    n = ", ".join(str(g.n) for g in r.groups)
    row = _row(
        f"{r.variable}: {r.comparison}",
        r.estimate,
        *r.ci,
        r.t,
        r.df,
        r.p,
        None,
        e.name,
        e.value,
        *e.ci,
        n,
        r.decimals,
    )
    if r.lift is not None:
        row["relative"] = lift_cell(r.lift.lift, *r.lift.ci, r.lift.bounded)
    return [row], [f"{r.method}, {fmt_level(r.level)} CI, {r.side}"]


def _family_rows(r) -> tuple[list[dict], list[str]]:
    frame = r.to_frame()
    labels = r.pair_labels()
    dec = column_decimals(r.se[np.isfinite(r.se)])
    rows = []
    for i in range(len(labels)):
        rec = frame.iloc[i]
        rows.append(
            _row(
                f"{r.variable}: {labels[i]}",
                r.estimate[i],
                r.ci_low[i],
                r.ci_high[i],
                r.t[i],
                r.df[i],
                r.p_single[i],
                r.p_adjusted[i],
                "Hedges' g",
                rec["effect"],
                rec["effect_ci_low"],
                rec["effect_ci_high"],
                f"{int(rec['n_first'])}, {int(rec['n_second'])}",
                dec,
            )
        )
    return rows, [f"{r.method_name}: {r.interval_kind}, p adjusted for the family"]


def _batch_rows(r) -> tuple[list[dict], list[str]]:
    frame = r.to_frame()
    idx = np.flatnonzero(r.testable)
    dec = column_decimals(r.se[idx])
    labels = r.segment_labels()
    lo, hi = r.effect_ci
    rows = []
    for i in idx:
        n = f"{int(r.n_a[i])}" + (f", {int(r.n_b[i])}" if r.design == "two-sample" else "")
        rows.append(
            _row(
                f"{frame['metric'].iloc[i]}: {labels[i]}",
                r.estimate[i],
                r.ci_low[i],
                r.ci_high[i],
                r.t[i],
                r.df[i],
                r.p[i],
                r.p_adjusted[i],
                r.effect_name,
                r.effect[i],
                lo[i],
                hi[i],
                n,
                dec,
            )
        )
    if r.relative is not None:
        lifts = r.lifts()
        for i, row in zip(idx, rows, strict=True):
            row["relative"] = lift_cell(*(float(v[i]) for v in lifts.values()))
    return rows, [f"{r.method}, {fmt_level(r.level)} CI, {r.adjust_name} across the batch"]


def table(results: Sequence[Any] | Any, columns: Sequence[str] | None = None) -> ReportTable:
    """Several results as one table: one row per test, with a note naming the methods.

    Parameters
    ----------
    results : result or sequence of results
        :class:`~tinfer.TResult`, :class:`~tinfer.BatchResult` (its tested rows) and
        :class:`~tinfer.PairwiseResult` (one row per pair), in any mix.
    columns : sequence of str, optional
        Which columns, in order, from ``comparison``, ``estimate``, ``ci``, ``relative``
        (the lift of results made with ``relative=``), ``t``, ``df``, ``p``, ``p_adjusted``,
        ``effect``, ``effect_ci`` and ``n``. The default shows them all, leaving out
        ``relative`` and ``p_adjusted`` when no row has one.

    Returns
    -------
    ReportTable
        With ``to_markdown()``, ``to_latex()``, ``to_html()`` and ``frame`` (the numbers).

    Examples
    --------
    >>> import tinfer
    >>> a = tinfer.from_summary(n=(12, 15), mean=(5.1, 4.3), sd=(1.2, 1.5), variable="kg")
    >>> print(tinfer.table([a], columns=["comparison", "estimate", "ci", "p"]).to_markdown())
    | comparison | estimate | CI | p |
    |---|---|---|---|
    | kg: first minus second | 0.80 | [-0.27, 1.87] | 0.136 |
    <BLANKLINE>
    Welch two-sample t test, 95% CI, two-sided.
    """
    import pandas as pd

    from ..checks import fail

    items = list(results) if isinstance(results, list | tuple) else [results]
    rows: list[dict] = []
    notes: list[str] = []
    for r in items:
        more, note = _rows_of(r)
        rows += more
        notes += [n for n in note if n not in notes]
    if columns is None:
        optional = ("p_adjusted", "relative")  # shown when some row has one
        columns = [c for c in COLUMNS if c not in optional or any(r[c] for r in rows)]
    columns = list(columns)
    for c in columns:
        if c not in COLUMNS:
            raise fail("columns", "table", f"names from {', '.join(COLUMNS)}", c)
    frame = pd.DataFrame([{"comparison": r["comparison"], **r["_numbers"]} for r in rows])
    return ReportTable(
        headers=tuple(COLUMNS[c] for c in columns),
        rows=tuple(tuple(str(r[c]) for c in columns) for r in rows),
        note="; ".join(notes) + ".",
        frame=frame,
    )
