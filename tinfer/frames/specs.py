"""Which metrics a batch compares, and the roles of its columns.

A metric spec is ``(name, columns, kind)``: ``("x", ("x",), "value")``, a paired
difference ``("before minus after", (before, after), "diff")`` or a ratio metric
``("revenue / sessions", (revenue, sessions), "ratio")``.
"""

from __future__ import annotations

from collections.abc import Hashable, Sequence

from ..errors import ParameterError
from ..results.batch import RESULT_COLUMNS
from .levels import as_list

Spec = tuple[str, tuple, str]


def check_roles(keys: Sequence[Hashable], by, specs, func: str) -> None:
    """Refuse a column used in two roles: a segment key that is also ``by`` or a metric."""
    values = {c for _, cols, _ in specs for c in cols}
    for k in keys:
        if (by is not None and k == by) or k in values:
            is_by = by is not None and k == by
            role = "the group column given as by" if is_by else "a value column"
            raise ParameterError(
                f"The 'within' parameter of {func} names {k!r}, which is also {role}. A column "
                "can split rows into segments or be compared, not both; drop it from within."
            )
    check_result_names(keys, func)


def check_result_names(keys: Sequence[Hashable], func: str) -> None:
    """Refuse segment columns whose names clash with columns of the result table."""
    taken = set(RESULT_COLUMNS) | {"n", "mean", "sd", "n_a", "n_b", "mean_a", "mean_b"}
    taken |= {"sd_a", "sd_b", "first", "second", "p_family"}
    for k in keys:
        if str(k) in taken:
            raise ParameterError(
                f"The 'within' parameter of {func} names a column {k!r} that clashes with a "
                "column of the result table. Rename it first, e.g. df.rename(columns=...)."
            )


def metric_specs(columns, paired, func, ratio=None) -> list[tuple[str, tuple, str]]:
    """(name, columns, kind) per metric: ("x", ("x",), "value"), ("before minus after",
    (before, after), "diff") or ("revenue / sessions", (revenue, sessions), "ratio")."""
    if ratio is not None:
        extra = ratio_specs(ratio)
        if paired is not None:
            raise ParameterError(f"{func} takes paired= or ratio=, not both.")
        return ([] if columns is None else metric_specs(columns, None, func)) + extra
    if paired is not None:
        if columns is not None:
            raise ParameterError(
                f"{func} takes value columns or paired=(first, second), not both. "
                f"Got columns={columns!r} and paired={paired!r}."
            )
        pairs = [paired] if _is_pair_of_labels(paired) else list(paired)
        if not pairs or not all(_is_pair_of_labels(p) for p in pairs):
            raise ParameterError(
                f"The 'paired' parameter of {func} must be a pair of columns (first, second) "
                f"or a list of such pairs. Got {paired!r} instead."
            )
        return [(f"{p[0]} minus {p[1]}", (p[0], p[1]), "diff") for p in pairs]
    cols = as_list(columns)
    if not cols:
        raise ParameterError(
            f"The 'columns' parameter of {func} must name one or more value columns. "
            f"Got {columns!r} instead."
        )
    return [(str(c), (c,), "value") for c in cols]


def _is_pair_of_labels(p) -> bool:
    return (
        isinstance(p, tuple | list)
        and len(p) == 2
        and not any(isinstance(v, tuple | list) for v in p)
    )


def ratio_specs(ratio) -> list[Spec]:
    """Specs ``("num / den", (num, den), "ratio")`` of one ratio pair or a list of pairs."""
    pairs = list(ratio) if isinstance(ratio, list) else [ratio]
    if not pairs or not all(_is_pair_of_labels(p) for p in pairs):
        raise ParameterError(
            "ratio= takes (numerator, denominator), two columns such as ('revenue', "
            f"'sessions'), or a list of such pairs. Got {ratio!r}."
        )
    return [(f"{p[0]} / {p[1]}", (p[0], p[1]), "ratio") for p in pairs]


def _is_pair_of_labels(p) -> bool:
    return (
        isinstance(p, tuple | list)
        and len(p) == 2
        and not any(isinstance(v, tuple | list) for v in p)
    )
