"""One value per unit of randomisation: ``two_sample(..., cluster="user_id")``.

Visitors are randomised but orders or sessions are the rows; rows of one visitor are not
independent, so testing rows makes intervals too narrow. Each unit's rows are averaged first
and the test runs on the per-unit means. A unit found in both groups is a data error (a unit
is randomised once): such units are left out, and the result says how many.
"""

from __future__ import annotations

from collections.abc import Hashable

import numpy as np
import pandas as pd

from ..errors import DataError
from .columns import column, to_float


def per_unit_means(
    df: pd.DataFrame,
    value: Hashable,
    by: Hashable,
    cluster: Hashable,
    extra: tuple = (),
    how: str = "mean",
) -> tuple[pd.DataFrame, tuple[str, ...]]:
    """A frame with one row per unit (its mean of ``value`` and its group) and the notes.

    ``extra`` columns are averaged alongside (a covariate). With ``how="sum"`` (the two
    columns of a ratio metric, ``value`` and ``extra``) each unit's rows are summed instead,
    and a row missing either value is left out.

    Examples
    --------
    >>> import pandas as pd
    >>> rows = pd.DataFrame({"u": [1, 1, 2, 3, 3, 3], "arm": ["a", "a", "a", "b", "b", "b"],
    ...                      "spend": [10.0, 20.0, 5.0, 1.0, 2.0, 3.0]})
    >>> units, notes = per_unit_means(rows, "spend", "arm", "u")
    >>> units["spend"].tolist(), notes[0].split(":")[0]
    ([15.0, 5.0, 2.0], "Rows averaged per 'u' unit")
    """
    if cluster in (value, by):
        raise DataError(f"cluster={cluster!r} must be a column other than the value and by=.")
    vals = to_float(column(df, value), f"Column {value!r}")
    if np.isinf(vals).any():
        raise DataError(
            f"Column {value!r} holds infinite value(s); replace them with NaN or fix them."
        )
    frame = pd.DataFrame({"v": vals, "u": column(df, cluster).to_numpy(), "g": column(df, by)})
    for i, name in enumerate(extra):
        frame[f"x{i}"] = to_float(column(df, name), f"Column {name!r}")
    no_unit = int(frame["u"].isna().sum())
    frame = frame.dropna(subset=["u", "g"])
    arms = frame.groupby("u", sort=False, observed=True)["g"].nunique()
    both = arms.index[arms > 1]
    if len(both):
        frame = frame[~frame["u"].isin(both)]
    cols = ["v", *(f"x{i}" for i in range(len(extra)))]
    usable = frame[cols].notna().all(axis=1) if how == "sum" else frame["v"].notna()
    rows = int(usable.sum())
    grouped = frame[usable].groupby(["u", "g"], sort=False, observed=True)[cols]
    means = (grouped.sum() if how == "sum" else grouped.mean()).reset_index()
    verb = "summed" if how == "sum" else "averaged"
    notes = [
        f"Rows {verb} per {cluster!r} unit: {rows:,} rows became {len(means):,} units, and "
        "the test treats units, not rows, as independent."
    ]
    if len(both):
        notes.append(both_arms_note(len(both), cluster))
    if no_unit:
        notes.append(f"{no_unit:,} row(s) with a missing {cluster!r} were not used.")
    no_value = int((~usable).sum())
    if no_value:
        what = " or ".join(repr(c) for c in (value, *extra)) if how == "sum" else repr(value)
        notes.append(f"{no_value:,} row(s) with a missing {what} were not used.")
    out = pd.DataFrame({value: means["v"].to_numpy(), by: means["g"].to_numpy()})
    for i, name in enumerate(extra):
        out[name] = means[f"x{i}"].to_numpy()
    return out, tuple(notes)


def both_arms_note(count: int, cluster) -> str:
    """The note on units found in more than one group (left out)."""
    return (
        f"{count:,} unit(s) of {cluster!r} appear in more than one group (a data error: a unit "
        "is randomised once); their rows were left out."
    )
