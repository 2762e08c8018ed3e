"""Glue between result objects and the Jupyter display protocol.

``_repr_mimebundle_`` of every result calls :func:`mimebundle`, which returns the plain text
(always) and the HTML card. The stylesheet is read once from the package with
:mod:`importlib.resources` and kept (one string; nothing else is cached).
"""

from __future__ import annotations

import functools
import importlib.resources
import re
import warnings
from typing import Any


@functools.lru_cache(maxsize=1)
def css() -> str:
    """The card stylesheet shipped in ``tinfer/display/static/tinfer.css``, minified.

    Comments and runs of white space are removed, so that a viewer whose sanitiser turns the
    ``<style>`` element into text shows one compact line rather than the whole file.

    Examples
    --------
    >>> ".tinfer-card{" in css()
    True
    """
    text = (
        importlib.resources.files("tinfer.display")
        .joinpath("static", "tinfer.css")
        .read_text(encoding="utf-8")
    )
    return minify(text)


def minify(text: str) -> str:
    r"""Drop CSS comments and collapse white space (never inside a selector's meaning).

    >>> minify("/* note */ .a  b {\n  color: red;\n}\n")
    '.a b{color: red;}'
    """
    text = re.sub(r"/\*.*?\*/", "", text, flags=re.S)
    text = re.sub(r"\s+", " ", text)
    return re.sub(r"\s*([{};])\s*", r"\1", text).strip()


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
    from .._tdist import TDistribution, TDistView
    from ..results import TResult
    from . import card

    if isinstance(obj, TResult):
        return card.result_card(obj, chart=chart)
    if isinstance(obj, TDistribution):
        return card.tdist_card(obj.show(), chart=chart)
    if isinstance(obj, TDistView):
        return card.tdist_card(obj, chart=chart)
    from .._compare import BatchResult
    from .._diagnostics import BootstrapCheck, Diagnostics
    from .._plan import PlanResult

    if isinstance(obj, PlanResult):
        from .plan import plan_card

        return plan_card(obj, chart=chart)
    if isinstance(obj, BatchResult):
        from .batch import html_card

        return html_card(obj, chart=chart)
    if isinstance(obj, Diagnostics | BootstrapCheck):
        from . import diagnostics

        build = (
            diagnostics.diagnostics_card
            if isinstance(obj, Diagnostics)
            else diagnostics.bootstrap_card
        )
        return build(obj, chart=chart)
    if hasattr(obj, "_repr_mimebundle_"):  # any other object with its own card
        return obj._repr_mimebundle_()["text/html"]
    raise TypeError(f"tinfer has no card for {type(obj).__name__} objects.")


def mimebundle(obj: Any) -> dict[str, str]:
    """The Jupyter display bundle: ``text/plain`` always, ``text/html`` when it can be built.

    Should the card fail, a warning is issued and the plain text alone is returned, so a
    display problem never hides the numbers.

    Examples
    --------
    >>> import tinfer
    >>> bundle = mimebundle(tinfer.tdist(5))
    >>> sorted(bundle)
    ['text/html', 'text/plain']
    """
    bundle = {"text/plain": str(obj)}
    try:
        bundle["text/html"] = html(obj)
    except Exception as exc:  # a broken card must not hide the numbers
        warnings.warn(
            f"tinfer could not build the HTML card ({type(exc).__name__}: {exc}); "
            "showing plain text.",
            RuntimeWarning,
            stacklevel=2,
        )
    return bundle
