"""The object networkx loads through the ``networkx.backends`` entry point ``fastmst``.

networkx's dispatcher (``networkx.utils.backends``) looks up, on this module: the functions
this backend implements (by their networkx names), ``convert_from_nx`` / ``convert_to_nx``, and
``can_run`` (whether this backend runs the call with these arguments).  The backend's metadata
(``networkx.backend_info``) lives in the small top-level module ``_fastmst_nx``, which networkx
imports at its own import time and which therefore imports nothing.
"""
from __future__ import annotations

import inspect

from fastmst.nxbackend.graph import NxEdges, from_networkx
from fastmst.nxbackend.spanning import (FUNCTIONS, NX_ALGORITHMS, ALGORITHM,
                                        maximum_spanning_edges, maximum_spanning_tree,
                                        minimum_spanning_edges, minimum_spanning_tree)

__all__ = ["convert_from_nx", "convert_to_nx", "can_run", "NxEdges"] + sorted(FUNCTIONS)

_SIGNATURES = {name: inspect.signature(f) for name, f in FUNCTIONS.items()}


def convert_from_nx(G, edge_attrs=None, node_attrs=None, preserve_edge_attrs=False,
                    preserve_node_attrs=False, preserve_graph_attrs=False, name=None,
                    graph_name=None):
    """A networkx graph as this backend's ``NxEdges``.

    The ``*_attrs`` arguments are accepted and not needed: the conversion keeps references to
    the graph, its nodes and its edge dicts, so every attribute stays available (and weights
    are read at each call, see ``fastmst.nxbackend.graph``).
    """
    return from_networkx(G)


def convert_to_nx(obj, *, name=None):
    """The networkx graph behind an ``NxEdges``; any other result is already networkx's."""
    if isinstance(obj, NxEdges):
        return obj.graph
    return obj


def can_run(name, args, kwargs):
    """True when this backend runs ``name`` with these arguments, else the reason (a string).

    Declined: algorithms other than Kruskal (networkx's "prim" and "boruvka").  Everything
    else runs here, including arguments networkx refuses, so that the refusal is networkx's own
    exception (an unknown algorithm, a directed graph, a NaN weight).
    """
    sig = _SIGNATURES.get(name)
    if sig is None:
        return f"the fastmst backend does not implement {name}"
    try:
        algorithm = sig.bind(*args, **kwargs).arguments.get("algorithm", ALGORITHM)
        other = algorithm in NX_ALGORITHMS and algorithm != ALGORITHM
    except TypeError:
        return True                 # networkx raises its own TypeError for these arguments
    if other:
        return (f"the fastmst backend runs algorithm='kruskal' only; algorithm={algorithm!r} "
                f"runs in networkx")
    return True
