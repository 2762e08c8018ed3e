"""Hypothesis strategies shared by the property tests, kept in one place."""

from __future__ import annotations

import numpy as np
from hypothesis import strategies as st

SIDES = ("two-sided", "upper", "lower")

sides = st.sampled_from(SIDES)
levels = st.floats(min_value=0.5, max_value=0.999)
shifts = st.floats(min_value=-1e3, max_value=1e3, allow_nan=False, allow_infinity=False)
scales = st.floats(min_value=1e-3, max_value=1e3, allow_nan=False, allow_infinity=False)
nulls = st.floats(min_value=-50.0, max_value=50.0, allow_nan=False, allow_infinity=False)

_values = st.floats(min_value=-1e3, max_value=1e3, allow_nan=False, allow_infinity=False)


def _spread_enough(xs: list[float]) -> bool:
    """Reject samples whose spread is tiny next to their size, where any t is ill-conditioned."""
    x = np.asarray(xs)
    return float(np.std(x)) > 1e-2 * (1.0 + float(np.max(np.abs(x))))


def samples(min_size: int = 2, max_size: int = 25) -> st.SearchStrategy[np.ndarray]:
    """A float sample with a spread that is not negligible next to its magnitude."""
    return (
        st.lists(_values, min_size=min_size, max_size=max_size)
        .filter(_spread_enough)
        .map(lambda xs: np.asarray(xs, dtype=np.float64))
    )


two_samples = st.tuples(samples(), samples())


@st.composite
def paired_samples(draw, min_size: int = 3, max_size: int = 25) -> tuple[np.ndarray, np.ndarray]:
    """Two equally long samples whose differences have a spread."""
    first = draw(samples(min_size, max_size))
    diff = draw(samples(len(first), len(first)))
    return first, first - diff


moments = st.tuples(
    st.integers(min_value=2, max_value=500),
    st.floats(min_value=-100.0, max_value=100.0),
    st.floats(min_value=0.01, max_value=100.0),
)


# ----------------------------------------------------------------------------- hostile input
#: Characters that break renderers or pages: every C0 and C1 control, DEL, the Unicode line
#: and paragraph separators, bidirectional overrides, zero-width and noncharacters.
NASTY_CHARS = (
    [chr(c) for c in range(0x20)]
    + ["\x7f"]
    + [chr(c) for c in range(0x80, 0xA0)]
    + ["\u2028", "\u2029", "\u202e", "\u200b", "\ufeff", "\ufffe", "\uffff", "\U0010ffff"]
)
#: Whole labels that have tripped a display somewhere: markup, quotes, very long text.
NASTY_LABELS = [
    "",
    "   ",
    "<script>alert(1)</script>",
    "</style><b>x</b>",
    '"><svg onload=alert(1)>',
    "a'b\"c\\d",
    "{{x}} ${y} %s",
    "🌱 plot",
    "e\u0301\u0301\u0301",
    "x" * 10_000,
    "line one\nline two",
    "tab\there",
]


def labels() -> st.SearchStrategy[str]:
    """Text a user could paste as a label: any Unicode (no lone surrogates, which pandas's
    string columns cannot hold), salted with the characters and labels above."""
    any_text = st.text(alphabet=st.characters(exclude_categories=("Cs",)), min_size=0, max_size=40)
    salted = st.tuples(any_text, st.sampled_from(NASTY_CHARS), any_text).map("".join)
    return st.one_of(any_text, salted, st.sampled_from(NASTY_LABELS))


@st.composite
def degenerate_samples(draw, min_size: int = 0, max_size: int = 8) -> np.ndarray:
    """Data at the edges: n of 0, 1 or 2, no spread, ties, NaN and infinities, and
    magnitudes from 1e-300 to 1e308."""
    magnitude = draw(st.sampled_from([1e-300, 1e-150, 1e-8, 1.0, 1e8, 1e154, 1e300, 1e308]))
    base = draw(st.sampled_from([0.0, 1.0, -1.0, 1e9]))
    kind = draw(st.sampled_from(["spread", "ties", "constant", "odd"]))
    n = draw(st.integers(min_value=min_size, max_value=max_size))
    if kind == "constant":
        x = np.full(n, base)
    elif kind == "ties":
        x = base + magnitude * np.asarray(draw(st.lists(st.sampled_from([0, 1]), min_size=n,
                                                        max_size=n)), float)  # fmt: skip
    else:
        x = base + magnitude * np.asarray(
            draw(st.lists(st.floats(-1, 1, allow_nan=False), min_size=n, max_size=n)), float
        )
    if kind == "odd" and n:
        odd = draw(st.sampled_from([np.nan, np.inf, -np.inf]))
        x[draw(st.integers(0, n - 1))] = odd
    return x
