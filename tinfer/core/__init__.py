"""The statistical core: pure numpy/scipy functions of summaries, vectorised over many tests.

Nothing here knows about pandas or display.
"""
