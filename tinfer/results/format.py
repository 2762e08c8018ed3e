"""Number formatting shared by text reprs, tables and cards (the words of every result).

The p-value rule (documented in docs/methods.md):
- three significant digits, fixed notation down to 0.0001 ("0.0382", "0.000417");
- below 0.0001, scientific notation with three significant digits ("3.82e−07");
- never "0": when the true p is below what double precision holds (about 1e-300),
  the text says "below 1e-300" and the exact natural log of p is kept on the result.

Every number printed by tinfer passes through this module, so that one rule holds in every
card, table and text form: a real minus sign (U+2212), whole numbers (such as integer df)
without decimals, and one number of decimals per column (:func:`column_decimals`).
"""

from __future__ import annotations

import math
from collections.abc import Iterable

P_FLOOR = 1e-300
MINUS = "\u2212"


def minus(text: str) -> str:
    """``text`` with every hyphen-minus made a real minus sign.

    >>> minus("-1.5e-07")
    '−1.5e−07'
    """
    return text.replace("-", MINUS)


def fmt_fixed(x: float, decimals: int) -> str:
    """A number with fixed decimals and a real minus sign (∞ for infinities).

    >>> fmt_fixed(-2.91804, 3), fmt_fixed(4.5, 0), fmt_fixed(float("-inf"), 2)
    ('−2.918', '4', '−∞')
    """
    if math.isnan(x):
        return "n/a"
    if math.isinf(x):
        return "∞" if x > 0 else "−∞"
    text = f"{x:.{decimals}f}"
    if text.lstrip("-").strip("0.") == "":  # -0.00 reads 0.00
        text = text.lstrip("-")
    return minus(text)


def column_decimals(scales: Iterable[float], digits: int = 2) -> int:
    """Decimals for a whole column: enough to show its smallest scale to ``digits`` digits.

    A column's scale is its standard error (for estimates and limits) or its spread; using
    the smallest in the column gives every row the same decimals. Common practice, no source.

    >>> column_decimals([0.797, 16.7]), column_decimals([250.0]), column_decimals([])
    (2, 0, 4)
    """
    finite = [abs(v) for v in scales if math.isfinite(v) and v > 0]
    if not finite:
        return 4
    return int(min(max(digits - 1 - math.floor(math.log10(min(finite))), 0), 12))


def fmt_p(p: float, log_p: float | None = None) -> str:
    """Format a p-value by the rule above.

    Examples
    --------
    >>> fmt_p(0.03824), fmt_p(0.5), fmt_p(4.17e-4), fmt_p(3.8209e-7), fmt_p(0.0, -1234.5)
    ('0.0382', '0.500', '0.000417', '3.82e−07', 'below 1e-300')
    """
    if not math.isfinite(p):
        return "undefined"
    if p < P_FLOOR:
        return "below 1e-300"
    if p >= 1e-4:
        digits = max(3 - 1 - math.floor(math.log10(p)), 3)
        return f"{p:.{digits}f}" if p < 1 else "1"
    return minus(f"{p:.2e}")


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
    ('501.23', '∞', '−1.234e−05')
    """
    if math.isnan(x):
        return "n/a"
    if math.isinf(x):
        return "∞" if x > 0 else "−∞"
    if decimals is not None:
        return fmt_fixed(x, decimals)
    if x != 0 and (abs(x) >= 1e6 or abs(x) < 1e-3):
        return minus(f"{x:.4g}")
    text = f"{x:.4g}" if abs(x) >= 1000 else f"{x:.4f}".rstrip("0").rstrip(".") or "0"
    return minus(text) if text != "-0" else "0"


def fmt_df(df: float) -> str:
    """Degrees of freedom: whole numbers plain, Welch df with two decimals.

    >>> fmt_df(14.0), fmt_df(20.7271), fmt_df(float("inf"))
    ('14', '20.73', '∞')
    """
    if math.isinf(df):
        return "∞"
    if math.isnan(df):
        return "n/a"
    whole = round(df)
    return f"{whole:.0f}" if abs(df - whole) <= 1e-9 * max(1.0, abs(df)) else f"{df:.2f}"


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


def fmt_bf(log_bf: float) -> str:
    """A Bayes factor from its natural log: 3 significant digits, powers of ten when huge.

    >>> fmt_bf(math.log(12.345)), fmt_bf(1000.0), fmt_bf(-1000.0)
    ('12.3', '1.97 × 10^434', '5.08 × 10^-435')
    """
    if abs(log_bf) < math.log(1e6):
        return fmt_sig(math.exp(log_bf), 3)
    log10 = log_bf / math.log(10.0)
    exponent = math.floor(log10)
    mantissa = 10 ** (log10 - exponent)
    if round(mantissa, 2) >= 10.0:
        mantissa, exponent = mantissa / 10, exponent + 1
    return f"{mantissa:.2f} × 10^{exponent}"


def pct(x: float, decimals: int = 1) -> str:
    """A lift as a signed percentage with fixed ``decimals`` (real minus sign).

    >>> pct(0.0321), pct(-0.105, 2), pct(float("inf"))
    ('+3.2%', '−10.50%', 'unbounded')
    """
    if not math.isfinite(x):
        return "unbounded"
    text = f"{100.0 * x:+.{decimals}f}%"
    if text.strip("+-%0.") == "":
        text = f"{0.0:.{decimals}f}%"
    return text.replace("-", "−")


def pct_decimals(low: float, high: float) -> int:
    """Decimals that show an interval's width (in percent) to two significant digits.

    A limit that is not zero keeps enough decimals to show its sign.

    >>> pct_decimals(0.0121, 0.0687), pct_decimals(-0.3, 0.9), pct_decimals(0.0, 0.0004)
    (1, 0, 3)
    >>> pct_decimals(-0.004, 0.105)
    1
    """
    width = 100.0 * (high - low)
    if not (math.isfinite(width) and width > 0):
        return 1
    d = int(min(max(1 - math.floor(math.log10(width)), 0), 6))
    for v in (low, high):  # a limit that is not 0 never prints as 0: its sign must show
        while 0 < abs(100.0 * v) < 0.5 * 10.0**-d and d < 6:
            d += 1
    return d
