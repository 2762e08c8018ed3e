"""Study planning: ``tinfer.plan`` (sample size, power or sensitivity) and its PlanResult.

The numbers come from :mod:`tinfer.core.power` (exact noncentral t; exact TOST power for
equivalence). This module checks parameters, words the answer, and draws it: text repr,
HTML card (small functions returning strings) and an Altair chart.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from ._errors import MissingDependencyError, ParameterError
from ._format import fmt_level
from ._validation import check_level, check_side, close_matches
from .core import power as pw

_GRID_TEXT_ROWS = 20  # grid points listed in the text form; to_frame() has them all

DESIGNS = ("one-sample", "paired", "two-sample")
_EQUIV_PREFIX = "equivalence-"
_FUNC = "plan"
Number = float | int
Grid = Number | Sequence[Number] | np.ndarray


# ============================================================================ result
@dataclass(frozen=True)
class PlanResult:
    """The answer of :func:`tinfer.plan`: sample size, power or smallest detectable effect.

    Holds numbers and words only. For a single plan each number is a scalar; when ``n``,
    ``effect``, ``diff`` or ``power`` was given as a list or array, the numbers that vary are
    tuples with one entry per grid point (``to_frame()`` gives one row per point).

    There is deliberately no "observed power" of a finished test: computed at the observed
    effect, power is a one-to-one restatement of the p-value (p = 0.05 always gives about
    50% for a two-sided test), so it adds no information about the data. To judge what a
    finished study could have detected, use ``result.sensitivity()``, which fixes the
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
    def sentence(self) -> str:
        """The answer in one plain sentence (for a grid: the range it covers)."""
        if self.is_grid:
            return _grid_sentence(self)
        return _single_sentence(self)

    def __str__(self) -> str:
        lines = [f"Study plan: {_design_words(self)} ({self.method})", self.sentence()]
        if self.is_grid:
            frame = self.to_frame()
            show = ["n", "n2", "n_total", "effect", "diff", "power", "target"]
            show = [c for c in show if frame[c].notna().any()]
            rows = _grid_rows(frame[show])  # header first, then one line per grid point
            if len(rows) > _GRID_TEXT_ROWS + 1:
                cut = len(rows) - 1 - _GRID_TEXT_ROWS
                rows = [*rows[: _GRID_TEXT_ROWS + 1], f"... {cut} more row(s); see to_frame()"]
            lines.extend("  " + row for row in rows)
        else:
            lines.extend("  " + line for line in _detail_lines(self))
        return "\n".join(lines)

    def __repr__(self) -> str:
        return f"<PlanResult {self.design}: solved {self.solved}>\n{self}"

    def _repr_mimebundle_(self, include=None, exclude=None) -> dict[str, str]:
        return {"text/plain": repr(self), "text/html": plan_card(self)}

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
        from .display.widgets import explore_plan

        return explore_plan(self)

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
        return _chart(self, effects=effects, levels=levels, x=x, n_max=n_max)


# ============================================================================ words
def _g(x: float, digits: int = 3) -> str:
    """A number with ``digits`` significant digits and a real minus sign."""
    if not np.isfinite(x):
        return "n/a"
    return f"{x:.{digits}g}".replace("-", "−")


def _design_words(p: PlanResult) -> str:
    if p.margin is not None:
        what = {"one-sample": "one sample", "paired": "paired differences"}
        return f"two one-sided t tests for equivalence on {what.get(p.design, 'two samples')}"
    return {
        "one-sample": "one-sample t test",
        "paired": "paired t test",
        "two-sample": "two-sample t test (pooled variance)",
    }[p.design]


def _size_words(p: PlanResult, n: int, n2: int | None) -> str:
    if p.design == "one-sample":
        return f"n = {n}"
    if p.design == "paired":
        return f"{n} pairs"
    if n2 == n:
        return f"{n} per group ({n + n2} in all)"
    return f"{n} in the first group and {n2} in the second ({n + n2} in all)"


def _test_words(p: PlanResult) -> str:
    alpha = fmt_level(1.0 - p.level)
    if p.margin is not None:
        return f"each test at the {alpha} significance level"
    side = {"two-sided": "two-sided", "upper": "one-sided (upper)", "lower": "one-sided (lower)"}
    return f"{side[p.side]} at the {alpha} significance level"


def _effect_words(p: PlanResult, effect: float, diff: float | None) -> str:
    raw = f" (a difference of {_g(diff, 4)} with SD {_g(p.sd, 4)})" if diff is not None else ""
    return f"a standardised effect of {_g(effect)}{raw}"


def _margin_words(p: PlanResult) -> str:
    low, high = p.margin
    unit = "" if p.sd is not None else " SD"
    if low == -high:
        return f"±{_g(high, 4)}{unit}"
    return f"{_g(low, 4)}{unit} to {_g(high, 4)}{unit}"


def _single_sentence(p: PlanResult) -> str:
    size = _size_words(p, p.n, p.n2)
    test = _test_words(p)
    if p.margin is not None:
        true = f"the true difference is {_g(p.diff if p.diff is not None else p.effect, 4)}"
        if p.sd is None:
            true += " SD"
        what = f"show equivalence within {_margin_words(p)} when {true}"
        if p.solved == "n":
            return (
                f"Two one-sided t tests need {size} to {what} with power {_g(p.target)}, "
                f"{test}; the exact power is then {p.power:.3f}."
            )
        return f"Two one-sided t tests with {size} have power {p.power:.3f} to {what}, {test}."
    design = _design_words(p)
    article = "A"  # every design phrase starts with a consonant sound ("one-sample", "paired")
    effect = _effect_words(p, p.effect, p.diff)
    if p.solved == "n":
        return (
            f"{article} {design}, {test}, needs {size} to reach power {_g(p.target)} against "
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
        f"{article} {design} with {size}, {test}, has power {_g(p.target)} against "
        f"{effect} {beyond}; smaller effects are detected less often."
    )


def _grid_sentence(p: PlanResult) -> str:
    k = len(p)
    parts = []
    for name in p.grid:
        vals = np.asarray(getattr(p, name), float)
        parts.append(f"{name} from {_g(np.nanmin(vals))} to {_g(np.nanmax(vals))}")
    solved = np.asarray(getattr(p, p.solved), float)
    unit = {"n": " (first group)" if p.design == "two-sample" and p.ratio != 1 else ""}
    return (
        f"{k} plans for a {_design_words(p)}, {_test_words(p)}, over {', '.join(parts)}: "
        f"the {p.solved}{unit.get(p.solved, '')} needed runs from {_g(np.nanmin(solved), 4)} "
        f"to {_g(np.nanmax(solved), 4)}."
        if p.solved != "power"
        else f"{k} plans for a {_design_words(p)}, {_test_words(p)}, over {', '.join(parts)}: "
        f"power runs from {np.nanmin(solved):.3f} to {np.nanmax(solved):.3f}."
    )


def _detail_lines(p: PlanResult) -> list[str]:
    lines = [f"sample size: {_size_words(p, p.n, p.n2)}"]
    eff = f"standardised effect {_g(p.effect, 4)}"
    if p.diff is not None:
        eff += f" (difference {_g(p.diff, 4)}, SD {_g(p.sd, 4)})"
    lines.append(eff)
    if p.margin is not None:
        lines.append(f"equivalence margins {_margin_words(p)}")
    target = f" (target {_g(p.target)})" if p.target is not None else ""
    lines.append(f"power {p.power:.4f}{target}")
    lines.append(
        f"significance {fmt_level(1 - p.level)}, {p.side}, df {p.df:g}, "
        f"noncentrality {_g(p.ncp, 4)}"
    )
    return lines


def _grid_rows(frame) -> list[str]:
    def cell(v):
        if v is None or (isinstance(v, float) and not np.isfinite(v)):
            return "–"
        if isinstance(v, float):
            return _g(v, 4)
        return str(v)

    rows = [[str(c) for c in frame.columns]]
    rows += [[cell(v) for v in rec] for rec in frame.astype(object).itertuples(index=False)]
    widths = [max(len(r[i]) for r in rows) for i in range(len(rows[0]))]
    return ["  ".join(c.rjust(w) for c, w in zip(r, widths, strict=True)) for r in rows]


# ============================================================================ HTML card
def plan_card(p: PlanResult) -> str:
    """The plan's HTML card (built by :func:`tinfer.display.plan.plan_card`)."""
    from .display.plan import plan_card as build

    return build(p)


# ============================================================================ chart
def _altair():
    try:
        import altair as alt
    except ImportError as err:  # pragma: no cover - depends on the environment
        raise MissingDependencyError(
            "Charts need altair. Install it with: pip install 'tinfer[display]'"
        ) from err
    return alt


def _powers(p: PlanResult, effect, n1, level) -> np.ndarray:
    """Power of this plan's design at (broadcast) effects, first-group sizes and levels."""
    n2 = pw.second_group(n1, p.ratio) if p.design == "two-sample" else None
    if p.margin is None:
        return pw.t_power(effect, n1, n2, level=level, side=p.side)
    scale = p.sd if p.sd is not None else 1.0
    low, high = p.margin[0] / scale, p.margin[1] / scale
    return pw.equivalence_power(effect, low, high, n1, n2, level=level)


def _curve_label(effect: float, level: float, many_e: bool, many_l: bool) -> str:
    parts = []
    if many_e or not many_l:
        parts.append(f"effect {_g(effect)}")
    if many_l:
        parts.append(f"level {fmt_level(level)}")
    return ", ".join(parts)


def _chart(p: PlanResult, *, effects, levels, x, n_max):
    import pandas as pd

    alt = _altair()
    x = x or ("effect" if p.solved == "effect" else "n")
    if x not in ("n", "effect"):
        raise ParameterError(
            f"The 'x' parameter of chart must be 'n' or 'effect'. Got {x!r} instead."
        )
    if x == "effect" and p.margin is not None:
        raise ParameterError(
            "The 'x' parameter of chart must be 'n' for an equivalence plan. Got 'effect' instead."
        )
    plan_n = np.atleast_1d(np.asarray(p.n, float))
    plan_e = np.atleast_1d(np.asarray(p.effect, float))
    plan_p = np.atleast_1d(np.asarray(p.power, float))
    lev = np.asarray(levels if levels is not None else [p.level], float)
    for v in lev:
        check_level(float(v), "chart")
    n_min = pw.smallest_n(p.design == "two-sample", p.ratio)
    if x == "n":
        eff = np.asarray(effects if effects is not None else np.unique(plan_e)[:8], float)
        top = int(n_max or max(2 * np.nanmax(plan_n), n_min + 20))
        grid = np.unique(np.round(np.linspace(n_min, top, 240)))
        pw_grid = _powers(p, eff[:, None, None], grid[None, None, :], lev[None, :, None])
        x_title = {
            "one-sample": "n",
            "paired": "pairs",
            "two-sample": "n per group" if p.ratio == 1 else "n (first group)",
        }[p.design]
        x_vals = grid
    else:
        eff = np.unique(plan_n)[:8]  # one curve per sample size
        lim = 2.0 * np.nanmax(np.abs(plan_e)) if np.isfinite(plan_e).any() else 1.5
        sign = -1.0 if p.side == "lower" else 1.0
        x_vals = sign * np.linspace(0.0, max(lim, 0.1), 240)
        pw_grid = _powers(p, x_vals[None, None, :], eff[:, None, None], lev[None, :, None])
        x_title = "standardised effect"
    rows = []
    many_e, many_l = len(eff) > 1, len(lev) > 1
    for i, e in enumerate(eff):
        for j, lv in enumerate(lev):
            if x == "n":
                label = _curve_label(e, lv, many_e, many_l)
            else:
                label = ", ".join(
                    ([f"n {int(e)}"] if many_e or not many_l else [])
                    + ([f"level {fmt_level(lv)}"] if many_l else [])
                )
            rows.append(pd.DataFrame({"x": x_vals, "power": pw_grid[i, j], "curve": label}))
    data = pd.concat(rows, ignore_index=True)
    enc_x = alt.X("x:Q", title=x_title)
    enc_y = alt.Y("power:Q", title="power", scale=alt.Scale(domain=[0, 1]))
    layers = [
        alt.Chart(data).mark_line().encode(x=enc_x, y=enc_y, color=alt.Color("curve:N", title=None))
    ]
    if p.target is not None:
        targets = np.unique(np.atleast_1d(np.asarray(p.target, float)))
        layers.append(
            alt.Chart(pd.DataFrame({"target": targets}))
            .mark_rule(strokeDash=[4, 4], color="gray")
            .encode(y=alt.Y("target:Q"))
        )
    marks = pd.DataFrame(
        {"x": plan_n if x == "n" else plan_e, "power": plan_p, "what": f"this plan ({p.solved})"}
    )
    layers.append(
        alt.Chart(marks).mark_rule(strokeDash=[2, 2], color="black").encode(x=alt.X("x:Q"))
    )
    layers.append(
        alt.Chart(marks)
        .mark_point(filled=True, size=60, color="black")
        .encode(x=enc_x, y=enc_y, tooltip=["x:Q", "power:Q", "what:N"])
    )
    title = f"Power of a {_design_words(p)}, {_test_words(p)}"
    return alt.layer(*layers).properties(title=title, width=380, height=240)


# ============================================================================ plan()
def _fail(name: str, what: str, got: Any) -> ParameterError:
    return ParameterError(f"The {name!r} parameter of {_FUNC} must be {what}. Got {got!r} instead.")


def _as_array(value: Any, name: str, what: str) -> tuple[np.ndarray, bool]:
    """A scalar or 1-d grid of finite numbers as a float array, and whether it is a grid."""
    is_grid = isinstance(value, list | tuple | np.ndarray) and np.ndim(value) > 0
    try:
        arr = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise _fail(name, what, value) from None
    if isinstance(value, bool) or arr.ndim > 1 or (is_grid and arr.size == 0):
        raise _fail(name, what, value)
    if not np.all(np.isfinite(arr)):
        raise _fail(name, what, value)
    return arr, is_grid


def _check_design(design: Any) -> tuple[str, bool]:
    names = DESIGNS + tuple(_EQUIV_PREFIX + d for d in DESIGNS)
    if design not in names:
        raise ParameterError(
            f"The 'design' parameter of {_FUNC} must be one of {', '.join(map(repr, names))}. "
            f"Got {design!r} instead. {close_matches(design, names).replace('columns', 'designs')}"
        )
    if design.startswith(_EQUIV_PREFIX):
        return design[len(_EQUIV_PREFIX) :], True
    return design, False


def _check_margin(margin: Any) -> tuple[float, float]:
    what = "a positive number m (for -m to m) or a pair (low, high) with low < 0 < high"
    try:
        arr = np.asarray(margin, dtype=float)
    except (TypeError, ValueError):
        raise _fail("margin", what, margin) from None
    if arr.ndim == 0 and np.isfinite(arr) and arr > 0:
        return (-float(arr), float(arr))
    if arr.shape == (2,) and arr[0] < arr[1] and np.all(np.isfinite(arr)):
        return (float(arr[0]), float(arr[1]))
    raise _fail("margin", what, margin)


def _out(a: np.ndarray, grid: bool, kind=float):
    a = np.asarray(a)
    if grid:
        return tuple(kind(v) for v in a.ravel())
    return kind(a.reshape(()))


def plan(
    design: str,
    *,
    effect: Grid | None = None,
    n: Grid | None = None,
    power: Grid | None = None,
    level: float = 0.95,
    side: str = "two-sided",
    ratio: float = 1.0,
    sd: float | None = None,
    diff: Grid | None = None,
    margin: float | tuple[float, float] | None = None,
) -> PlanResult:
    """Plan a t-test study: give all but one of effect, n and power; the missing one is solved.

    Power is exact, from the noncentral t distribution (Cohen 1988, ch. 2): with
    ``alpha = 1 - level`` and ``T'`` noncentral t on ``df`` degrees of freedom with
    noncentrality ``ncp``, a two-sided test has power ``P(T' > c) + P(T' < -c)`` with
    ``c = t(1 - alpha/2, df)``; ``ncp = effect * sqrt(n)`` for one sample or pairs
    (``df = n - 1``) and ``effect * sqrt(n1 n2 / (n1 + n2))`` for two samples
    (pooled-variance t, ``df = n1 + n2 - 2``). A solved n is rounded up to whole units and
    the power it achieves is reported.

    Parameters
    ----------
    design : str
        "one-sample", "paired" (n counts pairs; the SD is that of the differences) or
        "two-sample". "equivalence-one-sample", "equivalence-paired" and
        "equivalence-two-sample" plan two one-sided tests and need ``margin``.
    effect : float or list of float, optional
        True standardised effect (difference over the SD). Signed: a ``side="lower"`` test
        needs a negative effect. A list or array makes a grid of plans.
    n : int or list of int, optional
        Sample size: units, pairs, or the first group of two (the second has
        ``ceil(ratio * n)``). A list or array makes a grid of plans.
    power : float or list of float, optional
        Target power in (0, 1).
    level : float, default 0.95
        Confidence level; the test is at significance ``1 - level``.
    side : {"two-sided", "upper", "lower"}
        Alternative of the planned test.
    ratio : float, default 1.0
        Allocation ``n2 / n1`` for two samples.
    sd : float, optional
        The SD (of the values, of the differences for paired designs, within groups for
        two samples). Needed with ``diff``; with ``effect`` it adds raw differences to the
        answer.
    diff : float or list of float, optional
        True raw difference, instead of ``effect`` (``effect = diff / sd``).
    margin : float or (float, float), optional
        Plan an equivalence study (two one-sided tests, each at significance
        ``1 - level``): equivalence means the true difference lies in ``(-margin, margin)``
        or ``(low, high)``. In raw units when ``sd`` is given, else in SD units. The true
        difference (``effect`` or ``diff``) then defaults to 0 and n or power is solved.

    Returns
    -------
    PlanResult

    Raises
    ------
    ParameterError
        When not exactly one of effect, n and power is missing, or a value is out of range,
        or the target power cannot be reached (for instance an effect of zero).

    Examples
    --------
    >>> import tinfer
    >>> tinfer.plan("two-sample", effect=0.5, power=0.8).n
    64
    >>> round(tinfer.plan("paired", effect=0.4, n=30).power, 4)
    0.5628
    >>> round(tinfer.plan("one-sample", n=25, power=0.9).effect, 4)
    0.6759
    >>> tinfer.plan("two-sample", effect=[0.2, 0.5, 0.8], power=0.8).n
    (394, 64, 26)
    >>> tinfer.plan("equivalence-paired", margin=0.5, power=0.8).n
    36
    """
    base, equivalence = _check_design(design)
    level = check_level(level, _FUNC)
    side = check_side(side, _FUNC)
    two = base == "two-sample"
    if isinstance(ratio, bool) or not isinstance(ratio, int | float | np.number):
        raise _fail("ratio", "a positive number", ratio)
    ratio = float(ratio)
    if not (np.isfinite(ratio) and ratio > 0):
        raise _fail("ratio", "a positive number", ratio)
    if not two and ratio != 1.0:
        raise _fail("ratio", "1 for a one-sample or paired design", ratio)
    if sd is not None:
        sd_arr, sd_grid = _as_array(sd, "sd", "a positive number")
        if sd_grid or not sd_arr > 0:
            raise _fail("sd", "a positive number", sd)
        sd = float(sd_arr)
    if margin is not None:
        equivalence = True
    if equivalence:
        if margin is None:
            raise _fail("margin", f"given for design {design!r}", None)
        if side != "two-sided":
            raise _fail("side", "'two-sided' (its default) for an equivalence plan", side)
    # --- effect (standardised) from effect or diff
    grids: list[str] = []
    if effect is not None and diff is not None:
        raise ParameterError(
            f"The 'effect' and 'diff' parameters of {_FUNC} cannot both be given. Got "
            f"effect={effect!r} and diff={diff!r}; pass one (diff needs sd)."
        )
    eff = None
    if diff is not None:
        if sd is None:
            raise _fail("sd", "a positive number when 'diff' is given", sd)
        d_arr, g = _as_array(diff, "diff", "a finite number or a list of them")
        eff = d_arr / sd
        if g:
            grids.append("diff")
    elif effect is not None:
        eff, g = _as_array(effect, "effect", "a finite number or a list of them")
        if g:
            grids.append("effect")
    if equivalence and eff is None:
        eff = np.asarray(0.0)
    n_arr = None
    if n is not None:
        n_arr, g = _as_array(n, "n", "a whole number of at least 2 or a list of them")
        n_min = pw.smallest_n(two, ratio)
        if np.any(n_arr != np.round(n_arr)) or np.any(n_arr < n_min):
            what = f"a whole number of at least {n_min}" + (
                f" (so that each group has 2 at ratio {ratio:g})" if two and n_min > 2 else ""
            )
            raise _fail("n", what, n)
        if g:
            grids.append("n")
    target = None
    if power is not None:
        target, g = _as_array(power, "power", "a probability in (0, 1)")
        if np.any((target <= 0) | (target >= 1)):
            raise _fail("power", "a probability in (0, 1)", power)
        if g:
            grids.append("power")
    missing = [k for k, v in (("effect", eff), ("n", n_arr), ("power", target)) if v is None]
    if equivalence and len(missing) != 1:
        raise ParameterError(
            f"plan needs exactly one of 'n' and 'power' for an equivalence design (the other is "
            f"solved for; the true difference defaults to 0). Got n={n!r} and power={power!r}."
        )
    if len(missing) != 1:
        given = "all three" if not missing else " and ".join(missing) + " missing"
        raise ParameterError(
            f"plan needs all but one of 'effect' (or 'diff' with 'sd'), 'n' and 'power'; the "
            f"missing one is solved for. Got {given} instead."
        )
    solved = missing[0]
    try:
        shape = np.broadcast_shapes(*(np.shape(a) for a in (eff, n_arr, target) if a is not None))
    except ValueError:
        raise ParameterError(
            f"The grids given to {_FUNC} ({', '.join(grids)}) must have the same length. Got "
            f"lengths {[np.size(a) for a in (eff, n_arr, target) if a is not None]} instead."
        ) from None
    is_grid = bool(grids)
    scale = sd if sd is not None else 1.0
    margin_t = _check_margin(margin) if equivalence else None
    if equivalence:
        low, high = margin_t[0] / scale, margin_t[1] / scale

    def power_at(e, n1):
        n2 = pw.second_group(n1, ratio) if two else None
        if equivalence:
            return pw.equivalence_power(e, low, high, n1, n2, level=level)
        return pw.t_power(e, n1, n2, level=level, side=side)

    if solved == "power":
        n1 = np.broadcast_to(n_arr, shape)
        eff = np.broadcast_to(eff, shape)
        achieved = power_at(eff, n1)
    elif solved == "n":
        eff, target = np.broadcast_arrays(eff, target)
        if equivalence:
            n1 = pw.solve_n_equivalence(
                eff, low, high, power=target, level=level, two_sample=two, ratio=ratio
            )
        else:
            n1 = pw.solve_n(eff, power=target, level=level, side=side, two_sample=two, ratio=ratio)
        bad = ~np.isfinite(n1)
        if bad.any():
            e_bad = np.atleast_1d(eff)[np.atleast_1d(bad)]
            why = (
                "the true difference must lie strictly inside the margins"
                if equivalence
                else "the effect must be non-zero, positive for side='upper' and negative "
                "for side='lower'"
            )
            raise ParameterError(
                f"plan cannot reach the target power for effect {_g(float(e_bad[0]), 4)} with "
                f"n up to {pw.N_MAX:,}: {why}."
            )
        achieved = power_at(eff, n1)
    else:  # effect
        n1, target = np.broadcast_arrays(n_arr, target)
        n2 = pw.second_group(n1, ratio) if two else None
        eff = pw.solve_effect(n1, n2, power=target, level=level, side=side)
        if not np.all(np.isfinite(eff)):
            raise _fail(
                "power",
                f"above the significance level {1 - level:.3g} (the power at no effect)",
                power,
            )
        achieved = power_at(eff, n1)
    n2 = pw.second_group(n1, ratio) if two else None
    df, sc = pw.df_and_scale(n1, n2)
    total = n1 + n2 if two else n1
    return PlanResult(
        design=base,
        solved=solved,
        n=_out(n1, is_grid, int),
        n2=_out(n2, is_grid, int) if two else None,
        n_total=_out(total, is_grid, int),
        effect=_out(eff, is_grid),
        power=_out(achieved, is_grid),
        target=_out(np.broadcast_to(target, shape), is_grid) if target is not None else None,
        level=level,
        side="equivalence" if equivalence else side,
        ratio=ratio,
        df=_out(np.broadcast_to(df, shape), is_grid),
        ncp=_out(np.broadcast_to(eff * sc, shape), is_grid),
        method="exact TOST power by integration over the sample SD"
        if equivalence
        else "exact noncentral t",
        sd=sd,
        diff=_out(eff * sd, is_grid) if sd is not None else None,
        margin=margin_t,
        grid=tuple(grids),
    )


# ============================================================================ from a result
def _design_of(result) -> tuple[str, float, float | None, float]:
    """Design, n (first group), n2 and the observed SD (pooled for two samples) of a result."""
    design = result.design
    if design not in DESIGNS:
        raise ParameterError(f"Planning from a {design!r} result is not supported.")
    if getattr(result, "trim", 0):
        raise ParameterError(
            "Planning from a trimmed-means result is not offered: the exact noncentral-t plan "
            "is for means. Plan with tinfer.plan(...) using the ordinary SD, or recompute the "
            "result with trim=0 first."
        )
    if design == "two-sample":
        a, b = result.summaries
        n1, n2 = float(a.n), float(b.n)
        sd = float(np.sqrt((a.ssd + b.ssd) / (n1 + n2 - 2.0)))
        return design, n1, n2, sd
    (s,) = result.summaries
    return design, float(s.n), None, float(s.sd)


def sensitivity_of(result, power: float = 0.8) -> PlanResult:
    """Smallest standardised effect the design of ``result`` detects with ``power``."""
    design, n1, n2, _ = _design_of(result)
    ratio = n2 / n1 if n2 is not None else 1.0
    return plan(design, n=int(n1), power=power, level=result.level, side=result.side, ratio=ratio)


def follow_up(
    result,
    power: float = 0.8,
    effect: float | None = None,
    *,
    diff: float | None = None,
    level: float | None = None,
    side: str | None = None,
    ratio: float | None = None,
) -> PlanResult:
    """Size a follow-up study with the SD observed in ``result``."""
    design, n1, n2, sd = _design_of(result)
    if effect is None and diff is None:
        effect = result.effect.value
    if ratio is None:
        ratio = n2 / n1 if n2 is not None else 1.0
    return plan(
        design,
        effect=effect,
        diff=diff,
        power=power,
        sd=sd,
        level=result.level if level is None else level,
        side=result.side if side is None else side,
        ratio=ratio,
    )
