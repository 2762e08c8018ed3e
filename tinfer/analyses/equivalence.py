"""Margins for equivalence, non-inferiority and superiority claims: checks and numbers.

The words of a claim are in :mod:`tinfer.results.equivalence`, its card section and chart in
:mod:`tinfer.display.equivalence`.

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

from ..checks import check_bool, fail
from ..core import equivalence as core_eq
from ..results.equivalence import Claim, Equivalence, OneSidedTest, claim_words
from ..results.format import decimals_for

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
        raise fail("margin_units", func, "'raw' or 'standardised'", margin_units)
    if worse not in (None, "lower", "higher"):
        raise fail("worse", func, "None, 'lower' or 'higher'", worse)
    if margin is None:
        for name, value, default in (
            ("worse", worse, None),
            ("superior", superior, False),
            ("margin_units", margin_units, "raw"),
        ):
            if value != default:
                raise fail(
                    "margin", func, f"given when {name!r} is set (a positive number)", margin
                )
        return None
    units = UNITS[margin_units]
    if isinstance(margin, tuple | list | np.ndarray) and not isinstance(margin, str):
        pair = [_number(v) for v in margin]
        if worse is not None:
            raise fail(
                "margin",
                func,
                "a single positive number when 'worse' is set (a one-sided claim)",
                margin,
            )
        if len(pair) != 2 or None in pair or not pair[0] < 0 < pair[1]:
            raise fail(
                "margin",
                func,
                "a positive number, or a pair (lower offset, upper offset) relative to null "
                "with lower < 0 < upper, such as (-1.5, 2.0)",
                margin,
            )
        return MarginSpec((pair[0], pair[1]), units, None, False)
    m = _number(margin)
    if m is None or m <= 0:
        raise fail("margin", func, "a positive number or a pair such as (-1.5, 2.0)", margin)
    if superior and worse is None:
        raise fail("worse", func, "'lower' or 'higher' when superior=True", worse)
    return MarginSpec(m, units, worse, superior)


def _scalar(x) -> float:
    return float(np.asarray(x).reshape(()))


def _one_sided(bound, words: str, t, df, p, log_p) -> OneSidedTest | None:
    """One of the two one-sided tests, or None where its band limit is infinite."""
    if not np.isfinite(bound):
        return None
    return OneSidedTest(float(bound), words, _scalar(t), float(df), _scalar(p), _scalar(log_p))


def equivalence_for(
    spec: MarginSpec,
    *,
    design: str,
    summaries,
    estimate: float,
    estimate_lo: float = 0.0,
    se: float,
    df: float,
    null: float,
    level: float,
    labels: tuple[str, ...],
    comparison: str,
    units: str | None,
    func: str,
) -> Equivalence:
    """Run the TOST for ``spec`` on one result's estimate and wrap it with its words."""
    if not level > 0.5:
        raise fail(
            "level",
            func,
            "above 0.5 with a margin (each one-sided test runs at 1 - level and the matching "
            "interval is at 2 * level - 1)",
            level,
        )
    sd = None
    raw = spec.margin
    if spec.units == "standardised":
        sd = _scalar(core_eq.standardiser(design, summaries))
        raw = (
            tuple(m * sd for m in spec.margin)
            if isinstance(spec.margin, tuple)
            else spec.margin * sd
        )
    # offsets from null, so that the tests keep a margin's digits next to a null near 1e9
    lo_off, hi_off = core_eq.band(0.0, raw, spec.worse, spec.superior)
    low, high = null + lo_off, null + hi_off
    r = core_eq.tost(estimate, se, df, lo_off, hi_off, level, null=null, estimate_lo=estimate_lo)
    decision = bool(r.inside)
    claim = Claim(
        margin=spec.margin,
        units_kind=spec.units,
        worse=spec.worse,
        superior=spec.superior,
        design=design,
        null=null,
        labels=labels,
        comparison=comparison,
        units=units,
        decimals=decimals_for(se),
        sd=sd,
    )
    words = claim_words(claim, float(low), float(high), decision)
    return Equivalence(
        kind=words.kind,
        low=float(low),
        high=float(high),
        lower=_one_sided(low, words.lower_null, r.t_lower, df, r.p_lower, r.log_p_lower),
        upper=_one_sided(high, words.upper_null, r.t_upper, df, r.p_upper, r.log_p_upper),
        p=_scalar(r.p),
        log_p=_scalar(r.log_p),
        ci=(_scalar(r.ci_low), _scalar(r.ci_high)),
        ci_level=_scalar(r.ci_level),
        alpha=1.0 - level,
        decision=decision,
        conclusion=words.conclusion,
        margin=spec.margin,
        margin_units=spec.units,
        worse=spec.worse,
        superior=spec.superior,
        sd=sd,
        note=words.note,
    )
