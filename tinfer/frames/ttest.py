"""DataFrame -> samples -> one t result: the single-test paths of the accessor.

Splits a long column by its two chosen levels, pairs wide or long data, and hands the
finite values to :func:`tinfer.analyses.build`. The caller's DataFrame is never modified,
and the result keeps read-only copies of the values it used.
"""

from __future__ import annotations

from collections.abc import Hashable, Sequence

import numpy as np
import pandas as pd

from ..analyses import build, group_stats
from ..core.summary import Summary
from ..errors import DataError
from ..results.ttest import TResult
from .batch import choose_arms
from .columns import Sample, column, finite, to_float
from .levels import choose_two, group_codes, label_pair, levels_text, ungroupable


def one_sample(sample: Sample, variable: str, *, func: str, **opts) -> TResult:
    """The one-sample t (or Yuen's trimmed t) on one sample."""
    return build(
        "one-sample",
        (Summary.of(sample.values),),
        func=func,
        variable=variable,
        labels=(sample.label,),
        n_missing=(sample.n_missing,),
        samples=(sample.values,),
        **opts,
    )


def paired(a: Sample, b: Sample, dropped: int, variable: str, *, func: str, **opts) -> TResult:
    """The paired t on the differences ``a - b`` (rows missing either value already dropped)."""
    diff = a.values - b.values
    extra = (group_stats(a.label, Summary.of(a.values)), group_stats(b.label, Summary.of(b.values)))
    return build(
        "paired",
        (Summary.of(diff),),
        func=func,
        variable=variable,
        labels=(a.label, b.label),
        n_missing=(dropped,),
        extra_groups=extra,
        samples=(diff,),
        **opts,
    )


def two_sample(a: Sample, b: Sample, variable: str, *, func: str, **opts) -> TResult:
    """Welch's (or the pooled) two-sample t, ``a`` minus ``b``."""
    return build(
        "two-sample",
        (Summary.of(a.values), Summary.of(b.values)),
        func=func,
        variable=variable,
        labels=(a.label, b.label),
        n_missing=(a.n_missing, b.n_missing),
        samples=(a.values, b.values),
        **opts,
    )


def _two_levels(key: pd.Series, by: Hashable, groups: Sequence | None, what: str) -> list:
    """The two levels of ``key`` to compare, in order (see :func:`choose_two`)."""
    try:
        present = pd.unique(key.dropna())
    except TypeError as exc:  # lists, dicts or sets in the column
        raise ungroupable(by, exc) from None
    first, second = choose_two(present, by, groups, what)
    return [present[first], present[second]]


def two_groups(
    df: pd.DataFrame, value: Hashable, by: Hashable, groups: Sequence | None
) -> tuple[Sample, Sample, int]:
    """Split ``value`` by the two levels of ``by`` (or the two levels named in ``groups``).

    The group column is turned into integer codes once (category codes, compact integer
    offsets, or ``pandas.factorize``), whatever its dtype, and each group is one mask over
    the codes. Returns both samples (their values are fresh read-only arrays the result can
    keep) and the number of rows with a missing group.
    """
    vals = to_float(column(df, value), f"Column {value!r}")
    codes, levels = group_codes(column(df, by))
    wide = codes.dtype if len(levels) < np.iinfo(codes.dtype).max else np.intp
    counts = np.bincount(codes.astype(wide, copy=False) + 1, minlength=len(levels) + 1)
    first, second = choose_arms(levels, counts[1:] > 0, by, groups, "two-sample test")
    out = []
    for k, text in zip((first, second), label_pair(levels[first], levels[second]), strict=True):
        sample = finite(vals[codes == k], text, f"Column {value!r} in group {text!r}")
        sample.values.setflags(write=False)  # a fresh array: the result keeps it as it is
        out.append(sample)
    return out[0], out[1], int(counts[0])


def paired_wide(df: pd.DataFrame, first: Hashable, second: Hashable) -> tuple[Sample, Sample, int]:
    """Two columns, one row per unit; rows missing either value are dropped pairwise."""
    x = to_float(column(df, first), f"Column {first!r}")
    y = to_float(column(df, second), f"Column {second!r}")
    return _pairwise(x, y, str(first), str(second), f"Column {first!r}", f"Column {second!r}")


def _pairwise(x, y, lx, ly, wx, wy) -> tuple[Sample, Sample, int]:
    for v, w in ((x, wx), (y, wy)):
        if np.isinf(v).any():
            raise DataError(f"{w} holds infinite value(s); replace them with NaN or fix them.")
    ok = ~(np.isnan(x) | np.isnan(y))
    dropped = int(ok.size - ok.sum())
    if dropped:
        x, y = x[ok], y[ok]
    return Sample(lx, x, 0), Sample(ly, y, 0), dropped


def paired_long(
    df: pd.DataFrame, value: Hashable, by: Hashable, subject: Hashable, groups: Sequence | None
) -> tuple[Sample, Sample, int]:
    """Long data: one row per unit and condition; pairs are matched by ``subject``."""
    vals = to_float(column(df, value), f"Column {value!r}")
    key = column(df, by)
    subj = column(df, subject)
    chosen = _two_levels(key, by, groups, "paired test (two conditions)")
    frames = []
    for g in chosen:
        mask = (key == g).to_numpy(dtype=bool, na_value=False)
        part = pd.DataFrame({"subject": subj[mask].to_numpy(), "value": vals[mask]})
        no_id = int(part["subject"].isna().sum())
        if no_id:  # missing ids would otherwise be matched with each other as one subject
            raise DataError(
                f"Column {subject!r} has {no_id} missing subject id(s) under {by!r} = {g!r}; "
                "a row without an id cannot be paired. Drop or fill those rows first."
            )
        dup = part["subject"][part["subject"].duplicated()]
        if len(dup):
            raise DataError(
                f"Subject(s) {levels_text(pd.unique(dup))} appear more than once under "
                f"{by!r} = {g!r}; a paired test needs one value per subject and condition."
            )
        frames.append(part.set_index("subject")["value"])
    a, b = frames
    only_a = a.index.difference(b.index)
    only_b = b.index.difference(a.index)
    if len(only_a) or len(only_b):
        parts = []
        if len(only_a):
            parts.append(f"{levels_text(list(only_a))} only under {chosen[0]!r}")
        if len(only_b):
            parts.append(f"{levels_text(list(only_b))} only under {chosen[1]!r}")
        raise DataError(
            "Unmatched subjects: " + "; ".join(parts) + ". Every subject needs a value in both "
            "conditions; filter the unmatched ones out first if that is intended."
        )
    b = b.reindex(a.index)
    return _pairwise(
        a.to_numpy(dtype=float),
        b.to_numpy(dtype=float),
        *label_pair(*chosen),
        f"Column {value!r} under {chosen[0]!r}",
        f"Column {value!r} under {chosen[1]!r}",
    )
