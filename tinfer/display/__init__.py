"""Display layer: HTML cards, Altair charts, widgets and the Jupyter display protocol.

Reads result objects only (and the numbers of :mod:`tinfer.core`); never imports
:mod:`tinfer.frames` or :mod:`tinfer.analyses`. One module per kind of result, each
registering its card with :func:`tinfer.display.render.card`. Nothing here runs at
``import tinfer`` but :mod:`tinfer.display.offline`; altair, vl-convert and ipywidgets are
imported only when a chart or a widget is first asked for.
"""
