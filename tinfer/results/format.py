"""Number formatting shared by text reprs, tables and cards (the words of every result).

The p-value rule (documented in docs/methods.md):
- three significant digits, fixed notation down to 0.0001 ("0.0382", "0.000417");
- below 0.0001, scientific notation with three significant digits ("3.82e-07");
- never "0": when the true p is below what double precision holds (about 1e-300),
  the text says "below 1e-300" and the exact natural log of p is kept on the result.
"""

from __future__ import annotations

import math

P_FLOOR = 1e-300


def fmt_p(p: float, log_p: float | None = None) -> str:
    """Format a p-value by the rule above.

    Examples
    --------
    >>> fmt_p(0.03824), fmt_p(0.5), fmt_p(4.17e-4), fmt_p(3.8209e-7), fmt_p(0.0, -1234.5)
    ('0.0382', '0.500', '0.000417', '3.82e-07', 'below 1e-300')
    """
    if not math.isfinite(p):
        return "undefined"
    if p < P_FLOOR:
        return "below 1e-300"
    if p >= 1e-4:
        digits = max(3 - 1 - math.floor(math.log10(p)), 3)
        return f"{p:.{digits}f}" if p < 1 else "1"
    return f"{p:.2e}"


def p_equals(p: float, log_p: float | None = None) -> str:
    """The p-value with its relation: "p = 0.0382", or "p below 1e-300" (rule above).

    Examples
    --------
    >>> p_equals(0.03824), p_equals(0.0, -1234.5)
    ('p = 0.0382', 'p below 1e-300')
    """
    text = fmt_p(p, log_p)
    return f"p {text}" if text.startswith("below") else f"p = {text}"


def decimals_for(se: float) -> int:
    """Decimals that show a standard error to two significant digits.

    Common practice, no source.
    """
    if not math.isfinite(se) or se <= 0:
        return 4
    return int(min(max(1 - math.floor(math.log10(se)), 0), 12))


def fmt_num(x: float, decimals: int | None = None) -> str:
    """Format a number with fixed decimals, or 4 significant digits when none are given.

    Examples
    --------
    >>> fmt_num(501.2345, 2), fmt_num(float("inf")), fmt_num(-0.000012345)
    ('501.23', '∞', '-1.234e-05')
    """
    if math.isnan(x):
        return "n/a"
    if math.isinf(x):
        return "∞" if x > 0 else "−∞"
    if decimals is not None:
        return f"{x:.{decimals}f}"
    if x != 0 and (abs(x) >= 1e6 or abs(x) < 1e-3):
        return f"{x:.4g}"
    return f"{x:.4g}" if abs(x) >= 1000 else f"{x:.4f}".rstrip("0").rstrip(".") or "0"


def fmt_df(df: float) -> str:
    """Degrees of freedom: whole numbers plain, Welch df with two decimals.

    >>> fmt_df(14.0), fmt_df(20.7271), fmt_df(float("inf"))
    ('14', '20.73', '∞')
    """
    if math.isinf(df):
        return "∞"
    return f"{df:.0f}" if float(df).is_integer() else f"{df:.2f}"


def fmt_level(level: float) -> str:
    """Confidence level as a percentage: 0.95 -> '95%', 0.999 -> '99.9%'."""
    return f"{level * 100:.10g}%"


def fmt_sig(x: float, digits: int = 3) -> str:
    """A number with ``digits`` significant digits and a real minus sign.

    >>> fmt_sig(0.123456), fmt_sig(-2.5e-7, 2), fmt_sig(float("nan"))
    ('0.123', '−2.5e−07', 'n/a')
    """
    if not math.isfinite(x):
        return "n/a"
    return f"{x:.{digits}g}".replace("-", "−")
