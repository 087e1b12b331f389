"""Dask: annotate a dask DataFrame partition by partition, on the workers
of an existing cluster.

    from distributed import Client
    import dask.dataframe as dd
    import shellwright.dask

    Client("tcp://scheduler-host:8786")     # or distributed.LocalCluster()
    ddf = dd.read_csv("registry-*.csv")
    out = shellwright.dask.annotate(ddf, formula="formula", id="id")
    out.to_parquet("annotated/")

The workers need the shellwright package installed (docs/python.md).
"""

from shellwright import frames


def _annotate_partition(df, first_rows, kwargs, partition_info=None):
    number = partition_info["number"] if partition_info else 0
    return frames.annotate(df, first_row=first_rows[number], **kwargs)


def annotate(ddf, formula="formula", **kwargs):
    """shellwright.annotate on every partition of `ddf` (a
    dask.dataframe.DataFrame), lazily: returns a dask DataFrame with the
    same partitions and the report's columns.

    Takes the arguments of shellwright.annotate. The reports' rows are the
    positions in the whole frame, as shellwright.annotate numbers them for
    the whole frame in one piece; counting them reads the partitions once
    more, unless a row= column is given.
    """
    import numpy as np

    if not hasattr(ddf, "map_partitions"):
        raise TypeError("shellwright.dask.annotate: expected a dask "
                        "DataFrame, got " + type(ddf).__name__)
    kwargs = dict(kwargs, formula=formula)
    first_row = kwargs.pop("first_row", 1)
    if "row" in kwargs:
        first_rows = [first_row] * ddf.npartitions
    else:
        lengths = ddf.map_partitions(len).compute()
        first_rows = (first_row + np.concatenate(
            [[0], np.cumsum(np.asarray(lengths))[:-1]])).tolist()
    meta = frames.annotate(ddf._meta, **kwargs)
    return ddf.map_partitions(_annotate_partition, first_rows, kwargs,
                              meta=meta)
