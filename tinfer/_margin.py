"""Margins for equivalence, non-inferiority and superiority claims: checks, numbers, words.

The keywords, shared by ``one_sample``, ``two_sample``, ``paired`` and ``from_summary``:

``margin``
    A positive number ``m``: the band ``null - m`` to ``null + m`` (equivalence). A pair
    ``(lower_offset, upper_offset)`` with ``lower_offset < 0 < upper_offset``: an
    asymmetric band of offsets *relative to null* (not absolute limits), e.g.
    ``(-1.5, 2.0)`` around ``null=500`` is the band 498.5 to 502.0.
``margin_units``
    ``"raw"`` (default): the margin is in the units of the measurements. ``"standardised"``
    (or ``"standardized"``): in SDs, converted with the observed SD (the sample SD, the SD
    of the paired differences, or the pooled SD of two samples), so the raw margin
    depends on the data.
``worse``
    ``None`` (default) for an equivalence band. ``"lower"`` or ``"higher"`` for a
    one-sided claim: the direction that counts as worse. With a positive ``margin`` the
    claim is "not worse than null by more than the margin" (non-inferiority).
``superior``
    With ``worse``: claim "better than null by more than the margin" instead
    (superiority by a margin).

Each one-sided test runs at ``alpha = 1 - level``; the interval that matches the decision
is the two-sided ``1 - 2 alpha`` interval (90% at the default level), whose finite limit is
the one-sided ``1 - alpha`` bound for one-sided claims. Welch's se and df are used unless
``pooled=True``.

Examples
--------
>>> import tinfer
>>> r = tinfer.from_summary(n=(24, 24), mean=(10.2, 10.0), sd=(0.9, 1.1), margin=1.0,
...                         labels=("new", "old"), units="kg")
>>> r.equivalence.conclusion
'new and old equivalent within ±1 kg'
>>> r = tinfer.from_summary(n=40, mean=0.1, sd=1.0, margin=0.4, worse="lower",
...                         labels=("new", "old"), paired=True)
>>> r.equivalence.kind, round(r.equivalence.p, 4)
('non-inferiority', 0.0015)
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from ._format import decimals_for, fmt_level, fmt_num
from ._validation import _fail, check_bool
from .core import equivalence as core_eq
from .results import Equivalence, OneSidedTest

UNITS = {"raw": "raw", "standardised": "standardised", "standardized": "standardised"}


@dataclass(frozen=True)
class MarginSpec:
    """The margin keywords after checking, kept so that ``recompute`` can reuse them."""

    margin: float | tuple[float, float]
    units: str = "raw"
    worse: str | None = None
    superior: bool = False


def _number(v: Any) -> float | None:
    if isinstance(v, bool) or not isinstance(v, int | float | np.integer | np.floating):
        return None
    v = float(v)
    return v if math.isfinite(v) else None


def check_margin(
    margin: Any, margin_units: Any, worse: Any, superior: Any, func: str
) -> MarginSpec | None:
    """Check the margin keywords together; ``None`` when no margin was asked for."""
    superior = check_bool(superior, "superior", func)
    if margin_units not in UNITS:
        raise _fail("margin_units", func, "'raw' or 'standardised'", margin_units)
    if worse not in (None, "lower", "higher"):
        raise _fail("worse", func, "None, 'lower' or 'higher'", worse)
    if margin is None:
        for name, value, default in (
            ("worse", worse, None),
            ("superior", superior, False),
            ("margin_units", margin_units, "raw"),
        ):
            if value != default:
                raise _fail(
                    "margin", func, f"given when {name!r} is set (a positive number)", margin
                )
        return None
    units = UNITS[margin_units]
    if isinstance(margin, tuple | list | np.ndarray) and not isinstance(margin, str):
        pair = [_number(v) for v in margin]
        if worse is not None:
            raise _fail(
                "margin",
                func,
                "a single positive number when 'worse' is set (a one-sided claim)",
                margin,
            )
        if len(pair) != 2 or None in pair or not pair[0] < 0 < pair[1]:
            raise _fail(
                "margin",
                func,
                "a positive number, or a pair (lower offset, upper offset) relative to null "
                "with lower < 0 < upper, such as (-1.5, 2.0)",
                margin,
            )
        return MarginSpec((pair[0], pair[1]), units, None, False)
    m = _number(margin)
    if m is None or m <= 0:
        raise _fail("margin", func, "a positive number or a pair such as (-1.5, 2.0)", margin)
    if superior and worse is None:
        raise _fail("worse", func, "'lower' or 'higher' when superior=True", worse)
    return MarginSpec(m, units, worse, superior)


def _scalar(x) -> float:
    return float(np.asarray(x).reshape(()))


def _signed(x: float) -> str:
    text = fmt_num(abs(x))
    return f"-{text}" if x < 0 else f"+{text}"


def equivalence_for(
    spec: MarginSpec,
    *,
    design: str,
    summaries,
    estimate: float,
    se: float,
    df: float,
    null: float,
    level: float,
    labels: tuple[str, ...],
    comparison: str,
    units: str | None,
    func: str,
) -> Equivalence:
    """Run the TOST for ``spec`` on one result's estimate and wrap it with words."""
    if not level > 0.5:
        raise _fail(
            "level",
            func,
            "above 0.5 with a margin (each one-sided test runs at 1 - level and the matching "
            "interval is at 2 * level - 1)",
            level,
        )
    decimals = decimals_for(se)

    def unit(text: str) -> str:
        return f"{text} {units}" if units else text

    def val(x: float) -> str:
        return unit(fmt_num(x, decimals))

    sd = None
    note = ""
    if spec.units == "standardised":
        sd = _scalar(core_eq.standardiser(design, summaries))
        which = {
            "two-sample": "pooled SD",
            "paired": "SD of the differences",
            "one-sample": "SD",
        }[design]
        if isinstance(spec.margin, tuple):
            raw = (spec.margin[0] * sd, spec.margin[1] * sd)
            given = f"{_signed(spec.margin[0])} to {_signed(spec.margin[1])} SD"
            shown = f"{val(raw[0])} to {val(raw[1])}"
        else:
            raw = spec.margin * sd
            given = f"{fmt_num(spec.margin)} SD"
            shown = val(raw)
        note = (
            f"The margin of {given} was converted with the observed {which} "
            f"({val(sd)}) to {shown}; the raw margin depends on the observed SD."
        )
    else:
        raw = spec.margin
    low, high = core_eq.band(null, raw, spec.worse, spec.superior)
    r = core_eq.tost(estimate, se, df, low, high, level)
    decision = bool(r.inside)

    def band_text(m) -> str:
        if isinstance(m, tuple):
            lo, hi = m
            if spec.units == "standardised":
                return f"{_signed(lo)} to {_signed(hi)} SD ({val(lo * sd)} to {val(hi * sd)})"
            return f"{unit(_signed(lo))} to {unit(_signed(hi))}"
        if spec.units == "standardised":
            return f"{fmt_num(m)} SD ({val(m * sd)})"
        return unit(fmt_num(m))

    if design == "one-sample":
        reference = unit(fmt_num(null))
        subject = "the mean"
    else:
        first, second = labels[0], labels[1]
        reference = second if null == 0 else f"{second} {_signed(null)} {units or ''}".rstrip()
        subject = first

    # one sample: "mean" or, with trim, "20% trimmed mean" (comparison is "<that> of <variable>")
    what = comparison.split(" of ")[0] if design == "one-sample" else comparison
    if spec.worse is None:
        kind = "equivalence"
        asym = isinstance(spec.margin, tuple)
        within = f"within {'' if asym else '±'}{band_text(spec.margin)}"
        if design == "one-sample":
            who, claim = "", f"equivalent to {reference} {within}"
        else:
            who = f"{labels[0]} and {labels[1]} "
            target = "" if null == 0 else f" around a difference of {unit(fmt_num(null))}"
            where = f" ({comparison})" if asym or target else ""
            claim = f"equivalent {within}{target}{where}"
        conclusion = f"{who}{claim}" if decision else f"{who}not shown {claim}"
    else:
        better = "higher" if spec.worse == "lower" else "lower"
        by = band_text(spec.margin)
        who = "" if design == "one-sample" else f"{subject} "
        if spec.superior:
            kind = "superiority"
            claim = f"better than {reference} by more than {by}, counting {better} as better"
            conclusion = f"{who}{claim}" if decision else f"{who}not shown {claim}"
        else:
            kind = "non-inferiority"
            tail = f"by more than {by}, counting {spec.worse} as worse"
            if decision:
                conclusion = f"{who}not worse than {reference} {tail}"
            else:
                conclusion = (
                    f"not shown non-inferior: {who or f'the {what} '}could be worse than "
                    f"{reference} {tail}"
                )

    lower = upper = None
    if np.isfinite(low):
        lower = OneSidedTest(
            bound=float(low),
            null_hypothesis=f"{what} at or below {val(low)}",
            t=_scalar(r.t_lower),
            df=float(df),
            p=_scalar(r.p_lower),
            log_p=_scalar(r.log_p_lower),
        )
    if np.isfinite(high):
        upper = OneSidedTest(
            bound=float(high),
            null_hypothesis=f"{what} at or above {val(high)}",
            t=_scalar(r.t_upper),
            df=float(df),
            p=_scalar(r.p_upper),
            log_p=_scalar(r.log_p_upper),
        )
    return Equivalence(
        kind=kind,
        low=float(low),
        high=float(high),
        lower=lower,
        upper=upper,
        p=_scalar(r.p),
        log_p=_scalar(r.log_p),
        ci=(_scalar(r.ci_low), _scalar(r.ci_high)),
        ci_level=_scalar(r.ci_level),
        alpha=1.0 - level,
        decision=decision,
        conclusion=conclusion,
        margin=spec.margin,
        margin_units=spec.units,
        worse=spec.worse,
        superior=spec.superior,
        sd=sd,
        note=note,
    )


def interval_words(eq: Equivalence, fmt) -> str:
    """The interval that matches the decision, in words, with ``fmt`` formatting numbers."""
    lo, hi = eq.ci
    if eq.lower is not None and eq.upper is not None:
        return f"{fmt_level(eq.ci_level)} CI {fmt(lo)} to {fmt(hi)}"
    one = fmt_level(1.0 - eq.alpha)
    if eq.lower is not None:
        return f"one-sided {one} lower bound {fmt(lo)}"
    return f"one-sided {one} upper bound {fmt(hi)}"
