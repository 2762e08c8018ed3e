"""Result types: frozen value objects holding numbers and words, one module per analysis.

A result never holds the caller's DataFrame or views of its arrays (values it keeps are
read-only copies) and renders nothing when it is built. Its convenience methods (``chart``,
``explore``, ``check``, ``plan``, ``recompute``, ...) reach :mod:`tinfer.display` and
:mod:`tinfer.analyses` lazily, inside the method; nothing else here imports upward.
"""

from __future__ import annotations

from .batch import BatchResult
from .bayes import BayesFactor
from .bootstrap import BootstrapCheck
from .diagnostics import Diagnostics
from .equivalence import Equivalence, OneSidedTest
from .lift import RelativeLift
from .pairwise import PairwiseResult
from .parts import Effect, GroupStats
from .plan import PlanResult
from .table import ReportTable, table
from .tdist import TDistribution, TDistView, tdist
from .ttest import TResult

__all__ = [
    "BatchResult",
    "BayesFactor",
    "BootstrapCheck",
    "Diagnostics",
    "Effect",
    "Equivalence",
    "GroupStats",
    "OneSidedTest",
    "PairwiseResult",
    "PlanResult",
    "RelativeLift",
    "ReportTable",
    "TDistView",
    "TDistribution",
    "TResult",
    "table",
    "tdist",
]
