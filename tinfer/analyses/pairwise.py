"""k groups compared as one family: per-level summaries -> a :class:`~tinfer.PairwiseResult`.

Used by ``df.tinfer.pairwise`` and :func:`pairwise_from_summary`; the statistics are in
:mod:`tinfer.core.pairwise` and :mod:`tinfer.core.simultaneous`.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from ..checks import check_level, check_side, fail
from ..core import multiplicity
from ..core import pairwise as core
from ..core.summary import Summary
from ..errors import DataError, ParameterError
from ..results.pairwise import PairwiseResult
from ..results.provenance import fingerprint, frozen, now_iso
from .ttest import group_stats

#: A pooled method is questioned when the largest SD is this many times the smallest.
SD_RATIO = 2.0


def check_method(method, against, side, func: str) -> str:
    """The canonical method name, after checking that it fits ``against`` and ``side``."""
    if method is None:
        method = "games-howell" if against is None else "dunnett"
    key = method.lower() if isinstance(method, str) else method
    key = multiplicity.ALIASES.get(key, key)
    if key not in core.METHODS:
        raise fail(
            "method",
            func,
            "one of 'games-howell', 'tukey-kramer', 'dunnett', 'holm', 'hochberg', "
            "'benjamini-hochberg' ('bh'), 'benjamini-yekutieli' ('by') or 'none'",
            method,
        )
    if key == "dunnett" and against is None:
        raise ParameterError(
            f"method='dunnett' of {func} compares every level with a control: name it with "
            "against=<level>."
        )
    if key in core.RANGE_METHODS and against is not None:
        raise ParameterError(
            f"method={key!r} of {func} compares all pairs; with against= use "
            "method='dunnett' (pooled variance) or a separate-test method such as 'holm'."
        )
    if side != "two-sided" and (key in core.RANGE_METHODS or against is None):
        raise ParameterError(
            f"side={side!r} of {func} needs a control (against=) and method 'dunnett' or a "
            "separate-test method; the studentized range of all pairs is two-sided only."
        )
    return key


def run_pairwise(
    summaries: Sequence[Summary],
    labels: Sequence[str],
    *,
    method=None,
    against=None,
    level: float = 0.95,
    side: str = "two-sided",
    variable: str = "value",
    by: str = "group",
    units: str | None = None,
    n_missing: Sequence[int] | None = None,
    notes: Sequence[str] = (),
    func: str = "pairwise",
) -> PairwiseResult:
    """Compare the levels described by ``summaries`` (one per label, in order)."""
    level = check_level(level, func)
    side = check_side(side, func)
    labels = [str(v) for v in labels]
    control = None
    if against is not None:
        hits = [i for i, v in enumerate(labels) if v == str(against)]
        if not hits:
            raise DataError(
                f"The control {against!r} is not a level of {by!r}. Levels found: "
                + ", ".join(repr(v) for v in labels)
                + "."
            )
        control = hits[0]
    method = check_method(method, against, side, func)
    usable = [i for i, s in enumerate(summaries) if float(s.n) >= 2]
    if len(usable) < 2 or (control is not None and control not in usable):
        raise DataError(
            f"{func} needs at least two levels of {by!r} with two or more values each"
            + (f", the control {labels[control]!r} among them" if control is not None else "")
            + ". Counts: "
            + ", ".join(
                f"{lab} {int(float(s.n))}" for lab, s in zip(labels, summaries, strict=True)
            )
            + "."
        )
    n, mean, lo, ssd = (
        np.array([[float(getattr(s, f)) if getattr(s, f) is not None else 0.0 for s in summaries]])
        for f in ("n", "mean", "mean_lo", "ssd")
    )
    first, second = core.pair_indices(len(labels), control)
    fam = core.family(
        method, n, mean, ssd, first, second, mean_lo=lo, against=control, level=level, side=side
    )
    warnings = list(notes) + _warnings(method, summaries, labels, usable)
    if not np.all(np.isfinite(fam.p_family)):
        dropped = [labels[i] for i in range(len(labels)) if i not in usable]
        if dropped:
            warnings.append(
                "Level(s) with fewer than two values take no part: " + ", ".join(dropped) + "."
            )
    missing = list(n_missing) if n_missing is not None else [0] * len(labels)
    groups = tuple(
        group_stats(lab, s, m) for lab, s, m in zip(labels, summaries, missing, strict=True)
    )
    row = lambda v: frozen(np.array(v[0], dtype=float))  # noqa: E731
    return PairwiseResult(
        method=method,
        variable=str(variable),
        by=str(by),
        units=units,
        levels=tuple(labels),
        groups=groups,
        against=None if control is None else labels[control],
        first=frozen(first),
        second=frozen(second),
        estimate=row(fam.estimate),
        se=row(fam.se),
        t=row(fam.t),
        df=row(fam.df),
        p_single=row(fam.p_single),
        p_adjusted=row(fam.p_family),
        ci_low=row(fam.ci_low),
        ci_high=row(fam.ci_high),
        effect=row(fam.effect),
        effect_ci_low=row(fam.effect_low),
        effect_ci_high=row(fam.effect_high),
        level=level,
        side=side,
        warnings=tuple(dict.fromkeys(warnings)),
        created=now_iso(),
        fingerprint=fingerprint(f"pairwise {method}", None, summaries),
    )


def _warnings(method, summaries, labels, usable) -> list[str]:
    """A note when a pooled method meets clearly unequal spreads."""
    if method not in core.POOLED:
        return []
    sds = {labels[i]: float(summaries[i].sd) for i in usable}
    lo, hi = min(sds, key=sds.get), max(sds, key=sds.get)
    if sds[lo] > 0 and sds[hi] / sds[lo] >= SD_RATIO:
        other = "'games-howell'" if method == "tukey-kramer" else "a separate-test method ('holm')"
        return [
            f"The SDs differ {sds[hi] / sds[lo]:.1f}-fold ({hi} vs {lo}); {method} assumes "
            f"equal variances. {other} does not."
        ]
    return []
