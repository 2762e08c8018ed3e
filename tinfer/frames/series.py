"""The ``.tinfer`` accessor on pandas Series: a one-sample test of the Series' values."""

from __future__ import annotations

import pandas as pd

from ..results.ttest import TResult
from . import ttest
from .columns import finite, to_float

Margin = float | tuple[float, float] | None


@pd.api.extensions.register_series_accessor("tinfer")
class TinferSeriesAccessor:
    """t inference on one Series: ``s.tinfer.one_sample(null=...)``."""

    def __init__(self, obj: pd.Series) -> None:
        self._obj = obj

    def one_sample(
        self,
        *,
        null: float = 0.0,
        side: str = "two-sided",
        level: float = 0.95,
        units: str | None = None,
        margin: Margin = None,
        margin_units: str = "raw",
        worse: str | None = None,
        superior: bool = False,
        trim: float = 0.0,
    ) -> TResult:
        """Test the mean of the Series against ``null``; see ``DataFrame.tinfer.one_sample``.

        Examples
        --------
        >>> import pandas as pd, tinfer
        >>> r = pd.Series([9.8, 10.4, 10.1, 9.7, 10.6], name="ohms").tinfer.one_sample(null=10)
        >>> round(r.estimate, 2), r.variable
        (10.12, 'ohms')
        """
        name = "value" if self._obj.name is None else str(self._obj.name)
        what = f"Series {name!r}"
        sample = finite(to_float(self._obj, what), name, what)
        opts = dict(null=null, side=side, level=level, units=units, trim=trim)
        opts |= dict(margin=margin, margin_units=margin_units, worse=worse, superior=superior)
        return ttest.one_sample(sample, name, func="one_sample", **opts)


__all__ = ["TinferSeriesAccessor"]
