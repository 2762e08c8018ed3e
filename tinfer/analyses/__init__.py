"""Analyses: summaries and options -> result objects, one module per kind of analysis.

No pandas reading (that is :mod:`tinfer.frames`) and no display (:mod:`tinfer.display`).
The names below are the package's public face, used by :mod:`tinfer.frames` and
:mod:`tinfer.scale`.
"""

from __future__ import annotations

from .batch import check_options, from_cube, run_batch, run_pairwise_batch
from .bootstrap import bootstrap
from .diagnostics import diagnose
from .equivalence import check_margin, equivalence_for
from .from_summary import from_summary
from .lift import check_relative
from .multiplicity import adjust
from .pairwise import check_method, pairwise_from_summary, run_pairwise
from .plan import detectable_effect_of, follow_up, plan, replan
from .ttest import build, group_stats, rebuild

__all__ = [
    "adjust",
    "bootstrap",
    "build",
    "check_margin",
    "check_method",
    "check_options",
    "check_relative",
    "detectable_effect_of",
    "diagnose",
    "equivalence_for",
    "follow_up",
    "from_cube",
    "from_summary",
    "group_stats",
    "pairwise_from_summary",
    "plan",
    "rebuild",
    "replan",
    "run_batch",
    "run_pairwise",
    "run_pairwise_batch",
]
