"""Levels of a grouping column: the one rule for choosing two of them, and integer codes.

Every path that compares two groups (``two_sample``, long ``paired``, ``compare`` with
``by``, ``compare_summaries`` with ``arm``, and the Dask accessor) picks its two levels with
:func:`choose_two`, so the rules and the messages are the same everywhere.
"""

from __future__ import annotations

from collections.abc import Hashable, Sequence
from typing import Any

import numpy as np
import pandas as pd

from ..core.grouped import integer_codes
from ..errors import DataError


def py_value(v: Any) -> Any:
    """A numpy scalar as the Python value it holds (other values unchanged).

    >>> py_value(np.int64(3)), py_value("a")
    (3, 'a')
    """
    return v.item() if isinstance(v, np.generic) else v


def label_pair(first: Any, second: Any) -> tuple[str, str]:
    """Text labels of two levels, made distinct when their text is the same (1 and "1").

    >>> label_pair("drip", "furrow"), label_pair(1, "1")
    (('drip', 'furrow'), ('1', "'1'"))
    """
    a, b = str(py_value(first)), str(py_value(second))
    if a == b:
        return repr(py_value(first)), repr(py_value(second))
    return a, b


def level_labels(levels) -> list[str]:
    """Text labels of levels, made distinct where two share their text (1 and "1").

    >>> level_labels([1, "1", "b"])
    ['1', "'1'", 'b']
    """
    texts = [str(py_value(v)) for v in levels]
    seen = {t: texts.count(t) for t in texts}
    return [repr(py_value(v)) if seen[t] > 1 and not isinstance(py_value(v), int) else t
            for v, t in zip(levels, texts, strict=True)]  # fmt: skip


def levels_text(values: Sequence) -> str:
    """The first ten levels as a readable list for messages.

    >>> levels_text([np.int64(1), "b"])
    "1, 'b'"
    """
    values = list(values)
    shown = ", ".join(repr(py_value(v)) for v in values[:10])
    return shown + (", ..." if len(values) > 10 else "")


def choose_two(
    levels: Sequence, by: Hashable, groups: Sequence | None, what: str = "two-sample test"
) -> tuple[int, int]:
    """Indices into ``levels`` (the levels present) of the two to compare, first and second.

    Without ``groups`` there must be exactly two levels, taken in sorted order of their text
    (so a level 10 comes before a level 2). ``groups=(first, second)`` names two present
    levels and their order. ``what`` names the procedure in the message.

    Examples
    --------
    >>> choose_two(["furrow", "drip"], "plot", None)
    (1, 0)
    >>> choose_two(["a", "b", "c"], "arm", ("c", "a"))
    (2, 0)
    """
    levels = list(levels)
    if groups is None:
        if len(levels) != 2:
            raise DataError(
                f"Column {by!r} has {len(levels)} level(s) ({levels_text(levels)}), but a "
                f"{what} needs exactly two. Pick two with groups=(first, second)."
            )
        first, second = sorted(range(2), key=lambda i: str(levels[i]))
        return first, second
    if isinstance(groups, str) or not hasattr(groups, "__len__") or len(groups) != 2:
        raise DataError(
            f"groups must name two levels of {by!r}, as (first, second). Got {groups!r}."
        )
    if groups[0] == groups[1]:
        raise DataError(f"groups names the same level twice: {groups!r}.")
    out = []
    for g in groups:
        hits = [i for i, v in enumerate(levels) if v == g]
        if not hits:
            raise DataError(
                f"Level {g!r} does not occur in column {by!r}. Levels found: {levels_text(levels)}."
            )
        out.append(hits[0])
    return out[0], out[1]


def key_codes(series: pd.Series) -> tuple[np.ndarray, np.ndarray, bool]:
    """Integer codes (-1 for missing), the sorted levels, and whether any code is -1.

    The codes may share memory with the column (compact integer columns): never write
    to them.
    """
    if isinstance(series.dtype, np.dtype) and series.dtype.kind in "iu":
        fast = integer_codes(series.to_numpy())
        if fast is not None:
            return fast[0], fast[1], False
    if series.dtype == np.bool_:  # numpy booleans cannot be missing
        return series.to_numpy().astype(np.intp), np.array([False, True], dtype=object), False
    try:
        codes, uniques = pd.factorize(series, sort=True)
    except TypeError as exc:  # lists, dicts or sets in the column
        raise ungroupable(series.name, exc) from None
    levels = np.asarray(uniques.astype(object)) if hasattr(uniques, "astype") else uniques
    codes = codes.astype(np.intp, copy=False)
    return codes, np.asarray(levels, dtype=object), bool((codes < 0).any())


def group_codes(series: pd.Series) -> tuple[np.ndarray, np.ndarray]:
    """Integer codes of a group column (-1 for missing) and the level of each code.

    The fastest split pandas allows for each dtype: a categorical column's own codes (its
    categories may include unused ones), booleans as 0 and 1, compact integers as offsets,
    anything else through ``pandas.factorize`` (sorted levels). The codes may share memory
    with the column.
    """
    if isinstance(series.dtype, pd.CategoricalDtype):
        codes = series.cat.codes.to_numpy()
        return codes, np.asarray(series.cat.categories.astype(object))
    if series.dtype == np.bool_:  # numpy booleans cannot be missing
        return series.to_numpy().view(np.int8), np.array([False, True], dtype=object)
    codes, levels, _ = key_codes(series)
    return codes, levels


def combine_codes(codes: list[np.ndarray], sizes: list[int]) -> tuple[np.ndarray, list[int]]:
    """Mixed-radix code of several key codes; -1 where any key is missing.

    Returns the combined code and the radices used (the level counts).
    """
    out = codes[0] if len(codes) == 1 else codes[0].astype(np.intp, copy=True)
    if len(codes) > 1:
        bad = out < 0
        for c, k in zip(codes[1:], sizes[1:], strict=True):
            out *= k
            out += c
            bad |= c < 0
        if bad.any():
            out[bad] = -1
    return out, sizes


def ungroupable(name: Hashable, exc: Exception) -> DataError:
    """The error for a key column whose values cannot label groups (lists, sets, dicts)."""
    return DataError(
        f"Column {name!r} holds values that cannot label groups ({exc}). Groups need labels "
        "such as text or numbers; convert the column first, e.g. df[col].astype(str)."
    )


def as_list(x) -> list:
    """``None`` -> [], a single label -> [label], a list or tuple -> list.

    >>> as_list(None), as_list("shift"), as_list(("a", "b"))
    ([], ['shift'], ['a', 'b'])
    """
    if x is None:
        return []
    if isinstance(x, list | tuple):
        return list(x)
    return [x]
