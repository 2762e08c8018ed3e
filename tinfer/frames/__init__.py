"""The only code that reads pandas: the accessor, column checks, level choice, and
DataFrames -> summaries for single tests and for batches.

The names below are the package's public face, used by :mod:`tinfer.scale`.
"""

from __future__ import annotations

from .accessor import TinferFrameAccessor
from .batch import check_result_names, check_roles, choose_arms, metric_specs
from .batch_table import compare_summaries
from .columns import column, metric_values, missing_column, to_float
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

__all__ = [
    "TinferFrameAccessor",
    "TinferSeriesAccessor",
    "as_list",
    "check_result_names",
    "check_roles",
    "choose_arms",
    "choose_two",
    "column",
    "combine_codes",
    "compare_summaries",
    "key_codes",
    "label_pair",
    "levels_text",
    "metric_specs",
    "metric_values",
    "missing_column",
    "py_value",
    "to_float",
]
