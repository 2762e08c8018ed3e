"""One row per unit of randomisation on Dask: ``cluster=`` for the Dask accessor.

A Dask groupby on (segments, arm, unit) averages each unit's values (and its covariate) and
sums the two columns of a ratio metric, on the workers. The unit table (one row per segment,
arm and unit) comes to the client once, to leave out units found in both arms, and goes
back as a Dask DataFrame through the same co-moment merge as rows do, so the answer equals
the pandas accessor's.
"""

from __future__ import annotations

import dask
import dask.dataframe as dd
import numpy as np

from ..errors import ParameterError
from ..frames import both_arms_note, missing_column, unit_note

Spec = tuple[str, tuple, str]


def unit_rows(
    ddf: dd.DataFrame, keys: list, by, cluster, specs: list[Spec], covariate
) -> tuple[dd.DataFrame, list[Spec], object, list[str]]:
    """The unit table, specs that read it, the covariate's column in it, and the notes."""
    names = [*keys, *([by] if by is not None else []), cluster, covariate]
    names += [c for _, cols, _ in specs for c in cols]
    for c in names:
        if c is not None and c not in ddf.columns:
            raise missing_column(c, ddf.columns)
    if cluster in (*keys, by, covariate) or any(cluster in cols for _, cols, _ in specs):
        raise ParameterError(f"cluster={cluster!r} must be a column of its own.")
    group = [*keys, *([by] if by is not None else []), cluster]
    t = "__t"  # a prefix for the table's own columns that no kept column name starts with
    while any(str(c).startswith(t) for c in group):
        t += "_"
    data = ddf[group]
    how: dict[str, str] = {}
    new_specs: list[Spec] = []
    for j, (name, cols, kind) in enumerate(specs):
        if kind == "ratio":
            y, x = ddf[cols[0]].astype(float), ddf[cols[1]].astype(float)
            both = y.notnull() & x.notnull()
            data = data.assign(**{f"{t}n{j}": y.where(both), f"{t}d{j}": x.where(both)})
            data = data.assign(**{f"{t}c{j}": both.astype(float)})
            how |= {f"{t}n{j}": "sum", f"{t}d{j}": "sum", f"{t}c{j}": "sum"}
            new_specs.append((name, (f"{t}n{j}", f"{t}d{j}"), kind))
        else:
            data = data.assign(**{f"{t}v{j}": ddf[cols[0]].astype(float)})
            how[f"{t}v{j}"] = "mean"
            new_specs.append((name, (f"{t}v{j}", *cols[1:]), kind))
    cov_name = None
    if covariate is not None:
        data = data.assign(**{f"{t}cov": ddf[covariate].astype(float)})
        how[f"{t}cov"] = "mean"
        cov_name = f"{t}cov"
    data = data.assign(**{f"{t}rows": 1.0})
    how[f"{t}rows"] = "sum"
    units = data.groupby(group).agg(how).reset_index()
    for j, (_, _, kind) in enumerate(specs):
        if kind == "ratio":  # a unit with no complete row has no sums (pandas: min_count=1)
            empty = units[f"{t}c{j}"] == 0
            num, den = f"{t}n{j}", f"{t}d{j}"
            units = units.assign(**{num: units[num].mask(empty), den: units[den].mask(empty)})
    notes = []
    if by is not None:
        arms = units.groupby(cluster)[by].nunique()
        both_arms = arms[arms > 1].index
        units, both = dask.compute(units, both_arms)
        if len(both):
            units = units[~units[cluster].isin(list(both))]
            notes.append(both_arms_note(len(both), cluster))
    else:
        units = units.compute()
    kinds = [kind for _, _, kind in specs]
    averaged = covariate is not None or any(k != "ratio" for k in kinds)
    rows = int(units[f"{t}rows"].sum())
    notes.insert(0, unit_note(cluster, rows, len(units), averaged, "ratio" in kinds))
    parts = max(1, min(ddf.npartitions, int(np.ceil(len(units) / 1_000_000))))
    return dd.from_pandas(units, npartitions=parts), new_specs, cov_name, notes
