"""tinfer: inference on means with the t distribution, for pandas DataFrames in notebooks.

``import tinfer`` registers the ``.tinfer`` accessor on DataFrame and Series.
"""

from __future__ import annotations

from . import _accessor  # noqa: F401  (registers the accessor)
from ._errors import DataError, MissingDependencyError, ParameterError, TinferError
from ._summary_api import from_summary
from ._tdist import TDistribution, tdist
from .results import Effect, GroupStats, TResult

__version__ = "0.1.0"

__all__ = [
    "DataError",
    "Effect",
    "GroupStats",
    "MissingDependencyError",
    "ParameterError",
    "TDistribution",
    "TResult",
    "TinferError",
    "__version__",
    "from_summary",
    "tdist",
]
