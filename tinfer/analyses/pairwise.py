"""k groups compared as one family: per-level summaries -> a :class:`~tinfer.PairwiseResult`.

Used by ``df.tinfer.pairwise`` and :func:`pairwise_from_summary`; the statistics are in
:mod:`tinfer.core.pairwise` and :mod:`tinfer.core.simultaneous`.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from ..checks import SUMMARY_RULES, check_level, check_side, fail, is_real, summary_problem
from ..core import multiplicity
from ..core import pairwise as core
from ..core.summary import Summary
from ..docstrings import fill_params
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
    control = _control_index(labels, against, by)
    method = check_method(method, against, side, func)
    usable = _usable(summaries, labels, control, by, func)
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
    warnings += _step_notes(method, fam, labels, first, second, level)
    missing = list(n_missing) if n_missing is not None else [0] * len(labels)
    with np.errstate(invalid="ignore", divide="ignore"):  # a level with one value has no SD
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


def _step_notes(method, fam, labels, first, second, level) -> list[str]:
    """A note where Holm's or Hochberg's p finds a pair whose Bonferroni interval covers 0."""
    if method not in ("holm", "hochberg"):
        return []
    with np.errstate(invalid="ignore"):
        found = fam.p_family[0] <= 1.0 - level
    covers = (fam.ci_low[0] <= 0) & (fam.ci_high[0] >= 0)
    odd = [
        f"{labels[a]} minus {labels[b]}"
        for a, b, f, c in zip(first, second, found, covers, strict=True)
        if f and c
    ]
    if not odd:
        return []
    name = "Holm's step-down" if method == "holm" else "Hochberg's step-up"
    return [
        f"{name} finds {', '.join(odd)} although the Bonferroni interval still reaches 0: the "
        "step-wise p-values are sharper than simultaneous intervals can be."
    ]


def _control_index(labels: list[str], against, by: str) -> int | None:
    """The index of the control level, or a DataError naming the levels."""
    if against is None:
        return None
    hits = [i for i, v in enumerate(labels) if v == str(against)]
    if not hits:
        found = ", ".join(repr(v) for v in labels)
        raise DataError(f"The control {against!r} is not a level of {by!r}. Levels found: {found}.")
    return hits[0]


def _usable(summaries, labels, control, by, func) -> list[int]:
    """Levels with two or more values; a DataError unless two (the control among them) are."""
    usable = [i for i, s in enumerate(summaries) if float(s.n) >= 2]
    if len(usable) < 2 or (control is not None and control not in usable):
        counts = ", ".join(
            f"{lab} {int(float(s.n))}" for lab, s in zip(labels, summaries, strict=True)
        )
        with_control = (
            f", the control {labels[control]!r} among them" if control is not None else ""
        )
        raise DataError(
            f"{func} needs at least two levels of {by!r} with two or more values each"
            f"{with_control}. Counts: {counts}."
        )
    return usable


def _warnings(method, summaries, labels, usable) -> list[str]:
    """A note when a pooled method meets clearly unequal spreads."""
    if method not in core.POOLED:
        return []
    sds = {labels[i]: float(summaries[i].sd) for i in usable}
    lo, hi = min(sds, key=sds.get), max(sds, key=sds.get)
    if sds[lo] > 0 and sds[hi] / sds[lo] >= SD_RATIO:
        other = (
            "Games-Howell (method='games-howell')"
            if method == "tukey-kramer"
            else "separate Welch tests (method='holm')"
        )
        name = "Tukey-Kramer" if method == "tukey-kramer" else "Dunnett"
        return [
            f"The SDs differ {sds[hi] / sds[lo]:.1f}-fold ({hi} vs {lo}); {name} assumes "
            f"equal variances, {other} does not."
        ]
    return []


@fill_params()
def pairwise_from_summary(
    n,
    mean,
    sd,
    labels: Sequence[str] | None = None,
    *,
    against=None,
    method: str | None = None,
    level: float = 0.95,
    side: str = "two-sided",
    variable: str = "value",
    by: str = "group",
    units: str | None = None,
) -> PairwiseResult:
    """Compare k groups from published counts, means and SDs, as ``df.tinfer.pairwise`` does.

    Parameters
    ----------
    n, mean, sd : sequences of numbers
        One entry per group (SD with the n - 1 denominator).
    labels : sequence of str, optional
        Group names (default "group 1", "group 2", ...), in the order the pairs use: each
        pair is a later group minus an earlier one.
    {pairwise_options}
    variable : str, default "value"
        What was measured.
    by : str, default "group"
        What the groups are (a word for the question and the tables).
    {units}

    Returns
    -------
    PairwiseResult

    Examples
    --------
    >>> import tinfer
    >>> r = tinfer.pairwise_from_summary(n=[10, 12, 11], mean=[20.1, 23.4, 20.9],
    ...                                  sd=[2.0, 2.4, 2.2], labels=["mesh", "foam", "gel"],
    ...                                  method="tukey-kramer")
    >>> [round(float(v), 4) for v in r.p_adjusted]
    [0.0044, 0.6907, 0.0296]
    """
    func = "pairwise_from_summary"
    lists = []
    for name, v in (("n", n), ("mean", mean), ("sd", sd)):
        if isinstance(v, str) or not hasattr(v, "__len__") or len(v) < 2:
            raise fail(name, func, "a sequence with one number per group (two or more)", v)
        lists.append(list(v))
    if len({len(v) for v in lists}) != 1:
        raise ParameterError(
            f"The 'n', 'mean' and 'sd' parameters of {func} must have one entry per group. "
            f"Got {len(lists[0])}, {len(lists[1])} and {len(lists[2])} entries."
        )
    k = len(lists[0])
    names = [f"group {i + 1}" for i in range(k)] if labels is None else [str(v) for v in labels]
    if len(names) != k or len(set(names)) != k:
        raise fail("labels", func, f"{k} distinct names, one per group", labels)
    summaries = []
    for ni, mi, si in zip(*lists, strict=True):
        for name, v in (("n", ni), ("mean", mi), ("sd", si)):
            if not is_real(v):
                raise fail(name, func, SUMMARY_RULES[name].format(min_n=2), v)
        problem = summary_problem(ni, mi, si, min_n=2)
        if problem is not None:
            name, _, _, rule = problem
            raise fail(name, func, rule, {"n": ni, "mean": mi, "sd": si}[name])
        summaries.append(Summary.from_moments(float(ni), float(mi), float(si)))
    return run_pairwise(
        summaries,
        names,
        method=method,
        against=against,
        level=level,
        side=side,
        variable=variable,
        by=by,
        units=units,
        func=func,
    )
