"""Study planning: ``tinfer.plan`` solves for the sample size, the power or the effect.

The numbers come from :mod:`tinfer.core.power` (exact noncentral t; exact TOST power for
equivalence). This module checks the inputs and solves; the answer is a
:class:`~tinfer.PlanResult` (:mod:`tinfer.results.plan`, with its words), drawn by
:mod:`tinfer.display.plan`.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from ..core import power as pw
from ..docstrings import fill_params
from ..errors import ParameterError
from ..results.format import fmt_sig
from ..results.plan import PlanResult
from .plan_inputs import DESIGNS, EQUIV_PREFIX, Grid, Inputs, fail, read_inputs


def _out(a: np.ndarray, grid: bool, kind=float):
    a = np.asarray(a)
    if grid:
        return tuple(kind(v) for v in a.ravel())
    return kind(a.reshape(()))


@fill_params()
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
    {level}
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
    q = read_inputs(design, effect, n, power, level, side, ratio, sd, diff, margin)
    n1, eff, target, achieved = _solve(q)
    two = q.base == "two-sample"
    g = bool(q.grids)
    n2 = pw.second_group(n1, q.ratio) if two else None
    df, sc = pw.df_and_scale(n1, n2)
    total = n1 + n2 if two else n1
    return PlanResult(
        design=q.base,
        solved=q.solved,
        n=_out(n1, g, int),
        n2=_out(n2, g, int) if two else None,
        n_total=_out(total, g, int),
        effect=_out(eff, g),
        power=_out(achieved, g),
        target=_out(np.broadcast_to(target, q.shape), g) if target is not None else None,
        level=q.level,
        side="equivalence" if q.equivalence else q.side,
        ratio=q.ratio,
        df=_out(np.broadcast_to(df, q.shape), g),
        ncp=_out(np.broadcast_to(eff * sc, q.shape), g),
        method="exact TOST power by integration over the sample SD"
        if q.equivalence
        else "exact noncentral t",
        sd=q.sd,
        diff=_out(eff * q.sd, g) if q.sd is not None else None,
        margin=q.margin,
        grid=tuple(q.grids),
    )


def _solve(q: Inputs):
    """Solve for the missing quantity: returns n1, effect, target power and exact power."""
    if q.solved == "power":
        n1 = np.broadcast_to(q.n, q.shape)
        eff = np.broadcast_to(q.effect, q.shape)
        return n1, eff, q.target, q.power_at(eff, n1)
    if q.solved == "n":
        eff, target = np.broadcast_arrays(q.effect, q.target)
        if q.equivalence:
            low, high = q.std_margin
            n1 = pw.solve_n_equivalence(
                eff, low, high, power=target, level=q.level, two_sample=q.two, ratio=q.ratio
            )
        else:
            n1 = pw.solve_n(
                eff, power=target, level=q.level, side=q.side, two_sample=q.two, ratio=q.ratio
            )
        bad = ~np.isfinite(n1)
        if bad.any():
            e_bad = np.atleast_1d(eff)[np.atleast_1d(bad)]
            why = (
                "the true difference must lie strictly inside the margins"
                if q.equivalence
                else "the effect must be non-zero, positive for side='upper' and negative "
                "for side='lower'"
            )
            raise ParameterError(
                f"plan cannot reach the target power for effect "
                f"{fmt_sig(float(e_bad[0]), 4)} with n up to {pw.N_MAX:,}: {why}."
            )
        return n1, eff, target, q.power_at(eff, n1)
    n1, target = np.broadcast_arrays(q.n, q.target)
    n2 = pw.second_group(n1, q.ratio) if q.two else None
    eff = pw.solve_effect(n1, n2, power=target, level=q.level, side=q.side)
    if not np.all(np.isfinite(eff)):
        raise fail(
            "power",
            f"above the significance level {1 - q.level:.3g} (the power at no effect)",
            q.power_given,
        )
    return n1, eff, target, q.power_at(eff, n1)


def replan(p: PlanResult, **changes: Any) -> PlanResult:
    """``p`` solved again with some inputs changed (see ``PlanResult.recompute``)."""
    allowed = {"effect", "n", "power", "level", "side", "ratio", "sd", "margin"}
    unknown = set(changes) - allowed
    if unknown:
        raise TypeError(
            f"recompute() got unexpected option(s) {sorted(unknown)}; use {sorted(allowed)}."
        )
    given: dict[str, Any] = {"level": p.level, "ratio": p.ratio, "sd": p.sd}
    if p.margin is not None:
        given["margin"] = tuple(p.margin)
    else:
        given["side"] = p.side
    values = {"effect": p.effect, "n": p.n, "power": p.target}
    for name, value in values.items():
        if name != p.solved:
            given[name] = list(value) if isinstance(value, tuple) else value
    given.update(changes)
    design = (EQUIV_PREFIX if p.margin is not None else "") + p.design
    return plan(design, **given)


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


def detectable_effect_of(result, power: float = 0.8) -> PlanResult:
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
