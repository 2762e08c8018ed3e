"""Yuen's trimmed-mean t on the values kept by a result (``trim=`` on every t procedure).

The numbers (trimmed means, winsorised variances, Yuen's t) are in
:mod:`tinfer.core.robust`; this module checks ``trim`` and words the method.
"""

from __future__ import annotations

import numpy as np

from ..core import robust
from ..errors import DataError, ParameterError

#: The name of the effect size reported with trimmed means.
ROBUST_EFFECT = "robust d (AKP)"


def check_trim(trim, func: str, samples, pooled: bool) -> float:
    """``trim`` as a float in [0, 0.5); trimming needs the values and excludes ``pooled``."""
    if isinstance(trim, bool) or not isinstance(trim, int | float) or not 0 <= trim < 0.5:
        raise ParameterError(
            f"The 'trim' parameter of {func} must be a float in [0, 0.5) (0 for the ordinary "
            f"t, 0.2 for 20% trimmed means). Got {trim!r} instead."
        )
    if trim and samples is None:
        raise ParameterError(
            f"The 'trim' parameter of {func} needs the data values; results from published "
            "summaries (n, mean, sd) cannot be trimmed. Use trim=0."
        )
    if trim and pooled:
        raise ParameterError(
            f"The 'pooled' parameter of {func} must be False with trim > 0: Yuen's test does "
            "not pool variances. Got True instead."
        )
    return float(trim)


def trimmed(design, samples, trim, labels, variable, null, level, side):
    """Yuen's trimmed-mean t on the stored values: the computed arrays, the method in words
    and each sample's trimmed statistics."""
    parts = [robust.Trimmed.of(np.asarray(x, float), trim) for x in samples]
    names = list(labels) if design == "two-sample" else [f"the values of {variable}"]
    if design == "paired":
        names = [f"the differences {labels[0]} minus {labels[1]}"]
    for p, name in zip(parts, names, strict=True):
        if int(p.h) < 2:
            raise DataError(
                f"After trimming {trim:g} per tail, {name} keep(s) {int(p.h)} value(s); "
                "a trimmed-mean t needs at least 2. Use a smaller trim or more data."
            )
    if not all(float(p.wvar) > 0 for p in parts):
        bad = [n for p, n in zip(parts, names, strict=True) if not float(p.wvar) > 0]
        if design != "two-sample" or len(bad) == 2:
            raise DataError(
                f"The winsorised values of {' and '.join(bad)} have no spread, so the "
                "trimmed-mean standard error is zero and t is undefined. Use a smaller trim."
            )
    pct = f"{trim * 100:g}% trimmed"
    if design == "two-sample":
        c = robust.yuen_two_sample(*parts, null=null, level=level, side=side)
        return c, f"Yuen trimmed-mean t ({pct})", parts
    c = robust.yuen_one_sample(parts[0], null=null, level=level, side=side)
    kind = "Paired" if design == "paired" else "One-sample"
    return c, f"{kind} Yuen trimmed-mean t ({pct})", parts
