"""The only code that reads pandas: the accessor, column checks, level choice, and
DataFrames -> summaries for single tests and for batches.

The names below are the package's public face, used by :mod:`tinfer.scale`.
"""

from __future__ import annotations

from .accessor import TinferFrameAccessor
from .batch import choose_arms
from .batch_sums import compare_moments, compare_sums, ratio_stats
from .batch_table import compare_summaries
from .cluster import both_arms_note
from .columns import column, metric_values, missing_column, to_float
from .experiment_batch import experiment_checks, removed_note, unit_note
from .levels import (
    as_list,
    choose_two,
    combine_codes,
    key_codes,
    label_pair,
    levels_text,
    py_value,
)
from .series import TinferSeriesAccessor
from .specs import check_result_names, check_roles, metric_specs

__all__ = [
    "TinferFrameAccessor",
    "TinferSeriesAccessor",
    "as_list",
    "both_arms_note",
    "check_result_names",
    "check_roles",
    "choose_arms",
    "choose_two",
    "column",
    "combine_codes",
    "compare_moments",
    "compare_summaries",
    "compare_sums",
    "experiment_checks",
    "key_codes",
    "label_pair",
    "levels_text",
    "metric_specs",
    "metric_values",
    "missing_column",
    "py_value",
    "ratio_stats",
    "removed_note",
    "to_float",
    "unit_note",
]
