"""From DataFrame columns to clean float arrays: selection, validation, missing values.

No statistics here beyond counting; the caller's DataFrame is never modified.
"""

from __future__ import annotations

from collections.abc import Hashable, Sequence
from dataclasses import dataclass

import numpy as np
import pandas as pd

from ._errors import DataError
from ._validation import missing_column


@dataclass(frozen=True)
class Sample:
    """Finite float values of one group, with the count of missing values dropped."""

    label: str
    values: np.ndarray
    n_missing: int


def column(df: pd.DataFrame, name: Hashable) -> pd.Series:
    """The column ``name`` of ``df``, or a DataError naming the close matches."""
    if not isinstance(name, Hashable) or name not in df.columns:
        raise missing_column(name, df.columns)
    col = df[name]
    if isinstance(col, pd.DataFrame):
        raise DataError(f"The column name {name!r} appears more than once in the DataFrame.")
    return col


def to_float(series: pd.Series, what: str) -> np.ndarray:
    """Float64 values with NaN for every missing value (NaN, None, pd.NA, NaT).

    Raises a DataError for non-numeric or boolean columns.
    """
    dtype = series.dtype
    if pd.api.types.is_bool_dtype(dtype) or not pd.api.types.is_numeric_dtype(dtype):
        raise DataError(
            f"{what} has dtype {dtype}, not numbers. Convert it first, for example with "
            "pd.to_numeric(df[column], errors='coerce'), or choose a numeric column."
        )
    if dtype == np.float64:
        return series.to_numpy(copy=False)
    return series.to_numpy(dtype=np.float64, na_value=np.nan)


def finite(values: np.ndarray, label: str, what: str) -> Sample:
    """Drop missing values (NaN) and reject infinite ones."""
    ok = np.isfinite(values)
    if ok.all():
        return Sample(label, values, 0)
    if np.isinf(values).any():
        k = int(np.isinf(values).sum())
        raise DataError(
            f"{what} holds {k} infinite value(s). A mean with an infinite value is undefined; "
            "replace them with NaN to drop them, or fix them at the source."
        )
    kept = values[ok]
    return Sample(label, kept, int(values.size - kept.size))


def one_column(df: pd.DataFrame, name: Hashable) -> Sample:
    what = f"Column {name!r}"
    return finite(to_float(column(df, name), what), str(name), what)


def _levels_text(levels: Sequence) -> str:
    shown = ", ".join(repr(v) for v in list(levels)[:10])
    return shown + (", ..." if len(levels) > 10 else "")


def pick_levels(key: pd.Series, by: Hashable, groups: Sequence | None, what: str) -> list:
    """The two levels of ``key`` to compare, in order (sorted unless ``groups`` says otherwise)."""
    present = pd.unique(key.dropna())
    if groups is None:
        if len(present) != 2:
            raise DataError(
                f"Column {by!r} has {len(present)} level(s) ({_levels_text(present)}), but a "
                f"{what} needs exactly two. Pick two with groups=(first, second)."
            )
        return sorted(present, key=str)
    if isinstance(groups, str) or len(groups) != 2:
        raise DataError(
            f"groups must name two levels of {by!r}, as (first, second). Got {groups!r}."
        )
    chosen = list(groups)
    for g in chosen:
        if g not in set(present):
            raise DataError(
                f"Level {g!r} does not occur in column {by!r}. Levels found: "
                f"{_levels_text(present)}."
            )
    if chosen[0] == chosen[1]:
        raise DataError(f"groups names the same level twice: {groups!r}.")
    return chosen


def two_groups(
    df: pd.DataFrame, value: Hashable, by: Hashable, groups: Sequence | None
) -> tuple[Sample, Sample]:
    """Split ``value`` by the two levels of ``by`` (or the two levels named in ``groups``)."""
    vals = to_float(column(df, value), f"Column {value!r}")
    key = column(df, by)
    chosen = pick_levels(key, by, groups, "two-sample test")
    out = []
    for g in chosen:
        mask = (key == g).to_numpy(dtype=bool, na_value=False)
        out.append(finite(vals[mask], str(g), f"Column {value!r} in group {g!r}"))
    return out[0], out[1]


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
    chosen = pick_levels(key, by, groups, "paired test (two conditions)")
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
                f"Subject(s) {_levels_text(pd.unique(dup))} appear more than once under "
                f"{by!r} = {g!r}; a paired test needs one value per subject and condition."
            )
        frames.append(part.set_index("subject")["value"])
    a, b = frames
    only_a = a.index.difference(b.index)
    only_b = b.index.difference(a.index)
    if len(only_a) or len(only_b):
        parts = []
        if len(only_a):
            parts.append(f"{_levels_text(list(only_a))} only under {chosen[0]!r}")
        if len(only_b):
            parts.append(f"{_levels_text(list(only_b))} only under {chosen[1]!r}")
        raise DataError(
            "Unmatched subjects: " + "; ".join(parts) + ". Every subject needs a value in both "
            "conditions; filter the unmatched ones out first if that is intended."
        )
    b = b.reindex(a.index)
    return _pairwise(
        a.to_numpy(dtype=float),
        b.to_numpy(dtype=float),
        str(chosen[0]),
        str(chosen[1]),
        f"Column {value!r} under {chosen[0]!r}",
        f"Column {value!r} under {chosen[1]!r}",
    )
