"""tinfer: inference on means with the t distribution, for pandas DataFrames in notebooks.

``import tinfer`` registers the ``.tinfer`` accessor on DataFrame and Series.
"""

from __future__ import annotations

from . import _accessor  # noqa: F401  (registers the accessor)
from ._compare import BatchResult, SmallSegmentWarning, compare_summaries
from ._diagnostics import BootstrapCheck, Diagnostics
from ._errors import DataError, MissingDependencyError, ParameterError, TinferError
from ._offline import offline_charts
from ._plan import PlanResult, plan
from ._summary_api import from_summary
from ._tdist import TDistribution, tdist
from .results import Effect, Equivalence, GroupStats, OneSidedTest, TResult

__version__ = "0.1.0"

__all__ = [
    "BatchResult",
    "BootstrapCheck",
    "DataError",
    "Diagnostics",
    "Effect",
    "Equivalence",
    "GroupStats",
    "MissingDependencyError",
    "OneSidedTest",
    "ParameterError",
    "PlanResult",
    "SmallSegmentWarning",
    "TDistribution",
    "TResult",
    "TinferError",
    "__version__",
    "compare_summaries",
    "from_summary",
    "offline_charts",
    "plan",
    "tdist",
]
