"""Assumption checks of a t result: ``result.check()`` builds a :class:`~tinfer.Diagnostics`.

Works from the values kept on the result (``result.samples``); the caller's DataFrame is
never read again. The numbers are in :mod:`tinfer.core.diagnostics`; the words in
:mod:`tinfer.results.diagnostics`; the card and charts in :mod:`tinfer.display.diagnostics`.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from ..core import diagnostics as diag
from ..errors import DataError
from ..results.diagnostics import MAX_POINTS, Diagnostics

if TYPE_CHECKING:  # pragma: no cover
    from ..results.ttest import TResult


def values_of(result: TResult, func: str) -> tuple[tuple[str, np.ndarray], ...]:
    """(label, values) of each sample kept on ``result``: the groups, or the paired differences.

    Raises a DataError for results built from summaries (they keep no values).
    """
    if result.samples is None:
        raise DataError(
            f"{func}() needs the data values, but this result was built from summary "
            "statistics (n, mean, sd) only. Run the test on a DataFrame to use it."
        )
    if result.design == "paired":
        return ((f"{result.comparison} (differences)", np.asarray(result.samples[0], float)),)
    labels = result.labels or (result.variable,)
    return tuple(
        (str(lab), np.asarray(x, float)) for lab, x in zip(labels, result.samples, strict=False)
    )


def diagnose(result: TResult) -> Diagnostics:
    """Build the :class:`Diagnostics` of ``result`` from its stored arrays."""
    named = values_of(result, "check")
    for label, x in named:
        if x.size < 2:
            raise DataError(f"{label} has {x.size} value(s); checks need at least 2.")
    shapes = tuple(diag.shape(label, x) for label, x in named)
    trim = float(result.trim or 0.0)
    advice, basis = diag.advise(shapes, design=result.design, trim=trim, pooled=result.pooled)
    qq, lines, strip, flags, thinned = [], [], [], [], []
    for (_, x), s in zip(named, shapes, strict=True):
        xs = np.sort(x)
        ranks = diag.thin_ranks(xs.size, MAX_POINTS)
        z = diag.blom_quantiles(xs.size)
        qq.append((z[ranks], xs[ranks]))
        z1, z3 = -0.6744897501960817, 0.6744897501960817  # Phi^-1(1/4), Phi^-1(3/4)
        q1, _, q3 = s.quartiles
        slope = (q3 - q1) / (z3 - z1)
        lines.append((float(slope), float(q1 - slope * z1)))
        big = xs.size > MAX_POINTS
        thinned.append(big)
        strip.append(np.asarray(s.outliers) if big else xs)
        flags.append(np.ones(len(s.outliers), bool) if big else diag.hampel(xs)[0])
    ratio = diag.variance_ratio(*shapes) if len(shapes) == 2 else float("nan")
    return Diagnostics(
        design=result.design,
        method=result.method,
        comparison=result.comparison,
        variable=result.variable,
        units=result.units,
        trim=trim,
        shapes=shapes,
        variance_ratio=ratio,
        advice=advice,
        basis=basis,
        qq=tuple(qq),
        qq_lines=tuple(lines),
        strip=tuple(strip),
        strip_flags=tuple(flags),
        thinned=tuple(thinned),
    )
