"""From DataFrame columns to clean float arrays: selection, validation, missing values.

No statistics here beyond counting; the caller's DataFrame is never modified.
"""

from __future__ import annotations

from collections.abc import Hashable, Iterable
from dataclasses import dataclass
from typing import Any

import numpy as np
import pandas as pd

from ..checks import close_matches, shown
from ..errors import DataError


@dataclass(frozen=True)
class Sample:
    """Finite float values of one group, with the count of missing values dropped."""

    label: str
    values: np.ndarray
    n_missing: int


def missing_column(name: Any, columns: Iterable[Any]) -> DataError:
    """The error for a column that is not there, naming the closest ones."""
    if isinstance(name, pd.Series | pd.Index | np.ndarray | list | dict | set):
        kind = type(name).__name__
        article = "an" if kind[0].lower() in "aeiou" else "a"
        return DataError(
            f"A column label such as 'weight' was expected, not {article} {kind}"
            + (f" (this one is named {shown(name.name)})" if getattr(name, "name", None) else "")
            + ". Pass the column's name: df.tinfer.one_sample('weight'), not the column itself."
        )
    return DataError(
        f"There is no column {shown(name)} in the DataFrame. {close_matches(name, columns)}"
    )


def column(df: pd.DataFrame, name: Hashable) -> pd.Series:
    """The column ``name`` of ``df``, or a DataError naming the close matches."""
    label = isinstance(name, Hashable) and not isinstance(name, pd.Series | pd.Index | np.ndarray)
    if not label or name not in df.columns:
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
    if pd.api.types.is_complex_dtype(dtype):
        raise DataError(
            f"{what} holds complex numbers; a t procedure needs real values. Take the real "
            "part, the modulus or the phase first, whichever was measured."
        )
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
    with np.errstate(over="ignore", invalid="ignore"):
        if np.isfinite(np.add.reduce(values)):  # one fast pass: NaN and inf spoil the sum
            return Sample(label, values, 0)
    ok = np.isfinite(values)
    if ok.all():  # finite values whose sum overflowed
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
    """The finite values of column ``name`` (missing ones dropped and counted)."""
    what = f"Column {name!r}"
    return finite(to_float(column(df, name), what), str(name), what)


def metric_values(df: pd.DataFrame, cols: tuple, check_inf: bool = True) -> np.ndarray:
    """Float values of one metric: a column, or first minus second for a paired metric.

    With ``check_inf=False`` the caller promises to call :func:`reject_inf` whenever a
    non-finite value shows up (the fast path sees that from the group sums).
    """
    arrays = [to_float(column(df, c), f"Column {c!r}") for c in cols]
    if check_inf:
        reject_inf(arrays, cols)
    return arrays[0] if len(arrays) == 1 else arrays[0] - arrays[1]


def reject_inf(arrays, cols) -> None:
    for x, c in zip(arrays, cols, strict=True):
        if np.isinf(x).any():
            raise DataError(
                f"Column {c!r} holds infinite value(s). A mean with an infinite value is "
                "undefined; replace them with NaN to drop them, or fix them at the source."
            )
