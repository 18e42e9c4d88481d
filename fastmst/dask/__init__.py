"""Minimum spanning forests of edge lists larger than memory, on Dask.

Install with ``pip install fastmst[dask]``; this module is not imported by ``import fastmst``.

The edges live in a Dask collection (a Dask DataFrame such as ``dd.read_parquet(...)``, a Dask
Bag, or a list of ``dask.delayed`` chunks) with *global* node ids.  Edge ``k`` of partition ``p``
gets the global edge id ``offset[p] + k``, where ``offset`` is the running sum of the partition
lengths, so the ids are the positions the edges would have in the concatenated arrays.  Every
step breaks ties by (weight, edge id), the rule of :func:`fastmst.minimum_spanning_forest`; the
forest under that total order is unique, so the result is identical to the in-memory solve on
the concatenated arrays, for every partitioning, cluster size and retry.

One module per concept:

* ``chunks``: the partitions of the collection and each partition's arrays; the validation
  pass's task (checks, row count, weight sample).
* ``runner``: running a pass on the client's cluster (or the local scheduler), broadcasts,
  reduction trees.
* ``filter_kruskal``: the default plan, distributed Filter-Kruskal with the forest solved on
  the client level by level.
* ``tree_filter`` and ``boruvka``: the plans "filter" (local forests merged in a tree) and
  "boruvka" (distributed Borůvka rounds).
* ``plan``: the public function, which validates the arguments, runs the validation pass and
  the chosen plan, and assembles the ``SpanningForest``.
* ``checks``: the checks of columns and chunk arrays.
"""
from __future__ import annotations

from fastmst.dask.plan import BYTES_PER_EDGE, PLANS, minimum_spanning_forest

__all__ = ["minimum_spanning_forest", "PLANS", "BYTES_PER_EDGE"]
