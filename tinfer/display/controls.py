"""Shared pieces of the explorers that need no ipywidgets: ranges, messages, a view cache.

Used by :mod:`tinfer.display.explorers`, which builds the widgets themselves.
"""

from __future__ import annotations

import functools
import html
import math
from collections.abc import Callable
from typing import Any

from ..errors import TinferError
from .render import html as render_html

SIDE_OPTIONS = (("two-sided", "two-sided"), ("upper", "upper"), ("lower", "lower"))
LEVEL_RANGE = (0.5, 0.999)
DF_RANGE = (0.5, 1000.0)
TRIM_RANGE = (0.0, 0.45)
BOUND_RANGE = (-6.0, 6.0)
#: Lower-tail probabilities whose values the t-distribution explorer lists and marks.
TDIST_PERCENTILES = (0.025, 0.05, 0.95, 0.975)
#: Rendered views kept per explorer, so that moving a slider back and forth is instant.
CACHE_SIZE = 64
LABEL_STYLE = {"description_width": "9em"}
WIDE = "34em"
N_WORDS = {"one-sample": "n", "paired": "pairs", "two-sample": "n (first group)"}


def card_html(obj: Any) -> str:
    """The HTML card of ``obj`` (a result or a t-distribution view), chart included."""
    return render_html(obj)


def message_html(text: str) -> str:
    """A one-line warning above the view ("" for no message)."""
    if not text:
        return ""
    return f'<div class="tinfer-explore-message" role="status">⚠ {html.escape(text)}</div>'


def probe(obj: Any, **options: Any) -> bool:
    """True when ``obj.recompute`` accepts ``options`` (unknown options raise TypeError)."""
    try:
        obj.recompute(**options)
    except TypeError:
        return False
    except TinferError:
        return True  # the option exists; this particular value was refused
    return True


class ViewCache:
    """A small LRU of rendered views keyed by the options that produced them."""

    def __init__(self, compute: Callable[[dict], Any], size: int = CACHE_SIZE) -> None:
        self._compute_options = compute
        self._get = functools.lru_cache(maxsize=size)(self._compute)

    def _compute(self, key: tuple):
        return self._compute_options(dict(key))

    def __call__(self, options: dict[str, Any]):
        return self._get(tuple(sorted(options.items(), key=lambda kv: kv[0])))


def plan_view_html(plan_result) -> str:
    """HTML for the plan explorer: the plan's card, which embeds its power curve as SVG.

    Examples
    --------
    >>> import tinfer
    >>> text = plan_view_html(tinfer.plan("two-sample", effect=0.5, power=0.8))
    >>> "64" in text and text.count("<svg") == 1
    True
    """
    return card_html(plan_result)


def margin_step(m: float) -> float:
    """A step for the margin box: one tenth of the margin's leading digit."""
    return float(10 ** math.floor(math.log10(m) - 1)) if m > 0 else 0.1
