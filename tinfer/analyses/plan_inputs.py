"""The inputs of ``tinfer.plan``, checked: what is given, what is solved for, on which grid.

Used by :mod:`tinfer.analyses.plan`; every message has the one shape of
:mod:`tinfer.checks`.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from ..checks import check_level, check_side, close_matches
from ..core import power as pw
from ..errors import ParameterError

DESIGNS = ("one-sample", "paired", "two-sample")
EQUIV_PREFIX = "equivalence-"
FUNC = "plan"
Number = float | int
Grid = Number | Sequence[Number] | np.ndarray


def fail(name: str, what: str, got: Any) -> ParameterError:
    return ParameterError(f"The {name!r} parameter of {FUNC} must be {what}. Got {got!r} instead.")


def _as_array(value: Any, name: str, what: str) -> tuple[np.ndarray, bool]:
    """A scalar or 1-d grid of finite numbers as a float array, and whether it is a grid."""
    is_grid = isinstance(value, list | tuple | np.ndarray) and np.ndim(value) > 0
    try:
        arr = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise fail(name, what, value) from None
    if isinstance(value, bool) or arr.ndim > 1 or (is_grid and arr.size == 0):
        raise fail(name, what, value)
    if not np.all(np.isfinite(arr)):
        raise fail(name, what, value)
    return arr, is_grid


def _check_design(design: Any) -> tuple[str, bool]:
    names = DESIGNS + tuple(EQUIV_PREFIX + d for d in DESIGNS)
    if design not in names:
        raise ParameterError(
            f"The 'design' parameter of {FUNC} must be one of {', '.join(map(repr, names))}. "
            f"Got {design!r} instead. {close_matches(design, names, 'designs')}"
        )
    if design.startswith(EQUIV_PREFIX):
        return design[len(EQUIV_PREFIX) :], True
    return design, False


def _check_margin(margin: Any) -> tuple[float, float]:
    what = "a positive number m (for -m to m) or a pair (low, high) with low < 0 < high"
    try:
        arr = np.asarray(margin, dtype=float)
    except (TypeError, ValueError):
        raise fail("margin", what, margin) from None
    if arr.ndim == 0 and np.isfinite(arr) and arr > 0:
        return (-float(arr), float(arr))
    if arr.shape == (2,) and arr[0] < arr[1] and np.all(np.isfinite(arr)):
        return (float(arr[0]), float(arr[1]))
    raise fail("margin", what, margin)


@dataclass
class Inputs:
    """The checked inputs of one call of :func:`plan`, and what it solves for."""

    base: str
    equivalence: bool
    level: float
    side: str
    ratio: float
    sd: float | None
    margin: tuple[float, float] | None
    effect: np.ndarray | None = None
    n: np.ndarray | None = None
    target: np.ndarray | None = None
    grids: list[str] | None = None
    solved: str = ""
    shape: tuple[int, ...] = ()
    power_given: Any = None  # the ``power`` argument as passed, for messages

    @property
    def two(self) -> bool:
        return self.base == "two-sample"

    def power_at(self, effect, n1) -> np.ndarray:
        """Exact power of this design at (broadcast) effects and first-group sizes."""
        n2 = pw.second_group(n1, self.ratio) if self.two else None
        if self.equivalence:
            low, high = self.std_margin
            return pw.equivalence_power(effect, low, high, n1, n2, level=self.level)
        return pw.t_power(effect, n1, n2, level=self.level, side=self.side)

    @property
    def std_margin(self) -> tuple[float, float]:
        """The equivalence margins in SD units."""
        scale = self.sd if self.sd is not None else 1.0
        return self.margin[0] / scale, self.margin[1] / scale


def read_inputs(design, effect, n, power, level, side, ratio, sd, diff, margin) -> Inputs:
    """Check every input of :func:`plan` and decide what is solved for."""
    base, equivalence = _check_design(design)
    level = check_level(level, FUNC)
    side = check_side(side, FUNC)
    ratio = _check_ratio(ratio, base == "two-sample")
    if sd is not None:
        sd_arr, sd_grid = _as_array(sd, "sd", "a positive number")
        if sd_grid or not sd_arr > 0:
            raise fail("sd", "a positive number", sd)
        sd = float(sd_arr)
    if margin is not None:
        equivalence = True
    if equivalence:
        if margin is None:
            raise fail("margin", f"given for design {design!r}", None)
        if side != "two-sided":
            raise fail("side", "'two-sided' (its default) for an equivalence plan", side)
    q = Inputs(base, equivalence, level, side, ratio, sd, None, grids=[], power_given=power)
    q.effect = _effect(q, effect, diff)
    q.n = _sizes(q, n)
    if power is not None:
        q.target, g = _as_array(power, "power", "a probability in (0, 1)")
        if np.any((q.target <= 0) | (q.target >= 1)):
            raise fail("power", "a probability in (0, 1)", power)
        if g:
            q.grids.append("power")
    given = (("effect", q.effect), ("n", q.n), ("power", q.target))
    missing = [k for k, v in given if v is None]
    if equivalence and len(missing) != 1:
        raise ParameterError(
            f"plan needs exactly one of 'n' and 'power' for an equivalence design (the other is "
            f"solved for; the true difference defaults to 0). Got n={n!r} and power={power!r}."
        )
    if len(missing) != 1:
        given_words = "all three" if not missing else " and ".join(missing) + " missing"
        raise ParameterError(
            f"plan needs all but one of 'effect' (or 'diff' with 'sd'), 'n' and 'power'; the "
            f"missing one is solved for. Got {given_words} instead."
        )
    q.solved = missing[0]
    arrays = [a for _, a in given if a is not None]
    try:
        q.shape = np.broadcast_shapes(*(np.shape(a) for a in arrays))
    except ValueError:
        raise ParameterError(
            f"The grids given to {FUNC} ({', '.join(q.grids)}) must have the same length. Got "
            f"lengths {[np.size(a) for a in arrays]} instead."
        ) from None
    q.margin = _check_margin(margin) if equivalence else None
    return q


def _check_ratio(ratio: Any, two: bool) -> float:
    if isinstance(ratio, bool) or not isinstance(ratio, int | float | np.number):
        raise fail("ratio", "a positive number", ratio)
    ratio = float(ratio)
    if not (np.isfinite(ratio) and ratio > 0):
        raise fail("ratio", "a positive number", ratio)
    if not two and ratio != 1.0:
        raise fail("ratio", "1 for a one-sample or paired design", ratio)
    return ratio


def _effect(q: Inputs, effect, diff) -> np.ndarray | None:
    """The standardised effect from ``effect`` or from ``diff / sd`` (0 for equivalence)."""
    if effect is not None and diff is not None:
        raise ParameterError(
            f"The 'effect' and 'diff' parameters of {FUNC} cannot both be given. Got "
            f"effect={effect!r} and diff={diff!r}; pass one (diff needs sd)."
        )
    if diff is not None:
        if q.sd is None:
            raise fail("sd", "a positive number when 'diff' is given", q.sd)
        d_arr, g = _as_array(diff, "diff", "a finite number or a list of them")
        if g:
            q.grids.append("diff")
        return d_arr / q.sd
    if effect is not None:
        eff, g = _as_array(effect, "effect", "a finite number or a list of them")
        if g:
            q.grids.append("effect")
        return eff
    return np.asarray(0.0) if q.equivalence else None


def _sizes(q: Inputs, n) -> np.ndarray | None:
    """``n`` as whole numbers of at least the smallest size the design allows."""
    if n is None:
        return None
    n_arr, g = _as_array(n, "n", "a whole number of at least 2 or a list of them")
    n_min = pw.smallest_n(q.two, q.ratio)
    if np.any(n_arr != np.round(n_arr)) or np.any(n_arr < n_min):
        what = f"a whole number of at least {n_min}" + (
            f" (so that each group has 2 at ratio {q.ratio:g})" if q.two and n_min > 2 else ""
        )
        raise fail("n", what, n)
    if g:
        q.grids.append("n")
    return n_arr
