"""Glue between result objects and the Jupyter display protocol.

:func:`card` is a :func:`functools.singledispatch` function: each display module registers
the card of its result type (``@card.register``), so this module needs no list of types.
``_repr_mimebundle_`` of every result calls :func:`mimebundle`, which returns the plain text
(always) and the HTML card.
"""

from __future__ import annotations

import functools
import warnings
from typing import Any


@functools.singledispatch
def card(obj: Any, chart: bool = True) -> str:
    """The HTML card of ``obj``; every result type registers its own."""
    raise TypeError(f"tinfer has no card for {type(obj).__name__} objects.")


def _register_cards() -> None:
    """Import the display modules, each of which registers the card of its result type."""
    from . import batch, bayes, bootstrap, diagnostics, lift, pairwise, plan, tdist, ttest  # noqa: F401


def html(obj: Any, chart: bool = True) -> str:
    """The HTML card of a result, a t distribution or a view of one.

    Parameters
    ----------
    obj : TResult, TDistribution, TDistView, PlanResult, BatchResult, Diagnostics or BootstrapCheck
        What to show. Every one of these cards shares one skeleton (stylesheet, text
        fallback, kicker, headline, tables, chart, provenance).
    chart : bool
        Embed the chart as inline SVG (needs altair's sibling vl-convert, not a network).

    Examples
    --------
    >>> import tinfer
    >>> r = tinfer.from_summary(n=12, mean=5.4, sd=1.1, null=5.0)
    >>> html(r, chart=False).startswith('<div class="tinfer-card">')
    True
    """
    _register_cards()
    return card(obj, chart=chart)


def mimebundle(obj: Any, text: str | None = None) -> dict[str, str]:
    """The Jupyter display bundle: ``text/plain`` always, ``text/html`` when it can be built.

    ``text`` is the plain text (default ``str(obj)``). Should the card fail, a warning is
    issued and the plain text alone is returned, so a display problem never hides the
    numbers.

    Examples
    --------
    >>> import tinfer
    >>> bundle = mimebundle(tinfer.tdist(5))
    >>> sorted(bundle)
    ['text/html', 'text/plain']
    """
    bundle = {"text/plain": str(obj) if text is None else text}
    try:
        bundle["text/html"] = html(obj)
    except Exception as exc:  # a broken card must not hide the numbers
        warnings.warn(
            f"tinfer could not build the HTML card ({type(exc).__name__}: "
            f"{str(exc).splitlines()[0][:200] if str(exc) else ''}); showing plain text.",
            RuntimeWarning,
            stacklevel=2,
        )
    return bundle
