"""The DataFrame path of ``df.tinfer.pairwise``: a value column split by every level of ``by``.

The group column becomes integer codes once (category codes keep a categorical column's
own order; other columns are sorted), and one grouped two-pass gives every level's
summary. The analysis is :func:`tinfer.analyses.pairwise.run_pairwise`.
"""

from __future__ import annotations

from collections.abc import Hashable

import numpy as np
import pandas as pd

from ..analyses.pairwise import run_pairwise
from ..core.grouped import grouped_moments
from ..core.summary import Summary
from ..errors import DataError
from ..results.pairwise import PairwiseResult
from .columns import column, reject_inf, to_float
from .levels import group_codes, level_labels, levels_text, py_value


def pairwise_frame(
    df: pd.DataFrame, value: Hashable, by: Hashable, *, against=None, func="pairwise", **opts
) -> PairwiseResult:
    """Summaries of ``value`` for every level of ``by``, then the family of comparisons."""
    vals = to_float(column(df, value), f"Column {value!r}")
    codes, levels = group_codes(column(df, by))
    codes = codes.astype(np.intp, copy=False)
    keyed = codes >= 0
    fin = np.isfinite(vals)
    if np.isinf(vals).any():
        reject_inf([vals], (value,))
    use = keyed & fin
    k = len(levels)
    n, mean, lo, ssd = grouped_moments(vals[use], codes[use], k)
    lost = np.bincount(codes[keyed & ~fin], minlength=k)
    present = np.flatnonzero((n > 0) | (lost > 0))
    if present.size < 2:
        raise DataError(
            f"Column {by!r} has {present.size} level(s) with values "
            f"({levels_text(levels[present])}); comparing levels needs at least two."
        )
    labels = level_labels(levels[present])
    control = None
    if against is not None:
        hits = [j for j, i in enumerate(present) if py_value(levels[i]) == against]
        if not hits:
            raise DataError(
                f"The control {against!r} does not occur in column {by!r}. Levels found: "
                f"{levels_text(levels[present])}."
            )
        control = labels[hits[0]]
    summaries = [Summary(n[i], mean[i], ssd[i], lo[i]) for i in present]
    notes = []
    if not keyed.all():
        notes.append(f"{int((~keyed).sum())} row(s) with a missing {by!r} value were not used.")
    if lost.sum():
        notes.append(f"{int(lost.sum())} missing value(s) of {value!r} dropped.")
    return run_pairwise(
        summaries,
        labels,
        against=control,
        variable=str(value),
        by=str(by),
        n_missing=[int(lost[i]) for i in present],
        notes=notes,
        func=func,
        **opts,
    )
