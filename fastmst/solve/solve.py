"""minimum_spanning_forest: the public solve, and the private solve that internals call."""
from __future__ import annotations

import numpy as np

from fastmst import validation
from fastmst._kernels.small import small_forest
from fastmst._kernels.rule_order import first_unsorted
from fastmst.solve.constraints import constrained_forest, forest_fields, run
from fastmst.solve.methods import METHODS
from fastmst.solve.result import SpanningForest

_FUNC = "minimum_spanning_forest"


def minimum_spanning_forest(tail, head, weight, n_nodes=None, *, method="auto",
                            presorted=False, maximize=False, threads=None, required=None,
                            excluded=None) -> SpanningForest:
    """Minimum (or maximum) spanning forest of an undirected edge list.

    Parameters
    ----------
    tail, head : array_like of shape (E,), integer dtype
        Endpoints of each edge, ids in ``[0, n_nodes)``.  Any integer dtype.
    weight : array_like of shape (E,), integer or float dtype
        Edge weights.  Zero, negative and infinite weights are ordinary weights; NaN is an error.
        int32/int64/uint32/uint64/float32/float64 are read in place; narrower dtypes are widened.
    n_nodes : int, optional
        Number of nodes; defaults to the largest id + 1.  Nodes without edges are isolated
        components.
    method : {"auto", "kruskal", "filter-kruskal", "boruvka"}
        Algorithm.  Every method returns the identical forest; "auto" picks by the rule of
        ``choose_method`` (see docs/performance.md).
    presorted : bool
        The caller promises the weights are already non-decreasing (non-increasing with
        ``maximize``); the sort is skipped after an O(E) check.
    maximize : bool
        Return the maximum spanning forest instead.
    threads : int, optional
        Worker threads for the parallel methods; None or <= 0 means every available core.
    required, excluded : array_like of int or boolean mask of shape (E,), optional
        Positions that must be in the forest (joined first; a cycle among them is a ValueError
        naming its edges) and positions that may not be.  The result is the optimal forest that
        respects both, and its ``required_excess`` says what the requirement cost.

    Returns
    -------
    SpanningForest

    Raises
    ------
    TypeError, ValueError
        On malformed input; the message names the first offending position.

    Notes
    -----
    The graph is undirected; self-loops are ignored; parallel edges compete like any other edge.
    Ties are broken by input position: among equal weights the earlier edge wins.  The edges are
    thereby totally ordered by (weight, position), the minimum spanning forest under that order is
    unique, and every method, thread count, run and machine returns the same ``edges``.
    Kruskal runs in O(E log E) for the sort plus O(E alpha(V)) for the scan; Borůvka in
    O(E log V).  Graphs of up to 4,096 edges and 65,536 nodes given as plain contiguous NumPy
    arrays (int32/int64 ids, a 32- or 64-bit weight dtype) are solved in one C call that makes
    the same checks (``method`` "kruskal"): a few microseconds per call; the result is the
    same as every other method's.

    Examples
    --------
    >>> import numpy as np, fastmst
    >>> f = fastmst.minimum_spanning_forest([0, 1, 2, 0], [1, 2, 0, 3], [1.0, 2.0, 1.0, 5.0])
    >>> f.edges.tolist(), f.weight, f.n_components
    ([0, 2, 3], 7.0, 1)
    """
    # Small graphs in one C call (fastmst._kernels.small): only for arguments whose checks are
    # this cheap; the kernel itself checks the arrays and declines (None) anything it would
    # have to refuse or cannot read in place, which then takes the general route below and
    # gets its error there.  Threads do not matter to a serial kernel, but are checked.
    if (required is None and excluded is None and presorted is False
            and (maximize is False or maximize is True)
            and (threads is None or (type(threads) is int and threads <= validation.MAX_THREADS))
            and type(method) is str and (method == "auto" or method == "kruskal")):
        r = small_forest(tail, head, weight, n_nodes, maximize)
        if r is not None:
            return SpanningForest._small(r, maximize)
    g = validation.validate_edges(tail, head, weight, n_nodes, func=_FUNC)
    method = validation.check_choice(method, METHODS, "method", _FUNC)
    presorted = validation.check_bool(presorted, "presorted", _FUNC)
    maximize = validation.check_bool(maximize, "maximize", _FUNC)
    threads = validation.check_threads(threads, _FUNC)
    if presorted and g.n_edges:
        bad = first_unsorted(g.kweight, maximize)
        if bad >= 0:
            order = "non-increasing" if maximize else "non-decreasing"
            raise ValueError(f"{_FUNC}: presorted=True but the weights are not {order}: "
                             f"weight[{bad}] = {validation.shown(g.weight[bad])} follows "
                             f"weight[{bad - 1}] = {validation.shown(g.weight[bad - 1])}. Sort "
                             f"the edges first or pass presorted=False.")
    if required is not None or excluded is not None:
        req = validation.check_positions(required, g.n_edges, "required", _FUNC)
        exc = validation.check_positions(excluded, g.n_edges, "excluded", _FUNC)
        return SpanningForest._from_fields(constrained_forest(
            g, req, exc, method=method, presorted=presorted, maximize=maximize, threads=threads))
    return solve_validated(g, method=method, presorted=presorted, maximize=maximize,
                           threads=threads)


def solve_validated(g: validation.EdgeArrays, *, method: str = "auto", presorted: bool = False,
                    maximize: bool = False, threads: int = 1) -> SpanningForest:
    """The solve on edges that are already valid (private).

    ``g`` comes from ``validation.validate_edges`` or, for edges valid by construction, from
    ``validation.trusted_edges``; ``method`` is one of ``METHODS``, ``threads`` a positive count
    and ``presorted`` is trusted, not checked.  Internals above the result (point trees, Steiner
    trees, Dask, ``check_forest``) call this instead of the public function so that nothing is
    validated twice; constraints and updates sit below ``SpanningForest`` and use the same two
    steps (``constraints.run``, ``constraints.forest_fields``) directly.
    """
    r, method = run(g, method, presorted, maximize, threads)
    return SpanningForest(**forest_fields(g, r, maximize, method))


def solve_trusted(tail: np.ndarray, head: np.ndarray, weight: np.ndarray, n_nodes: int, *,
                  maximize: bool = False, threads: int | None = None) -> SpanningForest:
    """``solve_validated`` of edges that are valid by construction (private).

    For internals that derive an edge list from validated input (candidate pairs of points,
    Steiner subgraphs, Dask partitions): see ``validation.trusted_edges`` for what the arrays
    must satisfy; nothing is checked.  ``threads=None`` means every available core.
    """
    threads = validation.check_threads(threads, _FUNC)
    return solve_validated(validation.trusted_edges(tail, head, weight, n_nodes),
                           maximize=maximize, threads=threads)
