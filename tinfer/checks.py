"""Parameter checks, in one place, with one message shape.

Every message reads: "The '<name>' parameter of <function> must be <what>. Got <value> instead."
Every layer above ``core`` may import this module; it imports only :mod:`tinfer.errors`.
"""

from __future__ import annotations

import difflib
import math
from collections.abc import Iterable
from typing import Any

from .errors import ParameterError

SIDES = ("two-sided", "upper", "lower")


def fail(name: str, func: str, what: str, got: Any) -> ParameterError:
    """The ParameterError for ``name`` of ``func``, in the one message shape."""
    return ParameterError(f"The {name!r} parameter of {func} must be {what}. Got {got!r} instead.")


def check_level(level: Any, func: str) -> float:
    """Return ``level`` as a float strictly between 0 and 1."""
    if isinstance(level, bool) or not isinstance(level, int | float):
        raise fail("level", func, "a float in (0, 1)", level)
    if not 0.0 < float(level) < 1.0:
        raise fail("level", func, "a float in (0, 1)", level)
    return float(level)


def check_side(side: Any, func: str) -> str:
    """Return ``side`` if it is one of the three supported alternatives."""
    if side not in SIDES:
        raise fail("side", func, "one of 'two-sided', 'upper', 'lower'", side)
    return side


def check_finite(value: Any, name: str, func: str) -> float:
    """Return ``value`` as a finite float."""
    try:
        out = float(value)
    except (TypeError, ValueError):
        raise fail(name, func, "a finite number", value) from None
    if isinstance(value, bool) or not math.isfinite(out):
        raise fail(name, func, "a finite number", value)
    return out


def check_bool(value: Any, name: str, func: str) -> bool:
    if not isinstance(value, bool):
        raise fail(name, func, "True or False", value)
    return value


def check_df(df: Any, func: str) -> float:
    """Degrees of freedom: a positive number, possibly non-integer, or infinity."""
    try:
        out = float(df)
    except (TypeError, ValueError):
        raise fail("df", func, "a positive number (math.inf for the normal)", df) from None
    if isinstance(df, bool) or math.isnan(out) or out <= 0:
        raise fail("df", func, "a positive number (math.inf for the normal)", df)
    return out


def check_probability(q: Any, name: str, func: str) -> float:
    try:
        out = float(q)
    except (TypeError, ValueError):
        raise fail(name, func, "a probability in (0, 1)", q) from None
    if not 0.0 < out < 1.0:
        raise fail(name, func, "a probability in (0, 1)", q)
    return out


def close_matches(name: Any, options: Iterable[Any], what: str = "columns") -> str:
    """A phrase naming the options closest to ``name``, for error messages.

    >>> close_matches("fil_g", ["fill_g", "seal_n"]), close_matches("x", ["a"], "designs")
    ("Did you mean 'fill_g'?", "Available designs: 'a'.")
    """
    opts = [str(o) for o in options]
    near = difflib.get_close_matches(str(name), opts, n=3, cutoff=0.5)
    if near:
        return "Did you mean " + " or ".join(repr(n) for n in near) + "?"
    shown = ", ".join(repr(o) for o in opts[:12]) + (", ..." if len(opts) > 12 else "")
    return f"Available {what}: {shown}."
