"""Running tinfer on data that does not fit in one pandas DataFrame.

``import tinfer.scale.dask`` registers the ``.tinfer`` accessor on Dask DataFrames (Dask
is imported only then, never at ``import tinfer``). Each partition is reduced to
summaries (count, mean, sum of squared deviations, by a two-pass pass per partition) and
the summaries are merged by the pairwise formula of Chan, Golub and LeVeque, so results
equal those of the pandas path to rounding.
"""
