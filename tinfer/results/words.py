"""Words shared by every result: an interval, a signed offset, a capitalised sentence.

The one place where an interval is put into words; headlines, cards, equivalence
sections and text reprs all call :func:`interval_words`.
"""

from __future__ import annotations

import math
from collections.abc import Callable

from .format import fmt_level, fmt_num

Fmt = Callable[[float], str]


def interval_words(
    low: float,
    high: float,
    fmt: Fmt,
    level: float | None = None,
    *,
    one_sided: str = "",
    open_ends: bool = False,
) -> str:
    """An interval in words, with ``fmt`` formatting each limit.

    Both limits finite (or ``open_ends``: infinite limits shown as ∞): "lo to hi", led by
    "95% CI " when ``level`` is given. One infinite limit (a one-sided bound): with
    ``level``, "95% lower bound lo" (``one_sided`` is put in front, e.g. "one-sided ");
    without, "lo or more (one-sided)".

    Examples
    --------
    >>> f = lambda x: fmt_num(x, 2)
    >>> interval_words(1.0, 2.5, f, 0.95), interval_words(1.0, math.inf, f)
    ('95% CI 1.00 to 2.50', '1.00 or more (one-sided)')
    >>> interval_words(-math.inf, 2.5, f, 0.9, one_sided="one-sided ")
    'one-sided 90% upper bound 2.50'
    >>> interval_words(-math.inf, 2.5, f, open_ends=True)
    '−∞ to 2.50'
    """
    lead = f"{fmt_level(level)} " if level is not None else ""
    if open_ends or (math.isfinite(low) and math.isfinite(high)):
        ci = "CI " if lead else ""
        return f"{lead}{ci}{fmt(low)} to {fmt(high)}"
    if math.isfinite(low):
        return (
            f"{one_sided}{lead}lower bound {fmt(low)}"
            if lead
            else f"{fmt(low)} or more (one-sided)"
        )
    return (
        f"{one_sided}{lead}upper bound {fmt(high)}" if lead else f"{fmt(high)} or less (one-sided)"
    )


def signed(x: float) -> str:
    """A number with its sign always shown: "+1.5", "-0.3".

    >>> signed(1.5), signed(-0.25)
    ('+1.5', '-0.25')
    """
    text = fmt_num(abs(x))
    return f"-{text}" if x < 0 else f"+{text}"


def capital(s: str) -> str:
    """``s`` with its first letter in upper case (the rest unchanged).

    >>> capital("the mean of x")
    'The mean of x'
    """
    return s[:1].upper() + s[1:]
