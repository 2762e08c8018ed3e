"""A study plan (``tinfer.plan``): the :class:`PlanResult` type and all its words.

Solved by :mod:`tinfer.analyses.plan` (exact noncentral t; exact TOST power for
equivalence); drawn by :mod:`tinfer.display.plan` (card and power curves).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from .card import Card
from .format import fmt_level, fmt_sig

GRID_TEXT_ROWS = 20  # grid points listed in the text form; to_frame() has them all


@dataclass(frozen=True)
class PlanResult(Card):
    """The answer of :func:`tinfer.plan`: sample size, power or smallest detectable effect.

    Holds numbers and words only. For a single plan each number is a scalar; when ``n``,
    ``effect``, ``diff`` or ``power`` was given as a list or array, the numbers that vary are
    tuples with one entry per grid point (``to_frame()`` gives one row per point).

    There is deliberately no "observed power" of a finished test: computed at the observed
    effect, power is a one-to-one restatement of the p-value (p = 0.05 always gives about
    50% for a two-sided test), so it adds no information about the data. To judge what a
    finished study could have detected, use ``result.detectable_effect()``, which fixes the
    design (n, level, side) and reports the smallest effect detected with a chosen power.

    Attributes
    ----------
    design : str
        "one-sample", "paired" or "two-sample".
    solved : str
        Which quantity was solved for: "n", "power" or "effect".
    n : int or tuple of int
        Sample size: units (one sample), pairs (paired) or the first group (two samples).
    n2 : int, tuple of int or None
        Size of the second group (two samples), ``ceil(ratio * n)``.
    n_total : int or tuple of int
        All units (``n + n2`` for two samples).
    effect : float or tuple of float
        True standardised effect: mean difference over the SD (for equivalence, the true
        difference in SD units).
    power : float or tuple of float
        Exact power achieved at ``n`` (above the target when ``n`` was rounded up).
    target : float, tuple of float or None
        The power asked for (None when power was solved for).
    level : float
        Confidence level; the test is at significance ``1 - level``.
    side : str
        "two-sided", "upper" or "lower"; "equivalence" for two one-sided tests.
    ratio : float
        Allocation n2 / n1 (1.0 for one-sample and paired designs).
    df, ncp : float or tuple of float
        Degrees of freedom and noncentrality of the test statistic.
    sd : float or None
        SD used to turn raw differences into standardised ones, when one was given.
    diff : float, tuple of float or None
        The raw difference (``effect * sd``) when an SD was given.
    margin : tuple of float or None
        Equivalence margins (low, high), in raw units when ``sd`` was given, else in SDs.
    method : str
        How power was computed.
    grid : tuple of str
        Names of the inputs given as grids (empty for a single plan).

    Examples
    --------
    >>> import tinfer
    >>> p = tinfer.plan("two-sample", effect=0.5, power=0.8)
    >>> p.n, p.n2, p.n_total, round(p.power, 4)
    (64, 64, 128, 0.8015)
    """

    design: str
    solved: str
    n: int | tuple[int, ...]
    n2: int | tuple[int, ...] | None
    n_total: int | tuple[int, ...]
    effect: float | tuple[float, ...]
    power: float | tuple[float, ...]
    target: float | tuple[float, ...] | None
    level: float
    side: str
    ratio: float
    df: float | tuple[float, ...]
    ncp: float | tuple[float, ...]
    method: str
    sd: float | None = None
    diff: float | tuple[float, ...] | None = None
    margin: tuple[float, float] | None = None
    grid: tuple[str, ...] = ()

    # ------------------------------------------------------------------ shape helpers
    @property
    def is_grid(self) -> bool:
        """True when the plan covers several grid points."""
        return bool(self.grid)

    def __len__(self) -> int:
        return len(self.n) if isinstance(self.n, tuple) else 1

    def _col(self, name: str) -> list:
        v = getattr(self, name)
        if isinstance(v, tuple) and name != "margin":
            return list(v)
        return [v] * len(self)

    # ------------------------------------------------------------------ tables
    def to_frame(self):
        """One row per plan (per grid point) with every number (a pandas DataFrame)."""
        import pandas as pd

        cols = ["design", "solved", "n", "n2", "n_total", "effect", "diff", "sd", "power"]
        cols += ["target", "level", "side", "ratio", "df", "ncp", "method"]
        data = {c: self._col(c) for c in cols}
        if self.margin is not None:
            data["margin_low"] = [self.margin[0]] * len(self)
            data["margin_high"] = [self.margin[1]] * len(self)
        return pd.DataFrame(data)

    def to_dict(self) -> dict[str, Any]:
        """The numbers and words as a dict (tuples for grid columns)."""
        from dataclasses import asdict

        return asdict(self)

    # ------------------------------------------------------------------ words
    def sentence(self, style: str = "plain") -> str:
        """The answer in one plain sentence (for a grid: the range it covers); ``"compact"``
        gives n, power, effect and alpha in the short form."""
        if style != "plain":
            from . import report

            return report.plan_sentence(self, report.check_style(style))
        if self.is_grid:
            return grid_sentence(self)
        return single_sentence(self)

    def __str__(self) -> str:
        lines = [f"Study plan: {design_words(self)} ({self.method})", self.sentence()]
        if self.is_grid:
            frame = self.to_frame()
            show = ["n", "n2", "n_total", "effect", "diff", "power", "target"]
            show = [c for c in show if frame[c].notna().any()]
            rows = grid_rows(frame[show])  # header first, then one line per grid point
            if len(rows) > GRID_TEXT_ROWS + 1:
                cut = len(rows) - 1 - GRID_TEXT_ROWS
                rows = [*rows[: GRID_TEXT_ROWS + 1], f"... {cut} more row(s); see to_frame()"]
            lines.extend("  " + row for row in rows)
        else:
            lines.extend("  " + line for line in detail_lines(self))
        return "\n".join(lines)

    def __repr__(self) -> str:
        return f"<PlanResult {self.design}: solved {self.solved}>\n{self}"

    def plain_text(self) -> str:
        return repr(self)

    def explore(self):
        """Sliders for the given quantities (effect, n, power), level and ratio, solved live.

        Returns an ipywidgets VBox; the plan shown is kept in its ``result`` attribute.
        Needs ipywidgets; a grid of plans cannot be explored (plan one point).

        Examples
        --------
        >>> import tinfer
        >>> ex = tinfer.plan("paired", effect=0.4, power=0.8).explore()
        >>> ex.power.value = 0.9
        >>> ex.result.n
        68
        """
        from ..display.widgets import explore_plan

        return explore_plan(self)

    def recompute(self, **changes: Any) -> PlanResult:
        """The same plan with other inputs, solved again for the same quantity.

        ``changes`` are keywords of :func:`tinfer.plan` (``effect``, ``n``, ``power``,
        ``level``, ``side``, ``ratio``, ``sd``, ``margin``); the others keep this plan's values.

        Examples
        --------
        >>> import tinfer
        >>> tinfer.plan("two-sample", effect=0.5, power=0.8).recompute(effect=0.8).n
        26
        """
        from ..analyses.plan import replan

        return replan(self, **changes)

    # ------------------------------------------------------------------ chart
    def chart(
        self,
        *,
        effects: Sequence[float] | None = None,
        levels: Sequence[float] | None = None,
        x: str | None = None,
        n_max: int | None = None,
    ):
        """Power curve(s) as an Altair chart (returned, not displayed).

        Power against n (default) with the target power as a dashed rule and the plan's
        n marked, or power against the standardised effect (``x="effect"``, the default
        when the effect was solved for). ``effects`` and ``levels`` draw one curve each.

        Examples
        --------
        >>> import tinfer
        >>> c = tinfer.plan("two-sample", effect=0.5, power=0.8).chart(effects=[0.3, 0.5, 0.8])
        >>> type(c).__name__
        'LayerChart'
        """
        from ..display.plan import plan_chart

        return plan_chart(self, effects=effects, levels=levels, x=x, n_max=n_max)


def design_words(p: PlanResult) -> str:
    if p.margin is not None:
        what = {"one-sample": "one sample", "paired": "paired differences"}
        return f"two one-sided t tests for equivalence on {what.get(p.design, 'two samples')}"
    return {
        "one-sample": "one-sample t test",
        "paired": "paired t test",
        "two-sample": "two-sample t test (pooled variance)",
    }[p.design]


def size_words(p: PlanResult, n: int, n2: int | None) -> str:
    if p.design == "one-sample":
        return f"n = {n}"
    if p.design == "paired":
        return f"{n} pairs"
    if n2 == n:
        return f"{n} per group ({n + n2} in all)"
    return f"{n} in the first group and {n2} in the second ({n + n2} in all)"


def test_words(p: PlanResult) -> str:
    alpha = fmt_level(1.0 - p.level)
    if p.margin is not None:
        return f"each test at the {alpha} significance level"
    side = {"two-sided": "two-sided", "upper": "one-sided (upper)", "lower": "one-sided (lower)"}
    return f"{side[p.side]} at the {alpha} significance level"


def effect_words(p: PlanResult, effect: float, diff: float | None) -> str:
    raw = (
        f" (a difference of {fmt_sig(diff, 4)} with SD {fmt_sig(p.sd, 4)})"
        if diff is not None
        else ""
    )
    return f"a standardised effect of {fmt_sig(effect)}{raw}"


def margin_words(p: PlanResult) -> str:
    low, high = p.margin
    unit = "" if p.sd is not None else " SD"
    if low == -high:
        return f"±{fmt_sig(high, 4)}{unit}"
    return f"{fmt_sig(low, 4)}{unit} to {fmt_sig(high, 4)}{unit}"


def single_sentence(p: PlanResult) -> str:
    size = size_words(p, p.n, p.n2)
    test = test_words(p)
    if p.margin is not None:
        true = f"the true difference is {fmt_sig(p.diff if p.diff is not None else p.effect, 4)}"
        if p.sd is None:
            true += " SD"
        what = f"show equivalence within {margin_words(p)} when {true}"
        if p.solved == "n":
            return (
                f"Two one-sided t tests need {size} to {what} with power {fmt_sig(p.target)}, "
                f"{test}; the exact power is then {p.power:.3f}."
            )
        return f"Two one-sided t tests with {size} have power {p.power:.3f} to {what}, {test}."
    design = design_words(p)
    article = "A"  # every design phrase starts with a consonant sound ("one-sample", "paired")
    effect = effect_words(p, p.effect, p.diff)
    if p.solved == "n":
        return (
            f"{article} {design}, {test}, needs {size} to reach power {fmt_sig(p.target)} against "
            f"{effect}; its exact power is then {p.power:.3f}."
        )
    if p.solved == "power":
        return f"{article} {design} with {size}, {test}, has power {p.power:.3f} against {effect}."
    beyond = {
        "two-sided": "or larger in either direction",
        "upper": "or larger",
        "lower": "or below",
    }[p.side]
    return (
        f"{article} {design} with {size}, {test}, has power {fmt_sig(p.target)} against "
        f"{effect} {beyond}; smaller effects are detected less often."
    )


def grid_sentence(p: PlanResult) -> str:
    k = len(p)
    parts = []
    for name in p.grid:
        vals = np.asarray(getattr(p, name), float)
        parts.append(f"{name} from {fmt_sig(np.nanmin(vals))} to {fmt_sig(np.nanmax(vals))}")
    solved = np.asarray(getattr(p, p.solved), float)
    unit = {"n": " (first group)" if p.design == "two-sample" and p.ratio != 1 else ""}
    return (
        f"{k} plans for a {design_words(p)}, {test_words(p)}, over {', '.join(parts)}: "
        f"the {p.solved}{unit.get(p.solved, '')} needed runs from {fmt_sig(np.nanmin(solved), 4)} "
        f"to {fmt_sig(np.nanmax(solved), 4)}."
        if p.solved != "power"
        else f"{k} plans for a {design_words(p)}, {test_words(p)}, over {', '.join(parts)}: "
        f"power runs from {np.nanmin(solved):.3f} to {np.nanmax(solved):.3f}."
    )


def detail_lines(p: PlanResult) -> list[str]:
    lines = [f"sample size: {size_words(p, p.n, p.n2)}"]
    eff = f"standardised effect {fmt_sig(p.effect, 4)}"
    if p.diff is not None:
        eff += f" (difference {fmt_sig(p.diff, 4)}, SD {fmt_sig(p.sd, 4)})"
    lines.append(eff)
    if p.margin is not None:
        lines.append(f"equivalence margins {margin_words(p)}")
    target = f" (target {fmt_sig(p.target)})" if p.target is not None else ""
    lines.append(f"power {p.power:.4f}{target}")
    lines.append(f"significance level {fmt_level(1 - p.level)}, {p.side}")
    return lines


def grid_rows(frame) -> list[str]:
    def cell(v):
        if v is None or (isinstance(v, float) and not np.isfinite(v)):
            return "–"
        if isinstance(v, float):
            return fmt_sig(v, 4)
        return str(v)

    rows = [[str(c) for c in frame.columns]]
    rows += [[cell(v) for v in rec] for rec in frame.astype(object).itertuples(index=False)]
    widths = [max(len(r[i]) for r in rows) for i in range(len(rows[0]))]
    return ["  ".join(c.rjust(w) for c, w in zip(r, widths, strict=True)) for r in rows]
