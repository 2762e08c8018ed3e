"""Interactive explorers: controls that recompute a result and redraw its card in place.

``result.explore()``, ``tinfer.tdist(df).explore()`` and ``plan.explore()`` return a small
:class:`ipywidgets.VBox` subclass (defined in :mod:`tinfer.display.explorers`, which is
imported on first use, after ipywidgets is found). Every change of a control recomputes from
the numbers the object already holds (``TResult.recompute`` works from the stored summaries;
the caller's DataFrame is never read again) and replaces the HTML view (card text plus
inline SVG chart). The object currently shown is kept in ``explorer.result``.

Static exports: an explorer's MIME bundle carries, next to the widget view, the card shown when
it was displayed as ``text/html`` and the result's text as ``text/plain``, so a viewer that
cannot run the widget can still show the numbers. (nbconvert's HTML exporter ranks the widget
view first by default; an offline record should rank ``text/html`` first to show the card.)
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from ..optional import require

if TYPE_CHECKING:  # pragma: no cover
    import ipywidgets

    from ..results.plan import PlanResult
    from ..results.tdist import TDistribution
    from ..results.ttest import TResult


def _explorers():
    """The explorer classes, once ipywidgets is found (or a helpful MissingDependencyError)."""
    require("ipywidgets", "interactive explorers")
    from . import explorers

    return explorers


def explore_result(result: TResult) -> ipywidgets.VBox:
    """An explorer for a t-test result: level, side and null (and margin/trim/pooling).

    Parameters
    ----------
    result : TResult
        The result to start from; it is recomputed from its stored summaries on every change.

    Returns
    -------
    ipywidgets.VBox
        With the controls as attributes (``level``, ``side``, ``null``, ``pooled``,
        ``margin``, ``trim``; ``None`` where they do not apply), the HTML ``view`` and the
        result currently shown as ``result``.

    Examples
    --------
    >>> import tinfer
    >>> r = tinfer.from_summary(n=20, mean=10.4, sd=1.5, null=10)
    >>> ex = explore_result(r)
    >>> ex.level.value = 0.9
    >>> ex.result.level
    0.9
    """
    return _explorers().ResultExplorer(result)


def explore_tdist(distribution: TDistribution) -> ipywidgets.VBox:
    """An explorer for the t distribution: df (or the normal) and a shaded area.

    Examples
    --------
    >>> import tinfer
    >>> ex = explore_tdist(tinfer.tdist(12))
    >>> ex.bounds.value = (-1.0, 2.0)
    >>> round(ex.area, 6)
    0.797148
    """
    return _explorers().TDistExplorer(distribution)


def explore_plan(plan_result: PlanResult) -> ipywidgets.VBox:
    """An explorer for a single study plan: the given quantities, level and ratio.

    The quantity the plan solved for (n, power or effect) is solved again on every change.

    Examples
    --------
    >>> import tinfer
    >>> ex = explore_plan(tinfer.plan("two-sample", effect=0.5, power=0.8))
    >>> ex.effect.value = 0.8
    >>> ex.result.n
    26
    """
    return _explorers().PlanExplorer(plan_result)
