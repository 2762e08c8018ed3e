"""Error and warning classes. Each error also inherits from the built-in error people catch.

The bottom of the package: every layer may import this module, and it imports nothing.
"""

from __future__ import annotations


class TinferError(ValueError):
    """Base class for every error tinfer raises on purpose."""


class ParameterError(TinferError):
    """A keyword argument has a value tinfer cannot use."""


class DataError(TinferError):
    """The data cannot support the requested test (missing column, no spread, ...)."""


class MissingDependencyError(TinferError, ImportError):
    """An optional package is needed for this feature and is not installed."""


class SmallSegmentWarning(UserWarning):
    """Some segments had too few values (or no spread) to test; their results are NaN."""
