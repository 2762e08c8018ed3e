"""Charts that render in static exports: switch Altair to inline SVG made by vl-convert."""

from __future__ import annotations

from ..optional import require


def offline_charts(enable: bool = True) -> None:
    """Show Altair charts as inline SVG (rendered by vl-convert) instead of JavaScript views.

    Cards always embed their chart as SVG. Charts returned by ``.chart()`` are Altair objects,
    which Jupyter shows through Altair's renderer: by default a JavaScript view that loads its
    libraries from a CDN and stays blank in an offline HTML export. Call this once at the top
    of a notebook meant to be shared as an analysis record; ``enable=False`` restores
    Altair's default renderer (interactive charts in a live notebook).

    Examples
    --------
    >>> import tinfer, altair as alt
    >>> tinfer.offline_charts()
    >>> alt.renderers.active
    'svg'
    >>> tinfer.offline_charts(False)
    >>> alt.renderers.active
    'default'
    """
    alt = require("altair", "offline_charts")
    require("vl_convert", "offline_charts")
    alt.renderers.enable("svg" if enable else "default")
