"""Display layer: HTML cards, Altair charts and the Jupyter display protocol.

Nothing here runs at ``import tinfer``; result objects import these modules when they are
first displayed. altair and vl-convert are imported only inside the chart functions.
"""
