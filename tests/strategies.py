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
