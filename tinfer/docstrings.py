"""Shared parameter docs: one text per keyword, filled into every docstring that takes it.

A docstring names a shared parameter by a line holding only ``{name}`` (indented as the
parameter list is); :func:`fill_params` replaces that line with the text below, indented the
same way. Words that differ between functions (which SD converts a standardised margin, what
a trimmed estimate is) are filled from the decorator's keywords. Used by the accessors,
``from_summary``, the batch functions and the Dask accessor, so a keyword is described once.
"""

from __future__ import annotations

import re
import textwrap
from collections.abc import Callable
from typing import TypeVar

F = TypeVar("F", bound=Callable)

PARAMS = {
    "side": """\
side : {{"two-sided", "upper", "lower"}}
    The alternative: {side}""",
    "level": """\
level : float, default 0.95
    Confidence level of the interval; the test's significance level is ``1 - level``.""",
    "units": """\
units : str, optional
    Units of the measurements, shown next to estimates.""",
    "pooled": """\
pooled : bool, default False
    True for Student's equal-variance test; False for Welch's test.""",
    "margin": """\
margin : float or (float, float), optional
    Ask for an equivalence claim by two one-sided tests (TOST): a positive number
    ``m`` is the band ``null - m`` to ``null + m``; a pair ``(lower, upper)`` gives
    offsets relative to ``null`` with ``lower < 0 < upper``, e.g. ``(-1.5, 2.0)``.
    Each one-sided test runs at ``1 - level``; the matching interval is at
    ``2 * level - 1`` (90% for the default level).""",
    "margin_units": """\
margin_units : {{"raw", "standardised"}}, default "raw"
    "standardised": the margin is in SDs (converted with {sd}); the raw
    margin then depends on the observed SD.""",
    "worse": """\
worse : {{None, "lower", "higher"}}
    For a one-sided claim (non-inferiority): the direction that counts as worse.
    With ``margin=m`` the claim is "not worse than ``null`` by more than m".""",
    "superior": """\
superior : bool, default False
    With ``worse``: claim "better than ``null`` by more than the margin" instead.""",
    "trim": """\
trim : float, default 0
    Proportion trimmed from each tail, in [0, 0.5): with ``trim=0.2`` Yuen's
    trimmed-mean t (20% trimmed means, winsorised variances) replaces the t test
    and the estimate is {trimmed}. 0 gives the ordinary t.""",
    "adjust": """\
adjust : {{"holm", "hochberg", "benjamini-hochberg", "benjamini-yekutieli", "none"}}
    Multiplicity adjustment over all tested rows as one family (default "holm"); "bh"
    and "by" are accepted as short forms of the two Benjamini methods.""",
    "rate": """\
rate : float, default 0.05
    Error rate (family-wise for Holm and Hochberg, false discovery rate for BH
    and BY): a row is a discovery when its adjusted p-value is at most ``rate``.""",
    "method": """\
method : str, optional
    The family of comparisons, by its published name: "games-howell" (all pairs,
    unequal variances; the default without ``against``), "tukey-kramer" (all pairs,
    pooled variance), "dunnett" (each level against ``against``, pooled variance;
    the default with it), or separate Welch tests adjusted by "holm", "hochberg",
    "benjamini-hochberg" ("bh"), "benjamini-yekutieli" ("by") or "none".""",
    "against": """\
against : label, optional
    A control level: compare every other level with it, not every pair.""",
    "pairwise_side": """\
side : {{"two-sided", "upper", "lower"}}
    "upper": each level exceeds the control; "lower": falls below it. One-sided
    families need ``against`` and Dunnett or separate tests; the studentized range
    (Games-Howell, Tukey-Kramer) is two-sided only.""",
    "relative": """\
relative : bool or {{"fieller", "log"}}, default False
    Also report the relative change {relative_what}, minus one, in percent, with its
    interval: Fieller's (True or "fieller"; "unbounded" when the base mean is not
    clearly away from zero) or the delta method on the log of the ratio ("log").""",
    "cluster": """\
cluster : column label, optional
    The unit of randomisation (a visitor, a batch, a plot) when a unit has several
    rows: each unit's rows are averaged (summed, for ``ratio``) first and the test runs
    on one value per unit. Units found in both groups are left out and counted in the
    notes.""",
    "covariate": """\
covariate : column label, optional
    Each unit's pre-period value of the metric: the CUPED adjustment (Deng et al.
    2013) subtracts theta (x - mean x) before the test, with theta the pooled
    within-group slope{where}; the notes say how much variance it removed. A missing
    covariate where the value is present is an error, never silently dropped.""",
    "ratio": """\
ratio : (numerator, denominator), optional
    A ratio metric such as revenue per session: each group's sum of the numerator
    over its sum of the denominator, compared by Welch's test on the delta-method
    variance (Deng, Knoblich and Lu 2018).{ratio_where}""",
}

#: Slots that stand for several keywords, in order.
GROUPS = {
    "margin_options": ("margin", "margin_units", "worse", "superior"),
    "batch_options": ("adjust", "rate", "level", "side", "pooled"),
    "pairwise_options": ("method", "against", "level", "pairwise_side"),
    "experiment_options": ("cluster", "covariate", "ratio"),
}

#: Words filled in where a caller gives none.
DEFAULTS = {
    "side": "the true value differs from, is greater than, or is less than ``null``.",
    "sd": "the observed SD",
    "trimmed": "a trimmed mean",
    "where": "",
    "ratio_where": " It replaces the value column.",
    "relative_what": "(the first mean over the second)",
}

_SLOT = re.compile(r"^(?P<indent>[ ]*)\{(?P<name>\w+)\}[ ]*$", re.MULTILINE)


def expand(doc: str, **words: str) -> str:
    """``doc`` with every ``{name}`` line replaced by the shared text of ``name``.

    >>> print(expand("Parameters\\n----------\\n{units}", sd="x"))
    Parameters
    ----------
    units : str, optional
        Units of the measurements, shown next to estimates.
    """
    fill = DEFAULTS | words

    def one(match: re.Match) -> str:
        names = GROUPS.get(match["name"], (match["name"],))
        text = "\n".join(PARAMS[name].format(**fill) for name in names)
        return textwrap.indent(text, match["indent"])

    return _SLOT.sub(one, doc)


def fill_params(**words: str) -> Callable[[F], F]:
    """Decorator: expand the shared parameter slots of a function's docstring."""

    def decorate(func: F) -> F:
        if func.__doc__:
            func.__doc__ = expand(func.__doc__, **words)
        return func

    return decorate
