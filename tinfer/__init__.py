"""tinfer: inference on means with the t distribution, for pandas DataFrames in notebooks.

``import tinfer`` registers the ``.tinfer`` accessor on DataFrame and Series.

The package is built in layers, each importing only the ones below it::

    frames/     the only code that reads pandas: the accessor, columns, level choice
    analyses/   summaries + options -> results (t tests, equivalence, plans, batches, ...)
    display/    cards, charts and widgets; reads results only
    results/    frozen result types with their words
    core/       numpy/scipy on summaries, vectorised
    errors, checks, optional, docstrings   shared by every layer
"""

from __future__ import annotations

from . import frames  # noqa: F401  (registers the accessor)
from .analyses import adjust, from_summary, pairwise_from_summary, plan
from .display.offline import offline_charts
from .errors import (
    DataError,
    MissingDependencyError,
    ParameterError,
    SmallSegmentWarning,
    TinferError,
)
from .frames import compare_summaries, compare_sums
from .results import (
    BatchResult,
    BayesFactor,
    BootstrapCheck,
    Diagnostics,
    Effect,
    Equivalence,
    GroupStats,
    OneSidedTest,
    PairwiseResult,
    PlanResult,
    RelativeLift,
    ReportTable,
    TDistribution,
    TResult,
    table,
    tdist,
)
from .results.provenance import VERSION as __version__

__all__ = [
    "BatchResult",
    "BayesFactor",
    "BootstrapCheck",
    "DataError",
    "Diagnostics",
    "Effect",
    "Equivalence",
    "GroupStats",
    "MissingDependencyError",
    "OneSidedTest",
    "PairwiseResult",
    "ParameterError",
    "PlanResult",
    "RelativeLift",
    "ReportTable",
    "SmallSegmentWarning",
    "TDistribution",
    "TResult",
    "TinferError",
    "__version__",
    "adjust",
    "compare_summaries",
    "compare_sums",
    "from_summary",
    "offline_charts",
    "pairwise_from_summary",
    "plan",
    "table",
    "tdist",
]
