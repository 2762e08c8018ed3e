"""Parameter checks, in one place, with one message shape.

Every message reads: "The '<name>' parameter of <function> must be <what>. Got <value> instead."
Every layer above ``core`` may import this module; it imports only :mod:`tinfer.errors`.
"""

from __future__ import annotations

import difflib
import math
from collections.abc import Iterable
from typing import Any

import numpy as np

from .errors import ParameterError

SIDES = ("two-sided", "upper", "lower")


def shown(value: Any) -> str:
    """A value as a person writes it: numpy scalars as plain numbers, long texts cut.

    >>> shown(np.int64(1)), shown(np.float64(0.5)), shown("abc"), len(shown("x" * 500)) < 90
    ('1', '0.5', "'abc'", True)
    """
    if isinstance(value, np.generic):
        value = value.item()
    text = repr(value)
    return text if len(text) <= 80 else text[:60] + " ... " + text[-15:]


def fail(name: str, func: str, what: str, got: Any) -> ParameterError:
    """The ParameterError for ``name`` of ``func``, in the one message shape."""
    return ParameterError(
        f"The {name!r} parameter of {func} must be {what}. Got {shown(got)} instead."
    )


def is_real(value: Any) -> bool:
    """True for a real number: a Python or numpy int or float, never a bool or a string.

    The one rule for numbers given as parameters, everywhere in tinfer.

    >>> is_real(0.95), is_real(np.float32(0.95)), is_real("0.95"), is_real(True)
    (True, True, False, False)
    """
    return isinstance(value, int | float | np.integer | np.floating) and not isinstance(
        value, bool | np.bool_
    )


def real(value: Any, name: str, func: str, what: str) -> float:
    """``value`` as a float, or the ParameterError saying it must be ``what``."""
    if not is_real(value):
        raise fail(name, func, what, value)
    if isinstance(value, np.floating) and value.dtype.itemsize < 8:
        return float(str(value))  # np.float32(0.95) is the 0.95 the user typed
    return float(value)


def check_level(level: Any, func: str) -> float:
    """Return ``level`` as a float strictly between 0 and 1."""
    out = real(level, "level", func, "a float in (0, 1)")
    if not 0.0 < out < 1.0:
        raise fail("level", func, "a float in (0, 1)", level)
    return out


def check_side(side: Any, func: str) -> str:
    """Return ``side`` if it is one of the three supported alternatives."""
    if not isinstance(side, str) or side not in SIDES:
        raise fail("side", func, "one of 'two-sided', 'upper', 'lower'", side)
    return side


def check_finite(value: Any, name: str, func: str) -> float:
    """Return ``value`` as a finite float."""
    out = real(value, name, func, "a finite number")
    if not math.isfinite(out):
        raise fail(name, func, "a finite number", value)
    return out


def check_bool(value: Any, name: str, func: str) -> bool:
    """Return ``value`` as a bool (numpy's True and False count)."""
    if not isinstance(value, bool | np.bool_):
        raise fail(name, func, "True or False", value)
    return bool(value)


def check_df(df: Any, func: str) -> float:
    """Degrees of freedom: a positive number, possibly non-integer, or infinity."""
    what = "a positive number (math.inf for the normal)"
    out = real(df, "df", func, what)
    if math.isnan(out) or out <= 0:
        raise fail("df", func, what, df)
    return out


def check_probability(q: Any, name: str, func: str) -> float:
    """Return ``q`` as a float strictly between 0 and 1."""
    out = real(q, name, func, "a probability in (0, 1)")
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


#: What each summary statistic must be, in the words of every message about it.
SUMMARY_RULES = {
    "n": "a whole count of at least {min_n}",
    "mean": "a finite number",
    "sd": "a finite, non-negative number",
    "ssd": "a finite, non-negative number",
}


def summary_problem(n, mean, spread, *, spread_name: str = "sd", min_n: int = 0):
    """The first invalid summary statistic among arrays of counts, means and SDs.

    The one validation of published or aggregated summaries, shared by ``from_summary``,
    ``compare_summaries`` and the Dask merge. ``spread`` holds SDs (``spread_name="sd"``) or
    sums of squared deviations (``"ssd"``). Rules: ``n`` is a whole number of at least
    ``min_n``; the mean is finite where ``n > 0`` (it may be missing for an empty group);
    the spread is finite and non-negative where ``n >= 2`` (it may be missing for a group of
    one, whose SD is undefined). Returns ``None``, or ``(name, index, value, rule)`` for the
    first problem, ``rule`` in the words of :data:`SUMMARY_RULES`.

    Examples
    --------
    >>> summary_problem([12, 15], [5.1, 4.3], [1.2, 1.5]) is None
    True
    >>> summary_problem([12, 2.5], [5.1, 4.3], [1.2, 1.5])
    ('n', 1, 2.5, 'a whole count of at least 0')
    >>> summary_problem([12, 15], [5.1, 4.3], [1.2, -1.0])
    ('sd', 1, -1.0, 'a finite, non-negative number')
    >>> summary_problem([0, 1], [float("nan"), 4.3], [float("nan"), float("nan")]) is None
    True
    """
    n, mean, spread = (np.atleast_1d(np.asarray(v, dtype=float)) for v in (n, mean, spread))
    n, mean, spread = np.broadcast_arrays(n, mean, spread)
    with np.errstate(invalid="ignore"):
        bad = {
            "n": ~np.isfinite(n) | (n != np.round(n)) | (n < min_n),
            "mean": (n > 0) & ~np.isfinite(mean),
            spread_name: ((n >= 2) & ~np.isfinite(spread)) | (spread < 0) | np.isinf(spread),
        }
    values = {"n": n, "mean": mean, spread_name: spread}
    for name, mask in bad.items():
        if mask.any():
            i = int(np.flatnonzero(mask)[0])
            rule = SUMMARY_RULES[name].format(min_n=min_n)
            return name, i, values[name][i].item(), rule
    return None
